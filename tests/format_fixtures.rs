//! Formatter fixtures: each `tests/format/NAME.in.stoik` must format to
//! `tests/format/NAME.out.stoik`, and that output must be a fixed point.
//!
//! Set `STOIK_BLESS=1` to write the `.out.stoik` files from the current
//! formatter (then review the diff before committing).

use std::path::{Path, PathBuf};
use stoik::format::{format, is_formatted};

fn fixture_inputs() -> Vec<PathBuf> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/format");
    let mut inputs: Vec<PathBuf> = std::fs::read_dir(&dir)
        .expect("tests/format exists")
        .filter_map(Result::ok)
        .map(|e| e.path())
        .filter(|p| p.to_string_lossy().ends_with(".in.stoik"))
        .collect();
    inputs.sort();
    inputs
}

/// Format one input and compare it with its expected output.
fn check(input: &Path) -> Result<(), String> {
    let text = std::fs::read_to_string(input).map_err(|e| e.to_string())?;
    let expected_path = PathBuf::from(input.to_string_lossy().replace(".in.stoik", ".out.stoik"));
    let formatted = format(&text);
    if std::env::var_os("STOIK_BLESS").is_some() {
        std::fs::write(&expected_path, &formatted).map_err(|e| e.to_string())?;
    }
    let expected = std::fs::read_to_string(&expected_path)
        .map_err(|e| format!("{}: {e}", expected_path.display()))?;
    if formatted != expected {
        return Err(format!(
            "{} does not format to {}:\n--- got ---\n{formatted}\n--- expected ---\n{expected}",
            input.display(),
            expected_path.display()
        ));
    }
    if !is_formatted(&expected) {
        return Err(format!(
            "{} is not a fixed point of the formatter",
            expected_path.display()
        ));
    }
    Ok(())
}

#[test]
fn every_fixture_formats_to_its_expected_output() {
    let inputs = fixture_inputs();
    assert!(
        inputs.len() >= 6,
        "expected the formatter fixtures, found {inputs:?}"
    );
    let failures: Vec<String> = inputs.iter().filter_map(|p| check(p).err()).collect();
    assert!(failures.is_empty(), "{}", failures.join("\n\n"));
}
