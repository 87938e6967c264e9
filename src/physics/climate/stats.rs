//! Statistics of a daily series: freezing and thawing indices per season, the least-squares
//! annual sinusoid, and design freezing indices from a Gumbel fit (L-moments or maximum
//! likelihood) or the mean of the three coldest winters; the design-year amplitude for a freezing
//! index.
use super::calendar::{calendar_years, day_of_year, iso_date, seasons};
use super::series::DailySeries;
use crate::error::{Error, InputKind, Result};
use crate::numerics::{bisect_root, fit_sinusoid};

/// Freezing index of one winter.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct WinterIndex {
    /// The winter, named by the year it starts (the season runs 1 July – 30 June).
    pub winter: i64,
    /// Freezing index, °C·d: the largest rise of the cumulative sum of (0 °C − daily mean) over the
    /// season (ISO 13793 Annex A definition; an early freeze fully thawed again is not counted).
    pub value: f64,
}

/// Largest rise max_{j ≥ i} (S_j − S_i) of the cumulative sum S of `x` (with S before the first
/// element = 0).
pub fn max_rise(x: impl Iterator<Item = f64>) -> f64 {
    let (mut s, mut lo, mut best) = (0.0f64, 0.0f64, 0.0f64);
    for v in x {
        s += v;
        best = best.max(s - lo);
        lo = lo.min(s);
    }
    best
}

/// Freezing index of every complete winter (1 July – 30 June) of the series.
pub fn freezing_indices(s: &DailySeries) -> Vec<WinterIndex> {
    seasons(s.first_day, s.values.len())
        .into_iter()
        .map(|(y, r)| WinterIndex {
            winter: y,
            value: max_rise(s.values[r].iter().map(|t| -t)),
        })
        .collect()
}

/// Freezing index of the season starting 1 July of `year`, °C·d (None: not a complete season of
/// the series).
pub fn season_freezing_index(s: &DailySeries, year: i64) -> Option<f64> {
    freezing_indices(s)
        .into_iter()
        .find(|w| w.winter == year)
        .map(|w| w.value)
}

/// Thawing index of every complete calendar year: the largest rise of the cumulative sum of the
/// daily mean (above 0 °C counts positive), °C·d.
pub fn thawing_indices(s: &DailySeries) -> Vec<WinterIndex> {
    calendar_years(s.first_day, s.values.len())
        .into_iter()
        .map(|(y, r)| WinterIndex {
            winter: y,
            value: max_rise(s.values[r].iter().copied()),
        })
        .collect()
}

/// Least-squares annual sinusoid θ = mean − amplitude · cos(2π (d − coldest)/365.25) of the series:
/// (mean °C, amplitude K, day of year of the minimum).
pub fn annual_sinusoid(s: &DailySeries) -> (f64, f64, f64) {
    let w = 2.0 * std::f64::consts::PI / 365.25;
    let t: Vec<f64> = (0..s.values.len()).map(|k| s.day(k) as f64 + 0.5).collect();
    let (m, a, phase) = fit_sinusoid(&t, &s.values, w);
    // v = m + A cos(w t − φ): the maximum at t = φ/w, the minimum half a period later. Day
    // number t covers [t, t + 1); its day of year is counted from 1 at the start of 1 January.
    let period = 365.25;
    let first = s.first_day as f64;
    let t_min = first + (phase / w + 0.5 * period - first).rem_euclid(period);
    let day = t_min.floor() as i64;
    let doy = day_of_year(day) as f64 + (t_min - day as f64) - 0.5;
    (m, a, doy.clamp(1.0, 366.0))
}

/// Euler–Mascheroni constant.
const EULER_GAMMA: f64 = 0.577_215_664_901_532_9;

/// Fitting method for the Gumbel distribution.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum FitMethod {
    /// L-moments / probability-weighted moments (Hosking 1990): robust for short records.
    LMoments,
    /// Maximum likelihood.
    MaximumLikelihood,
}

impl FitMethod {
    /// The method in words, for printed output.
    pub fn label(self) -> &'static str {
        match self {
            FitMethod::LMoments => "L-moments",
            FitMethod::MaximumLikelihood => "maximum likelihood",
        }
    }
}

/// A fitted Gumbel (extreme value type I) distribution F(x) = exp(−exp(−(x − μ)/β)).
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Gumbel {
    /// Location μ.
    pub location: f64,
    /// Scale β (> 0).
    pub scale: f64,
    /// How it was fitted.
    pub method: FitMethod,
}

impl Gumbel {
    /// Fit to a sample (at least 3 values, not all equal).
    pub fn fit(x: &[f64], method: FitMethod) -> Option<Self> {
        let n = x.len();
        if n < 3 {
            return None;
        }
        let mut s = x.to_vec();
        s.sort_by(f64::total_cmp);
        let b0 = s.iter().sum::<f64>() / n as f64;
        let b1 = s
            .iter()
            .enumerate()
            .map(|(i, v)| i as f64 / (n - 1) as f64 * v)
            .sum::<f64>()
            / n as f64;
        let l2 = 2.0 * b1 - b0;
        if l2.is_nan() || l2 <= 0.0 {
            return None;
        }
        let beta_l = l2 / std::f64::consts::LN_2;
        let lm = Gumbel {
            location: b0 - EULER_GAMMA * beta_l,
            scale: beta_l,
            method: FitMethod::LMoments,
        };
        match method {
            FitMethod::LMoments => Some(lm),
            FitMethod::MaximumLikelihood => {
                // β solves g(β) = β − x̄ + Σ x e^{−x/β} / Σ e^{−x/β} = 0 (exponents shifted by
                // max x for stability); g is increasing near the root: bisection on a bracket.
                let xmax = s[n - 1];
                let g = |b: f64| {
                    let (mut num, mut den) = (0.0, 0.0);
                    for &v in &s {
                        let e = (-(v - xmax) / b).exp();
                        num += v * e;
                        den += e;
                    }
                    b - b0 + num / den
                };
                let (lo, hi) = (beta_l * 0.05, beta_l * 20.0);
                if g(lo) > 0.0 || g(hi) < 0.0 {
                    return Some(lm);
                }
                let b = bisect_root(g, lo, hi, 0.0);
                let sum: f64 = s.iter().map(|v| (-(v - xmax) / b).exp()).sum();
                let mu = xmax - b * (sum / n as f64).ln();
                Some(Gumbel {
                    location: mu,
                    scale: b,
                    method,
                })
            }
        }
    }

    /// F(x).
    pub fn cdf(&self, x: f64) -> f64 {
        (-(-(x - self.location) / self.scale).exp()).exp()
    }

    /// The value exceeded on average once in `t` years: F⁻¹(1 − 1/T) = μ − β ln(−ln(1 − 1/T)).
    pub fn return_level(&self, t: f64) -> f64 {
        self.location - self.scale * (-(1.0 - 1.0 / t).ln()).ln()
    }

    /// Kolmogorov–Smirnov statistic D of a sample against the fit, and its asymptotic p-value
    /// (optimistic when the parameters were fitted to the same sample).
    pub fn ks(&self, x: &[f64]) -> (f64, f64) {
        let mut s = x.to_vec();
        s.sort_by(f64::total_cmp);
        let n = s.len() as f64;
        let d = s
            .iter()
            .enumerate()
            .map(|(i, &v)| {
                let f = self.cdf(v);
                (f - i as f64 / n).abs().max(((i + 1) as f64 / n - f).abs())
            })
            .fold(0.0, f64::max);
        let lam = (n.sqrt() + 0.12 + 0.11 / n.sqrt()) * d;
        let mut p = 0.0;
        for k in 1..=100 {
            let term = 2.0 * (-1.0f64).powi(k - 1) * (-2.0 * (k as f64).powi(2) * lam * lam).exp();
            p += term;
            if term.abs() < 1e-12 {
                break;
            }
        }
        (d, p.clamp(0.0, 1.0))
    }
}

/// Everything `frostline climate` reports.
#[derive(Debug, Clone, serde::Serialize)]
pub struct ClimateSummary {
    /// Source file.
    pub source: String,
    /// First date.
    pub first_date: String,
    /// Last date.
    pub last_date: String,
    /// Whole years covered (days / 365.25).
    pub years: f64,
    /// Days filled by interpolation.
    pub filled_days: usize,
    /// Mean annual temperature, °C.
    pub mean_annual_temperature_c: f64,
    /// Amplitude of the least-squares annual sinusoid, K.
    pub annual_amplitude_k: f64,
    /// Day of year of its minimum.
    pub coldest_day_of_year: f64,
    /// Freezing index of each complete winter.
    pub freezing_index_by_winter_c_days: Vec<WinterIndex>,
    /// Thawing index of each complete calendar year.
    pub thawing_index_by_year_c_days: Vec<WinterIndex>,
    /// Design freezing index for the return period, °C·d.
    pub design_freezing_index_c_days: f64,
    /// Return period, years.
    pub return_period_years: f64,
    /// Fit method.
    pub fit_method: FitMethod,
    /// Gumbel location, °C·d.
    pub gumbel_location_c_days: f64,
    /// Gumbel scale, °C·d.
    pub gumbel_scale_c_days: f64,
    /// Kolmogorov–Smirnov D of the winters against the fit.
    pub ks_statistic: f64,
    /// Its asymptotic p-value (optimistic: parameters fitted to the same data).
    pub ks_p_value: f64,
    /// Mean freezing index of the three coldest winters, °C·d.
    pub mean_of_three_coldest_c_days: f64,
    /// Largest single-winter freezing index, °C·d.
    pub max_freezing_index_c_days: f64,
}

/// Statistics of a series with a Gumbel design freezing index for `return_period` years.
pub fn summarize(s: &DailySeries, return_period: f64, method: FitMethod) -> Result<ClimateSummary> {
    let fi = freezing_indices(s);
    let ti = thawing_indices(s);
    let values: Vec<f64> = fi.iter().map(|w| w.value).collect();
    let fit = Gumbel::fit(&values, method).ok_or_else(|| {
        Error::in_file(&s.source, "(winters)", InputKind::OutOfRange, format!(
            "{} complete winter(s) with freezing indices {:?}: a Gumbel fit needs at least 3 winters that differ",
            values.len(),
            values
        ))
    })?;
    let (ks, p) = fit.ks(&values);
    let mut sorted = values.clone();
    sorted.sort_by(|a, b| b.total_cmp(a));
    let top3 = sorted.iter().take(3).sum::<f64>() / sorted.len().min(3) as f64;
    let (mean, amp, coldest) = annual_sinusoid(s);
    Ok(ClimateSummary {
        source: s.source.clone(),
        first_date: iso_date(s.first_day),
        last_date: iso_date(s.day(s.values.len() - 1)),
        years: s.values.len() as f64 / 365.25,
        filled_days: s.filled_days,
        mean_annual_temperature_c: mean,
        annual_amplitude_k: amp,
        coldest_day_of_year: coldest,
        freezing_index_by_winter_c_days: fi,
        thawing_index_by_year_c_days: ti,
        design_freezing_index_c_days: fit.return_level(return_period).max(0.0),
        return_period_years: return_period,
        fit_method: method,
        gumbel_location_c_days: fit.location,
        gumbel_scale_c_days: fit.scale,
        ks_statistic: ks,
        ks_p_value: p,
        mean_of_three_coldest_c_days: top3,
        max_freezing_index_c_days: sorted.first().copied().unwrap_or(0.0),
    })
}

/// The amplitude A (K) of the design-year sinusoid θ = mean − A cos(…) whose air freezing index is
/// `fi` °C·d: F(A) = (P/π)(A sin θ₀ − θ_m θ₀), θ₀ = arccos(θ_m/A), increasing in A; bisection.
pub fn amplitude_for_freezing_index(mean_c: f64, fi: f64) -> f64 {
    if fi <= 0.0 {
        return mean_c.max(0.0);
    }
    bisect_root(
        |a| crate::methods::sinusoid_freezing_index(mean_c, a).0 - fi,
        mean_c.max(0.0),
        mean_c.abs() + 200.0,
        0.0,
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn max_rise_discards_a_thawed_early_freeze() {
        // 5 days at −2 (10 °C·d), a thaw back to zero, then 10 days at −3 (30 °C·d).
        let x: Vec<f64> = [vec![2.0; 5], vec![-2.0; 5], vec![3.0; 10]].concat();
        assert!((max_rise(x.into_iter()) - 30.0).abs() < 1e-12);
        // A partial thaw keeps the early freeze: 10 − 4 + 30 = 36.
        let y: Vec<f64> = [vec![2.0; 5], vec![-1.0; 4], vec![3.0; 10]].concat();
        assert!((max_rise(y.into_iter()) - 36.0).abs() < 1e-12);
    }

    #[test]
    fn design_amplitude_check_values() {
        // Inverse of the design-year sinusoid (methods notes §4.4, derived): θ_m 6, F 1000 →
        // A 16.959; θ_m 3, F 40 000 K·h → A 18.818.
        assert!((amplitude_for_freezing_index(6.0, 1000.0) - 16.959).abs() < 2e-3);
        assert!((amplitude_for_freezing_index(3.0, 40_000.0 / 24.0) - 18.818).abs() < 2e-3);
    }
}
