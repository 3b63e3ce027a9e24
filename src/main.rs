//! portwright command line: reads files, calls the library, writes files, sets exit codes.

mod cli;

use anyhow::{Context, Result};
use clap::Parser;
use cli::output::{check_distinct, write_atomic, Written};
use cli::values::UsageError;
use cli::{Cli, Command};
use portwright::layout::{self, LayoutError};
use std::process::ExitCode;
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;

fn main() -> ExitCode {
    let cli = Cli::parse();
    match run(cli) {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            if let Some(u) = e.downcast_ref::<UsageError>() {
                // Bad command-line use, like clap's own errors.
                eprintln!("error: {u}\n\nFor more information, try '--help'.");
                return ExitCode::from(2);
            }
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
            let (design, analysis) = load_and_analyze(&layout)?;
            print!(
                "{}",
                cli::allocate::run(
                    &design,
                    &analysis,
                    torque,
                    state.as_deref(),
                    side_force,
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
            check_distinct(&[("--out", &out)], &[&layout])?;
            let (design, analysis) = load_and_analyze(&layout)?;
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
            let target = if in_place {
                layout.clone()
            } else {
                out.clone().context("--out is required")?
            };
            // Refused before the search runs, so nothing is written.
            let mut outputs: Vec<(&str, &std::path::Path)> = Vec::new();
            if !in_place {
                outputs.push(("--out", &target));
            }
            if let Some(p) = &plot {
                outputs.push(("--plot", p));
            }
            check_distinct(&outputs, &[&layout])?;
            let text = layout::read_text(&layout)?;
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
            if out.is_file() {
                return Err(anyhow::Error::new(UsageError(format!(
                    "--out {}: is a file; run writes a folder of files",
                    out.display()
                ))));
            }
            eprintln!("reading {}", layout.display());
            let (design, analysis) = load_and_analyze(&layout)?;
            // The as-built sampling is one output among others: when it cannot be made (a
            // layout beyond the on/off tables' port limit, say), everything else is still written.
            let (spread, spread_missing) = match cli::tolerance::for_run(&layout) {
                Ok(s) => (s, None),
                Err(e) => (
                    None,
                    Some(portwright::export::bundle::NotWritten {
                        files: "tolerance.txt, tolerance.json and the as-built plots".to_string(),
                        reason: format!("{e:#}"),
                    }),
                ),
            };
            let mut trade_missing = None;
            // The simulation of each [[case]] is one output among others too.
            let (sim_sections, sim_files, sim_missing) = match cli::simulate::for_run(&layout) {
                Ok((files, sections)) => (sections, files, None),
                Err(e) => (
                    Vec::new(),
                    Vec::new(),
                    Some(portwright::export::bundle::NotWritten {
                        files: "the simulation files (sim-*)".to_string(),
                        reason: format!("{e:#}"),
                    }),
                ),
            };
            let (mut sections, mut extra) = match &spread {
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
            if let Some(n) = &spread_missing {
                sections.push(portwright::export::html::Section {
                    heading: "As built: tolerances".to_string(),
                    blocks: vec![portwright::export::html::Block::Paragraph(n.line())],
                });
            }
            // The trade study, when the layout names a parts file: one output among others.
            match cli::trade::for_run(&layout) {
                Ok(Some(t)) => {
                    eprintln!("trade study over {}", t.parts_path.display());
                    sections.extend(t.sections());
                    extra.extend(t.files()?);
                }
                Ok(None) => {}
                Err(e) => {
                    let n = portwright::export::bundle::NotWritten {
                        files: "trade.txt, trade.json and the trade plots".to_string(),
                        reason: format!("{e:#}"),
                    };
                    sections.push(portwright::export::html::Section {
                        heading: "Parts: trade study".to_string(),
                        blocks: vec![portwright::export::html::Block::Paragraph(n.line())],
                    });
                    trade_missing = Some(n);
                }
            }
            sections.extend(sim_sections);
            extra.extend(sim_files);
            if let Some(n) = &sim_missing {
                sections.push(portwright::export::html::Section {
                    heading: "Simulation".to_string(),
                    blocks: vec![portwright::export::html::Block::Paragraph(n.line())],
                });
            }
            eprintln!("building tables, meshes, template, plots and the report");
            let mut bundle = portwright::export::bundle::bundle_with(
                &design,
                &analysis,
                &template.settings(),
                &sections,
                extra,
            );
            print!("{}", portwright::report::render_text(&analysis));
            if let Some(o) = &spread {
                println!();
                print!("{}", portwright::asbuilt::report::render_summary(&o.report));
            }
            println!();
            // Only the files of the bundle are written; nothing else in the
            // folder is touched.
            let paths: Vec<_> = bundle.files.iter().map(|f| out.join(&f.name)).collect();
            let outputs: Vec<(&str, &std::path::Path)> =
                paths.iter().map(|p| ("--out", p.as_path())).collect();
            check_distinct(&outputs, &[&layout])?;
            for (f, path) in bundle.files.iter().zip(&paths) {
                let how = match write_atomic(path, &f.bytes, &[&layout], false)? {
                    Written::Created => "wrote",
                    Written::Replaced => "replaced",
                };
                println!("{how} {} ({} bytes)", path.display(), f.bytes.len());
            }
            bundle.not_written.extend(spread_missing);
            bundle.not_written.extend(trade_missing);
            bundle.not_written.extend(sim_missing);
            for n in &bundle.not_written {
                println!("{}", n.line());
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
        Command::Trade {
            layout,
            parts,
            seed,
            hold_case,
            json,
            out,
        } => {
            let settings = portwright::trade::StudySettings {
                seed,
                ..Default::default()
            };
            let outcome =
                cli::trade::run(&layout, parts.as_deref(), &settings, hold_case.as_deref())?;
            print!("{}", outcome.render(json)?);
            if let Some(dir) = out {
                let inputs = [layout.as_path(), outcome.parts_path.as_path()];
                for f in &outcome.files()? {
                    let path = dir.join(&f.name);
                    write_atomic(&path, &f.bytes, &inputs, false)?;
                    eprintln!("wrote {}", path.display());
                }
            }
            Ok(())
        }
        Command::Simulate {
            layout,
            case,
            out,
            json,
            runs,
            seed,
        } => {
            let cases = cli::simulate::run(&layout, case.as_deref(), runs as usize, seed)?;
            print!("{}", cli::simulate::render(&cases, json)?);
            if let Some(dir) = out {
                let (files, _) = cli::simulate::files(&cases)?;
                for f in &files {
                    let path = dir.join(&f.name);
                    check_distinct(&[("--out", &path)], &[&layout])?;
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
                check_distinct(&[("--out", &path)], &[&layout])?;
                let how = match write_atomic(&path, &bytes, &[&layout], false)? {
                    Written::Created => "wrote",
                    Written::Replaced => "replaced",
                };
                println!("{how} {} ({} bytes)", path.display(), bytes.len());
            }
            Ok(())
        }
        Command::Analyze { layout, json, out } => {
            if let Some(o) = &out {
                check_distinct(&[("--out", o)], &[&layout])?;
            }
            let (_, analysis) = load_and_analyze(&layout)?;
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

/// Read, check and analyse a layout; a problem the analysis finds is placed at
/// the layout field behind it.
fn load_and_analyze(
    path: &std::path::Path,
) -> Result<(portwright::model::Design, portwright::analysis::Analysis)> {
    let text = layout::read_text(path)?;
    let name = path.display().to_string();
    let design = layout::parse_str(&text, &name)?;
    let analysis = portwright::analysis::analyze(&design)
        .map_err(|e| layout::locate::analysis_problem(&text, &name, &e))?;
    Ok((design, analysis))
}
