//! Post-processing of a solved study into the stable results (SI units):
//! probes, forces, fluxes, energy, part statistics and the flat list of
//! scalar values that `[[expect]]` and sweep tables read.

use crate::materials::Material;
use crate::model::{FluxSpec, Model, ProbeShape};
use crate::results::*;
use mesher::Symmetry;
use rayon::prelude::*;
use solver::post::{energy, flux, force};
use solver::Solution;
use std::collections::BTreeMap;

/// Everything about a solved study, with the error estimates of its values
/// (only values that have both an estimate and a value are kept) and the
/// expectations judged within them.
pub fn results_with_errors(model: &Model, sol: &Solution, estimate: crate::estimate::Estimate) -> Results {
    let mut r = estimate.results.unwrap_or_else(|| results(model, sol, 0.0));
    r.errors = estimate.errors;
    r.errors.retain(|k, e| e.is_finite() && r.values.contains_key(k));
    r.expect = evaluate(model, &r.values, &r.errors);
    if let Some(a) = estimate.adaptive.as_ref().filter(|a| !a.reached) {
        let target = crate::estimate::target_percent(a.target);
        let (elements, limit) = (a.steps.last().map_or(0, |s| s.elements), model.mesh.max_elements);
        let undecided: Vec<&str> = r.expect.iter().filter(|e| e.verdict == Verdict::Undecided).map(|e| e.value.as_str()).collect();
        r.warnings.push(match a.worst() {
            // Every value met the target: refinement went on only to decide an expectation.
            Some((e, name)) if a.undecided_at_target(&r.expect) => format!(
                "every value reached the accuracy asked ({target} %; the largest estimated error is {} %, {name}), but the expectation on {} stays undecided: its bound lies within the value's error, and refining to {elements} triangles did not separate them (the next refinement would pass [mesh] max_elements ({limit})); move the design off the bound",
                crate::estimate::percent(e),
                undecided.join(", ")
            ),
            Some((e, name)) => format!(
                "the accuracy asked ({target} %) was not reached: the largest estimated error is {} % ({name}) on {elements} triangles, and the next refinement would pass [mesh] max_elements ({limit}) or the solution did not converge{}",
                crate::estimate::percent(e),
                zero_within_error(&r, name)
            ),
            // One mesh only: there was no second one to compare with.
            None => format!(
                "the accuracy asked ({target} %) was not reached and no value has an error estimate: the first mesh ({elements} triangles) could not be refined without passing [mesh] max_elements ({limit}), or its solution did not converge; raise max_elements or coarsen [mesh] size"
            ),
        });
    }
    r.adaptive = estimate.adaptive;
    r
}

/// The end of the not-reached warning when its worst value is zero within
/// its error: a force between two equal, opposite pulls (a plate midway
/// between two magnets facing with like poles) came out at 1 uN +- 169 uN
/// after four meshes, the pulls' own error, and "11423.704 %" said nothing
/// of why.
fn zero_within_error(r: &Results, name: &str) -> String {
    match (r.values.get(name), r.errors.get(name)) {
        (Some(v), Some(e)) if v.abs() <= *e => format!(
            "; {name} is zero within its error: a value that vanishes (by symmetry, or as two pulls cancel) has no relative error to reach, so read it as zero within its error (an [[expect]] max in its unit can bound it), and give [mesh] max_elements lower to stop sooner"
        ),
        _ => String::new(),
    }
}

/// Everything about a solved study, without error estimates.
pub fn results(model: &Model, sol: &Solution, seconds: f64) -> Results {
    let mesh = sol.problem.mesh;
    let depth = if model.symmetry == Symmetry::Planar { model.depth } else { 1.0 };
    let mut values = BTreeMap::new();
    let corners = crate::lower::SingularCorners::of(model);
    let probes = probe_results(model, sol, &corners, &mut values);
    let forces = force_results(model, sol, depth, &mut values);
    let flux = flux_results(model, sol, depth, &mut values);
    let e = energy::stored_energy(sol);
    let whole = model.whole.as_ref().map_or(1.0, |w| w.factor);
    // Neither a value nor a number where it is unbounded (`net_current`;
    // NaN, null in results.json): the warning below says why.
    let unbounded = crate::net_current::unbounded_energy_warning(model);
    let bounded = if unbounded.is_some() { f64::NAN } else { depth * whole };
    let energy = EnergyResult {
        stored_j: e.stored * bounded,
        coenergy_j: e.coenergy * bounded,
    };
    values.insert("energy".into(), energy.stored_j);
    values.insert("coenergy".into(), energy.coenergy_j);
    let parts = crate::part_fields::part_results(model, sol, &mut values);
    let coils = coil_results(model, &mut values);
    let mut warnings: Vec<String> = unbounded.into_iter().collect();
    let magnets = crate::checks::magnet_results(model, sol, &mut values, &mut warnings);
    let stray = match model.stray_field {
        true => crate::checks::stray_results(model, sol, &mut values),
        false => StrayResult::default(),
    };
    for (name, f) in &forces {
        if f.unreliable {
            warnings.push(format!(
                "force '{name}': the parts touch the outer boundary, so no surface closes around them and the force is not reliable; move the boundary away"
            ));
        }
    }
    warnings.extend(crate::part_fields::saturation_warnings(model, &parts));
    warnings.extend(coils.iter().filter_map(|(name, c)| crate::coil::too_hot(name, c)));
    warnings.extend(coils.iter().filter_map(|(name, c)| {
        let turns = model.parts.iter().find(|p| &p.name == name)?.winding.as_ref()?.turns;
        crate::coil::faint_current(name, turns, c)
    }));
    warnings.extend(crate::part_fields::implausible_curve_warnings(model));
    // With an accuracy the mesh is refined until the estimates meet it, so
    // a first mesh coarse across a thin part is not a warning (it said "2
    // elements across" of a mesh later split four times over).
    if model.accuracy.is_none() {
        warnings.extend(thin_parts(model));
    }
    warnings.extend(modelling_warnings(model, sol));
    warnings.extend(crate::probe_warnings::probe_warnings(model, sol, &corners, &probes));
    warnings.extend(crate::probe_warnings::planar_far_field(model, &probes, stray.reach_axis_m));
    warnings.extend(crate::checks::reach_within_parts(model, &stray));
    warnings.extend(crate::boundary_warnings::mirrored_parts(model));
    warnings.extend(crate::boundary_warnings::near_far_walls(
        model,
        mesher::geometry::bbox(mesh.nodes[..mesh.n_physical].iter().copied()),
    ));
    // Local refinement bisects triangles at their longest edge, which keeps
    // at least half of the first mesh's smallest angle (mesher::bisect):
    // only a smaller angle says the mesher fell short.
    let smallest = mesh.quality().min_angle_deg;
    let (floor, kept) = match model.accuracy {
        Some(_) => (0.5 * model.mesh.min_angle, "half of "),
        None => (model.mesh.min_angle, ""),
    };
    if smallest < floor - MIN_ANGLE_SLACK {
        warnings.push(format!(
            "the mesh's smallest angle is {smallest:.1} deg, below {kept}the {:.1} deg asked (the refinement stops at sharp corners of the outlines and at its element limit); results near such triangles are less accurate",
            model.mesh.min_angle
        ));
    }
    values.retain(|_, v| v.is_finite());
    let mut floors = crate::error_scale::force_floors(&forces, model.symmetry == Symmetry::Planar);
    floors.extend(crate::error_scale::probe_floors(&values));
    let asked = asked(model, &values);
    let units = crate::value_names::value_names(model)
        .into_iter()
        .filter(|v| values.contains_key(&v.name))
        .map(|v| (v.name, v.unit.symbol()))
        .collect();
    let r = &sol.report;
    Results {
        format: "lodestone-results/1",
        study: StudyInfo {
            title: model.title.clone(),
            geometry: if model.symmetry == Symmetry::Planar { "planar" } else { "axisymmetric" },
            temperature_c: model.temperature,
            depth_m: depth,
            parameters: model.params.clone(),
        },
        variant: None,
        mesh: MeshInfo {
            nodes: sol.elements.n_nodes,
            elements: mesh.triangles.len(),
            unknowns: r.n_dofs,
            element_order: sol.elements.order.degree() as u32,
            min_angle_deg: mesh.quality().min_angle_deg,
        },
        solve: SolveInfo {
            converged: r.converged,
            iterations: r.iterations,
            residual: r.residual(),
            residual_history: r.residual_history.clone(),
            factorizations: r.factorizations,
            cg_iterations: r.cg_iterations,
            seconds,
        },
        expect: evaluate(model, &values, &BTreeMap::new()),
        magnets,
        stray,
        coils,
        warnings,
        probes,
        forces,
        flux,
        energy,
        parts,
        values,
        floors,
        errors: BTreeMap::new(),
        adaptive: None,
        asked,
        units,
        cautions: cautions(model),
    }
}

/// Points of a probe, in SI.
pub fn probe_points(shape: &ProbeShape) -> Vec<[f64; 2]> {
    match *shape {
        ProbeShape::Point(p) => vec![p],
        ProbeShape::Line { from, to, points } => (0..points)
            .map(|i| {
                let t = i as f64 / (points - 1) as f64;
                [from[0] + t * (to[0] - from[0]), from[1] + t * (to[1] - from[1])]
            })
            .collect(),
    }
}

/// The field at a point probe: B extracted from a ball around it where it
/// lies in current-free vacuum (`solver::post::extraction`), which converges
/// like an integral; elsewhere B in the element that holds it.
fn point_field(sol: &Solution, x: [f64; 2]) -> Option<solver::PointField> {
    let field = sol.field_at(x)?;
    Some(match solver::post::extraction::extracted_b(sol, x) {
        Some(ex) => solver::PointField {
            b: ex.b,
            h: sol.element_h(ex.element, ex.b),
            part: field.part,
        },
        None => field,
    })
}

fn probe_results(model: &Model, sol: &Solution, corners: &crate::lower::SingularCorners, values: &mut BTreeMap<String, f64>) -> BTreeMap<String, ProbeResult> {
    let mut out = BTreeMap::new();
    let (c0, c1) = if model.symmetry == Symmetry::Planar { ("bx", "by") } else { ("br", "bz") };
    for p in &model.probes {
        let points = probe_points(&p.shape);
        let fields: Vec<_> = match p.shape {
            ProbeShape::Point(x) => vec![point_field(sol, x)],
            // A sample on a corner has no field to report (NaN, as outside
            // the mesh): it would set the line's peak, which then grows with
            // every refinement (a face's line through a magnet's corner:
            // 367 000 triangles, 1.9 T +- 4.8 T).
            ProbeShape::Line { .. } => points
                .par_iter()
                .map(|&x| if corners.part_at(x).is_some() { None } else { point_field(sol, x) })
                .collect(),
        };
        let b: Vec<[f64; 2]> = fields.iter().map(|f| f.map_or([f64::NAN; 2], |f| f.b)).collect();
        let h: Vec<[f64; 2]> = fields.iter().map(|f| f.map_or([f64::NAN; 2], |f| f.h)).collect();
        let bmag: Vec<f64> = b.iter().map(|v| v[0].hypot(v[1])).collect();
        let key = |s: &str| format!("probe.{}.{s}", p.name);
        match p.shape {
            ProbeShape::Point(_) => {
                values.insert(key("b"), bmag[0]);
                values.insert(key(c0), b[0][0]);
                values.insert(key(c1), b[0][1]);
                values.insert(key("h"), h[0][0].hypot(h[0][1]));
            }
            ProbeShape::Line { .. } => {
                let finite: Vec<f64> = bmag.iter().copied().filter(|v| v.is_finite()).collect();
                values.insert(key("b.max"), finite.iter().copied().fold(f64::NAN, f64::max));
                values.insert(key("b.min"), finite.iter().copied().fold(f64::NAN, f64::min));
                values.insert(key("b.mean"), finite.iter().sum::<f64>() / finite.len().max(1) as f64);
            }
        }
        out.insert(p.name.clone(), ProbeResult { points, b, bmag, h });
    }
    out
}

fn force_results(model: &Model, sol: &Solution, depth: f64, values: &mut BTreeMap<String, f64>) -> BTreeMap<String, ForceResult> {
    let mut out = BTreeMap::new();
    for f in &model.forces {
        let r = force::force_on(sol, &f.parts, f.torque_about);
        let (v, t) = to_whole(model, [r.vector[0] * depth, r.vector[1] * depth], r.torque * depth, f.torque_about);
        let planar = model.symmetry == Symmetry::Planar;
        let names = if planar { ["x", "y"] } else { ["r", "z"] };
        values.insert(format!("force.{}.{}", f.name, names[0]), v[0]);
        values.insert(format!("force.{}.{}", f.name, names[1]), v[1]);
        values.insert(format!("force.{}.magnitude", f.name), v[0].hypot(v[1]));
        let torque = planar.then_some(t);
        if let Some(t) = torque {
            values.insert(format!("force.{}.torque", f.name), t);
        }
        out.insert(
            f.name.clone(),
            ForceResult {
                vector: v,
                magnitude: v[0].hypot(v[1]),
                torque,
                contact: r.contact,
                unreliable: r.at_boundary,
                gross: r.gross * depth * model.whole.as_ref().map_or(1.0, |w| w.factor),
            },
        );
    }
    out
}

/// The section's force and torque (about `about`) turned into the whole
/// assembly's when the case asks for it: times the copies; on each symmetry
/// plane the mirrored halves' normal components cancel, and the whole's
/// torque is that of its force acting on the plane (the symmetric stress
/// has no torque about a point of the plane).
fn to_whole(model: &Model, v: [f64; 2], torque: f64, about: [f64; 2]) -> ([f64; 2], f64) {
    let Some(w) = &model.whole else { return (v, torque) };
    let mut f = v.map(|c| c * w.factor);
    if w.mirrors.is_empty() {
        return (f, torque * w.factor);
    }
    let mut arm = [0.0; 2];
    for &(axis, at) in &w.mirrors {
        f[axis] = 0.0;
        arm[axis] = at - about[axis];
    }
    (f, arm[0] * f[1] - arm[1] * f[0])
}

fn flux_results(model: &Model, sol: &Solution, depth: f64, values: &mut BTreeMap<String, f64>) -> BTreeMap<String, FluxResult> {
    let mut out = BTreeMap::new();
    let has_magnets = model.parts.iter().any(|p| matches!(p.material.material, Material::Magnet(_)));
    for (k, f) in model.fluxes.iter().enumerate() {
        let r = match f {
            FluxSpec::Line { from, to, .. } => FluxResult {
                wb: flux::line_flux(sol, *from, *to).unwrap_or(f64::NAN) * depth,
                turns: None,
                inductance_h: None,
                incremental_inductance_h: None,
            },
            FluxSpec::Winding { parts, turns, .. } => {
                let linkage = flux::winding_linkage(sol, parts, *turns) * depth;
                let ampere_turns = model.parts[parts[0].0].current.unwrap_or(0.0).abs();
                let current = ampere_turns / turns;
                let inductance = (current > 0.0 && !has_magnets && sol.problem.applied_field == [0.0, 0.0]).then(|| linkage / current);
                let incremental = (current > 0.0)
                    .then(|| incremental_inductance(sol, k, parts, *turns, linkage / depth, current))
                    .flatten()
                    .map(|l| l * depth);
                FluxResult {
                    wb: linkage,
                    turns: Some(*turns),
                    inductance_h: inductance,
                    incremental_inductance_h: incremental,
                }
            }
        };
        values.insert(format!("flux.{}", f.name()), r.wb);
        if let Some(l) = r.inductance_h {
            values.insert(format!("flux.{}.inductance", f.name()), l);
        }
        if let Some(l) = r.incremental_inductance_h {
            values.insert(format!("flux.{}.incremental_inductance", f.name()), l);
        }
        out.insert(f.name().to_string(), r);
    }
    out
}

/// Parts whose thinnest extent spans fewer than MIN_ELEMENTS_ACROSS elements:
/// the mesh follows their outline, but the field inside is poorly resolved.
fn thin_parts(model: &Model) -> Vec<String> {
    const MIN_ELEMENTS_ACROSS: f64 = 2.0;
    model
        .parts
        .iter()
        .filter_map(|p| {
            let (lo, hi) = p.shape.bounds();
            let thickness = (hi[0] - lo[0]).min(hi[1] - lo[1]);
            (thickness < MIN_ELEMENTS_ACROSS * p.mesh_size).then(|| {
                let f = model.length_unit.1;
                format!(
                    "part '{}' is {} {u} thick but its mesh size is {} {u}: fewer than {MIN_ELEMENTS_ACROSS} elements across; set mesh_size = {} or less for accuracy inside it",
                    p.name,
                    crate::message_number::significant(thickness / f),
                    crate::message_number::significant(p.mesh_size / f),
                    crate::message_number::significant(thickness / f / 3.0),
                    u = model.length_unit.0
                )
            })
        })
        .collect()
}

/// Resistance, current, power, current density and temperature rise of each
/// winding whose wire is given.
fn coil_results(model: &Model, values: &mut BTreeMap<String, f64>) -> BTreeMap<String, crate::coil::CoilFigures> {
    let mut out = BTreeMap::new();
    for p in &model.parts {
        if let Some(c) = crate::coil::figures(model, p) {
            let key = |s: &str| format!("coil.{}.{s}", p.name);
            values.insert(key("resistance"), c.resistance);
            values.insert(key("current"), c.current);
            values.insert(key("power"), c.power);
            values.insert(key("current_density"), c.current_density);
            values.insert(key("temperature_rise"), c.temperature_rise);
            out.insert(p.name.clone(), c);
        }
    }
    out
}

/// The values the case asks for, in its order, that the solution reported.
fn asked(model: &Model, values: &BTreeMap<String, f64>) -> Vec<String> {
    let planar = model.symmetry == Symmetry::Planar;
    let mut out: Vec<String> = model.expects.iter().map(|e| e.value.name.clone()).collect();
    for f in &model.forces {
        out.push(format!("force.{}.{}", f.name, if planar { "y" } else { "z" }));
        out.push(format!("force.{}.magnitude", f.name));
    }
    for f in &model.fluxes {
        out.push(format!("flux.{}", f.name()));
    }
    for p in &model.probes {
        out.push(match p.shape {
            ProbeShape::Point(_) => format!("probe.{}.b", p.name),
            ProbeShape::Line { .. } => format!("probe.{}.b.max", p.name),
        });
    }
    let mut seen = std::collections::BTreeSet::new();
    out.retain(|n| values.contains_key(n) && seen.insert(n.clone()));
    out
}

/// The cautions that fit the study: magnet handling and air transport only
/// where there is a permanent magnet (an electromagnet got them too).
fn cautions(model: &Model) -> Vec<&'static str> {
    let magnets = model.parts.iter().any(|p| matches!(p.material.material, Material::Magnet(_)));
    CAUTIONS
        .iter()
        .copied()
        .filter(|c| magnets || !(c.contains("snap together") || c.contains("air-transport")))
        .collect()
}

/// Share of a magnet that later parts may cover unremarked.
const COVERED_SHARE: f64 = 0.01;

/// Mistakes that give plausible-looking but wrong numbers: a planar study
/// without depth (results per metre: 26 kN for a 50 mm part), a magnet or
/// winding partly covered by a later part (a plate drawn into a magnet cut
/// its pull from 38 N to 9.6 N); the probes' own in `probe_warnings`.
fn modelling_warnings(model: &Model, sol: &Solution) -> Vec<String> {
    let mut out = Vec::new();
    if model.symmetry == Symmetry::Planar && !model.depth_given {
        out.push(
            "planar study without study.depth: forces, fluxes and energies are per metre of depth; give the assembly's length along z as depth".to_string(),
        );
    }
    out.extend(crate::checks::implausible_magnet_sizes(model));
    out.extend(crate::checks::short_depth(model));
    out.extend(crate::checks::radial_to_its_centre(model, |at| sol.field_at(at).and_then(|f| f.part)));
    let meshed = sol.problem.mesh.part_areas_curved(model.parts.len());
    for (i, (p, area)) in model.parts.iter().zip(meshed).enumerate() {
        let source = matches!(p.material.material, Material::Magnet(_)) || p.current.is_some();
        let exact = p.shape.exact_area(model.symmetry);
        let covered = if exact > 0.0 { 1.0 - area / exact } else { 0.0 };
        if source && covered > COVERED_SHARE {
            let later: Vec<String> = model.parts[i + 1..].iter().map(|q| format!("'{}'", q.name)).collect();
            let kind = if p.current.is_some() { "winding" } else { "magnet" };
            out.push(format!(
                "{kind} '{}' is {:.0} % covered by later parts ({}): the covered share is not {kind}; if they should only touch, draw them apart",
                p.name,
                100.0 * covered,
                later.join(", "),
            ));
        }
    }
    out
}

/// How far below the asked smallest angle the mesh may fall unremarked, degrees.
const MIN_ANGLE_SLACK: f64 = 0.5;

/// d(linkage)/dI per metre of depth at the working point: the linkage's
/// change along the field's first-order response to the winding's current
/// (`solver::source_response`: a linear solve with the exact tangent, made
/// at the end of the solve when `winding_current_changes` asked for it;
/// for a linear study without magnets this equals the apparent inductance).
fn incremental_inductance(sol: &Solution, flux: usize, parts: &[(usize, f64)], turns: f64, linkage: f64, current: f64) -> Option<f64> {
    if !needs_response(&sol.problem) {
        return Some(linkage / current);
    }
    // The response is linear in the change: the winding's own current is as good a step as any.
    let after: Vec<f64> = match sol.responses.get(flux).filter(|r| !r.is_empty()) {
        Some(delta) => sol.reduced.iter().zip(delta).map(|(a, d)| a + d).collect(),
        None => {
            let mut doubled = sol.problem.clone();
            for &(i, _) in parts {
                doubled.current_density[i] *= 2.0;
            }
            sol.potential_after_current_change(&doubled).ok()?
        }
    };
    let l2 = flux::winding_linkage(&sol.with_potential(after), parts, turns);
    Some((l2 - linkage) / current)
}

/// Whether a winding's incremental inductance differs from its apparent one
/// and so needs the field's response (saturating steel or magnets).
fn needs_response(problem: &solver::Problem) -> bool {
    problem.is_nonlinear() || problem.laws.iter().any(|l| matches!(l, solver::Law::Magnet { .. }))
}

/// Per flux of the model, in order, the change of current density whose
/// response gives its winding's incremental inductance (the winding's own
/// current density once more), for the solve to make with its last tangent;
/// empty where none is needed.
pub fn winding_current_changes(model: &Model, problem: &solver::Problem) -> Vec<Vec<f64>> {
    let wanted = needs_response(problem);
    model
        .fluxes
        .iter()
        .map(|f| match f {
            FluxSpec::Winding { parts, .. } if wanted => {
                let mut change = vec![0.0; problem.current_density.len()];
                for &(i, _) in parts {
                    change[i] = problem.current_density[i];
                }
                change
            }
            _ => Vec::new(),
        })
        .collect()
}

/// Evaluates every `[[expect]]` against the values, within their errors
/// where estimated.
pub fn evaluate(model: &Model, values: &BTreeMap<String, f64>, errors: &BTreeMap<String, f64>) -> Vec<ExpectResult> {
    model
        .expects
        .iter()
        .filter(|e| e.statistic.is_none())
        .map(|e| {
            let actual = values.get(&e.value.name).copied();
            let error = errors.get(&e.value.name).copied();
            let verdict = match actual {
                None => Verdict::Fail,
                Some(v) => crate::estimate::verdict(&e.bound, v, error.unwrap_or(0.0)),
            };
            let note = match (verdict, actual) {
                (Verdict::Fail, Some(v)) => sign_note(&e.value.name, crate::estimate::verdict(&e.bound, -v, error.unwrap_or(0.0))),
                _ => None,
            };
            ExpectResult {
                value: e.value.name.clone(),
                bound: e.text.clone(),
                actual,
                pass: verdict == Verdict::Pass,
                verdict,
                error,
                note,
            }
        })
        .collect()
}

/// Why a failed bound on a force or torque component may be a sign
/// mistake: the bound holds for the opposite sign (`flipped`). Components
/// are signed along their axis, so a pull towards a magnet below the plate
/// is negative z, and a bound such as ">= 200 N" on it fails however hard it
/// pulls.
fn sign_note(name: &str, flipped: Verdict) -> Option<String> {
    let parts: Vec<&str> = name.split('.').collect();
    let ["force", force, component] = parts.as_slice() else { return None };
    let what = match *component {
        "x" | "y" | "r" | "z" => {
            format!("components are signed (negative {component} points towards -{component}); for the force's size use force.{force}.magnitude")
        }
        "torque" => "torques are signed (positive turns counter-clockwise)".to_string(),
        _ => return None,
    };
    (flipped == Verdict::Pass).then(|| format!("the bound would hold with the opposite sign: {what}"))
}
