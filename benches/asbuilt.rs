//! Speed of the as-built work on Heron (8 ports, 3 flight states, every
//! tolerance of its `[tolerances]` section): 10 000 sampled vehicles in
//! parallel (authority, margins, cross-coupling, on/off checks), one robust
//! candidate score of 64 samples on one core, and a whole robust search on
//! the cant-trade demo with both cores.

use criterion::{black_box, criterion_group, criterion_main, Criterion, Throughput};
use portwright::analysis::score::{MarginScore, Objective};
use portwright::asbuilt::report::{sample, SpreadSettings};
use portwright::asbuilt::robust::RobustMargins;
use portwright::optimize::{optimize, LayoutScore, SearchSettings};
use std::sync::atomic::AtomicBool;
use std::sync::Arc;

const HERON: &str = include_str!("../layouts/heron-54.toml");
const TRADE: &str = include_str!("../layouts/heron-54-cant-trade.toml");

fn setup(
    text: &str,
) -> (
    portwright::model::Design,
    portwright::analysis::Analysis,
    portwright::asbuilt::spec::ToleranceSpec,
) {
    let d = portwright::layout::parse_str(text, "demo.toml").expect("demo parses");
    let a = portwright::analysis::analyze(&d).expect("demo analyses");
    let s = portwright::layout::asbuilt::read(text, &d)
        .expect("sections read")
        .tolerances
        .expect("demo has tolerances");
    (d, a, s)
}

fn bench(c: &mut Criterion) {
    let (d, a, spec) = setup(HERON);
    let run = sample(&d, &a, &spec, &SpreadSettings::default()).expect("samples");
    let mut g = c.benchmark_group("as built");
    g.sample_size(10);
    g.throughput(Throughput::Elements(10_000));
    g.bench_function(
        "10000 sampled vehicles, 8 ports, 3 states, both cores",
        |b| {
            b.iter(|| {
                black_box(portwright::asbuilt::sampling::run(
                    &run.basis,
                    &run.checks,
                    10_000,
                    1,
                ))
            })
        },
    );
    g.finish();

    let robust = Arc::new(RobustMargins::new(&d, &a, &spec, 64, 1).expect("draws"));
    let score = MarginScore::new(&d, &a, &[])
        .expect("merit")
        .with_objective(Objective::parse("margin@p5").expect("objective"))
        .with_spread(robust);
    let mut w = score.new_scratch();
    let mut g = c.benchmark_group("robust objective");
    g.throughput(Throughput::Elements(1));
    g.bench_function("one candidate, 64 samples, one core", |b| {
        b.iter(|| black_box(score.score(black_box(&d.ports), &mut w)))
    });
    g.finish();

    let (d, a, spec) = setup(TRADE);
    let sections = portwright::layout::parse_layout(TRADE, "trade.toml")
        .expect("layout")
        .optimizer;
    let robust = Arc::new(RobustMargins::new(&d, &a, &spec, 64, 1).expect("draws"));
    let score = MarginScore::new(&d, &a, &[])
        .expect("merit")
        .with_objective(Objective::parse("margin@p5").expect("objective"))
        .with_spread(robust);
    let mut g = c.benchmark_group("robust search");
    g.sample_size(10);
    g.throughput(Throughput::Elements(2000));
    g.bench_function("2000 candidates, 64 samples each, both cores", |b| {
        b.iter(|| {
            let settings = SearchSettings {
                max_evaluations: 2000,
                ..SearchSettings::default()
            };
            black_box(
                optimize(
                    &d,
                    &sections.freedoms,
                    sections.limits,
                    score.clone(),
                    &settings,
                    &AtomicBool::new(false),
                    &mut |_| {},
                )
                .expect("search"),
            )
        })
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
