//! Generated circuits against outside reference netlists and through the
//! writers and readers.
//!
//! Reference circuits: tests/data/reference/netlists/arith, written by the
//! PyPI package ariths-gen 1.1.4 (see PROVENANCE.md): an 8-bit ripple-carry
//! adder, a 16-bit Kogge-Stone adder, a 16-bit carry-lookahead adder, 8x8
//! array and Dadda multipliers. Ports are matched by declaration order (both
//! declare a[0..n-1], b[0..n-1] and the result bus least significant bit
//! first) and compared by simulation on random vectors; the reference is
//! also checked against integer arithmetic on the same vectors.

mod generate_support;

use generate_support::{evaluate, random};
use ribbonmap::generate::{generate, write_circuit, Family, Params};
use ribbonmap::io::{read_netlist, read_netlist_str, NetlistFormat, ReadOptions};
use ribbonmap::network::{Network, SplitMix64};
use std::path::Path;

fn reference(file: &str) -> Network {
    let path = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/data/reference/netlists/arith")
        .join(file);
    read_netlist(&path, &ReadOptions::default()).unwrap()
}

/// Simulates both networks on `words` x 64 random patterns, inputs matched
/// by declaration order, and asserts every output (by declaration order)
/// agrees.
fn assert_same_by_order(ours: &Network, theirs: &Network, words: usize) {
    assert_eq!(ours.inputs().len(), theirs.inputs().len(), "input counts");
    assert_eq!(
        ours.outputs().len(),
        theirs.outputs().len(),
        "output counts"
    );
    let mut rng = SplitMix64::new(0x5EED);
    for _ in 0..words {
        let stimulus: Vec<u64> = (0..ours.inputs().len()).map(|_| rng.next()).collect();
        assert_eq!(
            ours.simulate_outputs(&stimulus),
            theirs.simulate_outputs(&stimulus),
            "{} differs from {}",
            ours.name(),
            theirs.name()
        );
    }
}

fn check_against(file: &str, family: Family, params: Params, op: fn(u128, u128) -> u128) {
    let theirs = reference(file);
    let ours = generate(family, &params).unwrap();
    assert_same_by_order(&ours, &theirs, 64);
    // The reference itself computes the integer result (ariths-gen 1.1.4).
    let width = params.width;
    let vectors = random(&[width, width], 1024, u64::from(width));
    let outputs = evaluate(&theirs, &vectors);
    for (v, out) in vectors.iter().zip(outputs) {
        // Reference outputs form one bus; `evaluate` groups it by name.
        assert_eq!(out, vec![op(v[0], v[1])], "{file} on {v:?}");
    }
}

#[test]
fn ripple_adder_matches_reference_rca8() {
    check_against("rca8_flat.blif", Family::Adder, Params::new(8), |a, b| {
        a + b
    });
}

#[test]
fn kogge_stone_adder_matches_reference_ks16_and_cla16() {
    let params = Params::new(16).with_style("kogge-stone");
    check_against("ks16_flat.blif", Family::Adder, params.clone(), |a, b| {
        a + b
    });
    check_against("cla16_flat.v", Family::Adder, params, |a, b| a + b);
}

#[test]
fn multipliers_match_reference_arrmul8_and_dadda8() {
    let array = Params::new(8).with_style("array");
    check_against("arrmul8_flat.blif", Family::Multiplier, array, |a, b| a * b);
    let dadda = Params::new(8).with_style("dadda");
    check_against("dadda8_hier.blif", Family::Multiplier, dadda, |a, b| a * b);
}

/// Every family survives writing (BLIF and Verilog) and reading back: same
/// port names in the same order and the same function on random vectors.
#[test]
fn written_circuits_read_back_with_the_same_names_and_function() {
    let cases: Vec<(Family, Params)> = vec![
        (Family::Adder, Params::new(8).with_carry_in(true)),
        (Family::Adder, Params::new(12).with_style("brent-kung")),
        (Family::Multiplier, Params::new(6).with_style("wallace")),
        (Family::Parity, Params::new(9)),
        (Family::Majority, Params::new(7).with_style("sorting")),
        (Family::Popcount, Params::new(10)),
        (Family::Comparator, Params::new(8)),
        (Family::Mux, Params::new(3)),
        (Family::Decoder, Params::new(3)),
        (Family::BarrelShifter, Params::new(8)),
        (
            Family::Hamming,
            Params::new(11).with_style("secded-decoder"),
        ),
        (Family::Alu, Params::new(4)),
    ];
    for (family, params) in cases {
        let original = generate(family, &params).unwrap();
        for format in [NetlistFormat::Blif, NetlistFormat::Verilog] {
            let text = write_circuit(family, &params, format).unwrap();
            let marker = if format == NetlistFormat::Blif {
                "#"
            } else {
                "//"
            };
            let first = text.lines().next().unwrap();
            assert!(first.starts_with(marker), "{first}");
            assert!(first.contains(family.name()) && first.contains("written by ribbonmap"));
            let file = format!("x.{}", format.extension());
            let back = read_netlist_str(&text, &file, format, &ReadOptions::default())
                .unwrap_or_else(|e| panic!("{family} {format:?}: {e}"));
            let names = |n: &Network| -> (Vec<String>, Vec<String>) {
                (
                    n.inputs().keys().cloned().collect(),
                    n.outputs().keys().cloned().collect(),
                )
            };
            assert_eq!(names(&back), names(&original), "{family} {format:?}");
            assert_same_by_order(&original, &back, 8);
        }
    }
}

/// Proofs by the project's equivalence checker (miter and SAT sweeping),
/// ports paired by declaration order: the generated adders and multipliers
/// equal the ariths-gen 1.1.4 reference circuits, and the styles of a family
/// equal each other.
#[test]
fn equivalence_proofs_against_reference_and_across_styles() {
    use ribbonmap::equiv::{check, EquivOptions, PortMatching, Verdict};
    let opts = EquivOptions {
        ports: PortMatching::ByOrder,
        ..EquivOptions::default()
    };
    let prove = |a: &Network, b: &Network| {
        let verdict = check(a, b, &opts).unwrap();
        assert!(
            matches!(verdict, Verdict::Equivalent { .. }),
            "{} vs {}: {verdict:?}",
            a.name(),
            b.name()
        );
    };
    let adder = |style: &str, width: u32| {
        generate(Family::Adder, &Params::new(width).with_style(style)).unwrap()
    };
    let multiplier = |style: &str, width: u32| {
        generate(Family::Multiplier, &Params::new(width).with_style(style)).unwrap()
    };
    prove(&adder("ripple", 8), &reference("rca8_flat.blif"));
    prove(&adder("kogge-stone", 16), &reference("ks16_flat.blif"));
    prove(&adder("kogge-stone", 16), &reference("cla16_flat.v"));
    prove(&multiplier("array", 8), &reference("arrmul8_flat.blif"));
    prove(&multiplier("dadda", 8), &reference("dadda8_hier.blif"));
    for style in [
        "carry-lookahead",
        "kogge-stone",
        "brent-kung",
        "carry-select",
    ] {
        prove(&adder("ripple", 24), &adder(style, 24));
    }
    for style in ["wallace", "dadda"] {
        prove(&multiplier("array", 6), &multiplier(style, 6));
    }
}
