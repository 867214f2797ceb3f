//! Speed of equivalence checking on classic hard cases for plain SAT:
//! - the ISCAS-85 16x16 multiplier c6288 against its re-synthesised version
//!   c6288g (tests/data/reference, circuitgraph 0.2.1 via PROVENANCE.md);
//! - a 128x128 array multiplier (about 98k nodes) against a restructured copy
//!   (about 180k nodes) whose XORs and majorities are all rewritten as AND/OR
//!   logic;
//! - the generators' 128x128 and 160x160 array multipliers mapped onto the
//!   built-in ribbon3 library (the mapped netlist read as a network: about
//!   65k and 102k nodes) against their originals, as `map --verify full`
//!   proves every mapping.
//!
//! Each case is checked once before its measurement and its statistics
//! (per-phase seconds, SAT calls by kind) are printed to standard error.
//! Run one case with `cargo bench --bench equiv -- mapped_mul160` (a
//! substring of its name); `EQUIV_WINDOW_GATES=0` measures the sweep without
//! window proofs.

use criterion::{criterion_group, criterion_main, Criterion};
use ribbonmap::equiv::{check_with_stats, EquivOptions, Verdict};
use ribbonmap::generate::{generate, Family, Params};
use ribbonmap::library::Library;
use ribbonmap::mapper::{map, MapOptions};
use ribbonmap::network::{Lit, Network};

#[path = "../tests/equiv_support/mod.rs"]
mod equiv_support;

/// Full adder in the multiplier's own style: `xor_style` uses XOR nodes and
/// shares `a ^ b` with the carry; otherwise only AND/OR logic with the
/// carry as a sum of three products.
fn full_adder(net: &mut Network, a: Lit, b: Lit, c: Lit, xor_style: bool) -> (Lit, Lit) {
    if xor_style {
        let s1 = net.xor(a, b);
        let sum = net.xor(s1, c);
        let ab = net.and(a, b);
        let cs = net.and(c, s1);
        (sum, net.or(ab, cs))
    } else {
        let xor = |net: &mut Network, x: Lit, y: Lit| {
            let t = net.and(x, !y);
            let e = net.and(!x, y);
            net.or(t, e)
        };
        let s1 = xor(net, a, b);
        let sum = xor(net, s1, c);
        let ab = net.and(a, b);
        let ac = net.and(a, c);
        let bc = net.and(b, c);
        let t = net.or(ab, ac);
        (sum, net.or(t, bc))
    }
}

/// An n x n unsigned array multiplier (rows of ripple-carry adders);
/// inputs a[0..n], b[0..n], outputs p[0..2n], bit 0 least significant.
fn array_multiplier(n: usize, xor_style: bool) -> Network {
    let mut net = Network::new(if xor_style { "mul_xor" } else { "mul_andor" });
    let a: Vec<Lit> = (0..n)
        .map(|i| net.add_input(format!("a[{i}]")).unwrap())
        .collect();
    let b: Vec<Lit> = (0..n)
        .map(|i| net.add_input(format!("b[{i}]")).unwrap())
        .collect();
    let mut product = Vec::new();
    // Running sum of the rows so far, bits i.. of the product.
    let mut acc: Vec<Lit> = (0..n).map(|j| net.and(a[j], b[0])).collect();
    for &b_row in &b[1..n] {
        product.push(acc[0]);
        let mut next = Vec::with_capacity(n);
        let mut carry = Lit::FALSE;
        for j in 0..n {
            let pp = net.and(a[j], b_row);
            let upper = if j + 1 < n { acc[j + 1] } else { Lit::FALSE };
            let (s, c) = full_adder(&mut net, pp, upper, carry, xor_style);
            next.push(s);
            carry = c;
        }
        next.push(carry);
        acc = next;
    }
    product.extend(acc);
    for (i, &p) in product.iter().enumerate().take(2 * n) {
        net.add_output(format!("p[{i}]"), p).unwrap();
    }
    net
}

/// The generators' `n` x `n` array multiplier and its mapping onto ribbon3,
/// read back as a network.
fn mapped_multiplier(n: u32) -> (Network, Network) {
    let original = generate(Family::Multiplier, &Params::new(n).with_style("array"))
        .expect("array multiplier of a supported width");
    let lib = Library::builtin("ribbon3").expect("built-in ribbon3");
    let mapped = map(&original, &lib, &MapOptions::default())
        .expect("maps")
        .to_network(&lib);
    (original, mapped)
}

/// The check's options: the defaults, except that the environment variable
/// `EQUIV_WINDOW_GATES` sets the window size (0 measures the sweep without
/// window proofs, as before they existed).
fn options() -> EquivOptions {
    let mut opts = EquivOptions::default();
    if let Some(gates) = std::env::var("EQUIV_WINDOW_GATES")
        .ok()
        .and_then(|v| v.parse().ok())
    {
        opts.window_gates = gates;
    }
    opts
}

/// Checks `a` against `b` once, insists on `equivalent`, prints the
/// statistics, then measures the check.
fn measure(
    group: &mut criterion::BenchmarkGroup<'_, criterion::measurement::WallTime>,
    name: &str,
    a: &Network,
    b: &Network,
) {
    // Skip the statistics run of a case the command-line filter leaves out.
    let filter = std::env::args().skip(1).find(|arg| !arg.starts_with('-'));
    if filter.is_some_and(|f| !name.contains(f.as_str())) {
        return;
    }
    eprintln!("{name}: {} and {} nodes", a.num_nodes(), b.num_nodes());
    let opts = options();
    let report = check_with_stats(a, b, &options()).unwrap();
    assert!(matches!(report.verdict, Verdict::Equivalent { .. }));
    eprintln!("{name}: {}", serde_json::to_string(&report.stats).unwrap());
    group.bench_function(name, |bench| {
        bench.iter(|| check_with_stats(a, b, &opts).unwrap())
    });
}

fn bench(c: &mut Criterion) {
    let mut group = c.benchmark_group("equiv");
    group.sample_size(10);
    let a = equiv_support::iscas("c6288", false);
    let b = equiv_support::iscas("c6288", true);
    measure(&mut group, "c6288_vs_c6288g", &a, &b);

    let x = array_multiplier(128, true);
    let y = array_multiplier(128, false);
    measure(&mut group, "mul128_xor_vs_andor", &x, &y);

    for n in [128, 160] {
        let (original, mapped) = mapped_multiplier(n);
        measure(
            &mut group,
            &format!("mapped_mul{n}_vs_original"),
            &original,
            &mapped,
        );
    }
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
