//! The unit names stoik knows, with their size in SI.
//!
//! Sizes come from [`super::constants`]; prefixes are the SI prefixes of the
//! SI Brochure, 9th edition, Table 7.

use super::constants::{
    ATMOSPHERE, AVOGADRO, CALORIE, CELSIUS_OFFSET, ELECTRONVOLT, MILLIMETRE_OF_MERCURY, PSI, TORR,
};
use super::dimension::Dimension as D;
use super::unit::Unit;

const LITRE: f64 = 1e-3;
const MOLAR: f64 = 1e3;

/// Every known name and its unit. Names are case-sensitive (`mM` is
/// millimolar, `MM` is nothing).
const UNITS: &[(&str, Unit)] = &[
    // Amount.
    ("mol", Unit::linear(1.0, D::AMOUNT)),
    ("mmol", Unit::linear(1e-3, D::AMOUNT)),
    ("umol", Unit::linear(1e-6, D::AMOUNT)),
    ("µmol", Unit::linear(1e-6, D::AMOUNT)),
    ("μmol", Unit::linear(1e-6, D::AMOUNT)),
    ("kmol", Unit::linear(1e3, D::AMOUNT)),
    ("molecule", Unit::linear(1.0 / AVOGADRO, D::AMOUNT)),
    // Volume.
    ("L", Unit::linear(LITRE, D::VOLUME)),
    ("mL", Unit::linear(1e-3 * LITRE, D::VOLUME)),
    ("uL", Unit::linear(1e-6 * LITRE, D::VOLUME)),
    ("µL", Unit::linear(1e-6 * LITRE, D::VOLUME)),
    ("μL", Unit::linear(1e-6 * LITRE, D::VOLUME)),
    // Length (a digit suffix cubes or squares these: cm3, dm3, m3).
    ("m", Unit::linear(1.0, D::LENGTH)),
    ("dm", Unit::linear(1e-1, D::LENGTH)),
    ("cm", Unit::linear(1e-2, D::LENGTH)),
    ("mm", Unit::linear(1e-3, D::LENGTH)),
    ("um", Unit::linear(1e-6, D::LENGTH)),
    ("µm", Unit::linear(1e-6, D::LENGTH)),
    ("μm", Unit::linear(1e-6, D::LENGTH)),
    ("nm", Unit::linear(1e-9, D::LENGTH)),
    ("km", Unit::linear(1e3, D::LENGTH)),
    // Concentration.
    ("M", Unit::linear(MOLAR, D::CONCENTRATION)),
    ("mM", Unit::linear(1e-3 * MOLAR, D::CONCENTRATION)),
    ("uM", Unit::linear(1e-6 * MOLAR, D::CONCENTRATION)),
    ("µM", Unit::linear(1e-6 * MOLAR, D::CONCENTRATION)),
    ("μM", Unit::linear(1e-6 * MOLAR, D::CONCENTRATION)),
    ("nM", Unit::linear(1e-9 * MOLAR, D::CONCENTRATION)),
    // Pressure.
    ("Pa", Unit::linear(1.0, D::PRESSURE)),
    ("hPa", Unit::linear(1e2, D::PRESSURE)),
    ("kPa", Unit::linear(1e3, D::PRESSURE)),
    ("MPa", Unit::linear(1e6, D::PRESSURE)),
    ("bar", Unit::linear(1e5, D::PRESSURE)),
    ("mbar", Unit::linear(1e2, D::PRESSURE)),
    ("atm", Unit::linear(ATMOSPHERE, D::PRESSURE)),
    ("Torr", Unit::linear(TORR, D::PRESSURE)),
    ("mmHg", Unit::linear(MILLIMETRE_OF_MERCURY, D::PRESSURE)),
    ("psi", Unit::linear(PSI, D::PRESSURE)),
    // Energy.
    ("J", Unit::linear(1.0, D::ENERGY)),
    ("kJ", Unit::linear(1e3, D::ENERGY)),
    ("MJ", Unit::linear(1e6, D::ENERGY)),
    ("cal", Unit::linear(CALORIE, D::ENERGY)),
    ("kcal", Unit::linear(1e3 * CALORIE, D::ENERGY)),
    ("eV", Unit::linear(ELECTRONVOLT, D::ENERGY)),
    // Temperature.
    ("K", Unit::linear(1.0, D::TEMPERATURE)),
    (
        "degC",
        Unit {
            factor: 1.0,
            offset: CELSIUS_OFFSET,
            dim: D::TEMPERATURE,
        },
    ),
    (
        "°C",
        Unit {
            factor: 1.0,
            offset: CELSIUS_OFFSET,
            dim: D::TEMPERATURE,
        },
    ),
    // Time.
    ("s", Unit::linear(1.0, D::TIME)),
    ("ms", Unit::linear(1e-3, D::TIME)),
    ("min", Unit::linear(60.0, D::TIME)),
    ("h", Unit::linear(3600.0, D::TIME)),
    // Mass.
    ("g", Unit::linear(1e-3, D::MASS)),
    ("mg", Unit::linear(1e-6, D::MASS)),
    ("kg", Unit::linear(1.0, D::MASS)),
];

/// The unit called `name`, if stoik knows it.
pub fn lookup(name: &str) -> Option<Unit> {
    UNITS.iter().find(|(n, _)| *n == name).map(|(_, u)| *u)
}

/// All known unit names, in catalogue order (for completion and suggestions).
pub fn known_names() -> impl Iterator<Item = &'static str> {
    UNITS.iter().map(|(n, _)| *n)
}

/// Spellings people use for units stoik knows under another name.
const ALIASES: &[(&str, &str)] = &[
    ("sec", "s"),
    ("secs", "s"),
    ("hr", "h"),
    ("hrs", "h"),
    ("hour", "h"),
    ("mole", "mol"),
    ("moles", "mol"),
    ("liter", "L"),
    ("litre", "L"),
    ("molec", "molecule"),
    ("molecules", "molecule"),
    ("C", "degC"),
    ("deg", "degC"),
    ("celsius", "degC"),
    ("kelvin", "K"),
    ("bars", "bar"),
];

/// Up to three known names closest to an unknown one: first a usual
/// alternative spelling (`sec` for `s`), then any name that differs only in
/// letter case, then names within a small edit distance.
pub fn suggest(name: &str) -> Vec<String> {
    let alias = ALIASES
        .iter()
        .find(|(a, _)| a.eq_ignore_ascii_case(name))
        .map(|(_, known)| *known);
    let mut scored: Vec<(usize, &'static str)> = known_names()
        .filter_map(|known| {
            if known.to_lowercase() == name.to_lowercase() {
                return Some((0, known));
            }
            let d = strsim::damerau_levenshtein(name, known);
            let limit = if name.chars().count() <= 3 { 1 } else { 2 };
            (d <= limit).then_some((d, known))
        })
        .collect();
    scored.sort_by_key(|(d, _)| *d);
    let mut out: Vec<String> = alias.iter().map(|a| a.to_string()).collect();
    for (_, known) in scored {
        if !out.iter().any(|o| o == known) && out.len() < 3 {
            out.push(known.to_string());
        }
    }
    out
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // Tests may panic on a broken expectation.
mod tests {
    use super::*;

    #[test]
    fn case_slips_are_suggested_first() {
        assert_eq!(suggest("torr").first().map(String::as_str), Some("Torr"));
        assert_eq!(suggest("KJ").first().map(String::as_str), Some("kJ"));
        assert!(suggest("mole").contains(&"mol".to_string()));
        assert!(suggest("zzzzzz").is_empty());
        assert_eq!(suggest("sec").first().map(String::as_str), Some("s"));
        assert_eq!(suggest("C").first().map(String::as_str), Some("degC"));
    }

    #[test]
    fn names_are_unique() {
        let names: Vec<&str> = known_names().collect();
        for (i, a) in names.iter().enumerate() {
            assert!(!names[i + 1..].contains(a), "{a} listed twice");
        }
    }
}
