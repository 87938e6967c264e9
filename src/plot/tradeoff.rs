//! `sizing_tradeoff.png/svg`: what a sizing found, from `sizing.json`. Top: with two varied
//! dimensions, the least second dimension for each value of the first (the trade-off curve);
//! with one, the frost margin of every evaluated value against the required margin. Bottom: the
//! annual ground heat loss of the same designs against the foundation without the varied
//! insulation. The chosen (least-cost) design is marked in both.
use super::charts::{legend, SIZE};
use super::{out_err, Target};
use crate::design::Design;
use crate::error::Result;
use crate::files::SizingFile;
use plotters::coord::Shift;
use plotters::prelude::*;
use std::path::PathBuf;

const LINE: RGBColor = RGBColor(33, 74, 160);
const CHOSEN: RGBColor = RGBColor(196, 40, 40);
const GREY: RGBColor = RGBColor(140, 140, 140);

/// The range of `v` padded by 8 % (or ±0.05 around a single value).
fn padded(v: impl Iterator<Item = f64>) -> (f64, f64) {
    let (lo, hi) = v
        .filter(|x| x.is_finite())
        .fold((f64::MAX, f64::MIN), |(a, b), x| (a.min(x), b.max(x)));
    if lo > hi {
        return (0.0, 1.0);
    }
    let pad = if hi > lo { 0.08 * (hi - lo) } else { 0.05 };
    (lo - pad, hi + pad)
}

/// The designs drawn: the trade-off (two dimensions) or every evaluated design (one), by the
/// first dimension's value.
fn shown(f: &SizingFile) -> Vec<&Design> {
    let mut v: Vec<&Design> = if f.dimensions.len() == 2 {
        f.tradeoff.iter().collect()
    } else {
        f.designs
            .iter()
            .filter(|d| d.frost_margin_m.is_finite())
            .collect()
    };
    v.sort_by(|a, b| a.values[0].total_cmp(&b.values[0]));
    v
}

/// The sizing's lengths in feet and energies in kBtu, for the plot of a run in US units, by the
/// outputs' conversion ([`crate::files::us::figure`]).
fn in_us(f: &SizingFile) -> SizingFile {
    use crate::files::us::{figure, Units};
    let ft = |m: f64| figure(Units::Us, "m", m, 0).1;
    let kbtu = |kwh: f64| figure(Units::Us, "kWh", kwh, 0).1;
    let conv = |d: &Design| Design {
        values: d.values.iter().map(|&v| ft(v)).collect(),
        frost_margin_m: ft(d.frost_margin_m),
        frost_depth_under_footing_m: ft(d.frost_depth_under_footing_m),
        annual_heat_loss_kwh: kbtu(d.annual_heat_loss_kwh),
        heat_loss_change_kwh: kbtu(d.heat_loss_change_kwh),
        ..d.clone()
    };
    SizingFile {
        margin_m: ft(f.margin_m),
        baseline_without_varied_insulation: conv(&f.baseline_without_varied_insulation),
        chosen: f.chosen.as_ref().map(conv),
        tradeoff: f.tradeoff.iter().map(conv).collect(),
        designs: f.designs.iter().map(conv).collect(),
        // The varied keys as a US case names them (wing.width_ft).
        dimensions: f
            .dimensions
            .iter()
            .map(|d| crate::files::us::convert(d, 0.0).map_or(d.clone(), |(k, _)| k))
            .collect(),
        ..f.clone()
    }
}

/// The plot of `f`, its lengths in `lu` and its energies in `eu` (SI or converted by [`in_us`]).
fn draw<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    f: &SizingFile,
    (lu, eu): (&str, &str),
) -> Result<()> {
    root.fill(&WHITE).map_err(out_err)?;
    let root = root
        .titled(
            &format!("{} — sizing: what each design gives", f.case_name),
            ("sans-serif", 18),
        )
        .map_err(out_err)?;
    // An unheated building has no heat loss to show: the margin panel takes the whole figure.
    let (top, bottom) = if f.unheated {
        (root.clone(), root.clone())
    } else {
        root.split_vertically(SIZE.1 * 55 / 100)
    };
    let designs = shown(f);
    let two = f.dimensions.len() == 2;
    let x = |d: &Design| d.values[0];
    let (x0, x1) = padded(designs.iter().map(|d| x(d)));
    let y_top = |d: &Design| if two { d.values[1] } else { d.frost_margin_m };
    let chosen = f.chosen.as_ref();
    // Top panel.
    let (t0, t1) = padded(
        designs
            .iter()
            .map(|d| y_top(d))
            .chain((!two).then_some(f.margin_m)),
    );
    let mut c = ChartBuilder::on(&top)
        .margin(12)
        .x_label_area_size(40)
        .y_label_area_size(70)
        .build_cartesian_2d(x0..x1, t0..t1)
        .map_err(out_err)?;
    c.configure_mesh()
        .x_desc(format!("{} ({lu})", f.dimensions[0]))
        .y_desc(if two {
            format!("least {} ({lu})", f.dimensions[1])
        } else {
            format!("frost margin ({lu})")
        })
        // Decimals from the tick spacing; a tick at zero reads 0, not -0.0.
        .y_label_formatter(&|v: &f64| {
            let d = if (t1 - t0) < 0.5 { 2 } else { 1 };
            format!("{:.d$}", if v.abs() < 1e-9 { 0.0 } else { *v })
        })
        .label_style(("sans-serif", 13))
        .light_line_style(RGBColor(235, 235, 235))
        .draw()
        .map_err(out_err)?;
    let pts: Vec<(f64, f64)> = designs.iter().map(|d| (x(d), y_top(d))).collect();
    c.draw_series(LineSeries::new(pts.clone(), LINE.stroke_width(2)))
        .map_err(out_err)?
        .label(if two {
            "least value that meets the margin"
        } else {
            "frost margin of each evaluated design"
        })
        .legend(|(x, y)| PathElement::new(vec![(x, y), (x + 18, y)], LINE.stroke_width(2)));
    c.draw_series(pts.iter().map(|&p| Circle::new(p, 4, LINE.filled())))
        .map_err(out_err)?;
    if !two {
        c.draw_series(DashedLineSeries::new(
            vec![(x0, f.margin_m), (x1, f.margin_m)],
            8,
            5,
            GREY.stroke_width(2),
        ))
        .map_err(out_err)?
        .label(format!("required margin {:.2} {lu}", f.margin_m))
        .legend(|(x, y)| PathElement::new(vec![(x, y), (x + 18, y)], GREY.stroke_width(2)));
    }
    if let Some(ch) = chosen {
        c.draw_series(std::iter::once(Circle::new(
            (x(ch), y_top(ch)),
            8,
            CHOSEN.stroke_width(3),
        )))
        .map_err(out_err)?
        .label("chosen (least cost)")
        .legend(|(x, y)| Circle::new((x + 9, y), 5, CHOSEN.stroke_width(2)));
    }
    // Away from the curve: the least second dimension falls with the first, the margin rises.
    legend(
        &mut c,
        if two {
            SeriesLabelPosition::UpperRight
        } else {
            SeriesLabelPosition::UpperLeft
        },
    )?;
    if f.unheated {
        return root.present().map_err(out_err);
    }
    // Bottom panel: annual heat loss.
    let base = f.baseline_without_varied_insulation.annual_heat_loss_kwh;
    let (h0, h1) = padded(
        designs
            .iter()
            .map(|d| d.annual_heat_loss_kwh)
            .chain(std::iter::once(base)),
    );
    let mut c = ChartBuilder::on(&bottom)
        .margin(12)
        .x_label_area_size(40)
        .y_label_area_size(70)
        .build_cartesian_2d(x0..x1, h0..h1)
        .map_err(out_err)?;
    c.configure_mesh()
        .x_desc(format!("{} ({lu})", f.dimensions[0]))
        .y_desc(format!("ground heat loss ({eu}/yr)"))
        .y_label_formatter(&|v: &f64| format!("{v:.0}"))
        .label_style(("sans-serif", 13))
        .light_line_style(RGBColor(235, 235, 235))
        .draw()
        .map_err(out_err)?;
    let pts: Vec<(f64, f64)> = designs
        .iter()
        .map(|d| (x(d), d.annual_heat_loss_kwh))
        .collect();
    c.draw_series(LineSeries::new(pts.clone(), LINE.stroke_width(2)))
        .map_err(out_err)?;
    c.draw_series(pts.iter().map(|&p| Circle::new(p, 4, LINE.filled())))
        .map_err(out_err)?;
    c.draw_series(DashedLineSeries::new(
        vec![(x0, base), (x1, base)],
        8,
        5,
        GREY.stroke_width(2),
    ))
    .map_err(out_err)?
    .label(format!("without the varied insulation: {base:.0} {eu}/yr"))
    .legend(|(x, y)| PathElement::new(vec![(x, y), (x + 18, y)], GREY.stroke_width(2)));
    if let Some(ch) = chosen {
        c.draw_series(std::iter::once(Circle::new(
            (x(ch), ch.annual_heat_loss_kwh),
            8,
            CHOSEN.stroke_width(3),
        )))
        .map_err(out_err)?;
    }
    legend(&mut c, SeriesLabelPosition::UpperRight)?;
    root.present().map_err(out_err)
}

/// Draw `sizing_tradeoff.png/svg` into `dir` in `units` when the sizing evaluated designs (not
/// when no insulation was needed).
pub fn render(
    dir: &Target,
    f: &SizingFile,
    units: crate::files::us::Units,
    files: &mut Vec<PathBuf>,
) -> Result<bool> {
    if f.no_insulation_needed.is_some() || f.dimensions.is_empty() || shown(f).is_empty() {
        return Ok(false);
    }
    let (g, labels) = match units {
        crate::files::us::Units::Si => (f.clone(), ("m", "kWh")),
        crate::files::us::Units::Us => (in_us(f), ("ft", "kBtu")),
    };
    render_both!(dir, "sizing_tradeoff", SIZE, files, draw(&g, labels));
    Ok(true)
}
