//! `ribbonmap coverage` end to end: JSON contract, the cache (second run
//! from cache, `--no-cache` recomputes), side-by-side formats.

use assert_cmd::Command;

fn coverage(cache: &std::path::Path, args: &[&str]) -> serde_json::Value {
    let out = Command::cargo_bin("ribbonmap")
        .unwrap()
        .env("RIBBONMAP_CACHE_DIR", cache)
        .arg("coverage")
        .args(args)
        .assert()
        .success();
    serde_json::from_slice(&out.get_output().stdout).unwrap()
}

#[test]
fn three_input_coverage_is_cached_and_consistent() {
    let dir = tempfile::tempdir().unwrap();
    let args = [
        "--lib",
        "ribbon3",
        "--lib",
        "nand-nor-inv",
        "--inputs",
        "3",
        "--format",
        "json",
    ];
    let first = coverage(dir.path(), &args);
    let libs = first["libraries"].as_array().unwrap();
    assert_eq!(libs.len(), 2);
    for lib in libs {
        assert_eq!(lib["inputs"], 3);
        assert_eq!(lib["functions"], 256);
        let total: u64 = lib["histogram"]
            .as_object()
            .unwrap()
            .values()
            .map(|v| v.as_u64().unwrap())
            .sum();
        // Every one of the 2^8 functions is counted once (integer arithmetic).
        assert_eq!(total, 256);
        // Constants and the three literals cost nothing.
        assert_eq!(lib["histogram"]["0"], 5);
        assert_eq!(lib["cached"], false);
    }
    // ribbon3 realises in one cell: 3 inverted literals, and the 2- and
    // 3-input cells over every choice of inputs (each counted by the
    // functions they produce; checked against the library list).
    assert!(libs[0]["one_cell"].as_u64().unwrap() > libs[1]["one_cell"].as_u64().unwrap());
    let second = coverage(dir.path(), &args);
    for (a, b) in first["libraries"]
        .as_array()
        .unwrap()
        .iter()
        .zip(second["libraries"].as_array().unwrap())
    {
        assert_eq!(a["histogram"], b["histogram"]);
        assert_eq!(b["cached"], true);
    }
    let mut again = args.to_vec();
    again.push("--no-cache");
    let third = coverage(dir.path(), &again);
    assert_eq!(third["libraries"][0]["cached"], false);
    assert_eq!(
        third["libraries"][0]["histogram"],
        first["libraries"][0]["histogram"]
    );
}

#[test]
fn text_markdown_csv_side_by_side() {
    let dir = tempfile::tempdir().unwrap();
    for format in ["text", "markdown", "csv", "latex"] {
        let out = Command::cargo_bin("ribbonmap")
            .unwrap()
            .env("RIBBONMAP_CACHE_DIR", dir.path())
            .args([
                "coverage",
                "--lib",
                "ribbon3",
                "--lib",
                "ribbon3-nomaj",
                "--inputs",
                "3",
            ])
            .args(["--format", format])
            .assert()
            .success();
        let text = String::from_utf8(out.get_output().stdout.clone()).unwrap();
        assert!(text.contains("ribbon3-nomaj"), "{format}: {text}");
        assert!(text.contains("one cell"), "{format}: {text}");
    }
}

#[test]
fn bad_inputs_exit_2() {
    Command::cargo_bin("ribbonmap")
        .unwrap()
        .args(["coverage", "--inputs", "7"])
        .assert()
        .code(2);
}
