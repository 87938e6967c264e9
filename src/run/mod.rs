//! A whole run of the foundation model: steady start at the annual means, spin-up to a periodic
//! design year (or through a measured series), and the records of the reported period.
//!
//! - [`forcing`]: outdoor and indoor temperatures, n-factors, snow, the days to simulate;
//! - [`driver`]: the time loop with its records and energy balance;
//! - [`spinup`]: start state, spin-up, periodicity estimate, the seasons of a series;
//! - [`result`]: what a run produces; [`mod@headline`]: the numbers a user designs with;
//! - [`steady`]: steady heat flows of a section (for verification and estimates).
pub mod driver;
pub mod forcing;
pub mod frost;
pub mod headline;
pub mod result;
pub mod spinup;
pub mod split;
pub mod steady;

pub use frost::{frost_line_c, FrostLines, ProtectedZone};
pub use headline::{basement_values, headline, BasementValues, Headline};
pub use result::{Day, Field, Progress, RunResult, WinterResult, Year};
pub use split::HeatSplit;
pub use steady::{steady_flows, steady_heat_flow};

use crate::case::Case;
use crate::error::Result;
use crate::geometry::{Section, INDOOR};
use crate::mesh::Mesh;
use crate::solver::network::Side;
use crate::solver::{Network, Solver, SolverParams};
use driver::Driver;
use ndarray::Array2;

/// Boundary-face reporting group: the indoor faces of the floor.
pub const GROUP_FLOOR: usize = 1;
/// … the indoor faces of the wall below ground level.
pub const GROUP_WALL_BELOW: usize = 2;
/// … the indoor faces of the wall above ground level.
pub const GROUP_WALL_ABOVE: usize = 3;

/// Spin-up stops when the annual heat loss changes less than this fraction between years.
pub const SPIN_UP_HEAT_TOL: f64 = 0.005;
/// … and the maximum frost depths change less than this, m.
pub const SPIN_UP_FROST_TOL_M: f64 = 0.01;

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

/// Assign the indoor boundary faces to the floor / wall groups (others stay in group 0).
pub fn assign_groups(net: &mut Network, mesh: &Mesh) {
    let nx = mesh.grid.nx();
    for b in net.bfaces.iter_mut() {
        if b.zone != INDOOR {
            continue;
        }
        let zc = mesh.grid.zc(net.cell_of[b.p] / nx);
        b.group = match b.side {
            Side::Top | Side::Bottom => GROUP_FLOOR,
            _ if zc >= 0.0 => GROUP_WALL_BELOW,
            _ => GROUP_WALL_ABOVE,
        };
    }
}

/// The section, mesh and network (with reporting groups) of a case.
pub fn model(case: &Case) -> (Section, Mesh, Network) {
    let section = Section::from_case(case);
    let mesh = section.mesh(case);
    let mut net = Network::new(&mesh);
    assign_groups(&mut net, &mesh);
    (section, mesh, net)
}

/// Temperatures of the unknowns spread onto the grid (nz × nx, row j holding depth zc(j)), NaN
/// for air cells.
pub fn grid_field(mesh: &Mesh, net: &Network, t: &[f64]) -> Array2<f64> {
    let mut f = Array2::from_elem((mesh.grid.nz(), mesh.grid.nx()), f64::NAN);
    if let Some(s) = f.as_slice_mut() {
        for (p, &id) in net.cell_of.iter().enumerate() {
            s[id] = t[p];
        }
    }
    f
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
    let (section, mesh, net) = model(case);
    let split = split::split(case, &mesh, &net)?;
    let mut drv = Driver {
        case,
        mesh: &mesh,
        net: &net,
        solver: Solver::new(&net, opts.solver)?,
        h: Vec::new(),
        t: Vec::new(),
        lines: FrostLines::new(&mesh, case),
        wall_1d: (split.wall_1d_w_per_mk, split.stated_wall_1d_w_per_mk),
        sim_time: 0.0,
        time_steps: 0,
    };
    let steady_heat_loss_w = spinup::start(&mut drv)?;
    let sched = forcing::schedule(case);
    let coarse_spin_up_years = spinup::coarse_year(&mut drv, &sched.spin, opts);
    let total = case.simulation.max_spin_up_years
        + 1
        + sched.seasons.len()
        + usize::from(sched.design.is_some());
    let spin = spinup::spin_up(&mut drv, &sched.spin, progress, total)?;
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
        let (winters, season_years, worst, k) =
            spinup::seasons(&mut drv, &sched.seasons, progress, (n, total))?;
        years.extend(season_years);
        (worst, n + k, n, winters)
    };
    Ok(RunResult {
        days: last.days,
        probes: last.probes,
        years,
        reported,
        spin_up_years,
        coarse_spin_up_years,
        periodicity_heat_loss_kwh: spin.periodicity_kwh,
        normal,
        split,
        winters,
        spin_up_converged: spin.converged,
        field: last.field,
        steady_heat_loss_w,
        stats: drv.solver.stats(),
        time_steps: drv.time_steps,
        wall_time_s: start.elapsed().as_secs_f64(),
        mesh: mesh.clone(),
        section,
        daily_fields: last.fields,
    })
}
