//! Reaction labels used twice.
//!
//! Labels are unique in a file and the files it uses. A map from each label
//! to where it was first used answered this, but in a library of 10^6
//! reactions its inserts land all over some 40 MB and missed the caches
//! (0.43 s of the 0.59 s the reaction heads took). The labels are instead
//! hashed in statement order and sorted by hash, so that equal labels meet
//! as neighbours.

use super::*;
use std::hash::BuildHasher;

/// The `duplicate-label` findings of `labels`, given in statement order:
/// each use after the first, pointing back at the first.
pub(super) fn duplicate_labels<'a>(
    labels: impl Iterator<Item = (FileId, &'a ast::Name)>,
) -> Vec<Diagnostic> {
    let hasher = rustc_hash::FxBuildHasher;
    let labels: Vec<(FileId, &ast::Name)> = labels.collect();
    // (hash, place in statement order), sorted: equal labels share a hash
    // and come out in the order they were used.
    let mut keys: Vec<(u64, u32)> = labels
        .iter()
        .enumerate()
        .map(|(i, (_, l))| (hasher.hash_one(l.text.as_str()), i as u32))
        .collect();
    keys.sort_unstable();
    let mut out = Vec::new();
    let mut run = 0;
    while run < keys.len() {
        let hash = keys[run].0;
        let end = run + keys[run..].iter().take_while(|k| k.0 == hash).count();
        // Within a run of one hash (almost always one label), each use
        // after the first of its text is a duplicate.
        for later in run + 1..end {
            let (file, name) = labels[keys[later].1 as usize];
            let first = keys[run..later]
                .iter()
                .map(|k| labels[k.1 as usize])
                .find(|(_, n)| n.text == name.text);
            if let Some((first_file, first_name)) = first {
                out.push(
                    Diagnostic::new(
                        "duplicate-label",
                        file,
                        name.span,
                        format!("the label `{}` is used twice", name.text),
                    )
                    .with_related(first_file, first_name.span, "first used here")
                    .with_help("labels are unique in a file and the files it uses"),
                );
            }
        }
        run = end;
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::span::Span;

    fn name(text: &str, at: usize) -> ast::Name {
        ast::Name {
            text: text.into(),
            span: Span::new(at, at + text.len()),
        }
    }

    #[test]
    fn each_later_use_points_at_the_first() {
        let names = [
            name("a", 0),
            name("b", 10),
            name("a", 20),
            name("c", 30),
            name("a", 40),
            name("b", 50),
        ];
        let found = duplicate_labels(names.iter().map(|n| (FileId(0), n)));
        let mut pairs: Vec<(usize, usize)> = found
            .iter()
            .map(|d| (d.span.start(), d.related[0].span.start()))
            .collect();
        pairs.sort_unstable();
        assert_eq!(pairs, vec![(20, 0), (40, 0), (50, 10)]);
        assert!(found.iter().all(|d| d.rule == "duplicate-label"));
    }

    #[test]
    fn distinct_labels_find_nothing() {
        let names: Vec<ast::Name> = (0..1000).map(|i| name(&format!("r{i}"), i * 8)).collect();
        assert!(duplicate_labels(names.iter().map(|n| (FileId(0), n))).is_empty());
    }
}
