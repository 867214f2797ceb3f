//! Generated counting and selection circuits checked against bit counting and
//! indexing done on integers in the test (independent of the generators):
//! parity, popcount, majority, multiplexers and decoders.

mod generate_support;

use generate_support::{check, exhaustive, port_buses, random, vectors_for};
use ribbonmap::generate::{generate, Family, Params};

fn ones(v: u128) -> u128 {
    u128::from(v.count_ones())
}

#[test]
fn parity_is_xor_of_all_bits() {
    for style in ["tree", "chain"] {
        for width in [1u32, 2, 3, 7, 8, 16, 33, 64, 128] {
            let net = generate(Family::Parity, &Params::new(width).with_style(style)).unwrap();
            assert_eq!(net.gate_count(), width as usize - 1, "{style} {width}");
            let vectors = vectors_for(&[width], 16, u64::from(width));
            check(&net, &vectors, |v| vec![ones(v[0]) & 1]);
        }
    }
}

#[test]
fn popcount_counts_ones() {
    for style in ["compressor", "adder-tree"] {
        for width in [1u32, 2, 3, 4, 5, 7, 8, 15, 16, 17, 31, 64, 100, 128] {
            let net = generate(Family::Popcount, &Params::new(width).with_style(style)).unwrap();
            let (_, outs) = port_buses(&net);
            // ceil(log2(width + 1)) count bits
            let bits = 32 - width.leading_zeros();
            assert_eq!(outs, vec![("c".to_string(), bits)], "{style} {width}");
            let vectors = vectors_for(&[width], 16, u64::from(width));
            check(&net, &vectors, |v| vec![ones(v[0])]);
        }
    }
}

#[test]
fn majority_votes() {
    for style in ["counter", "sorting"] {
        for width in [1u32, 3, 5, 7, 9, 11, 15, 17, 21, 33, 63, 99] {
            let net = generate(Family::Majority, &Params::new(width).with_style(style)).unwrap();
            let mut vectors = vectors_for(&[width], 16, u64::from(width));
            // Random inputs seldom sit at the threshold; add vectors with
            // exactly (n - 1) / 2 and (n + 1) / 2 ones, shuffled.
            for (k, seed) in [((width - 1) / 2, 1u64), (width.div_ceil(2), 2)] {
                for v in random(&[width], 64, seed + u64::from(width)) {
                    let mut x = v[0];
                    while x.count_ones() > k {
                        x &= x - 1;
                    }
                    let mut bit = 0;
                    while x.count_ones() < k {
                        x |= 1 << bit;
                        bit += 1;
                    }
                    vectors.push(vec![x]);
                }
            }
            check(&net, &vectors, |v| {
                vec![u128::from(2 * v[0].count_ones() > width)]
            });
        }
    }
}

#[test]
fn three_input_majority_is_one_node() {
    let net = generate(Family::Majority, &Params::new(3)).unwrap();
    assert_eq!(net.kind_counts().maj, 1);
    assert_eq!(net.gate_count(), 1);
}

#[test]
fn multiplexers_select() {
    for style in ["tree", "and-or"] {
        for select in [1u32, 2, 3, 4, 5, 6, 7] {
            let net = generate(Family::Mux, &Params::new(select).with_style(style)).unwrap();
            let data = 1u32 << select;
            let (ins, _) = port_buses(&net);
            assert_eq!(
                ins,
                vec![("d".to_string(), data), ("s".to_string(), select)]
            );
            let vectors = if data + select <= 16 {
                exhaustive(&[data, select])
            } else {
                random(&[data, select], 1024, u64::from(select))
            };
            check(&net, &vectors, |v| vec![(v[0] >> v[1]) & 1]);
        }
    }
}

#[test]
fn decoders_raise_one_line() {
    for style in ["tree", "direct"] {
        for width in [1u32, 2, 3, 4, 5, 7] {
            let net = generate(Family::Decoder, &Params::new(width).with_style(style)).unwrap();
            let (_, outs) = port_buses(&net);
            assert_eq!(outs, vec![("y".to_string(), 1 << width)]);
            check(&net, &exhaustive(&[width]), |v| vec![1u128 << v[0]]);
        }
    }
}
