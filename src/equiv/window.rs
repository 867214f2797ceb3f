//! Local proofs: is a candidate pair equal as a function of a small window
//! of logic just below it?
//!
//! # Why
//!
//! The global [`Oracle`](super::oracle) keeps one solver for the whole sweep.
//! On large miters its queries get slow even when they are easy: the solver
//! branches and learns over every cone encoded so far, and an UNSAT proof
//! that needs only the few gates where two cones meet again still pays for
//! a search through the whole, ever larger formula (about 20 ms a query on a
//! mapped 160x160 multiplier). After sweeping has merged everything below a
//! candidate pair, the two sides usually re-converge a few levels down, so
//! the pair is equal as a function of the nodes where they meet.
//!
//! # How
//!
//! [`WindowProver::prove`] collects a *window*: the nodes of the union of
//! the two cones, taken from the top in decreasing index order (the network
//! is topologically indexed, so a node is taken only after every window node
//! that reads it), until it holds [`FIRST_WINDOW_GATES`] gates; a second
//! try, only when that window was cut short and did not prove the pair,
//! allows [`EquivOptions::window_gates`](super::EquivOptions). The fanins left outside are *frontier* nodes and become
//! free variables. A fresh small solver receives the window's Tseitin
//! clauses and the two clauses of `x != y`:
//!
//! - UNSAT proves `x == y` for *every* value of the frontier, hence for every
//!   value the frontier really takes: a sound proof of the pair;
//! - SAT proves nothing (the frontier values found may be impossible), so
//!   the caller falls back to the global oracle, whose counterexamples are
//!   real input patterns. A window answer never becomes a counterexample.
//!
//! Windows with at most [`ENUMERATE_FRONTIER_UP_TO`] free frontier nodes
//! skip the solver: simulating the window on every frontier value (truth
//! tables of at most 64 words) gives the same answer, and setting up a
//! solver costs far more than such a proof (on c6288 solver-only windows
//! were slower than the global solver; enumerated ones are faster).
//!
//! Ordering by index makes shared nodes enter the window once, below both
//! sides, which is exactly the meeting point a local proof needs. The large
//! window also has a small work limit (the same proof-log meter as the
//! oracle): a local proof that needs many conflicts is better left to the
//! global solver.

use std::cell::Cell;
use std::collections::BinaryHeap;
use std::rc::Rc;
use std::time::Instant;

use varisat::{ExtendFormula, Lit as SatLit, Solver, Var};

use super::oracle::{gate_clauses, WorkMeter, BYTES_PER_CONFLICT};
use crate::network::{Lit, Network, NodeId, NodeKind};
use crate::truth::table::projection;

/// Conflicts a large window query may use before it gives up (a choice
/// made here: local proofs either succeed almost at once or are not local).
const WINDOW_CONFLICTS: u64 = 2_000;

/// Gates of the first, small window tried on every pair. Most pairs of a
/// swept miter meet again within a few gates; a query this small costs
/// about as much as starting the solver. It runs without the work meter
/// (writing the proof log costs time, and a formula of at most this many
/// gates cannot need a long search).
pub(crate) const FIRST_WINDOW_GATES: usize = 24;

/// Windows with at most this many free frontier nodes are decided by
/// simulating every frontier value (at most 64 words a node) rather than by
/// a solver, which costs far more to set up.
const ENUMERATE_FRONTIER_UP_TO: usize = 12;

/// Outcome of one window query.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum WindowAnswer {
    /// The pair is equal for every frontier value: proven.
    Proven,
    /// Not proven here (satisfiable with a free frontier, or the work limit
    /// stopped it); the pair may still be equal.
    Inconclusive,
}

/// Counters of the window prover.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, serde::Serialize)]
pub struct WindowStats {
    /// Window queries made.
    pub queries: u64,
    /// Queries decided by simulating every frontier value instead of by a
    /// solver.
    pub enumerated: u64,
    /// Queries that proved their pair.
    pub proven: u64,
    /// Queries satisfiable (or, enumerated, unequal) on the free frontier
    /// (inconclusive).
    pub satisfiable: u64,
    /// Queries stopped by the window work limit (inconclusive).
    pub stopped: u64,
    /// Gates encoded over all windows.
    pub window_gates: u64,
    /// Frontier nodes over all windows.
    pub frontier_nodes: u64,
}

/// Proves candidate pairs on small windows with a fresh solver each time.
pub(crate) struct WindowProver {
    /// Gates at most in one window; 0 turns window proofs off.
    max_gates: usize,
    /// Windows with at most this many free frontier nodes are enumerated
    /// ([`ENUMERATE_FRONTIER_UP_TO`]; tests lower it to exercise the solver).
    pub enumerate_up_to: usize,
    /// Solver variable of each node plus one while it is in the current
    /// window (0 = not in it); reset after every query.
    var_of: Vec<u32>,
    /// Nodes given a variable in the current query (for the reset).
    touched: Vec<NodeId>,
    /// Gates of the current window.
    gates: Vec<NodeId>,
    heap: BinaryHeap<NodeId>,
    /// Whether the node with each variable is a gate of the window (not
    /// a frontier node), by variable.
    in_window: Vec<bool>,
    /// Simulation words of the window's nodes, by variable (enumeration).
    values: Vec<u64>,
    /// Work counters.
    pub stats: WindowStats,
    /// Seconds spent in window queries.
    pub seconds: f64,
}

impl WindowProver {
    /// A prover whose windows hold at most `max_gates` gates (0: never
    /// prove anything, every query is inconclusive at no cost).
    pub fn new(max_gates: usize) -> WindowProver {
        WindowProver {
            max_gates,
            enumerate_up_to: ENUMERATE_FRONTIER_UP_TO,
            var_of: Vec::new(),
            touched: Vec::new(),
            gates: Vec::new(),
            heap: BinaryHeap::new(),
            in_window: Vec::new(),
            values: Vec::new(),
            stats: WindowStats::default(),
            seconds: 0.0,
        }
    }

    /// Tries to prove literals `x` and `y` of `network` equal on a window
    /// below them: first a window of at most [`FIRST_WINDOW_GATES`] gates,
    /// then, if that one was cut short and did not prove the pair, the full
    /// size.
    pub fn prove(&mut self, network: &Network, x: Lit, y: Lit) -> WindowAnswer {
        if x == y {
            return WindowAnswer::Proven;
        }
        if self.max_gates == 0 || x == !y {
            return WindowAnswer::Inconclusive;
        }
        let started = Instant::now();
        let first = self.max_gates.min(FIRST_WINDOW_GATES);
        let (mut answer, cut_short) = self.query(network, x, y, first);
        if answer == WindowAnswer::Inconclusive && cut_short && first < self.max_gates {
            answer = self.query(network, x, y, self.max_gates).0;
        }
        self.seconds += started.elapsed().as_secs_f64();
        answer
    }

    /// One window query of at most `max_gates` gates; also tells whether
    /// the window was cut short by the gate limit (a larger one would
    /// differ).
    fn query(
        &mut self,
        network: &Network,
        x: Lit,
        y: Lit,
        max_gates: usize,
    ) -> (WindowAnswer, bool) {
        self.stats.queries += 1;
        let cut_short = self.collect(network, x, y, max_gates);
        let free = self.touched.len() - self.gates.len() - usize::from(self.var_of[0] != 0);
        let answer = if free <= self.enumerate_up_to.min(ENUMERATE_FRONTIER_UP_TO) {
            self.enumerate_window(network, x, y, free)
        } else {
            self.solve_window(network, x, y, max_gates > FIRST_WINDOW_GATES)
        };
        for &node in &self.touched {
            self.var_of[node.index()] = 0;
        }
        self.touched.clear();
        (answer, cut_short)
    }

    /// Decides the collected window by simulating it on every value of its
    /// `free` frontier nodes (at most [`ENUMERATE_FRONTIER_UP_TO`]): the
    /// same answer a solver would give, without building one.
    fn enumerate_window(&mut self, network: &Network, x: Lit, y: Lit, free: usize) -> WindowAnswer {
        self.stats.enumerated += 1;
        // Frontier node k takes the k-th truth-table pattern: bit p of word
        // w is bit k of the assignment number 64 w + p (with fewer than six
        // free nodes one word repeats every assignment).
        let words = 1usize << free.saturating_sub(6);
        let slots = self.touched.len();
        self.values.clear();
        self.values.resize(slots * words, 0);
        let mut k = 0;
        for slot in 0..slots {
            let node = self.touched[slot];
            if self.in_window[slot] || network.kind(node) == NodeKind::Const {
                continue; // a window gate (computed below) or the constant 0
            }
            for w in 0..words {
                self.values[slot * words + w] = if k < 6 {
                    projection(k)
                } else if (w >> (k - 6)) & 1 == 1 {
                    u64::MAX
                } else {
                    0
                };
            }
            k += 1;
        }
        debug_assert_eq!(k, free);
        let word = |values: &[u64], var_of: &[u32], lit: Lit, w: usize| {
            let slot = var_of[lit.node().index()] as usize - 1;
            let v = values[slot * words + w];
            if lit.is_complemented() {
                !v
            } else {
                v
            }
        };
        // Gates were collected in decreasing index order: evaluate upwards.
        for &gate in self.gates.iter().rev() {
            let slot = self.var_of[gate.index()] as usize - 1;
            let f = network.fanins(gate);
            for w in 0..words {
                let a = word(&self.values, &self.var_of, f[0], w);
                let b = word(&self.values, &self.var_of, f[1], w);
                self.values[slot * words + w] = match network.kind(gate) {
                    NodeKind::And => a & b,
                    NodeKind::Xor => a ^ b,
                    _ => {
                        let c = word(&self.values, &self.var_of, f[2], w);
                        (a & b) | (a & c) | (b & c)
                    }
                };
            }
        }
        let equal = (0..words).all(|w| {
            word(&self.values, &self.var_of, x, w) == word(&self.values, &self.var_of, y, w)
        });
        if equal {
            self.stats.proven += 1;
            WindowAnswer::Proven
        } else {
            self.stats.satisfiable += 1;
            WindowAnswer::Inconclusive
        }
    }

    /// Gives `node` the next variable (variables are numbered from 1 in
    /// the order nodes are met).
    fn assign(&mut self, node: NodeId) {
        self.touched.push(node);
        self.in_window.push(false);
        self.var_of[node.index()] = self.touched.len() as u32;
    }

    fn sat_lit(&self, lit: Lit) -> SatLit {
        let var = self.var_of[lit.node().index()];
        debug_assert!(var > 0, "window literal has a variable");
        SatLit::from_var(Var::from_index(var as usize - 1), !lit.is_complemented())
    }

    /// Collects the window of at most `max_gates` gates (in `gates`, every
    /// node with a variable in `touched`); true when gates were left out.
    fn collect(&mut self, network: &Network, x: Lit, y: Lit, max_gates: usize) -> bool {
        if self.var_of.len() < network.num_nodes() {
            self.var_of.resize(network.num_nodes(), 0);
        }
        // Every node gets its variable when first queued; popping in
        // decreasing index order takes a node only after all its window
        // fanouts, so the window is the top of the union of both cones.
        self.gates.clear();
        self.heap.clear();
        self.in_window.clear();
        let mut cut_short = false;
        for root in [x.node(), y.node()] {
            if self.var_of[root.index()] == 0 {
                self.assign(root);
                self.heap.push(root);
            }
        }
        while let Some(node) = self.heap.pop() {
            if !network.is_gate(node) {
                continue; // an input or the constant
            }
            if self.gates.len() >= max_gates {
                cut_short = true;
                continue; // a frontier gate
            }
            self.gates.push(node);
            self.in_window[self.var_of[node.index()] as usize - 1] = true;
            for &f in network.fanins(node) {
                if self.var_of[f.node().index()] == 0 {
                    self.assign(f.node());
                    self.heap.push(f.node());
                }
            }
        }
        self.stats.window_gates += self.gates.len() as u64;
        self.stats.frontier_nodes += (self.touched.len() - self.gates.len()) as u64;
        cut_short
    }

    /// Solves the collected window with `x != y`; `metered` bounds the
    /// work with the proof-log meter.
    fn solve_window(&mut self, network: &Network, x: Lit, y: Lit, metered: bool) -> WindowAnswer {
        let spent = Rc::new(Cell::new(0));
        let limit = Rc::new(Cell::new(u64::MAX));
        let mut solver = Solver::new();
        if metered {
            solver.write_proof(
                WorkMeter::new(spent, limit.clone()),
                varisat::ProofFormat::Varisat,
            );
        }
        let mut clause_bytes = 0u64;
        let mut add = |solver: &mut Solver, clause: &[SatLit]| {
            clause_bytes += 8 + 6 * clause.len() as u64;
            solver.add_clause(clause);
        };
        if self.var_of[0] != 0 {
            // The constant-false node is in the window (as a fanin or a root).
            add(&mut solver, &[!self.sat_lit(Lit::FALSE)]);
        }
        let gates = std::mem::take(&mut self.gates);
        for &gate in &gates {
            let out = self.sat_lit(gate.lit());
            let f = network.fanins(gate);
            let mut fanins = [out; 3];
            for (slot, &lit) in fanins.iter_mut().zip(f) {
                *slot = self.sat_lit(lit);
            }
            gate_clauses(network.kind(gate), out, &fanins[..f.len()], |c| {
                add(&mut solver, c)
            });
        }
        self.gates = gates;
        // x != y.
        let (sx, sy) = (self.sat_lit(x), self.sat_lit(y));
        add(&mut solver, &[sx, sy]);
        add(&mut solver, &[!sx, !sy]);
        limit.set(
            WINDOW_CONFLICTS * BYTES_PER_CONFLICT
                + clause_bytes
                + 4 * self.touched.len() as u64
                + 64,
        );
        match solver.solve() {
            Ok(false) => {
                self.stats.proven += 1;
                WindowAnswer::Proven
            }
            Ok(true) => {
                self.stats.satisfiable += 1;
                WindowAnswer::Inconclusive
            }
            Err(_) => {
                self.stats.stopped += 1;
                WindowAnswer::Inconclusive
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::network::{lit_word, SplitMix64};
    use proptest::prelude::*;

    /// Truth-table input words of `n` ≤ 6 inputs: one 64-bit word holds
    /// every input pattern (pattern `p` is bit `p`).
    fn exhaustive_words(n: usize) -> (Vec<u64>, u64) {
        let words = (0..n)
            .map(|k| (0..64u32).fold(0u64, |w, p| w | ((((p >> k) & 1) as u64) << p)))
            .collect();
        let mask = if n == 6 {
            u64::MAX
        } else {
            (1u64 << (1 << n)) - 1
        };
        (words, mask)
    }

    /// A random network over `inputs` inputs, then a copy of its gates
    /// rebuilt with identities hashing does not undo (pairs equal in
    /// function, different in structure), then the XOR of a few originals
    /// with their copies (nodes that are constant false without being the
    /// constant). Returns the network and the (original, copy) pairs.
    fn network_with_copies(
        rng: &mut SplitMix64,
        inputs: usize,
        gates: usize,
    ) -> (Network, Vec<(Lit, Lit)>) {
        let mut net = Network::new("window_test");
        let mut signals: Vec<Lit> = (0..inputs)
            .map(|k| net.add_input(format!("x{k}")).unwrap())
            .collect();
        let mut originals = Vec::new();
        for _ in 0..gates {
            let n = signals.len() as u64;
            let mut pick = || {
                let back = rng.below(n.min(6));
                signals[(n - 1 - back) as usize].xor(rng.below(2) == 1)
            };
            let (a, b, c) = (pick(), pick(), pick());
            let g = match rng.below(3) {
                0 => net.and(a, b),
                1 => net.xor(a, b),
                _ => net.maj(a, b, c),
            };
            if g.node().index() > inputs {
                originals.push(g.regular());
            }
            signals.push(g);
        }
        let mut copy: Vec<Lit> = net.node_ids().map(|id| id.lit()).collect();
        let mut pairs = Vec::new();
        let m = |copy: &Vec<Lit>, l: Lit| copy[l.node().index()].xor(l.is_complemented());
        for &g in &originals {
            let id = g.node();
            let f: Vec<Lit> = net.fanins(id).iter().map(|&l| m(&copy, l)).collect();
            let image = match net.kind(id) {
                NodeKind::And => {
                    let t = net.and(f[0], !f[1]);
                    net.xor(f[0], t)
                }
                NodeKind::Xor => {
                    let t = net.and(f[0], !f[1]);
                    let e = net.and(!f[0], f[1]);
                    net.or(t, e)
                }
                _ => {
                    let ab = net.and(f[0], f[1]);
                    let a_or_b = net.or(f[0], f[1]);
                    let c = net.and(f[2], a_or_b);
                    net.or(ab, c)
                }
            };
            copy[id.index()] = image;
            pairs.push((g, image));
        }
        for (g, image) in pairs.clone().into_iter().take(4) {
            let zero = net.xor(g, image);
            pairs.push((zero, Lit::FALSE));
            pairs.push((zero, Lit::TRUE));
        }
        (net, pairs)
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(150))]

        /// Every window proof is confirmed by exhaustive simulation, on
        /// pairs equal by construction, constant pairs, and random pairs,
        /// for window limits from one gate up; and a window large enough to
        /// hold both cones whole proves every pair that is equal.
        #[test]
        fn window_proofs_agree_with_exhaustive_simulation(
            seed in any::<u64>(),
            inputs in 1usize..=6,
            gates in 1usize..30,
            max_gates in 1usize..40,
        ) {
            let mut rng = SplitMix64::new(seed);
            let (net, mut pairs) = network_with_copies(&mut rng, inputs, gates);
            let n = net.num_nodes() as u64;
            for _ in 0..20 {
                let x = Lit::new(NodeId(rng.below(n) as u32), rng.below(2) == 1);
                let y = Lit::new(NodeId(rng.below(n) as u32), rng.below(2) == 1);
                pairs.push((x, y));
            }
            let (words, mask) = exhaustive_words(inputs);
            let values = net.simulate(&words);
            let equal = |x: Lit, y: Lit| (lit_word(&values, x) ^ lit_word(&values, y)) & mask == 0;
            // Each size both ways: frontier enumeration, and the solver alone.
            for enumerate_up_to in [ENUMERATE_FRONTIER_UP_TO, 0] {
                let mut small = WindowProver::new(max_gates);
                let mut whole = WindowProver::new(net.num_nodes());
                small.enumerate_up_to = enumerate_up_to;
                whole.enumerate_up_to = enumerate_up_to;
                for &(x, y) in &pairs {
                    let truth = equal(x, y);
                    if small.prove(&net, x, y) == WindowAnswer::Proven {
                        prop_assert!(truth, "window of {} proved {:?} == {:?}", max_gates, x, y);
                    }
                    let answer = whole.prove(&net, x, y);
                    prop_assert_eq!(answer == WindowAnswer::Proven, truth, "{:?} == {:?}", x, y);
                }
                if enumerate_up_to == 0 {
                    prop_assert_eq!(small.stats.enumerated + whole.stats.enumerated, 0);
                }
            }
        }
    }
}
