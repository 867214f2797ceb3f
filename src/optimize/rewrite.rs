//! DAG-aware cut rewriting: each AND node's small cones are replaced by
//! cheaper structures when the replacement, counted against the logic it
//! frees and the logic it can share, saves nodes.
//!
//! The network is loaded into a [`Graph`]: an append-only AND graph with
//! reference counts and structural hashing, where XOR and majority nodes are
//! either lowered to ANDs or kept as opaque nodes (cut boundaries). Nodes
//! are visited in topological order. For every cut of at most four leaves
//! (priority cuts, computed on the live graph) the cut's function is looked
//! up in a cache of factored structures ([`super::factor`]); the gain of a
//! structure is the size of the node's maximum fanout-free cone above the
//! cut (what becomes dead) minus the steps of the structure that do not
//! already exist among the live nodes (found by structural hashing). The
//! best positive gain is applied: the structure is built, the node is
//! redirected to it, and the reference counts move over.
//!
//! Redirected nodes are never edited in place: every node keeps its stored
//! fanins and reads them through the redirections, so a replacement is a
//! constant-time change. Every replacement computes the same function as
//! the node it replaces, so cut functions cached earlier stay valid. The
//! result is rebuilt into a fresh [`Network`] from the outputs.

use super::factor::{structures, Operand, Structure, VAR4};
use crate::network::{Lit, Network, NodeKind};
use rustc_hash::FxHashMap;

const NONE: u32 = u32::MAX;
const MAX_LEAVES: usize = 4;

/// Settings of [`rewrite`].
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct RewriteOptions {
    /// Cuts kept per node (besides the trivial one).
    pub cuts_per_node: usize,
    /// Rebuild XOR nodes as ANDs (for libraries without an XOR cell).
    pub lower_xor: bool,
    /// Rebuild majority nodes as ANDs (for libraries without a majority
    /// cell).
    pub lower_maj: bool,
    /// Also apply replacements that save nothing (they restructure the
    /// logic for later passes).
    pub zero_gain: bool,
}

impl Default for RewriteOptions {
    fn default() -> Self {
        RewriteOptions {
            cuts_per_node: 16,
            lower_xor: true,
            lower_maj: true,
            zero_gain: false,
        }
    }
}

/// Counters of one rewriting pass.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct RewriteCounts {
    /// Replacements applied.
    pub replaced: u64,
    /// Sum of the estimated gains (nodes).
    pub estimated_gain: u64,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Kind {
    Constant,
    Input,
    And,
    Xor,
    Maj,
}

#[derive(Clone, Copy, Debug)]
struct Cut {
    leaves: [u32; MAX_LEAVES],
    len: u8,
    truth: u16,
    /// One bit per leaf (leaf id modulo 64), for quick size and
    /// dominance checks.
    signature: u64,
}

impl Cut {
    fn leaves(&self) -> &[u32] {
        &self.leaves[..self.len as usize]
    }
}

/// An append-only AND graph with redirections and reference counts.
struct Graph {
    kind: Vec<Kind>,
    /// Stored fanins, packed literals (`node << 1 | complement`).
    fanin: Vec<[u32; 3]>,
    refs: Vec<u32>,
    /// Redirection of a replaced node (packed literal), or `NONE`.
    redirect: Vec<u32>,
    structural_index: FxHashMap<u64, u32>,
    cuts: Vec<Option<Vec<Cut>>>,
}

impl Graph {
    fn new(capacity: usize) -> Graph {
        let mut g = Graph {
            kind: Vec::with_capacity(capacity),
            fanin: Vec::with_capacity(capacity),
            refs: Vec::with_capacity(capacity),
            redirect: Vec::with_capacity(capacity),
            structural_index: FxHashMap::default(),
            cuts: Vec::with_capacity(capacity),
        };
        g.push(Kind::Constant, [0; 3]);
        g
    }

    fn push(&mut self, kind: Kind, fanin: [u32; 3]) -> u32 {
        let id = self.kind.len() as u32;
        self.kind.push(kind);
        self.fanin.push(fanin);
        self.refs.push(0);
        self.redirect.push(NONE);
        self.cuts.push(None);
        id
    }

    /// The live literal `lit` stands for, following redirections.
    fn resolve(&self, mut lit: u32) -> u32 {
        loop {
            let r = self.redirect[(lit >> 1) as usize];
            if r == NONE {
                return lit;
            }
            lit = r ^ (lit & 1);
        }
    }

    fn fanins(&self, node: u32) -> &[u32] {
        let f = &self.fanin[node as usize];
        match self.kind[node as usize] {
            Kind::And | Kind::Xor => &f[..2],
            Kind::Maj => &f[..],
            Kind::Constant | Kind::Input => &f[..0],
        }
    }

    /// Trivial simplification of an AND of two live literals: `Ok(lit)`
    /// when it needs no node, `Err(key)` with the normalised pair otherwise.
    fn simplify(a: u32, b: u32) -> Result<u32, u64> {
        let (a, b) = if a <= b { (a, b) } else { (b, a) };
        if a == 0 {
            return Ok(0);
        }
        if a == 1 || a == b {
            return Ok(b);
        }
        if a == b ^ 1 {
            return Ok(0);
        }
        Err(((a as u64) << 32) | b as u64)
    }

    /// An existing node for AND(a, b), as a live literal.
    fn find_and(&self, a: u32, b: u32) -> Option<u32> {
        match Graph::simplify(self.resolve(a), self.resolve(b)) {
            Ok(l) => Some(l),
            Err(key) => self
                .structural_index
                .get(&key)
                .map(|&n| self.resolve(n << 1)),
        }
    }

    fn and(&mut self, a: u32, b: u32) -> u32 {
        match Graph::simplify(self.resolve(a), self.resolve(b)) {
            Ok(l) => l,
            Err(key) => {
                if let Some(&n) = self.structural_index.get(&key) {
                    return self.resolve(n << 1);
                }
                let n = self.push(Kind::And, [(key >> 32) as u32, key as u32, 0]);
                self.structural_index.insert(key, n);
                n << 1
            }
        }
    }

    fn or(&mut self, a: u32, b: u32) -> u32 {
        self.and(a ^ 1, b ^ 1) ^ 1
    }

    fn reference(&mut self, node: u32, stack: &mut Vec<u32>) {
        stack.push(node);
        while let Some(n) = stack.pop() {
            self.refs[n as usize] += 1;
            if self.refs[n as usize] == 1 {
                for i in 0..self.fanins(n).len() {
                    let f = self.resolve(self.fanin[n as usize][i]) >> 1;
                    stack.push(f);
                }
            }
        }
    }

    /// Dereferences the fanins of `node` (treated as dead), stopping at
    /// `leaves`; returns how many nodes die, `node` included.
    fn deref_cone(&mut self, node: u32, leaves: &[u32], stack: &mut Vec<u32>) -> u32 {
        let mut dead = 1;
        stack.clear();
        stack.push(node);
        while let Some(n) = stack.pop() {
            for i in 0..self.fanins(n).len() {
                let f = self.resolve(self.fanin[n as usize][i]) >> 1;
                self.refs[f as usize] -= 1;
                if self.refs[f as usize] == 0
                    && !leaves.contains(&f)
                    && matches!(self.kind[f as usize], Kind::And | Kind::Xor | Kind::Maj)
                {
                    dead += 1;
                    stack.push(f);
                }
            }
        }
        dead
    }

    /// Undoes [`Graph::deref_cone`].
    fn ref_cone(&mut self, node: u32, leaves: &[u32], stack: &mut Vec<u32>) {
        stack.clear();
        stack.push(node);
        while let Some(n) = stack.pop() {
            for i in 0..self.fanins(n).len() {
                let f = self.resolve(self.fanin[n as usize][i]) >> 1;
                self.refs[f as usize] += 1;
                if self.refs[f as usize] == 1
                    && !leaves.contains(&f)
                    && matches!(self.kind[f as usize], Kind::And | Kind::Xor | Kind::Maj)
                {
                    stack.push(f);
                }
            }
        }
    }

    /// The cuts of `node`, computed on demand from its fanins' cuts.
    fn cuts_of(&mut self, node: u32, limit: usize) -> &[Cut] {
        if self.cuts[node as usize].is_none() {
            let cuts = self.compute_cuts(node, limit);
            self.cuts[node as usize] = Some(cuts);
        }
        self.cuts[node as usize].as_deref().expect("just computed")
    }

    fn compute_cuts(&mut self, node: u32, limit: usize) -> Vec<Cut> {
        let trivial = Cut {
            leaves: [node, 0, 0, 0],
            len: 1,
            truth: VAR4[0],
            signature: 1u64 << (node % 64),
        };
        if self.kind[node as usize] != Kind::And {
            return vec![trivial];
        }
        let a = self.resolve(self.fanin[node as usize][0]);
        let b = self.resolve(self.fanin[node as usize][1]);
        // Fanins first (an explicit order so deep new chains do not recurse
        // far: their fanins are older nodes whose cuts exist).
        let mut pending = vec![a >> 1, b >> 1];
        while let Some(&n) = pending.last() {
            if self.cuts[n as usize].is_some() {
                pending.pop();
                continue;
            }
            let missing: Vec<u32> = if self.kind[n as usize] == Kind::And {
                [self.fanin[n as usize][0], self.fanin[n as usize][1]]
                    .iter()
                    .map(|&l| self.resolve(l) >> 1)
                    .filter(|&f| self.cuts[f as usize].is_none())
                    .collect()
            } else {
                Vec::new()
            };
            if missing.is_empty() {
                pending.pop();
                let cuts = self.compute_cuts(n, limit);
                self.cuts[n as usize] = Some(cuts);
            } else {
                pending.extend(missing);
            }
        }
        let ca = self.cuts[(a >> 1) as usize].as_deref().expect("computed");
        let cb = self.cuts[(b >> 1) as usize].as_deref().expect("computed");
        let mut out: Vec<Cut> = Vec::with_capacity(2 * limit + 2);
        for x in ca {
            for y in cb {
                let signature = x.signature | y.signature;
                if signature.count_ones() as usize > MAX_LEAVES {
                    continue;
                }
                let Some(merged) = merge(x.leaves(), y.leaves()) else {
                    continue;
                };
                let mut cut = Cut {
                    leaves: merged.0,
                    len: merged.1 as u8,
                    truth: 0,
                    signature,
                };
                if out
                    .iter()
                    .any(|c| c.signature & !signature == 0 && dominates(c.leaves(), cut.leaves()))
                {
                    continue;
                }
                out.retain(|c| {
                    !(signature & !c.signature == 0 && dominates(cut.leaves(), c.leaves()))
                });
                let leaves = &merged.0[..merged.1];
                let mut tx = stretch(x.truth, x.leaves(), leaves);
                let mut ty = stretch(y.truth, y.leaves(), leaves);
                if a & 1 == 1 {
                    tx = !tx;
                }
                if b & 1 == 1 {
                    ty = !ty;
                }
                cut.truth = tx & ty;
                out.push(cut);
            }
        }
        out.sort_by_key(|c| std::cmp::Reverse(c.len));
        out.truncate(limit);
        out.push(trivial);
        out
    }
}

/// True when every leaf of `small` is in `big`.
fn dominates(small: &[u32], big: &[u32]) -> bool {
    small.len() <= big.len() && small.iter().all(|l| big.contains(l))
}

/// Union of two sorted leaf lists, when it has at most four leaves.
fn merge(x: &[u32], y: &[u32]) -> Option<([u32; MAX_LEAVES], usize)> {
    let mut out = [0u32; MAX_LEAVES];
    let (mut i, mut j, mut n) = (0, 0, 0);
    while i < x.len() || j < y.len() {
        let v = if j == y.len() || (i < x.len() && x[i] < y[j]) {
            i += 1;
            x[i - 1]
        } else if i == x.len() || y[j] < x[i] {
            j += 1;
            y[j - 1]
        } else {
            i += 1;
            j += 1;
            x[i - 1]
        };
        if n == MAX_LEAVES {
            return None;
        }
        out[n] = v;
        n += 1;
    }
    Some((out, n))
}

/// Re-expresses `truth` over `from` (a subset of `to`, both sorted) as a
/// table over `to`.
fn stretch(truth: u16, from: &[u32], to: &[u32]) -> u16 {
    if from == to {
        return truth;
    }
    let mut pos = [0usize; MAX_LEAVES];
    for (k, l) in from.iter().enumerate() {
        pos[k] = to.iter().position(|t| t == l).expect("subset");
    }
    let pos = &pos[..from.len()];
    let mut out = 0u16;
    for row in 0..16usize {
        let mut sub = 0usize;
        for (k, &p) in pos.iter().enumerate() {
            sub |= ((row >> p) & 1) << k;
        }
        out |= ((truth >> sub) & 1) << row;
    }
    out
}

/// The live literal of an operand given leaf and step literals.
fn operand_lit(o: Operand, leaves: &[u32], steps: &[u32]) -> u32 {
    match o {
        Operand::Leaf(v, c) => (leaves[v as usize] << 1) | c as u32,
        Operand::Step(i, c) => steps[i as usize] ^ c as u32,
        Operand::Constant(c) => c as u32,
    }
}

/// Steps of `s` that would be new nodes, counting existing dead nodes as
/// new (they would be kept alive). `None` as a step literal means unknown.
fn added_nodes(
    g: &Graph,
    s: &Structure,
    leaves: &[u32],
    budget: u32,
    lits: &mut Vec<Option<u32>>,
) -> u32 {
    lits.clear();
    let mut added = 0;
    let lit = |o: Operand, lits: &[Option<u32>]| -> Option<u32> {
        match o {
            Operand::Leaf(v, c) => Some((leaves[v as usize] << 1) | c as u32),
            Operand::Step(i, c) => lits[i as usize].map(|l| l ^ c as u32),
            Operand::Constant(c) => Some(c as u32),
        }
    };
    for step in &s.steps {
        let found = match (lit(step[0], lits), lit(step[1], lits)) {
            (Some(a), Some(b)) => g.find_and(a, b),
            _ => None,
        };
        match found {
            Some(l) if l < 2 || g.refs[(l >> 1) as usize] > 0 => {}
            _ => added += 1,
        }
        if added > budget {
            return added;
        }
        lits.push(found);
    }
    added
}

/// Builds `s` over `leaves`, returning the output's live literal; `None`
/// when a step turns out to be `node` itself (redirecting `node` to logic
/// built on it would make a loop).
fn build(g: &mut Graph, s: &Structure, leaves: &[u32], node: u32) -> Option<u32> {
    let mut steps: Vec<u32> = Vec::with_capacity(s.steps.len());
    for step in &s.steps {
        let a = operand_lit(step[0], leaves, &steps);
        let b = operand_lit(step[1], leaves, &steps);
        let l = g.and(a, b);
        if l >> 1 == node {
            return None;
        }
        steps.push(l);
    }
    Some(operand_lit(s.output, leaves, &steps))
}

/// Loads `net` into a graph; returns the graph and the graph literal of
/// every network node.
fn load(net: &Network, opts: &RewriteOptions) -> (Graph, Vec<u32>) {
    let mut g = Graph::new(net.num_nodes() + net.num_nodes() / 2);
    let mut map = vec![0u32; net.num_nodes()];
    for id in net.combinational_inputs() {
        map[id.index()] = g.push(Kind::Input, [0; 3]) << 1;
    }
    let m = |map: &[u32], l: Lit| map[l.node().index()] ^ l.is_complemented() as u32;
    for id in net.node_ids() {
        let f = net.fanins(id);
        map[id.index()] = match net.kind(id) {
            NodeKind::Const | NodeKind::Input => continue,
            NodeKind::And => g.and(m(&map, f[0]), m(&map, f[1])),
            NodeKind::Xor if opts.lower_xor => {
                let (a, b) = (m(&map, f[0]), m(&map, f[1]));
                let p = g.and(a, b ^ 1);
                let q = g.and(a ^ 1, b);
                g.or(p, q)
            }
            NodeKind::Xor => g.push(Kind::Xor, [m(&map, f[0]), m(&map, f[1]), 0]) << 1,
            NodeKind::Maj if opts.lower_maj => {
                let (a, b, c) = (m(&map, f[0]), m(&map, f[1]), m(&map, f[2]));
                let ab = g.and(a, b);
                let either = g.or(a, b);
                let carry = g.and(c, either);
                g.or(ab, carry)
            }
            NodeKind::Maj => g.push(Kind::Maj, [m(&map, f[0]), m(&map, f[1]), m(&map, f[2])]) << 1,
        };
    }
    (g, map)
}

/// Rebuilds the live graph into a network with the ports of `net`; `None`
/// if the redirections made a loop (a bug, guarded against).
fn rebuild(g: &Graph, net: &Network, map: &[u32]) -> Option<Network> {
    let mut out = net.empty_like();
    let mut image = vec![NONE; g.kind.len()];
    image[0] = 0;
    for (id, lit) in net
        .combinational_inputs()
        .into_iter()
        .zip(net.port_map_into(&out))
    {
        image[(map[id.index()] >> 1) as usize] = lit.raw();
    }
    let mut stack: Vec<(u32, bool)> = Vec::new();
    let mut open = vec![false; g.kind.len()];
    let mut build_lit = |root: u32, out: &mut Network, image: &mut Vec<u32>| -> Option<Lit> {
        let root = g.resolve(root);
        stack.push((root >> 1, false));
        while let Some((n, expanded)) = stack.pop() {
            if image[n as usize] != NONE {
                continue;
            }
            let ins: Vec<u32> = g.fanins(n).iter().map(|&l| g.resolve(l)).collect();
            if !expanded {
                if open[n as usize] {
                    // Reached again while its fanins are still open.
                    return None;
                }
                open[n as usize] = true;
                stack.push((n, true));
                for &l in &ins {
                    if image[(l >> 1) as usize] == NONE {
                        stack.push((l >> 1, false));
                    }
                }
                continue;
            }
            let lits: Vec<Lit> = ins
                .iter()
                .map(|&l| Lit::from_raw(image[(l >> 1) as usize] ^ (l & 1)))
                .collect();
            let r = match g.kind[n as usize] {
                Kind::And => out.and(lits[0], lits[1]),
                Kind::Xor => out.xor(lits[0], lits[1]),
                Kind::Maj => out.maj(lits[0], lits[1], lits[2]),
                Kind::Constant | Kind::Input => unreachable!("inputs have images"),
            };
            image[n as usize] = r.raw();
            open[n as usize] = false;
        }
        Some(Lit::from_raw(image[(root >> 1) as usize] ^ (root & 1)))
    };
    let mut outputs = Vec::new();
    for &l in net.outputs().values() {
        let gl = map[l.node().index()] ^ l.is_complemented() as u32;
        outputs.push(build_lit(gl, &mut out, &mut image)?);
    }
    let mut nexts = Vec::new();
    for s in net.storage().values() {
        let gl = map[s.next.node().index()] ^ s.next.is_complemented() as u32;
        nexts.push(build_lit(gl, &mut out, &mut image)?);
    }
    for (name, lit) in net.outputs().keys().zip(outputs) {
        out.add_output(name.clone(), lit).expect("names are unique");
    }
    for (name, lit) in net.storage().keys().zip(nexts) {
        out.set_storage_next(name, lit).expect("storage was copied");
    }
    Some(out)
}

/// One pass of DAG-aware rewriting over `net`; returns the rewritten
/// network (same ports and storage elements) and counters.
pub fn rewrite(net: &Network, opts: &RewriteOptions) -> (Network, RewriteCounts) {
    let mut counts = RewriteCounts::default();
    let (mut g, map) = load(net, opts);
    let mut stack = Vec::new();
    let mut roots: Vec<u32> = net
        .combinational_outputs()
        .iter()
        .map(|l| map[l.node().index()] >> 1)
        .collect();
    for r in roots.drain(..) {
        g.reference(r, &mut stack);
    }
    let mut cache: Vec<Option<Box<[Structure; 2]>>> = vec![None; 1 << 16];
    let original = g.kind.len() as u32;
    let limit = opts.cuts_per_node.max(1);
    let mut lits = Vec::new();
    let mut cuts: Vec<Cut> = Vec::new();
    for node in 1..original {
        if g.kind[node as usize] != Kind::And
            || g.refs[node as usize] == 0
            || g.redirect[node as usize] != NONE
        {
            continue;
        }
        cuts.clear();
        cuts.extend_from_slice(g.cuts_of(node, limit));
        // Best: (gain, cut index, structure index or NONE for a literal).
        let mut best: Option<(u32, usize, u32)> = None;
        let saved_refs = g.refs[node as usize];
        for (ci, cut) in cuts.iter().enumerate() {
            if cut.len == 1 && cut.leaves[0] == node {
                continue;
            }
            let leaves = cut.leaves();
            let dead = g.deref_cone(node, leaves, &mut stack);
            if dead < 2 && !opts.zero_gain {
                // Only the node itself would go: a structure must then exist
                // whole, which is a duplicate the sweep merges anyway.
                g.ref_cone(node, leaves, &mut stack);
                continue;
            }
            g.refs[node as usize] = 0;
            let truth = cut.truth;
            let literal = truth == 0
                || truth == u16::MAX
                || (0..leaves.len()).any(|v| truth == VAR4[v] || truth == !VAR4[v]);
            if literal {
                if best.is_none_or(|b| dead > b.0) {
                    best = Some((dead, ci, NONE));
                }
            } else {
                let options =
                    cache[truth as usize].get_or_insert_with(|| Box::new(structures(truth)));
                for (si, s) in options.iter().enumerate() {
                    let budget = dead + opts.zero_gain as u32;
                    let added = added_nodes(&g, s, leaves, budget, &mut lits);
                    if added > dead || (added == dead && !opts.zero_gain) {
                        continue;
                    }
                    let gain = dead - added;
                    if best.is_none_or(|b| gain > b.0) {
                        best = Some((gain, ci, si as u32));
                    }
                }
            }
            g.refs[node as usize] = saved_refs;
            g.ref_cone(node, leaves, &mut stack);
        }
        let Some((gain, ci, si)) = best else {
            continue;
        };
        let cut = cuts[ci];
        let leaves = cut.leaves();
        let replacement = if si == NONE {
            let t = cut.truth;
            if t == 0 {
                0
            } else if t == u16::MAX {
                1
            } else {
                let v = (0..leaves.len())
                    .find(|&v| t == VAR4[v] || t == !VAR4[v])
                    .expect("a literal");
                (leaves[v] << 1) | (t == !VAR4[v]) as u32
            }
        } else {
            let s = cache[cut.truth as usize].as_ref().expect("evaluated")[si as usize].clone();
            match build(&mut g, &s, leaves, node) {
                Some(l) => l,
                None => continue,
            }
        };
        if replacement >> 1 == node {
            continue;
        }
        // Move the references over: the replacement first, so nodes shared
        // by both never drop to zero on the way.
        for _ in 0..saved_refs {
            g.reference(replacement >> 1, &mut stack);
        }
        g.redirect[node as usize] = replacement;
        for _ in 0..saved_refs {
            g.dereference_node_after_redirect(node, &mut stack);
        }
        counts.replaced += 1;
        counts.estimated_gain += gain as u64;
    }
    match rebuild(&g, net, &map) {
        Some(out) => (out, counts),
        None => {
            debug_assert!(false, "rewriting made a loop");
            (net.cleanup(), RewriteCounts::default())
        }
    }
}

impl Graph {
    /// Drops one reference of a redirected node: its own fanins are read
    /// through their redirections, not through its own.
    fn dereference_node_after_redirect(&mut self, node: u32, stack: &mut Vec<u32>) {
        self.refs[node as usize] -= 1;
        if self.refs[node as usize] == 0 {
            stack.clear();
            for i in 0..self.fanins(node).len() {
                let f = self.resolve(self.fanin[node as usize][i]) >> 1;
                stack.push(f);
            }
            while let Some(n) = stack.pop() {
                self.refs[n as usize] -= 1;
                if self.refs[n as usize] == 0 {
                    for i in 0..self.fanins(n).len() {
                        let f = self.resolve(self.fanin[n as usize][i]) >> 1;
                        stack.push(f);
                    }
                }
            }
        }
    }
}
