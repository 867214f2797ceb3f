//! Each phase of `map` after reading, on the 256 x 256 array multiplier
//! (about 261k nodes) and on a network of about one million nodes (the
//! 512 x 512 array multiplier): mapping (balance, cuts and cover, match
//! table cached), the linear-time proof from the mapper's witness, and the
//! switching-activity energy estimate at the default 16,384 patterns.
//!
//! Run `cargo bench --bench phases`; set `PHASES_SMALL=1` to bench only the
//! 256 x 256 multiplier. Criterion reports medians; throughput is in nodes
//! of the input network per second.

use criterion::{Criterion, Throughput};
use ribbonmap::generate::{generate, Family, Params};
use ribbonmap::library::Library;
use ribbonmap::mapper::{map_detailed, match_table, MapOptions};
use ribbonmap::proof::prove;
use ribbonmap::study::mapped_energy;
use ribbonmap::study::power::Stimulus;

fn main() {
    let lib = Library::builtin("ribbon3").expect("built-in ribbon3");
    let _ = match_table(&lib);
    let opts = MapOptions::default();
    let mut widths = vec![256];
    if std::env::var_os("PHASES_SMALL").is_none() {
        widths.push(512);
    }
    let mut c = Criterion::default().sample_size(10).configure_from_args();
    for width in widths {
        let net = generate(Family::Multiplier, &Params::new(width).with_style("array"))
            .expect("array multiplier of a supported width");
        let nodes = net.num_nodes() as u64;
        let outcome = map_detailed(&net, &lib, &opts).expect("maps");
        let mut group = c.benchmark_group(format!("mult{width} ({nodes} nodes)"));
        group.throughput(Throughput::Elements(nodes));
        group.bench_function("map (balance + cuts + cover)", |b| {
            b.iter(|| map_detailed(&net, &lib, &opts).expect("maps"))
        });
        group.bench_function("proof (witness)", |b| {
            b.iter(|| prove(&net, &outcome.netlist, &lib, &outcome.witness).expect("proven"))
        });
        group.bench_function("energy (16384 patterns)", |b| {
            b.iter(|| mapped_energy(&outcome.netlist, &lib, &Stimulus::default()).expect("energy"))
        });
        group.finish();
    }
    c.final_summary();
}
