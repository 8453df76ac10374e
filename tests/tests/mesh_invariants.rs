//! Mesh invariants on a dozen geometries, touching and nested parts among
//! them: positive areas, areas that add up, tags that match the shapes, the
//! angle bound, the size bound, and determinism.

use mesher::geometry::{circle_segments, point_in_polygon};
use mesher::{build_mesh, Mesh, MeshSpec, OuterBoundary, Region, Shape, Symmetry};
use validation::{rect, spec};

fn circle(c: [f64; 2], r: f64) -> Shape {
    Shape::Circle { center: c, radius: r }
}

/// The geometries: (name, spec).
fn geometries() -> Vec<(&'static str, MeshSpec)> {
    let axi = Symmetry::Axisymmetric;
    let pl = Symmetry::Planar;
    let open = || OuterBoundary::Open;
    let boxed = || OuterBoundary::FluxParallel {
        from_to: None,
        sides: Default::default(),
    };
    vec![
        (
            "single rect, axisymmetric",
            spec(axi, vec![(rect(0.0, 0.0, 0.01, 0.005), 0.001)], vec![], open()),
        ),
        (
            "touching stack",
            spec(
                axi,
                vec![(rect(0.0, 0.0, 0.01, 0.005), 0.001), (rect(0.0, 0.005, 0.02, 0.008), 0.0015)],
                vec![],
                open(),
            ),
        ),
        (
            "nested rects",
            spec(
                pl,
                vec![(rect(-0.02, -0.02, 0.02, 0.02), 0.003), (rect(-0.005, -0.005, 0.005, 0.005), 0.001)],
                vec![],
                open(),
            ),
        ),
        (
            "overlapping rects",
            spec(
                pl,
                vec![(rect(0.0, 0.0, 0.02, 0.01), 0.002), (rect(0.01, 0.005, 0.03, 0.02), 0.002)],
                vec![],
                boxed(),
            ),
        ),
        (
            "pot magnet",
            spec(
                axi,
                vec![
                    (
                        Shape::Polygon(vec![[0.0, -0.005], [0.02, -0.005], [0.02, 0.01], [0.016, 0.01], [0.016, 0.0], [0.0, 0.0]]),
                        0.0015,
                    ),
                    (rect(0.0, 0.0, 0.015, 0.01), 0.001),
                    (rect(0.0, 0.011, 0.04, 0.017), 0.002),
                ],
                vec![],
                open(),
            ),
        ),
        ("sphere on the axis", spec(axi, vec![(circle([0.0, 0.0], 0.01), 0.001)], vec![], open())),
        ("ring off the axis", spec(axi, vec![(circle([0.02, 0.0], 0.004), 0.0008)], vec![], boxed())),
        (
            "planar disk in a square",
            spec(
                pl,
                vec![(rect(-0.01, -0.01, 0.01, 0.01), 0.002), (circle([0.0, 0.0], 0.005), 0.0007)],
                vec![],
                open(),
            ),
        ),
        (
            "L-shaped yoke",
            spec(
                pl,
                vec![(
                    Shape::Polygon(vec![[0.0, 0.0], [0.03, 0.0], [0.03, 0.005], [0.005, 0.005], [0.005, 0.02], [0.0, 0.02]]),
                    0.0015,
                )],
                vec![],
                open(),
            ),
        ),
        (
            "array of bars",
            spec(
                pl,
                (0..4).map(|i| (rect(i as f64 * 0.01, 0.0, i as f64 * 0.01 + 0.01, 0.004), 0.001)).collect(),
                vec![],
                open(),
            ),
        ),
        (
            "slanted polygon",
            spec(
                pl,
                vec![(Shape::Polygon(vec![[0.0, 0.0], [0.02, 0.003], [0.017, 0.015], [0.004, 0.012]]), 0.0012)],
                vec![],
                boxed(),
            ),
        ),
        (
            "thin plate far from a magnet",
            spec(
                axi,
                vec![(rect(0.0, 0.0, 0.005, 0.005), 0.0007), (rect(0.0, 0.03, 0.03, 0.031), 0.0005)],
                vec![],
                open(),
            ),
        ),
    ]
}

/// Area of the convex hull of the physical nodes (the domain is convex).
fn hull_area(mesh: &Mesh) -> f64 {
    let mut p: Vec<[f64; 2]> = mesh.nodes[..mesh.n_physical].to_vec();
    p.sort_by(|a, b| a[0].total_cmp(&b[0]).then(a[1].total_cmp(&b[1])));
    let cross = |o: [f64; 2], a: [f64; 2], b: [f64; 2]| (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0]);
    let mut hull: Vec<[f64; 2]> = Vec::new();
    for pass in 0..2 {
        let start = hull.len();
        let iter: Box<dyn Iterator<Item = &[f64; 2]>> = if pass == 0 { Box::new(p.iter()) } else { Box::new(p.iter().rev()) };
        for &q in iter {
            while hull.len() >= start + 2 && cross(hull[hull.len() - 2], hull[hull.len() - 1], q) <= 0.0 {
                hull.pop();
            }
            hull.push(q);
        }
        hull.pop();
    }
    mesher::geometry::signed_area(&hull).abs()
}

/// Visible polygon of every part, as the mesher sees it.
fn polygons(spec: &MeshSpec) -> Vec<Vec<[f64; 2]>> {
    spec.parts
        .iter()
        .map(|p| match &p.shape {
            Shape::Polygon(v) => v.clone(),
            Shape::Rect { from, to } => vec![*from, [to[0], from[1]], *to, [from[0], to[1]]],
            Shape::Circle { center, radius } => {
                let n = circle_segments(*radius, p.mesh_size);
                (0..n)
                    .map(|k| {
                        let t = 2.0 * std::f64::consts::PI * k as f64 / n as f64;
                        [center[0] + radius * t.cos(), center[1] + radius * t.sin()]
                    })
                    .collect()
            }
            Shape::Rings(rings) => mesher::outline::ring_polygon(&rings[0], p.mesh_size),
        })
        .collect()
}

fn region_at(polys: &[Vec<[f64; 2]>], symmetry: Symmetry, p: [f64; 2]) -> Region {
    let _ = symmetry;
    polys.iter().rposition(|poly| point_in_polygon(poly, p)).map_or(Region::Air, Region::Part)
}

#[test]
fn invariants_hold_on_every_geometry() {
    for (name, s) in geometries() {
        let mesh = build_mesh(&s).unwrap_or_else(|e| panic!("{name}: {e}"));
        let q = mesh.quality();
        // Every triangle has positive area (counter-clockwise).
        assert!(q.min_area > 0.0, "{name}: a triangle has area {}", q.min_area);
        // Areas add up to the (convex) domain to 1e-9.
        let hull = hull_area(&mesh);
        assert!((q.total_area - hull).abs() <= 1e-9 * hull, "{name}: {} vs {}", q.total_area, hull);
        // Angle bound (geometry angles here are all at least 90 degrees, or a sphere's 90 at the poles).
        assert!(q.min_angle_deg >= s.min_angle_deg - 0.5, "{name}: min angle {}", q.min_angle_deg);
        let polys = polygons(&s);
        for t in 0..mesh.triangles.len() {
            let x = mesh.triangle_points(t);
            // No triangle crosses a part boundary: points well inside it all lie in its region.
            for lam in [[0.6, 0.2, 0.2], [0.2, 0.6, 0.2], [0.2, 0.2, 0.6], [1.0 / 3.0; 3]] {
                let p = [0, 1].map(|k| lam[0] * x[0][k] + lam[1] * x[1][k] + lam[2] * x[2][k]);
                assert_eq!(region_at(&polys, s.symmetry, p), mesh.regions[t], "{name}: triangle {t} at {p:?}");
            }
            // No edge inside a part is longer than 1.5 times the part's size.
            if let Region::Part(i) = mesh.regions[t] {
                let h = s.parts[i].mesh_size;
                for k in 0..3 {
                    let e = mesher::geometry::dist(x[k], x[(k + 1) % 3]);
                    assert!(e <= 1.5 * h, "{name}: edge {e} in part {i} (size {h})");
                }
            }
        }
    }
}

#[test]
fn part_areas_match_the_shapes_less_what_later_parts_cover() {
    // Exact for rectangles and polygons; circles within their chord bound.
    let s = &geometries()[2].1; // nested rects
    let a = build_mesh(s).unwrap().part_areas(2);
    assert!((a[0] - (0.04 * 0.04 - 0.01 * 0.01)).abs() < 1e-12 && (a[1] - 1e-4).abs() < 1e-12, "{a:?}");
    let s = &geometries()[3].1; // overlapping rects: the first loses the 0.01 x 0.005 overlap
    let a = build_mesh(s).unwrap().part_areas(2);
    assert!((a[0] - (2e-4 - 0.5e-4)).abs() < 1e-12 && (a[1] - 0.02 * 0.015).abs() < 1e-12, "{a:?}");
    let s = &geometries()[7].1; // disk inside a square
    let a = build_mesh(s).unwrap().part_areas(2);
    let r = 0.005;
    let n = circle_segments(r, 0.0007) as f64;
    let polygon = 0.5 * n * r * r * (2.0 * std::f64::consts::PI / n).sin();
    let chord_bound = std::f64::consts::PI * r * r - polygon;
    assert!((a[1] - std::f64::consts::PI * r * r).abs() <= chord_bound * 1.000001, "{a:?}");
    assert!((a[0] + a[1] - 4e-4).abs() < 1e-12);
    let s = &geometries()[5].1; // sphere: the r >= 0 half of the circle
    let a = build_mesh(s).unwrap().part_areas(1)[0];
    let r = 0.01;
    let half = circle_segments(r, 0.001).div_ceil(2).max(4) as f64;
    let half_polygon = half * 0.5 * r * r * (std::f64::consts::PI / half).sin();
    let half_disk = 0.5 * std::f64::consts::PI * r * r;
    assert!((a - half_polygon).abs() < 1e-12 && half_disk - a <= half_disk - half_polygon + 1e-15, "{a}");
}

#[test]
fn meshing_is_deterministic() {
    for (name, s) in geometries().into_iter().take(5) {
        let (a, b) = (build_mesh(&s).unwrap(), build_mesh(&s).unwrap());
        assert!(a.nodes == b.nodes && a.triangles == b.triangles && a.regions == b.regions, "{name}");
    }
}
