//! Hover: what stoik read at the cursor.
//!
//! On a species: its composition, molar mass, charge, phase, data and
//! source. On a reaction: its K expression, Δn(gas), the stated K values
//! and ΔrG°, ΔrH° (stated or from formation data). On a unit: its SI
//! factor and dimension. On a finding: its rule and what the rule checks.

use super::chemistry;
use super::navigation::{Item, item_at, statement_at};
use super::snapshot::Snapshot;
use crate::chem::formula::{Phase, SpeciesKind, parse_formula};
use crate::model::{Library, Reaction, Species, SpeciesId};
use crate::reaction_k::ReactionK;
use crate::syntax::ast::{Name, Statement};
use crate::syntax::line_index::Encoding;
use tower_lsp_server::ls_types as lsp;

/// The hover text at `p`, or none when there is nothing to say.
pub fn hover(snap: &Snapshot, p: lsp::Position, encoding: Encoding) -> Option<lsp::Hover> {
    let text = snap.text(encoding);
    let offset = text.offset(p);
    let mut parts: Vec<String> = Vec::new();
    let mut range = None;
    if let Some(item) = item_at(snap, offset) {
        let lib = snap.library().map(|l| &l.library);
        match item {
            Item::Species(name) => {
                range = Some(text.range(name.span));
                if let Some(lib) = lib
                    && let Some(id) = resolve(lib, name)
                {
                    parts.push(species_text(lib, lib.species(id)));
                } else if let Ok(f) = parse_formula(&name.text) {
                    parts.push(format!("**{}**\n\n{}", name.text, formula_lines(&f)));
                }
            }
            Item::Reaction(s) => {
                if let Some(lib) = lib
                    && let Some(r) = reaction_of(snap, lib, s)
                {
                    parts.push(reaction_text(snap, lib, r));
                }
            }
            Item::Unit(name) => {
                range = Some(text.range(name.span));
                parts.push(unit_text(&name.text));
            }
            Item::Attribute(s, name) => {
                range = Some(text.range(name.span));
                if let Some(t) = attribute_text(s, &name.text) {
                    parts.push(t);
                }
            }
        }
    }
    let had_item = !parts.is_empty();
    for d in snap
        .analysis
        .diagnostics
        .iter()
        .filter(|d| d.file == snap.file && d.span.start() <= offset && offset <= d.span.end())
    {
        if let Some(rule) = crate::rules::lookup(d.rule) {
            // Beside another item the rule gets one line; alone, its doc.
            let mut t = format!(
                "**{}** ({}): {}",
                rule.id,
                d.severity.as_str(),
                rule.summary
            );
            if had_item {
                t.push_str(&format!(" (`stoik explain {}`)", rule.id));
            } else {
                t.push_str("\n\n");
                t.push_str(rule.doc);
            }
            parts.push(t);
        }
    }
    if parts.is_empty() {
        return None;
    }
    Some(lsp::Hover {
        contents: lsp::HoverContents::Markup(lsp::MarkupContent {
            kind: lsp::MarkupKind::Markdown,
            value: parts.join("\n\n---\n\n"),
        }),
        range,
    })
}

/// The library species a name as written stands for.
pub fn resolve(lib: &Library, name: &Name) -> Option<SpeciesId> {
    if let Some(i) = lib
        .species
        .iter()
        .position(|s| s.alias.as_deref() == Some(name.text.as_str()))
    {
        return Some(SpeciesId(i as u32));
    }
    let f = parse_formula(&name.text).ok()?;
    lib.species
        .iter()
        .position(|s| {
            s.formula.kind == f.kind
                && s.formula.composition == f.composition
                && s.formula.charge == f.charge
                && s.formula.phase == f.phase
        })
        .map(|i| SpeciesId(i as u32))
}

/// The reaction a statement lowered to.
pub fn reaction_of<'l>(snap: &Snapshot, lib: &'l Library, s: &Statement) -> Option<&'l Reaction> {
    lib.reactions.iter().find(|r| {
        r.statement_loc.file == snap.file && r.statement_loc.span.start() == s.span.start()
    })
}

fn phase_name(p: Option<Phase>) -> &'static str {
    match p {
        Some(Phase::Gas) => "gas",
        Some(Phase::Liquid) => "pure liquid (activity 1)",
        Some(Phase::Solid) => "pure solid (activity 1)",
        Some(Phase::Aqueous) => "aqueous solute",
        None => "not stated",
    }
}

fn formula_lines(f: &crate::chem::formula::Formula) -> String {
    let mut lines = Vec::new();
    match f.kind {
        SpeciesKind::Electron => lines.push("electron: charge 1-, no elements".to_string()),
        SpeciesKind::ThirdBody => {
            lines.push("third body: any collision partner, outside the element balance".to_string())
        }
        SpeciesKind::Photon => {
            lines.push("photon: no elements, no charge, not part of K".to_string())
        }
        SpeciesKind::Compound => {
            // Hill order: carbon, hydrogen, then the rest alphabetically
            // (alphabetically throughout without carbon).
            let mut parts: Vec<(&str, String)> = f
                .composition
                .iter()
                .map(|(z, n)| {
                    let sym = crate::chem::elements::by_z(*z).map_or("?", |e| e.symbol);
                    (sym, chemistry::ratio_text(n))
                })
                .collect();
            let carbon = parts.iter().any(|(s, _)| *s == "C");
            parts.sort_by_key(|(s, _)| match (carbon, *s) {
                (true, "C") => (0, *s),
                (true, "H") => (1, *s),
                _ => (2, *s),
            });
            let comp: Vec<String> = parts.iter().map(|(s, n)| format!("{s} {n}")).collect();
            lines.push(format!(
                "composition: {} (Hill: `{}`)",
                comp.join(", "),
                f.hill()
            ));
            lines.push(format!("molar mass: {:.3} g/mol", f.molar_mass()));
        }
    }
    lines.push(format!(
        "charge: {}",
        if f.charge == 0 {
            "0".to_string()
        } else {
            crate::chem::formula::charge_text(f.charge)
        }
    ));
    lines.push(format!("phase: {}", phase_name(f.phase)));
    if let Some(note) = &f.reading_note {
        lines.push(format!("note: {note}"));
    }
    lines.join("  \n")
}

fn kj(x: f64) -> String {
    format!("{} kJ/mol", chemistry::number(x / 1000.0))
}

/// The hover text of a species.
pub fn species_text(_lib: &Library, s: &Species) -> String {
    let mut out = format!("**{}**", s.name);
    if s.alias.is_some() {
        out.push_str(&format!(" = `{}`", s.formula.hill()));
    }
    out.push_str("\n\n");
    out.push_str(&formula_lines(&s.formula));
    let d = s.data();
    let mut data = Vec::new();
    if let Some(x) = d.dhf {
        data.push(format!("ΔfH° = {}", kj(x.value)));
    }
    if let Some(x) = d.dgf {
        data.push(format!("ΔfG° = {}", kj(x.value)));
    }
    if let Some(x) = d.s {
        data.push(format!("S° = {} J/(mol·K)", chemistry::number(x.value)));
    }
    if let Some(x) = d.cp {
        data.push(format!("Cp° = {} J/(mol·K)", chemistry::number(x.value)));
    }
    if !data.is_empty() {
        out.push_str("  \n");
        out.push_str(&data.join(", "));
        out.push_str(" (298.15 K)");
    }
    if let Some(src) = &d.source {
        out.push_str(&format!("  \nsource: {src}"));
    }
    out
}

/// The temperatures of the library's mixtures, sorted, each once.
pub fn mixture_temperatures(lib: &Library) -> Vec<f64> {
    let mut temps: Vec<f64> = lib
        .mixtures
        .iter()
        .filter_map(|m| m.temperature_k)
        .collect();
    temps.sort_by(f64::total_cmp);
    temps.dedup();
    temps
}

/// The hover text of a reaction.
pub fn reaction_text(snap: &Snapshot, lib: &Library, r: &Reaction) -> String {
    let ws = snap.workspace();
    let eq = &ws.file(r.equation_loc.file).text[r.equation_loc.span.range()];
    let mut out = match &r.label {
        Some(l) => format!("**reaction {l}**: `{eq}`"),
        None => format!("**reaction**: `{eq}`"),
    };
    if !r.reversible() {
        out.push_str("\n\nforward only: no equilibrium constant");
        return out;
    }
    let mut lines = vec![
        format!("`{}`", chemistry::k_expression(lib, r)),
        format!("Δn(gas) = {}", chemistry::delta_n_gas_text(lib, r)),
    ];
    let rk = ReactionK::of(lib, r);
    for p in &rk.stated {
        let Some(k) = p.k_index.and_then(|i| r.k.get(i)) else {
            continue;
        };
        let mut line = format!(
            "{} = {} at {} K",
            k.form.name(),
            chemistry::number(k.number),
            chemistry::number(k.at_k)
        );
        if k.form != crate::model::KForm::K {
            line.push_str(&format!(" (K = {})", chemistry::number(p.ln_k.exp())));
        }
        lines.push(line);
    }
    let row = crate::report::row(ws, lib, r, None);
    let at = chemistry::number(row.temperature_k);
    if let Some(dg) = row.dg_kj_per_mol {
        lines.push(format!("ΔrG° = {} kJ/mol at {at} K", chemistry::number(dg)));
    }
    if let Some(dh) = row.dh_kj_per_mol {
        lines.push(format!("ΔrH° = {} kJ/mol at {at} K", chemistry::number(dh)));
    }
    if let (Some(k), Some(src)) = (row.k, &row.source) {
        lines.push(format!("K({at} K) = {} (from {src})", chemistry::number(k)));
    }
    for t in mixture_temperatures(lib) {
        let row = crate::report::row(ws, lib, r, Some(t));
        match (row.k, &row.source, &row.note) {
            (Some(k), Some(src), _) => lines.push(format!(
                "K({} K) = {} (from {src})",
                chemistry::number(t),
                chemistry::number(k)
            )),
            (_, _, Some(note)) => lines.push(format!("K({} K): {note}", chemistry::number(t))),
            _ => {}
        }
    }
    if let Some(note) = &row.note {
        lines.push(note.clone());
    }
    out.push_str("\n\n");
    out.push_str(&lines.join("  \n"));
    out
}

/// SI base units with exponents: `kg·m^2·s^-2·mol^-1`.
pub fn si_text(dim: crate::units::Dimension) -> String {
    let names = ["kg", "m", "s", "mol", "K"];
    let parts: Vec<String> = dim
        .exponents()
        .iter()
        .zip(names)
        .filter(|(e, _)| **e != 0)
        .map(|(e, n)| {
            if *e == 1 {
                n.to_string()
            } else {
                format!("{n}^{e}")
            }
        })
        .collect();
    if parts.is_empty() {
        "1 (dimensionless)".to_string()
    } else {
        parts.join("·")
    }
}

/// The hover text of a unit expression.
pub fn unit_text(text: &str) -> String {
    match crate::units::parse::parse_unit(text) {
        Ok(u) => {
            let mut out = format!(
                "**{text}** = {} {} ({})",
                chemistry::number(u.factor),
                si_text(u.dim),
                u.dim.spell()
            );
            if u.offset != 0.0 {
                out.push_str(&format!(
                    "  \na temperature scale: x {text} = x + {} K",
                    chemistry::number(u.offset)
                ));
            }
            out
        }
        Err(e) => format!("**{text}**: not a unit stoik knows ({})", e.message),
    }
}

fn attribute_text(s: &Statement, name: &str) -> Option<String> {
    let what = match name {
        "K" => {
            "thermodynamic equilibrium constant (dimensionless, activities against the standard state)"
        }
        "Kc" => "concentration-based equilibrium constant, unit concentration^Δn",
        "Kp" => "pressure-based equilibrium constant, unit pressure^Δn(gas)",
        "logK" => "log10 K",
        "pK" => "-log10 K",
        "dG" => "standard reaction Gibbs energy",
        "dH" => "standard reaction enthalpy",
        "dS" => "standard reaction entropy",
        "kf" | "k" => "forward rate constant (a number or arrhenius(A = .., n = .., Ea = ..))",
        "kr" => "reverse rate constant",
        "dHf" => "standard enthalpy of formation at 298.15 K",
        "dGf" => "standard Gibbs energy of formation at 298.15 K",
        "S" => "standard molar entropy at 298.15 K",
        "Cp" => "standard molar heat capacity, taken as constant",
        "source" => "where the data comes from",
        "temperature" => "the mixture's temperature",
        "pressure" => "total pressure of a constant-pressure gas mixture",
        "volume" => "volume, for a mixture given in amounts",
        "activity" => "activity model: `ideal` or `davies`",
        _ => return None,
    };
    let _ = s;
    Some(format!("**{name}**: {what}"))
}

/// The statement at an offset of the document (re-exported for features).
pub fn statement(snap: &Snapshot, offset: usize) -> Option<&Statement> {
    statement_at(&snap.source().syntax.statements, offset)
}
