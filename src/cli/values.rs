//! Option values, checked while the command line is read so that a wrong one is
//! a command-line error (exit 2) with the option's name, never a layout error.
//!
//! Each function here is a clap value parser: it takes the text as typed and
//! returns the value or a sentence saying what was expected. Checks that need
//! the layout (a flight-state name, the least evaluation budget) cannot run
//! here; they raise a [`UsageError`] once the layout is read.

use nalgebra::Vector3;
use portwright::allocation::SideForceLimit;
use portwright::analysis::score::Objective;
use portwright::export::firmware::MAX_GRID_POINTS;
use portwright::units::{self, shown, shown_number, Kind};
use std::fmt;

/// A wrong option value found after the layout was read (exit code 2).
#[derive(Debug)]
pub struct UsageError(pub String);

impl fmt::Display for UsageError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.0)
    }
}

impl std::error::Error for UsageError {}

/// "ROLL,PITCH,YAW", each a torque with a unit; a bare 0 is accepted.
pub fn torque(text: &str) -> Result<Vector3<f64>, String> {
    let parts: Vec<&str> = text.split(',').map(str::trim).collect();
    if parts.len() != 3 {
        return Err(format!(
            "expected three torques ROLL,PITCH,YAW such as \"20 mN m,0,-5 mN m\", found \"{}\"",
            shown(text)
        ));
    }
    let mut v = Vector3::zeros();
    for (k, p) in parts.iter().enumerate() {
        v[k] = if p.parse::<f64>() == Ok(0.0) {
            0.0
        } else {
            units::parse(p, Kind::Torque)
                .map_err(|e| format!("{}: {e}", ["roll", "pitch", "yaw"][k]))?
        };
    }
    Ok(v)
}

/// A side-force limit such as "0.5 N"; "0 N" asks for pure couples.
pub fn side_force(text: &str) -> Result<SideForceLimit, String> {
    let v = units::parse(text, Kind::Force).map_err(|e| e.to_string())?;
    if v < 0.0 {
        return Err(format!(
            "expected a force of zero (pure couples) or more, found \"{}\"",
            shown(text)
        ));
    }
    Ok(SideForceLimit::from_newtons(Some(v)))
}

/// Grid points per axis, 2 to [`MAX_GRID_POINTS`].
pub fn grid(text: &str) -> Result<usize, String> {
    match text.trim().parse::<usize>() {
        Ok(n) if (2..=MAX_GRID_POINTS).contains(&n) => Ok(n),
        _ => Err(format!(
            "expected a whole number of points per axis from 2 to {MAX_GRID_POINTS}, found \"{}\"",
            shown(text)
        )),
    }
}

fn number(text: &str) -> Result<f64, String> {
    text.trim()
        .parse::<f64>()
        .map_err(|_| format!("expected a number, found \"{}\"", shown(text)))
}

/// A fraction from 0 to 1 (`--fraction`).
pub fn fraction(text: &str) -> Result<f64, String> {
    let x = number(text)?;
    if x.is_finite() && (0.0..=1.0).contains(&x) {
        Ok(x)
    } else {
        Err(format!(
            "expected a fraction from 0 to 1, found {}",
            shown_number(x)
        ))
    }
}

/// A fraction of zero or more, at most 10 (`--tolerance`: torque allowed on an
/// uncommanded axis, as a share of that axis's best).
pub fn tolerance(text: &str) -> Result<f64, String> {
    let x = number(text)?;
    if x.is_finite() && (0.0..=10.0).contains(&x) {
        Ok(x)
    } else {
        Err(format!(
            "expected a fraction from 0 to 10, found {}",
            shown_number(x)
        ))
    }
}

/// `--then-within`: from 0 up to, not including, 1.
pub fn then_within(text: &str) -> Result<f64, String> {
    let x = number(text)?;
    if x.is_finite() && (0.0..1.0).contains(&x) {
        Ok(x)
    } else {
        Err(format!(
            "expected a fraction from 0 up to, not including, 1 (0.01 gives up at most 1 %), found {}",
            shown_number(x)
        ))
    }
}

/// `--objective`, in the syntax of the README's objective table.
pub fn objective(text: &str) -> Result<Objective, String> {
    Objective::parse(text)
}

/// `--max-evals`: a whole number of at least 2; the true least budget depends
/// on the freedoms and is checked once the layout is read.
pub fn max_evals(text: &str) -> Result<usize, String> {
    let most = portwright::layout::optimizer::MAX_EVALUATIONS;
    match text.trim().parse::<u64>() {
        Ok(n) if (2..=most).contains(&n) => Ok(n as usize),
        _ => Err(format!(
            "expected a whole number of evaluations from 2 to {most} (the search needs more than its population, at least 31; the exact least is said once the layout is read), found \"{}\"",
            shown(text)
        )),
    }
}

/// `--time-limit`: a time with a unit such as "30 s", above zero, at most a day.
pub fn time_limit(text: &str) -> Result<f64, String> {
    portwright::layout::optimizer::time_limit(text)
}
