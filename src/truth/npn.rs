//! Canonical forms of small Boolean functions under NPN transformations.
//!
//! Two functions are in the same NPN class when one becomes the other by
//! permuting its inputs, complementing some inputs and possibly complementing
//! the output. A mapper matches a cut against library cells by comparing
//! canonical forms: one representative per class, here the numerically
//! smallest truth table in the class (the table over `2^n` rows as an
//! unsigned number). The P form allows permutations only, the NP form
//! permutations and input complements.
//!
//! # What a transformation means
//!
//! An [`NpnTransform`] `T = (perm, input_neg, output_neg)` turns a function
//! `f` of n inputs into `g = T.apply(f)` with
//!
//! ```text
//! g(x_0, ..., x_{n-1}) = output_neg XOR f(y_0, ..., y_{n-1}),
//!     where y_j = x_{perm[j]} XOR (bit j of input_neg)
//! ```
//!
//! Read as wiring: *input j of `f` is fed from variable `perm[j]` of `g`,
//! complemented when bit j of `input_neg` is set, and the output of `f` is
//! complemented when `output_neg` is set.* So if a cell computes `c` and
//! `T.apply(c)` equals the function `g` of a cut with leaves `l_0..l_{n-1}`,
//! the cell realises the cut by connecting pin j to leaf `perm[j]` (through an
//! inverter, or a complemented edge, when bit j is set) and complementing its
//! output when `output_neg` is set.
//!
//! [`npn_canon`] returns `(canon, t)` with `t.apply(f) == canon`. For a cut
//! function `f` and a cell function `c` with the same canonical form,
//! `t_c.then(&t_f.inverse())` maps `c` onto `f`, so it is the wiring above.
//!
//! # Cost
//! Up to four inputs the answer is a table read: a table per input count
//! (65536 entries for four inputs, 256 KiB) built once, lazily, by walking
//! each class's orbit. Five and six inputs use an exact search over all
//! `n! * 2^n * 2` transformations, walking permutations by single swaps
//! (Heap's algorithm) and complement masks in Gray-code order so that each
//! step is a few word operations (about 92 000 steps for six inputs).

use super::table::{negate_input_word, row_mask, swap_inputs_word};
use std::sync::OnceLock;

/// An input permutation, input complements and an output complement; see the
/// module documentation for exactly what it does to a function.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct NpnTransform {
    /// Input j of the original function is fed from variable `perm[j]` of the
    /// transformed one. Entries at and above the input count are the identity.
    pub perm: [u8; 6],
    /// Bit j set: input j of the original function is complemented.
    pub input_neg: u8,
    /// The output is complemented.
    pub output_neg: bool,
}

impl Default for NpnTransform {
    fn default() -> Self {
        NpnTransform::IDENTITY
    }
}

impl NpnTransform {
    /// The transformation that changes nothing.
    pub const IDENTITY: NpnTransform = NpnTransform {
        perm: [0, 1, 2, 3, 4, 5],
        input_neg: 0,
        output_neg: false,
    };

    /// Applies the transformation to the `inputs`-input table `truth`
    /// (at most 6 inputs): `g(x) = output_neg ^ f(y)`,
    /// `y_j = x_{perm[j]} ^ input_neg_j`. Bits above the rows are zero.
    pub fn apply(&self, truth: u64, inputs: usize) -> u64 {
        let mut g = 0u64;
        for x in 0..(1u64 << inputs) {
            let mut y = 0u64;
            for j in 0..inputs {
                let bit = ((x >> self.perm[j]) & 1) ^ ((self.input_neg as u64 >> j) & 1);
                y |= bit << j;
            }
            let value = ((truth >> y) & 1) ^ self.output_neg as u64;
            g |= value << x;
        }
        g
    }

    /// The transformation that undoes this one:
    /// `t.inverse().apply(t.apply(f)) == f`.
    pub fn inverse(&self) -> NpnTransform {
        let mut perm = [0, 1, 2, 3, 4, 5];
        let mut input_neg = 0u8;
        for j in 0..6 {
            let p = self.perm[j] as usize;
            perm[p] = j as u8;
            if (self.input_neg >> j) & 1 == 1 {
                input_neg |= 1 << p;
            }
        }
        NpnTransform {
            perm,
            input_neg,
            output_neg: self.output_neg,
        }
    }

    /// This transformation followed by `next`:
    /// `t.then(&u).apply(f) == u.apply(t.apply(f))`.
    pub fn then(&self, next: &NpnTransform) -> NpnTransform {
        let mut perm = [0u8; 6];
        let mut input_neg = 0u8;
        for (j, slot) in perm.iter_mut().enumerate() {
            let p1 = self.perm[j] as usize;
            *slot = next.perm[p1];
            let neg = ((self.input_neg >> j) & 1) ^ ((next.input_neg >> p1) & 1);
            input_neg |= neg << j;
        }
        NpnTransform {
            perm,
            input_neg,
            output_neg: self.output_neg ^ next.output_neg,
        }
    }
}

/// NPN canonical form of `truth` over `inputs` inputs (at most 6) and the
/// transformation `t` with `t.apply(truth, inputs) == canon`.
///
/// Up to four inputs this is a read from a table built on first use.
pub fn npn_canon(truth: u64, inputs: usize) -> (u64, NpnTransform) {
    assert!(inputs <= 6, "NPN canonisation handles at most 6 inputs");
    let truth = truth & row_mask(inputs);
    if inputs <= 4 {
        let entry = npn_table(inputs)[truth as usize];
        return unpack(entry);
    }
    canon_search(truth, inputs, true, true)
}

/// NP canonical form (permutations and input complements, no output
/// complement) and the transformation reaching it.
pub fn np_canon(truth: u64, inputs: usize) -> (u64, NpnTransform) {
    assert!(inputs <= 6, "NP canonisation handles at most 6 inputs");
    canon_search(truth & row_mask(inputs), inputs, true, false)
}

/// P canonical form (input permutations only) and the permutation reaching it.
pub fn p_canon(truth: u64, inputs: usize) -> (u64, NpnTransform) {
    assert!(inputs <= 6, "P canonisation handles at most 6 inputs");
    canon_search(truth & row_mask(inputs), inputs, false, false)
}

/// NPN canonical form by exhaustive search, without the table (the
/// reference the table is checked against; also what five and six inputs use).
pub fn npn_canon_exact(truth: u64, inputs: usize) -> (u64, NpnTransform) {
    assert!(inputs <= 6, "NPN canonisation handles at most 6 inputs");
    canon_search(truth & row_mask(inputs), inputs, true, true)
}

/// The swaps of Heap's algorithm: applying them in order from the identity
/// visits every permutation of `n` items once.
fn heap_swaps(n: usize) -> Vec<(u8, u8)> {
    let mut swaps = Vec::new();
    let mut c = vec![0usize; n];
    let mut i = 1;
    while i < n {
        if c[i] < i {
            let j = if i % 2 == 0 { 0 } else { c[i] };
            swaps.push((j as u8, i as u8));
            c[i] += 1;
            i = 1;
        } else {
            c[i] = 0;
            i += 1;
        }
    }
    swaps
}

fn swaps_for(n: usize) -> &'static [(u8, u8)] {
    static SWAPS: [OnceLock<Vec<(u8, u8)>>; 7] = [const { OnceLock::new() }; 7];
    SWAPS[n].get_or_init(|| heap_swaps(n))
}

/// Visits every transformed function of `f` allowed by the flags, with the
/// transformation producing it.
fn for_each_image(
    f: u64,
    n: usize,
    negate_inputs: bool,
    negate_output: bool,
    mut visit: impl FnMut(u64, &[u8; 6], u8, bool),
) {
    let mask = row_mask(n);
    let mut g = f & mask;
    let mut perm: [u8; 6] = [0, 1, 2, 3, 4, 5];
    let swaps = swaps_for(n);
    let mut step = 0;
    loop {
        // g = f with inputs fed by perm (no complements yet).
        if negate_inputs {
            let mut h = g;
            let mut m = 0u8;
            for k in 0..(1u32 << n) {
                if k > 0 {
                    let bit = k.trailing_zeros() as usize;
                    h = negate_input_word(h, bit) & mask;
                    m ^= 1 << bit;
                }
                visit(h, &perm, m, false);
                if negate_output {
                    visit(h ^ mask, &perm, m, true);
                }
            }
        } else {
            visit(g, &perm, 0, false);
            if negate_output {
                visit(g ^ mask, &perm, 0, true);
            }
        }
        if step == swaps.len() {
            break;
        }
        let (a, b) = swaps[step];
        step += 1;
        g = swap_inputs_word(g, a as usize, b as usize) & mask;
        for p in perm.iter_mut().take(n) {
            if *p == a {
                *p = b;
            } else if *p == b {
                *p = a;
            }
        }
    }
}

/// Builds the transformation from the search state: the permuted function
/// `g` had its variables complemented by `mask`, so original input j (fed
/// from variable perm[j]) is complemented when bit perm[j] of `mask` is set.
fn transform_from(perm: &[u8; 6], mask: u8, output_neg: bool, n: usize) -> NpnTransform {
    let mut input_neg = 0u8;
    for (j, &p) in perm.iter().enumerate().take(n) {
        input_neg |= ((mask >> p) & 1) << j;
    }
    NpnTransform {
        perm: *perm,
        input_neg,
        output_neg,
    }
}

fn canon_search(f: u64, n: usize, negate_inputs: bool, negate_output: bool) -> (u64, NpnTransform) {
    let mut best = u64::MAX;
    let mut best_state = ([0, 1, 2, 3, 4, 5], 0u8, false);
    for_each_image(f, n, negate_inputs, negate_output, |g, perm, mask, out| {
        if g < best {
            best = g;
            best_state = (*perm, mask, out);
        }
    });
    let t = transform_from(&best_state.0, best_state.1, best_state.2, n);
    debug_assert_eq!(t.apply(f, n), best);
    (best, t)
}

fn pack(canon: u64, t: &NpnTransform) -> u32 {
    let mut word = canon as u32 & 0xFFFF;
    for j in 0..4 {
        word |= (t.perm[j] as u32 & 3) << (16 + 2 * j);
    }
    word |= (t.input_neg as u32 & 0xF) << 24;
    word |= (t.output_neg as u32) << 28;
    word
}

fn unpack(word: u32) -> (u64, NpnTransform) {
    let mut perm = [0, 1, 2, 3, 4, 5];
    for (j, p) in perm.iter_mut().enumerate().take(4) {
        *p = ((word >> (16 + 2 * j)) & 3) as u8;
    }
    let t = NpnTransform {
        perm,
        input_neg: ((word >> 24) & 0xF) as u8,
        output_neg: (word >> 28) & 1 == 1,
    };
    ((word & 0xFFFF) as u64, t)
}

const UNSET: u32 = u32::MAX;

/// The packed canonical form and transformation of every function of `n`
/// inputs (n <= 4), built on first use by walking each class's orbit once.
fn npn_table(n: usize) -> &'static [u32] {
    static TABLES: [OnceLock<Vec<u32>>; 5] = [const { OnceLock::new() }; 5];
    TABLES[n].get_or_init(|| build_table(n))
}

fn build_table(n: usize) -> Vec<u32> {
    let size = 1usize << (1usize << n);
    let mut table = vec![UNSET; size];
    let mut orbit: Vec<(u64, NpnTransform)> = Vec::new();
    for f in 0..size as u64 {
        if table[f as usize] != UNSET {
            continue;
        }
        orbit.clear();
        for_each_image(f, n, true, true, |g, perm, mask, out| {
            orbit.push((g, transform_from(perm, mask, out, n)));
        });
        let &(canon, to_canon) = orbit
            .iter()
            .min_by_key(|(g, _)| *g)
            .expect("orbit is never empty");
        for (g, t) in &orbit {
            if table[*g as usize] == UNSET {
                // g = t(f) and canon = to_canon(f), so canon = to_canon(t^-1(g)).
                let from_g = t.inverse().then(&to_canon);
                table[*g as usize] = pack(canon, &from_g);
            }
        }
    }
    table
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn transform_algebra() {
        let t = NpnTransform {
            perm: [2, 0, 1, 3, 4, 5],
            input_neg: 0b101,
            output_neg: true,
        };
        let u = NpnTransform {
            perm: [1, 2, 0, 3, 4, 5],
            input_neg: 0b010,
            output_neg: false,
        };
        for f in [0xE8u64, 0x96, 0x80, 0x1E, 0x6A] {
            assert_eq!(t.inverse().apply(t.apply(f, 3), 3), f);
            assert_eq!(t.then(&u).apply(f, 3), u.apply(t.apply(f, 3), 3));
        }
    }

    #[test]
    fn wiring_reading_of_a_transform() {
        // and2 (0x8) fed with pin 0 from variable 1 complemented and pin 1 from
        // variable 0: g(x0, x1) = !x1 & x0 = 0x2.
        let t = NpnTransform {
            perm: [1, 0, 2, 3, 4, 5],
            input_neg: 0b01,
            output_neg: false,
        };
        assert_eq!(t.apply(0x8, 2), 0x2);
    }

    #[test]
    fn table_agrees_with_search_on_three_inputs() {
        for f in 0..256u64 {
            let (c, t) = npn_canon(f, 3);
            assert_eq!(c, npn_canon_exact(f, 3).0);
            assert_eq!(t.apply(f, 3), c);
        }
    }
}
