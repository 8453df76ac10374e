//! Part shapes, their conversion to closed polygons, and plane geometry helpers.

use crate::error::MeshError;
pub use crate::plane::{bbox, circle_sagitta, circle_segments, dist, orient, signed_area, CHORD_FRACTION, MIN_CIRCLE_SEGMENTS};
use crate::spec::MeshSpec;
pub use crate::spec::{Shape, Symmetry};

impl Shape {
    /// Exact area of the shape as the study sees it (the r >= 0 half of an
    /// axis-centred circle in an axisymmetric study).
    pub fn exact_area(&self, symmetry: Symmetry) -> f64 {
        match self {
            Shape::Polygon(p) => signed_area(p).abs(),
            Shape::Rect { from, to } => ((to[0] - from[0]) * (to[1] - from[1])).abs(),
            Shape::Circle { center, radius } => {
                let full = std::f64::consts::PI * radius * radius;
                if symmetry == Symmetry::Axisymmetric && center[0] == 0.0 {
                    full / 2.0
                } else {
                    full
                }
            }
            Shape::Rings(rings) => {
                let mut areas = rings.iter().map(|r| crate::outline::ring_area(r).abs());
                let outline = areas.next().unwrap_or(0.0);
                outline - areas.sum::<f64>()
            }
        }
    }
}

impl Shape {
    /// Lower-left and upper-right corners of the shape's box.
    pub fn bounds(&self) -> ([f64; 2], [f64; 2]) {
        match self {
            Shape::Rect { from, to } => ([from[0].min(to[0]), from[1].min(to[1])], [from[0].max(to[0]), from[1].max(to[1])]),
            Shape::Circle { center, radius } => ([center[0] - radius, center[1] - radius], [center[0] + radius, center[1] + radius]),
            Shape::Polygon(p) => bbox(p.iter().copied()),
            Shape::Rings(rings) => bbox(rings.iter().flat_map(|r| crate::outline::ring_polygon(r, f64::INFINITY))),
        }
    }

    /// The outlines whose vertices may be corners (where the field is
    /// singular): the polygon's, the rectangle's, each ring's with its arcs
    /// in short chords (so that a corner is where a chord turns sharply); none
    /// for a circle.
    pub fn corner_outlines(&self) -> Vec<Vec<[f64; 2]>> {
        match self {
            Shape::Rect { from, to } => vec![vec![*from, [to[0], from[1]], *to, [from[0], to[1]]]],
            Shape::Polygon(points) => vec![points.clone()],
            Shape::Circle { .. } => Vec::new(),
            Shape::Rings(rings) => rings.iter().map(|r| crate::outline::ring_polygon(r, f64::INFINITY)).collect(),
        }
    }
}

/// Every part's rings as closed polygons: outlines counter-clockwise, holes
/// clockwise, each with the index of its part.
#[derive(Clone, Debug)]
pub struct PartRings {
    /// The rings, a part's outline before its holes, parts in order.
    pub rings: Vec<Vec<[f64; 2]>>,
    /// The part of each ring.
    pub part_of: Vec<usize>,
}

/// Closed counter-clockwise polygons of every part, validated, with circles
/// split so that each chord is no longer than the part's size and its sagitta
/// stays below `CHORD_FRACTION` of that size.
pub fn part_polygons(spec: &MeshSpec) -> Result<PartRings, MeshError> {
    if spec.parts.is_empty() {
        return Err(MeshError::NoParts);
    }
    let mut out = PartRings {
        rings: Vec::with_capacity(spec.parts.len()),
        part_of: Vec::with_capacity(spec.parts.len()),
    };
    for (i, part) in spec.parts.iter().enumerate() {
        if !(part.mesh_size.is_finite() && part.mesh_size > 0.0) {
            return Err(MeshError::BadSize { part: i, size: part.mesh_size });
        }
        let rings = match &part.shape {
            Shape::Rings(rings) => rings_polygons(i, rings, part.mesh_size)?,
            shape => vec![shape_polygon(i, shape, part.mesh_size, spec.symmetry)?],
        };
        for poly in &rings {
            validate_polygon(i, poly, spec.symmetry)?;
        }
        check_holes(i, &rings)?;
        for (k, mut poly) in rings.into_iter().enumerate() {
            // Holes run clockwise, so that signed areas net out.
            if k > 0 {
                poly.reverse();
            }
            out.rings.push(poly);
            out.part_of.push(i);
        }
    }
    Ok(out)
}

/// A part's rings as counter-clockwise polygons, arcs split into chords.
fn rings_polygons(part: usize, rings: &[Vec<crate::outline::Vertex>], size: f64) -> Result<Vec<Vec<[f64; 2]>>, MeshError> {
    if rings.is_empty() {
        return Err(MeshError::TooFewPoints { part, count: 0 });
    }
    rings
        .iter()
        .map(|ring| {
            if ring.iter().any(|v| !(v.at[0].is_finite() && v.at[1].is_finite() && v.bulge.is_finite())) {
                return Err(MeshError::NotFinite { part });
            }
            if ring.iter().any(|v| v.bulge.abs() > crate::outline::MAX_BULGE) {
                return Err(MeshError::ZeroArea { part });
            }
            let mut poly = crate::outline::ring_polygon(ring, size);
            if poly.len() >= 3 && signed_area(&poly) < 0.0 {
                poly.reverse();
            }
            Ok(poly)
        })
        .collect()
}

/// Each hole lies inside the outline, clear of it and of the other holes.
fn check_holes(part: usize, rings: &[Vec<[f64; 2]>]) -> Result<(), MeshError> {
    let Some((outline, holes)) = rings.split_first() else { return Ok(()) };
    for (k, hole) in holes.iter().enumerate() {
        let inside = hole.iter().all(|&p| point_in_polygon(outline, p));
        let crossing = rings.iter().enumerate().filter(|&(j, _)| j != k + 1).any(|(_, other)| rings_touch(hole, other));
        if !inside || crossing {
            return Err(MeshError::HoleOutside { part, hole: k });
        }
    }
    Ok(())
}

/// Whether two closed polygons' edges meet (brute force: holes are few and small).
fn rings_touch(a: &[[f64; 2]], b: &[[f64; 2]]) -> bool {
    let (na, nb) = (a.len(), b.len());
    (0..na).any(|i| (0..nb).any(|j| segments_intersect(a[i], a[(i + 1) % na], b[j], b[(j + 1) % nb])))
}

fn shape_polygon(part: usize, shape: &Shape, size: f64, symmetry: Symmetry) -> Result<Vec<[f64; 2]>, MeshError> {
    let mut poly = match shape {
        Shape::Rings(rings) => rings_polygons(part, rings, size)?.swap_remove(0),
        Shape::Polygon(p) => p.clone(),
        Shape::Rect { from, to } => {
            let (x0, x1) = (from[0].min(to[0]), from[0].max(to[0]));
            let (y0, y1) = (from[1].min(to[1]), from[1].max(to[1]));
            vec![[x0, y0], [x1, y0], [x1, y1], [x0, y1]]
        }
        Shape::Circle { center, radius } => circle_polygon(part, *center, *radius, size, symmetry)?,
    };
    if poly.iter().flatten().any(|v| !v.is_finite()) {
        return Err(MeshError::NotFinite { part });
    }
    if poly.len() >= 3 && signed_area(&poly) < 0.0 {
        poly.reverse();
    }
    Ok(poly)
}

fn circle_polygon(part: usize, c: [f64; 2], radius: f64, size: f64, symmetry: Symmetry) -> Result<Vec<[f64; 2]>, MeshError> {
    if !(radius.is_finite() && c[0].is_finite() && c[1].is_finite()) {
        return Err(MeshError::NotFinite { part });
    }
    if radius <= 0.0 {
        return Err(MeshError::ZeroArea { part });
    }
    let n = circle_segments(radius, size);
    let sphere = symmetry == Symmetry::Axisymmetric && c[0] == 0.0;
    if sphere {
        // The r >= 0 half: from the south pole round the outside to the north pole.
        let half = n.div_ceil(2).max(4);
        let pts = (0..=half)
            .map(|k| {
                let t = -std::f64::consts::FRAC_PI_2 + std::f64::consts::PI * k as f64 / half as f64;
                let r = if k == 0 || k == half { 0.0 } else { radius * t.cos() };
                [r, c[1] + radius * t.sin()]
            })
            .collect();
        return Ok(pts);
    }
    Ok((0..n)
        .map(|k| {
            let t = 2.0 * std::f64::consts::PI * k as f64 / n as f64;
            [c[0] + radius * t.cos(), c[1] + radius * t.sin()]
        })
        .collect())
}

fn validate_polygon(part: usize, poly: &[[f64; 2]], symmetry: Symmetry) -> Result<(), MeshError> {
    if poly.len() < 3 {
        return Err(MeshError::TooFewPoints { part, count: poly.len() });
    }
    let extent = bbox_extent(poly);
    if !(1e-6..=1e4).contains(&extent) || poly.iter().flatten().any(|v| v.abs() > 1e4) {
        return Err(MeshError::OutOfRange { part, extent });
    }
    for i in 0..poly.len() {
        let j = (i + 1) % poly.len();
        if dist(poly[i], poly[j]) <= 1e-9 * extent {
            return Err(MeshError::RepeatedPoint { part, index: j });
        }
    }
    if let Some(edges) = first_self_intersection(poly) {
        return Err(MeshError::SelfIntersection { part, edges });
    }
    if signed_area(poly).abs() <= 1e-12 * extent * extent {
        return Err(MeshError::ZeroArea { part });
    }
    if symmetry == Symmetry::Axisymmetric && poly.iter().any(|p| p[0] < 0.0) {
        return Err(MeshError::AcrossAxis { part });
    }
    Ok(())
}

fn first_self_intersection(poly: &[[f64; 2]]) -> Option<[usize; 2]> {
    let n = poly.len();
    if n > 4096 {
        return None; // generated circles: convex by construction
    }
    for i in 0..n {
        for j in i + 2..n {
            if i == 0 && j == n - 1 {
                continue;
            }
            let (a, b) = (poly[i], poly[(i + 1) % n]);
            let (c, d) = (poly[j], poly[(j + 1) % n]);
            if segments_intersect(a, b, c, d) {
                return Some([i, j]);
            }
        }
    }
    None
}

/// Proper or touching intersection of two closed segments.
pub fn segments_intersect(a: [f64; 2], b: [f64; 2], c: [f64; 2], d: [f64; 2]) -> bool {
    let d1 = orient(c, d, a);
    let d2 = orient(c, d, b);
    let d3 = orient(a, b, c);
    let d4 = orient(a, b, d);
    if ((d1 > 0.0 && d2 < 0.0) || (d1 < 0.0 && d2 > 0.0)) && ((d3 > 0.0 && d4 < 0.0) || (d3 < 0.0 && d4 > 0.0)) {
        return true;
    }
    let on = |p: [f64; 2], q: [f64; 2], r: [f64; 2], o: f64| {
        o == 0.0 && r[0] >= p[0].min(q[0]) && r[0] <= p[0].max(q[0]) && r[1] >= p[1].min(q[1]) && r[1] <= p[1].max(q[1])
    };
    on(c, d, a, d1) || on(c, d, b, d2) || on(a, b, c, d3) || on(a, b, d, d4)
}

/// Even-odd point-in-polygon test; points on an edge count as inside.
pub fn point_in_polygon(poly: &[[f64; 2]], p: [f64; 2]) -> bool {
    point_in_edges(poly, 0..poly.len(), p)
}

/// Even-odd ray casting over the listed edges of `poly` (edge i runs from
/// point i to the next), with a point on one of them counting as inside:
/// over every edge, the point-in-polygon test; over the edges that can
/// cross the point's height (a row band of `spatial`), the same answer.
pub fn point_in_edges(poly: &[[f64; 2]], edges: impl IntoIterator<Item = usize>, p: [f64; 2]) -> bool {
    let n = poly.len();
    let mut inside = false;
    for i in edges {
        let (a, b) = (poly[i], poly[(i + 1) % n]);
        if point_on_segment(a, b, p) {
            return true;
        }
        if (a[1] > p[1]) != (b[1] > p[1]) {
            let x = a[0] + (p[1] - a[1]) / (b[1] - a[1]) * (b[0] - a[0]);
            if p[0] < x {
                inside = !inside;
            }
        }
    }
    inside
}

fn point_on_segment(a: [f64; 2], b: [f64; 2], p: [f64; 2]) -> bool {
    let len = dist(a, b);
    orient(a, b, p).abs() <= 1e-12 * len * len
        && p[0] >= a[0].min(b[0]) - 1e-15
        && p[0] <= a[0].max(b[0]) + 1e-15
        && p[1] >= a[1].min(b[1]) - 1e-15
        && p[1] <= a[1].max(b[1]) + 1e-15
}

/// Distance from p to the segment ab.
pub fn point_segment_distance(p: [f64; 2], a: [f64; 2], b: [f64; 2]) -> f64 {
    point_segment_distance_squared(p, a, b).sqrt()
}

/// Squared distance from p to the segment ab (no square root, for hot loops).
pub fn point_segment_distance_squared(p: [f64; 2], a: [f64; 2], b: [f64; 2]) -> f64 {
    let ab = [b[0] - a[0], b[1] - a[1]];
    let len2 = ab[0] * ab[0] + ab[1] * ab[1];
    let t = if len2 > 0.0 {
        (((p[0] - a[0]) * ab[0] + (p[1] - a[1]) * ab[1]) / len2).clamp(0.0, 1.0)
    } else {
        0.0
    };
    let d = [p[0] - a[0] - t * ab[0], p[1] - a[1] - t * ab[1]];
    d[0] * d[0] + d[1] * d[1]
}

fn bbox_extent(poly: &[[f64; 2]]) -> f64 {
    let (lo, hi) = bbox(poly.iter().copied());
    (hi[0] - lo[0]).max(hi[1] - lo[1])
}
