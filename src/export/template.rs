//! The drilling template: the tube's outer surface unrolled at 1:1 as SVG, to print,
//! wrap round the tube and drill through.
//!
//! Paper coordinates are millimetres. On the unrolled surface, x is the arc length
//! from the reference line, `clock × outer radius`, growing to the right, and y is the
//! station below the top station of the sheet, growing downward. Wrapped printed side
//! out with the top toward the nose, right on the paper is the direction of growing
//! clock angle: clockwise seen from behind the tail looking toward the nose.
//!
//! The whole drawing is first laid out on one sheet (notes and rulers above the
//! surface, a glue strip to its right). When the sheet does not fit the paper it is
//! cut into a grid of overlapping pages; every page repeats the whole drawing, shifted
//! and clipped to its window, so each page is a complete SVG of its own. Alignment
//! crosses sit in the overlaps so neighbouring pages can be lined up.
//!
//! Every number is written with three decimals so the text is the same for the same
//! design, ready to be compared against committed files.

use super::{fmt3, ExportError};
use crate::model::{Design, Port, Zone};
use std::f64::consts::TAU;
use std::fmt::Write as _;

/// Paper size.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Paper {
    /// ISO A4, 210 × 297 mm.
    A4,
    /// US Letter, 8.5 × 11 in (215.9 × 279.4 mm).
    Letter,
}

impl Paper {
    /// Portrait width and height, mm.
    pub fn size_mm(self) -> (f64, f64) {
        match self {
            Paper::A4 => (210.0, 297.0),
            Paper::Letter => (215.9, 279.4),
        }
    }
}

/// Which way up the paper is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Orientation {
    /// Long side vertical.
    Portrait,
    /// Long side horizontal.
    Landscape,
}

/// Units of the station ticks and labels.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum TickUnits {
    /// Ticks every 10 mm, labels in mm.
    Millimetres,
    /// Ticks every 1/2 in, labels in inches.
    Inches,
}

/// How the template is laid out.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TemplateSettings {
    /// Paper size.
    pub paper: Paper,
    /// Paper orientation.
    pub orientation: Orientation,
    /// Unprinted border on every side of the paper, mm.
    pub margin_mm: f64,
    /// Width shared by neighbouring pages, mm.
    pub page_overlap_mm: f64,
    /// Draw one sheet as big as the drawing (for a plotter) instead of paper pages.
    pub single_sheet: bool,
    /// Units of the station ticks.
    pub ticks: TickUnits,
    /// Width of the glue strip beyond clock 360°, mm.
    pub glue_strip_mm: f64,
    /// Surface shown above the first and below the last port, mm.
    pub station_margin_mm: f64,
    /// Fins whose roots come within this distance of the ports are included, mm.
    pub fin_reach_mm: f64,
}

impl Default for TemplateSettings {
    fn default() -> Self {
        Self {
            paper: Paper::A4,
            orientation: Orientation::Portrait,
            margin_mm: 10.0,
            page_overlap_mm: 15.0,
            single_sheet: false,
            ticks: TickUnits::Millimetres,
            glue_strip_mm: 15.0,
            station_margin_mm: 25.0,
            fin_reach_mm: 60.0,
        }
    }
}

/// Height of the strip at the bottom of each paper page that holds its label, mm.
const PAGE_LABEL_MM: f64 = 5.0;
/// Pitch of the note lines, mm.
const NOTE_PITCH_MM: f64 = 3.3;
/// Baseline of the millimetre ruler (below ten note lines), mm.
const RULER_MM_Y: f64 = 49.0;
/// Baseline of the inch ruler, mm.
const RULER_IN_Y: f64 = 62.0;
/// Height of the notes-and-rulers block above the surface, mm.
const HEADER_MM: f64 = 74.0;
/// Narrowest sheet, so the notes and the 4 in ruler fit, mm.
const HEADER_WIDTH_MM: f64 = 140.0;
/// Space below the surface, mm.
const FOOT_MM: f64 = 6.0;
/// Left end of both calibration rulers on the sheet, mm.
const RULER_X_MM: f64 = 2.0;

/// One page's window onto the sheet, mm in sheet coordinates.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PageWindow {
    /// Row, from 1 at the top.
    pub row: usize,
    /// Column, from 1 at the left.
    pub column: usize,
    /// Left edge on the sheet, mm.
    pub x_mm: f64,
    /// Top edge on the sheet, mm.
    pub y_mm: f64,
}

/// Where everything goes: the sheet, the surface on it and the pages.
#[derive(Debug, Clone, PartialEq)]
pub struct SheetLayout {
    /// Station at the top edge of the surface, m.
    pub top_station_m: f64,
    /// Station at the bottom edge of the surface, m.
    pub bottom_station_m: f64,
    /// Outer radius of the tube, mm.
    pub radius_mm: f64,
    /// Width of the unrolled surface, π × outer diameter, mm.
    pub wrap_mm: f64,
    /// Top of the surface on the sheet, mm (its left edge is at x = 0).
    pub surface_top_mm: f64,
    /// Sheet width, mm.
    pub width_mm: f64,
    /// Sheet height, mm.
    pub height_mm: f64,
    /// Size of each page, mm.
    pub page_mm: (f64, f64),
    /// Top-left corner of each page's window on the paper, mm (the printable margin).
    pub window_origin_mm: (f64, f64),
    /// Size of each page's window onto the sheet, mm.
    pub window_mm: (f64, f64),
    /// Rows and columns of pages.
    pub grid: (usize, usize),
    /// Pages, row by row.
    pub pages: Vec<PageWindow>,
}

impl SheetLayout {
    /// Sheet position of a point on the surface, mm.
    pub fn point_mm(&self, station_m: f64, clock_rad: f64) -> (f64, f64) {
        (
            clock_rad.rem_euclid(TAU) * self.radius_mm,
            self.surface_top_mm + (station_m - self.top_station_m) * 1000.0,
        )
    }

    fn step_mm(&self, overlap: f64) -> (f64, f64) {
        (self.window_mm.0 - overlap, self.window_mm.1 - overlap)
    }
}

fn setting(
    name: &'static str,
    value: f64,
    ok: bool,
    reason: &'static str,
) -> Result<(), ExportError> {
    if ok && value.is_finite() {
        Ok(())
    } else {
        Err(ExportError::Setting {
            name,
            value,
            reason,
        })
    }
}

/// Lay out the sheet and its pages.
pub fn sheet_layout(design: &Design, s: &TemplateSettings) -> Result<SheetLayout, ExportError> {
    setting("margin_mm", s.margin_mm, s.margin_mm >= 0.0, "≥ 0")?;
    setting(
        "glue_strip_mm",
        s.glue_strip_mm,
        s.glue_strip_mm >= 0.0,
        "≥ 0",
    )?;
    setting(
        "station_margin_mm",
        s.station_margin_mm,
        s.station_margin_mm >= 0.0,
        "≥ 0",
    )?;
    setting("fin_reach_mm", s.fin_reach_mm, s.fin_reach_mm >= 0.0, "≥ 0")?;
    let a = &design.airframe;
    if design.ports.is_empty() {
        return Err(ExportError::NoPorts);
    }
    if !(a.outer_diameter_m > 0.0 && a.outer_diameter_m.is_finite()) {
        return Err(ExportError::Airframe {
            field: "outer_diameter_m",
            value: a.outer_diameter_m,
            reason: "must be a finite length > 0",
        });
    }
    let stations = design.ports.iter().map(|p| p.station_m);
    let (mut lo, mut hi) = stations.fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), v| {
        (l.min(v), h.max(v))
    });
    if !lo.is_finite() || !hi.is_finite() {
        return Err(ExportError::Setting {
            name: "port station",
            value: lo,
            reason: "finite",
        });
    }
    if let Some(f) = &a.fins {
        let (fl, fh) = (f.station_m, f.station_m + f.root_chord_m);
        let reach = s.fin_reach_mm / 1000.0;
        if fl <= hi + reach && fh >= lo - reach {
            lo = lo.min(fl);
            hi = hi.max(fh);
        }
    }
    let margin = s.station_margin_mm / 1000.0;
    let top = (lo - margin).max(a.tube_fore_station_m()).min(lo);
    let bottom = (hi + margin).min(a.tube_aft_station_m()).max(hi);
    let radius_mm = 500.0 * a.outer_diameter_m;
    let wrap_mm = std::f64::consts::PI * 1000.0 * a.outer_diameter_m;
    let surface_h = (bottom - top) * 1000.0;
    let width_mm = (wrap_mm + s.glue_strip_mm).max(HEADER_WIDTH_MM);
    let height_mm = HEADER_MM + surface_h + FOOT_MM;

    let (pw, ph) = match s.orientation {
        Orientation::Portrait => s.paper.size_mm(),
        Orientation::Landscape => {
            let (w, h) = s.paper.size_mm();
            (h, w)
        }
    };
    let m = s.margin_mm;
    let mut layout = SheetLayout {
        top_station_m: top,
        bottom_station_m: bottom,
        radius_mm,
        wrap_mm,
        surface_top_mm: HEADER_MM,
        width_mm,
        height_mm,
        page_mm: (width_mm + 2.0 * m, height_mm + 2.0 * m),
        window_origin_mm: (m, m),
        window_mm: (width_mm, height_mm),
        grid: (1, 1),
        pages: vec![PageWindow {
            row: 1,
            column: 1,
            x_mm: 0.0,
            y_mm: 0.0,
        }],
    };
    if s.single_sheet {
        return Ok(layout);
    }
    let (ww, wh) = (pw - 2.0 * m, ph - 2.0 * m - PAGE_LABEL_MM);
    setting(
        "margin_mm",
        s.margin_mm,
        ww > 50.0 && wh > 50.0,
        "small enough to leave at least 50 mm of printable paper",
    )?;
    let o = s.page_overlap_mm;
    setting(
        "page_overlap_mm",
        o,
        o >= 0.0 && o <= 0.25 * ww.min(wh),
        "≥ 0 and at most a quarter of the printable width",
    )?;
    let count = |total: f64, window: f64| {
        if total <= window {
            1
        } else {
            ((total - o) / (window - o)).ceil() as usize
        }
    };
    let (rows, cols) = (count(height_mm, wh), count(width_mm, ww));
    layout.page_mm = (pw, ph);
    layout.window_mm = (ww, wh);
    layout.grid = (rows, cols);
    let (sx, sy) = layout.step_mm(o);
    layout.pages = (0..rows)
        .flat_map(|r| {
            (0..cols).map(move |c| PageWindow {
                row: r + 1,
                column: c + 1,
                x_mm: c as f64 * sx,
                y_mm: r as f64 * sy,
            })
        })
        .collect();
    Ok(layout)
}

fn esc(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for ch in text.chars() {
        match ch {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&apos;"),
            _ => out.push(ch),
        }
    }
    out
}

/// Estimated advance of one character, in ems, used to size every label's box.
/// DejaVu Sans (the face bundled for rendering) has digits of 0.636 em and most
/// lower-case letters narrower (from memory); 0.64 em bounds typical label text.
pub const TEXT_EM_WIDTH: f64 = 0.64;
/// Height of a label's box above its baseline, in ems (DejaVu Sans ascender
/// 0.76 em, rounded up; from memory).
pub const TEXT_ASCENT_EM: f64 = 0.8;
/// Depth of a label's box below its baseline, in ems (descender 0.24 em; from memory).
pub const TEXT_DESCENT_EM: f64 = 0.25;
/// Least gap kept between the boxes of any two printed marks or labels, mm.
pub const CLEARANCE_MM: f64 = 0.5;

/// An axis-aligned box on the sheet, mm.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Bounds {
    /// Left.
    pub x0: f64,
    /// Top.
    pub y0: f64,
    /// Right.
    pub x1: f64,
    /// Bottom.
    pub y1: f64,
}

impl Bounds {
    /// The box from two corners in any order.
    pub fn new(xa: f64, ya: f64, xb: f64, yb: f64) -> Self {
        Bounds {
            x0: xa.min(xb),
            y0: ya.min(yb),
            x1: xa.max(xb),
            y1: ya.max(yb),
        }
    }
    /// The smallest box holding both.
    pub fn union(self, o: Bounds) -> Bounds {
        Bounds {
            x0: self.x0.min(o.x0),
            y0: self.y0.min(o.y0),
            x1: self.x1.max(o.x1),
            y1: self.y1.max(o.y1),
        }
    }
    /// Gap between two boxes: the larger of the horizontal and vertical gaps,
    /// negative when they overlap.
    pub fn gap(self, o: Bounds) -> f64 {
        let dx = (o.x0 - self.x1).max(self.x0 - o.x1);
        let dy = (o.y0 - self.y1).max(self.y0 - o.y1);
        dx.max(dy)
    }
    /// Whether `self` lies inside `o`.
    pub fn inside(self, o: Bounds) -> bool {
        self.x0 >= o.x0 && self.y0 >= o.y0 && self.x1 <= o.x1 && self.y1 <= o.y1
    }
}

/// How a text line is anchored at its point.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Anchor {
    Start,
    Middle,
}

/// Box of one text line at (x, y) (baseline), horizontal or turned 90° clockwise.
fn text_bounds(x: f64, y: f64, size: f64, body: &str, anchor: Anchor, turned: bool) -> Bounds {
    let w = TEXT_EM_WIDTH * size * body.chars().count() as f64;
    let start = match anchor {
        Anchor::Start => 0.0,
        Anchor::Middle => -0.5 * w,
    };
    let (up, down) = (TEXT_ASCENT_EM * size, TEXT_DESCENT_EM * size);
    if turned {
        // rotate(90): the text runs down the page and its top faces +x.
        Bounds::new(x - down, y + start, x + up, y + start + w)
    } else {
        Bounds::new(x + start, y - up, x + start + w, y + down)
    }
}

/// Writes SVG elements with fixed number formatting.
struct Svg(String);

impl Svg {
    fn line(&mut self, class: &str, x1: f64, y1: f64, x2: f64, y2: f64) {
        let _ = writeln!(
            self.0,
            r#"<line class="{class}" x1="{}" y1="{}" x2="{}" y2="{}"/>"#,
            fmt3(x1),
            fmt3(y1),
            fmt3(x2),
            fmt3(y2)
        );
    }
    fn rect(&mut self, class: &str, x: f64, y: f64, w: f64, h: f64) {
        let _ = writeln!(
            self.0,
            r#"<rect class="{class}" x="{}" y="{}" width="{}" height="{}"/>"#,
            fmt3(x),
            fmt3(y),
            fmt3(w),
            fmt3(h)
        );
    }
    fn circle(&mut self, class: &str, x: f64, y: f64, r: f64) {
        let _ = writeln!(
            self.0,
            r#"<circle class="{class}" cx="{}" cy="{}" r="{}"/>"#,
            fmt3(x),
            fmt3(y),
            fmt3(r)
        );
    }
    fn text_at(&mut self, class: &str, x: f64, y: f64, size: f64, body: &str, anchor: Anchor) {
        let a = match anchor {
            Anchor::Start => "",
            Anchor::Middle => r#" text-anchor="middle""#,
        };
        let _ = writeln!(
            self.0,
            r#"<text class="{class}" x="{}" y="{}" font-size="{}"{a}>{}</text>"#,
            fmt3(x),
            fmt3(y),
            fmt3(size),
            esc(body)
        );
    }
    fn text(&mut self, class: &str, x: f64, y: f64, size: f64, body: &str) {
        self.text_at(class, x, y, size, body, Anchor::Start);
    }
    fn text_centred(&mut self, class: &str, x: f64, y: f64, size: f64, body: &str) {
        self.text_at(class, x, y, size, body, Anchor::Middle);
    }
    fn text_rotated(&mut self, class: &str, x: f64, y: f64, size: f64, body: &str) {
        let _ = writeln!(
            self.0,
            r#"<text class="{class}" x="{x}" y="{y}" font-size="{}" transform="rotate(90 {x} {y})">{}</text>"#,
            fmt3(size),
            esc(body),
            x = fmt3(x),
            y = fmt3(y)
        );
    }
    fn cross(&mut self, class: &str, x: f64, y: f64, half: f64) {
        self.line(class, x - half, y, x + half, y);
        self.line(class, x, y - half, x, y + half);
    }
    fn open(&mut self, tag: &str) {
        let _ = writeln!(self.0, "{tag}");
    }
}

const STYLE: &str = "<style>\
line,rect,circle,polygon{stroke:#000;stroke-width:0.25;fill:none}\
text{font-family:sans-serif;fill:#000}\
.grid{stroke:#888;stroke-width:0.15}\
.fin{stroke-dasharray:3 1.5}\
.keep-out{fill:#000;fill-opacity:0.12;stroke:#444;stroke-width:0.2}\
.glue{fill:#000;fill-opacity:0.06;stroke-dasharray:1 1}\
.reference{stroke-width:0.5}\
.hole{stroke-width:0.3}\
.centre-cross{stroke-width:0.15}\
.leader{stroke:#666;stroke-width:0.12}\
.lean{stroke:#b00;stroke-width:0.35}\
polygon.lean{fill:#b00}\
.align{stroke-width:0.2}\
</style>";

fn deg(rad: f64) -> String {
    format!("{:.1}°", rad.to_degrees())
}

/// The drill's setting for one hole: the jig angle from the surface normal,
/// acos(cos t · cos a), and, when the hole is not square to the surface, the
/// direction of the tilt on the surface as an angle measured from the aft
/// direction toward growing clock (right on the template), in (−180°, 180°]. The
/// drill's shank tilts the same way as the exhaust leans (the red arrow).
pub fn jig_setting(port: &Port) -> (f64, Option<f64>) {
    let e = port.exhaust_direction();
    let jig = e.dot(&port.normal()).clamp(-1.0, 1.0).acos();
    let (u, v) = (e.dot(&port.roll_tangent()), -e.x);
    if u.hypot(v) <= 1e-9 {
        return (jig, None);
    }
    let mut dir = u.atan2(v);
    if dir <= -std::f64::consts::PI + 1e-12 {
        dir = std::f64::consts::PI;
    }
    (jig, Some(dir))
}

/// Degrees to one decimal, never "-0.0".
fn signed_deg(rad: f64) -> String {
    let d = (rad.to_degrees() * 10.0).round() / 10.0;
    format!("{:.1}°", if d == 0.0 { 0.0 } else { d })
}

fn jig_text(port: &Port) -> String {
    match jig_setting(port) {
        (_, None) => "jig 0.0° (square)".to_string(),
        (jig, Some(dir)) => format!("jig {}  tilt {}", signed_deg(jig), signed_deg(dir)),
    }
}

fn station_text(station_m: f64, units: TickUnits) -> String {
    match units {
        TickUnits::Millimetres => format!("{:.1} mm", station_m * 1000.0),
        TickUnits::Inches => format!(
            "{:.3} in ({:.1} mm)",
            station_m / 0.0254,
            station_m * 1000.0
        ),
    }
}

/// The lines of text printed beside a hole, first line largest. Any number of
/// lines is placed clear of every other mark.
pub fn port_label_lines(port: &Port, s: &TemplateSettings) -> Vec<(f64, String)> {
    vec![
        (2.6, port.name.clone()),
        (
            2.1,
            format!(
                "st {}  clk {}",
                station_text(port.station_m, s.ticks),
                deg(port.clock_rad.rem_euclid(TAU))
            ),
        ),
        (
            2.1,
            format!(
                "cant tan {} ax {}  Ø{} mm",
                deg(port.tangential_cant_rad),
                deg(port.axial_cant_rad),
                fmt3(port.nozzle.hole_diameter_m() * 1000.0)
            ),
        ),
        (2.1, jig_text(port)),
    ]
}

/// Line pitch of a label block, in units of each line's font size.
const LINE_PITCH_EM: f64 = 1.2;

/// Every printed mark and label placed so far, and the placement rule: a new item
/// takes the first of its candidate positions whose box lies inside its allowed
/// area and keeps [`CLEARANCE_MM`] from every box already placed.
///
/// Candidates that lie whole on one page are tried first, so a label is not cut by
/// a page edge when it need not be.
struct Placer {
    taken: Vec<Bounds>,
    /// Each page's window on the sheet.
    windows: Vec<Bounds>,
}

impl Placer {
    fn fits(&self, b: Bounds, area: Bounds) -> bool {
        b.inside(area) && self.taken.iter().all(|t| t.gap(b) >= CLEARANCE_MM)
    }
    /// Index of the first candidate box that fits, recorded as taken.
    fn place(&mut self, candidates: &[Bounds], area: Bounds) -> Option<usize> {
        let on_one_page = |b: Bounds| self.windows.iter().any(|w| b.inside(*w));
        let k = candidates
            .iter()
            .position(|&b| on_one_page(b) && self.fits(b, area))
            .or_else(|| candidates.iter().position(|&b| self.fits(b, area)))?;
        self.taken.push(candidates[k]);
        Some(k)
    }
    fn take(&mut self, b: Bounds) {
        self.taken.push(b);
    }
}

/// A block of text lines and its box relative to its top-left corner.
struct Block {
    lines: Vec<(f64, String)>,
    w: f64,
    h: f64,
}

impl Block {
    fn new(lines: Vec<(f64, String)>) -> Self {
        let w = lines
            .iter()
            .map(|(s, t)| TEXT_EM_WIDTH * s * t.chars().count() as f64)
            .fold(0.0, f64::max);
        let h = lines.iter().map(|(s, _)| LINE_PITCH_EM * s).sum::<f64>();
        Block { lines, w, h }
    }
    fn at(&self, x0: f64, y0: f64) -> Bounds {
        Bounds::new(x0, y0, x0 + self.w, y0 + self.h)
    }
    fn write(&self, svg: &mut Svg, class: &str, x0: f64, y0: f64) {
        let mut y = y0;
        for (size, body) in &self.lines {
            // Baseline so that the line's box (ascent over, descent under) fills its pitch.
            let base = y
                + 0.5 * (LINE_PITCH_EM - TEXT_ASCENT_EM - TEXT_DESCENT_EM) * size
                + TEXT_ASCENT_EM * size;
            svg.text(class, x0, base, *size, body);
            y += LINE_PITCH_EM * size;
        }
    }
}

/// Top-left corners for a `w × h` block around a mark of half-size `m` at (x, y):
/// right, left, below, above and the four diagonals, at growing distances.
fn around(x: f64, y: f64, m: f64, w: f64, h: f64) -> Vec<(f64, f64, f64)> {
    let mut out = Vec::new();
    for gap in [1.0, 2.5, 5.0, 9.0, 14.0, 20.0, 28.0, 38.0] {
        let d = m + gap;
        let slots = [
            (x + d, y - 0.5 * h),
            (x - d - w, y - 0.5 * h),
            (x - 0.5 * w, y + d),
            (x - 0.5 * w, y - d - h),
            (x + 0.7 * d, y + 0.7 * d),
            (x + 0.7 * d, y - 0.7 * d - h),
            (x - 0.7 * d - w, y + 0.7 * d),
            (x - 0.7 * d - w, y - 0.7 * d - h),
        ];
        out.extend(slots.iter().map(|&(a, b)| (a, b, gap)));
    }
    out
}

/// The fixed notes: title, how to read and print, how to assemble the pages.
fn note_lines(design: &Design, l: &SheetLayout, s: &TemplateSettings) -> Vec<String> {
    let units = match s.ticks {
        TickUnits::Millimetres => "stations in mm",
        TickUnits::Inches => "stations in inches (and mm)",
    };
    let (rows, cols) = l.grid;
    let assembly = if rows * cols > 1 {
        [
            format!(
                "Assembly: {rows} × {cols} pages (rows × columns) sharing {} mm. Trim the left and",
                fmt_mm(s.page_overlap_mm)
            ),
            "top margins off, lay each page over its neighbour so the circled crosses coincide, tape."
                .to_string(),
        ]
    } else {
        [
            "One sheet: nothing to assemble.".to_string(),
            "Check the rulers, then cut out the surface and wrap it.".to_string(),
        ]
    };
    let _ = design;
    vec![
        format!("Print at 100 % (no fit to page); {units}, angles in degrees."),
        "Station: distance aft of the nose tip. Clock: angle from the reference line.".to_string(),
        "Wrap printed side out, top edge toward the nose, left edge on the reference line."
            .to_string(),
        "Clock grows to the right: clockwise seen from behind the tail toward the nose."
            .to_string(),
        "Cut on the solid outline, glue the strip under the left edge.".to_string(),
        "Red arrows: exhaust lean (tilt the drill that way). Circled crosses: page alignment only."
            .to_string(),
        "Jig: angle from the normal. Tilt: from aft (down), + toward growing clock (right)."
            .to_string(),
        "Safety: wear eye protection, deburr every hole, check the scale before drilling."
            .to_string(),
        assembly[0].clone(),
        assembly[1].clone(),
    ]
}

fn fmt_mm(v: f64) -> String {
    let t = format!("{v:.1}");
    t.strip_suffix(".0").map(str::to_string).unwrap_or(t)
}

/// Title, notes, rulers: fixed items at the top of the sheet.
fn notes_and_rulers(
    svg: &mut Svg,
    placer: &mut Placer,
    design: &Design,
    l: &SheetLayout,
    s: &TemplateSettings,
) {
    let title = format!("Drilling template: {}", design.name);
    svg.text("title", 0.0, 6.0, 4.2, &title);
    placer.take(text_bounds(0.0, 6.0, 4.2, &title, Anchor::Start, false));
    for (i, line) in note_lines(design, l, s).iter().enumerate() {
        let y = 11.5 + NOTE_PITCH_MM * i as f64;
        svg.text("note", 0.0, y, 2.4, line);
        placer.take(text_bounds(0.0, y, 2.4, line, Anchor::Start, false));
    }
    // Calibration rulers, 2 mm in so the "0" label is not cut at the sheet's edge.
    let x0 = RULER_X_MM;
    let y_mm = RULER_MM_Y;
    svg.open(r#"<g id="ruler-mm" class="ruler">"#);
    svg.line("ruler-bar", x0, y_mm, x0 + 100.0, y_mm);
    for k in 0..=100 {
        let len = if k % 10 == 0 {
            4.0
        } else if k % 5 == 0 {
            3.0
        } else {
            1.8
        };
        let x = x0 + k as f64;
        svg.line("ruler-tick", x, y_mm, x, y_mm - len);
        if k % 10 == 0 {
            svg.text_centred("ruler-label", x, y_mm - 4.8, 2.0, &(k / 10).to_string());
        }
    }
    let side = "100 mm (cm marked)";
    svg.text("ruler-label", x0 + 103.0, y_mm, 2.4, side);
    svg.open("</g>");
    placer.take(
        Bounds::new(x0 - 1.0, y_mm - 4.8 - 1.6, x0 + 100.0, y_mm).union(text_bounds(
            x0 + 103.0,
            y_mm,
            2.4,
            side,
            Anchor::Start,
            false,
        )),
    );
    let y_in = RULER_IN_Y;
    let eighth = 25.4 / 8.0;
    svg.open(r#"<g id="ruler-in" class="ruler">"#);
    svg.line("ruler-bar", x0, y_in, x0 + 4.0 * 25.4, y_in);
    for k in 0..=32 {
        let len = if k % 8 == 0 {
            4.0
        } else if k % 4 == 0 {
            3.0
        } else if k % 2 == 0 {
            2.3
        } else {
            1.6
        };
        let x = x0 + k as f64 * eighth;
        svg.line("ruler-tick", x, y_in, x, y_in - len);
        if k % 8 == 0 {
            svg.text_centred("ruler-label", x, y_in - 4.8, 2.0, &(k / 8).to_string());
        }
    }
    let side = "4 in (1/8 in ticks)";
    svg.text("ruler-label", x0 + 104.6, y_in, 2.4, side);
    svg.open("</g>");
    placer.take(
        Bounds::new(x0 - 1.0, y_in - 4.8 - 1.6, x0 + 101.6, y_in).union(text_bounds(
            x0 + 104.6,
            y_in,
            2.4,
            side,
            Anchor::Start,
            false,
        )),
    );
    let check = "check before drilling: both bars must measure true on the printout";
    svg.text("ruler-note", 0.0, y_in + 5.0, 2.6, check);
    placer.take(text_bounds(
        0.0,
        y_in + 5.0,
        2.6,
        check,
        Anchor::Start,
        false,
    ));
}

/// A hole, its centre cross and its lean arrow, fixed where the port is; returns
/// the mark's box.
/// `room` is the half-size of the square around the centre the mark may fill, so
/// that marks of close holes stay clear of each other: the centre cross and lean
/// arrow shrink to fit it, the hole itself never does.
fn draw_port_mark(svg: &mut Svg, port: &Port, l: &SheetLayout, room: f64) -> Bounds {
    let (x, y) = l.point_mm(port.station_m, port.clock_rad);
    let r = 500.0 * port.nozzle.hole_diameter_m();
    let half = (r.max(1.0) + 3.0).min(room).max(r + 0.3);
    let mut b = Bounds::new(x - half, y - half, x + half, y + half);
    svg.circle("hole", x, y, r);
    svg.cross("centre-cross", x, y, half);
    // Exhaust lean on the paper: +x is growing clock (the roll tangent), +y is aft.
    let e = port.exhaust_direction();
    let (u, v) = (e.dot(&port.roll_tangent()), -e.x);
    let lean = u.hypot(v);
    let end = (r + 8.0).min(room);
    if lean > 1e-9 && end - (r + 1.0) >= 2.5 {
        let (du, dv) = (u / lean, v / lean);
        let start = r + 1.0;
        let (x1, y1) = (x + du * start, y + dv * start);
        let (x2, y2) = (x + du * end, y + dv * end);
        svg.line("lean", x1, y1, x2, y2);
        // Head: a triangle 2 mm long, 1.6 mm wide at the tip end.
        let (bx, by) = (x2 - du * 2.0, y2 - dv * 2.0);
        let _ = writeln!(
            svg.0,
            r#"<polygon class="lean" points="{},{} {},{} {},{}"/>"#,
            fmt3(x2),
            fmt3(y2),
            fmt3(bx - dv * 0.8),
            fmt3(by + du * 0.8),
            fmt3(bx + dv * 0.8),
            fmt3(by - du * 0.8)
        );
        b = b.union(Bounds::new(x1, y1, x2, y2).union(Bounds::new(
            x2 - 0.8,
            y2 - 0.8,
            x2 + 0.8,
            y2 + 0.8,
        )));
    }
    b
}

/// Spans of x on the surface covered by a patch of `width` centred at `centre`,
/// wrapped at clock 0/360 into at most two pieces.
fn wrapped_spans(centre: f64, width: f64, wrap: f64) -> Vec<(f64, f64)> {
    if width >= wrap {
        return vec![(0.0, wrap)];
    }
    let (a, b) = (centre - 0.5 * width, centre + 0.5 * width);
    [-wrap, 0.0, wrap]
        .iter()
        .filter_map(|shift| {
            let (lo, hi) = ((a + shift).max(0.0), (b + shift).min(wrap));
            (hi > lo).then_some((lo, hi))
        })
        .collect()
}

/// A single line of text to place: its candidate baselines (x, y), anchor and turn.
struct Label<'a> {
    class: &'a str,
    size: f64,
    body: String,
    anchor: Anchor,
    turned: bool,
    spots: Vec<(f64, f64)>,
}

impl Label<'_> {
    /// Place at the first spot that fits; a label with no free spot is left out
    /// (returns false) rather than printed over another mark.
    fn place(&self, svg: &mut Svg, placer: &mut Placer, area: Bounds) -> bool {
        let boxes: Vec<Bounds> = self
            .spots
            .iter()
            .map(|&(x, y)| text_bounds(x, y, self.size, &self.body, self.anchor, self.turned))
            .collect();
        let Some(k) = placer.place(&boxes, area) else {
            return false;
        };
        let (x, y) = self.spots[k];
        if self.turned {
            svg.text_rotated(self.class, x, y, self.size, &self.body);
        } else {
            svg.text_at(self.class, x, y, self.size, &self.body, self.anchor);
        }
        true
    }
}

/// Offsets 0, +step, −step, +2 step, ... up to `reach` either way.
fn outward(step: f64, reach: f64) -> Vec<f64> {
    let mut v = vec![0.0];
    let mut k = 1.0;
    while k * step <= reach {
        v.push(k * step);
        v.push(-k * step);
        k += 1.0;
    }
    v
}

/// The drawing and the boxes of what it holds, for deciding which pages to print.
struct SheetDrawing {
    svg: String,
    /// Boxes of the things worth a page: holes and their labels, notes and rulers,
    /// keep-out zones, fin roots.
    content: Vec<Bounds>,
}

fn sheet_content(design: &Design, l: &SheetLayout, s: &TemplateSettings) -> SheetDrawing {
    let a = &design.airframe;
    let (top, h) = (
        l.surface_top_mm,
        (l.bottom_station_m - l.top_station_m) * 1000.0,
    );
    let ys = |station: f64| top + (station - l.top_station_m) * 1000.0;
    let clip = |station: f64| station.clamp(l.top_station_m, l.bottom_station_m);
    let w = l.wrap_mm;
    let sheet = Bounds::new(0.0, 0.0, l.width_mm, l.height_mm);
    let surface = Bounds::new(0.0, top, w, top + h);
    let mut back = Svg(String::new());
    let mut front = Svg(String::new());
    let (ww, wh) = l.window_mm;
    let mut placer = Placer {
        taken: Vec::new(),
        windows: l
            .pages
            .iter()
            .map(|p| Bounds::new(p.x_mm, p.y_mm, p.x_mm + ww, p.y_mm + wh))
            .collect(),
    };
    let mut content = Vec::new();

    // Fixed items first: notes, rulers, holes.
    notes_and_rulers(&mut front, &mut placer, design, l, s);
    content.extend(placer.taken.iter().copied());
    let mut marks = Vec::new();
    let mut mark_svg = Vec::new();
    let centres: Vec<(f64, f64)> = design
        .ports
        .iter()
        .map(|p| l.point_mm(p.station_m, p.clock_rad))
        .collect();
    for (i, port) in design.ports.iter().enumerate() {
        // Half the paper distance (the larger of across and along) to the nearest
        // other hole, less half the clearance.
        let nearest = centres
            .iter()
            .enumerate()
            .filter(|&(j, _)| j != i)
            .map(|(_, c)| (c.0 - centres[i].0).abs().max((c.1 - centres[i].1).abs()))
            .fold(f64::INFINITY, f64::min);
        let room = 0.5 * (nearest - CLEARANCE_MM);
        let mut m = Svg(String::new());
        let b = draw_port_mark(&mut m, port, l, room);
        placer.take(b);
        content.push(b);
        marks.push(b);
        mark_svg.push(m.0);
    }

    // Background: glue strip, cut outline, keep-out zones, grid, fins, ticks.
    back.rect("glue", w, top, s.glue_strip_mm, h);
    let _ = writeln!(
        back.0,
        r#"<rect id="surface" class="cut" x="0.000" y="{}" width="{}" height="{}"/>"#,
        fmt3(top),
        fmt3(w),
        fmt3(h)
    );
    let mut keep_out_labels = Vec::new();
    for k in &a.keep_outs {
        let (from, to, spans) = match k.zone {
            Zone::Band {
                from_station_m,
                to_station_m,
            } => (from_station_m, to_station_m, vec![(0.0, w)]),
            Zone::Patch {
                station_m,
                clock_rad,
                length_m,
                width_m,
            } => (
                station_m - 0.5 * length_m,
                station_m + 0.5 * length_m,
                wrapped_spans(clock_rad.rem_euclid(TAU) * l.radius_mm, width_m * 1000.0, w),
            ),
        };
        let (y0, y1) = (ys(clip(from.min(to))), ys(clip(from.max(to))));
        if y1 <= y0 {
            continue;
        }
        let _ = writeln!(
            back.0,
            r#"<g class="keep-out-zone" id="keep-out-{}">"#,
            esc(&k.name)
        );
        for (x0, x1) in &spans {
            back.rect("keep-out", *x0, y0, x1 - x0, y1 - y0);
            content.push(Bounds::new(*x0, y0, *x1, y1));
        }
        back.open("</g>");
        if let Some(&(x0, x1)) = spans.first() {
            let body = format!("keep out: {}", k.name);
            let mut spots = Vec::new();
            for dy in [3.0, 6.0, -1.0, 9.0, 12.0] {
                let mut x = x0 + 1.0;
                while x < x1.max(x0 + 1.5) {
                    spots.push((x, y0 + dy));
                    x += 6.0;
                }
            }
            spots.push((x0 + 1.0, y1 + 3.0));
            keep_out_labels.push(Label {
                class: "keep-out-label",
                size: 2.2,
                body,
                anchor: Anchor::Start,
                turned: false,
                spots,
            });
        }
    }
    for q in 1..4 {
        let x = w * q as f64 / 4.0;
        back.line("grid", x, top, x, top + h);
    }
    back.line("reference", 0.0, top, 0.0, top + h);
    let mut fin_labels = Vec::new();
    if let Some(f) = &a.fins {
        let (from, to) = (clip(f.station_m), clip(f.station_m + f.root_chord_m));
        if to > from {
            for (k, clock) in f.clocks_rad().iter().enumerate() {
                let x = clock.rem_euclid(TAU) * l.radius_mm;
                back.line("fin", x, ys(from), x, ys(to));
                content.push(Bounds::new(x, ys(from), x, ys(to)));
                let body = format!("fin {}", k + 1);
                let mut spots = Vec::new();
                let mut y = ys(from) + 6.0;
                while y < ys(to) {
                    spots.push((x + 0.8, y));
                    spots.push((x - 0.8, y));
                    y += 4.0;
                }
                fin_labels.push((spots, body));
            }
        }
    }
    // Station ticks on both edges, at whole multiples of the step from the nose tip.
    let step_m = match s.ticks {
        TickUnits::Millimetres => 0.010,
        TickUnits::Inches => 0.0127,
    };
    let first = (l.top_station_m / step_m - 1e-9).ceil() as i64;
    let last = (l.bottom_station_m / step_m + 1e-9).floor() as i64;
    back.open(r#"<g id="station-ticks">"#);
    let mut tick_labels = Vec::new();
    for k in first..=last {
        let station = k as f64 * step_m;
        let y = ys(station);
        let len = if k % 5 == 0 { 5.0 } else { 3.0 };
        back.line("tick", 0.0, y, len, y);
        back.line("tick", w, y, w - len, y);
        let label = match s.ticks {
            TickUnits::Millimetres => format!("{}", k * 10),
            TickUnits::Inches => format!("{:.1} in", k as f64 * 0.5),
        };
        tick_labels.push((len, y, label));
    }
    back.open("</g>");

    // Movable items, most important first, each clear of everything before it.
    // Page-alignment crosses in the page overlaps (only when paged).
    let o = s.page_overlap_mm;
    let (rows, cols) = l.grid;
    let (sx, sy) = l.step_mm(o);
    let mut align = Svg(String::new());
    // The mark: circle r 3, cross ±5, "align" centred 6 mm above.
    let mark_box = |x: f64, y: f64| {
        Bounds::new(x - 5.0, y - 5.0, x + 5.0, y + 5.0).union(text_bounds(
            x,
            y - 6.0,
            2.0,
            "align",
            Anchor::Middle,
            false,
        ))
    };
    let mut seams: Vec<(Vec<(f64, f64)>, Bounds)> = Vec::new();
    for c in 1..cols {
        let x = c as f64 * sx + 0.5 * o;
        for r in 0..rows {
            let (y_lo, y_hi) = (r as f64 * sy, (r as f64 * sy + wh).min(l.height_mm));
            let mid = 0.5 * (y_lo + y_hi);
            let spots = outward(2.0, 0.5 * (y_hi - y_lo))
                .iter()
                .map(|d| (x, mid + d))
                .collect();
            seams.push((spots, Bounds::new(x - 0.5 * o, y_lo, x + 0.5 * o, y_hi)));
        }
    }
    for r in 1..rows {
        let y = r as f64 * sy + 0.5 * o + 1.3;
        for c in 0..cols {
            let (x_lo, x_hi) = (c as f64 * sx, (c as f64 * sx + ww).min(l.width_mm));
            let mid = 0.5 * (x_lo + x_hi);
            let spots = outward(2.0, 0.5 * (x_hi - x_lo))
                .iter()
                .map(|d| (mid + d, y))
                .collect();
            seams.push((
                spots,
                Bounds::new(x_lo, y - 0.5 * o - 1.3, x_hi, y + 0.5 * o - 1.3),
            ));
        }
    }
    for (spots, area) in &seams {
        let boxes: Vec<Bounds> = spots.iter().map(|&(x, y)| mark_box(x, y)).collect();
        if let Some(k) = placer.place(&boxes, *area) {
            let (x, y) = spots[k];
            align.open(r#"<g class="align-mark">"#);
            align.cross("align", x, y, 5.0);
            align.circle("align", x, y, 3.0);
            align.text_centred("align-label", x, y - 6.0, 2.0, "align");
            align.open("</g>");
        }
    }

    // Port labels: any number of lines, around the hole, with a leader when far.
    let mut labels = Svg(String::new());
    for (port, (mark, m_svg)) in design.ports.iter().zip(marks.iter().zip(&mark_svg)) {
        let (x, y) = l.point_mm(port.station_m, port.clock_rad);
        let block = Block::new(port_label_lines(port, s));
        let half = 0.5 * (mark.x1 - mark.x0).max(mark.y1 - mark.y0);
        let spots = around(x, y, half.min(8.0), block.w, block.h);
        let boxes: Vec<Bounds> = spots.iter().map(|&(a, b, _)| block.at(a, b)).collect();
        let inner = Bounds::new(0.5, top + 0.5, w - 0.5, top + h - 0.5);
        let k = placer
            .place(&boxes, inner)
            .or_else(|| placer.place(&boxes, sheet))
            .unwrap_or_else(|| {
                // No free spot anywhere near: the first spot, so the hole still has its name.
                placer.take(boxes[0]);
                0
            });
        let (bx, by, gap) = spots[k];
        let _ = writeln!(
            labels.0,
            r#"<g class="port" id="port-{}">"#,
            esc(&port.name)
        );
        let _ = writeln!(labels.0, r#"<g class="port-mark">"#);
        labels.0.push_str(m_svg);
        labels.open("</g>");
        if gap > 4.0 {
            let b = block.at(bx, by);
            let (px, py) = (x.clamp(b.x0, b.x1), y.clamp(b.y0, b.y1));
            labels.line("leader", x, y, px, py);
        }
        labels.open(r#"<g class="port-label">"#);
        block.write(&mut labels, "port-label", bx, by);
        labels.open("</g>");
        labels.open("</g>");
        content.push(block.at(bx, by));
    }

    // Surface labels: reference line, glue edge and strip, quarter lines, fins,
    // keep-out zones, tube ends; station labels last.
    let along = |x: f64| -> Vec<(f64, f64)> {
        let mut v = Vec::new();
        let mut y = top + 4.0;
        while y < top + h {
            v.push((x, y));
            y += 5.0;
        }
        v
    };
    let mut texts = Svg(String::new());
    let ref_text = "reference line, clock 0°".to_string();
    Label {
        class: "reference-label",
        size: 2.6,
        body: ref_text,
        anchor: Anchor::Start,
        turned: true,
        // Clear of the station ticks (5 mm) and their labels first, on the line last.
        spots: [11.0, 15.0, 20.0, 0.25 * 2.6 + 0.8]
            .iter()
            .flat_map(|&x| along(x))
            .collect(),
    }
    .place(&mut texts, &mut placer, surface);
    Label {
        class: "grid-label",
        size: 2.2,
        body: "clock 360° = 0°, glue edge".to_string(),
        anchor: Anchor::Start,
        turned: true,
        spots: [w - 11.0, w - 15.0, w - 20.0, w - 0.8 * 2.2 - 0.8]
            .iter()
            .flat_map(|&x| along(x))
            .collect(),
    }
    .place(&mut texts, &mut placer, surface);
    if s.glue_strip_mm > 3.0 {
        Label {
            class: "glue-label",
            size: 2.6,
            body: "glue here".to_string(),
            anchor: Anchor::Start,
            turned: true,
            spots: along(w + 0.5 * s.glue_strip_mm - 1.0),
        }
        .place(
            &mut texts,
            &mut placer,
            Bounds::new(w, top, w + s.glue_strip_mm, top + h),
        );
    }
    for q in 1..4 {
        let x = w * q as f64 / 4.0;
        let body = format!("{}°", 90 * q);
        let mut spots = Vec::new();
        let mut y = top + 3.0;
        while y < top + h {
            spots.push((x + 0.8, y));
            spots.push((x - 0.8 - TEXT_EM_WIDTH * 2.2 * 3.0, y));
            y += 5.0;
        }
        Label {
            class: "grid-label",
            size: 2.2,
            body,
            anchor: Anchor::Start,
            turned: false,
            spots,
        }
        .place(&mut texts, &mut placer, surface);
    }
    for (spots, body) in fin_labels {
        let spots = spots
            .into_iter()
            .enumerate()
            .map(|(i, (x, y))| {
                // Odd spots are left of the line: shift by the text's width.
                if i % 2 == 1 {
                    (x - TEXT_EM_WIDTH * 2.4 * body.chars().count() as f64, y)
                } else {
                    (x, y)
                }
            })
            .collect();
        Label {
            class: "fin-label",
            size: 2.4,
            body,
            anchor: Anchor::Start,
            turned: false,
            spots,
        }
        .place(&mut texts, &mut placer, surface);
    }
    for k in keep_out_labels {
        k.place(&mut texts, &mut placer, surface);
    }
    let xs: Vec<f64> = outward(5.0, 0.5 * w).iter().map(|d| 0.5 * w + d).collect();
    if (l.top_station_m - a.tube_fore_station_m()).abs() < 1e-9 {
        Label {
            class: "tube-end",
            size: 2.4,
            body: "fore end of tube".to_string(),
            anchor: Anchor::Middle,
            turned: false,
            spots: xs.iter().map(|&x| (x, top - 1.0)).collect(),
        }
        .place(&mut texts, &mut placer, sheet);
    }
    if (l.bottom_station_m - a.tube_aft_station_m()).abs() < 1e-9 {
        Label {
            class: "tube-end",
            size: 2.4,
            body: "aft end of tube".to_string(),
            anchor: Anchor::Middle,
            turned: false,
            spots: xs.iter().map(|&x| (x, top + h + 3.5)).collect(),
        }
        .place(&mut texts, &mut placer, sheet);
    }
    let mut ticks = Svg(String::new());
    ticks.open(r#"<g id="station-labels">"#);
    for (len, y, label) in tick_labels {
        let right = w - len - 0.8 - TEXT_EM_WIDTH * 1.8 * label.chars().count() as f64;
        Label {
            class: "tick-label",
            size: 1.8,
            body: label,
            anchor: Anchor::Start,
            turned: false,
            spots: vec![(len + 0.8, y + 0.7), (right, y + 0.7)],
        }
        .place(&mut ticks, &mut placer, surface);
    }
    ticks.open("</g>");

    let mut svg = back.0;
    svg.push_str(&ticks.0);
    svg.push_str(&texts.0);
    svg.push_str(&labels.0);
    svg.push_str(&front.0);
    svg.push_str(&align.0);
    SheetDrawing { svg, content }
}

/// One printed page of the template.
#[derive(Debug, Clone, PartialEq)]
pub struct TemplatePage {
    /// Row of the page in the grid, from 1 at the top.
    pub row: usize,
    /// Column, from 1 at the left.
    pub column: usize,
    /// The page as a complete SVG document.
    pub svg: String,
}

/// The page's title: where it sits in the grid.
pub fn page_title(row: usize, column: usize, grid: (usize, usize)) -> String {
    format!("row {row}, column {column} (of {} × {})", grid.0, grid.1)
}

/// The drilling template as one SVG document per page, row by row; pages whose
/// window holds nothing but tube outline, grid and station ticks are left out.
///
/// Each page's root `<svg>` has `width` and `height` in millimetres and a `viewBox`
/// of the same numbers, so printing at 100 % gives true size.
pub fn drill_template_pages(
    design: &Design,
    s: &TemplateSettings,
) -> Result<Vec<TemplatePage>, ExportError> {
    let l = sheet_layout(design, s)?;
    let drawing = sheet_content(design, &l, s);
    let (pw, ph) = l.page_mm;
    let (ox, oy) = l.window_origin_mm;
    let (ww, wh) = l.window_mm;
    Ok(l
        .pages
        .iter()
        .filter(|p| {
            let window = Bounds::new(p.x_mm, p.y_mm, p.x_mm + ww, p.y_mm + wh);
            drawing.content.iter().any(|b| b.gap(window) < 0.0)
        })
        .map(|p| {
            let title = page_title(p.row, p.column, l.grid);
            let mut out = String::new();
            let _ = writeln!(out, r#"<?xml version="1.0" encoding="UTF-8"?>"#);
            let _ = writeln!(
                out,
                r#"<svg xmlns="http://www.w3.org/2000/svg" width="{w}mm" height="{h}mm" viewBox="0 0 {w} {h}">"#,
                w = fmt3(pw),
                h = fmt3(ph)
            );
            let _ = writeln!(
                out,
                "<title>Drilling template: {}, {}</title>",
                esc(&design.name),
                title
            );
            let _ = writeln!(out, "{STYLE}");
            let _ = writeln!(
                out,
                r#"<defs><clipPath id="window"><rect x="{}" y="{}" width="{}" height="{}"/></clipPath></defs>"#,
                fmt3(ox),
                fmt3(oy),
                fmt3(ww),
                fmt3(wh)
            );
            let _ = writeln!(
                out,
                r#"<g clip-path="url(#window)"><g id="sheet" transform="translate({} {})">"#,
                fmt3(ox - p.x_mm),
                fmt3(oy - p.y_mm)
            );
            out.push_str(&drawing.svg);
            let _ = writeln!(out, "</g></g>");
            if !s.single_sheet {
                let _ = writeln!(
                    out,
                    r#"<text class="page-label" x="{}" y="{}" font-size="3.000" font-family="sans-serif">{} · {}</text>"#,
                    fmt3(ox),
                    fmt3(oy + wh + PAGE_LABEL_MM - 1.0),
                    title,
                    esc(&design.name)
                );
            }
            let _ = writeln!(out, "</svg>");
            TemplatePage {
                row: p.row,
                column: p.column,
                svg: out,
            }
        })
        .collect())
}

/// The SVG documents of [`drill_template_pages`], in order.
pub fn drill_template_svg(
    design: &Design,
    s: &TemplateSettings,
) -> Result<Vec<String>, ExportError> {
    Ok(drill_template_pages(design, s)?
        .into_iter()
        .map(|p| p.svg)
        .collect())
}

#[cfg(test)]
mod tests {
    use super::super::fixture;
    use super::*;
    use crate::model::{KeepOut, Zone};
    use roxmltree::{Document, Node};

    fn attr(n: &Node, name: &str) -> f64 {
        n.attribute(name)
            .unwrap_or_else(|| panic!("missing {name}"))
            .trim_end_matches("mm")
            .parse()
            .unwrap()
    }

    /// (x, y) of the sheet's translate on a page.
    fn sheet_offset(doc: &Document) -> (f64, f64) {
        let g = doc
            .descendants()
            .find(|n| n.attribute("id") == Some("sheet"))
            .unwrap();
        let t = g.attribute("transform").unwrap();
        let inner = t.trim_start_matches("translate(").trim_end_matches(')');
        let v: Vec<f64> = inner.split(' ').map(|x| x.parse().unwrap()).collect();
        (v[0], v[1])
    }

    fn by_id<'a>(doc: &'a Document, id: &str) -> Node<'a, 'a> {
        doc.descendants()
            .find(|n| n.attribute("id") == Some(id))
            .unwrap_or_else(|| panic!("no element {id}"))
    }

    fn single() -> TemplateSettings {
        TemplateSettings {
            single_sheet: true,
            ..Default::default()
        }
    }

    /// Every printed item of a page with its box in page millimetres, read from the
    /// SVG alone: hole marks (hole, centre cross, lean arrow), port label blocks,
    /// alignment marks and rulers as one item each; every other text on its own.
    /// Lines that are drawing rather than marks (outline, grid, ticks, fin roots,
    /// keep-out shading, leaders) are not items. Text boxes use the stated font
    /// estimate ([`TEXT_EM_WIDTH`], [`TEXT_ASCENT_EM`], [`TEXT_DESCENT_EM`]).
    fn printed_items(page: &str) -> Vec<(String, Bounds)> {
        let doc = Document::parse(page).unwrap();
        let (tx, ty) = sheet_offset(&doc);
        let clip = doc
            .descendants()
            .find(|n| n.has_tag_name("rect") && n.parent().unwrap().has_tag_name("clipPath"))
            .unwrap();
        let window = Bounds::new(
            attr(&clip, "x"),
            attr(&clip, "y"),
            attr(&clip, "x") + attr(&clip, "width"),
            attr(&clip, "y") + attr(&clip, "height"),
        );
        let groups = ["port-mark", "port-label", "align-mark", "ruler"];
        let in_sheet = |n: &Node| n.ancestors().any(|a| a.attribute("id") == Some("sheet"));
        let shape = |n: &Node| -> Option<Bounds> {
            let b = match n.tag_name().name() {
                "circle" => {
                    let (x, y, r) = (attr(n, "cx"), attr(n, "cy"), attr(n, "r"));
                    Bounds::new(x - r, y - r, x + r, y + r)
                }
                "line" => Bounds::new(attr(n, "x1"), attr(n, "y1"), attr(n, "x2"), attr(n, "y2")),
                "polygon" => {
                    let pts: Vec<(f64, f64)> = n
                        .attribute("points")
                        .unwrap()
                        .split_whitespace()
                        .map(|p| {
                            let (a, b) = p.split_once(',').unwrap();
                            (a.parse().unwrap(), b.parse().unwrap())
                        })
                        .collect();
                    pts.iter().fold(
                        Bounds::new(pts[0].0, pts[0].1, pts[0].0, pts[0].1),
                        |b, p| b.union(Bounds::new(p.0, p.1, p.0, p.1)),
                    )
                }
                "text" => {
                    let body = n.text().unwrap_or("");
                    let anchor = match n.attribute("text-anchor") {
                        Some("middle") => Anchor::Middle,
                        None => Anchor::Start,
                        Some(a) => panic!("anchor {a}"),
                    };
                    let turned = n
                        .attribute("transform")
                        .is_some_and(|t| t.starts_with("rotate(90"));
                    text_bounds(
                        attr(n, "x"),
                        attr(n, "y"),
                        attr(n, "font-size"),
                        body,
                        anchor,
                        turned,
                    )
                }
                _ => return None,
            };
            let (dx, dy) = if in_sheet(n) { (tx, ty) } else { (0.0, 0.0) };
            Some(Bounds::new(b.x0 + dx, b.y0 + dy, b.x1 + dx, b.y1 + dy))
        };
        let mut items = Vec::new();
        for n in doc.descendants().filter(|n| n.is_element()) {
            let class = n.attribute("class").unwrap_or("");
            let grouped = n
                .ancestors()
                .skip(1)
                .any(|a| groups.contains(&a.attribute("class").unwrap_or("")));
            if n.has_tag_name("g") && groups.contains(&class) && !grouped {
                let b = n
                    .descendants()
                    .filter_map(|d| shape(&d))
                    .reduce(Bounds::union)
                    .unwrap();
                items.push((
                    format!("{class} {:?}", n.parent().and_then(|p| p.attribute("id"))),
                    b,
                ));
            } else if n.has_tag_name("text") && !grouped {
                let b = shape(&n).unwrap();
                items.push((format!("{class} `{}`", n.text().unwrap_or("")), b));
            }
        }
        // Only what the page prints: items reaching into its window, cut to it (the
        // window clips them), and the page's own label.
        items
            .into_iter()
            .filter_map(|(name, b)| {
                if name.starts_with("page-label") {
                    Some((name, b))
                } else if b.gap(window) < 0.0 {
                    let cut = Bounds::new(
                        b.x0.max(window.x0),
                        b.y0.max(window.y0),
                        b.x1.min(window.x1),
                        b.y1.min(window.y1),
                    );
                    Some((name, cut))
                } else {
                    None
                }
            })
            .collect()
    }

    /// The smallest gap between any two printed items of a page, with their names.
    fn tightest(page: &str) -> Option<(f64, String, String)> {
        let items = printed_items(page);
        let mut best: Option<(f64, String, String)> = None;
        for i in 0..items.len() {
            for j in i + 1..items.len() {
                let g = items[i].1.gap(items[j].1);
                if best.as_ref().is_none_or(|b| g < b.0) {
                    best = Some((g, items[i].0.clone(), items[j].0.clone()));
                }
            }
        }
        best
    }

    /// Coordinates are written with three decimals: a gap may read up to 2 µm
    /// smaller than placed.
    const WRITTEN_SLACK_MM: f64 = 0.002;

    fn assert_clear(d: &Design, s: &TemplateSettings, what: &str) {
        let pages = drill_template_pages(d, s).unwrap();
        assert!(!pages.is_empty());
        for p in &pages {
            if let Some((g, a, b)) = tightest(&p.svg) {
                assert!(
                    g >= CLEARANCE_MM - WRITTEN_SLACK_MM,
                    "{what}, page {}: {a} and {b} are {g:.3} mm apart",
                    page_title(p.row, p.column, (0, 0))
                );
            }
        }
    }

    fn all_settings() -> Vec<TemplateSettings> {
        let mut v = Vec::new();
        for paper in [Paper::A4, Paper::Letter] {
            for orientation in [Orientation::Portrait, Orientation::Landscape] {
                for ticks in [TickUnits::Millimetres, TickUnits::Inches] {
                    v.push(TemplateSettings {
                        paper,
                        orientation,
                        ticks,
                        ..Default::default()
                    });
                }
            }
        }
        v.push(single());
        v
    }

    #[test]
    fn no_two_printed_items_touch_on_any_page_of_the_demos() {
        for (name, text) in [
            ("heron-54", include_str!("../../layouts/heron-54.toml")),
            ("osprey-98", include_str!("../../layouts/osprey-98.toml")),
        ] {
            let d = crate::layout::parse_str(text, name).unwrap();
            for s in all_settings() {
                assert_clear(&d, &s, &format!("{name} {:?} {:?}", s.paper, s.orientation));
            }
        }
        let d = fixture::design();
        for s in all_settings() {
            assert_clear(&d, &s, "fixture");
        }
    }

    #[test]
    fn a_port_at_clock_zero_clears_the_reference_label_and_station_labels() {
        let mut d = fixture::design();
        d.ports.push(fixture::port("zero", 0.5, 0.2, 0.0, 0.0));
        d.ports.push(fixture::port("late", 0.45, 359.5, 5.0, 0.0));
        for s in all_settings() {
            assert_clear(&d, &s, "clock zero");
        }
    }

    proptest::proptest! {
        // A fixed seed: the same 40 layouts every run, so a run is repeatable; the
        // placement is not proven clear for every possible layout (see the README).
        #![proptest_config(proptest::prelude::ProptestConfig {
            cases: 40,
            rng_seed: proptest::test_runner::RngSeed::Fixed(0x5eed_0001),
            ..Default::default()
        })]

        #[test]
        fn no_two_printed_items_touch_on_random_layouts(
            ports in proptest::collection::vec(
                (0.40f64..0.80, 0.0f64..360.0, -40.0f64..40.0, -30.0f64..30.0, 0.8f64..3.0),
                1..9,
            ),
            paper in 0usize..2,
            landscape in proptest::bool::ANY,
        ) {
            // Holes drilled apart: centres at least both radii, 0.3 mm of cross each
            // and the clearance apart, across or along the tube (fixed by the builder).
            for (i, a) in ports.iter().enumerate() {
                for b in &ports[i + 1..] {
                    let dx = (a.1 - b.1).to_radians().abs() * 27.0;
                    let dy = (a.0 - b.0).abs() * 1000.0;
                    proptest::prop_assume!(dx.max(dy) >= 0.5 * (a.4 + b.4) + 0.6 + CLEARANCE_MM);
                }
            }
            let mut d = fixture::design();
            d.ports = ports
                .iter()
                .enumerate()
                .map(|(k, &(st, clk, t, a, dia))| {
                    let mut p = fixture::port(&format!("p{k}"), st, clk, t, a);
                    p.nozzle = crate::model::NozzleSpec::Hole {
                        diameter_m: dia * 1e-3,
                        discharge_coefficient: 0.8,
                    };
                    p
                })
                .collect();
            let s = TemplateSettings {
                paper: [Paper::A4, Paper::Letter][paper],
                orientation: if landscape { Orientation::Landscape } else { Orientation::Portrait },
                ..Default::default()
            };
            let pages = drill_template_pages(&d, &s).unwrap();
            for p in &pages {
                if let Some((g, a, b)) = tightest(&p.svg) {
                    proptest::prop_assert!(
                        g >= CLEARANCE_MM - WRITTEN_SLACK_MM,
                        "page {} {}: {} and {} are {:.3} mm apart", p.row, p.column, a, b, g
                    );
                }
            }
        }
    }

    #[test]
    fn pages_with_only_tube_outline_are_left_out() {
        let mut d = fixture::design();
        d.airframe.fins = None;
        d.airframe.keep_outs.clear();
        d.ports = vec![
            fixture::port("fore", 0.42, 90.0, 0.0, 0.0),
            fixture::port("aft", 0.95, 90.0, 0.0, 0.0),
        ];
        let s = TemplateSettings::default();
        let l = sheet_layout(&d, &s).unwrap();
        assert_eq!(l.grid, (3, 1), "the case needs three rows of A4");
        let pages = drill_template_pages(&d, &s).unwrap();
        let rows: Vec<usize> = pages.iter().map(|p| p.row).collect();
        // Row 2 spans stations of about 0.58 to 0.85 m: surface only.
        assert_eq!(rows, vec![1, 3]);
        for p in &pages {
            assert!(p
                .svg
                .contains(&format!("row {}, column 1 (of 3 × 1)", p.row)));
        }
        assert!(pages[0].svg.contains("Assembly: 3 × 1 pages"));
    }

    #[test]
    fn single_sheet_has_true_size_attributes() {
        let d = fixture::design();
        let s = single();
        let pages = drill_template_svg(&d, &s).unwrap();
        assert_eq!(pages.len(), 1);
        let doc = Document::parse(&pages[0]).unwrap();
        let root = doc.root_element();
        let l = sheet_layout(&d, &s).unwrap();
        let (w, h) = (attr(&root, "width"), attr(&root, "height"));
        assert!(root.attribute("width").unwrap().ends_with("mm"));
        assert!(root.attribute("height").unwrap().ends_with("mm"));
        assert_eq!(
            root.attribute("viewBox").unwrap(),
            format!("0 0 {} {}", fmt3(w), fmt3(h))
        );
        assert!((w - (l.width_mm + 20.0)).abs() < 1e-3);
        assert!((h - (l.height_mm + 20.0)).abs() < 1e-3);
        // The unrolled surface is π × outer diameter wide; the glue strip follows it.
        let surface = by_id(&doc, "surface");
        assert!((attr(&surface, "width") - std::f64::consts::PI * 54.0).abs() < 1e-3);
        let glue = doc
            .descendants()
            .find(|n| n.attribute("class") == Some("glue"))
            .unwrap();
        assert!((attr(&glue, "x") - std::f64::consts::PI * 54.0).abs() < 1e-3);
        assert!((attr(&glue, "width") - 15.0).abs() < 1e-9);
        // Height: ports span 420–600 mm, 25 mm margin each side; fins at 860 mm are
        // beyond the 60 mm reach.
        assert!((attr(&surface, "height") - 230.0).abs() < 1e-3);
        assert!((l.top_station_m - 0.395).abs() < 1e-12);
    }

    #[test]
    fn holes_sit_at_clock_times_radius_and_station() {
        let d = fixture::design();
        let pages = drill_template_svg(&d, &single()).unwrap();
        let doc = Document::parse(&pages[0]).unwrap();
        let surface = by_id(&doc, "surface");
        let (sx, sy) = (attr(&surface, "x"), attr(&surface, "y"));
        // Independent of the layout code: the top station is the first port less the margin.
        let top_m = 0.42 - 0.025;
        for port in &d.ports {
            let g = by_id(&doc, &format!("port-{}", port.name));
            let c = g.descendants().find(|n| n.has_tag_name("circle")).unwrap();
            let x = port.clock_rad.rem_euclid(TAU) * 27.0;
            let y = (port.station_m - top_m) * 1000.0;
            assert!((attr(&c, "cx") - sx - x).abs() < 0.01, "{}", port.name);
            assert!((attr(&c, "cy") - sy - y).abs() < 0.01, "{}", port.name);
            assert!((attr(&c, "r") - 0.75).abs() < 0.01);
            // Label names the port and its station, clock and cant.
            let text: String = g
                .descendants()
                .filter(|n| n.is_text())
                .map(|n| n.text().unwrap().to_string())
                .collect::<Vec<_>>()
                .join(" ");
            assert!(text.contains(&port.name), "{text}");
            assert!(
                text.contains(&format!("{:.1} mm", port.station_m * 1000.0)),
                "{text}"
            );
            assert!(
                text.contains(&format!("clk {:.1}°", port.clock_rad.to_degrees())),
                "{text}"
            );
            assert!(text.contains("cant tan"), "{text}");
        }
    }

    /// Direction (dx, dy) of a port's lean arrow on the paper, or None.
    fn lean(doc: &Document, name: &str) -> Option<(f64, f64)> {
        let g = by_id(doc, &format!("port-{name}"));
        let l = g
            .descendants()
            .find(|n| n.has_tag_name("line") && n.attribute("class") == Some("lean"))?;
        Some((
            attr(&l, "x2") - attr(&l, "x1"),
            attr(&l, "y2") - attr(&l, "y1"),
        ))
    }

    #[test]
    fn lean_arrows_follow_the_cant() {
        let d = fixture::design();
        let pages = drill_template_svg(&d, &single()).unwrap();
        let doc = Document::parse(&pages[0]).unwrap();
        // fore-1: +10° tangential cant tilts the exhaust against growing clock: left.
        let (dx, dy) = lean(&doc, "fore-1").unwrap();
        assert!(dx < -6.9 && dy.abs() < 1e-3, "{dx} {dy}");
        // fore-2: −10° tangential (right) and +5° axial (toward the tail: down).
        let (dx, dy) = lean(&doc, "fore-2").unwrap();
        let (t, a) = (10f64.to_radians(), 5f64.to_radians());
        let (u, v) = (t.sin() * a.cos(), a.sin());
        let n = u.hypot(v);
        assert!(
            (dx - 7.0 * u / n).abs() < 2e-3 && (dy - 7.0 * v / n).abs() < 2e-3,
            "{dx} {dy}"
        );
        // aft-1: −8° axial, toward the nose: up.
        let (dx, dy) = lean(&doc, "aft-1").unwrap();
        assert!(dx.abs() < 1e-3 && dy < -6.9, "{dx} {dy}");
        // aft-2: no cant, no arrow.
        assert!(lean(&doc, "aft-2").is_none());
    }

    #[test]
    fn each_hole_prints_its_jig_angle_and_tilt() {
        let d = fixture::design();
        let pages = drill_template_svg(&d, &single()).unwrap();
        let doc = Document::parse(&pages[0]).unwrap();
        for port in &d.ports {
            let (t, a) = (port.tangential_cant_rad, port.axial_cant_rad);
            // By hand from the README's combined-cant formula
            // e = n cos t cos a − r̂ sin t cos a − x̂ sin a: the angle from the normal is
            // acos(e·n) = acos(cos t cos a); on the surface, e·r̂ = −sin t cos a
            // (toward growing clock) and −e·x̂ = sin a (toward aft).
            let jig = (t.cos() * a.cos()).acos().to_degrees();
            let (u, v) = (-t.sin() * a.cos(), a.sin());
            let g = by_id(&doc, &format!("port-{}", port.name));
            let text: String = g
                .descendants()
                .filter(|n| n.is_text())
                .map(|n| n.text().unwrap().to_string())
                .collect::<Vec<_>>()
                .join(" ");
            if u.hypot(v) < 1e-12 {
                assert!(text.contains("jig 0.0° (square)"), "{text}");
                continue;
            }
            let mut tilt = u.atan2(v).to_degrees();
            if tilt <= -180.0 + 1e-9 {
                tilt = 180.0;
            }
            let want = format!("jig {jig:.1}°  tilt {tilt:.1}°");
            assert!(text.contains(&want), "{}: {text} (want {want})", port.name);
            // The tilt is the lean arrow's direction on the paper (x right, y aft).
            let (dx, dy) = lean(&doc, &port.name).unwrap();
            let arrow = dx.atan2(dy).to_degrees();
            let diff = (arrow - tilt + 540.0).rem_euclid(360.0) - 180.0;
            // The arrow's end points are written to 0.001 mm over 7 mm: 0.02°.
            assert!(diff.abs() < 0.02, "{}: {arrow} vs {tilt}", port.name);
        }
        // Hand values for the fixture: fore-1 (t = +10°, a = 0) tilts toward
        // falling clock, −90°; aft-1 (a = −8°) toward the nose, 180°.
        let fore = d.ports.iter().find(|p| p.name == "fore-1").unwrap();
        let (jig, dir) = jig_setting(fore);
        assert!((jig.to_degrees() - 10.0).abs() < 1e-9);
        assert!((dir.unwrap().to_degrees() + 90.0).abs() < 1e-9);
        let aft = d.ports.iter().find(|p| p.name == "aft-1").unwrap();
        assert!((jig_setting(aft).1.unwrap().to_degrees() - 180.0).abs() < 1e-9);
        assert!(
            jig_setting(d.ports.iter().find(|p| p.name == "aft-2").unwrap())
                .1
                .is_none()
        );
    }

    #[test]
    fn rulers_measure_exactly_100_mm_and_4_in() {
        let d = fixture::design();
        let pages = drill_template_svg(&d, &TemplateSettings::default()).unwrap();
        let doc = Document::parse(&pages[0]).unwrap();
        for (id, length, ticks, pitch) in [
            ("ruler-mm", 100.0, 101, 1.0),
            ("ruler-in", 101.6, 33, 25.4 / 8.0),
        ] {
            let g = by_id(&doc, id);
            let bar = g
                .children()
                .find(|n| n.attribute("class") == Some("ruler-bar"))
                .unwrap();
            assert_eq!(attr(&bar, "x2") - attr(&bar, "x1"), length, "{id}");
            let xs: Vec<f64> = g
                .children()
                .filter(|n| n.attribute("class") == Some("ruler-tick"))
                .map(|n| attr(&n, "x1"))
                .collect();
            assert_eq!(xs.len(), ticks, "{id}");
            let x0 = attr(&bar, "x1");
            for (k, x) in xs.iter().enumerate() {
                // Printed to 3 decimals: within half a micrometre of k × pitch.
                assert!((x - x0 - k as f64 * pitch).abs() <= 0.0005, "{id} tick {k}");
            }
        }
        assert!(pages[0].contains("check before drilling"));
        // The rulers are on the first page whole, not split across pages.
        let l = sheet_layout(&d, &TemplateSettings::default()).unwrap();
        assert!(l.window_mm.0 >= 101.6 + 10.0);
    }

    #[test]
    fn notes_carry_name_units_frame_and_safety() {
        let d = fixture::design();
        let page = &drill_template_svg(&d, &single()).unwrap()[0];
        for needle in [
            "test-54mm",
            "Print at 100 %",
            "distance aft of the nose tip",
            "printed side out",
            "clockwise seen from behind the tail",
            "eye protection",
            "deburr",
            "glue here",
            "reference line, clock 0°",
            "keep out: coupler",
            "keep out: rail button",
        ] {
            assert!(page.contains(needle), "missing {needle}");
        }
    }

    #[test]
    fn pages_cover_the_sheet_with_overlap() {
        let d = fixture::design();
        for (paper, orientation) in [
            (Paper::A4, Orientation::Portrait),
            (Paper::A4, Orientation::Landscape),
            (Paper::Letter, Orientation::Portrait),
            (Paper::Letter, Orientation::Landscape),
        ] {
            let s = TemplateSettings {
                paper,
                orientation,
                ..Default::default()
            };
            let l = sheet_layout(&d, &s).unwrap();
            let pages = drill_template_svg(&d, &s).unwrap();
            assert_eq!(pages.len(), l.grid.0 * l.grid.1);
            let (pw, ph) = match (paper, orientation) {
                (Paper::A4, Orientation::Portrait) => (210.0, 297.0),
                (Paper::A4, Orientation::Landscape) => (297.0, 210.0),
                (Paper::Letter, Orientation::Portrait) => (215.9, 279.4),
                (Paper::Letter, Orientation::Landscape) => (279.4, 215.9),
            };
            // Windows in sheet coordinates, read back from each page's clip and shift.
            let mut windows = Vec::new();
            for (i, page) in pages.iter().enumerate() {
                let doc = Document::parse(page).unwrap();
                let root = doc.root_element();
                assert_eq!(root.attribute("width").unwrap(), format!("{}mm", fmt3(pw)));
                assert_eq!(root.attribute("height").unwrap(), format!("{}mm", fmt3(ph)));
                assert_eq!(
                    root.attribute("viewBox").unwrap(),
                    format!("0 0 {} {}", fmt3(pw), fmt3(ph))
                );
                let clip = doc
                    .descendants()
                    .find(|n| {
                        n.has_tag_name("rect") && n.parent().unwrap().has_tag_name("clipPath")
                    })
                    .unwrap();
                let (cx, cy, cw, ch) = (
                    attr(&clip, "x"),
                    attr(&clip, "y"),
                    attr(&clip, "width"),
                    attr(&clip, "height"),
                );
                // The window stays inside the printable margin.
                assert!(cx >= 10.0 - 1e-9 && cy >= 10.0 - 1e-9);
                assert!(cx + cw <= pw - 10.0 + 1e-3 && cy + ch <= ph - 10.0 + 1e-3);
                let (tx, ty) = sheet_offset(&doc);
                windows.push((cx - tx, cy - ty, cx - tx + cw, cy - ty + ch));
                let p = l.pages[i];
                assert!(page.contains(&page_title(p.row, p.column, l.grid)));
            }
            // Every point of the sheet lies in some window (sampled every 0.5 mm).
            let mut y = 0.0;
            while y <= l.height_mm {
                let mut x = 0.0;
                while x <= l.width_mm {
                    assert!(
                        windows.iter().any(|w| x >= w.0 - 1e-6
                            && x <= w.2 + 1e-6
                            && y >= w.1 - 1e-6
                            && y <= w.3 + 1e-6),
                        "{paper:?} {orientation:?}: ({x}, {y}) on no page"
                    );
                    x += 0.5;
                }
                y += 0.5;
            }
            // Neighbours share exactly the overlap.
            let (rows, cols) = l.grid;
            for r in 0..rows {
                for c in 0..cols {
                    let w = windows[r * cols + c];
                    if c + 1 < cols {
                        let e = windows[r * cols + c + 1];
                        assert!((w.2 - e.0 - 15.0).abs() < 1e-3);
                    }
                    if r + 1 < rows {
                        let e = windows[(r + 1) * cols + c];
                        assert!((w.3 - e.1 - 15.0).abs() < 1e-3);
                    }
                }
            }
        }
    }

    #[test]
    fn paged_holes_land_where_the_sheet_puts_them() {
        let d = fixture::design();
        let s = TemplateSettings::default();
        let l = sheet_layout(&d, &s).unwrap();
        assert!(l.grid.0 > 1, "the fixture needs more than one A4 page");
        let pages = drill_template_svg(&d, &s).unwrap();
        for port in &d.ports {
            let (x, y) = l.point_mm(port.station_m, port.clock_rad);
            let mut seen = 0;
            for page in &pages {
                let doc = Document::parse(page).unwrap();
                let (tx, ty) = sheet_offset(&doc);
                let c = by_id(&doc, &format!("port-{}", port.name))
                    .descendants()
                    .find(|n| n.has_tag_name("circle"))
                    .unwrap();
                let (px, py) = (attr(&c, "cx") + tx, attr(&c, "cy") + ty);
                let (ox, oy) = l.window_origin_mm;
                if px >= ox && px <= ox + l.window_mm.0 && py >= oy && py <= oy + l.window_mm.1 {
                    seen += 1;
                    assert!((attr(&c, "cx") - x).abs() < 0.01 && (attr(&c, "cy") - y).abs() < 0.01);
                }
            }
            assert!(seen >= 1, "{} printed on no page", port.name);
        }
        // Alignment crosses sit in the overlaps, so they print on both neighbours.
        let marks = pages[0].matches(r#"<circle class="align""#).count();
        assert_eq!(marks, l.grid.1 * (l.grid.0 - 1) + l.grid.0 * (l.grid.1 - 1));
    }

    #[test]
    fn patches_wrap_across_clock_zero() {
        let mut d = fixture::design();
        d.airframe.keep_outs = vec![KeepOut {
            name: "switch".to_string(),
            zone: Zone::Patch {
                station_m: 0.5,
                clock_rad: 358f64.to_radians(),
                length_m: 0.03,
                width_m: 0.02,
            },
        }];
        let page = &drill_template_svg(&d, &single()).unwrap()[0];
        let doc = Document::parse(page).unwrap();
        let g = by_id(&doc, "keep-out-switch");
        let rects: Vec<_> = g.children().filter(|n| n.has_tag_name("rect")).collect();
        assert_eq!(rects.len(), 2);
        let wrap = std::f64::consts::PI * 54.0;
        let centre = 358f64.to_radians() * 27.0;
        let (a, b) = (&rects[0], &rects[1]);
        // One piece starts at the left edge, the other ends at the glue edge; together 20 mm.
        let widths = attr(a, "width") + attr(b, "width");
        assert!((widths - 20.0).abs() < 2e-3);
        let starts: Vec<f64> = rects.iter().map(|r| attr(r, "x")).collect();
        assert!(starts.iter().any(|&x| x.abs() < 1e-9));
        assert!(rects
            .iter()
            .any(|r| (attr(r, "x") - (centre - 10.0)).abs() < 2e-3
                && (attr(r, "x") + attr(r, "width") - wrap).abs() < 2e-3));
        for r in &rects {
            assert!((attr(r, "height") - 30.0).abs() < 2e-3);
        }
        // A band spans the whole width.
        let page = &drill_template_svg(&fixture::design(), &single()).unwrap()[0];
        let doc = Document::parse(page).unwrap();
        let band = by_id(&doc, "keep-out-coupler")
            .children()
            .find(|n| n.has_tag_name("rect"))
            .unwrap();
        assert!((attr(&band, "width") - wrap).abs() < 2e-3);
        assert!((attr(&band, "height") - 40.0).abs() < 2e-3);
    }

    #[test]
    fn station_ticks_follow_the_units() {
        let d = fixture::design();
        for (ticks, pitch) in [(TickUnits::Millimetres, 10.0), (TickUnits::Inches, 12.7)] {
            let s = TemplateSettings { ticks, ..single() };
            let page = &drill_template_svg(&d, &s).unwrap()[0];
            let doc = Document::parse(page).unwrap();
            let top = attr(&by_id(&doc, "surface"), "y");
            let ys: Vec<f64> = by_id(&doc, "station-ticks")
                .children()
                .filter(|n| n.has_tag_name("line") && attr(n, "x1") == 0.0)
                .map(|n| attr(&n, "y1"))
                .collect();
            assert!(ys.len() > 10);
            for y in &ys {
                // Each tick at a whole multiple of the pitch from the nose tip.
                let station_mm = y - top + 395.0;
                let k = (station_mm / pitch).round();
                assert!(
                    (station_mm - k * pitch).abs() < 2e-3,
                    "{ticks:?} {station_mm}"
                );
            }
            for w in ys.windows(2) {
                assert!((w[1] - w[0] - pitch).abs() < 2e-3);
            }
        }
    }

    #[test]
    fn fins_near_the_ports_are_drawn_and_extend_the_sheet() {
        let mut d = fixture::design();
        d.ports.push(fixture::port("tail", 0.84, 0.0, 0.0, 0.0));
        let l = sheet_layout(&d, &single()).unwrap();
        // Fin roots run 860–980 mm; the tube ends at 1000 mm, inside the 25 mm margin.
        assert!((l.bottom_station_m - 1.0).abs() < 1e-12);
        let page = &drill_template_svg(&d, &single()).unwrap()[0];
        let doc = Document::parse(page).unwrap();
        let fins: Vec<_> = doc
            .descendants()
            .filter(|n| n.attribute("class") == Some("fin"))
            .collect();
        assert_eq!(fins.len(), 3);
        for (f, clock) in fins.iter().zip([60.0, 180.0, 300.0]) {
            let x: f64 = clock * std::f64::consts::PI / 180.0 * 27.0;
            assert!((attr(f, "x1") - x).abs() < 2e-3);
            assert!((attr(f, "y2") - attr(f, "y1") - 120.0).abs() < 2e-3);
        }
        assert!(page.contains("aft end of tube"));
    }

    #[test]
    fn output_is_deterministic_and_fixed_format() {
        let d = fixture::design();
        let s = TemplateSettings::default();
        let a = drill_template_svg(&d, &s).unwrap();
        assert_eq!(a, drill_template_svg(&d, &s).unwrap());
        for page in &a {
            let doc = Document::parse(page).unwrap();
            for n in doc.descendants().filter(|n| n.has_tag_name("circle")) {
                for name in ["cx", "cy", "r"] {
                    let v = n.attribute(name).unwrap();
                    assert_eq!(v.split('.').nth(1).map(str::len), Some(3), "{v}");
                }
            }
        }
    }

    #[test]
    fn bad_settings_and_empty_designs_are_errors() {
        let mut d = fixture::design();
        let s = TemplateSettings {
            margin_mm: 100.0,
            ..Default::default()
        };
        assert!(matches!(
            drill_template_svg(&d, &s),
            Err(ExportError::Setting { .. })
        ));
        let s = TemplateSettings {
            page_overlap_mm: f64::NAN,
            ..Default::default()
        };
        assert!(matches!(
            drill_template_svg(&d, &s),
            Err(ExportError::Setting { .. })
        ));
        d.ports.clear();
        assert_eq!(
            drill_template_svg(&d, &TemplateSettings::default()),
            Err(ExportError::NoPorts)
        );
    }

    #[test]
    fn names_are_escaped() {
        let mut d = fixture::design();
        d.name = "a<b & \"c\"".to_string();
        d.ports[0].name = "p<1>".to_string();
        let page = &drill_template_svg(&d, &single()).unwrap()[0];
        let doc = Document::parse(page).unwrap();
        assert!(doc
            .descendants()
            .any(|n| n.attribute("id") == Some("port-p<1>")));
    }
}
