//! The characterised demo kit checked in ngspice, a circuit simulator from
//! outside the project (Debian's `ngspice` package; `.ci/run` installs it).
//!
//! - DC: for every cell and input row, ngspice's operating point of the
//!   cell's deck equals the characterised output voltage within 0.1 mV and
//!   the static supply current within 0.1 %.
//! - Transient: the 50 % delay of an inverter driving one and four inverters,
//!   and of every two-input cell driving two inverters, agrees with the
//!   characterised `intrinsic + per_load · load` model within 10 %.
//!
//! When ngspice is missing the tests print a line saying so and pass.

use ribbonmap::device::library_write::library_text;
use ribbonmap::device::spice::{load_models, node, write_deck, DeckModels, Stimulus};
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

/// Measures the 50 % delay of `cell` driving `loads` inverters on the step
/// into its slowest row, and returns (ngspice, model) in picoseconds.
fn step_delay(s: &Setup, cell: &str, loads: usize) -> (f64, f64) {
    let c = s.ch.cells.iter().find(|c| c.kit_cell.name == cell).unwrap();
    let n = c.kit_cell.inputs.len();
    let slowest = (0..c.rows.len())
        .min_by(|&a, &b| {
            let ga = c.rows[a].pull_up_s + c.rows[a].pull_down_s;
            let gb = c.rows[b].pull_up_s + c.rows[b].pull_down_s;
            ga.total_cmp(&gb)
        })
        .unwrap();
    // The start row: fewest input changes that flip the output.
    let start = (0..c.rows.len())
        .filter(|&r| (c.truth >> r & 1) != (c.truth >> slowest & 1))
        .min_by_key(|&r| ((r ^ slowest).count_ones(), r))
        .unwrap();
    let bits = |r: usize| -> Vec<bool> { (0..n).map(|k| r >> k & 1 == 1).collect() };
    let changed = (0..n).find(|&k| (start ^ slowest) >> k & 1 == 1).unwrap();
    let (netlist, y) = cell_netlist(&s.lib, cell, loads);
    let mid_out = (c.rows[start].output_v + c.rows[slowest].output_v) / 2.0;
    let mid_in = (s.models.logic_low_v + s.models.logic_high_v) / 2.0;
    let measure = format!(
        ".measure tran t50 trig v({}) val={mid_in} cross=1 targ v({}) val={mid_out} cross=1",
        node(netlist.inputs[changed].net),
        node(y)
    );
    let stem = format!("{cell}_t{loads}");
    let deck = write_deck(
        &netlist,
        &s.lib,
        &s.models,
        &Stimulus::Step {
            from: bits(start),
            to: bits(slowest),
            step_ps: 5.0,
            ramp_ps: 0.01,
            stop_ps: 60.0,
        },
        &stem,
        &[measure],
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
    let cell_lib = s.lib.cell(cell).unwrap();
    let inv_load = s.lib.cell("inv").unwrap().input_load;
    let model = cell_lib.delay_for_load(loads as f64 * inv_load);
    (t50 * 1e12, model)
}

#[test]
fn transient_delays_match_the_rc_model_ngspice() {
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
        let (spice, model) = step_delay(&s, cell, loads);
        let error = (spice - model).abs() / model;
        println!(
            "ngspice t50 {cell} driving {loads}: {spice:.4} ps, model {model:.4} ps, error {:.2} %",
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
