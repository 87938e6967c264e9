//! Helpers shared by the integration tests.
#![allow(dead_code)]
use frostline::mesh::{EdgeBc, Grid, Mesh, Zone};
use frostline::physics::material::Material;

/// A one-cell-wide vertical column with the given z edges, material, and a surface zone on top
/// (zone 0) with surface resistance `r_top`; adiabatic sides and bottom.
pub fn column(ze: Vec<f64>, m: Material, r_top: f64) -> Mesh {
    let grid = Grid {
        xe: vec![0.0, 1.0],
        ze,
    };
    let mut mesh = Mesh::uniform(grid, m);
    let z = mesh.add_zone(Zone {
        name: "surface".into(),
        r_horizontal: r_top,
        r_vertical: r_top,
    });
    mesh.top = vec![EdgeBc::Zone { zone: z, r: r_top }];
    mesh
}

/// Linear interpolation of column temperatures `t` (one per cell, top to bottom) at depth z.
pub fn column_value(ze: &[f64], t: &[f64], z: f64) -> f64 {
    let zc: Vec<f64> = ze.windows(2).map(|w| 0.5 * (w[0] + w[1])).collect();
    let k = zc.partition_point(|&c| c <= z).clamp(1, zc.len() - 1);
    let f = (z - zc[k - 1]) / (zc[k] - zc[k - 1]);
    t[k - 1] + f * (t[k] - t[k - 1])
}
