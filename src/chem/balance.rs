//! Element and charge balance of an equation, checked and solved exactly.
//!
//! `residuals` totals each element and the charge on both sides of a written
//! equation; `balance` finds the smallest positive integer coefficients, or
//! says why none exist, from the rational nullspace of the element and
//! charge matrix. All arithmetic is on big integers and rationals, so
//! coefficients of any size stay exact. Third bodies (`M`) and photons
//! (`hv`) carry no atoms and no charge and are left out of both.

use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::{BigRational, Ratio};
use num_traits::{CheckedAdd, CheckedMul, One, Signed, Zero};

use super::elements;
use super::formula::{Formula, SpeciesKind};

/// A side of an equation.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Side {
    /// Reactants.
    Left,
    /// Products.
    Right,
}

impl Side {
    pub fn name(self) -> &'static str {
        match self {
            Side::Left => "left",
            Side::Right => "right",
        }
    }
}

/// The amount of one element on each side.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ElementTotals {
    pub z: u8,
    pub left: BigRational,
    pub right: BigRational,
}

impl ElementTotals {
    /// Right minus left: positive when the products have more.
    pub fn excess(&self) -> BigRational {
        &self.right - &self.left
    }
}

/// Per-element and charge totals of both sides of an equation.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Residual {
    /// Every element that occurs, sorted by atomic number.
    pub elements: Vec<ElementTotals>,
    pub charge_left: BigRational,
    pub charge_right: BigRational,
}

impl Residual {
    /// Elements whose totals differ between the sides.
    pub fn unbalanced_elements(&self) -> impl Iterator<Item = &ElementTotals> {
        self.elements.iter().filter(|e| e.left != e.right)
    }

    pub fn charge_balanced(&self) -> bool {
        self.charge_left == self.charge_right
    }

    /// True when every element and the charge balance.
    pub fn is_balanced(&self) -> bool {
        self.charge_balanced() && self.unbalanced_elements().next().is_none()
    }
}

/// The exact value of `r` as a big rational. Integers (the usual case)
/// skip the gcd; a value built with a zero denominator counts as zero
/// rather than panicking.
pub(crate) fn big(r: &Ratio<i64>) -> BigRational {
    match *r.denom() {
        1 => BigRational::from_integer(BigInt::from(*r.numer())),
        0 => BigRational::zero(),
        d => BigRational::new(BigInt::from(*r.numer()), BigInt::from(d)),
    }
}

fn in_balance(f: &Formula) -> bool {
    !matches!(f.kind, SpeciesKind::ThirdBody | SpeciesKind::Photon)
}

/// Whether signed terms (as for [`residuals`]) balance in every element and
/// in charge, computed exactly on machine integers: `Some(answer)` when every
/// product and sum fits in `i128` rationals, `None` (and the caller takes
/// the big-number path of [`residuals`]) when one does not. This is the fast
/// path for the common case of small stoichiometric coefficients.
pub fn balanced_small(terms: &[(Ratio<i64>, &Formula)]) -> Option<bool> {
    if let Some(answer) = balanced_integers(terms) {
        return Some(answer);
    }
    let wide = |r: &Ratio<i64>| -> Option<Ratio<i128>> {
        (*r.denom() != 0).then(|| Ratio::new(i128::from(*r.numer()), i128::from(*r.denom())))
    };
    // Net amounts (right minus left) per element, and the net charge.
    let mut net: Vec<(u8, Ratio<i128>)> = Vec::new();
    let mut charge = Ratio::<i128>::zero();
    for (coefficient, formula) in terms {
        if !in_balance(formula) || coefficient.is_zero() {
            continue;
        }
        let c = wide(coefficient)?;
        for (z, n) in &formula.composition {
            let add = c.checked_mul(&wide(n)?)?;
            match net.iter_mut().find(|(e, _)| e == z) {
                Some((_, total)) => *total = total.checked_add(&add)?,
                None => net.push((*z, add)),
            }
        }
        charge = charge
            .checked_add(&c.checked_mul(&Ratio::from_integer(i128::from(formula.charge)))?)?;
    }
    Some(charge.is_zero() && net.iter().all(|(_, total)| total.is_zero()))
}

/// [`balanced_small`] when every coefficient and count is an integer (the
/// usual case): plain `i128` sums, no rationals. `None` when a value is
/// fractional, a sum overflows or the reaction names more elements than
/// this path keeps (the general path then answers).
fn balanced_integers(terms: &[(Ratio<i64>, &Formula)]) -> Option<bool> {
    // The net amount of each element met, in a short list: a reaction names
    // a handful of elements, and a table of every element cost more to
    // clear and scan than the whole sum.
    let mut net: [(u8, i128); 24] = [(0, 0); 24];
    let mut met = 0;
    let mut charge: i128 = 0;
    for (coefficient, formula) in terms {
        if !in_balance(formula) || coefficient.is_zero() {
            continue;
        }
        if *coefficient.denom() != 1 {
            return None;
        }
        let c = i128::from(*coefficient.numer());
        for (z, n) in &formula.composition {
            if *n.denom() != 1 {
                return None;
            }
            let add = c.checked_mul(i128::from(*n.numer()))?;
            match net[..met].iter_mut().find(|(e, _)| e == z) {
                Some((_, total)) => *total = total.checked_add(add)?,
                None => {
                    *net.get_mut(met)? = (*z, add);
                    met += 1;
                }
            }
        }
        charge = charge.checked_add(c.checked_mul(i128::from(formula.charge))?)?;
    }
    Some(charge == 0 && net[..met].iter().all(|(_, total)| *total == 0))
}

/// Element and charge totals for signed terms: a negative coefficient puts
/// the species on the left (reactants), a positive one on the right.
/// Electrons count for charge; `M` and `hv` are left out.
pub fn residuals(terms: &[(Ratio<i64>, &Formula)]) -> Residual {
    let mut totals: Vec<ElementTotals> = Vec::new();
    let mut charge_left = BigRational::zero();
    let mut charge_right = BigRational::zero();
    for (coefficient, formula) in terms {
        if !in_balance(formula) || coefficient.is_zero() {
            continue;
        }
        let amount = big(coefficient).abs();
        let left = coefficient.is_negative();
        for (z, n) in &formula.composition {
            let i = match totals.binary_search_by_key(z, |t| t.z) {
                Ok(i) => i,
                Err(i) => {
                    totals.insert(
                        i,
                        ElementTotals {
                            z: *z,
                            left: BigRational::zero(),
                            right: BigRational::zero(),
                        },
                    );
                    i
                }
            };
            let add = &amount * big(n);
            if left {
                totals[i].left += add;
            } else {
                totals[i].right += add;
            }
        }
        let q = &amount * BigRational::from_integer(BigInt::from(formula.charge));
        if left {
            charge_left += q;
        } else {
            charge_right += q;
        }
    }
    Residual {
        elements: totals,
        charge_left,
        charge_right,
    }
}

/// Why an equation has no balance with positive coefficients.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum BalanceFailure {
    /// One side has no species that take part in the balance.
    EmptySide { side: Side },
    /// An element occurs on one side only.
    OneSided { z: u8, side: Side },
    /// The only balance has these species (indices into the input) on the
    /// other side of the arrow.
    WrongSide { species: Vec<usize> },
    /// The only balance gives these species a coefficient of zero.
    LeftOut { species: Vec<usize> },
    /// The elements can be balanced but the charge cannot.
    Charge,
    /// No nonzero combination balances the elements and the charge.
    NoBalance,
}

impl BalanceFailure {
    /// A message for users, given the species as written.
    pub fn message(&self, species: &[&str]) -> String {
        let name = |i: &usize| format!("`{}`", species.get(*i).copied().unwrap_or("?"));
        let list = |v: &[usize]| v.iter().map(name).collect::<Vec<_>>().join(", ");
        match self {
            BalanceFailure::EmptySide { side } => {
                format!(
                    "the {} side has no species to balance: add species to it",
                    side.name()
                )
            }
            BalanceFailure::OneSided { z, side } => {
                let symbol = elements::by_z(*z).map_or("?", |e| e.symbol);
                format!(
                    "{symbol} occurs only on the {} side: add a species containing {symbol} to the other side",
                    side.name()
                )
            }
            BalanceFailure::WrongSide { species } => format!(
                "a balance exists only with {} moved to the other side of the arrow",
                list(species)
            ),
            BalanceFailure::LeftOut { species } => format!(
                "the only balance gives {} a coefficient of zero: remove it or add the species it reacts with",
                list(species)
            ),
            BalanceFailure::Charge => {
                "the elements balance but the charge cannot: add electrons or check the ion charges"
                    .to_string()
            }
            BalanceFailure::NoBalance => {
                "no coefficients balance this equation: check the formulas".to_string()
            }
        }
    }
}

/// The result of balancing an equation.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum BalanceOutcome {
    /// The smallest positive integer coefficients, in the given order.
    /// `M` and `hv` get 1.
    Unique(Vec<BigInt>),
    /// Balances form a space of this dimension, so no coefficients are
    /// singled out (the equation combines independent reactions).
    NotUnique {
        independent: usize,
    },
    Impossible(BalanceFailure),
}

/// Balances `species`, of which the first `n_reactants` are on the left.
pub fn balance(species: &[&Formula], n_reactants: usize) -> BalanceOutcome {
    let n_reactants = n_reactants.min(species.len());
    let active: Vec<usize> = (0..species.len())
        .filter(|&i| in_balance(species[i]))
        .collect();
    for side in [Side::Left, Side::Right] {
        let present = active
            .iter()
            .any(|&i| (i < n_reactants) == (side == Side::Left));
        if !present {
            return BalanceOutcome::Impossible(BalanceFailure::EmptySide { side });
        }
    }
    // Element rows, sorted by atomic number.
    let mut zs: Vec<u8> = active
        .iter()
        .flat_map(|&i| species[i].composition.iter().map(|(z, _)| *z))
        .collect();
    zs.sort_unstable();
    zs.dedup();
    for &z in &zs {
        let on = |left: bool| {
            active
                .iter()
                .any(|&i| (i < n_reactants) == left && !species[i].count(z).is_zero())
        };
        match (on(true), on(false)) {
            (true, false) => {
                return BalanceOutcome::Impossible(BalanceFailure::OneSided {
                    z,
                    side: Side::Left,
                });
            }
            (false, true) => {
                return BalanceOutcome::Impossible(BalanceFailure::OneSided {
                    z,
                    side: Side::Right,
                });
            }
            _ => {}
        }
    }
    let column = |i: usize| -> Vec<BigRational> {
        let f = species[i];
        let sign = if i < n_reactants {
            BigRational::one()
        } else {
            -BigRational::one()
        };
        let mut col: Vec<BigRational> = zs.iter().map(|&z| &sign * big(&f.count(z))).collect();
        col.push(&sign * BigRational::from_integer(BigInt::from(f.charge)));
        col
    };
    let columns: Vec<Vec<BigRational>> = active.iter().map(|&i| column(i)).collect();
    let rows = zs.len() + 1;
    let matrix: Vec<Vec<BigRational>> = (0..rows)
        .map(|r| columns.iter().map(|c| c[r].clone()).collect())
        .collect();
    let basis = nullspace(matrix.clone());
    match basis.len() {
        0 => {
            let elements_only = nullspace(matrix[..rows - 1].to_vec());
            BalanceOutcome::Impossible(if elements_only.is_empty() {
                BalanceFailure::NoBalance
            } else {
                BalanceFailure::Charge
            })
        }
        1 => {
            let v = integer_vector(&basis[0]);
            let zero: Vec<usize> = (0..v.len())
                .filter(|&k| v[k].is_zero())
                .map(|k| active[k])
                .collect();
            if !zero.is_empty() {
                return BalanceOutcome::Impossible(BalanceFailure::LeftOut { species: zero });
            }
            let negative: Vec<usize> = (0..v.len()).filter(|&k| v[k].is_negative()).collect();
            let positive = v.len() - negative.len();
            let flip =
                negative.len() > positive || (negative.len() == positive && v[0].is_negative());
            let wrong: Vec<usize> = (0..v.len())
                .filter(|&k| v[k].is_negative() != flip)
                .map(|k| active[k])
                .collect();
            if !wrong.is_empty() {
                return BalanceOutcome::Impossible(BalanceFailure::WrongSide { species: wrong });
            }
            let mut out = vec![BigInt::one(); species.len()];
            for (k, &i) in active.iter().enumerate() {
                out[i] = v[k].abs();
            }
            BalanceOutcome::Unique(out)
        }
        d => BalanceOutcome::NotUnique { independent: d },
    }
}

/// A basis of the rational nullspace of `m` (rows of equal length), by
/// Gauss-Jordan elimination to reduced row echelon form.
pub(crate) fn nullspace(mut m: Vec<Vec<BigRational>>) -> Vec<Vec<BigRational>> {
    let cols = m.first().map_or(0, Vec::len);
    let mut pivots: Vec<usize> = Vec::new();
    let mut row = 0;
    for col in 0..cols {
        let Some(p) = (row..m.len()).find(|&r| !m[r][col].is_zero()) else {
            continue;
        };
        m.swap(row, p);
        let inv = m[row][col].recip();
        for x in &mut m[row][col..] {
            *x *= &inv;
        }
        for r in 0..m.len() {
            if r == row || m[r][col].is_zero() {
                continue;
            }
            let factor = m[r][col].clone();
            let pivot_row = m[row].clone();
            for (x, p) in m[r][col..].iter_mut().zip(&pivot_row[col..]) {
                *x -= &factor * p;
            }
        }
        pivots.push(col);
        row += 1;
        if row == m.len() {
            break;
        }
    }
    let free: Vec<usize> = (0..cols).filter(|c| !pivots.contains(c)).collect();
    free.iter()
        .map(|&f| {
            let mut v = vec![BigRational::zero(); cols];
            v[f] = BigRational::one();
            for (r, &p) in pivots.iter().enumerate() {
                v[p] = -m[r][f].clone();
            }
            v
        })
        .collect()
}

/// The primitive integer vector along `v`: denominators cleared, common
/// factor removed, sign kept.
fn integer_vector(v: &[BigRational]) -> Vec<BigInt> {
    let lcm = v.iter().fold(BigInt::one(), |acc, x| acc.lcm(x.denom()));
    let ints: Vec<BigInt> = v
        .iter()
        .map(|x| (x * BigRational::from_integer(lcm.clone())).to_integer())
        .collect();
    let gcd = ints.iter().fold(BigInt::zero(), |acc, x| acc.gcd(x));
    if gcd.is_zero() {
        return ints;
    }
    ints.into_iter().map(|x| x / &gcd).collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::formula::parse_formula;

    fn formulas(texts: &[&str]) -> Vec<Formula> {
        texts
            .iter()
            .map(|t| parse_formula(t).unwrap_or_else(|e| panic!("{t}: {e:?}")))
            .collect()
    }

    fn solve(left: &[&str], right: &[&str]) -> BalanceOutcome {
        let all: Vec<&str> = left.iter().chain(right).copied().collect();
        let fs = formulas(&all);
        let refs: Vec<&Formula> = fs.iter().collect();
        balance(&refs, left.len())
    }

    fn unique(v: &[i64]) -> BalanceOutcome {
        BalanceOutcome::Unique(v.iter().map(|&x| BigInt::from(x)).collect())
    }

    #[test]
    fn ferrocyanide_permanganate() {
        // Coefficients (from memory) confirmed with sympy's Matrix.nullspace()
        // by tests/reference/gen_balance.py, which carries this case.
        let out = solve(
            &["K4[Fe(CN)6]", "KMnO4", "H2SO4"],
            &["KHSO4", "Fe2(SO4)3", "MnSO4", "HNO3", "CO2", "H2O"],
        );
        assert_eq!(out, unique(&[10, 122, 299, 162, 5, 122, 60, 60, 188]));
    }

    #[test]
    fn simple_and_redox() {
        // Textbook equations (common practice).
        assert_eq!(solve(&["Fe", "O2"], &["Fe2O3"]), unique(&[4, 3, 2]));
        assert_eq!(
            solve(&["C3H8", "O2"], &["CO2", "H2O"]),
            unique(&[1, 5, 3, 4])
        );
        assert_eq!(
            solve(&["MnO4-", "H+", "e-"], &["Mn2+", "H2O"]),
            unique(&[1, 8, 5, 1, 4])
        );
        assert_eq!(
            solve(&["Cr2O7^2-", "Fe2+", "H+"], &["Cr3+", "Fe3+", "H2O"]),
            unique(&[1, 6, 14, 2, 6, 7])
        );
        // M and hv take coefficient 1 and stay out of the balance.
        assert_eq!(
            solve(&["H", "O2", "M"], &["HO2", "M"]),
            unique(&[1, 1, 1, 1, 1])
        );
        assert_eq!(
            solve(&["O", "O2", "M"], &["O3", "M"]),
            BalanceOutcome::NotUnique { independent: 2 }
        );
        assert_eq!(solve(&["NO2", "hv"], &["NO", "O"]), unique(&[1, 1, 1, 1]));
    }

    #[test]
    fn failures_name_the_cause() {
        assert_eq!(
            solve(&["H2", "O2", "N2"], &["H2O"]),
            BalanceOutcome::Impossible(BalanceFailure::OneSided {
                z: 7,
                side: Side::Left
            })
        );
        assert_eq!(
            solve(&["H2O"], &["H2", "O2", "C"]),
            BalanceOutcome::Impossible(BalanceFailure::OneSided {
                z: 6,
                side: Side::Right
            })
        );
        // O2 written as a reactant of the decomposition of H2O2.
        assert_eq!(
            solve(&["H2O2", "O2"], &["H2O"]),
            BalanceOutcome::Impossible(BalanceFailure::WrongSide { species: vec![1] })
        );
        assert_eq!(
            solve(&["Fe^3+"], &["Fe^2+"]),
            BalanceOutcome::Impossible(BalanceFailure::Charge)
        );
        assert_eq!(
            solve(&["H2", "O2"], &["H2O", "H2O2"]),
            BalanceOutcome::NotUnique { independent: 2 }
        );
        assert_eq!(
            solve(&["H2", "O2", "O3"], &["H2O"]),
            BalanceOutcome::NotUnique { independent: 2 }
        );
        assert_eq!(
            solve(&["M"], &["M"]),
            BalanceOutcome::Impossible(BalanceFailure::EmptySide { side: Side::Left })
        );
        assert_eq!(
            solve(&["NaCl", "H2"], &["NaCl", "H2", "H"]),
            // Five species, two independent rows (Na and Cl rows are equal).
            BalanceOutcome::NotUnique { independent: 3 }
        );
        let msg = BalanceFailure::WrongSide { species: vec![1] }.message(&["H2O2", "O2", "H2O"]);
        assert_eq!(
            msg,
            "a balance exists only with `O2` moved to the other side of the arrow"
        );
    }

    #[test]
    fn left_out_species() {
        // O2 + 2 NaCl -> 2 NaClO is the only balance (sympy nullspace
        // [1/2, 1, 0, 1], found while writing this test), so Cl2 is left out.
        assert_eq!(
            solve(&["O2", "NaCl"], &["Cl2", "NaClO"]),
            BalanceOutcome::Impossible(BalanceFailure::LeftOut { species: vec![2] })
        );
    }

    #[test]
    fn large_coefficients_stay_exact() {
        // 999999937 and 1000000007 are primes (from memory), so the only
        // balance of H1000000007 -> H999999937 is 999999937 : 1000000007.
        assert_eq!(
            solve(&["H1000000007"], &["H999999937"]),
            unique(&[999_999_937, 1_000_000_007])
        );
        // 4 H(p)O(q) -> 2p H2O + (2q - p) O2 with p = 1000000007 and
        // q = 999999937: H 4p = 4p, O 4q = 2p + 2(2q - p).
        let out = solve(&["H1000000007O999999937"], &["H2O", "O2"]);
        assert_eq!(out, unique(&[4, 2_000_000_014, 999_999_867]));
    }

    #[test]
    fn residual_totals() {
        let fs = formulas(&["MnO4-", "H+", "e-", "Mn2+", "H2O", "M"]);
        let c = |x: i64| Ratio::from_integer(x);
        let terms: Vec<(Ratio<i64>, &Formula)> = vec![
            (c(-1), &fs[0]),
            (c(-8), &fs[1]),
            (c(-5), &fs[2]),
            (c(1), &fs[3]),
            (c(4), &fs[4]),
            (c(1), &fs[5]),
        ];
        let r = residuals(&terms);
        assert!(r.is_balanced(), "{r:?}");
        assert_eq!(r.charge_left, BigRational::from_integer(BigInt::from(2)));
        let terms2 = vec![(c(-1), &fs[0]), (Ratio::new(-1, 2), &fs[1]), (c(1), &fs[3])];
        let r = residuals(&terms2);
        let h = r
            .elements
            .iter()
            .find(|e| e.z == 1)
            .map(ElementTotals::excess);
        assert_eq!(h, Some(BigRational::new(BigInt::from(-1), BigInt::from(2))));
        assert!(!r.is_balanced());
        // Mn balances (1 and 1); H and O do not.
        assert_eq!(r.unbalanced_elements().count(), 2);
    }
}
