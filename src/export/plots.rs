//! Plots where a picture says it faster: torque envelope slices, authority per
//! axis, port thrust, gas remaining against firing time and optimiser progress.
//!
//! Every plot function takes plain numbers in structs defined here (not the
//! analysis types), so the drawing code does not move when the report data
//! changes shape; thin adapters elsewhere fill these structs. Inputs are SI
//! (N·m, kg, rad/s² converted by the caller to deg/s² where named so); the
//! pictures show the units a builder reads at a glance (mN·m, g, deg/s², N).
//!
//! Drawing uses `plotters` with its SVG backend only. Text goes into the SVG as
//! `<text>` elements in the generic `sans-serif` family, so no font files are
//! needed to make an SVG; plotters estimates text extents for layout. PNG output
//! renders the same SVG with `resvg`, using the DejaVu Sans face bundled under
//! `assets/fonts/` (loaded from bytes), so it needs no system fonts either.
//!
//! Each plot also returns its [`Frame`]s: the pixel rectangle of every plotting
//! area and the data ranges mapped onto it, so callers and tests can place or
//! check marks without re-deriving the layout. The layout is fixed by
//! [`PlotSettings`]: a title band on top (title and legend), then the chart with
//! a margin all round, the y tick labels on the left and the x tick labels below.
//! Output is deterministic: the same input gives the same bytes.

use plotters::coord::types::RangedCoordf64;
use plotters::coord::Shift;
use plotters::element::DashedPathElement;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};
use std::ops::Range;
use std::sync::{Arc, OnceLock};
use thiserror::Error;

/// The smallest font size the plots accept, px: text stays readable at 100 % zoom.
pub const MIN_FONT_PX: f64 = 12.0;

/// plotters writes `font-size = size / 1.24` into the SVG, so sizes are scaled up
/// by this factor on the way in to land on the pixel size asked for.
const PLOTTERS_FONT_SCALE: f64 = 1.24;

/// The generic family named in the SVG; the PNG renderer maps it to the bundled face.
const FONT_FAMILY: &str = "sans-serif";

/// The face bundled for PNG output (DejaVu Sans; licence beside it in `assets/fonts/`).
static BUNDLED_FONT: &[u8] = include_bytes!("../../assets/fonts/DejaVuSans.ttf");

/// Family name inside the bundled face.
const BUNDLED_FAMILY: &str = "DejaVu Sans";

// A neutral palette of our own: dark ink, light grid, muted series colours that
// stay apart in greyscale print (descending lightness).
const INK: RGBColor = RGBColor(33, 37, 41);
const MUTED: RGBColor = RGBColor(120, 126, 133);
const GRID: RGBColor = RGBColor(224, 227, 231);
const DISTURBANCE: RGBColor = RGBColor(166, 52, 46);
/// Opacity of filled areas, so grid lines stay visible through them.
const AREA_OPACITY: f64 = 0.3;
const SERIES: [RGBColor; 6] = [
    RGBColor(44, 90, 135),
    RGBColor(196, 118, 40),
    RGBColor(82, 140, 98),
    RGBColor(122, 84, 146),
    RGBColor(92, 92, 92),
    RGBColor(170, 80, 80),
];

/// Why a plot could not be made.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum PlotError {
    /// A settings value is out of range.
    #[error("plot setting `{name}` = {value} is out of range: {reason}")]
    Setting {
        /// Setting name.
        name: &'static str,
        /// Value given.
        value: f64,
        /// What it must be.
        reason: &'static str,
    },
    /// There is nothing to draw.
    #[error("{what}: nothing to plot")]
    Empty {
        /// Which input.
        what: &'static str,
    },
    /// An input value is NaN or infinite.
    #[error("{what}: value #{index} is not a finite number")]
    NotFinite {
        /// Which input.
        what: &'static str,
        /// Position of the value in that input (0-based).
        index: usize,
    },
    /// An input has the wrong shape.
    #[error("{what}: {reason}")]
    Shape {
        /// Which input.
        what: &'static str,
        /// What is wrong.
        reason: &'static str,
    },
    /// The drawing backend failed.
    #[error("drawing the plot failed: {0}")]
    Draw(String),
    /// Rendering the SVG to PNG failed.
    #[error("rendering PNG failed: {0}")]
    Render(String),
}

fn draw_err(e: impl std::fmt::Display) -> PlotError {
    PlotError::Draw(e.to_string())
}

/// Size and layout of every plot. The defaults give a 720 × 480 px picture with
/// 13 px tick labels, 14 px axis labels and a 16 px title.
#[derive(Debug, Clone, PartialEq)]
pub struct PlotSettings {
    /// Picture width, px.
    pub width_px: u32,
    /// Picture height, px.
    pub height_px: u32,
    /// Tick labels, legend and value labels, px (at least [`MIN_FONT_PX`]).
    pub tick_font_px: f64,
    /// Axis descriptions, px (at least [`MIN_FONT_PX`]).
    pub label_font_px: f64,
    /// Title, px (at least [`MIN_FONT_PX`]).
    pub title_font_px: f64,
    /// Height of the band on top that holds the title and the legend, px.
    pub title_band_px: u32,
    /// Space between the band (or picture edge) and the chart on every side, px.
    pub margin_px: u32,
    /// Height of the area below the plotting area for x tick labels and description, px.
    pub x_label_area_px: u32,
    /// Width of the area left of the plotting area for y tick labels and description, px.
    pub y_label_area_px: u32,
    /// Draw torque envelopes with the same mN·m per pixel on both axes, so the
    /// outline's shape reads true; off, each axis fits its own extent (useful when
    /// roll torque is far smaller than pitch torque and the outline becomes a sliver).
    pub envelope_equal_scale: bool,
}

impl Default for PlotSettings {
    fn default() -> Self {
        PlotSettings {
            width_px: 720,
            height_px: 480,
            tick_font_px: 13.0,
            label_font_px: 14.0,
            title_font_px: 16.0,
            title_band_px: 60,
            margin_px: 16,
            x_label_area_px: 56,
            y_label_area_px: 80,
            envelope_equal_scale: true,
        }
    }
}

/// Smallest plotting area accepted, px on each side.
const MIN_PLOT_AREA_PX: u32 = 60;

impl PlotSettings {
    /// Check sizes and fonts; every plot function calls this first.
    pub fn validate(&self) -> Result<(), PlotError> {
        for (name, v) in [("width_px", self.width_px), ("height_px", self.height_px)] {
            if !(200..=4000).contains(&v) {
                return Err(PlotError::Setting {
                    name,
                    value: f64::from(v),
                    reason: "must be between 200 and 4000 px",
                });
            }
        }
        for (name, v) in [
            ("tick_font_px", self.tick_font_px),
            ("label_font_px", self.label_font_px),
            ("title_font_px", self.title_font_px),
        ] {
            if !(MIN_FONT_PX..=72.0).contains(&v) {
                return Err(PlotError::Setting {
                    name,
                    value: v,
                    reason: "must be between 12 and 72 px",
                });
            }
        }
        if self.title_band_px < (self.title_font_px * 1.5).ceil() as u32 {
            return Err(PlotError::Setting {
                name: "title_band_px",
                value: f64::from(self.title_band_px),
                reason: "must hold the title (at least 1.5 × title_font_px)",
            });
        }
        let w = self.plot_width_px(self.y_label_area_px);
        if w < i64::from(MIN_PLOT_AREA_PX) {
            return Err(PlotError::Setting {
                name: "width_px",
                value: f64::from(self.width_px),
                reason: "leaves a plotting area under 60 px wide after margins and labels",
            });
        }
        if self.plot_height_px() < i64::from(MIN_PLOT_AREA_PX) {
            return Err(PlotError::Setting {
                name: "height_px",
                value: f64::from(self.height_px),
                reason: "leaves a plotting area under 60 px high after the title band, margins and labels",
            });
        }
        Ok(())
    }

    /// Width of a full-width plotting area with the given y label area, px.
    fn plot_width_px(&self, y_label_area_px: u32) -> i64 {
        i64::from(self.width_px) - 2 * i64::from(self.margin_px) - i64::from(y_label_area_px)
    }

    /// Height of the plotting area below the title band, px.
    fn plot_height_px(&self) -> i64 {
        i64::from(self.height_px)
            - i64::from(self.title_band_px)
            - 2 * i64::from(self.margin_px)
            - i64::from(self.x_label_area_px)
    }
}

/// Where one plotting area sits in the picture and which data ranges it shows.
///
/// Pixel edges follow plotters: `left_px..right_px` and `top_px..bottom_px` are
/// half-open, and a value at the low end of a range lands on `left_px` (x) or on
/// `bottom_px − 1` (y). Ranges are in the units the axes show.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Frame {
    /// Left edge of the plotting area, px from the picture's left.
    pub left_px: i32,
    /// Top edge, px from the picture's top.
    pub top_px: i32,
    /// Right edge (exclusive), px.
    pub right_px: i32,
    /// Bottom edge (exclusive), px.
    pub bottom_px: i32,
    /// Data range along x, axis units.
    pub x_range: (f64, f64),
    /// Data range along y, axis units.
    pub y_range: (f64, f64),
}

impl Frame {
    /// Pixel position of a data point (axis units), as the drawing placed it to
    /// within rounding.
    pub fn to_pixel(&self, x: f64, y: f64) -> (f64, f64) {
        let fx = (x - self.x_range.0) / (self.x_range.1 - self.x_range.0);
        let fy = (y - self.y_range.0) / (self.y_range.1 - self.y_range.0);
        let x0 = f64::from(self.left_px);
        let x1 = f64::from(self.right_px - 1);
        let y0 = f64::from(self.bottom_px - 1);
        let y1 = f64::from(self.top_px);
        (x0 + fx * (x1 - x0), y0 + fy * (y1 - y0))
    }
}

/// A finished plot: the SVG text and the frames of its plotting areas.
#[derive(Debug, Clone, PartialEq)]
pub struct Plot {
    /// The picture as a standalone SVG document.
    pub svg: String,
    /// Plotting areas, left to right.
    pub frames: Vec<Frame>,
}

impl Plot {
    /// The same picture as PNG, `scale` pixels per SVG pixel.
    pub fn to_png(&self, scale: f32) -> Result<Vec<u8>, PlotError> {
        svg_to_png(&self.svg, scale)
    }
}

/// A plot with a short name (usable as a file stem) and a caption.
#[derive(Debug, Clone, PartialEq)]
pub struct NamedPlot {
    /// Short name, lower case with hyphens, e.g. `envelope-roll-pitch-liftoff`.
    pub name: String,
    /// One-line caption for a report.
    pub caption: String,
    /// The plot.
    pub plot: Plot,
}

/// A plane through the torque space, named by its horizontal then vertical axis.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Plane {
    /// Roll torque across, pitch torque up.
    RollPitch,
    /// Pitch torque across, yaw torque up.
    PitchYaw,
    /// Roll torque across, yaw torque up.
    RollYaw,
}

impl Plane {
    /// All three planes.
    pub const ALL: [Plane; 3] = [Plane::RollPitch, Plane::PitchYaw, Plane::RollYaw];

    /// Body-axis indices (0 roll, 1 pitch, 2 yaw) shown across and up.
    pub fn axes(self) -> (usize, usize) {
        match self {
            Plane::RollPitch => (0, 1),
            Plane::PitchYaw => (1, 2),
            Plane::RollYaw => (0, 2),
        }
    }

    /// Plane name in words, e.g. `roll–pitch`.
    pub fn label(self) -> &'static str {
        match self {
            Plane::RollPitch => "roll–pitch",
            Plane::PitchYaw => "pitch–yaw",
            Plane::RollYaw => "roll–yaw",
        }
    }

    /// Plane name for file stems, e.g. `roll-pitch`.
    pub fn slug(self) -> &'static str {
        match self {
            Plane::RollPitch => "roll-pitch",
            Plane::PitchYaw => "pitch-yaw",
            Plane::RollYaw => "roll-yaw",
        }
    }
}

const AXIS_TITLES: [&str; 3] = ["Roll", "Pitch", "Yaw"];

/// One plane of the attainable torque set at one flight state.
#[derive(Debug, Clone, PartialEq)]
pub struct EnvelopeSlice {
    /// Layout (design) name, shown in the title.
    pub layout: String,
    /// Flight state name, shown in the title.
    pub state: String,
    /// Which plane.
    pub plane: Plane,
    /// Vertices of the closed outline in order (the first is not repeated), N·m.
    pub outline_n_m: Vec<(f64, f64)>,
    /// Required torque about the horizontal and vertical axes, N·m (≥ 0);
    /// drawn as the box ±x by ±y.
    pub required_n_m: (f64, f64),
    /// Disturbance torques to mark, N·m.
    pub disturbances_n_m: Vec<(f64, f64)>,
}

/// Per-axis angular acceleration at one flight state.
#[derive(Debug, Clone, PartialEq)]
pub struct StateAuthority {
    /// Flight state name.
    pub state: String,
    /// Achievable angular acceleration about roll, pitch, yaw, deg/s² (≥ 0).
    pub achieved_deg_s2: [f64; 3],
    /// Required angular acceleration about roll, pitch, yaw, deg/s² (≥ 0; 0 = none).
    pub required_deg_s2: [f64; 3],
}

/// Authority bars for every flight state.
#[derive(Debug, Clone, PartialEq)]
pub struct AuthorityBars {
    /// Layout name, shown in the title.
    pub layout: String,
    /// One entry per flight state, drawn side by side within each axis.
    pub states: Vec<StateAuthority>,
}

/// Thrust of each port at one flight state.
#[derive(Debug, Clone, PartialEq)]
pub struct PortThrust {
    /// Layout name, shown in the title.
    pub layout: String,
    /// Flight state name, shown in the title.
    pub state: String,
    /// Port name and thrust, N (≥ 0), in layout order.
    pub ports: Vec<(String, f64)>,
}

/// Gas left in the tank against firing time, between its two blowdown bounds.
#[derive(Debug, Clone, PartialEq)]
pub struct GasRemaining {
    /// Layout name, shown in the title.
    pub layout: String,
    /// What is firing, completing "Firing time, …", e.g. `all ports open` or `port aft-1 alone`.
    pub firing: String,
    /// (firing time s, gas in the tank kg) if the tank stays at the fill temperature.
    pub isothermal_kg: Vec<(f64, f64)>,
    /// (firing time s, gas in the tank kg) if the contents expand adiabatically.
    pub adiabatic_kg: Vec<(f64, f64)>,
}

/// Optimiser progress: best score so far against evaluations.
#[derive(Debug, Clone, PartialEq)]
pub struct Convergence {
    /// Layout name, shown in the title.
    pub layout: String,
    /// What the score measures, with its unit, for the y axis.
    pub score_label: String,
    /// (evaluation count, best score so far), evaluation counts increasing.
    pub best: Vec<(f64, f64)>,
}

/// Whether a lower or a higher score is better.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Sense {
    /// Lower is better.
    Minimise,
    /// Higher is better.
    Maximise,
}

/// Best score so far after each evaluation, as (evaluation number from 1, best).
/// Non-finite scores (failed evaluations) never become the best.
pub fn best_so_far(scores: &[f64], sense: Sense) -> Vec<(f64, f64)> {
    let mut best: Option<f64> = None;
    let mut out = Vec::with_capacity(scores.len());
    for (i, &s) in scores.iter().enumerate() {
        if s.is_finite() {
            best = Some(match (best, sense) {
                (None, _) => s,
                (Some(b), Sense::Minimise) => b.min(s),
                (Some(b), Sense::Maximise) => b.max(s),
            });
        }
        if let Some(b) = best {
            out.push(((i + 1) as f64, b));
        }
    }
    out
}

// ---------------------------------------------------------------------------
// Input checks

fn check_points(what: &'static str, pts: &[(f64, f64)]) -> Result<(), PlotError> {
    match pts
        .iter()
        .position(|(x, y)| !x.is_finite() || !y.is_finite())
    {
        Some(index) => Err(PlotError::NotFinite { what, index }),
        None => Ok(()),
    }
}

fn check_values(what: &'static str, vals: &[f64], non_negative: bool) -> Result<(), PlotError> {
    if let Some(index) = vals.iter().position(|v| !v.is_finite()) {
        return Err(PlotError::NotFinite { what, index });
    }
    if non_negative && vals.iter().any(|&v| v < 0.0) {
        return Err(PlotError::Shape {
            what,
            reason: "values must be ≥ 0",
        });
    }
    Ok(())
}

// ---------------------------------------------------------------------------
// Drawing helpers

type Root<'a> = DrawingArea<SVGBackend<'a>, Shift>;
type Chart<'a, 'b> = ChartContext<'a, SVGBackend<'b>, Cartesian2d<RangedCoordf64, RangedCoordf64>>;

fn font(px: f64) -> TextStyle<'static> {
    TextStyle::from((FONT_FAMILY, px * PLOTTERS_FONT_SCALE).into_font()).color(&INK)
}

/// Rough width of a text run, px: DejaVu-like faces average about 0.6 em per character.
fn text_width_px(text: &str, px: f64) -> i32 {
    (text.chars().count() as f64 * px * 0.6).ceil() as i32
}

/// A short number for labels: about three significant figures, no exponent.
fn short_number(v: f64) -> String {
    let a = v.abs();
    let s = if a >= 100.0 {
        format!("{v:.0}")
    } else if a >= 10.0 {
        format!("{v:.1}")
    } else if a >= 1.0 {
        format!("{v:.2}")
    } else {
        format!("{v:.3}")
    };
    if s.starts_with('-') && s[1..].chars().all(|c| c == '0' || c == '.') {
        s[1..].to_string()
    } else {
        s
    }
}

/// A tick label: at most six decimals, trailing zeros dropped, no `-0`.
fn tick_label(v: &f64) -> String {
    let s = format!("{v:.6}");
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s == "-0" || s.is_empty() {
        "0".to_string()
    } else {
        s.to_string()
    }
}

/// What a legend entry shows beside its text.
#[derive(Clone, Copy)]
enum Swatch {
    /// A solid square (bars).
    Fill(RGBColor),
    /// A light, see-through square (filled areas).
    Area(RGBColor),
    /// A solid line.
    Line(RGBColor),
    /// A dashed line.
    Dashed(RGBColor),
    /// A cross marker.
    Cross(RGBColor),
}

/// Title centred in the upper part of the band, legend entries in a row below it.
fn draw_band(
    root: &Root<'_>,
    s: &PlotSettings,
    title: &str,
    legend: &[(Swatch, String)],
) -> Result<(), PlotError> {
    let w = s.width_px as i32;
    let title_y = (s.title_font_px * 1.1).round() as i32;
    root.draw(&Text::new(
        title.to_string(),
        (w / 2, title_y),
        font(s.title_font_px).pos(Pos::new(HPos::Center, VPos::Center)),
    ))
    .map_err(draw_err)?;
    if legend.is_empty() {
        return Ok(());
    }
    let swatch_w = 22;
    let gap = 8;
    let spacing = 22;
    let widths: Vec<i32> = legend
        .iter()
        .map(|(_, t)| swatch_w + gap + text_width_px(t, s.tick_font_px))
        .collect();
    let total: i32 = widths.iter().sum::<i32>() + spacing * (legend.len() as i32 - 1);
    let mut x = ((w - total) / 2).max(s.margin_px as i32);
    let y = (f64::from(s.title_band_px) - s.tick_font_px).round() as i32;
    for ((swatch, text), width) in legend.iter().zip(&widths) {
        match *swatch {
            Swatch::Fill(c) => root.draw(&Rectangle::new(
                [(x + 4, y - 7), (x + swatch_w - 4, y + 7)],
                c.filled(),
            )),
            Swatch::Area(c) => root.draw(&Rectangle::new(
                [(x + 4, y - 7), (x + swatch_w - 4, y + 7)],
                c.mix(AREA_OPACITY).filled(),
            )),
            Swatch::Line(c) => root.draw(&PathElement::new(
                vec![(x, y), (x + swatch_w, y)],
                c.stroke_width(3),
            )),
            Swatch::Dashed(c) => root.draw(&DashedPathElement::new(
                vec![(x, y), (x + swatch_w, y)],
                5,
                3,
                c.stroke_width(2),
            )),
            Swatch::Cross(c) => root.draw(&Cross::new((x + swatch_w / 2, y), 5, c.stroke_width(2))),
        }
        .map_err(draw_err)?;
        root.draw(&Text::new(
            text.clone(),
            (x + swatch_w + gap, y),
            font(s.tick_font_px).pos(Pos::new(HPos::Left, VPos::Center)),
        ))
        .map_err(draw_err)?;
        x += width + spacing;
    }
    Ok(())
}

fn build_chart<'a, 'b>(
    area: &'a Root<'b>,
    s: &PlotSettings,
    y_label_area_px: u32,
    x: Range<f64>,
    y: Range<f64>,
) -> Result<Chart<'a, 'b>, PlotError> {
    ChartBuilder::on(area)
        .margin(s.margin_px)
        .x_label_area_size(s.x_label_area_px)
        .y_label_area_size(y_label_area_px)
        .build_cartesian_2d(x, y)
        .map_err(draw_err)
}

/// Grid, axes, tick labels and descriptions. `x_ticks = 0` leaves the x axis bare
/// (bar charts label their categories themselves).
fn draw_mesh(
    chart: &mut Chart<'_, '_>,
    s: &PlotSettings,
    x_desc: &str,
    y_desc: &str,
    x_ticks: usize,
) -> Result<(), PlotError> {
    let mut mesh = chart.configure_mesh();
    mesh.label_style(font(s.tick_font_px))
        .axis_desc_style(font(s.label_font_px))
        .bold_line_style(GRID.stroke_width(1))
        .light_line_style(TRANSPARENT)
        .axis_style(INK.stroke_width(1))
        .x_labels(x_ticks)
        .y_labels(7)
        .x_label_formatter(&tick_label)
        .y_label_formatter(&tick_label)
        .x_desc(x_desc)
        .y_desc(y_desc);
    if x_ticks == 0 {
        mesh.disable_x_mesh();
    }
    mesh.draw().map_err(draw_err)
}

fn frame_of(chart: &Chart<'_, '_>) -> Frame {
    let (xr, yr) = chart.plotting_area().get_pixel_range();
    let (xs, ys) = (chart.x_range(), chart.y_range());
    Frame {
        left_px: xr.start,
        top_px: yr.start,
        right_px: xr.end,
        bottom_px: yr.end,
        x_range: (xs.start, xs.end),
        y_range: (ys.start, ys.end),
    }
}

/// Render into an SVG string of the configured size.
fn render_svg(
    s: &PlotSettings,
    draw: impl FnOnce(&Root<'_>) -> Result<Vec<Frame>, PlotError>,
) -> Result<Plot, PlotError> {
    s.validate()?;
    let mut svg = String::new();
    let frames = {
        let root = SVGBackend::with_string(&mut svg, (s.width_px, s.height_px)).into_drawing_area();
        root.fill(&WHITE).map_err(draw_err)?;
        let frames = draw(&root)?;
        root.present().map_err(draw_err)?;
        frames
    };
    Ok(Plot { svg, frames })
}

/// A range from `lo` to `hi` padded by 6 % at each open end; ends pinned at zero stay there.
fn padded(lo: f64, hi: f64, pin_zero: bool) -> Range<f64> {
    let (lo, hi) = if hi - lo > 0.0 {
        (lo, hi)
    } else {
        let d = if hi.abs() > 0.0 { hi.abs() * 0.1 } else { 1.0 };
        (lo - d, hi + d)
    };
    let pad = (hi - lo) * 0.06;
    let lo = if pin_zero && lo == 0.0 { 0.0 } else { lo - pad };
    let hi = if pin_zero && hi == 0.0 { 0.0 } else { hi + pad };
    lo..hi
}

// ---------------------------------------------------------------------------
// The plots

/// The attainable torque outline in one plane, with the required box and the
/// disturbance markers. Both axes in mN·m at the same scale, centred on zero.
pub fn torque_envelope_svg(slice: &EnvelopeSlice, s: &PlotSettings) -> Result<Plot, PlotError> {
    const WHAT: &str = "torque envelope outline";
    if slice.outline_n_m.len() < 3 {
        return Err(PlotError::Shape {
            what: WHAT,
            reason: "an outline needs at least 3 vertices",
        });
    }
    check_points(WHAT, &slice.outline_n_m)?;
    check_points("disturbance torques", &slice.disturbances_n_m)?;
    let (rx, ry) = slice.required_n_m;
    check_values("required torque", &[rx, ry], true)?;
    s.validate()?;

    let to_milli = |(x, y): (f64, f64)| (x * 1e3, y * 1e3);
    let outline: Vec<(f64, f64)> = slice.outline_n_m.iter().copied().map(to_milli).collect();
    let dist: Vec<(f64, f64)> = slice
        .disturbances_n_m
        .iter()
        .copied()
        .map(to_milli)
        .collect();
    let (rx, ry) = (rx * 1e3, ry * 1e3);

    let required_corner = (rx, ry);
    let all = outline
        .iter()
        .chain(&dist)
        .chain(std::iter::once(&required_corner));
    let (mut ex, mut ey) = all.fold((0.0f64, 0.0f64), |(a, b), &(x, y)| {
        (a.max(x.abs()), b.max(y.abs()))
    });
    if ex == 0.0 && ey == 0.0 {
        ex = 1.0;
        ey = 1.0;
    }
    let pw = s.plot_width_px(s.y_label_area_px) as f64;
    let ph = s.plot_height_px() as f64;
    const PAD: f64 = 1.12;
    let (hx, hy) = if s.envelope_equal_scale {
        let per_px = (2.0 * ex / pw).max(2.0 * ey / ph) * PAD;
        (per_px * pw / 2.0, per_px * ph / 2.0)
    } else {
        let fit = |e: f64, other: f64| if e > 0.0 { e * PAD } else { other * PAD };
        (fit(ex, ey), fit(ey, ex))
    };

    let (ax, ay) = slice.plane.axes();
    let title = format!(
        "Attainable torque, {} plane: {}, {}",
        slice.plane.label(),
        slice.layout,
        slice.state
    );
    let x_desc = format!("{} torque (mN·m)", AXIS_TITLES[ax]);
    let y_desc = format!("{} torque (mN·m)", AXIS_TITLES[ay]);
    let colour = SERIES[0];
    let mut legend = vec![
        (Swatch::Area(colour), "attainable".to_string()),
        (Swatch::Dashed(INK), "required".to_string()),
    ];
    if !dist.is_empty() {
        legend.push((Swatch::Cross(DISTURBANCE), "disturbance".to_string()));
    }

    render_svg(s, |root| {
        draw_band(root, s, &title, &legend)?;
        let (_, lower) = root.split_vertically(s.title_band_px);
        let mut chart = build_chart(&lower, s, s.y_label_area_px, -hx..hx, -hy..hy)?;
        draw_mesh(&mut chart, s, &x_desc, &y_desc, 9)?;
        let zero_axes = [vec![(-hx, 0.0), (hx, 0.0)], vec![(0.0, -hy), (0.0, hy)]];
        chart
            .draw_series(
                zero_axes
                    .into_iter()
                    .map(|p| PathElement::new(p, MUTED.stroke_width(1))),
            )
            .map_err(draw_err)?;
        chart
            .draw_series(std::iter::once(Polygon::new(
                outline.clone(),
                colour.mix(AREA_OPACITY).filled(),
            )))
            .map_err(draw_err)?;
        let mut closed = outline.clone();
        closed.push(outline[0]);
        chart
            .draw_series(std::iter::once(PathElement::new(
                closed,
                colour.stroke_width(2),
            )))
            .map_err(draw_err)?;
        let corners = vec![(-rx, -ry), (rx, -ry), (rx, ry), (-rx, ry), (-rx, -ry)];
        chart
            .draw_series(std::iter::once(DashedPathElement::new(
                corners,
                6,
                4,
                INK.stroke_width(2),
            )))
            .map_err(draw_err)?;
        chart
            .draw_series(
                dist.iter()
                    .map(|&p| Cross::new(p, 6, DISTURBANCE.stroke_width(2))),
            )
            .map_err(draw_err)?;
        Ok(vec![frame_of(&chart)])
    })
}

/// Bars from zero for categories 0..n in one chart, with value labels on top and
/// category names below. Returns nothing; the caller reads the frame.
fn draw_bars(
    root: &Root<'_>,
    chart: &mut Chart<'_, '_>,
    s: &PlotSettings,
    values: &[(f64, RGBColor)],
    slots: &[(f64, f64)],
) -> Result<(), PlotError> {
    chart
        .draw_series(
            values
                .iter()
                .zip(slots)
                .map(|(&(v, c), &(a, b))| Rectangle::new([(a, 0.0), (b, v)], c.filled())),
        )
        .map_err(draw_err)?;
    for (&(v, _), &(a, b)) in values.iter().zip(slots) {
        let (px, py) = chart.backend_coord(&((a + b) / 2.0, v));
        root.draw(&Text::new(
            short_number(v),
            (px, py - 4),
            font(s.tick_font_px).pos(Pos::new(HPos::Center, VPos::Bottom)),
        ))
        .map_err(draw_err)?;
    }
    Ok(())
}

/// Category names under the plotting area; names that would collide go on two rows.
fn draw_category_labels(
    root: &Root<'_>,
    chart: &Chart<'_, '_>,
    s: &PlotSettings,
    names: &[&str],
) -> Result<(), PlotError> {
    let frame = frame_of(chart);
    let slot_px = f64::from(frame.right_px - frame.left_px) / names.len().max(1) as f64;
    let stagger = names
        .iter()
        .any(|n| f64::from(text_width_px(n, s.tick_font_px)) > slot_px - 4.0);
    let row = (s.tick_font_px * 1.3).round() as i32;
    for (i, name) in names.iter().enumerate() {
        let (px, _) = chart.backend_coord(&(i as f64 + 0.5, frame.y_range.0));
        let y = frame.bottom_px + 6 + if stagger && i % 2 == 1 { row } else { 0 };
        root.draw(&Text::new(
            name.to_string(),
            (px, y),
            font(s.tick_font_px).pos(Pos::new(HPos::Center, VPos::Top)),
        ))
        .map_err(draw_err)?;
    }
    Ok(())
}

/// Angular acceleration per axis (deg/s²), one panel per axis with its own scale
/// (roll authority is usually far larger than pitch or yaw), a bar per flight
/// state and each state's requirement as a line across its bar.
pub fn authority_bars_svg(bars: &AuthorityBars, s: &PlotSettings) -> Result<Plot, PlotError> {
    if bars.states.is_empty() {
        return Err(PlotError::Empty {
            what: "authority bars",
        });
    }
    for st in &bars.states {
        check_values("achieved angular acceleration", &st.achieved_deg_s2, true)?;
        check_values("required angular acceleration", &st.required_deg_s2, true)?;
    }
    s.validate()?;
    let panel_w = s.width_px / 3;
    let panel_plot_w =
        i64::from(panel_w) - 2 * i64::from(s.margin_px) - i64::from(s.y_label_area_px);
    if panel_plot_w < i64::from(MIN_PLOT_AREA_PX) {
        return Err(PlotError::Setting {
            name: "width_px",
            value: f64::from(s.width_px),
            reason: "too narrow for three authority panels",
        });
    }
    let title = format!("Angular acceleration per axis: {}", bars.layout);
    let mut legend: Vec<(Swatch, String)> = bars
        .states
        .iter()
        .enumerate()
        .map(|(i, st)| (Swatch::Fill(SERIES[i % SERIES.len()]), st.state.clone()))
        .collect();
    legend.push((Swatch::Line(INK), "required".to_string()));
    let n = bars.states.len() as f64;

    render_svg(s, |root| {
        draw_band(root, s, &title, &legend)?;
        let (_, lower) = root.split_vertically(s.title_band_px);
        let panels = lower.split_evenly((1, 3));
        let mut frames = Vec::with_capacity(3);
        for (k, panel) in panels.iter().enumerate() {
            let top = bars
                .states
                .iter()
                .flat_map(|st| [st.achieved_deg_s2[k], st.required_deg_s2[k]])
                .fold(0.0f64, f64::max);
            let y = padded(0.0, if top > 0.0 { top * 1.08 } else { 1.0 }, true);
            let mut chart = build_chart(panel, s, s.y_label_area_px, 0.0..n, y)?;
            let y_desc = if k == 0 {
                "Angular acceleration (deg/s²)"
            } else {
                ""
            };
            draw_mesh(&mut chart, s, AXIS_TITLES[k], y_desc, 0)?;
            let values: Vec<(f64, RGBColor)> = bars
                .states
                .iter()
                .enumerate()
                .map(|(i, st)| (st.achieved_deg_s2[k], SERIES[i % SERIES.len()]))
                .collect();
            let slots: Vec<(f64, f64)> = (0..bars.states.len())
                .map(|i| (i as f64 + 0.15, i as f64 + 0.85))
                .collect();
            draw_bars(root, &mut chart, s, &values, &slots)?;
            chart
                .draw_series(
                    bars.states
                        .iter()
                        .enumerate()
                        .filter(|(_, st)| st.required_deg_s2[k] > 0.0)
                        .map(|(i, st)| {
                            let r = st.required_deg_s2[k];
                            PathElement::new(
                                vec![(i as f64 + 0.05, r), (i as f64 + 0.95, r)],
                                INK.stroke_width(2),
                            )
                        }),
                )
                .map_err(draw_err)?;
            frames.push(frame_of(&chart));
        }
        Ok(frames)
    })
}

/// Thrust of each port (N) as bars, named underneath.
pub fn port_thrust_svg(thrust: &PortThrust, s: &PlotSettings) -> Result<Plot, PlotError> {
    if thrust.ports.is_empty() {
        return Err(PlotError::Empty {
            what: "port thrust",
        });
    }
    let values: Vec<f64> = thrust.ports.iter().map(|p| p.1).collect();
    check_values("port thrust", &values, true)?;
    let title = format!("Thrust per port: {}, {}", thrust.layout, thrust.state);
    let top = values.iter().copied().fold(0.0f64, f64::max);
    let n = values.len();
    render_svg(s, |root| {
        draw_band(root, s, &title, &[])?;
        let (_, lower) = root.split_vertically(s.title_band_px);
        let y = padded(0.0, if top > 0.0 { top * 1.08 } else { 1.0 }, true);
        let mut chart = build_chart(&lower, s, s.y_label_area_px, 0.0..n as f64, y)?;
        draw_mesh(&mut chart, s, "Port", "Thrust (N)", 0)?;
        let coloured: Vec<(f64, RGBColor)> = values.iter().map(|&v| (v, SERIES[0])).collect();
        let slots: Vec<(f64, f64)> = (0..n).map(|i| (i as f64 + 0.2, i as f64 + 0.8)).collect();
        draw_bars(root, &mut chart, s, &coloured, &slots)?;
        let names: Vec<&str> = thrust.ports.iter().map(|p| p.0.as_str()).collect();
        draw_category_labels(root, &chart, s, &names)?;
        Ok(vec![frame_of(&chart)])
    })
}

/// One line of a line chart.
struct Curve<'a> {
    name: &'a str,
    points: Vec<(f64, f64)>,
    colour: RGBColor,
    dashed: bool,
}

fn line_chart(
    s: &PlotSettings,
    title: &str,
    x_desc: &str,
    y_desc: &str,
    curves: &[Curve<'_>],
    y_from_zero: bool,
) -> Result<Plot, PlotError> {
    let pts = || curves.iter().flat_map(|c| c.points.iter());
    let x_hi = pts().map(|p| p.0).fold(f64::NEG_INFINITY, f64::max);
    let x_lo = pts().map(|p| p.0).fold(f64::INFINITY, f64::min).min(0.0);
    let y_hi = pts().map(|p| p.1).fold(f64::NEG_INFINITY, f64::max);
    let y_lo = pts().map(|p| p.1).fold(f64::INFINITY, f64::min);
    let y_lo = if y_from_zero { y_lo.min(0.0) } else { y_lo };
    let x = if x_hi > x_lo {
        x_lo..x_hi
    } else {
        padded(x_lo, x_hi, false)
    };
    let y = padded(y_lo, y_hi, y_from_zero);
    let legend: Vec<(Swatch, String)> = curves
        .iter()
        .map(|c| {
            let sw = if c.dashed {
                Swatch::Dashed(c.colour)
            } else {
                Swatch::Line(c.colour)
            };
            (sw, c.name.to_string())
        })
        .collect();
    render_svg(s, |root| {
        draw_band(root, s, title, &legend)?;
        let (_, lower) = root.split_vertically(s.title_band_px);
        let mut chart = build_chart(&lower, s, s.y_label_area_px, x.clone(), y.clone())?;
        draw_mesh(&mut chart, s, x_desc, y_desc, 9)?;
        for c in curves {
            if c.dashed {
                chart
                    .draw_series(std::iter::once(DashedPathElement::new(
                        c.points.clone(),
                        8,
                        5,
                        c.colour.stroke_width(2),
                    )))
                    .map_err(draw_err)?;
            } else {
                chart
                    .draw_series(std::iter::once(PathElement::new(
                        c.points.clone(),
                        c.colour.stroke_width(2),
                    )))
                    .map_err(draw_err)?;
            }
        }
        Ok(vec![frame_of(&chart)])
    })
}

/// Gas in the tank (g) against firing time (s): the isothermal bound as a solid
/// line, the adiabatic bound dashed.
pub fn gas_remaining_svg(gas: &GasRemaining, s: &PlotSettings) -> Result<Plot, PlotError> {
    for (what, c) in [
        ("isothermal gas curve", &gas.isothermal_kg),
        ("adiabatic gas curve", &gas.adiabatic_kg),
    ] {
        if c.len() < 2 {
            return Err(PlotError::Shape {
                what,
                reason: "a curve needs at least 2 points",
            });
        }
        check_points(what, c)?;
        if c.iter().any(|p| p.0 < 0.0 || p.1 < 0.0) {
            return Err(PlotError::Shape {
                what,
                reason: "times and masses must be ≥ 0",
            });
        }
    }
    let grams = |c: &[(f64, f64)]| c.iter().map(|&(t, m)| (t, m * 1e3)).collect();
    let curves = [
        Curve {
            name: "isothermal bound",
            points: grams(&gas.isothermal_kg),
            colour: SERIES[0],
            dashed: false,
        },
        Curve {
            name: "adiabatic bound",
            points: grams(&gas.adiabatic_kg),
            colour: SERIES[1],
            dashed: true,
        },
    ];
    line_chart(
        s,
        &format!("Gas remaining: {}", gas.layout),
        &format!("Firing time, {} (s)", gas.firing),
        "Gas in the tank (g)",
        &curves,
        true,
    )
}

/// The tank through an adiabatic blowdown, against firing time.
#[derive(Debug, Clone, PartialEq)]
pub struct TankBlowdown {
    /// Layout name, shown in the title.
    pub layout: String,
    /// What is firing, completing "Firing time, …".
    pub firing: String,
    /// (firing time s, tank pressure Pa absolute, tank temperature K).
    pub points: Vec<(f64, f64, f64)>,
    /// Tank pressure at which the regulator drops out, Pa absolute.
    pub dropout_pa: f64,
    /// Fill temperature, K.
    pub fill_temperature_k: f64,
}

fn check_blowdown(b: &TankBlowdown) -> Result<(), PlotError> {
    const WHAT: &str = "tank blowdown";
    if b.points.len() < 2 {
        return Err(PlotError::Shape {
            what: WHAT,
            reason: "a curve needs at least 2 points",
        });
    }
    let flat: Vec<(f64, f64)> = b
        .points
        .iter()
        .flat_map(|p| [(p.0, p.1), (p.0, p.2)])
        .collect();
    check_points(WHAT, &flat)?;
    if !(b.dropout_pa.is_finite() && b.fill_temperature_k.is_finite()) {
        return Err(PlotError::Shape {
            what: WHAT,
            reason: "the dropout pressure and fill temperature must be finite",
        });
    }
    Ok(())
}

/// Tank pressure (bar absolute) against firing time through an adiabatic
/// blowdown, solid, with the regulator's dropout pressure as a dashed level: two
/// lines that cannot be mistaken for each other.
pub fn tank_pressure_svg(b: &TankBlowdown, s: &PlotSettings) -> Result<Plot, PlotError> {
    check_blowdown(b)?;
    let t_end = b.points.iter().map(|p| p.0).fold(0.0, f64::max);
    let curves = [
        Curve {
            name: "tank pressure, adiabatic blowdown",
            points: b.points.iter().map(|p| (p.0, p.1 / 1e5)).collect(),
            colour: SERIES[0],
            dashed: false,
        },
        Curve {
            name: "regulator drops out",
            points: vec![(0.0, b.dropout_pa / 1e5), (t_end, b.dropout_pa / 1e5)],
            colour: SERIES[1],
            dashed: true,
        },
    ];
    line_chart(
        s,
        &format!("Tank pressure: {}", b.layout),
        &format!("Firing time, {} (s)", b.firing),
        "Tank pressure (bar absolute)",
        &curves,
        true,
    )
}

/// Tank temperature (°C) against firing time through an adiabatic blowdown,
/// solid, with the fill temperature as a dashed level.
pub fn tank_temperature_svg(b: &TankBlowdown, s: &PlotSettings) -> Result<Plot, PlotError> {
    check_blowdown(b)?;
    let t_end = b.points.iter().map(|p| p.0).fold(0.0, f64::max);
    let c = |k: f64| k - 273.15;
    let curves = [
        Curve {
            name: "tank temperature, adiabatic blowdown",
            points: b.points.iter().map(|p| (p.0, c(p.2))).collect(),
            colour: SERIES[0],
            dashed: false,
        },
        Curve {
            name: "fill temperature",
            points: vec![
                (0.0, c(b.fill_temperature_k)),
                (t_end, c(b.fill_temperature_k)),
            ],
            colour: SERIES[1],
            dashed: true,
        },
    ];
    line_chart(
        s,
        &format!("Tank temperature: {}", b.layout),
        &format!("Firing time, {} (s)", b.firing),
        "Tank temperature (°C)",
        &curves,
        false,
    )
}

/// Best score so far against evaluations, drawn as steps (the best only changes
/// at an evaluation).
pub fn convergence_svg(conv: &Convergence, s: &PlotSettings) -> Result<Plot, PlotError> {
    const WHAT: &str = "convergence history";
    if conv.best.is_empty() {
        return Err(PlotError::Empty { what: WHAT });
    }
    check_points(WHAT, &conv.best)?;
    if conv.best.windows(2).any(|w| w[1].0 < w[0].0) {
        return Err(PlotError::Shape {
            what: WHAT,
            reason: "evaluation counts must not decrease",
        });
    }
    let mut steps = Vec::with_capacity(conv.best.len() * 2);
    for (i, &(x, y)) in conv.best.iter().enumerate() {
        if i > 0 {
            steps.push((x, conv.best[i - 1].1));
        }
        steps.push((x, y));
    }
    let curves = [Curve {
        name: "best so far",
        points: steps,
        colour: SERIES[0],
        dashed: false,
    }];
    line_chart(
        s,
        &format!("Search progress: {}", conv.layout),
        "Evaluations",
        &conv.score_label,
        &curves,
        false,
    )
}

// ---------------------------------------------------------------------------
// PNG

pub(crate) fn font_database() -> Arc<resvg::usvg::fontdb::Database> {
    static DB: OnceLock<Arc<resvg::usvg::fontdb::Database>> = OnceLock::new();
    DB.get_or_init(|| {
        let mut db = resvg::usvg::fontdb::Database::new();
        db.load_font_data(BUNDLED_FONT.to_vec());
        db.set_sans_serif_family(BUNDLED_FAMILY);
        Arc::new(db)
    })
    .clone()
}

/// Render an SVG document to PNG bytes at `scale` pixels per SVG pixel (0.1 to 8).
///
/// Text uses the bundled DejaVu Sans for every family. References to external
/// images are ignored, so rendering never reads files.
pub fn svg_to_png(svg: &str, scale: f32) -> Result<Vec<u8>, PlotError> {
    use resvg::{tiny_skia, usvg};
    if !(0.1..=8.0).contains(&scale) {
        return Err(PlotError::Setting {
            name: "scale",
            value: f64::from(scale),
            reason: "must be between 0.1 and 8",
        });
    }
    let options = usvg::Options {
        font_family: BUNDLED_FAMILY.to_string(),
        fontdb: font_database(),
        image_href_resolver: usvg::ImageHrefResolver {
            resolve_data: Box::new(|_, _, _| None),
            resolve_string: Box::new(|_, _| None),
        },
        ..usvg::Options::default()
    };
    let tree = usvg::Tree::from_str(svg, &options).map_err(|e| PlotError::Render(e.to_string()))?;
    let size = tree
        .size()
        .to_int_size()
        .scale_by(scale)
        .ok_or_else(|| PlotError::Render("picture size is zero".to_string()))?;
    let mut pixmap = tiny_skia::Pixmap::new(size.width(), size.height()).ok_or_else(|| {
        PlotError::Render(format!(
            "cannot allocate {}×{} pixels",
            size.width(),
            size.height()
        ))
    })?;
    pixmap.fill(tiny_skia::Color::WHITE);
    resvg::render(
        &tree,
        tiny_skia::Transform::from_scale(scale, scale),
        &mut pixmap.as_mut(),
    );
    pixmap
        .encode_png()
        .map_err(|e| PlotError::Render(e.to_string()))
}

// ---------------------------------------------------------------------------
// Marker and line charts for studies (trade study: Pareto set, property sweeps)

/// A set of markers, each with its own colour.
#[derive(Debug, Clone, PartialEq)]
pub struct MarkerSet {
    /// Legend text; empty for no legend entry.
    pub name: String,
    /// Points, axis units.
    pub points: Vec<(f64, f64)>,
    /// Colour of each point (RGB); one per point.
    pub colours: Vec<(u8, u8, u8)>,
    /// Marker radius, px.
    pub radius: u32,
    /// Filled discs, or rings.
    pub filled: bool,
}

/// A polyline.
#[derive(Debug, Clone, PartialEq)]
pub struct Polyline {
    /// Legend text; empty for no legend entry.
    pub name: String,
    /// Points, axis units, in drawing order.
    pub points: Vec<(f64, f64)>,
    /// Colour (RGB).
    pub colour: (u8, u8, u8),
    /// Dashed rather than solid.
    pub dashed: bool,
}

/// A chart of markers and lines with reference lines across or up.
#[derive(Debug, Clone, PartialEq)]
pub struct MarkerChart {
    /// Title.
    pub title: String,
    /// Description of the x axis, with its unit.
    pub x_desc: String,
    /// Description of the y axis, with its unit.
    pub y_desc: String,
    /// Marker sets, drawn in order (later on top).
    pub markers: Vec<MarkerSet>,
    /// Lines, drawn under the markers.
    pub lines: Vec<Polyline>,
    /// Horizontal reference lines: y value and legend text (dashed, in the disturbance colour).
    pub horizontal: Vec<(f64, String)>,
    /// Vertical reference lines: x value and legend text (dashed, muted).
    pub vertical: Vec<(f64, String)>,
}

/// Draw a [`MarkerChart`]; every value must be finite.
pub fn marker_chart_svg(c: &MarkerChart, s: &PlotSettings) -> Result<Plot, PlotError> {
    let mut xs: Vec<f64> = Vec::new();
    let mut ys: Vec<f64> = Vec::new();
    for m in &c.markers {
        check_points("marker", &m.points)?;
        xs.extend(m.points.iter().map(|p| p.0));
        ys.extend(m.points.iter().map(|p| p.1));
    }
    for l in &c.lines {
        check_points("line", &l.points)?;
        xs.extend(l.points.iter().map(|p| p.0));
        ys.extend(l.points.iter().map(|p| p.1));
    }
    check_values(
        "horizontal line",
        &c.horizontal.iter().map(|h| h.0).collect::<Vec<_>>(),
        false,
    )?;
    check_values(
        "vertical line",
        &c.vertical.iter().map(|v| v.0).collect::<Vec<_>>(),
        false,
    )?;
    xs.extend(c.vertical.iter().map(|v| v.0));
    ys.extend(c.horizontal.iter().map(|h| h.0));
    let lo = |v: &[f64]| v.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = |v: &[f64]| v.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let (x0, x1) = if xs.is_empty() {
        (0.0, 1.0)
    } else {
        (lo(&xs), hi(&xs))
    };
    let (y0, y1) = if ys.is_empty() {
        (0.0, 1.0)
    } else {
        (lo(&ys), hi(&ys))
    };
    let x = padded(x0, x1, false);
    let y = padded(y0.min(0.0), y1, true);
    let rgb = |c: (u8, u8, u8)| RGBColor(c.0, c.1, c.2);
    let mut legend: Vec<(Swatch, String)> = Vec::new();
    for l in c.lines.iter().filter(|l| !l.name.is_empty()) {
        legend.push((
            if l.dashed {
                Swatch::Dashed(rgb(l.colour))
            } else {
                Swatch::Line(rgb(l.colour))
            },
            l.name.clone(),
        ));
    }
    for m in c.markers.iter().filter(|m| !m.name.is_empty()) {
        let colour = m.colours.first().copied().map_or(INK, rgb);
        legend.push((Swatch::Fill(colour), m.name.clone()));
    }
    for (_, t) in c.horizontal.iter().filter(|h| !h.1.is_empty()) {
        legend.push((Swatch::Dashed(DISTURBANCE), t.clone()));
    }
    for (_, t) in c.vertical.iter().filter(|v| !v.1.is_empty()) {
        legend.push((Swatch::Dashed(MUTED), t.clone()));
    }
    render_svg(s, |root| {
        draw_band(root, s, &c.title, &legend)?;
        let (_, lower) = root.split_vertically(s.title_band_px);
        let mut chart = build_chart(&lower, s, s.y_label_area_px, x.clone(), y.clone())?;
        draw_mesh(&mut chart, s, &c.x_desc, &c.y_desc, 9)?;
        for (v, _) in &c.horizontal {
            chart
                .draw_series(std::iter::once(DashedPathElement::new(
                    vec![(x.start, *v), (x.end, *v)],
                    8,
                    5,
                    DISTURBANCE.stroke_width(2),
                )))
                .map_err(draw_err)?;
        }
        for (v, _) in &c.vertical {
            chart
                .draw_series(std::iter::once(DashedPathElement::new(
                    vec![(*v, y.start), (*v, y.end)],
                    6,
                    4,
                    MUTED.stroke_width(2),
                )))
                .map_err(draw_err)?;
        }
        for l in &c.lines {
            let style = rgb(l.colour).stroke_width(2);
            if l.dashed {
                chart
                    .draw_series(std::iter::once(DashedPathElement::new(
                        l.points.clone(),
                        8,
                        5,
                        style,
                    )))
                    .map_err(draw_err)?;
            } else {
                chart
                    .draw_series(std::iter::once(PathElement::new(l.points.clone(), style)))
                    .map_err(draw_err)?;
            }
        }
        for m in &c.markers {
            let r = m.radius.clamp(1, 20) as i32;
            chart
                .draw_series(m.points.iter().enumerate().map(|(k, &p)| {
                    let colour = m.colours.get(k).copied().map_or(INK, rgb);
                    let style = if m.filled {
                        colour.filled()
                    } else {
                        colour.stroke_width(2)
                    };
                    Circle::new(p, r, style)
                }))
                .map_err(draw_err)?;
        }
        Ok(vec![frame_of(&chart)])
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    /// Plotters places marks on whole pixels, so a mapped point may sit up to one
    /// pixel from the exact linear map (truncation plus the inclusive far edge).
    const PX_TOL: f64 = 1.0;

    fn doc(svg: &str) -> roxmltree::Document<'_> {
        roxmltree::Document::parse(svg).expect("the SVG parses as XML")
    }

    fn elements<'a>(d: &'a roxmltree::Document<'a>, tag: &str) -> Vec<roxmltree::Node<'a, 'a>> {
        d.descendants()
            .filter(|n| n.is_element() && n.tag_name().name() == tag)
            .collect()
    }

    fn texts(d: &roxmltree::Document<'_>) -> Vec<String> {
        elements(d, "text")
            .iter()
            .map(|n| n.text().unwrap_or("").trim().to_string())
            .collect()
    }

    fn points(n: &roxmltree::Node<'_, '_>) -> Vec<(f64, f64)> {
        n.attribute("points")
            .unwrap()
            .split_whitespace()
            .map(|p| {
                let (x, y) = p.split_once(',').unwrap();
                (x.parse().unwrap(), y.parse().unwrap())
            })
            .collect()
    }

    fn num(n: &roxmltree::Node<'_, '_>, attr: &str) -> f64 {
        n.attribute(attr).unwrap().parse().unwrap()
    }

    fn hex(c: RGBColor) -> String {
        format!("#{:02X}{:02X}{:02X}", c.0, c.1, c.2)
    }

    /// The plotting area the default settings must give, worked out from the
    /// layout rules alone: (left, top, right, bottom).
    fn expected_area(s: &PlotSettings) -> (i32, i32, i32, i32) {
        let left = (s.margin_px + s.y_label_area_px) as i32;
        let top = (s.title_band_px + s.margin_px) as i32;
        let right = (s.width_px - s.margin_px) as i32;
        let bottom = (s.height_px - s.margin_px - s.x_label_area_px) as i32;
        (left, top, right, bottom)
    }

    /// Expected pixel of a data point from the frame's edges and ranges.
    fn expected_px(f: &Frame, x: f64, y: f64) -> (f64, f64) {
        let (l, r) = (f64::from(f.left_px), f64::from(f.right_px - 1));
        let (t, b) = (f64::from(f.top_px), f64::from(f.bottom_px - 1));
        (
            l + (x - f.x_range.0) / (f.x_range.1 - f.x_range.0) * (r - l),
            b - (y - f.y_range.0) / (f.y_range.1 - f.y_range.0) * (b - t),
        )
    }

    fn near(got: (f64, f64), want: (f64, f64)) -> bool {
        (got.0 - want.0).abs() <= PX_TOL && (got.1 - want.1).abs() <= PX_TOL
    }

    fn slice() -> EnvelopeSlice {
        EnvelopeSlice {
            layout: "test-54mm".to_string(),
            state: "liftoff".to_string(),
            plane: Plane::RollPitch,
            outline_n_m: vec![
                (-0.03, -0.12),
                (0.01, -0.15),
                (0.03, -0.05),
                (0.03, 0.12),
                (-0.01, 0.15),
                (-0.03, 0.05),
            ],
            required_n_m: (0.012, 0.08),
            disturbances_n_m: vec![(0.004, 0.02)],
        }
    }

    #[test]
    fn default_settings_are_valid_and_fonts_below_12_px_are_refused() {
        assert_eq!(PlotSettings::default().validate(), Ok(()));
        let small = PlotSettings {
            tick_font_px: 10.0,
            ..PlotSettings::default()
        };
        assert!(matches!(
            small.validate(),
            Err(PlotError::Setting {
                name: "tick_font_px",
                ..
            })
        ));
        let cramped = PlotSettings {
            height_px: 200,
            ..PlotSettings::default()
        };
        assert!(matches!(
            cramped.validate(),
            Err(PlotError::Setting {
                name: "height_px",
                ..
            })
        ));
    }

    #[test]
    fn envelope_has_size_title_labels_and_readable_text() {
        let s = PlotSettings::default();
        let plot = torque_envelope_svg(&slice(), &s).unwrap();
        let d = doc(&plot.svg);
        let root = d.root_element();
        assert_eq!(root.tag_name().name(), "svg");
        assert_eq!(root.attribute("width"), Some("720"));
        assert_eq!(root.attribute("height"), Some("480"));
        let t = texts(&d);
        for want in [
            "Attainable torque, roll–pitch plane: test-54mm, liftoff",
            "Roll torque (mN·m)",
            "Pitch torque (mN·m)",
            "attainable",
            "required",
            "disturbance",
        ] {
            assert!(
                t.iter().any(|x| x == want),
                "missing text {want:?} in {t:?}"
            );
        }
        for n in elements(&d, "text") {
            let size = num(&n, "font-size");
            assert!(size >= MIN_FONT_PX - 1e-9, "font-size {size} below 12 px");
        }
    }

    #[test]
    fn envelope_outline_lands_where_the_axis_ranges_say() {
        let s = PlotSettings::default();
        let sl = slice();
        let plot = torque_envelope_svg(&sl, &s).unwrap();
        assert_eq!(plot.frames.len(), 1);
        let f = plot.frames[0];
        let (l, t, r, b) = expected_area(&s);
        assert_eq!((f.left_px, f.top_px, f.right_px, f.bottom_px), (l, t, r, b));
        // Centred on zero and the same mN·m per pixel on both axes.
        assert_relative_eq!(f.x_range.0, -f.x_range.1);
        assert_relative_eq!(f.y_range.0, -f.y_range.1);
        let per_px_x = (f.x_range.1 - f.x_range.0) / f64::from(r - l);
        let per_px_y = (f.y_range.1 - f.y_range.0) / f64::from(b - t);
        assert_relative_eq!(per_px_x, per_px_y, max_relative = 1e-12);
        // The tallest vertex (150 mN·m) sits inside the range with the padding.
        assert_relative_eq!(f.y_range.1, 150.0 * 1.12, max_relative = 1e-12);

        let d = doc(&plot.svg);
        let polys = elements(&d, "polygon");
        assert_eq!(polys.len(), 1);
        let pts = points(&polys[0]);
        assert_eq!(pts.len(), sl.outline_n_m.len());
        for (got, &(x, y)) in pts.iter().zip(&sl.outline_n_m) {
            let want = expected_px(&f, x * 1e3, y * 1e3);
            assert!(
                near(*got, want),
                "vertex ({x}, {y}) N·m at {got:?}, expected {want:?}"
            );
            assert!(near(*got, f.to_pixel(x * 1e3, y * 1e3)));
        }
        // The closed outline repeats its first vertex.
        let outline = elements(&d, "polyline")
            .into_iter()
            .find(|n| points(n).len() == sl.outline_n_m.len() + 1)
            .expect("closed outline");
        let op = points(&outline);
        assert_eq!(op.first(), op.last());
    }

    #[test]
    fn disturbance_cross_is_centred_on_its_torque() {
        let s = PlotSettings::default();
        let sl = slice();
        let plot = torque_envelope_svg(&sl, &s).unwrap();
        let f = plot.frames[0];
        let (x, y) = sl.disturbances_n_m[0];
        let want = expected_px(&f, x * 1e3, y * 1e3);
        let d = doc(&plot.svg);
        let centres: Vec<(f64, f64)> = elements(&d, "line")
            .iter()
            .filter(|n| n.attribute("stroke") == Some(hex(DISTURBANCE).as_str()))
            .map(|n| {
                (
                    (num(n, "x1") + num(n, "x2")) / 2.0,
                    (num(n, "y1") + num(n, "y2")) / 2.0,
                )
            })
            .collect();
        // The legend swatch is a cross too; the marker is the one inside the frame.
        let inside: Vec<_> = centres
            .iter()
            .filter(|c| c.1 > f64::from(f.top_px))
            .collect();
        assert_eq!(inside.len(), 2, "two strokes of one cross: {centres:?}");
        for c in inside {
            assert!(near(*c, want), "cross centre {c:?}, expected {want:?}");
        }
    }

    #[test]
    fn fitted_envelope_scales_each_axis_to_its_own_extent() {
        let s = PlotSettings {
            envelope_equal_scale: false,
            ..PlotSettings::default()
        };
        let plot = torque_envelope_svg(&slice(), &s).unwrap();
        let f = plot.frames[0];
        assert_relative_eq!(f.x_range.1, 30.0 * 1.12, max_relative = 1e-12);
        assert_relative_eq!(f.y_range.1, 150.0 * 1.12, max_relative = 1e-12);
    }

    #[test]
    fn user_text_is_escaped_in_the_svg() {
        let mut sl = slice();
        sl.layout = "<a & b>".to_string();
        let plot = torque_envelope_svg(&sl, &PlotSettings::default()).unwrap();
        assert!(!plot.svg.contains("<a & b>"));
        let d = doc(&plot.svg);
        assert!(texts(&d).iter().any(|t| t.contains("<a & b>")));
    }

    #[test]
    fn envelope_input_errors_are_values() {
        let s = PlotSettings::default();
        let mut sl = slice();
        sl.outline_n_m.truncate(2);
        assert!(matches!(
            torque_envelope_svg(&sl, &s),
            Err(PlotError::Shape { .. })
        ));
        let mut sl = slice();
        sl.outline_n_m[4].1 = f64::NAN;
        assert_eq!(
            torque_envelope_svg(&sl, &s),
            Err(PlotError::NotFinite {
                what: "torque envelope outline",
                index: 4
            })
        );
        let mut sl = slice();
        sl.required_n_m.0 = -1.0;
        assert!(matches!(
            torque_envelope_svg(&sl, &s),
            Err(PlotError::Shape { .. })
        ));
    }

    #[test]
    fn plots_are_deterministic() {
        let s = PlotSettings::default();
        let a = torque_envelope_svg(&slice(), &s).unwrap();
        let b = torque_envelope_svg(&slice(), &s).unwrap();
        assert_eq!(a, b);
    }

    fn authority() -> AuthorityBars {
        AuthorityBars {
            layout: "test-54mm".to_string(),
            states: vec![
                StateAuthority {
                    state: "liftoff".to_string(),
                    achieved_deg_s2: [2500.0, 90.0, 85.0],
                    required_deg_s2: [57.3, 57.3, 57.3],
                },
                StateAuthority {
                    state: "coast".to_string(),
                    achieved_deg_s2: [2900.0, 120.0, 118.0],
                    required_deg_s2: [57.3, 60.0, 0.0],
                },
            ],
        }
    }

    #[test]
    fn authority_panels_have_bars_and_requirement_lines_at_their_values() {
        let s = PlotSettings::default();
        let a = authority();
        let plot = authority_bars_svg(&a, &s).unwrap();
        assert_eq!(plot.frames.len(), 3);
        let d = doc(&plot.svg);
        let t = texts(&d);
        for want in [
            "Angular acceleration per axis: test-54mm",
            "Angular acceleration (deg/s²)",
            "Roll",
            "Pitch",
            "Yaw",
            "liftoff",
            "coast",
            "90.0",
            "2900",
        ] {
            assert!(t.iter().any(|x| x == want), "missing text {want:?}");
        }
        let rects = elements(&d, "rect");
        for (k, f) in plot.frames.iter().enumerate() {
            // Each panel's range covers its largest value.
            let top = a
                .states
                .iter()
                .flat_map(|st| [st.achieved_deg_s2[k], st.required_deg_s2[k]])
                .fold(0.0, f64::max);
            assert!(f.y_range.1 > top && f.y_range.0 == 0.0);
            for (i, st) in a.states.iter().enumerate() {
                let colour = hex(SERIES[i]);
                let bar = rects
                    .iter()
                    .find(|n| {
                        n.attribute("fill") == Some(colour.as_str())
                            && num(n, "x") >= f64::from(f.left_px)
                            && num(n, "x") < f64::from(f.right_px)
                            && num(n, "y") >= f64::from(f.top_px)
                    })
                    .expect("a bar per state and panel");
                let want = expected_px(f, i as f64 + 0.15, st.achieved_deg_s2[k]);
                assert!(
                    near((num(bar, "x"), num(bar, "y")), want),
                    "panel {k} state {i}"
                );
                let base = expected_px(f, 0.0, 0.0).1;
                let bottom = num(bar, "y") + num(bar, "height");
                assert!((bottom - base).abs() <= PX_TOL, "bar stands on zero");
            }
        }
        // Requirement lines: one per state and axis with a non-zero requirement.
        let ink = hex(INK);
        let lines: Vec<_> = elements(&d, "polyline")
            .into_iter()
            .filter(|n| n.attribute("stroke") == Some(ink.as_str()) && points(n).len() == 2)
            .map(|n| points(&n))
            // Horizontal and strictly inside a panel: not a tick mark or an axis line.
            .filter(|p| {
                p[0].1 == p[1].1
                    && plot.frames.iter().any(|f| {
                        p[0].0 > f64::from(f.left_px)
                            && p[1].0 < f64::from(f.right_px - 1)
                            && p[0].1 > f64::from(f.top_px)
                    })
            })
            .collect();
        assert_eq!(lines.len(), 5, "{lines:?}");
        let pitch = plot.frames[1];
        let want = expected_px(&pitch, 1.05, 60.0);
        assert!(
            lines.iter().any(|p| near(p[0], want)),
            "coast pitch requirement at {want:?}"
        );
    }

    #[test]
    fn authority_needs_states_and_finite_values() {
        let s = PlotSettings::default();
        let empty = AuthorityBars {
            layout: "x".to_string(),
            states: vec![],
        };
        assert!(matches!(
            authority_bars_svg(&empty, &s),
            Err(PlotError::Empty { .. })
        ));
        let mut a = authority();
        a.states[1].achieved_deg_s2[2] = f64::INFINITY;
        assert!(matches!(
            authority_bars_svg(&a, &s),
            Err(PlotError::NotFinite { index: 2, .. })
        ));
    }

    #[test]
    fn port_thrust_bars_match_their_values_and_names() {
        let s = PlotSettings::default();
        let pt = PortThrust {
            layout: "test-54mm".to_string(),
            state: "coast".to_string(),
            ports: vec![
                ("fore-1".to_string(), 1.21),
                ("fore-2".to_string(), 1.2),
                ("aft-1".to_string(), 1.05),
                ("aft-2".to_string(), 0.0),
            ],
        };
        let plot = port_thrust_svg(&pt, &s).unwrap();
        let f = plot.frames[0];
        let d = doc(&plot.svg);
        let t = texts(&d);
        for want in [
            "Thrust per port: test-54mm, coast",
            "Thrust (N)",
            "fore-1",
            "aft-2",
            "1.21",
        ] {
            assert!(t.iter().any(|x| x == want), "missing text {want:?}");
        }
        let colour = hex(SERIES[0]);
        let bars: Vec<_> = elements(&d, "rect")
            .into_iter()
            .filter(|n| n.attribute("fill") == Some(colour.as_str()))
            .collect();
        assert_eq!(bars.len(), 4);
        for (i, (bar, (_, v))) in bars.iter().zip(&pt.ports).enumerate() {
            let want = expected_px(&f, i as f64 + 0.2, *v);
            assert!(near((num(bar, "x"), num(bar, "y")), want), "port {i}");
        }
        let neg = PortThrust {
            ports: vec![("a".to_string(), -0.1)],
            ..pt
        };
        assert!(matches!(
            port_thrust_svg(&neg, &s),
            Err(PlotError::Shape { .. })
        ));
    }

    #[test]
    fn gas_curves_run_from_the_inventory_down() {
        let s = PlotSettings::default();
        let g = GasRemaining {
            layout: "test-54mm".to_string(),
            firing: "all ports open".to_string(),
            isothermal_kg: vec![(0.0, 0.046), (3.0, 0.03), (7.4, 0.004)],
            adiabatic_kg: vec![(0.0, 0.046), (5.1, 0.017)],
        };
        let plot = gas_remaining_svg(&g, &s).unwrap();
        let f = plot.frames[0];
        assert_eq!(f.x_range, (0.0, 7.4));
        assert_eq!(f.y_range.0, 0.0);
        let d = doc(&plot.svg);
        let t = texts(&d);
        for want in [
            "Gas remaining: test-54mm",
            "Firing time, all ports open (s)",
            "Gas in the tank (g)",
            "isothermal bound",
            "adiabatic bound",
        ] {
            assert!(t.iter().any(|x| x == want), "missing text {want:?}");
        }
        let colour = hex(SERIES[0]);
        let iso = elements(&d, "polyline")
            .into_iter()
            .find(|n| n.attribute("stroke") == Some(colour.as_str()) && points(n).len() == 3)
            .expect("the isothermal curve");
        for (got, &(t, m)) in points(&iso).iter().zip(&g.isothermal_kg) {
            let want = expected_px(&f, t, m * 1e3);
            assert!(
                near(*got, want),
                "({t} s, {m} kg) at {got:?}, expected {want:?}"
            );
        }
        let bad = GasRemaining {
            adiabatic_kg: vec![(0.0, 0.046)],
            ..g
        };
        assert!(matches!(
            gas_remaining_svg(&bad, &s),
            Err(PlotError::Shape { .. })
        ));
    }

    #[test]
    fn best_so_far_keeps_the_best_and_skips_failures() {
        let scores = [f64::NAN, 3.0, 4.0, 2.5, f64::INFINITY, 2.7, 1.0];
        assert_eq!(
            best_so_far(&scores, Sense::Minimise),
            vec![
                (2.0, 3.0),
                (3.0, 3.0),
                (4.0, 2.5),
                (5.0, 2.5),
                (6.0, 2.5),
                (7.0, 1.0)
            ]
        );
        assert_eq!(
            best_so_far(&scores, Sense::Maximise)
                .iter()
                .map(|p| p.1)
                .collect::<Vec<_>>(),
            vec![3.0, 4.0, 4.0, 4.0, 4.0, 4.0]
        );
        assert!(best_so_far(&[f64::NAN], Sense::Minimise).is_empty());
    }

    #[test]
    fn convergence_draws_steps_through_every_best() {
        let s = PlotSettings::default();
        let c = Convergence {
            layout: "test-54mm".to_string(),
            score_label: "Gas per manoeuvre (g)".to_string(),
            best: best_so_far(&[5.0, 4.0, 4.5, 2.0], Sense::Minimise),
        };
        let plot = convergence_svg(&c, &s).unwrap();
        let f = plot.frames[0];
        let d = doc(&plot.svg);
        assert!(texts(&d).iter().any(|t| t == "Gas per manoeuvre (g)"));
        assert!(texts(&d).iter().any(|t| t == "Evaluations"));
        let colour = hex(SERIES[0]);
        let line = elements(&d, "polyline")
            .into_iter()
            .find(|n| n.attribute("stroke") == Some(colour.as_str()) && points(n).len() > 2)
            .expect("the step line");
        let p = points(&line);
        assert_eq!(p.len(), 2 * c.best.len() - 1);
        // The step down at evaluation 4: first across at the old best, then down.
        assert!(near(p[5], expected_px(&f, 4.0, 4.0)));
        assert!(near(p[6], expected_px(&f, 4.0, 2.0)));
        let backwards = Convergence {
            best: vec![(2.0, 1.0), (1.0, 0.5)],
            ..c
        };
        assert!(matches!(
            convergence_svg(&backwards, &s),
            Err(PlotError::Shape { .. })
        ));
    }

    #[test]
    fn labels_are_short_and_have_no_negative_zero() {
        assert_eq!(tick_label(&150.0), "150");
        assert_eq!(tick_label(&-0.0), "0");
        assert_eq!(tick_label(&(0.1 + 0.2)), "0.3");
        assert_eq!(tick_label(&-2.5), "-2.5");
        assert_eq!(short_number(2900.4), "2900");
        assert_eq!(short_number(90.0), "90.0");
        assert_eq!(short_number(0.98), "0.980");
        assert_eq!(short_number(-0.0001), "0.000");
    }

    fn decode(png_bytes: &[u8]) -> (u32, u32, Vec<u8>) {
        let decoder = png::Decoder::new(std::io::Cursor::new(png_bytes));
        let mut reader = decoder.read_info().expect("PNG header");
        let mut buf = vec![0; reader.output_buffer_size().unwrap()];
        let info = reader.next_frame(&mut buf).expect("PNG data");
        assert_eq!(info.color_type, png::ColorType::Rgba);
        buf.truncate(info.buffer_size());
        (info.width, info.height, buf)
    }

    #[test]
    fn png_has_the_plot_size_and_renders_the_title_text() {
        let plot = torque_envelope_svg(&slice(), &PlotSettings::default()).unwrap();
        let bytes = plot.to_png(1.0).unwrap();
        assert_eq!(&bytes[..8], b"\x89PNG\r\n\x1a\n");
        let (w, h, px) = decode(&bytes);
        assert_eq!((w, h), (720, 480));
        // Only the title is drawn in the top 30 px of the middle: dark pixels there
        // mean the bundled font was found and its glyphs were filled.
        let dark = (4..30)
            .flat_map(|y| (200..520).map(move |x| (x, y)))
            .filter(|&(x, y)| {
                let i = ((y * w + x) * 4) as usize;
                u32::from(px[i]) + u32::from(px[i + 1]) + u32::from(px[i + 2]) < 300
            })
            .count();
        assert!(dark > 200, "only {dark} dark pixels in the title band");
        let (w2, h2, _) = decode(&plot.to_png(2.0).unwrap());
        assert_eq!((w2, h2), (1440, 960));
    }

    #[test]
    fn png_errors_are_values() {
        assert!(matches!(svg_to_png("<svg", 1.0), Err(PlotError::Render(_))));
        let plot = port_thrust_svg(
            &PortThrust {
                layout: "x".to_string(),
                state: "y".to_string(),
                ports: vec![("a".to_string(), 1.0)],
            },
            &PlotSettings::default(),
        )
        .unwrap();
        assert!(matches!(
            plot.to_png(0.0),
            Err(PlotError::Setting { name: "scale", .. })
        ));
    }
}

/// One line of [`time_series_svg`].
#[derive(Debug, Clone, PartialEq)]
pub struct SeriesLine {
    /// Legend text.
    pub name: String,
    /// (x, y) points.
    pub points: Vec<(f64, f64)>,
    /// Drawn dashed.
    pub dashed: bool,
}

/// Up to six lines against time (the simulation's outputs), coloured in order.
pub fn time_series_svg(
    s: &PlotSettings,
    title: &str,
    x_desc: &str,
    y_desc: &str,
    lines: &[SeriesLine],
) -> Result<Plot, PlotError> {
    const WHAT: &str = "time series";
    if lines.is_empty() || lines.len() > SERIES.len() {
        return Err(PlotError::Shape {
            what: WHAT,
            reason: "a time-series plot holds one to six lines",
        });
    }
    for l in lines {
        if l.points.len() < 2 {
            return Err(PlotError::Shape {
                what: WHAT,
                reason: "a line needs at least 2 points",
            });
        }
        check_points(WHAT, &l.points)?;
    }
    let curves: Vec<Curve<'_>> = lines
        .iter()
        .enumerate()
        .map(|(i, l)| Curve {
            name: &l.name,
            points: l.points.clone(),
            colour: SERIES[i],
            dashed: l.dashed,
        })
        .collect();
    line_chart(s, title, x_desc, y_desc, &curves, false)
}
