//! Functional completeness of a set of cells (Post's criteria).
//!
//! E. Post (1941) showed that a set of Boolean functions builds every function
//! exactly when it is not contained in any of five classes: functions that
//! preserve 0, functions that preserve 1, self-dual functions, monotone
//! functions and affine functions. Library cells come with the constants 0
//! and 1 for free (tie cells), and the constants already escape the first
//! three classes, so for a library only "all monotone" and "all affine" can
//! fail. [`missing_basics`] checks all five and says in plain words which
//! basic function is out of reach.

use crate::truth::table::{cofactor_word, row_mask};

/// A function of up to six inputs as a truth table.
#[derive(Clone, Copy, Debug)]
pub struct SmallFunction {
    /// Truth table (bit r = value on row r).
    pub truth: u64,
    /// Number of inputs.
    pub inputs: usize,
}

fn preserves_zero(f: SmallFunction) -> bool {
    f.truth & 1 == 0
}

fn preserves_one(f: SmallFunction) -> bool {
    (f.truth >> ((1u64 << f.inputs) - 1)) & 1 == 1
}

fn is_self_dual(f: SmallFunction) -> bool {
    let rows = 1u64 << f.inputs;
    let all = rows - 1;
    (0..rows).all(|r| ((f.truth >> r) & 1) != ((f.truth >> (r ^ all)) & 1))
}

/// Whether raising any input never lowers the output.
pub fn is_monotone(f: SmallFunction) -> bool {
    (0..f.inputs).all(|k| {
        let low = cofactor_word(f.truth, k, false);
        let high = cofactor_word(f.truth, k, true);
        low & !high & row_mask(f.inputs) == 0
    })
}

/// Whether the function is an XOR of some inputs, possibly complemented.
pub fn is_affine(f: SmallFunction) -> bool {
    let constant = f.truth & 1;
    let linear: Vec<usize> = (0..f.inputs)
        .filter(|&k| (f.truth >> (1u64 << k)) & 1 != constant)
        .collect();
    (0..(1u64 << f.inputs)).all(|r| {
        let v = linear.iter().fold(constant, |acc, &k| acc ^ ((r >> k) & 1));
        (f.truth >> r) & 1 == v
    })
}

/// The reasons the functions cannot build everything (empty when they are
/// complete). With `constants_free`, the constants 0 and 1 join the set.
pub fn missing_basics(functions: &[SmallFunction], constants_free: bool) -> Vec<String> {
    let mut set: Vec<SmallFunction> = functions.to_vec();
    if constants_free {
        set.push(SmallFunction {
            truth: 0,
            inputs: 0,
        });
        set.push(SmallFunction {
            truth: 1,
            inputs: 0,
        });
    }
    let mut reasons = Vec::new();
    if set.iter().all(|&f| is_monotone(f)) {
        reasons.push(
            "cannot build NOT: every cell is monotone (raising an input never lowers its output)"
                .to_string(),
        );
    }
    if set.iter().all(|&f| is_affine(f)) {
        reasons.push(
            "cannot build AND: every cell is affine (an XOR of inputs, possibly complemented), and XORs only combine into XORs"
                .to_string(),
        );
    }
    if set.iter().all(|&f| preserves_zero(f)) {
        reasons.push(
            "cannot build the constant 1 or NOT: every cell outputs 0 when all its inputs are 0"
                .to_string(),
        );
    }
    if set.iter().all(|&f| preserves_one(f)) {
        reasons.push(
            "cannot build the constant 0 or NOT: every cell outputs 1 when all its inputs are 1"
                .to_string(),
        );
    }
    if set.iter().all(|&f| is_self_dual(f)) {
        reasons.push(
            "cannot build a constant or AND: every cell is self-dual (complementing all inputs complements the output)"
                .to_string(),
        );
    }
    reasons
}

#[cfg(test)]
mod tests {
    use super::*;

    fn f(truth: u64, inputs: usize) -> SmallFunction {
        SmallFunction { truth, inputs }
    }

    #[test]
    fn classic_bases() {
        // NAND alone is complete (Sheffer 1913); AND+OR is monotone; XOR+NOT affine.
        assert!(missing_basics(&[f(0x7, 2)], true).is_empty());
        assert!(missing_basics(&[f(0x8, 2), f(0xE, 2)], true)[0].contains("NOT"));
        assert!(missing_basics(&[f(0x6, 2), f(0x1, 1)], true)[0].contains("AND"));
        // Majority and NOT: self-dual both, complete once constants are free.
        assert!(missing_basics(&[f(0xE8, 3), f(0x1, 1)], true).is_empty());
        assert!(!missing_basics(&[f(0xE8, 3), f(0x1, 1)], false).is_empty());
    }
}
