//! frostline: ground heat loss and frost penetration under slab-on-ground foundations, from a 2D
//! finite-volume model of the soil with freezing and thawing.
//!
//! Data flow (dependencies point one way): [`case`] → [`geometry`] → [`mesh`] → [`physics`] →
//! [`solver`] → [`analysis`] → [`report`] → [`cli`]. [`methods`] holds the closed-form published
//! methods used as cross-checks. The library never prints; only [`cli`] does.
#![deny(missing_docs)]

pub mod case;
pub mod error;
pub mod geometry;
pub mod mesh;
pub mod physics;
pub mod solver;
pub mod analysis;
pub mod methods;
pub mod report;
pub mod simulate;
pub mod cli;

pub use error::{Error, Result};
