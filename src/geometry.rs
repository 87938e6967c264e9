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

    /// Graded mesh of the section for `case` (materials: strata first, then construction parts).
    pub fn mesh(&self, case: &Case) -> Mesh {
        let (h0, growth, hmax) = case.simulation.mesh.sizes();
        let w = case.wall.thickness_m;
        let mut bx = vec![
            Breakpoint {
                at: self.x_min,
                size: (4.0 * h0).min(hmax),
            },
            Breakpoint {
                at: self.x_max,
                size: hmax,
            },
            Breakpoint { at: -w, size: h0 },
            Breakpoint { at: 0.0, size: h0 },
        ];
        let mut bz = vec![
            Breakpoint {
                at: self.z_top,
                size: h0,
            },
            Breakpoint { at: 0.0, size: h0 },
            Breakpoint {
                at: self.z_bottom,
                size: hmax,
            },
        ];
        for r in &self.rects {
            for x in [r.x0, r.x1] {
                if x > self.x_min + 1e-9 && x < self.x_max - 1e-9 {
                    bx.push(Breakpoint { at: x, size: h0 });
                }
            }
            for z in [r.z0, r.z1] {
                if z > self.z_top + 1e-9 && z < self.z_bottom - 1e-9 {
                    bz.push(Breakpoint { at: z, size: h0 });
                }
            }
        }
        for s in &case.strata {
            if s.bottom_m < self.z_bottom - 1e-9 {
                bz.push(Breakpoint {
                    at: s.bottom_m,
                    size: 2.0 * h0,
                });
            }
        }
        let grid = Grid {
            xe: graded_edges(&bx, growth, hmax),
            ze: graded_edges(&bz, growth, hmax),
        };
        let (nx, nz) = (grid.nx(), grid.nz());

        // Materials: strata, then slab, wall, footing, fill, insulation pieces.
        let mut mesh = Mesh::uniform(grid, case.strata[0].material.clone());
        let mut strata_idx = vec![0];
        for s in case.strata.iter().skip(1) {
            strata_idx.push(mesh.add_material(s.material.clone()));
        }
        let slab_m = mesh.add_material(case.slab.material.clone());
        let wall_m = mesh.add_material(case.wall.material.clone());
        let foot_m = mesh.add_material(case.footing.material.clone());
        let fill_m = mesh.add_material(
            case.fill
                .as_ref()
                .map(|f| f.material.clone())
                .unwrap_or_else(|| {
                    crate::physics::library::named_material("gravel").expect("gravel exists")
                }),
        );
        let ins_m: Vec<usize> = case
            .insulation
            .iter()
            .map(|i| mesh.add_material(i.material.clone()))
            .collect();
        let backfill_m = case
            .basement
            .as_ref()
            .and_then(|b| b.backfill.as_ref())
            .map(|b| mesh.add_material(b.material.clone()));
        mesh.add_zone(Zone {
            name: "indoor".into(),
            r_horizontal: case.building.r_si_floor + case.slab.finish_r,
            r_vertical: case.building.r_si_wall,
        });
        mesh.add_zone(Zone {
            name: "outdoor".into(),
            r_horizontal: case.climate.r_se,
            r_vertical: case.climate.r_se,
        });
        // Soil by depth; air above ground.
        for j in 0..nz {
            let zc = mesh.grid.zc(j);
            for i in 0..nx {
                let xc = mesh.grid.xc(i);
                let cell = if xc < -w && zc < case.floor_z() {
                    Cell::Zone(INDOOR)
                } else if zc < 0.0 {
                    if xc > 0.0 {
                        Cell::Zone(OUTDOOR)
                    } else {
                        Cell::Solid(fill_m)
                    }
                } else {
                    let k = case
                        .strata
                        .iter()
                        .position(|s| zc < s.bottom_m)
                        .unwrap_or(case.strata.len() - 1);
                    Cell::Solid(strata_idx[k])
                };
                let id = mesh.grid.id(i, j);
                mesh.cells[id] = cell;
            }
        }
        for r in &self.rects {
            let m = match r.part {
                Part::Slab => slab_m,
                Part::Wall => wall_m,
                Part::Footing => foot_m,
                Part::Fill => fill_m,
                Part::Backfill => backfill_m.unwrap_or(strata_idx[0]),
                Part::Insulation(k) => ins_m[k],
            };
            mesh.paint(r.x0, r.x1, r.z0, r.z1, Cell::Solid(m));
        }
        // Top edge: a solid cell in the top row faces the indoor air inside the wall, the outdoor
        // air outside it, and the section cut (adiabatic) over the wall.
        for i in 0..nx {
            let xc = mesh.grid.xc(i);
            if matches!(mesh.cells[mesh.grid.id(i, 0)], Cell::Solid(_)) {
                mesh.top[i] = if xc < -w {
                    EdgeBc::Zone {
                        zone: INDOOR,
                        r: case.building.r_si_floor + case.slab.finish_r,
                    }
                } else if xc > 0.0 {
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
            let z = mesh.add_zone(Zone {
                name: "deep ground".into(),
                r_horizontal: 0.0,
                r_vertical: 0.0,
            });
            debug_assert_eq!(z, DEEP);
            mesh.bottom = vec![EdgeBc::Zone { zone: DEEP, r: 0.0 }; nx];
        }
        mesh
    }
}
