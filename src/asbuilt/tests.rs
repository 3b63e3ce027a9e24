//! Checks of the as-built models against closed forms, first-order propagation,
//! full flow solves and themselves (convergence, determinism).

use super::measured::{self, Measurement, StandTest};
use super::report::{sample, SpreadSettings};
use super::sampling::{evaluate, run};
use super::sensitivity::sensitivities;
use super::spec::{PortTolerances, Spread, ToleranceSpec};
use super::stats::mean_variance;
use super::vehicle::{Applied, Basis};
use crate::analysis::{analyze, Analysis};
use crate::model::{Design, NozzleSpec};

const HERON: &str = include_str!("../../layouts/heron-54.toml");

fn heron() -> (Design, Analysis, ToleranceSpec) {
    let d = crate::layout::parse_str(HERON, "heron-54.toml").unwrap();
    let a = analyze(&d).unwrap();
    let s = crate::layout::asbuilt::read(HERON, &d)
        .unwrap()
        .tolerances
        .unwrap();
    (d, a, s)
}

fn only(n: usize, i: usize, t: PortTolerances) -> ToleranceSpec {
    let mut ports = vec![PortTolerances::default(); n];
    ports[i] = t;
    ToleranceSpec {
        ports,
        ..ToleranceSpec::default()
    }
}

fn port(d: &Design, name: &str) -> usize {
    d.ports.iter().position(|p| p.name == name).unwrap()
}

#[test]
fn roll_torque_follows_the_closed_form_under_a_cant_error() {
    // Closed form: a port on the tube surface at radius R with thrust T and
    // tangential cant c (no axial cant) gives roll torque τ = R·T·sin c, so
    // dτ/dc = R·T·cos c. The +roll ray limit of Heron is the sum of its two
    // roll-positive ports (their pitch and yaw cancel), so the +roll margin
    // moves by R·T·cos c / required per radian of either port's cant. Central
    // differences of step 1 % of σ leave a truncation error of order 1e-8
    // relative; 1e-6 allows for it and rounding.
    let (d, a, _) = heron();
    let i = port(&d, "roll-pos-a");
    let spec = only(
        d.ports.len(),
        i,
        PortTolerances {
            tangential_cant: Some(Spread::Normal {
                sigma: 2f64.to_radians(),
            }),
            ..PortTolerances::default()
        },
    );
    let basis = Basis::new(&d, &a, &spec).unwrap();
    let r = d.airframe.outer_radius_m();
    let c = d.ports[i].tangential_cant_rad;
    for (k, st) in a.states.iter().enumerate() {
        let t = st.ports[i].thrust_n;
        let want_torque = r * t * c.cos();
        // Per port: difference of the sampled port torque.
        let h = 1e-6;
        let mut ap = Applied::default();
        let up = evaluate(&basis, &[], &[h], &mut ap).states[k].port_torque_n_m[i][0];
        let down = evaluate(&basis, &[], &[-h], &mut ap).states[k].port_torque_n_m[i][0];
        let got = (up - down) / (2.0 * h);
        assert!(
            (got / want_torque - 1.0).abs() < 1e-6,
            "{}: dτ/dc {got} vs R·T·cos c {want_torque}",
            st.name
        );
        // Through the sensitivity machinery, on the +roll margin.
        let req = st.required.total_n_m()[0];
        let s = sensitivities(&basis);
        let m = s
            .iter()
            .find(|m| m.state == st.name && m.axis == "roll")
            .unwrap();
        assert_eq!(m.sense, "+", "Heron's roll senses tie; ties go to +");
        let e = &m.entries[0];
        assert!(
            (e.derivative_per_unit / (want_torque / req) - 1.0).abs() < 1e-6,
            "{}: dm/dc {} vs {}",
            st.name,
            e.derivative_per_unit,
            want_torque / req
        );
        assert!((e.variance_share - 1.0).abs() < 1e-12);
        assert!(!e.corner);
    }
}

/// The demo's tolerances scaled by `k`, without the ones that turn a port's
/// thrust direction (clock and cants): on a symmetric layout those move a
/// torque component through zero, where the envelope has a corner (the
/// closed-form test above checks them one at a time instead).
fn scaled(spec: &ToleranceSpec, k: f64) -> ToleranceSpec {
    let f = |s: Option<Spread>| s.map(|s| s.scaled(k));
    ToleranceSpec {
        ports: spec
            .ports
            .iter()
            .map(|p| PortTolerances {
                station: f(p.station),
                clock: None,
                tangential_cant: None,
                axial_cant: None,
                hole: f(p.hole),
                discharge_coefficient: f(p.discharge_coefficient),
                valve_cv: f(p.valve_cv),
            })
            .collect(),
        set_pressure: f(spec.set_pressure),
        opening_delay: f(spec.opening_delay),
        closing_delay: f(spec.closing_delay),
        mass: f(spec.mass),
        cg_station: f(spec.cg_station),
        ixx: f(spec.ixx),
        iyy: f(spec.iyy),
        // Misalignment enters through |nominal + deviation|: keep it off so the
        // margin stays smooth in every input.
        motor_misalignment: None,
    }
}

#[test]
fn sampled_variance_matches_first_order_propagation_for_small_tolerances() {
    // With the demo's tolerances shrunk to 5 %, each margin is close to linear
    // in the inputs, so its sampled variance must match Σ (∂m/∂x)² σ². The
    // sampling error of a variance from n = 10 000 draws is about √(2/n) = 1.4 %
    // relative (less for uniform inputs); nonlinearity at this size is well
    // below that; 5 % leaves room for both.
    let (d, a, spec) = heron();
    let spec = scaled(&spec, 0.05);
    let settings = SpreadSettings {
        samples: 10_000,
        seed: 11,
        ..SpreadSettings::default()
    };
    let run = sample(&d, &a, &spec, &settings).unwrap();
    let sens = sensitivities(&run.basis);
    let mut checked = 0;
    // Margins whose limiting facet changes at the nominal point (flagged) are
    // not first-order quantities; the rest must agree. On Heron the ±pitch and
    // ±yaw rays meet the envelope at an edge (a pitch jet's column lies on the
    // axis), so the three roll margins are the smooth ones.
    for m in sens.iter().filter(|m| m.entries.iter().all(|e| !e.corner)) {
        let k = a.states.iter().position(|s| s.name == m.state).unwrap();
        let axis = ["roll", "pitch", "yaw"]
            .iter()
            .position(|x| *x == m.axis)
            .unwrap();
        let values: Vec<f64> = run
            .samples
            .iter()
            .map(|s| {
                let st = &s.states[k];
                let t = if m.sense == "+" {
                    st.positive_n_m[axis]
                } else {
                    st.negative_n_m[axis]
                };
                t / st.required_n_m[axis]
            })
            .collect();
        let (_, var) = mean_variance(&values);
        let want = m.first_order_sigma.powi(2);
        assert!(
            (var / want - 1.0).abs() < 0.05,
            "{} {} {}: sampled variance {var:.4e}, first order {want:.4e}",
            m.state,
            m.axis,
            m.sense
        );
        checked += 1;
    }
    eprintln!("{checked} of {} margins checked", sens.len());
    assert!(checked >= 3, "only {checked} smooth margins");
}

#[test]
fn the_mean_margin_converges_with_sample_count() {
    // The error of a sample mean falls as σ/√n. Against a reference of 16 000
    // samples, each smaller run must lie within 4 standard errors (a bound a
    // correct sampler breaks with probability below 1e-4 per check), and the
    // bound itself halves each time n quadruples.
    let (d, a, spec) = heron();
    let basis = Basis::new(&d, &a, &spec).unwrap();
    let pitch = |n: usize, seed: u64| -> Vec<f64> {
        run(&basis, &[], n, seed)
            .iter()
            .map(|s| s.states[0].margin(1).unwrap())
            .collect()
    };
    let reference = pitch(16_000, 99);
    let (m_ref, var) = mean_variance(&reference);
    for n in [250, 1000, 4000] {
        let (m, _) = mean_variance(&pitch(n, 5));
        let se = (var / n as f64).sqrt();
        assert!(
            (m - m_ref).abs() < 4.0 * se,
            "n = {n}: mean {m} vs {m_ref} (standard error {se})"
        );
    }
}

#[test]
fn samples_do_not_depend_on_the_thread_count() {
    let (d, a, spec) = heron();
    let settings = SpreadSettings {
        samples: 300,
        seed: 4,
        ..SpreadSettings::default()
    };
    let on = |threads: usize| {
        rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .unwrap()
            .install(|| sample(&d, &a, &spec, &settings).unwrap().samples)
    };
    let one = on(1);
    assert_eq!(one, on(2));
    assert_eq!(one, on(3));
    // A different seed gives different vehicles.
    let other = rayon::ThreadPoolBuilder::new()
        .num_threads(2)
        .build()
        .unwrap()
        .install(|| {
            sample(
                &d,
                &a,
                &spec,
                &SpreadSettings {
                    seed: 5,
                    ..settings.clone()
                },
            )
            .unwrap()
            .samples
        });
    assert_ne!(one, other);
}

#[test]
fn power_law_thrust_matches_full_flow_solves() {
    // Each sampled thrust comes from a quadratic response surface fitted to the
    // full regulator–valve–nozzle model; here 20 sampled vehicles are also solved
    // in full (the port's hole, discharge coefficient, valve Cv and the set
    // pressure changed in the design). At the demo's tolerances (up to ±10 % Cv)
    // the third-order terms the surface drops are well under a per cent (a
    // power law without cross terms was measured 1.5 % off); 1 % bounds them.
    let (d, a, spec) = heron();
    let basis = Basis::new(&d, &a, &spec).unwrap();
    let mut ap = Applied::default();
    let mut worst = 0.0f64;
    for s in 0..20 {
        let dev = basis.draw(3, s);
        basis.apply(&basis.ports, &dev, &mut ap);
        // Full solve of port i alone, with its own deviations (the design has one
        // valve model, so the check is made per port).
        for i in 0..d.ports.len() {
            let mut trial = d.clone();
            let r = ap.ratio[i];
            trial.ports[i].nozzle = match trial.ports[i].nozzle {
                NozzleSpec::Hole {
                    diameter_m,
                    discharge_coefficient,
                } => NozzleSpec::Hole {
                    diameter_m: diameter_m * r[0],
                    discharge_coefficient: discharge_coefficient * r[1],
                },
                n => n,
            };
            if let crate::model::ValveFlow::Cv { cv, xt } = trial.feed.valve.flow {
                trial.feed.valve.flow = crate::model::ValveFlow::Cv { cv: cv * r[2], xt };
            }
            trial.feed.regulator.set_pressure_gauge_pa *= ap.set_ratio;
            for (k, st) in a.states.iter().enumerate() {
                let full =
                    crate::analysis::feed::ports_at(&trial, &st.name, st.ambient_pressure_pa)
                        .unwrap()
                        .ports[i]
                        .thrust_n;
                let fast = basis.thrust(k, i, st.ports[i].thrust_n, &ap);
                worst = worst.max((fast / full - 1.0).abs());
            }
        }
    }
    eprintln!("largest relative difference {worst:.2e}");
    assert!(worst < 0.01, "largest relative difference {worst}");
}

#[test]
fn the_vehicle_as_drawn_meets_every_row_it_met() {
    let (d, a, spec) = heron();
    let run = sample(
        &d,
        &a,
        &spec,
        &SpreadSettings {
            samples: 2,
            ..SpreadSettings::default()
        },
    )
    .unwrap();
    for (k, s) in run.nominal.states.iter().enumerate() {
        assert_eq!(s.failed_rows, 0, "state {k}");
        assert!(!run.checks[k].rows.is_empty());
        // And the as-drawn authority is the analysis's.
        for axis in 0..3 {
            let want = a.states[k].authority[axis].positive_n_m;
            assert!((s.positive_n_m[axis] / want - 1.0).abs() < 1e-9);
        }
    }
}

#[test]
fn a_stand_test_calibrates_the_discharge_coefficient() {
    // Round trip through the flow model: the thrust the model gives on the
    // stand with a discharge coefficient of 0.78 is handed in as a measurement
    // of the drawn port (0.85); the calibration must find 0.78 again. The
    // bisection ends within 1e-15 of the root; the flow model's own root
    // searches are converged to a relative 1e-10 or so, hence 1e-6.
    let (d, _, _) = heron();
    let i = port(&d, "pitch-pos");
    let test = StandTest {
        thrust_n: None,
        mass_flow_kg_s: None,
        supply_pressure_pa: 10.0e5,
        ambient_pa: 101_325.0,
    };
    let mut lower = d.clone();
    if let NozzleSpec::Hole {
        discharge_coefficient,
        ..
    } = &mut lower.ports[i].nozzle
    {
        *discharge_coefficient = 0.78;
    }
    let (thrust, flow) = measured::on_stand(&lower, i, &test).unwrap();
    for t in [
        StandTest {
            thrust_n: Some(thrust),
            ..test
        },
        StandTest {
            mass_flow_kg_s: Some(flow),
            ..test
        },
    ] {
        let m = Measurement {
            port: i,
            station_m: None,
            clock_rad: None,
            tangential_cant_rad: None,
            axial_cant_rad: None,
            hole_m: None,
            test: Some(t),
        };
        let (built, cmp) = measured::apply(&d, &[m]).unwrap();
        let c = cmp[0].discharge_coefficient[1];
        assert!((c - 0.78).abs() < 1e-6, "{c}");
        assert_eq!(built.ports[i].station_m, d.ports[i].station_m);
    }
    // A thrust no coefficient up to 1 can give is refused with the port named.
    let m = Measurement {
        port: i,
        station_m: None,
        clock_rad: None,
        tangential_cant_rad: None,
        axial_cant_rad: None,
        hole_m: None,
        test: Some(StandTest {
            thrust_n: Some(thrust * 3.0),
            ..test
        }),
    };
    let e = measured::apply(&d, &[m]).unwrap_err().to_string();
    assert!(e.contains("pitch-pos"), "{e}");
}

#[test]
fn one_pass_axis_limits_equal_six_ray_limits() {
    // Same arithmetic as `analysis::score::ray_limit` per direction (checked
    // there against the zonotope's facet list); equal to rounding, 1e-12 relative.
    use crate::analysis::score::ray_limit;
    use nalgebra::Vector3;
    let (d, a, spec) = heron();
    let basis = Basis::new(&d, &a, &spec).unwrap();
    let mut ap = Applied::default();
    for s in 0..50 {
        basis.apply(&basis.ports, &basis.draw(8, s), &mut ap);
        basis.wrenches(0, &basis.states[0].thrust_n, &mut ap);
        let (pos, neg) = super::vehicle::axis_limits(&ap.torque);
        for k in 0..3 {
            let mut e = Vector3::zeros();
            e[k] = 1.0;
            let (p, n) = (ray_limit(&ap.torque, &e), ray_limit(&ap.torque, &(-e)));
            assert!(
                (pos[k] - p).abs() <= 1e-12 * p.abs(),
                "{k}+: {} vs {p}",
                pos[k]
            );
            assert!(
                (neg[k] - n).abs() <= 1e-12 * n.abs(),
                "{k}-: {} vs {n}",
                neg[k]
            );
        }
    }
}

/// Heron with a `[[measured]]` entry for every port: the drawn geometry (as a
/// builder would write it, to six decimals), shifted aft by `station_shift_mm`,
/// and the model's own stand thrust times `scale_thrust`.
fn heron_measured(scale_thrust: f64, station_shift_mm: f64) -> String {
    let (d, _, _) = heron();
    let mut text = HERON.to_string();
    let test = StandTest {
        thrust_n: None,
        mass_flow_kg_s: None,
        supply_pressure_pa: 150.0 * 6894.757293168361 + 101_325.0,
        ambient_pa: 101_325.0,
    };
    for (i, p) in d.ports.iter().enumerate() {
        let (t, _) = measured::on_stand(&d, i, &test).unwrap();
        let hole = match p.nozzle {
            NozzleSpec::Hole { diameter_m, .. } => diameter_m,
            NozzleSpec::ConvergingDiverging { .. } => unreachable!(),
        };
        text.push_str(&format!(
            "\n[[measured]]\nport = \"{}\"\nstation = \"{:.6} mm\"\nclock = \"{:.6} deg\"\ntangential_cant = \"{:.6} deg\"\naxial_cant = \"{:.6} deg\"\nhole = \"{:.6} mm\"\nthrust = \"{:.12} N\"\nsupply_pressure = \"150 psig\"\n",
            p.name,
            p.station_m * 1e3 + station_shift_mm,
            p.clock_rad.to_degrees(),
            p.tangential_cant_rad.to_degrees(),
            p.axial_cant_rad.to_degrees(),
            hole * 1e3,
            t * scale_thrust
        ));
    }
    text
}

fn tables_of(design: &Design) -> Vec<String> {
    let a = analyze(design).unwrap();
    a.states
        .iter()
        .map(|st| {
            let t = crate::export::bundle::state_tables(
                design,
                st,
                &crate::allocation::OnOffOptions::default(),
                Some(5),
            )
            .unwrap();
            crate::export::firmware::render_c_header(&t).unwrap()
        })
        .collect()
}

#[test]
fn measurements_equal_to_the_design_give_identical_tables() {
    // The measured geometry is the drawn geometry and each measured thrust is the
    // model's own stand thrust to 12 decimals: the discharge coefficients stay as
    // drawn (within 1e-6) and every firmware table, every state, is the same text.
    let (d, _, _) = heron();
    let text = heron_measured(1.0, 0.0);
    let built = crate::layout::parse_str(&text, "measured.toml").unwrap();
    for (p, q) in d.ports.iter().zip(&built.ports) {
        assert_eq!(p.nozzle, q.nozzle, "{}", p.name);
    }
    assert_eq!(tables_of(&d), tables_of(&built));
}

#[test]
fn measured_ports_change_the_tables_and_the_authority() {
    // 8 % less thrust on the stand than the model predicts, and every hole 2 mm
    // aft: the calibrated coefficient falls, the tables differ, and the roll
    // authority (roll ports fire alone about roll) falls by the thrust ratio
    // within the small change the 2 mm shift makes to the arms (1 %).
    let (d, a, _) = heron();
    let text = heron_measured(0.92, 2.0);
    let built = crate::layout::parse_str(&text, "measured.toml").unwrap();
    let drawn = crate::layout::parse_str_as_drawn(&text, "measured.toml").unwrap();
    assert_eq!(drawn.ports[0].station_m, d.ports[0].station_m);
    assert!((built.ports[0].station_m - d.ports[0].station_m - 2e-3).abs() < 1e-12);
    assert_ne!(tables_of(&d), tables_of(&built));
    let b = analyze(&built).unwrap();
    let ratio = b.states[1].authority[0].positive_n_m / a.states[1].authority[0].positive_n_m;
    assert!((ratio - 0.92).abs() < 0.01, "{ratio}");
    assert!(built.readings.iter().any(|r| r.contains("as built")));
}

#[test]
fn bad_tolerances_name_line_column_and_field() {
    let text = HERON.replace("hole = \"±0.05 mm\"", "hole = \"0.05 mm\"");
    let e = crate::layout::parse_str(&text, "x.toml").unwrap_err();
    let p = &e.problems()[0];
    assert_eq!(p.field, "tolerances.hole");
    let line = text
        .lines()
        .position(|l| l.starts_with("hole = \"0.05 mm\""))
        .unwrap()
        + 1;
    assert_eq!(p.line, line);
    assert_eq!(p.column, 8);
    assert!(p.message.contains("sigma"), "{}", p.message);
    let text = HERON.replace("mass = \"±2 %\"", "mass = \"±20 g\"");
    let e = crate::layout::parse_str(&text, "x.toml").unwrap_err();
    assert_eq!(e.problems()[0].field, "tolerances.mass");
    let text = HERON.replace("ports = [\"roll-pos-a\", \"roll-pos-b\", \"roll-neg-a\", \"roll-neg-b\"]\ntangential_cant = \"±3 deg\"", "ports = [\"roll-pos-z\"]\ntangential_cant = \"±3 deg\"");
    let e = crate::layout::parse_str(&text, "x.toml").unwrap_err();
    assert_eq!(e.problems()[0].field, "tolerances.port[0].ports");
    let text = HERON.replace(
        "cg_station = \"±5 mm\"",
        "cg_station = \"±5 mm\"\nwobble = \"±1 mm\"",
    );
    let e = crate::layout::parse_str(&text, "x.toml").unwrap_err();
    assert!(e.to_string().contains("wobble"), "{e}");
    let text = format!("{HERON}\n[[measured]]\nport = \"yaw-neg\"\nthrust = \"1 N\"\n");
    let e = crate::layout::parse_str(&text, "x.toml").unwrap_err();
    assert_eq!(e.problems()[0].field, "measured[0].supply_pressure");
}
