//! Layout files: reading, checking and turning them into a [`Design`](crate::model::Design).
//!
//! Two stages, as the style guide asks: [`file`] mirrors the TOML with strings and
//! spans; [`convert`] checks every value once and builds the model. Errors carry
//! the line and column of the offending value and the dotted name of the field;
//! the caller adds the file name. [`parse_str`] does the work, [`load`] only reads
//! the file, so tests never touch the disk.

pub mod asbuilt;
pub mod convert;
pub mod file;
pub mod precision;
pub mod write;

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

/// Parse layout text as drawn: `[[measured]]` is not applied (nor checked; [`parse_str`] checks it).
pub fn parse_str_as_drawn(text: &str, source_name: &str) -> Result<Design, LayoutError> {
    let raw: file::LayoutFile = toml::from_str(text).map_err(|e| {
        let (line, column) = e.span().map_or((1, 1), |s| line_column(text, s.start));
        let mut message = e.message().trim().to_string();
        if message.contains("expected a string") {
            message.push_str(" (quantities are strings with a unit, such as \"54 mm\")");
        }
        LayoutError::Invalid {
            source_name: source_name.to_string(),
            problems: vec![Diagnostic {
                line,
                column,
                field: String::new(),
                message,
            }],
        }
    })?;
    let design = convert::to_design(&raw, text);
    // The optimiser's sections are checked here too, so every command rejects a
    // bad one, not only `optimize`.
    let sections = crate::optimize::sections_from_str(text);
    let max_cant_rad = sections.as_ref().ok().map(|s| s.limits.max_total_cant_rad);
    let sections = sections.err().map(|e| Diagnostic {
        line: e.line.max(1),
        column: e.column.max(1),
        field: if e.field.is_empty() {
            e.section.clone()
        } else {
            format!("{}.{}", e.section, e.field)
        },
        message: e.message.clone(),
    });
    match (design, sections) {
        (Ok(mut d), None) => {
            if let Some(m) = max_cant_rad {
                d.max_cant_rad = m;
            }
            Ok(d)
        }
        (Ok(_), Some(p)) => Err(vec![p]),
        (Err(mut problems), extra) => {
            problems.extend(extra);
            problems.sort_by_key(|p| (p.line, p.column));
            Err(problems)
        }
    }
    .map_err(|problems| LayoutError::Invalid {
        source_name: source_name.to_string(),
        problems,
    })
}

/// Read and parse a layout file.
pub fn load(path: &Path) -> Result<Design, LayoutError> {
    let text = std::fs::read_to_string(path).map_err(|source| LayoutError::Read {
        path: path.display().to_string(),
        source,
    })?;
    parse_str(&text, &path.display().to_string())
}
