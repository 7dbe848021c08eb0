//! The library model: the species, reactions and mixtures of a file and the
//! files it uses, with every quantity in SI units and every item carrying the
//! location it came from.
//!
//! The model is what the checks and computations work on; it is built from
//! the syntax trees by [`lower`].

pub mod lower;
pub mod quantity;
pub mod units_defaults;

use crate::chem::formula::{Formula, Phase};
use crate::span::{FileId, Span};
use crate::syntax::ast::ArrowKind;
use num_rational::Ratio;

/// A place in a file.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct Loc {
    pub file: FileId,
    pub span: Span,
}

impl Loc {
    pub fn new(file: FileId, span: Span) -> Self {
        Loc { file, span }
    }
}

/// Index of a species in [`Library::species`].
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct SpeciesId(pub u32);

/// A value in SI units with its location and, where given, its temperature.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Datum {
    pub value: f64,
    pub loc: Loc,
    /// The temperature the value holds at, in K (298.15 K when not written).
    pub at_k: f64,
    /// True when `at` was written.
    pub at_explicit: bool,
}

/// Thermodynamic data of a species (298.15 K, SI units).
#[derive(Clone, Debug, Default)]
pub struct SpeciesData {
    /// Standard enthalpy of formation, J/mol.
    pub dhf: Option<Datum>,
    /// Standard Gibbs energy of formation, J/mol.
    pub dgf: Option<Datum>,
    /// Standard molar entropy, J/(mol K).
    pub s: Option<Datum>,
    /// Standard molar heat capacity, J/(mol K).
    pub cp: Option<Datum>,
    pub source: Option<String>,
}

impl SpeciesData {
    /// No data at all, what most species of a large library have.
    pub const NONE: SpeciesData = SpeciesData {
        dhf: None,
        dgf: None,
        s: None,
        cp: None,
        source: None,
    };

    pub fn is_empty(&self) -> bool {
        self.dhf.is_none()
            && self.dgf.is_none()
            && self.s.is_none()
            && self.cp.is_none()
            && self.source.is_none()
    }
}

/// One species: a formula in a phase, or an alias for one.
#[derive(Clone, Debug)]
pub struct Species {
    /// The alias, or the formula as first written; kept inline when short
    /// (most are), so that copying a species costs no allocation for it.
    pub name: compact_str::CompactString,
    pub alias: Option<String>,
    /// Shared, so that copying a species (as the language server does when
    /// it reuses the last numbering) copies no composition.
    pub formula: std::sync::Arc<Formula>,
    /// Where the species was declared, if it was.
    pub declared: Option<Loc>,
    /// Where it was first met.
    pub first_use: Loc,
    /// Its data, boxed and only when it has some: a library of 10^5
    /// reactions names tens of thousands of species that carry none, and
    /// the four empty slots made each species some 400 bytes.
    pub data: Option<Box<SpeciesData>>,
}

impl Species {
    /// Its thermodynamic data (all empty when none was given).
    pub fn data(&self) -> &SpeciesData {
        self.data.as_deref().unwrap_or(&SpeciesData::NONE)
    }

    pub fn phase(&self) -> Option<Phase> {
        self.formula.phase
    }
}

/// Which side of the arrow a term stands on.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Side {
    Left,
    Right,
}

/// A term of an equation in the model.
#[derive(Clone, Debug)]
pub struct Term {
    pub species: SpeciesId,
    /// The coefficient as written (positive).
    pub coefficient: Ratio<i64>,
    pub side: Side,
    pub loc: Loc,
}

/// How an equilibrium constant was written.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum KForm {
    K,
    Kc,
    Kp,
    LogK,
    PK,
}

impl KForm {
    pub fn name(self) -> &'static str {
        match self {
            KForm::K => "K",
            KForm::Kc => "Kc",
            KForm::Kp => "Kp",
            KForm::LogK => "logK",
            KForm::PK => "pK",
        }
    }
}

/// One stated equilibrium constant.
#[derive(Clone, Debug)]
pub struct KValue {
    pub form: KForm,
    /// The number as written.
    pub number: f64,
    /// ln of the constant in SI units ((mol/m3)^Δn, Pa^Δn) for Kc and Kp, ln K
    /// for the dimensionless forms. `None` when the value cannot have a
    /// logarithm (zero or negative), which has been reported.
    pub ln_si: Option<f64>,
    pub at_k: f64,
    pub at_explicit: bool,
    /// The whole attribute.
    pub loc: Loc,
    /// The number.
    pub number_loc: Loc,
    /// The unit text, if any.
    pub unit_loc: Option<Loc>,
    /// The SI dimension of the unit written, if any.
    pub dimension: Option<crate::units::Dimension>,
}

/// A rate constant: a number or modified Arrhenius parameters (SI units).
#[derive(Clone, Debug)]
pub enum RateLaw {
    Constant(f64),
    /// k = A T^n exp(-Ea / RT), Ea in J/mol.
    Arrhenius {
        a: f64,
        n: f64,
        ea: f64,
    },
}

/// Which rate constant an attribute gives.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum RateKind {
    Forward,
    Reverse,
}

/// One stated rate constant.
#[derive(Clone, Debug)]
pub struct Rate {
    pub kind: RateKind,
    pub law: RateLaw,
    pub at_k: f64,
    pub at_explicit: bool,
    pub loc: Loc,
    /// The SI dimension the rate constant was given in, when it had a unit.
    pub dimension: Option<crate::units::Dimension>,
}

/// One reaction statement.
#[derive(Clone, Debug)]
pub struct Reaction {
    pub label: Option<String>,
    pub label_loc: Option<Loc>,
    /// The header line (keyword to the end of the equation).
    pub loc: Loc,
    /// The whole statement, attribute lines included.
    pub statement_loc: Loc,
    pub equation_loc: Loc,
    pub arrow: ArrowKind,
    pub arrow_loc: Loc,
    pub terms: Vec<Term>,
    /// The net stoichiometric vector of the terms, computed once when the
    /// reaction is built, since most checks start from it (see
    /// [`Reaction::net`]); private, so that it always matches `terms`.
    net: Vec<(SpeciesId, Ratio<i64>)>,
    /// False when a species could not be read: the reaction takes part in no
    /// further check.
    pub complete: bool,
    /// True when elements and charge balance.
    pub balanced: bool,
    pub k: Vec<KValue>,
    pub dg: Vec<Datum>,
    pub dh: Vec<Datum>,
    pub ds: Vec<Datum>,
    pub rates: Vec<Rate>,
    pub source: Option<String>,
}

impl Reaction {
    pub fn reversible(&self) -> bool {
        !matches!(self.arrow, ArrowKind::Forward)
    }

    /// A name for messages: the label, or the equation's location.
    pub fn display_name(&self, lib_files: &crate::workspace::Workspace) -> String {
        match &self.label {
            Some(l) => format!("`{l}`"),
            None => {
                let f = lib_files.file(self.loc.file);
                let line = f.index.line_of(self.loc.span.start()) + 1;
                format!("the reaction on line {line} of {}", f.display)
            }
        }
    }

    /// The net stoichiometric vector: products positive, reactants negative,
    /// species merged, zeros dropped, sorted by species.
    pub fn net(&self) -> &[(SpeciesId, Ratio<i64>)] {
        &self.net
    }

    /// [`Reaction::net`] computed from `terms`.
    pub fn net_of(terms: &[Term]) -> Vec<(SpeciesId, Ratio<i64>)> {
        let mut v: Vec<(SpeciesId, Ratio<i64>)> = terms
            .iter()
            .map(|t| {
                let c = match t.side {
                    Side::Left => -t.coefficient,
                    Side::Right => t.coefficient,
                };
                (t.species, c)
            })
            .collect();
        v.sort_by_key(|(s, _)| *s);
        let mut merged: Vec<(SpeciesId, Ratio<i64>)> = Vec::with_capacity(v.len());
        for (s, c) in v {
            match merged.last_mut() {
                Some((last, total)) if *last == s => *total += c,
                _ => merged.push((s, c)),
            }
        }
        merged.retain(|(_, c)| *c.numer() != 0);
        merged
    }
}

/// How a mixture states an amount.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum AmountKind {
    /// mol/m3 in SI.
    Concentration,
    /// Pa in SI.
    Pressure,
    /// mol.
    Amount,
}

/// One species line of a mixture.
#[derive(Clone, Debug)]
pub struct MixtureEntry {
    pub species: SpeciesId,
    /// The name as written in the mixture.
    pub name: String,
    pub kind: AmountKind,
    /// SI value of the amount.
    pub value: f64,
    /// The unit text as written (for reporting in the same unit).
    pub loc: Loc,
    pub name_loc: Loc,
}

/// A `mixture` statement.
#[derive(Clone, Debug)]
pub struct Mixture {
    pub name: String,
    pub loc: Loc,
    pub temperature_k: Option<f64>,
    /// Total pressure, Pa.
    pub pressure: Option<f64>,
    /// Volume, m3.
    pub volume: Option<f64>,
    pub davies: bool,
    pub entries: Vec<MixtureEntry>,
}

/// A library: a top file and everything it uses.
#[derive(Clone, Debug, Default)]
pub struct Library {
    pub files: Vec<FileId>,
    pub species: Vec<Species>,
    pub reactions: Vec<Reaction>,
    pub mixtures: Vec<Mixture>,
    /// How its species were numbered, kept only by lowerings that the
    /// language server repeats after every edit ([`lower::lower_after`]).
    pub numbering: Option<lower::Numbering>,
}

impl Library {
    pub fn species(&self, id: SpeciesId) -> &Species {
        &self.species[id.0 as usize]
    }
}
