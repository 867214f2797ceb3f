//! Bad device data: every case ends `ribbonmap characterize` with exit code
//! 2 and one `error: FILE:LINE:COL: ...` line naming the file and line at
//! fault (docs/exit-codes.md). The kits and tables are written by
//! each test into a temporary folder.

use assert_cmd::Command;
use std::path::Path;

/// A good inverter: conducting 10 µS, blocking 0.1 µS on a 3-point grid.
const INV_UP: &str = "a,g[uS]\n0,10\n0.1,1\n0.2,0.1\n";
const INV_DOWN: &str = "a,g[uS]\n0,0.1\n0.1,1\n0.2,10\n";

fn kit_text(function: &str, inputs: &str, up: &str, down: &str) -> String {
    format!(
        "{{\n  \"format\": \"ribbonmap-devices/1\",\n  \"name\": \"t\",\n  \"supply_v\": 0.2,\n  \"gate_capacitance_af\": 30,\n  \"cells\": [\n    {{\"name\": \"c\", \"inputs\": {inputs}, {function}\"pull_up\": \"{up}\", \"pull_down\": \"{down}\", \"area\": 1}}\n  ]\n}}\n"
    )
}

/// Writes the kit and the tables, runs characterize, and returns stderr
/// after checking exit code 2 and a single error line.
fn characterize_fails(kit: &str, tables: &[(&str, &str)]) -> (String, std::path::PathBuf) {
    let dir = tempfile::tempdir().unwrap();
    for (name, text) in tables {
        std::fs::write(dir.path().join(name), text).unwrap();
    }
    let kit_path = dir.path().join("kit.json");
    std::fs::write(&kit_path, kit).unwrap();
    let out = Command::cargo_bin("ribbonmap")
        .unwrap()
        .arg("characterize")
        .arg(&kit_path)
        .arg("-o")
        .arg(dir.path().join("lib.json"))
        .env("RIBBONMAP_CACHE_DIR", dir.path())
        .output()
        .unwrap();
    let stderr = String::from_utf8_lossy(&out.stderr).to_string();
    assert_eq!(out.status.code(), Some(2), "stderr: {stderr}");
    assert_eq!(stderr.lines().count(), 1, "one line: {stderr}");
    assert!(stderr.starts_with("error: "), "{stderr}");
    assert!(
        !dir.path().join("lib.json").exists(),
        "no library on failure"
    );
    let path = dir.keep();
    (stderr, path)
}

fn expect(stderr: &str, file: &Path, line: u32, words: &str) {
    let at = format!("{}:{line}:", file.display());
    assert!(stderr.contains(&at), "expected '{at}' in: {stderr}");
    assert!(stderr.contains(words), "expected '{words}' in: {stderr}");
}

fn one_table_case(up: &str, line: u32, words: &str) {
    let kit = kit_text("", "[\"a\"]", "up.csv", "down.csv");
    let (stderr, dir) = characterize_fails(&kit, &[("up.csv", up), ("down.csv", INV_DOWN)]);
    expect(&stderr, &dir.join("up.csv"), line, words);
}

#[test]
fn ragged_row() {
    one_table_case("a,g[uS]\n0,10\n0.1,1,7\n0.2,0.1\n", 3, "3 fields");
}

#[test]
fn non_regular_grid() {
    one_table_case(
        "a,b,g[uS]\n0,0,1\n0.2,0,1\n0,0.2,1\n",
        1,
        "not a regular grid",
    );
}

#[test]
fn missing_corner() {
    one_table_case("a,g[uS]\n0,10\n0.1,1\n", 1, "missing corner");
}

#[test]
fn negative_conductance() {
    one_table_case("a,g[uS]\n0,10\n0.1,-1\n0.2,0.1\n", 3, "negative");
}

#[test]
fn zero_conductance() {
    one_table_case("a,g[uS]\n0,10\n0.1,1\n0.2,0\n", 4, "conductance 0");
}

#[test]
fn non_numeric_conductance() {
    one_table_case(
        "a,g[uS]\n0,10\n0.1,ten\n0.2,0.1\n",
        3,
        "'ten' is not a number",
    );
}

#[test]
fn unknown_unit() {
    one_table_case(
        "a,g[kS]\n0,10\n0.1,1\n0.2,0.1\n",
        1,
        "unknown conductance unit 'kS'",
    );
}

#[test]
fn table_inputs_differ_from_the_cell() {
    one_table_case("x,g[uS]\n0,10\n0.1,1\n0.2,0.1\n", 1, "differ from cell 'c'");
}

#[test]
fn negative_value_in_a_json_table() {
    let up = "{\"format\": \"ribbonmap-conductance/1\", \"inputs\": [\"a\"], \"unit\": \"uS\",\n \"axes\": [[0, 0.2]],\n \"values\": [10, -0.1]}\n";
    let kit = kit_text("", "[\"a\"]", "up.json", "down.csv");
    let (stderr, dir) = characterize_fails(&kit, &[("up.json", up), ("down.csv", INV_DOWN)]);
    expect(&stderr, &dir.join("up.json"), 3, "negative");
}

/// A JSON pull-up table for the one-input cell, with the down table good.
fn json_case(up: &str, line: u32, words: &str) {
    let kit = kit_text("", "[\"a\"]", "up.json", "down.csv");
    let (stderr, dir) = characterize_fails(&kit, &[("up.json", up), ("down.csv", INV_DOWN)]);
    expect(&stderr, &dir.join("up.json"), line, words);
}

#[test]
fn json_table_with_too_few_values_is_not_a_regular_grid() {
    json_case(
        "{\"format\": \"ribbonmap-conductance/1\", \"inputs\": [\"a\"], \"unit\": \"uS\",\n \"axes\": [[0, 0.1, 0.2]],\n \"values\": [10, 0.1]}\n",
        3,
        "not a regular grid: 2 values",
    );
}

#[test]
fn json_axis_that_does_not_increase_is_not_a_regular_grid() {
    json_case(
        "{\"format\": \"ribbonmap-conductance/1\", \"inputs\": [\"a\"], \"unit\": \"uS\",\n \"axes\": [[0, 0.2, 0.1]],\n \"values\": [10, 1, 0.1]}\n",
        2,
        "does not increase",
    );
}

#[test]
fn json_table_missing_a_corner() {
    json_case(
        "{\"format\": \"ribbonmap-conductance/1\", \"inputs\": [\"a\"], \"unit\": \"uS\",\n \"axes\": [[0, 0.1]],\n \"values\": [10, 1]}\n",
        1,
        "missing corner",
    );
}

#[test]
fn json_table_with_an_unknown_unit() {
    json_case(
        "{\"format\": \"ribbonmap-conductance/1\", \"inputs\": [\"a\"],\n \"unit\": \"mho\",\n \"axes\": [[0, 0.2]],\n \"values\": [10, 0.1]}\n",
        2,
        "unknown conductance unit 'mho'",
    );
}

#[test]
fn json_table_with_a_non_numeric_value() {
    json_case(
        "{\"format\": \"ribbonmap-conductance/1\", \"inputs\": [\"a\"], \"unit\": \"uS\",\n \"axes\": [[0, 0.2]],\n \"values\": [10,\n \"low\"]}\n",
        4,
        "expected a conductance",
    );
}

#[test]
fn json_table_whose_inputs_differ_from_the_cell() {
    json_case(
        "{\"format\": \"ribbonmap-conductance/1\", \"inputs\": [\"x\"], \"unit\": \"uS\",\n \"axes\": [[0, 0.2]],\n \"values\": [10, 0.1]}\n",
        1,
        "differ from cell 'c'",
    );
}

#[test]
fn both_ribbons_conduct_named_with_the_static_current() {
    // Row a=1: Gu = 20 µS and Gd = 10 µS, both at or above their ribbons'
    // geometric middles; I = 0.2 V · 20 · 10 / 30 µS = 1333.3 nA.
    let up = "a,g[uS]\n0,10\n0.2,20\n";
    let kit = kit_text("", "[\"a\"]", "up.csv", "down.csv");
    let down = "a,g[uS]\n0,0.1\n0.2,10\n";
    let (stderr, dir) = characterize_fails(&kit, &[("up.csv", up), ("down.csv", down)]);
    expect(&stderr, &dir.join("kit.json"), 7, "both conduct on row a=1");
    assert!(stderr.contains("1333.3333 nA"), "{stderr}");
}

#[test]
fn output_between_the_logic_thresholds() {
    // Gu + Gd = 11 µS from 0.1 to 0.2 V with slopes ±90 µS/V: gain
    // 0.2·90/11 = 1.64 up to the end of the range, so VIH = 0.2 V and the
    // 1-output 0.2·10/11 = 0.1818 V lies between VIL and VIH.
    let up = "a,g[uS]\n0,10\n0.1,10\n0.2,1\n";
    let down = "a,g[uS]\n0,1\n0.1,1\n0.2,10\n";
    let kit = kit_text("", "[\"a\"]", "up.csv", "down.csv");
    let (stderr, dir) = characterize_fails(&kit, &[("up.csv", up), ("down.csv", down)]);
    expect(
        &stderr,
        &dir.join("kit.json"),
        7,
        "between the logic thresholds",
    );
    assert!(stderr.contains("a=0 gives 0.1818 V"), "{stderr}");
}

#[test]
fn derived_function_differs_from_the_declared_one() {
    let kit = kit_text("\"function\": \"a\", ", "[\"a\"]", "up.csv", "down.csv");
    let (stderr, dir) = characterize_fails(&kit, &[("up.csv", INV_UP), ("down.csv", INV_DOWN)]);
    expect(
        &stderr,
        &dir.join("kit.json"),
        7,
        "other than the declared \"a\"",
    );
    assert!(
        stderr.contains("a=0 gives") && stderr.contains("a=1 gives"),
        "{stderr}"
    );
}

#[test]
fn missing_table_file_names_the_kit_line() {
    let kit = kit_text("", "[\"a\"]", "nowhere.csv", "down.csv");
    let (stderr, dir) = characterize_fails(&kit, &[("down.csv", INV_DOWN)]);
    expect(&stderr, &dir.join("kit.json"), 7, "not found");
}

#[test]
fn unknown_kit_field() {
    let kit = kit_text("\"colour\": 1, ", "[\"a\"]", "up.csv", "down.csv");
    let (stderr, dir) = characterize_fails(&kit, &[("up.csv", INV_UP), ("down.csv", INV_DOWN)]);
    expect(&stderr, &dir.join("kit.json"), 7, "unknown field 'colour'");
}

#[test]
fn a_good_nand_characterises() {
    // NAND alone is functionally complete, so its library loads.
    let up = "a,b,g[uS]\n0,0,10\n0.2,0,10\n0,0.2,10\n0.2,0.2,0.1\n";
    let down = "a,b,g[uS]\n0,0,0.1\n0.2,0,0.1\n0,0.2,0.1\n0.2,0.2,10\n";
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("up.csv"), up).unwrap();
    std::fs::write(dir.path().join("down.csv"), down).unwrap();
    let kit = dir.path().join("kit.json");
    let text = kit_text(
        "\"function\": \"!(a & b)\", ",
        "[\"a\", \"b\"]",
        "up.csv",
        "down.csv",
    );
    std::fs::write(&kit, text).unwrap();
    Command::cargo_bin("ribbonmap")
        .unwrap()
        .arg("characterize")
        .arg(&kit)
        .arg("-o")
        .arg(dir.path().join("lib.json"))
        .env("RIBBONMAP_CACHE_DIR", dir.path())
        .assert()
        .success();
}

#[test]
fn an_incomplete_kit_is_bad_input() {
    let kit = kit_text("", "[\"a\"]", "up.csv", "down.csv");
    let (stderr, _) = characterize_fails(&kit, &[("up.csv", INV_UP), ("down.csv", INV_DOWN)]);
    assert!(stderr.contains("not functionally complete"), "{stderr}");
}
