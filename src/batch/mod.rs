//! Batch runs: a list of cases (many sites, or variants of one design) each run like
//! `frostline run` into its own directory, with one table of their design answers
//! (`files::batch`). A batch splits into shards for an array job (case k belongs to shard
//! k mod N + 1, as the samples of an uncertainty run) and merges back to the table of the whole.
use crate::case::{load_case, Case, Fineness, ModelKind};
use crate::error::{Error, InputKind, Result};
use crate::files::batch::CaseRow;
use crate::files::us::Units;
use crate::plot::PlotOptions;
use crate::uncertainty::Shard;
use crate::{estimate, files, run};
use rayon::prelude::*;
use std::path::{Path, PathBuf};

/// Most cases in one list.
pub const MAX_CASES: usize = 100_000;

/// A list of case files: one path per line (relative to the list file), `#` comments and blank
/// lines ignored.
#[derive(Debug, Clone, PartialEq)]
pub struct CaseList {
    /// The list file.
    pub file: String,
    /// The case files as written in the list.
    pub entries: Vec<String>,
    /// The case files, resolved against the list file's directory.
    pub paths: Vec<PathBuf>,
}

/// Read the list file `path`.
pub fn read_list(path: &Path) -> Result<CaseList> {
    let text = std::fs::read_to_string(path).map_err(|e| Error::io(path, e))?;
    let base = path.parent().unwrap_or(Path::new("."));
    let file = path.display().to_string();
    let mut entries = Vec::new();
    // A byte-order mark (as some editors write) is not part of the first path.
    for (n, line) in text.trim_start_matches('\u{feff}').lines().enumerate() {
        let entry = line.split('#').next().unwrap_or("").trim();
        if entry.is_empty() {
            continue;
        }
        if !base.join(entry).is_file() {
            return Err(Error::in_file(
                &file,
                &format!("line {}", n + 1),
                InputKind::Missing,
                format!(
                    "\"{entry}\" is not a file (paths are relative to the list file); allowed: one case file per line"
                ),
            ));
        }
        entries.push(entry.to_string());
    }
    if entries.is_empty() || entries.len() > MAX_CASES {
        return Err(Error::in_file(
            &file,
            "(file)",
            InputKind::OutOfRange,
            format!(
                "{} case files listed; allowed: 1 to {MAX_CASES}, one per line",
                entries.len()
            ),
        ));
    }
    let paths = entries.iter().map(|e| base.join(e)).collect();
    Ok(CaseList {
        file,
        entries,
        paths,
    })
}

/// How the cases of a batch (or one `frostline run`) are written.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct RunInto {
    /// Units of the report and the extra US files.
    pub units: Units,
    /// Write the plots and report.html.
    pub plots: bool,
    /// Also the year's animation.
    pub animate: bool,
    /// Image resolution.
    pub dpi: Option<u32>,
}

/// Run `case` (in 2D or 3D as it says) and write its results, plots and report into `out`
/// (`files::remove_previous` first): every file written, manifest last.
pub fn run_into(
    case: &Case,
    out: &Path,
    opts: &RunInto,
    progress: &mut (dyn FnMut(run::Progress) + Send),
) -> Result<Vec<PathBuf>> {
    let cc = estimate::cross_check(case);
    let mut written = if case.simulation.model == ModelKind::ThreeD {
        let r3 = run::three::run3(case, &run::RunOptions::default(), progress)?;
        files::remove_previous(out)?;
        files::write_run3(case, &r3, &cc, out, opts.units)?
    } else {
        let r = run::run(case, progress)?;
        files::remove_previous(out)?;
        files::write_run(case, &r, &cc, out, opts.units)?
    };
    if opts.plots {
        written.extend(render(out, opts.animate, opts.dpi)?);
    }
    written.push(files::write_manifest(out, &written, false)?);
    Ok(written)
}

/// The plots and report.html of the run in `dir` (the year's animation with `animate`, images
/// at `dpi`).
pub fn render(dir: &Path, animate: bool, dpi: Option<u32>) -> Result<Vec<PathBuf>> {
    let p = PlotOptions {
        animate,
        dpi,
        ..Default::default()
    };
    let mut written = crate::plot::render_dir(dir, &p)?;
    written.push(crate::report::html::write_report(dir)?);
    Ok(written)
}

/// The directory of case `index` (0-based) within a batch's output: `cases/NNN-STEM`.
pub fn case_dir(index: usize, path: &Path) -> String {
    let stem = path
        .file_stem()
        .map_or("case".into(), |s| s.to_string_lossy().to_string());
    format!("cases/{:03}-{stem}", index + 1)
}

/// Run the cases of `shard` in parallel (rayon's pool), each into `out/cases/NNN-STEM`, on the
/// `mesh` given (else each case's own); `progress` is called after each case with the count
/// done. A case the rules refuse ("refused"), or whose run stops on its own terms ("failed"), is
/// recorded in its row, its directory cleared of an earlier run's files, and the others go on; a
/// failure to write ends the batch.
pub fn run_batch(
    list: &CaseList,
    (shard, mesh): (Shard, Option<Fineness>),
    out: &Path,
    opts: &RunInto,
    progress: &(dyn Fn(usize) + Sync),
) -> Result<Vec<CaseRow>> {
    let done = std::sync::atomic::AtomicUsize::new(0);
    let mine: Vec<usize> = (0..list.paths.len()).filter(|&i| shard.has(i)).collect();
    let rows: Vec<Result<CaseRow>> = mine
        .par_iter()
        .map(|&i| {
            let t0 = std::time::Instant::now();
            let dir = case_dir(i, &list.paths[i]);
            let mut row = CaseRow::new(i, &list.entries[i], &dir);
            let d = out.join(&dir);
            match load_case(&list.paths[i]) {
                Err(e) if e.is_input() => {
                    row.error = Some(e.to_string());
                    files::clear_run(&d)?;
                }
                Err(e) => return Err(e),
                Ok(mut case) => {
                    if let Some(m) = mesh {
                        case.simulation.mesh = m;
                    }
                    row.case_name = case.name.clone();
                    row.model = match case.simulation.model {
                        ModelKind::ThreeD => "3d",
                        ModelKind::TwoD => "2d",
                    }
                    .into();
                    std::fs::create_dir_all(&d).map_err(|e| Error::io(&d, e))?;
                    match run_into(&case, &d, opts, &mut |_| {}) {
                        // A run that stops on its own terms (e.g. frost at the domain's bottom).
                        Err(e) if e.is_input() => {
                            row.status = "failed".into();
                            row.error = Some(e.to_string());
                            files::clear_run(&d)?;
                        }
                        Err(e) => return Err(e),
                        Ok(_) => row.fill(&files::read_summary(&d)?),
                    }
                }
            }
            row.run_s = t0.elapsed().as_secs_f64();
            progress(done.fetch_add(1, std::sync::atomic::Ordering::SeqCst) + 1);
            Ok(row)
        })
        .collect();
    rows.into_iter().collect()
}
