//! From the steady start to the reported period: the start state (steady state at a surface mean
//! lowered by the thermal offset of freezing ground), one cheap spin-up year in steps of several
//! days, then design years in daily steps until consecutive years agree (or, for a measured
//! series, its first season and then every season in order).
use super::driver::{Driver, Period};
use super::forcing::{self, DayIn};
use super::result::{Progress, WinterResult, Year};
use super::{RunOptions, SPIN_UP_FROST_TOL_M, SPIN_UP_HEAT_TOL};
use crate::case::Case;
use crate::error::{Error, InputKind, Result};
use crate::geometry::INDOOR;
use crate::methods;

/// The thermal-offset surface mean of the top stratum for the sinusoidal (surface) climate, °C,
/// or None without freezing: T = (k_u I_t − k_f I_f)/(k_u P) (Kudryavtsev-type thermal-offset
/// estimate, the TTOP model of Smith & Riseborough 2002; it equals the mean when k_f = k_u).
/// Frozen ground conducts better, so the periodic state is colder at depth than the air mean;
/// starting there shortens the spin-up. The periodicity test, not this estimate, decides the
/// result.
pub fn thermal_offset_start(case: &Case) -> Option<f64> {
    let cl = &case.climate;
    let m = &case.strata[0].material;
    let p = 365.0;
    let (i_f_air, _) = methods::sinusoid_freezing_index(cl.mean_c, cl.amplitude_k);
    if i_f_air <= 0.0 || !m.freezes() {
        return None;
    }
    let i_t_air = i_f_air + cl.mean_c * p;
    Some(methods::thermal_offset_mean(
        m.k_unfrozen,
        m.k_frozen,
        cl.n_thawing * i_t_air,
        cl.n_freezing * i_f_air,
    ))
}

/// Set the driver's state to the start state; returns the steady heat loss at the annual means
/// (W, whole building).
pub fn start(drv: &mut Driver) -> Result<f64> {
    let case = drv.case;
    let indoor = case.indoor_mean_c();
    let zt = forcing::zone_temps(
        case,
        indoor,
        forcing::surface(&case.climate, case.climate.mean_c),
    );
    let steady = drv.solver.steady(&zt, None)?;
    let steady_heat_loss_w = steady.from_zone[INDOOR] * case.building.exposed_perimeter_m;
    let start_t = match thermal_offset_start(case) {
        Some(ts) => {
            drv.solver
                .steady(&forcing::zone_temps(case, indoor, ts), Some(&steady.t))?
                .t
        }
        None => steady.t,
    };
    drv.h = drv.net.enthalpies(&start_t);
    drv.t = start_t;
    Ok(steady_heat_loss_w)
}

/// A first, cheap spin-up year in steps of several days: starting from the steady state, the
/// first daily year is otherwise off by the missing annual wave (demo: 1.4 % in heat loss); after
/// this year it is within 0.05 % of the periodic state, so the periodicity test can pass one daily
/// year sooner. Its steps are counted in `time_steps`; it is not recorded. If its long steps do
/// not converge, the run goes on from the start state without it. Returns the years run (0 or 1).
pub fn coarse_year(drv: &mut Driver, days: &[DayIn], opts: &RunOptions) -> usize {
    let step_days = drv.case.simulation.coarse_year_step_days;
    if step_days == 0 {
        return 0;
    }
    let saved = (drv.h.clone(), drv.t.clone(), drv.time_steps, drv.sim_time);
    let mut params = opts.solver;
    if let Some((newton, halvings)) = opts.coarse_limits {
        (params.max_newton, params.max_halvings) = (newton, halvings);
    }
    if drv.coarse_period(days, step_days, &params).is_err() {
        (drv.h, drv.t, drv.time_steps, drv.sim_time) = saved;
        return 0;
    }
    1
}

/// What the spin-up ends with.
pub struct SpinUp {
    /// Every year run (the last is the periodic one).
    pub years: Vec<Year>,
    /// The last year's records.
    pub last: Period,
    /// Whether the spin-up criterion was met.
    pub converged: bool,
    /// A sinusoidal climate: the last year's heat loss minus the periodic year's, estimated from
    /// its start and end states, kWh (see `RunResult::periodicity_heat_loss_kwh`).
    pub periodicity_kwh: Option<f64>,
}

/// Repeat `days` until the year is periodic, or the case's maximum is reached (after at least
/// the case's minimum). Periodic means: the largest frost depths and the frost margin changed
/// less than [`SPIN_UP_FROST_TOL_M`] from the previous year, and the annual heat loss is within
/// [`SPIN_UP_HEAT_TOL`] of the periodic year's by the periodicity estimate (a sinusoidal
/// climate; the estimate is the one reported) or of the previous year's (a series' first
/// season). The periodic year's soil must thaw everywhere (else: permafrost, an error).
pub fn spin_up(
    drv: &mut Driver,
    days: &[DayIn],
    progress: &mut dyn FnMut(Progress),
    total_years: usize,
) -> Result<SpinUp> {
    let sim = &drv.case.simulation;
    let (min_years, max_years) = (sim.min_spin_up_years, sim.max_spin_up_years + 1);
    let series = days.first().is_some_and(|d| d.measured_c.is_some());
    let mut years: Vec<Year> = Vec::new();
    loop {
        let year_start = (drv.h.clone(), drv.t.clone());
        let p = drv.period(days, progress, (years.len(), total_years))?;
        let y = &p.year;
        let (heat_ok, est) = if series {
            let ok = years.last().is_some_and(|prev| {
                (y.heat_loss_kwh - prev.heat_loss_kwh).abs()
                    < SPIN_UP_HEAT_TOL * prev.heat_loss_kwh.abs().max(1e-9)
            });
            (ok, None)
        } else {
            let est = periodicity(drv, &year_start)?;
            // The year's gross heat exchange through the building's faces, kWh (equal to the
            // annual loss when the floor loses heat every day; not near zero for an unheated
            // building, whose net loss is).
            let gross: f64 = p
                .days
                .iter()
                .map(|d| d.heat_loss_w.abs() * 24.0 / 1000.0)
                .sum();
            (est.abs() < SPIN_UP_HEAT_TOL * gross.max(1e-9), Some(est))
        };
        let frost_ok = years.last().is_some_and(|prev| {
            let d = [
                y.max_frost_open_m - prev.max_frost_open_m,
                y.max_frost_face_m - prev.max_frost_face_m,
                y.max_frost_footing_m - prev.max_frost_footing_m,
                y.min_frost_margin_m - prev.min_frost_margin_m,
            ];
            d.iter().all(|v| v.abs() < SPIN_UP_FROST_TOL_M)
        });
        let converged = heat_ok && frost_ok && years.len() >= min_years;
        years.push(p.year.clone());
        if converged || years.len() >= max_years {
            if let Some(z) = p.never_thawed_m {
                return Err(Error::in_file(&drv.case.file, "climate", InputKind::OutOfScope, format!(
                    "ground down to z = {z:.2} m stays frozen through the whole periodic year: a frozen layer that does not thaw (permafrost); allowed: ground that thaws every year")));
            }
            return Ok(SpinUp {
                years,
                last: p,
                converged,
                periodicity_kwh: est,
            });
        }
    }
}

/// The error of the last period's heat loss against the periodic year, kWh, from its start state
/// `h0` (conductances of `t0`): see `RunResult::periodicity_heat_loss_kwh`.
pub fn periodicity(drv: &mut Driver, (h0, t0): &(Vec<f64>, Vec<f64>)) -> Result<f64> {
    let net = drv.net;
    let psi = drv.solver.zone_weights(t0, INDOOR)?;
    let drift: f64 = (0..net.n)
        .map(|p| psi[p] * net.volume[p] * (drv.h[p] - h0[p]))
        .sum();
    Ok(drift * drv.case.building.exposed_perimeter_m / 3.6e6)
}

/// Every season of a measured series in order after the spin-up; returns the winters' results,
/// the years, and the worst season's records (least frost margin, then deepest frost in open
/// ground) with its index among the seasons.
pub fn seasons(
    drv: &mut Driver,
    seasons: &[(i64, Vec<DayIn>)],
    progress: &mut dyn FnMut(Progress),
    (first_year, total_years): (usize, usize),
) -> Result<(Vec<WinterResult>, Vec<Year>, Period, usize)> {
    let mut winters = Vec::new();
    let mut years = Vec::new();
    let mut worst: Option<(f64, f64, Period, usize)> = None;
    for (k, (y, days)) in seasons.iter().enumerate() {
        let p = drv.period(days, progress, (first_year + k, total_years))?;
        let fi =
            crate::physics::climate::max_rise(days.iter().map(|d| -d.measured_c.unwrap_or(0.0)));
        winters.push(WinterResult {
            winter: *y,
            freezing_index_c_days: fi,
            frost_margin_m: p.year.min_frost_margin_m,
            frost_depth_under_footing_m: p.year.max_frost_footing_m,
            frost_depth_open_ground_m: p.year.max_frost_open_m,
            frost_depth_beside_wall_m: p.year.max_frost_beside_wall_m,
            heat_loss_kwh: p.year.heat_loss_kwh,
            energy_balance_error: p.year.energy_balance_error,
        });
        years.push(p.year.clone());
        // The worst season: the least frost margin, then the deepest open-ground frost.
        let key = (-p.year.min_frost_margin_m, p.year.max_frost_open_m);
        if worst.as_ref().is_none_or(|w| key > (w.0, w.1)) {
            worst = Some((key.0, key.1, p, k));
        }
    }
    let (_, _, period, k) = worst.expect("validation guarantees at least one season");
    Ok((winters, years, period, k))
}
