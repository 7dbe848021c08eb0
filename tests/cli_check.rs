//! `stoik check` driven as a user and a CI script drive it: the real binary,
//! its exit codes, its JSON and SARIF shapes, standard input, folder walks
//! and plain output when nobody is watching a terminal.

use serde_json::Value;
use std::io::Write;
use std::path::Path;
use std::process::{Command, Output, Stdio};

/// A file with no finding at all (balanced, with units and `at`).
const CLEAN: &str = "\
# Invented demo data.
reaction shift: CO(g) + H2O(g) <=> CO2(g) + H2(g)
  K = 1.0e5 at 298.15 K
";

/// A file whose only finding is an error (oxygen does not balance).
const ERRORS: &str = "\
# Invented demo data.
reaction: H2(g) + O2(g) <=> H2O(g)
";

/// A file whose only finding is a warning (an energy with no unit).
const WARNINGS: &str = "\
# Invented demo data.
reaction: N2O4(g) <=> 2 NO2(g)
  Kp = 0.15 bar at 298.15 K
  dH = 57.2
";

/// The binary with a clean environment: no colour preference inherited.
fn stoik() -> Command {
    let mut c = Command::new(env!("CARGO_BIN_EXE_stoik"));
    c.env_remove("NO_COLOR").env_remove("CLICOLOR_FORCE");
    c
}

fn run_in(dir: &Path, args: &[&str]) -> Output {
    stoik()
        .current_dir(dir)
        .args(args)
        .output()
        .expect("the binary runs")
}

fn run_stdin(dir: &Path, args: &[&str], input: &str) -> Output {
    let mut child = stoik()
        .current_dir(dir)
        .args(args)
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("the binary starts");
    child
        .stdin
        .take()
        .expect("stdin is piped")
        .write_all(input.as_bytes())
        .expect("stdin takes the text");
    child.wait_with_output().expect("the binary finishes")
}

fn stdout(o: &Output) -> String {
    String::from_utf8(o.stdout.clone()).expect("stdout is UTF-8")
}

fn json(o: &Output) -> Value {
    serde_json::from_slice(&o.stdout).expect("stdout is JSON")
}

/// A temporary folder holding the given files.
fn folder(files: &[(&str, &str)]) -> tempfile::TempDir {
    let dir = tempfile::tempdir().expect("a temporary folder");
    for (name, text) in files {
        let path = dir.path().join(name);
        if let Some(parent) = path.parent() {
            std::fs::create_dir_all(parent).expect("subfolders");
        }
        std::fs::write(path, text).expect("the file is written");
    }
    dir
}

fn rules_of(report: &Value) -> Vec<String> {
    report["diagnostics"]
        .as_array()
        .expect("diagnostics is an array")
        .iter()
        .map(|d| d["rule"].as_str().expect("rule is a string").to_string())
        .collect()
}

#[test]
fn exit_code_is_0_on_a_clean_file() {
    let dir = folder(&[("clean.stoik", CLEAN)]);
    let o = run_in(dir.path(), &["check", "clean.stoik"]);
    assert_eq!(o.status.code(), Some(0), "{}", stdout(&o));
    assert_eq!(
        stdout(&o).trim(),
        "checked 1 file: 0 errors, 0 warnings, 0 infos"
    );
}

#[test]
fn exit_code_is_1_on_an_error_finding() {
    let dir = folder(&[("bad.stoik", ERRORS)]);
    let o = run_in(dir.path(), &["check", "bad.stoik"]);
    assert_eq!(o.status.code(), Some(1));
    assert!(
        stdout(&o).contains("error[element-balance]"),
        "{}",
        stdout(&o)
    );
}

#[test]
fn warnings_fail_only_under_deny_warnings() {
    let dir = folder(&[("warn.stoik", WARNINGS)]);
    let plain = run_in(dir.path(), &["check", "warn.stoik"]);
    assert_eq!(plain.status.code(), Some(0), "{}", stdout(&plain));
    assert!(stdout(&plain).contains("warning[missing-unit]"));
    let denied = run_in(dir.path(), &["check", "--deny", "warnings", "warn.stoik"]);
    assert_eq!(denied.status.code(), Some(1));
}

#[test]
fn a_suppression_covers_every_line_of_its_statement() {
    // The finding is on the statement's second line, the comment on the
    // line before the statement: the command silences it as the editor
    // does (it once read the suppressions after freeing the statements,
    // and silenced only the comment's own line).
    let text = "\
# Invented demo data.
# stoik: allow missing-unit
reaction: N2O4(g) <=> 2 NO2(g)
  Kp = 0.15 bar at 298.15 K
  dH = 57.2
";
    let dir = folder(&[("quiet.stoik", text)]);
    let o = run_in(dir.path(), &["check", "--format", "json", "quiet.stoik"]);
    assert_eq!(o.status.code(), Some(0), "{}", stdout(&o));
    assert_eq!(rules_of(&json(&o)), Vec::<String>::new());
}

#[test]
fn exit_code_is_2_for_a_missing_path_and_for_a_bad_flag() {
    let dir = folder(&[("clean.stoik", CLEAN)]);
    let missing = run_in(dir.path(), &["check", "no-such-file.stoik"]);
    assert_eq!(missing.status.code(), Some(2));
    let err = String::from_utf8_lossy(&missing.stderr);
    assert!(err.contains("no-such-file.stoik"), "{err}");
    let flag = run_in(dir.path(), &["check", "--no-such-flag", "clean.stoik"]);
    assert_eq!(flag.status.code(), Some(2));
    let format = run_in(dir.path(), &["check", "--format", "xml", "clean.stoik"]);
    assert_eq!(format.status.code(), Some(2));
}

#[test]
fn json_has_the_documented_shape() {
    let dir = folder(&[("bad.stoik", ERRORS), ("warn.stoik", WARNINGS)]);
    let o = run_in(dir.path(), &["check", "--format", "json", "."]);
    assert_eq!(o.status.code(), Some(1));
    let v = json(&o);
    let top: Vec<&str> = v
        .as_object()
        .expect("an object")
        .keys()
        .map(String::as_str)
        .collect();
    assert_eq!(top, ["diagnostics", "summary"]);
    let summary = &v["summary"];
    assert_eq!(summary["files"], 2);
    assert_eq!(summary["errors"], 1);
    assert_eq!(summary["warnings"], 1);
    assert_eq!(summary["infos"], 0);
    let diags = v["diagnostics"].as_array().expect("an array");
    assert_eq!(diags.len(), 2);
    for d in diags {
        for key in [
            "file",
            "line",
            "column",
            "end_line",
            "end_column",
            "severity",
            "rule",
            "message",
            "fixes",
        ] {
            assert!(d.get(key).is_some(), "missing `{key}` in {d}");
        }
        assert!(d["fixes"].is_array());
        assert!(
            ["error", "warning", "info", "hint"].contains(&d["severity"].as_str().expect("str"))
        );
    }
    let balance = diags
        .iter()
        .find(|d| d["rule"] == "element-balance")
        .expect("the balance finding");
    // `reaction: ` is 10 characters, so the equation starts in column 11 of
    // line 2; the file path is shown relative to the workspace root.
    assert_eq!(balance["file"], "bad.stoik");
    assert_eq!(balance["line"], 2);
    assert_eq!(balance["column"], 11);
    assert_eq!(balance["end_line"], 2);
    assert_eq!(balance["end_column"], 11 + "H2(g) + O2(g) <=> H2O(g)".len());
    assert_eq!(balance["severity"], "error");
    let fix = &balance["fixes"][0];
    assert_eq!(fix["edits"][0]["new_text"], "2 H2(g) + O2(g) <=> 2 H2O(g)");
    let unit = diags
        .iter()
        .find(|d| d["rule"] == "missing-unit")
        .expect("the unit finding");
    assert_eq!(unit["severity"], "warning");
    assert_eq!(
        (unit["line"].clone(), unit["column"].clone()),
        (4.into(), 8.into())
    );
}

#[test]
fn json_columns_count_unicode_scalar_values() {
    // `·` (2 bytes) and `⇌` (3 bytes) come before the finding: in bytes it
    // would start at 52, in characters (Unicode scalar values) at 49.
    let line = "reaction: CuSO4·5H2O(s) ⇌ CuSO4(s) + 5 H2O(g) + CL2(g)";
    let dir = folder(&[("hydrate.stoik", &format!("# Invented.\n{line}\n"))]);
    let o = run_in(dir.path(), &["check", "--format", "json", "hydrate.stoik"]);
    let v = json(&o);
    let d = v["diagnostics"]
        .as_array()
        .expect("array")
        .iter()
        .find(|d| d["rule"] == "unknown-element")
        .expect("the element finding")
        .clone();
    let chars_before = line[..line.find("CL2").expect("CL2 in line")]
        .chars()
        .count();
    assert_eq!(chars_before, 48);
    assert_eq!(d["line"], 2);
    assert_eq!(d["column"], chars_before + 1);
    assert_eq!(d["end_column"], chars_before + 1 + 2);
}

#[test]
fn sarif_is_2_1_0_with_rules_levels_and_relative_regions() {
    let dir = folder(&[("sub/bad.stoik", ERRORS), ("warn.stoik", WARNINGS)]);
    let o = run_in(dir.path(), &["check", "--format", "sarif", "."]);
    assert_eq!(o.status.code(), Some(1));
    let v = json(&o);
    assert_eq!(v["version"], "2.1.0");
    let run = &v["runs"][0];
    let rules: Vec<&str> = run["tool"]["driver"]["rules"]
        .as_array()
        .expect("rules")
        .iter()
        .map(|r| r["id"].as_str().expect("id"))
        .collect();
    assert!(rules.contains(&"element-balance") && rules.contains(&"missing-unit"));
    let results = run["results"].as_array().expect("results");
    assert_eq!(results.len(), 2);
    for r in results {
        let rule = r["ruleId"].as_str().expect("ruleId");
        assert!(rules.contains(&rule));
        let level = r["level"].as_str().expect("level");
        let want = if rule == "element-balance" {
            "error"
        } else {
            "warning"
        };
        assert_eq!(level, want);
        let loc = &r["locations"][0]["physicalLocation"];
        let uri = loc["artifactLocation"]["uri"].as_str().expect("uri");
        assert!(
            !uri.starts_with('/') && !uri.contains("://"),
            "not relative: {uri}"
        );
        assert!(uri.ends_with("bad.stoik") || uri.ends_with("warn.stoik"));
        let region = &loc["region"];
        assert!(region["startLine"].as_u64().expect("startLine") >= 1);
        assert!(region["startColumn"].as_u64().expect("startColumn") >= 1);
    }
    let balance = results
        .iter()
        .find(|r| r["ruleId"] == "element-balance")
        .expect("the balance result");
    let loc = &balance["locations"][0]["physicalLocation"];
    assert_eq!(loc["artifactLocation"]["uri"], "sub/bad.stoik");
    assert_eq!(loc["region"]["startLine"], 2);
    assert_eq!(loc["region"]["startColumn"], 11);
}

#[test]
fn stdin_is_read_with_and_without_a_name() {
    let dir = folder(&[]);
    let anonymous = run_stdin(dir.path(), &["check", "--format", "json", "-"], ERRORS);
    assert_eq!(anonymous.status.code(), Some(1));
    let v = json(&anonymous);
    assert_eq!(rules_of(&v), ["element-balance"]);
    assert_eq!(v["diagnostics"][0]["file"], "<stdin>");
    assert_eq!(v["diagnostics"][0]["line"], 2);

    let named = run_stdin(
        dir.path(),
        &[
            "check",
            "--format",
            "json",
            "--stdin-filename",
            "lib/water.stoik",
            "-",
        ],
        ERRORS,
    );
    assert_eq!(named.status.code(), Some(1));
    let v = json(&named);
    let file = v["diagnostics"][0]["file"].as_str().expect("file");
    assert!(file.ends_with("lib/water.stoik"), "{file}");

    let clean = run_stdin(dir.path(), &["check", "-"], CLEAN);
    assert_eq!(clean.status.code(), Some(0));
}

#[test]
fn stdin_filename_resolves_use_paths() {
    let dir = folder(&[("lib/data.stoik", "# Invented.\nspecies water = H2O(l)\n")]);
    let text = "# Invented.\nuse \"data.stoik\"\nreaction: water <=> H^+(aq) + OH^-(aq) ; pK = 14 at 298.15 K\n";
    let named = run_stdin(
        dir.path(),
        &["check", "--stdin-filename", "lib/main.stoik", "-"],
        text,
    );
    assert_eq!(named.status.code(), Some(0), "{}", stdout(&named));
}

#[test]
fn folders_are_walked_recursively_and_gitignore_is_honoured() {
    let dir = folder(&[
        ("top.stoik", CLEAN),
        ("a/b/c/deep.stoik", ERRORS),
        ("a/notes.txt", "reaction: H2 + O2 <=> H2O\n"),
        ("build/generated.stoik", ERRORS),
        (".gitignore", "build/\n"),
    ]);
    // `ignore` reads .gitignore inside a git repository.
    let git = Command::new("git")
        .args(["init", "-q"])
        .current_dir(dir.path())
        .status();
    assert!(git.is_ok_and(|s| s.success()), "git init works");
    let o = run_in(dir.path(), &["check", "--format", "json", "."]);
    let v = json(&o);
    assert_eq!(v["summary"]["files"], 2, "{v}");
    let files: Vec<&str> = v["diagnostics"]
        .as_array()
        .expect("array")
        .iter()
        .map(|d| d["file"].as_str().expect("file"))
        .collect();
    assert_eq!(files.len(), 1);
    assert!(files[0].ends_with("a/b/c/deep.stoik"), "{files:?}");
}

#[test]
fn output_has_no_ansi_escapes_off_a_terminal_or_under_no_color() {
    let dir = folder(&[("bad.stoik", ERRORS), ("warn.stoik", WARNINGS)]);
    // Captured output is not a terminal.
    let piped = run_in(dir.path(), &["check", "."]);
    assert!(!stdout(&piped).contains('\x1b'));
    assert!(!String::from_utf8_lossy(&piped.stderr).contains('\x1b'));
    let no_color = stoik()
        .current_dir(dir.path())
        .env("NO_COLOR", "1")
        .args(["check", "."])
        .output()
        .expect("runs");
    assert!(!stdout(&no_color).contains('\x1b'));
    assert!(stdout(&no_color).contains("error[element-balance]"));
}

#[test]
fn the_default_path_is_the_current_folder() {
    let dir = folder(&[("x/bad.stoik", ERRORS)]);
    let o = run_in(dir.path(), &["check"]);
    assert_eq!(o.status.code(), Some(1));
    assert!(stdout(&o).contains("bad.stoik"));
}

/// Run under a pseudo-terminal with `script` (util-linux), when it exists.
fn on_terminal(dir: &Path, no_color: bool) -> Option<String> {
    let bin = env!("CARGO_BIN_EXE_stoik");
    let mut c = Command::new("script");
    c.current_dir(dir)
        .args(["-qec", &format!("{bin} check bad.stoik"), "/dev/null"])
        .env_remove("NO_COLOR");
    if no_color {
        c.env("NO_COLOR", "1");
    }
    let o = c.output().ok()?;
    Some(String::from_utf8_lossy(&o.stdout).into_owned())
}

#[test]
fn a_terminal_gets_colour_unless_no_color_is_set() {
    let dir = folder(&[("bad.stoik", ERRORS)]);
    let Some(coloured) = on_terminal(dir.path(), false) else {
        eprintln!("`script` is not available: skipped");
        return;
    };
    assert!(coloured.contains("\x1b[1;31merror"), "{coloured:?}");
    let plain = on_terminal(dir.path(), true).expect("script ran once already");
    assert!(plain.contains("error[element-balance]"), "{plain:?}");
    assert!(!plain.contains('\x1b'), "{plain:?}");
}
