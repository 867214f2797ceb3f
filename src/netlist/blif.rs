//! BLIF writer with one `.gate` line per cell instance.
//!
//! Storage elements become `.latch` lines (rising edge on their clock when
//! the source names one). Constant nets are defined by constant `.names`
//! tables; an output whose net carries another name is defined by a
//! one-row buffer table.

use super::verilog::extra_clocks;
use super::{Driver, MappedNetlist};
use crate::library::Library;
use crate::network::InitValue;
use std::fmt::Write;

pub(super) fn write(nl: &MappedNetlist, lib: &Library) -> String {
    let mut s = String::new();
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
            let _ = writeln!(s, ".names {}", n.name);
            if c {
                s.push_str("1\n");
            }
        }
    }
    for inst in &nl.instances {
        let cell = &lib.cells[inst.cell as usize];
        let _ = write!(s, ".gate {}", cell.name);
        for (pin, &net) in cell.inputs.iter().zip(&inst.inputs) {
            let _ = write!(s, " {}={}", pin, nl.nets[net as usize].name);
        }
        let _ = writeln!(s, " {}={}", cell.output, nl.nets[inst.output as usize].name);
    }
    for st in &nl.storage {
        let init = match st.init {
            InitValue::Zero => 0,
            InitValue::One => 1,
            InitValue::DontCare => 2,
            InitValue::Unknown => 3,
        };
        let d = &nl.nets[st.data as usize].name;
        let q = &nl.nets[st.output as usize].name;
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
        let net = &nl.nets[p.net as usize];
        if net.name != p.name {
            let _ = writeln!(s, ".names {} {}\n1 1", net.name, p.name);
        }
    }
    s.push_str(".end\n");
    s
}
