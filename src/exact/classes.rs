//! Equivalence classes of small truth tables under input permutation (P)
//! and under input/output negation plus permutation (NPN), by orbit
//! enumeration: walk the tables in increasing order; an unseen table is its
//! class's smallest member (the representative), and applying every
//! transformation to it marks its whole class. Coverage tables solve one
//! function per class and weight the answer by the class size.

use super::gates::row_mask;

/// Which transformations define a class.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Transforms {
    /// Input permutations only.
    Permutation,
    /// Input permutations, input negations and output negation.
    Npn,
}

/// One class: its smallest member and how many functions it holds.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct FunctionClass {
    /// Smallest truth table of the class.
    pub representative: u64,
    /// Number of functions in the class.
    pub size: u64,
}

/// Every function of `inputs` inputs (at most 4) mapped to the index of its
/// class, and the classes in order of representative.
pub fn enumerate_classes(inputs: usize, transforms: Transforms) -> (Vec<u32>, Vec<FunctionClass>) {
    assert!(inputs <= 4, "class enumeration supports at most 4 inputs");
    let count = 1usize << (1usize << inputs);
    let mut class_of = vec![u32::MAX; count];
    let mut classes = Vec::new();
    let maps = transformations(inputs, transforms);
    let mask = row_mask(inputs);
    for f in 0..count {
        if class_of[f] != u32::MAX {
            continue;
        }
        let index = classes.len() as u32;
        let mut size = 0u64;
        for (rows, negate_output) in &maps {
            let mut g = apply(f as u64, rows);
            if *negate_output {
                g = !g & mask;
            }
            if class_of[g as usize] == u32::MAX {
                class_of[g as usize] = index;
                size += 1;
            }
        }
        classes.push(FunctionClass {
            representative: f as u64,
            size,
        });
    }
    (class_of, classes)
}

/// Every transformation as a row map (new row r reads old row map[r]) and an
/// output negation flag.
fn transformations(inputs: usize, transforms: Transforms) -> Vec<(Vec<usize>, bool)> {
    let rows = 1usize << inputs;
    let mut perms: Vec<Vec<usize>> = vec![Vec::new()];
    for k in 0..inputs {
        let mut next = Vec::new();
        for p in &perms {
            for pos in 0..=p.len() {
                let mut q = p.clone();
                q.insert(pos, k);
                next.push(q);
            }
        }
        perms = next;
    }
    let (negations, outputs): (usize, &[bool]) = match transforms {
        Transforms::Permutation => (1, &[false]),
        Transforms::Npn => (rows, &[false, true]),
    };
    let mut maps = Vec::new();
    for perm in &perms {
        for neg in 0..negations {
            let map: Vec<usize> = (0..rows)
                .map(|r| {
                    let mut old = 0;
                    for (k, &src) in perm.iter().enumerate() {
                        if r >> k & 1 == 1 {
                            old |= 1 << src;
                        }
                    }
                    old ^ neg
                })
                .collect();
            for &o in outputs {
                maps.push((map.clone(), o));
            }
        }
    }
    maps
}

fn apply(f: u64, map: &[usize]) -> u64 {
    let mut g = 0u64;
    for (r, &old) in map.iter().enumerate() {
        g |= (f >> old & 1) << r;
    }
    g
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn class_counts_match_the_known_numbers() {
        // NPN classes: 14 for three inputs, 222 for four (OEIS A000370, via
        // PROVENANCE.md). P classes: 80 and 3984 (OEIS A000585, from memory).
        for (n, t, count) in [
            (3, Transforms::Npn, 14),
            (4, Transforms::Npn, 222),
            (3, Transforms::Permutation, 80),
            (4, Transforms::Permutation, 3984),
        ] {
            let (class_of, classes) = enumerate_classes(n, t);
            assert_eq!(classes.len(), count, "{n} inputs {t:?}");
            assert_eq!(
                classes.iter().map(|c| c.size).sum::<u64>(),
                class_of.len() as u64
            );
        }
    }
}
