//! What a user reads: the result table and other command-line text ([`text`]), the sizing's
//! summary ([`sizing`]) and `report.html` ([`html`]), all rendered from the run directory's typed
//! files (or the same structs in memory).
pub mod html;
pub mod sizing;
pub mod text;
pub mod three;

pub use crate::files::{CAUTION, COORDINATES};
