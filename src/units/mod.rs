//! Units of measurement for reaction data: parsing unit texts such as
//! `kJ/mol` or `cm3/(molecule*s)`, converting to SI, and spelling dimensions
//! back in chemists' terms for messages.
//!
//! Everything inside stoik is SI; this module is the one place where the
//! units a chemist writes are turned into SI factors and back.

pub mod catalogue;
pub mod constants;
pub mod dimension;
pub mod number;
pub mod parse;
pub mod unit;

pub use dimension::Dimension;
pub use number::{NumberError, parse_number};
pub use parse::{UnitError, parse_unit};
pub use unit::Unit;
