//! portwright command line: reads files, calls the library, writes files, sets exit codes.

mod cli;

use anyhow::{Context, Result};
use clap::Parser;
use cli::{output::write_atomic, Cli, Command};
use portwright::layout::{self, LayoutError};
use std::process::ExitCode;
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;

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
            let analysis = portwright::analysis::analyze(&design)
                .with_context(|| format!("{}: analysis failed", layout.display()))?;
            print!(
                "{}",
                cli::allocate::run(
                    &design,
                    &analysis,
                    &torque,
                    state.as_deref(),
                    side_force.as_deref(),
                    json
                )?
            );
            Ok(())
        }
        Command::Table {
            layout,
            format,
            out,
            state,
            grid,
            fraction,
            tolerance,
        } => {
            let design = layout::load(&layout)?;
            let analysis = portwright::analysis::analyze(&design)
                .with_context(|| format!("{}: analysis failed", layout.display()))?;
            let text = cli::table::render(
                &design,
                &analysis,
                state.as_deref(),
                format,
                grid,
                fraction,
                tolerance,
            )?;
            write_atomic(&out, text.as_bytes(), &[&layout], false)?;
            eprintln!("wrote {}", out.display());
            Ok(())
        }
        Command::Optimize {
            layout,
            out,
            in_place,
            seed,
            max_evals,
            time_limit,
            objective,
            then_within,
            side_force,
            plot,
            json,
        } => {
            let text = std::fs::read_to_string(&layout)
                .with_context(|| format!("{}: cannot read the layout", layout.display()))?;
            let stop = Arc::new(AtomicBool::new(false));
            let flag = stop.clone();
            // Ctrl-C asks the search to stop; the best layout so far is still written.
            let _ = ctrlc::set_handler(move || flag.store(true, Ordering::SeqCst));
            let options = cli::optimize::Options {
                seed,
                max_evals,
                time_limit,
                objective,
                then_within,
                side_force,
                json,
            };
            let result = cli::optimize::run(&text, &layout.display().to_string(), &options, &stop)?;
            let target = if in_place {
                layout.clone()
            } else {
                out.clone().context("--out is required")?
            };
            write_atomic(&target, result.layout_text.as_bytes(), &[&layout], in_place)?;
            if let (Some(p), Some(svg)) = (plot, result.plot_svg) {
                write_atomic(&p, svg.as_bytes(), &[&layout], false)?;
            }
            print!("{}", result.report);
            eprintln!("wrote {}", target.display());
            Ok(())
        }
        Command::Run {
            layout,
            out,
            template,
        } => {
            eprintln!("reading {}", layout.display());
            let design = layout::load(&layout)?;
            eprintln!("analysing: mass properties, gas, port flows, envelopes");
            let analysis = portwright::analysis::analyze(&design)
                .with_context(|| format!("{}: analysis failed", layout.display()))?;
            let spread = cli::tolerance::for_run(&layout)?;
            let (sections, extra) = match &spread {
                Some(o) => {
                    eprintln!(
                        "sampled {} as-built vehicles from [tolerances]",
                        o.report.samples
                    );
                    (
                        portwright::asbuilt::plots::html_sections(&o.report, &o.run),
                        portwright::asbuilt::plots::files(&o.design, &o.report, &o.run)
                            .map_err(|e| anyhow::anyhow!("{}: {e}", layout.display()))?,
                    )
                }
                None => (Vec::new(), Vec::new()),
            };
            eprintln!("building tables, meshes, template, plots and the report");
            let files = portwright::export::bundle::bundle_with(
                &design,
                &analysis,
                &template.settings(),
                &sections,
                extra,
            )
            .map_err(|e| anyhow::anyhow!("{}: {e}", layout.display()))?;
            print!("{}", portwright::report::render_text(&analysis));
            if let Some(o) = &spread {
                println!();
                print!("{}", portwright::asbuilt::report::render_summary(&o.report));
            }
            println!();
            for f in &files {
                let path = out.join(&f.name);
                write_atomic(&path, &f.bytes, &[&layout], false)?;
                println!("wrote {} ({} bytes)", path.display(), f.bytes.len());
            }
            Ok(())
        }
        Command::Tolerance {
            layout,
            samples,
            seed,
            json,
            out,
        } => {
            let outcome = cli::tolerance::run(&layout, samples as usize, seed)?;
            print!("{}", cli::tolerance::render(&outcome, json)?);
            if let Some(dir) = out {
                let files = portwright::asbuilt::plots::files(
                    &outcome.design,
                    &outcome.report,
                    &outcome.run,
                )
                .map_err(|e| anyhow::anyhow!("{}: {e}", layout.display()))?;
                for f in &files {
                    let path = dir.join(&f.name);
                    write_atomic(&path, &f.bytes, &[&layout], false)?;
                    eprintln!("wrote {}", path.display());
                }
            }
            Ok(())
        }
        Command::Template {
            layout,
            out,
            template,
        } => {
            let design = layout::load(&layout)?;
            for (name, bytes) in cli::template::files(&design, &template)
                .map_err(|e| anyhow::anyhow!("{}: {e}", layout.display()))?
            {
                let path = out.join(&name);
                write_atomic(&path, &bytes, &[&layout], false)?;
                println!("wrote {} ({} bytes)", path.display(), bytes.len());
            }
            Ok(())
        }
        Command::Analyze { layout, json, out } => {
            let design = layout::load(&layout)?;
            let analysis = portwright::analysis::analyze(&design)
                .with_context(|| format!("{}: analysis failed", layout.display()))?;
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
