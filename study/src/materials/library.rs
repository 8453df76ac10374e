//! The library's lookup by name across linear materials, soft-magnetic
//! curves and magnet grades.

use super::entry::{Entry, Material};
use super::{magnets, soft};

/// The entry with this name (case-sensitive, as the trade writes it).
pub fn lookup(name: &str) -> Option<Entry> {
    linear(name).or_else(|| soft::lookup(name)).or_else(|| magnets::lookup(name))
}

/// Every name the library answers to (composite NdFeB grades included).
pub fn names() -> Vec<String> {
    let mut v: Vec<String> = LINEAR.iter().map(|l| l.0.to_string()).collect();
    v.extend(soft::names());
    v.extend(magnets::names());
    v
}

const LINEAR: &[(&str, &str, f64, &str)] = &[
    ("air", "linear", 1.0, "definition: relative permeability 1"),
    ("vacuum", "linear", 1.0, "definition: relative permeability 1"),
    (
        "copper",
        "conductor",
        1.0,
        "copper is diamagnetic with mu_r - 1 about -1e-5 (from memory); taken as 1",
    ),
    (
        "aluminium",
        "conductor",
        1.0,
        "aluminium is paramagnetic with mu_r - 1 about 2e-5 (from memory); taken as 1",
    ),
    (
        "austenitic-stainless",
        "linear",
        1.004,
        "annealed austenitic stainless: mu_r 1.003 to 1.005 at 16 kA/m (S39); rises with cold work",
    ),
    ("plastic", "linear", 1.0, "non-magnetic: relative permeability 1"),
];

fn linear(name: &str) -> Option<Entry> {
    let l = LINEAR.iter().find(|l| l.0 == name)?;
    let material = match (l.0, l.1) {
        ("air" | "vacuum" | "plastic", _) => Material::Air,
        (_, "conductor") => Material::Conductor,
        _ => Material::Linear { relative_permeability: l.2 },
    };
    Some(Entry {
        name: l.0.into(),
        family: l.1.into(),
        material,
        source: l.3.into(),
    })
}

#[cfg(test)]
mod tests {
    use super::{lookup, names};
    use crate::materials::{implausible_coefficients, implausible_coercivity, implausible_relative_permeability, implausible_remanence, Material};

    /// Every library entry passes the checks a case's own material is
    /// held to: a magnet's temperature coefficients are some family's (the
    /// ferrites' rising coercivity included), a linear material's mu_r is
    /// some material's. The checks refuse a dropped minus sign, not a grade.
    #[test]
    fn every_entry_passes_the_checks_a_cases_material_meets() {
        let mut magnets = 0;
        for name in names() {
            match lookup(&name).map(|e| e.material) {
                Some(Material::Magnet(g)) => {
                    magnets += 1;
                    assert_eq!(implausible_coefficients(g.br, g.br_coeff, g.hcj_coeff), None, "{name}");
                    assert_eq!(implausible_coercivity(g.hcj), None, "{name}");
                    assert_eq!(implausible_remanence(g.br), None, "{name}");
                }
                Some(Material::Linear { relative_permeability }) => {
                    assert_eq!(implausible_relative_permeability(relative_permeability), None, "{name}");
                }
                _ => {}
            }
        }
        assert!(magnets > 20, "{magnets} magnet grades");
        // A dropped sign on either coefficient is caught.
        assert_eq!(implausible_coefficients(1.3, 0.12, -0.6).map(|c| c.0), Some("br_coeff"));
        assert_eq!(implausible_coefficients(1.3, -0.12, 0.6).map(|c| c.0), Some("hcj_coeff"));
        assert_eq!(implausible_coefficients(0.4, -0.2, 0.27), None, "a ferrite's rising coercivity");
    }
}
