//! What a case asks before anything is solved: its variants' first
//! resolvable model, and its design questions (`[seek]`, `[tolerance]`,
//! `[optimize]`) resolved against it, each over a parameter the case uses.
//! `solve` and `check` share these, so that `check` passes no case `solve`
//! refuses.

use crate::run::{self, Failure, Limits, Loaded, Variant};
use crate::sweep;
use std::collections::BTreeMap;

/// The case's `[seek]`, `[tolerance]` and `[optimize]` tables, resolved
/// against its first variant that resolves: their input errors are the
/// case's, for `solve` before any folder is made and for `check`, which
/// runs none of them but must not pass a case that `solve` refuses.
pub type DesignQuestions = (
    Option<crate::case::resolve::Seek>,
    Option<crate::case::resolve::Tolerance>,
    Option<crate::case::resolve::Optimize>,
);

/// Resolves them against the first variant that resolves, and refuses one
/// over a parameter nothing in the case uses.
pub fn design_questions(loaded: &Loaded, variants: &[Variant], limits: &Limits) -> Result<DesignQuestions, Failure> {
    if variants.is_empty() {
        return Ok((None, None, None));
    }
    let (first, resolved) = first_resolved(loaded, variants, limits)?;
    let input = |d: crate::case::Diagnostic| loaded.input(&d);
    let questions = (
        crate::case::resolve::seek(&loaded.doc, &first.params, &resolved.model).map_err(input)?,
        crate::case::resolve::tolerance(&loaded.doc, &first.params, &resolved.model).map_err(input)?,
        crate::case::resolve::optimize(&loaded.doc, &first.params, &resolved.model).map_err(input)?,
    );
    unused_question_parameter(loaded, first, limits, &questions)?;
    Ok(questions)
}

/// Refuses a design question over a parameter nothing in the case uses:
/// the model at the two ends of its range is the same, so a tolerance
/// study's samples all solved the nominal design and its statistics came
/// out narrower than the tolerances meant, with no word; a seek found its
/// value flat, and an optimizer searched a direction that moves nothing.
/// (A sweep over one is refused by `unused_sweep_parameter`.)
fn unused_question_parameter(loaded: &Loaded, base: &Variant, limits: &Limits, (seek, tolerance, optimize): &DesignQuestions) -> Result<(), Failure> {
    let mut asked: Vec<(&str, &str, [f64; 2])> = Vec::new();
    if let Some(s) = seek {
        asked.push(("[seek] vary", &s.vary, s.range));
    }
    for s in tolerance.iter().flat_map(|t| &t.spreads) {
        asked.push(("[tolerance] spread", &s.name, [s.nominal - s.half_width, s.nominal + s.half_width]));
    }
    for (name, range) in optimize.iter().flat_map(|o| &o.vary) {
        asked.push(("[optimize] vary", name, *range));
    }
    let key_at = |name: &str, x: f64| {
        let mut params = base.params.clone();
        params.insert(name.to_string(), x);
        run::resolve(loaded, &params, limits).map(|r| sweep::model_key(&r.model))
    };
    for (table, name, [a, b]) in asked {
        // An end that breaks the model (a part of zero size) does use it.
        let unused = a != b && matches!((key_at(name, a), key_at(name, b)), (Ok(ka), Ok(kb)) if ka == kb);
        if unused {
            return Err(Failure::Input(format!(
                "error: {}: {table} '{name}' changes nothing in the case: nothing uses '{name}'; write it into a part's dimensions or a material, or remove it from {table}\n",
                loaded.path.display()
            )));
        }
    }
    Ok(())
}

/// Refuses a sweep over a parameter that nothing in the case uses: two
/// variants that differ in it resolve to the same model, and would be
/// solved twice to the same answer.
pub fn unused_sweep_parameter(loaded: &Loaded, variants: &[Variant], keys: &[Result<String, Failure>]) -> Result<(), Failure> {
    let model_of = |k: &Result<String, Failure>| k.as_ref().ok().and_then(|k| k.lines().next().map(str::to_string));
    let mut seen: BTreeMap<String, &Variant> = BTreeMap::new();
    for (v, k) in variants.iter().zip(keys) {
        let Some(model) = model_of(k) else { continue };
        if let Some(first) = seen.get(&model) {
            let name = v.swept.iter().zip(&first.swept).find(|(a, b)| a.1 != b.1).map_or("?", |(a, _)| a.0.as_str());
            return Err(Failure::Input(format!(
                "error: {}: the sweep over '{name}' gives identical models ({} and {}): nothing in the case uses '{name}'; write it into a part's dimensions or a material, or remove it from [sweep]\n",
                loaded.path.display(),
                first.label,
                v.label
            )));
        }
        seen.insert(model, v);
    }
    Ok(())
}

/// The first variant that resolves, and its model. A swept value may break
/// only some variants (a plate of thickness 0): those fail one by one as
/// the sweep solves them, as they did when they were not the first; the
/// run stops here, before any folder is made, only when none resolves,
/// with the first one's error named by its variant.
pub fn first_resolved<'v>(loaded: &Loaded, variants: &'v [Variant], limits: &Limits) -> Result<(&'v Variant, run::Resolved), Failure> {
    let first = &variants[0];
    let error = match run::resolve(loaded, &first.params, limits) {
        Ok(r) => return Ok((first, r)),
        Err(f) => f,
    };
    if let Some(found) = variants[1..].iter().find_map(|v| run::resolve(loaded, &v.params, limits).ok().map(|r| (v, r))) {
        return Ok(found);
    }
    Err(match error {
        Failure::Input(m) if !first.swept.is_empty() => Failure::Input(format!("error: variant {} ({}) failed:\n{m}", first.label, describe(first))),
        f => f,
    })
}

/// A variant's swept parameters, `gap = 0.5, t = 2`.
pub fn describe(v: &Variant) -> String {
    v.swept.iter().map(|(k, x)| format!("{k} = {x}")).collect::<Vec<_>>().join(", ")
}
