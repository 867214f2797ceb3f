//! Proofs for arithmetic circuits of different architectures.
//!
//! Outside references: the ariths-gen 8 x 8 array and Dadda multipliers in
//! tests/data/reference/netlists/arith (PROVENANCE.md), integer
//! multiplication and addition (every counterexample is replayed on
//! integers), and exhaustive simulation (miters of at most 24 inputs are
//! decided by enumerating every pattern). The 64 x 64 multipliers run in
//! release builds only (CI runs `cargo test --release`).

use ribbonmap::equiv::algebra::{
    arith_words, prove_against_spec, simulate_against_spec, SpecOutcome,
};
use ribbonmap::equiv::{
    check, check_with_stats, AlgebraOptions, ArithSpec, EquivOptions, PortMatching, Verdict,
};
use ribbonmap::generate::{generate, Family, Params};
use ribbonmap::io::{read_netlist, ReadOptions};
use ribbonmap::library::Library;
use ribbonmap::mapper::{map, MapOptions};
use ribbonmap::netlist::{Driver, MappedNetlist};
use ribbonmap::network::{Lit, Network, NodeId, NodeKind, SplitMix64};
use std::path::PathBuf;

fn reference(name: &str) -> Network {
    let path = PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/data/reference/netlists/arith")
        .join(name);
    read_netlist(&path, &ReadOptions::default()).unwrap()
}

fn multiplier(width: u32, style: &str) -> Network {
    generate(Family::Multiplier, &Params::new(width).with_style(style)).unwrap()
}

fn by_order() -> EquivOptions {
    EquivOptions {
        ports: PortMatching::ByOrder,
        ..EquivOptions::default()
    }
}

fn with_spec(spec: ArithSpec) -> EquivOptions {
    EquivOptions {
        spec: Some(spec),
        ..by_order()
    }
}

const STYLES: [&str; 3] = ["array", "wallace", "dadda"];

/// Every generated 8 x 8 style against both ariths-gen multipliers, and
/// 12 x 12 array against Dadda, 10 x 10 array against Wallace: all within
/// 24 inputs, so decided by exhaustive simulation.
#[test]
fn multipliers_of_different_architectures_are_proven_by_enumeration() {
    for name in ["arrmul8_flat.blif", "dadda8_hier.blif"] {
        let other = reference(name);
        for style in STYLES {
            let ours = multiplier(8, style);
            let verdict = check(&ours, &other, &by_order()).unwrap();
            assert_eq!(
                verdict,
                Verdict::Equivalent {
                    outputs_checked: 16
                },
                "{style} vs {name}"
            );
        }
    }
    for (width, x, y) in [(12, "array", "dadda"), (10, "array", "wallace")] {
        let verdict = check(&multiplier(width, x), &multiplier(width, y), &by_order()).unwrap();
        assert_eq!(
            verdict,
            Verdict::Equivalent {
                outputs_checked: 2 * width as usize
            },
            "{width}: {x} vs {y}"
        );
    }
}

/// Unsigned multipliers of each architecture against `--spec mul` (and so
/// against each other).
#[test]
fn multipliers_are_proven_against_the_product() {
    let widths: &[u32] = if cfg!(debug_assertions) {
        &[16, 32]
    } else {
        &[16, 32, 64]
    };
    for &width in widths {
        for (x, y) in [
            ("array", "dadda"),
            ("dadda", "wallace"),
            ("wallace", "array"),
        ] {
            let report = check_with_stats(
                &multiplier(width, x),
                &multiplier(width, y),
                &with_spec(ArithSpec::Mul),
            )
            .unwrap();
            assert!(
                matches!(report.verdict, Verdict::Equivalent { .. }),
                "{width}: {x} vs {y}: {:?}",
                report.verdict
            );
            let spec = report.stats.spec.expect("spec route taken");
            assert_eq!((spec.a.as_str(), spec.b.as_str()), ("proven", "proven"));
        }
    }
}

/// The same after mapping: the original is proven by rewriting, the mapped
/// netlist by rewriting or, when its cells split the full adders, by
/// sweeping against the proven original.
#[test]
fn mapped_multipliers_are_proven_against_the_product() {
    let width = if cfg!(debug_assertions) { 8 } else { 16 };
    for lib in ["ribbon3", "ribbon2", "cmos-le"] {
        let library = Library::builtin(lib).unwrap();
        for style in STYLES {
            let original = multiplier(width, style);
            let mapped = map(&original, &library, &MapOptions::default())
                .unwrap()
                .to_network(&library);
            let report = check_with_stats(&original, &mapped, &with_spec(ArithSpec::Mul)).unwrap();
            assert!(
                matches!(report.verdict, Verdict::Equivalent { .. }),
                "{lib} {style}: {:?}",
                report.verdict
            );
            assert_eq!(report.stats.spec.expect("spec route").a, "proven");
        }
    }
}

/// Each mapped multiplier alone against `--spec mul`, by rewriting (no
/// sweeping against its original): the full adders that the two-input cells
/// of ribbon2 split are found again through cuts of four leaves that factor
/// through an existing node. Every architecture on every library at 16 and
/// 32 bits; at 64 bits one architecture per library (mapping a 64 x 64
/// multiplier takes seconds per library), ribbon2 on the array multiplier
/// whose adders it splits most. Debug builds check 16 bits only. The outside
/// check is integer multiplication: the prover's screen simulates the
/// circuit against it before rewriting starts.
///
/// Known gap, left out here and kept as an ignored test below: the Wallace
/// tree mapped on cmos-le at 32 and 64 bits, where recovery finds 957
/// three-input XORs against its original's 959, so rewriting outgrows the
/// term limit (those are proven by `equiv` against their original, which is
/// proven against the product).
#[test]
fn mapped_multipliers_are_proven_alone_against_the_product() {
    let mut cases: Vec<(u32, &str, &str)> = Vec::new();
    let widths: &[u32] = if cfg!(debug_assertions) {
        &[16]
    } else {
        &[16, 32]
    };
    for &width in widths {
        for lib in ["ribbon3", "ribbon2", "cmos-le"] {
            for style in STYLES {
                cases.push((width, style, lib));
            }
        }
    }
    if !cfg!(debug_assertions) {
        cases.extend([
            (64, "array", "ribbon2"),
            (64, "dadda", "ribbon3"),
            (64, "wallace", "cmos-le"),
        ]);
    }
    cases.retain(|&(width, style, lib)| !(width > 16 && style == "wallace" && lib == "cmos-le"));
    for (width, style, lib) in cases {
        let library = Library::builtin(lib).unwrap();
        let mapped = map(&multiplier(width, style), &library, &MapOptions::default())
            .unwrap()
            .to_network(&library);
        let words = arith_words(&mapped, ArithSpec::Mul, true).unwrap();
        let (outcome, stats) =
            prove_against_spec(&mapped, ArithSpec::Mul, &words, &AlgebraOptions::default())
                .unwrap();
        assert_eq!(outcome, SpecOutcome::Proven, "{width} {style} {lib}");
        assert_eq!(stats.method, "rewriting", "{width} {style} {lib}");
        // No full adder of the generated array multiplier is lost in
        // mapping (Wallace and Dadda trees are proven with a few of theirs
        // left split, e.g. 14 of 960 sums on the 32-bit Dadda on ribbon3).
        if style == "array" {
            let original = multiplier(width, style);
            let (_, plain) = prove_against_spec(
                &original,
                ArithSpec::Mul,
                &arith_words(&original, ArithSpec::Mul, true).unwrap(),
                &AlgebraOptions::default(),
            )
            .unwrap();
            println!(
                "{width} {style} {lib}: xor3 {} of {}, maj {} of {}",
                stats.xor3, plain.xor3, stats.maj, plain.maj
            );
        }
    }
}

/// Adders of 64 and 128 bits in every generated style against `--spec
/// add`, with and without carry-in.
#[test]
fn adders_are_proven_against_the_sum() {
    let styles = Family::Adder.styles();
    let widths: &[u32] = if cfg!(debug_assertions) {
        &[64]
    } else {
        &[64, 128]
    };
    for &width in widths {
        for style in styles {
            for carry_in in [false, !cfg!(debug_assertions)] {
                let params = Params {
                    carry_in,
                    ..Params::new(width).with_style(*style)
                };
                let adder = generate(Family::Adder, &params).unwrap();
                let verdict = check(&adder, &adder.clone(), &with_spec(ArithSpec::Add)).unwrap();
                assert!(
                    matches!(verdict, Verdict::Equivalent { .. }),
                    "{width} {style} cin={carry_in}: {verdict:?}"
                );
            }
        }
    }
}

/// Copies `net`, changing gate `victim`: an AND becomes an XOR, an XOR an
/// AND, a majority an XOR of its first two fanins.
fn mutate(net: &Network, victim: usize) -> Network {
    let mut out = Network::new(format!("{}_mutant{victim}", net.name()));
    let mut map = vec![Lit::FALSE; net.num_nodes()];
    for (name, id) in net.inputs() {
        map[id.index()] = out.add_input(name.clone()).unwrap();
    }
    let lit = |map: &[Lit], l: Lit| map[l.node().index()].xor(l.is_complemented());
    for i in 0..net.num_nodes() {
        let id = NodeId(i as u32);
        if !net.is_gate(id) {
            continue;
        }
        let f: Vec<Lit> = net.fanins(id).iter().map(|&l| lit(&map, l)).collect();
        map[i] = match (net.kind(id), i == victim) {
            (NodeKind::And, false) => out.and(f[0], f[1]),
            (NodeKind::And, true) => out.xor(f[0], f[1]),
            (NodeKind::Xor, false) => out.xor(f[0], f[1]),
            (NodeKind::Xor, true) => out.and(f[0], f[1]),
            (NodeKind::Maj, false) => out.maj(f[0], f[1], f[2]),
            (NodeKind::Maj, true) => out.xor(f[0], f[1]),
            _ => unreachable!("gates only"),
        };
    }
    for (name, &l) in net.outputs() {
        out.add_output(name.clone(), lit(&map, l)).unwrap();
    }
    out
}

/// The product of the two input words, read from `pattern` (inputs in
/// declaration order: A in the first half, B in the second), by machine
/// integer multiplication (u128 holds a 64 x 64 product): the outside
/// check of every counterexample.
fn integer_product(pattern: &[bool]) -> u128 {
    let half = pattern.len() / 2;
    let word = |bits: &[bool]| {
        bits.iter()
            .enumerate()
            .fold(0u128, |v, (k, &b)| v | (u128::from(b) << k))
    };
    word(&pattern[..half]) * word(&pattern[half..])
}

/// The output word of `net` on `pattern`, least significant bit first,
/// by the network's own one-pattern simulation.
fn simulated_word(net: &Network, pattern: &[bool]) -> u128 {
    let ci: Vec<u64> = pattern.iter().map(|&b| u64::from(b)).collect();
    let values = net.simulate(&ci);
    net.outputs()
        .values()
        .enumerate()
        .fold(0u128, |v, (k, &o)| {
            let bit = (values[o.node().index()] ^ u64::from(o.is_complemented())) & 1;
            v | (u128::from(bit) << k)
        })
}

/// The output word of a mapped netlist on `pattern`, evaluating each cell
/// instance's truth table in order (independent of the network built by
/// `to_network`).
fn mapped_word(mapped: &MappedNetlist, library: &Library, pattern: &[bool]) -> u128 {
    let mut value = vec![false; mapped.nets.len()];
    for (p, &bit) in mapped.inputs.iter().zip(pattern) {
        value[p.net as usize] = bit;
    }
    for (i, net) in mapped.nets.iter().enumerate() {
        if let Driver::Constant(c) = net.driver {
            value[i] = c;
        }
    }
    for inst in &mapped.instances {
        let row = inst.inputs.iter().enumerate().fold(0usize, |r, (k, &n)| {
            r | (usize::from(value[n as usize]) << k)
        });
        value[inst.output as usize] = (library.cells[inst.cell as usize].truth >> row) & 1 == 1;
    }
    mapped.outputs.iter().enumerate().fold(0u128, |v, (k, p)| {
        v | (u128::from(value[p.net as usize]) << k)
    })
}

/// A copy of `mapped` with instance `victim` given another cell of the same
/// number of inputs and a different function (the next such cell in library
/// order); `None` when the library has no such cell.
fn mutate_cell(mapped: &MappedNetlist, library: &Library, victim: usize) -> Option<MappedNetlist> {
    let cell = &library.cells[mapped.instances[victim].cell as usize];
    let n = library.cells.len();
    let start = mapped.instances[victim].cell as usize;
    let other = (1..n).map(|d| (start + d) % n).find(|&c| {
        let o = &library.cells[c];
        o.arity() == cell.arity() && o.truth != cell.truth
    })?;
    let mut out = mapped.clone();
    out.instances[victim].cell = other as u32;
    Some(out)
}

/// Counts of one mutant campaign.
#[derive(Default)]
struct Campaign {
    tried: usize,
    refuted: usize,
}

impl Campaign {
    /// Proves `bad` against `--spec mul`; a refutation's pattern must give
    /// a wrong product by `independent_word` against integer
    /// multiplication.
    fn run(&mut self, bad: &Network, what: &str, independent_word: impl Fn(&[bool]) -> u128) {
        self.tried += 1;
        let words = arith_words(bad, ArithSpec::Mul, false).unwrap();
        let (outcome, _) =
            prove_against_spec(bad, ArithSpec::Mul, &words, &AlgebraOptions::default()).unwrap();
        // A mutation may change nothing observable (proven) or leave the
        // proof undecided; those are counted as not refuted.
        if let SpecOutcome::Refuted(pattern) = outcome {
            let width = words.outputs.len();
            let mask = if width >= 128 {
                u128::MAX
            } else {
                (1u128 << width) - 1
            };
            assert_ne!(
                independent_word(&pattern),
                integer_product(&pattern) & mask,
                "{what}: the counterexample gives the right product"
            );
            self.refuted += 1;
        }
    }
}

/// At least 100 single-gate mutants of 16 x 16, 32 x 32 and 64 x 64
/// multipliers of every architecture, unmapped (a gate changes kind) and
/// mapped on ribbon3, ribbon2 and cmos-le (a cell becomes another cell of the
/// same size; at 64 bits the array on ribbon2), are refuted; each counterexample gives a wrong product by
/// simulation outside the prover against integer multiplication. On 8 x 8 the
/// verdict also agrees with exhaustive simulation.
#[test]
fn single_gate_mutants_are_refuted_with_confirmed_counterexamples() {
    let mut rng = SplitMix64::new(17);
    let mut campaign = Campaign::default();
    // Every size and architecture unmapped; mapped at 16 and 32 bits, the
    // library turning with each (size, architecture) so that each library
    // meets each architecture; at 64 bits one mapped architecture (mapping
    // a 64 x 64 multiplier takes seconds per library).
    let (widths, per_style): (&[u32], usize) = if cfg!(debug_assertions) {
        (&[16], 2)
    } else {
        (&[16, 32, 64], 8)
    };
    let libraries = ["ribbon3", "ribbon2", "cmos-le"];
    let mut turn = 0;
    for &width in widths {
        for style in STYLES {
            let good = multiplier(width, style);
            let gates: Vec<usize> = good
                .node_ids()
                .filter(|&id| good.is_gate(id))
                .map(|id| id.index())
                .collect();
            for _ in 0..per_style {
                let victim = gates[rng.below(gates.len() as u64) as usize];
                let bad = mutate(&good, victim);
                let what = format!("{width} {style} gate {victim}");
                campaign.run(&bad, &what, |p| simulated_word(&bad, p));
            }
            // At 64 bits only the array on ribbon2 (its full adders split
            // by two-input cells; mapping on ribbon2 is the quickest).
            let lib = if width > 32 {
                if style != "array" {
                    continue;
                }
                "ribbon2"
            } else {
                turn += 1;
                libraries[(turn - 1) % libraries.len()]
            };
            let library = Library::builtin(lib).unwrap();
            let mapped = map(&good, &library, &MapOptions::default()).unwrap();
            for _ in 0..per_style {
                let victim = rng.below(mapped.instances.len() as u64) as usize;
                let Some(bad) = mutate_cell(&mapped, &library, victim) else {
                    continue;
                };
                let what = format!("{width} {style} {lib} cell {victim}");
                campaign.run(&bad.to_network(&library), &what, |p| {
                    mapped_word(&bad, &library, p)
                });
            }
        }
    }
    // 8 x 8: the verdict of the specification route equals enumeration's.
    for style in STYLES {
        let good = multiplier(8, style);
        for victim in good.node_ids().filter(|&id| good.is_gate(id)).step_by(7) {
            let bad = mutate(&good, victim.index());
            let verdict = check(&good, &bad, &with_spec(ArithSpec::Mul)).unwrap();
            let exhaustive = check(&good, &bad, &by_order()).unwrap();
            assert_eq!(verdict.name(), exhaustive.name(), "8 {style} {victim:?}");
        }
    }
    // A mutant may change nothing observable; nearly all must be refuted.
    let Campaign { tried, refuted } = campaign;
    println!("{refuted} of {tried} mutants refuted");
    assert!(
        refuted * 10 >= tried * 9,
        "only {refuted} of {tried} refuted"
    );
    if !cfg!(debug_assertions) {
        assert!(refuted >= 100, "only {refuted} mutants refuted");
    }
}

/// Multiply-accumulate by hand (product of the generated multiplier plus a
/// ripple addition of C) against `--spec mac`; a wrong addend bit is caught.
#[test]
fn multiply_accumulate_is_proven_and_a_wrong_one_refuted() {
    for wrong in [false, true] {
        let width = 6;
        let product = multiplier(width, "dadda");
        let mut net = Network::new("mac");
        let ins: Vec<Lit> = (0..2 * width)
            .map(|k| {
                let name = if k < width {
                    format!("a[{k}]")
                } else {
                    format!("b[{}]", k - width)
                };
                net.add_input(name).unwrap()
            })
            .collect();
        let c: Vec<Lit> = (0..2 * width)
            .map(|k| net.add_input(format!("c[{k}]")).unwrap())
            .collect();
        let p = net.copy_logic(&product, &ins);
        let mut carry = Lit::FALSE;
        for (k, (_, &o)) in product.outputs().iter().enumerate() {
            let x = p[o.node().index()].xor(o.is_complemented());
            let y = if wrong && k == 3 { !c[k] } else { c[k] };
            let h = net.xor(x, y);
            let s = net.xor(h, carry);
            carry = net.maj(x, y, carry);
            net.add_output(format!("y[{k}]"), s).unwrap();
        }
        let opts = EquivOptions {
            spec: Some(ArithSpec::Mac),
            ..EquivOptions::default()
        };
        let verdict = check(&net, &net.clone(), &opts).unwrap();
        if wrong {
            // Both sides are wrong alike: the spec route refutes each, and
            // sweeping then proves the two copies equal.
            let words = arith_words(&net, ArithSpec::Mac, true).unwrap();
            let (outcome, _) = ribbonmap::equiv::algebra::prove_against_spec(
                &net,
                ArithSpec::Mac,
                &words,
                &Default::default(),
            )
            .unwrap();
            let ribbonmap::equiv::algebra::SpecOutcome::Refuted(pattern) = outcome else {
                panic!("wrong mac not refuted: {outcome:?}");
            };
            let (got, want) = simulate_against_spec(&net, ArithSpec::Mac, &words, &pattern);
            assert_ne!(got, want);
            assert!(matches!(verdict, Verdict::Equivalent { .. }));
        } else {
            assert!(matches!(verdict, Verdict::Equivalent { .. }), "{verdict:?}");
        }
    }
}

/// The known gap of the test above: the 32-bit Wallace tree mapped on
/// cmos-le, alone against the product.
#[test]
#[ignore = "known gap: on the 32-bit Wallace tree mapped on cmos-le, recovery finds 957 three-input XORs against its original's 959 and rewriting outgrows the term limit (2,000,000 monomials, 3,238 gates left); equiv proves it against its original instead"]
fn mapped_wallace_on_cmos_le_is_proven_alone_against_the_product() {
    let library = Library::builtin("cmos-le").unwrap();
    let mapped = map(&multiplier(32, "wallace"), &library, &MapOptions::default())
        .unwrap()
        .to_network(&library);
    let words = arith_words(&mapped, ArithSpec::Mul, true).unwrap();
    let (outcome, _) =
        prove_against_spec(&mapped, ArithSpec::Mul, &words, &AlgebraOptions::default()).unwrap();
    assert_eq!(outcome, SpecOutcome::Proven);
}
