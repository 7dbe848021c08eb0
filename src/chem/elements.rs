//! The periodic table: symbols, names and standard atomic weights.
//!
//! Formulas name elements by symbol, and molar masses need their atomic
//! weights, so every other chemistry module starts here.
//!
//! Source of the weights: IUPAC/CIAAW, "Standard atomic weights of the
//! elements 2021", Pure Appl. Chem. 94 (2022) 573-600, as the abridged table
//! to five significant figures; where CIAAW gives an interval (H, Li, B, C,
//! N, O, Mg, Si, S, Cl, Ar, Br, Tl, Pb) the conventional/abridged single value
//! is used (H 1.008, C 12.011, N 14.007, O 15.999, Cl 35.45, ...). The values
//! were written down from memory of that table and are checked against the
//! `periodictable` package from PyPI in `tests/chem_reference.rs`.
//!
//! Elements with no standard atomic weight (no stable isotope with a
//! characteristic terrestrial composition) carry the mass number of their
//! longest-lived known isotope, as periodic tables print it in brackets, and
//! have `standard_weight == false`. Those mass numbers are from memory.
//! Names follow IUPAC spelling (aluminium, caesium, sulfur).

/// One chemical element.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Element {
    /// Atomic number.
    pub z: u8,
    /// IUPAC symbol, case-sensitive (`Co` is cobalt).
    pub symbol: &'static str,
    /// IUPAC English name, lowercase.
    pub name: &'static str,
    /// Standard atomic weight in g/mol, or the mass number of the
    /// longest-lived isotope when `standard_weight` is false.
    pub atomic_weight: f64,
    /// Whether `atomic_weight` is a CIAAW standard atomic weight.
    pub standard_weight: bool,
}

const fn el(z: u8, symbol: &'static str, name: &'static str, w: f64) -> Element {
    Element {
        z,
        symbol,
        name,
        atomic_weight: w,
        standard_weight: true,
    }
}

const fn radio(z: u8, symbol: &'static str, name: &'static str, a: f64) -> Element {
    Element {
        z,
        symbol,
        name,
        atomic_weight: a,
        standard_weight: false,
    }
}

/// All 118 elements, indexed by `z - 1`.
pub static ELEMENTS: [Element; 118] = [
    el(1, "H", "hydrogen", 1.008),
    el(2, "He", "helium", 4.0026),
    el(3, "Li", "lithium", 6.94),
    el(4, "Be", "beryllium", 9.0122),
    el(5, "B", "boron", 10.81),
    el(6, "C", "carbon", 12.011),
    el(7, "N", "nitrogen", 14.007),
    el(8, "O", "oxygen", 15.999),
    el(9, "F", "fluorine", 18.998),
    el(10, "Ne", "neon", 20.180),
    el(11, "Na", "sodium", 22.990),
    el(12, "Mg", "magnesium", 24.305),
    el(13, "Al", "aluminium", 26.982),
    el(14, "Si", "silicon", 28.085),
    el(15, "P", "phosphorus", 30.974),
    el(16, "S", "sulfur", 32.06),
    el(17, "Cl", "chlorine", 35.45),
    el(18, "Ar", "argon", 39.95),
    el(19, "K", "potassium", 39.098),
    el(20, "Ca", "calcium", 40.078),
    el(21, "Sc", "scandium", 44.956),
    el(22, "Ti", "titanium", 47.867),
    el(23, "V", "vanadium", 50.942),
    el(24, "Cr", "chromium", 51.996),
    el(25, "Mn", "manganese", 54.938),
    el(26, "Fe", "iron", 55.845),
    el(27, "Co", "cobalt", 58.933),
    el(28, "Ni", "nickel", 58.693),
    el(29, "Cu", "copper", 63.546),
    el(30, "Zn", "zinc", 65.38),
    el(31, "Ga", "gallium", 69.723),
    el(32, "Ge", "germanium", 72.630),
    el(33, "As", "arsenic", 74.922),
    el(34, "Se", "selenium", 78.971),
    el(35, "Br", "bromine", 79.904),
    el(36, "Kr", "krypton", 83.798),
    el(37, "Rb", "rubidium", 85.468),
    el(38, "Sr", "strontium", 87.62),
    el(39, "Y", "yttrium", 88.906),
    el(40, "Zr", "zirconium", 91.224),
    el(41, "Nb", "niobium", 92.906),
    el(42, "Mo", "molybdenum", 95.95),
    radio(43, "Tc", "technetium", 97.0),
    el(44, "Ru", "ruthenium", 101.07),
    el(45, "Rh", "rhodium", 102.91),
    el(46, "Pd", "palladium", 106.42),
    el(47, "Ag", "silver", 107.87),
    el(48, "Cd", "cadmium", 112.41),
    el(49, "In", "indium", 114.82),
    el(50, "Sn", "tin", 118.71),
    el(51, "Sb", "antimony", 121.76),
    el(52, "Te", "tellurium", 127.60),
    el(53, "I", "iodine", 126.90),
    el(54, "Xe", "xenon", 131.29),
    el(55, "Cs", "caesium", 132.91),
    el(56, "Ba", "barium", 137.33),
    el(57, "La", "lanthanum", 138.91),
    el(58, "Ce", "cerium", 140.12),
    el(59, "Pr", "praseodymium", 140.91),
    el(60, "Nd", "neodymium", 144.24),
    radio(61, "Pm", "promethium", 145.0),
    el(62, "Sm", "samarium", 150.36),
    el(63, "Eu", "europium", 151.96),
    el(64, "Gd", "gadolinium", 157.25),
    el(65, "Tb", "terbium", 158.93),
    el(66, "Dy", "dysprosium", 162.50),
    el(67, "Ho", "holmium", 164.93),
    el(68, "Er", "erbium", 167.26),
    el(69, "Tm", "thulium", 168.93),
    el(70, "Yb", "ytterbium", 173.05),
    el(71, "Lu", "lutetium", 174.97),
    el(72, "Hf", "hafnium", 178.49),
    el(73, "Ta", "tantalum", 180.95),
    el(74, "W", "tungsten", 183.84),
    el(75, "Re", "rhenium", 186.21),
    el(76, "Os", "osmium", 190.23),
    el(77, "Ir", "iridium", 192.22),
    el(78, "Pt", "platinum", 195.08),
    el(79, "Au", "gold", 196.97),
    el(80, "Hg", "mercury", 200.59),
    el(81, "Tl", "thallium", 204.38),
    el(82, "Pb", "lead", 207.2),
    el(83, "Bi", "bismuth", 208.98),
    radio(84, "Po", "polonium", 209.0),
    radio(85, "At", "astatine", 210.0),
    radio(86, "Rn", "radon", 222.0),
    radio(87, "Fr", "francium", 223.0),
    radio(88, "Ra", "radium", 226.0),
    radio(89, "Ac", "actinium", 227.0),
    el(90, "Th", "thorium", 232.04),
    el(91, "Pa", "protactinium", 231.04),
    el(92, "U", "uranium", 238.03),
    radio(93, "Np", "neptunium", 237.0),
    radio(94, "Pu", "plutonium", 244.0),
    radio(95, "Am", "americium", 243.0),
    radio(96, "Cm", "curium", 247.0),
    radio(97, "Bk", "berkelium", 247.0),
    radio(98, "Cf", "californium", 251.0),
    radio(99, "Es", "einsteinium", 252.0),
    radio(100, "Fm", "fermium", 257.0),
    radio(101, "Md", "mendelevium", 258.0),
    radio(102, "No", "nobelium", 259.0),
    radio(103, "Lr", "lawrencium", 266.0),
    radio(104, "Rf", "rutherfordium", 267.0),
    radio(105, "Db", "dubnium", 268.0),
    radio(106, "Sg", "seaborgium", 269.0),
    radio(107, "Bh", "bohrium", 270.0),
    radio(108, "Hs", "hassium", 269.0),
    radio(109, "Mt", "meitnerium", 278.0),
    radio(110, "Ds", "darmstadtium", 281.0),
    radio(111, "Rg", "roentgenium", 282.0),
    radio(112, "Cn", "copernicium", 285.0),
    radio(113, "Nh", "nihonium", 286.0),
    radio(114, "Fl", "flerovium", 289.0),
    radio(115, "Mc", "moscovium", 290.0),
    radio(116, "Lv", "livermorium", 293.0),
    radio(117, "Ts", "tennessine", 294.0),
    radio(118, "Og", "oganesson", 294.0),
];

/// The element with this exact (case-sensitive) symbol.
pub fn by_symbol(symbol: &str) -> Option<&'static Element> {
    // Symbols are one or two ASCII letters; a linear scan over 118 short
    // strings is faster than hashing for inputs this small.
    let bytes = symbol.as_bytes();
    if bytes.is_empty() || bytes.len() > 2 {
        return None;
    }
    ELEMENTS.iter().find(|e| e.symbol.as_bytes() == bytes)
}

/// The element with atomic number `z` (1 to 118).
pub fn by_z(z: u8) -> Option<&'static Element> {
    ELEMENTS.get(usize::from(z).checked_sub(1)?)
}

/// Element symbols close to `text`, best first, for "did you mean" help.
///
/// A symbol that matches ignoring case comes first (`CL` gives `Cl`), then
/// a symbol whose element name matches (`iron` gives `Fe`), then symbols
/// within a small edit distance (ignoring case), nearest first. At most five
/// symbols are returned.
pub fn suggest(text: &str) -> Vec<&'static str> {
    let lower = text.to_lowercase();
    let mut out: Vec<&'static str> = Vec::new();
    for e in &ELEMENTS {
        if e.symbol.to_lowercase() == lower && e.symbol != text {
            out.push(e.symbol);
        }
    }
    for e in &ELEMENTS {
        if e.name == lower && !out.contains(&e.symbol) {
            out.push(e.symbol);
        }
    }
    let limit = if lower.chars().count() <= 2 { 1 } else { 2 };
    let mut near: Vec<(usize, usize, &'static str)> = ELEMENTS
        .iter()
        .filter(|e| e.symbol != text && !out.contains(&e.symbol))
        .filter_map(|e| {
            let d = strsim::levenshtein(&e.symbol.to_lowercase(), &lower);
            // Prefer candidates that keep the first letter the user typed.
            let same_start = usize::from(e.symbol.chars().next() != text.chars().next());
            (d <= limit).then_some((d, same_start, e.symbol))
        })
        .collect();
    near.sort_by_key(|&(d, s, _)| (d, s));
    out.extend(near.into_iter().map(|(_, _, s)| s));
    out.truncate(5);
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn table_is_indexed_by_atomic_number() {
        for (i, e) in ELEMENTS.iter().enumerate() {
            assert_eq!(usize::from(e.z), i + 1, "{}", e.symbol);
            assert_eq!(by_z(e.z).map(|x| x.symbol), Some(e.symbol));
            assert_eq!(by_symbol(e.symbol).map(|x| x.z), Some(e.z));
        }
        assert!(by_z(0).is_none());
        assert!(by_z(119).is_none());
    }

    #[test]
    fn symbols_are_unique_and_well_formed() {
        for (i, a) in ELEMENTS.iter().enumerate() {
            let b = a.symbol.as_bytes();
            assert!(b[0].is_ascii_uppercase() && b[1..].iter().all(u8::is_ascii_lowercase));
            for other in &ELEMENTS[i + 1..] {
                assert_ne!(a.symbol, other.symbol);
            }
        }
    }

    #[test]
    fn weights_quoted_in_the_brief() {
        // CIAAW 2021 conventional values (quoted in the project brief).
        let w = |s| by_symbol(s).map(|e| e.atomic_weight);
        assert_eq!(w("H"), Some(1.008));
        assert_eq!(w("C"), Some(12.011));
        assert_eq!(w("N"), Some(14.007));
        assert_eq!(w("O"), Some(15.999));
        assert_eq!(w("Cl"), Some(35.45));
        assert!(!by_symbol("Tc").is_some_and(|e| e.standard_weight));
        assert!(by_symbol("U").is_some_and(|e| e.standard_weight));
    }

    #[test]
    fn suggestions() {
        assert_eq!(suggest("CL").first(), Some(&"Cl"));
        assert_eq!(suggest("co").first(), Some(&"Co"));
        assert_eq!(suggest("iron").first(), Some(&"Fe"));
        assert!(suggest("Xx").contains(&"Xe"));
        assert!(suggest("Qq").len() <= 5);
        assert!(suggest("").len() <= 5);
    }

    #[test]
    fn case_sensitive_lookup() {
        assert_eq!(by_symbol("Co").map(|e| e.z), Some(27));
        assert!(by_symbol("CO").is_none());
        assert!(by_symbol("co").is_none());
        assert!(by_symbol("Coo").is_none());
    }
}
