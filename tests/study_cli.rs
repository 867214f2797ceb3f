//! `ribbonmap study` and `tabulate`: resumption after a kill, repair of a
//! half-written last line, shards that partition the plan and agree with an
//! unsharded run, located plan errors.
//!
//! The expected job set is counted from the plan (benchmarks × libraries ×
//! goals), not taken from the program.

mod cache_support;

use assert_cmd::Command;
use std::collections::{BTreeMap, BTreeSet};
use std::path::{Path, PathBuf};
use std::process::Stdio;
use std::time::Duration;

/// 4 benchmarks × 2 libraries × 2 goals = 16 jobs.
const PLAN: &str = r#"{
  "benchmarks": [
    {"generate": "adder", "width": 6},
    {"generate": "parity", "width": 7},
    {"generate": "multiplier", "width": 4},
    "nets/*.blif"
  ],
  "libraries": ["ribbon3", "ribbon3-nomaj"],
  "goals": ["area", "delay"],
  "options": {"cut_size": 4, "cuts_per_node": 8, "verify": "sim", "patterns": 1024}
}
"#;
const JOBS: usize = 16;

fn setup() -> (tempfile::TempDir, PathBuf) {
    let dir = tempfile::tempdir().unwrap();
    std::fs::create_dir(dir.path().join("nets")).unwrap();
    let net = ribbonmap::generate::generate(
        ribbonmap::generate::Family::Majority,
        &ribbonmap::generate::Params::new(5),
    )
    .unwrap();
    std::fs::write(
        dir.path().join("nets").join("voter5.blif"),
        ribbonmap::io::write_blif(&net),
    )
    .unwrap();
    let plan = dir.path().join("plan.json");
    std::fs::write(&plan, PLAN).unwrap();
    (dir, plan)
}

fn study(plan: &Path, output: &Path, extra: &[&str]) -> std::process::Output {
    Command::cargo_bin("ribbonmap")
        .unwrap()
        .env("RIBBONMAP_CACHE_DIR", cache_support::dir())
        .arg("study")
        .arg(plan)
        .arg("-o")
        .arg(output)
        .args(extra)
        .output()
        .unwrap()
}

/// plan_key → result line (parsed), checking every line is complete JSON.
fn lines_by_key(path: &Path) -> (usize, BTreeMap<String, serde_json::Value>) {
    let text = std::fs::read_to_string(path).unwrap();
    assert!(text.is_empty() || text.ends_with('\n'));
    let mut map = BTreeMap::new();
    let mut count = 0;
    for line in text.lines() {
        let v: serde_json::Value = serde_json::from_str(line).unwrap();
        count += 1;
        map.insert(v["plan_key"].as_str().unwrap().to_string(), v);
    }
    (count, map)
}

/// The numbers that must not depend on how the study was split.
fn numbers(v: &serde_json::Value) -> String {
    format!(
        "{} {} {} {} {} {} {} {} {}",
        v["benchmark"],
        v["library"],
        v["goal"],
        v["cell_count"],
        v["area"],
        v["depth"],
        v["delay"],
        v["energy_per_op"],
        v["cells"]
    )
}

#[test]
fn shards_partition_the_plan_and_agree_with_one_run() {
    let (dir, plan) = setup();
    let all = dir.path().join("all.jsonl");
    let out = study(&plan, &all, &["--jobs", "2"]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let (count, whole) = lines_by_key(&all);
    assert_eq!(count, JOBS);
    assert_eq!(whole.len(), JOBS);
    let combos: BTreeSet<(String, String, String)> = whole
        .values()
        .map(|v| {
            (
                v["benchmark"].as_str().unwrap().to_string(),
                v["library"].as_str().unwrap().to_string(),
                v["goal"].as_str().unwrap().to_string(),
            )
        })
        .collect();
    assert_eq!(combos.len(), JOBS);

    let mut seen = BTreeMap::new();
    let mut shard_files = Vec::new();
    for i in 1..=3 {
        let path = dir.path().join(format!("shard-{i}.jsonl"));
        let out = study(&plan, &path, &["--shard", &format!("{i}/3"), "--jobs", "1"]);
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        let (count, part) = lines_by_key(&path);
        assert_eq!(count, part.len());
        // Job j of the key-sorted list goes to shard j % 3 + 1: sizes 6, 5, 5.
        assert_eq!(count, [6, 5, 5][i - 1]);
        for (k, v) in part {
            assert!(seen.insert(k, v).is_none(), "a job ran in two shards");
        }
        shard_files.push(path);
    }
    assert_eq!(
        seen.keys().collect::<Vec<_>>(),
        whole.keys().collect::<Vec<_>>()
    );
    for (k, v) in &seen {
        assert_eq!(numbers(v), numbers(&whole[k]), "job {k}");
    }

    // tabulate drops the duplicates between the shards and the full run.
    let out = Command::cargo_bin("ribbonmap")
        .unwrap()
        .env("RIBBONMAP_CACHE_DIR", cache_support::dir())
        .arg("tabulate")
        .args(&shard_files)
        .arg(&all)
        .args(["--format", "json"])
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let json: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(json["rows"].as_array().unwrap().len(), JOBS);
    assert!(String::from_utf8_lossy(&out.stderr).contains("dropped 16 duplicate"));
}

#[test]
fn a_killed_study_resumes_with_every_result_exactly_once() {
    let (dir, plan) = setup();
    let results = dir.path().join("results.jsonl");
    let exe = assert_cmd::cargo::cargo_bin("ribbonmap");
    let mut child = std::process::Command::new(&exe)
        .env("RIBBONMAP_CACHE_DIR", cache_support::dir())
        .arg("study")
        .arg(&plan)
        .arg("-o")
        .arg(&results)
        .args(["--jobs", "1"])
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .spawn()
        .unwrap();
    // Kill it as soon as the first result line is on disk (or when it has
    // finished on its own: then every line is there; no clock decides).
    loop {
        let text = std::fs::read_to_string(&results).unwrap_or_default();
        if text.contains('\n') {
            break;
        }
        if child.try_wait().unwrap().is_some() {
            break;
        }
        std::thread::sleep(Duration::from_millis(5));
    }
    let _ = child.kill();
    let _ = child.wait();
    let (before, _) = lines_by_key(&results);
    assert!(before >= 1);

    // Simulate a kill in the middle of a write: half of a result line with
    // no newline at the end.
    let text = std::fs::read_to_string(&results).unwrap();
    let first = text.lines().next().unwrap();
    let mut f = std::fs::OpenOptions::new()
        .append(true)
        .open(&results)
        .unwrap();
    std::io::Write::write_all(&mut f, &first.as_bytes()[..first.len() / 2]).unwrap();
    drop(f);

    // tabulate tolerates the unfinished line.
    let out = Command::cargo_bin("ribbonmap")
        .unwrap()
        .env("RIBBONMAP_CACHE_DIR", cache_support::dir())
        .args(["tabulate", "--format", "csv"])
        .arg(&results)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );

    let out = study(&plan, &results, &["--jobs", "2"]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let (count, by_key) = lines_by_key(&results);
    assert_eq!(count, JOBS, "every job exactly once");
    assert_eq!(by_key.len(), JOBS);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(stderr.contains(&format!("{before} already in")), "{stderr}");

    // A third run has nothing left to do.
    let out = study(&plan, &results, &[]);
    assert!(out.status.success());
    assert!(String::from_utf8_lossy(&out.stderr).contains(", 0 done"));
    assert_eq!(lines_by_key(&results).0, JOBS);
}

#[test]
fn plan_errors_name_file_line_and_column() {
    let (dir, plan) = setup();
    std::fs::write(
        &plan,
        "{\n  \"benchmarks\": [\"nets/*.blif\"],\n  \"libraries\": [\"ribbon3\"],\n  \"goals\": [\"fast\"]\n}\n",
    )
    .unwrap();
    let out = study(&plan, &dir.path().join("r.jsonl"), &[]);
    assert_eq!(out.status.code(), Some(2));
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(stderr.starts_with("error: "), "{stderr}");
    assert!(stderr.contains("plan.json:4:"), "{stderr}");

    std::fs::write(
        &plan,
        "{\"benchmarks\": [\"none/*.blif\"], \"libraries\": [\"ribbon3\"]}",
    )
    .unwrap();
    let out = study(&plan, &dir.path().join("r.jsonl"), &[]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("plan.json:1:17:"));

    std::fs::write(
        &plan,
        "{\"benchmarks\": [\"nets/*.blif\"], \"libraries\": [\"nope\"]}",
    )
    .unwrap();
    let out = study(&plan, &dir.path().join("r.jsonl"), &[]);
    assert_eq!(out.status.code(), Some(2));

    let out = study(&plan, &dir.path().join("r.jsonl"), &["--shard", "4/3"]);
    assert_eq!(out.status.code(), Some(2));
}

#[test]
fn example_plan_loads_and_expands() {
    // examples/study_plan.json: 5 adder16 files, 3 multiplier4 files, 2
    // majority9 files and 2 generated circuits, on 4 libraries with 2 goals
    // (counted from the benchmarks/ listing).
    let plan = ribbonmap::study::Plan::load(Path::new("examples/study_plan.json")).unwrap();
    let files = |prefix: &str| {
        std::fs::read_dir("benchmarks")
            .unwrap()
            .filter(|e| {
                let name = e
                    .as_ref()
                    .unwrap()
                    .file_name()
                    .to_string_lossy()
                    .to_string();
                name.starts_with(prefix) && name.ends_with(".blif")
            })
            .count()
    };
    let benchmarks = files("adder16_") + files("multiplier4_") + files("majority9_") + 2;
    assert_eq!(plan.benchmarks.len(), benchmarks);
    assert_eq!(plan.jobs().len(), benchmarks * 4 * 2);
    let slurm = std::fs::read_to_string("examples/study_slurm.sh").unwrap();
    assert!(slurm.contains("#SBATCH --array="));
    assert!(slurm.contains("--shard \"$SLURM_ARRAY_TASK_ID/$SLURM_ARRAY_TASK_COUNT\""));
}

#[test]
fn old_command_names_still_work_for_one_release_with_a_note() {
    // `sweep` and `merge` are hidden aliases of `study` and `tabulate`.
    let (dir, plan) = setup();
    std::fs::write(
        &plan,
        r#"{"benchmarks": ["nets/*.blif"], "libraries": ["ribbon3"], "goals": ["area"],
            "options": {"verify": "none", "patterns": 64}}"#,
    )
    .unwrap();
    let results = dir.path().join("r.jsonl");
    let out = Command::cargo_bin("ribbonmap")
        .unwrap()
        .args(["sweep"])
        .arg(&plan)
        .arg("-o")
        .arg(&results)
        .output()
        .unwrap();
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(out.status.success(), "{stderr}");
    assert!(stderr.contains("now called 'ribbonmap study'"), "{stderr}");
    assert_eq!(lines_by_key(&results).0, 1);
    let out = Command::cargo_bin("ribbonmap")
        .unwrap()
        .args(["merge"])
        .arg(&results)
        .output()
        .unwrap();
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(out.status.success(), "{stderr}");
    assert!(
        stderr.contains("now called 'ribbonmap tabulate'"),
        "{stderr}"
    );
    // The help lists only the new names.
    let out = Command::cargo_bin("ribbonmap")
        .unwrap()
        .arg("--help")
        .output()
        .unwrap();
    let help = String::from_utf8_lossy(&out.stdout);
    assert!(
        help.contains("study") && help.contains("tabulate"),
        "{help}"
    );
    assert!(!help.contains("sweep") && !help.contains("merge"), "{help}");
}
