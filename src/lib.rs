//! portwright: design and check cold-gas reaction-control port layouts.
#![deny(missing_docs)]

pub mod airframe;
pub mod allocation;
pub mod analysis;
pub mod asbuilt;
pub mod atmosphere;
pub mod export;
pub mod gas;
pub mod ground;
pub mod layout;
pub mod mass;
pub mod model;
pub mod optimize;
pub mod precision;
pub mod report;
pub mod sim;
pub mod trade;
pub mod units;
