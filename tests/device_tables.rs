//! Conductance tables and characterisation checked by hand against
//! published relations, and the table readers fuzzed like the netlist
//! readers (random and mutated text: an error or a table, never a panic).

use proptest::prelude::*;
use ribbonmap::device::characterize::characterize_cell;
use ribbonmap::device::kit::parse_kit;
use ribbonmap::device::table_csv::parse_csv_table;
use ribbonmap::device::table_json::parse_json_table;
use ribbonmap::device::CONDUCTANCE_QUANTUM_S;
use std::path::Path;

fn kit(cells: &str) -> ribbonmap::device::DeviceKit {
    let text = format!(
        "{{\"format\": \"ribbonmap-devices/1\", \"name\": \"hand\", \"supply_v\": 0.2, \"gate_capacitance_af\": 30, \"output_capacitance_af\": 40, \"cells\": [{cells}]}}"
    );
    parse_kit(&text, "hand.json", Path::new(".")).unwrap()
}

fn inverter(up: &str, down: &str) -> ribbonmap::device::CellCharacter {
    let k = kit("{\"name\": \"inv\", \"inputs\": [\"a\"], \"pull_up\": \"u\", \"pull_down\": \"d\", \"area\": 1}");
    let up = parse_csv_table(up, "up.csv").unwrap();
    let down = parse_csv_table(down, "down.csv").unwrap();
    characterize_cell(
        &k,
        &k.cells[0],
        (up, "0".repeat(64)),
        (down, "0".repeat(64)),
    )
    .unwrap()
}

/// Voltage divider (common practice; Rabaey et al. 2003, static CMOS
/// inverter analysis): with the pull-up r times the pull-down, the output
/// is Vdd · r / (r + 1). Here r = 99 at a = 0 and 1/49 at a = 1.
#[test]
fn divider_ratio_gives_voh_and_vol() {
    let c = inverter("a,g[uS]\n0,9.9\n0.2,0.2\n", "a,g[uS]\n0,0.1\n0.2,9.8\n");
    let r: f64 = 99.0;
    assert!((c.voh - 0.2 * r / (r + 1.0)).abs() < 1e-12, "{}", c.voh);
    let r: f64 = 0.2 / 9.8;
    assert!((c.vol - 0.2 * r / (r + 1.0)).abs() < 1e-12, "{}", c.vol);
    assert_eq!(c.truth, 0b01);
    // On/off: pull-up 9.9 / 0.2, pull-down 9.8 / 0.1.
    assert!((c.pull_up_on_off - 49.5).abs() < 1e-9);
    assert!((c.pull_down_on_off - 98.0).abs() < 1e-9);
    // Static current Vdd·Gu·Gd/(Gu+Gd) at a = 0: 0.2 · 9.9 · 0.1 / 10 µA.
    assert!((c.rows[0].current_a - 0.2 * 9.9e-6 * 0.1e-6 / 10e-6).abs() < 1e-18);
    // First-order RC: t50 = ln 2 · C / (Gu + Gd) with the slowest row
    // (a = 0: 10 µS; a = 1: 10 µS as well); 40 aF / 10 µS = 4 ps.
    assert!((c.step_intrinsic_ps - std::f64::consts::LN_2 * 4.0).abs() < 1e-9);
    assert!((c.step_per_load_ps - std::f64::consts::LN_2 * 3.0).abs() < 1e-9);
    // One cell alone has no reference inverter to drive it: the library's
    // figures are the step figures.
    assert_eq!(c.intrinsic_ps, c.step_intrinsic_ps);
    assert!(c.delay_fit.is_none());
    // ½ C V²: 0.5 · 40 aF · 0.04 V² = 0.8 aJ.
    assert!((c.switch_energy_aj - 0.8).abs() < 1e-12);
}

/// First-order RC (common practice; Rabaey et al. 2003): after a step at
/// the input, the output relaxes exponentially with τ = C / (Gu + Gd) of
/// the final state and, with levels symmetric about Vdd/2, crosses Vdd/2
/// after t50 = τ·ln 2. The integrator of `device::switching` must give it:
/// here Gu/Gd = 9/1 µS at a = 0 and 1/9 µS at a = 0.2 V, C = 50 aF, so
/// τ = 5 ps, the output goes from 0.18 V to 0.02 V, and t50 = 5·ln 2 ps.
#[test]
fn switching_integrator_step_gives_first_order_rc_delay() {
    use ribbonmap::device::switching::{delay_50, Arc, Stage, Waveform};
    let up = parse_csv_table("a,g[uS]\n0,9\n0.2,1\n", "up.csv").unwrap();
    let down = parse_csv_table("a,g[uS]\n0,1\n0.2,9\n", "down.csv").unwrap();
    let stage = Stage {
        pull_up: &up,
        pull_down: &down,
        supply_v: 0.2,
        logic_low_v: 0.0,
        logic_high_v: 0.2,
        capacitance_af: 50.0,
    };
    let arc = Arc {
        input: 0,
        row: 0,
        input_rises: true,
    };
    let input = Waveform::step(0.0, 0.2, 1.0, 0.001, 40.0);
    let out = stage.respond(arc, &input);
    assert!(
        (out.volts[0] - 0.18).abs() < 1e-12,
        "static start {}",
        out.volts[0]
    );
    let expected = 5.0 * std::f64::consts::LN_2;
    let t50 = delay_50(&input, &out, 0.1, 0.1).unwrap();
    assert!((t50 - expected).abs() < 0.01, "{t50} vs {expected}");
    // The early-stopping form gives the same crossing.
    let t = stage.output_crossing(arc, &input, 0.1, 40.0).unwrap();
    assert!((t - 1.0 - expected).abs() < 0.01, "{t}");
    // Towards the final divider value 0.2 · 1/10: 39 ps = 7.8 τ after the
    // step, 0.16 V · exp(−7.8) = 65 µV remain.
    let left = out.volts[out.volts.len() - 1] - 0.02;
    assert!(
        (left - 0.16 * (-39.0f64 / 5.0).exp()).abs() < 1e-6,
        "{left}"
    );
}

/// The conductance quantum 2e²/h from the exact 2019-SI values of e and h
/// (CODATA 2018 gives 7.748091729e-5 S).
#[test]
fn conductance_quantum_codata_2018() {
    let e = 1.602_176_634e-19_f64;
    let h = 6.626_070_15e-34_f64;
    assert!((2.0 * e * e / h - CONDUCTANCE_QUANTUM_S).abs() < 1e-17);
    assert!((CONDUCTANCE_QUANTUM_S - 7.748_091_729e-5).abs() < 1e-14);
}

/// A table in transmission units: T = 0.5 is half the quantum, and a cell
/// whose pull-up is T = 0.5 against a pull-down of T = 0.005 gives the
/// divider output 0.2 · 100/101 V and I = Vdd · G0 · 0.5 · 0.005 / 0.505.
#[test]
fn table_in_g0_units() {
    let up = parse_csv_table("a,g[G0]\n0,0.5\n0.2,0.005\n", "t.csv").unwrap();
    assert!((up.values[0] - 0.5 * 7.748_091_729e-5).abs() < 1e-14);
    let c = inverter("a,g[G0]\n0,0.5\n0.2,0.005\n", "a,g[G0]\n0,0.005\n0.2,0.5\n");
    assert!((c.voh - 0.2 * 100.0 / 101.0).abs() < 1e-12);
    let expected = 0.2 * CONDUCTANCE_QUANTUM_S * 0.5 * 0.005 / 0.505;
    assert!((c.rows[0].current_a - expected).abs() / expected < 1e-12);
}

/// A cell whose transfer curve is linear with gain below 1 does not restore
/// levels: VIL = VIH = VM (Rabaey et al. 2003: the thresholds need |gain| = 1).
#[test]
fn gain_below_one_is_not_restoring() {
    // Gu + Gd = 1.1 µS everywhere, V linear in a with slope 0.2·4.5/1.1 = 0.82.
    let c = inverter("a,g[uS]\n0,1\n0.2,0.1\n", "a,g[uS]\n0,0.1\n0.2,1\n");
    assert!(!c.restoring);
    assert!((c.vil - c.vm).abs() < 1e-12 && (c.vih - c.vm).abs() < 1e-12);
    assert!((c.vm - 0.1).abs() < 1e-6);
    assert!((c.curves[0].max_gain - 0.2 * 4.5 / 1.1).abs() < 1e-6);
}

const SEED_CSV: &str = "# t\na,b,g[uS]\n0,0,1\n0.1,0,2\n0.2,0,3\n0,0.2,4\n0.1,0.2,5\n0.2,0.2,6\n";
const SEED_JSON: &str = "{\"format\": \"ribbonmap-conductance/1\", \"inputs\": [\"a\", \"b\"], \"unit\": \"G0\",\n \"axes\": [[0, 0.1, 0.2], [0, 0.2]],\n \"values\": [1, 2, 3, 4, 5, 6]}\n";
const SNIPPETS: &[&str] = &[
    ",", "\n", "[", "]", "{", "}", "\"", "-", "0", "1e308", "NaN", "inf", "g[G0]", "#", " ",
    "1e-400", ":", "\u{e9}",
];

fn read_both(text: &str) {
    let parsed = [
        parse_csv_table(text, "fuzz.csv"),
        parse_json_table(text, "fuzz.json"),
    ];
    for t in parsed.into_iter().flatten() {
        // A table that reads must interpolate anywhere without panicking.
        let volts = vec![0.05; t.arity()];
        let g = t.conductance(&volts);
        assert!(g.is_finite() && g > 0.0);
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 1024, ..ProptestConfig::default() })]

    #[test]
    fn random_bytes_never_panic(bytes in proptest::collection::vec(any::<u8>(), 0..300)) {
        read_both(&String::from_utf8_lossy(&bytes));
    }

    #[test]
    fn mutated_tables_never_panic(json in any::<bool>(),
                                  edits in proptest::collection::vec((any::<u16>(), 0u8..4, 0usize..SNIPPETS.len()), 1..6)) {
        let seed = if json { SEED_JSON } else { SEED_CSV };
        let mut text: Vec<char> = seed.chars().collect();
        for (pos, op, snippet) in edits {
            let at = pos as usize % (text.len() + 1);
            match op {
                0 => { text.splice(at..at, SNIPPETS[snippet].chars()); }
                1 => { let end = (at + 1 + snippet).min(text.len()); text.drain(at..end); }
                2 => text.truncate(at),
                _ => { if at < text.len() { text[at] = SNIPPETS[snippet].chars().next().unwrap_or('x'); } }
            }
        }
        let text: String = text.into_iter().collect();
        read_both(&text);
    }
}
