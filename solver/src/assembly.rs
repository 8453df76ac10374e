//! Degrees of freedom, the sparsity pattern (built once per mesh) and the
//! scatter map that puts each element entry straight into its slot of the
//! compressed lower triangle.

use crate::constraints::Constraints;
use crate::dofs::DofMap;
use crate::element::{element_residual, element_system, ElementLoad, ElementOrder, LocalSystem, MAX_NODES};
use crate::linear_system::symmetric_product;
use crate::linear_system::Elimination;
use crate::material::{Law, Tangent};
use crate::ordering;
use crate::pattern::{build_pattern, pairs, SystemTooLarge, NO_SLOT};
use crate::problem::Problem;
use crate::space::{ElementKind, Elements, NONE};
use mesher::Mesh;
use nalgebra_sparse::CscMatrix;
use rayon::prelude::*;

/// Elements computed in parallel before their entries are scattered.
const BLOCK: usize = 1 << 14;

/// The assembled linear system's structure, reused by every Newton step.
pub struct System {
    /// The element table.
    pub elements: Elements,
    /// Unknown of each node (NONE where fixed), in elimination order.
    pub dof_of_node: Vec<usize>,
    /// Number of unknowns.
    pub n_dofs: usize,
    /// Sign of each node's potential against its unknown (-1 across an
    /// anti-periodic pair); empty when every sign is +1.
    pub sign_of_node: Vec<f64>,
    /// Lower triangle of the tangent, compressed by columns.
    pub matrix: CscMatrix<f64>,
    /// For element e, node pair i <= j: the slot in `matrix` values, or NO_SLOT.
    scatter: Vec<u32>,
    /// Two buffers of element systems: one filled while the other is scattered.
    blocks: [Vec<f64>; 2],
    air: Law,
    affine: Option<AffinePart>,
    /// Elements with a saturating law, evaluated at every assembly.
    nonlinear: Vec<usize>,
    /// Whether the unknowns are numbered in a fill-reducing elimination order.
    pub elimination: Elimination,
    /// Seconds this structure took to build (reported as the pattern time
    /// even when it was built ahead, beside another solve).
    pub seconds_built: f64,
}

impl System {
    /// The structure for `mesh`; refused when the matrix would have more
    /// entries than the scatter map's 32-bit slots can address.
    pub fn new(mesh: &Mesh, order: ElementOrder) -> Result<System, SystemTooLarge> {
        let start = std::time::Instant::now();
        // The corner graph's ordering needs only the mesh: it is made on one
        // core while the element table is built on the other.
        let higher = order != ElementOrder::Linear;
        let (elements, ranks) = rayon::join(|| Elements::from_mesh(mesh, order), || if higher { ordering::corner_ranks(mesh) } else { None });
        let constraints = Constraints::of_mesh(mesh, &elements);
        let tied = !constraints.ties.is_empty();
        let DofMap {
            mut dof_of_node,
            n_dofs,
            sign_of_node,
        } = DofMap::new(&constraints);
        // Linear elements (or no workspace for the ordering) leave the
        // ordering to AMD of the matrix: their corner graph is the matrix
        // graph, and its fixed corners made the factor 4 % larger. Tied
        // nodes share an unknown, which the corner graph does not know.
        let elimination = match ranks {
            Some(ranks) if !tied && ordering::number_for_elimination(&elements, &ranks, &mut dof_of_node) => Elimination::AsNumbered,
            _ => Elimination::MinimumDegree,
        };
        let (pattern, scatter) = build_pattern(&elements, &dof_of_node, n_dofs)?;
        let nnz = pattern.nnz();
        let values = crate::buffer::zeroed(nnz).ok_or(SystemTooLarge { entries: nnz })?;
        let matrix = CscMatrix::try_from_pattern_and_values(pattern, values).map_err(|_| SystemTooLarge { entries: nnz })?;
        Ok(System {
            elements,
            dof_of_node,
            n_dofs,
            sign_of_node,
            matrix,
            scatter,
            blocks: [Vec::new(), Vec::new()],
            air: Law::air(),
            affine: None,
            nonlinear: Vec::new(),
            elimination,
            seconds_built: start.elapsed().as_secs_f64(),
        })
    }

    /// Whether this structure was made for `mesh` at `order` (one made
    /// ahead is used for the solve and the prolongation only then).
    pub fn fits(&self, mesh: &Mesh, order: ElementOrder) -> bool {
        self.elements.n_physical == mesh.triangles.len() && self.elements.order == order
    }

    /// Fills the tangent and returns the residual at nodal potentials `a` (all nodes).
    ///
    /// Elements whose law is affine in B (air, magnets, linear materials) are
    /// assembled once, at the first call; later calls add their tangent as
    /// stored and their residual as K_aff a + r_aff(0), and evaluate only the
    /// saturating elements.
    pub fn assemble(&mut self, problem: &Problem, a: &[f64], tangent: Tangent) -> Vec<f64> {
        let affine = self.affine_residual(problem, a);
        self.assemble_with(problem, a, tangent, affine)
    }

    /// `assemble` with the affine elements' residual at `a` already known
    /// (from `affine_residual`, or a line search's combination of two).
    pub fn assemble_with(&mut self, problem: &Problem, a: &[f64], tangent: Tangent, affine_residual: Vec<f64>) -> Vec<f64> {
        self.prepare_affine(problem);
        let mut residual = affine_residual;
        let values = self.matrix.values_mut();
        match &self.affine {
            Some(AffinePart { values: Some(f), .. }) => crate::buffer::copy(values, f),
            // The matrix holds the affine tangent, and nothing else adds to it.
            Some(AffinePart { values: None, .. }) => {}
            None => values.fill(0.0),
        }
        let target = Target {
            els: &self.elements,
            scatter: &self.scatter,
            dof_of_node: &self.dof_of_node,
            sign_of_node: &self.sign_of_node,
        };
        let how = Kernel { air: &self.air, tangent };
        target.accumulate(problem, a, &self.nonlinear, how, &mut self.blocks, values, &mut residual);
        residual
    }

    /// The residual alone at nodal potentials `a`, leaving the tangent as it was.
    pub fn residual(&mut self, problem: &Problem, a: &[f64]) -> Vec<f64> {
        let affine = self.affine_residual(problem, a);
        self.residual_with(problem, a, affine)
    }

    /// `residual` with the affine elements' residual at `a` already known.
    #[allow(clippy::needless_range_loop)]
    pub fn residual_with(&mut self, problem: &Problem, a: &[f64], affine_residual: Vec<f64>) -> Vec<f64> {
        self.prepare_affine(problem);
        let mut residual = affine_residual;
        let els = &self.elements;
        let m = els.order.n_nodes();
        let signs = &self.sign_of_node;
        let local: Vec<[f64; MAX_NODES]> = self
            .nonlinear
            .par_iter()
            .map(|&e| {
                let mut r = element_residual(
                    els.geometry(e),
                    &els.gather(e, a),
                    els.order,
                    problem.mesh.symmetry,
                    els.placement(e),
                    element_load(e, els.kinds[e], problem, &self.air),
                );
                if let Some(s) = element_signs(els, signs, e) {
                    r.iter_mut().zip(s).for_each(|(r, s)| *r *= s);
                }
                r
            })
            .collect();
        for (&e, r) in self.nonlinear.iter().zip(&local) {
            for i in 0..m {
                let d = self.dof_of_node[els.nodes[e][i]];
                if d != NONE {
                    residual[d] += r[i];
                }
            }
        }
        residual
    }

    /// Assembles the affine elements once (at zero potential) and lists the others.
    fn prepare_affine(&mut self, problem: &Problem) {
        if self.affine.is_some() {
            return;
        }
        let (mut affine_list, mut nonlinear) = (Vec::new(), Vec::new());
        for e in 0..self.elements.len() {
            if element_load(e, self.elements.kinds[e], problem, &self.air).law.is_nonlinear() {
                nonlinear.push(e);
            } else {
                affine_list.push(e);
            }
        }
        // Without saturating elements the tangent never changes: it is assembled
        // straight into the matrix (still zero), which then stands for K_aff.
        let mut own = match nonlinear.is_empty() {
            true => None,
            // (Failing the parallel fill, the plain allocation aborts as any other would.)
            false => Some(crate::buffer::zeroed(self.matrix.nnz()).unwrap_or_else(|| vec![0.0; self.matrix.nnz()])),
        };
        let mut rhs = vec![0.0; self.n_dofs];
        let zero = vec![0.0; self.dof_of_node.len()];
        let target = Target {
            els: &self.elements,
            scatter: &self.scatter,
            dof_of_node: &self.dof_of_node,
            sign_of_node: &self.sign_of_node,
        };
        let how = Kernel {
            air: &self.air,
            tangent: Tangent::Exact,
        };
        let values = match &mut own {
            Some(v) => v.as_mut_slice(),
            None => self.matrix.values_mut(),
        };
        target.accumulate(problem, &zero, &affine_list, how, &mut self.blocks, values, &mut rhs);
        self.affine = Some(AffinePart { values: own, rhs });
        self.nonlinear = nonlinear;
    }

    /// The affine elements' residual r_aff(0) + K_aff a at nodal potentials
    /// `a` (K_aff held as a lower triangle on the tangent's pattern).
    pub fn affine_residual(&mut self, problem: &Problem, a: &[f64]) -> Vec<f64> {
        self.prepare_affine(problem);
        let x = self.unknowns_of(a);
        let mut y = self.affine_product(&x);
        if let Some(affine) = &self.affine {
            y.iter_mut().zip(&affine.rhs).for_each(|(y, r)| *y += r);
        }
        y
    }

    /// The parts of the stored energy that depend on the nodal potentials
    /// `a`, when every element is affine: [x . r0 + x . K x / 2, x . (K x +
    /// r0)], x the unknowns of `a`, K the matrix and r0 the residual at zero
    /// potential. Each element's energy is quadratic in its potentials, with
    /// r0 and K its first and second derivatives at zero, so at the
    /// assembly's own quadrature points these are the integrals of w - w(0)
    /// and of H . B, where the source is remanence alone (no current, no
    /// applied field: the caller's test). None with a nonlinear element.
    pub fn affine_energy_terms(&mut self, problem: &Problem, a: &[f64]) -> Option<[f64; 2]> {
        self.prepare_affine(problem);
        if !self.nonlinear.is_empty() {
            return None;
        }
        let x = self.unknowns_of(a);
        let rhs = &self.affine.as_ref()?.rhs;
        let kx = self.affine_product(&x);
        let (mut quadratic, mut hb) = (0.0, 0.0);
        for d in 0..self.n_dofs {
            quadratic += x[d] * (rhs[d] + 0.5 * kx[d]);
            hb += x[d] * (rhs[d] + kx[d]);
        }
        Some([quadratic, hb])
    }

    /// The unknowns of nodal potentials `a` (each tied node gives its unknown the same value).
    fn unknowns_of(&self, a: &[f64]) -> Vec<f64> {
        let mut x = vec![0.0; self.n_dofs];
        for (n, &d) in self.dof_of_node.iter().enumerate() {
            if d != NONE {
                x[d] = a[n] * self.sign_of_node.get(n).copied().unwrap_or(1.0);
            }
        }
        x
    }

    /// K_aff x for x given per unknown: how the affine residual changes along a step.
    pub fn affine_product(&self, x: &[f64]) -> Vec<f64> {
        match &self.affine {
            Some(affine) => symmetric_product(&self.matrix, affine.values.as_deref().unwrap_or(self.matrix.values()), x),
            None => vec![0.0; self.n_dofs],
        }
    }
}

/// The air law and the tangent kind of one assembly.
#[derive(Clone, Copy)]
struct Kernel<'l> {
    air: &'l Law,
    tangent: Tangent,
}

/// Where element entries go: the element table, its scatter map and dofs.
struct Target<'s> {
    els: &'s Elements,
    scatter: &'s [u32],
    dof_of_node: &'s [usize],
    sign_of_node: &'s [f64],
}

impl Target<'_> {
    /// Adds the tangent and residual of the listed elements: computed in
    /// parallel blocks, each block scattered (in order, so sums are
    /// reproducible) on one core while the next is computed on the other.
    #[allow(clippy::too_many_arguments)]
    fn accumulate(&self, problem: &Problem, a: &[f64], which: &[usize], how: Kernel, blocks: &mut [Vec<f64>; 2], values: &mut [f64], residual: &mut [f64]) {
        let symmetry = problem.mesh.symmetry;
        let els = self.els;
        let stride = packed_len(els.order.n_nodes());
        let compute = |chunk: &[usize], out: &mut Vec<f64>| {
            out.resize(chunk.len() * stride, 0.0);
            out.par_chunks_mut(stride).zip(chunk.par_iter()).for_each(|(packed, &e)| {
                let load = ElementLoad {
                    tangent: how.tangent,
                    ..element_load(e, els.kinds[e], problem, how.air)
                };
                let mut local = element_system(els.geometry(e), &els.gather(e, a), els.order, symmetry, els.placement(e), load);
                if let Some(s) = element_signs(els, self.sign_of_node, e) {
                    signed(&mut local, &s);
                }
                pack(&local, els.order.n_nodes(), packed);
            })
        };
        let chunks: Vec<&[usize]> = which.chunks(BLOCK).collect();
        let [current, spare] = blocks;
        if let Some(first) = chunks.first() {
            compute(first, current);
        }
        for (k, chunk) in chunks.iter().enumerate() {
            rayon::join(
                || self.scatter_block(chunk, current, values, residual),
                || {
                    if let Some(next) = chunks.get(k + 1) {
                        compute(next, spare)
                    }
                },
            );
            std::mem::swap(current, spare);
        }
    }

    /// Adds computed element systems (packed) into the matrix values and the residual.
    fn scatter_block(&self, chunk: &[usize], packed: &[f64], values: &mut [f64], residual: &mut [f64]) {
        let m = self.els.order.n_nodes();
        let stride = pairs(m);
        for (&e, local) in chunk.iter().zip(packed.chunks_exact(packed_len(m))) {
            let (k, r) = local.split_at(stride);
            for (&s, &v) in self.scatter[stride * e..stride * (e + 1)].iter().zip(k) {
                if s != NO_SLOT {
                    values[s as usize] += v;
                }
            }
            for (i, &v) in r.iter().enumerate() {
                let d = self.dof_of_node[self.els.nodes[e][i]];
                if d != NONE {
                    residual[d] += v;
                }
            }
        }
    }
}

/// Numbers an element system packs into: its upper triangle by rows, then
/// its residual. Blocks of full `LocalSystem`s (sized for quartic
/// elements) took 1.9 kB per element whatever the order, nine times what a
/// quadratic one needs; the fresh pages cost more than computing them.
fn packed_len(m: usize) -> usize {
    pairs(m) + m
}

/// Packs the first m rows of an element system into `out` (`packed_len(m)` long).
fn pack(local: &LocalSystem, m: usize, out: &mut [f64]) {
    let (k, r) = local;
    let mut slot = 0;
    for (i, row) in k.iter().enumerate().take(m) {
        out[slot..slot + m - i].copy_from_slice(&row[i..m]);
        slot += m - i;
    }
    out[slot..slot + m].copy_from_slice(&r[..m]);
}

/// The signs of element e's node potentials against their unknowns, when
/// one of them is -1 (a node tied across an anti-periodic pair).
pub(crate) fn element_signs(els: &Elements, sign_of_node: &[f64], e: usize) -> Option<[f64; MAX_NODES]> {
    if sign_of_node.is_empty() {
        return None;
    }
    let mut s = [1.0; MAX_NODES];
    for (k, &n) in els.element_nodes(e).iter().enumerate() {
        s[k] = sign_of_node[n];
    }
    s.contains(&-1.0).then_some(s)
}

/// An element system in its nodes' potentials turned into one in their
/// unknowns: row i and column j scale by the signs s_i and s_j.
fn signed(local: &mut LocalSystem, s: &[f64; MAX_NODES]) {
    let (k, r) = local;
    for i in 0..MAX_NODES {
        r[i] *= s[i];
        for j in 0..MAX_NODES {
            k[i][j] *= s[i] * s[j];
        }
    }
}

/// The tangent values and zero-potential residual of the affine elements.
struct AffinePart {
    /// None when every element is affine: the matrix holds them.
    values: Option<Vec<f64>>,
    rhs: Vec<f64>,
}

/// Law, current and background field of an element.
pub fn element_load<'a>(e: usize, kind: ElementKind, problem: &'a Problem, air: &'a Law) -> ElementLoad<'a> {
    match kind {
        ElementKind::Air => ElementLoad {
            law: air,
            current_density: 0.0,
            background: problem.applied_field,
            tangent: Tangent::Exact,
            share: 1.0,
        },
        ElementKind::Part(i) => ElementLoad {
            law: &problem.laws[problem.law_index(e, i)],
            current_density: problem.current_density[i],
            background: problem.applied_field,
            tangent: Tangent::Exact,
            share: problem.remanence_share(e),
        },
        ElementKind::Exterior => ElementLoad {
            law: air,
            current_density: 0.0,
            background: [0.0, 0.0],
            tangent: Tangent::Exact,
            share: 1.0,
        },
    }
}
