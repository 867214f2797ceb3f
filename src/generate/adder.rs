//! Adders of five architectures, all computing `a + b + cin`.
//!
//! - ripple: a chain of full adders, each `xor(xor(a, b), c)` and
//!   `maj(a, b, c)`;
//! - carry-lookahead: 4-bit blocks whose carries are flat sums of products of
//!   generate `g = a & b` and propagate `p = a ^ b` signals; each carry is
//!   the block's own group generate OR (group propagate AND the block's
//!   incoming carry), so the chain of blocks costs two levels per block;
//! - Kogge-Stone and Brent-Kung: parallel-prefix carry computation over
//!   (generate, propagate) pairs with the usual prefix operator
//!   `(G, P) o (G', P') = (G | P & G', P & P')`, Kogge-Stone with every
//!   position combined at every level (log2 n levels, most logic), Brent-Kung
//!   with an up-sweep and a down-sweep (about 2 log2 n levels, least logic);
//! - carry-select: 4-bit blocks computed for both incoming carries, chosen by
//!   a multiplexer on the real carry.
//!
//! The carry input is folded into position 0 (`g0 = maj(a0, b0, cin)`), so
//! with a constant-0 carry the prefix adders lose no logic to it.

use super::arith;
use crate::network::{Lit, Network};

/// Adder style names, default first.
pub(super) const STYLES: &[&str] = &[
    "ripple",
    "carry-lookahead",
    "kogge-stone",
    "brent-kung",
    "carry-select",
];

/// Lookahead and select block size (common practice).
const BLOCK: usize = 4;

/// An adder architecture.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(super) enum AdderStyle {
    Ripple,
    CarryLookahead,
    KoggeStone,
    BrentKung,
    CarrySelect,
}

/// The style for a name from [`STYLES`] (checked by the caller).
pub(super) fn parse_style(name: &str) -> AdderStyle {
    match name {
        "carry-lookahead" => AdderStyle::CarryLookahead,
        "kogge-stone" => AdderStyle::KoggeStone,
        "brent-kung" => AdderStyle::BrentKung,
        "carry-select" => AdderStyle::CarrySelect,
        _ => AdderStyle::Ripple,
    }
}

/// `a + b + cin` for equally long `a` and `b`: sum bits (least significant
/// first) and carry out.
pub(super) fn add(
    net: &mut Network,
    a: &[Lit],
    b: &[Lit],
    cin: Lit,
    style: AdderStyle,
) -> (Vec<Lit>, Lit) {
    match style {
        AdderStyle::Ripple => arith::ripple(net, a, b, cin),
        AdderStyle::CarryLookahead => lookahead(net, a, b, cin),
        AdderStyle::KoggeStone => prefix(net, a, b, cin, kogge_stone_schedule(a.len())),
        AdderStyle::BrentKung => prefix(net, a, b, cin, brent_kung_schedule(a.len())),
        AdderStyle::CarrySelect => carry_select(net, a, b, cin),
    }
}

fn lookahead(net: &mut Network, a: &[Lit], b: &[Lit], cin: Lit) -> (Vec<Lit>, Lit) {
    let n = a.len();
    let g: Vec<Lit> = (0..n).map(|i| net.and(a[i], b[i])).collect();
    let p: Vec<Lit> = (0..n).map(|i| net.xor(a[i], b[i])).collect();
    let mut sum = Vec::with_capacity(n);
    let mut block_carry = cin;
    for start in (0..n).step_by(BLOCK) {
        let end = (start + BLOCK).min(n);
        let mut carry = block_carry;
        for i in start..end {
            sum.push(net.xor(p[i], carry));
            // c[i+1] = g[i] | p[i] g[i-1] | ... | p[i]..p[start] c[start]
            let mut terms = Vec::with_capacity(i - start + 1);
            for j in (start..=i).rev() {
                let mut factors: Vec<Lit> = p[j + 1..=i].to_vec();
                factors.push(g[j]);
                terms.push(net.and_many(&factors));
            }
            // The block's own generate and propagate are computed in
            // parallel; the incoming block carry passes through one AND and
            // one OR, so blocks chain with two levels each.
            let generate = net.or_many(&terms);
            let propagate = net.and_many(&p[start..=i]);
            let through = net.and(propagate, block_carry);
            carry = net.or(generate, through);
        }
        block_carry = carry;
    }
    (sum, block_carry)
}

/// A prefix schedule: levels of `(i, j)` pairs, meaning position `i` takes
/// the prefix operator with position `j < i`, all pairs of a level reading the
/// values of the previous level.
type Schedule = Vec<Vec<(usize, usize)>>;

fn kogge_stone_schedule(n: usize) -> Schedule {
    let mut levels = Vec::new();
    let mut d = 1;
    while d < n {
        levels.push((d..n).map(|i| (i, i - d)).collect());
        d *= 2;
    }
    levels
}

fn brent_kung_schedule(n: usize) -> Schedule {
    let mut levels = Vec::new();
    let mut d = 1;
    while d < n {
        levels.push((2 * d - 1..n).step_by(2 * d).map(|i| (i, i - d)).collect());
        d *= 2;
    }
    d /= 2;
    while d >= 1 {
        let level: Vec<(usize, usize)> =
            (3 * d - 1..n).step_by(2 * d).map(|i| (i, i - d)).collect();
        if !level.is_empty() {
            levels.push(level);
        }
        d /= 2;
    }
    levels
}

fn prefix(
    net: &mut Network,
    a: &[Lit],
    b: &[Lit],
    cin: Lit,
    schedule: Schedule,
) -> (Vec<Lit>, Lit) {
    let n = a.len();
    let p: Vec<Lit> = (0..n).map(|i| net.xor(a[i], b[i])).collect();
    let mut gen: Vec<Lit> = (0..n).map(|i| net.and(a[i], b[i])).collect();
    gen[0] = net.maj(a[0], b[0], cin);
    let mut prop = p.clone();
    for level in schedule {
        let (old_gen, old_prop) = (gen.clone(), prop.clone());
        for (i, j) in level {
            let through = net.and(old_prop[i], old_gen[j]);
            gen[i] = net.or(old_gen[i], through);
            prop[i] = net.and(old_prop[i], old_prop[j]);
        }
    }
    // After the schedule gen[i] is the carry out of position i.
    let mut sum = Vec::with_capacity(n);
    for i in 0..n {
        let carry = if i == 0 { cin } else { gen[i - 1] };
        sum.push(net.xor(p[i], carry));
    }
    (sum, gen[n - 1])
}

fn carry_select(net: &mut Network, a: &[Lit], b: &[Lit], cin: Lit) -> (Vec<Lit>, Lit) {
    let n = a.len();
    let first = BLOCK.min(n);
    let (mut sum, mut carry) = arith::ripple(net, &a[..first], &b[..first], cin);
    for start in (first..n).step_by(BLOCK) {
        let end = (start + BLOCK).min(n);
        let (sum0, carry0) = arith::ripple(net, &a[start..end], &b[start..end], Lit::FALSE);
        let (sum1, carry1) = arith::ripple(net, &a[start..end], &b[start..end], Lit::TRUE);
        for (&s1, &s0) in sum1.iter().zip(&sum0) {
            sum.push(net.mux(carry, s1, s0));
        }
        carry = net.mux(carry, carry1, carry0);
    }
    (sum, carry)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Spans of prefix groups after a schedule: every position must end with
    /// the group (i : 0).
    fn covers_all_prefixes(n: usize, schedule: &Schedule) -> bool {
        let mut low: Vec<usize> = (0..n).collect();
        for level in schedule {
            let old = low.clone();
            for &(i, j) in level {
                // Groups must touch or overlap: (i : low_i) with (j : low_j).
                if j + 1 < old[i] {
                    return false;
                }
                low[i] = old[j].min(old[i]);
            }
        }
        low.iter().all(|&l| l == 0)
    }

    #[test]
    fn prefix_schedules_are_complete() {
        for n in 1..=70 {
            assert!(covers_all_prefixes(n, &kogge_stone_schedule(n)), "ks {n}");
            assert!(covers_all_prefixes(n, &brent_kung_schedule(n)), "bk {n}");
        }
    }

    #[test]
    fn brent_kung_depth_is_about_twice_log() {
        // 2 log2 n - 1 levels for a power of two (Brent and Kung 1982, from memory).
        assert_eq!(brent_kung_schedule(16).len(), 7);
        assert_eq!(kogge_stone_schedule(16).len(), 4);
    }
}
