//! The 2D half-section of a foundation: rectangles of materials in the user's coordinates, and its
//! graded mesh.
//!
//! The section runs from the building's centre line (symmetry plane, adiabatic) at
//! x = −(w + B′/2) out to x = domain width, and from the top of the wall (cut adiabatically) down to
//! the domain depth. The floor is a strip of half-width B′/2 inside the wall's inside face, so the
//! per-metre results of the section times the exposed perimeter P are the whole building's
//! (ISO 13370 two-dimensional equivalent floor).
use crate::case::{Case, InsulationKind};
use crate::error::{Error, Location, Result};
use crate::mesh::{graded_edges, Breakpoint, Cell, EdgeBc, Grid, Mesh, Zone};

/// What a rectangle is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Part {
    /// Floor slab.
    Slab,
    /// Foundation wall.
    Wall,
    /// Footing.
    Footing,
    /// Granular fill under the slab.
    Fill,
    /// Backfill beside a basement wall.
    Backfill,
    /// Insulation piece k of the case.
    Insulation(usize),
}

/// An axis-aligned rectangle [x0, x1] × [z0, z1], m.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Rect {
    /// Left x, m.
    pub x0: f64,
    /// Right x, m.
    pub x1: f64,
    /// Top z, m.
    pub z0: f64,
    /// Bottom z, m.
    pub z1: f64,
    /// What it is.
    pub part: Part,
}

impl Rect {
    fn overlaps(&self, o: &Rect) -> bool {
        let e = 1e-9;
        self.x0 < o.x1 - e && o.x0 < self.x1 - e && self.z0 < o.z1 - e && o.z0 < self.z1 - e
    }
}

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
    /// Lay out the section of `case`; overlapping construction pieces are input errors.
    pub fn from_case(case: &Case) -> Result<Self> {
        let w = case.wall.thickness_m;
        let x_min = -(w + 0.5 * case.building.b_prime_m);
        let x_max = case.simulation.domain_width_m;
        let floor_z = case.floor_z();
        let slab_bot = case.slab_bottom_z();
        let z_top = (-case.wall.height_above_ground_m).min(floor_z);
        let z_bottom = case.simulation.domain_depth_m;
        let (fx0, fx1) = case.footing_x();
        let ftop = case.footing_top_z();
        let mut rects = Vec::new();
        let mut under = slab_bot;
        let mut ins_rects = Vec::new();
        for (k, ins) in case.insulation.iter().enumerate() {
            let t = ins.thickness_m;
            let r = match ins.kind {
                InsulationKind::UnderSlab { band_width_m } => {
                    if band_width_m.is_none() {
                        under = slab_bot + t;
                    }
                    let x0 = band_width_m.map_or(x_min, |b| -w - b);
                    Rect {
                        x0,
                        x1: -w,
                        z0: slab_bot,
                        z1: slab_bot + t,
                        part: Part::Insulation(k),
                    }
                }
                InsulationKind::VerticalOutside { top_m, bottom_m } => Rect {
                    x0: 0.0,
                    x1: t,
                    z0: top_m,
                    z1: bottom_m,
                    part: Part::Insulation(k),
                },
                InsulationKind::VerticalInside { top_m, bottom_m } => Rect {
                    x0: -w - t,
                    x1: -w,
                    z0: top_m,
                    z1: bottom_m,
                    part: Part::Insulation(k),
                },
                InsulationKind::Wing {
                    depth_m,
                    x_start_m,
                    width_m,
                } => Rect {
                    x0: x_start_m,
                    x1: width_m,
                    z0: depth_m,
                    z1: depth_m + t,
                    part: Part::Insulation(k),
                },
            };
            ins_rects.push(r);
        }
        // Fill under the slab (and under whole-floor insulation), and up to ground level when the
        // floor is above ground.
        let fill_bot = under + case.fill.as_ref().map_or(0.0, |f| f.0);
        if slab_bot < 0.0 {
            rects.push(Rect {
                x0: x_min,
                x1: -w,
                z0: slab_bot,
                z1: 0.0,
                part: Part::Fill,
            });
        }
        if fill_bot > under {
            rects.push(Rect {
                x0: x_min,
                x1: -w,
                z0: under,
                z1: fill_bot,
                part: Part::Fill,
            });
        }
        let footing = Rect {
            x0: fx0,
            x1: fx1,
            z0: ftop,
            z1: case.footing.base_depth_m,
            part: Part::Footing,
        };
        let wall = Rect {
            x0: -w,
            x1: 0.0,
            z0: z_top,
            z1: ftop,
            part: Part::Wall,
        };
        let slab = Rect {
            x0: x_min,
            x1: -w,
            z0: floor_z,
            z1: slab_bot,
            part: Part::Slab,
        };
        if let Some((bw, bd, _)) = case.basement.as_ref().and_then(|b| b.backfill.as_ref()) {
            rects.push(Rect {
                x0: 0.0,
                x1: *bw,
                z0: 0.0,
                z1: *bd,
                part: Part::Backfill,
            });
        }
        rects.extend([footing, wall, slab]);
        // Insulation must not overlap concrete or other insulation.
        let err = |k: usize, what: &str| Error::Input {
            location: Location::file_only(&case.file),
            key: format!("insulation[{k}]"),
            message: format!(
                "overlaps the {what}; allowed: insulation beside, not inside, other parts"
            ),
        };
        for (k, r) in ins_rects.iter().enumerate() {
            for (c, name) in [(&footing, "footing"), (&wall, "wall"), (&slab, "slab")] {
                if r.overlaps(c) {
                    return Err(err(k, name));
                }
            }
            for (j, o) in ins_rects.iter().enumerate().skip(k + 1) {
                if r.overlaps(o) {
                    return Err(err(k, &format!("insulation[{j}]")));
                }
            }
            if r.x1 > x_max - 1e-9 || r.z1 > z_bottom - 1e-9 {
                return Err(Error::Input {
                    location: Location::file_only(&case.file),
                    key: format!("insulation[{k}]"),
                    message: "leaves the domain; allowed: inside simulation.domain_width_m and domain_depth_m".into(),
                });
            }
        }
        rects.extend(ins_rects);
        Ok(Section {
            x_min,
            x_max,
            z_top,
            z_bottom,
            rects,
        })
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
        let fill_m =
            mesh.add_material(case.fill.as_ref().map(|f| f.1.clone()).unwrap_or_else(|| {
                crate::physics::library::named_material("gravel").expect("gravel exists")
            }));
        let ins_m: Vec<usize> = case
            .insulation
            .iter()
            .map(|i| mesh.add_material(i.material.clone()))
            .collect();
        let backfill_m = case
            .basement
            .as_ref()
            .and_then(|b| b.backfill.as_ref())
            .map(|(_, _, m)| mesh.add_material(m.clone()));
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
