//! Validation of the `[[insulation]]` pieces (under the slab, vertical outside or inside the wall,
//! horizontal wings) and of `[fill]`, and the layout check that no piece overlaps concrete or
//! another piece.
use super::building::Construction;
use super::ctx::Ctx;
use super::model::{Building, Case, CornerPiece, Fill, Insulation, InsulationKind, Simulation};
use super::raw::{RawCorner, RawFill, RawInsulation, S};
use crate::error::{InputKind, Result};
use crate::physics::material::Material;

/// The validated parts the insulation depends on.
pub struct Parts<'a> {
    /// Building (B′).
    pub building: &'a Building,
    /// Slab, wall, footing.
    pub cons: &'a Construction,
    /// Domain size.
    pub simulation: &'a Simulation,
}

/// `[fill]` under the slab (gravel by default).
pub fn fill(c: &Ctx, raw: Option<&RawFill>) -> Result<Option<Fill>> {
    raw.map(|f| {
        Ok(Fill {
            thickness_m: c.range(&f.thickness_m, "fill.thickness_m", 0.0, 3.0, "m")?,
            material: c.material(&f.material, "fill.material", "gravel")?,
        })
    })
    .transpose()
}

/// Every `[[insulation]]` piece, then the checks between pieces.
pub fn insulation(c: &Ctx, raw: &[S<RawInsulation>], parts: &Parts) -> Result<Vec<Insulation>> {
    // Wings start at the outer face of any outside vertical insulation.
    let vert_out_t = vertical_outside_thickness(c, raw);
    // Each piece on its own: the errors of every piece are reported together.
    let mut out = Vec::new();
    let mut g = crate::error::Gather::default();
    for (k, ins) in raw.iter().enumerate() {
        let key = format!("insulation[{k}]");
        let piece = (|| {
            let material = material(c, ins, &key)?;
            let thickness_m = thickness(c, ins, &key, &material)?;
            let kind = kind(c, ins, &key, parts, (thickness_m, vert_out_t))?;
            Ok(Insulation {
                kind,
                thickness_m,
                material,
            })
        })();
        out.extend(g.take(piece));
    }
    g.finish()?;
    between_pieces(c, raw, &out, parts)?;
    Ok(out)
}

/// The thickest outside vertical insulation (0 without one; a piece with an error counts 0, the
/// error is reported with the piece).
fn vertical_outside_thickness(c: &Ctx, raw: &[S<RawInsulation>]) -> f64 {
    raw.iter()
        .filter(|i| i.get_ref().kind.get_ref() == "vertical_outside")
        .filter_map(|i| {
            let m = material(c, i, "").ok()?;
            thickness(c, i, "", &m).ok()
        })
        .fold(0.0, f64::max)
}

/// A board's thickness: `thickness_m`, or `thermal_resistance_m2k_per_w` × the material's
/// conductivity (R = d / λ, ISO 6946 §6.7.1), 0 to 1 m either way.
fn thickness(c: &Ctx, ins: &S<RawInsulation>, key: &str, m: &Material) -> Result<f64> {
    let r = ins.get_ref();
    match (&r.thickness_m, &r.thermal_resistance_m2k_per_w) {
        (Some(t), None) => c.range(t, &format!("{key}.thickness_m"), 0.0, 1.0, "m"),
        (None, Some(rv)) => {
            let k = m.k_unfrozen;
            let rk = format!("{key}.thermal_resistance_m2k_per_w");
            let res = c.range(rv, &rk, 0.0, 1.0 / k, "m²·K/W")?;
            Ok(res * k)
        }
        (Some(t), Some(_)) => Err(c.err(
            t.span(),
            &format!("{key}.thickness_m"),
            InputKind::Conflict,
            "given with thermal_resistance_m2k_per_w; allowed: one of them (the thickness follows from R and the material's conductivity)",
        )),
        (None, None) => Err(c.err(
            ins.span(),
            &format!("{key}.thickness_m"),
            InputKind::Missing,
            "missing; allowed: thickness_m, or thermal_resistance_m2k_per_w (R-value)",
        )),
    }
}

/// A named material or a conductivity, with an optional heat capacity.
fn material(c: &Ctx, ins: &S<RawInsulation>, key: &str) -> Result<Material> {
    let r = ins.get_ref();
    let mut material =
        match (&r.material, &r.conductivity_w_per_mk) {
            (Some(n), None) => c.named(n, &format!("{key}.material"))?,
            (None, Some(k_v)) => {
                let kv = c.range(
                    k_v,
                    &format!("{key}.conductivity_w_per_mk"),
                    0.0,
                    1.0,
                    "W/(m·K)",
                )?;
                Material::inert("insulation", kv, 0.05e6)
            }
            _ => return Err(c.err(
                ins.span(),
                key,
                InputKind::Conflict,
                "give either material (a name) or conductivity_w_per_mk, not both and not neither",
            )),
        };
    if let Some(cap) = &r.heat_capacity_j_per_m3k {
        let v = c.range(
            cap,
            &format!("{key}.heat_capacity_j_per_m3k"),
            0.0,
            1e7,
            "J/(m³·K)",
        )?;
        material.c_frozen = v;
        material.c_unfrozen = v;
    }
    Ok(material)
}

/// `[[corner]]`: each piece validated as a wing (its depth, outer end, thickness, material; the
/// inner end at the outer face of any outside vertical insulation) with its length along each
/// wall from the corner.
pub fn corner_pieces(
    c: &Ctx,
    raw: &[S<RawCorner>],
    parts: &Parts,
    raw_ins: &[S<RawInsulation>],
) -> Result<Vec<CornerPiece>> {
    let vert_out_t = vertical_outside_thickness(c, raw_ins);
    let mut out = Vec::new();
    for (k, rc) in raw.iter().enumerate() {
        let key = format!("corner[{k}]");
        let r = rc.get_ref();
        let span = rc.span();
        let as_wing = S::new(
            span.clone(),
            RawInsulation {
                kind: S::new(span.clone(), "wing".to_string()),
                thickness_m: Some(r.thickness_m.clone()),
                thermal_resistance_m2k_per_w: None,
                board_width_m: None,
                material: r.material.clone(),
                conductivity_w_per_mk: r.conductivity_w_per_mk.clone(),
                heat_capacity_j_per_m3k: r.heat_capacity_j_per_m3k.clone(),
                band_width_m: None,
                top_depth_m: None,
                bottom_depth_m: None,
                depth_m: Some(r.depth_m.clone()),
                width_m: Some(r.width_m.clone()),
                past_outer_edge_m: None,
                past_inner_edge_m: None,
            },
        );
        let thickness_m = c.range(&r.thickness_m, &format!("{key}.thickness_m"), 0.0, 1.0, "m")?;
        let material = material(c, &as_wing, &key)?;
        let kind = kind(c, &as_wing, &key, parts, (thickness_m, vert_out_t))?;
        out.push(CornerPiece {
            piece: Insulation {
                kind,
                thickness_m,
                material,
            },
            length_m: c.range(&r.length_m, &format!("{key}.length_m"), 0.0, 1000.0, "m")?,
        });
    }
    Ok(out)
}

/// Corner pieces need a plan, reach at most half of each wall, and overlap no concrete and no
/// piece other than a wing (which they are painted over).
pub fn check_corners(c: &Ctx, raw: &[S<RawCorner>], case: &Case) -> Result<()> {
    for (k, (rc, cp)) in raw.iter().zip(&case.corners).enumerate() {
        let key = format!("corner[{k}]");
        let Some(plan) = case.plan else {
            return Err(c.err(
                rc.span(),
                &key,
                InputKind::Missing,
                "corner insulation needs the building's plan; add [plan] with length_m and width_m",
            ));
        };
        let half = 0.5 * plan.length_m.min(plan.width_m);
        if cp.length_m > half + 1e-9 {
            let v = &rc.get_ref().length_m;
            return Err(c.err(
                v.span(),
                &format!("{key}.length_m"),
                InputKind::OutOfRange,
                format!(
                    "{} is more than half the plan's shorter side; allowed: up to {}",
                    c.len(&v.span(), cp.length_m),
                    c.len(&v.span(), half)
                ),
            ));
        }
        let mut with = case.clone();
        let kept: Vec<usize> = (0..case.insulation.len())
            .filter(|&i| !matches!(case.insulation[i].kind, InsulationKind::Wing { .. }))
            .collect();
        with.insulation = kept.iter().map(|&i| case.insulation[i].clone()).collect();
        with.insulation.push(cp.piece.clone());
        if let Some(p) = with.layout_problem() {
            let allowed = if p.what.starts_with("leaves") {
                "allowed: inside simulation.domain_width_m and domain_depth_m"
            } else {
                "allowed: beside concrete and the other pieces (wings excepted)"
            };
            let what = if p.piece + 1 == with.insulation.len() {
                p.what
            } else {
                format!("overlaps insulation[{}]", kept[p.piece])
            };
            return Err(c.err(
                rc.span(),
                &key,
                InputKind::Geometry,
                format!("{what}; {allowed}"),
            ));
        }
    }
    Ok(())
}

/// Where the piece sits, by its kind; keys of other kinds are refused.
fn kind(
    c: &Ctx,
    ins: &S<RawInsulation>,
    key: &str,
    parts: &Parts,
    (t, vert_out_t): (f64, f64),
) -> Result<InsulationKind> {
    let r = ins.get_ref();
    let kind_name = r.kind.get_ref().as_str();
    let forbid = |v: &Option<S<f64>>, name: &str| {
        c.unused(
            v,
            &format!("{key}.{name}"),
            &format!("not used by {kind_name} insulation; remove it"),
        )
    };
    let need = |v: &Option<S<f64>>, name: &str| -> Result<S<f64>> {
        v.clone().ok_or_else(|| {
            c.err(
                ins.span(),
                &format!("{key}.{name}"),
                InputKind::Missing,
                format!("missing; {kind_name} insulation needs {name}"),
            )
        })
    };
    let (cons, bp) = (parts.cons, parts.building.b_prime_m);
    let slab_bottom = -cons.slab.top_above_ground_m + cons.slab.thickness_m;
    match kind_name {
        "under_slab" => {
            for (v, n) in [(&r.top_depth_m, "top_depth_m"), (&r.bottom_depth_m, "bottom_depth_m"), (&r.depth_m, "depth_m"), (&r.width_m, "width_m"), (&r.board_width_m, "board_width_m"), (&r.past_outer_edge_m, "past_outer_edge_m"), (&r.past_inner_edge_m, "past_inner_edge_m")] {
                forbid(v, n)?;
            }
            let band = r.band_width_m.as_ref().map(|v| c.range(v, &format!("{key}.band_width_m"), 0.0, 0.5 * bp, "m")).transpose()?;
            Ok(InsulationKind::UnderSlab { band_width_m: band })
        }
        "vertical_outside" | "vertical_inside" => {
            for (v, n) in [(&r.band_width_m, "band_width_m"), (&r.depth_m, "depth_m"), (&r.width_m, "width_m"), (&r.board_width_m, "board_width_m"), (&r.past_outer_edge_m, "past_outer_edge_m"), (&r.past_inner_edge_m, "past_inner_edge_m")] {
                forbid(v, n)?;
            }
            let outside = kind_name == "vertical_outside";
            let top_default = if outside { 0.0 } else { slab_bottom };
            let top = c.opt(&r.top_depth_m, &format!("{key}.top_depth_m"), (-cons.wall.height_above_ground_m, 6.0), "m", top_default)?;
            let bot_v = need(&r.bottom_depth_m, "bottom_depth_m")?;
            let bottom = c.range(&bot_v, &format!("{key}.bottom_depth_m"), top, 6.0, "m")?;
            if outside {
                vertical_outside(c, key, cons, (top, bottom), &bot_v)
            } else {
                vertical_inside(c, ins, key, cons, (top, bottom))
            }
        }
        "wing" => {
            for (v, n) in [(&r.band_width_m, "band_width_m"), (&r.top_depth_m, "top_depth_m"), (&r.bottom_depth_m, "bottom_depth_m"), (&r.past_outer_edge_m, "past_outer_edge_m"), (&r.past_inner_edge_m, "past_inner_edge_m")] {
                forbid(v, n)?;
            }
            let d_v = need(&r.depth_m, "depth_m")?;
            let depth = c.range_incl(&d_v, &format!("{key}.depth_m"), 0.0, 3.0, "m")?;
            // The outer end's distance from the wall's exterior face (width_m), or the board's own
            // width from its inner edge at the outer face of any outside vertical insulation.
            let far = parts.simulation.domain_width_m - 1.0;
            let width = match (&r.width_m, &r.board_width_m) {
                (Some(w_v), None) => c.range(w_v, &format!("{key}.width_m"), vert_out_t, far, "m")?,
                (None, Some(b_v)) => {
                    vert_out_t + c.range(b_v, &format!("{key}.board_width_m"), 0.0, far - vert_out_t, "m")?
                }
                (Some(w_v), Some(_)) => return Err(c.err(w_v.span(), &format!("{key}.width_m"), InputKind::Conflict,
                    "given with board_width_m; allowed: one of them (width_m: the outer end from the wall's exterior face; board_width_m: the board's own width)")),
                (None, None) => need(&r.width_m, "width_m").map(|_| 0.0)?,
            };
            let f = &cons.footing;
            let fx1 = f.outer_projection_m;
            if fx1 > 1e-9 && depth + t > f.base_depth_m - f.thickness_m + 1e-9 && depth < f.base_depth_m {
                return Err(c.err(d_v.span(), &format!("{key}.depth_m"), InputKind::Geometry, format!(
                    "{} puts the wing beside the footing, which projects {} beyond the wall; allowed: above the footing's top ({}) or below its base",
                    c.len(&d_v.span(), depth), c.len(&d_v.span(), fx1), c.len(&d_v.span(), f.base_depth_m - f.thickness_m))));
            }
            Ok(InsulationKind::Wing { depth_m: depth, x_start_m: vert_out_t, width_m: width })
        }
        "under_footing" => {
            for (v, n) in [(&r.band_width_m, "band_width_m"), (&r.top_depth_m, "top_depth_m"), (&r.bottom_depth_m, "bottom_depth_m"), (&r.depth_m, "depth_m"), (&r.width_m, "width_m"), (&r.board_width_m, "board_width_m")] {
                forbid(v, n)?;
            }
            // The board spans the footing's base and reaches past its edges by the given lengths:
            // outward up to 1 m short of the domain's far edge, inward up to the building's centre.
            let f = &cons.footing;
            let (fx0, fx1) = (f.outer_projection_m - f.width_m, f.outer_projection_m);
            let far = ((parts.simulation.domain_width_m - 1.0 - fx1) * 1e6).round() / 1e6;
            let centre = ((fx0 + cons.wall.thickness_m + 0.5 * bp) * 1e6).round() / 1e6;
            let out = c.opt(&r.past_outer_edge_m, &format!("{key}.past_outer_edge_m"), (0.0, far), "m", 0.0)?;
            let inn = c.opt(&r.past_inner_edge_m, &format!("{key}.past_inner_edge_m"), (0.0, centre), "m", 0.0)?;
            Ok(InsulationKind::UnderFooting { x0_m: fx0 - inn, x1_m: fx1 + out })
        }
        other => Err(c.err(r.kind.span(), &format!("{key}.kind"), InputKind::UnknownName, format!(
            "\"{other}\" is not an insulation kind; allowed: under_slab, vertical_outside, vertical_inside, wing, under_footing"))),
    }
}

/// Outside the wall: must not run into a projecting footing.
fn vertical_outside(
    c: &Ctx,
    key: &str,
    cons: &Construction,
    (top_m, bottom_m): (f64, f64),
    bot_v: &S<f64>,
) -> Result<InsulationKind> {
    let f = &cons.footing;
    let fx1 = f.outer_projection_m;
    if fx1 > 1e-9 && bottom_m > f.base_depth_m - f.thickness_m + 1e-9 {
        return Err(c.err(bot_v.span(), &format!("{key}.bottom_depth_m"), InputKind::Geometry, format!(
            "{} runs into the footing, which projects {} beyond the wall's outside face from z = {}; allowed: at most the footing's top depth",
            c.len(&bot_v.span(), bottom_m), c.len(&bot_v.span(), fx1), c.len(&bot_v.span(), f.base_depth_m - f.thickness_m))));
    }
    Ok(InsulationKind::VerticalOutside { top_m, bottom_m })
}

/// Inside the wall: at or below the slab's underside, or wholly above the floor.
fn vertical_inside(
    c: &Ctx,
    ins: &S<RawInsulation>,
    key: &str,
    cons: &Construction,
    (top_m, bottom_m): (f64, f64),
) -> Result<InsulationKind> {
    let floor_z = -cons.slab.top_above_ground_m;
    let slab_bottom = floor_z + cons.slab.thickness_m;
    if top_m < slab_bottom - 1e-9 && bottom_m > floor_z + 1e-9 {
        let sp = ins
            .get_ref()
            .top_depth_m
            .as_ref()
            .map_or(ins.span(), |v| v.span());
        return Err(c.err(sp.clone(), &format!("{key}.top_depth_m"), InputKind::Geometry, format!(
            "{} overlaps the slab (z = {} to {}); allowed: at or below the slab's underside, or wholly above the floor",
            c.len(&sp, top_m), c.len(&sp, floor_z), c.len(&sp, slab_bottom))));
    }
    Ok(InsulationKind::VerticalInside { top_m, bottom_m })
}

/// One piece per kind (wings excepted, at separate depths); every piece at least 1 m above the
/// domain bottom.
fn between_pieces(
    c: &Ctx,
    raw: &[S<RawInsulation>],
    pieces: &[Insulation],
    parts: &Parts,
) -> Result<()> {
    let slab_bottom = -parts.cons.slab.top_above_ground_m + parts.cons.slab.thickness_m;
    let domain_depth = parts.simulation.domain_depth_m;
    for (k, a) in pieces.iter().enumerate() {
        for b in pieces.iter().skip(k + 1) {
            let same = std::mem::discriminant(&a.kind) == std::mem::discriminant(&b.kind);
            if same && !matches!(a.kind, InsulationKind::Wing { .. }) {
                return Err(c.err(raw[k].span(), &format!("insulation[{k}].kind"), InputKind::Geometry, "two pieces of this kind would overlap; allowed: one piece per kind except wing"));
            }
            if let (
                InsulationKind::Wing { depth_m: da, .. },
                InsulationKind::Wing { depth_m: db, .. },
            ) = (a.kind, b.kind)
            {
                if da < db + b.thickness_m && db < da + a.thickness_m {
                    return Err(c.err(
                        raw[k].span(),
                        &format!("insulation[{k}].depth_m"),
                        InputKind::Geometry,
                        "two wing pieces overlap in depth; allowed: separate depths",
                    ));
                }
            }
        }
        let deepest = match a.kind {
            InsulationKind::VerticalOutside { bottom_m, .. }
            | InsulationKind::VerticalInside { bottom_m, .. } => bottom_m,
            InsulationKind::Wing { depth_m, .. } => depth_m + a.thickness_m,
            InsulationKind::UnderSlab { .. } => slab_bottom + a.thickness_m,
            InsulationKind::UnderFooting { .. } => parts.cons.footing.base_depth_m + a.thickness_m,
        };
        if deepest > domain_depth - 1.0 {
            return Err(c.err(raw[k].span(), &format!("insulation[{k}]"), InputKind::Geometry, format!(
                "reaches z = {deepest:.2} m, outside the domain (depth {domain_depth:.1} m); allowed: at least 1 m above the bottom")));
        }
    }
    Ok(())
}

/// No piece may overlap concrete or another piece, or leave the domain.
pub fn check_layout(c: &Ctx, raw: &[S<RawInsulation>], case: &Case) -> Result<()> {
    match case.layout_problem() {
        None => Ok(()),
        Some(p) => {
            let allowed = if p.what.starts_with("leaves") {
                "allowed: inside simulation.domain_width_m and domain_depth_m"
            } else {
                "allowed: insulation beside, not inside, other parts"
            };
            Err(c.err(
                raw[p.piece].span(),
                &format!("insulation[{}]", p.piece),
                InputKind::Geometry,
                format!("{}; {allowed}", p.what),
            ))
        }
    }
}
