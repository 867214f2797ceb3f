//! The match table kept on disk between processes (`mapper::table_cache`):
//! in `RIBBONMAP_CACHE_DIR` when set (else the user's cache folder), the first `map` writes the table, the
//! second reads it, and both print the same mapping. The expected netlist
//! is the first run's own output; the outside check is the proof each run
//! reports (`verified: proven`). Damaged files are ignored and rewritten.

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

fn map_with_env(env: &[(&str, &std::path::Path)], no_cache: bool) {
    let mut cmd = Command::cargo_bin("ribbonmap").unwrap();
    cmd.env_remove("RIBBONMAP_CACHE_DIR")
        .env_remove("XDG_CACHE_HOME")
        .env_remove("RIBBONMAP_NO_CACHE");
    for (k, v) in env {
        cmd.env(k, v);
    }
    if no_cache {
        cmd.env("RIBBONMAP_NO_CACHE", "1");
    }
    let out = cmd
        .args(["map", "benchmarks/adder8_ripple.blif"])
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
}

fn tables_in(dir: &std::path::Path) -> usize {
    std::fs::read_dir(dir).map_or(0, |d| {
        d.filter(|e| {
            e.as_ref()
                .unwrap()
                .file_name()
                .to_string_lossy()
                .starts_with("match-table-")
        })
        .count()
    })
}

/// Without `RIBBONMAP_CACHE_DIR` the command line keeps its tables in the
/// user's cache folder (XDG base directory layout, common practice:
/// `$XDG_CACHE_HOME/ribbonmap`, else `$HOME/.cache/ribbonmap`), here a
/// temporary stand-in for both; `RIBBONMAP_NO_CACHE` writes nothing.
#[test]
fn the_user_cache_folder_is_the_default_and_can_be_turned_off() {
    let xdg = tempfile::tempdir().unwrap();
    let home = tempfile::tempdir().unwrap();
    map_with_env(
        &[("XDG_CACHE_HOME", xdg.path()), ("HOME", home.path())],
        false,
    );
    assert_eq!(tables_in(&xdg.path().join("ribbonmap")), 3);
    map_with_env(&[("HOME", home.path())], false);
    assert_eq!(tables_in(&home.path().join(".cache").join("ribbonmap")), 3);
    let off = tempfile::tempdir().unwrap();
    map_with_env(
        &[("XDG_CACHE_HOME", off.path()), ("HOME", off.path())],
        true,
    );
    assert_eq!(tables_in(&off.path().join("ribbonmap")), 0);
    assert_eq!(tables_in(&off.path().join(".cache").join("ribbonmap")), 0);
}

/// A damaged cache file is ignored, never trusted: with every table file
/// truncated, emptied or with one byte changed, `map` still proves the same
/// mapping (outside check: the proof, `verified: proven`) and rewrites each
/// file whole (the same bytes as the first run wrote, since the build is
/// deterministic).
#[test]
fn damaged_cache_files_are_ignored_and_rewritten() {
    let dir = tempfile::tempdir().unwrap();
    let first = map_json(dir.path());
    let mut files: Vec<_> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| {
            p.file_name()
                .unwrap()
                .to_string_lossy()
                .starts_with("match-table-")
        })
        .collect();
    files.sort();
    assert_eq!(files.len(), 3, "{files:?}");
    let good: Vec<Vec<u8>> = files.iter().map(|p| std::fs::read(p).unwrap()).collect();
    type Damage = fn(&[u8]) -> Vec<u8>;
    let damages: [(&str, Damage); 3] = [
        ("truncated", |b| b[..b.len() / 3].to_vec()),
        ("empty", |_| Vec::new()),
        ("one byte changed", |b| {
            let mut b = b.to_vec();
            let at = b.len() * 2 / 3;
            b[at] ^= 0x40;
            b
        }),
    ];
    for (what, damage) in damages {
        for (p, g) in files.iter().zip(&good) {
            std::fs::write(p, damage(g)).unwrap();
        }
        let again = map_json(dir.path());
        for field in ["cells", "cell_count", "area", "delay", "depth"] {
            assert_eq!(first[field], again[field], "{what}: {field}");
        }
        assert_eq!(again["verified"], "proven", "{what}");
        for (p, g) in files.iter().zip(&good) {
            assert!(std::fs::read(p).unwrap() == *g, "{what}: {p:?} rewritten");
        }
    }
}
