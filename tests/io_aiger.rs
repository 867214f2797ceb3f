//! AIGER reader and writer against outside references.
//!
//! 1. The small worked examples of the format description (Armin Biere,
//!    "The AIGER And-Inverter Graph (AIG) Format", 2007): an AND gate, a half
//!    adder and a toggle flip-flop, in both encodings. The files below are
//!    written FROM MEMORY of that description, not copied from it; their
//!    functions are checked by exhaustive simulation against the truth
//!    tables of AND, XOR/AND (half adder) and the toggle (common knowledge).
//! 2. Every reference netlist of tests/data/reference (PROVENANCE.md there)
//!    written as AIGER in both encodings, read back and proven equal to its
//!    source by the equivalence checker.

use ribbonmap::equiv::{check, EquivOptions, Verdict};
use ribbonmap::io::{
    read_netlist, read_netlist_bytes, write_aiger, NetlistFormat, ReadOptions, StorageCellSpec,
};
use ribbonmap::network::{InitValue, Network};
use std::path::{Path, PathBuf};

fn read(bytes: &[u8], name: &str) -> Network {
    read_netlist_bytes(bytes, name, NetlistFormat::Aig, &ReadOptions::default())
        .unwrap_or_else(|e| panic!("{e}"))
}

/// Output (and next-state) values of `net` for every input row, as one
/// bit column per output: bit r of word k is output k on row r, where bit
/// i of r is combinational input i.
fn truth_columns(net: &Network) -> Vec<u64> {
    let n = net.combinational_inputs().len();
    assert!(n <= 6);
    let words: Vec<u64> = (0..n)
        .map(|i| {
            (0..64u64)
                .filter(|r| r >> i & 1 == 1)
                .fold(0, |w, r| w | 1 << r)
        })
        .collect();
    let rows = 1u64 << n;
    let mask = if rows == 64 {
        u64::MAX
    } else {
        (1 << rows) - 1
    };
    net.simulate_outputs(&words)
        .into_iter()
        .map(|w| w & mask)
        .collect()
}

// From memory: the AND gate example (inputs 2 and 4, output 6 = 2 & 4).
const AND_AAG: &[u8] = b"aag 3 2 0 1 1\n2\n4\n6\n6 2 4\n";
// The same in binary: gate 6 stores differences 6 - 4 = 2 and 4 - 2 = 2.
const AND_AIG: &[u8] = b"aig 3 2 0 1 1\n6\n\x02\x02";

// From memory: the half adder with a symbol table and a comment; sum is
// 6 = !(x & y) & !(!x & !y), carry is 12 = x & y.
const HALF_ADDER_AAG: &[u8] =
    b"aag 7 2 0 2 3\n2\n4\n6\n12\n6 13 15\n12 2 4\n14 3 5\ni0 x\ni1 y\no0 s\no1 c\nc\nhalf adder\n";
// Binary: gates renumbered 6 = x & y, 8 = !x & !y, 10 = !6 & !8.
// Differences: 6-4=2, 4-2=2; 8-5=3, 5-3=2; 10-9=1, 9-7=2.
const HALF_ADDER_AIG: &[u8] =
    b"aig 5 2 0 2 3\n10\n6\n\x02\x02\x03\x02\x01\x02i0 x\ni1 y\no0 s\no1 c\nc\nhalf adder\n";

// From memory: the toggle flip-flop, a latch 2 whose next state is its
// complement 3; outputs are the latch and its complement.
const TOGGLE_AAG: &[u8] = b"aag 1 0 1 2 0\n2 3\n2\n3\n";
const TOGGLE_AIG: &[u8] = b"aig 1 0 1 2 0\n3\n2\n3\n";

#[test]
fn and_gate_example_in_both_encodings() {
    for bytes in [AND_AAG, AND_AIG] {
        let net = read(bytes, "and.aig");
        // AND truth table over rows 00, 01, 10, 11: only row 3.
        assert_eq!(truth_columns(&net), vec![0b1000]);
        assert_eq!(net.gate_count(), 1);
    }
}

#[test]
fn half_adder_example_in_both_encodings() {
    for bytes in [HALF_ADDER_AAG, HALF_ADDER_AIG] {
        let net = read(bytes, "ha.aig");
        let names: Vec<&String> = net.outputs().keys().collect();
        assert_eq!(names, ["s", "c"]);
        let ins: Vec<&String> = net.inputs().keys().collect();
        assert_eq!(ins, ["x", "y"]);
        // Sum = XOR (rows 1 and 2), carry = AND (row 3).
        assert_eq!(truth_columns(&net), vec![0b0110, 0b1000]);
    }
}

#[test]
fn toggle_flip_flop_example_in_both_encodings() {
    for bytes in [TOGGLE_AAG, TOGGLE_AIG] {
        let net = read(bytes, "toggle.aig");
        assert_eq!(net.storage().len(), 1);
        assert_eq!(net.storage()[0].init, InitValue::Zero);
        // Row 0: latch 0, row 1: latch 1. Outputs q and !q, next state !q.
        assert_eq!(truth_columns(&net), vec![0b10, 0b01, 0b01]);
    }
}

#[test]
fn the_writer_reproduces_the_examples() {
    // The writer numbers variables as the binary encoding requires, so the
    // AND gate and the toggle come out byte for byte (symbols aside).
    let and = read(AND_AAG, "and.aag");
    let text = write_aiger(&and, false, None);
    assert!(
        text.starts_with(b"aag 3 2 0 1 1\n2\n4\n6\n6 4 2\n"),
        "{}",
        String::from_utf8_lossy(&text)
    );
    let bin = write_aiger(&and, true, None);
    assert!(bin.starts_with(AND_AIG));
    let toggle = read(TOGGLE_AAG, "t.aag");
    assert!(write_aiger(&toggle, true, None).starts_with(TOGGLE_AIG));
}

#[test]
fn latch_initial_values_survive_both_encodings() {
    // Initial 1 and unknown (the latch's own literal), from the later
    // revision of the format.
    let text = b"aag 2 0 2 2 0\n2 3 1\n4 2 4\n2\n4\n";
    let net = read(text, "init.aag");
    assert_eq!(net.storage()[0].init, InitValue::One);
    assert_eq!(net.storage()[1].init, InitValue::Unknown);
    for binary in [false, true] {
        let back = read(&write_aiger(&net, binary, Some("c")), "back.aig");
        assert_eq!(back.storage()[0].init, InitValue::One);
        assert_eq!(back.storage()[1].init, InitValue::Unknown);
        assert_eq!(truth_columns(&back), truth_columns(&net));
    }
}

#[test]
fn ascii_gates_in_any_order_and_cycles() {
    // Gate 8 uses gate 6, which comes later in the file.
    let text = b"aag 4 2 0 1 2\n2\n4\n8\n8 6 2\n6 2 5\n";
    let net = read(text, "order.aag");
    // 8 = (x & !y) & x = x & !y: row 1 only.
    assert_eq!(truth_columns(&net), vec![0b0010]);
    let cycle = b"aag 4 2 0 1 2\n2\n4\n8\n8 6 2\n6 8 5\n";
    let e = read_netlist_bytes(cycle, "c.aag", NetlistFormat::Aag, &ReadOptions::default())
        .unwrap_err();
    assert!(e.message.contains("cycle"), "{e}");
    assert!(e.line >= 5, "{e}");
}

#[test]
fn malformed_files_are_located_errors() {
    let cases: &[(&[u8], u32)] = &[
        (b"", 1),
        (b"aag 1 1 0 1\n", 1),
        (b"aag 3 2 0 1 1\n2\n4\n6\n6 2\n", 5),
        (b"aag 3 2 0 1 1\n2\n2\n6\n6 2 4\n", 3),
        (b"aag 3 2 0 1 1\n2\n4\n9\n6 2 4\n", 4),
        (b"aag 4294967295 0 0 1 0\n0\n", 1),
        (b"aag 3 2 0 1 1000000\n2\n4\n6\n6 2 4\n", 1),
        (b"aig 3 2 0 1 1\n6\n\x07\x02", 3),
        (b"aig 3 2 0 1 1\n6\n\x82\x82", 3),
        (b"aag 3 2 0 1 1\n2\n4\n6\n6 2 4\ni5 x\n", 6),
        (b"aag 1 1 0 0 0\n2\n", 1),
        (b"aag 1 1 0 1 0 1\n2\n2\n", 1),
    ];
    for (bytes, line) in cases {
        let e = read_netlist_bytes(
            bytes,
            "bad.aag",
            NetlistFormat::Aag,
            &ReadOptions::default(),
        )
        .expect_err(&String::from_utf8_lossy(bytes));
        assert_eq!(
            e.line,
            *line,
            "{e} for {:?}",
            String::from_utf8_lossy(bytes)
        );
        assert!(e.column > 0, "{e}");
    }
}

fn reference_netlists() -> Vec<PathBuf> {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/data/reference/netlists");
    let mut files = Vec::new();
    for family in ["arith", "iscas85", "iscas89", "epfl"] {
        let mut here: Vec<PathBuf> = std::fs::read_dir(root.join(family))
            .unwrap()
            .map(|e| e.unwrap().path())
            .collect();
        here.sort();
        files.extend(here);
    }
    files
}

#[test]
fn every_reference_netlist_survives_aiger_and_is_proven_equal() {
    // s27's flip-flops are instances of an undefined cell `ff` (PROVENANCE.md).
    let opts = ReadOptions {
        storage_cells: vec!["ff:D:Q:CK".parse::<StorageCellSpec>().unwrap()],
        ..ReadOptions::default()
    };
    let files = reference_netlists();
    assert!(
        files.len() >= 38,
        "reference set incomplete: {}",
        files.len()
    );
    for file in &files {
        let net = read_netlist(file, &opts).unwrap_or_else(|e| panic!("{e}"));
        for binary in [false, true] {
            let bytes = write_aiger(&net, binary, None);
            let format = if binary {
                NetlistFormat::Aig
            } else {
                NetlistFormat::Aag
            };
            let back = read_netlist_bytes(&bytes, "back", format, &ReadOptions::default())
                .unwrap_or_else(|e| panic!("{}: {e}", file.display()));
            assert_eq!(back.inputs().len(), net.inputs().len());
            assert_eq!(back.storage().len(), net.storage().len());
            let verdict = check(&net, &back, &EquivOptions::default())
                .unwrap_or_else(|e| panic!("{}: {e}", file.display()));
            assert!(
                matches!(verdict, Verdict::Equivalent { .. }),
                "{} ({}): {verdict:?}",
                file.display(),
                if binary { "aig" } else { "aag" }
            );
        }
    }
}
