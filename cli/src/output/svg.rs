//! SVG pictures drawn by hand (no system fonts needed): the mesh coloured by part.

use crate::case::Model;
use mesher::{Mesh, Region};
use std::fmt::Write as _;

/// Colour of region `i` (air is light grey), from a qualitative palette.
pub fn part_colour(i: Option<usize>) -> &'static str {
    const PALETTE: &[&str] = &[
        "#4477aa", "#ee6677", "#228833", "#ccbb44", "#66ccee", "#aa3377", "#bbbbbb", "#ee8866", "#44bb99", "#99ddff",
    ];
    match i {
        None => "#f2f2f2",
        Some(i) => PALETTE[i % PALETTE.len()],
    }
}

/// Escapes text for XML.
pub fn escape(s: &str) -> String {
    s.replace('&', "&amp;").replace('<', "&lt;").replace('>', "&gt;").replace('"', "&quot;")
}

/// The window of mesh.svg: the parts and probes with half their extent
/// around them, within the meshed domain (the open boundary's disk is
/// several times wider than the parts, and drawn whole it left the parts a
/// small patch in a picture of empty air).
fn mesh_window(model: &Model, mesh: &Mesh) -> ([f64; 2], [f64; 2]) {
    let (dlo, dhi) = mesher::geometry::bbox(mesh.nodes[..mesh.n_physical].iter().copied());
    let part_points = mesh
        .triangles
        .iter()
        .zip(&mesh.regions)
        .filter(|(_, r)| matches!(r, Region::Part(_)))
        .flat_map(|(t, _)| t.map(|n| mesh.nodes[n]));
    let probe_points = model.probes.iter().flat_map(|p| match p.shape {
        study::model::ProbeShape::Point(x) => vec![x],
        study::model::ProbeShape::Line { from, to, .. } => vec![from, to],
    });
    let (lo, hi) = mesher::geometry::bbox(part_points.chain(probe_points));
    if !lo[0].is_finite() {
        return (dlo, dhi);
    }
    let pad = 0.5 * (hi[0] - lo[0]).max(hi[1] - lo[1]);
    (
        [(lo[0] - pad).max(dlo[0]), (lo[1] - pad).max(dlo[1])],
        [(hi[0] + pad).min(dhi[0]), (hi[1] + pad).min(dhi[1])],
    )
}

pub fn mesh_svg(model: &Model, mesh: &Mesh) -> String {
    let (lo, hi) = mesh_window(model, mesh);
    // A triangle is drawn when its bounding box meets the window (the clip path cuts it).
    let meets = |t: &[usize; 3]| {
        let (a, b) = mesher::geometry::bbox(t.iter().map(|&n| mesh.nodes[n]));
        a[0] <= hi[0] && b[0] >= lo[0] && a[1] <= hi[1] && b[1] >= lo[1]
    };
    let w = 800.0;
    let scale = w / (hi[0] - lo[0]).max(hi[1] - lo[1]).max(f64::MIN_POSITIVE);
    let hgt = (hi[1] - lo[1]) * scale;
    let tx = |p: [f64; 2]| ((p[0] - lo[0]) * scale, hgt - (p[1] - lo[1]) * scale);
    let legend_h = 20.0 * (model.parts.len() + 1) as f64 + 10.0;
    let mut s = format!(
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="{w:.0}" height="{:.0}" viewBox="0 0 {w:.0} {:.0}">"#,
        hgt + legend_h,
        hgt + legend_h
    );
    s += &format!(
        "<title>{}</title><clipPath id=\"window\"><rect width=\"{w:.0}\" height=\"{hgt:.0}\"/></clipPath><g stroke=\"#555\" stroke-width=\"0.3\" clip-path=\"url(#window)\">",
        escape(&model.title)
    );
    // One path per region, a closed subpath per triangle: the same
    // picture as a polygon per triangle, in fewer bytes and allocations
    // (a final mesh has tens of thousands of triangles).
    let mut paths: Vec<String> = vec![String::new(); model.parts.len() + 1];
    for (t, tri) in mesh.triangles.iter().enumerate() {
        if !meets(tri) {
            continue;
        }
        let slot = match mesh.regions[t] {
            Region::Part(i) => i + 1,
            Region::Air => 0,
        };
        let Some(d) = paths.get_mut(slot) else { continue };
        for (k, &n) in tri.iter().enumerate() {
            let (x, y) = tx(mesh.nodes[n]);
            let _ = write!(d, "{}{x:.2} {y:.2}", if k == 0 { 'M' } else { 'L' });
        }
        d.push('Z');
    }
    for (slot, d) in paths.iter().enumerate().filter(|(_, d)| !d.is_empty()) {
        s += &format!("<path d=\"{d}\" fill=\"{}\"/>", part_colour(slot.checked_sub(1)));
    }
    s += "</g><g font-family=\"sans-serif\" font-size=\"13\">";
    let mut y = hgt + 18.0;
    for (i, name) in std::iter::once("air".to_string())
        .chain(model.parts.iter().map(|p| format!("{} ({})", p.name, p.material.name)))
        .enumerate()
    {
        let c = part_colour(i.checked_sub(1));
        s += &format!(
            "<rect x=\"10\" y=\"{:.0}\" width=\"14\" height=\"14\" fill=\"{c}\" stroke=\"#333\"/><text x=\"30\" y=\"{:.0}\">{}</text>",
            y - 12.0,
            y,
            escape(&name)
        );
        y += 20.0;
    }
    s += "</g></svg>\n";
    s
}

/// A line chart: axes, ticks, labels and one or more series.
#[derive(Default)]
pub struct Chart<'a> {
    pub title: &'a str,
    pub x_label: &'a str,
    pub y_label: &'a str,
    pub series: Vec<(String, Vec<[f64; 2]>)>,
    /// Series drawn as dots rather than lines.
    pub scatter: Vec<(String, Vec<[f64; 2]>)>,
    /// Horizontal reference lines (value, label).
    pub marks: Vec<(f64, String)>,
    /// A logarithmic y axis (values at or below zero are left out): fields
    /// that fall over decades with distance stay readable at the far end.
    pub log_y: bool,
    /// The y axis's range, in the chart's units (None: from the data).
    /// Values beyond it are drawn at its edge.
    pub y_range: Option<[f64; 2]>,
}

/// How a chart's y axis is scaled, from `[output] chart_scale` and
/// `chart_range`.
#[derive(Clone, Copy, Debug, Default)]
pub struct ChartAxis {
    /// "log": always log; "linear": never; None ("auto"): log when every
    /// value is positive and they span more than two decades.
    pub log: Option<bool>,
    /// Flux-density range, T, for charts of flux density.
    pub flux_range: Option<(f64, f64)>,
}

impl ChartAxis {
    /// The axis settings of a case's `[output]`.
    pub fn of(o: &study::model::OutputFlags) -> Self {
        ChartAxis {
            log: o.chart_log,
            flux_range: o.chart_range,
        }
    }

    /// The 0.5 mT implant level as a mark, where a flux-density chart's
    /// values (in units of `per_tesla`) or its range reach across it.
    pub fn implant_mark(&self, values: &[f64], per_tesla: f64) -> Vec<(f64, String)> {
        let level = study::checks::IMPLANT_LEVEL * per_tesla;
        let (lo, hi) = values
            .iter()
            .filter(|v| v.is_finite())
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &v| (a.min(v), b.max(v)));
        let (lo, hi) = self.flux_range_in(per_tesla).map_or((lo, hi), |r| (r[0], r[1]));
        if lo <= level && level <= hi {
            vec![(level, "0.5 mT".to_string())]
        } else {
            Vec::new()
        }
    }
    /// Whether values like these are drawn on a log axis.
    pub fn log_for(&self, values: impl Iterator<Item = f64>) -> bool {
        self.log.unwrap_or_else(|| {
            let (mut lo, mut hi) = (f64::INFINITY, 0.0f64);
            for v in values.filter(|v| v.is_finite()) {
                if v <= 0.0 {
                    return false;
                }
                (lo, hi) = (lo.min(v), hi.max(v));
            }
            hi > 100.0 * lo
        })
    }

    /// The y range of a flux-density chart drawn in units of `per_tesla`
    /// (1e3 for mT).
    pub fn flux_range_in(&self, per_tesla: f64) -> Option<[f64; 2]> {
        self.flux_range.map(|(lo, hi)| [lo * per_tesla, hi * per_tesla])
    }
}

fn nice_ticks(lo: f64, hi: f64) -> Vec<f64> {
    let span = (hi - lo).abs().max(1e-300);
    let raw = span / 5.0;
    let mag = 10f64.powf(raw.log10().floor());
    let step = [1.0, 2.0, 5.0, 10.0].iter().map(|m| m * mag).find(|s| span / s <= 6.0).unwrap_or(10.0 * mag);
    let start = (lo / step).ceil() * step;
    (0..=12).map(|i| start + i as f64 * step).take_while(|v| *v <= hi + 1e-9 * span).collect()
}

pub fn chart(c: &Chart) -> String {
    let (w, h, ml, mr, mt, mb) = (720.0, 440.0, 80.0, 30.0, 40.0, 60.0);
    // Every y is drawn through `ty`: log10 on a log axis (None at or below
    // zero), clamped into the range when one is given.
    let range = c.y_range.map(|r| {
        if c.log_y {
            [r[0].max(f64::MIN_POSITIVE).log10(), r[1].max(f64::MIN_POSITIVE).log10()]
        } else {
            r
        }
    });
    let ty = |y: f64| -> Option<f64> {
        let t = if c.log_y { (y > 0.0).then(|| y.log10())? } else { y };
        t.is_finite().then(|| range.map_or(t, |r| t.clamp(r[0], r[1])))
    };
    let at = |p: &[f64; 2]| if p[0].is_finite() { ty(p[1]).map(|y| [p[0], y]) } else { None };
    let pts = c.series.iter().chain(&c.scatter).flat_map(|s| s.1.iter().filter_map(at));
    let (mut lo, mut hi) = bbox(pts.chain(c.marks.iter().filter_map(|m| ty(m.0)).map(|y| [f64::NAN, y])));
    if let Some(r) = range {
        (lo[1], hi[1]) = (r[0], r[1]);
    }
    if !lo[0].is_finite() {
        lo = [0.0, 0.0];
        hi = [1.0, 1.0];
    }
    if hi[0] <= lo[0] {
        hi[0] = lo[0] + 1.0;
    }
    if hi[1] <= lo[1] {
        hi[1] = lo[1] + 1.0;
    }
    let sx = |x: f64| ml + (x - lo[0]) / (hi[0] - lo[0]) * (w - ml - mr);
    let sy = |y: f64| h - mb - (y - lo[1]) / (hi[1] - lo[1]) * (h - mt - mb);
    let mut s = format!(r#"<svg xmlns="http://www.w3.org/2000/svg" width="{w}" height="{h}" viewBox="0 0 {w} {h}" font-family="sans-serif" font-size="12">"#);
    s += &format!(
        "<rect width=\"{w}\" height=\"{h}\" fill=\"white\"/><text x=\"{}\" y=\"22\" text-anchor=\"middle\" font-size=\"15\">{}</text>",
        w / 2.0,
        escape(c.title)
    );
    s += "<g class=\"axes\" stroke=\"#222\">";
    s += &format!(
        "<line x1=\"{ml}\" y1=\"{}\" x2=\"{}\" y2=\"{}\"/><line x1=\"{ml}\" y1=\"{mt}\" x2=\"{ml}\" y2=\"{}\"/></g>",
        h - mb,
        w - mr,
        h - mb,
        h - mb
    );
    for t in nice_ticks(lo[0], hi[0]) {
        s += &format!(
            "<line x1=\"{0:.1}\" y1=\"{1}\" x2=\"{0:.1}\" y2=\"{2}\" stroke=\"#222\"/><text x=\"{0:.1}\" y=\"{3}\" text-anchor=\"middle\">{4}</text>",
            sx(t),
            h - mb,
            h - mb + 5.0,
            h - mb + 18.0,
            fmt_tick(t)
        );
    }
    let y_ticks: Vec<(f64, f64)> = if c.log_y {
        log_ticks(lo[1], hi[1])
    } else {
        nice_ticks(lo[1], hi[1]).into_iter().map(|t| (t, t)).collect()
    };
    for (t, label) in y_ticks {
        s += &format!(
            "<line x1=\"{0}\" y1=\"{1:.1}\" x2=\"{2}\" y2=\"{1:.1}\" stroke=\"#222\"/><text x=\"{3}\" y=\"{4:.1}\" text-anchor=\"end\">{5}</text>",
            ml - 5.0,
            sy(t),
            ml,
            ml - 8.0,
            sy(t) + 4.0,
            fmt_tick(label)
        );
    }
    s += &format!(
        "<text class=\"xlabel\" x=\"{}\" y=\"{}\" text-anchor=\"middle\">{}</text>",
        (ml + w - mr) / 2.0,
        h - 15.0,
        escape(c.x_label)
    );
    s += &format!(
        "<text class=\"ylabel\" transform=\"translate(18 {}) rotate(-90)\" text-anchor=\"middle\">{}{}</text>",
        (mt + h - mb) / 2.0,
        escape(c.y_label),
        if c.log_y { ", log scale" } else { "" }
    );
    for (value, label) in c.marks.iter().filter_map(|(v, l)| Some((ty(*v)?, l))) {
        s += &format!("<line x1=\"{ml}\" y1=\"{0:.1}\" x2=\"{1}\" y2=\"{0:.1}\" stroke=\"#aa3377\" stroke-dasharray=\"6 4\"/><text x=\"{2}\" y=\"{3:.1}\" text-anchor=\"end\" fill=\"#aa3377\">{4}</text>", sy(value), w - mr, w - mr - 4.0, sy(value) - 4.0, escape(label));
    }
    for (k, (name, pts)) in c.series.iter().enumerate() {
        let colour = part_colour(Some(k));
        let path: Vec<String> = pts.iter().filter_map(at).map(|p| format!("{:.1},{:.1}", sx(p[0]), sy(p[1]))).collect();
        s += &format!(
            "<polyline class=\"series\" fill=\"none\" stroke=\"{colour}\" stroke-width=\"2\" points=\"{}\"/>",
            path.join(" ")
        );
        s += &format!(
            "<text x=\"{}\" y=\"{}\" fill=\"{colour}\">{}</text>",
            ml + 10.0,
            mt + 14.0 + 16.0 * k as f64,
            escape(name)
        );
    }
    for (k, (name, pts)) in c.scatter.iter().enumerate() {
        let colour = part_colour(Some(c.series.len() + k));
        s += "<g class=\"scatter\">";
        for p in pts.iter().filter_map(at) {
            s += &format!("<circle cx=\"{:.1}\" cy=\"{:.1}\" r=\"2\" fill=\"{colour}\"/>", sx(p[0]), sy(p[1]));
        }
        s += &format!(
            "</g><text x=\"{}\" y=\"{}\" fill=\"{colour}\">{}</text>",
            ml + 10.0,
            mt + 14.0 + 16.0 * (c.series.len() + k) as f64,
            escape(name)
        );
    }
    s += "</svg>\n";
    s
}

/// Ticks of a log axis between 10^lo and 10^hi: (position, value) at each
/// decade, and at 2 and 5 times it where the axis spans under three decades.
fn log_ticks(lo: f64, hi: f64) -> Vec<(f64, f64)> {
    let few = hi - lo < 3.0;
    let mut out = Vec::new();
    for k in (lo.floor() as i32)..=(hi.ceil() as i32) {
        for m in if few { &[1.0, 2.0, 5.0][..] } else { &[1.0][..] } {
            let v = m * 10f64.powi(k);
            let t = v.log10();
            if t >= lo - 1e-9 && t <= hi + 1e-9 {
                out.push((t, v));
            }
        }
    }
    out
}

/// A tick label in plain digits (0.005, 20000), never scientific notation
/// within the range charts meet; six significant digits at most.
fn fmt_tick(v: f64) -> String {
    if v == 0.0 {
        return "0".into();
    }
    if !(1e-9..1e12).contains(&v.abs()) {
        return format!("{v:.1e}");
    }
    let decimals = (5 - v.abs().log10().floor() as i32).clamp(0, 12) as usize;
    let s = format!("{v:.decimals$}");
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

use mesher::geometry::bbox;

/// The B-H curve of a soft material, or the normal demagnetization line of a magnet.
pub fn material_plot(e: &study::materials::Entry) -> String {
    use study::materials::Material;
    match &e.material {
        Material::Soft { curve } => {
            let bmax = curve.last().map_or(2.0, |p| p[1]) * 1.05;
            let pts: Vec<[f64; 2]> = study::materials::bh_points(curve, bmax, 200)
                .unwrap_or_default()
                .into_iter()
                .map(|[h, b]| [h / 1e3, b])
                .collect();
            let table: Vec<[f64; 2]> = curve.iter().map(|p| [p[0] / 1e3, p[1]]).collect();
            chart(&Chart {
                title: &format!("{}: B-H curve", e.name),
                x_label: "H (kA/m)",
                y_label: "B (T)",
                series: vec![("interpolated (Fritsch-Carlson)".into(), pts)],
                scatter: vec![("table points".into(), table)],
                marks: Vec::new(),
                ..Default::default()
            })
        }
        Material::Magnet(g) => {
            let temps = [20.0, 80.0, 150.0];
            let series = temps
                .iter()
                .map(|&t| (format!("{t} degC"), g.recoil_line(t).map(|[h, b]| [h / 1e3, b]).to_vec()))
                .collect();
            chart(&Chart {
                title: &format!("{}: recoil line to the knee", e.name),
                x_label: "H (kA/m)",
                y_label: "B (T)",
                series,
                scatter: Vec::new(),
                marks: Vec::new(),
                ..Default::default()
            })
        }
        _ => chart(&Chart {
            title: &format!("{}: linear", e.name),
            x_label: "H (kA/m)",
            y_label: "B (T)",
            series: Vec::new(),
            scatter: Vec::new(),
            marks: Vec::new(),
            ..Default::default()
        }),
    }
}

#[cfg(test)]
mod chart_tests {
    use super::*;

    /// A field falling from 300 mT to 0.1 mT with distance: the automatic
    /// axis goes log, and the 0.5 mT level (far below a linear axis's first
    /// tick) gets its own labelled line (issue 23, point 5).
    #[test]
    fn a_field_over_decades_gets_a_log_axis_and_the_implant_level() {
        let pts: Vec<[f64; 2]> = (0..50).map(|i| [i as f64, 300.0 * (-(i as f64) / 6.0).exp().max(1e-4) + 0.1]).collect();
        let values: Vec<f64> = pts.iter().map(|p| p[1]).collect();
        let axis = ChartAxis::default();
        assert!(axis.log_for(values.iter().copied()));
        assert!(!axis.log_for([1.0, 50.0].into_iter()), "under two decades stays linear");
        assert!(!axis.log_for([-1.0, 500.0].into_iter()), "a sign change stays linear");
        let marks = axis.implant_mark(&values, 1e3);
        assert_eq!(marks.len(), 1);
        let svg = chart(&Chart {
            title: "t",
            x_label: "x",
            y_label: "|B| (mT)",
            series: vec![("b".into(), pts)],
            marks,
            log_y: true,
            ..Default::default()
        });
        assert!(svg.contains("log scale") && svg.contains("0.5 mT"));
        for label in [">1<", ">10<", ">100<"] {
            assert!(svg.contains(label), "no decade tick {label}");
        }
    }

    /// A chart range clamps the axis to it, in the chart's units, whatever
    /// the data span.
    #[test]
    fn a_chart_range_sets_the_axis() {
        let axis = ChartAxis {
            log: Some(false),
            flux_range: Some((0.0, 0.2)),
        };
        let r = axis.flux_range_in(1e3).unwrap();
        assert_eq!(r, [0.0, 200.0]);
        let svg = chart(&Chart {
            series: vec![("b".into(), vec![[0.0, 10.0], [1.0, 900.0]])],
            y_range: Some(r),
            ..Default::default()
        });
        assert!(svg.contains(">200<") && !svg.contains(">900<"));
        assert_eq!(log_ticks(0.0, 1.0).iter().map(|t| t.1).collect::<Vec<_>>(), vec![1.0, 2.0, 5.0, 10.0]);
    }
}
