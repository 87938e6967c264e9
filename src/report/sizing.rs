//! The sizing's printed summary and its section of `report.html`, both from `sizing.json`'s
//! contents.
use super::html::escape;
use crate::files::SizingFile;

fn values(v: &[f64], sep: &str, unit: &str) -> String {
    v.iter()
        .map(|x| format!("{x:.3}{unit}"))
        .collect::<Vec<_>>()
        .join(sep)
}

/// A margin or "none" (no frost near the zone).
fn opt(v: Option<f64>) -> String {
    v.map_or("none".into(), |v| format!("{v:.3}"))
}

/// The printed summary.
pub fn text(f: &SizingFile) -> String {
    let mut s = format!(
        "{} — frost-protection sizing\n  {}\n",
        f.case_name, f.margin_meaning
    );
    let b = &f.baseline_without_varied_insulation;
    // An unheated building has no heating load: no heat-loss figures.
    let heat = |kwh: f64, change: Option<f64>| match (f.unheated, change) {
        (true, _) => String::new(),
        (false, None) => format!(", heat loss {kwh:.0} kWh/yr"),
        (false, Some(c)) => {
            format!(", heat loss {kwh:.0} kWh/yr ({c:+.0} against no varied insulation)")
        }
    };
    s += &format!(
        "  without the varied insulation: frost under the footing {:.2} m, margin {:.2} m{}\n",
        b.frost_depth_under_footing_m,
        b.frost_margin_m,
        heat(b.annual_heat_loss_kwh, None)
    );
    if let Some(why) = &f.no_insulation_needed {
        s += &format!("\n  No insulation needed: {why}.\n");
    } else {
        let last = f.dimensions.last().cloned().unwrap_or_default();
        s += &if f.dimensions.len() == 2 {
            format!(
                "\n  Trade-off (least {last} for each {}):\n",
                f.dimensions[0]
            )
        } else {
            format!("\n  Least {last} that meets the margin:\n")
        };
        for d in &f.tradeoff {
            let loss = if f.unheated {
                String::new()
            } else {
                format!(
                    "  heat loss {:>7.0} kWh/yr ({:+.0})",
                    d.annual_heat_loss_kwh, d.heat_loss_change_kwh
                )
            };
            s += &format!(
                "    {:<28} margin {:>6.2} m{loss}  cost {:>7.1} per m\n",
                values(&d.values, " × ", ""),
                d.frost_margin_m,
                d.cost_per_m
            );
        }
        match &f.chosen {
            Some(d) => {
                s += &format!("\n  Chosen (least cost): {} = {}\n", f.dimensions.join(", "), values(&d.values, ", ", " m"));
                s += &format!("    frost margin {:.2} m{}\n", d.frost_margin_m, heat(d.annual_heat_loss_kwh, Some(d.heat_loss_change_kwh)));
            }
            None => s += "\n  No design within the bounds meets the margin: widen the bounds or deepen the footing.\n",
        }
    }
    let c = &f.cross_check;
    s += &format!(
        "\n  Cross-check (design air freezing index {:.0} °C·d):\n",
        c.design_air_freezing_index_c_days
    );
    s += &format!(
        "    modified Berggren open-ground frost depth {:.2} m\n",
        c.modified_berggren_open_ground_frost_depth_m
    );
    for flag in &f.flags {
        s += &format!("    NOTE: {flag}\n");
    }
    s += &format!("\n  {}\n", f.corners);
    if let Some(c) = &f.corner_check {
        s += &format!(
            "\n  Corner check in 3D ({}, {:.2} to {:.2} m by {:.2} m):\n",
            c.dimension, c.range_m[0], c.range_m[1], c.range_m[2]
        );
        for d in &c.designs {
            s += &format!(
                "    {:>6.3} m  least margin {:>6} m  corner margin {:>6} m  corner frost at the face {:.2} m  heat loss {:.0} kWh/yr{}\n",
                d.value_m,
                opt(d.least_margin_m),
                opt(d.corner_margin_m),
                d.corner_face_frost_m,
                d.annual_heat_loss_kwh,
                if d.feasible { "  passes" } else { "" }
            );
        }
        s += &format!("    {}\n", c.note);
        s += &format!(
            "    {} 3D run{}, {:.1} s\n",
            c.runs,
            if c.runs == 1 { "" } else { "s" },
            c.wall_time_s
        );
    }
    s += &format!(
        "\n  {} run{}, median {:.2} s per run, {:.1} s in all\n",
        f.runs,
        if f.runs == 1 { "" } else { "s" },
        f.median_run_s,
        f.wall_time_s
    );
    s += &format!("\n  Caution: {}\n", f.caution);
    s
}

/// The sizing section of `report.html`.
pub fn html(f: &SizingFile) -> String {
    let num = |v: f64, d: usize| {
        if v.is_finite() {
            format!("{v:.d$}")
        } else {
            "–".into()
        }
    };
    let mut h = String::from("<h2 id=\"sizing\">Insulation sizing</h2>\n");
    h += &format!("<p>{}</p>\n", escape(&f.margin_meaning));
    if let Some(why) = &f.no_insulation_needed {
        h += &format!(
            "<p><strong>No insulation needed:</strong> {}.</p>\n",
            escape(why)
        );
    }
    let dims: Vec<String> = f.dimensions.iter().map(|d| escape(d)).collect();
    let heat_heads = if f.unheated {
        ""
    } else {
        "<th>annual heat loss (kWh)</th><th>change (kWh)</th>"
    };
    h += &format!(
        "<table>\n<tr><th>{}</th><th>frost margin (m)</th>{heat_heads}<th>cost per m</th></tr>\n",
        dims.join(" (m)</th><th>") + " (m)"
    );
    for d in &f.tradeoff {
        let vals: Vec<String> = d.values.iter().map(|v| num(*v, 3)).collect();
        let mark = if f.chosen.as_ref().is_some_and(|c| c.values == d.values) {
            " (chosen)"
        } else {
            ""
        };
        let heat_cells = if f.unheated {
            String::new()
        } else {
            format!(
                "<td class=n>{}</td><td class=n>{}</td>",
                num(d.annual_heat_loss_kwh, 0),
                num(d.heat_loss_change_kwh, 0)
            )
        };
        h += &format!(
            "<tr><td class=n>{}{mark}</td><td class=n>{}</td>{heat_cells}<td class=n>{}</td></tr>\n",
            vals.join("</td><td class=n>"),
            num(d.frost_margin_m, 2),
            num(d.cost_per_m, 1)
        );
    }
    h += "</table>\n";
    h += &format!("<p><strong>Corners:</strong> {}</p>\n", escape(&f.corners));
    if let Some(c) = &f.corner_check {
        h += &format!("<h3>Corner check in 3D</h3>\n<table>\n<tr><th>{} (m)</th><th>least margin (m)</th><th>corner margin (m)</th><th>corner frost at the face (m)</th><th>annual heat loss (kWh)</th><th>passes</th></tr>\n", escape(&c.dimension));
        for d in &c.designs {
            h += &format!(
                "<tr><td class=n>{:.3}</td><td class=n>{}</td><td class=n>{}</td><td class=n>{:.2}</td><td class=n>{:.0}</td><td>{}</td></tr>\n",
                d.value_m,
                opt(d.least_margin_m),
                opt(d.corner_margin_m),
                d.corner_face_frost_m,
                d.annual_heat_loss_kwh,
                if d.feasible { "yes" } else { "no" }
            );
        }
        h += &format!("</table>\n<p>{}</p>\n", escape(&c.note));
    }
    for flag in &f.flags {
        h += &format!("<p class=\"caution\">{}</p>\n", escape(flag));
    }
    h += &format!("<p class=\"caution\">{}</p>\n", escape(&f.caution));
    h
}
