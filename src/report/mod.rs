//! What a user reads: the result table and other command-line text ([`text`]), the sizing's
//! summary ([`sizing`]) and `report.html` ([`html`]), all rendered from the run directory's typed
//! files (or the same structs in memory).
pub mod html;
pub mod sizing;
pub mod text;
pub mod three;

use crate::files::us::{figure, Units};
pub use crate::files::{CAUTION, COORDINATES};
use std::cell::Cell;

thread_local! {
    /// The units the table rows of the text being rendered use (set by [`in_units`]).
    static UNITS: Cell<Units> = const { Cell::new(Units::Si) };
}

/// Render with `f` in `units`: every table row converts its SI figure and unit label
/// (`shown`); the previous units are restored afterwards.
pub fn in_units<T>(units: Units, f: impl FnOnce() -> T) -> T {
    let before = UNITS.with(|u| u.replace(units));
    let out = f();
    UNITS.with(|u| u.set(before));
    out
}

/// A row name in the units being rendered: "per metre" becomes "per foot" in US units.
pub(crate) fn per_length(name: &str) -> String {
    if shown("m", 0.0, 0).0 == "m" {
        name.to_string()
    } else {
        name.replace("per metre", "per foot")
            .replace("per-metre", "per-foot")
    }
}

/// An SI figure as shown: unit label, value and decimals in the units being rendered.
pub(crate) fn shown(label: &str, v: f64, prec: usize) -> (&str, f64, usize) {
    figure(UNITS.with(Cell::get), label, v, prec)
}

/// A results cell of exact figures (`VALUE#DECIMALS`, several joined by " / ", or text such as
/// "–") in the units being rendered; `label` is its SI unit. Returns the cell and the unit label
/// to show.
pub(crate) fn shown_cell(label: &str, cell: &str) -> (String, String) {
    let mut unit = label.to_string();
    let parts: Vec<String> = cell
        .split(" / ")
        .map(|p| {
            let exact = p
                .trim()
                .split_once('#')
                .and_then(|(v, d)| Some((v.parse::<f64>().ok()?, d.parse::<usize>().ok()?)));
            match exact {
                Some((v, prec)) => {
                    let (u, x, d) = shown(label, v, prec);
                    unit = u.to_string();
                    format!("{x:.d$}")
                }
                None => p.to_string(),
            }
        })
        .collect();
    if !cell.contains('#') {
        unit = shown(label, 0.0, 0).0.to_string();
    }
    (parts.join(" / "), unit)
}
