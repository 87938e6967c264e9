//! Post-processing of solved fields: point temperatures and the frost depth on a vertical line.
pub mod isolines;

use crate::mesh::{Cell, Mesh};
use crate::physics::material::Material;
use crate::solver::network::{Network, Side};

/// Temperature at point (x, z), °C, from the cell temperatures `t` of the unknowns.
///
/// - Strictly inside a cell: bilinear interpolation between the four surrounding cell centres when
///   they are all solids of the cell's own material, else the cell's own value.
/// - On a face or vertex shared by solid cells: the flux-consistent weighted mean
///   T = Σ (k_c/d_c) T_c / Σ (k_c/d_c) over the adjacent solids, with d_c the distance from the
///   point to the centre of cell c. On a face between two cells this is exactly the interface
///   temperature that makes the two half-cell fluxes equal; at a multi-material vertex it lets a
///   highly conducting material dominate, as it physically does.
/// - On a surface exposed to a zone: the surface temperature of each adjacent cell,
///   T_s = T_c − (T_c − T_zone)(d/k)/(d/k + R_s), averaged. Returns `None` outside all solids.
pub fn point_temperature(
    mesh: &Mesh,
    net: &Network,
    t: &[f64],
    zone_t: &[f64],
    x: f64,
    z: f64,
) -> Option<f64> {
    let g = &mesh.grid;
    let eps = 1e-9;
    let on = |v: f64, edges: &[f64]| edges.iter().position(|&e| (e - v).abs() < eps);
    let i0 = g.find_x(x);
    let j0 = g.find_z(z);
    // Candidate cells whose closed rectangle holds the point.
    let mut is = vec![i0];
    if let Some(k) = on(x, &g.xe) {
        is = Vec::new();
        if k > 0 {
            is.push(k - 1);
        }
        if k < g.nx() {
            is.push(k);
        }
    }
    let mut js = vec![j0];
    if let Some(k) = on(z, &g.ze) {
        js = Vec::new();
        if k > 0 {
            js.push(k - 1);
        }
        if k < g.nz() {
            js.push(k);
        }
    }
    let k_of = |p: usize| net.materials[net.mat[p]].conductivity(t[p]);
    // Surfaces: faces of adjacent solids towards zones through which the point lies.
    let mut surf = Vec::new();
    for bf in &net.bfaces {
        let id = net.cell_of[bf.p];
        let (i, j) = (id % g.nx(), id / g.nx());
        let (fx0, fx1, fz0, fz1) = match bf.side {
            Side::Left => (g.xe[i], g.xe[i], g.ze[j], g.ze[j + 1]),
            Side::Right => (g.xe[i + 1], g.xe[i + 1], g.ze[j], g.ze[j + 1]),
            Side::Top => (g.xe[i], g.xe[i + 1], g.ze[j], g.ze[j]),
            Side::Bottom => (g.xe[i], g.xe[i + 1], g.ze[j + 1], g.ze[j + 1]),
            Side::Front | Side::Back => continue,
        };
        if x >= fx0 - eps && x <= fx1 + eps && z >= fz0 - eps && z <= fz1 + eps {
            let rc = bf.d / k_of(bf.p);
            let tz = zone_t[bf.zone];
            surf.push(t[bf.p] - (t[bf.p] - tz) * rc / (rc + bf.r));
        }
    }
    if !surf.is_empty() {
        return Some(surf.iter().sum::<f64>() / surf.len() as f64);
    }
    let mut cells = Vec::new();
    for &j in &js {
        for &i in &is {
            let p = net.unk_of[g.id(i, j)];
            if p != usize::MAX {
                cells.push((i, j, p));
            }
        }
    }
    if cells.is_empty() {
        return None;
    }
    if cells.len() == 1 && is.len() == 1 && js.len() == 1 {
        let (i, j, p) = cells[0];
        return Some(bilinear(mesh, net, t, i, j, p, x, z).unwrap_or(t[p]));
    }
    let (mut sw, mut st) = (0.0, 0.0);
    for &(i, j, p) in &cells {
        let d = ((g.xc(i) - x).powi(2) + (g.zc(j) - z).powi(2))
            .sqrt()
            .max(1e-12);
        let w = k_of(p) / d;
        sw += w;
        st += w * t[p];
    }
    Some(st / sw)
}

#[allow(clippy::too_many_arguments)]
fn bilinear(
    mesh: &Mesh,
    net: &Network,
    t: &[f64],
    i: usize,
    j: usize,
    p: usize,
    x: f64,
    z: f64,
) -> Option<f64> {
    let g = &mesh.grid;
    let ia = if x < g.xc(i) { i.checked_sub(1)? } else { i };
    let ja = if z < g.zc(j) { j.checked_sub(1)? } else { j };
    if ia + 1 >= g.nx() || ja + 1 >= g.nz() {
        return None;
    }
    let m = net.mat[p];
    let mut v = [[0.0; 2]; 2];
    for (a, row) in v.iter_mut().enumerate() {
        for (b, val) in row.iter_mut().enumerate() {
            let id = g.id(ia + b, ja + a);
            match mesh.cells[id] {
                Cell::Solid(mm) if mm == m => *val = t[net.unk_of[id]],
                _ => return None,
            }
        }
    }
    let fx = (x - g.xc(ia)) / (g.xc(ia + 1) - g.xc(ia));
    let fz = (z - g.zc(ja)) / (g.zc(ja + 1) - g.zc(ja));
    Some(
        (1.0 - fz) * ((1.0 - fx) * v[0][0] + fx * v[0][1])
            + fz * ((1.0 - fx) * v[1][0] + fx * v[1][1]),
    )
}

/// The frost scalar s of a material at temperature `t`, °C: the temperature clamped to the
/// material's freezing interval [T_s, T_f] (no clamp for a material without water). The frost line
/// is s = t_line (the midpoint of the top stratum's interval, where half the pore water is frozen)
/// and frozen ground is s ≤ t_line; the line is placed by linear interpolation of s between cell
/// centres.
///
/// In a linear freezing interval s is T itself and the frozen fraction is linear in it, so
/// interpolating s is interpolating the frozen fraction; outside the interval s stays at its ends,
/// so trace ice left in a thawing layer (s above t_line) never counts as frost. In concrete and
/// insulation the line is the t_line isotherm.
pub fn frost_scalar(m: &Material, t: f64) -> f64 {
    if m.freezes() {
        t.clamp(m.t_solidus(), m.t_freeze)
    } else {
        t
    }
}

/// The frost scalar of every grid cell (nz × nx, row-major; NaN for air) from the temperatures
/// `t` of the unknowns.
pub fn frost_scalar_field(mesh: &Mesh, net: &Network, t: &[f64]) -> Vec<f64> {
    let mut f = vec![f64::NAN; mesh.grid.len()];
    for (p, &id) in net.cell_of.iter().enumerate() {
        f[id] = frost_scalar(&net.materials[net.mat[p]], t[p]);
    }
    f
}

/// The frost scalar of cell j of grid column `i` (None for air): the column [`column_depth`] and
/// [`column_top`] read.
pub fn column_scalar<'a>(
    mesh: &'a Mesh,
    net: &'a Network,
    t: &'a [f64],
    i: usize,
) -> impl Fn(usize) -> Option<f64> + 'a {
    move |j| {
        let p = net.unk_of[mesh.grid.id(i, j)];
        (p != usize::MAX).then(|| frost_scalar(&net.materials[net.mat[p]], t[p]))
    }
}

/// Deepest frozen point of column `i` at or below `z_from` (m); `None` if nothing there is frozen.
/// See [`column_depth`].
pub fn frost_depth_column(
    mesh: &Mesh,
    net: &Network,
    t: &[f64],
    i: usize,
    z_from: f64,
    t_line: f64,
) -> Option<f64> {
    column_depth(
        &mesh.grid.ze,
        column_scalar(mesh, net, t, i),
        z_from,
        t_line,
    )
}

/// Deepest frozen point at or below `z_from` (m) of a vertical column of cells with edges `ze`
/// (m, downward) and frost scalar `s(j)` ([`frost_scalar`]; `None` for air); `None` if nothing
/// there is frozen. The rule of both models' columns (2D grid columns, 3D plan columns).
///
/// The frost line is where the frost scalar s equals `t_line`. Below the deepest cell j with
/// s_j ≤ t_line the line lies at z = z_j + (t_line − s_j)/(s_{j+1} − s_j) (z_{j+1} − z_j), by
/// linear interpolation between cell centres (the face below j when there is no solid cell
/// j + 1). For a sharp front this moves continuously from face to face as cells freeze (within
/// about a tenth of a cell of the front's true position).
pub fn column_depth(
    ze: &[f64],
    s: impl Fn(usize) -> Option<f64>,
    z_from: f64,
    t_line: f64,
) -> Option<f64> {
    column_end(ze, s, z_from, t_line, false)
}

/// Shallowest frozen point at or below `z_from` (m) of a column as in [`column_depth`]: the top
/// of the frozen layer (below ground thawed from the surface in spring). The mirror of
/// [`column_depth`]: above the shallowest cell j with s_j ≤ t_line the line lies at
/// z = z_j + (t_line − s_j)/(s_{j−1} − s_j) (z_{j−1} − z_j); the face above j (or `z_from`) when
/// there is no solid unfrozen cell j − 1 with its centre at or below `z_from` (frozen up to the
/// surface).
pub fn column_top(
    ze: &[f64],
    s: impl Fn(usize) -> Option<f64>,
    z_from: f64,
    t_line: f64,
) -> Option<f64> {
    column_end(ze, s, z_from, t_line, true)
}

/// The frozen layer's bottom (`top` false) or top in a column: [`column_depth`], [`column_top`].
fn column_end(
    ze: &[f64],
    s: impl Fn(usize) -> Option<f64>,
    z_from: f64,
    t_line: f64,
    top: bool,
) -> Option<f64> {
    let n = ze.len() - 1;
    let zc = |j: usize| 0.5 * (ze[j] + ze[j + 1]);
    let frozen = |j: &usize| ze[j + 1] > z_from && s(*j).is_some_and(|v| v <= t_line);
    let j = if top {
        (0..n).find(frozen)
    } else {
        (0..n).rev().find(frozen)
    }?;
    let v = s(j)?;
    // The cell beyond the frozen end (below the bottom; above the top, if in the ground) and
    // the face between them.
    let (beyond, face) = if top {
        (j.checked_sub(1).filter(|&k| zc(k) >= z_from), ze[j])
    } else {
        ((j + 1 < n).then_some(j + 1), ze[j + 1])
    };
    let z = match beyond.and_then(|k| s(k).map(|w| (k, w))) {
        Some((k, w)) if w > v => zc(j) + (t_line - v) / (w - v) * (zc(k) - zc(j)),
        _ => face,
    };
    Some(z.max(z_from))
}

#[cfg(test)]
mod tests {
    use super::{column_depth, column_top};

    /// The column rule on a column whose first cell lies above ground (the 3D grid starts at
    /// the wall's top): edges −0.2, 0, 0.1, 0.2, 0.3, 0.4 m, frost line at 0 °C. The documented
    /// interpolation between cell centres, and nothing above the ground surface (z_from = 0)
    /// counts or is interpolated from.
    #[test]
    fn column_rule_ignores_cells_above_the_surface() {
        let ze = [-0.2, 0.0, 0.1, 0.2, 0.3, 0.4];
        let col = |v: [f64; 5]| move |k: usize| (!v[k].is_nan()).then_some(v[k]);
        // A cold solid cell above ground (insulation standing proud): frozen from the surface,
        // the bottom between the centres at 0.15 and 0.25 m.
        let cold = col([-5.0, -1.0, -0.5, 1.0, 2.0]);
        assert_eq!(column_top(&ze, cold, 0.0, 0.0), Some(0.0));
        let d = column_depth(&ze, cold, 0.0, 0.0).unwrap();
        assert!((d - (0.15 + 0.5 / 1.5 * 0.1)).abs() < 1e-12, "{d}");
        // Frozen only above ground: no frost in the ground.
        let proud = col([-5.0, 1.0, 1.0, 1.0, 2.0]);
        assert_eq!(column_top(&ze, proud, 0.0, 0.0), None);
        assert_eq!(column_depth(&ze, proud, 0.0, 0.0), None);
        // A warm cell above ground over frozen ground: the top is the surface, not a point
        // interpolated towards the cell above ground.
        let warm = col([3.0, -1.0, -1.0, 1.0, 2.0]);
        assert_eq!(column_top(&ze, warm, 0.0, 0.0), Some(0.0));
        // Thawed from the surface (air above): the top between the centres at 0.05 and 0.15 m.
        let spring = col([f64::NAN, 1.0, -1.0, -1.0, 2.0]);
        let t = column_top(&ze, spring, 0.0, 0.0).unwrap();
        assert!((t - 0.10).abs() < 1e-12, "{t}");
    }
}
