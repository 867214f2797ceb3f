//! Reading an already-mapped netlist back as a [`MappedNetlist`].
//!
//! The netlist readers of `io` turn cell instances into logic, which loses
//! the cells; commands that work on a circuit as built (a SPICE deck of the
//! cells a user placed, or that `map -o x.v` wrote) need the instances
//! themselves. This reader takes a structural Verilog module whose every
//! instance is a cell of the library (named or positional connections, the
//! output pin first when positional, as the general reader does), scalar
//! ports and wires, and `assign`s that alias an output to a net or a
//! constant — the shape `map -o x.v` writes. Anything else (gate primitives,
//! expressions, vectors, storage, instances of other cells) is refused with
//! its line and column, with the advice to map the netlist instead.

use super::{Driver, MappedNetlist, Port};
use crate::diag::SourceError;
use crate::io::verilog_parse::{parse, Conns, Dir, Expr, Item};
use crate::library::Library;
use rustc_hash::FxHashMap;

/// Reads the mapped structural Verilog `text` (named `file` in errors) on
/// `library`; `top` picks the module when the file has several.
pub fn read_mapped_verilog(
    text: &str,
    file: &str,
    library: &Library,
    top: Option<&str>,
) -> Result<MappedNetlist, SourceError> {
    let modules = parse(text, file)?;
    let err = |loc: (u32, u32), msg: String| SourceError::new(file, loc.0, loc.1, msg);
    let module = match top {
        Some(name) => modules
            .iter()
            .find(|m| m.name == name)
            .ok_or_else(|| err((1, 1), format!("no module named '{name}'")))?,
        None if modules.len() == 1 => &modules[0],
        None => {
            return Err(err(
                modules.get(1).map_or((1, 1), |m| m.loc),
                format!(
                    "{} modules: a mapped netlist has one (give --top to pick one)",
                    modules.len()
                ),
            ))
        }
    };
    let not_mapped = |loc, what: &str| {
        err(
            loc,
            format!("{what}: not a netlist of library cells (give --map to map it first)"),
        )
    };
    for (name, decl) in &module.decls {
        if decl.range.is_some() {
            return Err(not_mapped(decl.loc, &format!("vector '{name}'")));
        }
    }
    let mut b = Builder {
        nl: MappedNetlist {
            name: module.name.to_string(),
            library: library.name.clone(),
            ..MappedNetlist::default()
        },
        ids: FxHashMap::default(),
        driven: Vec::new(),
    };
    let mut output_ports = Vec::new();
    for &(name, loc) in &module.ports {
        match module.decls.get(name).and_then(|d| d.dir) {
            Some(Dir::Input) => {
                let i = b.nl.inputs.len() as u32;
                let net = b.net(name);
                b.nl.nets[net as usize].driver = Driver::Input(i);
                b.driven[net as usize] = true;
                b.nl.inputs.push(Port {
                    name: name.to_string(),
                    net,
                });
            }
            Some(Dir::Output) => output_ports.push(name),
            None => return Err(err(loc, format!("port '{name}' has no direction"))),
        }
    }
    let mut cells: Vec<ReadInstance> = Vec::new();
    let mut aliases: FxHashMap<&str, u32> = FxHashMap::default();
    for item in &module.items {
        match item {
            Item::Instance {
                module: cell_name,
                module_loc,
                name,
                conns,
            } => {
                let Some(ci) = library.cell_index(cell_name) else {
                    return Err(not_mapped(
                        *module_loc,
                        &format!("'{cell_name}' is not a cell of library {}", library.name),
                    ));
                };
                let cell = &library.cells[ci];
                let mut pins: Vec<Option<u32>> = vec![None; cell.inputs.len() + 1];
                let pin_of = |pin: &str| {
                    if pin == cell.output {
                        Some(0)
                    } else {
                        cell.inputs.iter().position(|p| p == pin).map(|k| k + 1)
                    }
                };
                let connections: Vec<(usize, &Expr, (u32, u32))> = match conns {
                    Conns::Named(list) => {
                        let mut out = Vec::new();
                        for (pin, expr, loc) in list {
                            let slot = pin_of(pin).ok_or_else(|| {
                                err(*loc, format!("cell {cell_name} has no pin '{pin}'"))
                            })?;
                            if let Some(e) = expr {
                                out.push((slot, e, *loc));
                            }
                        }
                        out
                    }
                    Conns::Ordered(list) => {
                        if list.len() != pins.len() {
                            return Err(err(
                                *module_loc,
                                format!(
                                    "cell {cell_name} has {} pins, {} connected",
                                    pins.len(),
                                    list.len()
                                ),
                            ));
                        }
                        list.iter()
                            .enumerate()
                            .filter_map(|(k, e)| e.as_ref().map(|e| (k, e, e.loc())))
                            .collect()
                    }
                };
                for (slot, expr, loc) in connections {
                    if pins[slot].is_some() {
                        return Err(err(loc, "pin connected twice".into()));
                    }
                    let net = if slot == 0 {
                        match expr {
                            Expr::Name(n, _) => b.net(n),
                            other => {
                                return Err(not_mapped(
                                    other.loc(),
                                    "an output pin not connected to a plain net",
                                ))
                            }
                        }
                    } else {
                        b.operand(expr).ok_or_else(|| {
                            not_mapped(loc, "an input pin not connected to a net or 1'b0/1'b1")
                        })?
                    };
                    pins[slot] = Some(net);
                }
                let (Some(output), inputs) = (pins[0], &pins[1..]) else {
                    return Err(err(
                        *module_loc,
                        format!("instance {name}: output unconnected"),
                    ));
                };
                let Some(inputs) = inputs.iter().copied().collect::<Option<Vec<u32>>>() else {
                    return Err(err(
                        *module_loc,
                        format!("instance {name}: an input pin is unconnected"),
                    ));
                };
                if std::mem::replace(&mut b.driven[output as usize], true) {
                    return Err(err(
                        *module_loc,
                        format!("net '{}' has two drivers", b.nl.nets[output as usize].name),
                    ));
                }
                cells.push((ci as u32, name.to_string(), inputs, output, *module_loc));
            }
            Item::Assign(Expr::Name(lhs, loc), rhs, _) if output_ports.contains(lhs) => {
                let net = b
                    .operand(rhs)
                    .ok_or_else(|| not_mapped(rhs.loc(), "an assign of an expression"))?;
                if aliases.insert(lhs, net).is_some() {
                    return Err(err(*loc, format!("output '{lhs}' is assigned twice")));
                }
            }
            Item::Assign(_, _, loc) => {
                return Err(not_mapped(*loc, "an assign to a net other than an output"))
            }
            Item::Prim(_, _, loc) => return Err(not_mapped(*loc, "a gate primitive")),
            Item::Always { clock, .. } => {
                return Err(not_mapped(clock.loc(), "storage (an always block)"))
            }
            Item::Initial(list) => {
                let loc = list.first().map_or(module.loc, |a| a.2);
                return Err(not_mapped(loc, "storage (an initial block)"));
            }
        }
    }
    // Topological order of the instances (depth-first, iterative).
    let mut producer: Vec<Option<usize>> = vec![None; b.nl.nets.len()];
    for (k, c) in cells.iter().enumerate() {
        producer[c.3 as usize] = Some(k);
    }
    let mut order = Vec::with_capacity(cells.len());
    let mut state = vec![0u8; cells.len()]; // 0 new, 1 on stack, 2 done
    for start in 0..cells.len() {
        if state[start] != 0 {
            continue;
        }
        let mut stack = vec![(start, 0usize)];
        state[start] = 1;
        while let Some(&mut (k, ref mut next)) = stack.last_mut() {
            if let Some(&net) = cells[k].2.get(*next) {
                *next += 1;
                if let Some(p) = producer[net as usize] {
                    match state[p] {
                        0 => {
                            state[p] = 1;
                            stack.push((p, 0));
                        }
                        1 => {
                            return Err(err(
                                cells[p].4,
                                format!(
                                    "combinational loop through net '{}'",
                                    b.nl.nets[net as usize].name
                                ),
                            ))
                        }
                        _ => {}
                    }
                }
            } else {
                state[k] = 2;
                order.push(k);
                stack.pop();
            }
        }
    }
    for (net, driven) in b.driven.iter().enumerate() {
        if !driven {
            return Err(err(
                module.loc,
                format!(
                    "net '{}' is read but nothing drives it",
                    b.nl.nets[net].name
                ),
            ));
        }
    }
    for k in order {
        let (cell, name, inputs, output, _) = cells[k].clone();
        let index = b.nl.instances.len() as u32;
        b.nl.nets[output as usize].driver = Driver::Cell(index);
        b.nl.instances.push(super::Instance {
            name,
            cell,
            inputs,
            output,
        });
    }
    for name in output_ports {
        let net = match aliases.get(name) {
            Some(&net) => net,
            None => match b.ids.get(name) {
                Some(&net) if b.driven[net as usize] => net,
                _ => return Err(err(module.loc, format!("output '{name}' is not driven"))),
            },
        };
        b.nl.outputs.push(Port {
            name: name.to_string(),
            net,
        });
    }
    Ok(b.nl)
}

/// A cell instance as read: cell index, name, input nets, output net, and
/// where it is in the file.
type ReadInstance = (u32, String, Vec<u32>, u32, (u32, u32));

/// Nets by name while reading.
struct Builder {
    nl: MappedNetlist,
    ids: FxHashMap<String, u32>,
    /// Whether each net has its driver yet.
    driven: Vec<bool>,
}

impl Builder {
    /// The net named `name`, created (undriven) on first use.
    fn net(&mut self, name: &str) -> u32 {
        if let Some(&id) = self.ids.get(name) {
            return id;
        }
        let id = self.nl.add_net(name.to_string(), Driver::Constant(false));
        self.ids.insert(name.to_string(), id);
        self.driven.push(false);
        id
    }

    /// The net an input pin or an alias reads: a plain net or a one-bit
    /// constant (a constant net, shared per value).
    fn operand(&mut self, expr: &Expr) -> Option<u32> {
        match expr {
            Expr::Name(n, _) => Some(self.net(n)),
            Expr::Const(bits, _) if bits.len() == 1 => {
                let name = if bits[0] { "1'b1" } else { "1'b0" };
                let id = self.net(name);
                self.nl.nets[id as usize].driver = Driver::Constant(bits[0]);
                self.driven[id as usize] = true;
                Some(id)
            }
            _ => None,
        }
    }
}
