//! A small indexed triangle mesh, the solids the exports are made of, and the checks
//! that a mesh is a closed, outward-facing shell.
//!
//! Every solid here is built from two primitives: a profile revolved about an axis
//! (tube wall, nose cone, drill-axis cylinder, exhaust arrow) and a convex polygon
//! extruded to a thickness (fin plate). Both build each vertex once and refer to it
//! by index, so closedness is a property of the construction that [`Mesh::check`]
//! can verify exactly: every undirected edge is used by exactly two triangles and
//! they traverse it in opposite directions. Outward orientation is then the sign of
//! the enclosed volume, computed per connected shell.
//!
//! Coordinates are metres in the body frame; the STL writer converts to millimetres.

use nalgebra::{Point3, Vector3};
use std::collections::HashMap;
use thiserror::Error;

/// `v > min`, false for NaN.
fn above(v: f64, min: f64) -> bool {
    v > min
}

/// Limits used when checking a mesh.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MeshTolerances {
    /// Smallest triangle area accepted, m². The default, 1e-12 m² (1e-6 mm²), is far
    /// below the smallest triangle the default resolutions produce on hobby-sized
    /// airframes (about 1e-10 m² at a nose tip) and far above rounding noise.
    pub min_triangle_area_m2: f64,
    /// Smallest enclosed volume of a shell accepted as outward, m³. The default,
    /// 1e-12 m³ (1e-3 mm³), keeps a shell of rounding noise from passing as a solid.
    pub min_shell_volume_m3: f64,
}

impl Default for MeshTolerances {
    fn default() -> Self {
        Self {
            min_triangle_area_m2: 1e-12,
            min_shell_volume_m3: 1e-12,
        }
    }
}

/// Why a mesh is not a closed, outward, non-degenerate set of shells.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum MeshDefect {
    /// A triangle refers to a vertex that does not exist.
    #[error("triangle {triangle} refers to vertex {vertex}, but the mesh has {count} vertices")]
    BadIndex {
        /// Triangle index.
        triangle: usize,
        /// The missing vertex index.
        vertex: usize,
        /// Number of vertices.
        count: usize,
    },
    /// A triangle has (nearly) no area.
    #[error("triangle {triangle} has area {area_m2:e} m², below the tolerance")]
    Degenerate {
        /// Triangle index.
        triangle: usize,
        /// Its area, m².
        area_m2: f64,
    },
    /// An edge is not shared by exactly two triangles.
    #[error("edge {a}–{b} is used by {uses} triangles; a closed shell needs exactly 2")]
    OpenEdge {
        /// First vertex.
        a: usize,
        /// Second vertex.
        b: usize,
        /// How many triangles use it.
        uses: usize,
    },
    /// Two triangles traverse a shared edge in the same direction.
    #[error("edge {a}→{b} is traversed twice in the same direction: orientation is inconsistent")]
    Inconsistent {
        /// First vertex.
        a: usize,
        /// Second vertex.
        b: usize,
    },
    /// A shell encloses a negative or tiny volume: it faces inward or is flat.
    #[error(
        "shell {shell} encloses {volume_m3:e} m³; an outward shell encloses a positive volume"
    )]
    Inward {
        /// Shell index (order of first triangle).
        shell: usize,
        /// Signed volume, m³.
        volume_m3: f64,
    },
}

/// An indexed triangle mesh. Triangles wind counter-clockwise seen from outside.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Mesh {
    /// Vertex positions, m.
    pub vertices: Vec<Point3<f64>>,
    /// Triangles as indices into `vertices`.
    pub triangles: Vec<[usize; 3]>,
}

impl Mesh {
    /// Number of triangles.
    pub fn len(&self) -> usize {
        self.triangles.len()
    }

    /// True when the mesh has no triangles.
    pub fn is_empty(&self) -> bool {
        self.triangles.is_empty()
    }

    /// Add another mesh's vertices and triangles to this one (shells stay separate).
    pub fn append(&mut self, other: &Mesh) {
        let base = self.vertices.len();
        self.vertices.extend_from_slice(&other.vertices);
        self.triangles.extend(
            other
                .triangles
                .iter()
                .map(|t| [t[0] + base, t[1] + base, t[2] + base]),
        );
    }

    /// Corner positions of triangle `i`.
    pub fn corners(&self, i: usize) -> [Point3<f64>; 3] {
        let t = self.triangles[i];
        [
            self.vertices[t[0]],
            self.vertices[t[1]],
            self.vertices[t[2]],
        ]
    }

    /// Unit normal of triangle `i` by the right-hand rule (zero for a degenerate triangle).
    pub fn normal(&self, i: usize) -> Vector3<f64> {
        let [a, b, c] = self.corners(i);
        (b - a)
            .cross(&(c - a))
            .try_normalize(0.0)
            .unwrap_or_else(Vector3::zeros)
    }

    /// Area of triangle `i`, m².
    pub fn area(&self, i: usize) -> f64 {
        let [a, b, c] = self.corners(i);
        0.5 * (b - a).cross(&(c - a)).norm()
    }

    /// Signed enclosed volume, m³ (divergence theorem: sum of tetrahedra to the origin).
    /// Positive when the triangles face outward.
    pub fn signed_volume(&self) -> f64 {
        (0..self.triangles.len())
            .map(|i| {
                let [a, b, c] = self.corners(i);
                a.coords.dot(&b.coords.cross(&c.coords)) / 6.0
            })
            .sum()
    }

    /// Split into connected shells (triangles joined through shared vertices), in the
    /// order of each shell's first triangle. Vertices are renumbered per shell.
    pub fn shells(&self) -> Vec<Mesh> {
        let n = self.vertices.len();
        let mut parent: Vec<usize> = (0..n).collect();
        fn find(parent: &mut [usize], mut i: usize) -> usize {
            while parent[i] != i {
                parent[i] = parent[parent[i]];
                i = parent[i];
            }
            i
        }
        for t in &self.triangles {
            if t.iter().any(|&v| v >= n) {
                continue;
            }
            let r0 = find(&mut parent, t[0]);
            for &v in &t[1..] {
                let r = find(&mut parent, v);
                parent[r] = r0;
            }
        }
        let mut shell_of_root: HashMap<usize, usize> = HashMap::new();
        let mut shells: Vec<Mesh> = Vec::new();
        let mut renumber: Vec<HashMap<usize, usize>> = Vec::new();
        for t in &self.triangles {
            if t.iter().any(|&v| v >= n) {
                continue;
            }
            let root = find(&mut parent, t[0]);
            let s = *shell_of_root.entry(root).or_insert_with(|| {
                shells.push(Mesh::default());
                renumber.push(HashMap::new());
                shells.len() - 1
            });
            let mut tri = [0; 3];
            for (k, &v) in t.iter().enumerate() {
                let shell = &mut shells[s];
                tri[k] = *renumber[s].entry(v).or_insert_with(|| {
                    shell.vertices.push(self.vertices[v]);
                    shell.vertices.len() - 1
                });
            }
            shells[s].triangles.push(tri);
        }
        shells
    }

    /// Check that the mesh is a set of closed, consistently oriented, outward shells
    /// made of non-degenerate triangles.
    pub fn check(&self, tol: &MeshTolerances) -> Result<(), MeshDefect> {
        let count = self.vertices.len();
        let mut directed: HashMap<(usize, usize), usize> = HashMap::new();
        for (i, t) in self.triangles.iter().enumerate() {
            if let Some(&v) = t.iter().find(|&&v| v >= count) {
                return Err(MeshDefect::BadIndex {
                    triangle: i,
                    vertex: v,
                    count,
                });
            }
            let area = self.area(i);
            if !above(area, tol.min_triangle_area_m2) {
                return Err(MeshDefect::Degenerate {
                    triangle: i,
                    area_m2: area,
                });
            }
            for k in 0..3 {
                *directed.entry((t[k], t[(k + 1) % 3])).or_insert(0) += 1;
            }
        }
        // Sort so the first defect reported does not depend on hash order.
        let mut edges: Vec<_> = directed.iter().map(|(&e, &n)| (e, n)).collect();
        edges.sort_unstable();
        for ((a, b), n) in edges {
            let back = directed.get(&(b, a)).copied().unwrap_or(0);
            if n + back != 2 {
                return Err(MeshDefect::OpenEdge {
                    a: a.min(b),
                    b: a.max(b),
                    uses: n + back,
                });
            }
            if n != 1 {
                return Err(MeshDefect::Inconsistent { a, b });
            }
        }
        for (s, shell) in self.shells().iter().enumerate() {
            let v = shell.signed_volume();
            if !above(v, tol.min_shell_volume_m3) {
                return Err(MeshDefect::Inward {
                    shell: s,
                    volume_m3: v,
                });
            }
        }
        Ok(())
    }
}

/// Frame of a solid of revolution: the axis through `origin` along `axis`, and the
/// direction `reference` (perpendicular to the axis) at angle zero. Angles grow
/// right-handed about `axis`.
#[derive(Debug, Clone, Copy)]
pub(crate) struct RevolveFrame {
    pub origin: Point3<f64>,
    pub axis: Vector3<f64>,
    pub reference: Vector3<f64>,
}

impl RevolveFrame {
    /// A frame about `axis` (any non-zero vector) with some reference perpendicular to it.
    pub fn about(origin: Point3<f64>, axis: Vector3<f64>) -> Self {
        let axis = axis.normalize();
        // Pick the coordinate axis least aligned with `axis` to build a perpendicular.
        let pick = if axis.x.abs() <= axis.y.abs() && axis.x.abs() <= axis.z.abs() {
            Vector3::x()
        } else if axis.y.abs() <= axis.z.abs() {
            Vector3::y()
        } else {
            Vector3::z()
        };
        let reference = (pick - axis * axis.dot(&pick)).normalize();
        Self {
            origin,
            axis,
            reference,
        }
    }

    fn point(&self, t: f64, r: f64, angle: f64) -> Point3<f64> {
        let side = self.axis.cross(&self.reference);
        let (s, c) = angle.sin_cos();
        self.origin + self.axis * t + (self.reference * c + side * s) * r
    }
}

/// Why a profile cannot be revolved.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum ProfileError {
    /// Fewer than three points, or fewer than three segments around.
    #[error("a solid of revolution needs at least 3 profile points and 3 segments around")]
    TooSmall,
    /// A radius is negative or not finite, or an axial position is not finite.
    #[error("profile point {0} is not a finite point at a radius ≥ 0")]
    BadPoint(usize),
    /// A point on the axis other than the two ends of an open profile.
    #[error("profile point {0} lies on the axis but is not an end of the profile")]
    AxisInside(usize),
    /// Two consecutive points coincide.
    #[error("profile points {0} and the next coincide")]
    Repeated(usize),
    /// The profile encloses no area.
    #[error("the profile encloses no area")]
    Flat,
}

/// Revolve a profile of (axial position, radius) points, m, into a closed solid.
///
/// Either both ends lie on the axis (radius 0) and every other point off it — a
/// solid such as a cone — or no point lies on the axis and the profile is a closed
/// loop — a ring such as a tube wall. The profile may run either way round; it is
/// put in one orientation first so the triangles face outward.
pub(crate) fn revolve(
    profile: &[(f64, f64)],
    frame: &RevolveFrame,
    segments: usize,
) -> Result<Mesh, ProfileError> {
    let n = profile.len();
    if n < 3 || segments < 3 {
        return Err(ProfileError::TooSmall);
    }
    for (i, &(t, r)) in profile.iter().enumerate() {
        if !t.is_finite() || !r.is_finite() || r < 0.0 {
            return Err(ProfileError::BadPoint(i));
        }
    }
    let on_axis = |i: usize| profile[i].1 == 0.0;
    let open = on_axis(0) || on_axis(n - 1);
    if open && !(on_axis(0) && on_axis(n - 1)) {
        return Err(ProfileError::AxisInside(if on_axis(0) { 0 } else { n - 1 }));
    }
    if let Some(i) = (1..n - 1).find(|&i| on_axis(i)) {
        return Err(ProfileError::AxisInside(i));
    }
    let edge_count = if open { n - 1 } else { n };
    for i in 0..edge_count {
        let (a, b) = (profile[i], profile[(i + 1) % n]);
        if a == b {
            return Err(ProfileError::Repeated(i));
        }
    }
    // Shoelace area in the (t, r) half-plane; for an open profile the axis closes it.
    let area2: f64 = (0..n)
        .map(|i| {
            let (t0, r0) = profile[i];
            let (t1, r1) = profile[(i + 1) % n];
            t0 * r1 - t1 * r0
        })
        .sum();
    if area2 == 0.0 {
        return Err(ProfileError::Flat);
    }
    // Counter-clockwise in (t, r) puts the solid on the left of each segment, which
    // with the winding below makes every triangle face outward.
    let pts: Vec<(f64, f64)> = if area2 > 0.0 {
        profile.to_vec()
    } else {
        profile.iter().rev().copied().collect()
    };

    let mut mesh = Mesh::default();
    // ring[i][k]: vertex of profile point i at angle k; a point on the axis is one vertex.
    let mut ring: Vec<Vec<usize>> = Vec::with_capacity(n);
    for &(t, r) in &pts {
        if r == 0.0 {
            mesh.vertices.push(frame.point(t, 0.0, 0.0));
            ring.push(vec![mesh.vertices.len() - 1; segments]);
        } else {
            let mut ids = Vec::with_capacity(segments);
            for k in 0..segments {
                let angle = std::f64::consts::TAU * k as f64 / segments as f64;
                mesh.vertices.push(frame.point(t, r, angle));
                ids.push(mesh.vertices.len() - 1);
            }
            ring.push(ids);
        }
    }
    for i in 0..edge_count {
        let j = (i + 1) % n;
        let (pole_i, pole_j) = (pts[i].1 == 0.0, pts[j].1 == 0.0);
        for k in 0..segments {
            let k1 = (k + 1) % segments;
            let (a, b) = (ring[i][k], ring[i][k1]);
            let (c, d) = (ring[j][k1], ring[j][k]);
            if !pole_i {
                mesh.triangles.push([a, c, b]);
            }
            if !pole_j {
                mesh.triangles.push([a, d, c]);
            }
        }
    }
    Ok(mesh)
}

/// Why a polygon cannot be extruded.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum PlateError {
    /// Fewer than three distinct corners, a corner that is not finite, or thickness ≤ 0.
    #[error("a plate needs at least 3 distinct finite corners and a positive thickness")]
    TooSmall,
    /// The corners do not form a convex polygon.
    #[error("the plate outline is not convex")]
    NotConvex,
}

/// Extrude a convex polygon, given as (a, b) coordinates along `u` and `v` from
/// `origin`, to a plate of `thickness` centred on that plane. `u` and `v` must be
/// orthonormal.
pub(crate) fn extrude_convex(
    outline: &[(f64, f64)],
    origin: Point3<f64>,
    u: Vector3<f64>,
    v: Vector3<f64>,
    thickness: f64,
) -> Result<Mesh, PlateError> {
    let mut poly: Vec<(f64, f64)> = Vec::new();
    for &p in outline {
        if !p.0.is_finite() || !p.1.is_finite() {
            return Err(PlateError::TooSmall);
        }
        if poly.last() != Some(&p) {
            poly.push(p);
        }
    }
    while poly.len() > 1 && poly.first() == poly.last() {
        poly.pop();
    }
    let n = poly.len();
    if n < 3 || !above(thickness, 0.0) || !thickness.is_finite() {
        return Err(PlateError::TooSmall);
    }
    let area2: f64 = (0..n)
        .map(|i| poly[i].0 * poly[(i + 1) % n].1 - poly[(i + 1) % n].0 * poly[i].1)
        .sum();
    if area2 < 0.0 {
        poly.reverse();
    }
    let cross = |i: usize| {
        let (a, b, c) = (poly[i], poly[(i + 1) % n], poly[(i + 2) % n]);
        (b.0 - a.0) * (c.1 - b.1) - (b.1 - a.1) * (c.0 - b.0)
    };
    if (0..n).any(|i| cross(i) <= 0.0) {
        return Err(PlateError::NotConvex);
    }
    let w = u.cross(&v);
    let mut mesh = Mesh::default();
    for side in [-0.5, 0.5] {
        for &(a, b) in &poly {
            mesh.vertices
                .push(origin + u * a + v * b + w * (side * thickness));
        }
    }
    // Bottom cap (faces -w) and top cap (faces +w), fans from corner 0.
    for i in 1..n - 1 {
        mesh.triangles.push([0, i + 1, i]);
        mesh.triangles.push([n, n + i, n + i + 1]);
    }
    for i in 0..n {
        let j = (i + 1) % n;
        mesh.triangles.push([i, j, n + j]);
        mesh.triangles.push([i, n + j, n + i]);
    }
    Ok(mesh)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;
    use std::f64::consts::PI;

    fn x_frame() -> RevolveFrame {
        RevolveFrame {
            origin: Point3::origin(),
            axis: Vector3::x(),
            reference: Vector3::y(),
        }
    }

    /// Area of a regular n-gon inscribed in a unit circle divided by π: the exact
    /// ratio of a revolved polyhedron's volume to the smooth solid's.
    fn polygon_factor(n: usize) -> f64 {
        let a = 2.0 * PI / n as f64;
        a.sin() / a
    }

    #[test]
    fn ring_is_closed_outward_with_exact_volume() {
        let (r, rr, l) = (0.5, 1.0, 2.0);
        for profile in [
            vec![(0.0, r), (l, r), (l, rr), (0.0, rr)],
            vec![(0.0, rr), (l, rr), (l, r), (0.0, r)],
        ] {
            let m = revolve(&profile, &x_frame(), 24).unwrap();
            m.check(&MeshTolerances::default()).unwrap();
            // Prism of an annulus between regular 24-gons: exact to rounding.
            let exact = polygon_factor(24) * PI * (rr * rr - r * r) * l;
            assert_relative_eq!(m.signed_volume(), exact, max_relative = 1e-12);
        }
    }

    #[test]
    fn cone_is_closed_outward_with_exact_volume() {
        let m = revolve(&[(0.0, 0.0), (0.0, 1.0), (3.0, 0.0)], &x_frame(), 16).unwrap();
        m.check(&MeshTolerances::default()).unwrap();
        assert_eq!(m.vertices.len(), 16 + 2);
        assert_relative_eq!(
            m.signed_volume(),
            polygon_factor(16) * PI * 3.0 / 3.0,
            max_relative = 1e-12
        );
    }

    #[test]
    fn revolve_rejects_bad_profiles() {
        let f = x_frame();
        assert_eq!(
            revolve(&[(0.0, 0.0), (1.0, 0.0), (2.0, 1.0), (3.0, 0.0)], &f, 8),
            Err(ProfileError::AxisInside(1))
        );
        assert_eq!(
            revolve(&[(0.0, 0.0), (1.0, 1.0), (1.0, 1.0), (3.0, 0.0)], &f, 8),
            Err(ProfileError::Repeated(1))
        );
        assert_eq!(
            revolve(&[(0.0, 1.0), (1.0, 1.0), (2.0, 1.0)], &f, 8),
            Err(ProfileError::Flat)
        );
        assert_eq!(
            revolve(&[(0.0, 0.0), (1.0, -1.0), (3.0, 0.0)], &f, 8),
            Err(ProfileError::BadPoint(1))
        );
        assert_eq!(
            revolve(&[(0.0, 0.0), (1.0, 1.0), (3.0, 0.0)], &f, 2),
            Err(ProfileError::TooSmall)
        );
    }

    #[test]
    fn plate_is_closed_outward_with_exact_volume() {
        let outline = [(0.0, 0.0), (4.0, 0.0), (3.0, 2.0), (1.0, 2.0)];
        for o in [outline.to_vec(), outline.iter().rev().copied().collect()] {
            let m = extrude_convex(
                &o,
                Point3::new(1.0, 2.0, 3.0),
                Vector3::y(),
                Vector3::z(),
                0.1,
            )
            .unwrap();
            m.check(&MeshTolerances::default()).unwrap();
            assert_relative_eq!(m.signed_volume(), 6.0 * 0.1, max_relative = 1e-12);
        }
        assert_eq!(
            extrude_convex(
                &[(0.0, 0.0), (4.0, 0.0), (1.0, 1.0), (0.0, 4.0)],
                Point3::origin(),
                Vector3::x(),
                Vector3::y(),
                0.1
            ),
            Err(PlateError::NotConvex)
        );
    }

    #[test]
    fn check_finds_each_defect() {
        let tol = MeshTolerances::default();
        let cone = revolve(&[(0.0, 0.0), (0.0, 1.0), (3.0, 0.0)], &x_frame(), 8).unwrap();

        let mut open = cone.clone();
        open.triangles.pop();
        assert!(matches!(open.check(&tol), Err(MeshDefect::OpenEdge { .. })));

        let mut flipped = cone.clone();
        flipped.triangles[0].swap(1, 2);
        assert!(matches!(
            flipped.check(&tol),
            Err(MeshDefect::Inconsistent { .. })
        ));

        let mut inward = cone.clone();
        for t in &mut inward.triangles {
            t.swap(1, 2);
        }
        assert!(matches!(inward.check(&tol), Err(MeshDefect::Inward { .. })));

        let mut flat = cone.clone();
        flat.vertices[1] = flat.vertices[0];
        assert!(matches!(
            flat.check(&tol),
            Err(MeshDefect::Degenerate { .. })
        ));

        let mut bad = cone.clone();
        bad.triangles[0][0] = 999;
        assert!(matches!(bad.check(&tol), Err(MeshDefect::BadIndex { .. })));

        // Two cones welded at their rims: each rim edge is used by four triangles.
        let other = revolve(&[(0.0, 0.0), (0.0, 1.0), (-3.0, 0.0)], &x_frame(), 8).unwrap();
        let mut two = cone.clone();
        two.append(&other);
        let base = cone.vertices.len();
        let weld = |p: Point3<f64>| {
            (0..base).find(|&i| (cone.vertices[i] - p).norm() < 1e-12 && p.coords.norm() > 0.5)
        };
        for t in two.triangles.iter_mut().skip(cone.len()) {
            for v in t.iter_mut() {
                if let Some(i) = weld(other.vertices[*v - base]) {
                    *v = i;
                }
            }
        }
        assert!(matches!(
            two.check(&tol),
            Err(MeshDefect::OpenEdge { uses: 4, .. })
        ));
    }

    #[test]
    fn shells_split_separate_solids() {
        let mut m = revolve(&[(0.0, 0.0), (0.0, 1.0), (3.0, 0.0)], &x_frame(), 8).unwrap();
        let far = RevolveFrame {
            origin: Point3::new(10.0, 0.0, 0.0),
            ..x_frame()
        };
        m.append(&revolve(&[(0.0, 0.0), (0.0, 2.0), (3.0, 0.0)], &far, 8).unwrap());
        let shells = m.shells();
        assert_eq!(shells.len(), 2);
        assert_relative_eq!(
            shells[1].signed_volume() / shells[0].signed_volume(),
            4.0,
            max_relative = 1e-12
        );
    }
}
