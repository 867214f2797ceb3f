//! The flat netlist every reader fills in before a [`Network`] is built.
//!
//! Readers see nets in any order: a net may be used lines before the gate
//! that drives it, and hierarchical files are flattened instance by instance.
//! So a reader first records nets and their drivers here ([`Flat`]): one
//! driver per net, fanins as signed net references ([`Sig`]), source
//! positions for every driver and first use. [`Flat::build`] then creates the
//! network by an iterative depth-first search from the outputs and the
//! storage inputs, which resolves forward references, reports undriven nets
//! and combinational loops (with the nets on the loop), and never recurses,
//! so million-node files cannot overflow the stack.
//!
//! Logic that no output or storage element depends on is not built, and an
//! undriven net is reported only when something that is built uses it.

use crate::diag::SourceError;
use crate::network::{InitValue, Lit, Network};
use indexmap::IndexSet;
use rustc_hash::FxBuildHasher;

/// A source position: 1-based line and column (0, 0 when unknown).
pub(crate) type Loc = (u32, u32);

/// A reference to a net, possibly inverted: `net << 1 | inverted`.
/// Net 0 is constant false, so `Sig::FALSE` and `Sig::TRUE` are constants.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) struct Sig(u32);

impl Sig {
    /// Constant 0.
    pub const FALSE: Sig = Sig(0);
    /// Constant 1.
    pub const TRUE: Sig = Sig(1);

    /// The positive reference to `net`.
    pub fn net(net: u32) -> Sig {
        Sig(net << 1)
    }

    /// The referenced net.
    pub fn id(self) -> u32 {
        self.0 >> 1
    }

    /// True when the reference is inverted.
    pub fn inverted(self) -> bool {
        self.0 & 1 == 1
    }

    /// The inverted reference.
    pub fn not(self) -> Sig {
        Sig(self.0 ^ 1)
    }

    /// The constant `value`.
    pub fn constant(value: bool) -> Sig {
        if value {
            Sig::TRUE
        } else {
            Sig::FALSE
        }
    }
}

/// The function of a gate driver.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum GateOp {
    /// AND of all fanins.
    And,
    /// OR of all fanins.
    Or,
    /// XOR of all fanins.
    Xor,
    /// The single fanin (an alias, perhaps inverted).
    Buf,
    /// `fanins[0] ? fanins[1] : fanins[2]`.
    Mux,
    /// A truth table over at most six fanins (bit r is the value on row r).
    Truth(u64),
}

/// What drives a net.
#[derive(Clone, Copy, Debug)]
enum Driver {
    Undriven,
    Constant,
    Input,
    Storage,
    Gate {
        op: GateOp,
        invert: bool,
        start: u32,
        len: u32,
    },
    /// A sum of products over more than six inputs: `cubes` cubes of `len`
    /// characters ('0', '1', '-') each, starting at `cube_start` in the pool.
    Cover {
        start: u32,
        len: u32,
        cube_start: u32,
        cubes: u32,
        onset: bool,
    },
}

/// A storage element as a reader found it.
#[derive(Clone, Debug)]
pub(crate) struct StorageDecl {
    /// Name (the output net's name, with the instance prefix).
    pub name: String,
    /// Data input.
    pub d: Sig,
    /// Output net.
    pub q: u32,
    /// Clock net, when the source gives one.
    pub clock: Option<u32>,
    /// Initial value.
    pub init: InitValue,
    /// Source-specific kind (latch type, edge, or cell name).
    pub kind: Option<String>,
    /// Where it was declared.
    pub loc: Loc,
}

/// Nets and drivers collected by a reader.
pub(crate) struct Flat {
    file: String,
    name: String,
    /// Net names, each stored once; `name_net[i]` is the net of name `i`
    /// and `net_name_index[net]` the name of a net (`u32::MAX`: unnamed).
    names: IndexSet<Box<str>, FxBuildHasher>,
    name_net: Vec<u32>,
    net_name_index: Vec<u32>,
    drivers: Vec<Driver>,
    driver_loc: Vec<Loc>,
    use_loc: Vec<Loc>,
    fanins: Vec<Sig>,
    cube_pool: Vec<u8>,
    inputs: Vec<(u32, Loc)>,
    outputs: Vec<(String, Sig, Loc)>,
    storage: Vec<StorageDecl>,
    /// The most nets the design may have ([`super::limits`]).
    max_nets: u64,
}

/// The position just past the end of `text` (for errors about what a file
/// lacks, such as a module or an output).
pub(crate) fn end_loc(text: &str) -> Loc {
    let body = text.trim_end();
    let line = body.matches('\n').count() as u32 + 1;
    let col = body.len() - body.rfind('\n').map_or(0, |p| p + 1);
    (line, col as u32 + 1)
}

impl Flat {
    /// An empty netlist for `file` holding only the constant net 0.
    pub fn new(file: &str) -> Flat {
        Flat {
            file: file.to_string(),
            name: String::new(),
            names: IndexSet::default(),
            name_net: Vec::new(),
            net_name_index: vec![u32::MAX],
            drivers: vec![Driver::Constant],
            driver_loc: vec![(0, 0)],
            use_loc: vec![(0, 0)],
            fanins: Vec::new(),
            cube_pool: Vec::new(),
            inputs: Vec::new(),
            outputs: Vec::new(),
            storage: Vec::new(),
            max_nets: super::limits::DEFAULT_MAX_NETS,
        }
    }

    /// Sets the most one-bit nets the design may have.
    pub fn set_max_nets(&mut self, max_nets: u64) {
        self.max_nets = max_nets;
    }

    /// Reserves room for about `nets` nets (a guess from the file size,
    /// capped by the net limit), so the name table is not rehashed while
    /// a large file is read.
    pub fn reserve_nets(&mut self, nets: usize) {
        let nets = nets.min(self.max_nets.min(1 << 24) as usize);
        self.names.reserve(nets);
        self.name_net.reserve(nets);
        self.net_name_index.reserve(nets);
        self.drivers.reserve(nets);
        self.driver_loc.reserve(nets);
        self.use_loc.reserve(nets);
    }

    /// The most one-bit nets the design may have.
    pub fn max_nets(&self) -> u64 {
        self.max_nets
    }

    /// Refuses the design at `loc` once it holds more nets or gate input
    /// connections than the limit allows; readers call it after each
    /// statement, so a file can never allocate much past the limit.
    pub fn check_size(&self, loc: Loc) -> Result<(), SourceError> {
        let nets = self.drivers.len() as u64;
        let connections = self.fanins.len() as u64 + self.cube_pool.len() as u64 / 8;
        let max_connections = self
            .max_nets
            .saturating_mul(super::limits::CONNECTIONS_PER_NET);
        if nets > self.max_nets || connections > max_connections {
            return Err(self.error(
                loc,
                format!(
                    "the design grows past {} one-bit nets or {max_connections} gate connections here (expected a smaller design; --max-nets N raises the limit)",
                    self.max_nets
                ),
            ));
        }
        Ok(())
    }

    /// Refuses a design without outputs at `loc` (the end of the file).
    pub fn require_outputs(&self, loc: Loc, expected: &str) -> Result<(), SourceError> {
        if self.outputs.is_empty() {
            return Err(self.error(
                loc,
                format!(
                    "the design '{}' has no outputs (expected {expected})",
                    self.name
                ),
            ));
        }
        Ok(())
    }

    /// Gives storage elements initial values: each `(q, value)` sets the
    /// element whose output net is `q`. Returns the index of the first pair
    /// whose net no storage element drives.
    pub fn set_storage_inits(&mut self, inits: &[(u32, InitValue)]) -> Result<(), usize> {
        let by_q: rustc_hash::FxHashMap<u32, usize> = self
            .storage
            .iter()
            .enumerate()
            .map(|(i, s)| (s.q, i))
            .collect();
        for (k, &(q, init)) in inits.iter().enumerate() {
            match by_q.get(&q) {
                Some(&i) => self.storage[i].init = init,
                None => return Err(k),
            }
        }
        Ok(())
    }

    /// Sets the design name.
    pub fn set_name(&mut self, name: &str) {
        self.name = name.to_string();
    }

    /// An error at `loc` of this file.
    pub fn error(&self, loc: Loc, message: impl Into<String>) -> SourceError {
        SourceError::new(self.file.clone(), loc.0, loc.1, message)
    }

    /// The net named `name`, created when new.
    pub fn net(&mut self, name: &str) -> u32 {
        if let Some(i) = self.names.get_index_of(name) {
            return self.name_net[i];
        }
        let id = self.anonymous();
        let (index, _) = self.names.insert_full(name.into());
        self.name_net.push(id);
        self.net_name_index[id as usize] = index as u32;
        id
    }

    /// A fresh net without a name (an intermediate value of an expression).
    pub fn anonymous(&mut self) -> u32 {
        let id = self.drivers.len() as u32;
        self.drivers.push(Driver::Undriven);
        self.driver_loc.push((0, 0));
        self.use_loc.push((0, 0));
        self.net_name_index.push(u32::MAX);
        id
    }

    /// Records that `net` is used at `loc` (the first use is kept for
    /// "undriven" reports).
    pub fn note_use(&mut self, net: u32, loc: Loc) {
        let slot = &mut self.use_loc[net as usize];
        if slot.0 == 0 {
            *slot = loc;
        }
    }

    /// The name of `net`, or a description of an unnamed net.
    pub fn net_name(&self, net: u32) -> String {
        if net == 0 {
            return "constant 0".to_string();
        }
        match self.net_name_index[net as usize] {
            u32::MAX => format!("<expression #{net}>"),
            i => self.names[i as usize].to_string(),
        }
    }

    fn set_driver(&mut self, net: u32, driver: Driver, loc: Loc) -> Result<(), SourceError> {
        let n = net as usize;
        if net == 0 {
            return Err(self.error(loc, "cannot drive the constant net"));
        }
        if !matches!(self.drivers[n], Driver::Undriven) {
            let first = self.driver_loc[n];
            let what = match self.drivers[n] {
                Driver::Input => "it is already an input".to_string(),
                Driver::Storage => "it is already a storage element output".to_string(),
                _ if first.0 > 0 => format!("it is already driven at line {}", first.0),
                _ => "it is already driven".to_string(),
            };
            return Err(self.error(
                loc,
                format!(
                    "net '{}' has more than one driver: {what} (expected one driver per net)",
                    self.net_name(net)
                ),
            ));
        }
        self.drivers[n] = driver;
        self.driver_loc[n] = loc;
        Ok(())
    }

    /// Drives `out` with `op` of `fanins`, inverted when `invert`.
    pub fn add_gate(
        &mut self,
        out: u32,
        op: GateOp,
        invert: bool,
        fanins: &[Sig],
        loc: Loc,
    ) -> Result<(), SourceError> {
        if let GateOp::Truth(_) = op {
            debug_assert!(fanins.len() <= 6);
        }
        let start = self.fanins.len() as u32;
        for &f in fanins {
            self.note_use(f.id(), loc);
        }
        self.fanins.extend_from_slice(fanins);
        self.set_driver(
            out,
            Driver::Gate {
                op,
                invert,
                start,
                len: fanins.len() as u32,
            },
            loc,
        )
    }

    /// A new anonymous net computing `op` of `fanins`; returns its reference.
    pub fn gate(&mut self, op: GateOp, invert: bool, fanins: &[Sig], loc: Loc) -> Sig {
        let out = self.anonymous();
        self.add_gate(out, op, invert, fanins, loc)
            .expect("a fresh net has no driver");
        Sig::net(out)
    }

    /// Drives `out` with a sum of products: `cubes` holds one string of
    /// '0', '1', '-' per cube, each as long as `fanins`; the cover gives the
    /// on-set when `onset`, else the off-set.
    pub fn add_cover(
        &mut self,
        out: u32,
        fanins: &[Sig],
        cubes: &[&[u8]],
        onset: bool,
        loc: Loc,
    ) -> Result<(), SourceError> {
        let start = self.fanins.len() as u32;
        for &f in fanins {
            self.note_use(f.id(), loc);
        }
        self.fanins.extend_from_slice(fanins);
        let cube_start = self.cube_pool.len() as u32;
        for c in cubes {
            self.cube_pool.extend_from_slice(c);
        }
        self.set_driver(
            out,
            Driver::Cover {
                start,
                len: fanins.len() as u32,
                cube_start,
                cubes: cubes.len() as u32,
                onset,
            },
            loc,
        )
    }

    /// Declares `net` a primary input.
    pub fn add_input(&mut self, net: u32, loc: Loc) -> Result<(), SourceError> {
        self.set_driver(net, Driver::Input, loc)?;
        self.inputs.push((net, loc));
        Ok(())
    }

    /// Declares a primary output `name` driven by `sig`.
    pub fn add_output(&mut self, name: &str, sig: Sig, loc: Loc) {
        self.note_use(sig.id(), loc);
        self.outputs.push((name.to_string(), sig, loc));
    }

    /// Declares a storage element; its output net becomes driven.
    pub fn add_storage(&mut self, decl: StorageDecl) -> Result<(), SourceError> {
        self.set_driver(decl.q, Driver::Storage, decl.loc)?;
        self.note_use(decl.d.id(), decl.loc);
        self.storage.push(decl);
        Ok(())
    }

    fn fanin_range(&self, net: u32) -> (usize, usize) {
        match self.drivers[net as usize] {
            Driver::Gate { start, len, .. } | Driver::Cover { start, len, .. } => {
                (start as usize, (start + len) as usize)
            }
            _ => (0, 0),
        }
    }

    /// Follows non-inverting aliases from `net` to the net that really
    /// drives it (used to name clocks after the top-level input).
    fn resolve_alias(&self, mut net: u32) -> u32 {
        for _ in 0..self.drivers.len() {
            match self.drivers[net as usize] {
                Driver::Gate {
                    op: GateOp::Buf,
                    invert: false,
                    start,
                    ..
                } => {
                    let f = self.fanins[start as usize];
                    if f.inverted() {
                        break;
                    }
                    net = f.id();
                }
                _ => break,
            }
        }
        net
    }

    /// Builds the network: inputs and storage elements in declaration order,
    /// then the logic every output and storage input depends on.
    pub fn build(self) -> Result<Network, SourceError> {
        let mut network = Network::new(self.name.clone());
        network.reserve(self.drivers.len());
        let n = self.drivers.len();
        let mut lits = vec![Lit::FALSE; n];
        // 0 unvisited, 1 on the search stack, 2 built.
        let mut state = vec![0u8; n];
        state[0] = 2;
        for &(net, loc) in &self.inputs {
            let name = self.net_name(net);
            lits[net as usize] = network
                .add_input(name)
                .map_err(|e| self.error(loc, e.to_string()))?;
            state[net as usize] = 2;
        }
        for s in &self.storage {
            let clock = s.clock.map(|c| self.net_name(self.resolve_alias(c)));
            lits[s.q as usize] = network
                .add_storage(s.name.clone(), clock, s.init, s.kind.clone())
                .map_err(|e| self.error(s.loc, e.to_string()))?;
            state[s.q as usize] = 2;
        }
        let roots: Vec<(u32, Loc)> = self
            .outputs
            .iter()
            .map(|(_, sig, loc)| (sig.id(), *loc))
            .chain(self.storage.iter().map(|s| (s.d.id(), s.loc)))
            .collect();
        let mut stack: Vec<(u32, u32)> = Vec::new();
        let mut scratch: Vec<Lit> = Vec::new();
        for (root, root_loc) in roots {
            if state[root as usize] == 2 {
                continue;
            }
            self.check_driven(root, root_loc)?;
            state[root as usize] = 1;
            stack.push((root, 0));
            while let Some(top) = stack.last_mut() {
                let (net, next) = *top;
                let (start, end) = self.fanin_range(net);
                if start + (next as usize) < end {
                    top.1 += 1;
                    let child = self.fanins[start + next as usize].id();
                    match state[child as usize] {
                        0 => {
                            let parent_loc = self.driver_loc[net as usize];
                            self.check_driven(child, parent_loc)?;
                            state[child as usize] = 1;
                            stack.push((child, 0));
                        }
                        1 => return Err(self.loop_error(&stack, child)),
                        _ => {}
                    }
                    continue;
                }
                let lit = self.make_node(&mut network, net, &lits, &mut scratch);
                lits[net as usize] = lit;
                state[net as usize] = 2;
                stack.pop();
            }
        }
        let lit_of = |s: Sig| lits[s.id() as usize].xor(s.inverted());
        for (name, sig, loc) in &self.outputs {
            network
                .add_output(name.clone(), lit_of(*sig))
                .map_err(|e| self.error(*loc, e.to_string()))?;
        }
        for s in &self.storage {
            network
                .set_storage_next(&s.name, lit_of(s.d))
                .map_err(|e| self.error(s.loc, e.to_string()))?;
        }
        Ok(network)
    }

    fn check_driven(&self, net: u32, fallback: Loc) -> Result<(), SourceError> {
        if let Driver::Undriven = self.drivers[net as usize] {
            let used = self.use_loc[net as usize];
            let loc = if used.0 > 0 { used } else { fallback };
            return Err(self.error(
                loc,
                format!(
                    "net '{}' is used but nothing drives it (expected an input, a gate or cell output, or an assignment)",
                    self.net_name(net)
                ),
            ));
        }
        Ok(())
    }

    fn loop_error(&self, stack: &[(u32, u32)], child: u32) -> SourceError {
        let from = stack.iter().position(|&(n, _)| n == child).unwrap_or(0);
        let mut names: Vec<String> = stack[from..]
            .iter()
            .filter(|&&(n, _)| self.net_name_index[n as usize] != u32::MAX)
            .map(|&(n, _)| self.net_name(n))
            .collect();
        if names.len() > 24 {
            let more = names.len() - 24;
            names.truncate(24);
            names.push(format!("... ({more} more)"));
        }
        names.push(self.net_name(child));
        let loc = self.driver_loc[child as usize];
        self.error(
            loc,
            format!(
                "combinational loop through nets {} (expected logic without cycles; break it with a storage element)",
                names.join(" -> ")
            ),
        )
    }

    fn make_node(
        &self,
        network: &mut Network,
        net: u32,
        lits: &[Lit],
        scratch: &mut Vec<Lit>,
    ) -> Lit {
        let (start, end) = self.fanin_range(net);
        scratch.clear();
        scratch.extend(
            self.fanins[start..end]
                .iter()
                .map(|s| lits[s.id() as usize].xor(s.inverted())),
        );
        match self.drivers[net as usize] {
            Driver::Gate { op, invert, .. } => {
                let lit = match op {
                    GateOp::And => network.and_many(scratch),
                    GateOp::Or => network.or_many(scratch),
                    GateOp::Xor => network.xor_many(scratch),
                    GateOp::Buf => scratch.first().copied().unwrap_or(Lit::FALSE),
                    GateOp::Mux => {
                        if scratch.len() == 3 {
                            network.mux(scratch[0], scratch[1], scratch[2])
                        } else {
                            Lit::FALSE
                        }
                    }
                    GateOp::Truth(t) => small_truth(network, t, scratch)
                        .unwrap_or_else(|| network.from_truth(t, &scratch[..scratch.len().min(6)])),
                };
                lit.xor(invert)
            }
            Driver::Cover {
                len,
                cube_start,
                cubes,
                onset,
                ..
            } => {
                let len = len as usize;
                let mut terms = Vec::with_capacity(cubes as usize);
                let mut lits_in_cube = Vec::with_capacity(len);
                for c in 0..cubes as usize {
                    let at = cube_start as usize + c * len;
                    lits_in_cube.clear();
                    for (k, &ch) in self.cube_pool[at..at + len].iter().enumerate() {
                        match ch {
                            b'1' => lits_in_cube.push(scratch[k]),
                            b'0' => lits_in_cube.push(!scratch[k]),
                            _ => {}
                        }
                    }
                    terms.push(network.and_many(&lits_in_cube));
                }
                network.or_many(&terms).xor(!onset)
            }
            Driver::Constant | Driver::Undriven => Lit::FALSE,
            Driver::Input | Driver::Storage => lits[net as usize],
        }
    }
}

/// Builds the truth table `t` over one or two fanins directly (the common
/// cells and covers of BLIF files), without the general decomposition;
/// `None` for wider tables.
fn small_truth(network: &mut Network, t: u64, fanins: &[Lit]) -> Option<Lit> {
    match fanins {
        [a] => Some(match t & 0b11 {
            0b00 => Lit::FALSE,
            0b11 => Lit::TRUE,
            0b10 => *a,
            _ => !*a,
        }),
        [a, b] => {
            let t = t & 0b1111;
            // Literal of fanin i that is true on row r.
            let on = |r: u64| (a.xor(r & 1 == 0), b.xor(r >> 1 & 1 == 0));
            Some(match t.count_ones() {
                0 => Lit::FALSE,
                4 => Lit::TRUE,
                1 => {
                    let (x, y) = on(t.trailing_zeros() as u64);
                    network.and(x, y)
                }
                3 => {
                    let (x, y) = on((!t & 0b1111).trailing_zeros() as u64);
                    !network.and(x, y)
                }
                _ => match t {
                    0b0110 => network.xor(*a, *b),
                    0b1001 => !network.xor(*a, *b),
                    0b1010 => *a,
                    0b0101 => !*a,
                    0b1100 => *b,
                    _ => !*b,
                },
            })
        }
        _ => None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn small_truth_tables_match_the_general_decomposition() {
        // Every one- and two-input table, compared by exhaustive simulation
        // with Network::from_truth (the general construction).
        for n in 1..=2usize {
            for t in 0..(1u64 << (1 << n)) {
                let mut net = Network::new("t");
                let ins: Vec<Lit> = (0..n)
                    .map(|i| net.add_input(format!("x{i}")).unwrap())
                    .collect();
                let fast = small_truth(&mut net, t, &ins).unwrap();
                let general = net.from_truth(t, &ins);
                net.add_output("fast", fast).unwrap();
                net.add_output("general", general).unwrap();
                let words = [0b1010u64, 0b1100];
                let out = net.simulate_outputs(&words[..n]);
                let rows = (1u64 << (1 << n)) - 1;
                assert_eq!(out[0] & rows, t, "n={n} t={t:b}");
                assert_eq!(out[1] & rows, t, "n={n} t={t:b}");
            }
        }
    }
}
