//! Every reference netlist mapped onto every built-in library is proven
//! equivalent to its original by the SAT-sweeping checker.
//!
//! Sources: the ISCAS-85, ISCAS-89 and EPFL netlists (circuitgraph 0.2.1) and
//! the ariths-gen 1.1.4 arithmetic circuits in tests/data/reference, as
//! PROVENANCE.md there describes. The check is a proof, not a sample: a
//! `Proven` verdict means the checker refuted every differing input.

use ribbonmap::io::{read_netlist, ReadOptions, StorageCellSpec};
use ribbonmap::library::Library;
use ribbonmap::mapper::{map, Goal, MapOptions};
use ribbonmap::netlist::{verify, Verified, VerifyMode};
use std::path::{Path, PathBuf};

fn reference_netlists() -> Vec<PathBuf> {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/data/reference/netlists");
    let mut files = Vec::new();
    for family in ["arith", "iscas85", "iscas89", "epfl"] {
        let mut here: Vec<PathBuf> = std::fs::read_dir(root.join(family))
            .unwrap()
            .map(|e| e.unwrap().path())
            .collect();
        here.sort();
        files.extend(here);
    }
    files
}

#[test]
#[cfg_attr(
    debug_assertions,
    ignore = "slow in debug builds; runs under cargo test --release"
)]
fn every_reference_netlist_maps_to_a_proven_equivalent_on_every_library() {
    let files = reference_netlists();
    assert!(
        files.len() >= 38,
        "reference set incomplete: {}",
        files.len()
    );
    // s27's flip-flops are instances of an undefined cell `ff` (PROVENANCE.md).
    let options = ReadOptions {
        storage_cells: vec!["ff:D:Q:CK".parse::<StorageCellSpec>().unwrap()],
        ..ReadOptions::default()
    };
    for name in Library::builtin_names() {
        let lib = Library::builtin(name).unwrap();
        for file in &files {
            let net = read_netlist(file, &options).unwrap_or_else(|e| panic!("{e}"));
            let mapped = map(
                &net,
                &lib,
                &MapOptions {
                    goal: Goal::Balanced,
                    ..MapOptions::default()
                },
            )
            .unwrap_or_else(|e| panic!("{} on {name}: {e:?}", file.display()));
            let verdict = verify(&net, &mapped.to_network(&lib), VerifyMode::Full)
                .unwrap_or_else(|e| panic!("{} on {name}: {e}", file.display()));
            assert_eq!(
                verdict,
                Verified::Proven,
                "{} on {name} was not proven",
                file.display()
            );
        }
    }
}
