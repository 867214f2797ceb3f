//! A reference circuit built from the word-level specification, for the
//! circuits rewriting cannot finish.
//!
//! Parallel-prefix adders (Kogge-Stone, Brent-Kung) have carries whose
//! polynomials grow exponentially, and a multiplier mapped onto cells that
//! split its full adders leaves non-linear monomials alive; both outgrow the
//! term limit. Their carries, however, are the same functions as those of a
//! plain ripple-carry circuit, so SAT sweeping against a reference built
//! straight from the specification (ripple adder; array multiplier of AND
//! partial products and ripple rows; multiply-accumulate as the product plus
//! a ripple addition) finds the internal equivalences that rewriting lacked.

use super::{words::Words, ArithSpec};
use crate::network::{Lit, Network};

/// Full adder: `(sum, carry)`.
fn full_adder(net: &mut Network, x: Lit, y: Lit, z: Lit) -> (Lit, Lit) {
    let half = net.xor(x, y);
    (net.xor(half, z), net.maj(x, y, z))
}

/// `x + y + carry_in` over equally long words (missing bits are zero),
/// truncated to `width` bits.
fn add_words(net: &mut Network, x: &[Lit], y: &[Lit], carry_in: Lit, width: usize) -> Vec<Lit> {
    let mut carry = carry_in;
    let mut out = Vec::with_capacity(width);
    for k in 0..width {
        let a = x.get(k).copied().unwrap_or(Lit::FALSE);
        let b = y.get(k).copied().unwrap_or(Lit::FALSE);
        let (s, c) = full_adder(net, a, b, carry);
        out.push(s);
        carry = c;
    }
    out
}

/// The reference for `spec` over `net`'s inputs (same names, same order)
/// with outputs named as `net`'s output word, in word order.
pub(super) fn reference(net: &Network, spec: ArithSpec, words: &Words) -> Network {
    let mut reference = Network::new(format!("{}_reference", net.name()));
    let inputs: Vec<Lit> = net
        .inputs()
        .keys()
        .map(|name| {
            reference
                .add_input(name.clone())
                .expect("names unique in the source")
        })
        .collect();
    let word = |w: &[usize]| -> Vec<Lit> { w.iter().map(|&p| inputs[p]).collect() };
    let (a, b, c) = (word(&words.a), word(&words.b), word(&words.c));
    let width = words.outputs.len();
    let result = match spec {
        ArithSpec::Add => {
            // A carry-in word of one bit is the carry of the ripple chain;
            // a wider one is added as a third word.
            let carry_in = if c.len() == 1 { c[0] } else { Lit::FALSE };
            let sum = add_words(&mut reference, &a, &b, carry_in, width);
            if c.len() > 1 {
                add_words(&mut reference, &sum, &c, Lit::FALSE, width)
            } else {
                sum
            }
        }
        ArithSpec::Mul | ArithSpec::Mac => {
            let mut acc = vec![Lit::FALSE; width];
            for (i, &bi) in b.iter().enumerate().take(width) {
                let row: Vec<Lit> = (0..width)
                    .map(|k| {
                        if k >= i && k - i < a.len() {
                            reference.and(a[k - i], bi)
                        } else {
                            Lit::FALSE
                        }
                    })
                    .collect();
                acc = add_words(&mut reference, &acc, &row, Lit::FALSE, width);
            }
            if spec == ArithSpec::Mac {
                acc = add_words(&mut reference, &acc, &c, Lit::FALSE, width);
            }
            acc
        }
    };
    let names: Vec<&String> = net.outputs().keys().collect();
    for (bit, &p) in result.iter().zip(&words.outputs) {
        reference
            .add_output(names[p].clone(), *bit)
            .expect("names unique in the source");
    }
    reference
}
