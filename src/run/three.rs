//! A 3D run of a rectangular building's quarter ([`crate::geometry3d`]): the same start state,
//! spin-up, design winter and measured-series schedule as the 2D section, with the quarter's
//! observer ([`super::quarter`]), and the building's steady couplings computed directly:
//!
//! ```text
//! L3D       = 4 Q_quarter / (θ_i − θ_e)               (W/K, steady, unfrozen)
//! H_g       = L3D − P Σ_wall U_w Δz                    (ground part: floor, junction, corners)
//! U_floor   = L3D,floor / A                            (floor-only model, W/(m²·K))
//! Ψ_g       = (H_g − L3D,floor) / P                    (W/(m·K), corners included)
//! ```
//!
//! A and P are the floor's inside area and exposed perimeter, Σ U_w Δz the 1D wall above ground
//! per metre of the 2D section ([`super::split`]). No B′ strip: the floor has its real plan.
use super::driver::Driver;
use super::quarter::{Quarter3, QuarterYear};
use super::spinup::{self, Simulated};
use super::split::HeatSplit;
use super::{
    forcing, Headline, Progress, Records, RunOptions, RunResult, GROUP_FLOOR, GROUP_WALL_ABOVE,
    GROUP_WALL_BELOW,
};
use crate::case::{Case, Solver3d};
use crate::error::Result;
use crate::geometry::INDOOR;
use crate::geometry3d::Quarter;
use crate::mesh3::{Grid3, Mesh3};
use crate::solver::amg::AmgParams;
use crate::solver::network::Side;
use crate::solver::pcg::PcgParams;
use crate::solver::{Linear, Network, Solver, SolverParams, SolverStats};

/// The building's steady couplings from the 3D model (whole building), unfrozen ground.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Coupling3 {
    /// Steady heat flow from the indoor air per kelvin indoor − outdoor, W/K.
    pub l3d_w_per_k: f64,
    /// The 1D part of the model's wall above ground, P Σ U_w Δz, W/K.
    pub wall_1d_w_per_k: f64,
    /// The ground's part H_g = L3D − P Σ U_w Δz, W/K.
    pub h_g_w_per_k: f64,
    /// The floor-only model's coupling, W/K (None for a basement).
    pub l3d_floor_w_per_k: Option<f64>,
    /// Floor U-value without the junction, W/(m²·K) (None for a basement).
    pub floor_u_w_per_m2k: Option<f64>,
    /// The wall/floor junction's Ψ_g with the corners, W/(m·K) (None for a basement).
    pub psi_g_w_per_mk: Option<f64>,
}

/// Everything a 3D run produces.
pub struct Run3Result {
    /// The 2D section's run of the same case (the ISO 13370 equivalent strip; its periodic
    /// state seeds the 3D run).
    pub two: RunResult,
    /// The quarter.
    pub quarter: Quarter,
    /// Its mesh.
    pub mesh: Mesh3,
    /// Unknowns (solid cells).
    pub unknowns: usize,
    /// The schedule's records; `sim.last.kept` holds the perimeter, plan and design field.
    pub sim: Simulated<QuarterYear>,
    /// The 2D section's split (its Σ U_w Δz sets the wall above ground).
    pub split: HeatSplit,
    /// The building's steady couplings.
    pub coupling: Coupling3,
    /// Solver work.
    pub stats: SolverStats,
    /// The linear solver used (`simulation.solver_3d`, unless the options asked for one).
    pub solver_3d: Solver3d,
    /// Time steps.
    pub time_steps: usize,
    /// Wall-clock time, s.
    pub wall_time_s: f64,
}

impl Run3Result {
    /// The reported period's perimeter records.
    pub fn year(&self) -> &QuarterYear {
        &self.sim.last.kept
    }

    /// The whole building's records of the run (the reported period's days, every year).
    pub fn records(&self) -> Records<'_> {
        let s = &self.sim;
        Records {
            days: &s.last.days,
            years: &s.years,
            reported: s.reported,
            normal: s.normal.as_ref(),
            design_day: self.year().design_day,
        }
    }

    /// The 3D headline: the records' numbers with the 3D floor U and Ψ_g.
    pub fn headline(&self, case: &Case) -> Headline {
        let mut h = super::headline_of(case, &self.records(), &self.split);
        h.floor_u_value_w_per_m2k = self.coupling.floor_u_w_per_m2k;
        h.junction_psi_w_per_mk = self.coupling.psi_g_w_per_mk;
        h
    }
}

/// The solver settings of a 3D run: `opts`' if they already ask for an iterative solver (the
/// library's callers, benchmarks), else the case's `simulation.solver_3d` with its defaults.
fn params3(case: &Case, opts: &RunOptions) -> SolverParams {
    let mut p = opts.solver;
    if !matches!(p.linear, Linear::Pcg(_) | Linear::Multigrid(_)) {
        p.linear = match case.simulation.solver_3d {
            Solver3d::IncompleteCholesky => Linear::Pcg(PcgParams::default()),
            Solver3d::Multigrid => Linear::Multigrid(AmgParams::default()),
        };
    }
    p
}

/// The quarter's mesh and network with reporting groups: the indoor faces with a vertical normal
/// are the floor; the others the wall, below or above ground by their centre's depth.
pub fn model3(case: &Case) -> (Quarter, Mesh3, Network) {
    let q = Quarter::of(case);
    let mesh = q.mesh(case);
    let mut net = Network::new3(&mesh);
    let g = &mesh.grid;
    let layer = g.nx() * g.ny();
    for b in net.bfaces.iter_mut() {
        if b.zone != INDOOR {
            continue;
        }
        let zc = Grid3::centre(&g.ze, net.cell_of[b.p] / layer);
        b.group = match b.side {
            Side::Top | Side::Bottom => GROUP_FLOOR,
            _ if zc >= 0.0 => GROUP_WALL_BELOW,
            _ => GROUP_WALL_ABOVE,
        };
    }
    (q, mesh, net)
}

/// Zone temperatures of a coupling: indoor 1 °C, outdoor and every other zone 0 °C.
fn unit_zone_temps(case: &Case) -> Vec<f64> {
    let mut zt = forcing::zone_temps(case, 1.0, 0.0);
    for z in zt.iter_mut().skip(2) {
        *z = 0.0;
    }
    zt
}

/// Steady indoor heat flow of the whole building per kelvin, W/K.
fn coupling(case: &Case, net: &Network, params: SolverParams) -> Result<f64> {
    let zt = unit_zone_temps(case);
    let mut solver = Solver::new(net, params)?;
    Ok(4.0 * solver.steady(&zt, None)?.from_zone[INDOOR])
}

/// Steady indoor heat flow per metre of the long wall at its middle, W/(m·K): the flow from the
/// indoor air (floor and walls; indoor − outdoor = 1 K) through the faces of the quarter's first
/// plan column (0 ≤ X ≤ ΔX₀), divided by ΔX₀. The 3D counterpart of the section's L2D: for a
/// long building the two agree.
pub fn mid_wall_coupling(case: &Case, params: SolverParams) -> Result<f64> {
    let (_, mesh, net) = model3(case);
    let zt = unit_zone_temps(case);
    let st = Solver::new(&net, params)?.steady(&zt, None)?;
    let g = &mesh.grid;
    let q: f64 = net
        .bfaces
        .iter()
        .filter(|b| b.zone == INDOOR && g.ijk(net.cell_of[b.p]).0 == 0)
        .map(|b| {
            let k = net.materials[net.mat[b.p]].conductivity(st.t[b.p]);
            b.conductance(k, 0.0) * (zt[INDOOR] - st.t[b.p])
        })
        .sum();
    Ok(q / (g.xe[1] - g.xe[0]))
}

/// The building's steady couplings (see the module's equations).
pub fn coupling3(
    case: &Case,
    net: &Network,
    split: &HeatSplit,
    params: SolverParams,
) -> Result<Coupling3> {
    let p = case.building.exposed_perimeter_m;
    let l3d = coupling(case, net, params)?;
    let wall = p * split.wall_1d_w_per_mk;
    let floor = if case.basement.is_some() {
        None
    } else {
        let f = case.floor_only();
        let (_, _, fnet) = model3(&f);
        Some(coupling(&f, &fnet, params)?)
    };
    Ok(Coupling3 {
        l3d_w_per_k: l3d,
        wall_1d_w_per_k: wall,
        h_g_w_per_k: l3d - wall,
        l3d_floor_w_per_k: floor,
        floor_u_w_per_m2k: floor.map(|lf| lf / case.building.floor_area_m2),
        psi_g_w_per_mk: floor.map(|lf| (l3d - wall - lf) / p),
    })
}

/// The 3D start state: the 3D steady state at the annual means plus the 2D section's periodic
/// departure from its own steady state, T = T3D,steady + (T2D,periodic − T2D,steady) at (s, z),
/// s = max(u, v) (where the section's cell there is air, the nearest solid cell of its row). The
/// steady part carries the building's real plan into the deep ground, which a 2D strip of width
/// B′ does not; the departure carries the annual wave and the frozen ground's offset.
pub fn seed_from_2d(
    case: &Case,
    (q, mesh, net): (&Quarter, &Mesh3, &Network),
    params: SolverParams,
    two: &RunResult,
) -> Result<Vec<f64>> {
    let zt = forcing::zone_temps(
        case,
        case.indoor_mean_c(),
        forcing::surface(&case.climate, case.climate.mean_c),
    );
    let g2 = &two.mesh.grid;
    let net2 = Network::new(&two.mesh);
    let steady2 = Solver::new(&net2, SolverParams::default())?
        .steady(&zt, None)?
        .t;
    let steady3 = Solver::new(net, params)?.steady(&zt, None)?.t;
    let t2 = &two.spin_up_state;
    let at = |i: usize, j: usize| {
        let p = net2.unk_of[g2.id(i, j)];
        (p != usize::MAX).then(|| t2[p] - steady2[p])
    };
    let g = &mesh.grid;
    Ok(net
        .cell_of
        .iter()
        .zip(steady3)
        .map(|(&id, t3)| {
            let (i, j, k) = g.ijk(id);
            let s = q.s(Grid3::centre(&g.xe, i), Grid3::centre(&g.ye, j));
            let (i2, j2) = (g2.find_x(s), g2.find_z(Grid3::centre(&g.ze, k)));
            let dep = at(i2, j2).or_else(|| {
                (1..g2.nx()).find_map(|d| {
                    at(i2.saturating_sub(d), j2).or_else(|| at((i2 + d).min(g2.nx() - 1), j2))
                })
            });
            t3 + dep.unwrap_or(0.0)
        })
        .collect())
}

/// Most cells of a 3D grid: about 2 GB of memory at the measured 0.6–0.7 kB per cell (975k
/// cells: 585–700 MB peak), within the 4 GB a design run may take.
pub const MAX_CELLS_3D: usize = 3_000_000;

/// Refuse a 3D grid larger than [`MAX_CELLS_3D`] before building it (the grid's edges only are
/// computed).
pub fn check_size(case: &Case) -> Result<()> {
    let g = Quarter::of(case).grid(case);
    if g.len() > MAX_CELLS_3D {
        return Err(crate::error::Error::in_file(
            &case.file,
            "simulation.mesh",
            crate::error::InputKind::OutOfScope,
            format!(
                "the 3D grid would have {} × {} × {} = {} cells; the limit is {MAX_CELLS_3D} (about 2 GB of memory): use a coarser mesh, a smaller domain, or the 2D model",
                g.nx(),
                g.ny(),
                g.nz(),
                g.len()
            ),
        ));
    }
    Ok(())
}

/// Run `case` in 3D (it must have a plan).
pub fn run3(
    case: &Case,
    opts: &RunOptions,
    progress: &mut (dyn FnMut(Progress) + Send),
) -> Result<Run3Result> {
    let start = std::time::Instant::now();
    check_size(case)?;
    let two = super::run_with(case, opts, &mut |_| {})?;
    let (q, mesh, net) = model3(case);
    let split = two.split.clone();
    let params = params3(case, opts);
    let seed = seed_from_2d(case, (&q, &mesh, &net), params, &two)?;
    let quarter_len = 0.25 * case.building.exposed_perimeter_m;
    let mut drv = Driver {
        case,
        net: &net,
        solver: Solver::new(&net, params)?,
        h: Vec::new(),
        t: Vec::new(),
        obs: Quarter3::new(&mesh, &q, case),
        wall_1d: (
            split.wall_1d_w_per_mk * quarter_len,
            split.stated_wall_1d_w_per_mk * quarter_len,
        ),
        scale: 4.0,
        sim_time: 0.0,
        time_steps: 0,
    };
    let opts3 = RunOptions {
        solver: params,
        coarse_limits: opts.coarse_limits,
    };
    let sim = spinup::simulate(&mut drv, &opts3, progress, Some(seed))?;
    let (stats, time_steps) = (drv.solver.stats(), drv.time_steps);
    drop(drv);
    let coupling = coupling3(case, &net, &split, params)?;
    Ok(Run3Result {
        two,
        unknowns: net.n,
        quarter: q,
        mesh,
        sim,
        split,
        coupling,
        stats,
        solver_3d: match params.linear {
            Linear::Multigrid(_) => Solver3d::Multigrid,
            Linear::Pcg(_) | Linear::Cholesky => Solver3d::IncompleteCholesky,
        },
        time_steps,
        wall_time_s: start.elapsed().as_secs_f64(),
    })
}
