//! The shipped benchmarks/ folder is exactly what the generators write:
//! regenerating it into a temporary folder gives identical bytes, file for
//! file, and the folder holds no stray netlists.

use ribbonmap::generate::{benchmark_set, write_benchmarks};
use std::collections::BTreeSet;
use std::path::Path;

#[test]
fn benchmarks_regenerate_byte_for_byte() {
    let shipped = Path::new(env!("CARGO_MANIFEST_DIR")).join("benchmarks");
    let fresh = tempfile::tempdir().unwrap();
    let written = write_benchmarks(fresh.path()).unwrap();
    assert_eq!(
        written.len(),
        benchmark_set().len() + 1,
        "netlists and README"
    );
    for path in &written {
        let name = path.file_name().unwrap();
        let want = std::fs::read(path).unwrap();
        let have = std::fs::read(shipped.join(name))
            .unwrap_or_else(|e| panic!("benchmarks/{}: {e}", name.to_string_lossy()));
        assert!(
            want == have,
            "benchmarks/{} differs from a fresh generation; run `cargo run --release --example generate_benchmarks`",
            name.to_string_lossy()
        );
    }
    let expected: BTreeSet<String> = written
        .iter()
        .map(|p| p.file_name().unwrap().to_string_lossy().into_owned())
        .collect();
    for entry in std::fs::read_dir(&shipped).unwrap() {
        let name = entry.unwrap().file_name().to_string_lossy().into_owned();
        let netlist = name.ends_with(".blif") || name.ends_with(".v");
        assert!(
            !netlist || expected.contains(&name),
            "benchmarks/{name} is not part of the generated set"
        );
    }
}

#[test]
fn benchmark_folder_stays_small() {
    let shipped = Path::new(env!("CARGO_MANIFEST_DIR")).join("benchmarks");
    let total: u64 = std::fs::read_dir(&shipped)
        .unwrap()
        .map(|e| e.unwrap().metadata().unwrap().len())
        .sum();
    assert!(total < 3_000_000, "benchmarks/ holds {total} bytes");
}
