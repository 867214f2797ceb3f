//! Maps the ISCAS-85 circuits onto the {INV, NAND2, NOR2} library for area
//! and prints each mapped area, without and with logic optimisation before
//! mapping, next to the area of the commercially re-synthesised `cNNNg.v`
//! netlist (nand and nor 4 transistors, not 2), with the seconds spent
//! optimising.
//!
//! Usage: `cargo run --release --example map_iscas [CUT_SIZE] [CUTS_PER_NODE] [AREA_PASSES] [BALANCE 0|1]`

use ribbonmap::io::{read_netlist, ReadOptions};
use ribbonmap::library::Library;
use ribbonmap::mapper::{map_detailed, Goal, MapOptions};
use std::path::Path;

fn commercial_area(text: &str) -> f64 {
    text.lines()
        .map(|l| match l.split_whitespace().next() {
            Some("nand") | Some("nor") => 4.0,
            Some("not") => 2.0,
            _ => 0.0,
        })
        .sum()
}

fn main() {
    let args: Vec<usize> = std::env::args()
        .skip(1)
        .filter_map(|a| a.parse().ok())
        .collect();
    let plain = MapOptions {
        goal: Goal::Area,
        cut_size: args.first().copied().unwrap_or(4),
        cuts_per_node: args.get(1).copied().unwrap_or(8),
        area_passes: args.get(2).copied().unwrap_or(2),
        balance: args.get(3).copied().unwrap_or(1) == 1,
        ..MapOptions::default()
    };
    let optimized = MapOptions {
        optimize: true,
        ..plain.clone()
    };
    let lib = Library::builtin("nand-nor-inv").expect("built-in library");
    let dir = Path::new("tests/data/reference/netlists/iscas85");
    let (mut log_plain, mut log_opt, mut count) = (0.0, 0.0, 0);
    println!(
        "{:<8} {:>10} {:>7} {:>10} {:>7} {:>10} {:>9} {:>8}",
        "circuit", "plain", "ratio", "optimised", "ratio", "commercial", "opt s", "map s"
    );
    for c in [
        "c17", "c432", "c499", "c880", "c1355", "c1908", "c2670", "c3540", "c5315", "c6288",
        "c7552",
    ] {
        let net =
            read_netlist(&dir.join(format!("{c}.v")), &ReadOptions::default()).expect("reads");
        let text = std::fs::read_to_string(dir.join(format!("{c}g.v"))).expect("reads");
        let reference = commercial_area(&text);
        let a = map_detailed(&net, &lib, &plain).expect("maps");
        let b = map_detailed(&net, &lib, &optimized).expect("maps");
        let (area_a, area_b) = (a.netlist.area(&lib), b.netlist.area(&lib));
        log_plain += (area_a / reference).ln();
        log_opt += (area_b / reference).ln();
        count += 1;
        let opt_seconds = b.seconds.get("restructure").copied().unwrap_or(0.0);
        let total: f64 = b.seconds.values().sum();
        println!(
            "{c:<8} {area_a:>10.0} {:>7.3} {area_b:>10.0} {:>7.3} {reference:>10.0} {opt_seconds:>9.4} {:>8.4}",
            area_a / reference,
            area_b / reference,
            total - opt_seconds
        );
    }
    println!(
        "geometric mean ratio: plain {:.3}, optimised {:.3}",
        (log_plain / count as f64).exp(),
        (log_opt / count as f64).exp()
    );
}
