//! `ribbonmap inspect` driven as a program: port counts of reference
//! netlists (sources named at each check), JSON contract fields, exit code 2
//! with a located one-line error for every malformed file in tests/data/bad.

mod cache_support;

use assert_cmd::Command;

fn inspect(args: &[&str]) -> std::process::Output {
    Command::cargo_bin("ribbonmap")
        .unwrap()
        .env("RIBBONMAP_CACHE_DIR", cache_support::dir())
        .arg("inspect")
        .args(args)
        .output()
        .unwrap()
}

fn json(args: &[&str]) -> serde_json::Value {
    let out = inspect(args);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).unwrap()
}

#[test]
fn json_has_contract_fields_and_published_port_counts() {
    // c432: 36 inputs, 7 outputs (Hansen, Yalcin and Hayes 1999, via PROVENANCE.md).
    let v = json(&[
        "tests/data/reference/netlists/iscas85/c432.v",
        "--format",
        "json",
    ]);
    assert_eq!(v["inputs"], 36);
    assert_eq!(v["outputs"], 7);
    assert_eq!(v["storage"], 0);
    // Values recomputed from the file's gate lines by the small reader
    // below (independent of the crate's Verilog reader).
    let gates = GateLevel::read("tests/data/reference/netlists/iscas85/c432.v");
    let nodes: u64 = ["and", "xor", "maj"]
        .iter()
        .map(|k| v["nodes"][k].as_u64().unwrap())
        .sum();
    assert_eq!(v["gates"].as_u64(), Some(nodes));
    // Every gate of two or more inputs needs at least one node; a NOT or a
    // buffer may be a complemented edge.
    let wide = gates.gates.values().filter(|g| g.1.len() >= 2).count() as u64;
    assert!(nodes >= wide, "{nodes} nodes for {wide} gates");
    // Depth: at least one level per gate of two or more inputs on the
    // longest path, at most n - 1 levels per n-input gate.
    let depth = v["depth"].as_u64().unwrap();
    let (low, high) = (
        gates.depth(|n| u64::from(n >= 2)),
        gates.depth(|n| n as u64 - 1),
    );
    assert!(
        (low..=high).contains(&depth),
        "depth {depth} not in {low}..={high}"
    );
    let (support, widest) = gates.largest_support();
    assert_eq!(v["largest_output_support"]["inputs"], support);
    assert!(
        widest.contains(
            &v["largest_output_support"]["output"]
                .as_str()
                .unwrap()
                .to_string()
        ),
        "{widest:?}"
    );
    // EPFL dec: 8 inputs, 256 outputs (PROVENANCE.md); an 8-to-256 decoder's
    // every output depends on all 8 inputs.
    let v = json(&[
        "tests/data/reference/netlists/epfl/dec.v",
        "--format",
        "json",
    ]);
    assert_eq!(
        (v["inputs"].as_u64(), v["outputs"].as_u64()),
        (Some(8), Some(256))
    );
    assert_eq!(v["largest_output_support"]["inputs"], 8);
}

#[test]
fn s27_needs_and_accepts_storage_cells() {
    // ISCAS-89 s27: flip-flops are instances of the undefined cell 'ff'
    // (PROVENANCE.md); three of them in the file.
    let path = "tests/data/reference/netlists/iscas89/s27.v";
    let out = inspect(&[path]);
    assert_eq!(out.status.code(), Some(2));
    let v = json(&[path, "--storage", "ff:D:Q:CK", "--format", "json"]);
    assert_eq!(v["storage"], 3);
}

#[test]
fn stdin_with_input_format() {
    let text = std::fs::read("tests/data/reference/netlists/arith/rca8_flat.blif").unwrap();
    let out = Command::cargo_bin("ribbonmap")
        .unwrap()
        .env("RIBBONMAP_CACHE_DIR", cache_support::dir())
        .args(["inspect", "-", "--input-format", "blif", "--format", "json"])
        .write_stdin(text)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    // ariths-gen rca8: 16 inputs, 9-bit sum (PROVENANCE.md).
    assert_eq!(
        (v["inputs"].as_u64(), v["outputs"].as_u64()),
        (Some(16), Some(9))
    );
}

#[test]
fn text_report_and_unsupported_format() {
    let out = inspect(&["tests/data/reference/netlists/iscas85/c17.v"]);
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(
        text.contains("inputs") && text.contains("largest fanout"),
        "{text}"
    );
    let out = inspect(&[
        "tests/data/reference/netlists/iscas85/c17.v",
        "--format",
        "csv",
    ]);
    assert_eq!(out.status.code(), Some(2));
    // The refusal lists exactly the formats inspect prints.
    assert!(
        String::from_utf8_lossy(&out.stderr).contains("[possible values: text, json]"),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
}

#[test]
fn help_explains_every_option() {
    let out = inspect(&["--help"]);
    assert!(out.status.success());
    let help = String::from_utf8(out.stdout).unwrap();
    for opt in [
        "--format",
        "--lib",
        "--input-format",
        "--top",
        "--storage",
        "NETLIST",
    ] {
        assert!(help.contains(opt), "help lacks {opt}:\n{help}");
    }
}

#[test]
fn malformed_files_exit_2_with_located_error() {
    let manifest = std::fs::read_to_string("tests/data/bad/expected.txt").unwrap();
    let mut checked = 0;
    for line in manifest
        .lines()
        .filter(|l| !l.starts_with('#') && !l.trim().is_empty())
    {
        let mut parts = line.split_whitespace();
        let file = parts.next().unwrap();
        let want: u32 = parts.next().unwrap().parse().unwrap();
        let path = format!("tests/data/bad/{file}");
        let extra: Vec<&str> = parts.collect();
        let mut args = vec![path.as_str()];
        args.extend(extra);
        let out = inspect(&args);
        assert_eq!(out.status.code(), Some(2), "{file}");
        let stderr = String::from_utf8_lossy(&out.stderr);
        let first = stderr.lines().next().unwrap_or("");
        let prefix = format!("error: {path}:{want}:");
        assert!(
            first.starts_with(&prefix),
            "{file}: expected '{prefix}...', got '{first}'"
        );
        assert_eq!(stderr.lines().count(), 1, "{file}: one-line error expected");
        checked += 1;
    }
    assert!(checked >= 15);
}

#[test]
fn c17_figures_match_its_gate_lines() {
    // c17 is six NAND2 gates (Hansen, Yalcin and Hayes 1999, via
    // PROVENANCE.md): one AND node each, so the network's depth, fanout and
    // supports equal the gate-level figures counted from the file.
    let path = "tests/data/reference/netlists/iscas85/c17.v";
    let gates = GateLevel::read(path);
    assert_eq!(gates.gates.len(), 6);
    let v = json(&[path, "--format", "json"]);
    assert_eq!(v["nodes"]["and"], 6);
    assert_eq!(v["gates"], 6);
    assert_eq!(v["depth"], gates.depth(|_| 1));
    assert_eq!(v["depth"], 3);
    let (support, widest) = gates.largest_support();
    assert_eq!(support, 4);
    assert_eq!(v["largest_output_support"]["inputs"], support);
    assert!(widest.contains(
        &v["largest_output_support"]["output"]
            .as_str()
            .unwrap()
            .to_string()
    ));
    let (fanout, busiest) = gates.largest_fanout();
    assert_eq!(fanout, 2);
    assert_eq!(v["largest_fanout"]["fanout"], fanout);
    assert!(
        busiest.contains(&v["largest_fanout"]["node"].as_str().unwrap().to_string()),
        "{busiest:?} vs {v}"
    );
}

/// Gate-level structural Verilog as the circuitgraph files write it
/// (`type name (out, in, ...);`), read by splitting on `;` for these
/// tests only.
struct GateLevel {
    inputs: Vec<String>,
    outputs: Vec<String>,
    /// Output net -> (gate type, input nets).
    gates: std::collections::HashMap<String, (String, Vec<String>)>,
}

impl GateLevel {
    fn read(path: &str) -> GateLevel {
        let text = std::fs::read_to_string(path).unwrap();
        let mut g = GateLevel {
            inputs: Vec::new(),
            outputs: Vec::new(),
            gates: Default::default(),
        };
        for statement in text.split(';') {
            let words: Vec<&str> = statement
                .split(|c: char| c.is_whitespace() || c == ',' || c == '(' || c == ')')
                .filter(|w| !w.is_empty())
                .collect();
            match words.first() {
                Some(&"input") => g.inputs.extend(words[1..].iter().map(|w| w.to_string())),
                Some(&"output") => g.outputs.extend(words[1..].iter().map(|w| w.to_string())),
                Some(&("and" | "nand" | "or" | "nor" | "xor" | "xnor" | "not" | "buf")) => {
                    let nets: Vec<String> = words[2..].iter().map(|w| w.to_string()).collect();
                    g.gates
                        .insert(nets[0].clone(), (words[0].to_string(), nets[1..].to_vec()));
                }
                _ => {}
            }
        }
        g
    }

    /// Longest input-to-output path, each gate weighing `weight(fanin)`.
    fn depth(&self, weight: impl Fn(usize) -> u64 + Copy) -> u64 {
        fn level(
            g: &GateLevel,
            net: &str,
            weight: impl Fn(usize) -> u64 + Copy,
            memo: &mut std::collections::HashMap<String, u64>,
        ) -> u64 {
            if let Some(&l) = memo.get(net) {
                return l;
            }
            let l = match g.gates.get(net) {
                None => 0,
                Some((_, ins)) => {
                    weight(ins.len())
                        + ins
                            .iter()
                            .map(|i| level(g, i, weight, memo))
                            .max()
                            .unwrap_or(0)
                }
            };
            memo.insert(net.to_string(), l);
            l
        }
        let mut memo = Default::default();
        self.outputs
            .iter()
            .map(|o| level(self, o, weight, &mut memo))
            .max()
            .unwrap_or(0)
    }

    /// The largest number of inputs an output depends on (structurally),
    /// and the outputs that reach it.
    fn largest_support(&self) -> (usize, Vec<String>) {
        let mut best = (0, Vec::new());
        for o in &self.outputs {
            let mut seen = std::collections::HashSet::new();
            let mut stack = vec![o.clone()];
            while let Some(n) = stack.pop() {
                if seen.insert(n.clone()) {
                    if let Some((_, ins)) = self.gates.get(&n) {
                        stack.extend(ins.iter().cloned());
                    }
                }
            }
            let size = self.inputs.iter().filter(|i| seen.contains(*i)).count();
            if size > best.0 {
                best = (size, vec![o.clone()]);
            } else if size == best.0 {
                best.1.push(o.clone());
            }
        }
        best
    }

    /// The most gate pins any net drives, and the nets that drive that many.
    fn largest_fanout(&self) -> (usize, Vec<String>) {
        let mut count = std::collections::HashMap::<&str, usize>::new();
        for (_, ins) in self.gates.values() {
            for i in ins {
                *count.entry(i).or_default() += 1;
            }
        }
        let most = count.values().copied().max().unwrap_or(0);
        let nets = count
            .iter()
            .filter(|(_, &c)| c == most)
            .map(|(n, _)| n.to_string())
            .collect();
        (most, nets)
    }
}
