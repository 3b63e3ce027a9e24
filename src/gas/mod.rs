//! Gas: equation of state, tank inventory and blowdown, flow through valve and nozzle.

pub mod species;

pub use species::{Gas, IdealGas};
