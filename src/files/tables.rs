//! The CSV files of a run directory: `daily.csv`, `monthly.csv`, `probes.csv`, `winters.csv` and
//! `field_<day>.csv`, each with typed rows written and read here only. Every file starts with `#`
//! lines giving the case, the caution and the coordinates; headers carry units.
use super::{bad_file, read_text};
use crate::case::Case;
use crate::error::{Error, Result};
use crate::physics::climate::{calendar::month_day, iso_date, month_of};
use crate::run::{Day, Records, RunResult, WinterResult};
use serde::{Deserialize, Deserializer};
use std::path::Path;

/// A number that may be written as an empty cell (not finite).
fn nan() -> f64 {
    f64::NAN
}

fn f64_or_nan<'de, D: Deserializer<'de>>(d: D) -> std::result::Result<f64, D::Error> {
    let s = String::deserialize(d)?;
    Ok(if s.trim().is_empty() {
        f64::NAN
    } else {
        s.trim().parse().map_err(serde::de::Error::custom)?
    })
}

/// One row of `daily.csv`: a day of the reported period.
#[derive(Debug, Clone, PartialEq, Deserialize)]
pub struct DailyRow {
    /// Day of year.
    pub day_of_year: usize,
    /// ISO 8601 date of a measured series' day, or `--MM-DD` in a sinusoidal year (no year).
    #[serde(default)]
    pub date: String,
    /// Daily mean outdoor air, °C.
    #[serde(deserialize_with = "f64_or_nan")]
    pub outdoor_temperature_c: f64,
    /// Indoor air, °C.
    #[serde(deserialize_with = "f64_or_nan")]
    pub indoor_temperature_c: f64,
    /// Whole-building daily mean ground heat loss, W.
    #[serde(deserialize_with = "f64_or_nan")]
    pub ground_heat_loss_w: f64,
    /// Frost depth in open ground, m.
    #[serde(deserialize_with = "f64_or_nan")]
    pub frost_depth_open_ground_m: f64,
    /// Frost depth just outside the footing's outer face, m.
    #[serde(deserialize_with = "f64_or_nan")]
    pub frost_depth_at_footing_face_m: f64,
    /// Deepest frost below the footing base within its width, m.
    #[serde(deserialize_with = "f64_or_nan")]
    pub frost_depth_under_footing_m: f64,
    /// Frost depth within 0.5 m outside the wall, m.
    #[serde(deserialize_with = "f64_or_nan")]
    pub frost_depth_beside_wall_m: f64,
    /// Least distance from the frost line to the footing's outer base corner, m (empty: no
    /// frost).
    #[serde(deserialize_with = "f64_or_nan")]
    pub frost_distance_to_base_corner_m: f64,
    /// Signed distance between the frozen ground and the protected zone, m.
    #[serde(deserialize_with = "f64_or_nan")]
    pub frost_margin_m: f64,
    /// Top of the frozen layer in open ground, m (empty: no frost; absent in older runs).
    #[serde(default = "nan", deserialize_with = "f64_or_nan")]
    pub frost_top_open_ground_m: f64,
    /// Top of the frozen layer just outside the footing's outer face, m.
    #[serde(default = "nan", deserialize_with = "f64_or_nan")]
    pub frost_top_at_footing_face_m: f64,
}

impl From<&DailyRow> for Day {
    fn from(r: &DailyRow) -> Day {
        Day {
            day_of_year: r.day_of_year,
            date: crate::physics::climate::calendar::parse_date(&r.date),
            outdoor_c: r.outdoor_temperature_c,
            indoor_c: r.indoor_temperature_c,
            heat_loss_w: r.ground_heat_loss_w,
            frost_open_m: r.frost_depth_open_ground_m,
            frost_top_open_m: r.frost_top_open_ground_m,
            frost_top_face_m: r.frost_top_at_footing_face_m,
            frost_face_m: r.frost_depth_at_footing_face_m,
            frost_footing_m: r.frost_depth_under_footing_m,
            frost_beside_wall_m: r.frost_depth_beside_wall_m,
            frost_corner_distance_m: r.frost_distance_to_base_corner_m,
            frost_margin_m: r.frost_margin_m,
        }
    }
}

/// One row of `monthly.csv`: a calendar month of the reported period.
#[derive(Debug, Clone, PartialEq, Deserialize)]
pub struct MonthlyRow {
    /// Month 1–12.
    pub month: usize,
    /// Ground heat loss, kWh.
    #[serde(deserialize_with = "f64_or_nan")]
    pub ground_heat_loss_kwh: f64,
    /// Mean outdoor air, °C.
    #[serde(deserialize_with = "f64_or_nan")]
    pub mean_outdoor_temperature_c: f64,
    /// Largest open-ground frost depth, m.
    #[serde(deserialize_with = "f64_or_nan")]
    pub max_frost_depth_open_ground_m: f64,
    /// Largest frost depth just outside the footing's outer face, m.
    #[serde(deserialize_with = "f64_or_nan")]
    pub max_frost_depth_at_footing_face_m: f64,
}

/// One row of `winters.csv`.
#[derive(Debug, Clone, PartialEq, Deserialize)]
pub struct WinterRow {
    /// The season, named by the year it starts.
    pub winter: i64,
    /// Air freezing index, °C·d.
    #[serde(deserialize_with = "f64_or_nan")]
    pub freezing_index_c_days: f64,
    /// Least frost margin to the protected zone, m.
    #[serde(deserialize_with = "f64_or_nan")]
    pub frost_margin_m: f64,
    /// Deepest open-ground frost, m.
    #[serde(deserialize_with = "f64_or_nan")]
    pub frost_depth_open_ground_m: f64,
}

/// Probe temperatures: column headers and series (probe-major), °C.
#[derive(Debug, Clone, PartialEq)]
pub struct Probes {
    /// Headers of the probe columns.
    pub names: Vec<String>,
    /// One series per probe.
    pub series: Vec<Vec<f64>>,
}

/// `v` with `digits` decimals, empty if not finite.
pub fn fmt(v: f64, digits: usize) -> String {
    if v.is_finite() {
        format!("{v:.digits$}")
    } else {
        String::new()
    }
}

/// A CSV file's bytes (one header row, then the rows: what `pandas.read_csv` and a spreadsheet
/// open without options) and its note (provenance and meaning), which goes to `csv_notes.json`.
#[derive(Debug, Clone)]
pub struct Csv {
    /// The file's bytes.
    pub bytes: Vec<u8>,
    /// What it holds, for `csv_notes.json`.
    pub note: String,
}

/// A CSV file: a header and rows; `note` is kept beside it.
pub fn csv_bytes(
    note: &str,
    header: &[&str],
    rows: impl Iterator<Item = Vec<String>>,
) -> Result<Csv> {
    let mut w = csv::Writer::from_writer(Vec::new());
    let enc = |e: csv::Error| Error::Output(e.to_string());
    w.write_record(header).map_err(enc)?;
    for r in rows {
        w.write_record(&r).map_err(enc)?;
    }
    let bytes = w.into_inner().map_err(|e| Error::Output(e.to_string()))?;
    Ok(Csv {
        bytes,
        note: note.to_string(),
    })
}

/// `daily.csv`.
pub fn daily(head: &str, r: &Records) -> Result<Csv> {
    csv_bytes(
        &format!("{head}\nReported period, in simulation order from the warmest day. Heat loss is the whole building's daily mean."),
        &["day_of_year", "date", "outdoor_temperature_c", "indoor_temperature_c", "ground_heat_loss_w", "frost_depth_open_ground_m", "frost_depth_at_footing_face_m", "frost_depth_under_footing_m", "frost_depth_beside_wall_m", "frost_distance_to_base_corner_m", "frost_margin_m", "frost_top_open_ground_m", "frost_top_at_footing_face_m"],
        r.days.iter().map(|d| {
            vec![d.day_of_year.to_string(), d.date.map_or_else(|| month_day(d.day_of_year), iso_date), fmt(d.outdoor_c, 3), fmt(d.indoor_c, 2), fmt(d.heat_loss_w, 2), fmt(d.frost_open_m, 4), fmt(d.frost_face_m, 4), fmt(d.frost_footing_m, 4), fmt(d.frost_beside_wall_m, 4), fmt(d.frost_corner_distance_m, 4), fmt(d.frost_margin_m, 4), fmt(d.frost_top_open_m, 4), fmt(d.frost_top_face_m, 4)]
        }),
    )
}

/// `monthly.csv`: calendar months (365-day calendar; day 366 of a leap year stays in December):
/// heat loss and outdoor temperature of the heat-loss year (the normal year when a design winter
/// was run), frost depths of the reported period.
pub fn monthly(head: &str, r: &Records) -> Result<Csv> {
    let month = |d: &Day| month_of((d.day_of_year as f64 - 0.5).min(364.5));
    let (mut kwh, mut tout, mut n) = ([0.0; 12], [0.0; 12], [0usize; 12]);
    let (mut fo, mut ff) = ([0.0f64; 12], [0.0f64; 12]);
    for d in r.heat_days() {
        let m = month(d);
        kwh[m] += d.heat_loss_w * 24.0 / 1000.0;
        tout[m] += d.outdoor_c;
        n[m] += 1;
    }
    for d in r.days {
        let m = month(d);
        fo[m] = fo[m].max(d.frost_open_m);
        ff[m] = ff[m].max(d.frost_face_m);
    }
    csv_bytes(
        &format!("{head}\nCalendar months (365-day calendar): heat loss and outdoor temperature of the heat-loss year, frost of the reported period."),
        &[
            "month",
            "ground_heat_loss_kwh",
            "mean_outdoor_temperature_c",
            "max_frost_depth_open_ground_m",
            "max_frost_depth_at_footing_face_m",
        ],
        (0..12).map(|m| {
            vec![
                (m + 1).to_string(),
                fmt(kwh[m], 2),
                fmt(tout[m] / n[m].max(1) as f64, 3),
                fmt(fo[m], 4),
                fmt(ff[m], 4),
            ]
        }),
    )
}

/// `probes.csv`.
pub fn probes(head: &str, case: &Case, r: &RunResult) -> Result<Csv> {
    let mut ph = vec!["day_of_year".to_string()];
    for p in &case.probes {
        ph.push(format!(
            "{} (x={} m z={} m) temperature_c",
            p.name, p.x_m, p.z_m
        ));
    }
    let hdr: Vec<&str> = ph.iter().map(String::as_str).collect();
    csv_bytes(
        &format!("{head}\nProbe temperatures at the end of each day of the reported year."),
        &hdr,
        r.days.iter().enumerate().map(|(k, d)| {
            let mut row = vec![d.day_of_year.to_string()];
            row.extend(r.probes.iter().map(|s| fmt(s[k], 3)));
            row
        }),
    )
}

/// `field_<day>.csv`: cell-centre temperatures of the design day, solid cells only.
pub fn field(head: &str, r: &RunResult) -> Result<Csv> {
    let g = &r.mesh.grid;
    let t = &r.field.t;
    csv_bytes(
        &format!("{head}\nCell-centre temperatures on day {} of the year (the design day: least frost margin), solid cells only.", r.field.day_of_year),
        &["x_m", "z_m", "temperature_c"],
        (0..g.nz()).flat_map(|j| (0..g.nx()).map(move |i| (i, j))).filter_map(|(i, j)| {
            let v = t[[j, i]];
            v.is_finite().then(|| vec![fmt(g.xc(i), 4), fmt(g.zc(j), 4), fmt(v, 3)])
        }),
    )
}

/// `winters.csv`.
pub fn winters(head: &str, winters: &[WinterResult]) -> Result<Csv> {
    csv_bytes(
        &format!("{head}\nEvery complete season (1 July - 30 June) of the measured series, named by the year it starts."),
        &["winter", "freezing_index_c_days", "frost_margin_m", "frost_depth_under_footing_m", "frost_depth_open_ground_m", "frost_depth_beside_wall_m", "ground_heat_loss_kwh", "energy_balance_error"],
        winters.iter().map(|w| {
            vec![w.winter.to_string(), fmt(w.freezing_index_c_days, 1), fmt(w.frost_margin_m, 4), fmt(w.frost_depth_under_footing_m, 4), fmt(w.frost_depth_open_ground_m, 4), fmt(w.frost_depth_beside_wall_m, 4), fmt(w.heat_loss_kwh, 1), format!("{:.2e}", w.energy_balance_error)]
        }),
    )
}

/// A CSV reader over `text`: one header row, then data. Leading `#` lines, which run directories
/// written before the CSVs lost their comment lines carry, are skipped (only before the header,
/// so a `#` in a data value or column name is read as it is).
fn reader(text: &str) -> csv::Reader<&[u8]> {
    let mut start = 0;
    while text[start..].starts_with('#') {
        start = text[start..]
            .find('\n')
            .map_or(text.len(), |k| start + k + 1);
    }
    csv::ReaderBuilder::new().from_reader(&text.as_bytes()[start..])
}

/// Typed rows of one of our CSV files in `dir`; an error names the file and the row.
pub fn read_rows<T: serde::de::DeserializeOwned>(dir: &Path, name: &str) -> Result<Vec<T>> {
    let text = read_text(dir, name)?;
    reader(&text)
        .deserialize()
        .enumerate()
        .map(|(k, r)| r.map_err(|e| bad_file(dir, name, format!("data row {}: {e}", k + 1))))
        .collect()
}

/// `probes.csv` of `dir`.
pub fn read_probes(dir: &Path) -> Result<Probes> {
    let name = "probes.csv";
    let text = read_text(dir, name)?;
    let mut r = reader(&text);
    let names: Vec<String> = r
        .headers()
        .map_err(|e| bad_file(dir, name, e))?
        .iter()
        .skip(1)
        .map(str::to_string)
        .collect();
    let mut series = vec![Vec::new(); names.len()];
    for (k, rec) in r.records().enumerate() {
        let rec = rec.map_err(|e| bad_file(dir, name, format!("data row {}: {e}", k + 1)))?;
        for (p, s) in series.iter_mut().enumerate() {
            s.push(
                rec.get(p + 1)
                    .and_then(|v| v.trim().parse().ok())
                    .unwrap_or(f64::NAN),
            );
        }
    }
    Ok(Probes { names, series })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A table written by `csv_bytes` reads back through `read_rows` with its comment lines
    /// skipped and an empty cell (a number that was not finite) read as NaN.
    #[test]
    fn monthly_round_trip() {
        let dir = std::env::temp_dir().join(format!("frostline-tables-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let rows = (1..=12).map(|m| {
            vec![
                m.to_string(),
                fmt(10.0 * m as f64, 2),
                fmt(if m == 3 { f64::NAN } else { -1.5 }, 3),
                fmt(0.25, 4),
                fmt(0.0, 4),
            ]
        });
        let bytes = csv_bytes(
            "case\ncaution, with a comma",
            &[
                "month",
                "ground_heat_loss_kwh",
                "mean_outdoor_temperature_c",
                "max_frost_depth_open_ground_m",
                "max_frost_depth_at_footing_face_m",
            ],
            rows,
        )
        .unwrap();
        assert!(
            bytes.bytes.starts_with(b"month,"),
            "the header is the first line"
        );
        assert_eq!(bytes.note, "case\ncaution, with a comma");
        std::fs::write(dir.join("monthly.csv"), &bytes.bytes).unwrap();
        let back: Vec<MonthlyRow> = read_rows(&dir, "monthly.csv").unwrap();
        assert_eq!(back.len(), 12);
        // A run directory of the earlier layout (leading `#` lines) still reads.
        let mut legacy = b"# case\n# caution, with a comma\n".to_vec();
        legacy.extend_from_slice(&bytes.bytes);
        std::fs::write(dir.join("monthly.csv"), legacy).unwrap();
        let old: Vec<MonthlyRow> = read_rows(&dir, "monthly.csv").unwrap();
        assert_eq!(old.len(), 12);
        assert_eq!((back[1].month, back[1].ground_heat_loss_kwh), (2, 20.0));
        assert!(back[2].mean_outdoor_temperature_c.is_nan());
        std::fs::write(
            dir.join("monthly.csv"),
            "month,ground_heat_loss_kwh\n1,abc\n",
        )
        .unwrap();
        let e = read_rows::<MonthlyRow>(&dir, "monthly.csv").unwrap_err();
        assert_eq!(
            e.input_kind(),
            Some(crate::error::InputKind::NotAResult),
            "{e}"
        );
        let _ = std::fs::remove_dir_all(&dir);
    }
}
