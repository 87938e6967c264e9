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
pub mod quarter;
pub mod result;
pub mod section2;
pub mod spinup;
pub mod split;
pub mod steady;
pub mod three;

pub use frost::{frost_line_c, FrostLines, ProtectedZone};
pub use headline::{basement_values, headline, headline_of, BasementValues, Headline};
pub use result::{Day, Field, Progress, Records, RunResult, WinterResult, Year};
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
use section2::Section2;

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

/// Most cells of a 2D section (the direct factor of a larger one would take gigabytes).
pub const MAX_CELLS_2D: usize = 500_000;

/// Refuse a section grid larger than [`MAX_CELLS_2D`] before building it (edges only).
pub fn check_size_2d(case: &Case) -> Result<()> {
    let g = Section::from_case(case).grid(case);
    let n = g.nx() * g.nz();
    if n > MAX_CELLS_2D {
        return Err(crate::error::Error::in_file(
            &case.file,
            "simulation.mesh",
            crate::error::InputKind::OutOfScope,
            format!(
                "the section's grid would have {} × {} = {n} cells; the limit is {MAX_CELLS_2D}: use a coarser mesh or a smaller domain (simulation.domain_width_m, domain_depth_m)",
                g.nx(),
                g.nz()
            ),
        ));
    }
    Ok(())
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
    check_size_2d(case)?;
    let (section, mesh, net) = model(case);
    let split = split::split(case, &mesh, &net)?;
    let mut drv = Driver {
        case,
        net: &net,
        solver: Solver::new(&net, opts.solver)?,
        h: Vec::new(),
        t: Vec::new(),
        obs: Section2::new(&mesh, case),
        wall_1d: (split.wall_1d_w_per_mk, split.stated_wall_1d_w_per_mk),
        scale: case.building.exposed_perimeter_m,
        sim_time: 0.0,
        time_steps: 0,
    };
    let sim = spinup::simulate(&mut drv, opts, progress, None)?;
    let (last, stats, time_steps) = (sim.last, drv.solver.stats(), drv.time_steps);
    Ok(RunResult {
        days: last.days,
        probes: last.probes,
        years: sim.years,
        reported: sim.reported,
        spin_up_years: sim.spin_up_years,
        coarse_spin_up_years: sim.coarse_spin_up_years,
        periodicity_heat_loss_kwh: sim.periodicity_kwh,
        normal: sim.normal,
        split,
        winters: sim.winters,
        spin_up_converged: sim.converged,
        field: last.kept.1,
        steady_heat_loss_w: sim.steady_heat_loss_w,
        stats,
        time_steps,
        wall_time_s: start.elapsed().as_secs_f64(),
        mesh: mesh.clone(),
        section,
        daily_fields: last.kept.0,
        spin_up_state: sim.spin_up_state,
    })
}
