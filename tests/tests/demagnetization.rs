//! Magnets past their knee: the nonlinear intrinsic curve inside Newton,
//! irreversible loss after an exposure, and the design checks built on them.

use validation::reference::MU0;
use validation::{check_at_default, solve_case_text};

/// The user grade of the closed-form checks: Br 1.2 T, HcJ 800 kA/m,
/// recoil permeability 1.05, squareness 0.95.
const GRADE: (f64, f64, f64, f64) = (1.2, 800e3, 1.05, 0.95);

/// J(H) of the grade by the same linear-plus-tanh law the solver uses,
/// written out again here from its definition (docs/methods.md): a second
/// implementation, so a slip in either shows.
fn major_j(h: f64) -> f64 {
    let (br, hcj, mu, q) = GRADE;
    let chi = (mu - 1.0) * MU0;
    let w = (1.0 - q) * hcj / 0.9f64.atanh();
    chi * (h + hcj) + (br - chi * hcj) * ((h + hcj) / w).tanh()
}

/// The root of f on [lo, hi] (f rising), by bisection.
fn root(f: impl Fn(f64) -> f64, mut lo: f64, mut hi: f64) -> f64 {
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if f(mid) > 0.0 {
            hi = mid;
        } else {
            lo = mid;
        }
    }
    0.5 * (lo + hi)
}

/// A long round magnet magnetized across its axis (a planar circle), in a
/// uniform applied field `applied` (T, along the magnetization), optionally
/// after an exposure to `exposed` (T). Returns the case text.
fn round_magnet(applied: f64, exposed: Option<f64>) -> String {
    let (br, hcj, mu, q) = GRADE;
    let exposure = exposed.map_or(String::new(), |b| format!("exposure = {{ applied_field = [\"0 T\", \"{b} T\"] }}\n"));
    format!(
        r#"
[study]
title = "round magnet in a uniform field"
geometry = "planar"
unit = "mm"
applied_field = ["0 T", "{applied} T"]
allow = ["demagnetization"]
{exposure}
[materials.grade]
br = "{br} T"
hcj = "{} kA/m"
mur = {mu}
squareness = {q}
description = "closed-form check grade"

[output]
vtk = false
plots = false
report = false

[[part]]
name = "magnet"
material = "grade"
magnetization = "+y"
circle = {{ center = [0, 0], radius = 5 }}

[[probe]]
name = "centre"
point = [0, 0]
"#,
        hcj / 1e3
    )
}

/// Source: inside a uniformly magnetized circular cylinder (magnetized
/// across its axis) the field is uniform, H = H_applied - M/2 (the
/// demagnetizing factor of an infinite cylinder across its axis is 1/2:
/// J. A. Osborn, Phys. Rev. 67, 1945, the limit of a long spheroid; also
/// Jackson, Classical Electrodynamics, 3rd ed., problem 5.21 for the 2D
/// form). A uniform state solves the nonlinear problem too, so with
/// J = J(H): H = B_a/mu0 - J(H)/(2 mu0), and B = mu0 H + J(H) at the centre.
#[test]
fn a_round_magnet_driven_into_its_knee_follows_its_load_line() {
    for applied in [0.0, -0.3, -0.5] {
        let r = solve_case_text(&round_magnet(applied, None), &[]);
        let h = root(|h| h - applied / MU0 + major_j(h) / (2.0 * MU0), -3e6, 1e6);
        let exact = MU0 * h + major_j(h);
        let b = r.values["probe.centre.by"];
        // Against Br: B itself passes near zero as the field grows.
        let e = (b - exact).abs() / GRADE.0;
        eprintln!("applied {applied} T: H {h:.0} A/m, B {b:.6} T against {exact:.6} T, error {e:.2e}");
        check_at_default(
            &format!("round magnet on its load line at default settings, within its error, applied {applied} T"),
            "uniform state, demagnetizing factor 1/2 (Osborn 1945); error relative to Br",
            &r,
            "probe.centre.by",
            exact,
            GRADE.0,
        );
        let loss_expected = 1.0 - (major_j(h) - (GRADE.2 - 1.0) * MU0 * h) / GRADE.0;
        let loss = r.values["magnet.magnet.loss"];
        assert!((loss - loss_expected).abs() < 0.001, "applied {applied} T: loss {loss} against {loss_expected}");
    }
}

/// After an opposing field drives the magnet into its knee and is removed,
/// the magnet recoils from the lowest point it reached: J = f Br + chi mu0 H
/// with f = (J(H_e) - chi mu0 H_e) / Br, and in zero field
/// H = -J/(2 mu0). Same closed form as above, on the recoil line.
#[test]
fn an_exposure_leaves_the_magnet_on_its_recoil_line() {
    let (br, _, mu, _) = GRADE;
    let chi = (mu - 1.0) * MU0;
    let exposed = -0.5;
    let he = root(|h| h - exposed / MU0 + major_j(h) / (2.0 * MU0), -3e6, 1e6);
    let f = (major_j(he) - chi * he) / br;
    assert!(f < 0.97 && f > 0.5, "the exposure should take a few % to a half of Br: {f}");
    let recoil = |h: f64| major_j(h).min(f * br + chi * h);
    let h = root(|h| h + recoil(h) / (2.0 * MU0), -3e6, 1e6);
    let exact = MU0 * h + recoil(h);
    let r = solve_case_text(&round_magnet(0.0, Some(exposed)), &[]);
    let b = r.values["probe.centre.by"];
    let e = (b - exact).abs() / GRADE.0;
    eprintln!(
        "after {exposed} T: share kept {f:.4}, B {b:.6} T against {exact:.6} T, error {e:.2e}, loss {}",
        r.values["magnet.magnet.loss"]
    );
    check_at_default(
        "round magnet after an opposing field, at default settings, within its error",
        "recoil line from the lowest point (closed form); error relative to Br",
        &r,
        "probe.centre.by",
        exact,
        br,
    );
    let loss = r.values["magnet.magnet.loss"];
    assert!((loss - (1.0 - f)).abs() < 0.001, "loss {loss} against {}", 1.0 - f);
    assert!(r.warnings.iter().any(|w| w.contains("irreversibly")), "{:?}", r.warnings);
    // Without the exposure the same magnet keeps its flux.
    let fresh = solve_case_text(&round_magnet(0.0, None), &[]);
    assert!(fresh.values["magnet.magnet.loss"] < 1e-3);
    assert!(fresh.values["probe.centre.by"] > b);
}

fn cylinder(diameter_mm: f64, length_mm: f64, celsius: f64) -> String {
    format!(
        r#"
[study]
geometry = "axisymmetric"
unit = "mm"
temperature = "{celsius} degC"

[output]
vtk = false
plots = false
report = false

[[part]]
name = "magnet"
material = "N42"
magnetization = "+z"
rect = {{ from = [0, 0], to = [{}, {length_mm}] }}

[[probe]]
name = "front"
point = [0, {}]
"#,
        diameter_mm / 2.0,
        length_mm + 5.0
    )
}

/// A thin N42 disk (10 mm across, 2 mm thick) at 150 degC, far past the
/// 80 degC its class is rated for (common practice: N-class NdFeB is rated
/// to 80 degC at a permeance coefficient near 2; this disk's is about 0.4),
/// loses flux for good, and says so; the same grade as a 10 x 10 mm
/// cylinder at 20 degC loses nothing and warns of nothing.
#[test]
fn a_hot_thin_disk_is_demagnetized_and_a_cool_cylinder_is_not() {
    let hot = solve_case_text(&cylinder(10.0, 2.0, 150.0), &[]);
    let loss = hot.values["magnet.magnet.loss"];
    assert!(loss > 0.01, "hot disk: loss {loss}");
    assert!(hot.warnings.iter().any(|w| w.contains("irreversibly")), "{:?}", hot.warnings);
    let cool = solve_case_text(&cylinder(10.0, 10.0, 20.0), &[]);
    assert!(
        cool.values["magnet.magnet.loss"] < 1e-4,
        "cool cylinder: loss {}",
        cool.values["magnet.magnet.loss"]
    );
    assert!(cool.values["magnet.magnet.margin"] > 0.0);
    assert!(!cool.warnings.iter().any(|w| w.contains("magnet 'magnet'")), "{:?}", cool.warnings);
}

/// The intrinsic curve of an N35-class sintered NdFeB at 20 degC, read from
/// a maker's data sheet (BOMATEC BMN-35, digitised: S56 in
/// docs/materials.md), as a user would type it: [H kA/m, J T].
const MEASURED: &[[f64; 2]] = &[
    [-959.7, 0.0],
    [-959.3, 0.4],
    [-955.8, 0.8],
    [-951.6, 0.9],
    [-944.6, 1.0],
    [-939.2, 1.05],
    [-929.9, 1.1],
    [-920.0, 1.131],
    [-900.0, 1.157],
    [-880.0, 1.167],
    [-800.0, 1.176],
    [-500.0, 1.195],
    [0.0, 1.219],
];

/// Same closed form as above with a user's tabulated curve: the case gives
/// `jh`, and the load line H = B_a/mu0 - J(H)/(2 mu0) is solved here with
/// the same monotone interpolation of the table (its own unit tests check
/// it), so what is tested is the solve: H(B) inverted inside Newton, the
/// field, and the loss.
#[test]
fn a_tabulated_intrinsic_curve_is_followed_into_its_knee() {
    let points: Vec<[f64; 2]> = MEASURED.iter().map(|p| [p[0] * 1e3, p[1]]).collect();
    let table = solver::intrinsic_table::IntrinsicTable::new(&points, 0.043 * MU0).unwrap();
    let rows: Vec<String> = MEASURED.iter().map(|p| format!("[{}, {}]", p[0] * 1e3, p[1])).collect();
    for applied in [0.0, -0.6] {
        let text = replace_grade(&round_magnet(applied, None), &format!("jh = [{}]\nmur = 1.043\n", rows.join(", ")));
        let r = solve_case_text(&text, &[]);
        let j = |h: f64| table.j(h).0;
        let h = root(|h| h - applied / MU0 + j(h) / (2.0 * MU0), -3e6, 1e6);
        let exact = MU0 * h + j(h);
        let b = r.values["probe.centre.by"];
        let e = (b - exact).abs() / 1.219;
        eprintln!("table, applied {applied} T: H {h:.0} A/m, B {b:.6} T against {exact:.6} T, error {e:.2e}");
        check_at_default(
            &format!("tabulated curve on its load line at default settings, within its error, applied {applied} T"),
            "uniform state, demagnetizing factor 1/2 (Osborn 1945); error relative to Br",
            &r,
            "probe.centre.by",
            exact,
            1.219,
        );
        let loss = r.values["magnet.magnet.loss"];
        // The share kept never exceeds 1 (this table is a little flatter than its recoil slope near 0).
        let expected = (1.0 - (j(h) - 0.043 * MU0 * h) / j(0.0)).max(0.0);
        assert!((loss - expected).abs() < 0.001, "applied {applied} T: loss {loss} against {expected}");
    }
}

/// The case text with the `[materials.grade]` keys replaced by `keys`.
fn replace_grade(text: &str, keys: &str) -> String {
    let start = text.find("[materials.grade]\n").unwrap() + "[materials.grade]\n".len();
    let end = text[start..].find("description").unwrap() + start;
    format!("{}{keys}{}", &text[..start], &text[end..])
}
