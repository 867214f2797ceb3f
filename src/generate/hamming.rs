//! Hamming single-error-correcting codes and their SEC-DED extension.
//!
//! Code positions are numbered 1..n; the parity bits sit at the powers of two
//! and the k data bits fill the other positions in order, with n the smallest
//! length such that n - k parity bits can name every position
//! (2^(n-k) >= n + 1). Parity bit 2^j is the XOR of the data bits whose
//! position has bit j set, so for a received word the syndrome (bit j = XOR
//! of every position with bit j set) is 0 without error and the position of
//! the flipped bit after one error. Codeword bit `c[i]` is position i + 1.
//!
//! SEC-DED adds `c[n]`, the XOR of all other codeword bits. A decoder then
//! sees odd overall parity after one error (corrected by the syndrome; a
//! syndrome of 0 means the extra bit itself flipped) and even parity with a
//! non-zero syndrome after two errors (flagged by `double_error`, no
//! correction).

use super::ports;
use crate::network::{Lit, Network, NetworkError};

/// Hamming style names, default first.
pub(super) const STYLES: &[&str] = &["encoder", "decoder", "secded-encoder", "secded-decoder"];

/// Number of parity bits of a single-error-correcting code for `data` bits.
pub(super) fn parity_bits(data: usize) -> usize {
    let mut r = 0;
    while (1usize << r) < data + r + 1 {
        r += 1;
    }
    r
}

/// Code positions (1-based) of the data bits.
fn data_positions(data: usize) -> Vec<usize> {
    (1..)
        .filter(|p: &usize| !p.is_power_of_two())
        .take(data)
        .collect()
}

/// Declares the ports of the `style` circuit for `data` data bits and builds
/// it.
pub(super) fn build(net: &mut Network, data: usize, style: &str) -> Result<(), NetworkError> {
    let length = data + parity_bits(data);
    let positions = data_positions(data);
    let secded = style.starts_with("secded");
    if style.ends_with("encoder") {
        let d = ports::input_bus(net, "d", data)?;
        let mut code = vec![Lit::FALSE; length];
        for (&p, &bit) in positions.iter().zip(&d) {
            code[p - 1] = bit;
        }
        for j in 0..parity_bits(data) {
            let covered: Vec<Lit> = positions
                .iter()
                .zip(&d)
                .filter(|(&p, _)| (p >> j) & 1 == 1)
                .map(|(_, &bit)| bit)
                .collect();
            code[(1 << j) - 1] = net.xor_many(&covered);
        }
        if secded {
            let overall = net.xor_many(&code);
            code.push(overall);
        }
        ports::output_bus(net, "c", &code)
    } else {
        let c = ports::input_bus(net, "c", length + usize::from(secded))?;
        let syndrome: Vec<Lit> = (0..parity_bits(data))
            .map(|j| {
                let covered: Vec<Lit> = (1..=length)
                    .filter(|p| (p >> j) & 1 == 1)
                    .map(|p| c[p - 1])
                    .collect();
                net.xor_many(&covered)
            })
            .collect();
        let odd = if secded { net.xor_many(&c) } else { Lit::TRUE };
        let mut corrected = Vec::with_capacity(data);
        for &p in &positions {
            let lits: Vec<Lit> = syndrome
                .iter()
                .enumerate()
                .map(|(j, &s)| s.xor((p >> j) & 1 == 0))
                .collect();
            let hit = net.and_many(&lits);
            let flip = net.and(hit, odd);
            corrected.push(net.xor(c[p - 1], flip));
        }
        ports::output_bus(net, "d", &corrected)?;
        if secded {
            let any = net.or_many(&syndrome);
            let double = net.and(any, !odd);
            net.add_output("double_error", double)?;
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    #[test]
    fn perfect_code_lengths() {
        // (7,4), (15,11), (31,26), (63,57) Hamming codes (common practice).
        for (k, n) in [(4, 7), (11, 15), (26, 31), (57, 63)] {
            assert_eq!(k + super::parity_bits(k), n);
        }
    }
}
