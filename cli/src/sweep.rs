//! Sweep bookkeeping: a stable hash that tells whether a variant's results
//! are already whole, and the sweep table built from variant folders (so a
//! sharded run and an unsharded one give the same table).

use crate::output::svg::ChartAxis;
use crate::run::Variant;
use serde_json::Value;
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

/// FNV-1a 64-bit hash (stable across builds and machines).
pub fn fnv1a(bytes: &[u8], mut h: u64) -> u64 {
    for b in bytes {
        h ^= u64::from(*b);
        h = h.wrapping_mul(0x0100_0000_01b3);
    }
    h
}

pub fn case_hash(text: &str) -> u64 {
    fnv1a(text.as_bytes(), 0xcbf2_9ce4_8422_2325)
}

/// What identifies a variant's results: the resolved model (so an edit to
/// a file the case reads, a B-H table, changes it as surely as an edit to
/// the case) and the run it belongs to (the case text and the parameters
/// that are not swept, shared by every shard of one sweep). Two lines,
/// stored as `variant.hash`.
pub fn variant_key(case: u64, v: &Variant, model: &study::Model) -> String {
    let mut run = case;
    for (k, x) in v.params.iter().filter(|(k, _)| !v.swept.iter().any(|(s, _)| s == *k)) {
        run = fnv1a(k.as_bytes(), run);
        run = fnv1a(&x.to_bits().to_le_bytes(), run);
    }
    format!("model {:016x}\nrun {run:016x}\n", model_key(model))
}

/// A hash of what a model solves: its parameter values themselves are
/// left out, so two parameter sets whose models agree otherwise (one
/// differing only in a parameter nothing uses) share it.
pub fn model_key(model: &study::Model) -> u64 {
    let mut bare = model.clone();
    bare.params.clear();
    fnv1a(format!("{}{bare:?}", env!("CARGO_PKG_VERSION")).as_bytes(), 0xcbf2_9ce4_8422_2325)
}

/// The run line of a variant key.
fn run_of(key: &str) -> &str {
    key.lines().find(|l| l.starts_with("run ")).unwrap_or("")
}

/// True when the variant folder holds whole results of the same model.
pub fn is_whole(out: &Path, v: &Variant, key: &str) -> bool {
    let dir = out.join(&v.label);
    dir.join("results.json").is_file() && std::fs::read_to_string(dir.join("variant.hash")).is_ok_and(|h| h == key)
}

/// The rows of exactly these variants (label, key): folders of other runs,
/// or of a sweep that had more variants, are left out.
pub fn rows_of_run(out: &Path, variants: &[(&str, &str)]) -> Result<Vec<Row>, String> {
    let mut rows = Vec::new();
    for (label, key) in variants {
        let dir = out.join(label);
        if std::fs::read_to_string(dir.join("variant.hash")).is_ok_and(|h| h == *key) && dir.join("results.json").is_file() {
            rows.push(read_row(&dir.join("results.json"), key)?);
        }
    }
    Ok(rows)
}

/// One row of the sweep table.
#[derive(Clone, Debug, PartialEq)]
pub struct Row {
    pub index: usize,
    pub swept: Vec<(String, f64)>,
    pub values: BTreeMap<String, f64>,
    /// Estimated absolute error of each value that has one.
    pub errors: BTreeMap<String, f64>,
    /// Unit symbol of each value, from its type (empty for a ratio).
    pub units: BTreeMap<String, String>,
    /// The values the case asks for, in its order.
    pub asked: Vec<String>,
    pub converged: bool,
    /// Planar or axisymmetric.
    pub geometry: String,
    /// The run line of the variant's key.
    pub run: String,
    /// The variant's design warnings.
    pub warnings: Vec<String>,
}

impl Row {
    /// The variant's folder and swept values, as the summary names it.
    fn label(&self) -> String {
        crate::many_warnings::label(&format!("variant-{:04}", self.index), self.swept.iter().map(|(k, v)| (k.as_str(), *v)))
    }
}

/// The variants that warned, for the summary and the report.
pub fn warned(rows: &[Row]) -> Vec<crate::many_warnings::Warned> {
    rows.iter()
        .filter(|r| !r.warnings.is_empty())
        .map(|r| crate::many_warnings::Warned {
            label: r.label(),
            warnings: r.warnings.clone(),
        })
        .collect()
}

/// Reads every `variant-*` folder below the folders, for `merge`: each
/// must hold whole results, all of one run (the same case and settings,
/// hence one geometry), and a variant found twice must be the same model.
pub fn rows_from_folders(folders: &[PathBuf]) -> Result<Vec<Row>, String> {
    let mut found = Vec::new();
    for f in folders {
        variant_folders(f, &mut found, 0)?;
    }
    let mut rows: Vec<(Row, String)> = Vec::new();
    for dir in &found {
        let key = std::fs::read_to_string(dir.join("variant.hash")).unwrap_or_default();
        if !dir.join("results.json").is_file() || key.is_empty() {
            return Err(format!(
                "{} holds no whole results (results.json and variant.hash); solve that shard again before merging",
                dir.display()
            ));
        }
        rows.push((read_row(&dir.join("results.json"), &key)?, key));
    }
    let Some((first, _)) = rows.first() else {
        return Err("no variant results (variant-*/results.json) found".into());
    };
    let (run, geometry) = (first.run.clone(), first.geometry.clone());
    for ((r, _), dir) in rows.iter().zip(&found) {
        if r.run != run || r.geometry != geometry {
            return Err(format!(
                "{} comes from another run ({} study, {}) than {} ({} study, {}): merge only the shards of one sweep",
                dir.display(),
                r.geometry,
                r.run,
                found[0].display(),
                geometry,
                run
            ));
        }
    }
    rows.sort_by_key(|(r, _)| r.index);
    for pair in rows.windows(2) {
        if pair[0].0.index == pair[1].0.index && pair[0].1 != pair[1].1 {
            return Err(format!(
                "variant {} appears twice with different results; merge each shard once",
                pair[0].0.index
            ));
        }
    }
    let mut rows: Vec<Row> = rows.into_iter().map(|(r, _)| r).collect();
    rows.dedup_by_key(|r| r.index);
    Ok(rows)
}

fn variant_folders(dir: &Path, out: &mut Vec<PathBuf>, depth: usize) -> Result<(), String> {
    let entries = std::fs::read_dir(dir).map_err(|e| format!("cannot read {}: {e}", dir.display()))?;
    let mut paths: Vec<PathBuf> = entries.flatten().map(|e| e.path()).collect();
    paths.sort();
    for p in paths {
        let name = p.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default();
        if p.is_dir() && name.starts_with("variant-") {
            out.push(p);
        } else if p.is_dir() && depth < 2 {
            variant_folders(&p, out, depth + 1)?;
        }
    }
    Ok(())
}

fn read_row(file: &Path, key: &str) -> Result<Row, String> {
    let text = crate::input_file::read_text(file, "results file", 1 << 30)?;
    let v: Value = serde_json::from_str(&text).map_err(|e| format!("{} is not valid results JSON: {e}", file.display()))?;
    let variant: study::results::VariantInfo =
        serde_json::from_value(v["variant"].clone()).map_err(|e| format!("{}: no variant section: {e}", file.display()))?;
    let values: BTreeMap<String, f64> = v["values"]
        .as_object()
        .map(|m| m.iter().map(|(k, x)| (k.clone(), x.as_f64().unwrap_or(f64::NAN))).collect())
        .unwrap_or_default();
    let errors: BTreeMap<String, f64> = v["errors"]
        .as_object()
        .map(|m| m.iter().filter_map(|(k, x)| Some((k.clone(), x.as_f64()?))).collect())
        .unwrap_or_default();
    let units: BTreeMap<String, String> = v["units"]
        .as_object()
        .map(|m| m.iter().map(|(k, x)| (k.clone(), x.as_str().unwrap_or("").to_string())).collect())
        .unwrap_or_default();
    let strings = |x: &Value| -> Vec<String> {
        x.as_array()
            .map(|a| a.iter().filter_map(|x| x.as_str().map(str::to_string)).collect())
            .unwrap_or_default()
    };
    Ok(Row {
        warnings: strings(&v["warnings"]),
        asked: strings(&v["asked"]),
        index: variant.index,
        swept: variant.swept,
        values,
        errors,
        units,
        converged: v["solve"]["converged"].as_bool().unwrap_or(false),
        geometry: v["study"]["geometry"].as_str().unwrap_or("").to_string(),
        run: run_of(key).to_string(),
    })
}

/// A value's name with its unit as column headers write it: `name [unit]`,
/// or the bare name for a ratio (no physical unit).
fn header(rows: &[Row], name: &str, open: &str, close: &str) -> String {
    match rows.iter().find_map(|r| r.units.get(name)).map(String::as_str) {
        None | Some("") => name.to_string(),
        Some(u) => format!("{name} {open}{u}{close}"),
    }
}

/// The table: variant, swept parameters, converged, how many warnings the
/// variant gave, then every value (units in the header).
pub fn table(rows: &[Row]) -> String {
    let params: Vec<String> = rows.first().map(|r| r.swept.iter().map(|(k, _)| k.clone()).collect()).unwrap_or_default();
    let mut names: Vec<String> = rows.iter().flat_map(|r| r.values.keys().cloned()).collect();
    names.sort();
    names.dedup();
    let mut s = String::from("variant");
    for p in &params {
        s += &format!(",{p}");
    }
    s += ",converged,warnings";
    // Each value with an estimate gets its error in the next column.
    let with_error = |n: &String| rows.iter().any(|r| r.errors.contains_key(n));
    for n in &names {
        s += &format!(",{}", header(rows, n, "[", "]"));
        if with_error(n) {
            s += &format!(",{}", header(rows, n, "[", "]").replacen(n.as_str(), &format!("{n}.error"), 1));
        }
    }
    s.push('\n');
    for r in rows {
        s += &format!("{}", r.index);
        for p in &params {
            let v = r.swept.iter().find(|(k, _)| k == p).map_or(f64::NAN, |x| x.1);
            s += &format!(",{v}");
        }
        s += &format!(",{},{}", r.converged, r.warnings.len());
        for n in &names {
            s += &r.values.get(n).map_or_else(|| ",".to_string(), |v| format!(",{v:.9e}"));
            if with_error(n) {
                s += &r.errors.get(n).map_or_else(|| ",".to_string(), |e| format!(",{e:.3e}"));
            }
        }
        s.push('\n');
    }
    s
}

/// Charts of each value against the first swept parameter, one line per
/// value of the second (if any): (file name, value name, SVG).
pub fn charts(rows: &[Row], axis: &ChartAxis) -> Vec<(String, String, String)> {
    let Some(first) = rows.first() else { return Vec::new() };
    let Some((x_name, _)) = first.swept.first() else { return Vec::new() };
    let second = first.swept.get(1).map(|s| s.0.clone());
    // Charts of what the case asks for (its expectations, forces, fluxes and
    // probes), not of every value: a sweep drew 20 to 26 charts.
    let names = first.asked.clone();
    let mut out = Vec::new();
    for name in names.iter().take(MAX_CHARTS) {
        let mut groups: Vec<(f64, Vec<[f64; 2]>)> = Vec::new();
        for r in rows {
            let x = r.swept[0].1;
            let key = second.as_ref().and_then(|s| r.swept.iter().find(|(k, _)| k == s)).map_or(0.0, |p| p.1);
            let Some(&y) = r.values.get(name) else { continue };
            match groups.iter_mut().find(|g| g.0 == key) {
                Some(g) => g.1.push([x, y]),
                None => groups.push((key, vec![[x, y]])),
            }
        }
        let series: Vec<(String, Vec<[f64; 2]>)> = groups
            .into_iter()
            .map(|(k, mut pts)| {
                pts.sort_by(|a, b| a[0].total_cmp(&b[0]));
                (second.as_ref().map_or_else(|| name.clone(), |s| format!("{s} = {k}")), pts)
            })
            .collect();
        // In the unit's SI prefix for the largest value (mT, kN), as people read them.
        let unit = rows.iter().find_map(|r| r.units.get(name)).cloned().unwrap_or_default();
        let top = series.iter().flat_map(|s| s.1.iter().map(|p| p[1].abs())).fold(0.0, f64::max);
        let (exponent, prefix) = crate::output::engineering::prefix_of(top, &unit);
        let per = 10f64.powi(-exponent);
        let series: Vec<(String, Vec<[f64; 2]>)> = series
            .into_iter()
            .map(|(k, pts)| (k, pts.into_iter().map(|[x, y]| [x, y * per]).collect()))
            .collect();
        let values: Vec<f64> = series.iter().flat_map(|s| s.1.iter().map(|p| p[1])).collect();
        let flux = unit == "T";
        let y_label = if unit.is_empty() { name.clone() } else { format!("{name} ({prefix}{unit})") };
        let title = format!("{name} against {x_name}");
        let svg = crate::output::svg::chart(&crate::output::svg::Chart {
            title: &title,
            x_label: x_name,
            y_label: &y_label,
            series,
            marks: if flux { axis.implant_mark(&values, per) } else { Vec::new() },
            log_y: axis.log_for(values.iter().copied()),
            y_range: if flux { axis.flux_range_in(per) } else { None },
            ..Default::default()
        });
        out.push((format!("sweep-{}.svg", name.replace('.', "-")), name.clone(), svg));
    }
    out
}

/// Most charts a sweep draws.
const MAX_CHARTS: usize = 40;

/// sweep-report.md: the table of every variant and the charts.
pub fn report(rows: &[Row], charts: &[(String, String, String)]) -> String {
    let mut s = String::from("# Sweep\n\n");
    s += &format!(
        "{} variants. The full table with every value is sweep.csv; each variant's own report is in its folder.\n\n",
        rows.len()
    );
    let params: Vec<String> = rows.first().map(|r| r.swept.iter().map(|(k, _)| k.clone()).collect()).unwrap_or_default();
    // The columns lead with what the case asks for, in its order.
    let shown: Vec<&str> = rows.first().map(|r| r.asked.iter().map(String::as_str).take(8).collect()).unwrap_or_default();
    s += &format!(
        "| variant | {} | converged | {} |\n",
        params.join(" | "),
        shown.iter().map(|n| n.to_string()).collect::<Vec<_>>().join(" | ")
    );
    s += &format!("|---|{}---|{}\n", "---|".repeat(params.len()), "---|".repeat(shown.len()));
    for r in rows {
        // Swept values to six significant digits (a log-spaced 0.4472135955
        // reads 0.447214; sweep.csv keeps every digit).
        let p: Vec<String> = r.swept.iter().map(|(_, v)| crate::output::engineering::significant_digits(*v, 6)).collect();
        // Each value with its estimated error, as the summary shows it.
        let v: Vec<String> = shown
            .iter()
            .map(|n| {
                r.values.get(*n).map_or("-".into(), |x| {
                    crate::output::engineering::eng_pm(*x, r.errors.get(*n).copied(), r.units.get(*n).map_or("", String::as_str))
                })
            })
            .collect();
        s += &format!("| {} | {} | {} | {} |\n", r.index, p.join(" | "), r.converged, v.join(" | "));
    }
    s.push('\n');
    s += &crate::many_warnings::markdown("variants", rows.len(), &warned(rows));
    for (file, name, _) in charts {
        s += &format!("![{name}]({file})\n\n");
    }
    s += "Results are estimates from a 2D model; confirm them by measurement and qualified practice.\n";
    s
}

/// Every file that summarizes a sweep: the table, the charts and the report.
pub fn summary_files(rows: &[Row], axis: &ChartAxis) -> crate::output::FileSet {
    let charts = charts(rows, axis);
    let mut files: crate::output::FileSet = vec![
        ("sweep.csv".into(), table(rows).into_bytes()),
        ("sweep-report.md".into(), report(rows, &charts).into_bytes()),
    ];
    for (file, _, svg) in charts {
        files.push((file.into(), svg.into_bytes()));
    }
    files
}
