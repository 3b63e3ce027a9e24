//! Restrictions in series: supply → valve → nozzle → ambient, and several such
//! ports fed from one regulator of finite capacity.
//!
//! One port: the pressure in the small volume between valve and nozzle is the
//! unknown. Valve flow falls and nozzle flow rises as that pressure rises, so
//! the flows cross exactly once between ambient and supply pressure; a
//! bracketing root search finds the crossing without needing derivatives.
//!
//! Several ports: the manifold pressure is the unknown. The supply can deliver
//! less as the manifold pressure rises (a restriction after the regulator, or a
//! regulator whose outlet droops with flow) while the ports take more, so the
//! same bracketing applies, with a port solve inside each step.
//!
//! The gas is taken as isenthalpic through valve, regulator and line: the
//! stagnation temperature stays that of the supply (exact for an ideal gas;
//! a real gas would cool slightly by the Joule–Thomson effect, which is
//! ignored here). Gas between restrictions is taken as nearly at rest, so its
//! static pressure is the stagnation pressure of the next restriction.
//! Densities come from a [`DensityAt`] the caller supplies, so a real-gas
//! equation of state can be plugged in.

use super::isentropic::FlowTolerances;
use super::isentropic::{check_gas, find_root_fallible, non_negative, positive, FlowError};
use super::nozzle::{Nozzle, NozzlePerformance};
use super::valve::{CvValve, Valve, ValveFlow};
use super::IdealGas;

/// Gas density at a pressure and temperature: the seam where an equation of
/// state plugs into the flow models.
pub trait DensityAt {
    /// Density in kg/m³ at absolute pressure `pressure_pa` and temperature `temperature_k`.
    fn density_kg_m3(&self, pressure_pa: f64, temperature_k: f64) -> Result<f64, FlowError>;
}

impl<F> DensityAt for F
where
    F: Fn(f64, f64) -> Result<f64, FlowError>,
{
    fn density_kg_m3(&self, pressure_pa: f64, temperature_k: f64) -> Result<f64, FlowError> {
        self(pressure_pa, temperature_k)
    }
}

/// Ideal-gas density ρ = p/(Z·R·T) with a constant compressibility factor Z.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct IdealDensity {
    r_specific_j_kg_k: f64,
    z: f64,
}

impl IdealDensity {
    /// Plain ideal gas (Z = 1).
    pub fn new(gas: &IdealGas) -> Result<IdealDensity, FlowError> {
        IdealDensity::with_compressibility(gas, 1.0)
    }

    /// Ideal gas corrected by a constant compressibility factor `z` > 0.
    pub fn with_compressibility(gas: &IdealGas, z: f64) -> Result<IdealDensity, FlowError> {
        check_gas(gas)?;
        Ok(IdealDensity {
            r_specific_j_kg_k: gas.r_specific_j_kg_k,
            z: positive("compressibility factor", z)?,
        })
    }
}

impl DensityAt for IdealDensity {
    fn density_kg_m3(&self, pressure_pa: f64, temperature_k: f64) -> Result<f64, FlowError> {
        if !(temperature_k.is_finite() && temperature_k > 0.0) {
            return Err(FlowError::Density {
                pressure_pa,
                temperature_k,
                reason: "temperature must be finite and > 0".into(),
            });
        }
        Ok(pressure_pa / (self.z * self.r_specific_j_kg_k * temperature_k))
    }
}

fn density(d: &dyn DensityAt, p: f64, t: f64) -> Result<f64, FlowError> {
    let rho = d.density_kg_m3(p, t)?;
    if rho.is_finite() && rho >= 0.0 {
        Ok(rho)
    } else {
        Err(FlowError::Density {
            pressure_pa: p,
            temperature_k: t,
            reason: format!("density model returned {rho}"),
        })
    }
}

/// One port: a valve feeding a nozzle.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PortChain {
    /// The valve between supply (or manifold) and nozzle.
    pub valve: Valve,
    /// The nozzle discharging to ambient.
    pub nozzle: Nozzle,
}

/// The solved operating point of one port.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ChainSolution {
    /// Pressure between valve and nozzle (the nozzle's stagnation pressure), Pa.
    pub intermediate_pressure_pa: f64,
    /// Mass flow through valve and nozzle, kg/s.
    pub mass_flow_kg_s: f64,
    /// Thrust, N.
    pub thrust_n: f64,
    /// Specific impulse, s (zero when nothing flows).
    pub specific_impulse_s: f64,
    /// Valve operating point (choked or not).
    pub valve: ValveFlow,
    /// Nozzle operating point, including its regime.
    pub nozzle: NozzlePerformance,
}

/// Inputs shared by every solve: gas, densities, ambient pressure, tolerances.
#[derive(Clone, Copy)]
pub struct FlowContext<'a> {
    /// Gas constants (γ is used by the flow relations).
    pub gas: IdealGas,
    /// Where densities come from.
    pub density: &'a dyn DensityAt,
    /// Ambient (back) pressure at the nozzle exits, Pa absolute.
    pub ambient_pa: f64,
    /// Tolerances of the root searches.
    pub tolerances: FlowTolerances,
}

impl std::fmt::Debug for FlowContext<'_> {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("FlowContext")
            .field("gas", &self.gas)
            .field("ambient_pa", &self.ambient_pa)
            .field("tolerances", &self.tolerances)
            .finish_non_exhaustive()
    }
}

impl PortChain {
    /// Solve the port fed at `supply_pa` (absolute) and `temperature_k`.
    ///
    /// A supply at or below ambient gives the no-flow solution.
    pub fn solve(
        &self,
        supply_pa: f64,
        temperature_k: f64,
        ctx: &FlowContext<'_>,
    ) -> Result<ChainSolution, FlowError> {
        check_gas(&ctx.gas)?;
        let ps = non_negative("supply pressure", supply_pa)?;
        let t = positive("supply temperature", temperature_k)?;
        let pa = non_negative("ambient pressure", ctx.ambient_pa)?;
        let tol = &ctx.tolerances;
        let rho_s = density(ctx.density, ps, t)?;
        let at = |pm: f64| -> Result<(ValveFlow, NozzlePerformance), FlowError> {
            let v = self.valve.flow(ps, pm, rho_s, &ctx.gas)?;
            let rho_m = density(ctx.density, pm, t)?.max(f64::MIN_POSITIVE);
            let n = self
                .nozzle
                .performance_with_density(pm, rho_m, pa, &ctx.gas, tol)?;
            Ok((v, n))
        };
        let pm = if ps <= pa {
            ps
        } else {
            find_root_fallible(
                |pm| {
                    let (v, n) = at(pm)?;
                    Ok(v.mass_flow_kg_s - n.mass_flow_kg_s)
                },
                pa,
                ps,
                tol.pressure_rel * ps,
                tol.max_iterations,
                "pressure between valve and nozzle",
            )?
        };
        let (v, n) = at(pm)?;
        Ok(ChainSolution {
            intermediate_pressure_pa: pm,
            // The nozzle's flow is reported: its thrust belongs to it, and at
            // the solved pressure the valve's flow differs only by the tolerance.
            mass_flow_kg_s: n.mass_flow_kg_s,
            thrust_n: n.thrust_n,
            specific_impulse_s: n.specific_impulse_s,
            valve: v,
            nozzle: n,
        })
    }
}

/// How much the regulator and line can deliver to the manifold.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum SupplyCapacity {
    /// No limit: the manifold stays at the set pressure whatever the flow.
    Unlimited,
    /// A restriction between regulator outlet (at set pressure) and manifold,
    /// described by a Cv with the IEC 60534-2-1 gas equations.
    Restriction(CvValve),
    /// Linear droop: manifold pressure = set pressure − `droop_pa` ×
    /// total flow / `reference_flow_kg_s`.
    LinearDroop {
        /// Pressure lost at the reference flow, Pa.
        droop_pa: f64,
        /// Flow at which the droop is `droop_pa`, kg/s.
        reference_flow_kg_s: f64,
    },
}

/// A high-pressure regulator stage upstream of the working regulator (two-stage regulation).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FirstStage {
    /// Intermediate (outlet) pressure the stage holds, Pa absolute.
    pub set_pressure_pa: f64,
    /// Pressure across the stage when it has dropped out (wide open), Pa: it regulates while
    /// its inlet is at least set pressure + this margin.
    pub dropout_margin_pa: f64,
    /// How much flow the stage delivers between its set pressure and the pressure downstream.
    pub capacity: SupplyCapacity,
}

/// A regulator feeding a manifold shared by several ports.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SharedSupply {
    set_pressure_pa: f64,
    temperature_k: f64,
    capacity: SupplyCapacity,
    first_stage: Option<FirstStage>,
    /// Dropout margin of the working stage, Pa (used only with a first stage).
    dropout_margin_pa: f64,
}

/// Lowest tank pressure at which a chain of regulator stages still holds the working pressure,
/// Pa absolute. `stages` run from the tank to the valves as (set pressure Pa absolute, dropout
/// margin Pa). The last stage needs its set pressure plus its margin at its inlet; every stage
/// upstream of it, once it has dropped out, passes its inlet pressure less its own margin. So
/// the tank must hold the last set pressure plus the sum of all margins. None for no stages.
pub fn chain_dropout_tank_pressure_pa(stages: &[(f64, f64)]) -> Option<f64> {
    let (last_set, _) = *stages.last()?;
    Some(last_set + stages.iter().map(|s| s.1).sum::<f64>())
}

impl SharedSupply {
    /// A regulator at `set_pressure_pa` (absolute) delivering gas at
    /// `temperature_k`, with the given capacity.
    pub fn new(
        set_pressure_pa: f64,
        temperature_k: f64,
        capacity: SupplyCapacity,
    ) -> Result<SharedSupply, FlowError> {
        let set_pressure_pa = positive("set pressure", set_pressure_pa)?;
        let temperature_k = positive("supply temperature", temperature_k)?;
        if let SupplyCapacity::LinearDroop {
            droop_pa,
            reference_flow_kg_s,
        } = capacity
        {
            positive("droop", droop_pa)?;
            positive("droop reference flow", reference_flow_kg_s)?;
        }
        Ok(SharedSupply {
            set_pressure_pa,
            temperature_k,
            capacity,
            first_stage: None,
            dropout_margin_pa: 0.0,
        })
    }

    /// The same supply fed through a first (high-pressure) stage. `dropout_margin_pa` is the
    /// working stage's own margin: with more flow than the first stage can pass at an
    /// intermediate pressure of (manifold + that margin), the manifold pressure falls.
    /// The first stage must be set at least at the working set pressure plus that margin.
    pub fn with_first_stage(
        mut self,
        first: FirstStage,
        dropout_margin_pa: f64,
    ) -> Result<SharedSupply, FlowError> {
        positive("first-stage set pressure", first.set_pressure_pa)?;
        non_negative("first-stage dropout margin", first.dropout_margin_pa)?;
        let margin = non_negative("dropout margin", dropout_margin_pa)?;
        if let SupplyCapacity::LinearDroop {
            droop_pa,
            reference_flow_kg_s,
        } = first.capacity
        {
            positive("first-stage droop", droop_pa)?;
            positive("first-stage droop reference flow", reference_flow_kg_s)?;
        }
        if first.set_pressure_pa < self.set_pressure_pa + margin {
            return Err(FlowError::InvalidInput {
                name: "first-stage set pressure",
                value: first.set_pressure_pa,
                expected: "at least the working set pressure plus its dropout margin",
            });
        }
        self.first_stage = Some(first);
        self.dropout_margin_pa = margin;
        Ok(self)
    }

    /// The first stage, if the supply has one.
    pub fn first_stage(&self) -> Option<FirstStage> {
        self.first_stage
    }

    /// Regulator set pressure, Pa absolute.
    pub fn set_pressure_pa(&self) -> f64 {
        self.set_pressure_pa
    }
    /// Supply temperature, K.
    pub fn temperature_k(&self) -> f64 {
        self.temperature_k
    }
    /// Capacity model.
    pub fn capacity(&self) -> SupplyCapacity {
        self.capacity
    }

    /// Flow the supply delivers when the manifold sits at `manifold_pa`: the working stage's
    /// capacity, and with a first stage no more than that stage passes from its set pressure
    /// down to (manifold + the working stage's dropout margin), the lowest intermediate
    /// pressure at which the flow still gets through.
    fn delivered(&self, manifold_pa: f64, ctx: &FlowContext<'_>) -> Result<f64, FlowError> {
        let second = stage_flow(
            self.capacity,
            self.set_pressure_pa,
            manifold_pa,
            self.temperature_k,
            ctx,
        )?;
        match self.first_stage {
            None => Ok(second),
            Some(f) => {
                let downstream = manifold_pa + self.dropout_margin_pa;
                let first = if downstream >= f.set_pressure_pa {
                    0.0
                } else {
                    stage_flow(
                        f.capacity,
                        f.set_pressure_pa,
                        downstream,
                        self.temperature_k,
                        ctx,
                    )?
                };
                Ok(second.min(first))
            }
        }
    }

    fn limited(&self) -> bool {
        self.capacity != SupplyCapacity::Unlimited
            || self
                .first_stage
                .is_some_and(|f| f.capacity != SupplyCapacity::Unlimited)
    }
}

/// Flow a stage of the given capacity delivers from `set_pa` to `downstream_pa`.
fn stage_flow(
    capacity: SupplyCapacity,
    set_pa: f64,
    downstream_pa: f64,
    temperature_k: f64,
    ctx: &FlowContext<'_>,
) -> Result<f64, FlowError> {
    if downstream_pa >= set_pa {
        return Ok(0.0);
    }
    match capacity {
        SupplyCapacity::Unlimited => Ok(f64::INFINITY),
        SupplyCapacity::Restriction(v) => {
            let rho = density(ctx.density, set_pa, temperature_k)?;
            Ok(v.flow(set_pa, downstream_pa, rho, ctx.gas.gamma)?
                .mass_flow_kg_s)
        }
        SupplyCapacity::LinearDroop {
            droop_pa,
            reference_flow_kg_s,
        } => Ok(((set_pa - downstream_pa) / droop_pa * reference_flow_kg_s).max(0.0)),
    }
}

impl SharedSupply {
    /// Solve the manifold pressure with `ports` open: the flow the supply
    /// delivers equals the sum of the ports' flows.
    pub fn solve(
        &self,
        ports: &[PortChain],
        ctx: &FlowContext<'_>,
    ) -> Result<ManifoldSolution, FlowError> {
        let pm = self.solve_pressure(
            |pm| {
                ports
                    .iter()
                    .map(|p| {
                        p.solve(pm, self.temperature_k, ctx)
                            .map(|s| s.mass_flow_kg_s)
                    })
                    .sum()
            },
            ports.is_empty(),
            ctx,
        )?;
        let solved = ports
            .iter()
            .map(|p| p.solve(pm, self.temperature_k, ctx))
            .collect::<Result<Vec<_>, _>>()?;
        Ok(ManifoldSolution {
            manifold_pressure_pa: pm,
            total_mass_flow_kg_s: solved.iter().map(|s| s.mass_flow_kg_s).sum(),
            ports: solved,
        })
    }

    fn solve_pressure<F>(
        &self,
        mut port_flow: F,
        no_ports: bool,
        ctx: &FlowContext<'_>,
    ) -> Result<f64, FlowError>
    where
        F: FnMut(f64) -> Result<f64, FlowError>,
    {
        check_gas(&ctx.gas)?;
        let pa = non_negative("ambient pressure", ctx.ambient_pa)?;
        let ps = self.set_pressure_pa;
        if no_ports || ps <= pa || !self.limited() {
            return Ok(ps);
        }
        let tol = &ctx.tolerances;
        find_root_fallible(
            |pm| Ok(self.delivered(pm, ctx)? - port_flow(pm)?),
            pa,
            ps,
            tol.pressure_rel * ps,
            tol.max_iterations,
            "manifold pressure",
        )
    }

    /// Fire k = 1..=`max_ports` copies of `port` together and report, for
    /// each k, the manifold pressure and each port's thrust and flow, plus how
    /// many can fire together before each port's thrust falls by more than
    /// `allowed_thrust_drop` (a fraction, e.g. 0.05) below its k = 1 value.
    pub fn equal_ports(
        &self,
        port: &PortChain,
        max_ports: usize,
        allowed_thrust_drop: f64,
        ctx: &FlowContext<'_>,
    ) -> Result<SimultaneousFiring, FlowError> {
        if max_ports == 0 {
            return Err(FlowError::InvalidInput {
                name: "number of ports",
                value: 0.0,
                expected: "at least 1",
            });
        }
        let limit = non_negative("allowed thrust drop", allowed_thrust_drop)?;
        let mut rows = Vec::with_capacity(max_ports);
        let mut single_thrust = 0.0;
        for k in 1..=max_ports {
            let kf = k as f64;
            let pm = self.solve_pressure(
                |pm| Ok(kf * port.solve(pm, self.temperature_k, ctx)?.mass_flow_kg_s),
                false,
                ctx,
            )?;
            let one = port.solve(pm, self.temperature_k, ctx)?;
            if k == 1 {
                single_thrust = one.thrust_n;
            }
            let drop = if single_thrust > 0.0 {
                1.0 - one.thrust_n / single_thrust
            } else {
                0.0
            };
            rows.push(FiringRow {
                open_ports: k,
                manifold_pressure_pa: pm,
                thrust_per_port_n: one.thrust_n,
                mass_flow_per_port_kg_s: one.mass_flow_kg_s,
                thrust_drop_fraction: drop,
                port: one,
            });
        }
        let ports_within_limit = rows
            .iter()
            .take_while(|r| r.thrust_drop_fraction <= limit)
            .count();
        Ok(SimultaneousFiring {
            rows,
            allowed_thrust_drop: limit,
            ports_within_limit,
        })
    }
}

/// The solved manifold with a set of ports open.
#[derive(Debug, Clone, PartialEq)]
pub struct ManifoldSolution {
    /// Manifold pressure, Pa absolute.
    pub manifold_pressure_pa: f64,
    /// Total flow drawn from the supply, kg/s.
    pub total_mass_flow_kg_s: f64,
    /// Each open port's operating point, in the order given.
    pub ports: Vec<ChainSolution>,
}

/// One line of [`SimultaneousFiring`]: k equal ports open.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FiringRow {
    /// Number of ports open, k.
    pub open_ports: usize,
    /// Manifold pressure, Pa absolute.
    pub manifold_pressure_pa: f64,
    /// Thrust of each port, N.
    pub thrust_per_port_n: f64,
    /// Flow of each port, kg/s.
    pub mass_flow_per_port_kg_s: f64,
    /// 1 − thrust(k)/thrust(1): the droop in per-port thrust.
    pub thrust_drop_fraction: f64,
    /// Full operating point of one port.
    pub port: ChainSolution,
}

/// Per-port thrust as more equal ports fire together.
#[derive(Debug, Clone, PartialEq)]
pub struct SimultaneousFiring {
    /// k = 1, 2, ... in order.
    pub rows: Vec<FiringRow>,
    /// The thrust drop accepted, as a fraction.
    pub allowed_thrust_drop: f64,
    /// Largest k whose per-port thrust stays within the accepted drop (every
    /// smaller k does too); always at least 1, since k = 1 is the reference.
    pub ports_within_limit: usize,
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::gas::nozzle::NozzleRegime;
    use crate::gas::valve::OrificeValve;
    use crate::gas::Gas;
    use approx::assert_relative_eq;

    const PSI_PA: f64 = 6_894.757_293_168; // 1 lbf/in² (from the exact pound and inch; value from memory)
    const SEA_LEVEL_PA: f64 = 101_325.0;

    fn nitrogen_port() -> PortChain {
        PortChain {
            valve: Valve::FlowCoefficient(CvValve::new(0.05, 0.7).unwrap()),
            nozzle: Nozzle::plain_hole(1.5e-3, 0.8).unwrap(),
        }
    }

    fn ctx(density: &dyn DensityAt) -> FlowContext<'_> {
        FlowContext {
            gas: Gas::Nitrogen.ideal(),
            density,
            ambient_pa: SEA_LEVEL_PA,
            tolerances: FlowTolerances::default(),
        }
    }

    /// Worked by hand (calculator), nitrogen as an ideal gas:
    ///
    /// Gas: γ = 1.4, R = 8.314463 / 0.0280134 = 296.8 J/(kg K).
    /// Supply: 100 psig at sea level = 100 × 6894.757 + 101325 = 790 801 Pa abs, T = 293 K.
    /// ρ1 = p1 / (R T) = 790 801 / (296.8 × 293) = 9.094 kg/m³.
    ///
    /// Valve, IEC 60534-2-1 with Cv = 0.05, xT = 0.7, Fγ = 1.4/1.4 = 1, Fp = 1:
    ///   W [kg/h] = 2.73 × 0.05 × Y × sqrt(x × 790.8 kPa × 9.094)
    ///   → W [kg/s] = c · Y · sqrt(x), c = 2.73 × 0.05 × sqrt(7191) / 3600 = 3.215e-3 kg/s,
    ///   Y = 1 − x / (3 × 0.7) = 1 − x / 2.1.
    /// Hole: A = π/4 × (1.5 mm)² = 1.767e-6 m², Cd·A = 1.414e-6 m².
    ///   Choked if pm ≥ 101 325 / 0.5283 = 191 800 Pa (assume, check below):
    ///   ṁ = Cd A pm sqrt(γ/(R T)) (2/(γ+1))^3 = k · pm,
    ///   k = 1.414e-6 × sqrt(1.4 / 86 963) × 0.5787 = 3.283e-9 kg/(s Pa).
    /// Balance with pm = p1 (1 − x):
    ///   3.215e-3 (1 − x/2.1) sqrt(x) = 3.283e-9 × 790 801 (1 − x) = 2.596e-3 (1 − x).
    ///   x = 0.375: left (0.8214)(0.6124) = 0.5030, right 0.8073 × 0.625 = 0.5046 (left low);
    ///   x = 0.380: left (0.8190)(0.6164) = 0.5049, right 0.8073 × 0.620 = 0.5005 (left high);
    ///   linear interpolation: x = 0.3763.
    /// pm = 790 801 × (1 − 0.3763) = 493 200 Pa (≥ 191 800: hole choked; x < Fγ xT = 0.7: valve not choked).
    /// ṁ = 3.283e-9 × 493 200 = 1.619e-3 kg/s.
    /// Thrust, sonic exit: u* = sqrt(2γ/(γ+1) R T) = sqrt(1.1667 × 296.8 × 293) = 318.5 m/s,
    ///   pe = 0.5283 × 493 200 = 260 600 Pa,
    ///   F = 1.619e-3 × 318.5 + (260 600 − 101 325) × 1.414e-6 = 0.5157 + 0.2251 = 0.7408 N.
    /// Isp = 0.7408 / (1.619e-3 × 9.80665) = 46.66 s.
    ///
    /// The hand numbers carry 4 figures, so 1e-3 relative is the honest bar.
    #[test]
    fn hand_worked_nitrogen_port() {
        let d = IdealDensity::new(&Gas::Nitrogen.ideal()).unwrap();
        let c = ctx(&d);
        let s = nitrogen_port()
            .solve(100.0 * PSI_PA + SEA_LEVEL_PA, 293.0, &c)
            .unwrap();
        assert_relative_eq!(s.intermediate_pressure_pa, 493_200.0, max_relative = 1e-3);
        assert_relative_eq!(s.mass_flow_kg_s, 1.619e-3, max_relative = 1e-3);
        assert_relative_eq!(s.thrust_n, 0.7408, max_relative = 1e-3);
        assert_relative_eq!(s.specific_impulse_s, 46.66, max_relative = 1e-3);
        assert!(!s.valve.choked);
        assert_eq!(s.nozzle.regime, NozzleRegime::ChokedSonicExit);
        // The two restrictions agree on the flow to the solve's tolerance.
        assert_relative_eq!(
            s.valve.mass_flow_kg_s,
            s.mass_flow_kg_s,
            max_relative = 1e-8
        );
    }

    #[test]
    fn chain_flow_is_continuous_and_monotone_in_supply_pressure() {
        // Sweep supply pressure from below ambient to 3 MPa, for a Cv valve
        // and an orifice valve, plain hole and converging–diverging nozzle.
        // Monotone: never falls. Continuous: a relative step of 1e-7 in
        // supply pressure moves the flow by less than 1e-5 of itself (a
        // smooth function moves by about 1e-7; a jump would be far larger).
        let d = IdealDensity::new(&Gas::Nitrogen.ideal()).unwrap();
        let c = ctx(&d);
        let chains = [
            nitrogen_port(),
            PortChain {
                valve: Valve::Orifice(OrificeValve::from_diameter(1.2e-3, 0.7).unwrap()),
                nozzle: Nozzle::converging_diverging(1.0e-3, 2.0e-3, 0.95).unwrap(),
            },
        ];
        for chain in chains {
            let mut last = 0.0;
            for i in 0..400 {
                let ps = 0.9 * SEA_LEVEL_PA + (3.0e6 - 0.9 * SEA_LEVEL_PA) * (i as f64) / 399.0;
                let m = chain.solve(ps, 293.0, &c).unwrap().mass_flow_kg_s;
                let m2 = chain
                    .solve(ps * (1.0 + 1e-7), 293.0, &c)
                    .unwrap()
                    .mass_flow_kg_s;
                assert!(m >= last, "flow fell at {ps} Pa: {last} -> {m}");
                assert!(
                    (m2 - m).abs() <= 1e-5 * m.max(1e-12),
                    "jump at {ps} Pa: {m} -> {m2}"
                );
                if ps <= SEA_LEVEL_PA {
                    assert_eq!(m, 0.0);
                }
                last = m;
            }
        }
    }

    #[test]
    fn closure_density_and_constant_z_agree() {
        // The closure seam and IdealDensity give the same answer for the same Z.
        let gas = Gas::Nitrogen.ideal();
        let z = 0.995;
        let d1 = IdealDensity::with_compressibility(&gas, z).unwrap();
        let d2 = move |p: f64, t: f64| -> Result<f64, FlowError> {
            Ok(p / (z * gas.r_specific_j_kg_k * t))
        };
        let a = nitrogen_port().solve(8e5, 293.0, &ctx(&d1)).unwrap();
        let b = nitrogen_port().solve(8e5, 293.0, &ctx(&d2)).unwrap();
        assert_eq!(a, b);
        // A failing density model surfaces as an error value.
        let bad = |p: f64, t: f64| -> Result<f64, FlowError> {
            Err(FlowError::Density {
                pressure_pa: p,
                temperature_k: t,
                reason: "outside table".into(),
            })
        };
        assert!(matches!(
            nitrogen_port().solve(8e5, 293.0, &ctx(&bad)),
            Err(FlowError::Density { .. })
        ));
    }

    fn supplies() -> [SharedSupply; 2] {
        let set = 100.0 * PSI_PA + SEA_LEVEL_PA;
        [
            SharedSupply::new(
                set,
                293.0,
                SupplyCapacity::Restriction(CvValve::new(0.1, 0.7).unwrap()),
            )
            .unwrap(),
            SharedSupply::new(
                set,
                293.0,
                SupplyCapacity::LinearDroop {
                    droop_pa: 50e3,
                    reference_flow_kg_s: 5e-3,
                },
            )
            .unwrap(),
        ]
    }

    #[test]
    fn manifold_balances_supply_and_ports() {
        // Mixed ports: the supply's delivery at the solved manifold pressure
        // equals the ports' total (to the pressure tolerance), and each port
        // is the single-port solve at that manifold pressure.
        let d = IdealDensity::new(&Gas::Nitrogen.ideal()).unwrap();
        let c = ctx(&d);
        let ports = [
            nitrogen_port(),
            PortChain {
                valve: Valve::Orifice(OrificeValve::from_diameter(1.0e-3, 0.7).unwrap()),
                nozzle: Nozzle::converging_diverging(0.8e-3, 1.6e-3, 0.95).unwrap(),
            },
        ];
        for supply in supplies() {
            let m = supply.solve(&ports, &c).unwrap();
            let delivered = supply.delivered(m.manifold_pressure_pa, &c).unwrap();
            assert_relative_eq!(delivered, m.total_mass_flow_kg_s, max_relative = 1e-7);
            assert!(m.manifold_pressure_pa < supply.set_pressure_pa());
            for (p, s) in ports.iter().zip(&m.ports) {
                assert_eq!(*s, p.solve(m.manifold_pressure_pa, 293.0, &c).unwrap());
            }
            let none = supply.solve(&[], &c).unwrap();
            assert_eq!(none.manifold_pressure_pa, supply.set_pressure_pa());
            assert_eq!(none.total_mass_flow_kg_s, 0.0);
        }
    }

    #[test]
    fn linear_droop_follows_its_definition() {
        // One port on a droop supply: manifold = set − droop × flow / reference.
        let d = IdealDensity::new(&Gas::Nitrogen.ideal()).unwrap();
        let c = ctx(&d);
        let s = supplies()[1];
        let m = s.solve(&[nitrogen_port()], &c).unwrap();
        let expected = s.set_pressure_pa() - 50e3 * m.total_mass_flow_kg_s / 5e-3;
        assert_relative_eq!(m.manifold_pressure_pa, expected, max_relative = 1e-9);
    }

    #[test]
    fn equal_ports_sweep_thrust_never_rises_with_more_ports() {
        let d = IdealDensity::new(&Gas::Nitrogen.ideal()).unwrap();
        let c = ctx(&d);
        for supply in supplies() {
            let sweep = supply.equal_ports(&nitrogen_port(), 8, 0.05, &c).unwrap();
            assert_eq!(sweep.rows.len(), 8);
            assert_eq!(sweep.rows[0].thrust_drop_fraction, 0.0);
            for w in sweep.rows.windows(2) {
                assert!(w[1].thrust_per_port_n <= w[0].thrust_per_port_n);
                assert!(w[1].manifold_pressure_pa <= w[0].manifold_pressure_pa);
            }
            let n = sweep.ports_within_limit;
            assert!(n >= 1);
            assert!(sweep.rows[..n]
                .iter()
                .all(|r| r.thrust_drop_fraction <= 0.05));
            if n < 8 {
                assert!(sweep.rows[n].thrust_drop_fraction > 0.05);
            }
            // k equal ports give the same per-port answer as the general
            // manifold solve with k copies.
            let k = 3;
            let general = supply.solve(&vec![nitrogen_port(); k], &c).unwrap();
            assert_relative_eq!(
                general.ports[0].thrust_n,
                sweep.rows[k - 1].thrust_per_port_n,
                max_relative = 1e-8
            );
        }
    }

    #[test]
    fn a_stiff_supply_gives_the_single_port_answer() {
        // Droop of 1 Pa at 1000 kg/s: the manifold stays at set pressure, so
        // every port behaves as if fed straight from the regulator, and no
        // number of ports loses thrust.
        let d = IdealDensity::new(&Gas::Nitrogen.ideal()).unwrap();
        let c = ctx(&d);
        let set = 100.0 * PSI_PA + SEA_LEVEL_PA;
        let stiff = SharedSupply::new(
            set,
            293.0,
            SupplyCapacity::LinearDroop {
                droop_pa: 1.0,
                reference_flow_kg_s: 1000.0,
            },
        )
        .unwrap();
        let sweep = stiff.equal_ports(&nitrogen_port(), 4, 0.05, &c).unwrap();
        let alone = nitrogen_port().solve(set, 293.0, &c).unwrap();
        for r in &sweep.rows {
            assert_relative_eq!(r.thrust_per_port_n, alone.thrust_n, max_relative = 1e-6);
        }
        assert_eq!(sweep.ports_within_limit, 4);
    }

    #[test]
    fn bad_supply_data_is_refused() {
        assert!(SharedSupply::new(
            -1.0,
            293.0,
            SupplyCapacity::LinearDroop {
                droop_pa: 1.0,
                reference_flow_kg_s: 1.0
            }
        )
        .is_err());
        assert!(SharedSupply::new(
            5e5,
            293.0,
            SupplyCapacity::LinearDroop {
                droop_pa: 0.0,
                reference_flow_kg_s: 1.0
            }
        )
        .is_err());
        let d = IdealDensity::new(&Gas::Nitrogen.ideal()).unwrap();
        assert!(supplies()[0]
            .equal_ports(&nitrogen_port(), 0, 0.05, &ctx(&d))
            .is_err());
        assert!(IdealDensity::with_compressibility(&Gas::Nitrogen.ideal(), 0.0).is_err());
    }

    /// Chain dropout, closed form: the last set pressure plus every stage's margin.
    #[test]
    fn chain_dropout_is_the_last_set_pressure_plus_all_margins() {
        assert_eq!(chain_dropout_tank_pressure_pa(&[]), None);
        assert_eq!(chain_dropout_tank_pressure_pa(&[(10e5, 3e5)]), Some(13e5));
        assert_eq!(
            chain_dropout_tank_pressure_pa(&[(60e5, 8e5), (10e5, 3e5)]),
            Some(21e5)
        );
    }

    /// A first stage with unlimited capacity changes nothing downstream.
    #[test]
    fn unlimited_first_stage_leaves_the_manifold_alone() {
        let d = IdealDensity::new(&Gas::Nitrogen.ideal()).unwrap();
        let c = ctx(&d);
        for s in supplies() {
            let two = s
                .with_first_stage(
                    FirstStage {
                        set_pressure_pa: 60e5,
                        dropout_margin_pa: 5e5,
                        capacity: SupplyCapacity::Unlimited,
                    },
                    3e5,
                )
                .unwrap();
            for k in [1, 4] {
                let a = s.solve(&vec![nitrogen_port(); k], &c).unwrap();
                let b = two.solve(&vec![nitrogen_port(); k], &c).unwrap();
                assert_relative_eq!(
                    a.manifold_pressure_pa,
                    b.manifold_pressure_pa,
                    max_relative = 1e-12
                );
            }
        }
    }

    /// A first stage set exactly at the working set pressure plus the working margin, with a
    /// linear droop, and an unlimited working stage: the flow must pass the first stage from
    /// its set pressure down to manifold + margin, so the manifold sits at
    /// set − droop × flow / reference (closed form), and more open valves lower it further.
    #[test]
    fn first_stage_droop_limits_the_manifold() {
        let d = IdealDensity::new(&Gas::Nitrogen.ideal()).unwrap();
        let c = ctx(&d);
        let set = 790_801.0;
        let margin = 2e5;
        let s = SharedSupply::new(set, 293.0, SupplyCapacity::Unlimited)
            .unwrap()
            .with_first_stage(
                FirstStage {
                    set_pressure_pa: set + margin,
                    dropout_margin_pa: 5e5,
                    capacity: SupplyCapacity::LinearDroop {
                        droop_pa: 40e3,
                        reference_flow_kg_s: 5e-3,
                    },
                },
                margin,
            )
            .unwrap();
        let m = s.solve(&[nitrogen_port()], &c).unwrap();
        let expected = set - 40e3 * m.total_mass_flow_kg_s / 5e-3;
        assert_relative_eq!(m.manifold_pressure_pa, expected, max_relative = 1e-8);
        let sweep = s.equal_ports(&nitrogen_port(), 4, 0.05, &c).unwrap();
        assert!(sweep.rows[3].manifold_pressure_pa < sweep.rows[0].manifold_pressure_pa);
        // Set below the working set pressure plus its margin: refused.
        assert!(SharedSupply::new(set, 293.0, SupplyCapacity::Unlimited)
            .unwrap()
            .with_first_stage(
                FirstStage {
                    set_pressure_pa: set + 0.5 * margin,
                    dropout_margin_pa: 5e5,
                    capacity: SupplyCapacity::Unlimited,
                },
                margin,
            )
            .is_err());
    }
}
