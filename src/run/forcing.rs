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
    /// Calendar date of a measured day (days since 1970-01-01); None in a sinusoidal year.
    pub date: Option<i64>,
    /// Month 0–11.
    pub month: usize,
    /// Measured daily mean air temperature, if the climate is a series.
    pub measured_c: Option<f64>,
    /// Amplitude of the sinusoid's colder half on this day, K: the normal amplitude, or the
    /// design winter's.
    pub cold_amplitude_k: f64,
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
    mean_over_with(cl, cl.amplitude_k, d0, d1)
}

/// [`mean_over`] for the sinusoid whose colder half (cos ω(t − t_c) > 0, the half below the mean)
/// has amplitude `a_cold` (K) and whose warmer half keeps the normal amplitude: the interval is
/// split where the sinusoid crosses its mean, t = t_c + 365/4 + k·365/2, and each piece
/// integrated exactly, ∫ cos ω(t − t_c) dt = sin ω(t − t_c)/ω.
pub fn mean_over_with(cl: &Climate, a_cold: f64, d0: f64, d1: f64) -> f64 {
    let w = 2.0 * std::f64::consts::PI / 365.0;
    // The coldest day's middle is the minimum: day-of-year D spans [D − 1, D) in calendar days.
    let c = cl.coldest_day - 0.5;
    let amp = |t: f64| {
        if (w * (t - c)).cos() > 0.0 {
            a_cold
        } else {
            cl.amplitude_k
        }
    };
    if d1 - d0 < 1e-12 {
        return cl.mean_c - amp(d0) * (w * (d0 - c)).cos();
    }
    if a_cold == cl.amplitude_k {
        return cl.mean_c
            - cl.amplitude_k * ((w * (d1 - c)).sin() - (w * (d0 - c)).sin()) / (w * (d1 - d0));
    }
    let half = 365.0 / 2.0;
    let first = ((d0 - c - 365.0 / 4.0) / half).floor() as i64 + 1;
    let mut cuts = vec![d0];
    let mut k = first;
    while c + 365.0 / 4.0 + k as f64 * half < d1 {
        cuts.push(c + 365.0 / 4.0 + k as f64 * half);
        k += 1;
    }
    cuts.push(d1);
    let integral: f64 = cuts
        .windows(2)
        .map(|p| amp(0.5 * (p[0] + p[1])) * ((w * (p[1] - c)).sin() - (w * (p[0] - c)).sin()) / w)
        .sum();
    cl.mean_c - integral / (d1 - d0)
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

/// The 365 days of a sinusoidal year, from the start of the day holding the warmest time, with
/// the colder half's amplitude `a_cold` (K).
pub fn sinusoid_year_days(cl: &Climate, a_cold: f64) -> Vec<DayIn> {
    sinusoid_year_from(
        a_cold,
        (cl.coldest_day - 0.5 + 182.5).rem_euclid(365.0).floor(),
    )
}

/// The 365 days of a sinusoidal year from calendar day `day0` (0 = 1 January), with the colder
/// half's amplitude `a_cold` (K).
pub fn sinusoid_year_from(a_cold: f64, day0: f64) -> Vec<DayIn> {
    (0..365)
        .map(|d| {
            let cal = day0 + d as f64;
            DayIn {
                cal,
                doy: (cal as usize % 365) + 1,
                date: None,
                month: month_of(cal + 0.5),
                measured_c: None,
                cold_amplitude_k: a_cold,
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
            date: Some(dn),
            month: m as usize - 1,
            measured_c: Some(s.values[k]),
            cold_amplitude_k: 0.0,
        }
    };
    seasons(s.first_day, s.values.len())
        .into_iter()
        .map(|(y, r)| (y, r.map(day).collect()))
        .collect()
}

/// What a run simulates after its start state.
pub struct Schedule {
    /// The year repeated in the spin-up: the normal sinusoidal year, or a series' first season.
    pub spin: Vec<DayIn>,
    /// The design year run once after the spin-up, if the climate has a design winter (or the
    /// chosen season of a measured series).
    pub design: Option<Vec<DayIn>>,
    /// Every season of a measured series, run in order after the spin-up.
    pub seasons: Vec<(i64, Vec<DayIn>)>,
}

/// The schedule of the case's climate.
pub fn schedule(case: &Case) -> Schedule {
    let cl = &case.climate;
    match &cl.source {
        ClimateSource::Sinusoid => Schedule {
            spin: sinusoid_year_days(cl, cl.amplitude_k),
            design: cl
                .design_winter
                .as_ref()
                .map(|dw| sinusoid_year_days(cl, dw.amplitude_k)),
            seasons: Vec::new(),
        },
        ClimateSource::Series(s) if cl.season.is_some() => Schedule {
            // One measured season once, after the series' normal year is periodic: like a
            // design winter, it is not repeated. The normal year runs from 1 July (calendar day
            // 181), so the season starts from the ground of its own date.
            spin: sinusoid_year_from(cl.amplitude_k, 181.0),
            design: series_seasons(s)
                .into_iter()
                .find(|x| Some(x.0) == cl.season)
                .map(|x| x.1),
            seasons: Vec::new(),
        },
        ClimateSource::Series(s) => {
            let seasons = series_seasons(s);
            Schedule {
                spin: seasons.first().map(|x| x.1.clone()).unwrap_or_default(),
                design: None,
                seasons,
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn climate() -> Climate {
        Climate {
            source: ClimateSource::Sinusoid,
            design_winter: None,
            season: None,
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

    /// The normal year before a measured season runs 1 July – 30 June (days of year 182 … 181 of
    /// a common year), so the season's 1 July follows its 30 June.
    #[test]
    fn normal_year_before_a_season_ends_on_30_june() {
        let y = sinusoid_year_from(14.0, 181.0);
        assert_eq!(
            (y[0].doy, y[364].doy, y[0].month, y[364].month),
            (182, 181, 6, 5)
        );
    }

    /// A design winter's year: continuous at the mean crossings, its mean over the colder half is
    /// that of the stronger sinusoid, over the warmer half the normal one's, and its freezing
    /// index equals the sinusoid formula's for the colder half's amplitude (the sum of daily
    /// means below 0 °C, to 1 %).
    #[test]
    fn design_winter_sinusoid() {
        let cl = climate();
        let c = cl.coldest_day - 0.5;
        let q = 365.0 / 4.0;
        let a_w = 20.0;
        let cold = mean_over_with(&cl, a_w, c - q, c + q);
        let want = cl.mean_c - a_w * 2.0 / std::f64::consts::PI;
        assert!((cold - want).abs() < 1e-9, "{cold} {want}");
        let warm = mean_over_with(&cl, a_w, c + q, c + 3.0 * q);
        assert!((warm - (cl.mean_c + cl.amplitude_k * 2.0 / std::f64::consts::PI)).abs() < 1e-9);
        for t in [c + q, c - q, c + 5.0 * q] {
            assert!((mean_over_with(&cl, a_w, t, t) - cl.mean_c).abs() < 1e-9);
        }
        let days = sinusoid_year_days(&cl, a_w);
        let fi: f64 = days
            .iter()
            .map(|d| -mean_over_with(&cl, a_w, d.cal, d.cal + 1.0))
            .filter(|v| *v > 0.0)
            .sum();
        let f = crate::methods::sinusoid_freezing_index(cl.mean_c, a_w).0;
        assert!((fi - f).abs() < 0.01 * f, "{fi} {f}");
    }

    #[test]
    fn design_year_starts_on_the_warmest_day() {
        let days = sinusoid_year_days(&climate(), 14.0);
        assert_eq!(days.len(), 365);
        // Coldest at calendar time 19.5 d: the warmest half a year later, at 202.0 d, the start
        // of day of year 203.
        assert_eq!(days[0].doy, 203);
        assert_eq!(days[0].month, 6);
    }
}
