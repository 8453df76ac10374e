//! `[tolerance]`: spreads on parameters, sampled at the corners of the
//! tolerance box or by Monte Carlo (Latin hypercube).

use crate::case::diagnostic::Diagnostic;
use crate::case::document::{Fields, Value};
use crate::case::quantity::Context;
use crate::case::units::Kind;
use study::tolerance::{Distribution, Spread};

/// Keys of `[tolerance]`.
const TOLERANCE: &[&str] = &["method", "samples", "seed", "spread"];
/// Keys of one parameter's spread.
const SPREAD: &[&str] = &["plus_minus", "distribution"];
/// Most Monte Carlo samples (each is a solve).
const MOST_SAMPLES: usize = 100_000;
/// Most parameters for the corner method (2^k corners).
const MOST_CORNER_PARAMETERS: usize = 10;

/// Sampling method.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Method {
    /// Latin-hypercube Monte Carlo with this many samples and seed.
    MonteCarlo { samples: usize, seed: u64 },
    /// Every corner of the tolerance box, with face centres to check that the worst case is at one.
    Corners,
}

/// A resolved tolerance study.
#[derive(Clone, Debug, PartialEq)]
pub struct Tolerance {
    /// How the box is sampled.
    pub method: Method,
    /// The spreads, in the order written.
    pub spreads: Vec<Spread>,
}

/// The `[tolerance]` table, or None.
pub fn tolerance(top: &Fields, ctx: &Context) -> Result<Option<Tolerance>, Diagnostic> {
    let Some(item) = top.get("tolerance") else { return Ok(None) };
    for clash in ["sweep", "seek"] {
        if let Some(s) = top.get(clash) {
            return Err(Diagnostic::new(
                format!("[tolerance] and [{clash}] together: run them as separate cases"),
                Some(s.span.clone()),
            ));
        }
    }
    let t = item.table("[tolerance]", TOLERANCE)?;
    let samples = match t.get("samples") {
        Some(s) => {
            let n = s.number("tolerance.samples")?;
            if !(n.fract() == 0.0 && (2.0..=MOST_SAMPLES as f64).contains(&n)) {
                return Err(Diagnostic::new(
                    format!("tolerance.samples: a whole number from 2 to {MOST_SAMPLES}"),
                    Some(s.span.clone()),
                ));
            }
            n as usize
        }
        None => 200,
    };
    let seed = match t.get("seed") {
        Some(s) => s.number("tolerance.seed")?.abs() as u64,
        None => 1,
    };
    let method = match t.get("method").map(|m| (m, m.str("tolerance.method"))) {
        None => Method::MonteCarlo { samples, seed },
        Some((_, Ok("monte-carlo"))) => Method::MonteCarlo { samples, seed },
        Some((_, Ok("corners"))) => {
            // Taken and ignored before: 50 samples asked, 4 corners solved.
            if let Some((key, item)) = ["samples", "seed"].into_iter().find_map(|k| t.get(k).map(|i| (k, i))) {
                return Err(Diagnostic::new(
                    format!("tolerance.{key}: the corners method solves the corners of the tolerance box (2^k of them), with no samples or seed; for {key} use method = \"monte-carlo\""),
                    Some(item.span.clone()),
                ));
            }
            Method::Corners
        }
        Some((m, Ok(other))) => {
            return Err(Diagnostic::new(
                format!("tolerance.method: '{other}' is not a method; use \"monte-carlo\" or \"corners\""),
                Some(m.span.clone()),
            )
            .suggest(other, ["monte-carlo", "corners"]))
        }
        Some((_, Err(e))) => return Err(e),
    };
    let spread_item = t.require("spread")?;
    let Value::Table(entries) = &spread_item.value else {
        return Err(Diagnostic::new(
            "tolerance.spread: expected { name = { plus_minus = \"0.2 mm\" }, ... }",
            Some(spread_item.span.clone()),
        ));
    };
    let mut spreads = Vec::new();
    for (k, v) in entries {
        let what = format!("tolerance.spread.{}", k.name);
        let Some(&nominal) = ctx.params.get(&k.name) else {
            return Err(Diagnostic::new(
                format!("{what}: '{}' is not a parameter; give it a nominal value in [params]", k.name),
                Some(k.span.clone()),
            )
            .suggest(&k.name, ctx.params.keys().map(String::as_str)));
        };
        let s = v.table(&what, SPREAD)?;
        let pm = s.require("plus_minus")?;
        let half_width = match ctx.any_quantity(pm, &what)? {
            (v, None) => v,
            (v, Some(Kind::Percent)) => v / 100.0 * nominal.abs(),
            (v, Some(Kind::Length)) => v / ctx.length_unit,
            (_, Some(other)) => {
                return Err(Diagnostic::new(
                    format!(
                        "{what}: plus_minus is {}; give a length, a percentage of the nominal value or a plain number in the parameter's own units",
                        other.describe()
                    ),
                    Some(pm.span.clone()),
                ))
            }
        };
        if !(half_width.is_finite() && half_width > 0.0) {
            return Err(Diagnostic::new(format!("{what}: plus_minus must be above zero"), Some(pm.span.clone())));
        }
        let distribution = match s.get("distribution").map(|d| (d, d.str(&what))) {
            None | Some((_, Ok("uniform"))) => Distribution::Uniform,
            Some((_, Ok("normal"))) => Distribution::Normal,
            Some((d, Ok(other))) => {
                return Err(Diagnostic::new(
                    format!("{what}: distribution '{other}': use \"uniform\" or \"normal\" (plus_minus is then three standard deviations)"),
                    Some(d.span.clone()),
                ))
            }
            Some((_, Err(e))) => return Err(e),
        };
        spreads.push(Spread {
            name: k.name.clone(),
            nominal,
            half_width,
            distribution,
        });
    }
    if spreads.is_empty() {
        return Err(Diagnostic::new("tolerance.spread: name at least one parameter", Some(spread_item.span.clone())));
    }
    if method == Method::Corners && spreads.len() > MOST_CORNER_PARAMETERS {
        return Err(Diagnostic::new(
            format!(
                "[tolerance] corners: {} parameters make {} corners; use \"monte-carlo\" beyond {MOST_CORNER_PARAMETERS}",
                spreads.len(),
                1u64 << spreads.len()
            ),
            Some(item.span.clone()),
        ));
    }
    Ok(Some(Tolerance { method, spreads }))
}
