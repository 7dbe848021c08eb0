//! `stoik.toml`: rule severities, the K tolerance and default units.
//!
//! One resolver serves the CLI and the language server: both find the
//! workspace root the same way and read the same file.

use crate::diagnostic::Severity;
use serde::Deserialize;
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

/// The name of the configuration file at a workspace root.
pub const CONFIG_FILE: &str = "stoik.toml";

/// A rule's level as configured: a severity or `off`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Level {
    Off,
    On(Severity),
}

/// The resolved configuration.
#[derive(Clone, Debug)]
pub struct Config {
    /// Relative tolerance on ln K for every K comparison.
    pub tolerance: f64,
    /// Per-rule levels overriding the catalogue's defaults.
    pub rules: BTreeMap<String, Level>,
    /// Default units by kind (`energy`, `temperature`, ...), as unit text.
    pub units: BTreeMap<String, String>,
    /// Whether the language server shows inlay hints.
    pub inlay_hints: bool,
}

impl Default for Config {
    fn default() -> Self {
        Config {
            tolerance: 0.10,
            rules: BTreeMap::new(),
            units: BTreeMap::new(),
            inlay_hints: true,
        }
    }
}

#[derive(Deserialize, Default)]
#[serde(deny_unknown_fields)]
struct RawConfig {
    tolerance: Option<f64>,
    #[serde(default)]
    rules: BTreeMap<String, String>,
    #[serde(default)]
    units: BTreeMap<String, String>,
    #[serde(default, rename = "inlay-hints")]
    inlay_hints: Option<bool>,
}

/// A problem found in `stoik.toml`.
#[derive(Clone, Debug, PartialEq)]
pub struct ConfigError {
    pub path: PathBuf,
    pub message: String,
}

impl std::fmt::Display for ConfigError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{}: {}", self.path.display(), self.message)
    }
}

impl Config {
    /// The level of a rule: configured, or the catalogue's default.
    pub fn level(&self, rule: &str) -> Level {
        if let Some(level) = self.rules.get(rule) {
            return *level;
        }
        match crate::rules::lookup(rule) {
            Some(r) => Level::On(r.default_severity),
            None => Level::On(Severity::Error),
        }
    }

    /// Parse the text of a `stoik.toml`.
    pub fn parse(text: &str, path: &Path) -> Result<Config, ConfigError> {
        let err = |message: String| ConfigError {
            path: path.to_path_buf(),
            message,
        };
        let raw: RawConfig = toml::from_str(text).map_err(|e| err(e.to_string()))?;
        let mut config = Config::default();
        if let Some(t) = raw.tolerance {
            if !(t.is_finite() && t > 0.0 && t < 10.0) {
                return Err(err(format!(
                    "tolerance must be a positive fraction such as 0.1, found {t}"
                )));
            }
            config.tolerance = t;
        }
        for (rule, level) in raw.rules {
            if crate::rules::lookup(&rule).is_none() {
                let hint = crate::rules::suggest(&rule)
                    .map(|s| format!(" (did you mean `{s}`?)"))
                    .unwrap_or_default();
                return Err(err(format!("unknown rule `{rule}` in [rules]{hint}")));
            }
            let level = if level == "off" || level == "allow" {
                Level::Off
            } else {
                Level::On(Severity::parse(&level).ok_or_else(|| {
                    err(format!(
                        "rule `{rule}`: level must be error, warning, info, hint or off, found `{level}`"
                    ))
                })?)
            };
            config.rules.insert(rule, level);
        }
        for (kind, unit) in raw.units {
            if !crate::model::units_defaults::KINDS.contains(&kind.as_str()) {
                return Err(err(format!(
                    "unknown unit kind `{kind}` in [units]; the kinds are {}",
                    crate::model::units_defaults::KINDS.join(", ")
                )));
            }
            config.units.insert(kind, unit);
        }
        if let Some(h) = raw.inlay_hints {
            config.inlay_hints = h;
        }
        Ok(config)
    }

    /// Read `stoik.toml` at `root`, or the defaults when there is none.
    pub fn load(root: &Path) -> Result<Config, ConfigError> {
        let path = root.join(CONFIG_FILE);
        match std::fs::read_to_string(&path) {
            Ok(text) => Config::parse(&text, &path),
            Err(e) if e.kind() == std::io::ErrorKind::NotFound => Ok(Config::default()),
            Err(e) => Err(ConfigError {
                path,
                message: e.to_string(),
            }),
        }
    }
}

/// The workspace root for a path: the nearest ancestor holding `stoik.toml`,
/// else the nearest holding `.git`, else the current directory when it
/// contains the path, else the path's own directory.
pub fn find_root(path: &Path) -> PathBuf {
    let abs = absolute(path);
    let start = if abs.is_dir() {
        abs.clone()
    } else {
        abs.parent()
            .map(Path::to_path_buf)
            .unwrap_or_else(|| abs.clone())
    };
    for marker in [CONFIG_FILE, ".git"] {
        let mut dir = Some(start.as_path());
        while let Some(d) = dir {
            if d.join(marker).exists() {
                return d.to_path_buf();
            }
            dir = d.parent();
        }
    }
    if let Ok(cwd) = std::env::current_dir()
        && start.starts_with(&cwd)
    {
        return cwd;
    }
    start
}

/// An absolute, lexically normalised path (no `.` or `..`), without touching
/// the file system beyond the current directory.
pub fn absolute(path: &Path) -> PathBuf {
    let joined = if path.is_absolute() {
        path.to_path_buf()
    } else {
        std::env::current_dir()
            .unwrap_or_else(|_| PathBuf::from("/"))
            .join(path)
    };
    let mut out = PathBuf::new();
    for c in joined.components() {
        match c {
            std::path::Component::CurDir => {}
            std::path::Component::ParentDir => {
                out.pop();
            }
            other => out.push(other.as_os_str()),
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn levels_tolerance_and_units_are_read() {
        let c = Config::parse(
            "tolerance = 0.05\n[rules]\nmissing-unit = \"error\"\nlowercase-k = \"off\"\n[units]\nenergy = \"kcal/mol\"\n",
            Path::new("stoik.toml"),
        )
        .expect("valid");
        assert_eq!(c.tolerance, 0.05);
        assert_eq!(c.level("missing-unit"), Level::On(Severity::Error));
        assert_eq!(c.level("lowercase-k"), Level::Off);
        assert_eq!(c.level("syntax"), Level::On(Severity::Error));
        assert_eq!(c.units.get("energy").map(String::as_str), Some("kcal/mol"));
    }

    #[test]
    fn a_misspelt_rule_is_named_with_a_suggestion() {
        let e = Config::parse(
            "[rules]\nmissing-units = \"off\"\n",
            Path::new("stoik.toml"),
        )
        .expect_err("unknown rule");
        assert!(
            e.message.contains("did you mean `missing-unit`"),
            "{}",
            e.message
        );
    }
}
