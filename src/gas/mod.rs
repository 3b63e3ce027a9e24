//! Gas: equation of state, tank inventory and blowdown, flow through valve and nozzle.

pub mod eos;
pub mod species;
pub mod tank;

pub use species::{Gas, IdealGas};
