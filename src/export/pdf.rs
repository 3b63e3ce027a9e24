//! SVG pages to one PDF document, page for page at true size.
//!
//! Builders print from PDF, where "actual size" is a print setting every viewer
//! has. Each SVG page is read with usvg (the parser behind the PNG plots, same
//! version as resvg) and drawn with pdf-writer: paths as PDF paths, text as the
//! outlines of the bundled DejaVu Sans glyphs (so the PDF needs no fonts and looks
//! the same everywhere), clip paths as PDF clips. A page is as big as its SVG's
//! `width` × `height` (millimetres in, points out: 1 mm = 72 / 25.4 pt), so the
//! MediaBox is the paper.
//!
//! Coordinates are rounded to 0.001 pt (0.35 µm); shapes wholly outside a page's
//! clip window are left out; content streams are Flate-compressed.
//!
//! Groups whose `id` is a plain word (letters, digits, `-`) are wrapped in a marked
//! content sequence tagged with that id (for example `/ruler-mm BMC … EMC`), so a
//! reader can find the calibration rulers in the drawing.

use super::plots::font_database;
use super::ExportError;
use pdf_writer::{Content, Finish, Name, Pdf, Rect, Ref, TextStr};
use resvg::usvg::{self, Node, Paint, Transform};

/// Points per CSS pixel: usvg measures in CSS pixels (96 per inch), PDF in points (72).
const PT_PER_PX: f64 = 72.0 / 96.0;

/// Collects a page's drawing and the opacities it uses.
struct Page {
    content: Content,
    height_pt: f64,
    /// Fill or stroke opacities in use, each with its graphics-state name `/Gk`.
    alphas: Vec<f32>,
    /// Box of the current clip in page points (x0, y0, x1, y1), if any.
    clip_box: Option<(f64, f64, f64, f64)>,
}

/// A value in points rounded to 0.001 pt.
fn pt3(v: f64) -> f32 {
    ((v * 1000.0).round() / 1000.0) as f32
}

impl Page {
    fn point(&self, ts: Transform, x: f32, y: f32) -> (f32, f32) {
        let (x, y) = (x as f64, y as f64);
        let px = ts.sx as f64 * x + ts.kx as f64 * y + ts.tx as f64;
        let py = ts.ky as f64 * x + ts.sy as f64 * y + ts.ty as f64;
        // PDF's y grows upward from the bottom of the page.
        (pt3(px * PT_PER_PX), pt3(self.height_pt - py * PT_PER_PX))
    }

    /// Box of a path in page points.
    fn bounds_pt(&self, data: &usvg::tiny_skia_path::Path, ts: Transform) -> (f64, f64, f64, f64) {
        let b = data.bounds();
        let corners = [
            self.point(ts, b.left(), b.top()),
            self.point(ts, b.right(), b.top()),
            self.point(ts, b.left(), b.bottom()),
            self.point(ts, b.right(), b.bottom()),
        ];
        corners.iter().fold(
            (
                f64::INFINITY,
                f64::INFINITY,
                f64::NEG_INFINITY,
                f64::NEG_INFINITY,
            ),
            |(a, b, c, d), &(x, y)| {
                (
                    a.min(x as f64),
                    b.min(y as f64),
                    c.max(x as f64),
                    d.max(y as f64),
                )
            },
        )
    }

    /// Whether a path lies wholly outside the current clip (so it prints nothing).
    fn culled(&self, data: &usvg::tiny_skia_path::Path, ts: Transform) -> bool {
        let Some((cx0, cy0, cx1, cy1)) = self.clip_box else {
            return false;
        };
        // Half a point of slack for stroke widths.
        let (x0, y0, x1, y1) = self.bounds_pt(data, ts);
        x1 < cx0 - 0.5 || x0 > cx1 + 0.5 || y1 < cy0 - 0.5 || y0 > cy1 + 0.5
    }

    fn path(&mut self, data: &usvg::tiny_skia_path::Path, ts: Transform) {
        use usvg::tiny_skia_path::PathSegment as S;
        let mut last = (0.0f32, 0.0f32);
        for seg in data.segments() {
            match seg {
                S::MoveTo(p) => {
                    let (x, y) = self.point(ts, p.x, p.y);
                    self.content.move_to(x, y);
                    last = (p.x, p.y);
                }
                S::LineTo(p) => {
                    let (x, y) = self.point(ts, p.x, p.y);
                    self.content.line_to(x, y);
                    last = (p.x, p.y);
                }
                S::QuadTo(c, p) => {
                    // The same curve as a cubic: control points 2/3 of the way to c.
                    let c1 = (
                        last.0 + 2.0 / 3.0 * (c.x - last.0),
                        last.1 + 2.0 / 3.0 * (c.y - last.1),
                    );
                    let c2 = (p.x + 2.0 / 3.0 * (c.x - p.x), p.y + 2.0 / 3.0 * (c.y - p.y));
                    let (a, b) = self.point(ts, c1.0, c1.1);
                    let (c, d) = self.point(ts, c2.0, c2.1);
                    let (e, f) = self.point(ts, p.x, p.y);
                    self.content.cubic_to(a, b, c, d, e, f);
                    last = (p.x, p.y);
                }
                S::CubicTo(c1, c2, p) => {
                    let (a, b) = self.point(ts, c1.x, c1.y);
                    let (c, d) = self.point(ts, c2.x, c2.y);
                    let (e, f) = self.point(ts, p.x, p.y);
                    self.content.cubic_to(a, b, c, d, e, f);
                    last = (p.x, p.y);
                }
                S::Close => {
                    self.content.close_path();
                }
            }
        }
    }

    fn alpha(&mut self, a: f32) {
        if a >= 1.0 {
            return;
        }
        let k = match self.alphas.iter().position(|&b| b == a) {
            Some(k) => k,
            None => {
                self.alphas.push(a);
                self.alphas.len() - 1
            }
        };
        let name = format!("G{k}");
        self.content.set_parameters(Name(name.as_bytes()));
    }

    fn draw_path(&mut self, p: &usvg::Path, ts: Transform) {
        if !p.is_visible() || self.culled(p.data(), ts) {
            return;
        }
        if let Some(fill) = p.fill() {
            if let Paint::Color(c) = fill.paint() {
                self.content.save_state();
                self.alpha(fill.opacity().get());
                self.content.set_fill_rgb(
                    c.red as f32 / 255.0,
                    c.green as f32 / 255.0,
                    c.blue as f32 / 255.0,
                );
                self.path(p.data(), ts);
                match fill.rule() {
                    usvg::FillRule::NonZero => self.content.fill_nonzero(),
                    usvg::FillRule::EvenOdd => self.content.fill_even_odd(),
                };
                self.content.restore_state();
            }
        }
        if let Some(stroke) = p.stroke() {
            if let Paint::Color(c) = stroke.paint() {
                // Line widths and dashes scale with the transform (uniform here).
                let scale = ((ts.sx * ts.sy - ts.kx * ts.ky).abs() as f64).sqrt() * PT_PER_PX;
                self.content.save_state();
                self.alpha(stroke.opacity().get());
                self.content.set_stroke_rgb(
                    c.red as f32 / 255.0,
                    c.green as f32 / 255.0,
                    c.blue as f32 / 255.0,
                );
                self.content
                    .set_line_width(pt3(stroke.width().get() as f64 * scale));
                if let Some(dash) = stroke.dasharray() {
                    let d: Vec<f32> = dash.iter().map(|v| pt3(*v as f64 * scale)).collect();
                    self.content
                        .set_dash_pattern(d, pt3(stroke.dashoffset() as f64 * scale));
                }
                self.path(p.data(), ts);
                self.content.stroke();
                self.content.restore_state();
            }
        }
    }

    /// Add a clip path's shapes as the current clip.
    fn clip(&mut self, g: &usvg::Group, ts: Transform) {
        let ts = ts.pre_concat(g.transform());
        for node in g.children() {
            match node {
                Node::Path(p) => {
                    let b = self.bounds_pt(p.data(), ts);
                    self.clip_box = Some(match self.clip_box {
                        // Nested clips: the overlap (our pages nest none).
                        Some(c) => (c.0.max(b.0), c.1.max(b.1), c.2.min(b.2), c.3.min(b.3)),
                        None => b,
                    });
                    self.path(p.data(), ts)
                }
                Node::Group(inner) => self.clip(inner, ts),
                _ => {}
            }
        }
    }

    fn group(&mut self, g: &usvg::Group, parent: Transform) {
        let ts = parent.pre_concat(g.transform());
        let id = g.id();
        let tagged = !id.is_empty()
            && id
                .chars()
                .all(|c| c.is_ascii_alphanumeric() || c == '-' || c == '_');
        if tagged {
            self.content.begin_marked_content(Name(id.as_bytes()));
        }
        let clipped = g.clip_path();
        let outer_clip = self.clip_box;
        if let Some(c) = clipped {
            self.content.save_state();
            self.clip(c.root(), ts.pre_concat(c.transform()));
            self.content.clip_nonzero();
            self.content.end_path();
        }
        for node in g.children() {
            match node {
                Node::Group(inner) => self.group(inner, ts),
                Node::Path(p) => self.draw_path(p, ts),
                Node::Text(t) => self.group(t.flattened(), ts),
                Node::Image(_) => {}
            }
        }
        if clipped.is_some() {
            self.content.restore_state();
            self.clip_box = outer_clip;
        }
        if tagged {
            self.content.end_marked_content();
        }
    }
}

/// Size of a PDF page in points from millimetres.
pub fn mm_to_pt(mm: f64) -> f64 {
    mm * 72.0 / 25.4
}

/// One PDF document holding `pages` (complete SVG documents), in order, each page
/// the size of its SVG. `title` goes into the document information.
pub fn svg_pages_to_pdf(pages: &[String], title: &str) -> Result<Vec<u8>, ExportError> {
    let options = usvg::Options {
        fontdb: font_database(),
        ..usvg::Options::default()
    };
    let catalog = Ref::new(1);
    let tree_id = Ref::new(2);
    let info = Ref::new(3);
    let mut next = 4;
    let mut alloc = || {
        let r = Ref::new(next);
        next += 1;
        r
    };
    let mut pdf = Pdf::new();
    let mut kids = Vec::new();
    for (k, svg) in pages.iter().enumerate() {
        let tree = usvg::Tree::from_str(svg, &options).map_err(|e| ExportError::Pdf {
            page: k + 1,
            reason: e.to_string(),
        })?;
        let size = tree.size();
        let (w_pt, h_pt) = (
            size.width() as f64 * PT_PER_PX,
            size.height() as f64 * PT_PER_PX,
        );
        let mut page = Page {
            content: Content::new(),
            height_pt: h_pt,
            alphas: Vec::new(),
            clip_box: None,
        };
        page.group(tree.root(), Transform::identity());
        let (page_id, content_id) = (alloc(), alloc());
        let states: Vec<(Ref, f32)> = page.alphas.iter().map(|&a| (alloc(), a)).collect();
        kids.push(page_id);
        let mut p = pdf.page(page_id);
        // usvg holds sizes as f32 CSS pixels; 0.001 pt rounding gives the paper's own numbers.
        p.media_box(Rect::new(0.0, 0.0, pt3(w_pt), pt3(h_pt)));
        p.parent(tree_id);
        p.contents(content_id);
        {
            let mut res = p.resources();
            let mut gs = res.ext_g_states();
            for (k, (r, _)) in states.iter().enumerate() {
                let name = format!("G{k}");
                gs.pair(Name(name.as_bytes()), *r);
            }
        }
        p.finish();
        let raw = page.content.finish();
        let packed = miniz_oxide::deflate::compress_to_vec_zlib(&raw, 6);
        pdf.stream(content_id, &packed)
            .filter(pdf_writer::Filter::FlateDecode);
        for (r, a) in states {
            pdf.ext_graphics(r).non_stroking_alpha(a).stroking_alpha(a);
        }
    }
    pdf.catalog(catalog).pages(tree_id);
    let count = kids.len() as i32;
    pdf.pages(tree_id).kids(kids).count(count);
    pdf.document_info(info)
        .title(TextStr(title))
        .producer(TextStr("portwright"));
    Ok(pdf.finish())
}

#[cfg(test)]
mod tests {
    use super::super::fixture;
    use super::super::template::{drill_template_svg, Paper, TemplateSettings};
    use super::*;

    /// Numbers after each `/MediaBox [` in the file, page by page.
    fn media_boxes(pdf: &str) -> Vec<Vec<f64>> {
        pdf.match_indices("/MediaBox [")
            .map(|(k, m)| {
                let rest = &pdf[k + m.len()..];
                rest[..rest.find(']').unwrap()]
                    .split_whitespace()
                    .map(|v| v.parse().unwrap())
                    .collect()
            })
            .collect()
    }

    /// Every content stream of the file, inflated, joined.
    fn content_streams(pdf: &[u8]) -> String {
        let mut out = String::new();
        let mut at = 0;
        while let Some(k) = find(&pdf[at..], b"stream\n") {
            let start = at + k + b"stream\n".len();
            let end = start + find(&pdf[start..], b"\nendstream").unwrap();
            if let Ok(raw) = miniz_oxide::inflate::decompress_to_vec_zlib(&pdf[start..end]) {
                out.push_str(&String::from_utf8_lossy(&raw));
                out.push('\n');
            }
            at = end + b"\nendstream".len();
        }
        out
    }

    fn find(hay: &[u8], needle: &[u8]) -> Option<usize> {
        hay.windows(needle.len()).position(|w| w == needle)
    }

    /// Horizontal segments (length, y) drawn inside the marked content tagged `tag`.
    fn horizontal_segments(pdf: &str, tag: &str) -> Vec<(f64, f64)> {
        let start = pdf.find(&format!("/{tag} BMC")).expect("tagged group");
        let body = &pdf[start..];
        let body = &body[..body.find("EMC").unwrap()];
        let mut stack: Vec<f64> = Vec::new();
        let mut at = (0.0, 0.0);
        let mut out = Vec::new();
        for tok in body.split_whitespace() {
            match tok {
                "m" => {
                    at = (stack[stack.len() - 2], stack[stack.len() - 1]);
                    stack.clear();
                }
                "l" => {
                    let p = (stack[stack.len() - 2], stack[stack.len() - 1]);
                    if (p.1 - at.1).abs() < 1e-3 {
                        out.push(((p.0 - at.0).abs(), p.1));
                    }
                    at = p;
                    stack.clear();
                }
                t => match t.parse::<f64>() {
                    Ok(v) => stack.push(v),
                    Err(_) => stack.clear(),
                },
            }
        }
        out
    }

    #[test]
    fn pages_are_the_paper_and_rulers_are_true_length() {
        let d = fixture::design();
        // ISO 216: A4 is 210 × 297 mm; ANSI: Letter is 8.5 × 11 in = 612 × 792 pt.
        for (paper, w_pt, h_pt) in [
            (Paper::A4, 210.0 * 72.0 / 25.4, 297.0 * 72.0 / 25.4),
            (Paper::Letter, 612.0, 792.0),
        ] {
            let s = TemplateSettings {
                paper,
                ..Default::default()
            };
            let pages = drill_template_svg(&d, &s).unwrap();
            let bytes = svg_pages_to_pdf(&pages, "test").unwrap();
            let text = String::from_utf8_lossy(&bytes);
            let drawn = content_streams(&bytes);
            assert!(text.starts_with("%PDF-"));
            let boxes = media_boxes(&text);
            assert_eq!(boxes.len(), pages.len());
            for b in &boxes {
                // pdf-writer writes f32 values: 0.01 pt (3.5 µm) covers the rounding.
                assert!(b[0] == 0.0 && b[1] == 0.0, "{b:?}");
                assert!(
                    (b[2] - w_pt).abs() < 0.01 && (b[3] - h_pt).abs() < 0.01,
                    "{b:?}"
                );
            }
            // The rulers on the first page: 100 mm = 283.465 pt and 4 in = 288 pt bars.
            for (tag, length_pt) in [("ruler-mm", 100.0 * 72.0 / 25.4), ("ruler-in", 288.0)] {
                let longest = horizontal_segments(&drawn, tag)
                    .iter()
                    .map(|s| s.0)
                    .fold(0.0, f64::max);
                assert!((longest - length_pt).abs() < 0.01, "{tag}: {longest} pt");
            }
        }
    }

    #[test]
    fn a_single_sheet_is_one_page_of_its_own_size() {
        let d = fixture::design();
        let s = TemplateSettings {
            single_sheet: true,
            ..Default::default()
        };
        let pages = drill_template_svg(&d, &s).unwrap();
        let bytes = svg_pages_to_pdf(&pages, "test").unwrap();
        let text = String::from_utf8_lossy(&bytes);
        let doc = roxmltree::Document::parse(&pages[0]).unwrap();
        let w_mm: f64 = doc
            .root_element()
            .attribute("width")
            .unwrap()
            .trim_end_matches("mm")
            .parse()
            .unwrap();
        let b = &media_boxes(&text)[0];
        assert!((b[2] - mm_to_pt(w_mm)).abs() < 0.01, "{b:?} {w_mm}");
        assert!(svg_pages_to_pdf(&["<svg".to_string()], "bad").is_err());
    }
}
