//! Input errors with the file, line and column, a caret under the bad text,
//! and a suggestion where one can be made.

use std::ops::Range;

/// One input error. `span` is a byte range in the case file.
#[derive(Clone, Debug, PartialEq)]
pub struct Diagnostic {
    pub message: String,
    pub span: Option<Range<usize>>,
    pub help: Option<String>,
}

impl Diagnostic {
    pub fn new(message: impl Into<String>, span: Option<Range<usize>>) -> Diagnostic {
        Diagnostic {
            message: message.into(),
            span,
            help: None,
        }
    }

    pub fn with_help(mut self, help: Option<String>) -> Diagnostic {
        self.help = help;
        self
    }

    /// "did you mean" help from the closest candidate.
    pub fn suggest<'a>(self, word: &str, candidates: impl IntoIterator<Item = &'a str>) -> Diagnostic {
        let help = crate::case::suggest::closest(word, candidates).map(|c| format!("did you mean '{c}'?"));
        self.with_help(help)
    }
}

/// 1-based line and column (in characters) of a byte offset.
pub fn line_col(text: &str, offset: usize) -> (usize, usize) {
    let offset = offset.min(text.len());
    let before = &text[..offset];
    let line = before.matches('\n').count() + 1;
    let start = before.rfind('\n').map_or(0, |i| i + 1);
    (line, text[start..offset].chars().count() + 1)
}

/// Renders the error with the offending line and a caret underline.
pub fn render(path: &str, text: &str, d: &Diagnostic) -> String {
    let mut out = format!("error: {}\n", d.message);
    if let Some(span) = &d.span {
        let (line, col) = line_col(text, span.start);
        out += &format!("  --> {path}:{line}:{col}\n");
        let line_text = text.lines().nth(line - 1).unwrap_or("");
        let width = text.get(span.clone()).map_or(1, |s| s.lines().next().unwrap_or("").chars().count().max(1));
        out += &format!("{:>5} | {}\n", line, line_text);
        out += &format!("      | {}{}\n", " ".repeat(col - 1), "^".repeat(width));
    } else {
        out += &format!("  --> {path}\n");
    }
    if let Some(h) = &d.help {
        out += &format!("      = help: {h}\n");
    }
    out
}
