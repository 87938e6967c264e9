//! Validation of `[sizing]`: the one or two varied dimensions, the required margin and the cost
//! weights.
use super::ctx::Ctx;
use super::model::{
    CornerDimension, CornerPiece, CornerVary, Dimension, Insulation, InsulationKind, Plan, Sizing,
    Vary,
};
use super::raw::{RawCornerVary, RawSizing, RawVary, S};
use crate::error::{InputKind, Result};
use std::collections::BTreeMap;

/// `[sizing]` for the case's insulation pieces.
pub fn sizing(
    c: &Ctx,
    s: &RawSizing,
    insulation: &[Insulation],
    (corners, plan): (&[CornerPiece], Option<&Plan>),
) -> Result<Sizing> {
    let n = s.vary.get_ref().len();
    if !(1..=2).contains(&n) {
        return Err(c.err(
            s.vary.span(),
            "sizing.vary",
            InputKind::OutOfRange,
            format!("{n} dimensions given; allowed: one or two [[sizing.vary]] tables"),
        ));
    }
    let vary = s
        .vary
        .get_ref()
        .iter()
        .enumerate()
        .map(|(k, v)| vary(c, v, &format!("sizing.vary[{k}]"), insulation))
        .collect::<Result<Vec<_>>>()?;
    Ok(Sizing {
        margin_m: c.opt(&s.margin_m, "sizing.margin_m", (-1.0, 2.0), "m", 0.0)?,
        vary,
        cost_per_m3: cost(c, s)?,
        excavation_cost_per_m3: c.opt(
            &s.excavation_cost_per_m3,
            "sizing.excavation_cost_per_m3",
            (0.0, 1e6),
            "per m³",
            40.0,
        )?,
        corner: match &s.corner {
            None => None,
            Some(v) => Some(corner_vary(c, v, corners, plan)?),
        },
    })
}

/// `[sizing.corner]`: a dimension of a `[[corner]]` board (the case needs `[plan]`), over what
/// range.
fn corner_vary(
    c: &Ctx,
    v: &S<RawCornerVary>,
    corners: &[CornerPiece],
    plan: Option<&Plan>,
) -> Result<CornerVary> {
    let key = "sizing.corner";
    let r = v.get_ref();
    let Some(plan) = plan else {
        return Err(c.err(
            v.span(),
            key,
            InputKind::Missing,
            "the corner check runs the 3D model: add [plan] with length_m and width_m",
        ));
    };
    let idx = match &r.corner {
        None => 0,
        Some(i) => {
            let k = *i.get_ref();
            if k < 0 || k as usize >= corners.len().max(1) {
                return Err(c.err(
                    i.span(),
                    &format!("{key}.corner"),
                    InputKind::OutOfRange,
                    format!(
                        "{k} is not a [[corner]] board; allowed: 0 to {}",
                        corners.len().max(1) as i64 - 1
                    ),
                ));
            }
            k as usize
        }
    };
    if corners.is_empty() {
        return Err(c.err(
            v.span(),
            key,
            InputKind::Missing,
            "the corner check varies a [[corner]] board: add one (its starting dimensions are replaced by the check's values)",
        ));
    }
    let dimension = match r.dimension.get_ref().as_str() {
        "width_m" => CornerDimension::WidthM,
        "length_m" => CornerDimension::LengthM,
        "thickness_m" => CornerDimension::ThicknessM,
        other => {
            return Err(c.err(
                r.dimension.span(),
                &format!("{key}.dimension"),
                InputKind::UnknownName,
                format!("\"{other}\" is not a corner-board dimension; allowed: width_m, length_m, thickness_m"),
            ))
        }
    };
    let cap = match dimension {
        CornerDimension::LengthM => 0.5 * plan.length_m.min(plan.width_m),
        CornerDimension::WidthM => 20.0,
        CornerDimension::ThicknessM => 1.0,
    };
    let min = c.range(&r.min, &format!("{key}.min"), 0.0, cap, "m")?;
    let max = c.range_incl(&r.max, &format!("{key}.max"), min, cap, "m")?;
    let step = c.range(
        &r.step,
        &format!("{key}.step"),
        0.0,
        (max - min).max(1e-9),
        "m",
    )?;
    if (max - min) / step > 50.0 {
        return Err(c.err(
            r.step.span(),
            &format!("{key}.step"),
            InputKind::OutOfRange,
            "more than 50 steps (each a 3D run); allowed: a coarser step",
        ));
    }
    Ok(CornerVary {
        corner: idx,
        dimension,
        min,
        max,
        step,
    })
}

/// Cost weights per m³ of insulation by material name: defaults (invented relative weights for
/// the demo, not prices) overridden by the case's.
fn cost(c: &Ctx, s: &RawSizing) -> Result<BTreeMap<String, f64>> {
    let mut cost: BTreeMap<String, f64> = [
        ("xps", 250.0),
        ("eps", 150.0),
        ("eps-ii", 120.0),
        ("insulation", 250.0),
    ]
    .iter()
    .map(|(k, v)| (k.to_string(), *v))
    .collect();
    for (k, v) in &s.cost_per_m3 {
        if !(*v >= 0.0 && v.is_finite()) {
            return Err(c.err_file(
                &format!("sizing.cost_per_m3.{k}"),
                InputKind::OutOfRange,
                format!("{v} is not a cost; allowed: 0 or more"),
            ));
        }
        cost.insert(k.clone(), *v);
    }
    Ok(cost)
}

/// One `[[sizing.vary]]`: which dimension of which piece, over what range.
fn vary(c: &Ctx, v: &S<RawVary>, key: &str, insulation: &[Insulation]) -> Result<Vary> {
    let r = v.get_ref();
    let dim = match r.dimension.get_ref().as_str() {
        "thickness_m" => Dimension::ThicknessM,
        "width_m" => Dimension::WidthM,
        "depth_m" => Dimension::DepthM,
        "bottom_depth_m" => Dimension::BottomDepthM,
        "band_width_m" => Dimension::BandWidthM,
        "past_outer_edge_m" => Dimension::PastOuterEdgeM,
        "footing.base_depth_m" => Dimension::FootingBaseDepthM,
        other => {
            return Err(c.err(r.dimension.span(), &format!("{key}.dimension"), InputKind::UnknownName, format!(
                "\"{other}\" is not a sizing dimension; allowed: thickness_m, width_m, depth_m, bottom_depth_m, band_width_m, past_outer_edge_m, footing.base_depth_m")))
        }
    };
    let piece = piece(c, v, key, dim, insulation)?;
    let min = c.range_incl(&r.min, &format!("{key}.min"), 0.0, 20.0, "m")?;
    let max = c.range(&r.max, &format!("{key}.max"), min, 20.0, "m")?;
    let step = c.range(&r.step, &format!("{key}.step"), 0.0, max - min, "m")?;
    if (max - min) / step > 200.0 {
        return Err(c.err(
            r.step.span(),
            &format!("{key}.step"),
            InputKind::OutOfRange,
            "more than 200 steps; allowed: a coarser step",
        ));
    }
    if dim == Dimension::ThicknessM && min <= 0.0 {
        return Err(c.err(r.min.span(), &format!("{key}.min"), InputKind::OutOfRange, "a thickness of 0 m; allowed: greater than 0 (the uninsulated foundation is evaluated separately)"));
    }
    Ok(Vary {
        insulation: piece,
        dimension: dim,
        min,
        max,
        step,
    })
}

/// The insulation piece a dimension belongs to (none for the footing's depth).
fn piece(
    c: &Ctx,
    v: &S<RawVary>,
    key: &str,
    dim: Dimension,
    insulation: &[Insulation],
) -> Result<Option<usize>> {
    let r = v.get_ref();
    let i = match (&r.insulation, dim) {
        (None, Dimension::FootingBaseDepthM) => return Ok(None),
        (Some(i), Dimension::FootingBaseDepthM) => {
            return Err(c.err(
                i.span(),
                &format!("{key}.insulation"),
                InputKind::Conflict,
                "not used with footing.base_depth_m; remove it",
            ))
        }
        (None, _) => {
            return Err(c.err(
                v.span(),
                &format!("{key}.insulation"),
                InputKind::Missing,
                "missing: the index of the insulation piece (0 = the first [[insulation]])",
            ))
        }
        (Some(i), _) => i,
    };
    let idx = *i.get_ref();
    if idx < 0 || idx as usize >= insulation.len() {
        return Err(c.err(
            i.span(),
            &format!("{key}.insulation"),
            InputKind::OutOfRange,
            format!(
                "{idx} is not a piece; allowed: 0 to {}",
                insulation.len() as i64 - 1
            ),
        ));
    }
    let kind = insulation[idx as usize].kind;
    let fits = match dim {
        Dimension::ThicknessM => true,
        Dimension::WidthM | Dimension::DepthM => matches!(kind, InsulationKind::Wing { .. }),
        Dimension::BottomDepthM => matches!(
            kind,
            InsulationKind::VerticalOutside { .. } | InsulationKind::VerticalInside { .. }
        ),
        Dimension::BandWidthM => matches!(
            kind,
            InsulationKind::UnderSlab {
                band_width_m: Some(_)
            }
        ),
        Dimension::PastOuterEdgeM => matches!(kind, InsulationKind::UnderFooting { .. }),
        Dimension::FootingBaseDepthM => false,
    };
    if !fits {
        return Err(c.err(
            r.dimension.span(),
            &format!("{key}.dimension"),
            InputKind::Conflict,
            format!(
                "{} does not apply to insulation[{idx}]",
                r.dimension.get_ref()
            ),
        ));
    }
    Ok(Some(idx as usize))
}
