//! Logic optimisation before mapping: the optimised network computes the
//! same outputs as the original (checked by exhaustive simulation of every
//! input pattern, at most six inputs), keeps its ports and storage elements,
//! and removes redundancy that Boolean algebra says is there.

mod cache_support;

use proptest::prelude::*;
use ribbonmap::network::{Lit, Network, SplitMix64};
use ribbonmap::optimize::rewrite::{rewrite, RewriteOptions};
use ribbonmap::optimize::sweep::{sweep, SweepOptions};
use ribbonmap::optimize::{optimize, OptimizeOptions};

/// A random network over `inputs` inputs with `gates` AND/XOR/MAJ gates on
/// random, randomly complemented earlier signals, favouring recent ones so
/// it gets deep, and `outputs` outputs.
fn random_network(seed: u64, inputs: usize, gates: usize, outputs: usize) -> Network {
    let mut rng = SplitMix64::new(seed);
    let mut net = Network::new("random");
    let mut signals: Vec<Lit> = (0..inputs)
        .map(|k| net.add_input(format!("x{k}")).unwrap())
        .collect();
    let pick = |rng: &mut SplitMix64, signals: &Vec<Lit>| {
        let n = signals.len() as u64;
        let k = if rng.below(3) == 0 {
            rng.below(n)
        } else {
            n - 1 - rng.below(n.min(6))
        };
        signals[k as usize].xor(rng.below(2) == 1)
    };
    for _ in 0..gates {
        let (a, b, c) = (
            pick(&mut rng, &signals),
            pick(&mut rng, &signals),
            pick(&mut rng, &signals),
        );
        let g = match rng.below(5) {
            0..=2 => net.and(a, b),
            3 => net.xor(a, b),
            _ => net.maj(a, b, c),
        };
        signals.push(g);
    }
    for o in 0..outputs {
        let l = pick(&mut rng, &signals);
        net.add_output(format!("y{o}"), l).unwrap();
    }
    net
}

/// Every output's complete truth table, by name (exhaustive simulation).
fn tables(net: &Network) -> Vec<(String, u64)> {
    let t = net.output_truth_tables().expect("at most six inputs");
    net.outputs().keys().cloned().zip(t).collect()
}

fn same_ports(a: &Network, b: &Network) {
    assert_eq!(
        a.inputs().keys().collect::<Vec<_>>(),
        b.inputs().keys().collect::<Vec<_>>()
    );
    assert_eq!(
        a.outputs().keys().collect::<Vec<_>>(),
        b.outputs().keys().collect::<Vec<_>>()
    );
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]

    #[test]
    fn optimised_networks_compute_the_same_outputs(
        seed in any::<u64>(),
        inputs in 2usize..=6,
        gates in 1usize..60,
        outputs in 1usize..5,
        lower in any::<bool>(),
        zero_gain in any::<bool>(),
    ) {
        let net = random_network(seed, inputs, gates, outputs);
        let mut opts = OptimizeOptions::default();
        opts.rewrite.lower_xor = lower;
        opts.rewrite.lower_maj = lower;
        opts.rewrite.zero_gain = zero_gain;
        let (out, counts) = optimize(&net, &opts);
        same_ports(&net, &out);
        prop_assert_eq!(tables(&net), tables(&out));
        prop_assert_eq!(counts.nodes_after, out.gate_count());
        if !lower {
            // Without lowering, no pass may add nodes beyond what it frees.
            prop_assert!(out.gate_count() <= net.cleanup().gate_count());
        }
    }

    #[test]
    fn one_rewriting_pass_and_one_sweep_each_keep_the_outputs(
        seed in any::<u64>(),
        inputs in 2usize..=6,
        gates in 1usize..40,
    ) {
        let net = random_network(seed, inputs, gates, 3);
        let (r, _) = rewrite(&net, &RewriteOptions::default());
        prop_assert_eq!(tables(&net), tables(&r));
        let (s, _) = sweep(&net, &SweepOptions::default());
        prop_assert_eq!(tables(&net), tables(&s));
        prop_assert!(s.gate_count() <= net.cleanup().gate_count());
    }
}

#[test]
fn redundant_logic_disappears() {
    // (a & b) | (a & !b) is a; a ^ b written once as an XOR node and once
    // as (a | b) & !(a & b) is one function (Boolean algebra).
    let mut net = Network::new("redundant");
    let a = net.add_input("a").unwrap();
    let b = net.add_input("b").unwrap();
    let c = net.add_input("c").unwrap();
    let p = net.and(a, b);
    let q = net.and(a, !b);
    let y = net.or(p, q);
    net.add_output("y", y).unwrap();
    let x1 = net.xor(a, c);
    let o = net.or(a, c);
    let n = net.and(a, c);
    let x2 = net.and(o, !n);
    let z = net.and(x1, x2);
    net.add_output("z", z).unwrap();
    let opts = OptimizeOptions {
        rewrite: RewriteOptions {
            lower_xor: false,
            lower_maj: false,
            ..RewriteOptions::default()
        },
        ..OptimizeOptions::default()
    };
    let (out, _) = optimize(&net, &opts);
    assert_eq!(tables(&net), tables(&out));
    assert_eq!(out.outputs()["y"], out.inputs()["a"].lit());
    // z = a ^ c: one XOR node is all that is left.
    assert_eq!(out.gate_count(), 1);
}

#[test]
fn shared_cones_are_rewritten_into_fewer_nodes() {
    // a·b·c + a·b·d + a·b·e built as a sum of products: 2 + 2 + 2 ANDs for
    // the products and 2 for the sum (8); factored a·b·(c + d + e) needs 4.
    let mut net = Network::new("sop");
    let v: Vec<Lit> = ["a", "b", "c", "d", "e"]
        .iter()
        .map(|n| net.add_input(*n).unwrap())
        .collect();
    let terms: Vec<Lit> = (2..5)
        .map(|k| {
            let t = net.and(v[0], v[k]);
            net.and(t, v[1])
        })
        .collect();
    let s1 = net.or(terms[0], terms[1]);
    let s = net.or(s1, terms[2]);
    net.add_output("y", s).unwrap();
    let before = net.gate_count();
    let (out, _) = optimize(&net, &OptimizeOptions::default());
    assert_eq!(tables(&net), tables(&out));
    assert!(
        out.gate_count() < before,
        "{} >= {before}",
        out.gate_count()
    );
    assert_eq!(out.gate_count(), 4);
}

#[test]
fn storage_elements_pass_through() {
    let mut net = Network::new("seq");
    let a = net.add_input("a").unwrap();
    let q = net
        .add_storage(
            "r",
            Some("clk".into()),
            ribbonmap::network::InitValue::Zero,
            None,
        )
        .unwrap();
    let p = net.and(a, q);
    let r = net.and(a, !q);
    let next = net.or(p, r);
    net.set_storage_next("r", next).unwrap();
    net.add_output("y", p).unwrap();
    let (out, _) = optimize(&net, &OptimizeOptions::default());
    assert_eq!(out.storage().len(), 1);
    // next = a·q + a·!q = a (Boolean algebra).
    assert_eq!(out.storage()["r"].next, out.inputs()["a"].lit());
    assert_eq!(tables(&net), tables(&out));
}

#[test]
fn map_command_optimises_on_request_and_proves_the_result() {
    // c432 (Hansen et al. 1999 circuits, via PROVENANCE.md) on nand-nor-inv.
    let run = |extra: &[&str]| {
        let out = assert_cmd::Command::cargo_bin("ribbonmap")
            .unwrap()
            .env("RIBBONMAP_CACHE_DIR", cache_support::dir())
            .args([
                "map",
                "tests/data/reference/netlists/iscas85/c432.v",
                "--lib",
                "nand-nor-inv",
                "--goal",
                "area",
                "--format",
                "json",
            ])
            .args(extra)
            .output()
            .unwrap();
        assert!(out.status.success());
        let json: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
        assert_eq!(json["verified"], "proven");
        (json["area"].as_f64().unwrap(), json)
    };
    let (plain, _) = run(&[]);
    let (optimised, json) = run(&["--restructure"]);
    assert!(optimised < plain, "{optimised} >= {plain}");
    // The optimisation phase is reported in seconds (no assertion on its
    // value: wall-clock time is not a test result).
    let seconds = json["seconds"]["restructure"].as_f64().unwrap();
    assert!(seconds.is_finite() && seconds >= 0.0, "{seconds}");
}
