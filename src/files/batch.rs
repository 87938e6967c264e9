//! A batch's files: `batch.csv` (one row per case: its design answers, exact numbers) and
//! `batch.json` (the list, shard, mesh and counts), written and read here only.
use super::uncertainty::exact;
use super::{bad_file, write_atomic, Summary, CAUTION};
use crate::error::{Error, Result};
use crate::uncertainty::Shard;
use serde::{Deserialize, Serialize};
use std::path::{Path, PathBuf};

/// One case of a batch: what it gave (a 3D case: its whole-building headline, the least margin
/// anywhere round the building; its status also counts the 2D section's checks, as
/// `frostline run` does), or why it did not run.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CaseRow {
    /// The case's number in the list, 1-based (its directory's number).
    pub case: usize,
    /// The case file as written in the list.
    pub case_file: String,
    /// The case's name.
    pub case_name: String,
    /// "2d" or "3d" (empty: not read).
    pub model: String,
    /// Its output directory, relative to the batch's.
    pub dir: String,
    /// "ok"; or what it did not meet ("frost in zone", "not periodic"), or "refused" / "failed".
    pub status: String,
    /// Frost margin to the protected zone, m.
    pub frost_margin_m: f64,
    /// Frost depth below the footing's bearing level, m.
    pub frost_depth_under_footing_m: f64,
    /// Frost depth at the footing's outer face, m.
    pub frost_depth_at_footing_face_m: f64,
    /// Frost depth in open ground, m.
    pub frost_depth_open_ground_m: f64,
    /// Annual ground heat loss, kWh.
    pub annual_heat_loss_kwh: f64,
    /// Peak (daily mean) ground heat loss, W.
    pub peak_heat_loss_w: f64,
    /// Ground U-value with the junction, H_g/A, W/(m²·K) (NaN: not given, e.g. an unheated
    /// building).
    pub ground_u_value_w_per_m2k: f64,
    /// Wall time, s.
    pub run_s: f64,
    /// Why it did not run, if so.
    pub error: Option<String>,
}

/// The columns of `batch.csv`.
pub const COLUMNS: [&str; 15] = [
    "case",
    "case_file",
    "case_name",
    "model",
    "dir",
    "status",
    "frost_margin_m",
    "frost_depth_under_footing_m",
    "frost_depth_at_footing_face_m",
    "frost_depth_open_ground_m",
    "annual_heat_loss_kwh",
    "peak_heat_loss_w",
    "ground_u_value_w_per_m2k",
    "run_s",
    "error",
];

impl CaseRow {
    /// The row of case `index` (0-based), not yet run.
    pub fn new(index: usize, case_file: &str, dir: &str) -> Self {
        CaseRow {
            case: index + 1,
            case_file: case_file.into(),
            case_name: String::new(),
            model: String::new(),
            dir: dir.into(),
            status: "refused".into(),
            frost_margin_m: f64::NAN,
            frost_depth_under_footing_m: f64::NAN,
            frost_depth_at_footing_face_m: f64::NAN,
            frost_depth_open_ground_m: f64::NAN,
            annual_heat_loss_kwh: f64::NAN,
            peak_heat_loss_w: f64::NAN,
            ground_u_value_w_per_m2k: f64::NAN,
            run_s: 0.0,
            error: None,
        }
    }

    /// Fill the results from the case's summary.json (a 3D run's whole-building headline; its
    /// status, as `frostline run` judges a 3D run, counts the 2D section's checks too).
    pub fn fill(&mut self, s: &Summary) {
        let h3 = s.three_d.as_ref().map(|t| &t.headline);
        self.frost_margin_m = h3.map_or(s.frost_margin_m, |h| h.frost_margin_m);
        self.frost_depth_under_footing_m = h3.map_or(s.frost_depth_under_footing_m, |h| {
            h.frost_depth_under_footing_m
        });
        self.frost_depth_at_footing_face_m = h3.map_or(s.frost_depth_at_footing_face_m, |h| {
            h.frost_depth_at_footing_face_m
        });
        self.frost_depth_open_ground_m =
            h3.map_or(s.frost_depth_open_ground_m, |h| h.frost_depth_open_ground_m);
        self.annual_heat_loss_kwh = h3.map_or(s.annual_heat_loss_kwh, |h| h.annual_heat_loss_kwh);
        self.peak_heat_loss_w = h3.map_or(s.peak_heat_loss_w, |h| h.peak_heat_loss_w);
        self.ground_u_value_w_per_m2k = h3
            .map_or(s.ground_u_value_incl_junction_w_per_m2k, |h| {
                h.ground_u_value_incl_junction_w_per_m2k
            })
            .unwrap_or(f64::NAN);
        let frost_in_zone =
            s.frost_in_protected_zone || h3.is_some_and(|h| h.frost_in_protected_zone);
        let periodic =
            s.spin_up_converged && s.three_d.as_ref().is_none_or(|t| t.spin_up_converged);
        let mut unmet = Vec::new();
        if frost_in_zone {
            unmet.push("frost in zone");
        }
        if !periodic {
            unmet.push("not periodic");
        }
        self.status = if unmet.is_empty() {
            "ok".into()
        } else {
            unmet.join("; ")
        };
    }
}

/// `batch.json`: the batch as run.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct BatchFile {
    /// Results are estimates: the caution every output carries.
    pub caution: String,
    /// The list file.
    pub list_file: String,
    /// The case files as listed.
    pub cases: Vec<String>,
    /// Mesh fineness of the command line, if it overrode the cases'.
    pub mesh: Option<String>,
    /// The shard this directory holds (1 of 1: the whole batch, or a merge of all shards).
    pub shard: Shard,
    /// Cases run in this directory.
    pub cases_run: usize,
    /// Of those, cases that met every criterion (status "ok").
    pub cases_ok: usize,
    /// Cases refused by the case rules or failed in their run.
    pub cases_not_run: usize,
    /// Wall time of the command, s.
    pub wall_time_s: f64,
    /// Worker threads.
    pub threads: usize,
    /// Units of the printed table and of each case's report (this file and batch.csv stay SI).
    #[serde(default)]
    pub units: super::us::Units,
}

impl BatchFile {
    /// The file of `rows` of a batch over `cases`.
    pub fn new(
        list_file: &str,
        cases: &[String],
        (mesh, shard): (Option<String>, Shard),
        rows: &[CaseRow],
        (wall_time_s, threads): (f64, usize),
    ) -> Self {
        let not_run = rows.iter().filter(|r| r.error.is_some()).count();
        BatchFile {
            caution: CAUTION.into(),
            list_file: list_file.into(),
            cases: cases.to_vec(),
            mesh,
            shard,
            cases_run: rows.len() - not_run,
            cases_ok: rows.iter().filter(|r| r.status == "ok").count(),
            cases_not_run: not_run,
            wall_time_s,
            threads,
            units: super::us::Units::Si,
        }
    }
}

/// `batch.csv` of `rows` (in case order).
pub fn batch_csv(rows: &[CaseRow]) -> Result<Vec<u8>> {
    let mut w = csv::Writer::from_writer(Vec::new());
    let enc = |e: csv::Error| Error::Output(e.to_string());
    w.write_record(COLUMNS).map_err(enc)?;
    let mut rows: Vec<&CaseRow> = rows.iter().collect();
    rows.sort_by_key(|r| r.case);
    for r in rows {
        w.write_record([
            r.case.to_string(),
            r.case_file.clone(),
            r.case_name.clone(),
            r.model.clone(),
            r.dir.clone(),
            r.status.clone(),
            exact(r.frost_margin_m),
            exact(r.frost_depth_under_footing_m),
            exact(r.frost_depth_at_footing_face_m),
            exact(r.frost_depth_open_ground_m),
            exact(r.annual_heat_loss_kwh),
            exact(r.peak_heat_loss_w),
            exact(r.ground_u_value_w_per_m2k),
            format!("{:.3}", r.run_s),
            r.error.clone().unwrap_or_default(),
        ])
        .map_err(enc)?;
    }
    w.into_inner().map_err(|e| Error::Output(e.to_string()))
}

/// Read `batch.csv` of `dir`.
pub fn read_rows(dir: &Path) -> Result<Vec<CaseRow>> {
    let name = "batch.csv";
    let mut r = csv::Reader::from_path(dir.join(name)).map_err(|e| bad_file(dir, name, e))?;
    let head: Vec<String> = r
        .headers()
        .map_err(|e| bad_file(dir, name, e))?
        .iter()
        .map(str::to_string)
        .collect();
    if head != COLUMNS {
        return Err(bad_file(
            dir,
            name,
            format!("columns {head:?}; allowed: {COLUMNS:?}"),
        ));
    }
    let num = |s: &str| -> Result<f64> {
        if s.is_empty() {
            Ok(f64::NAN)
        } else {
            s.parse()
                .map_err(|_| bad_file(dir, name, format!("\"{s}\" is not a number")))
        }
    };
    let mut out = Vec::new();
    for rec in r.records() {
        let rec = rec.map_err(|e| bad_file(dir, name, e))?;
        let f: Vec<&str> = rec.iter().collect();
        out.push(CaseRow {
            case: f[0]
                .parse()
                .map_err(|_| bad_file(dir, name, format!("case \"{}\"", f[0])))?,
            case_file: f[1].into(),
            case_name: f[2].into(),
            model: f[3].into(),
            dir: f[4].into(),
            status: f[5].into(),
            frost_margin_m: num(f[6])?,
            frost_depth_under_footing_m: num(f[7])?,
            frost_depth_at_footing_face_m: num(f[8])?,
            frost_depth_open_ground_m: num(f[9])?,
            annual_heat_loss_kwh: num(f[10])?,
            peak_heat_loss_w: num(f[11])?,
            ground_u_value_w_per_m2k: num(f[12])?,
            run_s: num(f[13])?,
            error: (!f[14].is_empty()).then(|| f[14].to_string()),
        });
    }
    Ok(out)
}

/// Read `batch.json` of `dir`.
pub fn read_file(dir: &Path) -> Result<BatchFile> {
    let text = std::fs::read_to_string(dir.join("batch.json"))
        .map_err(|e| Error::io(dir.join("batch.json"), e))?;
    serde_json::from_str(&text).map_err(|e| bad_file(dir, "batch.json", e))
}

/// Write `batch.csv` and `batch.json` into `dir`.
pub fn write(dir: &Path, f: &BatchFile, rows: &[CaseRow]) -> Result<Vec<PathBuf>> {
    let json = serde_json::to_string_pretty(f).map_err(|e| Error::Output(e.to_string()))?;
    Ok(vec![
        write_atomic(dir, "batch.csv", &batch_csv(rows)?)?,
        write_atomic(dir, "batch.json", format!("{json}\n").as_bytes())?,
    ])
}
