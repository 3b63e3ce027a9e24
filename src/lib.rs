//! portwright: design and check cold-gas reaction-control port layouts.
#![deny(missing_docs)]

pub mod gas;
pub mod allocation;
