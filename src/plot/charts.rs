//! Line and bar charts of the reported year: frost depth, monthly heat loss, probe temperatures.
use super::data::PlotData;
use super::{out_err, Target};
use crate::error::Result;
use plotters::coord::Shift;
use plotters::prelude::*;
use std::path::{Path, PathBuf};

/// Size of the line and bar charts, pixels.
pub const SIZE: (u32, u32) = (1000, 560);
const OPEN: RGBColor = RGBColor(33, 74, 160);
const FOOT: RGBColor = RGBColor(196, 78, 52);
const FACE: RGBColor = RGBColor(120, 60, 150);

/// The legend box every chart uses.
pub(super) fn legend<'a, DB: DrawingBackend + 'a, CT: plotters::coord::CoordTranslate>(
    chart: &mut ChartContext<'a, DB, CT>,
    position: SeriesLabelPosition,
) -> Result<()> {
    chart
        .configure_series_labels()
        .background_style(WHITE.mix(0.9))
        .border_style(BLACK)
        .label_font(("sans-serif", 13))
        .position(position)
        .draw()
        .map_err(out_err)
}

/// A chart whose axes are two f64 ranges.
type Chart2<'a, DB> = ChartContext<
    'a,
    DB,
    Cartesian2d<plotters::coord::types::RangedCoordf64, plotters::coord::types::RangedCoordf64>,
>;

/// A dashed horizontal reference line from x0 to x1 at depth `z`, dashes (`dash`, `gap`) px, in
/// `colour`, with its legend entry `label`.
fn reference_line<'a, DB: DrawingBackend + 'a>(
    chart: &mut Chart2<'a, DB>,
    (x0, x1, z): (f64, f64, f64),
    (dash, gap, colour): (u32, u32, RGBColor),
    label: String,
) -> Result<()> {
    chart
        .draw_series(DashedLineSeries::new(
            vec![(x0, z), (x1, z)],
            dash,
            gap,
            colour.stroke_width(2),
        ))
        .map_err(out_err)?
        .label(label)
        .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], colour.stroke_width(2)));
    Ok(())
}

/// The dashed footing-base reference line from x0 to x1 at depth `base` (m), with its legend entry.
pub(super) fn footing_base_line<'a, DB: DrawingBackend + 'a>(
    chart: &mut Chart2<'a, DB>,
    x0: f64,
    x1: f64,
    (base, unit): (f64, &str),
) -> Result<()> {
    reference_line(
        chart,
        (x0, x1, base),
        (8, 6, BLACK),
        format!("footing base ({base:.2} {unit})"),
    )
}

/// Under a footing that bears on an insulation board: the dashed bearing level (the board's
/// underside, the top of the protected zone) from x0 to x1, with its legend entry.
pub(super) fn bearing_line<'a, DB: DrawingBackend + 'a>(
    chart: &mut Chart2<'a, DB>,
    x0: f64,
    x1: f64,
    (base, bearing, unit): (f64, f64, &str),
) -> Result<()> {
    if !crate::run::frost::bears_on_board(base, bearing) {
        return Ok(());
    }
    reference_line(
        chart,
        (x0, x1, bearing),
        (3, 4, FOOT),
        format!("bearing level, under the board ({bearing:.2} {unit})"),
    )
}

fn doy_label(d: &PlotData) -> impl Fn(&f64) -> String + '_ {
    move |x: &f64| {
        let k = (x.round().max(0.0) as usize).min(d.days.len().saturating_sub(1));
        d.days.get(k).map_or(String::new(), |day| {
            let dm = crate::physics::climate::calendar::day_month(day.day_of_year);
            // A measured day carries its year; a sinusoidal year has none.
            match day.date {
                Some(dn) => format!("{dm} {}", crate::physics::climate::civil_from_days(dn).0),
                None => dm,
            }
        })
    }
}

fn draw_frost<DB: DrawingBackend>(root: &DrawingArea<DB, Shift>, d: &PlotData) -> Result<()> {
    root.fill(&WHITE).map_err(out_err)?;
    let n = d.days.len() as f64;
    let deepest = d
        .days
        .iter()
        .map(|x| x.frost_open_m.max(x.frost_footing_m))
        .fold(d.bearing_depth_m, f64::max);
    let zmax = (deepest * 1.15).max(if d.units == crate::files::us::Units::Si {
        0.5
    } else {
        1.5
    });
    let mut chart = ChartBuilder::on(root)
        .caption(
            format!("{} — frost depth over the reported year", d.case_name),
            ("sans-serif", 18),
        )
        .margin(15)
        .x_label_area_size(45)
        .y_label_area_size(60)
        .build_cartesian_2d(0.0..n, zmax..0.0)
        .map_err(out_err)?;
    chart
        .configure_mesh()
        .x_desc(if d.days.first().is_some_and(|x| x.date.is_some()) {
            "date (the reported winter: a measured season, 1 July – 30 June)"
        } else {
            "date (the reported year runs from the warmest day)"
        })
        .y_desc(format!("frost depth below ground ({})", d.unit("m")))
        .x_label_formatter(&doy_label(d))
        .label_style(("sans-serif", 13))
        .light_line_style(RGBColor(235, 235, 235))
        .draw()
        .map_err(out_err)?;
    // The frozen layer as a band from its top (thawed from the surface in spring) to its
    // bottom, over the days it exists: nothing is drawn on the axis while there is no frost.
    type Layer = fn(&crate::run::Day) -> (f64, f64);
    let bands: [(&str, RGBColor, Layer); 2] = [
        ("frozen layer, open ground (far edge)", OPEN, |x| {
            (x.frost_top_open_m, x.frost_open_m)
        }),
        ("frozen layer at the footing's outer face", FACE, |x| {
            (x.frost_top_face_m, x.frost_face_m)
        }),
    ];
    for (label, colour, layer) in bands {
        let runs = frozen_runs(d, layer);
        for (r, run) in runs.iter().enumerate() {
            // Without the layer's top (a 3D run's section, or an older run) only its bottom.
            if run.iter().all(|p| p.1.is_finite()) {
                let mut poly: Vec<(f64, f64)> = run.iter().map(|&(k, top, _)| (k, top)).collect();
                poly.extend(run.iter().rev().map(|&(k, _, bottom)| (k, bottom)));
                chart
                    .draw_series(std::iter::once(Polygon::new(
                        poly,
                        colour.mix(0.3).filled(),
                    )))
                    .map_err(out_err)?;
            }
            let s = chart
                .draw_series(LineSeries::new(
                    run.iter().map(|&(k, _, bottom)| (k, bottom)),
                    colour.stroke_width(2),
                ))
                .map_err(out_err)?;
            if r == 0 {
                s.label(label).legend(move |(x, y)| {
                    Rectangle::new([(x, y - 5), (x + 20, y + 5)], colour.mix(0.5).filled())
                });
            }
        }
    }
    // Frost below the footing's bearing level (its base, or the board's underside), where there
    // is any.
    let under = frozen_runs(d, |x| (d.bearing_depth_m, x.frost_footing_m));
    for (r, run) in under.iter().enumerate() {
        let s = chart
            .draw_series(LineSeries::new(
                run.iter().map(|&(k, _, bottom)| (k, bottom)),
                FOOT.stroke_width(3),
            ))
            .map_err(out_err)?;
        if r == 0 {
            s.label(
                if crate::run::frost::bears_on_board(d.footing_base_depth_m, d.bearing_depth_m) {
                    "under the footing (below the board)"
                } else {
                    "under the footing (below its base)"
                },
            )
            .legend(|(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], FOOT.stroke_width(3)));
        }
    }
    footing_base_line(&mut chart, 0.0, n, (d.footing_base_depth_m, d.unit("m")))?;
    let levels = (d.footing_base_depth_m, d.bearing_depth_m, d.unit("m"));
    bearing_line(&mut chart, 0.0, n, levels)?;
    legend(&mut chart, SeriesLabelPosition::LowerLeft)?;
    root.present().map_err(out_err)
}

/// The runs of consecutive days on which `layer` (top, bottom of the frozen layer, m) has frost
/// (bottom > top, or bottom > 0 with an unknown top, kept as NaN): for each day its index, top
/// and bottom.
fn frozen_runs(
    d: &PlotData,
    layer: impl Fn(&crate::run::Day) -> (f64, f64),
) -> Vec<Vec<(f64, f64, f64)>> {
    let mut runs: Vec<Vec<(f64, f64, f64)>> = Vec::new();
    let mut cur = Vec::new();
    for (k, x) in d.days.iter().enumerate() {
        let (top, bottom) = layer(x);
        if bottom.is_finite() && bottom > if top.is_finite() { top + 1e-6 } else { 0.0 } {
            cur.push((k as f64, top, bottom));
        } else if !cur.is_empty() {
            runs.push(std::mem::take(&mut cur));
        }
    }
    if !cur.is_empty() {
        runs.push(cur);
    }
    runs
}

fn draw_heat<DB: DrawingBackend>(root: &DrawingArea<DB, Shift>, d: &PlotData) -> Result<()> {
    root.fill(&WHITE).map_err(out_err)?;
    let kmax = d
        .monthly
        .iter()
        .map(|m| m.ground_heat_loss_kwh)
        .fold(0.0, f64::max)
        * 1.3;
    let (tlo, thi) = d.monthly.iter().fold((f64::MAX, f64::MIN), |(a, b), m| {
        (
            a.min(m.mean_outdoor_temperature_c),
            b.max(m.mean_outdoor_temperature_c),
        )
    });
    let names = [
        "Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec",
    ];
    let mut chart = ChartBuilder::on(root)
        .caption(
            format!(
                "{} — monthly ground heat loss (whole building)",
                d.case_name
            ),
            ("sans-serif", 18),
        )
        .margin(15)
        .x_label_area_size(45)
        .y_label_area_size(70)
        .right_y_label_area_size(60)
        .build_cartesian_2d(0.5..12.5, 0.0..kmax.max(1.0))
        .map_err(out_err)?
        .set_secondary_coord(0.5..12.5, (tlo - 2.0).floor()..(thi + 2.0).ceil());
    chart
        .configure_mesh()
        .disable_x_mesh()
        .x_labels(12)
        .x_label_formatter(&|x: &f64| {
            names
                .get((x.round() as usize).wrapping_sub(1))
                .map_or(String::new(), |s| s.to_string())
        })
        .y_desc(format!("ground heat loss ({} per month)", d.unit("kWh")))
        .label_style(("sans-serif", 13))
        .light_line_style(RGBColor(235, 235, 235))
        .draw()
        .map_err(out_err)?;
    chart
        .configure_secondary_axes()
        .y_desc(format!("mean outdoor temperature ({})", d.unit("°C")))
        .label_style(("sans-serif", 13))
        .draw()
        .map_err(out_err)?;
    chart
        .draw_series(d.monthly.iter().map(|m| {
            let x = m.month as f64;
            Rectangle::new(
                [(x - 0.35, 0.0), (x + 0.35, m.ground_heat_loss_kwh)],
                RGBColor(232, 150, 72).filled(),
            )
        }))
        .map_err(out_err)?
        .label(format!("heat loss ({})", d.unit("kWh")))
        .legend(|(x, y)| {
            Rectangle::new(
                [(x, y - 5), (x + 15, y + 5)],
                RGBColor(232, 150, 72).filled(),
            )
        });
    chart
        .draw_secondary_series(LineSeries::new(
            d.monthly
                .iter()
                .map(|m| (m.month as f64, m.mean_outdoor_temperature_c)),
            OPEN.stroke_width(3),
        ))
        .map_err(out_err)?
        .label(format!("mean outdoor temperature ({})", d.unit("°C")))
        .legend(|(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], OPEN.stroke_width(3)));
    legend(&mut chart, SeriesLabelPosition::UpperRight)?;
    root.present().map_err(out_err)
}

fn draw_probes<DB: DrawingBackend>(root: &DrawingArea<DB, Shift>, d: &PlotData) -> Result<()> {
    root.fill(&WHITE).map_err(out_err)?;
    let n = d.days.len() as f64;
    let (lo, hi) = d
        .probes
        .iter()
        .flatten()
        .filter(|v| v.is_finite())
        .fold((f64::MAX, f64::MIN), |(a, b), &v| (a.min(v), b.max(v)));
    let (lo, hi) = if lo <= hi {
        ((lo - 1.0).floor(), (hi + 1.0).ceil())
    } else {
        (-1.0, 1.0)
    };
    let mut chart = ChartBuilder::on(root)
        .caption(
            format!("{} — probe temperatures", d.case_name),
            ("sans-serif", 18),
        )
        .margin(15)
        .x_label_area_size(45)
        .y_label_area_size(60)
        .build_cartesian_2d(0.0..n, lo..hi)
        .map_err(out_err)?;
    chart
        .configure_mesh()
        .x_desc("date")
        .y_desc(format!("temperature ({})", d.unit("°C")))
        .x_label_formatter(&doy_label(d))
        .label_style(("sans-serif", 13))
        .light_line_style(RGBColor(235, 235, 235))
        .draw()
        .map_err(out_err)?;
    chart
        .draw_series(std::iter::once(PathElement::new(
            vec![(0.0, 0.0), (n, 0.0)],
            RGBColor(120, 120, 120).stroke_width(1),
        )))
        .map_err(out_err)?;
    let palette = [
        OPEN,
        FOOT,
        RGBColor(40, 140, 80),
        RGBColor(120, 60, 160),
        RGBColor(200, 150, 0),
        RGBColor(60, 60, 60),
    ];
    for (k, (name, series)) in d.probe_names.iter().zip(&d.probes).enumerate() {
        let c = palette[k % palette.len()];
        chart
            .draw_series(LineSeries::new(
                series.iter().enumerate().map(|(i, &v)| (i as f64, v)),
                c.stroke_width(2),
            ))
            .map_err(out_err)?
            .label(name.trim_end_matches(" temperature_c").to_string())
            .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], c.stroke_width(2)));
    }
    legend(&mut chart, SeriesLabelPosition::UpperRight)?;
    root.present().map_err(out_err)
}

/// `frost_depth.png/svg`.
pub fn frost_depth(dir: &Target, d: &PlotData, files: &mut Vec<PathBuf>) -> Result<()> {
    render_both!(dir, "frost_depth", SIZE, files, draw_frost(d));
    Ok(())
}

/// `heat_loss.png/svg`.
pub fn heat_loss(dir: &Target, d: &PlotData, files: &mut Vec<PathBuf>) -> Result<()> {
    render_both!(dir, "heat_loss", SIZE, files, draw_heat(d));
    Ok(())
}

/// `probes.png/svg`.
pub fn probes(dir: &Target, d: &PlotData, files: &mut Vec<PathBuf>) -> Result<()> {
    render_both!(dir, "probes", SIZE, files, draw_probes(d));
    Ok(())
}

/// Per-winter results of a measured series, read from `winters.csv` if the run has one:
/// (winter, least frost margin m, frost open ground m).
pub fn read_winters(dir: &Path) -> Result<Option<Vec<(i64, f64, f64)>>> {
    if !dir.join("winters.csv").exists() {
        return Ok(None);
    }
    let rows: Vec<crate::files::tables::WinterRow> =
        crate::files::tables::read_rows(dir, "winters.csv")?;
    let w: Vec<(i64, f64, f64)> = rows
        .iter()
        .map(|r| (r.winter, r.frost_margin_m, r.frost_depth_open_ground_m))
        .collect();
    Ok((!w.is_empty()).then_some(w))
}

fn draw_winters<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    d: &PlotData,
    w: &[(i64, f64, f64)],
) -> Result<()> {
    root.fill(&WHITE).map_err(out_err)?;
    let zmax = w
        .iter()
        .map(|x| x.1.max(x.2))
        .fold(d.bearing_depth_m, f64::max)
        * 1.15;
    let (y0, y1) = (w[0].0 as f64 - 0.5, w[w.len() - 1].0 as f64 + 0.5);
    let mut chart = ChartBuilder::on(root)
        .caption(
            format!(
                "{} — deepest frost of every winter of the series",
                d.case_name
            ),
            ("sans-serif", 18),
        )
        .margin(15)
        .x_label_area_size(45)
        .y_label_area_size(60)
        .build_cartesian_2d(y0..y1, zmax..0.0)
        .map_err(out_err)?;
    chart
        .configure_mesh()
        .x_desc("winter (named by the year it starts)")
        .y_desc(format!("frost depth below ground ({})", d.unit("m")))
        .x_label_formatter(&|x: &f64| format!("{:.0}", x))
        .label_style(("sans-serif", 13))
        .light_line_style(RGBColor(235, 235, 235))
        .draw()
        .map_err(out_err)?;
    chart
        .draw_series(
            w.iter().map(|x| {
                Rectangle::new([(x.0 as f64 - 0.4, 0.0), (x.0 as f64, x.2)], OPEN.filled())
            }),
        )
        .map_err(out_err)?
        .label("open ground")
        .legend(|(x, y)| Rectangle::new([(x, y - 5), (x + 15, y + 5)], OPEN.filled()));
    chart
        .draw_series(
            w.iter().map(|x| {
                Rectangle::new([(x.0 as f64, 0.0), (x.0 as f64 + 0.4, x.1)], FOOT.filled())
            }),
        )
        .map_err(out_err)?
        .label("under the footing")
        .legend(|(x, y)| Rectangle::new([(x, y - 5), (x + 15, y + 5)], FOOT.filled()));
    footing_base_line(&mut chart, y0, y1, (d.footing_base_depth_m, d.unit("m")))?;
    let levels = (d.footing_base_depth_m, d.bearing_depth_m, d.unit("m"));
    bearing_line(&mut chart, y0, y1, levels)?;
    legend(&mut chart, SeriesLabelPosition::LowerRight)?;
    root.present().map_err(out_err)
}

/// `winters.png/svg` for a run on a measured series.
pub fn winters(
    dir: &Target,
    d: &PlotData,
    w: &[(i64, f64, f64)],
    files: &mut Vec<PathBuf>,
) -> Result<()> {
    // The winters' depths in the charts' units, as the footing base.
    let to = |m: f64| crate::files::us::figure(d.units, "m", m, 0).1;
    let w: Vec<(i64, f64, f64)> = w.iter().map(|&(y, a, b)| (y, to(a), to(b))).collect();
    let w = &w[..];
    render_both!(dir, "winters", SIZE, files, draw_winters(d, w));
    Ok(())
}
