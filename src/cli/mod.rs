//! Command-line definitions and the glue from arguments to library calls.

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
}
