//! The layout file as written: a serde mirror of the TOML with every quantity
//! still a string with its unit and its place in the file.
//!
//! Nothing here is checked beyond TOML syntax and field names
//! (`deny_unknown_fields` catches typos); `convert` turns it into the model.

use serde::Deserialize;
use toml::Spanned;

/// A quantity as written, with its span in the file.
pub type Q = Spanned<String>;

/// The whole file.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct LayoutFile {
    /// Name of the design.
    pub name: Spanned<String>,
    /// Airframe section.
    pub airframe: Spanned<AirframeFile>,
    /// Mass components.
    #[serde(default)]
    pub mass: Vec<Spanned<MassFile>>,
    /// Motor section.
    pub motor: Spanned<MotorFile>,
    /// Feed section.
    pub feed: Spanned<FeedFile>,
    /// Ports.
    #[serde(default)]
    pub port: Vec<Spanned<PortFile>>,
    /// Requirements section.
    pub requirements: Spanned<RequirementsFile>,
    /// Flight states.
    #[serde(default)]
    pub state: Vec<Spanned<StateFile>>,
    /// Manoeuvres for the gas budget.
    #[serde(default)]
    pub manoeuvre: Vec<Spanned<ManoeuvreFile>>,
    /// What the optimiser may move.
    #[serde(default)]
    pub freedom: Vec<Spanned<FreedomFile>>,
    /// The optimiser's rules.
    pub limits: Option<Spanned<LimitsFile>>,
    /// How the optimiser searches.
    pub optimize: Option<Spanned<SearchFile>>,
    /// Build tolerances: read by `layout::asbuilt`, kept raw here.
    #[serde(default)]
    pub tolerances: Option<toml::Value>,
    /// Measured ports: read by `layout::asbuilt`, kept raw here.
    #[serde(default)]
    pub measured: Option<toml::Value>,
    /// The trade study's parts file and part stations: read by `layout::parts`, kept raw here.
    #[serde(default)]
    pub parts: Option<toml::Value>,
    /// Simulation cases: read by `layout::cases`, kept raw here.
    #[serde(default)]
    pub case: Option<toml::Value>,
    /// Ground work (filling, pad hold, pad temperatures): read by `layout::ground`, kept raw here.
    #[serde(default)]
    pub ground: Option<toml::Value>,
}

/// `[airframe]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct AirframeFile {
    /// Body tube outer diameter.
    pub outer_diameter: Q,
    /// Body tube inner diameter.
    pub inner_diameter: Q,
    /// Body tube length (from the nose shoulder aft).
    pub length: Q,
    /// Body tube mass.
    pub mass: Option<Q>,
    /// `[airframe.nose]`.
    pub nose: Spanned<NoseFile>,
    /// `[airframe.fins]`.
    pub fins: Option<Spanned<FinsFile>>,
    /// `[[airframe.keep_out]]`.
    #[serde(default)]
    pub keep_out: Vec<Spanned<KeepOutFile>>,
}

/// `[airframe.nose]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct NoseFile {
    /// Length tip to shoulder.
    pub length: Q,
    /// conical, ogive, elliptical, parabolic.
    pub shape: Option<Spanned<String>>,
    /// Mass.
    pub mass: Option<Q>,
}

/// `[airframe.fins]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FinsFile {
    /// Number of fins.
    pub count: Spanned<i64>,
    /// Root chord.
    pub root_chord: Q,
    /// Tip chord.
    pub tip_chord: Q,
    /// Span.
    pub span: Q,
    /// Leading-edge sweep distance.
    pub sweep: Option<Q>,
    /// Station of the root leading edge.
    pub station: Q,
    /// Clock of the first fin.
    pub first_clock: Option<Q>,
    /// Thickness.
    pub thickness: Q,
    /// Mass of the whole set.
    pub mass: Option<Q>,
}

/// `[[airframe.keep_out]]`: a band (`from`, `to`) or a patch (`station`, `clock`, `length`, `width`).
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct KeepOutFile {
    /// Label.
    pub name: Spanned<String>,
    /// Band: fore station.
    pub from: Option<Q>,
    /// Band: aft station.
    pub to: Option<Q>,
    /// Patch: centre station.
    pub station: Option<Q>,
    /// Patch: centre clock.
    pub clock: Option<Q>,
    /// Patch: axial length.
    pub length: Option<Q>,
    /// Patch: width around the tube.
    pub width: Option<Q>,
}

/// `[[mass]]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MassFile {
    /// Label.
    pub name: Spanned<String>,
    /// Mass.
    pub mass: Q,
    /// point, tube, cylinder, cone.
    pub shape: Option<Spanned<String>>,
    /// Fore station (point: its station).
    pub station: Q,
    /// Length.
    pub length: Option<Q>,
    /// Diameter (cylinder, cone).
    pub diameter: Option<Q>,
    /// Outer diameter (tube).
    pub outer_diameter: Option<Q>,
    /// Inner diameter (tube).
    pub inner_diameter: Option<Q>,
    /// Point: distance off the axis.
    pub offset: Option<Q>,
    /// Point: clock of the offset.
    pub clock: Option<Q>,
}

/// `[motor]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MotorFile {
    /// Loaded mass.
    pub loaded_mass: Q,
    /// Burnout mass.
    pub burnout_mass: Q,
    /// Fore-end station.
    pub station: Q,
    /// Length.
    pub length: Q,
    /// Diameter.
    pub diameter: Q,
}

/// `[feed]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FeedFile {
    /// Gas name.
    pub gas: Spanned<String>,
    /// `[feed.tank]`.
    pub tank: Spanned<TankFile>,
    /// `[feed.regulator]`.
    pub regulator: Spanned<RegulatorFile>,
    /// `[feed.first_stage]`: optional high-pressure stage ahead of the regulator.
    #[serde(default)]
    pub first_stage: Option<Spanned<RegulatorFile>>,
    /// `[feed.valve]`.
    pub valve: Spanned<ValveFile>,
}

/// `[feed.tank]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct TankFile {
    /// Internal volume.
    pub volume: Q,
    /// Fill pressure (or give `fill_mass`).
    pub fill_pressure: Option<Q>,
    /// Fill mass (usual for CO2).
    pub fill_mass: Option<Q>,
    /// Gas temperature at fill and launch.
    pub temperature: Q,
    /// Empty tank mass.
    pub empty_mass: Q,
    /// Fore-end station.
    pub station: Q,
    /// Length.
    pub length: Q,
    /// Outer diameter.
    pub diameter: Q,
    /// fore or aft.
    pub outlet: Option<Spanned<String>>,
}

/// `[feed.regulator]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RegulatorFile {
    /// Set pressure.
    pub set_pressure: Q,
    /// Dropout margin.
    pub dropout_margin: Option<Q>,
    /// Cv of regulator and line.
    pub supply_cv: Option<Spanned<f64>>,
    /// xT of regulator and line.
    pub supply_xt: Option<Spanned<f64>>,
    /// Linear droop: pressure drop...
    pub droop: Option<Q>,
    /// ...at this total flow.
    pub droop_at: Option<Q>,
}

/// `[feed.valve]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ValveFile {
    /// Flow coefficient.
    pub cv: Option<Spanned<f64>>,
    /// Pressure differential ratio factor.
    pub xt: Option<Spanned<f64>>,
    /// Orifice diameter (instead of cv).
    pub orifice: Option<Q>,
    /// Discharge coefficient of the orifice.
    pub discharge_coefficient: Option<Spanned<f64>>,
    /// Opening delay.
    pub opening_delay: Q,
    /// Closing delay.
    pub closing_delay: Q,
    /// Coil current.
    pub coil_current: Q,
}

/// `[[port]]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PortFile {
    /// Name.
    pub name: Spanned<String>,
    /// Station.
    pub station: Q,
    /// Clock angle.
    pub clock: Q,
    /// Tangential cant.
    pub tangential_cant: Option<Q>,
    /// Axial cant.
    pub axial_cant: Option<Q>,
    /// Plain hole diameter.
    pub hole: Option<Q>,
    /// Converging–diverging throat diameter.
    pub throat: Option<Q>,
    /// Converging–diverging exit diameter.
    pub exit: Option<Q>,
    /// Discharge coefficient.
    pub discharge_coefficient: Option<Spanned<f64>>,
}

/// `[requirements]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RequirementsFile {
    /// Roll angular acceleration wanted.
    pub roll_accel: Q,
    /// Pitch angular acceleration wanted.
    pub pitch_accel: Q,
    /// Yaw angular acceleration wanted (default: pitch).
    pub yaw_accel: Option<Q>,
    /// Motor thrust.
    pub motor_thrust: Option<Q>,
    /// Thrust misalignment angle.
    pub thrust_misalignment: Option<Q>,
    /// Roll disturbance torque.
    pub roll_disturbance: Option<Q>,
    /// Hold time.
    pub hold_time: Option<Q>,
    /// Fraction of usable gas kept in reserve.
    pub gas_reserve: Option<Spanned<f64>>,
}

/// `[[manoeuvre]]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ManoeuvreFile {
    /// Label.
    pub name: Spanned<String>,
    /// spin, despin, hold or turn.
    pub kind: Spanned<String>,
    /// Flight state to use.
    pub state: Option<Spanned<String>>,
    /// Roll rate (spin, despin) or peak rate (turn).
    pub rate: Option<Q>,
    /// Time a spin rate is held.
    pub hold: Option<Q>,
    /// roll, pitch or yaw (hold, turn).
    pub axis: Option<Spanned<String>>,
    /// Disturbance torque (hold).
    pub torque: Option<Q>,
    /// Duration (hold).
    pub time: Option<Q>,
    /// Turn angle.
    pub angle: Option<Q>,
    /// Number of turns.
    pub count: Option<Spanned<i64>>,
}

/// `[[state]]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct StateFile {
    /// Name.
    pub name: Spanned<String>,
    /// Altitude above sea level.
    pub altitude: Option<Q>,
    /// burning or burnout.
    pub motor: Spanned<String>,
    /// Fraction of usable gas remaining.
    pub gas_remaining: Option<Spanned<f64>>,
    /// Measured mass.
    pub mass: Option<Q>,
    /// Measured CG station.
    pub cg: Option<Q>,
    /// Measured roll inertia.
    pub ixx: Option<Q>,
    /// Measured transverse inertia.
    pub iyy: Option<Q>,
}

/// `[[freedom]]`: ports the optimiser may move, and how far.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FreedomFile {
    /// Port names.
    pub ports: Spanned<Vec<Spanned<String>>>,
    /// each, mirror or ring.
    pub together: Option<Spanned<String>>,
    /// Station range: from, to.
    pub station: Option<Spanned<Vec<Q>>>,
    /// Clock range.
    pub clock: Option<Spanned<Vec<Q>>>,
    /// Tangential cant range.
    pub tangential_cant: Option<Spanned<Vec<Q>>>,
    /// Axial cant range.
    pub axial_cant: Option<Spanned<Vec<Q>>>,
    /// A drill series name or a list of sizes (read by `convert`, which says
    /// which of the two shapes was expected).
    pub drills: Option<Spanned<toml::Value>>,
    /// Keep only drills inside this range.
    pub hole_range: Option<Spanned<Vec<Q>>>,
}

/// `[limits]`: the optimiser's geometric rules.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct LimitsFile {
    /// Clearance to fin roots and keep-outs.
    pub margin: Option<Q>,
    /// Least hole spacing, in hole diameters.
    pub spacing: Option<Spanned<f64>>,
    /// Least edge distance, in hole diameters.
    pub edge_distance: Option<Spanned<f64>>,
    /// Largest total cant.
    pub max_cant: Option<Q>,
    /// Exhaust cone half-angle.
    pub plume_half_angle: Option<Q>,
    /// Side-force limit for the allocations behind the objective.
    pub side_force: Option<Q>,
}

/// `[optimize]`: how the optimiser searches.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SearchFile {
    /// What to maximise.
    pub objective: Option<Spanned<String>>,
    /// For `A then B`: the fraction of A's best B may give up.
    pub then_within: Option<Spanned<f64>>,
    /// Random seed.
    pub seed: Option<Spanned<i64>>,
    /// Largest number of layout evaluations.
    pub max_evals: Option<Spanned<i64>>,
    /// Wall-clock limit.
    pub time_limit: Option<Q>,
}
