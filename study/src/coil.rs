//! Winding figures an electromagnet designer checks first: resistance at
//! the copper's temperature, power, current density and a steady
//! temperature-rise estimate.
//!
//! Sources (shared data, docs/materials.md labels): annealed copper
//! 1.7241e-8 ohm m at 20 degC and 0.00393 /K (IEC 60028 as read in S60,
//! S61, S62); AWG diameters d = 0.127 mm x 92^((36 - n)/39) (ASTM B258, S66);
//! the steady heat balance of a winding's surface, convection plus
//! radiation (S75, eq. 1), with a still-air convection coefficient of
//! 7.5 W/(m2 K) and an emissivity of 0.9 for varnished windings, both from
//! memory (5 to 10 and 0.8 to 0.95 are the ranges recalled).

use crate::model::{Model, Part, Winding};
use mesher::Symmetry;

/// Resistivity of annealed copper at 20 degC, ohm m (IEC 60028).
pub const COPPER_RESISTIVITY_20C: f64 = 1.7241e-8;
/// Temperature coefficient of copper's resistance at 20 degC, 1/K (IEC 60028).
pub const COPPER_ALPHA_20C: f64 = 0.00393;
/// Natural-convection coefficient of a small coil in still air, W/(m2 K) (from memory).
const CONVECTION: f64 = 7.5;
/// Emissivity of a varnished winding (from memory).
const EMISSIVITY: f64 = 0.9;
/// Stefan-Boltzmann constant, W/(m2 K4) (CODATA 2018, exact).
const STEFAN_BOLTZMANN: f64 = 5.670_374_419e-8;
/// Ambient temperature of the heat balance, degC.
pub const AMBIENT_C: f64 = 20.0;
/// The densest packing of round wires: hexagonal, pi / (2 sqrt 3) of the
/// window. A winding's copper cannot fill more of its part.
pub const MAX_FILL: f64 = 0.907;
/// Class H of the thermal classes of electrical insulation (IEC 60085):
/// 180 degC. Most magnet wire is rated at or below it (common practice).
pub const CLASS_H_C: f64 = 180.0;

/// A winding whose estimated surface temperature (still air, from 20 degC)
/// passes class H: the estimate is rough, but past it most magnet wire's
/// insulation fails, and the summary's "592.8 K above 20 degC" said so in
/// figures only.
pub fn too_hot(name: &str, c: &CoilFigures) -> Option<String> {
    let surface = AMBIENT_C + c.temperature_rise;
    (surface > CLASS_H_C).then(|| {
        format!(
            "winding '{name}': its surface would run at about {surface:.0} degC in still air ({:.3} W), past insulation class H ({CLASS_H_C} degC, IEC 60085) that most magnet wire is rated for: less current, more copper, or cooling; the field and forces assume it survives",
            c.power
        )
    })
}

/// Below this current density in the copper, A/m2 (0.1 A/mm2, a tenth of
/// the least that windings are usually run at: 1 to 10 A/mm2, common
/// practice), a winding's `current` was most likely the wire's current
/// written where the ampere-turns go: "2 A" on 500 turns of AWG 24 gave 4
/// mA a turn, 0.02 A/mm2, and a field 500 times too weak, with no word but
/// the summary's figures.
pub const FAINT_DENSITY: f64 = 1e5;

/// A winding whose current density is below `FAINT_DENSITY`: the message
/// says what `current` means and what to write if the wire carries it.
pub fn faint_current(name: &str, turns: f64, c: &CoilFigures) -> Option<String> {
    let ampere_turns = c.current * turns;
    (c.current != 0.0 && c.current_density < FAINT_DENSITY && turns > 1.0).then(|| {
        format!(
            "winding '{name}': {} A in each of its {turns} turns, {} A/mm2 in the copper, under a tenth of the 1 to 10 A/mm2 windings usually carry (common practice): `current` is the ampere-turns through the part, its turns times the wire's current; if the wire carries {} A, write current = \"{} A\"",
            crate::message_number::significant(c.current),
            crate::message_number::significant(c.current_density * 1e-6),
            crate::message_number::significant(ampere_turns),
            crate::message_number::significant(ampere_turns * turns),
        )
    })
}

/// Bare copper diameter of an AWG size, m (ASTM B258).
pub fn awg_diameter(gauge: f64) -> f64 {
    0.127e-3 * 92f64.powf((36.0 - gauge) / 39.0)
}

/// What the winding of one part comes to.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct CoilFigures {
    /// Resistance at the winding temperature, ohm.
    pub resistance: f64,
    /// Current in the wire, A.
    pub current: f64,
    /// Power dissipated, W.
    pub power: f64,
    /// Current density in the copper, A/m2.
    pub current_density: f64,
    /// Steady temperature rise of the winding surface above ambient, K.
    pub temperature_rise: f64,
}

/// The figures of a part's winding, or None when the part has no wire given
/// or its mean turn is unknown (a planar coil side without `turn_length`).
/// The cooled surface is the winding's outline carried round its mean turn
/// (about the axis: the box's cylinders and end annuli).
pub fn figures(model: &Model, part: &Part) -> Option<CoilFigures> {
    let w: &Winding = part.winding.as_ref()?;
    let ampere_turns = part.current?;
    let (lo, hi) = part_box(part);
    let (turn, surface) = match model.symmetry {
        Symmetry::Axisymmetric => {
            // Outer cylinder, inner cylinder and the two end annuli of the winding's box.
            let surface = 2.0 * std::f64::consts::PI * (hi[0] + lo[0]) * (hi[1] - lo[1]) + 2.0 * std::f64::consts::PI * (hi[0] * hi[0] - lo[0] * lo[0]);
            // The outline gives the turn (the case reader refuses a `turn_length` here).
            (turn_about_axis(&part.shape), surface)
        }
        Symmetry::Planar => {
            // The bundle's outline carried along the mean turn (Pappus' rule).
            let turn = w.turn_length?;
            (turn, 2.0 * ((hi[0] - lo[0]) + (hi[1] - lo[1])) * turn)
        }
    };
    let rho = COPPER_RESISTIVITY_20C * (1.0 + COPPER_ALPHA_20C * (w.temperature - 20.0));
    let resistance = rho * w.turns * turn / w.wire_area;
    let current = ampere_turns / w.turns;
    let power = current * current * resistance;
    let ambient_k = AMBIENT_C + 273.15;
    // Radiation linearised at ambient: 4 eps sigma T^3.
    let h = CONVECTION + 4.0 * EMISSIVITY * STEFAN_BOLTZMANN * ambient_k.powi(3);
    Some(CoilFigures {
        resistance,
        current,
        power,
        current_density: current.abs() / w.wire_area,
        temperature_rise: power / (h * surface),
    })
}

/// The bounding box of a part's outline.
/// The mean turn of a winding about the axis: 2 pi times the middle radius
/// of its outline's box, m.
pub fn turn_about_axis(shape: &mesher::Shape) -> f64 {
    let (lo, hi) = shape.bounds();
    std::f64::consts::PI * (lo[0] + hi[0])
}

fn part_box(part: &Part) -> ([f64; 2], [f64; 2]) {
    part.shape.bounds()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn awg_and_copper_match_the_wire_tables() {
        // ASTM B258's formula against the NEMA MW 1000 table as printed by a
        // maker (shared data S66, S67): AWG 20 is 32.0 mil (0.8128 mm), AWG 24
        // 20.1 mil (0.5106 mm); the table rounds to 0.1 mil, about 0.3 %.
        for (gauge, table) in [(20.0, 0.8128e-3), (24.0, 0.5106e-3)] {
            let d = awg_diameter(gauge);
            assert!((d / table - 1.0).abs() < 3e-3, "AWG {gauge}: {d} against {table}");
        }
        // S68: AWG 20 is 33.235 ohm/km at 20 degC on the table's diameter.
        let area = std::f64::consts::PI * 0.8128e-3 * 0.8128e-3 / 4.0;
        let per_km = COPPER_RESISTIVITY_20C * 1000.0 / area;
        assert!((per_km / 33.235 - 1.0).abs() < 5e-4, "{per_km}");
    }
}
