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
//! So each node's function is computed over its cuts (module `cuts`: up to
//! four leaves, and cuts through existing nodes over two of the leaves),
//! and a node whose function over some cut of three leaves is a
//! three-input XOR or majority in any phase (or over two leaves a
//! two-input XOR) is rewritten as that gate over the cut's leaves. The recovered circuit
//! computes the same functions node for node, so proving it proves the
//! network; the logic inside recovered gates simply drops out.

use rustc_hash::{FxHashMap, FxHashSet};

use super::cuts::{
    enumerate_cuts, enumerate_plain_cuts, is_xor, majority_phases, row_mask, Cut, XOR2, XOR3,
};

use crate::network::{Lit, Network, NodeId, NodeKind};

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

/// What a node becomes in the recovered circuit, over node indices.
enum Choice {
    Xor(Vec<u32>, bool),
    Maj([(u32, bool); 3]),
    Original,
}

/// A three-input XOR is only taken over leaves that some node's majority
/// also uses (a full adder's sum and carry): flattening an XOR whose
/// middle signal is used elsewhere anyway only hides that signal from the
/// carry that pairs with it.
fn choose(cuts: &[Cut], adder_leaves: &FxHashSet<[u32; 4]>) -> Choice {
    let mut xor2 = None;
    for cut in cuts {
        let l = cut.leaves();
        match cut.size {
            3 => {
                if is_xor(cut) && adder_leaves.contains(&cut.leaves) {
                    return Choice::Xor(l.to_vec(), cut.truth != XOR3);
                }
                if let Some(ph) = majority_phases(cut.truth) {
                    return Choice::Maj([(l[0], ph[0]), (l[1], ph[1]), (l[2], ph[2])]);
                }
            }
            2 if xor2.is_none() && is_xor(cut) => {
                xor2 = Some(Choice::Xor(l.to_vec(), cut.truth != XOR2));
            }
            _ => {}
        }
    }
    xor2.unwrap_or(Choice::Original)
}

/// Recovers XOR and majority gates in the cones of `roots` of `net`.
///
/// Cuts may go through nodes built after the node itself (a sum computed
/// before the XOR of two of its inputs that the carry uses); if such a
/// choice ever closed a cycle, recovery runs again with cuts through earlier
/// nodes only, where every leaf precedes its node.
pub(crate) fn recover(net: &Network, roots: &[Lit], extended: bool) -> Recovered {
    let in_cone = cone(net, roots);
    if !extended {
        let cuts = enumerate_plain_cuts(net, &in_cone);
        return recover_over(net, roots, &cuts).expect("structural cuts form no cycle");
    }
    let cuts = enumerate_cuts(net, &in_cone, true);
    let (merged, roots) = merge_equal_nodes(net, roots, &cuts);
    let in_cone = cone(&merged, &roots);
    let cuts = enumerate_cuts(&merged, &in_cone, true);
    if let Some(rec) = recover_over(&merged, &roots, &cuts) {
        return rec;
    }
    let cuts = enumerate_cuts(&merged, &in_cone, false);
    recover_over(&merged, &roots, &cuts).expect("cuts through earlier nodes cannot close a cycle")
}

/// The nodes in the cones of `roots`.
fn cone(net: &Network, roots: &[Lit]) -> Vec<bool> {
    let mut in_cone = vec![false; net.num_nodes()];
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
    in_cone
}

/// A copy of `net` (same combinational inputs in the same order) in which
/// a node whose function over some cut equals, in either phase, an earlier
/// node's function over the same leaves is replaced by that node, and the
/// `roots` in the copy. Two nodes with equal tables over equal leaves are
/// equal on every input, so the copy computes what `net` computes; merging
/// them keeps a sum and its carry over one signal where the mapper built
/// two copies of it (`x XOR y` and `u XOR v` with `x XOR y = u XOR v`).
fn merge_equal_nodes(net: &Network, roots: &[Lit], cuts: &[Vec<Cut>]) -> (Network, Vec<Lit>) {
    let mut seen: FxHashMap<([u32; 4], u16), u32> = FxHashMap::default();
    let mut out = Network::new(net.name());
    let mut map = vec![Lit::FALSE; net.num_nodes()];
    for (k, id) in net.combinational_inputs().into_iter().enumerate() {
        map[id.index()] = out
            .add_input(format!("i{k}"))
            .expect("distinct generated names");
    }
    let lit = |map: &[Lit], l: Lit| map[l.node().index()].xor(l.is_complemented());
    for id in net.node_ids() {
        let i = id.index();
        if !net.is_gate(id) {
            continue;
        }
        let mut equal = None;
        for c in cuts[i].iter().filter(|c| c.size >= 2) {
            if c.leaves().iter().any(|&l| l as usize >= i) {
                continue;
            }
            // Tables in the phase whose first row is 0.
            let flip = c.truth & 1 == 1;
            let key = (
                c.leaves,
                if flip {
                    !c.truth & row_mask(c.size)
                } else {
                    c.truth
                },
            );
            match seen.get(&key) {
                Some(&r) if equal.is_none() => equal = Some(map[r as usize].xor(flip)),
                Some(_) => {}
                None => {
                    seen.insert(key, i as u32);
                }
            }
        }
        let f: Vec<Lit> = net.fanins(id).iter().map(|&l| lit(&map, l)).collect();
        map[i] = match equal {
            Some(l) => l,
            None => match net.kind(id) {
                NodeKind::And => out.and(f[0], f[1]),
                NodeKind::Xor => out.xor(f[0], f[1]),
                NodeKind::Maj => out.maj(f[0], f[1], f[2]),
                NodeKind::Const | NodeKind::Input => unreachable!("gates only"),
            },
        };
    }
    let roots = roots.iter().map(|&l| lit(&map, l)).collect();
    (out, roots)
}

fn choice_leaves(net: &Network, i: usize, choice: &Choice) -> Vec<usize> {
    match choice {
        Choice::Xor(leaves, _) => leaves.iter().map(|&l| l as usize).collect(),
        Choice::Maj(lits) => lits.iter().map(|&(l, _)| l as usize).collect(),
        Choice::Original => net
            .fanins(NodeId(i as u32))
            .iter()
            .map(|f| f.node().index())
            .collect(),
    }
}

/// Chooses each needed node's gate from `cuts` and numbers the gates in
/// depth-first post-order from the roots; `None` when the choices form a
/// cycle.
fn recover_over(net: &Network, roots: &[Lit], cuts: &[Vec<Cut>]) -> Option<Recovered> {
    let n = net.num_nodes();
    let cis = net.combinational_inputs();
    let adder_leaves: FxHashSet<[u32; 4]> = cuts
        .iter()
        .flatten()
        .filter(|c| c.size == 3 && majority_phases(c.truth).is_some())
        .map(|c| c.leaves)
        .collect();
    let mut var = vec![u32::MAX; n];
    for (k, id) in cis.iter().enumerate() {
        var[id.index()] = k as u32;
    }
    let mut choices: Vec<Option<Choice>> = (0..n).map(|_| None).collect();
    // 0: not seen, 1: on the current path, 2: numbered.
    let mut state = vec![0u8; n];
    let mut order = Vec::new();
    for r in roots {
        let mut stack = vec![(r.node().index(), false)];
        while let Some((i, done)) = stack.pop() {
            if done {
                state[i] = 2;
                order.push(i);
                continue;
            }
            match state[i] {
                2 => continue,
                1 => return None,
                _ => {}
            }
            if !net.is_gate(NodeId(i as u32)) {
                state[i] = 2;
                continue;
            }
            state[i] = 1;
            let choice = choose(&cuts[i], &adder_leaves);
            stack.push((i, true));
            for l in choice_leaves(net, i, &choice) {
                if state[l] != 2 {
                    stack.push((l, false));
                }
            }
            choices[i] = Some(choice);
        }
    }
    let order = index_first_order(net, &order, &choices);
    let mut gates = Vec::new();
    let lit = |var: &[u32], l: Lit| (var[l.node().index()], l.is_complemented());
    for i in order {
        let choice = choices[i].take().expect("chosen before numbering");
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
    Some(Recovered {
        inputs: cis.len(),
        gates,
        roots,
    })
}

/// The chosen gates `nodes` in a topological order of the recovered
/// circuit that takes the smallest node index first whenever it can: the
/// network's own order as far as the choices allow, which keeps the adder
/// columns together during rewriting (a depth-first order scatters them).
fn index_first_order(net: &Network, nodes: &[usize], choices: &[Option<Choice>]) -> Vec<usize> {
    use std::cmp::Reverse;
    use std::collections::BinaryHeap;
    let mut waiting: FxHashMap<usize, usize> = FxHashMap::default();
    let mut users: FxHashMap<usize, Vec<usize>> = FxHashMap::default();
    let chosen: FxHashSet<usize> = nodes.iter().copied().collect();
    let mut ready = BinaryHeap::new();
    for &i in nodes {
        let choice = choices[i].as_ref().expect("chosen");
        let leaves: Vec<usize> = choice_leaves(net, i, choice)
            .into_iter()
            .filter(|l| chosen.contains(l))
            .collect();
        if leaves.is_empty() {
            ready.push(Reverse(i));
        }
        for &l in &leaves {
            users.entry(l).or_default().push(i);
        }
        waiting.insert(i, leaves.len());
    }
    let mut order = Vec::with_capacity(nodes.len());
    while let Some(Reverse(i)) = ready.pop() {
        order.push(i);
        for &u in users.get(&i).map(Vec::as_slice).unwrap_or(&[]) {
            let w = waiting.get_mut(&u).expect("chosen");
            *w -= 1;
            if *w == 0 {
                ready.push(Reverse(u));
            }
        }
    }
    order
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
        let rec = recover(&net, &[s, c], false);
        assert_eq!(rec.inputs, 3);
        assert_eq!(rec.gates.len(), 2, "{:?}", rec.gates);
        assert!(matches!(&rec.gates[0], Gate::Xor(v, _) if v.len() == 3));
        assert!(matches!(&rec.gates[1], Gate::Maj(_)));
    }
}
