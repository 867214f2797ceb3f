//! BLIF writer.
//!
//! Each logic node becomes one `.names` cover (AND: one cube; XOR: two
//! cubes; MAJ: three cubes), with complemented fanins folded into the cube
//! literals, so no inverters are needed inside the logic. Outputs and
//! storage inputs that are complemented or constant get a small cover of
//! their own. Storage elements become `.latch` lines with their type,
//! clock and initial value. Only logic some output or storage element
//! depends on is written; the output is deterministic.

use super::names::Namer;
use crate::network::{InitValue, Lit, Network, NodeKind};
use std::fmt::Write;

/// Writes `net` as a single-model BLIF file.
pub fn write_blif(net: &Network) -> String {
    let namer = Namer::new(net);
    let mut out = String::with_capacity(64 + net.num_nodes() * 40);
    let _ = writeln!(
        out,
        ".model {}",
        if net.name().is_empty() {
            "top"
        } else {
            net.name()
        }
    );
    name_list(&mut out, ".inputs", net.inputs().keys().map(String::as_str));
    name_list(
        &mut out,
        ".outputs",
        net.outputs().keys().map(String::as_str),
    );
    let mut extra = String::new();
    for (name, s) in net.storage() {
        let d = lit_net(&namer, s.next, &format!("{}_d", s.output.0), &mut extra);
        let init = match s.init {
            InitValue::Zero => 0,
            InitValue::One => 1,
            InitValue::DontCare => 2,
            InitValue::Unknown => 3,
        };
        match &s.clock {
            Some(clock) => {
                let kind = match s.kind.as_deref() {
                    Some(k @ ("fe" | "re" | "ah" | "al" | "as")) => k,
                    _ => "re",
                };
                let _ = writeln!(out, ".latch {d} {name} {kind} {clock} {init}");
            }
            None => {
                let _ = writeln!(out, ".latch {d} {name} {init}");
            }
        }
    }
    let reach = net.reachable();
    for id in net.node_ids() {
        if !reach[id.index()] || !net.is_gate(id) {
            continue;
        }
        let f = net.fanins(id);
        let names: Vec<String> = f.iter().map(|l| namer.node(l.node())).collect();
        let _ = writeln!(out, ".names {} {}", names.join(" "), namer.node(id));
        let pol = |l: &Lit, value: bool| {
            if value ^ l.is_complemented() {
                '1'
            } else {
                '0'
            }
        };
        match net.kind(id) {
            NodeKind::And => {
                let _ = writeln!(out, "{}{} 1", pol(&f[0], true), pol(&f[1], true));
            }
            NodeKind::Xor => {
                for (x, y) in [(false, true), (true, false)] {
                    let _ = writeln!(out, "{}{} 1", pol(&f[0], x), pol(&f[1], y));
                }
            }
            NodeKind::Maj => {
                let (a, b, c) = (pol(&f[0], true), pol(&f[1], true), pol(&f[2], true));
                let _ = writeln!(out, "{a}{b}- 1\n{a}-{c} 1\n-{b}{c} 1");
            }
            NodeKind::Const | NodeKind::Input => {}
        }
    }
    out.push_str(&extra);
    for (name, &lit) in net.outputs() {
        if namer.is_plain(lit) && namer.node(lit.node()) == *name {
            continue;
        }
        write_copy(&mut out, &namer, lit, name);
    }
    out.push_str(".end\n");
    out
}

/// Writes `.names` copying `lit` (possibly complemented or constant) to
/// the net `target`.
fn write_copy(out: &mut String, namer: &Namer, lit: Lit, target: &str) {
    if lit.is_const() {
        let _ = writeln!(out, ".names {target}");
        if lit == Lit::TRUE {
            out.push_str("1\n");
        }
    } else {
        let src = namer.node(lit.node());
        let _ = writeln!(
            out,
            ".names {src} {target}\n{} 1",
            if lit.is_complemented() { '0' } else { '1' }
        );
    }
}

/// The net carrying `lit`: the node's own name when plain, else a new
/// internal net (written into `extra`) named after `stem`.
fn lit_net(namer: &Namer, lit: Lit, stem: &str, extra: &mut String) -> String {
    if namer.is_plain(lit) {
        return namer.node(lit.node());
    }
    let name = namer.internal(stem);
    write_copy(extra, namer, lit, &name);
    name
}

fn name_list<'a>(out: &mut String, cmd: &str, names: impl Iterator<Item = &'a str>) {
    out.push_str(cmd);
    let mut on_line = 0;
    for n in names {
        if on_line == 16 {
            out.push_str(" \\\n ");
            on_line = 0;
        }
        out.push(' ');
        out.push_str(n);
        on_line += 1;
    }
    out.push('\n');
}
