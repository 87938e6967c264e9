//! frostline: ground heat loss and frost penetration under slab-on-ground foundations and heated
//! basements, from a 2D finite-volume model of the soil with freezing and thawing.
//!
//! Modules along the data flow, each depending only on those listed before it:
//! [`numerics`] → [`physics`] → [`methods`] → [`case`] → [`geometry`] → [`mesh`] → [`solver`] →
//! [`analysis`] → [`run`] → [`estimate`] → [`design`] → [`report`] → [`plot`]. The library never
//! prints; the `frostline` binary holds the command line.
#![deny(missing_docs)]
// Index loops over several arrays of the same length read closest to the discrete equations.
#![allow(clippy::needless_range_loop)]

pub mod analysis;
pub mod case;
pub mod design;
pub mod error;
pub mod estimate;
pub mod files;
pub mod geometry;
pub mod mesh;
pub mod methods;
pub mod numerics;
pub mod physics;
pub mod plot;
pub mod report;
pub mod run;
pub mod solver;

pub use error::{Error, Result};
