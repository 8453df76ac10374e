//! Probes that read something other than what they seem to: a point probe
//! inside material, a line probe's samples on singular corners (left out),
//! and a line probe whose largest |B| lies inside a part.

use crate::materials::Material;
use crate::model::{Model, ProbeShape};
use crate::results::ProbeResult;
use solver::space::ElementKind;
use solver::Solution;
use std::collections::BTreeMap;

/// The part (other than air or a conductor) that holds `x`, if any.
fn material_part_at<'m>(model: &'m Model, sol: &Solution, x: [f64; 2]) -> Option<&'m crate::model::Part> {
    let (e, _) = sol.element_at(x)?;
    let ElementKind::Part(i) = sol.elements.kinds[e] else { return None };
    let part = &model.parts[i];
    is_material(part).then_some(part)
}

/// Whether a probe in the part reads the field inside a material (not air
/// or a conductor, where a sensor sits).
fn is_material(part: &crate::model::Part) -> bool {
    !matches!(part.material.material, Material::Air | Material::Conductor)
}

/// Every probe warning of a solved study.
pub(crate) fn probe_warnings(model: &Model, sol: &Solution, corners: &crate::lower::SingularCorners, probes: &BTreeMap<String, ProbeResult>) -> Vec<String> {
    let mut out = Vec::new();
    for p in &model.probes {
        match p.shape {
            ProbeShape::Point(x) => {
                if let Some(part) = material_part_at(model, sol, x) {
                    out.push(format!(
                        "probe '{}' lies inside part '{}' ({}): its field is the field inside that material",
                        p.name, part.name, part.material.name
                    ));
                }
            }
            ProbeShape::Line { .. } => {
                let Some(r) = probes.get(&p.name) else { continue };
                let on: Vec<([f64; 2], &str)> = r
                    .points
                    .iter()
                    .filter_map(|&x| corners.part_at(x).map(|part| (x, part.name.as_str())))
                    .collect();
                if let Some((x, part)) = on.first() {
                    out.push(format!(
                        "probe '{}': {} sample(s) on a corner of a part (the first at {}, a corner of '{part}'), where the field is singular, left out (NaN in its CSV and results)",
                        p.name,
                        on.len(),
                        model.point_text(*x)
                    ));
                }
                out.extend(peak_inside_material(model, sol, &p.name, r));
                out.extend(peak_between_samples(model, sol, corners, &p.name, r));
            }
        }
    }
    out
}

/// A line through a magnet or a pole piece (an axis from below the magnet
/// to the sensor, say) takes its largest |B| inside the part, and
/// `b.max`, which a bound on the field reaching the air reads, is then the
/// field in the material with no sign of it.
fn peak_inside_material(model: &Model, sol: &Solution, name: &str, r: &ProbeResult) -> Option<String> {
    let peak = r.bmag.iter().enumerate().filter(|(_, b)| b.is_finite()).max_by(|a, b| a.1.total_cmp(b.1))?.0;
    let x = r.points[peak];
    let part = material_part_at(model, sol, x)?;
    // A sample on the part's face (a line that starts there) is not inside:
    // a step of a millionth of the spacing towards each neighbouring sample
    // must stay in the part.
    let neighbours = [peak.checked_sub(1), Some(peak + 1)];
    for y in neighbours.into_iter().flatten().filter_map(|k| r.points.get(k)) {
        let nudged = [x[0] + 1e-6 * (y[0] - x[0]), x[1] + 1e-6 * (y[1] - x[1])];
        if material_part_at(model, sol, nudged).is_none_or(|q| q.name != part.name) {
            return None;
        }
    }
    Some(format!(
        "probe '{name}': its largest |B| lies inside part '{}' ({}) at {}, so probe.{name}.b.max is the field inside that material; end the line at the part's face if the field in the air is meant",
        part.name,
        part.material.name,
        model.point_text(r.points[peak])
    ))
}

/// Points read between each pair of neighbouring samples of a line probe
/// to see whether the samples miss its peak.
const BETWEEN_SAMPLES: usize = 8;

/// How far above the largest sample the field between samples may rise
/// before the line's `b.max` is said to miss the peak (common practice:
/// a percent is within what a Hall sensor's placement gives).
const MISSED_PEAK_SHARE: f64 = 0.01;

/// A line of few samples across a narrow peak (a pole's edge, the field
/// over a gap) reports as `b.max` its largest sample, which may lie well
/// below the peak between samples. Reads the solution at points between
/// each pair of samples (in the element, without the ball extraction)
/// and warns where it rises past the largest sample by more than a
/// percent, saying where and how many points would catch it. Only points
/// in air or a conductor count: a peak inside a magnet or steel is not
/// the field a sensor reads (`peak_inside_material` speaks of a sample
/// there).
fn peak_between_samples(model: &Model, sol: &Solution, corners: &crate::lower::SingularCorners, name: &str, r: &ProbeResult) -> Option<String> {
    let sampled = r.bmag.iter().copied().filter(|b| b.is_finite()).fold(f64::NAN, f64::max);
    // Not beside a sample left out on a singular corner, where the field
    // grows towards the corner without a peak to catch.
    let pairs = r.points.windows(2).zip(r.bmag.windows(2)).filter(|(_, b)| b.iter().all(|v| v.is_finite()));
    let between = pairs.flat_map(|(w, _)| {
        (1..BETWEEN_SAMPLES).map(move |k| {
            let t = k as f64 / BETWEEN_SAMPLES as f64;
            [w[0][0] + t * (w[1][0] - w[0][0]), w[0][1] + t * (w[1][1] - w[0][1])]
        })
    });
    let (x, b) = between
        .filter(|&x| corners.part_at(x).is_none())
        .filter_map(|x| sol.field_at(x).map(|f| (x, f)))
        .filter(|(_, f)| f.part.is_none_or(|i| !is_material(&model.parts[i])))
        .map(|(x, f)| (x, f.b[0].hypot(f.b[1])))
        .max_by(|a, b| a.1.total_cmp(&b.1))?;
    (b > sampled * (1.0 + MISSED_PEAK_SHARE)).then(|| {
        format!(
            "probe '{name}': its {} samples miss the line's peak: between them |B| reaches {} at {}, {:.1} % above the largest sample ({}), which probe.{name}.b.max reports; give the line more points ({} put a sample there) or put a point probe at the peak",
            r.points.len(),
            tesla_text(b),
            model.point_text(x),
            100.0 * (b / sampled - 1.0),
            tesla_text(sampled),
            (r.points.len() - 1) * BETWEEN_SAMPLES + 1,
        )
    })
}

/// A flux density for a warning: tesla from 1 T, millitesla below.
fn tesla_text(b: f64) -> String {
    if b >= 1.0 {
        format!("{b:.4} T")
    } else {
        format!("{:.3} mT", 1e3 * b)
    }
}

/// The field of a line of dipoles of length `depth` on its mid-plane at
/// distance `d`, as a share of the planar (infinitely long) one:
/// a (a^2 + 2 d^2) / (a^2 + d^2)^(3/2) with a = depth / 2 (the dipole
/// field integrated along the line; docs/methods.md, "Planar studies of a
/// short part"). 1 at the line, 1.06 at its most, 0.80 at d = depth, 0.20
/// at d = 10 a: far from a short part the planar field overstates it.
pub(crate) fn finite_length_share(depth: f64, d: f64) -> f64 {
    let a = 0.5 * depth;
    a * (a * a + 2.0 * d * d) / (a * a + d * d).powf(1.5)
}

/// Where a planar study's parts, being infinitely long, overstate a short
/// part's field by more than this share (the thin-line model above).
const FAR_FIELD_SHARE: f64 = 0.9;

/// A planar study of a short part (depth 10 mm) read far from it: a probe
/// 45 mm away gave 8.07 mT +- 0.0003 mT for a cube magnet whose field there
/// is about 1.65 mT, with no sign that the model, not the mesh, was off.
/// Warns of the probes (point probes, a line probe's farthest sample) and
/// the reach that lie where a line of dipoles as long as the depth departs
/// from the planar field by more than a tenth.
pub(crate) fn planar_far_field(model: &Model, probes: &BTreeMap<String, ProbeResult>, reach: Option<f64>) -> Option<String> {
    if model.symmetry != mesher::Symmetry::Planar || !model.depth_given {
        return None;
    }
    let mut far: Vec<(String, f64)> = Vec::new();
    for p in &model.probes {
        let Some(r) = probes.get(&p.name) else { continue };
        let d = r.points.iter().map(|&x| crate::lower::box_clearance(model, x)).fold(0.0, f64::max);
        far.push((format!("probe '{}' ({} from the nearest part)", p.name, model.length_text(d)), d));
    }
    if let Some(d) = reach {
        far.push((format!("the reach ({})", model.length_text(d)), d));
    }
    far.retain(|(_, d)| finite_length_share(model.depth, *d) < FAR_FIELD_SHARE);
    let farthest = far.iter().map(|f| f.1).fold(0.0, f64::max);
    (!far.is_empty()).then(|| {
        let names: Vec<&str> = far.iter().map(|f| f.0.as_str()).collect();
        format!(
            "planar study of depth {}, read far from its parts for their length: {}. A planar study's parts are infinitely long; a real part's field falls faster away from it (as 1/r^3, not 1/r^2), and a line of dipoles {} long gives {:.2} of the planar field {} away, so these values overstate it. Give depth the real length, or model a round part as axisymmetric",
            model.length_text(model.depth),
            names.join(", "),
            model.length_text(model.depth),
            finite_length_share(model.depth, farthest),
            model.length_text(farthest)
        )
    })
}

#[cfg(test)]
mod tests {
    use super::finite_length_share;

    /// The closed form against the dipole field summed along the line
    /// (midpoint rule, 200 000 pieces), and its limits: the planar field at
    /// the line, a point dipole's 1/d^3 (as a share: depth / (2 d)) far away.
    #[test]
    fn the_finite_length_share_is_the_summed_dipole_field() {
        let depth = 0.01;
        for d in [0.001, 0.005, 0.01, 0.05, 0.2] {
            let n = 200_000;
            let dz = depth / n as f64;
            let sum: f64 = (0..n)
                .map(|k| {
                    let z = -0.5 * depth + (k as f64 + 0.5) * dz;
                    let r2 = d * d + z * z;
                    (3.0 * d * d / r2 - 1.0) / r2.powf(1.5) * dz
                })
                .sum();
            // Per unit moment: the line's mu0/(4 pi) sum against the planar mu0 / (2 pi d^2).
            let share = sum / (4.0 * std::f64::consts::PI) * (2.0 * std::f64::consts::PI * d * d);
            assert!((share - finite_length_share(depth, d)).abs() < 1e-6, "{d}: {share}");
        }
        assert!((finite_length_share(depth, 1e-9) - 1.0).abs() < 1e-9);
        let far = 100.0 * depth;
        assert!((finite_length_share(depth, far) / (depth / far) - 1.0).abs() < 1e-3);
    }
}
