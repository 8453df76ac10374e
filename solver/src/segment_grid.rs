//! Distance from a point to the nearest of many segments, by a uniform grid
//! of buckets searched in growing rings: the force band's weight needs it
//! for every air node near a part, against every edge of the part's outline.

use mesher::geometry::point_segment_distance_squared;

/// Segments filed by the grid cells their bounding boxes touch.
pub struct SegmentGrid {
    segments: Vec<[[f64; 2]; 2]>,
    origin: [f64; 2],
    cell: f64,
    shape: [usize; 2],
    buckets: Vec<Vec<u32>>,
}

/// Cells along the longer side of the segments' box: half the square root
/// of the segment count, within [8, 64]. Finer cells hold fewer segments
/// each but make a far point search more rings of empty cells; on the 1e6
/// case's band (860 set edges, most air nodes 1 to 20 mm away) 16 cells
/// across took 1 800 perf samples of search against 2 000 for 32 and 4 000
/// for 64.
fn cells_across(segments: usize) -> f64 {
    ((segments as f64).sqrt() / 2.0).clamp(8.0, 64.0)
}

impl SegmentGrid {
    pub fn new(segments: Vec<[[f64; 2]; 2]>) -> SegmentGrid {
        let (lo, hi) = mesher::geometry::bbox(segments.iter().flat_map(|s| s.iter().copied()));
        let span = (hi[0] - lo[0]).max(hi[1] - lo[1]);
        let cell = if span > 0.0 && span.is_finite() {
            span / cells_across(segments.len())
        } else {
            1.0
        };
        let shape = [0, 1].map(|k| (((hi[k] - lo[k]) / cell).floor() as usize + 1).clamp(1, 1 << 12));
        let mut grid = SegmentGrid {
            segments,
            origin: lo,
            cell,
            shape,
            buckets: vec![Vec::new(); shape[0] * shape[1]],
        };
        for (i, s) in grid.segments.iter().enumerate() {
            let (a, b) = (grid.cell_of(s[0]), grid.cell_of(s[1]));
            for x in a[0].min(b[0])..=a[0].max(b[0]) {
                for y in a[1].min(b[1])..=a[1].max(b[1]) {
                    grid.buckets[y * shape[0] + x].push(i as u32);
                }
            }
        }
        grid
    }

    /// The cell holding p, clamped into the grid.
    fn cell_of(&self, p: [f64; 2]) -> [usize; 2] {
        [0, 1].map(|k| (((p[k] - self.origin[k]) / self.cell).floor().max(0.0) as usize).min(self.shape[k] - 1))
    }

    /// The distance from p to the nearest segment, or None when none lies within `reach`.
    pub fn nearest(&self, p: [f64; 2], reach: f64) -> Option<f64> {
        if self.segments.is_empty() {
            return None;
        }
        let c = self.cell_of(p);
        // How far p lies outside the grid: rings start counting from the grid's edge.
        let outside = [0, 1]
            .map(|k| {
                let lo = self.origin[k];
                let hi = lo + self.shape[k] as f64 * self.cell;
                (lo - p[k]).max(p[k] - hi).max(0.0)
            })
            .iter()
            .fold(0.0f64, |m, &d| m.max(d));
        let mut best = f64::INFINITY;
        let rings = self.shape[0].max(self.shape[1]);
        for r in 0..=rings {
            // Every segment not yet seen lies in a cell at least r - 1 cells
            // from p's cell, and inside the grid's box.
            let floor = outside.max((r as f64 - 1.0).max(0.0) * self.cell);
            if best.sqrt() <= floor || floor > reach {
                break;
            }
            self.visit_ring(c, r, |i| {
                let s = self.segments[i as usize];
                best = best.min(point_segment_distance_squared(p, s[0], s[1]));
            });
        }
        let d = best.sqrt();
        (d <= reach).then_some(d)
    }

    /// Calls `f` with every segment filed in the cells at Chebyshev distance r from c.
    fn visit_ring(&self, c: [usize; 2], r: usize, mut f: impl FnMut(u32)) {
        let (cx, cy, r) = (c[0] as i64, c[1] as i64, r as i64);
        let (nx, ny) = (self.shape[0] as i64, self.shape[1] as i64);
        let mut cell = |x: i64, y: i64| {
            if (0..nx).contains(&x) {
                self.buckets[(y * nx + x) as usize].iter().for_each(|&i| f(i));
            }
        };
        for y in (cy - r).max(0)..=(cy + r).min(ny - 1) {
            if y == cy - r || y == cy + r {
                // A whole row of the ring (no list built: this runs for every air node of a force band).
                for x in (cx - r).max(0)..=(cx + r).min(nx - 1) {
                    cell(x, y);
                }
            } else {
                cell(cx - r, y);
                if r > 0 {
                    cell(cx + r, y);
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn matches_the_brute_force_distance() {
        // The outline of a 10 x 4 rectangle cut into 1-long edges, and points in and around it.
        let mut segs = Vec::new();
        let corners = [[0.0, 0.0], [10.0, 0.0], [10.0, 4.0], [0.0, 4.0]];
        for k in 0..4 {
            let (a, b): ([f64; 2], [f64; 2]) = (corners[k], corners[(k + 1) % 4]);
            let n = ((b[0] - a[0]).abs() + (b[1] - a[1]).abs()) as usize;
            for i in 0..n {
                let t0 = i as f64 / n as f64;
                let t1 = (i + 1) as f64 / n as f64;
                segs.push([
                    [a[0] + t0 * (b[0] - a[0]), a[1] + t0 * (b[1] - a[1])],
                    [a[0] + t1 * (b[0] - a[0]), a[1] + t1 * (b[1] - a[1])],
                ]);
            }
        }
        let grid = SegmentGrid::new(segs.clone());
        for i in 0..40 {
            for j in 0..30 {
                let p = [-8.0 + 0.65 * i as f64, -9.0 + 0.71 * j as f64];
                let brute = segs
                    .iter()
                    .map(|s| point_segment_distance_squared(p, s[0], s[1]))
                    .fold(f64::INFINITY, f64::min)
                    .sqrt();
                match grid.nearest(p, 5.0) {
                    Some(d) => assert!((d - brute).abs() < 1e-12, "{p:?}: {d} vs {brute}"),
                    None => assert!(brute > 5.0, "{p:?}: none found within 5, brute {brute}"),
                }
            }
        }
    }
}
