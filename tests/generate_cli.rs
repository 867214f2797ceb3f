//! `ribbonmap generate` driven as a binary: output to standard output and to
//! files, the format following the extension, and exit code 2 with a
//! one-line error for bad families, styles and widths (docs/exit-codes.md).

use assert_cmd::Command;
use predicates::prelude::*;

fn ribbonmap() -> Command {
    Command::cargo_bin("ribbonmap").unwrap()
}

#[test]
fn writes_blif_to_standard_output() {
    ribbonmap()
        .args(["generate", "adder", "--width", "4", "--carry-in"])
        .assert()
        .success()
        .stdout(predicate::str::starts_with(
            "# adder, width 4, style ripple, carry-in, written by ribbonmap\n",
        ))
        .stdout(predicate::str::contains(
            ".inputs a[0] a[1] a[2] a[3] b[0] b[1] b[2] b[3] cin",
        ))
        .stdout(predicate::str::contains(
            ".outputs s[0] s[1] s[2] s[3] s[4]",
        ));
}

#[test]
fn writes_files_in_the_format_of_the_extension() {
    let dir = tempfile::tempdir().unwrap();
    for (file, first) in [
        ("m.v", "// multiplier, width 4, style dadda"),
        ("m.blif", "# multiplier, width 4, style dadda"),
    ] {
        let path = dir.path().join(file);
        ribbonmap()
            .args([
                "generate",
                "multiplier",
                "-w",
                "4",
                "--style",
                "dadda",
                "-o",
            ])
            .arg(&path)
            .assert()
            .success()
            .stdout("");
        let text = std::fs::read_to_string(&path).unwrap();
        assert!(text.starts_with(first), "{text}");
    }
}

#[test]
fn shifter_is_an_alias() {
    ribbonmap()
        .args(["generate", "shifter", "--width", "8"])
        .assert()
        .success()
        .stdout(predicate::str::contains("barrel-shifter, width 8"));
}

#[test]
fn bad_requests_exit_2_with_one_line() {
    for args in [
        vec!["generate", "adders", "--width", "8"],
        vec!["generate", "adder", "--width", "8", "--style", "fast"],
        vec!["generate", "adder", "--width", "0"],
        vec!["generate", "majority", "--width", "8"],
        vec!["generate", "parity", "--width", "8", "--carry-in"],
        vec!["generate", "adder"],
        vec!["generate", "adder", "--width", "8", "-o", "out.txt"],
    ] {
        ribbonmap().args(&args).assert().code(2).stdout("").stderr(
            predicate::str::starts_with("error: ")
                .and(predicate::function(|s: &str| s.lines().count() == 1)),
        );
    }
}

#[test]
fn list_names_every_family() {
    ribbonmap()
        .args(["generate", "--list"])
        .assert()
        .success()
        .stdout(
            predicate::str::contains("barrel-shifter")
                .and(predicate::str::contains("secded-decoder")),
        );
}
