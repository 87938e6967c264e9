//! The forcing of a run: outdoor air (the design sinusoid's exact mean over a step, or measured
//! daily means), the ground-surface temperature through the n-factors, snow cover as an added
//! surface resistance, the indoor air, and the zone temperatures the solver takes.
//!
//! - Sinusoid: θ(t) = mean − amplitude · cos(2π (t − t_c)/365), t in days since 1 January 00:00
//!   of a 365-day year, t_c the middle of the coldest day; the mean over [t₀, t₁] is
//!   θ̄ = mean − amplitude (sin ω(t₁ − t_c) − sin ω(t₀ − t_c)) / (ω (t₁ − t₀)), ω = 2π/365.
//! - Ground surface: θ_s = n_f θ below 0 °C, n_t θ above (n-factors, surface/air index ratios).
//! - Snow: resistance depth / k_snow (m²·K/W) added on the ground surface in each month.
use crate::case::{Case, Climate, ClimateSource};
use crate::physics::climate::{civil_from_days, day_of_year, month_of, seasons, DailySeries};

/// One day of forcing.
#[derive(Debug, Clone, Copy)]
pub struct DayIn {
    /// Calendar time of the day's start, days since 1 January of a 365-day year (sinusoid).
    pub cal: f64,
    /// Day of year for records.
    pub doy: usize,
    /// Month 0–11.
    pub month: usize,
    /// Measured daily mean air temperature, if the climate is a series.
    pub measured_c: Option<f64>,
}

/// Ground-surface temperature for air temperature `t` (°C), by the n-factors.
pub fn surface(cl: &Climate, t: f64) -> f64 {
    if t < 0.0 {
        cl.n_freezing * t
    } else {
        cl.n_thawing * t
    }
}

/// Snow resistance on the ground in month `m` (0–11), m²·K/W.
pub fn snow_r(cl: &Climate, m: usize) -> f64 {
    cl.snow_depth_m[m] / cl.snow_k
}

/// Mean air temperature of the sinusoid over calendar time [d0, d1] (days since 1 January
/// 00:00), °C; its value at d0 when the interval is empty.
pub fn mean_over(cl: &Climate, d0: f64, d1: f64) -> f64 {
    let w = 2.0 * std::f64::consts::PI / 365.0;
    // The coldest day's middle is the minimum: day-of-year D spans [D − 1, D) in calendar days.
    let c = cl.coldest_day - 0.5;
    if d1 - d0 < 1e-12 {
        return cl.mean_c - cl.amplitude_k * (w * (d0 - c)).cos();
    }
    cl.mean_c - cl.amplitude_k * ((w * (d1 - c)).sin() - (w * (d0 - c)).sin()) / (w * (d1 - d0))
}

/// Indoor air temperature in `month` (0–11) when the outdoor air is at `air`, °C: the case's
/// monthly value, or the outdoor air for an unheated building.
pub fn indoor_c(case: &Case, month: usize, air: f64) -> f64 {
    if case.building.unheated {
        air
    } else {
        case.building.indoor_monthly_c[month]
    }
}

/// Zone temperatures in the order of the section's zones (indoor, outdoor, then the deep ground
/// when the bottom temperature is fixed), °C.
pub fn zone_temps(case: &Case, indoor: f64, outdoor: f64) -> Vec<f64> {
    let mut z = vec![indoor, outdoor];
    if let Some(tb) = case.simulation.bottom_temperature_c {
        z.push(tb);
    }
    z
}

/// The 365 days of the design year, from the start of the day holding the warmest time.
pub fn design_year_days(cl: &Climate) -> Vec<DayIn> {
    let day0 = (cl.coldest_day - 0.5 + 182.5).rem_euclid(365.0).floor();
    (0..365)
        .map(|d| {
            let cal = day0 + d as f64;
            DayIn {
                cal,
                doy: (cal as usize % 365) + 1,
                month: month_of(cal + 0.5),
                measured_c: None,
            }
        })
        .collect()
}

/// The complete seasons (1 July – 30 June) of a measured series, each named by the year it
/// starts, as days of forcing.
pub fn series_seasons(s: &DailySeries) -> Vec<(i64, Vec<DayIn>)> {
    let day = |k: usize| {
        let dn = s.day(k);
        let (_, m, _) = civil_from_days(dn);
        DayIn {
            cal: 0.0,
            doy: day_of_year(dn) as usize,
            month: m as usize - 1,
            measured_c: Some(s.values[k]),
        }
    };
    seasons(s.first_day, s.values.len())
        .into_iter()
        .map(|(y, r)| (y, r.map(day).collect()))
        .collect()
}

/// The spin-up days and the recorded seasons of the case's climate: the design year and no
/// seasons, or a series' first season and all its seasons.
pub fn schedule(case: &Case) -> (Vec<DayIn>, Vec<(i64, Vec<DayIn>)>) {
    match &case.climate.source {
        ClimateSource::Sinusoid => (design_year_days(&case.climate), Vec::new()),
        ClimateSource::Series(s) => {
            let seasons = series_seasons(s);
            let first = seasons.first().map(|x| x.1.clone()).unwrap_or_default();
            (first, seasons)
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn climate() -> Climate {
        Climate {
            source: ClimateSource::Sinusoid,
            design: None,
            n_freezing: 0.8,
            n_thawing: 1.2,
            snow_depth_m: [0.2; 12],
            snow_k: 0.2,
            mean_c: 3.0,
            amplitude_k: 14.0,
            coldest_day: 20.0,
            r_se: 0.04,
        }
    }

    #[test]
    fn sinusoid_means_and_n_factors() {
        let cl = climate();
        // The minimum at the middle of the coldest day; a whole-year mean is the annual mean.
        assert!((mean_over(&cl, 19.5, 19.5) - (3.0 - 14.0)).abs() < 1e-12);
        assert!((mean_over(&cl, 7.0, 372.0) - 3.0).abs() < 1e-12);
        assert_eq!(surface(&cl, -10.0), -8.0);
        assert!((surface(&cl, 10.0) - 12.0).abs() < 1e-12);
        assert!((snow_r(&cl, 0) - 1.0).abs() < 1e-12);
    }

    #[test]
    fn design_year_starts_on_the_warmest_day() {
        let days = design_year_days(&climate());
        assert_eq!(days.len(), 365);
        // Coldest at calendar time 19.5 d: the warmest half a year later, at 202.0 d, the start
        // of day of year 203.
        assert_eq!(days[0].doy, 203);
        assert_eq!(days[0].month, 6);
    }
}
