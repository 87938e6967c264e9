//! The time loop: a run's state (enthalpies, temperatures) advanced day by day under the forcing,
//! recording the daily heat loss, frost depths, probe temperatures and fields of a period (a year
//! or a season), with the energy balance of every step.
use super::forcing::{self, DayIn};
use super::frost::FrostMeasures;
use super::result::{Day, Progress, Year};
use super::{GROUP_FLOOR, GROUP_WALL_BELOW};
use crate::analysis::frost_scalar;
use crate::case::Case;
use crate::error::{Error, InputKind, Result};
use crate::geometry::{INDOOR, OUTDOOR};
use crate::solver::{Network, Solver, SolverParams, StepEnergy};

/// What a model (a 2D section or a 3D building) observes of its state each day.
pub trait Observer {
    /// What the observer keeps of a period for the outputs (fields, maps, profiles).
    type Kept;
    /// The frost-line temperature, °C.
    fn t_line(&self) -> f64;
    /// The day's frost measures of the state `t` (°C of the unknowns); a 3D model gives its worst
    /// point and may accumulate more.
    fn measure(&mut self, net: &Network, t: &[f64]) -> FrostMeasures;
    /// Probe temperatures (°C) for the zone temperatures `zone_t`.
    fn probes(&self, net: &Network, t: &[f64], zone_t: &[f64]) -> Vec<f64>;
    /// z of the bottom face of unknown `p`'s cell (m), and whether it lies in the grid's bottom
    /// layer.
    fn cell_bottom(&self, net: &Network, p: usize) -> (f64, bool);
    /// Day `d` of `days` is over; `design_day` tells whether it is the least-margin day so far.
    fn keep(
        &mut self,
        d: usize,
        days: usize,
        net: &Network,
        t: &[f64],
        design_day: bool,
        doy: usize,
    );
    /// The period is over: what was kept, and a fresh start for the next period.
    fn finish(&mut self) -> Self::Kept;
}

/// The records of one simulated period (a year or a season).
pub struct Period<K> {
    /// Every day.
    pub days: Vec<Day>,
    /// Probe temperatures per day (probe-major), °C.
    pub probes: Vec<Vec<f64>>,
    /// What the observer kept.
    pub kept: K,
    /// The period's totals.
    pub year: Year,
    /// The deepest soil that stayed frozen on every day of the period, m (None: all thawed).
    pub never_thawed_m: Option<f64>,
}

/// The state and fixed data of a run.
pub struct Driver<'a, O: Observer> {
    /// The case.
    pub case: &'a Case,
    /// Its network.
    pub net: &'a Network,
    /// The solver.
    pub solver: Solver<'a>,
    /// Enthalpy of each unknown, J/m³.
    pub h: Vec<f64>,
    /// Temperature of each unknown, °C.
    pub t: Vec<f64>,
    /// What the model observes each day.
    pub obs: O,
    /// Σ U_w Δz of the model's wall above ground and of the stated wall, W/K per unit of the
    /// model (see [`super::split`]).
    pub wall_1d: (f64, f64),
    /// Whole-building figures per unit of the model's flows: the exposed perimeter for a 2D
    /// section (per metre), 4 for a quarter of a building.
    pub scale: f64,
    /// Simulated time, s.
    pub sim_time: f64,
    /// Time steps taken.
    pub time_steps: usize,
}

/// Sums over a period: heat from the zones, stored heat, heat by boundary group, J/m.
#[derive(Default)]
struct Sums {
    from_zones: f64,
    boundary_abs: f64,
    stored: f64,
    groups: [f64; 4],
    indoor: f64,
    /// The 1D part of the model's wall above ground, and of the stated wall, J/m.
    wall_model: f64,
    wall_stated: f64,
}

impl Sums {
    fn add(&mut self, e: &StepEnergy) {
        for (g, v) in e.by_group.iter().enumerate().take(4) {
            self.groups[g] += v;
        }
        self.from_zones += e.from_zone.iter().sum::<f64>();
        self.boundary_abs += e.boundary_abs;
        self.stored += e.stored;
        self.indoor += e.from_zone[INDOOR];
    }
}

/// The least throughput the energy balance is normalised by, J per metre of section: below it
/// (a section at equilibrium) the relative error is residual / 1 kJ.
pub const ENERGY_FLOOR_J_PER_M: f64 = 1e3;

impl<O: Observer> Driver<'_, O> {
    /// Simulate `days` in steps of `step_days` days with `params`, each with the forcing averaged
    /// over it (air: the sinusoid's exact mean, or the mean of the measured days; indoor: the
    /// mean of the days' monthly values; snow: that of the step's middle day), recording nothing.
    pub fn coarse_period(
        &mut self,
        days: &[DayIn],
        step_days: usize,
        params: &SolverParams,
    ) -> Result<()> {
        let case = self.case;
        let cl = &case.climate;
        for chunk in days.chunks(step_days.max(1)) {
            let n = chunk.len() as f64;
            let mid = chunk[chunk.len() / 2];
            self.solver
                .set_extra_horizontal_resistance(OUTDOOR, forcing::snow_r(cl, mid.month));
            let air = match mid.measured_c {
                Some(_) => chunk.iter().filter_map(|d| d.measured_c).sum::<f64>() / n,
                None => forcing::mean_over_with(
                    cl,
                    chunk[0].cold_amplitude_k,
                    chunk[0].cal,
                    chunk[0].cal + n,
                ),
            };
            let indoor = chunk
                .iter()
                .map(|d| forcing::indoor_c(case, d.month, air))
                .sum::<f64>()
                / n;
            let zt = forcing::zone_temps(case, indoor, forcing::surface(cl, air));
            let dt = n * 86400.0;
            self.solver
                .step_with(&mut self.h, &zt, dt, self.sim_time, params)?;
            self.sim_time += dt;
            self.time_steps += 1;
        }
        self.net.temperatures(&self.h, &mut self.t);
        Ok(())
    }

    /// Simulate `days`, recording everything. Frost at the domain bottom is out of scope (an
    /// error).
    pub fn period(
        &mut self,
        days: &[DayIn],
        progress: &mut dyn FnMut(Progress),
        (year, max_years): (usize, usize),
    ) -> Result<Period<O::Kept>> {
        let mut days_out = Vec::with_capacity(days.len());
        let mut probes = vec![Vec::with_capacity(days.len()); self.case.probes.len()];
        let mut sums = Sums::default();
        let mut best = f64::INFINITY;
        let mut thawed = vec![false; self.net.n];
        for (d, day) in days.iter().enumerate() {
            let (day_in, out_mean) = self.step_day(day, &mut sums)?;
            let rec = self.record_day(day, day_in, out_mean, &mut probes);
            self.check_bottom(year, day)?;
            self.mark_thawed(&mut thawed);
            let design_day = rec.frost_margin_m < best;
            best = best.min(rec.frost_margin_m);
            self.obs
                .keep(d, days.len(), self.net, &self.t, design_day, day.doy);
            days_out.push(rec);
            progress(Progress {
                year,
                day: d + 1,
                max_years,
            });
        }
        let year = self.totals(&days_out, &sums);
        Ok(Period {
            days: days_out,
            probes,
            kept: self.obs.finish(),
            year,
            never_thawed_m: self.never_thawed(&thawed),
        })
    }

    /// Frozen ground in the grid's bottom layer: the frost reached the domain's bottom.
    fn check_bottom(&self, year: usize, day: &DayIn) -> Result<()> {
        let t_line = self.obs.t_line();
        let frozen = (0..self.net.n).find(|&p| {
            self.obs.cell_bottom(self.net, p).1
                && frost_scalar(&self.net.materials[self.net.mat[p]], self.t[p]) <= t_line
        });
        if let Some(p) = frozen {
            return Err(Error::in_file(&self.case.file, "simulation.domain_depth_m", InputKind::OutOfScope, format!(
                "frost reached the bottom of the domain (z = {:.1} m) on day {} of simulated year {}: the ground freezes deeper than the model covers (permafrost, or a climate too cold for a seasonal-frost model); allowed: frost above the domain bottom",
                self.obs.cell_bottom(self.net, p).0, day.doy, year + 1)));
        }
        Ok(())
    }

    /// Mark the unknowns above the frost line (thawed) today.
    fn mark_thawed(&self, thawed: &mut [bool]) {
        for (p, th) in thawed.iter_mut().enumerate() {
            if !*th
                && frost_scalar(&self.net.materials[self.net.mat[p]], self.t[p]) > self.obs.t_line()
            {
                *th = true;
            }
        }
    }

    /// The deepest freezing material that stayed frozen on every day, m.
    fn never_thawed(&self, thawed: &[bool]) -> Option<f64> {
        (0..self.net.n)
            .filter(|&p| !thawed[p] && self.net.materials[self.net.mat[p]].freezes())
            .map(|p| self.obs.cell_bottom(self.net, p).0)
            .reduce(f64::max)
    }

    /// The steps of one day; returns the ground heat loss (heat from the indoor air minus the 1D
    /// part of the wall above ground, J/m) and the mean air temperature (°C).
    fn step_day(&mut self, day: &DayIn, sums: &mut Sums) -> Result<(f64, f64)> {
        let case = self.case;
        let cl = &case.climate;
        let dt = case.simulation.dt_s;
        let steps_per_day = (86400.0 / dt).round() as usize;
        self.solver
            .set_extra_horizontal_resistance(OUTDOOR, forcing::snow_r(cl, day.month));
        let (mut day_in, mut out_mean) = (0.0, 0.0);
        for s in 0..steps_per_day {
            let air = match day.measured_c {
                Some(v) => v,
                None => {
                    let t0 = day.cal + s as f64 * dt / 86400.0;
                    forcing::mean_over_with(cl, day.cold_amplitude_k, t0, t0 + dt / 86400.0)
                }
            };
            out_mean += air / steps_per_day as f64;
            let zt = forcing::zone_temps(
                case,
                forcing::indoor_c(case, day.month, air),
                forcing::surface(cl, air),
            );
            let e = self.solver.step(&mut self.h, &zt, dt, self.sim_time)?;
            self.sim_time += dt;
            self.time_steps += 1;
            let dtheta = (zt[INDOOR] - zt[OUTDOOR]) * dt;
            day_in += e.from_zone[INDOOR] - self.wall_1d.0 * dtheta;
            sums.add(&e);
            sums.wall_model += self.wall_1d.0 * dtheta;
            sums.wall_stated += self.wall_1d.1 * dtheta;
        }
        self.net.temperatures(&self.h, &mut self.t);
        Ok((day_in, out_mean))
    }

    /// The day's record (frost depths at the end of the day) and its probe temperatures.
    fn record_day(
        &mut self,
        day: &DayIn,
        day_in: f64,
        out_mean: f64,
        probes: &mut [Vec<f64>],
    ) -> Day {
        let case = self.case;
        let f = self.obs.measure(self.net, &self.t);
        let indoor = forcing::indoor_c(case, day.month, out_mean);
        let zt = forcing::zone_temps(case, indoor, forcing::surface(&case.climate, out_mean));
        for (k, v) in self
            .obs
            .probes(self.net, &self.t, &zt)
            .into_iter()
            .enumerate()
        {
            probes[k].push(v);
        }
        Day {
            day_of_year: day.doy,
            date: day.date,
            outdoor_c: out_mean,
            indoor_c: indoor,
            heat_loss_w: day_in / 86400.0 * self.scale,
            frost_open_m: f.open_m,
            frost_top_open_m: f.open_top_m,
            frost_face_m: f.at_face_m,
            frost_top_face_m: f.at_face_top_m,
            frost_footing_m: f.under_footing_m,
            frost_beside_wall_m: f.beside_wall_m,
            frost_corner_distance_m: f.corner_distance_m,
            frost_margin_m: f.margin_m,
        }
    }

    /// The period's totals (whole building, kWh) and its energy balance.
    fn totals(&self, days: &[Day], sums: &Sums) -> Year {
        let scale = self.scale;
        let to_kwh = |j: f64| j * scale / 3.6e6;
        let max = |f: fn(&Day) -> f64| days.iter().map(f).fold(0.0, f64::max);
        Year {
            heat_loss_kwh: to_kwh(sums.indoor - sums.wall_model),
            floor_heat_loss_kwh: to_kwh(sums.groups[GROUP_FLOOR]),
            wall_heat_loss_kwh: to_kwh(sums.groups[GROUP_WALL_BELOW]),
            wall_above_ground_heat_loss_kwh: to_kwh(sums.wall_stated),
            max_frost_beside_wall_m: max(|d| d.frost_beside_wall_m),
            max_frost_open_m: max(|d| d.frost_open_m),
            max_frost_footing_m: max(|d| d.frost_footing_m),
            max_frost_face_m: max(|d| d.frost_face_m),
            min_frost_margin_m: days
                .iter()
                .map(|d| d.frost_margin_m)
                .fold(f64::INFINITY, f64::min),
            energy_balance_error: (sums.from_zones - sums.stored)
                / sums.boundary_abs.max(ENERGY_FLOOR_J_PER_M),
        }
    }
}
