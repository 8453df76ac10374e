//! Bucket grids that keep the mesher's queries local: the graded size at a
//! point (the nearest size sources, searched in rings of cells outward until
//! no farther cell can give a smaller size) and the parts whose outline
//! holds a point (only the parts whose box covers the point's cell are
//! tested). Brute force over every source and every part made meshing grow
//! with the square of the vertex count: a 20 000-vertex polygon took 60 s,
//! 4 000 parts 107 s.

use crate::geometry::{point_in_edges, point_in_polygon, point_segment_distance_squared};
use crate::size_field::SizeSource;

/// A uniform grid over a box, about one item per cell.
#[derive(Clone, Debug)]
struct Grid {
    lo: [f64; 2],
    cell: f64,
    dims: [usize; 2],
    /// Items of each cell, row by row.
    cells: Vec<Vec<u32>>,
}

/// Largest number of cells a grid gets, whatever the item count.
const MAX_CELLS: usize = 1 << 22;

impl Grid {
    /// A grid over `boxes` (lower and upper corners), each item entered in
    /// every cell its box touches.
    fn new(boxes: &[([f64; 2], [f64; 2])]) -> Grid {
        let mut lo = [f64::INFINITY; 2];
        let mut hi = [f64::NEG_INFINITY; 2];
        for (a, b) in boxes {
            for k in 0..2 {
                lo[k] = lo[k].min(a[k]);
                hi[k] = hi[k].max(b[k]);
            }
        }
        if boxes.is_empty() {
            (lo, hi) = ([0.0; 2], [1.0; 2]);
        }
        let extent = [(hi[0] - lo[0]).max(1e-300), (hi[1] - lo[1]).max(1e-300)];
        // About one item a cell, and never more cells along the long side
        // than items: items along a line would otherwise get a grid of
        // thousands of cells by one, and a ring search would walk it all.
        let target = boxes.len().clamp(1, MAX_CELLS) as f64;
        let long = extent[0].max(extent[1]);
        let mut cell = (extent[0] * extent[1] / target).sqrt().max(long / target.sqrt());
        if cell.is_nan() || cell <= 0.0 || !cell.is_finite() {
            cell = long;
        }
        let dims = [((extent[0] / cell).ceil() as usize).max(1), ((extent[1] / cell).ceil() as usize).max(1)];
        let mut grid = Grid {
            lo,
            cell,
            dims,
            cells: vec![Vec::new(); dims[0] * dims[1]],
        };
        for (i, (a, b)) in boxes.iter().enumerate() {
            let (c0, c1) = (grid.cell_of(*a), grid.cell_of(*b));
            for y in c0[1]..=c1[1] {
                for x in c0[0]..=c1[0] {
                    grid.cells[y * dims[0] + x].push(i as u32);
                }
            }
        }
        grid
    }

    /// The cell holding p, clamped to the grid.
    fn cell_of(&self, p: [f64; 2]) -> [usize; 2] {
        [0, 1].map(|k| {
            let c = ((p[k] - self.lo[k]) / self.cell).floor();
            if c.is_nan() || c < 0.0 {
                0
            } else {
                (c as usize).min(self.dims[k] - 1)
            }
        })
    }

    /// Distance from p to the grid's box (0 inside).
    fn outside_distance(&self, p: [f64; 2]) -> f64 {
        let d = [0, 1].map(|k| {
            let hi = self.lo[k] + self.dims[k] as f64 * self.cell;
            (self.lo[k] - p[k]).max(p[k] - hi).max(0.0)
        });
        d[0].hypot(d[1])
    }

    /// Calls `f` with the items of every cell at Chebyshev ring `r` around `c`;
    /// false when the ring lies wholly outside the grid.
    fn ring(&self, c: [usize; 2], r: usize, mut f: impl FnMut(&[u32])) -> bool {
        let [w, h] = self.dims.map(|d| d as isize);
        let (cx, cy, r) = (c[0] as isize, c[1] as isize, r as isize);
        let (x0, x1) = ((cx - r).max(0), (cx + r).min(w - 1));
        let (y0, y1) = ((cy - r).max(0), (cy + r).min(h - 1));
        if x0 > x1 || y0 > y1 {
            return false;
        }
        let mut visit = |x: isize, y: isize| f(&self.cells[y as usize * self.dims[0] + x as usize]);
        if r == 0 {
            visit(cx, cy);
            return true;
        }
        // Only the ring's cells inside the grid: its two rows, then its two columns between them.
        let mut any = false;
        for y in [cy - r, cy + r] {
            if (0..h).contains(&y) {
                any = true;
                (x0..=x1).for_each(|x| visit(x, y));
            }
        }
        for x in [cx - r, cx + r] {
            if (0..w).contains(&x) {
                any = true;
                ((cy - r + 1).max(0)..=(cy + r - 1).min(h - 1)).for_each(|y| visit(x, y));
            }
        }
        any
    }
}

/// Size sources in a grid: the graded size anywhere from the nearby ones.
#[derive(Clone, Debug)]
pub struct SourceIndex {
    sources: Vec<SizeSource>,
    grid: Grid,
    /// The smallest size of any source: the bound that ends a ring search.
    min_size: f64,
}

impl SourceIndex {
    /// Indexes the sources.
    pub fn new(sources: Vec<SizeSource>) -> SourceIndex {
        let boxes: Vec<_> = sources
            .iter()
            .map(|s| ([s.a[0].min(s.b[0]), s.a[1].min(s.b[1])], [s.a[0].max(s.b[0]), s.a[1].max(s.b[1])]))
            .collect();
        let min_size = sources.iter().map(|s| s.size).fold(f64::INFINITY, f64::min);
        SourceIndex {
            grid: Grid::new(&boxes),
            sources,
            min_size,
        }
    }

    /// min over sources of size + (grading - 1) distance, and `max_size`:
    /// the same value as the brute-force minimum.
    pub fn size_at(&self, p: [f64; 2], grading: f64, max_size: f64) -> f64 {
        let g = grading - 1.0;
        let mut best = max_size;
        if self.sources.is_empty() {
            return best;
        }
        let c = self.grid.cell_of(p);
        let outside = self.grid.outside_distance(p);
        for r in 0.. {
            // Every item in ring r or beyond lies at least (r - 1) cells away
            // (and no nearer than the grid's box).
            let reach = ((r as f64 - 1.0).max(0.0) * self.grid.cell).max(outside);
            if self.min_size + g * reach >= best {
                break;
            }
            let inside = self.grid.ring(c, r, |items| {
                for &i in items {
                    let s = &self.sources[i as usize];
                    if s.size < best {
                        let d = point_segment_distance_squared(p, s.a, s.b).sqrt();
                        best = best.min(s.size + g * d);
                    }
                }
            });
            if !inside && r > self.grid.dims[0].max(self.grid.dims[1]) {
                break;
            }
        }
        best
    }
}

/// Part outlines in a grid of their boxes.
#[derive(Clone, Debug)]
pub struct PolygonIndex {
    grid: Grid,
    boxes: Vec<([f64; 2], [f64; 2])>,
    /// Row bands of each large outline's edges, for a point-in-polygon test
    /// that reads only the edges at the point's height.
    bands: Vec<Option<Bands>>,
    /// The part each ring belongs to (a part's outline and its holes).
    part_of: Vec<usize>,
}

/// Outlines with more vertices than this get row bands.
const BANDED_VERTICES: usize = 64;

/// An outline's edges by horizontal band: edge i is in every band its y-range meets.
#[derive(Clone, Debug)]
struct Bands {
    y0: f64,
    height: f64,
    rows: Vec<Vec<u32>>,
}

impl Bands {
    fn new(poly: &[[f64; 2]], lo: f64, hi: f64) -> Bands {
        let n = poly.len();
        let height = ((hi - lo) / n as f64).max(f64::MIN_POSITIVE);
        let mut rows = vec![Vec::new(); n];
        let row = |y: f64| (((y - lo) / height).floor().max(0.0) as usize).min(n - 1);
        for i in 0..n {
            let (a, b) = (poly[i], poly[(i + 1) % n]);
            for r in rows.iter_mut().take(row(a[1].max(b[1])) + 1).skip(row(a[1].min(b[1]))) {
                r.push(i as u32);
            }
        }
        Bands { y0: lo, height, rows }
    }

    /// Even-odd ray casting (and on-the-outline) over the edges of p's band:
    /// the same answer as `point_in_polygon`, which tests the same edges.
    fn contains(&self, poly: &[[f64; 2]], p: [f64; 2]) -> bool {
        let r = (((p[1] - self.y0) / self.height).floor().max(0.0) as usize).min(self.rows.len() - 1);
        point_in_edges(poly, self.rows[r].iter().map(|&i| i as usize), p)
    }
}

impl PolygonIndex {
    /// Indexes the rings (outlines and holes, each with its part) by their boxes.
    pub fn new(polygons: &[Vec<[f64; 2]>], part_of: &[usize]) -> PolygonIndex {
        let boxes: Vec<_> = polygons.iter().map(|p| crate::geometry::bbox(p.iter().copied())).collect();
        let bands = polygons
            .iter()
            .zip(&boxes)
            .map(|(p, (lo, hi))| (p.len() > BANDED_VERTICES).then(|| Bands::new(p, lo[1], hi[1])))
            .collect();
        PolygonIndex {
            grid: Grid::new(&boxes),
            boxes,
            bands,
            part_of: part_of.to_vec(),
        }
    }

    /// The parts that hold p, ascending: those with an odd number of their
    /// rings around p (inside the outline and in none of its holes; on a
    /// ring counts as inside it).
    pub fn containing(&self, polygons: &[Vec<[f64; 2]>], p: [f64; 2]) -> Vec<usize> {
        let mut rings = self.rings_containing(polygons, p);
        for r in &mut rings {
            *r = self.part_of[*r];
        }
        rings.sort_unstable();
        let mut parts = Vec::with_capacity(rings.len());
        for chunk in rings.chunk_by(|a, b| a == b) {
            if chunk.len() % 2 == 1 {
                parts.push(chunk[0]);
            }
        }
        parts
    }

    /// Indices of the rings that hold p (on the ring counts), ascending.
    fn rings_containing(&self, polygons: &[Vec<[f64; 2]>], p: [f64; 2]) -> Vec<usize> {
        if self.grid.outside_distance(p) > 0.0 {
            return Vec::new();
        }
        let c = self.grid.cell_of(p);
        let mut out: Vec<usize> = self.grid.cells[c[1] * self.grid.dims[0] + c[0]]
            .iter()
            .map(|&i| i as usize)
            .filter(|&i| {
                let (a, b) = self.boxes[i];
                let inside = |poly: &[[f64; 2]]| match &self.bands[i] {
                    Some(bands) => bands.contains(poly, p),
                    None => point_in_polygon(poly, p),
                };
                p[0] >= a[0] && p[0] <= b[0] && p[1] >= a[1] && p[1] <= b[1] && inside(&polygons[i])
            })
            .collect();
        out.sort_unstable();
        out
    }

    /// The last outline holding p (the part that covers the others there).
    pub fn last_containing(&self, polygons: &[Vec<[f64; 2]>], p: [f64; 2]) -> Option<usize> {
        self.containing(polygons, p).last().copied()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::size_field::size_at;

    /// Random-looking but fixed points (a Weyl sequence).
    fn points(n: usize, scale: f64) -> Vec<[f64; 2]> {
        (0..n)
            .map(|i| {
                let t = i as f64;
                [((t * 0.754_877_666).fract() - 0.3) * scale, ((t * 0.569_840_291).fract() - 0.3) * scale]
            })
            .collect()
    }

    #[test]
    fn indexed_size_equals_the_brute_force_minimum() {
        let pts = points(400, 10.0);
        let sources: Vec<SizeSource> = pts
            .windows(2)
            .enumerate()
            .map(|(i, w)| SizeSource {
                a: w[0],
                b: if i % 7 == 0 { w[0] } else { [w[0][0] + 0.3, w[0][1] - 0.2] },
                size: 0.05 + 0.01 * (i % 13) as f64,
            })
            .collect();
        let index = SourceIndex::new(sources.clone());
        for q in points(2000, 30.0) {
            for grading in [1.05, 1.3, 3.0] {
                let want = size_at(q, &sources, grading, 4.0);
                let got = index.size_at(q, grading, 4.0);
                assert!((want - got).abs() <= 1e-12 * want, "{q:?} g {grading}: {got} against {want}");
            }
        }
    }

    #[test]
    fn containing_finds_exactly_the_holding_outlines() {
        let squares: Vec<Vec<[f64; 2]>> = points(300, 20.0)
            .iter()
            .enumerate()
            .map(|(i, c)| {
                let h = 0.2 + 0.1 * (i % 9) as f64;
                vec![[c[0] - h, c[1] - h], [c[0] + h, c[1] - h], [c[0] + h, c[1] + h], [c[0] - h, c[1] + h]]
            })
            .collect();
        let mut outlines = squares;
        // Two large wavy outlines, tested through their bands.
        for (k, radius) in [(0, 8.0), (1, 3.0)] {
            let n = 5000 + 17 * k;
            outlines.push(
                (0..n)
                    .map(|i| {
                        let t = std::f64::consts::TAU * i as f64 / n as f64;
                        let r = radius + 0.4 * (37.0 * t).sin();
                        [r * t.cos() + 1.0, r * t.sin() - 2.0]
                    })
                    .collect(),
            );
        }
        let index = PolygonIndex::new(&outlines, &(0..outlines.len()).collect::<Vec<_>>());
        for q in points(3000, 25.0) {
            let want: Vec<usize> = (0..outlines.len()).filter(|&i| point_in_polygon(&outlines[i], q)).collect();
            assert_eq!(index.containing(&outlines, q), want, "{q:?}");
        }
    }
}
