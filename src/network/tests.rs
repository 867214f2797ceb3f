//! Unit tests of the network: every normal form is checked against
//! exhaustive simulation (common practice: a two- or three-input function is
//! fully determined by its eight-row truth table).

use super::*;

fn three_inputs() -> (Network, [Lit; 3]) {
    let mut n = Network::new("t");
    let a = n.add_input("a").unwrap();
    let b = n.add_input("b").unwrap();
    let c = n.add_input("c").unwrap();
    (n, [a, b, c])
}

fn truth_of(n: &Network, lit: Lit) -> u64 {
    let words: Vec<u64> = (0..n.combinational_inputs().len())
        .map(|k| exhaustive_word(k, 0))
        .collect();
    lit_word(&n.simulate(&words), lit) & 0xFF
}

#[test]
fn structural_hashing_stores_identical_logic_once() {
    let (mut n, [a, b, c]) = three_inputs();
    let x = n.and(a, b);
    let y = n.and(b, a);
    assert_eq!(x, y);
    let p = n.xor(!a, b);
    let q = n.xor(a, !b);
    assert_eq!(p, q);
    assert_eq!(n.xor(a, b), !p);
    let m = n.maj(!a, !b, !c);
    let m2 = n.maj(c, b, a);
    assert_eq!(m, !m2);
    assert_eq!(
        n.kind_counts(),
        KindCounts {
            and: 1,
            xor: 1,
            maj: 1
        }
    );
}

#[test]
fn trivial_cases_fold() {
    let (mut n, [a, b, _]) = three_inputs();
    assert_eq!(n.and(a, a), a);
    assert_eq!(n.and(a, !a), Lit::FALSE);
    assert_eq!(n.and(a, Lit::TRUE), a);
    assert_eq!(n.xor(a, a), Lit::FALSE);
    assert_eq!(n.xor(a, !a), Lit::TRUE);
    assert_eq!(n.xor(Lit::TRUE, a), !a);
    assert_eq!(n.maj(a, a, b), a);
    assert_eq!(n.maj(a, !a, b), b);
    assert_eq!(n.gate_count(), 0);
    let m = n.maj(Lit::FALSE, a, b);
    assert_eq!(m, n.and(a, b));
}

#[test]
fn every_operator_matches_its_truth_table() {
    // Reference values: a = 0xAA, b = 0xCC, c = 0xF0 (docs/library-format.md, truth-table convention).
    let (mut n, [a, b, c]) = three_inputs();
    let cases: [(Lit, u64); 6] = [
        (n.and(a, b), 0xAA & 0xCC),
        (n.or(a, b), 0xAA | 0xCC),
        (n.xor(a, !b), !(0xAA ^ 0xCC) & 0xFF),
        (n.maj(a, b, c), 0xE8),
        (n.maj(!a, b, !c), {
            let (x, y, z) = (!0xAAu64 & 0xFF, 0xCC, !0xF0u64 & 0xFF);
            (x & y) | (x & z) | (y & z)
        }),
        (n.mux(c, a, b), (0xF0 & 0xAA) | (!0xF0 & 0xCC) & 0xFF),
    ];
    for (lit, expect) in cases {
        assert_eq!(truth_of(&n, lit), expect & 0xFF);
    }
}

#[test]
fn from_truth_builds_every_three_input_function() {
    for t in 0..256u64 {
        let (mut n, ins) = three_inputs();
        let lit = n.from_truth(t, &ins);
        assert_eq!(truth_of(&n, lit), t, "function {t:#04x}");
    }
    let (mut n, ins) = three_inputs();
    let m = n.from_truth(0xE8, &ins);
    assert_eq!(n.kind(m.node()), NodeKind::Maj);
    let x = n.from_truth(0x96, &ins);
    assert_eq!(n.kind_counts().xor, 2, "{x}");
}

#[test]
fn from_truth_builds_random_six_input_functions() {
    let mut rng = SplitMix64::new(7);
    for _ in 0..200 {
        let mut n = Network::new("t");
        let ins: Vec<Lit> = (0..6)
            .map(|k| n.add_input(format!("x{k}")).unwrap())
            .collect();
        let t = rng.next();
        let lit = n.from_truth(t, &ins);
        let words: Vec<u64> = (0..6).map(|k| exhaustive_word(k, 0)).collect();
        assert_eq!(lit_word(&n.simulate(&words), lit), t);
    }
}

#[test]
fn cleanup_drops_dangling_logic_and_keeps_ports() {
    let (mut n, [a, b, c]) = three_inputs();
    let used = n.and(a, b);
    let _dangling = n.xor(b, c);
    let q = n
        .add_storage("r", Some("clk".into()), InitValue::Zero, None)
        .unwrap();
    let next = n.maj(used, q, c);
    n.set_storage_next("r", next).unwrap();
    n.add_output("y", !used).unwrap();
    let m = n.cleanup();
    assert_eq!(m.gate_count(), 2);
    assert_eq!(m.inputs().len(), 3);
    assert_eq!(m.storage().len(), 1);
    let words = [0xAA, 0xCC, 0xF0, 0x0F];
    assert_eq!(n.simulate_outputs(&words), m.simulate_outputs(&words));
    assert_eq!(m.depth(), 2);
}

#[test]
fn duplicate_names_are_rejected() {
    let (mut n, [a, _, _]) = three_inputs();
    assert!(n.add_input("a").is_err());
    n.add_output("y", a).unwrap();
    assert!(n.add_output("y", a).is_err());
}
