//! Help for a material name the library does not hold, by what the name
//! looks like: a sintered NdFeB grade gets the range the library has (N55
//! was met by "did you mean 'N35'?"), a steel designation the sourced
//! curves that are nearest in kind (1018 was met by a samarium-cobalt
//! grade), anything else the closest name or the list of families.

/// Steel and iron designations people write, and the sourced curves of the
/// same kind of material, with what to say about them.
const DESIGNATIONS: &[(&[&str], &str)] = &[
    (
        &["1005", "1006", "1008", "1010", "1015", "1018", "1020", "1022", "1026", "c10", "c15", "c22", "s235", "s275", "s355", "st37", "mild-steel", "mild steel", "steel"],
        "a low-carbon steel with no sourced curve in the library: the closest sourced grade is 'DC01' (cold-rolled low-carbon sheet, the proxy for 1008/1010), then 'DC03' and 'low-carbon-steel' (TEAM 13); heats differ up to 2.4 times in H at 1.5 T, so for this grade's own curve give its supplier's data with bh_csv",
    ),
    (
        &["1213", "1215", "11smn30", "11smnpb30", "free-machining"],
        "a free-machining steel: the sourced curves are '9SMn28k' (unleaded) and '9SMnPb28' (= 12L14)",
    ),
    (
        &["416", "410", "420", "430f", "stainless", "ferritic-stainless"],
        "a ferritic or martensitic stainless steel with no sourced curve in the library: the closest sourced grade is 'X6Cr17' (= AISI 430)",
    ),
    (
        &["304", "316", "316l", "303", "austenitic"],
        "an austenitic stainless steel: 'austenitic-stainless' (nearly non-magnetic, mu_r about 1.004 annealed)",
    ),
    (
        &["m19", "m15", "m22", "m27", "m36", "m43", "m45", "m270-35a", "m235-35a", "m300-35a", "m470-50a", "m530-50a", "m600-50a", "m800-50a", "electrical-steel", "silicon-steel", "lamination"],
        "a non-oriented electrical steel with no sourced curve in the library: the sourced typical curves are 'M250-35A', 'M270-50A', 'M330-50A' and 'M400-50A'; pick the one nearest in loss class and thickness",
    ),
    (
        &["iron", "pure-iron", "armco", "soft-iron", "dt4", "steel-1010"],
        "an iron with no sourced curve in the library: the closest sourced grade is 'RFe80' (relay iron, coercivity class 80 A/m)",
    ),
    (&["cast-iron", "gray-cast-iron", "ductile-iron"], "a cast iron: the sourced curve is 'grey-cast-iron' (measured about 1900, indicative)"),
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
        ["N35", "N42", "N52", "N42SH", "YX16", "DC01", "low-carbon-steel", "X6Cr17", "M270-50A"]
            .iter()
            .map(|s| s.to_string())
            .collect()
    }

    #[test]
    fn help_follows_what_the_name_looks_like() {
        assert!(help("N55", &known()).contains("from N35 to N52"), "{}", help("N55", &known()));
        assert!(help("1018", &known()).contains("closest sourced grade is 'DC01'"));
        assert!(help("S235", &known()).contains("'DC01'"));
        assert!(!help("1018", &known()).contains("YX16"));
        assert!(help("mild-steel", &known()).contains("low-carbon"));
        assert!(help("416", &known()).contains("closest sourced grade is 'X6Cr17'"));
        assert!(help("M19", &known()).contains("'M270-50A'"));
        assert!(help("M270-35A", &known()).contains("no sourced curve"));
        assert_eq!(help("N42S", &known()), "did you mean 'N42'?");
        assert!(help("unobtainium", &known()).contains("lodestone materials"));
    }
}
