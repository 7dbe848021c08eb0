//! What the editor shows about a reaction that the core does not already
//! compute: the K expression as text, and numbers written for people.
//!
//! K values, Δn, ΔrG° and ΔrH° come from [`crate::reaction_k`] and
//! [`crate::report`], the same code `stoik report` prints.

use crate::model::{Library, Reaction, Species};
use crate::reaction_k::{Standard, delta_n, standard_of};
use num_rational::Ratio;
use num_traits::{One, Signed};

/// The name a species shows in a K expression: its alias, or its formula
/// without the phase tag.
pub fn activity_name(s: &Species) -> String {
    if let Some(alias) = &s.alias {
        return alias.clone();
    }
    match s.formula.phase {
        Some(p) => {
            let tag = format!("({})", p.tag());
            s.name
                .strip_suffix(tag.as_str())
                .unwrap_or(&s.name)
                .to_string()
        }
        None => s.name.to_string(),
    }
}

fn power_text(c: &Ratio<i64>) -> String {
    if c.is_integer() {
        format!("{}", c.numer())
    } else {
        format!("({}/{})", c.numer(), c.denom())
    }
}

fn factor(name: &str, c: &Ratio<i64>) -> String {
    if c.is_one() {
        format!("a({name})")
    } else {
        format!("a({name})^{}", power_text(c))
    }
}

/// `K = a(CO2) · a(H2) / (a(CO) · a(H2O))`: products over reactants, each
/// activity to the power of its net coefficient, species of activity 1 left
/// out.
pub fn k_expression(lib: &Library, r: &Reaction) -> String {
    let mut top = Vec::new();
    let mut bottom = Vec::new();
    // Products first in the order written, then reactants.
    let mut order: Vec<crate::model::SpeciesId> = Vec::new();
    for side in [crate::model::Side::Right, crate::model::Side::Left] {
        for t in r.terms.iter().filter(|t| t.side == side) {
            if !order.contains(&t.species) {
                order.push(t.species);
            }
        }
    }
    let net = r.net();
    for id in order {
        let Some((_, c)) = net.iter().find(|(s, _)| *s == id) else {
            continue;
        };
        if standard_of(lib, id) == Standard::Unity {
            continue;
        }
        let s = lib.species(id);
        let name = activity_name(s);
        if c.is_positive() {
            top.push(factor(&name, c));
        } else {
            bottom.push(factor(&name, &-c));
        }
    }
    let top = if top.is_empty() {
        "1".to_string()
    } else {
        top.join(" · ")
    };
    match bottom.len() {
        0 => format!("K = {top}"),
        1 => format!("K = {top} / {}", bottom[0]),
        _ => format!("K = {top} / ({})", bottom.join(" · ")),
    }
}

/// Δn(gas) as text: `-2`, `0.5`.
pub fn delta_n_gas_text(lib: &Library, r: &Reaction) -> String {
    number(delta_n(lib, r).0)
}

pub fn ratio_text(c: &Ratio<i64>) -> String {
    if c.is_integer() {
        format!("{}", c.numer())
    } else {
        format!("{}/{}", c.numer(), c.denom())
    }
}

/// A number for people: four significant figures, scientific when large or
/// small.
pub fn number(x: f64) -> String {
    if !x.is_finite() {
        return format!("{x}");
    }
    let a = x.abs();
    if a != 0.0 && !(1e-3..1e5).contains(&a) {
        format!("{x:.3e}")
    } else {
        let s = format!("{x:.4}");
        let s = s.trim_end_matches('0').trim_end_matches('.');
        if s.is_empty() || s == "-" {
            "0".to_string()
        } else {
            s.to_string()
        }
    }
}
