//! A layout problem: a design, what may move, the rules and a merit, put together
//! as an [`Objective`] for the search.
//!
//! The merit comes from the caller through [`LayoutScore`]; the analysis layer
//! plugs in the real one (worst authority margin over axes and flight states).
//! A point that breaks a rule is scored by its penalty alone and the merit is not
//! computed, which saves the expensive part of the work for layouts that could be
//! built. [`optimize`] starts from the design as it is, runs the search and checks
//! the answer once more with the full list of violations before handing it back.

use super::constraints::{Constraints, Limits, Violation};
use super::search::{search, Objective, Outcome, Progress, Score, SearchError, SearchSettings};
use super::variables::{Freedom, VariableError, Variables};
use super::SectionError;
use crate::model::{Design, Port};
use std::sync::atomic::AtomicBool;
use thiserror::Error;

/// The caller's merit of a layout that meets every rule; higher is better.
pub trait LayoutScore: Sync {
    /// Per-worker working storage (effectiveness matrices, envelopes, ...).
    type Scratch: Send;
    /// Fresh working storage for one worker.
    fn scratch(&self) -> Self::Scratch;
    /// Merit of the ports (all of the design's ports, in the design's order).
    fn score(&self, ports: &[Port], scratch: &mut Self::Scratch) -> f64;
    /// Score of ports that meet every geometric rule. The default is a feasible
    /// [`score`](Self::score); a merit with rules of its own (for example a floor on
    /// an earlier objective) returns [`Score::infeasible`] with its own shortfall.
    fn rate(&self, ports: &[Port], scratch: &mut Self::Scratch) -> Score {
        Score::feasible(self.score(ports, scratch))
    }
}

/// Working storage of one worker: a copy of the ports to write points into, and
/// the merit's own storage.
#[derive(Debug, Clone)]
pub struct LayoutScratch<T> {
    /// The design's ports with the current point written in.
    pub ports: Vec<Port>,
    /// The merit's storage.
    pub inner: T,
}

/// Why an optimisation gave no layout.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum OptimizeError {
    /// The freedoms do not fit the design.
    #[error(transparent)]
    Variables(#[from] VariableError),
    /// The limits are out of range.
    #[error(transparent)]
    Limits(#[from] SectionError),
    /// The search gave no answer.
    #[error(transparent)]
    Search(#[from] SearchError),
    /// The answer broke a rule on the final check (a bug if it ever happens).
    #[error("the optimised layout breaks {} rule(s): {}", .0.len(), .0.iter().map(|v| v.to_string()).collect::<Vec<_>>().join("; "))]
    Infeasible(Vec<Violation>),
}

/// Design, variables, rules and merit as one objective over the unit cube.
#[derive(Debug, Clone)]
pub struct LayoutProblem<S> {
    ports: Vec<Port>,
    variables: Variables,
    constraints: Constraints,
    scorer: S,
}

impl<S: LayoutScore> LayoutProblem<S> {
    /// Check the freedoms and limits against the design.
    pub fn new(
        design: &Design,
        freedoms: &[Freedom],
        limits: Limits,
        scorer: S,
    ) -> Result<Self, OptimizeError> {
        Ok(LayoutProblem {
            ports: design.ports.clone(),
            variables: Variables::new(design, freedoms)?,
            constraints: Constraints::new(&design.airframe, limits)?,
            scorer,
        })
    }

    /// The decision variables.
    pub fn variables(&self) -> &Variables {
        &self.variables
    }

    /// The rules.
    pub fn constraints(&self) -> &Constraints {
        &self.constraints
    }

    /// The merit.
    pub fn scorer(&self) -> &S {
        &self.scorer
    }

    /// The point of the design as given (see [`Variables::encode`]).
    pub fn start(&self) -> Vec<f64> {
        self.variables.encode(&self.ports)
    }

    /// The ports at point `x`.
    pub fn ports_at(&self, x: &[f64]) -> Vec<Port> {
        let mut ports = self.ports.clone();
        self.variables.write(x, &mut ports);
        ports
    }

    /// Every rule the ports at `x` break.
    pub fn violations_at(&self, x: &[f64]) -> Vec<Violation> {
        self.constraints.violations(&self.ports_at(x))
    }
}

impl<S: LayoutScore> Objective for LayoutProblem<S> {
    type Scratch = LayoutScratch<S::Scratch>;

    fn dimension(&self) -> usize {
        self.variables.dimension()
    }

    fn scratch(&self) -> Self::Scratch {
        LayoutScratch {
            ports: self.ports.clone(),
            inner: self.scorer.scratch(),
        }
    }

    fn evaluate(&self, x: &[f64], scratch: &mut Self::Scratch) -> Score {
        self.variables.write(x, &mut scratch.ports);
        let penalty = self.constraints.penalty(&scratch.ports);
        if penalty > 0.0 {
            Score::infeasible(penalty)
        } else {
            self.scorer.rate(&scratch.ports, &mut scratch.inner)
        }
    }
}

/// An optimised layout.
#[derive(Debug, Clone)]
pub struct LayoutResult {
    /// The design with the ports moved.
    pub design: Design,
    /// What the search did (best point, scores, history).
    pub outcome: Outcome,
}

impl LayoutResult {
    /// Score of the design as it was given.
    pub fn start_score(&self) -> Score {
        self.outcome.start_scores[0]
    }
}

/// Move the design's ports within the freedoms to maximise `scorer`, never breaking
/// the limits. The design as given is the first point tried, so the answer scores
/// at least as well as it (when it is feasible). `stop` is polled between batches;
/// `progress` is called on this thread after each one.
pub fn optimize<S: LayoutScore>(
    design: &Design,
    freedoms: &[Freedom],
    limits: Limits,
    scorer: S,
    settings: &SearchSettings,
    stop: &AtomicBool,
    progress: &mut dyn FnMut(&Progress),
) -> Result<LayoutResult, OptimizeError> {
    let problem = LayoutProblem::new(design, freedoms, limits, scorer)?;
    let start = problem.start();
    let outcome = search(&problem, &[start], settings, stop, progress)?;
    let ports = problem.ports_at(&outcome.x);
    let violations = problem.constraints.violations(&ports);
    if !violations.is_empty() {
        return Err(OptimizeError::Infeasible(violations));
    }
    let mut out = design.clone();
    out.ports = ports;
    Ok(LayoutResult {
        design: out,
        outcome,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::airframe::placement::first_conflict;
    use crate::layout::parse_str;
    use crate::model::{KeepOut, NozzleSpec, Zone};
    use crate::optimize::search::StopReason;
    use crate::optimize::variables::{DrillSeries, Span, Together};
    use approx::assert_relative_eq;
    use proptest::prelude::*;

    const DEMO: &str = include_str!("../../layouts/heron-54.toml");

    fn demo() -> Design {
        parse_str(DEMO, "heron-54.toml").expect("demo layout parses")
    }

    fn deg(d: f64) -> f64 {
        d.to_radians()
    }

    /// Stand-in merit (not the authority model): how far the lead port of a
    /// group sits from a fixed reference station.
    struct FarFrom {
        port: usize,
        station_m: f64,
    }
    impl LayoutScore for FarFrom {
        type Scratch = ();
        fn scratch(&self) {}
        fn score(&self, ports: &[Port], _: &mut ()) -> f64 {
            (ports[self.port].station_m - self.station_m).abs()
        }
    }

    /// Stand-in merit from a closure of the ports.
    struct By<F>(F);
    impl<F: Fn(&[Port]) -> f64 + Sync> LayoutScore for By<F> {
        type Scratch = ();
        fn scratch(&self) {}
        fn score(&self, ports: &[Port], _: &mut ()) -> f64 {
            (self.0)(ports)
        }
    }

    fn settings(max_evaluations: usize) -> SearchSettings {
        SearchSettings {
            max_evaluations,
            ..SearchSettings::default()
        }
    }

    fn run<S: LayoutScore>(
        design: &Design,
        freedoms: &[Freedom],
        limits: Limits,
        s: S,
    ) -> LayoutResult {
        optimize(
            design,
            freedoms,
            limits,
            s,
            &settings(3_000),
            &AtomicBool::new(false),
            &mut |_| {},
        )
        .expect("optimisation succeeds")
    }

    // Pattern search stops at steps of 1e-7 of a range of a few tenths of a metre:
    // 1e-6 m is well above that and far below anything a drill can tell apart.
    const STATION_TOL_M: f64 = 1e-6;

    #[test]
    fn radial_pair_goes_to_the_station_farthest_from_the_reference() {
        let d = demo();
        let mut f = Freedom::new(&["yaw-neg", "yaw-pos"], Together::Mirror);
        f.station_m = Some(Span::new(0.25, 0.58));
        let r = run(
            &d,
            &[f],
            Limits::default(),
            FarFrom {
                port: 0,
                station_m: 0.70,
            },
        );
        assert_relative_eq!(r.design.ports[0].station_m, 0.25, epsilon = STATION_TOL_M);
        assert_relative_eq!(r.design.ports[2].station_m, 0.25, epsilon = STATION_TOL_M);
        assert_relative_eq!(r.design.ports[2].clock_rad, deg(180.0), epsilon = 1e-12);
        assert!(!r.start_score().beats(&r.outcome.score));
    }

    #[test]
    fn band_in_the_way_leaves_the_pair_on_its_edge_less_margins() {
        // Coupler band from 600 mm; 1.6 mm hole: edge distance 2 d = 3.2 mm from the
        // centre beats margin 2 mm + radius 0.8 mm, so the centre stops at 596.8 mm.
        let d = demo();
        let mut f = Freedom::new(&["yaw-neg", "yaw-pos"], Together::Mirror);
        f.station_m = Some(Span::new(0.45, 0.62));
        let r = run(
            &d,
            &[f.clone()],
            Limits::default(),
            FarFrom {
                port: 0,
                station_m: 0.40,
            },
        );
        assert_relative_eq!(r.design.ports[0].station_m, 0.5968, epsilon = STATION_TOL_M);
        // A larger margin moves the edge: 5 mm + 0.8 mm.
        let limits = Limits {
            margin_m: 5e-3,
            ..Limits::default()
        };
        let r = run(
            &d,
            &[f.clone()],
            limits,
            FarFrom {
                port: 0,
                station_m: 0.40,
            },
        );
        assert_relative_eq!(r.design.ports[0].station_m, 0.5942, epsilon = STATION_TOL_M);
        // With room past the band the search jumps it and reaches the end of the range.
        f.station_m = Some(Span::new(0.45, 0.69));
        let r = run(
            &d,
            &[f],
            Limits::default(),
            FarFrom {
                port: 0,
                station_m: 0.40,
            },
        );
        assert_relative_eq!(r.design.ports[0].station_m, 0.69, epsilon = STATION_TOL_M);
    }

    #[test]
    fn clock_stops_at_the_rail_button_patch() {
        // A hole at the fore rail button's station, turning toward its clock (90°):
        // the arc from the patch centre must be 7 + 2 + 0.8 mm on a 27 mm radius.
        let mut d = demo();
        d.ports[1].station_m = 0.52;
        let mut f = Freedom::new(&["pitch-pos"], Together::Each);
        f.clock_rad = Some(Span::new(0.0, deg(90.0)));
        let r = run(
            &d,
            &[f],
            Limits::default(),
            By(|p: &[Port]| -(p[1].clock_rad - deg(90.0)).abs()),
        );
        let expected = deg(90.0) - 9.8e-3 / 0.027;
        // Clocks are searched on the written 0.001° grid: the answer is the last grid
        // point inside the rule, within one step (1.7e-5 rad, 0.5 µm of arc) of the edge.
        let got = r.design.ports[1].clock_rad;
        assert!(
            got <= expected && expected - got <= deg(0.001),
            "{got} {expected}"
        );
    }

    #[test]
    fn roll_cant_stops_at_the_drillable_limit() {
        // The demo's fixed negative roll pair is canted 60°, over the 45° limit set
        // here; bring it inside so the problem has an answer.
        let mut d = demo();
        d.ports[6].tangential_cant_rad = deg(-30.0);
        d.ports[7].tangential_cant_rad = deg(-30.0);
        let mut f = Freedom::new(&["roll-pos-a", "roll-pos-b"], Together::Mirror);
        f.tangential_cant_rad = Some(Span::new(0.0, deg(75.0)));
        let limits = Limits {
            max_total_cant_rad: deg(45.0),
            ..Limits::default()
        };
        let r = run(
            &d,
            &[f],
            limits,
            By(|p: &[Port]| p[4].tangential_cant_rad.sin()),
        );
        assert_relative_eq!(
            r.design.ports[4].tangential_cant_rad,
            deg(45.0),
            epsilon = 1e-6
        );
        assert_relative_eq!(
            r.design.ports[5].tangential_cant_rad,
            deg(45.0),
            epsilon = 1e-6
        );
    }

    #[test]
    fn largest_drill_that_keeps_three_diameters_spacing() {
        // Port B (1.6 mm) 6.2 mm aft of port A: 3·(d + 1.6)/2 ≤ 6.2 gives d ≤ 2.53 mm,
        // so the largest metric drill is 2.5 mm.
        let mut d = demo();
        d.ports[1].station_m = 0.3062;
        d.ports[1].clock_rad = 0.0;
        let mut f = Freedom::new(&["yaw-neg"], Together::Each);
        f.hole_sizes_m = Some(DrillSeries::Metric.sizes_m());
        let r = run(
            &d,
            &[f],
            Limits::default(),
            By(|p: &[Port]| p[0].nozzle.hole_diameter_m()),
        );
        assert_relative_eq!(
            r.design.ports[0].nozzle.hole_diameter_m(),
            2.5e-3,
            epsilon = 1e-12
        );
    }

    #[test]
    fn infeasible_fixed_ports_give_an_error_value() {
        // Two fixed holes 2 mm apart can never meet the spacing rule.
        let mut d = demo();
        d.ports[1].station_m = 0.302;
        d.ports[1].clock_rad = 0.0;
        let mut f = Freedom::new(&["roll-pos-a"], Together::Each);
        f.station_m = Some(Span::new(0.65, 0.75));
        let e = optimize(
            &d,
            &[f],
            Limits::default(),
            By(|_: &[Port]| 0.0),
            &settings(500),
            &AtomicBool::new(false),
            &mut |_| {},
        )
        .unwrap_err();
        assert!(
            matches!(
                e,
                OptimizeError::Search(SearchError::NoFeasiblePoint { .. })
            ),
            "{e}"
        );
    }

    #[test]
    fn stop_flag_before_the_start_still_returns_a_checked_layout() {
        let d = demo();
        let mut f = Freedom::new(&["yaw-neg", "yaw-pos"], Together::Mirror);
        f.station_m = Some(Span::new(0.25, 0.45));
        let r = optimize(
            &d,
            &[f],
            Limits::default(),
            FarFrom {
                port: 0,
                station_m: 0.0,
            },
            &settings(3_000),
            &AtomicBool::new(true),
            &mut |_| {},
        )
        .unwrap();
        assert_eq!(r.outcome.stop, StopReason::Stopped);
        assert!(r.outcome.score.merit >= r.start_score().merit);
    }

    /// A random airframe change, random ports and random freedoms.
    #[derive(Debug, Clone)]
    struct Case {
        bands: Vec<(f64, f64)>,
        ports: Vec<(f64, f64, f64, f64, f64)>,
        groups: Vec<(u8, f64, f64, f64, f64, bool)>,
        weights: Vec<f64>,
        seed: u64,
    }

    fn case() -> impl Strategy<Value = Case> {
        (
            prop::collection::vec((0.25f64..1.1, 0.005f64..0.08), 0..3),
            prop::collection::vec(
                (
                    0.23f64..1.2,
                    0.0f64..360.0,
                    -70.0f64..70.0,
                    -30.0f64..30.0,
                    0.8f64..2.5,
                ),
                2..7,
            ),
            prop::collection::vec(
                (
                    0u8..3,
                    0.22f64..1.2,
                    0.0f64..0.4,
                    0.0f64..360.0,
                    0.0f64..80.0,
                    any::<bool>(),
                ),
                1..4,
            ),
            prop::collection::vec(-1.0f64..1.0, 4),
            any::<u64>(),
        )
            .prop_map(|(bands, ports, groups, weights, seed)| Case {
                bands,
                ports,
                groups,
                weights,
                seed,
            })
    }

    fn build(c: &Case) -> (Design, Vec<Freedom>) {
        let mut d = demo();
        for (k, (from, len)) in c.bands.iter().enumerate() {
            d.airframe.keep_outs.push(KeepOut {
                name: format!("band {k}"),
                zone: Zone::Band {
                    from_station_m: *from,
                    to_station_m: from + len,
                },
            });
        }
        d.ports = c
            .ports
            .iter()
            .enumerate()
            .map(|(k, &(s, clock, tc, ac, dia))| Port {
                name: format!("p{k}"),
                station_m: s,
                clock_rad: deg(clock),
                tangential_cant_rad: deg(tc),
                axial_cant_rad: deg(ac),
                nozzle: NozzleSpec::Hole {
                    diameter_m: dia * 1e-3,
                    discharge_coefficient: 0.8,
                },
            })
            .collect();
        let names: Vec<String> = d.ports.iter().map(|p| p.name.clone()).collect();
        let mut next = 0;
        let mut freedoms = Vec::new();
        for &(kind, s0, len, c0, cant, holes) in &c.groups {
            let (together, take) = match kind {
                0 => (Together::Each, 1),
                1 => (Together::Mirror, 2),
                _ => (Together::Ring, 3),
            };
            if next + take > names.len() {
                break;
            }
            let members: Vec<&str> = names[next..next + take]
                .iter()
                .map(|s| s.as_str())
                .collect();
            next += take;
            let mut f = Freedom::new(&members, together);
            f.station_m = Some(Span::new(s0, (s0 + len).min(1.22)));
            f.clock_rad = Some(Span::new(deg(c0), deg(c0 + 90.0)));
            f.tangential_cant_rad = Some(Span::new(-deg(cant), deg(cant)));
            f.axial_cant_rad = Some(Span::new(-deg(cant * 0.5), deg(cant * 0.5)));
            if holes {
                f.hole_sizes_m = Some(DrillSeries::NumberDrill.sizes_m());
            }
            freedoms.push(f);
        }
        (d, freedoms)
    }

    proptest! {
        #![proptest_config(ProptestConfig { cases: 16, ..ProptestConfig::default() })]

        /// The file that is written is the file that is checked: optimise against a
        /// rule edge that is off any decimal grid (a margin drawn at random), write the
        /// layout text, read it back, check every rule on it, and optimise again from
        /// it: the second run starts feasible and never ends worse.
        #[test]
        fn written_layouts_read_back_feasible_and_restart_feasible(
            margin_mm in 2.0f64..6.0,
            clock_deg in 40.0f64..89.0,
            seed in any::<u64>(),
        ) {
            let d = demo();
            let limits = Limits { margin_m: margin_mm * 1e-3, ..Limits::default() };
            let mut f = Freedom::new(&["yaw-neg", "yaw-pos"], Together::Mirror);
            f.station_m = Some(Span::new(0.45, 0.62));
            f.hole_sizes_m = Some(DrillSeries::NumberDrill.sizes_m());
            let mut g = Freedom::new(&["pitch-pos"], Together::Each);
            g.clock_rad = Some(Span::new(0.0, deg(90.0)));
            g.station_m = Some(Span::new(0.515, 0.525));
            let target = deg(clock_deg);
            // Stand-in merit: yaw pair toward the coupler band, larger holes, and the
            // pitch port toward the rail button patch's clock.
            let merit = move |p: &[Port]| {
                p[0].station_m + p[0].nozzle.hole_diameter_m() - 0.01 * (p[1].clock_rad - target).abs()
                    - (p[1].clock_rad - deg(90.0)).abs() * 1e-3
            };
            let s = SearchSettings { seed, max_evaluations: 800, ..SearchSettings::default() };
            let go = |design: &Design| optimize(design, &[f.clone(), g.clone()], limits, By(merit), &s,
                &AtomicBool::new(false), &mut |_| {});
            let r = go(&d).unwrap();
            let text = crate::layout::write::with_ports_noted(DEMO, &r.design.ports, DrillSeries::drill_name).unwrap();
            let back = parse_str(&text, "written.toml").unwrap();
            let rules = Constraints::new(&back.airframe, limits).unwrap();
            prop_assert!(rules.violations(&back.ports).is_empty(), "{:?}", rules.violations(&back.ports));
            for (a, b) in r.design.ports.iter().zip(&back.ports) {
                prop_assert_eq!(a.station_m, b.station_m);
                prop_assert_eq!(a.clock_rad, b.clock_rad);
                prop_assert_eq!(&a.nozzle, &b.nozzle);
            }
            let again = go(&back).unwrap();
            prop_assert!(again.start_score().is_feasible());
            prop_assert!(!r.outcome.score.beats(&again.outcome.score));
        }
    }

    proptest! {
        #![proptest_config(ProptestConfig { cases: 24, ..ProptestConfig::default() })]

        #[test]
        fn results_never_break_a_rule(c in case()) {
            let (design, freedoms) = build(&c);
            let w = c.weights.clone();
            let merit = By(move |p: &[Port]| {
                p.iter()
                    .map(|q| w[0] * q.station_m + w[1] * q.clock_rad.sin() + w[2] * q.tangential_cant_rad + w[3] * q.axial_cant_rad)
                    .sum::<f64>()
            });
            let problem = LayoutProblem::new(&design, &freedoms, Limits::default(), By(|_: &[Port]| 0.0)).unwrap();
            let start_ports = problem.ports_at(&problem.start());
            let start_feasible = problem.constraints().is_feasible(&start_ports);
            let s = SearchSettings { seed: c.seed, max_evaluations: 400, ..SearchSettings::default() };
            match optimize(&design, &freedoms, Limits::default(), merit, &s, &AtomicBool::new(false), &mut |_| {}) {
                Ok(r) => {
                    let rules = Constraints::new(&design.airframe, Limits::default()).unwrap();
                    prop_assert!(rules.violations(&r.design.ports).is_empty());
                    // The layout validator accepts what the optimiser writes.
                    for p in &r.design.ports {
                        prop_assert!(first_conflict(&design.airframe, p, 0.0).is_none());
                    }
                    prop_assert!(!r.start_score().beats(&r.outcome.score));
                    prop_assert!(r.outcome.evaluations <= 400);
                }
                Err(OptimizeError::Search(SearchError::NoFeasiblePoint { .. })) => {
                    prop_assert!(!start_feasible, "a feasible start must give an answer");
                }
                Err(e) => prop_assert!(false, "unexpected error {e}"),
            }
        }
    }
}
