//! `stoik explain` through the real binary: every rule of the catalogue has
//! its documentation, and a misspelt id gets a suggestion.

use std::process::{Command, Output};

fn explain(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_stoik"))
        .arg("explain")
        .args(args)
        .output()
        .expect("the binary runs")
}

/// The rule ids that DESIGN.md fixes as a stable interface.
const DESIGNED: &[&str] = &[
    "syntax",
    "unknown-element",
    "unknown-species",
    "unknown-attribute",
    "element-balance",
    "charge-balance",
    "third-body",
    "resonance-arrow",
    "unit-mismatch",
    "missing-unit",
    "rate-units",
    "lowercase-k",
    "k-reverse-mismatch",
    "k-scale-mismatch",
    "k-thermo-mismatch",
    "detailed-balance",
    "cycle-inconsistent",
    "vant-hoff-mismatch",
    "k-temperature",
    "duplicate-reaction",
    "use-error",
    "unused-suppression",
];

#[test]
fn every_rule_prints_its_documentation() {
    for rule in stoik::rules::RULES {
        let o = explain(&[rule.id]);
        assert_eq!(o.status.code(), Some(0), "{}", rule.id);
        let text = String::from_utf8(o.stdout).expect("UTF-8");
        assert!(
            text.starts_with(&format!("{} (", rule.id)),
            "{}: {text}",
            rule.id
        );
        assert!(text.contains(rule.summary), "{}", rule.id);
        assert!(text.contains(rule.doc), "{}", rule.id);
        for part in ["What it finds", "Why it matters", "Fix"] {
            assert!(text.contains(part), "{} lacks `{part}`", rule.id);
        }
    }
}

#[test]
fn the_catalogue_holds_every_designed_rule() {
    for id in DESIGNED {
        assert!(stoik::rules::lookup(id).is_some(), "{id} is missing");
        let o = explain(&[id]);
        assert_eq!(o.status.code(), Some(0), "{id}");
    }
}

#[test]
fn no_argument_lists_every_rule() {
    let o = explain(&[]);
    assert_eq!(o.status.code(), Some(0));
    let text = String::from_utf8(o.stdout).expect("UTF-8");
    for rule in stoik::rules::RULES {
        assert!(
            text.lines().any(|l| l.starts_with(rule.id)),
            "{} not listed",
            rule.id
        );
    }
}

#[test]
fn an_unknown_rule_exits_2_with_a_suggestion() {
    let o = explain(&["element-balanse"]);
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(err.contains("did you mean `element-balance`?"), "{err}");
    let far = explain(&["photosynthesis"]);
    assert_eq!(far.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&far.stderr).contains("no rule `photosynthesis`"));
}
