//! Speed of the optimiser's own work: the constraint check of an eight-port
//! layout, one whole layout evaluation with a trivial merit (point written into
//! the ports, rules checked), and the search loop's overhead per evaluation with
//! a trivial objective. Throughput is reported in evaluations per second.

use criterion::{black_box, criterion_group, criterion_main, Criterion, Throughput};
use portwright::model::Port;
use portwright::optimize::{
    search, Constraints, Freedom, LayoutProblem, LayoutScore, Limits, Objective, Score,
    SearchSettings, Span, Together,
};
use std::sync::atomic::AtomicBool;

fn demo() -> portwright::model::Design {
    portwright::layout::parse_str(include_str!("../layouts/heron-54.toml"), "heron-54.toml")
        .expect("demo parses")
}

/// A merit that costs nothing, so only the optimiser's work is timed.
struct Nothing;
impl LayoutScore for Nothing {
    type Scratch = ();
    fn scratch(&self) {}
    fn score(&self, ports: &[Port], _: &mut ()) -> f64 {
        ports[0].station_m
    }
}

/// Sum of coordinates: the cheapest objective there is.
struct Sum(usize);
impl Objective for Sum {
    type Scratch = ();
    fn dimension(&self) -> usize {
        self.0
    }
    fn scratch(&self) {}
    fn evaluate(&self, x: &[f64], _: &mut ()) -> Score {
        Score::feasible(x.iter().sum())
    }
}

fn freedoms() -> Vec<Freedom> {
    let deg = f64::to_radians;
    let mut pitch = Freedom::new(
        &["yaw-neg", "pitch-pos", "yaw-pos", "pitch-neg"],
        Together::Ring,
    );
    pitch.station_m = Some(Span::new(0.25, 0.58));
    pitch.clock_rad = Some(Span::new(0.0, deg(90.0)));
    let mut roll_pos = Freedom::new(&["roll-pos-a", "roll-pos-b"], Together::Mirror);
    roll_pos.station_m = Some(Span::new(0.65, 0.9));
    roll_pos.clock_rad = Some(Span::new(deg(20.0), deg(70.0)));
    roll_pos.tangential_cant_rad = Some(Span::new(deg(30.0), deg(60.0)));
    let mut roll_neg = Freedom::new(&["roll-neg-a", "roll-neg-b"], Together::Mirror);
    roll_neg.station_m = Some(Span::new(0.65, 0.9));
    roll_neg.clock_rad = Some(Span::new(deg(110.0), deg(160.0)));
    roll_neg.tangential_cant_rad = Some(Span::new(deg(-60.0), deg(-30.0)));
    vec![pitch, roll_pos, roll_neg]
}

fn constraints(c: &mut Criterion) {
    let design = demo();
    let rules = Constraints::new(&design.airframe, Limits::default()).expect("default limits");
    let mut g = c.benchmark_group("constraints");
    g.throughput(Throughput::Elements(1));
    g.bench_function("penalty, eight ports", |b| {
        b.iter(|| rules.penalty(black_box(&design.ports)))
    });
    g.finish();

    let problem =
        LayoutProblem::new(&design, &freedoms(), Limits::default(), Nothing).expect("problem");
    let x = problem.start();
    let mut scratch = problem.scratch();
    let mut g = c.benchmark_group("layout");
    g.throughput(Throughput::Elements(1));
    g.bench_function("evaluate, eight ports, trivial merit", |b| {
        b.iter(|| problem.evaluate(black_box(&x), &mut scratch))
    });
    g.finish();
}

fn search_loop(c: &mut Criterion) {
    const EVALS: usize = 20_000;
    let settings = SearchSettings {
        max_evaluations: EVALS,
        ..SearchSettings::default()
    };
    let stop = AtomicBool::new(false);
    let mut g = c.benchmark_group("search");
    g.sample_size(20);
    g.throughput(Throughput::Elements(EVALS as u64));
    let objective = Sum(12);
    g.bench_function("overhead, 12 coordinates, 20000 evaluations", |b| {
        b.iter(|| search(&objective, &[], &settings, &stop, &mut |_| {}).expect("search"))
    });
    let design = demo();
    let problem =
        LayoutProblem::new(&design, &freedoms(), Limits::default(), Nothing).expect("problem");
    let start = problem.start();
    g.bench_function(
        "layout, eight ports, trivial merit, 20000 evaluations",
        |b| {
            b.iter(|| {
                search(
                    &problem,
                    std::slice::from_ref(&start),
                    &settings,
                    &stop,
                    &mut |_| {},
                )
                .expect("search")
            })
        },
    );
    g.finish();
}

criterion_group!(benches, constraints, search_loop);
criterion_main!(benches);
