//! The files of one analysis: reading them, following `use`, and keeping
//! their text, line index and syntax tree together.
//!
//! Reading goes through a [`FileSource`] so that the language server can
//! serve the editor's unsaved text and the CLI can serve standard input;
//! everything else sees only [`SourceText`]s addressed by [`FileId`].

use crate::config::absolute;
use crate::diagnostic::Diagnostic;
use crate::span::{FileId, Span};
use crate::syntax::ast::{SourceFile, StatementKind};
use crate::syntax::line_index::LineIndex;
use std::collections::HashMap;
use std::path::{Path, PathBuf};

/// Where file contents come from.
pub trait FileSource {
    fn read(&self, path: &Path) -> std::io::Result<Vec<u8>>;

    /// An earlier reading of the file at `path`, when the caller kept one:
    /// a new text is then parsed and indexed by reusing it
    /// ([`crate::syntax::reparse`], [`LineIndex::reusing`]), which is how
    /// the language server keeps up with typing in a large file.
    fn earlier(&self, _path: &Path) -> Option<Earlier<'_>> {
        None
    }
}

/// A file's text as it was read before, with its syntax tree and its line
/// index.
#[derive(Clone, Copy)]
pub struct Earlier<'a> {
    pub text: &'a str,
    pub syntax: &'a SourceFile,
    pub index: &'a LineIndex,
}

impl<'a> Earlier<'a> {
    pub fn of(file: &'a SourceText) -> Self {
        Earlier {
            text: &file.text,
            syntax: &file.syntax,
            index: &file.index,
        }
    }
}

/// The file system, with in-memory texts (unsaved editor buffers, standard
/// input) taking precedence.
#[derive(Default)]
pub struct Overlay {
    pub texts: HashMap<PathBuf, String>,
}

impl FileSource for Overlay {
    fn read(&self, path: &Path) -> std::io::Result<Vec<u8>> {
        match self.texts.get(path) {
            Some(text) => Ok(text.clone().into_bytes()),
            None => read_settled(path),
        }
    }
}

/// Read a regular file whole, and again when it changed while it was read
/// (its length or modification time moved, or the bytes read are not its
/// length), so that the text is one version of the file and never the start
/// of one spliced to the end of another. A file that keeps changing is an
/// error. Pipes and other special files are read once, as they are.
fn read_settled(path: &Path) -> std::io::Result<Vec<u8>> {
    let stamp = |m: &std::fs::Metadata| (m.len(), m.modified().ok());
    for _ in 0..5 {
        let before = std::fs::metadata(path)?;
        if !before.is_file() {
            return std::fs::read(path);
        }
        let bytes = std::fs::read(path)?;
        let after = std::fs::metadata(path)?;
        if stamp(&before) == stamp(&after) && bytes.len() as u64 == after.len() {
            return Ok(bytes);
        }
    }
    Err(std::io::Error::other(
        "the file kept changing while it was read",
    ))
}

/// One file of the workspace with everything derived from its text.
#[derive(Debug)]
pub struct SourceText {
    pub id: FileId,
    pub path: PathBuf,
    /// The path as reports show it (relative to the current directory when
    /// possible).
    pub display: String,
    pub text: String,
    pub index: LineIndex,
    pub syntax: SourceFile,
    /// The files this one uses, in order, each with the span of its path.
    pub uses: Vec<(Span, FileId)>,
}

/// All files read for an analysis.
pub struct Workspace {
    pub root: PathBuf,
    pub files: Vec<SourceText>,
    by_path: HashMap<PathBuf, FileId>,
    /// Problems met while reading: `use-error`, text that is not UTF-8.
    pub diagnostics: Vec<Diagnostic>,
    /// Files read and parsed ahead by [`Workspace::preparse`], taken by
    /// the first `load` or `use` that reaches them.
    preparsed: HashMap<PathBuf, Parsed>,
}

/// A file's text, decoded and parsed, before it has an id.
struct Parsed {
    text: String,
    /// The byte where the file stopped being UTF-8, if it did.
    bad_utf8: Option<usize>,
    syntax: SourceFile,
    index: LineIndex,
}

impl Parsed {
    fn of(bytes: Vec<u8>) -> Parsed {
        Parsed::reusing(bytes, None)
    }

    /// Decode, parse and index `bytes`, reusing an earlier reading if given.
    fn reusing(bytes: Vec<u8>, earlier: Option<Earlier>) -> Parsed {
        let (text, bad_utf8) = match String::from_utf8(bytes) {
            Ok(text) => (text, None),
            Err(e) => {
                let at = e.utf8_error().valid_up_to();
                (String::from_utf8_lossy(e.as_bytes()).into_owned(), Some(at))
            }
        };
        let (syntax, index) = match earlier {
            Some(e) => (
                crate::syntax::reparse(e.text, e.syntax, &text),
                LineIndex::reusing(e.index, e.text, &text),
            ),
            None => (crate::syntax::parse(&text), LineIndex::new(&text)),
        };
        Parsed {
            text,
            bad_utf8,
            syntax,
            index,
        }
    }
}

/// `bytes`, unless they are too many for the byte offsets of a [`Span`].
fn within_limit(bytes: Vec<u8>) -> std::io::Result<Vec<u8>> {
    if bytes.len() > crate::span::MAX_FILE_BYTES {
        return Err(std::io::Error::other(format!(
            "the file has {} bytes; stoik reads files of up to {} bytes (4 GiB)",
            bytes.len(),
            crate::span::MAX_FILE_BYTES
        )));
    }
    Ok(bytes)
}

/// Why a root file could not be read at all (exit code 2 in the CLI).
#[derive(Debug)]
pub struct ReadError {
    pub path: PathBuf,
    pub error: std::io::Error,
}

impl Workspace {
    pub fn new(root: &Path) -> Self {
        Workspace {
            root: absolute(root),
            files: Vec::new(),
            by_path: HashMap::new(),
            diagnostics: Vec::new(),
            preparsed: HashMap::new(),
        }
    }

    /// Read `paths` and parse them on every core, ahead of the `load`s
    /// that will ask for them: parsing is independent per file, and a
    /// library split into parts is parsed in a fraction of the time. A
    /// file that cannot be read is left for `load` to report.
    pub fn preparse(&mut self, paths: &[PathBuf], source: &dyn FileSource) {
        let mut jobs: Vec<(PathBuf, Vec<u8>)> = Vec::new();
        for p in paths {
            let path = absolute(p);
            if self.by_path.contains_key(&path) || self.preparsed.contains_key(&path) {
                continue;
            }
            if let Ok(bytes) = source.read(&path).and_then(within_limit) {
                jobs.push((path, bytes));
            }
        }
        let workers = std::thread::available_parallelism()
            .map_or(1, std::num::NonZeroUsize::get)
            .min(jobs.len());
        if workers < 2 {
            for (path, bytes) in jobs {
                self.preparsed.insert(path, Parsed::of(bytes));
            }
            return;
        }
        // Largest first, dealt round-robin, so the workers finish together.
        jobs.sort_by_key(|(_, b)| std::cmp::Reverse(b.len()));
        let mut shares: Vec<Vec<(PathBuf, Vec<u8>)>> = (0..workers).map(|_| Vec::new()).collect();
        for (i, job) in jobs.into_iter().enumerate() {
            shares[i % workers].push(job);
        }
        let parsed: Vec<(PathBuf, Parsed)> = std::thread::scope(|scope| {
            let handles: Vec<_> = shares
                .into_iter()
                .map(|share| {
                    scope.spawn(move || {
                        share
                            .into_iter()
                            .map(|(path, bytes)| (path, Parsed::of(bytes)))
                            .collect::<Vec<_>>()
                    })
                })
                .collect();
            handles
                .into_iter()
                // A worker that panicked leaves its files to `load`, which
                // parses them again on this thread.
                .filter_map(|h| h.join().ok())
                .flatten()
                .collect()
        });
        self.preparsed.extend(parsed);
    }

    /// The file at `path`: parsed ahead, or read now.
    fn read_parsed(&mut self, path: &Path, source: &dyn FileSource) -> std::io::Result<Parsed> {
        match self.preparsed.remove(path) {
            Some(p) => Ok(p),
            None => source
                .read(path)
                .and_then(within_limit)
                .map(|bytes| Parsed::reusing(bytes, source.earlier(path))),
        }
    }

    pub fn file(&self, id: FileId) -> &SourceText {
        &self.files[id.0 as usize]
    }

    pub fn id_of(&self, path: &Path) -> Option<FileId> {
        self.by_path.get(&absolute(path)).copied()
    }

    /// Load a file and, transitively, every file it uses.
    pub fn load(&mut self, path: &Path, source: &dyn FileSource) -> Result<FileId, ReadError> {
        let path = absolute(path);
        if let Some(id) = self.by_path.get(&path) {
            return Ok(*id);
        }
        let parsed = self.read_parsed(&path, source).map_err(|error| ReadError {
            path: path.clone(),
            error,
        })?;
        let id = self.add_parsed(&path, parsed);
        self.follow_uses(id, source);
        Ok(id)
    }

    /// Add a parsed file without following its uses.
    fn add_parsed(&mut self, path: &Path, parsed: Parsed) -> FileId {
        let id = FileId(self.files.len() as u32);
        let Parsed {
            text,
            bad_utf8,
            syntax,
            index,
        } = parsed;
        if let Some(at) = bad_utf8 {
            let end = text[at..]
                .chars()
                .next()
                .map(|c| at + c.len_utf8())
                .unwrap_or(at);
            self.diagnostics.push(
                Diagnostic::new(
                    "syntax",
                    id,
                    Span::new(at, end),
                    format!("the file is not valid UTF-8 at byte {at}"),
                )
                .with_help("save the file as UTF-8; stoik read the bad bytes as `\u{fffd}`"),
            );
        }
        self.by_path.insert(path.to_path_buf(), id);
        self.files.push(SourceText {
            id,
            path: path.to_path_buf(),
            display: display_path(path),
            text,
            index,
            syntax,
            uses: Vec::new(),
        });
        id
    }

    fn follow_uses(&mut self, start: FileId, source: &dyn FileSource) {
        // Depth-first over the use graph with an explicit stack, so that a
        // long chain of files cannot overflow the call stack.
        let mut stack: Vec<(FileId, usize)> = vec![(start, 0)];
        let mut on_path: Vec<FileId> = vec![start];
        while let Some((file, next)) = stack.pop() {
            let uses = self.use_paths(file);
            if next >= uses.len() {
                on_path.pop();
                continue;
            }
            stack.push((file, next + 1));
            let (span, rel) = &uses[next];
            let dir = self.files[file.0 as usize]
                .path
                .parent()
                .map(Path::to_path_buf)
                .unwrap_or_default();
            let target = absolute(&dir.join(rel));
            if !target.starts_with(&self.root) {
                self.diagnostics.push(
                    Diagnostic::new(
                        "use-error",
                        file,
                        *span,
                        format!("`{}` lies outside the workspace root {}", rel, self.root.display()),
                    )
                    .with_help("a `use` path stays inside the folder that holds stoik.toml (or the repository)"),
                );
                continue;
            }
            if let Some(&existing) = self.by_path.get(&target) {
                if let Some(pos) = on_path.iter().position(|f| *f == existing) {
                    let chain: Vec<String> = on_path[pos..]
                        .iter()
                        .chain(std::iter::once(&existing))
                        .map(|f| self.files[f.0 as usize].display.clone())
                        .collect();
                    self.diagnostics.push(
                        Diagnostic::new(
                            "use-error",
                            file,
                            *span,
                            format!("this `use` closes a cycle: {}", chain.join(" -> ")),
                        )
                        .with_help("remove one `use` of the cycle; shared definitions belong in a file that uses none of them"),
                    );
                } else {
                    self.files[file.0 as usize].uses.push((*span, existing));
                }
                continue;
            }
            match self.read_parsed(&target, source) {
                Ok(parsed) => {
                    let id = self.add_parsed(&target, parsed);
                    self.files[file.0 as usize].uses.push((*span, id));
                    on_path.push(id);
                    stack.push((id, 0));
                }
                Err(e) => {
                    let why = if e.kind() == std::io::ErrorKind::NotFound {
                        "does not exist".to_string()
                    } else {
                        format!("cannot be read: {e}")
                    };
                    self.diagnostics.push(Diagnostic::new(
                        "use-error",
                        file,
                        *span,
                        format!("`{}` {} (looked for {})", rel, why, display_path(&target)),
                    ));
                }
            }
        }
    }

    fn use_paths(&self, file: FileId) -> Vec<(Span, String)> {
        self.files[file.0 as usize]
            .syntax
            .statements
            .iter()
            .filter_map(|s| match &s.kind {
                StatementKind::Use { path: Some(p) } => Some((p.span, p.value.clone())),
                _ => None,
            })
            .collect()
    }

    /// A file and every file it uses, directly or not, each once, the used
    /// files before their users.
    pub fn closure(&self, start: FileId) -> Vec<FileId> {
        let mut seen = vec![false; self.files.len()];
        let mut order = Vec::new();
        let mut stack = vec![(start, 0usize)];
        seen[start.0 as usize] = true;
        while let Some((file, next)) = stack.pop() {
            let uses = &self.files[file.0 as usize].uses;
            if next < uses.len() {
                stack.push((file, next + 1));
                let used = uses[next].1;
                if !seen[used.0 as usize] {
                    seen[used.0 as usize] = true;
                    stack.push((used, 0));
                }
            } else {
                order.push(file);
            }
        }
        order
    }

    /// The files no other loaded file uses: the tops of the libraries.
    pub fn tops(&self) -> Vec<FileId> {
        let mut used = vec![false; self.files.len()];
        for f in &self.files {
            for (_, u) in &f.uses {
                if *u != f.id {
                    used[u.0 as usize] = true;
                }
            }
        }
        let mut tops: Vec<FileId> = self
            .files
            .iter()
            .filter(|f| !used[f.id.0 as usize])
            .map(|f| f.id)
            .collect();
        // Files that only appear inside cycles of use have no top; give each
        // such group its first file.
        let mut covered = vec![false; self.files.len()];
        for t in &tops {
            for f in self.closure(*t) {
                covered[f.0 as usize] = true;
            }
        }
        for f in &self.files {
            if !covered[f.id.0 as usize] {
                tops.push(f.id);
                for g in self.closure(f.id) {
                    covered[g.0 as usize] = true;
                }
            }
        }
        tops
    }
}

/// A path as reports show it: relative to the current directory when it
/// lies below it.
pub fn display_path(path: &Path) -> String {
    if let Ok(cwd) = std::env::current_dir()
        && let Ok(rel) = path.strip_prefix(&cwd)
    {
        return rel.to_string_lossy().into_owned();
    }
    path.to_string_lossy().into_owned()
}
