//! Text to syntax tree: the lexer, the statement parser and the line index
//! that maps byte offsets to editor positions.

pub mod ast;
pub mod lexer;
pub mod line_index;
pub mod parser;
pub mod reparse;
pub mod value;

pub use parser::{parse, parse_equation};
pub use reparse::reparse;
