//! Speed of the simulation on Heron (8 ports, nitrogen tank on the real-gas
//! model): 60 s of coast hold at a 1 kHz control rate on one core (no time series
//! kept), and 1000 Monte Carlo runs of the same case on the machine's cores.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use portwright::sim::montecarlo::monte_carlo;
use portwright::sim::run::{run, Draw};
use portwright::sim::{Plant, Settings};

const HERON: &str = include_str!("../layouts/heron-54.toml");

fn plant() -> Plant {
    let d = portwright::layout::parse_str(HERON, "heron-54.toml").expect("demo parses");
    let a = portwright::analysis::analyze(&d).expect("demo analyses");
    let mut cases =
        portwright::layout::case_sections(HERON, "heron-54.toml", &d).expect("cases read");
    let mut case = cases.remove(0);
    assert_eq!(case.sensing.control_period_s, 1e-3);
    case.duration_s = 60.0;
    Plant::new(&d, &a, &case).expect("plant")
}

fn bench(c: &mut Criterion) {
    let p = plant();
    let settings = Settings {
        record_series: false,
        ..Settings::default()
    };
    let draw = Draw::nominal(p.port_names().len(), 1);
    let mut g = c.benchmark_group("simulate");
    g.sample_size(10);
    g.bench_function(
        "60 s hold at 1 kHz, 8 ports, real-gas tank, one core",
        |b| b.iter(|| black_box(run(&p, &draw, &settings))),
    );
    g.bench_function("1000 Monte Carlo runs of 60 s, all cores", |b| {
        b.iter(|| black_box(monte_carlo(&p, 1000, 7)))
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
