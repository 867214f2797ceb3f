//! Small AND-inverter structures for functions of up to four variables,
//! from an irredundant sum of products and algebraic factoring.
//!
//! [`structure`] computes an irredundant sum of products of a 16-bit truth
//! table (Minato–Morreale recursion on cofactors), factors it by repeatedly
//! dividing by the literal that occurs in most cubes (with the largest cube
//! common to those cubes), and writes the factored form as a list of
//! two-input AND steps over complemented or plain leaves. OR is an AND of
//! complements with the output complemented, so the step count is the
//! literal count of the factored form minus one. The rewriting pass asks for
//! both output phases and keeps what shares best with the existing logic.

/// Rows where variable `v` is 1, for four variables.
pub const VAR4: [u16; 4] = [0xAAAA, 0xCCCC, 0xF0F0, 0xFF00];

/// An operand of a step: a leaf, an earlier step, or a constant, with a
/// complement flag. Encoded as `kind` plus index.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Operand {
    /// Leaf `var`, complemented when the flag is set.
    Leaf(u8, bool),
    /// The output of step `index`, complemented when the flag is set.
    Step(u8, bool),
    /// A constant.
    Constant(bool),
}

impl Operand {
    /// The operand with its complement flag flipped.
    pub fn complement(self) -> Operand {
        match self {
            Operand::Leaf(v, c) => Operand::Leaf(v, !c),
            Operand::Step(i, c) => Operand::Step(i, !c),
            Operand::Constant(c) => Operand::Constant(!c),
        }
    }
}

/// A tree of two-input ANDs computing one function of the leaves.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Structure {
    /// The AND steps in order; each refers only to earlier steps.
    pub steps: Vec<[Operand; 2]>,
    /// The output.
    pub output: Operand,
}

impl Structure {
    /// The 16-bit truth table the structure computes.
    pub fn truth(&self) -> u16 {
        let mut values: Vec<u16> = Vec::with_capacity(self.steps.len());
        let value = |o: Operand, values: &[u16]| -> u16 {
            let (t, c) = match o {
                Operand::Leaf(v, c) => (VAR4[v as usize], c),
                Operand::Step(i, c) => (values[i as usize], c),
                Operand::Constant(c) => (0, c),
            };
            if c {
                !t
            } else {
                t
            }
        };
        for s in &self.steps {
            let v = value(s[0], &values) & value(s[1], &values);
            values.push(v);
        }
        value(self.output, &values)
    }
}

/// A cube: bit `2v` set when variable v appears plain, `2v + 1` when it
/// appears complemented.
type Cube = u8;

fn cofactors(t: u16, v: usize) -> (u16, u16) {
    let m = VAR4[v];
    let s = 1u32 << v;
    let neg = t & !m;
    let pos = t & m;
    (neg | (neg << s), pos | (pos >> s))
}

/// Irredundant cover of some function between `lower` and `upper`; returns
/// the cover's table and cubes.
fn isop(lower: u16, upper: u16, top: usize, cubes: &mut Vec<Cube>) -> u16 {
    if lower == 0 {
        return 0;
    }
    if upper == u16::MAX {
        cubes.push(0);
        return u16::MAX;
    }
    let mut v = top;
    loop {
        let (l0, l1) = cofactors(lower, v);
        let (u0, u1) = cofactors(upper, v);
        if l0 != l1 || u0 != u1 {
            break;
        }
        // Neither depends on v: a constant bound was handled above, so
        // some lower variable matters.
        v -= 1;
    }
    let (l0, l1) = cofactors(lower, v);
    let (u0, u1) = cofactors(upper, v);
    let start = cubes.len();
    let c0 = isop(l0 & !u1, u0, v.saturating_sub(1), cubes);
    for c in &mut cubes[start..] {
        *c |= 1 << (2 * v + 1);
    }
    let mid = cubes.len();
    let c1 = isop(l1 & !u0, u1, v.saturating_sub(1), cubes);
    for c in &mut cubes[mid..] {
        *c |= 1 << (2 * v);
    }
    let rest_lower = (l0 & !c0) | (l1 & !c1);
    let cs = isop(rest_lower, u0 & u1, v.saturating_sub(1), cubes);
    let m = VAR4[v];
    ((c0 | cs) & !m) | ((c1 | cs) & m)
}

/// A factored form.
enum Form {
    Literal(u8, bool),
    And(Box<Form>, Box<Form>),
    Or(Box<Form>, Box<Form>),
    Constant(bool),
}

fn cube_form(cube: Cube) -> Form {
    let mut form: Option<Form> = None;
    for bit in 0..8u8 {
        if cube & (1 << bit) != 0 {
            let lit = Form::Literal(bit / 2, bit % 2 == 1);
            form = Some(match form {
                None => lit,
                Some(f) => Form::And(Box::new(f), Box::new(lit)),
            });
        }
    }
    form.unwrap_or(Form::Constant(true))
}

fn factor(cubes: &[Cube]) -> Form {
    if cubes.is_empty() {
        return Form::Constant(false);
    }
    if cubes.contains(&0) {
        return Form::Constant(true);
    }
    if cubes.len() == 1 {
        return cube_form(cubes[0]);
    }
    let mut best = (0usize, 0u8);
    for bit in 0..8u8 {
        let n = cubes.iter().filter(|&&c| c & (1 << bit) != 0).count();
        if n > best.0 {
            best = (n, bit);
        }
    }
    if best.0 < 2 {
        let mut form = cube_form(cubes[0]);
        for &c in &cubes[1..] {
            form = Form::Or(Box::new(form), Box::new(cube_form(c)));
        }
        return form;
    }
    let with: Vec<Cube> = cubes
        .iter()
        .copied()
        .filter(|&c| c & (1 << best.1) != 0)
        .collect();
    let common = with.iter().fold(0xFF, |acc, &c| acc & c);
    let quotient: Vec<Cube> = with.iter().map(|&c| c & !common).collect();
    let rest: Vec<Cube> = cubes
        .iter()
        .copied()
        .filter(|&c| c & (1 << best.1) == 0)
        .collect();
    let divided = Form::And(Box::new(cube_form(common)), Box::new(factor(&quotient)));
    if rest.is_empty() {
        divided
    } else {
        Form::Or(Box::new(divided), Box::new(factor(&rest)))
    }
}

fn emit(form: &Form, steps: &mut Vec<[Operand; 2]>) -> Operand {
    match form {
        Form::Literal(v, c) => Operand::Leaf(*v, *c),
        Form::Constant(c) => Operand::Constant(*c),
        Form::And(a, b) => {
            let (a, b) = (emit(a, steps), emit(b, steps));
            and_step(a, b, steps)
        }
        Form::Or(a, b) => {
            let (a, b) = (emit(a, steps), emit(b, steps));
            and_step(a.complement(), b.complement(), steps).complement()
        }
    }
}

fn and_step(a: Operand, b: Operand, steps: &mut Vec<[Operand; 2]>) -> Operand {
    match (a, b) {
        (Operand::Constant(false), _) | (_, Operand::Constant(false)) => Operand::Constant(false),
        (Operand::Constant(true), x) | (x, Operand::Constant(true)) => x,
        _ => {
            steps.push([a, b]);
            Operand::Step((steps.len() - 1) as u8, false)
        }
    }
}

/// A factored AND structure computing `truth` (four variables).
pub fn structure(truth: u16) -> Structure {
    let mut cubes = Vec::new();
    let cover = isop(truth, truth, 3, &mut cubes);
    debug_assert_eq!(cover, truth);
    let mut steps = Vec::new();
    let output = emit(&factor(&cubes), &mut steps);
    Structure { steps, output }
}

/// The structures of `truth` built from its own cover and from its
/// complement's, the smaller first.
pub fn structures(truth: u16) -> [Structure; 2] {
    let plain = structure(truth);
    let mut flipped = structure(!truth);
    flipped.output = flipped.output.complement();
    if flipped.steps.len() < plain.steps.len() {
        [flipped, plain]
    } else {
        [plain, flipped]
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_four_input_function_is_rebuilt_exactly() {
        // Exhaustive: all 65,536 functions of four variables, both phases.
        for t in 0..=u16::MAX {
            for s in structures(t) {
                assert_eq!(s.truth(), t, "function {t:#06x}");
            }
        }
    }

    #[test]
    fn known_sizes() {
        // AND of four literals: three steps; XOR of two: three steps
        // (common practice).
        let and4 = VAR4[0] & VAR4[1] & VAR4[2] & VAR4[3];
        assert_eq!(structures(and4)[0].steps.len(), 3);
        assert_eq!(structures(VAR4[0] ^ VAR4[1])[0].steps.len(), 3);
        // a·b + a·c = a·(b + c): two steps.
        let t = (VAR4[0] & VAR4[1]) | (VAR4[0] & VAR4[2]);
        assert_eq!(structures(t)[0].steps.len(), 2);
    }
}
