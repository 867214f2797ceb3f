//! Margin-aware mapping: a mapped circuit whose every net keeps a required
//! noise margin.
//!
//! A Boolean mapper picks the cheapest cells; on a characterised library a
//! cheap non-restoring cell can pass on degraded levels until a net reads as
//! the wrong value (module [`super::levels`]). [`map_with_margin`] asks for
//! a margin of at least `min_margin_v` on every net, in three steps:
//!
//! 1. cells whose own noise margins (NML, NMH from the characterisation)
//!    are below the bound are left out of the library the mapper sees;
//! 2. after covering, the level analysis runs; a net whose margin falls
//!    below the bound gets a **restoring stage** (the library's buffer or
//!    inverter pair with the largest own margin) where the degradation
//!    starts: on the net's worst pattern, the path back through the weakest
//!    inputs is followed to the first net below the bound, and the degraded
//!    inputs of its cell are restored, weakest first, as far as needed to
//!    lift it over the bound (checked on that pattern before inserting);
//!    when that cannot lift it and the level had already become too poor
//!    for a restoring stage to read with the margin earlier on the path, the
//!    last net the stage still reads well is restored (later rounds lift
//!    what lies beyond); otherwise the first net itself is restored if the
//!    restoring stage reads it with margin to spare. The analysis repeats until every net holds or no stage helps;
//! 3. a net that no restoring stage saves condemns the cell driving it: the
//!    cell is left out as well and the circuit is mapped again.
//!
//! It ends when every net holds, or when nothing more helps (no cell left
//! to leave out, or the library cannot map the circuit without it); the
//! outcome then names the failing nets and the caller must say so.
//!
//! Restoring stages compute the identity, so the mapper's witness extends
//! to them: a buffer's output carries its input's literal, and the middle
//! net of an inverter pair is a net inside a multi-cell match.

use super::levels::{
    analyze_levels, evaluate, evaluate_logic, net_thresholds, LevelModel, LevelOptions,
    LevelReport, NetLevel, Thresholds,
};
use crate::library::electrical::{Electrical, ElectricalData};
use crate::library::Library;
use crate::mapper::witness::CoverWitness;
use crate::mapper::{map_detailed, MapError, MapOptions, MapOutcome};
use crate::netlist::{analyze_timing, Driver, Instance, MappedNetlist, NetId};
use crate::network::Network;
use serde::Serialize;
use std::collections::HashSet;

/// Most rounds of analysis and restoring per cover (bounds the run time;
/// each round restores every net where degradation starts at once).
pub const MAX_RESTORE_ROUNDS: usize = 64;

/// A cell's own noise margin: the smaller of its NML and NMH, volts.
pub fn own_margin_v(e: &Electrical) -> f64 {
    e.nml_v.min(e.nmh_v)
}

/// The restoring stage of a library: a buffer, or two inverters in a row.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct RestoringStage {
    /// `buf` or `inv+inv` with the library's cell names.
    pub name: String,
    /// Library cells of the stage, input side first.
    #[serde(skip)]
    pub cells: Vec<u32>,
    /// Input low threshold of the stage, volts.
    pub vil_v: f64,
    /// Input high threshold, volts.
    pub vih_v: f64,
    /// The stage's own noise margin (its first cell's), volts.
    pub own_margin_v: f64,
    /// Area of one stage, in the library's area unit.
    pub area: f64,
}

impl RestoringStage {
    fn thresholds(&self) -> Thresholds {
        Thresholds {
            vil_v: self.vil_v,
            vih_v: self.vih_v,
            // Not used for margins; a single receiver's threshold.
            vm_high_v: (self.vil_v + self.vih_v) / 2.0,
            vm_low_v: (self.vil_v + self.vih_v) / 2.0,
        }
    }

    /// The stage's output voltage for input voltage `v`, volts.
    fn output(&self, model: &LevelModel, v: f64) -> f64 {
        self.cells
            .iter()
            .fold(v, |v, &c| match &model.cells[c as usize] {
                Some(cell) => model.cell_output(cell, &[v]).0,
                None => v,
            })
    }
}

/// The stage that restores best: among the characterised buffers (one
/// stage) and inverters (used in pairs), the one with the largest own
/// noise margin, then the least area. `None` when the library has neither.
pub fn choose_restorer(
    lib: &Library,
    model: &LevelModel,
    data: &ElectricalData,
    left_out: &[LeftOut],
) -> Option<RestoringStage> {
    let mut best: Option<RestoringStage> = None;
    for (i, cell) in lib.cells.iter().enumerate() {
        if cell.arity() != 1 || left_out.iter().any(|l| l.cell == cell.name) {
            continue;
        }
        let (Some(Some(levels)), Some(e)) = (model.cells.get(i), data.cell(&cell.name)) else {
            continue;
        };
        let (name, cells, area) = match cell.truth & 3 {
            0b10 => (cell.name.clone(), vec![i as u32], cell.area),
            0b01 => (
                format!("{0}+{0}", cell.name),
                vec![i as u32, i as u32],
                2.0 * cell.area,
            ),
            _ => continue,
        };
        let stage = RestoringStage {
            name,
            cells,
            vil_v: levels.vil_v,
            vih_v: levels.vih_v,
            own_margin_v: own_margin_v(e),
            area,
        };
        let better = best.as_ref().is_none_or(|b| {
            stage.own_margin_v > b.own_margin_v
                || (stage.own_margin_v == b.own_margin_v && stage.area < b.area)
        });
        if better {
            best = Some(stage);
        }
    }
    best
}

/// A cell the mapper was not allowed to use, and why.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct LeftOut {
    /// Cell name.
    pub cell: String,
    /// `own_margin` (its own noise margin is below the bound) or
    /// `unrestorable` (a net it drove fell below the bound and no
    /// restoring stage lifted it).
    pub reason: String,
    /// The cell's own noise margin, millivolts.
    pub own_margin_mv: f64,
}

/// The result of [`map_with_margin`].
#[derive(Clone, Debug)]
pub struct MarginOutcome {
    /// The mapping (cells index the full library) with its restoring
    /// stages; its witness covers them.
    pub outcome: MapOutcome,
    /// The required margin, volts.
    pub min_margin_v: f64,
    /// Cells left out of the match table.
    pub left_out: Vec<LeftOut>,
    /// The restoring stage used, if the library has one.
    pub restorer: Option<RestoringStage>,
    /// Nets of the final cover that got a restoring stage.
    pub restored_nets: Vec<String>,
    /// Cells added by restoring.
    pub restoring_cells: usize,
    /// Their area, in the library's area unit.
    pub restoring_area: f64,
    /// Critical delay of the final cover before and after restoring, in the
    /// library's delay unit.
    pub delay_before: f64,
    /// See `delay_before`.
    pub delay_after: f64,
    /// Mean static power from the voltages before and after restoring,
    /// nanowatts.
    pub static_before_nw: f64,
    /// See `static_before_nw`.
    pub static_after_nw: f64,
    /// Worst margin of the final cover before restoring, volts.
    pub worst_before_v: Option<f64>,
    /// Covers mapped (1 + the times cells were left out afterwards).
    pub covers: usize,
    /// Rounds of analysis on the final cover.
    pub rounds: usize,
    /// The level analysis of the result.
    pub levels: LevelReport,
    /// Whether every net keeps the margin.
    pub holds: bool,
    /// Nets below the bound (empty when it holds).
    pub failing_nets: Vec<String>,
}

impl MarginOutcome {
    /// The outcome as the JSON object `margin` of the map report and of
    /// study result lines (docs/device-data.md, "Margin-aware mapping").
    pub fn summary_json(&self, lib: &Library) -> serde_json::Value {
        serde_json::json!({
            "min_margin_mv": self.min_margin_v * 1e3,
            "holds": self.holds,
            "left_out": self.left_out,
            "restorer": self.restorer,
            "restored_nets": self.restored_nets,
            "restoring_cells": self.restoring_cells,
            "restoring_area": self.restoring_area,
            "delay_before": self.delay_before,
            "delay_after": self.delay_after,
            "static_before_nw": self.static_before_nw,
            "static_after_nw": self.static_after_nw,
            "worst_margin_before_mv": self.worst_before_v.map(|v| v * 1e3),
            "worst_margin_mv": self.levels.worst_margin_v().map(|v| v * 1e3),
            "covers": self.covers,
            "rounds": self.rounds,
            "failing_nets": self.failing_nets,
            "units": {"area": lib.units.area, "delay": lib.units.delay},
        })
    }
}

/// The cells of `lib` whose own noise margin is below `min_margin_v`.
pub fn weak_cells(lib: &Library, data: &ElectricalData, min_margin_v: f64) -> Vec<LeftOut> {
    lib.cells
        .iter()
        .filter_map(|c| {
            let e = data.cell(&c.name)?;
            let m = own_margin_v(e);
            (m < min_margin_v).then(|| LeftOut {
                cell: c.name.clone(),
                reason: "own_margin".into(),
                own_margin_mv: m * 1e3,
            })
        })
        .collect()
}

/// `lib` without the cells named in `left_out`, and per kept cell its
/// index in `lib`.
pub fn library_without(lib: &Library, left_out: &[LeftOut]) -> (Library, Vec<u32>) {
    let mut sub = lib.clone();
    let mut back = Vec::new();
    sub.cells.clear();
    for (i, c) in lib.cells.iter().enumerate() {
        if !left_out.iter().any(|l| l.cell == c.name) {
            sub.cells.push(c.clone());
            back.push(i as u32);
        }
    }
    (sub, back)
}

/// Why margin-aware mapping could not start.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum MarginError {
    /// The mapper refused (options, or the kept cells cannot implement the
    /// circuit).
    #[error("{0}")]
    Map(String),
    /// The level analysis refused the netlist.
    #[error("{0}")]
    Levels(String),
}

/// Maps `net` onto `lib` so that every net keeps `min_margin_v` (see the
/// module comment). `model` and `data` are the library's characterised
/// levels and electrical blocks.
pub fn map_with_margin(
    net: &Network,
    lib: &Library,
    model: &LevelModel,
    data: &ElectricalData,
    map_options: &MapOptions,
    min_margin_v: f64,
    level_options: &LevelOptions,
) -> Result<MarginOutcome, MarginError> {
    let mut left_out = weak_cells(lib, data, min_margin_v);
    let mut best: Option<MarginOutcome> = None;
    let mut covers = 0;
    loop {
        covers += 1;
        let (sub, back) = library_without(lib, &left_out);
        let mapped = map_detailed(net, &sub, map_options);
        let mut outcome = match mapped {
            Ok(o) => o,
            // Leaving out one more cell made the circuit unmappable: the
            // previous cover is the best there is.
            Err(MapError::Unmappable(_)) if best.is_some() => break,
            Err(e) => {
                let names: Vec<&str> = left_out.iter().map(|l| l.cell.as_str()).collect();
                return Err(MarginError::Map(if names.is_empty() {
                    e.to_string()
                } else {
                    format!(
                        "{e} (cells left out for their noise margins: {})",
                        names.join(", ")
                    )
                }));
            }
        };
        for inst in &mut outcome.netlist.instances {
            inst.cell = back[inst.cell as usize];
        }
        let restorer = choose_restorer(lib, model, data, &left_out);
        let delay_before = analyze_timing(&outcome.netlist, lib).delay;
        let restored = restore_levels(
            &mut outcome.netlist,
            &mut outcome.witness,
            lib,
            model,
            restorer.as_ref(),
            min_margin_v,
            level_options,
        )?;
        let failing_nets: Vec<String> = restored
            .last
            .nets
            .iter()
            .filter(|n| n.worst_margin_v < min_margin_v)
            .map(|n| n.net.clone())
            .collect();
        let holds = failing_nets.is_empty();
        let restoring_cells = restored.nets.len() * restorer.as_ref().map_or(0, |r| r.cells.len());
        let result = MarginOutcome {
            delay_after: analyze_timing(&outcome.netlist, lib).delay,
            outcome,
            min_margin_v,
            left_out: left_out.clone(),
            restoring_area: restored.nets.len() as f64 * restorer.as_ref().map_or(0.0, |r| r.area),
            restorer,
            restored_nets: restored.nets,
            restoring_cells,
            delay_before,
            static_before_nw: restored.first.average_static_power_nw,
            static_after_nw: restored.last.average_static_power_nw,
            worst_before_v: restored.first.worst_margin_v(),
            covers,
            rounds: restored.rounds,
            levels: restored.last,
            holds,
            failing_nets,
        };
        best = Some(result);
        if holds {
            break;
        }
        let new: Vec<LeftOut> = restored
            .unrestorable
            .iter()
            .filter_map(|&cell| {
                let c = &lib.cells[cell as usize];
                let own = data.cell(&c.name).map_or(f64::NAN, own_margin_v);
                (!left_out.iter().any(|l| l.cell == c.name)).then(|| LeftOut {
                    cell: c.name.clone(),
                    reason: "unrestorable".into(),
                    own_margin_mv: own * 1e3,
                })
            })
            .collect();
        if new.is_empty() {
            break;
        }
        left_out.extend(new);
    }
    best.ok_or_else(|| MarginError::Map("no cover was made".into()))
}

/// What [`restore_levels`] did.
struct Restored {
    /// Names of the nets that got a restoring stage.
    nets: Vec<String>,
    /// Rounds of analysis.
    rounds: usize,
    /// The analysis before any stage was added.
    first: LevelReport,
    /// The analysis of the result.
    last: LevelReport,
    /// Cells driving a net that no stage lifted over the bound.
    unrestorable: Vec<u32>,
}

/// Adds restoring stages to `netlist` until every net keeps `min_margin_v`
/// or no stage helps (module comment, step 2).
fn restore_levels(
    netlist: &mut MappedNetlist,
    witness: &mut CoverWitness,
    lib: &Library,
    model: &LevelModel,
    restorer: Option<&RestoringStage>,
    min_margin_v: f64,
    options: &LevelOptions,
) -> Result<Restored, MarginError> {
    let mut touched: HashSet<NetId> = HashSet::new();
    let mut nets = Vec::new();
    let mut first = None;
    let mut rounds = 0;
    loop {
        rounds += 1;
        let report = analyze_levels(netlist, lib, model, options).map_err(MarginError::Levels)?;
        let first_report = first.get_or_insert_with(|| report.clone()).clone();
        let failing: Vec<&NetLevel> = report
            .nets
            .iter()
            .filter(|n| n.worst_margin_v < min_margin_v)
            .collect();
        let plan = match restorer {
            Some(stage) if !failing.is_empty() && rounds <= MAX_RESTORE_ROUNDS => {
                plan_round(netlist, lib, model, stage, &failing, min_margin_v, &touched)
            }
            _ => Plan::default(),
        };
        let unrestorable = if restorer.is_none() {
            // Without a restoring stage every failing net's driver is to blame.
            failing_drivers(netlist, &failing)
        } else {
            plan.unrestorable.clone()
        };
        if plan.restore.is_empty() {
            return Ok(Restored {
                nets,
                rounds,
                first: first_report,
                last: report,
                unrestorable,
            });
        }
        let stage = restorer.expect("a plan needs a restoring stage");
        for &n in &plan.restore {
            nets.push(netlist.nets[n as usize].name.clone());
        }
        let added = insert_stages(netlist, witness, stage, &plan.restore);
        touched.extend(plan.restore.iter().copied());
        touched.extend(added);
    }
}

/// The cells driving the failing nets.
fn failing_drivers(netlist: &MappedNetlist, failing: &[&NetLevel]) -> Vec<u32> {
    let mut cells: Vec<u32> = failing
        .iter()
        .filter_map(|f| {
            let id = netlist.nets.iter().position(|n| n.name == f.net)?;
            match netlist.nets[id].driver {
                Driver::Cell(i) => Some(netlist.instances[i as usize].cell),
                _ => None,
            }
        })
        .collect();
    cells.sort_unstable();
    cells.dedup();
    cells
}

/// One round's decisions: nets to restore, cells no stage saves.
#[derive(Default)]
struct Plan {
    restore: Vec<NetId>,
    unrestorable: Vec<u32>,
}

/// Decides, for each failing net on its worst pattern, where a restoring
/// stage lifts the first net below the bound on its degradation path.
fn plan_round(
    netlist: &MappedNetlist,
    lib: &Library,
    model: &LevelModel,
    stage: &RestoringStage,
    failing: &[&NetLevel],
    min_margin_v: f64,
    touched: &HashSet<NetId>,
) -> Plan {
    let thresholds = net_thresholds(netlist, model);
    let stage_thresholds = stage.thresholds();
    let ids: std::collections::HashMap<&str, NetId> = netlist
        .nets
        .iter()
        .enumerate()
        .map(|(i, n)| (n.name.as_str(), i as NetId))
        .collect();
    let mut volts = vec![0.0; netlist.nets.len()];
    let mut logic = vec![false; netlist.nets.len()];
    let mut plan = Plan::default();
    for f in failing {
        let Some(&fid) = ids.get(f.net.as_str()) else {
            continue;
        };
        let pattern: Vec<bool> = f.worst_pattern.chars().map(|c| c == '1').collect();
        evaluate(netlist, model, &pattern, &mut volts);
        evaluate_logic(netlist, lib, &pattern, &mut logic);
        let margin = |n: NetId, volts: &[f64]| {
            thresholds[n as usize].map_or(f64::INFINITY, |t| {
                t.margin(volts[n as usize], logic[n as usize]).0
            })
        };
        // The path back through the weakest inputs, primary input first.
        let mut path = vec![fid];
        let mut id = fid;
        while let Driver::Cell(i) = netlist.nets[id as usize].driver {
            let inst = &netlist.instances[i as usize];
            let Some(next) = inst
                .inputs
                .iter()
                .copied()
                .min_by(|&a, &b| margin(a, &volts).total_cmp(&margin(b, &volts)))
            else {
                break;
            };
            path.push(next);
            id = next;
        }
        path.reverse();
        let Some(k) = path.iter().position(|&n| margin(n, &volts) < min_margin_v) else {
            continue;
        };
        let low = path[k];
        let Driver::Cell(low_inst) = netlist.nets[low as usize].driver else {
            continue;
        };
        let low_inst = &netlist.instances[low_inst as usize];
        // Restore the degraded inputs of the first low net's cell, weakest
        // first, until that net holds.
        if k > 0 {
            let mut inputs: Vec<NetId> = low_inst
                .inputs
                .iter()
                .copied()
                .filter(|&n| {
                    matches!(netlist.nets[n as usize].driver, Driver::Cell(_))
                        && !touched.contains(&n)
                        && stage_thresholds
                            .margin(volts[n as usize], logic[n as usize])
                            .0
                            >= min_margin_v
                })
                .collect();
            inputs.sort_by(|&a, &b| margin(a, &volts).total_cmp(&margin(b, &volts)));
            inputs.dedup();
            let cell = model.cells[low_inst.cell as usize]
                .as_ref()
                .expect("analysed cells have levels");
            let mut chosen: Vec<NetId> = Vec::new();
            let mut lifted = false;
            for &n in &inputs {
                chosen.push(n);
                let v_in: Vec<f64> = low_inst
                    .inputs
                    .iter()
                    .map(|&m| {
                        if chosen.contains(&m) {
                            stage.output(model, volts[m as usize])
                        } else {
                            volts[m as usize]
                        }
                    })
                    .collect();
                let v = model.cell_output(cell, &v_in).0;
                if thresholds[low as usize]
                    .is_some_and(|t| t.margin(v, logic[low as usize]).0 >= min_margin_v)
                {
                    lifted = true;
                    break;
                }
            }
            if lifted {
                plan.restore.extend(chosen);
                continue;
            }
        }
        // Degradation started further back: restore the last net on the
        // path that a restoring stage still reads with the margin (later
        // rounds lift what lies beyond it).
        let unreadable = path.iter().position(|&n| {
            stage_thresholds
                .margin(volts[n as usize], logic[n as usize])
                .0
                < min_margin_v
        });
        if let Some(j) = unreadable.filter(|&j| j > 0 && j <= k) {
            let last = path[j - 1];
            if matches!(netlist.nets[last as usize].driver, Driver::Cell(_))
                && !touched.contains(&last)
            {
                plan.restore.push(last);
                continue;
            }
        }
        // Restore the low net itself: its readers become the stage.
        if !touched.contains(&low) {
            let read = stage_thresholds
                .margin(volts[low as usize], logic[low as usize])
                .0;
            let out = stage.output(model, volts[low as usize]);
            let drive = thresholds[low as usize]
                .map_or(f64::INFINITY, |t| t.margin(out, logic[low as usize]).0);
            if read >= min_margin_v && drive >= min_margin_v {
                plan.restore.push(low);
                continue;
            }
        }
        plan.unrestorable.push(low_inst.cell);
    }
    plan.restore.sort_unstable();
    plan.restore.dedup();
    plan.unrestorable.sort_unstable();
    plan.unrestorable.dedup();
    plan
}

/// Inserts `stage` after each net of `restore` (all its readers, primary
/// outputs included, move to the stage's output) and extends `witness`;
/// returns the new nets.
fn insert_stages(
    netlist: &mut MappedNetlist,
    witness: &mut CoverWitness,
    stage: &RestoringStage,
    restore: &[NetId],
) -> Vec<NetId> {
    let mut names: HashSet<String> = netlist.nets.iter().map(|n| n.name.clone()).collect();
    let mut inst_names: HashSet<String> =
        netlist.instances.iter().map(|i| i.name.clone()).collect();
    let fresh = |set: &mut HashSet<String>, base: String| {
        let mut name = base.clone();
        let mut k = 1;
        while set.contains(&name) {
            name = format!("{base}_{k}");
            k += 1;
        }
        set.insert(name.clone());
        name
    };
    // The stage's last net carries each literal of the net it restores (the
    // stage is the identity); inner nets of an inverter pair carry none.
    let mut copies: Vec<(NetId, NetId)> = Vec::new();
    // Per restored net: the stage's nets, input side first.
    let mut stage_nets: Vec<(NetId, Vec<NetId>)> = Vec::new();
    let mut added = Vec::new();
    for &n in restore {
        let base = netlist.nets[n as usize].name.clone();
        let mut chain = Vec::new();
        for k in 0..stage.cells.len() {
            let last = k + 1 == stage.cells.len();
            let name = fresh(
                &mut names,
                if last {
                    format!("{base}_rs")
                } else {
                    format!("{base}_rs{k}")
                },
            );
            // Drivers are set when the instances are placed below.
            let id = netlist.add_net(name, Driver::Constant(false));
            if last {
                copies.push((id, n));
            }
            chain.push(id);
            added.push(id);
        }
        stage_nets.push((n, chain));
    }
    let restored_to = |n: NetId| {
        stage_nets
            .iter()
            .find(|(r, _)| *r == n)
            .map(|(_, chain)| *chain.last().expect("a stage has a cell"))
    };
    let old = std::mem::take(&mut netlist.instances);
    for mut inst in old {
        for input in &mut inst.inputs {
            if let Some(r) = restored_to(*input) {
                *input = r;
            }
        }
        let out = inst.output;
        netlist.instances.push(inst);
        if let Some((_, chain)) = stage_nets.iter().find(|(r, _)| *r == out) {
            let mut from = out;
            for (k, &to) in chain.iter().enumerate() {
                let name = fresh(
                    &mut inst_names,
                    format!("rs_{}", netlist.nets[out as usize].name),
                );
                netlist.instances.push(Instance {
                    name,
                    cell: stage.cells[k],
                    inputs: vec![from],
                    output: to,
                });
                from = to;
            }
        }
    }
    for port in &mut netlist.outputs {
        if let Some(r) = restored_to(port.net) {
            port.net = r;
        }
    }
    for (i, inst) in netlist.instances.iter().enumerate() {
        netlist.nets[inst.output as usize].driver = Driver::Cell(i as u32);
    }
    witness.extend_with_copies(netlist.nets.len(), &copies);
    added
}
