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
    let mut offset = offset.min(text.len());
    while !text.is_char_boundary(offset) {
        offset -= 1;
    }
    let before = &text[..offset];
    let line = before.matches('\n').count() + 1;
    let start = before.rfind('\n').map_or(0, |i| i + 1);
    (line, text[start..offset].chars().count() + 1)
}

/// Widest part of a source line shown: a long line is cut to a window
/// around the error (a 40 000-character line was echoed whole).
const SHOWN_CHARS: usize = 100;

/// Text made safe for a terminal: control characters (escape sequences,
/// tabs, carriage returns) shown as `\u{..}` escapes.
pub fn printable(text: &str) -> String {
    text.chars()
        .map(|c| match c {
            '\n' => "\n".to_string(),
            c if c.is_control() => c.escape_unicode().to_string(),
            c => c.to_string(),
        })
        .collect()
}

/// One character of a source line as shown: control characters become '?'
/// so that the caret below keeps its column.
fn shown_char(c: char) -> char {
    if c.is_control() {
        '?'
    } else {
        c
    }
}

/// Renders the error with the offending line and a caret underline.
pub fn render(path: &str, text: &str, d: &Diagnostic) -> String {
    let path = printable(path);
    let mut out = format!("error: {}\n", printable(&d.message));
    if let Some(span) = &d.span {
        let (line, col) = line_col(text, span.start);
        out += &format!("  --> {path}:{line}:{col}\n");
        let chars: Vec<char> = text.lines().nth(line - 1).unwrap_or("").chars().map(shown_char).collect();
        let width = text.get(span.clone()).map_or(1, |s| s.lines().next().unwrap_or("").chars().count().max(1));
        // A window of the line around the column, marked where it is cut.
        let first = (col - 1).saturating_sub(SHOWN_CHARS / 2);
        let last = (first + SHOWN_CHARS).min(chars.len());
        let lead = if first > 0 { "..." } else { "" };
        let tail = if last < chars.len() { "..." } else { "" };
        let window: String = chars.get(first..last).map_or_else(String::new, |c| c.iter().collect());
        out += &format!("{:>5} | {lead}{window}{tail}\n", line);
        let caret = width.min(last.saturating_sub(col - 1)).max(1);
        out += &format!("      | {}{}{}\n", " ".repeat(lead.len()), " ".repeat(col - 1 - first), "^".repeat(caret));
    } else {
        out += &format!("  --> {path}\n");
    }
    if let Some(h) = &d.help {
        out += &format!("      = help: {}\n", printable(h));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn offsets_inside_a_character_and_long_lines_render_safely() {
        let text = "a = \"25\u{a0}mm\"\n";
        // The no-break space takes bytes 7 and 8: byte 8 is inside it.
        assert_eq!(line_col(text, 8), (1, 8));
        let d = Diagnostic::new("bad", Some(8..9));
        assert!(render("c.toml", text, &d).contains("c.toml:1:8"));
        let long = format!("x = \"{}\"", "(".repeat(40_000));
        let r = render("c.toml", &long, &Diagnostic::new("deep", Some(20_000..20_001)));
        assert!(r.len() < 600, "{} bytes", r.len());
        assert!(r.contains("...") && r.contains('^'));
    }

    #[test]
    fn control_characters_do_not_reach_the_terminal() {
        let text = "name = \"m\u{1b}[31m\"\n";
        let d = Diagnostic::new("part 'm\u{1b}[31m' is odd", Some(7..8)).with_help(Some("\u{7}".into()));
        let r = render("c\u{1b}.toml", text, &d);
        assert!(!r.chars().any(|c| c.is_control() && c != '\n'), "{r:?}");
    }
}
