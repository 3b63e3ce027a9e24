//! The optimiser's merit: the worst authority margin over axes, senses and flight
//! states, computed without allocating.
//!
//! The largest torque along a unit axis e inside the zonotope Z = Σ[0, bᵢ] is
//! t = min over facet normals n with n·e > 0 of h(n)/(n·e), where h is the support
//! function h(n) = Σ max(0, n·bᵢ). For a full-rank zonotope the facet normals are
//! exactly the cross products bᵢ × bⱼ of generator pairs (and their negatives), so
//! the loop over pairs gives the exact ray limit; `allocation::zonotope` computes
//! the same limit from its facet list, and the tests compare the two.

use crate::model::{Design, Port};
use nalgebra::Vector3;

/// What the merit needs of one flight state, fixed while ports move.
#[derive(Debug, Clone)]
pub struct StateInputs {
    /// CG in the body frame, m.
    pub cg: Vector3<f64>,
    /// Torque required about roll, pitch, yaw, N·m.
    pub required_n_m: [f64; 3],
    /// Thrust of each port at this state, N.
    pub thrust_n: Vec<f64>,
}

/// Largest t with t·e in the zonotope of `columns`; 0 when the columns do not span
/// three dimensions (the optimiser treats lost control as the worst case).
pub fn ray_limit(columns: &[Vector3<f64>], e: &Vector3<f64>) -> f64 {
    let mut best = f64::INFINITY;
    let scale: f64 = columns.iter().map(|b| b.norm()).fold(0.0, f64::max);
    if scale == 0.0 {
        return 0.0;
    }
    // Cross products smaller than this are parallel generators (no facet of their own).
    let eps = 1e-12 * scale * scale;
    for i in 0..columns.len() {
        for j in (i + 1)..columns.len() {
            let n = columns[i].cross(&columns[j]);
            if n.norm() <= eps {
                continue;
            }
            let ne = n.dot(e);
            if ne.abs() <= eps * 1e-3 {
                continue;
            }
            let (mut hp, mut hn) = (0.0, 0.0);
            for b in columns {
                let d = n.dot(b);
                if d > 0.0 {
                    hp += d;
                } else {
                    hn -= d;
                }
            }
            let t = if ne > 0.0 { hp / ne } else { hn / -ne };
            best = best.min(t);
        }
    }
    if best.is_finite() {
        best
    } else {
        0.0
    }
}

/// Worst margin of `ports` over the states: min over states, axes and senses of
/// (largest torque along that axis sense) / (required torque). `columns` is scratch.
pub fn worst_margin(
    design: &Design,
    ports: &[Port],
    states: &[StateInputs],
    columns: &mut Vec<Vector3<f64>>,
) -> f64 {
    let radius = design.airframe.outer_radius_m();
    let mut worst = f64::INFINITY;
    for s in states {
        columns.clear();
        for (p, &t) in ports.iter().zip(&s.thrust_n) {
            let f = p.thrust_direction() * t;
            columns.push((p.position(radius) - s.cg).cross(&f));
        }
        for k in 0..3 {
            if s.required_n_m[k] <= 0.0 {
                continue;
            }
            let mut e = Vector3::zeros();
            e[k] = 1.0;
            let up = ray_limit(columns, &e);
            let down = ray_limit(columns, &(-e));
            worst = worst.min(up.min(down) / s.required_n_m[k]);
        }
    }
    worst
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::allocation::zonotope::Zonotope;
    use crate::allocation::Tolerances;
    use nalgebra::Matrix3xX;
    use proptest::prelude::*;

    proptest! {
        // The pair loop and the facet list of `allocation::zonotope` are two separate
        // computations of the same ray limit; 1e-9 relative is rounding of a few
        // hundred products of O(1) generators, so the floor is 1e-9 absolute.
        #[test]
        fn ray_limit_matches_the_zonotope_facets(cols in proptest::collection::vec((-1.0f64..1.0, -1.0f64..1.0, -1.0f64..1.0), 4..9), k in 0usize..6) {
            let columns: Vec<Vector3<f64>> = cols.iter().map(|&(a, b, c)| Vector3::new(a, b, c)).collect();
            let z = Zonotope::new(Matrix3xX::from_columns(&columns), &Tolerances::default()).unwrap();
            prop_assume!(z.rank() == 3);
            let mut e = Vector3::zeros();
            e[k % 3] = if k < 3 { 1.0 } else { -1.0 };
            let fast = ray_limit(&columns, &e);
            let exact = z.max_along(&e);
            prop_assert!((fast - exact).abs() <= 1e-9 * (exact.abs() + 1.0), "fast {fast} exact {exact}");
        }
    }

    #[test]
    fn inscribed_radius_of_a_box_is_its_smallest_half_width() {
        // Worked by hand: generators ±a·x, ±b·y, ±c·z give the box [−a,a]×[−b,b]×[−c,c],
        // whose largest centred ball has radius min(a, b, c).
        let cols = vec![
            Vector3::new(0.3, 0.0, 0.0),
            Vector3::new(-0.3, 0.0, 0.0),
            Vector3::new(0.0, 0.5, 0.0),
            Vector3::new(0.0, -0.5, 0.0),
            Vector3::new(0.0, 0.0, 0.2),
            Vector3::new(0.0, 0.0, -0.2),
        ];
        assert!((inscribed_radius(&cols) - 0.2).abs() < 1e-12);
    }

    proptest! {
        // Same quantity from the facet list of `allocation::zonotope`; 1e-9 for rounding.
        #[test]
        fn inscribed_radius_matches_the_zonotope(cols in proptest::collection::vec((-1.0f64..1.0, -1.0f64..1.0, -1.0f64..1.0), 4..9)) {
            let columns: Vec<Vector3<f64>> = cols.iter().map(|&(a, b, c)| Vector3::new(a, b, c)).collect();
            let z = Zonotope::new(Matrix3xX::from_columns(&columns), &Tolerances::default()).unwrap();
            prop_assume!(z.rank() == 3);
            let fast = inscribed_radius(&columns);
            let exact = z.inscribed_radius();
            prop_assert!((fast - exact).abs() <= 1e-9 * (exact.abs() + 1.0), "fast {fast} exact {exact}");
        }
    }

    #[test]
    fn objectives_parse() {
        assert_eq!(Objective::parse("margin").unwrap(), Objective::default());
        let o = Objective::parse("margin=1, ratio:4=0.2").unwrap();
        assert_eq!(
            o.terms,
            vec![(Term::WorstMargin, 1.0), (Term::RollPitchRatio(4.0), 0.2)]
        );
        assert!(Objective::parse("speed").is_err());
        assert!(Objective::parse("ratio:-1").is_err());
        assert!(Objective::parse("gas=0").is_err());
    }

    #[test]
    fn four_radial_ports_give_a_box() {
        // Worked by hand: four ports at clocks 0/90/180/270 with arm L give torques
        // ±T·L about z and y only; with a roll couple pair added, the envelope is a
        // box and the ray limit along each axis is the single-port torque.
        let cols = vec![
            Vector3::new(0.0, 0.0, -0.5),
            Vector3::new(0.0, 0.5, 0.0),
            Vector3::new(0.0, 0.0, 0.5),
            Vector3::new(0.0, -0.5, 0.0),
            Vector3::new(0.02, 0.0, 0.0),
            Vector3::new(-0.02, 0.0, 0.0),
        ];
        assert!((ray_limit(&cols, &Vector3::new(0.0, 1.0, 0.0)) - 0.5).abs() < 1e-12);
        assert!((ray_limit(&cols, &Vector3::new(-1.0, 0.0, 0.0)) - 0.02).abs() < 1e-12);
    }
}

/// One term of the optimiser's objective (higher is better for each).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Term {
    /// The worst authority margin over axes, senses and states.
    WorstMargin,
    /// Match a roll-to-pitch authority ratio R: −|ln(ρ/R)| with ρ the smallest
    /// ratio over states of roll to pitch angular-acceleration authority.
    RollPitchRatio(f64),
    /// Least gas per guaranteed torque: −Σṁ / (smallest guaranteed torque over
    /// states, the radius of the largest origin-centred ball in the envelope).
    GasPerTorque,
    /// Least side force per torque: −Σ|F_lateral| / Σ|τ| over the ports at the
    /// first state.
    SideForcePerTorque,
}

/// A weighted sum of terms.
#[derive(Debug, Clone, PartialEq)]
pub struct Objective {
    /// Terms and their weights.
    pub terms: Vec<(Term, f64)>,
}

impl Default for Objective {
    fn default() -> Self {
        Self {
            terms: vec![(Term::WorstMargin, 1.0)],
        }
    }
}

impl Objective {
    /// Parse `margin`, `ratio:R`, `gas`, `side-force`, or a weighted mix such as
    /// `margin=1,ratio:4=0.2`.
    pub fn parse(text: &str) -> Result<Self, String> {
        let mut terms = Vec::new();
        for part in text.split(',').map(str::trim).filter(|p| !p.is_empty()) {
            let (name, weight) = match part.rsplit_once('=') {
                Some((n, w)) => (
                    n.trim(),
                    w.trim()
                        .parse::<f64>()
                        .map_err(|_| format!("`{part}`: the weight after `=` must be a number"))?,
                ),
                None => (part, 1.0),
            };
            if !weight.is_finite() || weight <= 0.0 {
                return Err(format!("`{part}`: the weight must be above zero"));
            }
            let term = match name {
                "margin" => Term::WorstMargin,
                "gas" => Term::GasPerTorque,
                "side-force" => Term::SideForcePerTorque,
                n if n.starts_with("ratio:") => {
                    let r: f64 = n[6..]
                        .trim()
                        .parse()
                        .map_err(|_| format!("`{part}`: expected ratio:R with a number R"))?;
                    if !(r.is_finite() && r > 0.0) {
                        return Err(format!("`{part}`: the target ratio must be above zero"));
                    }
                    Term::RollPitchRatio(r)
                }
                _ => {
                    return Err(format!(
                        "`{part}`: expected margin, ratio:R, gas or side-force"
                    ))
                }
            };
            terms.push((term, weight));
        }
        if terms.is_empty() {
            return Err("no objective given".to_string());
        }
        Ok(Self { terms })
    }
}

/// Radius of the largest origin-centred ball inside the zonotope of `columns`
/// (0 when the origin is not inside): min over facet normals n of h(±n)/|n|.
pub fn inscribed_radius(columns: &[Vector3<f64>]) -> f64 {
    let mut best = f64::INFINITY;
    let scale: f64 = columns.iter().map(|b| b.norm()).fold(0.0, f64::max);
    let eps = 1e-12 * scale * scale;
    for i in 0..columns.len() {
        for j in (i + 1)..columns.len() {
            let n = columns[i].cross(&columns[j]);
            let len = n.norm();
            if len <= eps {
                continue;
            }
            let (mut hp, mut hn) = (0.0, 0.0);
            for b in columns {
                let d = n.dot(b);
                if d > 0.0 {
                    hp += d;
                } else {
                    hn -= d;
                }
            }
            best = best.min(hp.min(hn) / len);
        }
    }
    if best.is_finite() {
        best
    } else {
        0.0
    }
}

/// The real merit for the optimiser: worst authority margin over axes, senses and
/// flight states, with per-state thrusts fixed except for hole sizes, which are
/// looked up in a table computed once for every drill size the freedoms offer.
#[derive(Debug, Clone)]
pub struct MarginScore {
    design: Design,
    states: Vec<StateInputs>,
    /// Per state: (hole diameter, thrust) sorted by diameter.
    hole_thrust: Vec<Vec<(f64, f64)>>,
    /// Per state: diagonal inertia, kg·m².
    inertia: Vec<Vector3<f64>>,
    /// Gas flow of each port at the first state, kg/s.
    mass_flow: Vec<f64>,
    /// What to maximise.
    objective: Objective,
}

impl MarginScore {
    /// Build from an analysis of the starting design and the drill sizes the
    /// optimiser may choose (empty when hole sizes stay fixed).
    pub fn new(
        design: &Design,
        analysis: &super::Analysis,
        hole_sizes_m: &[f64],
    ) -> Result<Self, super::AnalysisError> {
        let mut states = Vec::new();
        let mut hole_thrust = Vec::new();
        for s in &analysis.states {
            states.push(StateInputs {
                cg: s.mass.cg(),
                required_n_m: s.required.total_n_m(),
                thrust_n: s.ports.iter().map(|p| p.thrust_n).collect(),
            });
            let mut table = Vec::new();
            for &d in hole_sizes_m {
                let mut trial = design.clone();
                for p in &mut trial.ports {
                    p.nozzle = crate::model::NozzleSpec::Hole {
                        diameter_m: d,
                        discharge_coefficient: match p.nozzle {
                            crate::model::NozzleSpec::Hole {
                                discharge_coefficient,
                                ..
                            } => discharge_coefficient,
                            crate::model::NozzleSpec::ConvergingDiverging {
                                discharge_coefficient,
                                ..
                            } => discharge_coefficient,
                        },
                    };
                }
                let at = super::feed::ports_at(&trial, &s.name, s.ambient_pressure_pa)?;
                table.push((d, at.ports[0].thrust_n));
            }
            table.sort_by(|a, b| a.0.total_cmp(&b.0));
            hole_thrust.push(table);
        }
        Ok(Self {
            design: design.clone(),
            states,
            hole_thrust,
            inertia: analysis
                .states
                .iter()
                .map(|s| s.mass.inertia_diagonal())
                .collect(),
            mass_flow: analysis
                .states
                .first()
                .map(|s| s.ports.iter().map(|p| p.mass_flow_kg_s).collect())
                .unwrap_or_default(),
            objective: Objective::default(),
        })
    }

    /// Use another objective than the worst margin.
    pub fn with_objective(mut self, objective: Objective) -> Self {
        self.objective = objective;
        self
    }

    /// Value of one term for ports whose per-state thrusts are already in `states`.
    fn term(
        &self,
        term: Term,
        ports: &[Port],
        states: &[StateInputs],
        columns: &mut Vec<Vector3<f64>>,
    ) -> f64 {
        let radius = self.design.airframe.outer_radius_m();
        let fill = |columns: &mut Vec<Vector3<f64>>, s: &StateInputs| {
            columns.clear();
            for (p, &t) in ports.iter().zip(&s.thrust_n) {
                columns.push((p.position(radius) - s.cg).cross(&(p.thrust_direction() * t)));
            }
        };
        match term {
            Term::WorstMargin => worst_margin(&self.design, ports, states, columns),
            Term::RollPitchRatio(target) => {
                let mut ratio = f64::INFINITY;
                for (s, i) in states.iter().zip(&self.inertia) {
                    fill(columns, s);
                    let axis = |k: usize, columns: &[Vector3<f64>]| {
                        let mut e = Vector3::zeros();
                        e[k] = 1.0;
                        ray_limit(columns, &e).min(ray_limit(columns, &(-e))) / i[k]
                    };
                    let roll = axis(0, columns);
                    let pitch = axis(1, columns);
                    ratio = ratio.min(if pitch > 0.0 { roll / pitch } else { 0.0 });
                }
                if ratio > 0.0 && ratio.is_finite() {
                    -(ratio / target).ln().abs()
                } else {
                    -1e3
                }
            }
            Term::GasPerTorque => {
                let mut ball = f64::INFINITY;
                for s in states {
                    fill(columns, s);
                    ball = ball.min(inscribed_radius(columns));
                }
                let gas: f64 = self.mass_flow.iter().sum();
                if ball > 0.0 {
                    -gas / ball
                } else {
                    -1e9
                }
            }
            Term::SideForcePerTorque => {
                let Some(s) = states.first() else { return 0.0 };
                fill(columns, s);
                let torque: f64 = columns.iter().map(|c| c.norm()).sum();
                let side: f64 = ports
                    .iter()
                    .zip(&s.thrust_n)
                    .map(|(p, &t)| {
                        let f = p.thrust_direction() * t;
                        (f.y * f.y + f.z * f.z).sqrt()
                    })
                    .sum();
                if torque > 0.0 {
                    -side / torque
                } else {
                    -1e9
                }
            }
        }
    }

    /// Merit of a set of ports (the design's ports, moved), with `scratch` reused.
    pub fn merit(
        &self,
        ports: &[Port],
        scratch: &mut (Vec<Vector3<f64>>, Vec<StateInputs>),
    ) -> f64 {
        let (columns, states) = scratch;
        if states.len() != self.states.len() {
            *states = self.states.clone();
        }
        for (k, s) in states.iter_mut().enumerate() {
            for (i, p) in ports.iter().enumerate() {
                let original = &self.design.ports[i];
                s.thrust_n[i] = if p.nozzle == original.nozzle {
                    self.states[k].thrust_n[i]
                } else {
                    let d = p.nozzle.hole_diameter_m();
                    let t = &self.hole_thrust[k];
                    match t.binary_search_by(|e| e.0.total_cmp(&d)) {
                        Ok(j) => t[j].1,
                        Err(_) => self.states[k].thrust_n[i],
                    }
                };
            }
        }
        let mut total = 0.0;
        for &(term, weight) in &self.objective.terms {
            total += weight * self.term(term, ports, states, columns);
        }
        total
    }
}

impl crate::optimize::problem::LayoutScore for MarginScore {
    type Scratch = (Vec<Vector3<f64>>, Vec<StateInputs>);
    fn scratch(&self) -> Self::Scratch {
        (
            Vec::with_capacity(self.design.ports.len()),
            self.states.clone(),
        )
    }
    fn score(&self, ports: &[Port], scratch: &mut Self::Scratch) -> f64 {
        self.merit(ports, scratch)
    }
}
