//! Coverage tables against outside references: circuitdb 2.0.0 gate counts
//! (tests/data/reference/exact/min-gates-3input.json) and Knuth's table of
//! four-input function costs (TAOCP Vol. 4A, 7.1.2, from memory via
//! PROVENANCE.md).

use ribbonmap::exact::{coverage, CoverageOptions, GateSpec};
use std::collections::BTreeMap;

fn all_two_input_gates() -> Vec<GateSpec> {
    (0..16u64)
        .map(|t| GateSpec::new(format!("f{t:X}"), 2, t, 1.0))
        .collect()
}

#[test]
fn three_input_coverage_matches_circuitdb_histogram() {
    // Source: circuitdb 2.0.0 (PyPI, MIT), min-gates-3input.json via
    // PROVENANCE.md, basis "every" (all two-input functions plus NOT).
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/data/reference/exact/min-gates-3input.json"
    ))
    .unwrap();
    let data: serde_json::Value = serde_json::from_str(&text).unwrap();
    let counts = data["min_gates"]["every"].as_array().unwrap();
    let mut expected: BTreeMap<usize, u64> = BTreeMap::new();
    for count in &counts[1..255] {
        *expected
            .entry(count.as_u64().unwrap() as usize)
            .or_insert(0) += 1;
    }
    // Constants cost 0 here; the dataset's constant entries are left out.
    *expected.entry(0).or_insert(0) += 2;
    let mut gates = all_two_input_gates();
    gates.push(GateSpec::new("not", 1, 0b01, 1.0));
    let table = coverage(
        "every",
        &gates,
        &CoverageOptions {
            inputs: 3,
            use_cache: false,
            ..CoverageOptions::default()
        },
    )
    .unwrap();
    assert_eq!(table.functions, 256);
    assert_eq!(table.unsolved, 0);
    assert_eq!(table.unproven, 0);
    assert_eq!(table.histogram, expected);
    assert_eq!(table.one_cell, expected[&1]);
    // 14 NPN classes of three inputs (OEIS A000370 via PROVENANCE.md).
    assert_eq!(table.npn_classes.len(), 14);
}

#[test]
#[cfg_attr(
    debug_assertions,
    ignore = "heavy: 222 four-input classes by SAT; runs in release builds (cargo test --release)"
)]
fn four_input_costs_over_the_full_binary_basis_match_knuth() {
    // Knuth, TAOCP Vol. 4A, section 7.1.2 (from memory, via PROVENANCE.md):
    // minimum two-input gate counts of all 65536 four-input functions with
    // complements free.
    let table = coverage(
        "all-two-input",
        &all_two_input_gates(),
        &CoverageOptions {
            inputs: 4,
            free_complements: true,
            use_cache: false,
            ..CoverageOptions::default()
        },
    )
    .unwrap();
    let expected: BTreeMap<usize, u64> = [
        (0, 10),
        (1, 60),
        (2, 456),
        (3, 2474),
        (4, 10624),
        (5, 24184),
        (6, 25008),
        (7, 2720),
    ]
    .into_iter()
    .collect();
    assert_eq!(table.classes.len(), 222);
    assert_eq!(table.unproven, 0);
    assert_eq!(table.histogram, expected);
    eprintln!("knuth table: {:.1} s", table.seconds);
}
