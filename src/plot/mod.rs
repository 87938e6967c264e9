//! Plots of a finished run, rendered from the files it saved (so `frostline plot DIR` and
//! `frostline run` share one path): the soil temperature field with isotherms and the frost line,
//! a zoom around the footing, frost depth over the year, monthly heat loss, probe temperatures,
//! and optionally an animation of the field through the year. PNG and SVG; fonts are embedded
//! (DejaVu Sans), so no system font package is needed.
pub mod data;
mod field;
pub mod scaled;
mod shade;

use crate::error::{Error, InputKind, Result};
use crate::files::{PlotEntry, PlotIndex};
use data::PlotData;
pub(crate) use field::{draw_field, field_size, runs_inside, FieldView, View};
use plotters::prelude::*;
use std::path::{Path, PathBuf};

/// What to render.
#[derive(Debug, Clone, Default)]
pub struct PlotOptions {
    /// Day of year of the field plots (default: the run's design day, the least frost margin).
    pub day_of_year: Option<usize>,
    /// Zoom window x0, x1, z0, z1 (m) for the zoomed field plot.
    pub zoom: Option<[f64; 4]>,
    /// Also write `soil_temperature.gif` (the field through the year).
    pub animate: bool,
    /// Write the plots here instead of the run directory (created if missing).
    pub out: Option<PathBuf>,
    /// Resolution of the PNG images in dots per inch (None: 96, the layout's own density). The
    /// figures keep their layout; more dots draw the same figure with more pixels.
    pub dpi: Option<u32>,
}

/// Where images go and at what resolution.
pub struct Target<'a> {
    /// Output directory.
    pub dir: &'a Path,
    /// Physical pixels per layout pixel of the PNG images.
    pub scale: f64,
}

pub(crate) fn register_fonts() {
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
pub(crate) fn png_bytes(rgb: &[u8], (w, h): (u32, u32), scale: f64) -> Result<Vec<u8>> {
    let mut out = Vec::new();
    {
        let mut enc = png::Encoder::new(&mut out, w, h);
        enc.set_color(png::ColorType::Rgb);
        enc.set_depth(png::BitDepth::Eight);
        enc.set_compression(png::Compression::Best);
        enc.set_adaptive_filter(png::AdaptiveFilterType::Adaptive);
        // The print density (pHYs, PNG specification §11.3.5.3: pixels per metre).
        let ppm = (scaled::LAYOUT_DPI * scale / 0.0254).round() as u32;
        enc.set_pixel_dims(Some(png::PixelDimensions {
            xppu: ppm,
            yppu: ppm,
            unit: png::Unit::Meter,
        }));
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

/// Render with a generic drawing function into `<stem>.png` and `<stem>.svg`; evaluates to the
/// PNG call's result.
macro_rules! render_both {
    ($target:expr, $stem:expr, $size:expr, $files:expr, $draw:ident ( $($arg:expr),* )) => {{
        // Drawn in memory and written like every other output file (an exclusive temporary
        // and a rename), so no half-written image ever has its final name and a write error
        // names the file.
        let size: (u32, u32) = $size;
        let target: &crate::plot::Target = $target;
        let dir = target.dir;
        let phys = (
            crate::plot::scaled::physical(size.0, target.scale),
            crate::plot::scaled::physical(size.1, target.scale),
        );
        let mut rgb = vec![0u8; phys.0 as usize * phys.1 as usize * 3];
        let out = {
            let inner = BitMapBackend::with_buffer(&mut rgb, phys);
            let root =
                crate::plot::scaled::Scaled::new(inner, size, target.scale).into_drawing_area();
            $draw(&root, $($arg),*)?
        };
        let mut svg = String::new();
        {
            let root = SVGBackend::with_string(&mut svg, size).into_drawing_area();
            $draw(&root, $($arg),*)?;
        }
        // plotters-svg writes embedded images as `data:png;…`; the media type is image/png
        // (RFC 2397 data URLs, IANA media types), which strict SVG viewers require.
        let svg = svg.replace("href=\"data:png;base64,", "href=\"data:image/png;base64,");
        let png = crate::plot::png_bytes(&rgb, phys, target.scale)?;
        $files.push(crate::files::write_atomic(dir, &format!("{}.png", $stem), &png)?);
        $files.push(crate::files::write_atomic(dir, &format!("{}.svg", $stem), svg.as_bytes())?);
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
            "{} — day {}; bold: frost line ({})",
            d.case_name,
            d.days[k].day_of_year,
            field::temperature_text(d.field_units, d.frost_line_c, 2)
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
    let mut d = PlotData::load(dir)?;
    let units = crate::files::read_summary(dir)?.units;
    d.field_units = units;
    let out = opts.out.as_deref().unwrap_or(dir);
    crate::files::create_dir(out)?;
    let target = Target {
        dir: out,
        scale: opts.dpi.map_or(1.0, |d| d as f64 / scaled::LAYOUT_DPI),
    };
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
    let fl = field::temperature_text(units, d.frost_line_c, 2);
    let title = format!(
        "{} — soil temperature, day {doy}; bold: frost line ({fl})",
        d.case_name
    );
    // The day's field (and its frost scalar) once for both views and both image formats.
    let fv = FieldView::of_day(&d, day);
    let around = default_zoom(&d, day, full);
    let section = field::physics_view(&fv, full, around);
    let mut sizes = vec![
        ("soil_temperature", field_size(section)),
        ("frost_depth", charts::SIZE),
        ("heat_loss", charts::SIZE),
        ("probes", charts::SIZE),
    ];
    render_both!(
        &target,
        "soil_temperature",
        field_size(section),
        files,
        draw_field(&fv, section, 2.0, &title, None)
    );
    let zoom = match opts.zoom {
        Some([x0, x1, z0, z1]) => View { x0, x1, z0, z1 },
        None => around,
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
        "{} — around the footing, day {doy}; bold: frost line ({fl})",
        d.case_name
    );
    sizes.push(("soil_temperature_zoom", field_size(zoom)));
    let frost = render_both!(
        &target,
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
    let sketch_size = sketch::render(&target, &d, &mut files)?;
    sizes.push(("foundation_sketch", sketch_size));
    // The charts in the run's units (the field plots and the sketch above convert as they draw).
    d.charts_in(units);
    charts::frost_depth(&target, &d, &mut files)?;
    charts::heat_loss(&target, &d, &mut files)?;
    if !d.probe_names.is_empty() {
        charts::probes(&target, &d, &mut files)?;
    }
    if let Some(f) = crate::files::read_three_d(dir)? {
        sizes.extend(three::render(&target, &f, units, &mut files)?);
    }
    if let Some(z) = crate::files::read_sizing(dir)? {
        if tradeoff::render(&target, &z, units, &mut files)? {
            sizes.push(("sizing_tradeoff", charts::SIZE));
        }
    }
    if let Some(w) = charts::read_winters(dir)? {
        charts::winters(&target, &d, &w, &mut files)?;
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
mod sketch;
pub mod three;
mod tradeoff;
mod uncertainty;
pub use uncertainty::uncertainty_plots;
