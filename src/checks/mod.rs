//! Library-wide checks that need more than one statement: the
//! thermodynamic consistency of K across reactions, species data and
//! temperatures.

use crate::config::Config;
use crate::diagnostic::Diagnostic;
use crate::model::Library;
use crate::workspace::Workspace;

/// Run every library-wide check.
pub fn run(_ws: &Workspace, _lib: &Library, _config: &Config) -> Vec<Diagnostic> {
    Vec::new()
}
