//! The exact attainable set of a bank of duty-cycled ports: the zonotope
//! Z = Σᵢ [0, bᵢ], where bᵢ is port i's torque column (or its angular
//! acceleration column I⁻¹bᵢ).
//!
//! A zonotope is the image of the unit cube under the 3×n matrix, so everything
//! about it follows from its generators:
//! - support function h(d) = Σᵢ max(0, bᵢ·d);
//! - facets: every plane spanned by two non-parallel generators carries a facet
//!   pair with normal ±n, n ∝ bᵢ × bⱼ, offset h(±n). Generators in that same plane
//!   lie in the facet, which is then a zonogon; parallel generators are merged
//!   first so each plane is found once;
//! - vertices: the cube corners picked out by the sign of bᵢ·d for generic d;
//! - volume Σ over triples |det(bᵢ, bⱼ, bₖ)|, the standard zonotope volume formula.
//!
//! The per-axis maxima are ray intersections (the largest t with t·e in Z), found
//! from the facet inequalities; this is smaller than h(e) whenever the best
//! ports for an axis also disturb the other axes.
//!
//! When the columns do not span three dimensions the set is flat: there are no
//! facets, and the ray queries use the in-plane (or on-line) edges instead.

use super::{Effectiveness, Tolerances};
use nalgebra::{DMatrix, Matrix3, Matrix3xX, Vector3};
use std::collections::HashMap;
use thiserror::Error;

/// Problems building a zonotope.
#[derive(Debug, Error, Clone, PartialEq)]
pub enum ZonotopeError {
    /// The inertia matrix is not symmetric positive definite.
    #[error("the inertia matrix is not symmetric positive definite")]
    BadInertia,
    /// More distinct generator directions than the vertex labelling supports.
    #[error("{0} distinct generator directions; at most 128 are supported")]
    TooManyGenerators(usize),
    /// A column holds a value that is not a finite number (from out-of-range data).
    #[error("the torque of port column {0} is not a finite number; check the layout's lengths and thrusts")]
    NotFinite(usize),
}

/// One facet of a full-dimensional zonotope: {x : normal·x = offset} ∩ Z.
#[derive(Debug, Clone, PartialEq)]
pub struct Facet {
    /// Outward unit normal.
    pub normal: Vector3<f64>,
    /// Support value h(normal): the facet's distance from the origin along `normal`.
    pub offset: f64,
    /// Indices into [`Zonotope::vertices`], counter-clockwise seen from outside.
    pub vertices: Vec<usize>,
}

/// Maxima along the six body-axis directions.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AxisLimits {
    /// Largest attainable amount along +roll, +pitch, +yaw (x, y, z).
    pub positive: Vector3<f64>,
    /// Largest attainable amount along −roll, −pitch, −yaw, as magnitudes.
    pub negative: Vector3<f64>,
}

/// The zonotope Σ[0, bᵢ] with its facets and vertices.
#[derive(Debug, Clone)]
pub struct Zonotope {
    columns: Matrix3xX<f64>,
    center: Vector3<f64>,
    /// Merged generators, half length: Z = center + Σ [−1, 1]·half[k].
    half: Vec<Vector3<f64>>,
    /// Which columns were merged into each generator.
    members: Vec<Vec<usize>>,
    rank: usize,
    scale: f64,
    facets: Vec<Facet>,
    vertices: Vec<Vector3<f64>>,
    /// Inequalities normal·x ≤ offset describing Z within its span.
    halfspaces: Vec<(Vector3<f64>, f64)>,
    /// Unit vectors orthogonal to the span (empty when rank is 3).
    off_span: Vec<Vector3<f64>>,
    tol: Tolerances,
}

impl Zonotope {
    /// The attainable torque set of the ports (N·m).
    pub fn torque(e: &Effectiveness, tol: &Tolerances) -> Result<Self, ZonotopeError> {
        Self::new(e.torque().clone(), tol)
    }

    /// The attainable angular-acceleration set (rad/s²): generators I⁻¹bᵢ for the
    /// inertia tensor I about the CG in body axes (a diagonal one is the usual case).
    pub fn angular(
        e: &Effectiveness,
        inertia: &Matrix3<f64>,
        tol: &Tolerances,
    ) -> Result<Self, ZonotopeError> {
        let symmetric =
            (inertia - inertia.transpose()).abs().max() <= tol.rank * inertia.abs().max();
        let chol = nalgebra::Cholesky::new(*inertia).ok_or(ZonotopeError::BadInertia)?;
        if !symmetric {
            return Err(ZonotopeError::BadInertia);
        }
        Self::new(chol.solve(e.torque()), tol)
    }

    /// A zonotope from arbitrary 3-vectors (columns of `columns`).
    pub fn new(columns: Matrix3xX<f64>, tol: &Tolerances) -> Result<Self, ZonotopeError> {
        let n = columns.ncols();
        // Non-finite generators would break every facet search below; refuse them.
        if let Some(i) = (0..n).find(|&i| columns.column(i).iter().any(|v| !v.is_finite())) {
            return Err(ZonotopeError::NotFinite(i + 1));
        }
        let scale = (0..n).map(|i| columns.column(i).norm()).fold(0.0, f64::max);
        let mut center = Vector3::zeros();
        let mut half: Vec<Vector3<f64>> = Vec::new();
        let mut unit: Vec<Vector3<f64>> = Vec::new();
        let mut members: Vec<Vec<usize>> = Vec::new();
        for i in 0..n {
            let b: Vector3<f64> = columns.column(i).into();
            center += b * 0.5;
            let len = b.norm();
            if len <= tol.zero_column * scale || len == 0.0 {
                continue;
            }
            let found = unit
                .iter()
                .position(|u| b.cross(u).norm() <= tol.parallel * len);
            match found {
                Some(k) => {
                    let sign = if b.dot(&unit[k]) >= 0.0 { 1.0 } else { -1.0 };
                    half[k] += b * (0.5 * sign);
                    members[k].push(i);
                }
                None => {
                    unit.push(b / len);
                    half.push(b * 0.5);
                    members.push(vec![i]);
                }
            }
        }
        if half.len() > 128 {
            return Err(ZonotopeError::TooManyGenerators(half.len()));
        }
        let rank = if n == 0 || scale == 0.0 {
            0
        } else {
            let d = DMatrix::from_column_slice(3, n, columns.as_slice());
            let sv = d.singular_values();
            let top = sv.max();
            sv.iter().filter(|s| **s > tol.rank * top).count()
        };
        let mut z = Self {
            columns,
            center,
            half,
            members,
            rank,
            scale,
            facets: Vec::new(),
            vertices: Vec::new(),
            halfspaces: Vec::new(),
            off_span: Vec::new(),
            tol: tol.clone(),
        };
        match rank {
            3 => z.build_facets(),
            2 => z.build_flat(),
            1 => z.build_segment(),
            _ => {
                z.vertices.push(Vector3::zeros());
                z.off_span = vec![Vector3::x(), Vector3::y(), Vector3::z()];
            }
        }
        Ok(z)
    }

    fn build_facets(&mut self) {
        let k_total = self.half.len();
        let units: Vec<Vector3<f64>> = self.half.iter().map(|h| h.normalize()).collect();
        let mut keys: HashMap<u128, usize> = HashMap::new();
        let mut in_plane = vec![false; k_total];
        for k in 0..k_total {
            for l in k + 1..k_total {
                let n = units[k].cross(&units[l]);
                let nn = n.norm();
                if nn <= self.tol.parallel {
                    continue;
                }
                let n = n / nn;
                let mut canonical = true;
                for j in 0..k_total {
                    in_plane[j] = n.dot(&units[j]).abs() <= self.tol.parallel;
                    if in_plane[j] && j < l && j != k {
                        canonical = false;
                    }
                }
                if !canonical {
                    continue;
                }
                for side in [1.0, -1.0] {
                    let normal = n * side;
                    let offset = self.support(&normal);
                    let verts = self.facet_vertices(&normal, &units[k], &in_plane, &mut keys);
                    self.facets.push(Facet {
                        normal,
                        offset,
                        vertices: verts,
                    });
                }
            }
        }
        self.halfspaces = self.facets.iter().map(|f| (f.normal, f.offset)).collect();
    }

    /// Vertices of the facet with outward normal `normal`, counter-clockwise about it.
    fn facet_vertices(
        &mut self,
        normal: &Vector3<f64>,
        first: &Vector3<f64>,
        in_plane: &[bool],
        keys: &mut HashMap<u128, usize>,
    ) -> Vec<usize> {
        let p1 = *first;
        let p2 = normal.cross(&p1);
        let mut base_key: u128 = 0;
        for (j, h) in self.half.iter().enumerate() {
            if !in_plane[j] && normal.dot(h) > 0.0 {
                base_key |= 1 << j;
            }
        }
        let mut angles: Vec<f64> = Vec::new();
        for (j, h) in self.half.iter().enumerate() {
            if in_plane[j] {
                let phi = h.dot(&p2).atan2(h.dot(&p1));
                for shift in [0.5, -0.5] {
                    angles.push(
                        (phi + shift * std::f64::consts::PI).rem_euclid(std::f64::consts::TAU),
                    );
                }
            }
        }
        angles.sort_by(f64::total_cmp);
        let count = angles.len();
        let mut out = Vec::with_capacity(count);
        for a in 0..count {
            let next = if a + 1 < count {
                angles[a + 1]
            } else {
                angles[0] + std::f64::consts::TAU
            };
            let mid = 0.5 * (angles[a] + next);
            let e = p1 * mid.cos() + p2 * mid.sin();
            let mut key = base_key;
            for (j, h) in self.half.iter().enumerate() {
                if in_plane[j] && e.dot(h) > 0.0 {
                    key |= 1 << j;
                }
            }
            out.push(self.vertex_index(key, keys));
        }
        out
    }

    fn vertex_index(&mut self, key: u128, keys: &mut HashMap<u128, usize>) -> usize {
        if let Some(&i) = keys.get(&key) {
            return i;
        }
        let mut v = self.center;
        for (j, h) in self.half.iter().enumerate() {
            if key & (1 << j) != 0 {
                v += h;
            } else {
                v -= h;
            }
        }
        self.vertices.push(v);
        let i = self.vertices.len() - 1;
        keys.insert(key, i);
        i
    }

    /// Rank 2: a zonogon in a plane through the origin.
    fn build_flat(&mut self) {
        let units: Vec<Vector3<f64>> = self.half.iter().map(|h| h.normalize()).collect();
        let mut plane = Vector3::zeros();
        'outer: for k in 0..units.len() {
            for l in k + 1..units.len() {
                let c = units[k].cross(&units[l]);
                if c.norm() > self.tol.parallel {
                    plane = c.normalize();
                    break 'outer;
                }
            }
        }
        self.off_span = vec![plane];
        for u in &units {
            let m = plane.cross(u);
            for side in [1.0, -1.0] {
                let normal = m * side;
                self.halfspaces.push((normal, self.support(&normal)));
            }
        }
        let in_plane = vec![true; units.len()];
        let mut keys = HashMap::new();
        let verts = self.facet_vertices(&plane, &units[0], &in_plane, &mut keys);
        debug_assert_eq!(verts.len(), self.vertices.len());
    }

    /// Rank 1: a segment through the origin.
    fn build_segment(&mut self) {
        let g = self.half[0].normalize();
        for normal in [g, -g] {
            self.halfspaces.push((normal, self.support(&normal)));
        }
        let helper = if g.x.abs() < 0.9 {
            Vector3::x()
        } else {
            Vector3::y()
        };
        let a = g.cross(&helper).normalize();
        self.off_span = vec![a, g.cross(&a)];
        self.vertices = vec![self.center - self.half[0], self.center + self.half[0]];
    }

    /// Support function h(d) = max over Z of d·x = Σ max(0, bᵢ·d).
    pub fn support(&self, d: &Vector3<f64>) -> f64 {
        self.columns.column_iter().map(|b| b.dot(d).max(0.0)).sum()
    }

    /// The duty cycles (0 or 1, bang-bang) that attain the support value h(d).
    /// Ties (bᵢ·d = 0) choose 0, the cheaper end.
    pub fn support_point(&self, d: &Vector3<f64>) -> Vector3<f64> {
        self.columns
            .column_iter()
            .filter(|b| b.dot(d) > 0.0)
            .fold(Vector3::zeros(), |s, b| s + b)
    }

    /// Rank of the columns (0 to 3).
    pub fn rank(&self) -> usize {
        self.rank
    }

    /// Centre of symmetry, Σ bᵢ / 2.
    pub fn center(&self) -> Vector3<f64> {
        self.center
    }

    /// Merged generators at full length, each with the columns it came from.
    pub fn generators(&self) -> impl Iterator<Item = (Vector3<f64>, &[usize])> {
        self.half
            .iter()
            .zip(&self.members)
            .map(|(h, m)| (h * 2.0, m.as_slice()))
    }

    /// Facets (empty unless the rank is 3).
    pub fn facets(&self) -> &[Facet] {
        &self.facets
    }

    /// The inequalities normal·x ≤ offset that bound Z within its span: the
    /// facets' planes when the rank is 3, the edges' lines in its plane when Z is
    /// flat, the two end points of a segment. Normals are unit vectors in the span.
    pub fn bounding_planes(&self) -> &[(Vector3<f64>, f64)] {
        &self.halfspaces
    }

    /// Vertices. For a flat set these are the vertices of the zonogon or segment.
    pub fn vertices(&self) -> &[Vector3<f64>] {
        &self.vertices
    }

    /// Volume by the zonotope formula Σ_{i<j<k} |det(bᵢ, bⱼ, bₖ)|.
    pub fn volume(&self) -> f64 {
        let n = self.columns.ncols();
        let mut v = 0.0;
        for i in 0..n {
            let bi: Vector3<f64> = self.columns.column(i).into();
            for j in i + 1..n {
                let c = bi.cross(&self.columns.column(j));
                for k in j + 1..n {
                    v += c.dot(&self.columns.column(k)).abs();
                }
            }
        }
        v
    }

    /// Largest t ≥ 0 with t·dir in Z (a ray intersection, not the support value).
    /// `dir` need not be unit; the answer is in multiples of `dir`.
    pub fn max_along(&self, dir: &Vector3<f64>) -> f64 {
        let len = dir.norm();
        if len == 0.0 {
            return f64::INFINITY;
        }
        if self
            .off_span
            .iter()
            .any(|a| a.dot(dir).abs() > self.tol.parallel * len)
        {
            return 0.0;
        }
        if self.halfspaces.is_empty() {
            return 0.0;
        }
        let floor = self.tol.rank * self.scale;
        let mut t = f64::INFINITY;
        for (n, h) in &self.halfspaces {
            let nd = n.dot(dir);
            if nd > self.tol.parallel * len {
                t = t.min((h.max(0.0) / nd).max(0.0));
                if *h <= floor {
                    t = 0.0;
                }
            }
        }
        t
    }

    /// Maxima along ±roll, ±pitch, ±yaw (ray intersections).
    pub fn axis_limits(&self) -> AxisLimits {
        let mut positive = Vector3::zeros();
        let mut negative = Vector3::zeros();
        for a in 0..3 {
            let mut e = Vector3::zeros();
            e[a] = 1.0;
            positive[a] = self.max_along(&e);
            negative[a] = self.max_along(&-e);
        }
        AxisLimits { positive, negative }
    }

    /// Radius of the largest ball about the origin inside Z: the smallest facet
    /// offset when the origin is interior, otherwise 0.
    pub fn inscribed_radius(&self) -> f64 {
        if self.rank < 3 {
            return 0.0;
        }
        let r = self
            .facets
            .iter()
            .map(|f| f.offset)
            .fold(f64::INFINITY, f64::min);
        if r <= self.tol.rank * self.scale {
            0.0
        } else {
            r
        }
    }

    /// True when the origin is strictly inside Z, i.e. the columns positively span R³.
    pub fn origin_interior(&self) -> bool {
        self.inscribed_radius() > 0.0
    }

    /// Length of the longest column; the scale for relative thresholds.
    pub fn scale(&self) -> f64 {
        self.scale
    }

    /// True when x lies in Z (within the rank threshold times the scale).
    pub fn contains(&self, x: &Vector3<f64>) -> bool {
        let slack = self.tol.rank * self.scale.max(f64::MIN_POSITIVE);
        self.off_span.iter().all(|a| a.dot(x).abs() <= slack)
            && self.halfspaces.iter().all(|(n, h)| n.dot(x) <= h + slack)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::allocation::testkit::{port_at, random_layout, Rng};
    use crate::allocation::{lp, Controllability, SideForceLimit};
    use approx::assert_relative_eq;
    use std::f64::consts::FRAC_PI_2;

    const T: f64 = 2.0; // thrust per port, N
    const R: f64 = 0.027; // tube radius, m
    const L: f64 = 0.5; // ports this far aft of the CG, m

    /// Four radial ports at one station 0.5 m aft of the CG, exhaust outward, so
    /// each pushes inward along −ĉ. By hand, with r = (−L, R ĉ), F = −T ĉ:
    /// τ = r × F = T L (eₓ × ĉ): ĉ = +y → +T L z; ĉ = +z → −T L y; and the
    /// opposite pair the negatives. So Z = [−TL, TL] (pitch) × [−TL, TL] (yaw)
    /// with no roll: a flat square.
    fn radial_four() -> Vec<crate::allocation::PortGeometry> {
        (0..4)
            .map(|k| {
                let a = k as f64 * FRAC_PI_2;
                let inward = -Vector3::new(0.0, a.cos(), a.sin());
                port_at(&format!("r{k}"), -L, R, a, inward, T)
            })
            .collect()
    }

    /// Four tangential ports at the CG station: at clock 0° and 180° pushing
    /// along +roll travel, at 90° and 270° against it. τ = R ĉ × (±T t̂) = ±R T eₓ,
    /// so together they add [−2RT, 2RT] on roll.
    fn roll_four() -> Vec<crate::allocation::PortGeometry> {
        (0..4)
            .map(|k| {
                let a = k as f64 * FRAC_PI_2;
                let travel = Vector3::new(0.0, -a.sin(), a.cos());
                let sign = if k % 2 == 0 { 1.0 } else { -1.0 };
                port_at(&format!("t{k}"), 0.0, R, a, travel * sign, T)
            })
            .collect()
    }

    #[test]
    fn four_radial_ports_make_a_flat_square() {
        let tol = Tolerances::default();
        let e = Effectiveness::from_ports(&radial_four()).expect("valid");
        let z = Zonotope::torque(&e, &tol).expect("builds");
        assert_eq!(z.rank(), 2);
        assert!(z.facets().is_empty());
        assert_eq!(z.vertices().len(), 4);
        let tl = T * L;
        // Corners (0, ±TL, ±TL) by hand; entries are products of sines of right
        // angles (exact to 1e-16) with 1.0, so 1e-12 absolute is generous.
        for v in z.vertices() {
            assert!(v.x.abs() < 1e-12);
            assert_relative_eq!(v.y.abs(), tl, epsilon = 1e-12);
            assert_relative_eq!(v.z.abs(), tl, epsilon = 1e-12);
        }
        let lim = z.axis_limits();
        for a in 1..3 {
            assert_relative_eq!(lim.positive[a], tl, epsilon = 1e-12);
            assert_relative_eq!(lim.negative[a], tl, epsilon = 1e-12);
        }
        assert_eq!(lim.positive.x, 0.0);
        // Diagonal of the square: the corner at distance √2·TL.
        let diag = Vector3::new(0.0, 1.0, 1.0).normalize();
        assert_relative_eq!(z.max_along(&diag), tl * 2f64.sqrt(), epsilon = 1e-12);
        assert_eq!(z.volume(), 0.0);
        let c = Controllability::from_zonotope(&e, &z, &tol);
        assert!(!c.positive_span);
        let words = c.findings(&e);
        assert!(
            words.contains(&"no port gives positive roll".to_string()),
            "{words:?}"
        );
        assert!(words.contains(&"no port gives negative roll".to_string()));
        assert_eq!(c.missing().len(), 2);
    }

    #[test]
    fn radial_and_roll_ports_make_a_box() {
        let tol = Tolerances::default();
        let mut ports = radial_four();
        ports.extend(roll_four());
        let e = Effectiveness::from_ports(&ports).expect("valid");
        let z = Zonotope::torque(&e, &tol).expect("builds");
        assert_eq!(z.rank(), 3);
        // Box [−2RT, 2RT] × [−TL, TL]²: 6 facets, 8 vertices, volume 4RT·(2TL)².
        assert_eq!(z.facets().len(), 6);
        assert_eq!(z.vertices().len(), 8);
        let (rt, tl) = (R * T, T * L);
        // Rounding of a dozen products and sums of order-one numbers: 1e-12 relative.
        assert_relative_eq!(z.volume(), 4.0 * rt * 4.0 * tl * tl, max_relative = 1e-12);
        let lim = z.axis_limits();
        assert_relative_eq!(lim.positive.x, 2.0 * rt, max_relative = 1e-12);
        assert_relative_eq!(lim.negative.x, 2.0 * rt, max_relative = 1e-12);
        assert_relative_eq!(lim.positive.y, tl, max_relative = 1e-12);
        assert_relative_eq!(
            z.inscribed_radius(),
            (2.0 * rt).min(tl),
            max_relative = 1e-12
        );
        let c = Controllability::from_zonotope(&e, &z, &tol);
        assert!(c.positive_span);
        assert!(c.findings(&e).is_empty());
    }

    /// Volume through the divergence theorem, V = ⅓ Σ offset_f · area_f, using the
    /// facet polygons only; independent of the triple-determinant formula.
    fn volume_from_facets(z: &Zonotope) -> f64 {
        z.facets()
            .iter()
            .map(|f| {
                let v = &z.vertices();
                let p0 = v[f.vertices[0]];
                let mut area2 = Vector3::zeros();
                for w in f.vertices.windows(2).skip(1) {
                    area2 += (v[w[0]] - p0).cross(&(v[w[1]] - p0));
                }
                // Counter-clockwise about the outward normal: positive projection.
                assert!(area2.dot(&f.normal) > 0.0, "facet orientation");
                f.offset * 0.5 * area2.dot(&f.normal) / 3.0
            })
            .sum()
    }

    #[test]
    fn random_zonotopes_are_consistent() {
        let tol = Tolerances::default();
        let mut rng = Rng(7);
        for case in 0..40 {
            let n = 3 + case % 12;
            let e = random_layout(&mut rng, n);
            let z = Zonotope::torque(&e, &tol).expect("builds");
            assert_eq!(z.rank(), 3);
            // Generic generators: n(n−1) facets and n(n−1)+2 vertices (the regions
            // cut on the sphere by n great circles in general position).
            assert_eq!(z.facets().len(), n * (n - 1));
            assert_eq!(z.vertices().len(), n * (n - 1) + 2);
            // Euler: V − E + F = 2, each edge shared by two facets.
            let edges: usize = z.facets().iter().map(|f| f.vertices.len()).sum::<usize>() / 2;
            assert_eq!(z.vertices().len() + z.facets().len() - edges, 2);
            // Volume: triple formula vs divergence theorem. Both sum O(n³) or O(n²)
            // terms of order (max column)³; 1e-10 relative covers their rounding.
            assert_relative_eq!(z.volume(), volume_from_facets(&z), max_relative = 1e-10);
            let s = z.scale();
            for f in z.facets() {
                for &vi in &f.vertices {
                    let v = z.vertices()[vi];
                    assert!((f.normal.dot(&v) - f.offset).abs() <= 1e-12 * s);
                }
            }
            for _ in 0..10 {
                let d = rng.unit();
                // Support value vs vertex enumeration (max over vertices of d·v).
                let best = z
                    .vertices()
                    .iter()
                    .map(|v| v.dot(&d))
                    .fold(f64::MIN, f64::max);
                assert_relative_eq!(z.support(&d), best, epsilon = 1e-12 * s);
                // Ray maximum: the point t·d is on the boundary.
                let t = z.max_along(&d);
                assert!(t.is_finite());
                assert!(z.contains(&(d * t)));
                assert!(!z.contains(&(d * (t + 1e-6 * s))));
            }
        }
    }

    #[test]
    fn ray_maxima_match_the_lp() {
        // Reference: the ray LP max t s.t. B u = t·d, 0 ≤ u ≤ 1, solved by good_lp/microlp.
        // microlp's feasibility tolerance is about 1e-9 on these entries, hence 1e-8 relative.
        let tol = Tolerances::default();
        let mut rng = Rng(11);
        for case in 0..15 {
            let e = random_layout(&mut rng, 4 + case % 8);
            let z = Zonotope::torque(&e, &tol).expect("builds");
            for _ in 0..4 {
                let d = rng.unit();
                let lp_t = lp::max_along(&e, &d, SideForceLimit::Free).expect("solves");
                assert_relative_eq!(z.max_along(&d), lp_t, max_relative = 1e-8, epsilon = 1e-12);
                let (h, _) = lp::support(&e, &d, SideForceLimit::Free).expect("solves");
                assert_relative_eq!(z.support(&d), h, max_relative = 1e-8, epsilon = 1e-12);
            }
        }
    }

    #[test]
    fn angular_set_is_the_inertia_image() {
        let tol = Tolerances::default();
        let mut rng = Rng(5);
        let e = random_layout(&mut rng, 9);
        let tz = Zonotope::torque(&e, &tol).expect("builds");
        // Diagonal inertia: a pure-axis acceleration needs a pure-axis torque, so
        // α_max = τ_max / I_axis exactly (up to rounding of one division).
        let diag = Matrix3::from_diagonal(&Vector3::new(0.002, 0.35, 0.35));
        let az = Zonotope::angular(&e, &diag, &tol).expect("builds");
        let (ta, aa) = (tz.axis_limits(), az.axis_limits());
        for a in 0..3 {
            assert_relative_eq!(
                aa.positive[a],
                ta.positive[a] / diag[(a, a)],
                max_relative = 1e-9
            );
            assert_relative_eq!(
                aa.negative[a],
                ta.negative[a] / diag[(a, a)],
                max_relative = 1e-9
            );
        }
        // Full inertia: t·e ∈ I⁻¹Z ⇔ t·(I e) ∈ Z, so the angular ray maximum along e
        // equals the torque ray maximum along I·e.
        let full = Matrix3::new(0.002, 1e-4, -2e-4, 1e-4, 0.35, 0.01, -2e-4, 0.01, 0.33);
        let az = Zonotope::angular(&e, &full, &tol).expect("builds");
        for _ in 0..10 {
            let d = rng.unit();
            assert_relative_eq!(
                az.max_along(&d),
                tz.max_along(&(full * d)),
                max_relative = 1e-9
            );
        }
        assert_eq!(
            Zonotope::angular(
                &e,
                &Matrix3::from_diagonal(&Vector3::new(1.0, -1.0, 1.0)),
                &tol
            )
            .err(),
            Some(ZonotopeError::BadInertia)
        );
    }

    #[test]
    fn parallel_ports_merge() {
        // Two identical ports and an opposite one on the same line make one
        // generator; the set is the segment [−b, 2b].
        let tol = Tolerances::default();
        let b = Vector3::new(0.1, 0.02, -0.03);
        let cols = Matrix3xX::from_columns(&[b, b, -b]);
        let z = Zonotope::new(cols, &tol).expect("builds");
        assert_eq!(z.rank(), 1);
        assert_eq!(z.generators().count(), 1);
        let u = b.normalize();
        assert_relative_eq!(z.max_along(&u), 2.0 * b.norm(), max_relative = 1e-12);
        assert_relative_eq!(z.max_along(&-u), b.norm(), max_relative = 1e-12);
        assert_eq!(z.max_along(&Vector3::x()), 0.0);
    }

    #[test]
    fn non_finite_columns_are_refused_not_indexed() {
        // A column of 1e200 N·m squared overflows; NaN and infinity must be refused.
        let tol = Tolerances::default();
        for bad in [f64::NAN, f64::INFINITY, f64::NEG_INFINITY] {
            let cols = Matrix3xX::from_columns(&[
                Vector3::new(0.1, 0.0, 0.0),
                Vector3::new(0.0, bad, 0.0),
            ]);
            assert_eq!(
                Zonotope::new(cols, &tol).err(),
                Some(ZonotopeError::NotFinite(2))
            );
        }
    }
}
