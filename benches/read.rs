//! Reader throughput: a generated netlist of more than a million AND/XOR
//! nodes and the 256 x 256 multiplier of `generate` (default style), written with the
//! BLIF, Verilog and AIGER (ASCII and binary) writers, read back (parsing,
//! elaboration and structural hashing). Criterion reports bytes per second;
//! the bench also prints nodes per second and writes the BLIF text to
//! `target/read-bench-mesh.blif` so peak memory of `ribbonmap inspect` can be
//! measured on the same file.

use criterion::{criterion_group, criterion_main, Criterion, Throughput};
use ribbonmap::generate::{generate, Family, Params};
use ribbonmap::io::{
    read_netlist_bytes, write_aiger, write_blif, write_verilog, NetlistFormat, ReadOptions,
};
use ribbonmap::network::{Lit, Network, SplitMix64};
use std::time::Instant;

/// A mesh of `nodes` AND and XOR nodes over 1024 inputs: each node takes two
/// (possibly complemented) fanins from the previous 4096 literals, and every
/// 1000th node is an output.
fn mesh(nodes: usize) -> Network {
    let mut rng = SplitMix64::new(2024);
    let mut net = Network::new("mesh");
    let mut lits: Vec<Lit> = (0..1024)
        .map(|k| net.add_input(format!("x{k}")).unwrap())
        .collect();
    net.reserve(nodes);
    // Structural hashing may merge a new node with an old one, so count
    // the nodes actually created.
    while net.num_nodes() < nodes + 1025 {
        let window = lits.len().min(4096) as u64;
        let base = lits.len() - window as usize;
        // The newest literal as one fanin keeps every node in the cone of
        // the last output, so the whole mesh is read back.
        let a = lits[lits.len() - 1].xor(rng.next() & 1 == 1);
        let b = lits[base + rng.below(window) as usize].xor(rng.next() & 1 == 1);
        let g = if rng.below(3) == 0 {
            net.xor(a, b)
        } else {
            net.and(a, b)
        };
        lits.push(g);
    }
    for (k, l) in lits.iter().skip(1024).step_by(1000).enumerate() {
        net.add_output(format!("y{k}"), *l).unwrap();
    }
    // Keep the tail reachable too.
    net.add_output("last", *lits.last().unwrap()).unwrap();
    net
}

fn bench_read(c: &mut Criterion) {
    let mesh = mesh(1_000_000);
    let _ = std::fs::create_dir_all("target");
    let _ = std::fs::write("target/read-bench-mesh.blif", write_blif(&mesh));
    let multiplier = generate(
        Family::Multiplier,
        &Params {
            width: 256,
            style: None,
            carry_in: false,
        },
    )
    .expect("the 256 x 256 multiplier generates");
    // The mesh passes the default bound of 2^20 one-bit nets (docs/netlist-formats.md).
    let opts = ReadOptions {
        max_nets: Some(1 << 23),
        ..ReadOptions::default()
    };
    for (design, net) in [("mesh_1M", &mesh), ("multiplier_256", &multiplier)] {
        let files: [(&str, Vec<u8>, NetlistFormat); 4] = [
            ("blif", write_blif(net).into_bytes(), NetlistFormat::Blif),
            (
                "verilog",
                write_verilog(net).into_bytes(),
                NetlistFormat::Verilog,
            ),
            ("aag", write_aiger(net, false, None), NetlistFormat::Aag),
            ("aig", write_aiger(net, true, None), NetlistFormat::Aig),
        ];
        for (label, bytes, format) in files {
            // One timed read outside criterion for a nodes-per-second figure.
            let start = Instant::now();
            let back = read_netlist_bytes(&bytes, label, format, &opts).unwrap();
            let secs = start.elapsed().as_secs_f64();
            println!(
                "read {design} {label}: {} nodes, {:.1} MB in {secs:.3} s = {:.1} MB/s, {:.2} M nodes/s, {} MB network",
                back.num_nodes(),
                bytes.len() as f64 / 1e6,
                bytes.len() as f64 / 1e6 / secs,
                back.num_nodes() as f64 / 1e6 / secs,
                back.memory_bytes() / 1_000_000
            );
            let mut group = c.benchmark_group("read");
            group.sample_size(10);
            group.throughput(Throughput::Bytes(bytes.len() as u64));
            group.bench_function(format!("{label}_{design}"), |b| {
                b.iter(|| {
                    read_netlist_bytes(&bytes, label, format, &opts)
                        .unwrap()
                        .num_nodes()
                })
            });
            group.finish();
        }
    }
}

criterion_group!(benches, bench_read);
criterion_main!(benches);
