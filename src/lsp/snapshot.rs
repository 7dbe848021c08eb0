//! One finished analysis of one open document at one version.
//!
//! The analysis task builds a snapshot off the request loop; handlers read
//! it. A snapshot is never changed after it is built, so handlers share it
//! through an `Arc` without locks.

use crate::analysis::{Analysis, LibraryResult, analyze_after};
use crate::config::{Config, find_root};
use crate::span::FileId;
use crate::syntax::line_index::Encoding;
use crate::workspace::{Earlier, FileSource, Overlay, SourceText, Workspace};
use std::collections::HashMap;
use std::path::{Path, PathBuf};

/// The analysis of a document and the files it uses.
pub struct Snapshot {
    pub path: PathBuf,
    /// The document version the analysis saw.
    pub version: i32,
    pub analysis: Analysis,
    /// The document's file in [`Analysis::workspace`].
    pub file: FileId,
    pub config: Config,
    /// Set when `stoik.toml` could not be read (the defaults were used).
    pub config_error: Option<String>,
}

impl Snapshot {
    pub fn source(&self) -> &SourceText {
        self.analysis.workspace.file(self.file)
    }

    pub fn workspace(&self) -> &Workspace {
        &self.analysis.workspace
    }

    /// The library the document belongs to.
    pub fn library(&self) -> Option<&LibraryResult> {
        self.analysis.library_of(self.file)
    }

    pub fn text(&self, encoding: Encoding) -> super::convert::Text<'_> {
        super::convert::Text::of(self.source(), encoding)
    }
}

/// Why a document could not be analysed.
#[derive(Debug)]
pub struct JobError(pub String);

/// Analyse the open document at `path` with the unsaved texts of every open
/// document laid over the disk. This is the whole work of one edit; the
/// benchmarks call it directly. `earlier`, the document's last snapshot,
/// lends its syntax trees and line indexes: each file is parsed and indexed
/// again only where its text changed.
pub fn build(
    path: &Path,
    version: i32,
    texts: HashMap<PathBuf, String>,
    earlier: Option<&Snapshot>,
) -> Result<Snapshot, JobError> {
    let root = find_root(path);
    let (config, config_error) = match Config::load(&root) {
        Ok(c) => (c, None),
        Err(e) => (Config::default(), Some(e.to_string())),
    };
    build_with(path, version, texts, &root, config, config_error, earlier)
}

/// [`build`] with the root and configuration already chosen.
pub fn build_with(
    path: &Path,
    version: i32,
    texts: HashMap<PathBuf, String>,
    root: &Path,
    config: Config,
    config_error: Option<String>,
    earlier: Option<&Snapshot>,
) -> Result<Snapshot, JobError> {
    let clock = crate::checks::Phases::start();
    let source = Edited {
        overlay: Overlay { texts },
        earlier: earlier.map(Snapshot::workspace),
    };
    let mut ws = Workspace::new(root);
    let file = ws
        .load(path, &source)
        .map_err(|e| JobError(format!("cannot read {}: {}", e.path.display(), e.error)))?;
    clock.mark("reading and parsing");
    let analysis = analyze_after(ws, &config, earlier.map(|s| &s.analysis));
    Ok(Snapshot {
        path: path.to_path_buf(),
        version,
        analysis,
        file,
        config,
        config_error,
    })
}

/// The texts of an edit, with the workspace of the last analysis, whose
/// syntax trees and line indexes are reused.
struct Edited<'a> {
    overlay: Overlay,
    earlier: Option<&'a Workspace>,
}

impl FileSource for Edited<'_> {
    fn read(&self, path: &Path) -> std::io::Result<Vec<u8>> {
        self.overlay.read(path)
    }

    fn earlier(&self, path: &Path) -> Option<Earlier<'_>> {
        let ws = self.earlier?;
        Some(Earlier::of(ws.file(ws.id_of(path)?)))
    }
}
