//! Broken library files in tests/data/bad-libraries are rejected, each with
//! the offending cell and field named, both through the API and through
//! `ribbonmap library check` (exit code 1, docs/exit-codes.md).

mod cache_support;

use assert_cmd::Command;
use ribbonmap::library::Library;
use std::path::PathBuf;

fn bad(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/data/bad-libraries")
        .join(format!("{name}.json"))
}

/// (file, cell, field, words the message must contain)
const CASES: &[(&str, Option<&str>, Option<&str>, &str)] = &[
    ("duplicate-names", Some("nand2"), Some("name"), "duplicate"),
    (
        "unused-input",
        Some("and2x"),
        Some("function"),
        "input 'c' is not used",
    ),
    ("negative-area", Some("nand2"), Some("area"), "negative"),
    (
        "negative-delay",
        Some("nand2"),
        Some("delay.per_load"),
        "negative",
    ),
    (
        "negative-leakage",
        Some("nand2"),
        Some("leakage"),
        "negative",
    ),
    (
        "bad-expression",
        Some("nand2"),
        Some("function"),
        "column 12",
    ),
    (
        "unknown-name-in-expression",
        Some("nand2"),
        Some("function"),
        "unknown name 'q'",
    ),
    (
        "unknown-cell-field",
        Some("nand2"),
        Some("colour"),
        "unknown field 'colour'",
    ),
    (
        "unknown-library-field",
        None,
        Some("vendor"),
        "unknown field 'vendor'",
    ),
    (
        "missing-delay",
        Some("nand2"),
        Some("delay"),
        "missing delay",
    ),
    (
        "not-complete-and-or",
        None,
        Some("cells"),
        "cannot build NOT",
    ),
    (
        "not-complete-xor-inv",
        None,
        Some("cells"),
        "cannot build AND",
    ),
    ("too-many-inputs", Some("and7"), Some("inputs"), "at most 6"),
    (
        "truth-too-wide",
        Some("nand2"),
        Some("truth"),
        "bits above row 3",
    ),
    (
        "function-and-truth",
        Some("nand2"),
        Some("truth"),
        "not both",
    ),
    (
        "leakage-rows",
        Some("nand2"),
        Some("leakage"),
        "4 input rows",
    ),
    ("wrong-format", None, Some("format"), "unsupported format"),
    (
        "wrong-type",
        Some("nand2"),
        Some("area"),
        "expected a number",
    ),
    ("not-json", None, None, "not valid JSON"),
];

#[test]
fn every_broken_file_is_rejected_naming_cell_and_field() {
    for &(file, cell, field, words) in CASES {
        let err = Library::load(&bad(file)).expect_err(file);
        assert!(!err.unreadable, "{file}");
        let found = err.problems.iter().any(|p| {
            p.cell.as_deref() == cell && p.field.as_deref() == field && p.message.contains(words)
        });
        assert!(
            found,
            "{file}: expected cell {cell:?} field {field:?} '{words}', got {:#?}",
            err.problems
        );
        // Every problem of these files carries a line and column.
        assert!(
            err.problems.iter().all(|p| p.line > 0 && p.column > 0),
            "{file}: {:#?}",
            err.problems
        );
    }
}

#[test]
fn positions_point_into_the_file() {
    // bad-expression.json line 32 is `      "function": "!(a & (b | )",`: the
    // expression starts at column 20 and its column 12 is file column 31.
    let err = Library::load(&bad("bad-expression")).unwrap_err();
    let p = &err.problems[0];
    assert_eq!((p.line, p.column), (32, 31));
    let text = std::fs::read_to_string(bad("bad-expression")).unwrap();
    let line = text.lines().nth(31).unwrap();
    assert_eq!(line.chars().nth(30), Some(')'));
    // serde_json's own position for a syntax error.
    let err = Library::load(&bad("not-json")).unwrap_err();
    assert_eq!((err.problems[0].line, err.problems[0].column), (5, 22));
}

#[test]
fn all_problems_are_listed() {
    let err = Library::load(&bad("many-problems")).unwrap_err();
    let cells: Vec<(&str, &str)> = err
        .problems
        .iter()
        .map(|p| {
            (
                p.cell.as_deref().unwrap_or(""),
                p.field.as_deref().unwrap_or(""),
            )
        })
        .collect();
    for expected in [
        ("inv", "area"),
        ("nand2", "speed"),
        ("and3", "function"),
        ("or2", "delay"),
    ] {
        assert!(
            cells.contains(&expected),
            "{expected:?} missing from {cells:?}"
        );
    }
    let mut cmd = Command::cargo_bin("ribbonmap").unwrap();
    cmd.env("RIBBONMAP_CACHE_DIR", cache_support::dir());
    let out = cmd
        .args(["library", "check"])
        .arg(bad("many-problems"))
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    let stdout = String::from_utf8_lossy(&out.stdout);
    for needle in [
        "cell 'inv', field 'area'",
        "cell 'nand2', field 'speed'",
        "cell 'and3', field 'function'",
        "cell 'or2', field 'delay'",
    ] {
        assert!(stdout.contains(needle), "missing {needle} in {stdout}");
    }
}

#[test]
fn check_exits_one_for_every_broken_file() {
    for &(file, cell, _, _) in CASES {
        let mut cmd = Command::cargo_bin("ribbonmap").unwrap();
        cmd.env("RIBBONMAP_CACHE_DIR", cache_support::dir());
        let out = cmd
            .args(["library", "check"])
            .arg(bad(file))
            .output()
            .unwrap();
        assert_eq!(out.status.code(), Some(1), "{file}");
        let stdout = String::from_utf8_lossy(&out.stdout);
        if let Some(cell) = cell {
            assert!(
                stdout.contains(&format!("cell '{cell}'")),
                "{file}: {stdout}"
            );
        }
    }
}

#[test]
fn check_exit_codes_for_sound_and_unreadable_files() {
    let dir = tempfile::tempdir().unwrap();
    let good = dir.path().join("good.json");
    std::fs::write(&good, ribbonmap::library::builtin_text("ribbon3").unwrap()).unwrap();
    let mut cmd = Command::cargo_bin("ribbonmap").unwrap();
    cmd.env("RIBBONMAP_CACHE_DIR", cache_support::dir());
    cmd.args(["library", "check"]).arg(&good).assert().code(0);
    let mut cmd = Command::cargo_bin("ribbonmap").unwrap();
    cmd.env("RIBBONMAP_CACHE_DIR", cache_support::dir());
    cmd.args(["library", "check"])
        .arg(dir.path().join("absent.json"))
        .assert()
        .code(2);
    // --format json lists the problems with cell and field.
    let mut cmd = Command::cargo_bin("ribbonmap").unwrap();
    cmd.env("RIBBONMAP_CACHE_DIR", cache_support::dir());
    let out = cmd
        .args(["library", "check", "--format", "json"])
        .arg(bad("negative-area"))
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["sound"], false);
    assert_eq!(v["problems"][0]["cell"], "nand2");
    assert_eq!(v["problems"][0]["field"], "area");
}

#[test]
fn loading_a_broken_library_for_mapping_is_bad_input() {
    // Other commands take --lib; a broken file there is bad input (exit 2).
    let err =
        ribbonmap::cli::common::load_library(bad("negative-area").to_str().unwrap()).unwrap_err();
    assert_eq!(err.exit_code(), 2);
    assert!(err.to_string().contains("negative-area.json:"));
    let err = ribbonmap::cli::common::load_library("no-such-lib").unwrap_err();
    assert_eq!(err.exit_code(), 2);
    assert!(ribbonmap::cli::common::load_library("cmos-le").is_ok());
}

/// The nand-nor-inv library with the inverter's function replaced.
fn library_with_inverter_function(function: &str) -> String {
    let text = std::fs::read_to_string(
        PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("libraries/nand-nor-inv.json"),
    )
    .unwrap();
    assert!(text.contains("\"function\": \"!a\""));
    text.replacen(
        "\"function\": \"!a\"",
        &format!("\"function\": \"{function}\""),
        1,
    )
}

fn ribbonmap(args: &[&str], file: &std::path::Path) -> std::process::Output {
    let cache = tempfile::tempdir().unwrap();
    Command::cargo_bin("ribbonmap")
        .unwrap()
        .env("RIBBONMAP_CACHE_DIR", cache.path())
        .args(args)
        .arg(file)
        .output()
        .unwrap()
}

/// A one-line `error: FILE:LINE:COL: ...` message, exit 2 (the project's
/// exit-code contract for bad input).
fn assert_located_bad_input(out: &std::process::Output, file: &std::path::Path, at: &str) {
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{stderr}");
    assert_eq!(stderr.lines().count(), 1, "{stderr}");
    let prefix = format!("error: {}:{at}", file.display());
    assert!(
        stderr.starts_with(&prefix),
        "expected {prefix}…, got {stderr}"
    );
}

#[test]
fn deeply_nested_function_is_refused_without_overflowing_the_stack() {
    // Issue 18, crash 4: a function nested about 8,000 parentheses deep
    // overflowed the stack in `library check` and `map --lib FILE`.
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("deep.json");
    let deep = format!("!{}a{}", "(".repeat(8000), ")".repeat(8000));
    std::fs::write(&file, library_with_inverter_function(&deep)).unwrap();
    // The inverter's function is on line 8 of the copied file, and the
    // message quotes only the start of the expression.
    // A reader limit refuses the file as bad input (exit 2, one line with
    // file:line:col, docs/exit-codes.md), in `library check` as in `map`.
    let out = ribbonmap(&["library", "check"], &file);
    assert_located_bad_input(&out, &file, "8:");
    assert!(
        String::from_utf8_lossy(&out.stderr).contains("nested more than 200 deep"),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let out = Command::cargo_bin("ribbonmap")
        .unwrap()
        .args(["map", "benchmarks/adder16_ripple.blif", "--lib"])
        .arg(&file)
        .output()
        .unwrap();
    assert_located_bad_input(&out, &file, "8:");
    assert!(String::from_utf8_lossy(&out.stderr).len() < 400);
    let chain = vec!["a"; 50_000].join(" ^ ");
    std::fs::write(
        &file,
        library_with_inverter_function(&format!("!({chain})")),
    )
    .unwrap();
    let out = ribbonmap(&["library", "check"], &file);
    assert_located_bad_input(&out, &file, "8:");
    assert!(String::from_utf8_lossy(&out.stderr).contains("operators deep"));
}

#[test]
fn empty_and_non_utf8_library_files_are_bad_input_at_a_position() {
    let dir = tempfile::tempdir().unwrap();
    let empty = dir.path().join("empty.json");
    std::fs::write(&empty, "").unwrap();
    assert_located_bad_input(&ribbonmap(&["library", "check"], &empty), &empty, "1:1: ");
    std::fs::write(&empty, "\n  \n").unwrap();
    assert_located_bad_input(&ribbonmap(&["library", "check"], &empty), &empty, "3:1: ");
    // A Latin-1 'é' (byte 0xE9) in the description on line 4.
    let latin1 = dir.path().join("latin1.json");
    let mut bytes = library_with_inverter_function("!a").into_bytes();
    let at = bytes.windows(4).position(|w| w == b"Two-").unwrap();
    bytes[at] = 0xE9;
    std::fs::write(&latin1, &bytes).unwrap();
    let out = ribbonmap(&["library", "check"], &latin1);
    assert_located_bad_input(&out, &latin1, "4:19: ");
    assert!(String::from_utf8_lossy(&out.stderr).contains("0xE9"));
}

#[test]
fn a_library_without_cells_names_the_missing_field() {
    // Killed a surviving mutant (the problem lost its field name): the
    // `cells` list is required (docs/library-format.md).
    let text = r#"{
  "format": "ribbonmap-library/1",
  "name": "empty",
  "units": {"area": "um2", "delay": "ns", "energy": "fJ", "power": "uW"}
}"#;
    let err = Library::from_json_str(text, "empty.json").unwrap_err();
    let problem = err
        .problems
        .iter()
        .find(|p| p.message.contains("missing: expected a list of cells"))
        .unwrap_or_else(|| panic!("{err}"));
    assert_eq!(problem.field.as_deref(), Some("cells"));
    assert_eq!(problem.cell, None);
}

#[test]
fn a_wrong_type_names_the_json_type_found() {
    // wrong-type.json with nand2's area replaced, through serde_json alone,
    // by a value of each other JSON type (RFC 8259 section 3: null, false,
    // true, strings, arrays, objects); the message names the type found.
    let text = std::fs::read_to_string(bad("wrong-type")).unwrap();
    let json: serde_json::Value = serde_json::from_str(&text).unwrap();
    let cases = [
        (serde_json::json!(null), "null"),
        (serde_json::json!(true), "a boolean"),
        (serde_json::json!("ten"), "a string"),
        (serde_json::json!([10]), "a list"),
        (serde_json::json!({"value": 10}), "an object"),
    ];
    for (value, found) in cases {
        let mut edited = json.clone();
        edited["cells"][1]["area"] = value;
        let err = Library::from_json_str(&edited.to_string(), "edited.json").unwrap_err();
        let want = format!("expected a number, found {found}");
        assert!(
            err.problems
                .iter()
                .any(|p| p.cell.as_deref() == Some("nand2")
                    && p.field.as_deref() == Some("area")
                    && p.message == want),
            "{found}: {:#?}",
            err.problems
        );
    }
}

#[test]
fn a_missing_units_block_or_function_names_its_field() {
    // docs/library-format.md: `units` is required, and a cell gives its
    // function as `function` or `truth`. Removed through serde_json alone,
    // each problem names the missing field (and the cell, for a cell field).
    let text = std::fs::read_to_string(bad("wrong-type")).unwrap();
    let mut json: serde_json::Value = serde_json::from_str(&text).unwrap();
    json["cells"][1]["area"] = serde_json::json!(10.0);
    let mut no_units = json.clone();
    no_units.as_object_mut().unwrap().remove("units");
    let err = Library::from_json_str(&no_units.to_string(), "x.json").unwrap_err();
    assert!(
        err.problems
            .iter()
            .any(|p| p.cell.is_none() && p.field.as_deref() == Some("units")),
        "{:#?}",
        err.problems
    );
    let mut no_function = json;
    no_function["cells"][1]
        .as_object_mut()
        .unwrap()
        .remove("function");
    let err = Library::from_json_str(&no_function.to_string(), "x.json").unwrap_err();
    assert!(
        err.problems
            .iter()
            .any(|p| p.cell.as_deref() == Some("nand2")
                && p.field.as_deref() == Some("function")
                && p.message.contains("missing")),
        "{:#?}",
        err.problems
    );
}
