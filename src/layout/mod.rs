//! Layout files: reading, checking and turning them into a [`Design`](crate::model::Design).
//!
//! Two stages, as the style guide asks: [`file`] mirrors the TOML with strings and
//! spans; [`convert`] checks every value once and builds the model. Errors carry
//! the line and column of the offending value and the dotted name of the field;
//! the caller adds the file name. [`parse_str`] does the work, [`load`] only reads
//! the file, so tests never touch the disk.

pub mod asbuilt;
pub mod cases;
pub mod convert;
pub mod file;
pub mod ground;
pub mod locate;
pub mod optimizer;
pub mod parts;
mod syntax;
mod text_bounds;
pub use crate::precision;
pub mod write;

pub use optimizer::{OptimizerSections, SearchPlan};

use crate::model::Design;
use std::fmt;
use std::path::Path;
use thiserror::Error;

/// One problem found in a layout, with where it is.
#[derive(Debug, Clone, PartialEq)]
pub struct Diagnostic {
    /// 1-based line.
    pub line: usize,
    /// 1-based column (in characters).
    pub column: usize,
    /// Dotted field name, e.g. ``port `aft-2`.hole``.
    pub field: String,
    /// What is wrong and what was expected.
    pub message: String,
}

impl fmt::Display for Diagnostic {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.field.is_empty() {
            write!(f, "{}:{}: {}", self.line, self.column, self.message)
        } else {
            write!(
                f,
                "{}:{}: {}: {}",
                self.line, self.column, self.field, self.message
            )
        }
    }
}

/// Why a layout could not be used.
#[derive(Debug, Error)]
pub enum LayoutError {
    /// The file could not be read.
    #[error("{path}: cannot read the layout: {source}")]
    Read {
        /// Path as given.
        path: String,
        /// Underlying error.
        source: std::io::Error,
    },
    /// The text has problems; every one found is listed.
    #[error("{}", render(.source_name, .problems))]
    Invalid {
        /// File name used in messages.
        source_name: String,
        /// Problems, in file order.
        problems: Vec<Diagnostic>,
    },
}

fn render(source: &str, problems: &[Diagnostic]) -> String {
    problems
        .iter()
        .map(|p| format!("{source}:{p}"))
        .collect::<Vec<_>>()
        .join("\n")
}

impl LayoutError {
    /// The problems found, empty for a read error.
    pub fn problems(&self) -> &[Diagnostic] {
        match self {
            LayoutError::Read { .. } => &[],
            LayoutError::Invalid { problems, .. } => problems,
        }
    }
}

/// 1-based line and column of a byte offset.
pub fn line_column(text: &str, offset: usize) -> (usize, usize) {
    let offset = offset.min(text.len());
    let before = &text[..offset];
    let line = before.matches('\n').count() + 1;
    let col = before.rsplit('\n').next().map_or(0, |l| l.chars().count()) + 1;
    (line, col)
}

/// A whole layout: the design and the optimiser's sections, every part checked.
#[derive(Debug, Clone)]
pub struct Layout {
    /// The validated model.
    pub design: Design,
    /// `[[freedom]]`, `[limits]` and `[optimize]`, typed.
    pub optimizer: OptimizerSections,
}

/// The longest text value accepted anywhere in a layout (names, labels,
/// choices), in characters. Names are printed in reports, tables and drawings;
/// a bound keeps every output small and its cost linear.
pub const MAX_TEXT_LEN: usize = 200;

/// The largest layout file read, in bytes (16 MiB). Real layouts are a few
/// kilobytes; the bound keeps a wrong file from exhausting memory.
pub const MAX_FILE_BYTES: u64 = 16 << 20;

fn invalid(source_name: &str, problems: Vec<Diagnostic>) -> LayoutError {
    LayoutError::Invalid {
        source_name: source_name.to_string(),
        problems,
    }
}

/// Parse layout text. `source_name` is used only in messages. Ports listed in
/// `[[measured]]` come back as built (measured geometry, discharge coefficient
/// calibrated to the stand test); [`parse_str_as_drawn`] gives the drawn design.
pub fn parse_str(text: &str, source_name: &str) -> Result<Design, LayoutError> {
    let drawn = parse_str_as_drawn(text, source_name)?;
    let sections = asbuilt_sections(text, source_name, &drawn)?;
    if sections.measured.is_empty() {
        return Ok(drawn);
    }
    let (mut built, comparison) = crate::asbuilt::measured::apply(&drawn, &sections.measured)
        .map_err(|e| {
            let at = text.find("[[measured]]").unwrap_or(0);
            let (line, column) = line_column(text, at);
            LayoutError::Invalid {
                source_name: source_name.to_string(),
                problems: vec![Diagnostic {
                    line,
                    column,
                    field: "measured".to_string(),
                    message: e.to_string(),
                }],
            }
        })?;
    built.readings.push(format!(
        "{} port(s) as built from [[measured]]: {}",
        comparison.len(),
        comparison
            .iter()
            .map(|c| format!(
                "`{}` (discharge coefficient {:.3} as drawn, {:.3} as built)",
                c.port, c.discharge_coefficient[0], c.discharge_coefficient[1]
            ))
            .collect::<Vec<_>>()
            .join(", ")
    ));
    Ok(built)
}

/// The `[tolerances]` and `[[measured]]` sections of `text`, checked against `design`.
pub fn asbuilt_sections(
    text: &str,
    source_name: &str,
    design: &Design,
) -> Result<asbuilt::AsBuiltSections, LayoutError> {
    asbuilt::read(text, design).map_err(|problems| LayoutError::Invalid {
        source_name: source_name.to_string(),
        problems,
    })
}

/// The `[[case]]` sections of `text` (simulation cases), checked against `design`.
pub fn case_sections(
    text: &str,
    source_name: &str,
    design: &Design,
) -> Result<Vec<crate::sim::case::Case>, LayoutError> {
    cases::read(text, design).map_err(|problems| LayoutError::Invalid {
        source_name: source_name.to_string(),
        problems,
    })
}

/// Parse layout text as drawn: `[[measured]]` is not applied (nor checked;
/// [`parse_str`] checks it). `source_name` is used only in messages.
pub fn parse_str_as_drawn(text: &str, source_name: &str) -> Result<Design, LayoutError> {
    parse_layout(text, source_name).map(|l| l.design)
}

/// Parse layout text into the design and the optimiser's sections. Every
/// section is checked, so every command refuses the same bad files.
pub fn parse_layout(text: &str, source_name: &str) -> Result<Layout, LayoutError> {
    let long = text_bounds::too_long(text, MAX_TEXT_LEN);
    if !long.is_empty() {
        return Err(invalid(source_name, long));
    }
    let raw: file::LayoutFile =
        toml::from_str(text).map_err(|e| invalid(source_name, vec![syntax::problem(text, &e)]))?;
    let design = convert::to_design(&raw, text);
    let mut problems = match &design {
        Ok(_) => Vec::new(),
        Err(p) => p.clone(),
    };
    let optimizer = optimizer::read(
        &raw.freedom,
        raw.limits.as_ref(),
        raw.optimize.as_ref(),
        design.as_ref().ok(),
        text,
        &mut problems,
    );
    // `[parts]` (the trade study's placement) is checked here so every command refuses it alike.
    if let Ok(d) = &design {
        if let Err(p) = parts::section(text, d) {
            problems.extend(p);
        }
    }
    // `[ground]` (filling, pad hold, pad temperatures) is read into the design.
    let mut ground = None;
    if let Ok(d) = &design {
        let fill_pa = match d.feed.tank.fill {
            crate::model::FillSpec::Pressure { pressure_pa } => pressure_pa,
            crate::model::FillSpec::Mass { .. } => f64::INFINITY,
        };
        match self::ground::read(text, fill_pa) {
            Ok(g) => ground = g,
            Err(p) => problems.extend(p),
        }
    }
    match design {
        Ok(mut design) if problems.is_empty() => {
            design.ground = ground;
            // The drillable-cant rule of `[limits]` is also checked by the analysis.
            design.max_cant_rad = optimizer.limits.max_total_cant_rad;
            Ok(Layout { design, optimizer })
        }
        _ => {
            problems.sort_by_key(|p| (p.line, p.column));
            Err(invalid(source_name, problems))
        }
    }
}

/// Read a layout file's text: at most [`MAX_FILE_BYTES`], and UTF-8 (the
/// message names the line and column of the first byte that is not).
pub fn read_text(path: &Path) -> Result<String, LayoutError> {
    let read_error = |source| LayoutError::Read {
        path: path.display().to_string(),
        source,
    };
    let size = std::fs::metadata(path).map_err(read_error)?.len();
    if size > MAX_FILE_BYTES {
        return Err(invalid(
            &path.display().to_string(),
            vec![Diagnostic {
                line: 1,
                column: 1,
                field: String::new(),
                message: format!(
                    "the file holds {size} bytes; a layout may hold at most {MAX_FILE_BYTES} bytes (16 MiB)"
                ),
            }],
        ));
    }
    let bytes = std::fs::read(path).map_err(read_error)?;
    String::from_utf8(bytes).map_err(|e| {
        let good = e.utf8_error().valid_up_to();
        let bytes = e.as_bytes();
        // Everything before the bad byte is valid UTF-8.
        let before = std::str::from_utf8(&bytes[..good]).unwrap_or("");
        let (line, column) = line_column(before, before.len());
        invalid(
            &path.display().to_string(),
            vec![Diagnostic {
                line,
                column,
                field: String::new(),
                message: format!(
                    "byte 0x{:02X} is not UTF-8 text: save the layout as UTF-8",
                    bytes.get(good).copied().unwrap_or(0)
                ),
            }],
        )
    })
}

/// Read and parse a layout file into the design.
pub fn load(path: &Path) -> Result<Design, LayoutError> {
    load_layout(path).map(|l| l.design)
}

/// Read and parse a layout file into the design and the optimiser's sections.
pub fn load_layout(path: &Path) -> Result<Layout, LayoutError> {
    parse_layout(&read_text(path)?, &path.display().to_string())
}
