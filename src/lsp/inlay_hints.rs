//! Inlay hints: what the data imply, written beside the lines that state
//! it.
//!
//! After each equation: Δn(gas) and the K expression, then K at each
//! mixture temperature of the library where it can be computed. After each
//! K line given as Kc, Kp, logK or pK: the dimensionless K it means.
//! Only the statements inside the requested range are visited, so hints
//! for a screenful of a large file cost a screenful of work.

use super::chemistry::{self, KBasis};
use super::snapshot::Snapshot;
use crate::model::KForm;
use crate::syntax::line_index::Encoding;
use tower_lsp_server::ls_types as lsp;

fn hint(position: lsp::Position, label: String, tooltip: Option<String>) -> lsp::InlayHint {
    lsp::InlayHint {
        position,
        label: lsp::InlayHintLabel::String(label),
        kind: None,
        text_edits: None,
        tooltip: tooltip.map(lsp::InlayHintTooltip::String),
        padding_left: Some(true),
        padding_right: None,
        data: None,
    }
}

/// The hints of the document within `range`.
pub fn inlay_hints(snap: &Snapshot, range: lsp::Range, encoding: Encoding) -> Vec<lsp::InlayHint> {
    let text = snap.text(encoding);
    let span = text.span(range);
    let Some(lib) = snap.library().map(|l| &l.library) else {
        return Vec::new();
    };
    let mut temps: Vec<f64> = lib
        .mixtures
        .iter()
        .filter_map(|m| m.temperature_k)
        .collect();
    temps.sort_by(f64::total_cmp);
    temps.dedup();
    // Reactions are in file order within each file; find the first one
    // that can reach the range.
    let start = lib.reactions.partition_point(|r| {
        r.statement_loc.file != snap.file || r.statement_loc.span.end < span.start
    });
    let mut out = Vec::new();
    for r in lib.reactions[start..]
        .iter()
        .filter(|r| r.statement_loc.file == snap.file)
    {
        if r.statement_loc.span.start > span.end {
            break;
        }
        if r.statement_loc.span.end < span.start || !r.reversible() || !r.complete {
            continue;
        }
        let at = text.position(r.equation_loc.span.end);
        let dn = chemistry::ratio_text(&chemistry::delta_n_gas(lib, r));
        out.push(hint(
            at,
            format!("Δn(gas) = {dn}; {}", chemistry::k_expression(lib, r)),
            Some("species of activity 1 (pure solids and liquids, hv, M, e-) are left out".into()),
        ));
        for t in &temps {
            if let Some((ln, basis)) = chemistry::ln_k_at(lib, r, *t)
                && basis != KBasis::Stated
            {
                out.push(hint(
                    at,
                    format!(
                        "K({} K) = {}",
                        chemistry::number(*t),
                        chemistry::number(ln.exp())
                    ),
                    Some("at a mixture temperature, with constant ΔrH° (van 't Hoff)".into()),
                ));
            }
        }
        for k in &r.k {
            if k.form == KForm::K || k.loc.span.end < span.start || k.loc.span.start > span.end {
                continue;
            }
            if let Some(ln) = chemistry::ln_k_of(lib, r, k) {
                out.push(hint(
                    text.position(k.loc.span.end),
                    format!(
                        "K({} K) = {}",
                        chemistry::number(k.at_k),
                        chemistry::number(ln.exp())
                    ),
                    Some(format!("the dimensionless K this {} means", k.form.name())),
                ));
            }
        }
    }
    out
}
