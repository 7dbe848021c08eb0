//! The Wegscheider condition: reactions whose equations combine to zero (or
//! to another reaction) must have ln K that combine the same way.
//!
//! Dependence is found exactly and incrementally with
//! [`crate::chem::cycles::CycleFinder`] over sparse reaction vectors, so the
//! check scales to libraries of 10^5 reactions. All K are compared at one
//! reference temperature: the one at which the most reactions have a K.

use super::{Checked, k_text, number, temperature, tolerance};
use crate::chem::cycles::CycleFinder;
use crate::diagnostic::Diagnostic;
use crate::model::Library;
use crate::units::constants::STANDARD_TEMPERATURE;
use crate::workspace::Workspace;
use std::collections::HashMap;

fn reference_temperature(checked: &[&Checked]) -> f64 {
    let mut counts: HashMap<u64, usize> = HashMap::new();
    for c in checked {
        for p in c.k.stated.iter().chain(&c.k.gibbs) {
            *counts.entry(p.t.to_bits()).or_default() += 1;
        }
    }
    let mut candidates: Vec<(u64, usize)> = counts.into_iter().collect();
    candidates.sort_by(|a, b| b.1.cmp(&a.1).then(a.0.cmp(&b.0)));
    let mut best = (STANDARD_TEMPERATURE, 0usize);
    let mut temps: Vec<f64> = candidates
        .iter()
        .take(3)
        .map(|(t, _)| f64::from_bits(*t))
        .collect();
    temps.push(STANDARD_TEMPERATURE);
    for t in temps {
        let n = checked.iter().filter(|c| c.k.ln_k_at(t).is_ok()).count();
        if n > best.1 {
            best = (t, n);
        }
    }
    best.0
}

fn multiplier_text(m: f64) -> String {
    let r = (m * 6.0).round();
    if (m * 6.0 - r).abs() < 1e-9 && m.fract() != 0.0 {
        let g = gcd(r.abs() as i64, 6);
        return format!("{}/{}", r as i64 / g, 6 / g);
    }
    number(m)
}

fn gcd(a: i64, b: i64) -> i64 {
    if b == 0 { a.max(1) } else { gcd(b, a % b) }
}

pub(super) fn check(
    ws: &Workspace,
    _lib: &Library,
    checked: &[Checked],
    rel: f64,
    out: &mut Vec<Diagnostic>,
) {
    let reversible: Vec<&Checked> = checked.iter().filter(|c| c.reaction.reversible()).collect();
    if reversible.len() < 3 {
        return;
    }
    let t = reference_temperature(&reversible);
    let mut finder = CycleFinder::new();
    let mut ln_k: Vec<f64> = vec![f64::NAN; reversible.len()];
    for (i, c) in reversible.iter().enumerate() {
        let Ok(estimate) = c.k.ln_k_at(t) else {
            continue;
        };
        let v: Vec<(u32, num_rational::Ratio<i64>)> =
            c.reaction.net().iter().map(|&(s, x)| (s.0, x)).collect();
        if v.is_empty() {
            continue;
        }
        ln_k[i] = estimate.ln_k;
        let Some(dependence) = finder.add_valued(i, &v, estimate.ln_k) else {
            continue;
        };
        if dependence.is_trivial()
            || !dependence.predicted.is_finite()
            || (estimate.ln_k - dependence.predicted).abs() <= tolerance(dependence.predicted, rel)
        {
            continue;
        }
        // Only a failing cycle is expanded into its members; the predicted
        // value is taken again from them, exactly as the message shows it.
        let members = finder.combination(&dependence);
        // A single member is a duplicate, reverse or multiple: the pair
        // checks report those.
        if members.len() < 2 || members.iter().any(|(_, m)| !m.is_finite()) {
            continue;
        }
        let predicted: f64 = members.iter().map(|(j, m)| m * ln_k[*j]).sum();
        if (estimate.ln_k - predicted).abs() <= tolerance(predicted, rel) {
            continue;
        }
        let mut terms: Vec<String> = members
            .iter()
            .map(|(j, m)| {
                format!(
                    "{} × {}",
                    multiplier_text(*m),
                    reversible[*j].reaction.display_name(ws)
                )
            })
            .collect();
        terms.sort();
        let mut d = Diagnostic::new(
            "cycle-inconsistent",
            c.reaction.loc.file,
            c.reaction.loc.span,
            format!(
                "this reaction equals {}, so at {} K its K should be {}, but it is {}: the cycle fails by a factor of {}",
                terms.join(" + "),
                temperature(t),
                k_text(predicted),
                k_text(estimate.ln_k),
                k_text(estimate.ln_k - predicted)
            ),
        )
        .with_help("around a closed cycle the K multiply to 1 (Wegscheider); correct the K that is wrong or derive it from the others");
        for (j, m) in &members {
            let r = reversible[*j].reaction;
            d = d.with_related(
                r.loc.file,
                r.loc.span,
                format!("member of the cycle, multiplier {}", multiplier_text(*m)),
            );
        }
        out.push(d);
    }
}
