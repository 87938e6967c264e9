//! The run directory: every file a run or a sizing writes, with typed structs written and read
//! here only ([`summary`], [`tables`], [`section`], [`sizing`]). Every file is written under a
//! temporary name in the same directory and renamed, so a failed run never leaves a half-written
//! file.
pub mod batch;
pub mod section;
pub mod sizing;
pub mod summary;
pub mod tables;
pub mod three;
pub mod uncertainty;
pub mod us;

pub use section::{read_fields, read_section, PlotEntry, PlotIndex, SectionFile, NO_VALUE};
pub use sizing::{SizingFile, SIZING_CAUTION};
pub use summary::{Summary, CAUTION, COORDINATES};

use crate::case::Case;
use crate::design::SizingResult;
use crate::error::{Error, InputKind, Result};
use crate::estimate::CrossCheck;
use crate::run::RunResult;
use std::path::{Path, PathBuf};

/// A temporary name beside `dir/name` unique to this process and call (`.name.PID.N.tmp`), so
/// two runs into one directory never share one and a planted file or link cannot be predicted.
/// Images keep their extension last (`.name.PID.N.tmp.png`): the plotting library chooses the
/// format by it.
pub fn temp_path(dir: &Path, name: &str) -> PathBuf {
    static N: std::sync::atomic::AtomicU64 = std::sync::atomic::AtomicU64::new(0);
    let n = N.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
    let pid = std::process::id();
    match name.rsplit_once('.') {
        Some((stem, ext)) if ["png", "svg", "gif"].contains(&ext) => {
            dir.join(format!(".{stem}.{pid}.{n}.tmp.{ext}"))
        }
        _ => dir.join(format!(".{name}.{pid}.{n}.tmp")),
    }
}

/// Name of the lock file a writing command holds in its output directory.
pub const LOCK_FILE: &str = ".frostline.lock";

/// Create `dir` if missing, take its lock and check that a file can be created in it, before a
/// long solve (a read-only or full directory, or another frostline process writing into it, is
/// found in milliseconds, not after the run). The lock (an advisory `flock` on
/// `dir/.frostline.lock`) is held while the returned file is open; the system releases it when
/// the process ends, however it ends, so a killed run leaves no stale lock.
pub fn check_writable(dir: &Path) -> Result<std::fs::File> {
    create_dir(dir)?;
    let probe = temp_path(dir, "write-check");
    std::fs::OpenOptions::new()
        .write(true)
        .create_new(true)
        .open(&probe)
        .map_err(|e| Error::io(dir, e))?;
    let _ = std::fs::remove_file(&probe);
    let path = dir.join(LOCK_FILE);
    if std::fs::symlink_metadata(&path).is_ok_and(|m| !m.is_file()) {
        return Err(Error::io(
            &path,
            std::io::Error::other("not a regular file (a link?); remove it"),
        ));
    }
    let lock = std::fs::OpenOptions::new()
        .write(true)
        .create(true)
        .truncate(false)
        .open(&path)
        .map_err(|e| Error::io(&path, e))?;
    match lock.try_lock() {
        Ok(()) => {
            remove_stale_temporaries(dir);
            Ok(lock)
        }
        Err(std::fs::TryLockError::WouldBlock) => Err(Error::io(
            dir,
            std::io::Error::new(
                std::io::ErrorKind::WouldBlock,
                "another frostline process is writing into this directory; wait for it to \
                 finish or choose another output directory",
            ),
        )),
        Err(std::fs::TryLockError::Error(e)) => Err(Error::io(&path, e)),
    }
}

/// Whether `name` is one of our temporary names (`.NAME.PID.N.tmp`, images `.STEM.PID.N.tmp.EXT`).
fn is_temporary(name: &str) -> bool {
    let Some(rest) = name.strip_prefix('.') else {
        return false;
    };
    let rest = ["png", "svg", "gif"]
        .iter()
        .find_map(|e| rest.strip_suffix(&format!(".tmp.{e}")))
        .or_else(|| rest.strip_suffix(".tmp"));
    let mut parts = rest.map(|r| r.rsplitn(3, '.')).into_iter().flatten();
    let (n, pid, stem) = (parts.next(), parts.next(), parts.next());
    let digits =
        |s: Option<&str>| s.is_some_and(|s| !s.is_empty() && s.bytes().all(|b| b.is_ascii_digit()));
    digits(n) && digits(pid) && stem.is_some_and(|s| !s.is_empty())
}

/// Remove temporaries left in `dir` by a process that was killed before it could rename or
/// remove them. Called with the directory's lock held, so no other frostline process is writing
/// there; only names of our temporary pattern are touched.
fn remove_stale_temporaries(dir: &Path) {
    let Ok(entries) = std::fs::read_dir(dir) else {
        return;
    };
    for e in entries.flatten() {
        let name = e.file_name();
        let is_file = e.file_type().is_ok_and(|t| t.is_file() || t.is_symlink());
        if is_file && name.to_str().is_some_and(is_temporary) {
            let _ = std::fs::remove_file(e.path());
        }
    }
}

/// Move the finished temporary `tmp` to `dir/name` (removing `tmp` if that fails).
pub fn finish_temp(tmp: &Path, dir: &Path, name: &str) -> Result<PathBuf> {
    let path = dir.join(name);
    std::fs::rename(tmp, &path).map_err(|e| {
        let _ = std::fs::remove_file(tmp);
        Error::io(&path, e)
    })?;
    Ok(path)
}

/// Write `bytes` to `dir/name` through a new temporary file (created exclusively: an existing
/// file or link of that name is never followed or overwritten) and a rename.
pub fn write_atomic(dir: &Path, name: &str, bytes: &[u8]) -> Result<PathBuf> {
    use std::io::Write;
    let path = dir.join(name);
    let tmp = temp_path(dir, name);
    let written = std::fs::OpenOptions::new()
        .write(true)
        .create_new(true)
        .open(&tmp)
        .and_then(|mut f| f.write_all(bytes).and_then(|_| f.sync_data()));
    if let Err(e) = written {
        let _ = std::fs::remove_file(&tmp);
        return Err(Error::io(&path, e));
    }
    finish_temp(&tmp, dir, name)
}

/// `csv_notes.json`: what each CSV of a run directory holds, with the case, the caution and the
/// coordinates, so the CSV files themselves are one header row and data (what `pandas.read_csv`
/// and a spreadsheet open without options).
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct CsvNotes {
    /// Case name.
    pub case_name: String,
    /// The caution every result carries.
    pub caution: String,
    /// Coordinate conventions of the files.
    pub coordinates: String,
    /// Per file: what it holds.
    pub files: std::collections::BTreeMap<String, String>,
}

impl CsvNotes {
    fn new(case: &Case, coordinates: &str) -> Self {
        CsvNotes {
            case_name: case.name.clone(),
            caution: CAUTION.into(),
            coordinates: coordinates.into(),
            files: Default::default(),
        }
    }
}

/// Write a CSV into `dir/name` and its note (without the shared head lines) into `notes`.
pub fn write_csv(
    dir: &Path,
    name: &str,
    csv: tables::Csv,
    notes: &mut CsvNotes,
) -> Result<PathBuf> {
    let note: Vec<&str> = csv
        .note
        .lines()
        .filter(|l| *l != notes.case_name && *l != notes.caution && !l.starts_with("Coordinates: "))
        .collect();
    notes.files.insert(name.to_string(), note.join(" "));
    write_atomic(dir, name, &csv.bytes)
}

/// `manifest.json`: the files frostline wrote into a run directory, so a later run into the same
/// directory removes exactly its own earlier files (and never a file it did not write).
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Manifest {
    /// The tool and version that wrote the files.
    pub written_by: String,
    /// File names (in the directory, no paths).
    pub files: Vec<String>,
}

const MANIFEST: &str = "manifest.json";

/// A plain file name (no separator, not `.` or `..`).
fn plain_name(n: &str) -> bool {
    !n.is_empty() && n != "." && n != ".." && !n.contains(['/', '\\'])
}

/// The manifest of `dir`, if any (a damaged one counts as none: nothing is removed on its word).
pub fn read_manifest(dir: &Path) -> Option<Manifest> {
    let text = std::fs::read_to_string(dir.join(MANIFEST)).ok()?;
    serde_json::from_str(&text).ok()
}

/// Remove the files an earlier run recorded in `dir`'s manifest (regular files only, by plain
/// name; links and directories are left alone); returns their names. Called once the new results
/// exist, just before they are written.
pub fn remove_previous(dir: &Path) -> Result<Vec<String>> {
    let Some(m) = read_manifest(dir) else {
        return Ok(Vec::new());
    };
    let mut removed = Vec::new();
    for name in m.files.iter().filter(|n| plain_name(n) && *n != MANIFEST) {
        let p = dir.join(name);
        if std::fs::symlink_metadata(&p).is_ok_and(|md| md.file_type().is_file()) {
            std::fs::remove_file(&p).map_err(|e| Error::io(&p, e))?;
            removed.push(name.clone());
        }
    }
    Ok(removed)
}

/// Remove an earlier run's files from `dir` (as [`remove_previous`]) and its manifest: a case
/// that did not run this time leaves no results of the last time behind.
pub fn clear_run(dir: &Path) -> Result<()> {
    remove_previous(dir)?;
    let m = dir.join(MANIFEST);
    if std::fs::symlink_metadata(&m).is_ok_and(|md| md.file_type().is_file()) {
        std::fs::remove_file(&m).map_err(|e| Error::io(&m, e))?;
    }
    Ok(())
}

/// Record `written` (paths in `dir`) in `dir`'s manifest, with the names already there when
/// `append` (a re-plot adds to its run's files).
pub fn write_manifest(dir: &Path, written: &[PathBuf], append: bool) -> Result<PathBuf> {
    let mut files: Vec<String> = if append {
        read_manifest(dir).map(|m| m.files).unwrap_or_default()
    } else {
        Vec::new()
    };
    for p in written {
        if let Some(n) = p.file_name().map(|s| s.to_string_lossy().to_string()) {
            if plain_name(&n) && n != MANIFEST && !files.contains(&n) {
                files.push(n);
            }
        }
    }
    let m = Manifest {
        written_by: format!("frostline {}", env!("CARGO_PKG_VERSION")),
        files,
    };
    write_json(dir, MANIFEST, &m)
}

/// Serialise `v` as pretty JSON into `dir/name`.
pub fn write_json<T: serde::Serialize>(dir: &Path, name: &str, v: &T) -> Result<PathBuf> {
    let bytes = serde_json::to_vec_pretty(v).map_err(|e| Error::Output(e.to_string()))?;
    write_atomic(dir, name, &bytes)
}

/// Create `dir` if missing.
pub fn create_dir(dir: &Path) -> Result<()> {
    std::fs::create_dir_all(dir).map_err(|e| Error::io(dir, e))
}

/// The text of `dir/name`.
pub fn read_text(dir: &Path, name: &str) -> Result<String> {
    let p = dir.join(name);
    std::fs::read_to_string(&p).map_err(|e| Error::io(&p, e))
}

/// `dir/name` is not a file frostline wrote (or it is damaged).
pub fn bad_file(dir: &Path, name: &str, what: impl std::fmt::Display) -> Error {
    Error::in_file(
        &dir.join(name).display().to_string(),
        "(file)",
        InputKind::NotAResult,
        format!("not a frostline result file: {what}"),
    )
}

/// The copy of the case in `dir` (`case.toml`), checked against the hash in its summary: the
/// report shows the case as run, so an edited or truncated copy is refused.
pub fn read_case_copy(dir: &Path, s: &Summary) -> Result<String> {
    let text = read_text(dir, "case.toml")?;
    match &s.provenance {
        Some(p) if summary::sha256_hex(text.as_bytes()) != p.case_sha256 => Err(bad_file(
            dir,
            "case.toml",
            "its SHA-256 differs from the case hash in summary.json (edited or truncated since \
             the run)",
        )),
        _ => Ok(text),
    }
}

/// `summary.json` of `dir`.
pub fn read_summary(dir: &Path) -> Result<Summary> {
    let name = "summary.json";
    serde_json::from_str(&read_text(dir, name)?).map_err(|e| bad_file(dir, name, e))
}

/// `three_d.json` of `dir`, if the run was 3D; checked for consistent lengths.
pub fn read_three_d(dir: &Path) -> Result<Option<three::ThreeDFile>> {
    let name = "three_d.json";
    if !dir.join(name).exists() {
        return Ok(None);
    }
    let f: three::ThreeDFile =
        serde_json::from_str(&read_text(dir, name)?).map_err(|e| bad_file(dir, name, e))?;
    let increasing = |e: &[f64]| e.len() >= 2 && e.windows(2).all(|w| w[1] > w[0]);
    if !increasing(&f.xe) || !increasing(&f.ye) {
        return Err(bad_file(dir, name, "plan edges xe, ye must increase"));
    }
    if f.plan_frost_m.len() != (f.xe.len() - 1) * (f.ye.len() - 1) {
        return Err(bad_file(
            dir,
            name,
            "plan_frost_m must hold one value per plan cell",
        ));
    }
    for s in &f.slices {
        let n = (s.xe.len().max(1) - 1) * (s.ze.len().max(1) - 1);
        if !increasing(&s.xe) || !increasing(&s.ze) || s.t.len() != n || s.frost.len() != n {
            return Err(bad_file(
                dir,
                name,
                format!("slice '{}' is inconsistent", s.title),
            ));
        }
    }
    Ok(Some(f))
}

/// `sizing.json` of `dir`, if there is one.
pub fn read_sizing(dir: &Path) -> Result<Option<SizingFile>> {
    let name = "sizing.json";
    if !dir.join(name).exists() {
        return Ok(None);
    }
    serde_json::from_str(&read_text(dir, name)?)
        .map(Some)
        .map_err(|e| bad_file(dir, name, e))
}

/// Write every result file of a run of `case` (with its cross-checks `cc`) into `dir` (created
/// if missing); returns the paths.
pub fn write_run(
    case: &Case,
    r: &RunResult,
    cc: &CrossCheck,
    dir: &Path,
    units: us::Units,
) -> Result<Vec<PathBuf>> {
    let mut s = Summary::new(case, r, cc);
    s.units = units;
    let (mut files, notes) = write_run_summary(case, r, dir, s)?;
    files.push(write_json(dir, "csv_notes.json", &notes)?);
    files.extend(write_us(dir, &files, units)?);
    Ok(files)
}

/// With US units: `summary_us.json` and a `NAME_us.csv` beside each CSV file of `files` (keys
/// and columns renamed to US units, values converted; [`us`]).
fn write_us(dir: &Path, files: &[PathBuf], units: us::Units) -> Result<Vec<PathBuf>> {
    if units == us::Units::Si {
        return Ok(Vec::new());
    }
    let mut out = Vec::new();
    let summary: serde_json::Value = serde_json::from_str(&read_text(dir, "summary.json")?)
        .map_err(|e| bad_file(dir, "summary.json", e))?;
    out.push(write_json(dir, "summary_us.json", &us::json(&summary))?);
    for f in files {
        let Some(name) = f.file_name().and_then(|n| n.to_str()) else {
            continue;
        };
        if let Some(stem) = name.strip_suffix(".csv") {
            let text = read_text(dir, name)?;
            out.push(write_atomic(
                dir,
                &format!("{stem}_us.csv"),
                us::csv(&text)?.as_bytes(),
            )?);
        }
    }
    Ok(out)
}

/// Write every result file of a 3D run: the 2D section's files (the equivalent strip, its
/// `summary.json` with the `three_d` block) and the 3D files ([`three::write_3d`]).
pub fn write_run3(
    case: &Case,
    r: &crate::run::three::Run3Result,
    cc: &CrossCheck,
    dir: &Path,
    units: us::Units,
) -> Result<Vec<PathBuf>> {
    let mut s = Summary::new(case, &r.two, cc);
    s.units = units;
    s.three_d = Some(three::Summary3::new(case, r));
    let (mut files, mut notes) = write_run_summary(case, &r.two, dir, s)?;
    notes.coordinates += " 3D files: plan X along the length and Y along the width from the building's centre; section x outward from the wall's exterior face.";
    let head = format!("{}\n{CAUTION}\n3D model: whole-building heat loss; frost columns are the worst along the perimeter.", case.name);
    files.extend(three::write_3d(case, r, dir, (&head, &mut notes))?);
    files.push(write_json(dir, "csv_notes.json", &notes)?);
    files.extend(write_us(dir, &files, units)?);
    Ok(files)
}

/// [`write_run`] with the summary `s`.
fn write_run_summary(
    case: &Case,
    r: &RunResult,
    dir: &Path,
    s: Summary,
) -> Result<(Vec<PathBuf>, CsvNotes)> {
    create_dir(dir)?;
    let head = format!("{}\n{CAUTION}\nCoordinates: {COORDINATES}.", case.name);
    let mut notes = CsvNotes::new(case, &format!("{COORDINATES}."));
    let n = &mut notes;
    let mut files = vec![
        write_json(dir, "summary.json", &s)?,
        write_atomic(dir, "case.toml", case.source.as_bytes())?,
        write_csv(dir, "daily.csv", tables::daily(&head, &r.records())?, n)?,
        write_csv(dir, "monthly.csv", tables::monthly(&head, &r.records())?, n)?,
        write_csv(dir, "probes.csv", tables::probes(&head, case, r)?, n)?,
        write_csv(
            dir,
            &format!("field_{:03}.csv", r.field.day_of_year),
            tables::field(&head, r)?,
            n,
        )?,
    ];
    if !r.winters.is_empty() {
        files.push(write_csv(
            dir,
            "winters.csv",
            tables::winters(&head, &r.winters)?,
            n,
        )?);
    }
    files.push(write_json(dir, "section.json", &SectionFile::new(case, r))?);
    files.push(write_atomic(
        dir,
        "fields.i16",
        &section::encode_fields(r.daily_fields.view()),
    )?);
    Ok((files, notes))
}

/// Write `sizing.json`, `sizing.csv` and (if a design was chosen) `chosen_case.toml` into `dir`.
pub fn write_sizing(case: &Case, r: &SizingResult, dir: &Path) -> Result<Vec<PathBuf>> {
    create_dir(dir)?;
    let f = SizingFile::new(case, r);
    let mut files = vec![
        write_json(dir, "sizing.json", &f)?,
        write_atomic(dir, "sizing.csv", sizing::sizing_csv(&f).as_bytes())?,
    ];
    let chosen = match r.corner.as_ref().and_then(|c| c.chosen_run.as_ref()) {
        Some((c, _)) => Some(c),
        None => r.chosen_run.as_ref().map(|x| &x.0),
    };
    if let Some(chosen) = chosen {
        files.push(write_atomic(
            dir,
            "chosen_case.toml",
            chosen.source.as_bytes(),
        )?);
    }
    Ok(files)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The names `temp_path` makes are recognised as temporaries; result files and other hidden
    /// files are not.
    #[test]
    fn temporary_names() {
        let d = Path::new("/x");
        for n in [
            "summary.json",
            "frost_depth.png",
            "winters.csv",
            "report.html",
        ] {
            let t = temp_path(d, n);
            let name = t.file_name().unwrap().to_str().unwrap();
            assert!(is_temporary(name), "{name}");
        }
        for n in [
            "summary.json",
            ".frostline.lock",
            ".hidden",
            ".a.b.tmp",
            ".a.1.tmp.txt",
            "x.1.2.tmp",
            ".1.2.tmp",
        ] {
            assert!(!is_temporary(n), "{n}");
        }
    }
}
