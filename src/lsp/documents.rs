//! The editor's open documents, kept in order and versioned.
//!
//! Every `didOpen` and `didChange` is applied here synchronously, before the
//! handler awaits anything, so that the text the analysis sees is always the
//! text the editor has at some version, never a mix of two edits.

use crate::syntax::line_index::{Encoding, Position, offset_in};
use std::collections::HashMap;
use std::path::PathBuf;

/// One open document at one version.
#[derive(Clone, Debug)]
pub struct Document {
    pub path: PathBuf,
    pub version: i32,
    pub text: String,
}

/// A change as the protocol sends it: a range (or none for the whole text)
/// and its replacement.
#[derive(Clone, Debug)]
pub struct Change {
    pub range: Option<(Position, Position)>,
    pub text: String,
}

/// What happened to an edit.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Applied {
    Yes,
    /// The document is not open; the edit was ignored.
    NotOpen,
    /// The edit carried a version not newer than the one held; ignored.
    Stale,
}

/// All open documents by path.
#[derive(Default, Debug)]
pub struct Documents {
    docs: HashMap<PathBuf, Document>,
}

impl Documents {
    pub fn open(&mut self, path: PathBuf, version: i32, text: String) {
        self.docs.insert(
            path.clone(),
            Document {
                path,
                version,
                text,
            },
        );
    }

    pub fn close(&mut self, path: &PathBuf) {
        self.docs.remove(path);
    }

    pub fn get(&self, path: &PathBuf) -> Option<&Document> {
        self.docs.get(path)
    }

    pub fn paths(&self) -> Vec<PathBuf> {
        self.docs.keys().cloned().collect()
    }

    /// The unsaved texts of every open document, for a workspace overlay.
    pub fn texts(&self) -> HashMap<PathBuf, String> {
        self.docs
            .iter()
            .map(|(p, d)| (p.clone(), d.text.clone()))
            .collect()
    }

    /// Apply the changes of one `didChange`, in order, and take its version.
    pub fn change(
        &mut self,
        path: &PathBuf,
        version: i32,
        changes: &[Change],
        encoding: Encoding,
    ) -> Applied {
        let Some(doc) = self.docs.get_mut(path) else {
            return Applied::NotOpen;
        };
        if version <= doc.version {
            return Applied::Stale;
        }
        for change in changes {
            apply(&mut doc.text, change, encoding);
        }
        doc.version = version;
        Applied::Yes
    }
}

/// Apply one change to a text. Positions past the end clamp to it; a range
/// given backwards is read forwards.
pub fn apply(text: &mut String, change: &Change, encoding: Encoding) {
    match change.range {
        None => *text = change.text.clone(),
        Some((start, end)) => {
            // Two positions of a text about to change: found without
            // indexing the whole text, which on a large file took longer.
            let a = offset_in(text, start, encoding);
            let b = offset_in(text, end, encoding);
            let (a, b) = if a <= b { (a, b) } else { (b, a) };
            text.replace_range(a..b, &change.text);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn pos(line: u32, column: u32) -> Position {
        Position { line, column }
    }

    #[test]
    fn an_incremental_edit_after_a_wide_character_lands_in_place() {
        // `°` is one UTF-16 unit and two bytes; `𝛥` two units and four bytes.
        let mut text = "T = 25 °C\n𝛥 x\r\nend".to_string();
        let change = Change {
            range: Some((pos(1, 3), pos(1, 4))),
            text: "y".into(),
        };
        apply(&mut text, &change, Encoding::Utf16);
        assert_eq!(text, "T = 25 °C\n𝛥 y\r\nend");
        let change = Change {
            range: Some((pos(0, 7), pos(0, 9))),
            text: "K".into(),
        };
        apply(&mut text, &change, Encoding::Utf16);
        assert_eq!(text, "T = 25 K\n𝛥 y\r\nend");
    }

    #[test]
    fn an_old_version_is_refused() {
        let mut docs = Documents::default();
        let p = PathBuf::from("/w/a.stoik");
        docs.open(p.clone(), 3, "a".into());
        let full = Change {
            range: None,
            text: "b".into(),
        };
        assert_eq!(
            docs.change(&p, 2, std::slice::from_ref(&full), Encoding::Utf16),
            Applied::Stale
        );
        assert_eq!(docs.change(&p, 4, &[full], Encoding::Utf16), Applied::Yes);
        assert_eq!(docs.get(&p).map(|d| d.text.as_str()), Some("b"));
    }
}
