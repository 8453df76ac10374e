//! Outlines made of straight segments and circular arcs, with holes: the
//! ring form of a part (`Shape::Rings`). An arc is stored as the bulge of
//! the segment leaving a vertex, tan(theta / 4) with theta its signed
//! included angle (positive counter-clockwise), the form DXF polylines use;
//! a full circle is two half-circle segments (bulge 1). Fillets and
//! chamfers are resolved into vertices and bulges here, before meshing.
//! The mesher splits each arc into chords with a bounded sagitta, and the
//! uniform refinement puts new points back on the arc (`refine.rs`).

use crate::plane::{circle_segments, dist, signed_area};

pub use crate::spec::Vertex;

/// The circle an arc segment lies on and the angles it spans.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Arc {
    /// Centre of its circle.
    pub center: [f64; 2],
    /// Radius of its circle.
    pub radius: f64,
    /// Angle of the start point seen from the centre, radians.
    pub start: f64,
    /// Signed included angle, radians (positive: counter-clockwise).
    pub sweep: f64,
}

/// Largest bulge accepted: an arc of 359 degrees (a full circle is two arcs).
pub const MAX_BULGE: f64 = 200.0;

impl Arc {
    /// The arc from a to b with this bulge (None for a straight segment).
    pub fn of_segment(a: [f64; 2], b: [f64; 2], bulge: f64) -> Option<Arc> {
        if bulge == 0.0 || !bulge.is_finite() {
            return None;
        }
        let c = dist(a, b);
        if c == 0.0 {
            return None;
        }
        let m = [0.5 * (a[0] + b[0]), 0.5 * (a[1] + b[1])];
        let left = [-(b[1] - a[1]) / c, (b[0] - a[0]) / c];
        // Centre on the left of a -> b for a counter-clockwise arc shorter than half a turn.
        let offset = c * (1.0 - bulge * bulge) / (4.0 * bulge);
        let center = [m[0] + left[0] * offset, m[1] + left[1] * offset];
        let radius = c * (1.0 + bulge * bulge) / (4.0 * bulge.abs());
        Some(Arc {
            center,
            radius,
            start: (a[1] - center[1]).atan2(a[0] - center[0]),
            sweep: 4.0 * bulge.atan(),
        })
    }

    /// The point at fraction t (0 to 1) along the arc.
    pub fn point(&self, t: f64) -> [f64; 2] {
        let angle = self.start + self.sweep * t;
        [self.center[0] + self.radius * angle.cos(), self.center[1] + self.radius * angle.sin()]
    }

    /// Whether the direction of p from the centre lies within the arc's angles (with a margin).
    pub fn spans(&self, p: [f64; 2]) -> bool {
        let angle = (p[1] - self.center[1]).atan2(p[0] - self.center[0]);
        let mut rel = (angle - self.start) * self.sweep.signum();
        rel = rel.rem_euclid(std::f64::consts::TAU);
        let margin = 1e-9;
        rel <= self.sweep.abs() + margin || rel >= std::f64::consts::TAU - margin
    }

    /// Area between the arc and its chord, signed as the shoelace formula
    /// counts it (positive when it bulges to the right of travel, which is
    /// outwards for a counter-clockwise ring).
    pub fn segment_area(&self) -> f64 {
        let t = self.sweep.abs();
        self.sweep.signum() * 0.5 * self.radius * self.radius * (t - t.sin())
    }

    /// Chords for a part of this mesh size: as a circle of its radius is split.
    pub fn chords(&self, size: f64) -> usize {
        let full = circle_segments(self.radius, size) as f64;
        ((full * self.sweep.abs() / std::f64::consts::TAU).ceil() as usize).max(2)
    }
}

/// The ring as a polygon: each arc split into chords for the mesh size.
pub fn ring_polygon(ring: &[Vertex], size: f64) -> Vec<[f64; 2]> {
    let n = ring.len();
    let mut out = Vec::with_capacity(n);
    for i in 0..n {
        let (v, next) = (ring[i], ring[(i + 1) % n]);
        out.push(v.at);
        if let Some(arc) = Arc::of_segment(v.at, next.at, v.bulge) {
            let k = arc.chords(size);
            out.extend((1..k).map(|j| arc.point(j as f64 / k as f64)));
        }
    }
    out
}

/// Signed area of a ring, arcs included exactly.
pub fn ring_area(ring: &[Vertex]) -> f64 {
    let pts: Vec<[f64; 2]> = ring.iter().map(|v| v.at).collect();
    let n = ring.len();
    let arcs: f64 = (0..n)
        .filter_map(|i| Arc::of_segment(ring[i].at, ring[(i + 1) % n].at, ring[i].bulge))
        .map(|a| a.segment_area())
        .sum();
    signed_area(&pts) + arcs
}

/// The ring traversed the other way (bulges follow their segments and turn sign).
pub fn reversed(ring: &[Vertex]) -> Vec<Vertex> {
    let n = ring.len();
    (0..n)
        .map(|k| {
            let i = n - 1 - k;
            Vertex {
                at: ring[(i + 1) % n].at,
                bulge: -ring[i].bulge,
            }
        })
        .collect()
}

/// The arcs of a ring.
pub fn ring_arcs(ring: &[Vertex]) -> Vec<Arc> {
    let n = ring.len();
    (0..n)
        .filter_map(|i| Arc::of_segment(ring[i].at, ring[(i + 1) % n].at, ring[i].bulge))
        .collect()
}

/// A full circle as a ring: two half circles, counter-clockwise.
pub fn circle_ring(center: [f64; 2], radius: f64) -> Vec<Vertex> {
    vec![
        Vertex {
            at: [center[0] + radius, center[1]],
            bulge: 1.0,
        },
        Vertex {
            at: [center[0] - radius, center[1]],
            bulge: 1.0,
        },
    ]
}

/// How a corner is cut.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Corner {
    /// Rounded with an arc of this radius tangent to both edges.
    Fillet(f64),
    /// Cut straight, this far back along each edge.
    Chamfer(f64),
}

/// Why a corner could not be cut.
#[derive(Clone, Debug, PartialEq)]
pub enum CornerError {
    /// The corner is an arc end or its edges are in line.
    NotACorner,
    /// The cut reaches past the end of one of its edges.
    TooLarge {
        /// the length the cut takes along each edge
        needs: f64,
        /// the shorter of the two edges (less what other cuts take)
        room: f64,
    },
}

/// Cuts corner `i` of a straight-edged ring (both its edges straight):
/// replaces the vertex by the two points where the fillet or chamfer meets
/// the edges (`room_before` and `room_after`: how much of each edge is left).
pub fn cut_corner(ring: &[Vertex], i: usize, how: Corner, room: [f64; 2]) -> Result<[Vertex; 2], CornerError> {
    let n = ring.len();
    let (prev, p, next) = (ring[(i + n - 1) % n], ring[i], ring[(i + 1) % n]);
    if prev.bulge != 0.0 || p.bulge != 0.0 {
        return Err(CornerError::NotACorner);
    }
    let (la, lb) = (dist(prev.at, p.at), dist(p.at, next.at));
    let u = [(prev.at[0] - p.at[0]) / la, (prev.at[1] - p.at[1]) / la];
    let v = [(next.at[0] - p.at[0]) / lb, (next.at[1] - p.at[1]) / lb];
    let cos = (u[0] * v[0] + u[1] * v[1]).clamp(-1.0, 1.0);
    let half = 0.5 * cos.acos();
    if half < 1e-6 || (std::f64::consts::FRAC_PI_2 - half) < 1e-6 {
        return Err(CornerError::NotACorner);
    }
    let (back, bulge) = match how {
        Corner::Chamfer(d) => (d, 0.0),
        Corner::Fillet(r) => {
            // The arc turns as the corner does: through pi - 2 half, left at a left turn.
            let turn = (p.at[0] - prev.at[0]) * (next.at[1] - p.at[1]) - (p.at[1] - prev.at[1]) * (next.at[0] - p.at[0]);
            let sweep = (std::f64::consts::PI - 2.0 * half) * turn.signum();
            (r / half.tan(), (sweep / 4.0).tan())
        }
    };
    let fits = room[0].min(room[1]);
    if !(back > 0.0 && back < fits) {
        return Err(CornerError::TooLarge { needs: back, room: fits });
    }
    Ok([
        Vertex {
            at: [p.at[0] + u[0] * back, p.at[1] + u[1] * back],
            bulge,
        },
        Vertex {
            at: [p.at[0] + v[0] * back, p.at[1] + v[1] * back],
            bulge: 0.0,
        },
    ])
}

#[cfg(test)]
mod tests {
    use super::*;

    fn square() -> Vec<Vertex> {
        [[0.0, 0.0], [2.0, 0.0], [2.0, 2.0], [0.0, 2.0]]
            .iter()
            .map(|&at| Vertex { at, bulge: 0.0 })
            .collect()
    }

    /// A half circle of bulge 1 has its centre at the chord's middle, and
    /// the circle ring's area is pi r^2 exactly.
    #[test]
    fn bulges_give_the_arcs_they_mean() {
        let arc = Arc::of_segment([1.0, 0.0], [-1.0, 0.0], 1.0).unwrap();
        assert!(dist(arc.center, [0.0, 0.0]) < 1e-15 && (arc.radius - 1.0).abs() < 1e-15);
        // Counter-clockwise from (1, 0) through (0, 1).
        assert!(dist(arc.point(0.5), [0.0, 1.0]) < 1e-12, "{:?}", arc.point(0.5));
        let ring = circle_ring([3.0, -1.0], 2.0);
        assert!((ring_area(&ring) - std::f64::consts::PI * 4.0).abs() < 1e-12, "{}", ring_area(&ring));
        assert!((ring_area(&reversed(&ring)) + std::f64::consts::PI * 4.0).abs() < 1e-12);
        // A quarter-circle bulge tan(pi / 8) from (1, 0) to (0, 1) about the origin.
        let q = Arc::of_segment([1.0, 0.0], [0.0, 1.0], (std::f64::consts::PI / 8.0).tan()).unwrap();
        assert!(dist(q.center, [0.0, 0.0]) < 1e-12 && (q.sweep - std::f64::consts::FRAC_PI_2).abs() < 1e-12);
        assert!(q.spans([0.7, 0.7]) && !q.spans([-0.7, 0.7]));
    }

    /// A fillet of radius r on a square's corner takes r (1 - pi / 4) r of
    /// area, and its arc is tangent where it meets the edges; a chamfer of d
    /// takes d^2 / 2.
    #[test]
    fn fillets_and_chamfers_take_the_right_area() {
        let r = 0.5;
        let sq = square();
        for (how, taken) in [
            (Corner::Fillet(r), r * r * (1.0 - std::f64::consts::FRAC_PI_4)),
            (Corner::Chamfer(r), 0.5 * r * r),
        ] {
            let cut = cut_corner(&sq, 2, how, [2.0, 2.0]).unwrap();
            let mut ring = sq.clone();
            ring.splice(2..3, cut);
            assert!((ring_area(&ring) - (4.0 - taken)).abs() < 1e-12, "{how:?}: {}", ring_area(&ring));
        }
        let cut = cut_corner(&sq, 2, Corner::Fillet(r), [2.0, 2.0]).unwrap();
        assert!(dist(cut[0].at, [2.0, 1.5]) < 1e-12 && dist(cut[1].at, [1.5, 2.0]) < 1e-12);
        let too_large = cut_corner(&sq, 2, Corner::Fillet(3.0), [2.0, 2.0]);
        assert!(
            matches!(too_large, Err(CornerError::TooLarge { needs, room }) if (needs - 3.0).abs() < 1e-12 && room == 2.0),
            "{too_large:?}"
        );
    }
}
