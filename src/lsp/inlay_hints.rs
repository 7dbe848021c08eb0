//! Inlay hints: what the data imply, written beside the lines that state
//! it.
//!
//! After each equation: Δn(gas) and the K expression, then K at each
//! mixture temperature of the library where it can be computed. After each
//! K line given as Kc, Kp, logK or pK: the dimensionless K it means. After
//! each species line of a mixture: its equilibrium amount. The numbers are
//! those of `stoik report` and `stoik solve` ([`crate::report`],
//! [`crate::solve`]).
//! Only the statements inside the requested range are visited, so hints
//! for a screenful of a large file cost a screenful of work.

use super::chemistry;
use super::snapshot::Snapshot;
use crate::model::KForm;
use crate::reaction_k::ReactionK;
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
    let ws = snap.workspace();
    let temps = super::hover::mixture_temperatures(lib);
    // Reactions are in file order within each file; find the first one
    // that can reach the range.
    let start = lib.reactions.partition_point(|r| {
        r.statement_loc.file != snap.file || r.statement_loc.span.end() < span.start()
    });
    let mut out = Vec::new();
    for r in lib.reactions[start..]
        .iter()
        .filter(|r| r.statement_loc.file == snap.file)
    {
        if r.statement_loc.span.start() > span.end() {
            break;
        }
        if r.statement_loc.span.end() < span.start() || !r.reversible() || !r.complete {
            continue;
        }
        let at = text.position(r.equation_loc.span.end());
        out.push(hint(
            at,
            format!(
                "Δn(gas) = {}; {}",
                chemistry::delta_n_gas_text(lib, r),
                chemistry::k_expression(lib, r)
            ),
            Some("species of activity 1 (pure solids and liquids, hv, M, e-) are left out".into()),
        ));
        let rk = ReactionK::of(lib, r);
        for t in &temps {
            if rk.stated.iter().any(|p| (p.t - t).abs() < 1e-9) {
                continue;
            }
            let row = crate::report::row(ws, lib, r, Some(*t));
            if let (Some(k), Some(src)) = (row.k, row.source) {
                out.push(hint(
                    at,
                    format!("K({} K) = {}", chemistry::number(*t), chemistry::number(k)),
                    Some(format!("at a mixture temperature, from {src}")),
                ));
            }
        }
        for p in &rk.stated {
            let Some(k) = p.k_index.and_then(|i| r.k.get(i)) else {
                continue;
            };
            if k.form == KForm::K
                || k.loc.span.end() < span.start()
                || k.loc.span.start() > span.end()
            {
                continue;
            }
            out.push(hint(
                text.position(k.loc.span.end()),
                format!(
                    "K({} K) = {}",
                    chemistry::number(p.t),
                    chemistry::number(p.ln_k.exp())
                ),
                Some(format!("the dimensionless K this {} means", k.form.name())),
            ));
        }
    }
    mixture_hints(snap, lib, span, &mut out, encoding);
    out
}

/// The equilibrium amount beside each species line of the mixtures in the
/// range, or why the mixture has none.
fn mixture_hints(
    snap: &Snapshot,
    lib: &crate::model::Library,
    span: crate::span::Span,
    out: &mut Vec<lsp::InlayHint>,
    encoding: Encoding,
) {
    let text = snap.text(encoding);
    let ws = snap.workspace();
    let statements = &snap.source().syntax.statements;
    for m in lib.mixtures.iter().filter(|m| m.loc.file == snap.file) {
        if m.loc.span.end() < span.start() || m.loc.span.start() > span.end() {
            continue;
        }
        let Some(result) = crate::solve::solve_mixture(ws, lib, m) else {
            continue;
        };
        let Some(statement) = statements
            .iter()
            .find(|s| s.span.start() == m.loc.span.start())
        else {
            continue;
        };
        if !result.converged {
            let why = result
                .why
                .clone()
                .unwrap_or_else(|| "the solver did not converge".into());
            out.push(hint(
                text.position(statement.keyword.end()),
                format!("no equilibrium: {why}"),
                None,
            ));
            continue;
        }
        for entry in &m.entries {
            let Some(s) = result.species.iter().find(|s| s.name == entry.name) else {
                continue;
            };
            let Some(attr) = statement
                .attributes
                .iter()
                .find(|a| a.name.span == entry.name_loc.span)
            else {
                continue;
            };
            out.push(hint(
                text.position(attr.span.end()),
                format!("⇌ {} {}", chemistry::number(s.equilibrium), s.unit),
                Some(format!(
                    "equilibrium at {} K",
                    chemistry::number(result.temperature_k)
                )),
            ));
        }
    }
}
