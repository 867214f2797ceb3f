//! `ribbonmap compare` on adders, parity and a multiplier with four built-in
//! libraries.
//!
//! The benchmarks are generated in the test and checked against integer
//! arithmetic (sum and product of the operands, parity by counting ones)
//! before they are compared; every mapping is then proven equivalent to its
//! benchmark by the command itself (`verified: proven`).

mod cache_support;

use assert_cmd::Command;
use ribbonmap::generate::{generate, Family, Params};
use ribbonmap::network::{Network, SplitMix64};
use std::path::{Path, PathBuf};

const LIBRARIES: [&str; 4] = ["ribbon3", "ribbon3-nomaj", "ribbon2", "cmos-le"];

/// Value of the outputs (LSB first) for inputs given as integers in
/// declaration order (a then b, `width` bits each), by simulation.
fn eval_two_operands(net: &Network, width: usize, a: u64, b: u64) -> u64 {
    let inputs = net.combinational_inputs().len();
    let words: Vec<u64> = (0..inputs)
        .map(|i| {
            let bit = if i < width {
                (a >> i) & 1
            } else {
                (b >> (i - width)) & 1
            };
            if bit == 1 {
                u64::MAX
            } else {
                0
            }
        })
        .collect();
    net.simulate_outputs(&words)
        .iter()
        .enumerate()
        .map(|(i, w)| (w & 1) << i)
        .sum()
}

/// Writes the benchmarks, checking each against integer arithmetic first.
fn benchmarks(dir: &Path) -> Vec<PathBuf> {
    let mut rng = SplitMix64::new(5);
    let mut paths = Vec::new();
    for style in Family::Adder.styles().iter().take(2) {
        let net = generate(Family::Adder, &Params::new(8).with_style(*style)).unwrap();
        for _ in 0..50 {
            let (a, b) = (rng.below(256), rng.below(256));
            assert_eq!(eval_two_operands(&net, 8, a, b), a + b, "adder {style}");
        }
        paths.push(write(dir, &format!("adder8_{style}"), &net));
    }
    let net = generate(Family::Multiplier, &Params::new(4)).unwrap();
    for a in 0..16 {
        for b in 0..16 {
            assert_eq!(eval_two_operands(&net, 4, a, b), a * b);
        }
    }
    paths.push(write(dir, "mult4", &net));
    let net = generate(Family::Parity, &Params::new(9)).unwrap();
    for _ in 0..50 {
        let x = rng.below(512);
        assert_eq!(
            eval_two_operands(&net, 9, x, 0),
            u64::from(x.count_ones() % 2)
        );
    }
    paths.push(write(dir, "parity9", &net));
    paths
}

fn write(dir: &Path, name: &str, net: &Network) -> PathBuf {
    let path = dir.join(format!("{name}.blif"));
    std::fs::write(&path, ribbonmap::io::write_blif(net)).unwrap();
    path
}

fn compare(paths: &[PathBuf], extra: &[&str]) -> std::process::Output {
    let mut cmd = Command::cargo_bin("ribbonmap").unwrap();
    cmd.env("RIBBONMAP_CACHE_DIR", cache_support::dir());
    cmd.arg("compare").args(paths);
    for lib in LIBRARIES {
        cmd.args(["--lib", lib]);
    }
    // The libraries mix unit systems (nm2, ps and transistors, tau), which
    // `compare` refuses unless normalised.
    cmd.args(["--goal", "area", "--normalize"]).args(extra);
    cmd.output().unwrap()
}

fn stdout_of(out: &std::process::Output) -> String {
    assert!(
        out.status.success(),
        "exit {:?}: {}",
        out.status.code(),
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8(out.stdout.clone()).unwrap()
}

/// Splits one CSV line, honouring double quotes.
fn csv_fields(line: &str) -> Vec<String> {
    let mut fields = vec![String::new()];
    let mut quoted = false;
    let mut chars = line.chars().peekable();
    while let Some(c) = chars.next() {
        match c {
            '"' if quoted && chars.peek() == Some(&'"') => {
                chars.next();
                fields.last_mut().unwrap().push('"');
            }
            '"' => quoted = !quoted,
            ',' if !quoted => fields.push(String::new()),
            _ => fields.last_mut().unwrap().push(c),
        }
    }
    fields
}

#[test]
fn majority_gates_pay_off_on_adders_and_every_format_parses() {
    let dir = tempfile::tempdir().unwrap();
    let paths = benchmarks(dir.path());
    let chart = dir.path().join("cells.svg");
    let out = compare(
        &paths,
        &[
            "--format",
            "json",
            "--chart",
            chart.to_str().unwrap(),
            "--chart-metric",
            "cells",
        ],
    );
    let json: serde_json::Value = serde_json::from_str(&stdout_of(&out)).unwrap();
    let rows = json["rows"].as_array().unwrap();
    assert_eq!(rows.len(), paths.len() * LIBRARIES.len());
    assert_eq!(json["baseline"], "ribbon3");
    let find = |bench: &str, lib: &str| -> &serde_json::Value {
        rows.iter()
            .find(|r| r["benchmark"] == bench && r["library"] == lib)
            .unwrap_or_else(|| panic!("no row {bench} {lib}"))
    };
    for row in rows {
        // Every mapping was proven equivalent to its benchmark.
        assert_eq!(row["verified"], "proven", "{row}");
        // cmos-le models no energy (its cells have switch_energy 0): null,
        // never 0.
        let energy = row["energy_per_op"].as_f64();
        assert_eq!(energy.is_some(), row["library"] != "cmos-le", "{row}");
        assert!(energy.is_none_or(|e| e > 0.0), "{row}");
        for key in ["cells", "devices", "area", "depth", "delay", "energy"] {
            assert!(row["ratios"].get(key).is_some());
        }
    }
    for p in &paths[..2] {
        let bench = p.file_stem().unwrap().to_str().unwrap();
        let with = find(bench, "ribbon3");
        let without = find(bench, "ribbon3-nomaj");
        assert!(
            with["majority_cells"].as_u64().unwrap() > 0,
            "{bench}: {with}"
        );
        assert_eq!(without["majority_cells"], 0);
        assert!(
            with["cell_count"].as_u64().unwrap() < without["cell_count"].as_u64().unwrap(),
            "{bench}: ribbon3 {} cells, ribbon3-nomaj {}",
            with["cell_count"],
            without["cell_count"]
        );
        // The ratio is the quotient of the two counts.
        let ratio = without["ratios"]["cells"].as_f64().unwrap();
        let want = without["cell_count"].as_f64().unwrap() / with["cell_count"].as_f64().unwrap();
        assert!((ratio - want).abs() < 1e-12);
    }
    assert_eq!(json["geomean"].as_array().unwrap().len(), LIBRARIES.len());

    // The chart is well-formed XML with one bar per benchmark x library.
    let svg = std::fs::read_to_string(&chart).unwrap();
    let doc = roxmltree::Document::parse(&svg).unwrap();
    assert_eq!(doc.root_element().tag_name().name(), "svg");
    let bars = doc
        .descendants()
        .filter(|n| n.has_tag_name("rect") && n.children().any(|c| c.has_tag_name("title")))
        .count();
    assert_eq!(bars, paths.len() * LIBRARIES.len());

    // CSV: a header and one line per row and per geometric mean, all with
    // the same number of fields.
    let csv = stdout_of(&compare(&paths, &["--format", "csv", "--verify", "sim"]));
    let lines: Vec<&str> = csv.lines().collect();
    assert_eq!(
        lines.len(),
        1 + paths.len() * LIBRARIES.len() + LIBRARIES.len()
    );
    let columns = csv_fields(lines[0]).len();
    for line in &lines {
        assert_eq!(csv_fields(line).len(), columns, "{line}");
    }
    // Column 4 is `verified` (docs/json-output.md): every benchmark row was
    // checked by simulation only, and the geometric-mean rows are no
    // circuits, so their field is empty.
    assert_eq!(csv_fields(lines[0])[3], "verified");
    let data_rows = paths.len() * LIBRARIES.len();
    for line in &lines[1..=data_rows] {
        assert_eq!(csv_fields(line)[3], "simulated", "{line}");
    }
    for line in &lines[data_rows + 1..] {
        assert_eq!(csv_fields(line)[0], "geomean", "{line}");
        assert_eq!(csv_fields(line)[3], "", "{line}");
    }

    // LaTeX: a booktabs tabular with escaped underscores.
    let tex = stdout_of(&compare(&paths, &["--format", "latex", "--verify", "none"]));
    for needle in [
        "\\begin{tabular}",
        "\\toprule",
        "\\midrule",
        "\\bottomrule",
        "\\end{tabular}",
        "adder8\\_",
    ] {
        assert!(tex.contains(needle), "missing {needle} in\n{tex}");
    }

    // Markdown and text mention every library.
    let md = stdout_of(&compare(
        &paths,
        &["--format", "markdown", "--verify", "none"],
    ));
    assert!(md.lines().filter(|l| l.starts_with('|')).count() >= 2 + rows.len());
    let text = stdout_of(&compare(&paths, &["--verify", "none"]));
    for lib in LIBRARIES {
        assert!(text.contains(lib));
    }
}

#[test]
fn bad_inputs_exit_with_two() {
    let dir = tempfile::tempdir().unwrap();
    let bad = dir.path().join("missing.blif");
    let out = Command::cargo_bin("ribbonmap")
        .unwrap()
        .env("RIBBONMAP_CACHE_DIR", cache_support::dir())
        .args(["compare", bad.to_str().unwrap(), "--lib", "ribbon3"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    let out = Command::cargo_bin("ribbonmap")
        .unwrap()
        .env("RIBBONMAP_CACHE_DIR", cache_support::dir())
        .args(["compare", bad.to_str().unwrap(), "--lib", "no-such-library"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).starts_with("error:"));
}
