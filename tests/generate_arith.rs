//! Generated arithmetic circuits checked against integer arithmetic (the
//! reference is Rust's own u128 arithmetic, independent of the generators):
//! adders, multipliers, comparators, barrel shifters and the ALU, exhaustive
//! for small widths and on random vectors for wide ones.

mod generate_support;

use generate_support::{check, mask, port_buses, vectors_for};
use ribbonmap::generate::{generate, Family, Params};

const ADDER_STYLES: [&str; 5] = [
    "ripple",
    "carry-lookahead",
    "kogge-stone",
    "brent-kung",
    "carry-select",
];

#[test]
fn adders_add() {
    for style in ADDER_STYLES {
        for width in [
            1u32, 2, 3, 4, 5, 6, 7, 8, 9, 13, 16, 17, 31, 32, 33, 64, 100, 127,
        ] {
            for carry_in in [false, true] {
                let params = Params::new(width).with_style(style).with_carry_in(carry_in);
                let net = generate(Family::Adder, &params).unwrap();
                let (ins, outs) = port_buses(&net);
                let mut widths = vec![width, width];
                if carry_in {
                    widths.push(1);
                }
                assert_eq!(
                    ins.iter().map(|b| b.1).collect::<Vec<_>>(),
                    widths,
                    "{style} {width}"
                );
                assert_eq!(outs, vec![("s".to_string(), width + 1)]);
                let vectors = vectors_for(&widths, 16, u64::from(width) * 7 + 1);
                check(&net, &vectors, |v| {
                    let cin = v.get(2).copied().unwrap_or(0);
                    vec![v[0] + v[1] + cin]
                });
            }
        }
    }
}

#[test]
fn ripple_adder_is_xor3_and_maj3() {
    // Ripple full adders are xor(xor(a,b),c) and maj(a,b,c): n - 1 majority
    // nodes without carry-in (bit 0 is a half adder), 2n - 1 XOR nodes.
    let net = generate(Family::Adder, &Params::new(8)).unwrap();
    let k = net.kind_counts();
    assert_eq!((k.maj, k.xor, k.and), (7, 15, 1));
}

#[test]
fn prefix_adders_are_shallower_than_ripple() {
    let depth = |style: &str| {
        generate(Family::Adder, &Params::new(64).with_style(style))
            .unwrap()
            .depth()
    };
    let ripple = depth("ripple");
    assert!(depth("kogge-stone") < ripple / 4);
    assert!(depth("brent-kung") < ripple / 2);
    assert!(depth("carry-lookahead") < ripple);
    assert!(depth("carry-select") < ripple);
    assert!(depth("kogge-stone") <= depth("brent-kung"));
}

#[test]
fn multipliers_multiply() {
    for style in ["array", "wallace", "dadda"] {
        for width in [1u32, 2, 3, 4, 5, 6, 8, 11, 16, 24, 32, 64] {
            let net = generate(Family::Multiplier, &Params::new(width).with_style(style)).unwrap();
            let (_, outs) = port_buses(&net);
            assert_eq!(outs, vec![("p".to_string(), 2 * width)]);
            let words = if width > 32 { 4 } else { 16 };
            let vectors = vectors_for(&[width, width], words, u64::from(width) + 99);
            check(&net, &vectors, |v| vec![v[0].wrapping_mul(v[1])]);
        }
    }
}

#[test]
fn comparators_compare() {
    for style in ["ripple", "tree"] {
        for width in [1u32, 2, 3, 5, 8, 13, 32, 64, 128] {
            let net = generate(Family::Comparator, &Params::new(width).with_style(style)).unwrap();
            let mut vectors = vectors_for(&[width, width], 16, u64::from(width));
            // Random operands are almost never equal: add equal and near pairs.
            let extra: Vec<Vec<u128>> = vectors
                .iter()
                .take(256)
                .flat_map(|v| {
                    let near = v[0] ^ (1u128 << (v[1] as u32 % width));
                    [vec![v[0], v[0]], vec![v[0], near]]
                })
                .collect();
            vectors.extend(extra);
            check(&net, &vectors, |v| {
                vec![u128::from(v[0] < v[1]), u128::from(v[0] == v[1])]
            });
        }
    }
}

#[test]
fn barrel_shifters_shift_left() {
    for width in [2u32, 3, 4, 5, 8, 12, 16, 32, 64, 100] {
        let net = generate(Family::BarrelShifter, &Params::new(width)).unwrap();
        let amount_bits = 32 - (width - 1).leading_zeros();
        let (ins, _) = port_buses(&net);
        assert_eq!(ins[1], ("s".to_string(), amount_bits));
        let vectors = vectors_for(&[width, amount_bits], 16, u64::from(width));
        check(&net, &vectors, |v| {
            let s = v[1] as u32;
            vec![if s >= width {
                0
            } else {
                (v[0] << s) & mask(width)
            }]
        });
    }
}

/// The ALU's documented opcodes, on integers.
fn alu_reference(width: u32, a: u128, b: u128, op: u128) -> u128 {
    let amount_bits = 32 - (width - 1).leading_zeros();
    let sh = (b & mask(amount_bits)) as u32;
    let r = match op {
        0 => a.wrapping_add(b),
        1 => a.wrapping_sub(b),
        2 => a & b,
        3 => a | b,
        4 => a ^ b,
        5 => {
            if sh >= width {
                0
            } else {
                a << sh
            }
        }
        6 => {
            if sh >= width {
                0
            } else {
                a >> sh
            }
        }
        _ => u128::from(a < b),
    };
    r & mask(width)
}

#[test]
fn alus_compute_every_opcode() {
    for style in ["ripple", "kogge-stone", "carry-select"] {
        for width in [1u32, 2, 3, 4, 5, 8, 16, 32, 64] {
            let net = generate(Family::Alu, &Params::new(width).with_style(style)).unwrap();
            let (ins, outs) = port_buses(&net);
            assert_eq!(ins[2], ("op".to_string(), 3));
            assert_eq!(outs, vec![("y".to_string(), width)]);
            let mut vectors = vectors_for(&[width, width, 3], 16, u64::from(width) + 5);
            // Small shift amounts and equal operands matter too.
            let extra: Vec<Vec<u128>> = vectors
                .iter()
                .take(512)
                .map(|v| vec![v[0], v[1] & 7, v[2]])
                .chain(vectors.iter().take(128).map(|v| vec![v[0], v[0], 7]))
                .collect();
            vectors.extend(extra);
            check(&net, &vectors, |v| {
                vec![alu_reference(width, v[0], v[1], v[2])]
            });
        }
    }
}
