//! Byte spans into source text.
//!
//! Everything inside stoik speaks in byte offsets; editor positions (lines and
//! UTF-16 or UTF-32 columns) are computed only at the edges, by
//! [`crate::syntax::line_index`].

use serde::Serialize;

/// A half-open byte range `start..end` into one file's text.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
pub struct Span {
    pub start: usize,
    pub end: usize,
}

impl Span {
    pub const fn new(start: usize, end: usize) -> Self {
        Span { start, end }
    }

    /// An empty span at `offset`, used for insertions.
    pub const fn empty(offset: usize) -> Self {
        Span {
            start: offset,
            end: offset,
        }
    }

    pub const fn len(&self) -> usize {
        self.end - self.start
    }

    pub const fn is_empty(&self) -> bool {
        self.start == self.end
    }

    /// The smallest span covering both.
    pub fn cover(self, other: Span) -> Span {
        Span::new(self.start.min(other.start), self.end.max(other.end))
    }

    /// Shift a span that is relative to a sub-slice into file coordinates.
    pub const fn offset(self, by: usize) -> Span {
        Span::new(self.start + by, self.end + by)
    }

    pub fn contains(&self, offset: usize) -> bool {
        self.start <= offset && offset <= self.end
    }

    pub fn range(&self) -> std::ops::Range<usize> {
        self.start..self.end
    }
}

impl From<std::ops::Range<usize>> for Span {
    fn from(r: std::ops::Range<usize>) -> Self {
        Span::new(r.start, r.end)
    }
}

/// Identifies one file of a workspace analysis.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
pub struct FileId(pub u32);
