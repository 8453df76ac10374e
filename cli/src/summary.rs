//! The plain-text summary printed after a solve.

use crate::output::engineering::{eng, eng_pm};
use crate::run::Outcome;
use std::path::Path;
use study::results::Verdict;

/// What a pull at contact assumes, in the summary and the report. Measured
/// on the example cup magnet (pot-magnet.toml with its gap at 0: 1.087 kN): 5.6 %
/// less at a 0.02 mm gap, 11.8 % at 0.05 mm, 20 % at 0.1 mm.
pub const CONTACT_NOTE: &str = "a pull at contact assumes ideal flat faces in full contact; paint, plating, scale or roughness act as an air gap of a few hundredths of a millimetre, which can take a tenth or more off it (the example cup magnet: 6 % at 0.02 mm, 12 % at 0.05 mm): sweep small gaps to bound it";

/// Component `i` of a force with its own error: a component can be far
/// less certain than the magnitude (a sideways pull at contact came out
/// 20 N +- 76 N beside |F| = 436 N +- 2.3 N). One that is zero by symmetry
/// (the radial pull on a round part) has no error to show.
pub fn force_component(r: &study::Results, name: &str, fr: &study::results::ForceResult, i: usize, symmetry: mesher::Symmetry) -> String {
    let axes = if symmetry == mesher::Symmetry::Axisymmetric { ["r", "z"] } else { ["x", "y"] };
    match fr.vector[i] {
        0.0 => eng(0.0, "N"),
        v => eng_pm(v, r.errors.get(&format!("force.{name}.{}", axes[i])).copied(), "N"),
    }
}

/// A share as a percentage with its error: "0.0 %" where the error is
/// below a hundredth of a percent, "2.31 % ± 0.12 %" otherwise.
pub fn percent_pm(share: f64, error: Option<f64>) -> String {
    match error.filter(|e| *e >= 1e-4) {
        Some(e) => eng_pm(100.0 * share, Some(100.0 * e), "%"),
        None => format!("{:.1} %", 100.0 * share),
    }
}

/// The summary: mesh and solve figures, forces, fluxes, probes, parts,
/// energy, expectations, and the warnings, in engineering notation.
pub fn summary(o: &Outcome, out: &Path) -> String {
    let r = &o.results;
    let m = &o.model;
    let (u, f) = (&m.length_unit.0, m.length_unit.1);
    let mut s = format!("{}\n", m.title);
    if m.symmetry == mesher::Symmetry::Planar {
        s += &if m.depth_given {
            format!("  planar, depth {} {u}: forces, fluxes and energies are for the whole depth\n", m.depth / f)
        } else {
            "  planar, NO DEPTH GIVEN: forces, fluxes and energies are per metre of depth\n".to_string()
        };
    }
    s += &format!(
        "  mesh: {} nodes{}, {} triangles (order {}), {} unknowns, min angle {:.1} deg\n",
        r.mesh.nodes,
        if r.mesh.element_order == 2 { " (corners and edge midpoints)" } else { "" },
        r.mesh.elements,
        r.mesh.element_order,
        r.mesh.unknowns,
        r.mesh.min_angle_deg
    );
    s += &format!(
        "  solve: {} in {} iteration(s), {} factorization(s), residual {:.2e}, {:.2} s\n",
        if r.solve.converged { "converged" } else { "NOT CONVERGED" },
        r.solve.iterations,
        r.solve.factorizations,
        r.solve.residual,
        r.solve.seconds
    );
    s += &accuracy_line(r);
    s += &force_lines(r, m.symmetry);
    s += &flux_lines(r);
    s += &probe_lines(r, m);
    s += &part_lines(r);
    s += &magnet_lines(r);
    s += &coil_lines(r);
    s += &format!(
        "  energy: {}\n",
        crate::output::engineering::energy_text(r.energy.stored_j, r.errors.get("energy").copied())
    );
    s += &expectation_lines(r);
    for w in &r.warnings {
        s += &format!("  WARNING: {w}\n");
    }
    s += &format!("  results in {}\n", out.display());
    s
}

/// Each force set, and what a pull at contact assumes.
fn force_lines(r: &study::Results, symmetry: mesher::Symmetry) -> String {
    let mut s = String::new();
    let err = |name: String| r.errors.get(&name).copied();
    for (name, fr) in &r.forces {
        let contact = if fr.unreliable {
            "  (parts touch the outer boundary: value unreliable)"
        } else if fr.contact {
            "  (at contact)"
        } else {
            ""
        };
        s += &format!(
            "  force {name}: [{}, {}], |F| = {}{contact}\n",
            force_component(r, name, fr, 0, symmetry),
            force_component(r, name, fr, 1, symmetry),
            eng_pm(fr.magnitude, err(format!("force.{name}.magnitude")), "N")
        );
    }
    if r.forces.values().any(|f| f.contact && !f.unreliable) {
        s += &format!("  note: {CONTACT_NOTE}\n");
    }
    s
}

/// Each flux or linkage, with its inductances.
fn flux_lines(r: &study::Results) -> String {
    let mut s = String::new();
    let err = |name: String| r.errors.get(&name).copied();
    for (name, fl) in &r.flux {
        s += &format!("  flux {name}: {}", eng_pm(fl.wb, err(format!("flux.{name}")), "Wb"));
        if let Some(l) = fl.inductance_h {
            s += &format!(", inductance {}", eng_pm(l, err(format!("flux.{name}.inductance")), "H"));
        }
        if let Some(l) = fl.distinct_incremental_inductance() {
            let key = format!("flux.{name}.incremental_inductance");
            s += &format!(", incremental inductance {}", eng_pm(l, err(key), "H"));
        }
        s.push('\n');
    }
    s
}

/// Each point probe's |B|, each line probe's peak.
fn probe_lines(r: &study::Results, m: &study::model::Model) -> String {
    let mut s = String::new();
    let err = |name: String| r.errors.get(&name).copied();
    let (u, f) = (&m.length_unit.0, m.length_unit.1);
    for (name, p) in &r.probes {
        if p.points.len() == 1 {
            s += &format!(
                "  probe {name} at ({}, {}) {u}: |B| = {}\n",
                eng(p.points[0][0] / f, ""),
                eng(p.points[0][1] / f, ""),
                eng_pm(p.bmag[0], err(format!("probe.{name}.b")), "T")
            );
        } else {
            let sampled = p.bmag.iter().copied().fold(0.0, f64::max);
            let max = r.values.get(&format!("probe.{name}.b.max")).copied().unwrap_or(sampled);
            s += &format!(
                "  probe {name}: {} points, |B| max {}\n",
                p.points.len(),
                eng_pm(max, err(format!("probe.{name}.b.max")), "T")
            );
        }
    }
    s
}

/// Each part's mean and peak |B|, and whether it saturates.
fn part_lines(r: &study::Results) -> String {
    let mut s = String::new();
    let err = |name: String| r.errors.get(&name).copied();
    for (name, p) in &r.parts {
        let sat = match p.saturated {
            Some(true) => "  SATURATED (above the knee of its curve)",
            _ => "",
        };
        s += &format!(
            "  part {name} ({}): |B| mean {}, peak {} (local){sat}\n",
            p.material,
            eng_pm(p.b_mean, err(format!("part.{name}.b.mean")), "T"),
            eng(p.b_max, "T")
        );
    }
    s
}

/// Each magnet's margin to its knee and its loss.
fn magnet_lines(r: &study::Results) -> String {
    let mut s = String::new();
    let err = |name: String| r.errors.get(&name).copied();
    for (name, m) in &r.magnets {
        if !m.knee_checked() {
            let permeance = eng_pm(m.permeance, err(format!("magnet.{name}.permeance")), "");
            s += &format!(
                "  magnet {name} ({} at {} degC): permeance coefficient {permeance}; its knee is not checked (no hcj given)\n",
                m.grade, m.temperature_c
            );
            continue;
        }
        s += &format!(
            "  magnet {name} ({} at {} degC): margin {} over its worst 1 %, {} past the knee, irreversible loss {}{}\n",
            m.grade,
            m.temperature_c,
            eng_pm(m.margin, err(format!("magnet.{name}.margin")), ""),
            percent_pm(m.share_past_knee, err(format!("magnet.{name}.share_past_knee"))),
            percent_pm(m.irreversible_loss, err(format!("magnet.{name}.loss"))),
            if m.irreversible_loss > study::checks::LOSS_WARNING {
                "  DEMAGNETIZED"
            } else {
                ""
            }
        );
    }
    s
}

/// Each winding's current, resistance, loss and warming.
fn coil_lines(r: &study::Results) -> String {
    let mut s = String::new();
    for (name, c) in &r.coils {
        s += &format!(
            "  coil {name}: {} in {}, {} dissipated, {} in the copper, surface about {} above {} degC (still air; an estimate)\n",
            eng(c.current, "A"),
            eng(c.resistance, "ohm"),
            eng(c.power, "W"),
            eng(c.current_density / 1e6, "A/mm2"),
            eng(c.temperature_rise, "K"),
            study::coil::AMBIENT_C
        );
    }
    s
}

/// Each expectation's verdict.
fn expectation_lines(r: &study::Results) -> String {
    let mut s = String::new();
    for e in &r.expect {
        let unit = r.units.get(&e.value).copied().unwrap_or("");
        s += &format!(
            "  expect {} {}: {} ({}{})\n",
            e.value,
            e.bound,
            e.actual.map_or("-".into(), |a| eng_pm(a, e.error, unit)),
            match e.verdict {
                Verdict::Pass => "pass",
                Verdict::Fail => "FAIL",
                Verdict::Undecided => "UNDECIDED: the bound lies within the value's error",
            },
            e.note.as_ref().map_or(String::new(), |n| format!("; {n}"))
        );
    }
    s
}

/// How the values were refined: the target, the meshes, the worst estimate.
fn accuracy_line(r: &study::Results) -> String {
    let Some(a) = &r.adaptive else {
        return "  accuracy: off (mesh as given, no error estimates)\n".into();
    };
    let state = if a.reached { "reached" } else { "NOT REACHED:" };
    let (target, meshes) = (study::estimate::target_percent(a.target), a.route());
    let field = a
        .energy_norm
        .map_or(String::new(), |e| format!("; the whole field: {:.3} % in the energy norm", 100.0 * e));
    match a.worst() {
        // Every value met the target; an expectation on its bound kept the refinement going.
        Some((worst, which)) if a.undecided_at_target(&r.expect) => format!(
            "  accuracy: {target} % reached by every value after {meshes}, largest estimated error {} % ({which}){field}; an expectation is UNDECIDED at the finest mesh allowed\n",
            study::estimate::percent(worst)
        ),
        Some((worst, which)) => format!(
            "  accuracy: {state} {target} % after {meshes}, largest estimated error {} % ({which}){field}\n",
            study::estimate::percent(worst)
        ),
        None => format!("  accuracy: {state} {target} % after {meshes}, no error estimate (one mesh only)\n"),
    }
}

#[cfg(test)]
mod tests {
    use super::percent_pm;

    #[test]
    fn shares_show_their_error_above_a_hundredth_of_a_percent() {
        assert_eq!(percent_pm(0.5953, Some(0.0011)), "59.53 % \u{b1} 0.11 %");
        assert_eq!(percent_pm(0.003, Some(5e-5)), "0.3 %");
        assert_eq!(percent_pm(0.003, None), "0.3 %");
    }
}
