//! `stoik solve FILE`: the equilibrium composition of each mixture.

use super::{DataFormat, EXIT_FINDINGS, EXIT_OK, EXIT_USAGE};
use crate::checks::{number, temperature};
use crate::report::CAUTION;
use crate::solve::{MixtureResult, solve_mixture};
use std::fmt::Write as _;
use std::path::Path;

pub fn run(file: &Path, only: Option<&str>, format: DataFormat) -> i32 {
    let Some((analysis, id)) = super::load_one(file) else {
        return EXIT_USAGE;
    };
    let ws = &analysis.workspace;
    let Some(lib) = analysis.library_of(id) else {
        return EXIT_USAGE;
    };
    let lib = &lib.library;
    let mixtures: Vec<_> = lib
        .mixtures
        .iter()
        .filter(|m| m.loc.file == id && only.is_none_or(|n| n == m.name))
        .collect();
    if let Some(name) = only
        && mixtures.is_empty()
    {
        let names: Vec<&str> = lib.mixtures.iter().map(|m| m.name.as_str()).collect();
        eprintln!(
            "error: no mixture `{name}` in {}; it has {}",
            ws.file(id).display,
            if names.is_empty() {
                "none".to_string()
            } else {
                names.join(", ")
            }
        );
        return EXIT_USAGE;
    }
    let mut results = Vec::new();
    let mut unsolvable = Vec::new();
    for m in mixtures {
        match solve_mixture(ws, lib, m) {
            Some(r) => results.push(r),
            None => {
                let why: Vec<String> = crate::solve::mixture_diagnostics(lib, m)
                    .into_iter()
                    .map(|d| d.message)
                    .collect();
                unsolvable.push((m.name.clone(), why.join("; ")));
            }
        }
    }
    for (name, why) in &unsolvable {
        eprintln!("error: mixture `{name}` cannot be solved: {why}");
    }
    match format {
        DataFormat::Json => {
            let value = serde_json::json!({ "mixtures": results, "caution": CAUTION });
            outln!(
                "{}",
                serde_json::to_string_pretty(&value).unwrap_or_default()
            );
        }
        DataFormat::Human => {
            let mut text = String::new();
            for r in &results {
                text.push_str(&human(r));
                text.push('\n');
            }
            let _ = writeln!(text, "Caution: {CAUTION}.");
            super::emit(&text);
        }
    }
    if !unsolvable.is_empty() || results.iter().any(|r| !r.converged) {
        EXIT_FINDINGS
    } else {
        EXIT_OK
    }
}

fn human(r: &MixtureResult) -> String {
    let mut out = String::new();
    let status = if r.converged {
        "converged".to_string()
    } else {
        format!("did not converge: {}", r.why.clone().unwrap_or_default())
    };
    let _ = writeln!(
        out,
        "mixture {} at {} K: {status}",
        r.name,
        temperature(r.temperature_k)
    );
    let name_w = r
        .species
        .iter()
        .map(|s| s.name.chars().count())
        .max()
        .unwrap_or(7)
        .max(7);
    let _ = writeln!(
        out,
        "  {:<name_w$}  {:>12}  {:>12}  unit",
        "species", "initial", "equilibrium"
    );
    for s in &r.species {
        let _ = writeln!(
            out,
            "  {:<name_w$}  {:>12}  {:>12}  {}",
            s.name,
            number(s.initial),
            number(s.equilibrium),
            s.unit
        );
    }
    if !r.reactions.is_empty() {
        let _ = writeln!(out, "  reactions used:");
        for x in &r.reactions {
            let q = match x.log10_q_initial {
                Some(q) => format!("log Q(start) = {}", number(q)),
                None => "Q(start) undefined (a product or reactant absent)".to_string(),
            };
            let _ = writeln!(
                out,
                "    {}: log K = {}, {q}, moves {}, extent {} mol",
                x.label,
                number(x.log10_k),
                x.direction,
                number(x.extent)
            );
        }
    }
    for l in &r.left_out {
        let _ = writeln!(out, "  left out {}: {}", l.reaction, l.why);
    }
    if !r.vanished.is_empty() {
        let _ = writeln!(out, "  used up: {}", r.vanished.join(", "));
    }
    if let Some(ph) = r.ph {
        let _ = writeln!(out, "  pH = {}", number(ph));
    }
    if let Some(i) = r.ionic_strength {
        let _ = writeln!(out, "  ionic strength = {} mol/L", number(i));
    }
    for w in &r.warnings {
        let _ = writeln!(out, "  note: {w}");
    }
    out
}
