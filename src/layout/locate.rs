//! Find a field, named the way messages name it, in the layout text.
//!
//! Problems found after loading (the analysis refusing a state's altitude, a
//! manoeuvre no port can perform) know the field at fault but not its place.
//! The dotted names used in every message — `feed.regulator`,
//! ``state `burnout`.altitude``, ``port `aft-2`.hole`` — are looked up again in
//! the text, so those problems carry a line and column like any other.

use super::{line_column, Diagnostic, LayoutError};
use toml_edit::{Item, Table};

/// 1-based line and column of `field` in `text`: its value when present, else
/// the table it belongs to, else nothing.
pub fn locate(text: &str, field: &str) -> Option<(usize, usize)> {
    let doc = toml_edit::Document::parse(text).ok()?;
    let (head, name, rest) = match field.split_once('`') {
        Some((head, tail)) => {
            let (name, rest) = tail.split_once('`')?;
            (head.trim(), Some(name), rest.trim_start_matches('.'))
        }
        None => (field, None, ""),
    };
    let mut table: &Table = doc.as_table();
    let mut keys: Vec<&str> = head.split('.').filter(|k| !k.is_empty()).collect();
    let mut tail: Vec<&str> = rest.split('.').filter(|k| !k.is_empty()).collect();
    if name.is_none() {
        // A plain dotted path: the last part may be a value.
        tail = keys.split_off(keys.len().saturating_sub(1));
    }
    let mut start = None;
    for (k, key) in keys.iter().enumerate() {
        let last = k + 1 == keys.len();
        match table.get(key)? {
            Item::Table(t) => table = t,
            Item::ArrayOfTables(a) if last => {
                let found = match name {
                    Some(n) => a.iter().find(|t| {
                        t.get("name")
                            .and_then(|v| v.as_str())
                            .is_some_and(|v| v.trim() == n)
                    }),
                    None => a.iter().next(),
                };
                table = found?;
            }
            _ => return None,
        }
        start = table.span().map(|s| s.start).or(start);
    }
    for key in &tail {
        match table.get(key) {
            Some(Item::Table(t)) => {
                table = t;
                start = t.span().map(|s| s.start).or(start);
            }
            Some(item) => {
                start = item.span().map(|s| s.start).or(start);
                break;
            }
            None => break,
        }
    }
    start.map(|s| line_column(text, s))
}

/// A problem found after loading, placed at its field.
pub fn problem_at(text: &str, source_name: &str, field: &str, message: String) -> LayoutError {
    let (line, column) = locate(text, field).unwrap_or((1, 1));
    LayoutError::Invalid {
        source_name: source_name.to_string(),
        problems: vec![Diagnostic {
            line,
            column,
            field: field.to_string(),
            message,
        }],
    }
}

/// An analysis error as a located layout problem.
pub fn analysis_problem(
    text: &str,
    source_name: &str,
    e: &crate::analysis::AnalysisError,
) -> LayoutError {
    problem_at(text, source_name, &e.field(), e.to_string())
}

#[cfg(test)]
mod tests {
    use super::*;

    const DEMO: &str = include_str!("../../layouts/heron-54.toml");

    fn line_of(needle: &str) -> usize {
        DEMO[..DEMO.find(needle).unwrap()].matches('\n').count() + 1
    }

    #[test]
    fn fields_are_found_where_messages_name_them() {
        assert_eq!(
            locate(DEMO, "state `burnout`.altitude").map(|p| p.0),
            Some(line_of("altitude = \"450 m\""))
        );
        assert_eq!(
            locate(DEMO, "feed.regulator").map(|p| p.0),
            Some(line_of("[feed.regulator]"))
        );
        assert_eq!(
            locate(DEMO, "feed.regulator.set_pressure").map(|p| p.0),
            Some(line_of("set_pressure ="))
        );
        assert_eq!(
            locate(DEMO, "port `roll-pos-b`").map(|p| p.0),
            Some(
                DEMO[..DEMO.find("name = \"roll-pos-b\"").unwrap()]
                    .matches('\n')
                    .count()
            )
        );
        assert_eq!(locate(DEMO, "state `nowhere`"), None);
    }
}
