//! Energy and static power of a mapped netlist.
//!
//! Converts a [`MappedNetlist`] into the flat [`SwitchingCircuit`] the
//! energy model works on (primary inputs, then storage outputs as pseudo
//! inputs; cell instances in their topological order) and runs the model.
//! These are the functions `ribbonmap map` calls for its `energy_per_op` and
//! `static_power` fields.

use super::power::{estimate, EnergyReport, PowerError, Stimulus, SwitchingCircuit};
use crate::library::Library;
use crate::netlist::{Driver, MappedNetlist};

/// The mapped netlist as a switching circuit. Combinational inputs are the
/// primary inputs in declaration order, then the storage outputs (which the
/// energy model drives like inputs: a combinational estimate).
pub fn switching_circuit(netlist: &MappedNetlist) -> SwitchingCircuit {
    let primary = netlist.inputs.len() as u32;
    let inputs = primary + netlist.storage.len() as u32;
    let mut circuit = SwitchingCircuit::new(inputs);
    let first_gate = 2 + inputs;
    let net_of = |net: u32| -> u32 {
        match netlist.nets.get(net as usize).map(|n| n.driver) {
            Some(Driver::Input(i)) => 2 + i,
            Some(Driver::Storage(i)) => 2 + primary + i,
            Some(Driver::Constant(b)) => u32::from(b),
            Some(Driver::Cell(i)) => first_gate + i,
            None => super::power::NET_FALSE,
        }
    };
    let mut fanins = Vec::with_capacity(6);
    for instance in &netlist.instances {
        fanins.clear();
        fanins.extend(instance.inputs.iter().map(|&n| net_of(n)));
        circuit.add_gate(instance.cell, &fanins);
    }
    // Primary outputs and storage data inputs load their nets like in
    // static timing.
    for net in netlist.outputs.iter().map(|p| p.net) {
        circuit.add_end(net_of(net));
    }
    for net in netlist.storage.iter().map(|s| s.data) {
        circuit.add_end(net_of(net));
    }
    circuit
}

/// Energy per operation and static power of `netlist` under `stimulus`, in
/// `library`'s units.
pub fn mapped_energy(
    netlist: &MappedNetlist,
    library: &Library,
    stimulus: &Stimulus,
) -> Result<EnergyReport, PowerError> {
    estimate(&switching_circuit(netlist), library, stimulus)
}

/// Dynamic energy per operation under the default stimulus (16384 random
/// patterns, each input 1 with probability 0.5, seed 1).
pub fn energy_per_op(netlist: &MappedNetlist, library: &Library) -> Result<f64, PowerError> {
    mapped_energy(netlist, library, &Stimulus::default()).map(|r| r.energy_per_op)
}

/// Static power under the default stimulus (see [`energy_per_op`]).
pub fn static_power(netlist: &MappedNetlist, library: &Library) -> Result<f64, PowerError> {
    mapped_energy(netlist, library, &Stimulus::default()).map(|r| r.static_power)
}
