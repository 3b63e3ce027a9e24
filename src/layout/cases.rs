//! The `[[case]]` sections: simulation cases, read typed from the layout text (a
//! wrong type or unknown field comes back with its place), checked against the
//! design (the flight state must exist), and handed to [`crate::sim`] as SI data.
//!
//! A spread in `[case.spread]` is written as in `[tolerances]`: `"±1 ms"`
//! (uniform) or `"sigma 2 deg/s"` (normal); `disturbance` is relative (`"±20 %"`).

use super::{line_column, Diagnostic};
use crate::asbuilt::spec::Spread;
use crate::model::Design;
use crate::sim::case::{
    AxisGains, Case, Controller, Disturbance, Gains, Mount, Phase, Sensing, Spreads,
};
use crate::units::{self, Kind};
use serde::Deserialize;
use std::ops::Range;
use toml::Spanned;

type Q = Spanned<String>;

#[derive(Debug, Deserialize)]
struct Raw {
    #[serde(default)]
    case: Vec<Spanned<CaseFile>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct CaseFile {
    name: Spanned<String>,
    state: Spanned<String>,
    phase: Option<Spanned<String>>,
    burn_time: Option<Q>,
    duration: Q,
    pointing: Q,
    start_error: Option<Spanned<Vec<Q>>>,
    tip_off: Option<Spanned<Vec<Q>>>,
    minimum_on_time: Option<Q>,
    controller: Spanned<ControllerFile>,
    sensing: Option<Spanned<SensingFile>>,
    mount: Option<Spanned<MountFile>>,
    #[serde(default)]
    disturbance: Vec<Spanned<DisturbanceFile>>,
    spread: Option<Spanned<SpreadFile>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct ControllerFile {
    kind: Spanned<String>,
    period: Option<Q>,
    deadband: Option<Q>,
    hysteresis: Option<Q>,
    rate_weight: Option<Q>,
    natural_frequency: Option<Q>,
    damping: Option<Spanned<f64>>,
    kp: Option<Spanned<Vec<f64>>>,
    ki: Option<Spanned<Vec<f64>>>,
    kd: Option<Spanned<Vec<f64>>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct SensingFile {
    gyro_noise: Option<Q>,
    gyro_bias: Option<Q>,
    delay: Option<Q>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct MountFile {
    kind: Spanned<String>,
    inertia: Option<Q>,
    friction: Option<Q>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct DisturbanceFile {
    torque: Spanned<Vec<Q>>,
    from: Option<Q>,
    lasting: Option<Q>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct SpreadFile {
    tip_off: Option<Q>,
    start_error: Option<Q>,
    opening_delay: Option<Q>,
    closing_delay: Option<Q>,
    disturbance: Option<Q>,
    gyro_bias: Option<Q>,
}

struct Reader<'a> {
    text: &'a str,
    problems: Vec<Diagnostic>,
}

impl Reader<'_> {
    fn problem(&mut self, span: Range<usize>, field: &str, message: impl Into<String>) {
        let (line, column) = line_column(self.text, span.start);
        self.problems.push(Diagnostic {
            line,
            column,
            field: field.to_string(),
            message: message.into(),
        });
    }

    fn qty(&mut self, q: &Q, field: &str, kind: Kind) -> Option<f64> {
        match units::parse(q.get_ref(), kind) {
            Ok(v) if v.is_finite() => Some(v),
            Ok(_) => None,
            Err(e) => {
                self.problem(q.span(), field, e.to_string());
                None
            }
        }
    }

    /// A quantity at least `min` (strictly above when `strict`).
    fn bounded(&mut self, q: &Q, field: &str, kind: Kind, min: f64, strict: bool) -> Option<f64> {
        let v = self.qty(q, field, kind)?;
        let bad = if strict { v <= min } else { v < min };
        if bad {
            let what = if strict { "above" } else { "at least" };
            self.problem(
                q.span(),
                field,
                format!(
                    "expected a value {what} {}, found \"{}\"",
                    if min == 0.0 {
                        "zero".to_string()
                    } else {
                        min.to_string()
                    },
                    q.get_ref()
                ),
            );
            return None;
        }
        Some(v)
    }

    fn opt(&mut self, q: &Option<Q>, field: &str, kind: Kind, default: f64) -> Option<f64> {
        match q {
            Some(q) => self.bounded(q, field, kind, 0.0, false),
            None => Some(default),
        }
    }

    fn triple(&mut self, v: &Option<Spanned<Vec<Q>>>, field: &str, kind: Kind) -> Option<[f64; 3]> {
        let Some(v) = v else {
            return Some([0.0; 3]);
        };
        self.triple_of(v, field, kind)
    }

    fn triple_of(&mut self, v: &Spanned<Vec<Q>>, field: &str, kind: Kind) -> Option<[f64; 3]> {
        if v.get_ref().len() != 3 {
            let (name, example) = kind.describe();
            self.problem(
                v.span(),
                field,
                format!(
                    "expected three values (roll, pitch, yaw), each {name} such as \"{example}\", found {}",
                    v.get_ref().len()
                ),
            );
            return None;
        }
        let mut out = [0.0; 3];
        let mut ok = true;
        for (k, q) in v.get_ref().iter().enumerate() {
            match self.qty(q, field, kind) {
                Some(x) => out[k] = x,
                None => ok = false,
            }
        }
        ok.then_some(out)
    }

    fn spread(&mut self, q: &Option<Q>, field: &str, kind: Option<Kind>) -> Option<Spread> {
        let q = q.as_ref()?;
        let text = q.get_ref().trim();
        let expected = match kind {
            Some(k) => {
                let (name, example) = k.describe();
                format!("{name} such as \"±{example}\" or \"sigma {example}\"")
            }
            None => "a percentage such as \"±20 %\" or \"sigma 10 %\"".to_string(),
        };
        let (normal, rest) = if let Some(r) = text.strip_prefix('±') {
            (false, r)
        } else if let Some(r) = text.strip_prefix("+/-").or_else(|| text.strip_prefix("+-")) {
            (false, r)
        } else if let Some(r) = text
            .strip_prefix("sigma")
            .or_else(|| text.strip_prefix('σ'))
        {
            (true, r)
        } else {
            self.problem(
                q.span(),
                field,
                format!("no spread given: expected \"±\" (uniform) or \"sigma\" (normal) and {expected}, found \"{text}\""),
            );
            return None;
        };
        let rest = rest.trim();
        let value = match kind {
            Some(k) => match units::parse(rest, k) {
                Ok(v) => v,
                Err(e) => {
                    self.problem(q.span(), field, e.to_string());
                    return None;
                }
            },
            None => match rest.strip_suffix('%').map(|n| n.trim().parse::<f64>()) {
                Some(Ok(v)) => v / 100.0,
                _ => {
                    self.problem(
                        q.span(),
                        field,
                        format!("expected {expected}, found \"{text}\""),
                    );
                    return None;
                }
            },
        };
        if !(value.is_finite() && value >= 0.0) {
            self.problem(
                q.span(),
                field,
                format!("the amount must be zero or more, found \"{text}\""),
            );
            return None;
        }
        Some(if normal {
            Spread::Normal { sigma: value }
        } else {
            Spread::Uniform { half_width: value }
        })
    }

    fn gains(&mut self, v: &Option<Spanned<Vec<f64>>>, field: &str) -> Option<[f64; 3]> {
        let Some(v) = v else {
            return Some([0.0; 3]);
        };
        let g = v.get_ref();
        if g.len() != 3 || g.iter().any(|x| !x.is_finite() || *x < 0.0) {
            self.problem(
                v.span(),
                field,
                "expected three numbers zero or more (roll, pitch, yaw)".to_string(),
            );
            return None;
        }
        Some([g[0], g[1], g[2]])
    }

    fn case(&mut self, c: &CaseFile, design: &Design) -> Option<Case> {
        let name = c.name.get_ref().clone();
        let f = |n: &str| format!("case `{name}`.{n}");
        let state = c.state.get_ref().clone();
        if !design.states.iter().any(|s| s.name == state) {
            let names: Vec<&str> = design.states.iter().map(|s| s.name.as_str()).collect();
            self.problem(
                c.state.span(),
                &f("state"),
                format!(
                    "no flight state named `{state}`; the layout has {}",
                    names.join(", ")
                ),
            );
        }
        let duration = self.bounded(&c.duration, &f("duration"), Kind::Time, 0.0, true);
        let pointing = self.bounded(&c.pointing, &f("pointing"), Kind::Angle, 0.0, true);
        let phase = match c.phase.as_ref().map(|p| p.get_ref().to_ascii_lowercase()) {
            None => Some(Phase::Coast),
            Some(p) if p == "coast" => Some(Phase::Coast),
            Some(p) if p == "burn" => match &c.burn_time {
                Some(q) => self
                    .bounded(q, &f("burn_time"), Kind::Time, 0.0, true)
                    .map(|b| Phase::Burn { burn_time_s: b }),
                None => {
                    let sp = c.phase.as_ref().map(|p| p.span()).unwrap_or(0..0);
                    self.problem(
                        sp,
                        &f("burn_time"),
                        "phase \"burn\" needs a burn_time such as \"1.6 s\"",
                    );
                    None
                }
            },
            Some(p) => {
                let sp = c.phase.as_ref().map(|p| p.span()).unwrap_or(0..0);
                self.problem(
                    sp,
                    &f("phase"),
                    format!("expected \"coast\" or \"burn\", found \"{p}\""),
                );
                None
            }
        };
        let start_error = self.triple(&c.start_error, &f("start_error"), Kind::Angle);
        let tip_off = self.triple(&c.tip_off, &f("tip_off"), Kind::AngularRate);
        let min_on = self.opt(&c.minimum_on_time, &f("minimum_on_time"), Kind::Time, 0.0);

        let ctl = c.controller.get_ref();
        let cf = |n: &str| format!("case `{name}`.controller.{n}");
        let period = match &ctl.period {
            Some(q) => self.bounded(q, &cf("period"), Kind::Time, 0.0, true),
            None => Some(1e-3),
        };
        let kind = ctl.kind.get_ref().to_ascii_lowercase();
        let controller = match kind.as_str() {
            "on-off" | "onoff" => {
                let db = match &ctl.deadband {
                    Some(q) => self.bounded(q, &cf("deadband"), Kind::Angle, 0.0, false),
                    None => {
                        self.problem(
                            ctl.kind.span(),
                            &cf("deadband"),
                            "an on-off controller needs a deadband such as \"1 deg\"",
                        );
                        None
                    }
                };
                let hy = self.opt(&ctl.hysteresis, &cf("hysteresis"), Kind::Angle, 0.0);
                let rw = self.opt(&ctl.rate_weight, &cf("rate_weight"), Kind::Time, 0.0);
                match (db, hy, rw) {
                    (Some(d), Some(h), Some(r)) => {
                        if h > d {
                            if let Some(q) = &ctl.hysteresis {
                                self.problem(
                                    q.span(),
                                    &cf("hysteresis"),
                                    "the hysteresis must not exceed the deadband",
                                );
                            }
                            None
                        } else {
                            Some(Controller::OnOff {
                                deadband_rad: d,
                                hysteresis_rad: h,
                                rate_weight_s: r,
                            })
                        }
                    }
                    _ => None,
                }
            }
            "pd" | "pid" => {
                let integral = kind == "pid";
                if let Some(q) = &ctl.natural_frequency {
                    let w = self.bounded(q, &cf("natural_frequency"), Kind::AngularRate, 0.0, true);
                    let z = match &ctl.damping {
                        Some(d)
                            if d.get_ref().is_finite()
                                && *d.get_ref() > 0.0
                                && *d.get_ref() <= 10.0 =>
                        {
                            Some(*d.get_ref())
                        }
                        Some(d) => {
                            self.problem(
                                d.span(),
                                &cf("damping"),
                                "expected a damping ratio above 0, at most 10, such as 0.7",
                            );
                            None
                        }
                        None => Some(0.7),
                    };
                    match (w, z) {
                        (Some(w), Some(z)) => Some(Controller::Pid {
                            gains: Gains::Bandwidth {
                                natural_frequency_rad_s: w,
                                damping: z,
                                integral,
                            },
                        }),
                        _ => None,
                    }
                } else if ctl.kp.is_some() {
                    let kp = self.gains(&ctl.kp, &cf("kp"));
                    let kd = self.gains(&ctl.kd, &cf("kd"));
                    let ki = if integral {
                        self.gains(&ctl.ki, &cf("ki"))
                    } else {
                        Some([0.0; 3])
                    };
                    match (kp, ki, kd) {
                        (Some(p), Some(i), Some(d)) => Some(Controller::Pid {
                            gains: Gains::Direct([0, 1, 2].map(|k| AxisGains {
                                kp: p[k],
                                ki: i[k],
                                kd: d[k],
                            })),
                        }),
                        _ => None,
                    }
                } else {
                    self.problem(
                        ctl.kind.span(),
                        &cf("natural_frequency"),
                        "a PD or PID controller needs natural_frequency (and damping), or kp and kd",
                    );
                    None
                }
            }
            other => {
                self.problem(
                    ctl.kind.span(),
                    &cf("kind"),
                    format!("expected \"on-off\", \"pd\" or \"pid\", found \"{other}\""),
                );
                None
            }
        };

        let sensing = match &c.sensing {
            None => period.map(|p| Sensing {
                gyro_noise_rad_s: 0.0,
                gyro_bias_rad_s: [0.0; 3],
                control_period_s: p,
                computation_delay_s: 0.0,
            }),
            Some(s) => {
                let s = s.get_ref();
                let sf = |n: &str| format!("case `{name}`.sensing.{n}");
                let noise = self.opt(&s.gyro_noise, &sf("gyro_noise"), Kind::AngularRate, 0.0);
                let bias = match &s.gyro_bias {
                    Some(q) => self.qty(q, &sf("gyro_bias"), Kind::AngularRate),
                    None => Some(0.0),
                };
                let delay = self.opt(&s.delay, &sf("delay"), Kind::Time, 0.0);
                match (noise, bias, delay, period) {
                    (Some(n), Some(b), Some(d), Some(p)) => Some(Sensing {
                        gyro_noise_rad_s: n,
                        gyro_bias_rad_s: [b; 3],
                        control_period_s: p,
                        computation_delay_s: d,
                    }),
                    _ => None,
                }
            }
        };

        let mount = match &c.mount {
            None => Some(Mount::Free),
            Some(m) => {
                let m = m.get_ref();
                let mf = |n: &str| format!("case `{name}`.mount.{n}");
                let friction = self.opt(&m.friction, &mf("friction"), Kind::Torque, 0.0);
                match m.kind.get_ref().to_ascii_lowercase().as_str() {
                    "free" => Some(Mount::Free),
                    "gimbal" => {
                        let inertia = self.opt(&m.inertia, &mf("inertia"), Kind::Inertia, 0.0);
                        match (inertia, friction) {
                            (Some(i), Some(fr)) => Some(Mount::Gimbal {
                                inertia_kg_m2: i,
                                friction_n_m: fr,
                            }),
                            _ => None,
                        }
                    }
                    "line" => friction.map(|fr| Mount::Line { friction_n_m: fr }),
                    other => {
                        self.problem(
                            m.kind.span(),
                            &mf("kind"),
                            format!("expected \"free\", \"gimbal\" or \"line\", found \"{other}\""),
                        );
                        None
                    }
                }
            }
        };

        let mut disturbances = Vec::new();
        let mut dist_ok = true;
        for (i, d) in c.disturbance.iter().enumerate() {
            let d = d.get_ref();
            let df = |n: &str| format!("case `{name}`.disturbance[{}].{n}", i + 1);
            let torque = self.triple_of(&d.torque, &df("torque"), Kind::Torque);
            let from = self.opt(&d.from, &df("from"), Kind::Time, 0.0);
            let lasting = match &d.lasting {
                Some(q) => self
                    .bounded(q, &df("lasting"), Kind::Time, 0.0, true)
                    .map(Some),
                None => Some(None),
            };
            match (torque, from, lasting) {
                (Some(t), Some(fr), Some(l)) => disturbances.push(Disturbance {
                    torque_n_m: t,
                    from_s: fr,
                    lasting_s: l,
                }),
                _ => dist_ok = false,
            }
        }

        let spreads = match &c.spread {
            None => Spreads::default(),
            Some(s) => {
                let s = s.get_ref();
                let sf = |n: &str| format!("case `{name}`.spread.{n}");
                Spreads {
                    tip_off_rate: self.spread(&s.tip_off, &sf("tip_off"), Some(Kind::AngularRate)),
                    start_error: self.spread(&s.start_error, &sf("start_error"), Some(Kind::Angle)),
                    opening_delay: self.spread(
                        &s.opening_delay,
                        &sf("opening_delay"),
                        Some(Kind::Time),
                    ),
                    closing_delay: self.spread(
                        &s.closing_delay,
                        &sf("closing_delay"),
                        Some(Kind::Time),
                    ),
                    disturbance: self.spread(&s.disturbance, &sf("disturbance"), None),
                    gyro_bias: self.spread(&s.gyro_bias, &sf("gyro_bias"), Some(Kind::AngularRate)),
                }
            }
        };
        if let (Some(d), Some(p)) = (duration, period) {
            if d / p > 1e8 {
                self.problem(
                    c.duration.span(),
                    &f("duration"),
                    "at most 10⁸ control periods per case: shorten the duration or lengthen the period",
                );
                return None;
            }
        }
        Some(Case {
            name,
            state,
            phase: phase?,
            duration_s: duration?,
            start_error_rad: start_error?,
            start_rate_rad_s: tip_off?,
            pointing_rad: pointing?,
            disturbances: if dist_ok { disturbances } else { return None },
            sensing: sensing?,
            controller: controller?,
            minimum_on_time_s: min_on?,
            mount: mount?,
            spreads,
            wall_coefficient_area_w_k: None,
        })
    }
}

/// Read the `[[case]]` sections of `text` for `design`. Problems carry line,
/// column and the dotted field.
pub fn read(text: &str, design: &Design) -> Result<Vec<Case>, Vec<Diagnostic>> {
    let raw: Raw = match toml::from_str(text) {
        Ok(r) => r,
        Err(e) => {
            let (line, column) = e
                .span()
                .map(|s| line_column(text, s.start))
                .unwrap_or((1, 1));
            return Err(vec![Diagnostic {
                line,
                column,
                field: "case".to_string(),
                message: e.message().to_string(),
            }]);
        }
    };
    let mut r = Reader {
        text,
        problems: Vec::new(),
    };
    let mut out = Vec::new();
    for c in &raw.case {
        let name = c.get_ref().name.get_ref();
        if out.iter().any(|x: &Case| &x.name == name) {
            r.problem(
                c.get_ref().name.span(),
                "case.name",
                format!("a second case named `{name}`: names must differ"),
            );
            continue;
        }
        if let Some(case) = r.case(c.get_ref(), design) {
            out.push(case);
        }
    }
    if r.problems.is_empty() {
        Ok(out)
    } else {
        Err(r.problems)
    }
}
