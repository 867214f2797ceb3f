//! ariths-gen 1.1.4 arithmetic circuits (tests/data/reference/netlists/arith,
//! via PROVENANCE.md): one adder written three ways is proven equivalent to
//! itself across formats, and two different 8x8 multiplier architectures
//! are proven equivalent to each other. The arithmetic itself is checked
//! against integer addition and multiplication by simulation first, so the
//! proofs are about circuits known to be right.

use ribbonmap::equiv::{check, EquivOptions, PortMatching, Verdict};
use ribbonmap::io::{read_netlist, ReadOptions};
use ribbonmap::network::{Network, SplitMix64};
use std::path::PathBuf;

fn arith(name: &str) -> Network {
    let path = PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/data/reference/netlists/arith")
        .join(name);
    read_netlist(&path, &ReadOptions::default()).unwrap()
}

/// Simulates `net` (inputs a[0..8] then b[0..8], outputs LSB first) on
/// random operands and compares with `op` on integers.
fn check_arithmetic(net: &Network, op: fn(u64, u64) -> u64) {
    let mut rng = SplitMix64::new(11);
    let ci = net.combinational_inputs().len();
    assert_eq!(ci, 16);
    for _ in 0..64 {
        let (x, y) = (rng.below(256), rng.below(256));
        let words: Vec<u64> = (0..16)
            .map(|k| {
                let bit = if k < 8 {
                    (x >> k) & 1
                } else {
                    (y >> (k - 8)) & 1
                };
                if bit == 1 {
                    u64::MAX
                } else {
                    0
                }
            })
            .collect();
        let value = net
            .simulate_outputs(&words)
            .iter()
            .enumerate()
            .fold(0u64, |acc, (k, w)| acc | ((w & 1) << k));
        assert_eq!(value, op(x, y), "{} on {x}, {y}", net.name());
    }
}

#[test]
fn ripple_adder_in_three_formats_is_proven_equivalent() {
    let flat_blif = arith("rca8_flat.blif");
    let hier_blif = arith("rca8_hier.blif");
    let verilog = arith("rca8_flat.v");
    for net in [&flat_blif, &hier_blif, &verilog] {
        check_arithmetic(net, |x, y| x + y);
    }
    for (a, b) in [
        (&flat_blif, &hier_blif),
        (&flat_blif, &verilog),
        (&hier_blif, &verilog),
    ] {
        let verdict = check(a, b, &EquivOptions::default()).unwrap();
        assert_eq!(verdict, Verdict::Equivalent { outputs_checked: 9 });
    }
}

#[test]
fn array_and_dadda_multipliers_are_proven_equivalent() {
    let array = arith("arrmul8_flat.blif");
    let dadda = arith("dadda8_hier.blif");
    check_arithmetic(&array, |x, y| x * y);
    check_arithmetic(&dadda, |x, y| x * y);
    let opts = EquivOptions {
        ports: PortMatching::ByOrder,
        ..EquivOptions::default()
    };
    let verdict = check(&array, &dadda, &opts).unwrap();
    assert_eq!(
        verdict,
        Verdict::Equivalent {
            outputs_checked: 16
        }
    );
    // By name the output buses differ, and the error lists them.
    let err = check(&array, &dadda, &EquivOptions::default()).unwrap_err();
    assert!(err
        .to_string()
        .contains("output 'arrmul8_out[0]' of the first netlist"));
}
