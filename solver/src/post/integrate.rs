//! The one integrator of post-processing: every quadrature point of an
//! element with its position, weight, flux density, potential and law.
//! Energy, flux linkage, forces, magnet working points and part statistics
//! all integrate through it, so the quadrature rule, the Kelvin weight and
//! the background field are applied in one place.

use crate::element::{flux_density, for_each_point, potential, MAX_NODES};
use crate::material::Law;
use crate::solution::Solution;
use crate::space::ElementKind;

/// One quadrature point of a solved element.
pub struct FieldPoint<'s> {
    /// The element.
    pub element: usize,
    /// What it is made of.
    pub kind: ElementKind,
    /// Position (in the mapped disk for exterior elements).
    pub x: [f64; 2],
    /// Its barycentric coordinates in the element's reference triangle.
    pub lam: [f64; 3],
    /// Integration weight: area, times 2 pi r when axisymmetric, times the
    /// Kelvin factor in the exterior.
    pub weight: f64,
    /// Flux density, applied field included, T.
    pub b: [f64; 2],
    /// The element's law.
    pub law: &'s Law,
    /// A magnet's share of its remanence left after an exposure (1 otherwise).
    pub share: f64,
}

impl FieldPoint<'_> {
    /// Field strength from the element's law, A/m.
    pub fn h(&self) -> [f64; 2] {
        self.law.response_of(self.b, crate::material::Tangent::Exact, self.share).h
    }

    /// Stored energy density, J/m3.
    pub fn energy_density(&self) -> f64 {
        self.law.energy_density_of(self.b, self.share)
    }
}

/// Calls `f` at every quadrature point of element `e`.
pub fn for_each_field_point(solution: &Solution, e: usize, mut f: impl FnMut(&FieldPoint)) {
    let els = &solution.elements;
    let kind = els.kinds[e];
    let law = solution.element_law(e);
    let share = solution.problem.remanence_share(e);
    let a = els.gather(e, &solution.reduced);
    let background = solution.background(e);
    for_each_point(els.geometry(e), els.order, solution.symmetry(), solution.placement(e), |op| {
        f(&FieldPoint {
            element: e,
            kind,
            x: op.x,
            lam: op.lam,
            weight: op.weight,
            b: flux_density(op, &a, background),
            law,
            share,
        })
    });
}

/// Calls `f(x, weight, potential)` at every quadrature point of element
/// `e`, with the full potential (applied field included): flux linkage
/// alone needs the potential, so it is not a field of every point.
pub fn for_each_potential_point(solution: &Solution, e: usize, mut f: impl FnMut([f64; 2], f64, f64)) {
    let els = &solution.elements;
    let mut a = [0.0; MAX_NODES];
    for (k, &n) in els.element_nodes(e).iter().enumerate() {
        a[k] = solution.node_potential(n);
    }
    for_each_point(els.geometry(e), els.order, solution.symmetry(), solution.placement(e), |op| {
        f(op.x, op.weight, potential(op, &a))
    });
}

/// The sum over the elements `0..n` of `term(e)`, on every core and the
/// same to the last bit on every run.
pub fn element_sum<const K: usize>(n: usize, term: impl Fn(usize) -> [f64; K] + Sync) -> [f64; K] {
    crate::reduction::ordered_sum(n, term)
}

/// The integral of `f` over every element (`physical_only`: the exterior
/// disk left out), reproducible to the bit.
pub fn integrate<const K: usize>(solution: &Solution, physical_only: bool, f: impl Fn(&FieldPoint) -> [f64; K] + Sync) -> [f64; K] {
    let n = if physical_only {
        solution.elements.n_physical
    } else {
        solution.elements.len()
    };
    element_sum(n, |e| {
        let mut sum = [0.0; K];
        for_each_field_point(solution, e, |p| {
            let v = f(p);
            (0..K).for_each(|i| sum[i] += v[i]);
        });
        sum
    })
}
