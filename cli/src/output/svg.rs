//! SVG pictures drawn by hand (no system fonts needed): the mesh coloured by part.

use crate::case::Model;
use mesher::{Mesh, Region};

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
    for (t, tri) in mesh.triangles.iter().enumerate() {
        if !meets(tri) {
            continue;
        }
        let pts: Vec<String> = tri
            .iter()
            .map(|&n| {
                let (x, y) = tx(mesh.nodes[n]);
                format!("{x:.2},{y:.2}")
            })
            .collect();
        let part = match mesh.regions[t] {
            Region::Part(i) => Some(i),
            Region::Air => None,
        };
        s += &format!("<polygon points=\"{}\" fill=\"{}\"/>", pts.join(" "), part_colour(part));
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
pub struct Chart<'a> {
    pub title: &'a str,
    pub x_label: &'a str,
    pub y_label: &'a str,
    pub series: Vec<(String, Vec<[f64; 2]>)>,
    /// Series drawn as dots rather than lines.
    pub scatter: Vec<(String, Vec<[f64; 2]>)>,
    /// Horizontal reference lines (value, label).
    pub marks: Vec<(f64, String)>,
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
    let pts = c
        .series
        .iter()
        .flat_map(|s| s.1.iter().copied())
        .filter(|p| p[0].is_finite() && p[1].is_finite());
    let (mut lo, mut hi) = bbox(pts.chain(c.marks.iter().map(|m| [f64::NAN, m.0]).filter(|p| p[1].is_finite())));
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
    for t in nice_ticks(lo[1], hi[1]) {
        s += &format!(
            "<line x1=\"{0}\" y1=\"{1:.1}\" x2=\"{2}\" y2=\"{1:.1}\" stroke=\"#222\"/><text x=\"{3}\" y=\"{4:.1}\" text-anchor=\"end\">{5}</text>",
            ml - 5.0,
            sy(t),
            ml,
            ml - 8.0,
            sy(t) + 4.0,
            fmt_tick(t)
        );
    }
    s += &format!(
        "<text class=\"xlabel\" x=\"{}\" y=\"{}\" text-anchor=\"middle\">{}</text>",
        (ml + w - mr) / 2.0,
        h - 15.0,
        escape(c.x_label)
    );
    s += &format!(
        "<text class=\"ylabel\" transform=\"translate(18 {}) rotate(-90)\" text-anchor=\"middle\">{}</text>",
        (mt + h - mb) / 2.0,
        escape(c.y_label)
    );
    for (value, label) in &c.marks {
        s += &format!("<line x1=\"{ml}\" y1=\"{0:.1}\" x2=\"{1}\" y2=\"{0:.1}\" stroke=\"#aa3377\" stroke-dasharray=\"6 4\"/><text x=\"{2}\" y=\"{3:.1}\" text-anchor=\"end\" fill=\"#aa3377\">{4}</text>", sy(*value), w - mr, w - mr - 4.0, sy(*value) - 4.0, escape(label));
    }
    for (k, (name, pts)) in c.series.iter().enumerate() {
        let colour = part_colour(Some(k));
        let path: Vec<String> = pts
            .iter()
            .filter(|p| p[0].is_finite() && p[1].is_finite())
            .map(|p| format!("{:.1},{:.1}", sx(p[0]), sy(p[1])))
            .collect();
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
        for p in pts.iter().filter(|p| p[0].is_finite() && p[1].is_finite()) {
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

fn fmt_tick(v: f64) -> String {
    if v == 0.0 {
        "0".into()
    } else if v.abs() >= 1e4 || v.abs() < 1e-2 {
        format!("{v:.1e}")
    } else {
        format!("{}", (v * 1e6).round() / 1e6)
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
            })
        }
        _ => chart(&Chart {
            title: &format!("{}: linear", e.name),
            x_label: "H (kA/m)",
            y_label: "B (T)",
            series: Vec::new(),
            scatter: Vec::new(),
            marks: Vec::new(),
        }),
    }
}
