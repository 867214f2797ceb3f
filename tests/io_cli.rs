//! Netlist formats on the command line: AIGER output of `generate` and
//! `map` read back everywhere, the library a mapped netlist's header
//! records, the constant nets of written BLIF, and `--max-nets`.
//!
//! Outside checks: the 8-bit adder is compared by `equiv` (a proof) with
//! the same circuit in BLIF; the bound's reproducer (a doubling hierarchy,
//! 2^10 leaves against a bound of 1000) is sized by integer arithmetic.

use assert_cmd::Command;
use std::path::Path;

fn run(dir: &Path, args: &[&str]) -> std::process::Output {
    Command::cargo_bin("ribbonmap")
        .unwrap()
        .env("RIBBONMAP_CACHE_DIR", dir.join("cache"))
        .current_dir(dir)
        .args(args)
        .output()
        .unwrap()
}

fn ok(out: &std::process::Output) -> String {
    assert!(
        out.status.success(),
        "exit {:?}: {}",
        out.status.code(),
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8_lossy(&out.stdout).into_owned()
}

#[test]
fn generated_aiger_reads_back_equal_in_both_encodings() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    ok(&run(
        d,
        &["generate", "adder", "--width", "8", "-o", "a.blif"],
    ));
    for file in ["a.aag", "a.aig"] {
        ok(&run(d, &["generate", "adder", "--width", "8", "-o", file]));
        let out = run(d, &["equiv", "a.blif", file]);
        assert_eq!(
            out.status.code(),
            Some(0),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        let summary = ok(&run(d, &["inspect", file, "--format", "json"]));
        let v: serde_json::Value = serde_json::from_str(&summary).unwrap();
        assert_eq!(v["inputs"], 16);
        assert_eq!(v["outputs"], 9);
    }
    let text = std::fs::read_to_string(d.join("a.aag")).unwrap();
    assert!(text.starts_with("aag "));
    assert!(
        text.contains("\nc\n"),
        "the description goes into the comment section"
    );
}

#[test]
fn mapped_netlists_record_their_library_and_aiger_keeps_their_logic() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    ok(&run(
        d,
        &["generate", "adder", "--width", "4", "-o", "a.blif"],
    ));
    for out in ["m.blif", "m.v", "m.aig"] {
        ok(&run(d, &["map", "a.blif", "--lib", "ribbon2", "-o", out]));
    }
    // Without --lib, the header's library is used and a note says so.
    for file in ["m.blif", "m.v"] {
        let out = run(d, &["inspect", file]);
        ok(&out);
        let err = String::from_utf8_lossy(&out.stderr);
        assert!(
            err.contains("library 'ribbon2' recorded in the header"),
            "{err}"
        );
        let out = run(d, &["equiv", "a.blif", file]);
        assert_eq!(
            out.status.code(),
            Some(0),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
    }
    let out = run(d, &["equiv", "a.blif", "m.aig"]);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
}

#[test]
fn written_blif_names_constant_nets_its_own_way() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    // Outputs tied to constants, and a net already called const1.
    std::fs::write(
        d.join("c.blif"),
        ".model c\n.inputs a const1\n.outputs y z w\n.names y\n1\n.names z\n.names a const1 w\n11 1\n.end\n",
    )
    .unwrap();
    ok(&run(d, &["map", "c.blif", "-o", "m.blif"]));
    let text = std::fs::read_to_string(d.join("m.blif")).unwrap();
    assert!(!text.contains('$'), "{text}");
    assert!(text.contains(".names const1_1\n1\n"), "{text}");
    let out = run(d, &["equiv", "c.blif", "m.blif"]);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
}

#[test]
fn max_nets_bounds_and_raises() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    // m_k instantiates m_(k-1) twice: 2^10 leaves.
    let mut v = String::from("module m_0(a, y); input a; output y; assign y = ~a; endmodule\n");
    for k in 1..=10 {
        v.push_str(&format!(
            "module m_{k}(a, y); input a; output y; wire t; m_{} u1(a, t); m_{} u2(t, y); endmodule\n",
            k - 1,
            k - 1
        ));
    }
    std::fs::write(d.join("h.v"), v).unwrap();
    let out = run(d, &["inspect", "h.v", "--max-nets", "1000"]);
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.starts_with("error: h.v:"), "{err}");
    assert!(
        err.contains("module 'm_") && err.contains("limit of 1000"),
        "{err}"
    );
    assert_eq!(err.lines().count(), 1);
    ok(&run(d, &["inspect", "h.v"]));
    let out = run(d, &["inspect", "h.v", "--max-nets", "0"]);
    assert_eq!(out.status.code(), Some(2));
}
