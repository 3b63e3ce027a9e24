//! The effectiveness matrix: what each port does to the vehicle at full thrust.
//!
//! Every later step (envelope, allocation, valve sets) reads only this matrix, so
//! the checks on it live here once: matching column counts, finite entries and a
//! non-negative gas flow per port. The fields stay private so that nothing can
//! build an unchecked matrix.

use nalgebra::{DVector, Matrix3xX, Vector3};
use thiserror::Error;

/// Problems found while building an [`Effectiveness`].
#[derive(Debug, Error, Clone, PartialEq)]
pub enum EffectivenessError {
    /// The matrix has no ports at all.
    #[error("the layout has no ports")]
    NoPorts,
    /// Two inputs disagree on the number of ports.
    #[error("`{what}` has {found} entries, expected {expected} (one per port)")]
    CountMismatch {
        /// Which input is the wrong length.
        what: &'static str,
        /// Number of ports implied by the force matrix.
        expected: usize,
        /// Number of entries found.
        found: usize,
    },
    /// An entry is NaN or infinite.
    #[error("port `{port}`: `{what}` is not a finite number")]
    NotFinite {
        /// Name of the port.
        port: String,
        /// Which quantity is bad.
        what: &'static str,
    },
    /// A port's gas flow is negative.
    #[error("port `{port}`: mass flow {value} kg/s is negative")]
    NegativeMassFlow {
        /// Name of the port.
        port: String,
        /// The offending value in kg/s.
        value: f64,
    },
    /// A port's thrust is negative.
    #[error("port `{port}`: thrust {value} N is negative")]
    NegativeThrust {
        /// Name of the port.
        port: String,
        /// The offending value in N.
        value: f64,
    },
    /// A thrust direction is not a unit vector.
    #[error("port `{port}`: thrust direction has length {length}, expected 1")]
    NotUnit {
        /// Name of the port.
        port: String,
        /// Length of the given direction.
        length: f64,
    },
}

/// One port described by its geometry, used by [`Effectiveness::from_ports`].
#[derive(Debug, Clone, PartialEq)]
pub struct PortGeometry {
    /// Port name, used in messages.
    pub name: String,
    /// Position of the thrust point relative to the CG, body frame, m.
    pub position_m: Vector3<f64>,
    /// Unit direction of the force on the vehicle (opposite to the exhaust).
    pub direction: Vector3<f64>,
    /// Thrust at full duty, N.
    pub thrust_n: f64,
    /// Gas mass flow at full duty, kg/s.
    pub mass_flow_kg_s: f64,
}

/// Per-port force and torque at full thrust, with the gas each port uses.
///
/// Column `i` of `force` is the force on the vehicle (N) and column `i` of
/// `torque` the torque about the CG (N·m) when port `i` fires continuously.
#[derive(Debug, Clone, PartialEq)]
pub struct Effectiveness {
    force: Matrix3xX<f64>,
    torque: Matrix3xX<f64>,
    mass_flow_kg_s: DVector<f64>,
    names: Vec<String>,
}

/// Largest accepted deviation of a thrust direction from unit length. Directions
/// come from trigonometry on cant angles, so they are unit to a few ulps; anything
/// further off is a caller mistake rather than rounding.
const UNIT_DIRECTION_SLACK: f64 = 1e-9;

impl Effectiveness {
    /// Builds the matrix from its columns, checking sizes and values.
    pub fn new(
        force: Matrix3xX<f64>,
        torque: Matrix3xX<f64>,
        mass_flow_kg_s: DVector<f64>,
        names: Vec<String>,
    ) -> Result<Self, EffectivenessError> {
        let n = force.ncols();
        if n == 0 {
            return Err(EffectivenessError::NoPorts);
        }
        let counts = [
            ("torque", torque.ncols()),
            ("mass_flow_kg_s", mass_flow_kg_s.len()),
            ("names", names.len()),
        ];
        for (what, found) in counts {
            if found != n {
                return Err(EffectivenessError::CountMismatch {
                    what,
                    expected: n,
                    found,
                });
            }
        }
        for i in 0..n {
            let bad = |what| EffectivenessError::NotFinite {
                port: names[i].clone(),
                what,
            };
            if force.column(i).iter().any(|v| !v.is_finite()) {
                return Err(bad("force"));
            }
            if torque.column(i).iter().any(|v| !v.is_finite()) {
                return Err(bad("torque"));
            }
            let m = mass_flow_kg_s[i];
            if !m.is_finite() {
                return Err(bad("mass_flow_kg_s"));
            }
            if m < 0.0 {
                return Err(EffectivenessError::NegativeMassFlow {
                    port: names[i].clone(),
                    value: m,
                });
            }
        }
        Ok(Self {
            force,
            torque,
            mass_flow_kg_s,
            names,
        })
    }

    /// Builds the matrix from port positions (relative to the CG), unit force
    /// directions and thrusts: force = T·d, torque = r × (T·d).
    pub fn from_ports(ports: &[PortGeometry]) -> Result<Self, EffectivenessError> {
        let n = ports.len();
        if n == 0 {
            return Err(EffectivenessError::NoPorts);
        }
        let mut force = Matrix3xX::zeros(n);
        let mut torque = Matrix3xX::zeros(n);
        let mut mdot = DVector::zeros(n);
        let mut names = Vec::with_capacity(n);
        for (i, p) in ports.iter().enumerate() {
            let finite = p.position_m.iter().all(|v| v.is_finite())
                && p.direction.iter().all(|v| v.is_finite())
                && p.thrust_n.is_finite();
            if !finite {
                return Err(EffectivenessError::NotFinite {
                    port: p.name.clone(),
                    what: "geometry or thrust",
                });
            }
            let length = p.direction.norm();
            if (length - 1.0).abs() > UNIT_DIRECTION_SLACK {
                return Err(EffectivenessError::NotUnit {
                    port: p.name.clone(),
                    length,
                });
            }
            if p.thrust_n < 0.0 {
                return Err(EffectivenessError::NegativeThrust {
                    port: p.name.clone(),
                    value: p.thrust_n,
                });
            }
            let f = p.direction * p.thrust_n;
            force.set_column(i, &f);
            torque.set_column(i, &p.position_m.cross(&f));
            mdot[i] = p.mass_flow_kg_s;
            names.push(p.name.clone());
        }
        Self::new(force, torque, mdot, names)
    }

    /// Number of ports.
    pub fn len(&self) -> usize {
        self.names.len()
    }

    /// Always false: a valid matrix has at least one port.
    pub fn is_empty(&self) -> bool {
        self.names.is_empty()
    }

    /// Force columns (N), one per port.
    pub fn force(&self) -> &Matrix3xX<f64> {
        &self.force
    }

    /// Torque columns about the CG (N·m), one per port.
    pub fn torque(&self) -> &Matrix3xX<f64> {
        &self.torque
    }

    /// Gas mass flow per port at full duty (kg/s).
    pub fn mass_flow_kg_s(&self) -> &DVector<f64> {
        &self.mass_flow_kg_s
    }

    /// Port names.
    pub fn names(&self) -> &[String] {
        &self.names
    }

    /// Total torque for the duty cycles `u`.
    pub fn torque_for(&self, u: &[f64]) -> Vector3<f64> {
        combine(&self.torque, u)
    }

    /// Total force for the duty cycles `u`.
    pub fn force_for(&self, u: &[f64]) -> Vector3<f64> {
        combine(&self.force, u)
    }

    /// Gas rate (kg/s) for the duty cycles `u`.
    pub fn gas_for(&self, u: &[f64]) -> f64 {
        self.mass_flow_kg_s.iter().zip(u).map(|(m, x)| m * x).sum()
    }
}

fn combine(m: &Matrix3xX<f64>, u: &[f64]) -> Vector3<f64> {
    let mut out = Vector3::zeros();
    for (i, x) in u.iter().enumerate().take(m.ncols()) {
        out += m.column(i) * *x;
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn port(name: &str, r: [f64; 3], d: [f64; 3], t: f64) -> PortGeometry {
        PortGeometry {
            name: name.into(),
            position_m: Vector3::from(r),
            direction: Vector3::from(d),
            thrust_n: t,
            mass_flow_kg_s: 1e-3,
        }
    }

    #[test]
    fn cross_product_by_hand() {
        // Port 0.5 m aft of the CG, 0.02 m out on +y, pushing along +z with 2 N:
        // r × d = (0.02·1 − 0·0, 0·0 − (−0.5)·1, 0) = (0.02, 0.5, 0); times 2 N.
        let e = Effectiveness::from_ports(&[port("a", [-0.5, 0.02, 0.0], [0.0, 0.0, 1.0], 2.0)])
            .expect("valid port");
        let t = e.torque().column(0);
        // Exact: products of short decimals by 2 round to within one ulp.
        approx::assert_relative_eq!(t[0], 0.04, max_relative = 1e-15);
        approx::assert_relative_eq!(t[1], 1.0, max_relative = 1e-15);
        assert_eq!(t[2], 0.0);
        assert_eq!(e.force().column(0)[2], 2.0);
    }

    #[test]
    fn rejects_bad_input() {
        let bad = port("a", [0.0; 3], [0.0, 2.0, 0.0], 1.0);
        assert!(matches!(
            Effectiveness::from_ports(&[bad]),
            Err(EffectivenessError::NotUnit { .. })
        ));
        let r = Effectiveness::new(
            Matrix3xX::zeros(2),
            Matrix3xX::zeros(3),
            DVector::zeros(2),
            vec!["a".into(), "b".into()],
        );
        assert!(matches!(
            r,
            Err(EffectivenessError::CountMismatch { what: "torque", .. })
        ));
        let mut f = Matrix3xX::zeros(1);
        f[(0, 0)] = f64::NAN;
        let r = Effectiveness::new(f, Matrix3xX::zeros(1), DVector::zeros(1), vec!["a".into()]);
        assert!(matches!(r, Err(EffectivenessError::NotFinite { .. })));
        let r = Effectiveness::new(
            Matrix3xX::zeros(1),
            Matrix3xX::zeros(1),
            DVector::from_element(1, -1.0),
            vec!["a".into()],
        );
        assert!(matches!(
            r,
            Err(EffectivenessError::NegativeMassFlow { .. })
        ));
        assert!(matches!(
            Effectiveness::from_ports(&[]),
            Err(EffectivenessError::NoPorts)
        ));
    }
}
