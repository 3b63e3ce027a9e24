//! portwright: design and check cold-gas reaction-control port layouts.
#![deny(missing_docs)]

pub mod allocation;
pub mod export;
pub mod gas;
