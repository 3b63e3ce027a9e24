//! What the builder expects to get wrong: each tolerance as a spread (uniform ±
//! or normal σ) on one input of the design, already in SI.
//!
//! The layout reader turns a `[tolerances]` section into a [`ToleranceSpec`];
//! [`ToleranceSpec::inputs`] lists every scalar input that varies, so sampling,
//! sensitivities and the robust objective all walk the same list. Deviations
//! are absolute SI amounts except for mass and the inertias, which are
//! fractions of the nominal value (their nominal differs between flight
//! states, the relative error does not).

use rand::Rng;
use serde::Serialize;

/// How a deviation is distributed about zero.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Spread {
    /// Uniform on [−half_width, +half_width].
    Uniform {
        /// Half width, SI units of the input (or a fraction for relative inputs).
        half_width: f64,
    },
    /// Normal with mean zero.
    Normal {
        /// Standard deviation, same units.
        sigma: f64,
    },
}

impl Spread {
    /// Standard deviation of the deviation.
    pub fn std_dev(&self) -> f64 {
        match *self {
            Spread::Uniform { half_width } => half_width / 3f64.sqrt(),
            Spread::Normal { sigma } => sigma,
        }
    }

    /// One deviation.
    pub fn draw<R: Rng + ?Sized>(&self, rng: &mut R) -> f64 {
        match *self {
            Spread::Uniform { half_width } => {
                if half_width == 0.0 {
                    0.0
                } else {
                    rng.gen_range(-half_width..=half_width)
                }
            }
            Spread::Normal { sigma } => {
                // Box–Muller transform; 1 − u keeps the logarithm finite.
                let u1: f64 = 1.0 - rng.gen::<f64>();
                let u2: f64 = rng.gen::<f64>();
                sigma * (-2.0 * u1.ln()).sqrt() * (std::f64::consts::TAU * u2).cos()
            }
        }
    }

    /// The same shape scaled by `factor` (used to turn a relative spread into an absolute one).
    pub fn scaled(&self, factor: f64) -> Spread {
        match *self {
            Spread::Uniform { half_width } => Spread::Uniform {
                half_width: half_width * factor.abs(),
            },
            Spread::Normal { sigma } => Spread::Normal {
                sigma: sigma * factor.abs(),
            },
        }
    }

    /// "±0.5" or "σ 0.5" with the given scale and unit, for reports.
    pub fn describe(&self, scale: f64, unit: &str) -> String {
        match *self {
            Spread::Uniform { half_width } => format!("±{} {unit}", trim(half_width * scale)),
            Spread::Normal { sigma } => format!("σ {} {unit}", trim(sigma * scale)),
        }
    }
}

fn trim(v: f64) -> String {
    let s = format!("{v:.4}");
    let s = s.trim_end_matches('0').trim_end_matches('.').to_string();
    if s == "-0" {
        "0".to_string()
    } else {
        s
    }
}

/// Tolerances of one port; `None` where the port is taken as drawn.
#[derive(Debug, Clone, Copy, Default, PartialEq, Serialize)]
pub struct PortTolerances {
    /// Station of the hole centre, m.
    pub station: Option<Spread>,
    /// Clock angle, rad.
    pub clock: Option<Spread>,
    /// Tangential cant of the hole axis, rad.
    pub tangential_cant: Option<Spread>,
    /// Axial cant of the hole axis, rad.
    pub axial_cant: Option<Spread>,
    /// Hole (or throat) diameter, m; a converging–diverging exit scales with it.
    pub hole: Option<Spread>,
    /// Discharge coefficient (absolute).
    pub discharge_coefficient: Option<Spread>,
    /// The port's valve flow coefficient Cv (absolute; for an orifice valve, the
    /// same relative change of its flow area).
    pub valve_cv: Option<Spread>,
}

/// Every tolerance of a layout, in SI, one [`PortTolerances`] per port in layout order.
#[derive(Debug, Clone, Default, PartialEq, Serialize)]
pub struct ToleranceSpec {
    /// Per port, in the design's port order.
    pub ports: Vec<PortTolerances>,
    /// Regulator set pressure, Pa (a pressure difference).
    pub set_pressure: Option<Spread>,
    /// Valve opening delay, s.
    pub opening_delay: Option<Spread>,
    /// Valve closing delay, s.
    pub closing_delay: Option<Spread>,
    /// Vehicle mass, fraction of nominal (scales both inertias with it).
    pub mass: Option<Spread>,
    /// CG station, m (the same shift at every flight state).
    pub cg_station: Option<Spread>,
    /// Roll inertia, fraction of nominal.
    pub ixx: Option<Spread>,
    /// Pitch and yaw inertia, fraction of nominal.
    pub iyy: Option<Spread>,
    /// Motor thrust misalignment, rad, added to the requirement's nominal angle.
    pub motor_misalignment: Option<Spread>,
}

/// One scalar input that varies.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(tag = "input", content = "port", rename_all = "snake_case")]
pub enum Input {
    /// Station of port i, m.
    Station(usize),
    /// Clock of port i, rad.
    Clock(usize),
    /// Tangential cant of port i, rad.
    TangentialCant(usize),
    /// Axial cant of port i, rad.
    AxialCant(usize),
    /// Hole diameter of port i, m.
    Hole(usize),
    /// Discharge coefficient of port i.
    DischargeCoefficient(usize),
    /// Valve Cv of port i.
    ValveCv(usize),
    /// Regulator set pressure, Pa.
    SetPressure,
    /// Valve opening delay, s.
    OpeningDelay,
    /// Valve closing delay, s.
    ClosingDelay,
    /// Mass, fraction.
    Mass,
    /// CG station, m.
    CgStation,
    /// Roll inertia, fraction.
    Ixx,
    /// Pitch/yaw inertia, fraction.
    Iyy,
    /// Motor misalignment, rad.
    Misalignment,
}

impl Input {
    /// Plain name with the port's name where there is one.
    pub fn label(&self, port_names: &[String]) -> String {
        let p = |i: usize| port_names.get(i).cloned().unwrap_or_default();
        match *self {
            Input::Station(i) => format!("{} station", p(i)),
            Input::Clock(i) => format!("{} clock", p(i)),
            Input::TangentialCant(i) => format!("{} tangential cant", p(i)),
            Input::AxialCant(i) => format!("{} axial cant", p(i)),
            Input::Hole(i) => format!("{} hole diameter", p(i)),
            Input::DischargeCoefficient(i) => format!("{} discharge coefficient", p(i)),
            Input::ValveCv(i) => format!("{} valve Cv", p(i)),
            Input::SetPressure => "regulator set pressure".to_string(),
            Input::OpeningDelay => "valve opening delay".to_string(),
            Input::ClosingDelay => "valve closing delay".to_string(),
            Input::Mass => "vehicle mass".to_string(),
            Input::CgStation => "CG station".to_string(),
            Input::Ixx => "roll inertia".to_string(),
            Input::Iyy => "pitch and yaw inertia".to_string(),
            Input::Misalignment => "motor misalignment".to_string(),
        }
    }
}

impl ToleranceSpec {
    /// Every input that varies, with its spread, in a fixed order (ports first,
    /// in layout order, then the vehicle-wide inputs). Zero-width spreads are left out.
    pub fn inputs(&self) -> Vec<(Input, Spread)> {
        let mut out = Vec::new();
        let mut push = |input: Input, s: Option<Spread>| {
            if let Some(s) = s {
                if s.std_dev() > 0.0 {
                    out.push((input, s));
                }
            }
        };
        for (i, p) in self.ports.iter().enumerate() {
            push(Input::Station(i), p.station);
            push(Input::Clock(i), p.clock);
            push(Input::TangentialCant(i), p.tangential_cant);
            push(Input::AxialCant(i), p.axial_cant);
            push(Input::Hole(i), p.hole);
            push(Input::DischargeCoefficient(i), p.discharge_coefficient);
            push(Input::ValveCv(i), p.valve_cv);
        }
        push(Input::SetPressure, self.set_pressure);
        push(Input::OpeningDelay, self.opening_delay);
        push(Input::ClosingDelay, self.closing_delay);
        push(Input::Mass, self.mass);
        push(Input::CgStation, self.cg_station);
        push(Input::Ixx, self.ixx);
        push(Input::Iyy, self.iyy);
        push(Input::Misalignment, self.motor_misalignment);
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use rand::SeedableRng;

    #[test]
    fn sample_variance_matches_the_spread() {
        // Closed forms: Var(U(−a, a)) = a²/3, Var(N(0, σ)) = σ². With 200 000
        // draws the relative standard error of a sample variance is below 0.4 %
        // (√(2/n) for the normal, less for the uniform); 2 % is five of those.
        let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(7);
        for s in [
            Spread::Uniform { half_width: 0.3 },
            Spread::Normal { sigma: 0.2 },
        ] {
            let n = 200_000;
            let v: Vec<f64> = (0..n).map(|_| s.draw(&mut rng)).collect();
            let mean = v.iter().sum::<f64>() / n as f64;
            let var = v.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (n - 1) as f64;
            let want = s.std_dev().powi(2);
            assert!((var / want - 1.0).abs() < 0.02, "{s:?}: {var} vs {want}");
        }
    }
}
