//! Measured air-temperature series: reading our CSV layout (streamed, so 50 years of hourly data
//! need no more memory than the daily means) into a gap-free series of daily means.
//!
//! # File layout
//! Lines starting with `#` are comments. The first other line is the header; it must name a
//! time column `date` (or `time`, `datetime`) holding an ISO 8601 date (`2031-01-17`) or date-time
//! (`2031-01-17T06:00`, `2031-01-17 06:00:00`), and a temperature column `temperature_c` (°C) or
//! `temperature_f` (°F, converted). Rows are in time order, one per day (daily means) or several
//! per day (hourly values, averaged to daily means). Empty cells and `NaN` are missing values.
use super::calendar::{iso_date, parse_date};
use crate::error::{Error, InputKind, Location, Result};
use std::io::BufRead;
use std::path::Path;

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

/// The longest calendar span a series may cover, days (200 years).
pub const MAX_SPAN_DAYS: i64 = 200 * 366;

/// The largest series file read, bytes (200 years of hourly rows is about 100 MB).
pub const MAX_FILE_BYTES: u64 = 256 * 1024 * 1024;

/// Read a series file (at most [`MAX_FILE_BYTES`]: an endless or huge file is refused, not read
/// to exhaustion); every error names the file and line.
pub fn read_series(path: &Path, opts: &ReadOptions) -> Result<DailySeries> {
    use std::io::Read;
    let name = path.display().to_string();
    let f = std::fs::File::open(path).map_err(|e| Error::Io {
        path: path.to_path_buf(),
        source: e,
    })?;
    let mut bytes = Vec::new();
    f.take(MAX_FILE_BYTES + 1)
        .read_to_end(&mut bytes)
        .map_err(|e| Error::Io {
            path: path.to_path_buf(),
            source: e,
        })?;
    if bytes.len() as u64 > MAX_FILE_BYTES {
        return Err(err(
            &name,
            0,
            "(file)",
            InputKind::OutOfRange,
            format!(
                "larger than {} MB; allowed: a daily or hourly series of at most 200 years",
                MAX_FILE_BYTES / (1024 * 1024)
            ),
        ));
    }
    read_series_from(std::io::Cursor::new(bytes), &name, opts)
}

/// Column positions of the header: (date column, temperature column, temperatures in °F).
type Header = (usize, usize, bool);

/// Reading state: the daily means so far and the day being accumulated.
#[derive(Default)]
struct Reader {
    /// Daily means so far (day number, °C; NaN = missing).
    days: Vec<(i64, f64)>,
    /// The day being accumulated: (day number, sum, count).
    cur: Option<(i64, f64, usize)>,
    /// The last time stamp and its line.
    last_key: Option<(String, usize)>,
    /// Data rows read.
    rows: usize,
}

impl Reader {
    /// Add one value (NaN: missing) to day `day`.
    fn add(&mut self, day: i64, v: f64) {
        match self.cur {
            Some(ref mut c) if c.0 == day => {
                if v.is_finite() {
                    c.1 += v;
                    c.2 += 1;
                }
            }
            _ => {
                self.close_day();
                let ok = v.is_finite();
                self.cur = Some((day, if ok { v } else { 0.0 }, usize::from(ok)));
            }
        }
    }

    fn close_day(&mut self) {
        if let Some((d, sum, n)) = self.cur.take() {
            self.days
                .push((d, if n > 0 { sum / n as f64 } else { f64::NAN }));
        }
    }
}

/// An error on line `line` (0: the file as a whole) of series `name`.
fn err(name: &str, line: usize, key: &str, kind: InputKind, msg: String) -> Error {
    Error::input(
        Location {
            file: name.to_string(),
            line,
            column: 0,
        },
        key,
        kind,
        msg,
    )
}

/// The header's column positions, or an error naming what is missing.
fn parse_header(name: &str, lineno: usize, cells: &[&str], line: &str) -> Result<Header> {
    let lower: Vec<String> = cells.iter().map(|c| c.to_ascii_lowercase()).collect();
    let dc = lower
        .iter()
        .position(|c| c == "date" || c == "time" || c == "datetime");
    let tc = lower.iter().position(|c| c == "temperature_c");
    let tf = lower.iter().position(|c| c == "temperature_f");
    match (dc, tc.or(tf)) {
        (Some(d), Some(tcol)) => Ok((d, tcol, tc.is_none())),
        _ => Err(err(
            name,
            lineno,
            "(header)",
            InputKind::Missing,
            format!("header \"{line}\" lacks the columns; allowed: a `date` column and a `temperature_c` (or `temperature_f`) column"),
        )),
    }
}

/// One data row: its day number and temperature (°C, NaN when missing), after the order checks.
fn parse_row(
    name: &str,
    lineno: usize,
    cells: &[&str],
    (dc, tc, fahr): Header,
    rd: &mut Reader,
    opts: &ReadOptions,
) -> Result<(i64, f64)> {
    let date_s = cells.get(dc).copied().unwrap_or("");
    let day = parse_date(date_s).ok_or_else(|| {
        err(name, lineno, "date", InputKind::Syntax, format!("\"{date_s}\" is not an ISO 8601 date or date-time (e.g. 2031-01-17 or 2031-01-17T06:00)"))
    })?;
    let key = date_s.to_string();
    if let Some((prev, pline)) = &rd.last_key {
        // Same key twice is a duplicate; a smaller day is out of order. (Times within a day are
        // compared as text, which orders ISO 8601 times correctly.)
        if *prev == key {
            return Err(err(
                name,
                lineno,
                "date",
                InputKind::Conflict,
                format!("{key} repeats line {pline}; time stamps must be unique"),
            ));
        }
        let pday = parse_date(prev).unwrap_or(day);
        if day < pday || (day == pday && key < *prev) {
            return Err(err(
                name,
                lineno,
                "date",
                InputKind::Conflict,
                format!("{key} comes after {prev} (line {pline}); rows must be in time order"),
            ));
        }
    }
    rd.last_key = Some((key, lineno));
    let vs = cells.get(tc).copied().unwrap_or("");
    if vs.is_empty() || vs.eq_ignore_ascii_case("nan") {
        return Ok((day, f64::NAN));
    }
    let x: f64 = vs.parse().map_err(|_| {
        err(
            name,
            lineno,
            "temperature",
            InputKind::Syntax,
            format!("\"{vs}\" is not a number"),
        )
    })?;
    let c = if fahr { (x - 32.0) * 5.0 / 9.0 } else { x };
    if !(opts.plausible_c.0..=opts.plausible_c.1).contains(&c) {
        return Err(err(
            name,
            lineno,
            "temperature",
            InputKind::OutOfRange,
            format!(
                "{c:.1} °C is implausible for air; allowed: {} to {} °C",
                opts.plausible_c.0, opts.plausible_c.1
            ),
        ));
    }
    Ok((day, c))
}

/// Read a series from any reader (`name` is used in messages).
pub fn read_series_from(
    reader: impl BufRead,
    name: &str,
    opts: &ReadOptions,
) -> Result<DailySeries> {
    let mut header: Option<Header> = None;
    let mut rd = Reader::default();
    for (k, line) in reader.lines().enumerate() {
        let lineno = k + 1;
        let line = line.map_err(|e| {
            err(
                name,
                lineno,
                "(file)",
                InputKind::Unreadable,
                format!("cannot read: {e}"),
            )
        })?;
        let t = line.trim();
        if t.is_empty() || t.starts_with('#') {
            continue;
        }
        let cells: Vec<&str> = t.split(',').map(str::trim).collect();
        let Some(h) = header else {
            header = Some(parse_header(name, lineno, &cells, t)?);
            continue;
        };
        rd.rows += 1;
        let (day, v) = parse_row(name, lineno, &cells, h, &mut rd, opts)?;
        rd.add(day, v);
    }
    rd.close_day();
    if header.is_none() {
        return Err(err(
            name,
            0,
            "(header)",
            InputKind::Missing,
            "no header line; allowed: `date,temperature_c` then one row per day or hour".into(),
        ));
    }
    lay_out(name, &rd.days, rd.rows, opts)
}

/// Lay the daily means out on a continuous calendar; fill short gaps by linear interpolation,
/// refuse long ones and series shorter than a year.
fn lay_out(name: &str, raw: &[(i64, f64)], rows: usize, opts: &ReadOptions) -> Result<DailySeries> {
    let Some(&(first, _)) = raw.first() else {
        return Err(err(
            name,
            0,
            "(data)",
            InputKind::Missing,
            "no data rows".into(),
        ));
    };
    let last = raw.last().map_or(first, |r| r.0);
    // The calendar span is bounded before anything is laid out (memory follows the span).
    if last - first + 1 > MAX_SPAN_DAYS {
        return Err(err(
            name,
            0,
            "(data)",
            InputKind::OutOfRange,
            format!(
                "the dates span {} days; allowed: at most {MAX_SPAN_DAYS} days (200 years)",
                last - first + 1
            ),
        ));
    }
    let n = (last - first + 1) as usize;
    let mut values = vec![f64::NAN; n];
    for &(d, v) in raw {
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
                name,
                0,
                "(gap)",
                InputKind::Missing,
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
            name,
            0,
            "(length)",
            InputKind::OutOfRange,
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
