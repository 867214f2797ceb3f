//! The search around the SAT encoding: trivial outputs, lower bounds, the
//! step-count loop for each objective, limits, and checking every answer by
//! simulation.
//!
//! - **Cells**: step counts from a lower bound upward; the first count that
//!   is satisfiable is the minimum, proven when every smaller count was
//!   refuted (not stopped by a limit).
//! - **Area**: first the minimum cell count `k*` and a network with it. Areas
//!   are scaled to integers and each SAT call asks for a network of `k` steps
//!   whose area is below the best so far (order-encoded partial sums). `k`
//!   starts at `k*`; it grows when a call is refuted, and the search stops
//!   once `k` times the cheapest gate's area can no longer beat the best area
//!   (then the result is proven), or at `max_steps` (then it is not).
//! - **Depth**: for each depth `d` upward, one call with as many steps as a
//!   network of depth `d` can possibly use (outputs times `(a^d-1)/(a-1)` for
//!   gates of up to `a` inputs, capped at `max_steps`) and no "every step
//!   used" rule, so it answers "is there any network of depth `d`". The first
//!   satisfiable depth is then realised with the fewest cells.

use super::encode::{self, Decoded, Node, Outcome, Problem, Shape};
use super::gates::{
    closed_under_negation, depends_on, expand_variants, row_mask, GateSpec, Variant,
};
use super::limits::Budget;
use crate::network::{Lit, Network};
use serde::{Deserialize, Serialize};
use std::time::{Duration, Instant};

/// What to minimise.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize, Deserialize)]
pub enum Objective {
    /// Fewest cells.
    Cells,
    /// Least total cell area.
    Area,
    /// Fewest levels of cells on the longest path, then fewest cells.
    Depth,
}

/// Options of [`synthesize`].
#[derive(Clone, Debug)]
pub struct ExactOptions {
    /// What to minimise.
    pub objective: Objective,
    /// Both phases of every input are available and outputs may be
    /// complemented at no cost. Otherwise a complement costs an inverter
    /// step (a one-input gate of the set).
    pub free_complements: bool,
    /// Stop a single SAT call after about this many conflicts.
    pub conflict_limit: Option<u64>,
    /// Stop the whole search after this long.
    pub time_limit: Option<Duration>,
    /// Largest number of steps to try.
    pub max_steps: usize,
}

impl Default for ExactOptions {
    fn default() -> Self {
        ExactOptions {
            objective: Objective::Cells,
            free_complements: false,
            conflict_limit: None,
            time_limit: None,
            max_steps: 10,
        }
    }
}

/// Where a signal of the small network comes from.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub enum Source {
    /// The constant 0 (1 when complemented).
    Constant,
    /// Network input `k`.
    Input(usize),
    /// An earlier step.
    Step(usize),
}

/// A signal, possibly complemented. Complements appear only on inputs and
/// outputs, and only when complements are free.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Operand {
    /// Where the signal comes from.
    pub source: Source,
    /// Whether it is inverted.
    pub complemented: bool,
}

/// One cell of the network.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Step {
    /// Index of the gate in the gate list given to [`synthesize`].
    pub gate: usize,
    /// Cell name of that gate.
    pub cell: String,
    /// The signal on each cell pin, in the cell's pin order.
    pub fanins: Vec<Operand>,
}

/// A small network found by exact synthesis, with its costs.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct ExactResult {
    /// Number of network inputs.
    pub inputs: usize,
    /// Steps in topological order; step `i` reads inputs and steps `< i`.
    pub steps: Vec<Step>,
    /// One signal per requested function.
    pub outputs: Vec<Operand>,
    /// Number of cells (steps).
    pub cells: usize,
    /// Total area of the cells.
    pub area: f64,
    /// Cells on the longest input-to-output path.
    pub depth: usize,
    /// Whether the objective is proven minimal.
    pub optimal: bool,
    /// Number of SAT calls made.
    pub sat_calls: usize,
}

/// Why exact synthesis gave no network.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum ExactError {
    /// More inputs than supported.
    #[error("exact synthesis supports 0 to 5 inputs, not {0}")]
    TooManyInputs(usize),
    /// A truth table has bits above row `2^inputs - 1`.
    #[error("truth table 0x{truth:X} has bits beyond the {rows} rows of {inputs} inputs")]
    FunctionTooWide {
        /// The table.
        truth: u64,
        /// Inputs given.
        inputs: usize,
        /// Rows of the table.
        rows: usize,
    },
    /// No functions were requested.
    #[error("no functions to synthesise")]
    NoFunctions,
    /// The gate set has no usable gate.
    #[error("the gate set has no usable gate of one to three inputs")]
    NoGates,
    /// No network within the step limit.
    #[error("no network of at most {0} cells realises the function with these gates")]
    NotFound(usize),
    /// A time or conflict limit stopped the search before any network.
    #[error("a resource limit stopped exact synthesis before any network was found")]
    LimitReached,
    /// A found network failed its check (a bug).
    #[error("internal error in exact synthesis: {0}")]
    Internal(String),
}

/// How an output is produced.
#[derive(Clone, Copy)]
enum OutputPlan {
    /// A constant or a literal.
    Trivial(Operand),
    /// Target `index` of the SAT problem, complemented or not on top.
    Target(usize, bool),
}

/// Finds a smallest network of `gates` computing `functions` (truth tables
/// over `inputs` inputs, one per output) under `opts.objective`.
///
/// The result is checked by simulation before it is returned. It is
/// deterministic for the same arguments when no time limit is set.
pub fn synthesize(
    functions: &[u64],
    inputs: usize,
    gates: &[GateSpec],
    opts: &ExactOptions,
) -> Result<ExactResult, ExactError> {
    if inputs > 5 {
        return Err(ExactError::TooManyInputs(inputs));
    }
    if functions.is_empty() {
        return Err(ExactError::NoFunctions);
    }
    let mask = row_mask(inputs);
    for &f in functions {
        if f & !mask != 0 {
            return Err(ExactError::FunctionTooWide {
                truth: f,
                inputs,
                rows: 1 << inputs,
            });
        }
    }
    let mut variants = expand_variants(gates);
    if variants.is_empty() {
        return Err(ExactError::NoGates);
    }
    let free = opts.free_complements;
    let normal = free && closed_under_negation(&variants);
    if normal {
        variants.retain(|v| v.arity >= 2 && v.truth & 1 == 0);
    }

    // Split outputs into trivial ones and SAT targets.
    let mut targets: Vec<u64> = Vec::new();
    let mut plans = Vec::with_capacity(functions.len());
    for &f in functions {
        plans.push(plan_output(f, inputs, free, &mut targets));
    }
    let start = Instant::now();
    let budget = Budget {
        deadline: opts.time_limit.map(|t| start + t),
        conflicts: opts.conflict_limit,
    };
    let mut search = Search {
        problem: Problem {
            inputs,
            normal,
            negated_inputs: free && !normal,
            free_output_polarity: free && !normal,
            variants: &variants,
            targets,
            absorbs_inverter: inverter_twins(&variants),
        },
        gates,
        functions,
        plans,
        budget,
        calls: 0,
        relaxed_bound: None,
    };
    if search.problem.targets.is_empty() {
        return search.finish(None, true);
    }
    let max_arity = variants.iter().map(|v| v.arity).max().unwrap_or(1);
    match opts.objective {
        Objective::Cells => search.min_cells(max_arity, opts.max_steps),
        Objective::Area => search.min_area(max_arity, opts.max_steps),
        Objective::Depth => search.min_depth(max_arity, opts.max_steps),
    }
}

/// Decides how output `f` is produced, adding a SAT target when needed.
fn plan_output(f: u64, inputs: usize, free: bool, targets: &mut Vec<u64>) -> OutputPlan {
    let mask = row_mask(inputs);
    if f == 0 || f == mask {
        return OutputPlan::Trivial(Operand {
            source: Source::Constant,
            complemented: f == mask,
        });
    }
    for k in 0..inputs {
        let x = crate::network::exhaustive_word(k, 0) & mask;
        if f == x || (free && f == !x & mask) {
            return OutputPlan::Trivial(Operand {
                source: Source::Input(k),
                complemented: f != x,
            });
        }
    }
    // With free complements f and !f share a target: keep the one that is 0
    // on row 0.
    let (target, flip) = if free && f & 1 == 1 {
        (!f & mask, true)
    } else {
        (f, false)
    };
    let index = match targets.iter().position(|&t| t == target) {
        Some(i) => i,
        None => {
            targets.push(target);
            targets.len() - 1
        }
    };
    OutputPlan::Target(index, flip)
}

/// State of one synthesis run.
struct Search<'a> {
    problem: Problem<'a>,
    gates: &'a [GateSpec],
    functions: &'a [u64],
    plans: Vec<OutputPlan>,
    budget: Budget,
    calls: usize,
    /// Lower bound on the steps from the relaxed basis, once computed.
    relaxed_bound: Option<usize>,
}

impl Search<'_> {
    fn call(&mut self, shape: Shape) -> Outcome {
        self.calls += 1;
        if self.budget.expired() {
            return Outcome::Stopped;
        }
        encode::solve(&self.problem, &shape, &self.budget)
    }

    /// Fewest steps any network needs: one per distinct target, and enough
    /// gates of the widest arity to join every input a target depends on.
    fn cell_lower_bound(&self, max_arity: usize) -> usize {
        let n = self.problem.inputs;
        let by_support = self
            .problem
            .targets
            .iter()
            .map(|&t| {
                let s = (0..n).filter(|&k| depends_on(t, n, k)).count();
                if max_arity <= 1 {
                    1
                } else {
                    (s.saturating_sub(1)).div_ceil(max_arity - 1).max(1)
                }
            })
            .max()
            .unwrap_or(1);
        by_support.max(self.problem.targets.len())
    }

    /// A lower bound on the steps of any network for the targets, proven
    /// over a relaxed basis: every function of each arity (two and more) the
    /// variants offer, with complements free (normal mode). A network of the
    /// library's cells becomes one of the relaxed basis with at most as many
    /// steps (its inverters and buffers vanish into free complements), so the
    /// relaxed minimum bounds the library's from below. Returns the first
    /// step count not proven impossible over the relaxed basis.
    fn relaxed_lower_bound(&mut self, max_steps: usize) -> usize {
        let n = self.problem.inputs;
        let mut arities: Vec<usize> = self
            .problem
            .variants
            .iter()
            .map(|v| v.arity)
            .filter(|&a| a >= 2)
            .collect();
        arities.sort_unstable();
        arities.dedup();
        if self.problem.normal || arities.is_empty() {
            return 0;
        }
        let relaxed: Vec<Variant> = arities
            .iter()
            .flat_map(|&a| {
                (0..1u64 << (1 << a))
                    .filter(move |&t| t & 1 == 0 && (0..a).all(|p| depends_on(t, a, p)))
                    .map(move |t| Variant {
                        arity: a,
                        truth: t,
                        gate: 0,
                        pins: (0..a).collect(),
                        area: 1.0,
                    })
            })
            .collect();
        let mask = row_mask(n);
        let mut targets: Vec<u64> = Vec::new();
        for &t in &self.problem.targets {
            let t = if t & 1 == 1 { !t & mask } else { t };
            let literal = (0..n).any(|k| t == crate::network::exhaustive_word(k, 0) & mask);
            if t != 0 && !literal && !targets.contains(&t) {
                targets.push(t);
            }
        }
        if targets.is_empty() {
            return 0;
        }
        let widest = arities[arities.len() - 1];
        let by_support = targets
            .iter()
            .map(|&t| {
                let s = (0..n).filter(|&k| depends_on(t, n, k)).count();
                (s.saturating_sub(1)).div_ceil(widest - 1).max(1)
            })
            .max()
            .unwrap_or(1);
        let problem = Problem {
            inputs: n,
            normal: true,
            negated_inputs: false,
            free_output_polarity: false,
            absorbs_inverter: vec![None; relaxed.len()],
            variants: &relaxed,
            targets,
        };
        // The bound is computed once per synthesis and stands in for proofs
        // the limit would stop, so its calls may run four times as long.
        let budget = Budget {
            deadline: self.budget.deadline,
            conflicts: self.budget.conflicts.map(|c| c.saturating_mul(4)),
        };
        let mut k = by_support.max(problem.targets.len());
        while k <= max_steps && !budget.expired() {
            self.calls += 1;
            let shape = Shape {
                steps: k,
                depth: None,
                all_used: true,
                minimal: true,
                max_single_input: None,
                area: None,
            };
            match encode::solve(&problem, &shape, &budget) {
                Outcome::Impossible => k += 1,
                Outcome::Found(_) | Outcome::Stopped => break,
            }
        }
        k
    }

    /// Computes the relaxed lower bound once.
    fn ensure_relaxed_bound(&mut self, max_steps: usize) {
        if self.relaxed_bound.is_none() {
            self.relaxed_bound = Some(self.relaxed_lower_bound(max_steps));
        }
    }

    /// How many single-input steps a network of `k` steps may hold, when
    /// the relaxed bound on its multi-input steps is known.
    fn single_input_cap(&self, k: usize) -> Option<usize> {
        let has_single = self.problem.variants.iter().any(|v| v.arity == 1);
        match self.relaxed_bound {
            Some(bound) if has_single && bound > 0 => Some(k.saturating_sub(bound)),
            _ => None,
        }
    }

    /// The shape of a fewest-cells call with `k` steps.
    fn cells_shape(&self, k: usize) -> Shape {
        Shape {
            steps: k,
            depth: None,
            all_used: true,
            minimal: true,
            max_single_input: self.single_input_cap(k),
            area: None,
        }
    }

    fn min_cells(&mut self, max_arity: usize, max_steps: usize) -> Result<ExactResult, ExactError> {
        let mut proven = true;
        for k in self.cell_lower_bound(max_arity)..=max_steps {
            if k >= EAGER_RELAXATION_STEPS {
                self.ensure_relaxed_bound(max_steps);
            }
            if self.relaxed_bound.is_some_and(|bound| bound > k) {
                continue; // too few steps even over the relaxed basis
            }
            let mut outcome = self.call(self.cells_shape(k));
            if matches!(outcome, Outcome::Stopped)
                && !self.budget.expired()
                && self.relaxed_bound.is_none()
            {
                // The limit stopped this call: a bound from the relaxed basis
                // may rule k out or cap its inverters, then retry once.
                self.ensure_relaxed_bound(max_steps);
                if self.relaxed_bound.is_some_and(|bound| bound > k) {
                    continue;
                }
                if self.single_input_cap(k).is_some() {
                    outcome = self.call(self.cells_shape(k));
                }
            }
            match outcome {
                Outcome::Found(d) => return self.finish(Some(d), proven),
                Outcome::Impossible => {}
                Outcome::Stopped => {
                    if self.budget.expired() {
                        return Err(ExactError::LimitReached);
                    }
                    proven = false;
                }
            }
        }
        Err(if proven {
            ExactError::NotFound(max_steps)
        } else {
            ExactError::LimitReached
        })
    }

    fn min_area(&mut self, max_arity: usize, max_steps: usize) -> Result<ExactResult, ExactError> {
        let first = self.min_cells(max_arity, max_steps)?;
        let mut proven = first.optimal;
        let costs = scaled_areas(self.problem.variants);
        let cheapest = costs.iter().copied().min().unwrap_or(0);
        if costs.iter().all(|&c| c == cheapest) {
            // Equal areas: the fewest cells are the least area.
            return Ok(first);
        }
        let cost_of = |d: &Decoded| d.steps.iter().map(|(v, _)| costs[*v]).sum::<u64>();
        let mut best_decoded: Option<Decoded> = None;
        let mut best = u64::MAX;
        let mut k = first.cells;
        while k <= max_steps {
            if best != u64::MAX && (k as u64) * cheapest >= best {
                return self.finish(best_decoded, proven);
            }
            let limit = if best == u64::MAX { u64::MAX } else { best - 1 };
            match self.call(Shape {
                steps: k,
                depth: None,
                all_used: true,
                minimal: true,
                max_single_input: self.single_input_cap(k),
                area: if best == u64::MAX {
                    None
                } else {
                    Some((costs.clone(), limit))
                },
            }) {
                Outcome::Found(d) => {
                    best = cost_of(&d);
                    best_decoded = Some(d);
                }
                Outcome::Impossible => k += 1,
                Outcome::Stopped => {
                    proven = false;
                    if self.budget.expired() {
                        break;
                    }
                    k += 1;
                }
            }
        }
        match best_decoded {
            Some(d) => {
                let bound_met = (k as u64) * cheapest >= best;
                self.finish(Some(d), proven && bound_met)
            }
            None => Ok(ExactResult {
                optimal: false,
                ..first
            }),
        }
    }

    fn min_depth(&mut self, max_arity: usize, max_steps: usize) -> Result<ExactResult, ExactError> {
        let n = self.problem.inputs;
        let a = max_arity.max(1);
        let mut d = self
            .problem
            .targets
            .iter()
            .map(|&t| {
                let s = (0..n).filter(|&k| depends_on(t, n, k)).count().max(1);
                let mut levels = 0;
                let mut reach = 1;
                while reach < s {
                    reach *= a;
                    levels += 1;
                }
                levels.max(1)
            })
            .max()
            .unwrap_or(1);
        let mut proven = true;
        let lower = self.cell_lower_bound(max_arity);
        while d <= max_steps {
            let per_output: usize = if a == 1 {
                d
            } else {
                (a.pow(d as u32) - 1) / (a - 1)
            };
            let bound = per_output.saturating_mul(self.problem.targets.len());
            let steps = bound.min(max_steps).max(lower);
            match self.call(Shape {
                steps,
                depth: Some(d),
                all_used: false,
                minimal: false,
                max_single_input: None,
                area: None,
            }) {
                Outcome::Found(found) => {
                    let found = prune(found);
                    let mut best = found;
                    for k in lower..best.steps.len() {
                        match self.call(Shape {
                            steps: k,
                            depth: Some(d),
                            all_used: true,
                            minimal: false,
                            max_single_input: None,
                            area: None,
                        }) {
                            Outcome::Found(smaller) => {
                                best = smaller;
                                break;
                            }
                            Outcome::Impossible => {}
                            Outcome::Stopped => {
                                if self.budget.expired() {
                                    break;
                                }
                            }
                        }
                    }
                    return self.finish(Some(best), proven);
                }
                Outcome::Impossible => {
                    if steps < bound {
                        proven = false;
                    }
                }
                Outcome::Stopped => {
                    proven = false;
                    if self.budget.expired() {
                        return Err(ExactError::LimitReached);
                    }
                }
            }
            d += 1;
        }
        Err(if proven {
            ExactError::NotFound(max_steps)
        } else {
            ExactError::LimitReached
        })
    }

    /// Turns a decoded network into a result and checks it by simulation.
    fn finish(&self, decoded: Option<Decoded>, optimal: bool) -> Result<ExactResult, ExactError> {
        let decoded = decoded.unwrap_or(Decoded {
            steps: Vec::new(),
            outputs: Vec::new(),
        });
        let variants: &[Variant] = self.problem.variants;
        let node_operand = |node: &Node| match *node {
            Node::Literal {
                input,
                complemented,
            } => Operand {
                source: Source::Input(input),
                complemented,
            },
            Node::Step(j) => Operand {
                source: Source::Step(j),
                complemented: false,
            },
        };
        let steps: Vec<Step> = decoded
            .steps
            .iter()
            .map(|(v, fanins)| {
                let variant = &variants[*v];
                Step {
                    gate: variant.gate,
                    cell: self.gates[variant.gate].name.clone(),
                    fanins: variant
                        .pins
                        .iter()
                        .map(|&j| node_operand(&fanins[j]))
                        .collect(),
                }
            })
            .collect();
        let outputs: Vec<Operand> = self
            .plans
            .iter()
            .map(|plan| match *plan {
                OutputPlan::Trivial(op) => op,
                OutputPlan::Target(h, flip) => {
                    let (step, complemented) = decoded.outputs[h];
                    Operand {
                        source: Source::Step(step),
                        complemented: complemented != flip,
                    }
                }
            })
            .collect();
        let mut result = ExactResult {
            inputs: self.problem.inputs,
            cells: steps.len(),
            area: steps.iter().map(|s| self.gates[s.gate].area).sum(),
            depth: 0,
            steps,
            outputs,
            optimal,
            sat_calls: self.calls,
        };
        result.depth = result.levels().into_iter().max().unwrap_or(0);
        let simulated = result.simulate(self.gates);
        if simulated != self.functions {
            return Err(ExactError::Internal(format!(
                "network computes {simulated:X?} instead of {:X?}",
                self.functions
            )));
        }
        Ok(result)
    }
}

/// Removes steps that feed no output, renumbering the rest.
fn prune(decoded: Decoded) -> Decoded {
    let k = decoded.steps.len();
    let mut used = vec![false; k];
    for &(s, _) in &decoded.outputs {
        used[s] = true;
    }
    for i in (0..k).rev() {
        if used[i] {
            for node in &decoded.steps[i].1 {
                if let Node::Step(j) = node {
                    used[*j] = true;
                }
            }
        }
    }
    let mut renumber = vec![usize::MAX; k];
    let mut next = 0;
    for i in 0..k {
        if used[i] {
            renumber[i] = next;
            next += 1;
        }
    }
    let steps = decoded
        .steps
        .into_iter()
        .enumerate()
        .filter(|(i, _)| used[*i])
        .map(|(_, (v, fanins))| {
            let fanins = fanins
                .into_iter()
                .map(|n| match n {
                    Node::Step(j) => Node::Step(renumber[j]),
                    other => other,
                })
                .collect();
            (v, fanins)
        })
        .collect();
    let outputs = decoded
        .outputs
        .into_iter()
        .map(|(s, c)| (renumber[s], c))
        .collect();
    Decoded { steps, outputs }
}

/// From this many steps on, the relaxed lower bound is computed before the
/// first call: its few small calls are cheap next to one proof at this size
/// (below it, only a call stopped by a limit asks for it).
const EAGER_RELAXATION_STEPS: usize = 6;

/// Per variant: its complemented twin when the twin costs no more than the
/// variant followed by the cheapest inverter (see `Problem::absorbs_inverter`).
fn inverter_twins(variants: &[Variant]) -> Vec<Option<usize>> {
    let inverter_area = variants
        .iter()
        .filter(|v| v.arity == 1 && v.truth & 0b11 == 0b01)
        .map(|v| v.area)
        .fold(f64::INFINITY, f64::min);
    variants
        .iter()
        .map(|v| {
            if v.arity < 2 || !inverter_area.is_finite() {
                return None;
            }
            let negated = !v.truth & row_mask(v.arity);
            variants.iter().position(|w| {
                w.arity == v.arity && w.truth == negated && w.area <= v.area + inverter_area + 1e-9
            })
        })
        .collect()
}

/// Variant areas as integers: scaled by the smallest power of ten (up to
/// 10^4) that makes all of them whole, rounded beyond that.
fn scaled_areas(variants: &[Variant]) -> Vec<u64> {
    let mut scale = 1.0;
    for _ in 0..4 {
        if variants
            .iter()
            .all(|v| ((v.area * scale).round() - v.area * scale).abs() < 1e-9)
        {
            break;
        }
        scale *= 10.0;
    }
    variants
        .iter()
        .map(|v| (v.area.max(0.0) * scale).round() as u64)
        .collect()
}

impl ExactResult {
    /// Level of each step: 1 + the largest level of its step fanins.
    pub fn levels(&self) -> Vec<usize> {
        let mut levels: Vec<usize> = Vec::with_capacity(self.steps.len());
        for step in &self.steps {
            let level = step
                .fanins
                .iter()
                .map(|f| match f.source {
                    Source::Step(j) => levels[j],
                    _ => 0,
                })
                .max()
                .unwrap_or(0)
                + 1;
            levels.push(level);
        }
        levels
    }

    /// Whether every step names a gate of `gates` with the right number of
    /// pins and every signal refers to an input below `inputs` or an earlier
    /// step (checked before simulating a network read from a file).
    pub fn is_well_formed(&self, gates: &[GateSpec]) -> bool {
        let operand_ok = |op: &Operand, steps_before: usize| match op.source {
            Source::Constant => true,
            Source::Input(k) => k < self.inputs,
            Source::Step(j) => j < steps_before,
        };
        self.inputs <= 6
            && self.steps.iter().enumerate().all(|(i, step)| {
                gates
                    .get(step.gate)
                    .is_some_and(|g| g.arity == step.fanins.len())
                    && step.fanins.iter().all(|f| operand_ok(f, i))
            })
            && self.outputs.iter().all(|o| operand_ok(o, self.steps.len()))
    }

    /// Truth table of every output, computed by simulating the steps with
    /// the gates' truth tables (`gates` must be the list given to
    /// [`synthesize`]).
    pub fn simulate(&self, gates: &[GateSpec]) -> Vec<u64> {
        let mask = row_mask(self.inputs);
        let mut values: Vec<u64> = Vec::with_capacity(self.steps.len());
        let word = |op: &Operand, values: &[u64]| -> u64 {
            let w = match op.source {
                Source::Constant => 0,
                Source::Input(k) => crate::network::exhaustive_word(k, 0) & mask,
                Source::Step(j) => values[j],
            };
            if op.complemented {
                !w & mask
            } else {
                w
            }
        };
        for step in &self.steps {
            let gate = &gates[step.gate];
            let pins: Vec<u64> = step.fanins.iter().map(|f| word(f, &values)).collect();
            let mut out = 0u64;
            for cell_row in 0..(1usize << gate.arity) {
                if gate.truth >> cell_row & 1 == 1 {
                    let mut term = mask;
                    for (p, w) in pins.iter().enumerate() {
                        term &= if cell_row >> p & 1 == 1 { *w } else { !*w };
                    }
                    out |= term;
                }
            }
            values.push(out & mask);
        }
        self.outputs.iter().map(|o| word(o, &values)).collect()
    }

    /// The network as a small netlist, one line per step:
    /// `s1 = xor2(x0, s0)`, then one line per output: `y0 = !s1`.
    pub fn netlist(&self) -> Vec<String> {
        let name = |op: &Operand| -> String {
            let base = match op.source {
                Source::Constant => {
                    return if op.complemented {
                        "1".into()
                    } else {
                        "0".into()
                    }
                }
                Source::Input(k) => format!("x{k}"),
                Source::Step(j) => format!("s{j}"),
            };
            if op.complemented {
                format!("!{base}")
            } else {
                base
            }
        };
        let mut lines = Vec::with_capacity(self.steps.len() + self.outputs.len());
        for (i, step) in self.steps.iter().enumerate() {
            let fanins: Vec<String> = step.fanins.iter().map(name).collect();
            lines.push(format!("s{i} = {}({})", step.cell, fanins.join(", ")));
        }
        for (h, out) in self.outputs.iter().enumerate() {
            lines.push(format!("y{h} = {}", name(out)));
        }
        lines
    }

    /// The network as a logic [`Network`] with inputs `x0..` and outputs
    /// `y0..`, each step built from its gate's truth table.
    pub fn to_network(&self, gates: &[GateSpec]) -> Network {
        let mut net = Network::new("exact");
        let inputs: Vec<Lit> = (0..self.inputs)
            .map(|k| {
                net.add_input(format!("x{k}"))
                    .expect("generated input names are unique")
            })
            .collect();
        let mut steps: Vec<Lit> = Vec::with_capacity(self.steps.len());
        let lit = |op: &Operand, steps: &[Lit]| -> Lit {
            let base = match op.source {
                Source::Constant => Lit::FALSE,
                Source::Input(k) => inputs[k],
                Source::Step(j) => steps[j],
            };
            base.xor(op.complemented)
        };
        for step in &self.steps {
            let fanins: Vec<Lit> = step.fanins.iter().map(|f| lit(f, &steps)).collect();
            let out = net.from_truth(gates[step.gate].truth, &fanins);
            steps.push(out);
        }
        for (h, out) in self.outputs.iter().enumerate() {
            let l = lit(out, &steps);
            net.add_output(format!("y{h}"), l)
                .expect("generated output names are unique");
        }
        net
    }
}
