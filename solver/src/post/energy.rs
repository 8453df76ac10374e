//! Stored magnetic energy and co-energy: the integral over all space
//! (the Kelvin-mapped exterior included) of w = integral of H dB.

use super::integrate::{element_sum, integrate};
use crate::element::for_each_point;
use crate::solution::Solution;

/// Energy and co-energy, J (planar: per metre of depth).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Energy {
    /// Stored energy: the integral of the integral of H dB.
    pub stored: f64,
    /// Co-energy: the integral of H . B minus the stored energy density.
    pub coenergy: f64,
}

/// Energy and co-energy of the solution. A linear study driven by
/// remanence alone takes the energy from its system (the magnets' energy
/// at zero potential, integrated over the magnets alone, plus the system's
/// quadratic form at the solution): the same sums at the same quadrature
/// points as the integral over every element, which took a tenth of a
/// small quartic study (P1, a cylinder's axis field: 3.7 ms of about 37).
pub fn stored_energy(solution: &Solution) -> Energy {
    if let Some([quadratic, hb]) = solution.affine_energy {
        let stored = energy_at_zero_potential(solution) + quadratic;
        return Energy { stored, coenergy: hb - stored };
    }
    let [stored, coenergy] = integrate(solution, false, |p| {
        let w = p.energy_density();
        let h = p.h();
        [p.weight * w, p.weight * (h[0] * p.b[0] + h[1] * p.b[1] - w)]
    });
    Energy { stored, coenergy }
}

/// The stored energy at zero potential and no applied field: w(B = 0),
/// nonzero in magnets only (the exterior is air), times each magnet
/// element's volume at the same quadrature points (no field is needed).
fn energy_at_zero_potential(solution: &Solution) -> f64 {
    let els = &solution.elements;
    let [w] = element_sum(els.n_physical, |e| {
        let w0 = solution.element_law(e).energy_density_of([0.0, 0.0], solution.problem.remanence_share(e));
        let mut sum = 0.0;
        if w0 != 0.0 {
            for_each_point(els.geometry(e), els.order, solution.symmetry(), solution.placement(e), |op| {
                sum += op.weight * w0
            });
        }
        [sum]
    });
    w
}
