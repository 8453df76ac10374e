//! `lodestone._lodestone`: the native half of the Python package. It reads
//! a case from its text, solves it with the command line's own machinery
//! (so the values are the command line's, digit for digit) with the GIL
//! released, and keeps the solution so that B can be sampled anywhere
//! afterwards. No panic crosses into Python: each entry point catches one
//! and raises RuntimeError.

use pyo3::exceptions::{PyRuntimeError, PyValueError};
use pyo3::prelude::*;
use pyo3::types::PyDict;
use std::collections::BTreeMap;
use std::panic::{catch_unwind, AssertUnwindSafe};
use std::path::PathBuf;

self_cell::self_cell!(
    /// A mesh and the solution over it, owned together.
    struct Solved {
        owner: mesher::Mesh,
        #[covariant]
        dependent: Kept,
    }
);

/// The solution kept over its own copy of the mesh.
struct Kept<'m>(solver::Solution<'m>);

/// The solved field of a case: B anywhere, and the mesh.
#[pyclass(module = "lodestone._lodestone", frozen)]
struct Field {
    solved: Solved,
    /// Metres per case length unit.
    unit: f64,
}

#[pymethods]
impl Field {
    /// B at points (case units): a list of (bx, by) in T, NaN outside the
    /// solved region.
    fn b_at(&self, py: Python<'_>, xs: Vec<f64>, ys: Vec<f64>) -> PyResult<Vec<(f64, f64)>> {
        if xs.len() != ys.len() {
            return Err(PyValueError::new_err("x and y must have the same length"));
        }
        let unit = self.unit;
        let sol = &self.solved.borrow_dependent().0;
        let out = py.detach(|| {
            catch_unwind(AssertUnwindSafe(|| {
                xs.iter()
                    .zip(&ys)
                    .map(|(x, y)| sol.field_at([x * unit, y * unit]).map_or((f64::NAN, f64::NAN), |f| (f.b[0], f.b[1])))
                    .collect::<Vec<_>>()
            }))
        });
        out.map_err(|_| PyRuntimeError::new_err("internal error while sampling the field (a bug; please report it)"))
    }

    /// The mesh: node coordinates (case units, physical nodes only),
    /// triangles (corner node indices) and each triangle's part index (-1
    /// for air).
    #[allow(clippy::type_complexity)]
    fn mesh(&self) -> (Vec<(f64, f64)>, Vec<(usize, usize, usize)>, Vec<i64>) {
        let mesh = self.solved.borrow_owner();
        let nodes = mesh.nodes[..mesh.n_physical].iter().map(|p| (p[0] / self.unit, p[1] / self.unit)).collect();
        let triangles = mesh.triangles.iter().map(|t| (t[0], t[1], t[2])).collect();
        let parts = mesh
            .regions
            .iter()
            .map(|r| if let mesher::Region::Part(i) = r { *i as i64 } else { -1 })
            .collect();
        (nodes, triangles, parts)
    }
}

/// What a solve hands back: results.json's text, the field map (SVG) if
/// drawn, and the field.
type Answer = (String, Option<String>, Field);

/// Solves a case given as text. `path` names it in messages and anchors
/// relative file names (a `bh_csv`); `set` overrides parameters;
/// `accuracy` is None (the case's), a fraction, or a negative number for
/// "off". A bad case raises ValueError whose argument is the command
/// line's message (file, line and column in its first lines).
#[pyfunction]
#[pyo3(signature = (text, path, set=None, accuracy=None))]
fn solve_text(py: Python<'_>, text: String, path: String, set: Option<Bound<'_, PyDict>>, accuracy: Option<f64>) -> PyResult<Answer> {
    let overrides = overrides(set)?;
    let outcome = py.detach(move || catch_unwind(AssertUnwindSafe(|| solve_inner(text, PathBuf::from(path), overrides, accuracy))));
    match outcome {
        Ok(Ok(answer)) => Ok(answer),
        Ok(Err(message)) => Err(PyValueError::new_err(message)),
        Err(_) => Err(PyRuntimeError::new_err("internal error while solving (a bug; please report it with the case)")),
    }
}

/// The solve itself, off the GIL: Err is the message of a case error.
fn solve_inner(text: String, path: PathBuf, overrides: BTreeMap<String, f64>, accuracy: Option<f64>) -> Result<Answer, String> {
    use lodestone::run;
    let loaded = run::load_text(&path, text).map_err(|f| f.message().to_string())?;
    let variants = run::variants(&loaded, &overrides).map_err(|f| f.message().to_string())?;
    let first = variants
        .into_iter()
        .next()
        .ok_or_else(|| "error: the case has no variant to solve".to_string())?;
    let limits = run::Limits {
        accuracy: accuracy.map(|a| (a > 0.0).then_some(a)),
        ..Default::default()
    };
    let progress = lodestone::progress::Progress::new(true);
    let (outcome, kept) = run::solve_variant_keeping(&loaded, &first, &limits, &progress, |sol| {
        Solved::new(sol.problem.mesh.clone(), |mesh| Kept(sol.rebind(mesh)))
    })
    .map_err(|f| f.message().to_string())?;
    let json = serde_json::to_string(&outcome.results).map_err(|e| format!("error: cannot encode the results: {e}"))?;
    let map = outcome
        .files
        .iter()
        .find(|(n, _)| n.as_os_str() == "field-map.svg")
        .map(|(_, b)| String::from_utf8_lossy(b).into_owned());
    Ok((
        json,
        map,
        Field {
            solved: kept,
            unit: outcome.model.length_unit.1,
        },
    ))
}

/// Runs a case's study as `lodestone solve` would (a sweep, a seek, a
/// tolerance study or an optimization) into the folder `out`, with the
/// GIL released and the cores in use; `progress`, if given, is called with
/// each progress line. Returns the exit code (0 done, 1 an expectation or
/// constraint failed, 3 not converged); a bad case raises ValueError with
/// the command line's message.
#[pyfunction]
#[pyo3(signature = (text, path, out, set=None, accuracy=None, force=false, progress=None))]
#[allow(clippy::too_many_arguments)]
fn run_study(
    py: Python<'_>,
    text: String,
    path: String,
    out: String,
    set: Option<Bound<'_, PyDict>>,
    accuracy: Option<f64>,
    force: bool,
    progress: Option<Py<PyAny>>,
) -> PyResult<i32> {
    let overrides = overrides(set)?;
    let result = py.detach(move || {
        catch_unwind(AssertUnwindSafe(|| -> Result<i32, String> {
            let loaded = lodestone::run::load_text(&PathBuf::from(path), text).map_err(|f| f.message().to_string())?;
            let limits = lodestone::run::Limits {
                accuracy: accuracy.map(|a| (a > 0.0).then_some(a)),
                ..Default::default()
            };
            let listener = progress.map(|cb| -> lodestone::progress::Listener {
                Box::new(move |line: &str| {
                    // A callback's own error must not stop the study: it is ignored.
                    Python::attach(|py| {
                        let _ = cb.call1(py, (line,));
                    })
                })
            });
            let progress = listener.map_or_else(|| lodestone::progress::Progress::new(true), lodestone::progress::Progress::to);
            lodestone::commands::solve_loaded(&loaded, Some(PathBuf::from(out)), &overrides, &limits, None, force, &progress)
                .map_err(|f| f.message().to_string())
        }))
    });
    match result {
        Ok(Ok(code)) => Ok(code),
        Ok(Err(message)) => Err(PyValueError::new_err(message)),
        Err(_) => Err(PyRuntimeError::new_err("internal error while solving (a bug; please report it with the case)")),
    }
}

/// `set` as parameter overrides.
fn overrides(set: Option<Bound<'_, PyDict>>) -> PyResult<BTreeMap<String, f64>> {
    let mut out = BTreeMap::new();
    if let Some(d) = set {
        for (k, v) in d.iter() {
            let name: String = k.extract().map_err(|_| PyValueError::new_err("set: parameter names must be strings"))?;
            let value: f64 = v
                .extract()
                .map_err(|_| PyValueError::new_err(format!("set: '{name}' must be a plain number, in the units the case uses for it")))?;
            out.insert(name, value);
        }
    }
    Ok(out)
}

#[pymodule]
fn _lodestone(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(solve_text, m)?)?;
    m.add_function(wrap_pyfunction!(run_study, m)?)?;
    m.add_class::<Field>()?;
    Ok(())
}
