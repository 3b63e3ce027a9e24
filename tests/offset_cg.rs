//! Torques about a CG that sits off the body axis.
//!
//! A point mass placed off the axis moves the CG sideways. Every torque the
//! report shows must then be taken about that true CG, all three coordinates:
//! the ports' torques, the motor-thrust disturbance and the authority built on
//! them. The reference values here are re-derived by hand from the README's
//! Conventions (frame, clock angle, cant signs), τ = (r − c) × F, without calling
//! the library's geometry.

#![allow(clippy::needless_range_loop)] // axis loops read better with the index

use portwright::analysis::{analyze, Analysis};
use portwright::layout::parse_str;

/// The Heron demo with one extra point mass 20 mm off the axis at clock 30°.
fn offset_layout() -> (String, f64, f64, f64) {
    let base = std::fs::read_to_string("layouts/heron-54.toml").unwrap();
    let (mass_kg, offset_m, clock_deg): (f64, f64, f64) = (0.2, 0.020, 30.0);
    let extra = format!(
        "\n[[mass]]\nname = \"side ballast\"\nmass = \"{} g\"\nshape = \"point\"\nstation = \"500 mm\"\noffset = \"{} mm\"\nclock = \"{} deg\"\n",
        mass_kg * 1e3,
        offset_m * 1e3,
        clock_deg
    );
    // Insert before the first [[port]] so the array-of-tables stays together.
    let at = base.find("[[port]]").unwrap();
    let text = format!("{}{}\n{}", &base[..at], extra, &base[at..]);
    (text, mass_kg, offset_m, clock_deg.to_radians())
}

fn cross(a: [f64; 3], b: [f64; 3]) -> [f64; 3] {
    [
        a[1] * b[2] - a[2] * b[1],
        a[2] * b[0] - a[0] * b[2],
        a[0] * b[1] - a[1] * b[0],
    ]
}

/// Hand re-derivation of one port's thrust direction and position from the
/// README: n = (0, cos θ, sin θ); r̂ = (0, −sin θ, cos θ) (motion of a surface point
/// in positive roll); e = n cos t cos a − r̂ sin t cos a − x̂ sin a; F = −T e; the
/// hole centre is at (−s, R cos θ, R sin θ).
fn hand_port(station: f64, clock: f64, tang: f64, axial: f64, radius: f64) -> ([f64; 3], [f64; 3]) {
    let n = [0.0, clock.cos(), clock.sin()];
    let rh = [0.0, -clock.sin(), clock.cos()];
    let e: Vec<f64> = (0..3)
        .map(|k| {
            n[k] * tang.cos() * axial.cos()
                - rh[k] * tang.sin() * axial.cos()
                - if k == 0 { axial.sin() } else { 0.0 }
        })
        .collect();
    let r = [-station, radius * clock.cos(), radius * clock.sin()];
    (r, [-e[0], -e[1], -e[2]])
}

fn run() -> (Analysis, f64, f64, f64) {
    let (text, m, rho, phi) = offset_layout();
    let design = parse_str(&text, "offset.toml").unwrap_or_else(|e| panic!("{e}"));
    (analyze(&design).unwrap(), m, rho, phi)
}

#[test]
fn cg_is_off_the_axis_by_the_first_moment() {
    let (a, m, rho, phi) = run();
    for st in &a.states {
        // Only the ballast is off the axis: M·c_y = m·ρ·cos φ (first moment).
        let cy = m * rho * phi.cos() / st.mass.mass_kg;
        let cz = m * rho * phi.sin() / st.mass.mass_kg;
        // 1e-12 m: sums of a dozen parts, rounding only.
        assert!((st.mass.cg_y_m - cy).abs() < 1e-12, "{}", st.name);
        assert!((st.mass.cg_z_m - cz).abs() < 1e-12, "{}", st.name);
        // Products of inertia appear: I_xy = −Σ m (x − x_cg)(y − y_cg); the
        // on-axis parts have zero first moment in y, so only the ballast and the
        // whole-mass correction remain: I_xy = −m (x_b − x_cg) y_b … about the CG
        // = −(m x_b y_b − M x_cg y_cg).
        let xb = -0.5;
        let xcg = -st.mass.cg_station_m;
        let yb = rho * phi.cos();
        let ixy = -(m * xb * yb - st.mass.mass_kg * xcg * cy);
        // 1e-12 relative of the result plus 1e-15 kg m²: rounding only.
        assert!(
            (st.mass.ixy_kg_m2 - ixy).abs() < 1e-9 * ixy.abs() + 1e-15,
            "{}: {} vs {ixy}",
            st.name,
            st.mass.ixy_kg_m2
        );
    }
}

#[test]
fn port_torques_are_about_the_true_cg() {
    let (text, ..) = offset_layout();
    let design = parse_str(&text, "offset.toml").unwrap();
    let radius = design.airframe.outer_diameter_m / 2.0;
    let (a, ..) = run();
    for st in &a.states {
        let c = [-st.mass.cg_station_m, st.mass.cg_y_m, st.mass.cg_z_m];
        assert!(c[1].abs() > 1e-4, "the ballast must move the CG noticeably");
        for (p, r) in design.ports.iter().zip(&st.ports) {
            let (pos, dir) = hand_port(
                p.station_m,
                p.clock_rad,
                p.tangential_cant_rad,
                p.axial_cant_rad,
                radius,
            );
            let f = dir.map(|d| d * r.thrust_n);
            let arm = [pos[0] - c[0], pos[1] - c[1], pos[2] - c[2]];
            let want = cross(arm, f);
            for k in 0..3 {
                // 1e-12 N m absolute: the same products computed in another order.
                assert!(
                    (r.torque_n_m[k] - want[k]).abs() < 1e-12,
                    "{} {} axis {k}: {} vs {}",
                    st.name,
                    p.name,
                    r.torque_n_m[k],
                    want[k]
                );
            }
        }
        // Closed forms: a radial port at clock 90° (pitch-pos, F = −T ẑ) gets roll
        // torque τx = (r−c)_y F_z − (r−c)_z F_y = (−c_y)(−T) = T·c_y, not zero.
        let pp = st.ports.iter().find(|p| p.name == "pitch-pos").unwrap();
        let want = pp.thrust_n * c[1];
        assert!((pp.torque_n_m[0] - want).abs() < 1e-12 * (1.0 + want.abs()));
        assert!(pp.torque_n_m[0].abs() > 1e-5, "{}", pp.torque_n_m[0]);
        // A roll pair at clocks 45° and 225° (cant +60°) no longer gives equal roll
        // torque: each differs from R·T·sin t by −(c × F)_x = −(c_y F_z − c_z F_y).
        for name in ["roll-pos-a", "roll-pos-b"] {
            let p = design.ports.iter().find(|p| p.name == name).unwrap();
            let r = st.ports.iter().find(|q| q.name == name).unwrap();
            let (_, dir) = hand_port(p.station_m, p.clock_rad, p.tangential_cant_rad, 0.0, radius);
            let f = dir.map(|d| d * r.thrust_n);
            let on_axis = radius * r.thrust_n * p.tangential_cant_rad.sin();
            let want = on_axis - (c[1] * f[2] - c[2] * f[1]);
            assert!((r.torque_n_m[0] - want).abs() < 1e-12, "{name}");
        }
    }
}

#[test]
fn motor_disturbance_uses_the_lateral_offset() {
    let (text, ..) = offset_layout();
    let design = parse_str(&text, "offset.toml").unwrap();
    let (a, ..) = run();
    let q = &design.requirements;
    let nozzle = design.motor.fore_station_m + design.motor.length_m;
    let st = a
        .states
        .iter()
        .find(|s| s.motor == portwright::model::MotorCondition::Burning)
        .unwrap();
    let (cy, cz) = (st.mass.cg_y_m, st.mass.cg_z_m);
    let lever = nozzle - st.mass.cg_station_m;
    let (sd, cd) = q.thrust_misalignment_rad.sin_cos();
    let t = q.motor_thrust_n;
    // Worst case over the unknown lean direction φ of τ = d × F with
    // d = (−L, −c_y, −c_z), F = T (cos δ, sin δ cos φ, sin δ sin φ):
    // τy = −c_z T cos δ + L T sin δ sin φ → T(|c_z| cos δ + L sin δ), and so on.
    let want = [
        q.roll_disturbance_n_m + t * sd * cy.hypot(cz),
        t * (cz.abs() * cd + lever * sd),
        t * (cy.abs() * cd + lever * sd),
    ];
    // Brute force over φ in 0.01° steps as a second, independent check (the
    // maximum of a sinusoid sampled that finely is within 1.5e-8 relative).
    let mut brute = [0.0f64; 3];
    for k in 0..36_000 {
        let phi = (k as f64 / 100.0).to_radians();
        let f = [t * cd, t * sd * phi.cos(), t * sd * phi.sin()];
        let tau = cross([-lever, -cy, -cz], f);
        for j in 0..3 {
            brute[j] = brute[j].max(tau[j].abs());
        }
    }
    for k in 0..3 {
        let got = st.required.from_disturbance_n_m[k];
        assert!((got - want[k]).abs() < 1e-12 * (1.0 + want[k]), "axis {k}");
        let b = brute[k] + if k == 0 { q.roll_disturbance_n_m } else { 0.0 };
        assert!((got - b).abs() < 1e-7 * got, "axis {k}: {got} vs brute {b}");
    }
}

#[test]
fn axis_acceleration_uses_the_full_inertia_tensor() {
    use nalgebra::{Matrix3xX, Vector3};
    use portwright::allocation::zonotope::Zonotope;
    use portwright::allocation::Tolerances;
    let (a, ..) = run();
    for st in &a.states {
        let i = st.mass.inertia_tensor();
        // The products are not negligible for this ballast (I_xy at least 1 % of
        // √(Ixx·Iyy)), so the check exercises the off-diagonal terms.
        let coupling = st.mass.ixy_kg_m2.abs() / (st.mass.ixx_kg_m2 * st.mass.iyy_kg_m2).sqrt();
        assert!(coupling > 0.01, "{coupling}");
        // Euler's equations at rest: a pure acceleration α about axis k needs the
        // torque α·I·e_k. The reported α (weaker sense) must put ±α·I·e_k inside the
        // attainable set of the port columns, and one of them on its boundary.
        let cols: Vec<Vector3<f64>> = st
            .ports
            .iter()
            .map(|p| Vector3::from(p.torque_n_m))
            .collect();
        let z = Zonotope::new(Matrix3xX::from_columns(&cols), &Tolerances::default()).unwrap();
        for k in 0..3 {
            let alpha = st.authority[k].angular_accel_rad_s2;
            let need = i.column(k).into_owned() * alpha;
            // 1e-6 relative steps: far above the facet arithmetic's rounding,
            // far below any physical difference.
            assert!(z.contains(&(need * (1.0 - 1e-6))), "{} axis {k}", st.name);
            assert!(z.contains(&(-need * (1.0 - 1e-6))), "{} axis {k}", st.name);
            assert!(
                !z.contains(&(need * (1.0 + 1e-6))) || !z.contains(&(-need * (1.0 + 1e-6))),
                "{} axis {k}: α is not the limit",
                st.name
            );
            // Dividing the axis torque by the diagonal element alone gives another
            // number when the tensor has products (that was the old, wrong model).
            let diagonal_only = st.authority[k]
                .positive_n_m
                .min(st.authority[k].negative_n_m)
                / i[(k, k)];
            if k == 0 {
                assert!(
                    (diagonal_only - alpha).abs() > 1e-4 * alpha,
                    "roll: {diagonal_only} vs {alpha}"
                );
            }
        }
    }
}

#[test]
fn firmware_tables_and_optimiser_merit_use_the_true_cg() {
    use portwright::allocation::onoff::OnOffOptions;
    use portwright::analysis::score::MarginScore;
    use portwright::export::bundle::state_tables;
    let (text, ..) = offset_layout();
    let design = parse_str(&text, "offset.toml").unwrap();
    let radius = design.airframe.outer_diameter_m / 2.0;
    let (a, ..) = run();
    // Firmware tables: each port's torque column is (r − c) × F about the true CG,
    // re-derived by hand as above.
    for st in &a.states {
        let t = state_tables(&design, st, &OnOffOptions::default(), None).unwrap();
        let c = [-st.mass.cg_station_m, st.mass.cg_y_m, st.mass.cg_z_m];
        for ((p, r), entry) in design.ports.iter().zip(&st.ports).zip(&t.ports) {
            let (pos, dir) = hand_port(
                p.station_m,
                p.clock_rad,
                p.tangential_cant_rad,
                p.axial_cant_rad,
                radius,
            );
            let want = cross(
                [pos[0] - c[0], pos[1] - c[1], pos[2] - c[2]],
                dir.map(|d| d * r.thrust_n),
            );
            for k in 0..3 {
                // 1e-12 N m: the same products in another order.
                assert!(
                    (entry.torque_nm[k] - want[k]).abs() < 1e-12,
                    "{} {k}",
                    p.name
                );
            }
        }
    }
    // Optimiser merit: its per-axis authority at the starting layout is the
    // analysis's (weaker sense, about the true CG), to rounding of the two
    // ray-limit computations (1e-9 relative).
    let score = MarginScore::new(&design, &a, &[]).unwrap();
    let got = score.authority(&design.ports);
    for (g, st) in got.iter().zip(&a.states) {
        for k in 0..3 {
            let want = st.authority[k]
                .positive_n_m
                .min(st.authority[k].negative_n_m);
            assert!(
                (g[k] - want).abs() <= 1e-9 * want.max(1e-9),
                "{} {k}: {} vs {want}",
                st.name,
                g[k]
            );
        }
    }
}
