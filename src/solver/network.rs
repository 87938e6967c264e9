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

/// Topology, geometry and matrix pattern of a mesh.
#[derive(Debug, Clone)]
pub struct Network {
    /// Number of unknowns.
    pub n: usize,
    /// Number of zones.
    pub n_zones: usize,
    /// Grid columns.
    pub nx: usize,
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
        let mut cell_of = Vec::new();
        let mut volume = Vec::new();
        let mut mat = Vec::new();
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
        let n = cell_of.len();
        let mut faces = Vec::new();
        let mut bfaces = Vec::new();
        let zone_face = |zone: usize, p: usize, d: f64, area: f64, side: Side| {
            let z = &mesh.zones[zone];
            let r = match side {
                Side::Top | Side::Bottom => z.r_horizontal,
                Side::Left | Side::Right => z.r_vertical,
            };
            BFace {
                p,
                d,
                area,
                r,
                zone,
                side,
                group: 0,
            }
        };
        for j in 0..nz {
            for i in 0..nx {
                let id = g.id(i, j);
                let p = unk_of[id];
                if p == usize::MAX {
                    continue;
                }
                let (hx, hz) = (0.5 * g.dx(i), 0.5 * g.dz(j));
                // Right neighbour.
                if i + 1 < nx {
                    let nid = g.id(i + 1, j);
                    match mesh.cells[nid] {
                        Cell::Solid(_) => faces.push(Face {
                            p,
                            q: unk_of[nid],
                            dp: hx,
                            dq: 0.5 * g.dx(i + 1),
                            area: g.dz(j),
                        }),
                        Cell::Zone(z) => bfaces.push(zone_face(z, p, hx, g.dz(j), Side::Right)),
                    }
                } else if let EdgeBc::Zone { zone, r } = mesh.right[j] {
                    bfaces.push(BFace {
                        p,
                        d: hx,
                        area: g.dz(j),
                        r,
                        zone,
                        side: Side::Right,
                        group: 0,
                    });
                }
                // Left neighbour (zone or edge only; solid pairs were added from the left cell).
                if i > 0 {
                    if let Cell::Zone(z) = mesh.cells[g.id(i - 1, j)] {
                        bfaces.push(zone_face(z, p, hx, g.dz(j), Side::Left));
                    }
                } else if let EdgeBc::Zone { zone, r } = mesh.left[j] {
                    bfaces.push(BFace {
                        p,
                        d: hx,
                        area: g.dz(j),
                        r,
                        zone,
                        side: Side::Left,
                        group: 0,
                    });
                }
                // Lower neighbour.
                if j + 1 < nz {
                    let nid = g.id(i, j + 1);
                    match mesh.cells[nid] {
                        Cell::Solid(_) => faces.push(Face {
                            p,
                            q: unk_of[nid],
                            dp: hz,
                            dq: 0.5 * g.dz(j + 1),
                            area: g.dx(i),
                        }),
                        Cell::Zone(z) => bfaces.push(zone_face(z, p, hz, g.dx(i), Side::Bottom)),
                    }
                } else if let EdgeBc::Zone { zone, r } = mesh.bottom[i] {
                    bfaces.push(BFace {
                        p,
                        d: hz,
                        area: g.dx(i),
                        r,
                        zone,
                        side: Side::Bottom,
                        group: 0,
                    });
                }
                // Upper neighbour.
                if j > 0 {
                    if let Cell::Zone(z) = mesh.cells[g.id(i, j - 1)] {
                        bfaces.push(zone_face(z, p, hz, g.dx(i), Side::Top));
                    }
                } else if let EdgeBc::Zone { zone, r } = mesh.top[i] {
                    bfaces.push(BFace {
                        p,
                        d: hz,
                        area: g.dx(i),
                        r,
                        zone,
                        side: Side::Top,
                        group: 0,
                    });
                }
            }
        }
        // Lower-triangle CSC pattern: column c holds c and every neighbour r > c.
        let mut nbrs: Vec<Vec<(usize, usize)>> = vec![Vec::new(); n];
        for (f, face) in faces.iter().enumerate() {
            let (lo, hi) = if face.p < face.q {
                (face.p, face.q)
            } else {
                (face.q, face.p)
            };
            nbrs[lo].push((hi, f));
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
        Network {
            n,
            n_zones: mesh.zones.len(),
            nx,
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
            *g = b.area / (b.d / k[b.p] + b.r);
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
