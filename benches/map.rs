//! Mapping speed and memory on a network of more than 100k nodes: a 160 x 160
//! array multiplier built from AND, XOR and majority, mapped onto the
//! built-in ribbon3 library at k = 4, C = 8.
//!
//! Prints, before the criterion measurement:
//! - nodes per second per phase (median of several runs; the phases are the
//!   ones `map_detailed` reports: `balance`, `cuts` with the delay cover,
//!   `cover` with area recovery and netlist extraction), and end to end;
//! - peak heap bytes per node, measured by a counting allocator over the
//!   whole `map_detailed` call with the match table already cached and the
//!   input network already built. The count includes everything mapping
//!   allocates while it runs: the balanced network with its hash index, the
//!   cut store, the cover's per-node arrays, scratch buffers and the mapped
//!   netlist being built (which the caller keeps). Alongside it, the cover
//!   state alone as `MapOutcome::cover_bytes` reports it.
//!
//! The criterion measurement then times the whole mapping with its
//! throughput in nodes (elements) per second.

use criterion::{Criterion, Throughput};
use ribbonmap::generate::{generate, Family, Params};
use ribbonmap::library::Library;
use ribbonmap::mapper::{map_detailed, match_table, MapOptions};
use ribbonmap::network::Network;
use std::alloc::{GlobalAlloc, Layout, System};
use std::sync::atomic::{AtomicUsize, Ordering};
use std::time::Instant;

struct Counting;

static CURRENT: AtomicUsize = AtomicUsize::new(0);
static PEAK: AtomicUsize = AtomicUsize::new(0);

fn grew(bytes: usize) {
    let now = CURRENT.fetch_add(bytes, Ordering::Relaxed) + bytes;
    PEAK.fetch_max(now, Ordering::Relaxed);
}

unsafe impl GlobalAlloc for Counting {
    unsafe fn alloc(&self, layout: Layout) -> *mut u8 {
        let p = unsafe { System.alloc(layout) };
        if !p.is_null() {
            grew(layout.size());
        }
        p
    }
    unsafe fn alloc_zeroed(&self, layout: Layout) -> *mut u8 {
        let p = unsafe { System.alloc_zeroed(layout) };
        if !p.is_null() {
            grew(layout.size());
        }
        p
    }
    unsafe fn dealloc(&self, ptr: *mut u8, layout: Layout) {
        unsafe { System.dealloc(ptr, layout) };
        CURRENT.fetch_sub(layout.size(), Ordering::Relaxed);
    }
    // Growing in place (or by remapping pages) holds only the new size; the
    // system allocator decides, so the count follows its answer: the old
    // block is counted until the new one exists.
    unsafe fn realloc(&self, ptr: *mut u8, layout: Layout, new_size: usize) -> *mut u8 {
        if new_size > layout.size() {
            grew(new_size);
        } else {
            CURRENT.fetch_add(new_size, Ordering::Relaxed);
        }
        let p = unsafe { System.realloc(ptr, layout, new_size) };
        if p.is_null() {
            CURRENT.fetch_sub(new_size, Ordering::Relaxed);
        } else {
            CURRENT.fetch_sub(layout.size(), Ordering::Relaxed);
        }
        p
    }
}

#[global_allocator]
static ALLOCATOR: Counting = Counting;

/// The bench network: the generators' array multiplier (about 100k nodes at
/// width 160).
fn multiplier(n: u32) -> Network {
    generate(Family::Multiplier, &Params::new(n).with_style("array"))
        .expect("array multiplier of a supported width")
}

/// CPU seconds (user and system) this thread has used, from
/// `/proc/thread-self/stat` (Linux; clock ticks of 1/100 s, the usual
/// setting); `None` elsewhere. On a shared machine wall-clock time includes
/// waiting for a core, CPU time does not.
fn thread_cpu_seconds() -> Option<f64> {
    let stat = std::fs::read_to_string("/proc/thread-self/stat").ok()?;
    // Fields after the parenthesised command name; utime and stime are the
    // 14th and 15th fields of the whole line.
    let rest = &stat[stat.rfind(')')? + 2..];
    let fields: Vec<&str> = rest.split_whitespace().collect();
    let utime: f64 = fields.get(11)?.parse().ok()?;
    let stime: f64 = fields.get(12)?.parse().ok()?;
    Some((utime + stime) / 100.0)
}

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(f64::total_cmp);
    v[v.len() / 2]
}

fn main() {
    let lib = Library::builtin("ribbon3").expect("built-in ribbon3");
    let t = Instant::now();
    let _ = match_table(&lib);
    let table_seconds = t.elapsed().as_secs_f64();
    let net = multiplier(160);
    let nodes = net.num_nodes();
    let opts = MapOptions::default();

    // Peak heap of one mapping, from a settled baseline.
    let base = CURRENT.load(Ordering::Relaxed);
    PEAK.store(base, Ordering::Relaxed);
    let outcome = map_detailed(&net, &lib, &opts).expect("maps");
    let peak = PEAK.load(Ordering::Relaxed) - base;
    let kept = CURRENT.load(Ordering::Relaxed) - base;

    // Per-phase medians over several runs.
    let runs = 7;
    let mut phases: Vec<(String, Vec<f64>)> = Vec::new();
    let mut totals = Vec::new();
    let cpu_before = thread_cpu_seconds();
    for _ in 0..runs {
        let t = Instant::now();
        let o = map_detailed(&net, &lib, &opts).expect("maps");
        totals.push(t.elapsed().as_secs_f64());
        for (i, (phase, s)) in o.seconds.iter().enumerate() {
            if phases.len() <= i {
                phases.push((phase.clone(), Vec::new()));
            }
            phases[i].1.push(*s);
        }
    }
    let cpu_per_run = cpu_before
        .zip(thread_cpu_seconds())
        .map(|(a, b)| (b - a) / runs as f64);
    println!(
        "network: {nodes} nodes ({} gates); covered after balancing: {}",
        net.gate_count(),
        outcome.covered_nodes
    );
    println!("match table build (once per library): {table_seconds:.3} s");
    println!("per phase, median of {runs} runs:");
    for (phase, s) in phases {
        let s = median(s);
        if phase == "match" {
            println!("  {phase:<8} {s:>8.4} s  (table cached)");
            continue;
        }
        println!(
            "  {phase:<8} {s:>8.4} s  {:>12.0} nodes/s",
            nodes as f64 / s.max(1e-9)
        );
    }
    let total = median(totals);
    println!(
        "end to end (table cached), median: {total:.4} s, {:.0} nodes/s; {} cells; {} cuts",
        nodes as f64 / total,
        outcome.netlist.instances.len(),
        outcome.cuts
    );
    if let Some(cpu) = cpu_per_run {
        println!(
            "CPU time per mapping (mean of {runs}): {cpu:.4} s, {:.0} nodes per CPU-second \
             (wall-clock exceeds it when the machine is shared)",
            nodes as f64 / cpu.max(1e-9)
        );
    }
    println!(
        "peak heap of one mapping (balanced network, cuts, cover arrays, scratch and the \
         netlist being built; input network excluded): {peak} bytes, {:.1} bytes/node",
        peak as f64 / nodes as f64
    );
    println!(
        "  of which still held by the returned netlist: {:.1} bytes/node; cover state \
         (cuts and per-node arrays) at its peak: {:.1} bytes/node",
        kept as f64 / nodes as f64,
        outcome.cover_bytes as f64 / nodes as f64
    );
    println!(
        "input network: {:.1} bytes/node",
        net.memory_bytes() as f64 / nodes as f64
    );
    drop(outcome);

    let mut c = Criterion::default().sample_size(10).configure_from_args();
    let mut group = c.benchmark_group("map");
    group.throughput(Throughput::Elements(nodes as u64));
    group.bench_function("mult160 ribbon3 k4 c8", |b| {
        b.iter(|| map_detailed(&net, &lib, &opts).expect("maps"))
    });
    group.finish();
    c.final_summary();
}
