//! Tensor-product graded grids in three dimensions and the cell description a 3D network is built
//! from. Cell (i, j, k) spans [xe_i, xe_{i+1}] × [ye_j, ye_{j+1}] × [ze_k, ze_{k+1}]; its linear id
//! is (k·ny + j)·nx + i (x fastest, z slowest), the natural order the incomplete-Cholesky
//! preconditioner works in. The outer boundary is adiabatic (symmetry or cut-off planes) except
//! the bottom, which may exchange heat with a zone, and the top, column by column.
use crate::mesh::{Cell, EdgeBc, Zone};
use crate::physics::material::Material;

/// Cell edges along the three axes, m.
#[derive(Debug, Clone, PartialEq)]
pub struct Grid3 {
    /// x edges, increasing, m.
    pub xe: Vec<f64>,
    /// y edges, increasing, m.
    pub ye: Vec<f64>,
    /// z edges, increasing (depth), m.
    pub ze: Vec<f64>,
}

impl Grid3 {
    /// Cells along x.
    pub fn nx(&self) -> usize {
        self.xe.len() - 1
    }
    /// Cells along y.
    pub fn ny(&self) -> usize {
        self.ye.len() - 1
    }
    /// Cells along z.
    pub fn nz(&self) -> usize {
        self.ze.len() - 1
    }
    /// Total cells.
    pub fn len(&self) -> usize {
        self.nx() * self.ny() * self.nz()
    }
    /// True if the grid has no cells.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }
    /// Linear id of cell (i, j, k).
    pub fn id(&self, i: usize, j: usize, k: usize) -> usize {
        (k * self.ny() + j) * self.nx() + i
    }
    /// (i, j, k) of a linear id.
    pub fn ijk(&self, id: usize) -> (usize, usize, usize) {
        let (nx, ny) = (self.nx(), self.ny());
        (id % nx, (id / nx) % ny, id / (nx * ny))
    }
    /// Centre of cell index `i` along an axis with edges `e`.
    pub fn centre(e: &[f64], i: usize) -> f64 {
        0.5 * (e[i] + e[i + 1])
    }
}

/// A 3D grid with its cells, materials, zones and an optional bottom zone.
#[derive(Debug, Clone)]
pub struct Mesh3 {
    /// The grid.
    pub grid: Grid3,
    /// Cell contents by id.
    pub cells: Vec<Cell>,
    /// Materials referenced by solid cells.
    pub materials: Vec<Material>,
    /// Zones referenced by zone cells.
    pub zones: Vec<Zone>,
    /// The bottom plane's exchange with a zone (zone, surface resistance m²·K/W), or adiabatic.
    pub bottom: Option<(usize, f64)>,
    /// The top plane's condition per column (index j·nx + i); empty: adiabatic everywhere.
    pub top: Vec<EdgeBc>,
}

impl Mesh3 {
    /// Solid cells (unknowns).
    pub fn solid_cells(&self) -> usize {
        self.cells
            .iter()
            .filter(|c| matches!(c, Cell::Solid(_)))
            .count()
    }
}
