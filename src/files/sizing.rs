//! The files of a sizing: `sizing.json` (every evaluated design, the trade-off, the chosen
//! design, the cross-checks), `sizing.csv` and `chosen_case.toml` (a complete case `frostline
//! run` accepts and reproduces).
use super::tables::fmt;
use crate::case::{Case, Vary};
pub use crate::design::corner::CornerCheck;
use crate::design::{dimension_label, Design, SizingResult};
use serde::{Deserialize, Serialize};

pub use crate::design::SIZING_CAUTION;

/// The corner sentence when the sizing had a 3D corner check.
pub const CORNERS_3D: &str = "Corners were checked in 3D (see the corner check): the board found keeps the least frost margin anywhere round the building, which is at the corner, at least the required margin.";

/// What the 2D sizing says about corners.
pub const CORNERS: &str = "Corners are not computed: a 2D section cannot resolve the colder outside corners of a building, \
where frost reaches deeper; corner protection must be designed separately.";

/// The published-method cross-checks of a sizing.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SizingCheck {
    /// The design air freezing index: the design winter's (or the sinusoid's without one), or the
    /// coldest winter of a series, °C·d.
    pub design_air_freezing_index_c_days: f64,
    /// Modified-Berggren open-ground frost depth, m.
    pub modified_berggren_open_ground_frost_depth_m: f64,
    /// Stefan open-ground frost depth, m.
    pub stefan_open_ground_frost_depth_m: f64,
}

/// Contents of `sizing.json`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SizingFile {
    /// Case name.
    pub case_name: String,
    /// The caution.
    pub caution: String,
    /// Required margin, m.
    pub margin_m: f64,
    /// What the margin means.
    pub margin_meaning: String,
    /// The varied dimensions by name.
    pub dimensions: Vec<String>,
    /// The varied dimensions.
    pub vary: Vec<Vary>,
    /// Why no insulation is needed, if so.
    pub no_insulation_needed: Option<String>,
    /// The foundation without the varied insulation.
    pub baseline_without_varied_insulation: Design,
    /// The least-cost feasible design.
    pub chosen: Option<Design>,
    /// The least feasible second value for each first value.
    pub tradeoff: Vec<Design>,
    /// Every evaluated design.
    pub designs: Vec<Design>,
    /// An unheated building: no heat loss to report (the figures are the indoor air's exchange
    /// with the ground, not a heating load).
    #[serde(default)]
    pub unheated: bool,
    /// What the sizing says about corners.
    pub corners: String,
    /// The 3D corner check, if the sizing had `[sizing.corner]`.
    #[serde(default)]
    pub corner_check: Option<CornerCheck>,
    /// Published-method cross-checks.
    pub cross_check: SizingCheck,
    /// Findings in words.
    pub flags: Vec<String>,
    /// Model runs.
    pub runs: usize,
    /// Median wall time per run, s.
    pub median_run_s: f64,
    /// Total wall time, s.
    pub wall_time_s: f64,
}

impl SizingFile {
    /// The sizing file of a sizing of `case`.
    pub fn new(case: &Case, r: &SizingResult) -> Self {
        let (cross_check, flags) = checks(case);
        SizingFile {
            case_name: case.name.clone(),
            caution: SIZING_CAUTION.into(),
            margin_m: r.margin_m,
            margin_meaning: r.margin_meaning.clone(),
            dimensions: r.vary.iter().map(|v| dimension_label(case, v)).collect(),
            vary: r.vary.clone(),
            no_insulation_needed: r.no_insulation_needed.clone(),
            baseline_without_varied_insulation: r.baseline.clone(),
            chosen: r.chosen.clone(),
            tradeoff: r.tradeoff.clone(),
            designs: r.designs.clone(),
            unheated: case.building.unheated,
            corners: if r.corner.is_some() {
                CORNERS_3D.into()
            } else {
                CORNERS.into()
            },
            corner_check: r.corner.as_ref().map(|c| c.check.clone()),
            cross_check,
            flags,
            runs: r.runs,
            median_run_s: r.median_run_s,
            wall_time_s: r.wall_time_s,
        }
    }
}

/// The cross-checks and the findings in words.
fn checks(case: &Case) -> (SizingCheck, Vec<String>) {
    let cc = crate::estimate::cross_check(case);
    // The air index: the surface index the cross-checks use, without the n-factor.
    let fi = cc.freezing_index_c_days / case.climate.n_freezing;
    let open = cc.modified_berggren_frost_depth_m;
    let mut flags = Vec::new();
    if open < case.footing.base_depth_m {
        flags.push(format!("modified Berggren gives an open-ground frost depth of {open:.2} m, above the footing base ({:.2} m): frost protection may not be needed at all", case.footing.base_depth_m));
    }
    (
        SizingCheck {
            design_air_freezing_index_c_days: fi,
            modified_berggren_open_ground_frost_depth_m: open,
            stefan_open_ground_frost_depth_m: cc.stefan_frost_depth_m,
        },
        flags,
    )
}

/// `sizing.csv`: every evaluated design.
pub fn sizing_csv(f: &SizingFile) -> String {
    // The case, the caution and the cost basis (per metre of exposed perimeter) are in
    // sizing.json; the CSV is one header row and data.
    let mut csv = format!("{},frost_margin_m,frost_depth_under_footing_m,annual_heat_loss_kwh,heat_loss_change_kwh,cost_per_m,feasible,on_tradeoff,note\n", f.dimensions.join(","));
    for d in &f.designs {
        let on = f.tradeoff.iter().any(|t| t.values == d.values);
        let vals: Vec<String> = d.values.iter().map(|v| format!("{v:.4}")).collect();
        csv += &format!(
            "{},{},{},{},{},{},{},{},{}\n",
            vals.join(","),
            fmt(d.frost_margin_m, 4),
            fmt(d.frost_depth_under_footing_m, 4),
            fmt(d.annual_heat_loss_kwh, 1),
            fmt(d.heat_loss_change_kwh, 1),
            fmt(d.cost_per_m, 2),
            d.feasible,
            on,
            d.note.clone().unwrap_or_default().replace(',', ";")
        );
    }
    csv
}
