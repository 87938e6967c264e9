//! The 3D run's files: the `three_d` block of `summary.json`, `daily_3d.csv`, `monthly_3d.csv`,
//! `perimeter.csv`, `plan_frost.csv` and `three_d.json` (the plan map, the design day's
//! sections at mid-wall and along the corner diagonal, and the outlines the plots draw).
use super::section::{part_outlines, PartOutline};
use super::tables::{self, csv_bytes, fmt, Csv};
use super::{write_csv, write_json, CsvNotes};
use crate::analysis::frost_scalar;
use crate::case::{Case, InsulationKind, Solver3d};
use crate::error::Result;
use crate::mesh::Cell;
use crate::mesh3::Grid3;
use crate::run::quarter::{StationYear, WorstPoint};
use crate::run::three::{Coupling3, Run3Result};
use crate::run::{frost_line_c, headline, Headline, Year};
use serde::{Deserialize, Serialize};
use std::path::{Path, PathBuf};

/// What the 3D figures are.
pub const NOTE_3D: &str = "3D quarter of the rectangular plan (symmetry planes through the building's centre): whole-building figures computed directly, the floor with its real plan and the corners included. The 2D figures beside are the section's ISO 13370 equivalent strip (per-metre results times P).";

/// How the 3D frost margin is measured.
pub const MARGIN_3D: &str = "At every plan point the protected zone of the section with x = max(u, v), u and v the distances outside the two exterior wall faces: the zone's plan outline has square corners, as each strip footing's spread continued past its end gives (a spread of the same angle round the corner would be rounded and smaller, so this margin is the conservative one).";

/// The `three_d` block of `summary.json`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Summary3 {
    /// What these figures are.
    pub note: String,
    /// Plan length and width between the wall's exterior faces, m.
    pub plan_length_m: f64,
    /// …
    pub plan_width_m: f64,
    /// Corner insulation pieces.
    pub corner_pieces: usize,
    /// The 3D headline numbers (floor U and Ψ_g from the 3D model's steady couplings).
    pub headline: Headline,
    /// The 3D steady couplings.
    pub coupling: Coupling3,
    /// The 2D section's headline numbers (the equivalent strip) of the same case.
    pub section_2d: Headline,
    /// Annual ground heat loss, 3D over 2D strip.
    pub annual_heat_loss_ratio_3d_to_2d: f64,
    /// The long walls' middle (station on the centre line X = 0 of the wall Y = W/2).
    pub mid_long_wall: StationYear,
    /// The short walls' middle (Y = 0 of the wall X = L/2).
    pub mid_short_wall: StationYear,
    /// The outside corner.
    pub corner: StationYear,
    /// The point of least margin.
    pub worst_point: Option<WorstPoint>,
    /// The corner's margin minus the long wall's mid-wall margin, m.
    pub corner_margin_change_m: f64,
    /// How the margin is measured in 3D.
    pub frost_margin_definition: String,
    /// Grid cells (nx, ny, nz) of the quarter.
    pub grid: [usize; 3],
    /// Unknowns (solid cells).
    pub unknowns: usize,
    /// The linear solver of the Newton corrections (`simulation.solver_3d`; files written
    /// before the key existed read as the only solver then, incomplete Cholesky).
    #[serde(default)]
    pub solver_3d: Solver3d,
    /// Time steps of the 3D run.
    pub time_steps: usize,
    /// Newton iterations per step.
    pub newton_iterations_per_step: f64,
    /// Conjugate-gradient iterations per linear solve (mean, largest).
    pub cg_iterations_per_solve: f64,
    /// …
    pub max_cg_iterations: usize,
    /// Preconditioner set-ups.
    pub preconditioner_setups: usize,
    /// Step halvings.
    pub step_halvings: usize,
    /// Largest accepted residual, K.
    pub max_residual_k: f64,
    /// Energy-balance error of the reported period.
    pub energy_balance_error: f64,
    /// Spin-up years of the 3D run (from the 2D periodic state) and whether they met the
    /// criterion.
    pub spin_up_years: usize,
    /// …
    pub spin_up_converged: bool,
    /// Periodicity estimate of the reported year's heat loss, kWh.
    pub periodicity_error_heat_loss_kwh: Option<f64>,
    /// Wall time of the whole 3D run (the 2D run included), s.
    pub wall_time_s: f64,
    /// Every simulated 3D year.
    pub years: Vec<Year>,
}

impl Summary3 {
    /// The block of a 3D run.
    pub fn new(case: &Case, r: &Run3Result) -> Self {
        let h = r.headline(case);
        let two = headline(case, &r.two);
        let y = r.year();
        let st = r.stats;
        let plan = case.plan.expect("3D runs have a plan");
        let station = |v: &[(f64, StationYear)]| v.first().map_or(y.corner, |s| s.1);
        let g = &r.mesh.grid;
        Summary3 {
            note: NOTE_3D.into(),
            plan_length_m: plan.length_m,
            plan_width_m: plan.width_m,
            corner_pieces: case.corners.len(),
            annual_heat_loss_ratio_3d_to_2d: h.annual_heat_loss_kwh / two.annual_heat_loss_kwh,
            headline: h,
            coupling: r.coupling.clone(),
            section_2d: two,
            mid_long_wall: station(&y.north),
            mid_short_wall: station(&y.east),
            corner: y.corner,
            worst_point: y.worst,
            corner_margin_change_m: y.corner.margin_m - station(&y.north).margin_m,
            frost_margin_definition: MARGIN_3D.into(),
            grid: [g.nx(), g.ny(), g.nz()],
            unknowns: r.unknowns,
            solver_3d: r.solver_3d,
            time_steps: r.time_steps,
            newton_iterations_per_step: st.newton_iterations as f64 / r.time_steps.max(1) as f64,
            cg_iterations_per_solve: st.cg_iterations as f64 / st.solves.max(1) as f64,
            max_cg_iterations: st.max_cg_iterations,
            preconditioner_setups: st.factorizations,
            step_halvings: st.halvings,
            max_residual_k: st.max_residual_k,
            energy_balance_error: r.sim.years[r.sim.reported].energy_balance_error,
            spin_up_years: r.sim.spin_up_years,
            spin_up_converged: r.sim.converged,
            periodicity_error_heat_loss_kwh: r.sim.periodicity_kwh,
            wall_time_s: r.wall_time_s,
            years: r.sim.years.clone(),
        }
    }
}

/// A vertical section of the design day's 3D field: cell edges along the section and in depth,
/// temperature and frost scalar per cell (nz rows of nx, NaN for air).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Slice {
    /// What the section is.
    pub title: String,
    /// Horizontal coordinate's meaning.
    pub axis: String,
    /// Cell edges along the section (section x: 0 at the wall's exterior face), m.
    pub xe: Vec<f64>,
    /// Cell edges in depth, m.
    pub ze: Vec<f64>,
    /// Temperature, °C (row-major nz × nx; null for air).
    pub t: Vec<Option<f64>>,
    /// Frost scalar, °C (as `t`).
    pub frost: Vec<Option<f64>>,
    /// Construction outlines in the section (the diagonal adds the corner pieces).
    pub parts: Vec<PartOutline>,
}

/// A band of the plan round the building between section coordinates `s0_m` and `s1_m` (m from
/// the wall's exterior face, outward positive), all round or only within `length_m` of each
/// exterior corner (measured along the wall from the corner).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PlanBand {
    /// "wall", "footing", "insulation" or "corner insulation".
    pub kind: String,
    /// Inner edge, m.
    pub s0_m: f64,
    /// Outer edge, m.
    pub s1_m: f64,
    /// Extent from each corner along the walls, m (None: all round).
    pub length_m: Option<f64>,
}

/// `three_d.json`: what the 3D plots draw.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ThreeDFile {
    /// Case name.
    pub case_name: String,
    /// Exterior faces at X = a and Y = b, m.
    pub a_m: f64,
    /// …
    pub b_m: f64,
    /// Quarter grid edges in plan, m.
    pub xe: Vec<f64>,
    /// …
    pub ye: Vec<f64>,
    /// Deepest frost of every plan column over the reported period (ny rows of nx), m.
    pub plan_frost_m: Vec<f64>,
    /// Plan outlines: bands round the building.
    pub plan_bands: Vec<PlanBand>,
    /// Frost-line temperature, °C.
    pub frost_line_c: f64,
    /// Footing base depth, m.
    pub footing_base_depth_m: f64,
    /// Depth of the bearing soil's top, m: the footing base, or the underside of the board the
    /// footing bears on (the top of the protected zone). Files written before it read as 0: use
    /// [`ThreeDFile::bearing_m`].
    #[serde(default)]
    pub bearing_depth_m: f64,
    /// Day of year of the design (least-margin) field.
    pub design_day: usize,
    /// The sections at mid-wall (long wall) and along the corner's diagonal.
    pub slices: Vec<Slice>,
    /// Perimeter stations: (distance along the perimeter from the long wall's middle, m; face
    /// depth, under the footing, beside the wall, margin, m).
    pub perimeter: Vec<[f64; 5]>,
    /// The corner's distance along the perimeter, m.
    pub corner_at_m: f64,
    /// The 2D section's face depth and margin, m.
    pub section_2d: [f64; 2],
}

impl ThreeDFile {
    /// The bearing level, m (the footing base in files written before it was recorded).
    pub fn bearing_m(&self) -> f64 {
        self.bearing_depth_m.max(self.footing_base_depth_m)
    }
}

/// Perimeter rows: the long wall (Y = b) from its middle to the corner, the corner, the short
/// wall (X = a) from the corner to its middle; distance along the exterior face from the long
/// wall's middle, m.
fn perimeter_rows(r: &Run3Result) -> Vec<(String, f64, StationYear)> {
    let y = r.year();
    let (a, b) = (r.quarter.a, r.quarter.b);
    let mut rows: Vec<(String, f64, StationYear)> = y
        .north
        .iter()
        .map(|(x, s)| ("long".to_string(), *x, *s))
        .collect();
    rows.push(("corner".into(), a, y.corner));
    rows.extend(
        y.east
            .iter()
            .rev()
            .map(|(yy, s)| ("short".to_string(), a + (b - yy), *s)),
    );
    rows
}

/// `perimeter.csv`.
fn perimeter_csv(head: &str, r: &Run3Result) -> Result<Csv> {
    csv_bytes(
        &format!("{head}\nFrost along the perimeter over the reported period, station by station: the long wall from its middle to the corner, the corner (the diagonal column at the footing face and the footing's corner square), the short wall from the corner to its middle. distance_m runs along the exterior wall face from the long wall's middle.\nMargin: {MARGIN_3D}"),
        &["wall", "distance_m", "frost_depth_at_footing_face_m", "frost_depth_under_footing_m", "frost_depth_beside_wall_m", "frost_margin_m", "margin_day_of_year"],
        perimeter_rows(r).into_iter().map(|(w, d, s)| {
            vec![w, fmt(d, 3), fmt(s.face_m, 4), fmt(s.under_footing_m, 4), fmt(s.beside_wall_m, 4), fmt(s.margin_m, 4), s.margin_day.to_string()]
        }),
    )
}

/// `plan_frost.csv`: deepest frost per plan column (quarter).
fn plan_csv(head: &str, r: &Run3Result) -> Result<Csv> {
    let g = &r.mesh.grid;
    let f = &r.year().plan_frost_m;
    csv_bytes(
        &format!("{head}\nDeepest frost of each plan column over the reported period (quarter of the plan: X from the centre along the length, Y along the width; exterior wall faces at X = {:.3} m and Y = {:.3} m).", r.quarter.a, r.quarter.b),
        &["x_m", "y_m", "max_frost_depth_m"],
        (0..g.ny()).flat_map(|j| (0..g.nx()).map(move |i| (i, j))).map(|(i, j)| {
            vec![fmt(Grid3::centre(&g.xe, i), 3), fmt(Grid3::centre(&g.ye, j), 3), fmt(f[[j, i]], 4)]
        }),
    )
}

/// The design day's values in a cell (temperature, frost scalar), None for air.
fn cell_values(r: &Run3Result, i: usize, j: usize, k: usize) -> Option<(f64, f64)> {
    let g = &r.mesh.grid;
    let t = f64::from(r.year().design_field[[k, j, i]]);
    match r.mesh.cells[g.id(i, j, k)] {
        Cell::Solid(m) if t.is_finite() => Some((t, frost_scalar(&r.mesh.materials[m], t))),
        _ => None,
    }
}

/// The section at mid-wall of the long wall (X = 0, along Y) and the one along the corner's
/// diagonal (cells (i, j) with X − a = Y − b as near as the grids allow).
fn slices(case: &Case, r: &Run3Result) -> Vec<Slice> {
    let g = &r.mesh.grid;
    let (a, b) = (r.quarter.a, r.quarter.b);
    let nz = g.nz();
    let mut mid = Slice {
        title: format!(
            "mid-wall of the long wall (X = 0), day {}",
            r.year().design_day
        ),
        axis: "x (m), 0 at the wall's exterior face (Y − W/2)".into(),
        xe: g.ye.iter().map(|y| y - b).collect(),
        ze: g.ze.clone(),
        t: Vec::new(),
        frost: Vec::new(),
        parts: part_outlines(&r.two.section.rects),
    };
    for k in 0..nz {
        for j in 0..g.ny() {
            let v = cell_values(r, 0, j, k);
            mid.t.push(v.map(|v| v.0));
            mid.frost.push(v.map(|v| v.1));
        }
    }
    // The diagonal: section x = X − a on the x grid, the y cell holding b + (X − a).
    let lo = -(a.min(b));
    let cols: Vec<(usize, usize)> = (0..g.nx())
        .filter(|&i| g.xe[i] - a >= lo - 1e-9)
        .filter_map(|i| {
            let y = b + Grid3::centre(&g.xe, i) - a;
            (y > 0.0 && y < *g.ye.last()?).then(|| (i, g.ye.partition_point(|&e| e <= y) - 1))
        })
        .collect();
    let mut diag = Slice {
        title: format!(
            "corner diagonal (X − L/2 = Y − W/2), day {}",
            r.year().design_day
        ),
        axis: "x (m) along each axis from the exterior corner (the diagonal distance is √2 x)"
            .into(),
        xe: cols
            .iter()
            .map(|&(i, _)| g.xe[i] - a)
            .chain(cols.last().map(|&(i, _)| g.xe[i + 1] - a))
            .collect(),
        ze: g.ze.clone(),
        t: Vec::new(),
        frost: Vec::new(),
        parts: part_outlines(&r.two.section.rects)
            .into_iter()
            .chain(case.corners.iter().enumerate().filter_map(|(n, c)| {
                let InsulationKind::Wing {
                    depth_m,
                    x_start_m,
                    width_m,
                } = c.piece.kind
                else {
                    return None;
                };
                Some(PartOutline {
                    label: format!("corner[{n}]"),
                    kind: "insulation".into(),
                    x0: x_start_m,
                    x1: width_m,
                    z0: depth_m,
                    z1: depth_m + c.piece.thickness_m,
                })
            }))
            .collect(),
    };
    for k in 0..nz {
        for &(i, j) in &cols {
            let v = cell_values(r, i, j, k);
            diag.t.push(v.map(|v| v.0));
            diag.frost.push(v.map(|v| v.1));
        }
    }
    vec![mid, diag]
}

/// Plan outlines: the wall and footing bands, wing insulation, corner pieces.
fn plan_bands(case: &Case) -> Vec<PlanBand> {
    let band = |kind: &str, s0_m: f64, s1_m: f64, length_m: Option<f64>| PlanBand {
        kind: kind.into(),
        s0_m,
        s1_m,
        length_m,
    };
    let (x0, x1) = case.footing_x();
    let mut out = vec![
        band("wall", -case.wall.thickness_m, 0.0, None),
        band("footing", x0, x1, None),
    ];
    for ins in &case.insulation {
        if let InsulationKind::Wing {
            x_start_m, width_m, ..
        } = ins.kind
        {
            out.push(band("insulation", x_start_m, width_m, None));
        }
    }
    for c in &case.corners {
        if let InsulationKind::Wing {
            x_start_m, width_m, ..
        } = c.piece.kind
        {
            out.push(band(
                "corner insulation",
                x_start_m,
                width_m,
                Some(c.length_m),
            ));
        }
    }
    out
}

/// `three_d.json`.
pub fn three_d_file(case: &Case, r: &Run3Result) -> ThreeDFile {
    let g = &r.mesh.grid;
    let y = r.year();
    let two = headline(case, &r.two);
    let rows = perimeter_rows(r);
    ThreeDFile {
        case_name: case.name.clone(),
        a_m: r.quarter.a,
        b_m: r.quarter.b,
        xe: g.xe.clone(),
        ye: g.ye.clone(),
        plan_frost_m: y.plan_frost_m.iter().copied().collect(),
        plan_bands: plan_bands(case),
        frost_line_c: frost_line_c(case),
        footing_base_depth_m: case.footing.base_depth_m,
        bearing_depth_m: case.bearing_depth_m(),
        design_day: y.design_day,
        slices: slices(case, r),
        perimeter: rows
            .iter()
            .map(|(_, d, s)| [*d, s.face_m, s.under_footing_m, s.beside_wall_m, s.margin_m])
            .collect(),
        corner_at_m: r.quarter.a,
        section_2d: [two.frost_depth_at_footing_face_m, two.frost_margin_m],
    }
}

/// Write the 3D files into `dir`; returns the paths.
pub fn write_3d(
    case: &Case,
    r: &Run3Result,
    dir: &Path,
    (head, notes): (&str, &mut CsvNotes),
) -> Result<Vec<PathBuf>> {
    let rec = r.records();
    Ok(vec![
        write_csv(dir, "daily_3d.csv", tables::daily(head, &rec)?, notes)?,
        write_csv(dir, "monthly_3d.csv", tables::monthly(head, &rec)?, notes)?,
        write_csv(dir, "perimeter.csv", perimeter_csv(head, r)?, notes)?,
        write_csv(dir, "plan_frost.csv", plan_csv(head, r)?, notes)?,
        write_json(dir, "three_d.json", &three_d_file(case, r))?,
    ])
}
