//! BLIF reader.
//!
//! Reads the subset of BLIF real files use: `.model`, `.inputs`,
//! `.outputs`, `.names` with single-output covers, `.latch`, `.subckt`
//! (models of the same file, flattened), `.gate` (cells of a library),
//! `.end`, `#` comments and backslash continuation. Timing annotations that
//! do not change the logic (`.default_input_arrival`, `.input_arrival`,
//! `.output_required`, `.wire_load_slope`, `.clock` and similar, listed in
//! [`IGNORED_COMMANDS`]) are skipped; every other dot-command is an error
//! that names it.
//!
//! The file is read in two passes without storing its text twice: the first
//! pass finds each model's byte range and ports, the second elaborates the
//! top model, walking into `.subckt` models with a name prefix per instance
//! (`<model>$<k>/`) so that their internal nets stay apart.

use super::flat::{Flat, GateOp, Loc, Sig, StorageDecl};
use super::limits::{self, ModuleSize, Part};
use super::{CellLookup, ReadOptions};
use crate::diag::SourceError;
use crate::network::{InitValue, Network};
use rustc_hash::FxHashMap;
use std::borrow::Cow;

/// Dot-commands that annotate timing or loads and are skipped.
pub const IGNORED_COMMANDS: &[&str] = &[
    ".default_input_arrival",
    ".default_output_required",
    ".input_arrival",
    ".output_required",
    ".default_input_drive",
    ".input_drive",
    ".default_output_load",
    ".output_load",
    ".default_max_input_load",
    ".max_input_load",
    ".wire_load_slope",
    ".wire",
    ".area",
    ".delay",
    ".clock",
];

/// One logical line: continuation lines joined, comment removed.
struct Line<'a> {
    text: Cow<'a, str>,
    line: u32,
    offset: usize,
}

/// Iterates the logical lines of `text` starting at byte `offset`, which is
/// physical line `line`.
struct Lines<'a> {
    text: &'a str,
    pos: usize,
    line: u32,
}

impl<'a> Lines<'a> {
    fn new(text: &'a str, pos: usize, line: u32) -> Self {
        Lines { text, pos, line }
    }

    fn physical(&mut self) -> Option<(&'a str, u32, usize)> {
        if self.pos >= self.text.len() {
            return None;
        }
        let rest = &self.text[self.pos..];
        let (raw, advance) = match rest.find('\n') {
            Some(i) => (&rest[..i], i + 1),
            None => (rest, rest.len()),
        };
        let start = self.pos;
        self.pos += advance;
        self.line += 1;
        let raw = raw.strip_suffix('\r').unwrap_or(raw);
        let raw = match raw.find('#') {
            Some(i) => &raw[..i],
            None => raw,
        };
        Some((raw, self.line - 1, start))
    }
}

impl<'a> Iterator for Lines<'a> {
    type Item = Line<'a>;

    fn next(&mut self) -> Option<Line<'a>> {
        loop {
            let (raw, line, offset) = self.physical()?;
            let trimmed = raw.trim_end();
            if let Some(head) = trimmed.strip_suffix('\\') {
                let mut joined = head.to_string();
                while let Some((more, _, _)) = self.physical() {
                    let more = more.trim_end();
                    joined.push(' ');
                    match more.strip_suffix('\\') {
                        Some(h) => joined.push_str(h),
                        None => {
                            joined.push_str(more);
                            break;
                        }
                    }
                }
                if joined.trim().is_empty() {
                    continue;
                }
                return Some(Line {
                    text: Cow::Owned(joined),
                    line,
                    offset,
                });
            }
            if trimmed.trim_start().is_empty() {
                continue;
            }
            return Some(Line {
                text: Cow::Borrowed(trimmed),
                line,
                offset,
            });
        }
    }
}

/// Tokens of a line with their 1-based columns.
fn tokens(text: &str) -> Vec<(&str, u32)> {
    token_iter(text).collect()
}

/// The tokens of a line one by one, with their 1-based columns.
fn token_iter(text: &str) -> impl Iterator<Item = (&str, u32)> {
    let bytes = text.as_bytes();
    let mut i = 0;
    std::iter::from_fn(move || {
        while i < bytes.len() && bytes[i].is_ascii_whitespace() {
            i += 1;
        }
        let start = i;
        while i < bytes.len() && !bytes[i].is_ascii_whitespace() {
            i += 1;
        }
        (i > start).then(|| (&text[start..i], start as u32 + 1))
    })
}

/// A model found by the first pass.
struct Model {
    name: String,
    loc: Loc,
    /// Byte offset and line number of the first line after `.model`.
    body: (usize, u32),
    /// Ports with the position of each name on its `.inputs`/`.outputs` line.
    inputs: Vec<(String, Loc)>,
    outputs: Vec<(String, Loc)>,
    /// Logical lines of the body (the size estimate's own part).
    lines: u64,
    /// `.subckt` lines: model name and position.
    subckts: Vec<(String, Loc)>,
}

impl Model {
    fn new(name: String, loc: Loc, body: (usize, u32)) -> Model {
        Model {
            name,
            loc,
            body,
            inputs: Vec::new(),
            outputs: Vec::new(),
            lines: 0,
            subckts: Vec::new(),
        }
    }
}

/// Reads BLIF `text` (named `file` in errors).
pub fn read(text: &str, file: &str, opts: &ReadOptions) -> Result<Network, SourceError> {
    let models = index_models(text, file)?;
    let top = match &opts.top {
        Some(name) => models.iter().position(|m| &m.name == name).ok_or_else(|| {
            SourceError::new(
                file,
                models[0].loc.0,
                models[0].loc.1,
                format!(
                    "no model named '{name}' (expected one of: {})",
                    models
                        .iter()
                        .map(|m| m.name.as_str())
                        .collect::<Vec<_>>()
                        .join(", ")
                ),
            )
        })?,
        None => 0,
    };
    let by_name: FxHashMap<&str, usize> = models
        .iter()
        .enumerate()
        .map(|(i, m)| (m.name.as_str(), i))
        .collect();
    let mut flat = Flat::new(file);
    flat.set_max_nets(opts.max_nets());
    let sizes: Vec<ModuleSize> = models
        .iter()
        .map(|m| {
            let mut parts = vec![Part {
                own: m.lines + m.inputs.len() as u64 + m.outputs.len() as u64,
                loc: m.loc,
                child: None,
            }];
            parts.extend(m.subckts.iter().map(|(name, loc)| Part {
                own: 1,
                loc: *loc,
                child: by_name.get(name.as_str()).copied(),
            }));
            ModuleSize {
                name: &m.name,
                parts,
            }
        })
        .collect();
    limits::check_hierarchy(&flat, &sizes, top, opts.max_nets(), "model")?;
    // A BLIF file spends about 20 bytes per net (one '.names' line and its
    // rows); reserving that much saves rehashing the name table.
    flat.reserve_nets(text.len() / 20);
    let mut reader = Reader {
        text,
        models: &models,
        by_name,
        flat,
        cells: CellLookup::new(opts),
        active: Vec::new(),
        instances: 0,
    };
    reader.flat.set_name(&models[top].name);
    reader.elaborate(top, "", None)?;
    reader.flat.require_outputs(
        models[top].loc,
        "an '.outputs' line naming at least one output",
    )?;
    reader.flat.build()
}

fn index_models(text: &str, file: &str) -> Result<Vec<Model>, SourceError> {
    let mut models: Vec<Model> = Vec::new();
    let mut open = false;
    for line in Lines::new(text, 0, 1) {
        let mut words = token_iter(&line.text);
        let Some((cmd, col)) = words.next() else {
            continue;
        };
        // Only the lines that declare models and ports are split whole.
        let toks: Vec<(&str, u32)> = if matches!(cmd, ".model" | ".inputs" | ".outputs" | ".subckt")
        {
            std::iter::once((cmd, col)).chain(words).collect()
        } else {
            Vec::new()
        };
        match cmd {
            ".model" => {
                let name = match toks.get(1) {
                    Some(&(n, _)) => n.to_string(),
                    None => {
                        return Err(SourceError::new(
                            file,
                            line.line,
                            col + 6,
                            "'.model' without a name (expected '.model NAME')",
                        ))
                    }
                };
                if models.iter().any(|m| m.name == name) {
                    return Err(SourceError::new(
                        file,
                        line.line,
                        toks[1].1,
                        format!("model '{name}' is defined twice"),
                    ));
                }
                let after = line.offset
                    + text[line.offset..]
                        .find('\n')
                        .map_or(text.len() - line.offset, |i| i + 1);
                // Continuation lines inside '.model' are not supported for the
                // body start; the body starts after the physical line.
                models.push(Model::new(name, (line.line, col), (after, line.line + 1)));
                open = true;
            }
            ".end" => open = false,
            ".inputs" | ".outputs" => {
                if !open {
                    if models.is_empty() {
                        // A file without '.model': one unnamed model.
                        models.push(Model::new("top".to_string(), (line.line, col), (0, 1)));
                        open = true;
                    } else {
                        return Err(SourceError::new(
                            file,
                            line.line,
                            col,
                            format!("'{cmd}' outside a model (expected '.model NAME' first)"),
                        ));
                    }
                }
                let m = models.last_mut().expect("a model is open");
                let list = if cmd == ".inputs" {
                    &mut m.inputs
                } else {
                    &mut m.outputs
                };
                list.extend(
                    toks[1..]
                        .iter()
                        .map(|&(t, c)| (t.to_string(), (line.line, c))),
                );
            }
            _ => {
                if !open && models.is_empty() {
                    models.push(Model::new("top".to_string(), (line.line, col), (0, 1)));
                    open = true;
                }
                if let Some(m) = models.last_mut().filter(|_| open) {
                    m.lines += 1;
                    if cmd == ".subckt" {
                        if let Some(&(name, c)) = toks.get(1) {
                            m.subckts.push((name.to_string(), (line.line, c)));
                        }
                    }
                }
            }
        }
    }
    if models.is_empty() {
        let (line, col) = super::flat::end_loc(text);
        return Err(SourceError::new(
            file,
            line,
            col,
            "no model found (expected '.model NAME' with '.inputs', '.outputs' and logic)",
        ));
    }
    Ok(models)
}

struct Reader<'a, 'o> {
    text: &'a str,
    models: &'a [Model],
    by_name: FxHashMap<&'a str, usize>,
    flat: Flat,
    cells: CellLookup<'o>,
    active: Vec<usize>,
    instances: u32,
}

/// Pending `.names`: fanins, output net, rows collected so far.
struct Cover {
    fanins: Vec<Sig>,
    out: u32,
    loc: Loc,
    rows: Vec<u8>,
    n_rows: usize,
    onset: Option<bool>,
}

impl<'a, 'o> Reader<'a, 'o> {
    fn err(&self, line: u32, col: u32, msg: impl Into<String>) -> SourceError {
        self.flat.error((line, col), msg)
    }

    fn net(&mut self, prefix: &str, name: &str) -> u32 {
        if prefix.is_empty() {
            self.flat.net(name)
        } else {
            let mut full = String::with_capacity(prefix.len() + name.len());
            full.push_str(prefix);
            full.push_str(name);
            self.flat.net(&full)
        }
    }

    /// Elaborates model `index` with net names prefixed by `prefix`. The top
    /// model (`bindings` None) declares the inputs and outputs.
    fn elaborate(
        &mut self,
        index: usize,
        prefix: &str,
        bindings: Option<Loc>,
    ) -> Result<(), SourceError> {
        if self.active.contains(&index) {
            let m = &self.models[index];
            return Err(self.err(
                bindings.unwrap_or(m.loc).0,
                bindings.unwrap_or(m.loc).1,
                format!("model '{}' instantiates itself", m.name),
            ));
        }
        if self.active.len() > 256 {
            let loc = bindings.unwrap_or((0, 0));
            return Err(self.err(loc.0, loc.1, "models nested more than 256 deep"));
        }
        self.active.push(index);
        let model = &self.models[index];
        if bindings.is_none() {
            for (name, loc) in &model.inputs {
                let net = self.flat.net(name);
                self.flat.add_input(net, *loc)?;
            }
        }
        let mut cover: Option<Cover> = None;
        let (offset, line_no) = model.body;
        for line in Lines::new(self.text, offset, line_no) {
            let toks = tokens(&line.text);
            let Some(&(first, col)) = toks.first() else {
                continue;
            };
            if !first.starts_with('.') {
                match cover.as_mut() {
                    Some(c) => self.cover_row(c, &toks, line.line)?,
                    None => {
                        return Err(self.err(
                            line.line,
                            col,
                            format!(
                                "unexpected '{first}' (expected a dot-command such as '.names')"
                            ),
                        ))
                    }
                }
                continue;
            }
            if let Some(c) = cover.take() {
                self.finish_cover(c)?;
            }
            self.flat.check_size((line.line, col))?;
            match first {
                ".model" | ".end" => break,
                ".inputs" | ".outputs" => {}
                ".names" => cover = Some(self.start_cover(prefix, &toks, line.line)?),
                ".latch" => self.latch(prefix, &toks, line.line)?,
                ".subckt" => self.subckt(prefix, &toks, line.line)?,
                ".gate" => self.gate(prefix, &toks, line.line)?,
                cmd if IGNORED_COMMANDS.contains(&cmd) => {}
                cmd => {
                    return Err(self.err(
                        line.line,
                        col,
                        format!(
                            "unsupported command '{cmd}' (expected .names, .latch, .subckt, .gate, .inputs, .outputs, .end or a timing annotation)"
                        ),
                    ))
                }
            }
        }
        if let Some(c) = cover.take() {
            self.finish_cover(c)?;
        }
        if bindings.is_none() {
            let model = &self.models[index];
            for (name, loc) in &model.outputs {
                let net = self.flat.net(name);
                self.flat.add_output(name, Sig::net(net), *loc);
            }
        }
        self.active.pop();
        Ok(())
    }

    fn start_cover(
        &mut self,
        prefix: &str,
        toks: &[(&str, u32)],
        line: u32,
    ) -> Result<Cover, SourceError> {
        if toks.len() < 2 {
            return Err(self.err(
                line,
                toks[0].1 + 6,
                "'.names' without an output (expected '.names INPUTS... OUTPUT')",
            ));
        }
        let loc = (line, toks[toks.len() - 1].1);
        let fanins: Vec<Sig> = toks[1..toks.len() - 1]
            .iter()
            .map(|&(t, c)| {
                let n = self.net(prefix, t);
                self.flat.note_use(n, (line, c));
                Sig::net(n)
            })
            .collect();
        let out = self.net(prefix, toks[toks.len() - 1].0);
        Ok(Cover {
            fanins,
            out,
            loc,
            rows: Vec::new(),
            n_rows: 0,
            onset: None,
        })
    }

    fn cover_row(
        &mut self,
        c: &mut Cover,
        toks: &[(&str, u32)],
        line: u32,
    ) -> Result<(), SourceError> {
        let k = c.fanins.len();
        let (plane, out, out_col) = match (k, toks) {
            (0, [(o, col)]) => ("", *o, *col),
            (_, [(p, _), (o, col)]) if k > 0 => (*p, *o, *col),
            _ => {
                let expected = if k == 0 {
                    "one output value 0 or 1".to_string()
                } else {
                    format!("an input plane of {k} characters 0, 1 or - and an output value")
                };
                return Err(self.err(
                    line,
                    toks[0].1,
                    format!(
                        "malformed cover row '{}' (expected {expected})",
                        toks.iter().map(|t| t.0).collect::<Vec<_>>().join(" ")
                    ),
                ));
            }
        };
        if plane.len() != k {
            return Err(self.err(
                line,
                toks[0].1,
                format!(
                    "cover row '{plane}' has {} characters (expected {k}, one per input)",
                    plane.len()
                ),
            ));
        }
        if let Some(pos) = plane.bytes().position(|b| !matches!(b, b'0' | b'1' | b'-')) {
            return Err(self.err(
                line,
                toks[0].1 + pos as u32,
                format!(
                    "unexpected '{}' in a cover row (expected 0, 1 or -)",
                    // A whole character, not a byte: the row may hold
                    // multi-byte UTF-8 text.
                    plane[pos..].chars().next().unwrap_or('?')
                ),
            ));
        }
        let value = match out {
            "1" => true,
            "0" => false,
            _ => {
                return Err(self.err(
                    line,
                    out_col,
                    format!("unexpected output value '{out}' (expected 0 or 1)"),
                ))
            }
        };
        if let Some(prev) = c.onset {
            if prev != value {
                return Err(self.err(
                    line,
                    out_col,
                    "cover mixes output values 0 and 1 (expected all rows to give the on-set or all the off-set)",
                ));
            }
        }
        c.onset = Some(value);
        c.rows.extend_from_slice(plane.as_bytes());
        c.n_rows += 1;
        Ok(())
    }

    fn finish_cover(&mut self, c: Cover) -> Result<(), SourceError> {
        let k = c.fanins.len();
        let onset = c.onset.unwrap_or(true);
        if c.n_rows == 0 {
            // An empty cover is constant 0.
            return self
                .flat
                .add_gate(c.out, GateOp::Buf, false, &[Sig::FALSE], c.loc);
        }
        if k <= 6 {
            let rows = 1usize << k;
            let mut truth = 0u64;
            for cube in c.rows.chunks(k.max(1)).take(c.n_rows) {
                for r in 0..rows {
                    let hit = (0..k).all(|i| match cube[i] {
                        b'1' => r >> i & 1 == 1,
                        b'0' => r >> i & 1 == 0,
                        _ => true,
                    });
                    if hit {
                        truth |= 1 << r;
                    }
                }
            }
            if k == 0 {
                truth = 1;
            }
            let full = if rows == 64 {
                u64::MAX
            } else {
                (1u64 << rows) - 1
            };
            if !onset {
                truth = !truth & full;
            }
            return self
                .flat
                .add_gate(c.out, GateOp::Truth(truth), false, &c.fanins, c.loc);
        }
        let cubes: Vec<&[u8]> = c.rows.chunks(k).collect();
        self.flat.add_cover(c.out, &c.fanins, &cubes, onset, c.loc)
    }

    fn latch(&mut self, prefix: &str, toks: &[(&str, u32)], line: u32) -> Result<(), SourceError> {
        let args = &toks[1..];
        if !(2..=5).contains(&args.len()) {
            return Err(self.err(
                line,
                toks[0].1,
                format!("'.latch' with {} arguments (expected '.latch INPUT OUTPUT [TYPE CONTROL] [INIT]')", args.len()),
            ));
        }
        let (kind, control, init) = match args.len() {
            2 => (None, None, None),
            3 => (None, None, Some(args[2])),
            4 => (Some(args[2]), Some(args[3]), None),
            _ => (Some(args[2]), Some(args[3]), Some(args[4])),
        };
        if let Some((k, col)) = kind {
            if !matches!(k, "fe" | "re" | "ah" | "al" | "as") {
                return Err(self.err(
                    line,
                    col,
                    format!("unknown latch type '{k}' (expected fe, re, ah, al or as)"),
                ));
            }
        }
        let init = match init {
            None => InitValue::Unknown,
            Some(("0", _)) => InitValue::Zero,
            Some(("1", _)) => InitValue::One,
            Some(("2", _)) => InitValue::DontCare,
            Some(("3", _)) => InitValue::Unknown,
            Some((v, col)) => {
                return Err(self.err(
                    line,
                    col,
                    format!("unknown initial value '{v}' (expected 0, 1, 2 or 3)"),
                ))
            }
        };
        let d = self.net(prefix, args[0].0);
        self.flat.note_use(d, (line, args[0].1));
        let q = self.net(prefix, args[1].0);
        let clock = match control {
            Some(("NIL", _)) | None => None,
            Some((c, _)) => Some(self.net(prefix, c)),
        };
        self.flat.add_storage(StorageDecl {
            name: format!("{prefix}{}", args[1].0),
            d: Sig::net(d),
            q,
            clock,
            init,
            kind: kind.map(|k| k.0.to_string()),
            loc: (line, args[1].1),
        })
    }

    /// Parses `formal=actual` pairs.
    fn pin_pairs<'t>(
        &self,
        toks: &[(&'t str, u32)],
        line: u32,
    ) -> Result<Vec<(&'t str, &'t str, u32)>, SourceError> {
        toks.iter()
            .map(|&(t, col)| match t.split_once('=') {
                Some((f, a)) if !f.is_empty() && !a.is_empty() => Ok((f, a, col)),
                _ => Err(self.err(
                    line,
                    col,
                    format!("unexpected '{t}' (expected FORMAL=ACTUAL)"),
                )),
            })
            .collect()
    }

    fn subckt(&mut self, prefix: &str, toks: &[(&str, u32)], line: u32) -> Result<(), SourceError> {
        let Some(&(model_name, mcol)) = toks.get(1) else {
            return Err(self.err(
                line,
                toks[0].1,
                "'.subckt' without a model name (expected '.subckt MODEL FORMAL=ACTUAL...')",
            ));
        };
        let Some(&index) = self.by_name.get(model_name) else {
            if self.cells.has_cell(model_name) {
                return self.gate(prefix, toks, line);
            }
            return Err(self.err(
                line,
                mcol,
                format!("unknown model '{model_name}' (expected a model defined in this file or a library cell)"),
            ));
        };
        let pins = self.pin_pairs(&toks[2..], line)?;
        self.instances += 1;
        let child = format!("{prefix}{model_name}${}/", self.instances);
        let models: &'a [Model] = self.models;
        let model = &models[index];
        for &(formal, actual, col) in &pins {
            let is_in = model.inputs.iter().any(|i| i.0 == formal);
            let is_out = model.outputs.iter().any(|o| o.0 == formal);
            let parent = self.net(prefix, actual);
            let inner = self.net(&child, formal);
            if is_in {
                self.flat
                    .add_gate(inner, GateOp::Buf, false, &[Sig::net(parent)], (line, col))?;
            } else if is_out {
                self.flat
                    .add_gate(parent, GateOp::Buf, false, &[Sig::net(inner)], (line, col))?;
            } else {
                return Err(self.err(
                    line,
                    col,
                    format!("model '{model_name}' has no port '{formal}' (expected one of its .inputs or .outputs)"),
                ));
            }
        }
        self.elaborate(index, &child, Some((line, mcol)))
    }

    fn gate(&mut self, prefix: &str, toks: &[(&str, u32)], line: u32) -> Result<(), SourceError> {
        let Some(&(cell_name, ccol)) = toks.get(1) else {
            return Err(self.err(
                line,
                toks[0].1,
                "'.gate' without a cell name (expected '.gate CELL PIN=NET...')",
            ));
        };
        let pins = self.pin_pairs(&toks[2..], line)?;
        let pin = |name: &str| pins.iter().find(|p| p.0 == name);
        if let Some(cell) = self.cells.cell(cell_name) {
            let mut fanins = Vec::with_capacity(cell.inputs.len());
            for input in &cell.inputs {
                let Some(&(_, actual, col)) = pin(input) else {
                    return Err(self.err(
                        line,
                        ccol,
                        format!(
                            "cell '{cell_name}' instance leaves input pin '{input}' unconnected"
                        ),
                    ));
                };
                let n = self.net(prefix, actual);
                self.flat.note_use(n, (line, col));
                fanins.push(Sig::net(n));
            }
            for &(formal, _, col) in &pins {
                if formal != cell.output && !cell.inputs.iter().any(|i| i == formal) {
                    return Err(self.err(
                        line,
                        col,
                        format!("cell '{cell_name}' has no pin '{formal}'"),
                    ));
                }
            }
            let Some(&(_, out, col)) = pin(&cell.output) else {
                return Err(self.err(
                    line,
                    ccol,
                    format!(
                        "cell '{cell_name}' instance leaves output pin '{}' unconnected",
                        cell.output
                    ),
                ));
            };
            let truth = cell.truth;
            let out = self.net(prefix, out);
            return self
                .flat
                .add_gate(out, GateOp::Truth(truth), false, &fanins, (line, col));
        }
        if let Some(spec) = self.cells.storage(cell_name) {
            let (Some(&(_, d, _)), Some(&(_, q, qcol))) = (pin(&spec.d), pin(&spec.q)) else {
                return Err(self.err(
                    line,
                    ccol,
                    format!(
                        "storage cell '{cell_name}' needs pins '{}' and '{}' connected",
                        spec.d, spec.q
                    ),
                ));
            };
            let clock = pin(&spec.clock).map(|p| p.1);
            let d = self.net(prefix, d);
            let qn = self.net(prefix, q);
            let clock = clock.map(|c| self.net(prefix, c));
            return self.flat.add_storage(StorageDecl {
                name: format!("{prefix}{q}"),
                d: Sig::net(d),
                q: qn,
                clock,
                init: InitValue::Unknown,
                kind: Some(cell_name.to_string()),
                loc: (line, qcol),
            });
        }
        Err(self.err(line, ccol, self.cells.unknown_message(cell_name)))
    }
}
