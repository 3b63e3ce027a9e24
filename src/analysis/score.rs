//! The optimiser's merit: the worst authority margin over axes, senses and flight
//! states, computed without allocating.
//!
//! The largest torque along a unit axis e inside the zonotope Z = Σ[0, bᵢ] is
//! t = min over facet normals n with n·e > 0 of h(n)/(n·e), where h is the support
//! function h(n) = Σ max(0, n·bᵢ). For a full-rank zonotope the facet normals are
//! exactly the cross products bᵢ × bⱼ of generator pairs (and their negatives), so
//! the loop over pairs gives the exact ray limit; `allocation::zonotope` computes
//! the same limit from its facet list, and the tests compare the two.
//!
//! Under a side-force limit the torque set is no longer a zonotope and every ray
//! limit is a small LP ([`LimitedRays`], checked against microlp). Objectives other
//! than the worst margin, weighted sums of them and lexicographic orders
//! ("margin then gas") are in [`Objective`]; later stages keep earlier ones above
//! a floor by reporting a shortfall as infeasibility.

use crate::allocation::lp::fibonacci_directions;
use crate::allocation::{LimitedRays, SideForceLimit};
use crate::model::{Design, Port};
use crate::optimize::Score;
use nalgebra::Vector3;
use std::fmt;

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
    /// A low percentile (0–100) of the worst margin over sampled as-built
    /// vehicles (the same draws for every candidate); needs [`SampledMargins`].
    MarginAtPercentile(f64),
}

/// The worst margin of a layout over a fixed set of sampled as-built vehicles,
/// supplied by the as-built module so this one need not know about tolerances.
pub trait SampledMargins: Send + Sync + fmt::Debug {
    /// Percentile `p` (0–100) over the samples of the worst margin (over states,
    /// axes and senses) of `ports` with per-state thrusts as in `states`.
    fn margin_percentile(&self, ports: &[Port], states: &[StateInputs], p: f64) -> f64;
}

impl fmt::Display for Term {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Term::WorstMargin => write!(f, "margin"),
            Term::RollPitchRatio(r) => write!(f, "ratio:{r}"),
            Term::GasPerTorque => write!(f, "gas"),
            Term::SideForcePerTorque => write!(f, "side-force"),
            Term::MarginAtPercentile(p) => write!(f, "margin@p{p}"),
        }
    }
}

/// What the optimiser maximises: one or more stages, each a weighted sum of
/// terms. With more than one stage the order is lexicographic: stage k is
/// maximised while every earlier stage keeps within `then_within` (a fraction)
/// of the best it reached.
#[derive(Debug, Clone, PartialEq)]
pub struct Objective {
    /// Stages in order of importance; each is a list of terms and weights.
    pub stages: Vec<Vec<(Term, f64)>>,
    /// How much of an earlier stage's best a later stage may give up, as a
    /// fraction of its magnitude. Default 0.01: common practice, no source.
    pub then_within: f64,
}

impl Default for Objective {
    fn default() -> Self {
        Self {
            stages: vec![vec![(Term::WorstMargin, 1.0)]],
            then_within: 0.01,
        }
    }
}

impl fmt::Display for Objective {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let stages: Vec<String> = self
            .stages
            .iter()
            .map(|terms| {
                terms
                    .iter()
                    .map(|(t, w)| {
                        if *w == 1.0 {
                            t.to_string()
                        } else {
                            format!("{t}={w}")
                        }
                    })
                    .collect::<Vec<_>>()
                    .join(", ")
            })
            .collect();
        write!(f, "{}", stages.join(" then "))
    }
}

impl Objective {
    /// Parse `margin`, `ratio:R`, `gas`, `side-force`, a weighted mix such as
    /// `margin=1,ratio:4=0.2`, or a lexicographic order such as `margin then gas`.
    pub fn parse(text: &str) -> Result<Self, String> {
        let parts: Vec<&str> = text.split(" then ").collect();
        if parts.len() > 1 && parts.iter().any(|p| p.trim().is_empty()) {
            return Err("`then` needs an objective on each side".to_string());
        }
        let mut stages = Vec::new();
        for stage in parts {
            stages.push(Self::parse_stage(stage)?);
        }
        Ok(Self {
            stages,
            ..Self::default()
        })
    }

    fn parse_stage(text: &str) -> Result<Vec<(Term, f64)>, String> {
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
                n if n.starts_with("margin@p") => {
                    let p: f64 = n[8..].trim().parse().map_err(|_| {
                        format!("`{part}`: expected margin@pN with a percentile N such as margin@p5")
                    })?;
                    if !(p.is_finite() && p > 0.0 && p < 100.0) {
                        return Err(format!("`{part}`: the percentile must be between 0 and 100"));
                    }
                    Term::MarginAtPercentile(p)
                }
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
                        "`{part}`: expected margin, margin@pN, ratio:R, gas or side-force (several joined by `,` or `then`)"
                    ))
                }
            };
            terms.push((term, weight));
        }
        if terms.is_empty() {
            return Err("no objective given".to_string());
        }
        Ok(terms)
    }

    /// Check `then_within`: a fraction from 0 up to, not including, 1.
    pub fn with_then_within(mut self, fraction: f64) -> Result<Self, String> {
        if !(fraction.is_finite() && (0.0..1.0).contains(&fraction)) {
            return Err(format!(
                "{fraction} is not a fraction from 0 up to, not including, 1"
            ));
        }
        self.then_within = fraction;
        Ok(self)
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

/// Directions used for the guaranteed torque under a side-force limit.
const GUARANTEE_DIRECTIONS: usize = 32;

/// Working storage of the merit for one worker: per-state thrusts, the torque
/// columns and lateral forces of the state being scored, and (under a side-force
/// limit) the LP workspace. Built once per worker; scoring allocates nothing.
#[derive(Debug, Clone)]
pub struct MeritScratch {
    states: Vec<StateInputs>,
    columns: Vec<Vector3<f64>>,
    lateral: Vec<(f64, f64)>,
    rays: Option<LimitedRays>,
}

impl MeritScratch {
    /// Largest torque along `e` in the loaded state (0 on a solver failure, which
    /// the optimiser then treats as lost control).
    fn ray(&mut self, e: &Vector3<f64>) -> f64 {
        match &mut self.rays {
            None => ray_limit(&self.columns, e),
            Some(r) => r.ray_limit(e).unwrap_or(0.0),
        }
    }

    /// Worst of the two senses along body axis `k`.
    fn axis(&mut self, k: usize) -> f64 {
        let mut e = Vector3::zeros();
        e[k] = 1.0;
        self.ray(&e).min(self.ray(&(-e)))
    }
}

/// The real merit for the optimiser: worst authority margin over axes, senses and
/// flight states (or another [`Objective`]), with per-state thrusts fixed except
/// for hole sizes, which are looked up in a table computed once for every drill
/// size the freedoms offer. Under a side-force limit every ray limit comes from
/// the LP of [`LimitedRays`] instead of the zonotope's closed form.
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
    /// Side-force rule for the allocations behind every ray limit.
    side: SideForceLimit,
    /// Directions for the guaranteed torque under a side-force limit.
    directions: Vec<Vector3<f64>>,
    /// The stage being maximised and the floors of the earlier stages.
    stage: usize,
    floors: Vec<f64>,
    /// Sampled as-built vehicles for `margin@pN`.
    spread: Option<std::sync::Arc<dyn SampledMargins>>,
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
            side: SideForceLimit::Free,
            directions: fibonacci_directions(GUARANTEE_DIRECTIONS),
            stage: 0,
            floors: Vec::new(),
            spread: None,
        })
    }

    /// Sampled as-built vehicles for the `margin@pN` term.
    pub fn with_spread(mut self, spread: std::sync::Arc<dyn SampledMargins>) -> Self {
        self.spread = Some(spread);
        self
    }

    /// Whether the objective has a `margin@pN` term.
    pub fn needs_spread(&self) -> bool {
        self.objective
            .stages
            .iter()
            .flatten()
            .any(|(t, _)| matches!(t, Term::MarginAtPercentile(_)))
    }

    /// Use another objective than the worst margin.
    pub fn with_objective(mut self, objective: Objective) -> Self {
        self.objective = objective;
        self
    }

    /// Limit the side force of the allocations behind every ray limit.
    pub fn with_side_force(mut self, side: SideForceLimit) -> Self {
        self.side = side;
        self
    }

    /// The objective.
    pub fn objective(&self) -> &Objective {
        &self.objective
    }

    /// The side-force rule.
    pub fn side_force(&self) -> SideForceLimit {
        self.side
    }

    /// The same merit set to maximise stage `stage` of the objective, with each
    /// earlier stage j held at or above `floors[j]`.
    pub fn for_stage(&self, stage: usize, floors: &[f64]) -> Self {
        let mut s = self.clone();
        s.stage = stage.min(self.objective.stages.len().saturating_sub(1));
        s.floors = floors.iter().copied().take(s.stage).collect();
        s
    }

    /// Fresh working storage.
    pub fn new_scratch(&self) -> MeritScratch {
        let n = self.design.ports.len();
        MeritScratch {
            states: self.states.clone(),
            columns: Vec::with_capacity(n),
            lateral: Vec::with_capacity(n),
            rays: match self.side {
                SideForceLimit::Free => None,
                side => LimitedRays::new(n, side).ok(),
            },
        }
    }

    /// Write the per-state thrusts of `ports` (hole sizes may differ from the
    /// design's) into the scratch.
    fn set_thrusts(&self, ports: &[Port], w: &mut MeritScratch) {
        if w.states.len() != self.states.len() {
            w.states = self.states.clone();
        }
        for (k, s) in w.states.iter_mut().enumerate() {
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
    }

    /// Load state `k` of the scratch: torque columns, lateral forces and the LP.
    fn load(&self, ports: &[Port], k: usize, w: &mut MeritScratch) {
        let radius = self.design.airframe.outer_radius_m();
        let s = &w.states[k];
        w.columns.clear();
        w.lateral.clear();
        for (p, &t) in ports.iter().zip(&s.thrust_n) {
            let f = p.thrust_direction() * t;
            w.columns.push((p.position(radius) - s.cg).cross(&f));
            w.lateral.push((f.y, f.z));
        }
        if let Some(r) = &mut w.rays {
            if r.load(&w.columns, &w.lateral).is_err() {
                // Bounds from finite thrusts are always valid; should they not be,
                // an all-zero layout scores as lost control.
                w.columns.iter_mut().for_each(|c| *c = Vector3::zeros());
                let _ = r.load(&w.columns, &w.lateral);
            }
        }
    }

    /// Per state: the worst-sense authority about roll, pitch and yaw, N·m, under
    /// the side-force rule.
    pub fn authority(&self, ports: &[Port]) -> Vec<[f64; 3]> {
        let mut w = self.new_scratch();
        self.set_thrusts(ports, &mut w);
        (0..w.states.len())
            .map(|k| {
                self.load(ports, k, &mut w);
                [w.axis(0), w.axis(1), w.axis(2)]
            })
            .collect()
    }

    /// Per state: the guaranteed torque, N·m (the largest torque available in
    /// every direction). Exact without a side-force limit; under one, the least
    /// ray limit over a fixed set of 32 directions, an upper bound.
    pub fn guaranteed(&self, ports: &[Port]) -> Vec<f64> {
        let mut w = self.new_scratch();
        self.set_thrusts(ports, &mut w);
        (0..w.states.len())
            .map(|k| {
                self.load(ports, k, &mut w);
                self.guaranteed_loaded(&mut w)
            })
            .collect()
    }

    fn guaranteed_loaded(&self, w: &mut MeritScratch) -> f64 {
        if w.rays.is_none() {
            return inscribed_radius(&w.columns);
        }
        self.directions
            .iter()
            .map(|d| w.ray(d))
            .fold(f64::INFINITY, f64::min)
    }

    /// Value of one term for ports whose per-state thrusts are already in `w`.
    fn term(&self, term: Term, ports: &[Port], w: &mut MeritScratch) -> f64 {
        match term {
            Term::WorstMargin => {
                let mut worst = f64::INFINITY;
                for k in 0..w.states.len() {
                    self.load(ports, k, w);
                    for axis in 0..3 {
                        let required = w.states[k].required_n_m[axis];
                        if required > 0.0 {
                            worst = worst.min(w.axis(axis) / required);
                        }
                    }
                }
                worst
            }
            Term::RollPitchRatio(target) => {
                let mut ratio = f64::INFINITY;
                for k in 0..w.states.len() {
                    self.load(ports, k, w);
                    let i = self.inertia[k];
                    let roll = w.axis(0) / i[0];
                    let pitch = w.axis(1) / i[1];
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
                for k in 0..w.states.len() {
                    self.load(ports, k, w);
                    ball = ball.min(self.guaranteed_loaded(w));
                }
                let gas: f64 = self.mass_flow.iter().sum();
                if ball > 0.0 {
                    -gas / ball
                } else {
                    -1e9
                }
            }
            Term::MarginAtPercentile(p) => match &self.spread {
                Some(s) => s.margin_percentile(ports, &w.states, p),
                // Without samples the term cannot be scored; callers check
                // `needs_spread` first, so this is never what a user sees.
                None => -1e9,
            },
            Term::SideForcePerTorque => {
                if w.states.is_empty() {
                    return 0.0;
                }
                self.load(ports, 0, w);
                let torque: f64 = w.columns.iter().map(|c| c.norm()).sum();
                let side: f64 = w.lateral.iter().map(|f| f.0.hypot(f.1)).sum();
                if torque > 0.0 {
                    -side / torque
                } else {
                    -1e9
                }
            }
        }
    }

    fn stage_value(&self, stage: usize, ports: &[Port], w: &mut MeritScratch) -> f64 {
        self.objective.stages[stage]
            .iter()
            .map(|&(term, weight)| weight * self.term(term, ports, w))
            .sum()
    }

    /// Value of every stage of the objective for `ports`, in order.
    pub fn stage_values(&self, ports: &[Port]) -> Vec<f64> {
        let mut w = self.new_scratch();
        self.set_thrusts(ports, &mut w);
        (0..self.objective.stages.len())
            .map(|k| self.stage_value(k, ports, &mut w))
            .collect()
    }

    /// Value of one term for `ports`.
    pub fn term_value(&self, term: Term, ports: &[Port]) -> f64 {
        let mut w = self.new_scratch();
        self.set_thrusts(ports, &mut w);
        self.term(term, ports, &mut w)
    }

    /// Merit of a set of ports (the design's ports, moved) at the current stage,
    /// ignoring the floors of earlier stages.
    pub fn merit(&self, ports: &[Port], w: &mut MeritScratch) -> f64 {
        self.set_thrusts(ports, w);
        self.stage_value(self.stage, ports, w)
    }

    /// The floor an earlier stage keeps in later stages, given the best it
    /// reached: `best` less `then_within` of its magnitude.
    pub fn floor(&self, best: f64) -> f64 {
        best - self.objective.then_within * best.abs()
    }
}

impl crate::optimize::stages::StagedScore for MarginScore {
    type Stage = MarginScore;
    fn stage_count(&self) -> usize {
        self.objective.stages.len()
    }
    fn stage(&self, k: usize, floors: &[f64]) -> Self {
        self.for_stage(k, floors)
    }
    fn stage_values(&self, ports: &[Port]) -> Vec<f64> {
        MarginScore::stage_values(self, ports)
    }
    fn floor(&self, best: f64) -> f64 {
        MarginScore::floor(self, best)
    }
}

impl crate::optimize::problem::LayoutScore for MarginScore {
    type Scratch = MeritScratch;
    fn scratch(&self) -> Self::Scratch {
        self.new_scratch()
    }
    fn score(&self, ports: &[Port], scratch: &mut Self::Scratch) -> f64 {
        self.merit(ports, scratch)
    }
    fn rate(&self, ports: &[Port], w: &mut Self::Scratch) -> Score {
        self.set_thrusts(ports, w);
        // Earlier stages below their floors: infeasible by the relative shortfall.
        let mut shortfall = 0.0;
        for (j, &floor) in self.floors.iter().enumerate() {
            let v = self.stage_value(j, ports, w);
            if v < floor {
                shortfall += (floor - v) / floor.abs().max(1e-12);
            }
        }
        if shortfall > 0.0 {
            return Score::infeasible(shortfall);
        }
        Score::feasible(self.stage_value(self.stage, ports, w))
    }
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
            o.stages,
            vec![vec![
                (Term::WorstMargin, 1.0),
                (Term::RollPitchRatio(4.0), 0.2)
            ]]
        );
        let o = Objective::parse("margin then gas=2, side-force").unwrap();
        assert_eq!(
            o.stages,
            vec![
                vec![(Term::WorstMargin, 1.0)],
                vec![(Term::GasPerTorque, 2.0), (Term::SideForcePerTorque, 1.0)]
            ]
        );
        assert_eq!(o.to_string(), "margin then gas=2, side-force");
        assert!(Objective::parse("margin then ").is_err());
        assert!(Objective::default().with_then_within(1.0).is_err());
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
    fn heron() -> (Design, crate::analysis::Analysis) {
        let d =
            crate::layout::parse_str(include_str!("../../layouts/heron-54.toml"), "heron-54.toml")
                .unwrap();
        let a = crate::analysis::analyze(&d).unwrap();
        (d, a)
    }

    #[test]
    fn free_authority_matches_the_analysis_envelope() {
        // `analyze` takes its authority from the facet list of
        // `allocation::zonotope`; the merit's closed-form ray limits must agree.
        let (d, a) = heron();
        let score = MarginScore::new(&d, &a, &[]).unwrap();
        for (got, s) in score.authority(&d.ports).iter().zip(&a.states) {
            for k in 0..3 {
                let want = s.authority[k].positive_n_m.min(s.authority[k].negative_n_m);
                assert!(
                    (got[k] - want).abs() <= 1e-9 * want.max(1e-12),
                    "{got:?} vs {want}"
                );
            }
        }
    }

    #[test]
    fn side_force_authority_matches_microlp() {
        // Reference: the ray LP through good_lp/microlp (`allocation::lp::max_along`),
        // built from the analysis's own effectiveness matrix. 1e-8 relative is
        // microlp's accuracy on these programs.
        use crate::allocation::lp;
        let (d, a) = heron();
        for side in [
            SideForceLimit::Bounded { limit_n: 0.3 },
            SideForceLimit::PureCouple,
        ] {
            let score = MarginScore::new(&d, &a, &[]).unwrap().with_side_force(side);
            let got = score.authority(&d.ports);
            for (k, s) in a.states.iter().enumerate() {
                let e = crate::analysis::effectiveness(&d, &s.mass, &s.ports).unwrap();
                for axis in 0..3 {
                    let mut dir = Vector3::zeros();
                    dir[axis] = 1.0;
                    let want = lp::max_along(&e, &dir, side)
                        .unwrap()
                        .min(lp::max_along(&e, &(-dir), side).unwrap());
                    assert!(
                        (got[k][axis] - want).abs() <= 1e-8 * want.max(1e-6),
                        "{side:?} state {k} axis {axis}: {} vs {want}",
                        got[k][axis]
                    );
                }
            }
            // A limit can only take authority away.
            let free = MarginScore::new(&d, &a, &[]).unwrap().authority(&d.ports);
            for (g, f) in got.iter().zip(&free) {
                for axis in 0..3 {
                    assert!(g[axis] <= f[axis] * (1.0 + 1e-9));
                }
            }
        }
    }

    #[test]
    fn later_stage_below_its_floor_is_infeasible() {
        use crate::optimize::problem::LayoutScore;
        let (d, a) = heron();
        let o = Objective::parse("margin then gas").unwrap();
        let base = MarginScore::new(&d, &a, &[]).unwrap().with_objective(o);
        let v = base.stage_values(&d.ports);
        let mut w = base.new_scratch();
        // Floor just under the start's margin: the start is feasible and scored by gas.
        let ok = base.for_stage(1, &[base.floor(v[0])]);
        let r = ok.rate(&d.ports, &mut w);
        assert!(r.is_feasible());
        assert!((r.merit - v[1]).abs() <= 1e-12 * v[1].abs());
        // Floor 10 % above the start's margin: infeasible by that shortfall.
        let high = base.for_stage(1, &[v[0] * 1.1]);
        let r = high.rate(&d.ports, &mut w);
        assert!(!r.is_feasible());
        assert!((r.violation - 0.1 / 1.1).abs() < 1e-9, "{}", r.violation);
    }
}
