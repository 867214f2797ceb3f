//! Comparison and selection: comparator, multiplexer, decoder and barrel
//! shifters.
//!
//! The ripple comparator runs a borrow chain from the least significant bit,
//! `lt' = maj(!a, b, lt)` (a < b on the bits seen so far); the tree
//! comparator combines (less-than, equal) pairs of halves,
//! `lt = lt_hi | eq_hi & lt_lo`, in a balanced tree. The multiplexer is a tree
//! of 2:1 multiplexers (select bit 0 at the leaves) or an OR of data bits
//! ANDed with decoded selects. The decoder either splits its inputs in two
//! halves, decodes each recursively and ANDs every pair (`tree`), or builds
//! every output as one wide AND (`direct`). Shifters are logarithmic: stage j
//! shifts by 2^j when shift bit j is set.

use crate::network::{Lit, Network};

/// `(a < b, a == b)` for unsigned `a`, `b`.
pub(super) fn compare(net: &mut Network, a: &[Lit], b: &[Lit], style: &str) -> (Lit, Lit) {
    let equal_bits: Vec<Lit> = a.iter().zip(b).map(|(&x, &y)| net.xnor(x, y)).collect();
    if style == "tree" {
        let leaves: Vec<(Lit, Lit)> = a
            .iter()
            .zip(b)
            .zip(&equal_bits)
            .map(|((&x, &y), &e)| (net.and(!x, y), e))
            .collect();
        return compare_tree(net, &leaves);
    }
    let mut lt = Lit::FALSE;
    for (&x, &y) in a.iter().zip(b) {
        lt = net.maj(!x, y, lt);
    }
    let eq = net.and_many(&equal_bits);
    (lt, eq)
}

/// Combines (lt, eq) pairs of a bit range, least significant first.
fn compare_tree(net: &mut Network, parts: &[(Lit, Lit)]) -> (Lit, Lit) {
    if parts.len() == 1 {
        return parts[0];
    }
    let (lo, hi) = parts.split_at(parts.len() / 2);
    let (lt_lo, eq_lo) = compare_tree(net, lo);
    let (lt_hi, eq_hi) = compare_tree(net, hi);
    let through = net.and(eq_hi, lt_lo);
    (net.or(lt_hi, through), net.and(eq_hi, eq_lo))
}

/// `data[select]` for 2^k data bits and k select bits.
pub(super) fn multiplex(net: &mut Network, data: &[Lit], select: &[Lit], style: &str) -> Lit {
    if style == "and-or" {
        let lines = decode(net, select, "tree");
        let terms: Vec<Lit> = data
            .iter()
            .zip(&lines)
            .map(|(&d, &l)| net.and(d, l))
            .collect();
        return net.or_many(&terms);
    }
    let mut level = data.to_vec();
    for &s in select {
        level = level.chunks(2).map(|p| net.mux(s, p[1], p[0])).collect();
    }
    level[0]
}

/// The 2^k lines of a k-bit decoder: line j is 1 exactly when the input
/// value is j.
pub(super) fn decode(net: &mut Network, inputs: &[Lit], style: &str) -> Vec<Lit> {
    if style == "direct" {
        return (0..1usize << inputs.len())
            .map(|j| {
                let lits: Vec<Lit> = inputs
                    .iter()
                    .enumerate()
                    .map(|(k, &x)| x.xor((j >> k) & 1 == 0))
                    .collect();
                net.and_many(&lits)
            })
            .collect();
    }
    decode_tree(net, inputs)
}

fn decode_tree(net: &mut Network, inputs: &[Lit]) -> Vec<Lit> {
    match inputs.len() {
        0 => vec![Lit::TRUE],
        1 => vec![!inputs[0], inputs[0]],
        k => {
            let (lo, hi) = inputs.split_at(k / 2);
            let lo_lines = decode_tree(net, lo);
            let hi_lines = decode_tree(net, hi);
            let mut lines = Vec::with_capacity(lo_lines.len() * hi_lines.len());
            for &h in &hi_lines {
                for &l in &lo_lines {
                    lines.push(net.and(h, l));
                }
            }
            lines
        }
    }
}

/// `value << amount`, zeros shifted in, same width as `value`.
pub(super) fn shift_left(net: &mut Network, value: &[Lit], amount: &[Lit]) -> Vec<Lit> {
    let mut v = value.to_vec();
    for (j, &s) in amount.iter().enumerate() {
        let d = 1usize << j;
        v = (0..v.len())
            .map(|i| {
                let moved = if i >= d { v[i - d] } else { Lit::FALSE };
                net.mux(s, moved, v[i])
            })
            .collect();
    }
    v
}

/// `value >> amount` (logical), zeros shifted in, same width as `value`.
pub(super) fn shift_right(net: &mut Network, value: &[Lit], amount: &[Lit]) -> Vec<Lit> {
    let mut v = value.to_vec();
    for (j, &s) in amount.iter().enumerate() {
        let d = 1usize << j;
        v = (0..v.len())
            .map(|i| {
                let moved = v.get(i + d).copied().unwrap_or(Lit::FALSE);
                net.mux(s, moved, v[i])
            })
            .collect();
    }
    v
}
