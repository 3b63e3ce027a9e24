//! Mass properties of the shapes a vehicle is built from.
//!
//! Axisymmetric parts lie on the body axis with their own axis along x; the
//! closed-form centroidal inertias are the handbook ones (listed beside each
//! function). Shapes without a tidy closed form — a thin shell of any nose
//! profile, a trapezoidal fin — are integrated numerically, and their tests
//! compare the special cases that do have a closed form.

use super::MassProperties;
use crate::airframe::profile_radius;
use crate::model::{Fins, NoseShape};
use nalgebra::{Matrix3, Vector3};

/// Segments used to integrate a shell of revolution. With the midpoint rule the
/// error falls as 1/N²; 4000 segments keep it below 1e-6 relative for a cone.
const SHELL_SEGMENTS: usize = 4000;

fn axisymmetric(mass_kg: f64, centroid_station_m: f64, ixx: f64, itrans: f64) -> MassProperties {
    MassProperties::from_centroid(
        mass_kg,
        Vector3::new(-centroid_station_m, 0.0, 0.0),
        Matrix3::from_diagonal(&Vector3::new(ixx, itrans, itrans)),
    )
}

/// A point mass at a station, `radial_m` off the axis at `clock_rad`.
pub fn point(mass_kg: f64, station_m: f64, radial_m: f64, clock_rad: f64) -> MassProperties {
    MassProperties::from_centroid(
        mass_kg,
        Vector3::new(
            -station_m,
            radial_m * clock_rad.cos(),
            radial_m * clock_rad.sin(),
        ),
        Matrix3::zeros(),
    )
}

/// A thick-walled tube: Ixx = m(Ro² + Ri²)/2, Iyy = m(3(Ro² + Ri²) + L²)/12
/// (hollow cylinder, e.g. Meriam & Kraige, Dynamics, table D/4).
pub fn tube(
    mass_kg: f64,
    fore_station_m: f64,
    length_m: f64,
    outer_d_m: f64,
    inner_d_m: f64,
) -> MassProperties {
    let r2 = 0.25 * (outer_d_m * outer_d_m + inner_d_m * inner_d_m);
    let ixx = 0.5 * mass_kg * r2;
    let itrans = mass_kg * (3.0 * r2 + length_m * length_m) / 12.0;
    axisymmetric(mass_kg, fore_station_m + 0.5 * length_m, ixx, itrans)
}

/// A solid cylinder: the tube with no bore, Ixx = mR²/2, Iyy = m(3R² + L²)/12.
pub fn cylinder(
    mass_kg: f64,
    fore_station_m: f64,
    length_m: f64,
    diameter_m: f64,
) -> MassProperties {
    tube(mass_kg, fore_station_m, length_m, diameter_m, 0.0)
}

/// A thin conical shell (lateral surface only), apex forward: centroid 2h/3 aft of
/// the apex, Ixx = mR²/2, Iyy about the centroid = m(R²/4 + h²/18).
pub fn cone_shell(
    mass_kg: f64,
    apex_station_m: f64,
    length_m: f64,
    base_d_m: f64,
) -> MassProperties {
    let r = 0.5 * base_d_m;
    let h = length_m;
    axisymmetric(
        mass_kg,
        apex_station_m + 2.0 * h / 3.0,
        0.5 * mass_kg * r * r,
        mass_kg * (0.25 * r * r + h * h / 18.0),
    )
}

/// A thin shell of revolution with the given nose profile, tip at station 0 + `tip_station_m`.
/// Mass is spread in proportion to surface area; each frustum band is a thin ring.
pub fn nose_shell(
    mass_kg: f64,
    tip_station_m: f64,
    shape: NoseShape,
    length_m: f64,
    base_d_m: f64,
) -> MassProperties {
    let r_base = 0.5 * base_d_m;
    let n = SHELL_SEGMENTS;
    let dx = length_m / n as f64;
    let (mut area, mut s1, mut s2, mut rr) = (0.0, 0.0, 0.0, 0.0);
    let mut prev = profile_radius(shape, length_m, r_base, 0.0);
    for k in 0..n {
        let x1 = (k + 1) as f64 * dx;
        let r1 = profile_radius(shape, length_m, r_base, x1);
        let ds = (dx * dx + (r1 - prev) * (r1 - prev)).sqrt();
        let rm = 0.5 * (r1 + prev);
        let xm = x1 - 0.5 * dx;
        let da = std::f64::consts::TAU * rm * ds;
        area += da;
        s1 += da * xm;
        s2 += da * xm * xm;
        rr += da * rm * rm;
        prev = r1;
    }
    // Per unit mass: a ring of radius r has Ixx = r², and about a diameter r²/2.
    let xc = s1 / area;
    let ixx = mass_kg * rr / area;
    let itrans = mass_kg * (0.5 * rr / area + s2 / area - xc * xc);
    axisymmetric(mass_kg, tip_station_m + xc, ixx, itrans)
}

/// Five-point Gauss–Legendre nodes and weights on [0, 1] (Abramowitz & Stegun,
/// Handbook of Mathematical Functions, table 25.4, mapped from [−1, 1]).
const GAUSS5: [(f64, f64); 5] = [
    (0.046_910_077_030_668, 0.118_463_442_528_095),
    (0.230_765_344_947_158, 0.239_314_335_249_683),
    (0.5, 0.284_444_444_444_444),
    (0.769_234_655_052_842, 0.239_314_335_249_683),
    (0.953_089_922_969_332, 0.118_463_442_528_095),
];

/// A fin set: each fin a thin trapezoidal plate in the plane of the body axis and
/// its clock angle, rooted on the tube surface at `root_radius_m`.
/// The integrand is a low-order polynomial over the trapezoid, so 5×5 Gauss points
/// integrate it exactly.
pub fn fin_set(fins: &Fins, root_radius_m: f64) -> MassProperties {
    let per_fin = fins.mass_kg / fins.count as f64;
    let mut total = MassProperties::zero();
    for clock in fins.clocks_rad() {
        let (sn, cs) = clock.sin_cos();
        // Accumulate area-weighted moments of the plate in (station, radius).
        let (mut area, mut m_s, mut m_r, mut m_ss, mut m_rr, mut m_sr) =
            (0.0, 0.0, 0.0, 0.0, 0.0, 0.0);
        for &(u, wu) in &GAUSS5 {
            let h = u * fins.span_m;
            let chord = fins.root_chord_m + (fins.tip_chord_m - fins.root_chord_m) * u;
            let lead = fins.station_m + fins.sweep_m * u;
            for &(v, wv) in &GAUSS5 {
                let s = lead + v * chord;
                let rho = root_radius_m + h;
                let w = wu * wv * fins.span_m * chord;
                area += w;
                m_s += w * s;
                m_r += w * rho;
                m_ss += w * s * s;
                m_rr += w * rho * rho;
                m_sr += w * s * rho;
            }
        }
        let k = per_fin / area;
        // Second moments about the origin of points (x, y, z) = (−s, ρ cos θ, ρ sin θ).
        let jxx = k * m_ss;
        let jyy = k * m_rr * cs * cs;
        let jzz = k * m_rr * sn * sn;
        let jxy = -k * m_sr * cs;
        let jxz = -k * m_sr * sn;
        let jyz = k * m_rr * cs * sn;
        let j = Matrix3::new(jxx, jxy, jxz, jxy, jyy, jyz, jxz, jyz, jzz);
        let inertia_origin = Matrix3::identity() * j.trace() - j;
        let centroid = Vector3::new(-k * m_s, k * m_r * cs, k * m_r * sn) / per_fin;
        // Build from the origin tensor: shift it to the centroid first.
        let shift = (Matrix3::identity() * centroid.norm_squared()
            - centroid * centroid.transpose())
            * per_fin;
        total = total + MassProperties::from_centroid(per_fin, centroid, inertia_origin - shift);
    }
    total
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn solid_cylinder_matches_handbook() {
        // Solid cylinder, Meriam & Kraige table D/4: Ixx = mr²/2, Iyy = m(3r² + L²)/12.
        // m = 2 kg, r = 0.05 m, L = 0.4 m: Ixx = 2.5e-3, Iyy = 2(7.5e-3 + 0.16)/12 = 0.0279167.
        let c = cylinder(2.0, 1.0, 0.4, 0.1);
        let i = c.inertia_about_cg();
        assert_relative_eq!(i[(0, 0)], 2.5e-3, max_relative = 1e-12);
        assert_relative_eq!(i[(1, 1)], 0.335 / 12.0, max_relative = 1e-12);
        assert_relative_eq!(c.cg_station_m(), 1.2, epsilon = 1e-12);
    }

    #[test]
    fn thin_tube_limit_is_mr2() {
        // A thin ring has Ixx = mR² (Meriam & Kraige table D/4, thin ring).
        let t = tube(1.0, 0.0, 0.01, 0.100, 0.0999999);
        assert_relative_eq!(
            t.inertia_about_cg()[(0, 0)],
            0.05 * 0.05,
            max_relative = 1e-5
        );
    }

    #[test]
    fn numerical_cone_shell_matches_closed_form() {
        // Thin conical shell, lateral surface: centroid 2h/3 from the apex,
        // Ixx = mR²/2, Iyy about the apex = m(R²/4 + h²/2) (Meriam & Kraige table D/4,
        // right circular conical shell). 1e-5 relative: the midpoint rule with 4000
        // bands is exact for the cone's linear profile up to rounding.
        let exact = cone_shell(0.3, 0.0, 0.25, 0.1);
        let numeric = nose_shell(0.3, 0.0, NoseShape::Conical, 0.25, 0.1);
        assert_relative_eq!(
            numeric.cg_station_m(),
            exact.cg_station_m(),
            max_relative = 1e-5
        );
        let (a, b) = (numeric.inertia_about_cg(), exact.inertia_about_cg());
        assert_relative_eq!(a[(0, 0)], b[(0, 0)], max_relative = 1e-5);
        assert_relative_eq!(a[(1, 1)], b[(1, 1)], max_relative = 1e-5);
        let apex = exact.inertia_about_origin()[(1, 1)];
        assert_relative_eq!(
            apex,
            0.3 * (0.05 * 0.05 / 4.0 + 0.25 * 0.25 / 2.0),
            max_relative = 1e-12
        );
    }

    #[test]
    fn hemispherical_limit_of_elliptical_nose() {
        // An elliptical nose with L = R is a hemispherical shell: centroid R/2 from the
        // base plane, I about the axis = 2mR²/3 (Meriam & Kraige table D/4, thin
        // hemispherical shell). The square-root tip converges slowly: 1e-4 relative.
        let r = 0.05;
        let h = nose_shell(1.0, 0.0, NoseShape::Elliptical, r, 2.0 * r);
        assert_relative_eq!(h.cg_station_m(), r - r / 2.0, max_relative = 1e-4);
        assert_relative_eq!(
            h.inertia_about_cg()[(0, 0)],
            2.0 / 3.0 * r * r,
            max_relative = 1e-4
        );
    }

    #[test]
    fn rectangular_fins_match_plate_formula() {
        // Four rectangular fins (chord c, span b) at 90° spacing. Each is a thin plate:
        // about its own centroid, the axis normal to the plate gives m(c² + b²)/12
        // (Meriam & Kraige table D/4, rectangular plate). The set's roll inertia is
        // 4·m_f·(b²/12 + ρc²) with ρc the plate centroid radius (plate in-plane moment
        // about the radial direction through its centroid, plus parallel axis).
        let fins = Fins {
            count: 4,
            root_chord_m: 0.1,
            tip_chord_m: 0.1,
            span_m: 0.06,
            sweep_m: 0.0,
            station_m: 1.0,
            first_clock_rad: 0.0,
            thickness_m: 0.003,
            mass_kg: 0.2,
        };
        let r0 = 0.03;
        let set = fin_set(&fins, r0);
        let mf = 0.05;
        let rho_c = r0 + 0.03;
        let ixx = 4.0 * mf * (0.06 * 0.06 / 12.0 + rho_c * rho_c);
        let i = set.inertia_about_cg();
        assert_relative_eq!(i[(0, 0)], ixx, max_relative = 1e-12);
        assert_relative_eq!(set.cg_station_m(), 1.05, epsilon = 1e-12);
        // Symmetric set: Iyy = Izz and no products of inertia.
        assert_relative_eq!(i[(1, 1)], i[(2, 2)], max_relative = 1e-12);
        assert!(i[(0, 1)].abs() < 1e-15 && i[(1, 2)].abs() < 1e-15);
    }
}
