//! BENCH reader: `INPUT(x)`, `OUTPUT(y)`, `y = GATE(a, b, ...)` with the
//! gates AND, NAND, OR, NOR, XOR, XNOR, NOT, BUF, BUFF and DFF (a storage
//! element whose output is `y`), and `#` comments. Gate names are
//! case-insensitive.

use super::flat::{Flat, GateOp, Sig, StorageDecl};
use crate::diag::SourceError;
use crate::network::{InitValue, Network};

/// Reads BENCH `text` (named `file` in errors); the design is named `name`.
pub fn read(text: &str, file: &str, name: &str) -> Result<Network, SourceError> {
    let mut flat = Flat::new(file);
    flat.set_name(name);
    let mut outputs: Vec<(String, (u32, u32))> = Vec::new();
    for (i, raw) in text.lines().enumerate() {
        let line = (i + 1) as u32;
        let body = raw.split('#').next().unwrap_or("");
        if body.trim().is_empty() {
            continue;
        }
        let indent = (body.len() - body.trim_start().len()) as u32 + 1;
        let col_of = |s: &str| (s.as_ptr() as usize - raw.as_ptr() as usize) as u32 + 1;
        let stmt = body.trim();
        let (lhs, rhs) = match stmt.split_once('=') {
            Some((l, r)) => (Some(l.trim()), r.trim()),
            None => (None, stmt),
        };
        let Some(open) = rhs.find('(') else {
            return Err(flat.error(
                (line, indent),
                format!("unexpected '{stmt}' (expected INPUT(x), OUTPUT(y) or y = GATE(a, ...))"),
            ));
        };
        if !rhs.ends_with(')') {
            return Err(flat.error(
                (line, col_of(rhs) + rhs.len() as u32),
                "missing ')' (expected the argument list to close at the end of the line)",
            ));
        }
        let op = rhs[..open].trim();
        let args: Vec<&str> = rhs[open + 1..rhs.len() - 1]
            .split(',')
            .map(str::trim)
            .collect();
        let args: Vec<&str> = if args.len() == 1 && args[0].is_empty() {
            Vec::new()
        } else {
            args
        };
        if let Some(bad) = args
            .iter()
            // A backslash would end a BLIF line early when written back.
            .find(|a| {
                a.is_empty()
                    || a.contains(|c: char| {
                        c.is_whitespace() || c.is_control() || "()=\\".contains(c)
                    })
            })
        {
            return Err(flat.error(
                (line, col_of(rhs) + open as u32 + 1),
                format!("malformed argument '{bad}' (expected net names separated by commas)"),
            ));
        }
        let loc = (line, indent);
        match (lhs, op.to_ascii_uppercase().as_str()) {
            (None, "INPUT") | (None, "OUTPUT") if args.len() == 1 => {
                if op.eq_ignore_ascii_case("INPUT") {
                    let n = flat.net(args[0]);
                    flat.add_input(n, loc)?;
                } else {
                    outputs.push((args[0].to_string(), loc));
                }
            }
            (None, _) => {
                return Err(flat.error(
                    loc,
                    format!(
                        "unexpected '{stmt}' (expected INPUT(x), OUTPUT(y) or y = GATE(a, ...))"
                    ),
                ));
            }
            (Some(out), gate) => {
                if out.is_empty()
                    || out.contains(|c: char| c.is_whitespace() || c.is_control() || c == '\\')
                {
                    return Err(flat.error(
                        loc,
                        format!("malformed gate output '{out}' (expected one net name)"),
                    ));
                }
                let fanins: Vec<Sig> = args.iter().map(|a| Sig::net(flat.net(a))).collect();
                let out_net = flat.net(out);
                let (op, invert, arity) = match gate {
                    "AND" => (GateOp::And, false, 1..=usize::MAX),
                    "NAND" => (GateOp::And, true, 1..=usize::MAX),
                    "OR" => (GateOp::Or, false, 1..=usize::MAX),
                    "NOR" => (GateOp::Or, true, 1..=usize::MAX),
                    "XOR" => (GateOp::Xor, false, 1..=usize::MAX),
                    "XNOR" => (GateOp::Xor, true, 1..=usize::MAX),
                    "NOT" => (GateOp::Buf, true, 1..=1),
                    "BUF" | "BUFF" => (GateOp::Buf, false, 1..=1),
                    "DFF" => {
                        if fanins.len() != 1 {
                            return Err(flat.error(loc, format!("DFF with {} inputs (expected one)", fanins.len())));
                        }
                        flat.add_storage(StorageDecl {
                            name: out.to_string(),
                            d: fanins[0],
                            q: out_net,
                            clock: None,
                            init: InitValue::Unknown,
                            kind: Some("DFF".to_string()),
                            loc,
                        })?;
                        continue;
                    }
                    _ => {
                        return Err(flat.error(
                            (line, col_of(op)),
                            format!("unknown gate '{op}' (expected AND, NAND, OR, NOR, XOR, XNOR, NOT, BUF, BUFF or DFF)"),
                        ))
                    }
                };
                if !arity.contains(&fanins.len()) {
                    return Err(flat.error(
                        loc,
                        format!(
                            "{gate} with {} inputs (expected {})",
                            fanins.len(),
                            if *arity.end() == 1 {
                                "one"
                            } else {
                                "at least one"
                            }
                        ),
                    ));
                }
                flat.add_gate(out_net, op, invert, &fanins, loc)?;
            }
        }
    }
    for (name, loc) in outputs {
        let n = flat.net(&name);
        flat.add_output(&name, Sig::net(n), loc);
    }
    flat.require_outputs(super::flat::end_loc(text), "at least one OUTPUT(...) line")?;
    flat.build()
}
