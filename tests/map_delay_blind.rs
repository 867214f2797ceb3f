//! The least-area cover does not depend on delays.
//!
//! Two libraries with the same cells and the same cell areas but other
//! delays must give the same least-area cover: area is a sum of cell areas,
//! and nothing about a cell's delay makes a cover smaller. Here the built-in
//! ribbon3 (characterised from the demo device kit) is compared with three
//! copies whose areas are untouched: every delay multiplied by 3.7, the
//! delays reversed over the cell list (the inverter gets xnor3's delay and
//! so on), and the earlier hand-typed delays of ribbon3
//! (tests/data/libraries/ribbon3-illustrative.json). Each copy is first checked to
//! differ from the original in the delay of every cell, and the delay goal
//! is checked to give different circuits on some of them, so the comparison
//! cannot hold merely because the delays did not matter.
//!
//! Checked per circuit: the `area` run (the cover made for least area,
//! with no delay bound) has the same area on all four libraries, and the
//! area goal's result is never larger than it. (The area goal picks the
//! least area among all runs, so a delay-bounded run that happens to find
//! a smaller cover on one library may still make the goal's figure differ.)
//! The 8-bit ripple-carry adder must come out at its hand count on all four:
//! 1,742 nm² (an xor2 and an and2 for the half adder, then seven xor3 and
//! seven maj3: 72 + 60 + 7 × (120 + 110); counting, common practice).
//!
//! Sources outside the project: the benchmark circuits in benchmarks/ and
//! the adder in tests/data/reference (PROVENANCE.md there); the cell areas
//! of the library file.

use ribbonmap::io::{read_netlist, ReadOptions};
use ribbonmap::library::Library;
use ribbonmap::mapper::{map_detailed, Goal, MapOptions};
use ribbonmap::netlist::analyze_timing;
use std::path::{Path, PathBuf};

fn root() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

/// The built-in ribbon3 and three copies with the same areas and other
/// delays.
fn libraries() -> Vec<Library> {
    let base = Library::builtin("ribbon3").expect("built-in");
    let mut scaled = base.clone();
    scaled.name = "scaled-delays".into();
    for c in &mut scaled.cells {
        c.delay.intrinsic *= 3.7;
        c.delay.per_load *= 3.7;
    }
    let mut reversed = base.clone();
    reversed.name = "reversed-delays".into();
    let delays: Vec<_> = base.cells.iter().rev().map(|c| c.delay).collect();
    for (c, d) in reversed.cells.iter_mut().zip(delays) {
        c.delay = d;
    }
    let hand = Library::load(&root().join("tests/data/libraries/ribbon3-illustrative.json"))
        .expect("loads");
    let mut typed = base.clone();
    typed.name = "hand-typed-delays".into();
    for c in &mut typed.cells {
        c.delay = hand.cell(&c.name).expect("same cells").delay;
    }
    let libs = vec![base, scaled, reversed, typed];
    for copy in &libs[1..] {
        assert_eq!(copy.cells.len(), libs[0].cells.len());
        for (a, b) in libs[0].cells.iter().zip(&copy.cells) {
            assert_eq!((&a.name, a.area), (&b.name, b.area), "{}", copy.name);
            // Reversal leaves the middle of an odd list alone; every other
            // cell must differ.
            let middle = a.name == libs[0].cells[libs[0].cells.len() / 2].name
                && copy.name == "reversed-delays"
                && libs[0].cells.len() % 2 == 1;
            assert!(
                middle || a.delay != b.delay,
                "{} keeps the delay of {}",
                copy.name,
                a.name
            );
        }
    }
    libs
}

/// Per library: the `area` run's area, the area goal's area, and the delay
/// goal's (area, delay).
fn figures(file: &Path, libs: &[Library]) -> Vec<(f64, f64, (f64, f64))> {
    let net = read_netlist(file, &ReadOptions::default()).expect("reads");
    libs.iter()
        .map(|lib| {
            let opts = MapOptions {
                goal: Goal::Area,
                ..MapOptions::default()
            };
            let out = map_detailed(&net, lib, &opts).expect("maps");
            let area_run = out
                .runs
                .iter()
                .find(|r| r.name == "area")
                .expect("the area run is made")
                .area;
            let goal = out.netlist.area(lib);
            let delay_opts = MapOptions {
                goal: Goal::Delay,
                ..MapOptions::default()
            };
            let fast = map_detailed(&net, lib, &delay_opts).expect("maps").netlist;
            let fast_figures = (fast.area(lib), analyze_timing(&fast, lib).delay);
            (area_run, goal, fast_figures)
        })
        .collect()
}

/// Checks `files` on the four libraries; returns the violations and
/// whether the delay goal differed in area between some two libraries.
fn check(files: &[PathBuf]) -> (Vec<String>, bool) {
    let libs = libraries();
    let mut violations = Vec::new();
    let mut delays_matter = false;
    for file in files {
        let f = figures(file, &libs);
        let name = file.file_name().expect("file").to_string_lossy();
        for (lib, row) in libs.iter().zip(&f) {
            if row.0 != f[0].0 {
                violations.push(format!(
                    "{name}: area run {} on {}, {} on {}",
                    row.0, lib.name, f[0].0, libs[0].name
                ));
            }
            if row.1 > row.0 {
                violations.push(format!(
                    "{name}: area goal {} above the area run {} on {}",
                    row.1, row.0, lib.name
                ));
            }
        }
        delays_matter |= f.iter().any(|r| (r.2).0 != (f[0].2).0);
    }
    (violations, delays_matter)
}

#[test]
fn the_adder_reaches_its_hand_count_whatever_the_delays() {
    let file = root().join("tests/data/reference/netlists/arith/rca8_flat.blif");
    let libs = libraries();
    for (lib, row) in libs.iter().zip(figures(&file, &libs)) {
        assert_eq!(row.0, 1742.0, "area run on {}", lib.name);
        assert_eq!(row.1, 1742.0, "area goal on {}", lib.name);
    }
}

#[test]
fn the_area_run_is_the_same_on_small_benchmarks() {
    let files: Vec<PathBuf> = [
        "adder8_ripple.blif",
        "adder8_kogge_stone.blif",
        "decoder5_tree.blif",
        "majority9_counter.blif",
        "multiplier4_array.blif",
        "mux4_tree.blif",
        "parity32_tree.blif",
        "popcount16_compressor.blif",
    ]
    .iter()
    .map(|f| root().join("benchmarks").join(f))
    .collect();
    let (violations, delays_matter) = check(&files);
    assert!(violations.is_empty(), "{}", violations.join("\n"));
    assert!(
        delays_matter,
        "the delay goal gave the same areas everywhere"
    );
}

#[test]
#[cfg_attr(
    debug_assertions,
    ignore = "maps every benchmark eight times; runs under cargo test --release"
)]
fn the_area_run_is_the_same_on_every_benchmark() {
    let mut files: Vec<PathBuf> = std::fs::read_dir(root().join("benchmarks"))
        .expect("folder exists")
        .map(|e| e.expect("entry").path())
        .filter(|p| matches!(p.extension().and_then(|e| e.to_str()), Some("v" | "blif")))
        .filter(|p| {
            read_netlist(p, &ReadOptions::default())
                .expect("reads")
                .storage()
                .is_empty()
        })
        .collect();
    files.sort();
    assert!(files.len() >= 50, "benchmarks missing: {}", files.len());
    let (violations, delays_matter) = check(&files);
    assert!(violations.is_empty(), "{}", violations.join("\n"));
    assert!(
        delays_matter,
        "the delay goal gave the same areas everywhere"
    );
}
