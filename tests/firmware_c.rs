//! The firmware header compiled and run: a C program evaluates commands inside
//! and outside the envelope with the generated tables, and its duty cycles and
//! valve masks are compared with the Rust allocation engine. Also the golden
//! files of the three formats (refresh with `PORTWRIGHT_BLESS=1 cargo test --test
//! firmware_c`).

use nalgebra::Vector3;
use portwright::allocation::{
    AllocationStatus, Effectiveness, MinGasAllocator, OnOffOptions, OnOffPlan, PortGeometry,
    RegionMap, SideForceLimit, Tolerances,
};
use portwright::export::firmware::{
    build_tables, onoff_row, render_c_header, render_csv, render_json, FirmwareTables, TableNames,
};
use std::f64::consts::{FRAC_PI_2, FRAC_PI_4};
use std::fmt::Write as _;
use std::path::{Path, PathBuf};
use std::process::Command;

const G0: f64 = 9.806_65;
/// Body tube radius, m (a 54 mm airframe).
const RADIUS: f64 = 0.027;

/// Strict flags: the required set plus pedantic, conversion and shadow checks.
const FLAGS: &[&str] = &[
    "-std=c99",
    "-Wall",
    "-Wextra",
    "-Werror",
    "-pedantic",
    "-Wconversion",
    "-Wdouble-promotion",
    "-Wshadow",
];

/// Four radial pitch/yaw ports 0.45 m aft of the CG (1.5 N) and four tangential
/// roll ports 0.30 m aft at clock 45° + k·90° (1.0 N, alternating sense), all
/// with a 45 s specific impulse. Symmetric, and the roll ports also disturb
/// pitch and yaw through their lever arm, so regions mix all axes.
fn eight_ports() -> Effectiveness {
    let mut ports: Vec<PortGeometry> = (0..4)
        .map(|k| {
            let a = k as f64 * FRAC_PI_2;
            PortGeometry {
                name: format!("radial-{k}"),
                position_m: Vector3::new(-0.45, RADIUS * a.cos(), RADIUS * a.sin()),
                direction: -Vector3::new(0.0, a.cos(), a.sin()),
                thrust_n: 1.5,
                mass_flow_kg_s: 1.5 / (45.0 * G0),
            }
        })
        .collect();
    ports.extend((0..4).map(|k| {
        let a = FRAC_PI_4 + k as f64 * FRAC_PI_2;
        let sense = if k % 2 == 0 { 1.0 } else { -1.0 };
        PortGeometry {
            name: format!("roll-{k}"),
            position_m: Vector3::new(-0.30, RADIUS * a.cos(), RADIUS * a.sin()),
            direction: Vector3::new(0.0, -a.sin(), a.cos()) * sense,
            thrust_n: 1.0,
            mass_flow_kg_s: 1.0 / (45.0 * G0),
        }
    }));
    Effectiveness::from_ports(&ports).expect("valid ports")
}

/// A pitch/yaw-only vehicle: four radial ports 0.45 m aft of the CG at clock
/// 20° + k·90° with unequal thrusts (1.2 to 1.8 N) and a fifth 0.25 m aft, so the
/// duty-cycle map lives on pitch and yaw only and its regions differ in shape.
fn pitch_yaw_ports() -> Effectiveness {
    let ports: Vec<PortGeometry> = (0..5)
        .map(|k| {
            let a = 20f64.to_radians() + k as f64 * FRAC_PI_2 + if k == 4 { 0.6 } else { 0.0 };
            let station = if k == 4 { -0.25 } else { -0.45 };
            let thrust = 1.2 + 0.15 * k as f64;
            PortGeometry {
                name: format!("radial-{k}"),
                position_m: Vector3::new(station, RADIUS * a.cos(), RADIUS * a.sin()),
                direction: -Vector3::new(0.0, a.cos(), a.sin()),
                thrust_n: thrust,
                mass_flow_kg_s: thrust / (45.0 * G0),
            }
        })
        .collect();
    Effectiveness::from_ports(&ports).expect("valid ports")
}

/// The small fixed case of the golden files: four radial ports and two roll ports.
fn six_ports() -> Effectiveness {
    let mut ports: Vec<PortGeometry> = (0..4)
        .map(|k| {
            let a = k as f64 * FRAC_PI_2;
            PortGeometry {
                name: format!("radial-{k}"),
                position_m: Vector3::new(-0.45, RADIUS * a.cos(), RADIUS * a.sin()),
                direction: -Vector3::new(0.0, a.cos(), a.sin()),
                thrust_n: 1.5,
                mass_flow_kg_s: 1.5 / (45.0 * G0),
            }
        })
        .collect();
    for (k, sense) in [(0, 1.0), (2, -1.0)] {
        let a = FRAC_PI_4 + k as f64 * FRAC_PI_2;
        ports.push(PortGeometry {
            name: format!("roll-{k}"),
            position_m: Vector3::new(-0.30, RADIUS * a.cos(), RADIUS * a.sin()),
            direction: Vector3::new(0.0, -a.sin(), a.cos()) * sense,
            thrust_n: 1.0,
            mass_flow_kg_s: 1.0 / (45.0 * G0),
        });
    }
    Effectiveness::from_ports(&ports).expect("valid ports")
}

fn tables_for(e: &Effectiveness, layout: &str, grid: Option<usize>) -> FirmwareTables {
    build_tables(
        e,
        &TableNames {
            layout: layout.into(),
            flight_state: "coast".into(),
        },
        &OnOffOptions::default(),
        &|_| 1.0,
        &Tolerances::default(),
        grid,
    )
    .expect("tables build")
}

fn compiler() -> String {
    let cc = std::env::var("CC").unwrap_or_else(|_| "cc".to_string());
    if let Err(e) = Command::new(&cc).arg("--version").output() {
        panic!(
            "these tests compile the generated C header, but the C compiler `{cc}` could not be \
             run ({e}); install gcc (or clang) or point CC at a C compiler"
        );
    }
    cc
}

/// Compiles `source` with the strict flags (plus `extra`) and returns the program path.
fn compile(dir: &Path, source: &str, name: &str, extra: &[&str]) -> PathBuf {
    let cc = compiler();
    let src = dir.join(format!("{name}.c"));
    std::fs::write(&src, source).expect("write C source");
    let exe = dir.join(name);
    let out = Command::new(&cc)
        .args(FLAGS)
        .args(extra)
        .arg("-I")
        .arg(dir)
        .arg(&src)
        .arg("-o")
        .arg(&exe)
        .output()
        .expect("compiler runs");
    assert!(
        out.status.success(),
        "`{cc}` rejected {name}.c:\n{}",
        String::from_utf8_lossy(&out.stderr)
    );
    exe
}

fn run(exe: &Path) -> String {
    let out = Command::new(exe).output().expect("program runs");
    assert!(out.status.success(), "{} failed", exe.display());
    String::from_utf8(out.stdout).expect("ASCII output")
}

/// Commands: inside by construction (B·u with u in the box), pure axes, the
/// origin, and out of reach (large multiples), with a fixed seed.
fn commands(e: &Effectiveness) -> Vec<Vector3<f64>> {
    let mut seed: u64 = 0x2545_F491_4F6C_DD1D;
    let mut next = || {
        seed ^= seed << 13;
        seed ^= seed >> 7;
        seed ^= seed << 17;
        (seed >> 11) as f64 / (1u64 << 53) as f64
    };
    let mut out = vec![Vector3::zeros()];
    for a in 0..3 {
        for s in [0.3, -0.7, 5.0, -5.0] {
            let mut t = Vector3::zeros();
            t[a] = s * 0.5;
            out.push(t);
        }
    }
    for _ in 0..60 {
        let u: Vec<f64> = (0..e.len()).map(|_| next()).collect();
        out.push(e.torque_for(&u) * 0.98);
    }
    for _ in 0..30 {
        let d = Vector3::new(next() - 0.5, next() - 0.5, next() - 0.5);
        out.push(d * 20.0);
    }
    out
}

fn program(cmds: &[Vector3<f64>]) -> String {
    let mut s = String::from("#include <stdio.h>\n#include \"tables.h\"\n\n");
    s.push_str("static const double commands[][3] = {\n");
    for c in cmds {
        writeln!(s, "    {{{:e}, {:e}, {:e}}},", c.x, c.y, c.z).expect("string");
    }
    s.push_str("};\n");
    s.push_str(
        r#"
int main(void)
{
    const int count = (int)(sizeof commands / sizeof commands[0]);
    volatile double zero = 0.0;
    pw_real duty[PW_PORT_COUNT];
    pw_real tau[3];
    pw_real s;
    int c, i, k, p, r, y;

    for (c = 0; c < count; ++c) {
        int st;
        for (k = 0; k < 3; ++k) {
            tau[k] = (pw_real)commands[c][k];
        }
        st = pw_duty_cycles(tau, duty, &s);
        printf("duty %d %d %.17g", c, st, (double)s);
        for (i = 0; i < PW_PORT_COUNT; ++i) {
            printf(" %.17g", (double)duty[i]);
        }
        printf("\n");
    }
    for (r = -1; r <= 1; ++r) {
        for (p = -1; p <= 1; ++p) {
            for (y = -1; y <= 1; ++y) {
                printf("mask %d %d %d %d %llu\n", r, p, y, pw_onoff_row(r, p, y),
                       (unsigned long long)pw_onoff_mask(r * 3, p * 2, y));
            }
        }
    }
    for (p = 0; p < PW_GRID_COUNT; ++p) {
        double worst = 0.0;
        pw_duty_cycles(pw_grid[p].torque_nm, duty, &s);
        for (i = 0; i < PW_PORT_COUNT; ++i) {
            double d = (double)(duty[i] - pw_grid[p].duty[i]);
            if (d < 0.0) {
                d = -d;
            }
            if (d > worst) {
                worst = d;
            }
        }
        printf("grid %d %.17g\n", p, worst);
    }
    tau[0] = (pw_real)(zero / zero);
    tau[1] = PW_R(0.0);
    tau[2] = PW_R(0.0);
    printf("nan %d\n", pw_duty_cycles(tau, duty, &s));
    return 0;
}
"#,
    );
    s
}

struct Duty {
    status: i32,
    scale: f64,
    duty: Vec<f64>,
}

fn parse_duties(out: &str) -> Vec<Duty> {
    out.lines()
        .filter_map(|l| l.strip_prefix("duty "))
        .map(|l| {
            let f: Vec<&str> = l.split_whitespace().collect();
            Duty {
                status: f[1].parse().expect("status"),
                scale: f[2].parse().expect("scale"),
                duty: f[3..].iter().map(|v| v.parse().expect("duty")).collect(),
            }
        })
        .collect()
}

/// Runs the C evaluation (double or float) and checks it against the engine.
/// `duty_tol` is the absolute agreement asked of the duty cycles.
fn check_c_against_engine(e: &Effectiveness, float: bool, duty_tol: f64) {
    let e = e.clone();
    let tol = Tolerances::default();
    let tables = tables_for(&e, "test layout", Some(5));
    let dir = tempfile::tempdir().expect("temp dir");
    std::fs::write(
        dir.path().join("tables.h"),
        render_c_header(&tables).expect("renders"),
    )
    .expect("write header");
    let cmds = commands(&e);
    let extra: &[&str] = if float { &["-DPW_USE_FLOAT"] } else { &[] };
    let exe = compile(dir.path(), &program(&cmds), "evaluate", extra);
    let out = run(&exe);

    let map = RegionMap::new(&e, &tol).expect("map");
    let mut lp = MinGasAllocator::new(&e, SideForceLimit::Free, &tol).expect("allocator");
    let scale = map.zonotope().scale();
    let got = parse_duties(&out);
    assert_eq!(got.len(), cmds.len());
    let (mut inside, mut outside) = (0, 0);
    for (i, (tau, c)) in cmds.iter().zip(&got).enumerate() {
        let from_map = map.evaluate(tau).expect("covered");
        // The map and the C code follow only the axes the ports span (all three for
        // the eight-port case); the simplex is given the command on those axes.
        let tau = &map.spanned(tau);
        let from_lp = lp.allocate(tau).expect("solves");
        let exact = from_lp.status == AllocationStatus::Exact;
        assert_eq!(c.status, if exact { 0 } else { 1 }, "command {i} {tau:?}");
        assert_eq!(from_map.status, from_lp.status);
        assert!(
            (c.scale - from_lp.scale).abs() <= duty_tol,
            "command {i}: scale {} from C, {} from the simplex",
            c.scale,
            from_lp.scale
        );
        for (p, (x, y)) in c.duty.iter().zip(&from_map.duty).enumerate() {
            assert!(
                (x - y).abs() <= duty_tol,
                "command {i} {tau:?} port {p}: duty {x} from C, {y} from the region map"
            );
            assert!((0.0..=1.0).contains(x));
        }
        // The simplex may pick another optimal vertex where ports tie on gas, so
        // it is compared on what is unique: the gas and the torque.
        let gas = e.gas_for(&c.duty);
        assert!(
            (gas - from_lp.gas_rate_kg_s).abs() <= duty_tol * e.mass_flow_kg_s().sum(),
            "command {i}: gas {gas} from C, {} from the simplex",
            from_lp.gas_rate_kg_s
        );
        let achieved = e.torque_for(&c.duty);
        let want = tau * c.scale;
        assert!(
            (achieved - want).norm() <= duty_tol * e.len() as f64 * scale,
            "command {i}: B·u = {achieved:?}, want {want:?}"
        );
        if exact {
            inside += 1;
            assert_eq!(c.scale, 1.0);
        } else {
            outside += 1;
        }
    }
    assert!(
        inside >= 60 && outside >= 30,
        "{inside} inside, {outside} outside"
    );

    let plan = OnOffPlan::new(&e, &OnOffOptions::default(), &|_| 1.0, &tol).expect("plans");
    let masks: Vec<(i8, i8, i8, usize, u64)> = out
        .lines()
        .filter_map(|l| l.strip_prefix("mask "))
        .map(|l| {
            let f: Vec<&str> = l.split_whitespace().collect();
            (
                f[0].parse().expect("roll"),
                f[1].parse().expect("pitch"),
                f[2].parse().expect("yaw"),
                f[3].parse().expect("row"),
                f[4].parse().expect("mask"),
            )
        })
        .collect();
    assert_eq!(masks.len(), 27);
    for (r, p, y, row, mask) in masks {
        assert_eq!(row, onoff_row([r, p, y]));
        let want = match plan.get([r, p, y]) {
            Some(sel) => sel.set().ports.iter().fold(0u64, |m, &q| m | 1 << q),
            None => 0,
        };
        assert_eq!(mask, want, "command ({r}, {p}, {y})");
    }

    let grid: Vec<f64> = out
        .lines()
        .filter_map(|l| l.strip_prefix("grid "))
        .map(|l| {
            l.split_whitespace()
                .nth(1)
                .expect("value")
                .parse()
                .expect("number")
        })
        .collect();
    assert_eq!(grid.len(), 125);
    assert!(
        grid.iter().all(|d| *d <= duty_tol),
        "grid disagrees: {grid:?}"
    );
    assert!(out.contains("nan -1\n"));
}

#[test]
fn double_header_matches_the_engine() {
    // Double: the same arithmetic as the Rust map up to the order of a few sums,
    // so 1e-9 is generous; it is the region slack, the largest legitimate gap.
    check_c_against_engine(&eight_ports(), false, 1e-9);
}

#[test]
fn float_header_matches_the_engine() {
    // Float: 7 significant digits on duties of order one, each a sum of three
    // products; 1e-5 leaves two orders of magnitude for rounding.
    check_c_against_engine(&eight_ports(), true, 1e-5);
}

#[test]
fn pitch_yaw_header_matches_the_engine() {
    // The two-axis map: same tolerances as the three-axis case, both precisions;
    // commands with a roll part are evaluated on pitch and yaw alone by both sides.
    check_c_against_engine(&pitch_yaw_ports(), false, 1e-9);
    check_c_against_engine(&pitch_yaw_ports(), true, 1e-5);
    let t = tables_for(&pitch_yaw_ports(), "two-axis", None);
    assert_eq!(t.map_axes, ["pitch", "yaw"]);
    let h = render_c_header(&t).expect("renders");
    assert!(h.contains("#define PW_BASIC_COUNT 2"));
    assert!(h.contains("#define PW_MAP_ROLL 0"));
    assert!(h.contains("pitch and yaw only"));
    assert!(render_csv(&t).contains("\nmap_axes,pitch yaw\n"));
}

/// 34 ports, more than a 32-bit mask holds: four rings of tangential and radial
/// ports at different stations, generated here.
fn many_ports(count: usize) -> Effectiveness {
    let ports: Vec<PortGeometry> = (0..count)
        .map(|k| {
            let a = k as f64 * 0.61;
            let station = -0.15 - 0.04 * (k % 9) as f64;
            let radial = Vector3::new(0.0, a.cos(), a.sin());
            let tangent = Vector3::new(0.0, -a.sin(), a.cos());
            let sense = if k % 2 == 0 { 1.0 } else { -1.0 };
            let direction = if k % 3 == 0 {
                -radial
            } else {
                (tangent * sense + radial * 0.4).normalize()
            };
            let thrust = 0.8 + 0.01 * k as f64;
            PortGeometry {
                name: format!("p{k}"),
                position_m: Vector3::new(station, RADIUS * a.cos(), RADIUS * a.sin()),
                direction,
                thrust_n: thrust,
                mass_flow_kg_s: thrust / (45.0 * G0),
            }
        })
        .collect();
    Effectiveness::from_ports(&ports).expect("valid ports")
}

#[test]
fn wide_masks_for_more_than_32_ports() {
    // 34 ports: 64-bit masks in C, the on/off rows by integer programming. The
    // header compiles in both precisions and its masks are the plan's, bit for bit
    // (a mask above bit 31 would be lost in 32 bits).
    let e = many_ports(34);
    let tol = Tolerances::default();
    let t = tables_for(&e, "34 ports", None);
    let h = render_c_header(&t).expect("renders");
    assert!(h.contains("typedef uint64_t pw_mask;"));
    let plan = OnOffPlan::new(&e, &OnOffOptions::default(), &|_| 1.0, &tol).expect("plans");
    let dir = tempfile::tempdir().expect("temp dir");
    std::fs::write(dir.path().join("tables.h"), &h).expect("write header");
    let mut src = String::from("#include <stdio.h>\n#include \"tables.h\"\nint main(void)\n{\n");
    src.push_str("    int r, p, y;\n    for (r = -1; r <= 1; ++r) for (p = -1; p <= 1; ++p) for (y = -1; y <= 1; ++y)\n");
    src.push_str("        printf(\"%d %d %d %llu\\n\", r, p, y, (unsigned long long)pw_onoff_mask(r, p, y));\n");
    src.push_str("    return 0;\n}\n");
    let mut high_bits = 0;
    for extra in [&[][..], &["-DPW_USE_FLOAT"][..]] {
        let exe = compile(dir.path(), &src, "wide", extra);
        for line in run(&exe).lines() {
            let f: Vec<&str> = line.split_whitespace().collect();
            let c = [0, 1, 2].map(|k| f[k].parse::<i8>().expect("sign"));
            let mask: u64 = f[3].parse().expect("mask");
            let want = plan
                .get(c)
                .map(|sel| sel.set().ports.iter().fold(0u64, |m, &q| m | 1 << q))
                .unwrap_or(0);
            assert_eq!(mask, want, "command {c:?}");
            if mask >> 32 != 0 {
                high_bits += 1;
            }
        }
    }
    assert!(high_bits > 0, "no row opens a port above bit 31");
}

fn golden_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/golden")
}

/// Compares `text` with the committed file, or rewrites it when blessing.
fn golden(name: &str, text: &str) {
    let path = golden_dir().join(name);
    if std::env::var_os("PORTWRIGHT_BLESS").is_some() {
        std::fs::create_dir_all(golden_dir()).expect("golden dir");
        std::fs::write(&path, text).expect("write golden file");
        return;
    }
    let want = std::fs::read_to_string(&path).unwrap_or_else(|e| {
        panic!(
            "{} missing ({e}); run PORTWRIGHT_BLESS=1 cargo test --test firmware_c",
            path.display()
        )
    });
    if want != text {
        let line = want
            .lines()
            .zip(text.lines())
            .position(|(a, b)| a != b)
            .unwrap_or_else(|| want.lines().count().min(text.lines().count()));
        panic!(
            "{name} differs from the golden file at line {}:\n  expected: {}\n  got:      {}\n\
             (if the change is intended: PORTWRIGHT_BLESS=1 cargo test --test firmware_c)",
            line + 1,
            want.lines().nth(line).unwrap_or("<end of file>"),
            text.lines().nth(line).unwrap_or("<end of file>"),
        );
    }
}

#[test]
fn golden_files() {
    let tables = tables_for(&six_ports(), "six-port golden case", Some(2));
    let header = render_c_header(&tables).expect("renders");
    golden("six_ports.h", &header);
    golden("six_ports.csv", &render_csv(&tables));
    golden("six_ports.json", &render_json(&tables).expect("renders"));

    // The golden header and a grid-less one compile on their own, in both precisions.
    let plain = render_c_header(&tables_for(&six_ports(), "no grid", None)).expect("renders");
    let dir = tempfile::tempdir().expect("temp dir");
    for (name, text) in [("with_grid", &header), ("without_grid", &plain)] {
        std::fs::write(dir.path().join("tables.h"), text).expect("write header");
        for extra in [&[][..], &["-DPW_USE_FLOAT"][..]] {
            let exe = compile(
                dir.path(),
                "#include \"tables.h\"\nint main(void) { return (int)pw_onoff_mask(0, 0, 0); }\n",
                name,
                extra,
            );
            run(&exe);
        }
    }
}
