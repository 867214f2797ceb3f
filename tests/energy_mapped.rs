//! Energy of mapped netlists: the adapter from a mapped netlist to the
//! energy model, checked by hand computation under Gray-code vectors, and
//! the `energy_per_op` / `static_power` fields of `ribbonmap map`.
//!
//! The hand counts need one energy per cell toggle and one leakage per
//! cell, so they run on ribbon3's earlier hand-typed numbers
//! (tests/data/libraries/ribbon3-illustrative.json); the built-in ribbon3's
//! load-dependent energy and per-row static power are checked by hand in
//! tests/energy_load.rs and tests/energy_hand.rs.

mod cache_support;

use ribbonmap::library::Library;
use ribbonmap::netlist::{Driver, MappedNetlist, Port};
use ribbonmap::study::power::{InputVectors, Stimulus};
use ribbonmap::study::{energy_per_op, mapped_energy};

/// ribbon3's earlier hand-typed numbers, loaded from the test data.
fn typed() -> Library {
    Library::load(std::path::Path::new(TYPED)).unwrap()
}

const TYPED: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/tests/data/libraries/ribbon3-illustrative.json"
);

/// A chain of xor2 cells computing the parity of `k` inputs, built by hand
/// on ribbon3.
fn parity_chain(lib: &Library, k: usize) -> MappedNetlist {
    let xor2 = lib.cell_index("xor2").unwrap() as u32;
    let mut nl = MappedNetlist {
        name: "parity".into(),
        library: lib.name.clone(),
        ..Default::default()
    };
    let mut nets = Vec::new();
    for i in 0..k {
        let net = nl.add_net(format!("x{i}"), Driver::Input(i as u32));
        nl.inputs.push(Port {
            name: format!("x{i}"),
            net,
        });
        nets.push(net);
    }
    let mut acc = nets[0];
    for (i, &n) in nets.iter().enumerate().skip(1) {
        acc = nl.add_instance(xor2, vec![acc, n], format!("t{i}"));
    }
    nl.outputs.push(Port {
        name: "y".into(),
        net: acc,
    });
    nl
}

#[test]
fn mapped_parity_chain_matches_gray_code_count() {
    // Under the reflected Gray code on k inputs, input i flips 2^(k-1-i)
    // times (common practice); gate m flips when any of inputs 0..=m does.
    let lib = typed();
    let k = 7;
    let nl = parity_chain(&lib, k);
    let mut text = String::new();
    for j in 0u64..(1 << k) {
        let g = j ^ (j >> 1);
        text.extend((0..k).map(|i| if (g >> i) & 1 == 1 { '1' } else { '0' }));
        text.push('\n');
    }
    let stimulus = Stimulus::Vectors {
        vectors: InputVectors::parse(&text, "gray", k).unwrap(),
        probability: 0.5,
        seed: 1,
    };
    let report = mapped_energy(&nl, &lib, &stimulus).unwrap();
    let toggles: u64 = (1..k)
        .map(|m| (0..=m).map(|i| 1u64 << (k - 1 - i)).sum::<u64>())
        .sum();
    assert_eq!(report.toggles, toggles);
    let xor2 = lib.cell("xor2").unwrap();
    let want = toggles as f64 * xor2.switch_energy / ((1u64 << k) - 1) as f64;
    assert!((report.energy_per_op - want).abs() < 1e-12);
    assert!((report.static_power - (k - 1) as f64 * xor2.mean_leakage()).abs() < 1e-12);
    // Random inputs: every chain output is a fresh uniform bit, toggling with
    // probability 1/2 (common practice).
    let random = energy_per_op(&nl, &lib).unwrap();
    let expected = (k - 1) as f64 * 0.5 * xor2.switch_energy;
    assert!(
        (random - expected).abs() < 0.03 * expected,
        "{random} vs {expected}"
    );
}

/// `ribbonmap map` of a one-bit full adder on `lib`, as JSON.
fn map_full_adder(lib: &str) -> serde_json::Value {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("fa.blif");
    std::fs::write(
        &path,
        ".model fa\n.inputs a b c\n.outputs s co\n.names a b c s\n100 1\n010 1\n001 1\n111 1\n.names a b c co\n11- 1\n1-1 1\n-11 1\n.end\n",
    )
    .unwrap();
    let out = assert_cmd::Command::cargo_bin("ribbonmap")
        .unwrap()
        .env("RIBBONMAP_CACHE_DIR", cache_support::dir())
        .args([
            "map",
            path.to_str().unwrap(),
            "--lib",
            lib,
            "--format",
            "json",
        ])
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    // ribbon3 has a three-input XOR and a majority cell: the sum and the
    // carry are one cell each (by hand; the smallest and the shallowest
    // mapping alike), so both cell outputs are the adder's outputs.
    assert_eq!(v["cell_count"], 2, "{v}");
    assert_eq!(v["cells"]["xor3"], 1, "{v}");
    assert_eq!(v["cells"]["maj3"], 1, "{v}");
    assert_eq!(v["units"]["energy"], "aJ");
    v
}

#[test]
fn map_command_reports_energy_fields() {
    let v = map_full_adder(TYPED);
    let energy = v["energy_per_op"].as_f64().unwrap();
    let leakage = v["static_power"].as_f64().unwrap();
    // Sum and carry of independent uniform inputs are uniform and
    // independent from pattern to pattern, so each output toggles with
    // probability 1/2: energy = (E(cell of s) + E(cell of co)) / 2.
    let lib = typed();
    let mut want = 0.0;
    let mut want_leak = 0.0;
    for (name, n) in v["cells"].as_object().unwrap() {
        let cell = lib.cell(name).unwrap();
        want += 0.5 * cell.switch_energy * n.as_f64().unwrap();
        want_leak += cell.mean_leakage() * n.as_f64().unwrap();
    }
    // (0.9 aJ for xor3 and 0.8 aJ for maj3 in
    // tests/data/libraries/ribbon3-illustrative.json) / 2 = 0.85 aJ; 3 %
    // allows for the sampling.
    assert!((want - 0.85).abs() < 1e-12, "{want}");
    assert!((energy - want).abs() < 0.03 * want, "{energy} vs {want}");
    assert!((leakage - want_leak).abs() < 1e-9);
}

#[test]
fn map_command_on_the_builtin_counts_the_load_and_the_rows() {
    let v = map_full_adder("ribbon3");
    let energy = v["energy_per_op"].as_f64().unwrap();
    let leakage = v["static_power"].as_f64().unwrap();
    // Both cells drive a primary output (load 1): a toggle costs
    // switch_energy + switch_energy_per_load · 1 = 0.8 + 0.6 = 1.4 aJ
    // (½·40 aF·(0.2 V)² + ½·30 aF·(0.2 V)², the demo kit's capacitances,
    // libraries/devices/demo/demo.json), each output toggles with
    // probability 1/2: (1.4 + 1.4) / 2 = 1.4 aJ; 3 % allows for the sampling.
    let lib = Library::builtin("ribbon3").unwrap();
    let mut want = 0.0;
    let mut want_leak = 0.0;
    for name in ["xor3", "maj3"] {
        let cell = lib.cell(name).unwrap();
        want += 0.5 * (cell.switch_energy + cell.switch_energy_per_load);
        // Uniform inputs visit every row equally often: the per-row static
        // power averages to the mean over the rows.
        want_leak += cell.mean_leakage();
    }
    assert!((want - 1.4).abs() < 1e-9, "{want}");
    assert!((energy - want).abs() < 0.03 * want, "{energy} vs {want}");
    assert!(
        (leakage - want_leak).abs() < 0.03 * want_leak,
        "{leakage} vs {want_leak}"
    );
}
