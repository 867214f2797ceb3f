//! Fanout trees of buffers and duplicated drivers: where a net's load makes
//! it critical, its less critical readers move behind a copy of the net, so
//! the critical readers see a smaller load.
//!
//! The method is the critical-sink-first splitting of fanout optimisation
//! (H. Touati, "Performance-oriented technology mapping", PhD thesis, UC
//! Berkeley, 1990, whose LT-trees are built from such splits), in a simple
//! greedy form, on the extracted netlist and its static timing:
//! 1. time the netlist and propagate required times back from its delay;
//! 2. among the nets on a critical path (no slack) driven by a cell and read
//!    by at least two cell pins, take the one whose split gains most by
//!    estimate: its readers are ordered by required time, the first `k`
//!    stay on the net, the rest read a copy of it, and `k` is chosen for the
//!    best worst slack (primary outputs stay on the net). The copy is either
//!    a buffer reading the net (when the library has one), or a duplicate
//!    of the net's driver over the same inputs (one stage less, where those inputs have the slack to
//!    carry one more pin);
//! 3. keep the split when the delay of the whole netlist falls, or stays
//!    while the sum of the outputs' arrivals falls (several equally
//!    critical nets are split one after another); otherwise undo it and
//!    try that net again only once the delay has fallen.
//!
//! A net may be split again, and so may a copy's net, which grows a tree.
//! The rounds stop after [`max_copies`] copies, when no split helps, or
//! after [`STALL`] tries in a row that leave the delay where it was.
//! Every kept split is recorded with the area and delay after it, so a
//! caller can also take the prefix of the splits with the least
//! area × delay ([`Buffered::trimmed`]).

use crate::library::Library;
use crate::netlist::{analyze_timing, Driver, Fanouts, Instance, MappedNetlist, Net, NetId};
use std::collections::HashSet;

/// Most copies added to a netlist of `cells` cells: 64, or one per four
/// cells in larger netlists.
pub fn max_copies(cells: usize) -> usize {
    64.max(cells / 4)
}

/// How a split copies its net.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum CopyKind {
    /// A buffer reading the net.
    Buffer,
    /// A duplicate of the net's driver, over the driver's inputs.
    Duplicate,
}

/// One copy added by a fanout tree.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct NetCopy {
    /// The net the copy drives.
    pub net: NetId,
    /// The net it carries the signal of (maybe an earlier copy).
    pub source: NetId,
    /// Buffer or duplicated driver.
    pub kind: CopyKind,
}

/// A netlist with fanout trees added.
#[derive(Clone, Debug)]
pub struct Buffered {
    /// The netlist.
    pub netlist: MappedNetlist,
    /// Per copy added, in order.
    pub copies: Vec<NetCopy>,
    /// The splits kept, in order (for [`Buffered::trimmed`]).
    splits: Vec<Split>,
    /// Area and delay after each kept split.
    trace: Vec<(f64, f64)>,
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

/// One planned split: the net, its driver instance, the groups of reader
/// pins that move to a copy each, and how the copies are made.
#[derive(Clone, Debug)]
struct Split {
    net: NetId,
    driver: usize,
    groups: Vec<Vec<(usize, usize)>>,
    gain: f64,
    kind: CopyKind,
    /// The cell of the copies: the buffer, or the driver's cell.
    cell: u32,
}

/// Tries (kept or undone) in a row that leave the delay where it was,
/// after which the splitting stops (the trees end at the last split that
/// lowered the delay anyway).
const STALL: usize = 12;

/// Most copies one split makes of a net.
const MAX_GROUPS: usize = 24;

/// Timing of the netlist being split: arrival, load and required time per
/// net.
struct Timing<'t> {
    arrival: &'t [f64],
    load: &'t [f64],
    req: &'t [f64],
}

/// Whether the driver `driver` may be duplicated: each of its inputs
/// driven by a cell has the slack to carry one more pin.
fn may_duplicate(nl: &MappedNetlist, lib: &Library, driver: usize, t: &Timing) -> bool {
    let inst = &nl.instances[driver];
    let pin_load = lib.cells[inst.cell as usize].input_load;
    inst.inputs
        .iter()
        .all(|&i| match nl.nets[i as usize].driver {
            Driver::Cell(k) => {
                let up = &lib.cells[nl.instances[k as usize].cell as usize];
                t.req[i as usize] - t.arrival[i as usize] >= up.delay.per_load * pin_load
            }
            _ => true,
        })
}

/// The best split of `net` (driven by instance `driver`) by estimated
/// worst slack, if it gains: the `keep` most critical readers stay, the
/// others are cut, in order of required time, into `m` groups of about
/// equal size, each behind its own copy of the net.
fn plan(
    nl: &MappedNetlist,
    lib: &Library,
    buffer: Option<u32>,
    (net, driver): (NetId, usize),
    fanouts: &Fanouts,
    t: &Timing,
) -> Option<Split> {
    let n = net as usize;
    // Reader pins with their required times at the pin.
    let mut readers: Vec<(f64, usize, usize, f64)> = Vec::new();
    for &(k, pin) in fanouts.of(net) {
        let inst = &nl.instances[k as usize];
        let cell = &lib.cells[inst.cell as usize];
        let o = inst.output as usize;
        let r = t.req[o] - (cell.delay.intrinsic + cell.delay.per_load * t.load[o]);
        readers.push((r, k as usize, pin as usize, cell.input_load));
    }
    if readers.len() < 2 {
        return None;
    }
    readers.sort_by(|a, b| a.0.total_cmp(&b.0));
    // prefix[i]: pin load of the i most critical readers.
    let mut prefix = vec![0.0];
    for r in &readers {
        prefix.push(prefix[prefix.len() - 1] + r.3);
    }
    let cell = &lib.cells[nl.instances[driver].cell as usize];
    let buf = buffer.map(|b| &lib.cells[b as usize]);
    let pin_loads = prefix[readers.len()];
    let ends = t.load[n] - pin_loads;
    let ends_req = if ends > 1e-12 {
        t.req[n]
    } else {
        f64::INFINITY
    };
    let start = t.arrival[n] - (cell.delay.intrinsic + cell.delay.per_load * t.load[n]);
    let old_slack = t.req[n] - t.arrival[n];
    let duplicate = may_duplicate(nl, lib, driver, t);
    let len = readers.len();
    // (slack, keep, groups, kind, area of the copies)
    let mut best: Option<(f64, usize, usize, CopyKind, f64)> = None;
    for keep in 0..len {
        let rest = len - keep;
        for m in 1..=rest.min(MAX_GROUPS) {
            // A duplicate left with no reader on the original would only
            // move the net.
            let kinds = [
                buf.map(|b| (CopyKind::Buffer, b.input_load, b.area)),
                (duplicate && (keep > 0 || ends > 1e-12)).then_some((
                    CopyKind::Duplicate,
                    0.0,
                    cell.area,
                )),
            ];
            for &(kind, extra, area) in kinds.iter().flatten() {
                let root = start
                    + cell.delay.intrinsic
                    + cell.delay.per_load * (prefix[keep] + ends + m as f64 * extra);
                let mut slack = ends_req - root;
                if keep > 0 {
                    slack = slack.min(readers[0].0 - root);
                }
                for g in 0..m {
                    let (from, to) = (keep + g * rest / m, keep + (g + 1) * rest / m);
                    let load = prefix[to] - prefix[from];
                    let leaf = match buf.filter(|_| kind == CopyKind::Buffer) {
                        Some(b) => root + b.delay.intrinsic + b.delay.per_load * load,
                        None => start + cell.delay.intrinsic + cell.delay.per_load * load,
                    };
                    slack = slack.min(readers[from].0 - leaf);
                }
                let area = m as f64 * area;
                let better = best.is_none_or(|(s, _, _, _, a)| {
                    slack > s + 1e-9 || (slack > s - 1e-9 && area < a)
                });
                if better {
                    best = Some((slack, keep, m, kind, area));
                }
            }
        }
    }
    let (slack, keep, m, kind, _) = best?;
    let gain = slack - old_slack;
    let rest = len - keep;
    (gain > 1e-9 * (1.0 + old_slack.abs())).then(|| Split {
        net,
        driver,
        groups: (0..m)
            .map(|g| {
                readers[keep + g * rest / m..keep + (g + 1) * rest / m]
                    .iter()
                    .map(|r| (r.1, r.2))
                    .collect()
            })
            .collect(),
        gain,
        kind,
        cell: match (kind, buffer) {
            (CopyKind::Buffer, Some(b)) => b,
            _ => nl.instances[driver].cell,
        },
    })
}

/// Inserts the copies of `split` right after its driver; returns their
/// nets.
fn apply(nl: &mut MappedNetlist, split: &Split, names: &mut HashSet<String>) -> Vec<NetId> {
    let at = split.driver + 1;
    let m = split.groups.len();
    let first = nl.nets.len();
    for net in &mut nl.nets {
        if let Driver::Cell(i) = &mut net.driver {
            if *i as usize >= at {
                *i += m as u32;
            }
        }
    }
    let cell = split.cell;
    let inputs = match split.kind {
        CopyKind::Buffer => vec![split.net],
        CopyKind::Duplicate => nl.instances[split.driver].inputs.clone(),
    };
    let mut made = Vec::with_capacity(m);
    for (g, group) in split.groups.iter().enumerate() {
        let mut k = nl.nets.len();
        let name = loop {
            let candidate = format!("nfb{k}");
            if names.insert(candidate.clone()) {
                break candidate;
            }
            k += 1;
        };
        let new_net = nl.nets.len() as NetId;
        nl.nets.push(Net {
            name: name.clone(),
            driver: Driver::Cell((at + g) as u32),
        });
        for &(inst, pin) in group {
            nl.instances[inst].inputs[pin] = new_net;
        }
        made.push(new_net);
    }
    for (g, &new_net) in made.iter().enumerate() {
        nl.instances.insert(
            at + g,
            Instance {
                name: format!("fb_{}", nl.nets[new_net as usize].name),
                cell,
                inputs: inputs.clone(),
                output: new_net,
            },
        );
    }
    debug_assert_eq!(made.first().copied(), Some(first as NetId));
    made
}

/// Undoes [`apply`] of `split`.
fn undo(nl: &mut MappedNetlist, split: &Split, names: &mut HashSet<String>) {
    let at = split.driver + 1;
    let m = split.groups.len();
    nl.instances.drain(at..at + m);
    for _ in 0..m {
        if let Some(net) = nl.nets.pop() {
            names.remove(&net.name);
        }
    }
    for group in &split.groups {
        for &(inst, pin) in group {
            nl.instances[inst].inputs[pin] = split.net;
        }
    }
    for net in &mut nl.nets {
        if let Driver::Cell(i) = &mut net.driver {
            if *i as usize >= at + m {
                *i -= m as u32;
            }
        }
    }
}

/// Sum of the arrival times at the outputs and storage inputs.
fn total_arrival(nl: &MappedNetlist, arrival: &[f64]) -> f64 {
    nl.outputs
        .iter()
        .map(|p| arrival[p.net as usize])
        .sum::<f64>()
        + nl.storage
            .iter()
            .map(|s| arrival[s.data as usize])
            .sum::<f64>()
}

/// `nl` with fanout trees on critical nets whose splitting lowers the
/// delay (or, at equal delay, the outputs' total arrival), or `None` when
/// no split helps. A library without a buffer cell gets duplicated drivers
/// only.
pub fn split_critical_loads(nl: &MappedNetlist, lib: &Library) -> Option<Buffered> {
    let buffer = buffer_cell(lib);
    let limit = max_copies(nl.instances.len());
    let mut cur = nl.clone();
    let mut copies = Vec::new();
    let mut splits = Vec::new();
    let mut trace = Vec::new();
    let mut area = nl.area(lib);
    let mut tried: HashSet<NetId> = HashSet::new();
    let mut names: HashSet<String> = cur.nets.iter().map(|n| n.name.clone()).collect();
    let mut timing = analyze_timing(&cur, lib);
    let mut total = total_arrival(&cur, &timing.arrival);
    let mut stalled = 0;
    for _ in 0..2 * limit {
        if copies.len() >= limit || stalled >= STALL {
            break;
        }
        let req = required_times(&cur, lib, &timing.load, timing.delay);
        let fanouts = cur.fanouts();
        let tolerance = 1e-9 * (1.0 + timing.delay.abs());
        let t = Timing {
            arrival: &timing.arrival,
            load: &timing.load,
            req: &req,
        };
        let mut best: Option<Split> = None;
        for (n, net) in cur.nets.iter().enumerate() {
            let Driver::Cell(driver) = net.driver else {
                continue;
            };
            if tried.contains(&(n as NetId)) || req[n] - timing.arrival[n] > tolerance {
                continue;
            }
            if let Some(s) = plan(
                &cur,
                lib,
                buffer,
                (n as NetId, driver as usize),
                &fanouts,
                &t,
            ) {
                if best.as_ref().is_none_or(|b| s.gain > b.gain) {
                    best = Some(s);
                }
            }
        }
        let Some(split) = best else {
            break;
        };
        let made = apply(&mut cur, &split, &mut names);
        let after = analyze_timing(&cur, lib);
        let after_total = total_arrival(&cur, &after.arrival);
        let faster = after.delay < timing.delay - tolerance;
        stalled = if faster { 0 } else { stalled + 1 };
        let level = after.delay <= timing.delay + tolerance;
        if faster || (level && after_total < total - tolerance) {
            for &net in &made {
                copies.push(NetCopy {
                    net,
                    source: split.net,
                    kind: split.kind,
                });
            }
            area +=
                made.len() as f64 * lib.cells[cur.instances[split.driver + 1].cell as usize].area;
            trace.push((area, after.delay));
            splits.push(split);
            if faster {
                // Nets that failed before may help now the delay fell.
                tried.clear();
            }
            timing = after;
            total = after_total;
        } else {
            tried.insert(split.net);
            undo(&mut cur, &split, &mut names);
        }
    }
    // Splits that leave the delay where it was only pay off with later
    // ones: the tree ends at its last split that lowered the delay.
    while trace.len() > 1 && trace[trace.len() - 1].1 >= trace[trace.len() - 2].1 - 1e-12 {
        trace.pop();
    }
    if trace.len() < splits.len() {
        let keep = trace.len();
        return replay(nl, &splits[..keep], trace);
    }
    (!copies.is_empty()).then_some(Buffered {
        netlist: cur,
        copies,
        splits,
        trace,
    })
}

/// `nl` with `splits` applied in order (as recorded by
/// [`split_critical_loads`] on `nl`), or `None` when there are none.
fn replay(nl: &MappedNetlist, splits: &[Split], mut trace: Vec<(f64, f64)>) -> Option<Buffered> {
    if splits.is_empty() {
        return None;
    }
    let mut cur = nl.clone();
    let mut names: HashSet<String> = cur.nets.iter().map(|n| n.name.clone()).collect();
    let mut copies = Vec::with_capacity(splits.len());
    for split in splits {
        for net in apply(&mut cur, split, &mut names) {
            copies.push(NetCopy {
                net,
                source: split.net,
                kind: split.kind,
            });
        }
    }
    trace.truncate(splits.len());
    Some(Buffered {
        netlist: cur,
        copies,
        splits: splits.to_vec(),
        trace,
    })
}

impl Buffered {
    /// The prefix of the splits after which the netlist's area × delay is
    /// least (`original`: the netlist before any split), if that is a
    /// proper prefix with at least one split.
    pub fn trimmed(&self, original: &MappedNetlist, lib: &Library) -> Option<Buffered> {
        let base = original.area(lib) * analyze_timing(original, lib).delay;
        let mut best = (base, 0);
        for (k, &(a, d)) in self.trace.iter().enumerate() {
            if a * d < best.0 * (1.0 - 1e-9) {
                best = (a * d, k + 1);
            }
        }
        if best.1 == 0 || best.1 == self.splits.len() {
            return None;
        }
        replay(original, &self.splits[..best.1], self.trace.clone())
    }
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

    /// x -> inv -> n (with `stage`, x -> inv -> a -> inv -> n); n feeds a
    /// chain of three inverters to output `o` and six inverters to outputs
    /// o1..o6.
    fn netlist(stage: bool) -> MappedNetlist {
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
        let first = if stage {
            nl.add_instance(0, vec![x], "a".into())
        } else {
            x
        };
        let n = nl.add_instance(0, vec![first], "n".into());
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

    /// Every output is x inverted an even or odd number of times: the same
    /// functions before and after, checked on both input values.
    fn same_functions(a: &MappedNetlist, b: &MappedNetlist, lib: &Library) {
        let before = a.to_network(lib).output_truth_tables().unwrap();
        let after = b.to_network(lib).output_truth_tables().unwrap();
        assert_eq!(before, after);
    }

    #[test]
    fn a_duplicated_input_inverter_takes_the_other_readers_off_the_critical_net() {
        let lib = library();
        let nl = netlist(false);
        // By hand: n carries 7 pin loads, 1 + 0.5 * 7 = 4.5; the chain adds
        // 1.5 + 1.5 + 1.5 = 9.0.
        assert!((analyze_timing(&nl, &lib).delay - 9.0).abs() < 1e-9);
        let b = split_critical_loads(&nl, &lib).expect("a split helps");
        // n's driver reads a primary input (an ideal driver), so a second
        // inverter of x takes the six outputs: n carries the chain alone,
        // 1 + 0.5 = 1.5, and the chain ends at 1.5 + 4.5 = 6.0; the copy
        // 1 + 0.5 * 6 = 4.0, its readers 4.0 + 1.5 = 5.5. One copy is
        // enough (two would leave the chain at 6.0 for more area).
        assert_eq!(b.copies.len(), 1);
        assert_eq!(b.copies[0].kind, CopyKind::Duplicate);
        assert!((analyze_timing(&b.netlist, &lib).delay - 6.0).abs() < 1e-9);
        let (copy, source) = (b.copies[0].net, b.copies[0].source);
        assert_eq!(b.netlist.nets[source as usize].name, "n");
        let readers = b.netlist.fanouts();
        assert_eq!(readers.of(copy).len(), 6);
        assert_eq!(readers.of(source).len(), 1);
        same_functions(&nl, &b.netlist, &lib);
        // All splits lowered area x delay: nothing to trim.
        assert!(b.trimmed(&nl, &lib).is_none());
    }

    #[test]
    fn two_buffers_split_a_load_whose_driver_cannot_be_duplicated() {
        let lib = library();
        let nl = netlist(true);
        // By hand: a carries one pin, 1.5; n 1.5 + 1 + 0.5 * 7 = 6.0; the
        // chain ends at 6.0 + 4.5 = 10.5.
        assert!((analyze_timing(&nl, &lib).delay - 10.5).abs() < 1e-9);
        let b = split_critical_loads(&nl, &lib).expect("a split helps");
        // a is critical, so n's driver is not duplicated. By hand, the
        // best split keeps the chain on n and puts the six outputs behind
        // two buffers of three: n carries 3 pins, 1.5 + 1 + 1.5 = 4.0, the
        // chain ends at 8.5; each buffer 4.0 + 1.2 + 0.5 * 3 = 6.7, its
        // outputs 8.2. (One buffer: its outputs 3.5 + 1.2 + 3.0 + 1.5 =
        // 9.2; three: the chain 9.0.) Splitting n again only slows it.
        assert_eq!(b.copies.len(), 2);
        assert!(b.copies.iter().all(|c| c.kind == CopyKind::Buffer));
        assert!((analyze_timing(&b.netlist, &lib).delay - 8.5).abs() < 1e-9);
        let readers = b.netlist.fanouts();
        for c in &b.copies {
            assert_eq!(b.netlist.nets[c.source as usize].name, "n");
            assert_eq!(readers.of(c.net).len(), 3);
        }
        same_functions(&nl, &b.netlist, &lib);
    }
}
