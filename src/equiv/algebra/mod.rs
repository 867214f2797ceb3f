//! Algebraic verification of multipliers and adders against a word-level
//! specification.
//!
//! Why: two multipliers of different architectures (array against Dadda or
//! Wallace trees) share almost no internal signals, so SAT sweeping finds
//! nothing to merge and the output proofs blow up. Backward rewriting
//! (Ciesielski, Yu, Brown, Liu, Rossi, "Verification of gate-level
//! arithmetic circuits by function extraction", DAC 2015; Kaufmann, Biere,
//! Kauers, "Verifying large multipliers by combining SAT and computer
//! algebra", FMCAD 2019) instead proves one circuit at a time against the
//! integer function it is meant to compute: the polynomial
//! `sum 2^i z_i - spec(inputs)` is rewritten gate by gate, from the outputs
//! back to the inputs; the circuit is correct exactly when nothing remains
//! (modulo `2^W`, W the number of output bits).
//!
//! How the parts fit:
//! - [`words`] finds the input words A, B, C and the output word;
//! - `cuts` enumerates cuts with truth tables, through existing nodes too;
//! - `recover` turns the network into XOR, majority and AND gates with
//!   full and half adders made explicit, so the polynomial stays linear
//!   between adder columns;
//! - `poly` holds the polynomial modulo `2^W` and rewrites it.
//!
//! A non-zero remainder gives a counterexample at once: set the variables
//! of one of its smallest monomials to 1 and all others to 0, and the
//! remainder evaluates to that monomial's non-zero coefficient. The pattern
//! is simulated on the network before it is reported.
//!
//! Wrong circuits are mostly refuted before rewriting starts: `screen`
//! simulates the circuit against the specification on corner and random
//! patterns, and searches longer when the polynomial blows up (a wrong
//! circuit's remainder can grow to the term limit before it shows).

mod cuts;
mod poly;
mod recover;
mod reference;
mod screen;
pub mod words;

use std::fmt;
use std::str::FromStr;
use std::time::Instant;

use num_bigint::BigUint;

use super::progress::Progress;
use crate::network::{lit_word, Network};
use poly::{gate_product, gate_sum, literal, GatePoly, Rewriter};
use recover::Gate;
pub use words::{arith_words, Words};

/// The integer function the output word must compute, modulo `2^W` (W the
/// number of output bits; with W at least the width of the exact result
/// this is the exact result).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum ArithSpec {
    /// `A * B`.
    Mul,
    /// `A + B + C` (C the carry-in, when there is one).
    Add,
    /// `A * B + C`.
    Mac,
}

impl fmt::Display for ArithSpec {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            ArithSpec::Mul => "mul",
            ArithSpec::Add => "add",
            ArithSpec::Mac => "mac",
        })
    }
}

impl FromStr for ArithSpec {
    type Err = String;
    fn from_str(s: &str) -> Result<ArithSpec, String> {
        match s {
            "mul" => Ok(ArithSpec::Mul),
            "add" => Ok(ArithSpec::Add),
            "mac" => Ok(ArithSpec::Mac),
            other => Err(format!(
                "unknown specification '{other}' (expected mul, add or mac)"
            )),
        }
    }
}

/// Default of [`AlgebraOptions::term_limit`].
pub const DEFAULT_TERM_LIMIT: usize = 2_000_000;

/// Default of [`AlgebraOptions::search_at_terms`]: far above the peak of a
/// correct adder or multiplier whose full adders are recovered.
pub const DEFAULT_SEARCH_AT_TERMS: usize = 100_000;

/// Term limit of side B of `equiv --spec` once side A is proven: beyond
/// it, B is proven or refuted by sweeping against A instead (a mapped
/// netlist whose cells hide some full adders from recovery blows up here
/// within seconds, while sweeping it against its proven original takes a
/// fraction of a second).
pub const HANDOVER_TERMS: usize = 100_000;

/// Seed of the simulation that looks for counterexamples.
const SCREEN_SEED: u64 = 0x5EED_0017;

/// Monomials at most when rewriting an adder before it is proven by
/// sweeping against a ripple reference instead (a correct ripple or
/// carry-select adder stays far below; parallel-prefix adders pass it
/// within a fraction of a second).
pub const ADDER_TERM_BUDGET: usize = 50_000;

/// Options of [`prove_against_spec`].
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct AlgebraOptions {
    /// Monomials alive at most during rewriting (0: no limit); a larger
    /// polynomial stops the proof as undecided. Bounds memory: each
    /// monomial costs roughly 100 bytes.
    pub term_limit: usize,
    /// Monomials alive at which rewriting pauses once for a longer
    /// simulation search for a counterexample (0: never).
    pub search_at_terms: usize,
}

impl Default for AlgebraOptions {
    fn default() -> Self {
        AlgebraOptions {
            term_limit: DEFAULT_TERM_LIMIT,
            search_at_terms: DEFAULT_SEARCH_AT_TERMS,
        }
    }
}

/// The answer for one circuit.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum SpecOutcome {
    /// The output word equals the specification on every input.
    Proven,
    /// An input pattern (one value per combinational input, in
    /// [`Network::combinational_inputs`] order) on which the output word
    /// differs from the specification, confirmed by simulation.
    Refuted(Vec<bool>),
    /// The polynomial outgrew [`AlgebraOptions::term_limit`].
    Undecided {
        /// The limit reached.
        term_limit: usize,
        /// Gates left to rewrite when it was reached.
        gates_left: usize,
    },
}

/// Counters and time of one algebraic proof.
#[derive(Clone, Debug, Default, PartialEq, serde::Serialize)]
pub struct AlgebraStats {
    /// Gates rewritten (after XOR and majority recovery).
    pub gates: usize,
    /// XOR gates of three inputs among them (full-adder sums).
    pub xor3: usize,
    /// Majority gates among them.
    pub maj: usize,
    /// Most monomials alive at once.
    pub peak_terms: usize,
    /// Monomials left at the end (0 when proven).
    pub remainder_terms: usize,
    /// How the verdict was reached: `rewriting`; `simulation` when a
    /// simulated pattern refuted the circuit (before or during rewriting);
    /// or `sweeping against a ripple reference` when rewriting of an adder
    /// hit the term limit.
    pub method: String,
    /// Seconds spent.
    pub seconds: f64,
}

/// Why an algebraic proof could not run.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
pub enum AlgebraError {
    /// The ports do not form the words the specification needs.
    #[error("{0}")]
    Words(String),
    /// A counterexample did not replay (a bug).
    #[error("{0}")]
    Internal(String),
}

fn gate_polynomial(gate: &Gate) -> GatePoly {
    match gate {
        Gate::And([x, y]) => gate_product(&literal(x.0, x.1), &literal(y.0, y.1)),
        Gate::Xor(vars, out) => {
            let mut p = literal(vars[0], false);
            for &v in &vars[1..] {
                let q = literal(v, false);
                let pq = gate_product(&p, &q);
                p = gate_sum(&[(1, &p), (1, &q), (-2, &pq)]);
            }
            if *out {
                gate_sum(&[(1, &vec![(vec![], 1)]), (-1, &p)])
            } else {
                p
            }
        }
        Gate::Maj([x, y, z]) => {
            let (x, y, z) = (literal(x.0, x.1), literal(y.0, y.1), literal(z.0, z.1));
            let xy = gate_product(&x, &y);
            let xz = gate_product(&x, &z);
            let yz = gate_product(&y, &z);
            let xyz = gate_product(&xy, &z);
            gate_sum(&[(1, &xy), (1, &xz), (1, &yz), (-2, &xyz)])
        }
    }
}

fn power(k: usize) -> BigUint {
    BigUint::from(1u8) << k
}

/// Adds `-spec(A, B, C)` to the rewriter, over input variables.
fn subtract_spec(r: &mut Rewriter, spec: ArithSpec, words: &Words) {
    let var = |p: usize| p as u32;
    let linear = |r: &mut Rewriter, word: &[usize]| {
        for (k, &p) in word.iter().enumerate() {
            r.add(vec![var(p)], power(k), true);
        }
    };
    match spec {
        ArithSpec::Add => {
            linear(r, &words.a);
            linear(r, &words.b);
        }
        ArithSpec::Mul | ArithSpec::Mac => {
            for (j, &x) in words.a.iter().enumerate() {
                for (k, &y) in words.b.iter().enumerate() {
                    let mut m = vec![var(x), var(y)];
                    m.sort_unstable();
                    m.dedup();
                    r.add(m, power(j + k), true);
                }
            }
        }
    }
    linear(r, &words.c);
}

fn word_value(pattern: &[bool], word: &[usize]) -> BigUint {
    let mut v = BigUint::ZERO;
    for (k, &p) in word.iter().enumerate() {
        if pattern[p] {
            v |= power(k);
        }
    }
    v
}

/// The output word of `net` on `pattern`, and the specification's value
/// modulo `2^W`, both by simulation and integer arithmetic.
pub fn simulate_against_spec(
    net: &Network,
    spec: ArithSpec,
    words: &Words,
    pattern: &[bool],
) -> (BigUint, BigUint) {
    let ci: Vec<u64> = pattern.iter().map(|&b| if b { 1 } else { 0 }).collect();
    let values = net.simulate(&ci);
    let outs = net.combinational_outputs();
    let mut got = BigUint::ZERO;
    for (k, &p) in words.outputs.iter().enumerate() {
        if lit_word(&values, outs[p]) & 1 == 1 {
            got |= power(k);
        }
    }
    let (a, b, c) = (
        word_value(pattern, &words.a),
        word_value(pattern, &words.b),
        word_value(pattern, &words.c),
    );
    let exact = match spec {
        ArithSpec::Add => a + b + c,
        ArithSpec::Mul | ArithSpec::Mac => a * b + c,
    };
    let want = exact & (power(words.outputs.len()) - 1u8);
    (got, want)
}

/// How one rewriting pass ended.
enum Pass {
    /// Every gate eliminated; the remainder's smallest monomial, if any
    /// (variables are input positions).
    Finished(Option<Vec<u32>>),
    /// The polynomial outgrew the limit with this many gates left.
    Blown(usize),
}

/// One backward-rewriting pass over `net`, filling the counters of `stats`.
fn rewrite(
    net: &Network,
    spec: ArithSpec,
    words: &Words,
    limit: usize,
    extended: bool,
    stats: &mut AlgebraStats,
) -> Pass {
    let outs = net.combinational_outputs();
    let roots: Vec<_> = words.outputs.iter().map(|&p| outs[p]).collect();
    let rec = recover::recover(net, &roots, extended);
    stats.gates = rec.gates.len();
    stats.xor3 = rec
        .gates
        .iter()
        .filter(|g| matches!(g, Gate::Xor(v, _) if v.len() == 3))
        .count();
    stats.maj = rec
        .gates
        .iter()
        .filter(|g| matches!(g, Gate::Maj(_)))
        .count();
    let n_vars = rec.inputs + rec.gates.len();
    let is_gate: Vec<bool> = (0..n_vars).map(|v| v >= rec.inputs).collect();
    let mut rewriter = Rewriter::new(roots.len(), is_gate);
    for (k, &(var, complemented)) in rec.roots.iter().enumerate() {
        if var == u32::MAX {
            if complemented {
                rewriter.add(Vec::new(), power(k), false);
            }
        } else {
            for (m, c) in literal(var, complemented) {
                rewriter.add(m, power(k), c < 0);
            }
        }
    }
    subtract_spec(&mut rewriter, spec, words);
    let progress = Progress::new("algebraic rewriting", rec.gates.len() as u64);
    for (i, gate) in rec.gates.iter().enumerate().rev() {
        let var = (rec.inputs + i) as u32;
        let blown = rewriter
            .eliminate(var, &gate_polynomial(gate), limit)
            .is_err();
        stats.peak_terms = stats.peak_terms.max(rewriter.peak_terms);
        if blown {
            progress.finish();
            return Pass::Blown(i + 1);
        }
        progress.advance(1);
    }
    progress.finish();
    let remainder = rewriter.remainder();
    stats.remainder_terms = remainder.len();
    Pass::Finished(
        remainder
            .keys()
            .min_by_key(|m| (m.len(), m.to_vec()))
            .map(|m| m.to_vec()),
    )
}

/// Proves that the output word of `net` computes `spec` of its input
/// words. Deterministic. First simulation against the specification on
/// corner and random patterns (a wrong circuit is mostly refuted there, in
/// milliseconds); then backward rewriting, whose cost is roughly linear in
/// the gates for adders and for array, Wallace and Dadda multipliers whose
/// full adders are recovered. When the polynomial outgrows
/// [`AlgebraOptions::search_at_terms`], a longer simulation search looks for
/// a counterexample, and rewriting starts again, bounded by
/// `opts.term_limit`.
pub fn prove_against_spec(
    net: &Network,
    spec: ArithSpec,
    words: &Words,
    opts: &AlgebraOptions,
) -> Result<(SpecOutcome, AlgebraStats), AlgebraError> {
    let started = Instant::now();
    if let Some(pattern) = screen::search(
        net,
        spec,
        words,
        screen::ROUNDS_BEFORE_REWRITING,
        SCREEN_SEED,
    ) {
        return refuted_by_simulation(net, spec, words, pattern, started);
    }
    let mut stats = AlgebraStats {
        method: "rewriting".into(),
        ..AlgebraStats::default()
    };
    // Prefix adders blow up quickly and have a cheaper route: a small
    // budget before sweeping against the ripple reference.
    let limit = match (spec, opts.term_limit) {
        (ArithSpec::Add, 0) => ADDER_TERM_BUDGET,
        (ArithSpec::Add, l) => l.min(ADDER_TERM_BUDGET),
        (_, l) => l,
    };
    let first_limit = match (limit, opts.search_at_terms) {
        (l, 0) => l,
        (0, s) => s,
        (l, s) => l.min(s),
    };
    let mut pass = rewrite(net, spec, words, first_limit, false, &mut stats);
    // Structural cuts miss the full adders that cells of two inputs split;
    // cuts through existing nodes find them (but on some netlists pair a sum
    // with the wrong carry, so they are the second try).
    let mut extended = false;
    if let (Pass::Blown(_), false) = (&pass, spec == ArithSpec::Add) {
        let retry = rewrite(net, spec, words, first_limit, true, &mut stats);
        if let Pass::Finished(_) = retry {
            pass = retry;
            extended = true;
        }
    }
    if let Pass::Blown(_) = pass {
        // A blow-up: most likely a wrong circuit; look harder for a pattern
        // before rewriting again up to the term limit. (An adder goes on to
        // sweeping against a ripple reference, which finds any difference.)
        if spec != ArithSpec::Add {
            let rounds = screen::rounds_within_budget(net);
            if let Some(pattern) = screen::search(net, spec, words, rounds, SCREEN_SEED ^ 1) {
                let (outcome, mut s) = refuted_by_simulation(net, spec, words, pattern, started)?;
                s.peak_terms = stats.peak_terms;
                return Ok((outcome, s));
            }
        }
        if first_limit != limit {
            pass = rewrite(net, spec, words, limit, extended, &mut stats);
        }
    }
    let outcome = match pass {
        Pass::Blown(gates_left) => {
            let mut outcome = SpecOutcome::Undecided {
                term_limit: limit,
                gates_left,
            };
            if spec == ArithSpec::Add {
                stats.method = "sweeping against a ripple reference".into();
                outcome = against_reference(net, spec, words)?.unwrap_or(outcome);
            }
            outcome
        }
        Pass::Finished(None) => SpecOutcome::Proven,
        Pass::Finished(Some(smallest)) => {
            let mut pattern = vec![false; net.combinational_inputs().len()];
            for &v in &smallest {
                pattern[v as usize] = true;
            }
            let (got, want) = simulate_against_spec(net, spec, words, &pattern);
            if got == want {
                return Err(AlgebraError::Internal(format!(
                    "the algebraic counterexample for {} does not replay in simulation",
                    net.name()
                )));
            }
            SpecOutcome::Refuted(pattern)
        }
    };
    stats.seconds = started.elapsed().as_secs_f64();
    Ok((outcome, stats))
}

/// The outcome for a pattern found by simulation, after confirming it on
/// big integers.
fn refuted_by_simulation(
    net: &Network,
    spec: ArithSpec,
    words: &Words,
    pattern: Vec<bool>,
    started: Instant,
) -> Result<(SpecOutcome, AlgebraStats), AlgebraError> {
    let (got, want) = simulate_against_spec(net, spec, words, &pattern);
    if got == want {
        return Err(AlgebraError::Internal(format!(
            "the simulated counterexample for {} does not replay on integers",
            net.name()
        )));
    }
    let stats = AlgebraStats {
        method: "simulation".into(),
        seconds: started.elapsed().as_secs_f64(),
        ..AlgebraStats::default()
    };
    Ok((SpecOutcome::Refuted(pattern), stats))
}

/// Proves `net` against a ripple reference built from the specification
/// by SAT sweeping; `None` when sweeping is undecided too.
fn against_reference(
    net: &Network,
    spec: ArithSpec,
    words: &Words,
) -> Result<Option<SpecOutcome>, AlgebraError> {
    let reference = reference::reference(net, spec, words);
    let verdict = super::check(net, &reference, &super::EquivOptions::default())
        .map_err(|e| AlgebraError::Internal(format!("reference check: {e}")))?;
    Ok(match verdict {
        super::Verdict::Equivalent { .. } => Some(SpecOutcome::Proven),
        super::Verdict::Undecided { .. } => None,
        super::Verdict::Different { counterexample, .. } => {
            let pattern: Vec<bool> = net
                .inputs()
                .keys()
                .map(|n| counterexample.inputs.get(n).copied().unwrap_or(false))
                .collect();
            let (got, want) = simulate_against_spec(net, spec, words, &pattern);
            if got == want {
                return Err(AlgebraError::Internal(format!(
                    "the reference counterexample for {} does not replay in simulation",
                    net.name()
                )));
            }
            Some(SpecOutcome::Refuted(pattern))
        }
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::network::Lit;

    /// A 2 x 2 multiplier by hand (p0 = a0 b0; p1 = a1 b0 ^ a0 b1; carry
    /// c = a1 b0 a0 b1; p2 = a1 b1 ^ c; p3 = a1 b1 c), checked against
    /// integer multiplication; with p2's XOR turned into an OR it is
    /// refuted, and the pattern really gives a wrong product.
    #[test]
    fn two_bit_multiplier_is_proven_and_a_mutant_refuted() {
        for mutant in [false, true] {
            let mut net = Network::new("m2");
            let a: Vec<Lit> = (0..2)
                .map(|k| net.add_input(format!("a[{k}]")).unwrap())
                .collect();
            let b: Vec<Lit> = (0..2)
                .map(|k| net.add_input(format!("b[{k}]")).unwrap())
                .collect();
            let p0 = net.and(a[0], b[0]);
            let x = net.and(a[1], b[0]);
            let y = net.and(a[0], b[1]);
            let p1 = net.xor(x, y);
            let c = net.and(x, y);
            let z = net.and(a[1], b[1]);
            let p2 = if mutant { net.or(z, c) } else { net.xor(z, c) };
            let p3 = net.and(z, c);
            for (k, p) in [p0, p1, p2, p3].into_iter().enumerate() {
                net.add_output(format!("p[{k}]"), p).unwrap();
            }
            let words = arith_words(&net, ArithSpec::Mul, true).unwrap();
            let (outcome, _) =
                prove_against_spec(&net, ArithSpec::Mul, &words, &AlgebraOptions::default())
                    .unwrap();
            if mutant {
                let SpecOutcome::Refuted(p) = outcome else {
                    panic!("mutant not refuted: {outcome:?}");
                };
                let (got, want) = simulate_against_spec(&net, ArithSpec::Mul, &words, &p);
                assert_ne!(got, want);
                // Only a = b = 3 gives z = c = 1: 3 * 3 = 9 = 0b1001.
                assert_eq!(p, vec![true; 4]);
            } else {
                assert_eq!(outcome, SpecOutcome::Proven);
            }
        }
    }
}
