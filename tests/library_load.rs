//! Sound library files load with their defaults, alternative spellings
//! (`truth` instead of `function`, per-row leakage) and exact values.

use ribbonmap::library::{Leakage, Library};

const MINIMAL: &str = r#"{
  "format": "ribbonmap-library/1",
  "name": "tiny",
  "units": {"area": "um2", "delay": "ns", "energy": "fJ", "power": "uW"},
  "cells": [
    {"name": "nand2", "inputs": ["a", "b"], "output": "y", "function": "~(a & b)",
     "area": 4, "delay": {"intrinsic": 2, "per_load": 1}},
    {"name": "mux", "inputs": ["s", "t", "e"], "output": "y", "truth": "0b11100100",
     "area": 8, "delay": {"intrinsic": 3, "per_load": 1}, "leakage": [1, 2, 3, 4, 5, 6, 7, 8],
     "switch_energy": 0.5, "devices": 12, "input_load": 2}
  ]
}"#;

#[test]
fn defaults_and_alternative_spellings() {
    let lib = Library::from_json_str(MINIMAL, "tiny.json").unwrap();
    assert_eq!(lib.primary_output_load, 1.0);
    assert_eq!(lib.supply_v, None);
    assert!(lib.storage.is_empty());
    let nand2 = lib.cell("nand2").unwrap();
    assert_eq!(nand2.truth, 0x7);
    assert_eq!(nand2.input_load, 1.0);
    assert_eq!(nand2.switch_energy, 0.0);
    assert_eq!(nand2.leakage, Leakage::Constant(0.0));
    assert_eq!(nand2.devices, 0);
    // mux: s ? e : t with s = input 0, t = input 1, e = input 2; written out
    // row by row (rows 7..0) it is 1110 0100.
    let mux = lib.cell("mux").unwrap();
    let expected = (0..8u64).fold(0u64, |acc, r| {
        let (s, t, e) = (r & 1, (r >> 1) & 1, (r >> 2) & 1);
        acc | ((if s == 1 { e } else { t }) << r)
    });
    assert_eq!(mux.truth, expected);
    assert_eq!(mux.mean_leakage(), 4.5);
    assert_eq!(mux.devices, 12);
    assert_eq!(mux.delay_for_load(3.0), 6.0);
}

#[test]
fn a_nand_alone_is_complete_and_monotone_sets_are_not() {
    // NAND alone is functionally complete (Sheffer 1913; common practice).
    let only_nand = MINIMAL.replace(
        r#",
    {"name": "mux", "inputs": ["s", "t", "e"], "output": "y", "truth": "0b11100100",
     "area": 8, "delay": {"intrinsic": 3, "per_load": 1}, "leakage": [1, 2, 3, 4, 5, 6, 7, 8],
     "switch_energy": 0.5, "devices": 12, "input_load": 2}"#,
        "",
    );
    assert!(Library::from_json_str(&only_nand, "x.json").is_ok());
    let and_only = only_nand.replace("~(a & b)", "a & b");
    let err = Library::from_json_str(&and_only, "x.json").unwrap_err();
    assert!(err.to_string().contains("cannot build NOT"), "{err}");
}

#[test]
fn round_trip_of_every_builtin_text() {
    for name in Library::builtin_names() {
        let text = ribbonmap::library::builtin_text(name).unwrap();
        let a = Library::from_json_str(text, "a").unwrap();
        assert_eq!(Some(a.clone()), Library::builtin(name));
        // Each cell's NPN class is consistent with its function.
        for c in &a.cells {
            let (canon, t) = c.npn();
            assert_eq!(t.apply(c.truth, c.arity()), canon);
        }
    }
}
