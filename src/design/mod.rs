//! Frost-protection sizing: the least insulation (one or two varied dimensions) that keeps frost
//! above the footing base with a stated margin, by repeated model runs.
//!
//! Search: for each value of the first dimension (in parallel), bisection over the candidate
//! values of the second for the least value whose run meets the margin. Bisection relies on
//! monotonicity (more insulation never lets frost go deeper); every evaluated point is checked
//! against it and a violation is an error, not a silent result. With one dimension, bisection over
//! it alone. The cost of a design is a weighted insulation volume plus excavation per metre of
//! exposed perimeter.
//!
//! A design is the case file's text with the varied values written in (and `[sizing]` removed),
//! validated like any case file: what is evaluated, what is written to `chosen_case.toml` and
//! what is re-run are the same text.
pub mod corner;

use crate::case::{parse_case, Case, Dimension, InsulationKind, Sizing, Vary};
use crate::error::{Error, InputKind, Result};
use crate::numerics::first_passing;
use crate::run::{self, RunResult};
use rayon::prelude::*;
use std::sync::atomic::{AtomicUsize, Ordering};

/// The caution every sizing output carries.
pub const SIZING_CAUTION: &str = "This sizing is an estimate for a homogeneous soil and the stated climate from a 2D model \
(and a 3D model where the corners were checked). Drainage, frost-susceptible fill, snow clearing over the insulation, moisture \
in the insulation and construction quality all matter; corners need more protection than a 2D section shows. Local codes and a \
licensed engineer govern the design.";

/// Tolerance of the monotonicity check on the frost margin, m (numerical noise of the frost line
/// between runs on different meshes).
pub const MONOTONE_TOL_M: f64 = 0.01;

/// One evaluated design.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Design {
    /// Values of the varied dimensions, m.
    pub values: Vec<f64>,
    /// Frost margin to the protected zone, m; NaN if the design could not be built.
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
#[derive(Debug)]
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
    /// The chosen design's case (its source is `chosen_case.toml`: see [`chosen_text`]) and its
    /// full run.
    pub chosen_run: Option<(Case, RunResult)>,
    /// The 3D corner check of the chosen design (`[sizing.corner]`), if asked for and there is a
    /// design to check.
    pub corner: Option<corner::CornerSizing>,
    /// Model runs (the chosen design's re-run excluded).
    pub runs: usize,
    /// Median wall time per run, s.
    pub median_run_s: f64,
    /// Total wall time, s.
    pub wall_time_s: f64,
}

/// The TOML key of a dimension (under its `[[insulation]]` piece, or `base_depth_m` under
/// `[footing]`).
pub fn toml_key(d: Dimension) -> &'static str {
    match d {
        Dimension::ThicknessM => "thickness_m",
        Dimension::WidthM => "width_m",
        Dimension::DepthM => "depth_m",
        Dimension::BottomDepthM => "bottom_depth_m",
        Dimension::BandWidthM => "band_width_m",
        Dimension::PastOuterEdgeM => "past_outer_edge_m",
        Dimension::FootingBaseDepthM => "base_depth_m",
    }
}

/// The name of a varied dimension in messages and headers, by the piece's kind as the case file
/// names it: `wing.width_m`, or `wing (insulation[2]).width_m` when the case has more than one
/// piece of that kind; `footing.base_depth_m`.
pub fn dimension_label(case: &Case, v: &Vary) -> String {
    let kind = |k: &InsulationKind| match k {
        InsulationKind::UnderSlab { .. } => "under_slab",
        InsulationKind::VerticalOutside { .. } => "vertical_outside",
        InsulationKind::VerticalInside { .. } => "vertical_inside",
        InsulationKind::Wing { .. } => "wing",
        InsulationKind::UnderFooting { .. } => "under_footing",
    };
    match v.insulation {
        Some(i) => {
            let name = case
                .insulation
                .get(i)
                .map_or("insulation", |p| kind(&p.kind));
            let same = case
                .insulation
                .iter()
                .filter(|p| kind(&p.kind) == name)
                .count();
            if same == 1 {
                format!("{name}.{}", toml_key(v.dimension))
            } else {
                format!("{name} (insulation[{i}]).{}", toml_key(v.dimension))
            }
        }
        None => "footing.base_depth_m".into(),
    }
}

fn output_err(e: impl std::fmt::Display) -> Error {
    Error::Output(e.to_string())
}

/// Set SI key `key` of `table` to `x`, removing the other ways the same quantity may be given
/// (the key in a US unit, `thickness_in`; a board's R-value for its thickness; a wing's board
/// width for its outer end), so the edited case gives it once.
pub fn set_quantity(table: &mut toml::Table, key: &str, x: toml::Value) {
    let alternative = match key {
        "thickness_m" => Some("thermal_resistance_m2k_per_w"),
        "width_m" => Some("board_width_m"),
        _ => None,
    };
    let same = |k: &str| {
        let si = crate::case::units::us_key(k).map_or(k.to_string(), |(_, s)| s);
        si == key || Some(si.as_str()) == alternative
    };
    table.retain(|k, _| !same(k));
    table.insert(key.into(), x);
}

/// The case text with the varied dimensions set to `values` and `[sizing]` removed.
pub fn design_text(case: &Case, vary: &[Vary], values: &[f64]) -> Result<String> {
    let mut t: toml::Table = toml::from_str(&case.source).map_err(output_err)?;
    for (v, &x) in vary.iter().zip(values) {
        let x = toml::Value::Float((x * 1e6).round() / 1e6);
        let table = match v.insulation {
            None => t.get_mut("footing").and_then(|f| f.as_table_mut()),
            Some(k) => t
                .get_mut("insulation")
                .and_then(|a| a.as_array_mut())
                .and_then(|a| a.get_mut(k))
                .and_then(|p| p.as_table_mut()),
        };
        if let Some(table) = table {
            set_quantity(table, toml_key(v.dimension), x);
        }
    }
    t.remove("sizing");
    toml::to_string(&t).map_err(output_err)
}

/// The chosen design as a case file of its own: the design's text with relative paths made
/// absolute (so the file runs from anywhere), the name marked "(sized)" and a header naming the
/// case it came from.
pub fn chosen_text(case: &Case, vary: &[Vary], values: &[f64]) -> Result<String> {
    let mut t: toml::Table =
        toml::from_str(&design_text(case, vary, values)?).map_err(output_err)?;
    let base = std::path::Path::new(&case.file)
        .parent()
        .map(|p| p.to_path_buf())
        .unwrap_or_default();
    let abs = |v: &mut toml::Value| {
        if let Some(p) = v.as_str() {
            let pb = std::path::Path::new(p);
            if pb.is_relative() {
                let full = base.join(pb);
                *v = toml::Value::String(full.canonicalize().unwrap_or(full).display().to_string());
            }
        }
    };
    if let Some(c) = t.get_mut("climate").and_then(|c| c.as_table_mut()) {
        for k in ["series", "design_from_series"] {
            if let Some(v) = c.get_mut(k) {
                abs(v);
            }
        }
    }
    if let Some(a) = t.get_mut("soil").and_then(|a| a.as_array_mut()) {
        for st in a.iter_mut().filter_map(|s| s.as_table_mut()) {
            if let Some(v) = st.get_mut("soil_file") {
                abs(v);
            }
        }
    }
    if let Some(n) = t.get_mut("name") {
        *n = toml::Value::String(format!("{} (sized)", n.as_str().unwrap_or("case")));
    }
    let body = toml::to_string(&t).map_err(output_err)?;
    Ok(format!("{}{body}", chosen_header(case)))
}

/// The comment lines at the top of `chosen_case.toml`.
fn chosen_header(case: &Case) -> String {
    format!(
        "# Chosen design of `frostline size` for {}; run it with `frostline run`.\n# {SIZING_CAUTION}\n",
        case.file
    )
}

/// The case with the varied dimensions set to `values`, validated as a case file (an input error
/// when the design cannot be built, e.g. insulation running into the footing).
pub fn apply(case: &Case, vary: &[Vary], values: &[f64]) -> Result<Case> {
    parse_case(&case.file, &design_text(case, vary, values)?)
}

/// The case without the varied insulation pieces (and without `[sizing]`).
pub fn baseline(case: &Case, sizing: &Sizing) -> Result<Case> {
    let mut t: toml::Table = toml::from_str(&case.source).map_err(output_err)?;
    let varied: Vec<usize> = sizing.vary.iter().filter_map(|v| v.insulation).collect();
    if let Some(a) = t.get_mut("insulation").and_then(|a| a.as_array_mut()) {
        let kept: Vec<toml::Value> = std::mem::take(a)
            .into_iter()
            .enumerate()
            .filter(|(k, _)| !varied.contains(k))
            .map(|(_, p)| p)
            .collect();
        *a = kept;
    }
    t.remove("sizing");
    parse_case(&case.file, &toml::to_string(&t).map_err(output_err)?)
}

/// Cost weight per metre of exposed perimeter: insulation volume × weight by material, plus
/// excavation for the footing (base depth × width) and for each wing (to its underside × width).
pub fn cost_per_m(case: &Case, s: &Sizing) -> f64 {
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
            // The trench deepened by the board over its width (beyond the footing's, full depth).
            InsulationKind::UnderFooting { x0_m, x1_m } => {
                dig += (case.footing.base_depth_m + ins.thickness_m) * (x1_m - x0_m)
                    - case.footing.base_depth_m * case.footing.width_m;
                x1_m - x0_m
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

/// Runs of one sizing: counts and times them, reports progress.
struct Runner<'a> {
    runs: AtomicUsize,
    times: std::sync::Mutex<Vec<f64>>,
    progress: &'a (dyn Fn(usize) + Sync),
}

impl Runner<'_> {
    /// (frost margin m, frost under the footing m, annual heat loss kWh) of a case.
    fn run(&self, c: &Case) -> Result<(f64, f64, f64)> {
        let t0 = std::time::Instant::now();
        let r = run::run(c, &mut |_| {})?;
        let h = run::headline(c, &r);
        if let Ok(mut t) = self.times.lock() {
            t.push(t0.elapsed().as_secs_f64());
        }
        (self.progress)(self.runs.fetch_add(1, Ordering::SeqCst) + 1);
        Ok((
            h.frost_margin_m,
            h.frost_depth_under_footing_m,
            h.annual_heat_loss_kwh,
        ))
    }

    fn median_s(&self) -> f64 {
        let mut s = self.times.lock().map(|t| t.clone()).unwrap_or_default();
        s.sort_by(f64::total_cmp);
        s.get(s.len() / 2).copied().unwrap_or(0.0)
    }
}

/// The sizing's fixed data: the case, its `[sizing]`, the baseline heat loss.
struct Search<'a> {
    case: &'a Case,
    s: &'a Sizing,
    base_kwh: f64,
    runner: Runner<'a>,
}

impl Search<'_> {
    /// Evaluate one design; a design that cannot be built is recorded as such, not an error.
    fn evaluate(&self, values: Vec<f64>) -> Result<Design> {
        let c = match apply(self.case, &self.s.vary, &values) {
            Ok(c) => c,
            Err(e) if e.is_input() => {
                return Ok(Design {
                    values,
                    frost_margin_m: f64::NAN,
                    frost_depth_under_footing_m: f64::NAN,
                    annual_heat_loss_kwh: f64::NAN,
                    heat_loss_change_kwh: f64::NAN,
                    cost_per_m: f64::NAN,
                    feasible: false,
                    note: Some(format!("not buildable: {e}")),
                })
            }
            Err(e) => return Err(e),
        };
        let (m, f, q) = self.runner.run(&c)?;
        Ok(Design {
            values,
            frost_margin_m: m,
            frost_depth_under_footing_m: f,
            annual_heat_loss_kwh: q,
            heat_loss_change_kwh: q - self.base_kwh,
            cost_per_m: cost_per_m(&c, self.s),
            feasible: m >= self.s.margin_m,
            note: None,
        })
    }

    /// The least feasible value of the bisected dimension for one value of the first: every
    /// design evaluated, and the least feasible (None if even the largest fails).
    fn least(&self, outer: Option<f64>, inner: &Vary) -> Result<(Vec<Design>, Option<Design>)> {
        let iv = inner.values();
        let vals = |i: usize| match outer {
            Some(a) => vec![a, iv[i]],
            None => vec![iv[i]],
        };
        let mut seen = vec![(iv.len() - 1, self.evaluate(vals(iv.len() - 1))?)];
        if seen[0].1.feasible {
            let low = self.evaluate(vals(0))?;
            let low_ok = low.feasible;
            seen.push((0, low));
            if !low_ok {
                first_passing(0, iv.len() - 1, |mid| {
                    let d = self.evaluate(vals(mid))?;
                    let ok = d.feasible;
                    seen.push((mid, d));
                    Ok::<_, Error>(ok)
                })?;
            }
        }
        seen.sort_by_key(|x| x.0);
        let best = seen.iter().map(|x| &x.1).find(|d| d.feasible).cloned();
        // Monotonicity: along the bisected dimension the margin must not fall as insulation grows
        // (depth of a wing excepted: it is not "more insulation").
        if inner.dimension != Dimension::DepthM {
            let pts: Vec<&Design> = seen
                .iter()
                .map(|x| &x.1)
                .filter(|d| d.frost_margin_m.is_finite())
                .collect();
            for w in pts.windows(2) {
                if w[1].frost_margin_m + MONOTONE_TOL_M < w[0].frost_margin_m {
                    return Err(Error::Method(format!(
                        "sizing: monotonicity violated: more insulation ({:?} → {:?}) gave a smaller frost margin ({:.3} → {:.3} m); the sizing cannot trust bisection here",
                        w[0].values, w[1].values, w[0].frost_margin_m, w[1].frost_margin_m)));
                }
            }
        }
        Ok((seen.into_iter().map(|x| x.1).collect(), best))
    }
}

/// Size the case's `[sizing]` dimensions and re-run the chosen design. `progress` is called after
/// every run with the count.
pub fn size(case: &Case, progress: &(dyn Fn(usize) + Sync)) -> Result<SizingResult> {
    let start = std::time::Instant::now();
    let s = case.sizing.as_ref().ok_or_else(|| {
        Error::in_file(
            &case.file,
            "sizing",
            InputKind::Missing,
            "the case has no [sizing] table",
        )
    })?;
    let runner = Runner {
        runs: AtomicUsize::new(0),
        times: std::sync::Mutex::new(Vec::new()),
        progress,
    };
    let base_case = baseline(case, s)?;
    let (bm, bf, bq) = runner.run(&base_case)?;
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
    let search = Search {
        case,
        s,
        base_kwh: bq,
        runner,
    };
    let mut out = SizingResult {
        margin_m: s.margin_m,
        margin_meaning: margin_meaning(s.margin_m),
        vary: s.vary.clone(),
        no_insulation_needed: None,
        baseline,
        designs: Vec::new(),
        tradeoff: Vec::new(),
        chosen: None,
        chosen_run: None,
        corner: None,
        runs: 0,
        median_run_s: 0.0,
        wall_time_s: 0.0,
    };
    if out.baseline.feasible {
        out.no_insulation_needed = Some(format!(
            "without the varied insulation, frost under the footing reaches {bf:.2} m, leaving a margin of {bm:.2} m to the footing base (≥ {:.2} m required)",
            s.margin_m
        ));
    } else {
        search_designs(&search, &mut out)?;
    }
    out.runs = search.runner.runs.load(Ordering::SeqCst);
    out.median_run_s = search.runner.median_s();
    if let Some(d) = &out.chosen {
        let c = parse_case(&case.file, &chosen_text(case, &s.vary, &d.values)?)?;
        let r = run::run(&c, &mut |_| {})?;
        out.chosen_run = Some((c, r));
    }
    if let Some(cv) = &s.corner {
        // The board is checked on the chosen design, or on the foundation without the varied
        // insulation when that already passes in 2D.
        let base = match (&out.chosen_run, &out.no_insulation_needed) {
            (Some((c, _)), _) => Some(c.source.clone()),
            (None, Some(_)) => Some(base_case.source.clone()),
            (None, None) => None,
        };
        if let Some(base) = base {
            let n0 = out.runs;
            out.corner = Some(corner::size_corner(
                &case.file,
                (&base, &chosen_header(case)),
                cv,
                s.margin_m,
                &|n| progress(n0 + n),
            )?);
        }
    }
    out.wall_time_s = start.elapsed().as_secs_f64();
    Ok(out)
}

/// The trade-off over the first dimension (in parallel) and the least-cost design.
fn search_designs(search: &Search, out: &mut SizingResult) -> Result<()> {
    let s = search.s;
    let (outer, inner): (Vec<Option<f64>>, &Vary) = if s.vary.len() == 2 {
        (
            s.vary[0].values().into_iter().map(Some).collect(),
            &s.vary[1],
        )
    } else {
        (vec![None], &s.vary[0])
    };
    let per_outer: Vec<Result<(Vec<Design>, Option<Design>)>> =
        outer.par_iter().map(|&a| search.least(a, inner)).collect();
    for r in per_outer {
        let (d, best) = r?;
        out.designs.extend(d);
        out.tradeoff.extend(best);
    }
    // Across the first dimension (if it adds insulation): the least second value must not grow.
    if s.vary.len() == 2 && s.vary[0].dimension != Dimension::DepthM {
        for w in out.tradeoff.windows(2) {
            if w[1].values[1] > w[0].values[1] + 1e-9 && w[1].values[0] > w[0].values[0] {
                return Err(Error::Method(format!(
                    "sizing: monotonicity violated: more of the first dimension ({:?} → {:?}) needed more of the second",
                    w[0].values, w[1].values)));
            }
        }
    }
    out.chosen = out
        .tradeoff
        .iter()
        .filter(|d| d.feasible && d.cost_per_m.is_finite())
        .min_by(|a, b| a.cost_per_m.total_cmp(&b.cost_per_m))
        .cloned();
    Ok(())
}

fn margin_meaning(m: f64) -> String {
    format!(
        "frost_margin_m = the least distance between the frozen ground (the half-frozen line) and the protected zone below the footing (the soil below the base, widening outward and down from each base corner at footing.protected_zone_angle_deg); a design passes when it is at least {m:.2} m, i.e. frost stays at least that far from the zone"
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sizing_case() -> Case {
        let src = include_str!("../../examples/kettle-hollow-sizing.toml");
        parse_case(
            concat!(
                env!("CARGO_MANIFEST_DIR"),
                "/examples/kettle-hollow-sizing.toml"
            ),
            src,
        )
        .unwrap()
    }

    /// A design is the case text with the values written in: the varied keys change, nothing
    /// else does, and `[sizing]` is gone; the baseline drops exactly the varied pieces.
    #[test]
    fn design_text_and_baseline() {
        let case = sizing_case();
        let s = case.sizing.clone().unwrap();
        let c = apply(&case, &s.vary, &[1.3, 0.075]).unwrap();
        let k = s.vary[0].insulation.unwrap();
        assert_eq!(c.insulation[k].thickness_m, 0.075);
        assert!(
            matches!(c.insulation[k].kind, InsulationKind::Wing { width_m, .. } if width_m == 1.3)
        );
        assert!(c.sizing.is_none());
        assert_eq!(c.footing, case.footing);
        let b = baseline(&case, &s).unwrap();
        assert_eq!(b.insulation.len(), case.insulation.len() - 1);
        let text = chosen_text(&case, &s.vary, &[1.3, 0.075]).unwrap();
        assert!(text.contains("(sized)") && !text.contains("[sizing]"));
    }

    /// Cost per metre by hand for the sizing example's wing at 0.7 × 0.05 m (weights: xps 250
    /// per m³, excavation 40 per m³): insulation under the slab 0.10 × B′/2 (2.5 m) = 0.25 m³,
    /// outside the wall 0.05 × 0.75 = 0.0375, the wing 0.05 × (0.70 − 0.05) = 0.0325, in all
    /// 0.32 m³ → 80.0; excavation for the footing 0.45 × 0.40 = 0.18 and the wing's trench
    /// (0.30 + 0.05) × 0.65 = 0.2275, 0.4075 m³ → 16.3; total 96.3.
    #[test]
    fn cost_by_hand() {
        let case = sizing_case();
        let s = case.sizing.clone().unwrap();
        let c = apply(&case, &s.vary, &[0.7, 0.05]).unwrap();
        assert!(
            (cost_per_m(&c, &s) - 96.3).abs() < 1e-9,
            "{}",
            cost_per_m(&c, &s)
        );
        // Named by the piece's kind (the case has one wing).
        assert_eq!(dimension_label(&case, &s.vary[0]), "wing.width_m");
    }
}
