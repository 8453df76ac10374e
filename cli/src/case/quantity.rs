//! Quantities in the case: a number, or a string "expression unit".

use super::diagnostic::Diagnostic;
use super::document::{Item, Value};
use super::expr;
use super::units::{self, Kind};
use std::collections::BTreeMap;

/// What quantities need to know: the parameters and the study length unit.
pub struct Context<'a> {
    pub params: &'a BTreeMap<String, f64>,
    /// SI factor of the study's length unit (bare lengths are in it).
    pub length_unit: f64,
    /// The case file's folder, where files it names are found (None where
    /// a table names no files).
    pub case_dir: Option<&'a std::path::Path>,
}

impl Context<'_> {
    /// A quantity of `kind`, in SI. Bare numbers are in the study's length
    /// unit for lengths, degC for temperatures, % for percentages, SI otherwise.
    pub fn quantity(&self, item: &Item, kind: Kind, what: &str) -> Result<f64, Diagnostic> {
        let bare = |v: f64| {
            if kind == Kind::Length {
                v * self.length_unit
            } else {
                v
            }
        };
        match &item.value {
            Value::Num(v) if v.is_finite() => Ok(bare(*v)),
            Value::Num(_) => Err(Diagnostic::new(
                format!("{what}: the number is not finite (NaN or infinity)"),
                Some(item.span.clone()),
            )),
            Value::Str(s) => {
                // The string's text starts one byte after the opening quote,
                // and offsets in it map to the file only when it holds no
                // escapes (an escape is always longer written than read); else
                // messages point at the string's start.
                let base = item.span.start + 1;
                let exact = item.span.len() == s.len() + 2;
                let at_offset = |offset: usize| if exact { base + offset } else { base };
                let parsed = expr::parse(s, self.params).map_err(|e| {
                    let at = at_offset(e.offset);
                    Diagnostic::new(format!("{what}: {}", e.message), Some(at..at + 1)).with_help(e.suggestion.map(|c| format!("did you mean '{c}'?")))
                })?;
                if parsed.unit.is_empty() {
                    return Ok(bare(parsed.value));
                }
                let at = at_offset(parsed.unit_offset);
                let span = Some(at..at + if exact { parsed.unit.len() } else { 1 });
                match units::unit(parsed.unit) {
                    Some((k, factor)) if k == kind => Ok(units::shifted(parsed.value * factor, parsed.unit)),
                    Some((k, _)) => Err(Diagnostic::new(
                        format!("{what}: '{}' is {}, but {} is needed", parsed.unit, k.describe(), kind.describe()),
                        span,
                    )),
                    None => Err(
                        Diagnostic::new(format!("{what}: unknown unit '{}'; expected {}", parsed.unit, kind.describe()), span)
                            .with_help(Some(units::suggestion(parsed.unit, kind))),
                    ),
                }
            }
            other => Err(Diagnostic::new(
                format!(
                    "{what}: expected {} as a number or a string such as \"{}\", found {}",
                    kind.describe(),
                    example(kind),
                    other.type_name()
                ),
                Some(item.span.clone()),
            )),
        }
    }

    /// Whether a quantity is written without a unit (a number, or a string
    /// whose expression names none): it is then read in SI.
    pub fn is_bare(&self, item: &Item) -> bool {
        match &item.value {
            Value::Num(_) => true,
            Value::Str(s) => expr::parse(s, self.params).is_ok_and(|p| p.unit.is_empty()),
            _ => false,
        }
    }

    /// A quantity whose kind the unit decides (for expectation bounds), in SI.
    pub fn any_quantity(&self, item: &Item, what: &str) -> Result<(f64, Option<Kind>), Diagnostic> {
        self.any_quantity_for(item, what, Kind::Dimensionless)
    }

    /// As `any_quantity`, where `wanted` is the kind the value compared
    /// with has: an unknown unit is reported against it ("1 mm^3" on a
    /// volume: did you mean 'mm3'?), not as a plain number's. A bare number
    /// stays SI whatever `wanted` is.
    pub fn any_quantity_for(&self, item: &Item, what: &str, wanted: Kind) -> Result<(f64, Option<Kind>), Diagnostic> {
        if let Value::Str(s) = &item.value {
            if let Ok(parsed) = expr::parse(s, self.params) {
                if let Some((k, _)) = units::unit(parsed.unit) {
                    return Ok((self.quantity(item, k, what)?, Some(k)));
                }
                if !parsed.unit.is_empty() {
                    return Ok((self.quantity(item, wanted, what)?, None));
                }
            }
        }
        Ok((self.quantity(item, Kind::Dimensionless, what)?, None))
    }

    /// A point [x, y] of two lengths.
    pub fn point(&self, item: &Item, what: &str) -> Result<[f64; 2], Diagnostic> {
        let a = item.array(what)?;
        if a.len() != 2 {
            return Err(Diagnostic::new(
                format!("{what}: a point is [x, y] (or [r, z]), found {} values", a.len()),
                Some(item.span.clone()),
            ));
        }
        Ok([self.quantity(&a[0], Kind::Length, what)?, self.quantity(&a[1], Kind::Length, what)?])
    }

    /// A positive quantity.
    pub fn positive(&self, item: &Item, kind: Kind, what: &str) -> Result<f64, Diagnostic> {
        let v = self.quantity(item, kind, what)?;
        if v > 0.0 {
            Ok(v)
        } else {
            Err(Diagnostic::new(format!("{what} must be greater than zero, got {v}"), Some(item.span.clone())))
        }
    }
}

fn example(kind: Kind) -> &'static str {
    match kind {
        Kind::Length => "19.05 mm",
        Kind::FluxDensity => "1.26 T",
        Kind::FieldStrength => "900 kA/m",
        Kind::Temperature => "80 degC",
        Kind::Current => "800 A",
        Kind::CurrentDensity => "3 A/mm2",
        Kind::Force => "150 N",
        Kind::PercentPerKelvin => "-0.12 %/K",
        Kind::Angle => "30 deg",
        _ => "1.5",
    }
}
