//! Structural Verilog writer: one instance per cell with named ports.
//!
//! Port names are kept; names that are not plain Verilog identifiers (for
//! example `a[0]`) are written as escaped identifiers (`\a[0] `). Constant
//! nets are written as `1'b0`/`1'b1` on the pins they feed; an output whose
//! net carries another name becomes an `assign`. Storage elements become
//! instances of the library's storage cell (pins from the library), or of a
//! cell named `dff` with pins `d`, `q`, `clk` when the library has none.
//! A storage element's start value 0 or 1 follows its instance as
//! `initial q = 1'b0;` on its output net, which the Verilog reader reads back
//! as the element's initial value (don't-care and unknown start values are
//! left out, as Verilog has no constant for them that the reader takes).
//! A design named after a library cell (a flip-flop module `dff`) is
//! written as `NAME_top`, so the module never instantiates its own name.

use super::{Driver, MappedNetlist};
use crate::io::verilog_identifier as identifier;
use crate::library::Library;
use crate::network::InitValue;
use std::fmt::Write;

fn net_ref(nl: &MappedNetlist, net: u32) -> String {
    match nl.nets[net as usize].driver {
        Driver::Constant(c) => if c { "1'b1" } else { "1'b0" }.to_string(),
        _ => identifier(&nl.nets[net as usize].name),
    }
}

pub(super) fn write(nl: &MappedNetlist, lib: &Library) -> String {
    let mut s = String::new();
    let clocks = extra_clocks(nl);
    let mut ports: Vec<String> = nl.inputs.iter().map(|p| identifier(&p.name)).collect();
    ports.extend(clocks.iter().map(|c| identifier(c)));
    ports.extend(nl.outputs.iter().map(|p| identifier(&p.name)));
    let _ = writeln!(s, "// mapped onto library {}", nl.library);
    let _ = writeln!(
        s,
        "module {} ({});",
        identifier(&module_name(nl, lib)),
        ports.join(", ")
    );
    for p in &nl.inputs {
        let _ = writeln!(s, "  input {};", identifier(&p.name));
    }
    for c in &clocks {
        let _ = writeln!(s, "  input {};", identifier(c));
    }
    for p in &nl.outputs {
        let _ = writeln!(s, "  output {};", identifier(&p.name));
    }
    let outputs: std::collections::HashSet<&str> =
        nl.outputs.iter().map(|p| p.name.as_str()).collect();
    for n in &nl.nets {
        if matches!(n.driver, Driver::Cell(_) | Driver::Storage(_))
            && !outputs.contains(n.name.as_str())
        {
            let _ = writeln!(s, "  wire {};", identifier(&n.name));
        }
    }
    for inst in &nl.instances {
        let cell = &lib.cells[inst.cell as usize];
        let mut pins: Vec<String> = cell
            .inputs
            .iter()
            .zip(&inst.inputs)
            .map(|(pin, &net)| format!(".{}({})", identifier(pin), net_ref(nl, net)))
            .collect();
        pins.push(format!(
            ".{}({})",
            identifier(&cell.output),
            net_ref(nl, inst.output)
        ));
        let _ = writeln!(
            s,
            "  {} {} ({});",
            identifier(&cell.name),
            identifier(&inst.name),
            pins.join(", ")
        );
    }
    for (i, st) in nl.storage.iter().enumerate() {
        let (cell, d, q, clk) = match st.cell.and_then(|c| lib.storage.get(c as usize)) {
            Some(c) => (
                c.name.as_str(),
                c.d.as_str(),
                c.q.as_str(),
                c.clock.as_str(),
            ),
            None => ("dff", "d", "q", "clk"),
        };
        let clock = st.clock.as_deref().map(identifier).unwrap_or_default();
        let _ = writeln!(
            s,
            "  {} {} (.{}({}), .{}({}), .{}({}));",
            identifier(cell),
            identifier(&format!("r{i}_{}", st.name)),
            identifier(d),
            net_ref(nl, st.data),
            identifier(q),
            net_ref(nl, st.output),
            identifier(clk),
            clock
        );
        let start = match st.init {
            InitValue::Zero => "1'b0",
            InitValue::One => "1'b1",
            InitValue::DontCare | InitValue::Unknown => continue,
        };
        let _ = writeln!(s, "  initial {} = {start};", net_ref(nl, st.output));
    }
    for p in &nl.outputs {
        if nl.nets[p.net as usize].name != p.name
            || matches!(nl.nets[p.net as usize].driver, Driver::Constant(_))
        {
            let _ = writeln!(
                s,
                "  assign {} = {};",
                identifier(&p.name),
                net_ref(nl, p.net)
            );
        }
    }
    s.push_str("endmodule\n");
    s
}

/// The module's name: the design's, unless a cell of the library (or the
/// fallback storage cell `dff`) has that name, when `_top` is added until it
/// is not (a module that instantiated a cell of its own name would contain
/// itself).
fn module_name(nl: &MappedNetlist, lib: &Library) -> String {
    let taken =
        |name: &str| name == "dff" || lib.cell(name).is_some() || lib.storage_cell(name).is_some();
    let mut name = nl.name.clone();
    while taken(&name) {
        name.push_str("_top");
    }
    name
}

/// Clock nets of storage elements that are not primary inputs.
pub(super) fn extra_clocks(nl: &MappedNetlist) -> Vec<String> {
    let mut clocks: Vec<String> = Vec::new();
    for st in &nl.storage {
        if let Some(c) = &st.clock {
            if !nl.inputs.iter().any(|p| &p.name == c) && !clocks.contains(c) {
                clocks.push(c.clone());
            }
        }
    }
    clocks
}
