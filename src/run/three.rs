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
use super::split::{self, HeatSplit};
use super::{
    forcing, model, Progress, RunOptions, GROUP_FLOOR, GROUP_WALL_ABOVE, GROUP_WALL_BELOW,
};
use crate::case::Case;
use crate::error::Result;
use crate::geometry::INDOOR;
use crate::geometry3d::Quarter;
use crate::mesh3::{Grid3, Mesh3};
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
}

/// The solver settings of a 3D run: `opts`' with conjugate gradients unless it already asks for
/// them.
fn params3(opts: &RunOptions) -> SolverParams {
    let mut p = opts.solver;
    if !matches!(p.linear, Linear::Pcg(_)) {
        p.linear = Linear::Pcg(PcgParams::default());
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

/// Steady indoor heat flow of the whole building per kelvin, W/K.
fn coupling(case: &Case, net: &Network, params: SolverParams) -> Result<f64> {
    let mut zt = forcing::zone_temps(case, 1.0, 0.0);
    for z in zt.iter_mut().skip(2) {
        *z = 0.0;
    }
    let mut solver = Solver::new(net, params)?;
    Ok(4.0 * solver.steady(&zt, None)?.from_zone[INDOOR])
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

/// Run `case` in 3D (it must have a plan).
pub fn run3(
    case: &Case,
    opts: &RunOptions,
    progress: &mut (dyn FnMut(Progress) + Send),
) -> Result<Run3Result> {
    let start = std::time::Instant::now();
    let (q, mesh, net) = model3(case);
    let (_, mesh2, net2) = model(case);
    let split = split::split(case, &mesh2, &net2)?;
    let params = params3(opts);
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
    let sim = spinup::simulate(&mut drv, &opts3, progress)?;
    let (stats, time_steps) = (drv.solver.stats(), drv.time_steps);
    drop(drv);
    let coupling = coupling3(case, &net, &split, params)?;
    Ok(Run3Result {
        unknowns: net.n,
        quarter: q,
        mesh,
        sim,
        split,
        coupling,
        stats,
        time_steps,
        wall_time_s: start.elapsed().as_secs_f64(),
    })
}
