//! BLIF writer with one `.gate` line per cell instance.
//!
//! Storage elements become `.latch` lines (rising edge on their clock when
//! the source names one). Constant nets are defined by constant `.names`
//! tables under names of our own (`const0`, `const1`, with a suffix when the
//! design already uses the name); an output whose net carries another name
//! is defined by a one-row buffer table. The first line records the
//! library (`# mapped onto library NAME`), which
//! [`crate::io::recorded_library`] reads back.

use super::verilog::extra_clocks;
use super::{Driver, MappedNetlist};
use crate::library::Library;
use crate::network::InitValue;
use std::fmt::Write;

/// Names for the constant nets (`const0`, `const1`), made unique against
/// every other net and port name of the netlist.
fn constant_names(nl: &MappedNetlist) -> [String; 2] {
    let taken: std::collections::HashSet<&str> = nl
        .nets
        .iter()
        .filter(|n| !matches!(n.driver, Driver::Constant(_)))
        .map(|n| n.name.as_str())
        .chain(nl.inputs.iter().map(|p| p.name.as_str()))
        .chain(nl.outputs.iter().map(|p| p.name.as_str()))
        .collect();
    ["const0", "const1"].map(|stem| {
        let mut name = stem.to_string();
        let mut k = 0;
        while taken.contains(name.as_str()) {
            k += 1;
            name = format!("{stem}_{k}");
        }
        name
    })
}

pub(super) fn write(nl: &MappedNetlist, lib: &Library) -> String {
    let mut s = String::new();
    let constants = constant_names(nl);
    let name = |net: u32| -> &str {
        match nl.nets[net as usize].driver {
            Driver::Constant(c) => &constants[c as usize],
            _ => &nl.nets[net as usize].name,
        }
    };
    let _ = writeln!(s, "# mapped onto library {}", nl.library);
    let _ = writeln!(s, ".model {}", nl.name);
    let mut inputs: Vec<&str> = nl.inputs.iter().map(|p| p.name.as_str()).collect();
    let clocks = extra_clocks(nl);
    inputs.extend(clocks.iter().map(String::as_str));
    let _ = writeln!(s, ".inputs {}", inputs.join(" "));
    let outputs: Vec<&str> = nl.outputs.iter().map(|p| p.name.as_str()).collect();
    let _ = writeln!(s, ".outputs {}", outputs.join(" "));
    for n in &nl.nets {
        if let Driver::Constant(c) = n.driver {
            let _ = writeln!(s, ".names {}", constants[c as usize]);
            if c {
                s.push_str("1\n");
            }
        }
    }
    for inst in &nl.instances {
        let cell = &lib.cells[inst.cell as usize];
        let _ = write!(s, ".gate {}", cell.name);
        for (pin, &net) in cell.inputs.iter().zip(&inst.inputs) {
            let _ = write!(s, " {}={}", pin, name(net));
        }
        let _ = writeln!(s, " {}={}", cell.output, name(inst.output));
    }
    for st in &nl.storage {
        let init = match st.init {
            InitValue::Zero => 0,
            InitValue::One => 1,
            InitValue::DontCare => 2,
            InitValue::Unknown => 3,
        };
        let d = name(st.data);
        let q = name(st.output);
        match &st.clock {
            Some(c) => {
                let _ = writeln!(s, ".latch {d} {q} re {c} {init}");
            }
            None => {
                let _ = writeln!(s, ".latch {d} {q} {init}");
            }
        }
    }
    for p in &nl.outputs {
        let net = name(p.net);
        if net != p.name {
            let _ = writeln!(s, ".names {net} {}\n1 1", p.name);
        }
    }
    s.push_str(".end\n");
    s
}
