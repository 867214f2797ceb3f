//! Mapped netlist equals covered network: the check of the mapper's witness.
//!
//! Every net the witness names carries a literal of the covered network.
//! For each such net driven by a cell, the cells between it and the nearest
//! named nets (or constants) below it form a small cone; its function over
//! those nets' nodes must equal the covered network's function of the named
//! literal over the same nodes, exhaustively over the at most six leaves.
//! With ports and storage tied to the right nodes and every output and
//! next-state net named with its covered literal, induction over the
//! netlist's topological order proves every output equal. Each cone is
//! checked on its own, so the work is linear in the netlist and splits over
//! threads.

use super::cone::{cell_word, cone_equals, with_phase, ConeScratch, Leaves, MAX_CONE};
use crate::library::Library;
use crate::mapper::witness::CoverWitness;
use crate::netlist::{Driver, MappedNetlist, NetId};
use crate::network::{Lit, Network};
use rayon::prelude::*;

/// Why a witness does not prove the netlist.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[error("{0}")]
pub struct Refused(pub String);

fn refuse<T>(msg: impl Into<String>) -> Result<T, Refused> {
    Err(Refused(msg.into()))
}

/// Checks that `mapped` computes the covered network of `witness` (see the
/// module comment). `covered` is [`CoverWitness::covered`].
pub fn check_cells(
    mapped: &MappedNetlist,
    lib: &Library,
    covered: &Network,
    witness: &CoverWitness,
) -> Result<(), Refused> {
    if witness.net_lits.len() != mapped.nets.len() {
        return refuse("the witness does not name every net");
    }
    check_structure(mapped, lib)?;
    check_ports(mapped, covered, witness)?;
    let named: Vec<u32> = mapped
        .instances
        .iter()
        .map(|inst| inst.output)
        .filter(|&n| witness.lit_of_net(n).is_some())
        .collect();
    named
        .par_chunks(4096)
        .try_for_each_init(Scratch::default, |scratch, chunk| {
            for &net in chunk {
                scratch.check_net(mapped, lib, covered, witness, net)?;
            }
            Ok(())
        })
}

/// Drivers agree with instances, pins match the cells' arities, and every
/// instance reads only nets driven before it.
fn check_structure(mapped: &MappedNetlist, lib: &Library) -> Result<(), Refused> {
    for (i, inst) in mapped.instances.iter().enumerate() {
        let Some(cell) = lib.cells.get(inst.cell as usize) else {
            return refuse(format!("instance {} uses an unknown cell", inst.name));
        };
        if cell.arity() != inst.inputs.len() || cell.arity() > super::cone::MAX_LEAVES {
            return refuse(format!("instance {} has the wrong pin count", inst.name));
        }
        match mapped.nets.get(inst.output as usize).map(|n| n.driver) {
            Some(Driver::Cell(d)) if d as usize == i => {}
            _ => return refuse(format!("net of instance {} has another driver", inst.name)),
        }
        for &n in &inst.inputs {
            match mapped.nets.get(n as usize).map(|n| n.driver) {
                Some(Driver::Cell(d)) if (d as usize) < i => {}
                Some(Driver::Cell(_)) | None => {
                    return refuse(format!("instance {} reads a later net", inst.name))
                }
                Some(_) => {}
            }
        }
    }
    Ok(())
}

/// Inputs, storage and outputs sit on the covered network's ports, by name.
fn check_ports(
    mapped: &MappedNetlist,
    covered: &Network,
    witness: &CoverWitness,
) -> Result<(), Refused> {
    let port_lit = |net: NetId| -> Option<Lit> {
        match mapped.nets.get(net as usize)?.driver {
            Driver::Constant(c) => Some(Lit::FALSE.xor(c)),
            _ => witness.lit_of_net(net),
        }
    };
    if mapped.inputs.len() != covered.inputs().len()
        || mapped.outputs.len() != covered.outputs().len()
        || mapped.storage.len() != covered.storage().len()
    {
        return refuse("port counts differ");
    }
    for (i, p) in mapped.inputs.iter().enumerate() {
        let Some(&node) = covered.inputs().get(&p.name) else {
            return refuse(format!("input '{}' is not in the covered network", p.name));
        };
        let driven = mapped.nets.get(p.net as usize).map(|n| n.driver);
        if driven != Some(Driver::Input(i as u32)) || port_lit(p.net) != Some(node.lit()) {
            return refuse(format!("input '{}' is not tied to its node", p.name));
        }
    }
    for (i, s) in mapped.storage.iter().enumerate() {
        let Some(orig) = covered.storage().get(&s.name) else {
            return refuse(format!(
                "storage '{}' is not in the covered network",
                s.name
            ));
        };
        let driven = mapped.nets.get(s.output as usize).map(|n| n.driver);
        if driven != Some(Driver::Storage(i as u32))
            || port_lit(s.output) != Some(orig.output.lit())
        {
            return refuse(format!(
                "storage '{}' output is not tied to its node",
                s.name
            ));
        }
        if port_lit(s.data) != Some(orig.next) {
            return refuse(format!("storage '{}' data is not its next state", s.name));
        }
    }
    for p in &mapped.outputs {
        let Some(&lit) = covered.outputs().get(&p.name) else {
            return refuse(format!("output '{}' is not in the covered network", p.name));
        };
        if port_lit(p.net) != Some(lit) {
            return refuse(format!("output '{}' is not its covered literal", p.name));
        }
    }
    // Every other named net driven by a port or constant names that port
    // or constant (cells are checked cone by cone).
    for (n, net) in mapped.nets.iter().enumerate() {
        let Some(lit) = witness.lit_of_net(n as u32) else {
            continue;
        };
        let ok = match net.driver {
            Driver::Cell(_) => true,
            Driver::Constant(c) => lit == Lit::FALSE.xor(c),
            Driver::Input(i) => mapped
                .inputs
                .get(i as usize)
                .and_then(|p| covered.inputs().get(&p.name))
                .is_some_and(|id| id.lit() == lit),
            Driver::Storage(i) => mapped
                .storage
                .get(i as usize)
                .and_then(|s| covered.storage().get(&s.name))
                .is_some_and(|s| s.output.lit() == lit),
        };
        if !ok {
            return refuse(format!(
                "net '{}' is named with the wrong literal",
                net.name
            ));
        }
    }
    Ok(())
}

/// Per-thread scratch of the cone checks.
#[derive(Default)]
struct Scratch {
    leaves: Leaves,
    nets: Vec<(u32, u64)>,
    cone: ConeScratch,
}

impl Scratch {
    /// Checks the cone of the cell-driven net `net`.
    fn check_net(
        &mut self,
        mapped: &MappedNetlist,
        lib: &Library,
        covered: &Network,
        witness: &CoverWitness,
        net: NetId,
    ) -> Result<(), Refused> {
        let lit = witness
            .lit_of_net(net)
            .expect("only named nets are checked");
        self.leaves.clear();
        self.nets.clear();
        let cells = match self.cell_net_word(mapped, lib, witness, net) {
            Some(w) => w,
            None => {
                return refuse(format!(
                    "the cells driving net '{}' do not reduce to at most six named nets",
                    mapped.nets[net as usize].name
                ))
            }
        };
        match cone_equals(covered, lit, &self.leaves, &mut self.cone, cells) {
            Some(true) => {}
            Some(false) => {
                return refuse(format!(
                    "net '{}' does not compute its covered literal",
                    mapped.nets[net as usize].name
                ))
            }
            None => {
                return refuse(format!(
                    "the covered cone of net '{}' is too wide to check",
                    mapped.nets[net as usize].name
                ))
            }
        }
        Ok(())
    }

    /// The word of the cell driving `net`, its inputs evaluated down to
    /// named nets (leaves) and constants.
    fn cell_net_word(
        &mut self,
        mapped: &MappedNetlist,
        lib: &Library,
        witness: &CoverWitness,
        net: NetId,
    ) -> Option<u64> {
        let Driver::Cell(i) = mapped.nets[net as usize].driver else {
            return None;
        };
        let inst = &mapped.instances[i as usize];
        let mut words = [0u64; super::cone::MAX_LEAVES];
        for (k, &input) in inst.inputs.iter().enumerate() {
            words[k] = self.input_word(mapped, lib, witness, input)?;
        }
        let truth = lib.cells[inst.cell as usize].truth;
        Some(cell_word(truth, &words[..inst.inputs.len()]))
    }

    /// The word of a net read inside a cone.
    fn input_word(
        &mut self,
        mapped: &MappedNetlist,
        lib: &Library,
        witness: &CoverWitness,
        net: NetId,
    ) -> Option<u64> {
        match mapped.nets[net as usize].driver {
            Driver::Constant(c) => return Some(with_phase(0, c)),
            Driver::Cell(_) if witness.lit_of_net(net).is_none() => {
                if let Some(&(_, w)) = self.nets.iter().find(|(n, _)| *n == net) {
                    return Some(w);
                }
                if self.nets.len() >= MAX_CONE {
                    return None;
                }
                let w = self.cell_net_word(mapped, lib, witness, net)?;
                self.nets.push((net, w));
                return Some(w);
            }
            _ => {}
        }
        let lit = witness.lit_of_net(net)?;
        if lit.node().0 == 0 {
            return Some(with_phase(0, lit.is_complemented()));
        }
        let w = self.leaves.word(lit.node().0)?;
        Some(with_phase(w, lit.is_complemented()))
    }
}
