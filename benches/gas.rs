//! Gas properties: one state from the GERG-2008 equation at pressure and temperature (a
//! supercritical gas and a CO2 vapour that needs both roots compared), one CO2 saturation, and
//! whole blowdowns (nitrogen single-phase, CO2 two-phase, argon that condenses).

use criterion::{criterion_group, criterion_main, Criterion};
use portwright::gas::eos;
use portwright::gas::tank::{usable_gas, TankFill};
use portwright::gas::Gas;
use std::hint::black_box;

fn gas(c: &mut Criterion) {
    let mut g = c.benchmark_group("gas");
    g.bench_function("state nitrogen 200 bar 300 K", |b| {
        b.iter(|| eos::state_tp(Gas::Nitrogen, black_box(200e5), black_box(300.0)))
    });
    g.bench_function("state co2 vapour 40 bar 280 K", |b| {
        b.iter(|| eos::state_tp(Gas::CarbonDioxide, black_box(40e5), black_box(280.0)))
    });
    g.bench_function("saturation co2 280 K", |b| {
        b.iter(|| eos::saturation(Gas::CarbonDioxide, black_box(280.0)))
    });
    g.sample_size(20);
    g.bench_function("blowdown nitrogen 1 L 300 to 20 bar", |b| {
        let fill = TankFill::by_pressure(Gas::Nitrogen, 1e-3, 300e5, 300.0);
        b.iter(|| usable_gas(black_box(&fill), 20e5))
    });
    g.bench_function("blowdown co2 0.5 L 0.6 kg/L to 20 bar", |b| {
        let fill = TankFill::by_fill_ratio(Gas::CarbonDioxide, 0.5e-3, 0.6, 293.15);
        b.iter(|| usable_gas(black_box(&fill), 20e5))
    });
    g.bench_function("blowdown argon 1 L 300 to 20 bar (condenses)", |b| {
        let fill = TankFill::by_pressure(Gas::Argon, 1e-3, 300e5, 300.0);
        b.iter(|| usable_gas(black_box(&fill), 20e5))
    });
    g.finish();
}

criterion_group!(benches, gas);
criterion_main!(benches);
