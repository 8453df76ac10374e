//! A planar study's currents that do not sum to zero, and what the
//! potential is measured from.
//!
//! A planar part carrying current is an infinitely long conductor. Where
//! the currents sum to zero (a coil's two sides), the field falls as a
//! dipole's and the energy per depth is finite. Where they do not (one bus
//! bar, one side of a coil), the field falls as 1/r: the flux between the
//! conductor and infinity, and the energy per depth, grow with the
//! logarithm of the space around it without bound (the external
//! inductance per length of a pair of wires, mu0 / pi ln(d / a), grows
//! without bound as the return recedes; a textbook result, from memory).
//! A box of flux-parallel walls
//! returns the flux (the walls stand for the return); a box with no such
//! wall has no field at all for a net current (Ampere's law around its
//! sides asks the flux-normal walls for a field they hold at zero).

use crate::model::Model;
use mesher::{OuterBoundary, SideKind, Symmetry};

/// How a study's potential is anchored, as far as its currents and
/// windings are concerned.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Anchor {
    /// Zero on a wall, the axis or a plane, or at infinity with the
    /// currents summing to zero: energy and every winding's linkage are
    /// finite and defined.
    Held,
    /// Planar, open, the currents summing to `net` ampere-turns (not 0):
    /// the field is right, but the energy and the potential's level (the
    /// linkage of a winding whose turns do not return) are unbounded.
    OpenWithNetCurrent {
        /// Net ampere-turns out of the plane, A.
        net: f64,
    },
    /// Planar box with no wall at zero potential (every side flux-normal
    /// or periodic): the potential's level is arbitrary, and `net`, the
    /// currents' sum, must be zero for a field to exist.
    Floating {
        /// Net ampere-turns out of the plane, A.
        net: f64,
    },
}

/// Share of the currents' magnitudes below which their sum counts as zero
/// (rounding of ampere-turns written to a few digits).
const BALANCED: f64 = 1e-9;

/// The study's anchor (see [`Anchor`]).
pub fn anchor(model: &Model) -> Anchor {
    if model.symmetry == Symmetry::Axisymmetric {
        return Anchor::Held;
    }
    let currents = || model.parts.iter().filter_map(|p| p.current);
    let (net, total) = (currents().sum::<f64>(), currents().map(f64::abs).sum::<f64>());
    let net = if net.abs() > BALANCED * total { net } else { 0.0 };
    match &model.boundary {
        OuterBoundary::Open | OuterBoundary::OpenHalf { flux_normal: true } if net != 0.0 => Anchor::OpenWithNetCurrent { net },
        OuterBoundary::Open | OuterBoundary::OpenHalf { .. } => Anchor::Held,
        OuterBoundary::FluxParallel { sides, .. } => {
            let held = sides
                .iter()
                .any(|s| matches!(s, SideKind::Far | SideKind::Mirror { flux_normal: false } | SideKind::Periodic { anti: true }));
            if held {
                Anchor::Held
            } else {
                Anchor::Floating { net }
            }
        }
    }
}

/// Whether a winding's turns return within it: the signs of its parts'
/// turns (+1 or -1, from their currents) cancel, as a coil's two sides do.
pub fn turns_return(signed: &[(usize, f64)]) -> bool {
    signed.iter().map(|p| p.1).sum::<f64>() == 0.0
}

/// The warning of a planar study in open space whose currents do not sum
/// to zero, which reports no energy or coenergy: a single wire of 100 A
/// (1 m deep) reported 8.13 mJ +- 0.50 mJ, and with nothing else asked
/// refined to 239 000 triangles chasing it ("151 %" not reached), while
/// the field around the wire came out right (1.000002 mT at 20 mm against
/// mu0 I / (2 pi r) = 1 mT).
pub fn unbounded_energy_warning(model: &Model) -> Option<String> {
    let Anchor::OpenWithNetCurrent { net } = anchor(model) else { return None };
    Some(format!(
        "the currents of this planar study sum to {net} A (ampere-turns out of the plane) with no return: each part is an infinitely long conductor, whose field falls as 1/r and whose energy per depth grows without bound with the space around it, so no energy or coenergy is reported (the fields and forces are unaffected); add the conductors that carry the current back (a coil's other side), or model a round coil about the axis"
    ))
}
