//! Pseudo-Boolean polynomials modulo 2^W and backward rewriting.
//!
//! A polynomial is a sum of monomials (sets of Boolean variables, so
//! `x * x = x`) with coefficients modulo `2^W`, W the width of the output
//! word. Working modulo `2^W` is exact for the question asked (an output
//! word of W bits lies in `[0, 2^W)`, so it equals the specification's value
//! modulo `2^W` exactly when the two polynomials agree modulo `2^W`), and it
//! lets the high carries of partial sums vanish early.
//!
//! Rewriting (Ciesielski, Yu, Brown, Liu, Rossi, "Verification of gate-level
//! arithmetic circuits by function extraction", DAC 2015): the variables are
//! numbered in topological order, and each monomial is filed under its
//! largest gate variable. Eliminating the gates from the last to the first
//! takes exactly the monomials of one file and replaces the gate's variable
//! by the gate's polynomial over its fanins, whose variables are all
//! smaller; what is left at the end mentions only circuit inputs.
//!
//! Coefficients are `num_bigint::BigUint` reduced modulo `2^W`: a 64 x 64
//! multiplier needs 128-bit coefficients and a 128-bit adder 129, so no
//! machine integer fits every case.

use num_bigint::BigUint;
use rustc_hash::FxHashMap;

/// A monomial: sorted, distinct variable numbers.
pub(crate) type Monomial = Box<[u32]>;

/// A small polynomial with machine-integer coefficients, used for one
/// gate's function of its fanins.
pub(crate) type GatePoly = Vec<(Vec<u32>, i64)>;

/// The union of two sorted variable sets.
fn union(x: &[u32], y: &[u32]) -> Vec<u32> {
    let mut out = Vec::with_capacity(x.len() + y.len());
    let (mut i, mut j) = (0, 0);
    while i < x.len() && j < y.len() {
        match x[i].cmp(&y[j]) {
            std::cmp::Ordering::Less => {
                out.push(x[i]);
                i += 1;
            }
            std::cmp::Ordering::Greater => {
                out.push(y[j]);
                j += 1;
            }
            std::cmp::Ordering::Equal => {
                out.push(x[i]);
                i += 1;
                j += 1;
            }
        }
    }
    out.extend_from_slice(&x[i..]);
    out.extend_from_slice(&y[j..]);
    out
}

/// Product of two small polynomials (Boolean variables: `x * x = x`).
pub(crate) fn gate_product(p: &GatePoly, q: &GatePoly) -> GatePoly {
    let mut out: FxHashMap<Vec<u32>, i64> = FxHashMap::default();
    for (m, c) in p {
        for (n, d) in q {
            *out.entry(union(m, n)).or_default() += c * d;
        }
    }
    normalise(out)
}

/// `sum of (factor, polynomial)` of small polynomials.
pub(crate) fn gate_sum(parts: &[(i64, &GatePoly)]) -> GatePoly {
    let mut out: FxHashMap<Vec<u32>, i64> = FxHashMap::default();
    for (factor, p) in parts {
        for (m, c) in p.iter() {
            *out.entry(m.clone()).or_default() += factor * c;
        }
    }
    normalise(out)
}

fn normalise(map: FxHashMap<Vec<u32>, i64>) -> GatePoly {
    let mut v: GatePoly = map.into_iter().filter(|(_, c)| *c != 0).collect();
    v.sort();
    v
}

/// The polynomial of literal `var` (or its complement `1 - var`).
pub(crate) fn literal(var: u32, complemented: bool) -> GatePoly {
    if complemented {
        vec![(vec![], 1), (vec![var], -1)]
    } else {
        vec![(vec![var], 1)]
    }
}

/// A polynomial modulo `2^W` under rewriting, filed by largest gate
/// variable.
pub(crate) struct Rewriter {
    mask: BigUint,
    modulus: BigUint,
    /// `is_gate[v]`: variable v is a gate output (eliminated in rewriting).
    is_gate: Vec<bool>,
    /// Monomials by largest gate variable; the last file holds monomials of
    /// inputs only.
    files: Vec<FxHashMap<Monomial, BigUint>>,
    terms: usize,
    /// Most monomials alive at once.
    pub peak_terms: usize,
}

impl Rewriter {
    /// An empty polynomial modulo `2^width` over variables
    /// `0..is_gate.len()`.
    pub fn new(width: usize, is_gate: Vec<bool>) -> Rewriter {
        let modulus = BigUint::from(1u8) << width;
        let mask = &modulus - 1u8;
        let files = (0..=is_gate.len()).map(|_| FxHashMap::default()).collect();
        Rewriter {
            mask,
            modulus,
            is_gate,
            files,
            terms: 0,
            peak_terms: 0,
        }
    }

    fn file_of(&self, monomial: &[u32]) -> usize {
        monomial
            .iter()
            .rev()
            .find(|&&v| self.is_gate[v as usize])
            .map_or(self.is_gate.len(), |&v| v as usize)
    }

    /// `coefficient * (-1 if negate)` modulo `2^W`.
    fn signed(&self, coefficient: BigUint, negate: bool) -> BigUint {
        let c = coefficient & &self.mask;
        if negate && c.bits() != 0 {
            &self.modulus - c
        } else {
            c
        }
    }

    /// Adds `coefficient` (negated when `negate`) times `monomial`.
    pub fn add(&mut self, monomial: Vec<u32>, coefficient: BigUint, negate: bool) {
        let c = self.signed(coefficient, negate);
        if c.bits() == 0 {
            return;
        }
        let file = self.file_of(&monomial);
        let map = &mut self.files[file];
        match map.entry(monomial.into_boxed_slice()) {
            std::collections::hash_map::Entry::Occupied(mut e) => {
                let sum = (e.get() + c) & &self.mask;
                if sum.bits() == 0 {
                    e.remove();
                    self.terms -= 1;
                } else {
                    *e.get_mut() = sum;
                }
            }
            std::collections::hash_map::Entry::Vacant(e) => {
                e.insert(c);
                self.terms += 1;
                self.peak_terms = self.peak_terms.max(self.terms);
            }
        }
    }

    /// Replaces gate variable `var` by `poly` (over smaller variables).
    /// Fails when more than `limit` monomials would be alive (0: no limit).
    pub fn eliminate(&mut self, var: u32, poly: &GatePoly, limit: usize) -> Result<(), usize> {
        let file = std::mem::take(&mut self.files[var as usize]);
        self.terms -= file.len();
        for (monomial, c) in file {
            let rest: Vec<u32> = monomial.iter().copied().filter(|&v| v != var).collect();
            for (m, k) in poly {
                let product = &c * BigUint::from(k.unsigned_abs());
                self.add(union(&rest, m), product, *k < 0);
            }
            if limit != 0 && self.terms > limit {
                return Err(self.terms);
            }
        }
        Ok(())
    }

    /// Monomials alive.
    #[cfg(test)]
    pub fn terms(&self) -> usize {
        self.terms
    }

    /// The monomials over inputs only (the remainder once every gate is
    /// eliminated).
    pub fn remainder(&self) -> &FxHashMap<Monomial, BigUint> {
        &self.files[self.is_gate.len()]
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// x XOR y = x + y - 2xy and majority = xy + xz + yz - 2xyz (standard
    /// pseudo-Boolean forms of the two functions, common practice); the sum
    /// and carry of a full adder add up to x + y + z.
    #[test]
    fn full_adder_sum_and_twice_carry_is_linear() {
        let (x, y, z) = (literal(0, false), literal(1, false), literal(2, false));
        let xy = gate_product(&x, &y);
        let xor2 = gate_sum(&[(1, &x), (1, &y), (-2, &xy)]);
        let xor2z = gate_product(&xor2, &z);
        let xor3 = gate_sum(&[(1, &xor2), (1, &z), (-2, &xor2z)]);
        let xz = gate_product(&x, &z);
        let yz = gate_product(&y, &z);
        let xyz = gate_product(&xy, &z);
        let maj = gate_sum(&[(1, &xy), (1, &xz), (1, &yz), (-2, &xyz)]);
        let linear = gate_sum(&[(1, &xor3), (2, &maj)]);
        assert_eq!(linear, vec![(vec![0], 1), (vec![1], 1), (vec![2], 1)]);
        // Complement: 1 - x.
        assert_eq!(literal(3, true), vec![(vec![], 1), (vec![3], -1)]);
    }

    /// Rewriting s + 2c of a half adder (s = x XOR y at var 2, c = x AND y at
    /// var 3) leaves x + y; modulo 2^1 the carry's term vanishes at once.
    #[test]
    fn half_adder_rewrites_to_the_sum_of_its_inputs() {
        let (x, y) = (literal(0, false), literal(1, false));
        let xy = gate_product(&x, &y);
        let xor2 = gate_sum(&[(1, &x), (1, &y), (-2, &xy)]);
        let mut r = Rewriter::new(2, vec![false, false, true, true]);
        r.add(vec![2], BigUint::from(1u8), false);
        r.add(vec![3], BigUint::from(2u8), false);
        r.eliminate(3, &xy, 0).unwrap();
        r.eliminate(2, &xor2, 0).unwrap();
        let mut rem: Vec<_> = r.remainder().iter().collect();
        rem.sort();
        assert_eq!(rem.len(), 2);
        assert_eq!(&rem[0].0[..], &[0u32][..]);
        assert_eq!(*rem[1].1, BigUint::from(1u8));
        // Modulo 2 the carry term 2c is zero from the start.
        let mut r = Rewriter::new(1, vec![false, false, true, true]);
        r.add(vec![3], BigUint::from(2u8), false);
        assert_eq!(r.terms(), 0);
    }
}
