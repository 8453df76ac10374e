//! The work behind each command: load a case, expand its sweep, mesh,
//! solve, post-process and collect the files to write.

use crate::case::resolve::Spans;
use crate::case::{self, document::Item, Diagnostic, Model};
use crate::output::{self, FileSet};
use crate::progress::Progress;
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};
use std::time::Instant;
use study::results::{self, Results};
use study::run::Stage;
use study::StudyError;

/// How a run failed, which fixes the exit code.
#[derive(Debug)]
pub enum Failure {
    /// Exit 2: the input is wrong (message already rendered).
    Input(String),
    /// Exit 3: the solution did not converge.
    NotConverged(String),
}

impl Failure {
    pub fn exit_code(&self) -> i32 {
        match self {
            Failure::Input(_) => 2,
            Failure::NotConverged(_) => 3,
        }
    }

    pub fn message(&self) -> &str {
        match self {
            Failure::Input(m) | Failure::NotConverged(m) => m,
        }
    }
}

/// A case file read and parsed.
pub struct Loaded {
    pub path: PathBuf,
    pub text: String,
    pub doc: Item,
}

impl Loaded {
    pub fn input(&self, d: &Diagnostic) -> Failure {
        Failure::Input(case::render(&self.path.display().to_string(), &self.text, d))
    }

    pub fn dir(&self) -> PathBuf {
        self.path.parent().map_or_else(|| PathBuf::from("."), Path::to_path_buf)
    }

    pub fn stem(&self) -> String {
        self.path.file_stem().map_or_else(|| "case".into(), |s| s.to_string_lossy().into_owned())
    }
}

/// Largest case file read, bytes.
const MAX_CASE_BYTES: u64 = 16 << 20;

pub fn load(path: &Path) -> Result<Loaded, Failure> {
    let text = crate::input_file::read_text(path, "case file", MAX_CASE_BYTES).map_err(|e| Failure::Input(format!("error: {e}\n")))?;
    load_text(path, text)
}

/// A case from its text (the Python package's string or dict); `path`
/// names it in messages and anchors relative file names.
pub fn load_text(path: &Path, text: String) -> Result<Loaded, Failure> {
    let shown = path.display();
    if text.len() > MAX_CASE_BYTES as usize {
        return Err(Failure::Input(format!("error: {shown}: the case text is larger than {MAX_CASE_BYTES} bytes\n")));
    }
    if text.trim().is_empty() {
        return Err(Failure::Input(format!("error: {shown} is empty; a case needs at least one [[part]]\n")));
    }
    let doc = case::document::parse(&text).map_err(|d| Failure::Input(case::render(&shown.to_string(), &text, &d)))?;
    Ok(Loaded {
        path: path.to_path_buf(),
        text,
        doc,
    })
}

/// Most variants a sweep may have.
pub const MAX_VARIANTS: usize = 100_000;

/// One set of parameter values of a sweep, with its folder name.
#[derive(Clone, Debug)]
pub struct Variant {
    pub index: usize,
    pub label: String,
    pub params: BTreeMap<String, f64>,
    /// The swept parameters and their values in this variant.
    pub swept: Vec<(String, f64)>,
}

/// Every variant of the case: one without a sweep, else every combination.
pub fn variants(loaded: &Loaded, overrides: &BTreeMap<String, f64>) -> Result<Vec<Variant>, Failure> {
    let base = case::resolve::params(&loaded.doc, overrides).map_err(|d| loaded.input(&d))?;
    let sweep: Vec<(String, Vec<f64>)> = case::resolve::sweep(&loaded.doc)
        .map_err(|d| loaded.input(&d))?
        .into_iter()
        .filter(|(k, _)| !overrides.contains_key(k))
        .collect();
    // The count is checked before any combination is made: 4 x 1000 steps
    // were enumerated first (2.8 GB) and only then refused.
    let count = sweep.iter().try_fold(1usize, |n, (_, v)| n.checked_mul(v.len())).filter(|&n| n <= MAX_VARIANTS);
    let Some(count) = count else {
        let sizes: Vec<String> = sweep.iter().map(|(k, v)| format!("{k}: {}", v.len())).collect();
        return Err(Failure::Input(format!(
            "error: {}: the sweep's values multiply to more than {MAX_VARIANTS} variants ({}); sweep fewer values or split the case\n",
            loaded.path.display(),
            sizes.join(", ")
        )));
    };
    let mut combos: Vec<Vec<(String, f64)>> = Vec::with_capacity(count);
    combos.push(Vec::new());
    for (name, values) in &sweep {
        combos = combos
            .into_iter()
            .flat_map(|c| values.iter().map(move |v| [c.clone(), vec![(name.clone(), *v)]].concat()))
            .collect();
    }
    Ok(combos
        .into_iter()
        .enumerate()
        .map(|(index, swept)| {
            let mut params = base.clone();
            params.extend(swept.iter().cloned());
            let label = if sweep.is_empty() { String::new() } else { format!("variant-{index:04}") };
            Variant { index, label, params, swept }
        })
        .collect())
}

/// A solved variant: the model, its results and the files to write.
pub struct Outcome {
    pub model: Model,
    pub results: Results,
    pub files: FileSet,
}

/// Overrides that the command line adds to every model.
#[derive(Clone, Debug, Default)]
pub struct Limits {
    pub max_elements: Option<usize>,
    /// An accuracy that replaces the case's: Some(None) is "off".
    pub accuracy: Option<Option<f64>>,
}

/// A variant's model, with the spans its errors point at.
pub struct Resolved {
    /// The model in SI units.
    pub model: Model,
    /// Where its parts, probes and expectations were written.
    pub spans: Spans,
}

impl Loaded {
    /// A study error as a rendered input failure at its item.
    pub fn study_error(&self, spans: &Spans, e: &StudyError) -> Failure {
        self.input(&spans.diagnostic(e))
    }
}

/// Resolves the case for one set of parameter values.
pub fn resolve(loaded: &Loaded, params: &BTreeMap<String, f64>, limits: &Limits) -> Result<Resolved, Failure> {
    let (mut model, spans) = case::resolve::resolve_with(&loaded.doc, params, &loaded.dir(), limits.accuracy).map_err(|d| loaded.input(&d))?;
    if let Some(m) = limits.max_elements {
        model.mesh.max_elements = m;
    }
    Ok(Resolved { model, spans })
}

/// Meshes a resolved model, errors pointing at the case; refused before
/// any work when the solve would not fit in the memory this machine has
/// free (a raised `--max-elements` let a 1e8-triangle mesh start).
pub fn mesh(loaded: &Loaded, r: &Resolved) -> Result<mesher::Mesh, Failure> {
    let estimate = mesher::estimate_triangles(&study::lower::mesh_spec(&r.model)).unwrap_or(0.0);
    let need = estimate * mesher::BYTES_PER_TRIANGLE;
    if let Some(free) = available_memory() {
        if estimate <= r.model.mesh.max_elements as f64 && need > 0.9 * free {
            return Err(Failure::Input(format!(
                "error: {}: the mesh would need about {estimate:.2e} triangles, about {:.1} GB of memory to solve, but this machine has {:.1} GB free; coarsen mesh.size or mesh_size\n",
                loaded.path.display(),
                need / 1e9,
                free / 1e9
            )));
        }
    }
    study::run::mesh(&r.model).map_err(|e| loaded.study_error(&r.spans, &e))
}

/// Memory the kernel reports as available (Linux `MemAvailable`), bytes.
fn available_memory() -> Option<f64> {
    let text = std::fs::read_to_string("/proc/meminfo").ok()?;
    let line = text.lines().find(|l| l.starts_with("MemAvailable:"))?;
    let kib: f64 = line.split_whitespace().nth(1)?.parse().ok()?;
    Some(kib * 1024.0)
}

/// Meshes, solves and post-processes one variant.
pub fn solve_variant(loaded: &Loaded, variant: &Variant, limits: &Limits, progress: &Progress) -> Result<Outcome, Failure> {
    solve_variant_keeping(loaded, variant, limits, progress, |_| ()).map(|(o, ())| o)
}

/// As [`solve_variant`], and `keep` takes what it needs of the final
/// solution before it is dropped (the Python package keeps the field).
pub fn solve_variant_keeping<T>(
    loaded: &Loaded,
    variant: &Variant,
    limits: &Limits,
    progress: &Progress,
    keep: impl FnOnce(&solver::Solution) -> T,
) -> Result<(Outcome, T), Failure> {
    solve_variant_with(loaded, variant, limits, progress, None, keep)
}

/// As [`solve_variant`], but the files are made only when `wanted` says so
/// of the results (none otherwise): a seek's point needs them only if it
/// may be the answer, and the pictures and the field file cost about what
/// the study's solve does (smallest-magnet-for-5mT).
pub fn solve_variant_files_when(
    loaded: &Loaded,
    variant: &Variant,
    limits: &Limits,
    progress: &Progress,
    wanted: &dyn Fn(&Results) -> bool,
) -> Result<Outcome, Failure> {
    solve_variant_with(loaded, variant, limits, progress, Some(wanted), |_| ()).map(|(o, ())| o)
}

/// The one body of the two above: the files always, or when `wanted`.
fn solve_variant_with<T>(
    loaded: &Loaded,
    variant: &Variant,
    limits: &Limits,
    progress: &Progress,
    wanted: Option<&dyn Fn(&Results) -> bool>,
    keep: impl FnOnce(&solver::Solution) -> T,
) -> Result<(Outcome, T), Failure> {
    let start = Instant::now();
    let resolved = resolve(loaded, &variant.params, limits)?;
    let tag = if variant.label.is_empty() {
        loaded.stem()
    } else {
        format!("{} {}", loaded.stem(), variant.label)
    };
    progress.note(&format!("{tag}: meshing"));
    let mesh = mesh(loaded, &resolved)?;
    let Resolved { model, spans } = resolved;
    let report = |stage: Stage| match stage {
        Stage::Meshing => progress.note(&format!("{tag}: meshing")),
        Stage::Meshed { corners, triangles } => progress.note(&format!("{tag}: {corners} corner nodes, {triangles} triangles; solving")),
        Stage::Newton { iteration, residual } => progress.note(&format!("{tag}: Newton iteration {iteration}, relative residual {residual:.3e}")),
        Stage::Refined {
            step,
            unknowns,
            order,
            worst_relative_error,
            worst_value,
        } => progress.note(&format!(
            "{tag}: refinement {step}: {unknowns} unknowns (order {order}), largest estimated error {} % ({worst_value})",
            study::estimate::percent(worst_relative_error)
        )),
        Stage::Sampling { samples } => progress.note(&format!("{tag}: extracting the field at {samples} line-probe samples")),
    };
    let stamp = |results: &mut Results| {
        results.solve.seconds = start.elapsed().as_secs_f64();
        if !variant.label.is_empty() {
            results.variant = Some(results::VariantInfo {
                index: variant.index,
                label: variant.label.clone(),
                swept: variant.swept.clone(),
            });
        }
    };
    let finish = |sol: &solver::Solution, estimate: study::estimate::Estimate| -> Result<(Results, FileSet, T), Failure> {
        let (results, files) = match wanted {
            None => results_and_files(&model, sol, estimate, stamp)?,
            Some(wanted) => {
                let mut results = study::post::results_with_errors(&model, sol, estimate);
                stamp(&mut results);
                let files = if wanted(&results) { files_of(&model, sol, &results)? } else { Vec::new() };
                (results, files)
            }
        };
        Ok((results, files, keep(sol)))
    };
    // A study error without a place in the case names the parameter values
    // it came at (a seek's or a sweep's), as the case alone cannot.
    let at = if variant.swept.is_empty() {
        String::new()
    } else {
        let values: Vec<String> = variant.swept.iter().map(|(k, x)| format!("{k} = {x}")).collect();
        format!("at {}: ", values.join(", "))
    };
    let (results, files, kept) = study::run::solve_to_accuracy(&model, mesh, &report, finish).map_err(|e| match e.origin {
        Some(_) => loaded.study_error(&spans, &e),
        None => Failure::Input(format!("error: {}: {at}{e}\n", loaded.path.display())),
    })??;
    Ok((Outcome { model, results, files }, kept))
}

/// The results (`stamp` adds the run's own entries) and every output file
/// of a solved variant. The field file is encoded on one core while the
/// results are made and the pictures drawn on the other: each takes about
/// half a second at 1e6 unknowns, and after an adaptive run the results
/// are already made, so the field and the pictures are what is left
/// (magnet-on-back-plate: 0.25 -> 0.15-0.19 s from its last solve to the end).
pub fn results_and_files(
    model: &Model,
    sol: &solver::Solution,
    estimate: study::estimate::Estimate,
    stamp: impl FnOnce(&mut Results) + Send,
) -> Result<(Results, FileSet), Failure> {
    let (field, described) = rayon::join(
        || field_file(model, sol),
        || {
            let mut results = study::post::results_with_errors(model, sol, estimate);
            stamp(&mut results);
            let files = collect_files(model, sol, &results)?;
            Ok::<_, Failure>((results, files))
        },
    );
    let (results, files) = described?;
    Ok((results, with_field(files, field?)))
}

/// Every output file of a solved variant whose results are made: the
/// field file encoded on one core, the rest on the other.
fn files_of(model: &Model, sol: &solver::Solution, results: &Results) -> Result<FileSet, Failure> {
    let (field, files) = rayon::join(|| field_file(model, sol), || collect_files(model, sol, results));
    Ok(with_field(files?, field?))
}

/// The field file (VTK), when the case asks for it.
fn field_file(model: &Model, sol: &solver::Solution) -> Result<Option<Vec<u8>>, Failure> {
    model
        .output
        .vtk
        .then(|| output::vtk::field_vtu(model, sol).map_err(|e| Failure::Input(format!("error: {e}\n"))))
        .transpose()
}

/// The files with the field file second, after results.json.
fn with_field(mut files: FileSet, field: Option<Vec<u8>>) -> FileSet {
    if let Some(vtu) = field {
        files.insert(1, ("field.vtu".into(), vtu));
    }
    files
}

/// Every output file of a solved variant but the field. The mesh picture
/// and the other pictures are drawn side by side (on magnet-on-back-plate's
/// 60 000 triangles they took 45 and 60 ms of the 0.25 s between the last
/// solve and the end of the run).
fn collect_files(model: &Model, sol: &solver::Solution, results: &Results) -> Result<FileSet, Failure> {
    let plots = model.output.plots;
    let ((json, mesh_svg), pictures) = rayon::join(
        || {
            (
                serde_json::to_vec_pretty(results),
                plots.then(|| output::svg::mesh_svg(model, sol.problem.mesh)),
            )
        },
        || if plots { output::pictures::pictures(model, sol, results) } else { Vec::new() },
    );
    let mut files: FileSet = Vec::new();
    let json = json.map_err(|e| Failure::Input(format!("error: cannot encode results: {e}\n")))?;
    files.push(("results.json".into(), json));
    if model.output.csv {
        for p in &model.probes {
            if matches!(p.shape, study::model::ProbeShape::Line { .. }) {
                if let Some(r) = results.probes.get(&p.name) {
                    files.push((format!("probe-{}.csv", p.name).into(), output::csv::probe_csv(model, r).into_bytes()));
                }
            }
        }
    }
    let mut shown = Vec::new();
    if let Some(svg) = mesh_svg {
        files.push(("mesh.svg".into(), svg.into_bytes()));
    }
    for (name, title, svg) in pictures {
        shown.push((title, name.clone()));
        files.push((name.into(), svg.into_bytes()));
    }
    if model.output.report {
        let md = output::report::report(model, results, &shown);
        let svg = |name: &str| {
            files
                .iter()
                .find(|(n, _)| n.as_os_str() == name)
                .map(|(_, b)| String::from_utf8_lossy(b).into_owned())
        };
        let html = output::html::page(&md, &svg);
        files.push(("report.md".into(), md.into_bytes()));
        files.push(("report.html".into(), html.into_bytes()));
    }
    Ok(files)
}
