//! The characterised demo kit checked in ngspice, a circuit simulator from
//! outside the project (Debian's `ngspice` package; `.ci/run` installs it).
//!
//! - DC: for every cell and input row, ngspice's operating point of the
//!   cell's deck equals the characterised output voltage within 0.1 mV and
//!   the static supply current within 0.1 %.
//! - Transient: the 50 % delay of an inverter driving one and four inverters,
//!   and of every two-input cell driving two inverters, agrees with the
//!   characterised `intrinsic + per_load · load` model within 10 %. As in
//!   the characterisation, the switching input is driven by a chain of the
//!   kit's inverter, each driving four unit loads (padding capacitors make
//!   up the load), and the slowest arc counts.
//!
//! When ngspice is missing the tests print a line saying so and pass.

use ribbonmap::device::library_write::library_text;
use ribbonmap::device::spice::{load_models, node, write_deck, DeckModels, Stimulus};
use ribbonmap::device::switching::{arcs, REFERENCE_FANOUT};
use ribbonmap::device::{characterize, read_kit, Characterization};
use ribbonmap::library::electrical::read_electrical;
use ribbonmap::library::Library;
use ribbonmap::netlist::{Driver, MappedNetlist, Port};
use std::path::{Path, PathBuf};
use std::process::Command;

fn ngspice_present() -> bool {
    let found = Command::new("ngspice").arg("--version").output().is_ok();
    if !found {
        println!("SKIPPED: ngspice is not installed (apt-get install -y ngspice); the SPICE checks did not run");
    }
    found
}

fn demo_kit() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("libraries/devices/demo/demo.json")
}

struct Setup {
    _dir: tempfile::TempDir,
    dir: PathBuf,
    ch: Characterization,
    lib: Library,
    models: DeckModels,
}

fn setup() -> Setup {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().to_path_buf();
    let ch = characterize(read_kit(&demo_kit()).unwrap()).unwrap();
    let text = library_text(&ch, &path);
    let lib = Library::from_json_str(&text, "demo-lib.json").unwrap();
    let models = load_models(&lib, &read_electrical(&text), &path, "demo-lib.json").unwrap();
    Setup {
        _dir: dir,
        dir: path,
        ch,
        lib,
        models,
    }
}

/// A netlist of one `cell` on inputs x0.. with its output driving `loads`
/// inverters; the cell's output net is returned with the netlist.
fn cell_netlist(lib: &Library, cell: &str, loads: usize) -> (MappedNetlist, u32) {
    let index = lib.cell_index(cell).unwrap() as u32;
    let inv = lib.cell_index("inv").unwrap() as u32;
    let mut n = MappedNetlist {
        name: format!("{cell}_x{loads}"),
        library: lib.name.clone(),
        ..MappedNetlist::default()
    };
    let arity = lib.cells[index as usize].arity();
    let inputs: Vec<u32> = (0..arity)
        .map(|k| {
            let id = n.add_net(format!("x{k}"), Driver::Input(k as u32));
            n.inputs.push(Port {
                name: format!("x{k}"),
                net: id,
            });
            id
        })
        .collect();
    let y = n.add_instance(index, inputs, "y".into());
    for l in 0..loads {
        let out = n.add_instance(inv, vec![y], format!("load{l}"));
        n.outputs.push(Port {
            name: format!("load{l}"),
            net: out,
        });
    }
    if loads == 0 {
        n.outputs.push(Port {
            name: "y".into(),
            net: y,
        });
    }
    (n, y)
}

fn run_ngspice(dir: &Path, deck: &str) -> String {
    let out = Command::new("ngspice")
        .arg("-b")
        .arg(deck)
        .current_dir(dir)
        .output()
        .expect("ngspice runs");
    String::from_utf8_lossy(&out.stdout).to_string() + &String::from_utf8_lossy(&out.stderr)
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
fn dc_operating_points_match_the_characterisation_ngspice() {
    if !ngspice_present() {
        return;
    }
    let s = setup();
    let mut worst_dv: f64 = 0.0;
    let mut worst_di: f64 = 0.0;
    let mut checked = 0;
    for c in &s.ch.cells {
        let (netlist, y) = cell_netlist(&s.lib, &c.kit_cell.name, 0);
        for (r, row) in c.rows.iter().enumerate() {
            let bits: Vec<bool> = (0..c.kit_cell.inputs.len())
                .map(|k| r >> k & 1 == 1)
                .collect();
            let stem = format!("{}_{r}", c.kit_cell.name);
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
            let output = run_ngspice(&s.dir, path.to_str().unwrap());
            let v = op_value(&output, &node(y));
            // The supply source's branch current flows into its + terminal.
            let i = -op_value(&output, "vsupply#branch");
            let dv = (v - row.output_v).abs();
            let di = (i - row.current_a).abs() / row.current_a;
            assert!(
                dv < 1e-4,
                "{} row {r}: ngspice {v} V, characterised {} V",
                c.kit_cell.name,
                row.output_v
            );
            assert!(
                di < 1e-3,
                "{} row {r}: ngspice {i} A, characterised {} A",
                c.kit_cell.name,
                row.current_a
            );
            worst_dv = worst_dv.max(dv);
            worst_di = worst_di.max(di);
            checked += 1;
        }
    }
    assert_eq!(checked, 2 * 2 + 6 * 4 + 8 * 8);
    println!(
        "ngspice DC: {checked} cell rows, max |dV| = {:.3e} V, max relative current error = {:.3e}",
        worst_dv, worst_di
    );
}

/// Stages of the reference chain in front of the switching input. The
/// characterisation drives every arc with the settled edge of a chain of
/// the kit's inverter, each driving four unit loads (docs/device-data.md,
/// "Delay"); six stages settle that edge in ngspice as well (the
/// integrated chain's stage delays differ by less than 0.2 % from the
/// fourth stage on).
const REFERENCE_STAGES: usize = 6;

/// A netlist of one `cell` driving `loads` inverters, its input `switching`
/// driven through [`REFERENCE_STAGES`] inverters from the primary input
/// `src` (the last netlist input); the other inputs are primary inputs
/// x0.. in pin order. Returns the netlist, the switching pin's net, the
/// cell's output net and the padding capacitors (net, aF) that bring each
/// reference inverter's load to four unit loads.
fn driven_netlist(
    s: &Setup,
    cell: &str,
    switching: usize,
    loads: usize,
) -> (MappedNetlist, u32, u32, Vec<(u32, f64)>) {
    let lib = &s.lib;
    let index = lib.cell_index(cell).unwrap() as u32;
    let inv = lib.cell_index("inv").unwrap() as u32;
    let unit = s.models.unit_load_af;
    let gate = |c: u32| {
        s.models.cells[c as usize]
            .as_ref()
            .unwrap()
            .gate_capacitance_af
    };
    let mut n = MappedNetlist {
        name: format!("{cell}_in{switching}_x{loads}"),
        library: lib.name.clone(),
        ..MappedNetlist::default()
    };
    let arity = lib.cells[index as usize].arity();
    let mut pins = vec![0u32; arity];
    for (k, pin) in pins.iter_mut().enumerate() {
        if k != switching {
            let id = n.add_net(format!("x{k}"), Driver::Input(n.inputs.len() as u32));
            n.inputs.push(Port {
                name: format!("x{k}"),
                net: id,
            });
            *pin = id;
        }
    }
    let src = n.add_net("src".into(), Driver::Input(n.inputs.len() as u32));
    n.inputs.push(Port {
        name: "src".into(),
        net: src,
    });
    let mut padding = Vec::new();
    let mut previous = src;
    for stage in 0..REFERENCE_STAGES {
        previous = n.add_instance(inv, vec![previous], format!("ref{stage}"));
        let driven = if stage + 1 == REFERENCE_STAGES {
            gate(index)
        } else {
            gate(inv)
        };
        padding.push((previous, REFERENCE_FANOUT * unit - driven));
    }
    pins[switching] = previous;
    let y = n.add_instance(index, pins, "y".into());
    for l in 0..loads {
        let out = n.add_instance(inv, vec![y], format!("load{l}"));
        n.outputs.push(Port {
            name: format!("load{l}"),
            net: out,
        });
    }
    (n, previous, y, padding)
}

/// Measures the 50 % delay of `cell` driving `loads` inverters on every
/// arc, each input driven through the reference chain, and returns the
/// slowest arc's (ngspice) and the library's model, in picoseconds.
fn slowest_arc_delay(s: &Setup, cell: &str, loads: usize) -> (f64, f64) {
    let c = s.ch.cells.iter().find(|c| c.kit_cell.name == cell).unwrap();
    let n = c.kit_cell.inputs.len();
    let mid_in = (s.models.logic_low_v + s.models.logic_high_v) / 2.0;
    let mut slowest: f64 = 0.0;
    for arc in arcs(c.truth, n) {
        let (netlist, pin, y, padding) = driven_netlist(s, cell, arc.input, loads);
        // The other inputs in pin order, then src; an even chain passes the
        // source's edge on unchanged.
        let bits = |rises_after: bool| -> Vec<bool> {
            let mut b: Vec<bool> = (0..n)
                .filter(|&k| k != arc.input)
                .map(|k| arc.row >> k & 1 == 1)
                .collect();
            b.push(rises_after == arc.input_rises);
            b
        };
        let mut extra: Vec<String> = padding
            .iter()
            .enumerate()
            .map(|(i, (net, af))| format!("cpad{i} {} 0 {:e}", node(*net), af * 1e-18))
            .collect();
        extra.push(format!(
            ".measure tran t50 trig v({}) val={mid_in} cross=1 targ v({}) val={} cross=1",
            node(pin),
            node(y),
            s.models.supply_v / 2.0
        ));
        let stem = format!(
            "{cell}_in{}_r{}_{}_x{loads}",
            arc.input,
            arc.row,
            if arc.input_rises { "rise" } else { "fall" }
        );
        let deck = write_deck(
            &netlist,
            &s.lib,
            &s.models,
            &Stimulus::Step {
                from: bits(false),
                to: bits(true),
                step_ps: 5.0,
                ramp_ps: 0.01,
                stop_ps: 200.0,
            },
            &stem,
            &extra,
        )
        .unwrap();
        let path = s.dir.join(format!("{stem}.cir"));
        deck.save(&path).unwrap();
        let output = run_ngspice(&s.dir, path.to_str().unwrap());
        let t50 = output
            .lines()
            .find_map(|l| {
                let l = l.trim();
                let rest = l.strip_prefix("t50")?.trim_start().strip_prefix('=')?;
                rest.split_whitespace().next()?.parse::<f64>().ok()
            })
            .unwrap_or_else(|| panic!("no t50 in ngspice output:\n{output}"));
        slowest = slowest.max(t50 * 1e12);
    }
    let cell_lib = s.lib.cell(cell).unwrap();
    let inv_load = s.lib.cell("inv").unwrap().input_load;
    let model = cell_lib.delay_for_load(loads as f64 * inv_load);
    (slowest, model)
}

#[test]
fn transient_delays_match_the_delay_model_ngspice() {
    if !ngspice_present() {
        return;
    }
    let s = setup();
    let mut cases = vec![("inv", 1), ("inv", 4)];
    for c in &s.ch.cells {
        if c.kit_cell.inputs.len() == 2 {
            cases.push((Box::leak(c.kit_cell.name.clone().into_boxed_str()), 2));
        }
    }
    let mut worst: f64 = 0.0;
    for (cell, loads) in cases {
        let (spice, model) = slowest_arc_delay(&s, cell, loads);
        let error = (spice - model).abs() / model;
        println!(
            "ngspice t50 of the slowest arc of {cell} driving {loads}: {spice:.4} ps, model {model:.4} ps, error {:.2} %",
            error * 100.0
        );
        assert!(
            error < 0.10,
            "{cell} x{loads}: ngspice {spice} ps, model {model} ps"
        );
        worst = worst.max(error);
    }
    println!(
        "ngspice transient: worst delay error {:.2} %",
        worst * 100.0
    );
}
