//! Where each value of a JSON document starts, so that library errors can
//! name a line and column even though `serde_json::Value` keeps no spans.
//!
//! The scanner runs only on text `serde_json` has already accepted, so it
//! can be forgiving: it records the 1-based line and column (in characters)
//! of every value and every object key under a path such as
//! `/cells/3/function`, and stops quietly if anything looks odd.

use std::collections::HashMap;

/// Start positions of values and keys in a JSON text, by path.
#[derive(Debug, Default)]
pub struct Positions {
    values: HashMap<String, (u32, u32)>,
    keys: HashMap<String, (u32, u32)>,
}

impl Positions {
    /// Scans `text` (which should be valid JSON).
    pub fn scan(text: &str) -> Positions {
        let mut scanner = Scanner {
            bytes: text.as_bytes(),
            pos: 0,
            line: 1,
            column: 1,
            out: Positions::default(),
        };
        scanner.skip_ws();
        let _ = scanner.value(String::new(), 0);
        scanner.out
    }

    /// Line and column where the value at `path` starts, if known.
    pub fn value(&self, path: &str) -> Option<(u32, u32)> {
        self.values.get(path).copied()
    }

    /// Line and column of the key naming the value at `path`, else of the
    /// value itself.
    pub fn key_or_value(&self, path: &str) -> Option<(u32, u32)> {
        self.keys.get(path).copied().or_else(|| self.value(path))
    }
}

struct Scanner<'a> {
    bytes: &'a [u8],
    pos: usize,
    line: u32,
    column: u32,
    out: Positions,
}

const MAX_DEPTH: usize = 200;

impl Scanner<'_> {
    fn bump(&mut self) {
        if let Some(&b) = self.bytes.get(self.pos) {
            self.pos += 1;
            if b == b'\n' {
                self.line += 1;
                self.column = 1;
            } else if b & 0xC0 != 0x80 {
                self.column += 1;
            }
        }
    }

    fn peek(&self) -> Option<u8> {
        self.bytes.get(self.pos).copied()
    }

    fn skip_ws(&mut self) {
        while matches!(self.peek(), Some(b' ' | b'\t' | b'\n' | b'\r')) {
            self.bump();
        }
    }

    fn string(&mut self) -> Option<String> {
        if self.peek() != Some(b'"') {
            return None;
        }
        self.bump();
        let start = self.pos;
        loop {
            match self.peek()? {
                b'"' => break,
                b'\\' => {
                    self.bump();
                    self.bump();
                }
                _ => self.bump(),
            }
        }
        let raw = &self.bytes[start..self.pos];
        self.bump();
        let quoted = format!("\"{}\"", String::from_utf8_lossy(raw));
        serde_json::from_str(&quoted).ok()
    }

    fn value(&mut self, path: String, depth: usize) -> Option<()> {
        if depth > MAX_DEPTH {
            return None;
        }
        self.out
            .values
            .insert(path.clone(), (self.line, self.column));
        match self.peek()? {
            b'{' => {
                self.bump();
                self.skip_ws();
                if self.peek() == Some(b'}') {
                    self.bump();
                    return Some(());
                }
                loop {
                    self.skip_ws();
                    let at = (self.line, self.column);
                    let key = self.string()?;
                    let child = format!("{path}/{key}");
                    self.out.keys.insert(child.clone(), at);
                    self.skip_ws();
                    if self.peek()? != b':' {
                        return None;
                    }
                    self.bump();
                    self.skip_ws();
                    self.value(child, depth + 1)?;
                    self.skip_ws();
                    match self.peek()? {
                        b',' => self.bump(),
                        b'}' => {
                            self.bump();
                            return Some(());
                        }
                        _ => return None,
                    }
                }
            }
            b'[' => {
                self.bump();
                self.skip_ws();
                if self.peek() == Some(b']') {
                    self.bump();
                    return Some(());
                }
                let mut index = 0;
                loop {
                    self.skip_ws();
                    self.value(format!("{path}/{index}"), depth + 1)?;
                    index += 1;
                    self.skip_ws();
                    match self.peek()? {
                        b',' => self.bump(),
                        b']' => {
                            self.bump();
                            return Some(());
                        }
                        _ => return None,
                    }
                }
            }
            b'"' => self.string().map(|_| ()),
            _ => {
                while let Some(b) = self.peek() {
                    if matches!(b, b',' | b'}' | b']' | b' ' | b'\t' | b'\n' | b'\r') {
                        break;
                    }
                    self.bump();
                }
                Some(())
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn finds_nested_values() {
        let text = "{\n  \"cells\": [\n    { \"name\": \"x\", \"área\": 1 },\n    {\"function\": \"a & b\"}\n  ]\n}";
        let p = Positions::scan(text);
        assert_eq!(p.value("/cells/0/name"), Some((3, 15)));
        assert_eq!(p.key_or_value("/cells/0/área"), Some((3, 20)));
        assert_eq!(p.value("/cells/0/área"), Some((3, 28)));
        assert_eq!(p.value("/cells/1/function"), Some((4, 18)));
    }
}
