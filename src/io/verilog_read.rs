//! Structural Verilog reader: elaborates parsed modules into a flat netlist.
//!
//! The top module is the one no other module instantiates (or the one
//! `top` names). Instances of modules of the same file are flattened with a
//! name prefix per instance (`<instance>/`); instances of library cells
//! become logic through the cell's truth table; instances of storage cells
//! (named with `--storage` or declared by the library) and clocked `always`
//! blocks become storage elements. A module that instantiates its own name
//! where a library cell has that name uses the cell (a module cannot
//! contain itself).
//!
//! `initial` assignments of constants give the registers they name their
//! start values. Sizes are bounded ([`super::limits`]): every expression's
//! width, and the flattened size of the hierarchy, estimated before
//! elaboration so that a file describing a huge design is refused at once.
//!
//! Bit naming: bit `i` of a vector `a` is the net `a[i]`, the same name an
//! escaped identifier `\a[i] ` gives, so bit-blasted and vector files agree.
//! Ports of the top module become inputs and outputs in header order, and
//! the bits of a vector port least significant first (the right-hand index
//! of the declared range first: `[7:0]` gives `a[0]`, `a[1]`, ... `a[7]`).
//! Positional connections to a library cell list the output pin first, then
//! the inputs in the cell's order, as gate primitives do.

use super::flat::{Flat, GateOp, Loc, Sig, StorageDecl};
use super::limits::{self, ModuleSize, Part, MAX_EXPRESSION_WIDTH};
use super::verilog_parse::{parse, BinOp, Conns, Decl, Dir, Expr, Item, Module, Prim, UnOp};
use super::{CellLookup, ReadOptions};
use crate::diag::SourceError;
use crate::network::{InitValue, Network};
use rustc_hash::{FxHashMap, FxHashSet};

/// Reads structural Verilog `text` (named `file` in errors).
pub fn read(text: &str, file: &str, opts: &ReadOptions) -> Result<Network, SourceError> {
    let modules = parse(text, file)?;
    let cells = CellLookup::new(opts);
    let mut by_name: FxHashMap<&str, usize> = FxHashMap::default();
    for (i, m) in modules.iter().enumerate() {
        if by_name.insert(m.name, i).is_some() {
            return Err(SourceError::new(
                file,
                m.loc.0,
                m.loc.1,
                format!("module '{}' is defined twice", m.name),
            ));
        }
    }
    let top = match &opts.top {
        Some(name) => *by_name.get(name.as_str()).ok_or_else(|| {
            SourceError::new(
                file,
                modules[0].loc.0,
                modules[0].loc.1,
                format!(
                    "no module named '{name}' (expected one of: {})",
                    modules
                        .iter()
                        .map(|m| m.name)
                        .collect::<Vec<_>>()
                        .join(", ")
                ),
            )
        })?,
        None => {
            let used: FxHashSet<&str> = modules
                .iter()
                .flat_map(|m| m.items.iter().map(move |it| (m.name, it)))
                .filter_map(|(within, it)| match it {
                    Item::Instance { module, .. } if !is_own_cell(within, module, &cells) => {
                        Some(*module)
                    }
                    _ => None,
                })
                .collect();
            let tops: Vec<usize> = (0..modules.len())
                .filter(|&i| !used.contains(modules[i].name))
                .collect();
            match tops.as_slice() {
                [one] => *one,
                [] => {
                    return Err(SourceError::new(
                        file,
                        modules[0].loc.0,
                        modules[0].loc.1,
                        "every module is instantiated by another (expected one top module)",
                    ))
                }
                many => {
                    let second = modules[many[1]].loc;
                    return Err(SourceError::new(
                        file,
                        second.0,
                        second.1,
                        format!(
                            "several top modules: {} (choose one with --top)",
                            many.iter()
                                .map(|&i| modules[i].name)
                                .collect::<Vec<_>>()
                                .join(", ")
                        ),
                    ));
                }
            }
        }
    };
    let mut flat = Flat::new(file);
    flat.set_max_nets(opts.max_nets());
    check_sizes(&flat, &modules, &by_name, top, &cells)?;
    let mut e = Elaborator {
        modules: &modules,
        by_name,
        flat,
        cells,
        active: Vec::new(),
        unnamed: 0,
        inits: Vec::new(),
        init_locs: Vec::new(),
    };
    e.flat.set_name(modules[top].name);
    e.elaborate(top, "", None)?;
    if let Err(k) = e.flat.set_storage_inits(&e.inits) {
        let net = e.flat.net_name(e.inits[k].0);
        return Err(e.flat.error(
            e.init_locs[k],
            format!("'{net}' gets an initial value but is not a register (expected a register of a clocked always block or the output of a storage cell)"),
        ));
    }
    e.flat.require_outputs(
        modules[top].loc,
        "at least one output port in the top module",
    )?;
    e.flat.build()
}

/// True when module `within` instantiates `module` of its own name and a
/// library or storage cell has that name: a module cannot contain itself,
/// so the instance is the cell (a design named after a cell it uses, such
/// as a flip-flop module `dff` built around the library's `dff`).
fn is_own_cell(within: &str, module: &str, cells: &CellLookup) -> bool {
    within == module && cells.has_cell(module)
}

/// Refuses, before elaboration, a hierarchy whose flattened declarations
/// and statements would exceed the net limit ([`limits::check_hierarchy`]).
fn check_sizes(
    flat: &Flat,
    modules: &[Module],
    by_name: &FxHashMap<&str, usize>,
    top: usize,
    cells: &CellLookup,
) -> Result<(), SourceError> {
    let sizes: Vec<ModuleSize> = modules
        .iter()
        .map(|m| {
            let mut decls: Vec<&Decl> = m.decls.values().collect();
            decls.sort_by_key(|d| d.loc);
            let mut parts: Vec<Part> = decls
                .iter()
                .map(|d| Part {
                    own: d.range.map_or(1, |(a, b)| a.abs_diff(b) + 1),
                    loc: d.loc,
                    child: None,
                })
                .collect();
            parts.extend(m.items.iter().map(|it| match it {
                Item::Instance {
                    module, module_loc, ..
                } => Part {
                    own: 1,
                    loc: *module_loc,
                    child: if is_own_cell(m.name, module, cells) {
                        None
                    } else {
                        by_name.get(module).copied()
                    },
                },
                other => Part {
                    own: 1,
                    loc: item_loc(other),
                    child: None,
                },
            }));
            ModuleSize {
                name: m.name,
                parts,
            }
        })
        .collect();
    limits::check_hierarchy(flat, &sizes, top, flat.max_nets(), "module")?;
    // Port bits of the top module (limits::NETS_PER_PORT_BIT).
    let limit = (flat.max_nets() / limits::NETS_PER_PORT_BIT).max(1);
    let mut ports: Vec<&Decl> = modules[top]
        .decls
        .values()
        .filter(|d| d.dir.is_some())
        .collect();
    ports.sort_by_key(|d| d.loc);
    let mut bits: u64 = 0;
    for d in ports {
        bits = bits.saturating_add(d.range.map_or(1, |(a, b)| a.abs_diff(b) + 1));
        if bits > limit {
            return Err(flat.error(
                d.loc,
                format!(
                    "module '{}' declares more than {limit} port bits (expected narrower ports; --max-nets N allows N/{} port bits)",
                    modules[top].name,
                    limits::NETS_PER_PORT_BIT
                ),
            ));
        }
    }
    Ok(())
}

/// Where an item starts.
fn item_loc(item: &Item) -> Loc {
    match item {
        Item::Assign(_, _, loc) | Item::Prim(_, _, loc) => *loc,
        Item::Instance { module_loc, .. } => *module_loc,
        Item::Always { clock, .. } => clock.loc(),
        Item::Initial(assigns) => assigns.first().map_or((0, 0), |a| a.2),
    }
}

struct Elaborator<'a, 'm, 'o> {
    modules: &'m [Module<'a>],
    by_name: FxHashMap<&'a str, usize>,
    flat: Flat,
    cells: CellLookup<'o>,
    active: Vec<usize>,
    unnamed: u32,
    /// Start values from `initial` blocks: register net and value, and
    /// where each was given.
    inits: Vec<(u32, InitValue)>,
    init_locs: Vec<Loc>,
}

/// The module being elaborated and its net-name prefix.
struct Scope<'m, 'a> {
    module: &'m Module<'a>,
    prefix: String,
}

impl<'a, 'm, 'o> Elaborator<'a, 'm, 'o> {
    fn err(&self, loc: Loc, msg: impl Into<String>) -> SourceError {
        self.flat.error(loc, msg)
    }

    fn bit_net(&mut self, scope: &Scope, name: &str, index: Option<i64>) -> u32 {
        if index.is_none() && scope.prefix.is_empty() {
            return self.flat.net(name);
        }
        let full = match index {
            Some(i) => format!("{}{name}[{i}]", scope.prefix),
            None => format!("{}{name}", scope.prefix),
        };
        self.flat.net(&full)
    }

    /// The nets of every bit of `name`, least significant first.
    fn name_bits(&mut self, scope: &Scope, name: &str) -> Vec<u32> {
        match scope.module.decls.get(name).and_then(Decl::bit_indices) {
            Some(idx) => idx
                .into_iter()
                .map(|i| self.bit_net(scope, name, Some(i)))
                .collect(),
            None => vec![self.bit_net(scope, name, None)],
        }
    }

    fn vector(&self, scope: &Scope, name: &str, loc: Loc) -> Result<(i64, i64), SourceError> {
        match scope.module.decls.get(name) {
            Some(Decl { range: Some(r), .. }) => Ok(*r),
            Some(_) => Err(self.err(loc, format!("'{name}' is a scalar and cannot be indexed"))),
            None => Err(self.err(
                loc,
                format!("'{name}' is not declared (expected a declared vector)"),
            )),
        }
    }

    /// The nets an assignable expression names, least significant first.
    fn lvalue(&mut self, scope: &Scope, e: &Expr<'a>) -> Result<Vec<u32>, SourceError> {
        match e {
            Expr::Name(n, _) => Ok(self.name_bits(scope, n)),
            Expr::Index(n, i, loc) => {
                let (msb, lsb) = self.vector(scope, n, *loc)?;
                if *i < msb.min(lsb) || *i > msb.max(lsb) {
                    return Err(self.err(*loc, format!("index {i} is outside '{n}' [{msb}:{lsb}]")));
                }
                Ok(vec![self.bit_net(scope, n, Some(*i))])
            }
            Expr::Slice(n, a, b, loc) => {
                let (msb, lsb) = self.vector(scope, n, *loc)?;
                let (lo, hi) = (msb.min(lsb), msb.max(lsb));
                if *a < lo || *a > hi || *b < lo || *b > hi || ((a >= b) != (msb >= lsb) && a != b) {
                    return Err(self.err(*loc, format!("part-select [{a}:{b}] does not fit '{n}' [{msb}:{lsb}]")));
                }
                let idx: Vec<i64> = if a >= b { (*b..=*a).collect() } else { (*a..=*b).rev().collect() };
                Ok(idx.into_iter().map(|i| self.bit_net(scope, n, Some(i))).collect())
            }
            Expr::Concat(parts, _) => {
                let mut bits = Vec::new();
                for p in parts.iter().rev() {
                    bits.extend(self.lvalue(scope, p)?);
                }
                Ok(bits)
            }
            other => Err(self.err(other.loc(), "cannot assign to an expression (expected a net, bit-select, part-select or concatenation)")),
        }
    }

    /// Refuses an expression wider than [`MAX_EXPRESSION_WIDTH`] bits before
    /// its bits are made.
    fn check_width(&self, width: u64, loc: Loc) -> Result<(), SourceError> {
        if width > MAX_EXPRESSION_WIDTH {
            return Err(self.err(
                loc,
                format!("expression would be {width} bits wide, more than the limit of {MAX_EXPRESSION_WIDTH} bits (expected a narrower replication or concatenation)"),
            ));
        }
        Ok(())
    }

    fn reduce(&mut self, op: GateOp, bits: &[Sig], loc: Loc) -> Sig {
        if bits.len() == 1 {
            return bits[0];
        }
        self.flat.gate(op, false, bits, loc)
    }

    /// Makes `b` as wide as `a` when `b` is a constant; otherwise a width
    /// mismatch is an error.
    fn match_widths(
        &self,
        a: &mut Vec<Sig>,
        ea: &Expr,
        b: &mut Vec<Sig>,
        eb: &Expr,
        loc: Loc,
    ) -> Result<(), SourceError> {
        if a.len() == b.len() {
            return Ok(());
        }
        if matches!(eb, Expr::Const(..)) {
            b.resize(a.len(), Sig::FALSE);
            return Ok(());
        }
        if matches!(ea, Expr::Const(..)) {
            a.resize(b.len(), Sig::FALSE);
            return Ok(());
        }
        Err(self.err(
            loc,
            format!(
                "width mismatch: {} bits against {} bits (expected equal widths)",
                a.len(),
                b.len()
            ),
        ))
    }

    /// The bits of an expression, least significant first.
    fn eval(&mut self, scope: &Scope, e: &Expr<'a>) -> Result<Vec<Sig>, SourceError> {
        Ok(match e {
            Expr::Name(..) | Expr::Index(..) | Expr::Slice(..) => {
                let loc = e.loc();
                let nets = self.lvalue(scope, e)?;
                nets.into_iter()
                    .map(|n| {
                        self.flat.note_use(n, loc);
                        Sig::net(n)
                    })
                    .collect()
            }
            Expr::Const(bits, _) => bits.iter().map(|&b| Sig::constant(b)).collect(),
            Expr::Concat(parts, loc) => {
                let mut bits = Vec::new();
                for p in parts.iter().rev() {
                    let part = self.eval(scope, p)?;
                    self.check_width(bits.len() as u64 + part.len() as u64, *loc)?;
                    bits.extend(part);
                }
                bits
            }
            Expr::Repeat(n, inner, loc) => {
                let one = self.eval(scope, inner)?;
                self.check_width(one.len() as u64 * *n as u64, *loc)?;
                let mut bits = Vec::with_capacity(one.len() * *n as usize);
                for _ in 0..*n {
                    bits.extend_from_slice(&one);
                }
                bits
            }
            Expr::Unary(op, inner, loc) => {
                let v = self.eval(scope, inner)?;
                match op {
                    UnOp::Not => v.into_iter().map(Sig::not).collect(),
                    UnOp::LogicNot => vec![self.reduce(GateOp::Or, &v, *loc).not()],
                    UnOp::ReduceAnd => vec![self.reduce(GateOp::And, &v, *loc)],
                    UnOp::ReduceOr => vec![self.reduce(GateOp::Or, &v, *loc)],
                    UnOp::ReduceXor => vec![self.reduce(GateOp::Xor, &v, *loc)],
                    UnOp::ReduceNand => vec![self.reduce(GateOp::And, &v, *loc).not()],
                    UnOp::ReduceNor => vec![self.reduce(GateOp::Or, &v, *loc).not()],
                    UnOp::ReduceXnor => vec![self.reduce(GateOp::Xor, &v, *loc).not()],
                }
            }
            Expr::Binary(op, l, r, loc) => {
                let mut a = self.eval(scope, l)?;
                let mut b = self.eval(scope, r)?;
                match op {
                    BinOp::LogicAnd | BinOp::LogicOr => {
                        let x = self.reduce(GateOp::Or, &a, *loc);
                        let y = self.reduce(GateOp::Or, &b, *loc);
                        let g = if *op == BinOp::LogicAnd {
                            GateOp::And
                        } else {
                            GateOp::Or
                        };
                        vec![self.flat.gate(g, false, &[x, y], *loc)]
                    }
                    _ => {
                        self.match_widths(&mut a, l, &mut b, r, *loc)?;
                        let (g, inv) = match op {
                            BinOp::And => (GateOp::And, false),
                            BinOp::Or => (GateOp::Or, false),
                            BinOp::Xor => (GateOp::Xor, false),
                            _ => (GateOp::Xor, true),
                        };
                        let bits: Vec<Sig> = a
                            .iter()
                            .zip(&b)
                            .map(|(&x, &y)| self.flat.gate(g, inv, &[x, y], *loc))
                            .collect();
                        match op {
                            BinOp::Eq => vec![self.reduce(GateOp::And, &bits, *loc)],
                            BinOp::Ne => vec![self.reduce(GateOp::And, &bits, *loc).not()],
                            _ => bits,
                        }
                    }
                }
            }
            Expr::Chain(op, parts, loc) => {
                let g = match op {
                    BinOp::And => GateOp::And,
                    BinOp::Or => GateOp::Or,
                    _ => GateOp::Xor,
                };
                let mut operands: Vec<Vec<Sig>> = Vec::with_capacity(parts.len());
                for p in parts {
                    operands.push(self.eval(scope, p)?);
                }
                let width = operands.iter().map(Vec::len).max().unwrap_or(1);
                for (k, p) in parts.iter().enumerate() {
                    if operands[k].len() != width {
                        if matches!(p, Expr::Const(..)) {
                            operands[k].resize(width, Sig::FALSE);
                        } else {
                            return Err(self.err(p.loc(), format!("width mismatch: {} bits against {width} bits (expected equal widths)", operands[k].len())));
                        }
                    }
                }
                let mut column = Vec::with_capacity(operands.len());
                (0..width)
                    .map(|bit| {
                        column.clear();
                        column.extend(operands.iter().map(|o| o[bit]));
                        self.flat.gate(g, false, &column, *loc)
                    })
                    .collect()
            }
            Expr::Cond(c, t, f, loc) => {
                let cv = self.eval(scope, c)?;
                let s = self.reduce(GateOp::Or, &cv, *loc);
                let mut a = self.eval(scope, t)?;
                let mut b = self.eval(scope, f)?;
                self.match_widths(&mut a, t, &mut b, f, *loc)?;
                a.iter()
                    .zip(&b)
                    .map(|(&x, &y)| self.flat.gate(GateOp::Mux, false, &[s, x, y], *loc))
                    .collect()
            }
        })
    }

    /// Drives every net of `lhs` from the matching bit of `rhs`.
    fn connect(
        &mut self,
        lhs: &[u32],
        mut rhs: Vec<Sig>,
        rhs_expr: &Expr,
        loc: Loc,
    ) -> Result<(), SourceError> {
        if lhs.len() != rhs.len() {
            if matches!(rhs_expr, Expr::Const(..)) {
                rhs.resize(lhs.len(), Sig::FALSE);
            } else {
                return Err(self.err(
                    loc,
                    format!(
                        "width mismatch: {} bits assigned to {} bits (expected equal widths)",
                        rhs.len(),
                        lhs.len()
                    ),
                ));
            }
        }
        for (&net, &sig) in lhs.iter().zip(&rhs) {
            self.flat.add_gate(net, GateOp::Buf, false, &[sig], loc)?;
        }
        Ok(())
    }

    fn elaborate(
        &mut self,
        index: usize,
        prefix: &str,
        at: Option<Loc>,
    ) -> Result<(), SourceError> {
        let module: &'m Module<'a> = &self.modules[index];
        if self.active.contains(&index) {
            return Err(self.err(
                at.unwrap_or(module.loc),
                format!("module '{}' instantiates itself", module.name),
            ));
        }
        if self.active.len() > 256 {
            return Err(self.err(
                at.unwrap_or(module.loc),
                "modules nested more than 256 deep",
            ));
        }
        self.active.push(index);
        let scope = Scope {
            module,
            prefix: prefix.to_string(),
        };
        for (port, loc) in &module.ports {
            if module.decls.get(port).and_then(|d| d.dir).is_none() {
                return Err(self.err(
                    *loc,
                    format!("port '{port}' has no input or output declaration"),
                ));
            }
        }
        if at.is_none() {
            for (port, _) in &module.ports {
                let d = module.decls[port];
                if d.dir == Some(Dir::Input) {
                    for net in self.name_bits(&scope, port) {
                        self.flat.add_input(net, d.loc)?;
                    }
                }
            }
        }
        for item in &module.items {
            self.item(&scope, item)?;
            self.flat.check_size(item_loc(item))?;
        }
        if at.is_none() {
            for (port, _) in &module.ports {
                let d = module.decls[port];
                if d.dir == Some(Dir::Output) {
                    let bits: Vec<u32> = self.name_bits(&scope, port);
                    let names: Vec<String> = match d.bit_indices() {
                        Some(idx) => idx.iter().map(|i| format!("{port}[{i}]")).collect(),
                        None => vec![port.to_string()],
                    };
                    for (net, name) in bits.into_iter().zip(names) {
                        self.flat.add_output(&name, Sig::net(net), d.loc);
                    }
                }
            }
        }
        self.active.pop();
        Ok(())
    }

    fn item(&mut self, scope: &Scope<'m, 'a>, item: &Item<'a>) -> Result<(), SourceError> {
        match item {
            Item::Assign(lhs, rhs, loc) => {
                let l = self.lvalue(scope, lhs)?;
                let r = self.eval(scope, rhs)?;
                self.connect(&l, r, rhs, *loc)
            }
            Item::Prim(p, terms, loc) => self.primitive(scope, *p, terms, *loc),
            Item::Always {
                negedge,
                clock,
                assigns,
            } => {
                let clk = self.eval(scope, clock)?;
                if clk.len() != 1 || clk[0].inverted() {
                    return Err(self.err(clock.loc(), "clock must be a single net"));
                }
                for (lhs, rhs, loc) in assigns {
                    let q = self.lvalue(scope, lhs)?;
                    let mut d = self.eval(scope, rhs)?;
                    if d.len() != q.len() {
                        if matches!(rhs, Expr::Const(..)) {
                            d.resize(q.len(), Sig::FALSE);
                        } else {
                            return Err(self.err(
                                *loc,
                                format!(
                                    "width mismatch: {} bits assigned to {} bits",
                                    d.len(),
                                    q.len()
                                ),
                            ));
                        }
                    }
                    for (&qn, &dn) in q.iter().zip(&d) {
                        let name = self.flat.net_name(qn);
                        self.flat.add_storage(StorageDecl {
                            name,
                            d: dn,
                            q: qn,
                            clock: Some(clk[0].id()),
                            init: InitValue::Unknown,
                            kind: Some(if *negedge { "fe" } else { "re" }.to_string()),
                            loc: *loc,
                        })?;
                    }
                }
                Ok(())
            }
            Item::Instance {
                module,
                module_loc,
                name,
                conns,
            } => self.instance(scope, module, *module_loc, name, conns),
            Item::Initial(assigns) => {
                for (lhs, rhs, loc) in assigns {
                    let q = self.lvalue(scope, lhs)?;
                    let Expr::Const(bits, _) = rhs else {
                        return Err(self.err(rhs.loc(), "initial value must be a constant"));
                    };
                    for (k, &net) in q.iter().enumerate() {
                        let one = bits.get(k).copied().unwrap_or(false);
                        let value = if one { InitValue::One } else { InitValue::Zero };
                        self.inits.push((net, value));
                        self.init_locs.push(*loc);
                    }
                }
                Ok(())
            }
        }
    }

    fn one_bit(&mut self, scope: &Scope, e: &Expr<'a>) -> Result<Sig, SourceError> {
        let v = self.eval(scope, e)?;
        if v.len() != 1 {
            return Err(self.err(
                e.loc(),
                format!("width mismatch: {} bits where one bit is expected", v.len()),
            ));
        }
        Ok(v[0])
    }

    fn one_net(&mut self, scope: &Scope, e: &Expr<'a>) -> Result<u32, SourceError> {
        let v = self.lvalue(scope, e)?;
        if v.len() != 1 {
            return Err(self.err(
                e.loc(),
                format!("width mismatch: {} bits where one bit is expected", v.len()),
            ));
        }
        Ok(v[0])
    }

    fn primitive(
        &mut self,
        scope: &Scope,
        p: Prim,
        terms: &[Expr<'a>],
        loc: Loc,
    ) -> Result<(), SourceError> {
        if terms.len() < 2 {
            return Err(self.err(loc, "gate needs an output and at least one input"));
        }
        if matches!(p, Prim::Buf | Prim::Not) {
            let input = self.one_bit(scope, &terms[terms.len() - 1])?;
            let input = if p == Prim::Not { input.not() } else { input };
            for t in &terms[..terms.len() - 1] {
                let out = self.one_net(scope, t)?;
                self.flat
                    .add_gate(out, GateOp::Buf, false, &[input], t.loc())?;
            }
            return Ok(());
        }
        let out = self.one_net(scope, &terms[0])?;
        let mut ins = Vec::with_capacity(terms.len() - 1);
        for t in &terms[1..] {
            ins.push(self.one_bit(scope, t)?);
        }
        let (op, inv) = match p {
            Prim::And => (GateOp::And, false),
            Prim::Nand => (GateOp::And, true),
            Prim::Or => (GateOp::Or, false),
            Prim::Nor => (GateOp::Or, true),
            Prim::Xor => (GateOp::Xor, false),
            _ => (GateOp::Xor, true),
        };
        self.flat.add_gate(out, op, inv, &ins, terms[0].loc())
    }

    fn instance(
        &mut self,
        scope: &Scope<'m, 'a>,
        module: &'a str,
        module_loc: Loc,
        name: &'a str,
        conns: &Conns<'a>,
    ) -> Result<(), SourceError> {
        if let Some(&child) = self.by_name.get(module) {
            if !is_own_cell(scope.module.name, module, &self.cells) {
                return self.module_instance(scope, child, module_loc, name, conns);
            }
        }
        if let Some(cell) = self.cells.cell(module) {
            let pins: Vec<&str> = std::iter::once(cell.output.as_str())
                .chain(cell.inputs.iter().map(String::as_str))
                .collect();
            let bound = self.bind_pins(module, module_loc, &pins, conns)?;
            let mut fanins = Vec::with_capacity(cell.inputs.len());
            for (k, pin) in cell.inputs.iter().enumerate() {
                let Some(e) = bound[k + 1] else {
                    return Err(self.err(module_loc, format!("cell '{module}' instance '{name}' leaves input pin '{pin}' unconnected")));
                };
                fanins.push(self.one_bit(scope, e)?);
            }
            let Some(oe) = bound[0] else {
                return Err(self.err(
                    module_loc,
                    format!(
                        "cell '{module}' instance '{name}' leaves output pin '{}' unconnected",
                        cell.output
                    ),
                ));
            };
            let out = self.one_net(scope, oe)?;
            return self
                .flat
                .add_gate(out, GateOp::Truth(cell.truth), false, &fanins, oe.loc());
        }
        if let Some(spec) = self.cells.storage(module) {
            if matches!(conns, Conns::Ordered(v) if !v.is_empty()) {
                return Err(self.err(module_loc, format!("storage cell '{module}' instance '{name}' needs named connections (.{}(...), .{}(...), .{}(...))", spec.d, spec.q, spec.clock)));
            }
            let pins = [spec.d.as_str(), spec.q.as_str(), spec.clock.as_str()];
            let bound = self.bind_pins(module, module_loc, &pins, conns)?;
            let (Some(de), Some(qe)) = (bound[0], bound[1]) else {
                return Err(self.err(module_loc, format!("storage cell '{module}' instance '{name}' needs pins '{}' and '{}' connected", spec.d, spec.q)));
            };
            let d = self.one_bit(scope, de)?;
            let q = self.one_net(scope, qe)?;
            let clock = match bound[2] {
                Some(ce) => Some(self.one_net(scope, ce)?),
                None => None,
            };
            let storage_name = self.flat.net_name(q);
            return self.flat.add_storage(StorageDecl {
                name: storage_name,
                d,
                q,
                clock,
                init: InitValue::Unknown,
                kind: Some(module.to_string()),
                loc: qe.loc(),
            });
        }
        Err(self.err(module_loc, self.cells.unknown_message(module)))
    }

    /// Matches connections to `pins` (positional connections in `pins`
    /// order); returns the expression bound to each pin.
    fn bind_pins<'c>(
        &self,
        module: &str,
        loc: Loc,
        pins: &[&str],
        conns: &'c Conns<'a>,
    ) -> Result<Vec<Option<&'c Expr<'a>>>, SourceError> {
        let mut bound: Vec<Option<&Expr>> = vec![None; pins.len()];
        match conns {
            Conns::Named(v) => {
                for (formal, actual, floc) in v {
                    let Some(k) = pins.iter().position(|p| p == formal) else {
                        return Err(self.err(
                            *floc,
                            format!(
                                "'{module}' has no pin '{formal}' (expected one of: {})",
                                pins.join(", ")
                            ),
                        ));
                    };
                    bound[k] = actual.as_ref();
                }
            }
            Conns::Ordered(v) => {
                if v.len() > pins.len() {
                    return Err(self.err(
                        loc,
                        format!(
                            "'{module}' has {} pins but {} connections are given",
                            pins.len(),
                            v.len()
                        ),
                    ));
                }
                for (k, a) in v.iter().enumerate() {
                    bound[k] = a.as_ref();
                }
            }
        }
        Ok(bound)
    }

    fn module_instance(
        &mut self,
        scope: &Scope<'m, 'a>,
        child: usize,
        loc: Loc,
        name: &str,
        conns: &Conns<'a>,
    ) -> Result<(), SourceError> {
        let cm: &'m Module<'a> = &self.modules[child];
        let inst = if name.is_empty() {
            self.unnamed += 1;
            format!("{}${}", cm.name, self.unnamed)
        } else {
            name.to_string()
        };
        let child_scope = Scope {
            module: cm,
            prefix: format!("{}{inst}/", scope.prefix),
        };
        let ports: Vec<&str> = cm.ports.iter().map(|p| p.0).collect();
        let bound = self.bind_pins(cm.name, loc, &ports, conns)?;
        for (k, port) in ports.iter().enumerate() {
            let Some(actual) = bound[k] else { continue };
            let Some(d) = cm.decls.get(port) else {
                continue;
            };
            let inner = self.name_bits(&child_scope, port);
            match d.dir {
                Some(Dir::Input) => {
                    let v = self.eval(scope, actual)?;
                    self.connect(&inner, v, actual, actual.loc())?;
                }
                Some(Dir::Output) => {
                    let outer = self.lvalue(scope, actual)?;
                    if outer.len() != inner.len() {
                        return Err(self.err(actual.loc(), format!("width mismatch: port '{port}' of '{}' has {} bits, the connection {}", cm.name, inner.len(), outer.len())));
                    }
                    for (&o, &i) in outer.iter().zip(&inner) {
                        self.flat
                            .add_gate(o, GateOp::Buf, false, &[Sig::net(i)], actual.loc())?;
                    }
                }
                None => {}
            }
        }
        self.elaborate(child, &child_scope.prefix, Some(loc))
    }
}
