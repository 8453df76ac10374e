//! Plane primitives that every other module builds on (distances, areas,
//! orientation, boxes) and the chord count of a circle: kept apart so that
//! the outline and geometry modules can both use them without importing
//! each other.

/// Largest sagitta of a circle's chords, as a fraction of the local size.
pub const CHORD_FRACTION: f64 = 0.02;

/// Fewest chords of any circle.
pub const MIN_CIRCLE_SEGMENTS: f64 = 48.0;

/// Largest distance inside a circle of its meshed outline (chords for a
/// part of this size): the sagitta of its chords.
pub fn circle_sagitta(radius: f64, size: f64) -> f64 {
    radius * (1.0 - (std::f64::consts::PI / circle_segments(radius, size) as f64).cos())
}

/// Number of chords for a circle: chord <= size, sagitta <= CHORD_FRACTION * size,
/// and at least MIN_CIRCLE_SEGMENTS (area within 0.3 % of the circle's).
pub fn circle_segments(radius: f64, size: f64) -> usize {
    let by_length = (2.0 * std::f64::consts::PI * radius / size).ceil();
    let sag = (CHORD_FRACTION * size).min(radius);
    let by_sagitta = (std::f64::consts::PI / (1.0 - sag / radius).acos()).ceil();
    (by_length.max(by_sagitta).max(MIN_CIRCLE_SEGMENTS) as usize).min(1 << 16)
}

/// Twice the signed area of triangle (a, b, c); positive when counter-clockwise.
pub fn orient(a: [f64; 2], b: [f64; 2], c: [f64; 2]) -> f64 {
    (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0])
}

/// Signed area of a closed polygon (shoelace formula).
pub fn signed_area(poly: &[[f64; 2]]) -> f64 {
    let n = poly.len();
    (0..n)
        .map(|i| {
            let (p, q) = (poly[i], poly[(i + 1) % n]);
            p[0] * q[1] - q[0] * p[1]
        })
        .sum::<f64>()
        / 2.0
}

/// Euclidean distance.
pub fn dist(a: [f64; 2], b: [f64; 2]) -> f64 {
    (a[0] - b[0]).hypot(a[1] - b[1])
}

/// Lower-left and upper-right corners of the points.
pub fn bbox(points: impl IntoIterator<Item = [f64; 2]>) -> ([f64; 2], [f64; 2]) {
    let mut lo = [f64::INFINITY; 2];
    let mut hi = [f64::NEG_INFINITY; 2];
    for p in points {
        for k in 0..2 {
            lo[k] = lo[k].min(p[k]);
            hi[k] = hi[k].max(p[k]);
        }
    }
    (lo, hi)
}
