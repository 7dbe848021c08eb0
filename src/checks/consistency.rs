//! Within one reaction: K against ΔG° and species data (ΔG° = -RT ln K),
//! against kf/kr (detailed balance), and across temperatures (van 't Hoff).

use super::{Checked, k_text, number, temperature, tolerance};
use crate::diagnostic::{Applicability, Diagnostic, Fix, TextEdit};
use crate::model::{KForm, Library};
use crate::reaction_k::{EnthalpyOrigin, Origin, Point, Unknown};
use crate::thermo::likely_cause::{
    CauseContext, EnergyBasis, StatedForm, VantHoffCarry, likely_cause,
};
use crate::units::constants::GAS_CONSTANT;
use crate::workspace::Workspace;

fn stated_form(origin: Origin) -> StatedForm {
    match origin {
        Origin::Stated(KForm::Kc) => StatedForm::Kc,
        Origin::Stated(KForm::Kp) => StatedForm::Kp,
        Origin::Stated(KForm::LogK | KForm::PK) => StatedForm::LogK,
        _ => StatedForm::K,
    }
}

pub(super) fn check(
    ws: &Workspace,
    _lib: &Library,
    c: &Checked,
    rel: f64,
    out: &mut Vec<Diagnostic>,
) {
    let k = &c.k;
    let r = c.reaction;
    // Energy-based references: the reaction's dG values, dH with dS, and the
    // species' formation data.
    let mut references: Vec<Point> = k.gibbs.clone();
    references.extend(k.enthalpy_entropy.as_deref());
    references.extend(k.species.as_deref());
    let mut compared_any = false;
    for p in &k.stated {
        for reference in &references {
            let expected = match reference.origin {
                Origin::EnthalpyEntropy => match (k.dh, k.stated_ds) {
                    (Some((dh, _, _)), Some(ds)) => {
                        Some(crate::thermo::ln_k_from_dh_ds(dh, ds, p.t))
                    }
                    _ => None,
                },
                _ => k.carry(reference, p.t),
            };
            let Some(expected) = expected else { continue };
            compared_any = true;
            if (p.ln_k - expected).abs() <= tolerance(expected, rel) {
                continue;
            }
            let mut ctx = CauseContext::new(p.t)
                .with_dn(k.dn_gas, k.dn_aq)
                .with_form(stated_form(p.origin));
            ctx = match reference.origin {
                Origin::Gibbs => {
                    let dg = -GAS_CONSTANT * reference.t * reference.ln_k;
                    ctx.with_energy(EnergyBasis::Gibbs { dg })
                }
                Origin::EnthalpyEntropy | Origin::SpeciesEnthalpyEntropy => match (k.dh, k.ds) {
                    (Some((dh, _, _)), Some(ds)) => {
                        ctx.with_energy(EnergyBasis::EnthalpyEntropy { dh, ds })
                    }
                    _ => ctx,
                },
                _ => {
                    let dg = -GAS_CONSTANT * reference.t * reference.ln_k;
                    ctx.with_energy(EnergyBasis::Gibbs { dg })
                }
            };
            if (reference.t - p.t).abs() > 1e-9
                && let Some((dh, _, _)) = k.dh
            {
                ctx = ctx.with_carry(VantHoffCarry {
                    ln_k0: reference.ln_k,
                    t0: reference.t,
                    dh,
                    dcp: k.dcp,
                });
            }
            let cause = likely_cause(p.ln_k, expected, &ctx, rel);
            let kv = p.k_index.map(|i| &r.k[i]);
            let mut message = format!(
                "{} gives ln K = {} at {} K, but {} gives ln K = {} (K = {})",
                p.origin.describe(),
                number(p.ln_k),
                temperature(p.t),
                reference.origin.describe(),
                number(expected),
                k_text(expected)
            );
            if let Some(cause) = &cause {
                message.push_str(&format!("; likely cause: {}", cause.message()));
            }
            let mut d = Diagnostic::new("k-thermo-mismatch", p.loc.file, p.loc.span, message)
                .with_related(
                    reference.loc.file,
                    reference.loc.span,
                    format!("{} here", reference.origin.describe()),
                );
            if let Some(kv) = kv
                && kv.form == KForm::K
            {
                d = d.with_fix(Fix {
                    title: format!(
                        "set K to {} (the value {} implies)",
                        k_text(expected),
                        reference.origin.describe()
                    ),
                    applicability: Applicability::Unsafe,
                    edits: vec![TextEdit {
                        file: kv.number_loc.file,
                        span: kv.number_loc.span,
                        new_text: k_text(expected),
                    }],
                });
            }
            out.push(d);
        }
    }
    // Without a stated K, the reaction's own dG can still disagree with the
    // species data.
    if !compared_any
        && k.stated.is_empty()
        && let Some(species) = &k.species
    {
        for g in &k.gibbs {
            let Some(expected) = k.carry(species, g.t) else {
                continue;
            };
            if (g.ln_k - expected).abs() <= tolerance(expected, rel) {
                continue;
            }
            let ctx = CauseContext::new(g.t).with_dn(k.dn_gas, k.dn_aq);
            let cause = likely_cause(g.ln_k, expected, &ctx, rel);
            let dg = -GAS_CONSTANT * g.t * g.ln_k / 1000.0;
            let expected_dg = -GAS_CONSTANT * g.t * expected / 1000.0;
            let mut message = format!(
                "dG = {} kJ/mol, but the species' formation data give ΔrG° = {} kJ/mol at {} K",
                number(dg),
                number(expected_dg),
                temperature(g.t)
            );
            if let Some(cause) = cause {
                message.push_str(&format!("; likely cause: {}", cause.message()));
            }
            out.push(Diagnostic::new(
                "k-thermo-mismatch",
                g.loc.file,
                g.loc.span,
                message,
            ));
        }
    }
    detailed_balance(c, rel, out);
    vant_hoff(ws, c, rel, out);
}

fn detailed_balance(c: &Checked, rel: f64, out: &mut Vec<Diagnostic>) {
    let k = &c.k;
    if k.rates.is_empty() {
        return;
    }
    let mut without_rates = k.clone();
    without_rates.rates.clear();
    for q in &k.rates {
        let Ok(reference) = without_rates.ln_k_at(q.t) else {
            continue;
        };
        if (q.ln_k - reference.ln_k).abs() <= tolerance(reference.ln_k, rel) {
            continue;
        }
        let ratio = (q.ln_k - reference.ln_k).exp();
        out.push(
            Diagnostic::new(
                "detailed-balance",
                q.loc.file,
                q.loc.span,
                format!(
                    "kf/kr gives K = {} at {} K (in standard-state form), but {} gives K = {}: off by a factor of {}",
                    k_text(q.ln_k),
                    temperature(q.t),
                    reference.origin.describe(),
                    k_text(reference.ln_k),
                    k_text(q.ln_k - reference.ln_k)
                ),
            )
            .with_help(if ratio > 1.0 {
                "kr is too small or kf too large for this K; derive one from the other and K"
            } else {
                "kr is too large or kf too small for this K; derive one from the other and K"
            }),
        );
    }
}

fn vant_hoff(_ws: &Workspace, c: &Checked, rel: f64, out: &mut Vec<Diagnostic>) {
    let k = &c.k;
    let Some((dh, _, origin)) = k.dh else { return };
    if origin == EnthalpyOrigin::Table {
        return;
    }
    let mut points: Vec<&Point> = k.stated.iter().collect();
    points.sort_by(|a, b| a.t.total_cmp(&b.t));
    points.dedup_by(|a, b| (a.t - b.t).abs() < 1e-9);
    if points.len() < 2 {
        return;
    }
    let first = points[0];
    for p in &points[1..] {
        let Some(expected) = k.carry(first, p.t) else {
            continue;
        };
        if (p.ln_k - expected).abs() <= tolerance(expected, rel) {
            continue;
        }
        let implied = -GAS_CONSTANT * (p.ln_k - first.ln_k) / (1.0 / p.t - 1.0 / first.t);
        let dh_from = if origin == EnthalpyOrigin::Stated {
            "dH"
        } else {
            "the species' dHf"
        };
        out.push(
            Diagnostic::new(
                "vant-hoff-mismatch",
                p.loc.file,
                p.loc.span,
                format!(
                    "K at {} K and at {} K imply ΔH° = {} kJ/mol, but {dh_from} gives {} kJ/mol (K here would be {})",
                    temperature(first.t),
                    temperature(p.t),
                    number(implied / 1000.0),
                    number(dh / 1000.0),
                    k_text(expected)
                ),
            )
            .with_related(first.loc.file, first.loc.span, "the other K")
            .with_help("check the sign and unit of dH, and the temperatures written with `at`"),
        );
    }
}

/// `k-temperature`: reactions a mixture needs at its temperature whose K
/// cannot be carried there.
pub(super) fn temperatures(
    ws: &Workspace,
    lib: &Library,
    checked: &[Checked],
    out: &mut Vec<Diagnostic>,
) {
    let _ = ws;
    for m in &lib.mixtures {
        let Some(t) = m.temperature_k else { continue };
        let present: rustc_hash::FxHashSet<_> = m.entries.iter().map(|e| e.species).collect();
        for c in checked.iter().filter(|c| c.reaction.reversible()) {
            let involved = c.reaction.net();
            if involved.is_empty()
                || !involved.iter().all(|(s, _)| {
                    present.contains(s)
                        || crate::reaction_k::standard_of(lib, *s)
                            == crate::reaction_k::Standard::Unity
                })
            {
                continue;
            }
            if let Err(Unknown::NoTemperatureDependence { known_t }) = c.k.ln_k_at(t) {
                out.push(
                    Diagnostic::new(
                        "k-temperature",
                        c.reaction.loc.file,
                        c.reaction.loc.span,
                        format!(
                            "mixture `{}` needs K at {} K, but K is known only at {} K and nothing carries it there",
                            m.name,
                            temperature(t),
                            temperature(known_t)
                        ),
                    )
                    .with_related(m.loc.file, m.loc.span, "the mixture")
                    .with_help("add `dH` (or species dHf), or a K at the mixture's temperature"),
                );
            }
        }
    }
}
