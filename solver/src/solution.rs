//! A solved problem: nodal potentials, element fields and point evaluation
//! with a recovered (smoothed) flux density.
//!
//! Point values use superconvergent patch recovery (Zienkiewicz and Zhu,
//! IJNME 33, 1992): at each corner of the element that holds the point, a
//! linear least-squares fit of the element-centroid values of B over the
//! patch of elements of the same region around that node. Patches never
//! cross a material interface, so a point gets the value of its own side.

use crate::assembly::{element_load, ElementKind, Elements, System};
use crate::element::{flux_density, point_op, Placement};
use crate::locate::Locator;
use crate::material::Law;
use crate::newton::{newton_solve, SolveError, SolveReport};
use crate::problem::Problem;
use mesher::Symmetry;

/// The solved state of a problem.
pub struct Solution<'m> {
    pub problem: Problem<'m>,
    pub elements: Elements,
    /// Reduced potential at every node (physical and exterior), Wb/m.
    pub reduced: Vec<f64>,
    pub report: SolveReport,
    /// Elements around each node (compressed rows).
    node_start: Vec<usize>,
    node_elements: Vec<usize>,
    locator: Locator,
    air: Law,
}

/// The field at a point.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PointField {
    pub b: [f64; 2],
    pub h: [f64; 2],
    /// The part the point lies in, None for air.
    pub part: Option<usize>,
}

/// Solves the problem. `progress` hears (iteration, relative residual).
pub fn solve<'m>(problem: &Problem<'m>, progress: &dyn Fn(usize, f64)) -> Result<Solution<'m>, SolveError> {
    let t = std::time::Instant::now();
    let mut system = System::new(problem.mesh);
    let pattern_seconds = t.elapsed().as_secs_f64();
    let (reduced, mut report) = newton_solve(problem, &mut system, progress)?;
    report.seconds_pattern = pattern_seconds;
    Ok(Solution::new(problem.clone(), system.elements, reduced, report))
}

impl<'m> Solution<'m> {
    fn new(problem: Problem<'m>, elements: Elements, reduced: Vec<f64>, report: SolveReport) -> Solution<'m> {
        let n_nodes = reduced.len();
        let mut node_start = vec![0usize; n_nodes + 1];
        for t in &elements.nodes[..elements.n_physical] {
            for &n in t {
                node_start[n + 1] += 1;
            }
        }
        for i in 0..n_nodes {
            node_start[i + 1] += node_start[i];
        }
        let mut fill = node_start.clone();
        let mut node_elements = vec![0; node_start[n_nodes]];
        for (e, t) in elements.nodes[..elements.n_physical].iter().enumerate() {
            for &n in t {
                node_elements[fill[n]] = e;
                fill[n] += 1;
            }
        }
        let locator = Locator::new(&elements);
        Solution { problem, elements, reduced, report, node_start, node_elements, locator, air: Law::air() }
    }

    pub fn symmetry(&self) -> Symmetry {
        self.problem.mesh.symmetry
    }

    /// Total potential (applied field included) at a physical node.
    pub fn node_potential(&self, n: usize) -> f64 {
        self.reduced[n] + self.problem.applied_potential(self.problem.mesh.nodes[n])
    }

    pub fn law(&self, kind: ElementKind) -> &Law {
        element_load(kind, &self.problem, &self.air).law
    }

    fn background(&self, e: usize) -> [f64; 2] {
        match self.elements.kinds[e] {
            ElementKind::Exterior => [0.0, 0.0],
            _ => self.problem.applied_field,
        }
    }

    /// B in element e at barycentric point lam (element interpolation, not recovered).
    pub fn element_b_at(&self, e: usize, lam: [f64; 3]) -> [f64; 2] {
        let op = point_op(&self.elements.coords[e], self.symmetry(), self.elements.placement(e), lam, 1.0);
        let a = self.elements.nodes[e].map(|n| self.reduced[n]);
        flux_density(&op, &a, self.background(e))
    }

    /// B at the centroid of element e.
    pub fn element_b(&self, e: usize) -> [f64; 2] {
        self.element_b_at(e, [1.0 / 3.0; 3])
    }

    /// Recovered B at node `n`, fitted over the elements of the same kind as `e`.
    fn recovered_at_node(&self, n: usize, e: usize) -> [f64; 2] {
        let kind = self.elements.kinds[e];
        let x0 = self.problem.mesh.nodes[n];
        let patch: Vec<usize> = self.node_elements[self.node_start[n]..self.node_start[n + 1]].iter().copied().filter(|&f| self.elements.kinds[f] == kind).collect();
        let samples: Vec<([f64; 2], [f64; 2])> = patch
            .iter()
            .map(|&f| {
                let c = self.elements.coords[f];
                let centroid = [(c[0][0] + c[1][0] + c[2][0]) / 3.0 - x0[0], (c[0][1] + c[1][1] + c[2][1]) / 3.0 - x0[1]];
                (centroid, self.element_b(f))
            })
            .collect();
        fit_linear_at_origin(&samples).unwrap_or_else(|| self.element_b(e))
    }

    /// Field at a physical point, or None outside the mesh. On an interface
    /// the part listed later in the case wins (air counts as first).
    pub fn field_at(&self, p: [f64; 2]) -> Option<PointField> {
        let (e, lam) = self.element_at(p)?;
        let corners = self.elements.nodes[e].map(|n| self.recovered_at_node(n, e));
        let b = [0, 1].map(|k| lam[0] * corners[0][k] + lam[1] * corners[1][k] + lam[2] * corners[2][k]);
        let kind = self.elements.kinds[e];
        let h = self.law(kind).response(b).h;
        let part = match kind {
            ElementKind::Part(i) => Some(i),
            _ => None,
        };
        Some(PointField { b, h, part })
    }

    /// The element holding p (the latest part on an interface) and p's barycentrics.
    pub fn element_at(&self, p: [f64; 2]) -> Option<(usize, [f64; 3])> {
        let rank = |k: ElementKind| match k {
            ElementKind::Part(i) => i as i64,
            _ => -1,
        };
        self.locator.containing(&self.elements, p).into_iter().max_by_key(|(e, _)| (rank(self.elements.kinds[*e]), usize::MAX - e))
    }

    /// Total potential at a physical point (A_z or A_phi), or None outside.
    pub fn potential_at(&self, p: [f64; 2]) -> Option<f64> {
        let (e, lam) = self.element_at(p)?;
        let n = self.elements.nodes[e];
        Some(lam[0] * self.node_potential(n[0]) + lam[1] * self.node_potential(n[1]) + lam[2] * self.node_potential(n[2]))
    }

    pub fn placement(&self, e: usize) -> Placement {
        self.elements.placement(e)
    }
}

/// Value at the origin of the least-squares plane through the samples
/// (positions relative to the node); None when the patch is degenerate.
fn fit_linear_at_origin(samples: &[([f64; 2], [f64; 2])]) -> Option<[f64; 2]> {
    if samples.len() < 3 {
        if samples.is_empty() {
            return None;
        }
        let n = samples.len() as f64;
        return Some([0, 1].map(|k| samples.iter().map(|s| s.1[k]).sum::<f64>() / n));
    }
    let scale = samples.iter().map(|s| s.0[0].abs().max(s.0[1].abs())).fold(0.0, f64::max).max(f64::MIN_POSITIVE);
    let mut m = [[0.0; 3]; 3];
    let mut rhs = [[0.0; 3]; 2];
    for (x, v) in samples {
        let p = [1.0, x[0] / scale, x[1] / scale];
        for i in 0..3 {
            for j in 0..3 {
                m[i][j] += p[i] * p[j];
            }
            for k in 0..2 {
                rhs[k][i] += p[i] * v[k];
            }
        }
    }
    let det = det3(&m);
    if det.abs() < 1e-10 * samples.len().pow(3) as f64 {
        let n = samples.len() as f64;
        return Some([0, 1].map(|k| samples.iter().map(|s| s.1[k]).sum::<f64>() / n));
    }
    Some([0, 1].map(|k| {
        let mut m0 = m;
        for i in 0..3 {
            m0[i][0] = rhs[k][i];
        }
        det3(&m0) / det
    }))
}

fn det3(m: &[[f64; 3]; 3]) -> f64 {
    m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1]) - m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0]) + m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0])
}
