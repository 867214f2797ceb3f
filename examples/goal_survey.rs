//! Maps every combinational netlist of `benchmarks/` and of the ISCAS-85 and
//! EPFL sets in `tests/data/reference` on every built-in library under the
//! three goals, and prints per library and goal the geometric means of delay
//! and area (in the library's units) with the number of runs, then the count
//! of goal violations (a goal beaten on its own figure by another goal) and
//! of subset violations (a library beaten on the goal's figure by a library
//! whose cells it contains).
//!
//! Besides the built-ins, every library file named in `RIBBONMAP_SURVEY_LIBS`
//! (separated by commas) is surveyed too (no subset checks: its numbers
//! are its own); the CPU seconds spent mapping are printed at the end.
//!
//! Usage: `cargo run --release --example goal_survey [FILTER]` (FILTER keeps
//! only files whose name contains it).

use ribbonmap::io::{read_netlist, ReadOptions};
use ribbonmap::library::Library;
use ribbonmap::mapper::runs::BALANCED_TOLERANCE;
use ribbonmap::mapper::{map, Goal, MapOptions};
use ribbonmap::netlist::analyze_timing;
use std::path::{Path, PathBuf};
use std::time::Instant;

const GOALS: [Goal; 3] = [Goal::Area, Goal::Delay, Goal::Balanced];
/// (larger, smaller): the smaller library's cells, with their numbers, are
/// all in the larger one.
const SUBSETS: [(&str, &str); 3] = [
    ("ribbon3", "ribbon3-nomaj"),
    ("ribbon3-nomaj", "ribbon2"),
    ("cmos-le", "nand-nor-inv"),
];

fn netlists(filter: &str) -> Vec<PathBuf> {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let mut files = Vec::new();
    for dir in [
        "benchmarks",
        "tests/data/reference/netlists/iscas85",
        "tests/data/reference/netlists/epfl",
    ] {
        let mut here: Vec<PathBuf> = std::fs::read_dir(root.join(dir))
            .expect("folder exists")
            .map(|e| e.expect("entry").path())
            .filter(|p| matches!(p.extension().and_then(|e| e.to_str()), Some("v" | "blif")))
            .filter(|p| p.to_string_lossy().contains(filter))
            .collect();
        here.sort();
        files.extend(here);
    }
    files
}

/// Area and delay of one mapping.
#[derive(Clone, Copy)]
struct Figures {
    area: f64,
    delay: f64,
}

fn figure(goal: Goal, f: Figures) -> f64 {
    match goal {
        Goal::Area => f.area,
        Goal::Delay => f.delay,
        Goal::Balanced => f.area * f.delay,
    }
}

fn main() {
    let filter = std::env::args().nth(1).unwrap_or_default();
    let files = netlists(&filter);
    let builtins = Library::builtin_names();
    let mut libs: Vec<Library> = builtins
        .iter()
        .map(|n| Library::builtin(n).expect("built-in"))
        .collect();
    if let Ok(extra) = std::env::var("RIBBONMAP_SURVEY_LIBS") {
        for path in extra.split(',').filter(|p| !p.is_empty()) {
            libs.push(Library::load(Path::new(path)).expect("library loads"));
        }
    }
    let lib_names: Vec<String> = libs.iter().map(|l| l.name.clone()).collect();
    let names = &lib_names;
    let started = Instant::now();
    // results[file][lib][goal]
    let mut results: Vec<Vec<[Figures; 3]>> = Vec::new();
    let mut kept = Vec::new();
    for file in &files {
        let net = read_netlist(file, &ReadOptions::default()).expect("reads");
        if !net.storage().is_empty() {
            continue;
        }
        let mut per_lib = Vec::new();
        for lib in &libs {
            let mut per_goal = [Figures {
                area: 0.0,
                delay: 0.0,
            }; 3];
            for (g, goal) in GOALS.iter().enumerate() {
                let opts = MapOptions {
                    goal: *goal,
                    ..MapOptions::default()
                };
                let nl = map(&net, lib, &opts).expect("maps");
                per_goal[g] = Figures {
                    area: nl.area(lib),
                    delay: analyze_timing(&nl, lib).delay,
                };
            }
            per_lib.push(per_goal);
        }
        results.push(per_lib);
        kept.push(file.clone());
    }
    let mapping_seconds = started.elapsed().as_secs_f64();
    println!(
        "{} circuits x {} libraries x 3 goals = {} runs",
        kept.len(),
        names.len(),
        kept.len() * names.len() * 3
    );
    println!(
        "{:<14} {:<9} {:>14} {:>14}",
        "library", "goal", "delay geomean", "area geomean"
    );
    for (l, (name, lib)) in names.iter().zip(&libs).enumerate() {
        for (g, goal) in GOALS.iter().enumerate() {
            let n = results.len() as f64;
            let mean = |f: &dyn Fn(&Figures) -> f64| {
                (results
                    .iter()
                    .map(|r| f(&r[l][g]).max(1e-12).ln())
                    .sum::<f64>()
                    / n)
                    .exp()
            };
            println!(
                "{:<14} {:<9} {:>11.3} {:<2} {:>11.1} {}",
                name,
                goal.name(),
                mean(&|f| f.delay),
                lib.units.delay,
                mean(&|f| f.area),
                lib.units.area
            );
        }
    }
    let tol = |a: f64, b: f64| a > b * (1.0 + 1e-9) + 1e-9;
    // `balanced` may be 0.5 % over another result's area × delay
    // (runs::BALANCED_TOLERANCE, docs/mapping-goals.md).
    let breaks = |goal: Goal, a: f64, b: f64| match goal {
        Goal::Balanced => tol(a, b * (1.0 + BALANCED_TOLERANCE)),
        _ => tol(a, b),
    };
    let mut goal_violations = 0;
    for (file, r) in kept.iter().zip(&results) {
        for (l, name) in names.iter().enumerate() {
            for (g, goal) in GOALS.iter().enumerate() {
                for (o, other) in GOALS.iter().enumerate() {
                    if o != g && breaks(*goal, figure(*goal, r[l][g]), figure(*goal, r[l][o])) {
                        goal_violations += 1;
                        println!(
                            "goal violation: {} on {name}: {} {} > {} {}",
                            file.display(),
                            goal.name(),
                            figure(*goal, r[l][g]),
                            other.name(),
                            figure(*goal, r[l][o])
                        );
                    }
                }
            }
        }
    }
    let mut subset_violations = 0;
    for (file, r) in kept.iter().zip(&results) {
        for (big, small) in SUBSETS {
            let b = names.iter().position(|n| *n == big).expect("built-in");
            let s = names.iter().position(|n| *n == small).expect("built-in");
            for (g, goal) in GOALS.iter().enumerate() {
                if breaks(*goal, figure(*goal, r[b][g]), figure(*goal, r[s][g])) {
                    subset_violations += 1;
                    println!(
                        "subset violation: {} {}: {big} {} > {small} {}",
                        file.display(),
                        goal.name(),
                        figure(*goal, r[b][g]),
                        figure(*goal, r[s][g])
                    );
                }
            }
        }
    }
    println!("goal violations {goal_violations}, subset violations {subset_violations}");
    println!("mapping took {mapping_seconds:.1} s (wall clock, one thread)");
}
