//! The switching-activity energy model against hand computations.
//!
//! Every expected number here is counted by integer arithmetic from the
//! pattern order, not taken from the model: under a Gray-code order exactly
//! one input flips per transition (bit i flips 2^(k-1-i) times over the
//! 2^k - 1 transitions of a k-bit reflected Gray code, common practice), and
//! a parity gate's output flips exactly when one of its inputs does.

use ribbonmap::library::{Cell, DelayModel, Leakage, Library, Units};
use ribbonmap::study::power::{
    energy_from_activity, estimate, simulate_activity, InputVectors, Stimulus, SwitchingCircuit,
};

fn cell(name: &str, arity: usize, truth: u64, switch_energy: f64, leakage: Leakage) -> Cell {
    Cell {
        name: name.into(),
        inputs: ["a", "b", "c"][..arity]
            .iter()
            .map(|s| s.to_string())
            .collect(),
        output: "y".into(),
        truth,
        area: 1.0,
        delay: DelayModel {
            intrinsic: 1.0,
            per_load: 0.0,
        },
        input_load: 1.0,
        switch_energy,
        switch_energy_per_load: 0.0,
        leakage,
        devices: 2,
    }
}

/// inv (switch 3, leakage 1 on input 0 and 5 on input 1), xor2 (switch 2,
/// leakage 0.5), and2 (switch 4, leakage 1, 2, 3, 4 on rows 0..3), maj3
/// (switch 8, leakage 0.25).
fn library() -> Library {
    Library {
        name: "hand".into(),
        description: "numbers chosen for hand computation".into(),
        units: Units {
            area: "u".into(),
            delay: "t".into(),
            energy: "e".into(),
            power: "p".into(),
        },
        supply_v: None,
        primary_output_load: 1.0,
        cells: vec![
            cell("inv", 1, 0b01, 3.0, Leakage::PerRow(vec![1.0, 5.0])),
            cell("xor2", 2, 0b0110, 2.0, Leakage::Constant(0.5)),
            cell(
                "and2",
                2,
                0b1000,
                4.0,
                Leakage::PerRow(vec![1.0, 2.0, 3.0, 4.0]),
            ),
            cell("maj3", 3, 0xE8, 8.0, Leakage::Constant(0.25)),
        ],
        storage: Vec::new(),
    }
}

const INV: u32 = 0;
const XOR2: u32 = 1;
const AND2: u32 = 2;

/// Vector file text of the k-bit reflected Gray code, input 0 first.
fn gray_code_file(k: usize) -> String {
    let mut text = String::from("# reflected Gray code\n");
    for j in 0u64..(1 << k) {
        let g = j ^ (j >> 1);
        for i in 0..k {
            text.push(if (g >> i) & 1 == 1 { '1' } else { '0' });
        }
        text.push('\n');
    }
    text
}

#[test]
fn inverter_chain_energy_and_per_row_leakage() {
    let lib = library();
    let mut c = SwitchingCircuit::new(1);
    let mut net = c.input_net(0);
    for _ in 0..5 {
        net = c.add_gate(INV, &[net]);
    }
    // x = 0, 1, 1, 1, 0: four transitions, x flips twice, so does every
    // inverter output.
    let vectors = InputVectors::parse("0\n1\n1\n1\n0\n", "v", 1).unwrap();
    let stimulus = Stimulus::Vectors {
        vectors,
        probability: 0.5,
        seed: 1,
    };
    let activity = simulate_activity(&c, &lib, &stimulus).unwrap();
    assert_eq!(activity.transitions, 4);
    assert_eq!(activity.toggles, vec![2; 5]);
    let report = energy_from_activity(&c, &lib, &activity);
    // 5 inverters x 2 toggles x 3 energy / 4 transitions = 30/4.
    assert_eq!(report.energy_per_op, 30.0 / 4.0);
    // Odd inverters see x (row 0 twice, row 1 three times): (1*2 + 5*3)/5;
    // even ones see !x: (1*3 + 5*2)/5. Three odd, two even: 77/5.
    assert!((report.static_power - 77.0 / 5.0).abs() < 1e-12);
}

#[test]
fn parity_chain_under_gray_code_across_word_boundaries() {
    // k = 8 inputs: 256 patterns span four 64-bit words, so transitions
    // across word boundaries are exercised.
    let k = 8usize;
    let lib = library();
    let mut c = SwitchingCircuit::new(k as u32);
    let mut acc = c.input_net(0);
    for i in 1..k as u32 {
        acc = c.add_gate(XOR2, &[acc, c.input_net(i)]);
    }
    let vectors = InputVectors::parse(&gray_code_file(k), "gray.txt", k).unwrap();
    assert_eq!(vectors.len(), 256);
    let stimulus = Stimulus::Vectors {
        vectors,
        probability: 0.5,
        seed: 1,
    };
    let activity = simulate_activity(&c, &lib, &stimulus).unwrap();
    // Gate m (1-based) computes the parity of inputs 0..=m and flips
    // whenever one of them does: sum over i <= m of 2^(k-1-i).
    let expected: Vec<u64> = (1..k)
        .map(|m| (0..=m).map(|i| 1u64 << (k - 1 - i)).sum())
        .collect();
    assert_eq!(activity.toggles, expected);
    let total: u64 = expected.iter().sum();
    let report = energy_from_activity(&c, &lib, &activity);
    let want = 2.0 * total as f64 / 255.0;
    assert!((report.energy_per_op - want).abs() < 1e-12);
    assert_eq!(report.static_power, 0.5 * (k - 1) as f64);
}

#[test]
fn and_gate_rows_weighted_by_occurrence() {
    // Inputs (a, b) in the order 00, 10, 11, 11, 01: rows 0, 1, 3, 3, 2.
    let lib = library();
    let mut c = SwitchingCircuit::new(2);
    let (a, b) = (c.input_net(0), c.input_net(1));
    c.add_gate(AND2, &[a, b]);
    let rows = [
        [false, false],
        [true, false],
        [true, true],
        [true, true],
        [false, true],
    ];
    let vectors =
        InputVectors::from_rows(2, &rows.iter().map(|r| r.to_vec()).collect::<Vec<_>>()).unwrap();
    let stimulus = Stimulus::Vectors {
        vectors,
        probability: 0.5,
        seed: 1,
    };
    let report = estimate(&c, &lib, &stimulus).unwrap();
    // Output 0, 0, 1, 1, 0: two toggles x 4 energy / 4 transitions.
    assert_eq!(report.energy_per_op, 2.0);
    // Leakage (1 + 2 + 4 + 4 + 3) / 5.
    assert!((report.static_power - 14.0 / 5.0).abs() < 1e-12);
}

#[test]
fn random_inputs_toggle_at_two_p_one_minus_p() {
    // Independent inputs with P(1) = p toggle with probability 2p(1-p)
    // between patterns (common practice); an inverter copies that.
    let lib = library();
    for p in [0.5, 0.25, 0.1] {
        let mut c = SwitchingCircuit::new(1);
        let x = c.input_net(0);
        c.add_gate(INV, &[x]);
        let stimulus = Stimulus::Random {
            probability: p,
            patterns: 1 << 17,
            seed: 99,
        };
        let activity = simulate_activity(&c, &lib, &stimulus).unwrap();
        let rate = activity.toggles[0] as f64 / activity.transitions as f64;
        let want = 2.0 * p * (1.0 - p);
        assert!(
            (rate - want).abs() < 0.01,
            "p = {p}: rate {rate}, want {want}"
        );
    }
}

#[test]
fn constant_nets_never_toggle_and_bad_inputs_are_errors() {
    use ribbonmap::study::power::{PowerError, NET_TRUE};
    let lib = library();
    let mut c = SwitchingCircuit::new(1);
    let x = c.input_net(0);
    c.add_gate(AND2, &[x, NET_TRUE]);
    c.add_gate(INV, &[NET_TRUE]);
    let stimulus = Stimulus::Vectors {
        vectors: InputVectors::parse("0\n1\n0\n", "v", 1).unwrap(),
        probability: 0.5,
        seed: 1,
    };
    let activity = simulate_activity(&c, &lib, &stimulus).unwrap();
    assert_eq!(activity.toggles, vec![2, 0]);
    let bad = Stimulus::Random {
        probability: 1.5,
        patterns: 64,
        seed: 1,
    };
    assert_eq!(
        simulate_activity(&c, &lib, &bad).unwrap_err(),
        PowerError::BadProbability(1.5)
    );
    let mut wrong = SwitchingCircuit::new(1);
    let x = wrong.input_net(0);
    wrong.add_gate(7, &[x]);
    assert!(matches!(
        simulate_activity(&wrong, &lib, &Stimulus::default()),
        Err(PowerError::UnknownCell { .. })
    ));
}
