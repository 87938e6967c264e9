//! Validation of `[building]` and the construction tables `[slab]`, `[wall]`, `[footing]` and
//! `[basement]`.
use super::ctx::Ctx;
use super::model::{Backfill, Basement, Building, Footing, Plan, Simulation, Slab, Wall};
use super::raw::{RawBasement, RawBuilding, RawCase, RawFooting, RawPlan, Temps, S};
use crate::error::{InputKind, Result};

/// The validated slab, wall and footing, and the basement floor depth if there is a basement.
pub struct Construction {
    /// Slab.
    pub slab: Slab,
    /// Foundation wall.
    pub wall: Wall,
    /// Footing.
    pub footing: Footing,
    /// Depth of the basement floor surface, m.
    pub basement_depth_m: Option<f64>,
}

/// `[building]` and `[plan]`: floor area, perimeter or B′ (or the plan they follow from), indoor
/// temperature, surface resistances. `wall_t` is the foundation wall's thickness, m.
pub fn building(
    c: &Ctx,
    b: &RawBuilding,
    raw_plan: Option<&S<RawPlan>>,
    wall_t: f64,
) -> Result<(Building, Option<Plan>)> {
    let (area, perim, bp, plan) = match raw_plan {
        Some(p) => rect_plan(c, b, p.get_ref(), wall_t)?,
        None => {
            let (a, p, bp) = plan(c, b)?;
            (a, p, bp, None)
        }
    };
    let unheated = b.unheated.unwrap_or(false);
    let building = Building {
        floor_area_m2: area,
        exposed_perimeter_m: perim,
        b_prime_m: bp,
        indoor_monthly_c: indoor(c, b, unheated)?,
        unheated,
        r_si_floor: c.opt(
            &b.floor_surface_resistance_m2k_per_w,
            "building.floor_surface_resistance_m2k_per_w",
            (0.0, 1.0),
            "m²·K/W",
            0.17,
        )?,
        r_si_wall: c.opt(
            &b.wall_surface_resistance_m2k_per_w,
            "building.wall_surface_resistance_m2k_per_w",
            (0.0, 1.0),
            "m²·K/W",
            0.13,
        )?,
    };
    Ok((building, plan))
}

/// `[plan]`: a rectangle between the wall's exterior faces. The floor (inside the walls) has
/// A = (L − 2w)(W − 2w) and P = 2 (L − 2w + W − 2w), the ISO 13370 inside dimensions of the 2D
/// equivalent floor; `[building]` must not give them too.
fn rect_plan(
    c: &Ctx,
    b: &RawBuilding,
    p: &RawPlan,
    wall_t: f64,
) -> Result<(f64, f64, f64, Option<Plan>)> {
    let why = "not used with [plan]; the floor area and perimeter follow from plan.length_m and plan.width_m";
    c.unused(&b.floor_area_m2, "building.floor_area_m2", why)?;
    c.unused(&b.exposed_perimeter_m, "building.exposed_perimeter_m", why)?;
    c.unused(
        &b.characteristic_dimension_m,
        "building.characteristic_dimension_m",
        why,
    )?;
    // Inside dimensions of at least 2 m keep B′ = l w/(l + w) at 1 m or more.
    let lo = 2.0 * wall_t + 2.0;
    let length_m = c.range_incl(&p.length_m, "plan.length_m", lo, 1000.0, "m")?;
    let width_m = c.range_incl(&p.width_m, "plan.width_m", lo, 1000.0, "m")?;
    let (l, w) = (length_m - 2.0 * wall_t, width_m - 2.0 * wall_t);
    let (area, perim) = (l * w, 2.0 * (l + w));
    Ok((
        area,
        perim,
        area / (0.5 * perim),
        Some(Plan { length_m, width_m }),
    ))
}

/// (A m², P m, B′ m) from area with perimeter or with B′.
fn plan(c: &Ctx, b: &RawBuilding) -> Result<(f64, f64, f64)> {
    match (&b.floor_area_m2, &b.exposed_perimeter_m, &b.characteristic_dimension_m) {
        (Some(a), Some(p), None) => {
            let a_v = c.range(a, "building.floor_area_m2", 0.0, 1e6, "m²")?;
            let p_v = c.range(p, "building.exposed_perimeter_m", 0.0, 1e5, "m")?;
            let bp = a_v / (0.5 * p_v);
            if bp > 1000.0 {
                return Err(c.err(
                    p.span(),
                    "building.exposed_perimeter_m",
                    InputKind::OutOfRange,
                    format!("{} gives B' = A/(0.5 P) = {}; allowed: B' of at most {} (the same bound as characteristic_dimension_m: the section's domain grows with B')", c.len(&p.span(), p_v), c.len(&p.span(), bp), c.len(&p.span(), 1000.0)),
                ));
            }
            if bp < 1.0 {
                return Err(c.err(
                    p.span(),
                    "building.exposed_perimeter_m",
                    InputKind::OutOfRange,
                    format!("{} gives B' = A/(0.5 P) = {}; allowed: B' of at least {}", c.len(&p.span(), p_v), c.len(&p.span(), bp), c.len(&p.span(), 1.0)),
                ));
            }
            Ok((a_v, p_v, bp))
        }
        (Some(a), None, Some(d)) => {
            let a_v = c.range(a, "building.floor_area_m2", 0.0, 1e6, "m²")?;
            let bp = c.range(d, "building.characteristic_dimension_m", 1.0, 1000.0, "m")?;
            Ok((a_v, 2.0 * a_v / bp, bp))
        }
        _ => Err(c.err_file(
            "building",
            InputKind::Missing,
            "give floor_area_m2 with either exposed_perimeter_m or characteristic_dimension_m (not both)",
        )),
    }
}

/// Indoor air temperature per calendar month, °C (unused, zeros, for an unheated building).
fn indoor(c: &Ctx, b: &RawBuilding, unheated: bool) -> Result<[f64; 12]> {
    let key = "building.indoor_temperature_c";
    let given =
        match (&b.indoor_temperature_c, unheated) {
            (Some(t), false) => t,
            (None, true) => return Ok([0.0; 12]),
            (Some(t), true) => {
                return Err(c.err(
                    t.span(),
                    key,
                    InputKind::Conflict,
                    "not used for an unheated building (the indoor air follows the outdoor air)",
                ))
            }
            (None, false) => return Err(c.err_file(
                key,
                InputKind::Missing,
                "missing; give the indoor temperature (°C), 12 monthly values, or unheated = true",
            )),
        };
    let temps = match given.get_ref() {
        Temps::One(t) => [*t; 12],
        Temps::Monthly(v) if v.len() == 12 => {
            let mut a = [0.0; 12];
            a.copy_from_slice(v);
            a
        }
        Temps::Monthly(v) => {
            return Err(c.err(
                given.span(),
                key,
                InputKind::OutOfRange,
                format!(
                    "{} values given; allowed: one temperature or 12 monthly values (°C)",
                    v.len()
                ),
            ))
        }
    };
    if let Some(t) = temps.iter().find(|t| !(-30.0..=40.0).contains(*t)) {
        let u = |v: f64| c.in_user_unit(given.span(), v, "°C");
        return Err(c.err(
            given.span(),
            key,
            InputKind::OutOfRange,
            format!(
                "{} is out of range; allowed: {} to {}",
                u(*t),
                u(-30.0),
                u(40.0)
            ),
        ));
    }
    Ok(temps)
}

/// `[slab]`, `[wall]`, `[footing]` and the basement floor depth.
pub fn construction(c: &Ctx, raw: &RawCase) -> Result<Construction> {
    let basement_depth_m = match &raw.basement {
        Some(b) => {
            c.unused(
                &raw.slab.top_above_ground_m,
                "slab.top_above_ground_m",
                "not used with [basement]; the floor level is basement.floor_depth_m",
            )?;
            Some(c.range(&b.floor_depth_m, "basement.floor_depth_m", 0.0, 5.0, "m")?)
        }
        None => None,
    };
    let slab = Slab {
        thickness_m: c.range(&raw.slab.thickness_m, "slab.thickness_m", 0.0, 1.0, "m")?,
        material: c.material(&raw.slab.material, "slab.material", "concrete")?,
        top_above_ground_m: match basement_depth_m {
            Some(d) => -d,
            None => c.opt(
                &raw.slab.top_above_ground_m,
                "slab.top_above_ground_m",
                (-0.5, 1.5),
                "m",
                0.0,
            )?,
        },
        finish_r: c.opt(
            &raw.slab.finish_resistance_m2k_per_w,
            "slab.finish_resistance_m2k_per_w",
            (0.0, 10.0),
            "m²·K/W",
            0.0,
        )?,
    };
    let wall = Wall {
        thickness_m: c.range(&raw.wall.thickness_m, "wall.thickness_m", 0.0, 2.0, "m")?,
        material: c.material(&raw.wall.material, "wall.material", "concrete")?,
        height_above_ground_m: c.opt(
            &raw.wall.height_above_ground_m,
            "wall.height_above_ground_m",
            (0.0, 3.0),
            "m",
            0.3,
        )?,
    };
    if wall.height_above_ground_m < slab.top_above_ground_m {
        let sp = raw
            .wall
            .height_above_ground_m
            .as_ref()
            .map_or(raw.wall.thickness_m.span(), |v| v.span());
        return Err(c.err(
            sp.clone(),
            "wall.height_above_ground_m",
            InputKind::OutOfRange,
            format!(
                "{} is below the floor surface ({} above ground); allowed: at least slab.top_above_ground_m",
                c.len(&sp, wall.height_above_ground_m), c.len(&sp, slab.top_above_ground_m)
            ),
        ));
    }
    let footing = footing(c, &raw.footing, &slab, &wall)?;
    Ok(Construction {
        slab,
        wall,
        footing,
        basement_depth_m,
    })
}

/// `[footing]`: under the wall, below the slab.
fn footing(c: &Ctx, f: &RawFooting, slab: &Slab, wall: &Wall) -> Result<Footing> {
    let fw = c.range(&f.width_m, "footing.width_m", 0.0, 5.0, "m")?;
    let spare = (fw - wall.thickness_m).max(0.0);
    let footing = Footing {
        width_m: fw,
        outer_projection_m: c.opt(
            &f.outer_projection_m,
            "footing.outer_projection_m",
            (0.0, spare),
            "m (at most width_m − wall.thickness_m, so the footing carries the whole wall)",
            0.5 * spare,
        )?,
        thickness_m: c.range(&f.thickness_m, "footing.thickness_m", 0.0, 3.0, "m")?,
        base_depth_m: c.range(&f.base_depth_m, "footing.base_depth_m", 0.0, 6.0, "m")?,
        material: c.material(&f.material, "footing.material", "concrete")?,
        protected_zone_angle_deg: c.opt(
            &f.protected_zone_angle_deg,
            "footing.protected_zone_angle_deg",
            (0.0, 80.0),
            "degrees from the vertical",
            45.0,
        )?,
    };
    if footing.width_m < wall.thickness_m {
        return Err(c.err(
            f.width_m.span(),
            "footing.width_m",
            InputKind::OutOfRange,
            format!(
                "{} is narrower than the wall ({}); allowed: at least wall.thickness_m",
                c.len(&f.width_m.span(), footing.width_m),
                c.len(&f.width_m.span(), wall.thickness_m)
            ),
        ));
    }
    let slab_bottom = -slab.top_above_ground_m + slab.thickness_m;
    if footing.base_depth_m <= slab_bottom + 1e-9 {
        return Err(c.err(
            f.base_depth_m.span(),
            "footing.base_depth_m",
            InputKind::OutOfRange,
            format!(
                "{} puts the footing base above the slab's underside (z = {}); allowed: deeper than the slab",
                c.len(&f.base_depth_m.span(), footing.base_depth_m),
                c.len(&f.base_depth_m.span(), slab_bottom)
            ),
        ));
    }
    if footing.base_depth_m - footing.thickness_m < -slab.top_above_ground_m {
        return Err(c.err(
            f.thickness_m.span(),
            "footing.thickness_m",
            InputKind::OutOfRange,
            format!("{} puts the footing's top above the floor surface; allowed: at most base_depth_m + slab.top_above_ground_m", c.len(&f.thickness_m.span(), footing.thickness_m)),
        ));
    }
    Ok(footing)
}

/// `[basement]` with its optional backfill (the floor depth was read with the construction).
pub fn basement(
    c: &Ctx,
    raw: Option<&RawBasement>,
    cons: &Construction,
    sim: &Simulation,
) -> Result<Option<Basement>> {
    let (Some(b), Some(depth)) = (raw, cons.basement_depth_m) else {
        return Ok(None);
    };
    let backfill = match &b.backfill {
        None => None,
        Some(st) => {
            c.unused(
                &st.get_ref().bottom_depth_m,
                "basement.backfill.bottom_depth_m",
                "not used for backfill; give basement.backfill_depth_m",
            )?;
            let material = super::soil::stratum(c, st, "basement.backfill")?;
            let within = |v: &Option<S<f64>>, key: &str, hi: f64, default: f64| {
                v.as_ref()
                    .map_or(Ok(default), |v| c.range(v, key, 0.0, hi, "m"))
            };
            Some(Backfill {
                width_m: within(
                    &b.backfill_width_m,
                    "basement.backfill_width_m",
                    sim.domain_width_m - 1.0,
                    1.0,
                )?,
                depth_m: within(
                    &b.backfill_depth_m,
                    "basement.backfill_depth_m",
                    sim.domain_depth_m - 1.0,
                    cons.footing.base_depth_m,
                )?,
                material,
            })
        }
    };
    Ok(Some(Basement {
        floor_depth_m: depth,
        backfill,
    }))
}

/// The footing must lie at least 1 m above the domain bottom.
pub fn footing_in_domain(c: &Ctx, raw: &RawFooting, f: &Footing, sim: &Simulation) -> Result<()> {
    if f.base_depth_m > sim.domain_depth_m - 1.0 {
        return Err(c.err(
            raw.base_depth_m.span(),
            "footing.base_depth_m",
            InputKind::OutOfRange,
            "outside the domain; increase simulation.domain_depth_m",
        ));
    }
    Ok(())
}
