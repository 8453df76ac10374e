//! Permanent-magnet grades: sintered NdFeB (grade number and temperature
//! class), SmCo5 and Sm2Co17, hard ferrite, bonded NdFeB.

use super::entry::{Entry, Material};
use super::grade::MagnetGrade;

/// Sintered NdFeB by grade number: Br min..max (T), HcB min (kA/m).
/// S6 (min/max Br), S1 (HcB; coefficients; recoil 1.05), S5 (typical).
const NDFEB: &[(&str, f64, f64, f64)] = &[
    ("N35", 1.17, 1.22, 868.0),
    ("N38", 1.22, 1.25, 899.0),
    ("N40", 1.25, 1.28, 907.0),
    ("N42", 1.28, 1.32, 915.0),
    ("N45", 1.32, 1.38, 923.0),
    ("N48", 1.37, 1.42, 836.0),
    ("N50", 1.39, 1.45, 796.0),
    ("N52", 1.42, 1.48, 796.0),
];

/// Temperature classes: suffix, HcJ min (kA/m), alpha HcJ (%/K), Tw (degC), highest grade number made, source.
const CLASSES: &[(&str, f64, f64, f64, u32, &str)] = &[
    (
        "",
        955.0,
        -0.75,
        80.0,
        52,
        "N class: HcJ >= 955 kA/m (S1; S5; S6; 876 kA/m for N48-N52 at some suppliers, S6), alpha HcJ -0.75 %/K (S1; S5)",
    ),
    (
        "M",
        1114.0,
        -0.68,
        100.0,
        52,
        "M class: HcJ >= 1114 kA/m, alpha HcJ -0.675 to -0.70 %/K (S1; S5; S6; S11)",
    ),
    ("H", 1353.0, -0.605, 120.0, 50, "H class: HcJ >= 1353 kA/m, alpha HcJ -0.605 %/K (S5; S6; S2)"),
    ("SH", 1592.0, -0.50, 150.0, 48, "SH class: HcJ >= 1592 kA/m (S2; S7), alpha HcJ -0.50 %/K (S10)"),
    (
        "UH",
        1990.0,
        -0.51,
        180.0,
        42,
        "UH class: HcJ >= 1990 kA/m (S7; S8), alpha HcJ about -0.51 %/K FROM MEMORY",
    ),
    (
        "EH",
        2388.0,
        -0.47,
        200.0,
        38,
        "EH class: HcJ >= 2388 kA/m (S8; S13), alpha HcJ -0.47 %/K (S13, SECONDARY)",
    ),
    (
        "AH",
        2786.0,
        -0.39,
        220.0,
        38,
        "AH class: HcJ >= 2786 kA/m (S8), alpha HcJ -0.393 %/K (S13, SECONDARY)",
    ),
];

/// Other grades: name, family, Br (T), HcB (kA/m), HcJ (kA/m), mu_rec, alpha Br, alpha HcJ, Tw, source.
#[allow(clippy::type_complexity)]
const OTHERS: &[(&str, &str, f64, f64, f64, f64, f64, f64, f64, &str)] = &[
    (
        "YX16",
        "SmCo5",
        0.82,
        612.0,
        1194.0,
        1.05,
        -0.04,
        -0.30,
        250.0,
        "S17 (Br mid of 0.79-0.85 T; HcB, HcJ minima; coefficients); recoil 1.05 (S19)",
    ),
    ("YX18", "SmCo5", 0.87, 644.0, 1194.0, 1.05, -0.04, -0.30, 250.0, "S17; recoil 1.05 (S19)"),
    ("YX20", "SmCo5", 0.915, 676.0, 1194.0, 1.05, -0.04, -0.30, 250.0, "S17; recoil 1.05 (S19)"),
    ("YX22", "SmCo5", 0.94, 710.0, 1194.0, 1.05, -0.04, -0.30, 250.0, "S17; recoil 1.05 (S19)"),
    ("YX24", "SmCo5", 0.975, 730.0, 1194.0, 1.05, -0.04, -0.30, 250.0, "S17; recoil 1.05 (S19)"),
    ("YXG22", "Sm2Co17", 0.95, 676.0, 1433.0, 1.05, -0.03, -0.20, 350.0, "S17; recoil 1.05 (S19)"),
    (
        "YXG24H",
        "Sm2Co17",
        0.985,
        692.0,
        1990.0,
        1.05,
        -0.025,
        -0.20,
        350.0,
        "S18 (Br, HcB, HcJ, alpha Br); alpha HcJ -0.20 %/K from the S20 range -0.15..-0.30",
    ),
    (
        "YXG26H",
        "Sm2Co17",
        1.035,
        748.0,
        1990.0,
        1.05,
        -0.03,
        -0.20,
        350.0,
        "S18; alpha HcJ from the S20 range",
    ),
    (
        "YXG28H",
        "Sm2Co17",
        1.055,
        756.0,
        1990.0,
        1.05,
        -0.035,
        -0.20,
        350.0,
        "S18; alpha HcJ from the S20 range",
    ),
    (
        "YXG30H",
        "Sm2Co17",
        1.09,
        788.0,
        1990.0,
        1.05,
        -0.035,
        -0.20,
        350.0,
        "S18 (row truncated: alpha Br from YXG28H); alpha HcJ from the S20 range",
    ),
    (
        "Y10T",
        "hard ferrite",
        0.218,
        145.0,
        250.0,
        1.1,
        -0.2,
        0.27,
        250.0,
        "S22 typical values (SJ285-77); coefficients S23; recoil 1.1 FROM MEMORY",
    ),
    (
        "Y25",
        "hard ferrite",
        0.37,
        150.0,
        170.0,
        1.1,
        -0.2,
        0.27,
        250.0,
        "S22 typical values; coefficients S23; recoil 1.1 FROM MEMORY",
    ),
    (
        "Y30",
        "hard ferrite",
        0.385,
        210.0,
        220.0,
        1.1,
        -0.2,
        0.27,
        250.0,
        "S22 typical values (also sold as C5); coefficients S23; recoil 1.1 FROM MEMORY",
    ),
    (
        "Y30BH",
        "hard ferrite",
        0.39,
        235.0,
        245.0,
        1.1,
        -0.2,
        0.27,
        250.0,
        "S22 typical values; coefficients S23; recoil 1.1 FROM MEMORY",
    ),
    (
        "Y33",
        "hard ferrite",
        0.42,
        235.0,
        240.0,
        1.1,
        -0.2,
        0.27,
        250.0,
        "S22 typical values; coefficients S23; recoil 1.1 FROM MEMORY",
    ),
    (
        "Y35",
        "hard ferrite",
        0.41,
        195.0,
        200.0,
        1.1,
        -0.2,
        0.27,
        250.0,
        "S22 typical values; coefficients S23; recoil 1.1 FROM MEMORY",
    ),
    (
        "C8",
        "hard ferrite",
        0.39,
        255.0,
        265.0,
        1.1,
        -0.2,
        0.27,
        250.0,
        "S22 typical values (C8A); coefficients S23; recoil 1.1 FROM MEMORY",
    ),
    (
        "C10",
        "hard ferrite",
        0.41,
        300.0,
        287.0,
        1.1,
        -0.2,
        0.27,
        250.0,
        "S22 typical values; coefficients S23; recoil 1.1 FROM MEMORY",
    ),
    (
        "BN6",
        "bonded NdFeB",
        0.565,
        330.0,
        597.0,
        1.2,
        -0.11,
        -0.4,
        160.0,
        "S29 (mid of ranges); recoil 1.2 (S30 for compression bonded); alpha HcJ -0.4 %/K FROM MEMORY",
    ),
    (
        "BN8",
        "bonded NdFeB",
        0.65,
        430.0,
        716.0,
        1.2,
        -0.11,
        -0.4,
        160.0,
        "S29 (mid of ranges); recoil 1.2 (S30); alpha HcJ -0.4 %/K FROM MEMORY",
    ),
    (
        "BN8H",
        "bonded NdFeB",
        0.63,
        422.0,
        915.0,
        1.2,
        -0.10,
        -0.4,
        180.0,
        "S29 (mid of ranges); recoil 1.2 (S30); alpha HcJ -0.4 %/K FROM MEMORY",
    ),
    (
        "BNP-6",
        "bonded NdFeB",
        0.675,
        484.0,
        660.0,
        1.2,
        -0.11,
        -0.4,
        160.0,
        "S30 (mid of ranges, recoil 1.20); alpha HcJ -0.4 %/K FROM MEMORY",
    ),
];

const ALIASES: &[(&str, &str)] = &[("C5", "Y30"), ("C1", "Y10T"), ("C8A", "C8")];

pub fn lookup(name: &str) -> Option<Entry> {
    let name = ALIASES.iter().find(|a| a.0 == name).map_or(name, |a| a.1);
    ndfeb(name).or_else(|| other(name))
}

fn ndfeb(name: &str) -> Option<Entry> {
    let (base, class) = NDFEB
        .iter()
        .find_map(|g| name.strip_prefix(g.0).and_then(|rest| CLASSES.iter().find(|c| c.0 == rest)).map(|c| (g, c)))?;
    let number: u32 = base.0[1..].parse().ok()?;
    if number > class.4 {
        return None;
    }
    let br = 0.5 * (base.1 + base.2);
    let grade = MagnetGrade {
        br,
        recoil_permeability: 1.05,
        hcj: class.1 * 1e3,
        hcb: Some(base.3 * 1e3),
        br_coeff: -0.12,
        hcj_coeff: class.2,
        max_temperature: Some(class.3),
        squareness: MagnetGrade::NDFEB_SQUARENESS,
        intrinsic: None,
    };
    let source = format!(
        "sintered NdFeB: Br {:.3} T = middle of the {}-{} T catalogue range for {} (S6; S1), recoil permeability 1.05 and alpha Br -0.12 %/K (S1; S12); {}; typical catalogue values, not a standard's minimum",
        br, base.1, base.2, base.0, class.5
    );
    Some(Entry {
        name: name.into(),
        family: "sintered NdFeB".into(),
        material: Material::Magnet(grade),
        source,
    })
}

fn other(name: &str) -> Option<Entry> {
    let g = OTHERS.iter().find(|g| g.0 == name)?;
    let grade = MagnetGrade {
        br: g.2,
        recoil_permeability: g.5,
        hcj: g.4 * 1e3,
        hcb: Some(g.3 * 1e3),
        br_coeff: g.6,
        hcj_coeff: g.7,
        max_temperature: Some(g.8),
        squareness: MagnetGrade::DEFAULT_SQUARENESS,
        intrinsic: None,
    };
    Some(Entry {
        name: g.0.into(),
        family: g.1.into(),
        material: Material::Magnet(grade),
        source: g.9.into(),
    })
}

pub fn names() -> Vec<String> {
    let mut v = Vec::new();
    for c in CLASSES {
        for g in NDFEB {
            if g.0[1..].parse::<u32>().is_ok_and(|n| n <= c.4) {
                v.push(format!("{}{}", g.0, c.0));
            }
        }
    }
    v.extend(OTHERS.iter().map(|g| g.0.to_string()));
    v.extend(ALIASES.iter().map(|a| a.0.to_string()));
    v
}
