//! Command-line definitions and the glue from arguments to library calls.

pub mod allocate;
pub mod optimize;
pub mod output;
pub mod simulate;
pub mod table;
pub mod template;
pub mod tolerance;
pub mod trade;
pub mod values;

use clap::{Parser, Subcommand};
use nalgebra::Vector3;
use portwright::allocation::SideForceLimit;
use portwright::analysis::score::Objective;
use std::path::PathBuf;

/// Shown after every command's help: what the exit codes mean and what is refused.
const AFTER_HELP: &str = "\
Exit codes:
  0  success
  1  a problem in the layout (the message names file, line, column and field),
     or a file that cannot be read or written
  2  bad command-line use: an unknown option, or an option value that is wrong
     (such as --torque \"7,0,0\", --state with no such flight state, --grid 66)

Limits: a layout file holds at most 16 MiB of UTF-8 text; text values (names,
labels) at most 200 characters; a quantity at most 64 characters, within a
physical range per kind (lengths within 100 m, times within a day, ...; the
README lists them); --time-limit and [optimize] time_limit at most 24 h.";

/// Design and check cold-gas reaction-control port layouts.
#[derive(Debug, Parser)]
#[command(name = "portwright", version, about, after_help = AFTER_HELP)]
pub struct Cli {
    /// What to do.
    #[command(subcommand)]
    pub command: Command,
}

/// The commands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// The whole job: analysis, firmware tables, STL, drilling template, plots and an HTML report.
    #[command(after_help = AFTER_HELP)]
    Run {
        /// Layout file (TOML).
        layout: PathBuf,
        /// Folder to write into.
        #[arg(long)]
        out: PathBuf,
        /// How the drilling template is printed.
        #[command(flatten)]
        template: template::TemplateArgs,
    },
    /// The 1:1 drilling template alone, as SVG pages and one PDF.
    #[command(after_help = AFTER_HELP)]
    Template {
        /// Layout file (TOML).
        layout: PathBuf,
        /// Folder to write into.
        #[arg(long)]
        out: PathBuf,
        /// How the drilling template is printed.
        #[command(flatten)]
        template: template::TemplateArgs,
    },
    /// Mass properties, gas budget, per-port thrust, torques, authority and findings.
    #[command(after_help = AFTER_HELP)]
    Analyze {
        /// Layout file (TOML).
        layout: PathBuf,
        /// Print JSON instead of tables.
        #[arg(long)]
        json: bool,
        /// Also write the report to this file.
        #[arg(long)]
        out: Option<PathBuf>,
    },
    /// Least-gas duty cycles for a commanded torque.
    #[command(after_help = AFTER_HELP)]
    Allocate {
        /// Layout file (TOML).
        layout: PathBuf,
        /// Torque about roll, pitch and yaw, each with a unit, e.g. "20 mN m,0,-5 mN m".
        #[arg(long, allow_hyphen_values = true, value_parser = values::torque)]
        torque: Vector3<f64>,
        /// Flight state (default: the first in the file).
        #[arg(long)]
        state: Option<String>,
        /// Largest side force allowed, e.g. "0.2 N"; "0 N" asks for pure couples.
        #[arg(long, allow_hyphen_values = true, value_parser = values::side_force)]
        side_force: Option<SideForceLimit>,
        /// Print JSON instead of a table.
        #[arg(long)]
        json: bool,
    },
    /// Firmware allocation tables: on/off valve sets, the exact duty-cycle map, optional grid.
    #[command(after_help = AFTER_HELP)]
    Table {
        /// Layout file (TOML).
        layout: PathBuf,
        /// Output format.
        #[arg(long, value_enum, ignore_case = true, default_value = "c")]
        format: TableFormat,
        /// Output file.
        #[arg(long)]
        out: PathBuf,
        /// Flight state (default: the first in the file).
        #[arg(long)]
        state: Option<String>,
        /// Also tabulate a regular grid with this many points per axis (2–65).
        #[arg(long, value_parser = values::grid)]
        grid: Option<usize>,
        /// On/off sets must reach this fraction (0 to 1) of the best on/off torque on
        /// each commanded axis and sense.
        #[arg(long, default_value = "0.5", allow_hyphen_values = true, value_parser = values::fraction)]
        fraction: f64,
        /// Torque allowed on uncommanded axes, as a fraction (0 or more) of that
        /// axis's best on/off torque.
        #[arg(long, default_value = "0.1", allow_hyphen_values = true, value_parser = values::tolerance)]
        tolerance: f64,
    },
    /// Search port stations, clocks, cants and hole sizes for the best worst-case margin.
    #[command(after_help = AFTER_HELP)]
    Optimize {
        /// Layout file (TOML) with [[freedom]] sections saying what may move.
        layout: PathBuf,
        /// Where to write the improved layout.
        #[arg(long, required_unless_present = "in_place")]
        out: Option<PathBuf>,
        /// Overwrite the input layout instead (atomically).
        #[arg(long)]
        in_place: bool,
        /// Random seed: the same seed gives the same layout [default: the layout's
        /// [optimize] seed, else 1].
        #[arg(long)]
        seed: Option<u64>,
        /// Largest number of layout evaluations, at least one more than the
        /// search's population (30 to 200, ten per free coordinate) for each stage
        /// of the objective [default: the layout's [optimize] max_evals, else 20000].
        #[arg(long, allow_hyphen_values = true, value_parser = values::max_evals)]
        max_evals: Option<usize>,
        /// Stop after this long and keep the best so far: a time with a unit such
        /// as "30 s" or "2 min", at most 24 h [default: the layout's [optimize]
        /// time_limit, else none].
        #[arg(long, allow_hyphen_values = true, value_parser = values::time_limit)]
        time_limit: Option<f64>,
        /// What to maximise: margin, ratio:R, gas, side-force, a weighted mix such as
        /// "margin=1,ratio:4=0.2", or an order such as "margin then gas" (formulas in
        /// the README) [default: the layout's [optimize] objective, else margin].
        #[arg(long, value_parser = values::objective)]
        objective: Option<Objective>,
        /// With "A then B": the fraction of A's best that B may give up, from 0 up
        /// to, not including, 1 [default: the layout's [optimize] then_within, else 0.01].
        #[arg(long, allow_hyphen_values = true, value_parser = values::then_within)]
        then_within: Option<f64>,
        /// Side-force limit on the allocations behind the objective, e.g. "0.5 N";
        /// "0 N" allows pure couples only [default: the layout's [limits] side_force,
        /// else none].
        #[arg(long, allow_hyphen_values = true, value_parser = values::side_force)]
        side_force: Option<SideForceLimit>,
        /// Write the convergence plot (SVG) here.
        #[arg(long)]
        plot: Option<PathBuf>,
        /// Print the before/after report as JSON.
        #[arg(long)]
        json: bool,
    },
    /// Sample as-built vehicles from the layout's [tolerances]: spreads of authority
    /// and margin, cross-coupling, on/off rows that stop working, which tolerance matters.
    Tolerance {
        /// Layout file (TOML) with a [tolerances] section.
        layout: PathBuf,
        /// Number of as-built vehicles to sample (2 to 10 000 000).
        #[arg(long, default_value_t = 2000, value_parser = clap::value_parser!(u64).range(2..=10_000_000))]
        samples: u64,
        /// Random seed: the same seed gives the same numbers on any number of threads.
        #[arg(long, default_value_t = 1)]
        seed: u64,
        /// Print JSON instead of text.
        #[arg(long)]
        json: bool,
        /// Also write the report (text and JSON) and its plots into this folder.
        #[arg(long)]
        out: Option<PathBuf>,
    },
    /// Trade study over candidate parts: which valve, regulator, tank and hole sizes
    /// meet the requirements best (Pareto set, lightest), and what one part would need to be.
    #[command(after_help = AFTER_HELP)]
    Trade {
        /// Layout file (TOML) with a [parts] section.
        layout: PathBuf,
        /// Parts file (TOML); default: the file named in the layout's [parts] section.
        #[arg(long)]
        parts: Option<PathBuf>,
        /// Seed of the search used when the catalogue is too large to try every combination.
        #[arg(long, default_value_t = 1)]
        seed: u64,
        /// Rank by hold time too: fly this [[case]] of the layout with every combination that
        /// breaks no rule (one nominal simulation each).
        #[arg(long, value_name = "CASE")]
        hold_case: Option<String>,
        /// Print JSON instead of text.
        #[arg(long)]
        json: bool,
        /// Also write the report (text and JSON) and its plots into this folder.
        #[arg(long)]
        out: Option<PathBuf>,
    },
    /// Fly the layout's [[case]] sections in closed loop: rigid body, valves, tank in time and the firmware's tables.
    #[command(after_help = AFTER_HELP)]
    Simulate {
        /// Layout file (TOML) with [[case]] sections.
        layout: PathBuf,
        /// Only this case (by name).
        #[arg(long)]
        case: Option<String>,
        /// Write the time series (CSV), summary (JSON), report (text) and plots (SVG) into this folder.
        #[arg(long)]
        out: Option<PathBuf>,
        /// Print JSON instead of text.
        #[arg(long)]
        json: bool,
        /// Monte Carlo runs over the case's [case.spread] (0: the nominal run only; at most 1 000 000).
        #[arg(long, default_value_t = 0, value_parser = clap::value_parser!(u64).range(0..=1_000_000))]
        runs: u64,
        /// Random seed of the Monte Carlo runs: the same seed gives the same numbers on any number of threads.
        #[arg(long, default_value_t = 1)]
        seed: u64,
    },
}

/// Formats of the firmware tables.
#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub enum TableFormat {
    /// C99 header.
    C,
    /// Comma-separated values.
    Csv,
    /// JSON.
    Json,
}
