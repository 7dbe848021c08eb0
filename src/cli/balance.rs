//! `stoik balance 'EQUATION'`: the smallest integer coefficients, or why no
//! unique balance exists.

use super::{DataFormat, EXIT_FINDINGS, EXIT_OK, EXIT_USAGE};
use crate::chem::balance::{BalanceOutcome, balance};
use crate::chem::formula::{Formula, parse_formula};
use crate::syntax::parse_equation;
use serde_json::json;

pub fn run(equation: &str, format: DataFormat) -> i32 {
    let (eq, errors) = parse_equation(equation);
    if let Some(e) = errors.first() {
        eprintln!(
            "error: {} (at character {})",
            e.message,
            equation[..e.span.start().min(equation.len())]
                .chars()
                .count()
                + 1
        );
        if let Some(h) = &e.help {
            eprintln!("help: {h}");
        }
        return EXIT_USAGE;
    }
    let Some(eq) = eq else {
        eprintln!("error: no equation given");
        return EXIT_USAGE;
    };
    let mut formulas: Vec<Formula> = Vec::new();
    for t in eq.left.iter().chain(&eq.right) {
        match parse_formula(&t.species.text) {
            Ok(f) => formulas.push(f),
            Err(e) => {
                let mut msg = format!("error: `{}`: {}", t.species.text, e.message);
                if let Some(s) = e.suggestions.first() {
                    msg.push_str(&format!("\nhelp: did you mean `{s}`?"));
                }
                eprintln!("{msg}");
                return EXIT_USAGE;
            }
        }
    }
    let limit = crate::model::lower::MAX_BALANCE_SPECIES;
    if formulas.len() > limit {
        eprintln!(
            "error: the equation has {} species; stoik balances at most {limit}",
            formulas.len()
        );
        return EXIT_USAGE;
    }
    let refs: Vec<&Formula> = formulas.iter().collect();
    let arrow = &equation[eq.arrow.span.range()];
    let outcome = balance(&refs, eq.left.len());
    match outcome {
        BalanceOutcome::Unique(coefs) => {
            let text = crate::model::lower::balanced_text(&eq, arrow, &coefs);
            match format {
                DataFormat::Human => outln!("{text}"),
                DataFormat::Json => {
                    let numbers: Vec<serde_json::Value> = coefs
                        .iter()
                        .map(|c| match u64::try_from(c) {
                            Ok(v) => json!(v),
                            Err(_) => json!(c.to_string()),
                        })
                        .collect();
                    super::emit(&format!(
                        "{}\n",
                        json!({ "balanced": text, "coefficients": numbers, "unique": true })
                    ));
                }
            }
            EXIT_OK
        }
        BalanceOutcome::NotUnique { independent } => {
            let message = format!(
                "no unique balance: these species admit {independent} independent balances (any positive combination of them balances)"
            );
            report_failure(format, &message, Some(independent));
            EXIT_FINDINGS
        }
        BalanceOutcome::Impossible(why) => {
            let names = eq.species_names();
            let message = format!("no balance exists: {}", why.message(&names));
            report_failure(format, &message, None);
            EXIT_FINDINGS
        }
    }
}

fn report_failure(format: DataFormat, message: &str, independent: Option<usize>) {
    match format {
        DataFormat::Human => outln!("{message}"),
        DataFormat::Json => outln!(
            "{}",
            json!({
                "balanced": null,
                "coefficients": null,
                "unique": false,
                "independent_balances": independent.unwrap_or(0),
                "message": message,
            })
        ),
    }
}
