//! Start-up: what a process pays before it maps anything, and the whole
//! `ribbonmap map benchmarks/adder8_ripple.blif` as a user runs it.
//!
//! - reading a cached match table (the checked load of
//!   `mapper::table_cache`, implementations built on first use) for
//!   ribbon3 and the two built-ins inside it, whose runs join its pool;
//! - building ribbon3's table from scratch (what the first process pays);
//! - the whole command (default goal and proof) with a warm cache folder,
//!   and with `RIBBONMAP_NO_CACHE` (every table built in the process).
//!
//! Run `cargo bench --bench startup`. Criterion reports medians. The cache
//! folder is a temporary one, never the user's.

use criterion::Criterion;
use ribbonmap::library::Library;
use ribbonmap::mapper::table_cache::{decode, encode};
use ribbonmap::mapper::MatchTable;
use std::process::Command;

fn main() {
    let mut c = Criterion::default().sample_size(20).configure_from_args();
    let mut group = c.benchmark_group("startup");
    for name in ["ribbon3", "ribbon3-nomaj", "ribbon2"] {
        let lib = Library::builtin(name).expect("built-in");
        let bytes = encode(&MatchTable::build(&lib), &lib);
        group.bench_function(format!("read cached table {name}"), |b| {
            b.iter(|| decode(bytes.clone(), &lib).expect("valid file"))
        });
    }
    let ribbon3 = Library::builtin("ribbon3").expect("built-in");
    group.bench_function("build table ribbon3", |b| {
        b.iter(|| MatchTable::build(&ribbon3))
    });
    let exe = env!("CARGO_BIN_EXE_ribbonmap");
    let root = env!("CARGO_MANIFEST_DIR");
    let cache = tempfile::tempdir().expect("temporary folder");
    let run = |no_cache: bool| {
        let mut cmd = Command::new(exe);
        cmd.current_dir(root)
            .env("RIBBONMAP_CACHE_DIR", cache.path())
            .args(["map", "benchmarks/adder8_ripple.blif"]);
        if no_cache {
            cmd.env("RIBBONMAP_NO_CACHE", "1");
        }
        let out = cmd.output().expect("runs");
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
    };
    run(false);
    group.bench_function("map adder8_ripple, warm cache (process)", |b| {
        b.iter(|| run(false))
    });
    group.sample_size(10);
    group.bench_function("map adder8_ripple, no cache (process)", |b| {
        b.iter(|| run(true))
    });
    group.finish();
    c.final_summary();
}
