//! Shared helpers of the validation tests: building problems in code and
//! closed-form reference fields with their sources.

pub mod module_graph;
pub mod peer_problems;
pub mod reference;

use mesher::{build_mesh, Mesh, MeshSpec, OuterBoundary, PartSpec, Refinement, Shape, Symmetry};

/// A mesh spec with the case-file defaults (min angle 28 degrees, grading 1.3).
pub fn spec(symmetry: Symmetry, parts: Vec<(Shape, f64)>, refinements: Vec<Refinement>, outer: OuterBoundary) -> MeshSpec {
    MeshSpec {
        symmetry,
        parts: parts.into_iter().map(|(shape, mesh_size)| PartSpec { shape, mesh_size }).collect(),
        refinements,
        outer,
        min_angle_deg: mesher::DEFAULT_MIN_ANGLE,
        grading: mesher::DEFAULT_GRADING,
        max_triangles: 4_000_000,
    }
}

pub fn mesh(spec: &MeshSpec) -> Mesh {
    build_mesh(spec).expect("test geometry meshes")
}

/// Relative error |a - b| / |b|.
pub fn rel(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs()
}

use solver::{Law, Problem, Solution};

/// One part of a test problem: shape, mesh size, law and current density.
pub struct TestPart {
    pub shape: Shape,
    pub size: f64,
    pub law: Law,
    pub current_density: f64,
}

pub fn magnet(shape: Shape, size: f64, br: [f64; 2]) -> TestPart {
    TestPart {
        shape,
        size,
        law: Law::Magnet {
            recoil_permeability: 1.0,
            br,
            knee: None,
            table: None,
        },
        current_density: 0.0,
    }
}

pub fn linear(shape: Shape, size: f64, mur: f64) -> TestPart {
    TestPart {
        shape,
        size,
        law: Law::Linear { relative_permeability: mur },
        current_density: 0.0,
    }
}

pub fn coil(shape: Shape, size: f64, j: f64) -> TestPart {
    TestPart {
        shape,
        size,
        law: Law::air(),
        current_density: j,
    }
}

/// Meshes and solves, then hands the solution to `f`.
pub fn solve_with<T>(
    symmetry: Symmetry,
    parts: Vec<TestPart>,
    refinements: Vec<Refinement>,
    outer: OuterBoundary,
    applied: [f64; 2],
    f: impl FnOnce(&Solution) -> T,
) -> T {
    solve_with_order(solver::element::ElementOrder::Quadratic, symmetry, parts, refinements, outer, applied, f)
}

/// `solve_with` on elements of the given order.
pub fn solve_with_order<T>(
    order: solver::element::ElementOrder,
    symmetry: Symmetry,
    parts: Vec<TestPart>,
    refinements: Vec<Refinement>,
    outer: OuterBoundary,
    applied: [f64; 2],
    f: impl FnOnce(&Solution) -> T,
) -> T {
    let s = spec(symmetry, parts.iter().map(|p| (p.shape.clone(), p.size)).collect(), refinements, outer);
    let m = mesh(&s);
    let mut problem = Problem::new(
        &m,
        parts.iter().map(|p| p.law.clone()).collect(),
        parts.iter().map(|p| p.current_density).collect(),
    );
    problem.applied_field = applied;
    problem.order = order;
    let sol = solver::solve(&problem, &|_, _| {}).expect("test problem solves");
    assert!(sol.report.converged, "test problem converges");
    f(&sol)
}

/// Meshes once, then solves on that mesh and on `levels - 1` nested
/// refinements of it (each triangle split into four), handing each
/// solution to `f`: nested meshes give clean convergence rates.
pub fn solve_nested<T>(
    order: solver::element::ElementOrder,
    symmetry: Symmetry,
    parts: Vec<TestPart>,
    refinements: Vec<Refinement>,
    levels: usize,
    f: impl Fn(&Solution) -> T,
) -> Vec<T> {
    let s = spec(
        symmetry,
        parts.iter().map(|p| (p.shape.clone(), p.size)).collect(),
        refinements,
        OuterBoundary::Open,
    );
    // Round outlines are followed: their nodes on the circle, their elements curved onto it.
    let circles: Vec<mesher::BoundaryCircle> = parts
        .iter()
        .enumerate()
        .flat_map(|(i, p)| mesher::BoundaryCircle::of_shape(i, &p.shape, p.size))
        .collect();
    let mut m = mesh(&s);
    m.snap_onto(&circles);
    let mut out = Vec::new();
    for level in 0..levels {
        if level > 0 {
            m = m.refined_onto(&circles);
        }
        let mut problem = Problem::new(
            &m,
            parts.iter().map(|p| p.law.clone()).collect(),
            parts.iter().map(|p| p.current_density).collect(),
        );
        problem.order = order;
        let sol = solver::solve(&problem, &|_, _| {}).expect("test problem solves");
        assert!(sol.report.converged, "test problem converges");
        out.push(f(&sol));
    }
    out
}

/// Axis-aligned rectangle.
pub fn rect(x0: f64, y0: f64, x1: f64, y1: f64) -> Shape {
    Shape::Rect { from: [x0, y0], to: [x1, y1] }
}

/// Least-squares slope of log(y) against log(x).
pub fn log_log_slope(x: &[f64], y: &[f64]) -> f64 {
    let lx: Vec<f64> = x.iter().map(|v| v.ln()).collect();
    let ly: Vec<f64> = y.iter().map(|v| v.ln()).collect();
    let n = lx.len() as f64;
    let (mx, my) = (lx.iter().sum::<f64>() / n, ly.iter().sum::<f64>() / n);
    let sxy: f64 = lx.iter().zip(&ly).map(|(a, b)| (a - mx) * (b - my)).sum();
    let sxx: f64 = lx.iter().map(|a| (a - mx).powi(2)).sum();
    sxy / sxx
}

/// Solves a case given as text (written to a temporary file) through the
/// command-line crate, returning the results of its first variant.
pub fn solve_case_text(text: &str, overrides: &[(&str, f64)]) -> study::Results {
    let dir = std::env::temp_dir().join(format!(
        "lodestone-test-{}-{}",
        std::process::id(),
        COUNTER.fetch_add(1, std::sync::atomic::Ordering::SeqCst)
    ));
    std::fs::create_dir_all(&dir).expect("temp dir");
    let path = dir.join("case.toml");
    std::fs::write(&path, text).expect("write case");
    let loaded = lodestone::run::load(&path).unwrap_or_else(|f| panic!("{}", f.message()));
    let over = overrides.iter().map(|(k, v)| (k.to_string(), *v)).collect();
    let variants = lodestone::run::variants(&loaded, &over).unwrap_or_else(|f| panic!("{}", f.message()));
    let progress = lodestone::progress::Progress::new(true);
    let out = lodestone::run::solve_variant(&loaded, &variants[0], &Default::default(), &progress).unwrap_or_else(|f| panic!("{}", f.message()));
    let _ = std::fs::remove_dir_all(&dir);
    out.results
}

static COUNTER: std::sync::atomic::AtomicUsize = std::sync::atomic::AtomicUsize::new(0);

/// Records a validation check for docs/validation.md: when the environment
/// variable LODESTONE_VALIDATION_LOG names a file, appends one JSON line with
/// the check, its source, the tolerance and the measured error (relative).
pub fn record(check: &str, source: &str, tolerance: f64, measured: f64) {
    append_record(serde_json::json!({ "check": check, "source": source, "tolerance": tolerance, "measured": measured }));
}

/// `record` for a value that carries an error estimate: also its estimated
/// relative error, so the table shows the true error, the estimate and
/// their ratio.
pub fn record_estimated(check: &str, source: &str, tolerance: f64, measured: f64, estimated: f64) {
    append_record(serde_json::json!({ "check": check, "source": source, "tolerance": tolerance, "measured": measured, "estimated": estimated }));
}

/// The default `[study] accuracy` (0.1 %), what cases without an accuracy key are held to.
pub const DEFAULT_TARGET: f64 = 1e-3;

/// Holds the value `name` of results `r` to `exact` within the default
/// target and within twice its own error estimate (the estimate at most 20
/// times the true error or below a tenth of the target; `assert_honest`),
/// relative to `scale` (the value itself, or the magnitude it is a part of),
/// and records it for docs/validation.md under `check` with its `source`.
pub fn check_at_default(check: &str, source: &str, r: &study::Results, name: &str, exact: f64, scale: f64) {
    let (v, e) = (r.values[name], r.errors[name]);
    assert_honest(&format!("{check}: {name}"), v, e, exact, scale, DEFAULT_TARGET);
    record_estimated(check, source, DEFAULT_TARGET, (v - exact).abs() / scale, e / scale);
}

/// Asserts what an error estimate claims, for a value with an exact answer:
/// the value within `target` of it (relative to `scale`: the value, or the
/// magnitude of the vector it is a component of), the true error at most
/// twice the estimate, and the estimate at most 20 times the true error or
/// below a tenth of the target.
pub fn assert_honest(what: &str, value: f64, error: f64, exact: f64, scale: f64, target: f64) {
    assert_honest_against(what, value, error, exact, scale, target, 0.0);
}

/// `assert_honest` against a reference known only to `reference` (relative
/// to `scale`): a true error below that is not known, so the estimate is
/// held loose only against the larger of the two.
pub fn assert_honest_against(what: &str, value: f64, error: f64, exact: f64, scale: f64, target: f64, reference: f64) {
    let truth = (value - exact).abs();
    eprintln!(
        "{what}: value {value:.9e} exact {exact:.9e} true {:.2e} estimated {:.2e} ratio {:.2}",
        truth / scale,
        error / scale,
        truth / error
    );
    assert!(
        truth <= target * scale,
        "{what}: true relative error {:.2e} above the target {target:e}",
        truth / scale
    );
    assert!(truth <= 2.0 * error, "{what}: true error {truth:.3e} more than twice the estimate {error:.3e}");
    assert!(
        error <= 20.0 * truth.max(reference * scale) || error <= 0.1 * target * scale,
        "{what}: estimate {error:.3e} more than 20 times the true error {truth:.3e} and above a tenth of the target"
    );
}

/// Appends one record line to the log named by LODESTONE_VALIDATION_LOG, if set.
fn append_record(line: serde_json::Value) {
    let Ok(path) = std::env::var("LODESTONE_VALIDATION_LOG") else { return };
    use std::io::Write;
    // One write of the whole line: tests record from several threads at once, and a line
    // written in pieces could interleave with another's (lines went missing from the table).
    if let Ok(mut f) = std::fs::OpenOptions::new().create(true).append(true).open(path) {
        let _ = f.write_all(format!("{line}\n").as_bytes());
    }
}
pub mod random;
