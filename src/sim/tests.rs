//! Whole-loop checks on the demo layouts and against textbook limit-cycle formulas.

use super::*;
use crate::analysis::analyze;

fn demo(text: &str, name: &str) -> (Design, Analysis, Vec<Case>) {
    let design = crate::layout::parse_str(text, name).unwrap();
    let analysis = analyze(&design).unwrap();
    let cases = crate::layout::case_sections(text, name, &design).unwrap();
    (design, analysis, cases)
}

#[test]
fn demo_cases_run_and_hold() {
    for (text, name) in [
        (include_str!("../../layouts/heron-54.toml"), "heron-54.toml"),
        (
            include_str!("../../layouts/osprey-98.toml"),
            "osprey-98.toml",
        ),
    ] {
        let (design, analysis, cases) = demo(text, name);
        assert!(cases.len() >= 2);
        for case in &cases {
            let r = simulate(&design, &analysis, case, &Settings::default()).unwrap();
            eprintln!("{name} {}: {:#?}", case.name, r.findings);
            assert!(r.stopped.is_none(), "{:?}", r.stopped);
            assert!(r.gas_used_kg > 0.0);
            assert!(r.hold_time_s > 0.0, "{}: {}", case.name, r.hold_end);
        }
    }
}

/// A roll-only case on a line with ideal sensing: the single-axis deadband
/// controller with a minimum impulse bit.
fn roll_case(
    deadband_rad: f64,
    rate_weight_s: f64,
    min_on_s: f64,
    disturbance_n_m: f64,
    start_rate: f64,
    duration: f64,
) -> Case {
    use super::case::*;
    Case {
        name: "roll limit cycle".into(),
        state: "burnout".into(),
        phase: Phase::Coast,
        duration_s: duration,
        start_error_rad: [0.0; 3],
        start_rate_rad_s: [start_rate, 0.0, 0.0],
        pointing_rad: 2.0 * deadband_rad,
        disturbances: if disturbance_n_m != 0.0 {
            vec![Disturbance {
                torque_n_m: [disturbance_n_m, 0.0, 0.0],
                from_s: 0.0,
                lasting_s: None,
            }]
        } else {
            Vec::new()
        },
        sensing: Sensing {
            gyro_noise_rad_s: 0.0,
            gyro_bias_rad_s: [0.0; 3],
            control_period_s: 1e-3,
            computation_delay_s: 0.0,
        },
        controller: Controller::OnOff {
            deadband_rad,
            hysteresis_rad: 0.0,
            rate_weight_s,
        },
        minimum_on_time_s: min_on_s,
        mount: Mount::Line { friction_n_m: 0.0 },
        spreads: Spreads::default(),
        wall_coefficient_area_w_k: None,
    }
}

/// Roll torque (N·m) and gas rate (kg/s) of the on/off row for ±roll, roll inertia
/// (kg·m²) with the start gas, and the valve delays (s), from the project's own
/// tables and mass model (independent of the simulator's loop).
fn roll_inputs(design: &Design, analysis: &Analysis) -> (f64, f64, f64, f64, f64, f64) {
    let st = analysis
        .states
        .iter()
        .find(|s| s.name == "burnout")
        .unwrap();
    let t = crate::export::bundle::state_tables(
        design,
        st,
        &crate::allocation::onoff::OnOffOptions::default(),
        None,
    )
    .unwrap();
    let pos = &t.onoff[crate::export::firmware::onoff_row([1, 0, 0])];
    let neg = &t.onoff[crate::export::firmware::onoff_row([-1, 0, 0])];
    let state = design.states.iter().find(|s| s.name == "burnout").unwrap();
    let gb = &analysis.gas;
    let gas = gb.inventory_kg - (1.0 - state.gas_remaining) * gb.usable_isothermal_kg;
    let j = crate::mass::vehicle::vehicle_properties(design, state, gas).inertia_about_cg()[(0, 0)];
    (
        pos.torque_nm[0],
        -neg.torque_nm[0],
        pos.gas_rate_kg_s,
        j,
        design.feed.valve.opening_delay_s,
        design.feed.valve.closing_delay_s,
    )
}

/// Textbook minimum-impulse-bit limit cycle without disturbance (e.g. Sidi,
/// Spacecraft Dynamics and Control, 1997, ch. 7, and Wertz, Spacecraft Attitude
/// Determination and Control, 1978, §18.3; from memory): each pulse of impulse
/// I_b reverses the rate between ±ω with ω = I_b/(2J); the error swings between
/// the deadband edges ±θ_d plus the overshoot while the pulse acts (ω·t_p/4 for
/// a pulse of effective length t_p); the period is 4θ_d/ω plus the two pulses;
/// the average flow is two pulses of gas per period. The pulse here is the
/// minimum on-time t_on with linear ramps over the opening and closing delays,
/// so I_b = τ·(t_on − t_open/2 + t_close/2). The switching line s = θ + k·ω
/// (k = 50 ms) ends each firing as soon as the rate has turned, so every pulse is
/// one minimum pulse; it moves the edge where firing starts to θ_d − k·ω.
#[test]
fn limit_cycle_without_disturbance_matches_the_textbook() {
    let text = include_str!("../../layouts/heron-54.toml");
    let (design, analysis, _) = demo(text, "heron-54.toml");
    let (tau_p, tau_n, mdot, j, t_o, t_c) = roll_inputs(&design, &analysis);
    assert!((tau_p - tau_n).abs() < 1e-6 * tau_p, "mirrored roll ports");
    let t_on = 0.04;
    let t_p = t_on - 0.5 * t_o + 0.5 * t_c;
    let ib = tau_p * t_p;
    let w = ib / (2.0 * j);
    let db = 15f64.to_radians();
    let k = 0.05;
    let case = roll_case(db, k, t_on, 0.0, w, 20.0);
    let r = simulate(&design, &analysis, &case, &Settings::default()).unwrap();
    let roll = &r.axes[0];
    let amp = roll.limit_cycle_amplitude_rad.unwrap();
    let period = roll.limit_cycle_period_s.unwrap();
    let edge = db - k * w;
    let expected_amp = edge + w * t_p / 4.0;
    let expected_period = 4.0 * edge / w + 2.0 * t_p;
    eprintln!(
        "amp {amp} vs {expected_amp}; period {period} vs {expected_period}; rate {} vs {w}",
        roll.peak_rate_rad_s
    );
    assert!((amp / expected_amp - 1.0).abs() < 0.03);
    assert!((period / expected_period - 1.0).abs() < 0.03);
    assert!((roll.peak_rate_rad_s / w - 1.0).abs() < 0.02);
    // Every pulse lasts the minimum on-time.
    let fired: Vec<_> = r.ports.iter().filter(|p| p.pulses > 0).collect();
    for p in &fired {
        assert!((p.shortest_pulse_s.unwrap() - t_on).abs() < 1.5e-3, "{p:?}");
    }
    let flow = r.gas_used_kg / r.duration_s;
    let expected_flow = 2.0 * mdot * t_p / expected_period;
    eprintln!("flow {flow} vs {expected_flow}");
    assert!((flow / expected_flow - 1.0).abs() < 0.05);
}

/// With a steady disturbance τ_d the cycle is one-sided (same texts): one pulse
/// per period P = I_b/τ_d, the error swings by I_b²/(8·J·τ_d) peak to peak, and
/// the average flow is one pulse of gas per period, ṁ·t_p·τ_d/I_b.
#[test]
fn limit_cycle_with_steady_disturbance_matches_the_textbook() {
    let text = include_str!("../../layouts/heron-54.toml");
    let (design, analysis, _) = demo(text, "heron-54.toml");
    let (tau_p, _, mdot, j, t_o, t_c) = roll_inputs(&design, &analysis);
    let t_on = 0.04;
    let t_p = t_on - 0.5 * t_o + 0.5 * t_c;
    let ib = tau_p * t_p;
    let tau_d = 0.2 * tau_p * t_p / 0.1; // a period of about 0.5 s
    let db = 15f64.to_radians();
    let case = roll_case(db, 0.05, t_on, tau_d, 0.0, 30.0);
    let r = simulate(&design, &analysis, &case, &Settings::default()).unwrap();
    let roll = &r.axes[0];
    let period = roll.limit_cycle_period_s.unwrap();
    let swing = 2.0 * roll.limit_cycle_amplitude_rad.unwrap();
    let expected_period = ib / tau_d;
    let expected_swing = ib * ib / (8.0 * j * tau_d);
    eprintln!("period {period} vs {expected_period}; swing {swing} vs {expected_swing}");
    assert!((period / expected_period - 1.0).abs() < 0.03);
    // The textbook swing takes the pulse as instantaneous; a pulse of length t_p
    // at net deceleration (τ − τ_d)/J adds ω0²·J/(2(τ − τ_d)) to the coast
    // parabola ω0²·J/(2τ_d), with ω0 = τ_d·(P − t_p)/(2J) (constant-acceleration
    // kinematics of the same cycle). The ramps of a real pulse are left out of
    // both, hence a few per cent.
    let w0 = tau_d * (expected_period - t_p) / (2.0 * j);
    let finite_swing = w0 * w0 * j / (2.0 * tau_d) + w0 * w0 * j / (2.0 * (tau_p - tau_d));
    eprintln!("finite-pulse swing {finite_swing}");
    assert!((swing / finite_swing - 1.0).abs() < 0.04);
    assert!((swing / expected_swing - 1.0).abs() < 0.07);
    // Average flow over the steady part: from the pulses of the second half.
    let expected_flow = mdot * t_p * tau_d / ib;
    let pulses: usize = r.ports.iter().map(|p| p.pulses).sum::<usize>() / 2;
    let flow = r.gas_used_kg / r.duration_s;
    eprintln!("flow {flow} vs {expected_flow} ({pulses} pulse pairs)");
    assert!((flow / expected_flow - 1.0).abs() < 0.05);
}

/// Steps end at every switching instant, so halving the longest step changes
/// the figures only by the integrator's own error (RK4, fourth order) and the
/// tank's update instants: gas used to 1e-4, the limit cycle to 1e-3.
#[test]
fn halving_the_step_changes_little() {
    let text = include_str!("../../layouts/heron-54.toml");
    let (design, analysis, cases) = demo(text, "heron-54.toml");
    let mut case = cases[0].clone();
    case.duration_s = 10.0;
    let coarse = simulate(&design, &analysis, &case, &Settings::default()).unwrap();
    let fine = simulate(
        &design,
        &analysis,
        &case,
        &Settings {
            max_step_s: 5e-4,
            ..Settings::default()
        },
    )
    .unwrap();
    let rel = |a: f64, b: f64| (a - b).abs() / b.abs().max(1e-12);
    eprintln!("gas {} vs {}", coarse.gas_used_kg, fine.gas_used_kg);
    assert!(rel(coarse.gas_used_kg, fine.gas_used_kg) < 1e-4);
    for k in 0..3 {
        let (a, b) = (
            coarse.axes[k].limit_cycle_amplitude_rad.unwrap(),
            fine.axes[k].limit_cycle_amplitude_rad.unwrap(),
        );
        eprintln!("axis {k}: {a} vs {b}");
        assert!(rel(a, b) < 1e-3);
    }
}

/// Burn phase without firing (a deadband no error reaches): the motor's
/// misalignment torque F·sin δ·(nozzle station − CG station) about pitch spins
/// the vehicle up; the pitch rate at burnout is ∫τ/I dt, integrated here apart
/// by the trapezoidal rule over 400 points of the mass model (propellant burning
/// at an even rate), within 1 %.
#[test]
fn burn_phase_misalignment_torque() {
    use super::case::*;
    let text = include_str!("../../layouts/heron-54.toml");
    let (design, analysis, cases) = demo(text, "heron-54.toml");
    let burn = 1.5;
    let mut case = cases[0].clone();
    case.state = "liftoff".into();
    case.phase = Phase::Burn { burn_time_s: burn };
    case.duration_s = burn;
    case.start_error_rad = [0.0; 3];
    case.start_rate_rad_s = [0.0; 3];
    case.disturbances.clear();
    case.sensing.gyro_noise_rad_s = 0.0;
    case.sensing.gyro_bias_rad_s = [0.0; 3];
    case.controller = Controller::OnOff {
        deadband_rad: 3.0,
        hysteresis_rad: 0.0,
        rate_weight_s: 0.0,
    };
    let r = simulate(&design, &analysis, &case, &Settings::default()).unwrap();
    assert_eq!(r.gas_used_kg, 0.0);
    let s = r.series.as_ref().unwrap();
    let w_end = s.rate_rad_s.last().unwrap()[1];
    let state = design.states.iter().find(|s| s.name == "liftoff").unwrap();
    let gb = &analysis.gas;
    let gas = gb.inventory_kg - (1.0 - state.gas_remaining) * gb.usable_isothermal_kg;
    let burnt = crate::model::FlightState {
        motor: crate::model::MotorCondition::Burnout,
        ..state.clone()
    };
    let full = crate::mass::vehicle::vehicle_properties(&design, state, gas);
    let empty = crate::mass::vehicle::vehicle_properties(&design, &burnt, gas);
    let aft = design.motor.fore_station_m + design.motor.length_m;
    let f = design.requirements.motor_thrust_n * design.requirements.thrust_misalignment_rad.sin();
    let n = 400;
    let mut integral = 0.0;
    let mut prev = None;
    for i in 0..=n {
        let left = 1.0 - i as f64 / n as f64;
        // Mass properties are linear in the propellant left (the propellant scales).
        let m = empty.mass_kg() + left * (full.mass_kg() - empty.mass_kg());
        let first = empty.cg() * empty.mass_kg()
            + (full.cg() * full.mass_kg() - empty.cg() * empty.mass_kg()) * left;
        let cg_station = -(first / m).x;
        let io = empty.inertia_about_origin()
            + (full.inertia_about_origin() - empty.inertia_about_origin()) * left;
        let c = first / m;
        let iyy = io[(1, 1)] - m * (c.x * c.x + c.z * c.z);
        let v = f * (aft - cg_station) / iyy;
        if let Some(p) = prev {
            integral += 0.5 * (p + v) * burn / n as f64;
        }
        prev = Some(v);
    }
    eprintln!("pitch rate {w_end} vs {integral}");
    assert!(integral > 0.0);
    assert!((w_end / integral - 1.0).abs() < 0.01);
}
