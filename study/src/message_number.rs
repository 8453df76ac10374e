//! Numbers as the study's messages print them (no imports: every module
//! that words a warning may use it).

/// A number for a message to three significant digits, however small (a
/// sliver's advice read "mesh_size = 0.000" with fixed decimals), without
/// trailing zeros ("2 A", not "2.00 A").
pub(crate) fn significant(x: f64) -> String {
    if x == 0.0 || !x.is_finite() {
        return format!("{x}");
    }
    format!("{}", format!("{x:.2e}").parse::<f64>().unwrap_or(x))
}
