//! Where a tolerance study keeps its solved samples (one folder each under
//! samples/ of the output), and `merge` of shards' samples.

use crate::output::folder::OutputFolder;
use crate::run::Failure;
use std::collections::BTreeMap;
use std::path::Path;

/// Figures by value name.
type Values = BTreeMap<String, f64>;

/// One solved sample: its values and their estimated errors.
#[derive(Clone, Debug, Default)]
pub struct Sample {
    /// Values by name, SI.
    pub values: Values,
    /// Estimated absolute errors by name, SI (not every value has one).
    pub errors: Values,
    /// The sample's design warnings.
    pub warnings: Vec<String>,
}

/// How a tolerance run keeps its samples: each solved sample is committed
/// to `samples/KIND-NNNN/` of the output folder as it completes, so that
/// an interrupted run resumes where it stopped and shards (`--shard K/N`,
/// every N-th sample) can be gathered by `merge` and finished by a plain
/// `solve`.
#[derive(Clone, Copy, Debug, Default)]
pub struct Run {
    /// This shard's K and N.
    pub shard: Option<(usize, usize)>,
    /// Solve every sample again, ignoring kept ones.
    pub force: bool,
}

/// Where samples are kept, and how.
pub(super) struct Store<'a> {
    /// The output folder the samples are kept in.
    pub(super) folder: &'a OutputFolder,
    /// The run's shard and whether kept samples are ignored.
    pub(super) run: Run,
    /// Identifies the case (its text and its other parameters).
    pub(super) case: u64,
}

impl Store<'_> {
    /// A sample's key: the case, and the sample's own parameter values.
    pub(super) fn key(&self, at: &[f64]) -> String {
        let h = at.iter().fold(self.case, |h, x| crate::sweep::fnv1a(&x.to_bits().to_le_bytes(), h));
        format!("{h:016x}")
    }

    /// A kept sample's values, errors and warnings, when whole and of this
    /// case (a sample kept before errors or warnings were, without
    /// errors.json or warnings.json, is solved again).
    pub(super) fn kept(&self, label: &str, key: &str) -> Option<Sample> {
        if self.run.force {
            return None;
        }
        let dir = self.folder.path().join("samples").join(label);
        if std::fs::read_to_string(dir.join("sample.hash")).ok()? != key {
            return None;
        }
        let read = |file: &str| -> Option<Values> {
            let bits: BTreeMap<String, u64> = serde_json::from_str(&std::fs::read_to_string(dir.join(file)).ok()?).ok()?;
            Some(bits.into_iter().map(|(k, b)| (k, f64::from_bits(b))).collect())
        };
        Some(Sample {
            values: read("values.json")?,
            errors: read("errors.json")?,
            warnings: serde_json::from_str(&std::fs::read_to_string(dir.join("warnings.json")).ok()?).ok()?,
        })
    }

    /// Commits a solved sample (values and errors as exact bits).
    pub(super) fn keep(&self, label: &str, key: &str, sample: &Sample) -> Result<(), Failure> {
        let encode = |m: &Values| {
            let bits: BTreeMap<&String, u64> = m.iter().map(|(k, v)| (k, v.to_bits())).collect();
            serde_json::to_vec(&bits).map_err(|e| Failure::Input(format!("error: cannot encode a sample: {e}\n")))
        };
        let files: crate::output::FileSet = vec![
            ("values.json".into(), encode(&sample.values)?),
            ("errors.json".into(), encode(&sample.errors)?),
            (
                "warnings.json".into(),
                serde_json::to_vec(&sample.warnings).map_err(|e| Failure::Input(format!("error: cannot encode a sample: {e}\n")))?,
            ),
            ("sample.hash".into(), key.as_bytes().to_vec()),
        ];
        self.folder
            .commit(&Path::new("samples").join(label), &files)
            .map_err(|e| Failure::Input(format!("error: {e}\n")))
    }

    /// Whether this run solves sample `i` (its shard's share).
    pub(super) fn mine(&self, i: usize) -> bool {
        self.run.shard.is_none_or(|(k, n)| i % n == k)
    }
}

/// `merge` of tolerance shards: every kept sample of the folders, each a
/// whole set (values, errors, warnings and key), copied into `out/samples`; a sample found
/// twice must be the same. The number gathered.
pub fn gather(folders: &[std::path::PathBuf], out: &Path) -> Result<usize, String> {
    let folder = OutputFolder::open(out)?;
    let mut seen: BTreeMap<String, String> = BTreeMap::new();
    for f in folders {
        let Ok(entries) = std::fs::read_dir(f.join("samples")) else { continue };
        for e in entries.flatten() {
            let label = e.file_name().to_string_lossy().into_owned();
            let (Ok(key), Ok(values), Ok(errors), Ok(warnings)) = (
                std::fs::read_to_string(e.path().join("sample.hash")),
                std::fs::read(e.path().join("values.json")),
                std::fs::read(e.path().join("errors.json")),
                std::fs::read(e.path().join("warnings.json")),
            ) else {
                continue;
            };
            match seen.get(&label) {
                Some(k) if *k == key => continue,
                Some(_) => return Err(format!("{} holds sample {label} of another case or run than the other folders", f.display())),
                None => {}
            }
            let files: crate::output::FileSet = vec![
                ("values.json".into(), values),
                ("errors.json".into(), errors),
                ("warnings.json".into(), warnings),
                ("sample.hash".into(), key.clone().into_bytes()),
            ];
            folder.commit(&Path::new("samples").join(&label), &files)?;
            seen.insert(label, key);
        }
    }
    if seen.is_empty() {
        return Err("no whole tolerance samples in these folders".into());
    }
    Ok(seen.len())
}
