//! Static timing of a mapped netlist under the library's load-dependent
//! delay model (docs/library-format.md): the delay of an instance is
//! `intrinsic + per_load * load`, where the load of its output net is the sum
//! of the `input_load` of the pins it drives plus `primary_output_load` for
//! each primary output it drives. The data input of a storage element counts
//! as a primary output (a timing end point). Inputs, storage outputs and
//! constants arrive at time 0.

use super::{Driver, MappedNetlist};
use crate::library::Library;

/// One step of the critical path, from its start to its end.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct PathStep {
    /// The instance driving the net (none for the start point).
    pub instance: Option<String>,
    /// Its cell name.
    pub cell: Option<String>,
    /// The net.
    pub net: String,
    /// Arrival time at the net.
    pub arrival: f64,
}

/// Result of static timing analysis.
#[derive(Clone, Debug, PartialEq)]
pub struct TimingReport {
    /// Latest arrival at any output or storage data input.
    pub delay: f64,
    /// Most cells on any input-to-output path.
    pub depth: u32,
    /// The path ending at the latest end point, start first.
    pub critical_path: Vec<PathStep>,
    /// Arrival time of every net.
    pub arrival: Vec<f64>,
    /// Load of every net.
    pub load: Vec<f64>,
}

/// Times every net of `nl` (instances are in topological order).
pub fn analyze_timing(nl: &MappedNetlist, lib: &Library) -> TimingReport {
    let n = nl.nets.len();
    let mut load = vec![0.0f64; n];
    for inst in &nl.instances {
        let cell = &lib.cells[inst.cell as usize];
        for &i in &inst.inputs {
            load[i as usize] += cell.input_load;
        }
    }
    let mut ends: Vec<u32> = nl.outputs.iter().map(|p| p.net).collect();
    ends.extend(nl.storage.iter().map(|s| s.data));
    for &e in &ends {
        load[e as usize] += lib.primary_output_load;
    }
    let mut arrival = vec![0.0f64; n];
    let mut level = vec![0u32; n];
    let mut from = vec![u32::MAX; n];
    for inst in &nl.instances {
        let cell = &lib.cells[inst.cell as usize];
        let mut worst = 0.0f64;
        let mut deepest = 0u32;
        let mut arg = u32::MAX;
        for &i in &inst.inputs {
            let a = arrival[i as usize];
            if arg == u32::MAX || a > worst {
                worst = a;
                arg = i;
            }
            deepest = deepest.max(level[i as usize]);
        }
        let o = inst.output as usize;
        arrival[o] = worst + cell.delay.intrinsic + cell.delay.per_load * load[o];
        level[o] = deepest + 1;
        from[o] = arg;
    }
    let mut end = None;
    let mut delay = 0.0f64;
    let mut depth = 0u32;
    for &e in &ends {
        if end.is_none() || arrival[e as usize] > delay {
            delay = arrival[e as usize];
            end = Some(e);
        }
        depth = depth.max(level[e as usize]);
    }
    let mut critical_path = Vec::new();
    let mut cur = end;
    while let Some(net) = cur {
        let nn = &nl.nets[net as usize];
        let (instance, cell) = match nn.driver {
            Driver::Cell(i) => {
                let inst = &nl.instances[i as usize];
                (
                    Some(inst.name.clone()),
                    Some(lib.cells[inst.cell as usize].name.clone()),
                )
            }
            _ => (None, None),
        };
        critical_path.push(PathStep {
            instance,
            cell,
            net: nn.name.clone(),
            arrival: arrival[net as usize],
        });
        cur = (from[net as usize] != u32::MAX).then_some(from[net as usize]);
    }
    critical_path.reverse();
    TimingReport {
        delay,
        depth,
        critical_path,
        arrival,
        load,
    }
}
