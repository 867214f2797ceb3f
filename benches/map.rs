//! Mapping speed and memory on a network of more than 100k nodes: a 160 x 160
//! array multiplier built from AND, XOR and majority, mapped onto the
//! built-in ribbon3 library at k = 4, C = 8. Prints nodes per second per
//! phase and the peak heap bytes per node (measured by a counting
//! allocator), then runs a criterion measurement of the whole mapping.

use criterion::Criterion;
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

unsafe impl GlobalAlloc for Counting {
    unsafe fn alloc(&self, layout: Layout) -> *mut u8 {
        let p = unsafe { System.alloc(layout) };
        if !p.is_null() {
            let now = CURRENT.fetch_add(layout.size(), Ordering::Relaxed) + layout.size();
            PEAK.fetch_max(now, Ordering::Relaxed);
        }
        p
    }
    unsafe fn dealloc(&self, ptr: *mut u8, layout: Layout) {
        unsafe { System.dealloc(ptr, layout) };
        CURRENT.fetch_sub(layout.size(), Ordering::Relaxed);
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

fn main() {
    let lib = Library::builtin("ribbon3").expect("built-in ribbon3");
    let t = Instant::now();
    let _ = match_table(&lib);
    let table_seconds = t.elapsed().as_secs_f64();
    let net = multiplier(160);
    let nodes = net.num_nodes();
    let opts = MapOptions::default();
    let base = CURRENT.load(Ordering::Relaxed);
    PEAK.store(base, Ordering::Relaxed);
    let t = Instant::now();
    let outcome = map_detailed(&net, &lib, &opts).expect("maps");
    let total = t.elapsed().as_secs_f64();
    let peak = PEAK.load(Ordering::Relaxed) - base;
    println!("network: {nodes} nodes ({} gates)", net.gate_count());
    println!("match table build (once per library): {table_seconds:.3} s");
    for (phase, s) in &outcome.seconds {
        println!(
            "  {phase:<8} {s:>8.4} s  {:>12.0} nodes/s",
            nodes as f64 / s.max(1e-9)
        );
    }
    println!(
        "end to end (table cached): {total:.3} s, {:.0} nodes/s; {} cells; {} cuts",
        nodes as f64 / total,
        outcome.netlist.instances.len(),
        outcome.cuts
    );
    println!(
        "peak heap during mapping (input network excluded): {} bytes, {:.1} bytes/node",
        peak,
        peak as f64 / nodes as f64
    );
    println!(
        "input network: {:.1} bytes/node",
        net.memory_bytes() as f64 / nodes as f64
    );

    let mut c = Criterion::default().sample_size(10).configure_from_args();
    c.bench_function("map mult160 ribbon3 k4 c8", |b| {
        b.iter(|| map_detailed(&net, &lib, &opts).expect("maps"))
    });
    c.final_summary();
}
