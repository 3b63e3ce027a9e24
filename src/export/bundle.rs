//! Every file of the whole job for one layout, as named byte buffers: the
//! analysis (text and JSON), firmware tables, STL files, the drilling template,
//! plots (SVG and PNG) and one self-contained HTML report.
//!
//! The caller writes them; nothing here touches the disk. Output is
//! deterministic, so the committed `exports/` folder can be checked as golden files.
//!
//! One output that cannot be made (firmware tables for a layout whose ports span
//! a tilted plane, more ports than a valve mask holds, a plot that fails) does not
//! stop the others: it is listed in [`Bundle::not_written`] with the reason, and
//! the HTML report carries the same list, so the builder still gets the template,
//! the STL and the report.

use super::firmware::{
    build_tables, render_c_header, render_csv, render_json, FirmwareTables, OnOffOutcome,
    TableNames,
};
use super::html::{render_html, Block, Figure, HtmlReport, Section, Table};
use super::plots::{
    authority_bars_svg, port_thrust_svg, torque_envelope_svg, AuthorityBars, EnvelopeSlice,
    NamedPlot, Plane, Plot, PlotSettings, PortThrust, StateAuthority,
};
use super::plots::{tank_pressure_svg, tank_temperature_svg, TankBlowdown};
use super::stl::{airframe_stl, drill_axes_stl, exhaust_markers_stl, MarkerSettings, MeshSettings};
use super::template::{drill_template_svg, TemplateSettings};
use crate::allocation::onoff::OnOffOptions;
use crate::allocation::{Tolerances, Zonotope};
use crate::analysis::score::ray_limit;
use crate::analysis::{effectiveness, Analysis, StateReport};
use crate::model::Design;
use nalgebra::{Matrix3xX, Vector3};

/// One output file.
#[derive(Debug, Clone)]
pub struct OutputFile {
    /// File name inside the output folder.
    pub name: String,
    /// Contents.
    pub bytes: Vec<u8>,
}

/// An output that could not be made, and why.
#[derive(Debug, Clone, PartialEq)]
pub struct NotWritten {
    /// The file or files, by name.
    pub files: String,
    /// Why, in words.
    pub reason: String,
}

/// Every file of the whole job, and the ones that could not be made.
#[derive(Debug, Clone)]
pub struct Bundle {
    /// The files made, in a fixed order.
    pub files: Vec<OutputFile>,
    /// Outputs left out, with the reason; empty when everything was made.
    pub not_written: Vec<NotWritten>,
}

impl NotWritten {
    /// "FILES: REASON", as the report and the terminal show it.
    pub fn line(&self) -> String {
        format!("{} not written: {}", self.files, self.reason)
    }
}

/// Directions used to trace each envelope slice (every 2°).
const SLICE_DIRECTIONS: usize = 180;

/// The outline of the torque envelope cut by a plane through the origin: along
/// each direction in the plane, the exact ray limit of the zonotope.
pub fn envelope_slice(design: &Design, state: &StateReport, plane: Plane) -> Vec<(f64, f64)> {
    let radius = design.airframe.outer_radius_m();
    let cg = state.mass.cg();
    let columns: Vec<Vector3<f64>> = design
        .ports
        .iter()
        .zip(&state.ports)
        .map(|(p, r)| (p.position(radius) - cg).cross(&(p.thrust_direction() * r.thrust_n)))
        .collect();
    let (a, b) = plane.axes();
    // The zonotope's facets are found once, so each direction costs one pass over
    // them instead of a search over port triples; past its generator limit the
    // closed-form ray limit is used directly.
    let zonotope = Zonotope::new(Matrix3xX::from_columns(&columns), &Tolerances::default()).ok();
    (0..SLICE_DIRECTIONS)
        .map(|k| {
            let th = std::f64::consts::TAU * k as f64 / SLICE_DIRECTIONS as f64;
            let mut d = Vector3::zeros();
            d[a] = th.cos();
            d[b] = th.sin();
            let t = match &zonotope {
                Some(z) => z.max_along(&d),
                None => ray_limit(&columns, &d),
            };
            (t * th.cos(), t * th.sin())
        })
        .collect()
}

/// All plots for the report.
pub fn plots(design: &Design, analysis: &Analysis) -> Result<Vec<NamedPlot>, String> {
    let s = PlotSettings::default();
    // Equal scales on both axes, so the slice's shape is the envelope's true shape
    // (a thin roll band next to wide pitch and yaw reach is what the ports give).
    let slice_settings = PlotSettings::default();
    let mut out = Vec::new();
    let e = |e: super::plots::PlotError| e.to_string();
    for st in &analysis.states {
        for plane in Plane::ALL {
            let (a, b) = plane.axes();
            let req = st.required.total_n_m();
            let dist = st.required.from_disturbance_n_m;
            let slice = EnvelopeSlice {
                layout: design.name.clone(),
                state: st.name.clone(),
                plane,
                outline_n_m: envelope_slice(design, st, plane),
                required_n_m: (req[a], req[b]),
                disturbances_n_m: vec![(dist[a], dist[b])],
            };
            out.push(NamedPlot {
                name: format!("envelope-{}-{}", st.name, plane.slug()),
                caption: format!(
                    "Torque envelope at {} in the {} plane, with the required torques",
                    st.name,
                    plane.label()
                ),
                plot: torque_envelope_svg(&slice, &slice_settings).map_err(e)?,
            });
        }
    }
    let bars = AuthorityBars {
        layout: design.name.clone(),
        states: analysis
            .states
            .iter()
            .map(|st| {
                let i = st.mass.inertia_diagonal();
                let req = st.required.total_n_m();
                StateAuthority {
                    state: st.name.clone(),
                    achieved_deg_s2: [0, 1, 2]
                        .map(|k| st.authority[k].angular_accel_rad_s2.to_degrees()),
                    required_deg_s2: [0, 1, 2].map(|k| (req[k] / i[k]).to_degrees()),
                }
            })
            .collect(),
    };
    out.push(NamedPlot {
        name: "authority".to_string(),
        caption: "Angular acceleration authority per axis and flight state, with the requirement"
            .to_string(),
        plot: authority_bars_svg(&bars, &s).map_err(e)?,
    });
    if let Some(first) = analysis.states.first() {
        let thrust = PortThrust {
            layout: design.name.clone(),
            state: first.name.clone(),
            ports: first
                .ports
                .iter()
                .map(|p| (p.name.clone(), p.thrust_n))
                .collect(),
        };
        out.push(NamedPlot {
            name: "thrust".to_string(),
            caption: format!("Thrust of each port fired alone at {}", first.name),
            plot: port_thrust_svg(&thrust, &s).map_err(e)?,
        });
    }
    let g = &analysis.gas;
    // The adiabatic blowdown against time: every port open draws a constant flow
    // (the regulator holds the manifold), so time is gas expelled over that flow.
    let flow = if g.firing_time_all_ports_adiabatic_s > 0.0 {
        g.usable_adiabatic_kg / g.firing_time_all_ports_adiabatic_s
    } else {
        0.0
    };
    if flow > 0.0 && g.blowdown.len() >= 2 {
        let blowdown = TankBlowdown {
            layout: design.name.clone(),
            firing: "all ports open together".to_string(),
            points: g
                .blowdown
                .iter()
                .map(|b| (b.expelled_kg / flow, b.pressure_pa, b.temperature_k))
                .collect(),
            dropout_pa: g.end_pressure_pa,
            fill_temperature_k: g.fill_temperature_k,
        };
        out.push(NamedPlot {
            name: "gas".to_string(),
            caption: "Tank pressure (bar absolute) against firing time with every port open, adiabatic blowdown, and the pressure at which the regulator drops out".to_string(),
            plot: tank_pressure_svg(&blowdown, &s).map_err(e)?,
        });
        out.push(NamedPlot {
            name: "gas-temperature".to_string(),
            caption:
                "Tank temperature against firing time with every port open, adiabatic blowdown"
                    .to_string(),
            plot: tank_temperature_svg(&blowdown, &s).map_err(e)?,
        });
    }
    Ok(out)
}

/// Pounds per square inch in pascals.
const PSI_PA: f64 = 6_894.757_293;

/// `v` to `decimals` places for a table cell: never "-0.0", and "not available"
/// for a value that is not finite.
fn number(v: f64, decimals: usize) -> String {
    if !v.is_finite() {
        return "not available".to_string();
    }
    let t = format!("{v:.decimals$}");
    if t.trim_start_matches('-')
        .chars()
        .all(|c| c == '0' || c == '.')
    {
        t.trim_start_matches('-').to_string()
    } else {
        t
    }
}

fn figure(p: &Plot, caption: &str) -> Block {
    Block::Figure(Figure {
        caption: caption.to_string(),
        svg: p.svg.clone(),
    })
}

/// The HTML report.
pub fn html_report(
    design: &Design,
    analysis: &Analysis,
    plots: &[NamedPlot],
) -> Result<String, String> {
    html_report_listing(design, analysis, plots, &[], None, &[])
}

/// What the report says about the firmware tables `run` wrote: the flight
/// state, the axes the duty-cycle map follows, the on/off rule and its misses.
pub fn tables_summary(t: &FirmwareTables) -> Vec<String> {
    let idx: Vec<usize> = t
        .map_axes
        .iter()
        .filter_map(|a| ["roll", "pitch", "yaw"].iter().position(|b| b == a))
        .collect();
    let axes = crate::allocation::region_map::axis_words(&idx);
    let mut out = vec![format!(
        "allocation.h, allocation.csv and allocation.json hold the tables of flight state `{}`: \
         {} ports, {} regions in the duty-cycle map, {} envelope planes.",
        t.flight_state,
        t.ports.len(),
        t.regions.len(),
        t.envelope.facets.len()
    )];
    if idx.len() == 3 {
        out.push(format!("The duty-cycle map follows {axes}."));
    } else {
        let missing: Vec<usize> = (0..3).filter(|a| !idx.contains(a)).collect();
        let others = crate::allocation::region_map::axis_words(&missing);
        out.push(format!(
            "The ports span {axes} only: the duty-cycle map follows those axes and ignores the \
             {others} part of a command, since no port makes {others} torque."
        ));
    }
    let r = &t.onoff_rule;
    let misses = t
        .onoff
        .iter()
        .filter(|row| matches!(row.outcome, OnOffOutcome::NearMiss { .. }))
        .count();
    out.push(format!(
        "On/off rows: each commanded axis gets at least {} of its best on/off torque, each \
         uncommanded axis at most {} of its scale (shares compared to within {:e}); the least gas \
         wins, then fewer valves. {} of 26 commands have no qualifying valve set (near misses).",
        r.fraction, r.tolerance, r.comparison_tolerance, misses
    ));
    out
}

/// The HTML report, with a section listing the outputs that could not be made
/// (none when `not_written` is empty) and further sections (for example the
/// as-built spread) placed before the findings.
pub fn html_report_listing(
    design: &Design,
    analysis: &Analysis,
    plots: &[NamedPlot],
    not_written: &[NotWritten],
    tables: Option<&FirmwareTables>,
    extra: &[Section],
) -> Result<String, String> {
    let mut sections = Vec::new();
    if !not_written.is_empty() {
        sections.push(Section {
            heading: "Files not written".to_string(),
            blocks: vec![
                Block::Paragraph(
                    "These outputs could not be made for this layout; everything else was written."
                        .to_string(),
                ),
                Block::List(not_written.iter().map(NotWritten::line).collect()),
            ],
        });
    }
    let g = &analysis.gas;
    sections.push(Section {
        heading: "Gas".to_string(),
        blocks: vec![Block::Table(Table {
            caption: format!("{} tank, {:.0} mL", g.gas, g.tank_volume_m3 * 1e6),
            headers: vec!["quantity".into(), "value".into()],
            rows: vec![
                vec![
                    "inventory at fill".into(),
                    format!("{:.1} g ({})", g.inventory_kg * 1e3, g.phase),
                ],
                vec![
                    "tank pressure at fill".into(),
                    format!(
                        "{:.1} bara ({:.0} psia)",
                        g.supply_pressure_pa / 1e5,
                        g.supply_pressure_pa / PSI_PA
                    ),
                ],
                vec![
                    "usable, isothermal".into(),
                    format!("{:.1} g", g.usable_isothermal_kg * 1e3),
                ],
                vec![
                    "usable, adiabatic".into(),
                    format!("{:.1} g", g.usable_adiabatic_kg * 1e3),
                ],
                vec![
                    "total impulse".into(),
                    format!(
                        "{:.1} to {:.1} N s",
                        g.total_impulse_adiabatic_n_s, g.total_impulse_isothermal_n_s
                    ),
                ],
            ],
        })],
    });
    sections.push(Section {
        heading: "Mass properties".to_string(),
        blocks: vec![Block::Table(Table {
            caption: "per flight state, inertias about that state's CG".to_string(),
            headers: [
                "state",
                "mass (g)",
                "CG station (mm)",
                "CG off axis y, z (mm)",
                "Ixx (kg m²)",
                "Iyy (kg m²)",
                "Izz (kg m²)",
                "gas in tank (g)",
            ]
            .map(String::from)
            .to_vec(),
            rows: analysis
                .states
                .iter()
                .map(|st| {
                    let m = &st.mass;
                    vec![
                        st.name.clone(),
                        number(m.mass_kg * 1e3, 1),
                        number(m.cg_station_m * 1e3, 1),
                        format!(
                            "{}, {}",
                            number(m.cg_y_m * 1e3, 2),
                            number(m.cg_z_m * 1e3, 2)
                        ),
                        number(m.ixx_kg_m2, 5),
                        number(m.iyy_kg_m2, 4),
                        number(m.izz_kg_m2, 4),
                        number(st.gas_in_tank_kg * 1e3, 1),
                    ]
                })
                .collect(),
        })],
    });
    for st in &analysis.states {
        let mut blocks = vec![
            Block::Paragraph(format!(
                "{:.0} m altitude, ambient {:.1} kPa abs, manifold {:.2} bara with one valve open, motor {}.",
                st.altitude_m,
                st.ambient_pressure_pa / 1e3,
                st.regulated_pressure_pa / 1e5,
                match st.motor {
                    crate::model::MotorCondition::Burning => "burning",
                    crate::model::MotorCondition::Burnout => "burnout",
                }
            )),
            Block::Table(Table {
                caption: "ports fired alone".to_string(),
                headers: ["port", "thrust (N)", "flow (g/s)", "Isp (s)", "roll / pitch / yaw torque (mN m)"].map(String::from).to_vec(),
                rows: st
                    .ports
                    .iter()
                    .map(|p| {
                        vec![
                            p.name.clone(),
                            format!("{:.3}", p.thrust_n),
                            format!("{:.3}", p.mass_flow_kg_s * 1e3),
                            format!("{:.1}", p.specific_impulse_s),
                            p.torque_n_m.map(|v| number(v * 1e3, 1)).join(" / "),
                        ]
                    })
                    .collect(),
            }),
            Block::Table(Table {
                caption: "authority from the exact envelope".to_string(),
                headers: ["axis", "+ (mN m)", "− (mN m)", "deg/s²", "required (mN m)", "margin"].map(String::from).to_vec(),
                rows: st
                    .authority
                    .iter()
                    .map(|a| {
                        vec![
                            a.axis.to_string(),
                            format!("{:.1}", a.positive_n_m * 1e3),
                            format!("{:.1}", a.negative_n_m * 1e3),
                            if a.angular_accel_rad_s2 > 0.0 {
                                number(a.angular_accel_rad_s2.to_degrees(), 0)
                            } else {
                                format!("no {} authority", a.axis)
                            },
                            number(a.required_n_m * 1e3, 2),
                            if a.required_n_m > 0.0 && a.margin.is_finite() {
                                number(a.margin, 2)
                            } else {
                                "none required".to_string()
                            },
                        ]
                    })
                    .collect(),
            }),
        ];
        for p in plots
            .iter()
            .filter(|p| p.name.starts_with(&format!("envelope-{}-", st.name)))
        {
            blocks.push(figure(&p.plot, &p.caption));
        }
        sections.push(Section {
            heading: format!("Flight state: {}", st.name),
            blocks,
        });
    }
    let mut overview = Vec::new();
    for p in plots.iter().filter(|p| !p.name.starts_with("envelope-")) {
        overview.push(figure(&p.plot, &p.caption));
    }
    sections.push(Section {
        heading: "Authority, thrust and gas".to_string(),
        blocks: overview,
    });
    if let Some(t) = tables {
        sections.push(Section {
            heading: "Firmware tables".to_string(),
            blocks: vec![Block::List(tables_summary(t))],
        });
    }
    sections.extend(extra.iter().cloned());
    if let Some(g) = &analysis.ground {
        sections.push(ground_section(g));
    }
    sections.push(Section {
        heading: "Findings".to_string(),
        blocks: vec![Block::List(analysis.findings.clone())],
    });
    sections.push(Section {
        heading: "Assumptions".to_string(),
        blocks: vec![Block::List(analysis.assumptions.clone())],
    });
    render_html(&HtmlReport {
        title: format!("portwright report: {}", design.name),
        summary: vec!["Body axes: +x toward the nose, +y through the reference line (clock 0°), +z = x × y; stations aft of the nose tip; torques about each state's CG.".to_string()],
        cautions: analysis.cautions.iter().map(|c| c.to_string()).collect(),
        sections,
    })
    .map_err(|e| e.to_string())
}

/// Firmware tables for one flight state: the state's effectiveness matrix, the
/// valve coil current from the layout, and the supply droop of that state (thrust
/// of each port with k valves open relative to one).
pub fn state_tables(
    design: &Design,
    st: &StateReport,
    options: &OnOffOptions,
    grid: Option<usize>,
) -> Result<super::firmware::FirmwareTables, String> {
    let e = effectiveness(design, &st.mass, &st.ports)?;
    let droop: Vec<f64> = st
        .droop
        .iter()
        .map(|d| 1.0 - d.thrust_drop_fraction)
        .collect();
    let factor = move |k: usize| {
        if k == 0 {
            1.0
        } else {
            droop.get(k - 1).copied().unwrap_or(1.0)
        }
    };
    let options = OnOffOptions {
        coil_current_a: design.feed.valve.coil_current_a,
        ..*options
    };
    let names = TableNames {
        layout: design.name.clone(),
        flight_state: st.name.clone(),
    };
    build_tables(&e, &names, &options, &factor, &Tolerances::default(), grid)
        .map_err(|e| e.to_string())
}

/// Every output file for the layout, and the outputs that could not be made.
pub fn bundle(design: &Design, analysis: &Analysis, template: &TemplateSettings) -> Bundle {
    bundle_with(design, analysis, template, &[], Vec::new())
}

/// Every output file for the layout, with further report sections (placed
/// before the findings) and further files (written after the others), and the
/// outputs that could not be made.
pub fn bundle_with(
    design: &Design,
    analysis: &Analysis,
    template: &TemplateSettings,
    extra_sections: &[Section],
    extra_files: Vec<OutputFile>,
) -> Bundle {
    let mut files = Vec::new();
    let mut not_written = Vec::new();
    let mut push = |name: &str, bytes: Vec<u8>| {
        files.push(OutputFile {
            name: name.to_string(),
            bytes,
        })
    };
    let skip = |list: &mut Vec<NotWritten>, files: &str, reason: String| {
        list.push(NotWritten {
            files: files.to_string(),
            reason,
        })
    };
    push(
        "analysis.txt",
        crate::report::render_text(analysis).into_bytes(),
    );
    match serde_json::to_string_pretty(analysis) {
        Ok(text) => push("analysis.json", (text + "\n").into_bytes()),
        Err(e) => skip(&mut not_written, "analysis.json", e.to_string()),
    }
    let mut made_tables = None;
    if let Some(st) = analysis.states.first() {
        let tables = state_tables(design, st, &OnOffOptions::default(), None).and_then(|t| {
            let h = render_c_header(&t).map_err(|e| e.to_string())?;
            let j = render_json(&t).map_err(|e| e.to_string())?;
            let csv = render_csv(&t);
            Ok((t, h, csv, j))
        });
        match tables {
            Ok((t, h, csv, json)) => {
                push("allocation.h", h.into_bytes());
                push("allocation.csv", csv.into_bytes());
                push("allocation.json", json.into_bytes());
                made_tables = Some(t);
            }
            Err(e) => skip(
                &mut not_written,
                "allocation.h, allocation.csv and allocation.json",
                format!("firmware tables for flight state `{}`: {e}", st.name),
            ),
        }
    }
    let mesh = MeshSettings::default();
    match airframe_stl(design, &mesh) {
        Ok(b) => push("airframe.stl", b),
        Err(e) => skip(&mut not_written, "airframe.stl", e.to_string()),
    }
    match drill_axes_stl(design, &mesh) {
        Ok(b) => push("drill-axes.stl", b),
        Err(e) => skip(&mut not_written, "drill-axes.stl", e.to_string()),
    }
    let thrusts: Vec<f64> = analysis
        .states
        .first()
        .map(|s| s.ports.iter().map(|p| p.thrust_n).collect())
        .unwrap_or_default();
    match exhaust_markers_stl(design, &thrusts, &MarkerSettings::default(), &mesh) {
        Ok(b) => push("exhaust-markers.stl", b),
        Err(e) => skip(&mut not_written, "exhaust-markers.stl", e.to_string()),
    }
    match drill_template_svg(design, template) {
        Ok(pages) => {
            let title = format!("Drilling template: {}", design.name);
            match super::pdf::svg_pages_to_pdf(&pages, &title) {
                Ok(pdf) => push("drill-template.pdf", pdf),
                Err(e) => skip(&mut not_written, "drill-template.pdf", e.to_string()),
            }
            for (k, page) in pages.into_iter().enumerate() {
                push(&format!("drill-template-{}.svg", k + 1), page.into_bytes());
            }
        }
        Err(e) => skip(
            &mut not_written,
            "drill-template.pdf and drill-template-N.svg",
            e.to_string(),
        ),
    }
    let plots = match plots(design, analysis) {
        Ok(p) => p,
        Err(e) => {
            skip(&mut not_written, "the plots (SVG and PNG)", e);
            Vec::new()
        }
    };
    for p in &plots {
        push(&format!("{}.svg", p.name), p.plot.svg.clone().into_bytes());
        match p.plot.to_png(1.0) {
            Ok(b) => push(&format!("{}.png", p.name), b),
            Err(e) => skip(&mut not_written, &format!("{}.png", p.name), e.to_string()),
        }
    }
    match html_report_listing(
        design,
        analysis,
        &plots,
        &not_written,
        made_tables.as_ref(),
        extra_sections,
    ) {
        Ok(html) => push("report.html", html.into_bytes()),
        Err(e) => skip(&mut not_written, "report.html", e),
    }
    files.extend(extra_files);
    Bundle { files, not_written }
}

/// The "Ground" section of the HTML report: the ground lines (caution, full fills, pad-hold
/// line), then the fill sequence table and the table of tank pressure against pad temperature.
fn ground_section(g: &crate::ground::report::GroundReport) -> Section {
    let mut blocks = vec![Block::List(g.lines())];
    for t in g.tables() {
        blocks.push(Block::Table(Table {
            caption: t.caption,
            headers: t.headers,
            rows: t.rows,
        }));
    }
    Section {
        heading: "Ground".to_string(),
        blocks,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use good_lp::{microlp, variable, Expression, ProblemVariables, Solution, SolverModel};
    use std::path::Path;

    fn load(path: &str) -> (Design, Analysis) {
        let p = Path::new(env!("CARGO_MANIFEST_DIR")).join(path);
        let design = crate::layout::load(&p).expect("layout loads");
        let analysis = crate::analysis::analyze(&design).expect("analyses");
        (design, analysis)
    }

    /// max t s.t. Σ bᵢuᵢ = t·d, 0 ≤ u ≤ 1, solved by microlp through good_lp.
    /// Torque entries below 1e-12 of the largest are set to zero first: they are
    /// the rounding of cross products (1e-34 N m on a roll row that is zero in exact
    /// arithmetic), which an exact LP would otherwise read as a real constraint.
    fn ray_lp(columns: &[Vector3<f64>], d: &Vector3<f64>) -> f64 {
        let big = columns.iter().map(|c| c.amax()).fold(0.0, f64::max);
        let clean = |v: f64| if v.abs() <= 1e-12 * big { 0.0 } else { v };
        let mut vars = ProblemVariables::new();
        let u: Vec<_> = columns
            .iter()
            .map(|_| vars.add(variable().min(0.0).max(1.0)))
            .collect();
        let t = vars.add(variable().min(0.0));
        let mut p = vars.maximise(t).using(microlp);
        for r in 0..3 {
            let row: Expression = columns.iter().zip(&u).map(|(c, x)| clean(c[r]) * *x).sum();
            // cos 90° is 6e-17, not 0: the same rounding, in the direction.
            let dr = if d[r].abs() <= 1e-12 { 0.0 } else { d[r] };
            p.add_constraint((row - dr * t).eq(0.0));
        }
        p.solve().expect("solves").value(t)
    }

    #[test]
    fn envelope_slices_match_an_independent_ray_lp() {
        // Reference: the ray LP above (microlp), on the same state's port torques;
        // 1e-8 relative is microlp's tolerance. Both a three-axis demo and the
        // pitch/yaw-only test vehicle, whose flat envelope has no facets at all.
        for path in [
            "layouts/heron-54.toml",
            "tests/layouts/plover-64-pitch-yaw.toml",
        ] {
            let (design, analysis) = load(path);
            let st = &analysis.states[0];
            let e = effectiveness(&design, &st.mass, &st.ports).expect("effectiveness");
            let columns: Vec<Vector3<f64>> =
                (0..e.len()).map(|i| e.torque().column(i).into()).collect();
            let mut nonzero = 0;
            for plane in Plane::ALL {
                let (a, b) = plane.axes();
                let slice = envelope_slice(&design, st, plane);
                for (k, (x, y)) in slice.iter().enumerate().step_by(9) {
                    let th = std::f64::consts::TAU * k as f64 / SLICE_DIRECTIONS as f64;
                    let mut d = Vector3::zeros();
                    d[a] = th.cos();
                    d[b] = th.sin();
                    let want = ray_lp(&columns, &d);
                    let got = x.hypot(*y);
                    assert!(
                        (got - want).abs() <= 1e-8 * want.max(1e-3),
                        "{path} {plane:?} {k}: {got} against {want}"
                    );
                    if want > 0.0 {
                        nonzero += 1;
                    }
                }
            }
            assert!(nonzero >= 20, "{path}: only {nonzero} non-zero directions");
        }
    }
}
