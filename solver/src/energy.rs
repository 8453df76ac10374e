//! Stored magnetic energy and co-energy: the integral over all space
//! (the Kelvin-mapped exterior included) of w = integral of H dB.

use crate::assembly::element_load;
use crate::element::{flux_density, for_each_point};
use crate::material::Law;
use crate::solution::Solution;

/// Energy and co-energy, J (planar: per metre of depth).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Energy {
    pub stored: f64,
    pub coenergy: f64,
}

pub fn stored_energy(solution: &Solution) -> Energy {
    let els = &solution.elements;
    let air = Law::air();
    let [stored, coenergy] = crate::reduction::ordered_sum(els.len(), |e| {
        let load = element_load(els.kinds[e], &solution.problem, &air);
        let a = els.gather(e, &solution.reduced);
        let (mut w_sum, mut c_sum) = (0.0, 0.0);
        for_each_point(&els.coords[e], els.order, solution.symmetry(), solution.placement(e), |op| {
            let b = flux_density(op, &a, load.background);
            let w = load.law.energy_density(b);
            let h = load.law.response(b).h;
            w_sum += op.weight * w;
            c_sum += op.weight * (h[0] * b[0] + h[1] * b[1] - w);
        });
        [w_sum, c_sum]
    });
    Energy { stored, coenergy }
}
