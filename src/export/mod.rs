//! Files a builder takes away from a design: here, the firmware allocation tables.
//!
//! Every function in this module is pure: it turns computed results into text and
//! leaves reading and writing files to the binary.

pub mod firmware;
