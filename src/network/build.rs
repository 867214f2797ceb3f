//! Building logic for an arbitrary small truth table (cell functions, BLIF
//! covers, mapped cells read back).
//!
//! The decomposition is Shannon expansion with shortcuts for the cases the
//! node kinds express directly (AND, OR, XOR in any phase, and three-input
//! majority in any input and output phase), so a cell such as `maj3` or
//! `xnor3` comes back as the node it is rather than as a mux tree.

use super::{Lit, Network};

/// Bit masks of the rows where input `var` is 1, for up to six inputs.
const VAR_MASKS: [u64; 6] = [
    0xAAAA_AAAA_AAAA_AAAA,
    0xCCCC_CCCC_CCCC_CCCC,
    0xF0F0_F0F0_F0F0_F0F0,
    0xFF00_FF00_FF00_FF00,
    0xFFFF_0000_FFFF_0000,
    0xFFFF_FFFF_0000_0000,
];

fn full_mask(vars: usize) -> u64 {
    if vars >= 6 {
        u64::MAX
    } else {
        (1u64 << (1 << vars)) - 1
    }
}

/// Negative and positive cofactors of `truth` (over `vars` inputs) on `var`,
/// each replicated so that it no longer depends on `var`.
fn cofactors(truth: u64, var: usize) -> (u64, u64) {
    let m = VAR_MASKS[var];
    let shift = 1u32 << var;
    let neg = truth & !m;
    let pos = truth & m;
    (neg | (neg << shift), pos | (pos >> shift))
}

impl Network {
    /// Builds the function `truth` of `fanins` (bit r of `truth` is the value
    /// on row r; row r gives fanin k the value of bit k of r). At most six
    /// fanins; bits beyond `2^fanins.len()` are ignored.
    pub fn from_truth(&mut self, truth: u64, fanins: &[Lit]) -> Lit {
        assert!(fanins.len() <= 6, "from_truth takes at most six fanins");
        let n = fanins.len();
        let truth = truth & full_mask(n);
        // Replicate the table to 64 bits so cofactoring ignores n.
        let mut t = truth;
        let mut width = 1usize << n;
        while width < 64 {
            t |= t << width;
            width *= 2;
        }
        self.build_rec(t, fanins, n)
    }

    fn build_rec(&mut self, t: u64, fanins: &[Lit], n: usize) -> Lit {
        if t == 0 {
            return Lit::FALSE;
        }
        if t == u64::MAX {
            return Lit::TRUE;
        }
        // Support of t among the first n variables.
        let support: Vec<usize> = (0..n)
            .filter(|&v| {
                let (c0, c1) = cofactors(t, v);
                c0 != c1
            })
            .collect();
        if support.len() == 3 {
            if let Some(lit) = self.try_majority(t, fanins, &support) {
                return lit;
            }
        }
        // Expand on the highest variable in the support.
        let v = *support.last().expect("non-constant function has support");
        let (f0, f1) = cofactors(t, v);
        let x = fanins[v];
        if f0 == !f1 {
            let g = self.build_rec(f0, fanins, n);
            return self.xor(x, g);
        }
        if f0 == 0 {
            let g = self.build_rec(f1, fanins, n);
            return self.and(x, g);
        }
        if f1 == 0 {
            let g = self.build_rec(f0, fanins, n);
            return self.and(!x, g);
        }
        if f0 == u64::MAX {
            let g = self.build_rec(f1, fanins, n);
            return self.or(!x, g);
        }
        if f1 == u64::MAX {
            let g = self.build_rec(f0, fanins, n);
            return self.or(x, g);
        }
        let g0 = self.build_rec(f0, fanins, n);
        let g1 = self.build_rec(f1, fanins, n);
        self.mux(x, g1, g0)
    }

    /// Recognises majority of three support variables in any input and
    /// output phase.
    fn try_majority(&mut self, t: u64, fanins: &[Lit], support: &[usize]) -> Option<Lit> {
        let (a, b, c) = (
            VAR_MASKS[support[0]],
            VAR_MASKS[support[1]],
            VAR_MASKS[support[2]],
        );
        for phases in 0..8u32 {
            let pa = if phases & 1 != 0 { !a } else { a };
            let pb = if phases & 2 != 0 { !b } else { b };
            let pc = if phases & 4 != 0 { !c } else { c };
            let maj = (pa & pb) | (pa & pc) | (pb & pc);
            for out in [false, true] {
                let m = if out { !maj } else { maj };
                if m == t {
                    let la = fanins[support[0]].xor(phases & 1 != 0);
                    let lb = fanins[support[1]].xor(phases & 2 != 0);
                    let lc = fanins[support[2]].xor(phases & 4 != 0);
                    return Some(self.maj(la, lb, lc).xor(out));
                }
            }
        }
        None
    }
}
