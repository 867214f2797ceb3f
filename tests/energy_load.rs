//! The load-dependent energy term against hand computations.
//!
//! A toggle of a net costs `switch_energy + switch_energy_per_load · load`,
//! the load counted like static timing's (driven pins' `input_load`, plus
//! `primary_output_load` per primary output): the first-order `½·C·Vdd²`
//! per charge or discharge of the net's capacitance (common practice), with
//! C the driver's own plus the driven capacitance. Every expected number is
//! worked out by hand in the comments from the pattern order (integer
//! counts of toggles) and the cell numbers chosen here.

use ribbonmap::library::{Cell, DelayModel, Leakage, Library, Units};
use ribbonmap::study::power::{
    energy_from_activity, simulate_activity, InputVectors, Stimulus, SwitchingCircuit,
};

fn cell(name: &str, truth: u64, arity: usize, input_load: f64, energy: (f64, f64)) -> Cell {
    Cell {
        name: name.into(),
        inputs: ["a", "b"][..arity].iter().map(|s| s.to_string()).collect(),
        output: "y".into(),
        truth,
        area: 1.0,
        delay: DelayModel {
            intrinsic: 1.0,
            per_load: 0.0,
        },
        input_load,
        switch_energy: energy.0,
        switch_energy_per_load: energy.1,
        leakage: Leakage::Constant(0.0),
        devices: 2,
    }
}

/// inv: input load 1, energy 0.5 + 0.25 per load; and2: input load 2,
/// energy 1 + 0.125 per load; primary outputs load 3.
fn library() -> Library {
    Library {
        name: "hand-load".into(),
        description: "numbers chosen for hand computation".into(),
        units: Units {
            area: "u".into(),
            delay: "t".into(),
            energy: "e".into(),
            power: "p".into(),
        },
        supply_v: None,
        primary_output_load: 3.0,
        cells: vec![
            cell("inv", 0b01, 1, 1.0, (0.5, 0.25)),
            cell("and2", 0b1000, 2, 2.0, (1.0, 0.125)),
        ],
        storage: Vec::new(),
    }
}

/// g0 = inv(a); g1 = inv(g0), a primary output; g2 = and2(g0, a), also a
/// primary output (always 0, since g0 = !a).
fn circuit() -> SwitchingCircuit {
    let mut c = SwitchingCircuit::new(1);
    let a = c.input_net(0);
    let g0 = c.add_gate(0, &[a]);
    let g1 = c.add_gate(0, &[g0]);
    let g2 = c.add_gate(1, &[g0, a]);
    c.add_end(g1);
    c.add_end(g2);
    c
}

#[test]
fn loads_are_counted_like_static_timing() {
    // g0 drives an inv pin (1) and an and2 pin (2): 3. g1 and g2 drive one
    // primary output each: 3.
    assert_eq!(circuit().output_loads(&library()), vec![3.0, 3.0, 3.0]);
}

#[test]
fn energy_per_toggle_grows_with_the_driven_load() {
    let lib = library();
    let c = circuit();
    // a = 0, 1, 0, 1: three transitions; a, g0 and g1 flip on each, g2
    // never does.
    let vectors = InputVectors::parse("0\n1\n0\n1\n", "v", 1).unwrap();
    let stimulus = Stimulus::Vectors {
        vectors,
        probability: 0.5,
        seed: 1,
    };
    let activity = simulate_activity(&c, &lib, &stimulus).unwrap();
    assert_eq!(activity.toggles, vec![3, 3, 0]);
    let report = energy_from_activity(&c, &lib, &activity);
    // Per toggle: g0 0.5 + 0.25·3 = 1.25, g1 0.5 + 0.25·3 = 1.25.
    // Total 3·1.25 + 3·1.25 = 7.5 over 3 transitions = 2.5 per operation
    // (without the load term it would be 3·0.5·2 / 3 = 1).
    assert_eq!(report.energy_per_op, 2.5);
}

#[test]
fn a_library_without_the_field_loads_with_zero_and_one_with_it_keeps_it() {
    let base = r#"{"format": "ribbonmap-library/1", "name": "t", "description": "test",
      "units": {"area": "u", "delay": "t", "energy": "e", "power": "p"},
      "cells": [
        {"name": "inv", "inputs": ["a"], "output": "y", "function": "!a", "area": 1,
         "delay": {"intrinsic": 1, "per_load": 1}, "switch_energy": 0.5 EXTRA},
        {"name": "nand2", "inputs": ["a", "b"], "output": "y", "function": "!(a & b)", "area": 1,
         "delay": {"intrinsic": 1, "per_load": 1}}
      ]}"#;
    let old = Library::from_json_str(&base.replace("EXTRA", ""), "old.json").unwrap();
    assert_eq!(old.cells[0].switch_energy_per_load, 0.0);
    let new = Library::from_json_str(
        &base.replace("EXTRA", r#", "switch_energy_per_load": 0.25"#),
        "new.json",
    )
    .unwrap();
    assert_eq!(new.cells[0].switch_energy_per_load, 0.25);
    // Adding the field changes the library's content hash (caches keyed on
    // it must not mix the two), leaving it out keeps the old hash.
    assert_ne!(old.content_hash(), new.content_hash());
    let negative = base.replace("EXTRA", r#", "switch_energy_per_load": -1"#);
    assert!(Library::from_json_str(&negative, "neg.json").is_err());
}

#[test]
fn the_characterised_library_carries_half_c_v_squared_per_unit_load() {
    // The built-in ribbon3 is the demo kit's characterisation: unit load
    // 30 aF, supply 0.2 V, inv output 40 aF (libraries/devices/demo/demo.json).
    // ½·30·0.2² = 0.6 aJ per unit load; ½·40·0.2² = 0.8 aJ own.
    let lib = Library::builtin("ribbon3").unwrap();
    let inv = lib.cell("inv").unwrap();
    assert!((inv.switch_energy_per_load - 0.6).abs() < 1e-9);
    assert!((inv.switch_energy - 0.8).abs() < 1e-9);
}
