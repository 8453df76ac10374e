//! The field map: |B| per triangle in a perceptually uniform colour map,
//! flux lines as contours of the flux function, part outlines, a colour bar
//! with units, and the symmetry axis marked.

use super::svg::escape;
use crate::case::Model;
use mesher::{BoundaryTag, Symmetry};
use rayon::prelude::*;
use solver::Solution;

/// Perceptually uniform sequential map (viridis, the CC0 colour map of
/// S. van der Walt and N. Smith, 2015), sampled at nine stops.
const STOPS: [[f64; 3]; 9] = [
    [68.0, 1.0, 84.0],
    [71.0, 44.0, 122.0],
    [59.0, 81.0, 139.0],
    [44.0, 113.0, 142.0],
    [33.0, 144.0, 141.0],
    [39.0, 173.0, 129.0],
    [92.0, 200.0, 99.0],
    [170.0, 220.0, 50.0],
    [253.0, 231.0, 37.0],
];

pub fn colour(t: f64) -> String {
    let t = t.clamp(0.0, 1.0) * (STOPS.len() - 1) as f64;
    let k = (t.floor() as usize).min(STOPS.len() - 2);
    let f = t - k as f64;
    let c = [0, 1, 2].map(|i| (STOPS[k][i] + f * (STOPS[k + 1][i] - STOPS[k][i])).round() as u8);
    format!("#{:02x}{:02x}{:02x}", c[0], c[1], c[2])
}

/// Pixels per colour cell of the field map.
const CELL: f64 = 3.0;
/// Colour levels of the field map.
const LEVELS: f64 = 48.0;

/// The field map of the region around the parts.
pub fn field_map(model: &Model, sol: &Solution) -> String {
    let mesh = sol.problem.mesh;
    let part_pts = mesh
        .triangles
        .iter()
        .zip(&mesh.regions)
        .filter(|(_, r)| matches!(r, mesher::Region::Part(_)))
        .flat_map(|(t, _)| t.map(|n| mesh.nodes[n]));
    let (mut lo, mut hi) = mesher::geometry::bbox(part_pts);
    let pad = 0.4 * (hi[0] - lo[0]).max(hi[1] - lo[1]);
    lo = [lo[0] - pad, lo[1] - pad];
    hi = [hi[0] + pad, hi[1] + pad];
    if model.symmetry == Symmetry::Axisymmetric {
        lo[0] = 0.0;
    }
    let (w, bar) = (760.0, 150.0);
    let scale = w / (hi[0] - lo[0]).max(hi[1] - lo[1]);
    let (pw, ph) = ((hi[0] - lo[0]) * scale, (hi[1] - lo[1]) * scale);
    let tx = |p: [f64; 2]| ((p[0] - lo[0]) * scale, ph - (p[1] - lo[1]) * scale);
    // |B| and the flux function on a grid of CELL-pixel squares (runs of
    // equal colour merged below): far smaller than one polygon per
    // triangle, and the same picture. Tens of thousands of point searches,
    // so the rows are sampled in parallel, each along its row from the
    // previous sample's element.
    let (nx, ny) = ((pw / CELL).ceil() as usize, (ph / CELL).ceil() as usize);
    let axisymmetric = model.symmetry == Symmetry::Axisymmetric;
    let samples: Vec<Option<([f64; 2], f64)>> = (0..ny)
        .into_par_iter()
        .flat_map_iter(|j| {
            let mut hint = None;
            (0..nx).map(move |i| {
                let p = [lo[0] + (i as f64 + 0.5) * CELL / scale, hi[1] - (j as f64 + 0.5) * CELL / scale];
                sol.b_and_potential_near(p, &mut hint)
                    .map(|(b, a)| (b, if axisymmetric { a * p[0] } else { a }))
            })
        })
        .collect();
    let mut grid: Vec<f64> = samples.iter().map(|s| s.map_or(f64::NAN, |(b, _)| b[0].hypot(b[1]))).collect();
    let psi: Vec<f64> = samples.iter().map(|s| s.map_or(f64::NAN, |(_, a)| a)).collect();
    let mut sorted: Vec<f64> = grid.iter().copied().filter(|v| v.is_finite()).collect();
    spread_into_empty_cells(&mut grid, nx, ny);
    sorted.sort_by(f64::total_cmp);
    let peak = sorted.last().copied().unwrap_or(0.0);
    let scale_of = ColourScale::new(model, &sorted);
    let level = |v: f64| {
        if v.is_finite() {
            (scale_of.position(v) * LEVELS).round() as i64
        } else {
            -1
        }
    };
    let mut s = format!(
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="{:.0}" height="{:.0}" viewBox="0 0 {:.0} {:.0}" font-family="sans-serif" font-size="12">"#,
        pw + bar,
        ph + 30.0,
        pw + bar,
        ph + 30.0
    );
    s += &format!(
        "<title>{}: |B| and flux lines</title><g class=\"field\" shape-rendering=\"crispEdges\">",
        escape(&model.title)
    );
    for j in 0..ny {
        let mut i = 0;
        while i < nx {
            let l = level(grid[j * nx + i]);
            let mut k = i + 1;
            while k < nx && level(grid[j * nx + k]) == l {
                k += 1;
            }
            if l >= 0 {
                let c = colour(l as f64 / LEVELS);
                s += &format!(
                    "<rect x=\"{:.0}\" y=\"{:.0}\" width=\"{:.0}\" height=\"{:.1}\" fill=\"{c}\"/>",
                    i as f64 * CELL,
                    j as f64 * CELL,
                    (k - i) as f64 * CELL + 0.5,
                    CELL + 0.5
                );
            }
            i = k;
        }
    }
    s += "</g>";
    s += &domain_edge(mesh, &tx, pw, ph);
    s += &flux_lines(&psi, nx, ny);
    s += "<g class=\"outlines\" stroke=\"white\" stroke-width=\"1.2\">";
    for (e, tag) in &mesh.boundary {
        if let BoundaryTag::Interface(..) = tag {
            let (a, b) = (tx(mesh.nodes[e[0]]), tx(mesh.nodes[e[1]]));
            if a.0.max(b.0) >= 0.0 && a.0.min(b.0) <= pw && a.1.max(b.1) >= 0.0 && a.1.min(b.1) <= ph {
                s += &format!("<line x1=\"{:.1}\" y1=\"{:.1}\" x2=\"{:.1}\" y2=\"{:.1}\"/>", a.0, a.1, b.0, b.1);
            }
        }
    }
    s += "</g>";
    // Mask what pokes out of the view (plain rectangles: renderers differ on clip paths).
    s += &format!("<rect x=\"{pw:.1}\" y=\"-1\" width=\"{bar}\" height=\"{:.1}\" fill=\"white\"/><rect x=\"-1\" y=\"{ph:.1}\" width=\"{:.1}\" height=\"31\" fill=\"white\"/>", ph + 32.0, pw + bar + 2.0);
    if model.symmetry == Symmetry::Axisymmetric {
        s += &format!("<g class=\"axis\"><line x1=\"1\" y1=\"0\" x2=\"1\" y2=\"{ph:.1}\" stroke=\"#ff4040\" stroke-width=\"2\" stroke-dasharray=\"8 4\"/><text x=\"6\" y=\"{:.1}\" fill=\"#ff4040\">axis r = 0</text></g>", ph - 6.0);
    }
    s += &colour_bar(pw + 20.0, 10.0, ph - 20.0, &scale_of, peak);
    let (u, f) = (&model.length_unit.0, model.length_unit.1);
    s += &format!(
        "<text x=\"10\" y=\"{:.0}\">view {:.1} x {:.1} {u}; {} </text>",
        ph + 20.0,
        (hi[0] - lo[0]) / f,
        (hi[1] - lo[1]) / f,
        if model.symmetry == Symmetry::Axisymmetric {
            "r to the right, z up"
        } else {
            "x to the right, y up"
        }
    );
    s += &scale_bar(pw, ph, scale, model.length_unit.1, &model.length_unit.0);
    s += "</svg>\n";
    s
}

/// A scale bar under the map, right-aligned: a round length (1, 2 or 5
/// times a power of ten in the case's length unit) near a fifth of the
/// view's width, drawn to scale and labelled.
fn scale_bar(pw: f64, ph: f64, px_per_m: f64, unit_m: f64, unit: &str) -> String {
    let target = pw / 5.0 / px_per_m / unit_m;
    let mag = 10f64.powf(target.log10().floor());
    let len = [5.0, 2.0, 1.0].iter().map(|m| m * mag).find(|l| *l <= target).unwrap_or(mag);
    let px = len * unit_m * px_per_m;
    let (x0, y) = (pw - px - 10.0, ph + 16.0);
    format!(
        "<g class=\"scale-bar\"><path d=\"M{x0:.1},{:.1}V{y:.1}H{:.1}V{:.1}\" fill=\"none\" stroke=\"#222\" stroke-width=\"1.5\"/><text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"end\">{} {unit}</text></g>",
        y - 5.0,
        x0 + px,
        y - 5.0,
        x0 - 6.0,
        y + 4.0,
        (len * 1e6).round() / 1e6
    )
}

/// Gives each empty cell (its centre outside the domain) next to a filled
/// one that neighbour's value, twice over: the cells the domain's edge cuts
/// are then coloured to their far side, and the mask of `domain_edge` draws
/// the edge itself as a smooth line instead of a staircase of cells.
fn spread_into_empty_cells(grid: &mut [f64], nx: usize, ny: usize) {
    for _ in 0..2 {
        let before = grid.to_vec();
        for j in 0..ny {
            for i in 0..nx {
                if before[j * nx + i].is_finite() {
                    continue;
                }
                let near = [(i.wrapping_sub(1), j), (i + 1, j), (i, j.wrapping_sub(1)), (i, j + 1)];
                if let Some(v) = near
                    .iter()
                    .filter(|(a, b)| *a < nx && *b < ny)
                    .map(|(a, b)| before[b * nx + a])
                    .find(|v| v.is_finite())
                {
                    grid[j * nx + i] = v;
                }
            }
        }
    }
}

/// White over everything outside the domain (the view's rectangle less the
/// domain's outline, even-odd), and the outline drawn: the open boundary's
/// rim as a circle, not as the cells' staircase.
fn domain_edge(mesh: &mesher::Mesh, tx: &dyn Fn([f64; 2]) -> (f64, f64), pw: f64, ph: f64) -> String {
    let loops = outline_loops(mesh);
    if loops.is_empty() {
        return String::new();
    }
    let path: String = loops
        .iter()
        .map(|l| {
            let pts: Vec<String> = l.iter().map(|&n| tx(mesh.nodes[n])).map(|(x, y)| format!("{x:.1},{y:.1}")).collect();
            format!("M{}Z", pts.join("L"))
        })
        .collect();
    let rect = format!("M-2,-2H{:.1}V{:.1}H-2Z", pw + 2.0, ph + 2.0);
    format!("<path class=\"outside\" fill=\"white\" fill-rule=\"evenodd\" d=\"{rect}{path}\"/><path class=\"domain-edge\" fill=\"none\" stroke=\"#888\" stroke-width=\"1\" d=\"{path}\"/>")
}

/// The domain's outer outline as closed loops of node indices: the edges on
/// the rim, the flux-parallel box and the axis, chained end to end.
fn outline_loops(mesh: &mesher::Mesh) -> Vec<Vec<usize>> {
    let mut next: std::collections::HashMap<usize, Vec<usize>> = std::collections::HashMap::new();
    for (e, tag) in &mesh.boundary {
        if matches!(
            tag,
            BoundaryTag::Rim | BoundaryTag::Outer | BoundaryTag::Axis | BoundaryTag::Mirror { .. } | BoundaryTag::Periodic { .. }
        ) {
            next.entry(e[0]).or_default().push(e[1]);
            next.entry(e[1]).or_default().push(e[0]);
        }
    }
    let mut used = std::collections::HashSet::new();
    let mut loops = Vec::new();
    let mut starts: Vec<usize> = next.keys().copied().collect();
    starts.sort_unstable();
    for start in starts {
        if used.contains(&start) {
            continue;
        }
        let (mut l, mut at) = (vec![start], start);
        used.insert(start);
        while let Some(&n) = next.get(&at).and_then(|v| v.iter().find(|n| !used.contains(*n))) {
            used.insert(n);
            l.push(n);
            at = n;
        }
        if l.len() > 2 {
            loops.push(l);
        }
    }
    loops
}

/// How |B| maps to a colour: linear from 0, or logarithmic over three
/// decades, up to the 99th percentile of the view (or the case's
/// `field_range`). Values beyond the top take the top colour.
struct ColourScale {
    lo: f64,
    hi: f64,
    log: bool,
}

impl ColourScale {
    fn new(model: &Model, sorted: &[f64]) -> ColourScale {
        let p99 = sorted.get(sorted.len() * 99 / 100).copied().unwrap_or(1.0).max(1e-12);
        let log = model.output.log_scale;
        let (lo, hi) = match model.output.field_range {
            Some(r) => r,
            None if log => ((p99 / 1e3).max(1e-9), p99),
            None => (0.0, p99),
        };
        ColourScale { lo, hi, log }
    }

    /// Position of |B| on the scale, 0 to 1.
    fn position(&self, v: f64) -> f64 {
        let t = if self.log {
            (v.max(self.lo).ln() - self.lo.ln()) / (self.hi.ln() - self.lo.ln())
        } else {
            (v - self.lo) / (self.hi - self.lo)
        };
        t.clamp(0.0, 1.0)
    }

    /// |B| at a position on the scale.
    fn value(&self, t: f64) -> f64 {
        if self.log {
            (self.lo.ln() + t * (self.hi.ln() - self.lo.ln())).exp()
        } else {
            self.lo + t * (self.hi - self.lo)
        }
    }
}

/// The colour bar with five labels in engineering notation; when the peak
/// lies above the top colour, the top label says so and the peak is given
/// (the bar topped out at 1.595 T while the peak was 2.205 T, unremarked).
fn colour_bar(x: f64, y: f64, h: f64, scale: &ColourScale, peak: f64) -> String {
    let mut s = String::from("<g class=\"colourbar\">");
    let n = 50;
    for i in 0..n {
        let t = 1.0 - i as f64 / n as f64;
        s += &format!(
            "<rect x=\"{x:.1}\" y=\"{:.1}\" width=\"20\" height=\"{:.2}\" fill=\"{}\"/>",
            y + h * i as f64 / n as f64,
            h / n as f64 + 0.5,
            colour(t)
        );
    }
    let clipped = peak > scale.hi * (1.0 + 1e-9);
    for k in 0..=4 {
        let v = scale.value(k as f64 / 4.0);
        let mark = if k == 4 && clipped { "\u{2265} " } else { "" };
        s += &format!(
            "<text x=\"{:.1}\" y=\"{:.1}\">{mark}{}</text>",
            x + 24.0,
            y + h * (1.0 - k as f64 / 4.0) + 4.0,
            escape(&super::engineering::eng(v, "T"))
        );
    }
    let kind = if scale.log { "log scale" } else { "linear scale" };
    s += &format!("<text x=\"{x:.1}\" y=\"{:.1}\">|B|, {kind}</text>", y + h + 16.0);
    if clipped {
        s += &format!(
            "<text x=\"{x:.1}\" y=\"{:.1}\">peak {} (local)</text>",
            y + h + 30.0,
            escape(&super::engineering::eng(peak, "T"))
        );
    }
    s + "</g>"
}

/// Flux lines: 23 contours of the flux function (A_z planar, r A_phi
/// axisymmetric) by marching squares over the grid of cell centres, one
/// path per level. Per-triangle segments were most of the picture's bytes
/// on fine meshes, where a triangle is smaller than a pixel. The grid is
/// walked once, each cell visiting only the levels between its corners'
/// least and greatest values (walking it once per level, 23 times, was 4 %
/// of a sweep's time; the picture is the same to the byte).
fn flux_lines(psi: &[f64], nx: usize, ny: usize) -> String {
    use std::fmt::Write;
    let (lo, hi) = psi
        .iter()
        .filter(|v| v.is_finite())
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &v| (a.min(v), b.max(v)));
    let mut s = String::from("<g class=\"fluxlines\" stroke=\"black\" stroke-width=\"0.8\" fill=\"none\">");
    // Also false when no sample was finite (lo and hi still infinite).
    if hi.partial_cmp(&lo) != Some(std::cmp::Ordering::Greater) {
        return s + "</g>";
    }
    const LEVELS: usize = 24;
    let level_at = |k: usize| lo + (hi - lo) * k as f64 / LEVELS as f64;
    let at = |i: usize, j: usize| psi[j * nx + i];
    let centre = |i: f64, j: f64| ((i + 0.5) * CELL, (j + 0.5) * CELL);
    let mut paths = vec![String::new(); LEVELS];
    for j in 0..ny.saturating_sub(1) {
        for i in 0..nx.saturating_sub(1) {
            // Corners counter-clockwise from the top left; each edge cut once at most.
            let c = [(i, j), (i + 1, j), (i + 1, j + 1), (i, j + 1)];
            let v = c.map(|(a, b)| at(a, b));
            if v.iter().any(|x| !x.is_finite()) {
                continue;
            }
            let (vmin, vmax) = v.iter().fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &x| (a.min(x), b.max(x)));
            // Levels strictly inside (vmin, vmax) are the only ones a cell's edge can cross.
            let first = (((vmin - lo) / (hi - lo) * LEVELS as f64).floor().max(0.0) as usize).max(1);
            for (k, d) in paths.iter_mut().enumerate().take(LEVELS).skip(first) {
                let level = level_at(k);
                if level >= vmax {
                    break;
                }
                let mut cuts = [(0.0, 0.0); 4];
                let mut n = 0;
                for e in 0..4 {
                    let (va, vb) = (v[e], v[(e + 1) % 4]);
                    if (va - level) * (vb - level) < 0.0 {
                        let f = (level - va) / (vb - va);
                        let ((ia, ja), (ib, jb)) = (c[e], c[(e + 1) % 4]);
                        cuts[n] = centre(ia as f64 + f * (ib as f64 - ia as f64), ja as f64 + f * (jb as f64 - ja as f64));
                        n += 1;
                    }
                }
                for pair in cuts[..n].chunks_exact(2) {
                    let _ = write!(d, "M{:.1} {:.1}L{:.1} {:.1}", pair[0].0, pair[0].1, pair[1].0, pair[1].1);
                }
            }
        }
    }
    for d in paths.iter().filter(|d| !d.is_empty()) {
        let _ = write!(s, "<path d=\"{d}\"/>");
    }
    s + "</g>"
}
