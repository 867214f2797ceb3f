//! Equivalence checking on the ISCAS-85 reference pairs and their mutants.
//!
//! Source: tests/data/reference/netlists/iscas85 (circuitgraph 0.2.1, via
//! PROVENANCE.md): each cNNN.v is an ISCAS-85 circuit (Brglez and Fujiwara
//! 1985) and cNNNg.v the same circuit re-synthesised by a commercial flow;
//! the pairs are equivalent with ports matched by name.

mod equiv_support;

use equiv_support::*;
use ribbonmap::equiv::{check, check_with_stats, EquivOptions, Verdict};
use ribbonmap::network::{Lit, Network, NodeId, SplitMix64};

/// Every cNNN.v / cNNNg.v pair is equivalent (PROVENANCE.md), proven by
/// the checker with ports paired by name; port counts follow Hansen, Yalcin
/// and Hayes 1999 (PROVENANCE.md table).
#[test]
fn iscas85_pairs_are_proven_equivalent() {
    let ports: [(usize, usize); 11] = [
        (5, 2),
        (36, 7),
        (41, 32),
        (60, 26),
        (41, 32),
        (33, 25),
        (233, 140),
        (50, 22),
        (178, 123),
        (32, 32),
        (207, 108),
    ];
    for (circuit, (inputs, outputs)) in CIRCUITS.iter().zip(ports) {
        let a = iscas(circuit, false);
        let b = iscas(circuit, true);
        assert_eq!(
            (a.inputs().len(), a.outputs().len()),
            (inputs, outputs),
            "{circuit}"
        );
        let report = check_with_stats(&a, &b, &EquivOptions::default()).unwrap();
        assert_eq!(
            report.verdict,
            Verdict::Equivalent {
                outputs_checked: outputs
            },
            "{circuit}: {:?}",
            report.stats
        );
    }
}

/// A second, independent SAT query over the full miter of `a` and `b`
/// (same inputs in the same order), written directly on varisat with a plain
/// Tseitin encoding and no sweeping: true when some output pair can differ.
fn independent_sat_differs(a: &Network, b: &Network) -> bool {
    use varisat::{ExtendFormula, Lit as S, Solver};
    let mut solver = Solver::new();
    let inputs: Vec<S> = (0..a.combinational_inputs().len())
        .map(|_| solver.new_lit())
        .collect();
    let mut encode = |net: &Network, solver: &mut Solver| -> Vec<S> {
        let mut var = vec![None::<S>; net.num_nodes()];
        let zero = solver.new_lit();
        solver.add_clause(&[!zero]);
        var[0] = Some(zero);
        for (k, id) in net.combinational_inputs().iter().enumerate() {
            var[id.index()] = Some(inputs[k]);
        }
        let lit = |var: &Vec<Option<S>>, l: Lit| {
            let v = var[l.node().index()].unwrap();
            if l.is_complemented() {
                !v
            } else {
                v
            }
        };
        for id in net.node_ids() {
            if !net.is_gate(id) {
                continue;
            }
            let f: Vec<S> = net.fanins(id).iter().map(|&l| lit(&var, l)).collect();
            let o = solver.new_lit();
            // Clauses straight from the truth tables: for every fanin row,
            // the output value (AND, XOR, MAJ).
            let k = f.len();
            for row in 0..(1usize << k) {
                let bits: Vec<bool> = (0..k).map(|j| (row >> j) & 1 == 1).collect();
                let value = match net.kind(id) {
                    ribbonmap::network::NodeKind::And => bits[0] && bits[1],
                    ribbonmap::network::NodeKind::Xor => bits[0] ^ bits[1],
                    _ => bits.iter().filter(|&&x| x).count() >= 2,
                };
                let mut clause: Vec<S> = f
                    .iter()
                    .zip(&bits)
                    .map(|(&l, &b)| if b { !l } else { l })
                    .collect();
                clause.push(if value { o } else { !o });
                solver.add_clause(&clause);
            }
            var[id.index()] = Some(o);
        }
        net.combinational_outputs()
            .iter()
            .map(|&l| lit(&var, l))
            .collect()
    };
    let oa = encode(a, &mut solver);
    let ob = encode(b, &mut solver);
    // Some output pair differs: OR over d_i, d_i -> (x_i xor y_i).
    let mut any = Vec::new();
    for (&x, &y) in oa.iter().zip(&ob) {
        let d = solver.new_lit();
        solver.add_clause(&[!d, x, y]);
        solver.add_clause(&[!d, !x, !y]);
        any.push(d);
    }
    solver.add_clause(&any);
    solver.solve().unwrap()
}

/// Twenty random single-gate mutants of every ISCAS-85 circuit: each is
/// reported different with a counterexample that really separates the two
/// networks (checked by simulating both here), or equivalent only when an
/// independent SAT query over the full miter finds no difference.
#[test]
fn iscas85_mutants_are_caught() {
    let mut rng = SplitMix64::new(2024);
    let mut different = 0;
    let mut redundant = 0;
    for circuit in CIRCUITS {
        let original = iscas(circuit, false);
        for _ in 0..20 {
            let mutation = random_mutation(&original, &mut rng);
            let (mutant, _) = mutate(&original, mutation);
            match check(&original, &mutant, &EquivOptions::default()).unwrap() {
                Verdict::Different {
                    counterexample,
                    outputs_checked,
                } => {
                    assert_eq!(outputs_checked, original.outputs().len());
                    let pattern: Vec<bool> = original
                        .inputs()
                        .keys()
                        .map(|n| counterexample.inputs[n.as_str()])
                        .collect();
                    let (oa, ob) = (eval(&original, &pattern), eval(&mutant, &pattern));
                    let separated: Vec<String> = original
                        .outputs()
                        .keys()
                        .enumerate()
                        .filter(|&(k, _)| oa[k] != ob[k])
                        .map(|(_, n)| n.clone())
                        .collect();
                    assert!(!separated.is_empty(), "{circuit} {mutation:?}");
                    assert_eq!(separated, counterexample.differing_outputs);
                    different += 1;
                }
                Verdict::Equivalent { .. } => {
                    assert!(
                        !independent_sat_differs(&original, &mutant),
                        "{circuit} {mutation:?}: called equivalent but differs"
                    );
                    redundant += 1;
                }
                Verdict::Undecided { outputs, .. } => {
                    panic!("{circuit} {mutation:?}: undecided on {outputs:?}")
                }
            }
        }
    }
    assert_eq!(different + redundant, 220);
    // Most single-gate changes are observable (common practice for ISCAS-85).
    assert!(
        different > 150,
        "{different} different, {redundant} redundant"
    );
    let _ = NodeId(0);
}
