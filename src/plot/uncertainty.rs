//! The plots of `frostline uncertainty`: `uncertainty_margin.png/svg` (the frost margin's
//! histogram over the samples and its empirical distribution function, the protected zone's edge
//! at 0 marked) and `uncertainty_tornado.png/svg` (each input's rank correlation with the frost
//! margin and with the annual heat loss, largest first).
use super::charts::{legend, SIZE};
use super::{out_err, register_fonts, Target};
use crate::error::Result;
use crate::files::uncertainty::UncertaintyFile;
use crate::uncertainty::SampleResult;
use plotters::coord::Shift;
use plotters::prelude::*;
use std::path::{Path, PathBuf};

const BAR: RGBColor = RGBColor(33, 74, 160);
const HEAT: RGBColor = RGBColor(196, 110, 40);
const ZONE: RGBColor = RGBColor(196, 40, 40);

/// Histogram (top) and empirical distribution function (bottom) of the frost margin.
fn draw_margin<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    f: &UncertaintyFile,
    margins: &[f64],
) -> Result<()> {
    root.fill(&WHITE).map_err(out_err)?;
    let st = &f.stats;
    let root = root
        .titled(
            &format!(
                "{} — frost margin over {} samples; P(frost in the zone) = {:.3} (95 %: {:.3}–{:.3})",
                f.case_name,
                st.samples_run,
                st.p_frost_in_zone.unwrap_or(f64::NAN),
                st.p_frost_in_zone_95ci[0],
                st.p_frost_in_zone_95ci[1]
            ),
            ("sans-serif", 16),
        )
        .map_err(out_err)?;
    let (top, bottom) = root.split_vertically(SIZE.1 * 50 / 100);
    let (lo, hi) = margins
        .iter()
        .fold((0.0f64, 0.0f64), |(a, b), &x| (a.min(x), b.max(x)));
    let per = super::field::per_metre(f.units);
    let pad = 0.05 * (hi - lo).max(0.02 * per);
    let (x0, x1) = (lo - pad, hi + pad);
    // Bins: about √n, at least 5, at most 40, over [lo, hi].
    let bins = ((margins.len() as f64).sqrt().round() as usize).clamp(5, 40);
    let w = ((hi - lo) / bins as f64).max(1e-6 * per);
    let mut counts = vec![0usize; bins];
    for &m in margins {
        let k = (((m - lo) / w) as usize).min(bins - 1);
        counts[k] += 1;
    }
    let cmax = counts.iter().copied().max().unwrap_or(1).max(1);
    let mut c = ChartBuilder::on(&top)
        .margin(12)
        .x_label_area_size(30)
        .y_label_area_size(60)
        .build_cartesian_2d(x0..x1, 0.0..cmax as f64 * 1.1)
        .map_err(out_err)?;
    c.configure_mesh()
        .y_desc("samples")
        .y_labels((cmax + 1).min(11))
        .y_label_formatter(&|v: &f64| format!("{v:.0}"))
        .label_style(("sans-serif", 13))
        .light_line_style(RGBColor(235, 235, 235))
        .draw()
        .map_err(out_err)?;
    c.draw_series(counts.iter().enumerate().map(|(k, &n)| {
        let a = lo + k as f64 * w;
        Rectangle::new([(a, 0.0), (a + w, n as f64)], BAR.mix(0.6).filled())
    }))
    .map_err(out_err)?;
    // White edges, so that neighbouring bars of one height read as two bins.
    c.draw_series(
        counts
            .iter()
            .enumerate()
            .filter(|(_, &n)| n > 0)
            .map(|(k, &n)| {
                let a = lo + k as f64 * w;
                Rectangle::new([(a, 0.0), (a + w, n as f64)], WHITE.stroke_width(1))
            }),
    )
    .map_err(out_err)?;
    c.draw_series(std::iter::once(PathElement::new(
        vec![(0.0, 0.0), (0.0, cmax as f64 * 1.1)],
        ZONE.stroke_width(2),
    )))
    .map_err(out_err)?
    .label("margin 0: frost reaches the protected zone")
    .legend(|(x, y)| PathElement::new(vec![(x, y), (x + 18, y)], ZONE.stroke_width(2)));
    legend(&mut c, SeriesLabelPosition::UpperRight)?;
    let mut sorted = margins.to_vec();
    sorted.sort_by(f64::total_cmp);
    let n = sorted.len().max(1) as f64;
    let mut e = ChartBuilder::on(&bottom)
        .margin(12)
        .x_label_area_size(40)
        .y_label_area_size(60)
        .build_cartesian_2d(x0..x1, 0.0..1.0)
        .map_err(out_err)?;
    e.configure_mesh()
        .x_desc(format!(
            "frost margin to the protected zone ({})",
            super::field::length_label(f.units)
        ))
        .y_desc("fraction of samples ≤ margin")
        .label_style(("sans-serif", 13))
        .light_line_style(RGBColor(235, 235, 235))
        .draw()
        .map_err(out_err)?;
    // The empirical distribution function as a step line.
    let mut pts = vec![(x0, 0.0)];
    for (k, &m) in sorted.iter().enumerate() {
        pts.push((m, k as f64 / n));
        pts.push((m, (k + 1) as f64 / n));
    }
    pts.push((x1, 1.0));
    e.draw_series(std::iter::once(PathElement::new(pts, BAR.stroke_width(2))))
        .map_err(out_err)?;
    e.draw_series(std::iter::once(PathElement::new(
        vec![(0.0, 0.0), (0.0, 1.0)],
        ZONE.stroke_width(2),
    )))
    .map_err(out_err)?;
    root.present().map_err(out_err)
}

/// Tornado: rank correlation of each input with the margin and with the heat loss.
fn draw_tornado<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    f: &UncertaintyFile,
) -> Result<()> {
    root.fill(&WHITE).map_err(out_err)?;
    let s = &f.stats.sensitivity;
    let n = s.len().max(1);
    let mut c = ChartBuilder::on(root)
        .caption(
            format!(
                "{} — which input drives the result (Spearman rank correlation)",
                f.case_name
            ),
            ("sans-serif", 16),
        )
        .margin(15)
        .x_label_area_size(40)
        .y_label_area_size(230)
        .build_cartesian_2d(-1.0..1.0, 0.0..n as f64)
        .map_err(out_err)?;
    let label = |y: &f64| {
        let k = y.floor() as usize;
        if (y - y.floor() - 0.5).abs() < 1e-6 && k < n {
            s[n - 1 - k].label()
        } else {
            String::new()
        }
    };
    c.configure_mesh()
        .disable_y_mesh()
        .y_labels(2 * n + 1)
        .y_label_formatter(&label)
        .x_desc("rank correlation with the result (−1 … +1)")
        .label_style(("sans-serif", 13))
        .light_line_style(RGBColor(235, 235, 235))
        .draw()
        .map_err(out_err)?;
    // Largest |correlation with the margin| at the top.
    for (r, v) in s.iter().enumerate() {
        let y = (n - 1 - r) as f64;
        if let Some(m) = v.rank_correlation_margin {
            c.draw_series(std::iter::once(Rectangle::new(
                [(0.0, y + 0.52), (m, y + 0.88)],
                BAR.filled(),
            )))
            .map_err(out_err)?;
        }
        if let Some(h) = v.rank_correlation_heat_loss {
            c.draw_series(std::iter::once(Rectangle::new(
                [(0.0, y + 0.12), (h, y + 0.48)],
                HEAT.filled(),
            )))
            .map_err(out_err)?;
        }
    }
    c.draw_series(std::iter::once(PathElement::new(
        vec![(0.0, 0.0), (0.0, n as f64)],
        BLACK.stroke_width(1),
    )))
    .map_err(out_err)?;
    c.draw_series(std::iter::empty::<Rectangle<(f64, f64)>>())
        .map_err(out_err)?
        .label("with the frost margin")
        .legend(|(x, y)| Rectangle::new([(x, y - 5), (x + 18, y + 5)], BAR.filled()));
    c.draw_series(std::iter::empty::<Rectangle<(f64, f64)>>())
        .map_err(out_err)?
        .label("with the annual heat loss")
        .legend(|(x, y)| Rectangle::new([(x, y - 5), (x + 18, y + 5)], HEAT.filled()));
    legend(&mut c, SeriesLabelPosition::LowerRight)?;
    root.present().map_err(out_err)
}

/// Draw both plots into `dir`; returns the files written.
pub fn uncertainty_plots(
    dir: &Path,
    f: &UncertaintyFile,
    samples: &[SampleResult],
) -> Result<Vec<PathBuf>> {
    register_fonts();
    let target = Target { dir, scale: 1.0 };
    let mut files = Vec::new();
    // In the report's units: metres or feet.
    let per = super::field::per_metre(f.units);
    let margins: Vec<f64> = samples
        .iter()
        .filter(|s| s.error.is_none())
        .map(|s| s.frost_margin_m * per)
        .filter(|m| m.is_finite())
        .collect();
    if margins.is_empty() {
        return Ok(files);
    }
    render_both!(
        &target,
        "uncertainty_margin",
        SIZE,
        files,
        draw_margin(f, &margins)
    );
    let h = (120 + 70 * f.stats.sensitivity.len() as u32).max(300);
    render_both!(
        &target,
        "uncertainty_tornado",
        (SIZE.0, h),
        files,
        draw_tornado(f)
    );
    Ok(files)
}
