//! Which inputs and outputs form the words of an arithmetic specification.
//!
//! Two ways, matching the two automatic port pairings of `equiv`:
//! - **by name**: inputs are grouped into buses by the text before `[`
//!   (`a[3]` is bit 3 of bus `a`; a name without brackets is a one-bit
//!   bus), buses in the order their first bit is declared. The first bus is
//!   word A, the second word B, a third word C (the carry-in of `add`, the
//!   addend of `mac`). Outputs sorted by index when they are one bus,
//!   otherwise in declaration order, least significant first.
//! - **by order** (the port contract of generated circuits): inputs in
//!   declaration order; `mul` splits them into two halves A, B; `add` does
//!   the same after setting aside a last carry-in when the count is odd;
//!   `mac` takes quarters A, B and a double-width C. Outputs in declaration
//!   order, least significant first.

use super::ArithSpec;
use crate::network::Network;

/// Positions (in [`Network::combinational_inputs`] order) of each word's
/// bits, least significant first, and of the output word's bits (in
/// output order).
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Words {
    /// Word A.
    pub a: Vec<usize>,
    /// Word B.
    pub b: Vec<usize>,
    /// Word C (carry-in of `add`, addend of `mac`; empty for `mul`).
    pub c: Vec<usize>,
    /// Output bits, least significant first.
    pub outputs: Vec<usize>,
}

/// Splits `name` into bus and index (`a[3]` → `("a", 3)`; `cin` →
/// `("cin", 0)`).
fn bus_of(name: &str) -> (&str, u64) {
    if let Some(open) = name.rfind('[') {
        if let Some(inner) = name[open + 1..].strip_suffix(']') {
            if let Ok(k) = inner.parse::<u64>() {
                return (&name[..open], k);
            }
        }
    }
    (name, 0)
}

/// Groups `names` (positions kept) into buses in first-declaration order,
/// each sorted by bit index.
fn buses<'a>(names: impl Iterator<Item = &'a str>) -> Vec<(String, Vec<usize>)> {
    let mut groups: Vec<(String, Vec<(u64, usize)>)> = Vec::new();
    for (pos, name) in names.enumerate() {
        let (bus, k) = bus_of(name);
        match groups.iter_mut().find(|(b, _)| b == bus) {
            Some((_, bits)) => bits.push((k, pos)),
            None => groups.push((bus.to_string(), vec![(k, pos)])),
        }
    }
    groups
        .into_iter()
        .map(|(bus, mut bits)| {
            bits.sort_unstable();
            (bus, bits.into_iter().map(|(_, p)| p).collect())
        })
        .collect()
}

/// The words of `net` for `spec`, by bus name (`by_name`) or by
/// declaration order. Errors say what does not fit.
pub fn arith_words(net: &Network, spec: ArithSpec, by_name: bool) -> Result<Words, String> {
    if !net.storage().is_empty() {
        return Err(format!(
            "{} has storage elements; --spec checks combinational circuits only",
            net.name()
        ));
    }
    let n_in = net.inputs().len();
    let n_out = net.outputs().len();
    if n_out == 0 {
        return Err(format!("{} has no outputs", net.name()));
    }
    let (a, b, c, outputs) = if by_name {
        let ins = buses(net.inputs().keys().map(String::as_str));
        let outs = buses(net.outputs().keys().map(String::as_str));
        let expected = match spec {
            ArithSpec::Mul => 2..=2,
            ArithSpec::Add => 2..=3,
            ArithSpec::Mac => 3..=3,
        };
        if !expected.contains(&ins.len()) {
            let names: Vec<&str> = ins.iter().map(|(b, _)| b.as_str()).collect();
            return Err(format!(
                "--spec {spec} needs {} input buses, {} has {} ({})",
                if spec == ArithSpec::Add {
                    "2 or 3".to_string()
                } else {
                    expected.start().to_string()
                },
                net.name(),
                ins.len(),
                names.join(", ")
            ));
        }
        let outputs = if outs.len() == 1 {
            outs.into_iter().next().expect("one bus").1
        } else {
            (0..n_out).collect()
        };
        let mut it = ins.into_iter().map(|(_, bits)| bits);
        let a = it.next().expect("counted");
        let b = it.next().expect("counted");
        (a, b, it.next().unwrap_or_default(), outputs)
    } else {
        let all: Vec<usize> = (0..n_in).collect();
        let (a, b, c) = match spec {
            ArithSpec::Mul if n_in.is_multiple_of(2) && n_in > 0 => (
                all[..n_in / 2].to_vec(),
                all[n_in / 2..].to_vec(),
                Vec::new(),
            ),
            ArithSpec::Add if n_in >= 2 => {
                let carry = n_in % 2;
                let half = (n_in - carry) / 2;
                (
                    all[..half].to_vec(),
                    all[half..2 * half].to_vec(),
                    all[2 * half..].to_vec(),
                )
            }
            ArithSpec::Mac if n_in.is_multiple_of(4) && n_in > 0 => {
                let q = n_in / 4;
                (
                    all[..q].to_vec(),
                    all[q..2 * q].to_vec(),
                    all[2 * q..].to_vec(),
                )
            }
            _ => {
                return Err(format!(
                    "--spec {spec} with --ports order cannot split the {n_in} inputs of {} into words (mul: an even count; add: two halves and an optional carry-in last; mac: a multiple of four)",
                    net.name()
                ))
            }
        };
        (a, b, c, (0..n_out).collect())
    };
    if spec == ArithSpec::Add && c.len() > 1 && by_name {
        return Err(format!(
            "--spec add takes a one-bit carry-in as third input bus; {} has {} bits there",
            net.name(),
            c.len()
        ));
    }
    Ok(Words { a, b, c, outputs })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::network::Lit;

    fn ports(inputs: &[&str], outputs: &[&str]) -> Network {
        let mut net = Network::new("t");
        for i in inputs {
            net.add_input(*i).unwrap();
        }
        for o in outputs {
            net.add_output(*o, Lit::FALSE).unwrap();
        }
        net
    }

    #[test]
    fn buses_follow_names_and_indices() {
        let net = ports(
            &["b[1]", "a[0]", "b[0]", "a[1]", "cin"],
            &["s[1]", "s[0]", "s[2]"],
        );
        let w = arith_words(&net, ArithSpec::Add, true).unwrap();
        assert_eq!(w.a, vec![2, 0]); // bus b declared first: b[0], b[1]
        assert_eq!(w.b, vec![1, 3]);
        assert_eq!(w.c, vec![4]);
        assert_eq!(w.outputs, vec![1, 0, 2]);
        assert!(arith_words(&net, ArithSpec::Mul, true).is_err());
    }

    #[test]
    fn order_splits_halves_and_carry_in() {
        let net = ports(&["p", "q", "r", "s", "t"], &["y"]);
        let w = arith_words(&net, ArithSpec::Add, false).unwrap();
        assert_eq!((w.a, w.b, w.c), (vec![0, 1], vec![2, 3], vec![4]));
        assert!(arith_words(&net, ArithSpec::Mul, false).is_err());
    }
}
