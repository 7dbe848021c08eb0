//! The language server (`stoik lsp`), built on tower-lsp-server.
//!
//! The server is a thin adapter: [`documents`] keeps the editor's text in
//! order, [`server`] runs one analysis task off the request loop and
//! publishes versioned diagnostics, and each editor feature lives in its own
//! file and reads a finished [`snapshot::Snapshot`]. Nothing here computes
//! chemistry of its own; it renders what [`crate::analysis`] found.
//!
//! stdout belongs to the protocol: nothing in this module prints; logging
//! goes to the client or to stderr.

#![deny(clippy::print_stdout)]

pub mod chemistry;
pub mod code_actions;
pub mod completion;
pub mod convert;
pub mod documents;
pub mod folding;
pub mod hover;
pub mod inlay_hints;
pub mod navigation;
pub mod semantic_tokens;
pub mod server;
pub mod snapshot;
pub mod symbols;

pub use server::Backend;

use tower_lsp_server::{LspService, Server};

/// Serve the protocol over any pair of byte streams until the client exits.
pub async fn serve<I, O>(input: I, output: O)
where
    I: tokio::io::AsyncRead + Unpin,
    O: tokio::io::AsyncWrite,
{
    let (service, socket) = LspService::new(Backend::new);
    Server::new(input, output, socket).serve(service).await;
}

/// Run the server on stdio until the client exits; returns the exit code.
pub fn run() -> i32 {
    let runtime = match tokio::runtime::Builder::new_multi_thread()
        .enable_all()
        .build()
    {
        Ok(rt) => rt,
        Err(e) => {
            eprintln!("error: cannot start the language server runtime: {e}");
            return 2;
        }
    };
    runtime.block_on(serve(tokio::io::stdin(), tokio::io::stdout()));
    0
}
