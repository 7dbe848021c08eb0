//! The language server analyses a document again after every edit, reusing
//! what the last analysis of it built: syntax trees, the species numbering
//! and the cycle check's progress. Whatever it reuses, a user must see
//! exactly what a fresh analysis of the same text shows.

use proptest::prelude::*;
use std::collections::HashMap;
use std::path::{Path, PathBuf};
use stoik::lsp::snapshot::{Snapshot, build_with};

/// Pieces of a library: declarations with aliases, formulas met first in
/// equations or in mixtures, formulas with reading notes, names that
/// resolve to nothing, a header that changes units, and a cycle of
/// reactions whose K agree (4e-31 · 2e12 = 8e-19, invented values) with a
/// variant whose K does not.
const PIECES: &[&str] = &[
    "species ethanol = C2H5OH(l)\n  dGf = -174.8 kJ/mol\n",
    "species CO2(g)\n",
    "reaction r1: CO(g) + 0.5 O2(g) <=> CO2(g)\n  K = 1e45 at 298.15 K\n",
    "reaction: ethanol + 3 O2(g) -> 2 CO2(g) + 3 H2O(l)\n",
    "reaction r2: Hg2+(aq) + 2 e- <=> Hg(l)\n  K = 1e28\n",
    "reaction: O2-(aq) + H2O(l) <=> OH-(aq) + HO(aq)\n",
    "mixture m\n  temperature = 900 K\n  CO(g) = 1 mol/L\n  ethanol = 0.1 mol/L\n",
    "reaction: Xx(g) <=> propanol\n",
    "units energy = kcal/mol\n",
    "# a note\n",
    "reaction: C3H8(g) <=> C3H6(g) + H2(g)\n  dH = 124 kJ/mol\n",
    "reaction a1: N2(g) + O2(g) <=> 2 NO(g)\n  K = 4e-31\n",
    "reaction a2: 2 NO(g) + O2(g) <=> 2 NO2(g)\n  K = 2e12\n",
    "reaction a3: N2(g) + 2 O2(g) <=> 2 NO2(g)\n  K = 8e-19\n",
    "reaction a4: N2(g) + 2 O2(g) <=> 2 NO2(g)\n  K = 5e-10\n",
    "reaction a5: 2 NO2(g) <=> N2O4(g)\n  K = 6.7\n",
    "reaction a6: N2(g) + 2 O2(g) <=> N2O4(g)\n  K = 3e-18\n",
];

fn file() -> impl Strategy<Value = String> {
    proptest::collection::vec(0..PIECES.len(), 1..14)
        .prop_map(|picks| picks.into_iter().map(|i| PIECES[i]).collect())
}

fn insertion() -> impl Strategy<Value = String> {
    prop_oneof![
        Just(String::new()),
        Just("#".to_string()),
        Just("\n".to_string()),
        Just("2".to_string()),
        Just("(g)".to_string()),
        Just(" + CO(g)".to_string()),
        (0..PIECES.len()).prop_map(|i| PIECES[i].to_string()),
    ]
}

fn analyse(text: &str, version: i32, last: Option<&Snapshot>) -> Snapshot {
    let path = PathBuf::from("/incremental/lib.stoik");
    let texts = HashMap::from([(path.clone(), text.to_string())]);
    let root = Path::new("/incremental");
    build_with(&path, version, texts, root, Default::default(), None, last)
        .expect("the overlay serves the file")
}

/// What a user can see of an analysis: its diagnostics and its library
/// (the species numbering aside, whose maps are hash tables).
fn seen(snap: &Snapshot) -> String {
    let a = &snap.analysis;
    let libraries: Vec<String> = a
        .libraries
        .iter()
        .map(|l| {
            let lib = &l.library;
            format!(
                "{:?} {:?} {:?} {:?}",
                lib.files, lib.species, lib.reactions, lib.mixtures
            )
        })
        .collect();
    format!("{:?}\n{libraries:?}", a.diagnostics)
}

fn cut(text: &str, at: usize) -> usize {
    let mut at = at.min(text.len());
    while !text.is_char_boundary(at) {
        at -= 1;
    }
    at
}

proptest! {
    // More cases than the default: an edit that changes what a later
    // analysis may reuse is a small share of random edits.
    #![proptest_config(ProptestConfig::with_cases(1024))]

    /// An analysis that reuses the last one sees exactly what a fresh
    /// analysis of the same text sees, for any edit, and again after a
    /// second edit that reuses the first.
    #[test]
    fn reusing_the_last_analysis_changes_nothing_a_user_sees(
        old_text in file(),
        edits in proptest::collection::vec((0usize..900, 0usize..40, insertion()), 1..3),
    ) {
        let mut last = analyse(&old_text, 1, None);
        let mut text = old_text;
        for (version, (at, removed, inserted)) in (2..).zip(edits) {
            let start = cut(&text, at);
            let end = cut(&text, start + removed);
            text = format!("{}{}{}", &text[..start], inserted, &text[end..]);
            let edited = analyse(&text, version, Some(&last));
            let fresh = analyse(&text, version, None);
            prop_assert_eq!(seen(&edited), seen(&fresh));
            last = edited;
        }
    }
}

/// A K changed in the middle of a cycle is found by the check that
/// resumes from the last analysis, and its repair clears the finding.
#[test]
fn a_cycle_broken_and_mended_by_edits_is_reported_as_a_fresh_check_reports_it() {
    let consistent: String = [11, 2, 12, 15, 13, 16].iter().map(|&i| PIECES[i]).collect();
    let cycle_findings = |s: &Snapshot| {
        s.analysis
            .diagnostics
            .iter()
            .filter(|d| d.rule.starts_with("cycle"))
            .count()
    };
    let first = analyse(&consistent, 1, None);
    assert_eq!(
        cycle_findings(&first),
        0,
        "{:?}",
        first.analysis.diagnostics
    );
    let broken_text = consistent.replace("K = 8e-19", "K = 5e-10");
    let broken = analyse(&broken_text, 2, Some(&first));
    assert_eq!(seen(&broken), seen(&analyse(&broken_text, 2, None)));
    assert!(
        cycle_findings(&broken) > 0,
        "{:?}",
        broken.analysis.diagnostics
    );
    let mended = analyse(&consistent, 3, Some(&broken));
    assert_eq!(seen(&mended), seen(&first));
}
