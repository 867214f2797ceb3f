//! Extraction: the mapped netlist of the current cover, with fresh names
//! for generated nets and instances that avoid the ports' and storage
//! elements' names.

use super::dedup::CellKeys;
use super::{Cover, CANDIDATE_BITS, FREE, INVERT, NONE};
use crate::mapper::implementation::Source;
use crate::mapper::witness::{Claim, NetClaims};
use crate::netlist::{Driver, MappedNetlist, NetId, Port, StorageInstance};
use crate::network::NodeId;
use crate::network::NodeKind;
use std::collections::HashSet;

/// Names for generated nets and instances that avoid the netlist's own
/// port and storage names.
struct FreshNames<'n> {
    reserved: HashSet<&'n str>,
    /// False when no reserved name has the shape of a generated one.
    clash_possible: bool,
}

impl FreshNames<'_> {
    /// `prefix` and `i`, with underscores appended while that is taken.
    fn fresh(&self, prefix: &str, i: usize) -> String {
        let mut name = format!("{prefix}{i}");
        if self.clash_possible {
            while self.reserved.contains(name.as_str()) {
                name.push('_');
            }
        }
        name
    }
}

impl Cover<'_> {
    /// Builds the mapped netlist of the current cover (call [`Cover::mark`]
    /// first), freeing the timing and area state beforehand so the netlist
    /// does not come on top of it.
    pub fn into_netlist(mut self) -> MappedNetlist {
        self.cost = Vec::new();
        self.required = Vec::new();
        self.fanout_estimate = Vec::new();
        self.load = Vec::new();
        self.extract()
    }

    /// [`Cover::into_netlist`], also returning the witness of every net: the
    /// literals of the covered network it carries, each with the cut its
    /// cells were built from (see [`crate::proof`]).
    pub fn into_netlist_with_witness(mut self) -> (MappedNetlist, NetClaims) {
        self.cost = Vec::new();
        self.required = Vec::new();
        self.fanout_estimate = Vec::new();
        self.load = Vec::new();
        self.extract_with_witness()
    }

    /// Builds the mapped netlist of the current cover (call [`Cover::mark`]
    /// first).
    pub fn extract(&self) -> MappedNetlist {
        self.extract_with_witness().0
    }

    /// [`Cover::extract`] with the witness of [`Cover::into_netlist_with_witness`].
    pub fn extract_with_witness(&self) -> (MappedNetlist, NetClaims) {
        let net = self.net;
        let lib = self.lib;
        let mut out = MappedNetlist {
            name: net.name().to_string(),
            library: lib.name.clone(),
            ..MappedNetlist::default()
        };
        let mut reserved: HashSet<&str> = HashSet::new();
        for name in net.inputs().keys() {
            reserved.insert(name);
        }
        for name in net.outputs().keys() {
            reserved.insert(name);
        }
        for name in net.storage().keys() {
            reserved.insert(name);
        }
        for s in net.storage().values() {
            if let Some(c) = s.clock.as_deref() {
                reserved.insert(c);
            }
        }
        // Generated names are a letter, digits and maybe underscores; when
        // no port or storage name has that shape, none can clash and the
        // lookups are skipped.
        let clash_possible = reserved.iter().any(|r| {
            let core = r.trim_end_matches('_');
            core.len() > 1
                && (core.starts_with('n') || core.starts_with('g'))
                && core[1..].bytes().all(|b| b.is_ascii_digit())
        });
        let names = FreshNames {
            reserved,
            clash_possible,
        };
        // Exact capacities: the netlist is the largest thing alive at the
        // end of mapping, and growth by doubling would leave up to half of
        // it unused.
        let mut cells = 0;
        for node in 0..net.num_nodes() {
            if net.kind(NodeId(node as u32)) == NodeKind::Const {
                continue;
            }
            for phase in 0..2 {
                let i = 2 * node + phase;
                if self.phases[i].refs == 0 {
                    continue;
                }
                cells += match self.phases[i].choice {
                    NONE | FREE => 0,
                    INVERT => self.table.implementation(self.inverter).gates.len(),
                    c => self
                        .table
                        .implementation(self.implementation_of(c, phase))
                        .gates
                        .len(),
                };
            }
        }
        out.instances.reserve_exact(cells);
        out.nets
            .reserve_exact(cells + net.inputs().len() + net.storage().len() + 2);
        let mut net_of = vec![NONE; 2 * net.num_nodes()];
        for (i, (name, id)) in net.inputs().iter().enumerate() {
            let n = out.add_net(name.clone(), Driver::Input(i as u32));
            net_of[2 * id.index()] = n;
            out.inputs.push(Port {
                name: name.clone(),
                net: n,
            });
        }
        for (i, (name, s)) in net.storage().iter().enumerate() {
            let n = out.add_net(name.clone(), Driver::Storage(i as u32));
            net_of[2 * s.output.index()] = n;
        }
        let mut constants = [NONE; 2];
        let mut constant = |out: &mut MappedNetlist, c: bool| {
            if constants[c as usize] == NONE {
                let name = if c { "$true" } else { "$false" };
                constants[c as usize] = out.add_net(name.to_string(), Driver::Constant(c));
            }
            constants[c as usize]
        };
        let mut local: Vec<NetId> = Vec::new();
        let mut keys = CellKeys::default();
        // The cut each cell-made node phase was built from (a merged net
        // carries several, see `witness`).
        let mut cell_claims: Vec<(NetId, Claim)> = Vec::new();
        for node in 0..net.num_nodes() {
            if net.kind(NodeId(node as u32)) == NodeKind::Const {
                for phase in 0..2 {
                    if self.phases[2 * node + phase].refs > 0 {
                        net_of[2 * node + phase] = constant(&mut out, phase == 1);
                    }
                }
                continue;
            }
            let order = if self.phases[2 * node].choice == INVERT {
                [1, 0]
            } else {
                [0, 1]
            };
            for phase in order {
                let i = 2 * node + phase;
                if self.phases[i].refs == 0 {
                    continue;
                }
                match self.phases[i].choice {
                    NONE | FREE => {}
                    INVERT => {
                        let src = net_of[2 * node + 1 - phase];
                        debug_assert!(src != NONE);
                        net_of[i] = self.instantiate(
                            &mut out,
                            self.inverter,
                            &[src],
                            &mut local,
                            &mut constant,
                            &names,
                            &mut keys,
                        );
                        cell_claims.push((net_of[i], Claim::cell(i as u32, &[node as u32])));
                    }
                    c => {
                        let leaves = self.cuts.leaves((c >> CANDIDATE_BITS) as usize);
                        let mut leaf_nets = [NONE; 12];
                        let imp = self.implementation_of(c, phase);
                        for u in &self.table.implementation(imp).leaf_uses {
                            leaf_nets[2 * u.var as usize + u.complemented as usize] = net_of
                                [2 * leaves[u.var as usize] as usize + u.complemented as usize];
                        }
                        net_of[i] = self.instantiate(
                            &mut out,
                            imp,
                            &leaf_nets,
                            &mut local,
                            &mut constant,
                            &names,
                            &mut keys,
                        );
                        cell_claims.push((net_of[i], Claim::cell(i as u32, leaves)));
                    }
                }
            }
        }
        // Primary outputs keep their names. An output whose net already has
        // another name (an input, another output, a constant, a storage
        // output) becomes an alias: no buffer cell is spent on it.
        let mut claimed: Vec<bool> = vec![false; out.nets.len()];
        for (name, lit) in net.outputs() {
            let n = net_of[lit.raw() as usize];
            if n as usize >= claimed.len() {
                claimed.resize(out.nets.len(), false);
            }
            let is_cell = matches!(out.nets[n as usize].driver, Driver::Cell(_));
            if is_cell && !claimed[n as usize] {
                out.nets[n as usize].name = name.clone();
                claimed[n as usize] = true;
            }
            out.outputs.push(Port {
                name: name.clone(),
                net: n,
            });
        }
        for (name, s) in net.storage() {
            let cell = lib.storage.first().map(|_| 0u32);
            out.storage.push(StorageInstance {
                name: name.clone(),
                cell,
                data: net_of[s.next.raw() as usize],
                output: net_of[2 * s.output.index()],
                clock: s.clock.clone(),
                init: s.init,
                kind: s.kind.clone(),
            });
        }
        // Ports and constants carry their node phases; cell-made phases
        // carry their cuts.
        for (lit, &n) in net_of.iter().enumerate() {
            if n != NONE && !matches!(out.nets[n as usize].driver, Driver::Cell(_)) {
                cell_claims.push((n, Claim::port(lit as u32)));
            }
        }
        let witness = NetClaims::new(out.nets.len(), cell_claims);
        (out, witness)
    }

    /// Instantiates implementation `imp`; `leaf_nets[2 * var + complemented]`
    /// gives the net of each leaf phase (the inverter and the buffer read
    /// only leaf 0 uncomplemented, so `[net]` suffices). Returns the output
    /// net. A cell equal to one made before (same function of the same
    /// nets, see `dedup`) is not made again: its net is reused.
    // The extraction state is passed piece by piece, as each caller owns it.
    #[allow(clippy::too_many_arguments)]
    fn instantiate(
        &self,
        out: &mut MappedNetlist,
        imp: u32,
        leaf_nets: &[NetId],
        local: &mut Vec<NetId>,
        constant: &mut impl FnMut(&mut MappedNetlist, bool) -> NetId,
        names: &FreshNames,
        keys: &mut CellKeys,
    ) -> NetId {
        let m = self.table.implementation(imp);
        local.clear();
        for gate in &m.gates {
            let inputs: Vec<NetId> = gate
                .inputs
                .iter()
                .map(|s| match *s {
                    Source::Leaf { var, complemented } => {
                        leaf_nets[2 * var as usize + complemented as usize]
                    }
                    Source::Gate(j) => local[j as usize],
                    Source::Constant(c) => constant(out, c),
                })
                .collect();
            if let Some(n) = keys.find(self.lib, gate.cell, &inputs) {
                local.push(n);
                continue;
            }
            let name = names.fresh("n", out.nets.len());
            let n = out.add_instance(gate.cell, inputs, name);
            keys.insert(
                self.lib,
                gate.cell,
                &out.instances[out.instances.len() - 1].inputs,
                n,
            );
            if names.clash_possible {
                let idx = out.instances.len() - 1;
                out.instances[idx].name = names.fresh("g", idx);
            }
            local.push(n);
        }
        *local.last().expect("implementations have gates")
    }
}
