//! Folding ranges: a statement with continuation lines folds to its header.

use super::snapshot::Snapshot;
use tower_lsp_server::ls_types as lsp;

pub fn folding_ranges(snap: &Snapshot) -> Vec<lsp::FoldingRange> {
    snap.source()
        .syntax
        .statements
        .iter()
        .filter(|s| s.last_line > s.line)
        .map(|s| lsp::FoldingRange {
            start_line: s.line as u32,
            start_character: None,
            end_line: s.last_line as u32,
            end_character: None,
            kind: Some(lsp::FoldingRangeKind::Region),
            collapsed_text: None,
        })
        .collect()
}
