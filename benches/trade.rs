//! The trade study: one combination through the full analysis, and a study of
//! 10 000 combinations of the Heron 54 demo (8 ports, 3 flight states) on every
//! core rayon finds.

use criterion::{criterion_group, criterion_main, Criterion};
use portwright::trade::catalogue::{Catalogue, HoleGroup, RegulatorPart, TankPart, ValvePart};
use portwright::trade::{evaluate, study, Choice, StudySettings};
use std::hint::black_box;

const HERON: &str = include_str!("../layouts/heron-54.toml");
const PARTS: &str = include_str!("../layouts/parts-demo.toml");

fn demo() -> (portwright::model::Design, Catalogue) {
    let design = portwright::layout::parse_str(HERON, "heron-54.toml").expect("demo reads");
    let placement = portwright::layout::parts::section(HERON, &design)
        .expect("[parts] reads")
        .expect("[parts] present")
        .placement;
    let cat = portwright::layout::parts::parse_str(PARTS, "parts-demo.toml", &design, placement)
        .expect("parts read");
    (design, cat)
}

/// 10 valves × 5 regulators × 4 set pressures × 5 tanks × 5 × 2 hole sizes =
/// 10 000 combinations, all of them passing the rules, so each one runs the
/// full analysis.
fn ten_thousand(cat: &Catalogue) -> Catalogue {
    let mut c = cat.clone();
    let v0: ValvePart = cat.valves[1].clone();
    c.valves = (0..10)
        .map(|k| ValvePart {
            name: format!("V{k}"),
            cv: 0.02 + 0.01 * k as f64,
            rated_pressure_pa: 3.5e6,
            mass_kg: 0.015 + 0.004 * k as f64,
            price: 20.0 + 4.0 * k as f64,
            ..v0.clone()
        })
        .collect();
    let r0: RegulatorPart = cat.regulators[1].clone();
    c.regulators = (0..5)
        .map(|k| RegulatorPart {
            name: format!("R{k}"),
            supply: portwright::model::SupplyCapacity::Cv {
                cv: 0.2 + 0.15 * k as f64,
                xt: 0.7,
            },
            mass_kg: 0.08 + 0.03 * k as f64,
            price: 100.0 + 30.0 * k as f64,
            ..r0.clone()
        })
        .collect();
    c.set_pressures_gauge_pa = vec![0.62e6, 0.83e6, 1.03e6, 1.24e6];
    let t0: TankPart = cat.tanks[0].clone();
    c.tanks = (0..5)
        .map(|k| TankPart {
            name: format!("T{k}"),
            volume_m3: (10.0 + 3.0 * k as f64) * 16.387_064e-6,
            empty_mass_kg: 0.3 + 0.06 * k as f64,
            length_m: 0.15 + 0.03 * k as f64,
            ..t0.clone()
        })
        .collect();
    c.holes = vec![
        HoleGroup {
            diameters_m: vec![1.2e-3, 1.4e-3, 1.6e-3, 1.8e-3, 2.0e-3],
            ..cat.holes[0].clone()
        },
        HoleGroup {
            diameters_m: vec![1.2e-3, 1.5e-3],
            ..cat.holes[1].clone()
        },
    ];
    c
}

fn trade(c: &mut Criterion) {
    let (design, cat) = demo();
    let mut g = c.benchmark_group("trade");
    let choice = Choice::from_index(&cat, 0);
    g.bench_function("one combination, full analysis (Heron 54)", |b| {
        b.iter(|| evaluate::evaluate(black_box(&design), &cat, &choice, None))
    });
    let d = portwright::trade::combine::apply(&design, &cat, &choice);
    g.bench_function("piece: gas budget", |b| {
        b.iter(|| portwright::analysis::feed::gas_budget(black_box(&d)))
    });
    g.bench_function("piece: ports at one state", |b| {
        b.iter(|| portwright::analysis::feed::ports_at(black_box(&d), "liftoff", 101_325.0))
    });
    let a = portwright::analysis::analyze(&d).expect("analyses");
    g.bench_function("piece: manoeuvre plan", |b| {
        b.iter(|| portwright::analysis::manoeuvre::plan(black_box(&d), &a.gas, &a.states))
    });
    g.bench_function("piece: findings", |b| {
        b.iter(|| portwright::analysis::findings::findings(black_box(&d), &a.gas, &a.states))
    });
    let st = &a.states[0];
    g.bench_function("piece: zonotope", |b| {
        b.iter(|| {
            let e = portwright::analysis::effectiveness(&d, &st.mass, &st.ports).expect("e");
            portwright::allocation::zonotope::Zonotope::torque(&e, &Default::default())
        })
    });
    let big = ten_thousand(&cat);
    assert_eq!(big.combinations(), 10_000);
    // Every combination passes the rules, so the study below analyses all of them.
    for i in 0..big.combinations() {
        let ch = Choice::from_index(&big, i);
        let d = portwright::trade::combine::apply(&design, &big, &ch);
        let p = evaluate::pressures(&d).expect("pressures");
        assert!(portwright::trade::rules::check(&d, &big, &ch, &p).is_empty());
    }
    g.sample_size(10);
    g.bench_function("10 000 combinations, Heron 54, 8 ports, 3 states", |b| {
        b.iter(|| study::run(black_box(&design), &big, &StudySettings::default(), None))
    });
    g.finish();
}

criterion_group!(benches, trade);
criterion_main!(benches);
