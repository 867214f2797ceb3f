//! Unsigned n x n multipliers with 2n product bits.
//!
//! All three start from the partial products `a[j] & b[i]` of weight
//! 2^(i+j). The array multiplier adds them row by row: each row of n partial
//! products is added to the running sum by a chain of full adders, and the
//! running sum's lowest bit leaves as a product bit. Wallace and Dadda
//! multipliers compress the columns of partial products with full and half
//! adders (see `arith`) and finish with one ripple adder.

use super::arith::{self, Compression};
use crate::network::{Lit, Network};

/// Multiplier style names, default first.
pub(super) const STYLES: &[&str] = &["array", "wallace", "dadda"];

/// The 2n product bits of `a * b` (least significant first).
pub(super) fn multiply(net: &mut Network, a: &[Lit], b: &[Lit], style: &str) -> Vec<Lit> {
    match style {
        "wallace" => tree(net, a, b, Compression::Wallace),
        "dadda" => tree(net, a, b, Compression::Dadda),
        _ => array(net, a, b),
    }
}

fn row(net: &mut Network, a: &[Lit], bit: Lit) -> Vec<Lit> {
    a.iter().map(|&x| net.and(x, bit)).collect()
}

fn array(net: &mut Network, a: &[Lit], b: &[Lit]) -> Vec<Lit> {
    let n = a.len();
    let mut product = Vec::with_capacity(2 * n);
    // `acc` holds the running sum from weight `i` upwards.
    let mut acc = row(net, a, b[0]);
    for &bi in &b[1..] {
        product.push(acc[0]);
        let mut upper: Vec<Lit> = acc[1..].to_vec();
        upper.resize(n, Lit::FALSE);
        let partial = row(net, a, bi);
        let (mut sum, carry) = arith::ripple(net, &upper, &partial, Lit::FALSE);
        sum.push(carry);
        acc = sum;
    }
    product.extend(acc);
    product.resize(2 * n, Lit::FALSE);
    product
}

fn tree(net: &mut Network, a: &[Lit], b: &[Lit], scheme: Compression) -> Vec<Lit> {
    let n = a.len();
    let mut columns: Vec<Vec<Lit>> = vec![Vec::new(); 2 * n];
    for (i, &bi) in b.iter().enumerate() {
        for (j, &aj) in a.iter().enumerate() {
            let pp = net.and(aj, bi);
            columns[i + j].push(pp);
        }
    }
    arith::sum_columns(net, columns, scheme, 2 * n)
}
