//! Running one study: mesh, solve and post-process a model. Progress goes
//! to a callback; nothing here prints.

use crate::estimate::{driving, energy_norm, undecided, worst, Estimate, History};
use crate::lower::{self, StudyError};
use crate::materials::Material;
use crate::model::{Exposure, Model, ProbeShape};
use crate::results::Results;
use crate::results::{Adaptive, Step};
use solver::{Problem, Solution};
use std::time::Instant;

/// Stages of a run, reported to the progress callback.
#[derive(Clone, Debug, PartialEq)]
pub enum Stage {
    /// The mesh is being built.
    Meshing,
    /// The mesh is built: its corner nodes and triangles.
    /// The mesh is built.
    Meshed {
        /// corner nodes
        corners: usize,
        /// triangles
        triangles: usize,
    },
    /// A Newton-Raphson iteration finished with this relative residual.
    /// A Newton-Raphson iteration finished.
    Newton {
        /// its number
        iteration: usize,
        /// relative residual after it
        residual: f64,
    },
    /// A refinement step finished with this error estimate.
    Refined {
        /// its number (1 for the first solve that has one to compare with: a coarser mesh's, or the order below's)
        step: usize,
        /// unknowns of its mesh
        unknowns: usize,
        /// its element order
        order: u32,
        /// largest estimated relative error of an asked value
        worst_relative_error: f64,
        /// the value it belongs to
        worst_value: String,
    },
    /// The field is being extracted at many line-probe samples (at least
    /// `MANY_SAMPLES`), which takes a while: each is a weighted mean over a
    /// ball of elements (100 000 samples on an axis took about a minute).
    Sampling {
        /// samples of every line probe together
        samples: usize,
    },
}

/// Line-probe samples from which their extraction is announced (`Stage::Sampling`).
pub const MANY_SAMPLES: usize = 5000;

/// Announces the extraction at the model's line-probe samples when they
/// are many.
fn announce_sampling(model: &Model, progress: &(dyn Fn(Stage) + Sync)) {
    let samples: usize = model
        .probes
        .iter()
        .map(|p| match p.shape {
            ProbeShape::Line { points, .. } => points,
            ProbeShape::Point(_) => 0,
        })
        .sum();
    if samples >= MANY_SAMPLES {
        progress(Stage::Sampling { samples });
    }
}

/// Meshes a model after checking that its probes lie where the mesh reaches.
pub fn mesh(model: &Model) -> Result<mesher::Mesh, StudyError> {
    lower::check_probes_inside(model)?;
    lower::check_sources(model)?;
    let mut mesh = mesher::build_mesh(&lower::mesh_spec(model)).map_err(|e| lower::mesh_error(model, &e))?;
    mesh.follow(&round_parts(model));
    Ok(mesh)
}

/// Solves a model on its mesh.
pub fn solve<'m>(model: &Model, mesh: &'m mesher::Mesh, progress: &(dyn Fn(Stage) + Sync)) -> Result<Solution<'m>, StudyError> {
    Ok(solve_from(model, mesh, FirstGuess::default(), progress)?.field)
}

/// First guesses of the reduced potential at every node (see
/// `solver::prolong`): for the study's own solve and for the exposure
/// solve before it, each carried over from the previous mesh.
#[derive(Default)]
pub struct FirstGuess {
    /// For the study at its own temperature.
    pub field: Option<std::sync::Arc<[f64]>>,
    /// For the exposure (the hot solve that sets the magnets' state).
    pub exposure: Option<std::sync::Arc<[f64]>>,
    /// The study's system structure for this mesh, when made beforehand.
    pub structure: Option<solver::assembly::System>,
}

/// A model solved on one mesh: the field, and the exposure's field when
/// the model has one.
pub struct Solved<'m> {
    /// The field at the study's temperature.
    pub field: Solution<'m>,
    /// The field at the exposure that set the magnets' state.
    pub exposure: Option<Solution<'m>>,
}

/// Solves a model on its mesh from first guesses.
pub fn solve_from<'m>(model: &Model, mesh: &'m mesher::Mesh, guess: FirstGuess, progress: &(dyn Fn(Stage) + Sync)) -> Result<Solved<'m>, StudyError> {
    let mut problem = lower::problem(model, mesh)?;
    problem.initial = guess.field;
    problem.current_changes = crate::post::winding_current_changes(model, &problem);
    progress(Stage::Meshed {
        corners: mesh.n_nodes(),
        triangles: mesh.triangles.len(),
    });
    let exposure = match &model.exposure {
        Some(exposure) => {
            let hot = exposure_field(model, exposure, mesh, guess.exposure, progress)?;
            problem.remanence = Some(solver::post::magnet_check::remaining_shares(&hot).into());
            Some(hot)
        }
        None => None,
    };
    Ok(Solved {
        field: solve_problem(&problem, guess.structure, progress)?,
        exposure,
    })
}

/// Solves a lowered problem (on its system structure when one is given),
/// reporting Newton's progress.
fn solve_problem<'m>(
    problem: &Problem<'m>,
    structure: Option<solver::assembly::System>,
    progress: &(dyn Fn(Stage) + Sync),
) -> Result<Solution<'m>, StudyError> {
    solver::solve_on(problem, structure, &|iteration, residual| progress(Stage::Newton { iteration, residual })).map_err(|e| StudyError {
        message: e.to_string(),
        origin: None,
        help: None,
    })
}

/// The field at the exposure (the model at the exposure's temperature and
/// applied field, on the same mesh), from which every magnet element
/// recoils from the lowest point it reached. The first guess is the
/// previous mesh's exposure field: from zero this knee-bound solve took
/// 10 to 11 Newton steps on every mesh of a thin hot disk.
fn exposure_field<'m>(
    model: &Model,
    exposure: &Exposure,
    mesh: &'m mesher::Mesh,
    guess: Option<std::sync::Arc<[f64]>>,
    progress: &(dyn Fn(Stage) + Sync),
) -> Result<Solution<'m>, StudyError> {
    let mut exposed = model.clone();
    exposed.temperature = exposure.temperature;
    exposed.applied_field = exposure.applied_field;
    exposed.exposure = None;
    let mut problem = lower::problem(&exposed, mesh)?;
    problem.initial = guess;
    let sol = solve_problem(&problem, None, progress)?;
    if !sol.report.converged {
        return Err(StudyError::new(
            "the exposure (study.exposure) did not converge, so the state it leaves in the magnets is unknown".into(),
            None,
        ));
    }
    Ok(sol)
}

/// The share of the squared error indicators whose elements a refinement
/// step after the first splits once more than the rest (the bulk
/// criterion's theta, see `solver::post::error_indicator::bulk_marking`).
const BULK_SHARE: f64 = 0.5;

/// Meshes, solves (refining to the model's accuracy) and post-processes a
/// model: its typed results, with the error of each value.
pub fn run(model: &Model, progress: &(dyn Fn(Stage) + Sync)) -> Result<Results, StudyError> {
    progress(Stage::Meshing);
    let mesh = mesh(model)?;
    solve_to_accuracy(model, mesh, progress, |sol, estimate| crate::post::results_with_errors(model, sol, estimate))
}

/// Element orders from which the first estimate compares a solve with the
/// one of the order below on the same mesh (an order step) rather than
/// with a solve on the uniformly refined mesh: the lower order's error
/// measures the higher one's as a coarser mesh's does, and its solve costs
/// half to a third of the higher order's, not four times it. P1 and P2
/// (a cylinder's axis field, two cylinders' pull) at 0.01 % on quartic
/// elements: 0.20 and 0.88 s by mesh steps, 0.079 and 0.33 s with the
/// order step, with the true errors of P2's pulls within 1.6 to 1.9
/// times below their estimates (docs/measurement-log.md).
pub const ORDER_STEP_FROM: u32 = 3;

/// Whether the order step's estimate holds for every value the model
/// reports: no element-wise data, no statistics over the working points
/// of knees and B-H curves, and only values held to exact answers asked
/// for. The cases that pass are linear and ideal (magnets without a knee
/// to reach, linear materials, windings), as P1 and P2 are; every other
/// takes mesh steps at its order.
fn order_step_is_trusted(model: &Model, mesh: &mesher::Mesh) -> bool {
    is_linear_and_ideal(model) && asks_only_integrals_and_points(model, |at| in_air(mesh, at))
}

/// `order_step_is_trusted` before the mesh exists, for choosing the
/// element order: point probes must lie clear of every part's box (a
/// probe in a ring's hole is in air, but only the mesh can tell). Whatever
/// passes here passes on the mesh too.
pub fn order_step_is_trusted_unmeshed(model: &Model) -> bool {
    is_linear_and_ideal(model) && asks_only_integrals_and_points(model, |at| lower::box_clearance(model, at) > 0.0)
}

/// Linear materials, magnets without a knee to reach and no data set per
/// element: what the order step's estimate was held to exact answers on.
fn is_linear_and_ideal(model: &Model) -> bool {
    !has_elementwise_data(model) && !has_working_point_statistics(model)
}

/// Whether the model reports shares and percentiles of its quadrature
/// points' working points that can change: a magnet with a knee (its
/// margin over the worst 1 % of its volume, the share past the knee) or a
/// steel on a B-H curve (its saturated share). Each order samples the
/// field at its own quadrature points, so the change from one order to the
/// next is no measure of their error: on a linear coupling at 0.01 %,
/// against its own 0.001 % run, a magnet's local margin came out 1.4e-2
/// off under an estimate of 1.1e-3, and the cup of a chamfered pole piece
/// gave a margin 9.6e-4 off under 1.7e-4 (docs/measurement-log.md).
fn has_working_point_statistics(model: &Model) -> bool {
    model.parts.iter().any(|p| match &p.material.material {
        Material::Soft { .. } => true,
        Material::Magnet(grade) => grade.hcj.is_finite() || grade.intrinsic.is_some(),
        _ => false,
    })
}

/// Whether the model holds data that are constant per element and so
/// change only with the mesh: radially magnetized parts (each element's
/// remanence along its centroid's radius) and an exposure (each magnet
/// element's remaining share of its remanence). An order step on one mesh
/// cannot see their error: a radially magnetized half ring's field came
/// out 1.4e-4 off under an estimate of 1.6e-6 (docs/measurement-log.md).
fn has_elementwise_data(model: &Model) -> bool {
    model.exposure.is_some() || model.parts.iter().any(|p| p.radial.is_some())
}

/// Whether every value the case asks for is one the order step was held
/// to exact answers on: forces, torques, fluxes, energies and the field at
/// points in air, as `in_air` tells (extracted from a ball, it converges as an integral;
/// tests/tests/order_step.rs). A field the element gives where it lies (a
/// line probe, a point inside a part) is not: on a cup magnet at 0.01 %
/// the peak of an axis line probe changed by 1.8e-4 from cubic to quartic
/// while its quartic error was 8.9e-4 (a mesh step then changed it by
/// 8.5e-4; docs/measurement-log.md). Such cases take mesh steps only.
fn asks_only_integrals_and_points(model: &Model, in_air: impl Fn([f64; 2]) -> bool) -> bool {
    let points_in_air = model.probes.iter().all(|p| match p.shape {
        ProbeShape::Point(at) => in_air(at),
        ProbeShape::Line { .. } => false,
    });
    let expectations = model.expects.iter().all(|e| {
        let name = &e.value.name;
        name.starts_with("probe.") || crate::estimate::is_integral(name)
    });
    points_in_air && expectations
}

/// Whether `at` lies in air: inside (or on the edge of) some triangle, and
/// only of air triangles (a point on a part's outline counts as the part's).
fn in_air(mesh: &mesher::Mesh, at: [f64; 2]) -> bool {
    let mut holding = mesh.triangles.iter().enumerate().filter(|(t, _)| {
        let lam = solver::element_map::barycentric(&mesh.triangle_points(*t), at);
        lam.iter().all(|&l| l >= -1e-9)
    });
    let Some((first, _)) = holding.next() else { return false };
    mesh.regions[first] == mesher::Region::Air && holding.all(|(t, _)| mesh.regions[t] == mesher::Region::Air)
}

/// What is made on the other core while a mesh is solved: the mesh the
/// next step solves and the structure of its system.
#[derive(Clone, Copy, PartialEq, Eq)]
enum Ahead {
    /// Nothing (a later step, whose successor depends on its solution).
    Nothing,
    /// The uniform refinement of this mesh, at this order.
    Refined(solver::element::ElementOrder),
    /// This mesh again, at a higher order.
    Raised(solver::element::ElementOrder),
}

/// Meshes and solves the model, refining until its accuracy is reached
/// (or solving the mesh as given when accuracy is off), then hands the
/// last solution and the error estimates to `finish`.
pub fn solve_to_accuracy<R>(
    model: &Model,
    first: mesher::Mesh,
    progress: &(dyn Fn(Stage) + Sync),
    finish: impl FnOnce(&Solution, Estimate) -> R,
) -> Result<R, StudyError> {
    let Some(target) = model.accuracy else {
        let sol = solve(model, &first, progress)?;
        announce_sampling(model, progress);
        return Ok(finish(&sol, Estimate::default()));
    };
    let mut mesh = first;
    let round = round_parts(model);
    mesh.snap_onto(&round);
    // The model as solved at each step: its order is one below the case's
    // until the order step.
    let mut current = model.clone();
    if model.mesh.order >= ORDER_STEP_FROM && order_step_is_trusted(model, &mesh) {
        current.mesh.order = model.mesh.order - 1;
    }
    let mut history = History::new(current.mesh.order, target);
    let mut steps = Vec::new();
    let mut guess = FirstGuess::default();
    let pilots = model.mesh.pilot_meshes as usize;
    loop {
        let start = Instant::now();
        let mut raise = current.mesh.order < model.mesh.order && steps.len() == pilots;
        let pair = raise && pilots == 0 && model.exposure.is_none() && elements(&mesh) <= ORDER_PAIR_MAX_ELEMENTS;
        let (sol, exposure, results, mut mesh_ahead, structure_ahead) = if pair {
            // Both orders at once on the two cores, the lower order's values
            // entered first: this step is then the higher order's.
            let (lower, sol, results) = solve_order_pair(&current, model, &mesh, progress)?;
            history.update(&lower.values, &lower.floors, lower.unknowns);
            steps.push(lower.step(mesh.triangles.len(), current.mesh.order));
            current.mesh.order = model.mesh.order;
            history.raise_order(current.mesh.order);
            raise = false;
            (sol, None, results, None, None)
        } else {
            let ahead = if raise {
                Ahead::Raised(lower::element_order(model))
            } else if steps.is_empty() && 4 * elements(&mesh) <= model.mesh.max_elements {
                Ahead::Refined(lower::element_order(&current))
            } else {
                Ahead::Nothing
            };
            let (solved, ahead) = solve_looking_ahead(&current, &mesh, std::mem::take(&mut guess), ahead, &round, progress);
            let (mesh_ahead, structure_ahead) = ahead.map_or((None, None), |(m, s)| (Some(m), s));
            let Solved { field: sol, exposure } = solved?;
            announce_sampling(model, progress);
            let results = crate::post::results(&current, &sol, 0.0);
            (sol, exposure, results, mesh_ahead, structure_ahead)
        };
        // Pilot meshes (a hand-set first mesh far coarser than the
        // default) are refined before any value's change is trusted.
        let first_step = steps.len() <= pilots;
        if steps.len() >= pilots {
            history.update(&results.values, &results.floors, sol.report.n_dofs);
        }
        let names = driving(model, &results);
        let (rel, name) = worst(&names, &results.values, &results.floors, &history.estimate);
        steps.push(Step {
            elements: mesh.triangles.len(),
            unknowns: sol.report.n_dofs,
            order: current.mesh.order,
            worst_relative_error: (!first_step).then_some(rel),
            worst_value: (!first_step).then(|| name.clone()),
            seconds: start.elapsed().as_secs_f64(),
        });
        let reached = !first_step && rel <= target && !undecided(model, &results.values, &history.estimate);
        if !first_step {
            progress(Stage::Refined {
                step: steps.len() - 1,
                unknowns: sol.report.n_dofs,
                order: current.mesh.order,
                worst_relative_error: rel,
                worst_value: name,
            });
        }
        // Four times the triangles at least: a mesh past the limit is not even built.
        let room = raise || 4 * elements(&mesh) <= model.mesh.max_elements;
        let next = (!reached && sol.report.converged && room)
            .then(|| {
                mesh_ahead.take().unwrap_or_else(|| {
                    if raise {
                        mesh.clone()
                    } else {
                        // Meshes, not solves: the first mesh step after an order step is uniform, as the second mesh is without one.
                        next_mesh(&mesh, &sol, crate::results::meshes_solved(&steps).saturating_sub(pilots), &round)
                    }
                })
            })
            .filter(|next| elements(next) <= model.mesh.max_elements);
        let Some(next) = next else {
            let estimate = Estimate {
                errors: history.estimate.clone(),
                adaptive: Some(Adaptive {
                    target,
                    reached,
                    steps,
                    energy_norm: energy_norm(&results.values, &history.estimate),
                }),
                results: Some(results),
            };
            return Ok(finish(&sol, estimate));
        };
        if raise {
            current.mesh.order = model.mesh.order;
            history.raise_order(current.mesh.order);
        }
        if sol.problem.is_nonlinear() || exposure.is_some() {
            // The element table of the structure made ahead is the next mesh's (it was built a second time here).
            let order = lower::element_order(&current);
            let built;
            let fine = match &structure_ahead {
                Some(structure) if structure.fits(&next, order) => &structure.elements,
                _ => {
                    built = solver::space::Elements::from_mesh(&next, order);
                    &built
                }
            };
            guess = FirstGuess {
                field: prolonged(&sol, fine),
                exposure: exposure.as_ref().and_then(|hot| prolonged(hot, fine)),
                structure: None,
            };
        }
        guess.structure = structure_ahead;
        drop((sol, exposure));
        mesh = next;
    }
}

/// Solves the model on `mesh` while the other core makes what `ahead`
/// asks for: the next mesh (this one refined, or this one again for an
/// order step) and its system structure, when the next step does not
/// depend on this solution (the structure of the second mesh was a fifth
/// of its step, and a small mesh's factorization runs on one core).
#[allow(clippy::type_complexity)]
fn solve_looking_ahead<'m>(
    model: &Model,
    mesh: &'m mesher::Mesh,
    guess: FirstGuess,
    ahead: Ahead,
    round: &[mesher::BoundaryCircle],
    progress: &(dyn Fn(Stage) + Sync),
) -> (Result<Solved<'m>, StudyError>, Option<(mesher::Mesh, Option<solver::assembly::System>)>) {
    let (next, order) = match ahead {
        Ahead::Nothing => return (solve_from(model, mesh, guess, progress), None),
        Ahead::Refined(order) => (None, order),
        Ahead::Raised(order) => (Some(mesh), order),
    };
    let (solved, ahead) = rayon::join(
        || solve_from(model, mesh, guess, progress),
        || {
            let next = next.cloned().unwrap_or_else(|| mesh.refined_onto(round));
            let structure = solver::assembly::System::new(&next, order).ok();
            (next, structure)
        },
    );
    (solved, Some(ahead))
}

/// First meshes up to this many triangles (the exterior's included) solve
/// both orders of the order step at once, one on each core: on small
/// meshes a solve and its post-processing are a few milliseconds of work
/// that two cores share poorly (P1 at 0.1 %, 957 triangles: the cubic
/// solve 17 to 22 ms and its values 11 ms, then the quartic one 14 ms and
/// 12 ms, one after the other); above it the two systems held at once
/// would cost memory that one solve after the other does not.
const ORDER_PAIR_MAX_ELEMENTS: usize = 50_000;

/// The lower order's solve of an order pair: what the estimate needs of it.
struct LowerOrder {
    values: std::collections::BTreeMap<String, f64>,
    floors: std::collections::BTreeMap<String, f64>,
    unknowns: usize,
    seconds: f64,
}

impl LowerOrder {
    /// Its step record (no estimate: there is nothing before it to compare with).
    fn step(&self, elements: usize, order: u32) -> Step {
        Step {
            elements,
            unknowns: self.unknowns,
            order,
            worst_relative_error: None,
            worst_value: None,
            seconds: self.seconds,
        }
    }
}

/// Solves and post-processes `lower` (the model at the order below) and
/// `model` on the same mesh at once, one on each core: the higher order's
/// solution and results, and the lower order's values. Only for studies
/// without an exposure, whose solves need no first guess.
#[allow(clippy::type_complexity)]
fn solve_order_pair<'m>(
    lower: &Model,
    model: &Model,
    mesh: &'m mesher::Mesh,
    progress: &(dyn Fn(Stage) + Sync),
) -> Result<(LowerOrder, Solution<'m>, Results), StudyError> {
    let solved_and_post = |m: &Model| -> Result<(Solution<'m>, Results, f64), StudyError> {
        let start = Instant::now();
        let sol = solve_from(m, mesh, FirstGuess::default(), progress)?.field;
        let results = crate::post::results(m, &sol, 0.0);
        Ok((sol, results, start.elapsed().as_secs_f64()))
    };
    let (lo, hi) = rayon::join(|| solved_and_post(lower), || solved_and_post(model));
    let ((lo_sol, lo_results, lo_seconds), (sol, results, _)) = (lo?, hi?);
    let lower = LowerOrder {
        values: lo_results.values,
        floors: lo_results.floors,
        unknowns: lo_sol.report.n_dofs,
        seconds: lo_seconds,
    };
    Ok((lower, sol, results))
}

/// A nonlinear solution carried onto the next (nested) mesh as Newton's
/// first guess there; None for a linear one, which needs no guess.
fn prolonged(sol: &Solution, fine: &solver::space::Elements) -> Option<std::sync::Arc<[f64]>> {
    if !sol.problem.is_nonlinear() {
        return None;
    }
    solver::prolong::to_refined(sol, fine)
        .or_else(|| solver::prolong::to_nested(sol, fine))
        .map(std::sync::Arc::from)
}

/// Triangles of a mesh, the exterior's included (what `max_elements` counts).
fn elements(mesh: &mesher::Mesh) -> usize {
    mesh.triangles.len() + mesh.exterior.as_ref().map_or(0, |d| d.triangles.len())
}

/// The mesh after `mesh` (the `steps`-th solved): every triangle split into
/// four; from the third mesh on, the triangles holding half the squared
/// error indicators split into four by bisection first (the singular
/// corners refined twice as fast; every element still at least halved, so
/// the change between the meshes measures the whole error).
fn next_mesh(mesh: &mesher::Mesh, sol: &Solution, steps: usize, round: &[mesher::BoundaryCircle]) -> mesher::Mesh {
    if steps < 2 {
        return mesh.refined_onto(round);
    }
    let eta = solver::post::error_indicator::element_indicators(sol);
    let splits: Vec<mesher::Split> = solver::post::error_indicator::bulk_marking(&eta, BULK_SHARE)
        .into_iter()
        .map(|m| if m { mesher::Split::Quarter } else { mesher::Split::Keep })
        .collect();
    mesh.bisected(&splits, round).refined_onto(round)
}

/// The parts whose outline is a circle, for refinement to follow.
fn round_parts(model: &Model) -> Vec<mesher::BoundaryCircle> {
    model
        .parts
        .iter()
        .enumerate()
        .flat_map(|(part, p)| mesher::BoundaryCircle::of_shape(part, &p.shape, p.mesh_size))
        .collect()
}
