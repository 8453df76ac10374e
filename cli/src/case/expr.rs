//! Arithmetic over named parameters: + - * / parentheses, unary minus,
//! numbers with exponents and parameter names, then an optional unit.

use std::collections::BTreeMap;

/// Why an expression failed, with the byte offset in the text.
#[derive(Clone, Debug, PartialEq)]
pub struct ExprError {
    pub message: String,
    pub offset: usize,
    /// A parameter name close to an unknown one.
    pub suggestion: Option<String>,
}

/// The value of an expression and the unit text that followed it.
#[derive(Clone, Debug, PartialEq)]
pub struct Parsed<'t> {
    pub value: f64,
    pub unit: &'t str,
    pub unit_offset: usize,
}

struct Parser<'t, 'p> {
    text: &'t str,
    /// Byte offset, always on a character boundary.
    pos: usize,
    params: &'p BTreeMap<String, f64>,
    /// Open parentheses and unary signs around the current factor.
    depth: usize,
}

/// Deepest nesting of parentheses and signs an expression may have: the
/// parser recurses once per level, and a deeper text would exhaust the
/// stack of a sweep's worker thread (5 000 levels did) long before it meant
/// anything.
pub const MAX_DEPTH: usize = 100;

/// Parses `expr [unit]` where the unit is whatever follows the expression.
pub fn parse<'t>(text: &'t str, params: &BTreeMap<String, f64>) -> Result<Parsed<'t>, ExprError> {
    let mut p = Parser {
        text,
        pos: 0,
        params,
        depth: 0,
    };
    let value = p.sum()?;
    p.skip_space();
    let unit = text[p.pos..].trim();
    if !value.is_finite() {
        return Err(ExprError {
            message: "the value is not a finite number".into(),
            offset: 0,
            suggestion: None,
        });
    }
    Ok(Parsed {
        value,
        unit,
        unit_offset: p.pos,
    })
}

impl Parser<'_, '_> {
    fn peek(&self) -> Option<char> {
        self.text[self.pos..].chars().next()
    }

    fn skip_space(&mut self) {
        // Any Unicode space (a no-break space pasted from a PDF) counts; the
        // offset moves by the character's width, never into its middle.
        while let Some(c) = self.peek().filter(|c| c.is_whitespace()) {
            self.pos += c.len_utf8();
        }
    }

    fn err<T>(&self, message: impl Into<String>) -> Result<T, ExprError> {
        Err(ExprError {
            message: message.into(),
            offset: self.pos,
            suggestion: None,
        })
    }

    fn sum(&mut self) -> Result<f64, ExprError> {
        let mut v = self.product()?;
        loop {
            self.skip_space();
            match self.peek() {
                Some('+') => {
                    self.pos += 1;
                    v += self.product()?;
                }
                Some('-') => {
                    self.pos += 1;
                    v -= self.product()?;
                }
                _ => return Ok(v),
            }
        }
    }

    fn product(&mut self) -> Result<f64, ExprError> {
        let mut v = self.factor()?;
        loop {
            self.skip_space();
            let save = self.pos;
            match self.peek() {
                Some('*') => {
                    self.pos += 1;
                    v *= self.factor()?;
                }
                Some('/') => {
                    self.pos += 1;
                    // "A/m" after a number is a unit, not a division.
                    self.skip_space();
                    if self.peek().is_some_and(|c| c.is_alphabetic()) && !self.starts_with_param() {
                        self.pos = save;
                        return Ok(v);
                    }
                    let d = self.factor()?;
                    if d == 0.0 {
                        self.pos = save;
                        return self.err("division by zero");
                    }
                    v /= d;
                }
                _ => return Ok(v),
            }
        }
    }

    fn starts_with_param(&self) -> bool {
        let name: String = self.text[self.pos..].chars().take_while(|c| c.is_alphanumeric() || *c == '_').collect();
        self.params.contains_key(&name)
    }

    fn factor(&mut self) -> Result<f64, ExprError> {
        self.skip_space();
        if self.depth >= MAX_DEPTH {
            return self.err(format!("the expression nests parentheses or signs more than {MAX_DEPTH} deep"));
        }
        self.depth += 1;
        let v = self.factor_inner();
        self.depth -= 1;
        v
    }

    fn factor_inner(&mut self) -> Result<f64, ExprError> {
        match self.peek() {
            Some('-') => {
                self.pos += 1;
                Ok(-self.factor()?)
            }
            Some('+') => {
                self.pos += 1;
                self.factor()
            }
            Some('(') => {
                self.pos += 1;
                let v = self.sum()?;
                self.skip_space();
                if self.peek() != Some(')') {
                    return self.err("expected ')'");
                }
                self.pos += 1;
                Ok(v)
            }
            Some(c) if c.is_ascii_digit() || c == '.' => self.number(),
            Some(c) if c.is_alphabetic() || c == '_' => self.name(),
            Some(c) => self.err(format!("expected a number, a parameter name or '(', found '{c}'")),
            None => self.err("expected a number or a parameter name, found the end of the text"),
        }
    }

    fn number(&mut self) -> Result<f64, ExprError> {
        let start = self.pos;
        let bytes = self.text.as_bytes();
        while self.pos < bytes.len() && (bytes[self.pos].is_ascii_digit() || bytes[self.pos] == b'.') {
            self.pos += 1;
        }
        // An exponent, but not the start of a unit such as "e" alone.
        if self.pos < bytes.len() && (bytes[self.pos] == b'e' || bytes[self.pos] == b'E') {
            let mut q = self.pos + 1;
            if q < bytes.len() && (bytes[q] == b'+' || bytes[q] == b'-') {
                q += 1;
            }
            if q < bytes.len() && bytes[q].is_ascii_digit() {
                while q < bytes.len() && bytes[q].is_ascii_digit() {
                    q += 1;
                }
                self.pos = q;
            }
        }
        self.text[start..self.pos].parse::<f64>().or_else(|_| {
            self.pos = start;
            self.err("not a number")
        })
    }

    fn name(&mut self) -> Result<f64, ExprError> {
        let start = self.pos;
        while self.peek().is_some_and(|c| c.is_alphanumeric() || c == '_') {
            self.pos += self.peek().map_or(1, char::len_utf8);
        }
        let name = &self.text[start..self.pos];
        match self.params.get(name) {
            Some(v) => Ok(*v),
            None => {
                let suggestion = crate::case::suggest::closest(name, self.params.keys().map(String::as_str));
                Err(ExprError {
                    message: format!("unknown parameter '{name}' (parameters are defined in [params])"),
                    offset: start,
                    suggestion,
                })
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn params() -> BTreeMap<String, f64> {
        [("gap".to_string(), 1.5), ("plate".to_string(), 6.0)].into_iter().collect()
    }

    #[test]
    fn arithmetic_and_units() {
        let p = params();
        assert_eq!(parse("10 + gap", &p).unwrap().value, 11.5);
        assert_eq!(
            parse("2*(gap+plate) mm", &p).unwrap(),
            Parsed {
                value: 15.0,
                unit: "mm",
                unit_offset: 14
            }
        );
        assert_eq!(parse("900 kA/m", &p).unwrap().unit, "kA/m");
        assert_eq!(parse("1e-3", &p).unwrap().value, 1e-3);
        assert_eq!(parse("-0.12 %/K", &p).unwrap().value, -0.12);
        assert_eq!(parse("plate / gap", &p).unwrap().value, 4.0);
    }

    #[test]
    fn errors_point_at_the_text() {
        let p = params();
        let e = parse("10 + gapp", &p).unwrap_err();
        assert_eq!((e.offset, e.suggestion.as_deref()), (5, Some("gap")));
        assert_eq!(parse("1 / (gap - 1.5)", &p).unwrap_err().message, "division by zero");
        assert!(parse("(1 + 2", &p).is_err());
    }

    #[test]
    fn unicode_spaces_and_deep_nesting_are_handled() {
        let p = params();
        // A no-break space (U+00A0) or a thin space (U+2009) between number and unit.
        assert_eq!(parse("25\u{a0}mm", &p).unwrap().unit, "mm");
        assert_eq!(parse("25\u{2009}mm", &p).unwrap().value, 25.0);
        assert_eq!(parse("2 *\u{a0}gap", &p).unwrap().value, 3.0);
        let deep = format!("{}1{}", "(".repeat(20_000), ")".repeat(20_000));
        let e = parse(&deep, &p).unwrap_err();
        assert!(e.message.contains("more than 100 deep"), "{}", e.message);
        assert_eq!(e.offset, MAX_DEPTH);
        assert!(parse(&"-".repeat(50_000), &p).is_err());
        let ok = format!("{}1{}", "(".repeat(MAX_DEPTH - 1), ")".repeat(MAX_DEPTH - 1));
        assert_eq!(parse(&ok, &p).unwrap().value, 1.0);
    }
}
