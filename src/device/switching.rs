//! The switching transient of one cell, integrated from its conductance
//! tables, for a delay model that sees input slew.
//!
//! A step at a cell's input is an idealisation no cell inside a circuit
//! meets: its input is the output of a neighbour that rises or falls over
//! a few picoseconds, and while the input is between the levels both
//! ribbons are only partly on. The step's RC delay `ln 2 · C / (Gu + Gd)`
//! therefore underestimates a stage in a chain. This module integrates the
//! output node's equation instead,
//!
//! `C · dV/dt = Gu(u(t)) · (Vdd − V) − Gd(u(t)) · V`,
//!
//! with the ribbons' conductances read from their tables (multilinear
//! interpolation, [`ConductanceTable::conductance`]) at the input voltages
//! `u(t)`: one input follows a given waveform, the others stay at their
//! logic levels. Over each time step of length `h` the conductances are
//! frozen at the step's midpoint and the linear equation is solved exactly,
//! `V ← V∞ + (V − V∞) · exp(−h · (Gu + Gd) / C)` with
//! `V∞ = Vdd · Gu / (Gu + Gd)` (the exponential midpoint rule, second
//! order in `h`, and unconditionally stable). Gates are insulated, so a
//! stage does not load its driver beyond the capacitance the caller adds
//! to the driver's node: stages of a chain can be integrated one after the
//! other. Units: attofarads, microsiemens and picoseconds
//! (aF / µS = ps).

use super::table::ConductanceTable;

/// A voltage waveform sampled every `step_ps`, starting at time 0.
#[derive(Clone, Debug, PartialEq)]
pub struct Waveform {
    /// Time between samples, picoseconds.
    pub step_ps: f64,
    /// Samples, volts.
    pub volts: Vec<f64>,
}

impl Waveform {
    /// An ideal step from `from` to `to` volts at `at_ps`, sampled every
    /// `step_ps` until `until_ps`.
    pub fn step(from: f64, to: f64, at_ps: f64, step_ps: f64, until_ps: f64) -> Waveform {
        let n = (until_ps / step_ps).ceil() as usize + 1;
        Waveform {
            step_ps,
            volts: (0..n)
                .map(|i| {
                    if (i as f64) * step_ps < at_ps {
                        from
                    } else {
                        to
                    }
                })
                .collect(),
        }
    }

    /// Duration covered by the samples, picoseconds.
    pub fn duration_ps(&self) -> f64 {
        self.step_ps * (self.volts.len().saturating_sub(1)) as f64
    }

    /// The voltage at `t_ps`, linear between samples, held at the ends.
    pub fn at(&self, t_ps: f64) -> f64 {
        let last = self.volts.len() - 1;
        let x = t_ps / self.step_ps;
        if x <= 0.0 {
            return self.volts[0];
        }
        let i = x.floor() as usize;
        if i >= last {
            return self.volts[last];
        }
        let w = x - i as f64;
        self.volts[i] * (1.0 - w) + self.volts[i + 1] * w
    }

    /// The first time the waveform crosses `level` (either way), linear
    /// between samples; `None` when it never does.
    pub fn crossing(&self, level: f64) -> Option<f64> {
        self.volts.windows(2).enumerate().find_map(|(i, w)| {
            let (a, b) = (w[0] - level, w[1] - level);
            if a == 0.0 {
                Some(i as f64 * self.step_ps)
            } else if a * b < 0.0 || b == 0.0 {
                Some((i as f64 + a / (a - b)) * self.step_ps)
            } else {
                None
            }
        })
    }
}

/// One timing arc of a cell: input `input` switches while the other inputs
/// hold the values of row `row` (bit k = input k; the switching input's
/// bit is ignored), and the output changes with it.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Arc {
    /// The switching input.
    pub input: usize,
    /// The other inputs' logic values, as an input row.
    pub row: usize,
    /// Whether the input rises (else it falls).
    pub input_rises: bool,
}

/// The two ribbons of a cell and the node it drives.
#[derive(Clone, Copy, Debug)]
pub struct Stage<'a> {
    /// Pull-up table.
    pub pull_up: &'a ConductanceTable,
    /// Pull-down table.
    pub pull_down: &'a ConductanceTable,
    /// Supply voltage, volts.
    pub supply_v: f64,
    /// Logic-low input voltage of the held inputs, volts.
    pub logic_low_v: f64,
    /// Logic-high input voltage of the held inputs, volts.
    pub logic_high_v: f64,
    /// Total capacitance of the output node, attofarads.
    pub capacitance_af: f64,
}

impl Stage<'_> {
    fn volts(&self, arc: Arc, input_v: f64) -> Vec<f64> {
        (0..self.pull_up.arity())
            .map(|k| {
                if k == arc.input {
                    input_v
                } else if arc.row >> k & 1 == 1 {
                    self.logic_high_v
                } else {
                    self.logic_low_v
                }
            })
            .collect()
    }

    /// The static output voltage (divider) with the switching input at
    /// `input_v`.
    pub fn static_output(&self, arc: Arc, input_v: f64) -> f64 {
        let v = self.volts(arc, input_v);
        let gu = self.pull_up.conductance(&v);
        let gd = self.pull_down.conductance(&v);
        super::transfer::divider(self.supply_v, gu, gd).output_v
    }

    /// The output waveform while the switching input follows `input`,
    /// sampled on the input's time grid. The output starts at its static
    /// value for the input's first sample.
    pub fn respond(&self, arc: Arc, input: &Waveform) -> Waveform {
        let h = input.step_ps;
        let mut volts = Vec::with_capacity(input.volts.len());
        let mut v = self.static_output(arc, input.volts[0]);
        volts.push(v);
        let mut gates = self.volts(arc, 0.0);
        for i in 1..input.volts.len() {
            gates[arc.input] = 0.5 * (input.volts[i - 1] + input.volts[i]);
            // µS, so that aF / µS is picoseconds.
            let gu = self.pull_up.conductance(&gates) * 1e6;
            let gd = self.pull_down.conductance(&gates) * 1e6;
            let total = gu + gd;
            let target = self.supply_v * gu / total;
            v = target + (v - target) * (-h * total / self.capacitance_af).exp();
            volts.push(v);
        }
        Waveform { step_ps: h, volts }
    }
}

/// The 50 % delay from the input's crossing of `input_mid_v` to the
/// output's crossing of `output_mid_v`, picoseconds; `None` when either
/// never crosses.
pub fn delay_50(
    input: &Waveform,
    output: &Waveform,
    input_mid_v: f64,
    output_mid_v: f64,
) -> Option<f64> {
    Some(output.crossing(output_mid_v)? - input.crossing(input_mid_v)?)
}

impl Waveform {
    /// The same waveform moved in time so that its first crossing of
    /// `level` falls at `at_ps`, sampled on the same step for `until_ps`.
    pub fn aligned(&self, level: f64, at_ps: f64, until_ps: f64) -> Waveform {
        let shift = self.crossing(level).unwrap_or(at_ps) - at_ps;
        let n = (until_ps / self.step_ps).ceil() as usize + 1;
        Waveform {
            step_ps: self.step_ps,
            volts: (0..n)
                .map(|i| self.at(i as f64 * self.step_ps + shift))
                .collect(),
        }
    }
}

impl Stage<'_> {
    /// The time, picoseconds, at which the output first crosses
    /// `output_mid_v` while the switching input follows `input` (held at
    /// its last sample after its end); `None` when it has not crossed by
    /// `limit_ps`.
    pub fn output_crossing(
        &self,
        arc: Arc,
        input: &Waveform,
        output_mid_v: f64,
        limit_ps: f64,
    ) -> Option<f64> {
        let h = input.step_ps;
        let mut v = self.static_output(arc, input.volts[0]);
        let above = v > output_mid_v;
        let mut gates = self.volts(arc, 0.0);
        let steps = ((limit_ps / h).ceil() as usize).min(MAX_ARC_STEPS);
        // While the input holds its first value the output holds its static
        // value: start where the input has moved by a millionth of the
        // logic swing.
        let still = 1e-6 * (self.logic_high_v - self.logic_low_v).abs();
        let first = input
            .volts
            .iter()
            .position(|&u| (u - input.volts[0]).abs() > still)
            .unwrap_or(input.volts.len())
            .max(1);
        let mut previous_input = input.volts[first - 1];
        for i in first..=steps {
            let next_input = input.at(i as f64 * h);
            gates[arc.input] = 0.5 * (previous_input + next_input);
            previous_input = next_input;
            let gu = self.pull_up.conductance(&gates) * 1e6;
            let gd = self.pull_down.conductance(&gates) * 1e6;
            let total = gu + gd;
            let target = self.supply_v * gu / total;
            let before = v;
            v = target + (v - target) * (-h * total / self.capacitance_af).exp();
            if (v > output_mid_v) != above {
                let fraction = (before - output_mid_v) / (before - v);
                return Some((i as f64 - 1.0 + fraction) * h);
            }
        }
        None
    }
}

/// Fanout of the reference stage whose output drives a cell's input while
/// its delay is characterised: the kit's inverter driving four copies of
/// itself, the fanout-of-four stage that is common practice as "a typical
/// gate in a chain" (Harris, Sutherland and Sproull, *Logical Effort*,
/// 1999, use its delay as the unit of process speed).
pub const REFERENCE_FANOUT: f64 = 4.0;

/// Loads, in unit loads, at which every arc is timed for the fit of
/// `intrinsic + per_load · load`.
pub const FIT_LOADS: [f64; 6] = [0.0, 1.0, 2.0, 3.0, 4.0, 6.0];

/// Integration steps per unloaded time constant `C_out / (Gu + Gd)` of the
/// reference inverter (its fastest).
pub const STEPS_PER_TIME_CONSTANT: f64 = 25.0;

/// Most samples of a reference edge (bounds time and memory for extreme
/// kits; the step grows instead).
const MAX_EDGE_SAMPLES: usize = 1_000_000;

/// Most integration steps timing one arc.
const MAX_ARC_STEPS: usize = 4_000_000;

/// Reference stages simulated at most while the chain settles.
const MAX_CHAIN_STAGES: usize = 24;

/// The input edges every cell is characterised with: the steady-state
/// rising and falling outputs of a long chain of the reference inverter,
/// each inverter driving [`REFERENCE_FANOUT`] unit loads.
#[derive(Clone, Debug)]
pub struct ReferenceEdges {
    /// Name of the reference cell.
    pub cell: String,
    /// Its fanout in unit loads.
    pub fanout: f64,
    /// The rising edge, crossing the logic midpoint at `crossing_ps`.
    pub rising: Waveform,
    /// The falling edge, crossing the logic midpoint at `crossing_ps`.
    pub falling: Waveform,
    /// Where both edges cross the logic midpoint, picoseconds.
    pub crossing_ps: f64,
    /// Delay of one reference stage in the settled chain (mean of rise and
    /// fall), picoseconds.
    pub stage_delay_ps: f64,
}

/// The steady-state edges of a chain of the one-input inverting `stage`,
/// whose capacitance already includes its fanout; `unloaded_af` is its own
/// output capacitance (it sets the time step). The chain starts from an
/// ideal step and runs until one more stage changes the rising and the
/// falling delay by less than a millionth of a picosecond (at most 24
/// stages). `None` when the loaded capacitance or the corner conductances
/// are not positive and finite (nothing to time).
pub fn reference_edges(
    stage: &Stage,
    unloaded_af: f64,
    cell: &str,
    fanout: f64,
) -> Option<ReferenceEdges> {
    let lo = stage.logic_low_v;
    let hi = stage.logic_high_v;
    let mid = (lo + hi) / 2.0;
    let corners = [lo, hi].map(|v| {
        let g = [v];
        (stage.pull_up.conductance(&g) + stage.pull_down.conductance(&g)) * 1e6
    });
    let fastest = corners[0].max(corners[1]);
    let slowest = corners[0].min(corners[1]);
    let positive = |x: f64| x.is_finite() && x > 0.0;
    if !positive(slowest) || !positive(fastest) || !positive(stage.capacitance_af) {
        return None;
    }
    // The unloaded time constant of the fastest state sets the step, the
    // loaded one of the slowest state the length of the edges (at most
    // MAX_EDGE_SAMPLES samples).
    let loaded_tau = stage.capacitance_af / slowest;
    let crossing_ps = 6.0 * loaded_tau;
    let until = crossing_ps + 30.0 * loaded_tau;
    let h = (unloaded_af.max(0.0) / fastest / STEPS_PER_TIME_CONSTANT)
        .max(until / MAX_EDGE_SAMPLES as f64);
    let mut input = Waveform::step(lo, hi, crossing_ps, h, until);
    let mut input_rises = true;
    // Index 0: the output rises (input falls); 1: the output falls.
    let mut delays = [f64::NAN; 2];
    let mut settled = [false; 2];
    let mut edges: [Option<Waveform>; 2] = [None, None];
    for _ in 0..MAX_CHAIN_STAGES {
        let arc = Arc {
            input: 0,
            row: 0,
            input_rises,
        };
        let out = stage.respond(arc, &input);
        let delay = out.crossing(mid).unwrap_or(until) - crossing_ps;
        let slot = usize::from(input_rises);
        settled[slot] = (delay - delays[slot]).abs() < 1e-6;
        delays[slot] = delay;
        let aligned = out.aligned(mid, crossing_ps, until);
        edges[slot] = Some(aligned.clone());
        input = aligned;
        input_rises = !input_rises;
        if settled[0] && settled[1] {
            break;
        }
    }
    let [rising, falling] = edges;
    Some(ReferenceEdges {
        cell: cell.to_string(),
        fanout,
        rising: rising.unwrap_or_else(|| Waveform::step(lo, hi, crossing_ps, h, until)),
        falling: falling.unwrap_or_else(|| Waveform::step(hi, lo, crossing_ps, h, until)),
        crossing_ps,
        stage_delay_ps: (delays[0] + delays[1]) / 2.0,
    })
}

/// The delay model fitted to a cell's arcs.
#[derive(Clone, Debug, PartialEq)]
pub struct DelayFit {
    /// Fitted delay at zero load, picoseconds.
    pub intrinsic_ps: f64,
    /// Fitted delay per unit load, picoseconds.
    pub per_load_ps: f64,
    /// (load, slowest arc's delay, that arc) at each of [`FIT_LOADS`].
    pub points: Vec<(f64, f64, Arc)>,
}

/// Every timing arc of a cell with truth table `truth` over `arity`
/// inputs: each input, each assignment of the others that makes the output
/// follow it, rising and falling.
pub fn arcs(truth: u64, arity: usize) -> Vec<Arc> {
    let mut out = Vec::new();
    for input in 0..arity {
        for row in 0..1usize << arity {
            if row >> input & 1 == 1 || (truth >> row & 1) == (truth >> (row | 1 << input) & 1) {
                continue;
            }
            for input_rises in [true, false] {
                out.push(Arc {
                    input,
                    row,
                    input_rises,
                });
            }
        }
    }
    out
}

/// Times every arc of a cell at each of [`FIT_LOADS`] with its input
/// driven by `edges`, takes the slowest arc per load and fits
/// `intrinsic + per_load · load` to those points by least squares.
/// `stage_at(load)` gives the cell's stage with the output node's total
/// capacitance at that load. The delay is measured from the input's
/// crossing of the logic midpoint to the output's crossing of `Vdd / 2`.
pub fn fit_delay<'a>(
    stage_at: impl Fn(f64) -> Stage<'a>,
    truth: u64,
    arity: usize,
    edges: &ReferenceEdges,
) -> DelayFit {
    let all = arcs(truth, arity);
    if all.is_empty() {
        // A constant function has no arc: nothing switches.
        return DelayFit {
            intrinsic_ps: 0.0,
            per_load_ps: 0.0,
            points: Vec::new(),
        };
    }
    let points: Vec<(f64, f64, Arc)> = FIT_LOADS
        .iter()
        .map(|&load| {
            let stage = stage_at(load);
            let slowest = slowest_conductance_us(&stage);
            let limit = (edges.rising.duration_ps() + 60.0 * stage.capacitance_af / slowest)
                .min(edges.rising.step_ps * MAX_ARC_STEPS as f64);
            let mid = stage.supply_v / 2.0;
            all.iter()
                .map(|&arc| {
                    let input = if arc.input_rises {
                        &edges.rising
                    } else {
                        &edges.falling
                    };
                    let t = stage
                        .output_crossing(arc, input, mid, limit)
                        .unwrap_or(limit);
                    (load, t - edges.crossing_ps, arc)
                })
                .fold((load, f64::NEG_INFINITY, all[0]), |best, p| {
                    if p.1 > best.1 {
                        p
                    } else {
                        best
                    }
                })
        })
        .collect();
    let (intrinsic_ps, per_load_ps) =
        least_squares_line(&points.iter().map(|p| (p.0, p.1)).collect::<Vec<_>>());
    DelayFit {
        intrinsic_ps,
        per_load_ps,
        points,
    }
}

/// Smallest `Gu + Gd` over the logic corners of a stage, microsiemens.
fn slowest_conductance_us(stage: &Stage) -> f64 {
    let n = stage.pull_up.arity();
    (0..1usize << n)
        .map(|r| {
            let v: Vec<f64> = (0..n)
                .map(|k| {
                    if r >> k & 1 == 1 {
                        stage.logic_high_v
                    } else {
                        stage.logic_low_v
                    }
                })
                .collect();
            (stage.pull_up.conductance(&v) + stage.pull_down.conductance(&v)) * 1e6
        })
        .fold(f64::INFINITY, f64::min)
}

/// Intercept and slope of the least-squares line through `points`
/// (ordinary least squares, common practice).
pub fn least_squares_line(points: &[(f64, f64)]) -> (f64, f64) {
    let n = points.len() as f64;
    let mx = points.iter().map(|p| p.0).sum::<f64>() / n;
    let my = points.iter().map(|p| p.1).sum::<f64>() / n;
    let sxx: f64 = points.iter().map(|p| (p.0 - mx) * (p.0 - mx)).sum();
    let sxy: f64 = points.iter().map(|p| (p.0 - mx) * (p.1 - my)).sum();
    let slope = if sxx > 0.0 { sxy / sxx } else { 0.0 };
    (my - slope * mx, slope)
}
