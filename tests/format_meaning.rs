//! The examples of the notation reference keep their meaning when
//! formatted: the parser reads the same statements, equations and attribute
//! values (and the same errors, for the one template that is not valid)
//! from the formatted text as from the text as written.

#[path = "format/support.rs"]
mod support;

use stoik::format::format;
use support::{comments, meaning, significant_tokens};

const NOTATION: &str = include_str!("format/notation.in.stoik");

#[test]
fn the_notation_examples_keep_their_meaning() {
    let formatted = format(NOTATION);
    let (before, before_errors) = meaning(NOTATION);
    let (after, after_errors) = meaning(&formatted);
    assert!(
        before.len() > 60,
        "the examples hold {} statements",
        before.len()
    );
    assert_eq!(before, after);
    assert_eq!(before_errors, after_errors);
    assert_eq!(significant_tokens(NOTATION), significant_tokens(&formatted));
    assert_eq!(comments(NOTATION), comments(&formatted));
}

#[test]
fn the_examples_read_as_the_reference_says() {
    // A spot check that the comparison looks at real content: the shift
    // reaction of section 1 has its K at 298.15 K and its equation intact.
    let (statements, _) = meaning(&format(NOTATION));
    let shift = statements
        .iter()
        .find(|s| s.head == "reaction shift")
        .expect("the shift reaction");
    assert_eq!(shift.arrow.as_deref(), Some("Reversible"));
    assert_eq!(shift.left.len(), 2);
    assert_eq!(shift.right[0], (1, 1, "CO2(g)".to_string()));
    let (name, value) = &shift.attributes[0];
    assert_eq!(name, "K");
    assert_eq!(
        value,
        &support::Read::Quantity {
            number: 1.0e5,
            unit: None,
            at: Some(Box::new(support::Read::Quantity {
                number: 298.15,
                unit: Some("K".into()),
                at: None
            }))
        }
    );
}

#[test]
fn every_fixture_keeps_its_meaning() {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/format");
    for entry in std::fs::read_dir(dir)
        .expect("fixtures")
        .filter_map(Result::ok)
    {
        let path = entry.path();
        if !path.to_string_lossy().ends_with(".in.stoik") {
            continue;
        }
        let text = std::fs::read_to_string(&path).expect("fixture text");
        let formatted = format(&text);
        assert_eq!(meaning(&text), meaning(&formatted), "{}", path.display());
        assert_eq!(
            significant_tokens(&text),
            significant_tokens(&formatted),
            "{}",
            path.display()
        );
    }
}
