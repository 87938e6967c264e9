//! Output files of a run (summary.json, daily.csv, monthly.csv, probes.csv, field_<day>.csv) and
//! the short result table. Every file is written to a temporary name and renamed, so a failed run
//! never leaves a half-written file.
pub mod html;
pub mod sizing;

use crate::case::Case;
use crate::error::{Error, Result};
use crate::geometry::Part;
use crate::plot::data::{encode_fields, PartOutline, SectionFile, NO_VALUE};
use crate::simulate::{month_of, RunResult};
use serde_json::json;
use std::path::{Path, PathBuf};

/// The caution carried by every report.
pub const CAUTION: &str = "Results are engineering estimates from a 2D model with idealised soil and climate. \
They do not replace the judgement of a licensed engineer; local codes and standards govern the design of \
foundations and frost protection.";

/// The coordinate convention, stated in file headers.
pub const COORDINATES: &str =
    "x horizontal, 0 at the exterior face of the foundation wall, positive outward; z depth below finished ground level, positive down";

/// Headline numbers of a run.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Headline {
    /// Annual ground heat loss, kWh (whole building).
    pub annual_heat_loss_kwh: f64,
    /// Mean heat loss, W.
    pub mean_heat_loss_w: f64,
    /// Largest daily-mean heat loss, W.
    pub peak_heat_loss_w: f64,
    /// Mean heat loss per metre of exposed perimeter, W/m.
    pub heat_loss_per_perimeter_w_per_m: f64,
    /// Annual mean loss / (A (mean indoor − mean outdoor)), W/(m²·K).
    pub floor_u_value_w_per_m2k: f64,
    /// Deepest frost in open ground, m.
    pub frost_depth_open_ground_m: f64,
    /// Deepest frost under the footing, m.
    pub frost_depth_under_footing_m: f64,
    /// Footing base depth minus frost depth under the footing, m.
    pub frost_margin_m: f64,
    /// Day of year of the deepest frost under the footing (open ground when none).
    pub date_of_max_frost_depth: usize,
}

/// Hours of the reported period (a season of a series may have 366 days).
fn reported_hours(r: &RunResult) -> f64 {
    24.0 * r.days.len().max(1) as f64
}

/// Compute the headline numbers.
pub fn headline(case: &Case, r: &RunResult) -> Headline {
    let y = r.final_year();
    let mean_w = y.heat_loss_kwh * 1000.0 / reported_hours(r);
    let peak = r
        .days
        .iter()
        .map(|d| d.heat_loss_w)
        .fold(f64::NEG_INFINITY, f64::max);
    let dtemp = case.indoor_mean_c() - case.climate.mean_c;
    let day_max = if y.max_frost_footing_m > 0.0 {
        r.days
            .iter()
            .max_by(|a, b| a.frost_footing_m.total_cmp(&b.frost_footing_m))
    } else {
        r.days
            .iter()
            .max_by(|a, b| a.frost_open_m.total_cmp(&b.frost_open_m))
    };
    Headline {
        annual_heat_loss_kwh: y.heat_loss_kwh,
        mean_heat_loss_w: mean_w,
        peak_heat_loss_w: peak,
        heat_loss_per_perimeter_w_per_m: mean_w / case.building.exposed_perimeter_m,
        floor_u_value_w_per_m2k: mean_w / (case.building.floor_area_m2 * dtemp),
        frost_depth_open_ground_m: y.max_frost_open_m,
        frost_depth_under_footing_m: y.max_frost_footing_m,
        frost_margin_m: case.footing.base_depth_m - y.max_frost_footing_m,
        date_of_max_frost_depth: day_max.map_or(0, |d| d.day_of_year),
    }
}

/// Basement results: (floor U, wall U, effective U, frost beside the wall), W/(m²·K) and m.
pub fn basement_values(case: &Case, r: &RunResult) -> Option<(f64, f64, f64, f64)> {
    let b = case.basement.as_ref()?;
    let y = r.final_year();
    let dtemp = case.indoor_mean_c() - case.climate.mean_c;
    let (a, p, z) = (
        case.building.floor_area_m2,
        case.building.exposed_perimeter_m,
        b.floor_depth_m,
    );
    let hours = reported_hours(r);
    let floor_w = y.floor_heat_loss_kwh * 1000.0 / hours;
    let wall_w = y.wall_heat_loss_kwh * 1000.0 / hours;
    Some((
        floor_w / (a * dtemp),
        wall_w / (z * p * dtemp),
        (floor_w + wall_w) / ((a + z * p) * dtemp),
        y.max_frost_beside_wall_m,
    ))
}

/// The summary.json document.
pub fn summary_json(case: &Case, r: &RunResult) -> serde_json::Value {
    let h = headline(case, r);
    let y = r.final_year();
    let st = r.stats;
    let mut doc = json!({
        "case_name": case.name,
        "caution": CAUTION,
        "coordinates": COORDINATES,
        "note": "Whole-building figures are the 2D half-section's per-metre results times the exposed perimeter (ISO 13370 equivalent strip of width B').",
        "floor_area_m2": case.building.floor_area_m2,
        "exposed_perimeter_m": case.building.exposed_perimeter_m,
        "characteristic_dimension_m": case.building.b_prime_m,
        "mean_indoor_temperature_c": case.indoor_mean_c(),
        "mean_outdoor_temperature_c": case.climate.mean_c,
        "annual_heat_loss_kwh": h.annual_heat_loss_kwh,
        "mean_heat_loss_w": h.mean_heat_loss_w,
        "peak_heat_loss_w": h.peak_heat_loss_w,
        "heat_loss_per_perimeter_w_per_m": h.heat_loss_per_perimeter_w_per_m,
        "floor_u_value_w_per_m2k": h.floor_u_value_w_per_m2k,
        "steady_state_heat_loss_w": r.steady_heat_loss_w,
        "frost_depth_open_ground_m": h.frost_depth_open_ground_m,
        "frost_depth_under_footing_m": h.frost_depth_under_footing_m,
        "footing_base_depth_m": case.footing.base_depth_m,
        "frost_margin_m": h.frost_margin_m,
        "date_of_max_frost_depth": h.date_of_max_frost_depth,
        "field_day_of_year": r.field.day_of_year,
        "frost_line_temperature_c": crate::simulate::frost_line_c(case),
        "energy_balance_error": y.energy_balance_error,
        "spin_up_years": r.spin_up_years(),
        "spin_up_converged": r.spin_up_converged,
        "coarse_spin_up_years": r.coarse_spin_up_years,
        "coarse_year_step_days": case.simulation.coarse_year_step_days,
        "cells": r.mesh.solid_cells(),
        "grid": { "nx": r.mesh.grid.nx(), "nz": r.mesh.grid.nz() },
        "time_steps": r.time_steps,
        "time_step_s": case.simulation.dt_s,
        "newton_iterations": st.newton_iterations,
        "newton_iterations_per_step": st.newton_iterations as f64 / r.time_steps.max(1) as f64,
        "factorizations": st.factorizations,
        "near_factor_solves": st.near_factor_solves,
        "cg_iterations": st.cg_iterations,
        "step_halvings": st.halvings,
        "max_residual_k": st.max_residual_k,
        "wall_time_s": r.wall_time_s,
        "years": r.years,
        "cross_check": r.cross_check,
    });
    doc["periodicity_error_heat_loss_kwh"] = json!(r.periodicity_heat_loss_kwh);
    if let Some(d) = doc.as_object_mut() {
        if !r.winters.is_empty() {
            d.insert("winters".into(), json!(r.winters));
            d.insert(
                "reported_winter".into(),
                json!(r.winters[r.reported - r.spin_up_years].winter),
            );
            d.insert(
                "reported_period".into(),
                json!("the worst winter of the measured series (deepest frost under the footing, then in open ground)"),
            );
        }
        if let Some(dy) = &case.climate.design {
            d.insert("design_year".into(), json!(dy));
        }
        let kind = match (&case.climate.source, &case.climate.design) {
            (crate::case::ClimateSource::Series(_), _) => "measured series",
            (_, Some(_)) => "design year from a series",
            _ => "sinusoid",
        };
        d.insert(
            "climate".into(),
            json!({
                "kind": kind,
                "mean_c": case.climate.mean_c,
                "amplitude_k": case.climate.amplitude_k,
                "coldest_day": case.climate.coldest_day,
                "n_factor_freezing": case.climate.n_freezing,
                "n_factor_thawing": case.climate.n_thawing,
                "snow_depth_m": case.climate.snow_depth_m,
            }),
        );
    }
    if let Some((uf, uw, ue, fw)) = basement_values(case, r) {
        let b = case
            .basement
            .as_ref()
            .expect("basement values imply a basement");
        let extra = json!({
            "basement_floor_depth_m": b.floor_depth_m,
            "wall_heat_loss_kwh": y.wall_heat_loss_kwh,
            "floor_heat_loss_kwh": y.floor_heat_loss_kwh,
            "wall_above_ground_heat_loss_kwh": y.wall_above_ground_heat_loss_kwh,
            "wall_u_value_w_per_m2k": uw,
            "basement_floor_u_value_w_per_m2k": uf,
            "effective_u_value_w_per_m2k": ue,
            "frost_depth_beside_wall_m": fw,
            "basement_note": "Wall U is the wall's below-ground loss over z·P; effective U is (floor + below-ground wall) over (A + z·P) (ISO 13370 heated basement); the loss through the wall above ground is reported separately.",
        });
        if let (Some(d), Some(e)) = (doc.as_object_mut(), extra.as_object()) {
            d.extend(e.clone());
        }
    }
    doc
}

/// Write `bytes` to `dir/name` through a temporary file and a rename.
pub fn write_atomic(dir: &Path, name: &str, bytes: &[u8]) -> Result<PathBuf> {
    let path = dir.join(name);
    let tmp = dir.join(format!(".{name}.tmp"));
    let io = |e| Error::Io {
        path: path.clone(),
        source: e,
    };
    std::fs::write(&tmp, bytes).map_err(io)?;
    std::fs::rename(&tmp, &path).map_err(io)?;
    Ok(path)
}

fn csv_bytes(
    header_comment: &str,
    header: &[String],
    rows: impl Iterator<Item = Vec<String>>,
) -> Result<Vec<u8>> {
    let mut out = Vec::new();
    for line in header_comment.lines() {
        out.extend_from_slice(format!("# {line}\n").as_bytes());
    }
    let mut w = csv::Writer::from_writer(out);
    let enc = |e: csv::Error| Error::Output(e.to_string());
    w.write_record(header).map_err(enc)?;
    for r in rows {
        w.write_record(&r).map_err(enc)?;
    }
    w.into_inner().map_err(|e| Error::Output(e.to_string()))
}

fn f(v: f64, digits: usize) -> String {
    if v.is_finite() {
        format!("{v:.digits$}")
    } else {
        String::new()
    }
}

/// Write every output file of a run into `dir` (created if missing); returns the paths.
pub fn write_outputs(case: &Case, r: &RunResult, dir: &Path) -> Result<Vec<PathBuf>> {
    std::fs::create_dir_all(dir).map_err(|e| Error::Io {
        path: dir.to_path_buf(),
        source: e,
    })?;
    let mut files = Vec::new();
    let head = format!("{}\n{CAUTION}\nCoordinates: {COORDINATES}.", case.name);
    let summary = serde_json::to_vec_pretty(&summary_json(case, r))
        .map_err(|e| Error::Output(e.to_string()))?;
    files.push(write_atomic(dir, "summary.json", &summary)?);
    files.push(write_atomic(dir, "case.toml", case.source.as_bytes())?);

    let hdr = |v: &[&str]| v.iter().map(|s| s.to_string()).collect::<Vec<_>>();
    let daily = csv_bytes(
        &format!("{head}\nReported (final) year, in simulation order from the warmest day. Heat loss is the whole building's daily mean."),
        &hdr(&["day_of_year", "outdoor_temperature_c", "indoor_temperature_c", "ground_heat_loss_w", "frost_depth_open_ground_m", "frost_depth_under_footing_m", "frost_depth_beside_wall_m"]),
        r.days.iter().map(|d| {
            vec![d.day_of_year.to_string(), f(d.outdoor_c, 3), f(d.indoor_c, 2), f(d.heat_loss_w, 2), f(d.frost_open_m, 4), f(d.frost_footing_m, 4), f(d.frost_beside_wall_m, 4)]
        }),
    )?;
    files.push(write_atomic(dir, "daily.csv", &daily)?);

    let mut kwh = [0.0; 12];
    let mut tout = [0.0; 12];
    let mut n = [0usize; 12];
    let mut fo = [0.0f64; 12];
    let mut ff = [0.0f64; 12];
    for d in &r.days {
        // 365-day calendar months; day 366 of a leap year stays in December.
        let m = month_of((d.day_of_year as f64 - 0.5).min(364.5));
        kwh[m] += d.heat_loss_w * 24.0 / 1000.0;
        tout[m] += d.outdoor_c;
        n[m] += 1;
        fo[m] = fo[m].max(d.frost_open_m);
        ff[m] = ff[m].max(d.frost_footing_m);
    }
    let monthly = csv_bytes(
        &format!("{head}\nCalendar months of the reported year (365-day calendar)."),
        &hdr(&[
            "month",
            "ground_heat_loss_kwh",
            "mean_outdoor_temperature_c",
            "max_frost_depth_open_ground_m",
            "max_frost_depth_under_footing_m",
        ]),
        (0..12).map(|m| {
            vec![
                (m + 1).to_string(),
                f(kwh[m], 2),
                f(tout[m] / n[m].max(1) as f64, 3),
                f(fo[m], 4),
                f(ff[m], 4),
            ]
        }),
    )?;
    files.push(write_atomic(dir, "monthly.csv", &monthly)?);

    let mut ph = vec!["day_of_year".to_string()];
    for p in &case.probes {
        ph.push(format!(
            "{} (x={} m z={} m) temperature_c",
            p.name, p.x_m, p.z_m
        ));
    }
    let probes = csv_bytes(
        &format!("{head}\nProbe temperatures at the end of each day of the reported year."),
        &ph,
        r.days.iter().enumerate().map(|(k, d)| {
            let mut row = vec![d.day_of_year.to_string()];
            row.extend(r.probes.iter().map(|s| f(s[k], 3)));
            row
        }),
    )?;
    files.push(write_atomic(dir, "probes.csv", &probes)?);

    let g = &r.mesh.grid;
    let field = csv_bytes(
        &format!("{head}\nCell-centre temperatures on day {} of the year (deepest frost), solid cells only.", r.field.day_of_year),
        &hdr(&["x_m", "z_m", "temperature_c"]),
        (0..g.nz()).flat_map(|j| (0..g.nx()).map(move |i| (i, j))).filter_map(|(i, j)| {
            let v = r.field.t[g.id(i, j)];
            v.is_finite().then(|| vec![f(g.xc(i), 4), f(g.zc(j), 4), f(v, 3)])
        }),
    )?;
    files.push(write_atomic(
        dir,
        &format!("field_{:03}.csv", r.field.day_of_year),
        &field,
    )?);

    if !r.winters.is_empty() {
        let w = csv_bytes(
            &format!("{head}\nEvery complete season (1 July - 30 June) of the measured series, named by the year it starts."),
            &hdr(&["winter", "freezing_index_c_days", "frost_depth_under_footing_m", "frost_depth_open_ground_m", "frost_depth_beside_wall_m", "ground_heat_loss_kwh", "energy_balance_error"]),
            r.winters.iter().map(|w| {
                vec![w.winter.to_string(), f(w.freezing_index_c_days, 1), f(w.frost_depth_under_footing_m, 4), f(w.frost_depth_open_ground_m, 4), f(w.frost_depth_beside_wall_m, 4), f(w.heat_loss_kwh, 1), format!("{:.2e}", w.energy_balance_error)]
            }),
        )?;
        files.push(write_atomic(dir, "winters.csv", &w)?);
    }

    // Saved for plotting and `frostline plot DIR`.
    let parts = r
        .section
        .rects
        .iter()
        .map(|rc| {
            let (label, kind) = match rc.part {
                Part::Slab => ("slab".to_string(), "concrete"),
                Part::Wall => ("wall".to_string(), "concrete"),
                Part::Footing => ("footing".to_string(), "concrete"),
                Part::Fill => ("fill".to_string(), "fill"),
                Part::Backfill => ("backfill".to_string(), "fill"),
                Part::Insulation(k) => (format!("insulation[{k}]"), "insulation"),
            };
            PartOutline {
                label,
                kind: kind.into(),
                x0: rc.x0,
                x1: rc.x1,
                z0: rc.z0,
                z1: rc.z1,
            }
        })
        .collect();
    let sec = SectionFile {
        case_name: case.name.clone(),
        coordinates: COORDINATES.into(),
        xe: g.xe.clone(),
        ze: g.ze.clone(),
        parts,
        footing_base_depth_m: case.footing.base_depth_m,
        footing_x_m: case.footing_x(),
        frost_line_c: crate::simulate::frost_line_c(case),
        field_day_of_year: r.field.day_of_year,
        days: r.daily_fields.len(),
        fields_format: format!(
            "little-endian i16, hundredths of a degree C, {NO_VALUE} = no value (air); day-major in daily.csv order, \
             cells row-major (z outer, x inner) over the grid of xe x ze"
        ),
    };
    let json = serde_json::to_vec_pretty(&sec).map_err(|e| Error::Output(e.to_string()))?;
    files.push(write_atomic(dir, "section.json", &json)?);
    files.push(write_atomic(
        dir,
        "fields.i16",
        &encode_fields(&r.daily_fields),
    )?);
    Ok(files)
}

/// One row of the result table: label and unit in 35 characters, then each value in 10, with
/// `prec` decimals.
fn row(label: &str, unit: &str, prec: usize, vals: &[f64]) -> String {
    let w = 35usize.saturating_sub(unit.chars().count());
    let mut s = format!("    {label:<w$}{unit}");
    for v in vals {
        s += &format!("  {v:>10.prec$}");
    }
    s + "\n"
}

/// The short result table printed after a run.
pub fn result_table(case: &Case, r: &RunResult) -> String {
    let h = headline(case, r);
    let c = &r.cross_check;
    let y = r.final_year();
    let mut s = String::new();
    s += &format!("{}\n", case.name);
    s += &format!(
        "  B' = {:.2} m, A = {:.1} m², P = {:.1} m (whole-building = per-metre section × P)\n",
        case.building.b_prime_m, case.building.floor_area_m2, case.building.exposed_perimeter_m
    );
    s += "\n  Heat loss to the ground                     model      ISO 13370\n";
    s += &row("annual", "kWh", 0, &[h.annual_heat_loss_kwh]);
    s += &row(
        "mean",
        "W",
        1,
        &[h.mean_heat_loss_w, c.iso13370_mean_heat_loss_w],
    );
    s += &row("peak (daily mean)", "W", 1, &[h.peak_heat_loss_w]);
    s += &row(
        "per metre of exposed perimeter",
        "W/m",
        2,
        &[h.heat_loss_per_perimeter_w_per_m],
    );
    s += &row(
        "floor U-value",
        "W/(m²K)",
        3,
        &[h.floor_u_value_w_per_m2k, c.iso13370_u_value_w_per_m2k],
    );
    s += "\n  Frost depth (below ground level)            model      Stefan  mod. Berggren\n";
    s += &row(
        "open ground",
        "m",
        2,
        &[
            h.frost_depth_open_ground_m,
            c.stefan_frost_depth_m,
            c.modified_berggren_frost_depth_m,
        ],
    );
    s += &row(
        "under the footing",
        "m",
        2,
        &[h.frost_depth_under_footing_m],
    );
    s += &row("footing base", "m", 2, &[case.footing.base_depth_m]);
    let margin = row("margin (base − frost)", "m", 2, &[h.frost_margin_m]);
    s += &if h.frost_margin_m < 0.0 {
        margin.replace('\n', "  FROST BELOW FOOTING BASE\n")
    } else {
        margin
    };
    s += &row(
        "deepest on day of year",
        "",
        0,
        &[h.date_of_max_frost_depth as f64],
    );
    s += &row(
        "freezing index (n × air)",
        "°C·d",
        0,
        &[c.freezing_index_c_days],
    );
    if let (Some((uf, uw, ue, fw)), Some(bc)) = (basement_values(case, r), c.basement.as_ref()) {
        s += "\n  Heated basement                             model      ISO 13370\n";
        s += &row(
            "floor U-value",
            "W/(m²K)",
            3,
            &[uf, bc.iso13370_basement_floor_u_value_w_per_m2k],
        );
        s += &row(
            "wall U-value (below ground)",
            "W/(m²K)",
            3,
            &[uw, bc.iso13370_wall_u_value_w_per_m2k],
        );
        s += &row(
            "effective U-value",
            "W/(m²K)",
            3,
            &[ue, bc.iso13370_effective_u_value_w_per_m2k],
        );
        s += &row(
            "wall / floor heat loss",
            "kWh",
            0,
            &[y.wall_heat_loss_kwh, y.floor_heat_loss_kwh],
        );
        s += &row("frost beside the wall (0.5 m)", "m", 2, &[fw]);
    }
    let coarse = if r.coarse_spin_up_years > 0 {
        format!(
            " after {} at {}-day steps",
            r.coarse_spin_up_years, case.simulation.coarse_year_step_days
        )
    } else {
        String::new()
    };
    s += &format!("\n  Numerics: {} cells, {} steps, spin-up {} year(s){coarse} ({}), {:.2} Newton iterations/step, energy balance {:.1e}, {:.2} s\n",
        r.mesh.solid_cells(), r.time_steps, r.spin_up_years(),
        if r.spin_up_converged { "periodic" } else { "NOT periodic: raise simulation.max_spin_up_years" },
        r.stats.newton_iterations as f64 / r.time_steps.max(1) as f64, y.energy_balance_error, r.wall_time_s);
    if let Some(e) = r.periodicity_heat_loss_kwh {
        s += &format!(
            "  Periodicity: reported-year heat loss minus the periodic year's ≈ {e:+.2} kWh ({:+.3} %), estimated\n",
            100.0 * e / y.heat_loss_kwh.abs().max(1e-9)
        );
    }
    s += &format!("\n  Caution: {CAUTION}\n");
    s
}
