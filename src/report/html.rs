//! `report.html`: one self-contained file (plots embedded as data URIs, no network) with the
//! inputs as read, the results with units, the published-method cross-checks side by side, the
//! run's numerical record and the cautions. Built from the files of a run directory.
use crate::error::{Error, Result};
use serde_json::Value;
use std::path::{Path, PathBuf};

/// Standard base64 (RFC 4648) of `bytes`.
pub fn base64(bytes: &[u8]) -> String {
    const T: &[u8; 64] = b"ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
    let mut out = String::with_capacity(bytes.len().div_ceil(3) * 4);
    for c in bytes.chunks(3) {
        let n = (c[0] as u32) << 16
            | (*c.get(1).unwrap_or(&0) as u32) << 8
            | *c.get(2).unwrap_or(&0) as u32;
        out.push(T[(n >> 18) as usize & 63] as char);
        out.push(T[(n >> 12) as usize & 63] as char);
        out.push(if c.len() > 1 {
            T[(n >> 6) as usize & 63] as char
        } else {
            '='
        });
        out.push(if c.len() > 2 {
            T[n as usize & 63] as char
        } else {
            '='
        });
    }
    out
}

/// Escape text for HTML.
pub fn escape(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

fn num(v: &Value, k: &str) -> f64 {
    v[k].as_f64().unwrap_or(f64::NAN)
}

fn row(out: &mut String, name: &str, unit: &str, model: String, check: String, method: &str) {
    out.push_str(&format!(
        "<tr><td>{}</td><td>{}</td><td class=n>{}</td><td class=n>{}</td><td>{}</td></tr>\n",
        escape(name),
        escape(unit),
        model,
        check,
        escape(method)
    ));
}

/// The figures the report embeds, in order: (file stem, caption).
pub const FIGURES: &[(&str, &str)] = &[
    ("soil_temperature", "Soil temperature in the half-section on the day of deepest frost; bold black line: frost line."),
    ("soil_temperature_zoom", "The same field around the footing."),
    ("frost_depth", "Frost depth in open ground and under the footing over the reported year, with the footing base."),
    ("heat_loss", "Monthly ground heat loss of the whole building and the monthly mean outdoor temperature."),
    ("probes", "Temperatures at the named probe points."),
    ("winters", "Deepest frost of every winter of the measured series."),
];

/// Write `dir/report.html` from the run's files; returns its path.
pub fn write_report(dir: &Path) -> Result<PathBuf> {
    let read = |name: &str| -> Result<Vec<u8>> {
        let p = dir.join(name);
        std::fs::read(&p).map_err(|e| Error::Io { path: p, source: e })
    };
    let s: Value = serde_json::from_slice(&read("summary.json")?)
        .map_err(|e| Error::Output(format!("summary.json: {e}")))?;
    let case_text = String::from_utf8_lossy(&read("case.toml")?).to_string();
    let cc = &s["cross_check"];
    let name = s["case_name"].as_str().unwrap_or("case");
    let mut h = String::new();
    h.push_str("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n");
    h.push_str(&format!(
        "<title>frostline report: {}</title>\n",
        escape(name)
    ));
    h.push_str("<style>body{font-family:sans-serif;max-width:1100px;margin:2em auto;color:#222;line-height:1.4}\
        table{border-collapse:collapse;margin:1em 0}td,th{border:1px solid #bbb;padding:4px 8px}th{background:#eee}\
        td.n{text-align:right;font-variant-numeric:tabular-nums}.caution{border:2px solid #b33;background:#fff4f0;padding:0.6em 1em}\
        figure{margin:1.5em 0}img{max-width:100%;border:1px solid #ccc}pre{background:#f6f6f6;padding:1em;overflow-x:auto}</style>\n");
    h.push_str("</head>\n<body>\n");
    h.push_str(&format!("<h1>{}</h1>\n", escape(name)));
    h.push_str(&format!(
        "<p class=\"caution\"><strong>Caution.</strong> {}</p>\n",
        escape(crate::report::CAUTION)
    ));
    h.push_str(&format!(
        "<p>Coordinates: {}. {}</p>\n",
        escape(crate::report::COORDINATES),
        escape(s["note"].as_str().unwrap_or(""))
    ));

    h.push_str("<h2 id=\"results\">Results</h2>\n<table>\n<tr><th>quantity</th><th>unit</th><th>model</th><th>published method</th><th>method</th></tr>\n");
    let f = |v: f64, d: usize| {
        if v.is_finite() {
            format!("{v:.d$}")
        } else {
            "–".into()
        }
    };
    row(
        &mut h,
        "annual ground heat loss",
        "kWh",
        f(num(&s, "annual_heat_loss_kwh"), 0),
        "–".into(),
        "",
    );
    row(
        &mut h,
        "mean heat loss",
        "W",
        f(num(&s, "mean_heat_loss_w"), 1),
        f(num(cc, "iso13370_mean_heat_loss_w"), 1),
        "ISO 13370 steady U × A × Δθ (excludes the wall/floor junction Ψ_g)",
    );
    row(
        &mut h,
        "peak heat loss (daily mean)",
        "W",
        f(num(&s, "peak_heat_loss_w"), 1),
        "–".into(),
        "",
    );
    row(
        &mut h,
        "heat loss per metre of exposed perimeter",
        "W/m",
        f(num(&s, "heat_loss_per_perimeter_w_per_m"), 2),
        "–".into(),
        "",
    );
    row(
        &mut h,
        "floor U-value",
        "W/(m²·K)",
        f(num(&s, "floor_u_value_w_per_m2k"), 3),
        f(num(cc, "iso13370_u_value_w_per_m2k"), 3),
        "ISO 13370 slab-on-ground with edge insulation",
    );
    row(
        &mut h,
        "frost depth, open ground",
        "m",
        f(num(&s, "frost_depth_open_ground_m"), 2),
        format!(
            "{} / {}",
            f(num(cc, "stefan_frost_depth_m"), 2),
            f(num(cc, "modified_berggren_frost_depth_m"), 2)
        ),
        "Stefan / modified Berggren, n = 1",
    );
    row(
        &mut h,
        "frost depth, under the footing",
        "m",
        f(num(&s, "frost_depth_under_footing_m"), 2),
        "–".into(),
        "",
    );
    row(
        &mut h,
        "footing base depth",
        "m",
        f(num(&s, "footing_base_depth_m"), 2),
        "–".into(),
        "",
    );
    row(
        &mut h,
        "frost margin (base − frost)",
        "m",
        f(num(&s, "frost_margin_m"), 2),
        "–".into(),
        "a negative value would mean frost below the footing base",
    );
    row(
        &mut h,
        "day of deepest frost",
        "day of year",
        format!("{}", s["date_of_max_frost_depth"]),
        "–".into(),
        "",
    );
    row(
        &mut h,
        "surface freezing index (n-factor × air index)",
        "°C·d",
        "–".into(),
        f(num(cc, "freezing_index_c_days"), 0),
        "design year, or the coldest winter of a series",
    );
    if s["effective_u_value_w_per_m2k"].is_number() {
        let b = &cc["basement"];
        row(
            &mut h,
            "basement floor U-value",
            "W/(m²·K)",
            f(num(&s, "basement_floor_u_value_w_per_m2k"), 3),
            f(num(b, "iso13370_basement_floor_u_value_w_per_m2k"), 3),
            "ISO 13370 heated basement floor",
        );
        row(
            &mut h,
            "basement wall U-value (below ground)",
            "W/(m²·K)",
            f(num(&s, "wall_u_value_w_per_m2k"), 3),
            f(num(b, "iso13370_wall_u_value_w_per_m2k"), 3),
            "ISO 13370 basement wall (height-weighted for partial insulation)",
        );
        row(
            &mut h,
            "effective U-value",
            "W/(m²·K)",
            f(num(&s, "effective_u_value_w_per_m2k"), 3),
            f(num(b, "iso13370_effective_u_value_w_per_m2k"), 3),
            "ISO 13370 U′ over A + z·P",
        );
        row(
            &mut h,
            "wall / floor heat loss",
            "kWh",
            format!(
                "{} / {}",
                f(num(&s, "wall_heat_loss_kwh"), 0),
                f(num(&s, "floor_heat_loss_kwh"), 0)
            ),
            "–".into(),
            "",
        );
        row(
            &mut h,
            "frost depth beside the wall (0.5 m)",
            "m",
            f(num(&s, "frost_depth_beside_wall_m"), 2),
            "–".into(),
            "",
        );
    }
    h.push_str("</table>\n");
    if let Ok(bytes) = std::fs::read(dir.join("sizing.json")) {
        if let Ok(z) = serde_json::from_slice::<Value>(&bytes) {
            h.push_str("<h2 id=\"sizing\">Insulation sizing</h2>\n");
            h.push_str(&format!(
                "<p>{}</p>\n",
                escape(z["margin_meaning"].as_str().unwrap_or(""))
            ));
            if let Some(why) = z["no_insulation_needed"].as_str() {
                h.push_str(&format!(
                    "<p><strong>No insulation needed:</strong> {}.</p>\n",
                    escape(why)
                ));
            }
            let dims: Vec<String> = z["dimensions"]
                .as_array()
                .map(|a| a.iter().filter_map(|v| v.as_str().map(escape)).collect())
                .unwrap_or_default();
            h.push_str(&format!("<table>\n<tr><th>{}</th><th>frost margin (m)</th><th>annual heat loss (kWh)</th><th>change (kWh)</th><th>cost per m</th></tr>\n", dims.join(" (m)</th><th>") + " (m)"));
            for d in z["tradeoff"].as_array().cloned().unwrap_or_default() {
                let vals: Vec<String> = d["values"]
                    .as_array()
                    .map(|a| {
                        a.iter()
                            .map(|v| f(v.as_f64().unwrap_or(f64::NAN), 3))
                            .collect()
                    })
                    .unwrap_or_default();
                let mark = if d["values"] == z["chosen"]["values"] {
                    " (chosen)"
                } else {
                    ""
                };
                h.push_str(&format!(
                    "<tr><td class=n>{}{mark}</td><td class=n>{}</td><td class=n>{}</td><td class=n>{}</td><td class=n>{}</td></tr>\n",
                    vals.join("</td><td class=n>"),
                    f(num(&d, "frost_margin_m"), 2),
                    f(num(&d, "annual_heat_loss_kwh"), 0),
                    f(num(&d, "heat_loss_change_kwh"), 0),
                    f(num(&d, "cost_per_m"), 1)
                ));
            }
            h.push_str("</table>\n");
            if let Some(c) = z["corner_requirement"].as_object() {
                h.push_str(&format!(
                    "<p><strong>Corners (not computed):</strong> {} — {}</p>\n",
                    escape(c["rule"].as_str().unwrap_or("")),
                    escape(c["basis"].as_str().unwrap_or(""))
                ));
            }
            for flag in z["flags"].as_array().cloned().unwrap_or_default() {
                h.push_str(&format!(
                    "<p class=\"caution\">{}</p>\n",
                    escape(flag.as_str().unwrap_or(""))
                ));
            }
            h.push_str(&format!(
                "<p class=\"caution\">{}</p>\n",
                escape(z["caution"].as_str().unwrap_or(""))
            ));
        }
    }
    if num(&s, "frost_margin_m") < 0.0 {
        h.push_str("<p class=\"caution\"><strong>Frost reaches below the footing base</strong> in this run.</p>\n");
    }

    h.push_str("<h2 id=\"figures\">Figures</h2>\n");
    for (stem, caption) in FIGURES {
        let p = dir.join(format!("{stem}.png"));
        if let Ok(bytes) = std::fs::read(&p) {
            h.push_str(&format!(
                "<figure id=\"fig-{stem}\"><img alt=\"{}\" src=\"data:image/png;base64,{}\"><figcaption>{}</figcaption></figure>\n",
                escape(caption),
                base64(&bytes),
                escape(caption)
            ));
        }
    }

    h.push_str("<h2 id=\"numerics\">Numerical record</h2>\n<table>\n");
    for (k, label) in [
        ("cells", "solid cells"),
        ("time_steps", "time steps"),
        ("time_step_s", "time step (s)"),
        ("spin_up_years", "spin-up years (at the time step)"),
        (
            "coarse_spin_up_years",
            "extra first spin-up years (5-day steps by default)",
        ),
        ("coarse_year_step_days", "their step (days)"),
        ("spin_up_converged", "spin-up periodic"),
        (
            "periodicity_error_heat_loss_kwh",
            "reported-year heat loss minus the periodic year's (kWh, estimate)",
        ),
        ("newton_iterations_per_step", "Newton iterations per step"),
        ("factorizations", "Cholesky factorisations"),
        (
            "energy_balance_error",
            "energy-balance error (relative, reported year)",
        ),
        ("wall_time_s", "wall time (s)"),
    ] {
        h.push_str(&format!(
            "<tr><td>{}</td><td class=n>{}</td></tr>\n",
            escape(label),
            escape(&match s[k].as_f64() {
                Some(v) if !s[k].is_i64() && !s[k].is_u64() && v.fract() == 0.0 => {
                    format!("{v:.0}")
                }
                Some(v) if !s[k].is_i64() && !s[k].is_u64() && v.abs() < 1e-3 => {
                    format!("{v:.2e}")
                }
                Some(v) if !s[k].is_i64() && !s[k].is_u64() => format!("{v:.4}"),
                _ => s[k].to_string(),
            })
        ));
    }
    h.push_str("</table>\n");

    h.push_str("<h2 id=\"inputs\">Inputs as read</h2>\n");
    h.push_str(&format!(
        "<p>B′ = {:.3} m, A = {:.1} m², P = {:.1} m.</p>\n<pre>{}</pre>\n",
        num(&s, "characteristic_dimension_m"),
        num(&s, "floor_area_m2"),
        num(&s, "exposed_perimeter_m"),
        escape(&case_text)
    ));

    h.push_str("<h2 id=\"cautions\">Cautions</h2>\n<ul>\n");
    for c in [
        crate::report::CAUTION,
        "A 2D section cannot resolve the colder outside corners of a building, where frost goes deeper; corners need their own, conservative protection.",
        "Soil, water content, snow cover, drainage, frost-susceptible fill and construction quality govern real frost behaviour; the model assumes the stated homogeneous strata and climate.",
        "The ISO 13370 U-value shown excludes the wall/floor junction; the model includes it.",
    ] {
        h.push_str(&format!("<li>{}</li>\n", escape(c)));
    }
    h.push_str("</ul>\n</body>\n</html>\n");
    crate::report::write_atomic(dir, "report.html", h.as_bytes())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn base64_rfc4648_vectors() {
        // RFC 4648 §10 test vectors.
        for (i, o) in [
            ("", ""),
            ("f", "Zg=="),
            ("fo", "Zm8="),
            ("foo", "Zm9v"),
            ("foob", "Zm9vYg=="),
            ("fooba", "Zm9vYmE="),
            ("foobar", "Zm9vYmFy"),
        ] {
            assert_eq!(base64(i.as_bytes()), o);
        }
    }
}
