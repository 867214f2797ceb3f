//! `ribbonmap exact` end to end: JSON contract fields, netlist re-simulated
//! against the requested function, bad input.

mod cache_support;

use assert_cmd::Command;

fn exact(args: &[&str]) -> assert_cmd::assert::Assert {
    Command::cargo_bin("ribbonmap")
        .unwrap()
        .env("RIBBONMAP_CACHE_DIR", cache_support::dir())
        .arg("exact")
        .args(args)
        .assert()
}

/// Simulates the printed netlist lines (`s0 = cell(x0, !x1)`, `y0 = s0`)
/// with the given cell truth tables.
fn simulate_lines(lines: &[String], inputs: usize, cells: &[(&str, u64)]) -> Vec<u64> {
    let mask = (1u64 << (1 << inputs)) - 1;
    let mut values: std::collections::HashMap<String, u64> = Default::default();
    for k in 0..inputs {
        let mut w = 0u64;
        for r in 0..(1 << inputs) {
            if r >> k & 1 == 1 {
                w |= 1 << r;
            }
        }
        values.insert(format!("x{k}"), w);
    }
    let word = |name: &str, values: &std::collections::HashMap<String, u64>| -> u64 {
        match name.strip_prefix('!') {
            Some(n) => !values[n] & mask,
            None if name == "0" => 0,
            None if name == "1" => mask,
            None => values[name],
        }
    };
    let mut outputs = Vec::new();
    for line in lines {
        let (lhs, rhs) = line.split_once(" = ").unwrap();
        if let Some((cell, args)) = rhs.split_once('(') {
            let pins: Vec<u64> = args
                .trim_end_matches(')')
                .split(", ")
                .map(|a| word(a, &values))
                .collect();
            let truth = cells.iter().find(|c| c.0 == cell).unwrap().1;
            let mut out = 0;
            for row in 0..(1usize << pins.len()) {
                if truth >> row & 1 == 1 {
                    let mut term = mask;
                    for (p, w) in pins.iter().enumerate() {
                        term &= if row >> p & 1 == 1 { *w } else { !*w };
                    }
                    out |= term;
                }
            }
            values.insert(lhs.to_string(), out & mask);
        } else {
            outputs.push(word(rhs, &values));
        }
    }
    outputs
}

#[test]
fn full_adder_on_ribbon3_json() {
    let out = exact(&["0x96,0xE8", "--inputs", "3", "--format", "json"]).success();
    let v: serde_json::Value = serde_json::from_slice(&out.get_output().stdout).unwrap();
    assert_eq!(v["cells"], 2);
    assert_eq!(v["optimal"], true);
    assert_eq!(v["depth"], 1);
    // ribbon3 areas: maj3 110 + xor3 120 (libraries/ribbon3.json).
    assert_eq!(v["area"].as_f64().unwrap(), 230.0);
    let lines: Vec<String> = v["netlist"]
        .as_array()
        .unwrap()
        .iter()
        .map(|l| l.as_str().unwrap().to_string())
        .collect();
    let cells = [("maj3", 0xE8u64), ("xor3", 0x96)];
    assert_eq!(simulate_lines(&lines, 3, &cells), vec![0x96, 0xE8]);
}

#[test]
fn majority_without_majority_cells_text() {
    let out = exact(&["0b11101000", "--inputs", "3", "--lib", "ribbon3-nomaj"]).success();
    let text = String::from_utf8(out.get_output().stdout.clone()).unwrap();
    assert!(text.contains("proven minimal"), "{text}");
}

#[test]
fn bad_truth_tables_exit_2() {
    exact(&["0x1FF", "--inputs", "3"]).code(2);
    exact(&["0xZZ", "--inputs", "3"]).code(2);
    exact(&["0x6", "--inputs", "9"]).code(2);
    exact(&["0x6", "--inputs", "2", "--lib", "no-such-library"]).code(2);
}
