//! Per-reaction results: Δn(gas), K, Kc, Kp, ΔrG° and ΔrH° at a temperature,
//! and which data they came from. `stoik report` prints these rows and the
//! language server shows them as hover text and inlay hints.

use crate::model::{Library, Reaction};
use crate::reaction_k::{Estimate, ReactionK, Unknown};
use crate::thermo::{ln_kc_molar_from_ln_k, ln_kp_bar_from_ln_k};
use crate::units::constants::{GAS_CONSTANT, STANDARD_TEMPERATURE};
use crate::workspace::Workspace;
use serde::Serialize;

/// The caution every computed result carries.
pub const CAUTION: &str = "ideal-gas and ideal-solution estimates from the data in the file; verify against validated data before any design use, and defer to local codes and licensed engineering review";

/// One reaction at one temperature.
#[derive(Clone, Debug, Serialize)]
pub struct ReactionRow {
    pub label: Option<String>,
    /// 1-based line of the reaction statement.
    pub line: usize,
    pub equation: String,
    pub delta_n_gas: f64,
    #[serde(rename = "temperature_K")]
    pub temperature_k: f64,
    #[serde(rename = "K")]
    pub k: Option<f64>,
    /// log10 K, given also when K itself would overflow.
    #[serde(rename = "log10_K")]
    pub log10_k: Option<f64>,
    #[serde(rename = "Kc")]
    pub kc: Option<f64>,
    /// The unit of Kc: (mol/L)^Δn.
    #[serde(rename = "Kc_unit")]
    pub kc_unit: Option<String>,
    #[serde(rename = "Kp")]
    pub kp: Option<f64>,
    #[serde(rename = "Kp_unit")]
    pub kp_unit: Option<String>,
    #[serde(rename = "dG_kJ_per_mol")]
    pub dg_kj_per_mol: Option<f64>,
    #[serde(rename = "dH_kJ_per_mol")]
    pub dh_kj_per_mol: Option<f64>,
    /// Where K came from (`K`, `dG`, `species dGf`, ...), and whether it
    /// was carried from another temperature.
    pub source: Option<String>,
    /// Why K is not given, when it is not.
    pub note: Option<String>,
}

fn finite(x: f64) -> Option<f64> {
    x.is_finite().then_some(x)
}

fn power_unit(base: &str, n: f64) -> String {
    if n == 0.0 {
        "1".into()
    } else if n == 1.0 {
        base.into()
    } else {
        format!("{base}^{n}")
    }
}

/// The temperature a reaction is reported at when none is asked for: its
/// first stated temperature, else 298.15 K.
pub fn natural_temperature(k: &ReactionK) -> f64 {
    k.stated
        .first()
        .or(k.gibbs.first())
        .map(|p| p.t)
        .unwrap_or(STANDARD_TEMPERATURE)
}

/// The row of one reaction; `t` overrides its natural temperature.
pub fn row(ws: &Workspace, lib: &Library, r: &Reaction, t: Option<f64>) -> ReactionRow {
    let file = ws.file(r.loc.file);
    let line = file.index.line_of(r.loc.span.start()) + 1;
    let equation = file.text[r.equation_loc.span.range()].to_string();
    let k = ReactionK::of(lib, r);
    let t = t.unwrap_or_else(|| natural_temperature(&k));
    let mut row = ReactionRow {
        label: r.label.clone(),
        line,
        equation,
        delta_n_gas: k.dn_gas,
        temperature_k: t,
        k: None,
        log10_k: None,
        kc: None,
        kc_unit: None,
        kp: None,
        kp_unit: None,
        dg_kj_per_mol: None,
        dh_kj_per_mol: k.dh_at(t).map(|h| h / 1000.0),
        source: None,
        note: None,
    };
    if !r.complete || !r.balanced {
        row.note = Some("not computed: the equation does not read or does not balance".into());
        return row;
    }
    if !r.reversible() {
        row.note = Some("forward-only reaction: no equilibrium constant".into());
        return row;
    }
    match k.ln_k_at(t) {
        Ok(Estimate {
            ln_k,
            origin,
            carried,
        }) => {
            row.k = finite(ln_k.exp()).filter(|v| *v > 0.0);
            row.log10_k = finite(ln_k / std::f64::consts::LN_10);
            row.dg_kj_per_mol = finite(-GAS_CONSTANT * t * ln_k / 1000.0);
            let involved_gas =
                k.dn_gas != 0.0 || has_phase(lib, r, crate::reaction_k::Standard::Gas);
            let involved_aq =
                k.dn_aq != 0.0 || has_phase(lib, r, crate::reaction_k::Standard::Solute);
            if involved_gas || involved_aq {
                row.kc = finite(ln_kc_molar_from_ln_k(ln_k, k.dn_gas, k.dn_aq, t).exp())
                    .filter(|v| *v > 0.0);
                row.kc_unit = Some(power_unit("(mol/L)", k.dn_gas + k.dn_aq));
            }
            if involved_gas {
                row.kp =
                    finite(ln_kp_bar_from_ln_k(ln_k, k.dn_gas, k.dn_aq).exp()).filter(|v| *v > 0.0);
                let mut unit = power_unit("bar", k.dn_gas);
                if k.dn_aq != 0.0 {
                    unit = format!("{unit}·{}", power_unit("(mol/L)", k.dn_aq));
                }
                row.kp_unit = Some(unit);
            }
            row.source = Some(if carried {
                format!(
                    "{}, carried to {} K by van 't Hoff",
                    origin.describe(),
                    crate::checks::temperature(t)
                )
            } else {
                origin.describe().to_string()
            });
        }
        Err(Unknown::NoData) => {
            row.note = Some("no K, dG, species data or kf/kr for this reaction".into())
        }
        Err(Unknown::NoTemperatureDependence { known_t }) => {
            row.note = Some(format!(
                "K is known only at {} K; add dH (or species dHf) to carry it",
                crate::checks::temperature(known_t)
            ))
        }
    }
    row
}

fn has_phase(lib: &Library, r: &Reaction, s: crate::reaction_k::Standard) -> bool {
    r.terms
        .iter()
        .any(|t| crate::reaction_k::standard_of(lib, t.species) == s)
}

/// Rows of every reaction of the library that lies in `file`.
pub fn rows_of_file(
    ws: &Workspace,
    lib: &Library,
    file: crate::span::FileId,
    t: Option<f64>,
) -> Vec<ReactionRow> {
    lib.reactions
        .iter()
        .filter(|r| r.loc.file == file)
        .map(|r| row(ws, lib, r, t))
        .collect()
}
