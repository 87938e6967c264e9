//! Validation of `[simulation]` (time step, spin-up, mesh, domain) and the `[[probe]]` points.
use super::ctx::Ctx;
use super::model::{Building, Case, Fineness, ModelKind, Probe, Simulation, Solver3d, Wall};
use super::raw::{RawProbe, RawSimulation, S};
use crate::error::{InputKind, Result};

/// How far the wall reaches above the floor at least in the model, m (see
/// `Case::section_top_z`).
pub const WALL_EXTENSION_M: f64 = 1.0;

/// `[simulation]`; `b_prime_m` sets the default domain (ISO 10211 cut-off planes: 2.5 B′, at
/// least 20 m).
pub fn simulation(
    c: &Ctx,
    s: &RawSimulation,
    b_prime_m: f64,
    basement_depth_m: Option<f64>,
) -> Result<Simulation> {
    let dt_h = c.opt(
        &s.time_step_h,
        "simulation.time_step_h",
        (0.25, 24.0),
        "h",
        24.0,
    )?;
    if let Some(v) = &s.time_step_h {
        if (24.0 / dt_h - (24.0 / dt_h).round()).abs() > 1e-9 {
            return Err(c.err(v.span(), "simulation.time_step_h", InputKind::OutOfRange, format!("{dt_h} h does not divide a day; allowed: 24, 12, 8, 6, 4, 3, 2, 1, 0.5 or 0.25 h")));
        }
    }
    let max_years = c.int_opt(
        &s.max_spin_up_years,
        "simulation.max_spin_up_years",
        (1, 100),
        "1 to 100 years",
        10,
    )?;
    let mesh = match &s.mesh {
        None => Fineness::Normal,
        Some(v) => Fineness::parse(v.get_ref()).ok_or_else(|| {
            c.err(
                v.span(),
                "simulation.mesh",
                InputKind::UnknownName,
                format!(
                    "\"{}\" is not a mesh fineness; allowed: coarse, normal, fine",
                    v.get_ref()
                ),
            )
        })?,
    };
    let model = choice(
        c,
        &s.model,
        ("simulation.model", "a model"),
        &[("2d", ModelKind::TwoD), ("3d", ModelKind::ThreeD)],
    )?;
    let solver_3d = choice(
        c,
        &s.solver_3d,
        ("simulation.solver_3d", "a 3D solver"),
        &Solver3d::ALL,
    )?;
    let dom_default = (2.5 * b_prime_m).max(20.0);
    let domain =
        |v: &Option<S<f64>>, key: &str, default: f64| c.opt(v, key, (2.0, 500.0), "m", default);
    Ok(Simulation {
        dt_s: dt_h * 3600.0,
        max_spin_up_years: max_years,
        min_spin_up_years: c.int_opt(
            &s.min_spin_up_years,
            "simulation.min_spin_up_years",
            (1, max_years as i64),
            &format!("1 to max_spin_up_years ({max_years})"),
            1,
        )?,
        coarse_year_step_days: c.int_opt(
            &s.coarse_year_step_days,
            "simulation.coarse_year_step_days",
            (0, 30),
            "0 (none) to 30 days",
            5,
        )?,
        mesh,
        mesh_sizes: None,
        domain_width_m: domain(&s.domain_width_m, "simulation.domain_width_m", dom_default)?,
        // Below a basement floor the cut-off plane lies as deep under the floor as under ground.
        domain_depth_m: domain(
            &s.domain_depth_m,
            "simulation.domain_depth_m",
            dom_default + basement_depth_m.unwrap_or(0.0),
        )?,
        bottom_temperature_c: s
            .bottom_temperature_c
            .as_ref()
            .map(|v| c.range_incl(v, "simulation.bottom_temperature_c", -10.0, 40.0, "°C"))
            .transpose()?,
        wall_extension_m: WALL_EXTENSION_M,
        model,
        solver_3d,
    })
}

/// The value of a key naming one of `choices` (the first when the key is absent); (key, what
/// it names) for the error.
fn choice<T: Copy>(
    c: &Ctx,
    v: &Option<S<String>>,
    (key, what): (&str, &str),
    choices: &[(&str, T)],
) -> Result<T> {
    let Some(v) = v else {
        return Ok(choices[0].1);
    };
    let name = v.get_ref().as_str();
    match choices.iter().find(|(n, _)| *n == name) {
        Some(&(_, value)) => Ok(value),
        None => Err(c.err(
            v.span(),
            key,
            InputKind::UnknownName,
            format!(
                "\"{name}\" is not {what}; allowed: {}",
                choices
                    .iter()
                    .map(|(n, _)| *n)
                    .collect::<Vec<_>>()
                    .join(", ")
            ),
        )),
    }
}

/// The 3D model needs a `[plan]`.
pub fn model_needs_plan(c: &Ctx, s: &RawSimulation, case: &Case) -> Result<()> {
    match (&s.model, case.simulation.model, case.plan) {
        (Some(v), ModelKind::ThreeD, None) => Err(c.err(
            v.span(),
            "simulation.model",
            InputKind::Missing,
            "the 3d model needs the building's plan; add [plan] with length_m and width_m (exterior faces of the foundation wall)",
        )),
        _ => Ok(()),
    }
}

/// `[[probe]]`: named points inside the section.
pub fn probes(
    c: &Ctx,
    raw: &[S<RawProbe>],
    building: &Building,
    wall: &Wall,
    sim: &Simulation,
) -> Result<Vec<Probe>> {
    /// Most probes: each is a column of probes.csv and a line of the probe chart.
    const MAX_PROBES: usize = 1000;
    if raw.len() > MAX_PROBES {
        return Err(c.err(
            raw[MAX_PROBES].span(),
            &format!("probe[{MAX_PROBES}]"),
            InputKind::OutOfRange,
            format!("{} probes; allowed: at most {MAX_PROBES}", raw.len()),
        ));
    }
    let mut probes: Vec<Probe> = Vec::new();
    let mut names = std::collections::HashSet::new();
    let x_min = -(wall.thickness_m + 0.5 * building.b_prime_m);
    for (k, p) in raw.iter().enumerate() {
        let r = p.get_ref();
        let x = c.range_incl(
            &r.x_m,
            &format!("probe[{k}].x_m"),
            x_min,
            sim.domain_width_m,
            "m",
        )?;
        let z = c.range_incl(
            &r.z_m,
            &format!("probe[{k}].z_m"),
            -wall.height_above_ground_m,
            sim.domain_depth_m,
            "m",
        )?;
        let name = r.name.get_ref().trim().to_string();
        if name.is_empty() || name.contains(',') || !names.insert(name.clone()) {
            return Err(c.err(
                r.name.span(),
                &format!("probe[{k}].name"),
                InputKind::Conflict,
                "empty, duplicate or containing a comma; allowed: a unique name without commas",
            ));
        }
        probes.push(Probe {
            name,
            x_m: x,
            z_m: z,
        });
    }
    Ok(probes)
}
