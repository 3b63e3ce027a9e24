//! Speed of the allocation engine: minimum-gas allocation for 8 ports, the exact
//! envelope with facets for 16 ports, the `good_lp` model-per-call reference, the
//! region-map lookup, the on/off valve-set search, and a 33×33×33 grid of
//! commands over both cores.

use criterion::{criterion_group, criterion_main, Criterion};
use nalgebra::Vector3;
use portwright::allocation::{
    lp, Allocation, Effectiveness, MinGasAllocator, OnOffOptions, OnOffPlan, PortGeometry,
    RegionMap, SideForceLimit, Tolerances, Zonotope,
};
use std::hint::black_box;
use std::time::Duration;

/// SplitMix64, so every run measures the same layouts.
struct Rng(u64);

impl Rng {
    fn next(&mut self) -> f64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        ((z ^ (z >> 31)) >> 11) as f64 / (1u64 << 53) as f64
    }
}

/// Ports on a 54 mm tube in two rings, 0.45 m aft and 0.35 m forward of the CG,
/// canted tangentially by ±30° (alternating) so the set spans roll, pitch and yaw.
fn ring_layout(n: usize) -> Effectiveness {
    let mut rng = Rng(17);
    let ports: Vec<PortGeometry> = (0..n)
        .map(|k| {
            let clock = std::f64::consts::TAU * k as f64 / (n / 2) as f64 + 0.1 * rng.next();
            let x = if k < n / 2 { -0.45 } else { 0.35 };
            let c = Vector3::new(0.0, clock.cos(), clock.sin());
            let t = Vector3::x().cross(&c);
            let cant = if k % 2 == 0 { 0.5 } else { -0.5 };
            let dir = (-c * f64::cos(cant) + t * f64::sin(cant)).normalize();
            let thrust = 1.0 + 0.2 * rng.next();
            PortGeometry {
                name: format!("p{k}"),
                position_m: Vector3::new(x, 0.027 * clock.cos(), 0.027 * clock.sin()),
                direction: dir,
                thrust_n: thrust,
                mass_flow_kg_s: thrust / (50.0 * 9.806_65),
            }
        })
        .collect();
    Effectiveness::from_ports(&ports).expect("valid layout")
}

/// Commands B·u·k for random u in the unit cube and k in [lo, hi): inside the
/// envelope for hi ≤ 1, mostly out of reach for lo ≥ 2.
fn commands(e: &Effectiveness, count: usize, lo: f64, hi: f64) -> Vec<Vector3<f64>> {
    let mut rng = Rng(5);
    (0..count)
        .map(|_| {
            let u: Vec<f64> = (0..e.len()).map(|_| rng.next()).collect();
            e.torque_for(&u) * (lo + (hi - lo) * rng.next())
        })
        .collect()
}

fn bench(c: &mut Criterion) {
    let tol = Tolerances::default();
    let e8 = ring_layout(8);
    let cmds = commands(&e8, 256, 0.0, 1.0);
    let far = commands(&e8, 256, 2.0, 4.0);

    let mut group = c.benchmark_group("allocation");
    group
        .warm_up_time(Duration::from_secs(1))
        .measurement_time(Duration::from_secs(3));

    let mut alloc = MinGasAllocator::new(&e8, SideForceLimit::Free, &tol).expect("setup");
    let mut out = Allocation::with_ports(8);
    let mut i = 0;
    group.bench_function("min_gas_8_ports", |b| {
        b.iter(|| {
            i = (i + 1) % cmds.len();
            alloc
                .allocate_into(black_box(&cmds[i]), &mut out)
                .expect("solves");
            black_box(out.gas_rate_kg_s)
        })
    });

    group.bench_function("min_gas_8_ports_saturated", |b| {
        b.iter(|| {
            i = (i + 1) % far.len();
            alloc
                .allocate_into(black_box(&far[i]), &mut out)
                .expect("solves");
            black_box(out.gas_rate_kg_s)
        })
    });

    // Commands 1e12 times outside the envelope: no simplex solve is needed to know
    // they are out of reach, only the scale search along their direction.
    let huge: Vec<_> = far.iter().map(|t| t * 1e12).collect();
    group.bench_function("min_gas_8_ports_1e12_outside", |b| {
        b.iter(|| {
            i = (i + 1) % huge.len();
            alloc
                .allocate_into(black_box(&huge[i]), &mut out)
                .expect("solves");
            black_box(out.scale)
        })
    });

    let mut alloc = MinGasAllocator::new(&e8, SideForceLimit::PureCouple, &tol).expect("setup");
    group.bench_function("min_gas_8_ports_pure_couple", |b| {
        b.iter(|| {
            i = (i + 1) % cmds.len();
            alloc
                .allocate_into(black_box(&cmds[i]), &mut out)
                .expect("solves");
            black_box(out.gas_rate_kg_s)
        })
    });

    group.bench_function("good_lp_model_per_call_8_ports", |b| {
        b.iter(|| {
            i = (i + 1) % cmds.len();
            lp::reference_min_gas(&e8, black_box(&cmds[i]), SideForceLimit::Free, &tol)
                .expect("solves")
                .gas_rate_kg_s
        })
    });

    let map = RegionMap::new(&e8, &tol).expect("builds");
    group.bench_function("region_map_8_ports", |b| {
        b.iter(|| {
            i = (i + 1) % cmds.len();
            map.evaluate_into(black_box(&cmds[i]), &mut out)
                .expect("covered");
            black_box(out.gas_rate_kg_s)
        })
    });

    // The 26 on/off rows of an 8-port layout by exact enumeration (255 sets), with
    // a supply droop of 3 % per extra open valve.
    let droop = |k: usize| 1.0 / (1.0 + 0.03 * (k as f64 - 1.0));
    group.bench_function("onoff_plan_8_ports", |b| {
        b.iter(|| {
            let plan = OnOffPlan::new(black_box(&e8), &OnOffOptions::default(), &droop, &tol)
                .expect("plans");
            black_box(plan.entries.len())
        })
    });

    let e16 = ring_layout(16);
    group.bench_function("onoff_plan_16_ports", |b| {
        b.iter(|| {
            let plan = OnOffPlan::new(black_box(&e16), &OnOffOptions::default(), &droop, &tol)
                .expect("plans");
            black_box(plan.entries.len())
        })
    });

    group.bench_function("envelope_with_facets_16_ports", |b| {
        b.iter(|| {
            let z = Zonotope::torque(black_box(&e16), &tol).expect("builds");
            black_box((z.facets().len(), z.volume(), z.axis_limits()))
        })
    });
    group.finish();

    // 33 × 33 × 33 commands spanning the bounding box of the 8-port envelope.
    let z = Zonotope::torque(&e8, &tol).expect("builds");
    let half = Vector3::new(
        z.support(&Vector3::x()),
        z.support(&Vector3::y()),
        z.support(&Vector3::z()),
    );
    let step = |k: usize| -1.0 + 2.0 * k as f64 / 32.0;
    let mut grid = Vec::with_capacity(33 * 33 * 33);
    for a in 0..33 {
        for b in 0..33 {
            for c in 0..33 {
                grid.push(Vector3::new(
                    half.x * step(a),
                    half.y * step(b),
                    half.z * step(c),
                ));
            }
        }
    }
    let alloc = MinGasAllocator::new(&e8, SideForceLimit::Free, &tol).expect("setup");
    let mut group = c.benchmark_group("allocation_grid");
    group
        .sample_size(10)
        .warm_up_time(Duration::from_secs(1))
        .measurement_time(Duration::from_secs(5));
    group.bench_function("grid_33_cubed_8_ports", |b| {
        b.iter(|| {
            let results = alloc.allocate_many(black_box(&grid));
            black_box(results.iter().filter(|r| r.is_ok()).count())
        })
    });
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
