//! Design checks: magnet working points against the knee at the study
//! temperature, and the stray field (dipole moment, implant and reach
//! distances, air-transport screen).

use crate::materials::Material;
use crate::model::Model;
use crate::results::{MagnetResult, StrayResult};
use mesher::Symmetry;
use solver::post::{magnet_check, stray};
use solver::Solution;
use std::collections::BTreeMap;

/// The knee of a square-loop magnet lies where H reaches this fraction of
/// -HcJ (common practice for sintered rare-earth and ferrite grades, from
/// memory; the grade's full second-quadrant curve is not in the library).
pub const KNEE_FRACTION: f64 = 0.9;

/// Irreversible flux loss above which a magnet is a warning, and `check`
/// fails: 1 % (common practice: makers' "loss under 1 %" criterion for the
/// maximum working temperature, from memory).
pub const LOSS_WARNING: f64 = 0.01;

/// The default level the reach along the axis runs to, T: 5 mT, a common
/// rule of thumb for where small steel items are no longer picked up
/// (common practice).
pub const DEFAULT_REACH_LEVEL: f64 = 5e-3;

/// The strongest applied field a case may hold, T: steady fields made in
/// laboratories reach about 45 T (hybrid magnets, from memory). A field
/// strength in A/m written bare (800 000 for 800 kA/m) is read as tesla,
/// and a study of a magnet in 800 kT ran to 700 000 triangles before its
/// accuracy gave out, with no word of the unit.
pub const STRONGEST_APPLIED_FIELD: f64 = 50.0;

/// 0.5 mT: implanted medical devices are generally not affected below it (ICNIRP 2009).
pub const IMPLANT_LEVEL: f64 = 0.5e-3;

/// Air-transport thresholds (A/m): the current wording of IATA PI 953
/// (about 0.418 A/m, a 2 degree compass deflection, at 2.1 m and 4.6 m) and
/// the older, still quoted 0.159 A/m at 2.1 m. Both SECONDARY transcriptions.
pub const IATA_CURRENT: f64 = 0.418;
/// The older air-transport screen, A/m at 2.1 m.
pub const IATA_LEGACY: f64 = 0.159;

/// The span of a magnet part beyond which the case's length unit is more
/// likely wrong than the magnet real, metres: single sintered blocks are
/// made to about 0.1 to 0.2 m a side and one-piece rings and arcs smaller;
/// a part of an assembly modelled whole (a ring of segments) may reach a
/// metre (common practice). Millimetre dimensions under `unit = "m"` give
/// magnets of 5 to 100 m, pulls of meganewtons.
pub const MAGNET_SPAN_MAX: f64 = 1.0;
/// The span under which it is, metres: 0.1 mm, below the smallest magnets
/// sold as parts (about 0.3 to 1 mm, common practice); metre dimensions
/// under `unit = "mm"` give magnets of 5 to 100 um.
pub const MAGNET_SPAN_MIN: f64 = 1e-4;

/// The depth, as a share of the parts' extent in the section, under which
/// a planar study's parts are too short for it: a planar section stands
/// for parts much longer than their cross-section (common practice: end
/// effects grow as the depth falls to the section's size; at a tenth of it
/// the ends decide the field).
pub const SHORT_DEPTH_SHARE: f64 = 0.1;

/// A warning where a planar study's depth is under a tenth of its parts'
/// extent: `depth = 0.02` under `unit = "mm"` (meant as metres) gave a
/// 30 mm plate's pull as 25.8 mN, planar across a depth 1500 times thinner
/// than the section, with only a stray-field warning that said "0.00 of
/// the planar field". Axisymmetric studies and an unset depth (1 m, per
/// metre) are not checked.
pub fn short_depth(model: &Model) -> Option<String> {
    if model.symmetry != Symmetry::Planar || !model.depth_given {
        return None;
    }
    // The parts that shape the field: a large air part drawn around them
    // says nothing of their length.
    let (lo, hi) = model.active_parts_box();
    let extent = (hi[0] - lo[0]).max(hi[1] - lo[1]);
    (model.depth < SHORT_DEPTH_SHARE * extent).then(|| {
        format!(
            "planar study of depth {}, {:.0} times less than its parts' extent in the section ({}): a planar study stands for parts much longer than their cross-section, and at this depth their ends decide the field, so fields and forces are overstated; check depth's unit (a bare depth is in the study's unit, \"{}\"), or model a round part about the axis",
            model.length_text(model.depth),
            extent / model.depth,
            model.length_text(extent),
            model.length_unit.0
        )
    })
}

/// A warning for each magnet whose size says the case's length unit is
/// likely wrong: a study of a 10 m N42 disk reported 37.6 MN with no word.
/// The span is the part's largest dimension: its diameter about the axis
/// in an axisymmetric study, its width or height in a planar section.
pub fn implausible_magnet_sizes(model: &Model) -> Vec<String> {
    let mut out = Vec::new();
    for p in model.parts.iter().filter(|p| matches!(p.material.material, Material::Magnet(_))) {
        let (lo, hi) = p.shape.bounds();
        let across = match model.symmetry {
            Symmetry::Axisymmetric => 2.0 * hi[0],
            Symmetry::Planar => hi[0] - lo[0],
        };
        let span = across.max(hi[1] - lo[1]);
        let side = if span > MAGNET_SPAN_MAX {
            "larger than magnets are made (about 1 m at most, an assembly modelled whole)"
        } else if span < MAGNET_SPAN_MIN {
            "smaller than magnets are made as parts (0.1 mm)"
        } else {
            continue;
        };
        out.push(format!(
            "magnet '{}' spans {}, {side}: check [study] unit (\"{}\"), in which every dimension of the case is read",
            p.name,
            model.length_text(span),
            model.length_unit.0
        ));
    }
    out
}

/// A warning for each magnet magnetized radially all the way to its own
/// centre: about the axis, a part with a radial share of magnetization
/// (`+r`, `-r`) that reaches the axis; in the plane, a `radial`
/// magnetization whose centre lies in the part (`part_at` tells which part
/// holds a point). The direction has no meaning there and the magnet has a
/// line (a point) of magnetic charge, so no such magnet is made: radially
/// magnetized rings have a bore (common practice). The likelier intent is a
/// disk magnetized across a diameter, as angle-sensor magnets are, whose
/// field is not axisymmetric: `+r` on a solid disk was solved without a
/// word as a field no magnet makes.
pub fn radial_to_its_centre(model: &Model, part_at: impl Fn([f64; 2]) -> Option<usize>) -> Vec<String> {
    let mut out = Vec::new();
    for (i, p) in model
        .parts
        .iter()
        .enumerate()
        .filter(|(_, p)| matches!(p.material.material, Material::Magnet(_)))
    {
        let (lo, hi) = p.shape.bounds();
        let to_centre = match (&p.radial, model.symmetry) {
            (Some(radial), Symmetry::Planar) => part_at(radial.center) == Some(i),
            (None, Symmetry::Axisymmetric) => {
                let radial_share = p.magnetization.map_or(0.0, |m| m[0].abs());
                radial_share > 1e-6 && lo[0] <= 1e-9 * (hi[0] - lo[0]).max(hi[1] - lo[1])
            }
            _ => false,
        };
        if to_centre {
            let (centre, across) = match model.symmetry {
                Symmetry::Axisymmetric => (
                    "reaches the axis",
                    "its field is not axisymmetric: model its cross-section in a planar study (exact for a long bar)",
                ),
                Symmetry::Planar => ("holds its centre", "give it a uniform magnetization (\"+x\", \"+y\") instead"),
            };
            out.push(format!(
                "magnet '{}' is magnetized radially and {centre}, where the direction has no meaning and the magnet carries a line of magnetic charge: no magnet is made like it (radially magnetized rings have a bore, common practice); if it is magnetized across a diameter, {across}",
                p.name
            ));
        }
    }
    out
}

/// A warning when the reach along the axis ends inside the box around the
/// parts: the level lies above the field outside them, and the reach
/// measures none of the stray field (a `reach_level` of 2 T on a disk magnet
/// under a plate ended 0.04 mm from the centre of their box, reported as
/// a reach).
pub fn reach_within_parts(model: &Model, stray: &StrayResult) -> Option<String> {
    let (d, from, c) = (stray.reach_axis_m?, stray.reach_from_m?, stray.reference_point_m?);
    let (lo, hi) = model.parts_box();
    if mesher::outside_box((lo, hi), from) {
        return None;
    }
    // The reach runs outwards from a point off the centre, both ways from it.
    let leave = match from[1].partial_cmp(&c[1]) {
        Some(std::cmp::Ordering::Greater) => hi[1] - from[1],
        Some(std::cmp::Ordering::Less) => from[1] - lo[1],
        _ => (hi[1] - from[1]).max(from[1] - lo[1]),
    };
    let level = model.reach_level * 1e3;
    (d < leave).then(|| match model.reach_level == DEFAULT_REACH_LEVEL {
        // Not given: a weak source (a pair of 100 A wires) whose field is
        // below the default level everywhere outside its parts; the warning
        // first blamed a reach_level the case never set.
        true => format!(
            "the reach along the axis to {level} mT (the default reach_level) ends {} from where it is measured, inside the box around the parts: the field outside them is weaker than that, so the reach says nothing of the stray field; give [study] reach_level lower to measure how far it reaches",
            model.length_text(d)
        ),
        false => format!(
            "the reach along the axis to {level} mT ends {} from where it is measured, inside the box around the parts: reach_level lies above the field outside them, so the reach says nothing of the stray field (the default is {} mT)",
            model.length_text(d),
            DEFAULT_REACH_LEVEL * 1e3
        ),
    })
}

/// Each magnet's working point against its knee at the study temperature, with its values and warnings.
pub fn magnet_results(model: &Model, sol: &Solution, values: &mut BTreeMap<String, f64>, warnings: &mut Vec<String>) -> BTreeMap<String, MagnetResult> {
    let mut out = BTreeMap::new();
    for (i, p) in model.parts.iter().enumerate() {
        let Material::Magnet(g) = &p.material.material else {
            continue;
        };
        let dir = p.magnetization.unwrap_or([0.0, 1.0]);
        let t = model.temperature;
        let hcj = g.hcj_at(t);
        let knee = -KNEE_FRACTION * hcj;
        let wp = magnet_check::working_point(sol, i, dir, knee);
        let onset = onset_temperature(wp.worst_share_h, t, g.br_coeff, g.hcj_coeff, KNEE_FRACTION * g.hcj);
        values.insert(format!("magnet.{}.permeance", p.name), wp.permeance);
        // A grade without a coercivity has no knee to be checked against:
        // its margin came out as 1 (a knee at minus infinity), read as safe.
        let wp = if g.hcj.is_finite() {
            values.insert(format!("magnet.{}.margin", p.name), wp.margin);
            values.insert(format!("magnet.{}.margin_local", p.name), wp.margin_local);
            values.insert(format!("magnet.{}.share_past_knee", p.name), wp.share_past_knee);
            values.insert(format!("magnet.{}.loss", p.name), wp.loss);
            wp
        } else {
            // No warning: an ideal magnet (a validation's rigid one) is meant
            // so; the summary and report say "not checked" in its place.
            magnet_check::WorkingPoint {
                margin: f64::NAN,
                margin_local: f64::NAN,
                share_past_knee: f64::NAN,
                loss: f64::NAN,
                ..wp
            }
        };
        if let Some(rated) = g.max_temperature.filter(|&rated| t > rated) {
            warnings.push(format!(
                "magnet '{}' ({}) runs at {t} degC, above its grade's rated maximum working temperature ({rated} degC): its Br, knee and losses come from the linear temperature model carried past the catalogue's range; confirm them with the maker's curves at that temperature",
                p.name, p.material.name
            ));
        }
        if wp.loss > LOSS_WARNING {
            let after = model
                .exposure
                .map_or(String::new(), |e| format!(" after the exposure at {} degC", e.temperature));
            warnings.push(format!(
                "magnet '{}' ({}) loses {:.1} % of its flux irreversibly{after}: every result here is for the weakened magnet at {t} degC",
                p.name,
                p.material.name,
                100.0 * wp.loss
            ));
        }
        // Past the knee over more than WORST_SHARE of the volume (the margin
        // is taken at that percentile): a corner alone does not warn.
        if wp.margin < 0.0 {
            let when = onset.map_or(String::new(), |(c, above)| {
                let side = if above { "above" } else { "below" };
                format!("; by the linear model it is past its knee {side} about {c:.0} degC")
            });
            warnings.push(format!(
                "magnet '{}' ({}) is driven past its knee at {t} degC over {:.1} % of its volume: it will lose magnetization{when}",
                p.name,
                p.material.name,
                100.0 * wp.share_past_knee
            ));
        }
        out.insert(
            p.name.clone(),
            MagnetResult {
                grade: p.material.name.clone(),
                temperature_c: t,
                br_t: g.br_at(t),
                hcj_a_per_m: hcj,
                knee_h_a_per_m: knee,
                margin: wp.margin,
                margin_local: wp.margin_local,
                share_past_knee: wp.share_past_knee,
                irreversible_loss: wp.loss,
                permeance: wp.permeance,
                mean_b_t: wp.mean_b,
                mean_h_a_per_m: wp.mean_h,
                knee_onset_c: onset.map(|o| o.0),
                knee_past_above_onset: onset.map(|o| o.1),
                points: wp.points,
            },
        );
    }
    out
}

/// Why a magnet with this irreversible loss, margin over its worst 1 % and
/// share past its knee counts as demagnetized (`check` fails it unless the
/// case allows it), or None: one rule for a solve and for each tolerance
/// sample.
pub fn demagnetized(loss: f64, margin: f64, share_past_knee: f64) -> Option<String> {
    match (loss > LOSS_WARNING, margin < 0.0) {
        (false, false) => None,
        (true, _) => Some(format!(
            "loses {:.1} % of its flux irreversibly, past its knee over {:.1} % of its volume",
            100.0 * loss,
            100.0 * share_past_knee
        )),
        (false, true) => Some(format!("past its knee over {:.1} % of its volume", 100.0 * share_past_knee)),
    }
}

/// Temperature at which the most demagnetized 1 % of the volume meets the knee, by the
/// linear model: the demagnetizing field scales with Br(T) and the knee with
/// HcJ(T), both by their reversible coefficients from 20 degC.
/// Also whether the magnet is past its knee above that temperature (NdFeB
/// and SmCo, whose coercivity falls as they warm) or below it (ferrite,
/// whose coercivity falls as it cools).
fn onset_temperature(worst_h: f64, t0: f64, br_coeff: f64, hcj_coeff: f64, knee20: f64) -> Option<(f64, bool)> {
    if worst_h.is_nan() || worst_h >= 0.0 || !knee20.is_finite() {
        return None;
    }
    let (ab, aj) = (br_coeff / 100.0, hcj_coeff / 100.0);
    let s = 1.0 + ab * (t0 - 20.0);
    let denominator = worst_h * ab / s + knee20 * aj;
    if denominator == 0.0 {
        return None;
    }
    let u = (-knee20 - worst_h / s) / denominator;
    let t = 20.0 + u;
    // The distance to the knee, knee20 (1 + aj u) + worst_h (1 + ab u) / s,
    // changes by `denominator` per kelvin: falling, the knee lies above.
    (-100.0..=400.0).contains(&t).then_some((t, denominator < 0.0))
}

/// The stray field: dipole moment, implant and reach distances, air-transport screen.
pub fn stray_results(model: &Model, sol: &Solution, values: &mut BTreeMap<String, f64>) -> StrayResult {
    let mut r = StrayResult {
        reach_level_t: model.reach_level,
        ..Default::default()
    };
    let Some(disk) = &sol.problem.mesh.exterior else {
        return r;
    };
    let (c, radius) = (disk.center, disk.radius);
    r.reference_point_m = Some(c);
    let limit = 0.98 * radius;
    let axisym = model.symmetry == Symmetry::Axisymmetric;
    let series = stray::exterior_series(sol, c, 0.95 * radius);
    // Each ray (from a point, along a direction) is scanned once, when first
    // asked, for every level asked of it; from a point off the centre it
    // reaches as far past the rim's limit as the point lies off the centre.
    let rays = std::cell::RefCell::new(Vec::<(([f64; 2], [f64; 2]), std::rc::Rc<stray::RayProfile>)>::new());
    let fall = |from: [f64; 2], dir: [f64; 2], level: f64| {
        let cached = rays.borrow().iter().find(|(k, _)| *k == (from, dir)).map(|(_, ray)| ray.clone());
        let ray = cached.unwrap_or_else(|| {
            let ray = std::rc::Rc::new(stray::RayProfile::along(sol, from, dir, limit + (from[1] - c[1]).abs()));
            rays.borrow_mut().push(((from, dir), ray.clone()));
            ray
        });
        ray.fall_distance(sol, level, series.as_ref())
    };
    let along = |dir: [f64; 2], level: f64| fall(c, dir, level);
    let axis = |level: f64| {
        [along([0.0, 1.0], level), along([0.0, -1.0], level)]
            .into_iter()
            .flatten()
            .fold(None, |m: Option<f64>, d| Some(m.map_or(d, |x| x.max(d))))
    };
    // From the case's own point (a magnet's face, a wall) where it gives
    // one, outwards (away from the centre along the axis); else from the
    // centre, the farther of the two ways.
    let from = model.reach_from.unwrap_or(c);
    r.reach_from_m = Some(from);
    let ways: &[[f64; 2]] = match from[1].partial_cmp(&c[1]) {
        Some(std::cmp::Ordering::Greater) => &[[0.0, 1.0]],
        Some(std::cmp::Ordering::Less) => &[[0.0, -1.0]],
        _ => &[[0.0, 1.0], [0.0, -1.0]],
    };
    r.reach_axis_m = ways
        .iter()
        .copied()
        .filter_map(|dir| fall(from, dir, model.reach_level))
        .fold(None, |m: Option<f64>, d| Some(m.map_or(d, |x| x.max(d))));
    if let Some(d) = r.reach_axis_m {
        values.insert("reach.axis".into(), d);
    }
    if !axisym {
        return r;
    }
    r.moment_a_m2 = series.as_ref().map(|s| s.dipole_moment());
    r.implant_distance_axis_m = axis(IMPLANT_LEVEL);
    r.implant_distance_plane_m = along([1.0, 0.0], IMPLANT_LEVEL);
    if let Some(m) = r.moment_a_m2 {
        values.insert("stray.moment".into(), m);
        let h21 = stray::dipole_h(m.abs(), 2.1).0;
        let h46 = stray::dipole_h(m.abs(), 4.6).0;
        r.h_at_2100mm_a_per_m = Some(h21);
        r.h_at_4600mm_a_per_m = Some(h46);
        values.insert("stray.h_at_2100mm".into(), h21);
        values.insert("stray.h_at_4600mm".into(), h46);
        r.air_transport = Some(air_screen(h21, h46));
    }
    if let Some(d) = r.implant_distance_axis_m {
        values.insert("stray.implant_distance.axis".into(), d);
    }
    if let Some(d) = r.implant_distance_plane_m {
        values.insert("stray.implant_distance.plane".into(), d);
    }
    r
}

fn air_screen(h21: f64, h46: f64) -> String {
    let verdict = if h46 > IATA_CURRENT {
        "above the threshold even at 4.6 m: forbidden by air without prior approval under the current PI 953 wording"
    } else if h21 > IATA_CURRENT {
        "above the threshold at 2.1 m but not at 4.6 m: magnetized material (UN 2807) under the current PI 953 wording"
    } else if h21 > IATA_LEGACY {
        "below the current 0.418 A/m threshold at 2.1 m but above the older 0.159 A/m screen"
    } else {
        "below both the current and the older threshold at 2.1 m"
    };
    format!("{verdict}. Screening estimate for one bare assembly from its dipole moment, measured from its centre, not a packaging verdict: shielding, packing and several items change it; follow the current IATA Dangerous Goods Regulations and the carrier.")
}

#[cfg(test)]
mod tests {
    use super::onset_temperature;

    /// The distance to the knee at `t` (negative: past it), by the model's own scaling.
    fn distance(worst_h: f64, t0: f64, br_coeff: f64, hcj_coeff: f64, knee20: f64, t: f64) -> f64 {
        let s = 1.0 + br_coeff / 100.0 * (t0 - 20.0);
        knee20 * (1.0 + hcj_coeff / 100.0 * (t - 20.0)) + worst_h * (1.0 + br_coeff / 100.0 * (t - 20.0)) / s
    }

    /// NdFeB's coercivity falls as it warms (about -0.6 %/K, sources S1 and
    /// S5 of docs/materials.md), ferrite's as it cools (Y30: +0.27 %/K, Br
    /// -0.2 %/K, source S23): the onset is where the distance to the knee is
    /// zero, and the side past it is the warmer one for NdFeB, the colder
    /// for ferrite.
    #[test]
    fn the_onset_is_where_the_knee_is_met_and_on_the_right_side() {
        for (br, hcj, above) in [(-0.12, -0.6, true), (-0.2, 0.27, false)] {
            let (knee20, worst_h, t0) = (900e3, -700e3, 40.0);
            let (t, past_above) = onset_temperature(worst_h, t0, br, hcj, knee20).unwrap();
            assert!(distance(worst_h, t0, br, hcj, knee20, t).abs() < 1e-6 * knee20, "{t}");
            assert_eq!(past_above, above);
            let side = if above { t + 10.0 } else { t - 10.0 };
            assert!(distance(worst_h, t0, br, hcj, knee20, side) < 0.0, "past the knee beyond the onset");
        }
    }
}
