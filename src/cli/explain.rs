//! `stoik explain RULE`: the documentation of a rule.

use super::{EXIT_OK, EXIT_USAGE};
use crate::rules::{RULES, lookup, suggest};

pub fn run(rule: Option<&str>) -> i32 {
    let Some(id) = rule else {
        for r in RULES {
            outln!(
                "{:<20} {:<8} {}",
                r.id,
                r.default_severity.as_str(),
                r.summary
            );
        }
        return EXIT_OK;
    };
    match lookup(id) {
        Some(r) => {
            outln!(
                "{} ({} by default): {}\n",
                r.id,
                r.default_severity.as_str(),
                r.summary
            );
            super::emit(&format!("{}\n", r.doc));
            EXIT_OK
        }
        None => {
            let hint = suggest(id)
                .map(|s| format!("; did you mean `{s}`?"))
                .unwrap_or_else(|| "; `stoik explain` lists them".into());
            eprintln!("error: there is no rule `{id}`{hint}");
            EXIT_USAGE
        }
    }
}
