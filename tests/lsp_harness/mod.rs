//! A test client for the language server: it runs `stoik::lsp::serve` over
//! an in-memory duplex stream, speaks JSON-RPC with Content-Length framing,
//! and keeps every notification the server sends.
//!
//! Fixture texts mark the cursor with `$0`.
#![allow(dead_code)]

use serde_json::{Value, json};
use std::path::{Path, PathBuf};
use std::time::Duration;
use stoik::syntax::line_index::{Encoding, LineIndex};
use tokio::io::{AsyncReadExt, AsyncWriteExt, DuplexStream, ReadHalf, WriteHalf};
use tokio::sync::mpsc;

pub struct Client {
    write: WriteHalf<DuplexStream>,
    incoming: mpsc::UnboundedReceiver<Value>,
    next_id: i64,
    /// Notifications received so far, in order.
    pub notifications: Vec<Value>,
    pub dir: tempfile::TempDir,
    pub init: Value,
}

async fn read_frames(mut read: ReadHalf<DuplexStream>, tx: mpsc::UnboundedSender<Value>) {
    let mut buf: Vec<u8> = Vec::new();
    let mut chunk = [0u8; 8192];
    loop {
        // Parse every complete frame in the buffer.
        while let Some(head_end) = buf.windows(4).position(|w| w == b"\r\n\r\n") {
            let head = String::from_utf8_lossy(&buf[..head_end]).to_string();
            let len: usize = head
                .lines()
                .find_map(|l| l.strip_prefix("Content-Length: "))
                .and_then(|n| n.trim().parse().ok())
                .expect("content length");
            if buf.len() < head_end + 4 + len {
                break;
            }
            let body = buf[head_end + 4..head_end + 4 + len].to_vec();
            buf.drain(..head_end + 4 + len);
            let v: Value = serde_json::from_slice(&body).expect("json body");
            if tx.send(v).is_err() {
                return;
            }
        }
        match read.read(&mut chunk).await {
            Ok(0) | Err(_) => return,
            Ok(n) => buf.extend_from_slice(&chunk[..n]),
        }
    }
}

/// A cursor-marked fixture: the text without `$0` and the byte offset.
pub fn fixture(marked: &str) -> (String, usize) {
    let at = marked.find("$0").expect("fixture has a $0 cursor");
    (marked.replacen("$0", "", 1), at)
}

/// The protocol position (UTF-16) of a byte offset.
pub fn pos(text: &str, offset: usize) -> Value {
    pos_in(text, offset, Encoding::Utf16)
}

pub fn pos_in(text: &str, offset: usize, enc: Encoding) -> Value {
    let p = LineIndex::new(text).position(text, offset, enc);
    json!({"line": p.line, "character": p.column})
}

pub fn uri(path: &Path) -> String {
    format!("file://{}", path.display())
}

impl Client {
    /// Start a server and initialize it with these client capabilities and
    /// options, in a fresh workspace folder holding `files` (path, text).
    pub async fn start_with(capabilities: Value, options: Value, files: &[(&str, &str)]) -> Client {
        let dir = tempfile::tempdir().expect("tempdir");
        std::fs::write(dir.path().join("stoik.toml"), "").expect("stoik.toml");
        for (p, t) in files {
            let path = dir.path().join(p);
            if let Some(parent) = path.parent() {
                std::fs::create_dir_all(parent).expect("dirs");
            }
            std::fs::write(path, t).expect("write");
        }
        let (client_side, server_side) = tokio::io::duplex(1 << 20);
        let (server_read, server_write) = tokio::io::split(server_side);
        tokio::spawn(stoik::lsp::serve(server_read, server_write));
        let (read, write) = tokio::io::split(client_side);
        let (tx, rx) = mpsc::unbounded_channel();
        tokio::spawn(read_frames(read, tx));
        let mut c = Client {
            write,
            incoming: rx,
            next_id: 1,
            notifications: Vec::new(),
            dir,
            init: Value::Null,
        };
        let root = c.dir.path().to_path_buf();
        let init = c
            .request(
                "initialize",
                json!({
                    "processId": null,
                    "rootUri": uri(&root),
                    "workspaceFolders": [{"uri": uri(&root), "name": "w"}],
                    "capabilities": capabilities,
                    "initializationOptions": options,
                }),
            )
            .await;
        c.init = init;
        c.notify("initialized", json!({})).await;
        c
    }

    pub async fn start(files: &[(&str, &str)]) -> Client {
        Client::start_with(json!({}), Value::Null, files).await
    }

    pub fn path(&self, name: &str) -> PathBuf {
        self.dir.path().join(name)
    }

    pub fn uri(&self, name: &str) -> String {
        uri(&self.path(name))
    }

    async fn send(&mut self, v: Value) {
        let body = serde_json::to_vec(&v).expect("encode");
        let head = format!("Content-Length: {}\r\n\r\n", body.len());
        self.write
            .write_all(head.as_bytes())
            .await
            .expect("write head");
        self.write.write_all(&body).await.expect("write body");
        self.write.flush().await.expect("flush");
    }

    pub async fn notify(&mut self, method: &str, params: Value) {
        self.send(json!({"jsonrpc": "2.0", "method": method, "params": params}))
            .await;
    }

    /// Wait for the next message, answering server requests on the way.
    async fn next(&mut self) -> Value {
        loop {
            let v = tokio::time::timeout(Duration::from_secs(30), self.incoming.recv())
                .await
                .expect("the server answered within 30 s")
                .expect("the server is still running");
            if v.get("method").is_some() && v.get("id").is_some() {
                let id = v["id"].clone();
                self.send(json!({"jsonrpc": "2.0", "id": id, "result": null}))
                    .await;
                continue;
            }
            return v;
        }
    }

    /// Send a request and return its whole response (result or error).
    pub async fn request_raw(&mut self, method: &str, params: Value) -> Value {
        let id = self.next_id;
        self.next_id += 1;
        self.send(json!({"jsonrpc": "2.0", "id": id, "method": method, "params": params}))
            .await;
        loop {
            let v = self.next().await;
            if v.get("id") == Some(&json!(id)) {
                return v;
            }
            self.notifications.push(v);
        }
    }

    pub async fn request(&mut self, method: &str, params: Value) -> Value {
        let v = self.request_raw(method, params).await;
        assert!(v.get("error").is_none(), "{method} failed: {v}");
        v["result"].clone()
    }

    pub async fn open(&mut self, name: &str, text: &str) {
        let u = self.uri(name);
        self.notify(
            "textDocument/didOpen",
            json!({"textDocument": {"uri": u, "languageId": "stoik", "version": 1, "text": text}}),
        )
        .await;
    }

    pub async fn change_full(&mut self, name: &str, version: i32, text: &str) {
        let u = self.uri(name);
        self.notify(
            "textDocument/didChange",
            json!({"textDocument": {"uri": u, "version": version}, "contentChanges": [{"text": text}]}),
        )
        .await;
    }

    /// Wait for diagnostics of `name` published for `version`; returns them.
    /// Fails when diagnostics for a newer version than asked arrive first.
    pub async fn diagnostics(&mut self, name: &str, version: i32) -> Vec<Value> {
        let u = self.uri(name);
        let is_ours = |v: &Value| {
            v["method"] == "textDocument/publishDiagnostics" && v["params"]["uri"] == json!(u)
        };
        if let Some(found) = self
            .notifications
            .iter()
            .rev()
            .find(|v| is_ours(v) && v["params"]["version"] == json!(version))
        {
            return found["params"]["diagnostics"]
                .as_array()
                .cloned()
                .unwrap_or_default();
        }
        loop {
            let v = self.next().await;
            self.notifications.push(v.clone());
            if is_ours(&v) && v["params"]["version"] == json!(version) {
                return v["params"]["diagnostics"]
                    .as_array()
                    .cloned()
                    .unwrap_or_default();
            }
        }
    }

    pub async fn hover(&mut self, name: &str, position: Value) -> Value {
        let u = self.uri(name);
        self.request(
            "textDocument/hover",
            json!({"textDocument": {"uri": u}, "position": position}),
        )
        .await
    }

    /// The hover text (markdown) at a `$0` offset of `text`.
    pub async fn hover_text(&mut self, name: &str, text: &str, offset: usize) -> String {
        let h = self.hover(name, pos(text, offset)).await;
        h["contents"]["value"]
            .as_str()
            .unwrap_or_default()
            .to_string()
    }

    pub async fn shutdown(mut self) {
        let _ = self.request("shutdown", Value::Null).await;
        self.notify("exit", Value::Null).await;
    }
}

/// Apply protocol text edits (UTF-16 positions) to a text.
pub fn apply_edits(text: &str, edits: &[Value]) -> String {
    let index = LineIndex::new(text);
    let mut spans: Vec<(usize, usize, String)> = edits
        .iter()
        .map(|e| {
            let p = |v: &Value| stoik::syntax::line_index::Position {
                line: v["line"].as_u64().expect("line") as u32,
                column: v["character"].as_u64().expect("character") as u32,
            };
            let a = index.offset(text, p(&e["range"]["start"]), Encoding::Utf16);
            let b = index.offset(text, p(&e["range"]["end"]), Encoding::Utf16);
            (a, b, e["newText"].as_str().expect("newText").to_string())
        })
        .collect();
    spans.sort_by_key(|s| std::cmp::Reverse(s.0));
    let mut out = text.to_string();
    for (a, b, t) in spans {
        out.replace_range(a..b, &t);
    }
    out
}
