//! report.md: the study in tables and pictures, with the cautions.

use super::engineering::{eng, eng_pm, plain_pm};
use crate::case::Model;
use crate::summary::percent_pm;
use std::fmt::Write;
use study::results::Results;

fn opt(v: Option<f64>, scale: f64, digits: usize) -> String {
    v.map_or("-".into(), |x| format!("{:.*}", digits, x * scale))
}

/// report.md's text: the study and its mesh, every value with its error in
/// tables, the warnings and pictures, the stray field and the cautions.
pub fn report(model: &Model, r: &Results, pictures: &[(String, String)]) -> String {
    let mut s = String::new();
    heading(&mut s, model, r);
    accuracy(&mut s, r);
    notices(&mut s, r, pictures);
    forces(&mut s, model, r);
    flux_and_energy(&mut s, r);
    parts(&mut s, r);
    magnets(&mut s, model, r);
    stray_field(&mut s, model, r);
    expectations(&mut s, r);
    let _ = writeln!(s, "## Cautions\n");
    for c in &r.cautions {
        let _ = writeln!(s, "- {c}");
    }
    s
}

/// The title, the study, its mesh and how Newton-Raphson went.
fn heading(s: &mut String, model: &Model, r: &Results) {
    let _ = writeln!(s, "# {}\n", model.title);
    let _ = writeln!(
        s,
        "{} study at {} degC; {} nodes, {} triangles (order {}), {} unknowns, minimum angle {:.1} deg.",
        r.study.geometry, r.study.temperature_c, r.mesh.nodes, r.mesh.elements, r.mesh.element_order, r.mesh.unknowns, r.mesh.min_angle_deg
    );
    let _ = writeln!(
        s,
        "Newton-Raphson: {} in {} iterations ({} factorizations of the tangent), relative residual {:.2e}, {:.2} s.\n",
        if r.solve.converged { "converged" } else { "NOT CONVERGED" },
        r.solve.iterations,
        r.solve.factorizations,
        r.solve.residual,
        r.solve.seconds
    );
}

/// The accuracy asked and reached, and the largest estimated error.
fn accuracy(s: &mut String, r: &Results) {
    match &r.adaptive {
        Some(a) => {
            let worst = match a.worst() {
                Some((e, name)) => format!("largest estimated error {} % ({name})", study::estimate::percent(e)),
                None => "no error estimate (one mesh only)".into(),
            };
            let _ = writeln!(
                s,
                "Accuracy: {} % asked, {} after {}; {worst}. Every value below carries its estimated error (\u{b1}); results.json has them all under `errors`.\n",
                study::estimate::target_percent(a.target),
                if a.reached {
                    "reached"
                } else if a.undecided_at_target(&r.expect) {
                    "reached by every value (an expectation stays undecided at the finest mesh allowed)"
                } else {
                    "NOT reached"
                },
                a.route(),
            );
        }
        None => {
            let _ = writeln!(s, "Accuracy: off (the mesh as given; no error estimates).\n");
        }
    }
}

/// The parameters, the warnings and the pictures, before the tables.
fn notices(s: &mut String, r: &Results, pictures: &[(String, String)]) {
    if !r.study.parameters.is_empty() {
        let p: Vec<String> = r.study.parameters.iter().map(|(k, v)| format!("{k} = {v}")).collect();
        let _ = writeln!(s, "Parameters: {}.\n", p.join(", "));
    }
    if !r.warnings.is_empty() {
        let _ = writeln!(s, "## Warnings\n");
        for w in &r.warnings {
            let _ = writeln!(s, "- {w}");
        }
        s.push('\n');
    }
    for (title, file) in pictures {
        let _ = writeln!(s, "![{title}]({file})\n");
    }
}

/// Each force set's components and magnitude, and what a pull at contact assumes.
fn forces(s: &mut String, model: &Model, r: &Results) {
    if !r.forces.is_empty() {
        let _ = writeln!(s, "## Forces\n\n| set | F1 | F2 | magnitude | note |\n|---|---|---|---|---|");
        for (n, fr) in &r.forces {
            let _ = writeln!(
                s,
                "| {n} | {} | {} | {} | {} |",
                crate::summary::force_component(r, n, fr, 0, model.symmetry),
                crate::summary::force_component(r, n, fr, 1, model.symmetry),
                eng_pm(fr.magnitude, r.errors.get(&format!("force.{n}.magnitude")).copied(), "N"),
                if fr.unreliable {
                    "touches the outer boundary: unreliable"
                } else if fr.contact {
                    "at contact"
                } else {
                    ""
                }
            );
        }
        s.push('\n');
        if r.forces.values().any(|f| f.contact && !f.unreliable) {
            let note = crate::summary::CONTACT_NOTE;
            let _ = writeln!(s, "Note: {}{}.\n", note[..1].to_uppercase(), &note[1..]);
        }
    }
}

/// Fluxes, linkages and inductances, then the stored energy and co-energy.
fn flux_and_energy(s: &mut String, r: &Results) {
    if !r.flux.is_empty() {
        let _ = writeln!(
            s,
            "## Flux\n\n| name | flux or linkage | inductance | incremental inductance |\n|---|---|---|---|"
        );
        let henry = |l: Option<f64>, key: String| l.map_or("-".into(), |l| eng_pm(l, r.errors.get(&key).copied(), "H"));
        for (n, fl) in &r.flux {
            let _ = writeln!(
                s,
                "| {n} | {} | {} | {} |",
                eng_pm(fl.wb, r.errors.get(&format!("flux.{n}")).copied(), "Wb"),
                henry(fl.inductance_h, format!("flux.{n}.inductance")),
                henry(fl.distinct_incremental_inductance(), format!("flux.{n}.incremental_inductance")),
            );
        }
        s.push('\n');
    }
    let _ = writeln!(
        s,
        "Stored energy {}, co-energy {}.\n",
        super::engineering::energy_text(r.energy.stored_j, r.errors.get("energy").copied()),
        super::engineering::energy_text(r.energy.coenergy_j, r.errors.get("coenergy").copied())
    );
}

/// Each part's flux density and saturation.
fn parts(s: &mut String, r: &Results) {
    let err = |name: String| r.errors.get(&name).copied();
    let _ = writeln!(
        s,
        "## Parts\n\n| part | material | peak B (T, local) | mean B | knee (T) | share above knee |\n|---|---|---|---|---|---|"
    );
    for (n, p) in &r.parts {
        let _ = writeln!(
            s,
            "| {n} | {} | {:.3} | {} | {} | {} |",
            p.material,
            p.b_max,
            eng_pm(p.b_mean, err(format!("part.{n}.b.mean")), "T"),
            opt(p.knee_t, 1.0, 2),
            p.saturated_share
                .map_or("-".into(), |x| percent_pm(x, err(format!("part.{n}.saturated_share"))))
        );
    }
    s.push('\n');
}

/// Each magnet's working point against its knee.
fn magnets(s: &mut String, model: &Model, r: &Results) {
    let err = |name: String| r.errors.get(&name).copied();
    if !r.magnets.is_empty() {
        let _ = writeln!(s, "## Magnets at {} degC\n\nThe knee is taken at {:.0} % of HcJ at the study temperature; the margin is 1 - H/H_knee over the most demagnetized 1 % of the volume (0: at the knee; the value at the single worst point, `margin_local` in results.json, follows the mesh at corners and is not judged). The onset is the temperature past which the magnet runs past its knee (above it for NdFeB and SmCo, below it for ferrite, whose coercivity falls as it cools), a linear-model estimate (field scaled with Br, knee with HcJ).\n\n| magnet | grade | Br (T) | HcJ (kA/m) | margin | past knee | permeance | onset (degC) |\n|---|---|---|---|---|---|---|---|", model.temperature, 100.0 * study::checks::KNEE_FRACTION);
        for (n, m) in &r.magnets {
            // A grade without a coercivity has no knee: no HcJ, margin or share.
            let (hcj, margin, past) = if m.knee_checked() {
                (
                    format!("{:.0}", m.hcj_a_per_m / 1e3),
                    eng_pm(m.margin, err(format!("magnet.{n}.margin")), ""),
                    percent_pm(m.share_past_knee, err(format!("magnet.{n}.share_past_knee"))),
                )
            } else {
                ("-".into(), "not checked (no HcJ)".into(), "-".into())
            };
            let _ = writeln!(
                s,
                "| {n} | {} | {:.3} | {hcj} | {margin} | {past} | {} | {} |",
                m.grade,
                m.br_t,
                eng_pm(m.permeance, err(format!("magnet.{n}.permeance")), ""),
                m.knee_onset_c.map_or("-".into(), |c| format!(
                    "past it {} {c:.0}",
                    if m.knee_past_above_onset == Some(false) { "below" } else { "above" }
                ))
            );
        }
        s.push('\n');
    }
}

/// How far the stray field reaches, its moment and the screens it is held to.
fn stray_field(s: &mut String, model: &Model, r: &Results) {
    let err = |name: String| r.errors.get(&name).copied();
    let (u, f) = (&model.length_unit.0, model.length_unit.1);
    let st = &r.stray;
    // A distance in the case's unit, with its error.
    let length = |v: Option<f64>, name: &str| v.map_or("-".into(), |v| plain_pm(v / f, err(name.into()).map(|e| e / f), u));
    let _ = writeln!(s, "## Stray field\n");
    if let Some(c) = st.reference_point_m {
        let _ = writeln!(
            s,
            "Distances are measured from ({}, {}) {u}, the centre of the box around every part, along the axis and in the mid-plane through it.\n",
            c[0] / f,
            c[1] / f
        );
    }
    let from = match (st.reach_from_m, st.reference_point_m) {
        (Some(p), Some(c)) if p != c => format!("from ({}, {}) {u}, the case's reach_from", p[0] / f, p[1] / f),
        _ => "from the reference point".to_string(),
    };
    let _ = writeln!(
        s,
        "- reach along the axis to {} ({}), {from}: {}",
        eng(st.reach_level_t, "T"),
        if st.reach_level_t == study::checks::DEFAULT_REACH_LEVEL {
            "a common rule of thumb for picking up small steel items"
        } else {
            "the case's reach_level"
        },
        length(st.reach_axis_m, "reach.axis")
    );
    if let Some(m) = st.moment_a_m2 {
        let _ = writeln!(
            s,
            "- dipole moment (multipole projection of the solution): {}",
            eng_pm(m, err("stray.moment".into()), "A m2")
        );
        let _ = writeln!(
            s,
            "- |B| falls to 0.5 mT (implanted devices, ICNIRP 2009) at {} on the axis and {} in the mid-plane, from the assembly's centre",
            length(st.implant_distance_axis_m, "stray.implant_distance.axis"),
            length(st.implant_distance_plane_m, "stray.implant_distance.plane")
        );
        let h = |v: Option<f64>, name: &str| v.map_or("-".into(), |v| eng_pm(v, err(name.into()), "A/m"));
        let _ = writeln!(
            s,
            "- |H| at 2.1 m: {}; at 4.6 m: {}",
            h(st.h_at_2100mm_a_per_m, "stray.h_at_2100mm"),
            h(st.h_at_4600mm_a_per_m, "stray.h_at_4600mm")
        );
    }
    if let Some(a) = &st.air_transport {
        let _ = writeln!(s, "- air transport: {a}");
    }
    s.push('\n');
}

/// Each expectation's verdict.
fn expectations(s: &mut String, r: &Results) {
    if !r.expect.is_empty() {
        let _ = writeln!(s, "## Expectations\n\n| value | bound | actual | result |\n|---|---|---|---|");
        for e in &r.expect {
            let _ = writeln!(
                s,
                "| {} | {} | {} | {}{} |",
                e.value,
                e.bound,
                e.actual
                    .map_or("-".into(), |a| eng_pm(a, e.error, r.units.get(&e.value).copied().unwrap_or(""))),
                match e.verdict {
                    study::results::Verdict::Pass => "pass",
                    study::results::Verdict::Fail => "FAIL",
                    study::results::Verdict::Undecided => "UNDECIDED (the bound lies within the error)",
                },
                e.note.as_ref().map_or(String::new(), |n| format!(": {n}"))
            );
        }
        s.push('\n');
    }
}

/// Puts a section into report.md before its cautions, and report.html anew.
pub fn add_section(files: &mut crate::output::FileSet, section: &str) {
    let Some(i) = files.iter().position(|(n, _)| n.as_os_str() == "report.md") else {
        return;
    };
    let md = String::from_utf8_lossy(&files[i].1).into_owned();
    let md = match md.find("## Cautions") {
        Some(at) => format!("{}{section}\n{}", &md[..at], &md[at..]),
        None => format!("{md}\n{section}"),
    };
    let svg = |name: &str| {
        files
            .iter()
            .find(|(n, _)| n.as_os_str() == name)
            .map(|(_, b)| String::from_utf8_lossy(b).into_owned())
    };
    let html = crate::output::html::page(&md, &svg);
    files[i].1 = md.into_bytes();
    if let Some(h) = files.iter_mut().find(|(n, _)| n.as_os_str() == "report.html") {
        h.1 = html.into_bytes();
    }
}
