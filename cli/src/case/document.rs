//! The first stage of reading a case: the TOML text parsed into a small
//! owned tree that keeps the span of every key and value, walked with
//! helpers that check types and keys and point at the text on error.

use super::diagnostic::Diagnostic;
use std::ops::Range;
use toml::de::{DeTable, DeValue};

/// A value with its byte span in the case file.
#[derive(Clone, Debug, PartialEq)]
pub struct Item {
    pub value: Value,
    pub span: Range<usize>,
}

/// The kinds of TOML value a case uses (integers become numbers).
#[derive(Clone, Debug, PartialEq)]
pub enum Value {
    Str(String),
    Num(f64),
    Bool(bool),
    Array(Vec<Item>),
    Table(Vec<(Key, Item)>),
    Datetime,
}

/// A table key with its span.
#[derive(Clone, Debug, PartialEq)]
pub struct Key {
    pub name: String,
    pub span: Range<usize>,
}

/// Parses TOML text into the spanned tree.
pub fn parse(text: &str) -> Result<Item, Diagnostic> {
    match DeTable::parse(text) {
        Ok(t) => {
            let span = t.span();
            Ok(Item {
                value: Value::Table(convert_table(t.get_ref())?),
                span,
            })
        }
        Err(e) => Err(Diagnostic::new(format!("this is not valid TOML: {}", e.message().trim()), e.span())),
    }
}

fn convert_table(t: &DeTable<'_>) -> Result<Vec<(Key, Item)>, Diagnostic> {
    t.iter()
        .map(|(k, v)| {
            Ok((
                Key {
                    name: k.get_ref().to_string(),
                    span: k.span(),
                },
                convert(v.get_ref(), v.span())?,
            ))
        })
        .collect()
}

fn convert(v: &DeValue<'_>, span: Range<usize>) -> Result<Item, Diagnostic> {
    let value = match v {
        DeValue::String(s) => Value::Str(s.to_string()),
        DeValue::Integer(i) => match i64::from_str_radix(&i.as_str().replace('_', ""), i.radix()) {
            Ok(x) => Value::Num(x as f64),
            // TOML holds integers to 64 bits and asks readers to refuse the
            // rest; read as NaN, this one was refused as "not finite".
            Err(_) => {
                return Err(Diagnostic::new(
                    "this integer does not fit in 64 bits, the most TOML holds; write a larger number as a float, such as 1e20",
                    Some(span),
                ))
            }
        },
        DeValue::Float(f) => Value::Num(parse_float(f.as_str())),
        DeValue::Boolean(b) => Value::Bool(*b),
        DeValue::Datetime(_) => Value::Datetime,
        DeValue::Array(a) => Value::Array(a.iter().map(|x| convert(x.get_ref(), x.span())).collect::<Result<_, _>>()?),
        DeValue::Table(t) => Value::Table(convert_table(t)?),
    };
    Ok(Item { value, span })
}

fn parse_float(s: &str) -> f64 {
    let s = s.replace('_', "");
    match s.trim_start_matches('+') {
        "inf" => f64::INFINITY,
        "-inf" => f64::NEG_INFINITY,
        "nan" | "-nan" => f64::NAN,
        other => other.parse().unwrap_or(f64::NAN),
    }
}

impl Value {
    pub fn type_name(&self) -> &'static str {
        match self {
            Value::Str(_) => "a string",
            Value::Num(_) => "a number",
            Value::Bool(_) => "a boolean",
            Value::Array(_) => "an array",
            Value::Table(_) => "a table",
            Value::Datetime => "a date",
        }
    }
}

impl Item {
    fn wrong(&self, what: &str, expected: &str) -> Diagnostic {
        Diagnostic::new(
            format!("{what}: expected {expected}, found {}", self.value.type_name()),
            Some(self.span.clone()),
        )
    }

    /// The entries of a table, after checking every key is one of `allowed`.
    pub fn table(&self, what: &str, allowed: &[&str]) -> Result<Fields<'_>, Diagnostic> {
        let Value::Table(entries) = &self.value else {
            return Err(self.wrong(what, "a table"));
        };
        for (k, _) in entries {
            if !allowed.contains(&k.name.as_str()) {
                let d = Diagnostic::new(format!("unknown key '{}' in {what}", k.name), Some(k.span.clone())).suggest(&k.name, allowed.iter().copied());
                let help = d.help.clone().unwrap_or_else(|| format!("the keys of {what} are: {}", allowed.join(", ")));
                return Err(d.with_help(Some(help)));
            }
        }
        Ok(Fields {
            entries,
            span: self.span.clone(),
            what: what.to_string(),
        })
    }

    pub fn str(&self, what: &str) -> Result<&str, Diagnostic> {
        match &self.value {
            Value::Str(s) => Ok(s),
            _ => Err(self.wrong(what, "a string")),
        }
    }

    /// One of two words, as true (`words[0]`) or false (`words[1]`); any
    /// other is refused with `meaning` (what the two words do) and the
    /// nearer word suggested.
    pub fn either(&self, what: &str, words: [&str; 2], meaning: &str) -> Result<bool, Diagnostic> {
        match self.str(what)? {
            w if w == words[0] => Ok(true),
            w if w == words[1] => Ok(false),
            other => Err(Diagnostic::new(format!("{what}: '{other}'; {meaning}"), Some(self.span.clone())).suggest(other, words)),
        }
    }

    pub fn bool(&self, what: &str) -> Result<bool, Diagnostic> {
        match &self.value {
            Value::Bool(b) => Ok(*b),
            _ => Err(self.wrong(what, "true or false")),
        }
    }

    /// A plain finite number.
    pub fn number(&self, what: &str) -> Result<f64, Diagnostic> {
        match &self.value {
            Value::Num(v) if v.is_finite() => Ok(*v),
            Value::Num(_) => Err(Diagnostic::new(
                format!("{what}: the number is not finite (NaN or infinity)"),
                Some(self.span.clone()),
            )),
            _ => Err(self.wrong(what, "a number")),
        }
    }

    pub fn array(&self, what: &str) -> Result<&[Item], Diagnostic> {
        match &self.value {
            Value::Array(a) => Ok(a),
            _ => Err(self.wrong(what, "an array")),
        }
    }

    /// An array of tables (`[[part]]`), or an error.
    pub fn tables(&self, what: &str) -> Result<&[Item], Diagnostic> {
        let a = self.array(what)?;
        if let Some(bad) = a.iter().find(|i| !matches!(i.value, Value::Table(_))) {
            return Err(bad.wrong(what, "a table"));
        }
        Ok(a)
    }
}

/// A checked table.
pub struct Fields<'a> {
    pub entries: &'a [(Key, Item)],
    pub span: Range<usize>,
    pub what: String,
}

impl<'a> Fields<'a> {
    pub fn get(&self, key: &str) -> Option<&'a Item> {
        self.entries.iter().find(|(k, _)| k.name == key).map(|(_, v)| v)
    }

    pub fn require(&self, key: &str) -> Result<&'a Item, Diagnostic> {
        self.get(key)
            .ok_or_else(|| Diagnostic::new(format!("{} needs the key '{key}'", self.what), Some(self.span.start..self.span.start + 1)))
    }

    /// Which of `keys` are present (for "exactly one of" rules).
    pub fn present(&self, keys: &[&'a str]) -> Vec<&'a str> {
        keys.iter().copied().filter(|k| self.get(k).is_some()).collect()
    }
}
