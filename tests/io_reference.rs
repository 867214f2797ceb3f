//! The readers and writers against the reference netlists in
//! tests/data/reference/netlists (sources in tests/data/reference/PROVENANCE.md):
//! every file parses with the published port counts, the ISCAS-85 pairs
//! cNNN / cNNNg simulate identically, the ariths-gen adders and multipliers
//! compute integer sums and products, and every file survives
//! write-then-read in BLIF and Verilog.

use ribbonmap::io::{
    read_netlist, read_netlist_str, write_blif, write_verilog, NetlistFormat, ReadOptions,
};
use ribbonmap::network::{Network, SplitMix64};
use std::collections::HashMap;
use std::path::{Path, PathBuf};

const REF: &str = "tests/data/reference/netlists";

fn read(rel: &str) -> Network {
    let path = Path::new(REF).join(rel);
    let opts = ReadOptions {
        storage_cells: vec!["ff:D:Q:CK".parse().unwrap()],
        ..Default::default()
    };
    read_netlist(&path, &opts).unwrap_or_else(|e| panic!("{e}"))
}

fn all_reference_files() -> Vec<PathBuf> {
    let mut files = Vec::new();
    for dir in ["iscas85", "iscas89", "epfl", "arith"] {
        for entry in std::fs::read_dir(Path::new(REF).join(dir)).unwrap() {
            let p = entry.unwrap().path();
            if NetlistFormat::from_path(&p).is_some() {
                files.push(p);
            }
        }
    }
    files.sort();
    files
}

/// Simulates `words` blocks of 64 random patterns, each combinational input
/// getting the word of its name (so two networks with the same input names
/// see the same patterns); returns the output words by output name.
fn simulate_by_name(net: &Network, seed: u64, words: usize) -> HashMap<String, Vec<u64>> {
    let mut result: HashMap<String, Vec<u64>> = HashMap::new();
    let names = net.combinational_input_names();
    for block in 0..words {
        let ci: Vec<u64> = names
            .iter()
            .map(|n| {
                let mut h = seed ^ (block as u64).wrapping_mul(0x9E37_79B9_7F4A_7C15);
                for b in n.bytes() {
                    h = (h ^ b as u64).wrapping_mul(0x100_0000_01B3);
                }
                SplitMix64::new(h).next()
            })
            .collect();
        let out = net.simulate_outputs(&ci);
        let all_names = net
            .outputs()
            .keys()
            .cloned()
            .chain(net.storage().keys().map(|s| format!("{s}/next")));
        for (name, w) in all_names.zip(out) {
            result.entry(name).or_default().push(w);
        }
    }
    result
}

fn port_counts(rel: &str) -> (usize, usize) {
    let n = read(rel);
    (n.inputs().len(), n.outputs().len())
}

#[test]
fn iscas85_port_counts_match_published_table() {
    // Port counts: Hansen, Yalcin and Hayes, "Unveiling the ISCAS-85
    // benchmarks", IEEE Design & Test 1999, via PROVENANCE.md.
    let table = [
        ("c17", 5, 2),
        ("c432", 36, 7),
        ("c499", 41, 32),
        ("c880", 60, 26),
        ("c1355", 41, 32),
        ("c1908", 33, 25),
        ("c2670", 233, 140),
        ("c3540", 50, 22),
        ("c5315", 178, 123),
        ("c6288", 32, 32),
        ("c7552", 207, 108),
    ];
    for (name, inputs, outputs) in table {
        for file in [format!("iscas85/{name}.v"), format!("iscas85/{name}g.v")] {
            assert_eq!(port_counts(&file), (inputs, outputs), "{file}");
        }
    }
}

#[test]
fn epfl_port_counts_match_provenance() {
    // EPFL suite (Amaru, Gaillardon and De Micheli, IWLS 2015) port counts
    // from PROVENANCE.md.
    for (name, inputs, outputs) in [
        ("adder", 256, 129),
        ("bar", 135, 128),
        ("max", 512, 130),
        ("dec", 8, 256),
    ] {
        assert_eq!(
            port_counts(&format!("epfl/{name}.v")),
            (inputs, outputs),
            "{name}"
        );
    }
}

#[test]
fn s27_reads_with_named_flip_flops() {
    // ISCAS-89 s27 (Brglez, Bryan and Kozminski 1989, via PROVENANCE.md):
    // three instances of the undefined cell 'ff' with pins CK, D, Q; inputs
    // clk, G0..G3 in the file's header and one output G17.
    let n = read("iscas89/s27.v");
    assert_eq!(n.storage().len(), 3);
    assert_eq!(n.inputs().len(), 5);
    assert_eq!(n.outputs().len(), 1);
    for s in n.storage().values() {
        assert_eq!(s.clock.as_deref(), Some("clk"));
    }
    let mut names: Vec<&str> = n.storage().keys().map(String::as_str).collect();
    names.sort();
    assert_eq!(names, ["G5", "G6", "G7"]);
}

#[test]
fn every_reference_netlist_parses() {
    let files = all_reference_files();
    assert!(files.len() >= 38, "found {} files", files.len());
    for f in files {
        let rel = f.strip_prefix(REF).unwrap().to_str().unwrap().to_string();
        let n = read(&rel);
        assert!(n.gate_count() > 0, "{rel}");
        assert!(!n.outputs().is_empty(), "{rel}");
    }
}

#[test]
fn iscas85_pairs_simulate_identically() {
    // PROVENANCE.md: each cNNN.v / cNNNg.v pair is functionally equivalent
    // with ports matched by name. 157 words = 10,048 random patterns.
    for name in [
        "c17", "c432", "c499", "c880", "c1355", "c1908", "c2670", "c3540", "c5315", "c6288",
        "c7552",
    ] {
        let a = read(&format!("iscas85/{name}.v"));
        let b = read(&format!("iscas85/{name}g.v"));
        let mut ia: Vec<&String> = a.inputs().keys().collect();
        let mut ib: Vec<&String> = b.inputs().keys().collect();
        ia.sort();
        ib.sort();
        assert_eq!(ia, ib, "{name}: input names differ");
        let sa = simulate_by_name(&a, 7, 157);
        let sb = simulate_by_name(&b, 7, 157);
        assert_eq!(sa.len(), sb.len(), "{name}");
        for (out, wa) in &sa {
            assert_eq!(Some(wa), sb.get(out), "{name}: output {out} differs");
        }
    }
}

/// Reads the operand bits a[i], b[i] of one pattern and checks that the
/// output bus (LSB first, declaration order) equals `op(a, b)`.
fn check_arith(rel: &str, op: fn(u128, u128) -> u128) {
    let net = read(rel);
    let width = net.inputs().keys().filter(|n| n.starts_with("a[")).count();
    assert_eq!(net.inputs().len(), 2 * width, "{rel}");
    let out_bits = net.outputs().len();
    let mut rng = SplitMix64::new(0xA11CE);
    for _ in 0..16 {
        let ci: Vec<u64> = (0..net.inputs().len()).map(|_| rng.next()).collect();
        let out = net.simulate_outputs(&ci);
        for p in 0..64 {
            let operand = |prefix: &str| -> u128 {
                let mut v = 0u128;
                for (k, name) in net.inputs().keys().enumerate() {
                    if let Some(idx) = name.strip_prefix(prefix).and_then(|s| s.strip_suffix(']')) {
                        let i: u32 = idx.parse().unwrap();
                        v |= ((ci[k] >> p & 1) as u128) << i;
                    }
                }
                v
            };
            let (a, b) = (operand("a["), operand("b["));
            let mut got = 0u128;
            for (i, w) in out.iter().enumerate() {
                got |= ((w >> p & 1) as u128) << i;
            }
            let mask = (1u128 << out_bits) - 1;
            assert_eq!(got, op(a, b) & mask, "{rel}: a={a} b={b}");
        }
    }
}

#[test]
fn ariths_gen_adders_add() {
    // ariths-gen 1.1.4 adders (via PROVENANCE.md): output bus = a + b.
    for rel in [
        "arith/rca8_flat.blif",
        "arith/rca8_hier.blif",
        "arith/rca8_flat.v",
        "arith/ks16_flat.blif",
        "arith/cla16_flat.v",
    ] {
        check_arith(rel, |a, b| a + b);
    }
}

#[test]
fn ariths_gen_multipliers_multiply() {
    // ariths-gen 1.1.4 multipliers (via PROVENANCE.md): output bus = a * b.
    for rel in ["arith/arrmul8_flat.blif", "arith/dadda8_hier.blif"] {
        check_arith(rel, |a, b| a * b);
    }
}

fn assert_same_function(a: &Network, b: &Network, what: &str) {
    let na: Vec<&String> = a.inputs().keys().collect();
    let nb: Vec<&String> = b
        .inputs()
        .keys()
        .filter(|n| a.inputs().contains_key(*n))
        .collect();
    assert_eq!(na, nb, "{what}: inputs");
    let oa: Vec<&String> = a.outputs().keys().collect();
    let ob: Vec<&String> = b.outputs().keys().collect();
    assert_eq!(oa, ob, "{what}: outputs");
    assert_eq!(a.storage().len(), b.storage().len(), "{what}: storage");
    assert_eq!(
        simulate_by_name(a, 3, 16),
        simulate_by_name(b, 3, 16),
        "{what}"
    );
}

#[test]
fn every_reference_netlist_round_trips_through_both_writers() {
    for f in all_reference_files() {
        let rel = f.strip_prefix(REF).unwrap().to_str().unwrap().to_string();
        let net = read(&rel);
        let blif = write_blif(&net);
        let back = read_netlist_str(
            &blif,
            "rt.blif",
            NetlistFormat::Blif,
            &ReadOptions::default(),
        )
        .unwrap_or_else(|e| panic!("{rel} via BLIF: {e}"));
        assert_same_function(&net, &back, &format!("{rel} via BLIF"));
        let v = write_verilog(&net);
        let back = read_netlist_str(&v, "rt.v", NetlistFormat::Verilog, &ReadOptions::default())
            .unwrap_or_else(|e| panic!("{rel} via Verilog: {e}"));
        assert_same_function(&net, &back, &format!("{rel} via Verilog"));
        // A second round trip neither grows the network nor touches its
        // ports: the same number of lines (gates) and the same port lists
        // (the gate order may change: structural hashing renumbers nodes).
        let again = read_netlist_str(
            &blif,
            "rt.blif",
            NetlistFormat::Blif,
            &ReadOptions::default(),
        )
        .unwrap();
        let blif2 = write_blif(&again);
        assert_eq!(
            blif2.lines().count(),
            blif.lines().count(),
            "{rel}: BLIF grew"
        );
        let ports = |t: &str| -> Vec<String> {
            t.lines()
                .filter(|l| l.starts_with(".inputs") || l.starts_with(".outputs"))
                .map(str::to_string)
                .collect()
        };
        assert_eq!(ports(&blif2), ports(&blif), "{rel}: BLIF ports changed");
        let v2 = write_verilog(&back);
        assert_eq!(v2.lines().count(), v.lines().count(), "{rel}: Verilog grew");
        let head = |t: &str| t.split(';').next().unwrap_or_default().to_string();
        assert_eq!(head(&v2), head(&v), "{rel}: Verilog ports changed");
    }
}
