//! The finite-volume network of a mesh: unknowns (solid cells), interior faces, boundary faces,
//! and the sparsity pattern of the system matrix.
//!
//! Conductances per metre of section length (W/(m·K)):
//! - interior face between cells p and q, with half-widths d_p, d_q normal to the face and face
//!   length A: G = A / (d_p/k_p + d_q/k_q) (harmonic mean; series resistance of the two halves);
//! - boundary face of cell p towards a zone with surface resistance R_s: G = A / (d_p/k_p + R_s).
use crate::mesh::{Cell, EdgeBc, Mesh};
use crate::physics::material::Material;

/// An interior face between unknowns `p < q`.
#[derive(Debug, Clone, Copy)]
pub struct Face {
    /// First unknown.
    pub p: usize,
    /// Second unknown.
    pub q: usize,
    /// Distance from p's centre to the face, m.
    pub dp: f64,
    /// Distance from q's centre to the face, m.
    pub dq: f64,
    /// Face length, m (per metre of section: area, m²/m).
    pub area: f64,
}

/// Which way a boundary face looks, seen from its solid cell.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Side {
    /// Towards smaller x.
    Left,
    /// Towards larger x.
    Right,
    /// Towards smaller z.
    Top,
    /// Towards larger z.
    Bottom,
    /// Towards smaller y (3D models).
    Front,
    /// Towards larger y (3D models).
    Back,
}

/// A face between unknown `p` and a zone.
#[derive(Debug, Clone, Copy)]
pub struct BFace {
    /// The unknown.
    pub p: usize,
    /// Distance from p's centre to the face, m.
    pub d: f64,
    /// Face length, m.
    pub area: f64,
    /// Surface resistance, m²·K/W.
    pub r: f64,
    /// Zone index.
    pub zone: usize,
    /// Direction of the face from the cell.
    pub side: Side,
    /// Reporting group (0 unless the caller assigns groups): heat through the faces of each
    /// group is summed separately.
    pub group: usize,
}

impl BFace {
    /// Conductance G_b = A / (d/k + R_s + R_extra), W/(m·K), for the cell's conductivity `k`
    /// and an added resistance `extra_r` (m²·K/W, e.g. snow).
    pub fn conductance(&self, k: f64, extra_r: f64) -> f64 {
        self.area / (self.d / k + self.r + extra_r)
    }
}

/// Topology, geometry and matrix pattern of a mesh.
#[derive(Debug, Clone)]
pub struct Network {
    /// Number of unknowns.
    pub n: usize,
    /// Number of zones.
    pub n_zones: usize,
    /// Grid columns.
    pub nx: usize,
    /// Grid cells along y (1 for a 2D section).
    pub ny: usize,
    /// Grid rows.
    pub nz: usize,
    /// Grid cell id of each unknown.
    pub cell_of: Vec<usize>,
    /// Unknown of each grid cell (`usize::MAX` for zone cells).
    pub unk_of: Vec<usize>,
    /// Cell volume per metre of section, m³/m.
    pub volume: Vec<f64>,
    /// Material index of each unknown.
    pub mat: Vec<usize>,
    /// Materials.
    pub materials: Vec<Material>,
    /// Interior faces.
    pub faces: Vec<Face>,
    /// Boundary faces.
    pub bfaces: Vec<BFace>,
    /// CSC column pointers of the lower triangle.
    pub col_ptr: Vec<usize>,
    /// CSC row indices of the lower triangle.
    pub row_idx: Vec<usize>,
    /// Value slot of each diagonal entry.
    pub diag_slot: Vec<usize>,
    /// Value slot of each interior face's off-diagonal entry.
    pub face_slot: Vec<usize>,
}

impl Network {
    /// Build the network of `mesh`.
    pub fn new(mesh: &Mesh) -> Self {
        let g = &mesh.grid;
        let (nx, nz) = (g.nx(), g.nz());
        let mut unk_of = vec![usize::MAX; g.len()];
        let (mut cell_of, mut volume, mut mat) = (Vec::new(), Vec::new(), Vec::new());
        for j in 0..nz {
            for i in 0..nx {
                let id = g.id(i, j);
                if let Cell::Solid(m) = mesh.cells[id] {
                    unk_of[id] = cell_of.len();
                    cell_of.push(id);
                    volume.push(g.dx(i) * g.dz(j));
                    mat.push(m);
                }
            }
        }
        let (mut faces, mut bfaces) = (Vec::new(), Vec::new());
        for (p, &id) in cell_of.iter().enumerate() {
            let (i, j) = (id % nx, id / nx);
            // Right, left, lower, upper: solid pairs are added once, from the left or upper cell.
            for side in [Side::Right, Side::Left, Side::Bottom, Side::Top] {
                match neighbour(mesh, &unk_of, p, (i, j), side) {
                    Link::Face(f) => faces.push(f),
                    Link::Boundary(b) => bfaces.push(b),
                    Link::None => {}
                }
            }
        }
        let n = cell_of.len();
        let (col_ptr, row_idx, diag_slot, face_slot) = lower_pattern(n, &faces);
        Network {
            n,
            n_zones: mesh.zones.len(),
            nx,
            ny: 1,
            nz,
            cell_of,
            unk_of,
            volume,
            mat,
            materials: mesh.materials.clone(),
            faces,
            bfaces,
            col_ptr,
            row_idx,
            diag_slot,
            face_slot,
        }
    }

    /// Number of reporting groups of the boundary faces (at least 1).
    pub fn n_groups(&self) -> usize {
        self.bfaces.iter().map(|b| b.group + 1).max().unwrap_or(1)
    }

    /// Interior-face conductances G_f (W/(m·K)) for cell conductivities `k`.
    pub fn face_conductances(&self, k: &[f64], out: &mut [f64]) {
        for (g, f) in out.iter_mut().zip(&self.faces) {
            *g = f.area / (f.dp / k[f.p] + f.dq / k[f.q]);
        }
    }

    /// Boundary-face conductances G_b (W/(m·K)) for cell conductivities `k`.
    pub fn boundary_conductances(&self, k: &[f64], out: &mut [f64]) {
        for (g, b) in out.iter_mut().zip(&self.bfaces) {
            *g = b.conductance(k[b.p], 0.0);
        }
    }

    /// Conductivity of each unknown at temperatures `t` (W/(m·K)).
    pub fn conductivities(&self, t: &[f64], out: &mut [f64]) {
        for p in 0..self.n {
            out[p] = self.materials[self.mat[p]].conductivity(t[p]);
        }
    }

    /// Temperatures (°C) from enthalpies (J/m³).
    pub fn temperatures(&self, h: &[f64], out: &mut [f64]) {
        for p in 0..self.n {
            out[p] = self.materials[self.mat[p]].temperature(h[p]).0;
        }
    }

    /// Enthalpies (J/m³) from temperatures (°C).
    pub fn enthalpies(&self, t: &[f64]) -> Vec<f64> {
        (0..self.n)
            .map(|p| self.materials[self.mat[p]].enthalpy(t[p]))
            .collect()
    }
}

impl Network {
    /// Build the network of a 3D mesh: unknowns in id order, a face between every pair of solid
    /// neighbours (areas Δy Δz, Δx Δz, Δx Δy), a boundary face towards every zone cell (surface
    /// resistance by the face's orientation) and towards the bottom zone.
    pub fn new3(mesh: &crate::mesh3::Mesh3) -> Self {
        let g = &mesh.grid;
        let (nx, ny, nz) = (g.nx(), g.ny(), g.nz());
        let mut unk_of = vec![usize::MAX; g.len()];
        let (mut cell_of, mut volume, mut mat) = (Vec::new(), Vec::new(), Vec::new());
        for (id, c) in mesh.cells.iter().enumerate() {
            if let Cell::Solid(m) = c {
                let (i, j, k) = g.ijk(id);
                unk_of[id] = cell_of.len();
                cell_of.push(id);
                volume.push(
                    (g.xe[i + 1] - g.xe[i]) * (g.ye[j + 1] - g.ye[j]) * (g.ze[k + 1] - g.ze[k]),
                );
                mat.push(*m);
            }
        }
        let half = |e: &[f64], i: usize| 0.5 * (e[i + 1] - e[i]);
        let len = |e: &[f64], i: usize| e[i + 1] - e[i];
        let (mut faces, mut bfaces) = (Vec::new(), Vec::new());
        for (p, &id) in cell_of.iter().enumerate() {
            let (i, j, k) = g.ijk(id);
            // (neighbour, half-widths (p, q), area, side, face normal vertical)
            let mut sides: Vec<(Option<usize>, f64, f64, f64, Side)> = Vec::with_capacity(6);
            let ax = len(&g.ye, j) * len(&g.ze, k);
            let ay = len(&g.xe, i) * len(&g.ze, k);
            let az = len(&g.xe, i) * len(&g.ye, j);
            sides.push((
                (i + 1 < nx).then(|| g.id(i + 1, j, k)),
                half(&g.xe, i),
                if i + 1 < nx { half(&g.xe, i + 1) } else { 0.0 },
                ax,
                Side::Right,
            ));
            sides.push((
                i.checked_sub(1).map(|a| g.id(a, j, k)),
                half(&g.xe, i),
                0.0,
                ax,
                Side::Left,
            ));
            sides.push((
                (j + 1 < ny).then(|| g.id(i, j + 1, k)),
                half(&g.ye, j),
                if j + 1 < ny { half(&g.ye, j + 1) } else { 0.0 },
                ay,
                Side::Back,
            ));
            sides.push((
                j.checked_sub(1).map(|b| g.id(i, b, k)),
                half(&g.ye, j),
                0.0,
                ay,
                Side::Front,
            ));
            sides.push((
                (k + 1 < nz).then(|| g.id(i, j, k + 1)),
                half(&g.ze, k),
                if k + 1 < nz { half(&g.ze, k + 1) } else { 0.0 },
                az,
                Side::Bottom,
            ));
            sides.push((
                k.checked_sub(1).map(|c| g.id(i, j, c)),
                half(&g.ze, k),
                0.0,
                az,
                Side::Top,
            ));
            for (nb, dp, dq, area, side) in sides {
                let forward = matches!(side, Side::Right | Side::Back | Side::Bottom);
                match nb.map(|q| (q, mesh.cells[q])) {
                    Some((q, Cell::Solid(_))) if forward => faces.push(Face {
                        p,
                        q: unk_of[q],
                        dp,
                        dq,
                        area,
                    }),
                    Some((_, Cell::Solid(_))) => {}
                    Some((_, Cell::Zone(z))) => {
                        let zone = &mesh.zones[z];
                        let r = if matches!(side, Side::Top | Side::Bottom) {
                            zone.r_horizontal
                        } else {
                            zone.r_vertical
                        };
                        bfaces.push(BFace {
                            p,
                            d: dp,
                            area,
                            r,
                            zone: z,
                            side,
                            group: 0,
                        });
                    }
                    None => {
                        let top = match mesh.top.get(j * nx + i) {
                            Some(crate::mesh::EdgeBc::Zone { zone, r }) if side == Side::Top => {
                                Some((*zone, *r))
                            }
                            _ => None,
                        };
                        if let Some((zone, r)) = top {
                            bfaces.push(BFace {
                                p,
                                d: dp,
                                area,
                                r,
                                zone,
                                side,
                                group: 0,
                            });
                        } else if let (Side::Bottom, Some((zone, r))) = (side, mesh.bottom) {
                            bfaces.push(BFace {
                                p,
                                d: dp,
                                area,
                                r,
                                zone,
                                side,
                                group: 0,
                            });
                        }
                    }
                }
            }
        }
        let n = cell_of.len();
        let (col_ptr, row_idx, diag_slot, face_slot) = lower_pattern(n, &faces);
        Network {
            n,
            n_zones: mesh.zones.len(),
            nx,
            ny,
            nz,
            cell_of,
            unk_of,
            volume,
            mat,
            materials: mesh.materials.clone(),
            faces,
            bfaces,
            col_ptr,
            row_idx,
            diag_slot,
            face_slot,
        }
    }
}

/// What lies across one side of an unknown's cell.
enum Link {
    /// Another unknown (added from the cell on its left or above).
    Face(Face),
    /// A zone, through a surface resistance.
    Boundary(BFace),
    /// Nothing: an adiabatic edge, or a solid pair added from the other cell.
    None,
}

/// The link of unknown `p` in cell (i, j) across `side`.
fn neighbour(mesh: &Mesh, unk_of: &[usize], p: usize, (i, j): (usize, usize), side: Side) -> Link {
    let g = &mesh.grid;
    let (nx, nz) = (g.nx(), g.nz());
    let horizontal = matches!(side, Side::Left | Side::Right);
    // Half-width normal to the face and the face's length.
    let (d, area) = if horizontal {
        (0.5 * g.dx(i), g.dz(j))
    } else {
        (0.5 * g.dz(j), g.dx(i))
    };
    let across = match side {
        Side::Right => (i + 1 < nx).then(|| (i + 1, j)),
        Side::Left => i.checked_sub(1).map(|a| (a, j)),
        Side::Bottom => (j + 1 < nz).then(|| (i, j + 1)),
        Side::Top => j.checked_sub(1).map(|b| (i, b)),
        Side::Front | Side::Back => return Link::None,
    };
    let bface = |zone: usize, r: f64| {
        Link::Boundary(BFace {
            p,
            d,
            area,
            r,
            zone,
            side,
            group: 0,
        })
    };
    match across {
        Some((a, b)) => match mesh.cells[g.id(a, b)] {
            Cell::Solid(_) if matches!(side, Side::Right | Side::Bottom) => Link::Face(Face {
                p,
                q: unk_of[g.id(a, b)],
                dp: d,
                dq: if horizontal {
                    0.5 * g.dx(a)
                } else {
                    0.5 * g.dz(b)
                },
                area,
            }),
            Cell::Solid(_) => Link::None,
            Cell::Zone(z) => {
                let zone = &mesh.zones[z];
                bface(
                    z,
                    if horizontal {
                        zone.r_vertical
                    } else {
                        zone.r_horizontal
                    },
                )
            }
        },
        None => {
            let edge = match side {
                Side::Right => mesh.right[j],
                Side::Left => mesh.left[j],
                Side::Bottom => mesh.bottom[i],
                Side::Top => mesh.top[i],
                Side::Front | Side::Back => EdgeBc::Adiabatic,
            };
            match edge {
                EdgeBc::Zone { zone, r } => bface(zone, r),
                EdgeBc::Adiabatic => Link::None,
            }
        }
    }
}

/// The lower-triangle CSC pattern of the system matrix for `n` unknowns joined by `faces`:
/// column c holds c and every neighbour r > c, rows sorted. Returns (column pointers, row
/// indices, value slot of each diagonal, value slot of each face's off-diagonal).
pub fn lower_pattern(n: usize, faces: &[Face]) -> (Vec<usize>, Vec<usize>, Vec<usize>, Vec<usize>) {
    let mut nbrs: Vec<Vec<(usize, usize)>> = vec![Vec::new(); n];
    for (f, face) in faces.iter().enumerate() {
        nbrs[face.p.min(face.q)].push((face.p.max(face.q), f));
    }
    let mut col_ptr = Vec::with_capacity(n + 1);
    let mut row_idx = Vec::new();
    let mut diag_slot = vec![0; n];
    let mut face_slot = vec![0; faces.len()];
    col_ptr.push(0);
    for (c, list) in nbrs.iter_mut().enumerate() {
        list.sort_unstable();
        diag_slot[c] = row_idx.len();
        row_idx.push(c);
        for &(r, f) in list.iter() {
            face_slot[f] = row_idx.len();
            row_idx.push(r);
        }
        col_ptr.push(row_idx.len());
    }
    (col_ptr, row_idx, diag_slot, face_slot)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::mesh::{Grid, Zone};

    /// A 2 × 2 grid with the top-left cell air of zone 0: three unknowns, two interior faces,
    /// two boundary faces to the air (its right and lower neighbours' sides), and the lower CSC
    /// pattern with one diagonal and its neighbours per column.
    #[test]
    fn faces_and_pattern_of_a_small_grid() {
        let grid = Grid {
            xe: vec![0.0, 1.0, 2.0],
            ze: vec![0.0, 1.0, 2.0],
        };
        let mut mesh = Mesh::uniform(grid, Material::inert("m", 1.0, 1e6));
        let z = mesh.add_zone(Zone {
            name: "air".into(),
            r_horizontal: 0.1,
            r_vertical: 0.2,
        });
        mesh.cells[0] = Cell::Zone(z);
        let net = Network::new(&mesh);
        assert_eq!(net.n, 3);
        assert_eq!(net.unk_of, vec![usize::MAX, 0, 1, 2]);
        assert_eq!(net.faces.len(), 2);
        assert_eq!(net.bfaces.len(), 2);
        // The cell right of the air sees it on its left (a wall: r_vertical), the cell below on
        // its top (a floor: r_horizontal).
        let left = net.bfaces.iter().find(|b| b.side == Side::Left).unwrap();
        let top = net.bfaces.iter().find(|b| b.side == Side::Top).unwrap();
        assert_eq!((left.p, left.r, top.p, top.r), (0, 0.2, 1, 0.1));
        assert_eq!(net.col_ptr, vec![0, 2, 4, 5]);
        assert_eq!(net.row_idx, vec![0, 2, 1, 2, 2]);
        assert_eq!(net.diag_slot, vec![0, 2, 4]);
        assert!((left.conductance(1.0, 0.3) - 1.0 / (0.5 + 0.2 + 0.3)).abs() < 1e-15);
    }
}
