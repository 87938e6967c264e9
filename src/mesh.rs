//! Graded rectilinear grids and the cell/boundary description the solver consumes.
//!
//! The grid is cell-centred: `xe` and `ze` hold the cell edges (m), cell (i, j) spans
//! [xe\[i\], xe\[i+1\]] × [ze\[j\], ze\[j+1\]]. For the foundation model x is horizontal (0 at the
//! exterior face of the foundation wall, positive outward) and z is depth below finished ground
//! level (positive down); the generic solver only needs a rectangle, so the verification tests use
//! it with their own axes.
use crate::physics::material::Material;

/// Cell edges along both axes, m.
#[derive(Debug, Clone, PartialEq)]
pub struct Grid {
    /// x edges, strictly increasing, m.
    pub xe: Vec<f64>,
    /// z edges, strictly increasing, m.
    pub ze: Vec<f64>,
}

impl Grid {
    /// Number of cells along x.
    pub fn nx(&self) -> usize {
        self.xe.len() - 1
    }
    /// Number of cells along z.
    pub fn nz(&self) -> usize {
        self.ze.len() - 1
    }
    /// Total number of cells.
    pub fn len(&self) -> usize {
        self.nx() * self.nz()
    }
    /// True if the grid has no cells.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }
    /// Linear cell index of (i, j) (x index, z index).
    pub fn id(&self, i: usize, j: usize) -> usize {
        j * self.nx() + i
    }
    /// Cell centre x, m.
    pub fn xc(&self, i: usize) -> f64 {
        0.5 * (self.xe[i] + self.xe[i + 1])
    }
    /// Cell centre z, m.
    pub fn zc(&self, j: usize) -> f64 {
        0.5 * (self.ze[j] + self.ze[j + 1])
    }
    /// Cell width, m.
    pub fn dx(&self, i: usize) -> f64 {
        self.xe[i + 1] - self.xe[i]
    }
    /// Cell height, m.
    pub fn dz(&self, j: usize) -> f64 {
        self.ze[j + 1] - self.ze[j]
    }
    /// Index of the cell column containing x (clamped to the grid).
    pub fn find_x(&self, x: f64) -> usize {
        find(&self.xe, x)
    }
    /// Index of the cell row containing z (clamped to the grid).
    pub fn find_z(&self, z: f64) -> usize {
        find(&self.ze, z)
    }
}

fn find(edges: &[f64], v: f64) -> usize {
    let n = edges.len() - 1;
    match edges.partition_point(|&e| e <= v) {
        0 => 0,
        k if k > n => n - 1,
        k => k - 1,
    }
}

/// A fixed point of a graded axis: a coordinate that must be a cell edge, and the cell size wanted
/// next to it, m.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Breakpoint {
    /// Coordinate, m.
    pub at: f64,
    /// Cell size next to it, m.
    pub size: f64,
}

/// Edges of a graded axis.
///
/// Every breakpoint becomes an edge. Between neighbours a and b the target cell size is
/// h(s) = min(h_max, h_a + (r − 1)(s − a), h_b + (r − 1)(b − s)), i.e. geometric growth with ratio r
/// away from each breakpoint (a geometric series with ratio r has cell size ≈ h₀ + (r − 1)·distance).
/// The number of cells is n = ⌈∫ds/h⌉ and edges equidistribute ∫ds/h, so neighbouring cells differ
/// by at most about the ratio r.
pub fn graded_edges(points: &[Breakpoint], growth: f64, h_max: f64) -> Vec<f64> {
    let mut pts: Vec<Breakpoint> = points.to_vec();
    pts.sort_by(|a, b| a.at.total_cmp(&b.at));
    // Merge breakpoints closer than 1 mm: keep the finer size.
    let mut merged: Vec<Breakpoint> = Vec::new();
    for p in pts {
        match merged.last_mut() {
            Some(last) if (p.at - last.at).abs() < 1e-3 => last.size = last.size.min(p.size),
            _ => merged.push(p),
        }
    }
    let g = growth - 1.0;
    let mut edges = vec![merged[0].at];
    for w in merged.windows(2) {
        let (a, b) = (w[0], w[1]);
        let len = b.at - a.at;
        let h = |s: f64| {
            (a.size + g * (s - a.at))
                .min(b.size + g * (b.at - s))
                .min(h_max)
                .max(1e-6)
        };
        // Cumulative ∫ ds/h on a fine sampling, then invert.
        let m = ((len / a.size.min(b.size)) * 8.0).ceil().clamp(64.0, 2.0e6) as usize;
        let mut cum = vec![0.0; m + 1];
        for k in 0..m {
            let s0 = a.at + len * k as f64 / m as f64;
            let s1 = a.at + len * (k + 1) as f64 / m as f64;
            cum[k + 1] = cum[k] + 0.5 * (1.0 / h(s0) + 1.0 / h(s1)) * (s1 - s0);
        }
        let total = cum[m];
        let n = (total - 1e-9).ceil().max(1.0) as usize;
        let mut k = 0;
        for c in 1..n {
            let target = total * c as f64 / n as f64;
            while cum[k + 1] < target {
                k += 1;
            }
            let f = (target - cum[k]) / (cum[k + 1] - cum[k]);
            edges.push(a.at + len * (k as f64 + f) / m as f64);
        }
        edges.push(b.at);
    }
    edges
}

/// What fills a cell.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Cell {
    /// A solid of material index `usize` (into [`Mesh::materials`]); an unknown of the solver.
    Solid(usize),
    /// Air of boundary zone `usize` (into [`Mesh::zones`]); not solved, its faces to solids are
    /// boundary faces.
    Zone(usize),
}

/// An air zone (indoor, outdoor) with a prescribed temperature and surface resistances.
#[derive(Debug, Clone, PartialEq)]
pub struct Zone {
    /// Name for reports.
    pub name: String,
    /// Surface resistance of a horizontal surface (face with a vertical normal: floor, ground),
    /// m²·K/W.
    pub r_horizontal: f64,
    /// Surface resistance of a vertical surface (face with a horizontal normal: wall), m²·K/W.
    pub r_vertical: f64,
}

/// Condition on one face of the outer boundary of the grid rectangle.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum EdgeBc {
    /// No heat flow (symmetry plane or cut plane).
    Adiabatic,
    /// Heat exchange with zone `zone` through surface resistance `r` (m²·K/W; 0 = fixed temperature).
    Zone {
        /// Zone index.
        zone: usize,
        /// Surface resistance, m²·K/W.
        r: f64,
    },
}

/// Grid, cell contents and boundary conditions: everything the solver needs.
#[derive(Debug, Clone)]
pub struct Mesh {
    /// The grid.
    pub grid: Grid,
    /// Cell contents, indexed by [`Grid::id`].
    pub cells: Vec<Cell>,
    /// Materials referenced by [`Cell::Solid`].
    pub materials: Vec<Material>,
    /// Zones referenced by [`Cell::Zone`] and [`EdgeBc::Zone`].
    pub zones: Vec<Zone>,
    /// Left edge (x = xe\[0\]), one entry per row j.
    pub left: Vec<EdgeBc>,
    /// Right edge (x = xe\[nx\]), one entry per row j.
    pub right: Vec<EdgeBc>,
    /// Top edge (z = ze\[0\]), one entry per column i.
    pub top: Vec<EdgeBc>,
    /// Bottom edge (z = ze\[nz\]), one entry per column i.
    pub bottom: Vec<EdgeBc>,
}

impl Mesh {
    /// A mesh with every cell of material 0 and adiabatic edges.
    pub fn uniform(grid: Grid, material: Material) -> Self {
        let (nx, nz) = (grid.nx(), grid.nz());
        Mesh {
            cells: vec![Cell::Solid(0); grid.len()],
            grid,
            materials: vec![material],
            zones: Vec::new(),
            left: vec![EdgeBc::Adiabatic; nz],
            right: vec![EdgeBc::Adiabatic; nz],
            top: vec![EdgeBc::Adiabatic; nx],
            bottom: vec![EdgeBc::Adiabatic; nx],
        }
    }

    /// Add a material and return its index.
    pub fn add_material(&mut self, m: Material) -> usize {
        self.materials.push(m);
        self.materials.len() - 1
    }

    /// Add a zone and return its index.
    pub fn add_zone(&mut self, z: Zone) -> usize {
        self.zones.push(z);
        self.zones.len() - 1
    }

    /// Set every cell whose centre lies in [x0, x1] × [z0, z1] to `cell`.
    pub fn paint(&mut self, x0: f64, x1: f64, z0: f64, z1: f64, cell: Cell) {
        for j in 0..self.grid.nz() {
            let zc = self.grid.zc(j);
            if zc < z0 || zc > z1 {
                continue;
            }
            for i in 0..self.grid.nx() {
                let xc = self.grid.xc(i);
                if xc >= x0 && xc <= x1 {
                    let id = self.grid.id(i, j);
                    self.cells[id] = cell;
                }
            }
        }
    }

    /// Number of solid cells (unknowns).
    pub fn solid_cells(&self) -> usize {
        self.cells
            .iter()
            .filter(|c| matches!(c, Cell::Solid(_)))
            .count()
    }
}

/// Uniform edges from `a` to `b` in `n` cells.
pub fn uniform_edges(a: f64, b: f64, n: usize) -> Vec<f64> {
    (0..=n).map(|k| a + (b - a) * k as f64 / n as f64).collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn graded_axis_hits_breakpoints_and_grows_gently() {
        let pts = [
            Breakpoint {
                at: 0.0,
                size: 0.02,
            },
            Breakpoint {
                at: 0.3,
                size: 0.02,
            },
            Breakpoint {
                at: 20.0,
                size: 1.0,
            },
        ];
        let e = graded_edges(&pts, 1.2, 1.0);
        assert_eq!(e[0], 0.0);
        assert!(e.iter().any(|&v| (v - 0.3).abs() < 1e-12));
        assert_eq!(*e.last().unwrap(), 20.0);
        let d: Vec<f64> = e.windows(2).map(|w| w[1] - w[0]).collect();
        assert!(d[0] <= 0.021);
        for w in d.windows(2) {
            let r = w[1] / w[0];
            assert!(r < 1.3 && r > 1.0 / 1.3, "ratio {r} in {d:?}");
        }
        assert!(d.iter().all(|&h| h <= 1.0 + 1e-9));
    }

    #[test]
    fn find_cell() {
        let g = Grid {
            xe: vec![0.0, 1.0, 3.0],
            ze: vec![0.0, 2.0],
        };
        assert_eq!(g.find_x(0.5), 0);
        assert_eq!(g.find_x(1.5), 1);
        assert_eq!(g.find_x(5.0), 1);
        assert_eq!(g.find_x(-1.0), 0);
    }
}
