//! `foundation_sketch.png/svg`: the foundation as the model built it, drawn from the saved
//! section (`section.json`): every construction part filled by kind and numbered, the ground
//! line, the soil-layer boundaries, the footing base's depth dimensioned, and a key listing each
//! part's thickness, width and position in metres (in US units: inches and feet).
use super::field::{field_size, length_label, outline_colour, per_metre, strata_boundaries, View};
use super::{data::PlotData, out_err, Target};
use crate::error::Result;
use crate::files::us::Units;
use plotters::coord::Shift;
use plotters::prelude::*;
use std::path::PathBuf;

/// Width of the key beside the drawing, pixels.
const KEY_W: u32 = 420;

/// The construction's extent with room around it, m.
pub fn view(d: &PlotData) -> View {
    let (mut x0, mut x1, mut z0, mut z1) =
        (d.footing_x.0, d.footing_x.1, 0.0f64, d.footing_base_depth_m);
    for p in &d.parts {
        x0 = x0.min(p.x0);
        x1 = x1.max(p.x1);
        z0 = z0.min(p.z0);
        z1 = z1.max(p.z1);
    }
    // Interior floors of large buildings are cut 1.5 m inside the footing.
    x0 = x0.max(d.footing_x.0 - 1.5);
    let (dx, dz) = (0.15 * (x1 - x0), 0.15 * (z1 - z0));
    View {
        x0: (x0 - dx).max(d.xe[0]),
        x1: (x1 + dx).min(*d.xe.last().unwrap_or(&x1)),
        z0: (z0 - dz).max(d.ze[0]),
        z1: (z1 + dz).min(*d.ze.last().unwrap_or(&z1)),
    }
}

/// The parts the model keeps: a fill or backfill piece wholly inside an insulation piece (where
/// the insulation replaced it) is left out.
fn shown(d: &PlotData) -> Vec<&crate::files::section::PartOutline> {
    let inside = |a: &crate::files::section::PartOutline,
                  b: &crate::files::section::PartOutline| {
        a.x0 >= b.x0 - 1e-9 && a.x1 <= b.x1 + 1e-9 && a.z0 >= b.z0 - 1e-9 && a.z1 <= b.z1 + 1e-9
    };
    d.parts
        .iter()
        .filter(|p| {
            p.kind != "fill"
                || !d
                    .parts
                    .iter()
                    .any(|q| q.kind == "insulation" && inside(p, q))
        })
        .collect()
}

/// The key line of one part: size and position (sizes in mm below 1 m, else m; in US units in
/// inches below 3 ft, else ft; positions in m or ft).
fn describe(p: &crate::files::section::PartOutline, units: Units) -> String {
    let (w, h) = (p.x1 - p.x0, p.z1 - p.z0);
    let thick = |v: f64| match units {
        Units::Si if v < 0.995 => format!("{:.0} mm", v * 1000.0),
        Units::Si => format!("{v:.2} m"),
        Units::Us if v < 0.9144 - 0.0005 => format!("{:.1} in", v / 0.0254),
        Units::Us => format!("{:.2} ft", v / 0.3048),
    };
    let k = per_metre(units);
    format!(
        "{}: {} × {}; x {:.2} to {:.2}, z {:.2} to {:.2}",
        p.label,
        thick(w),
        thick(h),
        p.x0 * k,
        p.x1 * k,
        p.z0 * k,
        p.z1 * k
    )
}

fn draw<DB: DrawingBackend>(root: &DrawingArea<DB, Shift>, d: &PlotData, v: View) -> Result<()> {
    root.fill(&WHITE).map_err(out_err)?;
    let parts = shown(d);
    let (w, _) = root.dim_in_pixel();
    let (left, right) = root.split_horizontally(w - KEY_W);
    let units = d.field_units;
    // Chart coordinates: metres × k (see `field::per_metre`).
    let k = per_metre(units);
    let at = |x: f64, z: f64| (x * k, z * k);
    let mut chart = super::field::section_chart(
        &left,
        &format!("{} — the foundation as modelled", d.case_name),
        v,
        "x (m), 0 at the wall's exterior face",
        units,
    )?;
    // Ground: every solid cell of the grid (air, such as a basement's room, stays white).
    let nx = d.xe.len() - 1;
    let ground = RGBColor(245, 236, 215);
    let cells = d
        .section
        .cell_materials
        .iter()
        .enumerate()
        .filter(|(_, &m)| m >= 0)
        .map(|(id, _)| (id % nx, id / nx))
        .filter(|&(i, j)| {
            d.xe[i + 1] > v.x0 && d.xe[i] < v.x1 && d.ze[j + 1] > v.z0 && d.ze[j] < v.z1
        })
        .map(|(i, j)| {
            Rectangle::new(
                [
                    at(d.xe[i].max(v.x0), d.ze[j].max(v.z0)),
                    at(d.xe[i + 1].min(v.x1), d.ze[j + 1].min(v.z1)),
                ],
                ground.filled(),
            )
        });
    chart.draw_series(cells).map_err(out_err)?;
    let fill_of = |kind: &str| match kind {
        "concrete" => RGBColor(175, 175, 175),
        "insulation" => RGBColor(250, 190, 225),
        _ => RGBColor(205, 175, 130),
    };
    // Fill first, so the thinner parts drawn later stay visible.
    let mut order: Vec<usize> = (0..d.parts.len()).collect();
    order.sort_by_key(|&k| (d.parts[k].kind != "fill", d.parts[k].kind == "insulation"));
    for &n in &order {
        let p = &d.parts[n];
        let r = [
            at(p.x0.max(v.x0), p.z0.max(v.z0)),
            at(p.x1.min(v.x1), p.z1.min(v.z1)),
        ];
        chart
            .draw_series([
                Rectangle::new(r, fill_of(&p.kind).filled()),
                Rectangle::new(r, outline_colour(&p.kind).stroke_width(2)),
            ])
            .map_err(out_err)?;
    }
    // Part numbers at the parts' centres (within the view).
    for (n, p) in parts.iter().enumerate() {
        let c = at(
            0.5 * (p.x0.max(v.x0) + p.x1.min(v.x1)),
            0.5 * (p.z0.max(v.z0) + p.z1.min(v.z1)),
        );
        chart
            .draw_series(std::iter::once(
                EmptyElement::at(c)
                    + Circle::new((0, 0), 9, WHITE.filled())
                    + Circle::new((0, 0), 9, BLACK.stroke_width(1))
                    + Text::new(
                        format!("{}", n + 1),
                        (-4, -6),
                        ("sans-serif", 12).into_font(),
                    ),
            ))
            .map_err(out_err)?;
    }
    // Ground line outside, soil-layer boundaries.
    chart
        .draw_series(std::iter::once(PathElement::new(
            vec![at(0.0f64.max(v.x0), 0.0), at(v.x1, 0.0)],
            RGBColor(90, 60, 30).stroke_width(2),
        )))
        .map_err(out_err)?;
    let strata = strata_boundaries(d);
    for &z in strata.iter().filter(|&&z| z > v.z0 && z < v.z1) {
        chart
            .draw_series(DashedLineSeries::new(
                vec![at(0.0f64.max(v.x0), z), at(v.x1, z)],
                6,
                4,
                RGBColor(110, 70, 30).stroke_width(1),
            ))
            .map_err(out_err)?;
    }
    // The footing base's depth, dimensioned from the ground line at the footing's outer face.
    // Right of every part reaching below the ground, so it crosses none.
    let right_of_parts = parts
        .iter()
        .filter(|p| p.z1 > 0.0)
        .map(|p| p.x1)
        .fold(d.footing_x.1, f64::max);
    let xd = (right_of_parts + 0.04 * (v.x1 - v.x0)).min(v.x1 - 0.02 * (v.x1 - v.x0));
    let base = d.footing_base_depth_m;
    chart
        .draw_series([
            PathElement::new(vec![at(xd, 0.0), at(xd, base)], BLACK.stroke_width(1)),
            PathElement::new(
                vec![at(d.footing_x.1, base), at(xd + 0.02 * (v.x1 - v.x0), base)],
                BLACK.stroke_width(1),
            ),
        ])
        .map_err(out_err)?;
    chart
        .draw_series(std::iter::once(
            EmptyElement::at(at(xd, 0.5 * base))
                + Text::new(
                    match units {
                        Units::Si => format!("footing base {base:.2} m"),
                        Units::Us => format!(
                            "footing base {:.2} ft ({:.1} in)",
                            base / 0.3048,
                            base / 0.0254
                        ),
                    },
                    (6, -6),
                    ("sans-serif", 13).into_font(),
                ),
        ))
        .map_err(out_err)?;
    // The key.
    let mut y = 50;
    let line = |t: String, y: i32, bold: bool| {
        let style = if bold {
            ("sans-serif", 13).into_font().style(FontStyle::Bold)
        } else {
            ("sans-serif", 12).into_font()
        };
        right.draw(&Text::new(t, (5, y), style))
    };
    line("Parts: width × height; x from the wall's".into(), y, true).map_err(out_err)?;
    y += 17;
    line(
        format!(
            "exterior face, z depth below ground ({})",
            length_label(units)
        ),
        y,
        true,
    )
    .map_err(out_err)?;
    y += 24;
    for (n, p) in parts.iter().enumerate() {
        line(format!("{}  {}", n + 1, describe(p, units)), y, false).map_err(out_err)?;
        y += 18;
    }
    if !strata.is_empty() {
        y += 10;
        let depths: Vec<String> = strata.iter().map(|z| format!("{:.2}", z * k)).collect();
        line(
            format!(
                "soil-layer boundaries (dashed) at {} {}",
                depths.join(", "),
                length_label(units)
            ),
            y,
            false,
        )
        .map_err(out_err)?;
    }
    root.present().map_err(out_err)
}

/// Draw `foundation_sketch.png/svg` into `dir`; returns its size in pixels.
pub fn render(dir: &Target, d: &PlotData, files: &mut Vec<PathBuf>) -> Result<(u32, u32)> {
    let v = view(d);
    let (w, h) = field_size(v);
    let size = (w - 110 + KEY_W, h.max(300));
    render_both!(dir, "foundation_sketch", size, files, draw(d, v));
    Ok(size)
}
