//! The command-line adapter: argument parsing and one file per command.
//!
//! Commands call the analysis core and render its values; none of them
//! computes chemistry of its own.

/// `println!` that survives a closed pipe.
macro_rules! outln {
    ($($t:tt)*) => {
        $crate::cli::emit(&format!("{}\n", format_args!($($t)*)))
    };
}

mod balance;
mod check;
mod explain;
mod fmt;
mod pages;
pub mod render_human;
pub mod render_json;
pub mod render_sarif;
mod report;
mod solve;

use clap::{Parser, Subcommand, ValueEnum};
use std::io::IsTerminal;
use std::path::PathBuf;

/// Exit code: success, no finding at error level.
pub const EXIT_OK: i32 = 0;
/// Exit code: findings at error level (or warnings under `--deny warnings`).
pub const EXIT_FINDINGS: i32 = 1;
/// Exit code: usage or I/O error.
pub const EXIT_USAGE: i32 = 2;

#[derive(Parser)]
#[command(
    name = "stoik",
    version,
    about = "Lint reaction libraries: balance, units and the thermodynamic consistency of K",
    long_about = None
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Format {
    Human,
    Json,
    Sarif,
}

#[derive(Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum DataFormat {
    Human,
    Json,
}

#[derive(Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Deny {
    Warnings,
}

#[derive(Subcommand)]
enum Command {
    /// Lint files or folders (recursively *.stoik; `-` reads standard input)
    Check {
        /// Files or folders; default the current folder
        paths: Vec<PathBuf>,
        #[arg(long, value_enum, default_value = "human")]
        format: Format,
        /// Treat warnings as errors for the exit code
        #[arg(long, value_enum)]
        deny: Option<Deny>,
        /// The name to report for standard input (and to resolve its `use` paths)
        #[arg(long)]
        stdin_filename: Option<PathBuf>,
    },
    /// Smallest integer coefficients of an equation, or why there is no unique balance
    Balance {
        equation: String,
        #[arg(long, value_enum, default_value = "human")]
        format: DataFormat,
    },
    /// Equilibrium composition of each mixture (or one)
    Solve {
        file: PathBuf,
        /// Solve only this mixture
        #[arg(long)]
        mixture: Option<String>,
        #[arg(long, value_enum, default_value = "human")]
        format: DataFormat,
    },
    /// Per reaction: equation, Δn(gas), K, Kc, Kp, ΔrG° and ΔrH° at a temperature
    Report {
        file: PathBuf,
        /// Temperature, e.g. `700 K` or `25 degC` (default: each reaction's own)
        #[arg(long)]
        temperature: Option<String>,
        #[arg(long, value_enum, default_value = "human")]
        format: DataFormat,
    },
    /// Canonical layout; never changes meaning or drops a comment
    Fmt {
        /// Files or folders; default the current folder; `-` reads standard input
        paths: Vec<PathBuf>,
        /// Report files that are not formatted instead of rewriting them
        #[arg(long)]
        check: bool,
    },
    /// The language server on stdio
    Lsp,
    /// What a rule checks, why it matters, how to fix it (no rule: list them all)
    Explain { rule: Option<String> },
}

/// Write to standard output; a closed pipe (`stoik ... | head`) is not an
/// error worth a panic.
pub(crate) fn emit(text: &str) {
    use std::io::Write;
    let mut out = std::io::stdout().lock();
    let _ = out.write_all(text.as_bytes()).and_then(|_| out.flush());
}

/// Whether to colour output written to stdout.
pub fn use_color() -> bool {
    std::env::var_os("NO_COLOR").is_none_or(|v| v.is_empty()) && std::io::stdout().is_terminal()
}

/// Load one file (and what it uses) and analyse it; prints the error and
/// returns `None` when the file cannot be read.
pub(crate) fn load_one(
    file: &std::path::Path,
) -> Option<(crate::analysis::Analysis, crate::span::FileId)> {
    let root = crate::config::find_root(file);
    let config = match crate::config::Config::load(&root) {
        Ok(c) => c,
        Err(e) => {
            eprintln!("error: {e}");
            return None;
        }
    };
    let mut ws = crate::workspace::Workspace::new(&root);
    let id = match ws.load(file, &crate::workspace::Overlay::default()) {
        Ok(id) => id,
        Err(e) => {
            eprintln!("error: {}: {}", e.path.display(), e.error);
            return None;
        }
    };
    Some((crate::analysis::analyze(ws, &config), id))
}

/// Entry point of the binary; returns the process exit code.
pub fn main() -> i32 {
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(e) => {
            let code = if e.use_stderr() { EXIT_USAGE } else { EXIT_OK };
            let _ = e.print();
            return code;
        }
    };
    match cli.command {
        Command::Check {
            paths,
            format,
            deny,
            stdin_filename,
        } => check::run(&paths, format, deny.is_some(), stdin_filename.as_deref()),
        Command::Balance { equation, format } => balance::run(&equation, format),
        Command::Solve {
            file,
            mixture,
            format,
        } => solve::run(&file, mixture.as_deref(), format),
        Command::Report {
            file,
            temperature,
            format,
        } => report::run(&file, temperature.as_deref(), format),
        Command::Fmt { paths, check } => fmt::run(&paths, check),
        Command::Lsp => crate::lsp::run(),
        Command::Explain { rule } => explain::run(rule.as_deref()),
    }
}
