//! `ribbonmap map` from the command line: JSON contract fields (docs/json-output.md),
//! written netlists, and exit code 2 on bad input.

mod cache_support;

use assert_cmd::Command;

fn ribbonmap() -> Command {
    let mut cmd = Command::cargo_bin("ribbonmap").unwrap();
    cmd.env("RIBBONMAP_CACHE_DIR", cache_support::dir());
    cmd
}

#[test]
fn json_report_has_the_contract_fields() {
    contract_fields_and_hand_count("ribbon3", "ribbon3");
}

#[test]
fn the_library_file_of_ribbon3_reaches_the_hand_counted_adder_too() {
    // The built-in ribbon3 loaded from its file (beside its tables).
    contract_fields_and_hand_count("libraries/ribbon3.json", "ribbon3");
}

/// Maps the 8-bit ripple-carry adder on `lib` (named `name`, with
/// ribbon3's cells and areas) under the area goal and checks the JSON
/// contract fields and the hand count.
fn contract_fields_and_hand_count(lib: &str, name: &str) {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("rca8.v");
    let output = ribbonmap()
        .args([
            "map",
            "tests/data/reference/netlists/arith/rca8_flat.blif",
            "--lib",
            lib,
            "--goal",
            "area",
            "--format",
            "json",
            "-o",
        ])
        .arg(&out)
        .output()
        .unwrap();
    assert!(
        output.status.success(),
        "{}",
        String::from_utf8_lossy(&output.stderr)
    );
    let v: serde_json::Value = serde_json::from_slice(&output.stdout).unwrap();
    for field in [
        "design",
        "library",
        "goal",
        "cells",
        "cell_count",
        "area",
        "depth",
        "delay",
        "devices",
        "verified",
        "seconds",
    ] {
        assert!(v.get(field).is_some(), "missing {field}");
    }
    assert_eq!(v["library"], name);
    assert_eq!(v["goal"], "area");
    // `--verify full` is the default: the report must say the mapping was proven.
    assert_eq!(v["verified"], "proven");
    // 8-bit ripple-carry adder (ariths-gen, via PROVENANCE.md), by hand:
    // a half adder at bit 0 (xor2 + and2) and seven full adders (xor3 +
    // maj3 each, ribbon3's sum and carry cells): 16 cells, area
    // 72 + 60 + 7 * (120 + 110) = 1742 nm2 (libraries/ribbon3.json).
    assert_eq!(v["cell_count"], 16);
    assert_eq!(
        v["cells"],
        serde_json::json!({"and2": 1, "xor2": 1, "maj3": 7, "xor3": 7}),
        "{v}"
    );
    assert_eq!(v["area"], 1742.0);
    assert_eq!(v["units"]["area"], "nm2");
    // The written netlist holds the same instances.
    let text = std::fs::read_to_string(&out).unwrap();
    for (cell, n) in [("and2", 1), ("xor2", 1), ("maj3", 7), ("xor3", 7)] {
        let found = text
            .lines()
            .filter(|l| l.trim_start().starts_with(&format!("{cell} ")))
            .count();
        assert_eq!(found, n, "{cell} instances in\n{text}");
    }
}

#[test]
fn missing_file_exits_2() {
    ribbonmap()
        .args(["map", "no/such/file.blif"])
        .assert()
        .code(2);
}

#[test]
fn bad_cut_size_exits_2() {
    ribbonmap()
        .args([
            "map",
            "tests/data/reference/netlists/arith/rca8_flat.blif",
            "--cut-size",
            "9",
        ])
        .assert()
        .code(2);
}
