//! Mapped netlists written as structural Verilog and as BLIF read back (with
//! the library) into networks equal to the original on 10,048 random
//! patterns. Inputs include the ariths-gen ripple-carry adder
//! (tests/data/reference/netlists/arith/rca8_flat.blif, via PROVENANCE.md),
//! whose sum must equal integer addition, and the ISCAS-89 s27 sequential
//! circuit (flip-flops pass through as storage cells).

mod map_support;

use map_support::*;
use ribbonmap::io::{read_netlist, ReadOptions, StorageCellSpec};
use ribbonmap::library::Library;
use ribbonmap::mapper::{map, Goal, MapOptions};
use ribbonmap::netlist::{verify, Verified, VerifyMode};
use ribbonmap::network::{Network, SplitMix64};
use std::path::Path;

fn reference(path: &str) -> Network {
    read_netlist(
        Path::new("tests/data/reference/netlists")
            .join(path)
            .as_path(),
        &ReadOptions::default(),
    )
    .expect("reference netlist reads")
}

fn round_trip(net: &Network, lib: &Library, goal: Goal) -> Vec<Network> {
    let mapped = map(
        net,
        lib,
        &MapOptions {
            goal,
            ..MapOptions::default()
        },
    )
    .expect("maps");
    let back = mapped.to_network(lib);
    assert_eq!(verify(net, &back, VerifyMode::Sim), Ok(Verified::Simulated));
    let dir = tempfile::tempdir().unwrap();
    let mut read = Vec::new();
    for (ext, text) in [
        ("v", mapped.write_verilog(lib)),
        ("blif", mapped.write_blif(lib)),
    ] {
        let path = dir.path().join(format!("mapped.{ext}"));
        std::fs::write(&path, &text).unwrap();
        let opts = ReadOptions {
            library: Some(lib),
            ..ReadOptions::default()
        };
        let again = read_netlist(&path, &opts).unwrap_or_else(|e| panic!("{e}\n{text}"));
        assert_eq!(
            verify(net, &again, VerifyMode::Sim),
            Ok(Verified::Simulated),
            "{ext}"
        );
        read.push(again);
    }
    read
}

#[test]
fn ariths_gen_rca8_maps_to_sixteen_ribbon3_cells_and_adds() {
    let lib = ribbon3();
    let net = reference("arith/rca8_flat.blif");
    let mapped = map(
        &net,
        &lib,
        &MapOptions {
            goal: Goal::Area,
            ..MapOptions::default()
        },
    )
    .unwrap();
    // 2n cells for n = 8 (n - 1 maj3, n - 1 xor3, a two-cell half adder).
    assert!(
        mapped.instances.len() <= 16,
        "{:?}",
        mapped.cell_counts(&lib)
    );
    for back in round_trip(&net, &lib, Goal::Area) {
        // Integer addition on random operands; outputs are the sum bus LSB first.
        let n_in = back.inputs().len();
        assert_eq!(n_in, 16);
        let mut rng = SplitMix64::new(3);
        let words: Vec<u64> = (0..n_in).map(|_| rng.next()).collect();
        let outs = back.simulate_outputs(&words);
        for pat in 0..64 {
            let a: u64 = (0..8).map(|i| ((words[i] >> pat) & 1) << i).sum();
            let b: u64 = (0..8).map(|i| ((words[8 + i] >> pat) & 1) << i).sum();
            let s: u64 = outs
                .iter()
                .enumerate()
                .map(|(i, w)| ((w >> pat) & 1) << i)
                .sum();
            assert_eq!(s, a + b);
        }
    }
}

#[test]
fn generated_circuits_read_back_on_every_library() {
    for lib in [ribbon3(), ribbon3_nomaj(), nand_nor_inv()] {
        for net in [ripple_carry_adder(8), array_multiplier(6), parity_tree(9)] {
            for goal in [Goal::Area, Goal::Delay, Goal::Balanced] {
                round_trip(&net, &lib, goal);
            }
        }
    }
}

#[test]
fn iscas_circuits_read_back() {
    let lib = ribbon3();
    for c in ["c17", "c432", "c880"] {
        round_trip(&reference(&format!("iscas85/{c}.v")), &lib, Goal::Balanced);
    }
}

#[test]
fn constants_and_direct_outputs_survive() {
    let lib = ribbon3();
    let mut net = Network::new("odd");
    let a = net.add_input("a[0]").unwrap();
    let b = net.add_input("b").unwrap();
    net.add_output("zero", ribbonmap::network::Lit::FALSE)
        .unwrap();
    net.add_output("one", ribbonmap::network::Lit::TRUE)
        .unwrap();
    net.add_output("same", a).unwrap();
    net.add_output("not", !b).unwrap();
    let x = net.and(a, b);
    net.add_output("x1", x).unwrap();
    net.add_output("x2", x).unwrap();
    round_trip(&net, &lib, Goal::Area);
}

#[test]
fn s27_storage_passes_through() {
    let lib = ribbon3();
    let opts = ReadOptions {
        storage_cells: vec!["ff:D:Q:CK".parse::<StorageCellSpec>().unwrap()],
        ..ReadOptions::default()
    };
    let net = read_netlist(
        Path::new("tests/data/reference/netlists/iscas89/s27.v"),
        &opts,
    )
    .unwrap();
    // ISCAS-89 s27 has 3 flip-flops (Brglez, Bryan and Kozminski 1989, via PROVENANCE.md).
    assert_eq!(net.storage().len(), 3);
    let mapped = map(&net, &lib, &MapOptions::default()).unwrap();
    assert_eq!(mapped.storage.len(), 3);
    let back = mapped.to_network(&lib);
    assert_eq!(
        verify(&net, &back, VerifyMode::Sim),
        Ok(Verified::Simulated)
    );
}

/// Start values of storage elements survive the mapped Verilog and BLIF
/// writers (BLIF `.latch` init field 0/1/3; Verilog `initial q = 1'b0;`,
/// which the reader takes as the start value). Invented three-latch circuit.
#[test]
fn storage_start_values_are_written_back() {
    let lib = ribbon3();
    let dir = tempfile::tempdir().unwrap();
    let source = dir.path().join("latches.blif");
    std::fs::write(
        &source,
        ".model latches\n.inputs a b clk\n.outputs y\n\
         .latch n0 q0 re clk 0\n.latch n1 q1 re clk 1\n.latch n2 q2 re clk 3\n\
         .names a q1 n0\n11 1\n.names b q0 n1\n10 1\n01 1\n.names q0 q2 n2\n00 1\n\
         .names q0 q1 q2 y\n111 1\n.end\n",
    )
    .unwrap();
    let net = read_netlist(&source, &ReadOptions::default()).unwrap();
    let starts = |n: &Network| {
        let mut v: Vec<String> = n
            .storage()
            .values()
            .map(|s| format!("{:?}", s.init))
            .collect();
        v.sort();
        v
    };
    assert_eq!(starts(&net), ["One", "Unknown", "Zero"]);
    for back in round_trip(&net, &lib, Goal::Area) {
        assert_eq!(starts(&back), starts(&net));
    }
}

/// A design named after a cell it is mapped onto (the flip-flop module
/// `dff` of issue 18 on ribbon3, whose storage cell is `dff`; an inverter
/// module `inv`) reads back from Verilog: the writer names the module
/// `NAME_top`, since a module instantiating its own name would contain
/// itself (common practice: Verilog elaboration forbids recursion), and the
/// reader takes such a self-instance in an older file as the cell. The
/// circuits are invented; equality is checked by random simulation.
#[test]
fn designs_named_after_their_cells_read_back() {
    let lib = ribbon3();
    let dir = tempfile::tempdir().unwrap();
    for (name, text) in [
        (
            "dff",
            "module dff(D, CK, Q); input D, CK; output Q; reg q; initial q <= 1'b0;\n\
             always @(posedge CK) q <= D; assign #1 Q = q; endmodule\n",
        ),
        (
            "inv",
            "module inv(a, y); input a; output y; assign y = ~a; endmodule\n",
        ),
    ] {
        let source = dir.path().join(format!("{name}.v"));
        std::fs::write(&source, text).unwrap();
        let net = read_netlist(&source, &ReadOptions::default()).unwrap();
        for back in round_trip(&net, &lib, Goal::Area) {
            assert!(
                back.name() == name || back.name() == format!("{name}_top"),
                "{}",
                back.name()
            );
        }
        let mapped = map(&net, &lib, &MapOptions::default()).unwrap();
        assert!(mapped
            .write_verilog(&lib)
            .contains(&format!("module {name}_top (")));
    }
    // An inverter module written before the rename: `inv` instantiating
    // ribbon3's `inv` cell reads as one inverter, and without the library
    // it is still refused as a module that instantiates itself.
    let old = dir.path().join("old.v");
    std::fs::write(
        &old,
        "// mapped onto library ribbon3\nmodule inv (a, y);\n  input a;\n  output y;\n  inv g0 (.a(a), .y(y));\nendmodule\n",
    )
    .unwrap();
    let opts = ReadOptions {
        library: Some(&lib),
        ..ReadOptions::default()
    };
    let back = read_netlist(&old, &opts).unwrap();
    let source = dir.path().join("inv.v");
    let net = read_netlist(&source, &ReadOptions::default()).unwrap();
    assert_eq!(
        verify(&net, &back, VerifyMode::Sim),
        Ok(Verified::Simulated)
    );
    assert!(read_netlist(&old, &ReadOptions::default()).is_err());
}
