//! Messages and formats that keep their word (issue 18): every `--format`
//! lists exactly what the command prints, files are checked before long
//! work, no message shows a temporary file, counts agree with their nouns,
//! absurd option values are refused with the allowed range, and an `exact`
//! search that stops undecided says so.
//!
//! The expected texts are the documented ones (docs/README.md, docs/exit-codes.md, docs/json-output.md).

use assert_cmd::Command;

fn ribbonmap(args: &[&str]) -> std::process::Output {
    let cache = tempfile::tempdir().unwrap();
    Command::cargo_bin("ribbonmap")
        .unwrap()
        .env("RIBBONMAP_CACHE_DIR", cache.path())
        .args(args)
        .output()
        .unwrap()
}

fn stderr(out: &std::process::Output) -> String {
    String::from_utf8_lossy(&out.stderr).into_owned()
}

const C17: &str = "tests/data/reference/netlists/iscas85/c17.v";
/// A characterised library (levels, spice): the built-in ribbon3, derived
/// from the demo kit.
const DEMO_LIB: &str = "ribbon3";

#[test]
fn each_format_option_lists_exactly_what_the_command_prints() {
    for (args, listed) in [
        (vec!["map", C17], "[possible values: text, json]"),
        (
            vec!["exact", "0xE8", "--inputs", "3"],
            "[possible values: text, json]",
        ),
        (vec!["equiv", C17, C17], "[possible values: text, json]"),
        (vec!["inspect", C17], "[possible values: text, json]"),
        (
            vec!["characterize", "kit.json", "-o", "lib.json"],
            "[possible values: text, json]",
        ),
    ] {
        for bad in ["csv", "markdown", "latex"] {
            let mut full = args.clone();
            full.extend(["--format", bad]);
            let out = ribbonmap(&full);
            assert_eq!(out.status.code(), Some(2), "{full:?}");
            assert!(stderr(&out).contains(listed), "{full:?}: {}", stderr(&out));
        }
    }
    let out = ribbonmap(&[
        "generate",
        "adder",
        "--width",
        "4",
        "--output-format",
        "bench",
    ]);
    assert_eq!(out.status.code(), Some(2));
    assert!(
        stderr(&out).contains("[possible values: blif, verilog, aag, aig]"),
        "{}",
        stderr(&out)
    );
}

#[test]
fn output_folders_are_checked_before_mapping_and_no_temporary_name_shows() {
    // The folder's own name must not look like a temporary file's.
    let dir = tempfile::Builder::new()
        .prefix("outputs")
        .tempdir()
        .unwrap();
    let missing = dir.path().join("no-such-folder/out.v");
    let out = ribbonmap(&["map", C17, "-o", missing.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(2));
    let text = stderr(&out);
    assert!(text.contains("does not exist"), "{text}");
    // Mapping never started: no report on standard output.
    assert!(out.stdout.is_empty());
    assert_eq!(text.lines().count(), 1, "{text}");
    assert!(!text.contains(".tmp"), "{text}");
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        let locked = dir.path().join("locked");
        std::fs::create_dir(&locked).unwrap();
        std::fs::set_permissions(&locked, std::fs::Permissions::from_mode(0o500)).unwrap();
        // Root may write anywhere; the check only means something otherwise.
        if tempfile::NamedTempFile::new_in(&locked).is_err() {
            let out = ribbonmap(&["map", C17, "-o", locked.join("x.blif").to_str().unwrap()]);
            assert_eq!(out.status.code(), Some(2));
            assert!(!stderr(&out).contains(".tmp"), "{}", stderr(&out));
        }
    }
}

#[test]
fn charts_are_svg_files() {
    let out = ribbonmap(&["compare", C17, "--verify", "none", "--chart", "cells.png"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr(&out).contains("ending in .svg"), "{}", stderr(&out));
    assert!(out.stdout.is_empty(), "refused before mapping");
}

#[test]
fn absurd_counts_are_refused_with_the_allowed_range() {
    for (args, range) in [
        (vec!["compare", C17, "--patterns", "0"], "2..=16777216"),
        (
            vec!["compare", C17, "--patterns", "99999999999"],
            "2..=16777216",
        ),
        (vec!["compare", C17, "--jobs", "100000"], "1..=1024"),
        (vec!["map", C17, "--cut-size", "40"], "2..=6"),
        (vec!["map", C17, "--cuts-per-node", "0"], "1..=64"),
        (
            vec!["exact", "0xE8", "--inputs", "3", "--max-steps", "1000"],
            "1..=16",
        ),
        (
            vec!["levels", "--lib", DEMO_LIB, C17, "--patterns", "0"],
            "1..=16777216",
        ),
        (
            vec!["levels", "--lib", DEMO_LIB, C17, "--patterns", "16777217"],
            "1..=16777216",
        ),
    ] {
        let out = ribbonmap(&args);
        assert_eq!(out.status.code(), Some(2), "{args:?}");
        assert!(stderr(&out).contains(range), "{args:?}: {}", stderr(&out));
    }
}

#[test]
fn exact_that_stops_undecided_says_undecided() {
    // One conflict per SAT call cannot settle the full adder on ribbon2
    // (exit code 3 is "undecided", the exit-code contract).
    let out = ribbonmap(&[
        "exact",
        "0x96,0xE8",
        "--inputs",
        "3",
        "--lib",
        "ribbon2",
        "--conflict-limit",
        "1",
    ]);
    let text = stderr(&out);
    assert_eq!(out.status.code(), Some(3), "{text}");
    // A network found but not proven minimal is reported on standard
    // output; a search stopped before any network says `undecided:`.
    if !text.is_empty() {
        assert!(text.starts_with("undecided:"), "{text}");
        assert!(!text.contains("error:"), "{text}");
    }
    // In JSON the question always comes back, and `found` tells whether a
    // network follows (docs/json-output.md, `exact`).
    let out = ribbonmap(&[
        "exact",
        "0x96,0xE8",
        "--inputs",
        "3",
        "--lib",
        "ribbon2",
        "--conflict-limit",
        "1",
        "--format",
        "json",
    ]);
    assert_eq!(out.status.code(), Some(3), "{}", stderr(&out));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["optimal"], false);
    match v["found"].as_bool() {
        Some(true) => assert!(v["cells"].as_u64().is_some_and(|c| c >= 2), "{v}"),
        Some(false) => assert!(v.get("cells").is_none(), "{v}"),
        None => panic!("no `found` field: {v}"),
    }
    assert_eq!(v["objective"], "cells");
    assert_eq!(v["function"], serde_json::json!(["0x96", "0xE8"]));
}

/// Every command's help spells one kind of value one way: a library is
/// `<LIB>` (name or file), a count `<N>` (docs/README.md).
#[test]
fn help_texts_use_one_metavariable_per_kind_of_value() {
    let commands: &[&[&str]] = &[
        &["inspect"],
        &["map"],
        &["equiv"],
        &["exact"],
        &["coverage"],
        &["compare"],
        &["study"],
        &["tabulate"],
        &["generate"],
        &["library", "list"],
        &["library", "show"],
        &["library", "check"],
        &["characterize"],
        &["spice"],
        &["levels"],
    ];
    for command in commands {
        let mut args = command.to_vec();
        args.push("--help");
        let out = ribbonmap(&args);
        assert!(out.status.success(), "{args:?}");
        let help = String::from_utf8_lossy(&out.stdout).into_owned();
        for line in help.lines() {
            let line = line.trim_start();
            // "-w, --width <N>": look at the long name.
            let line = match line.split_once(", ") {
                Some((short, long)) if short.len() == 2 && short.starts_with('-') => long,
                _ => line,
            };
            if let Some(rest) = line.strip_prefix("--lib ") {
                assert!(rest.starts_with("<LIB>"), "{args:?}: {line}");
            }
            for count in [
                "--width",
                "--inputs",
                "--jobs",
                "--patterns",
                "--cut-size",
                "--cuts-per-node",
                "--conflict-limit",
                "--term-limit",
                "--max-steps",
                "--max-nets",
            ] {
                if let Some(rest) = line.strip_prefix(count) {
                    if rest.starts_with(' ') {
                        assert!(rest.starts_with(" <N>"), "{args:?}: {line}");
                    }
                }
            }
        }
        for positional in ["<LIBRARY>", "<FILE>"] {
            assert!(!help.contains(positional), "{args:?}: {positional}");
        }
    }
}

#[test]
fn exact_json_names_signals_by_documented_fields() {
    // Majority of three is one maj3 cell of ribbon3 (truth table 0xE8, the
    // crate's convention).
    let out = ribbonmap(&["exact", "0xE8", "--inputs", "3", "--format", "json"]);
    assert!(out.status.success(), "{}", stderr(&out));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["cells"], 1);
    let step = &v["steps"][0];
    assert_eq!(step["cell"], "maj3");
    for (k, fanin) in step["fanins"].as_array().unwrap().iter().enumerate() {
        assert_eq!(fanin["from"], "input");
        assert_eq!(fanin["index"], k);
        assert_eq!(fanin["complemented"], false);
    }
    assert_eq!(v["outputs"][0]["from"], "step");
    assert!(!String::from_utf8_lossy(&out.stdout).contains("\"Input\""));
}

#[test]
fn counts_agree_with_their_nouns() {
    let dir = tempfile::tempdir().unwrap();
    let plan = dir.path().join("plan.json");
    std::fs::write(
        &plan,
        r#"{"benchmarks": [{"generate": "parity", "width": 3}], "libraries": ["ribbon3"],
            "goals": ["area"], "options": {"verify": "none", "patterns": 64}}"#,
    )
    .unwrap();
    let results = dir.path().join("r.jsonl");
    let out = ribbonmap(&[
        "study",
        plan.to_str().unwrap(),
        "-o",
        results.to_str().unwrap(),
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    assert!(stderr(&out).contains("study: 1 job,"), "{}", stderr(&out));
    let out = ribbonmap(&["exact", "0x2", "--inputs", "1"]);
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(text.contains("over 1 input\n"), "{text}");
}

#[test]
fn inspect_says_how_storage_counts_in_the_largest_support() {
    let out = ribbonmap(&[
        "inspect",
        "tests/data/reference/netlists/iscas89/s27.v",
        "--storage",
        "ff:D:Q:CK",
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(text.contains("storage outputs as inputs"), "{text}");
    let out = ribbonmap(&["inspect", C17]);
    assert!(!String::from_utf8_lossy(&out.stdout).contains("storage outputs"));
}

#[test]
fn study_plans_are_checked_whole_and_absolute_paths_kept() {
    let dir = tempfile::tempdir().unwrap();
    let net = dir.path().join("c17.v");
    std::fs::copy(C17, &net).unwrap();
    let plan = dir.path().join("plan.json");
    let results = dir.path().join("r.jsonl");
    // A cut size the mapper refuses stops the run before any job.
    std::fs::write(
        &plan,
        format!(
            "{{\"benchmarks\": [\"{}\"],\n \"libraries\": [\"ribbon3\"],\n \"options\": {{\"cut_size\": 9}}}}",
            net.display()
        ),
    )
    .unwrap();
    let out = ribbonmap(&[
        "study",
        plan.to_str().unwrap(),
        "-o",
        results.to_str().unwrap(),
    ]);
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr(&out).contains("plan.json:3:"), "{}", stderr(&out));
    assert!(stderr(&out).contains("2 to 6"), "{}", stderr(&out));
    assert!(!results.exists() || std::fs::read(&results).unwrap().is_empty());
    // A library of another shard that does not load also stops shard 1.
    std::fs::write(
        &plan,
        format!(
            "{{\"benchmarks\": [\"{}\"], \"libraries\": [\"ribbon3\", \"nope.json\"], \"options\": {{\"verify\": \"none\", \"patterns\": 64}}}}",
            net.display()
        ),
    )
    .unwrap();
    let out = ribbonmap(&[
        "study",
        plan.to_str().unwrap(),
        "-o",
        results.to_str().unwrap(),
        "--shard",
        "1/9",
    ]);
    assert_eq!(out.status.code(), Some(2), "{}", stderr(&out));
    // The message points at the library's place in the plan (line 1, the
    // column of its opening quote), and no results file was started.
    let column = std::fs::read_to_string(&plan)
        .unwrap()
        .find("\"nope.json\"")
        .unwrap()
        + 1;
    assert!(
        stderr(&out).starts_with(&format!(
            "error: {}:1:{column}: library 'nope.json'",
            plan.display()
        )),
        "{}",
        stderr(&out)
    );
    assert!(!results.exists(), "the results file was created");
    // An absolute path is written back as given, with one leading slash.
    std::fs::write(
        &plan,
        format!(
            "{{\"benchmarks\": [\"{}\"], \"libraries\": [\"ribbon3\"], \"goals\": [\"area\"], \"options\": {{\"verify\": \"none\", \"patterns\": 64}}}}",
            net.display()
        ),
    )
    .unwrap();
    let out = ribbonmap(&[
        "study",
        plan.to_str().unwrap(),
        "-o",
        results.to_str().unwrap(),
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    let line: serde_json::Value = serde_json::from_str(
        std::fs::read_to_string(&results)
            .unwrap()
            .lines()
            .next()
            .unwrap(),
    )
    .unwrap();
    assert_eq!(line["benchmark_spec"], net.to_str().unwrap());
    // A result line the study cannot use is refused, naming its line.
    let mut text = std::fs::read_to_string(&results).unwrap();
    text.push_str("{\"plan_key\": \"x\"}\n");
    std::fs::write(&results, &text).unwrap();
    let out = ribbonmap(&[
        "study",
        plan.to_str().unwrap(),
        "-o",
        results.to_str().unwrap(),
    ]);
    assert_eq!(out.status.code(), Some(2));
    assert!(
        stderr(&out).contains("r.jsonl:2:1: bad result line"),
        "{}",
        stderr(&out)
    );
}

#[test]
fn old_option_names_still_work_for_one_release_with_a_note() {
    // --optimize is the old name of --restructure (hidden alias).
    let out = ribbonmap(&[
        "map",
        C17,
        "--verify",
        "none",
        "--optimize",
        "--format",
        "json",
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    assert!(
        stderr(&out).contains("now called --restructure"),
        "{}",
        stderr(&out)
    );
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert!(v["seconds"]["restructure"].as_f64().is_some(), "{v}");
    let help = ribbonmap(&["map", "--help"]);
    let help = String::from_utf8_lossy(&help.stdout);
    assert!(
        help.contains("--restructure") && help.contains("--exact-cuts"),
        "{help}"
    );
    assert!(
        !help.contains("--optimize") && !help.contains("--optimum"),
        "{help}"
    );
}

/// Times that would overflow a timer or a simulator run are refused with
/// the allowed range, on one line, before any work (exit 2, the
/// exit-code contract of docs/exit-codes.md).
#[test]
fn absurd_times_are_refused_with_the_allowed_range() {
    let dir = tempfile::tempdir().unwrap();
    let deck = dir.path().join("d.cir");
    let deck = deck.to_str().unwrap();
    for (args, range) in [
        (
            vec!["exact", "0xE8", "--inputs", "3", "--time-limit", "1e300"],
            "at most 31536000",
        ),
        (
            vec!["exact", "0xE8", "--inputs", "3", "--time-limit", "inf"],
            "at most 31536000",
        ),
        (
            vec![
                "spice",
                "--map",
                "--lib",
                DEMO_LIB,
                C17,
                "-o",
                deck,
                "--stop-ps",
                "1e300",
            ],
            "at most 1000000 ps",
        ),
        (
            vec![
                "spice",
                "--map",
                "--lib",
                DEMO_LIB,
                C17,
                "-o",
                deck,
                "--stop-ps",
                "NaN",
            ],
            "at most 1000000 ps",
        ),
        (
            vec![
                "spice",
                "--map",
                "--lib",
                DEMO_LIB,
                C17,
                "-o",
                deck,
                "--stop-ps",
                "5",
            ],
            "after the step ends (10.1 ps)",
        ),
    ] {
        let out = ribbonmap(&args);
        let text = stderr(&out);
        assert_eq!(out.status.code(), Some(2), "{args:?}: {text}");
        assert!(text.contains(range), "{args:?}: {text}");
        assert_eq!(text.lines().count(), 1, "{args:?}: {text}");
        assert!(out.stdout.is_empty(), "{args:?}");
    }
    assert!(!std::path::Path::new(deck).exists());
}

/// `levels` counts in words that agree with the number: one inverter is
/// "1 cell" (an invented one-gate netlist; its two nets are `a` and `y`).
#[test]
fn levels_counts_agree_with_their_nouns() {
    let dir = tempfile::tempdir().unwrap();
    let net = dir.path().join("one.v");
    std::fs::write(
        &net,
        "module one(a, y); input a; output y; assign y = ~a; endmodule\n",
    )
    .unwrap();
    let out = ribbonmap(&["levels", "--lib", DEMO_LIB, net.to_str().unwrap()]);
    let text = String::from_utf8_lossy(&out.stdout).into_owned();
    assert!(out.status.success(), "{}", stderr(&out));
    assert!(text.contains(": 1 cell, 2 nets read"), "{text}");
    assert!(
        text.contains("logic failures  0 net-patterns on 0 patterns"),
        "{text}"
    );
    assert!(!text.contains("1 cells"), "{text}");
}

/// `generate -o x.bench` names the formats it writes; no internal enum
/// name shows.
#[test]
fn generate_refuses_bench_output_naming_what_it_writes() {
    let dir = tempfile::tempdir().unwrap();
    let out_path = dir.path().join("x.bench");
    let out = ribbonmap(&[
        "generate",
        "adder",
        "-w",
        "4",
        "-o",
        out_path.to_str().unwrap(),
    ]);
    let text = stderr(&out);
    assert_eq!(out.status.code(), Some(2), "{text}");
    assert!(text.contains("BENCH files are read, not written"), "{text}");
    assert!(text.contains(".blif, .v, .aag or .aig"), "{text}");
    assert!(!text.contains("Bench"), "{text}");
    assert!(!out_path.exists());
}

/// A generated benchmark the generator refuses is named with the plan's
/// file, line and column (docs/exit-codes.md), before any job runs.
#[test]
fn study_names_the_place_of_a_bad_generated_benchmark() {
    let dir = tempfile::tempdir().unwrap();
    let plan = dir.path().join("plan.json");
    std::fs::write(
        &plan,
        "{\"benchmarks\": [{\"generate\": \"parity\", \"width\": 3},\n  {\"generate\": \"adder\", \"width\": 100000}],\n \"libraries\": [\"ribbon3\"]}",
    )
    .unwrap();
    let results = dir.path().join("r.jsonl");
    let out = ribbonmap(&[
        "study",
        plan.to_str().unwrap(),
        "-o",
        results.to_str().unwrap(),
    ]);
    let text = stderr(&out);
    assert_eq!(out.status.code(), Some(2), "{text}");
    assert!(
        text.starts_with(&format!("error: {}:2:16: ", plan.display())),
        "{text}"
    );
    assert!(text.contains("width 100000"), "{text}");
    assert!(!results.exists());
    // An absolute path that matches nothing is not said to be relative.
    let missing = dir.path().join("missing.blif");
    std::fs::write(
        &plan,
        format!(
            "{{\"benchmarks\": [\"{}\"], \"libraries\": [\"ribbon3\"]}}",
            missing.display()
        ),
    )
    .unwrap();
    let out = ribbonmap(&[
        "study",
        plan.to_str().unwrap(),
        "-o",
        results.to_str().unwrap(),
    ]);
    let text = stderr(&out);
    assert_eq!(out.status.code(), Some(2), "{text}");
    assert!(text.contains("matches no file"), "{text}");
    assert!(!text.contains("relative to"), "{text}");
}

/// A netlist mapped on a library file records the file beside the name, so
/// `inspect` and `equiv` read it back without `--lib` from any folder; a
/// file that no longer holds the recorded library is refused
/// (docs/netlist-formats.md). The library is ribbon2's file renamed.
#[test]
fn a_library_file_is_recorded_and_found_again() {
    let dir = tempfile::tempdir().unwrap();
    let lib_dir = dir.path().join("libs");
    std::fs::create_dir(&lib_dir).unwrap();
    let lib = lib_dir.join("mine.json");
    let text = std::fs::read_to_string("libraries/ribbon2.json").unwrap();
    let mut value: serde_json::Value = serde_json::from_str(&text).unwrap();
    value["name"] = "mine".into();
    std::fs::write(&lib, value.to_string()).unwrap();
    let c17 = std::fs::canonicalize(C17).unwrap();
    let mapped = dir.path().join("c17_mine.v");
    let out = ribbonmap(&[
        "map",
        c17.to_str().unwrap(),
        "--lib",
        lib.to_str().unwrap(),
        "--verify",
        "none",
        "-o",
        mapped.to_str().unwrap(),
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    let written = std::fs::read_to_string(&mapped).unwrap();
    let mut head = written.lines();
    assert_eq!(head.next(), Some("// mapped onto library mine"));
    assert_eq!(head.next(), Some("// library file libs/mine.json"));
    // From another folder, without --lib.
    let elsewhere = tempfile::tempdir().unwrap();
    let cache = tempfile::tempdir().unwrap();
    let run = |args: &[&str]| {
        Command::cargo_bin("ribbonmap")
            .unwrap()
            .env("RIBBONMAP_CACHE_DIR", cache.path())
            .current_dir(elsewhere.path())
            .args(args)
            .output()
            .unwrap()
    };
    let out = run(&["equiv", c17.to_str().unwrap(), mapped.to_str().unwrap()]);
    assert!(out.status.success(), "{}", stderr(&out));
    assert!(
        stderr(&out).contains("using library 'mine' from "),
        "{}",
        stderr(&out)
    );
    let out = run(&["inspect", mapped.to_str().unwrap()]);
    assert!(out.status.success(), "{}", stderr(&out));
    // The file now holds another library: refused, asking for --lib.
    value["name"] = "other".into();
    std::fs::write(&lib, value.to_string()).unwrap();
    let out = run(&["inspect", mapped.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(2));
    let text = stderr(&out);
    assert!(text.contains("now holds library 'other'"), "{text}");
    assert!(text.contains("give --lib"), "{text}");
    assert_eq!(text.lines().count(), 1, "{text}");
}

/// Empty and non-UTF-8 inputs the earlier checks missed: a port map with a
/// byte that is not UTF-8 is located at its line and column, an empty plan
/// at 1:1, and result files without a single result line are refused
/// (docs/exit-codes.md: one line, exit 2).
#[test]
fn empty_and_undecodable_inputs_are_located() {
    let dir = tempfile::tempdir().unwrap();
    let ports = dir.path().join("ports.map");
    std::fs::write(&ports, b"G1 G1\nG2 \xff\n").unwrap();
    let out = ribbonmap(&["equiv", C17, C17, "--ports", ports.to_str().unwrap()]);
    let text = stderr(&out);
    assert_eq!(out.status.code(), Some(2), "{text}");
    assert!(
        text.starts_with(&format!(
            "error: {}:2:4: byte 0xFF is not UTF-8",
            ports.display()
        )),
        "{text}"
    );
    let plan = dir.path().join("plan.json");
    std::fs::write(&plan, "  \n").unwrap();
    let out = ribbonmap(&[
        "study",
        plan.to_str().unwrap(),
        "-o",
        dir.path().join("r.jsonl").to_str().unwrap(),
    ]);
    let text = stderr(&out);
    assert_eq!(out.status.code(), Some(2), "{text}");
    assert!(
        text.starts_with(&format!(
            "error: {}:1:1: the plan file is empty",
            plan.display()
        )),
        "{text}"
    );
    let results = dir.path().join("empty.jsonl");
    std::fs::write(&results, "").unwrap();
    let out = ribbonmap(&["tabulate", results.to_str().unwrap()]);
    let text = stderr(&out);
    assert_eq!(out.status.code(), Some(2), "{text}");
    assert!(text.contains("no result lines to tabulate"), "{text}");
    assert_eq!(text.lines().count(), 1, "{text}");
    assert!(out.stdout.is_empty());
}
