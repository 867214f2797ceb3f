//! Static timing against hand computation.
//!
//! The delay model is the one docs/library-format.md documents: a cell's
//! delay is `intrinsic + per_load * load`, the load of a net is the sum of
//! the `input_load` of the pins it drives plus `primary_output_load` per
//! primary output or storage data input it drives, and inputs arrive at 0.
//! The cmos-le library encodes the logical-effort model (Sutherland, Sproull
//! and Harris, "Logical Effort", 1999, via PROVENANCE.md: d = g h + p in
//! units of tau, inverter g = 1, p = 1; NAND2 g = 4/3, NOR2 g = 5/3,
//! p = 2): for unit-sized gates `intrinsic` is the parasitic delay p and
//! `input_load` the logical effort g, so an inverter driving four inverters
//! has d = 1 + 4 = 5, the published fanout-of-4 delay. Every figure below is
//! worked out by hand in the comment beside it.

use assert_cmd::Command;
use ribbonmap::library::Library;
use ribbonmap::netlist::{
    analyze_timing, Driver, MappedNetlist, Port, StorageInstance, TimingReport,
};
use ribbonmap::network::InitValue;

const EPS: f64 = 1e-12;

/// A netlist under construction with named inputs.
struct Builder<'a> {
    lib: &'a Library,
    nl: MappedNetlist,
}

impl<'a> Builder<'a> {
    fn new(lib: &'a Library, inputs: &[&str]) -> Builder<'a> {
        let mut nl = MappedNetlist {
            name: "hand".into(),
            library: lib.name.clone(),
            ..MappedNetlist::default()
        };
        for (i, name) in inputs.iter().enumerate() {
            let net = nl.add_net(name.to_string(), Driver::Input(i as u32));
            nl.inputs.push(Port {
                name: name.to_string(),
                net,
            });
        }
        Builder { lib, nl }
    }

    fn net(&self, name: &str) -> u32 {
        self.nl
            .nets
            .iter()
            .position(|n| n.name == name)
            .unwrap_or_else(|| panic!("no net {name}")) as u32
    }

    fn cell(&mut self, cell: &str, inputs: &[&str], out: &str) {
        let index = self.lib.cell_index(cell).expect("library cell") as u32;
        let inputs = inputs.iter().map(|n| self.net(n)).collect();
        self.nl.add_instance(index, inputs, out.to_string());
    }

    fn output(&mut self, net: &str) {
        let net = self.net(net);
        self.nl.outputs.push(Port {
            name: self.nl.nets[net as usize].name.clone(),
            net,
        });
    }

    fn timing(&self) -> TimingReport {
        analyze_timing(&self.nl, self.lib)
    }

    fn arrival(&self, t: &TimingReport, net: &str) -> f64 {
        t.arrival[self.net(net) as usize]
    }

    fn load(&self, t: &TimingReport, net: &str) -> f64 {
        t.load[self.net(net) as usize]
    }
}

fn path(t: &TimingReport) -> Vec<(String, Option<String>)> {
    t.critical_path
        .iter()
        .map(|s| (s.net.clone(), s.cell.clone()))
        .collect()
}

fn step(net: &str, cell: Option<&str>) -> (String, Option<String>) {
    (net.to_string(), cell.map(str::to_string))
}

fn close(got: f64, want: f64, what: &str) {
    assert!((got - want).abs() < EPS, "{what}: got {got}, want {want}");
}

#[test]
fn fanout_of_four_inverter_has_the_published_delay_of_five() {
    let lib = Library::builtin("cmos-le").unwrap();
    let mut b = Builder::new(&lib, &["a"]);
    b.cell("inv", &["a"], "x");
    for k in 0..4 {
        b.cell("inv", &["x"], &format!("y{k}"));
        b.output(&format!("y{k}"));
    }
    let t = b.timing();
    // x drives four inverter inputs of g = 1: h = 4, d = g h + p = 4 + 1 = 5
    // (Sutherland, Sproull and Harris 1999: the FO4 delay is 5 tau).
    close(b.load(&t, "x"), 4.0, "load of x");
    close(b.arrival(&t, "x"), 5.0, "FO4 delay");
    // Each yk drives one primary output (load 1): 5 + 1 + 1 = 7.
    for k in 0..4 {
        close(b.arrival(&t, &format!("y{k}")), 7.0, "yk");
    }
    close(t.delay, 7.0, "delay");
    assert_eq!(t.depth, 2);
    // All four ends tie; the report names the first one.
    assert_eq!(
        path(&t),
        [
            step("a", None),
            step("x", Some("inv")),
            step("y0", Some("inv"))
        ]
    );
    close(t.critical_path[1].arrival, 5.0, "path arrival at x");
    close(t.critical_path[2].arrival, 7.0, "path arrival at y0");
}

#[test]
fn nor_into_nand_on_cmos_le() {
    let lib = Library::builtin("cmos-le").unwrap();
    let mut b = Builder::new(&lib, &["a", "b", "c"]);
    b.cell("nor2", &["a", "b"], "n1");
    // The late signal enters on the second pin, so the path must follow the
    // latest input, not the first.
    b.cell("nand2", &["c", "n1"], "y");
    b.output("y");
    let t = b.timing();
    // Loads: a and b drive a NOR2 pin (g = 5/3), c and n1 a NAND2 pin
    // (g = 4/3), y one primary output (1).
    close(b.load(&t, "a"), 5.0 / 3.0, "load of a");
    close(b.load(&t, "c"), 4.0 / 3.0, "load of c");
    close(b.load(&t, "n1"), 4.0 / 3.0, "load of n1");
    close(b.load(&t, "y"), 1.0, "load of y");
    // n1: p = 2 plus 4/3 = 10/3; y: 10/3 + 2 + 1 = 19/3.
    close(b.arrival(&t, "n1"), 10.0 / 3.0, "n1");
    close(b.arrival(&t, "y"), 19.0 / 3.0, "y");
    close(t.delay, 19.0 / 3.0, "delay");
    assert_eq!(t.depth, 2);
    assert_eq!(
        path(&t),
        [
            step("a", None),
            step("n1", Some("nor2")),
            step("y", Some("nand2"))
        ]
    );
}

#[test]
fn the_latest_end_point_wins_and_depth_counts_cells_not_delay() {
    let lib = Library::builtin("cmos-le").unwrap();
    let mut b = Builder::new(&lib, &["a", "b"]);
    // Two inverters in a row to one output, a heavily loaded NOR2 to the
    // other: the deeper path is not the slower one.
    b.cell("inv", &["a"], "i1");
    b.cell("inv", &["i1"], "y");
    b.cell("nor2", &["a", "b"], "z");
    b.cell("inv", &["z"], "w1");
    b.cell("inv", &["z"], "w2");
    b.cell("inv", &["z"], "w3");
    b.output("y");
    b.output("z");
    // i1: 1 + 1 = 2; y: 2 + 1 + 1 = 4.
    // z drives three inverters and an output: load 4, arrival 2 + 4 = 6.
    let t = b.timing();
    close(b.arrival(&t, "i1"), 2.0, "i1");
    close(b.arrival(&t, "y"), 4.0, "y");
    close(b.load(&t, "a"), 1.0 + 5.0 / 3.0, "load of a");
    close(b.arrival(&t, "z"), 6.0, "z");
    // The inverters w1..w3 drive nothing and are no end points: 6 + 1.
    close(b.arrival(&t, "w1"), 7.0, "w1");
    close(t.delay, 6.0, "delay");
    assert_eq!(t.depth, 2, "depth of y");
    assert_eq!(path(&t), [step("a", None), step("z", Some("nor2"))]);
}

#[test]
fn ribbon3_chain_with_a_shared_net() {
    let lib = Library::builtin("ribbon3").unwrap();
    let mut b = Builder::new(&lib, &["a", "b", "c"]);
    b.cell("and2", &["a", "b"], "n1");
    b.cell("xor2", &["n1", "c"], "s");
    b.output("s");
    b.output("n1");
    let t = b.timing();
    // libraries/ribbon3.json (derived from the demo kit): and2 4.2505 ps +
    // 1.25939 ps per load; xor2 4.18168 ps + 1.25556 ps per load, input load
    // 1.1; primary output load 1.
    // n1 drives an xor2 pin and an output: load 2.1, arrival
    // 4.2505 + 1.25939 * 2.1 = 6.895219; s: 6.895219 + 4.18168 + 1.25556 * 1
    // = 12.332459.
    close(b.load(&t, "n1"), 2.1, "load of n1");
    close(b.arrival(&t, "n1"), 6.895219, "n1");
    close(b.arrival(&t, "s"), 12.332459, "s");
    close(t.delay, 12.332459, "delay");
    assert_eq!(t.depth, 2);
    assert_eq!(
        path(&t),
        [
            step("a", None),
            step("n1", Some("and2")),
            step("s", Some("xor2"))
        ]
    );
}

#[test]
fn storage_data_inputs_are_end_points_and_storage_outputs_start_at_zero() {
    let lib = Library::builtin("cmos-le").unwrap();
    let mut b = Builder::new(&lib, &["a"]);
    let q = b.nl.add_net("q".into(), Driver::Storage(0));
    b.nl.add_net("zero".into(), Driver::Constant(false));
    b.cell("nand2", &["a", "q"], "d1");
    b.cell("nor2", &["d1", "zero"], "d");
    b.cell("inv", &["a"], "y");
    b.output("y");
    let d = b.net("d");
    b.nl.storage.push(StorageInstance {
        name: "q".into(),
        cell: None,
        data: d,
        output: q,
        clock: None,
        init: InitValue::Zero,
        kind: None,
    });
    let t = b.timing();
    // q and the constant arrive at 0; q drives a NAND2 pin (load 4/3).
    close(b.arrival(&t, "q"), 0.0, "q");
    close(b.load(&t, "q"), 4.0 / 3.0, "load of q");
    close(b.load(&t, "zero"), 5.0 / 3.0, "load of the constant");
    // d1: 2 + 5/3 = 11/3; d: 11/3 + 2 + 1 (a storage data input counts as
    // a primary output) = 20/3; y: 1 + 1 = 2.
    close(b.arrival(&t, "d1"), 11.0 / 3.0, "d1");
    close(b.load(&t, "d"), 1.0, "load of d");
    close(b.arrival(&t, "d"), 20.0 / 3.0, "d");
    close(t.delay, 20.0 / 3.0, "delay");
    assert_eq!(t.depth, 2);
    assert_eq!(
        path(&t),
        [
            step("a", None),
            step("d1", Some("nand2")),
            step("d", Some("nor2"))
        ]
    );
}

#[test]
fn empty_and_wire_only_netlists_have_no_delay() {
    let lib = Library::builtin("ribbon3").unwrap();
    let mut b = Builder::new(&lib, &["a"]);
    let t = b.timing();
    assert_eq!((t.delay, t.depth), (0.0, 0));
    assert!(t.critical_path.is_empty());
    b.output("a");
    let t = b.timing();
    assert_eq!((t.delay, t.depth), (0.0, 0));
    close(b.load(&t, "a"), 1.0, "an output's load");
    assert_eq!(path(&t), [step("a", None)]);
}

fn map_json(lib: &str, blif: &str, extra: &[&str]) -> serde_json::Value {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("c.blif");
    std::fs::write(&path, blif).unwrap();
    let out = Command::cargo_bin("ribbonmap")
        .unwrap()
        .env("RIBBONMAP_CACHE_DIR", dir.path())
        .args([
            "map",
            path.to_str().unwrap(),
            "--lib",
            lib,
            "--format",
            "json",
        ])
        .args(extra)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).unwrap()
}

const FULL_ADDER: &str = ".model fa\n.inputs a b c\n.outputs s co\n.names a b c s\n100 1\n010 1\n001 1\n111 1\n.names a b c co\n11- 1\n1-1 1\n-11 1\n.end\n";

#[test]
fn map_report_of_a_full_adder_on_ribbon3() {
    let v = map_json("ribbon3", FULL_ADDER, &[]);
    // ribbon3 has xor3 and maj3: one cell per output (by hand). s: xor3
    // 4.20333 ps + 1.51517 ps * 1 = 5.7185 ps; co: maj3 4.03695 + 1.49523
    // = 5.53218 ps (libraries/ribbon3.json). The latest end is s, reached
    // from one of the inputs (all arrive at 0; the mapper chooses the pin
    // order).
    assert_eq!(v["cell_count"], 2, "{v}");
    assert_eq!(v["depth"], 1);
    close(v["delay"].as_f64().unwrap(), 5.7185, "delay");
    assert_eq!(v["units"]["delay"], "ps");
    let path = v["critical_path"].as_array().unwrap();
    assert_eq!(path.len(), 2, "{v}");
    assert!(["a", "b", "c"].contains(&path[0].as_str().unwrap()), "{v}");
    assert_eq!(path[1], "s (xor3)");
}

#[test]
fn map_report_of_a_nand_on_cmos_le_in_text() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("n.blif");
    std::fs::write(
        &path,
        ".model n\n.inputs a b\n.outputs y\n.names a b y\n0- 1\n-0 1\n.end\n",
    )
    .unwrap();
    let out = Command::cargo_bin("ribbonmap")
        .unwrap()
        .env("RIBBONMAP_CACHE_DIR", dir.path())
        .args(["map", path.to_str().unwrap(), "--lib", "cmos-le"])
        .output()
        .unwrap();
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    // One NAND2 driving the output: p = 2 plus one output load, 3 tau; area
    // 4 transistors (common practice), depth 1.
    for line in [
        "cells     1",
        "area      4.00 transistors",
        "depth     1",
        "delay     3.000 tau",
        "critical path, start first",
    ] {
        assert!(
            text.lines().any(|l| l.trim_end() == line),
            "no line {line:?} in\n{text}"
        );
    }
    let lines: Vec<&str> = text.lines().collect();
    let at = lines
        .iter()
        .position(|l| *l == "critical path, start first")
        .unwrap();
    // A header, then one stage a line: cell, net, load, stage delay,
    // arrival. The input's stage starts at 0; the NAND's stage takes
    // p + g * h = 2 + (4/3) * (3/4) = 3 tau (its output drives one unit
    // load: primary_output_load 1, logical effort 4/3 over an input
    // capacitance of 4/3 unit pins).
    assert_eq!(lines.len(), at + 4, "{text}");
    let input: Vec<&str> = lines[at + 2].split_whitespace().collect();
    assert_eq!(input[0], "(input)", "{text}");
    assert!(["a", "b"].contains(&input[1]), "{text}");
    assert_eq!(&input[3..], ["0.000", "0.000"], "{text}");
    let nand: Vec<&str> = lines[at + 3].split_whitespace().collect();
    assert_eq!(nand, ["nand2", "y", "1.000", "3.000", "3.000"], "{text}");
}
