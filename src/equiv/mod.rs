//! Combinational equivalence checking: is a mapped netlist still the circuit
//! it was mapped from?
//!
//! [`check`] answers with a [`Verdict`] that never claims more than it has
//! shown: *equivalent* only when every compared output is proven, *different*
//! only with a [`Counterexample`] that has been replayed on the two original
//! networks, and *undecided* (naming the outputs) when a work limit stopped a
//! proof.
//!
//! How the parts fit:
//! 1. [`ports`] pairs inputs, outputs and storage elements of the two networks
//!    (by name, by order, or from a port map; [`parse_port_map`] reads one).
//!    Storage elements are compared combinationally: paired storage outputs
//!    are shared inputs, paired next-state functions are compared like
//!    outputs.
//! 2. [`miter`] copies both networks into one structurally hashed network
//!    over shared inputs; output pairs that hash to the same literal are
//!    proven by construction.
//! 3. [`classes`] simulates the miter on random 64-bit pattern words and
//!    groups nodes with equal values up to complement into candidate classes;
//!    an output pair whose values already differ yields a counterexample at
//!    once.
//!    Miters with few inputs (24 by default) are instead proven by
//!    enumerating every input pattern on all cores ([`exhaustive`]), a
//!    complete proof.
//! 4. [`sweep`] proves candidate pairs bottom-up, merging what it proves and
//!    refining the classes with every counterexample. Each pair is first
//!    tried on a small [`window`] of logic below it (a fresh solver, the
//!    window's frontier left free: UNSAT is a proof, SAT proves nothing);
//!    what the window cannot prove goes to the incremental SAT [`oracle`]
//!    (one varisat solver, lazily Tseitin-encoded cones, assumptions, a work
//!    limit), whose counterexamples are real input patterns.
//! 5. The output pairs are then proven on the reduced network the same way
//!    (window first, then the oracle); a satisfiable oracle query gives the
//!    counterexample, [`replay`] checks it on the original networks and
//!    lists the outputs it separates.
//!
//! Multipliers and adders of different architectures share too little
//! logic for sweeping; with [`EquivOptions::spec`] set, each side is instead
//! proven against the word-level specification by [`algebra`] (backward
//! rewriting), and a side that fails gives a counterexample replayed on both
//! networks.
//!
//! # Example
//!
//! ```
//! use ribbonmap::equiv::{check, EquivOptions, Verdict};
//! use ribbonmap::network::Network;
//!
//! // a ^ b written two ways.
//! let mut x = Network::new("x");
//! let (a, b) = (x.add_input("a").unwrap(), x.add_input("b").unwrap());
//! let f = x.xor(a, b);
//! x.add_output("f", f).unwrap();
//!
//! let mut y = Network::new("y");
//! let (a, b) = (y.add_input("a").unwrap(), y.add_input("b").unwrap());
//! let (t, e) = (y.and(a, !b), y.and(!a, b));
//! let f = y.or(t, e);
//! y.add_output("f", f).unwrap();
//!
//! let verdict = check(&x, &y, &EquivOptions::default()).unwrap();
//! assert!(matches!(verdict, Verdict::Equivalent { outputs_checked: 1 }));
//! ```

pub mod algebra;
pub(crate) mod classes;
mod exhaustive;
mod miter;
pub(crate) mod oracle;
mod ports;
mod progress;
pub use progress::show_progress;
mod replay;
mod sweep;
mod window;

pub use algebra::{AlgebraOptions, AlgebraStats, ArithSpec};
pub use oracle::OracleStats;
pub use ports::parse_port_map;
pub use sweep::SweepStats;
pub use window::WindowStats;

use indexmap::IndexMap;
use std::time::Instant;

use crate::network::{lit_word, Network};
use classes::Classes;
use miter::Miter;
use oracle::{Answer, Oracle};
use window::{WindowAnswer, WindowProver};

/// How the ports of the two networks are paired.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub enum PortMatching {
    /// Ports with the same name (inputs with inputs, outputs with outputs,
    /// storage elements with storage elements).
    #[default]
    ByName,
    /// Ports in declaration order, kind by kind.
    ByOrder,
    /// Explicit `(name in A, name in B)` pairs; ports not listed are paired
    /// by name.
    Map(Vec<(String, String)>),
}

/// Options of [`check`].
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct EquivOptions {
    /// How ports are paired.
    pub ports: PortMatching,
    /// Work limit of one SAT call, in (approximate) conflicts; 0 means no
    /// limit. See the [`oracle`] module for how it is enforced.
    pub conflict_limit: u64,
    /// 64-pattern words of random simulation that seed the candidate classes.
    pub sim_words: usize,
    /// Seed of the random patterns (the check is deterministic for a seed).
    pub seed: u64,
    /// Sweep internal equivalences before proving outputs (turning this off
    /// leaves the outputs to plain SAT; useful only for measurements).
    pub sweep: bool,
    /// Miters with at most this many inputs are proven by enumerating every
    /// input pattern instead of by SAT (0 turns enumeration off).
    pub enumerate_up_to: usize,
    /// Gates at most in the window of a local proof, tried on every
    /// candidate pair before the global solver (0 turns window proofs off).
    /// See the `window` module.
    pub window_gates: usize,
    /// Prove each side against this word-level function instead of
    /// sweeping (see [`algebra`]); the words follow [`EquivOptions::ports`]:
    /// declaration order for [`PortMatching::ByOrder`], bus names otherwise.
    pub spec: Option<ArithSpec>,
    /// Limits of the algebraic proof.
    pub algebra: AlgebraOptions,
}

impl Default for EquivOptions {
    fn default() -> Self {
        EquivOptions {
            ports: PortMatching::ByName,
            conflict_limit: 200_000,
            sim_words: 16,
            seed: 0x5EED_F00D,
            sweep: true,
            enumerate_up_to: 24,
            window_gates: 200,
            spec: None,
            algebra: AlgebraOptions::default(),
        }
    }
}

/// An input assignment on which the two networks differ.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Counterexample {
    /// Value of every paired input and storage output, under A's names, in
    /// A's declaration order (inputs, then storage elements).
    pub inputs: IndexMap<String, bool>,
    /// Names (A's; next-state functions as `next(NAME)`) of the compared
    /// outputs that differ under this assignment.
    pub differing_outputs: Vec<String>,
    /// For each differing output, its value in A and in B.
    pub output_values: Vec<(bool, bool)>,
}

/// The answer of an equivalence check.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Verdict {
    /// Every compared output pair is proven equal.
    Equivalent {
        /// Output pairs compared (primary outputs plus storage next-states).
        outputs_checked: usize,
    },
    /// The networks differ; the counterexample shows where.
    Different {
        /// An input assignment replayed on both original networks.
        counterexample: Counterexample,
        /// Output pairs compared.
        outputs_checked: usize,
    },
    /// A work limit stopped the proof of these outputs; none was found to
    /// differ.
    Undecided {
        /// The outputs left unproven.
        outputs: Vec<String>,
        /// Output pairs compared.
        outputs_checked: usize,
    },
}

impl Verdict {
    /// `equivalent`, `different` or `undecided`.
    pub fn name(&self) -> &'static str {
        match self {
            Verdict::Equivalent { .. } => "equivalent",
            Verdict::Different { .. } => "different",
            Verdict::Undecided { .. } => "undecided",
        }
    }

    /// Output pairs compared.
    pub fn outputs_checked(&self) -> usize {
        match self {
            Verdict::Equivalent { outputs_checked }
            | Verdict::Different {
                outputs_checked, ..
            }
            | Verdict::Undecided {
                outputs_checked, ..
            } => *outputs_checked,
        }
    }
}

/// Why two networks could not be compared.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum EquivError {
    /// Ports without a partner, each described as e.g. `input 'x' of the
    /// first netlist`.
    #[error("ports without a partner: {}", .0.join(", "))]
    UnmatchedPorts(Vec<String>),
    /// A port map names a port that does not exist or pairs ports of
    /// different kinds.
    #[error("{0}")]
    BadPortMap(String),
    /// A counterexample did not replay on the original networks (a bug).
    #[error("{0}")]
    Internal(String),
}

/// Per-phase timings (seconds) and work counters of a check.
#[derive(Clone, Debug, Default, PartialEq, serde::Serialize)]
pub struct EquivStats {
    /// Nodes of the miter.
    pub miter_nodes: usize,
    /// Nodes of the reduced network after sweeping.
    pub reduced_nodes: usize,
    /// Output pairs identical after structural hashing.
    pub outputs_by_hashing: usize,
    /// Candidate classes after random simulation.
    pub initial_classes: usize,
    /// Sweep counters.
    pub sweep: SweepStats,
    /// Window (local proof) counters.
    pub window: WindowStats,
    /// SAT oracle counters.
    pub oracle: OracleStats,
    /// Seconds building the miter.
    pub miter_seconds: f64,
    /// Seconds of random simulation.
    pub simulation_seconds: f64,
    /// Seconds sweeping internal nodes.
    pub sweep_seconds: f64,
    /// Seconds in window proofs, sweep and outputs together (part of
    /// `sweep_seconds` plus `output_seconds`).
    pub window_seconds: f64,
    /// Seconds proving the outputs.
    pub output_seconds: f64,
    /// The algebraic proofs of the two sides, when a specification was given.
    pub spec: Option<SpecStats>,
    /// The command-line option of the limit that left the verdict
    /// undecided (`--conflict-limit` or `--term-limit`), if one did.
    pub stopped_by: Option<String>,
}

/// How each side fared against the word-level specification.
#[derive(Clone, Debug, Default, PartialEq, serde::Serialize)]
pub struct SpecStats {
    /// The specification (`mul`, `add` or `mac`).
    pub spec: String,
    /// `proven`, `refuted` or `undecided` for the first netlist.
    pub a: String,
    /// The same for the second netlist.
    pub b: String,
    /// Rewriting counters of the first netlist.
    pub a_algebra: AlgebraStats,
    /// Rewriting counters of the second netlist.
    pub b_algebra: AlgebraStats,
}

/// A verdict with the statistics of how it was reached.
#[derive(Clone, Debug, PartialEq)]
pub struct EquivReport {
    /// The answer.
    pub verdict: Verdict,
    /// Timings and counters.
    pub stats: EquivStats,
}

/// Checks whether `a` and `b` compute the same functions on paired ports.
///
/// Deterministic for given options. Errors only when ports cannot be paired
/// (or, as a bug, when a counterexample fails to replay). Cost: linear
/// simulation plus one SAT query per candidate pair, each bounded by
/// `opts.conflict_limit`.
pub fn check(a: &Network, b: &Network, opts: &EquivOptions) -> Result<Verdict, EquivError> {
    check_with_stats(a, b, opts).map(|r| r.verdict)
}

/// [`check`] with per-phase timings and counters.
pub fn check_with_stats(
    a: &Network,
    b: &Network,
    opts: &EquivOptions,
) -> Result<EquivReport, EquivError> {
    let mut stats = EquivStats::default();
    let started = Instant::now();
    let ports = ports::pair_ports(a, b, &opts.ports)?;
    let miter = Miter::build(a, b, &ports);
    if let Some(spec) = opts.spec {
        stats.miter_seconds = started.elapsed().as_secs_f64();
        if let Some(report) = check_by_spec(a, b, &ports, &miter, spec, opts, &mut stats)? {
            return Ok(report);
        }
    }
    let outputs_checked = miter.pairs.len();
    stats.miter_nodes = miter.network.num_nodes();
    stats.outputs_by_hashing = miter.pairs.iter().filter(|p| p.a == p.b).count();
    stats.miter_seconds = started.elapsed().as_secs_f64();

    // Fast path: everything identical by construction.
    if stats.outputs_by_hashing == outputs_checked {
        return Ok(EquivReport {
            verdict: Verdict::Equivalent { outputs_checked },
            stats,
        });
    }

    // Random simulation: candidate classes, and cheap counterexamples.
    let started = Instant::now();
    let words = opts.sim_words.max(1);
    let signatures = classes::random_signatures(&miter.network, words, opts.seed);
    let mut classes = Classes::from_signatures(&signatures, words);
    stats.initial_classes = classes.count();
    stats.simulation_seconds = started.elapsed().as_secs_f64();
    if let Some(pattern) = simulation_counterexample(&miter, &signatures, words, opts.seed) {
        let counterexample = replay::replay(a, b, &ports, &miter, &pattern)?;
        return Ok(EquivReport {
            verdict: Verdict::Different {
                counterexample,
                outputs_checked,
            },
            stats,
        });
    }

    // Narrow miters: enumerating every pattern is a complete proof.
    let started = Instant::now();
    if let Some(outcome) = exhaustive::enumerate(&miter, opts.enumerate_up_to) {
        stats.simulation_seconds += started.elapsed().as_secs_f64();
        let verdict = match outcome {
            exhaustive::Enumerated::Equal => Verdict::Equivalent { outputs_checked },
            exhaustive::Enumerated::Differ(pattern) => Verdict::Different {
                counterexample: replay::replay(a, b, &ports, &miter, &pattern)?,
                outputs_checked,
            },
        };
        return Ok(EquivReport { verdict, stats });
    }

    let mut oracle = Oracle::new(opts.conflict_limit);
    let mut window = WindowProver::new(opts.window_gates);
    let started = Instant::now();
    let swept = if opts.sweep {
        sweep::sweep(
            &miter.network,
            &mut classes,
            &mut window,
            &mut oracle,
            &mut stats.sweep,
        )
    } else {
        let mut none = Classes::none(miter.network.num_nodes());
        sweep::sweep(
            &miter.network,
            &mut none,
            &mut window,
            &mut oracle,
            &mut stats.sweep,
        )
    };
    stats.reduced_nodes = swept.reduced.num_nodes();
    stats.sweep_seconds = started.elapsed().as_secs_f64();

    let started = Instant::now();
    let mut undecided = Vec::new();
    let mut verdict = None;
    let progress = progress::Progress::new("output proofs", miter.pairs.len() as u64);
    for pair in &miter.pairs {
        progress.advance(1);
        let (x, y) = (swept.lit(pair.a), swept.lit(pair.b));
        if window.prove(&swept.reduced, x, y) == WindowAnswer::Proven {
            continue;
        }
        match oracle.equal(&swept.reduced, x, y) {
            Answer::Equal => {}
            Answer::Unknown => undecided.push(pair.name.clone()),
            Answer::Differ(pattern) => {
                let counterexample = replay::replay(a, b, &ports, &miter, &pattern)?;
                verdict = Some(Verdict::Different {
                    counterexample,
                    outputs_checked,
                });
                break;
            }
        }
    }
    progress.finish();
    stats.output_seconds = started.elapsed().as_secs_f64();
    stats.oracle = oracle.stats;
    stats.window = window.stats;
    stats.window_seconds = window.seconds;
    if verdict.is_none() && !undecided.is_empty() {
        stats.stopped_by = Some("--conflict-limit".into());
    }
    let verdict = verdict.unwrap_or(if undecided.is_empty() {
        Verdict::Equivalent { outputs_checked }
    } else {
        Verdict::Undecided {
            outputs: undecided,
            outputs_checked,
        }
    });
    Ok(EquivReport { verdict, stats })
}

fn outcome_name(outcome: &algebra::SpecOutcome) -> &'static str {
    match outcome {
        algebra::SpecOutcome::Proven => "proven",
        algebra::SpecOutcome::Refuted(_) => "refuted",
        algebra::SpecOutcome::Undecided { .. } => "undecided",
    }
}

/// The specification route: proves each side against `spec` by rewriting.
/// Returns `None` when both sides are refuted but no pattern of theirs
/// separates them (both wrong alike), leaving the question to sweeping.
fn check_by_spec(
    a: &Network,
    b: &Network,
    ports: &ports::PortPairs,
    miter: &Miter,
    spec: ArithSpec,
    opts: &EquivOptions,
    stats: &mut EquivStats,
) -> Result<Option<EquivReport>, EquivError> {
    use algebra::SpecOutcome;
    let by_name = opts.ports != PortMatching::ByOrder;
    let outputs_checked = miter.pairs.len();
    let started = Instant::now();
    let mut sides: Vec<(SpecOutcome, AlgebraStats, &Vec<usize>)> = Vec::new();
    for (net, order) in [(a, &miter.a_inputs), (b, &miter.b_inputs)] {
        let words = algebra::arith_words(net, spec, by_name).map_err(EquivError::BadPortMap)?;
        // Once A is proven, a blow-up of B hands over early to sweeping B
        // against A (B equal to a proven A is proven; a B that differs
        // gives its counterexample there).
        let mut limits = opts.algebra.clone();
        if sides.first().is_some_and(|s| s.0 == SpecOutcome::Proven) {
            let handover = algebra::HANDOVER_TERMS;
            limits.term_limit = match limits.term_limit {
                0 => handover,
                l => l.min(handover),
            };
        }
        let (outcome, algebra_stats) = algebra::prove_against_spec(net, spec, &words, &limits)
            .map_err(|e| match e {
                algebra::AlgebraError::Words(m) => EquivError::BadPortMap(m),
                algebra::AlgebraError::Internal(m) => EquivError::Internal(m),
            })?;
        sides.push((outcome, algebra_stats, order));
    }
    stats.output_seconds = started.elapsed().as_secs_f64();
    stats.spec = Some(SpecStats {
        spec: spec.to_string(),
        a: outcome_name(&sides[0].0).into(),
        b: outcome_name(&sides[1].0).into(),
        a_algebra: sides[0].1.clone(),
        b_algebra: sides[1].1.clone(),
    });
    // A refuted side: its pattern, moved to miter input order, separates
    // the two networks unless the other side is wrong the same way there.
    let mut verdict = None;
    for (outcome, _, order) in &sides {
        if let (SpecOutcome::Refuted(pattern), None) = (outcome, &verdict) {
            let mut on_miter = vec![false; miter.input_names.len()];
            for (k, &i) in order.iter().enumerate() {
                on_miter[i] = pattern[k];
            }
            if let Ok(counterexample) = replay::replay(a, b, ports, miter, &on_miter) {
                verdict = Some(Verdict::Different {
                    counterexample,
                    outputs_checked,
                });
            }
        }
    }
    let undecided = |o: &SpecOutcome| matches!(o, SpecOutcome::Undecided { .. });
    let verdict = match verdict {
        Some(v) => v,
        None if sides.iter().all(|s| s.0 == SpecOutcome::Proven) => {
            Verdict::Equivalent { outputs_checked }
        }
        // One side proven, the other too large to rewrite (a mapped
        // netlist whose cells split the full adders): sweeping the two
        // against each other finishes the proof through the proven side.
        None if sides.iter().any(|s| s.0 == SpecOutcome::Proven) => return Ok(None),
        None if sides.iter().any(|s| undecided(&s.0)) => {
            stats.stopped_by = Some("--term-limit".into());
            Verdict::Undecided {
                outputs: miter.pairs.iter().map(|p| p.name.clone()).collect(),
                outputs_checked,
            }
        }
        // Both wrong alike on their own patterns: let sweeping decide.
        None => return Ok(None),
    };
    Ok(Some(EquivReport {
        verdict,
        stats: stats.clone(),
    }))
}

/// A random pattern on which some output pair already differs, if any.
fn simulation_counterexample(
    miter: &Miter,
    signatures: &[u64],
    words: usize,
    seed: u64,
) -> Option<Vec<bool>> {
    let word_of = |lit: crate::network::Lit, w: usize| {
        let v = signatures[lit.node().index() * words + w];
        if lit.is_complemented() {
            !v
        } else {
            v
        }
    };
    for pair in &miter.pairs {
        for w in 0..words {
            let diff = word_of(pair.a, w) ^ word_of(pair.b, w);
            if diff != 0 {
                let bit = diff.trailing_zeros();
                // Regenerate the input words of word `w` (same generator as
                // the simulation) and read pattern `bit`.
                let inputs = classes::random_input_words(&miter.network, seed, w);
                let pattern: Vec<bool> = inputs.iter().map(|&x| (x >> bit) & 1 == 1).collect();
                debug_assert_eq!(
                    {
                        let values = miter.network.simulate(&inputs);
                        ((lit_word(&values, pair.a) ^ lit_word(&values, pair.b)) >> bit) & 1
                    },
                    1
                );
                return Some(pattern);
            }
        }
    }
    None
}
