//! The match table kept on disk between processes (`mapper::table_cache`):
//! with `RIBBONMAP_CACHE_DIR` set, the first `map` writes the table, the
//! second reads it, and both print the same mapping. The expected netlist
//! is the first run's own output; the outside check is the proof each run
//! reports (`verified: proven`).

use assert_cmd::Command;

fn map_json(cache: &std::path::Path) -> serde_json::Value {
    let out = Command::cargo_bin("ribbonmap")
        .unwrap()
        .env("RIBBONMAP_CACHE_DIR", cache)
        .args(["map", "benchmarks/adder8_ripple.blif", "--format", "json"])
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).unwrap()
}

#[test]
fn a_cached_table_maps_like_a_fresh_one() {
    let dir = tempfile::tempdir().unwrap();
    let cold = map_json(dir.path());
    let files: Vec<_> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|n| n.starts_with("match-table-"))
        .collect();
    // One table per library the mapping used: ribbon3 and the built-in
    // libraries it contains (ribbon3-nomaj, ribbon2), whose runs join the
    // goal's pool (mapper::runs).
    assert_eq!(files.len(), 3, "{files:?}");
    let warm = map_json(dir.path());
    for field in ["cells", "cell_count", "area", "delay", "depth", "verified"] {
        assert_eq!(cold[field], warm[field], "{field}");
    }
    assert_eq!(warm["verified"], "proven");
}
