//! portwright command line: reads files, calls the library, writes files, sets exit codes.

mod cli;

use anyhow::{Context, Result};
use clap::Parser;
use cli::{output::write_atomic, Cli, Command};
use portwright::layout::{self, LayoutError};
use std::process::ExitCode;

fn main() -> ExitCode {
    let cli = Cli::parse();
    match run(cli) {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            if let Some(le) = e.downcast_ref::<LayoutError>() {
                eprintln!("error: the layout cannot be used:\n{le}");
            } else {
                eprintln!("error: {e:#}");
            }
            ExitCode::from(1)
        }
    }
}

fn run(cli: Cli) -> Result<()> {
    match cli.command {
        Command::Allocate {
            layout,
            torque,
            state,
            side_force,
            json,
        } => {
            let design = layout::load(&layout)?;
            let analysis = portwright::analysis::analyze(&design).with_context(|| format!("{}: analysis failed", layout.display()))?;
            print!("{}", cli::allocate::run(&design, &analysis, &torque, state.as_deref(), side_force.as_deref(), json)?);
            Ok(())
        }
        Command::Analyze { layout, json, out } => {
            let design = layout::load(&layout)?;
            let analysis = portwright::analysis::analyze(&design).with_context(|| format!("{}: analysis failed", layout.display()))?;
            let text = if json {
                serde_json::to_string_pretty(&analysis)? + "\n"
            } else {
                portwright::report::render_text(&analysis)
            };
            print!("{text}");
            if let Some(out) = out {
                write_atomic(&out, text.as_bytes(), &[&layout], false)?;
            }
            Ok(())
        }
    }
}
