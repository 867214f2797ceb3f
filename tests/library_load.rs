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
fn every_builtin_library_matches_its_json_text_read_independently() {
    // The loaded library is compared with the embedded JSON text as
    // serde_json alone reads it, and each cell's truth table with the
    // function text evaluated by the small evaluator below (written for
    // this test; rows follow docs/library-format.md: row r gives input k
    // the value of bit k of r).
    for name in Library::builtin_names() {
        let text = ribbonmap::library::builtin_text(name).unwrap();
        let json: serde_json::Value = serde_json::from_str(text).unwrap();
        let lib = Library::builtin(name).unwrap();
        assert_eq!(lib.name, json["name"].as_str().unwrap());
        assert_eq!(lib.units.area, json["units"]["area"].as_str().unwrap());
        assert_eq!(lib.units.delay, json["units"]["delay"].as_str().unwrap());
        assert_eq!(
            lib.primary_output_load,
            json["primary_output_load"].as_f64().unwrap_or(1.0)
        );
        assert_eq!(lib.supply_v, json["supply_v"].as_f64());
        let cells = json["cells"].as_array().unwrap();
        assert_eq!(lib.cells.len(), cells.len(), "{name}");
        for (cell, j) in lib.cells.iter().zip(cells) {
            let what = format!("{name}/{}", cell.name);
            assert_eq!(cell.name, j["name"].as_str().unwrap(), "{what}");
            let inputs: Vec<&str> = j["inputs"]
                .as_array()
                .unwrap()
                .iter()
                .map(|v| v.as_str().unwrap())
                .collect();
            assert_eq!(cell.inputs, inputs, "{what}");
            assert_eq!(cell.area, j["area"].as_f64().unwrap(), "{what}");
            assert_eq!(
                cell.delay.intrinsic,
                j["delay"]["intrinsic"].as_f64().unwrap(),
                "{what}"
            );
            assert_eq!(
                cell.delay.per_load,
                j["delay"]["per_load"].as_f64().unwrap(),
                "{what}"
            );
            assert_eq!(
                cell.input_load,
                j["input_load"].as_f64().unwrap_or(1.0),
                "{what}"
            );
            assert_eq!(
                cell.switch_energy,
                j["switch_energy"].as_f64().unwrap_or(0.0),
                "{what}"
            );
            assert_eq!(
                cell.switch_energy_per_load,
                j["switch_energy_per_load"].as_f64().unwrap_or(0.0),
                "{what}"
            );
            assert_eq!(
                u64::from(cell.devices),
                j["devices"].as_u64().unwrap_or(0),
                "{what}"
            );
            match (&cell.leakage, &j["leakage"]) {
                (Leakage::Constant(v), serde_json::Value::Number(n)) => {
                    assert_eq!(Some(*v), n.as_f64(), "{what}")
                }
                (Leakage::Constant(v), serde_json::Value::Null) => assert_eq!(*v, 0.0, "{what}"),
                (Leakage::PerRow(rows), serde_json::Value::Array(list)) => {
                    let want: Vec<Option<f64>> = list.iter().map(|x| x.as_f64()).collect();
                    let got: Vec<Option<f64>> = rows.iter().map(|&x| Some(x)).collect();
                    assert_eq!(got, want, "{what}");
                }
                (got, want) => panic!("{what}: leakage {got:?} from {want}"),
            }
            let function = j["function"].as_str().unwrap();
            assert_eq!(
                cell.truth,
                eval::truth_table(function, &inputs),
                "{what}: {function}"
            );
        }
        let storage = json["storage"].as_array().map_or(0, Vec::len);
        assert_eq!(lib.storage.len(), storage, "{name}");
    }
}

#[test]
fn independent_evaluator_by_hand() {
    // Hand-written truth tables (row r: input k is bit k of r).
    assert_eq!(eval::truth_table("a & b", &["a", "b"]), 0b1000);
    assert_eq!(eval::truth_table("!(a | b)", &["a", "b"]), 0b0001);
    assert_eq!(eval::truth_table("!((a & b) | c)", &["a", "b", "c"]), 0x07);
    assert_eq!(eval::truth_table("maj(a, b, c)", &["a", "b", "c"]), 0xE8);
    assert_eq!(eval::truth_table("a ^ b ^ c", &["a", "b", "c"]), 0x96);
}

/// A recursive-descent evaluator of the cell-function text, written for
/// this test and sharing nothing with `ribbonmap::truth::expr`: `!`/`~`,
/// `&`, `^`, `|` (in falling precedence, C order), parentheses and
/// `maj(x, y, z)`.
mod eval {
    pub fn truth_table(text: &str, inputs: &[&str]) -> u64 {
        let mut table = 0;
        for row in 0..1u64 << inputs.len() {
            let mut p = Parser {
                chars: text.chars().filter(|c| !c.is_whitespace()).collect(),
                at: 0,
                inputs,
                row,
            };
            let value = p.or();
            assert_eq!(p.at, p.chars.len(), "trailing text in {text}");
            table |= u64::from(value) << row;
        }
        table
    }

    struct Parser<'a> {
        chars: Vec<char>,
        at: usize,
        inputs: &'a [&'a str],
        row: u64,
    }

    impl Parser<'_> {
        fn eat(&mut self, c: char) -> bool {
            let hit = self.chars.get(self.at) == Some(&c);
            self.at += usize::from(hit);
            hit
        }
        fn or(&mut self) -> bool {
            let mut v = self.xor();
            while self.eat('|') {
                v |= self.xor();
            }
            v
        }
        fn xor(&mut self) -> bool {
            let mut v = self.and();
            while self.eat('^') {
                v ^= self.and();
            }
            v
        }
        fn and(&mut self) -> bool {
            let mut v = self.unary();
            while self.eat('&') {
                v &= self.unary();
            }
            v
        }
        fn unary(&mut self) -> bool {
            if self.eat('!') || self.eat('~') {
                return !self.unary();
            }
            if self.eat('(') {
                let v = self.or();
                assert!(self.eat(')'));
                return v;
            }
            let start = self.at;
            while self
                .chars
                .get(self.at)
                .is_some_and(|c| c.is_alphanumeric() || *c == '_')
            {
                self.at += 1;
            }
            let word: String = self.chars[start..self.at].iter().collect();
            if word == "maj" {
                assert!(self.eat('('));
                let x = self.or();
                assert!(self.eat(','));
                let y = self.or();
                assert!(self.eat(','));
                let z = self.or();
                assert!(self.eat(')'));
                return (x & y) | (x & z) | (y & z);
            }
            let k = self
                .inputs
                .iter()
                .position(|&i| i == word)
                .unwrap_or_else(|| panic!("unknown name {word:?}"));
            self.row >> k & 1 == 1
        }
    }
}

/// Post's five classes counted over every function of one to four inputs,
/// against the published class sizes: 0-preserving and 1-preserving
/// functions of n inputs number 2^(2^n - 1) each, self-dual ones 2^(2^(n-1))
/// (one free value per pair of complementary rows), affine ones 2^(n+1), and
/// monotone ones the Dedekind numbers 3, 6, 20, 168 (OEIS A000372). The
/// classes are read from the reasons `missing_basics` gives for a set made
/// of that one function, without the free constants.
#[test]
fn post_classes_have_their_published_sizes() {
    use ribbonmap::library::completeness::{is_affine, is_monotone, missing_basics, SmallFunction};
    const DEDEKIND: [u64; 5] = [2, 3, 6, 20, 168];
    for (n, &dedekind) in DEDEKIND.iter().enumerate().skip(1) {
        let rows = 1u64 << n;
        let (mut zero, mut one, mut dual, mut affine, mut monotone) = (0u64, 0, 0, 0, 0);
        for truth in 0..(1u64 << rows) {
            let f = SmallFunction { truth, inputs: n };
            let reasons = missing_basics(&[f], false);
            let has = |words: &str| reasons.iter().any(|r| r.contains(words));
            zero += has("outputs 0 when all its inputs are 0") as u64;
            one += has("outputs 1 when all its inputs are 1") as u64;
            dual += has("self-dual") as u64;
            let a = has("every cell is affine");
            let m = has("every cell is monotone");
            assert_eq!(a, is_affine(f), "{n} inputs, truth {truth:#x}");
            assert_eq!(m, is_monotone(f), "{n} inputs, truth {truth:#x}");
            affine += a as u64;
            monotone += m as u64;
            // With the constants free only "monotone" and "affine" can fail
            // (the constants are neither preserving nor self-dual).
            let free = missing_basics(&[f], true);
            assert_eq!(free.len(), a as usize + m as usize, "{n} inputs, {free:?}");
        }
        let half_rows = 1u32 << (n - 1);
        assert_eq!(zero, 1u64 << (rows - 1), "0-preserving, {n} inputs");
        assert_eq!(one, 1u64 << (rows - 1), "1-preserving, {n} inputs");
        assert_eq!(dual, 1u64 << half_rows, "self-dual, {n} inputs");
        assert_eq!(affine, 1u64 << (n + 1), "affine, {n} inputs");
        assert_eq!(monotone, dedekind, "monotone, {n} inputs");
    }
}

#[test]
fn names_and_pins_must_be_identifiers() {
    // docs/library-format.md: a cell name is an identifier; the loader's
    // message says what one is (letters, digits and '_', starting with a
    // letter or '_', the usual rule of programming languages, common
    // practice). Underscores anywhere and digits after the first character
    // are fine; a leading digit, a dash or a dot is not.
    let rename = |from: &str, to: &str| MINIMAL.replacen(from, to, 1);
    for good in ["nand_2", "_nand2", "N2_"] {
        let text = rename(r#""name": "nand2""#, &format!(r#""name": "{good}""#));
        let lib = Library::from_json_str(&text, "x.json").unwrap_or_else(|e| panic!("{good}: {e}"));
        assert!(lib.cell(good).is_some(), "{good}");
    }
    for bad in ["2nand", "nand-2", "nand.2", ""] {
        let text = rename(r#""name": "nand2""#, &format!(r#""name": "{bad}""#));
        let err = Library::from_json_str(&text, "x.json").unwrap_err();
        assert!(
            err.to_string()
                .contains(&format!("'{bad}' is not a valid name")),
            "{bad}: {err}"
        );
    }
    // The same rule for input pins.
    let text = MINIMAL.replacen(
        r#"["a", "b"], "output": "y", "function": "~(a & b)""#,
        r#"["a_1", "b_2"], "output": "y", "function": "~(a_1 & b_2)""#,
        1,
    );
    assert_eq!(
        Library::from_json_str(&text, "x.json").unwrap().cells[0].truth,
        0x7
    );
}

#[test]
fn a_bad_expression_is_quoted_and_long_ones_are_cut_at_sixty_characters() {
    // The message quotes the expression (so the column can be read against
    // it); one longer than 60 characters is cut to its first 60 and an
    // ellipsis, keeping the message one line (the loader's documented
    // behaviour in src/library/load.rs, checked by counting characters here).
    let text = MINIMAL.replacen("~(a & b)", "~(a & )", 1);
    let err = Library::from_json_str(&text, "x.json")
        .unwrap_err()
        .to_string();
    assert!(
        err.contains(r#"bad expression "~(a & )" at column 7"#),
        "{err}"
    );
    let long = format!("{}(a & )", "a & b & ".repeat(10));
    let text = MINIMAL.replacen("~(a & b)", &long, 1);
    let err = Library::from_json_str(&text, "x.json")
        .unwrap_err()
        .to_string();
    let first_sixty: String = long.chars().take(60).collect();
    assert!(
        err.contains(&format!("bad expression \"{first_sixty}…\" at column 86")),
        "{err}"
    );
}
