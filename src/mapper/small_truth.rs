//! Truth tables of up to six variables in one `u64`, as the mapper uses them.
//!
//! Every table is kept in *replicated* form: a function of `m` variables is
//! stored as the six-variable table that ignores variables `m..6`. Then
//! negation is a plain `!`, two tables over the same leaves combine with one
//! bitwise operation, and a function has exactly one representation whatever
//! number of variables it is said to have. Row `r` gives variable `k` the
//! value of bit `k` of `r` (the project-wide convention).

/// Rows where variable `v` is 1.
pub const VAR_MASKS: [u64; 6] = [
    0xAAAA_AAAA_AAAA_AAAA,
    0xCCCC_CCCC_CCCC_CCCC,
    0xF0F0_F0F0_F0F0_F0F0,
    0xFF00_FF00_FF00_FF00,
    0xFFFF_0000_FFFF_0000,
    0xFFFF_FFFF_0000_0000,
];

/// The table of variable `v` alone.
#[inline]
pub fn var(v: usize) -> u64 {
    VAR_MASKS[v]
}

/// Replicates the low `2^vars` bits of `truth` over all 64 rows.
pub fn replicate(truth: u64, vars: usize) -> u64 {
    if vars >= 6 {
        return truth;
    }
    let width = 1usize << vars;
    let mut t = truth & ((1u64 << width) - 1);
    let mut w = width;
    while w < 64 {
        t |= t << w;
        w *= 2;
    }
    t
}

/// True when `truth` depends on variable `v`.
#[inline]
pub fn depends_on(truth: u64, v: usize) -> bool {
    let shift = 1u32 << v;
    ((truth >> shift) ^ truth) & !VAR_MASKS[v] != 0
}

/// Exchanges variables `i` and `j` (`i < j`) of `truth`.
#[inline]
pub fn swap_vars(truth: u64, i: usize, j: usize) -> u64 {
    debug_assert!(i < j);
    let shift = (1u32 << j) - (1u32 << i);
    let low = VAR_MASKS[i] & !VAR_MASKS[j];
    (truth & !(low | (low << shift))) | ((truth & low) << shift) | ((truth >> shift) & low)
}

/// Re-expresses a table over the sorted leaf list `from` as a table over the
/// sorted leaf list `to`, which must contain every leaf of `from`.
pub fn stretch(mut truth: u64, from: &[u32], to: &[u32]) -> u64 {
    let mut j = to.len();
    for i in (0..from.len()).rev() {
        loop {
            j -= 1;
            if to[j] == from[i] {
                break;
            }
        }
        if i != j {
            truth = swap_vars(truth, i, j);
        }
    }
    truth
}

/// Majority of three tables.
#[inline]
pub fn majority(a: u64, b: u64, c: u64) -> u64 {
    (a & b) | (a & c) | (b & c)
}

/// Removes the leaves `truth` does not depend on, shifting the remaining
/// variables down; returns the new leaf count.
pub fn minimise_support(truth: &mut u64, leaves: &mut [u32], size: usize) -> usize {
    let mut kept = 0;
    for v in 0..size {
        if depends_on(*truth, v) {
            if kept != v {
                *truth = swap_vars(*truth, kept, v);
                leaves[kept] = leaves[v];
            }
            kept += 1;
        }
    }
    kept
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn swap_and_stretch_match_row_semantics() {
        // f(x0, x1) = x0 & !x1 over two variables: rows 1 only -> 0b0010.
        let f = replicate(0b0010, 2);
        let g = swap_vars(f, 0, 1); // now x1 & !x0: row 2 only.
        assert_eq!(g & 0xF, 0b0100);
        // Stretch f over leaves [5, 9] into [3, 5, 7, 9]: x0 -> var 1, x1 -> var 3.
        let s = stretch(f, &[5, 9], &[3, 5, 7, 9]);
        assert_eq!(s, VAR_MASKS[1] & !VAR_MASKS[3]);
    }

    #[test]
    fn support_minimisation_drops_unused_leaves() {
        let mut t = VAR_MASKS[0] ^ VAR_MASKS[2];
        let mut leaves = [10, 11, 12, 0, 0, 0];
        let n = minimise_support(&mut t, &mut leaves, 3);
        assert_eq!(n, 2);
        assert_eq!(&leaves[..2], &[10, 12]);
        assert_eq!(t, VAR_MASKS[0] ^ VAR_MASKS[1]);
        assert!(!depends_on(t, 2));
    }
}
