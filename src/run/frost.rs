//! The frost criterion at the footing: the protected zone of soil below and beside the footing
//! base that must stay unfrozen, and the frost measures of one day (open ground, at the footing's
//! outer face, under the footing, beside the wall, the closest approach to the footing's outer
//! base corner, and the margin between the frozen ground and the zone).
//!
//! The zone: below the base z_b, between lines spreading outward and down from the base corners
//! (x₀, z_b) and (x₁, z_b) at the angle α from the vertical,
//!
//! ```text
//! Z = { (x, z) : z ≥ z_b,  x₀ − (z − z_b) tan α ≤ x ≤ x₁ + (z − z_b) tan α }
//! ```
//!
//! (α = 45° by default, common practice for the load spread under a footing; `footing.
//! protected_zone_angle_deg`). The frost margin is the signed distance between the frozen ground
//! and Z: the least distance from the frost line (and from frozen cell centres) to Z, positive
//! while frost stays outside Z and negative by the depth it reaches into Z. Without frost the
//! margin is the base depth. Frost in backfill above the footing's top is frost beside the wall,
//! never under the footing.
//!
//! A footing bearing on an insulation board (`under_footing`, thickness t_b) has the soil below
//! the board as its bearing ground: the zone is the same spread from the base corners, cut at the
//! board's underside, Z ∩ {z ≥ z_b + t_b} (corners (x₀ − t_b tan α, z_b + t_b) and
//! (x₁ + t_b tan α, z_b + t_b)). Cold board cells lie above the zone like the footing's own
//! concrete: they bring the frozen ground closer (a smaller margin) but never into the zone, since
//! the board does not heave; frost in the soil under it does.
use crate::analysis::{frost_depth_column, frost_scalar_field, isolines::isolines};
use crate::case::Case;
use crate::mesh::Mesh;
use crate::solver::Network;

/// The protected zone below a footing.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ProtectedZone {
    /// Inner base corner x₀, m.
    pub x0: f64,
    /// Outer base corner x₁, m.
    pub x1: f64,
    /// Base depth z_b, m.
    pub base_z: f64,
    /// tan α of the spread angle from the vertical.
    pub tan: f64,
    /// Thickness of the board the footing bears on, m (0 without one).
    pub board_m: f64,
}

/// Whether a footing whose base is at `base` (m) bears on a board whose underside is at
/// `bearing` (m): the bearing level lies below the base.
pub fn bears_on_board(base: f64, bearing: f64) -> bool {
    bearing > base + 1e-9
}

impl ProtectedZone {
    /// The zone of the case's footing.
    pub fn of(case: &Case) -> Self {
        let (x0, x1) = case.footing_x();
        ProtectedZone {
            x0,
            x1,
            base_z: case.footing.base_depth_m,
            tan: case.footing.protected_zone_angle_deg.to_radians().tan(),
            board_m: case.board_under_footing_m(),
        }
    }

    /// Depth of the bearing soil's top, m: the footing's base, or the underside of the board it
    /// bears on.
    pub fn bearing_z(&self) -> f64 {
        self.base_z + self.board_m
    }

    /// The zone's part in the soil: the same spread lines, cut at the bearing level.
    fn in_soil(&self) -> ProtectedZone {
        let spread = self.board_m * self.tan;
        ProtectedZone {
            x0: self.x0 - spread,
            x1: self.x1 + spread,
            base_z: self.bearing_z(),
            tan: self.tan,
            board_m: 0.0,
        }
    }

    /// True if (x, z) lies in the zone.
    pub fn contains(&self, x: f64, z: f64) -> bool {
        let s = self.in_soil();
        let d = z - s.base_z;
        d >= 0.0 && x >= s.x0 - d * s.tan && x <= s.x1 + d * s.tan
    }

    /// Signed distance of (x, z) to the zone's boundary, m: positive outside, negative inside.
    pub fn signed_distance(&self, x: f64, z: f64) -> f64 {
        if self.board_m > 0.0 {
            return self.in_soil().signed_distance(x, z);
        }
        let norm = (1.0 + self.tan * self.tan).sqrt();
        // The two rays from the base corners, unit directions outward and down.
        let ray = |cx: f64, dir: f64| {
            let (dx, dz) = (dir * self.tan / norm, 1.0 / norm);
            let t = ((x - cx) * dx + (z - self.base_z) * dz).max(0.0);
            ((x - cx - t * dx).powi(2) + (z - self.base_z - t * dz).powi(2)).sqrt()
        };
        let top = {
            let xc = x.clamp(self.x0, self.x1);
            ((x - xc).powi(2) + (z - self.base_z).powi(2)).sqrt()
        };
        let d = top.min(ray(self.x0, -1.0)).min(ray(self.x1, 1.0));
        if self.contains(x, z) {
            -d
        } else {
            d
        }
    }
}

/// Frost measures of one day, m.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FrostMeasures {
    /// Frost depth in open ground (the far edge of the domain).
    pub open_m: f64,
    /// Top of the frozen layer in open ground (NaN: no frost).
    pub open_top_m: f64,
    /// Top of the frozen layer just outside the footing's outer face (NaN: none).
    pub at_face_top_m: f64,
    /// Frost depth on the vertical line just outside the footing's outer face.
    pub at_face_m: f64,
    /// Deepest frozen point below the bearing level (the footing's base, or the underside of the
    /// board it bears on) within the footing's width (0: none).
    pub under_footing_m: f64,
    /// Deepest frost within 0.5 m outside the wall's exterior face.
    pub beside_wall_m: f64,
    /// Least distance from the frost line to the footing's outer base corner (infinite without
    /// frost).
    pub corner_distance_m: f64,
    /// Signed distance between the frozen ground and the protected zone.
    pub margin_m: f64,
}

/// Where frost is measured: cell columns and the zone.
#[derive(Debug, Clone)]
pub struct FrostLines {
    /// Columns whose centres lie under the footing.
    pub footing: Vec<usize>,
    /// The first column of soil outside the footing's outer face (beyond any insulation or
    /// backfill block against it at the base's level).
    pub face: usize,
    /// Columns whose centres lie within 0.5 m outside the wall's exterior face.
    pub beside_wall: Vec<usize>,
    /// The open-ground column (the far edge of the domain).
    pub open: usize,
    /// Frost-line temperature, °C.
    pub t_line: f64,
    /// The protected zone.
    pub zone: ProtectedZone,
}

impl FrostLines {
    /// The lines of `case` on `mesh`.
    pub fn new(mesh: &Mesh, case: &Case) -> Self {
        let (x0, x1) = case.footing_x();
        let g = &mesh.grid;
        FrostLines {
            footing: (0..g.nx())
                .filter(|&i| (x0..=x1).contains(&g.xc(i)))
                .collect(),
            face: face_column(mesh, case),
            beside_wall: (0..g.nx())
                .filter(|&i| g.xc(i) > 0.0 && g.xc(i) <= 0.5)
                .collect(),
            open: g.nx() - 1,
            t_line: frost_line_c(case),
            zone: ProtectedZone::of(case),
        }
    }

    /// The frost measures of the state `t` (°C of the unknowns).
    pub fn measure(&self, mesh: &Mesh, net: &Network, t: &[f64]) -> FrostMeasures {
        let depth = |i: usize, from: f64| frost_depth_column(mesh, net, t, i, from, self.t_line);
        let top = |i: usize| {
            let s = crate::analysis::column_scalar(mesh, net, t, i);
            crate::analysis::column_top(&mesh.grid.ze, s, 0.0, self.t_line).unwrap_or(f64::NAN)
        };
        let deepest = |cols: &[usize], from: f64| {
            cols.iter()
                .filter_map(|&i| depth(i, from))
                .fold(0.0, f64::max)
        };
        let (margin, corner) = self.margin(mesh, net, t);
        FrostMeasures {
            open_m: depth(self.open, 0.0).unwrap_or(0.0),
            open_top_m: top(self.open),
            at_face_m: depth(self.face, 0.0).unwrap_or(0.0),
            at_face_top_m: top(self.face),
            under_footing_m: deepest(&self.footing, self.zone.bearing_z()),
            beside_wall_m: deepest(&self.beside_wall, 0.0),
            corner_distance_m: corner,
            margin_m: margin,
        }
    }

    /// (margin, least distance to the outer base corner) from the frost line at cell-centre
    /// resolution: the points of the t_line isolines of the frost scalar and the frozen cell
    /// centres.
    fn margin(&self, mesh: &Mesh, net: &Network, t: &[f64]) -> (f64, f64) {
        let g = &mesh.grid;
        let s = frost_scalar_field(mesh, net, t);
        let xs: Vec<f64> = (0..g.nx()).map(|i| g.xc(i)).collect();
        let zs: Vec<f64> = (0..g.nz()).map(|j| g.zc(j)).collect();
        let mut points: Vec<(f64, f64)> = isolines(&xs, &zs, &s, self.t_line)
            .into_iter()
            .flatten()
            .collect();
        let frozen = s.iter().enumerate().filter(|(_, v)| **v <= self.t_line);
        let cells: Vec<(f64, f64)> = frozen
            .map(|(id, _)| (g.xc(id % g.nx()), g.zc(id / g.nx())))
            .collect();
        let corner = points
            .iter()
            .map(|&(x, z)| ((x - self.zone.x1).powi(2) + (z - self.zone.base_z).powi(2)).sqrt())
            .fold(f64::INFINITY, f64::min);
        points.extend(cells);
        if points.is_empty() {
            return (self.zone.bearing_z(), corner);
        }
        let margin = points
            .iter()
            .map(|&(x, z)| self.zone.signed_distance(x, z))
            .fold(f64::INFINITY, f64::min);
        (margin, corner)
    }
}

/// The first column beyond the footing's outer face whose cell just above the base level is a
/// freezing material (soil or fill), else the last column.
fn face_column(mesh: &Mesh, case: &Case) -> usize {
    let g = &mesh.grid;
    let x1 = case.footing_x().1;
    let j = g.find_z(case.footing.base_depth_m - 1e-6);
    (0..g.nx())
        .filter(|&i| g.xc(i) > x1)
        .find(|&i| match mesh.cells[g.id(i, j)] {
            crate::mesh::Cell::Solid(m) => mesh.materials[m].freezes(),
            crate::mesh::Cell::Zone(_) => false,
        })
        .unwrap_or(g.nx() - 1)
}

/// Frost-line temperature: the midpoint of the top stratum's freezing interval (half the pore
/// water frozen), °C.
pub fn frost_line_c(case: &Case) -> f64 {
    case.strata[0].material.t_frost_line()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A 0.4 m footing at x ∈ [−0.4, 0], base 0.45 m, 45°: distances by hand.
    #[test]
    fn zone_distances_by_hand() {
        let z = ProtectedZone {
            x0: -0.4,
            x1: 0.0,
            base_z: 0.45,
            tan: 1.0,
            board_m: 0.0,
        };
        // Straight above the base: vertical distance.
        assert!((z.signed_distance(-0.2, 0.30) - 0.15).abs() < 1e-12);
        // Beside the footing above the base: distance to the outer corner.
        assert!((z.signed_distance(0.3, 0.05) - 0.5).abs() < 1e-12);
        // Outside the 45° line: perpendicular distance (0.3, 0.55) → line x = z − 0.45.
        let d = (0.3 - (0.55 - 0.45)) / 2f64.sqrt();
        assert!((z.signed_distance(0.3, 0.55) - d).abs() < 1e-12);
        // Inside, under the footing's middle, 0.1 m below the base: −0.1.
        assert!(z.contains(-0.2, 0.55));
        assert!((z.signed_distance(-0.2, 0.55) + 0.1).abs() < 1e-12);
        // A narrower spread (30°) leaves the point outside.
        let z30 = ProtectedZone {
            tan: 30f64.to_radians().tan(),
            ..z
        };
        assert!(z30.signed_distance(0.08, 0.55) > 0.0 && z.signed_distance(0.08, 0.55) < 0.0);
    }

    /// The same footing on a 0.1 m board: the zone starts at the board's underside (0.55 m) and
    /// keeps the 45° lines from the base corners. Distances by hand.
    #[test]
    fn zone_under_a_board_starts_at_its_underside() {
        let z = ProtectedZone {
            x0: -0.4,
            x1: 0.0,
            base_z: 0.45,
            tan: 1.0,
            board_m: 0.10,
        };
        assert!((z.bearing_z() - 0.55).abs() < 1e-12);
        // A frozen point in the board under the footing's middle: outside, 0.02 m above the soil.
        assert!(!z.contains(-0.2, 0.53));
        assert!((z.signed_distance(-0.2, 0.53) - 0.02).abs() < 1e-12);
        // Frost 0.05 m into the soil below the board: inside by 0.05 m.
        assert!((z.signed_distance(-0.2, 0.60) + 0.05).abs() < 1e-12);
        // The spread line continues from the base corner: (0.15, 0.60) lies on x = z − 0.45.
        assert!(z.signed_distance(0.15, 0.60).abs() < 1e-12);
        // Level with the board's underside, 0.2 m past the zone's top corner (0.1, 0.55): the
        // perpendicular to the spread line, 0.2/√2.
        assert!((z.signed_distance(0.3, 0.55) - 0.2 / 2f64.sqrt()).abs() < 1e-12);
        // Above the board beside the footing: the distance to that corner.
        assert!((z.signed_distance(0.1, 0.45) - 0.1).abs() < 1e-12);
    }
}
