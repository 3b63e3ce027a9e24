//! TOML and type errors from the first reading stage, turned into a
//! [`Diagnostic`] that names the field as well as the place.
//!
//! The TOML reader knows the byte span of the bad value but not the dotted name
//! of its field; the name is read back from the text: the nearest table header
//! above the span (with the entry's number for a `[[...]]` list) and the key on
//! the span's line.

use super::{line_column, Diagnostic};

/// Fields whose values are text rather than quantities: a type error on them
/// gets no hint about units.
const TEXT_FIELDS: &[&str] = &[
    "name",
    "shape",
    "gas",
    "outlet",
    "kind",
    "state",
    "axis",
    "motor",
    "together",
    "objective",
    "ports",
    "drills",
];

/// A problem for a TOML or type error, with the field named.
pub fn problem(text: &str, e: &toml::de::Error) -> Diagnostic {
    let mut message = e
        .message()
        .trim()
        .replace("floating point `NaN`", "the bare word `nan`")
        .replace("floating point `-NaN`", "the bare word `-nan`")
        .replace("floating point `inf`", "the bare word `inf`")
        .replace("floating point `-inf`", "the bare word `-inf`");
    let Some(span) = e.span() else {
        return Diagnostic {
            line: 1,
            column: 1,
            field: String::new(),
            message,
        };
    };
    let start = floor_boundary(text, span.start.min(text.len()));
    let before = &text[..start];
    let line_start = before.rfind('\n').map_or(0, |k| k + 1);
    let line_end = text[start..].find('\n').map_or(text.len(), |k| start + k);
    let line = &text[line_start..line_end];
    let key = line
        .split_once('=')
        .map(|(k, _)| k.trim().trim_matches('"'))
        .filter(|k| {
            !k.is_empty()
                && k.chars()
                    .all(|c| c.is_alphanumeric() || matches!(c, '_' | '-' | '.'))
        })
        .unwrap_or("");
    let section = header_above(&text[..line_start]);
    let field = match (section.is_empty(), key.is_empty()) {
        (_, true) => section,
        (true, false) => key.to_string(),
        (false, false) => format!("{section}.{key}"),
    };
    let last = key.rsplit('.').next().unwrap_or("");
    if message.contains("expected a string") && !TEXT_FIELDS.contains(&last) {
        message.push_str(" (quantities are strings with a unit, such as \"54 mm\")");
    }
    if message.starts_with("duplicate key") && !key.is_empty() && !message.contains(key) {
        message = format!("duplicate key `{key}`: each key may appear once in a table");
    }
    let (line, column) = line_column(text, start);
    Diagnostic {
        line,
        column,
        field,
        message,
    }
}

fn floor_boundary(text: &str, mut k: usize) -> usize {
    while k > 0 && !text.is_char_boundary(k) {
        k -= 1;
    }
    k
}

/// The dotted name of the table the text ends in: `feed.tank`, or `port 3`
/// for the third `[[port]]`.
fn header_above(before: &str) -> String {
    let mut counts: std::collections::HashMap<String, usize> = Default::default();
    let mut section = String::new();
    for l in before.lines() {
        let l = l.trim();
        if let Some(name) = l.strip_prefix("[[").and_then(|r| r.split("]]").next()) {
            let name = name.trim().to_string();
            let n = counts.entry(name.clone()).or_insert(0);
            *n += 1;
            section = format!("{name} {n}");
        } else if let Some(name) = l.strip_prefix('[').and_then(|r| r.split(']').next()) {
            section = name.trim().to_string();
        }
    }
    section
}
