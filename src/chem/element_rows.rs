//! The element counts and charge of every species of a library, packed one
//! after another, for checking the balance of many equations at once.
//!
//! A species' formula lies on the heap with its composition in another
//! allocation, one pair per species, scattered over a large library's
//! memory; checking an equation read both for every term, and at 10^5 and
//! 10^6 reactions nearly every read missed the caches. The rows here hold
//! what the check needs (integer counts, the charge, whether the species
//! counts at all) in one array, indexed by species. A species with a
//! fractional or very large count has no row, and an equation that names
//! one goes to the exact check of [`super::balance`].

use super::formula::{Formula, SpeciesKind};
use num_rational::Ratio;

/// What balance needs of one species.
#[derive(Clone, Copy)]
struct Row {
    /// Its counts are `counts[start..start + len]`; `len` is `NO_ROW` when
    /// a count is fractional or does not fit.
    start: u32,
    len: u8,
    /// Third bodies and photons carry no atoms and no charge.
    counted: bool,
    third_body: bool,
    charge: i32,
}

/// A `len` for a species without an integer row.
const NO_ROW: u8 = u8::MAX;

/// The packed rows of a library's species, by species index.
pub struct ElementRows {
    rows: Vec<Row>,
    counts: Vec<(u8, i32)>,
}

impl ElementRows {
    /// The rows of `formulas`, in species order.
    pub fn new<'a>(formulas: impl ExactSizeIterator<Item = &'a Formula>) -> ElementRows {
        let mut rows = Vec::with_capacity(formulas.len());
        let mut counts = Vec::with_capacity(3 * formulas.len());
        for f in formulas {
            let start = u32::try_from(counts.len()).unwrap_or(u32::MAX);
            let integral: Option<Vec<(u8, i32)>> = f
                .composition
                .iter()
                .map(|(z, n)| {
                    (*n.denom() == 1)
                        .then(|| i32::try_from(*n.numer()).ok())
                        .flatten()
                        .map(|n| (*z, n))
                })
                .collect();
            let charge = i32::try_from(f.charge).ok();
            let len = match (integral, charge) {
                (Some(c), Some(_)) if c.len() < usize::from(NO_ROW) && start != u32::MAX => {
                    let len = c.len() as u8;
                    counts.extend(c);
                    len
                }
                _ => NO_ROW,
            };
            rows.push(Row {
                start,
                len,
                counted: !matches!(f.kind, SpeciesKind::ThirdBody | SpeciesKind::Photon),
                third_body: f.kind == SpeciesKind::ThirdBody,
                charge: charge.unwrap_or(0),
            });
        }
        ElementRows { rows, counts }
    }

    /// True when species `s` is the third body `M`.
    pub fn is_third_body(&self, s: u32) -> bool {
        self.rows.get(s as usize).is_some_and(|r| r.third_body)
    }

    /// Whether `terms` (species index and signed coefficient, products
    /// positive) balance in every element and in charge: `None` when a
    /// coefficient or a count is fractional, a species has no row, a sum
    /// overflows or the terms name more elements than this keeps, and the
    /// exact check must answer.
    pub fn balanced(&self, terms: impl Iterator<Item = (u32, Ratio<i64>)>) -> Option<bool> {
        // A reaction names a handful of elements; a short list is cheaper
        // to clear and scan than a table of every element.
        let mut net: [(u8, i128); 24] = [(0, 0); 24];
        let mut met = 0;
        let mut charge: i128 = 0;
        for (s, coefficient) in terms {
            let row = *self.rows.get(s as usize)?;
            if !row.counted || *coefficient.numer() == 0 {
                continue;
            }
            if *coefficient.denom() != 1 || row.len == NO_ROW {
                return None;
            }
            let c = i128::from(*coefficient.numer());
            let start = row.start as usize;
            for &(z, n) in self.counts.get(start..start + usize::from(row.len))? {
                let add = c * i128::from(n);
                match net[..met].iter_mut().find(|(e, _)| *e == z) {
                    Some((_, total)) => *total = total.checked_add(add)?,
                    None => {
                        *net.get_mut(met)? = (z, add);
                        met += 1;
                    }
                }
            }
            charge = charge.checked_add(c * i128::from(row.charge))?;
        }
        Some(charge == 0 && net[..met].iter().all(|(_, total)| *total == 0))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::balance::residuals;
    use crate::chem::formula::parse_formula;
    use proptest::prelude::*;

    const SPECIES: &[&str] = &[
        "H2",
        "O2",
        "H2O",
        "H2O2",
        "Fe",
        "Fe2O3",
        "Fe^3+",
        "e-",
        "M",
        "hv",
        "CaSO4·0.5H2O",
        "CaSO4",
        "SO4^2-",
        "H+",
        "C8H18",
        "CO2",
        "NH4^+",
        "C1000000000000H2",
    ];

    /// Terms over the species above with coefficients from -4 to 4 and
    /// now and then a half.
    fn terms() -> impl Strategy<Value = Vec<(usize, i64, bool)>> {
        prop::collection::vec((0..SPECIES.len(), -4i64..=4, any::<bool>()), 1..6)
    }

    proptest! {
        /// Where the rows answer, they answer as the exact residuals do
        /// (a reference computed on big rationals from the formulas).
        #[test]
        fn rows_answer_as_the_exact_residuals(terms in terms()) {
            let formulas: Vec<Formula> = SPECIES
                .iter()
                .map(|s| parse_formula(s).expect("a formula"))
                .collect();
            let rows = ElementRows::new(formulas.iter());
            let signed: Vec<(Ratio<i64>, &Formula)> = terms
                .iter()
                .map(|&(s, c, half)| {
                    (if half { Ratio::new(c, 2) } else { Ratio::from_integer(c) }, &formulas[s])
                })
                .collect();
            let exact = residuals(&signed).is_balanced();
            let got = rows.balanced(terms.iter().zip(&signed).map(|(&(s, _, _), (c, _))| (s as u32, *c)));
            if let Some(got) = got {
                prop_assert_eq!(got, exact);
            }
            // Integer coefficients over species with rows always answer.
            let plain = signed.iter().zip(&terms).all(|((c, _), &(s, _, _))| {
                c.is_integer() && !SPECIES[s].contains('·') && !SPECIES[s].starts_with("C1000")
            });
            if plain {
                prop_assert!(got.is_some());
            }
        }
    }

    #[test]
    fn third_bodies_are_known_and_left_out() {
        let formulas: Vec<Formula> = ["H", "M", "H2"]
            .iter()
            .map(|s| parse_formula(s).expect("a formula"))
            .collect();
        let rows = ElementRows::new(formulas.iter());
        assert!(rows.is_third_body(1) && !rows.is_third_body(0) && !rows.is_third_body(7));
        let two = Ratio::from_integer;
        assert_eq!(
            rows.balanced([(0, two(-2)), (1, two(-1)), (2, two(1)), (1, two(1))].into_iter()),
            Some(true)
        );
        assert_eq!(
            rows.balanced([(0, two(-1)), (2, two(1))].into_iter()),
            Some(false)
        );
    }
}
