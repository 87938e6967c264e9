//! frostline: ground heat loss and frost penetration under slab-on-ground foundations and heated
//! basements, from a 2D finite-volume model of the soil with freezing and thawing.
//!
//! ```
//! use frostline::{case, estimate, run};
//! let mut c = case::load_case(std::path::Path::new("examples/kettle-hollow-house.toml"))?;
//! c.simulation.mesh = case::Fineness::Coarse; // a quick run
//! let r = run::run(&c, &mut |_| {})?;
//! let h = run::headline(&c, &r);
//! let iso = estimate::cross_check(&c);
//! println!("heat loss {:.0} kWh/yr, open-ground frost {:.2} m (modified Berggren {:.2} m)",
//!     h.annual_heat_loss_kwh, h.frost_depth_open_ground_m, iso.modified_berggren_frost_depth_m);
//! assert!(h.frost_margin_m > 0.0);
//! # Ok::<(), frostline::Error>(())
//! ```
//!
//! Modules along the data flow, each depending only on those listed before it:
//! [`numerics`] → [`methods`] → [`physics`] → [`case`] → [`mesh`] → [`geometry`] → [`solver`] →
//! [`analysis`] → [`run`] → [`estimate`] → [`design`] → [`uncertainty`] → [`files`] → [`report`] →
//! [`plot`] → [`batch`]. The
//! library never prints; the `frostline` binary holds the command line.
#![deny(missing_docs)]
// Index loops over several arrays of the same length read closest to the discrete equations.
#![allow(clippy::needless_range_loop)]

pub mod analysis;
pub mod batch;
pub mod case;
pub mod design;
pub mod error;
pub mod estimate;
pub mod files;
pub mod geometry;
pub mod geometry3d;
pub mod mesh;
pub mod mesh3;
pub mod methods;
pub mod numerics;
pub mod physics;
pub mod plot;
pub mod report;
pub mod run;
pub mod solver;
pub mod uncertainty;

pub use error::{Error, Result};
