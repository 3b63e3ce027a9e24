//! A faster evaluation of a combination for large studies: the same models as
//! `analysis::analyze`, with the work that does not change the ranked figures
//! left out or shared.
//!
//! - The gas budget depends only on the tank, the set pressure and the
//!   regulator; it is computed once per such triple and shared (its per-port
//!   firing times, which the study does not use, are those of the first
//!   combination that needed it).
//! - Ports with the same nozzle see the same valve and supply, so each distinct
//!   nozzle is solved once per flight state (`supply.solve` on one port, as the
//!   analysis does for each port); the droop table and the all-open solve are
//!   not made.
//! - Axis limits come from the closed-form ray limits of the torque zonotope
//!   (`analysis::score::ray_limit`, the optimiser's) instead of its facet list.
//! - The manoeuvre list is priced by `analysis::manoeuvre::plan` itself.
//!
//! A combination the closed form cannot take (torques spanning fewer than
//! three axes, a gas budget that fails) is handed to the full analysis. The
//! tests check this path against the full analysis on both demo layouts.

use super::catalogue::Catalogue;
use super::combine::{self, Choice};
use super::evaluate::{self, Evaluated, Figures, Outcome};
use super::rules::{self, Breach, Rule};
use crate::analysis::feed::{self, GasBudget, PortReport};
use crate::analysis::{self, authority, EnvelopeSummary, StateReport};
use crate::gas::chain::FlowContext;
use crate::gas::FlowTolerances;
use crate::model::{Design, NozzleSpec};
use nalgebra::Vector3;
use std::sync::OnceLock;

/// Evaluates combinations of one catalogue on one design, sharing gas budgets.
pub struct FastEvaluator<'a> {
    base: &'a Design,
    cat: &'a Catalogue,
    budgets: Vec<OnceLock<Option<GasBudget>>>,
    ambients: Vec<Option<f64>>,
}

impl<'a> FastEvaluator<'a> {
    /// Prepare for `cat` on `base`.
    pub fn new(base: &'a Design, cat: &'a Catalogue) -> Self {
        let n = cat.tanks.len() * cat.set_pressures_gauge_pa.len() * cat.regulators.len();
        FastEvaluator {
            base,
            cat,
            budgets: (0..n).map(|_| OnceLock::new()).collect(),
            ambients: base
                .states
                .iter()
                .map(|s| {
                    crate::atmosphere::at_geometric_altitude(s.altitude_m)
                        .ok()
                        .map(|a| a.pressure_pa)
                })
                .collect(),
        }
    }

    fn budget(&self, choice: &Choice, design: &Design) -> Option<&GasBudget> {
        let k = (choice.tank * self.cat.set_pressures_gauge_pa.len() + choice.set_pressure)
            * self.cat.regulators.len()
            + choice.regulator;
        self.budgets[k]
            .get_or_init(|| feed::gas_budget(design).ok())
            .as_ref()
    }

    /// Evaluate one combination (without a hold-time source).
    pub fn evaluate(&self, choice: &Choice) -> Evaluated {
        let design = combine::apply(self.base, self.cat, choice);
        let outcome = match self.outcome(&design, choice) {
            Some(o) => o,
            // Anything the short cut cannot take goes through the full analysis.
            None => match evaluate::evaluate_design(&design, self.cat, choice, None) {
                Ok((_, m)) => Outcome::Accepted(m),
                Err(breaches) => Outcome::Rejected { breaches },
            },
        };
        Evaluated {
            index: choice.index(self.cat),
            choice: choice.clone(),
            parts: choice.describe(self.cat),
            outcome,
        }
    }

    fn outcome(&self, design: &Design, choice: &Choice) -> Option<Outcome> {
        let pressures = match evaluate::pressures(design) {
            Ok(p) => p,
            Err(e) => {
                return Some(Outcome::Rejected {
                    breaches: vec![Breach {
                        rule: Rule::Analysis,
                        detail: e,
                    }],
                })
            }
        };
        let breaches = rules::check(design, self.cat, choice, &pressures);
        if !breaches.is_empty() {
            return Some(Outcome::Rejected { breaches });
        }
        let budget = self.budget(choice, design)?;
        let mut states = Vec::with_capacity(design.states.len());
        for (state, ambient) in design.states.iter().zip(&self.ambients) {
            states.push(state_report(design, state, (*ambient)?, budget)?);
        }
        let plan = analysis::manoeuvre::plan(design, budget, &states).ok()?;
        let n = design.ports.len();
        Some(Outcome::Accepted(evaluate::figures(
            design,
            &states,
            plan.as_ref(),
            budget.inventory_kg,
            Figures {
                parts_mass_kg: combine::parts_mass_kg(self.cat, choice, n),
                price: combine::price(self.cat, choice, n),
                peak_coil_current_a: self.cat.valves[choice.valve].coil_current_a * n as f64,
                tank_pressure_pa: pressures.tank_pa,
            },
            None,
        )))
    }
}

/// One flight state with what the ranking and the manoeuvre plan read; the
/// envelope summary and droop table are left empty.
fn state_report(
    design: &Design,
    state: &crate::model::FlightState,
    ambient_pa: f64,
    budget: &GasBudget,
) -> Option<StateReport> {
    let gas = design.feed.gas;
    let density = crate::analysis::feed::real_density(gas);
    let ctx = FlowContext {
        gas: crate::analysis::feed::flow_gas(design, ambient_pa),
        density: &density,
        ambient_pa,
        tolerances: FlowTolerances::default(),
    };
    let chains = feed::port_chains(design).ok()?;
    let supply = feed::shared_supply(design, ambient_pa).ok()?;
    let mut solved: Vec<(NozzleSpec, crate::gas::chain::ChainSolution, f64)> = Vec::new();
    let mut ports = Vec::with_capacity(chains.len());
    let mut regulated = supply.set_pressure_pa();
    for (p, chain) in design.ports.iter().zip(&chains) {
        let (s, manifold) = match solved.iter().find(|(n, _, _)| *n == p.nozzle) {
            Some((_, s, m)) => (*s, *m),
            None => {
                let m = supply.solve(std::slice::from_ref(chain), &ctx).ok()?;
                let s = *m.ports.first()?;
                solved.push((p.nozzle, s, m.manifold_pressure_pa));
                (s, m.manifold_pressure_pa)
            }
        };
        regulated = regulated.min(manifold);
        ports.push(PortReport {
            name: p.name.clone(),
            thrust_n: s.thrust_n,
            mass_flow_kg_s: s.mass_flow_kg_s,
            specific_impulse_s: s.specific_impulse_s,
            nozzle_inlet_pressure_pa: s.intermediate_pressure_pa,
            valve_choked: s.valve.choked,
            exit_mach: s.nozzle.exit_mach,
            exit_pressure_pa: s.nozzle.exit_pressure_pa,
            nozzle_regime: String::new(),
            strongly_overexpanded: false,
            force_n: [0.0; 3],
            axial_force_n: 0.0,
            side_force_n: [0.0; 2],
            torque_n_m: [0.0; 3],
        });
    }
    let gas_in_tank = budget.residual_kg + state.gas_remaining * budget.usable_isothermal_kg;
    let mass = crate::mass::vehicle::state_summary(design, state, gas_in_tank);
    let thrusts: Vec<f64> = ports.iter().map(|p| p.thrust_n).collect();
    let wrenches = analysis::port_wrenches(design, mass.cg(), &thrusts);
    let columns: Vec<Vector3<f64>> = wrenches.iter().map(|w| w.1).collect();
    for (p, (f, t)) in ports.iter_mut().zip(&wrenches) {
        p.force_n = [f.x, f.y, f.z];
        p.axial_force_n = f.x;
        p.side_force_n = [f.y, f.z];
        p.torque_n_m = [t.x, t.y, t.z];
    }
    let ray = |d: Vector3<f64>| analysis::score::ray_limit(&columns, &d);
    let mut positive = Vector3::zeros();
    let mut negative = Vector3::zeros();
    let inertia = mass.inertia_tensor();
    let mut accel = [0.0; 3];
    for k in 0..3 {
        let mut e = Vector3::zeros();
        e[k] = 1.0;
        positive[k] = ray(e);
        negative[k] = ray(-e);
        let need = inertia.column(k).into_owned();
        accel[k] = ray(need).min(ray(-need));
        // Zero means the torques may not span three axes (or the origin is on
        // the boundary): the full analysis handles those cases.
        if positive[k] <= 0.0 || negative[k] <= 0.0 || accel[k] <= 0.0 {
            return None;
        }
    }
    let required = analysis::required_torques(design, &mass, state.motor);
    let authority = authority::axis_authority(positive, negative, accel, &required);
    Some(StateReport {
        name: state.name.clone(),
        altitude_m: state.altitude_m,
        ambient_pressure_pa: ambient_pa,
        motor: state.motor,
        regulated_pressure_pa: regulated,
        gas_in_tank_kg: gas_in_tank,
        mass,
        ports,
        required,
        envelope: EnvelopeSummary {
            facets: 0,
            vertices: 0,
            volume_n3_m3: 0.0,
            guaranteed_torque_n_m: 0.0,
            guaranteed_accel_rad_s2: 0.0,
            rank: 3,
            full_control: true,
            controllability: Vec::new(),
        },
        authority,
        roll_to_pitch_ratio: authority[0].angular_accel_rad_s2 / authority[1].angular_accel_rad_s2,
        droop: Vec::new(),
        droop_port: String::new(),
        ports_within_5_percent: 0,
    })
}
