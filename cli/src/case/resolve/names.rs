//! Named tables: looking up lists of tables, references from one table to
//! a part by name, and the check that names are unique.

use crate::case::diagnostic::Diagnostic;
use crate::case::document::{Fields, Item, Value};
use study::model::Model;

/// Tables a case file may hold.
pub(super) const TOP: &[&str] = &[
    "study",
    "mesh",
    "params",
    "sweep",
    "materials",
    "part",
    "probe",
    "force",
    "flux",
    "expect",
    "output",
    "solver",
];

pub(super) fn named_tables<'a>(top: &Fields<'a>, key: &str) -> Result<&'a [Item], Diagnostic> {
    match top.get(key) {
        Some(i) => i.tables(&format!("[[{key}]]")),
        None => Ok(&[]),
    }
}

pub(super) fn part_ref(item: &Item, model: &Model, what: &str) -> Result<usize, Diagnostic> {
    let name = item.str(what)?;
    model.part_index(name).ok_or_else(|| {
        Diagnostic::new(format!("{what}: no part named '{name}'"), Some(item.span.clone())).suggest(name, model.parts.iter().map(|p| p.name.as_str()))
    })
}

pub(super) fn part_list(item: &Item, model: &Model, what: &str) -> Result<Vec<usize>, Diagnostic> {
    match &item.value {
        Value::Str(_) => Ok(vec![part_ref(item, model, what)?]),
        Value::Array(a) if !a.is_empty() => a.iter().map(|x| part_ref(x, model, what)).collect(),
        _ => Err(Diagnostic::new(
            format!("{what}: expected a part name or a list of part names"),
            Some(item.span.clone()),
        )),
    }
}

pub(super) fn check_unique_names(top: &Fields) -> Result<(), Diagnostic> {
    for key in ["probe", "force", "flux"] {
        let mut seen = std::collections::HashSet::new();
        for item in named_tables(top, key)? {
            if let Value::Table(t) = &item.value {
                if let Some((_, n)) = t.iter().find(|(k, _)| k.name == "name") {
                    if let Value::Str(s) = &n.value {
                        if !seen.insert(s.clone()) {
                            return Err(Diagnostic::new(
                                format!("two [[{key}]] entries are named '{s}'; names must be unique"),
                                Some(n.span.clone()),
                            ));
                        }
                    }
                }
            }
        }
    }
    Ok(())
}
