//! Write moved ports back into the user's layout text, keeping comments and order.
//!
//! `toml_edit` edits the document in place: only the values of the moved fields
//! change; every comment, blank line and the order of sections stay as written.

use crate::model::{NozzleSpec, Port};
use toml_edit::{value, DocumentMut};

/// Why the text could not be updated.
#[derive(Debug, thiserror::Error)]
pub enum WriteError {
    /// The original text does not parse as TOML (it did when it was read).
    #[error("the layout text does not parse: {0}")]
    Parse(String),
    /// A port in the model has no `[[port]]` table of that name.
    #[error("no [[port]] named `{0}` in the layout text")]
    MissingPort(String),
}

fn mm(v_m: f64) -> String {
    format!("{:.2} mm", v_m * 1e3)
}

fn deg(v_rad: f64) -> String {
    format!("{:.2} deg", v_rad.to_degrees())
}

/// Return `text` with each port's station, clock, cants and hole set from `ports`.
pub fn with_ports(text: &str, ports: &[Port]) -> Result<String, WriteError> {
    let mut doc: DocumentMut = text
        .parse()
        .map_err(|e: toml_edit::TomlError| WriteError::Parse(e.to_string()))?;
    let tables = doc
        .get_mut("port")
        .and_then(|p| p.as_array_of_tables_mut())
        .ok_or_else(|| WriteError::MissingPort("(any)".to_string()))?;
    for port in ports {
        let t = tables
            .iter_mut()
            .find(|t| {
                t.get("name").and_then(|n| n.as_str()).map(str::trim) == Some(port.name.as_str())
            })
            .ok_or_else(|| WriteError::MissingPort(port.name.clone()))?;
        t["station"] = value(mm(port.station_m));
        t["clock"] = value(deg(port.clock_rad.rem_euclid(std::f64::consts::TAU)));
        if port.tangential_cant_rad != 0.0 || t.contains_key("tangential_cant") {
            t["tangential_cant"] = value(deg(port.tangential_cant_rad));
        }
        if port.axial_cant_rad != 0.0 || t.contains_key("axial_cant") {
            t["axial_cant"] = value(deg(port.axial_cant_rad));
        }
        if let NozzleSpec::Hole { diameter_m, .. } = port.nozzle {
            if t.contains_key("hole") {
                t["hole"] = value(mm(diameter_m));
            }
        }
    }
    Ok(doc.to_string())
}
