//! Truth tables: a u64 word for up to six inputs, a bit vector beyond.
//!
//! The word helpers ([`projection`], [`row_mask`], [`negate_input_word`],
//! [`swap_inputs_word`], ...) are what the hot paths (NPN canonisation, cut
//! functions) use directly on `u64`s; [`TruthTable`] wraps them with its
//! input count and falls back to a `bitvec` for wider functions.
//!
//! Convention: bit r is the value on row r; row r gives input k the value of
//! bit k of r. A word table over n < 6 inputs keeps its rows in the low
//! `2^n` bits and zeros above.

use bitvec::prelude::*;
use std::fmt;

/// Bits of a six-input word where input k is 1 (the projection onto input k).
const PROJECTIONS: [u64; 6] = [
    0xAAAA_AAAA_AAAA_AAAA,
    0xCCCC_CCCC_CCCC_CCCC,
    0xF0F0_F0F0_F0F0_F0F0,
    0xFF00_FF00_FF00_FF00,
    0xFFFF_0000_FFFF_0000,
    0xFFFF_FFFF_0000_0000,
];

/// The word whose bit r is bit k of r (input k as a function), k < 6.
pub fn projection(k: usize) -> u64 {
    PROJECTIONS[k]
}

/// The mask of the `2^inputs` rows of a word table (all ones for 6 inputs).
pub fn row_mask(inputs: usize) -> u64 {
    if inputs >= 6 {
        u64::MAX
    } else {
        (1u64 << (1u64 << inputs)) - 1
    }
}

/// `f` with input k complemented: g(x) = f(x with bit k flipped).
pub fn negate_input_word(f: u64, k: usize) -> u64 {
    let shift = 1u32 << k;
    let high = PROJECTIONS[k];
    ((f & high) >> shift) | ((f & !high) << shift)
}

/// `f` with inputs i and j exchanged: g(x) = f(x with bits i and j swapped).
pub fn swap_inputs_word(f: u64, i: usize, j: usize) -> u64 {
    if i == j {
        return f;
    }
    let (i, j) = if i < j { (i, j) } else { (j, i) };
    let shift = (1u32 << j) - (1u32 << i);
    // Rows with bit i = 1 and bit j = 0 move up; bit i = 0, bit j = 1 move down.
    let up = PROJECTIONS[i] & !PROJECTIONS[j];
    let down = !PROJECTIONS[i] & PROJECTIONS[j];
    (f & !(up | down)) | ((f & up) << shift) | ((f & down) >> shift)
}

/// Cofactor of a word table: `f` with input k fixed to `value`, still over
/// the same inputs (the result no longer depends on input k).
pub fn cofactor_word(f: u64, k: usize, value: bool) -> u64 {
    let shift = 1u32 << k;
    let high = PROJECTIONS[k];
    if value {
        let part = f & high;
        part | (part >> shift)
    } else {
        let part = f & !high;
        part | (part << shift)
    }
}

/// Whether the word table `f` depends on input k.
pub fn depends_on_word(f: u64, k: usize) -> bool {
    cofactor_word(f, k, false) != cofactor_word(f, k, true)
}

/// Bit mask of the inputs among the first `inputs` that `f` depends on.
pub fn support_word(f: u64, inputs: usize) -> u32 {
    let f = f & row_mask(inputs);
    (0..inputs.min(6))
        .filter(|&k| depends_on_word(f, k))
        .fold(0, |m, k| m | (1 << k))
}

/// Repeats the `2^inputs` low bits of `f` through the whole word, so the table
/// reads as the same function of six inputs with the extra inputs unused.
pub fn replicate_word(f: u64, inputs: usize) -> u64 {
    let mut f = f & row_mask(inputs);
    let mut width = 1u32 << inputs.min(6);
    while width < 64 {
        f |= f << width;
        width *= 2;
    }
    f
}

/// Parses a truth table written in hex (`0xE8`) or binary (`0b11101000`, or
/// just the digits `11101000` when exactly `2^inputs` long) for `inputs`
/// inputs (at most 6). Binary digits are written most significant row first.
pub fn parse_truth_word(text: &str, inputs: usize) -> Result<u64, String> {
    let t = text.trim();
    if inputs > 6 {
        return Err(format!(
            "{inputs} inputs: a u64 truth table holds at most 6"
        ));
    }
    let rows = 1usize << inputs;
    let (digits, radix) = if let Some(h) = t.strip_prefix("0x").or_else(|| t.strip_prefix("0X")) {
        (h, 16)
    } else if let Some(b) = t.strip_prefix("0b").or_else(|| t.strip_prefix("0B")) {
        (b, 2)
    } else if !t.is_empty() && t.len() == rows && t.chars().all(|c| c == '0' || c == '1') {
        (t, 2)
    } else {
        return Err(format!(
            "'{t}' is not a truth table: write hex as 0x.. or binary as 0b.. (or {rows} binary digits)"
        ));
    };
    let digits: String = digits.chars().filter(|&c| c != '_').collect();
    if digits.is_empty() {
        return Err(format!("'{t}' has no digits"));
    }
    let value = u64::from_str_radix(&digits, radix)
        .map_err(|_| format!("'{t}' is not a valid base-{radix} number of at most 64 bits"))?;
    if value & !row_mask(inputs) != 0 {
        return Err(format!(
            "'{t}' has bits above row {}: a function of {inputs} inputs has {rows} rows",
            rows - 1
        ));
    }
    Ok(value)
}

#[derive(Clone, PartialEq, Eq, Hash)]
enum Bits {
    Word(u64),
    Wide(BitVec<u64, Lsb0>),
}

/// A Boolean function of `inputs` inputs as its table of values.
#[derive(Clone, PartialEq, Eq, Hash)]
pub struct TruthTable {
    inputs: usize,
    bits: Bits,
}

impl fmt::Debug for TruthTable {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "TruthTable({} inputs, {})", self.inputs, self.to_hex())
    }
}

impl fmt::Display for TruthTable {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.to_hex())
    }
}

impl TruthTable {
    /// The constant-0 function of `inputs` inputs.
    pub fn zero(inputs: usize) -> TruthTable {
        if inputs <= 6 {
            TruthTable {
                inputs,
                bits: Bits::Word(0),
            }
        } else {
            TruthTable {
                inputs,
                bits: Bits::Wide(bitvec![u64, Lsb0; 0; 1 << inputs]),
            }
        }
    }

    /// The constant-1 function of `inputs` inputs.
    pub fn one(inputs: usize) -> TruthTable {
        TruthTable::zero(inputs).not()
    }

    /// Input `k` as a function of `inputs` inputs.
    pub fn variable(k: usize, inputs: usize) -> TruthTable {
        assert!(k < inputs, "input {k} out of range for {inputs} inputs");
        if inputs <= 6 {
            TruthTable::from_u64(projection(k), inputs)
        } else {
            TruthTable::from_fn(inputs, |row| (row >> k) & 1 == 1)
        }
    }

    /// A table from a word (at most 6 inputs); bits above the rows are dropped.
    pub fn from_u64(truth: u64, inputs: usize) -> TruthTable {
        assert!(inputs <= 6, "a u64 truth table holds at most 6 inputs");
        TruthTable {
            inputs,
            bits: Bits::Word(truth & row_mask(inputs)),
        }
    }

    /// A table whose row r is `value(r)`.
    pub fn from_fn(inputs: usize, mut value: impl FnMut(u64) -> bool) -> TruthTable {
        let mut t = TruthTable::zero(inputs);
        for row in 0..(1u64 << inputs) {
            if value(row) {
                t.set(row, true);
            }
        }
        t
    }

    /// Number of inputs.
    pub fn inputs(&self) -> usize {
        self.inputs
    }

    /// Number of rows, `2^inputs`.
    pub fn rows(&self) -> u64 {
        1u64 << self.inputs
    }

    /// The table as a word, if it has at most 6 inputs.
    pub fn as_u64(&self) -> Option<u64> {
        match &self.bits {
            Bits::Word(w) => Some(*w),
            Bits::Wide(_) => None,
        }
    }

    /// The value on row `row`.
    pub fn get(&self, row: u64) -> bool {
        match &self.bits {
            Bits::Word(w) => (w >> row) & 1 == 1,
            Bits::Wide(v) => v[row as usize],
        }
    }

    /// Sets the value on row `row`.
    pub fn set(&mut self, row: u64, value: bool) {
        match &mut self.bits {
            Bits::Word(w) => {
                if value {
                    *w |= 1 << row
                } else {
                    *w &= !(1 << row)
                }
            }
            Bits::Wide(v) => v.set(row as usize, value),
        }
    }

    /// Number of rows where the function is 1.
    pub fn count_ones(&self) -> u64 {
        match &self.bits {
            Bits::Word(w) => w.count_ones() as u64,
            Bits::Wide(v) => v.count_ones() as u64,
        }
    }

    /// Whether the function is constant 0.
    pub fn is_zero(&self) -> bool {
        self.count_ones() == 0
    }

    fn zip(
        &self,
        other: &TruthTable,
        word: impl Fn(u64, u64) -> u64,
        bit: impl Fn(bool, bool) -> bool,
    ) -> TruthTable {
        assert_eq!(
            self.inputs, other.inputs,
            "truth tables over different input counts"
        );
        match (&self.bits, &other.bits) {
            (Bits::Word(a), Bits::Word(b)) => TruthTable::from_u64(word(*a, *b), self.inputs),
            _ => TruthTable::from_fn(self.inputs, |r| bit(self.get(r), other.get(r))),
        }
    }

    /// Conjunction. Panics if the input counts differ.
    pub fn and(&self, other: &TruthTable) -> TruthTable {
        self.zip(other, |a, b| a & b, |a, b| a & b)
    }

    /// Disjunction. Panics if the input counts differ.
    pub fn or(&self, other: &TruthTable) -> TruthTable {
        self.zip(other, |a, b| a | b, |a, b| a | b)
    }

    /// Exclusive or. Panics if the input counts differ.
    pub fn xor(&self, other: &TruthTable) -> TruthTable {
        self.zip(other, |a, b| a ^ b, |a, b| a ^ b)
    }

    /// Complement.
    pub fn not(&self) -> TruthTable {
        match &self.bits {
            Bits::Word(w) => TruthTable::from_u64(!w, self.inputs),
            Bits::Wide(v) => TruthTable {
                inputs: self.inputs,
                bits: Bits::Wide(!v.clone()),
            },
        }
    }

    /// Cofactor: input `k` fixed to `value`; same inputs, no longer depending on `k`.
    pub fn cofactor(&self, k: usize, value: bool) -> TruthTable {
        assert!(k < self.inputs);
        match &self.bits {
            Bits::Word(w) => TruthTable::from_u64(cofactor_word(*w, k, value), self.inputs),
            Bits::Wide(_) => TruthTable::from_fn(self.inputs, |r| {
                let r = if value { r | (1 << k) } else { r & !(1 << k) };
                self.get(r)
            }),
        }
    }

    /// Whether the function depends on input `k`.
    pub fn depends_on(&self, k: usize) -> bool {
        self.cofactor(k, false) != self.cofactor(k, true)
    }

    /// The inputs the function depends on, in increasing order.
    pub fn support(&self) -> Vec<usize> {
        (0..self.inputs).filter(|&k| self.depends_on(k)).collect()
    }

    /// The function with inputs `i` and `j` exchanged.
    pub fn swap_inputs(&self, i: usize, j: usize) -> TruthTable {
        assert!(i < self.inputs && j < self.inputs);
        match &self.bits {
            Bits::Word(w) => TruthTable::from_u64(swap_inputs_word(*w, i, j), self.inputs),
            Bits::Wide(_) => TruthTable::from_fn(self.inputs, |r| {
                let (bi, bj) = ((r >> i) & 1, (r >> j) & 1);
                let s = (r & !(1 << i) & !(1 << j)) | (bi << j) | (bj << i);
                self.get(s)
            }),
        }
    }

    /// The function with input `k` complemented.
    pub fn negate_input(&self, k: usize) -> TruthTable {
        assert!(k < self.inputs);
        match &self.bits {
            Bits::Word(w) => TruthTable::from_u64(negate_input_word(*w, k), self.inputs),
            Bits::Wide(_) => TruthTable::from_fn(self.inputs, |r| self.get(r ^ (1 << k))),
        }
    }

    /// The same function over `inputs >= self.inputs()` inputs; the new
    /// inputs (numbered after the old ones) are unused.
    pub fn extend_to(&self, inputs: usize) -> TruthTable {
        assert!(inputs >= self.inputs);
        let old_rows = self.rows();
        match &self.bits {
            Bits::Word(w) if inputs <= 6 => {
                TruthTable::from_u64(replicate_word(*w, self.inputs), inputs)
            }
            _ => TruthTable::from_fn(inputs, |r| self.get(r % old_rows)),
        }
    }

    /// Drops unused inputs: the function over its support only, and for each
    /// new input the old input number it came from.
    pub fn shrink_to_support(&self) -> (TruthTable, Vec<usize>) {
        let support = self.support();
        let shrunk = TruthTable::from_fn(support.len(), |r| {
            let old_row = support
                .iter()
                .enumerate()
                .fold(0u64, |acc, (new, &old)| acc | (((r >> new) & 1) << old));
            self.get(old_row)
        });
        (shrunk, support)
    }

    /// Hexadecimal form, `0x` and `ceil(2^inputs / 4)` digits, most significant row first.
    pub fn to_hex(&self) -> String {
        let rows = self.rows();
        let digits = rows.div_ceil(4);
        let mut s = String::from("0x");
        for d in (0..digits).rev() {
            let mut nibble = 0u32;
            for b in 0..4 {
                let row = d * 4 + b;
                if row < rows && self.get(row) {
                    nibble |= 1 << b;
                }
            }
            s.push(
                char::from_digit(nibble, 16)
                    .unwrap_or('0')
                    .to_ascii_uppercase(),
            );
        }
        s
    }

    /// Binary form, most significant row first (`2^inputs` digits).
    pub fn to_binary(&self) -> String {
        (0..self.rows())
            .rev()
            .map(|r| if self.get(r) { '1' } else { '0' })
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn word_and_wide_agree() {
        // maj(x0, x1, x2) & x3 as 4-input and the same over 7 inputs.
        let small = TruthTable::from_fn(4, |r| (r & 7).count_ones() >= 2 && (r >> 3) & 1 == 1);
        let wide = small.extend_to(7);
        assert_eq!(wide.support(), vec![0, 1, 2, 3]);
        assert_eq!(small.swap_inputs(0, 3).swap_inputs(0, 3), small);
        let w = wide.swap_inputs(1, 5).negate_input(2);
        let s = TruthTable::from_fn(7, |r| {
            let r2 = r ^ 4;
            let (b1, b5) = ((r2 >> 1) & 1, (r2 >> 5) & 1);
            let s = (r2 & !(1 << 1) & !(1 << 5)) | (b1 << 5) | (b5 << 1);
            wide.get(s)
        });
        assert_eq!(w, s);
        let (shrunk, from) = wide.shrink_to_support();
        assert_eq!(shrunk, small);
        assert_eq!(from, vec![0, 1, 2, 3]);
    }

    #[test]
    fn word_helpers_follow_the_convention() {
        // maj3 = 0xE8 is symmetric; and2 with input 0 negated: !a & b = 0x4.
        assert_eq!(swap_inputs_word(0xE8, 0, 2), 0xE8);
        assert_eq!(negate_input_word(0x8, 0) & 0xF, 0x4);
        assert_eq!(cofactor_word(0xE8, 2, true) & 0xFF, 0xEE);
        assert_eq!(support_word(0x88, 3), 0b011);
        assert_eq!(parse_truth_word("0xE8", 3), Ok(0xE8));
        assert_eq!(parse_truth_word("0b1000", 2), Ok(0x8));
        assert_eq!(parse_truth_word("1000", 2), Ok(0x8));
        assert!(parse_truth_word("0x1E8", 3).is_err());
        assert_eq!(TruthTable::from_u64(0xE8, 3).to_hex(), "0xE8");
        assert_eq!(TruthTable::from_u64(0x1, 1).to_hex(), "0x1");
    }
}
