//! AIGER reader: And-Inverter Graphs in the ASCII (`aag`) and binary
//! (`aig`) encodings of the format description by Armin Biere ("The AIGER
//! And-Inverter Graph (AIG) Format", 2007), with the latch initial values
//! of its later revision.
//!
//! A literal is `2 * variable + complemented`; literal 0 is constant false
//! and 1 constant true. The header `aag M I L O A` (or `aig ...`) gives the
//! largest variable and the numbers of inputs, latches, outputs and AND
//! gates. The ASCII encoding lists input literals, latch lines
//! (`current next [init]`), output literals and AND lines (`lhs rhs0 rhs1`),
//! in any order as long as there is no cycle. The binary encoding numbers
//! inputs, latches and gates consecutively, leaves the input and latch
//! current literals out, and stores each gate as two differences
//! `lhs - rhs0` and `rhs0 - rhs1`, each a little-endian sequence of 7-bit
//! groups whose high bit says another group follows. An optional symbol
//! table (`i0 name`, `l0 name`, `o0 name`) names ports, and a line `c`
//! starts a free comment that runs to the end of the file.
//!
//! Latches become storage elements with the file's initial value (0 when
//! none is given, 1, or unknown when the latch's own literal is given) and
//! no clock pin: AIGER latches share one implicit clock. Unnamed ports are
//! called `i<k>`, `l<k>` and `o<k>`. Bad-state, constraint, justice and
//! fairness sections (the header's optional fields B C J F) are refused.
//!
//! Reading works on bytes, not text, and checks every count against the
//! file's length and the net limit before allocating, so a forged header
//! cannot make it allocate much.

use super::flat::Loc;
use super::ReadOptions;
use crate::diag::SourceError;
use crate::network::{InitValue, Lit, Network};

/// What is known of a variable while reading.
const UNDEFINED: u8 = 0;
/// Constant, input or latch: its literal is known.
const SOURCE: u8 = 1;
/// An AND gate not built yet.
const GATE: u8 = 2;
/// An AND gate on the search stack.
const ACTIVE: u8 = 3;
/// An AND gate built.
const BUILT: u8 = 4;

/// The header line.
struct Header {
    binary: bool,
    max_var: usize,
    inputs: usize,
    latches: usize,
    outputs: usize,
    ands: usize,
}

/// Port names from the symbol table, with where each was given.
struct Symbols {
    inputs: Vec<Option<(String, Loc)>>,
    latches: Vec<Option<(String, Loc)>>,
    outputs: Vec<Option<(String, Loc)>>,
}

/// Reads AIGER `bytes` (either encoding; the header says which), named
/// `file` in errors; the design is named `name`.
pub fn read(
    bytes: &[u8],
    file: &str,
    name: &str,
    opts: &ReadOptions,
) -> Result<Network, SourceError> {
    let mut r = Cursor {
        bytes,
        pos: 0,
        line: 1,
        line_start: 0,
        file,
    };
    let h = r.header(opts.max_nets())?;
    if h.outputs == 0 {
        return Err(r.error(
            (1, 1),
            "the design has no outputs (expected O > 0 in the header)",
        ));
    }
    let vars = h.max_var + 1;
    let mut kind = vec![UNDEFINED; vars];
    kind[0] = SOURCE;
    let mut input_vars = Vec::with_capacity(h.inputs);
    let mut input_locs = Vec::with_capacity(h.inputs);
    for k in 0..h.inputs {
        if h.binary {
            input_vars.push(k + 1);
            input_locs.push((1, 1));
            kind[k + 1] = SOURCE;
        } else {
            let loc = r.here();
            let mut n = [0u64; 3];
            r.numbers(&mut n, 1, 1, "an input literal")?;
            let var = r.define(n[0], loc, &h, &mut kind, SOURCE, "input")?;
            input_vars.push(var);
            input_locs.push(loc);
        }
    }
    // Latches: variable, next-state literal, initial value, position.
    let mut latches: Vec<(usize, u64, InitValue, Loc)> = Vec::with_capacity(h.latches);
    for k in 0..h.latches {
        let loc = r.here();
        let mut n = [0u64; 3];
        let (var, next, init) = if h.binary {
            let var = h.inputs + k + 1;
            kind[var] = SOURCE;
            let count = r.numbers(&mut n, 1, 2, "a latch line 'NEXT [INIT]'")?;
            (var, n[0], (count == 2).then_some(n[1]))
        } else {
            let count = r.numbers(&mut n, 2, 3, "a latch line 'LATCH NEXT [INIT]'")?;
            let var = r.define(n[0], loc, &h, &mut kind, SOURCE, "latch")?;
            (var, n[1], (count == 3).then_some(n[2]))
        };
        r.check_literal(next, &h, loc)?;
        let init = match init {
            None | Some(0) => InitValue::Zero,
            Some(1) => InitValue::One,
            Some(v) if v == 2 * var as u64 => InitValue::Unknown,
            Some(v) => {
                return Err(r.error(
                    loc,
                    format!(
                        "latch initial value {v} (expected 0, 1, or the latch's own literal {} for unknown)",
                        2 * var
                    ),
                ))
            }
        };
        latches.push((var, next, init, loc));
    }
    let mut outputs: Vec<(u64, Loc)> = Vec::with_capacity(h.outputs);
    for _ in 0..h.outputs {
        let loc = r.here();
        let mut n = [0u64; 3];
        r.numbers(&mut n, 1, 1, "an output literal")?;
        r.check_literal(n[0], &h, loc)?;
        outputs.push((n[0], loc));
    }
    // AND gates as (rhs0, rhs1) by gate; for ASCII also the variable and
    // the line of each gate.
    let mut gates: Vec<(u32, u32)> = Vec::with_capacity(h.ands);
    let mut gate_var: Vec<u32> = Vec::new();
    let mut gate_line: Vec<u32> = Vec::new();
    if h.binary {
        let first = h.inputs + h.latches + 1;
        for k in 0..h.ands {
            let lhs = 2 * (first + k) as u64;
            let at = r.pos;
            let d0 = r.varint()?;
            let d1 = r.varint()?;
            let rhs0 = lhs.checked_sub(d0).filter(|_| d0 > 0);
            let rhs1 = rhs0.and_then(|r0| r0.checked_sub(d1));
            let (Some(rhs0), Some(rhs1)) = (rhs0, rhs1) else {
                return Err(r.error(
                    r.loc_of(at),
                    format!("binary AND gate {lhs} has differences {d0} and {d1} (expected fanins below the gate's own literal: lhs > rhs0 >= rhs1)"),
                ));
            };
            gates.push((rhs0 as u32, rhs1 as u32));
            kind[first + k] = GATE;
        }
    } else {
        gate_var.reserve(h.ands);
        gate_line.reserve(h.ands);
        for _ in 0..h.ands {
            let loc = r.here();
            let mut n = [0u64; 3];
            r.numbers(&mut n, 3, 3, "an AND line 'LHS RHS0 RHS1'")?;
            let var = r.define(n[0], loc, &h, &mut kind, GATE, "AND gate")?;
            r.check_literal(n[1], &h, loc)?;
            r.check_literal(n[2], &h, loc)?;
            gates.push((n[1] as u32, n[2] as u32));
            gate_var.push(var as u32);
            gate_line.push(loc.0);
        }
    }
    let symbols = r.symbols(&h)?;

    let mut net = Network::new(name);
    net.reserve(h.inputs + h.latches + h.ands);
    let mut lits = vec![Lit::FALSE; vars];
    for (k, &var) in input_vars.iter().enumerate() {
        let (name, loc) = match &symbols.inputs[k] {
            Some((n, l)) => (n.clone(), *l),
            None => (format!("i{k}"), input_locs[k]),
        };
        lits[var] = net
            .add_input(name)
            .map_err(|e| r.error(loc, e.to_string()))?;
    }
    let mut latch_names = Vec::with_capacity(latches.len());
    for (k, &(var, _, init, loc)) in latches.iter().enumerate() {
        let (name, loc) = match &symbols.latches[k] {
            Some((n, l)) => (n.clone(), *l),
            None => (format!("l{k}"), loc),
        };
        lits[var] = net
            .add_storage(name.clone(), None, init, None)
            .map_err(|e| r.error(loc, e.to_string()))?;
        latch_names.push(name);
    }
    if h.binary {
        // Fanins always come before the gate: build in file order.
        let first = h.inputs + h.latches + 1;
        for (k, &(a, b)) in gates.iter().enumerate() {
            let fa = lits[(a >> 1) as usize].xor(a & 1 == 1);
            let fb = lits[(b >> 1) as usize].xor(b & 1 == 1);
            lits[first + k] = net.and(fa, fb);
        }
    } else {
        build_ascii(
            &r, &gates, &gate_var, &gate_line, &mut kind, &mut lits, &mut net,
        )?;
    }
    let lit_of = |l: u64| lits[(l >> 1) as usize].xor(l & 1 == 1);
    for (k, &(lit, loc)) in outputs.iter().enumerate() {
        let (name, loc) = match &symbols.outputs[k] {
            Some((n, l)) => (n.clone(), *l),
            None => (format!("o{k}"), loc),
        };
        r.check_defined(lit, &kind, loc)?;
        // A port name is one net: an output may share an input's or a
        // latch's name only when it is that very signal.
        let same_net = net
            .inputs()
            .get(&name)
            .or_else(|| net.storage().get(&name).map(|s| &s.output))
            .map(|&id| id.lit() == lit_of(lit));
        if same_net == Some(false) {
            return Err(r.error(
                loc,
                format!("output '{name}' has the name of an input or latch but another value (expected a name of its own)"),
            ));
        }
        net.add_output(name, lit_of(lit))
            .map_err(|e| r.error(loc, e.to_string()))?;
    }
    for (k, &(_, next, _, loc)) in latches.iter().enumerate() {
        r.check_defined(next, &kind, loc)?;
        net.set_storage_next(&latch_names[k], lit_of(next))
            .map_err(|e| r.error(loc, e.to_string()))?;
    }
    Ok(net)
}

/// Builds the AND gates of an ASCII file, whose lines may come in any
/// order: a depth-first search from each gate in file order, without
/// recursion. Files in topological order never push more than one entry.
fn build_ascii(
    r: &Cursor,
    gates: &[(u32, u32)],
    gate_var: &[u32],
    gate_line: &[u32],
    kind: &mut [u8],
    lits: &mut [Lit],
    net: &mut Network,
) -> Result<(), SourceError> {
    // Gate index of each gate variable, made only when some gate comes
    // before one of its fanins.
    let mut gate_of: Vec<u32> = Vec::new();
    let mut stack: Vec<u32> = Vec::new();
    for g in 0..gates.len() {
        if kind[gate_var[g] as usize] == BUILT {
            continue;
        }
        kind[gate_var[g] as usize] = ACTIVE;
        stack.push(g as u32);
        while let Some(&top) = stack.last() {
            let t = top as usize;
            let (a, b) = gates[t];
            let mut child = None;
            for lit in [a, b] {
                let v = (lit >> 1) as usize;
                match kind[v] {
                    SOURCE | BUILT => {}
                    UNDEFINED => {
                        return Err(r.error(
                            (gate_line[t], 1),
                            format!("literal {lit} is used but no input, latch or AND gate defines it"),
                        ))
                    }
                    ACTIVE => {
                        return Err(r.error(
                            (gate_line[t], 1),
                            format!("AND gate {} is on a cycle through literal {lit} (expected gates without combinational loops)", 2 * gate_var[t]),
                        ))
                    }
                    _ => {
                        if gate_of.is_empty() {
                            gate_of = vec![u32::MAX; kind.len()];
                            for (k, &v) in gate_var.iter().enumerate() {
                                gate_of[v as usize] = k as u32;
                            }
                        }
                        child = Some((v, gate_of[v]));
                        break;
                    }
                }
            }
            if let Some((v, c)) = child {
                kind[v] = ACTIVE;
                stack.push(c);
                continue;
            }
            let fa = lits[(a >> 1) as usize].xor(a & 1 == 1);
            let fb = lits[(b >> 1) as usize].xor(b & 1 == 1);
            let v = gate_var[t] as usize;
            lits[v] = net.and(fa, fb);
            kind[v] = BUILT;
            stack.pop();
        }
    }
    Ok(())
}

/// A position in the file, tracking lines in the text parts.
struct Cursor<'b> {
    bytes: &'b [u8],
    pos: usize,
    line: u32,
    line_start: usize,
    file: &'b str,
}

impl Cursor<'_> {
    fn error(&self, loc: Loc, message: impl Into<String>) -> SourceError {
        SourceError::new(self.file, loc.0, loc.1, message)
    }

    /// The current position as line and column.
    fn here(&self) -> Loc {
        (self.line, (self.pos - self.line_start) as u32 + 1)
    }

    /// The line and column of byte `at` (counted afresh; for errors in the
    /// binary part, whose bytes may contain newlines).
    fn loc_of(&self, at: usize) -> Loc {
        let before = &self.bytes[..at.min(self.bytes.len())];
        let line = before.iter().filter(|&&b| b == b'\n').count() as u32 + 1;
        let start = before
            .iter()
            .rposition(|&b| b == b'\n')
            .map_or(0, |p| p + 1);
        (line, (at - start) as u32 + 1)
    }

    fn bytes_left(&self) -> usize {
        self.bytes.len() - self.pos
    }

    /// Consumes the end of a line (`\n` or `\r\n`).
    fn end_line(&mut self, what: &str) -> Result<(), SourceError> {
        if self.bytes.get(self.pos) == Some(&b'\r') {
            self.pos += 1;
        }
        match self.bytes.get(self.pos) {
            Some(b'\n') => {
                self.pos += 1;
                self.line += 1;
                self.line_start = self.pos;
                Ok(())
            }
            None => Err(self.error(
                self.here(),
                format!("the file ends in the middle of {what} (expected a newline)"),
            )),
            Some(&c) => Err(self.error(
                self.here(),
                format!("unexpected {} (expected the end of {what})", describe(c)),
            )),
        }
    }

    /// Reads one decimal number.
    fn number(&mut self, what: &str) -> Result<u64, SourceError> {
        let start = self.pos;
        let mut v: u64 = 0;
        while let Some(&c) = self.bytes.get(self.pos) {
            if !c.is_ascii_digit() {
                break;
            }
            v = v
                .checked_mul(10)
                .and_then(|v| v.checked_add((c - b'0') as u64))
                .filter(|&v| v <= u32::MAX as u64)
                .ok_or_else(|| {
                    self.error(
                        (self.line, (start - self.line_start) as u32 + 1),
                        format!("number too large in {what} (expected at most {})", u32::MAX),
                    )
                })?;
            self.pos += 1;
        }
        if self.pos == start {
            let found = match self.bytes.get(self.pos) {
                None => "the end of the file".to_string(),
                Some(&c) => describe(c),
            };
            return Err(self.error(self.here(), format!("unexpected {found} (expected {what})")));
        }
        Ok(v)
    }

    /// Reads a line of `min` to `max` (at most 3) numbers separated by one
    /// space each; returns how many.
    fn numbers(
        &mut self,
        out: &mut [u64; 3],
        min: usize,
        max: usize,
        what: &str,
    ) -> Result<usize, SourceError> {
        let mut count = 0;
        loop {
            out[count] = self.number(what)?;
            count += 1;
            if count < max && self.bytes.get(self.pos) == Some(&b' ') {
                self.pos += 1;
                continue;
            }
            break;
        }
        if count < min {
            return Err(self.error(
                self.here(),
                format!("{count} numbers where {what} needs {min}"),
            ));
        }
        self.end_line(what)?;
        Ok(count)
    }

    /// Reads one 7-bit group number of the binary encoding.
    fn varint(&mut self) -> Result<u64, SourceError> {
        let start = self.pos;
        let mut v: u64 = 0;
        let mut shift = 0;
        loop {
            let Some(&b) = self.bytes.get(self.pos) else {
                return Err(self.error(
                    self.loc_of(start),
                    "the file ends inside the binary AND gates (expected more gates, as the header announces)",
                ));
            };
            self.pos += 1;
            if shift > 28 {
                return Err(self.error(
                    self.loc_of(start),
                    "a binary difference longer than 5 bytes (expected a number below 2^32)",
                ));
            }
            v |= ((b & 0x7f) as u64) << shift;
            if b & 0x80 == 0 {
                return Ok(v);
            }
            shift += 7;
        }
    }

    fn header(&mut self, max_nets: u64) -> Result<Header, SourceError> {
        let binary = match self.bytes.get(..4) {
            Some(b"aag ") => false,
            Some(b"aig ") => true,
            _ => {
                return Err(self.error(
                    (1, 1),
                    "not an AIGER file (expected a header 'aag M I L O A' or 'aig M I L O A')",
                ))
            }
        };
        self.pos = 4;
        let mut fields = [0u64; 9];
        let mut count = 0;
        loop {
            if count == 9 {
                return Err(self.error(
                    self.here(),
                    "more than 9 numbers in the header (expected M I L O A)",
                ));
            }
            fields[count] = self.number("a header count (M I L O A)")?;
            count += 1;
            if self.bytes.get(self.pos) == Some(&b' ') {
                self.pos += 1;
                continue;
            }
            break;
        }
        if count < 5 {
            return Err(self.error(
                self.here(),
                format!("the header has {count} numbers (expected M I L O A)"),
            ));
        }
        if let Some(k) = fields[5..count].iter().position(|&v| v != 0) {
            return Err(self.error(
                (1, 1),
                format!(
                    "the header announces {} {} (expected none: bad-state, constraint, justice and fairness properties are not read)",
                    fields[5 + k],
                    ["bad-state properties", "invariant constraints", "justice properties", "fairness constraints"][k]
                ),
            ));
        }
        self.end_line("the header")?;
        let [m, i, l, o, a, ..] = fields;
        if m > max_nets {
            return Err(self.error(
                (1, 5),
                format!("the header announces {m} variables, more than the limit of {max_nets} (expected a smaller design; --max-nets N raises the limit)"),
            ));
        }
        if i + l + a > m {
            return Err(self.error(
                (1, 5),
                format!("the header's counts do not add up: {i} inputs + {l} latches + {a} AND gates exceed M = {m} (expected I + L + A <= M)"),
            ));
        }
        // Every line needs at least two bytes, every binary gate two.
        let lines = if binary { l + o } else { i + l + o + a };
        let least = 2 * lines + if binary { 2 * a } else { 0 };
        if least > self.bytes_left() as u64 {
            return Err(self.error(
                (1, 5),
                format!(
                    "the header announces {} entries, but only {} bytes follow (expected a complete file)",
                    i + l + o + a,
                    self.bytes_left()
                ),
            ));
        }
        Ok(Header {
            binary,
            max_var: m as usize,
            inputs: i as usize,
            latches: l as usize,
            outputs: o as usize,
            ands: a as usize,
        })
    }

    /// Checks that `lit` names a variable at most M.
    fn check_literal(&self, lit: u64, h: &Header, loc: Loc) -> Result<(), SourceError> {
        if (lit >> 1) as usize > h.max_var {
            return Err(self.error(
                loc,
                format!(
                    "literal {lit} is beyond the header's largest variable {} (expected at most {})",
                    h.max_var,
                    2 * h.max_var + 1
                ),
            ));
        }
        Ok(())
    }

    /// Checks that `lit`'s variable is defined (outputs and latch inputs).
    fn check_defined(&self, lit: u64, kind: &[u8], loc: Loc) -> Result<(), SourceError> {
        if kind[(lit >> 1) as usize] == UNDEFINED {
            return Err(self.error(
                loc,
                format!("literal {lit} is used but no input, latch or AND gate defines it"),
            ));
        }
        Ok(())
    }

    /// Defines the variable of the even literal `lit` as `as_kind`.
    fn define(
        &self,
        lit: u64,
        loc: Loc,
        h: &Header,
        kind: &mut [u8],
        as_kind: u8,
        what: &str,
    ) -> Result<usize, SourceError> {
        self.check_literal(lit, h, loc)?;
        if lit & 1 == 1 || lit < 2 {
            return Err(self.error(
                loc,
                format!("{what} literal {lit} (expected an even literal of 2 or more)"),
            ));
        }
        let var = (lit >> 1) as usize;
        if kind[var] != UNDEFINED {
            return Err(self.error(
                loc,
                format!("literal {lit} is defined twice (expected each variable defined once)"),
            ));
        }
        kind[var] = as_kind;
        Ok(var)
    }

    /// Reads the symbol table and skips the comment section.
    fn symbols(&mut self, h: &Header) -> Result<Symbols, SourceError> {
        let mut s = Symbols {
            inputs: vec![None; h.inputs],
            latches: vec![None; h.latches],
            outputs: vec![None; h.outputs],
        };
        if self.pos < self.bytes.len() && !h.binary {
            // ASCII positions are tracked; nothing to resynchronise.
        } else if self.pos < self.bytes.len() {
            // After binary gates the line count is unknown: recount once.
            let (line, _) = self.loc_of(self.pos);
            self.line = line;
            self.line_start = self.pos;
        }
        while self.pos < self.bytes.len() {
            let loc = self.here();
            let c = self.bytes[self.pos];
            if c == b'c' && matches!(self.bytes.get(self.pos + 1), None | Some(b'\n' | b'\r')) {
                break;
            }
            let table = match c {
                b'i' => &mut s.inputs,
                b'l' => &mut s.latches,
                b'o' => &mut s.outputs,
                _ => {
                    return Err(self.error(
                        loc,
                        format!("unexpected {} (expected a symbol 'i0 NAME', 'l0 NAME' or 'o0 NAME', or 'c' starting the comment)", describe(c)),
                    ))
                }
            };
            self.pos += 1;
            let index = self.number("a symbol index")? as usize;
            if self.bytes.get(self.pos) != Some(&b' ') {
                return Err(self.error(
                    self.here(),
                    "expected a space and a name after the symbol index",
                ));
            }
            self.pos += 1;
            let start = self.pos;
            let end = self.bytes[start..]
                .iter()
                .position(|&b| b == b'\n')
                .map_or(self.bytes.len(), |p| start + p);
            let raw = &self.bytes[start..end];
            let raw = raw.strip_suffix(b"\r").unwrap_or(raw);
            let name = std::str::from_utf8(raw)
                .map_err(|_| self.error(self.here(), "symbol name is not UTF-8 text"))?;
            if name.is_empty() {
                return Err(self.error(self.here(), "empty symbol name"));
            }
            // The other netlist formats cannot hold a port name with
            // whitespace or control characters, or BLIF's comment sign.
            if let Some(bad) = name
                .chars()
                .find(|c| c.is_whitespace() || c.is_control() || *c == '#')
                .or(name.ends_with('\\').then_some('\\'))
            {
                return Err(self.error(
                    loc,
                    format!(
                        "symbol name {name:?} contains {bad:?} (expected a name without spaces, control characters or '#', not ending in a backslash)"
                    ),
                ));
            }
            let count = table.len();
            let Some(slot) = table.get_mut(index) else {
                return Err(self.error(
                    loc,
                    format!("symbol index {index} is out of range (expected below {count})"),
                ));
            };
            if slot.is_some() {
                return Err(self.error(loc, format!("symbol {}{index} is named twice", c as char)));
            }
            *slot = Some((name.to_string(), loc));
            self.pos = end;
            if self.pos < self.bytes.len() {
                self.end_line("a symbol line")?;
            }
        }
        Ok(s)
    }
}

/// A byte as an error message shows it.
fn describe(c: u8) -> String {
    if c.is_ascii_graphic() {
        format!("'{}'", c as char)
    } else {
        format!("byte 0x{c:02x}")
    }
}
