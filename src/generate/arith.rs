//! Arithmetic building blocks shared by the adders, multipliers and counters:
//! full and half adders, and column compression of a bit matrix.
//!
//! A bit matrix is a list of columns; column j holds bits of weight 2^j.
//! Compression replaces three bits of a column by a full adder (sum stays,
//! carry moves one column up) or two by a half adder, until every column
//! holds at most two bits; a ripple adder then adds the two rows. Wallace
//! compresses every column as far as it can in each stage (full adders on
//! triples, a half adder on a leftover pair only in columns taller than
//! two); Dadda compresses
//! only as much as needed to reach the next height of the sequence
//! 2, 3, 4, 6, 9, 13, ... (each term floor(1.5 x) the previous one).

use crate::network::{Lit, Network};

/// Full adder as three-input XOR and majority: `(sum, carry)`.
pub(super) fn full_adder(net: &mut Network, a: Lit, b: Lit, c: Lit) -> (Lit, Lit) {
    let half = net.xor(a, b);
    let sum = net.xor(half, c);
    let carry = net.maj(a, b, c);
    (sum, carry)
}

/// Half adder: `(sum, carry)`.
pub(super) fn half_adder(net: &mut Network, a: Lit, b: Lit) -> (Lit, Lit) {
    (net.xor(a, b), net.and(a, b))
}

/// Ripple-carry addition of equally long `a` and `b` with carry `cin`:
/// sum bits and carry out.
pub(super) fn ripple(net: &mut Network, a: &[Lit], b: &[Lit], cin: Lit) -> (Vec<Lit>, Lit) {
    debug_assert_eq!(a.len(), b.len());
    let mut carry = cin;
    let mut sum = Vec::with_capacity(a.len());
    for (&x, &y) in a.iter().zip(b) {
        let (s, c) = full_adder(net, x, y, carry);
        sum.push(s);
        carry = c;
    }
    (sum, carry)
}

/// How a bit matrix is compressed to two rows.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(super) enum Compression {
    /// Reduce every column as much as possible in each stage.
    Wallace,
    /// Reduce only to the next height of the Dadda sequence.
    Dadda,
}

/// Adds all bits of the matrix `columns` and returns the low `width` bits of
/// the total (the caller guarantees the total fits, so higher bits are 0).
pub(super) fn sum_columns(
    net: &mut Network,
    mut columns: Vec<Vec<Lit>>,
    scheme: Compression,
    width: usize,
) -> Vec<Lit> {
    columns.resize(columns.len().max(width) + 1, Vec::new());
    let max_height = |cols: &Vec<Vec<Lit>>| cols.iter().map(Vec::len).max().unwrap_or(0);
    while max_height(&columns) > 2 {
        columns = match scheme {
            Compression::Wallace => wallace_stage(net, &columns),
            Compression::Dadda => {
                let target = dadda_target(max_height(&columns));
                let next = dadda_stage(net, &columns, target);
                // Dadda's bound guarantees progress; if a stage ever made
                // none, a Wallace stage keeps the loop finite.
                if next == columns {
                    wallace_stage(net, &columns)
                } else {
                    next
                }
            }
        };
    }
    let row = |k: usize, cols: &Vec<Vec<Lit>>| -> Vec<Lit> {
        cols.iter()
            .map(|c| c.get(k).copied().unwrap_or(Lit::FALSE))
            .collect()
    };
    let (a, b) = (row(0, &columns), row(1, &columns));
    let (mut sum, _) = ripple(net, &a, &b, Lit::FALSE);
    sum.resize(width, Lit::FALSE);
    sum.truncate(width);
    sum
}

/// The largest term of 2, 3, 4, 6, 9, ... below `height`.
fn dadda_target(height: usize) -> usize {
    let mut d = 2;
    loop {
        let next = d * 3 / 2;
        if next >= height {
            return d;
        }
        d = next;
    }
}

fn push_at(cols: &mut Vec<Vec<Lit>>, j: usize, bit: Lit) {
    if cols.len() <= j {
        cols.resize(j + 1, Vec::new());
    }
    cols[j].push(bit);
}

fn wallace_stage(net: &mut Network, columns: &[Vec<Lit>]) -> Vec<Vec<Lit>> {
    let mut next: Vec<Vec<Lit>> = vec![Vec::new(); columns.len()];
    for (j, col) in columns.iter().enumerate() {
        let mut rest = col.as_slice();
        while rest.len() >= 3 {
            let (s, c) = full_adder(net, rest[0], rest[1], rest[2]);
            push_at(&mut next, j, s);
            push_at(&mut next, j + 1, c);
            rest = &rest[3..];
        }
        if rest.len() == 2 && col.len() > 2 {
            let (s, c) = half_adder(net, rest[0], rest[1]);
            push_at(&mut next, j, s);
            push_at(&mut next, j + 1, c);
            rest = &[];
        }
        for &bit in rest {
            push_at(&mut next, j, bit);
        }
    }
    next
}

fn dadda_stage(net: &mut Network, columns: &[Vec<Lit>], target: usize) -> Vec<Vec<Lit>> {
    let mut next: Vec<Vec<Lit>> = vec![Vec::new(); columns.len()];
    for (j, col) in columns.iter().enumerate() {
        let mut rest = col.as_slice();
        // Carries already placed in `next[j]` count towards the height.
        let mut height = col.len() + next[j].len();
        while height > target && rest.len() >= 2 {
            if height == target + 1 || rest.len() == 2 {
                let (s, c) = half_adder(net, rest[0], rest[1]);
                push_at(&mut next, j, s);
                push_at(&mut next, j + 1, c);
                rest = &rest[2..];
                height -= 1;
            } else {
                let (s, c) = full_adder(net, rest[0], rest[1], rest[2]);
                push_at(&mut next, j, s);
                push_at(&mut next, j + 1, c);
                rest = &rest[3..];
                height -= 2;
            }
        }
        for &bit in rest {
            push_at(&mut next, j, bit);
        }
    }
    next
}

#[cfg(test)]
mod tests {
    #[test]
    fn dadda_heights() {
        // Dadda sequence 2, 3, 4, 6, 9, 13 (Dadda 1965, common practice).
        assert_eq!(super::dadda_target(3), 2);
        assert_eq!(super::dadda_target(8), 6);
        assert_eq!(super::dadda_target(9), 6);
        assert_eq!(super::dadda_target(10), 9);
    }
}
