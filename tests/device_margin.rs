//! Margin-aware mapping (`map --min-margin`) checked against outside
//! references.
//!
//! - ngspice (Debian's `ngspice` package, a circuit simulator from outside
//!   the project): on the weak demo kit, the plainly mapped 32-input parity
//!   chain (on xor3w) and 16-bit ripple adder (carries on maj3w) read as
//!   the wrong value on their worst patterns in ngspice's DC operating
//!   point too (the adder's every net within 0.1 mV of the level analysis);
//!   and the adder mapped with a 20 mV margin keeps every net's margin in
//!   ngspice on its worst pattern (every net's voltage within 0.1 mV of the
//!   level analysis). When ngspice is missing these checks print a line
//!   saying so and are skipped.
//! - Equivalence proof: every margin-aware result, restoring stages
//!   included, is proven equal to its input netlist (`proof::prove`).
//! - ngspice transient: the 50 % delay from a carry-in step to the last sum
//!   of a mapped 4-bit ripple adder agrees with the tool's static timing of
//!   the paths from the carry in within 15 % (the library's delays are
//!   characterised with slowly switching inputs, docs/device-data.md).
//! - The level analysis itself is checked against ngspice in
//!   tests/device_levels.rs; here it is rerun with another random seed on
//!   the results, independently of the run that placed the stages.

use ribbonmap::device::levels::{analyze_levels, net_voltages, LevelModel, LevelOptions};
use ribbonmap::device::library_write::library_text;
use ribbonmap::device::margin::map_with_margin;
use ribbonmap::device::spice::{load_models, node, write_deck, DeckModels, Stimulus};
use ribbonmap::device::{characterize, read_kit};
use ribbonmap::io::{read_netlist_str, NetlistFormat, ReadOptions};
use ribbonmap::library::electrical::{read_electrical, ElectricalData};
use ribbonmap::library::Library;
use ribbonmap::mapper::{map, MapOptions};
use ribbonmap::netlist::{Driver, MappedNetlist, Verified};
use ribbonmap::network::Network;
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
    data: ElectricalData,
    levels: LevelModel,
}

/// Characterises the demo kit `kit` into a temporary folder.
fn setup(kit: &str) -> Setup {
    let dir = tempfile::tempdir().unwrap();
    std::env::set_var("RIBBONMAP_CACHE_DIR", dir.path());
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
        data,
        levels,
    }
}

fn blif(text: &str, name: &str) -> Network {
    read_netlist_str(text, name, NetlistFormat::Blif, &ReadOptions::default()).unwrap()
}

/// A 32-input parity chain of two-input XORs as BLIF.
fn parity_chain_blif() -> String {
    let mut t = String::from(".model parity32_chain\n.inputs");
    for k in 0..32 {
        t += &format!(" x{k}");
    }
    t += "\n.outputs y\n";
    let mut prev = "x0".to_string();
    for k in 1..32 {
        let out = if k == 31 {
            "y".to_string()
        } else {
            format!("p{k}")
        };
        t += &format!(".names {prev} x{k} {out}\n10 1\n01 1\n");
        prev = out;
    }
    t + ".end\n"
}

/// An n-bit ripple-carry adder as BLIF.
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

fn options(seed: u64) -> LevelOptions {
    LevelOptions {
        patterns: 4096,
        seed,
    }
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

/// ngspice's DC operating point of `netlist` on `bits`, per net id (nets
/// tied to constants left out).
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

#[test]
fn weak_kit_parity_chain_fails_plainly_and_holds_20_mv_when_margin_aware_ngspice() {
    let s = setup("demo-weak.json");
    let net = blif(&parity_chain_blif(), "parity32_chain.blif");
    let plain = map(&net, &s.lib, &MapOptions::default()).unwrap();
    let xor3w = s.lib.cell_index("xor3w").unwrap() as u32;
    assert!(plain.instances.iter().any(|i| i.cell == xor3w));
    let report = analyze_levels(&plain, &s.lib, &s.levels, &options(7)).unwrap();
    println!(
        "parity32 chain, plain: {} cells, worst margin {:.3} mV, {} net-pattern failures",
        plain.instances.len(),
        report.worst_margin_v().unwrap() * 1e3,
        report.logic_failures
    );
    assert!(report.logic_failures > 0);
    // ngspice confirms a failure on the worst pattern of a failing net.
    if ngspice_present() {
        let failing = report.nets.iter().find(|n| n.failures > 0).unwrap();
        let bits: Vec<bool> = failing.worst_pattern.chars().map(|c| c == '1').collect();
        let id = plain
            .nets
            .iter()
            .position(|n| n.name == failing.net)
            .unwrap();
        let spice = ngspice_op(&s, &plain, &bits, "parity_plain")
            .into_iter()
            .find(|&(n, _)| n == id)
            .unwrap()
            .1;
        println!(
            "  ngspice: net {} should be {}, levels {:.6} V, ngspice {:.6} V",
            failing.net,
            u8::from(failing.worst_value),
            failing.worst_voltage_v,
            spice
        );
        assert!((spice - failing.worst_voltage_v).abs() < 1e-4);
        // Wrong side of the switching threshold of its receiver (Vdd / 2 =
        // 0.1 V for a primary output, the cells' VM about 0.1 V).
        assert_ne!(spice > 0.1, failing.worst_value);
    }
    // At 20 mV no buffer can read xor3w's output (VOH 0.138 V against the
    // buffer's VIH 0.123 V: 14.5 mV) with the margin, so xor3w is left out
    // and the circuit remapped; at 10 mV buffers restore the chain.
    for (mv, stages) in [(20.0, false), (10.0, true)] {
        let m = map_with_margin(
            &net,
            &s.lib,
            &s.levels,
            &s.data,
            &MapOptions::default(),
            mv / 1e3,
            &options(7),
        )
        .unwrap();
        let again = analyze_levels(&m.outcome.netlist, &s.lib, &s.levels, &options(99)).unwrap();
        println!(
            "  --min-margin {mv}: {} cells, {} restoring cells (+{} nm2), left out {:?}, worst {:.3} mV (seed 99: {:.3} mV)",
            m.outcome.netlist.instances.len(),
            m.restoring_cells,
            m.restoring_area,
            m.left_out.iter().map(|l| l.cell.as_str()).collect::<Vec<_>>(),
            m.levels.worst_margin_v().unwrap() * 1e3,
            again.worst_margin_v().unwrap() * 1e3
        );
        assert!(m.holds, "{:?}", m.failing_nets);
        assert_eq!(again.logic_failures, 0);
        assert!(again.worst_margin_v().unwrap() >= mv / 1e3);
        assert_eq!(m.restoring_cells > 0, stages);
        let (verified, _) =
            ribbonmap::proof::prove(&net, &m.outcome.netlist, &s.lib, &m.outcome.witness).unwrap();
        assert_eq!(verified, Verified::Proven);
    }
}

/// The weak kit's cheap majority `maj3w` (gain below 1, levels a buffer
/// reads well) takes the carries of a 16-bit ripple adder: along a chain of
/// propagating bits the carry drifts towards the middle with every stage,
/// and from about the eleventh bit on the sums read wrong. ngspice confirms
/// a wrong sum on its worst pattern. With a 20 mV margin `xor3w` is left out
/// (its levels are too poor for a buffer to read with 20 mV) and buffers on
/// the carry chain restore `maj3w`'s carries; levels and ngspice agree that
/// every net keeps 20 mV.
#[test]
fn weak_kit_ripple_adder_fails_plainly_and_holds_20_mv_with_restoring_stages_ngspice() {
    let s = setup("demo-weak.json");
    let net = blif(&ripple_adder_blif(16), "add16.blif");
    let plain = map(&net, &s.lib, &MapOptions::default()).unwrap();
    let maj3w = s.lib.cell_index("maj3w").unwrap() as u32;
    let uses = |n: &MappedNetlist, cell: u32| n.instances.iter().filter(|i| i.cell == cell).count();
    assert!(uses(&plain, maj3w) > 0);
    // The command line's defaults: 65,536 random patterns, seed 1.
    let report = analyze_levels(&plain, &s.lib, &s.levels, &LevelOptions::default()).unwrap();
    let plain_worst = report.worst_margin_v().unwrap();
    println!(
        "add16 ripple, plain: {} cells ({} maj3w), area {} nm2, worst margin {:.3} mV on {}, {} net-pattern failures on {} patterns",
        plain.instances.len(),
        uses(&plain, maj3w),
        plain.area(&s.lib),
        plain_worst * 1e3,
        report.nets[0].net,
        report.logic_failures,
        report.patterns
    );
    assert!(report.logic_failures > 0);
    // The degradation runs along the carry chain from the carry in.
    assert_eq!(report.nets[0].path.first().map(String::as_str), Some("c0"));
    assert!(report.nets[0].path.len() > 10, "{:?}", report.nets[0].path);
    if ngspice_present() {
        // A sum output that reads wrong: on its worst pattern, every net
        // in ngspice within 0.1 mV of the analysis, and the sum on the wrong
        // side of Vdd / 2 (a primary output's threshold) there too.
        let failing = report
            .nets
            .iter()
            .find(|n| n.failures > 0 && plain.outputs.iter().any(|p| p.name == n.net))
            .expect("a sum output reads wrong on some pattern");
        let bits: Vec<bool> = failing.worst_pattern.chars().map(|c| c == '1').collect();
        let (volts, _) = net_voltages(&plain, &s.levels, &bits).unwrap();
        let id = plain
            .nets
            .iter()
            .position(|n| n.name == failing.net)
            .unwrap();
        let spice = ngspice_op(&s, &plain, &bits, "add16_plain");
        let max_dv = spice
            .iter()
            .map(|&(n, v)| (v - volts[n]).abs())
            .fold(0.0, f64::max);
        let at = spice.iter().find(|&&(n, _)| n == id).unwrap().1;
        println!(
            "  ngspice: {} on {} should be {}, levels {:.6} V, ngspice {:.6} V (Vdd/2 = {} V), max |dV| over all nets {max_dv:.3e} V",
            failing.net,
            failing.worst_pattern,
            u8::from(failing.worst_value),
            failing.worst_voltage_v,
            at,
            s.levels.supply_v / 2.0
        );
        assert!(max_dv < 1e-4);
        assert_ne!(at > s.levels.supply_v / 2.0, failing.worst_value);
    }
    for mv in [10.0, 20.0] {
        let m = map_with_margin(
            &net,
            &s.lib,
            &s.levels,
            &s.data,
            &MapOptions::default(),
            mv / 1e3,
            &options(3),
        )
        .unwrap();
        let netlist = &m.outcome.netlist;
        let again = analyze_levels(netlist, &s.lib, &s.levels, &options(11)).unwrap();
        let worst = again.worst_margin_v().unwrap();
        println!(
            "  --min-margin {mv}: {} cells ({} maj3w; {} restoring, +{} nm2; area {} nm2), left out {:?}, delay {:.3} -> {:.3} ps, static {:.1} -> {:.1} nW, worst {:.3} -> {:.3} mV (seed 11: {:.3} mV)",
            netlist.instances.len(),
            uses(netlist, maj3w),
            m.restoring_cells,
            m.restoring_area,
            netlist.area(&s.lib),
            m.left_out.iter().map(|l| format!("{} ({})", l.cell, l.reason)).collect::<Vec<_>>(),
            m.delay_before,
            m.delay_after,
            m.static_before_nw,
            m.static_after_nw,
            m.worst_before_v.unwrap() * 1e3,
            m.levels.worst_margin_v().unwrap() * 1e3,
            worst * 1e3
        );
        assert!(m.holds && worst >= mv / 1e3, "{:?}", m.failing_nets);
        assert_eq!(again.logic_failures, 0);
        // The carries stay on maj3w and restoring stages hold them up: the
        // cost is real, and the report carries it.
        assert!(uses(netlist, maj3w) > 0);
        assert!(m.restoring_cells > 0 && m.restoring_area > 0.0);
        assert!(m.delay_after > m.delay_before);
        // At 20 mV no buffer reads xor3w's high output (0.138 V against the
        // buffer's VIH 0.123 V) with the margin: it is left out.
        let names: Vec<&str> = m.left_out.iter().map(|l| l.cell.as_str()).collect();
        assert_eq!(names, if mv == 20.0 { vec!["xor3w"] } else { vec![] });
        let (verified, _) =
            ribbonmap::proof::prove(&net, netlist, &s.lib, &m.outcome.witness).unwrap();
        assert_eq!(verified, Verified::Proven);
        if mv == 20.0 && ngspice_present() {
            // Every net on the result's worst pattern, in ngspice.
            let w = &again.nets[0];
            let bits: Vec<bool> = w.worst_pattern.chars().map(|c| c == '1').collect();
            let (volts, _) = net_voltages(netlist, &s.levels, &bits).unwrap();
            let spice = ngspice_op(&s, netlist, &bits, "add16_m20");
            let mut max_dv: f64 = 0.0;
            for &(id, v) in &spice {
                max_dv = max_dv.max((v - volts[id]).abs());
            }
            let id = netlist.nets.iter().position(|n| n.name == w.net).unwrap();
            let at = spice.iter().find(|&&(n, _)| n == id).unwrap().1;
            let spice_margin = if w.worst_value {
                at - w.vih_v
            } else {
                w.vil_v - at
            };
            println!(
                "  ngspice on the worst pattern: net {} margin {:.3} mV, max |dV| over all nets {max_dv:.3e} V",
                w.net,
                spice_margin * 1e3
            );
            assert!(max_dv < 1e-4);
            assert!(spice_margin >= 0.020);
        }
    }
}

/// The tool's static timing restricted to paths from net `from`: per net
/// the latest arrival over those paths (cell delay at the net's load, the
/// library's RC model), `None` for nets not reached.
fn arrival_from(netlist: &MappedNetlist, lib: &Library, from: usize) -> Vec<Option<f64>> {
    let timing = ribbonmap::netlist::analyze_timing(netlist, lib);
    let mut arrival = vec![None; netlist.nets.len()];
    arrival[from] = Some(0.0);
    for inst in &netlist.instances {
        let latest = inst
            .inputs
            .iter()
            .filter_map(|&n| arrival[n as usize])
            .fold(None, |m: Option<f64>, a| Some(m.map_or(a, |m| m.max(a))));
        if let Some(a) = latest {
            let cell = &lib.cells[inst.cell as usize];
            arrival[inst.output as usize] =
                Some(a + cell.delay_for_load(timing.load[inst.output as usize]));
        }
    }
    arrival
}

/// Issue 15's transient check (ngspice as the reference). The carry in is
/// an ideal step (0.01 ps ramp), so the first carry cell switches faster in
/// ngspice than the library says: its delays assume an input edge like a
/// fanout-of-four inverter's (docs/device-data.md, "Delay"). The stages
/// after it see real neighbours' edges. The path is timed a second time with
/// the carry in driven as the characterisation assumes (through six padded
/// reference inverters); both must agree within 15 %.
#[test]
fn ripple_adder_carry_path_delay_matches_ngspice_transient_within_15_percent_ngspice() {
    if !ngspice_present() {
        return;
    }
    let s = setup("demo.json");
    let net = blif(&ripple_adder_blif(4), "add4.blif");
    let netlist = map(&net, &s.lib, &MapOptions::default()).unwrap();
    // Inputs a0 b0 a1 b1 a2 b2 a3 b3 c0: a = 1111, b = 0000 makes every
    // bit propagate, so the carry-in step ripples to the last sum, which
    // falls (s3 = a3 ^ b3 ^ c3 goes from 1 to 0).
    let from: Vec<bool> = (0..9).map(|k| k < 8 && k % 2 == 0).collect();
    let mut to = from.clone();
    to[8] = true;
    let cin = netlist.inputs[8].net;
    let s3 = netlist.outputs.iter().find(|p| p.name == "s3").unwrap().net;
    let model = arrival_from(&netlist, &s.lib, cin as usize)[s3 as usize]
        .expect("the last sum depends on the carry in");
    let t50 = carry_t50(&s, &netlist, &from, &to, cin, s3, &[], "add4_tran", model);
    let error = (model - t50).abs() / t50;
    println!(
        "4-bit ripple adder ({} cells), carry-in step to s3: ngspice t50 {t50:.3} ps, static timing {model:.3} ps, error {:.1} %",
        netlist.instances.len(),
        error * 100.0
    );
    assert!(error <= 0.15);

    // The same path with the carry in driven as the characterisation
    // assumes: through six of the kit's inverters, each padded to four unit
    // loads; timed from the carry-in net itself.
    let mut driven = netlist.clone();
    let inv = s.lib.cell_index("inv").unwrap() as u32;
    let src = driven.add_net("c0_src".into(), Driver::Input(8));
    driven.inputs[8].net = src;
    let unit = s.models.unit_load_af;
    let gate = |cell: u32| {
        s.models.cells[cell as usize]
            .as_ref()
            .unwrap()
            .gate_capacitance_af
    };
    let readers: f64 = netlist
        .instances
        .iter()
        .flat_map(|i| {
            i.inputs
                .iter()
                .filter(|&&n| n == cin)
                .map(move |_| gate(i.cell))
        })
        .sum();
    let mut padding = Vec::new();
    let mut previous = src;
    for stage in 0..6 {
        let out = if stage == 5 {
            // The last inverter drives the carry-in net the cells read.
            let idx = driven.instances.len() as u32;
            driven.nets[cin as usize].driver = Driver::Cell(idx);
            driven.instances.push(ribbonmap::netlist::Instance {
                name: format!("ref{stage}"),
                cell: inv,
                inputs: vec![previous],
                output: cin,
            });
            padding.push((cin, 4.0 * unit - readers));
            cin
        } else {
            let out = driven.add_instance(inv, vec![previous], format!("ref{stage}"));
            padding.push((out, 4.0 * unit - gate(inv)));
            out
        };
        previous = out;
    }
    let caps: Vec<String> = padding
        .iter()
        .enumerate()
        .map(|(i, (n, af))| format!("cpad{i} {} 0 {:e}", node(*n), af * 1e-18))
        .collect();
    let t50_driven = carry_t50(
        &s,
        &driven,
        &from,
        &to,
        cin,
        s3,
        &caps,
        "add4_driven",
        model,
    );
    let error_driven = (model - t50_driven).abs() / t50_driven;
    println!(
        "  carry in driven by the reference chain: ngspice t50 {t50_driven:.3} ps, static timing {model:.3} ps, error {:.1} %",
        error_driven * 100.0
    );
    assert!(error_driven <= 0.15);
}

/// ngspice's 50 % delay in picoseconds from net `from_net` to net `to_net`
/// of `netlist` when the inputs step from `from` to `to`; `extra` cards go
/// into the deck.
#[allow(clippy::too_many_arguments)]
fn carry_t50(
    s: &Setup,
    netlist: &MappedNetlist,
    from: &[bool],
    to: &[bool],
    from_net: u32,
    to_net: u32,
    extra: &[String],
    stem: &str,
    expected_ps: f64,
) -> f64 {
    let mid = (s.models.logic_low_v + s.models.logic_high_v) / 2.0;
    let mut cards = extra.to_vec();
    cards.push(format!(
        ".measure tran t50 trig v({}) val={mid} cross=1 targ v({}) val={} cross=1",
        node(from_net),
        node(to_net),
        s.models.supply_v / 2.0
    ));
    let deck = write_deck(
        netlist,
        &s.lib,
        &s.models,
        &Stimulus::Step {
            from: from.to_vec(),
            to: to.to_vec(),
            step_ps: 5.0,
            ramp_ps: 0.01,
            stop_ps: 100.0 + 10.0 * expected_ps,
        },
        stem,
        &cards,
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
    output
        .lines()
        .find_map(|l| {
            let rest = l
                .trim()
                .strip_prefix("t50")?
                .trim_start()
                .strip_prefix('=')?;
            rest.split_whitespace().next()?.parse::<f64>().ok()
        })
        .unwrap_or_else(|| panic!("no t50 in ngspice output:\n{output}"))
        * 1e12
}

/// Runs the binary in `dir` and returns (exit code, stdout).
fn ribbonmap_in(dir: &Path, args: &[&str]) -> (i32, String) {
    let out = assert_cmd::Command::cargo_bin("ribbonmap")
        .unwrap()
        .args(args)
        .current_dir(dir)
        .env("RIBBONMAP_CACHE_DIR", dir)
        .output()
        .unwrap();
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).to_string(),
    )
}

/// The command line on the weak kit's 16-bit ripple adder: `levels` exits 1
/// and reports the logic failures, and `map --min-margin 20` exits 0 with
/// every margin held by restoring stages and xor3w left out. Both equal
/// the library functions' figures with the same options (whose results
/// the test above checks against ngspice).
#[test]
fn levels_and_map_min_margin_command_line_on_the_weak_adder() {
    let s = setup("demo-weak.json");
    let dir = s.dir.clone();
    let kit = Path::new(env!("CARGO_MANIFEST_DIR")).join("libraries/devices/demo/demo-weak.json");
    let (code, _) = ribbonmap_in(
        &dir,
        &["characterize", kit.to_str().unwrap(), "-o", "weak.json"],
    );
    assert_eq!(code, 0);
    std::fs::write(dir.join("add16.blif"), ripple_adder_blif(16)).unwrap();
    let (code, out) = ribbonmap_in(
        &dir,
        &[
            "levels",
            "add16.blif",
            "--lib",
            "weak.json",
            "--format",
            "json",
        ],
    );
    assert_eq!(code, 1, "{out}");
    let levels: serde_json::Value = serde_json::from_str(&out).unwrap();
    let net = blif(&ripple_adder_blif(16), "add16.blif");
    let plain = map(&net, &s.lib, &MapOptions::default()).unwrap();
    let report = analyze_levels(&plain, &s.lib, &s.levels, &LevelOptions::default()).unwrap();
    println!(
        "ribbonmap levels add16: exit {code}, {} cells, worst {} mV on {}, {} logic failures",
        levels["cells"],
        levels["nets"][0]["worst_margin_v"].as_f64().unwrap() * 1e3,
        levels["nets"][0]["net"],
        levels["logic_failures"]
    );
    assert!(report.logic_failures > 0);
    assert_eq!(levels["logic_failures"], report.logic_failures);
    assert_eq!(levels["holds"], false);
    assert_eq!(levels["nets"][0]["net"], report.nets[0].net.as_str());
    assert_eq!(
        levels["nets"][0]["worst_margin_v"],
        report.worst_margin_v().unwrap()
    );

    let (code, out) = ribbonmap_in(
        &dir,
        &[
            "map",
            "add16.blif",
            "--lib",
            "weak.json",
            "--min-margin",
            "20",
            "--format",
            "json",
        ],
    );
    assert_eq!(code, 0, "{out}");
    let mapped: serde_json::Value = serde_json::from_str(&out).unwrap();
    let margin = &mapped["margin"];
    let m = map_with_margin(
        &net,
        &s.lib,
        &s.levels,
        &s.data,
        &MapOptions::default(),
        0.020,
        &LevelOptions::default(),
    )
    .unwrap();
    println!(
        "ribbonmap map add16 --min-margin 20: {} cells, area {}, {} restoring (+{}), delay {} -> {} ps, static {} -> {} nW, worst {} -> {} mV, left out {}",
        mapped["cell_count"],
        mapped["area"],
        margin["restoring_cells"],
        margin["restoring_area"],
        margin["delay_before"],
        margin["delay_after"],
        margin["static_before_nw"],
        margin["static_after_nw"],
        margin["worst_margin_before_mv"],
        margin["worst_margin_mv"],
        margin["left_out"]
    );
    assert_eq!(margin["holds"], true);
    assert!(margin["worst_margin_mv"].as_f64().unwrap() >= 20.0);
    assert_eq!(margin["restoring_cells"], m.restoring_cells);
    assert_eq!(margin["left_out"][0]["cell"], "xor3w");
    assert_eq!(mapped["cell_count"], m.outcome.netlist.instances.len());
    assert!(m.restoring_cells > 0);
}

/// A study plan's `min_margin` and `compare --min-margin` map exactly as
/// `map --min-margin` (the outside check of the result is the level
/// analysis and ngspice of the tests above; here the three commands must
/// agree figure for figure). On the weak kit an 8-bit ripple adder gets
/// restoring buffers at both 10 and 20 mV (maj3w's carries, and at 10 mV
/// xor3w's sums), while at 20 mV xor3w is left out (no buffer reads its
/// 0.138 V high level with 20 mV to spare).
#[test]
fn study_and_compare_min_margin_equal_map_min_margin() {
    let dir = tempfile::tempdir().unwrap();
    let kit = Path::new(env!("CARGO_MANIFEST_DIR")).join("libraries/devices/demo/demo-weak.json");
    let ch = characterize(read_kit(&kit).unwrap()).unwrap();
    std::fs::write(dir.path().join("weak.json"), library_text(&ch, dir.path())).unwrap();
    std::fs::write(dir.path().join("add8.blif"), ripple_adder_blif(8)).unwrap();
    let none: &[&str] = &[];
    for (mv, left_out) in [(10.0, none), (20.0, &["xor3w"])] {
        let (code, map_out) = ribbonmap_in(
            dir.path(),
            &[
                "map",
                "add8.blif",
                "--lib",
                "weak.json",
                "--goal",
                "balanced",
                "--min-margin",
                &mv.to_string(),
                "--format",
                "json",
            ],
        );
        assert_eq!(code, 0, "{map_out}");
        let map: serde_json::Value = serde_json::from_str(&map_out).unwrap();
        let plan = format!(
            "{{\"benchmarks\": [\"add8.blif\"], \"libraries\": [\"weak.json\"], \"goals\": [\"balanced\"], \"options\": {{\"min_margin\": {mv}, \"verify\": \"full\"}}}}"
        );
        let plan_file = format!("plan{mv}.json");
        let results = format!("results{mv}.jsonl");
        std::fs::write(dir.path().join(&plan_file), plan).unwrap();
        let (code, _) = ribbonmap_in(dir.path(), &["study", &plan_file, "-o", &results]);
        assert_eq!(code, 0);
        let line: serde_json::Value = serde_json::from_str(
            std::fs::read_to_string(dir.path().join(&results))
                .unwrap()
                .lines()
                .next()
                .unwrap(),
        )
        .unwrap();
        let (code, compare_out) = ribbonmap_in(
            dir.path(),
            &[
                "compare",
                "add8.blif",
                "--lib",
                "weak.json",
                "--goal",
                "balanced",
                "--min-margin",
                &mv.to_string(),
                "--format",
                "json",
            ],
        );
        assert_eq!(code, 0, "{compare_out}");
        let compare: serde_json::Value = serde_json::from_str(&compare_out).unwrap();
        let row = &compare["rows"][0];
        let margin = &map["margin"];
        println!(
            "add8 on the weak kit, min margin {mv} mV: {} cells, {} restoring (+{} nm2), delay {} ps, worst {} mV before, {} mV reached, left out {}",
            map["cell_count"],
            margin["restoring_cells"],
            margin["restoring_area"],
            map["delay"],
            margin["worst_margin_before_mv"],
            margin["worst_margin_mv"],
            margin["left_out"]
        );
        assert_eq!(margin["holds"], true);
        assert!(margin["restoring_cells"].as_u64().unwrap() > 0);
        let names: Vec<&str> = margin["left_out"]
            .as_array()
            .unwrap()
            .iter()
            .map(|l| l["cell"].as_str().unwrap())
            .collect();
        assert_eq!(names, left_out);
        for record in [&line, row] {
            assert_eq!(record["min_margin_mv"], mv);
            for field in ["cells", "cell_count", "area", "delay", "depth"] {
                assert_eq!(record[field], map[field], "{field} at {mv} mV");
            }
            for field in [
                "restoring_cells",
                "restoring_area",
                "delay_before",
                "delay_after",
                "worst_margin_before_mv",
                "worst_margin_mv",
                "left_out",
                "holds",
            ] {
                assert_eq!(record["margin"][field], margin[field], "{field} at {mv} mV");
            }
        }
    }
}

/// Bad input (exit 2, one line naming the plan's line): `min_margin` on a
/// library without electrical data (the built-in nand-nor-inv), and a
/// negative `min_margin`.
#[test]
fn plan_min_margin_bad_input() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("add2.blif"), ripple_adder_blif(2)).unwrap();
    for (options, words) in [
        (
            "\"min_margin\": 20",
            "min_margin needs a characterised library",
        ),
        ("\"min_margin\": -5", "non-negative"),
    ] {
        let plan = format!(
            "{{\"benchmarks\": [\"add2.blif\"],\n \"libraries\": [\"nand-nor-inv\"],\n \"options\": {{{options}}}}}"
        );
        std::fs::write(dir.path().join("plan.json"), plan).unwrap();
        let out = assert_cmd::Command::cargo_bin("ribbonmap")
            .unwrap()
            .args(["study", "plan.json", "-o", "r.jsonl"])
            .current_dir(dir.path())
            .env("RIBBONMAP_CACHE_DIR", dir.path())
            .output()
            .unwrap();
        let stderr = String::from_utf8_lossy(&out.stderr).to_string();
        assert_eq!(out.status.code(), Some(2), "{stderr}");
        assert_eq!(stderr.lines().count(), 1, "{stderr}");
        assert!(stderr.contains("plan.json:"), "{stderr}");
        assert!(stderr.contains(words), "{stderr}");
    }
}
