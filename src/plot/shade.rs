//! Smooth shading of a section's temperature field: every pixel's temperature and frost scalar
//! are interpolated bilinearly between the cell centres around it, and the colour scale switches
//! from the frozen to the unfrozen palette where the interpolated frost scalar crosses the
//! frost-line temperature, the same function and level the frost line is traced on (marching
//! squares on the cell centres, which interpolates linearly along the cell-centre grid's edges, as
//! the bilinear surface does). So the colour boundary and the drawn frost line agree.
use super::field::{centres, FieldView, View};
use super::temperature_colour;
use plotters::style::RGBColor;

/// For each pixel centre along one axis: the two cell-centre indices around it and the weight of
/// the second (clamped at the first and last centres).
fn brackets(centres: &[f64], from: f64, to: f64, pixels: u32) -> Vec<(usize, usize, f64)> {
    let last = centres.len() - 1;
    (0..pixels)
        .map(|p| {
            let c = from + (to - from) * (p as f64 + 0.5) / pixels as f64;
            let k = centres.partition_point(|&x| x <= c);
            if k == 0 {
                (0, 0, 0.0)
            } else if k > last {
                (last, last, 0.0)
            } else {
                let (a, b) = (centres[k - 1], centres[k]);
                (k - 1, k, if b > a { (c - a) / (b - a) } else { 0.0 })
            }
        })
        .collect()
}

/// The cell (index along one axis) holding each pixel centre, if any.
fn cells_of(edges: &[f64], from: f64, to: f64, pixels: u32) -> Vec<Option<usize>> {
    (0..pixels)
        .map(|p| {
            let c = from + (to - from) * (p as f64 + 0.5) / pixels as f64;
            let k = edges.partition_point(|&e| e <= c);
            (k >= 1 && k < edges.len()).then(|| k - 1)
        })
        .collect()
}

/// The colour of temperature `t` (°C) on the frozen side of the frost line or not.
pub fn split_colour(t: f64, frozen: bool) -> RGBColor {
    if frozen {
        temperature_colour(t.min(-1e-9))
    } else {
        temperature_colour(t.max(0.0))
    }
}

/// The field of `f` in view `v` as a `w` × `h` RGB image (row 0 at the view's top, z0); air and
/// pixels outside the grid are white.
pub fn raster(f: &FieldView, v: View, (w, h): (u32, u32)) -> Vec<u8> {
    let nx = f.xe.len() - 1;
    let (xs, zs) = (centres(f.xe), centres(f.ze));
    let (bx, bz) = (brackets(&xs, v.x0, v.x1, w), brackets(&zs, v.z0, v.z1, h));
    let (cx, cz) = (cells_of(f.xe, v.x0, v.x1, w), cells_of(f.ze, v.z0, v.z1, h));
    let mut img = vec![255u8; w as usize * h as usize * 3];
    for (py, (&(j0, j1, wz), cj)) in bz.iter().zip(&cz).enumerate() {
        for (px, (&(i0, i1, wx), ci)) in bx.iter().zip(&cx).enumerate() {
            let (Some(i), Some(j)) = (ci, cj) else {
                continue;
            };
            if !f.t[j * nx + i].is_finite() {
                continue;
            }
            // Bilinear weights over the four centres, renormalised over those in solid cells
            // (an air neighbour drops out).
            let corners = [
                (j0 * nx + i0, (1.0 - wx) * (1.0 - wz)),
                (j0 * nx + i1, wx * (1.0 - wz)),
                (j1 * nx + i0, (1.0 - wx) * wz),
                (j1 * nx + i1, wx * wz),
            ];
            let (mut t, mut fr, mut sum) = (0.0, 0.0, 0.0);
            for (id, wt) in corners {
                if wt > 0.0 && f.t[id].is_finite() {
                    t += wt * f.t[id];
                    fr += wt * f.frost[id];
                    sum += wt;
                }
            }
            let (t, fr) = if sum > 0.0 {
                (t / sum, fr / sum)
            } else {
                (f.t[j * nx + i], f.frost[j * nx + i])
            };
            let c = split_colour(t, fr < f.frost_line_c);
            let k = 3 * (py * w as usize + px);
            img[k..k + 3].copy_from_slice(&[c.0, c.1, c.2]);
        }
    }
    img
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A field rising linearly with depth, T = 4 z − 2 (°C, z in m), freezing interval
    /// −0.5 … 0 °C so the frost scalar is T clamped to it. The shading turns from the frozen to
    /// the unfrozen palette where the frost line is traced (marching squares on the same cell
    /// centres, here a level line at z = 0.40 m: between the centres at 0.15 m, scalar −0.5, and
    /// 0.45 m, −0.2), to one pixel, in every column.
    #[test]
    fn colour_boundary_is_the_frost_line() {
        let xe: Vec<f64> = (0..=4).map(|i| i as f64 * 0.25).collect();
        let ze: Vec<f64> = (0..=7).map(|j| -0.3 + 0.3 * j as f64).collect();
        let (nx, nz) = (4, 7);
        let mut t = Vec::new();
        for j in 0..nz {
            let z = 0.5 * (ze[j] + ze[j + 1]);
            t.extend(std::iter::repeat_n(4.0 * z - 2.0, nx));
        }
        let frost: Vec<f64> = t.iter().map(|v: &f64| v.clamp(-0.5, 0.0)).collect();
        let f = FieldView {
            xe: &xe,
            ze: &ze,
            t,
            frost,
            parts: &[],
            frost_line_c: -0.25,
            x_desc: "",
            strata_z: Vec::new(),
            units: crate::files::us::Units::Si,
        };
        let v = View {
            x0: 0.0,
            x1: 1.0,
            z0: 0.0,
            z1: 1.2,
        };
        let (xs, zs) = (centres(&xe), centres(&ze));
        let lines = crate::analysis::isolines::isolines(&xs, &zs, &f.frost, -0.25);
        let pts: Vec<f64> = lines.iter().flatten().map(|p| p.1).collect();
        let line_z = pts.iter().sum::<f64>() / pts.len() as f64;
        assert!((line_z - 0.4).abs() < 1e-9, "{line_z}");
        let (w, h) = (20u32, 1200u32);
        let img = raster(&f, v, (w, h));
        let frozen = |px: usize, py: usize| {
            let k = 3 * (py * w as usize + px);
            // The frozen palette is blue-dominant, the unfrozen one red-dominant.
            img[k + 2] > img[k]
        };
        for px in 0..w as usize {
            let first_unfrozen = (0..h as usize).find(|&py| !frozen(px, py)).unwrap();
            let z = (first_unfrozen as f64 + 0.5) * 1.2 / h as f64;
            assert!(
                (z - line_z).abs() <= 1.2 / h as f64,
                "column {px}: {z} vs {line_z}"
            );
            assert!((first_unfrozen..h as usize).all(|py| !frozen(px, py)));
        }
    }

    /// Pixel brackets interpolate linearly between cell centres (values 10, 20, 40 at centres
    /// 0.5, 1.5, 2.5) and hold the end values beyond the first and last centre.
    #[test]
    fn brackets_interpolate_between_centres() {
        let v = [10.0, 20.0, 40.0];
        let at = |b: (usize, usize, f64)| (1.0 - b.2) * v[b.0] + b.2 * v[b.1];
        let b = brackets(&[0.5, 1.5, 2.5], 0.0, 3.0, 6);
        // Pixel centres 0.25, 0.75, …, 2.75.
        let got: Vec<f64> = b.into_iter().map(at).collect();
        assert_eq!(got, vec![10.0, 12.5, 17.5, 25.0, 35.0, 40.0]);
    }
}
