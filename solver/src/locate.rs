//! Point location in the physical triangles (or, for carrying a solution
//! to a refined mesh, the exterior's) with a uniform bucket grid.

use crate::space::Elements;
use std::ops::Range;

/// A bucket grid over a range of elements (the physical triangles unless told).
#[derive(Clone, Debug)]
pub struct Locator {
    origin: [f64; 2],
    cell: f64,
    dims: [usize; 2],
    start: Vec<usize>,
    items: Vec<usize>,
}

/// Barycentric coordinates may fall this far below zero and still count as inside.
const INSIDE_TOLERANCE: f64 = 1e-9;
/// A curved element is skipped without its Newton iteration when the point
/// lies this far beyond one of its straight edges (a hundredth of the
/// triangle's height: far past any rounding, so the elements kept and
/// their coordinates are those of the full test).
pub(crate) const OUTSIDE_MARGIN: f64 = 1e-2;

impl Locator {
    /// The grid over the physical triangles.
    pub fn new(els: &Elements) -> Locator {
        Locator::over(els, 0..els.n_physical)
    }

    /// The grid over the elements `elements` (in their own frame: mapped
    /// coordinates for the exterior).
    pub fn over(els: &Elements, elements: Range<usize>) -> Locator {
        let n = elements.len().max(1);
        let pts = els.coords[elements.clone()].iter().flatten();
        let (mut lo, mut hi) = ([f64::INFINITY; 2], [f64::NEG_INFINITY; 2]);
        for p in pts {
            for k in 0..2 {
                lo[k] = lo[k].min(p[k]);
                hi[k] = hi[k].max(p[k]);
            }
        }
        let extent = (hi[0] - lo[0]).max(hi[1] - lo[1]).max(f64::MIN_POSITIVE);
        let area = (hi[0] - lo[0]).max(1e-300) * (hi[1] - lo[1]).max(1e-300);
        let cell = (area / n as f64).sqrt().max(extent / 2048.0) * 2.0;
        let dims = [((hi[0] - lo[0]) / cell) as usize + 1, ((hi[1] - lo[1]) / cell) as usize + 1];
        let mut count = vec![0usize; dims[0] * dims[1] + 1];
        // A curved element reaches past its corners' box by its arc's bulge.
        let range = |e: usize| {
            let (x, out) = (&els.coords[e], els.geometry(e).bulge());
            let ix0 = ((x.iter().map(|p| p[0]).fold(f64::INFINITY, f64::min) - out - lo[0]).max(0.0) / cell) as usize;
            let ix1 = ((x.iter().map(|p| p[0]).fold(f64::NEG_INFINITY, f64::max) + out - lo[0]).max(0.0) / cell) as usize;
            let iy0 = ((x.iter().map(|p| p[1]).fold(f64::INFINITY, f64::min) - out - lo[1]).max(0.0) / cell) as usize;
            let iy1 = ((x.iter().map(|p| p[1]).fold(f64::NEG_INFINITY, f64::max) + out - lo[1]).max(0.0) / cell) as usize;
            (ix0.min(dims[0] - 1), ix1.min(dims[0] - 1), iy0.min(dims[1] - 1), iy1.min(dims[1] - 1))
        };
        for e in elements.clone() {
            let (x0, x1, y0, y1) = range(e);
            for iy in y0..=y1 {
                for ix in x0..=x1 {
                    count[iy * dims[0] + ix + 1] += 1;
                }
            }
        }
        for i in 1..count.len() {
            count[i] += count[i - 1];
        }
        let start = count.clone();
        let mut fill = count;
        let mut items = vec![0; start[start.len() - 1]];
        for e in elements {
            let (x0, x1, y0, y1) = range(e);
            for iy in y0..=y1 {
                for ix in x0..=x1 {
                    let c = iy * dims[0] + ix;
                    items[fill[c]] = e;
                    fill[c] += 1;
                }
            }
        }
        Locator {
            origin: lo,
            cell,
            dims,
            start,
            items,
        }
    }

    /// Every element whose box (arcs' bulge included) may overlap the box
    /// `lo`..`hi`, once each, in ascending order: the candidates of a local
    /// search without a scan of the whole mesh.
    pub fn overlapping(&self, lo: [f64; 2], hi: [f64; 2]) -> Vec<usize> {
        let cell = |v: f64, k: usize| (((v - self.origin[k]) / self.cell).max(0.0) as usize).min(self.dims[k] - 1);
        if !(lo.iter().chain(&hi).all(|v| v.is_finite())) {
            return Vec::new();
        }
        let (x0, x1, y0, y1) = (cell(lo[0], 0), cell(hi[0], 0), cell(lo[1], 1), cell(hi[1], 1));
        let mut out: Vec<usize> = (y0..=y1)
            .flat_map(|iy| (x0..=x1).map(move |ix| iy * self.dims[0] + ix))
            .flat_map(|c| self.items[self.start[c]..self.start[c + 1]].iter().copied())
            .collect();
        out.sort_unstable();
        out.dedup();
        out
    }

    /// Every triangle of the grid that contains p (on an edge: several),
    /// with barycentrics; an iterator, since every point search of a
    /// picture or a profile would otherwise allocate for one or two hits.
    pub fn containing<'a>(&'a self, els: &'a Elements, p: [f64; 2]) -> impl Iterator<Item = (usize, [f64; 3])> + 'a {
        let fx = (p[0] - self.origin[0]) / self.cell;
        let fy = (p[1] - self.origin[1]) / self.cell;
        let inside = fx.is_finite() && fy.is_finite() && fx >= -1e-9 && fy >= -1e-9;
        let (ix, iy) = ((fx.max(0.0)) as usize, (fy.max(0.0)) as usize);
        let items = if inside && ix < self.dims[0] && iy < self.dims[1] {
            let c = iy * self.dims[0] + ix;
            &self.items[self.start[c]..self.start[c + 1]]
        } else {
            &[]
        };
        items.iter().filter_map(move |&e| {
            let geometry = els.geometry(e);
            if geometry.is_curved() && geometry.clearly_outside(p, OUTSIDE_MARGIN) {
                return None;
            }
            let lam = geometry.barycentric(p);
            lam.iter().all(|&l| l >= -INSIDE_TOLERANCE).then(|| (e, lam.map(|l| l.max(0.0))))
        })
    }
}
