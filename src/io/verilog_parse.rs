//! Structural Verilog parsed into modules of declarations and items.
//!
//! The parser accepts what gate-level files use: module headers with plain or
//! ANSI-style ports, `input`/`output`/`wire`/`reg` declarations with and
//! without ranges, `assign` with expressions, gate primitives, module and
//! cell instances with named or positional connections, and clocked
//! `always` blocks of non-blocking assignments (flip-flops), and `initial`
//! assignments of constants to registers (their start values). Delays
//! (`#...`) are skipped. Anything behavioural beyond that is an error naming the
//! line. Elaboration (turning modules into nets) lives in `verilog_read`.

use super::flat::Loc;
use super::verilog_lex::{Kind, Lexer, Token};
use crate::diag::SourceError;
use rustc_hash::FxHashMap;

/// Port direction of a declared net.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum Dir {
    Input,
    Output,
}

/// A declared net: port direction (if a port) and range `[msb:lsb]`.
#[derive(Clone, Copy, Debug)]
pub(crate) struct Decl {
    pub dir: Option<Dir>,
    pub range: Option<(i64, i64)>,
    pub loc: Loc,
}

impl Decl {
    /// Indices of the bits, least significant (right-hand index) first.
    pub fn bit_indices(&self) -> Option<Vec<i64>> {
        self.range.map(|(msb, lsb)| {
            if msb >= lsb {
                (lsb..=msb).collect()
            } else {
                (msb..=lsb).rev().collect()
            }
        })
    }
}

/// Unary operators.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum UnOp {
    /// `~` bitwise not.
    Not,
    /// `!` logical not.
    LogicNot,
    /// Reductions `&`, `|`, `^` and their inverses.
    ReduceAnd,
    ReduceOr,
    ReduceXor,
    ReduceNand,
    ReduceNor,
    ReduceXnor,
}

/// Binary operators.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum BinOp {
    And,
    Or,
    Xor,
    Xnor,
    LogicAnd,
    LogicOr,
    Eq,
    Ne,
}

/// An expression.
#[derive(Clone, Debug)]
pub(crate) enum Expr<'a> {
    Name(&'a str, Loc),
    Index(&'a str, i64, Loc),
    Slice(&'a str, i64, i64, Loc),
    Const(Vec<bool>, Loc),
    Concat(Vec<Expr<'a>>, Loc),
    Repeat(u32, Box<Expr<'a>>, Loc),
    Unary(UnOp, Box<Expr<'a>>, Loc),
    Binary(BinOp, Box<Expr<'a>>, Box<Expr<'a>>, Loc),
    /// A chain `a op b op c ...` of one associative operator (`&`, `|`, `^`),
    /// kept flat so long chains do not nest deeply.
    Chain(BinOp, Vec<Expr<'a>>, Loc),
    Cond(Box<Expr<'a>>, Box<Expr<'a>>, Box<Expr<'a>>, Loc),
}

impl Expr<'_> {
    /// Where the expression starts.
    pub fn loc(&self) -> Loc {
        match self {
            Expr::Name(_, l)
            | Expr::Index(_, _, l)
            | Expr::Slice(_, _, _, l)
            | Expr::Const(_, l)
            | Expr::Concat(_, l)
            | Expr::Repeat(_, _, l)
            | Expr::Unary(_, _, l)
            | Expr::Binary(_, _, _, l)
            | Expr::Chain(_, _, l)
            | Expr::Cond(_, _, _, l) => *l,
        }
    }
}

/// Gate primitives.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum Prim {
    And,
    Nand,
    Or,
    Nor,
    Xor,
    Xnor,
    Not,
    Buf,
}

/// Connections of an instance.
#[derive(Clone, Debug)]
pub(crate) enum Conns<'a> {
    Named(Vec<(&'a str, Option<Expr<'a>>, Loc)>),
    Ordered(Vec<Option<Expr<'a>>>),
}

/// A module item.
#[derive(Clone, Debug)]
pub(crate) enum Item<'a> {
    Assign(Expr<'a>, Expr<'a>, Loc),
    Prim(Prim, Vec<Expr<'a>>, Loc),
    Instance {
        module: &'a str,
        module_loc: Loc,
        name: &'a str,
        conns: Conns<'a>,
    },
    Always {
        negedge: bool,
        clock: Expr<'a>,
        assigns: Vec<(Expr<'a>, Expr<'a>, Loc)>,
    },
    /// `initial` assignments of constants: start values of registers.
    Initial(Vec<(Expr<'a>, Expr<'a>, Loc)>),
}

/// A parsed module.
#[derive(Debug)]
pub(crate) struct Module<'a> {
    pub name: &'a str,
    pub loc: Loc,
    pub ports: Vec<(&'a str, Loc)>,
    pub decls: FxHashMap<&'a str, Decl>,
    pub items: Vec<Item<'a>>,
}

const BEHAVIOURAL: &[&str] = &[
    "parameter",
    "localparam",
    "function",
    "task",
    "generate",
    "genvar",
    "integer",
    "real",
    "time",
    "event",
    "specify",
    "defparam",
    "if",
    "case",
    "for",
    "while",
    "repeat",
    "forever",
    "fork",
    "inout",
    "bufif0",
    "bufif1",
    "notif0",
    "notif1",
    "pullup",
    "pulldown",
    "nmos",
    "pmos",
    "cmos",
    "tran",
    "rtran",
    "primitive",
    "table",
];

/// Parses every module of `src`.
pub(crate) fn parse<'a>(src: &'a str, file: &'a str) -> Result<Vec<Module<'a>>, SourceError> {
    let mut p = Parser {
        lx: Lexer::new(src, file),
        depth: 0,
    };
    let mut modules = Vec::new();
    loop {
        let t = p.lx.next_token()?;
        match t.kind {
            Kind::Eof => break,
            _ if t.is("module") || t.is("macromodule") => modules.push(p.module()?),
            _ => return Err(p.unexpected(&t, "'module'")),
        }
    }
    if modules.is_empty() {
        let (line, col) = super::flat::end_loc(src);
        return Err(SourceError::new(
            file,
            line,
            col,
            "no module found (expected 'module NAME (...); ... endmodule')",
        ));
    }
    Ok(modules)
}

struct Parser<'a> {
    lx: Lexer<'a>,
    depth: u32,
}

impl<'a> Parser<'a> {
    fn unexpected(&self, t: &Token<'a>, expected: &str) -> SourceError {
        self.lx.error(
            t.loc,
            format!("unexpected {} (expected {expected})", t.describe()),
        )
    }

    fn expect(&mut self, sym: &str) -> Result<Token<'a>, SourceError> {
        let t = self.lx.next_token()?;
        if t.is(sym) {
            Ok(t)
        } else {
            Err(self.unexpected(&t, &format!("'{sym}'")))
        }
    }

    fn name(&mut self, what: &str) -> Result<Token<'a>, SourceError> {
        let t = self.lx.next_token()?;
        if t.is_name() && !(t.kind == Kind::Ident && is_reserved(t.text)) {
            Ok(t)
        } else {
            Err(self.unexpected(&t, what))
        }
    }

    fn accept(&mut self, sym: &str) -> Result<bool, SourceError> {
        if self.lx.peek()?.is(sym) {
            self.lx.next_token()?;
            Ok(true)
        } else {
            Ok(false)
        }
    }

    fn integer(&mut self) -> Result<i64, SourceError> {
        let neg = self.accept("-")?;
        let t = self.lx.next_token()?;
        if t.kind != Kind::Number {
            return Err(self.unexpected(&t, "an integer"));
        }
        let v: i64 = t.text.replace('_', "").parse().map_err(|_| {
            self.lx.error(
                t.loc,
                format!(
                    "'{}' is not a plain integer (expected a decimal index)",
                    t.text
                ),
            )
        })?;
        Ok(if neg { -v } else { v })
    }

    fn range(&mut self) -> Result<Option<(i64, i64)>, SourceError> {
        if !self.accept("[")? {
            return Ok(None);
        }
        let msb = self.integer()?;
        self.expect(":")?;
        let lsb = self.integer()?;
        self.expect("]")?;
        if msb.abs_diff(lsb) >= super::limits::MAX_EXPRESSION_WIDTH {
            let t = self.lx.peek()?;
            return Err(self.lx.error(
                t.loc,
                format!(
                    "range [{msb}:{lsb}] is wider than {} bits",
                    super::limits::MAX_EXPRESSION_WIDTH
                ),
            ));
        }
        Ok(Some((msb, lsb)))
    }

    fn skip_delay(&mut self) -> Result<(), SourceError> {
        if !self.accept("#")? {
            return Ok(());
        }
        if self.accept("(")? {
            let mut depth = 1;
            while depth > 0 {
                let t = self.lx.next_token()?;
                match t.kind {
                    Kind::Eof => return Err(self.unexpected(&t, "')' closing the delay")),
                    _ if t.is("(") => depth += 1,
                    _ if t.is(")") => depth -= 1,
                    _ => {}
                }
            }
        } else {
            let t = self.lx.next_token()?;
            if t.kind != Kind::Number && !t.is_name() {
                return Err(self.unexpected(&t, "a delay value"));
            }
        }
        Ok(())
    }

    fn declare(
        &self,
        m: &mut Module<'a>,
        name: Token<'a>,
        dir: Option<Dir>,
        range: Option<(i64, i64)>,
    ) -> Result<(), SourceError> {
        match m.decls.get_mut(name.text) {
            None => {
                m.decls.insert(
                    name.text,
                    Decl {
                        dir,
                        range,
                        loc: name.loc,
                    },
                );
            }
            Some(d) => {
                if dir.is_some() && d.dir.is_some() {
                    return Err(self.lx.error(
                        name.loc,
                        format!(
                            "port '{}' is declared twice (first at line {})",
                            name.text, d.loc.0
                        ),
                    ));
                }
                if range.is_some() && d.range.is_some() && range != d.range {
                    return Err(self.lx.error(
                        name.loc,
                        format!(
                            "'{}' is redeclared with a different range (first at line {})",
                            name.text, d.loc.0
                        ),
                    ));
                }
                d.dir = d.dir.or(dir);
                d.range = d.range.or(range);
            }
        }
        Ok(())
    }

    fn module(&mut self) -> Result<Module<'a>, SourceError> {
        let name = self.name("a module name")?;
        let mut m = Module {
            name: name.text,
            loc: name.loc,
            ports: Vec::new(),
            decls: FxHashMap::default(),
            items: Vec::new(),
        };
        if self.lx.peek()?.is("#") {
            let t = self.lx.peek()?;
            return Err(self.lx.error(
                t.loc,
                "module parameters are not supported (expected a structural module)",
            ));
        }
        if self.accept("(")? {
            self.header_ports(&mut m)?;
        }
        self.expect(";")?;
        loop {
            let t = self.lx.next_token()?;
            match t.kind {
                Kind::Eof => return Err(self.unexpected(&t, "'endmodule'")),
                Kind::Symbol if t.text == ";" => {}
                Kind::Ident if t.text == "endmodule" => break,
                Kind::Ident if t.text == "input" || t.text == "output" => {
                    let dir = if t.text == "input" {
                        Dir::Input
                    } else {
                        Dir::Output
                    };
                    self.declaration(&mut m, Some(dir))?;
                }
                Kind::Ident
                    if matches!(
                        t.text,
                        "wire" | "reg" | "tri" | "logic" | "supply0" | "supply1"
                    ) =>
                {
                    if matches!(t.text, "supply0" | "supply1") {
                        let value = t.text == "supply1";
                        loop {
                            let n = self.name("a net name")?;
                            self.declare(&mut m, n, None, None)?;
                            m.items.push(Item::Assign(
                                Expr::Name(n.text, n.loc),
                                Expr::Const(vec![value], n.loc),
                                n.loc,
                            ));
                            if !self.accept(",")? {
                                break;
                            }
                        }
                        self.expect(";")?;
                    } else {
                        self.declaration(&mut m, None)?;
                    }
                }
                Kind::Ident if t.text == "assign" => {
                    self.skip_delay()?;
                    loop {
                        let lhs = self.expr()?;
                        let eq = self.expect("=")?;
                        let rhs = self.expr()?;
                        m.items.push(Item::Assign(lhs, rhs, eq.loc));
                        if !self.accept(",")? {
                            break;
                        }
                    }
                    self.expect(";")?;
                }
                Kind::Ident if t.text == "always" || t.text == "always_ff" => {
                    self.always(&mut m, t)?
                }
                Kind::Ident if t.text == "initial" => self.initial(&mut m)?,
                Kind::Ident if prim(t.text).is_some() => {
                    let p = prim(t.text).expect("checked");
                    self.skip_delay()?;
                    loop {
                        if self.lx.peek()?.is_name() {
                            self.lx.next_token()?;
                            self.range()?;
                        }
                        let open = self.expect("(")?;
                        let mut terms = Vec::new();
                        loop {
                            terms.push(self.expr()?);
                            if !self.accept(",")? {
                                break;
                            }
                        }
                        self.expect(")")?;
                        m.items.push(Item::Prim(p, terms, open.loc));
                        if !self.accept(",")? {
                            break;
                        }
                    }
                    self.expect(";")?;
                }
                Kind::Ident if BEHAVIOURAL.contains(&t.text) || is_reserved(t.text) => {
                    return Err(self.lx.error(
                        t.loc,
                        format!("'{}' is not supported (expected structural Verilog: declarations, assign, gate primitives, instances, or a clocked always block of non-blocking assignments)", t.text),
                    ));
                }
                Kind::Ident | Kind::Escaped => self.instances(&mut m, t)?,
                _ => {
                    return Err(self.unexpected(
                        &t,
                        "a declaration, 'assign', a gate, an instance or 'endmodule'",
                    ))
                }
            }
        }
        Ok(m)
    }

    fn header_ports(&mut self, m: &mut Module<'a>) -> Result<(), SourceError> {
        if self.accept(")")? {
            return Ok(());
        }
        let first = self.lx.peek()?;
        let ansi = first.is("input") || first.is("output") || first.is("inout");
        let mut dir = None;
        let mut range = None;
        loop {
            if ansi {
                let t = self.lx.peek()?;
                if t.is("input") || t.is("output") {
                    self.lx.next_token()?;
                    dir = Some(if t.text == "input" {
                        Dir::Input
                    } else {
                        Dir::Output
                    });
                    for kw in ["wire", "reg", "logic", "signed"] {
                        self.accept(kw)?;
                    }
                    self.accept("signed")?;
                    range = self.range()?;
                } else if t.is("inout") {
                    return Err(self.lx.error(
                        t.loc,
                        "'inout' ports are not supported (expected input or output)",
                    ));
                }
            }
            let n = self.name("a port name")?;
            if ansi {
                self.declare(m, n, dir, range)?;
            }
            if m.ports.iter().any(|p| p.0 == n.text) {
                return Err(self
                    .lx
                    .error(n.loc, format!("port '{}' is listed twice", n.text)));
            }
            m.ports.push((n.text, n.loc));
            if self.accept(",")? {
                continue;
            }
            self.expect(")")?;
            return Ok(());
        }
    }

    fn declaration(&mut self, m: &mut Module<'a>, dir: Option<Dir>) -> Result<(), SourceError> {
        for kw in ["wire", "reg", "logic", "tri"] {
            self.accept(kw)?;
        }
        self.accept("signed")?;
        let range = self.range()?;
        self.skip_delay()?;
        loop {
            let n = self.name("a net name")?;
            self.declare(m, n, dir, range)?;
            if self.lx.peek()?.is("[") {
                let t = self.lx.peek()?;
                return Err(self
                    .lx
                    .error(t.loc, "memories (arrays of nets) are not supported"));
            }
            if self.lx.peek()?.is("=") {
                let eq = self.lx.next_token()?;
                let rhs = self.expr()?;
                m.items
                    .push(Item::Assign(Expr::Name(n.text, n.loc), rhs, eq.loc));
            }
            if !self.accept(",")? {
                break;
            }
        }
        self.expect(";")?;
        Ok(())
    }

    fn always(&mut self, m: &mut Module<'a>, kw: Token<'a>) -> Result<(), SourceError> {
        let not_ff = |s: &Self, loc: Loc| {
            s.lx.error(loc, "behavioural 'always' block is not supported (expected 'always @(posedge CLOCK) Q <= D;' or a begin/end block of such assignments)")
        };
        if !self.accept("@")? {
            return Err(not_ff(self, kw.loc));
        }
        let open = self.lx.next_token()?;
        if !open.is("(") {
            return Err(not_ff(self, open.loc));
        }
        let edge = self.lx.next_token()?;
        let negedge = if edge.is("posedge") {
            false
        } else if edge.is("negedge") {
            true
        } else {
            return Err(not_ff(self, edge.loc));
        };
        let clock = self.expr()?;
        let close = self.lx.next_token()?;
        if !close.is(")") {
            return Err(self.lx.error(close.loc, format!("unexpected {} (expected ')' after a single clock edge; asynchronous set and reset are not supported)", close.describe())));
        }
        let mut assigns = Vec::new();
        let block = self.accept("begin")?;
        if block && self.accept(":")? {
            self.name("a block name")?;
        }
        loop {
            if block && self.accept("end")? {
                break;
            }
            let t = self.lx.peek()?;
            if t.kind == Kind::Ident && (t.text == "if" || t.text == "case" || t.text == "begin") {
                return Err(not_ff(self, t.loc));
            }
            let lhs = self.expr()?;
            let op = self.lx.next_token()?;
            if !op.is("<=") {
                return Err(self.lx.error(
                    op.loc,
                    format!(
                        "unexpected {} (expected '<=': a flip-flop is a non-blocking assignment)",
                        op.describe()
                    ),
                ));
            }
            self.skip_delay()?;
            let rhs = self.expr()?;
            self.expect(";")?;
            assigns.push((lhs, rhs, op.loc));
            if !block {
                break;
            }
        }
        m.items.push(Item::Always {
            negedge,
            clock,
            assigns,
        });
        Ok(())
    }

    /// `initial` with constant assignments to registers (`initial q = 1'b0;`,
    /// `initial q <= 1'b0;` or a begin/end block of them; delays skipped).
    fn initial(&mut self, m: &mut Module<'a>) -> Result<(), SourceError> {
        const ONLY: &str = "an 'initial' block may only give registers constant start values (expected 'initial q = 1'b0;', 'initial q <= 1'b0;' or a begin/end block of such assignments)";
        let block = self.accept("begin")?;
        if block && self.accept(":")? {
            self.name("a block name")?;
        }
        let mut assigns = Vec::new();
        loop {
            if block && self.accept("end")? {
                break;
            }
            self.skip_delay()?;
            let t = self.lx.peek()?;
            if !t.is_name() || (t.kind == Kind::Ident && is_reserved(t.text)) {
                return Err(self.lx.error(t.loc, ONLY));
            }
            let lhs = self.expr()?;
            let op = self.lx.next_token()?;
            if !op.is("=") && !op.is("<=") {
                return Err(self.lx.error(op.loc, ONLY));
            }
            self.skip_delay()?;
            let rhs = self.expr()?;
            if !matches!(rhs, Expr::Const(..)) {
                return Err(self.lx.error(rhs.loc(), ONLY));
            }
            self.expect(";")?;
            assigns.push((lhs, rhs, op.loc));
            if !block {
                break;
            }
        }
        m.items.push(Item::Initial(assigns));
        Ok(())
    }

    fn instances(&mut self, m: &mut Module<'a>, module: Token<'a>) -> Result<(), SourceError> {
        if self.lx.peek()?.is("#") {
            let t = self.lx.peek()?;
            if self.lx.peek2()?.is("(") {
                return Err(self.lx.error(
                    t.loc,
                    "parameter overrides are not supported (expected a plain instance)",
                ));
            }
            self.skip_delay()?;
        }
        loop {
            let name = if self.lx.peek()?.is_name() {
                let n = self.lx.next_token()?;
                if self.lx.peek()?.is("[") {
                    let t = self.lx.peek()?;
                    return Err(self
                        .lx
                        .error(t.loc, "arrays of instances are not supported"));
                }
                n.text
            } else {
                ""
            };
            let open = self.expect("(")?;
            let conns = if self.lx.peek()?.is(".") {
                let mut v = Vec::new();
                loop {
                    self.expect(".")?;
                    let formal = self.name("a port name")?;
                    self.expect("(")?;
                    let actual = if self.lx.peek()?.is(")") {
                        None
                    } else {
                        Some(self.expr()?)
                    };
                    self.expect(")")?;
                    v.push((formal.text, actual, formal.loc));
                    if !self.accept(",")? {
                        break;
                    }
                }
                Conns::Named(v)
            } else if self.lx.peek()?.is(")") {
                Conns::Ordered(Vec::new())
            } else {
                let mut v = Vec::new();
                loop {
                    if self.lx.peek()?.is(",") || self.lx.peek()?.is(")") {
                        v.push(None);
                    } else {
                        v.push(Some(self.expr()?));
                    }
                    if !self.accept(",")? {
                        break;
                    }
                }
                Conns::Ordered(v)
            };
            let _ = open;
            self.expect(")")?;
            m.items.push(Item::Instance {
                module: module.text,
                module_loc: module.loc,
                name,
                conns,
            });
            if !self.accept(",")? {
                break;
            }
        }
        self.expect(";")?;
        Ok(())
    }

    /// Parses an expression (guarding the nesting depth so hostile input
    /// cannot overflow the stack).
    fn expr(&mut self) -> Result<Expr<'a>, SourceError> {
        self.depth += 1;
        if self.depth > 200 {
            let t = self.lx.peek()?;
            return Err(self.lx.error(t.loc, "expression nested more than 200 deep"));
        }
        let r = self.conditional();
        self.depth -= 1;
        r
    }

    fn conditional(&mut self) -> Result<Expr<'a>, SourceError> {
        let c = self.binary(0)?;
        if self.lx.peek()?.is("?") {
            let q = self.lx.next_token()?;
            let t = self.expr()?;
            self.expect(":")?;
            let e = self.expr()?;
            return Ok(Expr::Cond(Box::new(c), Box::new(t), Box::new(e), q.loc));
        }
        Ok(c)
    }

    /// Binary operators by precedence level, loosest first.
    fn binary(&mut self, level: usize) -> Result<Expr<'a>, SourceError> {
        const LEVELS: &[&[(&str, BinOp)]] = &[
            &[("||", BinOp::LogicOr)],
            &[("&&", BinOp::LogicAnd)],
            &[("|", BinOp::Or)],
            &[("^", BinOp::Xor), ("~^", BinOp::Xnor), ("^~", BinOp::Xnor)],
            &[("&", BinOp::And)],
            &[
                ("==", BinOp::Eq),
                ("!=", BinOp::Ne),
                ("===", BinOp::Eq),
                ("!==", BinOp::Ne),
            ],
        ];
        if level == LEVELS.len() {
            return self.unary();
        }
        let mut left = self.binary(level + 1)?;
        loop {
            let t = self.lx.peek()?;
            let Some(&(_, op)) = LEVELS[level]
                .iter()
                .find(|(s, _)| t.kind == Kind::Symbol && t.text == *s)
            else {
                break;
            };
            self.lx.next_token()?;
            let right = self.binary(level + 1)?;
            left = match (op, left) {
                (BinOp::And | BinOp::Or | BinOp::Xor, Expr::Chain(o, mut parts, l)) if o == op => {
                    parts.push(right);
                    Expr::Chain(op, parts, l)
                }
                (BinOp::And | BinOp::Or | BinOp::Xor, l) => Expr::Chain(op, vec![l, right], t.loc),
                (_, l) => Expr::Binary(op, Box::new(l), Box::new(right), t.loc),
            };
        }
        Ok(left)
    }

    fn unary(&mut self) -> Result<Expr<'a>, SourceError> {
        let t = self.lx.peek()?;
        let op = if t.kind != Kind::Symbol {
            None
        } else {
            match t.text {
                "~" => Some(UnOp::Not),
                "!" => Some(UnOp::LogicNot),
                "&" => Some(UnOp::ReduceAnd),
                "|" => Some(UnOp::ReduceOr),
                "^" => Some(UnOp::ReduceXor),
                "~&" => Some(UnOp::ReduceNand),
                "~|" => Some(UnOp::ReduceNor),
                "~^" | "^~" => Some(UnOp::ReduceXnor),
                _ => None,
            }
        };
        if let Some(op) = op {
            self.lx.next_token()?;
            self.depth += 1;
            if self.depth > 200 {
                return Err(self.lx.error(t.loc, "expression nested more than 200 deep"));
            }
            let e = self.unary();
            self.depth -= 1;
            return Ok(Expr::Unary(op, Box::new(e?), t.loc));
        }
        self.primary()
    }

    fn primary(&mut self) -> Result<Expr<'a>, SourceError> {
        let t = self.lx.next_token()?;
        match t.kind {
            Kind::Number => {
                let (bits, _sized) = super::verilog_lex::parse_number(t.text)
                    .map_err(|m| self.lx.error(t.loc, m))?;
                Ok(Expr::Const(bits, t.loc))
            }
            Kind::Ident | Kind::Escaped if !(t.kind == Kind::Ident && is_reserved(t.text)) => {
                if !self.accept("[")? {
                    return Ok(Expr::Name(t.text, t.loc));
                }
                let a = self.integer()?;
                if self.accept(":")? {
                    let b = self.integer()?;
                    self.expect("]")?;
                    return Ok(Expr::Slice(t.text, a, b, t.loc));
                }
                self.expect("]")?;
                Ok(Expr::Index(t.text, a, t.loc))
            }
            Kind::Symbol if t.text == "(" => {
                let e = self.expr()?;
                self.expect(")")?;
                Ok(e)
            }
            Kind::Symbol if t.text == "{" => {
                // Replication {N{expr}} or concatenation {a, b, ...}.
                if self.lx.peek()?.kind == Kind::Number && self.lx.peek2()?.is("{") {
                    let n = self.lx.next_token()?;
                    let count: u32 = n
                        .text
                        .parse()
                        .ok()
                        .filter(|&c| (1..=4096).contains(&c))
                        .ok_or_else(|| {
                            self.lx
                                .error(n.loc, "replication count must be an integer from 1 to 4096")
                        })?;
                    self.expect("{")?;
                    let e = self.expr()?;
                    self.expect("}")?;
                    self.expect("}")?;
                    return Ok(Expr::Repeat(count, Box::new(e), t.loc));
                }
                let mut parts = Vec::new();
                loop {
                    parts.push(self.expr()?);
                    if !self.accept(",")? {
                        break;
                    }
                }
                self.expect("}")?;
                Ok(Expr::Concat(parts, t.loc))
            }
            _ => Err(self.unexpected(&t, "an expression")),
        }
    }
}

fn prim(s: &str) -> Option<Prim> {
    Some(match s {
        "and" => Prim::And,
        "nand" => Prim::Nand,
        "or" => Prim::Or,
        "nor" => Prim::Nor,
        "xor" => Prim::Xor,
        "xnor" => Prim::Xnor,
        "not" => Prim::Not,
        "buf" => Prim::Buf,
        _ => return None,
    })
}

fn is_reserved(s: &str) -> bool {
    matches!(
        s,
        "module"
            | "endmodule"
            | "input"
            | "output"
            | "inout"
            | "wire"
            | "reg"
            | "assign"
            | "always"
            | "begin"
            | "end"
            | "posedge"
            | "negedge"
            | "initial"
            | "and"
            | "nand"
            | "or"
            | "nor"
            | "xor"
            | "xnor"
            | "not"
            | "buf"
            | "supply0"
            | "supply1"
            | "if"
            | "else"
            | "case"
            | "endcase"
            | "parameter"
            | "localparam"
            | "function"
            | "task"
            | "generate"
            | "for"
    )
}
