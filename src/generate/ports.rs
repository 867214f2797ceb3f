//! Declaring buses of ports: `a[0]`, `a[1]`, ... in index order, so that
//! inputs and outputs appear least significant bit first, as the port
//! contract asks.

use crate::network::{Lit, Network, NetworkError};

/// Declares inputs `name[0..width-1]` and returns their literals.
pub(super) fn input_bus(
    net: &mut Network,
    name: &str,
    width: usize,
) -> Result<Vec<Lit>, NetworkError> {
    (0..width)
        .map(|i| net.add_input(format!("{name}[{i}]")))
        .collect()
}

/// Declares outputs `name[0..bits.len()-1]` driven by `bits`.
pub(super) fn output_bus(net: &mut Network, name: &str, bits: &[Lit]) -> Result<(), NetworkError> {
    for (i, &bit) in bits.iter().enumerate() {
        net.add_output(format!("{name}[{i}]"), bit)?;
    }
    Ok(())
}

/// Bits needed to count from 0 to `n - 1`: ceil(log2 n), 0 for n = 1.
pub(super) fn shift_bits(n: usize) -> usize {
    let mut bits = 0;
    while (1usize << bits) < n {
        bits += 1;
    }
    bits
}

/// Bits needed to hold the numbers 0 to `n`: ceil(log2(n + 1)).
pub(super) fn count_bits(n: usize) -> usize {
    shift_bits(n + 1)
}

#[cfg(test)]
mod tests {
    #[test]
    fn bit_counts() {
        assert_eq!(super::shift_bits(1), 0);
        assert_eq!(super::shift_bits(8), 3);
        assert_eq!(super::shift_bits(9), 4);
        assert_eq!(super::count_bits(7), 3);
        assert_eq!(super::count_bits(8), 4);
    }
}
