//! Timings, not checks: run with `cargo test --release --test exact_timing
//! -- --ignored --nocapture` to print the slowest classes of the hardest
//! workload (four-input functions over all two-input gates, complements
//! free) and the cold and cached coverage of ribbon3 for four inputs.
//! Each network printed is still re-simulated against its function.

use ribbonmap::exact::classes::{enumerate_classes, Transforms};
use ribbonmap::exact::{coverage_of_library, synthesize, CoverageOptions, ExactOptions, GateSpec};
use ribbonmap::library::Library;
use std::time::Instant;

#[test]
#[ignore = "timing report, not a check: cargo test --release --test exact_timing -- --ignored --nocapture"]
fn slowest_four_input_classes() {
    let gates: Vec<GateSpec> = (0..16u64)
        .map(|t| GateSpec::new(format!("f{t:X}"), 2, t, 1.0))
        .collect();
    let opts = ExactOptions {
        free_complements: true,
        ..ExactOptions::default()
    };
    let (_, classes) = enumerate_classes(4, Transforms::Npn);
    let mut times = Vec::new();
    for c in &classes {
        let start = Instant::now();
        let r = synthesize(&[c.representative], 4, &gates, &opts).unwrap();
        assert_eq!(r.simulate(&gates), vec![c.representative]);
        times.push((start.elapsed().as_secs_f64(), c.representative, r.cells));
    }
    let total: f64 = times.iter().map(|t| t.0).sum();
    times.sort_by(|a, b| b.0.total_cmp(&a.0));
    eprintln!("222 NPN classes on one thread: {total:.1} s");
    for (s, f, cells) in times.iter().take(8) {
        eprintln!("  0x{f:04X}: {cells} gates, {s:.2} s");
    }
}

#[test]
#[ignore = "timing report, not a check: cargo test --release --test exact_timing -- --ignored --nocapture"]
fn ribbon3_four_input_coverage_cold_and_cached() {
    let dir = tempfile::tempdir().unwrap();
    std::env::set_var("RIBBONMAP_CACHE_DIR", dir.path());
    let lib = Library::builtin("ribbon3").unwrap();
    let opts = CoverageOptions::default();
    let start = Instant::now();
    let cold = coverage_of_library(&lib, &opts).unwrap();
    let cold_s = start.elapsed().as_secs_f64();
    let start = Instant::now();
    let cached = coverage_of_library(&lib, &opts).unwrap();
    let cached_s = start.elapsed().as_secs_f64();
    assert!(cached.cached);
    assert_eq!(cold.histogram, cached.histogram);
    assert_eq!(cold.histogram.values().sum::<u64>() + cold.unsolved, 65536);
    eprintln!(
        "ribbon3, 4 inputs: cold {cold_s:.1} s ({} classes, {} threads), cached {cached_s:.3} s; histogram {:?}, unproven {}",
        cold.classes.len(),
        rayon::current_num_threads(),
        cold.histogram,
        cold.unproven
    );
}
