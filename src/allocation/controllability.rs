//! Controllability of the torque columns: rank, positive span, and which of the
//! six body-axis directions the ports cannot produce, said in words.
//!
//! The answers come from the exact torque zonotope: the columns positively span
//! R³ exactly when the origin is strictly inside Σ[0, bᵢ] (every facet offset is
//! positive). Along each axis direction e there are three cases:
//! - no port has a component along e (support value h(e) = 0);
//! - some ports do, but only together with torque on another axis, so a pure
//!   e torque is out of reach (ray maximum 0 while h(e) > 0);
//! - a pure e torque is attainable.

use super::{Effectiveness, Tolerances, Zonotope, ZonotopeError};
use nalgebra::Vector3;

/// One of the six signed body-axis directions.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum AxisDirection {
    /// +roll, about +x.
    PositiveRoll,
    /// −roll.
    NegativeRoll,
    /// +pitch, about +y.
    PositivePitch,
    /// −pitch.
    NegativePitch,
    /// +yaw, about +z.
    PositiveYaw,
    /// −yaw.
    NegativeYaw,
}

impl AxisDirection {
    /// All six, in the order +roll, −roll, +pitch, −pitch, +yaw, −yaw.
    pub const ALL: [AxisDirection; 6] = [
        AxisDirection::PositiveRoll,
        AxisDirection::NegativeRoll,
        AxisDirection::PositivePitch,
        AxisDirection::NegativePitch,
        AxisDirection::PositiveYaw,
        AxisDirection::NegativeYaw,
    ];

    /// Unit vector in the body frame.
    pub fn unit(self) -> Vector3<f64> {
        match self {
            AxisDirection::PositiveRoll => Vector3::x(),
            AxisDirection::NegativeRoll => -Vector3::x(),
            AxisDirection::PositivePitch => Vector3::y(),
            AxisDirection::NegativePitch => -Vector3::y(),
            AxisDirection::PositiveYaw => Vector3::z(),
            AxisDirection::NegativeYaw => -Vector3::z(),
        }
    }

    /// Plain words, e.g. "negative roll".
    pub fn words(self) -> &'static str {
        match self {
            AxisDirection::PositiveRoll => "positive roll",
            AxisDirection::NegativeRoll => "negative roll",
            AxisDirection::PositivePitch => "positive pitch",
            AxisDirection::NegativePitch => "negative pitch",
            AxisDirection::PositiveYaw => "positive yaw",
            AxisDirection::NegativeYaw => "negative yaw",
        }
    }
}

/// How well one axis direction can be reached.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum AxisReach {
    /// A pure torque along the direction is attainable, up to this many N·m.
    Pure(f64),
    /// Ports push that way, but only with torque on other axes; the number is the
    /// support value h(e) in N·m (the best component along e).
    ComponentOnly(f64),
    /// No port has any component along the direction.
    None,
}

/// The controllability summary of one effectiveness matrix.
#[derive(Debug, Clone, PartialEq)]
pub struct Controllability {
    /// Rank of the torque columns (0 to 3).
    pub rank: usize,
    /// True when the torque columns positively span R³: any torque direction is attainable.
    pub positive_span: bool,
    /// Reach along +roll, −roll, +pitch, −pitch, +yaw, −yaw (order of [`AxisDirection::ALL`]).
    pub reach: [(AxisDirection, AxisReach); 6],
    /// Ports whose torque column is zero (they add nothing to the torque set).
    pub idle_ports: Vec<usize>,
}

impl Controllability {
    /// Analyses the torque columns of `e`.
    pub fn of(e: &Effectiveness, tol: &Tolerances) -> Result<Self, ZonotopeError> {
        let z = Zonotope::torque(e, tol)?;
        Ok(Self::from_zonotope(e, &z, tol))
    }

    /// Same, reusing an already built torque zonotope of `e`.
    pub fn from_zonotope(e: &Effectiveness, z: &Zonotope, tol: &Tolerances) -> Self {
        let floor = tol.rank * z.scale();
        let reach = AxisDirection::ALL.map(|d| {
            let u = d.unit();
            let h = z.support(&u);
            let t = z.max_along(&u);
            let r = if h <= floor {
                AxisReach::None
            } else if t <= floor {
                AxisReach::ComponentOnly(h)
            } else {
                AxisReach::Pure(t)
            };
            (d, r)
        });
        let idle_ports = (0..e.len())
            .filter(|&i| {
                let len = e.torque().column(i).norm();
                len == 0.0 || len <= tol.zero_column * z.scale()
            })
            .collect();
        Self {
            rank: z.rank(),
            positive_span: z.origin_interior(),
            reach,
            idle_ports,
        }
    }

    /// Directions that cannot be reached as a pure torque.
    pub fn missing(&self) -> Vec<AxisDirection> {
        self.reach
            .iter()
            .filter(|(_, r)| !matches!(r, AxisReach::Pure(_)))
            .map(|(d, _)| *d)
            .collect()
    }

    /// Findings in plain words, one per line, using the port names of `e`.
    pub fn findings(&self, e: &Effectiveness) -> Vec<String> {
        let mut out = Vec::new();
        if self.rank < 3 {
            out.push(format!(
                "the port torques span only {} of the 3 axes",
                self.rank
            ));
        }
        for (d, r) in &self.reach {
            match r {
                AxisReach::None => out.push(format!("no port gives {}", d.words())),
                AxisReach::ComponentOnly(_) => out.push(format!(
                    "{} comes only together with torque on another axis",
                    d.words()
                )),
                AxisReach::Pure(_) => {}
            }
        }
        for &i in &self.idle_ports {
            out.push(format!("port `{}` gives no torque", e.names()[i]));
        }
        out
    }
}
