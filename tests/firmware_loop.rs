//! Firmware in the loop: the exported C header, compiled, is driven with the
//! same sensed sequence the simulator's controller saw, running the same control
//! law in C; the valve masks (on/off) and the duty cycles (PD) agree at every
//! control step.

use portwright::sim::case::Controller;
use portwright::sim::run::{run, Command as Step, Draw};
use portwright::sim::{Plant, Settings};
use std::fmt::Write as _;
use std::path::Path;
use std::process::{Command, Stdio};

const FLAGS: &[&str] = &[
    "-std=c99",
    "-Wall",
    "-Wextra",
    "-Werror",
    "-pedantic",
    "-ffp-contract=off",
    "-O1",
];

fn compiler() -> String {
    std::env::var("CC").unwrap_or_else(|_| "cc".to_string())
}

/// Plant, nominal run and the C header of the case's flight state.
fn setup(layout: &str, case: &str, duration_s: f64) -> (Plant, Vec<Step>, String) {
    let text = std::fs::read_to_string(layout).unwrap();
    let design = portwright::layout::parse_str(&text, layout).unwrap();
    let analysis = portwright::analysis::analyze(&design).unwrap();
    let mut c = portwright::layout::case_sections(&text, layout, &design)
        .unwrap()
        .into_iter()
        .find(|c| c.name == case)
        .unwrap();
    c.duration_s = duration_s;
    let st = analysis.states.iter().find(|s| s.name == c.state).unwrap();
    let tables = portwright::export::bundle::state_tables(
        &design,
        st,
        &portwright::allocation::onoff::OnOffOptions::default(),
        None,
    )
    .unwrap();
    let header = portwright::export::firmware::render_c_header(&tables).unwrap();
    let plant = Plant::new(&design, &analysis, &c).unwrap();
    let r = run(
        &plant,
        &Draw::nominal(plant.port_names().len(), 1),
        &Settings::default(),
    );
    (plant, r.commands, header)
}

fn compile_and_feed(dir: &Path, header: &str, main: &str, input: &str) -> String {
    std::fs::write(dir.join("allocation.h"), header).unwrap();
    let src = dir.join("loop.c");
    std::fs::write(&src, main).unwrap();
    let exe = dir.join("loop");
    let out = Command::new(compiler())
        .args(FLAGS)
        .arg("-I")
        .arg(dir)
        .arg(&src)
        .arg("-o")
        .arg(&exe)
        .output()
        .expect("a C compiler (set CC) runs");
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let mut child = Command::new(&exe)
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .spawn()
        .unwrap();
    {
        use std::io::Write;
        child
            .stdin
            .take()
            .unwrap()
            .write_all(input.as_bytes())
            .unwrap();
    }
    let out = child.wait_with_output().unwrap();
    assert!(out.status.success());
    String::from_utf8(out.stdout).unwrap()
}

#[test]
fn onoff_masks_from_the_compiled_header_match_every_step() {
    let (plant, steps, header) = setup("layouts/heron-54.toml", "coast hold", 10.0);
    let Controller::OnOff {
        deadband_rad,
        hysteresis_rad,
        rate_weight_s,
    } = plant.case().controller
    else {
        panic!("on/off case expected");
    };
    let free = plant.case().mount.free_axes();
    let mut input = String::new();
    let mut want = Vec::new();
    for s in &steps {
        let Step::OnOff {
            error_rad,
            rate_rad_s,
            mask,
            ..
        } = s
        else {
            panic!("on/off steps expected");
        };
        for v in error_rad.iter().chain(rate_rad_s) {
            write!(input, "{v:.17e} ").unwrap();
        }
        input.push('\n');
        want.push(*mask);
    }
    let main = format!(
        r#"#include <stdio.h>
#include "allocation.h"

int main(void)
{{
    const double deadband = {deadband_rad:.17e}, stop_at = {stop:.17e}, weight = {rate_weight_s:.17e};
    const int free_axis[3] = {{{f0}, {f1}, {f2}}};
    int firing[3] = {{0, 0, 0}};
    double e[3], w[3];
    int k;
    while (scanf("%lf %lf %lf %lf %lf %lf", &e[0], &e[1], &e[2], &w[0], &w[1], &w[2]) == 6) {{
        for (k = 0; k < 3; ++k) {{
            double s = e[k] + weight * w[k];
            if (!free_axis[k]) {{
                firing[k] = 0;
            }} else if (firing[k] == 0 && s > deadband) {{
                firing[k] = -1;
            }} else if (firing[k] == 0 && s < -deadband) {{
                firing[k] = 1;
            }} else if (firing[k] == -1 && s < stop_at) {{
                firing[k] = 0;
            }} else if (firing[k] == 1 && s > -stop_at) {{
                firing[k] = 0;
            }}
        }}
        printf("%llu\n", (unsigned long long)pw_onoff_mask(firing[0], firing[1], firing[2]));
    }}
    return 0;
}}
"#,
        stop = (deadband_rad - hysteresis_rad).max(0.0),
        f0 = free[0] as i32,
        f1 = free[1] as i32,
        f2 = free[2] as i32,
    );
    let dir = tempfile::tempdir().unwrap();
    let out = compile_and_feed(dir.path(), &header, &main, &input);
    let got: Vec<u64> = out.lines().map(|l| l.parse().unwrap()).collect();
    assert_eq!(got.len(), want.len());
    let fired = want.iter().filter(|m| **m != 0).count();
    assert!(fired > 100, "the case fires ({fired} steps)");
    for (i, (g, w)) in got.iter().zip(&want).enumerate() {
        assert_eq!(g, w, "control step {i}: C mask {g:#x}, simulator {w:#x}");
    }
}

#[test]
fn pd_duties_from_the_compiled_header_match_every_step() {
    let (plant, steps, header) = setup("layouts/heron-54.toml", "gimbal stand", 5.0);
    let g = plant.gains().expect("PD gains");
    let free = plant.case().mount.free_axes();
    let n = plant.port_names().len();
    let dt = plant.case().sensing.control_period_s;
    let mut input = String::new();
    let mut want = Vec::new();
    for s in &steps {
        let Step::Duty {
            error_rad,
            rate_rad_s,
            duty,
            ..
        } = s
        else {
            panic!("duty steps expected");
        };
        for v in error_rad.iter().chain(rate_rad_s) {
            write!(input, "{v:.17e} ").unwrap();
        }
        input.push('\n');
        want.push(duty.clone());
    }
    let arr = |f: &dyn Fn(usize) -> f64| format!("{{{:.17e}, {:.17e}, {:.17e}}}", f(0), f(1), f(2));
    let main = format!(
        r#"#include <stdio.h>
#include "allocation.h"

int main(void)
{{
    const double kp[3] = {kp}, ki[3] = {ki}, kd[3] = {kd};
    const int free_axis[3] = {{{f0}, {f1}, {f2}}};
    double e[3], w[3], integral[3] = {{0.0, 0.0, 0.0}};
    pw_real tau[3], duty[PW_PORT_COUNT];
    int k, i;
    while (scanf("%lf %lf %lf %lf %lf %lf", &e[0], &e[1], &e[2], &w[0], &w[1], &w[2]) == 6) {{
        for (k = 0; k < 3; ++k) {{
            tau[k] = 0.0;
            if (free_axis[k]) {{
                integral[k] += e[k] * {dt:.17e};
                tau[k] = -(kp[k] * e[k] + ki[k] * integral[k] + kd[k] * w[k]);
            }}
        }}
        pw_duty_cycles(tau, duty, 0);
        for (i = 0; i < PW_PORT_COUNT; ++i) {{
            printf("%.17g ", (double)duty[i]);
        }}
        printf("\n");
    }}
    return 0;
}}
"#,
        kp = arr(&|k| g[k].kp),
        ki = arr(&|k| g[k].ki),
        kd = arr(&|k| g[k].kd),
        f0 = free[0] as i32,
        f1 = free[1] as i32,
        f2 = free[2] as i32,
    );
    let dir = tempfile::tempdir().unwrap();
    let out = compile_and_feed(dir.path(), &header, &main, &input);
    let got: Vec<Vec<f64>> = out
        .lines()
        .map(|l| l.split_whitespace().map(|x| x.parse().unwrap()).collect())
        .collect();
    assert_eq!(got.len(), want.len());
    let mut active = 0;
    for (i, (g, w)) in got.iter().zip(&want).enumerate() {
        assert_eq!(g.len(), n);
        if w.iter().any(|d| *d > 0.0) {
            active += 1;
        }
        for p in 0..n {
            // The header holds the map's coefficients printed to 17 digits; the
            // duties agree to round-off of a 3×3 product.
            assert!(
                (g[p] - w[p]).abs() < 1e-9,
                "control step {i}, port {p}: C {} vs simulator {}",
                g[p],
                w[p]
            );
        }
    }
    assert!(active > 3, "the case fires ({active} steps)");
}
