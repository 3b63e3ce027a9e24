//! Airframe geometry shared by mass properties, exports and constraint checks.

pub mod drilling;
pub mod nose;
pub mod placement;

pub use nose::profile_radius;
