//! Units of the trade and their SI factors, written once.
//!
//! Factors follow the SI Brochure (BIPM, 9th ed., 2019) and NIST SP 811
//! (2008 ed.), appendix B: 1 in = 0.0254 m exactly, 1 mil = 0.001 in,
//! 1 G = 1e-4 T, 1 Oe = 1000/(4 pi) A/m, 1 lbf = 4.4482216152605 N,
//! 1 MGOe = 1e6 G Oe = 100/(4 pi) kJ/m3.

use std::f64::consts::PI;

/// What a quantity measures.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Kind {
    Length,
    FluxDensity,
    FieldStrength,
    EnergyProduct,
    Temperature,
    Current,
    CurrentDensity,
    Force,
    Percent,
    PercentPerKelvin,
    Angle,
    MagneticFlux,
    Inductance,
    Energy,
    Moment,
    Volume,
    Dimensionless,
}

impl Kind {
    pub fn describe(self) -> &'static str {
        match self {
            Kind::Length => "a length (mm, cm, m, in, mil)",
            Kind::FluxDensity => "a flux density (T, mT, G, kG)",
            Kind::FieldStrength => "a field strength (A/m, kA/m, Oe, kOe)",
            Kind::EnergyProduct => "an energy product (kJ/m3, MGOe)",
            Kind::Temperature => "a temperature (degC, K)",
            Kind::Current => "a current (A, kA)",
            Kind::CurrentDensity => "a current density (A/m2, A/mm2)",
            Kind::Force => "a force (N, kN, lbf)",
            Kind::Percent => "a percentage (%)",
            Kind::PercentPerKelvin => "a temperature coefficient (%/K)",
            Kind::Angle => "an angle (deg, rad)",
            Kind::MagneticFlux => "a magnetic flux (Wb, mWb, uWb)",
            Kind::Inductance => "an inductance (H, mH, uH)",
            Kind::Energy => "an energy (J, mJ)",
            Kind::Moment => "a magnetic moment (A m2)",
            Kind::Volume => "a volume (m3, cm3, mm3, in3)",
            Kind::Dimensionless => "a plain number",
        }
    }
}

/// (symbol, kind, factor to SI). Temperatures convert to degrees Celsius.
pub const UNITS: &[(&str, Kind, f64)] = &[
    ("m", Kind::Length, 1.0),
    ("cm", Kind::Length, 0.01),
    ("mm", Kind::Length, 0.001),
    ("um", Kind::Length, 1e-6),
    ("in", Kind::Length, 0.0254),
    ("mil", Kind::Length, 0.0254e-3),
    ("T", Kind::FluxDensity, 1.0),
    ("mT", Kind::FluxDensity, 1e-3),
    ("uT", Kind::FluxDensity, 1e-6),
    ("G", Kind::FluxDensity, 1e-4),
    ("kG", Kind::FluxDensity, 0.1),
    ("mG", Kind::FluxDensity, 1e-7),
    ("A/m", Kind::FieldStrength, 1.0),
    ("kA/m", Kind::FieldStrength, 1e3),
    ("Oe", Kind::FieldStrength, 1000.0 / (4.0 * PI)),
    ("kOe", Kind::FieldStrength, 1e6 / (4.0 * PI)),
    ("J/m3", Kind::EnergyProduct, 1.0),
    ("kJ/m3", Kind::EnergyProduct, 1e3),
    ("MGOe", Kind::EnergyProduct, 1e5 / (4.0 * PI)),
    ("degC", Kind::Temperature, 1.0),
    ("\u{b0}C", Kind::Temperature, 1.0),
    ("K", Kind::Temperature, 1.0),
    ("A", Kind::Current, 1.0),
    ("kA", Kind::Current, 1e3),
    ("A/m2", Kind::CurrentDensity, 1.0),
    ("A/mm2", Kind::CurrentDensity, 1e6),
    ("N", Kind::Force, 1.0),
    ("kN", Kind::Force, 1e3),
    ("lbf", Kind::Force, 4.448_221_615_260_5),
    ("kgf", Kind::Force, 9.806_65),
    ("%", Kind::Percent, 1.0),
    ("%/K", Kind::PercentPerKelvin, 1.0),
    ("%/degC", Kind::PercentPerKelvin, 1.0),
    ("deg", Kind::Angle, PI / 180.0),
    ("rad", Kind::Angle, 1.0),
    ("Wb", Kind::MagneticFlux, 1.0),
    ("mWb", Kind::MagneticFlux, 1e-3),
    ("uWb", Kind::MagneticFlux, 1e-6),
    ("H", Kind::Inductance, 1.0),
    ("mH", Kind::Inductance, 1e-3),
    ("uH", Kind::Inductance, 1e-6),
    ("J", Kind::Energy, 1.0),
    ("mJ", Kind::Energy, 1e-3),
    ("A m2", Kind::Moment, 1.0),
    ("A*m2", Kind::Moment, 1.0),
    ("m3", Kind::Volume, 1.0),
    ("cm3", Kind::Volume, 1e-6),
    ("mm3", Kind::Volume, 1e-9),
    ("in3", Kind::Volume, 0.0254 * 0.0254 * 0.0254),
];

/// Offset added after scaling, for absolute temperatures (K to degC).
pub fn offset(symbol: &str) -> f64 {
    if symbol == "K" {
        -273.15
    } else {
        0.0
    }
}

/// A scaled value with its unit's offset added, rounded to a nanokelvin: 20 K
/// is -253.15 degC, not the -253.14999999999998 that the sum leaves and that
/// messages would quote.
pub fn shifted(scaled: f64, symbol: &str) -> f64 {
    let v = scaled + offset(symbol);
    if offset(symbol) != 0.0 && v.abs() < 1e9 {
        (v * 1e9).round() / 1e9
    } else {
        v
    }
}

/// Spellings people write for a unit, with the symbol meant: a word that
/// is a different unit of the same kind by edit distance ("80 C" was met by
/// "did you mean 'K'?", i.e. 80 kelvin) must lead to the unit meant.
const ALIASES: &[(&str, &str)] = &[
    ("C", "degC"),
    ("celsius", "degC"),
    ("degree", "deg"),
    ("degrees", "deg"),
    ("kelvin", "K"),
    ("millimetre", "mm"),
    ("millimeter", "mm"),
    ("centimetre", "cm"),
    ("centimeter", "cm"),
    ("metre", "m"),
    ("meter", "m"),
    ("inch", "in"),
    ("inches", "in"),
    ("thou", "mil"),
    ("tesla", "T"),
    ("millitesla", "mT"),
    ("gauss", "G"),
    ("oersted", "Oe"),
    ("newton", "N"),
    ("newtons", "N"),
    ("kgF", "kgf"),
    ("kp", "kgf"),
    ("lb", "lbf"),
    ("lbs", "lbf"),
    ("ampere", "A"),
    ("amps", "A"),
    ("A/mm^2", "A/mm2"),
    ("henry", "H"),
    ("weber", "Wb"),
    ("joule", "J"),
];

/// Help for an unknown unit where `kind` is wanted: the unit meant, when
/// the word is a known spelling of one or close to one of that kind, else
/// the list of the kind's units.
pub fn suggestion(word: &str, kind: Kind) -> String {
    let symbols = symbols_of(kind);
    let meant = ALIASES
        .iter()
        .find(|(alias, symbol)| alias.eq_ignore_ascii_case(word) && symbols.contains(symbol))
        .map(|(_, symbol)| symbol.to_string())
        .or_else(|| symbols.iter().find(|s| s.eq_ignore_ascii_case(word)).map(|s| s.to_string()))
        .or_else(|| crate::case::suggest::closest(word, symbols.iter().copied()));
    match meant {
        Some(s) => format!("did you mean '{s}'?"),
        // A value with no units of its own (an optimizer's objective, a
        // bound on a value whose unit has no entries) is written bare, in SI.
        None if symbols.is_empty() => "write it without a unit, in SI units".to_string(),
        None => format!("the units of {}: {}", kind.describe().split(" (").next().unwrap_or(""), symbols.join(", ")),
    }
}

/// Looks a unit up by its symbol.
pub fn unit(symbol: &str) -> Option<(Kind, f64)> {
    UNITS.iter().find(|u| u.0 == symbol).map(|u| (u.1, u.2))
}

/// Symbols that measure `kind`.
pub fn symbols_of(kind: Kind) -> Vec<&'static str> {
    UNITS.iter().filter(|u| u.1 == kind).map(|u| u.0).collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn suggestions_know_the_kind_asked_for() {
        assert_eq!(suggestion("C", Kind::Temperature), "did you mean 'degC'?");
        assert_eq!(suggestion("millimetre", Kind::Length), "did you mean 'mm'?");
        assert_eq!(suggestion("MM", Kind::Length), "did you mean 'mm'?");
        assert_eq!(suggestion("kp", Kind::Force), "did you mean 'kgf'?");
        assert!(
            suggestion("furlong", Kind::Length).contains("m, cm, mm, um, in, mil"),
            "{}",
            suggestion("furlong", Kind::Length)
        );
        // A spelling of another kind's unit is not offered.
        assert!(!suggestion("tesla", Kind::Length).contains("'T'"));
        // A kind without units of its own says so instead of an empty list.
        assert_eq!(suggestion("furlong", Kind::Dimensionless), "write it without a unit, in SI units");
        assert_eq!(suggestion("mm^3", Kind::Volume), "did you mean 'mm3'?");
    }

    #[test]
    fn factors_match_published_definitions() {
        // NIST SP 811 (2008), B.8: inch = 2.54e-2 m exactly; mil = 2.54e-5 m.
        assert_eq!(unit("in").unwrap().1, 2.54e-2);
        assert!((unit("mil").unwrap().1 - 2.54e-5).abs() < 1e-20);
        // NIST SP 811 B.8: gauss = 1e-4 T; oersted = 79.57747 A/m.
        assert_eq!(unit("G").unwrap().1, 1e-4);
        assert!((unit("Oe").unwrap().1 - 79.577_47).abs() < 1e-5);
        // NIST SP 811 B.8: pound-force = 4.448222 N.
        assert!((unit("lbf").unwrap().1 - 4.448_222).abs() < 1e-6);
        // SI Brochure 9th ed.: T = 0 K corresponds to -273.15 degC.
        assert_eq!(offset("K"), -273.15);
        assert_eq!(shifted(20.0, "K"), -253.15);
        assert_eq!(shifted(353.15, "K"), 80.0);
        // NIST SP 811 B.8: kilogram-force = 9.80665 N (standard gravity, exact).
        assert_eq!(unit("kgf").unwrap().1, 9.806_65);
        // 1 MGOe = 7.957747 kJ/m3 (from G and Oe above).
        assert!((unit("MGOe").unwrap().1 - 7957.747).abs() < 1e-3);
        // NIST SP 811 B.8: cubic inch = 1.638706e-5 m3.
        assert!((unit("in3").unwrap().1 - 1.638_706e-5).abs() < 1e-11);
        assert_eq!(unit("mm3").unwrap().1, 1e-9);
    }
}
