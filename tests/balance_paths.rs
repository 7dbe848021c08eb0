//! The fast small-integer balance check agrees with the exact big-number
//! residuals on every equation it can decide.

use num_rational::Ratio;
use proptest::prelude::*;
use stoik::chem::balance::{balanced_small, residuals};
use stoik::chem::formula::parse_formula;

const SPECIES: &[&str] = &[
    "H2",
    "O2",
    "H2O",
    "CO",
    "CO2",
    "CH4",
    "NH3",
    "N2",
    "Fe^3+",
    "Fe^2+",
    "e-",
    "MnO4^-",
    "Mn^2+",
    "H^+",
    "OH^-",
    "CuSO4·5H2O",
    "K4[Fe(CN)6]",
    "Ca3(PO4)2",
    "SO4^2-",
    "M",
];

proptest! {
    #[test]
    fn fast_and_exact_paths_agree(terms in proptest::collection::vec((0usize..SPECIES.len(), -6i64..7, 1i64..4), 1..7)) {
        let formulas: Vec<_> = terms.iter().map(|(i, _, _)| parse_formula(SPECIES[*i]).expect("valid")).collect();
        let signed: Vec<(Ratio<i64>, &stoik::chem::formula::Formula)> = terms
            .iter()
            .zip(&formulas)
            .filter(|((_, n, _), _)| *n != 0)
            .map(|((_, n, d), f)| (Ratio::new(*n, *d), f))
            .collect();
        let exact = residuals(&signed).is_balanced();
        if let Some(fast) = balanced_small(&signed) {
            prop_assert_eq!(fast, exact);
        }
    }
}

#[test]
fn a_balanced_redox_equation_is_balanced_on_both_paths() {
    // MnO4- + 5 Fe2+ + 8 H+ -> Mn2+ + 5 Fe3+ + 4 H2O (textbook permanganate titration).
    let f = |s: &str| parse_formula(s).expect("valid");
    let (a, b, c, d, e, g) = (
        f("MnO4^-"),
        f("Fe^2+"),
        f("H^+"),
        f("Mn^2+"),
        f("Fe^3+"),
        f("H2O"),
    );
    let r = |n: i64| Ratio::from_integer(n);
    let terms = vec![
        (r(-1), &a),
        (r(-5), &b),
        (r(-8), &c),
        (r(1), &d),
        (r(5), &e),
        (r(4), &g),
    ];
    assert!(residuals(&terms).is_balanced());
    assert_eq!(balanced_small(&terms), Some(true));
}

#[test]
fn a_species_of_many_elements_is_balanced_on_both_paths() {
    // 26 elements in one formula: more than the integer path keeps, so the
    // general path answers.
    let f = parse_formula("HLiBeBCNOFNaMgAlSiPSClKCaScTiVCrMnFeCoNiCu").expect("valid");
    let o2 = parse_formula("O2").expect("valid");
    let r = |n: i64| Ratio::from_integer(n);
    let same = vec![(r(-1), &f), (r(1), &f)];
    assert!(residuals(&same).is_balanced());
    assert_eq!(balanced_small(&same), Some(true));
    let off = vec![(r(-1), &f), (r(1), &f), (r(1), &o2)];
    assert!(!residuals(&off).is_balanced());
    assert_eq!(balanced_small(&off), Some(false));
}
