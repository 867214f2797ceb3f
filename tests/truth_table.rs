//! TruthTable operations against row-by-row definitions (exhaustive
//! simulation), for word-sized and bit-vector tables alike.

use proptest::prelude::*;
use ribbonmap::network::SplitMix64;
use ribbonmap::truth::TruthTable;

fn random_table(inputs: usize, rng: &mut SplitMix64) -> TruthTable {
    TruthTable::from_fn(inputs, |_| rng.next() & 1 == 1)
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]

    #[test]
    fn operations_match_their_definitions(inputs in 1usize..=8, seed in any::<u64>()) {
        let mut rng = SplitMix64::new(seed);
        let f = random_table(inputs, &mut rng);
        let g = random_table(inputs, &mut rng);
        let k = (rng.next() % inputs as u64) as usize;
        let j = (rng.next() % inputs as u64) as usize;
        let and = f.and(&g);
        let or = f.or(&g);
        let xor = f.xor(&g);
        let not = f.not();
        let c0 = f.cofactor(k, false);
        let c1 = f.cofactor(k, true);
        let swapped = f.swap_inputs(k, j);
        let negated = f.negate_input(k);
        for r in 0..(1u64 << inputs) {
            prop_assert_eq!(and.get(r), f.get(r) && g.get(r));
            prop_assert_eq!(or.get(r), f.get(r) || g.get(r));
            prop_assert_eq!(xor.get(r), f.get(r) != g.get(r));
            prop_assert_eq!(not.get(r), !f.get(r));
            prop_assert_eq!(c0.get(r), f.get(r & !(1 << k)));
            prop_assert_eq!(c1.get(r), f.get(r | (1 << k)));
            // Shannon expansion: f = x_k ? f1 : f0.
            let bit = (r >> k) & 1 == 1;
            prop_assert_eq!(f.get(r), if bit { c1.get(r) } else { c0.get(r) });
            let (bk, bj) = ((r >> k) & 1, (r >> j) & 1);
            let s = (r & !(1 << k) & !(1 << j)) | (bk << j) | (bj << k);
            prop_assert_eq!(swapped.get(r), f.get(s));
            prop_assert_eq!(negated.get(r), f.get(r ^ (1 << k)));
        }
        prop_assert!(!c0.depends_on(k));
        prop_assert_eq!(f.count_ones() + not.count_ones(), 1u64 << inputs);
        // Growing then shrinking the support gives the function back.
        let wide = f.extend_to(inputs + 2);
        prop_assert!(!wide.depends_on(inputs) && !wide.depends_on(inputs + 1));
        let (shrunk, from) = wide.shrink_to_support();
        let (shrunk_f, from_f) = f.shrink_to_support();
        prop_assert_eq!(shrunk, shrunk_f);
        prop_assert_eq!(from, from_f);
    }
}

#[test]
fn hex_and_binary_text() {
    // docs/library-format.md truth-table convention: maj3 = 0xE8 (rows 7..0 = 1110 1000).
    let maj = TruthTable::from_fn(3, |r| (r & 7).count_ones() >= 2);
    assert_eq!(maj.to_hex(), "0xE8");
    assert_eq!(maj.to_binary(), "11101000");
    assert_eq!(maj.as_u64(), Some(0xE8));
    let wide = maj.extend_to(7);
    assert_eq!(wide.to_hex().len(), 2 + 32);
    assert!(wide.to_hex().ends_with("E8E8"));
    assert_eq!(TruthTable::variable(6, 7).count_ones(), 64);
    assert_eq!(TruthTable::one(7).count_ones(), 128);
}

#[test]
fn truth_words_parse_up_to_six_inputs() {
    use ribbonmap::truth::parse_truth_word;
    // The six-input parity function, row by row from the popcount of the row
    // (integer arithmetic): written in hex with Rust's own formatter, in
    // binary most significant row first (docs/library-format.md).
    let parity = (0..64u64).fold(0u64, |acc, r| acc | (((r.count_ones() & 1) as u64) << r));
    assert_eq!(parse_truth_word(&format!("{parity:#018x}"), 6), Ok(parity));
    assert_eq!(parse_truth_word(&format!("{parity:#066b}"), 6), Ok(parity));
    assert_eq!(parse_truth_word(&format!("{parity:064b}"), 6), Ok(parity));
    // Seven inputs do not fit a word; a table with bits above its rows, or
    // binary digits of the wrong count, is refused.
    assert!(parse_truth_word("0x1", 7)
        .unwrap_err()
        .contains("at most 6"));
    let above = parse_truth_word("0x1E8", 3).unwrap_err();
    assert!(above.contains("bits above row 7"), "{above}");
    assert!(parse_truth_word("1110100", 3).is_err());
    assert_eq!(parse_truth_word("11101000", 3), Ok(0xE8));
    assert_eq!(parse_truth_word("0b1110_1000", 3), Ok(0xE8));
    assert!(parse_truth_word("0x", 3).unwrap_err().contains("no digits"));
}
