//! The cell-function expression language of library files.
//!
//! A cell's `function` is written over its input names with
//! `!` or `~` (NOT), `&` (AND), `^` (XOR), `|` (OR), parentheses,
//! `maj(x, y, z)` (three-input majority) and the constants `0` and `1`.
//!
//! Precedence, tightest first: NOT, then AND, then XOR, then OR; the binary
//! operators associate to the left. So `a | b & !c ^ d` reads as
//! `a | ((b & (!c)) ^ d)`.
//!
//! Parsing is a small recursive descent over a token list that remembers each
//! token's 1-based column (counted in characters), so every error points at
//! the place in the expression where it went wrong. The result is an [`Expr`]
//! tree over input indices; [`Expr::truth`] turns it into a truth table under
//! the crate's convention (bit r is the value on row r; input k is bit k of r).
//!
//! A library file is input like any other, so the parser bounds what hostile
//! text can make it do: parentheses, `!` and `maj(...)` nest at most
//! [`MAX_NESTING`] deep (the same limit as the netlist expression parser), and
//! the tree it builds is at most [`MAX_HEIGHT`] levels high (long chains of
//! `&`, `^` or `|` count), so neither parsing nor evaluating nor dropping the
//! tree can overflow the stack.

use std::fmt;

/// Deepest nesting of parentheses, `!` and `maj(...)` a function may use.
pub const MAX_NESTING: usize = 200;

/// Highest expression tree a function may build (a chain of n binary
/// operators is n levels high).
pub const MAX_HEIGHT: usize = 2000;

/// A parsed expression over input indices.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Expr {
    /// The constant 0 or 1.
    Const(bool),
    /// Input number k (its position in the input list).
    Input(usize),
    /// Complement.
    Not(Box<Expr>),
    /// Conjunction.
    And(Box<Expr>, Box<Expr>),
    /// Exclusive or.
    Xor(Box<Expr>, Box<Expr>),
    /// Disjunction.
    Or(Box<Expr>, Box<Expr>),
    /// Three-input majority.
    Maj(Box<Expr>, Box<Expr>, Box<Expr>),
}

/// Why an expression could not be parsed, and where.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ExpressionError {
    /// 1-based column (in characters) in the expression text.
    pub column: usize,
    /// What was found and what was expected.
    pub message: String,
    /// True when the text broke a size limit of the parser (nesting depth,
    /// tree height) rather than the grammar: the input is refused as a whole.
    pub limit_exceeded: bool,
}

impl fmt::Display for ExpressionError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "column {}: {}", self.column, self.message)
    }
}

impl std::error::Error for ExpressionError {}

impl Expr {
    /// The value of the expression on input row `row` (input k is bit k).
    pub fn eval(&self, row: u64) -> bool {
        match self {
            Expr::Const(v) => *v,
            Expr::Input(k) => (row >> k) & 1 == 1,
            Expr::Not(a) => !a.eval(row),
            Expr::And(a, b) => a.eval(row) && b.eval(row),
            Expr::Xor(a, b) => a.eval(row) ^ b.eval(row),
            Expr::Or(a, b) => a.eval(row) || b.eval(row),
            Expr::Maj(a, b, c) => {
                let (a, b, c) = (a.eval(row), b.eval(row), c.eval(row));
                (a as u8 + b as u8 + c as u8) >= 2
            }
        }
    }

    /// The truth table over `inputs` inputs (at most 6): bit r is the value
    /// on row r. Bits above row `2^inputs - 1` are zero.
    ///
    /// # Panics
    /// If `inputs > 6` or the expression refers to an input `>= inputs`.
    pub fn truth(&self, inputs: usize) -> u64 {
        assert!(inputs <= 6, "a u64 truth table holds at most 6 inputs");
        let mask = super::table::row_mask(inputs);
        self.word(inputs) & mask
    }

    fn word(&self, inputs: usize) -> u64 {
        match self {
            Expr::Const(false) => 0,
            Expr::Const(true) => u64::MAX,
            Expr::Input(k) => {
                assert!(*k < inputs, "input {k} out of range");
                super::table::projection(*k)
            }
            Expr::Not(a) => !a.word(inputs),
            Expr::And(a, b) => a.word(inputs) & b.word(inputs),
            Expr::Xor(a, b) => a.word(inputs) ^ b.word(inputs),
            Expr::Or(a, b) => a.word(inputs) | b.word(inputs),
            Expr::Maj(a, b, c) => {
                let (a, b, c) = (a.word(inputs), b.word(inputs), c.word(inputs));
                (a & b) | (a & c) | (b & c)
            }
        }
    }

    /// The truth table for any number of inputs (wider than 6 uses bit
    /// vectors), evaluated row by row.
    pub fn truth_table(&self, inputs: usize) -> super::TruthTable {
        if inputs <= 6 {
            super::TruthTable::from_u64(self.truth(inputs), inputs)
        } else {
            super::TruthTable::from_fn(inputs, |row| self.eval(row))
        }
    }
}

/// Parses `text` over the input names `inputs` (input k is `inputs[k]`).
pub fn parse_expression<S: AsRef<str>>(text: &str, inputs: &[S]) -> Result<Expr, ExpressionError> {
    let tokens = tokenize(text)?;
    let mut parser = Parser {
        tokens,
        pos: 0,
        inputs: inputs.iter().map(|s| s.as_ref()).collect(),
        end_column: text.chars().count() + 1,
        nesting: 0,
    };
    if parser.tokens.is_empty() {
        return Err(ExpressionError {
            limit_exceeded: false,
            column: 1,
            message: "empty expression: expected a function of the inputs".into(),
        });
    }
    let (expr, _) = parser.or()?;
    if let Some(tok) = parser.peek() {
        return Err(ExpressionError {
            limit_exceeded: false,
            column: tok.column,
            message: format!(
                "unexpected {} after a complete expression: expected an operator (& ^ |) or the end",
                tok.kind.describe()
            ),
        });
    }
    Ok(expr)
}

/// Parses `text` over `inputs` (at most 6) and returns its truth table.
pub fn expression_truth<S: AsRef<str>>(text: &str, inputs: &[S]) -> Result<u64, ExpressionError> {
    if inputs.len() > 6 {
        return Err(ExpressionError {
            limit_exceeded: false,
            column: 1,
            message: format!("{} inputs: a u64 truth table holds at most 6", inputs.len()),
        });
    }
    Ok(parse_expression(text, inputs)?.truth(inputs.len()))
}

#[derive(Clone, Debug, PartialEq, Eq)]
enum TokenKind {
    Name(String),
    Zero,
    One,
    Not,
    And,
    Xor,
    Or,
    Open,
    Close,
    Comma,
}

impl TokenKind {
    fn describe(&self) -> String {
        match self {
            TokenKind::Name(n) => format!("name '{n}'"),
            TokenKind::Zero => "'0'".into(),
            TokenKind::One => "'1'".into(),
            TokenKind::Not => "'!'".into(),
            TokenKind::And => "'&'".into(),
            TokenKind::Xor => "'^'".into(),
            TokenKind::Or => "'|'".into(),
            TokenKind::Open => "'('".into(),
            TokenKind::Close => "')'".into(),
            TokenKind::Comma => "','".into(),
        }
    }
}

#[derive(Clone, Debug)]
struct Token {
    kind: TokenKind,
    column: usize,
}

fn is_name_start(c: char) -> bool {
    c.is_ascii_alphabetic() || c == '_'
}

fn is_name_char(c: char) -> bool {
    c.is_ascii_alphanumeric() || c == '_'
}

fn tokenize(text: &str) -> Result<Vec<Token>, ExpressionError> {
    let chars: Vec<char> = text.chars().collect();
    let mut tokens = Vec::new();
    let mut i = 0;
    while i < chars.len() {
        let c = chars[i];
        let column = i + 1;
        let simple = match c {
            '!' | '~' => Some(TokenKind::Not),
            '&' => Some(TokenKind::And),
            '^' => Some(TokenKind::Xor),
            '|' => Some(TokenKind::Or),
            '(' => Some(TokenKind::Open),
            ')' => Some(TokenKind::Close),
            ',' => Some(TokenKind::Comma),
            _ => None,
        };
        if let Some(kind) = simple {
            tokens.push(Token { kind, column });
            i += 1;
        } else if c.is_whitespace() {
            i += 1;
        } else if is_name_start(c) {
            let start = i;
            while i < chars.len() && is_name_char(chars[i]) {
                i += 1;
            }
            tokens.push(Token {
                kind: TokenKind::Name(chars[start..i].iter().collect()),
                column,
            });
        } else if c.is_ascii_digit() {
            let start = i;
            while i < chars.len() && is_name_char(chars[i]) {
                i += 1;
            }
            let word: String = chars[start..i].iter().collect();
            let kind = match word.as_str() {
                "0" => TokenKind::Zero,
                "1" => TokenKind::One,
                _ => {
                    return Err(ExpressionError {
                        limit_exceeded: false,
                        column,
                        message: format!(
                            "unexpected '{word}': the only numbers are the constants 0 and 1"
                        ),
                    })
                }
            };
            tokens.push(Token { kind, column });
        } else {
            return Err(ExpressionError {
                limit_exceeded: false,
                column,
                message: format!(
                    "unexpected character '{c}': expected an input name, 0, 1, maj(...), !, ~, &, ^, |, or parentheses"
                ),
            });
        }
    }
    Ok(tokens)
}

struct Parser<'a> {
    tokens: Vec<Token>,
    pos: usize,
    inputs: Vec<&'a str>,
    end_column: usize,
    /// Open parentheses, `!` and `maj(` around the current position.
    nesting: usize,
}

/// A parsed subexpression and the height of its tree.
type Parsed = (Expr, usize);

impl Parser<'_> {
    fn peek(&self) -> Option<&Token> {
        self.tokens.get(self.pos)
    }

    fn eat(&mut self, kind: &TokenKind) -> bool {
        if self.peek().map(|t| &t.kind) == Some(kind) {
            self.pos += 1;
            true
        } else {
            false
        }
    }

    fn expect(&mut self, kind: TokenKind, context: &str) -> Result<(), ExpressionError> {
        if self.eat(&kind) {
            Ok(())
        } else {
            Err(self.error_here(&format!("expected {} {context}", kind.describe())))
        }
    }

    fn error_here(&self, expected: &str) -> ExpressionError {
        match self.peek() {
            Some(tok) => ExpressionError {
                limit_exceeded: false,
                column: tok.column,
                message: format!("found {}: {expected}", tok.kind.describe()),
            },
            None => ExpressionError {
                limit_exceeded: false,
                column: self.end_column,
                message: format!("the expression ends too early: {expected}"),
            },
        }
    }

    fn or(&mut self) -> Result<Parsed, ExpressionError> {
        let (mut left, mut height) = self.xor()?;
        while self.eat(&TokenKind::Or) {
            let column = self.tokens[self.pos - 1].column;
            let (right, right_height) = self.xor()?;
            height = self.taller(height.max(right_height), column)?;
            left = Expr::Or(Box::new(left), Box::new(right));
        }
        Ok((left, height))
    }

    fn xor(&mut self) -> Result<Parsed, ExpressionError> {
        let (mut left, mut height) = self.and()?;
        while self.eat(&TokenKind::Xor) {
            let column = self.tokens[self.pos - 1].column;
            let (right, right_height) = self.and()?;
            height = self.taller(height.max(right_height), column)?;
            left = Expr::Xor(Box::new(left), Box::new(right));
        }
        Ok((left, height))
    }

    fn and(&mut self) -> Result<Parsed, ExpressionError> {
        let (mut left, mut height) = self.unary()?;
        while self.eat(&TokenKind::And) {
            let column = self.tokens[self.pos - 1].column;
            let (right, right_height) = self.unary()?;
            height = self.taller(height.max(right_height), column)?;
            left = Expr::And(Box::new(left), Box::new(right));
        }
        Ok((left, height))
    }

    /// One level more than `height`, refused past [`MAX_HEIGHT`].
    fn taller(&self, height: usize, column: usize) -> Result<usize, ExpressionError> {
        if height + 1 > MAX_HEIGHT {
            return Err(ExpressionError {
                limit_exceeded: true,
                column,
                message: format!(
                    "expression more than {MAX_HEIGHT} operators deep: split the chain or write the cell's function as a truth table"
                ),
            });
        }
        Ok(height + 1)
    }

    /// Enters one more level of parentheses, `!` or `maj(`, refused past
    /// [`MAX_NESTING`].
    fn enter(&mut self, column: usize) -> Result<(), ExpressionError> {
        self.nesting += 1;
        if self.nesting > MAX_NESTING {
            return Err(ExpressionError {
                limit_exceeded: true,
                column,
                message: format!("expression nested more than {MAX_NESTING} deep"),
            });
        }
        Ok(())
    }

    fn unary(&mut self) -> Result<Parsed, ExpressionError> {
        if self.eat(&TokenKind::Not) {
            let column = self.tokens[self.pos - 1].column;
            self.enter(column)?;
            let (inner, height) = self.unary()?;
            self.nesting -= 1;
            let height = self.taller(height, column)?;
            return Ok((Expr::Not(Box::new(inner)), height));
        }
        self.primary()
    }

    fn primary(&mut self) -> Result<Parsed, ExpressionError> {
        let Some(tok) = self.peek().cloned() else {
            return Err(self.error_here("expected an input name, 0, 1, maj(...), ! or '('"));
        };
        match tok.kind {
            TokenKind::Zero => {
                self.pos += 1;
                Ok((Expr::Const(false), 1))
            }
            TokenKind::One => {
                self.pos += 1;
                Ok((Expr::Const(true), 1))
            }
            TokenKind::Open => {
                self.pos += 1;
                self.enter(tok.column)?;
                let inner = self.or()?;
                self.expect(TokenKind::Close, "to close the '(' opened here earlier")?;
                self.nesting -= 1;
                Ok(inner)
            }
            TokenKind::Name(name) => {
                self.pos += 1;
                let is_call = self.peek().map(|t| &t.kind) == Some(&TokenKind::Open);
                if name == "maj" && is_call {
                    self.pos += 1;
                    self.enter(tok.column)?;
                    let (a, ha) = self.or()?;
                    self.expect(TokenKind::Comma, "between the arguments of maj")?;
                    let (b, hb) = self.or()?;
                    self.expect(TokenKind::Comma, "between the arguments of maj")?;
                    let (c, hc) = self.or()?;
                    self.expect(TokenKind::Close, "after the three arguments of maj")?;
                    self.nesting -= 1;
                    let height = self.taller(ha.max(hb).max(hc), tok.column)?;
                    return Ok((Expr::Maj(Box::new(a), Box::new(b), Box::new(c)), height));
                }
                if is_call {
                    return Err(ExpressionError {
                        limit_exceeded: false,
                        column: tok.column,
                        message: format!(
                            "unknown function '{name}': the only function is maj(x, y, z)"
                        ),
                    });
                }
                match self.inputs.iter().position(|n| *n == name) {
                    Some(k) => Ok((Expr::Input(k), 1)),
                    None => Err(ExpressionError {
                        limit_exceeded: false,
                        column: tok.column,
                        message: format!(
                            "unknown name '{name}': the inputs are {}",
                            if self.inputs.is_empty() {
                                "none".to_string()
                            } else {
                                self.inputs.join(", ")
                            }
                        ),
                    }),
                }
            }
            _ => Err(self.error_here("expected an input name, 0, 1, maj(...), ! or '('")),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn precedence_not_and_xor_or() {
        let names = ["a", "b", "c", "d"];
        let e = parse_expression("a | b & !c ^ d", &names).unwrap();
        for row in 0..16u64 {
            let v = |k: u64| (row >> k) & 1 == 1;
            assert_eq!(e.eval(row), v(0) || ((v(1) && !v(2)) ^ v(3)));
        }
    }

    #[test]
    fn majority_and_xor3_match_the_convention() {
        // Truth-table convention (docs/library-format.md): maj3 = 0xE8, xor3 = 0x96.
        assert_eq!(
            expression_truth("maj(a, b, c)", &["a", "b", "c"]).unwrap(),
            0xE8
        );
        assert_eq!(
            expression_truth("a ^ b ^ c", &["a", "b", "c"]).unwrap(),
            0x96
        );
        assert_eq!(expression_truth("~(a & b)", &["a", "b"]).unwrap(), 0x7);
        assert_eq!(expression_truth("1", &["a"]).unwrap(), 0x3);
    }

    #[test]
    fn errors_point_at_the_column() {
        let e = parse_expression("a & q", &["a", "b"]).unwrap_err();
        assert_eq!(e.column, 5);
        let e = parse_expression("a & (b | ", &["a", "b"]).unwrap_err();
        assert_eq!(e.column, 10);
        let e = parse_expression("a $ b", &["a", "b"]).unwrap_err();
        assert_eq!(e.column, 3);
        let e = parse_expression("maj(a, b)", &["a", "b"]).unwrap_err();
        assert_eq!(e.column, 9);
        let e = parse_expression("a b", &["a", "b"]).unwrap_err();
        assert_eq!(e.column, 3);
    }

    #[test]
    fn hostile_nesting_and_chains_are_refused_not_overflowing_the_stack() {
        // Issue 18, crash 4: about 8,000 nested parentheses overflowed the
        // stack. Each case is refused at the first token past the limit.
        let deep = format!("{}a{}", "(".repeat(8000), ")".repeat(8000));
        let e = parse_expression(&deep, &["a"]).unwrap_err();
        assert_eq!(e.column, MAX_NESTING + 1, "{e}");
        let nots = format!("{}a", "!".repeat(100_000));
        assert!(parse_expression(&nots, &["a"]).is_err());
        let majs = format!("{}a{}", "maj(a, a, ".repeat(5000), ")".repeat(5000));
        assert!(parse_expression(&majs, &["a"]).is_err());
        let chain = vec!["a"; 100_000].join(" & ");
        let e = parse_expression(&chain, &["a"]).unwrap_err();
        assert!(e.message.contains("operators deep"), "{e}");
        // Just inside the limits still parses and evaluates (the expected
        // values follow from an even number of complements, common practice).
        let ok = format!("{}a{}", "(".repeat(MAX_NESTING), ")".repeat(MAX_NESTING));
        assert_eq!(parse_expression(&ok, &["a"]).unwrap().truth(1), 0b10);
        let nots = format!("{}a", "!".repeat(MAX_NESTING));
        assert_eq!(parse_expression(&nots, &["a"]).unwrap().truth(1), 0b10);
        let chain = vec!["a"; MAX_HEIGHT - 1].join(" ^ ");
        // An odd number of a's XORed is a.
        assert_eq!(parse_expression(&chain, &["a"]).unwrap().truth(1), 0b10);
    }
}
