//! Gas: equation of state, tank inventory and blowdown, flow through valve and nozzle.

pub mod chain;
pub mod eos;
pub mod isentropic;
pub mod nozzle;
pub mod species;
pub mod tank;
pub mod valve;

pub use isentropic::{FlowError, FlowTolerances};
pub use species::{Gas, IdealGas};
