//! Plots of a finished run, rendered from the files it saved (so `frostline plot DIR` and
//! `frostline run` share one path): the soil temperature field with isotherms and the frost line,
//! a zoom around the footing, frost depth over the year, monthly heat loss, probe temperatures,
//! and optionally an animation of the field through the year. PNG and SVG; fonts are embedded
//! (DejaVu Sans), so no system font package is needed.
pub mod data;

use crate::analysis::isolines::{self, isolines};
use crate::error::{Error, InputKind, Result};
use crate::files::{section::PartOutline, PlotEntry, PlotIndex};
use data::PlotData;
use plotters::coord::types::RangedCoordf64;
use plotters::coord::Shift;
use plotters::prelude::*;
use std::path::{Path, PathBuf};

/// What to render.
#[derive(Debug, Clone, Default)]
pub struct PlotOptions {
    /// Day of year of the field plots (default: the run's day of deepest frost).
    pub day_of_year: Option<usize>,
    /// Zoom window x0, x1, z0, z1 (m) for the zoomed field plot.
    pub zoom: Option<[f64; 4]>,
    /// Also write `soil_temperature.gif` (the field through the year).
    pub animate: bool,
    /// Write the plots here instead of the run directory (created if missing).
    pub out: Option<PathBuf>,
}

fn register_fonts() {
    static ONCE: std::sync::Once = std::sync::Once::new();
    ONCE.call_once(|| {
        // The bytes are DejaVu Sans, embedded by the `dejavu` crate; registration cannot fail for
        // a valid TrueType file, and the test suite renders every plot.
        let _ = plotters::style::register_font(
            "sans-serif",
            FontStyle::Normal,
            dejavu::sans::regular(),
        );
        let _ = plotters::style::register_font("sans-serif", FontStyle::Bold, dejavu::sans::bold());
    });
}

fn out_err<E: std::fmt::Display>(e: E) -> Error {
    Error::Output(format!("plot: {e}"))
}

/// An RGB image buffer encoded as PNG.
pub(crate) fn png_bytes(rgb: &[u8], (w, h): (u32, u32)) -> Result<Vec<u8>> {
    let mut out = Vec::new();
    {
        let mut enc = png::Encoder::new(&mut out, w, h);
        enc.set_color(png::ColorType::Rgb);
        enc.set_depth(png::BitDepth::Eight);
        enc.set_compression(png::Compression::Best);
        enc.set_adaptive_filter(png::AdaptiveFilterType::Adaptive);
        let mut wr = enc.write_header().map_err(out_err)?;
        wr.write_image_data(rgb).map_err(out_err)?;
    }
    Ok(out)
}

/// The temperature colour scale (°C → colour): blues for frozen ground below 0 °C, from pale ice
/// to deep navy; warm tones above 0 °C, from cream through amber to brick red. The two halves meet
/// with a jump in hue at 0 °C, so frozen and unfrozen soil are unmistakable.
pub fn temperature_colour(t: f64) -> RGBColor {
    const COLD: [(f64, (u8, u8, u8)); 4] = [
        (-20.0, (16, 24, 74)),
        (-10.0, (33, 74, 160)),
        (-4.0, (88, 150, 214)),
        (0.0, (205, 232, 250)),
    ];
    const WARM: [(f64, (u8, u8, u8)); 5] = [
        (0.0, (252, 243, 207)),
        (4.0, (247, 208, 128)),
        (9.0, (232, 150, 72)),
        (15.0, (196, 78, 52)),
        (25.0, (112, 24, 32)),
    ];
    let table: &[(f64, (u8, u8, u8))] = if t < 0.0 { &COLD } else { &WARM };
    let t = t.clamp(table[0].0, table[table.len() - 1].0);
    for w in table.windows(2) {
        let ((t0, c0), (t1, c1)) = (w[0], w[1]);
        if t <= t1 {
            let f = if t1 > t0 { (t - t0) / (t1 - t0) } else { 0.0 };
            let mix = |a: u8, b: u8| (a as f64 + f * (b as f64 - a as f64)).round() as u8;
            return RGBColor(mix(c0.0, c1.0), mix(c0.1, c1.1), mix(c0.2, c1.2));
        }
    }
    let c = table[table.len() - 1].1;
    RGBColor(c.0, c.1, c.2)
}

/// A view of the section: x and z ranges, m.
#[derive(Debug, Clone, Copy)]
struct View {
    x0: f64,
    x1: f64,
    z0: f64,
    z1: f64,
}

/// The pieces of a polyline that lie inside the view (split where it leaves, so no chord is drawn
/// across the part outside).
fn runs_inside(line: &[(f64, f64)], inside: &impl Fn(&(f64, f64)) -> bool) -> Vec<Vec<(f64, f64)>> {
    let mut out = Vec::new();
    let mut cur = Vec::new();
    for p in line {
        if inside(p) {
            cur.push(*p);
        } else if !cur.is_empty() {
            out.push(std::mem::take(&mut cur));
        }
    }
    if !cur.is_empty() {
        out.push(cur);
    }
    out
}

/// Image size (w, h) in pixels for a view drawn with equal scales on both axes.
fn field_size(v: View) -> (u32, u32) {
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

/// A chart of the section in metres.
type Section2d<'a, DB> = ChartContext<'a, DB, Cartesian2d<RangedCoordf64, RangedCoordf64>>;

/// Isotherms every `interval` K between `lo` and `hi` (the 0 °C line excepted), labelled where
/// labels do not crowd.
fn draw_isotherms<DB: DrawingBackend>(
    chart: &mut Section2d<DB>,
    (xs, zs, field): (&[f64], &[f64], &[f64]),
    v: View,
    (lo, hi, interval): (f64, f64, f64),
) -> Result<()> {
    let inside = |&(x, z): &(f64, f64)| x >= v.x0 && x <= v.x1 && z >= v.z0 && z <= v.z1;
    // Labels keep a distance of 6 % of the view from each other.
    let mut placed: Vec<(f64, f64)> = Vec::new();
    let far = |p: (f64, f64), placed: &[(f64, f64)]| {
        placed.iter().all(|q| {
            (((p.0 - q.0) / (v.x1 - v.x0)).powi(2) + ((p.1 - q.1) / (v.z1 - v.z0)).powi(2)).sqrt()
                > 0.06
        })
    };
    let mut level = (lo / interval).ceil() * interval;
    while level <= hi {
        if level.abs() > 1e-9 {
            for pts in isolines(xs, zs, field, level)
                .iter()
                .flat_map(|l| runs_inside(l, &inside))
            {
                if pts.len() < 2 {
                    continue;
                }
                chart
                    .draw_series(std::iter::once(PathElement::new(
                        pts.clone(),
                        RGBColor(70, 70, 70).stroke_width(1),
                    )))
                    .map_err(out_err)?;
                if pts.len() >= 6 && far(pts[pts.len() / 2], &placed) {
                    let (x, z) = pts[pts.len() / 2];
                    placed.push((x, z));
                    // The label in °C on a pale box, readable on dark and light colours.
                    let text = format!("{level:.0} °C");
                    let w = 7 * text.chars().count() as i32;
                    chart
                        .draw_series(std::iter::once(
                            EmptyElement::at((x, z))
                                + Rectangle::new([(-2, -8), (w, 8)], WHITE.mix(0.8).filled())
                                + Text::new(text, (0, -6), ("sans-serif", 12).into_font()),
                        ))
                        .map_err(out_err)?;
                }
            }
        }
        level += interval;
    }
    Ok(())
}

/// Outlines of the construction parts by kind (concrete dark grey, fill brown, insulation
/// magenta), with a legend entry for each kind in view.
fn draw_outlines<DB: DrawingBackend>(
    chart: &mut Section2d<DB>,
    parts: &[PartOutline],
    v: View,
) -> Result<()> {
    let kinds = [
        ("concrete", RGBColor(40, 40, 40), "concrete"),
        ("fill", RGBColor(130, 90, 40), "fill and backfill"),
        ("insulation", RGBColor(220, 0, 140), "insulation"),
    ];
    for (kind, colour, label) in kinds {
        let rects: Vec<[(f64, f64); 2]> = parts
            .iter()
            .filter(|p| p.kind == kind)
            .map(|p| {
                [
                    (p.x0.max(v.x0), p.z0.max(v.z0)),
                    (p.x1.min(v.x1), p.z1.min(v.z1)),
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

/// The colour bar over [tmin, tmax] °C with the frost-line temperature marked.
fn draw_colour_bar<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    (tmin, tmax): (f64, f64),
    frost_line_c: f64,
) -> Result<()> {
    let mut bar = ChartBuilder::on(area)
        .margin_top(60)
        .margin_bottom(60)
        .margin_right(10)
        .y_label_area_size(50)
        .caption("°C", ("sans-serif", 15))
        .build_cartesian_2d(0.0..1.0, tmin..tmax)
        .map_err(out_err)?;
    // Whole degrees when the range is wide enough, so ticks carry no spurious decimals.
    let digits = if tmax - tmin >= 5.0 { 0 } else { 1 };
    bar.configure_mesh()
        .disable_mesh()
        .disable_x_axis()
        .y_label_formatter(&|v: &f64| format!("{v:.digits$}"))
        .label_style(("sans-serif", 12))
        .draw()
        .map_err(out_err)?;
    let n = 200;
    bar.draw_series((0..n).map(|k| {
        let a = tmin + (tmax - tmin) * k as f64 / n as f64;
        let b = tmin + (tmax - tmin) * (k + 1) as f64 / n as f64;
        Rectangle::new(
            [(0.0, a), (1.0, b)],
            temperature_colour(0.5 * (a + b)).filled(),
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
    xe: &'a [f64],
    ze: &'a [f64],
    t: Vec<f64>,
    frost: Vec<f64>,
    parts: &'a [PartOutline],
    frost_line_c: f64,
    x_desc: &'a str,
    /// Depths of the soil-layer boundaries, m (drawn outside the building).
    strata_z: Vec<f64>,
}

impl<'a> FieldView<'a> {
    /// The saved 2D field of day index `day`.
    fn of_day(d: &'a PlotData, day: usize) -> Self {
        FieldView {
            xe: &d.xe,
            ze: &d.ze,
            t: d.field(day).iter().copied().collect(),
            frost: d.frost_field(day),
            parts: &d.parts,
            frost_line_c: d.frost_line_c,
            x_desc: "x (m), 0 at the wall's exterior face",
            strata_z: strata_boundaries(d),
        }
    }
}

/// Depths where the material changes down the far column below ground (the soil strata).
fn strata_boundaries(d: &PlotData) -> Vec<f64> {
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
fn draw_field<DB: DrawingBackend>(
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
    let mut chart = ChartBuilder::on(&left)
        .caption(title, ("sans-serif", 18))
        .margin(15)
        .x_label_area_size(45)
        .y_label_area_size(60)
        .build_cartesian_2d(v.x0..v.x1, v.z1..v.z0)
        .map_err(out_err)?;
    chart
        .configure_mesh()
        .disable_mesh()
        .x_desc(f.x_desc)
        .y_desc("depth z (m) below ground")
        .label_style(("sans-serif", 13))
        .draw()
        .map_err(out_err)?;
    let field = &f.t[..];
    let (nx, nz) = (f.xe.len() - 1, f.ze.len() - 1);
    let cells = (0..nz)
        .flat_map(|j| (0..nx).map(move |i| (i, j)))
        .filter_map(|(i, j)| {
            let t = field[j * nx + i];
            let (xa, xb, za, zb) = (f.xe[i], f.xe[i + 1], f.ze[j], f.ze[j + 1]);
            (t.is_finite() && xb > v.x0 && xa < v.x1 && zb > v.z0 && za < v.z1).then(|| {
                Rectangle::new(
                    [(xa.max(v.x0), za.max(v.z0)), (xb.min(v.x1), zb.min(v.z1))],
                    temperature_colour(t).filled(),
                )
            })
        });
    chart.draw_series(cells).map_err(out_err)?;
    // Isotherms.
    let xs: Vec<f64> = f.xe.windows(2).map(|w| 0.5 * (w[0] + w[1])).collect();
    let zs: Vec<f64> = f.ze.windows(2).map(|w| 0.5 * (w[0] + w[1])).collect();
    let (lo, hi) = field
        .iter()
        .filter(|t| t.is_finite())
        .fold((f64::MAX, f64::MIN), |(a, b), &t| (a.min(t), b.max(t)));
    let inside = |&(x, z): &(f64, f64)| x >= v.x0 && x <= v.x1 && z >= v.z0 && z <= v.z1;
    draw_isotherms(&mut chart, (&xs, &zs, field), v, (lo, hi, interval))?;
    draw_outlines(&mut chart, f.parts, v)?;
    let brown = RGBColor(110, 70, 30);
    for (k, &z) in f
        .strata_z
        .iter()
        .filter(|&&z| z > v.z0 && z < v.z1)
        .enumerate()
    {
        let s = chart
            .draw_series(DashedLineSeries::new(
                vec![(0.0f64.max(v.x0), z), (v.x1, z)],
                6,
                4,
                brown.stroke_width(1),
            ))
            .map_err(out_err)?;
        if k == 0 {
            s.label("soil-layer boundary").legend(move |(x, y)| {
                PathElement::new(vec![(x, y), (x + 18, y)], brown.stroke_width(1))
            });
        }
    }
    // Ground line outside, and the frost line.
    chart
        .draw_series(std::iter::once(PathElement::new(
            vec![(0.0f64.max(v.x0), 0.0), (v.x1, 0.0)],
            RGBColor(90, 60, 30).stroke_width(2),
        )))
        .map_err(out_err)?;
    let frost = isolines(&xs, &zs, &f.frost, f.frost_line_c);
    let mut labelled = false;
    for pts in frost.iter().flat_map(|l| runs_inside(l, &inside)) {
        if pts.len() >= 2 {
            let s = chart
                .draw_series(std::iter::once(PathElement::new(
                    pts,
                    BLACK.stroke_width(4),
                )))
                .map_err(out_err)?;
            if !labelled {
                labelled = true;
                s.label(format!("frost line ({:.2} °C)", f.frost_line_c))
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
    draw_colour_bar(&right, (tmin, tmax), f.frost_line_c)?;
    root.present().map_err(out_err)?;
    Ok(frost)
}

/// Render with a generic drawing function into `<stem>.png` and `<stem>.svg`; evaluates to the
/// PNG call's result.
macro_rules! render_both {
    ($dir:expr, $stem:expr, $size:expr, $files:expr, $draw:ident ( $($arg:expr),* )) => {{
        // Drawn in memory and written like every other output file (an exclusive temporary
        // and a rename), so no half-written image ever has its final name and a write error
        // names the file.
        let size: (u32, u32) = $size;
        let mut rgb = vec![0u8; size.0 as usize * size.1 as usize * 3];
        let out = {
            let root = BitMapBackend::with_buffer(&mut rgb, size).into_drawing_area();
            $draw(&root, $($arg),*)?
        };
        let mut svg = String::new();
        {
            let root = SVGBackend::with_string(&mut svg, size).into_drawing_area();
            $draw(&root, $($arg),*)?;
        }
        let png = crate::plot::png_bytes(&rgb, size)?;
        $files.push(crate::files::write_atomic($dir, &format!("{}.png", $stem), &png)?);
        $files.push(crate::files::write_atomic($dir, &format!("{}.svg", $stem), svg.as_bytes())?);
        out
    }};
}

/// The default zoom: from 1.2 m inside the footing to 1.2 m beyond the outermost construction
/// part, from the top down to 0.6 m below the deepest of the footing base and the day's frost.
fn default_zoom(d: &PlotData, day: usize, full: View) -> View {
    let deepest = d.days[day]
        .frost_footing_m
        .max(d.days[day].frost_open_m)
        .max(d.footing_base_depth_m);
    let outer = d
        .parts
        .iter()
        .map(|p| p.x1)
        .filter(|&x| x < full.x1)
        .fold(0.0, f64::max);
    View {
        x0: (d.footing_x.0 - 1.2).max(full.x0),
        x1: (outer + 1.2).min(full.x1),
        z0: full.z0,
        z1: (deepest + 0.6).min(full.z1),
    }
}

/// Every image among `files` with its size in pixels (by file stem).
fn plot_index(files: &[PathBuf], sizes: &[(&str, (u32, u32))]) -> Vec<PlotEntry> {
    files
        .iter()
        .filter_map(|f| {
            let name = f
                .file_name()
                .map(|s| s.to_string_lossy().to_string())
                .unwrap_or_default();
            let size = sizes
                .iter()
                .find(|(stem, _)| name.starts_with(&format!("{stem}.")))?
                .1;
            Some(PlotEntry {
                file: name,
                width_px: size.0,
                height_px: size.1,
            })
        })
        .collect()
}

/// `soil_temperature.gif`: the field every 7 days in `view`, on one colour scale (the period's
/// extremes).
fn animate(dir: &Path, d: &PlotData, view: View) -> Result<(PathBuf, PlotEntry)> {
    let name = "soil_temperature.gif";
    let tmp = crate::files::temp_path(dir, name);
    let drawn = draw_animation(&tmp, d, view);
    if drawn.is_err() {
        let _ = std::fs::remove_file(&tmp);
    }
    let size = drawn.map_err(|e| match e {
        Error::Output(m) => Error::Output(format!("{}: {m}", dir.join(name).display())),
        e => e,
    })?;
    let path = crate::files::finish_temp(&tmp, dir, name)?;
    let entry = PlotEntry {
        file: name.into(),
        width_px: size.0,
        height_px: size.1,
    };
    Ok((path, entry))
}

/// Draw the animation into `path`; returns its size in pixels.
fn draw_animation(path: &Path, d: &PlotData, view: View) -> Result<(u32, u32)> {
    let size = field_size(view);
    let root = BitMapBackend::gif(path, size, 150)
        .map_err(out_err)?
        .into_drawing_area();
    let (lo, hi) = d
        .fields
        .iter()
        .filter(|t| t.is_finite())
        .fold((f64::MAX, f64::MIN), |(a, b), &t| (a.min(t), b.max(t)));
    let range = Some((lo.floor().min(-1.0), hi.ceil().max(1.0)));
    for k in (0..d.days.len()).step_by(7) {
        let t = format!(
            "{} — day {}; bold: frost line ({:.2} °C)",
            d.case_name, d.days[k].day_of_year, d.frost_line_c
        );
        draw_field(&root, &FieldView::of_day(d, k), view, 1.0, &t, range)?;
    }
    Ok(size)
}

/// `field_<day>.csv` of the drawn day (a day other than the run's own field day): cell-centre
/// temperatures of the solid cells from the saved daily fields (0.01 K resolution).
fn field_csv(out: &Path, d: &PlotData, day: usize) -> Result<PathBuf> {
    use crate::files::tables::{csv_bytes, fmt};
    let f = d.field(day);
    let (nx, nz) = (d.xe.len() - 1, d.ze.len() - 1);
    let c = |e: &[f64], i: usize| 0.5 * (e[i] + e[i + 1]);
    let csv = csv_bytes(
        "",
        &["x_m", "z_m", "temperature_c"],
        (0..nz)
            .flat_map(|j| (0..nx).map(move |i| (i, j)))
            .filter_map(|(i, j)| {
                let v = f[[j, i]];
                v.is_finite()
                    .then(|| vec![fmt(c(&d.xe, i), 4), fmt(c(&d.ze, j), 4), fmt(v, 2)])
            }),
    )?;
    crate::files::write_atomic(
        out,
        &format!("field_{:03}.csv", d.days[day].day_of_year),
        &csv.bytes,
    )
}

/// Render every plot of the run saved in `dir` (into `opts.out` if given); returns the files
/// written.
pub fn render_dir(dir: &Path, opts: &PlotOptions) -> Result<Vec<PathBuf>> {
    register_fonts();
    let d = PlotData::load(dir)?;
    let out = opts.out.as_deref().unwrap_or(dir);
    crate::files::create_dir(out)?;
    let mut files = Vec::new();
    let day = match opts.day_of_year {
        Some(doy) => d.day_index(doy).ok_or_else(|| {
            Error::in_file(
                &dir.join("daily.csv").display().to_string(),
                "day_of_year",
                InputKind::OutOfRange,
                format!("{doy} is not a day of the saved period; allowed: 1 to 365"),
            )
        })?,
        None => d.field_day_index,
    };
    let doy = d.days[day].day_of_year;
    let full = View {
        x0: d.xe[0],
        x1: *d.xe.last().unwrap_or(&1.0),
        z0: d.ze[0],
        z1: *d.ze.last().unwrap_or(&1.0),
    };
    let fl = d.frost_line_c;
    let title = format!(
        "{} — soil temperature, day {doy}; bold: frost line ({fl:.2} °C)",
        d.case_name
    );
    let mut sizes = vec![
        ("soil_temperature", field_size(full)),
        ("frost_depth", charts::SIZE),
        ("heat_loss", charts::SIZE),
        ("probes", charts::SIZE),
    ];
    // The day's field (and its frost scalar) once for both views and both image formats.
    let fv = FieldView::of_day(&d, day);
    render_both!(
        out,
        "soil_temperature",
        field_size(full),
        files,
        draw_field(&fv, full, 2.0, &title, None)
    );
    let zoom = match opts.zoom {
        Some([x0, x1, z0, z1]) => View { x0, x1, z0, z1 },
        None => default_zoom(&d, day, full),
    };
    if !(zoom.x1 > zoom.x0 && zoom.z1 > zoom.z0) {
        return Err(Error::in_file(
            "plot options",
            "zoom",
            InputKind::OutOfRange,
            "empty window; allowed: x0 < x1 and z0 < z1 (m)",
        ));
    }
    let ztitle = format!(
        "{} — around the footing, day {doy}; bold: frost line ({fl:.2} °C)",
        d.case_name
    );
    sizes.push(("soil_temperature_zoom", field_size(zoom)));
    let frost = render_both!(
        out,
        "soil_temperature_zoom",
        field_size(zoom),
        files,
        draw_field(&fv, zoom, 1.0, &ztitle, None)
    );
    // The frost line drawn on the field, saved as data.
    files.push(crate::files::write_atomic(
        out,
        &format!("frost_line_{doy:03}.csv"),
        &crate::files::section::frost_line_csv(&frost),
    )?);
    charts::frost_depth(out, &d, &mut files)?;
    charts::heat_loss(out, &d, &mut files)?;
    if !d.probe_names.is_empty() {
        charts::probes(out, &d, &mut files)?;
    }
    if let Some(f) = crate::files::read_three_d(dir)? {
        sizes.extend(three::render(out, &f, &mut files)?);
    }
    if let Some(w) = charts::read_winters(dir)? {
        charts::winters(out, &d, &w, &mut files)?;
        sizes.push(("winters", charts::SIZE));
    }
    let mut index = plot_index(&files, &sizes);
    if opts.animate {
        let (path, entry) = animate(out, &d, zoom)?;
        files.push(path);
        index.push(entry);
    }
    if day != d.field_day_index {
        files.push(field_csv(out, &d, day)?);
    }
    files.push(crate::files::write_json(
        out,
        "plots.json",
        &PlotIndex {
            day_of_year: doy,
            plots: index,
        },
    )?);
    Ok(files)
}

pub mod charts;
pub mod three;
