//! The logic network every stage works on.
//!
//! A [`Network`] is an arena of nodes in flat arrays indexed by [`NodeId`]
//! (`u32`): one kind byte and three fanin literals per node, about 13 bytes a
//! node plus the structural-hashing table. Node kinds are the constant, inputs,
//! two-input AND, two-input XOR and three-input majority; complemented edges
//! ([`Lit`]) give NOT for free.
//!
//! Invariants every caller may rely on:
//! - node 0 is constant false;
//! - every node's fanins have smaller indices, so index order is a
//!   topological order;
//! - structural hashing stores identical logic once, in a normal form
//!   (see [`Network::and`], [`Network::xor`], [`Network::maj`]).
//!
//! Storage elements (latches, flip-flops) are cut open: their output is a
//! pseudo input node and their next-state function a pseudo output literal, so
//! every combinational algorithm sees a combinational network, and writers can
//! restore the registers from [`Storage`].

mod build;
mod lit;
mod simulate;

pub use lit::{Lit, NodeId};
pub use simulate::{exhaustive_word, lit_word, SplitMix64};

use indexmap::IndexMap;
use rustc_hash::FxHashMap;

/// What a node computes.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum NodeKind {
    /// Constant false (node 0 only).
    Const,
    /// A primary input or the output of a storage element.
    Input,
    /// Two-input AND.
    And,
    /// Two-input XOR.
    Xor,
    /// Three-input majority.
    Maj,
}

/// Initial value of a storage element.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Default)]
pub enum InitValue {
    /// Starts at 0.
    Zero,
    /// Starts at 1.
    One,
    /// Any value is acceptable.
    DontCare,
    /// Not specified by the source.
    #[default]
    Unknown,
}

/// A storage element cut open into a pseudo input (`output`) and a pseudo
/// output (`next`).
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Storage {
    /// The input node that carries the stored value.
    pub output: NodeId,
    /// Next-state function (the data input).
    pub next: Lit,
    /// Clock net name, when the source gives one.
    pub clock: Option<String>,
    /// Initial value.
    pub init: InitValue,
    /// Source-specific kind, e.g. the BLIF latch type `re` or a cell name.
    pub kind: Option<String>,
}

/// Node counts by kind.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, serde::Serialize)]
pub struct KindCounts {
    /// AND2 nodes.
    pub and: usize,
    /// XOR2 nodes.
    pub xor: usize,
    /// MAJ3 nodes.
    pub maj: usize,
}

impl KindCounts {
    /// All logic nodes.
    pub fn total(&self) -> usize {
        self.and + self.xor + self.maj
    }
}

/// Errors from building a network (names clash).
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum NetworkError {
    /// Two ports or storage elements of the same kind share a name.
    #[error("{what} '{name}' is declared twice")]
    DuplicateName {
        /// "input", "output" or "storage element".
        what: &'static str,
        /// The clashing name.
        name: String,
    },
    /// A storage element was referenced but never declared.
    #[error("no storage element named '{0}'")]
    UnknownStorage(String),
}

const TAG_AND: u32 = u32::MAX;
const TAG_XOR: u32 = u32::MAX - 1;

/// A structurally hashed AND/XOR/MAJ network with named ports.
#[derive(Clone, Debug)]
pub struct Network {
    name: String,
    kinds: Vec<NodeKind>,
    fanins: Vec<[Lit; 3]>,
    structural_index: FxHashMap<[u32; 3], NodeId>,
    inputs: IndexMap<String, NodeId>,
    outputs: IndexMap<String, Lit>,
    storage: IndexMap<String, Storage>,
}

impl Default for Network {
    fn default() -> Self {
        Network::new("top")
    }
}

impl Network {
    /// An empty network holding only the constant node.
    pub fn new(name: impl Into<String>) -> Network {
        Network {
            name: name.into(),
            kinds: vec![NodeKind::Const],
            fanins: vec![[Lit::FALSE; 3]],
            structural_index: FxHashMap::default(),
            inputs: IndexMap::new(),
            outputs: IndexMap::new(),
            storage: IndexMap::new(),
        }
    }

    /// Reserves room for `additional` more nodes.
    pub fn reserve(&mut self, additional: usize) {
        self.kinds.reserve(additional);
        self.fanins.reserve(additional);
        self.structural_index.reserve(additional);
    }

    /// The design name (module or model name).
    pub fn name(&self) -> &str {
        &self.name
    }

    /// Renames the design.
    pub fn set_name(&mut self, name: impl Into<String>) {
        self.name = name.into();
    }

    /// Number of nodes, the constant and inputs included.
    pub fn num_nodes(&self) -> usize {
        self.kinds.len()
    }

    /// Iterator over every node id in topological (index) order.
    pub fn node_ids(&self) -> impl Iterator<Item = NodeId> {
        (0..self.kinds.len() as u32).map(NodeId)
    }

    /// The kind of `node`.
    #[inline]
    pub fn kind(&self, node: NodeId) -> NodeKind {
        self.kinds[node.index()]
    }

    /// True for AND, XOR and MAJ nodes.
    #[inline]
    pub fn is_gate(&self, node: NodeId) -> bool {
        matches!(
            self.kinds[node.index()],
            NodeKind::And | NodeKind::Xor | NodeKind::Maj
        )
    }

    /// The fanins of `node`: two for AND and XOR, three for MAJ, none otherwise.
    #[inline]
    pub fn fanins(&self, node: NodeId) -> &[Lit] {
        let f = &self.fanins[node.index()];
        match self.kinds[node.index()] {
            NodeKind::And | NodeKind::Xor => &f[..2],
            NodeKind::Maj => &f[..],
            NodeKind::Const | NodeKind::Input => &f[..0],
        }
    }

    /// Primary inputs by name, in declaration order.
    pub fn inputs(&self) -> &IndexMap<String, NodeId> {
        &self.inputs
    }

    /// Primary outputs by name, in declaration order.
    pub fn outputs(&self) -> &IndexMap<String, Lit> {
        &self.outputs
    }

    /// Storage elements by name, in declaration order.
    pub fn storage(&self) -> &IndexMap<String, Storage> {
        &self.storage
    }

    /// Combinational inputs: primary inputs, then storage outputs, each in
    /// declaration order. Simulation takes one word per entry in this order.
    pub fn combinational_inputs(&self) -> Vec<NodeId> {
        self.inputs
            .values()
            .copied()
            .chain(self.storage.values().map(|s| s.output))
            .collect()
    }

    /// Names of the combinational inputs, in the order of
    /// [`Network::combinational_inputs`].
    pub fn combinational_input_names(&self) -> Vec<&str> {
        self.inputs
            .keys()
            .chain(self.storage.keys())
            .map(String::as_str)
            .collect()
    }

    /// Combinational outputs: primary outputs, then storage next-state
    /// functions, each in declaration order.
    pub fn combinational_outputs(&self) -> Vec<Lit> {
        self.outputs
            .values()
            .copied()
            .chain(self.storage.values().map(|s| s.next))
            .collect()
    }

    /// Declares a primary input.
    pub fn add_input(&mut self, name: impl Into<String>) -> Result<Lit, NetworkError> {
        let name = name.into();
        if self.inputs.contains_key(&name) {
            return Err(NetworkError::DuplicateName {
                what: "input",
                name,
            });
        }
        let id = self.push(NodeKind::Input, [Lit::FALSE; 3]);
        self.inputs.insert(name, id);
        Ok(id.lit())
    }

    /// Declares a primary output driven by `lit`.
    pub fn add_output(&mut self, name: impl Into<String>, lit: Lit) -> Result<(), NetworkError> {
        let name = name.into();
        if self.outputs.contains_key(&name) {
            return Err(NetworkError::DuplicateName {
                what: "output",
                name,
            });
        }
        self.outputs.insert(name, lit);
        Ok(())
    }

    /// Re-drives an existing output (used by transformations).
    pub fn set_output(&mut self, name: &str, lit: Lit) -> bool {
        match self.outputs.get_mut(name) {
            Some(slot) => {
                *slot = lit;
                true
            }
            None => false,
        }
    }

    /// Declares a storage element; returns the literal of its output. Its
    /// next-state function starts as constant 0 until
    /// [`Network::set_storage_next`] sets it.
    pub fn add_storage(
        &mut self,
        name: impl Into<String>,
        clock: Option<String>,
        init: InitValue,
        kind: Option<String>,
    ) -> Result<Lit, NetworkError> {
        let name = name.into();
        if self.storage.contains_key(&name) {
            return Err(NetworkError::DuplicateName {
                what: "storage element",
                name,
            });
        }
        let id = self.push(NodeKind::Input, [Lit::FALSE; 3]);
        self.storage.insert(
            name,
            Storage {
                output: id,
                next: Lit::FALSE,
                clock,
                init,
                kind,
            },
        );
        Ok(id.lit())
    }

    /// Sets the next-state function of the storage element `name`.
    pub fn set_storage_next(&mut self, name: &str, next: Lit) -> Result<(), NetworkError> {
        match self.storage.get_mut(name) {
            Some(s) => {
                s.next = next;
                Ok(())
            }
            None => Err(NetworkError::UnknownStorage(name.to_string())),
        }
    }

    fn push(&mut self, kind: NodeKind, fanins: [Lit; 3]) -> NodeId {
        let id = NodeId(self.kinds.len() as u32);
        assert!(id.0 < (1 << 31), "network exceeds 2^31 nodes");
        self.kinds.push(kind);
        self.fanins.push(fanins);
        id
    }

    fn hashed(&mut self, kind: NodeKind, fanins: [Lit; 3]) -> Lit {
        let key = match kind {
            NodeKind::And => [fanins[0].raw(), fanins[1].raw(), TAG_AND],
            NodeKind::Xor => [fanins[0].raw(), fanins[1].raw(), TAG_XOR],
            _ => [fanins[0].raw(), fanins[1].raw(), fanins[2].raw()],
        };
        if let Some(&id) = self.structural_index.get(&key) {
            return id.lit();
        }
        let id = self.push(kind, fanins);
        self.structural_index.insert(key, id);
        id.lit()
    }

    /// Looks up an existing AND node without creating one.
    pub fn find_and(&self, a: Lit, b: Lit) -> Option<Lit> {
        let (a, b) = if a <= b { (a, b) } else { (b, a) };
        self.structural_index
            .get(&[a.raw(), b.raw(), TAG_AND])
            .map(|id| id.lit())
    }

    /// `a & b`, normalised: constants and `x & x`, `x & !x` folded, fanins
    /// ordered.
    pub fn and(&mut self, a: Lit, b: Lit) -> Lit {
        let (a, b) = if a <= b { (a, b) } else { (b, a) };
        if a == Lit::FALSE {
            return Lit::FALSE;
        }
        if a == Lit::TRUE {
            return b;
        }
        if a == b {
            return a;
        }
        if a == !b {
            return Lit::FALSE;
        }
        self.hashed(NodeKind::And, [a, b, Lit::FALSE])
    }

    /// `a ^ b`, normalised: complements moved to the output, `x ^ x` and
    /// constants folded, fanins ordered.
    pub fn xor(&mut self, a: Lit, b: Lit) -> Lit {
        let flip = a.is_complemented() ^ b.is_complemented();
        let (a, b) = (a.regular(), b.regular());
        let (a, b) = if a <= b { (a, b) } else { (b, a) };
        if a == b {
            return Lit::FALSE.xor(flip);
        }
        if a == Lit::FALSE {
            return b.xor(flip);
        }
        self.hashed(NodeKind::Xor, [a, b, Lit::FALSE]).xor(flip)
    }

    /// Majority of three, normalised: repeated or complementary fanins and
    /// constants folded, fanins ordered, and complements pushed to the output
    /// when at least two fanins are complemented (`maj(!a,!b,!c) = !maj(a,b,c)`).
    pub fn maj(&mut self, a: Lit, b: Lit, c: Lit) -> Lit {
        let mut f = [a, b, c];
        f.sort_unstable();
        let [a, b, c] = f;
        if a == b || b == c {
            return b;
        }
        if a == !b {
            return c;
        }
        if b == !c {
            return a;
        }
        if a == !c {
            return b;
        }
        if a == Lit::FALSE {
            return self.and(b, c);
        }
        if a == Lit::TRUE {
            return self.or(b, c);
        }
        let complemented = f.iter().filter(|l| l.is_complemented()).count();
        if complemented >= 2 {
            let mut g = [!a, !b, !c];
            g.sort_unstable();
            !self.hashed(NodeKind::Maj, g)
        } else {
            self.hashed(NodeKind::Maj, f)
        }
    }

    /// `a | b`.
    pub fn or(&mut self, a: Lit, b: Lit) -> Lit {
        !self.and(!a, !b)
    }

    /// `!(a & b)`.
    pub fn nand(&mut self, a: Lit, b: Lit) -> Lit {
        !self.and(a, b)
    }

    /// `!(a | b)`.
    pub fn nor(&mut self, a: Lit, b: Lit) -> Lit {
        self.and(!a, !b)
    }

    /// `!(a ^ b)`.
    pub fn xnor(&mut self, a: Lit, b: Lit) -> Lit {
        !self.xor(a, b)
    }

    /// `sel ? then : otherwise`.
    pub fn mux(&mut self, sel: Lit, then: Lit, otherwise: Lit) -> Lit {
        if then == otherwise {
            return then;
        }
        if then == !otherwise {
            return self.xor(sel, otherwise);
        }
        let t = self.and(sel, then);
        let e = self.and(!sel, otherwise);
        self.or(t, e)
    }

    /// AND of many literals as a balanced tree (true for none).
    pub fn and_many(&mut self, lits: &[Lit]) -> Lit {
        self.balanced(lits, Lit::TRUE, Network::and)
    }

    /// OR of many literals as a balanced tree (false for none).
    pub fn or_many(&mut self, lits: &[Lit]) -> Lit {
        self.balanced(lits, Lit::FALSE, Network::or)
    }

    /// XOR of many literals as a balanced tree (false for none).
    pub fn xor_many(&mut self, lits: &[Lit]) -> Lit {
        self.balanced(lits, Lit::FALSE, Network::xor)
    }

    fn balanced(&mut self, lits: &[Lit], empty: Lit, op: fn(&mut Network, Lit, Lit) -> Lit) -> Lit {
        match lits.len() {
            0 => empty,
            1 => lits[0],
            n => {
                let (l, r) = lits.split_at(n / 2);
                let a = self.balanced(l, empty, op);
                let b = self.balanced(r, empty, op);
                op(self, a, b)
            }
        }
    }

    /// Counts AND, XOR and MAJ nodes.
    pub fn kind_counts(&self) -> KindCounts {
        let mut c = KindCounts::default();
        for k in &self.kinds {
            match k {
                NodeKind::And => c.and += 1,
                NodeKind::Xor => c.xor += 1,
                NodeKind::Maj => c.maj += 1,
                _ => {}
            }
        }
        c
    }

    /// Number of logic nodes (AND, XOR, MAJ).
    pub fn gate_count(&self) -> usize {
        self.kind_counts().total()
    }

    /// Level of every node: inputs and the constant are 0, a gate is one more
    /// than its deepest fanin.
    pub fn levels(&self) -> Vec<u32> {
        let mut level = vec![0u32; self.num_nodes()];
        for id in self.node_ids() {
            let l = self
                .fanins(id)
                .iter()
                .map(|f| level[f.node().index()] + 1)
                .max()
                .unwrap_or(0);
            level[id.index()] = l;
        }
        level
    }

    /// Largest level of any combinational output.
    pub fn depth(&self) -> u32 {
        let level = self.levels();
        self.combinational_outputs()
            .iter()
            .map(|l| level[l.node().index()])
            .max()
            .unwrap_or(0)
    }

    /// How many gate fanins and combinational outputs reference each node.
    pub fn fanout_counts(&self) -> Vec<u32> {
        let mut count = vec![0u32; self.num_nodes()];
        for id in self.node_ids() {
            for f in self.fanins(id) {
                count[f.node().index()] += 1;
            }
        }
        for l in self.combinational_outputs() {
            count[l.node().index()] += 1;
        }
        count
    }

    /// Marks the nodes in the transitive fanin of the combinational outputs.
    pub fn reachable(&self) -> Vec<bool> {
        let mut mark = vec![false; self.num_nodes()];
        for l in self.combinational_outputs() {
            mark[l.node().index()] = true;
        }
        for i in (0..self.num_nodes()).rev() {
            if mark[i] {
                for f in self.fanins(NodeId(i as u32)) {
                    mark[f.node().index()] = true;
                }
            }
        }
        mark
    }

    /// Approximate heap bytes held by the network.
    pub fn memory_bytes(&self) -> usize {
        self.kinds.capacity()
            + self.fanins.capacity() * std::mem::size_of::<[Lit; 3]>()
            + self.structural_index.capacity() * (std::mem::size_of::<([u32; 3], NodeId)>() + 1)
    }

    /// A copy with the same ports and storage, without dangling logic, and
    /// with every gate rebuilt through structural hashing.
    pub fn cleanup(&self) -> Network {
        let mut out = self.empty_like();
        let map = out.copy_logic(self, &self.port_map_into(&out));
        out.connect_outputs_from(self, &map);
        out
    }

    /// A network with the same name, inputs and storage elements as `self`
    /// but no logic and no outputs (storage next-state functions are 0).
    pub fn empty_like(&self) -> Network {
        let mut out = Network::new(self.name.clone());
        for name in self.inputs.keys() {
            out.add_input(name.clone()).expect("names are unique");
        }
        for (name, s) in &self.storage {
            out.add_storage(name.clone(), s.clock.clone(), s.init, s.kind.clone())
                .expect("names are unique");
        }
        out
    }

    /// For each combinational input of `self`, the literal of the same-named
    /// input or storage element in `other` (which must have them all).
    pub fn port_map_into(&self, other: &Network) -> Vec<Lit> {
        self.inputs
            .keys()
            .map(|n| other.inputs[n].lit())
            .chain(self.storage.keys().map(|n| other.storage[n].output.lit()))
            .collect()
    }

    /// Copies the logic of `source` into `self`, feeding `source`'s
    /// combinational inputs (in [`Network::combinational_inputs`] order) with
    /// `ci_lits`. Only the transitive fanin of `source`'s combinational
    /// outputs is copied. Returns the literal in `self` of every node of
    /// `source` (unreached nodes map to constant 0).
    pub fn copy_logic(&mut self, source: &Network, ci_lits: &[Lit]) -> Vec<Lit> {
        let mut map = vec![Lit::FALSE; source.num_nodes()];
        for (id, &lit) in source.combinational_inputs().iter().zip(ci_lits) {
            map[id.index()] = lit;
        }
        let reach = source.reachable();
        let m = |map: &Vec<Lit>, l: Lit| map[l.node().index()].xor(l.is_complemented());
        for id in source.node_ids() {
            if !reach[id.index()] {
                continue;
            }
            let f = source.fanins(id);
            map[id.index()] = match source.kind(id) {
                NodeKind::And => {
                    let (a, b) = (m(&map, f[0]), m(&map, f[1]));
                    self.and(a, b)
                }
                NodeKind::Xor => {
                    let (a, b) = (m(&map, f[0]), m(&map, f[1]));
                    self.xor(a, b)
                }
                NodeKind::Maj => {
                    let (a, b, c) = (m(&map, f[0]), m(&map, f[1]), m(&map, f[2]));
                    self.maj(a, b, c)
                }
                NodeKind::Const | NodeKind::Input => map[id.index()],
            };
        }
        map
    }

    /// Adds `source`'s outputs and storage next-state functions to `self`
    /// through a node map returned by [`Network::copy_logic`].
    pub fn connect_outputs_from(&mut self, source: &Network, map: &[Lit]) {
        let m = |l: Lit| map[l.node().index()].xor(l.is_complemented());
        for (name, &lit) in &source.outputs {
            self.add_output(name.clone(), m(lit))
                .expect("names are unique");
        }
        for (name, s) in &source.storage {
            self.set_storage_next(name, m(s.next))
                .expect("storage was copied");
        }
    }
}

#[cfg(test)]
mod tests;
