//! Help for a material name the library does not hold, by what the name
//! looks like: a sintered NdFeB grade gets the range the library has (N55
//! was met by "did you mean 'N35'?"), a steel designation the sourced
//! curves that are nearest in kind (1018 was met by a samarium-cobalt
//! grade), anything else the closest name or the list of families.

/// Steel and iron designations people write, and the sourced curves of the
/// same kind of material, with what to say about them.
const DESIGNATIONS: &[(&[&str], &str)] = &[
    (
        &["1005", "1006", "1008", "1010", "1015", "1018", "1020", "1022", "1026", "12l14", "1117", "s235", "s275", "s355", "st37", "mild-steel", "mild steel", "steel"],
        "a low-carbon steel: the sourced curves nearest in kind are 'steel-1010' and 'low-carbon-steel'; for this grade's own curve, give its supplier's data with bh_csv",
    ),
    (
        &["416", "410", "420", "430", "430f", "stainless", "ferritic-stainless"],
        "a ferritic or martensitic stainless steel: the sourced curve nearest in kind is 'stainless-430'",
    ),
    (
        &["304", "316", "316l", "303", "austenitic"],
        "an austenitic stainless steel: 'austenitic-stainless' (nearly non-magnetic, mu_r about 1.004 annealed)",
    ),
    (
        &["m19", "m15", "m22", "m27", "m36", "m43", "m45", "electrical-steel", "silicon-steel", "lamination"],
        "a non-oriented electrical steel: the sourced curves are 'M270-35A' and 'M400-50A'",
    ),
    (
        &["iron", "armco", "soft-iron", "ferrite-core"],
        "an iron: the sourced curve nearest in kind is 'pure-iron'",
    ),
    (&["cast-iron", "gray-cast-iron", "ductile-iron"], "a cast iron: the sourced curve is 'grey-cast-iron'"),
];

/// The help line for an unknown material name, given every name known.
pub fn help(name: &str, known: &[String]) -> String {
    let lower = name.to_ascii_lowercase();
    if let Some(grade) = ndfeb_number(name) {
        let numbers: Vec<u32> = known.iter().filter_map(|k| ndfeb_number(k)).collect();
        let (lo, hi) = (numbers.iter().min().copied().unwrap_or(0), numbers.iter().max().copied().unwrap_or(0));
        if grade < lo || grade > hi {
            return format!("sintered NdFeB grades in the library run from N{lo} to N{hi}; for N{grade}, give its supplier's Br and HcJ in [materials]");
        }
    }
    for (names, say) in DESIGNATIONS {
        if names
            .iter()
            .any(|n| *n == lower || lower.ends_with(&format!("-{n}")) || lower.starts_with(&format!("{n}-")))
        {
            return format!("'{name}' looks like {say}");
        }
    }
    match crate::case::suggest::closest(name, known.iter().map(String::as_str)) {
        Some(c) => format!("did you mean '{c}'?"),
        None => "`lodestone materials` lists every name by family".to_string(),
    }
}

/// The grade number of a sintered NdFeB name such as N42 or N42SH.
fn ndfeb_number(name: &str) -> Option<u32> {
    let rest = name.strip_prefix('N')?;
    let digits: String = rest.chars().take_while(char::is_ascii_digit).collect();
    if digits.is_empty() || !rest[digits.len()..].chars().all(|c| c.is_ascii_uppercase()) {
        return None;
    }
    digits.parse().ok()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn known() -> Vec<String> {
        [
            "N35",
            "N42",
            "N52",
            "N42SH",
            "YX16",
            "steel-1010",
            "low-carbon-steel",
            "stainless-430",
            "M270-35A",
        ]
        .iter()
        .map(|s| s.to_string())
        .collect()
    }

    #[test]
    fn help_follows_what_the_name_looks_like() {
        assert!(help("N55", &known()).contains("from N35 to N52"), "{}", help("N55", &known()));
        assert!(help("1018", &known()).contains("'steel-1010'"));
        assert!(!help("1018", &known()).contains("YX16"));
        assert!(help("mild-steel", &known()).contains("low-carbon"));
        assert!(help("416", &known()).contains("'stainless-430'"));
        assert!(help("M19", &known()).contains("'M270-35A'"));
        assert_eq!(help("N42S", &known()), "did you mean 'N42'?");
        assert!(help("unobtainium", &known()).contains("lodestone materials"));
    }
}
