//! Recovering exclusive-or and majority gates before rewriting.
//!
//! Backward rewriting stays small on a multiplier only when every full
//! adder's sum and carry are rewritten as the three-input XOR and majority
//! they are: `sum + 2 * carry = x + y + z` is linear, while the same adder
//! spelled out in AND gates (a mapped netlist of NAND and NOR cells, or a
//! sum written as two two-input XORs whose middle signal is rewritten
//! late) leaves non-linear monomials that only cancel much later, if the
//! polynomial survives that long (Kaufmann, Biere, Kauers, "Verifying large
//! multipliers by combining SAT and computer algebra", FMCAD 2019, name
//! these vanishing monomials).
//!
//! So each node's function is computed over its cuts of at most three
//! leaves (truth tables of eight rows), and a node whose function over some
//! cut is a three-input XOR or majority in any phase (or a two-input XOR)
//! is rewritten as that gate over the cut's leaves. The recovered circuit
//! computes the same functions node for node, so proving it proves the
//! network; the logic inside recovered gates simply drops out.

use rustc_hash::FxHashSet;

use crate::network::{Lit, Network, NodeId, NodeKind};

/// Cuts kept per node (smallest first).
const CUTS_PER_NODE: usize = 24;

/// A gate of the recovered circuit over its variables (inputs and earlier
/// gates), fanins as `(variable, complemented)`.
#[derive(Clone, Debug, PartialEq, Eq)]
pub(crate) enum Gate {
    /// AND of two literals.
    And([(u32, bool); 2]),
    /// XOR of two or three variables, complemented when the flag is set.
    Xor(Vec<u32>, bool),
    /// Majority of three literals.
    Maj([(u32, bool); 3]),
}

/// The circuit handed to rewriting: variables `0..inputs` are the
/// network's combinational inputs in order, then one variable per gate in
/// topological order.
pub(crate) struct Recovered {
    /// Number of input variables.
    pub inputs: usize,
    /// Gate of variable `inputs + i`.
    pub gates: Vec<Gate>,
    /// Each requested literal as `(variable, complemented)`; variable
    /// `u32::MAX` is the constant false.
    pub roots: Vec<(u32, bool)>,
}

/// A cut: sorted leaves (at most three node indices) and the function over
/// them (bit r: value when leaf k has bit k of r).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
struct Cut {
    leaves: [u32; 3],
    size: u8,
    truth: u8,
}

impl Cut {
    fn leaves(&self) -> &[u32] {
        &self.leaves[..self.size as usize]
    }
}

/// The truth table of a cut function moved onto a superset of its leaves.
fn expand(truth: u8, from: &[u32], to: &[u32]) -> u8 {
    let positions: Vec<usize> = from
        .iter()
        .map(|l| to.iter().position(|t| t == l).expect("superset"))
        .collect();
    let mut out = 0u8;
    for row in 0..(1usize << to.len()) {
        let mut index = 0;
        for (k, &p) in positions.iter().enumerate() {
            index |= ((row >> p) & 1) << k;
        }
        if (truth >> index) & 1 == 1 {
            out |= 1 << row;
        }
    }
    out
}

fn merged_leaves(cuts: &[&Cut]) -> Option<Vec<u32>> {
    let mut leaves: Vec<u32> = cuts
        .iter()
        .flat_map(|c| c.leaves().iter().copied())
        .collect();
    leaves.sort_unstable();
    leaves.dedup();
    (leaves.len() <= 3).then_some(leaves)
}

fn phase(truth: u8, complemented: bool, rows: usize) -> u8 {
    let mask = ((1u16 << rows) - 1) as u8;
    if complemented {
        !truth & mask
    } else {
        truth & mask
    }
}

/// Computes up to [`CUTS_PER_NODE`] cuts of every node of `net`.
fn enumerate_cuts(net: &Network, needed: &[bool]) -> Vec<Vec<Cut>> {
    let mut cuts: Vec<Vec<Cut>> = vec![Vec::new(); net.num_nodes()];
    for id in net.node_ids() {
        let i = id.index();
        if !needed[i] {
            continue;
        }
        let trivial = Cut {
            leaves: [i as u32, 0, 0],
            size: 1,
            truth: 0b10,
        };
        if !net.is_gate(id) {
            cuts[i] = vec![trivial];
            continue;
        }
        let fanins = net.fanins(id);
        let kind = net.kind(id);
        let mut found: Vec<Cut> = Vec::new();
        let mut combine = |chosen: &[&Cut]| {
            let Some(leaves) = merged_leaves(chosen) else {
                return;
            };
            let rows = 1usize << leaves.len();
            let t: Vec<u8> = chosen
                .iter()
                .zip(fanins)
                .map(|(c, f)| {
                    phase(
                        expand(c.truth, c.leaves(), &leaves),
                        f.is_complemented(),
                        rows,
                    )
                })
                .collect();
            let truth = match kind {
                NodeKind::And => t[0] & t[1],
                NodeKind::Xor => t[0] ^ t[1],
                NodeKind::Maj => (t[0] & t[1]) | (t[0] & t[2]) | (t[1] & t[2]),
                NodeKind::Const | NodeKind::Input => unreachable!("gates only"),
            };
            let mut arr = [0u32; 3];
            arr[..leaves.len()].copy_from_slice(&leaves);
            let cut = Cut {
                leaves: arr,
                size: leaves.len() as u8,
                truth,
            };
            if !found.iter().any(|c| c.leaves() == cut.leaves()) {
                found.push(cut);
            }
        };
        let c0 = &cuts[fanins[0].node().index()];
        let c1 = &cuts[fanins[1].node().index()];
        if kind == NodeKind::Maj {
            let c2 = &cuts[fanins[2].node().index()];
            for x in c0 {
                for y in c1 {
                    for z in c2 {
                        combine(&[x, y, z]);
                    }
                }
            }
        } else {
            for x in c0 {
                for y in c1 {
                    combine(&[x, y]);
                }
            }
        }
        // Keep the cuts that can matter: XOR and majority functions first,
        // then small cuts (the fanins' own), then the rest.
        found.sort_by_key(|c| (rank(c), c.size));
        found.truncate(CUTS_PER_NODE - 1);
        found.push(trivial);
        cuts[i] = found;
    }
    cuts
}

/// XOR of the leaves, as 8-row tables for 2 and 3 leaves.
const XOR2: u8 = 0b0110;
const XOR3: u8 = 0x96;

/// The three-input majority with input phases `phases` (bit k: leaf k
/// complemented), as an 8-row table.
fn majority_table(phases: u8) -> u8 {
    let mut t = 0u8;
    for row in 0..8u8 {
        let v = row ^ phases;
        if v.count_ones() >= 2 {
            t |= 1 << row;
        }
    }
    t
}

/// 0 for a cut whose function is an XOR or a majority, 1 for other cuts of
/// at most two leaves, 2 for the rest.
fn rank(cut: &Cut) -> u8 {
    let t = cut.truth;
    let interesting = match cut.size {
        2 => t & 0xF == XOR2 || t & 0xF == !XOR2 & 0xF,
        3 => t == XOR3 || t == !XOR3 || majority_phases(t).is_some(),
        _ => false,
    };
    if interesting {
        0
    } else if cut.size <= 2 {
        1
    } else {
        2
    }
}

/// What a node becomes in the recovered circuit, over node indices.
enum Choice {
    Xor(Vec<u32>, bool),
    Maj([(u32, bool); 3]),
    Original,
}

fn majority_phases(truth: u8) -> Option<[bool; 3]> {
    (0..8u8).find_map(|phases| {
        let m = majority_table(phases);
        // maj(x', y', z') complemented = maj of the complements.
        let ph = if truth == m {
            phases
        } else if truth == !m {
            phases ^ 7
        } else {
            return None;
        };
        Some([ph & 1 != 0, ph & 2 != 0, ph & 4 != 0])
    })
}

/// A three-input XOR is only taken over leaves that some node's majority
/// also uses (a full adder's sum and carry): flattening an XOR whose
/// middle signal is used elsewhere anyway only hides that signal from the
/// carry that pairs with it.
fn choose(cuts: &[Cut], adder_leaves: &FxHashSet<[u32; 3]>) -> Choice {
    let mut xor2 = None;
    for cut in cuts {
        let l = cut.leaves();
        match cut.size {
            3 => {
                if (cut.truth == XOR3 || cut.truth == !XOR3) && adder_leaves.contains(&cut.leaves) {
                    return Choice::Xor(l.to_vec(), cut.truth != XOR3);
                }
                if let Some(ph) = majority_phases(cut.truth) {
                    return Choice::Maj([(l[0], ph[0]), (l[1], ph[1]), (l[2], ph[2])]);
                }
            }
            2 if xor2.is_none() && (cut.truth & 0xF == XOR2 || cut.truth & 0xF == !XOR2 & 0xF) => {
                xor2 = Some(Choice::Xor(l.to_vec(), cut.truth & 0xF != XOR2));
            }
            _ => {}
        }
    }
    xor2.unwrap_or(Choice::Original)
}

/// Recovers XOR and majority gates in the cones of `roots` of `net`.
pub(crate) fn recover(net: &Network, roots: &[Lit]) -> Recovered {
    let n = net.num_nodes();
    let cis = net.combinational_inputs();
    // Cones of the roots, for cut enumeration.
    let mut in_cone = vec![false; n];
    let mut stack: Vec<usize> = roots.iter().map(|l| l.node().index()).collect();
    while let Some(i) = stack.pop() {
        if std::mem::replace(&mut in_cone[i], true) {
            continue;
        }
        stack.extend(
            net.fanins(NodeId(i as u32))
                .iter()
                .map(|f| f.node().index()),
        );
    }
    let cuts = enumerate_cuts(net, &in_cone);
    let adder_leaves: FxHashSet<[u32; 3]> = cuts
        .iter()
        .flatten()
        .filter(|c| c.size == 3 && majority_phases(c.truth).is_some())
        .map(|c| c.leaves)
        .collect();
    // Top-down choice of each needed node's gate.
    let mut needed = vec![false; n];
    for r in roots {
        needed[r.node().index()] = true;
    }
    let mut choices: Vec<Option<Choice>> = (0..n).map(|_| None).collect();
    for i in (0..n).rev() {
        let id = NodeId(i as u32);
        if !needed[i] || !net.is_gate(id) {
            continue;
        }
        let choice = choose(&cuts[i], &adder_leaves);
        match &choice {
            Choice::Xor(leaves, _) => leaves.iter().for_each(|&l| needed[l as usize] = true),
            Choice::Maj(lits) => lits.iter().for_each(|&(l, _)| needed[l as usize] = true),
            Choice::Original => net
                .fanins(id)
                .iter()
                .for_each(|f| needed[f.node().index()] = true),
        }
        choices[i] = Some(choice);
    }
    // Number the variables: inputs first, then needed gates bottom-up.
    let mut var = vec![u32::MAX; n];
    for (k, id) in cis.iter().enumerate() {
        var[id.index()] = k as u32;
    }
    let mut gates = Vec::new();
    let lit = |var: &[u32], l: Lit| (var[l.node().index()], l.is_complemented());
    for i in 0..n {
        let Some(choice) = choices[i].take() else {
            continue;
        };
        let id = NodeId(i as u32);
        let gate = match choice {
            Choice::Xor(leaves, out) => {
                // The constant node is never a cut leaf of a gate (hashing
                // folds constants), so every leaf has a variable.
                Gate::Xor(leaves.iter().map(|&l| var[l as usize]).collect(), out)
            }
            Choice::Maj(lits) => Gate::Maj(lits.map(|(l, c)| (var[l as usize], c))),
            Choice::Original => {
                let f = net.fanins(id);
                match net.kind(id) {
                    NodeKind::And => Gate::And([lit(&var, f[0]), lit(&var, f[1])]),
                    NodeKind::Xor => {
                        let (x, y) = (lit(&var, f[0]), lit(&var, f[1]));
                        Gate::Xor(vec![x.0, y.0], x.1 ^ y.1)
                    }
                    NodeKind::Maj => Gate::Maj([lit(&var, f[0]), lit(&var, f[1]), lit(&var, f[2])]),
                    NodeKind::Const | NodeKind::Input => unreachable!("gates only"),
                }
            }
        };
        var[i] = (cis.len() + gates.len()) as u32;
        gates.push(gate);
    }
    let roots = roots.iter().map(|&l| lit(&var, l)).collect();
    Recovered {
        inputs: cis.len(),
        gates,
        roots,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A full adder spelled in AND gates only (sum as the OR of the four
    /// odd minterms' products, carry as OR of pair products) comes back as
    /// one three-input XOR and one majority over the three inputs.
    #[test]
    fn and_only_full_adder_is_recovered() {
        let mut net = Network::new("fa");
        let x = net.add_input("x").unwrap();
        let y = net.add_input("y").unwrap();
        let z = net.add_input("z").unwrap();
        let t = net.and(x, !y);
        let u = net.and(!x, y);
        let p = net.or(t, u);
        let q = net.and(p, !z);
        let r = net.and(!p, z);
        let s = net.or(q, r);
        let xy = net.and(x, y);
        let xz = net.and(x, z);
        let yz = net.and(y, z);
        let c0 = net.or(xy, xz);
        let c = net.or(c0, yz);
        let rec = recover(&net, &[s, c]);
        assert_eq!(rec.inputs, 3);
        assert_eq!(rec.gates.len(), 2, "{:?}", rec.gates);
        assert!(matches!(&rec.gates[0], Gate::Xor(v, _) if v.len() == 3));
        assert!(matches!(&rec.gates[1], Gate::Maj(_)));
        // Majority tables: maj(x, y, z) = 0xE8 (common practice).
        assert_eq!(majority_table(0), 0xE8);
    }
}
