//! Mass properties: mass, CG and inertia, with the algebra to add parts together.
//!
//! A [`MassProperties`] stores the mass, the first moment and the inertia tensor
//! about the body-frame origin (the nose tip). In that form parts simply add, and
//! removing a part is subtraction; the CG and the inertia about the CG (parallel-axis
//! theorem) are derived only when asked for.

pub mod shapes;
pub mod vehicle;

use nalgebra::{Matrix3, Vector3};
use serde::Serialize;
use std::iter::Sum;
use std::ops::{Add, Sub};

/// Mass, first moment and inertia about the body-frame origin.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MassProperties {
    mass_kg: f64,
    first_moment_kg_m: Vector3<f64>,
    inertia_origin_kg_m2: Matrix3<f64>,
}

/// Inertia tensor of a point mass `m` at `c` about the origin: m(|c|²E − ccᵀ).
fn point_tensor(mass_kg: f64, c: &Vector3<f64>) -> Matrix3<f64> {
    (Matrix3::identity() * c.norm_squared() - c * c.transpose()) * mass_kg
}

impl MassProperties {
    /// Nothing: the neutral element of addition.
    pub fn zero() -> Self {
        Self {
            mass_kg: 0.0,
            first_moment_kg_m: Vector3::zeros(),
            inertia_origin_kg_m2: Matrix3::zeros(),
        }
    }

    /// A body of `mass_kg` with its centroid at `centroid` (body frame, m) and
    /// inertia tensor `inertia_about_centroid` (body axes, kg·m²).
    pub fn from_centroid(
        mass_kg: f64,
        centroid: Vector3<f64>,
        inertia_about_centroid: Matrix3<f64>,
    ) -> Self {
        Self {
            mass_kg,
            first_moment_kg_m: centroid * mass_kg,
            inertia_origin_kg_m2: inertia_about_centroid + point_tensor(mass_kg, &centroid),
        }
    }

    /// Total mass, kg.
    pub fn mass_kg(&self) -> f64 {
        self.mass_kg
    }

    /// Centre of gravity in the body frame, m (the origin for a massless set).
    pub fn cg(&self) -> Vector3<f64> {
        if self.mass_kg > 0.0 {
            self.first_moment_kg_m / self.mass_kg
        } else {
            Vector3::zeros()
        }
    }

    /// CG station (distance aft of the nose tip), m.
    pub fn cg_station_m(&self) -> f64 {
        -self.cg().x
    }

    /// Inertia tensor about the CG, body axes, kg·m².
    pub fn inertia_about_cg(&self) -> Matrix3<f64> {
        self.inertia_origin_kg_m2 - point_tensor(self.mass_kg, &self.cg())
    }

    /// Inertia tensor about the body-frame origin, kg·m².
    pub fn inertia_about_origin(&self) -> Matrix3<f64> {
        self.inertia_origin_kg_m2
    }
}

impl Add for MassProperties {
    type Output = Self;
    fn add(self, o: Self) -> Self {
        Self {
            mass_kg: self.mass_kg + o.mass_kg,
            first_moment_kg_m: self.first_moment_kg_m + o.first_moment_kg_m,
            inertia_origin_kg_m2: self.inertia_origin_kg_m2 + o.inertia_origin_kg_m2,
        }
    }
}

impl Sub for MassProperties {
    type Output = Self;
    fn sub(self, o: Self) -> Self {
        Self {
            mass_kg: self.mass_kg - o.mass_kg,
            first_moment_kg_m: self.first_moment_kg_m - o.first_moment_kg_m,
            inertia_origin_kg_m2: self.inertia_origin_kg_m2 - o.inertia_origin_kg_m2,
        }
    }
}

impl Sum for MassProperties {
    fn sum<I: Iterator<Item = Self>>(iter: I) -> Self {
        iter.fold(Self::zero(), Add::add)
    }
}

/// The numbers a report shows for one flight state.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct MassSummary {
    /// Total mass, kg.
    pub mass_kg: f64,
    /// CG station, m.
    pub cg_station_m: f64,
    /// CG offset from the body axis along +y (toward clock 0°), m.
    pub cg_y_m: f64,
    /// CG offset from the body axis along +z (toward clock 90°), m.
    pub cg_z_m: f64,
    /// Roll inertia about the CG, kg·m².
    pub ixx_kg_m2: f64,
    /// Pitch inertia about the CG, kg·m².
    pub iyy_kg_m2: f64,
    /// Yaw inertia about the CG, kg·m².
    pub izz_kg_m2: f64,
    /// Inertia tensor element I_xy = −Σ m·(x − x_cg)(y − y_cg) about the CG, kg·m².
    pub ixy_kg_m2: f64,
    /// Inertia tensor element I_xz = −Σ m·(x − x_cg)(z − z_cg) about the CG, kg·m².
    pub ixz_kg_m2: f64,
    /// Inertia tensor element I_yz = −Σ m·(y − y_cg)(z − z_cg) about the CG, kg·m².
    pub iyz_kg_m2: f64,
    /// Whether any value came from a measured override.
    pub overridden: bool,
}

impl MassSummary {
    /// Summarise computed properties.
    pub fn from_properties(p: &MassProperties) -> Self {
        let i = p.inertia_about_cg();
        let cg = p.cg();
        // Parts placed by clock angle leave round-off (cos 90° is 6e-17, not 0):
        // lateral CG offsets below 1 pm and products of inertia below 1e-12 of the
        // trace are that round-off, not geometry, and are shown as zero.
        let lateral = |v: f64| if v.abs() < 1e-12 { 0.0 } else { v };
        let trace = i.trace().abs();
        let product = |v: f64| if v.abs() <= 1e-12 * trace { 0.0 } else { v };
        Self {
            mass_kg: p.mass_kg(),
            cg_station_m: p.cg_station_m(),
            cg_y_m: lateral(cg.y),
            cg_z_m: lateral(cg.z),
            ixx_kg_m2: i[(0, 0)],
            iyy_kg_m2: i[(1, 1)],
            izz_kg_m2: i[(2, 2)],
            ixy_kg_m2: product(i[(0, 1)]),
            ixz_kg_m2: product(i[(0, 2)]),
            iyz_kg_m2: product(i[(1, 2)]),
            overridden: false,
        }
    }

    /// The CG as a body-frame point, all three coordinates, m. Every torque is
    /// taken about this point.
    pub fn cg(&self) -> Vector3<f64> {
        Vector3::new(-self.cg_station_m, self.cg_y_m, self.cg_z_m)
    }

    /// Distance of the CG from the body axis, m.
    pub fn cg_offset_m(&self) -> f64 {
        self.cg_y_m.hypot(self.cg_z_m)
    }

    /// The full inertia tensor about the CG, body axes, kg·m².
    pub fn inertia_tensor(&self) -> Matrix3<f64> {
        Matrix3::new(
            self.ixx_kg_m2,
            self.ixy_kg_m2,
            self.ixz_kg_m2,
            self.ixy_kg_m2,
            self.iyy_kg_m2,
            self.iyz_kg_m2,
            self.ixz_kg_m2,
            self.iyz_kg_m2,
            self.izz_kg_m2,
        )
    }

    /// Diagonal inertia, kg·m².
    pub fn inertia_diagonal(&self) -> Vector3<f64> {
        Vector3::new(self.ixx_kg_m2, self.iyy_kg_m2, self.izz_kg_m2)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    fn part(m: f64, x: f64, y: f64) -> MassProperties {
        MassProperties::from_centroid(
            m,
            Vector3::new(x, y, 0.0),
            Matrix3::from_diagonal(&Vector3::new(0.1, 0.2, 0.3)) * m,
        )
    }

    // Steiner's parallel-axis theorem (any dynamics text, e.g. Meriam & Kraige,
    // Engineering Mechanics: Dynamics, appendix B): two unit point masses 2 m apart
    // have I = 2·(1 m)² = 2 kg·m² about their midpoint.
    #[test]
    fn parallel_axis_for_two_points() {
        let a = MassProperties::from_centroid(1.0, Vector3::new(-1.0, 0.0, 0.0), Matrix3::zeros());
        let b = MassProperties::from_centroid(1.0, Vector3::new(-3.0, 0.0, 0.0), Matrix3::zeros());
        let s = a + b;
        assert_relative_eq!(s.cg_station_m(), 2.0, epsilon = 1e-12);
        let i = s.inertia_about_cg();
        assert_relative_eq!(i[(1, 1)], 2.0, epsilon = 1e-12);
        assert_relative_eq!(i[(0, 0)], 0.0, epsilon = 1e-12);
    }

    proptest::proptest! {
        // Sums are order-independent and subtraction undoes addition; 1e-9 relative
        // covers the rounding of a few dozen additions of O(1) numbers.
        #[test]
        fn addition_laws(m1 in 0.01f64..10.0, m2 in 0.01f64..10.0, x1 in -2.0f64..0.0, x2 in -2.0f64..0.0, y in -0.1f64..0.1) {
            let a = part(m1, x1, y);
            let b = part(m2, x2, -y);
            let ab = a + b;
            let ba = b + a;
            proptest::prop_assert!((ab.inertia_about_cg() - ba.inertia_about_cg()).norm() <= 1e-9 * ab.inertia_about_cg().norm());
            let back = ab - b;
            proptest::prop_assert!((back.mass_kg() - a.mass_kg()).abs() <= 1e-9 * a.mass_kg());
            proptest::prop_assert!((back.cg() - a.cg()).norm() <= 1e-9);
            proptest::prop_assert!((back.inertia_about_cg() - a.inertia_about_cg()).norm() <= 1e-9 * (1.0 + a.inertia_about_cg().norm()));
        }
    }
}
