//! The miter: both networks in one structurally hashed network.
//!
//! Paired inputs (and paired storage outputs) become shared inputs of a fresh
//! [`Network`]; the logic of A and then of B is copied in with
//! [`Network::copy_logic`], so any logic the two have in common is stored once
//! and every pair of compared functions is a pair of literals of one network.
//! Because A is copied first, every node of A has a smaller index than the
//! B nodes built after it, which is what lets the sweep merge B's nodes onto
//! A's.

use super::ports::PortPairs;
use crate::network::{Lit, Network};

/// One pair of functions to prove equal: a primary output pair or a pair of
/// next-state functions of paired storage elements.
#[derive(Clone, Debug)]
pub(crate) struct ComparedPair {
    /// Name reported to the user (A's name; next-state functions are shown as
    /// `next(NAME)`).
    pub name: String,
    /// The function of A in the miter.
    pub a: Lit,
    /// The function of B in the miter.
    pub b: Lit,
}

/// Both networks in one, with the pairs to compare.
pub(crate) struct Miter {
    /// The combined network (no outputs; its inputs are the shared inputs).
    pub network: Network,
    /// Names of the miter inputs (A's names), in miter input order.
    pub input_names: Vec<String>,
    /// For each combinational input of A (in A's order), the miter input index.
    pub a_inputs: Vec<usize>,
    /// For each combinational input of B (in B's order), the miter input index.
    pub b_inputs: Vec<usize>,
    /// Pairs of functions to prove equal.
    pub pairs: Vec<ComparedPair>,
}

/// The name under which the next-state function of storage element `name` is
/// reported.
pub(crate) fn next_state_name(name: &str) -> String {
    format!("next({name})")
}

impl Miter {
    /// Builds the miter of `a` and `b` with the ports paired as `ports` says.
    pub fn build(a: &Network, b: &Network, ports: &PortPairs) -> Miter {
        let mut network = Network::new(format!("miter_{}_{}", a.name(), b.name()));
        network.reserve(a.num_nodes() + b.num_nodes());
        let mut input_names = Vec::new();
        let mut shared = Vec::new();
        for (name_a, _) in ports.inputs.iter().chain(&ports.storage) {
            shared.push(
                network
                    .add_input(format!("{}#{}", input_names.len(), name_a))
                    .expect("generated names are unique"),
            );
            input_names.push(name_a.clone());
        }
        // Index of the shared input for each port name on either side.
        let n_inputs = ports.inputs.len();
        let index_of = |side_b: bool| {
            let mut inputs = rustc_hash::FxHashMap::default();
            let mut storage = rustc_hash::FxHashMap::default();
            for (i, (x, y)) in ports.inputs.iter().enumerate() {
                inputs.insert(if side_b { y.as_str() } else { x.as_str() }, i);
            }
            for (i, (x, y)) in ports.storage.iter().enumerate() {
                storage.insert(if side_b { y.as_str() } else { x.as_str() }, i + n_inputs);
            }
            (inputs, storage)
        };
        let order = |net: &Network, side_b: bool| -> Vec<usize> {
            let (inputs, storage) = index_of(side_b);
            net.inputs()
                .keys()
                .map(|n| inputs[n.as_str()])
                .chain(net.storage().keys().map(|n| storage[n.as_str()]))
                .collect()
        };
        let a_inputs = order(a, false);
        let b_inputs = order(b, true);
        let a_lits: Vec<Lit> = a_inputs.iter().map(|&i| shared[i]).collect();
        let b_lits: Vec<Lit> = b_inputs.iter().map(|&i| shared[i]).collect();
        let map_a = network.copy_logic(a, &a_lits);
        let map_b = network.copy_logic(b, &b_lits);
        let through = |map: &[Lit], l: Lit| map[l.node().index()].xor(l.is_complemented());
        let mut pairs = Vec::new();
        for (name_a, name_b) in &ports.outputs {
            pairs.push(ComparedPair {
                name: name_a.clone(),
                a: through(&map_a, a.outputs()[name_a.as_str()]),
                b: through(&map_b, b.outputs()[name_b.as_str()]),
            });
        }
        for (name_a, name_b) in &ports.storage {
            pairs.push(ComparedPair {
                name: next_state_name(name_a),
                a: through(&map_a, a.storage()[name_a.as_str()].next),
                b: through(&map_b, b.storage()[name_b.as_str()].next),
            });
        }
        Miter {
            network,
            input_names,
            a_inputs,
            b_inputs,
            pairs,
        }
    }
}
