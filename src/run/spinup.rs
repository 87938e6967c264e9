//! From the steady start to the reported period: the start state (steady state at a surface mean
//! lowered by the thermal offset of freezing ground), one cheap spin-up year in steps of several
//! days, then design years in daily steps until consecutive years agree (or, for a measured
//! series, its first season and then every season in order).
use super::driver::{Driver, Observer, Period};
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

/// The steady heat loss at the annual means, W (whole building).
fn steady_loss<O: Observer>(drv: &mut Driver<O>) -> Result<f64> {
    let case = drv.case;
    let zt = forcing::zone_temps(
        case,
        case.indoor_mean_c(),
        forcing::surface(&case.climate, case.climate.mean_c),
    );
    Ok(drv.solver.steady(&zt, None)?.from_zone[INDOOR] * drv.scale)
}

/// Set the driver's state to the start state; returns the steady heat loss at the annual means
/// (W, whole building).
pub fn start<O: Observer>(drv: &mut Driver<O>) -> Result<f64> {
    let case = drv.case;
    let indoor = case.indoor_mean_c();
    let zt = forcing::zone_temps(
        case,
        indoor,
        forcing::surface(&case.climate, case.climate.mean_c),
    );
    let steady = drv.solver.steady(&zt, None)?;
    let steady_heat_loss_w = steady.from_zone[INDOOR] * drv.scale;
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
pub fn coarse_year<O: Observer>(drv: &mut Driver<O>, days: &[DayIn], opts: &RunOptions) -> usize {
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
pub struct SpinUp<K> {
    /// Every year run (the last is the periodic one).
    pub years: Vec<Year>,
    /// The last year's records.
    pub last: Period<K>,
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
pub fn spin_up<O: Observer>(
    drv: &mut Driver<O>,
    days: &[DayIn],
    progress: &mut dyn FnMut(Progress),
    total_years: usize,
) -> Result<SpinUp<O::Kept>> {
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
pub fn periodicity<O: Observer>(
    drv: &mut Driver<O>,
    (h0, t0): &(Vec<f64>, Vec<f64>),
) -> Result<f64> {
    let net = drv.net;
    let psi = drv.solver.zone_weights(t0, INDOOR)?;
    let drift: f64 = (0..net.n)
        .map(|p| psi[p] * net.volume[p] * (drv.h[p] - h0[p]))
        .sum();
    Ok(drift * drv.scale / 3.6e6)
}

/// The seasons of a measured series: each winter's results, each year, the worst season's
/// records and its index among the seasons.
pub struct Seasons<K> {
    /// Each winter's results.
    pub winters: Vec<WinterResult>,
    /// Each season's totals.
    pub years: Vec<Year>,
    /// The worst season's records (least frost margin, then deepest frost in open ground).
    pub worst: Period<K>,
    /// Its index among the seasons.
    pub index: usize,
}

/// Every season of a measured series in order after the spin-up.
pub fn seasons<O: Observer>(
    drv: &mut Driver<O>,
    seasons: &[(i64, Vec<DayIn>)],
    progress: &mut dyn FnMut(Progress),
    (first_year, total_years): (usize, usize),
) -> Result<Seasons<O::Kept>> {
    let mut winters = Vec::new();
    let mut years = Vec::new();
    let mut worst: Option<(f64, f64, Period<O::Kept>, usize)> = None;
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
    let (_, _, worst, index) = worst.expect("validation guarantees at least one season");
    Ok(Seasons {
        winters,
        years,
        worst,
        index,
    })
}

/// What a whole run simulated: every year, the reported period and the numerical record.
pub struct Simulated<K> {
    /// Every simulated year, spin-up first (for a series: then every season; with a design
    /// winter: then its year).
    pub years: Vec<Year>,
    /// The reported period's records.
    pub last: Period<K>,
    /// Index into `years` of the reported period.
    pub reported: usize,
    /// Spin-up years before the reported period.
    pub spin_up_years: usize,
    /// Extra first spin-up years in steps of several days (0 or 1).
    pub coarse_spin_up_years: usize,
    /// The normal year's days and index when a design winter was run after it.
    pub normal: Option<(Vec<super::result::Day>, usize)>,
    /// Every winter of a measured series.
    pub winters: Vec<WinterResult>,
    /// Whether the spin-up criterion was met.
    pub converged: bool,
    /// The periodicity estimate of the reported normal year, kWh (sinusoidal climates).
    pub periodicity_kwh: Option<f64>,
    /// Steady heat loss at the annual means, W (whole building).
    pub steady_heat_loss_w: f64,
    /// Temperatures of the unknowns at the end of the spin-up, °C: the periodic state at the
    /// start of the spin-up year (the seed of a 3D run).
    pub spin_up_state: Vec<f64>,
}

/// Run the case's schedule on `drv`: start state, coarse year, spin-up to a periodic year, then
/// the design winter once, or every season of a measured series. With `seed` (temperatures of the
/// unknowns, °C: a periodic state at the start of the spin-up year mapped from another model)
/// the run starts there, without the coarse year.
pub fn simulate<O: Observer>(
    drv: &mut Driver<O>,
    opts: &RunOptions,
    progress: &mut dyn FnMut(Progress),
    seed: Option<Vec<f64>>,
) -> Result<Simulated<O::Kept>> {
    let case = drv.case;
    let sched = forcing::schedule(case);
    let (steady_heat_loss_w, coarse_spin_up_years) = match seed {
        None => {
            let w = start(drv)?;
            (w, coarse_year(drv, &sched.spin, opts))
        }
        Some(t) => {
            let w = steady_loss(drv)?;
            drv.h = drv.net.enthalpies(&t);
            drv.t = t;
            (w, 0)
        }
    };
    let total = case.simulation.max_spin_up_years
        + 1
        + sched.seasons.len()
        + usize::from(sched.design.is_some());
    let spin = spin_up(drv, &sched.spin, progress, total)?;
    let spin_up_state = drv.t.clone();
    let mut years = spin.years;
    let n = years.len();
    let mut normal = None;
    let (last, reported, spin_up_years, winters) = if let Some(design) = &sched.design {
        // The design winter, once, from the periodic state of the normal climate.
        let p = drv.period(design, progress, (n, total))?;
        years.push(p.year.clone());
        normal = Some((spin.last.days, n - 1));
        (p, n, n, Vec::new())
    } else if sched.seasons.is_empty() {
        // The reported year is the last spin-up year.
        (spin.last, n - 1, n - 1, Vec::new())
    } else {
        // The spin-up ends with the first season; the series then runs through from its start.
        let s = seasons(drv, &sched.seasons, progress, (n, total))?;
        years.extend(s.years);
        (s.worst, n + s.index, n, s.winters)
    };
    Ok(Simulated {
        years,
        last,
        reported,
        spin_up_years,
        coarse_spin_up_years,
        normal,
        winters,
        converged: spin.converged,
        periodicity_kwh: spin.periodicity_kwh,
        steady_heat_loss_w,
        spin_up_state,
    })
}
