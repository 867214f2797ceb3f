//! AIGER writer, ASCII (`aag`) or binary (`aig`), following the format
//! description by Armin Biere (2007; the reader's module documentation
//! summarises it).
//!
//! AIGER has only AND gates and inverters, so XOR and majority nodes are
//! decomposed: `a ^ b = !(!(a & !b) & !(!a & b))` (three gates) and
//! `maj(a, b, c) = !(!(a & b) & !(c & !(!a & !b)))` (four gates). Variables
//! are numbered inputs first, then latches, then gates in the network's
//! topological order, which is the order the binary encoding requires.
//! Latches keep their initial value (0, 1, or their own literal for an
//! unknown or don't-care start); their clock pin is dropped, as AIGER
//! latches share one implicit clock. Every port and latch is named in the
//! symbol table, and an optional comment goes into the comment section.
//! Only logic some output or latch depends on is written.

use crate::network::{InitValue, Lit, Network, NodeKind};
use std::fmt::Write as _;

/// Writes `net` as AIGER: binary when `binary`, else ASCII. `comment`, when
/// given, is written after the `c` line that opens the comment section.
pub fn write_aiger(net: &Network, binary: bool, comment: Option<&str>) -> Vec<u8> {
    let mut b = Builder {
        map: vec![u32::MAX; net.num_nodes()],
        gates: Vec::new(),
        next_var: 0,
    };
    b.map[0] = 0;
    let inputs: Vec<_> = net.inputs().values().copied().collect();
    for &id in &inputs {
        b.next_var += 1;
        b.map[id.index()] = 2 * b.next_var;
    }
    for s in net.storage().values() {
        b.next_var += 1;
        b.map[s.output.index()] = 2 * b.next_var;
    }
    let reach = net.reachable();
    for id in net.node_ids() {
        if !reach[id.index()] || !net.is_gate(id) {
            continue;
        }
        let f = net.fanins(id);
        let lit = |l: &Lit| b.map[l.node().index()] ^ l.is_complemented() as u32;
        let out = match net.kind(id) {
            NodeKind::And => {
                let (x, y) = (lit(&f[0]), lit(&f[1]));
                b.and(x, y)
            }
            NodeKind::Xor => {
                let (x, y) = (lit(&f[0]), lit(&f[1]));
                let p = b.and(x, y ^ 1);
                let q = b.and(x ^ 1, y);
                b.and(p ^ 1, q ^ 1) ^ 1
            }
            NodeKind::Maj => {
                let (x, y, z) = (lit(&f[0]), lit(&f[1]), lit(&f[2]));
                let both = b.and(x, y);
                let neither = b.and(x ^ 1, y ^ 1);
                let carry = b.and(z, neither ^ 1);
                b.and(both ^ 1, carry ^ 1) ^ 1
            }
            NodeKind::Const | NodeKind::Input => continue,
        };
        b.map[id.index()] = out;
    }
    let lit_of = |l: Lit| b.map[l.node().index()] ^ l.is_complemented() as u32;
    let mut head = String::new();
    let _ = writeln!(
        head,
        "{} {} {} {} {} {}",
        if binary { "aig" } else { "aag" },
        b.next_var,
        inputs.len(),
        net.storage().len(),
        net.outputs().len(),
        b.gates.len()
    );
    if !binary {
        for k in 0..inputs.len() {
            let _ = writeln!(head, "{}", 2 * (k + 1));
        }
    }
    for (k, s) in net.storage().values().enumerate() {
        let own = 2 * (inputs.len() + k + 1);
        if !binary {
            let _ = write!(head, "{own} ");
        }
        let next = lit_of(s.next);
        match s.init {
            InitValue::Zero => {
                let _ = writeln!(head, "{next}");
            }
            InitValue::One => {
                let _ = writeln!(head, "{next} 1");
            }
            InitValue::DontCare | InitValue::Unknown => {
                let _ = writeln!(head, "{next} {own}");
            }
        }
    }
    for &l in net.outputs().values() {
        let _ = writeln!(head, "{}", lit_of(l));
    }
    let mut out = head.into_bytes();
    let first_gate = 2 * (inputs.len() + net.storage().len() + 1) as u32;
    for (k, &(x, y)) in b.gates.iter().enumerate() {
        let lhs = first_gate + 2 * k as u32;
        let (hi, lo) = if x >= y { (x, y) } else { (y, x) };
        if binary {
            push_varint(&mut out, lhs - hi);
            push_varint(&mut out, hi - lo);
        } else {
            let _ = writeln!(Text(&mut out), "{lhs} {hi} {lo}");
        }
    }
    let mut tail = String::new();
    for (k, name) in net.inputs().keys().enumerate() {
        let _ = writeln!(tail, "i{k} {}", symbol(name));
    }
    for (k, name) in net.storage().keys().enumerate() {
        let _ = writeln!(tail, "l{k} {}", symbol(name));
    }
    for (k, name) in net.outputs().keys().enumerate() {
        let _ = writeln!(tail, "o{k} {}", symbol(name));
    }
    if let Some(c) = comment {
        tail.push_str("c\n");
        tail.push_str(c);
        if !c.ends_with('\n') {
            tail.push('\n');
        }
    }
    out.extend_from_slice(tail.as_bytes());
    out
}

/// A name as a symbol: one line, so line breaks become spaces.
fn symbol(name: &str) -> String {
    name.replace(['\n', '\r'], " ")
}

/// Gates in the order they are made, each variable one more than the last.
struct Builder {
    /// AIGER literal of each network node (`u32::MAX`: not written).
    map: Vec<u32>,
    gates: Vec<(u32, u32)>,
    next_var: u32,
}

impl Builder {
    /// A new AND gate of two literals, folding constants and trivial
    /// cases so the file has no gates with constant or equal fanins.
    fn and(&mut self, x: u32, y: u32) -> u32 {
        if x == 0 || y == 0 || x == y ^ 1 {
            return 0;
        }
        if x == 1 || x == y {
            return y;
        }
        if y == 1 {
            return x;
        }
        self.next_var += 1;
        self.gates.push((x, y));
        2 * self.next_var
    }
}

/// Appends `v` as 7-bit groups, least significant first, high bit set on
/// every group but the last.
fn push_varint(out: &mut Vec<u8>, mut v: u32) {
    while v >= 0x80 {
        out.push((v & 0x7f) as u8 | 0x80);
        v >>= 7;
    }
    out.push(v as u8);
}

/// `fmt::Write` into a byte vector.
struct Text<'v>(&'v mut Vec<u8>);

impl std::fmt::Write for Text<'_> {
    fn write_str(&mut self, s: &str) -> std::fmt::Result {
        self.0.extend_from_slice(s.as_bytes());
        Ok(())
    }
}
