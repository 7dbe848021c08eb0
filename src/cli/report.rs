//! `stoik report FILE`: per reaction Δn(gas), K, Kc, Kp, ΔrG° and ΔrH°.

use super::{DataFormat, EXIT_OK, EXIT_USAGE};
use crate::checks::{number, temperature};
use crate::report::{CAUTION, ReactionRow, rows_of_file};
use std::path::Path;

pub fn run(file: &Path, temperature_arg: Option<&str>, format: DataFormat) -> i32 {
    let t = match temperature_arg.map(parse_temperature) {
        None => None,
        Some(Ok(t)) => Some(t),
        Some(Err(e)) => {
            eprintln!("error: --temperature: {e}");
            return EXIT_USAGE;
        }
    };
    let Some((analysis, id)) = super::load_one(file) else {
        return EXIT_USAGE;
    };
    let ws = &analysis.workspace;
    let rows = match analysis.library_of(id) {
        Some(lib) => rows_of_file(ws, &lib.library, id, t),
        None => Vec::new(),
    };
    match format {
        DataFormat::Json => {
            let value = serde_json::json!({ "reactions": rows, "caution": CAUTION });
            super::emit(&format!(
                "{}\n",
                serde_json::to_string_pretty(&value).unwrap_or_default()
            ));
        }
        DataFormat::Human => super::emit(&table(&rows)),
    }
    EXIT_OK
}

/// Parse `700`, `700 K`, `700K`, `25 degC`, `25 °C`.
pub fn parse_temperature(text: &str) -> Result<f64, String> {
    let text = text.trim();
    let n = crate::syntax::value::number_prefix(text);
    if n == 0 {
        return Err(format!(
            "`{text}` is not a temperature; write for example `700 K` or `25 degC`"
        ));
    }
    let value: f64 = text[..n]
        .parse()
        .map_err(|_| format!("`{text}` is not a number"))?;
    let unit = text[n..].trim();
    let kelvin = if unit.is_empty() {
        value
    } else {
        let u = crate::units::parse_unit(unit).map_err(|e| e.message)?;
        if u.dim != crate::units::Dimension::TEMPERATURE {
            return Err(format!("`{unit}` is not a temperature unit"));
        }
        u.to_si(value)
    };
    if !(kelvin.is_finite() && kelvin > 0.0) {
        return Err(format!("{text} is at or below absolute zero"));
    }
    Ok(kelvin)
}

fn opt(x: Option<f64>) -> String {
    x.map(number).unwrap_or_else(|| "-".into())
}

fn table(rows: &[ReactionRow]) -> String {
    let mut lines: Vec<[String; 10]> = vec![[
        "reaction".into(),
        "equation".into(),
        "Δn(gas)".into(),
        "T/K".into(),
        "K".into(),
        "Kc".into(),
        "Kp".into(),
        "ΔrG° kJ/mol".into(),
        "ΔrH° kJ/mol".into(),
        "from".into(),
    ]];
    for r in rows {
        let k = match (r.k, r.log10_k) {
            (Some(k), _) => number(k),
            (None, Some(l)) => format!("1e{}", number(l)),
            _ => "-".into(),
        };
        lines.push([
            r.label
                .clone()
                .unwrap_or_else(|| format!("line {}", r.line)),
            r.equation.clone(),
            number(r.delta_n_gas),
            temperature(r.temperature_k),
            k,
            match (&r.kc, &r.kc_unit) {
                (Some(v), Some(u)) if u != "1" => format!("{} {u}", number(*v)),
                (v, _) => opt(*v),
            },
            match (&r.kp, &r.kp_unit) {
                (Some(v), Some(u)) if u != "1" => format!("{} {u}", number(*v)),
                (v, _) => opt(*v),
            },
            opt(r.dg_kj_per_mol),
            opt(r.dh_kj_per_mol),
            r.source
                .clone()
                .or_else(|| r.note.clone())
                .unwrap_or_default(),
        ]);
    }
    let mut widths = [0usize; 10];
    for l in &lines {
        for (i, c) in l.iter().enumerate() {
            widths[i] = widths[i].max(c.chars().count());
        }
    }
    let mut out = String::new();
    for l in &lines {
        let mut line = String::new();
        for (i, c) in l.iter().enumerate() {
            line.push_str(c);
            if i + 1 < l.len() {
                line.push_str(&" ".repeat(widths[i] - c.chars().count() + 2));
            }
        }
        out.push_str(line.trim_end());
        out.push('\n');
    }
    out.push_str(&format!("\nCaution: {CAUTION}.\n"));
    out
}
