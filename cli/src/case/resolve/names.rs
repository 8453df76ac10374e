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
    "seek",
    "tolerance",
    "optimize",
    "materials",
    "part",
    "probe",
    "force",
    "flux",
    "expect",
    "boundary",
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
        Value::Array(a) if !a.is_empty() => {
            let mut parts = Vec::new();
            for x in a {
                let p = part_ref(x, model, what)?;
                // A winding's part listed twice counted its linkage twice.
                if parts.contains(&p) {
                    return Err(Diagnostic::new(
                        format!("{what}: '{}' is listed twice", model.parts[p].name),
                        Some(x.span.clone()),
                    ));
                }
                parts.push(p);
            }
            Ok(parts)
        }
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

/// Longest name of a part, probe, force, flux or material.
pub(super) const MAX_NAME_CHARS: usize = 64;

/// A name as the case writes it, checked against the documented set: 1 to
/// 64 ASCII letters, digits, '_' and '-', starting with a letter or digit.
/// Names become file names (probe-NAME.csv), CSV columns, SVG text and
/// value names (`force.NAME.z`), so a '/', '..', ',', '.', a control
/// character or an empty name would escape the output folder, break a
/// table or a value name.
pub(super) fn name(item: &Item, what: &str) -> Result<String, Diagnostic> {
    checked_name(item.str(what)?, item.span.clone(), what)
}

/// `name`'s check on a name written at `span` (a table key, for example).
pub(super) fn checked_name(s: &str, span: std::ops::Range<usize>, what: &str) -> Result<String, Diagnostic> {
    let bad = |why: String| {
        Err(Diagnostic::new(
            format!(
                "{what} '{}': {why}; a name is 1 to {MAX_NAME_CHARS} ASCII letters, digits, '_' or '-', starting with a letter or digit",
                s.escape_debug()
            ),
            Some(span.clone()),
        ))
    };
    if s.is_empty() {
        return bad("is empty".into());
    }
    if s.chars().count() > MAX_NAME_CHARS {
        return bad(format!("is {} characters long", s.chars().count()));
    }
    if let Some(c) = s.chars().find(|c| !(c.is_ascii_alphanumeric() || *c == '_' || *c == '-')) {
        return bad(format!(
            "holds {}",
            if c.is_control() || c.is_whitespace() {
                format!("the character {}", c.escape_unicode())
            } else {
                format!("'{c}'")
            }
        ));
    }
    if !s.starts_with(|c: char| c.is_ascii_alphanumeric()) {
        return bad("starts with a sign".into());
    }
    Ok(s.to_string())
}

/// Free text for people (a title, a description): one line, no control
/// characters, at most 200 characters, so that it prints, tabulates and
/// draws as written.
pub(super) fn plain_text(item: &Item, what: &str) -> Result<String, Diagnostic> {
    let s = item.str(what)?;
    if let Some(c) = s.chars().find(|c| c.is_control()) {
        return Err(Diagnostic::new(
            format!("{what}: holds the control character {}; write one line of plain text", c.escape_unicode()),
            Some(item.span.clone()),
        ));
    }
    if s.chars().count() > 200 {
        return Err(Diagnostic::new(
            format!("{what}: {} characters; at most 200", s.chars().count()),
            Some(item.span.clone()),
        ));
    }
    Ok(s.to_string())
}
