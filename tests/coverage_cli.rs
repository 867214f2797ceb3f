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
    // By hand: ribbon3 realises in one cell the 3 inverted literals, its six
    // two-input cells on 3 input pairs (18) and its eight symmetric
    // three-input cells (8): 29; nand-nor-inv 3 inverters + 3 NAND2 + 3 NOR2
    // = 9. The whole histogram is checked against the enumeration below.
    assert_eq!(libs[0]["one_cell"], 29);
    assert_eq!(libs[1]["one_cell"], 9);
    let ribbon3 = enumerated_histogram(&RIBBON3, 3);
    assert_eq!(ribbon3, [5, 29, 156, 66]);
    for (cost, &n) in ribbon3.iter().enumerate() {
        assert_eq!(
            libs[0]["histogram"][cost.to_string()],
            n,
            "ribbon3 cost {cost}"
        );
    }
    // nand-nor-inv needs up to 8 cells; the enumeration checks costs 0-3.
    let nand_nor = enumerated_histogram(&NAND_NOR_INV, 3);
    for (cost, &n) in nand_nor.iter().enumerate() {
        assert_eq!(
            libs[1]["histogram"][cost.to_string()],
            n,
            "nand-nor-inv cost {cost}"
        );
    }
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
    let dir = tempfile::tempdir().unwrap();
    Command::cargo_bin("ribbonmap")
        .unwrap()
        .env("RIBBONMAP_CACHE_DIR", dir.path())
        .args(["coverage", "--inputs", "7"])
        .assert()
        .code(2);
}

/// A symmetric cell: its arity and its function of packed truth tables.
type Cell = (usize, fn(&[u8]) -> u8);

/// ribbon3's cells (libraries/ribbon3.json), listed by hand; buf omitted
/// (it never lowers a cost).
const RIBBON3: [Cell; 15] = [
    (1, |x| !x[0]),
    (2, |x| x[0] & x[1]),
    (2, |x| !(x[0] & x[1])),
    (2, |x| x[0] | x[1]),
    (2, |x| !(x[0] | x[1])),
    (2, |x| x[0] ^ x[1]),
    (2, |x| !(x[0] ^ x[1])),
    (3, |x| x[0] & x[1] & x[2]),
    (3, |x| !(x[0] & x[1] & x[2])),
    (3, |x| x[0] | x[1] | x[2]),
    (3, |x| !(x[0] | x[1] | x[2])),
    (3, |x| (x[0] & x[1]) | (x[0] & x[2]) | (x[1] & x[2])),
    (3, |x| !((x[0] & x[1]) | (x[0] & x[2]) | (x[1] & x[2]))),
    (3, |x| x[0] ^ x[1] ^ x[2]),
    (3, |x| !(x[0] ^ x[1] ^ x[2])),
];

/// nand-nor-inv's cells, listed by hand.
const NAND_NOR_INV: [Cell; 3] = [
    (1, |x| !x[0]),
    (2, |x| !(x[0] & x[1])),
    (2, |x| !(x[0] | x[1])),
];

/// How many three-input functions need 0, 1, ..., `limit` cells, by
/// breadth-first enumeration of sets of distinct cell outputs (written for
/// this test, sharing nothing with the crate's SAT-based search).
fn enumerated_histogram(cells: &[Cell], limit: usize) -> Vec<u64> {
    const INPUTS: [u8; 3] = [0xAA, 0xCC, 0xF0];
    let mut cost = [usize::MAX; 256];
    for f in [0x00, 0xFF].into_iter().chain(INPUTS) {
        cost[usize::from(f)] = 0;
    }
    let mut layer: Vec<Vec<u8>> = vec![Vec::new()];
    for k in 1..=limit {
        let mut next = std::collections::BTreeSet::new();
        for made in &layer {
            let signals: Vec<u8> = INPUTS.iter().chain(made).copied().collect();
            let n = signals.len();
            let mut outs = Vec::new();
            for &(arity, f) in cells {
                // Every set of `arity` distinct signals (the cells are
                // symmetric).
                for i in 0..n {
                    if arity == 1 {
                        outs.push(f(&[signals[i]]));
                        continue;
                    }
                    for j in i + 1..n {
                        if arity == 2 {
                            outs.push(f(&[signals[i], signals[j]]));
                            continue;
                        }
                        for l in j + 1..n {
                            outs.push(f(&[signals[i], signals[j], signals[l]]));
                        }
                    }
                }
            }
            for g in outs {
                let slot = &mut cost[usize::from(g)];
                *slot = (*slot).min(k);
                if k < limit && !signals.contains(&g) && g != 0 && g != 0xFF {
                    let mut state = made.clone();
                    state.push(g);
                    state.sort_unstable();
                    next.insert(state);
                }
            }
        }
        layer = next.into_iter().collect();
    }
    (0..=limit)
        .map(|k| cost.iter().filter(|&&c| c == k).count() as u64)
        .collect()
}
