//! The on/off rows of the demo layouts' firmware tables, in every flight state,
//! against a brute-force enumeration of all valve sets written here from the
//! rule in the README (not from the library's search), and the mirror symmetry
//! of their roll pairs: one port of a mirrored roll pair gives exactly half the
//! best roll torque, the default fraction, so rounding must not decide the rows.

use nalgebra::Vector3;
use portwright::allocation::{Effectiveness, OnOffOptions, Tolerances};
use portwright::export::bundle::state_tables;
use portwright::export::firmware::{onoff_row, OnOffOutcome};
use std::path::Path;

/// Least gas and valve count over all qualifying sets, per command; `None`
/// when no set qualifies. Torques are summed from scratch in reverse port order.
fn brute_force(
    e: &Effectiveness,
    o: &OnOffOptions,
    factor: &dyn Fn(usize) -> f64,
    c: [i8; 3],
) -> Option<(f64, usize)> {
    let tol = Tolerances::default();
    let (eps, n) = (tol.onoff_share, e.len());
    let sets: Vec<(Vector3<f64>, f64, usize)> = (1u32..(1 << n))
        .map(|mask| {
            let k = mask.count_ones() as usize;
            let mut t = Vector3::zeros();
            let mut gas = 0.0;
            for i in (0..n).rev().filter(|i| mask >> i & 1 == 1) {
                t += e.torque().column(i) * factor(k);
                gas += e.mass_flow_kg_s()[i] * factor(k);
            }
            (t, gas, k)
        })
        .collect();
    let best = |a: usize, sign: f64| sets.iter().map(|s| sign * s.0[a]).fold(0.0, f64::max);
    let pos = Vector3::from_fn(|a, _| best(a, 1.0));
    let neg = Vector3::from_fn(|a, _| best(a, -1.0));
    let noise = tol.onoff_noise * pos.sup(&neg).max();
    let ok = |t: &Vector3<f64>| {
        (0..3).all(|a| match c[a] {
            0 => t[a].abs() <= (o.tolerance + eps) * pos[a].max(neg[a]) + noise,
            1 => t[a] >= ((o.fraction - eps) * pos[a]).max(noise),
            _ => -t[a] >= ((o.fraction - eps) * neg[a]).max(noise),
        })
    };
    sets.iter()
        .filter(|s| ok(&s.0))
        .map(|s| (s.1, s.2))
        .fold(None, |acc, s| match acc {
            Some(b) if b.0 < s.0 * (1.0 - eps) => Some(b),
            Some(b) if b.0 <= s.0 * (1.0 + eps) && b.1 <= s.1 => Some(b),
            _ => Some(s),
        })
}

fn demo_text(file: &str) -> String {
    let path = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("layouts")
        .join(file);
    std::fs::read_to_string(path).expect("demo reads")
}

fn check_layout(file: &str) {
    check_text(&demo_text(file), file, &[(0, 0), (1, 0), (0, 1), (-1, -1)]);
}

/// Checks every row against brute force, and that ±roll rows with the pitch and
/// yaw commands in `mirrored` open as many valves and use the same gas.
fn check_text(text: &str, file: &str, mirrored: &[(i8, i8)]) {
    let design = portwright::layout::parse_str(text, file).expect("layout reads");
    let analysis = portwright::analysis::analyze(&design).expect("demo analyses");
    let o = OnOffOptions::default();
    for st in &analysis.states {
        let t = state_tables(&design, st, &o, None).expect("tables build");
        let e = portwright::analysis::effectiveness(&design, &st.mass, &st.ports)
            .expect("effectiveness");
        // The same droop the tables use: thrust with k valves open relative to one.
        let droop: Vec<f64> = st
            .droop
            .iter()
            .map(|d| 1.0 - d.thrust_drop_fraction)
            .collect();
        let factor = |k: usize| droop.get(k - 1).copied().unwrap_or(1.0);
        for row in &t.onoff {
            if row.outcome == OnOffOutcome::AllOff {
                continue;
            }
            let what = format!("{file} state {} command {:?}", st.name, row.command);
            match (row.outcome, brute_force(&e, &o, &factor, row.command)) {
                (OnOffOutcome::Meets, Some((gas, k))) => {
                    // Sums of the same few flows: 1e-12 relative.
                    let rel = (row.gas_rate_kg_s - gas).abs() / gas;
                    assert!(rel <= 1e-12, "{what}: {} against {gas}", row.gas_rate_kg_s);
                    assert_eq!(row.mask.count_ones() as usize, k, "{what}");
                }
                (OnOffOutcome::NearMiss { .. }, None) => {}
                (got, want) => panic!("{what}: {got:?} against {want:?}"),
            }
        }
        // The ±roll pairs are mirror images: their rows open as many valves and
        // use the same gas (1e-9: different ports, same holes and feed).
        for &(p, y) in mirrored {
            let pos = &t.onoff[onoff_row([1, p, y])];
            let neg = &t.onoff[onoff_row([-1, p, y])];
            let what = format!("{file} state {} pitch {p} yaw {y}", st.name);
            assert_eq!(pos.mask.count_ones(), neg.mask.count_ones(), "{what}");
            let rel = (pos.gas_rate_kg_s - neg.gas_rate_kg_s).abs() / pos.gas_rate_kg_s;
            assert!(rel <= 1e-9, "{what}");
        }
    }
}

#[test]
fn heron_rows_are_least_gas_and_symmetric_in_every_state() {
    check_layout("heron-54.toml");
}

#[test]
fn osprey_rows_are_least_gas_and_symmetric_in_every_state() {
    check_layout("osprey-98.toml");
}

/// The Heron demo with its two roll pairs turned to clock θ, θ + 180° (positive
/// roll) and θ + 90°, θ + 270° (negative roll).
fn heron_with_roll_pairs_at(theta_deg: f64) -> String {
    let mut text = demo_text("heron-54.toml");
    for (old, add) in [
        ("clock = \"45 deg\"", 0.0),
        ("clock = \"225 deg\"", 180.0),
        ("clock = \"135 deg\"", 90.0),
        ("clock = \"315 deg\"", 270.0),
    ] {
        assert!(text.contains(old), "the demo holds {old}");
        text = text.replace(old, &format!("clock = \"{} deg\"", theta_deg + add));
    }
    text
}

#[test]
fn turned_roll_pairs_are_least_gas_and_symmetric_in_every_state() {
    for theta in [5.0, 12.5, 20.0, 30.0, 37.0, 52.0, 60.0, 71.0, 80.0, 88.0] {
        // Turned away from 45°, the +roll and −roll pairs load pitch and yaw
        // differently (the pitch and yaw best torques differ), so only the two ports
        // within each pair are mirror images; least gas is what must hold.
        let name = format!("heron, roll pairs at {theta} deg");
        check_text(&heron_with_roll_pairs_at(theta), &name, &[]);
    }
}
