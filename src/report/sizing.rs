//! Sizing outputs: sizing.json, sizing.csv, chosen_case.toml and the printed summary.
use crate::case::{Case, ClimateSource, Dimension, InsulationKind};
use crate::design::{corner_rule, fpsf_guidance, Design, SizingResult};
use crate::error::{Error, Result};
use serde_json::json;
use std::path::{Path, PathBuf};

/// The cautions every sizing output carries.
pub const SIZING_CAUTION: &str = "This sizing is an estimate for a homogeneous soil and the stated climate from a 2D model. \
Drainage, frost-susceptible fill, snow clearing over the insulation, moisture in the insulation and construction quality \
all matter; corners need more protection than a 2D section shows. Local codes and a licensed engineer govern the design.";

fn dim_name(d: Dimension) -> &'static str {
    match d {
        Dimension::ThicknessM => "thickness_m",
        Dimension::WidthM => "width_m",
        Dimension::DepthM => "depth_m",
        Dimension::BottomDepthM => "bottom_depth_m",
        Dimension::BandWidthM => "band_width_m",
        Dimension::FootingBaseDepthM => "base_depth_m",
    }
}

fn label(case: &Case, k: usize) -> String {
    let v = &case.sizing.as_ref().expect("sizing").vary[k];
    match v.insulation {
        Some(i) => format!("insulation[{i}].{}", dim_name(v.dimension)),
        None => "footing.base_depth_m".into(),
    }
}

/// The design freezing index used for the guidance: the design year's or the sinusoid's air
/// index, or the coldest winter of a series, °C·d.
fn design_fi(case: &Case) -> f64 {
    match &case.climate.source {
        ClimateSource::Series(s) => crate::physics::climate::freezing_indices(s)
            .iter()
            .map(|w| w.value)
            .fold(0.0, f64::max),
        ClimateSource::Sinusoid => {
            crate::methods::sinusoid_freezing_index(case.climate.mean_c, case.climate.amplitude_k).0
        }
    }
}

/// Cross-checks and flags in words.
fn cross_checks(case: &Case, r: &SizingResult) -> (serde_json::Value, Vec<String>) {
    let fi = design_fi(case);
    let cc = crate::simulate::cross_check(case);
    let guidance = fpsf_guidance(fi);
    let mut flags = Vec::new();
    let chosen_case = r.chosen.as_ref().map(|d| {
        crate::design::apply(case, &case.sizing.as_ref().expect("sizing").vary, &d.values)
    });
    let wing = chosen_case.as_ref().and_then(|c| {
        c.insulation.iter().find_map(|i| match i.kind {
            InsulationKind::Wing { width_m, .. } => Some((
                i.thickness_m,
                width_m,
                i.thickness_m / i.material.k_unfrozen,
            )),
            _ => None,
        })
    });
    match (&guidance, wing) {
        (Some(g), Some((t, w, r_si))) => {
            let rg = g["horizontal_r_walls_m2k_per_w"].as_f64().unwrap_or(0.0);
            let wg = g["horizontal_width_walls_m"].as_f64().unwrap_or(0.0);
            if rg > 0.0 && (r_si / rg > 2.0 || r_si / rg < 0.5) {
                flags.push(format!("large disagreement: the computed wing R {r_si:.2} m²·K/W ({:.0} mm) differs from the simplified table's {rg:.2} by more than a factor of 2", t * 1000.0));
            }
            if wg > 0.0 && (w / wg > 2.0 || w / wg < 0.5) {
                flags.push(format!("large disagreement: the computed wing width {w:.2} m differs from the simplified table's {wg:.2} m by more than a factor of 2"));
            }
            if rg == 0.0 {
                flags.push("the simplified table needs no horizontal insulation at this freezing index; the model found a wing necessary".into());
            }
        }
        (None, _) => flags.push(format!(
            "the design freezing index ({:.0} °F·d) lies beyond the simplified table (4000 °F·d)",
            1.8 * fi
        )),
        _ => {}
    }
    let open = cc.modified_berggren_frost_depth_m;
    if open < case.footing.base_depth_m {
        flags.push(format!("modified Berggren gives an open-ground frost depth of {open:.2} m, above the footing base ({:.2} m): frost protection may not be needed at all", case.footing.base_depth_m));
    }
    (
        json!({
            "design_air_freezing_index_c_days": fi,
            "simplified_fpsf_guidance": guidance,
            "modified_berggren_open_ground_frost_depth_m": open,
            "stefan_open_ground_frost_depth_m": cc.stefan_frost_depth_m,
        }),
        flags,
    )
}

/// The corner rule of thumb ([`crate::design::corner_rule`]) for the chosen design's wing, if it
/// has one.
fn corner_requirement(case: &Case, r: &SizingResult) -> Option<serde_json::Value> {
    let d = r.chosen.as_ref()?;
    let c = crate::design::apply(case, &case.sizing.as_ref()?.vary, &d.values);
    c.insulation.iter().find_map(|i| match i.kind {
        InsulationKind::Wing {
            width_m, x_start_m, ..
        } => Some(corner_rule(i.thickness_m, width_m - x_start_m)),
        _ => None,
    })
}

/// Write sizing.json, sizing.csv and (if a design was chosen) chosen_case.toml into `dir`.
pub fn write(case: &Case, r: &SizingResult, dir: &Path) -> Result<Vec<PathBuf>> {
    std::fs::create_dir_all(dir).map_err(|e| Error::Io {
        path: dir.to_path_buf(),
        source: e,
    })?;
    let mut files = Vec::new();
    let (checks, flags) = cross_checks(case, r);
    let corner = corner_requirement(case, r);
    let labels: Vec<String> = (0..r.vary.len()).map(|k| label(case, k)).collect();
    let doc = json!({
        "case_name": case.name,
        "caution": SIZING_CAUTION,
        "margin_m": r.margin_m,
        "margin_meaning": r.margin_meaning,
        "dimensions": labels,
        "vary": r.vary,
        "no_insulation_needed": r.no_insulation_needed,
        "baseline_without_varied_insulation": r.baseline,
        "chosen": r.chosen,
        "tradeoff": r.tradeoff,
        "designs": r.designs,
        "corner_requirement": corner,
        "cross_check": checks,
        "flags": flags,
        "runs": r.runs,
        "median_run_s": r.median_run_s,
        "wall_time_s": r.wall_time_s,
    });
    let bytes = serde_json::to_vec_pretty(&doc).map_err(|e| Error::Output(e.to_string()))?;
    files.push(crate::report::write_atomic(dir, "sizing.json", &bytes)?);
    let mut csv = format!(
        "# {}\n# {}\n# cost weights are per metre of exposed perimeter\n",
        case.name, SIZING_CAUTION
    );
    csv += &format!("{},frost_margin_m,frost_depth_under_footing_m,annual_heat_loss_kwh,heat_loss_change_kwh,cost_per_m,feasible,on_tradeoff,note\n", labels.join(","));
    for d in &r.designs {
        let on = r.tradeoff.iter().any(|t| t.values == d.values);
        let vals: Vec<String> = d.values.iter().map(|v| format!("{v:.4}")).collect();
        csv += &format!(
            "{},{:.4},{:.4},{:.1},{:.1},{:.2},{},{},{}\n",
            vals.join(","),
            d.frost_margin_m,
            d.frost_depth_under_footing_m,
            d.annual_heat_loss_kwh,
            d.heat_loss_change_kwh,
            d.cost_per_m,
            d.feasible,
            on,
            d.note.clone().unwrap_or_default().replace(',', ";")
        );
    }
    files.push(crate::report::write_atomic(
        dir,
        "sizing.csv",
        csv.as_bytes(),
    )?);
    if let Some(d) = &r.chosen {
        files.push(crate::report::write_atomic(
            dir,
            "chosen_case.toml",
            chosen_case_toml(case, d)?.as_bytes(),
        )?);
    }
    Ok(files)
}

/// The case file with the chosen values written in and the `[sizing]` table removed (relative
/// paths made absolute so the file runs from anywhere).
pub fn chosen_case_toml(case: &Case, d: &Design) -> Result<String> {
    let mut t: toml::Table =
        toml::from_str(&case.source).map_err(|e| Error::Output(e.to_string()))?;
    let s = case.sizing.as_ref().expect("sizing");
    for (v, &x) in s.vary.iter().zip(&d.values) {
        let x = (x * 1e6).round() / 1e6;
        match v.insulation {
            None => {
                if let Some(f) = t.get_mut("footing").and_then(|f| f.as_table_mut()) {
                    f.insert("base_depth_m".into(), toml::Value::Float(x));
                }
            }
            Some(k) => {
                if let Some(p) = t
                    .get_mut("insulation")
                    .and_then(|a| a.as_array_mut())
                    .and_then(|a| a.get_mut(k))
                    .and_then(|p| p.as_table_mut())
                {
                    p.insert(dim_name(v.dimension).into(), toml::Value::Float(x));
                }
            }
        }
    }
    t.remove("sizing");
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
    let body = toml::to_string(&t).map_err(|e| Error::Output(e.to_string()))?;
    Ok(format!("# Chosen design of `frostline size` for {}; run it with `frostline run`.\n# {SIZING_CAUTION}\n{body}", case.file))
}

/// The printed summary.
pub fn text(case: &Case, r: &SizingResult) -> String {
    let labels: Vec<String> = (0..r.vary.len()).map(|k| label(case, k)).collect();
    let mut s = format!(
        "{} — frost-protection sizing\n  {}\n",
        case.name, r.margin_meaning
    );
    s += &format!(
        "  without the varied insulation: frost under the footing {:.2} m, margin {:.2} m, heat loss {:.0} kWh/yr\n",
        r.baseline.frost_depth_under_footing_m, r.baseline.frost_margin_m, r.baseline.annual_heat_loss_kwh
    );
    if let Some(why) = &r.no_insulation_needed {
        s += &format!("\n  No insulation needed: {why}.\n");
    } else {
        s += &format!(
            "\n  Trade-off (least {} for each {}):\n",
            labels.last().cloned().unwrap_or_default(),
            labels.first().cloned().unwrap_or_default()
        );
        for d in &r.tradeoff {
            s += &format!(
                "    {:<28} margin {:>6.2} m  heat loss {:>7.0} kWh/yr ({:+.0})  cost {:>7.1} per m\n",
                d.values.iter().map(|v| format!("{v:.3}")).collect::<Vec<_>>().join(" × "),
                d.frost_margin_m,
                d.annual_heat_loss_kwh,
                d.heat_loss_change_kwh,
                d.cost_per_m
            );
        }
        match &r.chosen {
            Some(d) => {
                s += &format!("\n  Chosen (least cost): {} = {}\n", labels.join(", "), d.values.iter().map(|v| format!("{v:.3} m")).collect::<Vec<_>>().join(", "));
                s += &format!("    frost margin {:.2} m, heat loss {:.0} kWh/yr ({:+.0} against no varied insulation)\n", d.frost_margin_m, d.annual_heat_loss_kwh, d.heat_loss_change_kwh);
            }
            None => s += "\n  No design within the bounds meets the margin: widen the bounds or deepen the footing.\n",
        }
    }
    let (checks, flags) = cross_checks(case, r);
    s += &format!(
        "\n  Cross-check (design air freezing index {:.0} °C·d):\n",
        checks["design_air_freezing_index_c_days"]
            .as_f64()
            .unwrap_or(0.0)
    );
    s += &format!(
        "    modified Berggren open-ground frost depth {:.2} m\n",
        checks["modified_berggren_open_ground_frost_depth_m"]
            .as_f64()
            .unwrap_or(0.0)
    );
    if let Some(g) = checks["simplified_fpsf_guidance"].as_object() {
        s += &format!(
            "    simplified FPSF table (ASCE 32-01 / IRC; partly from memory, verify): vertical R {:.2}, wing R {:.2} m²·K/W over {:.2} m (corners R {:.2} over {:.2} m)\n",
            g["vertical_r_m2k_per_w"].as_f64().unwrap_or(0.0),
            g["horizontal_r_walls_m2k_per_w"].as_f64().unwrap_or(0.0),
            g["horizontal_width_walls_m"].as_f64().unwrap_or(0.0),
            g["horizontal_r_corners_m2k_per_w"].as_f64().unwrap_or(0.0),
            g["horizontal_width_corners_m"].as_f64().unwrap_or(0.0)
        );
    }
    for f in flags {
        s += &format!("    NOTE: {f}\n");
    }
    if let Some(c) = corner_requirement(case, r) {
        s += &format!(
            "\n  Corners (NOT computed — a 2D section cannot resolve them; rule of thumb, common practice):\n    wing {:.0} mm thick and {:.2} m wide over {:.1} m from each outside corner along both walls\n",
            1000.0 * c["thickness_m"].as_f64().unwrap_or(0.0),
            c["width_m"].as_f64().unwrap_or(0.0),
            c["extent_from_corner_m"].as_f64().unwrap_or(0.0)
        );
    }
    s += &format!(
        "\n  {} runs, median {:.2} s per run, {:.1} s in all\n",
        r.runs, r.median_run_s, r.wall_time_s
    );
    s += &format!("\n  Caution: {SIZING_CAUTION}\n");
    s
}
