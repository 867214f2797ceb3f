//! Mapped netlist equals covered network: the check of the mapper's witness.
//!
//! Every net the witness names carries one or more literals of the covered
//! network (a net where extraction merged equal cells carries several),
//! each claimed with the cut its cells were built from. For each claim on a
//! cell-driven net, the cells between the net and the nets carrying a
//! phase of one of the cut's leaf nodes (or constants) form a small cone;
//! its function over those leaves must equal the covered network's
//! function of the claimed literal over the same leaves, exhaustively over
//! the at most six leaves. Cells below the net that are named for other
//! node phases are walked through when their phases are not leaves of this
//! cut, so a cell shared by two matches is checked within each.
//!
//! With ports and storage tied to the right nodes and every output and
//! next-state net carrying its covered literal, induction over the
//! netlist's topological order proves every claim, hence every output,
//! equal. Each claim is checked on its own, so the work is linear in the
//! netlist and splits over threads.

use super::cone::{cell_word, cone_equals, with_phase, ConeScratch, Leaves, MAX_CONE};
use crate::library::Library;
use crate::mapper::witness::{Claim, CoverWitness, CLAIM_LEAVES};
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
    let limit = covered.num_nodes() as u32;
    let mut named: Vec<(u32, u32)> = Vec::new();
    for net in 0..mapped.nets.len() as u32 {
        for (k, claim) in witness.net_lits.of(net).iter().enumerate() {
            if claim.lit >> 1 >= limit || claim.leaf_nodes().any(|l| l >= limit) {
                return refuse(format!(
                    "net '{}' names a node the covered network does not have",
                    mapped.nets[net as usize].name
                ));
            }
            if matches!(mapped.nets[net as usize].driver, Driver::Cell(_)) {
                named.push((net, k as u32));
            }
        }
    }
    named
        .par_chunks(4096)
        .try_for_each_init(Scratch::default, |scratch, chunk| {
            for &(net, k) in chunk {
                let claim = witness.net_lits.of(net)[k as usize];
                scratch.check_claim(mapped, lib, covered, witness, net, &claim)?;
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
    // Whether `net` carries `lit`: a constant net by its value, any other
    // by one of its claims (each claim is checked on its own).
    let carries = |net: NetId, lit: Lit| -> bool {
        match mapped.nets.get(net as usize).map(|n| n.driver) {
            Some(Driver::Constant(c)) => lit == Lit::FALSE.xor(c),
            Some(_) => witness.net_carries(net, lit),
            None => false,
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
        if driven != Some(Driver::Input(i as u32)) || !carries(p.net, node.lit()) {
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
        if driven != Some(Driver::Storage(i as u32)) || !carries(s.output, orig.output.lit()) {
            return refuse(format!(
                "storage '{}' output is not tied to its node",
                s.name
            ));
        }
        if !carries(s.data, orig.next) {
            return refuse(format!("storage '{}' data is not its next state", s.name));
        }
    }
    for p in &mapped.outputs {
        let Some(&lit) = covered.outputs().get(&p.name) else {
            return refuse(format!("output '{}' is not in the covered network", p.name));
        };
        if !carries(p.net, lit) {
            return refuse(format!("output '{}' is not its covered literal", p.name));
        }
    }
    // Every claim on a net driven by a port or constant names that port
    // or constant (claims on cell nets are checked cone by cone).
    for (n, net) in mapped.nets.iter().enumerate() {
        for lit in witness.lits_of_net(n as u32) {
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
    }
    Ok(())
}

/// Per-thread scratch of the cone checks.
#[derive(Default)]
struct Scratch {
    leaves: Leaves,
    /// The claim's cut: leaf nodes in order.
    cut: [u32; CLAIM_LEAVES],
    cut_len: usize,
    nets: Vec<(u32, u64)>,
    cone: ConeScratch,
}

impl Scratch {
    /// Checks one claim of the cell-driven net `net`: the cells below it,
    /// down to nets carrying a phase of one of the claim's leaf nodes,
    /// compute the claimed literal over those leaves.
    fn check_claim(
        &mut self,
        mapped: &MappedNetlist,
        lib: &Library,
        covered: &Network,
        witness: &CoverWitness,
        net: NetId,
        claim: &Claim,
    ) -> Result<(), Refused> {
        self.leaves.clear();
        self.nets.clear();
        self.cut_len = 0;
        for leaf in claim.leaf_nodes() {
            self.cut[self.cut_len] = leaf;
            self.cut_len += 1;
        }
        let reduced = self.cell_net_word(mapped, lib, witness, net);
        // Every leaf is a variable, read by the cells or not: the covered
        // walk stops at each of them.
        let all_leaves = (0..self.cut_len).all(|k| self.leaves.word(self.cut[k]).is_some());
        let cells = match reduced {
            Some(w) if all_leaves => w,
            _ => {
                return refuse(format!(
                    "the cells driving net '{}' do not reduce to its cut's leaves",
                    mapped.nets[net as usize].name
                ))
            }
        };
        match cone_equals(
            covered,
            claim.literal(),
            &self.leaves,
            &mut self.cone,
            cells,
        ) {
            Some(true) => Ok(()),
            Some(false) => refuse(format!(
                "net '{}' does not compute its covered literal",
                mapped.nets[net as usize].name
            )),
            None => refuse(format!(
                "the covered cone of net '{}' is too wide to check",
                mapped.nets[net as usize].name
            )),
        }
    }

    /// The word of the cell driving `net`, its inputs evaluated down to
    /// the nets of the cut's leaves and constants.
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

    /// The word of a net read inside a cone: a leaf when it carries a
    /// phase of a leaf node (every claim of a net is checked, so by
    /// induction over the netlist's order the net equals that phase),
    /// otherwise its cell evaluated in turn.
    fn input_word(
        &mut self,
        mapped: &MappedNetlist,
        lib: &Library,
        witness: &CoverWitness,
        net: NetId,
    ) -> Option<u64> {
        let driver = mapped.nets[net as usize].driver;
        if let Driver::Constant(c) = driver {
            return Some(with_phase(0, c));
        }
        let cut = &self.cut[..self.cut_len];
        let mut in_cut = witness
            .lits_of_net(net)
            .filter(|l| cut.contains(&l.node().0));
        if let Some(lit) = in_cut.next() {
            let w = self.leaves.word(lit.node().0)?;
            // The net carries several leaves (merged equal cells): they are
            // equal, so they share one variable.
            for other in in_cut {
                self.leaves.tie(
                    other.node().0,
                    lit.node().0,
                    lit.is_complemented() ^ other.is_complemented(),
                );
            }
            return Some(with_phase(w, lit.is_complemented()));
        }
        if !matches!(driver, Driver::Cell(_)) {
            return None;
        }
        if let Some(&(_, w)) = self.nets.iter().find(|(n, _)| *n == net) {
            return Some(w);
        }
        if self.nets.len() >= MAX_CONE {
            return None;
        }
        let w = self.cell_net_word(mapped, lib, witness, net)?;
        self.nets.push((net, w));
        Some(w)
    }
}
