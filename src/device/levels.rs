//! Static level analysis: does a mapped circuit keep its logic levels?
//!
//! A Boolean check of a mapped netlist says nothing about voltages. A
//! conductance gate passes on the level its two ribbons set, and a gate whose
//! voltage gain stays below 1 passes on a degraded level; a chain of them can
//! drift between the receiving cells' thresholds and compute the wrong value.
//! This module finds the static voltage of every net for each input pattern:
//! the primary inputs sit at the logic levels, and a cell's output follows
//! from its input voltages through its pull-up and pull-down conductance
//! tables (multilinear interpolation), V = Vdd · Gu / (Gu + Gd). Gates are
//! insulated, so a net carries no DC load and the cells can be evaluated one
//! after the other in topological order.
//!
//! Per net it reports the worst **margin** over the patterns: for a net whose
//! Boolean value is 1, V − VIH; for 0, VIL − V; VIL and VIH are the most
//! demanding over the cells that read the net (from their `electrical`
//! blocks; a net read by a primary output is held to the lowest VIL and the
//! highest VIH of the whole library, since any cell may read it). A net is a
//! **logic failure** on a pattern when its voltage lies on the wrong side of
//! a receiver's switching threshold VM (Vdd / 2 for a primary output). The
//! average static power is the mean over the patterns of
//! Σ Vdd · I, I = Vdd · Gu · Gd / (Gu + Gd), at the actual voltages.

use super::spice::DeckModels;
use super::table::ConductanceTable;
use crate::library::electrical::ElectricalData;
use crate::library::Library;
use crate::netlist::{Driver, MappedNetlist, NetId};
use serde::Serialize;

/// Most primary inputs for which every pattern is analysed (2^16 patterns).
pub const MAX_EXHAUSTIVE_INPUTS: usize = 16;

/// Most random patterns a run may ask for (bounds the run time).
pub const MAX_PATTERNS: u64 = 1 << 24;

/// Weakest nets whose worst pattern is searched for (after random
/// patterns) and whose degradation path is reported.
pub const SEARCHED_NETS: usize = 10;

/// Width of a histogram bin of margins, volts (10 mV).
pub const HISTOGRAM_BIN_V: f64 = 0.010;

/// The voltage behaviour of one library cell.
#[derive(Clone, Debug)]
pub struct CellLevels {
    /// Pull-up conductance table.
    pub pull_up: ConductanceTable,
    /// Pull-down conductance table.
    pub pull_down: ConductanceTable,
    /// Input low threshold of the cell's pins, volts.
    pub vil_v: f64,
    /// Input high threshold, volts.
    pub vih_v: f64,
    /// Switching threshold, volts.
    pub vm_v: f64,
}

/// What the analysis needs of a characterised library: the supply, the
/// input logic levels and each cell's tables and thresholds.
#[derive(Clone, Debug)]
pub struct LevelModel {
    /// Supply voltage, volts.
    pub supply_v: f64,
    /// Voltage of a logic-0 primary input, volts.
    pub logic_low_v: f64,
    /// Voltage of a logic-1 primary input, volts.
    pub logic_high_v: f64,
    /// Per library cell (library order); `None` without an electrical block.
    pub cells: Vec<Option<CellLevels>>,
    /// Thresholds a primary output is held to: lowest VIL, highest VIH over
    /// the library's cells, volts.
    pub output_vil_v: f64,
    /// See `output_vil_v`.
    pub output_vih_v: f64,
}

impl LevelModel {
    /// Builds the model from a library's deck models (tables, levels) and
    /// its electrical blocks (thresholds).
    pub fn new(library: &Library, models: &DeckModels, data: &ElectricalData) -> LevelModel {
        let mut output_vil_v = models.supply_v / 2.0;
        let mut output_vih_v = models.supply_v / 2.0;
        let cells = library
            .cells
            .iter()
            .zip(&models.cells)
            .map(|(cell, model)| {
                let model = model.as_ref()?;
                let e = data.cell(&cell.name)?;
                output_vil_v = output_vil_v.min(e.vil_v);
                output_vih_v = output_vih_v.max(e.vih_v);
                Some(CellLevels {
                    pull_up: model.pull_up.clone(),
                    pull_down: model.pull_down.clone(),
                    vil_v: e.vil_v,
                    vih_v: e.vih_v,
                    vm_v: e.vm_v,
                })
            })
            .collect();
        LevelModel {
            supply_v: models.supply_v,
            logic_low_v: models.logic_low_v,
            logic_high_v: models.logic_high_v,
            cells,
            output_vil_v,
            output_vih_v,
        }
    }

    /// Static output voltage (volts) and supply current (amperes) of `cell`
    /// with input voltages `volts`.
    pub fn cell_output(&self, cell: &CellLevels, volts: &[f64]) -> (f64, f64) {
        let gu = cell.pull_up.conductance(volts);
        let gd = cell.pull_down.conductance(volts);
        let v = self.supply_v * gu / (gu + gd);
        let i = self.supply_v * gu * gd / (gu + gd);
        (v, i)
    }
}

/// Options of [`analyze_levels`].
#[derive(Clone, Debug, PartialEq)]
pub struct LevelOptions {
    /// Random patterns to analyse when the netlist has more than
    /// [`MAX_EXHAUSTIVE_INPUTS`] primary inputs.
    pub patterns: u64,
    /// Seed of the random patterns.
    pub seed: u64,
}

impl Default for LevelOptions {
    fn default() -> Self {
        LevelOptions {
            patterns: 65_536,
            seed: 1,
        }
    }
}

/// The levels of one net over the analysed patterns.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct NetLevel {
    /// Net name.
    pub net: String,
    /// Lowest margin over the patterns, volts (negative: outside the band
    /// its receivers read correctly).
    pub worst_margin_v: f64,
    /// Voltage on the worst pattern, volts.
    pub worst_voltage_v: f64,
    /// Boolean value on the worst pattern.
    pub worst_value: bool,
    /// The worst pattern: one 0/1 per primary input in netlist order.
    pub worst_pattern: String,
    /// Input low threshold the net is held to, volts.
    pub vil_v: f64,
    /// Input high threshold the net is held to, volts.
    pub vih_v: f64,
    /// Patterns on which the net's voltage reads as the wrong value (of
    /// the exhaustive or random patterns; the search's are not counted).
    pub failures: u64,
    /// For the weakest nets: the nets from a primary input to this one on
    /// the worst pattern, stepping back each time through the cell input
    /// with the lowest margin; where the margins fall is where the
    /// degradation happens. Empty for the other nets.
    pub path: Vec<String>,
}

/// A bin of the margin histogram: nets whose worst margin lies in
/// [from, from + 10 mV).
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct HistogramBin {
    /// Lower edge, millivolts.
    pub from_mv: f64,
    /// Upper edge, millivolts.
    pub to_mv: f64,
    /// Nets in the bin.
    pub nets: u64,
}

/// The result of a level analysis.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct LevelReport {
    /// Design name.
    pub design: String,
    /// Patterns analysed.
    pub patterns: u64,
    /// Whether they were every pattern of the inputs.
    pub exhaustive: bool,
    /// Supply voltage, volts.
    pub supply_v: f64,
    /// Per net that is read by a cell or a primary output, weakest first.
    pub nets: Vec<NetLevel>,
    /// (net, pattern) pairs whose voltage reads as the wrong value.
    pub logic_failures: u64,
    /// Patterns on which at least one net reads as the wrong value.
    pub failing_patterns: u64,
    /// Netlist evaluations the worst-pattern search made after random
    /// patterns (0 when every pattern was analysed).
    pub search_evaluations: u64,
    /// Mean static power over the patterns, nanowatts.
    pub average_static_power_nw: f64,
    /// Histogram of the nets' worst margins, 10 mV bins, ascending.
    pub histogram: Vec<HistogramBin>,
}

impl LevelReport {
    /// The lowest margin of any net, volts (`None` without nets).
    pub fn worst_margin_v(&self) -> Option<f64> {
        self.nets.first().map(|n| n.worst_margin_v)
    }
}

/// Every net's static voltage (volts) and the total static supply current
/// (amperes) of `netlist` for the input values `pattern` (netlist input
/// order).
pub fn net_voltages(
    netlist: &MappedNetlist,
    model: &LevelModel,
    pattern: &[bool],
) -> Result<(Vec<f64>, f64), String> {
    check_netlist(netlist, model)?;
    if pattern.len() != netlist.inputs.len() {
        return Err(format!(
            "the pattern has {} bits but '{}' has {} primary inputs",
            pattern.len(),
            netlist.name,
            netlist.inputs.len()
        ));
    }
    let mut volts = vec![0.0; netlist.nets.len()];
    let current = evaluate(netlist, model, pattern, &mut volts);
    Ok((volts, current))
}

/// Checks that the netlist can be analysed on `model`.
pub(super) fn check_netlist(netlist: &MappedNetlist, model: &LevelModel) -> Result<(), String> {
    if !netlist.storage.is_empty() {
        return Err(format!(
            "'{}' has {} storage elements: level analysis covers combinational netlists only",
            netlist.name,
            netlist.storage.len()
        ));
    }
    for inst in &netlist.instances {
        match model.cells.get(inst.cell as usize) {
            Some(Some(c)) if c.pull_up.arity() == inst.inputs.len() => {}
            _ => {
                return Err(format!(
                    "instance '{}' uses a cell without an electrical block and tables: characterise its kit first",
                    inst.name
                ))
            }
        }
    }
    Ok(())
}

/// Fills `volts` for `pattern` and returns the total static current.
pub(super) fn evaluate(
    netlist: &MappedNetlist,
    model: &LevelModel,
    pattern: &[bool],
    volts: &mut [f64],
) -> f64 {
    for (id, net) in netlist.nets.iter().enumerate() {
        volts[id] = match net.driver {
            Driver::Input(i) => {
                if pattern[i as usize] {
                    model.logic_high_v
                } else {
                    model.logic_low_v
                }
            }
            Driver::Constant(true) => model.supply_v,
            _ => 0.0,
        };
    }
    let mut current = 0.0;
    let mut inputs = Vec::with_capacity(6);
    for inst in &netlist.instances {
        let Some(Some(cell)) = model.cells.get(inst.cell as usize) else {
            continue;
        };
        inputs.clear();
        inputs.extend(inst.inputs.iter().map(|&n| volts[n as usize]));
        let (v, i) = model.cell_output(cell, &inputs);
        volts[inst.output as usize] = v;
        current += i;
    }
    current
}

/// Boolean value of every net for `pattern` (the cells' truth tables).
pub(super) fn evaluate_logic(
    netlist: &MappedNetlist,
    library: &Library,
    pattern: &[bool],
    out: &mut [bool],
) {
    for (id, net) in netlist.nets.iter().enumerate() {
        out[id] = match net.driver {
            Driver::Input(i) => pattern[i as usize],
            Driver::Constant(b) => b,
            _ => false,
        };
    }
    for inst in &netlist.instances {
        let row = inst
            .inputs
            .iter()
            .enumerate()
            .fold(0usize, |r, (k, &n)| r | usize::from(out[n as usize]) << k);
        out[inst.output as usize] = library.cells[inst.cell as usize].truth >> row & 1 == 1;
    }
}

/// The thresholds a net is held to: (VIL, VIH, VM for a 0, VM for a 1).
#[derive(Clone, Copy, Debug)]
pub(super) struct Thresholds {
    pub(super) vil_v: f64,
    pub(super) vih_v: f64,
    /// Highest switching threshold of the receivers: a 0 must stay below it.
    pub(super) vm_high_v: f64,
    /// Lowest switching threshold: a 1 must stay above it.
    pub(super) vm_low_v: f64,
}

/// Per net the thresholds of its receivers, `None` for nets nobody reads.
pub(super) fn net_thresholds(
    netlist: &MappedNetlist,
    model: &LevelModel,
) -> Vec<Option<Thresholds>> {
    let mut out: Vec<Option<Thresholds>> = vec![None; netlist.nets.len()];
    let mut merge = |net: NetId, t: Thresholds| {
        let slot = &mut out[net as usize];
        *slot = Some(match *slot {
            None => t,
            Some(s) => Thresholds {
                vil_v: s.vil_v.min(t.vil_v),
                vih_v: s.vih_v.max(t.vih_v),
                vm_high_v: s.vm_high_v.max(t.vm_high_v),
                vm_low_v: s.vm_low_v.min(t.vm_low_v),
            },
        });
    };
    for inst in &netlist.instances {
        if let Some(Some(c)) = model.cells.get(inst.cell as usize) {
            for &n in &inst.inputs {
                merge(
                    n,
                    Thresholds {
                        vil_v: c.vil_v,
                        vih_v: c.vih_v,
                        vm_high_v: c.vm_v,
                        vm_low_v: c.vm_v,
                    },
                );
            }
        }
    }
    for port in &netlist.outputs {
        merge(
            port.net,
            Thresholds {
                vil_v: model.output_vil_v,
                vih_v: model.output_vih_v,
                vm_high_v: model.supply_v / 2.0,
                vm_low_v: model.supply_v / 2.0,
            },
        );
    }
    out
}

impl Thresholds {
    /// Margin (volts) of a net at `v` whose Boolean value is `value`, and
    /// whether it reads as the wrong value.
    pub(super) fn margin(&self, v: f64, value: bool) -> (f64, bool) {
        if value {
            (v - self.vih_v, v <= self.vm_low_v)
        } else {
            (self.vil_v - v, v >= self.vm_high_v)
        }
    }
}

/// A small, fast generator of random patterns (SplitMix64; Steele, Lea and
/// Flood, "Fast splittable pseudorandom number generators", 2014).
struct SplitMix(u64);

impl SplitMix {
    fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9e37_79b9_7f4a_7c15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
        z ^ (z >> 31)
    }
}

/// A net's worst case so far: margin (V), voltage (V), Boolean value and
/// the pattern.
type Worst = (f64, f64, bool, Vec<bool>);

/// Analyses `netlist` (mapped on `library`, whose characterised levels are
/// `model`): every pattern when it has at most [`MAX_EXHAUSTIVE_INPUTS`]
/// primary inputs, otherwise `options.patterns` random ones.
pub fn analyze_levels(
    netlist: &MappedNetlist,
    library: &Library,
    model: &LevelModel,
    options: &LevelOptions,
) -> Result<LevelReport, String> {
    check_netlist(netlist, model)?;
    let width = netlist.inputs.len();
    let exhaustive = width <= MAX_EXHAUSTIVE_INPUTS;
    let patterns = if exhaustive {
        1u64 << width
    } else {
        if options.patterns == 0 || options.patterns > MAX_PATTERNS {
            return Err(format!(
                "{} random patterns asked for: expected 1 to {MAX_PATTERNS}",
                options.patterns
            ));
        }
        options.patterns
    };
    let thresholds = net_thresholds(netlist, model);
    let nets = netlist.nets.len();
    let mut worst: Vec<Option<Worst>> = vec![None; nets];
    let mut failures = vec![0u64; nets];
    let mut failing_patterns = 0u64;
    let mut total_current = 0.0;
    let mut volts = vec![0.0; nets];
    let mut logic = vec![false; nets];
    let mut pattern = vec![false; width];
    let mut rng = SplitMix(options.seed);
    let mut bits = 0u64;
    for p in 0..patterns {
        for (k, bit) in pattern.iter_mut().enumerate() {
            if exhaustive {
                *bit = p >> k & 1 == 1;
            } else {
                if k % 64 == 0 {
                    bits = rng.next();
                }
                *bit = bits >> (k % 64) & 1 == 1;
            }
        }
        total_current += evaluate(netlist, model, &pattern, &mut volts);
        evaluate_logic(netlist, library, &pattern, &mut logic);
        let mut failed = false;
        for id in 0..nets {
            let Some(t) = thresholds[id] else { continue };
            let v = volts[id];
            let (margin, wrong) = t.margin(v, logic[id]);
            if wrong {
                failures[id] += 1;
                failed = true;
            }
            if worst[id].as_ref().is_none_or(|w| margin < w.0) {
                worst[id] = Some((margin, v, logic[id], pattern.clone()));
            }
        }
        failing_patterns += u64::from(failed);
    }
    let mut search = Search {
        netlist,
        library,
        model,
        volts,
        logic,
        evaluations: 0,
    };
    if !exhaustive {
        // Hill climbing over single-input flips from the worst pattern of
        // each of the weakest nets, within as many evaluations as the
        // random phase took.
        let mut order: Vec<usize> = (0..nets).filter(|&id| worst[id].is_some()).collect();
        order.sort_by(|&a, &b| worst_margin(&worst[a]).total_cmp(&worst_margin(&worst[b])));
        for &id in order.iter().take(SEARCHED_NETS) {
            let (Some(t), Some(w)) = (thresholds[id], worst[id].as_mut()) else {
                continue;
            };
            search.climb(id, t, w, patterns);
        }
    }
    let mut levels: Vec<NetLevel> = worst
        .into_iter()
        .enumerate()
        .filter_map(|(id, w)| {
            let (margin, v, value, pattern) = w?;
            let t = thresholds[id]?;
            Some(NetLevel {
                net: netlist.nets[id].name.clone(),
                worst_margin_v: margin,
                worst_voltage_v: v,
                worst_value: value,
                worst_pattern: pattern.iter().map(|&b| if b { '1' } else { '0' }).collect(),
                vil_v: t.vil_v,
                vih_v: t.vih_v,
                failures: failures[id],
                path: Vec::new(),
            })
        })
        .collect();
    levels.sort_by(|a, b| {
        a.worst_margin_v
            .total_cmp(&b.worst_margin_v)
            .then_with(|| a.net.cmp(&b.net))
    });
    for level in levels.iter_mut().take(SEARCHED_NETS) {
        level.path = search.degradation_path(&level.net, &level.worst_pattern, &thresholds);
    }
    let histogram = histogram(&levels);
    Ok(LevelReport {
        design: netlist.name.clone(),
        patterns,
        exhaustive,
        supply_v: model.supply_v,
        logic_failures: failures.iter().sum(),
        failing_patterns,
        search_evaluations: search.evaluations,
        average_static_power_nw: model.supply_v * total_current / patterns as f64 * 1e9,
        nets: levels,
        histogram,
    })
}

fn worst_margin(w: &Option<Worst>) -> f64 {
    w.as_ref().map_or(f64::INFINITY, |w| w.0)
}

/// The worst-pattern search and path finder: evaluation buffers and a
/// count of evaluations.
struct Search<'a> {
    netlist: &'a MappedNetlist,
    library: &'a Library,
    model: &'a LevelModel,
    volts: Vec<f64>,
    logic: Vec<bool>,
    evaluations: u64,
}

impl Search<'_> {
    fn evaluate(&mut self, pattern: &[bool]) {
        evaluate(self.netlist, self.model, pattern, &mut self.volts);
        evaluate_logic(self.netlist, self.library, pattern, &mut self.logic);
        self.evaluations += 1;
    }

    /// Flips single inputs of `w`'s pattern while that lowers net `id`'s
    /// margin, until no flip does or `budget` evaluations are spent in all.
    fn climb(&mut self, id: usize, t: Thresholds, w: &mut Worst, budget: u64) {
        let width = w.3.len();
        loop {
            let mut best: Option<(usize, f64, f64, bool)> = None;
            for k in 0..width {
                if self.evaluations >= budget {
                    return;
                }
                let mut pattern = w.3.clone();
                pattern[k] = !pattern[k];
                self.evaluate(&pattern);
                let (v, value) = (self.volts[id], self.logic[id]);
                let (margin, _) = t.margin(v, value);
                if margin < best.map_or(w.0, |b| b.1) {
                    best = Some((k, margin, v, value));
                }
            }
            let Some((k, margin, v, value)) = best else {
                return;
            };
            w.3[k] = !w.3[k];
            w.0 = margin;
            w.1 = v;
            w.2 = value;
        }
    }

    /// The degradation path of net `name` on `pattern` (0/1 text).
    fn degradation_path(
        &mut self,
        name: &str,
        pattern: &str,
        thresholds: &[Option<Thresholds>],
    ) -> Vec<String> {
        let Some(mut id) = self.netlist.nets.iter().position(|n| n.name == name) else {
            return Vec::new();
        };
        let bits: Vec<bool> = pattern.chars().map(|c| c == '1').collect();
        self.evaluate(&bits);
        let mut path = vec![name.to_string()];
        // Each step goes to an earlier instance, so the walk ends.
        while let Driver::Cell(i) = self.netlist.nets[id].driver {
            let inst = &self.netlist.instances[i as usize];
            let weakest = inst.inputs.iter().copied().min_by(|&a, &b| {
                let m = |n: NetId| {
                    thresholds[n as usize].map_or(f64::INFINITY, |t| {
                        t.margin(self.volts[n as usize], self.logic[n as usize]).0
                    })
                };
                m(a).total_cmp(&m(b))
            });
            let Some(next) = weakest else { break };
            id = next as usize;
            path.push(self.netlist.nets[id].name.clone());
        }
        path.reverse();
        path
    }
}

/// Counts the nets' worst margins in 10 mV bins from the lowest to the
/// highest occupied bin.
fn histogram(levels: &[NetLevel]) -> Vec<HistogramBin> {
    let bin = |m: f64| (m / HISTOGRAM_BIN_V).floor() as i64;
    let (Some(first), Some(last)) = (levels.first(), levels.last()) else {
        return Vec::new();
    };
    let (lo, hi) = (bin(first.worst_margin_v), bin(last.worst_margin_v));
    let mut counts = vec![0u64; (hi - lo + 1) as usize];
    for l in levels {
        counts[(bin(l.worst_margin_v) - lo) as usize] += 1;
    }
    let step_mv = HISTOGRAM_BIN_V * 1e3;
    counts
        .into_iter()
        .enumerate()
        .map(|(k, nets)| {
            let from_mv = (lo + k as i64) as f64 * step_mv;
            HistogramBin {
                from_mv,
                to_mv: from_mv + step_mv,
                nets,
            }
        })
        .collect()
}
