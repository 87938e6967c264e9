//! What a user reads: the result table and other command-line text ([`text`]), the sizing's
//! summary ([`sizing`]) and `report.html` ([`html`]), all rendered from the run directory's typed
//! files (or the same structs in memory).
pub mod batch;
pub mod html;
pub mod sizing;
pub mod text;
pub mod three;
pub mod uncertainty;

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

/// The units being rendered.
pub(crate) fn current() -> Units {
    UNITS.with(Cell::get)
}

/// A row name in the units being rendered: "per metre" becomes "per foot" in US units.
pub(crate) fn per_length(name: &str) -> String {
    if current() == Units::Si {
        name.to_string()
    } else {
        name.replace("per metre", "per foot")
            .replace("per-metre", "per-foot")
    }
}

/// The peak heat-loss row's name: of the design winter, of the measured season run, or of the
/// reported year.
pub(crate) fn peak_label(s: &crate::files::Summary) -> String {
    if s.design_winter.is_some() {
        "peak (daily mean, design winter)".into()
    } else if let Some(y) = s.climate.season {
        format!("peak (daily mean, season {y}–{:02})", (y + 1) % 100)
    } else {
        "peak (daily mean)".into()
    }
}

/// A case key as shown: in US units its SI unit part replaced by the US one
/// (`wing.width_m` → `wing.width_ft`), as a US case file would name it.
pub(crate) fn key_shown(key: &str) -> String {
    match current() {
        Units::Si => key.to_string(),
        Units::Us => crate::files::us::convert(key, 0.0).map_or(key.to_string(), |(k, _)| k),
    }
}

/// An SI figure as shown: unit label, value and decimals in the units being rendered.
pub(crate) fn shown(label: &str, v: f64, prec: usize) -> (&str, f64, usize) {
    figure(current(), label, v, prec)
}

/// A length (m) with its unit in the units being rendered, two decimals in m or ft: "0.50 m",
/// "1.64 ft".
pub(crate) fn shown_length(m: f64) -> String {
    let (unit, v, _) = shown("m", m, 2);
    format!("{v:.2} {unit}")
}

/// The reach of the "beside the wall" frost measure (0.5 m outside the wall's exterior face) in
/// the units being rendered: "0.5 m" or "1.64 ft".
pub(crate) fn beside_wall_reach() -> String {
    match current() {
        Units::Si => "0.5 m".into(),
        Units::Us => shown_length(0.5),
    }
}

/// An SI figure formatted in the units being rendered, without its unit ("–" if not finite).
pub(crate) fn shown_number(label: &str, v: f64, prec: usize) -> String {
    let (_, x, d) = shown(label, v, prec);
    html::f(x, d)
}

/// A results cell of exact figures (`VALUE#DECIMALS`, several joined by " / ", or text such as
/// "–") in the units being rendered; `label` is its SI unit. Returns the cell and the unit label
/// to show.
pub(crate) fn shown_cell(label: &str, cell: &str) -> (String, String) {
    let parts: Vec<String> = cell
        .split(" / ")
        .map(|p| {
            let exact = p
                .trim()
                .split_once('#')
                .and_then(|(v, d)| Some((v.parse::<f64>().ok()?, d.parse::<usize>().ok()?)));
            exact.map_or(p.to_string(), |(v, prec)| shown_number(label, v, prec))
        })
        .collect();
    (parts.join(" / "), shown(label, 0.0, 0).0.to_string())
}
