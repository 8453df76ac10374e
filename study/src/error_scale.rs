//! The scale each value's error is measured against (`scale`): the value,
//! its vector, the whole of a share, or a floor (`Results::floors`, made
//! by `probe_floors` and `force_floors`) where the value vanishes
//! (a probe's field under a share of the study's field, a force under a
//! share of the pulls that cancel in it), and percentages for messages.

use std::collections::BTreeMap;

/// The scale a value's error is measured against: the value itself, or the
/// magnitude of the vector it is a component of (a component that vanishes
/// by symmetry is not asked to be accurate relative to zero), or the whole
/// for a share of it (`is_share`).
pub fn scale(name: &str, values: &BTreeMap<String, f64>, floors: &BTreeMap<String, f64>) -> f64 {
    let own = values.get(name).copied().unwrap_or(0.0).abs();
    if is_share(name) {
        return own.max(1.0);
    }
    let own = own.max(floors.get(name).copied().unwrap_or(0.0));
    // Only a component has a vector: a force's torque (N m) is not measured
    // against the force's magnitude (N), nor a probe's H (A/m) against its B.
    let Some((group, component)) = name.rsplit_once('.') else { return own };
    if !COMPONENTS.contains(&component) {
        return own;
    }
    ["b", "magnitude"]
        .iter()
        .filter_map(|m| values.get(&format!("{group}.{m}")))
        .fold(own, |s, v| s.max(v.abs()))
}

/// The share of the gross pull of the stress in a force's band
/// (`solver::post::force::Force::gross`) below which the force is measured
/// against that share: 1e-2. Where two pulls cancel (a steel plate midway
/// between two equal magnets facing with like poles: 12 N gross, the net
/// force noise of 1e-5 N) the force's error is theirs, and 0.1 % of its own
/// noise took four meshes, 10.5 s, and ended "not reached" at 11 424 %. Its
/// changes fell as 69, 35 and 10 uN over three meshes, so a share of 1e-3
/// (12 uN asked at 0.1 %) still took four. On the examples' forces the
/// gross pull is 1.05 to 1.7 times the force on a plate or yoke, and 10
/// times it on a magnet (its own field's stress cancels), so the share
/// binds only where the pulls cancel to a hundredth, and the net's error
/// is then a thousandth of that hundredth of the pulls
/// (docs/measurement-log.md, twenty-fourth session).
const FORCE_NULL_SHARE: f64 = 1e-2;

/// The least scales of each force's values' errors (`FORCE_NULL_SHARE` of
/// its gross pull), by value name; not of its torque, whose arm's point
/// is the case's.
pub fn force_floors(forces: &BTreeMap<String, crate::results::ForceResult>, planar: bool) -> BTreeMap<String, f64> {
    let components = if planar { ["x", "y", "magnitude"] } else { ["r", "z", "magnitude"] };
    forces
        .iter()
        .flat_map(|(name, f)| components.map(|c| (format!("force.{name}.{c}"), FORCE_NULL_SHARE * f.gross)))
        .collect()
}

/// The share of the study's field (the largest mean |B| of its parts)
/// below which a probe's field is measured against that share, not
/// against itself: 1e-4, for magnets and steel about the Earth's field
/// (some 50 uT, common practice), so a weaker reading is held to a
/// thousandth of that, tens of nanotesla, at 0.1 %. A probe where the field
/// vanishes (on the axis midway between two magnets facing with like
/// poles) was measured against its own noise: 0.1 % of 15 pT asked for four
/// meshes and 1.2 million unknowns, and the study ended "not reached" at 75
/// %, while a probe 3 mm away had 174 mT within 4e-8. With 1e-5 it still
/// took four meshes: its estimates fell as 64 and 10 nT, where the probe
/// beside it was asked for 174 uT (docs/measurement-log.md).
const NULL_SHARE: f64 = 1e-4;

/// The least scales of the probes' field values (`NULL_SHARE` of the
/// parts' largest mean |B|, in each value's own unit: T, or A/m for H), by
/// value name, from a study's values.
pub fn probe_floors(values: &BTreeMap<String, f64>) -> BTreeMap<String, f64> {
    const FIELDS: [&str; 9] = [".b", ".bx", ".by", ".br", ".bz", ".b.max", ".b.min", ".b.mean", ".h"];
    let field = values
        .iter()
        .filter(|(k, _)| k.starts_with("part.") && k.ends_with(".b.mean"))
        .fold(0.0, |m: f64, (_, v)| m.max(v.abs()));
    let floor = NULL_SHARE * field;
    values
        .keys()
        .filter(|k| k.starts_with("probe.") && FIELDS.iter().any(|f| k.ends_with(f)))
        .map(|k| (k.clone(), if k.ends_with(".h") { floor / solver::MU0 } else { floor }))
        .collect()
}

/// A share as a percentage for messages: three decimals, as the targets'
/// usual 0.1 % and 0.001 % read, and two significant digits below 0.001 %
/// (at 0.0001 % asked, "largest estimated error 0.000 %" said nothing).
pub fn percent(share: f64) -> String {
    let p = 100.0 * share;
    if p == 0.0 || !p.is_finite() || p.abs() >= 0.001 {
        return format!("{p:.3}");
    }
    let decimals = (1.0 - p.abs().log10().floor()) as usize;
    format!("{p:.decimals$}")
}

/// An accuracy asked, as a percentage in its shortest form: 1e-6 read
/// "0.00009999999999999999 %" (100 times it, printed in full).
pub fn target_percent(share: f64) -> String {
    let p = 100.0 * share;
    if p == 0.0 || !p.is_finite() {
        return format!("{p}");
    }
    let digits = 12 - p.abs().log10().ceil() as i32;
    let unit = 10f64.powi(digits);
    format!("{}", (p * unit).round() / unit)
}

/// The last parts of the names of vector components (forces, probes).
const COMPONENTS: [&str; 8] = ["x", "y", "r", "z", "bx", "by", "br", "bz"];

/// Whether a value is a share of a whole (a volume past the knee or
/// saturated, a flux lost, a margin to the knee as a share of H there):
/// its error is measured against the whole, 1. Against itself, a loss of
/// 2e-7 of the remanence asked for an absolute error of 2e-10, which no
/// mesh gives and no verdict needs.
pub(crate) fn is_share(name: &str) -> bool {
    [".saturated_share", ".share_past_knee", ".loss", ".margin"].iter().any(|s| name.ends_with(s))
}

/// A values map from pairs, for the tests here and in `estimate`.
#[cfg(test)]
pub(crate) fn map(pairs: &[(&str, f64)]) -> BTreeMap<String, f64> {
    pairs.iter().map(|(k, v)| (k.to_string(), *v)).collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn percentages_read_as_written() {
        assert_eq!(target_percent(1e-6), "0.0001");
        assert_eq!(target_percent(1e-3), "0.1");
        assert_eq!(target_percent(5e-5), "0.005");
        assert_eq!(percent(2.34567e-3), "0.235");
        assert_eq!(percent(1.7706e-9), "0.00000018");
        assert_eq!(percent(0.0), "0.000");
    }

    /// A probe's field is measured against at least `NULL_SHARE` of the
    /// largest mean |B| of the parts (H against that over mu0); above it,
    /// against itself; no other value has the floor.
    #[test]
    fn a_vanishing_probe_field_is_measured_against_the_studys_field() {
        let v = map(&[
            ("part.a.b.mean", 0.2),
            ("part.b.b.mean", -0.5),
            ("probe.p.b", 1e-11),
            ("probe.p.h", 1e-5),
            ("probe.q.b", 0.01),
            ("probe.l.b.min", 0.0),
            ("force.f.magnitude", 1e-11),
        ]);
        let floors = probe_floors(&v);
        assert_eq!(scale("probe.p.b", &v, &floors), NULL_SHARE * 0.5);
        assert_eq!(scale("probe.l.b.min", &v, &floors), NULL_SHARE * 0.5);
        assert_eq!(scale("probe.p.h", &v, &floors), NULL_SHARE * 0.5 / solver::MU0);
        assert_eq!(scale("probe.q.b", &v, &floors), 0.01);
        assert_eq!(scale("force.f.magnitude", &v, &floors), 1e-11);
    }

    /// A force's values (not its torque) are measured against at least
    /// `FORCE_NULL_SHARE` of its gross pull; above it, against themselves.
    #[test]
    fn a_cancelling_force_is_measured_against_its_gross_pull() {
        let force = crate::results::ForceResult {
            vector: [1e-6, 0.0],
            magnitude: 1e-6,
            torque: Some(1e-9),
            contact: false,
            unreliable: false,
            gross: 12.0,
        };
        let floors = force_floors(&[("f".to_string(), force)].into_iter().collect(), true);
        let v = map(&[
            ("force.f.x", 1e-6),
            ("force.f.y", 0.0),
            ("force.f.magnitude", 1e-6),
            ("force.f.torque", 1e-9),
            ("force.g.x", 0.5),
        ]);
        assert_eq!(scale("force.f.x", &v, &floors), FORCE_NULL_SHARE * 12.0);
        assert_eq!(scale("force.f.magnitude", &v, &floors), FORCE_NULL_SHARE * 12.0);
        assert_eq!(scale("force.f.torque", &v, &floors), 1e-9);
        assert_eq!(scale("force.g.x", &v, &floors), 0.5);
    }
}
