//! `ribbonmap equiv` from the outside: exit codes, JSON fields and errors
//! (docs/json-output.md, docs/exit-codes.md). Netlists: the ISCAS-85 c17 pair
//! (tests/data/reference/netlists/iscas85, circuitgraph 0.2.1 via
//! PROVENANCE.md) and small variants of it written here.

use assert_cmd::Command;
use std::path::PathBuf;

fn reference(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/data/reference/netlists/iscas85")
        .join(name)
}

fn ribbonmap() -> Command {
    Command::cargo_bin("ribbonmap").unwrap()
}

/// c17 with gate NAND2_5 turned into an AND (output N22 changes).
const C17_BROKEN: &str = "module c17(N1, N2, N3, N6, N7, N22, N23);
  input N1, N2, N3, N6, N7;
  output N22, N23;
  wire N10, N11, N16, N19;
  nand NAND2_1 (N10, N1, N3);
  nand NAND2_2 (N11, N3, N6);
  nand NAND2_3 (N16, N2, N11);
  nand NAND2_4 (N19, N11, N7);
  and NAND2_5 (N22, N10, N16);
  nand NAND2_6 (N23, N16, N19);
endmodule
";

/// c17 with output N23 renamed to N99.
const C17_RENAMED: &str = "module c17(N1, N2, N3, N6, N7, N22, N99);
  input N1, N2, N3, N6, N7;
  output N22, N99;
  wire N10, N11, N16, N19;
  nand NAND2_1 (N10, N1, N3);
  nand NAND2_2 (N11, N3, N6);
  nand NAND2_3 (N16, N2, N11);
  nand NAND2_4 (N19, N11, N7);
  nand NAND2_5 (N22, N10, N16);
  nand NAND2_6 (N99, N16, N19);
endmodule
";

#[test]
fn equivalent_pair_exits_0_with_json_fields() {
    // c17 and c17g are equivalent with ports matched by name (PROVENANCE.md).
    let out = ribbonmap()
        .args(["equiv", "--format", "json"])
        .arg(reference("c17.v"))
        .arg(reference("c17g.v"))
        .output()
        .unwrap();
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let json: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(json["verdict"], "equivalent");
    assert_eq!(json["outputs_checked"], 2); // c17 has 2 outputs (Hansen et al. 1999)
    assert!(json.get("counterexample").is_none());
}

#[test]
fn different_pair_exits_1_with_a_counterexample() {
    let dir = tempfile::tempdir().unwrap();
    let broken = dir.path().join("c17_broken.v");
    std::fs::write(&broken, C17_BROKEN).unwrap();
    let out = ribbonmap()
        .args(["equiv", "--format", "json"])
        .arg(reference("c17.v"))
        .arg(&broken)
        .output()
        .unwrap();
    assert_eq!(
        out.status.code(),
        Some(1),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let json: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(json["verdict"], "different");
    assert_eq!(json["outputs_checked"], 2);
    let cex = &json["counterexample"];
    assert_eq!(cex["differing_outputs"], serde_json::json!(["N22"]));
    // Check the counterexample by hand: N22 = NAND(N10, N16) in c17 and
    // AND(N10, N16) in the broken copy always differ, so any assignment
    // does; the inputs must all be listed as 0 or 1.
    let inputs = cex["inputs"].as_object().unwrap();
    assert_eq!(inputs.len(), 5);
    assert!(inputs.values().all(|v| v == 0 || v == 1));

    // The text report shows the values in a table.
    let out = ribbonmap()
        .arg("equiv")
        .arg(reference("c17.v"))
        .arg(&broken)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(text.starts_with("different"), "{text}");
    assert!(text.contains("N22"), "{text}");
}

#[test]
fn unmatched_ports_exit_2_and_are_listed() {
    let dir = tempfile::tempdir().unwrap();
    let renamed = dir.path().join("c17_renamed.v");
    std::fs::write(&renamed, C17_RENAMED).unwrap();
    let out = ribbonmap()
        .arg("equiv")
        .arg(reference("c17.v"))
        .arg(&renamed)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.starts_with("error:"), "{err}");
    assert!(err.contains("output 'N23' of the first netlist"), "{err}");
    assert!(err.contains("output 'N99' of the second netlist"), "{err}");

    // By order, or with a port map, the renamed copy is equivalent.
    let out = ribbonmap()
        .args(["equiv", "--ports", "order"])
        .arg(reference("c17.v"))
        .arg(&renamed)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0));
    let map = dir.path().join("ports.map");
    std::fs::write(&map, "# A name, B name\nN23 N99\n").unwrap();
    let out = ribbonmap()
        .args(["equiv", "--ports"])
        .arg(&map)
        .arg(reference("c17.v"))
        .arg(&renamed)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0));
}

#[test]
fn bad_input_exits_2() {
    let dir = tempfile::tempdir().unwrap();
    let out = ribbonmap()
        .arg("equiv")
        .arg(reference("c17.v"))
        .arg(dir.path().join("missing.v"))
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    let map = dir.path().join("bad.map");
    std::fs::write(&map, "N1 N1\nN2\n").unwrap();
    let out = ribbonmap()
        .args(["equiv", "--ports"])
        .arg(&map)
        .arg(reference("c17.v"))
        .arg(reference("c17g.v"))
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("bad.map:2:3"), "{err}");
}
