//! STL exports for CAD: the airframe, one drill-axis cylinder per port (for boolean
//! cuts), and one exhaust arrow per port.
//!
//! Files are binary STL in **millimetres** in the body frame: origin on the axis at
//! the nose tip, +x toward the nose (a point at station s m has x = −1000·s mm), +y
//! through the reference line (clock 0°), +z = x × y. The 80-byte header says so and
//! names the layout; it never starts with `solid`, so readers do not take it for
//! ASCII STL.
//!
//! The nose cone and body tube are written as one solid of revolution: nose profile,
//! outer wall, aft end, bore, and the nose's base closing the bore at the shoulder.
//! Two separate shells would share their rim vertices at the shoulder, and an edge
//! used by four triangles is not a closed mesh for CAD. [`tube_shell`] and
//! [`nose_solid`] give the two parts on their own. Fins are separate closed plates
//! whose roots are buried to mid-wall, so the flat root meets the faceted tube
//! without a gap.
//!
//! Every mesh is checked (closed, consistently oriented, outward, no degenerate
//! triangle) before it is encoded; a failure is an error, never a bad file.

use super::mesh::{extrude_convex, revolve, Mesh, MeshTolerances, RevolveFrame};
use super::{profile_radius, ExportError};
use crate::model::{Airframe, Design, NoseShape, Port};
use nalgebra::{Point3, Vector3};

/// Resolution and margins of the meshes.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MeshSettings {
    /// Segments around every solid of revolution (≥ 3). The volume of a revolved
    /// polygon falls short of the smooth solid's by the factor `sin(2π/n)/(2π/n)`,
    /// about 0.16 % at the default 64.
    pub segments: usize,
    /// Points along the nose profile from tip to shoulder (≥ 2).
    pub profile_samples: usize,
    /// Each drill-axis cylinder reaches this many times the hole's length through the
    /// wall (measured along the canted axis) inside and outside the outer surface.
    pub drill_margin_walls: f64,
    /// Limits for the mesh check.
    pub tolerances: MeshTolerances,
}

impl Default for MeshSettings {
    fn default() -> Self {
        Self {
            segments: 64,
            profile_samples: 32,
            drill_margin_walls: 3.0,
            tolerances: MeshTolerances::default(),
        }
    }
}

impl MeshSettings {
    fn validate(&self) -> Result<(), ExportError> {
        if self.segments < 3 {
            return Err(ExportError::Setting {
                name: "segments",
                value: self.segments as f64,
                reason: "at least 3",
            });
        }
        if self.profile_samples < 2 {
            return Err(ExportError::Setting {
                name: "profile_samples",
                value: self.profile_samples as f64,
                reason: "at least 2",
            });
        }
        if self.drill_margin_walls.is_nan()
            || self.drill_margin_walls < 1.0
            || !self.drill_margin_walls.is_finite()
        {
            return Err(ExportError::Setting {
                name: "drill_margin_walls",
                value: self.drill_margin_walls,
                reason: "a finite number ≥ 1, so the cylinder passes through the wall",
            });
        }
        Ok(())
    }
}

/// Size of the exhaust arrows.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MarkerSettings {
    /// Length of the arrow of the port with the largest value, m. Others scale linearly.
    pub max_length_m: f64,
    /// Shaft diameter, m.
    pub shaft_diameter_m: f64,
    /// Diameter of the cone head's base, m (larger than the shaft).
    pub head_diameter_m: f64,
    /// Length of the cone head, m; an arrow shorter than twice this gets a head half its length.
    pub head_length_m: f64,
}

impl Default for MarkerSettings {
    fn default() -> Self {
        Self {
            max_length_m: 0.05,
            shaft_diameter_m: 0.002,
            head_diameter_m: 0.005,
            head_length_m: 0.008,
        }
    }
}

impl MarkerSettings {
    fn validate(&self) -> Result<(), ExportError> {
        let positive = |name: &'static str, value: f64| {
            if value > 0.0 && value.is_finite() {
                Ok(())
            } else {
                Err(ExportError::Setting {
                    name,
                    value,
                    reason: "a finite length > 0",
                })
            }
        };
        positive("max_length_m", self.max_length_m)?;
        positive("shaft_diameter_m", self.shaft_diameter_m)?;
        positive("head_diameter_m", self.head_diameter_m)?;
        positive("head_length_m", self.head_length_m)?;
        if self.head_diameter_m <= self.shaft_diameter_m {
            return Err(ExportError::Setting {
                name: "head_diameter_m",
                value: self.head_diameter_m,
                reason: "larger than the shaft diameter",
            });
        }
        Ok(())
    }
}

fn body_axis_frame() -> RevolveFrame {
    // Axial coordinate t = x = −station; angle 0 on +y, growing toward +z: the clock angle.
    RevolveFrame {
        origin: Point3::origin(),
        axis: Vector3::x(),
        reference: Vector3::y(),
    }
}

fn check_airframe(a: &Airframe) -> Result<(), ExportError> {
    let positive = |field: &'static str, value: f64| {
        if value > 0.0 && value.is_finite() {
            Ok(())
        } else {
            Err(ExportError::Airframe {
                field,
                value,
                reason: "must be a finite length > 0",
            })
        }
    };
    positive("outer_diameter_m", a.outer_diameter_m)?;
    positive("inner_diameter_m", a.inner_diameter_m)?;
    positive("tube_length_m", a.tube_length_m)?;
    positive("nose.length_m", a.nose.length_m)?;
    if a.inner_diameter_m >= a.outer_diameter_m {
        return Err(ExportError::Airframe {
            field: "inner_diameter_m",
            value: a.inner_diameter_m,
            reason: "must be smaller than the outer diameter",
        });
    }
    if a.nose.shape == NoseShape::Ogive && a.nose.length_m < a.outer_radius_m() {
        return Err(ExportError::OgiveTooShort {
            length_m: a.nose.length_m,
            radius_m: a.outer_radius_m(),
        });
    }
    Ok(())
}

/// The nose profile as (x, r) points from the tip (x = 0) to the shoulder (x = −L), m.
///
/// Points are even in x, except for the elliptical nose, whose vertical tangent at the
/// tip needs them even in the ellipse's angle (x/L = 1 − cos θ) to be resolved.
pub fn nose_profile(a: &Airframe, samples: usize) -> Vec<(f64, f64)> {
    let (l, r) = (a.nose.length_m, a.outer_radius_m());
    let m = samples.max(2);
    (0..=m)
        .map(|i| {
            let f = i as f64 / m as f64;
            let u = match a.nose.shape {
                NoseShape::Elliptical => 1.0 - (0.5 * std::f64::consts::PI * f).cos(),
                _ => f,
            };
            let x = if i == m { l } else { l * u };
            let radius = match i {
                0 => 0.0,
                _ if i == m => r,
                _ => profile_radius(a.nose.shape, l, r, x),
            };
            (-x, radius)
        })
        .collect()
}

fn profile_mesh(
    what: &str,
    profile: &[(f64, f64)],
    frame: &RevolveFrame,
    s: &MeshSettings,
) -> Result<Mesh, ExportError> {
    let mesh = revolve(profile, frame, s.segments).map_err(|source| ExportError::Profile {
        what: what.to_string(),
        source,
    })?;
    mesh.check(&s.tolerances)
        .map_err(|source| ExportError::Mesh {
            what: what.to_string(),
            source,
        })?;
    Ok(mesh)
}

/// The body tube as a closed shell: outer and inner cylinders and the two end annuli.
pub fn tube_shell(a: &Airframe, s: &MeshSettings) -> Result<Mesh, ExportError> {
    s.validate()?;
    check_airframe(a)?;
    let (fore, aft) = (-a.tube_fore_station_m(), -a.tube_aft_station_m());
    let (ro, ri) = (a.outer_radius_m(), 0.5 * a.inner_diameter_m);
    let profile = [(fore, ro), (aft, ro), (aft, ri), (fore, ri)];
    profile_mesh("body tube", &profile, &body_axis_frame(), s)
}

/// The nose cone as a closed solid: its profile revolved, closed by a flat base at the shoulder.
pub fn nose_solid(a: &Airframe, s: &MeshSettings) -> Result<Mesh, ExportError> {
    s.validate()?;
    check_airframe(a)?;
    let mut profile = nose_profile(a, s.profile_samples);
    profile.push((-a.nose.length_m, 0.0));
    profile_mesh("nose cone", &profile, &body_axis_frame(), s)
}

/// Nose cone and body tube as one closed solid of revolution (see the module notes).
pub fn body_solid(a: &Airframe, s: &MeshSettings) -> Result<Mesh, ExportError> {
    s.validate()?;
    check_airframe(a)?;
    let (fore, aft) = (-a.tube_fore_station_m(), -a.tube_aft_station_m());
    let (ro, ri) = (a.outer_radius_m(), 0.5 * a.inner_diameter_m);
    let mut profile = nose_profile(a, s.profile_samples);
    profile.extend_from_slice(&[(aft, ro), (aft, ri), (fore, ri), (fore, 0.0)]);
    profile_mesh("nose and body tube", &profile, &body_axis_frame(), s)
}

/// Outline of one fin in its own plane as (station, distance from the axis), m.
///
/// The trapezoid's leading and trailing edges are extended straight down to mid-wall,
/// so the part outside the tube is exactly the fin described by the model.
pub fn fin_outline(a: &Airframe) -> Option<Vec<(f64, f64)>> {
    let f = a.fins.as_ref()?;
    let r = a.outer_radius_m();
    let root = r - 0.5 * a.wall_m();
    let depth = (root - r) / f.span_m;
    let le = |k: f64| f.station_m + f.sweep_m * k;
    let te =
        |k: f64| f.station_m + f.root_chord_m + (f.sweep_m + f.tip_chord_m - f.root_chord_m) * k;
    Some(vec![
        (le(depth), root),
        (te(depth), root),
        (te(1.0), r + f.span_m),
        (le(1.0), r + f.span_m),
    ])
}

/// Each fin as a closed plate (the outline of [`fin_outline`] × thickness) at its clock angle.
pub fn fin_plates(a: &Airframe, s: &MeshSettings) -> Result<Vec<Mesh>, ExportError> {
    s.validate()?;
    check_airframe(a)?;
    let Some(f) = a.fins.as_ref() else {
        return Ok(Vec::new());
    };
    for (field, value) in [
        ("fins.root_chord_m", f.root_chord_m),
        ("fins.span_m", f.span_m),
        ("fins.thickness_m", f.thickness_m),
    ] {
        if !(value > 0.0 && value.is_finite()) {
            return Err(ExportError::Airframe {
                field,
                value,
                reason: "must be a finite length > 0",
            });
        }
    }
    let outline = fin_outline(a).unwrap_or_default();
    f.clocks_rad()
        .iter()
        .enumerate()
        .map(|(k, &clock)| {
            let what = format!("fin {}", k + 1);
            let normal = Vector3::new(0.0, clock.cos(), clock.sin());
            let plate = extrude_convex(
                &outline,
                Point3::origin(),
                -Vector3::x(),
                normal,
                f.thickness_m,
            )
            .map_err(|source| ExportError::Plate {
                what: what.clone(),
                source,
            })?;
            plate
                .check(&s.tolerances)
                .map_err(|source| ExportError::Mesh { what, source })?;
            Ok(plate)
        })
        .collect()
}

/// The whole airframe: the nose-and-tube solid followed by one plate per fin.
pub fn airframe_mesh(a: &Airframe, s: &MeshSettings) -> Result<Mesh, ExportError> {
    let mut mesh = body_solid(a, s)?;
    for plate in fin_plates(a, s)? {
        mesh.append(&plate);
    }
    Ok(mesh)
}

/// Where a port's drill-axis cylinder runs.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DrillAxis {
    /// The hole centre on the outer surface, body frame, m (the cylinder's midpoint).
    pub centre: Point3<f64>,
    /// Unit vector along the drill axis, outward (the exhaust direction).
    pub direction: Vector3<f64>,
    /// Length of the hole through the wall along the axis, m (outer to inner surface).
    pub through_wall_m: f64,
    /// Half the cylinder's length, m.
    pub half_length_m: f64,
    /// Hole diameter, m.
    pub diameter_m: f64,
}

/// The drill axis of a port: along the exhaust direction through the hole centre.
///
/// The length through the wall is found exactly, by intersecting the axis with the
/// bore cylinder, so tangential cant and wall curvature are both accounted for.
pub fn drill_axis(a: &Airframe, port: &Port, s: &MeshSettings) -> Result<DrillAxis, ExportError> {
    s.validate()?;
    check_airframe(a)?;
    let diameter_m = port.nozzle.hole_diameter_m();
    if !(diameter_m > 0.0 && diameter_m.is_finite()) {
        return Err(ExportError::HoleDiameter {
            port: port.name.clone(),
            diameter_m,
        });
    }
    let e = port.exhaust_direction();
    let n = port.normal();
    if e.dot(&n).is_nan() || e.dot(&n) <= 1e-9 {
        return Err(ExportError::CantTooSteep {
            port: port.name.clone(),
            cant_deg: port.total_cant_rad().to_degrees(),
        });
    }
    let (ro, ri) = (a.outer_radius_m(), 0.5 * a.inner_diameter_m);
    // Going inward from the surface point p (|p| = ro in the y–z plane) along d = −e:
    // |p + t d|² = ri², the first root is the bore.
    let d = Vector3::new(0.0, -e.y, -e.z);
    let p = n * ro;
    let (qa, qb, qc) = (d.norm_squared(), p.dot(&d), ro * ro - ri * ri);
    let disc = qb * qb - qa * qc;
    if disc < 0.0 {
        return Err(ExportError::HoleMissesBore {
            port: port.name.clone(),
        });
    }
    let through_wall_m = (-qb - disc.sqrt()) / qa;
    Ok(DrillAxis {
        centre: Point3::from(port.position(ro)),
        direction: e,
        through_wall_m,
        half_length_m: s.drill_margin_walls * through_wall_m,
        diameter_m,
    })
}

/// A port's drill axis as a closed cylinder of the hole diameter.
pub fn drill_axis_cylinder(
    a: &Airframe,
    port: &Port,
    s: &MeshSettings,
) -> Result<Mesh, ExportError> {
    let axis = drill_axis(a, port, s)?;
    let (h, r) = (axis.half_length_m, 0.5 * axis.diameter_m);
    let frame = RevolveFrame::about(axis.centre, axis.direction);
    let what = format!("drill axis of port `{}`", port.name);
    profile_mesh(&what, &[(-h, 0.0), (-h, r), (h, r), (h, 0.0)], &frame, s)
}

/// Arrow lengths from per-port values: the largest value gets `max_length_m`.
pub fn marker_lengths(
    ports: &[Port],
    values: &[f64],
    m: &MarkerSettings,
) -> Result<Vec<f64>, ExportError> {
    m.validate()?;
    if values.len() != ports.len() {
        return Err(ExportError::ValueCount {
            expected: ports.len(),
            found: values.len(),
        });
    }
    if let Some((p, &v)) = ports
        .iter()
        .zip(values)
        .find(|(_, v)| !(v.is_finite() && **v >= 0.0))
    {
        return Err(ExportError::PortValue {
            port: p.name.clone(),
            value: v,
        });
    }
    let top = values.iter().copied().fold(0.0, f64::max);
    if top <= 0.0 {
        return Err(ExportError::NothingToMark);
    }
    Ok(values.iter().map(|v| m.max_length_m * v / top).collect())
}

/// An arrow of `length_m` leaving a port's hole centre along its exhaust direction:
/// a cylinder shaft and a cone head, one closed solid.
pub fn exhaust_arrow(
    a: &Airframe,
    port: &Port,
    length_m: f64,
    m: &MarkerSettings,
    s: &MeshSettings,
) -> Result<Mesh, ExportError> {
    m.validate()?;
    s.validate()?;
    check_airframe(a)?;
    if !(length_m > 0.0 && length_m.is_finite()) {
        return Err(ExportError::PortValue {
            port: port.name.clone(),
            value: length_m,
        });
    }
    let head = m.head_length_m.min(0.5 * length_m);
    let shaft = length_m - head;
    let (rs, rh) = (0.5 * m.shaft_diameter_m, 0.5 * m.head_diameter_m);
    let frame = RevolveFrame::about(
        Point3::from(port.position(a.outer_radius_m())),
        port.exhaust_direction(),
    );
    let what = format!("exhaust marker of port `{}`", port.name);
    let profile = [
        (0.0, 0.0),
        (0.0, rs),
        (shaft, rs),
        (shaft, rh),
        (length_m, 0.0),
    ];
    profile_mesh(&what, &profile, &frame, s)
}

/// Encode a mesh (metres) as binary STL in millimetres with the given header text
/// (cut to 80 bytes).
pub fn mesh_to_stl(mesh: &Mesh, header: &str) -> Result<Vec<u8>, ExportError> {
    let to_mm = |p: &Point3<f64>| {
        stl_io::Vertex::new([
            (p.x * 1000.0) as f32,
            (p.y * 1000.0) as f32,
            (p.z * 1000.0) as f32,
        ])
    };
    let triangles: Vec<stl_io::Triangle> = (0..mesh.len())
        .map(|i| {
            let n = mesh.normal(i);
            let [a, b, c] = mesh.corners(i);
            stl_io::Triangle {
                normal: stl_io::Normal::new([n.x as f32, n.y as f32, n.z as f32]),
                vertices: [to_mm(&a), to_mm(&b), to_mm(&c)],
            }
        })
        .collect();
    let mut bytes = Vec::with_capacity(84 + 50 * triangles.len());
    stl_io::write_stl(&mut bytes, triangles.iter())
        .map_err(|e| ExportError::Encode(e.to_string()))?;
    let mut cut = header.len().min(80);
    while !header.is_char_boundary(cut) {
        cut -= 1;
    }
    bytes[..80].fill(0);
    bytes[..cut].copy_from_slice(&header.as_bytes()[..cut]);
    Ok(bytes)
}

/// Decode STL (millimetres) into a mesh in metres, joining vertices with identical
/// coordinates. Used to check written files.
pub fn stl_to_mesh(bytes: &[u8]) -> Result<Mesh, ExportError> {
    let indexed = stl_io::read_stl(&mut std::io::Cursor::new(bytes))
        .map_err(|e| ExportError::Encode(e.to_string()))?;
    Ok(Mesh {
        vertices: indexed
            .vertices
            .iter()
            .map(|v| Point3::new(v[0] as f64, v[1] as f64, v[2] as f64) / 1000.0)
            .collect(),
        triangles: indexed.faces.iter().map(|f| f.vertices).collect(),
    })
}

fn header(kind: &str, design: &Design) -> String {
    format!(
        "portwright {kind}; layout {}; mm; body frame: +x to nose, +y clock 0, z=x*y",
        design.name
    )
}

/// Binary STL of the airframe (nose and tube as one solid, then the fins), mm, body frame.
pub fn airframe_stl(design: &Design, s: &MeshSettings) -> Result<Vec<u8>, ExportError> {
    mesh_to_stl(
        &airframe_mesh(&design.airframe, s)?,
        &header("airframe", design),
    )
}

/// Binary STL with one drill-axis cylinder per port, in port order, mm, body frame.
pub fn drill_axes_stl(design: &Design, s: &MeshSettings) -> Result<Vec<u8>, ExportError> {
    if design.ports.is_empty() {
        return Err(ExportError::NoPorts);
    }
    let mut mesh = Mesh::default();
    for port in &design.ports {
        mesh.append(&drill_axis_cylinder(&design.airframe, port, s)?);
    }
    mesh_to_stl(&mesh, &header("drill axes", design))
}

/// Binary STL with one exhaust arrow per port, scaled by `values` (one per port, for
/// example thrust in N; the largest gets `max_length_m`), mm, body frame. Ports whose
/// value is zero get no arrow.
pub fn exhaust_markers_stl(
    design: &Design,
    values: &[f64],
    m: &MarkerSettings,
    s: &MeshSettings,
) -> Result<Vec<u8>, ExportError> {
    if design.ports.is_empty() {
        return Err(ExportError::NoPorts);
    }
    let lengths = marker_lengths(&design.ports, values, m)?;
    let mut mesh = Mesh::default();
    for (port, &len) in design.ports.iter().zip(&lengths) {
        if len > 0.0 {
            mesh.append(&exhaust_arrow(&design.airframe, port, len, m, s)?);
        }
    }
    mesh_to_stl(&mesh, &header("exhaust markers", design))
}

#[cfg(test)]
mod tests {
    use super::super::fixture;
    use super::*;
    use crate::model::NoseShape;
    use approx::assert_relative_eq;
    use proptest::prelude::*;
    use std::f64::consts::PI;

    /// Ratio of a regular n-gon's area to its circumscribed circle's: the exact factor
    /// by which every revolved polyhedron here falls short of the smooth solid.
    fn polygon_factor(n: usize) -> f64 {
        let a = 2.0 * PI / n as f64;
        a.sin() / a
    }

    /// Volume of the polyhedron obtained by revolving a polyline profile (x, r) with
    /// `n` segments: a stack of frustums of regular n-gon pyramids, each
    /// h/3 (A0 + A1 + √(A0 A1)) with A = factor·π r².
    fn stacked_frustums(profile: &[(f64, f64)], n: usize) -> f64 {
        polygon_factor(n)
            * PI
            * profile
                .windows(2)
                .map(|w| {
                    let ((x0, r0), (x1, r1)) = (w[0], w[1]);
                    (x1 - x0).abs() / 3.0 * (r0 * r0 + r0 * r1 + r1 * r1)
                })
                .sum::<f64>()
    }

    /// Exact volume of the smooth nose of each shape, m³.
    fn exact_nose_volume(shape: NoseShape, l: f64, r: f64) -> f64 {
        match shape {
            NoseShape::Conical => PI * r * r * l / 3.0,
            NoseShape::Elliptical => 2.0 / 3.0 * PI * r * r * l,
            // π R² L ∫₀¹ (2u − u²)² du = π R² L (4/3 − 1 + 1/5).
            NoseShape::Parabolic => 8.0 / 15.0 * PI * r * r * l,
            NoseShape::Ogive => {
                // y = √(ρ² − w²) + (R − ρ), w = L − x; with √(ρ² − L²) = ρ − R:
                // ∫ y² = ρ²L − L³/3 + (R − ρ)²L + (R − ρ)(L(ρ − R) + ρ² asin(L/ρ)).
                let rho = (r * r + l * l) / (2.0 * r);
                let k = r - rho;
                PI * (rho * rho * l - l.powi(3) / 3.0
                    + k * k * l
                    + k * (l * (rho - r) + rho * rho * (l / rho).asin()))
            }
        }
    }

    fn with_shape(shape: NoseShape) -> Airframe {
        let mut a = fixture::airframe();
        a.nose.shape = shape;
        a
    }

    const ALL_SHAPES: [NoseShape; 4] = [
        NoseShape::Conical,
        NoseShape::Ogive,
        NoseShape::Elliptical,
        NoseShape::Parabolic,
    ];

    #[test]
    fn tube_volume_matches_annulus_within_polygon_error() {
        let a = fixture::airframe();
        for n in [8, 64, 200] {
            let s = MeshSettings {
                segments: n,
                ..Default::default()
            };
            let m = tube_shell(&a, &s).unwrap();
            m.check(&s.tolerances).unwrap();
            let (ro, ri) = (a.outer_radius_m(), 0.5 * a.inner_diameter_m);
            let smooth = PI * (ro * ro - ri * ri) * a.tube_length_m;
            // Same polyhedron in closed form: exact but for rounding.
            assert_relative_eq!(
                m.signed_volume(),
                polygon_factor(n) * smooth,
                max_relative = 1e-12
            );
            // The inscribed polygon always falls short, by 1 − sin(a)/a ≤ a²/6, a = 2π/n.
            let deficit = 1.0 - m.signed_volume() / smooth;
            let bound = (2.0 * PI / n as f64).powi(2) / 6.0;
            assert!(
                deficit > 0.0 && deficit <= bound,
                "n={n} deficit={deficit} bound={bound}"
            );
        }
    }

    #[test]
    fn nose_volumes_match_exact_formulas() {
        let s = MeshSettings::default();
        for shape in ALL_SHAPES {
            let a = with_shape(shape);
            let (l, r) = (a.nose.length_m, a.outer_radius_m());
            let m = nose_solid(&a, &s).unwrap();
            m.check(&s.tolerances).unwrap();
            let profile = nose_profile(&a, s.profile_samples);
            assert_relative_eq!(
                m.signed_volume(),
                stacked_frustums(&profile, s.segments),
                max_relative = 1e-12
            );
            // Against the smooth nose. All four profiles are concave, so the chords lie
            // inside the curve and the revolved profile falls short by at most
            // 2πR·Σ Δx·(largest gap between curve and chord on that span) — measured
            // here on a fine grid, so the tolerance follows from the sampling.
            let revolved = m.signed_volume() / polygon_factor(s.segments);
            let exact = exact_nose_volume(shape, l, r);
            let mut gap_area = 0.0;
            for w in profile.windows(2) {
                let (x0, r0, x1, r1) = (-w[0].0, w[0].1, -w[1].0, w[1].1);
                let mut gap: f64 = 0.0;
                for k in 0..=100 {
                    let f = k as f64 / 100.0;
                    let x = x0 + f * (x1 - x0);
                    gap = gap.max(profile_radius(shape, l, r, x) - (r0 + f * (r1 - r0)));
                }
                gap_area += (x1 - x0) * gap;
            }
            let allowance = 2.0 * PI * r * gap_area * 1.01;
            assert!(
                revolved <= exact * (1.0 + 1e-12) && exact - revolved <= allowance,
                "{shape:?}: revolved {revolved} exact {exact} allowance {allowance}"
            );
            // And the allowance is a real limit: well under a percent of the volume.
            assert!(allowance < 0.01 * exact, "{shape:?}");
        }
    }

    #[test]
    fn body_is_nose_plus_tube() {
        let s = MeshSettings::default();
        for shape in ALL_SHAPES {
            let a = with_shape(shape);
            let body = body_solid(&a, &s).unwrap();
            body.check(&s.tolerances).unwrap();
            let parts = nose_solid(&a, &s).unwrap().signed_volume()
                + tube_shell(&a, &s).unwrap().signed_volume();
            assert_relative_eq!(body.signed_volume(), parts, max_relative = 1e-12);
        }
    }

    #[test]
    fn short_ogive_is_rejected() {
        let mut a = with_shape(NoseShape::Ogive);
        a.nose.length_m = 0.02;
        assert!(matches!(
            nose_solid(&a, &MeshSettings::default()),
            Err(ExportError::OgiveTooShort { .. })
        ));
    }

    #[test]
    fn fins_are_plates_at_their_clocks() {
        let a = fixture::airframe();
        let f = a.fins.clone().unwrap();
        let s = MeshSettings::default();
        let plates = fin_plates(&a, &s).unwrap();
        assert_eq!(plates.len(), 3);
        let (ro, w) = (a.outer_radius_m(), a.wall_m());
        // Outline: trapezoid from mid-wall (depth w/2 below the surface) to the tip.
        let chord_at =
            |depth: f64| f.root_chord_m + (f.tip_chord_m - f.root_chord_m) * depth / f.span_m;
        let area = 0.5 * (chord_at(-0.5 * w) + f.tip_chord_m) * (f.span_m + 0.5 * w);
        for (plate, clock) in plates.iter().zip(f.clocks_rad()) {
            plate.check(&s.tolerances).unwrap();
            assert_relative_eq!(
                plate.signed_volume(),
                area * f.thickness_m,
                max_relative = 1e-12
            );
            let normal = Vector3::new(0.0, clock.cos(), clock.sin());
            let tangent = Vector3::new(0.0, -clock.sin(), clock.cos());
            for v in &plate.vertices {
                // Every corner is half a thickness off the fin's mid-plane...
                assert_relative_eq!(
                    v.coords.dot(&tangent).abs(),
                    0.5 * f.thickness_m,
                    epsilon = 1e-15
                );
                // ...between mid-wall and the tip radius.
                let radial = v.coords.dot(&normal);
                assert!(radial > ro - 0.5 * w - 1e-12 && radial < ro + f.span_m + 1e-12);
            }
            // Tip leading edge where the model puts it.
            assert!(plate.vertices.iter().any(|v| {
                (v.x + f.station_m + f.sweep_m).abs() < 1e-12
                    && (v.coords.dot(&normal) - ro - f.span_m).abs() < 1e-12
            }));
        }
    }

    #[test]
    fn airframe_stl_reads_back_closed_and_outward() {
        let d = fixture::design();
        let s = MeshSettings::default();
        let bytes = airframe_stl(&d, &s).unwrap();
        let header = std::str::from_utf8(&bytes[..80])
            .unwrap()
            .trim_end_matches('\0');
        assert!(
            header.starts_with("portwright airframe; layout test-54mm; mm;"),
            "{header}"
        );
        let built = airframe_mesh(&d.airframe, &s).unwrap();
        let back = stl_to_mesh(&bytes).unwrap();
        assert_eq!(back.len(), built.len());
        back.check(&s.tolerances).unwrap();
        let shells = back.shells();
        assert_eq!(shells.len(), 1 + 3, "body and three fins");
        // f32 millimetres keep about 7 significant digits; 1e-5 relative is ample.
        assert_relative_eq!(
            back.signed_volume(),
            built.signed_volume(),
            max_relative = 1e-5
        );
        // The body spans the nose tip to the aft end of the tube.
        let xmin = back
            .vertices
            .iter()
            .map(|v| v.x)
            .fold(f64::INFINITY, f64::min);
        let xmax = back
            .vertices
            .iter()
            .map(|v| v.x)
            .fold(f64::NEG_INFINITY, f64::max);
        assert_relative_eq!(xmax, 0.0, epsilon = 1e-9);
        assert_relative_eq!(xmin, -1.0, epsilon = 1e-6);
    }

    /// The two vertices used by the most triangles of a revolved solid are its poles.
    fn poles(shell: &Mesh) -> (Point3<f64>, Point3<f64>) {
        let mut uses = vec![0usize; shell.vertices.len()];
        for t in &shell.triangles {
            for &v in t {
                uses[v] += 1;
            }
        }
        let mut order: Vec<usize> = (0..uses.len()).collect();
        order.sort_by_key(|&i| std::cmp::Reverse(uses[i]));
        (shell.vertices[order[0]], shell.vertices[order[1]])
    }

    #[test]
    fn drill_axes_are_centred_on_the_surface_along_the_exhaust() {
        let d = fixture::design();
        let s = MeshSettings::default();
        let bytes = drill_axes_stl(&d, &s).unwrap();
        let back = stl_to_mesh(&bytes).unwrap();
        back.check(&s.tolerances).unwrap();
        let shells = back.shells();
        assert_eq!(shells.len(), d.ports.len());
        let ro = d.airframe.outer_radius_m();
        for (shell, port) in shells.iter().zip(&d.ports) {
            let axis = drill_axis(&d.airframe, port, &s).unwrap();
            let (p, q) = poles(shell);
            let mid = Point3::from((p.coords + q.coords) * 0.5);
            // On the outer surface at the port's station and clock, to 1e-6 m
            // (f32 millimetres near 1 m from the origin round to about 6e-8 m).
            assert!((-mid.x - port.station_m).abs() < 1e-6, "{}", port.name);
            assert!((mid.y.hypot(mid.z) - ro).abs() < 1e-6, "{}", port.name);
            let clock = mid.z.atan2(mid.y).rem_euclid(2.0 * PI);
            let dclock =
                (clock - port.clock_rad.rem_euclid(2.0 * PI) + PI).rem_euclid(2.0 * PI) - PI;
            assert!((dclock * ro).abs() < 1e-6, "{}", port.name);
            // Along the exhaust direction, as long as asked.
            let along = q - p;
            assert!(along.normalize().cross(&port.exhaust_direction()).norm() < 1e-5);
            assert_relative_eq!(along.norm(), 2.0 * axis.half_length_m, max_relative = 1e-5);
            // Volume: regular-polygon prism of the hole diameter.
            let r = 0.5 * port.nozzle.hole_diameter_m();
            assert_relative_eq!(
                shell.signed_volume(),
                polygon_factor(s.segments) * PI * r * r * 2.0 * axis.half_length_m,
                max_relative = 1e-4
            );
        }
    }

    #[test]
    fn drill_length_through_the_wall_follows_the_cant() {
        let a = fixture::airframe();
        let s = MeshSettings::default();
        let (ro, ri) = (a.outer_radius_m(), 0.5 * a.inner_diameter_m);
        let straight = drill_axis(&a, &fixture::port("p", 0.5, 40.0, 0.0, 0.0), &s).unwrap();
        assert_relative_eq!(straight.through_wall_m, a.wall_m(), epsilon = 1e-15);
        assert_relative_eq!(straight.half_length_m, 3.0 * a.wall_m(), epsilon = 1e-15);
        // Axial cant: the wall is straight along the axis, so the path is w / cos θ.
        let axial = drill_axis(&a, &fixture::port("p", 0.5, 40.0, 0.0, 20.0), &s).unwrap();
        assert_relative_eq!(
            axial.through_wall_m,
            a.wall_m() / 20f64.to_radians().cos(),
            max_relative = 1e-12
        );
        // Tangential cant θ in the cross-section: chord geometry gives
        // R cos θ − √(r² − R² sin² θ).
        let th = 30f64.to_radians();
        let tang = drill_axis(&a, &fixture::port("p", 0.5, 40.0, 30.0, 0.0), &s).unwrap();
        let expect = ro * th.cos() - (ri * ri - (ro * th.sin()).powi(2)).sqrt();
        assert_relative_eq!(tang.through_wall_m, expect, max_relative = 1e-12);
        // So steep it skims past the bore.
        assert!(matches!(
            drill_axis(&a, &fixture::port("p", 0.5, 40.0, 80.0, 0.0), &s),
            Err(ExportError::HoleMissesBore { .. })
        ));
        assert!(matches!(
            drill_axis(&a, &fixture::port("p", 0.5, 40.0, 0.0, 95.0), &s),
            Err(ExportError::CantTooSteep { .. })
        ));
    }

    #[test]
    fn markers_point_along_the_exhaust_scaled_by_value() {
        let d = fixture::design();
        let (s, m) = (MeshSettings::default(), MarkerSettings::default());
        let values = [2.0, 1.0, 0.5, 2.0];
        let bytes = exhaust_markers_stl(&d, &values, &m, &s).unwrap();
        let back = stl_to_mesh(&bytes).unwrap();
        back.check(&s.tolerances).unwrap();
        let shells = back.shells();
        assert_eq!(shells.len(), 4);
        let ro = d.airframe.outer_radius_m();
        for ((shell, port), v) in shells.iter().zip(&d.ports).zip(values) {
            let base = Point3::from(port.position(ro));
            // The tip is the vertex farthest from the hole centre.
            let tip = shell
                .vertices
                .iter()
                .copied()
                .max_by(|a, b| (a - base).norm().total_cmp(&(b - base).norm()))
                .unwrap();
            let arrow = tip - base;
            // Direction to 1e-5 rad: f32 millimetre rounding over a 12–50 mm arrow.
            assert!(
                arrow.normalize().cross(&port.exhaust_direction()).norm() < 1e-5,
                "{}",
                port.name
            );
            assert!(arrow.dot(&port.exhaust_direction()) > 0.0);
            assert_relative_eq!(arrow.norm(), m.max_length_m * v / 2.0, max_relative = 1e-5);
            // Volume: shaft cylinder plus cone head, both as regular polygons.
            let len = m.max_length_m * v / 2.0;
            let head = m.head_length_m.min(0.5 * len);
            let (rs, rh) = (0.5 * m.shaft_diameter_m, 0.5 * m.head_diameter_m);
            let exact =
                polygon_factor(s.segments) * PI * (rs * rs * (len - head) + rh * rh * head / 3.0);
            assert_relative_eq!(shell.signed_volume(), exact, max_relative = 1e-4);
        }
        // A zero value leaves its port without an arrow.
        let some = exhaust_markers_stl(&d, &[1.0, 0.0, 0.0, 1.0], &m, &s).unwrap();
        assert_eq!(stl_to_mesh(&some).unwrap().shells().len(), 2);
    }

    #[test]
    fn marker_inputs_are_checked() {
        let d = fixture::design();
        let m = MarkerSettings::default();
        assert_eq!(
            marker_lengths(&d.ports, &[1.0], &m),
            Err(ExportError::ValueCount {
                expected: 4,
                found: 1
            })
        );
        assert!(matches!(
            marker_lengths(&d.ports, &[1.0, f64::NAN, 1.0, 1.0], &m),
            Err(ExportError::PortValue { .. })
        ));
        assert_eq!(
            marker_lengths(&d.ports, &[0.0; 4], &m),
            Err(ExportError::NothingToMark)
        );
        let bad = MarkerSettings {
            head_diameter_m: 0.001,
            ..m
        };
        assert!(matches!(
            marker_lengths(&d.ports, &[1.0; 4], &bad),
            Err(ExportError::Setting { .. })
        ));
    }

    #[test]
    fn resolution_is_settable_and_checked() {
        let a = fixture::airframe();
        let coarse = MeshSettings {
            segments: 12,
            profile_samples: 4,
            ..Default::default()
        };
        let fine = MeshSettings::default();
        assert!(
            airframe_mesh(&a, &coarse).unwrap().len() < airframe_mesh(&a, &fine).unwrap().len()
        );
        let bad = MeshSettings {
            segments: 2,
            ..Default::default()
        };
        assert!(matches!(
            tube_shell(&a, &bad),
            Err(ExportError::Setting { .. })
        ));
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(64))]
        #[test]
        fn any_reasonable_port_gives_a_closed_centred_drill_axis(
            station in 0.25f64..0.95,
            clock in 0.0f64..360.0,
            tan in -40.0f64..40.0,
            ax in -40.0f64..40.0,
        ) {
            let a = fixture::airframe();
            let s = MeshSettings { segments: 12, ..Default::default() };
            let port = fixture::port("p", station, clock, tan, ax);
            let cyl = drill_axis_cylinder(&a, &port, &s).unwrap();
            prop_assert!(cyl.check(&s.tolerances).is_ok());
            let (p, q) = poles(&cyl);
            let mid = Point3::from((p.coords + q.coords) * 0.5);
            prop_assert!((mid - Point3::from(port.position(a.outer_radius_m()))).norm() < 1e-12);
        }
    }
}
