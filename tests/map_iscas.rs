//! ISCAS-85 on {INV, NAND2, NOR2}: each cNNN.v mapped for area next to the
//! commercial re-synthesis cNNNg.v of the same circuit (Hansen et al. 1999
//! circuits; the g files from the circuitgraph distribution, via
//! PROVENANCE.md), with transistor counts as area (common practice: nand2 and
//! nor2 4, inverter 2). Also: remapping a netlist made only of a library's
//! cells for area never gives a larger area than the netlist itself.
//! The area figures are mapped with logic optimisation before mapping
//! (`MapOptions::optimize`), and every optimised mapping is proven
//! equivalent to the original circuit.

mod map_support;

use map_support::*;
use ribbonmap::io::{read_netlist, ReadOptions};
use ribbonmap::mapper::{map, Goal, MapOptions};
use ribbonmap::netlist::{verify, Verified, VerifyMode};
use std::path::Path;

const CIRCUITS: [&str; 11] = [
    "c17", "c432", "c499", "c880", "c1355", "c1908", "c2670", "c3540", "c5315", "c6288", "c7552",
];

fn dir() -> &'static Path {
    Path::new("tests/data/reference/netlists/iscas85")
}

/// Area of a cNNNg.v netlist counted from its gate lines.
fn commercial_area(text: &str) -> f64 {
    text.lines()
        .map(|l| match l.split_whitespace().next() {
            Some("nand") | Some("nor") => 4.0,
            Some("not") => 2.0,
            _ => 0.0,
        })
        .sum()
}

fn optimised_area_options() -> MapOptions {
    MapOptions {
        optimize: true,
        ..area_options()
    }
}

fn area_options() -> MapOptions {
    MapOptions {
        goal: Goal::Area,
        ..MapOptions::default()
    }
}

#[test]
fn iscas85_areas_against_the_commercial_mapping() {
    let lib = nand_nor_inv();
    let (mut log_sum, mut log_plain) = (0.0, 0.0);
    let mut table = String::from("circuit   plain  optimised  commercial  ratio\n");
    for c in CIRCUITS {
        let net = read_netlist(&dir().join(format!("{c}.v")), &ReadOptions::default()).unwrap();
        let text = std::fs::read_to_string(dir().join(format!("{c}g.v"))).unwrap();
        let reference = commercial_area(&text);
        let plain = map(&net, &lib, &area_options()).unwrap().area(&lib);
        let mapped = map(&net, &lib, &optimised_area_options()).unwrap();
        assert_eq!(
            verify(&net, &mapped.to_network(&lib), VerifyMode::Full),
            Ok(Verified::Proven),
            "{c}"
        );
        let area = mapped.area(&lib);
        // The optimiser keeps the unoptimised network among its candidates.
        assert!(area <= plain, "{c}: {area} > {plain}");
        log_sum += (area / reference).ln();
        log_plain += (plain / reference).ln();
        table.push_str(&format!(
            "{c:<8} {plain:>6.0} {area:>10.0} {reference:>11.0} {:>6.3}\n",
            area / reference
        ));
        // c17 is six NAND2 gates: 24 transistors is the optimum.
        if c == "c17" {
            assert_eq!(area, 24.0);
        }
    }
    let mean = (log_sum / CIRCUITS.len() as f64).exp();
    let plain_mean = (log_plain / CIRCUITS.len() as f64).exp();
    eprintln!("{table}geometric mean ratio {mean:.3} (without optimisation {plain_mean:.3})");
    // Outside figure: ratio 1.0 is the area of the commercial re-synthesis
    // (the cNNNg.v files, circuitgraph 0.2.1 via PROVENANCE.md), i.e. "at
    // least as small as a commercial flow" would be mean <= 1.0.
    // The two bounds below are REGRESSION BOUNDS taken from this code's own
    // past output (measured 0.959 with optimisation, 1.046 without, when
    // this test was last changed), not outside facts: they catch a quality
    // loss, they do not prove quality. Only the first one is under the
    // outside figure.
    assert!(
        mean <= 0.965,
        "geometric mean ratio {mean:.3} (regression bound)"
    );
    assert!(
        plain_mean <= 1.08,
        "geometric mean ratio {plain_mean:.3} (regression bound)"
    );
    assert!(
        mean < 1.0,
        "optimised mapping larger than the commercial one: {mean:.3} (outside figure)"
    );
}

#[test]
fn remapping_a_commercial_netlist_for_area_never_grows_it() {
    let lib = nand_nor_inv();
    for c in CIRCUITS {
        let path = dir().join(format!("{c}g.v"));
        let net = read_netlist(&path, &ReadOptions::default()).unwrap();
        let own = commercial_area(&std::fs::read_to_string(&path).unwrap());
        let mapped = map(&net, &lib, &area_options()).unwrap();
        assert!(
            mapped.area(&lib) <= own,
            "{c}: {} > {own}",
            mapped.area(&lib)
        );
    }
}

#[test]
fn remapping_our_own_mapped_netlists_never_grows_them() {
    for lib in [ribbon3(), ribbon3_nomaj(), nand_nor_inv()] {
        for c in ["c432", "c880", "c1908"] {
            let net = read_netlist(&dir().join(format!("{c}.v")), &ReadOptions::default()).unwrap();
            let first = map(&net, &lib, &MapOptions::default()).unwrap();
            let again = map(&first.to_network(&lib), &lib, &area_options()).unwrap();
            assert!(
                again.area(&lib) <= first.area(&lib) + 1e-9,
                "{c} on {}: {} > {}",
                lib.name,
                again.area(&lib),
                first.area(&lib)
            );
        }
    }
}
