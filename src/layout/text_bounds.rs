//! A first pass over the layout text that refuses any key or text value longer
//! than a bound, before anything else reads it.
//!
//! Names and labels travel into every report, table, drawing and mesh header;
//! one megabyte-long name would make each of them huge. Checking once, here,
//! keeps every later stage's cost bounded by the bound rather than the input.

use super::{line_column, Diagnostic};
use toml_edit::{Item, Table, Value};

/// Every key and text value longer than `max` characters, with its place.
/// A file that is not TOML gives nothing here; the reader reports its syntax.
pub fn too_long(text: &str, max: usize) -> Vec<Diagnostic> {
    // Nothing can be too long in a file shorter than the bound.
    if text.len() <= max {
        return Vec::new();
    }
    let Ok(doc) = toml_edit::Document::parse(text) else {
        return Vec::new();
    };
    let mut out = Vec::new();
    walk_table(doc.as_table(), "", text, max, &mut out);
    out
}

fn report(
    span: Option<std::ops::Range<usize>>,
    field: &str,
    what: &str,
    length: usize,
    max: usize,
    text: &str,
    out: &mut Vec<Diagnostic>,
) {
    let (line, column) = span.map_or((1, 1), |s| line_column(text, s.start));
    out.push(Diagnostic {
        line,
        column,
        field: field.to_string(),
        message: format!("{what} of {length} characters is too long: at most {max} are accepted"),
    });
}

fn join(path: &str, key: &str) -> String {
    let key = if key.chars().count() > 40 {
        key.chars().take(40).collect::<String>() + "…"
    } else {
        key.to_string()
    };
    if path.is_empty() {
        key
    } else {
        format!("{path}.{key}")
    }
}

fn walk_table(t: &Table, path: &str, text: &str, max: usize, out: &mut Vec<Diagnostic>) {
    for (key, item) in t.iter() {
        let field = join(path, key);
        let n = key.chars().count();
        if n > max {
            let span = t.key(key).and_then(|k| k.span());
            report(span, &field, "a key", n, max, text, out);
            continue;
        }
        walk_item(item, &field, text, max, out);
    }
}

fn walk_item(item: &Item, field: &str, text: &str, max: usize, out: &mut Vec<Diagnostic>) {
    match item {
        Item::Value(v) => walk_value(v, field, text, max, out),
        Item::Table(t) => walk_table(t, field, text, max, out),
        Item::ArrayOfTables(a) => {
            for (k, t) in a.iter().enumerate() {
                walk_table(t, &format!("{field} {}", k + 1), text, max, out);
            }
        }
        Item::None => {}
    }
}

fn walk_value(v: &Value, field: &str, text: &str, max: usize, out: &mut Vec<Diagnostic>) {
    match v {
        Value::String(s) => {
            let n = s.value().chars().count();
            if n > max {
                report(s.span(), field, "a text", n, max, text, out);
            }
        }
        Value::Array(a) => {
            for x in a.iter() {
                walk_value(x, field, text, max, out);
            }
        }
        Value::InlineTable(t) => {
            for (key, x) in t.iter() {
                let n = key.chars().count();
                if n > max {
                    report(x.span(), &join(field, key), "a key", n, max, text, out);
                } else {
                    walk_value(x, &join(field, key), text, max, out);
                }
            }
        }
        _ => {}
    }
}
