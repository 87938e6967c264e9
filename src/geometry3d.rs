//! The 3D quarter of a rectangular building: the 2D section run around the plan, corner
//! insulation pieces, and its graded tensor-product mesh.
//!
//! Plan coordinates X, Y (m) start at the building's centre (symmetry planes X = 0 and Y = 0,
//! adiabatic); the foundation wall's exterior faces lie at X = a = L/2 and Y = b = W/2; the ground
//! is cut (adiabatic) at X = a + D and Y = b + D, D = `simulation.domain_width_m`. z is the depth
//! as in the section. With the local offsets u = X − a and v = Y − b from the two exterior faces,
//! every point takes what the section holds at
//!
//! ```text
//! s = max(u, v)
//! ```
//!
//! (the distance outside the nearer face, in the Chebyshev sense): along each wall the section
//! itself; at the outside corner, square (mitred) corners of every piece, wing insulation
//! included, the way boards are laid. Corner pieces ([`crate::case::CornerPiece`]) are painted
//! last. The floor inside the walls has the plan's real dimensions (no B′ strip). The grid is
//! graded as the section's, one fineness step coarser ([`crate::case::Fineness::sizes_3d`]).
use crate::case::{Case, InsulationKind};
use crate::geometry::{add_zones, indoor_floor_r, Materials, Section, DEEP, INDOOR, OUTDOOR};
use crate::mesh::{graded_edges, Breakpoint, Cell, EdgeBc};
use crate::mesh3::{Grid3, Mesh3};

/// The quarter building: its plan and the section it is made of.
#[derive(Debug, Clone)]
pub struct Quarter {
    /// X of the exterior wall face (L/2), m.
    pub a: f64,
    /// Y of the exterior wall face (W/2), m.
    pub b: f64,
    /// Ground beyond the faces, m.
    pub d: f64,
    /// The section, reaching in past the building's centre.
    pub section: Section,
    /// The case the section is made from (the 2D floor strip widened to the plan).
    pub case: Case,
}

/// One corner piece in plan and depth, m.
#[derive(Debug, Clone, Copy)]
struct CornerBox {
    s0: f64,
    s1: f64,
    z0: f64,
    z1: f64,
    length: f64,
    material: usize,
}

impl Quarter {
    /// The quarter of `case`, which must have a plan.
    pub fn of(case: &Case) -> Self {
        let plan = case.plan.expect("the 3D model needs a plan (validated)");
        let (a, b) = (0.5 * plan.length_m, 0.5 * plan.width_m);
        let mut wide = case.clone();
        // A floor strip reaching past the centre: x_min = −(w + B′/2) < −max(a, b).
        wide.building.b_prime_m = 2.0 * a.max(b) + 2.0;
        Quarter {
            a,
            b,
            d: case.simulation.domain_width_m,
            section: Section::from_case(&wide),
            case: wide,
        }
    }

    /// The section coordinate s of plan point (X, Y), m.
    pub fn s(&self, x: f64, y: f64) -> f64 {
        (x - self.a).max(y - self.b)
    }

    /// Corner pieces as boxes, with their materials' indices from `first`.
    fn corner_boxes(&self, case: &Case, first: usize) -> Vec<CornerBox> {
        case.corners
            .iter()
            .enumerate()
            .filter_map(|(k, c)| match c.piece.kind {
                InsulationKind::Wing {
                    depth_m,
                    x_start_m,
                    width_m,
                } => Some(CornerBox {
                    s0: x_start_m,
                    s1: width_m,
                    z0: depth_m,
                    z1: depth_m + c.piece.thickness_m,
                    length: c.length_m,
                    material: first + k,
                }),
                _ => None,
            })
            .collect()
    }

    /// The graded edges of X (or Y, with `face` = b) for the section's breakpoints `bs`.
    fn axis(&self, case: &Case, bs: &[Breakpoint], face: f64) -> Vec<f64> {
        let (h0, growth, hmax) = case.simulation.sizes_3d();
        let bp = |at: f64, size: f64| Breakpoint { at, size };
        let end = face + self.d;
        let mut pts = vec![bp(0.0, (4.0 * h0).min(hmax)), bp(end, hmax)];
        for p in bs {
            let at = face + p.at;
            if at > 1e-9 && at < end - 1e-9 {
                pts.push(bp(at, p.size));
            }
        }
        for c in &case.corners {
            if let InsulationKind::Wing {
                x_start_m, width_m, ..
            } = c.piece.kind
            {
                for at in [face + x_start_m, face + width_m, face - c.length_m] {
                    if at > 1e-9 && at < end - 1e-9 {
                        pts.push(bp(at, h0));
                    }
                }
            }
        }
        graded_edges(&pts, growth, hmax)
    }

    /// The graded grid of the quarter: the section's breakpoints on both plan axes (every
    /// construction edge on a grid plane, at X = a + s and Y = b + s), the corner pieces' edges.
    pub fn grid(&self, case: &Case) -> Grid3 {
        let sizes = case.simulation.sizes_3d();
        let (h0, growth, hmax) = sizes;
        let (bx, mut bz) = self.section.breakpoints_sized(&self.case, sizes);
        for c in &case.corners {
            if let InsulationKind::Wing { depth_m, .. } = c.piece.kind {
                for z in [depth_m, depth_m + c.piece.thickness_m] {
                    bz.push(Breakpoint { at: z, size: h0 });
                }
            }
        }
        Grid3 {
            xe: self.axis(case, &bx, self.a),
            ye: self.axis(case, &bx, self.b),
            ze: graded_edges(&bz, growth, hmax),
        }
    }

    /// The mesh of the quarter (materials: the section's, then the corner pieces'; zones as in the
    /// section; the top plane: indoor air over the floor, outdoor air over the ground, the wall's
    /// cut adiabatic; the bottom as in the section).
    pub fn mesh(&self, case: &Case) -> Mesh3 {
        let grid = self.grid(case);
        let (nx, ny, nz) = (grid.nx(), grid.ny(), grid.nz());
        let mut materials = vec![case.strata[0].material.clone()];
        let m = Materials::add(&mut materials, &self.case);
        let first = materials.len();
        materials.extend(case.corners.iter().map(|c| c.piece.material.clone()));
        let boxes = self.corner_boxes(case, first);
        let mut zones = Vec::new();
        add_zones(&mut zones, case);
        let mut cells = vec![Cell::Solid(0); grid.len()];
        for k in 0..nz {
            let z = Grid3::centre(&grid.ze, k);
            for j in 0..ny {
                let y = Grid3::centre(&grid.ye, j);
                for i in 0..nx {
                    let x = Grid3::centre(&grid.xe, i);
                    let (u, v) = (x - self.a, y - self.b);
                    let s = u.max(v);
                    let corner = boxes.iter().rev().find(|c| {
                        z >= c.z0 && z <= c.z1 && s >= c.s0 && s <= c.s1 && u.min(v) >= -c.length
                    });
                    cells[grid.id(i, j, k)] = match corner {
                        Some(c) => Cell::Solid(c.material),
                        None => self.section.cell_at(&self.case, &m, s, z),
                    };
                }
            }
        }
        let top = self.top(case, &grid, &cells);
        Mesh3 {
            grid,
            cells,
            materials,
            zones,
            bottom: case.simulation.bottom_temperature_c.map(|_| (DEEP, 0.0)),
            top,
        }
    }

    /// The top plane, column by column, as the section's top edge.
    fn top(&self, case: &Case, grid: &Grid3, cells: &[Cell]) -> Vec<EdgeBc> {
        let w = case.wall.thickness_m;
        let z_top = self.section.z_top;
        let (at_floor, at_ground) = (z_top >= case.floor_z() - 1e-9, z_top >= -1e-9);
        let (nx, ny) = (grid.nx(), grid.ny());
        let mut top = vec![EdgeBc::Adiabatic; nx * ny];
        for j in 0..ny {
            for i in 0..nx {
                if !matches!(cells[grid.id(i, j, 0)], Cell::Solid(_)) {
                    continue;
                }
                let s = self.s(Grid3::centre(&grid.xe, i), Grid3::centre(&grid.ye, j));
                top[j * nx + i] = if s < -w && at_floor {
                    EdgeBc::Zone {
                        zone: INDOOR,
                        r: indoor_floor_r(case),
                    }
                } else if s > 0.0 && at_ground {
                    EdgeBc::Zone {
                        zone: OUTDOOR,
                        r: case.climate.r_se,
                    }
                } else {
                    EdgeBc::Adiabatic
                };
            }
        }
        top
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn case() -> Case {
        let src = include_str!("../examples/kettle-hollow-house.toml")
            .replace(
                "floor_area_m2 = 110.0            # A, m²\nexposed_perimeter_m = 44.0       # P, m  → B' = A/(0.5 P) = 5.0 m\n",
                "",
            )
            .replace(
                "[slab]",
                "[plan]\nlength_m = 8.4\nwidth_m = 6.4\n\n[[corner]]\nthickness_m = 0.05\nmaterial = \"xps\"\ndepth_m = 0.30\nwidth_m = 1.5\nlength_m = 1.2\n\n[slab]",
            );
        crate::case::parse_case("q.toml", &src).unwrap()
    }

    /// Every construction edge on a grid plane; along a wall the section's cells, at the corner
    /// the mitred pieces and the corner piece.
    #[test]
    fn quarter_cells_follow_the_section() {
        let case = case();
        assert_eq!(case.building.floor_area_m2, 8.0 * 6.0);
        assert_eq!(case.building.exposed_perimeter_m, 28.0);
        let q = Quarter::of(&case);
        let mesh = q.mesh(&case);
        let g = &mesh.grid;
        for at in [4.2, 4.0, 4.2 + 1.0, 4.2 + 1.5, 4.2 - 1.2, 4.2 + 0.05] {
            assert!(g.xe.iter().any(|e| (e - at).abs() < 1e-9), "x edge {at}");
        }
        for at in [3.2, 3.0, 3.2 + 1.5, 3.2 - 1.2] {
            assert!(g.ye.iter().any(|e| (e - at).abs() < 1e-9), "y edge {at}");
        }
        let at = |x: f64, y: f64, z: f64| {
            let (i, j) = (
                g.xe.partition_point(|&e| e <= x) - 1,
                g.ye.partition_point(|&e| e <= y) - 1,
            );
            let k = g.ze.partition_point(|&e| e <= z) - 1;
            mesh.cells[g.id(i, j, k)]
        };
        let mut mats = vec![case.strata[0].material.clone()];
        let m = Materials::add(&mut mats, &q.case);
        // Indoor air over the floor, the wall along both faces, the footing, soil.
        assert_eq!(at(1.0, 1.0, -0.5), Cell::Zone(INDOOR));
        assert_eq!(at(4.1, 0.5, 0.1), Cell::Solid(m.wall));
        assert_eq!(at(0.5, 3.1, 0.1), Cell::Solid(m.wall));
        assert_eq!(at(4.1, 3.1, 0.4), Cell::Solid(m.footing));
        assert_eq!(at(9.0, 9.0, 2.0), Cell::Solid(m.strata[0]));
        // The wing (to 1.0 m) along a wall far from the corner; the corner piece (to 1.5 m, 1.2 m
        // along each wall from the corner) near it and round the corner.
        let corner = Cell::Solid(mats.len());
        assert_eq!(at(4.2 + 0.5, 0.5, 0.32), Cell::Solid(m.insulation[2]));
        assert_eq!(at(4.2 + 1.2, 0.5, 0.32), Cell::Solid(m.strata[0]));
        assert_eq!(at(4.2 + 1.2, 3.2 - 0.6, 0.32), corner);
        assert_eq!(at(4.2 + 1.4, 3.2 + 1.4, 0.32), corner);
        assert_eq!(at(4.2 - 0.6, 3.2 + 0.5, 0.32), corner);
        assert_eq!(at(4.2 - 1.5, 3.2 + 0.5, 0.32), Cell::Solid(m.insulation[2]));
        // Top plane: indoor air is a zone cell, so the top columns are the wall's cut.
        assert!(mesh.top.iter().all(|t| *t == EdgeBc::Adiabatic));
    }
}
