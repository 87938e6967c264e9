//! The files of `frostline uncertainty` (and of `frostline merge`): `samples.csv` (every sample's
//! inputs and results, numbers in full precision so that they read back exactly) and
//! `uncertainty.json` (the design, the shard, the statistics).
use super::{bad_file, write_atomic, CAUTION};
use crate::case::{Case, Distribution, UncertainInput, Uncertainty};
use crate::error::{Error, Result};
use crate::uncertainty::{SampleResult, Shard, Stats};
use serde::{Deserialize, Serialize};
use std::path::{Path, PathBuf};

/// The result columns of `samples.csv`, after `sample` and the inputs' keys.
pub const RESULT_COLUMNS: [&str; 9] = [
    "frost_margin_m",
    "frost_depth_under_footing_m",
    "frost_depth_at_footing_face_m",
    "annual_heat_loss_kwh",
    "peak_heat_loss_w",
    "frost_in_zone",
    "periodic",
    "run_s",
    "refused_because",
];

/// Contents of `uncertainty.json`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct UncertaintyFile {
    /// Case name.
    pub case_name: String,
    /// The caution every report carries.
    pub caution: String,
    /// The case file.
    pub case_file: String,
    /// The sampling design: count, seed, inputs and their distributions.
    pub design: Uncertainty,
    /// Mesh the samples ran on.
    pub mesh: String,
    /// The shard this directory holds (1 of 1: the whole run, or a merge of all shards).
    pub shard: Shard,
    /// The statistics of this directory's samples.
    pub stats: Stats,
    /// What the statistics mean.
    pub notes: Vec<String>,
    /// Median wall time of one sample, s.
    pub median_sample_s: f64,
    /// Wall time of the whole command, s.
    pub wall_time_s: f64,
    /// Worker threads.
    pub threads: usize,
    /// Units of the printed summary, report.html and plots (this file and samples.csv stay SI).
    #[serde(default)]
    pub units: super::us::Units,
}

/// What the statistics mean (printed and saved), for the sampled inputs `design`.
pub fn notes(design: &Uncertainty) -> Vec<String> {
    let seasons = design
        .inputs
        .iter()
        .any(|i| matches!(i.distribution, Distribution::Seasons { .. }));
    vec![
        "Samples: Latin hypercube (McKay, Beckman & Conover 1979) of the [uncertainty] inputs, SplitMix64 random numbers from the seed; each sample is the case with the sampled values, run like `frostline run`.".into(),
        "Percentiles: linear between order statistics (Hyndman & Fan 1996, definition 7).".into(),
        "P(frost in the protected zone) = samples with a negative frost margin / samples run, with the 95 % Wilson score interval (for independent draws: conservative for a Latin hypercube).".into(),
        if seasons {
            "Sensitivity: Spearman rank correlation of each input with the frost margin (negative: more of the input, less margin) and with the annual heat loss; a season is ranked by its air freezing index.".into()
        } else {
            "Sensitivity: Spearman rank correlation of each input with the frost margin (negative: more of the input, less margin) and with the annual heat loss.".into()
        },
        if seasons {
            "The spread covers the sampled inputs' variation under this model, the climate's as the measured seasons (each run once after the series' normal year, so a run of cold winters is not in it); model error and other inputs are not in it.".into()
        } else {
            "The spread covers only the sampled inputs' variation under this model; model error, other inputs and the climate's own variability are not in it.".into()
        },
    ]
}

/// A number in full precision (Rust's shortest representation that reads back exactly); empty
/// for NaN.
pub(crate) fn exact(v: f64) -> String {
    if v.is_finite() {
        format!("{v}")
    } else {
        String::new()
    }
}

/// `samples.csv` of `samples` (in index order).
pub fn samples_csv(inputs: &[UncertainInput], samples: &[SampleResult]) -> Result<Vec<u8>> {
    let mut w = csv::Writer::from_writer(Vec::new());
    let enc = |e: csv::Error| Error::Output(e.to_string());
    let mut head = vec!["sample".to_string()];
    head.extend(inputs.iter().map(|i| i.key.clone()));
    head.extend(RESULT_COLUMNS.iter().map(|s| s.to_string()));
    w.write_record(&head).map_err(enc)?;
    let mut s: Vec<&SampleResult> = samples.iter().collect();
    s.sort_by_key(|r| r.index);
    for r in s {
        let mut row = vec![r.index.to_string()];
        row.extend(r.values.iter().map(|&v| exact(v)));
        row.extend([
            exact(r.frost_margin_m),
            exact(r.frost_depth_under_footing_m),
            exact(r.frost_depth_at_footing_face_m),
            exact(r.annual_heat_loss_kwh),
            exact(r.peak_heat_loss_w),
            r.frost_in_zone().map_or(String::new(), |b| b.to_string()),
            r.periodic.map_or(String::new(), |b| b.to_string()),
            format!("{:.3}", r.run_s),
            r.error.clone().unwrap_or_default(),
        ]);
        w.write_record(&row).map_err(enc)?;
    }
    w.into_inner().map_err(|e| Error::Output(e.to_string()))
}

/// Read `samples.csv` of `dir` for the inputs `inputs`.
pub fn read_samples(dir: &Path, inputs: &[UncertainInput]) -> Result<Vec<SampleResult>> {
    let path = dir.join("samples.csv");
    let mut r = csv::Reader::from_path(&path).map_err(|e| bad_file(dir, "samples.csv", e))?;
    let head: Vec<String> = r
        .headers()
        .map_err(|e| bad_file(dir, "samples.csv", e))?
        .iter()
        .map(str::to_string)
        .collect();
    let d = inputs.len();
    let want: Vec<String> = std::iter::once("sample".to_string())
        .chain(inputs.iter().map(|i| i.key.clone()))
        .chain(RESULT_COLUMNS.iter().map(|s| s.to_string()))
        .collect();
    if head != want {
        return Err(bad_file(
            dir,
            "samples.csv",
            format!("columns {head:?}; allowed: {want:?} (the inputs of uncertainty.json)"),
        ));
    }
    let num = |s: &str| -> Result<f64> {
        if s.is_empty() {
            Ok(f64::NAN)
        } else {
            s.parse()
                .map_err(|_| bad_file(dir, "samples.csv", format!("\"{s}\" is not a number")))
        }
    };
    let mut out = Vec::new();
    for rec in r.records() {
        let rec = rec.map_err(|e| bad_file(dir, "samples.csv", e))?;
        let f: Vec<&str> = rec.iter().collect();
        let index = f[0]
            .parse()
            .map_err(|_| bad_file(dir, "samples.csv", format!("sample \"{}\"", f[0])))?;
        let values = f[1..=d]
            .iter()
            .map(|s| num(s))
            .collect::<Result<Vec<f64>>>()?;
        let g = &f[d + 1..];
        out.push(SampleResult {
            index,
            values,
            frost_margin_m: num(g[0])?,
            frost_depth_under_footing_m: num(g[1])?,
            frost_depth_at_footing_face_m: num(g[2])?,
            annual_heat_loss_kwh: num(g[3])?,
            peak_heat_loss_w: num(g[4])?,
            periodic: match g[6] {
                "" => None,
                "true" => Some(true),
                "false" => Some(false),
                other => {
                    return Err(bad_file(
                        dir,
                        "samples.csv",
                        format!("periodic \"{other}\"; allowed: true, false or empty"),
                    ))
                }
            },
            run_s: num(g[7])?,
            error: (!g[8].is_empty()).then(|| g[8].to_string()),
        });
    }
    Ok(out)
}

/// Read `uncertainty.json` of `dir`.
pub fn read_file(dir: &Path) -> Result<UncertaintyFile> {
    let text = std::fs::read_to_string(dir.join("uncertainty.json"))
        .map_err(|e| Error::io(dir.join("uncertainty.json"), e))?;
    serde_json::from_str(&text).map_err(|e| bad_file(dir, "uncertainty.json", e))
}

/// Write `samples.csv` and `uncertainty.json` into `dir`.
pub fn write(dir: &Path, f: &UncertaintyFile, samples: &[SampleResult]) -> Result<Vec<PathBuf>> {
    let csv = samples_csv(&f.design.inputs, samples)?;
    let json = serde_json::to_string_pretty(f).map_err(|e| Error::Output(e.to_string()))?;
    Ok(vec![
        write_atomic(dir, "samples.csv", &csv)?,
        write_atomic(dir, "uncertainty.json", format!("{json}\n").as_bytes())?,
    ])
}

/// Median wall time of the samples that ran, s (0 when none ran).
pub fn median_run_s(samples: &[SampleResult]) -> f64 {
    let mut t: Vec<f64> = samples
        .iter()
        .filter(|s| s.error.is_none())
        .map(|s| s.run_s)
        .collect();
    t.sort_by(f64::total_cmp);
    t.get(t.len() / 2).copied().unwrap_or(0.0)
}

/// The file of a run of `case`'s samples.
pub fn new_file(
    case: &Case,
    shard: Shard,
    samples: &[SampleResult],
    (mesh, wall_time_s, threads): (&str, f64, usize),
) -> Option<UncertaintyFile> {
    let design = case.uncertainty.clone()?;
    Some(UncertaintyFile {
        notes: notes(&design),
        case_name: case.name.clone(),
        caution: CAUTION.into(),
        case_file: case.file.clone(),
        stats: Stats::of(samples, &design.inputs),
        design,
        mesh: mesh.into(),
        shard,
        median_sample_s: median_run_s(samples),
        wall_time_s,
        threads,
        units: super::us::Units::Si,
    })
}
