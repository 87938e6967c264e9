//! Measured air-temperature series and their statistics: reading our CSV layout (streamed, so 50
//! years of hourly data need no more memory than the daily means), the least-squares annual
//! sinusoid, freezing and thawing indices per season, and design freezing indices from a Gumbel
//! fit (L-moments or maximum likelihood) or the mean of the three coldest winters.
//!
//! # File layout
//! Lines starting with `#` are comments. The first other line is the header; it must name a
//! time column `date` (or `time`, `datetime`) holding an ISO 8601 date (`2031-01-17`) or date-time
//! (`2031-01-17T06:00`, `2031-01-17 06:00:00`), and a temperature column `temperature_c` (°C) or
//! `temperature_f` (°F, converted). Rows are in time order, one per day (daily means) or several
//! per day (hourly values, averaged to daily means). Empty cells and `NaN` are missing values.
use crate::error::{Error, Location, Result};
use std::io::BufRead;
use std::path::Path;

/// Days since 1970-01-01 of a proleptic Gregorian date (Hinnant's days-from-civil algorithm).
pub fn days_from_civil(y: i64, m: u32, d: u32) -> i64 {
    let y = if m <= 2 { y - 1 } else { y };
    let era = y.div_euclid(400);
    let yoe = y - era * 400;
    let mp = (m as i64 + 9) % 12;
    let doy = (153 * mp + 2) / 5 + d as i64 - 1;
    let doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
    era * 146_097 + doe - 719_468
}

/// (year, month, day) of a day number (inverse of [`days_from_civil`]).
pub fn civil_from_days(z: i64) -> (i64, u32, u32) {
    let z = z + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let y = yoe + era * 400;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = (doy - (153 * mp + 2) / 5 + 1) as u32;
    let m = if mp < 10 { mp + 3 } else { mp - 9 } as u32;
    (if m <= 2 { y + 1 } else { y }, m, d)
}

/// Format a day number as an ISO date.
pub fn iso_date(day: i64) -> String {
    let (y, m, d) = civil_from_days(day);
    format!("{y:04}-{m:02}-{d:02}")
}

/// Day of year (1–366) of a day number.
pub fn day_of_year(day: i64) -> u32 {
    let (y, _, _) = civil_from_days(day);
    (day - days_from_civil(y, 1, 1) + 1) as u32
}

fn parse_date(s: &str) -> Option<i64> {
    let s = s.trim();
    let date = s.split(['T', ' ']).next()?;
    let mut it = date.split('-');
    let y: i64 = it.next()?.parse().ok()?;
    let m: u32 = it.next()?.parse().ok()?;
    let d: u32 = it.next()?.parse().ok()?;
    if it.next().is_some() || !(1..=12).contains(&m) || d == 0 {
        return None;
    }
    let dim = [
        31,
        if (y % 4 == 0 && y % 100 != 0) || y % 400 == 0 {
            29
        } else {
            28
        },
        31,
        30,
        31,
        30,
        31,
        31,
        30,
        31,
        30,
        31,
    ];
    if d > dim[m as usize - 1] {
        return None;
    }
    // A time part, if any, must look like HH:MM[:SS].
    if let Some(t) = s.get(date.len() + 1..) {
        let ok = t.split(':').count() >= 2
            && t.split(':')
                .all(|p| p.trim_end_matches('Z').parse::<f64>().is_ok());
        if !ok {
            return None;
        }
    }
    Some(days_from_civil(y, m, d))
}

/// Limits applied when reading a series.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ReadOptions {
    /// Longest run of missing days filled by linear interpolation. Default 3.
    pub max_gap_days: usize,
    /// Plausible range of air temperatures, °C. Default −70 … +60.
    pub plausible_c: (f64, f64),
}

impl Default for ReadOptions {
    fn default() -> Self {
        ReadOptions {
            max_gap_days: 3,
            plausible_c: (-70.0, 60.0),
        }
    }
}

/// A gap-free series of daily mean air temperatures.
#[derive(Debug, Clone, PartialEq)]
pub struct DailySeries {
    /// Day number (days since 1970-01-01) of the first value.
    pub first_day: i64,
    /// Daily means, °C.
    pub values: Vec<f64>,
    /// Days filled by interpolation.
    pub filled_days: usize,
    /// Rows read.
    pub rows: usize,
    /// Where the data came from.
    pub source: String,
}

impl DailySeries {
    /// Day number of value k.
    pub fn day(&self, k: usize) -> i64 {
        self.first_day + k as i64
    }
}

/// Read a series file; every error names the file and line.
pub fn read_series(path: &Path, opts: &ReadOptions) -> Result<DailySeries> {
    let f = std::fs::File::open(path).map_err(|e| Error::Io {
        path: path.to_path_buf(),
        source: e,
    })?;
    read_series_from(
        std::io::BufReader::new(f),
        &path.display().to_string(),
        opts,
    )
}

/// Read a series from any reader (`name` is used in messages).
pub fn read_series_from(
    reader: impl BufRead,
    name: &str,
    opts: &ReadOptions,
) -> Result<DailySeries> {
    let err = |line: usize, key: &str, msg: String| Error::Input {
        location: Location {
            file: name.to_string(),
            line,
            column: 0,
        },
        key: key.to_string(),
        message: msg,
    };
    let mut header: Option<(usize, usize, bool)> = None; // (date col, temp col, fahrenheit)
    let mut raw: Vec<(i64, f64)> = Vec::new(); // daily means, NaN = missing
    let mut cur: Option<(i64, f64, usize, usize)> = None; // (day, sum, count, first line of the day)
    let mut last_key: Option<(String, usize)> = None;
    let mut rows = 0;
    let push_day = |raw: &mut Vec<(i64, f64)>, c: (i64, f64, usize, usize)| {
        raw.push((c.0, if c.2 > 0 { c.1 / c.2 as f64 } else { f64::NAN }));
    };
    for (k, line) in reader.lines().enumerate() {
        let lineno = k + 1;
        let line = line.map_err(|e| err(lineno, "(file)", format!("cannot read: {e}")))?;
        let t = line.trim();
        if t.is_empty() || t.starts_with('#') {
            continue;
        }
        let cells: Vec<&str> = t.split(',').map(str::trim).collect();
        let Some((dc, tc, fahr)) = header else {
            let lower: Vec<String> = cells.iter().map(|c| c.to_ascii_lowercase()).collect();
            let dc = lower
                .iter()
                .position(|c| c == "date" || c == "time" || c == "datetime");
            let tc = lower.iter().position(|c| c == "temperature_c");
            let tf = lower.iter().position(|c| c == "temperature_f");
            match (dc, tc.or(tf)) {
                (Some(d), Some(tcol)) => header = Some((d, tcol, tc.is_none())),
                _ => {
                    return Err(err(
                        lineno,
                        "(header)",
                        format!("header \"{t}\" lacks the columns; allowed: a `date` column and a `temperature_c` (or `temperature_f`) column"),
                    ))
                }
            }
            continue;
        };
        rows += 1;
        let date_s = cells.get(dc).copied().unwrap_or("");
        let day = parse_date(date_s)
            .ok_or_else(|| err(lineno, "date", format!("\"{date_s}\" is not an ISO 8601 date or date-time (e.g. 2031-01-17 or 2031-01-17T06:00)")))?;
        let key = date_s.to_string();
        if let Some((prev, pline)) = &last_key {
            // Same key twice is a duplicate; a smaller day is out of order. (Times within a day are
            // compared as text, which orders ISO 8601 times correctly.)
            if *prev == key {
                return Err(err(
                    lineno,
                    "date",
                    format!("{key} repeats line {pline}; time stamps must be unique"),
                ));
            }
            let pday = parse_date(prev).unwrap_or(day);
            if day < pday || (day == pday && key < *prev) {
                return Err(err(
                    lineno,
                    "date",
                    format!("{key} comes after {prev} (line {pline}); rows must be in time order"),
                ));
            }
        }
        last_key = Some((key, lineno));
        let vs = cells.get(tc).copied().unwrap_or("");
        let v = if vs.is_empty() || vs.eq_ignore_ascii_case("nan") {
            f64::NAN
        } else {
            let x: f64 = vs
                .parse()
                .map_err(|_| err(lineno, "temperature", format!("\"{vs}\" is not a number")))?;
            let c = if fahr { (x - 32.0) * 5.0 / 9.0 } else { x };
            if !(opts.plausible_c.0..=opts.plausible_c.1).contains(&c) {
                return Err(err(
                    lineno,
                    "temperature",
                    format!(
                        "{c:.1} °C is implausible for air; allowed: {} to {} °C",
                        opts.plausible_c.0, opts.plausible_c.1
                    ),
                ));
            }
            c
        };
        match cur {
            Some(ref mut c) if c.0 == day => {
                if v.is_finite() {
                    c.1 += v;
                    c.2 += 1;
                }
            }
            _ => {
                if let Some(c) = cur.take() {
                    push_day(&mut raw, c);
                }
                cur = Some((
                    day,
                    if v.is_finite() { v } else { 0.0 },
                    usize::from(v.is_finite()),
                    lineno,
                ));
            }
        }
    }
    if let Some(c) = cur.take() {
        push_day(&mut raw, c);
    }
    if header.is_none() {
        return Err(err(
            0,
            "(header)",
            "no header line; allowed: `date,temperature_c` then one row per day or hour".into(),
        ));
    }
    let Some(&(first, _)) = raw.first() else {
        return Err(err(0, "(data)", "no data rows".into()));
    };
    // Lay the days out on a continuous calendar; fill short gaps, refuse long ones.
    let last = raw.last().map_or(first, |r| r.0);
    let n = (last - first + 1) as usize;
    let mut values = vec![f64::NAN; n];
    for &(d, v) in &raw {
        values[(d - first) as usize] = v;
    }
    let mut filled = 0;
    let mut k = 0;
    while k < n {
        if values[k].is_finite() {
            k += 1;
            continue;
        }
        let start = k;
        while k < n && !values[k].is_finite() {
            k += 1;
        }
        let len = k - start;
        if start == 0 || k == n || len > opts.max_gap_days {
            return Err(err(
                0,
                "(gap)",
                format!(
                    "{len} missing day(s) from {} to {}; allowed: gaps of at most {} days inside the series (filled by linear interpolation)",
                    iso_date(first + start as i64),
                    iso_date(first + k as i64 - 1),
                    opts.max_gap_days
                ),
            ));
        }
        let (a, b) = (values[start - 1], values[k]);
        for (j, v) in values[start..k].iter_mut().enumerate() {
            *v = a + (b - a) * (j + 1) as f64 / (len + 1) as f64;
        }
        filled += len;
    }
    if n < 365 {
        return Err(err(
            0,
            "(length)",
            format!("{n} days of data; allowed: at least one year (365 days)"),
        ));
    }
    Ok(DailySeries {
        first_day: first,
        values,
        filled_days: filled,
        rows,
        source: name.to_string(),
    })
}

/// Freezing index of one winter.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
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
    let (y0, _, _) = civil_from_days(s.first_day);
    let (y1, _, _) = civil_from_days(s.day(s.values.len() - 1));
    (y0 - 1..=y1)
        .filter_map(|y| {
            let a = days_from_civil(y, 7, 1) - s.first_day;
            let b = days_from_civil(y + 1, 7, 1) - s.first_day;
            (a >= 0 && b as usize <= s.values.len()).then(|| WinterIndex {
                winter: y,
                value: max_rise(s.values[a as usize..b as usize].iter().map(|t| -t)),
            })
        })
        .collect()
}

/// Thawing index of every complete calendar year: the largest rise of the cumulative sum of the
/// daily mean (above 0 °C counts positive), °C·d.
pub fn thawing_indices(s: &DailySeries) -> Vec<WinterIndex> {
    let (y0, _, _) = civil_from_days(s.first_day);
    let (y1, _, _) = civil_from_days(s.day(s.values.len() - 1));
    (y0..=y1)
        .filter_map(|y| {
            let a = days_from_civil(y, 1, 1) - s.first_day;
            let b = days_from_civil(y + 1, 1, 1) - s.first_day;
            (a >= 0 && b as usize <= s.values.len()).then(|| WinterIndex {
                winter: y,
                value: max_rise(s.values[a as usize..b as usize].iter().copied()),
            })
        })
        .collect()
}

/// Least-squares annual sinusoid θ = mean − amplitude · cos(2π (d − coldest)/365.25) of the series:
/// (mean °C, amplitude K, day of year of the minimum).
pub fn annual_sinusoid(s: &DailySeries) -> (f64, f64, f64) {
    let w = 2.0 * std::f64::consts::PI / 365.25;
    let t: Vec<f64> = (0..s.values.len()).map(|k| s.day(k) as f64 + 0.5).collect();
    let (m, a, phase) = crate::analysis::fit_sinusoid(&t, &s.values, w);
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
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "snake_case")]
pub enum FitMethod {
    /// L-moments / probability-weighted moments (Hosking 1990): robust for short records.
    LMoments,
    /// Maximum likelihood.
    MaximumLikelihood,
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
                let (mut lo, mut hi) = (beta_l * 0.05, beta_l * 20.0);
                if g(lo) > 0.0 || g(hi) < 0.0 {
                    return Some(lm);
                }
                for _ in 0..200 {
                    let mid = 0.5 * (lo + hi);
                    if g(mid) > 0.0 {
                        hi = mid;
                    } else {
                        lo = mid;
                    }
                }
                let b = 0.5 * (lo + hi);
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
    let fit = Gumbel::fit(&values, method).ok_or_else(|| Error::Input {
        location: Location::file_only(&s.source),
        key: "(winters)".into(),
        message: format!(
            "{} complete winter(s) with freezing indices {:?}: a Gumbel fit needs at least 3 winters that differ",
            values.len(),
            values
        ),
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
    let (mut lo, mut hi) = (mean_c.max(0.0), mean_c.abs() + 200.0);
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if crate::methods::sinusoid_freezing_index(mean_c, mid).0 < fi {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    0.5 * (lo + hi)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn calendar_round_trip() {
        assert_eq!(days_from_civil(1970, 1, 1), 0);
        assert_eq!(days_from_civil(2000, 3, 1), 11_017);
        for z in [-1000, 0, 59, 60, 11_016, 20_000, 40_000] {
            let (y, m, d) = civil_from_days(z);
            assert_eq!(days_from_civil(y, m, d), z);
        }
        assert_eq!(day_of_year(days_from_civil(2032, 12, 31)), 366);
        assert_eq!(parse_date("2031-02-29"), None);
        assert!(parse_date("2032-02-29T06:00").is_some());
        assert_eq!(parse_date("31/01/2031"), None);
    }

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
