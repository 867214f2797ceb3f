//! `ribbonmap spice` of a netlist that is already made of the library's
//! cells: the deck is written from the cells as they stand, without
//! mapping, and ngspice (Debian's `ngspice` package, a circuit simulator
//! from outside the project) computes the logic the netlist should: the
//! expected output bits come from integer arithmetic (a + b for the adder)
//! or from the gates' definitions (inverter chain, NAND).
//!
//! When ngspice is missing the ngspice checks print a line saying so and
//! pass; the command-line checks run regardless.

use assert_cmd::Command;
use ribbonmap::library::Library;
use ribbonmap::netlist::{read_mapped_verilog, MappedNetlist};
use std::path::{Path, PathBuf};

const SUPPLY_V: f64 = 0.2;

/// A two-bit ripple adder as BLIF (sum and carry of each bit).
const ADDER2: &str = ".model add2\n.inputs a0 a1 b0 b1\n.outputs s0 s1 c2\n\
.names a0 b0 s0\n10 1\n01 1\n.names a0 b0 c1\n11 1\n\
.names a1 b1 c1 s1\n100 1\n010 1\n001 1\n111 1\n\
.names a1 b1 c1 c2\n11- 1\n1-1 1\n-11 1\n.end\n";

/// Written by hand, not by the mapper (which never chains three
/// inverters): y = !!!a, z = nand(a, 1) = !a, with positional connections
/// (output first) on one of them.
const HAND: &str =
    "module hand (a, y, z);\n  input a;\n  output y;\n  output z;\n  wire n1;\n  wire n2;\n\
  inv u1 (.a(a), .y(n1));\n  inv u2 (n2, n1);\n  inv u3 (.a(n2), .y(y));\n\
  nand2 u4 (.a(a), .b(1'b1), .y(z));\nendmodule\n";

fn ribbonmap(dir: &Path) -> Command {
    let mut c = Command::cargo_bin("ribbonmap").unwrap();
    c.env("RIBBONMAP_CACHE_DIR", dir).current_dir(dir);
    c
}

fn demo_kit() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("libraries/devices/demo/demo.json")
}

fn ngspice_present() -> bool {
    let found = std::process::Command::new("ngspice")
        .arg("--version")
        .output()
        .is_ok();
    if !found {
        println!("SKIPPED: ngspice is not installed (apt-get install -y ngspice); the SPICE checks did not run");
    }
    found
}

/// A temporary folder with the demo kit characterised into `lib.json`.
fn characterised() -> (tempfile::TempDir, Library) {
    let dir = tempfile::tempdir().unwrap();
    ribbonmap(dir.path())
        .arg("characterize")
        .arg(demo_kit())
        .args(["-o", "lib.json"])
        .assert()
        .success();
    let lib = Library::load(&dir.path().join("lib.json")).unwrap();
    (dir, lib)
}

fn read(dir: &Path, file: &str, lib: &Library) -> MappedNetlist {
    let text = std::fs::read_to_string(dir.join(file)).unwrap();
    read_mapped_verilog(&text, file, lib, None).unwrap()
}

/// Writes the DC deck of `file` for `bits` with `spice` (no mapping), runs
/// ngspice and returns each primary output's voltage.
fn output_volts(dir: &Path, file: &str, netlist: &MappedNetlist, bits: &str) -> Vec<f64> {
    let deck = format!("{}_{bits}.cir", file.replace('.', "_"));
    ribbonmap(dir)
        .args([
            "spice",
            file,
            "--lib",
            "lib.json",
            "-o",
            &deck,
            "--pattern",
            bits,
        ])
        .assert()
        .success();
    let out = std::process::Command::new("ngspice")
        .arg("-b")
        .arg(&deck)
        .current_dir(dir)
        .output()
        .expect("ngspice runs");
    let text = String::from_utf8_lossy(&out.stdout).to_string();
    netlist
        .outputs
        .iter()
        .map(|p| {
            let name = ribbonmap::device::spice::node(p.net);
            text.lines()
                .find_map(|l| {
                    let mut it = l.split_whitespace();
                    (it.next() == Some(name.as_str())).then(|| it.next()?.parse::<f64>().ok())?
                })
                .unwrap_or_else(|| panic!("{name} not in ngspice output:\n{text}"))
        })
        .collect()
}

/// Each voltage is a clean logic level (within 50 mV of a rail) equal to
/// the expected bit.
fn assert_levels(volts: &[f64], expected: &[bool], what: &str) {
    for (k, (&v, &bit)) in volts.iter().zip(expected).enumerate() {
        let rail = if bit { SUPPLY_V } else { 0.0 };
        assert!(
            (v - rail).abs() < 0.05,
            "{what}: output {k} is {v} V, expected logic {}",
            u8::from(bit)
        );
    }
}

#[test]
fn a_mapped_adder_is_read_as_it_stands_and_adds_in_ngspice() {
    let (dir, lib) = characterised();
    let d = dir.path();
    std::fs::write(d.join("add2.blif"), ADDER2).unwrap();
    ribbonmap(d)
        .args(["map", "add2.blif", "--lib", "lib.json", "-o", "add2.v"])
        .assert()
        .success();
    let netlist = read(d, "add2.v", &lib);
    // The file's cells are kept one for one: the same instances (cell,
    // name) in the same count as the file's instance lines.
    let text = std::fs::read_to_string(d.join("add2.v")).unwrap();
    let instance_lines = text
        .lines()
        .filter(|l| {
            lib.cell(l.split_whitespace().next().unwrap_or(""))
                .is_some()
        })
        .count();
    assert_eq!(netlist.instances.len(), instance_lines);
    assert_eq!(
        netlist
            .inputs
            .iter()
            .map(|p| p.name.as_str())
            .collect::<Vec<_>>(),
        ["a0", "a1", "b0", "b1"]
    );
    if !ngspice_present() {
        return;
    }
    // Every input pattern; the expected sum by integer arithmetic.
    for pattern in 0u32..16 {
        let bits: String = (0..4)
            .map(|k| if pattern >> k & 1 == 1 { '1' } else { '0' })
            .collect();
        let a = (pattern & 1) | (pattern >> 1 & 1) << 1;
        let b = (pattern >> 2 & 1) | (pattern >> 3 & 1) << 1;
        let sum = a + b;
        let expected: Vec<bool> = (0..3).map(|k| sum >> k & 1 == 1).collect();
        let volts = output_volts(d, "add2.v", &netlist, &bits);
        assert_levels(&volts, &expected, &format!("{a} + {b}"));
    }
}

#[test]
fn a_hand_written_netlist_keeps_its_cells_in_the_deck_ngspice() {
    let (dir, lib) = characterised();
    let d = dir.path();
    std::fs::write(d.join("hand.v"), HAND).unwrap();
    let netlist = read(d, "hand.v", &lib);
    let cells: Vec<&str> = netlist
        .instances
        .iter()
        .map(|i| lib.cells[i.cell as usize].name.as_str())
        .collect();
    assert_eq!(cells, ["inv", "inv", "inv", "nand2"]);
    ribbonmap(d)
        .args(["spice", "hand.v", "--lib", "lib.json", "-o", "hand.cir"])
        .assert()
        .success()
        .stdout(predicates::str::contains("(4 cells"));
    if !ngspice_present() {
        return;
    }
    for a in [false, true] {
        let bits = if a { "1" } else { "0" };
        let volts = output_volts(d, "hand.v", &netlist, bits);
        // y = !!!a = !a; z = nand(a, 1) = !a.
        assert_levels(&volts, &[!a, !a], &format!("a = {bits}"));
    }
}

#[test]
fn without_map_only_a_netlist_of_library_cells_is_accepted() {
    let (dir, _) = characterised();
    let d = dir.path();
    std::fs::write(d.join("add2.blif"), ADDER2).unwrap();
    ribbonmap(d)
        .args(["spice", "add2.blif", "--lib", "lib.json", "-o", "x.cir"])
        .assert()
        .code(2)
        .stderr(predicates::str::contains("give --map"));
    // A gate primitive is not a library cell: named with its line.
    std::fs::write(
        d.join("prim.v"),
        "module p (a, b, y);\n  input a, b;\n  output y;\n  and g (y, a, b);\nendmodule\n",
    )
    .unwrap();
    let out = ribbonmap(d)
        .args(["spice", "prim.v", "--lib", "lib.json", "-o", "x.cir"])
        .output()
        .unwrap();
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{stderr}");
    assert_eq!(stderr.lines().count(), 1, "{stderr}");
    assert!(
        stderr.contains("prim.v:4:") && stderr.contains("give --map"),
        "{stderr}"
    );
    // With --map the same file is mapped first and gets its deck.
    ribbonmap(d)
        .args([
            "spice", "prim.v", "--map", "--lib", "lib.json", "-o", "x.cir",
        ])
        .assert()
        .success();
}
