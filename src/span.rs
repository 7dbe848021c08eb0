//! Byte spans into source text.
//!
//! Everything inside stoik speaks in byte offsets; editor positions (lines and
//! UTF-16 or UTF-32 columns) are computed only at the edges, by
//! [`crate::syntax::line_index`].

use serde::Serialize;

/// A half-open byte range `start..end` into one file's text.
///
/// The offsets are kept in 32 bits, which halves every span of the syntax
/// tree and the model (a library of 10^5 reactions holds millions); the
/// workspace refuses a file of more than [`MAX_FILE_BYTES`], so every
/// offset fits.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
pub struct Span {
    start: u32,
    end: u32,
}

/// The largest file read: the offsets of a larger one would not fit a
/// [`Span`].
pub const MAX_FILE_BYTES: usize = u32::MAX as usize;

impl Span {
    /// The span `start..end`. Offsets of a file the workspace accepted
    /// always fit; one that does not (a caller's error) is clamped.
    pub fn new(start: usize, end: usize) -> Self {
        Span {
            start: offset(start),
            end: offset(end),
        }
    }

    /// An empty span at `offset`, used for insertions.
    pub fn empty(at: usize) -> Self {
        Span::new(at, at)
    }

    /// The first byte.
    pub const fn start(&self) -> usize {
        self.start as usize
    }

    /// The byte after the last.
    pub const fn end(&self) -> usize {
        self.end as usize
    }

    pub const fn len(&self) -> usize {
        (self.end - self.start) as usize
    }

    pub const fn is_empty(&self) -> bool {
        self.start == self.end
    }

    /// The smallest span covering both.
    pub fn cover(self, other: Span) -> Span {
        Span {
            start: self.start.min(other.start),
            end: self.end.max(other.end),
        }
    }

    /// Shift a span that is relative to a sub-slice into file coordinates.
    pub fn offset(self, by: usize) -> Span {
        Span::new(self.start() + by, self.end() + by)
    }

    pub fn contains(&self, offset: usize) -> bool {
        self.start() <= offset && offset <= self.end()
    }

    pub fn range(&self) -> std::ops::Range<usize> {
        self.start()..self.end()
    }
}

/// An offset as a span keeps it.
fn offset(at: usize) -> u32 {
    u32::try_from(at).unwrap_or(u32::MAX)
}

impl From<std::ops::Range<usize>> for Span {
    fn from(r: std::ops::Range<usize>) -> Self {
        Span::new(r.start, r.end)
    }
}

/// Identifies one file of a workspace analysis.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
pub struct FileId(pub u32);
