//! Nose-cone profiles: the radius of the outer surface at a distance from the tip.
//!
//! One function serves the mass model (a thin shell of revolution) and the mesh
//! export, so both see the same surface.

use crate::model::NoseShape;

/// Radius of the nose profile at distance `x_m` aft of the tip (0 ≤ x ≤ length), m.
///
/// Formulas: conical r = R·x/L; tangent ogive with ρ = (R² + L²)/(2R),
/// r = √(ρ² − (L − x)²) + R − ρ; elliptical r = R·√(x(2L − x))/L;
/// parabolic series with K = 1, r = R·(2ξ − ξ²), ξ = x/L.
pub fn profile_radius(shape: NoseShape, length_m: f64, base_radius_m: f64, x_m: f64) -> f64 {
    let l = length_m;
    let r = base_radius_m;
    if l.is_nan() || l <= 0.0 {
        return r;
    }
    let x = x_m.clamp(0.0, l);
    let radius = match shape {
        NoseShape::Conical => r * x / l,
        NoseShape::Ogive => {
            let rho = (r * r + l * l) / (2.0 * r);
            let d = l - x;
            ((rho * rho - d * d).max(0.0)).sqrt() + r - rho
        }
        NoseShape::Elliptical => r * (x * (2.0 * l - x)).max(0.0).sqrt() / l,
        NoseShape::Parabolic => {
            let xi = x / l;
            r * (2.0 * xi - xi * xi)
        }
    };
    radius.clamp(0.0, r)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn every_profile_starts_at_a_point_and_meets_the_tube() {
        for shape in [
            NoseShape::Conical,
            NoseShape::Ogive,
            NoseShape::Elliptical,
            NoseShape::Parabolic,
        ] {
            assert_relative_eq!(profile_radius(shape, 0.2, 0.03, 0.0), 0.0, epsilon = 1e-12);
            assert_relative_eq!(profile_radius(shape, 0.2, 0.03, 0.2), 0.03, epsilon = 1e-12);
        }
    }

    #[test]
    fn tangent_ogive_meets_the_tube_with_zero_slope() {
        // Tangency is the defining property of the tangent ogive (any nose-cone
        // geometry text, e.g. the ogive definition in Crowell, "The Descriptive
        // Geometry of Nose Cones", 1996): slope at the shoulder is zero.
        let (l, r, h) = (0.25, 0.04, 1e-6);
        let slope = (profile_radius(NoseShape::Ogive, l, r, l)
            - profile_radius(NoseShape::Ogive, l, r, l - h))
            / h;
        assert!(slope.abs() < 1e-4, "slope {slope}");
    }
}
