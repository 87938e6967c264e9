//! A whole run of the foundation model: steady initialisation at the annual means, spin-up over
//! repeated design years until the year is periodic, and the records of the reported (final) year.
use crate::analysis::{frost_depth_column, point_temperature};
use crate::case::{Case, InsulationKind};
use crate::error::Result;
use crate::geometry::{Section, DEEP, INDOOR, OUTDOOR};
use crate::mesh::Mesh;
use crate::methods;
use crate::solver::{Network, Solver, SolverParams, SolverStats};

/// Boundary-face reporting group: the indoor faces of the floor.
pub const GROUP_FLOOR: usize = 1;
/// … the indoor faces of the wall below ground level.
pub const GROUP_WALL_BELOW: usize = 2;
/// … the indoor faces of the wall above ground level.
pub const GROUP_WALL_ABOVE: usize = 3;

/// Assign the indoor boundary faces to the floor / wall groups (others stay in group 0).
pub fn assign_groups(net: &mut Network, mesh: &Mesh) {
    use crate::solver::network::Side;
    let nx = mesh.grid.nx();
    for b in net.bfaces.iter_mut() {
        if b.zone != INDOOR {
            continue;
        }
        let id = net.cell_of[b.p];
        let zc = mesh.grid.zc(id / nx);
        b.group = match b.side {
            Side::Top | Side::Bottom => GROUP_FLOOR,
            _ if zc >= 0.0 => GROUP_WALL_BELOW,
            _ => GROUP_WALL_ABOVE,
        };
    }
}

/// Spin-up stops when the annual heat loss changes less than this fraction between years.
pub const SPIN_UP_HEAT_TOL: f64 = 0.005;
/// … and the maximum frost depths change less than this, m.
pub const SPIN_UP_FROST_TOL_M: f64 = 0.01;

/// Month (0–11) of calendar day `d` (days since 1 January, 365-day year).
pub fn month_of(d: f64) -> usize {
    const ENDS: [f64; 12] = [
        31., 59., 90., 120., 151., 181., 212., 243., 273., 304., 334., 365.,
    ];
    let d = d.rem_euclid(365.0);
    ENDS.iter().position(|&e| d < e).unwrap_or(11)
}

/// One day of the reported year.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Day {
    /// Day of year, 1–365.
    pub day_of_year: usize,
    /// Daily mean outdoor air temperature, °C.
    pub outdoor_c: f64,
    /// Indoor air temperature, °C.
    pub indoor_c: f64,
    /// Daily mean ground heat loss of the whole building, W.
    pub heat_loss_w: f64,
    /// Frost depth in open ground at the far edge, end of day, m.
    pub frost_open_m: f64,
    /// Frost depth under the footing, end of day, m.
    pub frost_footing_m: f64,
    /// Frost depth within 0.5 m of the wall's exterior face, end of day, m.
    pub frost_beside_wall_m: f64,
}

/// One simulated year.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Year {
    /// Ground heat loss of the whole building over the year, kWh.
    pub heat_loss_kwh: f64,
    /// Of which through the floor, kWh.
    pub floor_heat_loss_kwh: f64,
    /// Of which through the wall's inside face below ground level, kWh.
    pub wall_heat_loss_kwh: f64,
    /// Of which through the wall's inside face above ground level, kWh.
    pub wall_above_ground_heat_loss_kwh: f64,
    /// Deepest frost within 0.5 m of the wall's exterior face, m.
    pub max_frost_beside_wall_m: f64,
    /// Deepest frost in open ground, m.
    pub max_frost_open_m: f64,
    /// Deepest frost under the footing, m.
    pub max_frost_footing_m: f64,
    /// Relative energy-balance error of the year.
    pub energy_balance_error: f64,
}

/// The temperature field on one day.
#[derive(Debug, Clone)]
pub struct Field {
    /// Day of year.
    pub day_of_year: usize,
    /// Cell-centre temperature per grid cell (NaN for air), °C, indexed by `Grid::id`.
    pub t: Vec<f64>,
}

/// Closed-form cross-checks for the same inputs.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct CrossCheck {
    /// ISO 13370 slab-on-ground U-value with edge insulation, W/(m²·K).
    pub iso13370_u_value_w_per_m2k: f64,
    /// ISO 13370 U-value without edge insulation, W/(m²·K).
    pub iso13370_u0_w_per_m2k: f64,
    /// ISO 13370 edge-insulation Ψ used (most effective piece), W/(m·K).
    pub iso13370_edge_psi_w_per_mk: f64,
    /// ISO 13370 total equivalent thickness d_t, m.
    pub iso13370_dt_m: f64,
    /// Soil conductivity used for ISO 13370 (top stratum, unfrozen), W/(m·K).
    pub iso13370_lambda_w_per_mk: f64,
    /// Annual mean heat loss by ISO 13370 steady U, W.
    pub iso13370_mean_heat_loss_w: f64,
    /// Air freezing index of the design sinusoid, °C·d.
    pub freezing_index_c_days: f64,
    /// Freezing season length, d.
    pub freezing_season_days: f64,
    /// Stefan open-ground frost depth (n = 1, top stratum), m.
    pub stefan_frost_depth_m: f64,
    /// Modified Berggren open-ground frost depth (n = 1, top stratum), m.
    pub modified_berggren_frost_depth_m: f64,
    /// ISO 13370 heated-basement values, for basement cases.
    pub basement: Option<BasementCheck>,
}

/// ISO 13370 heated-basement U-values for the same inputs.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct BasementCheck {
    /// Basement floor U_bf, W/(m²·K).
    pub iso13370_basement_floor_u_value_w_per_m2k: f64,
    /// Basement wall U_bw, W/(m²·K).
    pub iso13370_wall_u_value_w_per_m2k: f64,
    /// Effective U′ = (A U_bf + z P U_bw)/(A + z P), W/(m²·K).
    pub iso13370_effective_u_value_w_per_m2k: f64,
    /// 1/U_bw of the wall as computed (height-weighted U for partly insulated walls), m²·K/W.
    pub wall_resistance_m2k_per_w: f64,
}

/// Everything a run produces.
#[derive(Debug, Clone)]
pub struct RunResult {
    /// The section (construction outlines).
    pub section: Section,
    /// Mesh used.
    pub mesh: Mesh,
    /// Grid fields of every day of the reported year (°C, NaN for air), in `days` order.
    pub daily_fields: Vec<Vec<f32>>,
    /// Days of the reported year, from the warmest day on.
    pub days: Vec<Day>,
    /// Probe temperatures per day of the reported year (probe-major), °C.
    pub probes: Vec<Vec<f64>>,
    /// Every simulated year, spin-up first.
    pub years: Vec<Year>,
    /// Whether the spin-up criterion was met.
    pub spin_up_converged: bool,
    /// Field on the day of maximum frost depth under the footing; if there is none, on the day of
    /// deepest open-ground frost while the air is below 0 °C; if no frost at all, the coldest day.
    pub field: Field,
    /// Steady-state heat loss at the annual means, W (whole building).
    pub steady_heat_loss_w: f64,
    /// Solver work.
    pub stats: SolverStats,
    /// Time steps of the whole run.
    pub time_steps: usize,
    /// Cross-checks.
    pub cross_check: CrossCheck,
    /// Wall-clock time, s.
    pub wall_time_s: f64,
}

impl RunResult {
    /// The reported year.
    pub fn final_year(&self) -> &Year {
        self.years.last().expect("at least one year")
    }
    /// Spin-up years before the reported one.
    pub fn spin_up_years(&self) -> usize {
        self.years.len() - 1
    }
}

/// Progress of a run, for a progress bar.
#[derive(Debug, Clone, Copy)]
pub struct Progress {
    /// Year index (0-based).
    pub year: usize,
    /// Day within the year (1–365).
    pub day: usize,
    /// Most years the run can take.
    pub max_years: usize,
}

/// Cell columns whose centres lie within 0.5 m outside the wall's exterior face.
pub fn beside_wall_columns(mesh: &Mesh, _case: &Case) -> Vec<usize> {
    (0..mesh.grid.nx())
        .filter(|&i| mesh.grid.xc(i) > 0.0 && mesh.grid.xc(i) <= 0.5)
        .collect()
}

/// Cell columns whose centres lie under the footing.
pub fn footing_columns(mesh: &Mesh, case: &Case) -> Vec<usize> {
    let (x0, x1) = case.footing_x();
    (0..mesh.grid.nx())
        .filter(|&i| (x0..=x1).contains(&mesh.grid.xc(i)))
        .collect()
}

/// Frost-line temperature: the midpoint of the top stratum's freezing interval (half the pore
/// water frozen), °C.
pub fn frost_line_c(case: &Case) -> f64 {
    case.strata[0].material.t_frost_line()
}

/// The closed-form cross-checks for `case`.
pub fn cross_check(case: &Case) -> CrossCheck {
    let soil = &case.strata[0].material;
    let lambda = soil.k_unfrozen;
    let b = &case.building;
    let mut r_f = case.slab.thickness_m / case.slab.material.k_unfrozen + case.slab.finish_r;
    let mut edges = Vec::new();
    for ins in &case.insulation {
        let r_n = ins.thickness_m / ins.material.k_unfrozen;
        match ins.kind {
            InsulationKind::UnderSlab { band_width_m: None } => r_f += r_n,
            InsulationKind::UnderSlab {
                band_width_m: Some(d),
            } => edges.push((
                methods::EdgeInsulation::Horizontal { width_m: d },
                r_n,
                ins.thickness_m,
            )),
            InsulationKind::VerticalOutside { bottom_m, .. }
            | InsulationKind::VerticalInside { bottom_m, .. } => edges.push((
                methods::EdgeInsulation::Vertical {
                    depth_m: bottom_m.max(0.0),
                },
                r_n,
                ins.thickness_m,
            )),
            InsulationKind::Wing {
                x_start_m, width_m, ..
            } => edges.push((
                methods::EdgeInsulation::Horizontal {
                    width_m: width_m - x_start_m,
                },
                r_n,
                ins.thickness_m,
            )),
        }
    }
    let d_t = methods::equivalent_thickness(
        case.wall.thickness_m,
        lambda,
        b.r_si_floor,
        r_f,
        case.climate.r_se,
    );
    let u0 = methods::iso13370_slab_u(lambda, b.b_prime_m, d_t);
    let psi = edges
        .iter()
        .map(|&(e, r_n, d_n)| methods::iso13370_edge_psi(lambda, d_t, r_n, d_n, e))
        .fold(0.0, f64::min);
    let u = u0 + 2.0 * psi / b.b_prime_m;
    let (fi, season) =
        methods::sinusoid_freezing_index(case.climate.mean_c, case.climate.amplitude_k);
    let stefan = if fi > 0.0 {
        methods::stefan_depth(soil.k_frozen, fi, soil.latent.max(1.0))
    } else {
        0.0
    };
    let berggren = methods::modified_berggren_depth(
        fi,
        season,
        case.climate.mean_c,
        0.5 * (soil.k_frozen + soil.k_unfrozen),
        0.5 * (soil.c_frozen + soil.c_unfrozen),
        soil.latent.max(1.0),
    );
    let basement = case.basement.as_ref().map(|bm| {
        let z = bm.floor_depth_m;
        // Wall resistance: concrete plus insulation. Where insulation covers only part of the
        // below-ground height, U_bw is the height-weighted mean of U_bw for each part (common
        // practice for partly insulated walls; ISO 13370 gives one R_w).
        let r_wall = case.wall.thickness_m / case.wall.material.k_unfrozen;
        let mut cuts = vec![0.0, z];
        let pieces: Vec<(f64, f64, f64)> = case
            .insulation
            .iter()
            .filter_map(|ins| match ins.kind {
                InsulationKind::VerticalOutside { top_m, bottom_m }
                | InsulationKind::VerticalInside { top_m, bottom_m } => Some((
                    top_m.max(0.0),
                    bottom_m.min(z),
                    ins.thickness_m / ins.material.k_unfrozen,
                )),
                _ => None,
            })
            .collect();
        for &(t0, t1, _) in &pieces {
            cuts.extend([t0.clamp(0.0, z), t1.clamp(0.0, z)]);
        }
        cuts.sort_by(f64::total_cmp);
        cuts.dedup();
        let iso = |r_w: f64| {
            methods::iso13370_basement(
                lambda,
                b.floor_area_m2,
                b.exposed_perimeter_m,
                case.wall.thickness_m,
                z,
                r_f,
                r_w,
                b.r_si_floor,
                b.r_si_wall,
                case.climate.r_se,
            )
        };
        let (f, _, _) = iso(r_wall);
        let mut w = 0.0;
        for seg in cuts.windows(2) {
            let mid = 0.5 * (seg[0] + seg[1]);
            let r_ins: f64 = pieces
                .iter()
                .filter(|p| p.0 <= mid && mid <= p.1)
                .map(|p| p.2)
                .sum();
            w += (seg[1] - seg[0]) / z * iso(r_wall + r_ins).1;
        }
        let (a, p) = (b.floor_area_m2, b.exposed_perimeter_m);
        let e = (a * f + z * p * w) / (a + z * p);
        let r_w = 1.0 / w;
        BasementCheck {
            iso13370_basement_floor_u_value_w_per_m2k: f,
            iso13370_wall_u_value_w_per_m2k: w,
            iso13370_effective_u_value_w_per_m2k: e,
            wall_resistance_m2k_per_w: r_w,
        }
    });
    // For a basement the headline ISO values are the heated-basement ones: U′ (A + zP)/A per
    // floor area (the model's floor_u_value has the same definition) and U′ (A + zP) Δθ.
    let (u, mean_loss) = match (&basement, &case.basement) {
        (Some(bc), Some(bm)) => {
            let area = b.floor_area_m2 + bm.floor_depth_m * b.exposed_perimeter_m;
            let ue = bc.iso13370_effective_u_value_w_per_m2k;
            (
                ue * area / b.floor_area_m2,
                ue * area * (case.indoor_mean_c() - case.climate.mean_c),
            )
        }
        _ => (
            u,
            u * b.floor_area_m2 * (case.indoor_mean_c() - case.climate.mean_c),
        ),
    };
    CrossCheck {
        basement,
        iso13370_u_value_w_per_m2k: u,
        iso13370_u0_w_per_m2k: u0,
        iso13370_edge_psi_w_per_mk: psi,
        iso13370_dt_m: d_t,
        iso13370_lambda_w_per_mk: lambda,
        iso13370_mean_heat_loss_w: mean_loss,
        freezing_index_c_days: fi,
        freezing_season_days: season,
        stefan_frost_depth_m: stefan,
        modified_berggren_frost_depth_m: berggren,
    }
}

/// Run `case`: steady state, spin-up, reported year.
pub fn run(case: &Case, progress: &mut dyn FnMut(Progress)) -> Result<RunResult> {
    let start = std::time::Instant::now();
    let section = Section::from_case(case)?;
    let mesh = section.mesh(case);
    let mut net = Network::new(&mesh);
    assign_groups(&mut net, &mesh);
    let net = net;
    let mut solver = Solver::new(&net, SolverParams::default())?;
    let perimeter = case.building.exposed_perimeter_m;
    let n_zones = net.n_zones;
    let zone_temps = |indoor: f64, outdoor: f64| -> Vec<f64> {
        let mut z = vec![indoor, outdoor];
        if let Some(tb) = case.simulation.bottom_temperature_c {
            z.push(tb);
        }
        debug_assert_eq!(z.len(), n_zones);
        let _ = DEEP;
        z
    };
    // Steady state at the annual means.
    let steady = solver.steady(&zone_temps(case.indoor_mean_c(), case.climate.mean_c), None)?;
    let steady_heat_loss_w = steady.from_zone[INDOOR] * perimeter;
    let mut h = net.enthalpies(&steady.t);
    let mut t = steady.t.clone();

    let cols = footing_columns(&mesh, case);
    let open_col = mesh.grid.nx() - 1;
    let t_line = frost_line_c(case);
    let beside = beside_wall_columns(&mesh, case);
    let deepest = |cols: &[usize], t: &[f64]| {
        cols.iter()
            .filter_map(|&i| frost_depth_column(&mesh, &net, t, i, 0.0, t_line))
            .fold(0.0, f64::max)
    };
    let frost = |t: &[f64]| {
        let open = frost_depth_column(&mesh, &net, t, open_col, 0.0, t_line).unwrap_or(0.0);
        (open, deepest(&cols, t), deepest(&beside, t))
    };

    let dt = case.simulation.dt_s;
    let steps_per_day = (86400.0 / dt).round() as usize;
    // Start at the beginning of the day holding the warmest time of the year.
    let day0 = (case.climate.coldest_day - 0.5 + 182.5)
        .rem_euclid(365.0)
        .floor();
    let max_years = case.simulation.max_spin_up_years + 1;
    let mut years: Vec<Year> = Vec::new();
    let mut converged = false;
    let mut time_steps = 0;
    let (mut days, mut probes, mut field, mut daily_fields);
    let mut sim_time = 0.0;
    loop {
        let y = years.len();
        days = Vec::with_capacity(365);
        daily_fields = Vec::<Vec<f32>>::with_capacity(365);
        probes = vec![Vec::with_capacity(365); case.probes.len()];
        field = Field {
            day_of_year: 0,
            t: Vec::new(),
        };
        let (mut best_foot, mut best_open, mut best_open_winter) = (-1.0f64, -1.0f64, -1.0f64);
        let mut open_field = Field {
            day_of_year: 0,
            t: Vec::new(),
        };
        let (mut sum_in, mut sum_abs, mut sum_stored) = (0.0, 0.0, 0.0);
        let mut loss_j = 0.0;
        let mut groups_j = [0.0; 4];
        let mut best_wall = 0.0f64;
        for d in 0..365 {
            let cal = day0 + d as f64;
            let mut day_in = 0.0;
            let mut day_groups = [0.0; 4];
            let mut out_mean = 0.0;
            let indoor = case.building.indoor_monthly_c[month_of(cal + 0.5)];
            for s in 0..steps_per_day {
                let t0 = cal + s as f64 * dt / 86400.0;
                let t1 = t0 + dt / 86400.0;
                let outdoor = case.climate.mean_over(t0, t1);
                out_mean += outdoor / steps_per_day as f64;
                let e = solver.step(&mut h, &zone_temps(indoor, outdoor), dt, sim_time)?;
                sim_time += dt;
                time_steps += 1;
                day_in += e.from_zone[INDOOR];
                for (g, v) in e.by_group.iter().enumerate().take(4) {
                    day_groups[g] += v;
                }
                sum_in += e.from_zone.iter().sum::<f64>();
                sum_abs += e.from_zone.iter().map(|v| v.abs()).sum::<f64>();
                sum_stored += e.stored;
                let _ = OUTDOOR;
            }
            loss_j += day_in;
            for g in 0..4 {
                groups_j[g] += day_groups[g];
            }
            net.temperatures(&h, &mut t);
            let (fo, ff, fw) = frost(&t);
            best_wall = best_wall.max(fw);
            let doy = (cal as usize % 365) + 1;
            days.push(Day {
                day_of_year: doy,
                outdoor_c: out_mean,
                indoor_c: indoor,
                heat_loss_w: day_in / 86400.0 * perimeter,
                frost_open_m: fo,
                frost_footing_m: ff,
                frost_beside_wall_m: fw,
            });
            daily_fields.push(
                grid_field(&mesh, &net, &t)
                    .into_iter()
                    .map(|v| v as f32)
                    .collect(),
            );
            let zt = zone_temps(indoor, out_mean);
            for (k, p) in case.probes.iter().enumerate() {
                probes[k].push(
                    point_temperature(&mesh, &net, &t, &zt, p.x_m, p.z_m).unwrap_or(f64::NAN),
                );
            }
            if ff > best_foot {
                best_foot = ff;
                if ff > 0.0 {
                    field = Field {
                        day_of_year: doy,
                        t: grid_field(&mesh, &net, &t),
                    };
                }
            }
            if fo > best_open {
                best_open = fo;
            }
            // Without frost under the footing, the field shown is that of the deepest open-ground
            // frost while the air is still below freezing (the end of the freezing season), not
            // of a late, slowly creeping frozen layer in summer.
            if out_mean < 0.0 && fo > best_open_winter {
                best_open_winter = fo;
                open_field = Field {
                    day_of_year: doy,
                    t: grid_field(&mesh, &net, &t),
                };
            }
            progress(Progress {
                year: y,
                day: d + 1,
                max_years,
            });
        }
        if field.t.is_empty() {
            field = open_field;
        }
        if field.t.is_empty() {
            // No frost at all: show the coldest day's field.
            let k = days
                .iter()
                .enumerate()
                .min_by(|a, b| a.1.outdoor_c.total_cmp(&b.1.outdoor_c))
                .map_or(0, |(k, _)| k);
            field = Field {
                day_of_year: days[k].day_of_year,
                t: daily_fields[k].iter().map(|&v| v as f64).collect(),
            };
        }
        let year = Year {
            heat_loss_kwh: loss_j * perimeter / 3.6e6,
            floor_heat_loss_kwh: groups_j[GROUP_FLOOR] * perimeter / 3.6e6,
            wall_heat_loss_kwh: groups_j[GROUP_WALL_BELOW] * perimeter / 3.6e6,
            wall_above_ground_heat_loss_kwh: groups_j[GROUP_WALL_ABOVE] * perimeter / 3.6e6,
            max_frost_beside_wall_m: best_wall,
            max_frost_open_m: best_open.max(0.0),
            max_frost_footing_m: best_foot.max(0.0),
            energy_balance_error: if sum_abs > 0.0 {
                (sum_in - sum_stored) / sum_abs
            } else {
                0.0
            },
        };
        if let Some(prev) = years.last() {
            let dq = (year.heat_loss_kwh - prev.heat_loss_kwh).abs()
                / prev.heat_loss_kwh.abs().max(1e-9);
            let df = (year.max_frost_footing_m - prev.max_frost_footing_m)
                .abs()
                .max((year.max_frost_open_m - prev.max_frost_open_m).abs());
            converged = dq < SPIN_UP_HEAT_TOL && df < SPIN_UP_FROST_TOL_M;
        }
        years.push(year);
        if converged || years.len() >= max_years {
            break;
        }
    }
    Ok(RunResult {
        days,
        probes,
        years,
        spin_up_converged: converged,
        field,
        steady_heat_loss_w,
        stats: solver.stats(),
        time_steps,
        cross_check: cross_check(case),
        wall_time_s: start.elapsed().as_secs_f64(),
        mesh,
        section,
        daily_fields,
    })
}

/// Steady heat flow from the indoor air into the ground per metre of section (W/m) with constant
/// indoor and outdoor temperatures (°C): the ISO 13370 steady-state quantity Q' = U B'/2 ΔT.
pub fn steady_heat_flow(case: &Case, indoor_c: f64, outdoor_c: f64) -> Result<f64> {
    Ok(steady_flows(case, indoor_c, outdoor_c)?.iter().sum())
}

/// Steady indoor heat flows per metre of section (W/m) split into [other, floor, wall below
/// ground, wall above ground] (see [`GROUP_FLOOR`] …).
pub fn steady_flows(case: &Case, indoor_c: f64, outdoor_c: f64) -> Result<[f64; 4]> {
    let section = Section::from_case(case)?;
    let mesh = section.mesh(case);
    let mut net = Network::new(&mesh);
    assign_groups(&mut net, &mesh);
    let net = net;
    let mut solver = Solver::new(&net, SolverParams::default())?;
    let mut zt = vec![indoor_c, outdoor_c];
    if let Some(tb) = case.simulation.bottom_temperature_c {
        zt.push(tb);
    }
    let st = solver.steady(&zt, None)?;
    let mut out = [0.0; 4];
    for (g, v) in st.by_group.iter().enumerate().take(4) {
        out[g] = *v;
    }
    // Group 0 also holds the other zones' faces: keep only the indoor total there.
    out[0] = st.from_zone[INDOOR] - out[1] - out[2] - out[3];
    Ok(out)
}

/// Temperatures of the unknowns spread onto the grid (NaN for air cells).
pub fn grid_field(mesh: &Mesh, net: &Network, t: &[f64]) -> Vec<f64> {
    let mut f = vec![f64::NAN; mesh.grid.len()];
    for (p, &id) in net.cell_of.iter().enumerate() {
        f[id] = t[p];
    }
    f
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn months() {
        assert_eq!(month_of(0.0), 0);
        assert_eq!(month_of(30.9), 0);
        assert_eq!(month_of(31.0), 1);
        assert_eq!(month_of(364.5), 11);
        assert_eq!(month_of(365.2), 0);
    }
}
