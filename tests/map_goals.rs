//! The goals keep their promise and larger libraries never lose.
//!
//! Checked on every mapping: the delay goal's delay is at most the other
//! goals' delays, the area goal's area at most the others' areas, the
//! balanced goal's area × delay at most 0.5 % over the others' (its
//! documented tolerance); on a library that
//! contains all cells of another built-in library with the same numbers
//! (ribbon3 ⊃ ribbon3-nomaj ⊃ ribbon2, cmos-le ⊃ nand-nor-inv), the goal's
//! figure is at most the smaller library's. Delay is measured by the static
//! timing of the extracted netlist, area by summing cell areas. No two cells
//! of a netlist compute the same function of the same nets (checked by
//! exhaustive evaluation of each cell's truth table over its distinct input
//! nets), except the copies a fanout tree makes on purpose to split a load,
//! which the mapper reports: a netlist has at most as many duplicates as
//! reported copies, and under `area` none.
//!
//! Sources outside the project: the ISCAS-85 and EPFL netlists in
//! tests/data/reference (PROVENANCE.md there); integer-arithmetic adders and
//! parity circuits built in tests/map_support; the cell count of an n-input
//! parity from three-input XOR cells, ceil((n - 1) / 2), follows from each
//! cell removing at most two signals (counting argument, common practice).

mod map_support;

use map_support::{parity_chain, ripple_carry_adder};
use ribbonmap::io::{read_netlist, ReadOptions};
use ribbonmap::library::Library;
use ribbonmap::mapper::{map, map_detailed, Goal, MapOptions};
use ribbonmap::netlist::{analyze_timing, verify, MappedNetlist, Verified, VerifyMode};
use ribbonmap::network::Network;
use std::collections::HashSet;
use std::path::{Path, PathBuf};

const GOALS: [Goal; 3] = [Goal::Area, Goal::Delay, Goal::Balanced];
/// (larger, smaller) built-in pairs whose smaller cells are all larger cells.
const SUBSETS: [(&str, &str); 3] = [
    ("ribbon3", "ribbon3-nomaj"),
    ("ribbon3-nomaj", "ribbon2"),
    ("cmos-le", "nand-nor-inv"),
];

fn options(goal: Goal) -> MapOptions {
    MapOptions {
        goal,
        ..MapOptions::default()
    }
}

fn builtin(name: &str) -> Library {
    Library::builtin(name).expect("built-in library")
}

/// Area, delay and the figure each goal minimises.
#[derive(Clone, Copy, Debug)]
struct Figures {
    area: f64,
    delay: f64,
}

impl Figures {
    fn of(nl: &MappedNetlist, lib: &Library) -> Figures {
        Figures {
            area: nl.area(lib),
            delay: analyze_timing(nl, lib).delay,
        }
    }

    fn figure(&self, goal: Goal) -> f64 {
        match goal {
            Goal::Area => self.area,
            Goal::Delay => self.delay,
            Goal::Balanced => self.area * self.delay,
        }
    }
}

/// Relative tolerance for floating-point sums taken in different orders.
fn worse(a: f64, b: f64) -> bool {
    a > b * (1.0 + 1e-9) + 1e-12
}

/// `balanced` keeps the least area among the runs within 0.5 % of the
/// least area × delay (docs/mapping-goals.md), so its figure may exceed
/// another result's by that much.
const BALANCED_TOLERANCE: f64 = 0.005;

/// Whether the figure `mine` of `goal` breaks the goal's promise against
/// `theirs`.
fn breaks(goal: Goal, mine: f64, theirs: f64) -> bool {
    match goal {
        Goal::Balanced => worse(mine, theirs * (1.0 + BALANCED_TOLERANCE)),
        _ => worse(mine, theirs),
    }
}

/// Instances whose function over their distinct input nets repeats an
/// earlier instance's.
fn duplicate_cells(nl: &MappedNetlist, lib: &Library) -> usize {
    let mut seen = HashSet::new();
    let mut duplicates = 0;
    for inst in &nl.instances {
        let mut nets: Vec<u32> = inst.inputs.clone();
        nets.sort_unstable();
        nets.dedup();
        let cell = &lib.cells[inst.cell as usize];
        let mut rows = Vec::with_capacity(1 << nets.len());
        for row in 0..(1u32 << nets.len()) {
            let mut pin_row = 0u32;
            for (pin, n) in inst.inputs.iter().enumerate() {
                let position = nets.iter().position(|m| m == n).expect("listed");
                pin_row |= ((row >> position) & 1) << pin;
            }
            rows.push((cell.truth >> pin_row) & 1 == 1);
        }
        if !seen.insert((nets, rows)) {
            duplicates += 1;
        }
    }
    duplicates
}

/// Figures of `net` on every built-in library under every goal, with the
/// violations of the goal, subset and no-duplicate properties.
fn survey(label: &str, net: &Network) -> (Vec<[Figures; 3]>, Vec<String>) {
    let names = Library::builtin_names();
    let mut violations = Vec::new();
    let mut figures = Vec::new();
    for name in names {
        let lib = builtin(name);
        let mut per_goal = [Figures {
            area: 0.0,
            delay: 0.0,
        }; 3];
        for (g, goal) in GOALS.iter().enumerate() {
            let out = map_detailed(net, &lib, &options(*goal)).expect("maps");
            let nl = out.netlist;
            let d = duplicate_cells(&nl, &lib);
            let allowed = if *goal == Goal::Area { 0 } else { out.buffers };
            if d > allowed {
                violations.push(format!(
                    "{label} on {name} ({}): {d} duplicate cells, {} reported copies",
                    goal.name(),
                    out.buffers
                ));
            }
            per_goal[g] = Figures::of(&nl, &lib);
        }
        for (g, goal) in GOALS.iter().enumerate() {
            for (o, other) in GOALS.iter().enumerate() {
                let (mine, theirs) = (per_goal[g].figure(*goal), per_goal[o].figure(*goal));
                if breaks(*goal, mine, theirs) {
                    violations.push(format!(
                        "{label} on {name}: goal {} gives {mine}, goal {} {theirs}",
                        goal.name(),
                        other.name()
                    ));
                }
            }
        }
        figures.push(per_goal);
    }
    for (big, small) in SUBSETS {
        let b = names.iter().position(|n| *n == big).expect("built-in");
        let s = names.iter().position(|n| *n == small).expect("built-in");
        for (g, goal) in GOALS.iter().enumerate() {
            let (fb, fs) = (figures[b][g].figure(*goal), figures[s][g].figure(*goal));
            if breaks(*goal, fb, fs) {
                violations.push(format!(
                    "{label} under {}: {big} gives {fb}, its subset {small} {fs}",
                    goal.name()
                ));
            }
        }
    }
    (figures, violations)
}

fn combinational_netlists() -> Vec<PathBuf> {
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
            .collect();
        here.sort();
        files.extend(here);
    }
    files
}

#[test]
fn goals_and_subsets_hold_on_small_circuits() {
    let mut violations = Vec::new();
    for (label, net) in [
        ("rca4", ripple_carry_adder(4)),
        ("parity9", parity_chain(9)),
    ] {
        violations.extend(survey(label, &net).1);
    }
    let c17 =
        Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/data/reference/netlists/iscas85/c17.v");
    let net = read_netlist(&c17, &ReadOptions::default()).expect("reads");
    violations.extend(survey("c17", &net).1);
    assert!(violations.is_empty(), "{}", violations.join("\n"));
}

#[test]
#[cfg_attr(
    debug_assertions,
    ignore = "maps every benchmark and reference circuit 15 times; runs under cargo test --release"
)]
fn goals_and_subsets_hold_on_every_benchmark_and_reference_circuit() {
    let files = combinational_netlists();
    assert!(files.len() >= 100, "netlists missing: {}", files.len());
    let mut violations = Vec::new();
    let mut runs = 0;
    for file in &files {
        let net = read_netlist(file, &ReadOptions::default()).expect("reads");
        if !net.storage().is_empty() {
            continue;
        }
        let (figures, v) = survey(&file.display().to_string(), &net);
        runs += figures.len() * GOALS.len();
        violations.extend(v);
    }
    eprintln!("{runs} circuit x library x goal runs");
    assert!(violations.is_empty(), "{}", violations.join("\n"));
}

#[test]
#[cfg_attr(
    debug_assertions,
    ignore = "maps EPFL bar three times; runs under cargo test --release"
)]
fn bar_on_ribbon3_delay_goal_is_faster_and_balanced_stays_small() {
    // ribbon3's earlier hand-typed numbers (test data since the built-in
    // became the demo kit's characterisation).
    let path = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/data/libraries/ribbon3-illustrative.json");
    check_bar_goals(&Library::load(&path).expect("loads"));
}

#[test]
#[cfg_attr(
    debug_assertions,
    ignore = "maps EPFL bar three times; runs under cargo test --release"
)]
fn bar_on_derived_ribbon3_delay_goal_is_faster_and_balanced_stays_small() {
    // The built-in ribbon3, characterised from the demo kit (measured:
    // area goal 179,612 nm2 at 288.6 ps, delay goal 182.2 ps, balanced
    // 192,664 nm2 = 1.07 x, won by the ribbon2 sub-library's area cover with
    // buffers).
    check_bar_goals(&builtin("ribbon3"));
}

/// EPFL bar.v (tests/data/reference, PROVENANCE.md) on `lib`: the delay
/// goal at least 10 % faster than the area goal, balanced within 1.25 x
/// the area goal's area (the bounds issue 13 asks for).
fn check_bar_goals(lib: &Library) {
    let path =
        Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/data/reference/netlists/epfl/bar.v");
    let net = read_netlist(&path, &ReadOptions::default()).expect("reads");
    let lib = lib.clone();
    let fig = |goal| Figures::of(&map(&net, &lib, &options(goal)).expect("maps"), &lib);
    let (area, delay, balanced) = (fig(Goal::Area), fig(Goal::Delay), fig(Goal::Balanced));
    assert!(
        delay.delay <= 0.9 * area.delay,
        "delay goal {} not 10 % under area goal {}",
        delay.delay,
        area.delay
    );
    assert!(
        balanced.area <= 1.25 * area.area,
        "balanced area {} over 1.25 x {}",
        balanced.area,
        area.area
    );
}

/// Cell count of `net` mapped on ribbon3 under `goal`, proven equivalent.
fn cells_on_ribbon3(net: &Network, goal: Goal) -> usize {
    let lib = builtin("ribbon3");
    let nl = map(net, &lib, &options(goal)).expect("maps");
    let verdict = verify(net, &nl.to_network(&lib), VerifyMode::Full).expect("checks");
    assert_eq!(verdict, Verified::Proven);
    assert_eq!(duplicate_cells(&nl, &lib), 0);
    nl.instances.len()
}

#[test]
fn small_ripple_adders_take_two_cells_per_bit() {
    // A half adder (xor2, and2) and one maj3 + xor3 per full adder: 2n cells
    // (the generator's count). Before duplicates were merged the default
    // goal gave 5 and 7 for two and three bits.
    for n in [1, 2, 3, 8] {
        let cells = cells_on_ribbon3(&ripple_carry_adder(n), Goal::Area);
        assert_eq!(cells, 2 * n, "{n}-bit adder under area");
    }
}

// The adder and parity shapes are checked in tests/map_shape.rs.

#[test]
fn the_outcome_names_the_winning_run_among_those_considered() {
    let lib = builtin("ribbon3");
    let out = map_detailed(&ripple_carry_adder(8), &lib, &options(Goal::Balanced)).expect("maps");
    assert!(out.runs.len() >= 5, "{} runs", out.runs.len());
    assert!(out.runs.iter().any(|r| r.name == out.run));
    // The sub-library runs are there: ribbon3 contains ribbon3-nomaj.
    assert!(out
        .runs
        .iter()
        .any(|r| r.name.starts_with("ribbon3-nomaj:")));
}
