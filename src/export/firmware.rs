//! Firmware allocation tables: the on/off valve sets and the exact minimum-gas
//! duty-cycle map of one flight state, as a C99 header, CSV and JSON.
//!
//! A flight computer cannot run the simplex every control step, but it does not
//! need to: the minimum-gas map is piecewise affine (see
//! [`region_map`](crate::allocation::region_map)), so a table of regions plus the
//! facets of the attainable torque set lets a few multiply-adds reproduce the
//! allocator exactly. The C evaluation does what [`RegionMap::evaluate`] does:
//!
//! 1. if some facet has n·τ > offset + slack, τ is out of reach and is scaled by
//!    s = min over facets with n·τ > 0 of offset / (n·τ), which is the exact ray
//!    intersection with the boundary (offsets are support values, never negative);
//! 2. the first region whose three basic duties M·τ + m lie in [−slack, 1 + slack]
//!    is used (those are the region's six inequalities); should rounding leave τ
//!    in none, the region with the least violation is used instead, so the
//!    function always answers;
//! 3. basic duties are clamped to [0, 1], `full_on` ports are 1, the rest 0.
//!
//! The tables are one value, [`FirmwareTables`], built from the allocation engine
//! by [`build_tables`] and rendered by [`render_c_header`], [`render_csv`] and
//! [`render_json`], which hold the same content. Rendering is pure: no files.
//!
//! Numbers are written in Rust's shortest round-trip form, so the double tables
//! in C, the CSV and the JSON all read back to the very `f64` values computed
//! here. Valve masks have bit i for port i: `uint32_t` in C for up to 32 ports,
//! `uint64_t` for 33 to 64 ([`MAX_PORTS`]), which bounds the port count.

use crate::allocation::{
    Effectiveness, OnOffError, OnOffOptions, OnOffPlan, OnOffSelection, RegionMap, RegionMapError,
    Tolerances,
};
use nalgebra::Vector3;
use serde::{Deserialize, Serialize};
use thiserror::Error;

/// Body-axis names in index order.
const AXES: [&str; 3] = ["roll", "pitch", "yaw"];

/// Largest port count a valve mask can describe (64 bits).
pub const MAX_PORTS: usize = 64;

/// Port counts up to this use 32-bit masks in C; above it, 64-bit.
pub const NARROW_MASK_PORTS: usize = 32;

/// Rows of the on/off table: one per command c ∈ {−1, 0, 1}³.
pub const ONOFF_ROWS: usize = 27;

/// Row of the on/off table for the command (0, 0, 0): every valve shut.
pub const ALL_OFF_ROW: usize = 13;

/// Largest number of grid points per axis accepted by [`build_tables`]
/// (65³ commands is already far more than any flight computer stores).
pub const MAX_GRID_POINTS: usize = 65;

/// Region slack used by the C evaluation when it is compiled for `float`.
/// A float carries about 7 significant digits; a basic duty is a sum of three
/// products whose terms may be a few times larger than the duty itself, so its
/// rounding is a few times 1e-7. Ten times that keeps boundary commands inside.
pub const FLOAT_REGION_SLACK: f64 = 1e-5;

/// Envelope slack of the `float` C evaluation, as a fraction of the longest
/// port torque column (same reasoning as [`FLOAT_REGION_SLACK`], one product sum).
pub const FLOAT_ENVELOPE_RELATIVE_SLACK: f64 = 1e-6;

/// Problems building, checking or rendering the tables.
#[derive(Debug, Error, Clone, PartialEq)]
pub enum FirmwareError {
    /// More ports than bits in a valve mask.
    #[error(
        "{0} ports do not fit a 64-bit valve mask: firmware tables hold at most {MAX_PORTS} ports"
    )]
    TooManyPorts(usize),
    /// The tables have no ports.
    #[error("the tables have no ports")]
    NoPorts,
    /// The grid size is out of range.
    #[error("a grid of {0} points per axis was asked for; expected 2 to {MAX_GRID_POINTS}")]
    BadGrid(usize),
    /// The exact duty-cycle map could not be built or evaluated.
    #[error("duty-cycle map: {0}")]
    RegionMap(#[from] RegionMapError),
    /// The on/off search failed.
    #[error("on/off valve sets: {0}")]
    OnOff(#[from] OnOffError),
    /// A number in the tables is NaN or infinite; names the field.
    #[error("`{0}` is not a finite number")]
    NotFinite(String),
    /// The tables contradict themselves (wrong row count, index out of range, ...).
    #[error("inconsistent tables: {0}")]
    Inconsistent(String),
    /// The JSON writer failed.
    #[error("JSON: {0}")]
    Json(String),
}

/// Names that say where the tables came from; printed in every format.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct TableNames {
    /// Name of the layout (usually its file stem).
    pub layout: String,
    /// Name of the flight state whose CG and thrusts the tables use.
    pub flight_state: String,
}

/// One port: its name and what it does at full duty.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PortEntry {
    /// Port name.
    pub name: String,
    /// Torque about the CG at full duty (roll, pitch, yaw), N·m.
    pub torque_nm: [f64; 3],
    /// Gas mass flow at full duty, kg/s.
    pub mass_flow_kg_s: f64,
}

/// How an on/off row was chosen.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum OnOffOutcome {
    /// The command (0, 0, 0): no valve opens.
    AllOff,
    /// The least-gas set meeting every threshold of the on/off search.
    Meets,
    /// No set qualifies; this is the best near miss.
    NearMiss {
        /// Shortfall of the set (dimensionless, see [`crate::allocation::onoff`]).
        shortfall: f64,
    },
}

/// One row of the on/off table.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct OnOffRow {
    /// The per-axis command (roll, pitch, yaw), each −1, 0 or 1.
    pub command: [i8; 3],
    /// Open valves: bit i set when port i is open.
    pub mask: u64,
    /// Torque of the set (roll, pitch, yaw), N·m, including supply droop.
    pub torque_nm: [f64; 3],
    /// Side force of the set (y, z), N.
    pub side_force_n: [f64; 2],
    /// Gas rate of the set, kg/s.
    pub gas_rate_kg_s: f64,
    /// Whether the set qualified.
    pub outcome: OnOffOutcome,
}

/// One region of the exact duty-cycle map.
///
/// Duty of port `basic[k]` is Σⱼ `map[k][j]`·τⱼ + `offset[k]`; ports in
/// `full_on_mask` run at 1 and all others at 0. τ belongs to the region when the
/// basic duties lie in [0, 1]: the inequalities −M τ ≤ m, M τ ≤ 1 − m. There is
/// one basic port per axis of [`FirmwareTables::map_axes`] (three unless the ports
/// span fewer axes); the columns of `map` for the other axes are zero.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct RegionEntry {
    /// The basic (fractional) ports, one per mapped axis.
    pub basic: Vec<usize>,
    /// Non-basic ports held at duty 1 (bit i = port i).
    pub full_on_mask: u64,
    /// M, row k giving basic port k over (roll, pitch, yaw); units 1/(N·m).
    pub map: Vec<[f64; 3]>,
    /// m, duty units, one per basic port.
    pub offset: Vec<f64>,
}

/// One facet of the attainable torque set: normal·τ ≤ offset.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct EnvelopeFacet {
    /// Outward unit normal.
    pub normal: [f64; 3],
    /// Support value along the normal, N·m (never negative).
    pub offset_nm: f64,
}

/// What the evaluation needs to scale a command into reach.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Envelope {
    /// Every facet of the attainable torque set.
    pub facets: Vec<EnvelopeFacet>,
    /// A command counts as inside while normal·τ ≤ offset + this, N·m.
    pub slack_nm: f64,
}

/// One command of the optional grid and its duty cycles.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct GridPoint {
    /// The command (roll, pitch, yaw), N·m.
    pub torque_nm: [f64; 3],
    /// Fraction of the command achieved (1 inside the envelope).
    pub scale: f64,
    /// Duty cycle per port.
    pub duty: Vec<f64>,
}

/// A regular grid of commands over the bounding box of the attainable set.
///
/// Point (i, j, k) (roll, pitch, yaw indices, each 0 to `points_per_axis` − 1) is
/// `points[(i·g + j)·g + k]`, with command low + index·(high − low)/(g − 1) per axis.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CommandGrid {
    /// g, points per axis.
    pub points_per_axis: usize,
    /// Lower corner of the box (roll, pitch, yaw), N·m.
    pub low_nm: [f64; 3],
    /// Upper corner of the box (roll, pitch, yaw), N·m.
    pub high_nm: [f64; 3],
    /// g³ points in the order above.
    pub points: Vec<GridPoint>,
}

/// The rule the on/off rows were chosen by (see [`crate::allocation::onoff`]).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct OnOffRule {
    /// A commanded axis needs at least (fraction − comparison tolerance) × its best torque.
    pub fraction: f64,
    /// An uncommanded axis may carry at most (tolerance + comparison tolerance) × its scale.
    pub tolerance: f64,
    /// Relative tolerance of every comparison: shares and gas rates closer than
    /// this count as equal, so mirrored ports are treated alike.
    pub comparison_tolerance: f64,
    /// A commanded axis must also exceed this torque in the commanded sense, N·m.
    pub noise_floor_nm: f64,
    /// Best positive on/off torque per axis (roll, pitch, yaw), N·m.
    pub best_positive_nm: [f64; 3],
    /// Best negative on/off torque per axis (magnitudes), N·m.
    pub best_negative_nm: [f64; 3],
}

/// The on/off rule in words, the same in every format.
const ONOFF_RULE: &str = "a row's valve set pushes each commanded axis the commanded way by at \
least (fraction - comparison_tolerance) * best torque of that axis and sense (and more than \
noise_floor_nm), and keeps each uncommanded axis within (tolerance + comparison_tolerance) * \
scale, scale = max(best positive, best negative) of that axis; torques include supply droop \
with k valves open; of the sets that qualify the least gas wins, gas rates within \
comparison_tolerance (relative) count as equal, then fewer valves, then the smaller mask; \
near_miss rows hold the set with the least shortfall";

/// Everything the firmware tables hold, for one layout and flight state.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct FirmwareTables {
    /// Layout name.
    pub layout: String,
    /// Flight state name.
    pub flight_state: String,
    /// Ports in mask-bit order.
    pub ports: Vec<PortEntry>,
    /// The body axes the duty-cycle map follows ("roll", "pitch", "yaw"): all
    /// three unless the ports span fewer, in which case a command's components on
    /// the other axes are ignored (no port can make them).
    pub map_axes: Vec<String>,
    /// The rule the on/off rows were chosen by.
    pub onoff_rule: OnOffRule,
    /// The 27 on/off rows, indexed by [`onoff_row`].
    pub onoff: Vec<OnOffRow>,
    /// Regions of the duty-cycle map, searched in this order.
    pub regions: Vec<RegionEntry>,
    /// Region membership slack (duty units) for double evaluation.
    pub region_slack: f64,
    /// The attainable torque set.
    pub envelope: Envelope,
    /// Optional grid of commands with duty cycles.
    pub grid: Option<CommandGrid>,
}

/// Row of the on/off table for the command `c` (roll, pitch, yaw); each
/// component is taken by its sign.
pub fn onoff_row(c: [i8; 3]) -> usize {
    let s = |v: i8| (v.signum() + 1) as usize;
    s(c[0]) * 9 + s(c[1]) * 3 + s(c[2])
}

/// The command of on/off row `row` (0 to 26).
fn row_command(row: usize) -> [i8; 3] {
    let d = |v: usize| (v % 3) as i8 - 1;
    [d(row / 9), d(row / 3), d(row)]
}

fn mask_of(ports: &[usize]) -> u64 {
    ports.iter().fold(0, |m, &p| m | (1u64 << p))
}

fn array3(v: &Vector3<f64>) -> [f64; 3] {
    [v.x, v.y, v.z]
}

/// Runs the allocation engine and collects the tables.
///
/// `onoff` and `thrust_factor` (the fraction of full thrust each valve gives with
/// k valves open) go to [`OnOffPlan::new`]; `grid` asks for that many commands
/// per axis over the bounding box of the attainable torque set.
pub fn build_tables(
    e: &Effectiveness,
    names: &TableNames,
    onoff: &OnOffOptions,
    thrust_factor: &dyn Fn(usize) -> f64,
    tol: &Tolerances,
    grid: Option<usize>,
) -> Result<FirmwareTables, FirmwareError> {
    let n = e.len();
    if n > MAX_PORTS {
        return Err(FirmwareError::TooManyPorts(n));
    }
    if let Some(g) = grid {
        if !(2..=MAX_GRID_POINTS).contains(&g) {
            return Err(FirmwareError::BadGrid(g));
        }
    }
    let map = RegionMap::new(e, tol)?;
    let plan = OnOffPlan::new(e, onoff, thrust_factor, tol)?;

    let ports = (0..n)
        .map(|i| PortEntry {
            name: e.names()[i].clone(),
            torque_nm: array3(&e.torque().column(i).into()),
            mass_flow_kg_s: e.mass_flow_kg_s()[i],
        })
        .collect();

    let mut rows: Vec<OnOffRow> = (0..ONOFF_ROWS)
        .map(|r| OnOffRow {
            command: row_command(r),
            mask: 0,
            torque_nm: [0.0; 3],
            side_force_n: [0.0; 2],
            gas_rate_kg_s: 0.0,
            outcome: OnOffOutcome::AllOff,
        })
        .collect();
    for (c, sel) in &plan.entries {
        let set = sel.set();
        rows[onoff_row(*c)] = OnOffRow {
            command: *c,
            mask: mask_of(&set.ports),
            torque_nm: array3(&set.torque),
            side_force_n: [set.force.y, set.force.z],
            gas_rate_kg_s: set.gas_rate_kg_s,
            outcome: match sel {
                OnOffSelection::Meets(_) => OnOffOutcome::Meets,
                OnOffSelection::NearMiss { shortfall, .. } => OnOffOutcome::NearMiss {
                    shortfall: *shortfall,
                },
            },
        };
    }

    let regions = map
        .regions()
        .iter()
        .map(|r| RegionEntry {
            basic: r.ports.clone(),
            full_on_mask: mask_of(&r.full_on),
            map: (0..r.ports.len())
                .map(|k| [0, 1, 2].map(|j| r.map[(k, j)]))
                .collect(),
            offset: (0..r.ports.len()).map(|k| r.offset[k]).collect(),
        })
        .collect();

    let z = map.zonotope();
    let envelope = Envelope {
        facets: z
            .bounding_planes()
            .iter()
            .map(|(normal, offset)| EnvelopeFacet {
                normal: array3(normal),
                offset_nm: *offset,
            })
            .collect(),
        // The same slack as `Zonotope::contains`, so both sides agree on "inside".
        slack_nm: tol.rank * z.scale(),
    };

    let grid = match grid {
        None => None,
        Some(g) => {
            let mut low = [0.0; 3];
            let mut high = [0.0; 3];
            for a in 0..3 {
                let mut d = Vector3::zeros();
                d[a] = 1.0;
                high[a] = z.support(&d);
                low[a] = -z.support(&-d);
            }
            let at = |a: usize, i: usize| low[a] + (high[a] - low[a]) * i as f64 / (g - 1) as f64;
            let mut points = Vec::with_capacity(g * g * g);
            for i in 0..g {
                for j in 0..g {
                    for k in 0..g {
                        let tau = Vector3::new(at(0, i), at(1, j), at(2, k));
                        let a = map.evaluate(&tau)?;
                        points.push(GridPoint {
                            torque_nm: array3(&tau),
                            scale: a.scale,
                            duty: a.duty,
                        });
                    }
                }
            }
            Some(CommandGrid {
                points_per_axis: g,
                low_nm: low,
                high_nm: high,
                points,
            })
        }
    };

    let best = plan.best_positive.sup(&plan.best_negative);
    let onoff_rule = OnOffRule {
        fraction: onoff.fraction,
        tolerance: onoff.tolerance,
        comparison_tolerance: tol.onoff_share,
        noise_floor_nm: tol.onoff_noise * best.max(),
        best_positive_nm: array3(&plan.best_positive),
        best_negative_nm: array3(&plan.best_negative),
    };
    let tables = FirmwareTables {
        layout: names.layout.clone(),
        flight_state: names.flight_state.clone(),
        ports,
        map_axes: map.axes().iter().map(|&a| AXES[a].to_string()).collect(),
        onoff_rule,
        onoff: rows,
        regions,
        region_slack: tol.region_slack,
        envelope,
        grid,
    };
    tables.validate()?;
    Ok(tables)
}

fn finite(what: impl Fn() -> String, values: &[f64]) -> Result<(), FirmwareError> {
    if values.iter().all(|v| v.is_finite()) {
        Ok(())
    } else {
        Err(FirmwareError::NotFinite(what()))
    }
}

fn inconsistent(msg: String) -> FirmwareError {
    FirmwareError::Inconsistent(msg)
}

impl FirmwareTables {
    /// Checks that the tables can be rendered: 1 to 32 ports, 27 on/off rows in
    /// index order with row 13 all off, indices and masks within the port count,
    /// at least one region and one facet, a grid of g³ points of n duties, and
    /// every number finite.
    pub fn validate(&self) -> Result<(), FirmwareError> {
        let n = self.ports.len();
        if n == 0 {
            return Err(FirmwareError::NoPorts);
        }
        if n > MAX_PORTS {
            return Err(FirmwareError::TooManyPorts(n));
        }
        let all: u64 = if n == 64 { u64::MAX } else { (1u64 << n) - 1 };
        for (i, p) in self.ports.iter().enumerate() {
            finite(|| format!("ports[{i}].torque_nm"), &p.torque_nm)?;
            finite(|| format!("ports[{i}].mass_flow_kg_s"), &[p.mass_flow_kg_s])?;
        }
        let rule = &self.onoff_rule;
        finite(
            || "onoff_rule".into(),
            &[
                rule.fraction,
                rule.tolerance,
                rule.comparison_tolerance,
                rule.noise_floor_nm,
            ],
        )?;
        finite(
            || "onoff_rule.best_positive_nm".into(),
            &rule.best_positive_nm,
        )?;
        finite(
            || "onoff_rule.best_negative_nm".into(),
            &rule.best_negative_nm,
        )?;
        if self.onoff.len() != ONOFF_ROWS {
            return Err(inconsistent(format!(
                "{} on/off rows, expected {ONOFF_ROWS}",
                self.onoff.len()
            )));
        }
        for (r, row) in self.onoff.iter().enumerate() {
            if row.command != row_command(r) {
                return Err(inconsistent(format!(
                    "on/off row {r} holds command {:?}, expected {:?}",
                    row.command,
                    row_command(r)
                )));
            }
            if row.mask & !all != 0 {
                return Err(inconsistent(format!(
                    "on/off row {r} opens a port beyond the {n} ports"
                )));
            }
            let off = row.outcome == OnOffOutcome::AllOff;
            if (r == ALL_OFF_ROW) != off || (off && row.mask != 0) {
                return Err(inconsistent(format!(
                    "on/off row {r}: only row {ALL_OFF_ROW} is all off, with no valve open"
                )));
            }
            finite(|| format!("onoff[{r}].torque_nm"), &row.torque_nm)?;
            finite(|| format!("onoff[{r}].side_force_n"), &row.side_force_n)?;
            finite(|| format!("onoff[{r}].gas_rate_kg_s"), &[row.gas_rate_kg_s])?;
            if let OnOffOutcome::NearMiss { shortfall } = row.outcome {
                finite(|| format!("onoff[{r}].shortfall"), &[shortfall])?;
            }
        }
        if self.regions.is_empty() {
            return Err(inconsistent("the duty-cycle map has no regions".into()));
        }
        let axes = self.map_axes.len();
        let known = self.map_axes.iter().all(|a| AXES.contains(&a.as_str()));
        if !(1..=3).contains(&axes) || !known {
            return Err(inconsistent(format!(
                "the map follows axes {:?}; expected one to three of roll, pitch and yaw",
                self.map_axes
            )));
        }
        for (k, reg) in self.regions.iter().enumerate() {
            let b = &reg.basic;
            let distinct = (0..b.len()).all(|i| (i + 1..b.len()).all(|j| b[i] != b[j]));
            if b.len() != axes || b.iter().any(|&p| p >= n) || !distinct {
                return Err(inconsistent(format!(
                    "region {k}: basic ports {b:?} are not {axes} distinct ports of {n}"
                )));
            }
            if reg.map.len() != axes || reg.offset.len() != axes {
                return Err(inconsistent(format!(
                    "region {k}: {} map rows and {} offsets for {axes} basic ports",
                    reg.map.len(),
                    reg.offset.len()
                )));
            }
            if reg.full_on_mask & !all != 0 || reg.full_on_mask & mask_of(&reg.basic) != 0 {
                return Err(inconsistent(format!(
                    "region {k}: full-on mask {:#x} is outside the ports or overlaps the basis",
                    reg.full_on_mask
                )));
            }
            finite(|| format!("regions[{k}].map"), reg.map.as_flattened())?;
            finite(|| format!("regions[{k}].offset"), &reg.offset)?;
        }
        finite(|| "region_slack".into(), &[self.region_slack])?;
        finite(|| "envelope.slack_nm".into(), &[self.envelope.slack_nm])?;
        if self.envelope.facets.is_empty() {
            return Err(inconsistent("the envelope has no facets".into()));
        }
        for (f, facet) in self.envelope.facets.iter().enumerate() {
            finite(|| format!("envelope.facets[{f}].normal"), &facet.normal)?;
            finite(
                || format!("envelope.facets[{f}].offset_nm"),
                &[facet.offset_nm],
            )?;
        }
        if let Some(g) = &self.grid {
            let count = g.points_per_axis.pow(3);
            if g.points_per_axis < 2 || g.points.len() != count {
                return Err(inconsistent(format!(
                    "grid of {} points per axis holds {} points",
                    g.points_per_axis,
                    g.points.len()
                )));
            }
            finite(|| "grid.low_nm".into(), &g.low_nm)?;
            finite(|| "grid.high_nm".into(), &g.high_nm)?;
            for (i, p) in g.points.iter().enumerate() {
                if p.duty.len() != n {
                    return Err(inconsistent(format!(
                        "grid point {i} has {} duty cycles for {n} ports",
                        p.duty.len()
                    )));
                }
                finite(|| format!("grid.points[{i}].torque_nm"), &p.torque_nm)?;
                finite(|| format!("grid.points[{i}].scale"), &[p.scale])?;
                finite(|| format!("grid.points[{i}].duty"), &p.duty)?;
            }
        }
        Ok(())
    }

    /// Length of the longest port torque column, N·m.
    fn torque_scale(&self) -> f64 {
        self.ports
            .iter()
            .map(|p| Vector3::from(p.torque_nm).norm())
            .fold(0.0, f64::max)
    }
}

/// Shortest decimal that reads back to the same `f64`.
fn num(v: f64) -> String {
    format!("{v:e}")
}

/// Frame and units, in words, shared by every format.
const FRAME: &str = "body axes: +x toward the nose, +y through the reference line on the tube, \
+z = x cross y; roll about +x, pitch about +y, yaw about +z, each right-handed; \
torques about the CG of the flight state";
const UNITS: &str = "torque N.m, force N, gas rate kg/s, duty cycle 0 to 1 per port, \
region map M in 1/(N.m)";
const ROW_RULE: &str = "row = (roll+1)*9 + (pitch+1)*3 + (yaw+1), each command -1, 0 or 1; \
row 13 is all off; mask bit i = port i";

fn outcome_word(o: &OnOffOutcome) -> (&'static str, f64) {
    match o {
        OnOffOutcome::AllOff => ("all_off", 0.0),
        OnOffOutcome::Meets => ("meets", 0.0),
        OnOffOutcome::NearMiss { shortfall } => ("near_miss", *shortfall),
    }
}

/// The axes the duty-cycle map follows, in words, as comment lines.
fn axes_words(t: &FirmwareTables) -> Vec<String> {
    let idx: Vec<usize> = t
        .map_axes
        .iter()
        .filter_map(|a| AXES.iter().position(|b| b == a))
        .collect();
    let spanned = crate::allocation::region_map::axis_words(&idx);
    if idx.len() == 3 {
        return vec![format!(
            "Map axes:     {spanned} (the duty-cycle map follows all three)."
        )];
    }
    let missing: Vec<usize> = (0..3).filter(|a| !idx.contains(a)).collect();
    let others = crate::allocation::region_map::axis_words(&missing);
    vec![
        format!("Map axes:     {spanned} only. The ports make no {others} torque, so the"),
        format!("              duty-cycle map ignores the {others} component of a command;"),
        format!("              on/off rows that command {others} are near misses."),
    ]
}

/// Words of `s` in lines of at most `width` characters.
fn wrap(s: &str, width: usize) -> Vec<String> {
    let mut lines = Vec::new();
    let mut line = String::new();
    for w in s.split_whitespace() {
        if !line.is_empty() && line.len() + 1 + w.len() > width {
            lines.push(std::mem::take(&mut line));
        }
        if !line.is_empty() {
            line.push(' ');
        }
        line.push_str(w);
    }
    if !line.is_empty() {
        lines.push(line);
    }
    lines
}

/// Text safe inside a C block comment: printable ASCII only, no comment end.
fn comment_text(s: &str) -> String {
    let clean: String = s
        .chars()
        .map(|c| {
            if c.is_ascii_graphic() || c == ' ' {
                c
            } else {
                '?'
            }
        })
        .collect();
    clean.replace("*/", "* /")
}

/// A C string literal holding `s` byte for byte (octal escapes for the rest).
fn c_string(s: &str) -> String {
    let mut out = String::from("\"");
    for b in s.bytes() {
        match b {
            b'"' => out.push_str("\\\""),
            b'\\' => out.push_str("\\\\"),
            // `?` is escaped so that no trigraph can form.
            b'?' => out.push_str("\\?"),
            0x20..=0x7e => out.push(b as char),
            _ => out.push_str(&format!("\\{b:03o}")),
        }
    }
    out.push('"');
    out
}

/// One field of a CSV line, quoted when it needs to be.
fn csv_field(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) || s.starts_with([' ', '#', '[']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

struct Text(String);

impl Text {
    fn line(&mut self, s: impl AsRef<str>) {
        self.0.push_str(s.as_ref());
        self.0.push('\n');
    }
}

fn c_real(v: f64) -> String {
    format!("PW_R({})", num(v))
}

fn c_reals(v: &[f64]) -> String {
    let parts: Vec<String> = v.iter().map(|x| c_real(*x)).collect();
    format!("{{{}}}", parts.join(", "))
}

fn c_mask(m: u64, ports: usize) -> String {
    if ports <= NARROW_MASK_PORTS {
        format!("UINT32_C(0x{m:08X})")
    } else {
        format!("UINT64_C(0x{m:016X})")
    }
}

/// Renders the tables as a C99 header.
///
/// The header holds `static const` tables and `static inline` functions only
/// (no dynamic memory, no library calls beyond `<stdint.h>`), in `double` unless
/// `PW_USE_FLOAT` is defined before it is included. Every name starts with `pw_`
/// or `PW_`.
pub fn render_c_header(t: &FirmwareTables) -> Result<String, FirmwareError> {
    t.validate()?;
    let n = t.ports.len();
    let mut o = Text(String::new());
    let layout = comment_text(&t.layout);
    let state = comment_text(&t.flight_state);
    o.line("/*");
    o.line(" * portwright firmware allocation tables (tables format 1)");
    o.line(" *");
    o.line(format!(" * Layout:       {layout}"));
    o.line(format!(" * Flight state: {state}"));
    o.line(format!(
        " * Ports:        {n} (bit i of a valve mask is port i)"
    ));
    for l in axes_words(t) {
        o.line(format!(" * {l}"));
    }
    o.line(" *");
    o.line(" * Frame: body axes with +x toward the nose, +y through the reference line");
    o.line(" *   on the tube and +z = x cross y. Roll is rotation about +x, pitch about +y,");
    o.line(" *   yaw about +z, each right-handed. Torques are about the CG of the flight");
    o.line(" *   state above; a vector [3] is always (roll, pitch, yaw) or (x, y, z).");
    o.line(" * Units: torque N.m, force N, gas rate kg/s, duty cycle 0..1 per port,");
    o.line(" *   region map entries 1/(N.m).");
    o.line(" * Numbers: pw_real is double, or float when PW_USE_FLOAT is defined before");
    o.line(" *   this header is included. The values are written so that double reads");
    o.line(" *   back exactly what portwright computed. Do not build with -ffast-math:");
    o.line(" *   pw_duty_cycles() rejects NaN and infinite commands by IEEE rules.");
    o.line(" *");
    o.line(" * Tables");
    o.line(" *   pw_ports[i]    name, torque at full duty and gas flow of port i.");
    o.line(" *   pw_onoff[row]  least-gas on/off valve set for the per-axis command");
    o.line(" *                  (roll, pitch, yaw), each -1, 0 or 1, with");
    o.line(" *                  row = (roll+1)*9 + (pitch+1)*3 + (yaw+1); row 13 is the");
    o.line(" *                  command (0,0,0), all valves shut. Use pw_onoff_mask().");
    o.line(" *                  outcome PW_ONOFF_NEAR_MISS marks a row where no valve set");
    o.line(" *                  met the thresholds; shortfall says by how much.");
    o.line(" *                  The rule the rows were chosen by (PW_ONOFF_FRACTION,");
    o.line(" *                  PW_ONOFF_TOLERANCE, PW_ONOFF_COMPARISON_TOLERANCE,");
    o.line(" *                  pw_onoff_best_positive_nm and _negative_nm below):");
    for l in wrap(ONOFF_RULE, 58) {
        o.line(format!(" *                    {l}"));
    }
    let r = &t.onoff_rule;
    o.line(format!(
        " *                  Here: fraction {}, tolerance {}, comparison tolerance {}.",
        num(r.fraction),
        num(r.tolerance),
        num(r.comparison_tolerance)
    ));
    o.line(" *   pw_regions[r]  exact minimum-gas duty cycles, piecewise affine in the");
    o.line(" *                  torque command tau: in region r the duty of port basic[k]");
    o.line(" *                  is sum_j map[k][j]*tau[j] + offset[k] for k = 0 to");
    o.line(" *                  PW_BASIC_COUNT - 1 (one basic port per mapped axis), ports");
    o.line(" *                  in full_on run at 1, all others at 0. tau is in region r");
    o.line(" *                  when its inequalities hold: -map*tau <= offset and");
    o.line(" *                  map*tau <= 1 - offset, i.e. the basic duties lie in [0, 1].");
    o.line(" *   pw_facets[f]   the attainable torque set: normal . tau <= offset_nm for");
    o.line(" *                  every f. A command outside it is scaled to the boundary by");
    o.line(
        " *                  s = min over f with normal . tau > 0 of offset_nm / (normal . tau).",
    );
    if let Some(g) = &t.grid {
        o.line(" *   pw_grid[p]     duty cycles on a regular grid of commands: point");
        o.line(" *                  (i, j, k) of the roll, pitch and yaw indices is");
        o.line(
            " *                  p = (i*PW_GRID_POINTS_PER_AXIS + j)*PW_GRID_POINTS_PER_AXIS + k,",
        );
        o.line(
            " *                  command pw_grid_low_nm + index*(pw_grid_high_nm - pw_grid_low_nm)",
        );
        o.line(format!(
            " *                  / {} per axis; scale < 1 where the command was out of reach.",
            g.points_per_axis - 1
        ));
    }
    o.line(" *");
    o.line(" * Functions");
    o.line(" *   pw_onoff_row(), pw_onoff_mask()  on/off look-up by command signs.");
    o.line(" *   pw_duty_cycles()  exact minimum-gas duty cycles for a torque command.");
    o.line(" *   pw_torque_for_duty()  torque the ports give for given duty cycles.");
    o.line(" */");
    o.line("#ifndef PORTWRIGHT_TABLES_H");
    o.line("#define PORTWRIGHT_TABLES_H");
    o.line("");
    o.line("#include <stdint.h>");
    o.line("");
    o.line("#ifdef PW_USE_FLOAT");
    o.line("typedef float pw_real;");
    o.line("#define PW_R(x) ((float)(x)) /* double literal rounded once, at compile time */");
    o.line("#else");
    o.line("typedef double pw_real;");
    o.line("#define PW_R(x) x");
    o.line("#endif");
    o.line("");
    o.line("/* Slack of the region test (duty units) and of the envelope test (N.m).");
    o.line(" * Define them before including this header to override. */");
    o.line("#ifndef PW_REGION_SLACK");
    o.line("#ifdef PW_USE_FLOAT");
    o.line(format!(
        "#define PW_REGION_SLACK {}",
        c_real(FLOAT_REGION_SLACK)
    ));
    o.line("#else");
    o.line(format!(
        "#define PW_REGION_SLACK {}",
        c_real(t.region_slack)
    ));
    o.line("#endif");
    o.line("#endif");
    o.line("#ifndef PW_ENVELOPE_SLACK_NM");
    o.line("#ifdef PW_USE_FLOAT");
    let float_env = (FLOAT_ENVELOPE_RELATIVE_SLACK * t.torque_scale()).max(t.envelope.slack_nm);
    o.line(format!(
        "#define PW_ENVELOPE_SLACK_NM {}",
        c_real(float_env)
    ));
    o.line("#else");
    o.line(format!(
        "#define PW_ENVELOPE_SLACK_NM {}",
        c_real(t.envelope.slack_nm)
    ));
    o.line("#endif");
    o.line("#endif");
    o.line("");
    o.line(format!("#define PW_PORT_COUNT {n}"));
    o.line(format!(
        "typedef {} pw_mask; /* valve masks: bit i = port i */",
        if n <= NARROW_MASK_PORTS {
            "uint32_t"
        } else {
            "uint64_t"
        }
    ));
    o.line(format!(
        "#define PW_BASIC_COUNT {} /* basic ports per region = axes the map follows */",
        t.map_axes.len()
    ));
    for axis in AXES {
        o.line(format!(
            "#define PW_MAP_{} {} /* 1 when the map follows {axis} */",
            axis.to_uppercase(),
            u8::from(t.map_axes.iter().any(|a| a == axis))
        ));
    }
    o.line(format!("#define PW_ONOFF_ROWS {ONOFF_ROWS}"));
    o.line(format!("#define PW_ONOFF_ALL_OFF_ROW {ALL_OFF_ROW}"));
    o.line(format!("#define PW_REGION_COUNT {}", t.regions.len()));
    o.line(format!(
        "#define PW_FACET_COUNT {}",
        t.envelope.facets.len()
    ));
    match &t.grid {
        Some(g) => {
            o.line(format!(
                "#define PW_GRID_POINTS_PER_AXIS {}",
                g.points_per_axis
            ));
            o.line(format!("#define PW_GRID_COUNT {}", g.points.len()));
        }
        None => {
            o.line("#define PW_GRID_POINTS_PER_AXIS 0");
            o.line("#define PW_GRID_COUNT 0");
        }
    }
    o.line("");
    o.line("/* The rule the on/off rows were chosen by (see the comment at the top). */");
    o.line(format!(
        "#define PW_ONOFF_FRACTION {}",
        c_real(t.onoff_rule.fraction)
    ));
    o.line(format!(
        "#define PW_ONOFF_TOLERANCE {}",
        c_real(t.onoff_rule.tolerance)
    ));
    o.line(format!(
        "#define PW_ONOFF_COMPARISON_TOLERANCE {}",
        c_real(t.onoff_rule.comparison_tolerance)
    ));
    o.line(format!(
        "#define PW_ONOFF_NOISE_FLOOR_NM {}",
        c_real(t.onoff_rule.noise_floor_nm)
    ));
    o.line(format!(
        "static const pw_real pw_onoff_best_positive_nm[3] = {}; /* roll, pitch, yaw */",
        c_reals(&t.onoff_rule.best_positive_nm)
    ));
    o.line(format!(
        "static const pw_real pw_onoff_best_negative_nm[3] = {}; /* magnitudes */",
        c_reals(&t.onoff_rule.best_negative_nm)
    ));
    o.line("");
    o.line("/* pw_onoff[row].outcome */");
    o.line("#define PW_ONOFF_ALL_OFF 0");
    o.line("#define PW_ONOFF_MEETS 1");
    o.line("#define PW_ONOFF_NEAR_MISS 2");
    o.line("");
    o.line("/* Return values of pw_duty_cycles() */");
    o.line("#define PW_EXACT 0       /* the duty cycles give the command */");
    o.line("#define PW_SCALED 1      /* out of reach: they give scale * command */");
    o.line("#define PW_BAD_COMMAND (-1) /* NaN or infinite command: all duties 0 */");
    o.line("");
    o.line("typedef struct {");
    o.line("    const char *name;");
    o.line("    pw_real torque_nm[3];   /* at full duty, about the CG */");
    o.line("    pw_real mass_flow_kg_s; /* at full duty */");
    o.line("} pw_port;");
    o.line("");
    o.line("typedef struct {");
    o.line("    signed char command[3]; /* roll, pitch, yaw: -1, 0 or 1 */");
    o.line("    pw_mask mask;           /* open valves, bit i = port i */");
    o.line("    pw_real torque_nm[3];");
    o.line("    pw_real side_force_n[2]; /* y, z */");
    o.line("    pw_real gas_rate_kg_s;");
    o.line("    unsigned char outcome;  /* PW_ONOFF_ALL_OFF, _MEETS or _NEAR_MISS */");
    o.line("    pw_real shortfall;      /* 0 unless outcome is PW_ONOFF_NEAR_MISS */");
    o.line("} pw_onoff_entry;");
    o.line("");
    o.line("typedef struct {");
    o.line("    unsigned char basic[3]; /* the PW_BASIC_COUNT fractional ports; the rest 0 */");
    o.line("    pw_mask full_on;        /* ports held at duty 1 */");
    o.line("    pw_real map[3][3];      /* 1/(N.m) */");
    o.line("    pw_real offset[3];      /* duty */");
    o.line("} pw_region;");
    o.line("");
    o.line("typedef struct {");
    o.line("    pw_real normal[3]; /* outward unit normal */");
    o.line("    pw_real offset_nm; /* normal . tau <= offset_nm inside */");
    o.line("} pw_facet;");
    o.line("");
    if t.grid.is_some() {
        o.line("typedef struct {");
        o.line("    pw_real torque_nm[3]; /* the command */");
        o.line("    pw_real scale;        /* fraction achieved, 1 inside the envelope */");
        o.line("    pw_real duty[PW_PORT_COUNT];");
        o.line("} pw_grid_point;");
        o.line("");
    }
    o.line("static const pw_port pw_ports[PW_PORT_COUNT] = {");
    for (i, p) in t.ports.iter().enumerate() {
        o.line(format!(
            "    {{{}, {}, {}}}, /* {i} */",
            c_string(&p.name),
            c_reals(&p.torque_nm),
            c_real(p.mass_flow_kg_s)
        ));
    }
    o.line("};");
    o.line("");
    o.line("static const pw_onoff_entry pw_onoff[PW_ONOFF_ROWS] = {");
    for (r, row) in t.onoff.iter().enumerate() {
        let (word, shortfall) = outcome_word(&row.outcome);
        let code = match row.outcome {
            OnOffOutcome::AllOff => "PW_ONOFF_ALL_OFF",
            OnOffOutcome::Meets => "PW_ONOFF_MEETS",
            OnOffOutcome::NearMiss { .. } => "PW_ONOFF_NEAR_MISS",
        };
        let [a, b, c] = row.command;
        o.line(format!("    /* {r}: command ({a}, {b}, {c}), {word} */"));
        o.line(format!(
            "    {{{{{a}, {b}, {c}}}, {}, {}, {}, {}, {code}, {}}},",
            c_mask(row.mask, n),
            c_reals(&row.torque_nm),
            c_reals(&row.side_force_n),
            c_real(row.gas_rate_kg_s),
            c_real(shortfall)
        ));
    }
    o.line("};");
    o.line("");
    o.line("static const pw_region pw_regions[PW_REGION_COUNT] = {");
    for (k, reg) in t.regions.iter().enumerate() {
        let names: Vec<String> = reg.basic.iter().map(|b| b.to_string()).collect();
        let pad = |k: usize| reg.basic.get(k).copied().unwrap_or(0);
        let row = |k: usize| reg.map.get(k).copied().unwrap_or([0.0; 3]);
        let offset: Vec<f64> = (0..3)
            .map(|k| reg.offset.get(k).copied().unwrap_or(0.0))
            .collect();
        o.line(format!("    /* {k}: basic ports {} */", names.join(" ")));
        o.line(format!(
            "    {{{{{}, {}, {}}}, {},",
            pad(0),
            pad(1),
            pad(2),
            c_mask(reg.full_on_mask, n)
        ));
        o.line(format!("     {{{},", c_reals(&row(0))));
        o.line(format!("      {},", c_reals(&row(1))));
        o.line(format!("      {}}},", c_reals(&row(2))));
        o.line(format!("     {}}},", c_reals(&offset)));
    }
    o.line("};");
    o.line("");
    o.line("static const pw_facet pw_facets[PW_FACET_COUNT] = {");
    for f in &t.envelope.facets {
        o.line(format!(
            "    {{{}, {}}},",
            c_reals(&f.normal),
            c_real(f.offset_nm)
        ));
    }
    o.line("};");
    o.line("");
    if let Some(g) = &t.grid {
        o.line(format!(
            "static const pw_real pw_grid_low_nm[3] = {};",
            c_reals(&g.low_nm)
        ));
        o.line(format!(
            "static const pw_real pw_grid_high_nm[3] = {};",
            c_reals(&g.high_nm)
        ));
        o.line("");
        o.line("static const pw_grid_point pw_grid[PW_GRID_COUNT] = {");
        for p in &g.points {
            o.line(format!(
                "    {{{}, {}, {}}},",
                c_reals(&p.torque_nm),
                c_real(p.scale),
                c_reals(&p.duty)
            ));
        }
        o.line("};");
        o.line("");
    }
    o.line(C_FUNCTIONS);
    o.line("#endif /* PORTWRIGHT_TABLES_H */");
    Ok(o.0)
}

/// The evaluation code; the same for every layout.
const C_FUNCTIONS: &str = r#"static inline int pw_sign(int v)
{
    return (v > 0) - (v < 0);
}

/* Row of pw_onoff for a command; each argument is taken by its sign. */
static inline int pw_onoff_row(int roll, int pitch, int yaw)
{
    return (pw_sign(roll) + 1) * 9 + (pw_sign(pitch) + 1) * 3 + (pw_sign(yaw) + 1);
}

/* Valves to open for a command; each argument is taken by its sign. */
static inline pw_mask pw_onoff_mask(int roll, int pitch, int yaw)
{
    return pw_onoff[pw_onoff_row(roll, pitch, yaw)].mask;
}

static inline pw_real pw_dot3(const pw_real a[3], const pw_real b[3])
{
    return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

/* Torque (N.m) the ports give for the duty cycles duty[PW_PORT_COUNT]. */
static inline void pw_torque_for_duty(const pw_real duty[PW_PORT_COUNT], pw_real torque_nm[3])
{
    int i, k;
    for (k = 0; k < 3; ++k) {
        torque_nm[k] = PW_R(0.0);
    }
    for (i = 0; i < PW_PORT_COUNT; ++i) {
        for (k = 0; k < 3; ++k) {
            torque_nm[k] += pw_ports[i].torque_nm[k] * duty[i];
        }
    }
}

/*
 * Least-gas duty cycles for the torque command torque_nm (roll, pitch, yaw,
 * N.m about the CG). Writes duty[PW_PORT_COUNT], each in [0, 1], and, when
 * scale is not NULL, the fraction of the command achieved along its own
 * direction. Returns PW_EXACT, PW_SCALED (out of reach: scaled down to the
 * boundary of the attainable set) or PW_BAD_COMMAND.
 * Cost: PW_FACET_COUNT dot products (twice when out of reach), then up to
 * PW_REGION_COUNT region tests of 9 multiply-adds each.
 */
static inline int pw_duty_cycles(const pw_real torque_nm[3], pw_real duty[PW_PORT_COUNT],
                                 pw_real *scale)
{
    pw_real target[3];
    pw_real s = PW_R(1.0);
    pw_real least = PW_R(0.0);
    int status = PW_EXACT;
    int best = 0;
    int f, r, k, i;

    for (i = 0; i < PW_PORT_COUNT; ++i) {
        duty[i] = PW_R(0.0);
    }
    if (scale != 0) {
        *scale = PW_R(0.0);
    }
    for (k = 0; k < 3; ++k) {
        /* NaN and infinity give NaN here; every finite value gives 0. */
        pw_real z = torque_nm[k] - torque_nm[k];
        if (!(z == PW_R(0.0))) {
            return PW_BAD_COMMAND;
        }
    }

    for (f = 0; f < PW_FACET_COUNT; ++f) {
        if (pw_dot3(pw_facets[f].normal, torque_nm) > pw_facets[f].offset_nm + PW_ENVELOPE_SLACK_NM) {
            status = PW_SCALED;
            break;
        }
    }
    if (status == PW_SCALED) {
        for (f = 0; f < PW_FACET_COUNT; ++f) {
            pw_real d = pw_dot3(pw_facets[f].normal, torque_nm);
            if (d > PW_R(0.0)) {
                pw_real q = pw_facets[f].offset_nm / d;
                if (q < s) {
                    s = q;
                }
            }
        }
        if (s < PW_R(0.0)) {
            s = PW_R(0.0);
        }
    }
    for (k = 0; k < 3; ++k) {
        target[k] = torque_nm[k] * s;
    }

    /* First region within the slack; failing that, the least violated one. */
    for (r = 0; r < PW_REGION_COUNT; ++r) {
        pw_real worst = PW_R(0.0);
        for (k = 0; k < PW_BASIC_COUNT; ++k) {
            pw_real u = pw_dot3(pw_regions[r].map[k], target) + pw_regions[r].offset[k];
            if (-u > worst) {
                worst = -u;
            }
            if (u - PW_R(1.0) > worst) {
                worst = u - PW_R(1.0);
            }
        }
        if (r == 0 || worst < least) {
            least = worst;
            best = r;
        }
        if (worst <= PW_REGION_SLACK) {
            break;
        }
    }

    for (i = 0; i < PW_PORT_COUNT; ++i) {
        if ((pw_regions[best].full_on >> i) & 1u) {
            duty[i] = PW_R(1.0);
        }
    }
    for (k = 0; k < PW_BASIC_COUNT; ++k) {
        pw_real u = pw_dot3(pw_regions[best].map[k], target) + pw_regions[best].offset[k];
        if (u < PW_R(0.0)) {
            u = PW_R(0.0);
        }
        if (u > PW_R(1.0)) {
            u = PW_R(1.0);
        }
        duty[pw_regions[best].basic[k]] = u;
    }
    if (scale != 0) {
        *scale = s;
    }
    return status;
}
"#;

/// Renders the tables as CSV: a comment block, then one table per section,
/// each opened by a `[name]` line and a line of column names, separated by a
/// blank line. The columns are described in the comment block.
pub fn render_csv(t: &FirmwareTables) -> String {
    let n = t.ports.len();
    let mut o = Text(String::new());
    o.line("# portwright firmware allocation tables (tables format 1)");
    o.line(format!("# layout: {}", comment_text(&t.layout)));
    o.line(format!("# flight state: {}", comment_text(&t.flight_state)));
    o.line(format!("# frame: {FRAME}"));
    o.line(format!("# units: {UNITS}"));
    o.line(
        "# Each table starts with a [name] line and a line of column names; a blank line ends it.",
    );
    o.line("# [summary]  key,value: layout, flight state, port count, region slack (duty), envelope slack (N.m), the on/off rule, grid size.");
    o.line(
        "# [ports]    index, name, torque at full duty (roll, pitch, yaw), mass flow at full duty.",
    );
    o.line(format!("# [onoff]    {ROW_RULE};"));
    o.line("#            torque and side force (y, z) of the set; outcome all_off, meets or near_miss; shortfall 0 unless near_miss.");
    o.line("#            rule (values in [summary] as onoff_*):");
    for l in wrap(ONOFF_RULE, 96) {
        o.line(format!("#              {l}"));
    }
    o.line("# [regions]  region, basic ports b0 .. (one per mapped axis, basic_count in [summary]), full_on_mask (ports at duty 1),");
    o.line("#            m_kj = row k column j of M, offset_k: duty of port b_k = m_k0*roll + m_k1*pitch + m_k2*yaw + offset_k;");
    o.line("#            the region holds the command when these duties lie in [0, 1]; search regions in order.");
    for l in axes_words(t) {
        o.line(format!("# {l}"));
    }
    o.line("# [facets]   attainable torque set: normal . tau <= offset_nm; outside, scale tau by min over normal.tau > 0 of offset_nm/(normal.tau).");
    if t.grid.is_some() {
        o.line("# [grid]     point p = (i*g + j)*g + k for roll, pitch, yaw indices i, j, k; command, scale achieved, duty_i of port i.");
    }
    o.line("");
    o.line("[summary]");
    o.line("key,value");
    o.line(format!("layout,{}", csv_field(&t.layout)));
    o.line(format!("flight_state,{}", csv_field(&t.flight_state)));
    o.line(format!("port_count,{n}"));
    o.line(format!("map_axes,{}", t.map_axes.join(" ")));
    o.line(format!("basic_count,{}", t.map_axes.len()));
    o.line(format!("region_slack,{}", num(t.region_slack)));
    o.line(format!("envelope_slack_nm,{}", num(t.envelope.slack_nm)));
    let r = &t.onoff_rule;
    o.line(format!("onoff_fraction,{}", num(r.fraction)));
    o.line(format!("onoff_tolerance,{}", num(r.tolerance)));
    o.line(format!(
        "onoff_comparison_tolerance,{}",
        num(r.comparison_tolerance)
    ));
    o.line(format!("onoff_noise_floor_nm,{}", num(r.noise_floor_nm)));
    for (a, axis) in ["roll", "pitch", "yaw"].iter().enumerate() {
        o.line(format!(
            "onoff_best_positive_{axis}_nm,{}",
            num(r.best_positive_nm[a])
        ));
        o.line(format!(
            "onoff_best_negative_{axis}_nm,{}",
            num(r.best_negative_nm[a])
        ));
    }
    if let Some(g) = &t.grid {
        o.line(format!("grid_points_per_axis,{}", g.points_per_axis));
        for (a, axis) in ["roll", "pitch", "yaw"].iter().enumerate() {
            o.line(format!("grid_low_{axis}_nm,{}", num(g.low_nm[a])));
            o.line(format!("grid_high_{axis}_nm,{}", num(g.high_nm[a])));
        }
    } else {
        o.line("grid_points_per_axis,0");
    }
    o.line("");
    o.line("[ports]");
    o.line("index,name,torque_roll_nm,torque_pitch_nm,torque_yaw_nm,mass_flow_kg_s");
    for (i, p) in t.ports.iter().enumerate() {
        o.line(format!(
            "{i},{},{},{},{},{}",
            csv_field(&p.name),
            num(p.torque_nm[0]),
            num(p.torque_nm[1]),
            num(p.torque_nm[2]),
            num(p.mass_flow_kg_s)
        ));
    }
    o.line("");
    o.line("[onoff]");
    o.line("row,roll,pitch,yaw,mask,torque_roll_nm,torque_pitch_nm,torque_yaw_nm,side_force_y_n,side_force_z_n,gas_rate_kg_s,outcome,shortfall");
    for (r, row) in t.onoff.iter().enumerate() {
        let (word, shortfall) = outcome_word(&row.outcome);
        let [a, b, c] = row.command;
        o.line(format!(
            "{r},{a},{b},{c},{},{},{},{},{},{},{},{word},{}",
            row.mask,
            num(row.torque_nm[0]),
            num(row.torque_nm[1]),
            num(row.torque_nm[2]),
            num(row.side_force_n[0]),
            num(row.side_force_n[1]),
            num(row.gas_rate_kg_s),
            num(shortfall)
        ));
    }
    o.line("");
    o.line("[regions]");
    let r = t.map_axes.len();
    let mut head = vec!["region".to_string()];
    head.extend((0..r).map(|k| format!("b{k}")));
    head.push("full_on_mask".into());
    head.extend((0..r).flat_map(|k| (0..3).map(move |j| format!("m{k}{j}"))));
    head.extend((0..r).map(|k| format!("offset_{k}")));
    o.line(head.join(","));
    for (k, reg) in t.regions.iter().enumerate() {
        let mut fields = vec![k.to_string()];
        fields.extend(reg.basic.iter().map(|b| b.to_string()));
        fields.push(reg.full_on_mask.to_string());
        fields.extend(reg.map.as_flattened().iter().map(|v| num(*v)));
        fields.extend(reg.offset.iter().map(|v| num(*v)));
        o.line(fields.join(","));
    }
    o.line("");
    o.line("[facets]");
    o.line("facet,normal_roll,normal_pitch,normal_yaw,offset_nm");
    for (f, facet) in t.envelope.facets.iter().enumerate() {
        o.line(format!(
            "{f},{},{},{},{}",
            num(facet.normal[0]),
            num(facet.normal[1]),
            num(facet.normal[2]),
            num(facet.offset_nm)
        ));
    }
    if let Some(g) = &t.grid {
        o.line("");
        o.line("[grid]");
        let duty_cols: Vec<String> = (0..n).map(|i| format!("duty_{i}")).collect();
        o.line(format!(
            "point,torque_roll_nm,torque_pitch_nm,torque_yaw_nm,scale,{}",
            duty_cols.join(",")
        ));
        for (p, pt) in g.points.iter().enumerate() {
            let mut fields = vec![p.to_string()];
            fields.extend(pt.torque_nm.iter().map(|v| num(*v)));
            fields.push(num(pt.scale));
            fields.extend(pt.duty.iter().map(|v| num(*v)));
            o.line(fields.join(","));
        }
    }
    o.0
}

#[derive(Serialize)]
struct JsonDocument<'a> {
    format: &'static str,
    format_version: u32,
    frame: &'static str,
    units: &'static str,
    onoff_rows: &'static str,
    onoff_rule_words: &'static str,
    regions_rule: &'static str,
    envelope_rule: &'static str,
    #[serde(skip_serializing_if = "Option::is_none")]
    grid_rule: Option<&'static str>,
    #[serde(flatten)]
    tables: &'a FirmwareTables,
}

/// Renders the tables as pretty-printed JSON. The object holds every field of
/// [`FirmwareTables`] (so it reads back with serde) plus `format`,
/// `format_version`, and the frame, units and indexing rules in words.
pub fn render_json(t: &FirmwareTables) -> Result<String, FirmwareError> {
    t.validate()?;
    let doc = JsonDocument {
        format: "portwright firmware allocation tables",
        format_version: 1,
        frame: FRAME,
        units: UNITS,
        onoff_rows: ROW_RULE,
        onoff_rule_words: ONOFF_RULE,
        regions_rule: "duty of port basic[k] = map[k] . tau + offset[k], one basic port per \
axis of map_axes; ports in full_on_mask at 1, others 0; the region holds tau when the basic \
duties lie in [0, 1]; search regions in order; command components on axes outside map_axes \
are ignored",
        envelope_rule: "inside when normal . tau <= offset_nm + slack_nm for every facet; \
outside, scale tau by min over normal . tau > 0 of offset_nm / (normal . tau)",
        grid_rule: t.grid.as_ref().map(|_| {
            "point (i, j, k) of the roll, pitch and yaw indices is points[(i*g + j)*g + k], \
command low_nm + index*(high_nm - low_nm)/(g - 1)"
        }),
        tables: t,
    };
    let mut text =
        serde_json::to_string_pretty(&doc).map_err(|e| FirmwareError::Json(e.to_string()))?;
    text.push('\n');
    Ok(text)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::allocation::{MinGasAllocator, PortGeometry, SideForceLimit};
    use approx::assert_relative_eq;
    use std::f64::consts::FRAC_PI_2;

    /// Four radial ports 0.45 m aft of the CG and two tangential roll ports at
    /// 0.3 m aft, on a 27 mm radius, 45 s specific impulse.
    fn six_ports() -> Effectiveness {
        let g0 = 9.806_65;
        let r = 0.027;
        let mut ports: Vec<PortGeometry> = (0..4)
            .map(|k| {
                let a = k as f64 * FRAC_PI_2;
                PortGeometry {
                    name: format!("radial-{k}"),
                    position_m: Vector3::new(-0.45, r * a.cos(), r * a.sin()),
                    direction: -Vector3::new(0.0, a.cos(), a.sin()),
                    thrust_n: 1.5,
                    mass_flow_kg_s: 1.5 / (45.0 * g0),
                }
            })
            .collect();
        for (k, s) in [(0, 1.0), (2, -1.0)] {
            let a = k as f64 * FRAC_PI_2 + 0.25 * std::f64::consts::PI;
            ports.push(PortGeometry {
                name: format!("roll-{k}"),
                position_m: Vector3::new(-0.3, r * a.cos(), r * a.sin()),
                direction: Vector3::new(0.0, -a.sin(), a.cos()) * s,
                thrust_n: 1.0,
                mass_flow_kg_s: 1.0 / (45.0 * g0),
            });
        }
        Effectiveness::from_ports(&ports).expect("valid ports")
    }

    fn names() -> TableNames {
        TableNames {
            layout: "test \"six\"".into(),
            flight_state: "coast */ end".into(),
        }
    }

    fn tables(grid: Option<usize>) -> FirmwareTables {
        build_tables(
            &six_ports(),
            &names(),
            &OnOffOptions::default(),
            &|_| 1.0,
            &Tolerances::default(),
            grid,
        )
        .expect("builds")
    }

    #[test]
    fn row_index_round_trips() {
        for r in 0..ONOFF_ROWS {
            assert_eq!(onoff_row(row_command(r)), r);
        }
        assert_eq!(row_command(ALL_OFF_ROW), [0, 0, 0]);
        assert_eq!(onoff_row([1, -1, 0]), 2 * 9 + 1);
        // Components are taken by sign.
        assert_eq!(onoff_row([5, -7, 0]), onoff_row([1, -1, 0]));
    }

    #[test]
    fn onoff_rows_follow_the_plan() {
        let e = six_ports();
        let t = tables(None);
        let plan = OnOffPlan::new(
            &e,
            &OnOffOptions::default(),
            &|_| 1.0,
            &Tolerances::default(),
        )
        .expect("plans");
        assert_eq!(t.onoff[ALL_OFF_ROW].mask, 0);
        for (c, sel) in &plan.entries {
            let row = &t.onoff[onoff_row(*c)];
            assert_eq!(row.command, *c);
            let ports: Vec<usize> = (0..64).filter(|i| row.mask >> i & 1 == 1).collect();
            assert_eq!(ports, sel.set().ports);
            // The row's torque is the sum of its open ports' columns (full supply).
            let mut u = vec![0.0; e.len()];
            for p in ports {
                u[p] = 1.0;
            }
            let tau = e.torque_for(&u);
            for a in 0..3 {
                // Sums of at most six columns: rounding only.
                assert!((row.torque_nm[a] - tau[a]).abs() <= 1e-15);
            }
        }
    }

    #[test]
    fn grid_matches_the_simplex() {
        let e = six_ports();
        let t = tables(Some(4));
        let g = t.grid.as_ref().expect("grid");
        assert_eq!(g.points.len(), 64);
        let mut lp =
            MinGasAllocator::new(&e, SideForceLimit::Free, &Tolerances::default()).expect("setup");
        let mut saturated = 0;
        for p in &g.points {
            let tau = Vector3::from(p.torque_nm);
            let a = lp.allocate(&tau).expect("solves");
            // Two routes to the same LP optimum: gas and scale to 1e-9 relative.
            assert_relative_eq!(p.scale, a.scale, max_relative = 1e-9);
            assert_relative_eq!(
                e.gas_for(&p.duty),
                a.gas_rate_kg_s,
                max_relative = 1e-9,
                epsilon = 1e-15
            );
            let achieved = e.torque_for(&p.duty);
            assert!((achieved - tau * p.scale).norm() <= 1e-9 * t.torque_scale());
            if p.scale < 1.0 {
                saturated += 1;
            }
        }
        // The box corners lie outside the envelope.
        assert!(saturated >= 8);
    }

    #[test]
    fn json_reads_back() {
        let t = tables(Some(2));
        let text = render_json(&t).expect("renders");
        let back: FirmwareTables = serde_json::from_str(&text).expect("parses");
        assert_eq!(back.layout, t.layout);
        assert_eq!(back.onoff.len(), ONOFF_ROWS);
        for (a, b) in back.onoff.iter().zip(&t.onoff) {
            assert_eq!(a.mask, b.mask);
            assert_eq!(a.outcome, b.outcome);
        }
        // JSON numbers are shortest round-trip decimals; the reader may be one ulp off.
        let close = |x: f64, y: f64| (x - y).abs() <= 4.0 * f64::EPSILON * x.abs().max(y.abs());
        for (a, b) in back.regions.iter().zip(&t.regions) {
            assert_eq!(a.basic, b.basic);
            assert_eq!(a.full_on_mask, b.full_on_mask);
            for (x, y) in a.map.as_flattened().iter().zip(b.map.as_flattened()) {
                assert!(close(*x, *y));
            }
        }
        let (ga, gb) = (back.grid.expect("grid"), t.grid.expect("grid"));
        for (a, b) in ga.points.iter().zip(&gb.points) {
            for (x, y) in a.duty.iter().zip(&b.duty) {
                assert!(close(*x, *y));
            }
        }
    }

    #[test]
    fn csv_holds_the_same_numbers() {
        let t = tables(Some(2));
        let text = render_csv(&t);
        let section = |name: &str| -> Vec<Vec<String>> {
            let start = text
                .lines()
                .position(|l| l == format!("[{name}]"))
                .expect("section present");
            text.lines()
                .skip(start + 2)
                .take_while(|l| !l.is_empty())
                .map(|l| l.split(',').map(str::to_string).collect())
                .collect()
        };
        let rows = section("onoff");
        assert_eq!(rows.len(), ONOFF_ROWS);
        for (r, fields) in rows.iter().enumerate() {
            assert_eq!(fields[4].parse::<u64>().expect("mask"), t.onoff[r].mask);
            let gas: f64 = fields[10].parse().expect("gas");
            // Rust reads its own shortest decimals back exactly.
            assert_eq!(gas, t.onoff[r].gas_rate_kg_s);
        }
        let regions = section("regions");
        assert_eq!(regions.len(), t.regions.len());
        for (fields, reg) in regions.iter().zip(&t.regions) {
            let m: Vec<f64> = fields[5..14]
                .iter()
                .map(|s| s.parse().expect("number"))
                .collect();
            assert_eq!(m.as_slice(), reg.map.as_flattened());
        }
        assert_eq!(section("facets").len(), t.envelope.facets.len());
        assert_eq!(section("grid").len(), 8);
        // The layout name holds a quote: the field is quoted and the quote doubled.
        assert!(text.contains("layout,\"test \"\"six\"\"\""));
    }

    #[test]
    fn every_format_states_the_onoff_rule() {
        // The rule (fraction, tolerance, comparison tolerance) travels with the
        // rows in all three formats, with the values the rows were chosen by.
        let tol = Tolerances::default();
        let opts = OnOffOptions {
            fraction: 0.4,
            tolerance: 0.2,
            ..OnOffOptions::default()
        };
        let t = build_tables(&six_ports(), &names(), &opts, &|_| 1.0, &tol, None).expect("builds");
        assert_eq!(t.onoff_rule.fraction, 0.4);
        assert_eq!(t.onoff_rule.tolerance, 0.2);
        assert_eq!(t.onoff_rule.comparison_tolerance, tol.onoff_share);
        let h = render_c_header(&t).expect("renders");
        assert!(h.contains("#define PW_ONOFF_FRACTION PW_R(4e-1)"));
        assert!(h.contains("#define PW_ONOFF_TOLERANCE PW_R(2e-1)"));
        assert!(h.contains("#define PW_ONOFF_COMPARISON_TOLERANCE PW_R(1e-9)"));
        assert!(h.contains("Here: fraction 4e-1, tolerance 2e-1, comparison tolerance 1e-9."));
        let csv = render_csv(&t);
        for line in [
            "onoff_fraction,4e-1",
            "onoff_tolerance,2e-1",
            "onoff_comparison_tolerance,1e-9",
        ] {
            assert!(csv.lines().any(|l| l == line), "{line}");
        }
        assert!(csv.contains("rule (values in [summary] as onoff_*)"));
        let json: serde_json::Value =
            serde_json::from_str(&render_json(&t).expect("renders")).expect("parses");
        assert_eq!(json["onoff_rule"]["fraction"], 0.4);
        assert_eq!(json["onoff_rule"]["comparison_tolerance"], 1e-9);
        assert!(json["onoff_rule_words"]
            .as_str()
            .is_some_and(|w| w.contains("fewer valves")));
    }

    #[test]
    fn header_names_are_escaped() {
        let t = tables(None);
        let h = render_c_header(&t).expect("renders");
        // The flight state holds a comment end; it must not close the comment block.
        assert!(h.contains("Flight state: coast * / end"));
        assert_eq!(h.matches("*/").count(), h.matches("/*").count());
        assert_eq!(c_string("a\"b\\c?\n"), "\"a\\\"b\\\\c\\?\\012\"");
    }

    #[test]
    fn bad_tables_are_refused() {
        let good = tables(Some(2));
        let mut t = good.clone();
        t.onoff.pop();
        assert!(matches!(
            render_c_header(&t),
            Err(FirmwareError::Inconsistent(_))
        ));
        let mut t = good.clone();
        t.regions[0].map[1][2] = f64::NAN;
        assert_eq!(
            render_json(&t),
            Err(FirmwareError::NotFinite("regions[0].map".into()))
        );
        let mut t = good.clone();
        t.onoff[0].mask = 1 << 6;
        assert!(matches!(t.validate(), Err(FirmwareError::Inconsistent(_))));
        let mut t = good.clone();
        t.regions[0].basic = vec![0, 0, 1];
        assert!(matches!(t.validate(), Err(FirmwareError::Inconsistent(_))));
        let mut t = good;
        t.grid.as_mut().expect("grid").points[3].duty.pop();
        assert!(matches!(t.validate(), Err(FirmwareError::Inconsistent(_))));
    }

    #[test]
    fn port_and_grid_limits() {
        let e = six_ports();
        let tol = Tolerances::default();
        let opts = OnOffOptions::default();
        for g in [0, 1, MAX_GRID_POINTS + 1] {
            assert_eq!(
                build_tables(&e, &names(), &opts, &|_| 1.0, &tol, Some(g)).err(),
                Some(FirmwareError::BadGrid(g))
            );
        }
        // 65 ports: one more than a mask holds. Refused before any search runs.
        let ports: Vec<PortGeometry> = (0..65)
            .map(|k| {
                let a = k as f64 * 0.19;
                PortGeometry {
                    name: format!("p{k}"),
                    position_m: Vector3::new(-0.4, 0.027 * a.cos(), 0.027 * a.sin()),
                    direction: Vector3::new(0.0, -a.sin(), a.cos()),
                    thrust_n: 1.0,
                    mass_flow_kg_s: 1e-3,
                }
            })
            .collect();
        let big = Effectiveness::from_ports(&ports).expect("valid");
        assert_eq!(
            build_tables(&big, &names(), &opts, &|_| 1.0, &tol, None).err(),
            Some(FirmwareError::TooManyPorts(65))
        );
        let mut t = tables(None);
        t.ports.clear();
        assert_eq!(t.validate(), Err(FirmwareError::NoPorts));
    }
}
