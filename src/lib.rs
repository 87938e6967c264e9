//! frostline: ground heat loss and frost penetration under slab-on-ground foundations, from a 2D
//! finite-volume model of the soil with freezing and thawing.
//!
//! Data flow (dependencies point one way): [`case`] → [`geometry`] → [`mesh`] → [`physics`] →
//! [`solver`] → [`analysis`] → [`report`] → [`cli`]. [`methods`] holds the closed-form published
//! methods used as cross-checks. The library never prints; only [`cli`] does.
#![deny(missing_docs)]
// Index loops over several arrays of the same length read closest to the discrete equations.
#![allow(clippy::needless_range_loop)]

pub mod analysis;
pub mod case;
pub mod cli;
pub mod design;
pub mod error;
pub mod geometry;
pub mod mesh;
pub mod methods;
pub mod physics;
pub mod plot;
pub mod report;
pub mod simulate;
pub mod solver;

pub use error::{Error, Result};
