//! The 2D half-section of a foundation: rectangles of materials in the user's coordinates, and its
//! graded mesh.
//!
//! The section runs from the building's centre line (symmetry plane, adiabatic) at
//! x = −(w + B′/2) out to x = domain width, and from the top of the wall (cut adiabatically) down to
//! the domain depth. The floor is a strip of half-width B′/2 inside the wall's inside face, so the
//! per-metre results of the section times the exposed perimeter P are the whole building's
//! (ISO 13370 two-dimensional equivalent floor).
use crate::case::Case;
pub use crate::case::{Part, Rect};
use crate::mesh::{graded_edges, Breakpoint, Cell, EdgeBc, Grid, Mesh, Zone};
use crate::physics::material::Material;

/// Zone indices of the foundation model.
pub const INDOOR: usize = 0;
/// Outdoor air zone.
pub const OUTDOOR: usize = 1;
/// Fixed deep-ground temperature zone (only with a fixed bottom temperature).
pub const DEEP: usize = 2;

/// The half-section.
#[derive(Debug, Clone)]
pub struct Section {
    /// Symmetry line (building centre), m.
    pub x_min: f64,
    /// Far edge in open ground, m.
    pub x_max: f64,
    /// Top of the section (wall top or floor, whichever is higher), m.
    pub z_top: f64,
    /// Bottom of the section, m.
    pub z_bottom: f64,
    /// Construction rectangles, painted in this order over soil and air.
    pub rects: Vec<Rect>,
}

impl Section {
    /// The section of `case` (validated, so its pieces neither overlap nor leave the domain).
    pub fn from_case(case: &Case) -> Self {
        let e = case.extent();
        Section {
            x_min: e.x_min,
            x_max: e.x_max,
            z_top: e.z_top,
            z_bottom: e.z_bottom,
            rects: case.parts(),
        }
    }

    /// Breakpoints of the graded axes: every construction edge, the wall faces, ground level,
    /// the strata boundaries and the domain's ends, with the cell size wanted at each.
    pub fn breakpoints(&self, case: &Case) -> (Vec<Breakpoint>, Vec<Breakpoint>) {
        self.breakpoints_sized(case, case.simulation.sizes_2d())
    }

    /// [`Self::breakpoints`] for the mesh sizes (edge size, growth, largest size), m.
    pub fn breakpoints_sized(
        &self,
        case: &Case,
        (h0, _, hmax): (f64, f64, f64),
    ) -> (Vec<Breakpoint>, Vec<Breakpoint>) {
        let w = case.wall.thickness_m;
        let bp = |at: f64, size: f64| Breakpoint { at, size };
        let mut bx = vec![
            bp(self.x_min, (4.0 * h0).min(hmax)),
            bp(self.x_max, hmax),
            bp(-w, h0),
            bp(0.0, h0),
        ];
        let mut bz = vec![bp(self.z_top, h0), bp(0.0, h0), bp(self.z_bottom, hmax)];
        // The stated cut of the wall, where the stated wall above ground ends.
        let cut = -case.wall.height_above_ground_m;
        if cut > self.z_top + 1e-9 {
            bz.push(bp(cut, h0));
        }
        for r in &self.rects {
            for x in [r.x0, r.x1] {
                if x > self.x_min + 1e-9 && x < self.x_max - 1e-9 {
                    bx.push(bp(x, h0));
                }
            }
            for z in [r.z0, r.z1] {
                if z > self.z_top + 1e-9 && z < self.z_bottom - 1e-9 {
                    bz.push(bp(z, h0));
                }
            }
        }
        for s in &case.strata {
            if s.bottom_m < self.z_bottom - 1e-9 {
                bz.push(bp(s.bottom_m, 2.0 * h0));
            }
        }
        (bx, bz)
    }

    /// The graded grid of the section (every construction edge on a grid line).
    pub fn grid(&self, case: &Case) -> Grid {
        let (_, growth, hmax) = case.simulation.sizes_2d();
        let (bx, bz) = self.breakpoints(case);
        Grid {
            xe: graded_edges(&bx, growth, hmax),
            ze: graded_edges(&bz, growth, hmax),
        }
    }

    /// What fills the point (x, z) of the section (a cell centre): the construction part painted
    /// last over it, else soil by depth below ground, fill under the floor above ground level,
    /// indoor air above the floor and outdoor air outside the wall above ground.
    pub fn cell_at(&self, case: &Case, m: &Materials, x: f64, z: f64) -> Cell {
        if let Some(r) = self
            .rects
            .iter()
            .rev()
            .find(|r| x >= r.x0 && x <= r.x1 && z >= r.z0 && z <= r.z1)
        {
            return Cell::Solid(m.of_part(r.part));
        }
        let w = case.wall.thickness_m;
        if x < -w && z < case.floor_z() {
            Cell::Zone(INDOOR)
        } else if z < 0.0 {
            if x > 0.0 {
                Cell::Zone(OUTDOOR)
            } else {
                Cell::Solid(m.fill)
            }
        } else {
            let k = case
                .strata
                .iter()
                .position(|s| z < s.bottom_m)
                .unwrap_or(case.strata.len() - 1);
            Cell::Solid(m.strata[k])
        }
    }

    /// Graded mesh of the section for `case` (materials: strata first, then construction parts).
    pub fn mesh(&self, case: &Case) -> Mesh {
        let grid = self.grid(case);
        let (nx, nz) = (grid.nx(), grid.nz());
        let mut mesh = Mesh::uniform(grid, case.strata[0].material.clone());
        let m = Materials::add(&mut mesh.materials, case);
        add_zones(&mut mesh.zones, case);
        for j in 0..nz {
            for i in 0..nx {
                let id = mesh.grid.id(i, j);
                mesh.cells[id] = self.cell_at(case, &m, mesh.grid.xc(i), mesh.grid.zc(j));
            }
        }
        // Top edge: a solid cell in the top row faces the indoor air when the top is the floor
        // (inside the wall), the outdoor air when the top is ground level (outside it), and is
        // the section's cut (adiabatic) over the wall and the insulation on it.
        let w = case.wall.thickness_m;
        let (at_floor, at_ground) = (self.z_top >= case.floor_z() - 1e-9, self.z_top >= -1e-9);
        for i in 0..nx {
            let xc = mesh.grid.xc(i);
            if matches!(mesh.cells[mesh.grid.id(i, 0)], Cell::Solid(_)) {
                mesh.top[i] = if xc < -w && at_floor {
                    EdgeBc::Zone {
                        zone: INDOOR,
                        r: indoor_floor_r(case),
                    }
                } else if xc > 0.0 && at_ground {
                    EdgeBc::Zone {
                        zone: OUTDOOR,
                        r: case.climate.r_se,
                    }
                } else {
                    EdgeBc::Adiabatic
                };
            }
        }
        if case.simulation.bottom_temperature_c.is_some() {
            mesh.bottom = vec![EdgeBc::Zone { zone: DEEP, r: 0.0 }; nx];
        }
        mesh
    }
}

/// Surface resistance of the floor seen from the indoor air: R_si (heat flow down) plus the
/// floor finish, m²·K/W.
pub fn indoor_floor_r(case: &Case) -> f64 {
    case.building.r_si_floor + case.slab.finish_r
}

/// The zones of a foundation model, in the order of [`INDOOR`], [`OUTDOOR`] and (with a fixed
/// bottom temperature) [`DEEP`].
pub fn add_zones(zones: &mut Vec<Zone>, case: &Case) {
    zones.push(Zone {
        name: "indoor".into(),
        r_horizontal: indoor_floor_r(case),
        r_vertical: case.building.r_si_wall,
    });
    zones.push(Zone {
        name: "outdoor".into(),
        r_horizontal: case.climate.r_se,
        r_vertical: case.climate.r_se,
    });
    if case.simulation.bottom_temperature_c.is_some() {
        zones.push(Zone {
            name: "deep ground".into(),
            r_horizontal: 0.0,
            r_vertical: 0.0,
        });
    }
}

/// Material indices of a case's parts in a mesh.
#[derive(Debug, Clone)]
pub struct Materials {
    /// Each soil stratum.
    pub strata: Vec<usize>,
    /// Slab.
    pub slab: usize,
    /// Wall.
    pub wall: usize,
    /// Footing.
    pub footing: usize,
    /// Fill (gravel when the case has none).
    pub fill: usize,
    /// Backfill (the top stratum when the case has none).
    pub backfill: usize,
    /// Each insulation piece.
    pub insulation: Vec<usize>,
}

impl Materials {
    /// Add the case's materials to a mesh's `materials`, whose material 0 is the top stratum:
    /// strata, then slab, wall, footing, fill, insulation pieces, backfill.
    pub fn add(materials: &mut Vec<Material>, case: &Case) -> Self {
        let mut add = |m: Material| {
            materials.push(m);
            materials.len() - 1
        };
        let mut strata = vec![0];
        for s in case.strata.iter().skip(1) {
            strata.push(add(s.material.clone()));
        }
        let slab = add(case.slab.material.clone());
        let wall = add(case.wall.material.clone());
        let footing = add(case.footing.material.clone());
        let fill_material = case
            .fill
            .as_ref()
            .map(|f| f.material.clone())
            .unwrap_or_else(|| {
                crate::physics::library::named_material("gravel").expect("gravel exists")
            });
        let fill = add(fill_material);
        let insulation = case
            .insulation
            .iter()
            .map(|i| add(i.material.clone()))
            .collect();
        let backfill = case
            .basement
            .as_ref()
            .and_then(|b| b.backfill.as_ref())
            .map_or(strata[0], |b| add(b.material.clone()));
        Materials {
            strata,
            slab,
            wall,
            footing,
            fill,
            backfill,
            insulation,
        }
    }

    /// The material of a construction part.
    pub fn of_part(&self, p: Part) -> usize {
        match p {
            Part::Slab => self.slab,
            Part::Wall => self.wall,
            Part::Footing => self.footing,
            Part::Fill => self.fill,
            Part::Backfill => self.backfill,
            Part::Insulation(k) => self.insulation[k],
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn demo() -> Case {
        crate::case::parse_case(
            "demo.toml",
            include_str!("../examples/kettle-hollow-house.toml"),
        )
        .unwrap()
    }

    /// The demo section: every construction edge on a grid line, and what fills a few points
    /// (wall 0.2 m, floor 0.2 m above ground, footing 0.40 × 0.20 m flush outside, 0.45 m deep;
    /// 50 mm vertical insulation outside; a 1 m wing 0.30 m deep).
    #[test]
    fn demo_layout_and_cells() {
        let case = demo();
        let sec = Section::from_case(&case);
        let grid = sec.grid(&case);
        for r in &sec.rects {
            for x in [r.x0, r.x1] {
                assert!(
                    grid.xe.iter().any(|e| (e - x).abs() < 1e-9),
                    "x edge {x} of {:?}",
                    r.part
                );
            }
            for z in [r.z0, r.z1] {
                assert!(
                    grid.ze.iter().any(|e| (e - z).abs() < 1e-9),
                    "z edge {z} of {:?}",
                    r.part
                );
            }
        }
        let mut mesh = Mesh::uniform(grid, case.strata[0].material.clone());
        let m = Materials::add(&mut mesh.materials, &case);
        let at = |x, z| sec.cell_at(&case, &m, x, z);
        assert_eq!(at(-1.0, -0.5), Cell::Zone(INDOOR));
        assert_eq!(at(1.0, -0.1), Cell::Zone(OUTDOOR));
        assert_eq!(at(-0.1, 0.1), Cell::Solid(m.wall));
        assert_eq!(at(-0.1, 0.4), Cell::Solid(m.footing));
        assert_eq!(at(0.02, 0.2), Cell::Solid(m.insulation[1]));
        assert_eq!(at(0.5, 0.32), Cell::Solid(m.insulation[2]));
        assert_eq!(at(-1.0, -0.15), Cell::Solid(m.slab));
        assert_eq!(at(3.0, 2.0), Cell::Solid(m.strata[0]));
    }

    /// The mesh's top edge: indoor air over the floor, outdoor air over the ground, the wall's
    /// cut adiabatic; no deep-ground zone without a fixed bottom temperature.
    #[test]
    fn demo_mesh_edges_and_zones() {
        let case = demo();
        let mesh = Section::from_case(&case).mesh(&case);
        assert_eq!(mesh.zones.len(), 2);
        let i_wall = mesh.grid.find_x(-0.1);
        assert_eq!(mesh.top[i_wall], EdgeBc::Adiabatic);
        assert!(mesh.bottom.iter().all(|b| *b == EdgeBc::Adiabatic));
        assert!(mesh.solid_cells() > 1000);
    }
}
