//! Exact synthesis against outside references: the smallest-circuit gate
//! counts of circuitdb 2.0.0 (tests/data/reference/exact/min-gates-3input.json,
//! via PROVENANCE.md), and full-adder / majority facts checked by simulation.

use ribbonmap::exact::{synthesize, ExactOptions, ExactResult, GateSpec, Objective};

fn reference() -> serde_json::Value {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/data/reference/exact/min-gates-3input.json"
    ))
    .expect("reference file");
    serde_json::from_str(&text).expect("reference JSON")
}

/// The gate sets the dataset names, every gate costing 1.
fn basis(name: &str) -> Vec<GateSpec> {
    let not = GateSpec::new("not", 1, 0b01, 1.0);
    match name {
        "every" => {
            let mut g: Vec<GateSpec> = (0..16u64)
                .map(|t| GateSpec::new(format!("f{t:X}"), 2, t, 1.0))
                .collect();
            g.push(not);
            g
        }
        "and-or-not" => vec![
            GateSpec::new("and2", 2, 0x8, 1.0),
            GateSpec::new("or2", 2, 0xE, 1.0),
            not,
        ],
        "and-xor-not" => vec![
            GateSpec::new("and2", 2, 0x8, 1.0),
            GateSpec::new("xor2", 2, 0x6, 1.0),
            not,
        ],
        other => panic!("unknown basis {other}"),
    }
}

fn check_simulates(result: &ExactResult, gates: &[GateSpec], functions: &[u64]) {
    assert_eq!(result.simulate(gates), functions, "{:?}", result.netlist());
    // Independent re-simulation through the logic network.
    let net = result.to_network(gates);
    assert_eq!(net.output_truth_tables().unwrap(), functions);
}

#[test]
fn minimum_gate_counts_match_circuitdb_for_all_three_input_functions() {
    // Source: circuitdb 2.0.0 (PyPI, MIT), min-gates-3input.json via PROVENANCE.md.
    let data = reference();
    for basis_name in ["every", "and-or-not", "and-xor-not"] {
        let expected = data["min_gates"][basis_name].as_array().unwrap();
        let gates = basis(basis_name);
        let opts = ExactOptions {
            max_steps: 10,
            ..ExactOptions::default()
        };
        for t in 1u64..255 {
            let result = synthesize(&[t], 3, &gates, &opts).unwrap();
            check_simulates(&result, &gates, &[t]);
            assert!(result.optimal);
            assert_eq!(
                result.cells as u64,
                expected[t as usize].as_u64().unwrap(),
                "basis {basis_name}, function 0x{t:02X}: {:?}",
                result.netlist()
            );
        }
    }
}

/// A gate set like ribbon3: every cell costs one.
fn ribbon_like(with_majority: bool) -> Vec<GateSpec> {
    let mut g = vec![
        GateSpec::new("inv", 1, 0b01, 1.0),
        GateSpec::new("buf", 1, 0b10, 1.0),
        GateSpec::new("and2", 2, 0x8, 1.0),
        GateSpec::new("nand2", 2, 0x7, 1.0),
        GateSpec::new("or2", 2, 0xE, 1.0),
        GateSpec::new("nor2", 2, 0x1, 1.0),
        GateSpec::new("xor2", 2, 0x6, 1.0),
        GateSpec::new("xnor2", 2, 0x9, 1.0),
        GateSpec::new("and3", 3, 0x80, 1.0),
        GateSpec::new("nand3", 3, 0x7F, 1.0),
        GateSpec::new("or3", 3, 0xFE, 1.0),
        GateSpec::new("nor3", 3, 0x01, 1.0),
        GateSpec::new("xor3", 3, 0x96, 1.0),
        GateSpec::new("xnor3", 3, 0x69, 1.0),
    ];
    if with_majority {
        g.push(GateSpec::new("maj3", 3, 0xE8, 1.0));
        g.push(GateSpec::new("minority3", 3, 0x17, 1.0));
    }
    g
}

#[test]
fn full_adder_takes_majority_and_xor3() {
    let gates = ribbon_like(true);
    let functions = [0x96, 0xE8];
    let result = synthesize(&functions, 3, &gates, &ExactOptions::default()).unwrap();
    check_simulates(&result, &gates, &functions);
    assert!(result.optimal);
    assert_eq!(result.cells, 2);
    let mut cells: Vec<&str> = result.steps.iter().map(|s| s.cell.as_str()).collect();
    cells.sort();
    assert_eq!(cells, ["maj3", "xor3"]);
}

#[test]
fn majority_without_majority_cells_is_proven_minimal() {
    let gates = ribbon_like(false);
    let result = synthesize(&[0xE8], 3, &gates, &ExactOptions::default()).unwrap();
    check_simulates(&result, &gates, &[0xE8]);
    assert!(result.optimal);
    // One step fewer is impossible: the search capped at that many steps fails.
    let fewer = ExactOptions {
        max_steps: result.cells - 1,
        ..ExactOptions::default()
    };
    assert!(matches!(
        synthesize(&[0xE8], 3, &gates, &fewer),
        Err(ribbonmap::exact::ExactError::NotFound(_))
    ));
    // The minimum is four cells, e.g. or3(and2(a,b), and2(a,c), and2(b,c))
    // (by hand); that three cannot do is confirmed by the exhaustive
    // enumeration below, which shares no code with the SAT search.
    assert_eq!(result.cells, 4, "{:?}", result.netlist());
    assert_eq!(fewest_symmetric_cells(0xE8, 4), Some(4));
}

/// The fewest cells of `ribbon_like(false)` (listed again here by their
/// functions: inverter, AND, NAND, OR, NOR, XOR, XNOR of two and of three
/// signals; buf never helps) computing the three-input function `target`,
/// by breadth-first enumeration of every set of at most `limit` distinct
/// cell outputs; `None` if more are needed.
fn fewest_symmetric_cells(target: u8, limit: usize) -> Option<usize> {
    const INPUTS: [u8; 3] = [0xAA, 0xCC, 0xF0];
    if INPUTS.contains(&target) {
        return Some(0);
    }
    let two = |x: u8, y: u8| [x & y, !(x & y), x | y, !(x | y), x ^ y, !(x ^ y)];
    let three = |x: u8, y: u8, z: u8| {
        [
            x & y & z,
            !(x & y & z),
            x | y | z,
            !(x | y | z),
            x ^ y ^ z,
            !(x ^ y ^ z),
        ]
    };
    let mut layer: Vec<Vec<u8>> = vec![Vec::new()];
    for k in 1..=limit {
        let mut next = std::collections::BTreeSet::new();
        for made in &layer {
            let signals: Vec<u8> = INPUTS.iter().chain(made).copied().collect();
            let mut outs = Vec::new();
            for (i, &x) in signals.iter().enumerate() {
                outs.push(!x);
                for (j, &y) in signals.iter().enumerate().skip(i + 1) {
                    outs.extend(two(x, y));
                    for &z in &signals[j + 1..] {
                        outs.extend(three(x, y, z));
                    }
                }
            }
            if outs.contains(&target) {
                return Some(k);
            }
            for g in outs {
                if !signals.contains(&g) {
                    let mut state = made.clone();
                    state.push(g);
                    state.sort_unstable();
                    next.insert(state);
                }
            }
        }
        layer = next.into_iter().collect();
    }
    None
}

#[test]
fn enumeration_by_hand() {
    // By hand: AND of two inputs is one cell, a AND NOT b two (inverter
    // then AND), the three-input XOR one.
    assert_eq!(fewest_symmetric_cells(0xAA & 0xCC, 3), Some(1));
    assert_eq!(fewest_symmetric_cells(0xAA & !0xCC, 3), Some(2));
    assert_eq!(fewest_symmetric_cells(0x96, 3), Some(1));
    assert_eq!(fewest_symmetric_cells(0xE8, 3), None);
}

#[test]
fn full_adder_over_the_full_binary_basis_takes_five_gates() {
    // Knuth, TAOCP Vol. 4A, 7.1.2, via PROVENANCE.md: a full adder needs five
    // two-input gates over the full binary basis.
    let gates: Vec<GateSpec> = (0..16u64)
        .map(|t| GateSpec::new(format!("f{t:X}"), 2, t, 1.0))
        .collect();
    for free in [false, true] {
        let opts = ExactOptions {
            free_complements: free,
            ..ExactOptions::default()
        };
        let result = synthesize(&[0x96, 0xE8], 3, &gates, &opts).unwrap();
        check_simulates(&result, &gates, &[0x96, 0xE8]);
        assert!(result.optimal);
        assert_eq!(result.cells, 5);
    }
}

#[test]
fn area_and_depth_objectives() {
    // Made-up costs: one xor3 (9) beats any two-input construction. On two
    // inputs, four NAND2 cost 16, and so does xor3(x1, !x0, 1) with the
    // constant made as nand2(x0, !x0): 3 + 4 + 9 = 16 in three cells; no
    // network is cheaper (hand check: every network needs a cell reading
    // both inputs, nand2 alone or xor3 with a constant).
    let gates = vec![
        GateSpec::new("inv", 1, 0b01, 3.0),
        GateSpec::new("nand2", 2, 0x7, 4.0),
        GateSpec::new("xor3", 3, 0x96, 9.0),
    ];
    let area_opts = ExactOptions {
        objective: Objective::Area,
        ..ExactOptions::default()
    };
    let area = synthesize(&[0x96], 3, &gates, &area_opts).unwrap();
    check_simulates(&area, &gates, &[0x96]);
    assert!(area.optimal);
    assert_eq!(area.area, 9.0);
    let area2 = synthesize(&[0x6], 2, &gates, &area_opts).unwrap();
    check_simulates(&area2, &gates, &[0x6]);
    assert!(area2.optimal);
    assert_eq!(area2.area, 16.0);

    // Four-input AND from AND2: depth 2 (a balanced tree) with 3 cells.
    let and_gates = [
        GateSpec::new("and2", 2, 0x8, 1.0),
        GateSpec::new("inv", 1, 1, 1.0),
    ];
    let depth_opts = ExactOptions {
        objective: Objective::Depth,
        ..ExactOptions::default()
    };
    let depth = synthesize(&[0x8000], 4, &and_gates, &depth_opts).unwrap();
    check_simulates(&depth, &and_gates, &[0x8000]);
    assert!(depth.optimal);
    assert_eq!((depth.depth, depth.cells), (2, 3));
}

#[test]
fn limits_stop_the_search_honestly() {
    // A conflict budget of one learned clause cannot prove much: whatever
    // comes back is either flagged unproven or an error, never a false claim.
    let gates: Vec<GateSpec> = vec![
        GateSpec::new("and2", 2, 0x8, 1.0),
        GateSpec::new("or2", 2, 0xE, 1.0),
        GateSpec::new("not", 1, 0x1, 1.0),
    ];
    let opts = ExactOptions {
        conflict_limit: Some(1),
        ..ExactOptions::default()
    };
    // and-or-not needs 8 gates for 0x69 (circuitdb 2.0.0 via PROVENANCE.md).
    match synthesize(&[0x69], 3, &gates, &opts) {
        Ok(r) => {
            check_simulates(&r, &gates, &[0x69]);
            assert!(r.cells >= 8);
            if r.cells > 8 {
                assert!(!r.optimal);
            }
        }
        Err(e) => assert!(
            matches!(e, ribbonmap::exact::ExactError::LimitReached),
            "{e}"
        ),
    }
}

/// The one- and two-input cells of `ribbon_like` (a ribbon2-like library,
/// every cell costing 1): AND, OR and XOR with their complements and an
/// inverter, no input complements.
fn two_input_with_complemented_outputs() -> Vec<GateSpec> {
    ribbon_like(false)
        .into_iter()
        .filter(|g| g.arity <= 2)
        .collect()
}

#[test]
#[cfg_attr(
    debug_assertions,
    ignore = "heavy: a 200,000-conflict SAT proof; runs in release builds (cargo test --release)"
)]
fn relaxed_bound_proves_what_the_conflict_limit_cannot() {
    // 0x0116 (four inputs) needs seven cells here. The direct proof that six
    // do not suffice outlasts this conflict limit; before six steps the
    // search proves a lower bound over the relaxed basis (every two-input
    // function, complements free), where the same function needs seven
    // gates: the minimum the full-basis search below finds. Knuth's table
    // (TAOCP Vol. 4A, 7.1.2, from memory via PROVENANCE.md) gives only the
    // histogram, 2720 functions of cost 7 and none above, not per-function
    // values; that 0x0116 is among them is derived here: by the project's
    // full-basis search (which reproduces the whole histogram,
    // tests/coverage_reference.rs), and independently of it, the
    // breadth-first enumeration in tests/map_optimum.rs finds no network of
    // at most five gates for it.
    let f = 0x0116;
    let opts = ExactOptions {
        conflict_limit: Some(200_000),
        ..ExactOptions::default()
    };
    let gates = two_input_with_complemented_outputs();
    let result = synthesize(&[f], 4, &gates, &opts).unwrap();
    check_simulates(&result, &gates, &[f]);
    let full_basis: Vec<GateSpec> = (0..16u64)
        .map(|t| GateSpec::new(format!("f{t:X}"), 2, t, 1.0))
        .collect();
    let relaxed = synthesize(
        &[f],
        4,
        &full_basis,
        &ExactOptions {
            free_complements: true,
            ..ExactOptions::default()
        },
    )
    .unwrap();
    assert!(relaxed.optimal);
    assert_eq!(relaxed.cells, 7);
    assert_eq!((result.cells, result.optimal), (7, true));
}
