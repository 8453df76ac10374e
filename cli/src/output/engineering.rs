//! Numbers as engineers read them: four significant digits with an SI
//! prefix (-333.2 N, 5.29 mT, 12.9 kgf), not scientific notation. For what
//! people read (summary, check, report); machine files keep full precision.

/// `value` in `unit` with an SI prefix chosen so that the number lies in
/// [1, 1000); a unit without a prefix form (empty for a ratio, degC) gets
/// four significant digits alone.
pub fn eng(value: f64, unit: &str) -> String {
    if !value.is_finite() {
        return format!("{value} {unit}").trim_end().to_string();
    }
    if beyond_prefixes(value.abs(), unit) {
        return format!("{value:.3e} {unit}");
    }
    let (exponent, prefix) = prefix_of(value.abs(), unit);
    if value == 0.0 || !prefixable(unit) {
        return format!("{} {unit}", significant(value)).trim_end().to_string();
    }
    let scaled = value / 10f64.powi(exponent);
    // Rounding to four digits can reach 1000: take the next prefix then.
    if significant(scaled).trim_start_matches('-').starts_with("1000") && exponent < 12 {
        let (_, next) = prefix_of(10f64.powi(exponent + 3), unit);
        return format!("{} {next}{unit}", significant(value / 10f64.powi(exponent + 3)));
    }
    format!("{} {prefix}{unit}", significant(scaled))
}

/// Four significant digits, trailing zeros after the point dropped.
fn significant(x: f64) -> String {
    significant_digits(x, 4)
}

/// `digits` significant digits (at most 12 decimals), trailing zeros after
/// the point dropped.
pub fn significant_digits(x: f64, digits: i32) -> String {
    if x == 0.0 {
        return "0".into();
    }
    if !x.is_finite() {
        return format!("{x}");
    }
    let decimals = (digits - 1 - x.abs().log10().floor() as i32).clamp(0, 12) as usize;
    let s = format!("{x:.decimals$}");
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

/// An energy or coenergy with its error; "unbounded" where the study's
/// currents do not sum to zero in open space (NaN: `study::net_current`).
pub fn energy_text(joules: f64, error: Option<f64>) -> String {
    if joules.is_nan() {
        "unbounded (the currents do not sum to zero; see the warning)".to_string()
    } else {
        eng_pm(joules, error, "J")
    }
}

/// A value with its estimated error, both in the value's prefix and to the
/// error's second significant digit: `-333.2 N ± 0.12 N`, `526.88 mT ±
/// 0.020 mT`, `527 mT ± 12 mT`. Without a finite error, the value alone.
pub fn eng_pm(value: f64, error: Option<f64>, unit: &str) -> String {
    let Some(e) = error.filter(|e| worth_printing(*e, value)) else {
        return eng(value, unit);
    };
    if !value.is_finite() {
        return eng(value, unit);
    }
    // An error larger than the value sets the prefix: a field that vanishes
    // read "95 pT \u{b1} 64556 pT".
    let reference = value.abs().max(e);
    let (exponent, prefix) = prefix_of(reference, unit);
    if beyond_prefixes(reference, unit) || e / 10f64.powi(exponent) < 1e-8 {
        // The value to the error's second significant digit, as pm_scaled does.
        let digits = (reference.log10().floor() - e.log10().floor() + 1.0).clamp(3.0, 12.0) as usize;
        return format!("{value:.digits$e} {unit} \u{b1} {e:.1e} {unit}").trim_end().to_string();
    }
    pm_scaled(value, e, exponent, prefix, unit)
}

/// Several values of one quantity that share one estimated error (a
/// tolerance study's extremes and percentiles), each in one prefix to the
/// error's second significant digit, and the error in that prefix:
/// `["49.3341 mT", "59.3050 mT"]` and "0.0010 mT", where each alone read
/// "49.33 mT .. 59.3 mT (each ± 1.003 uT)". Without a printable error,
/// each value as `eng` gives it (and the error, if any, as `eng` does).
pub fn eng_shared(values: &[f64], error: Option<f64>, unit: &str) -> (Vec<String>, Option<String>) {
    let reference = values.iter().map(|v| v.abs()).filter(|v| v.is_finite()).fold(0.0, f64::max);
    let printable = error.filter(|&e| values.iter().all(|v| v.is_finite()) && worth_printing(e, reference) && !beyond_prefixes(reference, unit));
    let Some(e) = printable else {
        let error = error.filter(|e| e.is_finite() && *e > 0.0).map(|e| eng(e, unit));
        return (values.iter().map(|&v| eng(v, unit)).collect(), error);
    };
    let (exponent, prefix) = prefix_of(reference, unit);
    let u = format!("{prefix}{unit}");
    let texts = values.iter().map(|&v| with_unit(&scaled_text(v, e, exponent), &u)).collect();
    (texts, Some(with_unit(&scaled_text(e, e, exponent), &u)))
}

/// Whether a magnitude lies outside the SI prefixes' reach (pico to tera,
/// with three decimals below pico to spare): a force of 1.5e-18 N read
/// "0.000001519 pN ± 0.000000000 pN", an error of nothing. Such numbers are
/// written in scientific notation.
fn beyond_prefixes(magnitude: f64, unit: &str) -> bool {
    prefixable(unit) && unit != "m3" && magnitude > 0.0 && magnitude.is_finite() && !(1e-15..1e15).contains(&magnitude)
}

/// As `eng_pm`, in `unit` as given, without an SI prefix (lengths in the
/// case's own unit, such as "mm").
pub fn plain_pm(value: f64, error: Option<f64>, unit: &str) -> String {
    match error.filter(|e| worth_printing(*e, value)) {
        Some(e) if value.is_finite() => pm_scaled(value, e, 0, "", unit),
        _ => format!("{} {unit}", significant(value)).trim_end().to_string(),
    }
}

/// Whether an error is worth printing beside its value: not at the
/// estimates' rounding floor (a billionth of the value: a volume of
/// straight-sided parts, a cost made of such volumes, whose sum lands on
/// either side of that floor by rounding), nor under ten times it.
fn worth_printing(e: f64, value: f64) -> bool {
    e.is_finite() && e > 1e-8 * value.abs()
}

/// `value +- e` divided by 10^exponent, to the error's second significant
/// digit, in `prefix` `unit`.
fn pm_scaled(value: f64, e: f64, exponent: i32, prefix: &str, unit: &str) -> String {
    let u = format!("{prefix}{unit}");
    let [v, e] = [value, e].map(|x| with_unit(&scaled_text(x, e, exponent), &u));
    format!("{v} \u{b1} {e}")
}

/// `x` to an error's second significant digit, both divided by
/// 10^exponent (the error's decimals; four without an error).
fn scaled_text(x: f64, error: f64, exponent: i32) -> String {
    let e = error / 10f64.powi(exponent);
    let decimals = if e > 0.0 { (1 - e.log10().floor() as i32).clamp(0, 9) as usize } else { 4 };
    format!("{:.decimals$}", x / 10f64.powi(exponent))
}

/// "V U", or "V" alone for a unitless value.
fn with_unit(number: &str, unit: &str) -> String {
    format!("{number} {unit}").trim_end().to_string()
}

/// Whether a unit takes SI prefixes (not a ratio, degC, %, deg, kgf, ...).
fn prefixable(unit: &str) -> bool {
    !unit.is_empty() && !matches!(unit, "degC" | "%" | "deg" | "kgf" | "lbf" | "A/mm2" | "K")
}

/// The power of ten (a multiple of 3) and SI prefix that bring `reference`
/// (positive) into [1, 1000) in `unit`; (0, "") where the unit takes none.
pub fn prefix_of(reference: f64, unit: &str) -> (i32, &'static str) {
    const PREFIXES: [(i32, &str); 9] = [(-12, "p"), (-9, "n"), (-6, "u"), (-3, "m"), (0, ""), (3, "k"), (6, "M"), (9, "G"), (12, "T")];
    if !(prefixable(unit) && reference.is_finite() && reference > 0.0) {
        return (0, "");
    }
    // A volume's prefix cubes with its metre: mm3, cm3, m3 as people write them.
    if unit == "m3" {
        return if reference < 1e-6 {
            (-9, "m")
        } else if reference < 1e-3 {
            (-6, "c")
        } else {
            (0, "")
        };
    }
    let exponent = ((reference.log10() / 3.0).floor() as i32 * 3).clamp(-12, 12);
    (exponent, PREFIXES.iter().find(|p| p.0 == exponent).map_or("", |p| p.1))
}

#[cfg(test)]
mod tests {
    use super::{eng, eng_pm, eng_shared, plain_pm, significant_digits};

    #[test]
    fn values_with_errors_show_the_errors_digits() {
        assert_eq!(eng_pm(-333.16, Some(0.12), "N"), "-333.16 N \u{b1} 0.12 N");
        assert_eq!(eng_pm(0.52688, Some(2.0e-5), "T"), "526.880 mT \u{b1} 0.020 mT");
        assert_eq!(eng_pm(0.527, Some(0.012), "T"), "527 mT \u{b1} 12 mT");
        assert_eq!(eng_pm(9.5e-11, Some(6.4556e-8), "T"), "0 nT \u{b1} 65 nT");
        assert_eq!(eng_pm(0.4279, Some(0.0012), ""), "0.4279 \u{b1} 0.0012");
        assert_eq!(eng_pm(5.0, None, "N"), "5 N");
        // At the estimates' rounding floor: no error printed.
        assert_eq!(eng_pm(0.1556, Some(1.0000001e-9 * 0.1556), ""), "0.1556");
    }

    #[test]
    fn values_sharing_an_error_share_its_digits() {
        let (values, each) = eng_shared(&[0.0493341, 0.059305], Some(1.003e-6), "T");
        assert_eq!(values, ["49.3341 mT", "59.3050 mT"]);
        assert_eq!(each.as_deref(), Some("0.0010 mT"));
        let (values, each) = eng_shared(&[0.0493341, 0.059305], None, "T");
        assert_eq!(values, ["49.33 mT", "59.3 mT"]);
        assert_eq!(each, None);
    }

    /// Volumes as people write them: mm3 below a cubic centimetre, cm3
    /// below a litre.
    #[test]
    fn significant_digits_drop_trailing_zeros_and_keep_zero_plain() {
        assert_eq!(significant_digits(0.4472135955, 6), "0.447214");
        assert_eq!(significant_digits(2.5, 6), "2.5");
        assert_eq!(significant_digits(1234567.0, 6), "1234567");
        assert_eq!(significant_digits(-0.0, 6), "0");
        assert_eq!(eng(-0.0, "N"), "0 N");
    }

    #[test]
    fn volumes_take_cubed_prefixes() {
        assert_eq!(eng(1.5708e-6, "m3"), "1.571 cm3");
        assert_eq!(eng(2.175e-7, "m3"), "217.5 mm3");
        assert_eq!(eng(0.25, "m3"), "0.25 m3");
    }

    /// Lengths in the case's own unit keep it: no "kmm" past 1000 mm.
    #[test]
    fn plain_values_take_no_prefix() {
        assert_eq!(plain_pm(1234.567, Some(0.012), "mm"), "1234.567 mm \u{b1} 0.012 mm");
        assert_eq!(plain_pm(45.1846, None, "mm"), "45.18 mm");
    }

    #[test]
    fn numbers_read_as_engineers_write_them() {
        assert_eq!(eng(-333.16, "N"), "-333.2 N");
        assert_eq!(eng(5.2899e-3, "T"), "5.29 mT");
        assert_eq!(eng(0.0005, "N"), "500 uN");
        assert_eq!(eng(26_000.0, "N"), "26 kN");
        assert_eq!(eng(0.2107, "J"), "210.7 mJ");
        assert_eq!(eng(0.4279, ""), "0.4279");
        assert_eq!(eng(12.94, "kgf"), "12.94 kgf");
        assert_eq!(eng(0.0, "T"), "0 T");
        assert_eq!(eng(999.96, "N"), "1 kN");
        assert_eq!(eng(1.389e-2, "H"), "13.89 mH");
        // Beyond the prefixes: scientific notation, never an error of "0.000000000".
        assert_eq!(eng(-1.519e-18, "N"), "-1.519e-18 N");
        assert_eq!(eng_pm(-1.519e-18, Some(2.1e-23), "N"), "-1.519000e-18 N \u{b1} 2.1e-23 N");
        assert_eq!(eng_pm(3.2e-13, Some(2.0e-17), "N"), "0.320000 pN \u{b1} 0.000020 pN");
        assert_eq!(eng_pm(5.0e-15, Some(5.0e-21), "N"), "5.0000000e-15 N \u{b1} 5.0e-21 N");
    }
}
