//! Drilling-template options shared by `run` and `template`, and the `template`
//! command: the 1:1 pages as SVG and as one PDF, without the rest of the job.

use anyhow::{anyhow, Result};
use portwright::export::pdf::svg_pages_to_pdf;
use portwright::export::template::{
    drill_template_svg, Orientation, Paper, TemplateSettings, TickUnits,
};
use portwright::model::Design;

/// Paper sizes for the drilling template.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum PaperSize {
    /// ISO A4.
    A4,
    /// US Letter.
    Letter,
}

/// Units of the station ticks and labels.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum RulerUnit {
    /// Ticks every 10 mm, labels in mm.
    Mm,
    /// Ticks every 1/2 in, labels in inches (port stations in inches and mm).
    In,
}

/// How the drilling template is printed.
#[derive(Debug, Clone, Copy, clap::Args)]
pub struct TemplateArgs {
    /// Paper for the drilling template pages.
    #[arg(long, value_enum, default_value = "a4")]
    pub paper: PaperSize,
    /// Turn the paper: long side horizontal.
    #[arg(long)]
    pub landscape: bool,
    /// One sheet as big as the drawing (for a plotter or a large-format printer) instead of pages.
    #[arg(long)]
    pub single_sheet: bool,
    /// Units of the station ticks [default: in with --paper letter, else mm].
    #[arg(long, value_enum)]
    pub ruler_unit: Option<RulerUnit>,
}

impl TemplateArgs {
    /// The library's settings.
    pub fn settings(&self) -> TemplateSettings {
        let unit = self.ruler_unit.unwrap_or(match self.paper {
            PaperSize::Letter => RulerUnit::In,
            PaperSize::A4 => RulerUnit::Mm,
        });
        TemplateSettings {
            paper: match self.paper {
                PaperSize::A4 => Paper::A4,
                PaperSize::Letter => Paper::Letter,
            },
            orientation: if self.landscape {
                Orientation::Landscape
            } else {
                Orientation::Portrait
            },
            single_sheet: self.single_sheet,
            ticks: match unit {
                RulerUnit::Mm => TickUnits::Millimetres,
                RulerUnit::In => TickUnits::Inches,
            },
            ..TemplateSettings::default()
        }
    }
}

/// The template's files: `drill-template-N.svg` and `drill-template.pdf`.
pub fn files(design: &Design, args: &TemplateArgs) -> Result<Vec<(String, Vec<u8>)>> {
    let pages = drill_template_svg(design, &args.settings()).map_err(|e| anyhow!("{e}"))?;
    let mut out = vec![(
        "drill-template.pdf".to_string(),
        svg_pages_to_pdf(&pages, &format!("Drilling template: {}", design.name))
            .map_err(|e| anyhow!("{e}"))?,
    )];
    for (k, p) in pages.into_iter().enumerate() {
        out.push((format!("drill-template-{}.svg", k + 1), p.into_bytes()));
    }
    Ok(out)
}
