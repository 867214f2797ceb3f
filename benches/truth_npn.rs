//! Speed of NPN canonisation: a table read up to four inputs, an exhaustive
//! search for five and six.

use criterion::{criterion_group, criterion_main, Criterion};
use ribbonmap::library::Library;
use ribbonmap::network::SplitMix64;
use ribbonmap::truth::{npn_canon, parse_expression};
use std::hint::black_box;

fn bench(c: &mut Criterion) {
    let mut rng = SplitMix64::new(1);
    let four: Vec<u64> = (0..1024).map(|_| rng.next() & 0xFFFF).collect();
    let six: Vec<u64> = (0..16).map(|_| rng.next()).collect();
    let _ = npn_canon(0, 4); // build the table outside the measurement
    c.bench_function("npn_canon 4 inputs (table), 1024 functions", |b| {
        b.iter(|| {
            four.iter()
                .map(|&f| npn_canon(black_box(f), 4).0)
                .fold(0, u64::wrapping_add)
        })
    });
    c.bench_function("npn_canon 6 inputs (search), 1 function", |b| {
        let mut i = 0;
        b.iter(|| {
            i = (i + 1) % six.len();
            npn_canon(black_box(six[i]), 6).0
        })
    });
    c.bench_function("parse expression", |b| {
        b.iter(|| {
            parse_expression(
                black_box("!(a & b) ^ maj(a, c, ~d) | e"),
                &["a", "b", "c", "d", "e"],
            )
        })
    });
    c.bench_function("load ribbon3", |b| {
        b.iter(|| Library::builtin(black_box("ribbon3")))
    });
}

criterion_group!(benches, bench);
criterion_main!(benches);
