//! Reactions stated twice: the same equation, its reverse or a multiple of
//! it, and whether their K agree (K of the reverse is 1/K; the equation
//! times n has K^n).

use super::{Checked, k_text, number, temperature, tolerance};
use crate::chem::cycles::{CanonicalKey, canonical_form, canonical_key};
use crate::diagnostic::{Applicability, Diagnostic, Fix, TextEdit};
use crate::model::KForm;
use crate::workspace::Workspace;
use num_rational::BigRational;
use num_traits::ToPrimitive;
use rustc_hash::FxHashMap as HashMap;
use std::collections::hash_map::Entry;

fn as_u32_vector(c: &Checked) -> Vec<(u32, num_rational::Ratio<i64>)> {
    c.reaction.net().iter().map(|&(s, v)| (s.0, v)).collect()
}

fn multiple_text(s: f64) -> String {
    let candidates = [
        (0.5, "1/2"),
        (1.0 / 3.0, "1/3"),
        (0.25, "1/4"),
        (2.0 / 3.0, "2/3"),
        (1.5, "3/2"),
    ];
    for (v, t) in candidates {
        if (s.abs() - v).abs() < 1e-12 {
            return if s < 0.0 {
                format!("-{t}")
            } else {
                t.to_string()
            };
        }
    }
    number(s)
}

/// The key under which a reaction meets its repeats, reverse and
/// multiples (`None` for an empty net equation).
pub(super) fn key(c: &Checked) -> Option<CanonicalKey> {
    let v = as_u32_vector(c);
    (!v.is_empty()).then(|| canonical_form(&v))
}

/// Report every reaction that repeats an earlier one, reverses it or
/// multiplies it, and K that disagree; `keys` are the reactions' [`key`]s.
pub(super) fn check(
    ws: &Workspace,
    checked: &[Checked],
    keys: &[Option<CanonicalKey>],
    rel: f64,
    out: &mut Vec<Diagnostic>,
) {
    // The first reaction of each key, and every later one with the first
    // of its key: most reactions meet no other, and make no group.
    let mut first: HashMap<&CanonicalKey, usize> = HashMap::default();
    first.reserve(keys.len());
    let mut repeats: Vec<(usize, usize)> = Vec::new();
    for (i, key) in keys.iter().enumerate() {
        if let Some(key) = key {
            match first.entry(key) {
                Entry::Occupied(e) => repeats.push((*e.get(), i)),
                Entry::Vacant(e) => {
                    e.insert(i);
                }
            }
        }
    }
    // Groups in the order of their first reaction, members in theirs.
    repeats.sort_by_key(|&(first, _)| first);
    for run in repeats.chunk_by(|a, b| a.0 == b.0) {
        let members: Vec<usize> = std::iter::once(run[0].0)
            .chain(run.iter().map(|&(_, i)| i))
            .collect();
        // Only reactions that meet another need their scale.
        let group: Vec<(usize, BigRational)> = members
            .iter()
            .map(|&i| (i, canonical_key(&as_u32_vector(&checked[i])).1))
            .collect();
        let (first, first_scale) = &group[0];
        let a = &checked[*first];
        for (other, scale) in &group[1..] {
            let b = &checked[*other];
            let s = (scale / first_scale).to_f64().unwrap_or(f64::NAN);
            if !s.is_finite() {
                continue;
            }
            let both_forward = !a.reaction.reversible() && !b.reaction.reversible();
            if both_forward && s < 0.0 {
                // A forward step and its reverse step are two kinetic steps.
                continue;
            }
            let name_a = a.reaction.display_name(ws);
            let what = if s == 1.0 {
                format!("this reaction repeats {name_a}")
            } else if s == -1.0 {
                format!("this reaction is the reverse of {name_a}")
            } else {
                format!(
                    "this reaction is {name_a} multiplied by {}",
                    multiple_text(s)
                )
            };
            out.push(
                Diagnostic::new("duplicate-reaction", b.reaction.loc.file, b.reaction.loc.span, what.clone())
                    .with_related(a.reaction.loc.file, a.reaction.loc.span, "the first statement")
                    .with_help("a simulator counts every statement; keep one and derive the other's data from it"),
            );
            if !(a.reaction.reversible() && b.reaction.reversible()) {
                continue;
            }
            compare_k(ws, a, b, s, rel, out);
        }
    }
}

/// K of `b` should be K of `a` to the power `s`.
fn compare_k(
    ws: &Workspace,
    a: &Checked,
    b: &Checked,
    s: f64,
    rel: f64,
    out: &mut Vec<Diagnostic>,
) {
    let Some(pb) =
        b.k.stated
            .first()
            .copied()
            .or_else(|| b.k.gibbs.first().copied())
    else {
        return;
    };
    let Ok(ea) = a.k.ln_k_at(pb.t) else { return };
    let expected = s * ea.ln_k;
    if (pb.ln_k - expected).abs() <= tolerance(expected, rel) {
        return;
    }
    let name_a = a.reaction.display_name(ws);
    let (rule, message) = if s == -1.0 {
        (
            "k-reverse-mismatch",
            format!(
                "this reaction is the reverse of {name_a}, so its K should be 1/K = {}, but it is {} at {} K",
                k_text(expected),
                k_text(pb.ln_k),
                temperature(pb.t)
            ),
        )
    } else {
        (
            "k-scale-mismatch",
            format!(
                "this reaction is {name_a} multiplied by {m}, so its K should be K^({m}) = {}, but it is {} at {} K",
                k_text(expected),
                k_text(pb.ln_k),
                temperature(pb.t),
                m = multiple_text(s)
            ),
        )
    };
    let mut d = Diagnostic::new(rule, pb.loc.file, pb.loc.span, message).with_related(
        a.reaction.loc.file,
        a.reaction.loc.span,
        "the related reaction",
    );
    if let Some(kv) = pb.k_index.map(|i| &b.reaction.k[i])
        && kv.form == KForm::K
    {
        let title = if s == -1.0 {
            format!("invert K: set it to {}", k_text(expected))
        } else {
            format!(
                "raise K to the power {}: set it to {}",
                multiple_text(s),
                k_text(expected)
            )
        };
        d = d.with_fix(Fix {
            title,
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
