//! Snapshots of what users read: the human output of `stoik check` on the
//! planted files of the demo library, without colour and with relative
//! paths. A change of wording shows up in review as a changed `.snap` file.

use std::process::Command;

fn human_check(path: &str) -> String {
    let o = Command::new(env!("CARGO_BIN_EXE_stoik"))
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .env("NO_COLOR", "1")
        .args(["check", path])
        .output()
        .expect("the binary runs");
    String::from_utf8(o.stdout).expect("UTF-8")
}

#[test]
fn planted_equation_mistakes() {
    insta::assert_snapshot!(human_check("examples/flawed/equations.stoik"));
}

#[test]
fn planted_unit_and_attribute_mistakes() {
    insta::assert_snapshot!(human_check("examples/flawed/units.stoik"));
}

#[test]
fn planted_thermodynamic_mistakes() {
    insta::assert_snapshot!(human_check("examples/flawed/thermo.stoik"));
}

#[test]
fn planted_use_and_suppression_mistakes() {
    insta::assert_snapshot!(human_check("examples/flawed/uses.stoik"));
}
