//! Stored magnetic energy and co-energy: the integral over all space
//! (the Kelvin-mapped exterior included) of w = integral of H dB.

use super::integrate::integrate;
use crate::solution::Solution;

/// Energy and co-energy, J (planar: per metre of depth).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Energy {
    /// Stored energy: the integral of the integral of H dB.
    pub stored: f64,
    /// Co-energy: the integral of H . B minus the stored energy density.
    pub coenergy: f64,
}

/// Energy and co-energy of the solution.
pub fn stored_energy(solution: &Solution) -> Energy {
    let [stored, coenergy] = integrate(solution, false, |p| {
        let w = p.energy_density();
        let h = p.h();
        [p.weight * w, p.weight * (h[0] * p.b[0] + h[1] * p.b[1] - w)]
    });
    Energy { stored, coenergy }
}
