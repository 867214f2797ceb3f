//! Maps the ISCAS-85 circuits onto the {INV, NAND2, NOR2} library for area
//! and prints each mapped area next to the area of the commercially
//! re-synthesised `cNNNg.v` netlist (nand and nor 4 transistors, not 2).
//!
//! Usage: `cargo run --release --example map_iscas [CUT_SIZE] [CUTS_PER_NODE] [AREA_PASSES] [BALANCE 0|1]`

use ribbonmap::io::{read_netlist, ReadOptions};
use ribbonmap::library::Library;
use ribbonmap::mapper::{map, Goal, MapOptions};
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
    let opts = MapOptions {
        goal: Goal::Area,
        cut_size: args.first().copied().unwrap_or(4),
        cuts_per_node: args.get(1).copied().unwrap_or(8),
        area_passes: args.get(2).copied().unwrap_or(2),
        balance: args.get(3).copied().unwrap_or(1) == 1,
        ..MapOptions::default()
    };
    let lib = Library::builtin("nand-nor-inv").expect("built-in library");
    let dir = Path::new("tests/data/reference/netlists/iscas85");
    let mut log_sum = 0.0;
    let mut count = 0;
    println!(
        "{:<8} {:>10} {:>10} {:>7}",
        "circuit", "mapped", "commercial", "ratio"
    );
    for c in [
        "c17", "c432", "c499", "c880", "c1355", "c1908", "c2670", "c3540", "c5315", "c6288",
        "c7552",
    ] {
        let net =
            read_netlist(&dir.join(format!("{c}.v")), &ReadOptions::default()).expect("reads");
        let text = std::fs::read_to_string(dir.join(format!("{c}g.v"))).expect("reads");
        let reference = commercial_area(&text);
        let mapped = map(&net, &lib, &opts).expect("maps");
        let area = mapped.area(&lib);
        let ratio = area / reference;
        log_sum += ratio.ln();
        count += 1;
        println!("{c:<8} {area:>10.0} {reference:>10.0} {ratio:>7.3}");
    }
    println!("geometric mean ratio {:.3}", (log_sum / count as f64).exp());
}
