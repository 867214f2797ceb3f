//! Tokens of structural Verilog.
//!
//! A streaming lexer with two tokens of lookahead: identifiers (escaped
//! identifiers `\a[0] ` come back without the backslash and with
//! `escaped` set, so they are never keywords), numbers as their source text
//! (parsed by [`parse_number`] where a value is needed), and punctuation.
//! Comments, attributes `(* ... *)` and the harmless compiler directives
//! (`` `timescale ``, `` `default_nettype ``, `` `celldefine ``,
//! `` `endcelldefine ``, `` `resetall ``) are skipped; any other directive is
//! an error because macros are not expanded.

use super::flat::Loc;
use crate::diag::SourceError;

/// What a token is.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum Kind {
    /// An identifier or keyword.
    Ident,
    /// An escaped identifier (never a keyword).
    Escaped,
    /// A number literal, as written.
    Number,
    /// Punctuation or an operator.
    Symbol,
    /// End of the file.
    Eof,
}

/// One token with its position.
#[derive(Clone, Copy, Debug)]
pub(crate) struct Token<'a> {
    pub kind: Kind,
    pub text: &'a str,
    pub loc: Loc,
}

impl Token<'_> {
    /// True for the keyword or symbol `s` (escaped identifiers never match).
    pub fn is(&self, s: &str) -> bool {
        matches!(self.kind, Kind::Ident | Kind::Symbol) && self.text == s
    }

    /// True for an identifier (plain or escaped).
    pub fn is_name(&self) -> bool {
        matches!(self.kind, Kind::Ident | Kind::Escaped)
    }

    /// How the token reads in an error message.
    pub fn describe(&self) -> String {
        match self.kind {
            Kind::Eof => "end of file".to_string(),
            Kind::Escaped => format!("'\\{}'", self.text),
            _ => format!("'{}'", self.text),
        }
    }
}

const SYMBOLS3: &[&str] = &["===", "!=="];
const SYMBOLS2: &[&str] = &[
    "~^", "^~", "~&", "~|", "<=", ">=", "==", "!=", "&&", "||", "<<", ">>", "**", "->",
];

/// The lexer.
pub(crate) struct Lexer<'a> {
    src: &'a str,
    pos: usize,
    line: u32,
    line_start: usize,
    file: &'a str,
    ahead: Vec<Token<'a>>,
}

impl<'a> Lexer<'a> {
    /// A lexer over `src`, reporting errors against `file`.
    pub fn new(src: &'a str, file: &'a str) -> Self {
        Lexer {
            src,
            pos: 0,
            line: 1,
            line_start: 0,
            file,
            ahead: Vec::new(),
        }
    }

    /// An error at `loc`.
    pub fn error(&self, loc: Loc, msg: impl Into<String>) -> SourceError {
        SourceError::new(self.file, loc.0, loc.1, msg)
    }

    /// The next token without consuming it.
    pub fn peek(&mut self) -> Result<Token<'a>, SourceError> {
        self.fill(1)?;
        Ok(self.ahead[0])
    }

    /// The token after the next one.
    pub fn peek2(&mut self) -> Result<Token<'a>, SourceError> {
        self.fill(2)?;
        Ok(self.ahead[1])
    }

    /// Consumes and returns the next token.
    pub fn next_token(&mut self) -> Result<Token<'a>, SourceError> {
        self.fill(1)?;
        Ok(self.ahead.remove(0))
    }

    fn fill(&mut self, n: usize) -> Result<(), SourceError> {
        while self.ahead.len() < n {
            let t = self.lex()?;
            self.ahead.push(t);
        }
        Ok(())
    }

    fn loc(&self) -> Loc {
        (self.line, (self.pos - self.line_start) as u32 + 1)
    }

    fn bump(&mut self) {
        if self.src.as_bytes()[self.pos] == b'\n' {
            self.line += 1;
            self.line_start = self.pos + 1;
        }
        self.pos += 1;
    }

    fn skip_space_and_comments(&mut self) -> Result<(), SourceError> {
        let b = self.src.as_bytes();
        loop {
            while self.pos < b.len() && b[self.pos].is_ascii_whitespace() {
                self.bump();
            }
            if b[self.pos..].starts_with(b"//") {
                while self.pos < b.len() && b[self.pos] != b'\n' {
                    self.pos += 1;
                }
            } else if b[self.pos..].starts_with(b"/*") {
                let start = self.loc();
                self.pos += 2;
                loop {
                    if self.pos >= b.len() {
                        return Err(
                            self.error(start, "comment '/*' is never closed (expected '*/')")
                        );
                    }
                    if b[self.pos..].starts_with(b"*/") {
                        self.pos += 2;
                        break;
                    }
                    self.bump();
                }
            } else if b[self.pos..].starts_with(b"(*") && !b[self.pos..].starts_with(b"(*)") {
                let start = self.loc();
                self.pos += 2;
                loop {
                    if self.pos >= b.len() {
                        return Err(
                            self.error(start, "attribute '(*' is never closed (expected '*)')")
                        );
                    }
                    if b[self.pos..].starts_with(b"*)") {
                        self.pos += 2;
                        break;
                    }
                    self.bump();
                }
            } else if self.pos < b.len() && b[self.pos] == b'`' {
                let start = self.loc();
                let end = self.src[self.pos..]
                    .find('\n')
                    .map_or(b.len(), |i| self.pos + i);
                let directive = self.src[self.pos + 1..end]
                    .split(|c: char| !c.is_ascii_alphanumeric() && c != '_')
                    .next()
                    .unwrap_or("");
                if !matches!(
                    directive,
                    "timescale" | "default_nettype" | "celldefine" | "endcelldefine" | "resetall"
                ) {
                    return Err(self.error(
                        start,
                        format!("compiler directive '`{directive}' is not supported (expected structural Verilog without macros)"),
                    ));
                }
                self.pos = end;
            } else {
                return Ok(());
            }
        }
    }

    fn lex(&mut self) -> Result<Token<'a>, SourceError> {
        self.skip_space_and_comments()?;
        let b = self.src.as_bytes();
        let loc = self.loc();
        if self.pos >= b.len() {
            return Ok(Token {
                kind: Kind::Eof,
                text: "",
                loc,
            });
        }
        let c = b[self.pos];
        let start = self.pos;
        if c.is_ascii_alphabetic() || c == b'_' {
            while self.pos < b.len()
                && (b[self.pos].is_ascii_alphanumeric()
                    || b[self.pos] == b'_'
                    || b[self.pos] == b'$')
            {
                self.pos += 1;
            }
            return Ok(Token {
                kind: Kind::Ident,
                text: &self.src[start..self.pos],
                loc,
            });
        }
        if c == b'\\' {
            self.pos += 1;
            while self.pos < b.len() && !b[self.pos].is_ascii_whitespace() {
                self.pos += 1;
            }
            if self.pos == start + 1 {
                return Err(self.error(
                    loc,
                    "empty escaped identifier (expected characters after '\\')",
                ));
            }
            // Names are written back to BLIF, where '#' starts a comment
            // and a trailing backslash continues the line.
            let name = &self.src[start + 1..self.pos];
            if name.contains('#') || name.ends_with('\\') || name.contains(|c: char| c.is_control())
            {
                return Err(self.error(
                    loc,
                    format!("escaped identifier '\\{name}' holds '#', a control character or a trailing backslash (expected a name the netlist formats can all hold)"),
                ));
            }
            return Ok(Token {
                kind: Kind::Escaped,
                text: &self.src[start + 1..self.pos],
                loc,
            });
        }
        if c.is_ascii_digit() || c == b'\'' {
            return self.number(loc);
        }
        if c.is_ascii() {
            for set in [SYMBOLS3, SYMBOLS2] {
                for s in set {
                    if b[self.pos..].starts_with(s.as_bytes()) {
                        self.pos += s.len();
                        return Ok(Token {
                            kind: Kind::Symbol,
                            text: s,
                            loc,
                        });
                    }
                }
            }
            if b"()[]{},;:.=#@~!&|^?+-*/<>%$".contains(&c) {
                self.pos += 1;
                return Ok(Token {
                    kind: Kind::Symbol,
                    text: &self.src[start..self.pos],
                    loc,
                });
            }
        }
        let ch = self.src[self.pos..].chars().next().unwrap_or('?');
        Err(self.error(
            loc,
            format!("unexpected character {ch:?} (expected Verilog text)"),
        ))
    }

    fn number(&mut self, loc: Loc) -> Result<Token<'a>, SourceError> {
        let b = self.src.as_bytes();
        let start = self.pos;
        while self.pos < b.len() && (b[self.pos].is_ascii_digit() || b[self.pos] == b'_') {
            self.pos += 1;
        }
        // Real numbers (delays such as #1.5) keep their fraction.
        if self.pos + 1 < b.len() && b[self.pos] == b'.' && b[self.pos + 1].is_ascii_digit() {
            self.pos += 1;
            while self.pos < b.len() && b[self.pos].is_ascii_digit() {
                self.pos += 1;
            }
            return Ok(Token {
                kind: Kind::Number,
                text: &self.src[start..self.pos],
                loc,
            });
        }
        let mut look = self.pos;
        while look < b.len() && (b[look] == b' ' || b[look] == b'\t') {
            look += 1;
        }
        if look < b.len() && b[look] == b'\'' {
            self.pos = look + 1;
            if self.pos < b.len() && (b[self.pos] == b's' || b[self.pos] == b'S') {
                self.pos += 1;
            }
            if self.pos >= b.len() || !b"bBoOdDhH".contains(&b[self.pos]) {
                return Err(self.error(
                    loc,
                    "malformed number (expected a base b, o, d or h after the apostrophe)",
                ));
            }
            self.pos += 1;
            while self.pos < b.len() && (b[self.pos] == b' ' || b[self.pos] == b'\t') {
                self.pos += 1;
            }
            let digits = self.pos;
            while self.pos < b.len()
                && (b[self.pos].is_ascii_alphanumeric()
                    || b[self.pos] == b'_'
                    || b[self.pos] == b'?')
            {
                self.pos += 1;
            }
            if self.pos == digits {
                return Err(self.error(loc, "malformed number (expected digits after the base)"));
            }
        }
        Ok(Token {
            kind: Kind::Number,
            text: &self.src[start..self.pos],
            loc,
        })
    }
}

/// The value of a number literal: its bits, least significant first, and
/// whether a width was given. Unsized literals are 32 bits wide.
pub(crate) fn parse_number(text: &str) -> Result<(Vec<bool>, bool), String> {
    let clean: String = text
        .chars()
        .filter(|c| !c.is_whitespace() && *c != '_')
        .collect();
    let (width, rest) = match clean.find('\'') {
        Some(0) => (None, &clean[1..]),
        Some(i) => {
            let w: u32 = clean[..i]
                .parse()
                .map_err(|_| format!("bad width in number '{text}'"))?;
            if w == 0 || w > 4096 {
                return Err(format!(
                    "number '{text}' has width {w} (expected 1 to 4096)"
                ));
            }
            (Some(w), &clean[i + 1..])
        }
        None => {
            if clean.contains('.') {
                return Err(format!("real number '{text}' (expected an integer)"));
            }
            let v: u128 = clean
                .parse()
                .map_err(|_| format!("number '{text}' is too large"))?;
            if v > u32::MAX as u128 {
                return Err(format!("unsized number '{text}' does not fit in 32 bits"));
            }
            return Ok(((0..32).map(|i| (v >> i) & 1 == 1).collect(), false));
        }
    };
    let rest = rest.strip_prefix(['s', 'S']).unwrap_or(rest);
    let mut chars = rest.chars();
    let base = chars.next().map(|c| c.to_ascii_lowercase());
    let digits: &str = chars.as_str();
    if digits.is_empty() {
        return Err(format!("number '{text}' has no digits"));
    }
    if digits
        .chars()
        .any(|c| matches!(c, 'x' | 'X' | 'z' | 'Z' | '?'))
    {
        return Err(format!(
            "number '{text}' has x or z digits (expected 0 and 1 only)"
        ));
    }
    let mut bits: Vec<bool> = Vec::new();
    match base {
        Some('d') => {
            let v: u128 = digits
                .parse()
                .map_err(|_| format!("bad decimal digits in '{text}'"))?;
            bits = (0..128).map(|i| (v >> i) & 1 == 1).collect();
        }
        Some(b @ ('b' | 'o' | 'h')) => {
            let (radix, per) = match b {
                'b' => (2, 1),
                'o' => (8, 3),
                _ => (16, 4),
            };
            for c in digits.chars().rev() {
                let v = c
                    .to_digit(radix)
                    .ok_or_else(|| format!("digit '{c}' is not valid in '{text}'"))?;
                for i in 0..per {
                    bits.push((v >> i) & 1 == 1);
                }
            }
        }
        _ => return Err(format!("bad base in number '{text}'")),
    }
    let w = width.unwrap_or(32) as usize;
    bits.resize(w.max(1), false);
    Ok((bits, width.is_some()))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_parse_lsb_first() {
        let (b, sized) = parse_number("4'hA").unwrap();
        assert!(sized);
        assert_eq!(b, vec![false, true, false, true]);
        let (b, sized) = parse_number("'d3").unwrap();
        assert!(!sized);
        assert_eq!(b.len(), 32);
        assert!(b[0] && b[1] && !b[2]);
        assert_eq!(parse_number("1'b0").unwrap().0, vec![false]);
        assert!(parse_number("2'bx1").is_err());
    }
}
