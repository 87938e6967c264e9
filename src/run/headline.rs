//! The numbers a user designs with, from a run's records: annual, mean and peak heat loss, floor
//! U-value, frost depths and the frost margin, and the basement's floor and wall values.
use super::result::RunResult;
use crate::case::Case;

/// Headline numbers of a run.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Headline {
    /// Annual ground heat loss, kWh (whole building).
    pub annual_heat_loss_kwh: f64,
    /// Mean heat loss, W.
    pub mean_heat_loss_w: f64,
    /// Largest daily-mean heat loss, W.
    pub peak_heat_loss_w: f64,
    /// Mean heat loss per metre of exposed perimeter, W/m.
    pub heat_loss_per_perimeter_w_per_m: f64,
    /// Annual mean loss / (A (mean indoor − mean outdoor)), W/(m²·K).
    pub floor_u_value_w_per_m2k: f64,
    /// Deepest frost in open ground, m.
    pub frost_depth_open_ground_m: f64,
    /// Deepest frost under the footing, m.
    pub frost_depth_under_footing_m: f64,
    /// Footing base depth minus frost depth under the footing, m.
    pub frost_margin_m: f64,
    /// Day of year of the deepest frost under the footing (open ground when none).
    pub date_of_max_frost_depth: usize,
}

/// Hours of the reported period (a season of a series may have 366 days).
pub fn reported_hours(r: &RunResult) -> f64 {
    24.0 * r.days.len().max(1) as f64
}

/// Compute the headline numbers.
pub fn headline(case: &Case, r: &RunResult) -> Headline {
    let y = r.final_year();
    let mean_w = y.heat_loss_kwh * 1000.0 / reported_hours(r);
    let peak = r
        .days
        .iter()
        .map(|d| d.heat_loss_w)
        .fold(f64::NEG_INFINITY, f64::max);
    let dtemp = case.indoor_mean_c() - case.climate.mean_c;
    let day_max = if y.max_frost_footing_m > 0.0 {
        r.days
            .iter()
            .max_by(|a, b| a.frost_footing_m.total_cmp(&b.frost_footing_m))
    } else {
        r.days
            .iter()
            .max_by(|a, b| a.frost_open_m.total_cmp(&b.frost_open_m))
    };
    Headline {
        annual_heat_loss_kwh: y.heat_loss_kwh,
        mean_heat_loss_w: mean_w,
        peak_heat_loss_w: peak,
        heat_loss_per_perimeter_w_per_m: mean_w / case.building.exposed_perimeter_m,
        floor_u_value_w_per_m2k: mean_w / (case.building.floor_area_m2 * dtemp),
        frost_depth_open_ground_m: y.max_frost_open_m,
        frost_depth_under_footing_m: y.max_frost_footing_m,
        frost_margin_m: case.footing.base_depth_m - y.max_frost_footing_m,
        date_of_max_frost_depth: day_max.map_or(0, |d| d.day_of_year),
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
    let y = r.final_year();
    let dtemp = case.indoor_mean_c() - case.climate.mean_c;
    let (a, p, z) = (
        case.building.floor_area_m2,
        case.building.exposed_perimeter_m,
        b.floor_depth_m,
    );
    let hours = reported_hours(r);
    let floor_w = y.floor_heat_loss_kwh * 1000.0 / hours;
    let wall_w = y.wall_heat_loss_kwh * 1000.0 / hours;
    Some(BasementValues {
        floor_u_value_w_per_m2k: floor_w / (a * dtemp),
        wall_u_value_w_per_m2k: wall_w / (z * p * dtemp),
        effective_u_value_w_per_m2k: (floor_w + wall_w) / ((a + z * p) * dtemp),
        frost_depth_beside_wall_m: y.max_frost_beside_wall_m,
    })
}
