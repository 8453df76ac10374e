//! A magnetostatic problem: a mesh with a law and a current density per part.

use crate::element::ElementOrder;
use crate::material::Law;
use mesher::Mesh;

/// Newton-Raphson stopping rules.
#[derive(Clone, Copy, Debug)]
pub struct NewtonSettings {
    /// Stop when |residual| / |residual at the start| falls below this.
    pub residual_tolerance: f64,
    /// ... and |update| / |potential| falls below this.
    pub update_tolerance: f64,
    /// Most Newton-Raphson iterations.
    pub max_iterations: usize,
    /// Solve later Newton steps by conjugate gradients preconditioned with
    /// an earlier factorization (an inexact Newton method), refactorizing
    /// only when that converges slowly; false factorizes every step.
    pub reuse_factorization: bool,
    /// Relative residual above which the tangent's slope along B is kept no
    /// softer than the secant (Tangent::NoSofterThanSecant); at or below it
    /// the tangent is exact, for quadratic convergence. 1 or more: exact
    /// from the start. The default, 3e-2, took no more steps or
    /// factorizations than 1e-3 on any example case or benchmark size tried
    /// (docs/methods.md), and fewer on most.
    pub stiffen_tangent_above: f64,
}

impl Default for NewtonSettings {
    fn default() -> Self {
        NewtonSettings {
            residual_tolerance: 1e-8,
            update_tolerance: 1e-6,
            max_iterations: 40,
            reuse_factorization: true,
            stiffen_tangent_above: 3e-2,
        }
    }
}

/// Everything the solver needs. Lengths in metres, SI throughout.
#[derive(Clone, Debug)]
pub struct Problem<'m> {
    /// The mesh.
    pub mesh: &'m Mesh,
    /// Law of each part, by part index.
    pub laws: Vec<Law>,
    /// Current density of each part, A/m2 (+phi or out of the plane).
    pub current_density: Vec<f64>,
    /// Uniform applied flux density, T ([x, y] planar; [0, z] axisymmetric).
    pub applied_field: [f64; 2],
    /// Element order.
    pub order: ElementOrder,
    /// Stopping rules and step method.
    pub newton: NewtonSettings,
    /// A first guess of the reduced potential at every node (a coarser
    /// mesh's solution carried over by `prolong::to_refined`): a saturating
    /// study then starts near its answer. Linear studies ignore it.
    pub initial: Option<std::sync::Arc<[f64]>>,
    /// Per physical element, the share of a magnet's remanence left after an
    /// earlier exposure drove it past its knee (1 = unharmed); None: all 1.
    pub remanence: Option<std::sync::Arc<[f64]>>,
    /// Per physical element, the index in `laws` of a law of its own
    /// (`OWN_LAW_NONE` for its part's): the elements of a radially
    /// magnetized ring each point their own way. None: every element takes
    /// its part's law.
    pub element_law: Option<std::sync::Arc<[u32]>>,
    /// Changes of the parts' current densities (A/m2, per part) whose
    /// first-order field responses the solve also returns
    /// (`Solution::responses`): linear solves with the converged tangent,
    /// preconditioned by the Newton steps' last factor. An empty entry asks
    /// for nothing.
    pub current_changes: Vec<Vec<f64>>,
}

/// Marks an element that takes its part's law (`Problem::element_law`).
pub const OWN_LAW_NONE: u32 = u32::MAX;

impl<'m> Problem<'m> {
    /// A problem with no applied field, quadratic elements and default Newton settings.
    pub fn new(mesh: &'m Mesh, laws: Vec<Law>, current_density: Vec<f64>) -> Problem<'m> {
        Problem {
            mesh,
            laws,
            current_density,
            applied_field: [0.0, 0.0],
            order: ElementOrder::Quadratic,
            newton: NewtonSettings::default(),
            initial: None,
            remanence: None,
            element_law: None,
            current_changes: Vec::new(),
        }
    }

    /// The index in `laws` of element e's law, part `part`'s unless the element has its own.
    pub fn law_index(&self, e: usize, part: usize) -> usize {
        match self.element_law.as_ref().and_then(|l| l.get(e).copied()) {
            Some(k) if k != OWN_LAW_NONE => k as usize,
            _ => part,
        }
    }

    /// The share of its remanence that element `e` keeps (1 without an exposure).
    pub fn remanence_share(&self, e: usize) -> f64 {
        self.remanence.as_ref().and_then(|s| s.get(e).copied()).unwrap_or(1.0)
    }

    /// Whether any part follows a saturating curve.
    pub fn is_nonlinear(&self) -> bool {
        self.laws.iter().any(Law::is_nonlinear)
    }

    /// The analytic potential of the applied field at a physical point
    /// (A = Bx y - By x planar, A = Bz r / 2 axisymmetric).
    pub fn applied_potential(&self, p: [f64; 2]) -> f64 {
        match self.mesh.symmetry {
            mesher::Symmetry::Planar => self.applied_field[0] * p[1] - self.applied_field[1] * p[0],
            mesher::Symmetry::Axisymmetric => 0.5 * self.applied_field[1] * p[0],
        }
    }
}
