//! Frost-protection sizing: the least insulation (one or two varied dimensions) that keeps frost
//! above the footing base with a stated margin, by repeated model runs.
//!
//! Search: for each value of the first dimension (in parallel), bisection over the candidate
//! values of the second for the least value whose run meets the margin. Bisection relies on
//! monotonicity (more insulation never lets frost go deeper); every evaluated point is checked
//! against it and a violation is an error, not a silent result. With one dimension, bisection over
//! it alone. The cost of a design is a weighted insulation volume plus excavation per metre of
//! exposed perimeter.
use crate::case::{Case, Dimension, InsulationKind, Vary};
use crate::error::{Error, Location, Result};
use crate::simulate;
use rayon::prelude::*;
use std::sync::atomic::{AtomicUsize, Ordering};

/// Tolerance of the monotonicity check on the frost margin, m (numerical noise of the frost line
/// between runs on different meshes).
pub const MONOTONE_TOL_M: f64 = 0.01;

/// One evaluated design.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Design {
    /// Values of the varied dimensions, m.
    pub values: Vec<f64>,
    /// Frost margin (footing base − frost under the footing), m; NaN if the run failed.
    pub frost_margin_m: f64,
    /// Deepest frost under the footing, m.
    pub frost_depth_under_footing_m: f64,
    /// Annual ground heat loss of the whole building, kWh.
    pub annual_heat_loss_kwh: f64,
    /// Change against the foundation without the varied insulation, kWh.
    pub heat_loss_change_kwh: f64,
    /// Cost weight per metre of exposed perimeter.
    pub cost_per_m: f64,
    /// Meets the margin.
    pub feasible: bool,
    /// Why it could not be evaluated, if so.
    pub note: Option<String>,
}

/// Everything a sizing produces.
#[derive(Debug, Clone, serde::Serialize)]
pub struct SizingResult {
    /// Required margin, m.
    pub margin_m: f64,
    /// What the margin means.
    pub margin_meaning: String,
    /// Varied dimensions.
    pub vary: Vec<Vary>,
    /// The foundation without the varied insulation.
    pub baseline: Design,
    /// Set when the baseline already meets the margin.
    pub no_insulation_needed: Option<String>,
    /// Every evaluated design.
    pub designs: Vec<Design>,
    /// The least feasible second-dimension value for each first-dimension value.
    pub tradeoff: Vec<Design>,
    /// The least-cost feasible design.
    pub chosen: Option<Design>,
    /// Model runs.
    pub runs: usize,
    /// Median wall time per run, s.
    pub median_run_s: f64,
    /// Total wall time, s.
    pub wall_time_s: f64,
}

/// The case with the varied dimensions set to `values` (and wings starting at the outer face of
/// any outside vertical insulation).
pub fn apply(case: &Case, vary: &[Vary], values: &[f64]) -> Case {
    let mut c = case.clone();
    for (v, &x) in vary.iter().zip(values) {
        match (v.insulation, v.dimension) {
            (None, _) | (_, Dimension::FootingBaseDepthM) => c.footing.base_depth_m = x,
            (Some(k), dim) => {
                let ins = &mut c.insulation[k];
                match (dim, &mut ins.kind) {
                    (Dimension::ThicknessM, _) => ins.thickness_m = x,
                    (Dimension::WidthM, InsulationKind::Wing { width_m, .. }) => *width_m = x,
                    (Dimension::DepthM, InsulationKind::Wing { depth_m, .. }) => *depth_m = x,
                    (Dimension::BottomDepthM, InsulationKind::VerticalOutside { bottom_m, .. })
                    | (Dimension::BottomDepthM, InsulationKind::VerticalInside { bottom_m, .. }) => {
                        *bottom_m = x
                    }
                    (Dimension::BandWidthM, InsulationKind::UnderSlab { band_width_m }) => {
                        *band_width_m = Some(x)
                    }
                    _ => {}
                }
            }
        }
    }
    let t_out = c
        .insulation
        .iter()
        .filter(|i| matches!(i.kind, InsulationKind::VerticalOutside { .. }))
        .map(|i| i.thickness_m)
        .fold(0.0, f64::max);
    for ins in &mut c.insulation {
        if let InsulationKind::Wing { x_start_m, .. } = &mut ins.kind {
            *x_start_m = t_out;
        }
    }
    c
}

/// Cost weight per metre of exposed perimeter: insulation volume × weight by material, plus
/// excavation for the footing (base depth × width) and for each wing (to its underside × width).
pub fn cost_per_m(case: &Case) -> f64 {
    let Some(s) = &case.sizing else { return 0.0 };
    let mut cost = 0.0;
    let mut dig = case.footing.base_depth_m * case.footing.width_m;
    for ins in &case.insulation {
        let len = match ins.kind {
            InsulationKind::UnderSlab { band_width_m } => {
                band_width_m.unwrap_or(0.5 * case.building.b_prime_m)
            }
            InsulationKind::VerticalOutside { top_m, bottom_m }
            | InsulationKind::VerticalInside { top_m, bottom_m } => bottom_m - top_m,
            InsulationKind::Wing {
                depth_m,
                x_start_m,
                width_m,
            } => {
                dig += (depth_m + ins.thickness_m) * (width_m - x_start_m).max(0.0);
                width_m - x_start_m
            }
        };
        let weight = s
            .cost_per_m3
            .get(&ins.material.name)
            .copied()
            .unwrap_or(250.0);
        cost += ins.thickness_m * len.max(0.0) * weight;
    }
    cost + dig * s.excavation_cost_per_m3
}

fn err(case: &Case, message: String) -> Error {
    Error::Input {
        location: Location::file_only(&case.file),
        key: "sizing".into(),
        message,
    }
}

/// Size the case's `[sizing]` dimensions. `progress` is called after every run with the count.
pub fn size(case: &Case, progress: &(dyn Fn(usize) + Sync)) -> Result<SizingResult> {
    let start = std::time::Instant::now();
    let s = case
        .sizing
        .as_ref()
        .ok_or_else(|| err(case, "the case has no [sizing] table".into()))?;
    let runs = AtomicUsize::new(0);
    let times = std::sync::Mutex::new(Vec::new());
    let run_one = |c: &Case| -> Result<(f64, f64, f64)> {
        let t0 = std::time::Instant::now();
        let r = simulate::run(c, &mut |_| {})?;
        let h = crate::report::headline(c, &r);
        if let Ok(mut t) = times.lock() {
            t.push(t0.elapsed().as_secs_f64());
        }
        progress(runs.fetch_add(1, Ordering::SeqCst) + 1);
        Ok((
            h.frost_margin_m,
            h.frost_depth_under_footing_m,
            h.annual_heat_loss_kwh,
        ))
    };
    // Baseline: the varied insulation pieces removed (the footing as given).
    let mut base_case = case.clone();
    let varied: Vec<usize> = s.vary.iter().filter_map(|v| v.insulation).collect();
    base_case.insulation = case
        .insulation
        .iter()
        .enumerate()
        .filter(|(k, _)| !varied.contains(k))
        .map(|(_, i)| i.clone())
        .collect();
    base_case.sizing = None;
    let (bm, bf, bq) = run_one(&base_case)?;
    let baseline = Design {
        values: Vec::new(),
        frost_margin_m: bm,
        frost_depth_under_footing_m: bf,
        annual_heat_loss_kwh: bq,
        heat_loss_change_kwh: 0.0,
        cost_per_m: 0.0,
        feasible: bm >= s.margin_m,
        note: Some("the foundation without the varied insulation".into()),
    };
    let evaluate = |values: Vec<f64>| -> Result<Design> {
        let c = apply(case, &s.vary, &values);
        if let Err(e) = crate::geometry::Section::from_case(&c) {
            return Ok(Design {
                values,
                frost_margin_m: f64::NAN,
                frost_depth_under_footing_m: f64::NAN,
                annual_heat_loss_kwh: f64::NAN,
                heat_loss_change_kwh: f64::NAN,
                cost_per_m: f64::NAN,
                feasible: false,
                note: Some(format!("not buildable: {e}")),
            });
        }
        let (m, f, q) = run_one(&c)?;
        Ok(Design {
            values,
            frost_margin_m: m,
            frost_depth_under_footing_m: f,
            annual_heat_loss_kwh: q,
            heat_loss_change_kwh: q - bq,
            cost_per_m: cost_per_m(&c),
            feasible: m >= s.margin_m,
            note: None,
        })
    };
    if baseline.feasible {
        return Ok(SizingResult {
            margin_m: s.margin_m,
            margin_meaning: margin_meaning(s.margin_m),
            vary: s.vary.clone(),
            no_insulation_needed: Some(format!(
                "without the varied insulation, frost under the footing reaches {bf:.2} m, leaving a margin of {bm:.2} m to the footing base (≥ {:.2} m required)",
                s.margin_m
            )),
            baseline,
            designs: Vec::new(),
            tradeoff: Vec::new(),
            chosen: None,
            runs: runs.load(Ordering::SeqCst),
            median_run_s: median(&times.lock().map(|t| t.clone()).unwrap_or_default()),
            wall_time_s: start.elapsed().as_secs_f64(),
        });
    }
    // Outer values (first dimension, or a single dummy) and the bisected dimension.
    let (outer, inner): (Vec<Option<f64>>, &Vary) = if s.vary.len() == 2 {
        (
            s.vary[0].values().into_iter().map(Some).collect(),
            &s.vary[1],
        )
    } else {
        (vec![None], &s.vary[0])
    };
    let iv = inner.values();
    let per_outer: Vec<Result<(Vec<Design>, Option<Design>)>> = outer
        .par_iter()
        .map(|&a| -> Result<(Vec<Design>, Option<Design>)> {
            let vals = |i: usize| match a {
                Some(a) => vec![a, iv[i]],
                None => vec![iv[i]],
            };
            let mut seen = Vec::new();
            let top = evaluate(vals(iv.len() - 1))?;
            seen.push((iv.len() - 1, top.clone()));
            let mut best = None;
            if top.feasible {
                let low = evaluate(vals(0))?;
                seen.push((0, low.clone()));
                if low.feasible {
                    best = Some(low);
                } else {
                    let (mut lo, mut hi) = (0usize, iv.len() - 1);
                    let mut hi_d = top;
                    while hi - lo > 1 {
                        let mid = (lo + hi) / 2;
                        let d = evaluate(vals(mid))?;
                        seen.push((mid, d.clone()));
                        if d.feasible {
                            hi = mid;
                            hi_d = d;
                        } else {
                            lo = mid;
                        }
                    }
                    best = Some(hi_d);
                }
            }
            // Monotonicity: along the bisected dimension the margin must not fall as insulation
            // grows (depth of a wing excepted: it is not "more insulation").
            if inner.dimension != Dimension::DepthM {
                seen.sort_by_key(|x| x.0);
                let pts: Vec<&Design> = seen.iter().map(|x| &x.1).filter(|d| d.frost_margin_m.is_finite()).collect();
                for w in pts.windows(2) {
                    if w[1].frost_margin_m + MONOTONE_TOL_M < w[0].frost_margin_m {
                        return Err(err(case, format!(
                            "monotonicity violated: more insulation ({:?} → {:?}) gave a smaller frost margin ({:.3} → {:.3} m); the sizing cannot trust bisection here",
                            w[0].values, w[1].values, w[0].frost_margin_m, w[1].frost_margin_m)));
                    }
                }
            }
            Ok((seen.into_iter().map(|x| x.1).collect(), best))
        })
        .collect();
    let mut designs = Vec::new();
    let mut tradeoff = Vec::new();
    for r in per_outer {
        let (d, best) = r?;
        designs.extend(d);
        tradeoff.extend(best);
    }
    // Across the first dimension (if it adds insulation): the least second value must not grow.
    if s.vary.len() == 2 && s.vary[0].dimension != Dimension::DepthM {
        for w in tradeoff.windows(2) {
            if w[1].values[1] > w[0].values[1] + 1e-9 && w[1].values[0] > w[0].values[0] {
                return Err(err(case, format!(
                    "monotonicity violated: more of the first dimension ({:?} → {:?}) needed more of the second",
                    w[0].values, w[1].values)));
            }
        }
    }
    let chosen = tradeoff
        .iter()
        .filter(|d| d.feasible && d.cost_per_m.is_finite())
        .min_by(|a, b| a.cost_per_m.total_cmp(&b.cost_per_m))
        .cloned();
    let runs_done = runs.load(Ordering::SeqCst);
    Ok(SizingResult {
        margin_m: s.margin_m,
        margin_meaning: margin_meaning(s.margin_m),
        vary: s.vary.clone(),
        baseline,
        no_insulation_needed: None,
        designs,
        tradeoff,
        chosen,
        runs: runs_done,
        median_run_s: median(&times.lock().map(|t| t.clone()).unwrap_or_default()),
        wall_time_s: start.elapsed().as_secs_f64(),
    })
}

fn margin_meaning(m: f64) -> String {
    format!(
        "frost_margin_m = footing base depth − deepest frost under the footing (the half-frozen line); a design passes when it is at least {m:.2} m, i.e. frost stays at least that far above the footing base"
    )
}

fn median(v: &[f64]) -> f64 {
    if v.is_empty() {
        return 0.0;
    }
    let mut s = v.to_vec();
    s.sort_by(f64::total_cmp);
    s[s.len() / 2]
}

/// The simplified published guidance for frost-protected shallow footings of heated buildings
/// (ASCE/SEI 32-01 Table 4 = IRC Table R403.3(1), as printed in the HUD 2004 builder's guide):
/// rows of (air freezing index °F·d, R_v, R_H walls, R_H corners, A in, B in, C in), R in
/// h·ft²·°F/Btu. The rows at ≤ 1500 and 4000 °F·d were seen in a public copy; the others are
/// from memory of the table and must be verified before use.
pub const FPSF_TABLE: &[(f64, f64, f64, f64, f64, f64, f64)] = &[
    (1500.0, 4.5, 0.0, 0.0, 0.0, 0.0, 0.0),
    (2000.0, 5.6, 0.0, 0.0, 0.0, 0.0, 0.0),
    (2500.0, 6.7, 1.7, 4.9, 12.0, 24.0, 40.0),
    (3000.0, 7.8, 6.5, 8.6, 12.0, 24.0, 40.0),
    (3500.0, 9.0, 8.0, 11.2, 24.0, 30.0, 60.0),
    (4000.0, 10.1, 10.5, 13.1, 24.0, 36.0, 60.0),
];

/// The guidance for an air freezing index (°C·d): the first table row at or above it, in SI
/// (R m²·K/W, widths m), or None beyond the table.
pub fn fpsf_guidance(fi_c_days: f64) -> Option<serde_json::Value> {
    let afi_f = 1.8 * fi_c_days;
    let row = FPSF_TABLE.iter().find(|r| afi_f <= r.0)?;
    let r_si = 0.17611;
    let inch = 0.0254;
    Some(serde_json::json!({
        "air_freezing_index_f_days": afi_f,
        "table_row_f_days": row.0,
        "vertical_r_m2k_per_w": row.1 * r_si,
        "horizontal_r_walls_m2k_per_w": row.2 * r_si,
        "horizontal_r_corners_m2k_per_w": row.3 * r_si,
        "horizontal_width_walls_m": row.4 * inch,
        "horizontal_width_corners_m": row.5 * inch,
        "corner_extension_m": row.6 * inch,
        "xps_thickness_walls_m": row.2 * r_si * 0.032,
        "xps_thickness_vertical_m": row.1 * r_si * 0.032,
        "source": "ASCE/SEI 32-01 Table 4 / IRC Table R403.3(1) (heated buildings); rows at ≤1500 and 4000 °F·d seen in a public copy, the others from memory: verify against the printed table",
    }))
}

/// A conservative corner requirement for a wing design (thickness m, outward width m): thickness
/// × 1.3 and width × 1.5 over 1.5 m from each outside corner along both walls. Rule of thumb
/// from the corner/wall ratios of the simplified FPSF table (R_H corners/walls ≈ 1.25–1.3 at
/// 3000–4000 °F·d, B/A = 1.5, C = 60 in), common practice; the 2D model does not compute corners.
pub fn corner_rule(thickness_m: f64, width_m: f64) -> serde_json::Value {
    serde_json::json!({
        "thickness_m": thickness_m * 1.3,
        "width_m": width_m * 1.5,
        "extent_from_corner_m": 1.5,
        "rule": "corner wing: thickness × 1.3, width × 1.5, over 1.5 m from each outside corner along both walls",
        "basis": "common practice, from the corner-to-wall ratios of the ASCE 32-01 / IRC simplified table (values from memory: verify); NOT computed by the 2D model, which cannot resolve corners",
    })
}
