//! Drilling template: mark placement and SVG pages, and the PDF of those pages.

use criterion::{criterion_group, criterion_main, Criterion};
use portwright::export::pdf::svg_pages_to_pdf;
use portwright::export::template::{drill_template_svg, TemplateSettings};
use std::hint::black_box;

fn template(c: &mut Criterion) {
    let design =
        portwright::layout::parse_str(include_str!("../layouts/heron-54.toml"), "heron-54.toml")
            .expect("demo parses");
    let s = TemplateSettings::default();
    let mut g = c.benchmark_group("template");
    g.bench_function("heron-54 A4 pages, placement and SVG", |b| {
        b.iter(|| drill_template_svg(black_box(&design), &s).expect("template"))
    });
    let pages = drill_template_svg(&design, &s).expect("template");
    g.sample_size(10);
    g.bench_function("heron-54 A4 pages to PDF", |b| {
        b.iter(|| svg_pages_to_pdf(black_box(&pages), "bench").expect("pdf"))
    });
    g.finish();
}

criterion_group!(benches, template);
criterion_main!(benches);
