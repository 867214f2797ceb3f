//! Level analysis checked against outside references.
//!
//! - ngspice (Debian's `ngspice` package, a circuit simulator from outside
//!   the project): for a full adder mapped on the characterised demo kit,
//!   every net's static voltage from `analyze_levels`' evaluator equals
//!   ngspice's DC operating point within 0.1 mV on all 8 input patterns; so
//!   do a 4-bit ripple adder's and an 8-input parity tree's on 32 patterns
//!   each, and ngspice confirms the weak chain's failure on its worst
//!   pattern. When ngspice is missing these tests print a line saying so
//!   and pass.
//! - Exhaustive simulation: the analysis's Boolean values are the cells'
//!   truth tables, so a correct circuit on restoring cells has no logic
//!   failure on any of its patterns.
//! - The weak three-input XOR of `demo-weak.json` (voltage gain below 1,
//!   from its characterisation) degrades levels along a parity chain; the
//!   restoring `xor3` of the normal kit does not.

use ribbonmap::device::levels::{analyze_levels, net_voltages, LevelModel, LevelOptions};
use ribbonmap::device::library_write::library_text;
use ribbonmap::device::spice::{load_models, node, write_deck, DeckModels, Stimulus};
use ribbonmap::device::{characterize, read_kit};
use ribbonmap::io::{read_netlist_str, NetlistFormat, ReadOptions};
use ribbonmap::library::electrical::read_electrical;
use ribbonmap::library::Library;
use ribbonmap::mapper::{map, MapOptions};
use ribbonmap::netlist::{Driver, MappedNetlist, Port};
use std::path::{Path, PathBuf};
use std::process::Command;

fn ngspice_present() -> bool {
    let found = Command::new("ngspice").arg("--version").output().is_ok();
    if !found {
        println!("SKIPPED: ngspice is not installed (apt-get install -y ngspice); the SPICE check did not run");
    }
    found
}

struct Setup {
    _dir: tempfile::TempDir,
    dir: PathBuf,
    lib: Library,
    models: DeckModels,
    levels: LevelModel,
}

/// Characterises the demo kit `kit` (a file of libraries/devices/demo) into
/// a temporary folder and loads the library, its tables and its levels.
fn setup(kit: &str) -> Setup {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().to_path_buf();
    let kit = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("libraries/devices/demo")
        .join(kit);
    let ch = characterize(read_kit(&kit).unwrap()).unwrap();
    let text = library_text(&ch, &path);
    let lib = Library::from_json_str(&text, "demo-lib.json").unwrap();
    let data = read_electrical(&text);
    let models = load_models(&lib, &data, &path, "demo-lib.json").unwrap();
    let levels = LevelModel::new(&lib, &models, &data);
    Setup {
        _dir: dir,
        dir: path,
        lib,
        models,
        levels,
    }
}

const FULL_ADDER: &str = "\
.model full_adder
.inputs a b cin
.outputs s cout
.names a b cin s
100 1
010 1
001 1
111 1
.names a b cin cout
11- 1
1-1 1
-11 1
.end
";

fn full_adder(lib: &Library) -> MappedNetlist {
    let net = read_netlist_str(
        FULL_ADDER,
        "full_adder.blif",
        NetlistFormat::Blif,
        &ReadOptions::default(),
    )
    .unwrap();
    map(&net, lib, &MapOptions::default()).unwrap()
}

/// The value printed after `name` on a line of ngspice's operating point.
fn op_value(output: &str, name: &str) -> f64 {
    output
        .lines()
        .find_map(|l| {
            let mut it = l.split_whitespace();
            (it.next() == Some(name)).then(|| it.next()?.parse::<f64>().ok())?
        })
        .unwrap_or_else(|| panic!("{name} not in ngspice output:\n{output}"))
}

#[test]
fn full_adder_voltages_match_ngspice_dc_on_every_pattern_ngspice() {
    if !ngspice_present() {
        return;
    }
    let s = setup("demo.json");
    let netlist = full_adder(&s.lib);
    assert!(!netlist.instances.is_empty());
    let mut worst_dv: f64 = 0.0;
    let mut compared = 0;
    for p in 0..8usize {
        let bits: Vec<bool> = (0..3).map(|k| p >> k & 1 == 1).collect();
        let (volts, _) = net_voltages(&netlist, &s.levels, &bits).unwrap();
        let stem = format!("fa_{p}");
        let deck = write_deck(
            &netlist,
            &s.lib,
            &s.models,
            &Stimulus::Pattern(bits),
            &stem,
            &[],
        )
        .unwrap();
        let path = s.dir.join(format!("{stem}.cir"));
        deck.save(&path).unwrap();
        let out = Command::new("ngspice")
            .arg("-b")
            .arg(&path)
            .current_dir(&s.dir)
            .output()
            .expect("ngspice runs");
        let output = String::from_utf8_lossy(&out.stdout).to_string()
            + &String::from_utf8_lossy(&out.stderr);
        for (id, net) in netlist.nets.iter().enumerate() {
            if matches!(net.driver, Driver::Constant(_)) {
                continue;
            }
            let spice = op_value(&output, &node(id as u32));
            let dv = (spice - volts[id]).abs();
            assert!(
                dv < 1e-4,
                "pattern {p}, net {}: ngspice {spice} V, levels {} V",
                net.name,
                volts[id]
            );
            worst_dv = worst_dv.max(dv);
            compared += 1;
        }
    }
    assert!(compared >= 8 * 5);
    println!(
        "full adder on demo kit ({} cells): {compared} net voltages over 8 patterns, max |dV| vs ngspice = {worst_dv:.3e} V",
        netlist.instances.len()
    );
}

#[test]
fn full_adder_keeps_its_levels_on_the_demo_kit() {
    let s = setup("demo.json");
    let netlist = full_adder(&s.lib);
    let report = analyze_levels(&netlist, &s.lib, &s.levels, &LevelOptions::default()).unwrap();
    assert!(report.exhaustive);
    assert_eq!(report.patterns, 8);
    assert_eq!(report.logic_failures, 0);
    // Every net is read by a cell or a primary output: 3 inputs, 2 outputs
    // at least.
    assert!(report.nets.len() >= 5);
    let worst = report.worst_margin_v().unwrap();
    assert!(worst > 0.0, "worst margin {worst} V");
    assert!(report.average_static_power_nw > 0.0);
    let binned: u64 = report.histogram.iter().map(|b| b.nets).sum();
    assert_eq!(binned as usize, report.nets.len());
    println!(
        "full adder: worst margin {:.3} mV, static power {:.3} nW",
        worst * 1e3,
        report.average_static_power_nw
    );
}

/// A 32-input parity chain: fifteen three-input XOR cells `xor3_cell`, each
/// taking the previous stage and two new inputs, and a final `xor2`.
fn parity_chain(lib: &Library, xor3_cell: &str) -> MappedNetlist {
    let xor3 = lib.cell_index(xor3_cell).unwrap() as u32;
    let xor2 = lib.cell_index("xor2").unwrap() as u32;
    let mut n = MappedNetlist {
        name: format!("parity32_{xor3_cell}"),
        library: lib.name.clone(),
        ..MappedNetlist::default()
    };
    let inputs: Vec<u32> = (0..32)
        .map(|k| {
            let id = n.add_net(format!("x{k}"), Driver::Input(k));
            n.inputs.push(Port {
                name: format!("x{k}"),
                net: id,
            });
            id
        })
        .collect();
    let mut acc = n.add_instance(xor3, vec![inputs[0], inputs[1], inputs[2]], "p2".into());
    let mut k = 3;
    while k + 1 < 32 {
        acc = n.add_instance(
            xor3,
            vec![acc, inputs[k], inputs[k + 1]],
            format!("p{}", k + 1),
        );
        k += 2;
    }
    let y = n.add_instance(xor2, vec![acc, inputs[31]], "parity".into());
    n.outputs.push(Port {
        name: "parity".into(),
        net: y,
    });
    n
}

#[test]
fn weak_xor_chain_degrades_levels_while_the_restoring_one_holds() {
    let options = LevelOptions {
        patterns: 4096,
        seed: 7,
    };
    let normal = setup("demo.json");
    let good = analyze_levels(
        &parity_chain(&normal.lib, "xor3"),
        &normal.lib,
        &normal.levels,
        &options,
    )
    .unwrap();
    let weak = setup("demo-weak.json");
    let bad = analyze_levels(
        &parity_chain(&weak.lib, "xor3w"),
        &weak.lib,
        &weak.levels,
        &options,
    )
    .unwrap();
    assert!(!good.exhaustive && good.patterns == 4096);
    let good_worst = good.worst_margin_v().unwrap();
    let bad_worst = bad.worst_margin_v().unwrap();
    println!(
        "parity chain of 32: xor3 worst margin {:.3} mV, {} failures; xor3w worst margin {:.3} mV on {} ({}), {} net-pattern failures on {} patterns",
        good_worst * 1e3,
        good.logic_failures,
        bad_worst * 1e3,
        bad.nets[0].net,
        bad.nets[0].worst_pattern,
        bad.logic_failures,
        bad.failing_patterns
    );
    // The restoring chain: every net keeps a margin of more than 20 mV and
    // no pattern fails.
    assert_eq!(good.logic_failures, 0);
    assert!(good_worst > 0.020, "xor3 chain worst margin {good_worst} V");
    // The weak chain: xor3w's own output high is 0.138 V at ideal inputs
    // (characterisation), 28 mV above its VIH; along the chain it can only
    // lose, so its worst margin must fall below 20 mV.
    assert!(bad_worst < 0.020, "xor3w chain worst margin {bad_worst} V");
    assert!(bad_worst < good_worst / 2.0);
    // And it drifts across the switching threshold: the parity comes out
    // wrong on some patterns (exhaustive truth is the XOR of the inputs).
    assert!(bad.logic_failures > 0);
    // The worst-pattern search ran within its budget, and the weakest net's
    // path runs from a primary input through the chain to that net.
    assert!(bad.search_evaluations > 0 && bad.search_evaluations <= 4096);
    let path = &bad.nets[0].path;
    assert!(path.len() >= 2, "{path:?}");
    assert!(path[0].starts_with('x'), "{path:?}");
    assert_eq!(path.last(), Some(&bad.nets[0].net));
}

/// An n-bit ripple-carry adder as BLIF: inputs a0.., b0.., cin; outputs
/// s0.. and the carry out.
fn ripple_adder_blif(bits: usize) -> String {
    let mut t = format!(".model add{bits}\n.inputs");
    for k in 0..bits {
        t += &format!(" a{k} b{k}");
    }
    t += " c0\n.outputs";
    for k in 0..bits {
        t += &format!(" s{k}");
    }
    t += &format!(" c{bits}\n");
    for k in 0..bits {
        t += &format!(".names a{k} b{k} c{k} s{k}\n100 1\n010 1\n001 1\n111 1\n");
        t += &format!(".names a{k} b{k} c{k} c{}\n11- 1\n1-1 1\n-11 1\n", k + 1);
    }
    t + ".end\n"
}

#[test]
fn ripple_adder_voltages_match_ngspice_dc_ngspice() {
    if !ngspice_present() {
        return;
    }
    let s = setup("demo.json");
    let net = read_netlist_str(
        &ripple_adder_blif(4),
        "add4.blif",
        NetlistFormat::Blif,
        &ReadOptions::default(),
    )
    .unwrap();
    let netlist = map(&net, &s.lib, &MapOptions::default()).unwrap();
    let width = netlist.inputs.len();
    assert_eq!(width, 9);
    // 32 patterns from a fixed linear congruential sequence (Knuth's MMIX
    // constants), so the run is repeatable.
    let mut state: u64 = 12345;
    let mut worst_dv: f64 = 0.0;
    let mut off_grid = 0;
    for p in 0..32 {
        state = state
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        let bits: Vec<bool> = (0..width).map(|k| (state >> (33 + k)) & 1 == 1).collect();
        let (volts, _) = net_voltages(&netlist, &s.levels, &bits).unwrap();
        let stem = format!("add4_{p}");
        let deck = write_deck(
            &netlist,
            &s.lib,
            &s.models,
            &Stimulus::Pattern(bits),
            &stem,
            &[],
        )
        .unwrap();
        let path = s.dir.join(format!("{stem}.cir"));
        deck.save(&path).unwrap();
        let out = Command::new("ngspice")
            .arg("-b")
            .arg(&path)
            .current_dir(&s.dir)
            .output()
            .expect("ngspice runs");
        let output = String::from_utf8_lossy(&out.stdout).to_string()
            + &String::from_utf8_lossy(&out.stderr);
        for (id, net) in netlist.nets.iter().enumerate() {
            if matches!(net.driver, Driver::Constant(_)) {
                continue;
            }
            let spice = op_value(&output, &node(id as u32));
            let dv = (spice - volts[id]).abs();
            assert!(
                dv < 1e-4,
                "pattern {p}, net {}: ngspice {spice} V, levels {} V",
                net.name,
                volts[id]
            );
            worst_dv = worst_dv.max(dv);
            // A cell output that feeds another cell sits between grid
            // points of the reader's tables: interpolation is exercised.
            if matches!(net.driver, Driver::Cell(_)) && volts[id] > 1e-6 && volts[id] < 0.2 - 1e-6 {
                off_grid += 1;
            }
        }
    }
    assert!(off_grid > 0);
    println!(
        "4-bit ripple adder on demo kit ({} cells): 32 patterns, max |dV| vs ngspice = {worst_dv:.3e} V",
        netlist.instances.len()
    );
}

fn ribbonmap_cli(dir: &Path) -> assert_cmd::Command {
    let mut c = assert_cmd::Command::cargo_bin("ribbonmap").unwrap();
    c.env("RIBBONMAP_CACHE_DIR", dir).current_dir(dir);
    c
}

#[test]
fn levels_command_reports_units_and_exit_codes() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let kit = Path::new(env!("CARGO_MANIFEST_DIR")).join("libraries/devices/demo/demo.json");
    ribbonmap_cli(d)
        .arg("characterize")
        .arg(&kit)
        .args(["-o", "lib.json"])
        .assert()
        .success();
    std::fs::write(d.join("fa.blif"), FULL_ADDER).unwrap();
    let out = ribbonmap_cli(d)
        .args(["levels", "fa.blif", "--lib", "lib.json"])
        .assert()
        .code(0)
        .get_output()
        .stdout
        .clone();
    let text = String::from_utf8(out).unwrap();
    assert!(text.contains(" mV") && text.contains(" nW") && text.contains("8 (every pattern)"));
    // The full adder's worst margin (64 mV on the demo kit) is below 1 V.
    ribbonmap_cli(d)
        .args([
            "levels",
            "fa.blif",
            "--lib",
            "lib.json",
            "--min-margin",
            "1000",
        ])
        .assert()
        .code(1);
    let out = ribbonmap_cli(d)
        .args(["levels", "fa.blif", "--lib", "lib.json", "--format", "json"])
        .assert()
        .code(0)
        .get_output()
        .stdout
        .clone();
    let v: serde_json::Value = serde_json::from_slice(&out).unwrap();
    assert_eq!(v["patterns"], 8);
    assert_eq!(v["holds"], true);
    assert_eq!(v["logic_failures"], 0);
    assert!(v["nets"][0]["worst_margin_v"].as_f64().unwrap() > 0.0);
    // `map --levels` adds the same analysis to the map report.
    ribbonmap_cli(d)
        .args(["map", "fa.blif", "--lib", "lib.json", "--levels"])
        .assert()
        .code(0)
        .stdout(predicates::str::contains("levels    worst margin"))
        .stdout(predicates::str::contains("0 logic failures"));
    // Bad input: no such netlist; zero random patterns for 17 inputs.
    ribbonmap_cli(d)
        .args(["levels", "missing.blif", "--lib", "lib.json"])
        .assert()
        .code(2)
        .stderr(predicates::str::starts_with("error: "));
    std::fs::write(d.join("add8.blif"), ripple_adder_blif(8)).unwrap();
    ribbonmap_cli(d)
        .args([
            "levels",
            "add8.blif",
            "--lib",
            "lib.json",
            "--patterns",
            "0",
        ])
        .assert()
        .code(2)
        .stderr(predicates::str::contains("1..=16777216"));
    // A library without electrical data is bad input.
    ribbonmap_cli(d)
        .args(["levels", "fa.blif", "--lib", "cmos-le"])
        .assert()
        .code(2)
        .stderr(predicates::str::starts_with("error: "));
}

/// ngspice's DC operating point of `netlist` on `bits`: the voltage of
/// every net not tied to a constant, as (net id, volts).
fn ngspice_op(s: &Setup, netlist: &MappedNetlist, bits: &[bool], stem: &str) -> Vec<(usize, f64)> {
    let deck = write_deck(
        netlist,
        &s.lib,
        &s.models,
        &Stimulus::Pattern(bits.to_vec()),
        stem,
        &[],
    )
    .unwrap();
    let path = s.dir.join(format!("{stem}.cir"));
    deck.save(&path).unwrap();
    let out = Command::new("ngspice")
        .arg("-b")
        .arg(&path)
        .current_dir(&s.dir)
        .output()
        .expect("ngspice runs");
    let output =
        String::from_utf8_lossy(&out.stdout).to_string() + &String::from_utf8_lossy(&out.stderr);
    netlist
        .nets
        .iter()
        .enumerate()
        .filter(|(_, n)| !matches!(n.driver, Driver::Constant(_)))
        .map(|(id, _)| (id, op_value(&output, &node(id as u32))))
        .collect()
}

/// An 8-input parity tree of two-input XORs as BLIF.
const PARITY8_TREE: &str = "\
.model parity8
.inputs x0 x1 x2 x3 x4 x5 x6 x7
.outputs y
.names x0 x1 t0
10 1
01 1
.names x2 x3 t1
10 1
01 1
.names x4 x5 t2
10 1
01 1
.names x6 x7 t3
10 1
01 1
.names t0 t1 u0
10 1
01 1
.names t2 t3 u1
10 1
01 1
.names u0 u1 y
10 1
01 1
.end
";

#[test]
fn parity_tree_voltages_match_ngspice_dc_ngspice() {
    if !ngspice_present() {
        return;
    }
    let s = setup("demo.json");
    let net = read_netlist_str(
        PARITY8_TREE,
        "parity8.blif",
        NetlistFormat::Blif,
        &ReadOptions::default(),
    )
    .unwrap();
    let netlist = map(&net, &s.lib, &MapOptions::default()).unwrap();
    // 32 of the 256 patterns, spread by an odd stride (a permutation of
    // 0..256), so the run is repeatable.
    let mut worst_dv: f64 = 0.0;
    for p in 0..32usize {
        let code = (p * 167 + 13) % 256;
        let bits: Vec<bool> = (0..8).map(|k| code >> k & 1 == 1).collect();
        let (volts, _) = net_voltages(&netlist, &s.levels, &bits).unwrap();
        for (id, spice) in ngspice_op(&s, &netlist, &bits, &format!("par8_{p}")) {
            let dv = (spice - volts[id]).abs();
            assert!(
                dv < 1e-4,
                "pattern {code:08b}, net {}: ngspice {spice} V, levels {} V",
                netlist.nets[id].name,
                volts[id]
            );
            worst_dv = worst_dv.max(dv);
        }
    }
    println!(
        "8-input parity tree on demo kit ({} cells): 32 patterns, max |dV| vs ngspice = {worst_dv:.3e} V",
        netlist.instances.len()
    );
}

#[test]
fn ngspice_confirms_the_weak_chain_failure_on_its_worst_pattern_ngspice() {
    if !ngspice_present() {
        return;
    }
    let s = setup("demo-weak.json");
    let netlist = parity_chain(&s.lib, "xor3w");
    let options = LevelOptions {
        patterns: 4096,
        seed: 7,
    };
    let report = analyze_levels(&netlist, &s.lib, &s.levels, &options).unwrap();
    let failing = report
        .nets
        .iter()
        .find(|n| n.failures > 0)
        .expect("the weak chain fails on some pattern");
    let bits: Vec<bool> = failing.worst_pattern.chars().map(|c| c == '1').collect();
    let id = netlist
        .nets
        .iter()
        .position(|n| n.name == failing.net)
        .unwrap();
    let spice = ngspice_op(&s, &netlist, &bits, "weak_chain")
        .into_iter()
        .find(|&(n, _)| n == id)
        .unwrap()
        .1;
    println!(
        "weak chain: net {} on pattern {} should be {}: levels {:.6} V, ngspice {:.6} V (Vdd/2 = 0.1 V)",
        failing.net,
        failing.worst_pattern,
        u8::from(failing.worst_value),
        failing.worst_voltage_v,
        spice
    );
    assert!((spice - failing.worst_voltage_v).abs() < 1e-4);
    // The primary output reads against Vdd / 2 (0.1 V on the demo kit):
    // ngspice puts it on the wrong side too.
    let reads_one = spice > s.levels.supply_v / 2.0;
    assert_ne!(reads_one, failing.worst_value);
}
