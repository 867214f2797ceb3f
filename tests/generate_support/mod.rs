//! Test helper for generated circuits: packs integer values of input buses
//! into 64-pattern simulation words and unpacks output words into integers.
//!
//! Ports are grouped into buses by name: `a[3]` is bit 3 of bus `a`, a plain
//! name such as `cin` or `lt` is a one-bit bus. Buses are listed in the order
//! their first bit is declared, which the generators' port contract fixes
//! (a, then b, then the others).
#![allow(dead_code)]

use ribbonmap::network::{lit_word, Network, SplitMix64};

/// Splits `a[3]` into `("a", 3)`; a name without brackets is bit 0.
pub fn split_port(name: &str) -> (String, u32) {
    if let Some(open) = name.rfind('[') {
        if let Some(index) = name[open + 1..].strip_suffix(']') {
            if let Ok(i) = index.parse() {
                return (name[..open].to_string(), i);
            }
        }
    }
    (name.to_string(), 0)
}

/// A bus: name and width.
pub type Bus = (String, u32);

/// For each port, its bus (index into the bus list) and bit.
type PortBits = Vec<(usize, u32)>;

/// Bus names and widths, in declaration order, and each port's place.
fn buses<'a>(names: impl Iterator<Item = &'a str>) -> (Vec<Bus>, PortBits) {
    let mut list: Vec<Bus> = Vec::new();
    let mut bits = Vec::new();
    for name in names {
        let (bus, bit) = split_port(name);
        let k = match list.iter().position(|(b, _)| *b == bus) {
            Some(k) => k,
            None => {
                list.push((bus, 0));
                list.len() - 1
            }
        };
        list[k].1 = list[k].1.max(bit + 1);
        bits.push((k, bit));
    }
    (list, bits)
}

/// Input and output buses of a network: `(name, width)`.
pub fn port_buses(net: &Network) -> (Vec<Bus>, Vec<Bus>) {
    let (ins, _) = buses(net.inputs().keys().map(String::as_str));
    let (outs, _) = buses(net.outputs().keys().map(String::as_str));
    (ins, outs)
}

/// Simulates `net` on `vectors` (each one value per input bus, in bus order)
/// and returns one value per output bus for each vector. Bus widths up to
/// 128 bits.
pub fn evaluate(net: &Network, vectors: &[Vec<u128>]) -> Vec<Vec<u128>> {
    let (_, in_bits) = buses(net.inputs().keys().map(String::as_str));
    let (out_buses, out_bits) = buses(net.outputs().keys().map(String::as_str));
    let mut results = Vec::with_capacity(vectors.len());
    let mut values = Vec::new();
    for chunk in vectors.chunks(64) {
        let words: Vec<u64> = in_bits
            .iter()
            .map(|&(bus, bit)| {
                let mut w = 0u64;
                for (p, v) in chunk.iter().enumerate() {
                    w |= (((v[bus] >> bit) & 1) as u64) << p;
                }
                w
            })
            .collect();
        net.simulate_into(&words, &mut values);
        let out_words: Vec<u64> = net
            .outputs()
            .values()
            .map(|&l| lit_word(&values, l))
            .collect();
        for p in 0..chunk.len() {
            let mut out = vec![0u128; out_buses.len()];
            for (&(bus, bit), w) in out_bits.iter().zip(&out_words) {
                out[bus] |= (((w >> p) & 1) as u128) << bit;
            }
            results.push(out);
        }
    }
    results
}

/// Every combination of values for buses of the given widths (total width
/// at most 24), first bus varying fastest.
pub fn exhaustive(widths: &[u32]) -> Vec<Vec<u128>> {
    let total: u32 = widths.iter().sum();
    assert!(total <= 24, "too many inputs for exhaustive simulation");
    (0..1u128 << total)
        .map(|mut row| {
            widths
                .iter()
                .map(|&w| {
                    let v = row & ((1u128 << w) - 1);
                    row >>= w;
                    v
                })
                .collect()
        })
        .collect()
}

/// `count` random vectors for buses of the given widths (each at most 128).
pub fn random(widths: &[u32], count: usize, seed: u64) -> Vec<Vec<u128>> {
    let mut rng = SplitMix64::new(seed);
    (0..count)
        .map(|_| {
            widths
                .iter()
                .map(|&w| {
                    let v = (rng.next() as u128) << 64 | rng.next() as u128;
                    if w >= 128 {
                        v
                    } else {
                        v & ((1u128 << w) - 1)
                    }
                })
                .collect()
        })
        .collect()
}

/// Exhaustive vectors when the inputs total at most 16 bits, otherwise
/// `words` x 64 random ones.
pub fn vectors_for(widths: &[u32], words: usize, seed: u64) -> Vec<Vec<u128>> {
    if widths.iter().sum::<u32>() <= 16 {
        exhaustive(widths)
    } else {
        random(widths, 64 * words, seed)
    }
}

/// Low `bits` bits set.
pub fn mask(bits: u32) -> u128 {
    if bits >= 128 {
        u128::MAX
    } else {
        (1u128 << bits) - 1
    }
}

/// Checks `net` against `reference` (input bus values to output bus values)
/// on `vectors`; panics with the first differing vector.
pub fn check(net: &Network, vectors: &[Vec<u128>], reference: impl Fn(&[u128]) -> Vec<u128>) {
    let got = evaluate(net, vectors);
    for (v, g) in vectors.iter().zip(&got) {
        let want = reference(v);
        assert_eq!(
            g,
            &want,
            "{}: inputs {:?}: got {:?}, expected {:?}",
            net.name(),
            v,
            g,
            want
        );
    }
}
