//! SPICE decks of mapped netlists, for checking the characterised numbers in
//! a general-purpose circuit simulator (ngspice).
//!
//! Each ribbon becomes a conductance controlled by its gate voltages through
//! a lookup table: an XSPICE `table2D`/`table3D` code model reads the
//! ribbon's conductance table (written beside the deck, in microsiemens)
//! and drives that value as a current into a 1 Ω resistor, so the resistor's
//! node voltage is the conductance in µS; a behavioural current source then
//! carries the ribbon's current `1e-6 · V(g) · V(across)`. Grid points of
//! the tables are reproduced exactly; between them the simulator's own
//! table interpolation applies. Each cell output has its own capacitance,
//! each input pin its gate capacitance and each primary output the
//! library's primary-output load, all from the electrical blocks.
//! One-input tables are written as two-dimensional tables whose second
//! input is tied to ground (ngspice has no one-dimensional table model).

use super::table::{read_table, ConductanceTable};
use crate::diag::SourceError;
use crate::library::electrical::{ElectricalData, TableRecord};
use crate::library::Library;
use crate::netlist::{Driver, MappedNetlist};
use std::fmt::Write;
use std::path::{Path, PathBuf};

/// The tables and capacitances of one cell, as a deck needs them.
#[derive(Clone, Debug)]
pub struct CellModel {
    /// Pull-up conductance table.
    pub pull_up: ConductanceTable,
    /// Pull-down conductance table.
    pub pull_down: ConductanceTable,
    /// Output node capacitance, attofarads.
    pub output_capacitance_af: f64,
    /// Gate capacitance per input pin, attofarads.
    pub gate_capacitance_af: f64,
}

/// Everything a deck needs beyond the netlist: one model per library cell
/// (`None` for cells without an electrical block) and the voltages.
#[derive(Clone, Debug)]
pub struct DeckModels {
    /// Per library cell, in library order.
    pub cells: Vec<Option<CellModel>>,
    /// Supply voltage, volts.
    pub supply_v: f64,
    /// Logic-low input voltage, volts.
    pub logic_low_v: f64,
    /// Logic-high input voltage, volts.
    pub logic_high_v: f64,
    /// Capacitance of one unit of load (primary outputs), attofarads.
    pub unit_load_af: f64,
}

/// Loads the tables named by a characterised library's electrical blocks;
/// paths are relative to `library_dir`. A table whose SHA-256 differs from
/// the recorded one is an error: the library no longer describes it.
pub fn load_models(
    library: &Library,
    data: &ElectricalData,
    library_dir: &Path,
    library_file: &str,
) -> Result<DeckModels, SourceError> {
    let Some(derived) = &data.derived_from else {
        return Err(SourceError::new(
            library_file,
            0,
            0,
            "the library has no derived_from record: SPICE decks need a library written by 'ribbonmap characterize'",
        ));
    };
    let supply_v = library
        .supply_v
        .ok_or_else(|| SourceError::new(library_file, 0, 0, "the library gives no supply_v"))?;
    let mut cells = Vec::with_capacity(library.cells.len());
    for cell in &library.cells {
        let Some(e) = data.cell(&cell.name) else {
            cells.push(None);
            continue;
        };
        let load = |record: &TableRecord| -> Result<ConductanceTable, SourceError> {
            let path = library_dir.join(&record.file);
            let shown = path.display().to_string();
            let sha = super::characterize::file_sha256(&path, &shown)?;
            if sha != record.sha256 {
                return Err(SourceError::new(
                    &shown,
                    0,
                    0,
                    format!(
                        "the table has changed since cell '{}' was characterised (SHA-256 {}…, recorded {}…): characterise the kit again",
                        cell.name,
                        &sha[..12],
                        &record.sha256[..12.min(record.sha256.len())]
                    ),
                ));
            }
            read_table(&path, &shown)
        };
        cells.push(Some(CellModel {
            pull_up: load(&e.pull_up)?,
            pull_down: load(&e.pull_down)?,
            output_capacitance_af: e.output_capacitance_af,
            gate_capacitance_af: e.gate_capacitance_af,
        }));
    }
    Ok(DeckModels {
        cells,
        supply_v,
        logic_low_v: derived.logic_low_v,
        logic_high_v: derived.logic_high_v,
        unit_load_af: derived.unit_load_af,
    })
}

/// Loads the tables and electrical data of the characterised library `lib`
/// loaded from `lib_spec` (a file, or a built-in name whose tables lie under
/// `libraries/`, see [`builtin_library_dir`]); the error is one line for the
/// user.
pub fn load_spec_models(
    lib: &Library,
    lib_spec: &str,
) -> Result<(DeckModels, ElectricalData), String> {
    let builtin = crate::library::builtin_text(lib_spec);
    let text = match builtin {
        Some(text) => text.to_string(),
        None => {
            let bytes =
                std::fs::read(lib_spec).map_err(|e| format!("{lib_spec}: cannot read: {e}"))?;
            crate::diag::utf8_text(lib_spec, bytes).map_err(|e| e.to_string())?
        }
    };
    let data = crate::library::electrical::read_electrical(&text);
    let (dir, shown) = if builtin.is_some() {
        (
            builtin_library_dir(lib_spec, &data)?,
            format!("<builtin:{lib_spec}>"),
        )
    } else {
        let dir = Path::new(lib_spec)
            .parent()
            .map(Path::to_path_buf)
            .unwrap_or_default();
        (dir, lib_spec.to_string())
    };
    let models = load_models(lib, &data, &dir, &shown).map_err(|e| e.to_string())?;
    Ok((models, data))
}

/// The folder the table paths of the built-in library `name` are relative
/// to. The binary embeds the library files but not their conductance tables
/// (files under `libraries/devices/`), so they are looked for in
/// `libraries/` below the current folder, then in the source tree the
/// binary was built from; when neither holds them the error says so and
/// what to do.
pub fn builtin_library_dir(name: &str, data: &ElectricalData) -> Result<PathBuf, String> {
    let Some(first) = data.cells.first().map(|(_, e)| &e.pull_up.file) else {
        return Ok(PathBuf::from("libraries"));
    };
    let candidates = [
        PathBuf::from("libraries"),
        Path::new(env!("CARGO_MANIFEST_DIR")).join("libraries"),
    ];
    candidates
        .iter()
        .find(|dir| dir.join(first).is_file())
        .cloned()
        .ok_or_else(|| {
            format!(
                "<builtin:{name}>: the conductance tables of the built-in library are not in the binary and {first} is in neither {} nor {}: run from the repository's root, or pass the library file (libraries/{name}.json, beside its devices/ folder) to --lib",
                candidates[0].display(),
                candidates[1].display()
            )
        })
}

/// What drives the primary inputs.
#[derive(Clone, Debug, PartialEq)]
pub enum Stimulus {
    /// Fixed logic values (netlist input order) and a DC operating point.
    Pattern(Vec<bool>),
    /// Inputs start at `from`, switch to `to` at `step_ps` with ramps of
    /// `ramp_ps`; a transient runs to `stop_ps`.
    Step {
        /// Values before the step.
        from: Vec<bool>,
        /// Values after the step.
        to: Vec<bool>,
        /// Time of the step, picoseconds.
        step_ps: f64,
        /// Ramp time of the step, picoseconds.
        ramp_ps: f64,
        /// End of the simulation, picoseconds.
        stop_ps: f64,
    },
}

/// A deck and the table files it reads.
#[derive(Clone, Debug, PartialEq)]
pub struct Deck {
    /// The deck text.
    pub text: String,
    /// (file name, contents) of each table file, to be written beside the
    /// deck.
    pub tables: Vec<(String, String)>,
}

impl Deck {
    /// Writes the deck to `path` and its tables beside it.
    pub fn save(&self, path: &Path) -> std::io::Result<()> {
        let dir = match path.parent() {
            Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
            _ => std::path::PathBuf::from("."),
        };
        for (name, contents) in &self.tables {
            crate::fsutil::write_atomic(&dir.join(name), contents.as_bytes())?;
        }
        crate::fsutil::write_atomic(path, self.text.as_bytes())
    }
}

/// The SPICE node of net `id`.
pub fn node(id: u32) -> String {
    format!("n{id}")
}

/// The table file text of one ribbon in the `table2D`/`table3D` layout:
/// counts, axes, then rows of the first axis per value of the second (and
/// blocks per value of the third), values in µS.
pub fn table_file_text(table: &ConductanceTable, title: &str) -> String {
    let mut out = format!("* {title}: conductance in uS (written by ribbonmap)\n");
    let axes: Vec<Vec<f64>> = if table.arity() == 1 {
        vec![table.axes[0].clone(), vec![-1.0, 1.0]]
    } else {
        table.axes.clone()
    };
    for a in &axes {
        let _ = writeln!(out, "{}", a.len());
    }
    for a in &axes {
        let line: Vec<String> = a.iter().map(|v| format!("{v:e}")).collect();
        let _ = writeln!(out, "{}", line.join(" "));
    }
    let nz = if axes.len() == 3 { axes[2].len() } else { 1 };
    for z in 0..nz {
        for y in 0..axes[1].len() {
            let line: Vec<String> = (0..axes[0].len())
                .map(|x| {
                    let g = match table.arity() {
                        1 => table.values[x],
                        2 => table.values[table.flat_index(&[x, y])],
                        _ => table.values[table.flat_index(&[x, y, z])],
                    };
                    format!("{:e}", g * 1e6)
                })
                .collect();
            let _ = writeln!(out, "{}", line.join(" "));
        }
    }
    out
}

/// Writes the deck of `netlist` with `stimulus`; `deck_stem` prefixes the
/// table file names. `extra` lines (such as `.measure` cards) go before
/// `.end`.
pub fn write_deck(
    netlist: &MappedNetlist,
    library: &Library,
    models: &DeckModels,
    stimulus: &Stimulus,
    deck_stem: &str,
    extra: &[String],
) -> Result<Deck, String> {
    if !netlist.storage.is_empty() {
        return Err(format!(
            "'{}' has {} storage elements: SPICE decks are written for combinational netlists only",
            netlist.name,
            netlist.storage.len()
        ));
    }
    let width = netlist.inputs.len();
    let check_width = |bits: &[bool]| {
        if bits.len() == width {
            Ok(())
        } else {
            Err(format!(
                "the pattern has {} bits but '{}' has {width} primary inputs",
                bits.len(),
                netlist.name
            ))
        }
    };
    match stimulus {
        Stimulus::Pattern(bits) => check_width(bits)?,
        Stimulus::Step { from, to, .. } => {
            check_width(from)?;
            check_width(to)?;
        }
    }
    let vdd = models.supply_v;
    let level = |b: bool| {
        if b {
            models.logic_high_v
        } else {
            models.logic_low_v
        }
    };
    let mut text = String::new();
    let _ = writeln!(
        text,
        "* ribbonmap SPICE deck: '{}' on library '{}' ({} cell{}); ribbon conductances from lookup tables beside this deck",
        netlist.name,
        library.name,
        netlist.instances.len(),
        if netlist.instances.len() == 1 { "" } else { "s" }
    );
    let _ = writeln!(text, ".options reltol=1e-6 abstol=1e-16 vntol=1e-9");
    let _ = writeln!(text, "vsupply vdd 0 DC {vdd}");
    for (i, port) in netlist.inputs.iter().enumerate() {
        let n = node(port.net);
        let _ = writeln!(text, "* input {} = {n}", port.name);
        match stimulus {
            Stimulus::Pattern(bits) => {
                let _ = writeln!(text, "vin{i} {n} 0 DC {}", level(bits[i]));
            }
            Stimulus::Step {
                from,
                to,
                step_ps,
                ramp_ps,
                stop_ps,
            } => {
                let (a, b) = (level(from[i]), level(to[i]));
                let _ = writeln!(
                    text,
                    "vin{i} {n} 0 PWL(0 {a} {step_ps}p {a} {}p {b} {stop_ps}p {b})",
                    step_ps + ramp_ps
                );
            }
        }
    }
    for (id, net) in netlist.nets.iter().enumerate() {
        if let Driver::Constant(value) = net.driver {
            let _ = writeln!(
                text,
                "vtie{id} {} 0 DC {}",
                node(id as u32),
                if value { vdd } else { 0.0 }
            );
        }
    }
    let mut tables = Vec::new();
    let mut models_written = vec![false; library.cells.len()];
    for inst in &netlist.instances {
        let cell = &library.cells[inst.cell as usize];
        let Some(model) = models.cells[inst.cell as usize].as_ref() else {
            return Err(format!(
                "cell '{}' has no electrical block: characterise its kit first",
                cell.name
            ));
        };
        if model.pull_up.arity() > 3 {
            return Err(format!(
                "cell '{}' has {} inputs: the simulator's table models take at most three",
                cell.name,
                model.pull_up.arity()
            ));
        }
        let out = node(inst.output);
        let controls: Vec<String> = if inst.inputs.len() == 1 {
            vec![node(inst.inputs[0]), "0".into()]
        } else {
            inst.inputs.iter().map(|&n| node(n)).collect()
        };
        let tag = format!(
            "x{}",
            inst.name.replace(|c: char| !c.is_ascii_alphanumeric(), "_")
        );
        let _ = writeln!(
            text,
            "* {} ({}): {} -> {}",
            inst.name,
            cell.name,
            inst.inputs
                .iter()
                .map(|&n| netlist.nets[n as usize].name.as_str())
                .collect::<Vec<_>>()
                .join(", "),
            netlist.nets[inst.output as usize].name
        );
        for (role, across) in [("up", format!("V(vdd,{out})")), ("dn", format!("V({out})"))] {
            let g = format!("{tag}_g{role}");
            let _ = writeln!(
                text,
                "a{tag}_{role} {} %id(0 {g}) tab_{}_{role}",
                controls.join(" "),
                cell.name
            );
            let _ = writeln!(text, "r{tag}_{role} {g} 0 1");
            let (from, to) = if role == "up" {
                ("vdd", out.as_str())
            } else {
                (out.as_str(), "0")
            };
            let _ = writeln!(
                text,
                "b{tag}_{role} {from} {to} I = 1e-6 * V({g}) * {across}"
            );
        }
        let _ = writeln!(
            text,
            "c{tag}_out {out} 0 {:e}",
            model.output_capacitance_af * 1e-18
        );
        for (k, &input) in inst.inputs.iter().enumerate() {
            let _ = writeln!(
                text,
                "c{tag}_in{k} {} 0 {:e}",
                node(input),
                model.gate_capacitance_af * 1e-18
            );
        }
        if !models_written[inst.cell as usize] {
            models_written[inst.cell as usize] = true;
            for (role, table) in [("up", &model.pull_up), ("dn", &model.pull_down)] {
                let file = format!("{deck_stem}_{}_{role}.table", cell.name);
                tables.push((
                    file.clone(),
                    table_file_text(table, &format!("{} {role}", cell.name)),
                ));
                let kind = if table.arity() == 3 {
                    "table3d"
                } else {
                    "table2d"
                };
                let _ = writeln!(
                    text,
                    ".model tab_{}_{role} {kind} (offset=0.0 gain=1 order=2 file=\"{file}\")",
                    cell.name
                );
            }
        }
    }
    let po_load = library.primary_output_load * models.unit_load_af;
    for (i, port) in netlist.outputs.iter().enumerate() {
        let _ = writeln!(text, "* output {} = {}", port.name, node(port.net));
        if po_load > 0.0 {
            let _ = writeln!(text, "cpo{i} {} 0 {:e}", node(port.net), po_load * 1e-18);
        }
    }
    match stimulus {
        Stimulus::Pattern(_) => {
            let _ = writeln!(text, ".op");
        }
        Stimulus::Step {
            step_ps, stop_ps, ..
        } => {
            let _ = writeln!(text, ".tran 0.01p {stop_ps}p");
            for (i, port) in netlist.outputs.iter().enumerate() {
                let _ = writeln!(
                    text,
                    "* output {} crosses Vdd/2 after the step at {step_ps} ps:",
                    port.name
                );
                let _ = writeln!(
                    text,
                    ".measure tran cross{i} when v({})={} cross=1 from={step_ps}p",
                    node(port.net),
                    vdd / 2.0
                );
            }
        }
    }
    for line in extra {
        let _ = writeln!(text, "{line}");
    }
    let _ = writeln!(text, ".end");
    Ok(Deck { text, tables })
}
