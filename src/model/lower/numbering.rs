//! The species numbering of the last analysis, kept by the language server.
//!
//! Numbering the species a library names is the largest share of lowering
//! it: every distinct species text of its equations and mixtures is read by
//! the formula parser and numbered in the order texts are first met. Most
//! edits (a value, a unit, a comment, a new line) leave those texts alone,
//! so a lowering for the server keeps what its numbering started from and
//! what it gave. When the next lowering of the library meets the same texts
//! in the same files and order, after the same declarations, its species
//! are the last ones, each placed where its text is now first met; anything
//! else is numbered afresh.

use super::*;

/// A library's species numbering, with what it started from. Its parts are
/// shared, so that a library whose numbering was reused holds it for the
/// price of a few counters.
#[derive(Clone, Debug, Default)]
pub struct Numbering {
    /// How many species the declarations had made when numbering began.
    declared: usize,
    /// The aliases the declarations left.
    aliases: Arc<HashMap<CompactString, SpeciesId>>,
    /// The formula keys of the declared species.
    declared_keys: Arc<HashMap<FormulaKey, SpeciesId>>,
    /// The distinct species texts of the equations and named mixtures, in
    /// the order they were first met, with their files.
    texts: Arc<Vec<(FileId, CompactString)>>,
    /// For each species the numbering made, in order, the index of its
    /// text in `texts`.
    made: Arc<Vec<u32>>,
    /// What each text names.
    ids: Arc<Vec<Option<SpeciesId>>>,
    /// The reading notes it gave, each with the index of its text.
    notes: Arc<Vec<(u32, String)>>,
    /// What every text and every formula key names once numbered.
    by_text: Arc<HashMap<CompactString, Option<SpeciesId>>>,
    by_key: Arc<HashMap<FormulaKey, SpeciesId>>,
}

impl<'w> Lowering<'w> {
    /// Number the species texts of `statements` as
    /// [`Lowering::settle_names_ahead`] does, reusing the numbering of
    /// `last` when it still holds, and keep the numbering in the library.
    pub(super) fn number_keeping(
        &mut self,
        statements: &[(FileId, &'w Statement)],
        parallel: bool,
        last: Option<&Library>,
    ) {
        let (met, occurrences) = first_met(&self.aliases, statements);
        if let Some(last) = last
            && let Some(numbering) = &last.numbering
            && self.still_holds(numbering, &last.species, &met)
        {
            self.renumber(numbering, &last.species, &met);
            self.take_ahead(&occurrences, &numbering.ids);
            return;
        }
        let declared = self.lib.species.len();
        let aliases = Arc::new(self.aliases.clone());
        let declared_keys = Arc::clone(&self.by_key);
        // A numbering that did not start from nothing (never, as the
        // declarations settle no texts) is not kept.
        let fresh = self.by_text.is_empty();
        let readings = read_in_halves(&self.aliases, &met, parallel);
        self.reserve_names(met.len());
        let mut made = Vec::new();
        let mut notes = Vec::new();
        let mut ids = Vec::with_capacity(met.len());
        for (i, (&(file, name), reading)) in met.iter().zip(readings).enumerate() {
            let (species, diags) = (self.lib.species.len(), self.diags.len());
            ids.push(self.settle(file, name, reading));
            if self.lib.species.len() > species {
                made.push(i as u32);
            }
            if let Some(note) = self.diags.get(diags) {
                notes.push((i as u32, note.message.clone()));
            }
        }
        self.take_ahead(&occurrences, &ids);
        self.lib.numbering = fresh.then(|| Numbering {
            declared,
            aliases,
            declared_keys,
            texts: Arc::new(
                met.iter()
                    .map(|&(file, name)| (file, name.text.clone()))
                    .collect(),
            ),
            made: Arc::new(made),
            ids: Arc::new(ids),
            notes: Arc::new(notes),
            by_text: Arc::clone(&self.by_text),
            by_key: Arc::clone(&self.by_key),
        });
    }

    /// True when numbering `met` now would give what `numbering` gave:
    /// the same declarations before it, the same texts in the same files
    /// and order, and the species it made still in `species`.
    fn still_holds(
        &self,
        numbering: &Numbering,
        species: &[Species],
        met: &[(FileId, &ast::Name)],
    ) -> bool {
        self.by_text.is_empty()
            && self.lib.species.len() == numbering.declared
            && species.len() >= numbering.declared + numbering.made.len()
            && numbering.texts.len() == met.len()
            && *numbering.aliases == self.aliases
            && *numbering.declared_keys == *self.by_key
            && numbering
                .texts
                .iter()
                .zip(met)
                .all(|((file, text), (now_file, name))| file == now_file && *text == name.text)
    }

    /// Take the species, maps and notes of a numbering that still holds,
    /// each species first met and each note given where its text now is.
    fn renumber(
        &mut self,
        numbering: &Numbering,
        species: &[Species],
        met: &[(FileId, &ast::Name)],
    ) {
        let made = &species[numbering.declared..numbering.declared + numbering.made.len()];
        self.lib.species.reserve(made.len());
        for (s, &text) in made.iter().zip(numbering.made.iter()) {
            let (file, name) = met[text as usize];
            self.lib.species.push(Species {
                first_use: Loc::new(file, name.span),
                ..s.clone()
            });
        }
        for (text, note) in numbering.notes.iter() {
            let (file, name) = met[*text as usize];
            self.push(reading_note(file, name.span, note.clone()));
        }
        self.by_text = Arc::clone(&numbering.by_text);
        self.by_key = Arc::clone(&numbering.by_key);
        self.lib.numbering = Some(numbering.clone());
    }
}

/// The readings of `met`, in its order; large runs in two halves side by
/// side.
fn read_in_halves(
    aliases: &HashMap<CompactString, SpeciesId>,
    met: &[(FileId, &ast::Name)],
    parallel: bool,
) -> Vec<Reading> {
    let read = |part: &[(FileId, &ast::Name)]| -> Vec<Reading> {
        part.iter()
            .map(|(_, name)| read_name(aliases, &name.text))
            .collect()
    };
    if !parallel {
        return read(met);
    }
    let (first, second) = met.split_at(met.len() / 2);
    let (mut mine, more) = crate::parallel::both(|| read(first), || read(second));
    mine.extend(more);
    mine
}

#[cfg(test)]
mod tests {
    use crate::lsp::snapshot::{Snapshot, build_with};
    use std::collections::HashMap;
    use std::path::{Path, PathBuf};
    use std::sync::Arc;

    fn analyse(text: &str, version: i32, last: Option<&Snapshot>) -> Snapshot {
        let path = PathBuf::from("/numbering/lib.stoik");
        let texts = HashMap::from([(path.clone(), text.to_string())]);
        let root = Path::new("/numbering");
        build_with(&path, version, texts, root, Default::default(), None, last)
            .expect("the overlay serves the file")
    }

    /// Editing a value or typing a comment reuses the numbering; renaming
    /// a species does not. (That a reused numbering gives what a fresh one
    /// gives is the property test of `tests/lsp_incremental.rs`.)
    #[test]
    fn an_edit_that_leaves_the_species_texts_alone_reuses_their_numbering() {
        let text = "species ethanol = C2H5OH(l)\n  dGf = -174.8 kJ/mol\n\
                    reaction r1: CO(g) + 0.5 O2(g) <=> CO2(g)\n  K = 1e45 at 298.15 K\n\
                    mixture m\n  temperature = 900 K\n  CO(g) = 1 mol/L\n  ethanol = 0.1 mol/L\n";
        let last = analyse(text, 1, None);
        let numbering = |s: &Snapshot| {
            s.analysis.libraries[0]
                .library
                .numbering
                .clone()
                .expect("the server's lowering keeps its numbering")
        };
        let before = numbering(&last);
        let values = analyse(&text.replace("1e45", "2e45"), 2, Some(&last));
        assert!(Arc::ptr_eq(&before.by_text, &numbering(&values).by_text));
        let comment = analyse(&format!("# top\n{text}"), 3, Some(&values));
        assert!(Arc::ptr_eq(&before.by_text, &numbering(&comment).by_text));
        // The species first met in the equation moved with the comment.
        let co = |s: &Snapshot| {
            let lib = &s.analysis.libraries[0].library;
            lib.species
                .iter()
                .find(|sp| sp.name == "CO(g)")
                .map(|sp| sp.first_use.span.start())
        };
        assert_eq!(co(&comment), co(&values).map(|at| at + "# top\n".len()));
        let renamed = analyse(&text.replace("CO(g) +", "CO(aq) +"), 4, Some(&comment));
        assert!(!Arc::ptr_eq(&before.by_text, &numbering(&renamed).by_text));
    }
}
