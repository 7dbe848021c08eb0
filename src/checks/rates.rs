//! Units of rate constants against the reaction's order, units of Kc and Kp
//! against Δn, and missing units on constants.

use super::Checked;
use crate::diagnostic::{Applicability, Diagnostic, Fix, TextEdit};
use crate::model::{KForm, Library, RateKind, RateLaw, Side};
use crate::reaction_k::{kc_dimension, kp_dimension, order};
use crate::span::Span;
use crate::units::Dimension;

fn spell_power(base: &str, n: f64) -> String {
    if n == 1.0 {
        base.to_string()
    } else if n == 0.0 {
        "no unit (dimensionless)".to_string()
    } else {
        format!("{base}^{n}")
    }
}

pub(super) fn check(lib: &Library, c: &Checked, out: &mut Vec<Diagnostic>) {
    let r = c.reaction;
    let (dn_gas, dn_aq) = (c.k.dn_gas, c.k.dn_aq);
    for k in &r.k {
        let (expected, spelled, form_name) = match k.form {
            KForm::Kc => (
                kc_dimension(dn_gas, dn_aq),
                spell_power("(mol/L)", dn_gas + dn_aq),
                "Kc",
            ),
            KForm::Kp => {
                let mut s = spell_power("bar", dn_gas);
                if dn_aq != 0.0 {
                    s = format!("{s} (mol/L)^{dn_aq}");
                }
                (kp_dimension(dn_gas, dn_aq), s, "Kp")
            }
            _ => continue,
        };
        let n_total = dn_gas + dn_aq;
        match (k.dimension, expected, k.unit_loc) {
            (Some(dim), Some(e), Some(unit_loc)) if dim != e => {
                let other = if k.form == KForm::Kc { "Kp" } else { "Kc" };
                let mut d = Diagnostic::new(
                    "unit-mismatch",
                    unit_loc.file,
                    unit_loc.span,
                    format!(
                        "{form_name} of this reaction (Δn = {}) needs {spelled}, but the unit given is {}",
                        dn_gas + dn_aq,
                        dim.spell()
                    ),
                );
                let other_dim = if k.form == KForm::Kc {
                    kp_dimension(dn_gas, dn_aq)
                } else {
                    kc_dimension(dn_gas, dn_aq)
                };
                if other_dim == Some(dim) {
                    d = d.with_help(format!(
                        "that is the unit of {other}: write `{other}` if this is a {other}"
                    ));
                }
                out.push(d);
            }
            (None, _, _) if n_total != 0.0 => {
                let unit = if k.form == KForm::Kc {
                    power_unit("M", dn_gas + dn_aq)
                } else {
                    power_unit("bar", dn_gas)
                };
                out.push(
                    Diagnostic::new(
                        "missing-unit",
                        k.number_loc.file,
                        k.number_loc.span,
                        format!("{form_name} has no unit; read as {spelled}"),
                    )
                    .with_help(format!("write the unit, for example `{} {unit}`", k.number))
                    .with_fix(Fix {
                        title: format!("add the unit `{unit}`"),
                        applicability: Applicability::Unsafe,
                        edits: vec![TextEdit {
                            file: k.number_loc.file,
                            span: Span::empty(k.number_loc.span.end()),
                            new_text: format!(" {unit}"),
                        }],
                    }),
                );
            }
            _ => {}
        }
    }
    for rate in &r.rates {
        let side = match rate.kind {
            RateKind::Forward => Side::Left,
            RateKind::Reverse => Side::Right,
        };
        // Adding 0.0 turns a negative zero into zero for messages.
        let ord = order(lib, r, side) + 0.0;
        if ord.fract() != 0.0 || !(0.0..=6.0).contains(&ord) {
            continue;
        }
        let expected = Dimension::rate_constant(ord as i32);
        match rate.dimension {
            Some(mut d) => {
                if matches!(rate.law, RateLaw::Arrhenius { .. }) {
                    // T^n carries the temperature exponent of A.
                    d.temperature = 0;
                }
                if d != expected {
                    out.push(
                        Diagnostic::new(
                            "rate-units",
                            rate.loc.file,
                            rate.loc.span,
                            format!(
                                "a rate constant of order {ord} needs {}, but the unit given is {}",
                                expected.spell(),
                                d.spell()
                            ),
                        )
                        .with_help("the order counts the coefficients of the reacting side, `M` included, pure solids and liquids and `hv` not"),
                    );
                }
            }
            None => {
                let unit = expected.spell();
                out.push(
                    Diagnostic::new(
                        "missing-unit",
                        rate.loc.file,
                        rate.loc.span,
                        format!("this rate constant has no unit; read as {unit}"),
                    )
                    .with_help(format!(
                        "write the unit of an order-{ord} rate constant, {unit}"
                    )),
                );
            }
        }
    }
}

/// A unit text raised to a power (`M^2`, `1/bar`).
fn power_unit(base: &str, n: f64) -> String {
    if n == 1.0 {
        base.to_string()
    } else if n == -1.0 {
        format!("1/{base}")
    } else {
        format!("{base}^{n}")
    }
}
