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
/// Height of the notes-and-rulers block above the surface, mm.
const HEADER_MM: f64 = 67.0;
/// Narrowest sheet, so the notes and the 4 in ruler fit, mm.
const HEADER_WIDTH_MM: f64 = 125.0;
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
    fn text(&mut self, class: &str, x: f64, y: f64, size: f64, body: &str) {
        let _ = writeln!(
            self.0,
            r#"<text class="{class}" x="{}" y="{}" font-size="{}">{}</text>"#,
            fmt3(x),
            fmt3(y),
            fmt3(size),
            esc(body)
        );
    }
    fn text_centred(&mut self, class: &str, x: f64, y: f64, size: f64, body: &str) {
        let _ = writeln!(
            self.0,
            r#"<text class="{class}" x="{}" y="{}" font-size="{}" text-anchor="middle">{}</text>"#,
            fmt3(x),
            fmt3(y),
            fmt3(size),
            esc(body)
        );
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
    /// A page-alignment mark: circled cross, labelled so it is not taken for a hole.
    fn align_mark(&mut self, x: f64, y: f64) {
        self.cross("align", x, y, 5.0);
        let _ = writeln!(
            self.0,
            r#"<circle class="align" cx="{}" cy="{}" r="3.000"/>"#,
            fmt3(x),
            fmt3(y)
        );
        self.text("align-label", x + 3.5, y - 3.5, 2.0, "align");
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
        TickUnits::Inches => format!("{:.3} in", station_m / 0.0254),
    }
}

fn notes_and_rulers(svg: &mut Svg, design: &Design, s: &TemplateSettings) {
    svg.text(
        "title",
        0.0,
        6.0,
        4.2,
        &format!("Drilling template: {}", design.name),
    );
    let units = match s.ticks {
        TickUnits::Millimetres => "stations in mm",
        TickUnits::Inches => "stations in inches",
    };
    let lines = [
        format!("Print at 100 % (no fit to page), 1:1 scale; {units}, angles in degrees."),
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
    ];
    for (i, l) in lines.iter().enumerate() {
        svg.text("note", 0.0, 11.5 + 3.3 * i as f64, 2.4, l);
    }
    // Calibration rulers, 2 mm in so the "0" label is not cut at the sheet's edge.
    let x0 = RULER_X_MM;
    let y_mm = 42.0;
    svg.open(r#"<g id="ruler-mm">"#);
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
    svg.text("ruler-label", x0 + 103.0, y_mm, 2.4, "100 mm (cm marked)");
    svg.open("</g>");
    let y_in = 55.0;
    let eighth = 25.4 / 8.0;
    svg.open(r#"<g id="ruler-in">"#);
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
    svg.text("ruler-label", x0 + 104.6, y_in, 2.4, "4 in (1/8 in ticks)");
    svg.open("</g>");
    svg.text(
        "ruler-note",
        0.0,
        y_in + 5.0,
        2.6,
        "check before drilling: both bars must measure true on the printout",
    );
}

fn draw_port(svg: &mut Svg, port: &Port, l: &SheetLayout, s: &TemplateSettings) {
    let (x, y) = l.point_mm(port.station_m, port.clock_rad);
    let r = 500.0 * port.nozzle.hole_diameter_m();
    let _ = writeln!(svg.0, r#"<g class="port" id="port-{}">"#, esc(&port.name));
    let _ = writeln!(
        svg.0,
        r#"<circle class="hole" cx="{}" cy="{}" r="{}"/>"#,
        fmt3(x),
        fmt3(y),
        fmt3(r)
    );
    svg.cross("centre-cross", x, y, r.max(1.0) + 3.0);
    // Exhaust lean on the paper: +x is growing clock (the roll tangent), +y is aft.
    let e = port.exhaust_direction();
    let (u, v) = (e.dot(&port.roll_tangent()), -e.x);
    let lean = u.hypot(v);
    if lean > 1e-9 {
        let (du, dv) = (u / lean, v / lean);
        let start = r + 1.0;
        let end = start + 7.0;
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
    }
    // Labels to the right, or to the left near the glue edge.
    let right = x + 48.0 < l.wrap_mm;
    let lx = if right { x + r + 4.0 } else { x - r - 4.0 };
    let anchor = if right { "" } else { r#" text-anchor="end""# };
    let texts = [
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
    ];
    for (i, (size, body)) in texts.iter().enumerate() {
        let _ = writeln!(
            svg.0,
            r#"<text class="port-label" x="{}" y="{}" font-size="{}"{anchor}>{}</text>"#,
            fmt3(lx),
            fmt3(y - 3.0 + 3.0 * i as f64),
            fmt3(*size),
            esc(body)
        );
    }
    svg.open("</g>");
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

fn sheet_content(design: &Design, l: &SheetLayout, s: &TemplateSettings) -> String {
    let mut svg = Svg(String::new());
    let a = &design.airframe;
    notes_and_rulers(&mut svg, design, s);
    let (top, h) = (
        l.surface_top_mm,
        (l.bottom_station_m - l.top_station_m) * 1000.0,
    );
    let ys = |station: f64| top + (station - l.top_station_m) * 1000.0;
    let clip = |station: f64| station.clamp(l.top_station_m, l.bottom_station_m);
    let w = l.wrap_mm;

    // Glue strip and the cut outline.
    svg.rect("glue", w, top, s.glue_strip_mm, h);
    svg.text_rotated(
        "glue-label",
        w + 0.5 * s.glue_strip_mm - 1.0,
        top + 4.0,
        2.6,
        "glue here",
    );
    svg.open(r#"<g id="surface-group">"#);
    let _ = writeln!(
        svg.0,
        r#"<rect id="surface" class="cut" x="0.000" y="{}" width="{}" height="{}"/>"#,
        fmt3(top),
        fmt3(w),
        fmt3(h)
    );

    // Keep-out zones.
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
            svg.0,
            r#"<g class="keep-out-zone" id="keep-out-{}">"#,
            esc(&k.name)
        );
        for (x0, x1) in &spans {
            svg.rect("keep-out", *x0, y0, x1 - x0, y1 - y0);
        }
        if let Some((x0, _)) = spans.first() {
            svg.text(
                "keep-out-label",
                x0 + 1.0,
                y0 + 3.0,
                2.2,
                &format!("keep out: {}", k.name),
            );
        }
        svg.open("</g>");
    }

    // Clock grid, reference line and glue edge.
    for q in 1..4 {
        let x = w * q as f64 / 4.0;
        svg.line("grid", x, top, x, top + h);
        svg.text(
            "grid-label",
            x + 0.8,
            top + 3.0,
            2.2,
            &format!("{}°", 90 * q),
        );
    }
    svg.line("reference", 0.0, top, 0.0, top + h);
    svg.text_rotated(
        "reference-label",
        13.0,
        top + 14.0,
        2.6,
        "reference line, clock 0°",
    );
    svg.text_rotated(
        "grid-label",
        w - 8.0,
        top + 14.0,
        2.2,
        "clock 360° = 0°, glue edge",
    );

    // Tube ends when the surface reaches them.
    if (l.top_station_m - a.tube_fore_station_m()).abs() < 1e-9 {
        svg.text("tube-end", 0.5 * w, top - 1.0, 2.4, "fore end of tube");
    }
    if (l.bottom_station_m - a.tube_aft_station_m()).abs() < 1e-9 {
        svg.text("tube-end", 0.5 * w, top + h + 3.5, 2.4, "aft end of tube");
    }

    // Fin roots.
    if let Some(f) = &a.fins {
        let (from, to) = (clip(f.station_m), clip(f.station_m + f.root_chord_m));
        if to > from {
            for (k, clock) in f.clocks_rad().iter().enumerate() {
                let x = clock.rem_euclid(TAU) * l.radius_mm;
                svg.line("fin", x, ys(from), x, ys(to));
                svg.text(
                    "fin-label",
                    x + 0.8,
                    ys(from) + 6.0,
                    2.4,
                    &format!("fin {}", k + 1),
                );
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
    svg.open(r#"<g id="station-ticks">"#);
    for k in first..=last {
        let station = k as f64 * step_m;
        let y = ys(station);
        let len = if k % 5 == 0 { 5.0 } else { 3.0 };
        svg.line("tick", 0.0, y, len, y);
        svg.line("tick", w, y, w - len, y);
        let label = match s.ticks {
            TickUnits::Millimetres => format!("{}", k * 10),
            TickUnits::Inches => format!("{:.1} in", k as f64 * 0.5),
        };
        svg.text("tick-label", len + 0.8, y + 0.7, 1.8, &label);
    }
    svg.open("</g>");

    for port in &design.ports {
        draw_port(&mut svg, port, l, s);
    }
    svg.open("</g>");

    // Alignment crosses in the page overlaps (only when paged).
    let o = s.page_overlap_mm;
    let (rows, cols) = l.grid;
    let (sx, sy) = l.step_mm(o);
    let (ww, wh) = l.window_mm;
    for c in 1..cols {
        let x = c as f64 * sx + 0.5 * o;
        for r in 0..rows {
            let y = (r as f64 * sy + 0.5 * wh).min(l.height_mm - 6.0);
            svg.align_mark(x, y);
        }
    }
    for r in 1..rows {
        let y = r as f64 * sy + 0.5 * o;
        for c in 0..cols {
            let x = (c as f64 * sx + 0.5 * ww).min(l.width_mm - 6.0);
            svg.align_mark(x, y);
        }
    }
    svg.0
}

/// The drilling template as one SVG document per page, row by row.
///
/// Each page's root `<svg>` has `width` and `height` in millimetres and a `viewBox`
/// of the same numbers, so printing at 100 % gives true size.
pub fn drill_template_svg(
    design: &Design,
    s: &TemplateSettings,
) -> Result<Vec<String>, ExportError> {
    let l = sheet_layout(design, s)?;
    let content = sheet_content(design, &l, s);
    let (pw, ph) = l.page_mm;
    let (ox, oy) = l.window_origin_mm;
    let (ww, wh) = l.window_mm;
    let (rows, cols) = l.grid;
    Ok(l
        .pages
        .iter()
        .map(|p| {
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
                "<title>Drilling template: {}, page {}/{}</title>",
                esc(&design.name),
                p.row,
                p.column
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
            out.push_str(&content);
            let _ = writeln!(out, "</g></g>");
            if !s.single_sheet {
                let _ = writeln!(
                    out,
                    r#"<text class="page-label" x="{}" y="{}" font-size="3.000" font-family="sans-serif">page {}/{} (row/column of {} × {}) · {}</text>"#,
                    fmt3(ox),
                    fmt3(oy + wh + PAGE_LABEL_MM - 1.0),
                    p.row,
                    p.column,
                    rows,
                    cols,
                    esc(&design.name)
                );
            }
            let _ = writeln!(out, "</svg>");
            out
        })
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
            let c = g.children().find(|n| n.has_tag_name("circle")).unwrap();
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
            .children()
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
                assert!(page.contains(&format!("page {}/{}", p.row, p.column)));
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
                    .children()
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
