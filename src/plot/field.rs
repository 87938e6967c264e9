//! The section's temperature field: its view, the smooth shading (see `shade`), isotherms with
//! labels, the construction outlines, soil-layer boundaries, the frost line and the colour bar.
use super::{data::PlotData, out_err, shade};
use crate::analysis::isolines::{self, isolines};
use crate::error::Result;
use crate::files::section::PartOutline;
use crate::files::us::Units;
use plotters::coord::types::RangedCoordf64;
use plotters::coord::Shift;
use plotters::prelude::*;

/// A view of the section: x and z ranges, m.
#[derive(Debug, Clone, Copy)]
pub(crate) struct View {
    pub(crate) x0: f64,
    pub(crate) x1: f64,
    pub(crate) z0: f64,
    pub(crate) z1: f64,
}

/// Lengths on the axes per metre: 1 in SI, 1/0.3048 in feet (exact international foot).
///
/// The section's data stay in metres and °C (the shading, the frost scalar and the saved frost
/// line are computed there); only the chart's coordinates and labels are in the user's units:
/// every point drawn is (x, z) × this factor, the isotherms are drawn at round °F values
/// converted to °C, and the colour bar is labelled at round °F values placed at their °C.
pub(crate) fn per_metre(units: Units) -> f64 {
    match units {
        Units::Si => 1.0,
        Units::Us => 1.0 / 0.3048,
    }
}

/// The length unit's label on the axes.
pub(crate) fn length_label(units: Units) -> &'static str {
    match units {
        Units::Si => "m",
        Units::Us => "ft",
    }
}

/// °C → °F (exact).
pub(crate) fn fahrenheit(c: f64) -> f64 {
    c * 9.0 / 5.0 + 32.0
}

/// A temperature as labelled in `units` with `d` decimals: "−0.25 °C" or "31.55 °F".
pub(crate) fn temperature_text(units: Units, c: f64, d: usize) -> String {
    match units {
        Units::Si => format!("{c:.d$} °C"),
        Units::Us => format!("{:.d$} °F", fahrenheit(c)),
    }
}

/// The pieces of a polyline that lie inside the view (split where it leaves, so no chord is drawn
/// across the part outside).
/// Cell centres of the cells between consecutive `edges`.
pub(crate) fn centres(edges: &[f64]) -> Vec<f64> {
    edges.windows(2).map(|w| 0.5 * (w[0] + w[1])).collect()
}

/// Each run ends on the view's border where the line crosses it (found by bisection of the
/// segment), so lines reach the edge of the picture.
pub(crate) fn runs_inside(
    line: &[(f64, f64)],
    inside: &impl Fn(&(f64, f64)) -> bool,
) -> Vec<Vec<(f64, f64)>> {
    // The last point inside on the segment from `a` (inside) to `b` (outside).
    let border = |a: (f64, f64), b: (f64, f64)| {
        let (mut s0, mut s1) = (0.0, 1.0);
        for _ in 0..30 {
            let s = 0.5 * (s0 + s1);
            if inside(&(a.0 + s * (b.0 - a.0), a.1 + s * (b.1 - a.1))) {
                s0 = s;
            } else {
                s1 = s;
            }
        }
        (a.0 + s0 * (b.0 - a.0), a.1 + s0 * (b.1 - a.1))
    };
    let mut out = Vec::new();
    let mut cur = Vec::new();
    for (k, p) in line.iter().enumerate() {
        if inside(p) {
            if cur.is_empty() && k > 0 {
                cur.push(border(*p, line[k - 1]));
            }
            cur.push(*p);
        } else if !cur.is_empty() {
            cur.push(border(line[k - 1], *p));
            out.push(std::mem::take(&mut cur));
        }
    }
    if !cur.is_empty() {
        out.push(cur);
    }
    out
}

/// The cell-centre grid of `f` with the temperature and frost scalar, extended by the section's
/// side edges and its bottom, where the boundaries are adiabatic (or the field nearly uniform):
/// the edge takes its cell's value (zero gradient), so isotherms and the frost line reach the
/// edges instead of stopping half a cell short.
fn padded(f: &FieldView) -> (Vec<f64>, Vec<f64>, Vec<f64>, Vec<f64>) {
    let (nx, nz) = (f.xe.len() - 1, f.ze.len() - 1);
    let mut xs = vec![f.xe[0]];
    xs.extend(centres(f.xe));
    xs.push(f.xe[nx]);
    let mut zs = centres(f.ze);
    zs.push(f.ze[nz]);
    let pad = |v: &[f64]| {
        let mut out = Vec::with_capacity((nx + 2) * (nz + 1));
        for j in 0..=nz {
            let row = &v[j.min(nz - 1) * nx..(j.min(nz - 1) + 1) * nx];
            out.push(row[0]);
            out.extend_from_slice(row);
            out.push(row[nx - 1]);
        }
        out
    };
    (xs, zs, pad(&f.t), pad(&f.frost))
}

/// Vertical temperature gradient below which deep ground is left out of the section view, K/m.
const VIEW_GRADIENT_K_PER_M: f64 = 1.0;
/// Horizontal temperature gradient below which far ground is left out, K/m.
const VIEW_HORIZONTAL_K_PER_M: f64 = 0.1;

/// The part of the full section `full` worth drawing, together with `keep` (the construction and
/// the frost) and widened by 10 % on each side: in depth, down to the cells where the day's
/// temperature gradient exceeds 1 K/m; across, out to those where the field still varies
/// sideways (a horizontal gradient over 0.1 K/m; beyond, the ground is one-dimensional). Deep and
/// far ground, where the field is nearly uniform, is left out, so the frost line of a large
/// building stays visible.
pub(crate) fn physics_view(f: &FieldView, full: View, keep: View) -> View {
    let (nx, nz) = (f.xe.len() - 1, f.ze.len() - 1);
    let (xc, zc) = (centres(f.xe), centres(f.ze));
    let mut b = keep;
    let t = |i: usize, j: usize| f.t[j * nx + i];
    // |T(i2, j2) − T(i, j)| over distance d exceeds `g` (K/m), both cells solid.
    let steep = |(i, j): (usize, usize), (i2, j2): (usize, usize), d: f64, g: f64| {
        let (u, w) = (t(i, j), t(i2, j2));
        u.is_finite() && w.is_finite() && (u - w).abs() > g * d
    };
    // Depth first (any steep gradient), then the width within that depth.
    for j in 0..nz {
        for i in 0..nx {
            let s = (i + 1 < nx
                && steep((i, j), (i + 1, j), xc[i + 1] - xc[i], VIEW_GRADIENT_K_PER_M))
                || (j + 1 < nz
                    && steep((i, j), (i, j + 1), zc[j + 1] - zc[j], VIEW_GRADIENT_K_PER_M));
            if s {
                b.z0 = b.z0.min(f.ze[j]);
                b.z1 = b.z1.max(f.ze[j + 1]);
            }
        }
    }
    for j in (0..nz).filter(|&j| f.ze[j] < b.z1) {
        for i in 0..nx - 1 {
            if steep(
                (i, j),
                (i + 1, j),
                xc[i + 1] - xc[i],
                VIEW_HORIZONTAL_K_PER_M,
            ) {
                b.x0 = b.x0.min(f.xe[i]);
                b.x1 = b.x1.max(f.xe[i + 2]);
            }
        }
    }
    let (dx, dz) = (0.1 * (b.x1 - b.x0), 0.1 * (b.z1 - b.z0));
    View {
        x0: (b.x0 - dx).max(full.x0),
        x1: (b.x1 + dx).min(full.x1),
        z0: (b.z0 - dz).max(full.z0),
        z1: (b.z1 + dz).min(full.z1),
    }
}

/// Image size (w, h) in pixels for a view drawn with equal scales on both axes.
pub(crate) fn field_size(v: View) -> (u32, u32) {
    let (bar, ylab, xlab, cap, margin) = (110.0, 60.0, 45.0, 40.0, 15.0);
    let aspect = (v.z1 - v.z0) / (v.x1 - v.x0);
    let mut plot_w = 860.0;
    let mut plot_h = plot_w * aspect;
    if plot_h > 1100.0 {
        plot_h = 1100.0;
        plot_w = plot_h / aspect;
    }
    if plot_h < 260.0 {
        plot_h = 260.0;
        plot_w = plot_h / aspect;
    }
    (
        (plot_w + ylab + bar + 2.0 * margin) as u32,
        (plot_h + xlab + cap + 2.0 * margin) as u32,
    )
}

/// The colour bar's ticks over [lo, hi] (°C): multiples of a round step (1, 2 or 5 × 10^k, about
/// six intervals) and both ends, an inner tick closer than 0.4 step to an end left out; labels
/// without spurious decimals.
fn bar_ticks(lo: f64, hi: f64) -> Vec<(f64, String)> {
    let raw = ((hi - lo) / 6.0).max(1e-9);
    let mag = 10f64.powf(raw.log10().floor());
    let step = [1.0, 2.0, 5.0, 10.0]
        .iter()
        .map(|m| m * mag)
        .find(|s| *s >= raw)
        .unwrap_or(10.0 * mag);
    let digits = |v: f64| {
        if (v - v.round()).abs() < 1e-9 {
            0
        } else if (v * 10.0 - (v * 10.0).round()).abs() < 1e-6 {
            1
        } else {
            2
        }
    };
    let label = |v: f64| {
        let v = if v.abs() < 1e-9 { 0.0 } else { v };
        let d = digits(v);
        format!("{v:.d$}")
    };
    let mut t = vec![(lo, label(lo))];
    let mut k = (lo / step).floor() + 1.0;
    while k * step <= hi - 0.4 * step + 1e-9 {
        if k * step >= lo + 0.4 * step - 1e-9 {
            t.push((k * step, label(k * step)));
        }
        k += 1.0;
    }
    t.push((hi, label(hi)));
    t
}

/// An axis label in metres: two decimals at most, no trailing zeros beyond the first, no "−0".
fn metres(v: f64) -> String {
    let v = if v.abs() < 5e-4 { 0.0 } else { v };
    let s = format!("{v:.2}");
    s.strip_suffix('0').map_or(s.clone(), str::to_string)
}

/// A section chart on `area` for view `v` (m; equal scales are the caller's sizing): caption,
/// axes in the length unit of `units` (the chart's coordinates are metres × [`per_metre`]; an
/// axis title's "(m)" reads "(ft)" in US units) with depth increasing downwards, no grid.
pub(crate) fn section_chart<'a, DB: DrawingBackend>(
    area: &'a DrawingArea<DB, Shift>,
    title: &str,
    v: View,
    x_desc: &str,
    units: Units,
) -> Result<Section2d<'a, DB>> {
    let k = per_metre(units);
    let mut chart = ChartBuilder::on(area)
        .caption(title, ("sans-serif", 18))
        .margin(15)
        .x_label_area_size(45)
        .y_label_area_size(60)
        .build_cartesian_2d(v.x0 * k..v.x1 * k, v.z1 * k..v.z0 * k)
        .map_err(out_err)?;
    let unit = format!("({})", length_label(units));
    chart
        .configure_mesh()
        .disable_mesh()
        .x_desc(x_desc.replace("(m)", &unit))
        .y_desc(format!("depth z {unit} below ground"))
        .x_label_formatter(&|v: &f64| metres(*v))
        .y_label_formatter(&|v: &f64| metres(*v))
        .label_style(("sans-serif", 13))
        .draw()
        .map_err(out_err)?;
    Ok(chart)
}

/// A chart of the section in metres.
pub(crate) type Section2d<'a, DB> =
    ChartContext<'a, DB, Cartesian2d<RangedCoordf64, RangedCoordf64>>;

/// Isotherms every `interval` K between `lo` and `hi` (°C; the 0 °C line excepted), labelled
/// where labels do not crowd. In US units the lines lie at round °F values instead (every 2 °F
/// for a 1 K interval, every 5 °F for larger ones; 32 °F excepted), labelled in °F.
pub(crate) fn draw_isotherms<DB: DrawingBackend>(
    chart: &mut Section2d<DB>,
    (xs, zs, field): (&[f64], &[f64], &[f64]),
    v: View,
    (lo, hi, interval): (f64, f64, f64),
    units: Units,
) -> Result<()> {
    let k = per_metre(units);
    // The levels in the shown unit, and back to °C.
    let (lo_s, hi_s, step) = match units {
        Units::Si => (lo, hi, interval),
        Units::Us => (
            fahrenheit(lo),
            fahrenheit(hi),
            if interval <= 1.0 { 2.0 } else { 5.0 },
        ),
    };
    let freezing = match units {
        Units::Si => 0.0,
        Units::Us => 32.0,
    };
    let to_c = |s: f64| match units {
        Units::Si => s,
        Units::Us => (s - 32.0) * 5.0 / 9.0,
    };
    let symbol = match units {
        Units::Si => "°C",
        Units::Us => "°F",
    };
    let inside = |&(x, z): &(f64, f64)| x >= v.x0 && x <= v.x1 && z >= v.z0 && z <= v.z1;
    // Labels keep a distance of 6 % of the view from each other.
    let mut placed: Vec<(f64, f64)> = Vec::new();
    let far = |p: (f64, f64), placed: &[(f64, f64)]| {
        placed.iter().all(|q| {
            (((p.0 - q.0) / (v.x1 - v.x0)).powi(2) + ((p.1 - q.1) / (v.z1 - v.z0)).powi(2)).sqrt()
                > 0.06
        })
    };
    let mut shown = (lo_s / step).ceil() * step;
    while shown <= hi_s {
        let level = to_c(shown);
        if (shown - freezing).abs() > 1e-9 {
            for pts in isolines(xs, zs, field, level)
                .iter()
                .flat_map(|l| runs_inside(l, &inside))
            {
                if pts.len() < 2 {
                    continue;
                }
                let drawn: Vec<(f64, f64)> = pts.iter().map(|&(x, z)| (x * k, z * k)).collect();
                chart
                    .draw_series(std::iter::once(PathElement::new(
                        drawn,
                        RGBColor(70, 70, 70).stroke_width(1),
                    )))
                    .map_err(out_err)?;
                if pts.len() >= 6 && far(pts[pts.len() / 2], &placed) {
                    let (x, z) = pts[pts.len() / 2];
                    placed.push((x, z));
                    // The label on a pale box, readable on dark and light colours.
                    let text = format!("{shown:.0} {symbol}");
                    let w = 7 * text.chars().count() as i32;
                    chart
                        .draw_series(std::iter::once(
                            EmptyElement::at((x * k, z * k))
                                + Rectangle::new([(-2, -8), (w, 8)], WHITE.mix(0.8).filled())
                                + Text::new(text, (0, -6), ("sans-serif", 12).into_font()),
                        ))
                        .map_err(out_err)?;
                }
            }
        }
        shown += step;
    }
    Ok(())
}

/// The outline colour of a construction part's kind (concrete, fill, insulation).
pub(crate) fn outline_colour(kind: &str) -> RGBColor {
    match kind {
        "concrete" => RGBColor(40, 40, 40),
        "insulation" => RGBColor(220, 0, 140),
        _ => RGBColor(130, 90, 40),
    }
}

/// Outlines of the construction parts by kind (concrete dark grey, fill brown, insulation
/// magenta), with a legend entry for each kind in view.
pub(crate) fn draw_outlines<DB: DrawingBackend>(
    chart: &mut Section2d<DB>,
    parts: &[PartOutline],
    v: View,
    units: Units,
) -> Result<()> {
    let k = per_metre(units);
    let kinds = [
        ("concrete", "concrete"),
        ("fill", "fill and backfill"),
        ("insulation", "insulation"),
    ];
    for (kind, label) in kinds {
        let colour = outline_colour(kind);
        let rects: Vec<[(f64, f64); 2]> = parts
            .iter()
            .filter(|p| p.kind == kind)
            .map(|p| {
                [
                    (p.x0.max(v.x0) * k, p.z0.max(v.z0) * k),
                    (p.x1.min(v.x1) * k, p.z1.min(v.z1) * k),
                ]
            })
            .filter(|r| r[0].0 < r[1].0 && r[0].1 < r[1].1)
            .collect();
        if rects.is_empty() {
            continue;
        }
        chart
            .draw_series(
                rects
                    .into_iter()
                    .map(|r| Rectangle::new(r, colour.stroke_width(2))),
            )
            .map_err(out_err)?
            .label(label)
            .legend(move |(x, y)| {
                Rectangle::new([(x, y - 5), (x + 18, y + 5)], colour.stroke_width(2))
            });
    }
    Ok(())
}

/// The colour bar over [tmin, tmax] °C with the frost-line temperature marked; in US units
/// labelled in °F (round °F values at their °C positions).
pub(crate) fn draw_colour_bar<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    (tmin, tmax): (f64, f64),
    frost_line_c: f64,
    units: Units,
) -> Result<()> {
    let mut bar = ChartBuilder::on(area)
        .margin_top(60)
        .margin_bottom(60)
        .margin_right(10)
        .y_label_area_size(50)
        .caption(
            match units {
                Units::Si => "°C",
                Units::Us => "°F",
            },
            ("sans-serif", 15),
        )
        .build_cartesian_2d(0.0..1.0, tmin..tmax)
        .map_err(out_err)?;
    bar.configure_mesh()
        .disable_mesh()
        .disable_x_axis()
        .y_labels(0)
        .draw()
        .map_err(out_err)?;
    // Ticks of our own: round values 1, 2 or 5 × 10^k apart, and both ends labelled.
    let base = area.get_base_pixel();
    use plotters::style::text_anchor::{HPos, Pos, VPos};
    let style =
        TextStyle::from(("sans-serif", 12).into_font()).pos(Pos::new(HPos::Right, VPos::Center));
    let ticks = match units {
        Units::Si => bar_ticks(tmin, tmax),
        Units::Us => bar_ticks(fahrenheit(tmin), fahrenheit(tmax))
            .into_iter()
            .map(|(f, text)| ((f - 32.0) * 5.0 / 9.0, text))
            .collect(),
    };
    for (v, text) in ticks {
        let (px, py) = bar.backend_coord(&(0.0, v));
        let (x, y) = (px - base.0, py - base.1);
        area.draw(&PathElement::new(vec![(x - 5, y), (x, y)], BLACK))
            .map_err(out_err)?;
        area.draw(&Text::new(text, (x - 8, y), style.clone()))
            .map_err(out_err)?;
    }
    let n = 200;
    bar.draw_series((0..n).map(|k| {
        let a = tmin + (tmax - tmin) * k as f64 / n as f64;
        let b = tmin + (tmax - tmin) * (k + 1) as f64 / n as f64;
        let t = 0.5 * (a + b);
        Rectangle::new(
            [(0.0, a), (1.0, b)],
            shade::split_colour(t, t < frost_line_c).filled(),
        )
    }))
    .map_err(out_err)?;
    bar.draw_series(std::iter::once(PathElement::new(
        vec![(0.0, frost_line_c), (1.0, frost_line_c)],
        BLACK.stroke_width(3),
    )))
    .map_err(out_err)?;
    Ok(())
}

/// A vertical section's field to draw: cell edges, temperature and frost scalar per cell
/// (row-major nz × nx, NaN for air), the construction outlines and the frost-line temperature.
pub(crate) struct FieldView<'a> {
    pub(crate) xe: &'a [f64],
    pub(crate) ze: &'a [f64],
    pub(crate) t: Vec<f64>,
    pub(crate) frost: Vec<f64>,
    pub(crate) parts: &'a [PartOutline],
    pub(crate) frost_line_c: f64,
    pub(crate) x_desc: &'a str,
    /// Depths of the soil-layer boundaries, m (drawn outside the building).
    pub(crate) strata_z: Vec<f64>,
    /// The units of the axes and labels (the data stay in m and °C).
    pub(crate) units: Units,
}

impl<'a> FieldView<'a> {
    /// The saved 2D field of day index `day`.
    pub(crate) fn of_day(d: &'a PlotData, day: usize) -> Self {
        FieldView {
            xe: &d.xe,
            ze: &d.ze,
            t: d.field(day).iter().copied().collect(),
            frost: d.frost_field(day),
            parts: &d.parts,
            frost_line_c: d.frost_line_c,
            x_desc: "x (m), 0 at the wall's exterior face",
            strata_z: strata_boundaries(d),
            units: d.field_units,
        }
    }
}

/// Depths where the material changes down the far column below ground (the soil strata).
pub(crate) fn strata_boundaries(d: &PlotData) -> Vec<f64> {
    let (nx, nz) = (d.xe.len() - 1, d.ze.len() - 1);
    let m = |j: usize| d.section.cell_materials.get(j * nx + nx - 1).copied();
    (0..nz.saturating_sub(1))
        .filter(|&j| {
            d.ze[j] >= 0.0
                && matches!((m(j), m(j + 1)), (Some(a), Some(b)) if a >= 0 && b >= 0 && a != b)
        })
        .map(|j| d.ze[j + 1])
        .collect()
}

/// Draw the field `f` in view `v`.
pub(crate) fn draw_field<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    f: &FieldView,
    v: View,
    interval: f64,
    title: &str,
    range: Option<(f64, f64)>,
) -> Result<Vec<isolines::Polyline>> {
    root.fill(&WHITE).map_err(out_err)?;
    let (w, _) = root.dim_in_pixel();
    let (left, right) = root.split_horizontally(w.saturating_sub(110));
    let units = f.units;
    let k = per_metre(units);
    let mut chart = section_chart(&left, title, v, f.x_desc, units)?;
    let field = &f.t[..];
    // The field shaded smoothly, one pixel at a time (see `shade`).
    let size = chart.plotting_area().dim_in_pixel();
    let image = BitMapElement::<_, plotters::backend::RGBPixel>::with_owned_buffer(
        (v.x0 * k, v.z0 * k),
        size,
        shade::raster(f, v, size),
    )
    .ok_or_else(|| out_err("field image of the wrong size"))?;
    chart.draw_series(std::iter::once(image)).map_err(out_err)?;
    // Isotherms.
    let (xs, zs, padded_t, padded_frost) = padded(f);
    let (lo, hi) = field
        .iter()
        .filter(|t| t.is_finite())
        .fold((f64::MAX, f64::MIN), |(a, b), &t| (a.min(t), b.max(t)));
    let inside = |&(x, z): &(f64, f64)| x >= v.x0 && x <= v.x1 && z >= v.z0 && z <= v.z1;
    draw_isotherms(
        &mut chart,
        (&xs, &zs, &padded_t),
        v,
        (lo, hi, interval),
        units,
    )?;
    draw_outlines(&mut chart, f.parts, v, units)?;
    let brown = RGBColor(110, 70, 30);
    for (n, &z) in f
        .strata_z
        .iter()
        .filter(|&&z| z > v.z0 && z < v.z1)
        .enumerate()
    {
        let s = chart
            .draw_series(DashedLineSeries::new(
                vec![(0.0f64.max(v.x0) * k, z * k), (v.x1 * k, z * k)],
                6,
                4,
                brown.stroke_width(1),
            ))
            .map_err(out_err)?;
        if n == 0 {
            s.label("soil-layer boundary").legend(move |(x, y)| {
                PathElement::new(vec![(x, y), (x + 18, y)], brown.stroke_width(1))
            });
        }
    }
    // Ground line outside, and the frost line.
    chart
        .draw_series(std::iter::once(PathElement::new(
            vec![(0.0f64.max(v.x0) * k, 0.0), (v.x1 * k, 0.0)],
            RGBColor(90, 60, 30).stroke_width(2),
        )))
        .map_err(out_err)?;
    let frost = isolines(&xs, &zs, &padded_frost, f.frost_line_c);
    let mut labelled = false;
    for pts in frost.iter().flat_map(|l| runs_inside(l, &inside)) {
        if pts.len() >= 2 {
            let s = chart
                .draw_series(std::iter::once(PathElement::new(
                    pts.iter().map(|&(x, z)| (x * k, z * k)).collect::<Vec<_>>(),
                    BLACK.stroke_width(4),
                )))
                .map_err(out_err)?;
            if !labelled {
                labelled = true;
                s.label(format!(
                    "frost line ({})",
                    temperature_text(units, f.frost_line_c, 2)
                ))
                .legend(|(x, y)| {
                    PathElement::new(vec![(x, y), (x + 18, y)], BLACK.stroke_width(4))
                });
            }
        }
    }
    // The legend in the air above ground (top right) when the view shows enough of it, else at
    // the bottom right, in the deep ground's even field.
    let air = (-v.z0).max(0.0) / (v.z1 - v.z0);
    chart
        .configure_series_labels()
        .background_style(WHITE.mix(0.9))
        .border_style(RGBColor(120, 120, 120))
        .label_font(("sans-serif", 12))
        .position(if air >= 0.15 {
            SeriesLabelPosition::UpperRight
        } else {
            SeriesLabelPosition::LowerRight
        })
        .draw()
        .map_err(out_err)?;
    let (tmin, tmax) = range.unwrap_or(((lo.floor()).min(-1.0), hi.ceil().max(1.0)));
    draw_colour_bar(&right, (tmin, tmax), f.frost_line_c, units)?;
    root.present().map_err(out_err)?;
    Ok(frost)
}

#[cfg(test)]
mod tests {
    /// Axis labels: 0.25 stays 0.25, 0.5 and 1 read 0.5 and 1.0, −0 reads 0.0.
    #[test]
    fn metre_labels() {
        let l = super::metres;
        assert_eq!(l(0.25), "0.25");
        assert_eq!(l(0.5), "0.5");
        assert_eq!(l(1.0), "1.0");
        assert_eq!(l(-1e-12), "0.0");
        assert_eq!(l(-1.75), "-1.75");
    }

    /// Colour-bar ticks: both ends labelled, round steps between, nothing crowding an end.
    #[test]
    fn colour_bar_ticks() {
        let t: Vec<String> = super::bar_ticks(-10.0, 20.0)
            .into_iter()
            .map(|p| p.1)
            .collect();
        assert_eq!(t, ["-10", "-5", "0", "5", "10", "15", "20"]);
        let t: Vec<String> = super::bar_ticks(-3.4, 17.0)
            .into_iter()
            .map(|p| p.1)
            .collect();
        assert_eq!(t, ["-3.4", "0", "5", "10", "15", "17"]);
    }
}
