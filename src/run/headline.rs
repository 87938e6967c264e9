//! The numbers a user designs with, from a run's records: annual, mean and peak heat loss, floor
//! U-value, frost depths and the frost margin, and the basement's floor and wall values.
use super::result::{Records, RunResult};
use super::split::HeatSplit;
use crate::case::Case;

/// Headline numbers of a run.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Headline {
    /// Annual ground heat loss, kWh (whole building; the normal year when a design winter was
    /// run).
    pub annual_heat_loss_kwh: f64,
    /// Mean heat loss, W.
    pub mean_heat_loss_w: f64,
    /// Largest daily-mean heat loss of the reported period (the design winter's, if any), W.
    pub peak_heat_loss_w: f64,
    /// Mean heat loss per metre of exposed perimeter, W/m.
    pub heat_loss_per_perimeter_w_per_m: f64,
    /// Floor U-value without the wall/floor junction (steady, ISO 13370 definition), W/(m²·K);
    /// None for a basement.
    pub floor_u_value_w_per_m2k: Option<f64>,
    /// The wall/floor junction's linear thermal transmittance Ψ_g, W/(m·K); None for a basement.
    pub junction_psi_w_per_mk: Option<f64>,
    /// Annual mean ground heat loss / (A (mean indoor − mean outdoor)): the U-value with the
    /// junction, H_g/A = U + P Ψ_g / A, over the year as simulated, W/(m²·K); None when the mean
    /// indoor and outdoor temperatures differ by less than 1 K (an unheated building).
    pub ground_u_value_incl_junction_w_per_m2k: Option<f64>,
    /// Mean 1D U-value of the stated foundation wall above the floor (or ground), W/(m²·K).
    pub wall_above_ground_u_value_w_per_m2k: Option<f64>,
    /// Its annual heat loss, kWh.
    pub wall_above_ground_heat_loss_kwh: f64,
    /// Deepest frost in open ground, m.
    pub frost_depth_open_ground_m: f64,
    /// Deepest frost just outside the footing's outer face, m.
    pub frost_depth_at_footing_face_m: f64,
    /// Deepest frost below the footing base within its width, m (0: none).
    pub frost_depth_under_footing_m: f64,
    /// Deepest frost within 0.5 m outside the wall, m.
    pub frost_depth_beside_wall_m: f64,
    /// Least distance from the frost line to the footing's outer base corner, m (None: no
    /// frost).
    pub frost_distance_to_base_corner_m: Option<f64>,
    /// Whether frozen ground entered the protected zone below the footing.
    pub frost_in_protected_zone: bool,
    /// Least signed distance between the frozen ground and the protected zone, m.
    pub frost_margin_m: f64,
    /// Day of year of the least frost margin (the day of the saved field).
    pub design_day_of_year: usize,
}

/// Hours of the reported period (a season of a series may have 366 days).
pub fn reported_hours(r: &RunResult) -> f64 {
    24.0 * r.days.len().max(1) as f64
}

/// The least temperature difference a U-value is computed for, K.
pub const MIN_DELTA_T_K: f64 = 1.0;

/// Compute the headline numbers of a 2D run.
pub fn headline(case: &Case, r: &RunResult) -> Headline {
    headline_of(case, &r.records(), &r.split)
}

/// Compute the headline numbers from a run's records and the section's heat split.
pub fn headline_of(case: &Case, r: &Records, split: &HeatSplit) -> Headline {
    let y = r.final_year();
    let heat = r.heat_year();
    let mean_w = heat.heat_loss_kwh * 1000.0 / (24.0 * r.heat_days().len().max(1) as f64);
    let peak = r
        .days
        .iter()
        .map(|d| d.heat_loss_w)
        .fold(f64::NEG_INFINITY, f64::max);
    let dtemp = case.indoor_mean_c() - case.climate.mean_c;
    let corner = r
        .days
        .iter()
        .map(|d| d.frost_corner_distance_m)
        .fold(f64::INFINITY, f64::min);
    Headline {
        annual_heat_loss_kwh: heat.heat_loss_kwh,
        mean_heat_loss_w: mean_w,
        peak_heat_loss_w: peak,
        heat_loss_per_perimeter_w_per_m: mean_w / case.building.exposed_perimeter_m,
        floor_u_value_w_per_m2k: split.floor_u_w_per_m2k,
        junction_psi_w_per_mk: split.psi_g_w_per_mk,
        ground_u_value_incl_junction_w_per_m2k: (dtemp.abs() >= MIN_DELTA_T_K)
            .then(|| mean_w / (case.building.floor_area_m2 * dtemp)),
        wall_above_ground_u_value_w_per_m2k: (split.stated_wall_height_m > 0.0)
            .then(|| split.stated_wall_1d_w_per_mk / split.stated_wall_height_m),
        wall_above_ground_heat_loss_kwh: heat.wall_above_ground_heat_loss_kwh,
        frost_depth_open_ground_m: y.max_frost_open_m,
        frost_depth_at_footing_face_m: y.max_frost_face_m,
        frost_depth_under_footing_m: y.max_frost_footing_m,
        frost_depth_beside_wall_m: y.max_frost_beside_wall_m,
        frost_distance_to_base_corner_m: corner.is_finite().then_some(corner),
        frost_in_protected_zone: y.min_frost_margin_m < 0.0,
        frost_margin_m: y.min_frost_margin_m,
        design_day_of_year: r.design_day,
    }
}

/// A heated basement's results, ISO 13370 definitions.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct BasementValues {
    /// Floor loss / (A Δθ), W/(m²·K).
    pub floor_u_value_w_per_m2k: f64,
    /// Below-ground wall loss / (z P Δθ), W/(m²·K).
    pub wall_u_value_w_per_m2k: f64,
    /// (floor + below-ground wall) / ((A + z P) Δθ), W/(m²·K).
    pub effective_u_value_w_per_m2k: f64,
    /// Deepest frost within 0.5 m outside the wall, m.
    pub frost_depth_beside_wall_m: f64,
}

/// Basement results, if the case has a basement.
pub fn basement_values(case: &Case, r: &RunResult) -> Option<BasementValues> {
    let b = case.basement.as_ref()?;
    let y = r.heat_year();
    let dtemp = case.indoor_mean_c() - case.climate.mean_c;
    let (a, p, z) = (
        case.building.floor_area_m2,
        case.building.exposed_perimeter_m,
        b.floor_depth_m,
    );
    let hours = 24.0 * r.heat_days().len().max(1) as f64;
    let floor_w = y.floor_heat_loss_kwh * 1000.0 / hours;
    let wall_w = y.wall_heat_loss_kwh * 1000.0 / hours;
    Some(BasementValues {
        floor_u_value_w_per_m2k: floor_w / (a * dtemp),
        wall_u_value_w_per_m2k: wall_w / (z * p * dtemp),
        effective_u_value_w_per_m2k: (floor_w + wall_w) / ((a + z * p) * dtemp),
        frost_depth_beside_wall_m: r.final_year().max_frost_beside_wall_m,
    })
}
