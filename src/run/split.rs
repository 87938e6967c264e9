//! The split of a section's heat loss into floor, wall/floor junction and the wall above ground,
//! after the definitions of ISO 13370 (H_g = A U + P Ψ_g) and ISO 14683 / ISO 10211 (a junction's
//! Ψ is the 2D coupling coefficient minus the 1D parts of the elements it joins):
//!
//! ```text
//! Ψ_g = L2D − Σ_wall U_w(z) Δz − L2D,floor        (W/(m·K))
//! U   = L2D,floor / (B′/2)                          (W/(m²·K))
//! ```
//!
//! - L2D: the section's steady heat flow from the indoor air per metre and per kelvin between
//!   indoor and outdoor air (unfrozen conductivities), the wall reaching at least
//!   `simulation.wall_extension_m` above the floor;
//! - U_w(z): the 1D U-value of the wall's layers at the height of each indoor wall face above
//!   ground, U_w = 1/(R_si + Σ d/λ + R_se) along the face's row of cells (R_si of the wall, R_se of
//!   the outdoor air);
//! - L2D,floor: the same for the floor-only model, the section cut at the floor (`Case::
//!   floor_only`).
//!
//! The ground heat loss of a run is the heat from the indoor air minus the 1D part of the wall
//! above ground, Σ U_w Δz (θ_i − θ_e), at every step: the floor and the junction (and a basement's
//! wall below ground), independent of where the section is cut. Heated basements get no Ψ_g (the
//! ISO 13370 basement method has floor and wall U-values).
use super::{forcing, model, GROUP_WALL_ABOVE};
use crate::case::Case;
use crate::error::Result;
use crate::geometry::{INDOOR, OUTDOOR};
use crate::mesh::{Cell, Mesh};
use crate::solver::network::Side;
use crate::solver::{Network, Solver, SolverParams};

/// The 1D wall parts and the steady split of one section.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct HeatSplit {
    /// Σ U_w Δz over the model's indoor wall faces above ground, W/(m·K).
    pub wall_1d_w_per_mk: f64,
    /// The same over the stated wall: from the floor (or ground level) to
    /// `wall.height_above_ground_m`, W/(m·K).
    pub stated_wall_1d_w_per_mk: f64,
    /// Height of the stated wall above the floor (or ground level), m.
    pub stated_wall_height_m: f64,
    /// The section's steady coupling per metre, W/(m·K).
    pub l2d_w_per_mk: f64,
    /// The floor-only model's, W/(m·K) (None for a basement).
    pub l2d_floor_w_per_mk: Option<f64>,
    /// Floor U-value without the junction, W/(m²·K) (None for a basement).
    pub floor_u_w_per_m2k: Option<f64>,
    /// The wall/floor junction's linear thermal transmittance Ψ_g, W/(m·K) (None for a basement).
    pub psi_g_w_per_mk: Option<f64>,
}

/// 1D U-value of the row of cells of indoor boundary face `b`: from the indoor face outward to
/// the outdoor air, W/(m²·K); None if the row does not reach the outdoor air.
fn row_u(mesh: &Mesh, net: &Network, b: usize) -> Option<f64> {
    let g = &mesh.grid;
    let bf = &net.bfaces[b];
    let id = net.cell_of[bf.p];
    let (i0, j) = (id % g.nx(), id / g.nx());
    let step: isize = match bf.side {
        Side::Left => 1,
        Side::Right => -1,
        _ => return None,
    };
    let mut r = bf.r;
    let mut i = i0 as isize;
    while i >= 0 && (i as usize) < g.nx() {
        match mesh.cells[g.id(i as usize, j)] {
            Cell::Solid(m) => r += g.dx(i as usize) / mesh.materials[m].k_unfrozen,
            Cell::Zone(z) if z == OUTDOOR => {
                return Some(1.0 / (r + mesh.zones[OUTDOOR].r_vertical))
            }
            Cell::Zone(_) => return None,
        }
        i += step;
    }
    None
}

/// Σ U_w Δz over the indoor wall faces above ground whose centres lie above `z_low` (W/(m·K)).
fn wall_1d(mesh: &Mesh, net: &Network, z_low: f64) -> f64 {
    let g = &mesh.grid;
    net.bfaces
        .iter()
        .enumerate()
        .filter(|(_, bf)| bf.zone == INDOOR && bf.group == GROUP_WALL_ABOVE)
        .filter(|(_, bf)| g.zc(net.cell_of[bf.p] / g.nx()) >= z_low)
        .filter_map(|(b, bf)| row_u(mesh, net, b).map(|u| u * bf.area))
        .sum()
}

/// Steady heat flow from the indoor air per kelvin (indoor 1, every other zone 0), W/(m·K).
fn coupling(case: &Case, net: &Network) -> Result<f64> {
    let mut zt = forcing::zone_temps(case, 1.0, 0.0);
    for z in zt.iter_mut().skip(2) {
        *z = 0.0;
    }
    let mut solver = Solver::new(net, SolverParams::default())?;
    Ok(solver.steady(&zt, None)?.from_zone[INDOOR])
}

/// The split of `case`'s section (mesh and network with reporting groups).
pub fn split(case: &Case, mesh: &Mesh, net: &Network) -> Result<HeatSplit> {
    let floor_or_ground = case.floor_z().min(0.0);
    let stated_top = -case.wall.height_above_ground_m;
    let all = wall_1d(mesh, net, f64::NEG_INFINITY);
    // z is positive down: the stated wall's faces lie below the stated top.
    let stated = wall_1d(mesh, net, stated_top);
    let l2d = coupling(case, net)?;
    let (l2d_floor, u, psi) = if case.basement.is_some() {
        (None, None, None)
    } else {
        let floor = case.floor_only();
        let (_, _, fnet) = model(&floor);
        let lf = coupling(&floor, &fnet)?;
        (
            Some(lf),
            Some(lf / (0.5 * case.building.b_prime_m)),
            Some(l2d - all - lf),
        )
    };
    Ok(HeatSplit {
        wall_1d_w_per_mk: all,
        stated_wall_1d_w_per_mk: stated,
        stated_wall_height_m: (floor_or_ground - stated_top).max(0.0),
        l2d_w_per_mk: l2d,
        l2d_floor_w_per_mk: l2d_floor,
        floor_u_w_per_m2k: u,
        psi_g_w_per_mk: psi,
    })
}
