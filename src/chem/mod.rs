//! Chemistry core: elements, formulas, exact balancing and the linear
//! algebra behind cycle checks.
//!
//! Everything here is plain Rust over exact numbers (rationals and big
//! integers); nothing knows about files, editors or terminals.

pub mod balance;
pub mod cycles;
pub mod element_rows;
pub mod elements;
pub mod formula;

pub use balance::{
    BalanceFailure, BalanceOutcome, ElementTotals, Residual, Side, balance, residuals,
};
pub use cycles::{CanonicalKey, CycleFinder, canonical_form, canonical_key};
pub use elements::Element;
pub use formula::{
    Formula, FormulaError, FormulaErrorKind, Phase, SpeciesKind, looks_like_formula, parse_formula,
};
