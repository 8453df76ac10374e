//! Every picture of a solved study, as (file name, title, SVG text).

use super::svg::{chart, Chart, ChartAxis};
use solver::Solution;
use study::materials::{bh_points, h_at, Material};
use study::model::{Model, ProbeShape};
use study::results::Results;

pub fn pictures(model: &Model, sol: &Solution, r: &Results) -> Vec<(String, String, String)> {
    let mut out = vec![(
        "field-map.svg".to_string(),
        "field map: |B| and flux lines".to_string(),
        super::fieldmap::field_map(model, sol),
    )];
    let (u, f) = (&model.length_unit.0, model.length_unit.1);
    for p in &model.probes {
        let ProbeShape::Line { .. } = p.shape else { continue };
        let Some(pr) = r.probes.get(&p.name) else { continue };
        let start = pr.points[0];
        let pts: Vec<[f64; 2]> = pr
            .points
            .iter()
            .zip(&pr.bmag)
            .map(|(q, b)| [(q[0] - start[0]).hypot(q[1] - start[1]) / f, b * 1e3])
            .collect();
        let axis = ChartAxis::of(&model.output);
        let values: Vec<f64> = pts.iter().map(|p| p[1]).collect();
        let marks = axis.implant_mark(&values, 1e3);
        let title = format!("probe {}: |B| along the line", p.name);
        let svg = chart(&Chart {
            title: &title,
            x_label: &format!("distance ({u})"),
            y_label: "|B| (mT)",
            series: vec![("|B|".into(), pts)],
            scatter: Vec::new(),
            marks,
            log_y: axis.log_for(values.iter().copied()),
            y_range: axis.flux_range_in(1e3),
        });
        out.push((format!("probe-{}.svg", p.name), title, svg));
    }
    for p in &model.parts {
        match &p.material.material {
            Material::Soft { curve } => {
                let Some(pr) = r.parts.get(&p.name) else { continue };
                let top = pr.b_max.max(curve.last().map_or(2.0, |q| q[1]));
                let kilo = |v: Vec<[f64; 2]>| v.into_iter().map(|[h, b]| [h / 1e3, b]).collect::<Vec<_>>();
                let (Some(line), Some(ops)) = (bh_points(curve, top, 200), h_at(curve, &[pr.b_mean, pr.b_max])) else {
                    continue;
                };
                let (line, ops) = (kilo(line), kilo(ops));
                let title = format!("part {} ({}): B-H curve and operating range (mean, peak)", p.name, p.material.name);
                let svg = chart(&Chart {
                    title: &title,
                    x_label: "H (kA/m)",
                    y_label: "B (T)",
                    series: vec![("B-H curve".into(), line)],
                    scatter: vec![("mean and peak |B|".into(), ops)],
                    marks: Vec::new(),
                    ..Default::default()
                });
                out.push((format!("bh-{}.svg", p.name), title, svg));
            }
            Material::Magnet(g) => {
                let Some(m) = r.magnets.get(&p.name) else { continue };
                let knee = m.knee_h_a_per_m;
                let line = vec![[knee / 1e3, g.recoil_b(knee, model.temperature)], [0.0, g.br_at(model.temperature)]];
                let step = (m.points.len() / 400).max(1);
                let pts: Vec<[f64; 2]> = m.points.iter().step_by(step).map(|q| [q[0] / 1e3, q[1]]).collect();
                let title = format!(
                    "magnet {} ({}) at {} degC: working points on the recoil line",
                    p.name, p.material.name, model.temperature
                );
                let svg = chart(&Chart {
                    title: &title,
                    x_label: "H along the magnetization (kA/m)",
                    y_label: "B along the magnetization (T)",
                    series: vec![("recoil line to the knee".into(), line)],
                    scatter: vec![("working points".into(), pts)],
                    marks: Vec::new(),
                    ..Default::default()
                });
                out.push((format!("magnet-{}.svg", p.name), title, svg));
            }
            _ => {}
        }
    }
    out
}
