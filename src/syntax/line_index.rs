//! Byte offsets to editor positions and back.
//!
//! Inside stoik every location is a byte offset. Editors and reports want a
//! line and a column, counted in UTF-8 bytes, UTF-16 code units or Unicode
//! scalar values depending on who asks. This index keeps the start of every
//! line (`\n`, `\r\n` and a lone `\r` all end a line) and converts at the
//! boundary only. ASCII lines take a fast path.

/// How columns are counted.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Encoding {
    Utf8,
    Utf16,
    /// Unicode scalar values (what the CLI and JSON output report).
    Utf32,
}

/// A 0-based line and a 0-based column in some [`Encoding`].
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
pub struct Position {
    pub line: u32,
    pub column: u32,
}

/// Line starts of one text.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct LineIndex {
    starts: Vec<usize>,
    /// For each line, whether it is pure ASCII.
    ascii: Vec<bool>,
    len: usize,
}

impl LineIndex {
    pub fn new(text: &str) -> Self {
        let bytes = text.as_bytes();
        // A fair guess at the line count saves regrowing on large files.
        let guess = bytes.len() / 32 + 1;
        let mut starts = Vec::with_capacity(guess);
        let mut ascii = Vec::with_capacity(guess);
        starts.push(0);
        let mut start = 0;
        // Line breaks are found with a vectorised search and each line is
        // tested for ASCII as a whole, rather than byte by byte.
        while let Some(found) = memchr::memchr2(b'\n', b'\r', &bytes[start..]) {
            let at = start + found;
            ascii.push(bytes[start..at].is_ascii());
            let next = after_break(bytes, at);
            starts.push(next);
            start = next;
        }
        ascii.push(bytes[start..].is_ascii());
        LineIndex {
            starts,
            ascii,
            len: text.len(),
        }
    }

    /// The index of `text`, reusing `old`, the index of `old_text`: only
    /// the lines around the bytes that differ are scanned again, and the
    /// starts after them are moved. The language server indexes each new
    /// text of a document this way.
    pub fn reusing(old: &LineIndex, old_text: &str, text: &str) -> Self {
        let (old_bytes, bytes) = (old_text.as_bytes(), text.as_bytes());
        if old.len != old_bytes.len() {
            return LineIndex::new(text);
        }
        let prefix = super::reparse::common_prefix(old_bytes, bytes);
        if prefix == old_bytes.len() && prefix == bytes.len() {
            return old.clone();
        }
        let limit = old_bytes.len().min(bytes.len()) - prefix;
        let suffix = super::reparse::common_suffix(old_bytes, bytes, limit);
        // From the line before the change: a change at the start of a line
        // can join a `\r` that ends the line before to a `\n`.
        let first = old.line_of(prefix).saturating_sub(1);
        // The first old start whose line break lies in the unchanged end.
        let keep = old
            .starts
            .partition_point(|&s| s <= old_bytes.len() - suffix);
        let moved = |s: usize| s + bytes.len() - old_bytes.len();
        let end = old.starts.get(keep).map(|&s| moved(s));
        let mut starts = Vec::with_capacity(old.starts.len() + 16);
        starts.extend_from_slice(&old.starts[..=first]);
        let mut ascii = Vec::with_capacity(old.ascii.len() + 16);
        ascii.extend_from_slice(&old.ascii[..first]);
        let mut start = old.starts[first];
        loop {
            let Some(found) = memchr::memchr2(b'\n', b'\r', &bytes[start..]) else {
                if end.is_some() {
                    // The kept starts were not met: index the whole text.
                    return LineIndex::new(text);
                }
                ascii.push(bytes[start..].is_ascii());
                break;
            };
            let at = start + found;
            ascii.push(bytes[start..at].is_ascii());
            let next = after_break(bytes, at);
            match end {
                Some(e) if next == e => {
                    starts.extend(old.starts[keep..].iter().map(|&s| moved(s)));
                    ascii.extend_from_slice(&old.ascii[keep..]);
                    break;
                }
                Some(e) if next > e => return LineIndex::new(text),
                _ => {}
            }
            starts.push(next);
            start = next;
        }
        LineIndex {
            starts,
            ascii,
            len: text.len(),
        }
    }

    pub fn line_count(&self) -> usize {
        self.starts.len()
    }

    /// The byte offset where 0-based `line` starts.
    pub fn line_start(&self, line: usize) -> usize {
        self.starts.get(line).copied().unwrap_or(self.len)
    }

    /// The 0-based line containing byte `offset`.
    pub fn line_of(&self, offset: usize) -> usize {
        let offset = offset.min(self.len);
        match self.starts.binary_search(&offset) {
            Ok(line) => line,
            Err(next) => next - 1,
        }
    }

    /// The byte range of a line without its line end.
    pub fn line_range(&self, text: &str, line: usize) -> std::ops::Range<usize> {
        let start = self.line_start(line);
        let mut end = self.starts.get(line + 1).copied().unwrap_or(self.len);
        let bytes = text.as_bytes();
        while end > start && matches!(bytes.get(end - 1), Some(b'\n' | b'\r')) {
            end -= 1;
        }
        start..end
    }

    /// The position of byte `offset`. An offset inside a multi-byte
    /// character is moved back to that character's start.
    pub fn position(&self, text: &str, offset: usize, encoding: Encoding) -> Position {
        let mut offset = offset.min(text.len());
        while !text.is_char_boundary(offset) {
            offset -= 1;
        }
        let line = self.line_of(offset);
        let start = self.starts[line];
        let column = if self.ascii[line] || encoding == Encoding::Utf8 {
            offset - start
        } else {
            let piece = &text[start..offset];
            match encoding {
                Encoding::Utf16 => piece.encode_utf16().count(),
                _ => piece.chars().count(),
            }
        };
        Position {
            line: line as u32,
            column: column as u32,
        }
    }

    /// The byte offset of a position; columns past the end of the line clamp
    /// to its end, and a column inside a character moves to its start.
    pub fn offset(&self, text: &str, position: Position, encoding: Encoding) -> usize {
        let line = position.line as usize;
        if line >= self.starts.len() {
            return text.len();
        }
        let range = self.line_range(text, line);
        column_offset(text, range, position.column, self.ascii[line], encoding)
    }
}

/// The byte offset of `position` in `text`, as [`LineIndex::offset`] gives
/// it, found without an index: the line breaks before its line are passed
/// over once. For one position in a text about to change (an editor's
/// edit), where indexing the whole text would cost more.
pub fn offset_in(text: &str, position: Position, encoding: Encoding) -> usize {
    let bytes = text.as_bytes();
    let mut start = 0;
    for _ in 0..position.line {
        let Some(found) = memchr::memchr2(b'\n', b'\r', &bytes[start..]) else {
            return text.len();
        };
        let at = start + found;
        start = after_break(bytes, at);
    }
    let end = memchr::memchr2(b'\n', b'\r', &bytes[start..]).map_or(text.len(), |f| start + f);
    let ascii = bytes[start..end].is_ascii();
    column_offset(text, start..end, position.column, ascii, encoding)
}

/// The start of the line after the line break at `at`: `\r\n` is one
/// break, as are a lone `\n` and a lone `\r`.
fn after_break(bytes: &[u8], at: usize) -> usize {
    if bytes[at] == b'\r' && bytes.get(at + 1) == Some(&b'\n') {
        at + 2
    } else {
        at + 1
    }
}

/// The byte offset of column `want` of the line at `range` (without its
/// line end); past the end clamps to it, inside a character moves to its
/// start.
fn column_offset(
    text: &str,
    range: std::ops::Range<usize>,
    want: u32,
    ascii: bool,
    encoding: Encoding,
) -> usize {
    let want = want as usize;
    if ascii || encoding == Encoding::Utf8 {
        let mut at = (range.start + want).min(range.end);
        while !text.is_char_boundary(at) {
            at -= 1;
        }
        return at;
    }
    let mut units = 0usize;
    for (i, c) in text[range.clone()].char_indices() {
        let width = match encoding {
            Encoding::Utf16 => c.len_utf16(),
            _ => 1,
        };
        if units + width > want {
            return range.start + i;
        }
        units += width;
    }
    range.end
}

#[cfg(test)]
pub(super) mod tests {
    use super::*;
    use proptest::prelude::*;

    /// Line starts and ASCII flags read one byte at a time: what the
    /// vectorised search in [`LineIndex::new`] must agree with.
    fn byte_at_a_time(text: &str) -> (Vec<usize>, Vec<bool>) {
        let bytes = text.as_bytes();
        let (mut starts, mut ascii, mut line_ascii) = (vec![0], Vec::new(), true);
        let mut i = 0;
        while i < bytes.len() {
            let b = bytes[i];
            if b == b'\n' || b == b'\r' {
                if b == b'\r' && bytes.get(i + 1) == Some(&b'\n') {
                    i += 1;
                }
                ascii.push(line_ascii);
                line_ascii = true;
                starts.push(i + 1);
            } else if b >= 0x80 {
                line_ascii = false;
            }
            i += 1;
        }
        ascii.push(line_ascii);
        (starts, ascii)
    }

    proptest! {
        #[test]
        fn agrees_with_a_byte_at_a_time_reading(text in "[a \n\r°⇌𝛥]{0,80}") {
            let index = LineIndex::new(&text);
            let (starts, ascii) = byte_at_a_time(&text);
            prop_assert_eq!(index.starts, starts);
            prop_assert_eq!(index.ascii, ascii);
        }
    }

    /// The nearest character boundary of `text` at or below `at`.
    pub(in crate::syntax) fn boundary(text: &str, at: usize) -> usize {
        let mut at = at.min(text.len());
        while !text.is_char_boundary(at) {
            at -= 1;
        }
        at
    }

    proptest! {
        /// Indexing a new text by reusing the old index gives the index of
        /// a fresh reading, for any edit, line ends included.
        #[test]
        fn reusing_an_index_agrees_with_a_fresh_one(
            old_text in "[a \n\r°⇌𝛥]{0,60}",
            at in 0usize..70,
            removed in 0usize..10,
            inserted in "[a \n\r°]{0,6}",
        ) {
            let start = boundary(&old_text, at);
            let end = boundary(&old_text, start + removed);
            let text = format!("{}{}{}", &old_text[..start], inserted, &old_text[end..]);
            let old = LineIndex::new(&old_text);
            prop_assert_eq!(LineIndex::reusing(&old, &old_text, &text), LineIndex::new(&text));
        }

        /// An offset found without an index is the one the index gives.
        #[test]
        fn offsets_without_an_index_agree_with_the_index(
            text in "[a \n\r°⇌𝛥]{0,60}",
            line in 0u32..12,
            column in 0u32..12,
        ) {
            let index = LineIndex::new(&text);
            let position = Position { line, column };
            for encoding in [Encoding::Utf8, Encoding::Utf16, Encoding::Utf32] {
                prop_assert_eq!(
                    offset_in(&text, position, encoding),
                    index.offset(&text, position, encoding)
                );
            }
        }
    }

    #[test]
    fn all_three_line_ends_count() {
        let text = "a\nb\r\nc\rd";
        let index = LineIndex::new(text);
        assert_eq!(index.line_count(), 4);
        assert_eq!(
            index.position(text, 7, Encoding::Utf16),
            Position { line: 3, column: 0 }
        );
        assert_eq!(index.line_range(text, 1), 2..3);
    }

    #[test]
    fn columns_in_each_encoding() {
        // `⇌` is 3 bytes and 1 UTF-16 unit; `𝛥` (U+1D6E5) is 4 bytes and 2 units.
        let text = "A ⇌ 𝛥B";
        let index = LineIndex::new(text);
        let b = text.find('B').expect("B");
        assert_eq!(index.position(text, b, Encoding::Utf8).column, 10);
        assert_eq!(index.position(text, b, Encoding::Utf16).column, 6);
        assert_eq!(index.position(text, b, Encoding::Utf32).column, 5);
        for enc in [Encoding::Utf8, Encoding::Utf16, Encoding::Utf32] {
            let p = index.position(text, b, enc);
            assert_eq!(index.offset(text, p, enc), b);
        }
    }

    #[test]
    fn offsets_inside_a_character_move_to_its_start() {
        let text = "°C";
        let index = LineIndex::new(text);
        assert_eq!(index.position(text, 1, Encoding::Utf8).column, 0);
        // Column 1 in UTF-16 inside a surrogate pair falls back to the start.
        let text = "𝛥";
        let index = LineIndex::new(text);
        assert_eq!(
            index.offset(text, Position { line: 0, column: 1 }, Encoding::Utf16),
            0
        );
    }
}
