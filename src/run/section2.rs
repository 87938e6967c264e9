//! What the 2D section observes each day: the frost measures along its lines, probe
//! temperatures, the field of every day and the field of the design (least-margin) day.
use super::driver::Observer;
use super::frost::{FrostLines, FrostMeasures};
use super::result::Field;
use crate::analysis::point_temperature;
use crate::case::Case;
use crate::mesh::Mesh;
use crate::solver::Network;
use ndarray::{Array2, Array3, Axis};

/// The 2D section's observer.
pub struct Section2<'a> {
    mesh: &'a Mesh,
    lines: FrostLines,
    probes: Vec<(f64, f64)>,
    fields: Option<Array3<f32>>,
    design: Option<Field>,
}

impl<'a> Section2<'a> {
    /// The observer of `case` on `mesh`.
    pub fn new(mesh: &'a Mesh, case: &Case) -> Self {
        Section2 {
            mesh,
            lines: FrostLines::new(mesh, case),
            probes: case.probes.iter().map(|p| (p.x_m, p.z_m)).collect(),
            fields: None,
            design: None,
        }
    }
}

impl Observer for Section2<'_> {
    /// The field of every day (days × nz × nx, °C, NaN for air) and the design day's field.
    type Kept = (Array3<f32>, Field);

    fn t_line(&self) -> f64 {
        self.lines.t_line
    }

    fn measure(&mut self, net: &Network, t: &[f64]) -> FrostMeasures {
        self.lines.measure(self.mesh, net, t)
    }

    fn probes(&self, net: &Network, t: &[f64], zone_t: &[f64]) -> Vec<f64> {
        self.probes
            .iter()
            .map(|&(x, z)| point_temperature(self.mesh, net, t, zone_t, x, z).unwrap_or(f64::NAN))
            .collect()
    }

    fn cell_bottom(&self, net: &Network, p: usize) -> (f64, bool) {
        let g = &self.mesh.grid;
        let j = net.cell_of[p] / g.nx();
        (g.ze[j + 1], j + 1 == g.nz())
    }

    fn keep(
        &mut self,
        d: usize,
        days: usize,
        net: &Network,
        t: &[f64],
        design_day: bool,
        doy: usize,
    ) {
        let g = &self.mesh.grid;
        let grid = super::grid_field(self.mesh, net, t);
        let fields = self
            .fields
            .get_or_insert_with(|| Array3::zeros((days, g.nz(), g.nx())));
        fields
            .index_axis_mut(Axis(0), d)
            .assign(&grid.mapv(|v| v as f32));
        if design_day || self.design.is_none() {
            self.design = Some(Field {
                day_of_year: doy,
                t: grid,
            });
        }
    }

    fn finish(&mut self) -> Self::Kept {
        let g = &self.mesh.grid;
        let fields = self
            .fields
            .take()
            .unwrap_or_else(|| Array3::zeros((0, g.nz(), g.nx())));
        let field = self.design.take().unwrap_or_else(|| Field {
            day_of_year: 0,
            t: Array2::from_elem((g.nz(), g.nx()), f64::NAN),
        });
        (fields, field)
    }
}
