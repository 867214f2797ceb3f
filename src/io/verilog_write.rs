//! Structural Verilog writer.
//!
//! One module: the inputs and outputs as scalar ports (a bit `a[3]` is
//! written as the escaped identifier `\a[3] `, which reads back as the same
//! bit name), one `assign` per logic node (`&`, `^` and the majority as
//! `(a & b) | (a & c) | (b & c)`, with `~` on complemented fanins), and each
//! storage element as a `reg` updated by `always @(posedge CLOCK)` (or
//! `negedge` for falling-edge latches), which the reader recognises as a
//! flip-flop. A storage element without a clock input gets a clock port named
//! `<prefix>clock`. Initial values 0 and 1 are written as `initial q = 1'b0;`
//! (don't-care and unknown values are left out). Only logic some output or
//! storage element depends on is written; the output is deterministic.

use super::names::Namer;
use crate::network::{Lit, Network, NodeKind};
use std::fmt::Write;

const KEYWORDS: &[&str] = &[
    "always",
    "and",
    "assign",
    "begin",
    "buf",
    "case",
    "default",
    "else",
    "end",
    "endcase",
    "endmodule",
    "for",
    "function",
    "if",
    "initial",
    "inout",
    "input",
    "integer",
    "localparam",
    "module",
    "nand",
    "negedge",
    "nor",
    "not",
    "or",
    "output",
    "parameter",
    "posedge",
    "reg",
    "supply0",
    "supply1",
    "task",
    "wire",
    "xnor",
    "xor",
    "generate",
    "logic",
    "signed",
    "tri",
];

/// An identifier as Verilog source: plain when it is a simple identifier,
/// else escaped (`\name ` with the terminating space).
pub fn identifier(name: &str) -> String {
    let mut chars = name.chars();
    let simple = matches!(chars.next(), Some(c) if c.is_ascii_alphabetic() || c == '_')
        && chars.all(|c| c.is_ascii_alphanumeric() || c == '_' || c == '$')
        && !KEYWORDS.contains(&name);
    if simple {
        name.to_string()
    } else {
        format!("\\{name} ")
    }
}

/// Writes `net` as one structural Verilog module.
pub fn write_verilog(net: &Network) -> String {
    let namer = Namer::new(net);
    let mut out = String::with_capacity(64 + net.num_nodes() * 40);
    let module = if net.name().is_empty() {
        "top"
    } else {
        net.name()
    };
    let needs_clock = net.storage().values().any(|s| match &s.clock {
        Some(c) => !net.inputs().contains_key(c),
        None => true,
    });
    let clock_port = namer.internal("clock");
    let mut ports: Vec<String> = net.inputs().keys().map(|n| identifier(n)).collect();
    if needs_clock {
        ports.push(identifier(&clock_port));
    }
    for name in net.outputs().keys() {
        if !net.inputs().contains_key(name) {
            ports.push(identifier(name));
        }
    }
    let _ = write!(out, "module {}(", identifier(module));
    for (k, p) in ports.iter().enumerate() {
        if k > 0 {
            out.push_str(if k % 8 == 0 { ",\n    " } else { ", " });
        }
        out.push_str(p);
    }
    out.push_str(");\n");
    for n in net.inputs().keys() {
        let _ = writeln!(out, "  input {};", identifier(n));
    }
    if needs_clock {
        let _ = writeln!(out, "  input {};", identifier(&clock_port));
    }
    for n in net.outputs().keys() {
        if !net.inputs().contains_key(n) {
            let _ = writeln!(out, "  output {};", identifier(n));
        }
    }
    for n in net.storage().keys() {
        let _ = writeln!(out, "  reg {};", identifier(n));
    }
    let reach = net.reachable();
    for id in net.node_ids() {
        if reach[id.index()] && net.is_gate(id) {
            let _ = writeln!(out, "  wire {};", identifier(&namer.node(id)));
        }
    }
    let term = |l: Lit| -> String {
        if l.is_const() {
            return if l == Lit::TRUE {
                "1'b1".into()
            } else {
                "1'b0".into()
            };
        }
        let n = identifier(&namer.node(l.node()));
        if l.is_complemented() {
            format!("~{n}")
        } else {
            n
        }
    };
    for id in net.node_ids() {
        if !reach[id.index()] || !net.is_gate(id) {
            continue;
        }
        let f = net.fanins(id);
        let rhs = match net.kind(id) {
            NodeKind::And => format!("{} & {}", term(f[0]), term(f[1])),
            NodeKind::Xor => format!("{} ^ {}", term(f[0]), term(f[1])),
            NodeKind::Maj => {
                let (a, b, c) = (term(f[0]), term(f[1]), term(f[2]));
                format!("({a} & {b}) | ({a} & {c}) | ({b} & {c})")
            }
            NodeKind::Const | NodeKind::Input => continue,
        };
        let _ = writeln!(out, "  assign {} = {rhs};", identifier(&namer.node(id)));
    }
    for (name, s) in net.storage() {
        let clock = match &s.clock {
            Some(c) if net.inputs().contains_key(c) => c.as_str(),
            _ => clock_port.as_str(),
        };
        let edge = if s.kind.as_deref() == Some("fe") {
            "negedge"
        } else {
            "posedge"
        };
        let _ = writeln!(
            out,
            "  always @({edge} {}) {} <= {};",
            identifier(clock),
            identifier(name),
            term(s.next)
        );
    }
    for (name, s) in net.storage() {
        let value = match s.init {
            crate::network::InitValue::Zero => "1'b0",
            crate::network::InitValue::One => "1'b1",
            _ => continue,
        };
        let _ = writeln!(out, "  initial {} = {value};", identifier(name));
    }
    for (name, &lit) in net.outputs() {
        if namer.is_plain(lit) && namer.node(lit.node()) == *name {
            continue;
        }
        let _ = writeln!(out, "  assign {} = {};", identifier(name), term(lit));
    }
    out.push_str("endmodule\n");
    out
}
