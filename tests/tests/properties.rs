//! Property tests with fixed seeds: the units and expression parser, the
//! geometry pipeline and the case reader never panic, and valid random
//! geometry always meshes with the mesh invariants.

use lodestone::case::expr;
use mesher::{build_mesh, OuterBoundary, Shape, Symmetry};
use std::collections::BTreeMap;
use validation::random::{mutate, read_case, Rng};
use validation::{rect, spec};

const CASES: usize = 3000;

#[test]
fn expression_parser_never_panics_on_random_text() {
    let mut rng = Rng::new(1);
    let alphabet: Vec<char> = "0123456789.eE+-*/() abgpT%mkA/KdegCOlbfinNG_\u{e9}".chars().collect();
    let params: BTreeMap<String, f64> = [("gap".to_string(), 1.5), ("plate".to_string(), 0.0)].into_iter().collect();
    for _ in 0..20 * CASES {
        let n = rng.below(24);
        let text: String = (0..n).map(|_| *rng.pick(&alphabet)).collect();
        if let Ok(p) = expr::parse(&text, &params) {
            assert!(p.value.is_finite(), "{text:?} gave {}", p.value);
        }
    }
}

/// A random arithmetic expression and its value.
fn random_expr(rng: &mut Rng, depth: u32) -> (String, f64) {
    if depth == 0 || rng.below(3) == 0 {
        let v = (rng.range(0.1, 100.0) * 100.0).round() / 100.0;
        return (format!("{v}"), v);
    }
    let (a, x) = random_expr(rng, depth - 1);
    let (b, y) = random_expr(rng, depth - 1);
    match rng.below(4) {
        0 => (format!("({a} + {b})"), x + y),
        1 => (format!("({a} - {b})"), x - y),
        2 => (format!("{a} * {b}"), x * y),
        _ => (format!("{a} / ({b})"), x / y),
    }
}

#[test]
fn expressions_evaluate_like_arithmetic() {
    let mut rng = Rng::new(2);
    let params = BTreeMap::new();
    for _ in 0..CASES {
        let (text, value) = random_expr(&mut rng, 4);
        let with_unit = format!("{text} mm");
        let got = expr::parse(&with_unit, &params).unwrap_or_else(|e| panic!("{text}: {e:?}"));
        assert!((got.value - value).abs() <= 1e-9 * value.abs().max(1.0), "{text}: {} vs {value}", got.value);
        assert_eq!(got.unit, "mm");
    }
}

#[test]
fn random_polygons_never_panic_the_mesher() {
    let mut rng = Rng::new(3);
    for _ in 0..300 {
        let n = 3 + rng.below(7);
        let pts: Vec<[f64; 2]> = (0..n).map(|_| [rng.range(-0.02, 0.02), rng.range(-0.02, 0.02)]).collect();
        let symmetry = if rng.below(2) == 0 { Symmetry::Planar } else { Symmetry::Axisymmetric };
        let mut s = spec(symmetry, vec![(Shape::Polygon(pts), rng.range(0.002, 0.01))], vec![], OuterBoundary::Open);
        s.max_triangles = 50_000;
        let _ = build_mesh(&s);
    }
}

#[test]
fn valid_random_geometry_meshes_with_the_invariants() {
    let mut rng = Rng::new(4);
    for _ in 0..60 {
        // Up to four non-overlapping rectangles in separate columns, and maybe a disk.
        let mut parts = Vec::new();
        for k in 0..1 + rng.below(4) {
            let x0 = 0.02 * k as f64 + rng.range(0.0, 0.005);
            let (w, h) = (rng.range(0.002, 0.012), rng.range(0.002, 0.02));
            let y0 = rng.range(-0.01, 0.01);
            parts.push((rect(x0, y0, x0 + w, y0 + h), rng.range(0.0008, 0.004)));
        }
        if rng.below(2) == 0 {
            parts.push((
                Shape::Circle {
                    center: [0.09, 0.0],
                    radius: rng.range(0.002, 0.008),
                },
                rng.range(0.0008, 0.003),
            ));
        }
        let s = spec(Symmetry::Planar, parts, vec![], OuterBoundary::Open);
        let m = build_mesh(&s).expect("valid geometry meshes");
        let q = m.quality();
        assert!(q.min_area > 0.0 && q.min_angle_deg >= s.min_angle_deg - 0.5, "{q:?}");
        let areas = m.part_areas(s.parts.len());
        for (p, a) in s.parts.iter().zip(areas) {
            // Exact for rectangles; within the chord bound for a circle.
            let exact = p.shape.exact_area(Symmetry::Planar);
            let bound = match p.shape {
                Shape::Circle { radius, .. } => {
                    let n = mesher::geometry::circle_segments(radius, p.mesh_size) as f64;
                    exact - 0.5 * n * radius * radius * (2.0 * std::f64::consts::PI / n).sin()
                }
                _ => 0.0,
            };
            assert!((a - exact).abs() <= bound * 1.000001 + 1e-12 * exact, "part area {a} vs {exact}");
        }
    }
}

#[test]
fn mutated_cases_never_panic_the_reader() {
    let seeds: Vec<String> = std::fs::read_dir(concat!(env!("CARGO_MANIFEST_DIR"), "/../cases"))
        .unwrap()
        .flatten()
        .filter(|e| e.path().extension().is_some_and(|x| x == "toml"))
        .map(|e| std::fs::read_to_string(e.path()).unwrap())
        .collect();
    let mut rng = Rng::new(5);
    let mut accepted = 0;
    for i in 0..CASES {
        let text = mutate(&seeds[i % seeds.len()], &mut rng);
        if read_case(&text) {
            accepted += 1;
        }
    }
    assert!(accepted > 0 && accepted < CASES, "{accepted} of {CASES} mutated cases accepted");
}
