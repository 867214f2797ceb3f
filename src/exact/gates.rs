//! The gates exact synthesis may use, and their expansion into *variants*.
//!
//! A [`GateSpec`] is a library cell as exact synthesis sees it: a name, one to
//! three inputs, a truth table and its costs. The SAT encoding never works on
//! cells directly; it works on [`Variant`]s: a cell's function over its
//! support only, with the cell pins permuted so that a step's fanins can always
//! be listed in increasing order (this is how the encoding breaks the symmetry
//! of commutative gates). Variants with the same function keep only the
//! cheapest cell. Constant cells and one-input buffers never help and are
//! dropped.

use crate::library::Library;

/// A library cell as exact synthesis sees it.
#[derive(Clone, Debug, PartialEq)]
pub struct GateSpec {
    /// Cell name.
    pub name: String,
    /// Number of inputs, 1 to 3.
    pub arity: usize,
    /// Function: bit r is the output on row r (pin k is bit k of r).
    pub truth: u64,
    /// Area in the library's unit.
    pub area: f64,
    /// Delay of the cell driving one unit of load, in the library's unit.
    pub delay: f64,
}

impl GateSpec {
    /// A gate from its name, arity, truth table and area (delay 1).
    pub fn new(name: impl Into<String>, arity: usize, truth: u64, area: f64) -> GateSpec {
        GateSpec {
            name: name.into(),
            arity,
            truth: truth & row_mask(arity),
            area,
            delay: 1.0,
        }
    }
}

/// The combinational cells of `lib` with one to three inputs, in library
/// order, as gates. A cell's delay here is its intrinsic delay plus one unit
/// of load (`intrinsic + per_load`).
pub fn gates_from_library(lib: &Library) -> Vec<GateSpec> {
    lib.cells
        .iter()
        .filter(|c| (1..=3).contains(&c.arity()))
        .map(|c| GateSpec {
            name: c.name.clone(),
            arity: c.arity(),
            truth: c.truth & row_mask(c.arity()),
            area: c.area,
            delay: c.delay.intrinsic + c.delay.per_load,
        })
        .collect()
}

/// Mask of the `1 << arity` meaningful bits of a truth table.
pub(crate) fn row_mask(arity: usize) -> u64 {
    if arity >= 6 {
        u64::MAX
    } else {
        (1u64 << (1usize << arity)) - 1
    }
}

/// One way a gate can serve as a step: its function over `arity` ordered
/// inputs, all of which it depends on.
#[derive(Clone, Debug, PartialEq)]
pub(crate) struct Variant {
    /// Number of inputs the variant depends on.
    pub arity: usize,
    /// Function over the variant's inputs.
    pub truth: u64,
    /// Index of the gate in the caller's gate list.
    pub gate: usize,
    /// For each cell pin, the variant input that drives it (unused pins are
    /// tied to input 0).
    pub pins: Vec<usize>,
    /// Area of the gate.
    pub area: f64,
}

/// All useful variants of `gates`, deduplicated by (arity, function) keeping
/// the cheapest gate (ties: the first listed).
pub(crate) fn expand_variants(gates: &[GateSpec]) -> Vec<Variant> {
    let mut out: Vec<Variant> = Vec::new();
    for (index, gate) in gates.iter().enumerate() {
        if gate.arity == 0 || gate.arity > 3 {
            continue;
        }
        let truth = gate.truth & row_mask(gate.arity);
        let support: Vec<usize> = (0..gate.arity)
            .filter(|&p| depends_on(truth, gate.arity, p))
            .collect();
        if support.is_empty() {
            continue;
        }
        for order in permutations(&support) {
            let arity = order.len();
            let mut vt = 0u64;
            for r in 0..(1usize << arity) {
                let mut cell_row = 0usize;
                for (j, &pin) in order.iter().enumerate() {
                    if r >> j & 1 == 1 {
                        cell_row |= 1 << pin;
                    }
                }
                if truth >> cell_row & 1 == 1 {
                    vt |= 1 << r;
                }
            }
            if arity == 1 && vt == 0b10 {
                continue; // a buffer never helps
            }
            let pins: Vec<usize> = (0..gate.arity)
                .map(|p| order.iter().position(|&q| q == p).unwrap_or(0))
                .collect();
            let candidate = Variant {
                arity,
                truth: vt,
                gate: index,
                pins,
                area: gate.area,
            };
            match out.iter_mut().find(|v| v.arity == arity && v.truth == vt) {
                Some(existing) => {
                    if candidate.area < existing.area {
                        *existing = candidate;
                    }
                }
                None => out.push(candidate),
            }
        }
    }
    out
}

/// Whether the variants of arity two and more are closed under negating any
/// inputs and the output. Then, with complements free at the network's
/// inputs and outputs, every step can be taken *normal* (value 0 on the
/// all-zero row) without losing any network.
pub(crate) fn closed_under_negation(variants: &[Variant]) -> bool {
    let wide: Vec<&Variant> = variants.iter().filter(|v| v.arity >= 2).collect();
    if wide.is_empty() {
        return false;
    }
    wide.iter().all(|v| {
        let rows = 1usize << v.arity;
        (0..rows).all(|mask| {
            let mut negated = 0u64;
            for r in 0..rows {
                if v.truth >> (r ^ mask) & 1 == 1 {
                    negated |= 1 << r;
                }
            }
            let complement = !negated & row_mask(v.arity);
            [negated, complement]
                .iter()
                .all(|&t| wide.iter().any(|w| w.arity == v.arity && w.truth == t))
        })
    })
}

/// Whether `truth` over `arity` inputs depends on input `pin`.
pub(crate) fn depends_on(truth: u64, arity: usize, pin: usize) -> bool {
    (0..(1usize << arity))
        .filter(|r| r >> pin & 1 == 0)
        .any(|r| (truth >> r & 1) != (truth >> (r | 1 << pin) & 1))
}

/// All orderings of `items`.
fn permutations(items: &[usize]) -> Vec<Vec<usize>> {
    if items.len() <= 1 {
        return vec![items.to_vec()];
    }
    let mut out = Vec::new();
    for i in 0..items.len() {
        let mut rest = items.to_vec();
        let first = rest.remove(i);
        for mut tail in permutations(&rest) {
            tail.insert(0, first);
            out.push(tail);
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn all_two_input() -> Vec<GateSpec> {
        (0..16u64)
            .map(|t| GateSpec::new(format!("g{t}"), 2, t, 1.0))
            .collect()
    }

    #[test]
    fn two_input_functions_expand_to_ten_variants_and_an_inverter() {
        // 16 functions: 2 constants, 2 projections, 2 negated projections
        // (which reduce to an inverter), 10 depending on both (integer count).
        let v = expand_variants(&all_two_input());
        assert_eq!(v.iter().filter(|v| v.arity == 2).count(), 10);
        assert_eq!(v.iter().filter(|v| v.arity == 1).count(), 1);
        assert!(closed_under_negation(&v));
    }

    #[test]
    fn and_or_is_not_closed() {
        let gates = vec![
            GateSpec::new("and2", 2, 0x8, 1.0),
            GateSpec::new("or2", 2, 0xE, 1.0),
        ];
        assert!(!closed_under_negation(&expand_variants(&gates)));
    }

    #[test]
    fn permuted_variant_pins_reproduce_the_cell() {
        // a & !b has two variants: x0 & !x1 and x1 & !x0.
        let v = expand_variants(&[GateSpec::new("andn", 2, 0b0010, 1.0)]);
        assert_eq!(v.len(), 2);
        for var in &v {
            for r in 0..4usize {
                let mut cell_row = 0;
                for (p, &j) in var.pins.iter().enumerate() {
                    cell_row |= (r >> j & 1) << p;
                }
                assert_eq!(var.truth >> r & 1, 0b0010 >> cell_row & 1);
            }
        }
    }
}
