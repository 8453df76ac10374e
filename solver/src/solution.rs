//! A solved problem: nodal potentials and point evaluation of A, B and H.
//!
//! With quadratic elements B is evaluated in the element that holds the
//! point (its error falls as h^2); at a material interface the element on
//! the point's own side is used, and a point exactly on an interface takes
//! the part listed later in the case.

use crate::assembly::{element_load, System};
use crate::element::{flux_density, point_op, potential, Placement};
use crate::locate::Locator;
use crate::material::Law;
use crate::newton::{newton_solve, SolveError, SolveReport};
use crate::problem::Problem;
use crate::space::{ElementKind, Elements};
use mesher::Symmetry;

/// The solved state of a problem.
pub struct Solution<'m> {
    /// The problem solved.
    pub problem: Problem<'m>,
    /// Its element table.
    pub elements: Elements,
    /// Reduced potential at every node (physical, midpoint and exterior), Wb/m.
    pub reduced: Vec<f64>,
    /// How the solve went.
    pub report: SolveReport,
    /// The first-order change of `reduced` for each of the problem's
    /// `current_changes`, in order (empty where that change is empty or its
    /// solve failed).
    pub responses: Vec<Vec<f64>>,
    /// For a linear study driven by remanence alone, the potential-dependent
    /// parts of its energy from the system itself (`System::affine_energy_terms`).
    pub affine_energy: Option<[f64; 2]>,
    locator: Locator,
    air: Law,
}

/// The field at a point.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PointField {
    /// Flux density, T.
    pub b: [f64; 2],
    /// Field strength, A/m.
    pub h: [f64; 2],
    /// The part the point lies in, None for air.
    pub part: Option<usize>,
}

/// A barycentric coordinate above this puts a point well inside its
/// element, clear of every edge and of rounding (`b_and_potential_near`).
const HINT_INTERIOR: f64 = 1e-9;

impl Solution<'_> {
    /// The same solution over another copy of its mesh (which must be a
    /// clone of it): for a caller that must own the mesh beside the
    /// solution, as the Python package does to sample B after the study
    /// has returned.
    pub fn rebind<'n>(&self, mesh: &'n mesher::Mesh) -> Solution<'n> {
        let p = &self.problem;
        Solution {
            problem: Problem {
                mesh,
                laws: p.laws.clone(),
                current_density: p.current_density.clone(),
                applied_field: p.applied_field,
                order: p.order,
                newton: p.newton,
                initial: p.initial.clone(),
                remanence: p.remanence.clone(),
                element_law: p.element_law.clone(),
                current_changes: p.current_changes.clone(),
            },
            elements: self.elements.clone(),
            reduced: self.reduced.clone(),
            report: self.report.clone(),
            responses: self.responses.clone(),
            affine_energy: self.affine_energy,
            locator: self.locator.clone(),
            air: self.air.clone(),
        }
    }
}

impl<'m> Solution<'m> {
    /// The same problem and mesh with other nodal potentials (all nodes,
    /// as `reduced`): a value linear in the potential, evaluated on it,
    /// differs from this solution's by its change alone.
    pub fn with_potential(&self, reduced: Vec<f64>) -> Solution<'m> {
        Solution {
            problem: self.problem.clone(),
            elements: self.elements.clone(),
            reduced,
            report: self.report.clone(),
            responses: Vec::new(),
            affine_energy: None,
            locator: self.locator.clone(),
            air: self.air.clone(),
        }
    }

    /// The nodal potentials (all nodes, as `reduced`) to first order in the
    /// change of sources from this solution's problem to `changed`, which
    /// must differ from it in its current densities alone (same mesh,
    /// order, laws and applied field): one linear solve with the exact
    /// tangent here (`source_response`), for a solution whose problem did
    /// not ask for it in `current_changes`.
    pub fn potential_after_current_change(&self, changed: &Problem) -> Result<Vec<f64>, SolveError> {
        let base = &self.problem;
        let change: Vec<f64> = changed.current_density.iter().zip(&base.current_density).map(|(c, b)| c - b).collect();
        let delta = crate::source_response::response_afresh(base, &self.reduced, &change)?;
        Ok(self.reduced.iter().zip(&delta).map(|(a, d)| a + d).collect())
    }
}

/// Solves the problem. `progress` hears (iteration, relative residual).
pub fn solve<'m>(problem: &Problem<'m>, progress: &dyn Fn(usize, f64)) -> Result<Solution<'m>, SolveError> {
    solve_on(problem, None, progress)
}

/// `solve` on a system structure already made for the problem's mesh and
/// order (`System::new`), when one is given: the study builds the next
/// nested mesh's structure on the other core while it solves a mesh.
pub fn solve_on<'m>(problem: &Problem<'m>, structure: Option<System>, progress: &dyn Fn(usize, f64)) -> Result<Solution<'m>, SolveError> {
    let mut system = match structure {
        Some(s) if s.fits(problem.mesh, problem.order) => s,
        _ => System::new(problem.mesh, problem.order)?,
    };
    let mut end = newton_solve(problem, &mut system, progress)?;
    let responses = crate::source_response::responses(problem, &mut system, &mut end);
    let (reduced, mut report) = (end.a, end.report);
    report.seconds_pattern = system.seconds_built;
    let affine_energy = driven_by_remanence_alone(problem)
        .then(|| system.affine_energy_terms(problem, &reduced))
        .flatten();
    let locator = Locator::new(&system.elements);
    Ok(Solution {
        problem: problem.clone(),
        elements: system.elements,
        reduced,
        report,
        responses,
        affine_energy,
        locator,
        air: Law::air(),
    })
}

/// No current, no applied field and no exposure: the energy at zero
/// potential is then the magnets' alone, w(B = 0), and the rest of it is
/// the system's quadratic form (`System::affine_energy_terms`).
fn driven_by_remanence_alone(problem: &Problem) -> bool {
    problem.applied_field == [0.0, 0.0] && problem.current_density.iter().all(|&j| j == 0.0) && problem.remanence.is_none()
}

impl<'m> Solution<'m> {
    /// Planar or axisymmetric.
    pub fn symmetry(&self) -> Symmetry {
        self.problem.mesh.symmetry
    }

    /// Total potential (applied field included) at a node.
    pub fn node_potential(&self, n: usize) -> f64 {
        self.reduced[n] + self.problem.applied_potential(self.elements.positions[n])
    }

    /// The law of an element kind.
    pub fn law(&self, kind: ElementKind) -> &Law {
        element_load(0, kind, &self.problem, &self.air).law
    }

    /// The law of element e (its own where it has one, as a radial magnet's elements do).
    pub fn element_law(&self, e: usize) -> &Law {
        element_load(e, self.elements.kinds[e], &self.problem, &self.air).law
    }

    /// H in element e at flux density b (a magnet's remaining share applied).
    pub fn element_h(&self, e: usize, b: [f64; 2]) -> [f64; 2] {
        let load = element_load(e, self.elements.kinds[e], &self.problem, &self.air);
        load.law.response_of(b, load.tangent, load.share).h
    }

    /// The applied field in element e (none in the exterior, where the reaction field alone is mapped).
    pub fn background(&self, e: usize) -> [f64; 2] {
        match self.elements.kinds[e] {
            ElementKind::Exterior => [0.0, 0.0],
            _ => self.problem.applied_field,
        }
    }

    /// Shape values and gradients of element e at barycentric point lam, in its own placement.
    fn op_at(&self, e: usize, lam: [f64; 3]) -> crate::element::PointOp {
        point_op(
            self.elements.geometry(e),
            self.elements.order,
            self.symmetry(),
            self.elements.placement(e),
            lam,
            1.0,
        )
    }

    /// B in element e at barycentric point lam.
    pub fn element_b_at(&self, e: usize, lam: [f64; 3]) -> [f64; 2] {
        flux_density(&self.op_at(e, lam), &self.elements.gather(e, &self.reduced), self.background(e))
    }

    /// B at the centroid of element e.
    pub fn element_b(&self, e: usize) -> [f64; 2] {
        self.element_b_at(e, [1.0 / 3.0; 3])
    }

    /// Field at a physical point, or None outside the mesh.
    pub fn field_at(&self, p: [f64; 2]) -> Option<PointField> {
        let (e, lam) = self.element_at(p)?;
        let b = self.element_b_at(e, lam);
        let kind = self.elements.kinds[e];
        let h = self.element_h(e, b);
        let part = match kind {
            ElementKind::Part(i) => Some(i),
            _ => None,
        };
        Some(PointField { b, h, part })
    }

    /// The element holding p and p's barycentrics: on an interface the
    /// vacuum side (air, or a part of a vacuum material without current),
    /// else the latest part; on the axis, an element with an edge on the
    /// axis. A point on a steel face is thus read where a sensor would sit:
    /// in the steel element B along the face is mu_r times the air's H (a
    /// speaker motor's gap probe starting on its pole piece's face read a
    /// peak of 1.258 T there, 1.067 T in the gap's air;
    /// docs/measurement-log.md, eleventh session).
    pub fn element_at(&self, p: [f64; 2]) -> Option<(usize, [f64; 3])> {
        let axis_edge = |e: usize| self.symmetry() == Symmetry::Axisymmetric && self.elements.coords[e].iter().filter(|x| x[0] <= 0.0).count() >= 2;
        let rank = |e: usize| {
            let part = match self.elements.kinds[e] {
                ElementKind::Part(i) => i as i64,
                _ => -1,
            };
            (self.is_vacuum(e), part, axis_edge(e), usize::MAX - e)
        };
        self.locator.containing(&self.elements, p).max_by_key(|(e, _)| rank(*e))
    }

    /// Whether element e is vacuum without current (air, or a part of a
    /// vacuum material that carries no current).
    pub fn is_vacuum(&self, e: usize) -> bool {
        match self.elements.kinds[e] {
            ElementKind::Air => true,
            ElementKind::Exterior => false,
            ElementKind::Part(i) => {
                let vacuum = matches!(self.element_law(e), Law::Linear { relative_permeability } if *relative_permeability == 1.0);
                vacuum && self.problem.current_density.get(i).copied().unwrap_or(0.0) == 0.0
            }
        }
    }

    /// The physical elements that may reach into the box `lo`..`hi`, in ascending order.
    pub fn elements_near(&self, lo: [f64; 2], hi: [f64; 2]) -> Vec<usize> {
        self.locator.overlapping(lo, hi)
    }

    /// Total potential at a physical point (A_z or A_phi), or None outside.
    pub fn potential_at(&self, p: [f64; 2]) -> Option<f64> {
        Some(self.reduced_potential_at(p)? + self.problem.applied_potential(p))
    }

    /// B and the total potential at a physical point from one search, or
    /// None outside: for pictures that sample both on a grid.
    pub fn b_and_potential_at(&self, p: [f64; 2]) -> Option<([f64; 2], f64)> {
        self.b_and_potential_near(p, &mut None)
    }

    /// As `b_and_potential_at`, first trying element `hint` (the previous
    /// sample's, on a picture's row): a point well inside it (every
    /// barycentric above `HINT_INTERIOR`) lies in no other element, so the
    /// bucket search and its ranking of edge points are not needed. Sets
    /// `hint` to the element found. A picture's 64 000 samples spent most
    /// of their time in the search.
    pub fn b_and_potential_near(&self, p: [f64; 2], hint: &mut Option<usize>) -> Option<([f64; 2], f64)> {
        let hinted = hint.and_then(|e| {
            // A curved element's coordinates come from Newton's method on its
            // map, which is not asked about points far past it (as the locator).
            let geometry = self.elements.geometry(e);
            if geometry.is_curved() && geometry.clearly_outside(p, crate::locate::OUTSIDE_MARGIN) {
                return None;
            }
            let lam = geometry.barycentric(p);
            lam.iter().all(|&l| l > HINT_INTERIOR).then_some((e, lam))
        });
        let (e, lam) = match hinted {
            Some(found) => found,
            None => self.element_at(p)?,
        };
        *hint = Some(e);
        let op = self.op_at(e, lam);
        let a = self.elements.gather(e, &self.reduced);
        Some((
            flux_density(&op, &a, self.background(e)),
            potential(&op, &a) + self.problem.applied_potential(p),
        ))
    }

    /// The reaction potential alone (applied field left out) at a physical point, or None outside.
    pub fn reduced_potential_at(&self, p: [f64; 2]) -> Option<f64> {
        let (e, lam) = self.element_at(p)?;
        let op = point_op(self.elements.geometry(e), self.elements.order, self.symmetry(), Placement::Physical, lam, 1.0);
        Some(potential(&op, &self.elements.gather(e, &self.reduced)))
    }

    /// Where element e lives (physical or mapped exterior).
    pub fn placement(&self, e: usize) -> Placement {
        self.elements.placement(e)
    }
}
