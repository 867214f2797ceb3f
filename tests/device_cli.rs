//! `ribbonmap characterize`, `spice` and `map -o OUT.cir` end to end on the
//! demo kit: exit codes, the files they write, and the library they derive
//! loading with its electrical data (the weak cell marked not restoring).

use assert_cmd::Command;
use ribbonmap::library::electrical::read_electrical;
use ribbonmap::library::Library;
use std::path::{Path, PathBuf};

fn kit(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("libraries/devices/demo")
        .join(name)
}

fn ribbonmap(dir: &Path) -> Command {
    let mut c = Command::cargo_bin("ribbonmap").unwrap();
    c.env("RIBBONMAP_CACHE_DIR", dir).current_dir(dir);
    c
}

/// A two-bit ripple adder as BLIF (sum and carry of each bit).
const ADDER2: &str = ".model add2\n.inputs a0 a1 b0 b1\n.outputs s0 s1 c2\n\
.names a0 b0 s0\n10 1\n01 1\n.names a0 b0 c1\n11 1\n\
.names a1 b1 c1 s1\n100 1\n010 1\n001 1\n111 1\n\
.names a1 b1 c1 c2\n11- 1\n1-1 1\n-11 1\n.end\n";

#[test]
fn characterize_map_and_spice_on_the_demo_kit() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    ribbonmap(d)
        .args(["characterize"])
        .arg(kit("demo-weak.json"))
        .args(["-o", "lib.json", "--report", "report.html"])
        .assert()
        .success()
        .stdout(predicates::str::contains("not restoring"))
        .stdout(predicates::str::contains("xor3w"));
    let text = std::fs::read_to_string(d.join("lib.json")).unwrap();
    let lib = Library::from_json_str(&text, "lib.json").unwrap();
    // demo.json's 16 cells and the two weak ones.
    assert_eq!(lib.cells.len(), 18);
    let data = read_electrical(&text);
    assert!(data.derived_from.is_some());
    assert!(!data.cell("xor3w").unwrap().restoring);
    assert!(!data.cell("maj3w").unwrap().restoring);
    assert!(data.cell("maj3").unwrap().restoring);
    // The truth tables read at the corners are the functions the kit
    // declares (majority 0xE8, three-input XOR 0x96: truth-table convention, docs/library-format.md).
    assert_eq!(lib.cell("maj3").unwrap().truth, 0xE8);
    assert_eq!(lib.cell("xor3w").unwrap().truth, 0x96);
    assert_eq!(lib.cell("maj3w").unwrap().truth, 0xE8);
    let html = std::fs::read_to_string(d.join("report.html")).unwrap();
    assert!(html.starts_with("<!DOCTYPE html>") && html.contains("<svg") && html.contains("µS"));
    assert!(!html.contains("<script"), "self-contained, no scripts");

    ribbonmap(d)
        .args(["library", "check", "lib.json"])
        .assert()
        .success();

    std::fs::write(d.join("add2.blif"), ADDER2).unwrap();
    ribbonmap(d)
        .args(["map", "add2.blif", "--lib", "lib.json", "-o", "add2.cir"])
        .assert()
        .success();
    let deck = std::fs::read_to_string(d.join("add2.cir")).unwrap();
    assert!(deck.contains(".op") && deck.contains("table"), "{deck}");
    assert!(std::fs::read_dir(d).unwrap().any(|e| e
        .unwrap()
        .file_name()
        .to_string_lossy()
        .ends_with(".table")));

    ribbonmap(d)
        .args([
            "spice",
            "add2.blif",
            "--map",
            "--lib",
            "lib.json",
            "-o",
            "step.cir",
        ])
        .args(["--stimulus", "0000:1111", "--stop-ps", "80"])
        .assert()
        .success();
    let deck = std::fs::read_to_string(d.join("step.cir")).unwrap();
    assert!(deck.contains(".tran") && deck.contains(".measure") && deck.contains("PWL"));

    // A pattern of the wrong width is bad input.
    ribbonmap(d)
        .args([
            "spice",
            "add2.blif",
            "--map",
            "--lib",
            "lib.json",
            "-o",
            "bad.cir",
            "--pattern",
            "101",
        ])
        .assert()
        .code(2)
        .stderr(predicates::str::contains("4 primary inputs"));
    // A library without electrical data cannot make a deck (the built-in
    // ribbon libraries have it since they are characterised; cmos-le not).
    ribbonmap(d)
        .args([
            "spice",
            "add2.blif",
            "--map",
            "--lib",
            "cmos-le",
            "-o",
            "bad.cir",
        ])
        .assert()
        .code(2)
        .stderr(predicates::str::contains("derived_from"));
}

#[test]
fn a_changed_table_is_noticed_by_the_deck_writer() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    // Copy the kit so that a table can be changed after characterisation.
    let src = kit("");
    std::fs::create_dir_all(d.join("kit/tables")).unwrap();
    std::fs::copy(src.join("demo.json"), d.join("kit/demo.json")).unwrap();
    for entry in std::fs::read_dir(src.join("tables")).unwrap() {
        let entry = entry.unwrap();
        std::fs::copy(entry.path(), d.join("kit/tables").join(entry.file_name())).unwrap();
    }
    ribbonmap(d)
        .args(["characterize", "kit/demo.json", "-o", "lib.json"])
        .assert()
        .success();
    let table = d.join("kit/tables/and2_up.csv");
    let mut text = std::fs::read_to_string(&table).unwrap();
    text.push_str("# edited\n");
    std::fs::write(&table, text).unwrap();
    std::fs::write(d.join("add2.blif"), ADDER2).unwrap();
    ribbonmap(d)
        .args([
            "spice",
            "add2.blif",
            "--map",
            "--lib",
            "lib.json",
            "-o",
            "x.cir",
        ])
        .assert()
        .code(2)
        .stderr(predicates::str::contains("has changed since"));
}
