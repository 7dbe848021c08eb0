//! The server state and the protocol handlers.
//!
//! Handlers run concurrently in tower-lsp-server, so each notification that
//! changes a document applies its change to [`Documents`] synchronously,
//! before any `.await`, and then only names the document to the analysis
//! task. That one task merges the pending work per document, analyses in
//! `spawn_blocking` (a panic there is caught and logged), drops a result
//! whose version is no longer the document's, and publishes diagnostics
//! tagged with the version they describe. Requests wait (briefly) for the
//! snapshot of the current version, so they never answer from older text
//! when a newer analysis is on its way.

use super::convert::{self, RuleDocs, Text};
use super::documents::{Applied, Change, Documents};
use super::snapshot::{self, Snapshot};
use crate::syntax::line_index::Encoding;
use serde_json::Value;
use std::collections::HashMap;
use std::panic::AssertUnwindSafe;
use std::path::{Path, PathBuf};
use std::sync::{Arc, Mutex, MutexGuard};
use std::time::Duration;
use tokio::sync::{mpsc, watch};
use tower_lsp_server::jsonrpc::Result;
use tower_lsp_server::ls_types::*;
use tower_lsp_server::{Client, LanguageServer};

/// How long a request waits for the analysis of the current version before
/// it answers from the newest snapshot there is.
const WAIT_FOR_ANALYSIS: Duration = Duration::from_secs(10);

/// What the client told us at initialization and since.
#[derive(Debug)]
struct Settings {
    encoding: Encoding,
    /// The client pulls diagnostics (`textDocument/diagnostic`), so the
    /// server does not push them.
    pull: bool,
    /// The client's own inlay-hint switch, overriding `stoik.toml`.
    inlay_hints: Option<bool>,
    roots: Vec<PathBuf>,
    rule_docs: RuleDocs,
}

impl Default for Settings {
    fn default() -> Self {
        Settings {
            encoding: Encoding::Utf16,
            pull: false,
            inlay_hints: None,
            roots: Vec::new(),
            rule_docs: RuleDocs::default(),
        }
    }
}

/// State shared by the handlers and the analysis task.
struct State {
    docs: Mutex<Documents>,
    snapshots: Mutex<HashMap<PathBuf, Arc<Snapshot>>>,
    /// Versions whose analysis failed, so that waiting requests give up.
    failed: Mutex<HashMap<PathBuf, i32>>,
    settings: Mutex<Settings>,
    /// Bumped after every finished analysis; requests wait on it.
    analysed: watch::Sender<u64>,
    queue: mpsc::UnboundedSender<PathBuf>,
    last_config_error: Mutex<Option<String>>,
}

/// Lock a mutex, recovering the data when a panicking thread poisoned it:
/// every critical section here leaves the data consistent.
fn lock<T>(m: &Mutex<T>) -> MutexGuard<'_, T> {
    m.lock().unwrap_or_else(|poisoned| poisoned.into_inner())
}

/// Run a feature, turning a panic into `None` and a line on stderr.
fn guarded<T>(what: &str, f: impl FnOnce() -> T) -> Option<T> {
    match std::panic::catch_unwind(AssertUnwindSafe(f)) {
        Ok(v) => Some(v),
        Err(panic) => {
            eprintln!("stoik lsp: {what} panicked: {}", panic_text(&panic));
            None
        }
    }
}

fn panic_text(panic: &Box<dyn std::any::Any + Send>) -> String {
    if let Some(s) = panic.downcast_ref::<&str>() {
        (*s).to_string()
    } else if let Some(s) = panic.downcast_ref::<String>() {
        s.clone()
    } else {
        "unknown panic".to_string()
    }
}

/// The language server.
pub struct Backend {
    client: Client,
    state: Arc<State>,
}

impl Backend {
    pub fn new(client: Client) -> Self {
        let (tx, rx) = mpsc::unbounded_channel();
        let (analysed, _) = watch::channel(0u64);
        let state = Arc::new(State {
            docs: Mutex::new(Documents::default()),
            snapshots: Mutex::new(HashMap::new()),
            failed: Mutex::new(HashMap::new()),
            settings: Mutex::new(Settings::default()),
            analysed,
            queue: tx,
            last_config_error: Mutex::new(None),
        });
        tokio::spawn(analysis_task(state.clone(), client.clone(), rx));
        Backend { client, state }
    }

    fn encoding(&self) -> Encoding {
        lock(&self.state.settings).encoding
    }

    /// Queue a document and every open document whose analysis read it.
    fn schedule(&self, path: &Path) {
        let mut paths = vec![path.to_path_buf()];
        for (p, snap) in lock(&self.state.snapshots).iter() {
            if p != path && snap.workspace().id_of(path).is_some() {
                paths.push(p.clone());
            }
        }
        for p in paths {
            // The receiver lives as long as the server; a send can only fail
            // while shutting down, when there is nothing left to analyse.
            let _ = self.state.queue.send(p);
        }
    }

    fn schedule_all(&self) {
        for p in lock(&self.state.docs).paths() {
            let _ = self.state.queue.send(p);
        }
    }

    /// The snapshot of the document's current version, waiting for the
    /// analysis when it is still running; the newest one after a timeout.
    async fn snapshot(&self, uri: &Uri) -> Option<Arc<Snapshot>> {
        let path = convert::path_of(uri)?;
        let mut rx = self.state.analysed.subscribe();
        let deadline = tokio::time::Instant::now() + WAIT_FOR_ANALYSIS;
        loop {
            let version = lock(&self.state.docs).get(&path).map(|d| d.version)?;
            let snap = lock(&self.state.snapshots).get(&path).cloned();
            if let Some(s) = &snap
                && s.version >= version
            {
                return snap;
            }
            if lock(&self.state.failed).get(&path) == Some(&version) {
                return snap;
            }
            match tokio::time::timeout_at(deadline, rx.changed()).await {
                Ok(Ok(())) => continue,
                _ => return snap,
            }
        }
    }

    fn inlay_hints_enabled(&self, snap: &Snapshot) -> bool {
        lock(&self.state.settings)
            .inlay_hints
            .unwrap_or(snap.config.inlay_hints)
    }

    fn apply_settings(&self, value: &Value) {
        if let Some(on) = inlay_switch(value) {
            lock(&self.state.settings).inlay_hints = Some(on);
        }
    }
}

/// Read the inlay-hint switch from initialization options or configuration
/// settings, in any of the shapes clients send: `{"inlayHints": {"enable":
/// b}}`, `{"stoik": {...}}`, or stoik.toml's own key `{"inlay-hints": b}`.
fn inlay_switch(value: &Value) -> Option<bool> {
    if let Some(inner) = value.get("stoik") {
        return inlay_switch(inner);
    }
    if let Some(b) = value.get("inlay-hints").and_then(Value::as_bool) {
        return Some(b);
    }
    let hints = value.get("inlayHints")?;
    hints
        .as_bool()
        .or_else(|| hints.get("enable").and_then(Value::as_bool))
}

/// Free a replaced snapshot on the blocking pool: a library of 20,000
/// reactions takes some 20 ms to free, which would otherwise delay the
/// diagnostics of the edit that replaced it. A handler still reading the
/// snapshot keeps it alive through its own `Arc`.
fn retire(old: Option<Arc<Snapshot>>) {
    if let Some(old) = old {
        drop(tokio::task::spawn_blocking(move || drop(old)));
    }
}

/// The single analysis task: take every queued document, analyse each at
/// its current version, keep and publish the results that are still
/// current.
async fn analysis_task(
    state: Arc<State>,
    client: Client,
    mut rx: mpsc::UnboundedReceiver<PathBuf>,
) {
    while let Some(first) = rx.recv().await {
        let mut pending = vec![first];
        while let Ok(p) = rx.try_recv() {
            if !pending.contains(&p) {
                pending.push(p);
            }
        }
        for path in pending {
            analyse_one(&state, &client, path).await;
        }
    }
}

async fn analyse_one(state: &Arc<State>, client: &Client, path: PathBuf) {
    let (version, texts) = {
        let docs = lock(&state.docs);
        let Some(doc) = docs.get(&path) else { return };
        (doc.version, docs.texts())
    };
    if let Some(s) = lock(&state.snapshots).get(&path)
        && s.version == version
    {
        return;
    }
    // The last snapshot lends its syntax trees to the new analysis.
    let earlier = lock(&state.snapshots).get(&path).cloned();
    let job_path = path.clone();
    let joined = tokio::task::spawn_blocking(move || {
        std::panic::catch_unwind(AssertUnwindSafe(|| {
            snapshot::build(&job_path, version, texts, earlier.as_deref())
        }))
    })
    .await;
    let snap = match joined {
        Ok(Ok(Ok(snap))) => snap,
        Ok(Ok(Err(e))) => {
            lock(&state.failed).insert(path.clone(), version);
            state.analysed.send_modify(|g| *g += 1);
            client.log_message(MessageType::ERROR, e.0).await;
            return;
        }
        Ok(Err(panic)) => {
            lock(&state.failed).insert(path.clone(), version);
            state.analysed.send_modify(|g| *g += 1);
            let msg = format!(
                "stoik: the analysis of {} panicked ({}); diagnostics are not updated",
                path.display(),
                panic_text(&panic)
            );
            client.log_message(MessageType::ERROR, msg).await;
            return;
        }
        Err(join) => {
            lock(&state.failed).insert(path.clone(), version);
            state.analysed.send_modify(|g| *g += 1);
            let msg = format!("stoik: the analysis of {} failed: {join}", path.display());
            client.log_message(MessageType::ERROR, msg).await;
            return;
        }
    };
    // A result for a version the editor has moved past is dropped: the
    // newer version is already queued.
    if lock(&state.docs).get(&path).map(|d| d.version) != Some(version) {
        return;
    }
    let config_error = snap.config_error.clone();
    let snap = Arc::new(snap);
    let (pull, encoding, docs) = {
        let s = lock(&state.settings);
        (s.pull, s.encoding, s.rule_docs.clone())
    };
    let diagnostics = (!pull).then(|| document_diagnostics(&snap, encoding, &docs));
    let replaced = lock(&state.snapshots).insert(path.clone(), snap);
    state.analysed.send_modify(|g| *g += 1);
    retire(replaced);
    let changed = {
        let mut last = lock(&state.last_config_error);
        let changed = *last != config_error;
        last.clone_from(&config_error);
        changed
    };
    if changed && let Some(e) = config_error {
        client
            .show_message(
                MessageType::WARNING,
                format!("stoik: {e}; using the defaults"),
            )
            .await;
    }
    if let (Some(diagnostics), Some(uri)) = (diagnostics, convert::uri_of(&path)) {
        if lock(&state.docs).get(&path).map(|d| d.version) != Some(version) {
            return;
        }
        client
            .publish_diagnostics(uri, diagnostics, Some(version))
            .await;
    }
}

/// The protocol diagnostics of a snapshot's own document.
pub fn document_diagnostics(
    snap: &Snapshot,
    encoding: Encoding,
    docs: &RuleDocs,
) -> Vec<Diagnostic> {
    let ws = snap.workspace();
    snap.analysis
        .diagnostics
        .iter()
        .filter(|d| d.file == snap.file)
        .map(|d| convert::diagnostic(ws, d, encoding, docs))
        .collect()
}

fn rule_docs_dir() -> PathBuf {
    std::env::temp_dir().join(format!("stoik-rules-{}", env!("CARGO_PKG_VERSION")))
}

impl LanguageServer for Backend {
    async fn initialize(&self, params: InitializeParams) -> Result<InitializeResult> {
        let caps = &params.capabilities;
        let encoding = convert::negotiate(
            caps.general
                .as_ref()
                .and_then(|g| g.position_encodings.as_deref()),
        );
        let pull = caps
            .text_document
            .as_ref()
            .and_then(|t| t.diagnostic.as_ref())
            .is_some();
        let roots: Vec<PathBuf> = params
            .workspace_folders
            .iter()
            .flatten()
            .filter_map(|f| convert::path_of(&f.uri))
            .collect();
        {
            let mut s = lock(&self.state.settings);
            s.encoding = encoding;
            s.pull = pull;
            s.roots = roots;
            s.rule_docs = RuleDocs::generate(rule_docs_dir());
        }
        if let Some(options) = &params.initialization_options {
            self.apply_settings(options);
        }
        let capabilities = ServerCapabilities {
            position_encoding: Some(convert::kind_from_encoding(encoding)),
            text_document_sync: Some(TextDocumentSyncCapability::Options(
                TextDocumentSyncOptions {
                    open_close: Some(true),
                    change: Some(TextDocumentSyncKind::INCREMENTAL),
                    save: Some(TextDocumentSyncSaveOptions::Supported(true)),
                    ..Default::default()
                },
            )),
            hover_provider: Some(HoverProviderCapability::Simple(true)),
            completion_provider: Some(CompletionOptions {
                trigger_characters: Some(vec![" ".into(), "=".into(), "/".into(), "*".into()]),
                ..Default::default()
            }),
            definition_provider: Some(OneOf::Left(true)),
            references_provider: Some(OneOf::Left(true)),
            rename_provider: Some(OneOf::Right(RenameOptions {
                prepare_provider: Some(true),
                work_done_progress_options: Default::default(),
            })),
            document_symbol_provider: Some(OneOf::Left(true)),
            workspace_symbol_provider: Some(OneOf::Left(true)),
            code_action_provider: Some(CodeActionProviderCapability::Options(CodeActionOptions {
                code_action_kinds: Some(vec![
                    CodeActionKind::QUICKFIX,
                    CodeActionKind::SOURCE_FIX_ALL,
                ]),
                ..Default::default()
            })),
            folding_range_provider: Some(FoldingRangeProviderCapability::Simple(true)),
            document_formatting_provider: Some(OneOf::Left(true)),
            semantic_tokens_provider: Some(
                SemanticTokensServerCapabilities::SemanticTokensOptions(SemanticTokensOptions {
                    legend: super::semantic_tokens::legend(),
                    full: Some(SemanticTokensFullOptions::Bool(true)),
                    range: None,
                    work_done_progress_options: Default::default(),
                }),
            ),
            inlay_hint_provider: Some(OneOf::Left(true)),
            diagnostic_provider: pull.then(|| {
                DiagnosticServerCapabilities::Options(DiagnosticOptions {
                    identifier: Some("stoik".into()),
                    inter_file_dependencies: true,
                    workspace_diagnostics: true,
                    work_done_progress_options: Default::default(),
                })
            }),
            ..ServerCapabilities::default()
        };
        Ok(InitializeResult {
            capabilities,
            server_info: Some(ServerInfo {
                name: "stoik".into(),
                version: Some(env!("CARGO_PKG_VERSION").into()),
            }),
            offset_encoding: None,
        })
    }

    async fn initialized(&self, _: InitializedParams) {
        self.client
            .log_message(MessageType::INFO, "stoik language server ready")
            .await;
    }

    async fn shutdown(&self) -> Result<()> {
        Ok(())
    }

    async fn did_open(&self, params: DidOpenTextDocumentParams) {
        let doc = params.text_document;
        let Some(path) = convert::path_of(&doc.uri) else {
            return;
        };
        lock(&self.state.docs).open(path.clone(), doc.version, doc.text);
        self.schedule(&path);
    }

    async fn did_change(&self, params: DidChangeTextDocumentParams) {
        let Some(path) = convert::path_of(&params.text_document.uri) else {
            return;
        };
        let encoding = self.encoding();
        let changes: Vec<Change> = params
            .content_changes
            .into_iter()
            .map(|c| Change {
                range: c
                    .range
                    .map(|r| (convert::position(r.start), convert::position(r.end))),
                text: c.text,
            })
            .collect();
        let applied =
            lock(&self.state.docs).change(&path, params.text_document.version, &changes, encoding);
        match applied {
            Applied::Yes => self.schedule(&path),
            Applied::Stale => {
                let msg = format!(
                    "stoik: ignored an edit of {} at version {}, older than the text held",
                    path.display(),
                    params.text_document.version
                );
                self.client.log_message(MessageType::WARNING, msg).await;
            }
            Applied::NotOpen => {}
        }
    }

    async fn did_save(&self, _: DidSaveTextDocumentParams) {
        // A saved file may be used by other open documents that read it
        // from disk; re-analyse them.
        self.schedule_all();
    }

    async fn did_close(&self, params: DidCloseTextDocumentParams) {
        let uri = params.text_document.uri;
        let Some(path) = convert::path_of(&uri) else {
            return;
        };
        lock(&self.state.docs).close(&path);
        lock(&self.state.snapshots).remove(&path);
        lock(&self.state.failed).remove(&path);
        self.schedule_all();
        if !lock(&self.state.settings).pull {
            self.client.publish_diagnostics(uri, Vec::new(), None).await;
        }
    }

    async fn did_change_configuration(&self, params: DidChangeConfigurationParams) {
        self.apply_settings(&params.settings);
        self.schedule_all();
        let client = self.client.clone();
        // The refresh is a request to the client; do not hold this handler
        // on its answer.
        tokio::spawn(async move {
            let _ = client.inlay_hint_refresh().await;
        });
    }

    async fn did_change_watched_files(&self, _: DidChangeWatchedFilesParams) {
        self.schedule_all();
    }

    async fn diagnostic(
        &self,
        params: DocumentDiagnosticParams,
    ) -> Result<DocumentDiagnosticReportResult> {
        let items = match self.snapshot(&params.text_document.uri).await {
            Some(snap) => {
                let (encoding, docs) = {
                    let s = lock(&self.state.settings);
                    (s.encoding, s.rule_docs.clone())
                };
                guarded("diagnostics", || {
                    document_diagnostics(&snap, encoding, &docs)
                })
                .unwrap_or_default()
            }
            None => Vec::new(),
        };
        Ok(DocumentDiagnosticReportResult::Report(
            DocumentDiagnosticReport::Full(RelatedFullDocumentDiagnosticReport {
                related_documents: None,
                full_document_diagnostic_report: FullDocumentDiagnosticReport {
                    result_id: None,
                    items,
                },
            }),
        ))
    }

    async fn workspace_diagnostic(
        &self,
        _: WorkspaceDiagnosticParams,
    ) -> Result<WorkspaceDiagnosticReportResult> {
        let (roots, encoding, docs) = {
            let s = lock(&self.state.settings);
            (s.roots.clone(), s.encoding, s.rule_docs.clone())
        };
        let (texts, versions) = {
            let d = lock(&self.state.docs);
            let versions: HashMap<PathBuf, i32> = d
                .paths()
                .into_iter()
                .filter_map(|p| d.get(&p).map(|doc| (p, doc.version)))
                .collect();
            (d.texts(), versions)
        };
        let joined = tokio::task::spawn_blocking(move || {
            std::panic::catch_unwind(AssertUnwindSafe(|| {
                super::symbols::workspace_reports(&roots, texts, &versions, encoding, &docs)
            }))
        })
        .await;
        let items = match joined {
            Ok(Ok(items)) => items,
            _ => {
                self.client
                    .log_message(MessageType::ERROR, "stoik: the workspace analysis failed")
                    .await;
                Vec::new()
            }
        };
        Ok(WorkspaceDiagnosticReportResult::Report(
            WorkspaceDiagnosticReport { items },
        ))
    }

    async fn hover(&self, params: HoverParams) -> Result<Option<Hover>> {
        let p = params.text_document_position_params;
        let Some(snap) = self.snapshot(&p.text_document.uri).await else {
            return Ok(None);
        };
        let encoding = self.encoding();
        Ok(guarded("hover", || super::hover::hover(&snap, p.position, encoding)).flatten())
    }

    async fn inlay_hint(&self, params: InlayHintParams) -> Result<Option<Vec<InlayHint>>> {
        let Some(snap) = self.snapshot(&params.text_document.uri).await else {
            return Ok(None);
        };
        if !self.inlay_hints_enabled(&snap) {
            return Ok(Some(Vec::new()));
        }
        let encoding = self.encoding();
        Ok(guarded("inlay hints", || {
            super::inlay_hints::inlay_hints(&snap, params.range, encoding)
        }))
    }

    async fn code_action(&self, params: CodeActionParams) -> Result<Option<CodeActionResponse>> {
        let Some(snap) = self.snapshot(&params.text_document.uri).await else {
            return Ok(None);
        };
        let encoding = self.encoding();
        Ok(guarded("code actions", || {
            super::code_actions::code_actions(&snap, &params, encoding)
        }))
    }

    async fn completion(&self, params: CompletionParams) -> Result<Option<CompletionResponse>> {
        let p = params.text_document_position;
        let Some(snap) = self.snapshot(&p.text_document.uri).await else {
            return Ok(None);
        };
        let encoding = self.encoding();
        Ok(guarded("completion", || {
            super::completion::completion(&snap, p.position, encoding)
        })
        .map(CompletionResponse::Array))
    }

    async fn goto_definition(
        &self,
        params: GotoDefinitionParams,
    ) -> Result<Option<GotoDefinitionResponse>> {
        let p = params.text_document_position_params;
        let Some(snap) = self.snapshot(&p.text_document.uri).await else {
            return Ok(None);
        };
        let encoding = self.encoding();
        Ok(guarded("definition", || {
            super::navigation::definition(&snap, p.position, encoding)
        })
        .flatten()
        .map(GotoDefinitionResponse::Scalar))
    }

    async fn references(&self, params: ReferenceParams) -> Result<Option<Vec<Location>>> {
        let p = params.text_document_position;
        let Some(snap) = self.snapshot(&p.text_document.uri).await else {
            return Ok(None);
        };
        let encoding = self.encoding();
        let with_declaration = params.context.include_declaration;
        Ok(guarded("references", || {
            super::navigation::references(&snap, p.position, encoding, with_declaration)
        })
        .flatten())
    }

    async fn prepare_rename(
        &self,
        params: TextDocumentPositionParams,
    ) -> Result<Option<PrepareRenameResponse>> {
        let Some(snap) = self.snapshot(&params.text_document.uri).await else {
            return Ok(None);
        };
        let encoding = self.encoding();
        Ok(guarded("prepare rename", || {
            super::navigation::prepare_rename(&snap, params.position, encoding)
        })
        .flatten())
    }

    async fn rename(&self, params: RenameParams) -> Result<Option<WorkspaceEdit>> {
        let p = params.text_document_position;
        let Some(snap) = self.snapshot(&p.text_document.uri).await else {
            return Ok(None);
        };
        let encoding = self.encoding();
        let outcome = guarded("rename", || {
            super::navigation::rename(&snap, p.position, &params.new_name, encoding)
        });
        match outcome {
            Some(Ok(edit)) => Ok(edit),
            Some(Err(message)) => Err(tower_lsp_server::jsonrpc::Error::invalid_params(message)),
            None => Ok(None),
        }
    }

    async fn document_symbol(
        &self,
        params: DocumentSymbolParams,
    ) -> Result<Option<DocumentSymbolResponse>> {
        let Some(snap) = self.snapshot(&params.text_document.uri).await else {
            return Ok(None);
        };
        let encoding = self.encoding();
        Ok(guarded("document symbols", || {
            DocumentSymbolResponse::Nested(super::symbols::document_symbols(&snap, encoding))
        }))
    }

    async fn symbol(
        &self,
        params: WorkspaceSymbolParams,
    ) -> Result<Option<WorkspaceSymbolResponse>> {
        let snaps: Vec<Arc<Snapshot>> = lock(&self.state.snapshots).values().cloned().collect();
        let encoding = self.encoding();
        Ok(guarded("workspace symbols", || {
            WorkspaceSymbolResponse::Flat(super::symbols::workspace_symbols(
                &snaps,
                &params.query,
                encoding,
            ))
        }))
    }

    async fn semantic_tokens_full(
        &self,
        params: SemanticTokensParams,
    ) -> Result<Option<SemanticTokensResult>> {
        let Some(snap) = self.snapshot(&params.text_document.uri).await else {
            return Ok(None);
        };
        let encoding = self.encoding();
        Ok(guarded("semantic tokens", || {
            SemanticTokensResult::Tokens(super::semantic_tokens::tokens(&snap, encoding))
        }))
    }

    async fn formatting(&self, params: DocumentFormattingParams) -> Result<Option<Vec<TextEdit>>> {
        let Some(snap) = self.snapshot(&params.text_document.uri).await else {
            return Ok(None);
        };
        let encoding = self.encoding();
        Ok(guarded("formatting", || {
            let source = snap.source();
            let formatted = crate::format::format(&source.text);
            if formatted == source.text {
                return Vec::new();
            }
            // One edit replacing the whole document, computed by the same
            // formatter as `stoik fmt`.
            let text = text_of(&snap, encoding);
            vec![TextEdit {
                range: text.range(crate::span::Span::new(0, source.text.len())),
                new_text: formatted,
            }]
        })
        .filter(|edits| !edits.is_empty()))
    }

    async fn folding_range(&self, params: FoldingRangeParams) -> Result<Option<Vec<FoldingRange>>> {
        let Some(snap) = self.snapshot(&params.text_document.uri).await else {
            return Ok(None);
        };
        Ok(guarded("folding", || super::folding::folding_ranges(&snap)))
    }
}

/// The text view of a snapshot's document, for handlers.
pub fn text_of(snap: &Snapshot, encoding: Encoding) -> Text<'_> {
    snap.text(encoding)
}
