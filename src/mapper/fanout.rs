//! Fanout trees of buffers: where a net's load makes it critical, its less
//! critical readers move behind a buffer, so the critical readers see a
//! smaller load.
//!
//! The method is the critical-sink-first buffer chain of fanout
//! optimisation (H. Touati, "Performance-oriented technology mapping",
//! PhD thesis, UC Berkeley, 1990, whose LT-trees of type I are such chains),
//! in its simplest greedy form, on the extracted netlist and its static
//! timing:
//! 1. time the netlist and propagate required times back from its delay;
//! 2. among the nets on a critical path (no slack) driven by a cell and read
//!    by at least two cell pins, and not split before, take the one whose
//!    split gains most: its readers are ordered by required time, the first
//!    `k` stay on the driver with one buffer, the rest read the buffer, and
//!    `k` is chosen for the best worst slack (primary outputs stay on the
//!    driver);
//! 3. keep the split only when the delay of the whole netlist falls,
//!    otherwise undo it and never try that net again.
//!
//! A buffer's own net may be split in a later round, which grows the chain.
//! The rounds stop after [`MAX_BUFFERS`] buffers or when no split helps.

use crate::library::Library;
use crate::netlist::{analyze_timing, Driver, Fanouts, Instance, MappedNetlist, Net, NetId};
use std::collections::HashSet;

/// Most buffers added to one netlist.
pub const MAX_BUFFERS: usize = 64;

/// Most splits tried (kept or undone) on one netlist.
const MAX_TRIES: usize = 2 * MAX_BUFFERS;

/// A netlist with buffers added.
#[derive(Clone, Debug)]
pub struct Buffered {
    /// The netlist.
    pub netlist: MappedNetlist,
    /// Per buffer added: the net it creates and the net it copies.
    pub copies: Vec<(NetId, NetId)>,
}

/// The library's smallest buffer cell, if it has one.
fn buffer_cell(lib: &Library) -> Option<u32> {
    lib.cells
        .iter()
        .enumerate()
        .filter(|(_, c)| c.arity() == 1 && c.truth & 3 == 0b10)
        .min_by(|a, b| a.1.area.total_cmp(&b.1.area))
        .map(|(i, _)| i as u32)
}

/// Required time of every net for the netlist to meet `delay`.
fn required_times(nl: &MappedNetlist, lib: &Library, load: &[f64], delay: f64) -> Vec<f64> {
    let mut req = vec![f64::INFINITY; nl.nets.len()];
    for p in &nl.outputs {
        req[p.net as usize] = delay;
    }
    for s in &nl.storage {
        req[s.data as usize] = delay;
    }
    for inst in nl.instances.iter().rev() {
        let cell = &lib.cells[inst.cell as usize];
        let o = inst.output as usize;
        let r = req[o] - (cell.delay.intrinsic + cell.delay.per_load * load[o]);
        for &i in &inst.inputs {
            req[i as usize] = req[i as usize].min(r);
        }
    }
    req
}

/// One planned split: the net, its driver instance, and the reader pins
/// that move behind the buffer.
struct Split {
    net: NetId,
    driver: usize,
    moved: Vec<(usize, usize)>,
    gain: f64,
}

/// The best split of `net` (driven by instance `driver`) by estimated
/// worst slack, if it gains.
fn plan(
    nl: &MappedNetlist,
    lib: &Library,
    buffer: u32,
    (net, driver): (NetId, usize),
    fanouts: &Fanouts,
    (arrival, load, req): (&[f64], &[f64], &[f64]),
) -> Option<Split> {
    let n = net as usize;
    // Reader pins with their required times at the pin.
    let mut readers: Vec<(f64, usize, usize, f64)> = Vec::new();
    for &(k, pin) in fanouts.of(net) {
        let inst = &nl.instances[k as usize];
        let cell = &lib.cells[inst.cell as usize];
        let o = inst.output as usize;
        let r = req[o] - (cell.delay.intrinsic + cell.delay.per_load * load[o]);
        readers.push((r, k as usize, pin as usize, cell.input_load));
    }
    if readers.len() < 2 {
        return None;
    }
    readers.sort_by(|a, b| a.0.total_cmp(&b.0));
    let cell = &lib.cells[nl.instances[driver].cell as usize];
    let buf = &lib.cells[buffer as usize];
    let pin_loads: f64 = readers.iter().map(|r| r.3).sum();
    let ends = load[n] - pin_loads;
    let ends_req = if ends > 0.0 { req[n] } else { f64::INFINITY };
    let start = arrival[n] - (cell.delay.intrinsic + cell.delay.per_load * load[n]);
    let old_slack = req[n] - arrival[n];
    let mut best: Option<(f64, usize)> = None;
    let mut kept_load = 0.0;
    for keep in 0..readers.len() {
        if keep > 0 {
            kept_load += readers[keep - 1].3;
        }
        let moved_load = pin_loads - kept_load;
        let root = start
            + cell.delay.intrinsic
            + cell.delay.per_load * (kept_load + ends + buf.input_load);
        let leaf = root + buf.delay.intrinsic + buf.delay.per_load * moved_load;
        let mut slack = ends_req - root;
        if keep > 0 {
            slack = slack.min(readers[0].0 - root);
        }
        slack = slack.min(readers[keep].0 - leaf);
        if best.is_none_or(|(s, _)| slack > s) {
            best = Some((slack, keep));
        }
    }
    let (slack, keep) = best?;
    let gain = slack - old_slack;
    (gain > 1e-9 * (1.0 + old_slack.abs())).then(|| Split {
        net,
        driver,
        moved: readers[keep..].iter().map(|r| (r.1, r.2)).collect(),
        gain,
    })
}

/// Inserts the buffer of `split` right after its driver; returns the new
/// net.
fn apply(nl: &mut MappedNetlist, buffer: u32, split: &Split, names: &mut HashSet<String>) -> NetId {
    let mut k = nl.nets.len();
    let name = loop {
        let candidate = format!("nfb{k}");
        if names.insert(candidate.clone()) {
            break candidate;
        }
        k += 1;
    };
    let at = split.driver + 1;
    let new_net = nl.nets.len() as NetId;
    nl.nets.push(Net {
        name: name.clone(),
        driver: Driver::Cell(at as u32),
    });
    for &(inst, pin) in &split.moved {
        nl.instances[inst].inputs[pin] = new_net;
    }
    for net in &mut nl.nets {
        if let Driver::Cell(i) = &mut net.driver {
            if *i as usize >= at && net.name != name {
                *i += 1;
            }
        }
    }
    nl.instances.insert(
        at,
        Instance {
            name: format!("fb_{name}"),
            cell: buffer,
            inputs: vec![split.net],
            output: new_net,
        },
    );
    new_net
}

/// Undoes [`apply`] of `split`, which created `new_net`.
fn undo(nl: &mut MappedNetlist, split: &Split, new_net: NetId, names: &mut HashSet<String>) {
    let at = split.driver + 1;
    nl.instances.remove(at);
    if let Some(net) = nl.nets.pop() {
        names.remove(&net.name);
    }
    for &(inst, pin) in &split.moved {
        nl.instances[inst].inputs[pin] = split.net;
    }
    for net in &mut nl.nets {
        if let Driver::Cell(i) = &mut net.driver {
            if *i as usize > at {
                *i -= 1;
            }
        }
    }
    debug_assert_eq!(nl.nets.len(), new_net as usize);
}

/// `nl` with buffer chains on critical nets whose splitting lowers the
/// delay, or `None` when no split helps (or the library has no buffer).
pub fn split_critical_loads(nl: &MappedNetlist, lib: &Library) -> Option<Buffered> {
    let buffer = buffer_cell(lib)?;
    let mut cur = nl.clone();
    let mut copies = Vec::new();
    let mut tried: HashSet<NetId> = HashSet::new();
    let mut names: HashSet<String> = cur.nets.iter().map(|n| n.name.clone()).collect();
    let mut timing = analyze_timing(&cur, lib);
    for _ in 0..MAX_TRIES {
        if copies.len() >= MAX_BUFFERS {
            break;
        }
        let req = required_times(&cur, lib, &timing.load, timing.delay);
        let fanouts = cur.fanouts();
        let tolerance = 1e-9 * (1.0 + timing.delay.abs());
        let mut best: Option<Split> = None;
        for (n, net) in cur.nets.iter().enumerate() {
            let Driver::Cell(driver) = net.driver else {
                continue;
            };
            if tried.contains(&(n as NetId)) || req[n] - timing.arrival[n] > tolerance {
                continue;
            }
            // A second buffer on the same net would be a duplicate cell.
            let copied = fanouts.of(n as NetId).iter().any(|&(k, _)| {
                let c = &lib.cells[cur.instances[k as usize].cell as usize];
                c.arity() == 1 && c.truth & 3 == 0b10
            });
            if copied {
                continue;
            }
            if let Some(s) = plan(
                &cur,
                lib,
                buffer,
                (n as NetId, driver as usize),
                &fanouts,
                (&timing.arrival, &timing.load, &req),
            ) {
                if best.as_ref().is_none_or(|b| s.gain > b.gain) {
                    best = Some(s);
                }
            }
        }
        let Some(split) = best else {
            break;
        };
        tried.insert(split.net);
        let new_net = apply(&mut cur, buffer, &split, &mut names);
        let after = analyze_timing(&cur, lib);
        if after.delay < timing.delay - tolerance {
            copies.push((new_net, split.net));
            timing = after;
        } else {
            undo(&mut cur, &split, new_net, &mut names);
        }
    }
    (!copies.is_empty()).then_some(Buffered {
        netlist: cur,
        copies,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::library::{Cell, DelayModel, Leakage, Units};
    use crate::netlist::Port;

    fn cell(name: &str, arity: usize, truth: u64, delay: (f64, f64)) -> Cell {
        Cell {
            name: name.into(),
            inputs: ["a", "b"][..arity].iter().map(|s| s.to_string()).collect(),
            output: "y".into(),
            truth,
            area: 1.0,
            delay: DelayModel {
                intrinsic: delay.0,
                per_load: delay.1,
            },
            input_load: 1.0,
            switch_energy: 0.0,
            switch_energy_per_load: 0.0,
            leakage: Leakage::Constant(0.0),
            devices: 2,
        }
    }

    /// Invented numbers: inverter 1.0 + 0.5 per load, buffer 1.2 + 0.5 per
    /// load, every input pin and primary output one load unit.
    fn library() -> Library {
        Library {
            name: "fanout-test".into(),
            description: "invented for a hand-computed fanout tree".into(),
            units: Units {
                area: "um2".into(),
                delay: "ps".into(),
                energy: "fJ".into(),
                power: "nW".into(),
            },
            supply_v: None,
            primary_output_load: 1.0,
            cells: vec![
                cell("inv", 1, 0b01, (1.0, 0.5)),
                cell("buf", 1, 0b10, (1.2, 0.5)),
            ],
            storage: Vec::new(),
        }
    }

    /// x -> inv -> n; n feeds a chain of three inverters to output `o` and
    /// six inverters to outputs o1..o6.
    fn netlist() -> MappedNetlist {
        let mut nl = MappedNetlist {
            name: "fan".into(),
            library: "fanout-test".into(),
            ..MappedNetlist::default()
        };
        let x = nl.add_net("x".into(), Driver::Input(0));
        nl.inputs.push(Port {
            name: "x".into(),
            net: x,
        });
        let n = nl.add_instance(0, vec![x], "n".into());
        let c1 = nl.add_instance(0, vec![n], "c1".into());
        let c2 = nl.add_instance(0, vec![c1], "c2".into());
        let o = nl.add_instance(0, vec![c2], "o".into());
        nl.outputs.push(Port {
            name: "o".into(),
            net: o,
        });
        for k in 1..=6 {
            let name = format!("o{k}");
            let net = nl.add_instance(0, vec![n], name.clone());
            nl.outputs.push(Port { name, net });
        }
        nl
    }

    #[test]
    fn one_buffer_takes_the_non_critical_readers_off_the_critical_net() {
        let lib = library();
        let nl = netlist();
        // By hand: n carries 7 pin loads, 1 + 0.5 * 7 = 4.5; the chain adds
        // 1.5 + 1.5 + 1.5 = 9.0.
        assert!((analyze_timing(&nl, &lib).delay - 9.0).abs() < 1e-9);
        let b = split_critical_loads(&nl, &lib).expect("a split helps");
        assert_eq!(b.copies.len(), 1);
        // By hand: n carries the chain and the buffer, 1 + 0.5 * 2 = 2.0;
        // the buffer 2.0 + 1.2 + 0.5 * 6 = 6.2, its readers 6.2 + 1.5 =
        // 7.7; the chain 2.0 + 4.5 = 6.5.
        assert!((analyze_timing(&b.netlist, &lib).delay - 7.7).abs() < 1e-9);
        let (copy, source) = b.copies[0];
        assert_eq!(b.netlist.nets[source as usize].name, "n");
        let readers = b.netlist.fanouts();
        assert_eq!(readers.of(copy).len(), 6);
        assert_eq!(readers.of(source).len(), 2);
        // Same functions: every output is x inverted an even or odd number
        // of times, checked on both input values.
        let before = nl.to_network(&lib).output_truth_tables().unwrap();
        let after = b.netlist.to_network(&lib).output_truth_tables().unwrap();
        assert_eq!(before, after);
    }
}
