//! The warnings of the many solves behind one answer: a sweep's variants,
//! a tolerance study's samples, a search's evaluations (an optimizer's, a
//! seek's). Each solve's warnings used to stay in
//! its own results.json (or nowhere, for a sample), so a tolerance study
//! whose spread put a plate into its magnet in a quarter of its samples
//! counted them in its statistics with no word said.

/// One solve's warnings, named as the reader finds it.
#[derive(Clone, Debug, PartialEq)]
pub struct Warned {
    /// `variant-0003 (gap = 0.5)`, `sample 7 (gap = -0.31)`.
    pub label: String,
    pub warnings: Vec<String>,
}

/// A solve's label: `what` and its parameters to six significant digits
/// (`variant-0002 (gap = 0.447214)`, `sample 7 (gap = -0.31)`).
pub fn label<'a>(what: &str, params: impl IntoIterator<Item = (&'a str, f64)>) -> String {
    let at: Vec<String> = params
        .into_iter()
        .map(|(k, v)| format!("{k} = {}", crate::output::engineering::significant_digits(v, 6)))
        .collect();
    format!("{what} ({})", at.join(", "))
}

/// Most solves the summary lists by name; the rest are counted.
const LISTED: usize = 5;

/// The summary's lines: a heading with how many of `total` solves (`what`,
/// plural) warned and where all of them are listed, then the first few.
/// Empty when none warned.
pub fn summary_lines(what: &str, total: usize, warned: &[Warned], listed_in: &str) -> Vec<String> {
    if warned.is_empty() {
        return Vec::new();
    }
    let mut lines = vec![format!(
        "  WARNING: {} of {total} {what} gave warnings (every one is in {listed_in}):",
        warned.len()
    )];
    for w in warned.iter().take(LISTED) {
        lines.push(format!("    {}: {}", w.label, w.warnings.join("; ")));
    }
    if warned.len() > LISTED {
        lines.push(format!("    and {} more", warned.len() - LISTED));
    }
    lines
}

/// One "note:" line for the evaluations of a search (an optimizer's, a
/// seek's), whose points are not the answer: most of what they warn of is
/// the design space, not a mistake, so they are counted and listed in
/// `listed_in`, and the answer's own warnings stand above. None when none
/// warned.
pub fn search_note(warned: &[Warned], total: usize, listed_in: &str, answer: &str) -> Option<String> {
    (!warned.is_empty()).then(|| {
        format!(
            "  note: {} of {total} evaluations gave warnings, listed in {listed_in} and the report (the {answer}'s own are above)",
            warned.len()
        )
    })
}

/// The JSON list of each solve's warnings under `key` (its label).
pub fn json(key: &str, warned: &[Warned]) -> Vec<serde_json::Value> {
    warned.iter().map(|w| serde_json::json!({ key: w.label, "warnings": w.warnings })).collect()
}

/// A report's section listing every solve's warnings; empty when none warned.
pub fn markdown(what: &str, total: usize, warned: &[Warned]) -> String {
    if warned.is_empty() {
        return String::new();
    }
    let mut s = format!("## Warnings from the {what}\n\n{} of {total} {what} gave warnings:\n\n", warned.len());
    for w in warned {
        for text in &w.warnings {
            s += &format!("- {}: {text}\n", w.label);
        }
    }
    s + "\n"
}

#[cfg(test)]
mod tests {
    use super::*;

    fn warned(n: usize) -> Vec<Warned> {
        (0..n)
            .map(|i| Warned {
                label: format!("sample {i}"),
                warnings: vec![format!("w{i}")],
            })
            .collect()
    }

    #[test]
    fn none_warned_says_nothing() {
        assert!(summary_lines("samples", 4, &[], "x").is_empty());
        assert!(markdown("samples", 4, &[]).is_empty());
    }

    #[test]
    fn the_summary_counts_lists_the_first_and_counts_the_rest() {
        let lines = summary_lines("samples", 20, &warned(7), "tolerance.json");
        assert_eq!(lines[0], "  WARNING: 7 of 20 samples gave warnings (every one is in tolerance.json):");
        assert_eq!(lines[1], "    sample 0: w0");
        assert_eq!(lines.len(), 1 + LISTED + 1);
        assert_eq!(lines.last().unwrap(), "    and 2 more");
        assert_eq!(markdown("samples", 20, &warned(7)).matches("\n- ").count(), 7);
    }
}
