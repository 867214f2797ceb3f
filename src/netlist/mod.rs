//! The mapped netlist: library cell instances wired by nets, with the
//! original port names, plus its writers, static timing, verification and
//! cost report.
//!
//! The structure is deliberately plain so later stages (power estimation,
//! reports, writers) can walk it without knowing the mapper:
//! - [`MappedNetlist::nets`]: every net once, with its name and its single
//!   [`Driver`] (a primary input, a storage output, a cell instance or a
//!   constant);
//! - [`MappedNetlist::instances`]: cell instances in topological order (every
//!   input net of an instance is driven by a port, a constant, a storage
//!   output or an *earlier* instance), each with the index of its cell in the
//!   [`Library`], its input nets in the cell's pin order and its output net;
//! - [`MappedNetlist::fanouts`] gives, per net, the instance pins it drives,
//!   and [`MappedNetlist::output_refs`] how many primary outputs it drives.
//!
//! Switching energy of a net is then `toggles(net) * switch_energy` of
//! `instances[driver].cell`; static power sums each instance's leakage.
//!
//! Constants: a net driven by [`Driver::Constant`] is a tie (`1'b0`/`1'b1` in
//! Verilog, a constant `.names` in BLIF). A primary output whose net already
//! carries another name (a primary input, another output, a constant) is
//! written as an alias (`assign` in Verilog, a one-row `.names` in BLIF); the
//! mapper spends no buffer cell on it, as a buffer adds area and no function.

mod blif;
mod read;
mod report;
mod timing;
mod verify;
mod verilog;

pub use read::read_mapped_verilog;
pub use report::{Report, Stage};
pub use timing::{analyze_timing, PathStep, TimingReport};
pub use verify::{verify, Verified, VerifyError, VerifyMode};

use crate::library::Library;
use crate::network::{InitValue, Lit, Network};
use indexmap::IndexMap;

/// Index of a net in [`MappedNetlist::nets`].
pub type NetId = u32;

/// What drives a net.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Driver {
    /// Primary input number `i` ([`MappedNetlist::inputs`] order).
    Input(u32),
    /// Output of storage element number `i` ([`MappedNetlist::storage`]).
    Storage(u32),
    /// Output of cell instance number `i`.
    Cell(u32),
    /// A constant tie.
    Constant(bool),
}

/// A net.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Net {
    /// Name used by the writers (port names are kept).
    pub name: String,
    /// Its driver.
    pub driver: Driver,
}

/// A cell instance.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Instance {
    /// Instance name.
    pub name: String,
    /// Index of the cell in the library.
    pub cell: u32,
    /// Input nets in the cell's pin order.
    pub inputs: Vec<NetId>,
    /// Output net.
    pub output: NetId,
}

/// A named port and its net.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Port {
    /// Port name as in the original netlist.
    pub name: String,
    /// Its net.
    pub net: NetId,
}

/// A storage element of the mapped netlist.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct StorageInstance {
    /// Name of the storage element (also the name of its output net).
    pub name: String,
    /// Index of the library's storage cell used, if the library has one.
    pub cell: Option<u32>,
    /// Data (next-state) net.
    pub data: NetId,
    /// Output net.
    pub output: NetId,
    /// Clock net name from the source, if any.
    pub clock: Option<String>,
    /// Initial value.
    pub init: InitValue,
    /// Source-specific kind.
    pub kind: Option<String>,
}

/// A netlist of library cells.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct MappedNetlist {
    /// Design name.
    pub name: String,
    /// Name of the library it was mapped onto.
    pub library: String,
    /// Every net.
    pub nets: Vec<Net>,
    /// Cell instances, topologically ordered.
    pub instances: Vec<Instance>,
    /// Primary inputs in the original order.
    pub inputs: Vec<Port>,
    /// Primary outputs in the original order.
    pub outputs: Vec<Port>,
    /// Storage elements in the original order.
    pub storage: Vec<StorageInstance>,
}

/// Where a net is read: `(instance, pin)` pairs.
#[derive(Clone, Debug, Default)]
pub struct Fanouts {
    start: Vec<u32>,
    pins: Vec<(u32, u32)>,
}

impl Fanouts {
    /// The instance pins reading `net`.
    pub fn of(&self, net: NetId) -> &[(u32, u32)] {
        &self.pins[self.start[net as usize] as usize..self.start[net as usize + 1] as usize]
    }
}

impl MappedNetlist {
    /// Adds a net and returns its id.
    pub fn add_net(&mut self, name: String, driver: Driver) -> NetId {
        self.nets.push(Net { name, driver });
        (self.nets.len() - 1) as NetId
    }

    /// Adds an instance of `cell` reading `inputs`, creating its output net
    /// named `net_name`; returns the output net.
    pub fn add_instance(&mut self, cell: u32, inputs: Vec<NetId>, net_name: String) -> NetId {
        let idx = self.instances.len() as u32;
        let out = self.add_net(net_name, Driver::Cell(idx));
        self.instances.push(Instance {
            name: format!("g{idx}"),
            cell,
            inputs,
            output: out,
        });
        out
    }

    /// Per net, the instance pins it drives.
    pub fn fanouts(&self) -> Fanouts {
        let mut count = vec![0u32; self.nets.len() + 1];
        for inst in &self.instances {
            for &n in &inst.inputs {
                count[n as usize + 1] += 1;
            }
        }
        for i in 1..count.len() {
            count[i] += count[i - 1];
        }
        let mut fill = count.clone();
        let mut pins = vec![(0, 0); *count.last().unwrap_or(&0) as usize];
        for (i, inst) in self.instances.iter().enumerate() {
            for (p, &n) in inst.inputs.iter().enumerate() {
                pins[fill[n as usize] as usize] = (i as u32, p as u32);
                fill[n as usize] += 1;
            }
        }
        Fanouts { start: count, pins }
    }

    /// Per net, how many primary outputs it drives.
    pub fn output_refs(&self) -> Vec<u32> {
        let mut r = vec![0u32; self.nets.len()];
        for p in &self.outputs {
            r[p.net as usize] += 1;
        }
        r
    }

    /// Count of each cell, in library order, cells not used left out.
    pub fn cell_counts(&self, lib: &Library) -> IndexMap<String, usize> {
        let mut counts = vec![0usize; lib.cells.len()];
        for inst in &self.instances {
            counts[inst.cell as usize] += 1;
        }
        lib.cells
            .iter()
            .zip(counts)
            .filter(|(_, n)| *n > 0)
            .map(|(c, n)| (c.name.clone(), n))
            .collect()
    }

    /// Total cell area (storage cells included).
    pub fn area(&self, lib: &Library) -> f64 {
        let cells: f64 = self
            .instances
            .iter()
            .map(|i| lib.cells[i.cell as usize].area)
            .sum();
        let storage: f64 = self
            .storage
            .iter()
            .filter_map(|s| s.cell.map(|c| lib.storage[c as usize].area))
            .sum();
        cells + storage
    }

    /// Total device count of the combinational cells.
    pub fn devices(&self, lib: &Library) -> u64 {
        self.instances
            .iter()
            .map(|i| lib.cells[i.cell as usize].devices as u64)
            .sum()
    }

    /// Rebuilds the logic as a [`Network`] with the same input, output and
    /// storage names (for verification against the original).
    pub fn to_network(&self, lib: &Library) -> Network {
        let mut net = Network::new(self.name.clone());
        let mut lit = vec![Lit::FALSE; self.nets.len()];
        for p in &self.inputs {
            lit[p.net as usize] = net
                .add_input(p.name.clone())
                .expect("mapped netlists have unique input names");
        }
        for s in &self.storage {
            lit[s.output as usize] = net
                .add_storage(s.name.clone(), s.clock.clone(), s.init, s.kind.clone())
                .expect("mapped netlists have unique storage names");
        }
        for (i, n) in self.nets.iter().enumerate() {
            if let Driver::Constant(c) = n.driver {
                lit[i] = if c { Lit::TRUE } else { Lit::FALSE };
            }
        }
        let mut fanins = Vec::with_capacity(6);
        for inst in &self.instances {
            fanins.clear();
            fanins.extend(inst.inputs.iter().map(|&n| lit[n as usize]));
            let cell = &lib.cells[inst.cell as usize];
            lit[inst.output as usize] = net.from_truth(cell.truth, &fanins);
        }
        for p in &self.outputs {
            net.add_output(p.name.clone(), lit[p.net as usize])
                .expect("mapped netlists have unique output names");
        }
        for s in &self.storage {
            net.set_storage_next(&s.name, lit[s.data as usize])
                .expect("declared above");
        }
        net
    }

    /// Structural Verilog: one instance per cell with named ports.
    pub fn write_verilog(&self, lib: &Library) -> String {
        verilog::write(self, lib)
    }

    /// BLIF with one `.gate` line per cell.
    pub fn write_blif(&self, lib: &Library) -> String {
        blif::write(self, lib)
    }
}
