//! Circuits that count ones: parity, population count and majority.
//!
//! Parity is an XOR chain or a balanced XOR tree. Population count either
//! compresses the single column of input bits with full adders (the
//! `compressor` style, a Wallace reduction of one column) or adds the counts
//! of the two halves recursively (`adder-tree`). The majority voter either
//! counts (`counter`: population count, then a comparison with the constant
//! (n + 1) / 2) or sorts the bits with Batcher's odd-even merge sort of
//! AND/OR comparators and takes the middle one (`sorting`).

use super::arith::{self, Compression};
use super::ports::count_bits;
use crate::network::{Lit, Network};

/// XOR of `bits`.
pub(super) fn parity(net: &mut Network, bits: &[Lit], style: &str) -> Lit {
    match style {
        "chain" => bits.iter().fold(Lit::FALSE, |acc, &x| net.xor(acc, x)),
        _ => net.xor_many(bits),
    }
}

/// The number of ones among `bits`, in ceil(log2(n + 1)) bits.
pub(super) fn popcount(net: &mut Network, bits: &[Lit], style: &str) -> Vec<Lit> {
    let width = count_bits(bits.len());
    match style {
        "adder-tree" => {
            let mut count = adder_tree(net, bits);
            count.resize(width, Lit::FALSE);
            count
        }
        _ => arith::sum_columns(net, vec![bits.to_vec()], Compression::Wallace, width),
    }
}

fn adder_tree(net: &mut Network, bits: &[Lit]) -> Vec<Lit> {
    match bits.len() {
        0 => vec![],
        1 => vec![bits[0]],
        2 => {
            let (s, c) = arith::half_adder(net, bits[0], bits[1]);
            vec![s, c]
        }
        3 => {
            let (s, c) = arith::full_adder(net, bits[0], bits[1], bits[2]);
            vec![s, c]
        }
        n => {
            let (lo, hi) = bits.split_at(n / 2);
            let mut x = adder_tree(net, lo);
            let mut y = adder_tree(net, hi);
            let w = x.len().max(y.len());
            x.resize(w, Lit::FALSE);
            y.resize(w, Lit::FALSE);
            let (mut sum, carry) = arith::ripple(net, &x, &y, Lit::FALSE);
            sum.push(carry);
            sum.truncate(count_bits(n));
            sum
        }
    }
}

/// 1 when more than half of the (odd number of) `bits` are 1.
pub(super) fn majority(net: &mut Network, bits: &[Lit], style: &str) -> Lit {
    let threshold = bits.len().div_ceil(2);
    match style {
        "sorting" => {
            let sorted = sort_descending(net, bits);
            sorted[threshold - 1]
        }
        _ => {
            let count = popcount(net, bits, "compressor");
            at_least(net, &count, threshold)
        }
    }
}

/// `value >= threshold` for an unsigned `value` (least significant bit
/// first), scanning from the least significant bit: with `ge` the answer for
/// the low bits, a threshold bit 1 needs the value bit and `ge`, a threshold
/// bit 0 accepts the value bit or `ge`.
fn at_least(net: &mut Network, value: &[Lit], threshold: usize) -> Lit {
    let bits = value
        .len()
        .max(usize::BITS as usize - threshold.leading_zeros() as usize);
    let mut ge = Lit::TRUE;
    for i in 0..bits {
        let v = value.get(i).copied().unwrap_or(Lit::FALSE);
        ge = if (threshold >> i) & 1 == 1 {
            net.and(v, ge)
        } else {
            net.or(v, ge)
        };
    }
    ge
}

/// The bits sorted with ones first, by Batcher's odd-even merge sort on the
/// next power of two (padding with constant 0, which folds away).
fn sort_descending(net: &mut Network, bits: &[Lit]) -> Vec<Lit> {
    let size = bits.len().next_power_of_two();
    let mut v = bits.to_vec();
    v.resize(size, Lit::FALSE);
    let mut p = 1;
    while p < size {
        let mut k = p;
        while k >= 1 {
            let mut j = k % p;
            while j + k < size {
                for i in 0..k.min(size - j - k) {
                    let (x, y) = (i + j, i + j + k);
                    if x / (2 * p) == y / (2 * p) {
                        let high = net.or(v[x], v[y]);
                        let low = net.and(v[x], v[y]);
                        v[x] = high;
                        v[y] = low;
                    }
                }
                j += 2 * k;
            }
            k /= 2;
        }
        p *= 2;
    }
    v.truncate(bits.len());
    v
}
