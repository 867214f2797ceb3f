//! Unit tests of the readers and writers on small hand-written netlists.

use super::*;
use crate::network::{exhaustive_word, Network};

fn read(text: &str, format: NetlistFormat) -> Result<Network, SourceError> {
    read_netlist_str(text, "t", format, &ReadOptions::default())
}

/// Output words of `net` over all input patterns (at most 6 inputs).
fn truth(net: &Network) -> Vec<u64> {
    let k = net.combinational_inputs().len();
    let words: Vec<u64> = (0..k).map(|i| exhaustive_word(i, 0)).collect();
    let mask = if k >= 6 {
        u64::MAX
    } else {
        (1u64 << (1 << k)) - 1
    };
    net.simulate_outputs(&words)
        .into_iter()
        .map(|w| w & mask)
        .collect()
}

#[test]
fn blif_cover_forward_reference_and_offset() {
    let net = read(
        ".model t\n.inputs a b c\n.outputs y z\n.names m c y\n11 1\n.names a b m\n0- 1\n-0 1\n.names a z\n1 0\n.end\n",
        NetlistFormat::Blif,
    )
    .unwrap();
    // y = nand(a, b) & c; z = !a (exhaustive, common practice).
    let t = truth(&net);
    let mut y = 0u64;
    let mut z = 0u64;
    for r in 0..8 {
        let (a, b, c) = (r & 1 == 1, r & 2 == 2, r & 4 == 4);
        if !(a && b) && c {
            y |= 1 << r;
        }
        if !a {
            z |= 1 << r;
        }
    }
    assert_eq!(t, vec![y, z]);
}

#[test]
fn blif_loop_names_nets() {
    let e = read(
        ".model t\n.inputs a\n.outputs y\n.names a x y\n11 1\n.names y x\n1 1\n.end\n",
        NetlistFormat::Blif,
    )
    .unwrap_err();
    assert!(e.message.contains("loop"), "{e}");
    assert!(e.message.contains("x") && e.message.contains("y"), "{e}");
}

#[test]
fn verilog_vectors_assign_and_constants() {
    let net = read(
        "module m(input [1:0] a, output [2:0] y);\n assign y = {a[1] & a[0], ~a ^ 2'b01};\nendmodule\n",
        NetlistFormat::Verilog,
    )
    .unwrap();
    let names: Vec<&str> = net.inputs().keys().map(String::as_str).collect();
    assert_eq!(names, ["a[0]", "a[1]"]);
    let outs: Vec<&str> = net.outputs().keys().map(String::as_str).collect();
    assert_eq!(outs, ["y[0]", "y[1]", "y[2]"]);
    let t = truth(&net);
    let mut expect = [0u64; 3];
    for r in 0..4u64 {
        let a = r;
        let low = (!a ^ 1) & 3;
        let y = low | (((a >> 1) & a & 1) << 2);
        for (bit, e) in expect.iter_mut().enumerate() {
            if y >> bit & 1 == 1 {
                *e |= 1 << r;
            }
        }
    }
    assert_eq!(t, expect.to_vec());
}

#[test]
fn verilog_flip_flop_module_and_writers_round_trip() {
    let text = "module dff(input c, input d, output q); reg r; always @(posedge c) r <= d; assign q = r; endmodule\n\
                module top(clk, a, y); input clk, a; output y; wire s; dff u (.c(clk), .d(a ^ s), .q(s)); assign y = ~s; endmodule\n";
    let net = read(text, NetlistFormat::Verilog).unwrap();
    assert_eq!(net.storage().len(), 1);
    let s = net.storage().values().next().unwrap();
    assert_eq!(s.clock.as_deref(), Some("clk"));
    for (text, f) in [
        (write_blif(&net), NetlistFormat::Blif),
        (write_verilog(&net), NetlistFormat::Verilog),
    ] {
        let back = read(&text, f).unwrap_or_else(|e| panic!("{e}\n{text}"));
        assert_eq!(back.storage().len(), 1);
        assert_eq!(truth(&back), truth(&net), "{text}");
    }
}

#[test]
fn bench_reads_gates_and_dff() {
    let net = read(
        "INPUT(a)\nINPUT(b)\nOUTPUT(y)\n# c\nq = DFF(y)\ny = NAND(a, q)\nz = buff(b)\n",
        NetlistFormat::Bench,
    )
    .unwrap();
    assert_eq!(net.storage().len(), 1);
    assert_eq!(net.inputs().len(), 2);
}

#[test]
fn storage_spec_parses() {
    let s: StorageCellSpec = "ff:D:Q:CK".parse().unwrap();
    assert_eq!(
        (
            s.cell.as_str(),
            s.d.as_str(),
            s.q.as_str(),
            s.clock.as_str()
        ),
        ("ff", "D", "Q", "CK")
    );
    assert!("ff:D:Q".parse::<StorageCellSpec>().is_err());
}

#[test]
fn garbage_is_an_error_not_a_panic() {
    for f in [
        NetlistFormat::Blif,
        NetlistFormat::Verilog,
        NetlistFormat::Bench,
    ] {
        assert!(read("\u{1}\u{2}((( .names", f).is_err());
    }
}

#[test]
fn multi_byte_character_in_a_cover_row_is_an_error_not_a_panic() {
    // Found by the fuzz harness (examples/fuzz_inputs.rs): the row check
    // counted bytes, then sliced one byte out of a two-byte 'é'.
    let text = ".model m\n.inputs a b\n.outputs y\n.names a b y\né 1\n.end\n";
    let err = read(text, NetlistFormat::Blif).unwrap_err().to_string();
    assert!(err.contains("'é'") && err.contains("5:1"), "{err}");
}
