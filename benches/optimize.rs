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

/// One layout evaluation with the real merit (worst margin over three flight
/// states) at a spread of points, free and under side-force limits, and the whole
/// demo optimisation.
fn real_merit(c: &mut Criterion) {
    use portwright::allocation::SideForceLimit;
    use portwright::analysis::score::MarginScore;
    let design = demo();
    let analysis = portwright::analysis::analyze(&design).expect("demo analyses");
    let mut g = c.benchmark_group("merit");
    g.throughput(Throughput::Elements(1));
    for (name, side) in [
        ("no side-force limit", SideForceLimit::Free),
        (
            "side force within 0.5 N",
            SideForceLimit::Bounded { limit_n: 0.5 },
        ),
        ("pure couples", SideForceLimit::PureCouple),
    ] {
        let scorer = MarginScore::new(&design, &analysis, &[])
            .expect("scorer")
            .with_side_force(side);
        let problem =
            LayoutProblem::new(&design, &freedoms(), Limits::default(), scorer).expect("problem");
        // Feasible points spread through the cube, so warm starts see real changes.
        let mut points = Vec::new();
        let d = problem.dimension();
        let mut scratch = problem.scratch();
        let mut k = 0u64;
        while points.len() < 64 && k < 100_000 {
            k += 1;
            let x: Vec<f64> = (0..d)
                .map(|i| ((k * 2_654_435_761 + i as u64 * 40_503) % 1000) as f64 / 999.0)
                .collect();
            if problem.evaluate(&x, &mut scratch).is_feasible() {
                points.push(x);
            }
        }
        assert!(!points.is_empty(), "feasible points found");
        let mut i = 0;
        g.bench_function(
            format!("evaluate, eight ports, three states, {name}"),
            |b| {
                b.iter(|| {
                    i = (i + 1) % points.len();
                    problem.evaluate(black_box(&points[i]), &mut scratch)
                })
            },
        );
    }
    g.finish();

    let mut g = c.benchmark_group("demo");
    g.sample_size(10);
    let stop = AtomicBool::new(false);
    let text = include_str!("../layouts/heron-54.toml");
    let sections = portwright::layout::parse_layout(text, "heron-54.toml")
        .expect("demo layout")
        .optimizer;
    let settings = SearchSettings::default();
    g.bench_function("optimize Heron 54, 20000 evaluations, worst margin", |b| {
        b.iter(|| {
            let scorer = MarginScore::new(&design, &analysis, &[]).expect("scorer");
            portwright::optimize::optimize(
                &design,
                &sections.freedoms,
                sections.limits,
                scorer,
                &settings,
                &stop,
                &mut |_| {},
            )
            .expect("optimises")
        })
    });
    g.finish();
}

criterion_group!(benches, constraints, search_loop, real_merit);
criterion_main!(benches);
