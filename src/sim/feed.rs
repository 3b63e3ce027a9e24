//! Thrust and flow of each port as the tank blows down and valves open together.
//!
//! Built once per run from the project's own flow models (`analysis::feed`):
//! each port alone is solved at a grid of manifold pressures from ambient to the
//! regulator's set pressure, and the supply droop with k valves open is the
//! manifold pressure ratio of the equal-ports table of the port with the largest
//! flow (the same droop the firmware tables use). In the loop, a port's thrust
//! and flow are interpolated at the manifold pressure
//!
//! p_manifold − p_ambient = r_k · (min(p_set, p_tank − dropout margin) − p_ambient),
//!
//! with r_k the manifold pressure above ambient over the set pressure above
//! ambient: for the port alone as solved by the shared-supply model, and with k
//! open scaled by the droop port's ratio of k open to one open,
//!
//! so after the regulator drops out (tank pressure below set pressure plus its
//! margin) the thrust falls with the tank pressure. Gas reaches the valves at the
//! tank temperature: for choked flow the thrust does not depend on it and the mass
//! flow goes as 1/√T, so flows are scaled by √(T_fill/T_tank).

use crate::analysis::feed::{port_chains, shared_supply, ALLOWED_DROOP};
use crate::gas::chain::FlowContext;
use crate::gas::{FlowError, FlowTolerances};
use crate::model::Design;

/// Points of the per-port pressure grid.
pub const PRESSURE_POINTS: usize = 33;

/// Per-port thrust and flow against manifold pressure, and the droop with k open.
#[derive(Debug, Clone, PartialEq)]
pub struct FeedMap {
    /// Grid of manifold pressures, Pa absolute, ascending.
    pressures_pa: Vec<f64>,
    /// thrust[port][grid], N.
    thrust_n: Vec<Vec<f64>>,
    /// flow[port][grid], kg/s.
    flow_kg_s: Vec<Vec<f64>>,
    /// Manifold pressure above ambient with k valves open over the regulator's set
    /// pressure above ambient, k = 1..=n (index k−1): the loss in the regulator and
    /// line at that flow.
    droop_ratio: Vec<f64>,
    /// Each port alone: manifold pressure above ambient over the set pressure above ambient.
    single_ratio: Vec<f64>,
    /// Regulator set pressure, Pa absolute.
    pub set_pressure_pa: f64,
    /// Tank pressure below which the regulator cannot hold its set pressure, Pa absolute.
    pub dropout_pressure_pa: f64,
    /// Regulator dropout margin, Pa.
    pub dropout_margin_pa: f64,
    /// Ambient pressure at the nozzle exits, Pa absolute.
    pub ambient_pa: f64,
    /// Temperature the flows were solved at, K.
    pub reference_temperature_k: f64,
}

impl FeedMap {
    /// Solve the map for a design at an ambient pressure.
    pub fn new(design: &Design, ambient_pa: f64) -> Result<Self, FlowError> {
        let gas = design.feed.gas;
        let density = crate::analysis::feed::real_density(gas);
        let ctx = FlowContext {
            gas: crate::analysis::feed::flow_gas(design, ambient_pa),
            density: &density,
            ambient_pa,
            tolerances: FlowTolerances::default(),
        };
        let chains = port_chains(design)?;
        let supply = shared_supply(design, ambient_pa)?;
        let t = supply.temperature_k();
        let set = supply.set_pressure_pa();
        let pressures_pa: Vec<f64> = (0..PRESSURE_POINTS)
            .map(|i| ambient_pa + (set - ambient_pa) * i as f64 / (PRESSURE_POINTS - 1) as f64)
            .collect();
        let mut thrust_n = Vec::with_capacity(chains.len());
        let mut flow_kg_s = Vec::with_capacity(chains.len());
        for c in &chains {
            let mut th = Vec::with_capacity(PRESSURE_POINTS);
            let mut fl = Vec::with_capacity(PRESSURE_POINTS);
            for &p in &pressures_pa {
                let s = c.solve(p, t, &ctx)?;
                th.push(s.thrust_n.max(0.0));
                fl.push(s.mass_flow_kg_s.max(0.0));
            }
            thrust_n.push(th);
            flow_kg_s.push(fl);
        }
        let single: Vec<f64> = flow_kg_s.iter().map(|f| f[PRESSURE_POINTS - 1]).collect();
        let big = crate::analysis::feed::droop_port(&single);
        let droop_ratio = if chains.is_empty() {
            Vec::new()
        } else {
            let firing = supply.equal_ports(&chains[big], chains.len(), ALLOWED_DROOP, &ctx)?;
            firing
                .rows
                .iter()
                .map(|r| (r.manifold_pressure_pa - ambient_pa) / (set - ambient_pa).max(1e-9))
                .collect()
        };
        // Each port alone: its own manifold pressure (a small port draws less
        // through the regulator and line than a large one).
        let mut single_ratio = Vec::with_capacity(chains.len());
        for c in &chains {
            let m = supply.solve(std::slice::from_ref(c), &ctx)?;
            single_ratio.push((m.manifold_pressure_pa - ambient_pa) / (set - ambient_pa).max(1e-9));
        }
        // With two regulator stages the chain drops out when the tank can no longer feed the
        // first stage's set pressure plus its margin; the working stage then follows the tank
        // down by the chain's whole margin.
        let dropout_pressure_pa =
            crate::analysis::feed::dropout_tank_pressure_pa(design, ambient_pa);
        let dropout_margin_pa = (dropout_pressure_pa - set).max(0.0);
        Ok(FeedMap {
            pressures_pa,
            thrust_n,
            flow_kg_s,
            droop_ratio,
            single_ratio,
            set_pressure_pa: set,
            dropout_pressure_pa,
            dropout_margin_pa,
            ambient_pa,
            reference_temperature_k: t,
        })
    }

    /// Number of ports.
    pub fn ports(&self) -> usize {
        self.thrust_n.len()
    }

    /// Pressure the regulator delivers from a tank at `tank_pa` with one valve open, Pa absolute.
    pub fn regulator_outlet_pa(&self, tank_pa: f64) -> f64 {
        self.set_pressure_pa
            .min(tank_pa - self.dropout_margin_pa)
            .max(self.ambient_pa)
    }

    /// Thrust (N) and flow (kg/s) of `port` fully open with `open` valves open in
    /// all, from a tank at `tank_pa` and `tank_k`.
    pub fn port_at(&self, port: usize, open: usize, tank_pa: f64, tank_k: f64) -> (f64, f64) {
        let outlet = self.regulator_outlet_pa(tank_pa);
        // Port alone as solved; with k open, scaled by the droop port's ratio of
        // k open to one open.
        let one = self.single_ratio[port];
        let r = match (open, self.droop_ratio.first()) {
            (0 | 1, _) | (_, None) => one,
            (k, Some(&r1)) => {
                one * self.droop_ratio.get(k - 1).copied().unwrap_or(r1) / r1.max(1e-12)
            }
        };
        let p = self.ambient_pa + (outlet - self.ambient_pa) * r;
        let g = &self.pressures_pa;
        let span = g[g.len() - 1] - g[0];
        let x = if span > 0.0 {
            ((p - g[0]) / span * (g.len() - 1) as f64).clamp(0.0, (g.len() - 1) as f64)
        } else {
            (g.len() - 1) as f64
        };
        let i = (x.floor() as usize).min(g.len() - 2);
        let f = x - i as f64;
        let lerp = |v: &[f64]| v[i] + (v[i + 1] - v[i]) * f;
        let temp_scale = (self.reference_temperature_k / tank_k.max(1.0)).sqrt();
        (
            lerp(&self.thrust_n[port]),
            lerp(&self.flow_kg_s[port]) * temp_scale,
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn heron() -> (Design, crate::analysis::Analysis) {
        let d =
            crate::layout::parse_str(include_str!("../../layouts/heron-54.toml"), "heron").unwrap();
        let a = crate::analysis::analyze(&d).unwrap();
        (d, a)
    }

    /// Regulated, one valve open: the map gives the analysis's own per-port thrust
    /// and flow (the same chain solved at the same manifold pressure), and with k
    /// open the droop table's per-port thrust.
    #[test]
    fn regulated_thrust_is_the_analysis_operating_point() {
        let (d, a) = heron();
        let st = &a.states[0];
        let map = FeedMap::new(&d, st.ambient_pressure_pa).unwrap();
        let full_tank = 200e5;
        for (i, p) in st.ports.iter().enumerate() {
            let (f, m) = map.port_at(i, 1, full_tank, map.reference_temperature_k);
            assert!(
                (f - p.thrust_n).abs() < 1e-6 * p.thrust_n,
                "{} {f} vs {}",
                p.name,
                p.thrust_n
            );
            assert!((m - p.mass_flow_kg_s).abs() < 1e-3 * p.mass_flow_kg_s);
        }
        let big = st.droop.last().unwrap();
        let (f, _) = map.port_at(0, big.open_ports, full_tank, map.reference_temperature_k);
        // Linear interpolation between grid points of a near-linear curve: 1e-3.
        assert!((f - big.thrust_per_port_n).abs() < 1e-3 * big.thrust_per_port_n);
    }

    /// After dropout the thrust follows the tank pressure down, and no pressure
    /// above ambient means no thrust.
    #[test]
    fn thrust_falls_with_the_tank_after_dropout() {
        let (d, a) = heron();
        let st = &a.states[0];
        let map = FeedMap::new(&d, st.ambient_pressure_pa).unwrap();
        let t = map.reference_temperature_k;
        let at_dropout = map.port_at(0, 1, map.dropout_pressure_pa, t).0;
        let below = map.port_at(0, 1, map.dropout_pressure_pa - 3e5, t).0;
        let empty = map
            .port_at(0, 1, map.ambient_pa + map.dropout_margin_pa, t)
            .0;
        assert!((at_dropout - st.ports[0].thrust_n).abs() < 1e-6 * at_dropout);
        assert!(below < at_dropout && below > 0.0);
        assert!(empty.abs() < 1e-9);
    }
}
