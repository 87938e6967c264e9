//! `section.json` (grid and construction outlines), `fields.i16` (the field of every day of the
//! reported period), the plotted frost line and `plots.json`: what `frostline plot` re-renders
//! from.
use super::{bad_file, read_text, COORDINATES};
use crate::case::{layout::part_name, layout::Rect, Case, Part};
use crate::error::{Error, Result};
use crate::run::RunResult;
use ndarray::{Array3, ArrayView3};
use serde::{Deserialize, Serialize};
use std::path::Path;

/// Marker for "no value" (air cells) in `fields.i16`.
pub const NO_VALUE: i16 = i16::MIN;

/// One outlined construction piece.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PartOutline {
    /// Label (slab, wall, footing, fill, backfill, `insulation[k]`).
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
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
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
    /// Depth of the bearing soil's top, m: the footing base, or the underside of the insulation
    /// board the footing bears on (0 in files written before it was recorded: read as the base).
    #[serde(default)]
    pub bearing_depth_m: f64,
    /// Footing x range, m.
    pub footing_x_m: (f64, f64),
    /// Frost-line temperature, °C.
    pub frost_line_c: f64,
    /// Day of year of the least frost margin (the design day, the default field day).
    pub field_day_of_year: usize,
    /// Days stored in `fields.i16` (in `daily.csv` order).
    pub days: usize,
    /// The freezing interval [T_s, T_f] (°C) of each material, null for a material without water:
    /// the frost scalar is the temperature clamped to it (`analysis::frost_scalar`).
    pub freezing_intervals: Vec<Option<[f64; 2]>>,
    /// Material of each grid cell (row-major, z outer), −1 for air.
    pub cell_materials: Vec<i32>,
    /// Layout of `fields.i16`.
    pub fields_format: String,
}

/// The outlines of the section's construction parts.
pub fn part_outlines(rects: &[Rect]) -> Vec<PartOutline> {
    rects
        .iter()
        .map(|rc| {
            let kind = match rc.part {
                Part::Slab | Part::Wall | Part::Footing => "concrete",
                Part::Fill | Part::Backfill => "fill",
                Part::Insulation(_) => "insulation",
            };
            PartOutline {
                label: part_name(rc.part),
                kind: kind.into(),
                x0: rc.x0,
                x1: rc.x1,
                z0: rc.z0,
                z1: rc.z1,
            }
        })
        .collect()
}

impl SectionFile {
    /// The section file of a run.
    pub fn new(case: &Case, r: &RunResult) -> Self {
        let g = &r.mesh.grid;
        let parts = part_outlines(&r.section.rects);
        SectionFile {
            case_name: case.name.clone(),
            coordinates: COORDINATES.into(),
            xe: g.xe.clone(),
            ze: g.ze.clone(),
            parts,
            footing_base_depth_m: case.footing.base_depth_m,
            bearing_depth_m: case.bearing_depth_m(),
            footing_x_m: case.footing_x(),
            frost_line_c: crate::run::frost_line_c(case),
            field_day_of_year: r.field.day_of_year,
            days: r.daily_fields.shape()[0],
            freezing_intervals: r
                .mesh
                .materials
                .iter()
                .map(|m| m.freezes().then(|| [m.t_solidus(), m.t_freeze]))
                .collect(),
            cell_materials: r
                .mesh
                .cells
                .iter()
                .map(|c| match c {
                    crate::mesh::Cell::Solid(m) => *m as i32,
                    crate::mesh::Cell::Zone(_) => -1,
                })
                .collect(),
            fields_format: format!(
                "little-endian i16, hundredths of a degree C, {NO_VALUE} = no value (air); day-major in daily.csv order, \
                 cells row-major (z outer, x inner) over the grid of xe x ze"
            ),
        }
    }

    /// Cells per day.
    pub fn cells(&self) -> usize {
        self.xe.len().saturating_sub(1) * self.ze.len().saturating_sub(1)
    }

    /// The frost scalar of cell `id` at temperature `t` (°C): `t` clamped to the cell material's
    /// freezing interval (`analysis::frost_scalar`).
    pub fn frost_scalar(&self, id: usize, t: f64) -> f64 {
        let m = self.cell_materials.get(id).copied().unwrap_or(-1);
        match usize::try_from(m)
            .ok()
            .and_then(|m| self.freezing_intervals.get(m))
        {
            Some(Some([lo, hi])) => t.clamp(*lo, *hi),
            _ => t,
        }
    }
}

/// `section.json` of `dir`, checked for a usable grid.
pub fn read_section(dir: &Path) -> Result<SectionFile> {
    let name = "section.json";
    let s: SectionFile =
        serde_json::from_str(&read_text(dir, name)?).map_err(|e| bad_file(dir, name, e))?;
    let increasing = |v: &[f64]| v.len() >= 2 && v.windows(2).all(|w| w[1] > w[0]);
    if !increasing(&s.xe) || !increasing(&s.ze) {
        return Err(bad_file(
            dir,
            name,
            "grid edges xe, ze must be at least two increasing values",
        ));
    }
    let n = s.freezing_intervals.len() as i32;
    if s.cell_materials.len() != s.cells() || s.cell_materials.iter().any(|&m| m < -1 || m >= n) {
        return Err(bad_file(
            dir,
            name,
            "cell_materials must give a material (or −1) for every grid cell",
        ));
    }
    Ok(s)
}

/// Encode grid fields (°C, NaN = air) as little-endian i16 hundredths of a kelvin.
pub fn encode_fields(fields: ArrayView3<f32>) -> Vec<u8> {
    let mut out = Vec::with_capacity(2 * fields.len());
    for &t in fields.iter() {
        let v = if t.is_finite() {
            (t as f64 * 100.0).round().clamp(-32767.0, 32767.0) as i16
        } else {
            NO_VALUE
        };
        out.extend_from_slice(&v.to_le_bytes());
    }
    out
}

/// `fields.i16` of `dir` for the grid of `sec`: days × nz × nx, °C, NaN for air.
pub fn read_fields(dir: &Path, sec: &SectionFile) -> Result<Array3<f64>> {
    let name = "fields.i16";
    let p = dir.join(name);
    let bytes = std::fs::read(&p).map_err(|e| Error::io(&p, e))?;
    let (nx, nz) = (sec.xe.len() - 1, sec.ze.len() - 1);
    if bytes.len() != 2 * sec.cells() * sec.days {
        return Err(bad_file(
            dir,
            name,
            format!(
                "size {} B does not match {} days × {} cells",
                bytes.len(),
                sec.days,
                sec.cells()
            ),
        ));
    }
    let v: Vec<f64> = bytes
        .chunks_exact(2)
        .map(|b| match i16::from_le_bytes([b[0], b[1]]) {
            NO_VALUE => f64::NAN,
            v => v as f64 / 100.0,
        })
        .collect();
    Array3::from_shape_vec((sec.days, nz, nx), v).map_err(|e| bad_file(dir, name, e))
}

/// `frost_line_<day>.csv`: the frost line drawn on the field, as polylines (x, z in m).
pub fn frost_line_csv(lines: &[Vec<(f64, f64)>]) -> Vec<u8> {
    // The frost line (the frost-line isotherm of the frost scalar) drawn on the plotted day.
    let mut csv = String::from("line,x_m,z_m\n");
    for (k, l) in lines.iter().enumerate() {
        for (x, z) in l {
            csv += &format!("{k},{x:.4},{z:.4}\n");
        }
    }
    csv.into_bytes()
}

/// One image in `plots.json`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PlotEntry {
    /// File name.
    pub file: String,
    /// Width, px.
    pub width_px: u32,
    /// Height, px.
    pub height_px: u32,
}

/// Contents of `plots.json`: the plotted day and every image with its size.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PlotIndex {
    /// Day of year of the field plots.
    pub day_of_year: usize,
    /// The images.
    pub plots: Vec<PlotEntry>,
}
