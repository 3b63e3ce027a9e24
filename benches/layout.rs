//! Reading a layout: the whole check of a demo file (TOML, every section, the
//! optimiser's sections against the design, text-length bounds), and the cost
//! of refusing a file with a very long name.

use criterion::{criterion_group, criterion_main, Criterion};
use std::hint::black_box;

fn layouts(c: &mut Criterion) {
    let heron = include_str!("../layouts/heron-54.toml");
    let osprey = include_str!("../layouts/osprey-98.toml");
    let mut g = c.benchmark_group("layout");
    g.bench_function("read and check Heron 54", |b| {
        b.iter(|| portwright::layout::parse_layout(black_box(heron), "heron-54.toml"))
    });
    g.bench_function("read and check Osprey 98", |b| {
        b.iter(|| portwright::layout::parse_layout(black_box(osprey), "osprey-98.toml"))
    });
    let long = heron.replacen(
        "name = \"Heron 54 (demo)\"",
        &format!("name = \"{}\"", "n".repeat(1 << 20)),
        1,
    );
    g.sample_size(20);
    g.bench_function("refuse a 1 MiB name", |b| {
        b.iter(|| portwright::layout::parse_layout(black_box(&long), "long.toml"))
    });
    g.finish();
}

criterion_group!(benches, layouts);
criterion_main!(benches);
