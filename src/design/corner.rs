//! The 3D corner check of a sizing (`[sizing.corner]`): with the design the 2D sizing chose, the
//! least value of one dimension of a `[[corner]]` board (its outer end, its length along the
//! walls from the corner, or its thickness) for which the 3D model's least frost margin anywhere
//! round the building meets the same required margin as the 2D section. Outside corners lose
//! heat through two faces, so frost there goes deeper than the section shows; the least margin
//! is in practice the corner's.
//!
//! Search: bisection over the candidate values (the largest first: if it fails, no value in the
//! range does; then the smallest: if it passes, no more is needed), relying on monotonicity
//! (more board never lets frost closer), which is checked on every evaluated pair as in 2D.
use super::{output_err, MONOTONE_TOL_M};
use crate::case::{parse_case, Case, CornerVary};
use crate::error::{Error, Result};
use crate::numerics::first_passing;
use crate::run::three::{run3, Run3Result};
use crate::run::RunOptions;
use serde::{Deserialize, Serialize};

/// One evaluated corner board.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CornerDesign {
    /// Value of the varied dimension, m.
    pub value_m: f64,
    /// Least frost margin anywhere round the building over the reported period, m (None: no
    /// frost comes near the protected zone).
    pub least_margin_m: Option<f64>,
    /// The corner station's margin, m.
    pub corner_margin_m: Option<f64>,
    /// Deepest frost at the corner's footing face, m.
    pub corner_face_frost_m: f64,
    /// Margin at the middle of the long wall, m.
    pub mid_wall_margin_m: Option<f64>,
    /// Annual ground heat loss of the whole building (3D), kWh.
    pub annual_heat_loss_kwh: f64,
    /// Meets the required margin everywhere.
    pub feasible: bool,
}

/// The corner check's findings (the `corner_check` block of `sizing.json`).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CornerCheck {
    /// The varied dimension, e.g. `corner[0].width_m`.
    pub dimension: String,
    /// The range searched (min, max, step), m.
    pub range_m: [f64; 3],
    /// Required margin (the 2D sizing's), m.
    pub margin_m: f64,
    /// Every evaluated board, by value.
    pub designs: Vec<CornerDesign>,
    /// The least value that passes.
    pub chosen: Option<CornerDesign>,
    /// The outcome in words.
    pub note: String,
    /// 3D runs made.
    pub runs: usize,
    /// Wall time of the check, s.
    pub wall_time_s: f64,
}

/// What the corner check produced: its findings and the chosen board's case (the final chosen
/// design) with its 3D run.
pub struct CornerSizing {
    /// The findings.
    pub check: CornerCheck,
    /// The chosen board's case and run.
    pub chosen_run: Option<(Case, Box<Run3Result>)>,
}

impl std::fmt::Debug for CornerSizing {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("CornerSizing")
            .field("check", &self.check)
            .finish_non_exhaustive()
    }
}

/// `base` (a case text) with board `cv.corner`'s dimension set to `x`, without `[sizing]`.
fn corner_text(base: &str, cv: &CornerVary, x: f64) -> Result<String> {
    let mut t: toml::Table = toml::from_str(base).map_err(output_err)?;
    let board = t
        .get_mut("corner")
        .and_then(|a| a.as_array_mut())
        .and_then(|a| a.get_mut(cv.corner))
        .and_then(|p| p.as_table_mut())
        .ok_or_else(|| Error::Method(format!("sizing: no [[corner]] board {}", cv.corner)))?;
    super::set_quantity(
        board,
        cv.dimension.key(),
        toml::Value::Float((x * 1e6).round() / 1e6),
    );
    t.remove("sizing");
    toml::to_string(&t).map_err(output_err)
}

fn finite(v: f64) -> Option<f64> {
    v.is_finite().then_some(v)
}

/// A candidate's index, its design and (when it passes) its case and run.
type Evaluated = (usize, CornerDesign, Option<(Case, Run3Result)>);

/// Run the board at `x` in 3D.
fn evaluate(
    file: &str,
    base: &str,
    cv: &CornerVary,
    x: f64,
    margin: f64,
) -> Result<(CornerDesign, Case, Run3Result)> {
    let c = parse_case(file, &corner_text(base, cv, x)?)?;
    let r = run3(&c, &RunOptions::default(), &mut |_| {})?;
    let y = r.year();
    let stations = y
        .north
        .iter()
        .chain(&y.east)
        .map(|(_, s)| s.margin_m)
        .fold(y.corner.margin_m, f64::min);
    let least = y.worst.map_or(stations, |w| w.margin_m.min(stations));
    let h = r.headline(&c);
    let d = CornerDesign {
        value_m: x,
        least_margin_m: finite(least),
        corner_margin_m: finite(y.corner.margin_m),
        corner_face_frost_m: y.corner.face_m,
        mid_wall_margin_m: y.north.first().and_then(|(_, s)| finite(s.margin_m)),
        annual_heat_loss_kwh: h.annual_heat_loss_kwh,
        feasible: least >= margin - 1e-9,
    };
    Ok((d, c, r))
}

/// The least board value in `cv`'s range that meets `margin` everywhere in 3D, starting from the
/// case text `base` (the 2D sizing's chosen design). `header` is put before the chosen case's
/// text; `progress` is called after every run with the count.
pub fn size_corner(
    file: &str,
    (base, header): (&str, &str),
    cv: &CornerVary,
    margin: f64,
    progress: &dyn Fn(usize),
) -> Result<CornerSizing> {
    let start = std::time::Instant::now();
    let values = cv.values();
    let hi = values.len() - 1;
    let mut evaluated: Vec<Evaluated> = Vec::new();
    let mut eval = |k: usize| -> Result<bool> {
        let (d, c, r) = evaluate(file, base, cv, values[k], margin)?;
        progress(evaluated.len() + 1);
        let pass = d.feasible;
        evaluated.push((k, d, pass.then_some((c, r))));
        Ok(pass)
    };
    let chosen = if !eval(hi)? {
        None
    } else if eval(0)? {
        Some(0)
    } else {
        Some(first_passing(0, hi, &mut eval)?)
    };
    evaluated.sort_by_key(|e| e.0);
    let designs: Vec<CornerDesign> = evaluated.iter().map(|e| e.1.clone()).collect();
    let m = |d: &CornerDesign| d.least_margin_m.unwrap_or(f64::INFINITY);
    for w in designs.windows(2) {
        if m(&w[1]) < m(&w[0]) - MONOTONE_TOL_M {
            return Err(Error::Method(format!(
                "sizing: monotonicity violated in 3D: a larger corner board ({} → {} m) left frost closer (margin {:.3} → {:.3} m)",
                w[0].value_m, w[1].value_m, m(&w[0]), m(&w[1])
            )));
        }
    }
    let dimension = format!("corner[{}].{}", cv.corner, cv.dimension.key());
    let runs = evaluated.len();
    let (chosen, chosen_run, note) = match chosen {
        Some(k) => {
            let e = evaluated
                .into_iter()
                .find(|e| e.0 == k)
                .ok_or_else(|| Error::Method("sizing: chosen corner board not evaluated".into()))?;
            let (c, r) =
                e.2.ok_or_else(|| Error::Method("sizing: chosen corner board has no run".into()))?;
            let text = format!("{header}{}", corner_text(base, cv, values[k])?);
            let c = parse_case(&c.file, &text)?;
            let note = format!(
                "{dimension} = {:.3} m is the least value in the range whose 3D run keeps frost at least {margin:.2} m from the protected zone everywhere round the building (least margin {})",
                values[k],
                e.1.least_margin_m.map_or("none: no frost near the zone".into(), |v| format!("{v:.3} m"))
            );
            (Some(e.1), Some((c, Box::new(r))), note)
        }
        None => {
            let worst = designs
                .last()
                .and_then(|d| d.least_margin_m)
                .unwrap_or(f64::NAN);
            (None, None, format!(
                "even at {dimension} = {:.3} m the 3D least margin is {worst:.3} m, less than the {margin:.2} m required: widen the range, or add insulation along the walls",
                values[hi]
            ))
        }
    };
    Ok(CornerSizing {
        check: CornerCheck {
            dimension,
            range_m: [cv.min, cv.max, cv.step],
            margin_m: margin,
            designs,
            chosen,
            note,
            runs,
            wall_time_s: start.elapsed().as_secs_f64(),
        },
        chosen_run,
    })
}
