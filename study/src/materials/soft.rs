//! Soft-magnetic B-H curves (H in A/m, B in T).

use super::entry::{Entry, Material};
use super::sourced_curves::SOURCED;

struct Curve {
    name: &'static str,
    family: &'static str,
    points: &'static [[f64; 2]],
    source: &'static str,
}

const CURVES: &[Curve] = &[
    Curve {
        name: "low-carbon-steel",
        family: "solid steel",
        points: &[
            [0.0, 0.0], [16.0, 0.0025], [30.0, 0.005], [54.0, 0.0125], [93.0, 0.025], [143.0, 0.05], [191.0, 0.1], [210.0, 0.2],
            [222.0, 0.3], [233.0, 0.4], [247.0, 0.5], [258.0, 0.6], [272.0, 0.7], [289.0, 0.8], [313.0, 0.9], [342.0, 1.0],
            [377.0, 1.1], [433.0, 1.2], [509.0, 1.3], [648.0, 1.4], [933.0, 1.5], [1228.0, 1.55], [1934.0, 1.6], [2913.0, 1.65],
            [4993.0, 1.7], [7189.0, 1.75], [9423.0, 1.8], [12000.0, 1.850], [15000.0, 1.904], [20000.0, 1.985], [25000.0, 2.054],
            [30000.0, 2.112], [40000.0, 2.190], [48866.0, 2.220], [60000.0, 2.2353982], [100000.0, 2.2856637], [200000.0, 2.4113274],
        ],
        source: "TEAM Workshop Problem 13 steel (Nakata and Fujiwara, COMPEL 11(3), 1992; S32): table to 1.8 T as transcribed from a SECONDARY public copy; points above 1.8 T computed from the problem's saturation law J = a H^2 + b H + c (derived)",
    },
];

/// Designations that name the same material as a sourced curve (the same
/// material number, or the AISI name of a European grade): they resolve to
/// that curve, whose source says which grade it is.
const SAME_MATERIAL: &[(&str, &str)] = &[
    ("1.0330", "DC01"),
    ("1.0347", "DC03"),
    ("1.0715", "9SMn28k"),
    ("1.0718", "9SMnPb28"),
    ("12L14", "9SMnPb28"),
    ("AISI-12L14", "9SMnPb28"),
    ("1.4016", "X6Cr17"),
    ("430", "X6Cr17"),
    ("AISI-430", "X6Cr17"),
    ("stainless-430", "X6Cr17"),
];

/// The curve of this name, or of the sourced grade this designation is.
pub fn lookup(name: &str) -> Option<Entry> {
    let target = SAME_MATERIAL.iter().find(|a| a.0 == name).map_or(name, |a| a.1);
    let (curve, family, points, source) = all().find(|c| c.0 == target)?;
    let source = if curve == name {
        source.to_string()
    } else {
        format!("'{name}' is the same material as {curve}: {source}")
    };
    Some(Entry {
        name: name.into(),
        family: family.into(),
        material: Material::Soft { curve: points.to_vec() },
        source,
    })
}

/// The library's curves: the TEAM 13 steel and the generated sourced set.
fn all() -> impl Iterator<Item = (&'static str, &'static str, &'static [[f64; 2]], &'static str)> {
    CURVES.iter().map(|c| (c.name, c.family, c.points, c.source)).chain(SOURCED.iter().copied())
}

pub fn names() -> Vec<String> {
    all().map(|c| c.0.to_string()).collect()
}

/// The library curve with the highest knee, and that knee in T (the
/// leaded free-machining steel 9SMnPb28's, 1.70 T): above it every steel
/// and iron the library holds saturates, so a linear stand-in for steel
/// carrying more is outside its model.
pub fn highest_knee() -> (&'static str, f64) {
    all()
        .filter_map(|c| Some((c.0, super::curves::knee(c.2)?)))
        .fold(("", 0.0), |best, c| if c.1 > best.1 { c } else { best })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The highest knee is no lower than any library curve's, and is one of
    /// them: the leaded free-machining steel's 1.70 T, as `lodestone
    /// materials 9SMnPb28` prints it (relay iron 1.60 T, low-carbon steels
    /// 1.40 T).
    #[test]
    fn the_highest_knee_is_the_highest_of_the_library() {
        let (name, knee) = highest_knee();
        for n in names() {
            let Some(Entry {
                material: Material::Soft { curve },
                ..
            }) = lookup(&n)
            else {
                panic!("{n}")
            };
            assert!(super::super::curves::knee(&curve).unwrap() <= knee, "{n}");
        }
        assert_eq!(name, "9SMnPb28");
        assert!((1.65..1.75).contains(&knee), "{knee}");
    }

    /// Every curve must pass the solver's own table check (its polarization
    /// within what iron-cobalt reaches among them), stay within the
    /// permeability a case's curve is warned past, and carry no
    /// from-memory label: the library holds sourced curves only.
    #[test]
    fn every_curve_is_valid_and_sourced() {
        for (name, _, points, source) in all() {
            assert!(super::super::check_table(points).is_ok(), "{name}");
            let (mu, _) = super::super::largest_relative_permeability(points);
            assert!(mu > 100.0 && mu < super::super::PLAUSIBLE_RELATIVE_PERMEABILITY, "{name}: {mu}");
            assert!(!source.to_lowercase().contains("from memory"), "{name}: {source}");
        }
    }

    /// 12L14 is the AISI name of material 1.0718 (9SMnPb28): the same curve,
    /// with the source saying so; a designation with no sourced curve is not
    /// quietly given another grade's.
    #[test]
    fn designations_of_the_same_material_resolve_to_its_curve() {
        let Some(Entry {
            material: Material::Soft { curve },
            source,
            ..
        }) = lookup("12L14")
        else {
            panic!("12L14")
        };
        assert!(source.contains("same material as 9SMnPb28"));
        let Some((_, _, points, _)) = all().find(|c| c.0 == "9SMnPb28") else {
            panic!("9SMnPb28")
        };
        assert_eq!(curve, points.to_vec());
        assert!(lookup("1018").is_none(), "1018 has no sourced curve; the case reader names the closest");
    }
}
