//! An n-bit ALU: one shared adder/subtractor, bitwise logic, two barrel
//! shifters and an unsigned less-than, chosen by a 3-bit opcode through a
//! tree of multiplexers.
//!
//! Opcode `op[2] op[1] op[0]`: 000 add, 001 subtract, 010 AND, 011 OR,
//! 100 XOR, 101 shift left, 110 shift right (logical), 111 set if a < b
//! (unsigned). Subtraction is `a + !b + 1`; the adder's second operand is
//! `b ^ op[0]` and its carry input `op[0]`, so opcodes 001 and 111 both
//! subtract, and a < b exactly when that subtraction produces no carry out.
//! Shifts move by the low ceil(log2 n) bits of b.

use super::adder::{self, AdderStyle};
use super::ports::shift_bits;
use super::select;
use crate::network::{Lit, Network};

/// The ALU result bits for operands `a`, `b` and opcode `op` (3 bits).
pub(super) fn alu(
    net: &mut Network,
    a: &[Lit],
    b: &[Lit],
    op: &[Lit],
    style: AdderStyle,
) -> Vec<Lit> {
    let n = a.len();
    let subtract = op[0];
    let b_or_not: Vec<Lit> = b.iter().map(|&x| net.xor(x, subtract)).collect();
    let (sum, carry) = adder::add(net, a, &b_or_not, subtract, style);
    let and: Vec<Lit> = (0..n).map(|i| net.and(a[i], b[i])).collect();
    let or: Vec<Lit> = (0..n).map(|i| net.or(a[i], b[i])).collect();
    let xor: Vec<Lit> = (0..n).map(|i| net.xor(a[i], b[i])).collect();
    let amount = &b[..shift_bits(n)];
    let left = select::shift_left(net, a, amount);
    let right = select::shift_right(net, a, amount);
    let mut less = vec![Lit::FALSE; n];
    less[0] = !carry;
    (0..n)
        .map(|i| {
            let logic = net.mux(op[0], or[i], and[i]);
            let low = net.mux(op[1], logic, sum[i]);
            let shift_or_xor = net.mux(op[0], left[i], xor[i]);
            let less_or_right = net.mux(op[0], less[i], right[i]);
            let high = net.mux(op[1], less_or_right, shift_or_xor);
            net.mux(op[2], high, low)
        })
        .collect()
}
