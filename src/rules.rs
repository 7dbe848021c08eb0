//! The rule catalogue: ids, default severities and the documentation that
//! `stoik explain` prints.

use crate::diagnostic::Severity;

/// One rule of the catalogue.
#[derive(Debug)]
pub struct Rule {
    pub id: &'static str,
    pub default_severity: Severity,
    /// One line: what the rule finds.
    pub summary: &'static str,
    /// Markdown: what it checks, why it matters, an example and how to fix it.
    pub doc: &'static str,
}

pub static RULES: &[Rule] = &[];

/// The rule with this id, if any.
pub fn lookup(id: &str) -> Option<&'static Rule> {
    RULES.iter().find(|r| r.id == id)
}
