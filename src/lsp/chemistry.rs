//! What the editor shows about a reaction: its K expression, Δn(gas), and
//! ΔrG° and ΔrH° from the species' formation data.
//!
//! Hover and inlay hints both read these; they are plain functions over the
//! library model and know nothing of the protocol.

use crate::chem::formula::{Phase, SpeciesKind};
use crate::model::{Library, Reaction, Species};
use num_rational::Ratio;
use num_traits::{One, Signed, ToPrimitive, Zero};

/// True when the species' activity enters K: not a pure solid or liquid,
/// not a photon, third body or electron.
pub fn in_k(s: &Species) -> bool {
    if matches!(s.formula.phase, Some(Phase::Solid | Phase::Liquid)) {
        return false;
    }
    s.formula.kind == SpeciesKind::Compound
}

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
        None => s.name.clone(),
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
        let s = lib.species(id);
        if !in_k(s) {
            continue;
        }
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

/// Δn(gas): the net change in gas-phase coefficients.
pub fn delta_n_gas(lib: &Library, r: &Reaction) -> Ratio<i64> {
    r.net()
        .iter()
        .filter(|(s, _)| lib.species(*s).formula.phase == Some(Phase::Gas))
        .fold(Ratio::zero(), |acc, (_, c)| acc + c)
}

/// Δn of aqueous solutes, which the K/Kc conversion needs beside Δn(gas).
pub fn delta_n_aq(lib: &Library, r: &Reaction) -> Ratio<i64> {
    r.net()
        .iter()
        .filter(|(s, _)| lib.species(*s).formula.phase == Some(Phase::Aqueous))
        .fold(Ratio::zero(), |acc, (_, c)| acc + c)
}

pub fn ratio_text(c: &Ratio<i64>) -> String {
    if c.is_integer() {
        format!("{}", c.numer())
    } else {
        format!("{}/{}", c.numer(), c.denom())
    }
}

pub fn ratio_f64(c: &Ratio<i64>) -> f64 {
    c.numer().to_f64().unwrap_or(0.0) / c.denom().to_f64().unwrap_or(1.0)
}

/// Elements in their standard reference state, whose formation enthalpy and
/// Gibbs energy are zero by convention (NOTATION.md §2): the listed gases
/// and liquids, and any other element as a monatomic solid.
fn reference_state(s: &Species) -> bool {
    let f = &s.formula;
    if f.kind == SpeciesKind::Electron {
        return true;
    }
    if f.kind != SpeciesKind::Compound {
        return false;
    }
    // H+(aq) has zero formation Gibbs energy and enthalpy by convention.
    if f.charge == 1 && f.phase == Some(Phase::Aqueous) && f.composition.len() == 1 {
        let (z, n) = &f.composition[0];
        if *z == 1 && n.is_one() {
            return true;
        }
    }
    if !f.is_element_only() {
        return false;
    }
    let (z, n) = &f.composition[0];
    let symbol = crate::chem::elements::by_z(*z).map_or("", |e| e.symbol);
    let two = Ratio::from_integer(2);
    match (symbol, f.phase) {
        ("H" | "N" | "O" | "F" | "Cl", Some(Phase::Gas)) => *n == two,
        ("Br", Some(Phase::Liquid)) => *n == two,
        ("I", Some(Phase::Solid)) => *n == two,
        ("Hg", Some(Phase::Liquid)) => n.is_one(),
        ("H" | "N" | "O" | "F" | "Cl" | "Br" | "Hg", _) => false,
        ("He" | "Ne" | "Ar" | "Kr" | "Xe" | "Rn", Some(Phase::Gas)) => n.is_one(),
        (_, Some(Phase::Solid)) => n.is_one(),
        _ => false,
    }
}

/// Which formation property to sum.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Formation {
    Gibbs,
    Enthalpy,
}

/// Σ ν·ΔfX° over the reaction in J/mol, when every species has the datum or
/// is an element in its reference state.
pub fn reaction_from_formation(lib: &Library, r: &Reaction, which: Formation) -> Option<f64> {
    let mut sum = 0.0;
    for (id, c) in r.net() {
        let s = lib.species(id);
        if matches!(s.formula.kind, SpeciesKind::ThirdBody | SpeciesKind::Photon) {
            continue;
        }
        let datum = match which {
            Formation::Gibbs => s.data.dgf,
            Formation::Enthalpy => s.data.dhf,
        };
        let value = match datum {
            Some(d) => d.value,
            None if reference_state(s) => 0.0,
            None => return None,
        };
        sum += ratio_f64(&c) * value;
    }
    Some(sum)
}

/// ln K (dimensionless, standard state) of a stated K value, converting Kc
/// and Kp with the reaction's Δn.
pub fn ln_k_of(lib: &Library, r: &Reaction, k: &crate::model::KValue) -> Option<f64> {
    let ln = k.ln_si?;
    let dn_gas = ratio_f64(&delta_n_gas(lib, r));
    let dn_aq = ratio_f64(&delta_n_aq(lib, r));
    Some(match k.form {
        crate::model::KForm::Kc => {
            crate::thermo::standard_state::ln_k_from_kc(ln, dn_gas, dn_aq, k.at_k)
        }
        crate::model::KForm::Kp => crate::thermo::standard_state::ln_k_from_kp(ln, dn_gas, dn_aq),
        _ => ln,
    })
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

/// Where a K at some temperature came from.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum KBasis {
    /// A K stated at that temperature.
    Stated,
    /// Carried from a stated K (or ΔrG°) by van 't Hoff with ΔrH°.
    VantHoff,
    /// ΔrG° = -RT ln K at 298.15 K from formation data.
    Formation,
}

/// ln K of a reversible reaction at `t` (K), from what the library states:
/// a K at that temperature, else the first K (or stated ΔrG°, or ΔrG° from
/// formation data) carried with ΔrH° under constant ΔH.
pub fn ln_k_at(lib: &Library, r: &Reaction, t: f64) -> Option<(f64, KBasis)> {
    if !r.reversible() || !r.complete || !t.is_finite() || t <= 0.0 {
        return None;
    }
    let close = |a: f64| (a - t).abs() < 1e-6;
    if let Some(ln) =
        r.k.iter()
            .filter(|k| close(k.at_k))
            .find_map(|k| ln_k_of(lib, r, k))
    {
        return Some((ln, KBasis::Stated));
    }
    let standard = crate::units::constants::STANDARD_TEMPERATURE;
    let (ln0, t0, basis) = if let Some((k, ln)) =
        r.k.iter()
            .find_map(|k| ln_k_of(lib, r, k).map(|ln| (k, ln)))
    {
        (ln, k.at_k, KBasis::VantHoff)
    } else if let Some(dg) = r.dg.first() {
        (
            crate::thermo::gibbs::ln_k_from_dg(dg.value, dg.at_k),
            dg.at_k,
            KBasis::VantHoff,
        )
    } else {
        let dg = reaction_from_formation(lib, r, Formation::Gibbs)?;
        (
            crate::thermo::gibbs::ln_k_from_dg(dg, standard),
            standard,
            KBasis::Formation,
        )
    };
    if (t0 - t).abs() < 1e-6 {
        return Some((ln0, basis));
    }
    let dh =
        r.dh.first()
            .map(|d| d.value)
            .or_else(|| reaction_from_formation(lib, r, Formation::Enthalpy))?;
    Some((
        crate::thermo::temperature::ln_k_at(ln0, t0, dh, t),
        KBasis::VantHoff,
    ))
}
