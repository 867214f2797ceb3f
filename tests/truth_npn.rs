//! NPN, NP and P canonical forms, checked by brute force over all functions
//! of three and four inputs and by random transformations.

use proptest::prelude::*;
use ribbonmap::truth::npn::npn_canon_exact;
use ribbonmap::truth::{np_canon, npn_canon, p_canon, NpnTransform};
use std::collections::HashSet;

fn count_classes(inputs: usize, canon: impl Fn(u64, usize) -> (u64, NpnTransform)) -> usize {
    let functions = 1u64 << (1u64 << inputs);
    let mut classes = HashSet::new();
    for f in 0..functions {
        let (c, t) = canon(f, inputs);
        // The returned transformation really maps f onto its canonical form.
        assert_eq!(t.apply(f, inputs), c, "f = {f:#x}");
        assert!(c <= f, "the canonical form is the smallest in the class");
        classes.insert(c);
    }
    classes.len()
}

#[test]
fn npn_class_counts_three_and_four_inputs() {
    // 14 NPN classes of 3-input and 222 of 4-input functions
    // (OEIS A000370, via PROVENANCE.md "facts remembered").
    assert_eq!(count_classes(3, npn_canon), 14);
    assert_eq!(count_classes(4, npn_canon), 222);
}

#[test]
fn np_class_counts_three_and_four_inputs() {
    // 22 and 402 classes under input permutation and negation (from memory).
    assert_eq!(count_classes(3, np_canon), 22);
    assert_eq!(count_classes(4, np_canon), 402);
}

#[test]
fn p_class_counts_three_and_four_inputs() {
    // 80 and 3984 classes under input permutation (from memory).
    assert_eq!(count_classes(3, p_canon), 80);
    assert_eq!(count_classes(4, p_canon), 3984);
}

#[test]
fn table_agrees_with_exhaustive_search_on_every_four_input_function() {
    // Both go through the crate's own transform code; the independent check
    // is `canon_agrees_with_an_independent_orbit_enumeration` below.
    for f in 0..65536u64 {
        assert_eq!(npn_canon(f, 4).0, npn_canon_exact(f, 4).0, "f = {f:#06x}");
    }
}

/// The 24 permutations of four inputs, listed by hand.
#[rustfmt::skip]
const PERMUTATIONS_OF_FOUR: [[usize; 4]; 24] = [
    [0, 1, 2, 3], [0, 1, 3, 2], [0, 2, 1, 3], [0, 2, 3, 1], [0, 3, 1, 2], [0, 3, 2, 1],
    [1, 0, 2, 3], [1, 0, 3, 2], [1, 2, 0, 3], [1, 2, 3, 0], [1, 3, 0, 2], [1, 3, 2, 0],
    [2, 0, 1, 3], [2, 0, 3, 1], [2, 1, 0, 3], [2, 1, 3, 0], [2, 3, 0, 1], [2, 3, 1, 0],
    [3, 0, 1, 2], [3, 0, 2, 1], [3, 1, 0, 2], [3, 1, 2, 0], [3, 2, 0, 1], [3, 2, 1, 0],
];

/// `f` with its inputs permuted, some inputs and maybe the output negated,
/// computed row by row (row r gives input k the value of bit k of r),
/// sharing no code with `ribbonmap::truth`.
fn transformed(f: u16, perm: [usize; 4], negate_inputs: usize, negate_output: bool) -> u16 {
    let mut g = 0u16;
    for row in 0..16usize {
        let mut source = 0usize;
        for (k, &p) in perm.iter().enumerate() {
            let bit = (row >> k & 1) ^ (negate_inputs >> k & 1);
            source |= bit << p;
        }
        let value = (f >> source & 1 == 1) ^ negate_output;
        g |= u16::from(value) << row;
    }
    g
}

#[test]
fn canon_agrees_with_an_independent_orbit_enumeration() {
    // Orbits of the 24 * 16 * 2 = 768 hand-listed transformations; the
    // canonical form is the smallest truth table of the orbit (the crate's
    // documented choice, see npn_class_counts_three_and_four_inputs).
    let mut canon = vec![u16::MAX; 1 << 16];
    let mut orbits = 0;
    for f in 0..=u16::MAX {
        if canon[usize::from(f)] != u16::MAX {
            continue;
        }
        let mut orbit = Vec::with_capacity(768);
        for perm in PERMUTATIONS_OF_FOUR {
            for neg in 0..16 {
                for out in [false, true] {
                    orbit.push(transformed(f, perm, neg, out));
                }
            }
        }
        let least = *orbit.iter().min().unwrap();
        for g in orbit {
            canon[usize::from(g)] = least;
        }
        orbits += 1;
    }
    // 222 NPN classes of four-input functions (OEIS A000370, via
    // PROVENANCE.md "facts remembered").
    assert_eq!(orbits, 222);
    for f in 0..=u16::MAX {
        assert_eq!(
            npn_canon(u64::from(f), 4).0,
            u64::from(canon[usize::from(f)]),
            "f = {f:#06x}"
        );
    }
}

#[test]
fn small_input_counts() {
    // Two inputs by hand (integer enumeration): constants, literals, the
    // AND family (AND/OR/NAND/NOR with complements: 8 functions), XOR/XNOR.
    assert_eq!(count_classes(2, npn_canon), 4);
    assert_eq!(count_classes(1, npn_canon), 2);
    assert_eq!(count_classes(0, npn_canon), 1);
}

/// A random transformation of `inputs` inputs.
fn transform(inputs: usize) -> impl Strategy<Value = NpnTransform> {
    (
        Just((0..inputs as u8).collect::<Vec<u8>>()).prop_shuffle(),
        0u8..(1u8 << inputs),
        any::<bool>(),
    )
        .prop_map(move |(p, neg, out)| {
            let mut perm = [0, 1, 2, 3, 4, 5];
            perm[..inputs].copy_from_slice(&p);
            NpnTransform {
                perm,
                input_neg: neg,
                output_neg: out,
            }
        })
}

fn function_and_transform() -> impl Strategy<Value = (u64, usize, NpnTransform)> {
    (1usize..=6).prop_flat_map(|n| {
        let rows = 1u32 << n;
        let mask = if rows == 64 {
            u64::MAX
        } else {
            (1u64 << rows) - 1
        };
        (
            any::<u64>().prop_map(move |f| f & mask),
            Just(n),
            transform(n),
        )
    })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(48))]

    #[test]
    fn npn_canon_is_invariant_under_npn_transformations((f, n, t) in function_and_transform()) {
        let g = t.apply(f, n);
        let (cf, tf) = npn_canon(f, n);
        let (cg, tg) = npn_canon(g, n);
        prop_assert_eq!(cf, cg);
        prop_assert_eq!(tf.apply(f, n), cf);
        prop_assert_eq!(tg.apply(g, n), cg);
        // Wiring: tg then tf^-1 maps g back onto f.
        prop_assert_eq!(tg.then(&tf.inverse()).apply(g, n), f);
    }

    #[test]
    fn np_and_p_forms_are_invariant((f, n, t) in function_and_transform()) {
        let np = NpnTransform { output_neg: false, ..t };
        let p = NpnTransform { input_neg: 0, ..np };
        prop_assert_eq!(np_canon(np.apply(f, n), n).0, np_canon(f, n).0);
        prop_assert_eq!(p_canon(p.apply(f, n), n).0, p_canon(f, n).0);
        let (c, tr) = np_canon(f, n);
        prop_assert_eq!(tr.apply(f, n), c);
        prop_assert!(!tr.output_neg);
        let (c, tr) = p_canon(f, n);
        prop_assert_eq!(tr.apply(f, n), c);
        prop_assert_eq!(tr.input_neg, 0);
    }

    #[test]
    fn inverse_and_composition((f, n, t) in function_and_transform(), u_seed in any::<u64>()) {
        let u = NpnTransform {
            perm: t.inverse().perm,
            input_neg: (u_seed as u8) & ((1u16 << n) - 1) as u8,
            output_neg: u_seed & 256 != 0,
        };
        prop_assert_eq!(t.inverse().apply(t.apply(f, n), n), f);
        prop_assert_eq!(t.then(&u).apply(f, n), u.apply(t.apply(f, n), n));
    }
}

#[test]
fn matching_a_cell_to_a_cut_by_wiring() {
    // The mapper's use: cut function g over leaves (x0, x1, x2) = !x2 & x0 & !x1,
    // cell and3 (0x80). Equal NPN classes; the wiring t_cell.then(t_cut^-1)
    // tells which leaf feeds each pin and which pins are complemented.
    let cut = (0..8u64).fold(0, |acc, r| {
        let (x0, x1, x2) = (r & 1, (r >> 1) & 1, (r >> 2) & 1);
        acc | ((x0 & (1 - x1) & (1 - x2)) << r)
    });
    let (c_cut, t_cut) = npn_canon(cut, 3);
    let (c_cell, t_cell) = npn_canon(0x80, 3);
    assert_eq!(c_cut, c_cell);
    let wiring = t_cell.then(&t_cut.inverse());
    assert_eq!(wiring.apply(0x80, 3), cut);
    // Evaluate the wired cell directly: pin j reads leaf perm[j], complemented
    // when bit j of input_neg is set.
    for r in 0..8u64 {
        let pins: Vec<u64> = (0..3)
            .map(|j| ((r >> wiring.perm[j]) & 1) ^ ((wiring.input_neg >> j) & 1) as u64)
            .collect();
        let out = (pins[0] & pins[1] & pins[2]) ^ wiring.output_neg as u64;
        assert_eq!(out, (cut >> r) & 1);
    }
}
