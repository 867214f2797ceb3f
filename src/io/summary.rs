//! What `ribbonmap inspect` reports about a network: port and node counts,
//! depth, the largest output support and the largest fanout.
//!
//! Supports are counted 64 outputs at a time: one backward pass over the
//! nodes propagates a 64-bit mask of the outputs each node feeds, so the cost
//! is nodes × outputs / 64 word operations rather than one search per output.

use crate::network::{KindCounts, Network, NodeKind};
use serde::Serialize;

/// Summary of a network.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct Summary {
    /// Design (model or module) name.
    pub design: String,
    /// Primary inputs.
    pub inputs: usize,
    /// Primary outputs.
    pub outputs: usize,
    /// Storage elements.
    pub storage: usize,
    /// Logic nodes by kind.
    pub nodes: KindCounts,
    /// All logic nodes.
    pub gates: usize,
    /// Logic levels on the longest path to a combinational output.
    pub depth: u32,
    /// The combinational output with the most combinational inputs in its cone.
    pub largest_output_support: Option<SupportEntry>,
    /// The node with the most fanout (gate fanins plus combinational outputs).
    pub largest_fanout: Option<FanoutEntry>,
}

/// An output and the number of inputs its cone depends on.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct SupportEntry {
    /// Output name (a primary output, or a storage element's next state).
    pub output: String,
    /// Number of combinational inputs in its cone.
    pub inputs: usize,
}

/// A node and its fanout.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct FanoutEntry {
    /// Input or storage name, or `node N` for internal logic.
    pub node: String,
    /// Number of references.
    pub fanout: u32,
}

/// Output supports: for every combinational output (primary outputs then
/// storage next states), the number of combinational inputs in its cone.
pub fn output_supports(net: &Network) -> Vec<usize> {
    let outs = net.combinational_outputs();
    let cis = net.combinational_inputs();
    let mut support = vec![0usize; outs.len()];
    let mut mask = vec![0u64; net.num_nodes()];
    for (chunk_index, chunk) in outs.chunks(64).enumerate() {
        mask.iter_mut().for_each(|m| *m = 0);
        for (bit, lit) in chunk.iter().enumerate() {
            mask[lit.node().index()] |= 1 << bit;
        }
        for i in (0..net.num_nodes()).rev() {
            let m = mask[i];
            if m == 0 {
                continue;
            }
            let id = crate::network::NodeId(i as u32);
            for f in net.fanins(id) {
                mask[f.node().index()] |= m;
            }
        }
        for ci in &cis {
            let mut m = mask[ci.index()];
            while m != 0 {
                let bit = m.trailing_zeros() as usize;
                support[chunk_index * 64 + bit] += 1;
                m &= m - 1;
            }
        }
    }
    support
}

/// Summarises `net`.
pub fn summarize(net: &Network) -> Summary {
    let nodes = net.kind_counts();
    let names: Vec<String> = net
        .outputs()
        .keys()
        .cloned()
        .chain(net.storage().keys().map(|s| format!("{s} (next state)")))
        .collect();
    let supports = output_supports(net);
    let largest_output_support = supports
        .iter()
        .enumerate()
        .max_by_key(|&(i, &s)| (s, std::cmp::Reverse(i)))
        .map(|(i, &s)| SupportEntry {
            output: names[i].clone(),
            inputs: s,
        });
    let fanout = net.fanout_counts();
    let mut port_name = vec![None; net.num_nodes()];
    for (name, id) in net.inputs() {
        port_name[id.index()] = Some(name.as_str());
    }
    for (name, s) in net.storage() {
        port_name[s.output.index()] = Some(name.as_str());
    }
    let largest_fanout = net
        .node_ids()
        .filter(|&id| net.kind(id) != NodeKind::Const)
        .max_by_key(|&id| (fanout[id.index()], std::cmp::Reverse(id.0)))
        .map(|id| FanoutEntry {
            node: port_name[id.index()]
                .map(str::to_string)
                .unwrap_or_else(|| format!("node {}", id.0)),
            fanout: fanout[id.index()],
        });
    Summary {
        design: net.name().to_string(),
        inputs: net.inputs().len(),
        outputs: net.outputs().len(),
        storage: net.storage().len(),
        nodes,
        gates: nodes.total(),
        depth: net.depth(),
        largest_output_support,
        largest_fanout,
    }
}
