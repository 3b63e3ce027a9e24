//! Command-line definitions and the glue from arguments to library calls.

pub mod allocate;
pub mod output;

use clap::{Parser, Subcommand};
use std::path::PathBuf;

/// Design and check cold-gas reaction-control port layouts.
#[derive(Debug, Parser)]
#[command(name = "portwright", version, about)]
pub struct Cli {
    /// What to do.
    #[command(subcommand)]
    pub command: Command,
}

/// The commands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Mass properties, gas budget, per-port thrust, torques, authority and findings.
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
    Allocate {
        /// Layout file (TOML).
        layout: PathBuf,
        /// Torque about roll, pitch and yaw, each with a unit, e.g. "20 mN m,0,-5 mN m".
        #[arg(long, allow_hyphen_values = true)]
        torque: String,
        /// Flight state (default: the first in the file).
        #[arg(long)]
        state: Option<String>,
        /// Largest side force allowed, e.g. "0.2 N"; "0 N" asks for pure couples.
        #[arg(long)]
        side_force: Option<String>,
        /// Print JSON instead of a table.
        #[arg(long)]
        json: bool,
    },
}
