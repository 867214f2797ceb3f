//! Shared helpers of the equivalence tests: reading the ISCAS-85 reference
//! netlists, mutating networks and exhaustive simulation.
#![allow(dead_code)]

use ribbonmap::network::{Lit, Network, NodeId, NodeKind, SplitMix64};

/// Directory of the ISCAS-85 reference netlists (circuitgraph 0.2.1, via
/// PROVENANCE.md).
pub const ISCAS85: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/tests/data/reference/netlists/iscas85"
);

/// The ISCAS-85 circuits shipped as `cNNN.v` / `cNNNg.v` pairs.
pub const CIRCUITS: [&str; 11] = [
    "c17", "c432", "c499", "c880", "c1355", "c1908", "c2670", "c3540", "c5315", "c6288", "c7552",
];

/// Reads `cNNN.v` (or `cNNNg.v` when `resynthesised`).
pub fn iscas(circuit: &str, resynthesised: bool) -> Network {
    let suffix = if resynthesised { "g" } else { "" };
    let path = format!("{ISCAS85}/{circuit}{suffix}.v");
    ribbonmap::io::read_netlist(
        std::path::Path::new(&path),
        &ribbonmap::io::ReadOptions::default(),
    )
    .unwrap_or_else(|e| panic!("{e}"))
}

/// How a mutation changed a network.
#[derive(Clone, Copy, Debug)]
pub enum Mutation {
    /// The gate's kind was replaced (AND by XOR, XOR by AND, MAJ by AND of
    /// its first two fanins) and its output complemented or not.
    Kind { node: NodeId, negate: bool },
    /// One fanin of the gate was replaced by another earlier node.
    Fanin { node: NodeId, slot: usize, new: Lit },
}

/// Rebuilds `net` with one gate changed as `mutation` says. Returns the
/// mutant and the image of the mutated node in it.
pub fn mutate(net: &Network, mutation: Mutation) -> (Network, Lit) {
    let mut out = net.empty_like();
    let mut map = vec![Lit::FALSE; net.num_nodes()];
    for (id, lit) in net.combinational_inputs().iter().zip(
        out.combinational_inputs()
            .iter()
            .map(|i| i.lit())
            .collect::<Vec<_>>(),
    ) {
        map[id.index()] = lit;
    }
    let m = |map: &Vec<Lit>, l: Lit| map[l.node().index()].xor(l.is_complemented());
    let mut mutated = Lit::FALSE;
    for id in net.node_ids() {
        if !net.is_gate(id) {
            continue;
        }
        let mut f: Vec<Lit> = net.fanins(id).iter().map(|&l| m(&map, l)).collect();
        let mut kind = net.kind(id);
        let mut negate = false;
        match mutation {
            Mutation::Kind { node, negate: n } if node == id => {
                kind = match kind {
                    NodeKind::And => NodeKind::Xor,
                    NodeKind::Xor => NodeKind::And,
                    _ => {
                        f.truncate(2);
                        NodeKind::And
                    }
                };
                negate = n;
            }
            Mutation::Fanin { node, slot, new } if node == id => {
                f[slot] = m(&map, new);
            }
            _ => {}
        }
        let lit = match kind {
            NodeKind::And => out.and(f[0], f[1]),
            NodeKind::Xor => out.xor(f[0], f[1]),
            _ => out.maj(f[0], f[1], f[2]),
        }
        .xor(negate);
        if matches!(mutation, Mutation::Kind { node, .. } | Mutation::Fanin { node, .. } if node == id)
        {
            mutated = lit;
        }
        map[id.index()] = lit;
    }
    out.connect_outputs_from(net, &map);
    (out, mutated)
}

/// A random mutation of a gate in the transitive fanin of the outputs.
pub fn random_mutation(net: &Network, rng: &mut SplitMix64) -> Mutation {
    let reach = net.reachable();
    let gates: Vec<NodeId> = net
        .node_ids()
        .filter(|&id| net.is_gate(id) && reach[id.index()])
        .collect();
    let node = gates[rng.below(gates.len() as u64) as usize];
    if rng.below(2) == 0 {
        Mutation::Kind {
            node,
            negate: rng.below(2) == 1,
        }
    } else {
        let slot = rng.below(net.fanins(node).len() as u64) as usize;
        // Any earlier node other than the constant, either phase.
        let new = NodeId(1 + rng.below(node.0 as u64 - 1) as u32);
        Mutation::Fanin {
            node,
            slot,
            new: new.lit().xor(rng.below(2) == 1),
        }
    }
}

/// Values of the combinational outputs of `net` on one input assignment
/// (one bool per combinational input, in order).
pub fn eval(net: &Network, pattern: &[bool]) -> Vec<bool> {
    let words: Vec<u64> = pattern
        .iter()
        .map(|&b| if b { u64::MAX } else { 0 })
        .collect();
    net.simulate_outputs(&words)
        .into_iter()
        .map(|w| w & 1 == 1)
        .collect()
}

/// True when two networks with the same inputs (in the same order) agree on
/// every output for all 2^n input patterns (n ≤ 20).
pub fn exhaustively_equal(a: &Network, b: &Network) -> bool {
    let n = a.combinational_inputs().len();
    assert!(n <= 20);
    let blocks = if n <= 6 { 1 } else { 1u64 << (n - 6) };
    let mask = if n >= 6 {
        u64::MAX
    } else {
        (1u64 << (1 << n)) - 1
    };
    for block in 0..blocks {
        let words: Vec<u64> = (0..n)
            .map(|k| ribbonmap::network::exhaustive_word(k, block))
            .collect();
        let oa = a.simulate_outputs(&words);
        let ob = b.simulate_outputs(&words);
        if oa.iter().zip(&ob).any(|(x, y)| (x ^ y) & mask != 0) {
            return false;
        }
    }
    true
}
