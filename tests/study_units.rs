//! Units in `compare` and `tabulate`: every column names its unit, ratios
//! across unit systems are refused unless normalised, normalised figures use
//! each library's FO4 delay and NAND2 area, a figure a library does not
//! model is `n/a` (JSON null), and CSV numbers carry six significant digits.
//!
//! The circuit is an invented full adder written here; expected yardsticks
//! come from logical effort (Sutherland, Sproull and Harris, "Logical
//! Effort: Designing Fast CMOS Circuits", 1999) and from the library files.

mod cache_support;

use assert_cmd::Command;
use ribbonmap::library::Library;
use ribbonmap::study::units::LibraryScale;
use std::path::{Path, PathBuf};

/// An invented one-bit full adder (sum and carry of a, b, cin).
const FULL_ADDER: &str = ".model invented_full_adder
.inputs a b cin
.outputs sum cout
.names a b cin sum
100 1
010 1
001 1
111 1
.names a b cin cout
11- 1
1-1 1
-11 1
.end
";

fn adder(dir: &Path) -> PathBuf {
    let path = dir.join("full_adder.blif");
    std::fs::write(&path, FULL_ADDER).unwrap();
    path
}

fn ribbonmap() -> Command {
    let mut cmd = Command::cargo_bin("ribbonmap").unwrap();
    cmd.env("RIBBONMAP_CACHE_DIR", cache_support::dir());
    cmd
}

fn compare(netlist: &Path, libs: &[&str], extra: &[&str]) -> std::process::Output {
    let mut cmd = ribbonmap();
    cmd.arg("compare").arg(netlist).args(["--verify", "none"]);
    for lib in libs {
        cmd.args(["--lib", lib]);
    }
    cmd.args(extra).output().unwrap()
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

fn assert_refused(out: &std::process::Output) {
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(err.trim_end().lines().count(), 1, "{err}");
    // The unit strings of libraries/ribbon3.json and libraries/cmos-le.json.
    assert!(err.contains("nm2, ps"), "{err}");
    assert!(err.contains("transistors, tau"), "{err}");
    assert!(err.contains("--normalize"), "{err}");
}

#[test]
fn fo4_of_cmos_le_is_five_tau_by_logical_effort() {
    // Sutherland, Sproull and Harris 1999: an inverter (g = 1, p = 1)
    // driving four inverters has electrical effort h = 4, delay
    // d = g·h + p = 5 τ.
    let scale = LibraryScale::of(&Library::builtin("cmos-le").unwrap());
    assert_eq!(scale.fo4_delay, Some(5.0));
    // Static CMOS NAND2: four transistors (common practice).
    assert_eq!(scale.nand2_area, Some(4.0));
    assert_eq!(scale.energy_unit, None, "cmos-le models no energy");
}

#[test]
fn mixed_unit_systems_are_refused_with_both_named() {
    let dir = tempfile::tempdir().unwrap();
    let netlist = adder(dir.path());
    assert_refused(&compare(&netlist, &["ribbon3", "cmos-le"], &[]));
    assert_refused(&compare(
        &netlist,
        &["ribbon3", "cmos-le"],
        &["--format", "csv"],
    ));
}

#[test]
fn normalised_comparison_prints_fo4_and_nand2_figures() {
    let dir = tempfile::tempdir().unwrap();
    let netlist = adder(dir.path());
    let libs = ["ribbon3", "cmos-le"];
    let text = stdout_of(&compare(&netlist, &libs, &["--normalize"]));
    assert!(text.contains("delay [FO4]"), "{text}");
    assert!(text.contains("area [NAND2 eq.]"), "{text}");
    let cmos_line = text.lines().find(|l| l.contains("cmos-le")).unwrap();
    assert!(cmos_line.contains("n/a"), "energy unmodelled: {text}");
    let cmos_mean = text
        .lines()
        .find(|l| l.starts_with("geomean") && l.contains("cmos-le"))
        .unwrap();
    assert!(cmos_mean.contains("(n/a)"), "no energy ratio: {text}");

    let json: serde_json::Value = serde_json::from_str(&stdout_of(&compare(
        &netlist,
        &libs,
        &["--normalize", "--format", "json"],
    )))
    .unwrap();
    assert_eq!(json["normalized"], true);
    assert_eq!(json["units"]["delay"], "FO4");
    assert_eq!(json["units"]["area"], "NAND2 eq.");
    let rows = json["rows"].as_array().unwrap();
    let row = |lib: &str| rows.iter().find(|r| r["library"] == lib).unwrap();
    let cmos = row("cmos-le");
    // FO4 of cmos-le is 5 τ (logical effort, Sutherland et al. 1999) and
    // its NAND2 is 4 transistors (common practice).
    let fo4 = cmos["normalized"]["delay"].as_f64().unwrap();
    assert!(
        (fo4 * 5.0 - cmos["delay"].as_f64().unwrap()).abs() < 1e-9,
        "{cmos}"
    );
    let nand2 = cmos["normalized"]["area"].as_f64().unwrap();
    assert!(
        (nand2 * 4.0 - cmos["area"].as_f64().unwrap()).abs() < 1e-9,
        "{cmos}"
    );
    assert!(cmos["energy_per_op"].is_null(), "{cmos}");
    assert!(cmos["normalized"]["energy"].is_null(), "{cmos}");
    assert!(cmos["ratios"]["energy"].is_null(), "{cmos}");
    // ribbon3's inverter (libraries/ribbon3.json, derived from the demo kit:
    // intrinsic 3.64395, per_load 1.08966, input_load 1) driving four
    // inverters: 3.64395 + 1.08966·4·1 = 8.00259 ps.
    let ribbon = row("ribbon3");
    let fo4 = ribbon["normalized"]["delay"].as_f64().unwrap();
    assert!((fo4 * 8.00259 - ribbon["delay"].as_f64().unwrap()).abs() < 1e-9);
    // The ratio is between normalised figures.
    let want = cmos["normalized"]["delay"].as_f64().unwrap() / fo4;
    assert!((cmos["ratios"]["delay"].as_f64().unwrap() - want).abs() < 1e-12);
}

/// Significant digits of a decimal number written without an exponent.
fn significant_digits(field: &str) -> usize {
    let digits: String = field.chars().filter(|c| c.is_ascii_digit()).collect();
    let digits = digits.trim_start_matches('0');
    if field.contains('.') {
        digits.len()
    } else {
        digits.trim_end_matches('0').len()
    }
}

#[test]
fn csv_names_units_rounds_to_six_digits_and_says_n_a() {
    let dir = tempfile::tempdir().unwrap();
    let netlist = adder(dir.path());
    let csv = stdout_of(&compare(
        &netlist,
        &["ribbon3", "ribbon2"],
        &["--format", "csv"],
    ));
    let header: Vec<&str> = csv.lines().next().unwrap().split(',').collect();
    for column in [
        "area [nm2]",
        "delay [ps]",
        "energy_per_op [aJ]",
        "static_power [nW]",
    ] {
        assert!(header.contains(&column), "{header:?}");
    }
    let json: serde_json::Value = serde_json::from_str(&stdout_of(&compare(
        &netlist,
        &["ribbon3", "ribbon2"],
        &["--format", "json"],
    )))
    .unwrap();
    let rows = json["rows"].as_array().unwrap();
    let mut checked = 0;
    for line in csv.lines().skip(1).filter(|l| !l.starts_with("geomean")) {
        let fields: Vec<&str> = line.split(',').collect();
        let row = rows.iter().find(|r| r["library"] == fields[2]).unwrap();
        for (column, key) in [
            (6, "area"),
            (8, "delay"),
            (9, "energy_per_op"),
            (10, "static_power"),
        ] {
            let exact = row[key].as_f64().unwrap();
            let printed: f64 = fields[column].parse().unwrap();
            // Six significant digits: the value rounded in decimal
            // scientific notation with five digits after the point.
            let want: f64 = format!("{exact:.5e}").parse().unwrap();
            assert_eq!(printed, want, "{key} {exact} printed {}", fields[column]);
            assert!(
                significant_digits(fields[column]) <= 6,
                "{}",
                fields[column]
            );
            checked += 1;
        }
    }
    assert_eq!(checked, 8);

    // cmos-le and nand-nor-inv share units; both model no energy or
    // leakage, which the CSV says as n/a, never 0.
    let csv = stdout_of(&compare(
        &netlist,
        &["cmos-le", "nand-nor-inv"],
        &["--format", "csv"],
    ));
    let header: Vec<&str> = csv.lines().next().unwrap().split(',').collect();
    assert!(header.contains(&"area [transistors]"), "{header:?}");
    assert!(header.contains(&"delay [tau]"), "{header:?}");
    for line in csv.lines().skip(1).filter(|l| !l.starts_with("geomean")) {
        let fields: Vec<&str> = line.split(',').collect();
        assert_eq!(fields[9], "n/a", "{line}");
        assert_eq!(fields[10], "n/a", "{line}");
    }
}

#[test]
fn tabulate_refuses_mixed_result_lines_unless_normalised() {
    let dir = tempfile::tempdir().unwrap();
    let line = |lib: &str, area: &str, delay: &str| {
        format!(
            "{{\"benchmark\":\"b\",\"library\":\"{lib}\",\"goal\":\"area\",\"cell_count\":3,\
             \"area\":60.0,\"depth\":2,\"delay\":10.0,\"devices\":6,\"verified\":\"proven\",\
             \"units\":{{\"area\":\"{area}\",\"delay\":\"{delay}\",\"energy\":\"aJ\",\"power\":\"nW\"}}}}\n"
        )
    };
    let results = dir.path().join("r.jsonl");
    std::fs::write(
        &results,
        line("ribbon3", "nm2", "ps") + &line("cmos-le", "transistors", "tau"),
    )
    .unwrap();
    let out = ribbonmap().arg("tabulate").arg(&results).output().unwrap();
    assert_refused(&out);
    let out = ribbonmap()
        .arg("tabulate")
        .arg(&results)
        .args(["--normalize", "--format", "csv"])
        .output()
        .unwrap();
    let csv = stdout_of(&out);
    let cmos = csv.lines().find(|l| l.contains(",cmos-le,")).unwrap();
    let fields: Vec<&str> = cmos.split(',').collect();
    // 60 transistors / 4 per NAND2 = 15; 10 τ / 5 τ per FO4 = 2.
    assert_eq!((fields[6], fields[8]), ("15", "2"), "{csv}");
}
