//! stoik: a linter and language server for reaction libraries.
//!
//! Data flows one way: text is lexed and parsed into a syntax tree
//! ([`syntax`]), lowered into a library model of species, reactions and
//! mixtures with all quantities in SI ([`model`]), checked ([`checks`]) and
//! computed on ([`thermo`], [`equilibrium`]). The results are plain values
//! ([`diagnostic::Diagnostic`] and friends) that the thin [`cli`] and [`lsp`]
//! adapters render. Nothing below `cli` and `lsp` knows about terminals or the
//! protocol.

pub mod analysis;
pub mod checks;
pub mod chem;
pub mod cli;
pub mod config;
pub mod diagnostic;
pub mod equilibrium;
pub mod format;
pub mod lsp;
pub mod model;
pub(crate) mod parallel;
pub mod reaction_k;
pub mod report;
pub mod rules;
pub mod solve;
pub mod span;
pub mod suppression;
pub mod syntax;
pub mod synthetic;
pub mod thermo;
pub mod units;
pub mod workspace;
