//! The BENCH reader against truth tables and against the Verilog reference.
//!
//! Every BENCH gate type (AND, NAND, OR, NOR, XOR, XNOR with two to five
//! inputs; NOT, BUFF, BUF; DFF) is read from hand-written text and simulated
//! exhaustively against its truth table computed here on integers (common
//! practice: the N-forms complement, XOR is odd parity). c17 and c432
//! (ISCAS-85, circuitgraph 0.2.1 via PROVENANCE.md) are written as BENCH by
//! this test from the gate lines of the Verilog reference, read by the
//! BENCH reader and proven equivalent to the Verilog read by the Verilog
//! reader. The format is described in docs/netlist-formats.md.

use ribbonmap::equiv::{check, EquivOptions, Verdict};
use ribbonmap::io::{read_netlist_str, NetlistFormat, ReadOptions};
use ribbonmap::network::{exhaustive_word, lit_word, Network};

fn bench(text: &str) -> Network {
    read_netlist_str(
        text,
        "t.bench",
        NetlistFormat::Bench,
        &ReadOptions::default(),
    )
    .unwrap_or_else(|e| panic!("{e}\n{text}"))
}

/// The expected truth table of an `n`-input gate, row by row.
fn expected(gate: &str, n: usize) -> u64 {
    let mut table = 0;
    for row in 0..1u64 << n {
        let ones = row.count_ones() as usize;
        let value = match gate {
            "AND" => ones == n,
            "NAND" => ones != n,
            "OR" => ones > 0,
            "NOR" => ones == 0,
            "XOR" => ones % 2 == 1,
            "XNOR" => ones.is_multiple_of(2),
            "NOT" => row & 1 == 0,
            "BUFF" | "BUF" => row & 1 == 1,
            other => panic!("{other}"),
        };
        table |= u64::from(value) << row;
    }
    table
}

#[test]
fn every_gate_type_with_two_to_five_inputs_simulates_its_truth_table() {
    let mut checked = 0;
    for gate in [
        "AND", "NAND", "OR", "NOR", "XOR", "XNOR", "NOT", "BUFF", "BUF",
    ] {
        let widths = if matches!(gate, "NOT" | "BUFF" | "BUF") {
            1..=1
        } else {
            2..=5
        };
        for n in widths {
            let names: Vec<String> = (0..n).map(|k| format!("i{k}")).collect();
            let mut text = String::from("# hand-written\n");
            for name in &names {
                text.push_str(&format!("INPUT({name})\n"));
            }
            text.push_str(&format!("OUTPUT(y)\ny = {gate}({})\n", names.join(", ")));
            let net = bench(&text);
            assert_eq!(net.inputs().len(), n);
            // Row r gives input k the value of bit k of r.
            assert_eq!(
                net.output_truth_tables(),
                Some(vec![expected(gate, n)]),
                "{gate} with {n} inputs"
            );
            checked += 1;
        }
    }
    assert_eq!(checked, 6 * 4 + 3);
}

#[test]
fn gate_names_are_case_insensitive() {
    let net = bench("INPUT(a)\nINPUT(b)\nOUTPUT(y)\ny = nAnD(a, b)\n");
    assert_eq!(net.output_truth_tables(), Some(vec![0b0111]));
}

#[test]
fn dff_is_a_storage_element_with_its_next_state() {
    // q = DFF(n): q is the stored value, n its next state. By hand:
    // y = q XOR b, n = a AND q.
    let net = bench("INPUT(a)\nINPUT(b)\nOUTPUT(y)\nq = DFF(n)\nn = AND(a, q)\ny = XOR(q, b)\n");
    assert_eq!(net.storage().len(), 1);
    assert_eq!(net.combinational_input_names(), ["a", "b", "q"]);
    let words: Vec<u64> = (0..3).map(|k| exhaustive_word(k, 0)).collect();
    let values = net.simulate(&words);
    let (a, b, q) = (words[0], words[1], words[2]);
    let mask = 0xFF;
    assert_eq!(lit_word(&values, net.outputs()["y"]) & mask, (q ^ b) & mask);
    assert_eq!(
        lit_word(&values, net.storage()["q"].next) & mask,
        (a & q) & mask
    );
}

/// The BENCH text of a gate-level Verilog file of the circuitgraph
/// distribution (`type name (out, in, ...);`), converted line by line here.
fn bench_from_verilog(verilog: &str) -> String {
    let mut text = String::from("# written by tests/io_bench.rs from the Verilog reference\n");
    let mut body = String::new();
    for statement in verilog.split(';') {
        let words: Vec<&str> = statement
            .split(|c: char| c.is_whitespace() || c == ',' || c == '(' || c == ')')
            .filter(|w| !w.is_empty())
            .collect();
        let Some(&first) = words.first() else {
            continue;
        };
        match first {
            "input" => {
                for w in &words[1..] {
                    text.push_str(&format!("INPUT({w})\n"));
                }
            }
            "output" => {
                for w in &words[1..] {
                    text.push_str(&format!("OUTPUT({w})\n"));
                }
            }
            "and" | "nand" | "or" | "nor" | "xor" | "xnor" | "not" | "buf" => {
                let gate = match first {
                    "buf" => "BUFF".to_string(),
                    g => g.to_ascii_uppercase(),
                };
                body.push_str(&format!(
                    "{} = {gate}({})\n",
                    words[2],
                    words[3..].join(", ")
                ));
            }
            "module" | "wire" | "endmodule" => {}
            other => panic!("unexpected statement {other}"),
        }
    }
    text + &body
}

#[test]
fn c17_and_c432_as_bench_are_proven_equal_to_the_verilog_reference() {
    for circuit in ["c17", "c432"] {
        let path = format!("tests/data/reference/netlists/iscas85/{circuit}.v");
        let verilog = std::fs::read_to_string(&path).unwrap();
        let reference = read_netlist_str(
            &verilog,
            &path,
            NetlistFormat::Verilog,
            &ReadOptions::default(),
        )
        .unwrap();
        let text = bench_from_verilog(&verilog);
        let net = bench(&text);
        assert_eq!(net.inputs().len(), reference.inputs().len(), "{circuit}");
        assert_eq!(net.outputs().len(), reference.outputs().len(), "{circuit}");
        let verdict = check(&reference, &net, &EquivOptions::default()).unwrap();
        assert!(
            matches!(verdict, Verdict::Equivalent { .. }),
            "{circuit}: {}",
            verdict.name()
        );
    }
    // The conversion is not vacuous: c17's BENCH has its six NAND lines.
    let c17 = std::fs::read_to_string("tests/data/reference/netlists/iscas85/c17.v").unwrap();
    let text = bench_from_verilog(&c17);
    assert_eq!(text.lines().filter(|l| l.contains("= NAND(")).count(), 6);
    assert!(text.contains("N22 = NAND(N10, N16)"), "{text}");
}

#[test]
fn a_changed_bench_gate_is_caught() {
    // The equivalence above can fail: c17 with one NAND turned into an AND
    // is reported different.
    let path = "tests/data/reference/netlists/iscas85/c17.v";
    let verilog = std::fs::read_to_string(path).unwrap();
    let reference = read_netlist_str(
        &verilog,
        path,
        NetlistFormat::Verilog,
        &ReadOptions::default(),
    )
    .unwrap();
    let text = bench_from_verilog(&verilog).replace("N22 = NAND(", "N22 = AND(");
    let verdict = check(&reference, &bench(&text), &EquivOptions::default()).unwrap();
    assert!(
        matches!(verdict, Verdict::Different { .. }),
        "{}",
        verdict.name()
    );
}
