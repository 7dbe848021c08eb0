//! `stoik fmt` end to end: rewriting in place, `--check` for CI, standard
//! input, ignored folders and the exit codes.

use std::io::Write;
use std::path::Path;
use std::process::{Command, Output, Stdio};

const MESSY: &str = "reaction   a :A<=>B\n\tK=1   # note\n\n\n";
const TIDY: &str = "reaction a: A <=> B\n  K = 1  # note\n";

fn stoik(dir: &Path, args: &[&str], stdin: Option<&str>) -> Output {
    let mut child = Command::new(env!("CARGO_BIN_EXE_stoik"))
        .args(args)
        .current_dir(dir)
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("run stoik");
    {
        let mut input = child.stdin.take().expect("stdin");
        if let Some(text) = stdin {
            input.write_all(text.as_bytes()).expect("write stdin");
        }
    }
    child.wait_with_output().expect("stoik output")
}

fn write(path: &Path, text: &str) {
    if let Some(parent) = path.parent() {
        std::fs::create_dir_all(parent).expect("folder");
    }
    std::fs::write(path, text).expect("write");
}

fn read(path: &Path) -> String {
    std::fs::read_to_string(path).expect("read")
}

#[test]
fn check_lists_changes_and_rewrite_fixes_them() {
    let dir = tempfile::tempdir().expect("tempdir");
    let root = dir.path();
    std::fs::create_dir(root.join(".git")).expect(".git");
    write(&root.join(".gitignore"), "skipped/\n");
    write(&root.join("a.stoik"), MESSY);
    write(&root.join("lib/b.stoik"), TIDY);
    write(&root.join("skipped/c.stoik"), MESSY);
    write(&root.join("notes.txt"), MESSY);

    let out = stoik(root, &["fmt", "--check"], None);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(1), "{stderr}");
    assert!(stderr.contains("would reformat ./a.stoik"), "{stderr}");
    assert!(stderr.contains("-reaction   a :A<=>B"), "{stderr}");
    assert!(stderr.contains("+reaction a: A <=> B"), "{stderr}");
    assert!(!stderr.contains("b.stoik"), "{stderr}");
    assert!(
        !stderr.contains("c.stoik"),
        "an ignored folder is skipped: {stderr}"
    );
    assert!(out.stdout.is_empty());
    assert_eq!(read(&root.join("a.stoik")), MESSY, "--check writes nothing");

    let out = stoik(root, &["fmt"], None);
    assert_eq!(out.status.code(), Some(0));
    assert_eq!(read(&root.join("a.stoik")), TIDY);
    assert_eq!(read(&root.join("lib/b.stoik")), TIDY);
    assert_eq!(read(&root.join("skipped/c.stoik")), MESSY);
    assert_eq!(read(&root.join("notes.txt")), MESSY);

    let out = stoik(root, &["fmt", "--check", "."], None);
    assert_eq!(out.status.code(), Some(0));
    assert!(out.stderr.is_empty());
}

#[test]
fn a_named_file_is_formatted_in_place() {
    let dir = tempfile::tempdir().expect("tempdir");
    write(
        &dir.path().join("x.stoik"),
        "species  A\r\n  S=1 J/(mol*K)\r\n",
    );
    let out = stoik(dir.path(), &["fmt", "x.stoik"], None);
    assert_eq!(out.status.code(), Some(0));
    assert_eq!(
        read(&dir.path().join("x.stoik")),
        "species A\r\n  S = 1 J/(mol*K)\r\n"
    );
}

#[test]
fn standard_input_goes_to_standard_output() {
    let dir = tempfile::tempdir().expect("tempdir");
    let out = stoik(dir.path(), &["fmt", "-"], Some(MESSY));
    assert_eq!(out.status.code(), Some(0));
    assert_eq!(String::from_utf8_lossy(&out.stdout), TIDY);

    let out = stoik(dir.path(), &["fmt", "--check", "-"], Some(MESSY));
    assert_eq!(out.status.code(), Some(1));
    assert!(out.stdout.is_empty());
    assert!(String::from_utf8_lossy(&out.stderr).contains("would reformat <stdin>"));

    let out = stoik(dir.path(), &["fmt", "--check", "-"], Some(TIDY));
    assert_eq!(out.status.code(), Some(0));
}

#[test]
fn io_problems_exit_with_two() {
    let dir = tempfile::tempdir().expect("tempdir");
    let out = stoik(dir.path(), &["fmt", "missing.stoik"], None);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("missing.stoik"));

    std::fs::write(dir.path().join("bad.stoik"), b"species \xff\n").expect("write");
    let out = stoik(dir.path(), &["fmt", "bad.stoik"], None);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("not UTF-8"));

    let out = stoik(dir.path(), &["fmt", "--no-such-flag"], None);
    assert_eq!(out.status.code(), Some(2));
}
