//! Regenerates the demo device kit in `libraries/devices/demo/`.
//!
//! The tables are INVENTED: written by the analytic model below, our own, to
//! look like the conduction maps a device simulator produces for
//! complementary ribbon cells. They stand in for real device data so that
//! `ribbonmap characterize`, the HTML report and the SPICE decks can be
//! shown end to end; no number in them describes a fabricated device.
//!
//! The model. A gate voltage v (0 to 0.2 V) sets how strongly the ribbon
//! segment it controls is switched, x(v) in [0, 1]: a logistic step centred
//! at 0.1 V with width W, rescaled so that x(0) = 0 and x(0.2 V) = 1 exactly.
//! Every ribbon has a conductance G_r at each corner r of the input cube:
//! G_ON (a fraction of the conductance quantum G0) on the rows where it
//! should conduct, G_ON / RATIO · f(r) on the rows where it should block,
//! where f(r) between 1 and 1.5 makes the blocking conductances unequal (the
//! pull-up and the pull-down vary differently). Between corners the
//! logarithm of the conductance is the multilinear blend of the corner
//! logarithms with weights prod_k (x_k or 1 − x_k). RATIO is 150 for one-
//! and two-input cells (on/off about 100 after f) and 45 for three-input
//! cells (about 30).
//!
//! The two weak cells of `demo-weak.json` come from the same model with a
//! peak of 0.15 G0, a smaller RATIO and a wider step, so that their voltage
//! gain never reaches 1 (neither restores levels) and they are cheaper in
//! area than the strong cells of the same function, which is what makes a
//! Boolean mapper pick them. They are weak in two different ways:
//!
//! - `xor3w` (RATIO 3, W = 35 mV; on/off about 2, largest gain about 0.76)
//!   has poor levels even from clean inputs (VOH about 0.138 V), too poor
//!   for a buffer to read with a 20 mV margin: a margin-aware mapping must
//!   do without it;
//! - `maj3w` (RATIO 5, W = 60 mV; on/off about 4, largest gain about 0.88)
//!   has levels a buffer reads with over 30 mV to spare (VOH about 0.161 V),
//!   but each majority stage on a carry chain passes a degraded carry on
//!   with gain below 1, so a ripple adder's carry drifts towards the middle
//!   and sum bits read wrong: restoring stages on the chain save it.
//!
//! Run: `cargo run --example device_demo_kit` (writes into the repository).

use std::fmt::Write as _;
use std::path::Path;

/// Conductance quantum 2e²/h in siemens (CODATA 2018).
const G0: f64 = 7.748_091_729_863_649e-5;
const SUPPLY: f64 = 0.2;
const CENTRE: f64 = 0.1;

struct Ribbon {
    /// Corner conductances in siemens, row r sets input k to bit k.
    corners: Vec<f64>,
    width: f64,
}

impl Ribbon {
    fn conductance(&self, volts: &[f64]) -> f64 {
        let x: Vec<f64> = volts.iter().map(|&v| switched(v, self.width)).collect();
        let mut log_g = 0.0;
        for (r, g) in self.corners.iter().enumerate() {
            let mut w = 1.0;
            for (k, xk) in x.iter().enumerate() {
                w *= if r >> k & 1 == 1 { *xk } else { 1.0 - xk };
            }
            log_g += w * g.ln();
        }
        log_g.exp()
    }
}

fn logistic(u: f64) -> f64 {
    1.0 / (1.0 + (-u).exp())
}

/// How strongly a gate at `v` switches its segment: 0 at 0 V, 1 at 0.2 V.
fn switched(v: f64, width: f64) -> f64 {
    let lo = logistic((0.0 - CENTRE) / width);
    let hi = logistic((SUPPLY - CENTRE) / width);
    ((logistic((v - CENTRE) / width) - lo) / (hi - lo)).clamp(0.0, 1.0)
}

struct CellSpec {
    name: &'static str,
    function: &'static str,
    truth: u64,
    inputs: usize,
    area: f64,
    gate_af: f64,
    /// `Some` for a deliberately weak cell: its (peak G0, RATIO, W).
    weak: Option<(f64, f64, f64)>,
}

const fn spec(
    name: &'static str,
    function: &'static str,
    truth: u64,
    inputs: usize,
    area: f64,
    gate_af: f64,
) -> CellSpec {
    CellSpec {
        name,
        function,
        truth,
        inputs,
        area,
        gate_af,
        weak: None,
    }
}

const CELLS: &[CellSpec] = &[
    spec("inv", "!a", 0b01, 1, 40.0, 30.0),
    spec("buf", "a", 0b10, 1, 44.0, 30.0),
    spec("and2", "a & b", 0x8, 2, 60.0, 30.0),
    spec("nand2", "!(a & b)", 0x7, 2, 60.0, 30.0),
    spec("or2", "a | b", 0xE, 2, 60.0, 30.0),
    spec("nor2", "!(a | b)", 0x1, 2, 60.0, 30.0),
    spec("xor2", "a ^ b", 0x6, 2, 72.0, 33.0),
    spec("xnor2", "!(a ^ b)", 0x9, 2, 72.0, 33.0),
    spec("and3", "a & b & c", 0x80, 3, 84.0, 30.0),
    spec("nand3", "!(a & b & c)", 0x7F, 3, 84.0, 30.0),
    spec("or3", "a | b | c", 0xFE, 3, 84.0, 30.0),
    spec("nor3", "!(a | b | c)", 0x01, 3, 84.0, 30.0),
    spec("maj3", "maj(a, b, c)", 0xE8, 3, 110.0, 30.0),
    spec("minority3", "!maj(a, b, c)", 0x17, 3, 110.0, 30.0),
    spec("xor3", "a ^ b ^ c", 0x96, 3, 120.0, 36.0),
    spec("xnor3", "!(a ^ b ^ c)", 0x69, 3, 120.0, 36.0),
];

const WEAK: &[CellSpec] = &[
    // Weak in its levels: no buffer reads it with a 20 mV margin.
    CellSpec {
        name: "xor3w",
        function: "a ^ b ^ c",
        truth: 0x96,
        inputs: 3,
        area: 80.0,
        gate_af: 30.0,
        weak: Some((0.15, 3.0, 0.035)),
    },
    // Weak in its gain only: its levels can be restored.
    CellSpec {
        name: "maj3w",
        function: "maj(a, b, c)",
        truth: 0xE8,
        inputs: 3,
        area: 76.0,
        gate_af: 30.0,
        weak: Some((0.15, 5.0, 0.06)),
    },
];

const NAMES: [&str; 3] = ["a", "b", "c"];

/// Pull-up (`up`) or pull-down ribbon of a cell, by the model above.
fn ribbon(cell: &CellSpec, up: bool) -> Ribbon {
    let n = cell.inputs;
    let (peak_g0, ratio, width) = match (cell.weak, n) {
        (Some(model), _) => model,
        (None, 1) => (0.3, 150.0, 0.018),
        (None, 2) => (0.25, 150.0, 0.018),
        _ => (0.2, 45.0, 0.018),
    };
    let on = peak_g0 * G0;
    let corners = (0..1usize << n)
        .map(|r| {
            let output = cell.truth >> r & 1 == 1;
            let ones = r.count_ones() as f64 / n as f64;
            if output == up {
                // Conducting: slightly weaker the more gates are high.
                on * (1.0 - 0.04 * ones)
            } else {
                // Blocking: unequal, rising with the number of high gates on
                // the pull-up, falling on the pull-down.
                let f = if up {
                    1.0 + 0.5 * ones
                } else {
                    1.5 - 0.5 * ones
                };
                on / ratio * f
            }
        })
        .collect();
    Ribbon { corners, width }
}

fn axis(n: usize) -> Vec<f64> {
    match n {
        1 => (0..=40).map(|i| i as f64 * 0.005).collect(),
        2 => (0..=20).map(|i| i as f64 * 0.01).collect(),
        _ => vec![
            0.0, 0.04, 0.07, 0.085, 0.095, 0.1, 0.105, 0.115, 0.13, 0.16, 0.2,
        ],
    }
}

/// Rounds to five significant digits (what a device simulator would print).
fn sig5(x: f64) -> String {
    let s = format!("{x:.4e}");
    let v: f64 = s.parse().unwrap();
    format!("{v}")
}

fn volts(v: f64) -> String {
    format!("{}", (v * 1e4).round() / 1e4)
}

/// Writes one table file and returns its name.
fn write_table(dir: &Path, cell: &CellSpec, up: bool) -> String {
    let ribbon = ribbon(cell, up);
    let n = cell.inputs;
    let grid = axis(n);
    let role = if up { "up" } else { "down" };
    let points = grid.len().pow(n as u32);
    let point = |i: usize| -> Vec<f64> {
        let mut rest = i;
        (0..n)
            .map(|_| {
                let v = grid[rest % grid.len()];
                rest /= grid.len();
                v
            })
            .collect()
    };
    // The buffer's pull-up is written in transmission units (G0) to show
    // that unit; the others in microsiemens.
    let quantum = cell.name == "buf" && up;
    let scale = if quantum { 1.0 / G0 } else { 1e6 };
    if n < 3 {
        let file = format!("{}_{role}.csv", cell.name);
        let mut text = format!(
            "# INVENTED demo data: {} ribbon of '{}' ({}), from the analytic model in examples/device_demo_kit.rs\n",
            if up { "pull-up" } else { "pull-down" },
            cell.name,
            cell.function
        );
        let unit = if quantum { "G0" } else { "uS" };
        writeln!(text, "{},g[{unit}]", NAMES[..n].join(",")).unwrap();
        for i in 0..points {
            let v = point(i);
            let g = ribbon.conductance(&v) * scale;
            let vs: Vec<String> = v.iter().map(|&x| volts(x)).collect();
            writeln!(text, "{},{}", vs.join(","), sig5(g)).unwrap();
        }
        std::fs::write(dir.join(&file), text).unwrap();
        file
    } else {
        let file = format!("{}_{role}.json", cell.name);
        let values: Vec<String> = (0..points)
            .map(|i| sig5(ribbon.conductance(&point(i)) * scale))
            .collect();
        let axis_text = format!(
            "[{}]",
            grid.iter()
                .map(|&x| volts(x))
                .collect::<Vec<_>>()
                .join(", ")
        );
        let mut text = String::new();
        writeln!(text, "{{").unwrap();
        writeln!(text, "  \"format\": \"ribbonmap-conductance/1\",").unwrap();
        writeln!(
            text,
            "  \"description\": \"INVENTED demo data: {} ribbon of '{}' ({}), from the analytic model in examples/device_demo_kit.rs\",",
            if up { "pull-up" } else { "pull-down" },
            cell.name,
            cell.function
        )
        .unwrap();
        writeln!(text, "  \"inputs\": [\"a\", \"b\", \"c\"],").unwrap();
        writeln!(text, "  \"unit\": \"uS\",").unwrap();
        writeln!(text, "  \"axes\": [{axis_text}, {axis_text}, {axis_text}],").unwrap();
        writeln!(text, "  \"values\": [").unwrap();
        for (i, chunk) in values.chunks(grid.len()).enumerate() {
            let comma = if (i + 1) * grid.len() < values.len() {
                ","
            } else {
                ""
            };
            writeln!(text, "    {}{comma}", chunk.join(", ")).unwrap();
        }
        writeln!(text, "  ]").unwrap();
        writeln!(text, "}}").unwrap();
        std::fs::write(dir.join(&file), text).unwrap();
        file
    }
}

fn kit_text(name: &str, description: &str, cells: &[(&CellSpec, String, String)]) -> String {
    let mut text = String::new();
    writeln!(text, "{{").unwrap();
    writeln!(text, "  \"format\": \"ribbonmap-devices/1\",").unwrap();
    writeln!(text, "  \"name\": \"{name}\",").unwrap();
    writeln!(text, "  \"description\": \"{description}\",").unwrap();
    writeln!(text, "  \"supply_v\": 0.2,").unwrap();
    writeln!(text, "  \"logic_low_v\": 0.0,").unwrap();
    writeln!(text, "  \"logic_high_v\": 0.2,").unwrap();
    writeln!(text, "  \"gate_capacitance_af\": 30.0,").unwrap();
    writeln!(text, "  \"output_capacitance_af\": 40.0,").unwrap();
    writeln!(text, "  \"area_unit\": \"nm2\",").unwrap();
    writeln!(text, "  \"primary_output_load\": 1.0,").unwrap();
    writeln!(text, "  \"cells\": [").unwrap();
    for (i, (cell, up, down)) in cells.iter().enumerate() {
        let inputs: Vec<String> = NAMES[..cell.inputs]
            .iter()
            .map(|s| format!("\"{s}\""))
            .collect();
        let comma = if i + 1 < cells.len() { "," } else { "" };
        writeln!(
            text,
            "    {{\"name\": \"{}\", \"inputs\": [{}], \"function\": \"{}\", \"pull_up\": \"tables/{up}\", \"pull_down\": \"tables/{down}\", \"area\": {:.1}, \"devices\": 2, \"gate_capacitance_af\": {:.1}}}{comma}",
            cell.name,
            inputs.join(", "),
            cell.function,
            cell.area,
            cell.gate_af
        )
        .unwrap();
    }
    writeln!(text, "  ],").unwrap();
    writeln!(
        text,
        "  \"storage\": [{{\"name\": \"dff\", \"d\": \"d\", \"q\": \"q\", \"clock\": \"clk\", \"area\": 300.0}}]"
    )
    .unwrap();
    writeln!(text, "}}").unwrap();
    text
}

fn main() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("libraries/devices/demo");
    let tables = root.join("tables");
    std::fs::create_dir_all(&tables).unwrap();
    let mut written = Vec::new();
    for cell in CELLS.iter().chain(WEAK) {
        let up = write_table(&tables, cell, true);
        let down = write_table(&tables, cell, false);
        written.push((cell, up, down));
    }
    let (strong, weak) = written.split_at(CELLS.len());
    std::fs::write(
        root.join("demo.json"),
        kit_text(
            "ribbon3-demo",
            "INVENTED demo kit: complementary ribbon cells of ribbon3 whose conduction maps come from the analytic model in examples/device_demo_kit.rs, not from a device simulator or a fabricated device.",
            strong,
        ),
    )
    .unwrap();
    let all: Vec<_> = strong.iter().chain(weak).cloned().collect();
    std::fs::write(
        root.join("demo-weak.json"),
        kit_text(
            "ribbon3-demo-weak",
            "INVENTED demo kit: the cells of demo.json plus two deliberately weak cells whose voltage gain stays below 1, so they do not restore levels: xor3w, a three-input XOR (on/off about 2, high output about 0.138 V), and maj3w, a majority (on/off about 4, high output about 0.161 V) that degrades ripple-adder carry chains.",
            &all,
        ),
    )
    .unwrap();
    println!(
        "wrote {} cells' tables and two kits under {}",
        all.len(),
        root.display()
    );
}
