//! A mutation fuzzer for every reader of user input, on stable Rust.
//!
//! Each reader (Verilog, BLIF, BENCH, AIGER, library JSON, study plans,
//! result lines, conductance tables in CSV and JSON, device kits, port
//! maps of `equiv --ports`) gets a corpus of seed
//! files from the repository and a few written
//! here; every fuzz input is a seed changed by one to four random mutations
//! (byte flips, insertions, deletions, duplicated or repeated ranges,
//! format keywords, unusual numbers, splices of two seeds). The reader runs
//! in this process under `catch_unwind`; a global allocator counts the bytes
//! live, so the peak of each input is measured; a watchdog thread notices an
//! input that runs longer than the time limit.
//!
//! Time is measured twice: wall-clock seconds, and the CPU seconds of this
//! process (from /proc/self/stat on Linux). An input is counted as slow
//! when its CPU time passes the limit, so a campaign on a shared, loaded
//! machine counts the readers' work and not the waiting; the slowest wall
//! time is printed beside it. Where /proc is missing, wall time is used.
//!
//! Before an input runs it is written to `fuzz-findings/current.<reader>`,
//! so an input that aborts the process (a stack overflow, an allocation the
//! system refuses) is kept. Inputs that panic, run too long or use too much
//! memory are saved in `fuzz-findings/` and counted in the summary.
//!
//! ```text
//! cargo run --release --example fuzz_inputs -- [--inputs N] [--seed S] [--reader NAME]
//!       [--seconds LIMIT] [--megabytes LIMIT] [--findings DIR] [--mutations M]
//! ```
//!
//! Defaults: 100,000 inputs per reader, seed 1, all readers, 5 s and
//! 500 MB, 1 to 4 mutations per input (`--mutations 1` keeps more inputs
//! valid, so more of them reach elaboration and the write-back check). The
//! same seed gives the same inputs. Runs on one core.

use ribbonmap::device::kit::parse_kit;
use ribbonmap::device::table_csv::parse_csv_table;
use ribbonmap::device::table_json::parse_json_table;
use ribbonmap::equiv::parse_port_map;
use ribbonmap::io::{
    read_netlist, read_netlist_bytes, read_netlist_str, write_aiger, write_blif, NetlistFormat,
    ReadOptions,
};
use ribbonmap::library::Library;
use ribbonmap::study::results::check_result_line;
use ribbonmap::study::Plan;
use std::alloc::{GlobalAlloc, Layout, System};
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicBool, AtomicU64, AtomicUsize, Ordering};
use std::sync::Arc;
use std::time::{Duration, Instant};

/// The system allocator, counting bytes live and their peak.
struct CountingAllocator;

static LIVE: AtomicUsize = AtomicUsize::new(0);
/// True while a fuzz input runs (panics then are findings, not harness bugs).
static IN_INPUT: AtomicBool = AtomicBool::new(false);
static PEAK: AtomicUsize = AtomicUsize::new(0);

unsafe impl GlobalAlloc for CountingAllocator {
    unsafe fn alloc(&self, layout: Layout) -> *mut u8 {
        let p = unsafe { System.alloc(layout) };
        if !p.is_null() {
            let live = LIVE.fetch_add(layout.size(), Ordering::Relaxed) + layout.size();
            PEAK.fetch_max(live, Ordering::Relaxed);
        }
        p
    }
    unsafe fn dealloc(&self, p: *mut u8, layout: Layout) {
        unsafe { System.dealloc(p, layout) };
        LIVE.fetch_sub(layout.size(), Ordering::Relaxed);
    }
    unsafe fn realloc(&self, p: *mut u8, layout: Layout, new_size: usize) -> *mut u8 {
        let q = unsafe { System.realloc(p, layout, new_size) };
        if !q.is_null() {
            if new_size >= layout.size() {
                let grow = new_size - layout.size();
                let live = LIVE.fetch_add(grow, Ordering::Relaxed) + grow;
                PEAK.fetch_max(live, Ordering::Relaxed);
            } else {
                LIVE.fetch_sub(layout.size() - new_size, Ordering::Relaxed);
            }
        }
        q
    }
}

#[global_allocator]
static ALLOCATOR: CountingAllocator = CountingAllocator;

/// xorshift64*: a small deterministic generator (Vigna, "An experimental
/// exploration of Marsaglia's xorshift generators, scrambled", 2016).
struct Random(u64);

impl Random {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        self.0.wrapping_mul(0x2545_F491_4F6C_DD1D)
    }
    fn below(&mut self, n: usize) -> usize {
        if n == 0 {
            0
        } else {
            (self.next() % n as u64) as usize
        }
    }
}

/// CPU seconds (user + system) of this process so far, from
/// /proc/self/stat (fields 14 and 15, in clock ticks of 1/100 s, the
/// Linux default), or `None` where that file does not exist.
fn cpu_seconds() -> Option<f64> {
    let stat = std::fs::read_to_string("/proc/self/stat").ok()?;
    // The command name (field 2) may hold spaces; it ends at the last ')'.
    let rest = &stat[stat.rfind(')')? + 2..];
    let fields: Vec<&str> = rest.split(' ').collect();
    // `rest` starts at field 3, so fields 14 and 15 are at 11 and 12.
    let utime: f64 = fields.get(11)?.parse().ok()?;
    let stime: f64 = fields.get(12)?.parse().ok()?;
    Some((utime + stime) / 100.0)
}

/// The readers under test.
#[derive(Clone, Copy, Debug, PartialEq)]
enum Reader {
    Verilog,
    Blif,
    Bench,
    Aiger,
    Library,
    Plan,
    Results,
    TableCsv,
    TableJson,
    Kit,
    PortMap,
}

const READERS: [Reader; 11] = [
    Reader::Verilog,
    Reader::Blif,
    Reader::Bench,
    Reader::Aiger,
    Reader::Library,
    Reader::Plan,
    Reader::Results,
    Reader::TableCsv,
    Reader::TableJson,
    Reader::Kit,
    Reader::PortMap,
];

impl Reader {
    fn name(self) -> &'static str {
        match self {
            Reader::Verilog => "verilog",
            Reader::Blif => "blif",
            Reader::Bench => "bench",
            Reader::Aiger => "aiger",
            Reader::Library => "library",
            Reader::Plan => "plan",
            Reader::Results => "results",
            Reader::TableCsv => "table-csv",
            Reader::TableJson => "table-json",
            Reader::Kit => "kit",
            Reader::PortMap => "port-map",
        }
    }

    /// Words of the format that mutations insert.
    fn dictionary(self) -> &'static [&'static str] {
        const JSON: &[&str] = &[
            "{",
            "}",
            "[",
            "]",
            ":",
            ",",
            "\"",
            "null",
            "true",
            "false",
            "1e308",
            "-1",
            "0",
            "18446744073709551616",
            "\"\"",
            "\\u0000",
            "\\ud800",
            "{\"a\":",
            "[[[[",
        ];
        match self {
            Reader::Kit => &[
                "{",
                "}",
                "[",
                "]",
                ":",
                ",",
                "\"",
                "null",
                "1e308",
                "-1",
                "0",
                "\"ribbonmap-devices/1\"",
                "\"cells\":",
                "\"table\":",
                "\"tables/",
                "\"../",
                "\"/etc/",
                "\"supply_v\":",
                "\"function\":",
                "\"inputs\":",
                "maj(",
                "\\u0000",
            ],
            Reader::PortMap => &[" ", "\n", "#", "\t", "a", "b[0]", "\\x ", "=", "\u{80}"],
            Reader::Verilog => &[
                "module ",
                "endmodule",
                "input ",
                "output ",
                "wire ",
                "reg ",
                "assign ",
                "always @(posedge clk) ",
                "initial ",
                "#1 ",
                "{",
                "}",
                "{4096{",
                "[1048575:0]",
                "[3:0]",
                "(",
                ")",
                ";",
                ",",
                "^",
                "~",
                "&",
                "|",
                "?",
                ":",
                "1'b0",
                "8'hFF",
                "<=",
                "=",
                "\\esc ",
                "/*",
                "*/",
                "//",
                "\n",
                "begin",
                "end",
                "m m(",
                ".a(",
            ],
            Reader::Blif => &[
                ".model ",
                ".inputs ",
                ".outputs ",
                ".names ",
                ".latch ",
                ".subckt ",
                ".end\n",
                ".gate ",
                "\\\n",
                "-",
                "1",
                "0",
                "=",
                "#",
                " re ",
                " 2",
                "\n",
                "11 1\n",
                "a=b ",
                ".exdc\n",
                ".clock ",
            ],
            Reader::Bench => &[
                "INPUT(", "OUTPUT(", " = ", "AND(", "NAND(", "OR(", "NOR(", "DFF(", "NOT(", "XOR(",
                "BUFF(", ")", ",", "#", "\n", "G1", "G22",
            ],
            Reader::Aiger => &[
                "aag ",
                "aig ",
                "\n",
                " ",
                "0",
                "1",
                "2",
                "3",
                "7",
                "\u{80}",
                "\u{ff}",
                "i0 ",
                "l0 ",
                "o0 ",
                "b0 ",
                "c\n",
                "4294967295",
            ],
            Reader::Library => &[
                "{",
                "}",
                "[",
                "]",
                ":",
                ",",
                "\"",
                "null",
                "1e308",
                "-1",
                "\"function\":",
                "\"truth\":",
                "maj(",
                "(",
                ")",
                "!",
                "&",
                "^",
                "|",
                "\"0xE8\"",
                "\"inputs\":",
                "\"cells\":",
                "\"storage\":",
                "\"leakage\":",
                "\"delay\":",
                "\\u0000",
            ],
            Reader::Plan => &[
                "{",
                "}",
                "[",
                "]",
                ":",
                ",",
                "\"",
                "null",
                "-1",
                "4294967296",
                "{\"generate\": \"adder\", \"width\": 9}",
                "\"benchmarks\":",
                "\"libraries\":",
                "\"goals\":",
                "\"options\":",
                "\"cut_size\":",
                "\"patterns\":",
                "\"area\"",
                "\"ribbon3\"",
                "\"nets/*.blif\"",
                "\"width\":",
                "\"style\":",
                "\\u0000",
            ],
            Reader::Results => JSON,
            Reader::TableCsv => &[
                ",", "\n", "#", "g[uS]", "g[G0]", "g[S]", "[", "]", "0.2", "0.1", "0", "-0",
                "1e-300", "1e308", "NaN", "inf", "a", "b", "c",
            ],
            Reader::TableJson => &[
                "{",
                "}",
                "[",
                "]",
                ":",
                ",",
                "\"",
                "null",
                "1e308",
                "-1",
                "0",
                "0.2",
                "\"ribbonmap-conductance/1\"",
                "\"axes\":",
                "\"values\":",
                "\"unit\":",
                "\"uS\"",
                "\"G0\"",
                "\"name\":",
                "\"volts\":",
            ],
        }
    }
}

/// Seeds of each reader: files of the repository and a few written here.
fn seeds(reader: Reader, root: &Path) -> Vec<Vec<u8>> {
    let mut files: Vec<PathBuf> = Vec::new();
    let mut add_dir = |dir: &str, ext: &str, max: u64| {
        if let Ok(entries) = std::fs::read_dir(root.join(dir)) {
            let mut found: Vec<PathBuf> = entries
                .filter_map(|e| e.ok().map(|e| e.path()))
                .filter(|p| p.extension().and_then(|e| e.to_str()) == Some(ext))
                .filter(|p| {
                    std::fs::metadata(p)
                        .map(|m| m.len() <= max)
                        .unwrap_or(false)
                })
                .collect();
            found.sort();
            files.extend(found);
        }
    };
    let mut written: Vec<&str> = Vec::new();
    match reader {
        Reader::Verilog => {
            add_dir("tests/data/bad", "v", 8192);
            add_dir("tests/data/reference/netlists/iscas85", "v", 4096);
            add_dir("tests/data/reference/netlists/iscas89", "v", 4096);
            add_dir("tests/data/reference/netlists/arith", "v", 8192);
            written.extend([
                "module leaf(a, b, y); input a, b; output y; assign y = a ^ b; endmodule\n\
                 module top(x, z); input [1:0] x; output z; leaf u(.a(x[0]), .b(x[1]), .y(z)); endmodule\n",
                "module r(a, y); input a; output y; assign y = ^{4{{2{a}}}}; endmodule\n",
                "module f(D, CK, Q); input D, CK; output Q; reg q; initial q <= 1'b0;\n\
                 always @(posedge CK) q <= D; assign #1 Q = q; endmodule\n",
            ]);
        }
        Reader::Blif => {
            add_dir("tests/data/bad", "blif", 8192);
            add_dir("tests/data/reference/netlists/arith", "blif", 8192);
            add_dir("benchmarks", "blif", 3000);
            written.extend([
                ".model top\n.inputs a b\n.outputs y\n.subckt half x=a y=b s=y\n.end\n\
                 .model half\n.inputs x y\n.outputs s\n.names x y s\n10 1\n01 1\n.end\n",
                ".model l\n.inputs d clk\n.outputs q\n.latch d q re clk 0\n.end\n",
            ]);
        }
        Reader::Bench => {
            add_dir("tests/data/bad", "bench", 8192);
            written.extend([
                "# an invented example\nINPUT(a)\nINPUT(b)\nINPUT(c)\nOUTPUT(y)\nOUTPUT(z)\n\
                 n1 = NAND(a, b)\nn2 = NAND(b, c)\ny = NAND(n1, n2)\nz = XOR(a, n2)\n",
                "INPUT(d)\nOUTPUT(q)\nq = DFF(n)\nn = NOT(q)\nm = AND(d, q)\n",
                "INPUT(a)\nOUTPUT(o)\no = OR(a, b)\nb = BUFF(a)\n",
            ]);
        }
        Reader::Aiger => {
            add_dir("tests/data/bad", "aag", 8192);
            // The small reference netlists written in both AIGER encodings.
            let opts = ReadOptions::default();
            let mut found = Vec::new();
            for dir in [
                "tests/data/reference/netlists/iscas85",
                "tests/data/reference/netlists/iscas89",
            ] {
                if let Ok(entries) = std::fs::read_dir(root.join(dir)) {
                    found.extend(entries.filter_map(|e| e.ok().map(|e| e.path())));
                }
            }
            found.sort();
            let mut encoded = Vec::new();
            for path in found {
                let small = std::fs::metadata(&path).is_ok_and(|m| m.len() <= 4096);
                if let (true, Ok(net)) = (small, read_netlist(&path, &opts)) {
                    encoded.push(write_aiger(&net, false, Some("seed")));
                    encoded.push(write_aiger(&net, true, None));
                }
            }
            encoded
                .push(b"aag 3 2 0 1 1\n2\n4\n6\n6 2 4\ni0 a\ni1 b\no0 y\nc\ninvented\n".to_vec());
            encoded.push(b"aag 1 0 1 1 0\n2 3 1\n2\n".to_vec());
            let mut out: Vec<Vec<u8>> =
                files.iter().filter_map(|p| std::fs::read(p).ok()).collect();
            out.extend(encoded);
            return out;
        }
        Reader::Library => {
            add_dir("libraries", "json", 65536);
            add_dir("tests/data/bad-libraries", "json", 65536);
        }
        Reader::Plan => {
            add_dir("examples", "json", 8192);
            written.extend([
                r#"{"benchmarks": ["nets/*.blif", {"generate": "multiplier", "width": 4, "style": "array"}],
  "libraries": ["ribbon3", "lib.json"], "goals": ["area", "delay", "balanced"],
  "options": {"cut_size": 4, "cuts_per_node": 8, "verify": "sim", "patterns": 1024,
              "input_probability": 0.25}}"#,
                r#"{"benchmarks": ["/abs/none.blif"], "libraries": ["cmos-le"]}"#,
            ]);
        }
        Reader::TableCsv => {
            add_dir("libraries/devices/demo/tables", "csv", 65536);
            add_dir("tests/data/bad", "csv", 8192);
            written.extend([
                "# an invented table\na,b,g[uS]\n0,0,1\n0,0.2,2\n0.2,0,3\n0.2,0.2,4\n",
                "a,g[G0]\n0,0.5\n0.1,0.25\n0.2,0.001\n",
            ]);
        }
        Reader::TableJson => {
            add_dir("libraries/devices/demo/tables", "json", 65536);
            add_dir("tests/data/bad", "json", 8192);
        }
        Reader::Kit => {
            add_dir("libraries/devices/demo", "json", 65536);
        }
        Reader::PortMap => {
            written.extend([
                "# invented port map\na x\nb y  # trailing comment\n\\c[0] c0\n",
                "G1 N1\nG2 N2\nG3gat G3\n",
            ]);
        }
        Reader::Results => {
            written.extend([
                "{\"benchmark\":\"adder6\",\"design\":\"adder6\",\"library\":\"ribbon3\",\"goal\":\"area\",\
                 \"plan_key\":\"0123456789abcdef\",\"cells\":{\"maj3\":6,\"xor3\":6},\"cell_count\":12,\
                 \"area\":1320.0,\"depth\":6,\"delay\":21.5,\"devices\":24,\"verified\":\"proven\",\
                 \"energy_per_op\":3.25,\"static_power\":0.5,\"majority_cells\":6,\
                 \"seconds\":{\"map\":0.01},\"plan_position\":[0,0,0]}\n\
                 {\"benchmark\":\"parity7\",\"library\":\"ribbon3-nomaj\",\"goal\":\"delay\",\
                 \"cell_count\":3,\"area\":1.5e2,\"depth\":2,\"delay\":4,\"devices\":6,\"verified\":\"simulated\"}\n",
            ]);
        }
    }
    let mut out: Vec<Vec<u8>> = files.iter().filter_map(|p| std::fs::read(p).ok()).collect();
    out.extend(written.iter().map(|s| s.as_bytes().to_vec()));
    out
}

/// Numbers that make readers multiply or overflow.
const NUMBERS: &[&str] = &[
    "0",
    "1",
    "-1",
    "2",
    "63",
    "64",
    "65",
    "255",
    "65535",
    "65536",
    "1048575",
    "2147483647",
    "4294967295",
    "4294967296",
    "9223372036854775807",
    "99999999999999999999",
];

/// One random change of `input`.
fn mutate(input: &mut Vec<u8>, rng: &mut Random, dictionary: &[&str], seeds: &[Vec<u8>]) {
    let len = input.len();
    match rng.below(10) {
        0 if len > 0 => {
            let i = rng.below(len);
            input[i] = rng.next() as u8;
        }
        1 => {
            let i = rng.below(len + 1);
            let byte = match rng.below(3) {
                0 => rng.next() as u8,
                1 => {
                    const PUNCTUATION: &[u8] = b"(){}[];,.=\"\\\n \t#";
                    PUNCTUATION[rng.below(PUNCTUATION.len())]
                }
                _ => b'a' + rng.below(26) as u8,
            };
            input.insert(i, byte);
        }
        2 if len > 0 => {
            let a = rng.below(len);
            let b = (a + 1 + rng.below(16.min(len - a))).min(len);
            input.drain(a..b);
        }
        3 if len > 0 => {
            let a = rng.below(len);
            let b = (a + 1 + rng.below(64.min(len - a))).min(len);
            let chunk = input[a..b].to_vec();
            let at = rng.below(len + 1);
            input.splice(at..at, chunk);
        }
        4 | 5 => {
            let word = dictionary[rng.below(dictionary.len())].as_bytes();
            let at = rng.below(len + 1);
            input.splice(at..at, word.iter().copied());
        }
        6 => {
            // Replace a run of digits (or insert) with an unusual number.
            let number = NUMBERS[rng.below(NUMBERS.len())].as_bytes();
            let digits: Vec<usize> = (0..len).filter(|&i| input[i].is_ascii_digit()).collect();
            if digits.is_empty() {
                let at = rng.below(len + 1);
                input.splice(at..at, number.iter().copied());
            } else {
                let start = digits[rng.below(digits.len())];
                let mut end = start;
                while end < len && input[end].is_ascii_digit() {
                    end += 1;
                }
                input.splice(start..end, number.iter().copied());
            }
        }
        7 if !seeds.is_empty() => {
            // Splice: our head, another seed's tail.
            let other = &seeds[rng.below(seeds.len())];
            let cut = rng.below(len + 1);
            let from = rng.below(other.len() + 1);
            input.truncate(cut);
            input.extend_from_slice(&other[from..]);
        }
        8 if len > 0 => {
            // Repeat a short range many times: deep nesting, long chains.
            let a = rng.below(len);
            let b = (a + 1 + rng.below(8.min(len - a))).min(len);
            let chunk = input[a..b].to_vec();
            let times = [10, 100, 1000, 10_000][rng.below(4)];
            let mut repeated = Vec::with_capacity(chunk.len() * times);
            for _ in 0..times {
                repeated.extend_from_slice(&chunk);
            }
            input.splice(a..a, repeated);
        }
        _ if len > 0 => input.truncate(rng.below(len)),
        _ => input.push(rng.next() as u8),
    }
}

/// Runs one reader on `bytes`. Errors are the expected outcome for most
/// inputs; only panics, time and memory matter. Returns whether the reader
/// accepted the input (the share accepted shows how deep the mutants get).
fn run_reader(reader: Reader, bytes: &[u8], plan_dir: &Path, library: &Library) -> bool {
    if reader == Reader::Aiger {
        let opts = ReadOptions::default();
        if let Ok(net) = read_netlist_bytes(bytes, "fuzz.aig", NetlistFormat::Aig, &opts) {
            let again = write_blif(&net);
            drop(net);
            if let Err(e) = read_netlist_str(&again, "again.blif", NetlistFormat::Blif, &opts) {
                panic!("a network read from fuzz input does not read back from BLIF: {e}");
            }
            return true;
        }
        return false;
    }
    let text = match ribbonmap::diag::utf8_text("fuzz", bytes.to_vec()) {
        Ok(t) => t,
        Err(_) => String::from_utf8_lossy(bytes).into_owned(),
    };
    let netlist = |format: NetlistFormat| {
        let opts = ReadOptions {
            library: Some(library),
            ..ReadOptions::default()
        };
        if let Ok(net) = read_netlist_str(&text, "fuzz", format, &opts) {
            // What was read must write and read back.
            let again = write_blif(&net);
            drop(net);
            if let Err(e) = read_netlist_str(&again, "again.blif", NetlistFormat::Blif, &opts) {
                panic!("a network read from fuzz input does not read back from BLIF: {e}");
            }
            return true;
        }
        false
    };
    match reader {
        Reader::Verilog => netlist(NetlistFormat::Verilog),
        Reader::Blif => netlist(NetlistFormat::Blif),
        Reader::Bench => netlist(NetlistFormat::Bench),
        Reader::Aiger => unreachable!("read above as bytes"),
        Reader::Library => Library::from_json_str(&text, "fuzz.json").is_ok(),
        Reader::Plan => match Plan::parse(&text, &plan_dir.join("plan.json")) {
            Ok(plan) => {
                let _ = plan.jobs();
                true
            }
            Err(_) => false,
        },
        Reader::TableCsv | Reader::TableJson => {
            let table = if reader == Reader::TableCsv {
                parse_csv_table(&text, "fuzz.csv")
            } else {
                parse_json_table(&text, "fuzz.json")
            };
            if let Ok(table) = table {
                // What was read must interpolate anywhere, in and out of
                // the grid.
                let n = table.arity();
                let spans: Vec<(f64, f64)> = (0..n).map(|k| table.span(k)).collect();
                for corner in 0..1u32 << n.min(6) {
                    let at: Vec<f64> = spans
                        .iter()
                        .enumerate()
                        .map(|(k, &(lo, hi))| if corner >> k & 1 == 1 { hi } else { lo })
                        .collect();
                    let _ = table.conductance(&at);
                }
                let middle: Vec<f64> = spans.iter().map(|&(lo, hi)| 0.5 * (lo + hi)).collect();
                let outside: Vec<f64> = spans.iter().map(|&(lo, _)| lo - 1.0).collect();
                let _ = table.conductance(&middle);
                let _ = table.conductance(&outside);
                true
            } else {
                false
            }
        }
        Reader::Kit => {
            // Table paths resolve against the demo kit's folder, as for
            // the kit file itself.
            let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("libraries/devices/demo");
            parse_kit(&text, "fuzz.json", &dir).is_ok()
        }
        Reader::PortMap => parse_port_map(&text, "fuzz.map").is_ok(),
        Reader::Results => {
            // Accepted when every line is a valid result line.
            let mut all = true;
            for (i, line) in text.lines().enumerate() {
                match check_result_line("fuzz.jsonl", i, line) {
                    Ok(record) => {
                        let _ = record.to_json_line();
                    }
                    Err(_) => all = false,
                }
            }
            all
        }
    }
}

struct Settings {
    inputs: u64,
    seed: u64,
    only: Option<String>,
    seconds: f64,
    megabytes: f64,
    findings: PathBuf,
    mutations: usize,
}

fn settings() -> Settings {
    let mut s = Settings {
        inputs: 100_000,
        seed: 1,
        only: None,
        seconds: 5.0,
        megabytes: 500.0,
        findings: PathBuf::from("fuzz-findings"),
        mutations: 4,
    };
    let args: Vec<String> = std::env::args().skip(1).collect();
    let mut i = 0;
    while i < args.len() {
        let value = args.get(i + 1).cloned().unwrap_or_default();
        let number = || -> f64 {
            value.parse().unwrap_or_else(|_| {
                eprintln!("error: {} needs a number, found '{value}'", args[i]);
                std::process::exit(2)
            })
        };
        match args[i].as_str() {
            "--inputs" => s.inputs = number() as u64,
            "--seed" => s.seed = number() as u64,
            "--reader" => s.only = Some(value.clone()),
            "--seconds" => s.seconds = number(),
            "--megabytes" => s.megabytes = number(),
            "--findings" => s.findings = PathBuf::from(&value),
            "--mutations" => s.mutations = (number() as usize).max(1),
            other => {
                eprintln!("error: unknown option '{other}' (see the comment at the top of examples/fuzz_inputs.rs)");
                std::process::exit(2)
            }
        }
        i += 2;
    }
    s
}

/// Counts of one reader's campaign.
#[derive(Default)]
struct Tally {
    inputs: u64,
    accepted: u64,
    panics: u64,
    slow: u64,
    heavy: u64,
    slowest: f64,
    slowest_wall: f64,
    heaviest: usize,
    bytes: u64,
}

fn main() {
    let settings = settings();
    let root = PathBuf::from(env!("CARGO_MANIFEST_DIR"));
    std::fs::create_dir_all(&settings.findings).expect("cannot create the findings folder");
    let plan_dir = tempfile::tempdir().expect("temporary folder");
    std::fs::create_dir(plan_dir.path().join("nets")).expect("temporary folder");
    std::fs::write(
        plan_dir.path().join("nets/a.blif"),
        ".model a\n.inputs x\n.outputs y\n.names x y\n0 1\n.end\n",
    )
    .expect("temporary file");
    let library = Library::builtin("ribbon3").expect("built-in library");

    // Panics are counted and their message kept, not printed.
    let last_panic = Arc::new(std::sync::Mutex::new(String::new()));
    {
        let last_panic = Arc::clone(&last_panic);
        std::panic::set_hook(Box::new(move |info| {
            if !IN_INPUT.load(Ordering::Relaxed) {
                eprintln!("fuzz harness: {info}");
            } else if let Ok(mut m) = last_panic.lock() {
                *m = info.to_string();
            }
        }));
    }
    // The watchdog: reports an input that runs past the limit.
    let started_ms = Arc::new(AtomicU64::new(0));
    let running = Arc::new(AtomicBool::new(false));
    let epoch = Instant::now();
    {
        let (started_ms, running) = (Arc::clone(&started_ms), Arc::clone(&running));
        let limit = settings.seconds;
        std::thread::spawn(move || loop {
            std::thread::sleep(Duration::from_millis(500));
            if running.load(Ordering::Relaxed) {
                let now = epoch.elapsed().as_millis() as u64;
                let ran = (now.saturating_sub(started_ms.load(Ordering::Relaxed))) as f64 / 1000.0;
                if ran > limit * 12.0 {
                    eprintln!("fuzz: an input has run {ran:.0} s; it is saved as current.* in the findings folder; stopping");
                    std::process::exit(3);
                }
            }
        });
    }

    println!(
        "reader      inputs  accepted   panics  over {:.0} CPU-s  over {:.0} MB  slowest CPU-s  slowest wall s  peak MB  MB read",
        settings.seconds, settings.megabytes
    );
    let mut total_failures = 0;
    for reader in READERS {
        if settings.only.as_deref().is_some_and(|o| o != reader.name()) {
            continue;
        }
        let corpus = seeds(reader, &root);
        assert!(!corpus.is_empty(), "no seeds for {}", reader.name());
        let mut rng = Random(settings.seed.wrapping_mul(0x9E37_79B9_7F4A_7C15) | 1);
        let mut tally = Tally::default();
        let current = settings.findings.join(format!("current.{}", reader.name()));
        let mut previous: Option<Vec<u8>> = None;
        // One open file, rewritten in place for each input (cheaper than
        // creating a file per input).
        let mut current_file = std::fs::File::create(&current).expect("findings file");
        for n in 0..settings.inputs {
            // Mostly a fresh mutant of a seed; sometimes a further mutant
            // of the last input (a short random walk).
            let mut input = match (&previous, rng.below(4)) {
                (Some(p), 0) if p.len() < 1 << 20 => p.clone(),
                _ => corpus[rng.below(corpus.len())].clone(),
            };
            for _ in 0..1 + rng.below(settings.mutations) {
                mutate(&mut input, &mut rng, reader.dictionary(), &corpus);
            }
            {
                use std::io::{Seek, Write};
                let _ = current_file.set_len(0);
                let _ = current_file.rewind();
                let _ = current_file.write_all(&input);
            }
            let base = LIVE.load(Ordering::Relaxed);
            PEAK.store(base, Ordering::Relaxed);
            started_ms.store(epoch.elapsed().as_millis() as u64, Ordering::Relaxed);
            running.store(true, Ordering::Relaxed);
            let t = Instant::now();
            let cpu_before = cpu_seconds();
            IN_INPUT.store(true, Ordering::Relaxed);
            let outcome = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
                run_reader(reader, &input, plan_dir.path(), &library)
            }));
            IN_INPUT.store(false, Ordering::Relaxed);
            let wall = t.elapsed().as_secs_f64();
            let seconds = match (cpu_before, cpu_seconds()) {
                (Some(before), Some(after)) => after - before,
                _ => wall,
            };
            running.store(false, Ordering::Relaxed);
            let peak = PEAK.load(Ordering::Relaxed).saturating_sub(base);
            tally.inputs += 1;
            tally.bytes += input.len() as u64;
            tally.slowest = tally.slowest.max(seconds);
            tally.slowest_wall = tally.slowest_wall.max(wall);
            tally.heaviest = tally.heaviest.max(peak);
            let mut keep = None;
            if matches!(outcome, Ok(true)) {
                tally.accepted += 1;
            }
            if outcome.is_err() {
                tally.panics += 1;
                keep = Some("panic");
                let message = last_panic.lock().map(|m| m.clone()).unwrap_or_default();
                eprintln!("fuzz: {} input {n} panicked: {message}", reader.name());
            }
            if seconds > settings.seconds {
                tally.slow += 1;
                keep = Some("slow");
            }
            if peak as f64 > settings.megabytes * 1e6 {
                tally.heavy += 1;
                keep = Some("memory");
            }
            if let Some(kind) = keep {
                let path = settings
                    .findings
                    .join(format!("{}-{kind}-{n}.in", reader.name()));
                let _ = std::fs::write(&path, &input);
                eprintln!(
                    "fuzz: {} input {n}: {kind} ({seconds:.2} CPU-s, {wall:.2} s wall, {:.1} MB) saved as {}",
                    reader.name(),
                    peak as f64 / 1e6,
                    path.display()
                );
            }
            previous = Some(input);
            if (n + 1) % 10_000 == 0 {
                eprintln!(
                    "fuzz: {} {} inputs, {} panics, {} over the time limit, {} over the memory limit",
                    reader.name(),
                    n + 1,
                    tally.panics,
                    tally.slow,
                    tally.heavy
                );
            }
        }
        drop(current_file);
        let _ = std::fs::remove_file(&current);
        total_failures += tally.panics + tally.slow + tally.heavy;
        println!(
            "{:<10} {:>7}  {:>8}  {:>7}  {:>12}  {:>10}  {:>13.2}  {:>14.3}  {:>7.1}  {:>7.1}",
            reader.name(),
            tally.inputs,
            tally.accepted,
            tally.panics,
            tally.slow,
            tally.heavy,
            tally.slowest,
            tally.slowest_wall,
            tally.heaviest as f64 / 1e6,
            tally.bytes as f64 / 1e6
        );
    }
    std::process::exit(if total_failures == 0 { 0 } else { 1 });
}
