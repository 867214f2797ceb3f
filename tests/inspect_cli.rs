//! `ribbonmap inspect` driven as a program: port counts of reference
//! netlists (sources named at each check), JSON contract fields, exit code 2
//! with a located one-line error for every malformed file in tests/data/bad.

use assert_cmd::Command;

fn inspect(args: &[&str]) -> std::process::Output {
    Command::cargo_bin("ribbonmap")
        .unwrap()
        .arg("inspect")
        .args(args)
        .output()
        .unwrap()
}

fn json(args: &[&str]) -> serde_json::Value {
    let out = inspect(args);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).unwrap()
}

#[test]
fn json_has_contract_fields_and_published_port_counts() {
    // c432: 36 inputs, 7 outputs (Hansen, Yalcin and Hayes 1999, via PROVENANCE.md).
    let v = json(&[
        "tests/data/reference/netlists/iscas85/c432.v",
        "--format",
        "json",
    ]);
    assert_eq!(v["inputs"], 36);
    assert_eq!(v["outputs"], 7);
    assert_eq!(v["storage"], 0);
    for k in ["and", "xor", "maj"] {
        assert!(v["nodes"][k].is_u64(), "nodes.{k}");
    }
    assert!(v["depth"].as_u64().unwrap() > 0);
    assert!(v["largest_output_support"]["inputs"].as_u64().unwrap() <= 36);
    assert!(v["largest_fanout"]["fanout"].as_u64().unwrap() >= 1);
    // EPFL dec: 8 inputs, 256 outputs (PROVENANCE.md); an 8-to-256 decoder's
    // every output depends on all 8 inputs.
    let v = json(&[
        "tests/data/reference/netlists/epfl/dec.v",
        "--format",
        "json",
    ]);
    assert_eq!(
        (v["inputs"].as_u64(), v["outputs"].as_u64()),
        (Some(8), Some(256))
    );
    assert_eq!(v["largest_output_support"]["inputs"], 8);
}

#[test]
fn s27_needs_and_accepts_storage_cells() {
    // ISCAS-89 s27: flip-flops are instances of the undefined cell 'ff'
    // (PROVENANCE.md); three of them in the file.
    let path = "tests/data/reference/netlists/iscas89/s27.v";
    let out = inspect(&[path]);
    assert_eq!(out.status.code(), Some(2));
    let v = json(&[path, "--storage", "ff:D:Q:CK", "--format", "json"]);
    assert_eq!(v["storage"], 3);
}

#[test]
fn stdin_with_input_format() {
    let text = std::fs::read("tests/data/reference/netlists/arith/rca8_flat.blif").unwrap();
    let out = Command::cargo_bin("ribbonmap")
        .unwrap()
        .args(["inspect", "-", "--input-format", "blif", "--format", "json"])
        .write_stdin(text)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    // ariths-gen rca8: 16 inputs, 9-bit sum (PROVENANCE.md).
    assert_eq!(
        (v["inputs"].as_u64(), v["outputs"].as_u64()),
        (Some(16), Some(9))
    );
}

#[test]
fn text_report_and_unsupported_format() {
    let out = inspect(&["tests/data/reference/netlists/iscas85/c17.v"]);
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(
        text.contains("inputs") && text.contains("largest fanout"),
        "{text}"
    );
    let out = inspect(&[
        "tests/data/reference/netlists/iscas85/c17.v",
        "--format",
        "csv",
    ]);
    assert_eq!(out.status.code(), Some(2));
    // The refusal lists exactly the formats inspect prints.
    assert!(
        String::from_utf8_lossy(&out.stderr).contains("[possible values: text, json]"),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
}

#[test]
fn help_explains_every_option() {
    let out = inspect(&["--help"]);
    assert!(out.status.success());
    let help = String::from_utf8(out.stdout).unwrap();
    for opt in [
        "--format",
        "--lib",
        "--input-format",
        "--top",
        "--storage",
        "NETLIST",
    ] {
        assert!(help.contains(opt), "help lacks {opt}:\n{help}");
    }
}

#[test]
fn malformed_files_exit_2_with_located_error() {
    let manifest = std::fs::read_to_string("tests/data/bad/expected.txt").unwrap();
    let mut checked = 0;
    for line in manifest
        .lines()
        .filter(|l| !l.starts_with('#') && !l.trim().is_empty())
    {
        let mut parts = line.split_whitespace();
        let file = parts.next().unwrap();
        let want: u32 = parts.next().unwrap().parse().unwrap();
        let path = format!("tests/data/bad/{file}");
        let extra: Vec<&str> = parts.collect();
        let mut args = vec![path.as_str()];
        args.extend(extra);
        let out = inspect(&args);
        assert_eq!(out.status.code(), Some(2), "{file}");
        let stderr = String::from_utf8_lossy(&out.stderr);
        let first = stderr.lines().next().unwrap_or("");
        let prefix = format!("error: {path}:{want}:");
        assert!(
            first.starts_with(&prefix),
            "{file}: expected '{prefix}...', got '{first}'"
        );
        assert_eq!(stderr.lines().count(), 1, "{file}: one-line error expected");
        checked += 1;
    }
    assert!(checked >= 15);
}
