//! Control allocation: from the effectiveness matrix to what the ports can do and
//! how to fire them.
//!
//! The pieces, each in its own file:
//! - [`effectiveness`]: the validated 6×n matrix (force and torque per port) and gas flows.
//! - [`controllability`]: rank, positive span and the missing axis directions in words.
//! - [`zonotope`]: the exact attainable torque set Σ[0, bᵢ] (facets, vertices, volume,
//!   per-axis maxima, inscribed ball), and its angular-acceleration image.
//! - [`simplex`]: a dense bounded-variable simplex with a reusable workspace.
//! - [`mingas`]: minimum-gas duty cycles on that simplex, with direction-preserving
//!   scale-down outside the envelope.
//! - [`lp`]: the same questions through `good_lp`/`microlp` (a model per call), used as a
//!   reference and for the side-force-limited envelope.
//! - [`region_map`]: the exact piecewise-linear minimum-gas map, one region per basis.
//! - [`onoff`]: least-gas on/off valve sets for the 26 per-axis commands.
//! - [`saturation`]: whether the envelope or the side-force limit stopped a command.
//!
//! All thresholds live in [`Tolerances`].
//!
//! ```
//! use nalgebra::Vector3;
//! use portwright::allocation::{
//!     Effectiveness, MinGasAllocator, PortGeometry, SideForceLimit, Tolerances, Zonotope,
//! };
//! // Two tangential ports at the CG station, 27 mm off the axis, 1 N each: pure +roll.
//! let port = |name: &str, y: f64, dir: Vector3<f64>| PortGeometry {
//!     name: name.into(),
//!     position_m: Vector3::new(0.0, y, 0.0),
//!     direction: dir,
//!     thrust_n: 1.0,
//!     mass_flow_kg_s: 2e-3,
//! };
//! let e = Effectiveness::from_ports(&[
//!     port("a", 0.027, Vector3::z()),
//!     port("b", -0.027, -Vector3::z()),
//! ])?;
//! let tol = Tolerances::default();
//! let z = Zonotope::torque(&e, &tol)?;
//! assert!((z.max_along(&Vector3::x()) - 0.054).abs() < 1e-12);
//! let mut alloc = MinGasAllocator::new(&e, SideForceLimit::PureCouple, &tol)?;
//! let a = alloc.allocate(&Vector3::new(0.027, 0.0, 0.0))?;
//! assert!((a.duty[0] - 0.5).abs() < 1e-12 && (a.gas_rate_kg_s - 2e-3).abs() < 1e-15);
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```

pub mod controllability;
pub mod effectiveness;
pub mod lp;
pub mod mingas;
pub mod onoff;
pub mod rays;
pub mod region_map;
pub mod saturation;
pub mod simplex;
pub mod zonotope;

#[cfg(test)]
mod testkit;

pub use controllability::{AxisDirection, AxisReach, Controllability};
pub use effectiveness::{Effectiveness, EffectivenessError, PortGeometry};
pub use lp::{LpError, SideForceEnvelope};
pub use mingas::{Allocation, AllocationError, AllocationStatus, MinGasAllocator, SideForceLimit};
pub use onoff::{OnOffError, OnOffOptions, OnOffPlan, OnOffSelection, ValveSet};
pub use rays::LimitedRays;
pub use region_map::{Region, RegionMap, RegionMapError};
pub use simplex::{BoundedSimplex, SimplexError, SimplexSolution, Start};
pub use zonotope::{AxisLimits, Facet, Zonotope, ZonotopeError};

/// Every numerical threshold used by the allocation code, in one place.
///
/// The simplex works on rows and costs scaled to order one (see [`mingas`]), so its
/// thresholds are absolute numbers on that scale. Geometric thresholds are relative
/// to the largest torque column, which makes them independent of units and size.
#[derive(Debug, Clone, PartialEq)]
pub struct Tolerances {
    /// Largest bound or row violation accepted as feasible (scaled units). Chosen
    /// a few hundred ulps above the rounding of a 3×3 solve on order-one data.
    pub primal_feasibility: f64,
    /// Reduced costs above −this count as optimal (scaled units).
    pub optimality: f64,
    /// Smallest pivot magnitude the ratio test accepts; smaller entries are
    /// treated as zero to keep the basis well conditioned.
    pub pivot: f64,
    /// Two ratio-test ratios closer than this (relative) are a tie, broken by
    /// pivot size or, under Bland's rule, by index.
    pub ratio_tie: f64,
    /// A step shorter than this counts as a degenerate pivot.
    pub degenerate_step: f64,
    /// Largest bound violation of a basic variable accepted after the final
    /// refactorization (scaled units); beyond it the solve reports numerical trouble.
    /// Looser than `primal_feasibility` because it also absorbs the drift of the
    /// updated inverse before the last refactorization.
    pub final_feasibility: f64,
    /// Simplex iterations allowed per solve before giving up.
    pub max_iterations: usize,
    /// Pivots between fresh factorizations of the basis inverse.
    pub refactor_interval: usize,
    /// Consecutive degenerate pivots before switching to Bland's rule.
    pub degenerate_run_limit: usize,
    /// Two generators are parallel when |sin(angle)| is below this.
    pub parallel: f64,
    /// A torque column shorter than this fraction of the longest counts as zero.
    pub zero_column: f64,
    /// Relative singular-value threshold for the rank of the torque columns, and
    /// for treating a facet offset as zero (origin on the boundary).
    pub rank: f64,
    /// Relative slack on the maximal scale in the `good_lp` reference allocation,
    /// which `microlp` may otherwise call infeasible by rounding.
    pub reference_scale_relax: f64,
    /// Slack on region membership tests of the region map (duty-cycle units).
    pub region_slack: f64,
    /// Relative noise floor on on/off torque comparisons, so that exact symmetry
    /// survives rounding of sums (fraction of the largest axis torque).
    pub onoff_noise: f64,
}

impl Default for Tolerances {
    fn default() -> Self {
        Self {
            primal_feasibility: 1e-9,
            optimality: 1e-9,
            pivot: 1e-11,
            ratio_tie: 1e-12,
            degenerate_step: 1e-13,
            final_feasibility: 1e-6,
            max_iterations: 10_000,
            refactor_interval: 32,
            degenerate_run_limit: 20,
            parallel: 1e-9,
            zero_column: 1e-12,
            rank: 1e-9,
            reference_scale_relax: 1e-9,
            region_slack: 1e-9,
            onoff_noise: 1e-9,
        }
    }
}
