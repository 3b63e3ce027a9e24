//! The HTML report as a browser shows it: headless Chromium renders a report
//! with two plots to a PNG screenshot, and the picture must be the window's
//! size, mostly page background, with the plots' colours present (so the inline
//! SVG was drawn, not just the text).
//!
//! Needs Debian's `chromium` package at /usr/bin/chromium; without it the test
//! prints a notice and passes without checking. To run it by hand:
//! `apt-get install chromium && cargo test --test html_render -- --nocapture`.

use portwright::export::html::{render_html, Block, Figure, HtmlReport, Section, Table};
use portwright::export::plots::{
    port_thrust_svg, torque_envelope_svg, EnvelopeSlice, Plane, PlotSettings, PortThrust,
};
use std::path::Path;
use std::process::Command;
use std::time::{Duration, Instant};

const CHROMIUM: &str = "/usr/bin/chromium";
const WINDOW: (u32, u32) = (1200, 2000);
/// A cold start of headless Chromium on two cores takes a few seconds; a minute means it hung.
const RENDER_LIMIT: Duration = Duration::from_secs(60);
/// The bars' fill colour (the first series colour of the plots).
const BAR_RGB: [u8; 3] = [44, 90, 135];

fn report() -> HtmlReport {
    let s = PlotSettings::default();
    let thrust = port_thrust_svg(
        &PortThrust {
            layout: "render-check".to_string(),
            state: "liftoff".to_string(),
            ports: vec![
                ("fore-1".to_string(), 1.2),
                ("fore-2".to_string(), 1.1),
                ("aft-1".to_string(), 0.9),
            ],
        },
        &s,
    )
    .expect("thrust plot");
    let envelope = torque_envelope_svg(
        &EnvelopeSlice {
            layout: "render-check".to_string(),
            state: "liftoff".to_string(),
            plane: Plane::RollPitch,
            outline_n_m: vec![(-0.03, 0.0), (0.0, -0.1), (0.03, 0.0), (0.0, 0.1)],
            required_n_m: (0.01, 0.05),
            disturbances_n_m: vec![(0.002, 0.01)],
        },
        &s,
    )
    .expect("envelope plot");
    HtmlReport {
        title: "Render check <layout>".to_string(),
        summary: vec!["Units: SI.".to_string()],
        cautions: vec!["Leak-check every joint before flight.".to_string()],
        sections: vec![Section {
            heading: "Ports".to_string(),
            blocks: vec![
                Block::Paragraph("Three ports at two stations.".to_string()),
                Block::Table(Table {
                    caption: "Thrust".to_string(),
                    headers: vec!["port".to_string(), "thrust (N)".to_string()],
                    rows: vec![vec!["fore-1".to_string(), "1.20".to_string()]],
                }),
                Block::Figure(Figure {
                    caption: "Thrust per port".to_string(),
                    svg: thrust.svg,
                }),
                Block::Figure(Figure {
                    caption: "Attainable torque".to_string(),
                    svg: envelope.svg,
                }),
            ],
        }],
    }
}

/// Run Chromium with a deadline; true when it exited successfully.
fn screenshot(html: &Path, png: &Path, profile: &Path) -> bool {
    let mut child = Command::new(CHROMIUM)
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
            "--no-first-run",
            "--hide-scrollbars",
        ])
        .arg(format!("--user-data-dir={}", profile.display()))
        .arg(format!("--screenshot={}", png.display()))
        .arg(format!("--window-size={},{}", WINDOW.0, WINDOW.1))
        .arg(format!("file://{}", html.display()))
        .stdout(std::process::Stdio::null())
        .stderr(std::process::Stdio::null())
        .spawn()
        .expect("start chromium");
    let start = Instant::now();
    loop {
        match child.try_wait().expect("wait for chromium") {
            Some(status) => return status.success(),
            None if start.elapsed() > RENDER_LIMIT => {
                child.kill().ok();
                child.wait().ok();
                panic!("chromium did not finish within {RENDER_LIMIT:?}");
            }
            None => std::thread::sleep(Duration::from_millis(100)),
        }
    }
}

#[test]
fn report_renders_in_a_browser() {
    if !Path::new(CHROMIUM).exists() {
        println!(
            "skipping the browser check: {CHROMIUM} is not installed (apt-get install chromium)"
        );
        return;
    }
    let dir = tempfile::tempdir().expect("temporary directory");
    let html_path = dir.path().join("report.html");
    let png_path = dir.path().join("report.png");
    std::fs::write(&html_path, render_html(&report()).expect("render")).expect("write report");
    assert!(
        screenshot(&html_path, &png_path, &dir.path().join("profile")),
        "chromium failed"
    );
    let bytes = std::fs::read(&png_path).expect("chromium wrote the screenshot");

    let decoder = png::Decoder::new(std::io::Cursor::new(bytes));
    let mut reader = decoder.read_info().expect("PNG header");
    let mut buf = vec![0; reader.output_buffer_size().expect("buffer size")];
    let info = reader.next_frame(&mut buf).expect("PNG data");
    assert_eq!((info.width, info.height), WINDOW);
    let channels = info.color_type.samples();
    assert!(
        channels >= 3,
        "colour screenshot expected, got {:?}",
        info.color_type
    );

    let pixels: Vec<[u8; 3]> = buf[..info.buffer_size()]
        .chunks_exact(channels)
        .map(|p| [p[0], p[1], p[2]])
        .collect();
    let total = pixels.len();
    let near = |p: &[u8; 3], q: [u8; 3], tol: i16| {
        (0..3).all(|k| (i16::from(p[k]) - i16::from(q[k])).abs() <= tol)
    };
    let white = pixels
        .iter()
        .filter(|p| near(p, [255, 255, 255], 2))
        .count();
    let bars = pixels.iter().filter(|p| near(p, BAR_RGB, 6)).count();
    let dark = pixels
        .iter()
        .filter(|p| p.iter().map(|&c| u32::from(c)).sum::<u32>() < 200)
        .count();
    println!("{total} pixels: {white} white, {bars} bar-coloured, {dark} dark");
    assert!(white < total * 98 / 100, "the page is blank");
    assert!(dark > 2_000, "too little text: {dark} dark pixels");
    // Three bars of about 150 × 200 px each at 100 % zoom.
    assert!(
        bars > 20_000,
        "the thrust bars were not drawn: {bars} pixels"
    );
}

/// Fraction of non-white pixels and count of dark (text) pixels in a screenshot.
fn ink(png_path: &Path) -> (f64, usize) {
    let bytes = std::fs::read(png_path).expect("chromium wrote the screenshot");
    let decoder = png::Decoder::new(std::io::Cursor::new(bytes));
    let mut reader = decoder.read_info().expect("PNG header");
    let mut buf = vec![0; reader.output_buffer_size().expect("buffer size")];
    let info = reader.next_frame(&mut buf).expect("PNG data");
    let channels = info.color_type.samples();
    let pixels: Vec<&[u8]> = buf[..info.buffer_size()].chunks_exact(channels).collect();
    let white = pixels
        .iter()
        .filter(|p| p[..3].iter().all(|&c| c >= 253))
        .count();
    let dark = pixels
        .iter()
        .filter(|p| p[..3].iter().map(|&c| u32::from(c)).sum::<u32>() < 200)
        .count();
    (1.0 - white as f64 / pixels.len() as f64, dark)
}

/// The committed demo report and drilling template open in a browser and show
/// text and drawings (the report embeds its plots inline, so they render too).
#[test]
fn demo_report_and_template_render_in_a_browser() {
    if !Path::new(CHROMIUM).exists() {
        println!(
            "skipping the browser check: {CHROMIUM} is not installed (apt-get install chromium)"
        );
        return;
    }
    let dir = tempfile::tempdir().expect("temporary directory");
    for file in [
        "exports/heron-54/report.html",
        "exports/heron-54/drill-template-1.svg",
    ] {
        let path = std::fs::canonicalize(file).expect("committed export");
        let png_path = dir.path().join("shot.png");
        assert!(
            screenshot(&path, &png_path, &dir.path().join("profile")),
            "chromium failed on {file}"
        );
        let (covered, dark) = ink(&png_path);
        println!(
            "{file}: {:.1} % covered, {dark} dark pixels",
            covered * 100.0
        );
        assert!(covered > 0.02, "{file} renders blank");
        assert!(
            dark > 1_000,
            "{file} shows too little text: {dark} dark pixels"
        );
    }
}
