//! One self-contained HTML report: a title, a safety-cautions box, then sections
//! of paragraphs, lists, tables and plots.
//!
//! The page loads nothing from outside: the style sheet is inline and every plot
//! is an inline SVG, so the file can be mailed, archived or opened offline and
//! looks the same. All text given by the caller is escaped, so a layout name
//! such as `<x & y>` prints as written. The markup is well-formed XML as well as
//! HTML (every element closed, only the five XML entities), so a strict parser
//! can read it back, and the output is a pure function of the input: no dates,
//! no random ids.

use thiserror::Error;

/// Why a report could not be rendered.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum HtmlError {
    /// The report has no title.
    #[error("the report needs a title")]
    EmptyTitle,
    /// A table row has a different number of cells than the table has columns.
    #[error(
        "section `{section}`, table {table}: row {row} has {found} cells, expected {expected}"
    )]
    TableShape {
        /// Section heading.
        section: String,
        /// Table number within the section, from 1.
        table: usize,
        /// Row number, from 1.
        row: usize,
        /// Number of header cells.
        expected: usize,
        /// Number of cells in the row.
        found: usize,
    },
    /// A figure's SVG cannot be embedded.
    #[error("section `{section}`, figure `{caption}`: {reason}")]
    Figure {
        /// Section heading.
        section: String,
        /// Figure caption.
        caption: String,
        /// What is wrong.
        reason: &'static str,
    },
}

/// The whole report.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct HtmlReport {
    /// Page title and top heading.
    pub title: String,
    /// Short lines under the title (layout file, units, frame), one paragraph each.
    pub summary: Vec<String>,
    /// Safety cautions, shown in a box above the sections; none gives no box.
    pub cautions: Vec<String>,
    /// The sections, in order.
    pub sections: Vec<Section>,
}

/// One section: a heading and its content.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Section {
    /// Section heading.
    pub heading: String,
    /// Content, in order.
    pub blocks: Vec<Block>,
}

/// A piece of section content.
#[derive(Debug, Clone, PartialEq)]
pub enum Block {
    /// A paragraph of plain text.
    Paragraph(String),
    /// A bulleted list of plain-text items.
    List(Vec<String>),
    /// A table of plain-text cells.
    Table(Table),
    /// A plot.
    Figure(Figure),
}

/// A simple table: one header row and rows of cells.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Table {
    /// Caption shown above the table; empty for none.
    pub caption: String,
    /// Column headings.
    pub headers: Vec<String>,
    /// Rows, each with one cell per heading.
    pub rows: Vec<Vec<String>>,
}

/// A plot embedded as inline SVG, with a caption.
#[derive(Debug, Clone, PartialEq)]
pub struct Figure {
    /// Caption shown under the plot.
    pub caption: String,
    /// A standalone SVG document (`<svg …>…</svg>`, no XML declaration, no scripts).
    pub svg: String,
}

/// The style sheet: a neutral palette of our own, readable on screen and in print.
const STYLE: &str = r#"
:root { color-scheme: light; }
body { margin: 0; background: #f4f5f7; color: #1f2429; font: 15px/1.5 "DejaVu Sans", Verdana, sans-serif; }
main { max-width: 780px; margin: 0 auto; padding: 24px 28px 40px; background: #ffffff; }
h1 { font-size: 26px; margin: 8px 0 4px; }
h2 { font-size: 20px; margin: 32px 0 8px; padding-bottom: 4px; border-bottom: 2px solid #d5d9de; }
p.summary { margin: 2px 0; color: #4a525a; }
nav ol { margin: 8px 0 0; padding-left: 22px; }
nav a, nav a:visited { color: #2c5a87; }
aside.cautions { margin: 20px 0; padding: 12px 16px; border: 2px solid #9a6b1e; border-radius: 4px; background: #fbf4e6; }
aside.cautions h2 { margin: 0 0 6px; border: none; font-size: 17px; color: #6e4a10; }
aside.cautions ul { margin: 0; padding-left: 20px; }
.table-wrap { max-width: 100%; overflow-x: auto; }
table { border-collapse: collapse; margin: 12px 0; font-variant-numeric: tabular-nums; }
caption { text-align: left; font-weight: bold; padding-bottom: 4px; }
th, td { padding: 4px 10px; border: 1px solid #d5d9de; text-align: left; vertical-align: top; }
th { background: #eceef1; }
tbody tr:nth-child(even) td { background: #f8f9fa; }
figure { margin: 16px 0; }
figure svg { display: block; max-width: 100%; height: auto; border: 1px solid #e1e4e8; }
figcaption { margin-top: 4px; color: #4a525a; font-size: 14px; }
footer { margin-top: 36px; color: #6b737b; font-size: 13px; }
@media (max-width: 600px) { main { padding: 12px 10px 28px; } th, td { padding: 3px 5px; font-size: 13px; } }
@media print { body { background: #ffffff; } main { max-width: none; padding: 0; } figure { break-inside: avoid; } }
"#;

/// Escape text for element content and attribute values.
pub fn escape(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        match c {
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '&' => out.push_str("&amp;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            other => out.push(other),
        }
    }
    out
}

/// Check that a figure's SVG can go inline as it is: one `<svg>` element, no
/// prologue (a DOCTYPE inside the body would be invalid) and nothing active.
fn check_svg(svg: &str) -> Result<(), &'static str> {
    let t = svg.trim();
    if !t.starts_with("<svg") {
        return Err("the SVG must start with its <svg> element (no XML declaration or DOCTYPE)");
    }
    if !t.ends_with("</svg>") {
        return Err("the SVG must end with </svg>");
    }
    let lower = t.to_ascii_lowercase();
    for bad in [
        "<script",
        "<foreignobject",
        "<iframe",
        " onload=",
        " onclick=",
    ] {
        if lower.contains(bad) {
            return Err("the SVG must not contain scripts, event handlers or foreign objects");
        }
    }
    Ok(())
}

/// Render the report as one HTML document.
pub fn render_html(report: &HtmlReport) -> Result<String, HtmlError> {
    if report.title.trim().is_empty() {
        return Err(HtmlError::EmptyTitle);
    }
    let mut h = String::with_capacity(64 * 1024);
    h.push_str("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n");
    h.push_str("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>\n");
    h.push_str(&format!("<title>{}</title>\n", escape(&report.title)));
    h.push_str("<style>");
    h.push_str(STYLE);
    h.push_str("</style>\n</head>\n<body>\n<main>\n");
    h.push_str(&format!("<h1>{}</h1>\n", escape(&report.title)));
    for line in &report.summary {
        h.push_str(&format!("<p class=\"summary\">{}</p>\n", escape(line)));
    }
    if !report.cautions.is_empty() {
        h.push_str("<aside class=\"cautions\" role=\"note\">\n<h2>Safety cautions</h2>\n<ul>\n");
        for c in &report.cautions {
            h.push_str(&format!("<li>{}</li>\n", escape(c)));
        }
        h.push_str("</ul>\n</aside>\n");
    }
    if report.sections.len() > 1 {
        h.push_str("<nav>\n<ol>\n");
        for (i, s) in report.sections.iter().enumerate() {
            h.push_str(&format!(
                "<li><a href=\"#section-{}\">{}</a></li>\n",
                i + 1,
                escape(&s.heading)
            ));
        }
        h.push_str("</ol>\n</nav>\n");
    }
    for (i, section) in report.sections.iter().enumerate() {
        h.push_str(&format!(
            "<section id=\"section-{}\">\n<h2>{}</h2>\n",
            i + 1,
            escape(&section.heading)
        ));
        let mut tables = 0;
        for block in &section.blocks {
            match block {
                Block::Paragraph(p) => h.push_str(&format!("<p>{}</p>\n", escape(p))),
                Block::List(items) => {
                    h.push_str("<ul>\n");
                    for it in items {
                        h.push_str(&format!("<li>{}</li>\n", escape(it)));
                    }
                    h.push_str("</ul>\n");
                }
                Block::Table(t) => {
                    tables += 1;
                    render_table(&mut h, t, &section.heading, tables)?;
                }
                Block::Figure(f) => {
                    check_svg(&f.svg).map_err(|reason| HtmlError::Figure {
                        section: section.heading.clone(),
                        caption: f.caption.clone(),
                        reason,
                    })?;
                    h.push_str("<figure>\n");
                    h.push_str(f.svg.trim());
                    h.push_str(&format!(
                        "\n<figcaption>{}</figcaption>\n</figure>\n",
                        escape(&f.caption)
                    ));
                }
            }
        }
        h.push_str("</section>\n");
    }
    h.push_str(&format!(
        "<footer>Made by portwright {}. Units SI unless a heading says otherwise.</footer>\n",
        env!("CARGO_PKG_VERSION")
    ));
    h.push_str("</main>\n</body>\n</html>\n");
    Ok(h)
}

fn render_table(h: &mut String, t: &Table, section: &str, number: usize) -> Result<(), HtmlError> {
    if let Some((row, r)) = t
        .rows
        .iter()
        .enumerate()
        .find(|(_, r)| r.len() != t.headers.len())
    {
        return Err(HtmlError::TableShape {
            section: section.to_string(),
            table: number,
            row: row + 1,
            expected: t.headers.len(),
            found: r.len(),
        });
    }
    h.push_str("<div class=\"table-wrap\">\n<table>\n");
    if !t.caption.is_empty() {
        h.push_str(&format!("<caption>{}</caption>\n", escape(&t.caption)));
    }
    h.push_str("<thead>\n<tr>");
    for c in &t.headers {
        h.push_str(&format!("<th scope=\"col\">{}</th>", escape(c)));
    }
    h.push_str("</tr>\n</thead>\n<tbody>\n");
    for r in &t.rows {
        h.push_str("<tr>");
        for c in r {
            h.push_str(&format!("<td>{}</td>", escape(c)));
        }
        h.push_str("</tr>\n");
    }
    h.push_str("</tbody>\n</table>\n</div>\n");
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::export::plots::{
        port_thrust_svg, torque_envelope_svg, EnvelopeSlice, Plane, PlotSettings, PortThrust,
    };

    fn envelope_svg() -> String {
        torque_envelope_svg(
            &EnvelopeSlice {
                layout: "test-54mm".to_string(),
                state: "coast".to_string(),
                plane: Plane::PitchYaw,
                outline_n_m: vec![(-0.1, 0.0), (0.0, -0.1), (0.1, 0.0), (0.0, 0.1)],
                required_n_m: (0.05, 0.05),
                disturbances_n_m: vec![],
            },
            &PlotSettings::default(),
        )
        .unwrap()
        .svg
    }

    fn thrust_svg() -> String {
        port_thrust_svg(
            &PortThrust {
                layout: "test-54mm".to_string(),
                state: "coast".to_string(),
                ports: vec![("fore-1".to_string(), 1.2), ("aft-1".to_string(), 1.1)],
            },
            &PlotSettings::default(),
        )
        .unwrap()
        .svg
    }

    fn report() -> HtmlReport {
        HtmlReport {
            title: "Layout <test-54mm> & friends".to_string(),
            summary: vec!["Units: SI; body frame with +x toward the nose.".to_string()],
            cautions: vec![
                "Leak-check every joint before flight.".to_string(),
                "Wear eye protection when filling.".to_string(),
            ],
            sections: vec![
                Section {
                    heading: "Gas budget".to_string(),
                    blocks: vec![
                        Block::Paragraph("Usable gas <b>46 g</b> & more".to_string()),
                        Block::Table(Table {
                            caption: "Per port".to_string(),
                            headers: vec!["port".to_string(), "thrust (N)".to_string()],
                            rows: vec![
                                vec!["fore-1".to_string(), "1.20".to_string()],
                                vec!["aft-1".to_string(), "1.10".to_string()],
                            ],
                        }),
                        Block::Figure(Figure {
                            caption: "Thrust per port".to_string(),
                            svg: thrust_svg(),
                        }),
                    ],
                },
                Section {
                    heading: "Authority".to_string(),
                    blocks: vec![
                        Block::List(vec![
                            "roll margin 3.1".to_string(),
                            "pitch margin 1.4".to_string(),
                        ]),
                        Block::Figure(Figure {
                            caption: "Attainable torque, pitch–yaw".to_string(),
                            svg: envelope_svg(),
                        }),
                    ],
                },
            ],
        }
    }

    fn parse(html: &str) -> roxmltree::Document<'_> {
        let opt = roxmltree::ParsingOptions {
            allow_dtd: true,
            ..roxmltree::ParsingOptions::default()
        };
        roxmltree::Document::parse_with_options(html, opt).expect("the report is well-formed")
    }

    fn named<'a>(d: &'a roxmltree::Document<'a>, tag: &str) -> Vec<roxmltree::Node<'a, 'a>> {
        d.descendants()
            .filter(|n| n.is_element() && n.tag_name().name() == tag)
            .collect()
    }

    fn all_text(n: &roxmltree::Node<'_, '_>) -> String {
        n.descendants()
            .filter(|d| d.is_text())
            .map(|d| d.text().unwrap())
            .collect()
    }

    #[test]
    fn report_is_well_formed_and_holds_every_part() {
        let r = report();
        let html = render_html(&r).unwrap();
        assert!(html.starts_with("<!DOCTYPE html>\n"));
        let d = parse(&html);
        assert_eq!(d.root_element().tag_name().name(), "html");
        assert_eq!(all_text(&named(&d, "title")[0]), r.title);
        assert_eq!(all_text(&named(&d, "h1")[0]), r.title);
        // Two sections, each with its heading, reachable from the contents list.
        let sections = named(&d, "section");
        assert_eq!(sections.len(), 2);
        assert_eq!(sections[1].attribute("id"), Some("section-2"));
        let links: Vec<_> = named(&d, "a")
            .iter()
            .filter_map(|a| a.attribute("href"))
            .collect();
        assert_eq!(links, ["#section-1", "#section-2"]);
        // Each plot is inline, in its figure, with its caption.
        let figures = named(&d, "figure");
        assert_eq!(figures.len(), 2);
        for (f, caption) in figures
            .iter()
            .zip(["Thrust per port", "Attainable torque, pitch–yaw"])
        {
            let svg = f.children().find(|c| c.is_element()).unwrap();
            assert_eq!(svg.tag_name().name(), "svg");
            assert_eq!(
                svg.tag_name().namespace(),
                Some("http://www.w3.org/2000/svg")
            );
            assert_eq!(all_text(&named_in(f, "figcaption")[0]), caption);
        }
        assert!(all_text(&figures[1]).contains("Pitch torque (mN·m)"));
        // The table keeps its shape.
        let table = &named(&d, "table")[0];
        assert_eq!(named_in(table, "th").len(), 2);
        assert_eq!(named_in(table, "tr").len(), 3);
        assert_eq!(all_text(&named_in(table, "td")[2]), "aft-1");
        // The cautions box lists every caution.
        let aside = &named(&d, "aside")[0];
        assert_eq!(aside.attribute("class"), Some("cautions"));
        let items: Vec<_> = named_in(aside, "li").iter().map(all_text).collect();
        assert_eq!(items, r.cautions);
    }

    fn named_in<'a>(n: &roxmltree::Node<'a, 'a>, tag: &str) -> Vec<roxmltree::Node<'a, 'a>> {
        n.descendants()
            .filter(|d| d.is_element() && d.tag_name().name() == tag)
            .collect()
    }

    #[test]
    fn user_text_is_escaped() {
        let html = render_html(&report()).unwrap();
        assert!(!html.contains("<b>46 g</b>"));
        assert!(html.contains("Usable gas &lt;b&gt;46 g&lt;/b&gt; &amp; more"));
        assert!(html.contains("<title>Layout &lt;test-54mm&gt; &amp; friends</title>"));
        let d = parse(&html);
        assert!(named(&d, "b").is_empty());
        assert_eq!(
            escape(r#"a<b>&"c"'d"#),
            "a&lt;b&gt;&amp;&quot;c&quot;&#39;d"
        );
    }

    #[test]
    fn report_loads_nothing_from_outside() {
        let html = render_html(&report()).unwrap();
        let d = parse(&html);
        assert!(named(&d, "script").is_empty());
        assert!(named(&d, "link").is_empty());
        assert!(named(&d, "img").is_empty());
        assert_eq!(named(&d, "style").len(), 1);
        for n in d.descendants().filter(|n| n.is_element()) {
            for a in n.attributes() {
                let external = matches!(a.name(), "src" | "href") && !a.value().starts_with('#');
                assert!(
                    !external,
                    "<{}> {}={}",
                    n.tag_name().name(),
                    a.name(),
                    a.value()
                );
            }
        }
        assert!(!html.contains("url("));
        assert!(!html.contains("@import"));
    }

    #[test]
    fn output_is_deterministic() {
        assert_eq!(
            render_html(&report()).unwrap(),
            render_html(&report()).unwrap()
        );
    }

    #[test]
    fn bad_input_is_reported() {
        let mut r = report();
        r.title = "  ".to_string();
        assert_eq!(render_html(&r), Err(HtmlError::EmptyTitle));

        let mut r = report();
        if let Block::Table(t) = &mut r.sections[0].blocks[1] {
            t.rows[1].push("extra".to_string());
        }
        assert_eq!(
            render_html(&r),
            Err(HtmlError::TableShape {
                section: "Gas budget".to_string(),
                table: 1,
                row: 2,
                expected: 2,
                found: 3
            })
        );

        for svg in [
            "<?xml version=\"1.0\"?><svg></svg>",
            "<svg><script>alert(1)</script></svg>",
            "<svg onload=\"x()\"></svg>",
            "<svg>",
        ] {
            let mut r = report();
            r.sections[1].blocks[1] = Block::Figure(Figure {
                caption: "bad".to_string(),
                svg: svg.to_string(),
            });
            assert!(
                matches!(render_html(&r), Err(HtmlError::Figure { ref section, .. }) if section == "Authority"),
                "{svg}"
            );
        }
    }

    #[test]
    fn no_cautions_no_box_and_one_section_no_contents() {
        let mut r = report();
        r.cautions.clear();
        r.sections.truncate(1);
        let html = render_html(&r).unwrap();
        let d = parse(&html);
        assert!(named(&d, "aside").is_empty());
        assert!(named(&d, "nav").is_empty());
    }
}
