//! Ground work before a flight: filling the flight tank from supply bottles.

pub mod fill;
pub mod pad;
pub mod report;
pub mod spec;
