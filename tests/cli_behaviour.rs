//! Documented command-line behaviour that no other test runs: the exit
//! codes 3 (undecided) and 70 (internal error) of docs/exit-codes.md,
//! `library list` and `library show` against the library files read with
//! serde_json, the exact-search cuts option of `map` against an
//! enumeration, the conflict and time limits, `--top`, reading standard
//! input, the text reports, a closed pipe ending quietly, and the column
//! and kind of message of malformed-input errors
//! (docs/netlist-formats.md).

use assert_cmd::Command;
use std::io::Read;
use std::path::Path;
use std::process::Stdio;

/// The program with its disk cache in `cache` (never the user's folder).
fn ribbonmap(cache: &Path) -> Command {
    let mut cmd = Command::cargo_bin("ribbonmap").unwrap();
    cmd.env("RIBBONMAP_CACHE_DIR", cache);
    cmd
}

fn write(dir: &Path, name: &str, text: &str) -> String {
    let path = dir.join(name);
    std::fs::write(&path, text).unwrap();
    path.to_str().unwrap().to_string()
}

fn stderr(out: &std::process::Output) -> String {
    String::from_utf8_lossy(&out.stderr).into_owned()
}

#[test]
fn undecided_equivalence_exits_3() {
    // Array and Dadda multipliers of 13 bits are equal (integer
    // multiplication, checked in tests/generate_arith.rs); 26 inputs are
    // past the exhaustive proof's 24, and with one conflict per SAT call
    // the middle product bits cannot be proven.
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    for style in ["array", "dadda"] {
        let path = d.join(format!("{style}.blif"));
        let out = ribbonmap(d)
            .args(["generate", "multiplier", "-w", "13", "--style", style, "-o"])
            .arg(&path)
            .output()
            .unwrap();
        assert!(out.status.success(), "{}", stderr(&out));
    }
    let out = ribbonmap(d)
        .arg("equiv")
        .arg(d.join("array.blif"))
        .arg(d.join("dadda.blif"))
        .args(["--conflict-limit", "1"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(3), "{}", stderr(&out));
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.starts_with("undecided:"), "{text}");
    assert!(text.contains("no difference found"), "{text}");
}

#[test]
fn exact_search_limits_exit_3_with_one_error_line() {
    // 0x0116 needs seven ribbon2 cells (tests/exact_reference.rs); ten
    // conflicts per SAT call or half a second cannot prove it.
    let dir = tempfile::tempdir().unwrap();
    for limit in [["--conflict-limit", "10"], ["--time-limit", "0.5"]] {
        let out = ribbonmap(dir.path())
            .args(["exact", "0x0116", "--inputs", "4", "--lib", "ribbon2"])
            .args(limit)
            .output()
            .unwrap();
        assert_eq!(out.status.code(), Some(3), "{limit:?}: {}", stderr(&out));
        let err = stderr(&out);
        assert_eq!(err.lines().count(), 1, "{err}");
        // An undecided search is not an error (docs/exit-codes.md).
        assert!(
            err.starts_with("undecided: a resource limit stopped"),
            "{err}"
        );
    }
    // With a generous limit the same command proves a small function.
    let out = ribbonmap(dir.path())
        .args(["exact", "0xE8", "--inputs", "3", "--lib", "ribbon2"])
        .args(["--conflict-limit", "100000", "--time-limit", "600"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    let text = String::from_utf8(out.stdout).unwrap();
    // Majority on ribbon2: four cells (tests/exact_reference.rs confirms by
    // exhaustive enumeration; ribbon2's cells are those of that gate set
    // without the three-input ones, and majority has no three-cell network
    // there either).
    assert!(
        text.lines()
            .any(|l| l.trim_end() == "cells      4  (proven minimal)"),
        "{text}"
    );
}

#[test]
fn a_mapping_that_fails_its_own_verification_exits_70() {
    // The test hook RIBBONMAP_TEST_BREAK_MAPPING swaps one cell of the
    // mapped netlist; the proof must then fail, which is a bug: exit 70.
    let dir = tempfile::tempdir().unwrap();
    let path = write(
        dir.path(),
        "and.blif",
        ".model m\n.inputs a b\n.outputs y\n.names a b y\n11 1\n.end\n",
    );
    let out = ribbonmap(dir.path())
        .env("RIBBONMAP_TEST_BREAK_MAPPING", "1")
        .args(["map", &path, "--lib", "ribbon2"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(70), "{}", stderr(&out));
    let err = stderr(&out);
    assert_eq!(err.lines().count(), 1, "{err}");
    assert!(
        err.starts_with("error: internal error: the mapped netlist fails verification"),
        "{err}"
    );
    assert!(
        err.contains("this is a bug in ribbonmap; please report it"),
        "{err}"
    );
    // Without the hook the same command succeeds.
    let out = ribbonmap(dir.path())
        .args(["map", &path, "--lib", "ribbon2"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
}

/// The library files, read with serde_json alone.
fn library_json(name: &str) -> serde_json::Value {
    let text = std::fs::read_to_string(format!("libraries/{name}.json")).unwrap();
    serde_json::from_str(&text).unwrap()
}

#[test]
fn library_list_names_every_built_in_library_with_its_cell_count() {
    let dir = tempfile::tempdir().unwrap();
    let out = ribbonmap(dir.path())
        .args(["library", "list"])
        .output()
        .unwrap();
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    let mut names = Vec::new();
    for line in text.lines() {
        let words: Vec<&str> = line.split_whitespace().collect();
        let json = library_json(words[0]);
        // "<name> <n> cells <description>" with n from the file.
        assert_eq!(
            words[1].parse::<usize>().unwrap(),
            json["cells"].as_array().unwrap().len(),
            "{line}"
        );
        assert_eq!(words[2], "cells");
        names.push(words[0].to_string());
    }
    names.sort();
    let mut files: Vec<String> = std::fs::read_dir("libraries")
        .unwrap()
        .filter_map(|e| {
            let p = e.unwrap().path();
            (p.extension()? == "json").then(|| p.file_stem().unwrap().to_str().unwrap().to_string())
        })
        .collect();
    files.sort();
    assert_eq!(names, files);
    // The default library is marked (docs: ribbon3).
    assert!(text
        .lines()
        .any(|l| l.starts_with("ribbon3 ") && l.ends_with("(default)")));
}

#[test]
fn library_show_prints_every_cell_with_hand_checked_truth_tables() {
    let dir = tempfile::tempdir().unwrap();
    let out = ribbonmap(dir.path())
        .args(["library", "show", "cmos-le"])
        .output()
        .unwrap();
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    let json = library_json("cmos-le");
    // Truth tables by hand (row r gives input k bit k of r) and the NPN
    // class of the AND family (smallest member: NOR2 = 0x1).
    let by_hand = [
        ("inv", "0x1"),
        ("nand2", "0x7"),
        ("nor2", "0x1"),
        ("and2", "0x8"),
        ("or2", "0xE"),
        ("xor2", "0x6"),
        ("maj3", "0xE8"),
        ("aoi21", "0x07"),
        ("oai21", "0x1F"),
    ];
    for cell in json["cells"].as_array().unwrap() {
        let name = cell["name"].as_str().unwrap();
        let row = text
            .lines()
            .find(|l| l.split_whitespace().next() == Some(name))
            .unwrap_or_else(|| panic!("no row for {name}:\n{text}"));
        let function = cell["function"].as_str().unwrap();
        assert!(row.contains(function), "{row}");
        let area = cell["area"].as_f64().unwrap();
        let delay = format!(
            "{} + {}*load",
            cell["delay"]["intrinsic"].as_f64().unwrap(),
            cell["delay"]["per_load"].as_f64().unwrap()
        );
        let words: Vec<&str> = row.split_whitespace().collect();
        assert!(words.contains(&format!("{area}").as_str()), "{row}");
        if !delay.contains("2.333") && !delay.contains("2.666") {
            assert!(row.contains(&delay), "{row} lacks {delay}");
        }
        if let Some((_, truth)) = by_hand.iter().find(|(n, _)| *n == name) {
            assert!(words.contains(truth), "{row}: truth {truth}");
        }
    }
    let nand2 = text.lines().find(|l| l.starts_with("nand2 ")).unwrap();
    let words: Vec<&str> = nand2.split_whitespace().collect();
    let at = words.iter().position(|w| *w == "0x7").unwrap();
    assert_eq!(words[at + 1], "0x1", "NPN class of nand2: {nand2}");
    // An unknown library is bad input.
    let out = ribbonmap(dir.path())
        .args(["library", "show", "no-such-library"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
}

#[test]
fn exact_cuts_option_reaches_the_enumerated_minimum_for_xor() {
    // XOR on {inv 2, nand2 4, nor2 4} transistors: four NAND2 give 16
    // (common practice); the minimum area, by the enumeration below, is 14
    // (nor(nor(a, b), inv(nand(a, b)))).
    assert_eq!(least_area_of_xor(), 14);
    let dir = tempfile::tempdir().unwrap();
    let path = write(
        dir.path(),
        "xor.blif",
        ".model x\n.inputs a b\n.outputs y\n.names a b y\n10 1\n01 1\n.end\n",
    );
    let area = |extra: &[&str]| {
        let out = ribbonmap(dir.path())
            .args(["map", &path, "--lib", "nand-nor-inv", "--goal", "area"])
            .args(["--format", "json"])
            .args(extra)
            .output()
            .unwrap();
        assert!(out.status.success(), "{}", stderr(&out));
        let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
        assert_eq!(v["verified"], "proven");
        v["area"].as_f64().unwrap()
    };
    assert_eq!(area(&["--exact-cuts"]), 14.0);
    // Without the option the cut-based mapping does not find it.
    assert!(area(&[]) > 14.0);
}

/// The least area of a network of inv (2), nand2 (4) and nor2 (4)
/// computing two-input XOR, by enumerating every set of at most five
/// distinct cell outputs (a network of more cells costs more than 14:
/// XOR needs three two-input cells, common practice, and five cells with
/// three of them two-input cost at least 16).
fn least_area_of_xor() -> u32 {
    const A: u8 = 0b1010;
    const B: u8 = 0b1100;
    let mut best = u32::MAX;
    let mut layer: Vec<(Vec<u8>, u32)> = vec![(Vec::new(), 0)];
    for _ in 0..5 {
        let mut next = Vec::new();
        for (made, area) in &layer {
            let signals: Vec<u8> = [A, B].iter().chain(made).copied().collect();
            let mut outs = Vec::new();
            for (i, &x) in signals.iter().enumerate() {
                outs.push((!x & 0xF, 2));
                for &y in &signals[i + 1..] {
                    outs.push((!(x & y) & 0xF, 4));
                    outs.push((!(x | y) & 0xF, 4));
                }
            }
            for (g, cost) in outs {
                if g == A ^ B {
                    best = best.min(area + cost);
                }
                if !signals.contains(&g) {
                    next.push(([made.as_slice(), &[g]].concat(), area + cost));
                }
            }
        }
        layer = next;
    }
    best
}

#[test]
fn top_selects_a_module_and_ambiguity_is_bad_input() {
    let dir = tempfile::tempdir().unwrap();
    let path = write(
        dir.path(),
        "two.v",
        "module first(a, b, y);\n  input a, b;\n  output y;\n  assign y = a & b;\nendmodule\n\
         module second(p, q, r, z);\n  input p, q, r;\n  output z;\n  assign z = p ^ q ^ r;\nendmodule\n",
    );
    let out = ribbonmap(dir.path())
        .args(["inspect", &path, "--top", "second", "--format", "json"])
        .output()
        .unwrap();
    assert!(out.status.success(), "{}", stderr(&out));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["design"], "second");
    assert_eq!(
        (v["inputs"].as_u64(), v["outputs"].as_u64()),
        (Some(3), Some(1))
    );
    assert_eq!(v["nodes"]["xor"], 2);
    // Mapping the chosen module: one xor3 cell on ribbon3.
    let out = ribbonmap(dir.path())
        .args([
            "map", &path, "--top", "first", "--lib", "ribbon3", "--format", "json",
        ])
        .output()
        .unwrap();
    assert!(out.status.success(), "{}", stderr(&out));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["cells"], serde_json::json!({"and2": 1}));
    for (top, message) in [
        (
            None,
            "several top modules: first, second (choose one with --top)",
        ),
        (
            Some("third"),
            "no module named 'third' (expected one of: first, second)",
        ),
    ] {
        let mut cmd = ribbonmap(dir.path());
        cmd.args(["inspect", &path]);
        if let Some(t) = top {
            cmd.args(["--top", t]);
        }
        let out = cmd.output().unwrap();
        assert_eq!(out.status.code(), Some(2));
        // One line: file, line and column of the module concerned, then the
        // message.
        let err = stderr(&out);
        let rest = err
            .strip_prefix(&format!("error: {path}:"))
            .unwrap_or_else(|| panic!("{err}"));
        let (line, rest) = rest.split_once(':').unwrap_or_else(|| panic!("{err}"));
        let (column, text) = rest.split_once(": ").unwrap_or_else(|| panic!("{err}"));
        assert!(line.parse::<u32>().unwrap_or(0) > 0, "{err}");
        assert!(column.parse::<u32>().unwrap_or(0) > 0, "{err}");
        assert_eq!(text, format!("{message}\n"));
    }
}

#[test]
fn map_reads_standard_input() {
    let dir = tempfile::tempdir().unwrap();
    let out = ribbonmap(dir.path())
        .args(["map", "-", "--input-format", "bench", "--lib", "ribbon3"])
        .args(["--format", "json"])
        .write_stdin("INPUT(a)\nINPUT(b)\nINPUT(c)\nOUTPUT(y)\ny = XOR(a, b, c)\n")
        .output()
        .unwrap();
    assert!(out.status.success(), "{}", stderr(&out));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    // Three-input XOR is one ribbon3 cell (libraries/ribbon3.json).
    assert_eq!(v["cells"], serde_json::json!({"xor3": 1}));
    assert_eq!(v["verified"], "proven");
    // Standard input without a format is bad usage.
    let out = ribbonmap(dir.path())
        .args(["inspect", "-"])
        .write_stdin("INPUT(a)\n")
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
}

#[test]
fn inspect_text_report_lists_the_figures() {
    let dir = tempfile::tempdir().unwrap();
    let out = ribbonmap(dir.path())
        .args(["inspect", "tests/data/reference/netlists/iscas85/c17.v"])
        .output()
        .unwrap();
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    // c17: 5 inputs, 2 outputs, six NAND2 (PROVENANCE.md); depth 3,
    // support 4 and fanout 2 counted by hand from the file.
    for (key, value) in [
        ("inputs", "5"),
        ("outputs", "2"),
        ("storage elements", "0"),
        ("logic nodes", "6 (and 6, xor 0, maj 0)"),
        ("depth", "3"),
        ("largest output support", "4 inputs (N22)"),
        ("largest fanout", "2 (N3)"),
    ] {
        let line = text
            .lines()
            .find(|l| l.starts_with(key) && l[key.len()..].starts_with("  "))
            .unwrap_or_else(|| panic!("no {key} in\n{text}"));
        assert_eq!(line[key.len()..].trim(), value, "{line}");
    }
}

#[test]
fn a_closed_pipe_ends_quietly_with_exit_0() {
    // A 64-bit multiplier is about 600 kB of BLIF, far more than a pipe
    // holds: the writer meets the closed pipe.
    let dir = tempfile::tempdir().unwrap();
    let mut child = std::process::Command::new(assert_cmd::cargo::cargo_bin("ribbonmap"))
        .env("RIBBONMAP_CACHE_DIR", dir.path())
        .args(["generate", "multiplier", "-w", "64"])
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    let mut stdout = child.stdout.take().unwrap();
    let mut first = [0u8; 16];
    stdout.read_exact(&mut first).unwrap();
    drop(stdout);
    let status = child.wait().unwrap();
    let mut err = String::new();
    child
        .stderr
        .take()
        .unwrap()
        .read_to_string(&mut err)
        .unwrap();
    assert_eq!(status.code(), Some(0), "{err}");
    assert_eq!(err, "");
}

#[test]
fn malformed_input_names_line_column_and_kind() {
    // Columns counted by hand (1-based, characters).
    let dir = tempfile::tempdir().unwrap();
    for (name, text, place, message) in [
        (
            "gate.bench",
            "INPUT(a)\nOUTPUT(y)\ny = FOO(a)\n",
            "3:5",
            "unknown gate 'FOO' (expected AND, NAND, OR, NOR, XOR, XNOR, NOT, BUF, BUFF or DFF)",
        ),
        (
            "cover.blif",
            ".model m\n.inputs a b\n.outputs y\n.names a b y\n1x 1\n.end\n",
            "5:2",
            "unexpected 'x' in a cover row (expected 0, 1 or -)",
        ),
        (
            "token.v",
            "module m(a, y);\n  input a;\n  output y;\n  assign y = a $ a;\nendmodule\n",
            "4:16",
            "unexpected '$' (expected ';')",
        ),
    ] {
        let path = write(dir.path(), name, text);
        let out = ribbonmap(dir.path())
            .args(["inspect", &path])
            .output()
            .unwrap();
        assert_eq!(out.status.code(), Some(2), "{name}");
        assert_eq!(stderr(&out), format!("error: {path}:{place}: {message}\n"));
    }
}
