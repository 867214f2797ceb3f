//! Property tests of the readers and writers: random networks survive
//! write-then-read in BLIF and Verilog with the same function (checked by
//! simulating both on the same random patterns), also as AIGER (ASCII and
//! binary), and random bytes, mutated reference files or mutated AIGER
//! files never make a reader panic.

use proptest::prelude::*;
use ribbonmap::io::{
    read_netlist_bytes, read_netlist_str, write_aiger, write_blif, write_verilog, NetlistFormat,
    ReadOptions,
};
use ribbonmap::network::{InitValue, Lit, Network, SplitMix64};

/// A random network described by a seed and sizes: gates draw their fanins
/// (possibly complemented) from earlier literals; outputs may be constants,
/// inputs or complemented nodes; storage elements feed back into the logic.
fn random_network(
    seed: u64,
    inputs: usize,
    gates: usize,
    outputs: usize,
    storage: usize,
) -> Network {
    let mut rng = SplitMix64::new(seed);
    let mut net = Network::new("rand");
    let mut lits: Vec<Lit> = Vec::new();
    for k in 0..inputs {
        // Bit names exercise escaping in the Verilog writer.
        let name = if k % 2 == 0 {
            format!("in[{k}]")
        } else {
            format!("i{k}")
        };
        lits.push(net.add_input(name).unwrap());
    }
    let clock = net.add_input("clk").unwrap();
    let _ = clock;
    let mut storage_names = Vec::new();
    for k in 0..storage {
        let init = [
            InitValue::Zero,
            InitValue::One,
            InitValue::DontCare,
            InitValue::Unknown,
        ][k % 4];
        let name = format!("s{k}");
        lits.push(
            net.add_storage(name.clone(), Some("clk".into()), init, Some("re".into()))
                .unwrap(),
        );
        storage_names.push(name);
    }
    let pick = |rng: &mut SplitMix64, lits: &[Lit]| -> Lit {
        lits[rng.below(lits.len() as u64) as usize].xor(rng.next() & 1 == 1)
    };
    for _ in 0..gates {
        let (a, b, c) = (
            pick(&mut rng, &lits),
            pick(&mut rng, &lits),
            pick(&mut rng, &lits),
        );
        let g = match rng.below(4) {
            0 => net.and(a, b),
            1 => net.xor(a, b),
            2 => net.maj(a, b, c),
            _ => net.or(a, b),
        };
        lits.push(g);
    }
    for k in 0..outputs {
        let lit = match rng.below(8) {
            0 => Lit::from_raw(rng.below(2) as u32),
            _ => pick(&mut rng, &lits),
        };
        net.add_output(format!("out{k}"), lit).unwrap();
    }
    for name in storage_names {
        let lit = pick(&mut rng, &lits);
        net.set_storage_next(&name, lit).unwrap();
    }
    net
}

/// Output and next-state words on random patterns fed by input name.
fn signature(net: &Network) -> Vec<(String, u64)> {
    let names = net.combinational_input_names();
    let mut sig = Vec::new();
    for block in 0..4u64 {
        let ci: Vec<u64> = names
            .iter()
            .map(|n| {
                let h = n
                    .bytes()
                    .fold(block, |h, b| (h ^ b as u64).wrapping_mul(0x100_0000_01B3));
                SplitMix64::new(h).next()
            })
            .collect();
        let out = net.simulate_outputs(&ci);
        let labels = net
            .outputs()
            .keys()
            .cloned()
            .chain(net.storage().keys().cloned());
        sig.extend(labels.zip(out));
    }
    sig
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 64, ..ProptestConfig::default() })]

    #[test]
    fn random_networks_round_trip(seed in any::<u64>(), inputs in 1usize..8, gates in 0usize..60,
                                  outputs in 1usize..6, storage in 0usize..3) {
        let net = random_network(seed, inputs, gates, outputs, storage);
        let opts = ReadOptions::default();
        for (text, format) in [(write_blif(&net), NetlistFormat::Blif), (write_verilog(&net), NetlistFormat::Verilog)] {
            let back = read_netlist_str(&text, "rt", format, &opts)
                .map_err(|e| TestCaseError::fail(format!("{e}\n{text}")))?;
            let ins: Vec<&String> = back.inputs().keys().collect();
            let orig: Vec<&String> = net.inputs().keys().collect();
            prop_assert_eq!(ins, orig);
            prop_assert_eq!(back.storage().len(), net.storage().len());
            for (name, s) in net.storage() {
                // Verilog keeps only the start values 0 and 1.
                let kept = format == NetlistFormat::Blif
                    || matches!(s.init, InitValue::Zero | InitValue::One);
                if kept {
                    prop_assert_eq!(back.storage()[name].init, s.init);
                }
            }
            prop_assert_eq!(signature(&back), signature(&net), "{}", text);
        }
        for binary in [false, true] {
            let bytes = write_aiger(&net, binary, None);
            let back = read_netlist_bytes(&bytes, "rt.aig", NetlistFormat::Aig, &opts)
                .map_err(|e| TestCaseError::fail(format!("{e}\n{}", String::from_utf8_lossy(&bytes))))?;
            let ins: Vec<&String> = back.inputs().keys().collect();
            let orig: Vec<&String> = net.inputs().keys().collect();
            prop_assert_eq!(ins, orig);
            for (name, s) in net.storage() {
                // AIGER has 0, 1 and unknown (don't-care reads as unknown).
                let want = if s.init == InitValue::DontCare { InitValue::Unknown } else { s.init };
                prop_assert_eq!(back.storage()[name].init, want);
            }
            prop_assert_eq!(signature(&back), signature(&net));
        }
    }
}

const SEEDS: &[(&str, NetlistFormat)] = &[
    (
        "tests/data/reference/netlists/iscas85/c17.v",
        NetlistFormat::Verilog,
    ),
    (
        "tests/data/reference/netlists/iscas89/s27.v",
        NetlistFormat::Verilog,
    ),
    (
        "tests/data/reference/netlists/arith/rca8_flat.v",
        NetlistFormat::Verilog,
    ),
    (
        "tests/data/reference/netlists/arith/rca8_hier.blif",
        NetlistFormat::Blif,
    ),
    (
        "tests/data/reference/netlists/arith/rca8_flat.blif",
        NetlistFormat::Blif,
    ),
];

const SNIPPETS: &[&str] = &[
    "(",
    ")",
    ";",
    ",",
    "=",
    "\\",
    "[",
    "]",
    "{",
    "}",
    "1'b",
    "'h",
    ".names",
    ".latch",
    ".subckt",
    ".model",
    ".end",
    "module",
    "endmodule",
    "assign",
    "always @(posedge",
    "<=",
    "~",
    "?",
    ":",
    "\n",
    " ",
    "#",
    "/*",
    "//",
    "1",
    "0",
    "-",
    "DFF(",
    "AND(",
    "x",
    "\u{e9}",
    "[99999999999:0]",
];

fn read_all(text: &str) {
    let opts = ReadOptions {
        storage_cells: vec!["ff:D:Q:CK".parse().unwrap()],
        ..Default::default()
    };
    for f in [
        NetlistFormat::Blif,
        NetlistFormat::Verilog,
        NetlistFormat::Bench,
        NetlistFormat::Aag,
    ] {
        let _ = read_netlist_str(text, "fuzz", f, &opts);
    }
}

/// AIGER files to mutate: a small random sequential network in both
/// encodings.
fn aiger_seeds() -> Vec<Vec<u8>> {
    let net = random_network(7, 5, 40, 4, 2);
    vec![
        write_aiger(&net, false, Some("seed")),
        write_aiger(&net, true, Some("seed")),
    ]
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 1024, ..ProptestConfig::default() })]

    #[test]
    fn random_bytes_never_panic(bytes in proptest::collection::vec(any::<u8>(), 0..400)) {
        read_all(&String::from_utf8_lossy(&bytes));
    }

    #[test]
    fn mutated_reference_files_never_panic(file in 0usize..SEEDS.len(),
                                            edits in proptest::collection::vec((any::<u16>(), 0u8..4, 0usize..SNIPPETS.len()), 1..6)) {
        let (path, _) = SEEDS[file];
        let mut text: Vec<char> = std::fs::read_to_string(path).unwrap().chars().collect();
        for (pos, op, snippet) in edits {
            let at = pos as usize % (text.len() + 1);
            match op {
                0 => { text.splice(at..at, SNIPPETS[snippet].chars()); }
                1 => { let end = (at + 1 + snippet * 3).min(text.len()); text.drain(at..end); }
                2 => text.truncate(at),
                _ => { if at < text.len() { text[at] = SNIPPETS[snippet].chars().next().unwrap_or('x'); } }
            }
        }
        let text: String = text.into_iter().collect();
        read_all(&text);
    }

    #[test]
    fn mutated_aiger_files_never_panic(binary in any::<bool>(),
                                       edits in proptest::collection::vec((any::<u16>(), 0u8..4, any::<u8>()), 1..6)) {
        let mut bytes = aiger_seeds()[binary as usize].clone();
        for (pos, op, byte) in edits {
            let at = pos as usize % (bytes.len() + 1);
            match op {
                0 => bytes.insert(at, byte),
                1 => { let end = (at + 1 + (byte as usize % 8)).min(bytes.len()); bytes.drain(at..end); }
                2 => bytes.truncate(at),
                _ => { if at < bytes.len() { bytes[at] = byte; } }
            }
        }
        let _ = read_netlist_bytes(&bytes, "fuzz.aig", NetlistFormat::Aig, &ReadOptions::default());
    }

    #[test]
    fn random_bytes_after_an_aiger_header_never_panic(binary in any::<bool>(), counts in proptest::collection::vec(0u32..40, 5),
                                                      body in proptest::collection::vec(any::<u8>(), 0..200)) {
        let mut bytes = format!("{} {} {} {} {} {}\n", if binary { "aig" } else { "aag" },
            counts[0], counts[1], counts[2], counts[3], counts[4]).into_bytes();
        bytes.extend(body);
        let _ = read_netlist_bytes(&bytes, "fuzz.aig", NetlistFormat::Aig, &ReadOptions::default());
    }
}

#[test]
fn deep_inputs_are_errors_or_results_not_stack_overflows() {
    // 100,000 nested parentheses: an error, not a crash.
    let text = format!(
        "module t(a, y); input a; output y; assign y = {}a{}; endmodule\n",
        "(".repeat(100_000),
        ")".repeat(100_000)
    );
    assert!(read_netlist_str(
        &text,
        "deep.v",
        NetlistFormat::Verilog,
        &ReadOptions::default()
    )
    .is_err());
    // A 200,000-operand chain and a 200,000-long alias chain read fine.
    let mut text = String::from("module t(a, b, y, z); input a, b; output y, z; assign y = a");
    for k in 0..200_000 {
        text.push_str(if k % 2 == 0 { " ^ b" } else { " ^ a" });
    }
    text.push_str(";\n wire w0; assign w0 = a;\n");
    for k in 1..200_000 {
        text.push_str(&format!(" wire w{k}; assign w{k} = ~w{};\n", k - 1));
    }
    text.push_str(" assign z = w199999;\nendmodule\n");
    let net = read_netlist_str(
        &text,
        "long.v",
        NetlistFormat::Verilog,
        &ReadOptions::default(),
    )
    .unwrap();
    // By hand (integer parity): y XORs a with 100,000 copies of b and
    // 100,000 more of a, so y = a; z inverts a 199,999 times, so z = !a.
    // Rows: input a is bit 0, b bit 1 of the row number.
    assert_eq!(net.output_truth_tables(), Some(vec![0b1010, 0b0101]));
    // BLIF: a 300,000-gate chain, written forwards and read back.
    let mut blif = String::from(".model chain\n.inputs a b\n.outputs y\n.names a b n0\n11 1\n");
    for k in 1..300_000 {
        blif.push_str(&format!(".names n{} b n{k}\n01 1\n10 1\n", k - 1));
    }
    blif.push_str(".names n299999 y\n1 1\n.end\n");
    let net = read_netlist_str(
        &blif,
        "chain.blif",
        NetlistFormat::Blif,
        &ReadOptions::default(),
    )
    .unwrap();
    // By hand: n0 = a & b, then 299,999 (an odd number of) XORs with b, so
    // y = (a & b) ^ b = !a & b: only the row a = 0, b = 1.
    assert_eq!(net.output_truth_tables(), Some(vec![0b0100]));
}
