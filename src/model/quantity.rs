//! Reading quantities: unit text to SI, dimension checks against what each
//! attribute means, and the file's default units for bare numbers.

use super::AmountKind;
use crate::config::Config;
use crate::diagnostic::{Applicability, Diagnostic, Fix, TextEdit};
use crate::span::{FileId, Span};
use crate::syntax::ast::{Quantity, StatementKind, ValueKind};
use crate::syntax::parser::truncate;
use crate::units::{Dimension, Unit, constants::GAS_CONSTANT, parse_unit};
use crate::workspace::Workspace;
use rustc_hash::FxHashMap as HashMap;

/// What an attribute's value must be.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Kind {
    Dimensionless,
    /// Energy per amount (ΔG°, ΔH°, formation data), J/mol.
    Energy,
    /// Energy per amount, or an activation temperature in K, J/mol.
    ActivationEnergy,
    /// Energy per amount and temperature (S°, Cp, ΔS°), J/(mol K).
    Entropy,
    Temperature,
    Pressure,
    Volume,
    /// Any dimension; checked by the caller (Kc, Kp, rate constants).
    Free,
    /// A concentration, a partial pressure or an amount.
    MixtureAmount,
}

impl Kind {
    /// The default-unit kind a bare number of this kind takes.
    fn default_kind(self) -> Option<&'static str> {
        match self {
            Kind::Energy | Kind::ActivationEnergy => Some("energy"),
            Kind::Entropy => Some("entropy"),
            Kind::Temperature => Some("temperature"),
            Kind::Pressure => Some("pressure"),
            Kind::Volume => Some("volume"),
            Kind::MixtureAmount => Some("concentration"),
            Kind::Dimensionless | Kind::Free => None,
        }
    }
}

/// The dimension each default-unit kind must have.
pub fn kind_dimension(kind: &str) -> Option<Dimension> {
    Some(match kind {
        "energy" => Dimension::MOLAR_ENERGY,
        "entropy" => Dimension::MOLAR_ENTROPY,
        "temperature" => Dimension::TEMPERATURE,
        "concentration" => Dimension::CONCENTRATION,
        "pressure" => Dimension::PRESSURE,
        "time" => Dimension::TIME,
        "amount" => Dimension::AMOUNT,
        "volume" => Dimension::VOLUME,
        _ => return None,
    })
}

/// Which amount a mixture line gives, from its dimension.
pub fn amount_kind(dim: Option<Dimension>) -> Option<AmountKind> {
    match dim {
        Some(d) if d == Dimension::CONCENTRATION => Some(AmountKind::Concentration),
        Some(d) if d == Dimension::PRESSURE => Some(AmountKind::Pressure),
        Some(d) if d == Dimension::AMOUNT => Some(AmountKind::Amount),
        _ => None,
    }
}

/// Reads the quantities of one file with its default units.
pub struct UnitReader {
    file: FileId,
    /// Default unit per kind: the file's `units` statement, then `stoik.toml`.
    defaults: HashMap<String, (String, Unit)>,
}

impl UnitReader {
    /// The reader of `file`, with diagnostics for its `units` statements.
    pub fn for_file(
        ws: &Workspace,
        file: FileId,
        config: &Config,
    ) -> (UnitReader, Vec<Diagnostic>) {
        let mut defaults = HashMap::default();
        let mut diags = Vec::new();
        for (kind, text) in &config.units {
            if let Ok(unit) = parse_unit(text) {
                defaults.insert(kind.clone(), (text.clone(), unit));
            }
        }
        for s in &ws.file(file).syntax.statements {
            if !matches!(s.kind, StatementKind::Units) {
                continue;
            }
            for a in &s.attributes {
                let kind = a.name.text.as_str();
                let Some(expected) = kind_dimension(kind) else {
                    let nearest = super::units_defaults::KINDS
                        .iter()
                        .map(|k| (strsim::levenshtein(k, kind), *k))
                        .min()
                        .filter(|(d, _)| *d <= 3);
                    let d = Diagnostic::new(
                        "unknown-attribute",
                        file,
                        a.name.span,
                        format!("`units` sets no default for `{}`", truncate(kind, 30)),
                    );
                    diags.push(match nearest {
                        Some((_, k)) => d.with_help(format!("did you mean `{k}`?")),
                        None => d.with_help(format!(
                            "`units` takes {}",
                            super::units_defaults::KINDS.join(", ")
                        )),
                    });
                    continue;
                };
                let ValueKind::Word(text) = &a.value.kind else {
                    diags.push(Diagnostic::new(
                        "syntax",
                        file,
                        a.value.span,
                        format!(
                            "`units {kind}` takes a unit such as `{}`",
                            super::units_defaults::assumed(kind)
                        ),
                    ));
                    continue;
                };
                match parse_unit(text) {
                    Ok(unit) if unit.dim == expected => {
                        defaults.insert(kind.to_string(), (text.clone(), unit));
                    }
                    Ok(unit) => diags.push(Diagnostic::new(
                        "unit-mismatch",
                        file,
                        a.value.span,
                        format!(
                            "`{text}` is {}, but `{kind}` needs a unit like {}",
                            describe(unit.dim),
                            super::units_defaults::assumed(kind)
                        ),
                    )),
                    Err(e) => diags.push(unit_error(file, a.value.span, &e)),
                }
            }
        }
        (UnitReader { file, defaults }, diags)
    }

    /// The default unit text and unit for a kind, if one is set.
    pub fn default_unit(&self, kind: &str) -> Option<&(String, Unit)> {
        self.defaults.get(kind)
    }

    /// Read `q` as `kind` for the attribute `name`; returns the SI value and,
    /// when a unit was written, its dimension.
    pub fn read(
        &self,
        q: &Quantity,
        kind: Kind,
        name: &str,
        diags: &mut Vec<Diagnostic>,
    ) -> Option<(f64, Option<Dimension>)> {
        let file = self.file;
        let Some(unit_name) = &q.unit else {
            return self.bare(q, kind, name, diags);
        };
        let unit = match parse_unit(&unit_name.text) {
            Ok(u) => u,
            Err(e) => {
                diags.push(unit_error(file, unit_name.span, &e));
                return None;
            }
        };
        let mismatch = |expected: &str| {
            Diagnostic::new(
                "unit-mismatch",
                file,
                unit_name.span,
                format!(
                    "`{name}` needs {expected}, but `{}` is {}",
                    truncate(&unit_name.text, 30),
                    describe(unit.dim)
                ),
            )
        };
        let si = unit.to_si(q.number);
        match kind {
            Kind::Dimensionless if !unit.dim.is_dimensionless() => {
                let mut d = mismatch("no unit (it is dimensionless)");
                if name == "K" {
                    let which = if unit.dim == Dimension::PRESSURE || unit.dim.mass != 0 {
                        "Kp"
                    } else {
                        "Kc"
                    };
                    d = d.with_help(format!(
                        "K is the thermodynamic constant of activities; a constant with units is `{which}`"
                    ));
                }
                diags.push(d);
                None
            }
            Kind::Energy if unit.dim != Dimension::MOLAR_ENERGY => {
                let mut d = mismatch("an energy per amount such as kJ/mol");
                if unit.dim == Dimension::ENERGY {
                    d = d.with_help(format!("write `{}/mol`", unit_name.text));
                }
                diags.push(d);
                None
            }
            Kind::ActivationEnergy if unit.dim == Dimension::TEMPERATURE => {
                if unit.is_affine() {
                    diags.push(mismatch(
                        "an energy per amount, or an activation temperature in K",
                    ));
                    return None;
                }
                Some((si * GAS_CONSTANT, Some(Dimension::MOLAR_ENERGY)))
            }
            Kind::ActivationEnergy if unit.dim != Dimension::MOLAR_ENERGY => {
                diags.push(mismatch(
                    "an energy per amount such as kJ/mol, or an activation temperature in K",
                ));
                None
            }
            Kind::Entropy if unit.dim != Dimension::MOLAR_ENTROPY => {
                diags.push(mismatch(
                    "an energy per amount and temperature such as J/(mol*K)",
                ));
                None
            }
            Kind::Temperature if unit.dim != Dimension::TEMPERATURE => {
                diags.push(mismatch("a temperature such as K or degC"));
                None
            }
            Kind::Temperature if si <= 0.0 => {
                diags.push(Diagnostic::new(
                    "unit-mismatch",
                    file,
                    q.number_span.cover(unit_name.span),
                    format!(
                        "{} {} is at or below absolute zero",
                        q.number, unit_name.text
                    ),
                ));
                None
            }
            Kind::Pressure if unit.dim != Dimension::PRESSURE => {
                diags.push(mismatch("a pressure such as bar"));
                None
            }
            Kind::Volume if unit.dim != Dimension::VOLUME => {
                diags.push(mismatch("a volume such as L"));
                None
            }
            Kind::MixtureAmount if amount_kind(Some(unit.dim)).is_none() => {
                diags.push(mismatch(
                    "a concentration (mol/L), a partial pressure (bar) or an amount (mol)",
                ));
                None
            }
            _ => Some((si, Some(unit.dim))),
        }
    }

    fn bare(
        &self,
        q: &Quantity,
        kind: Kind,
        name: &str,
        diags: &mut Vec<Diagnostic>,
    ) -> Option<(f64, Option<Dimension>)> {
        let Some(default_kind) = kind.default_kind() else {
            return Some((q.number, None));
        };
        if let Some((_, unit)) = self.defaults.get(default_kind) {
            return Some((unit.to_si(q.number), Some(unit.dim)));
        }
        let assumed = super::units_defaults::assumed(default_kind);
        let what = match kind {
            Kind::MixtureAmount => "an amount",
            Kind::Temperature => "a temperature",
            _ => "an energy",
        };
        diags.push(
            Diagnostic::new(
                "missing-unit",
                self.file,
                q.number_span,
                format!("`{name}` is {what} with no unit; read as {assumed}"),
            )
            .with_help(format!(
                "write the unit (`{} {assumed}`) or set a file default (`units {default_kind} = {assumed}`)",
                q.number
            ))
            .with_fix(Fix {
                title: format!("add the unit `{assumed}`"),
                applicability: Applicability::Unsafe,
                edits: vec![TextEdit {
                    file: self.file,
                    span: Span::empty(q.number_span.end()),
                    new_text: format!(" {assumed}"),
                }],
            }),
        );
        let unit = parse_unit(assumed).ok()?;
        Some((unit.to_si(q.number), Some(unit.dim)))
    }
}

/// A diagnostic for unit text that does not parse.
fn unit_error(file: FileId, span: Span, e: &crate::units::UnitError) -> Diagnostic {
    let at = Span::new(span.start() + e.span.start, span.start() + e.span.end);
    let mut d = Diagnostic::new("syntax", file, at, e.message.clone());
    if let Some(s) = e.suggestions.first() {
        d = d.with_help(format!("did you mean `{s}`?"));
        d = d.with_fix(Fix {
            title: format!("write `{s}`"),
            applicability: Applicability::Unsafe,
            edits: vec![TextEdit {
                file,
                span: at,
                new_text: s.clone(),
            }],
        });
    }
    d
}

/// A dimension in words for messages (`a pressure`, `(mol/L)^2`).
pub fn describe(dim: Dimension) -> String {
    let named = [
        (Dimension::DIMENSIONLESS, "dimensionless"),
        (Dimension::PRESSURE, "a pressure"),
        (Dimension::CONCENTRATION, "a concentration"),
        (Dimension::ENERGY, "an energy"),
        (Dimension::MOLAR_ENERGY, "an energy per amount"),
        (
            Dimension::MOLAR_ENTROPY,
            "an energy per amount and temperature",
        ),
        (Dimension::TEMPERATURE, "a temperature"),
        (Dimension::TIME, "a time"),
        (Dimension::AMOUNT, "an amount"),
        (Dimension::VOLUME, "a volume"),
    ];
    match named.iter().find(|(d, _)| *d == dim) {
        Some((_, n)) => n.to_string(),
        None => format!("a quantity in {}", dim.spell()),
    }
}
