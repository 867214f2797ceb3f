//! Incremental SAT queries on a growing network.
//!
//! One varisat solver serves every query of a check. A node gets a solver
//! variable and its Tseitin clauses the first time a query needs its cone,
//! and never again: the network the sweep builds only grows, so an encoded
//! node's clauses stay valid for the whole run. A query "is `x` equal to
//! `y`?" adds no clauses at all; it is two solver calls under assumptions,
//! `x & !y` and `!x & y`; both unsatisfiable means proven.
//!
//! # Bounding the work of one query
//!
//! varisat 0.2 has no conflict limit and no interrupt. What it does have is a
//! proof log written through an `io::Write` target, and a failing write stops
//! the search (the solver reports an error and cannot be used again). So the
//! oracle logs the solver's own proof format into a [`WorkMeter`] that only
//! counts bytes and fails once a query has used up its budget. Learned clauses
//! dominate that log, so the budget is set at [`BYTES_PER_CONFLICT`] bytes for
//! each conflict of [`EquivOptions::conflict_limit`](super::EquivOptions), plus
//! allowances for clauses added and models reported: the limit counts
//! conflicts approximately, not exactly. After a stopped query the solver is
//! dropped and a fresh one is started; the next query encodes its cones again.
//! A `conflict_limit` of 0 means no limit, and then no log is written at all.

use std::cell::Cell;
use std::io;
use std::rc::Rc;

use varisat::{ExtendFormula, Lit as SatLit, Solver, Var};

use crate::network::{Lit, Network, NodeId, NodeKind};

/// Proof-log bytes budgeted for one conflict (a learned clause with its
/// antecedent hashes; measured on ISCAS-85 miters, common practice for such
/// logs is a few dozen bytes).
pub(crate) const BYTES_PER_CONFLICT: u64 = 96;

/// An `io::Write` sink that counts bytes and fails past a limit.
pub(crate) struct WorkMeter {
    spent: Rc<Cell<u64>>,
    limit: Rc<Cell<u64>>,
}

impl WorkMeter {
    /// A meter adding to `spent` that fails once it exceeds `limit`.
    pub fn new(spent: Rc<Cell<u64>>, limit: Rc<Cell<u64>>) -> WorkMeter {
        WorkMeter { spent, limit }
    }
}

/// Emits the Tseitin clauses of a gate of `kind` with output `out` and
/// fanins `fanins` (nothing for inputs; the constant needs `out` false).
pub(crate) fn gate_clauses(
    kind: NodeKind,
    out: SatLit,
    fanins: &[SatLit],
    mut emit: impl FnMut(&[SatLit]),
) {
    match kind {
        NodeKind::Const => emit(&[!out]),
        NodeKind::Input => {}
        NodeKind::And => {
            let (a, b) = (fanins[0], fanins[1]);
            emit(&[!out, a]);
            emit(&[!out, b]);
            emit(&[out, !a, !b]);
        }
        NodeKind::Xor => {
            let (a, b) = (fanins[0], fanins[1]);
            emit(&[!out, a, b]);
            emit(&[!out, !a, !b]);
            emit(&[out, !a, b]);
            emit(&[out, a, !b]);
        }
        NodeKind::Maj => {
            let (a, b, c) = (fanins[0], fanins[1], fanins[2]);
            emit(&[!out, a, b]);
            emit(&[!out, a, c]);
            emit(&[!out, b, c]);
            emit(&[out, !a, !b]);
            emit(&[out, !a, !c]);
            emit(&[out, !b, !c]);
        }
    }
}

impl io::Write for WorkMeter {
    fn write(&mut self, buf: &[u8]) -> io::Result<usize> {
        let spent = self.spent.get() + buf.len() as u64;
        self.spent.set(spent);
        if spent > self.limit.get() {
            Err(io::Error::other("work limit of the query reached"))
        } else {
            Ok(buf.len())
        }
    }

    fn flush(&mut self) -> io::Result<()> {
        Ok(())
    }
}

/// Outcome of one equality query.
#[derive(Clone, Debug, PartialEq, Eq)]
pub(crate) enum Answer {
    /// The two literals are equal for every input.
    Equal,
    /// They differ on this input pattern (one value per network input, in
    /// input declaration order).
    Differ(Vec<bool>),
    /// The work limit stopped the proof.
    Unknown,
}

/// Counters of the oracle's work.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, serde::Serialize)]
pub struct OracleStats {
    /// Solver calls made.
    pub solver_calls: u64,
    /// Calls that found a satisfying assignment.
    pub satisfiable: u64,
    /// Calls that proved unsatisfiability.
    pub unsatisfiable: u64,
    /// Calls stopped by the work limit.
    pub stopped: u64,
    /// Nodes encoded (counting re-encodings after a stopped call).
    pub encoded_nodes: u64,
}

/// A SAT solver attached to a network that only grows.
pub(crate) struct Oracle {
    solver: Solver<'static>,
    /// Solver variable of each network node plus one; 0 = not encoded.
    var_of: Vec<u32>,
    next_var: u32,
    conflict_limit: u64,
    spent: Rc<Cell<u64>>,
    limit: Rc<Cell<u64>>,
    /// Estimated log bytes of clauses added since the last call.
    pending_bytes: u64,
    stack: Vec<NodeId>,
    cone: Vec<NodeId>,
    /// Work counters.
    pub stats: OracleStats,
}

impl Oracle {
    /// An oracle whose calls each stop after about `conflict_limit`
    /// conflicts (0: never).
    pub fn new(conflict_limit: u64) -> Oracle {
        let spent = Rc::new(Cell::new(0));
        let limit = Rc::new(Cell::new(u64::MAX));
        Oracle {
            solver: Self::fresh_solver(conflict_limit, &spent, &limit),
            var_of: Vec::new(),
            next_var: 0,
            conflict_limit,
            spent,
            limit,
            pending_bytes: 0,
            stack: Vec::new(),
            cone: Vec::new(),
            stats: OracleStats::default(),
        }
    }

    fn fresh_solver(
        conflict_limit: u64,
        spent: &Rc<Cell<u64>>,
        limit: &Rc<Cell<u64>>,
    ) -> Solver<'static> {
        let mut solver = Solver::new();
        if conflict_limit > 0 {
            solver.write_proof(
                WorkMeter {
                    spent: spent.clone(),
                    limit: limit.clone(),
                },
                varisat::ProofFormat::Varisat,
            );
        }
        solver
    }

    fn restart(&mut self) {
        self.limit.set(u64::MAX);
        self.solver = Self::fresh_solver(self.conflict_limit, &self.spent, &self.limit);
        self.var_of.clear();
        self.next_var = 0;
        self.pending_bytes = 0;
    }

    fn sat_lit(&self, lit: Lit) -> SatLit {
        let var = self.var_of[lit.node().index()];
        debug_assert!(var > 0, "literal's node is encoded");
        SatLit::from_var(Var::from_index(var as usize - 1), !lit.is_complemented())
    }

    fn add_clause(&mut self, clause: &[SatLit]) {
        self.pending_bytes += 8 + 6 * clause.len() as u64;
        self.solver.add_clause(clause);
    }

    /// Gives every node in the cone of `root` a variable and its clauses.
    fn encode(&mut self, network: &Network, root: NodeId) {
        if self.var_of.len() < network.num_nodes() {
            self.var_of.resize(network.num_nodes(), 0);
        }
        if self.var_of[root.index()] != 0 {
            return;
        }
        self.stack.clear();
        self.cone.clear();
        self.stack.push(root);
        // Mark with a sentinel while collecting (u32::MAX = collected).
        self.var_of[root.index()] = u32::MAX;
        while let Some(node) = self.stack.pop() {
            self.cone.push(node);
            for &f in network.fanins(node) {
                let i = f.node().index();
                if self.var_of[i] == 0 {
                    self.var_of[i] = u32::MAX;
                    self.stack.push(f.node());
                }
            }
        }
        self.cone.sort_unstable();
        let cone = std::mem::take(&mut self.cone);
        for &node in &cone {
            self.next_var += 1;
            self.var_of[node.index()] = self.next_var;
            self.stats.encoded_nodes += 1;
            let out = SatLit::positive(Var::from_index(self.next_var as usize - 1));
            let f = network.fanins(node);
            let mut fanins = [out; 3];
            for (slot, &lit) in fanins.iter_mut().zip(f) {
                *slot = self.sat_lit(lit);
            }
            let kind = network.kind(node);
            gate_clauses(kind, out, &fanins[..f.len()], |c| self.add_clause(c));
        }
        self.cone = cone;
    }

    /// One solver call under `assumptions`: `Some(true)` satisfiable,
    /// `Some(false)` unsatisfiable, `None` stopped.
    fn solve(&mut self, assumptions: &[SatLit]) -> Option<bool> {
        self.stats.solver_calls += 1;
        if self.conflict_limit > 0 {
            self.spent.set(0);
            let model_bytes = 4 * self.next_var as u64 + 64;
            self.limit.set(
                self.conflict_limit
                    .saturating_mul(BYTES_PER_CONFLICT)
                    .saturating_add(self.pending_bytes)
                    .saturating_add(model_bytes),
            );
        }
        self.pending_bytes = 0;
        self.solver.assume(assumptions);
        match self.solver.solve() {
            Ok(sat) => {
                if sat {
                    self.stats.satisfiable += 1;
                } else {
                    self.stats.unsatisfiable += 1;
                }
                Some(sat)
            }
            Err(_) => {
                self.stats.stopped += 1;
                self.restart();
                None
            }
        }
    }

    /// The current model as input values of `network` (inputs outside every
    /// encoded cone read 0).
    fn input_pattern(&self, network: &Network) -> Vec<bool> {
        let model = self.solver.model().unwrap_or_default();
        let mut value = vec![false; self.next_var as usize];
        for l in model {
            if l.index() < value.len() {
                value[l.index()] = l.is_positive();
            }
        }
        network
            .combinational_inputs()
            .iter()
            .map(|id| {
                let v = self.var_of.get(id.index()).copied().unwrap_or(0);
                v != 0 && v != u32::MAX && value[v as usize - 1]
            })
            .collect()
    }

    /// Decides whether literals `x` and `y` of `network` are equal.
    pub fn equal(&mut self, network: &Network, x: Lit, y: Lit) -> Answer {
        if x == y {
            return Answer::Equal;
        }
        self.encode(network, x.node());
        self.encode(network, y.node());
        for (px, py) in [(x, !y), (!x, y)] {
            let assumptions = [self.sat_lit(px), self.sat_lit(py)];
            match self.solve(&assumptions) {
                Some(true) => return Answer::Differ(self.input_pattern(network)),
                Some(false) => {}
                None => return Answer::Unknown,
            }
        }
        Answer::Equal
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn oracle_proves_and_refutes() {
        let mut n = Network::new("t");
        let a = n.add_input("a").unwrap();
        let b = n.add_input("b").unwrap();
        let c = n.add_input("c").unwrap();
        // a ^ b as AND/OR against the XOR node.
        let x = n.xor(a, b);
        let t1 = n.and(a, !b);
        let t2 = n.and(!a, b);
        let y = n.or(t1, t2);
        let mut oracle = Oracle::new(1000);
        assert_eq!(oracle.equal(&n, x, y), Answer::Equal);
        // maj(a,b,c) against a & b: differ where exactly one of a, b and c.
        let m = n.maj(a, b, c);
        let ab = n.and(a, b);
        match oracle.equal(&n, m, ab) {
            Answer::Differ(p) => {
                assert!(!(p[0] && p[1]) && (p[0] || p[1]) && p[2]);
            }
            other => panic!("expected a counterexample, got {other:?}"),
        }
        match oracle.equal(&n, ab, Lit::FALSE) {
            Answer::Differ(p) => assert!(p[0] && p[1]),
            other => panic!("expected a counterexample, got {other:?}"),
        }
        let zero = n.and(ab, !a);
        assert_eq!(oracle.equal(&n, zero, Lit::FALSE), Answer::Equal);
    }
}
