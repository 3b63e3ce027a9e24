//! portwright: design and check cold-gas reaction-control port layouts.
#![deny(missing_docs)]

pub mod export;
pub mod gas;
pub mod model;
