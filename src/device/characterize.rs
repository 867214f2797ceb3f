//! Characterisation: from a cell's two conductance tables to its function,
//! levels, thresholds, margins, delay, energy and static power.
//!
//! First-order relations, each named where it is used: the static output is
//! the divider `V = Vdd·Gu/(Gu+Gd)` and the supply current
//! `I = Vdd·Gu·Gd/(Gu+Gd)`; the function is read at the corners of the input
//! cube (output 1 where V > Vdd/2); VOH is the lowest 1-output and VOL the
//! highest 0-output; the delay of a step is the RC charge of the output node
//! through both ribbons, `τ = C/(Gu+Gd)` with the final state's
//! conductances and `t50 = τ·ln 2`; the energy of one output toggle is
//! `½·C·Vdd²`. Units: attofarads over microsiemens are picoseconds,
//! attofarads times volts squared are attojoules.
//!
//! The library's delay model is not that step delay: a cell in a circuit is
//! driven by a neighbour that rises or falls over picoseconds, not by a
//! step. [`characterize`] therefore times every arc of every cell by
//! integrating its output node with the input driven by the steady-state
//! edge of a fanout-of-four chain of the kit's inverter
//! ([`super::switching`]), at several loads, and fits
//! `intrinsic + per_load · load` to the slowest arc (least squares). The
//! step figures stay available as `step_intrinsic_ps` / `step_per_load_ps`.

use super::kit::{DeviceKit, KitCell, TableRef};
use super::switching::{
    fit_delay, reference_edges, DelayFit, ReferenceEdges, Stage, REFERENCE_FANOUT,
};
use super::table::{read_table, ConductanceTable};
use super::transfer::{divider, sweep, TransferCurve};
use crate::diag::SourceError;
use std::f64::consts::LN_2;

/// Everything characterisation derives for one cell.
#[derive(Clone, Debug)]
pub struct CellCharacter {
    /// The kit's entry.
    pub kit_cell: KitCell,
    /// Pull-up table (conducts where the output is 1).
    pub pull_up: ConductanceTable,
    /// Pull-down table (conducts where the output is 0).
    pub pull_down: ConductanceTable,
    /// SHA-256 of the pull-up table file, hex.
    pub pull_up_sha256: String,
    /// SHA-256 of the pull-down table file, hex.
    pub pull_down_sha256: String,
    /// Truth table read at the corners (bit r = output on row r).
    pub truth: u64,
    /// Per input row: output voltage, conductances and supply current.
    pub rows: Vec<RowPoint>,
    /// Lowest output voltage on rows with output 1, volts.
    pub voh: f64,
    /// Highest output voltage on rows with output 0, volts.
    pub vol: f64,
    /// Worst (lowest) VIL over the transfer curves, volts.
    pub vil: f64,
    /// Worst (highest) VIH over the transfer curves, volts.
    pub vih: f64,
    /// Mean switching threshold over the transfer curves, volts.
    pub vm: f64,
    /// Low noise margin VIL − VOL, volts.
    pub nml: f64,
    /// High noise margin VOH − VIH, volts.
    pub nmh: f64,
    /// Whether every transfer curve reaches gain 1.
    pub restoring: bool,
    /// Smallest pull-up conductance on its conducting rows over its largest
    /// on its blocking rows.
    pub pull_up_on_off: f64,
    /// The same for the pull-down ribbon.
    pub pull_down_on_off: f64,
    /// Every transfer curve (per input, per sensitising assignment).
    pub curves: Vec<TransferCurve>,
    /// Smallest Gu + Gd over the rows, siemens (sets the slowest transition).
    pub slowest_conductance_s: f64,
    /// Step-input delay without load, picoseconds: `ln 2 · C_own / min(Gu+Gd)`.
    pub step_intrinsic_ps: f64,
    /// Step-input delay per unit load (one kit gate capacitance),
    /// picoseconds: `ln 2 · C_gate / min(Gu+Gd)`.
    pub step_per_load_ps: f64,
    /// The library's delay without load, picoseconds: the fit to the
    /// slowest arc driven by the reference edges when the kit has an
    /// inverter (see [`characterize`]), else the step figure.
    pub intrinsic_ps: f64,
    /// The library's delay per unit load, picoseconds (as `intrinsic_ps`).
    pub per_load_ps: f64,
    /// The fit behind `intrinsic_ps` and `per_load_ps` (`None` when the kit
    /// has no inverter and the step figures are used).
    pub delay_fit: Option<DelayFit>,
    /// Energy per output toggle of the own capacitance, attojoules.
    pub switch_energy_aj: f64,
    /// Energy per output toggle per unit load, attojoules.
    pub switch_energy_per_load_aj: f64,
    /// Input load in units of the kit's gate capacitance.
    pub input_load: f64,
    /// Logic-low input voltage the corners were read at, volts.
    pub logic_low_v: f64,
    /// Logic-high input voltage the corners were read at, volts.
    pub logic_high_v: f64,
}

/// The static point of one input row.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct RowPoint {
    /// Output voltage, volts.
    pub output_v: f64,
    /// Pull-up conductance, siemens.
    pub pull_up_s: f64,
    /// Pull-down conductance, siemens.
    pub pull_down_s: f64,
    /// Static supply current, amperes.
    pub current_a: f64,
}

impl RowPoint {
    /// Static power `Vdd · I` in watts.
    pub fn power_w(&self, supply_v: f64) -> f64 {
        supply_v * self.current_a
    }
}

/// A whole kit characterised.
#[derive(Clone, Debug)]
pub struct Characterization {
    /// The kit.
    pub kit: DeviceKit,
    /// SHA-256 of the kit file, hex.
    pub kit_sha256: String,
    /// One entry per kit cell, in kit order.
    pub cells: Vec<CellCharacter>,
    /// The input edges the delays were characterised with (`None` when the
    /// kit has no inverter: the delays are then the step figures).
    pub reference: Option<ReferenceEdges>,
}

/// Hex SHA-256 of a file's bytes.
pub fn file_sha256(path: &std::path::Path, shown: &str) -> Result<String, SourceError> {
    use sha2::{Digest, Sha256};
    let bytes = std::fs::read(path)
        .map_err(|e| SourceError::new(shown, 0, 0, format!("cannot read: {e}")))?;
    Ok(Sha256::digest(&bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect())
}

/// Reads every table of the kit and characterises every cell.
pub fn characterize(kit: DeviceKit) -> Result<Characterization, SourceError> {
    let kit_sha256 = file_sha256(std::path::Path::new(&kit.file), &kit.file)?;
    let mut cells = Vec::with_capacity(kit.cells.len());
    for cell in &kit.cells {
        let up = load_cell_table(&kit, cell, &cell.pull_up)?;
        let down = load_cell_table(&kit, cell, &cell.pull_down)?;
        cells.push(characterize_cell(&kit, cell, up, down)?);
    }
    let reference = reference_inverter(&kit, &cells);
    if let Some(edges) = &reference {
        for c in &mut cells {
            let fit = fit_delay(
                |load| stage(&kit, c, load),
                c.truth,
                c.kit_cell.inputs.len(),
                edges,
            );
            c.intrinsic_ps = fit.intrinsic_ps;
            c.per_load_ps = fit.per_load_ps;
            c.delay_fit = Some(fit);
        }
    }
    Ok(Characterization {
        kit,
        kit_sha256,
        cells,
        reference,
    })
}

/// Cell `c` driving `load` unit loads, as a stage to integrate.
fn stage<'a>(kit: &DeviceKit, c: &'a CellCharacter, load: f64) -> Stage<'a> {
    Stage {
        pull_up: &c.pull_up,
        pull_down: &c.pull_down,
        supply_v: kit.supply_v,
        logic_low_v: kit.logic_low_v,
        logic_high_v: kit.logic_high_v,
        capacitance_af: c.kit_cell.output_capacitance_af + load * kit.gate_capacitance_af,
    }
}

/// The reference edges from the kit's first inverter (one input, output
/// `!a`) driving [`REFERENCE_FANOUT`] unit loads; `None` without one (or
/// when its stage has no capacitance or conductance to time).
fn reference_inverter(kit: &DeviceKit, cells: &[CellCharacter]) -> Option<ReferenceEdges> {
    let inverter = cells
        .iter()
        .find(|c| c.kit_cell.inputs.len() == 1 && c.truth == 0b01)?;
    reference_edges(
        &stage(kit, inverter, REFERENCE_FANOUT),
        inverter.kit_cell.output_capacitance_af,
        &inverter.kit_cell.name,
        REFERENCE_FANOUT,
    )
}

/// A table file shown as the user would open it (kit folder + written path).
fn shown(table: &TableRef) -> String {
    table.path.display().to_string()
}

fn load_cell_table(
    kit: &DeviceKit,
    cell: &KitCell,
    table: &TableRef,
) -> Result<(ConductanceTable, String), SourceError> {
    let name = shown(table);
    if !table.path.is_file() {
        return Err(SourceError::new(
            &kit.file,
            table.line,
            table.column,
            format!("cell '{}': table file '{}' not found", cell.name, name),
        ));
    }
    let t = read_table(&table.path, &name)?;
    if t.inputs != cell.inputs {
        return Err(SourceError::new(
            &name,
            1,
            1,
            format!(
                "the table's inputs ({}) differ from cell '{}''s inputs ({}) in the kit",
                t.inputs.join(", "),
                cell.name,
                cell.inputs.join(", ")
            ),
        ));
    }
    for (k, input) in t.inputs.iter().enumerate() {
        let (lo, hi) = t.span(k);
        for (what, v) in [
            ("logic-low", kit.logic_low_v),
            ("logic-high", kit.logic_high_v),
        ] {
            if v < lo - 1e-12 || v > hi + 1e-12 {
                return Err(SourceError::new(
                    &name,
                    1,
                    1,
                    format!(
                        "missing corner: input '{input}' spans {lo} to {hi} V, but the {what} voltage {v} V of the logic cube lies outside the grid"
                    ),
                ));
            }
        }
    }
    let sha = file_sha256(&table.path, &name)?;
    Ok((t, sha))
}

/// Characterises one cell from its tables (already checked against the
/// cell's inputs and the kit's logic voltages).
pub fn characterize_cell(
    kit: &DeviceKit,
    cell: &KitCell,
    (up, up_sha): (ConductanceTable, String),
    (down, down_sha): (ConductanceTable, String),
) -> Result<CellCharacter, SourceError> {
    let n = cell.inputs.len();
    let vdd = kit.supply_v;
    let fail = |message: String| SourceError::new(&kit.file, cell.line, 1, message);
    let row_volts = |r: usize| -> Vec<f64> {
        (0..n)
            .map(|k| {
                if r >> k & 1 == 1 {
                    kit.logic_high_v
                } else {
                    kit.logic_low_v
                }
            })
            .collect()
    };
    let rows: Vec<RowPoint> = (0..1usize << n)
        .map(|r| {
            let v = row_volts(r);
            let p = divider(vdd, up.conductance(&v), down.conductance(&v));
            RowPoint {
                output_v: p.output_v,
                pull_up_s: p.pull_up_s,
                pull_down_s: p.pull_down_s,
                current_a: p.current_a,
            }
        })
        .collect();
    let truth = rows
        .iter()
        .enumerate()
        .filter(|(_, p)| p.output_v > vdd / 2.0)
        .fold(0u64, |t, (r, _)| t | 1 << r);
    let row_name = |r: usize| -> String {
        cell.inputs
            .iter()
            .enumerate()
            .map(|(k, name)| format!("{name}={}", r >> k & 1))
            .collect::<Vec<_>>()
            .join(" ")
    };

    // Both ribbons conducting: each ribbon's conducting rows are those at or
    // above the geometric middle of its corner conductances.
    let middle = |pick: fn(&RowPoint) -> f64| {
        let lo = rows.iter().map(pick).fold(f64::INFINITY, f64::min);
        let hi = rows.iter().map(pick).fold(0.0, f64::max);
        (lo * hi).sqrt()
    };
    let up_mid = middle(|p| p.pull_up_s);
    let down_mid = middle(|p| p.pull_down_s);
    for (r, p) in rows.iter().enumerate() {
        if p.pull_up_s >= up_mid && p.pull_down_s >= down_mid {
            return Err(fail(format!(
                "cell '{}': pull-up and pull-down both conduct on row {} (Gu {:.4} µS, Gd {:.4} µS, static current {:.4} nA)",
                cell.name,
                row_name(r),
                p.pull_up_s * 1e6,
                p.pull_down_s * 1e6,
                p.current_a * 1e9
            )));
        }
    }

    let mask = if n == 6 {
        u64::MAX
    } else {
        (1u64 << (1 << n)) - 1
    };
    if truth == 0 || truth == mask {
        return Err(fail(format!(
            "cell '{}': the output is {} on every row, a constant; a cell must compute a function of its inputs",
            cell.name,
            truth & 1
        )));
    }
    if let Some((text, declared)) = &cell.declared {
        if *declared != truth {
            let differing: Vec<String> = (0..1usize << n)
                .filter(|&r| (declared ^ truth) >> r & 1 == 1)
                .map(|r| {
                    format!(
                        "{} gives {:.4} V (bit {}, declared {})",
                        row_name(r),
                        rows[r].output_v,
                        truth >> r & 1,
                        declared >> r & 1
                    )
                })
                .collect();
            return Err(fail(format!(
                "cell '{}': the tables compute a function other than the declared \"{text}\" on rows: {}",
                cell.name,
                differing.join("; ")
            )));
        }
    }
    for k in 0..n {
        let matters = (0..1usize << n).any(|r| (truth >> r & 1) != (truth >> (r ^ 1 << k) & 1));
        if !matters {
            return Err(fail(format!(
                "cell '{}': the derived function ignores input '{}' (every input must matter)",
                cell.name, cell.inputs[k]
            )));
        }
    }

    let ones = || (0..rows.len()).filter(|&r| truth >> r & 1 == 1);
    let zeros = || (0..rows.len()).filter(|&r| truth >> r & 1 == 0);
    let voh = ones()
        .map(|r| rows[r].output_v)
        .fold(f64::INFINITY, f64::min);
    let vol = zeros().map(|r| rows[r].output_v).fold(0.0, f64::max);
    let min_over = |it: &mut dyn Iterator<Item = usize>, pick: fn(&RowPoint) -> f64| {
        it.map(|r| pick(&rows[r])).fold(f64::INFINITY, f64::min)
    };
    let max_over = |it: &mut dyn Iterator<Item = usize>, pick: fn(&RowPoint) -> f64| {
        it.map(|r| pick(&rows[r])).fold(0.0, f64::max)
    };
    let pull_up_on_off =
        min_over(&mut ones(), |p| p.pull_up_s) / max_over(&mut zeros(), |p| p.pull_up_s);
    let pull_down_on_off =
        min_over(&mut zeros(), |p| p.pull_down_s) / max_over(&mut ones(), |p| p.pull_down_s);

    let mut curves = Vec::new();
    for k in 0..n {
        for r in 0..1usize << n {
            if r >> k & 1 == 1 {
                continue;
            }
            if (truth >> r & 1) != (truth >> (r | 1 << k) & 1) {
                curves.push(sweep(
                    &up,
                    &down,
                    vdd,
                    k,
                    r,
                    kit.logic_low_v,
                    kit.logic_high_v,
                ));
            }
        }
    }
    let vil = curves.iter().map(|c| c.vil).fold(f64::INFINITY, f64::min);
    let vih = curves
        .iter()
        .map(|c| c.vih)
        .fold(f64::NEG_INFINITY, f64::max);
    let vm = curves.iter().map(|c| c.vm).sum::<f64>() / curves.len() as f64;
    let restoring = curves.iter().all(|c| c.restoring);
    let nml = vil - vol;
    let nmh = voh - vih;
    let between: Vec<String> = (0..rows.len())
        .filter(|&r| rows[r].output_v > vil && rows[r].output_v < vih)
        .map(|r| format!("{} gives {:.4} V", row_name(r), rows[r].output_v))
        .collect();
    if !between.is_empty() {
        return Err(fail(format!(
            "cell '{}': output between the logic thresholds VIL {:.4} V and VIH {:.4} V on rows: {}",
            cell.name,
            vil,
            vih,
            between.join("; ")
        )));
    }

    let slowest_conductance_s = rows
        .iter()
        .map(|p| p.pull_up_s + p.pull_down_s)
        .fold(f64::INFINITY, f64::min);
    let slowest_us = slowest_conductance_s * 1e6;
    // aF / µS = ps.
    let intrinsic_ps = LN_2 * cell.output_capacitance_af / slowest_us;
    let per_load_ps = LN_2 * kit.gate_capacitance_af / slowest_us;
    // ½ C V²: aF · V² = aJ.
    let switch_energy_aj = 0.5 * cell.output_capacitance_af * vdd * vdd;
    let switch_energy_per_load_aj = 0.5 * kit.gate_capacitance_af * vdd * vdd;
    Ok(CellCharacter {
        kit_cell: cell.clone(),
        pull_up: up,
        pull_down: down,
        pull_up_sha256: up_sha,
        pull_down_sha256: down_sha,
        truth,
        rows,
        voh,
        vol,
        vil,
        vih,
        vm,
        nml,
        nmh,
        restoring,
        pull_up_on_off,
        pull_down_on_off,
        curves,
        slowest_conductance_s,
        step_intrinsic_ps: intrinsic_ps,
        step_per_load_ps: per_load_ps,
        intrinsic_ps,
        per_load_ps,
        delay_fit: None,
        switch_energy_aj,
        switch_energy_per_load_aj,
        input_load: cell.gate_capacitance_af / kit.gate_capacitance_af,
        logic_low_v: kit.logic_low_v,
        logic_high_v: kit.logic_high_v,
    })
}
