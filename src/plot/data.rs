//! The saved results of a run, read back for plotting: `section.json` (grid and construction
//! outlines), `fields.i16` (the temperature field of every day of the reported year), and the
//! daily, monthly and probe CSV files.
use crate::error::{Error, Result};
use crate::simulate::Day;
use std::path::Path;

/// Marker for "no value" (air cells) in `fields.i16`.
pub const NO_VALUE: i16 = i16::MIN;

/// One outlined construction piece.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct PartOutline {
    /// Label (slab, wall, footing, fill, insulation[k]).
    pub label: String,
    /// Kind (concrete, fill, insulation).
    pub kind: String,
    /// Left x, m.
    pub x0: f64,
    /// Right x, m.
    pub x1: f64,
    /// Top z, m.
    pub z0: f64,
    /// Bottom z, m.
    pub z1: f64,
}

/// Contents of `section.json`.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct SectionFile {
    /// Case name.
    pub case_name: String,
    /// Coordinate convention.
    pub coordinates: String,
    /// Grid x edges, m.
    pub xe: Vec<f64>,
    /// Grid z edges, m.
    pub ze: Vec<f64>,
    /// Construction outlines.
    pub parts: Vec<PartOutline>,
    /// Footing base depth, m.
    pub footing_base_depth_m: f64,
    /// Footing x range, m.
    pub footing_x_m: (f64, f64),
    /// Frost-line temperature, °C.
    pub frost_line_c: f64,
    /// Day of year of the deepest frost (the default field day).
    pub field_day_of_year: usize,
    /// Days stored in `fields.i16` (in `daily.csv` order).
    pub days: usize,
    /// Layout of `fields.i16`.
    pub fields_format: String,
}

/// Everything a plot needs.
#[derive(Debug, Clone)]
pub struct PlotData {
    /// Case name.
    pub case_name: String,
    /// Grid x edges, m.
    pub xe: Vec<f64>,
    /// Grid z edges, m.
    pub ze: Vec<f64>,
    /// Construction outlines.
    pub parts: Vec<PartOutline>,
    /// Footing base depth, m.
    pub footing_base_depth_m: f64,
    /// Footing x range, m.
    pub footing_x: (f64, f64),
    /// Frost-line temperature, °C.
    pub frost_line_c: f64,
    /// Days of the reported year.
    pub days: Vec<Day>,
    /// Monthly rows: (month, heat loss kWh, mean outdoor °C, max frost open m, max frost footing m).
    pub monthly: Vec<(usize, f64, f64, f64, f64)>,
    /// Probe column headers.
    pub probe_names: Vec<String>,
    /// Probe series (probe-major), °C.
    pub probes: Vec<Vec<f64>>,
    /// Fields of every day, day-major, °C (NaN for air).
    pub fields: Vec<f64>,
    /// Index (into `days`) of the default field day.
    pub field_day_index: usize,
}

fn read(dir: &Path, name: &str) -> Result<String> {
    let p = dir.join(name);
    std::fs::read_to_string(&p).map_err(|e| Error::Io { path: p, source: e })
}

fn bad(dir: &Path, name: &str, what: impl std::fmt::Display) -> Error {
    Error::Input {
        location: crate::error::Location::file_only(&dir.join(name).display().to_string()),
        key: "(file)".into(),
        message: format!("not a frostline result file: {what}"),
    }
}

/// Data rows of one of our CSV files (comment lines and the header skipped).
fn rows(text: &str) -> (Vec<String>, Vec<Vec<String>>) {
    let body: String = text
        .lines()
        .filter(|l| !l.starts_with('#'))
        .map(|l| format!("{l}\n"))
        .collect();
    let mut r = csv::ReaderBuilder::new()
        .has_headers(true)
        .from_reader(body.as_bytes());
    let header = r
        .headers()
        .map(|h| h.iter().map(str::to_string).collect())
        .unwrap_or_default();
    let data = r
        .records()
        .filter_map(|x| x.ok())
        .map(|x| x.iter().map(str::to_string).collect())
        .collect();
    (header, data)
}

fn num(s: &str) -> f64 {
    s.parse().unwrap_or(f64::NAN)
}

impl PlotData {
    /// Read a finished run's directory.
    pub fn load(dir: &Path) -> Result<Self> {
        let sec: SectionFile = serde_json::from_str(&read(dir, "section.json")?)
            .map_err(|e| bad(dir, "section.json", e))?;
        let (_, daily) = rows(&read(dir, "daily.csv")?);
        let days: Vec<Day> = daily
            .iter()
            .map(|r| Day {
                day_of_year: r[0].parse().unwrap_or(0),
                outdoor_c: num(&r[1]),
                indoor_c: num(&r[2]),
                heat_loss_w: num(&r[3]),
                frost_open_m: num(&r[4]),
                frost_footing_m: num(&r[5]),
                frost_beside_wall_m: r.get(6).map_or(f64::NAN, |v| num(v)),
            })
            .collect();
        let (_, monthly) = rows(&read(dir, "monthly.csv")?);
        let monthly = monthly
            .iter()
            .map(|r| {
                (
                    r[0].parse().unwrap_or(0),
                    num(&r[1]),
                    num(&r[2]),
                    num(&r[3]),
                    num(&r[4]),
                )
            })
            .collect();
        let (ph, prow) = rows(&read(dir, "probes.csv")?);
        let probe_names: Vec<String> = ph.into_iter().skip(1).collect();
        let probes = (0..probe_names.len())
            .map(|k| prow.iter().map(|r| num(&r[k + 1])).collect())
            .collect();
        let cells = (sec.xe.len() - 1) * (sec.ze.len() - 1);
        let p = dir.join("fields.i16");
        let bytes = std::fs::read(&p).map_err(|e| Error::Io { path: p, source: e })?;
        if bytes.len() != 2 * cells * sec.days || days.len() != sec.days {
            return Err(bad(
                dir,
                "fields.i16",
                format!(
                    "size {} B does not match {} days × {cells} cells",
                    bytes.len(),
                    sec.days
                ),
            ));
        }
        let fields = bytes
            .chunks_exact(2)
            .map(|b| {
                let v = i16::from_le_bytes([b[0], b[1]]);
                if v == NO_VALUE {
                    f64::NAN
                } else {
                    v as f64 / 100.0
                }
            })
            .collect();
        let field_day_index = days
            .iter()
            .position(|d| d.day_of_year == sec.field_day_of_year)
            .unwrap_or(0);
        Ok(PlotData {
            case_name: sec.case_name,
            xe: sec.xe,
            ze: sec.ze,
            parts: sec.parts,
            footing_base_depth_m: sec.footing_base_depth_m,
            footing_x: sec.footing_x_m,
            frost_line_c: sec.frost_line_c,
            days,
            monthly,
            probe_names,
            probes,
            fields,
            field_day_index,
        })
    }

    /// The field of day index `k` (row-major grid cells), °C.
    pub fn field(&self, k: usize) -> &[f64] {
        let n = (self.xe.len() - 1) * (self.ze.len() - 1);
        &self.fields[k * n..(k + 1) * n]
    }

    /// Index of day of year `doy` in the saved days.
    pub fn day_index(&self, doy: usize) -> Option<usize> {
        self.days.iter().position(|d| d.day_of_year == doy)
    }
}

/// Encode grid fields (°C, NaN = air) as little-endian i16 hundredths of a kelvin.
pub fn encode_fields(fields: &[Vec<f32>]) -> Vec<u8> {
    let mut out = Vec::with_capacity(fields.iter().map(|f| 2 * f.len()).sum());
    for f in fields {
        for &t in f {
            let v = if t.is_finite() {
                (t as f64 * 100.0).round().clamp(-32767.0, 32767.0) as i16
            } else {
                NO_VALUE
            };
            out.extend_from_slice(&v.to_le_bytes());
        }
    }
    out
}
