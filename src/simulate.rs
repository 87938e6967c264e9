//! A whole run of the foundation model: steady initialisation at the annual means, spin-up over
//! repeated design years until the year is periodic, and the records of the reported (final) year.
use crate::analysis::{frost_depth_column, point_temperature};
use crate::case::{Case, ClimateSource, InsulationKind};
use crate::error::Result;
use crate::geometry::{Section, INDOOR, OUTDOOR};
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
    /// Surface freezing index used (n-factor × air index of the design sinusoid, or of the
    /// coldest winter of a series), °C·d.
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
    /// Every simulated year, spin-up first (for a series: then every season).
    pub years: Vec<Year>,
    /// Index into `years` of the reported year (the last spin-up year, or the worst season).
    pub reported: usize,
    /// Years of spin-up before the reported year (for a series: before the first season).
    pub spin_up_years: usize,
    /// Extra first spin-up years run in steps of several days (0 or 1), not in `years` and not
    /// counted in `spin_up_years`.
    pub coarse_spin_up_years: usize,
    /// Sinusoidal climate: the reported year's heat loss minus that of the periodic year, kWh,
    /// estimated from how far the state at the year's end is from its start. Let ψ be the steady
    /// temperature with the indoor zone at 1 and the other zones at 0 (the fraction of heat
    /// released in a cell that eventually leaves through the building's faces). For conduction
    /// with fixed conductances d/dt Σ ψ_p V_p δH_p is the change in the indoor zone's heat flow
    /// caused by a state perturbation δH, so integrating over the year against the periodic
    /// solution gives exactly
    ///
    /// ```text
    /// Q_year − Q_periodic = P Σ_p ψ_p V_p (H_p,end − H_p,start)
    /// ```
    ///
    /// (approximate where frozen and unfrozen conductivities differ or snow changes the surface
    /// conductance). `None` for a measured series.
    pub periodicity_heat_loss_kwh: Option<f64>,
    /// Per-winter results of a measured series (empty for a design year).
    pub winters: Vec<WinterResult>,
    /// Whether the spin-up criterion was met.
    pub spin_up_converged: bool,
    /// Field on the day of maximum frost depth under the footing; if there is none, on the day of
    /// deepest open-ground frost while the air is below 0 °C; if no frost at all, the coldest day.
    pub field: Field,
    /// Steady-state heat loss at the annual means, W (whole building).
    pub steady_heat_loss_w: f64,
    /// Solver work.
    pub stats: SolverStats,
    /// Time steps of the whole run (the coarse spin-up year's included).
    pub time_steps: usize,
    /// Cross-checks.
    pub cross_check: CrossCheck,
    /// Wall-clock time, s.
    pub wall_time_s: f64,
}

impl RunResult {
    /// The reported year.
    pub fn final_year(&self) -> &Year {
        &self.years[self.reported]
    }
    /// Spin-up years before the reported one.
    pub fn spin_up_years(&self) -> usize {
        self.spin_up_years
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
    // Surface freezing index: the n-factor times the air index of the design sinusoid, or of the
    // coldest winter of a measured series.
    let (fi_air, season) =
        methods::sinusoid_freezing_index(case.climate.mean_c, case.climate.amplitude_k);
    let fi_air = match &case.climate.source {
        ClimateSource::Series(s) => crate::physics::climate::freezing_indices(s)
            .iter()
            .map(|w| w.value)
            .fold(0.0, f64::max),
        ClimateSource::Sinusoid => fi_air,
    };
    let fi = case.climate.n_freezing * fi_air;
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

/// The thermal-offset surface mean of the top stratum for the sinusoidal (surface) climate, °C,
/// or None without freezing.
fn thermal_offset_start(case: &Case) -> Option<f64> {
    let cl = &case.climate;
    let m = &case.strata[0].material;
    let p = 365.0;
    let (i_f_air, _) = methods::sinusoid_freezing_index(cl.mean_c, cl.amplitude_k);
    if i_f_air <= 0.0 || !m.freezes() {
        return None;
    }
    let i_t_air = i_f_air + cl.mean_c * p;
    let (i_f, i_t) = (cl.n_freezing * i_f_air, cl.n_thawing * i_t_air);
    Some((m.k_unfrozen * i_t - m.k_frozen * i_f) / (m.k_unfrozen * p))
}

/// One day of forcing.
#[derive(Debug, Clone, Copy)]
struct DayIn {
    /// Calendar time of the day's start, days since 1 January of a 365-day year (sinusoid).
    cal: f64,
    /// Day of year for records.
    doy: usize,
    /// Month 0–11.
    month: usize,
    /// Measured daily mean air temperature, if the climate is a series.
    measured_c: Option<f64>,
}

/// The records of one simulated period (a year or a season).
struct Period {
    days: Vec<Day>,
    probes: Vec<Vec<f64>>,
    fields: Vec<Vec<f32>>,
    field: Field,
    year: Year,
}

/// The state and fixed data of a run.
struct Driver<'a> {
    case: &'a Case,
    mesh: &'a Mesh,
    net: &'a Network,
    solver: Solver<'a>,
    h: Vec<f64>,
    t: Vec<f64>,
    cols: Vec<usize>,
    beside: Vec<usize>,
    open_col: usize,
    t_line: f64,
    sim_time: f64,
    time_steps: usize,
}

impl Driver<'_> {
    /// Indoor air temperature in `month` (0–11) when the outdoor air is at `air`, °C: the case's
    /// monthly value, or the outdoor air for an unheated building.
    fn indoor_c(&self, month: usize, air: f64) -> f64 {
        if self.case.building.unheated {
            air
        } else {
            self.case.building.indoor_monthly_c[month]
        }
    }

    fn zone_temps(&self, indoor: f64, outdoor: f64) -> Vec<f64> {
        let mut z = vec![indoor, outdoor];
        if let Some(tb) = self.case.simulation.bottom_temperature_c {
            z.push(tb);
        }
        z
    }

    fn frost(&self) -> (f64, f64, f64) {
        let deepest = |cols: &[usize]| {
            cols.iter()
                .filter_map(|&i| {
                    frost_depth_column(self.mesh, self.net, &self.t, i, 0.0, self.t_line)
                })
                .fold(0.0, f64::max)
        };
        let open = frost_depth_column(
            self.mesh,
            self.net,
            &self.t,
            self.open_col,
            0.0,
            self.t_line,
        )
        .unwrap_or(0.0);
        (open, deepest(&self.cols), deepest(&self.beside))
    }

    /// Simulate `days` in steps of `step_days` days, each with the forcing averaged over it
    /// (air: the sinusoid's exact mean, or the mean of the measured days; indoor: the mean of the
    /// days' monthly values; snow: that of the step's middle day), recording nothing.
    fn coarse_period(&mut self, days: &[DayIn], step_days: usize) -> Result<()> {
        let case = self.case;
        for chunk in days.chunks(step_days.max(1)) {
            let n = chunk.len() as f64;
            let mid = chunk[chunk.len() / 2];
            self.solver
                .set_extra_horizontal_resistance(OUTDOOR, case.climate.snow_r(mid.month));
            let air = match mid.measured_c {
                Some(_) => chunk.iter().filter_map(|d| d.measured_c).sum::<f64>() / n,
                None => case.climate.mean_over(chunk[0].cal, chunk[0].cal + n),
            };
            let indoor = chunk
                .iter()
                .map(|d| self.indoor_c(d.month, air))
                .sum::<f64>()
                / n;
            let zt = self.zone_temps(indoor, case.climate.surface(air));
            let dt = n * 86400.0;
            self.solver.step(&mut self.h, &zt, dt, self.sim_time)?;
            self.sim_time += dt;
            self.time_steps += 1;
        }
        self.net.temperatures(&self.h, &mut self.t);
        Ok(())
    }

    /// The error of the last period's heat loss against the periodic year, kWh, from its start
    /// state `h0` (conductances of `t0`): see [`RunResult::periodicity_heat_loss_kwh`].
    fn periodicity(&mut self, h0: &[f64], t0: &[f64]) -> Result<f64> {
        let net = self.net;
        let psi = self.solver.zone_weights(t0, INDOOR)?;
        let drift: f64 = (0..net.n)
            .map(|p| psi[p] * net.volume[p] * (self.h[p] - h0[p]))
            .sum();
        Ok(drift * self.case.building.exposed_perimeter_m / 3.6e6)
    }

    /// Simulate `days`, recording everything.
    fn period(
        &mut self,
        days: &[DayIn],
        progress: &mut dyn FnMut(Progress),
        year: usize,
        max_years: usize,
    ) -> Result<Period> {
        let case = self.case;
        let perimeter = case.building.exposed_perimeter_m;
        let dt = case.simulation.dt_s;
        let steps_per_day = (86400.0 / dt).round() as usize;
        let mut rec = Period {
            days: Vec::with_capacity(days.len()),
            probes: vec![Vec::with_capacity(days.len()); case.probes.len()],
            fields: Vec::with_capacity(days.len()),
            field: Field {
                day_of_year: 0,
                t: Vec::new(),
            },
            year: Year {
                heat_loss_kwh: 0.0,
                floor_heat_loss_kwh: 0.0,
                wall_heat_loss_kwh: 0.0,
                wall_above_ground_heat_loss_kwh: 0.0,
                max_frost_beside_wall_m: 0.0,
                max_frost_open_m: 0.0,
                max_frost_footing_m: 0.0,
                energy_balance_error: 0.0,
            },
        };
        let (mut best_foot, mut best_open_winter) = (-1.0f64, -1.0f64);
        let mut open_field = Field {
            day_of_year: 0,
            t: Vec::new(),
        };
        let (mut sum_in, mut sum_abs, mut sum_stored) = (0.0, 0.0, 0.0);
        let mut groups_j = [0.0; 4];
        let mut loss_j = 0.0;
        for (d, day) in days.iter().enumerate() {
            self.solver
                .set_extra_horizontal_resistance(OUTDOOR, case.climate.snow_r(day.month));
            let (mut day_in, mut out_mean) = (0.0, 0.0);
            for s in 0..steps_per_day {
                let air = match day.measured_c {
                    Some(v) => v,
                    None => {
                        let t0 = day.cal + s as f64 * dt / 86400.0;
                        case.climate.mean_over(t0, t0 + dt / 86400.0)
                    }
                };
                out_mean += air / steps_per_day as f64;
                let zt = self.zone_temps(self.indoor_c(day.month, air), case.climate.surface(air));
                let e = self.solver.step(&mut self.h, &zt, dt, self.sim_time)?;
                self.sim_time += dt;
                self.time_steps += 1;
                day_in += e.from_zone[INDOOR];
                for (g, v) in e.by_group.iter().enumerate().take(4) {
                    groups_j[g] += v;
                }
                sum_in += e.from_zone.iter().sum::<f64>();
                sum_abs += e.from_zone.iter().map(|v| v.abs()).sum::<f64>();
                sum_stored += e.stored;
            }
            loss_j += day_in;
            self.net.temperatures(&self.h, &mut self.t);
            let (fo, ff, fw) = self.frost();
            let indoor = self.indoor_c(day.month, out_mean);
            rec.days.push(Day {
                day_of_year: day.doy,
                outdoor_c: out_mean,
                indoor_c: indoor,
                heat_loss_w: day_in / 86400.0 * perimeter,
                frost_open_m: fo,
                frost_footing_m: ff,
                frost_beside_wall_m: fw,
            });
            let grid = grid_field(self.mesh, self.net, &self.t);
            let zt = self.zone_temps(indoor, case.climate.surface(out_mean));
            for (k, p) in case.probes.iter().enumerate() {
                rec.probes[k].push(
                    point_temperature(self.mesh, self.net, &self.t, &zt, p.x_m, p.z_m)
                        .unwrap_or(f64::NAN),
                );
            }
            let y = &mut rec.year;
            y.max_frost_open_m = y.max_frost_open_m.max(fo);
            y.max_frost_beside_wall_m = y.max_frost_beside_wall_m.max(fw);
            if ff > best_foot {
                best_foot = ff;
                if ff > 0.0 {
                    rec.field = Field {
                        day_of_year: day.doy,
                        t: grid.clone(),
                    };
                }
            }
            // Without frost under the footing, the field shown is that of the deepest open-ground
            // frost while the air is still below freezing (the end of the freezing season), not
            // of a late, slowly creeping frozen layer in summer.
            if out_mean < 0.0 && fo > best_open_winter {
                best_open_winter = fo;
                open_field = Field {
                    day_of_year: day.doy,
                    t: grid.clone(),
                };
            }
            rec.fields
                .push(grid.into_iter().map(|v| v as f32).collect());
            progress(Progress {
                year,
                day: d + 1,
                max_years,
            });
        }
        if rec.field.t.is_empty() {
            rec.field = open_field;
        }
        if rec.field.t.is_empty() {
            // No frost at all: show the coldest day's field.
            let k = rec
                .days
                .iter()
                .enumerate()
                .min_by(|a, b| a.1.outdoor_c.total_cmp(&b.1.outdoor_c))
                .map_or(0, |(k, _)| k);
            rec.field = Field {
                day_of_year: rec.days[k].day_of_year,
                t: rec.fields[k].iter().map(|&v| v as f64).collect(),
            };
        }
        let y = &mut rec.year;
        y.heat_loss_kwh = loss_j * perimeter / 3.6e6;
        y.floor_heat_loss_kwh = groups_j[GROUP_FLOOR] * perimeter / 3.6e6;
        y.wall_heat_loss_kwh = groups_j[GROUP_WALL_BELOW] * perimeter / 3.6e6;
        y.wall_above_ground_heat_loss_kwh = groups_j[GROUP_WALL_ABOVE] * perimeter / 3.6e6;
        y.max_frost_footing_m = best_foot.max(0.0);
        y.energy_balance_error = if sum_abs > 0.0 {
            (sum_in - sum_stored) / sum_abs
        } else {
            0.0
        };
        Ok(rec)
    }
}

/// Results of one winter of a measured series.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct WinterResult {
    /// The season 1 July – 30 June, named by the year it starts.
    pub winter: i64,
    /// Air freezing index of the season, °C·d.
    pub freezing_index_c_days: f64,
    /// Deepest frost under the footing, m.
    pub frost_depth_under_footing_m: f64,
    /// Deepest frost in open ground, m.
    pub frost_depth_open_ground_m: f64,
    /// Deepest frost within 0.5 m of the wall, m.
    pub frost_depth_beside_wall_m: f64,
    /// Ground heat loss over the season, kWh.
    pub heat_loss_kwh: f64,
    /// Relative energy-balance error of the season.
    pub energy_balance_error: f64,
}

/// Run `case`: steady state, spin-up, reported year (for a measured series: every complete
/// season after spin-up on the first, the worst winter reported).
///
/// The run executes on a worker of rayon's pool (if not on one already), where the solver's
/// side-by-side factorisation of the two halves (`SolverParams::split_halves`) hands one half to
/// the other worker cheaply; from a foreign thread each fork-join would cost two thread wake-ups
/// (demo, `cargo bench --bench engine`: 2.50 s against 2.76 s medians, alternated runs).
pub fn run(case: &Case, progress: &mut (dyn FnMut(Progress) + Send)) -> Result<RunResult> {
    run_with(case, &RunOptions::default(), progress)
}

/// Solver settings of a run; [`run`] uses the defaults. For tests and benchmarks.
#[derive(Debug, Clone, Default)]
pub struct RunOptions {
    /// The solver's settings.
    pub solver: SolverParams,
    /// Newton iterations and halvings allowed in the coarse first spin-up year, if other than
    /// `solver`'s (max_newton, max_halvings): when a coarse step fails, the run goes on from the
    /// start state without the coarse year.
    pub coarse_limits: Option<(usize, usize)>,
}

/// [`run`] with the given solver settings.
pub fn run_with(
    case: &Case,
    opts: &RunOptions,
    progress: &mut (dyn FnMut(Progress) + Send),
) -> Result<RunResult> {
    if rayon::current_thread_index().is_some() {
        run_here(case, opts, progress)
    } else {
        rayon::scope(|_| run_here(case, opts, progress))
    }
}

fn run_here(
    case: &Case,
    opts: &RunOptions,
    progress: &mut (dyn FnMut(Progress) + Send),
) -> Result<RunResult> {
    let start = std::time::Instant::now();
    let section = Section::from_case(case)?;
    let mesh = section.mesh(case);
    let mut net = Network::new(&mesh);
    assign_groups(&mut net, &mesh);
    let net = net;
    let solver = Solver::new(&net, opts.solver)?;
    let mut drv = Driver {
        case,
        mesh: &mesh,
        net: &net,
        solver,
        h: Vec::new(),
        t: Vec::new(),
        cols: footing_columns(&mesh, case),
        beside: beside_wall_columns(&mesh, case),
        open_col: mesh.grid.nx() - 1,
        t_line: frost_line_c(case),
        sim_time: 0.0,
        time_steps: 0,
    };
    // Steady state at the annual means.
    let zt = drv.zone_temps(
        case.indoor_mean_c(),
        case.climate.surface(case.climate.mean_c),
    );
    let steady = drv.solver.steady(&zt, None)?;
    let steady_heat_loss_w = steady.from_zone[INDOOR] * case.building.exposed_perimeter_m;
    // Start state: the steady state for a ground-surface mean lowered by the thermal offset of
    // freezing ground, T = (k_u I_t − k_f I_f)/(k_u P) (Kudryavtsev-type thermal-offset estimate,
    // from memory of the frozen-ground literature; it equals the mean when k_f = k_u). Frozen
    // ground conducts better, so the periodic state is colder at depth than the air mean; starting
    // there shortens the spin-up. The periodicity test, not this estimate, decides the result.
    let t_start = thermal_offset_start(case);
    let start_t = match t_start {
        Some(ts) => {
            drv.solver
                .steady(&drv.zone_temps(case.indoor_mean_c(), ts), Some(&steady.t))?
                .t
        }
        None => steady.t.clone(),
    };
    drv.h = net.enthalpies(&start_t);
    drv.t = start_t;

    // The days of the spin-up year and of the seasons after it.
    let (spin_days, seasons): (Vec<DayIn>, Vec<(i64, Vec<DayIn>)>) = match &case.climate.source {
        ClimateSource::Sinusoid => {
            // Start at the beginning of the day holding the warmest time of the year.
            let day0 = (case.climate.coldest_day - 0.5 + 182.5)
                .rem_euclid(365.0)
                .floor();
            let days = (0..365)
                .map(|d| {
                    let cal = day0 + d as f64;
                    DayIn {
                        cal,
                        doy: (cal as usize % 365) + 1,
                        month: month_of(cal + 0.5),
                        measured_c: None,
                    }
                })
                .collect();
            (days, Vec::new())
        }
        ClimateSource::Series(s) => {
            use crate::physics::climate::{civil_from_days, day_of_year, days_from_civil};
            let day = |k: usize| {
                let dn = s.day(k);
                let (_, m, _) = civil_from_days(dn);
                DayIn {
                    cal: 0.0,
                    doy: day_of_year(dn) as usize,
                    month: m as usize - 1,
                    measured_c: Some(s.values[k]),
                }
            };
            let (y0, _, _) = civil_from_days(s.first_day);
            let (y1, _, _) = civil_from_days(s.day(s.values.len() - 1));
            let mut seasons = Vec::new();
            for y in y0 - 1..=y1 {
                let a = days_from_civil(y, 7, 1) - s.first_day;
                let b = days_from_civil(y + 1, 7, 1) - s.first_day;
                if a >= 0 && b as usize <= s.values.len() {
                    seasons.push((y, (a as usize..b as usize).map(day).collect::<Vec<_>>()));
                }
            }
            if seasons.is_empty() {
                return Err(crate::error::Error::Input {
                    location: crate::error::Location::file_only(&s.source),
                    key: "climate.series".into(),
                    message: "no complete season (1 July to 30 June) in the series; allowed: at least one".into(),
                });
            }
            (seasons[0].1.clone(), seasons)
        }
    };

    // A first, cheap spin-up year in steps of several days: starting from the steady state, the
    // first daily year is otherwise off by the missing annual wave (demo: 1.4 % in heat loss);
    // after this year it is within 0.05 % of the periodic state, so the periodicity test can pass
    // one daily year sooner. Its steps are counted in `time_steps`; it is not recorded.
    // If its long steps do not converge, the run goes on from the start state without it.
    let mut coarse_spin_up_years = usize::from(case.simulation.coarse_year_step_days > 0);
    if coarse_spin_up_years > 0 {
        let (h0, t0, steps0, time0) = (drv.h.clone(), drv.t.clone(), drv.time_steps, drv.sim_time);
        if let Some((newton, halvings)) = opts.coarse_limits {
            (drv.solver.params.max_newton, drv.solver.params.max_halvings) = (newton, halvings);
        }
        let coarse = drv.coarse_period(&spin_days, case.simulation.coarse_year_step_days);
        drv.solver.params = opts.solver;
        if coarse.is_err() {
            (drv.h, drv.t, drv.time_steps, drv.sim_time) = (h0, t0, steps0, time0);
            coarse_spin_up_years = 0;
        }
    }
    let max_years = case.simulation.max_spin_up_years + 1;
    let total = max_years + seasons.len();
    let mut years: Vec<Year> = Vec::new();
    let mut converged = false;
    let mut last;
    let mut year_start;
    loop {
        year_start = (drv.h.clone(), drv.t.clone());
        let p = drv.period(&spin_days, progress, years.len(), total)?;
        if let Some(prev) = years.last() {
            let dq = (p.year.heat_loss_kwh - prev.heat_loss_kwh).abs()
                / prev.heat_loss_kwh.abs().max(1e-9);
            let df = (p.year.max_frost_footing_m - prev.max_frost_footing_m)
                .abs()
                .max((p.year.max_frost_open_m - prev.max_frost_open_m).abs());
            converged = dq < SPIN_UP_HEAT_TOL
                && df < SPIN_UP_FROST_TOL_M
                && years.len() >= case.simulation.min_spin_up_years;
        }
        years.push(p.year.clone());
        last = p;
        if converged || years.len() >= max_years {
            break;
        }
    }
    // For a design year, the reported year is the last spin-up year, which ended just now.
    let periodicity = if seasons.is_empty() {
        Some(drv.periodicity(&year_start.0, &year_start.1)?)
    } else {
        None
    };
    let mut spin_up_years = years.len() - 1;
    let mut winters = Vec::new();
    let mut reported = years.len() - 1;
    if !seasons.is_empty() {
        // The spin-up ends with the first season; the series then runs through from its start.
        spin_up_years = years.len();
        let mut worst: Option<(f64, f64, Period)> = None;
        for (y, days) in &seasons {
            let p = drv.period(days, progress, years.len(), total)?;
            let fi = crate::physics::climate::max_rise(
                days.iter().map(|d| -d.measured_c.unwrap_or(0.0)),
            );
            winters.push(WinterResult {
                winter: *y,
                freezing_index_c_days: fi,
                frost_depth_under_footing_m: p.year.max_frost_footing_m,
                frost_depth_open_ground_m: p.year.max_frost_open_m,
                frost_depth_beside_wall_m: p.year.max_frost_beside_wall_m,
                heat_loss_kwh: p.year.heat_loss_kwh,
                energy_balance_error: p.year.energy_balance_error,
            });
            years.push(p.year.clone());
            let key = (p.year.max_frost_footing_m, p.year.max_frost_open_m);
            if worst.as_ref().is_none_or(|w| key > (w.0, w.1)) {
                reported = years.len() - 1;
                worst = Some((key.0, key.1, p));
            }
        }
        last = worst.expect("at least one season").2;
    }
    let stats = drv.solver.stats();
    let time_steps = drv.time_steps;
    Ok(RunResult {
        days: last.days,
        probes: last.probes,
        years,
        reported,
        spin_up_years,
        coarse_spin_up_years,
        periodicity_heat_loss_kwh: periodicity,
        winters,
        spin_up_converged: converged,
        field: last.field,
        steady_heat_loss_w,
        stats,
        time_steps,
        cross_check: cross_check(case),
        wall_time_s: start.elapsed().as_secs_f64(),
        mesh: mesh.clone(),
        section,
        daily_fields: last.fields,
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
