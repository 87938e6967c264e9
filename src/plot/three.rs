//! Plots of a 3D run, from `three_d.json`: a plan of the deepest frost round the whole building
//! (the computed quarter mirrored), vertical sections at mid-wall and along the corner's diagonal
//! with the frost line, and frost depth and margin along the perimeter.
use super::charts::SIZE;
use super::{draw_field, field_size, out_err, runs_inside, FieldView, Target, View};
use crate::analysis::isolines::isolines;
use crate::error::Result;
use crate::files::three::{PlanBand, Slice, ThreeDFile};
use crate::files::us::Units;
use plotters::coord::Shift;
use plotters::prelude::*;
use std::path::PathBuf;

/// Frost depth colour (m → colour): white for no frost, through pale ice blue to deep navy at
/// `max` m.
fn depth_colour(d: f64, max: f64) -> RGBColor {
    const STOPS: [(f64, (u8, u8, u8)); 4] = [
        (0.0, (250, 250, 248)),
        (0.25, (205, 232, 250)),
        (0.6, (88, 150, 214)),
        (1.0, (16, 24, 74)),
    ];
    let f = if max > 0.0 {
        (d / max).clamp(0.0, 1.0)
    } else {
        0.0
    };
    for w in STOPS.windows(2) {
        let ((f0, c0), (f1, c1)) = (w[0], w[1]);
        if f <= f1 {
            let g = (f - f0) / (f1 - f0);
            let mix = |a: u8, b: u8| (a as f64 + g * (b as f64 - a as f64)).round() as u8;
            return RGBColor(mix(c0.0, c1.0), mix(c0.1, c1.1), mix(c0.2, c1.2));
        }
    }
    RGBColor(16, 24, 74)
}

/// A round contour interval giving about six levels up to `max`.
fn contour_step(max: f64) -> f64 {
    [0.05, 0.1, 0.2, 0.25, 0.5, 1.0]
        .into_iter()
        .find(|s| max / s <= 8.0)
        .unwrap_or(2.0)
}

/// The quarter's edges mirrored about 0 (−e reversed, then e).
fn mirrored_edges(e: &[f64]) -> Vec<f64> {
    e.iter()
        .rev()
        .map(|x| -x)
        .chain(e.iter().copied().skip(usize::from(e[0] == 0.0)))
        .collect()
}

/// The whole plan's deepest-frost field (rows along Y of columns along X), mirrored from the
/// quarter (the quarter's first edge is the centre line, 0).
fn whole_plan(f: &ThreeDFile) -> (Vec<f64>, Vec<f64>, Vec<f64>) {
    let (nx, ny) = (f.xe.len() - 1, f.ye.len() - 1);
    let xe = mirrored_edges(&f.xe);
    let ye = mirrored_edges(&f.ye);
    let idx = |k: usize, n: usize| if k < n { n - 1 - k } else { k - n };
    let mut v = Vec::with_capacity(4 * nx * ny);
    for j in 0..2 * ny {
        for i in 0..2 * nx {
            v.push(f.plan_frost_m[idx(j, ny) * nx + idx(i, nx)]);
        }
    }
    (xe, ye, v)
}

/// The closed outlines of a band round the whole plan: two rectangles when it runs all round,
/// else an L at each of the four corners.
fn band_outlines(f: &ThreeDFile, b: &PlanBand) -> Vec<Vec<(f64, f64)>> {
    let (a, w) = (f.a_m, f.b_m);
    let (s0, s1) = (b.s0_m, b.s1_m);
    let rect = |s: f64| {
        vec![
            (-(a + s), -(w + s)),
            (a + s, -(w + s)),
            (a + s, w + s),
            (-(a + s), w + s),
            (-(a + s), -(w + s)),
        ]
    };
    match b.length_m {
        None => vec![rect(s0), rect(s1)],
        Some(l) => [(1.0, 1.0), (-1.0, 1.0), (1.0, -1.0), (-1.0, -1.0)]
            .into_iter()
            .map(|(sx, sy)| {
                [
                    (a - l, w + s0),
                    (a + s0, w + s0),
                    (a + s0, w - l),
                    (a + s1, w - l),
                    (a + s1, w + s1),
                    (a - l, w + s1),
                    (a - l, w + s0),
                ]
                .into_iter()
                .map(|(x, y)| (sx * x, sy * y))
                .collect()
            })
            .collect(),
    }
}

/// The plan view: from the centre to 1.5 m beyond the outermost plan outline, clipped to the
/// domain.
fn plan_view(f: &ThreeDFile) -> View {
    let out = f.plan_bands.iter().map(|b| b.s1_m).fold(0.0, f64::max) + 1.5;
    let (out_x, out_y) = (f.a_m + out, f.b_m + out);
    let (xm, ym) = (
        out_x.min(*f.xe.last().unwrap_or(&out_x)),
        out_y.min(*f.ye.last().unwrap_or(&out_y)),
    );
    View {
        x0: -xm,
        x1: xm,
        z0: -ym,
        z1: ym,
    }
}

/// The plan in the lengths of `f` (metres, or feet after [`in_feet`]), labelled in `u`; `v`
/// is the view in those lengths.
fn draw_plan<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    f: &ThreeDFile,
    v: View,
    u: &str,
) -> Result<()> {
    root.fill(&WHITE).map_err(out_err)?;
    let (xe, ye, field) = whole_plan(f);
    let max = field.iter().copied().fold(f.bearing_m(), f64::max);
    let (w, _) = root.dim_in_pixel();
    let (left, right) = root.split_horizontally(w.saturating_sub(110));
    let mut chart = ChartBuilder::on(&left)
        .caption(
            format!(
                "{} — deepest frost over the year, depth below ground ({u})",
                f.case_name
            ),
            ("sans-serif", 18),
        )
        .margin(15)
        .x_label_area_size(45)
        .y_label_area_size(60)
        .build_cartesian_2d(v.x0..v.x1, v.z0..v.z1)
        .map_err(out_err)?;
    chart
        .configure_mesh()
        .disable_mesh()
        .x_desc(format!("X ({u}) along the length, 0 at the plan's centre"))
        .y_desc(format!("Y ({u}) along the width"))
        .label_style(("sans-serif", 13))
        .draw()
        .map_err(out_err)?;
    let nx = xe.len() - 1;
    let cells = (0..ye.len() - 1)
        .flat_map(|j| (0..nx).map(move |i| (i, j)))
        .filter_map(|(i, j)| {
            let (xa, xb, ya, yb) = (xe[i], xe[i + 1], ye[j], ye[j + 1]);
            (xb > v.x0 && xa < v.x1 && yb > v.z0 && ya < v.z1).then(|| {
                Rectangle::new(
                    [(xa.max(v.x0), ya.max(v.z0)), (xb.min(v.x1), yb.min(v.z1))],
                    depth_colour(field[j * nx + i], max).filled(),
                )
            })
        });
    chart.draw_series(cells).map_err(out_err)?;
    // Contours of frost depth, labelled in the length unit; the bearing level (footing base or
    // board underside) bold and dashed.
    let (xs, ys) = (super::field::centres(&xe), super::field::centres(&ye));
    let inside = |&(x, y): &(f64, f64)| x >= v.x0 && x <= v.x1 && y >= v.z0 && y <= v.z1;
    let step = contour_step(max);
    let mut level = step;
    let mut placed: Vec<(f64, f64)> = Vec::new();
    while level < max {
        for pts in isolines(&xs, &ys, &field, level)
            .iter()
            .flat_map(|l| runs_inside(l, &inside))
            .filter(|p| p.len() >= 2)
        {
            chart
                .draw_series(std::iter::once(PathElement::new(
                    pts.clone(),
                    RGBColor(60, 60, 60).stroke_width(1),
                )))
                .map_err(out_err)?;
            let p = pts[pts.len() / 3];
            let far = placed
                .iter()
                .all(|q| ((p.0 - q.0) / (v.x1 - v.x0)).hypot((p.1 - q.1) / (v.z1 - v.z0)) > 0.08);
            if pts.len() >= 6 && far {
                placed.push(p);
                let text = format!("{level:.2} {u}");
                let w = 7 * text.chars().count() as i32;
                chart
                    .draw_series(std::iter::once(
                        EmptyElement::at(p)
                            + Rectangle::new([(-2, -8), (w, 8)], WHITE.mix(0.85).filled())
                            + Text::new(text, (0, -6), ("sans-serif", 12).into_font()),
                    ))
                    .map_err(out_err)?;
            }
        }
        level += step;
    }
    // The contour of the bearing level: the footing base, or the underside of the board the
    // footing bears on.
    let base = f.bearing_m();
    let what = if crate::run::frost::bears_on_board(f.footing_base_depth_m, base) {
        "the bearing level, under the board"
    } else {
        "the footing base"
    };
    let mut labelled = false;
    for pts in isolines(&xs, &ys, &field, base)
        .iter()
        .flat_map(|l| runs_inside(l, &inside))
        .filter(|p| p.len() >= 2)
    {
        let s = chart
            .draw_series(DashedLineSeries::new(pts, 7, 5, RED.stroke_width(3)))
            .map_err(out_err)?;
        if !labelled {
            labelled = true;
            s.label(format!("frost as deep as {what} ({base:.2} {u})"))
                .legend(|(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], RED.stroke_width(3)));
        }
    }
    // Outlines, mirrored to the whole plan.
    let styles = [
        ("wall", RGBColor(40, 40, 40), 2, "wall"),
        ("footing", RGBColor(110, 110, 110), 1, "footing"),
        ("insulation", RGBColor(220, 0, 140), 2, "wing insulation"),
        (
            "corner insulation",
            RGBColor(150, 0, 170),
            3,
            "corner insulation",
        ),
    ];
    for (kind, colour, width, label) in styles {
        let lines: Vec<_> = f
            .plan_bands
            .iter()
            .filter(|b| b.kind == kind)
            .flat_map(|b| band_outlines(f, b))
            .collect();
        if lines.is_empty() {
            continue;
        }
        chart
            .draw_series(
                lines
                    .into_iter()
                    .map(|l| PathElement::new(l, colour.stroke_width(width))),
            )
            .map_err(out_err)?
            .label(label)
            .legend(move |(x, y)| {
                Rectangle::new([(x, y - 5), (x + 20, y + 5)], colour.stroke_width(width))
            });
    }
    // The legend inside the building, where the plan is empty.
    let (px, py) = chart.plotting_area().get_pixel_range();
    // 0.6 m inside the far corner, in the plan's lengths.
    let inset = if u == "ft" { 0.6 / 0.3048 } else { 0.6 };
    let (lx, ly) = chart.backend_coord(&(-f.a_m + inset, f.b_m - inset));
    chart
        .configure_series_labels()
        .background_style(WHITE.mix(0.9))
        .border_style(BLACK)
        .label_font(("sans-serif", 13))
        .position(SeriesLabelPosition::Coordinate(
            lx - px.start,
            ly - py.start,
        ))
        .draw()
        .map_err(out_err)?;
    depth_bar(&right, max, base, u)?;
    root.present().map_err(out_err)
}

/// The frost-depth colour bar (in `u`), the footing base marked.
fn depth_bar<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    max: f64,
    base: f64,
    u: &str,
) -> Result<()> {
    let mut bar = ChartBuilder::on(area)
        .margin_top(60)
        .margin_bottom(60)
        .margin_right(10)
        .y_label_area_size(50)
        .caption(u, ("sans-serif", 15))
        .build_cartesian_2d(0.0..1.0, max..0.0)
        .map_err(out_err)?;
    bar.configure_mesh()
        .disable_mesh()
        .disable_x_axis()
        .label_style(("sans-serif", 12))
        .draw()
        .map_err(out_err)?;
    let n = 200;
    bar.draw_series((0..n).map(|k| {
        let a = max * k as f64 / n as f64;
        let b = max * (k + 1) as f64 / n as f64;
        Rectangle::new(
            [(0.0, a), (1.0, b)],
            depth_colour(0.5 * (a + b), max).filled(),
        )
    }))
    .map_err(out_err)?;
    bar.draw_series(std::iter::once(PathElement::new(
        vec![(0.0, base), (1.0, base)],
        RED.stroke_width(3),
    )))
    .map_err(out_err)?;
    Ok(())
}

/// A slice as a field to draw (its data in m; axes in `units`).
fn slice_view(s: &Slice, frost_line_c: f64, units: Units) -> FieldView<'_> {
    let nan = |v: &Vec<Option<f64>>| v.iter().map(|x| x.unwrap_or(f64::NAN)).collect();
    FieldView {
        xe: &s.xe,
        ze: &s.ze,
        t: nan(&s.t),
        frost: nan(&s.frost),
        parts: &s.parts,
        frost_line_c,
        x_desc: &s.axis,
        strata_z: Vec::new(),
        units,
    }
}

/// One window for both sections: 1.2 m inside the footing to 1.2 m beyond the outermost part,
/// down to 0.6 m below the deeper of the footing base and the frost in the window.
fn section_view(f: &ThreeDFile) -> View {
    let parts = f.slices.iter().flat_map(|s| s.parts.iter());
    let x0 = parts
        .clone()
        .filter(|p| p.label == "footing")
        .map(|p| p.x0)
        .fold(0.0, f64::min)
        - 1.2;
    let x1 = parts.map(|p| p.x1).fold(0.0, f64::max).min(8.0) + 1.2;
    let deepest = f
        .perimeter
        .iter()
        .map(|p| p[1].max(p[2]).max(p[3]))
        .chain(f.slices.iter().flat_map(|s| {
            // Frozen cells in the window.
            let nx = s.xe.len() - 1;
            s.frost.iter().enumerate().filter_map(move |(id, v)| {
                let (i, k) = (id % nx, id / nx);
                (v.is_some_and(|v| v < f.frost_line_c) && s.xe[i] < x1).then(|| s.ze[k + 1])
            })
        }))
        .fold(f.bearing_m(), f64::max);
    let (lo, hi) = f
        .slices
        .iter()
        .map(|s| {
            (
                s.xe[0],
                *s.xe.last().unwrap_or(&x1),
                *s.ze.last().unwrap_or(&1.0),
            )
        })
        .fold((f64::MIN, f64::MAX), |(a, b), (l, h, _)| {
            (a.max(l), b.min(h))
        });
    View {
        x0: x0.max(lo),
        x1: x1.min(hi),
        z0: f.slices.first().map_or(0.0, |s| s.ze[0]),
        z1: deepest + 0.6,
    }
}

/// The plan's and the perimeter's lengths of `f` in feet (the sections' slices stay in metres:
/// their plots scale as they draw), by the outputs' conversion ([`crate::files::us::figure`]).
fn in_feet(f: &ThreeDFile) -> ThreeDFile {
    let ft = |m: f64| crate::files::us::figure(Units::Us, "m", m, 0).1;
    let mut g = f.clone();
    g.a_m = ft(f.a_m);
    g.b_m = ft(f.b_m);
    g.xe = f.xe.iter().map(|&v| ft(v)).collect();
    g.ye = f.ye.iter().map(|&v| ft(v)).collect();
    g.plan_frost_m = f.plan_frost_m.iter().map(|&v| ft(v)).collect();
    for b in &mut g.plan_bands {
        b.s0_m = ft(b.s0_m);
        b.s1_m = ft(b.s1_m);
        b.length_m = b.length_m.map(ft);
    }
    g.footing_base_depth_m = ft(f.footing_base_depth_m);
    g.bearing_depth_m = ft(f.bearing_m());
    g.perimeter = f.perimeter.iter().map(|p| p.map(ft)).collect();
    g.corner_at_m = ft(f.corner_at_m);
    g.section_2d = f.section_2d.map(ft);
    g
}

/// Render the 3D plots into `dir`, axes in `units`; returns (file stem, size) of each for the
/// plot index.
pub fn render(
    dir: &Target,
    f: &ThreeDFile,
    units: Units,
    files: &mut Vec<PathBuf>,
) -> Result<Vec<(&'static str, (u32, u32))>> {
    let mut sizes = Vec::new();
    let pv = plan_view(f);
    let psize = field_size(pv);
    let (g, u) = match units {
        Units::Si => (f.clone(), "m"),
        Units::Us => (in_feet(f), "ft"),
    };
    let k = super::field::per_metre(units);
    let pv_shown = View {
        x0: pv.x0 * k,
        x1: pv.x1 * k,
        z0: pv.z0 * k,
        z1: pv.z1 * k,
    };
    render_both!(dir, "plan_frost", psize, files, draw_plan(&g, pv_shown, u));
    sizes.push(("plan_frost", psize));
    let v = section_view(f);
    // Both sections on one colour scale.
    let (lo, hi) = f
        .slices
        .iter()
        .flat_map(|s| s.t.iter().flatten())
        .fold((f64::MAX, f64::MIN), |(a, b), &t| (a.min(t), b.max(t)));
    let range = Some((lo.floor().min(-1.0), hi.ceil().max(1.0)));
    let fl = f.frost_line_c;
    for (s, stem) in f
        .slices
        .iter()
        .zip(["section_mid_wall", "section_corner_diagonal"])
    {
        let title = format!(
            "{} — {}; bold: frost line ({})",
            f.case_name,
            s.title,
            super::field::temperature_text(units, fl, 2)
        );
        let size = field_size(v);
        render_both!(
            dir,
            stem,
            size,
            files,
            draw_field(&slice_view(s, fl, units), v, 1.0, &title, range)
        );
        sizes.push((stem, size));
    }
    render_both!(dir, "perimeter_frost", SIZE, files, draw_perimeter(&g, u));
    sizes.push(("perimeter_frost", SIZE));
    Ok(sizes)
}

/// The perimeter chart in the lengths of `f` (metres, or feet after [`in_feet`]), labelled in `u`.
fn draw_perimeter<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    f: &ThreeDFile,
    u: &str,
) -> Result<()> {
    root.fill(&WHITE).map_err(out_err)?;
    let (top, bottom) = root.split_vertically(SIZE.1 / 2 + 20);
    let dmax = f.perimeter.iter().map(|p| p[0]).fold(1.0, f64::max);
    let base = f.footing_base_depth_m;
    let zmax = f
        .perimeter
        .iter()
        .map(|p| p[1])
        .fold(f.bearing_m().max(f.section_2d[0]), f64::max)
        * 1.2;
    let corner = f.corner_at_m;
    let mut c = ChartBuilder::on(&top)
        .caption(
            format!(
                "{} — frost along the perimeter, from mid long wall to mid short wall",
                f.case_name
            ),
            ("sans-serif", 18),
        )
        .margin(12)
        .x_label_area_size(30)
        .y_label_area_size(60)
        .build_cartesian_2d(0.0..dmax, zmax..0.0)
        .map_err(out_err)?;
    c.configure_mesh()
        .y_labels(6)
        .x_labels(12)
        .y_desc(format!("frost depth at footing face ({u})"))
        .label_style(("sans-serif", 13))
        .light_line_style(RGBColor(235, 235, 235))
        .draw()
        .map_err(out_err)?;
    let blue = RGBColor(33, 74, 160);
    c.draw_series(LineSeries::new(
        f.perimeter.iter().map(|p| (p[0], p[1])),
        blue.stroke_width(3),
    ))
    .map_err(out_err)?
    .label("3D, at the footing's outer face (dots: stations)")
    .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], blue.stroke_width(3)));
    c.draw_series(
        f.perimeter
            .iter()
            .map(|p| Circle::new((p[0], p[1]), 3, blue.filled())),
    )
    .map_err(out_err)?;
    let grey = RGBColor(120, 120, 120);
    c.draw_series(DashedLineSeries::new(
        vec![(0.0, f.section_2d[0]), (dmax, f.section_2d[0])],
        6,
        4,
        grey.stroke_width(2),
    ))
    .map_err(out_err)?
    .label(format!("2D section ({:.2} {u})", f.section_2d[0]))
    .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], grey.stroke_width(2)));
    super::charts::footing_base_line(&mut c, 0.0, dmax, (base, u))?;
    super::charts::bearing_line(&mut c, 0.0, dmax, (base, f.bearing_m(), u))?;
    corner_line(&mut c, corner, (0.0, zmax))?;
    c.configure_series_labels()
        .background_style(WHITE.mix(0.9))
        .border_style(BLACK)
        .label_font(("sans-serif", 12))
        .position(SeriesLabelPosition::LowerLeft)
        .draw()
        .map_err(out_err)?;
    // Margin.
    let mmin = f
        .perimeter
        .iter()
        .map(|p| p[4])
        .fold(f.section_2d[1].min(0.0), f64::min);
    let mmax = f
        .perimeter
        .iter()
        .map(|p| p[4])
        .fold(f.section_2d[1], f64::max);
    let pad = 0.15 * (mmax - mmin).max(0.05);
    let mut m = ChartBuilder::on(&bottom)
        .margin(12)
        .x_label_area_size(40)
        .y_label_area_size(60)
        .build_cartesian_2d(0.0..dmax, (mmin - pad)..(mmax + pad))
        .map_err(out_err)?;
    m.configure_mesh()
        .y_labels(6)
        .x_labels(12)
        .x_desc(format!(
            "distance along the exterior wall face from the middle of the long wall ({u})"
        ))
        .y_desc(format!("frost margin ({u})"))
        .label_style(("sans-serif", 13))
        .light_line_style(RGBColor(235, 235, 235))
        .draw()
        .map_err(out_err)?;
    let brick = RGBColor(196, 78, 52);
    m.draw_series(LineSeries::new(
        f.perimeter.iter().map(|p| (p[0], p[4])),
        brick.stroke_width(3),
    ))
    .map_err(out_err)?
    .label("3D frost margin below the protected zone")
    .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], brick.stroke_width(3)));
    m.draw_series(
        f.perimeter
            .iter()
            .map(|p| Circle::new((p[0], p[4]), 3, brick.filled())),
    )
    .map_err(out_err)?;
    m.draw_series(DashedLineSeries::new(
        vec![(0.0, f.section_2d[1]), (dmax, f.section_2d[1])],
        6,
        4,
        grey.stroke_width(2),
    ))
    .map_err(out_err)?
    .label(format!("2D section ({:.2} {u})", f.section_2d[1]))
    .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], grey.stroke_width(2)));
    m.draw_series(std::iter::once(PathElement::new(
        vec![(0.0, 0.0), (dmax, 0.0)],
        RED.stroke_width(2),
    )))
    .map_err(out_err)?
    .label("0: frost reaches the protected zone")
    .legend(|(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], RED.stroke_width(2)));
    corner_line(&mut m, corner, (mmin - pad, mmax + pad))?;
    m.configure_series_labels()
        .background_style(WHITE.mix(0.9))
        .border_style(BLACK)
        .label_font(("sans-serif", 12))
        .position(SeriesLabelPosition::UpperRight)
        .draw()
        .map_err(out_err)?;
    root.present().map_err(out_err)
}

/// A dotted vertical line at the corner with its label.
fn corner_line<DB: DrawingBackend>(
    c: &mut ChartContext<
        '_,
        DB,
        Cartesian2d<plotters::coord::types::RangedCoordf64, plotters::coord::types::RangedCoordf64>,
    >,
    at: f64,
    (y0, y1): (f64, f64),
) -> Result<()> {
    c.draw_series(DashedLineSeries::new(
        vec![(at, y0), (at, y1)],
        3,
        4,
        RGBColor(90, 90, 90).stroke_width(1),
    ))
    .map_err(out_err)?;
    let top = if y1 > y0 { y1 } else { y0 };
    let low = if y1 > y0 { y0 } else { y1 };
    c.draw_series(std::iter::once(Text::new(
        "corner",
        (at, low + 0.93 * (top - low)),
        ("sans-serif", 13).into_font(),
    )))
    .map_err(out_err)?;
    Ok(())
}
