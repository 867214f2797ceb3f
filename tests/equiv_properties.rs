//! Property test: on random pairs of small networks the verdict agrees with
//! exhaustive simulation every time (the outside check: all 2^n input
//! patterns, n ≤ 12).

mod equiv_support;

use equiv_support::{eval, exhaustively_equal};
use proptest::prelude::*;
use ribbonmap::equiv::{check, EquivOptions, Verdict};
use ribbonmap::network::{Lit, Network, NodeKind, SplitMix64};

/// A random network over `inputs` inputs with `gates` AND/XOR/MAJ gates on
/// random, randomly complemented earlier signals and `outputs` outputs.
fn random_network(rng: &mut SplitMix64, inputs: usize, gates: usize, outputs: usize) -> Network {
    let mut net = Network::new("random");
    let mut signals: Vec<Lit> = (0..inputs)
        .map(|k| net.add_input(format!("x{k}")).unwrap())
        .collect();
    let pick = |rng: &mut SplitMix64, signals: &Vec<Lit>| {
        // Favour recent signals so the networks get deep.
        let n = signals.len() as u64;
        let back = rng.below(n.min(8));
        let k = if rng.below(3) == 0 {
            rng.below(n)
        } else {
            n - 1 - back
        };
        signals[k as usize].xor(rng.below(2) == 1)
    };
    for _ in 0..gates {
        let (a, b, c) = (
            pick(rng, &signals),
            pick(rng, &signals),
            pick(rng, &signals),
        );
        let g = match rng.below(3) {
            0 => net.and(a, b),
            1 => net.xor(a, b),
            _ => net.maj(a, b, c),
        };
        signals.push(g);
    }
    for o in 0..outputs {
        let l = pick(rng, &signals);
        net.add_output(format!("y{o}"), l).unwrap();
    }
    net
}

/// The same functions rebuilt with Boolean identities that structural
/// hashing does not undo: `a ^ b = (a & !b) | (!a & b)`,
/// `a & b = a ^ (a & !b)`, `maj(a, b, c) = (a & b) | (c & (a | b))`.
fn rewrite(net: &Network, rng: &mut SplitMix64) -> Network {
    let mut out = net.empty_like();
    let mut map = vec![Lit::FALSE; net.num_nodes()];
    for (id, new) in net
        .combinational_inputs()
        .iter()
        .zip(out.combinational_inputs())
    {
        map[id.index()] = new.lit();
    }
    let m = |map: &Vec<Lit>, l: Lit| map[l.node().index()].xor(l.is_complemented());
    for id in net.node_ids() {
        if !net.is_gate(id) {
            continue;
        }
        let f: Vec<Lit> = net.fanins(id).iter().map(|&l| m(&map, l)).collect();
        let use_identity = rng.below(4) != 0;
        map[id.index()] = match (net.kind(id), use_identity) {
            (NodeKind::Xor, true) => {
                let t = out.and(f[0], !f[1]);
                let e = out.and(!f[0], f[1]);
                out.or(t, e)
            }
            (NodeKind::And, true) => {
                let t = out.and(f[0], !f[1]);
                out.xor(f[0], t)
            }
            (NodeKind::Maj, true) => {
                let ab = out.and(f[0], f[1]);
                let a_or_b = out.or(f[0], f[1]);
                let c = out.and(f[2], a_or_b);
                out.or(ab, c)
            }
            (NodeKind::And, false) => out.and(f[0], f[1]),
            (NodeKind::Xor, false) => out.xor(f[0], f[1]),
            _ => out.maj(f[0], f[1], f[2]),
        };
    }
    out.connect_outputs_from(net, &map);
    out
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]

    #[test]
    fn verdict_agrees_with_exhaustive_simulation(
        seed in any::<u64>(),
        inputs in 1usize..=12,
        gates in 1usize..60,
        outputs in 1usize..=4,
        equivalent_by_construction in any::<bool>(),
    ) {
        let mut rng = SplitMix64::new(seed);
        let a = random_network(&mut rng, inputs, gates, outputs);
        let b = if equivalent_by_construction {
            rewrite(&a, &mut rng)
        } else {
            random_network(&mut rng, inputs, gates, outputs)
        };
        let truth = exhaustively_equal(&a, &b);
        if equivalent_by_construction {
            prop_assert!(truth, "the rewrite changed the function");
        }
        // Enumeration off: these small miters must go through the sweep.
        let opts = EquivOptions { enumerate_up_to: 0, ..EquivOptions::default() };
        match check(&a, &b, &opts).unwrap() {
            Verdict::Equivalent { outputs_checked } => {
                prop_assert!(truth, "called equivalent, but simulation differs");
                prop_assert_eq!(outputs_checked, outputs);
            }
            Verdict::Different { counterexample, .. } => {
                prop_assert!(!truth, "called different, but simulation agrees");
                let pattern: Vec<bool> =
                    a.inputs().keys().map(|n| counterexample.inputs[n.as_str()]).collect();
                let (oa, ob) = (eval(&a, &pattern), eval(&b, &pattern));
                let differing: Vec<String> = a.outputs().keys().enumerate()
                    .filter(|&(k, _)| oa[k] != ob[k]).map(|(_, n)| n.clone()).collect();
                prop_assert!(!differing.is_empty());
                prop_assert_eq!(differing, counterexample.differing_outputs);
            }
            Verdict::Undecided { outputs, .. } => {
                prop_assert!(false, "undecided on a tiny network: {:?}", outputs);
            }
        }
    }
}

/// A random network of 10 inputs, 50 gates and 3 outputs, and beside it a
/// rewrite of it (even rounds, equivalent by construction) or an unrelated
/// random network (odd rounds).
fn random_pair(rng: &mut SplitMix64, round: usize) -> (Network, Network) {
    let a = random_network(rng, 10, 50, 3);
    let b = if round.is_multiple_of(2) {
        rewrite(&a, rng)
    } else {
        random_network(rng, 10, 50, 3)
    };
    (a, b)
}

/// The sweep alone (random simulation with a single word, so many false
/// candidates reach the solver) still agrees with exhaustive simulation.
#[test]
fn few_simulation_words_still_give_right_answers() {
    let mut rng = SplitMix64::new(7);
    for round in 0..60 {
        let (a, b) = random_pair(&mut rng, round);
        let opts = EquivOptions {
            sim_words: 1,
            enumerate_up_to: 0,
            ..EquivOptions::default()
        };
        let verdict = check(&a, &b, &opts).unwrap();
        assert_eq!(
            matches!(verdict, Verdict::Equivalent { .. }),
            exhaustively_equal(&a, &b),
            "round {round}"
        );
    }
}

/// Tiny windows cannot prove much, so their satisfiable (inconclusive)
/// answers are frequent: each must fall back to the global solver, never
/// turn into a `different` verdict. Equivalent pairs stay proven, different
/// pairs get a counterexample that really separates them (exhaustive
/// simulation and replay on the two networks as the outside checks).
#[test]
fn inconclusive_windows_fall_back_to_the_global_solver() {
    use ribbonmap::equiv::check_with_stats;
    let mut rng = SplitMix64::new(11);
    let (mut window_sat, mut global_proofs) = (0, 0);
    for round in 0..80 {
        let (a, b) = random_pair(&mut rng, round);
        let opts = EquivOptions {
            sim_words: 1,
            enumerate_up_to: 0,
            window_gates: 1 + round % 4,
            ..EquivOptions::default()
        };
        let report = check_with_stats(&a, &b, &opts).unwrap();
        window_sat += report.stats.window.satisfiable;
        global_proofs += report.stats.sweep.merged_by_sat;
        let truth = exhaustively_equal(&a, &b);
        match report.verdict {
            Verdict::Equivalent { .. } => assert!(truth, "round {round}: wrongly equivalent"),
            Verdict::Different { counterexample, .. } => {
                assert!(!truth, "round {round}: wrongly different");
                let pattern: Vec<bool> = a
                    .inputs()
                    .keys()
                    .map(|n| counterexample.inputs[n.as_str()])
                    .collect();
                let (oa, ob) = (eval(&a, &pattern), eval(&b, &pattern));
                assert_ne!(oa, ob, "round {round}: counterexample does not separate");
            }
            Verdict::Undecided { outputs, .. } => panic!("round {round}: undecided {outputs:?}"),
        }
    }
    assert!(
        window_sat > 0,
        "no window was inconclusive: the fallback went untested"
    );
    assert!(global_proofs > 0, "no pair was left to the global solver");
}
