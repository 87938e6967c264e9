//! The sizing's printed summary and its section of `report.html`, both from `sizing.json`'s
//! contents.
use super::html::escape;
use crate::files::SizingFile;

/// A length (m) in the units being rendered, `d` decimals in m (more in ft), without its unit.
fn len(v: f64, d: usize) -> String {
    let (_, x, p) = super::shown("m", v, d);
    format!("{x:.p$}")
}

/// The length unit being rendered ("m" or "ft").
fn lu() -> &'static str {
    super::shown("m", 0.0, 0).0
}

/// An annual energy (kWh) in the units being rendered, rounded, and its unit.
fn energy(kwh: f64) -> (f64, &'static str) {
    let (u, x, _) = super::shown("kWh", kwh, 0);
    (x, u)
}

fn values(v: &[f64], sep: &str, unit: &str) -> String {
    v.iter()
        .map(|x| format!("{}{unit}", len(*x, 3)))
        .collect::<Vec<_>>()
        .join(sep)
}

/// A margin or "none" (no frost near the zone).
fn opt(v: Option<f64>) -> String {
    v.map_or("none".into(), |v| len(v, 3))
}

/// A sentence of the sizing (built in SI) with its lengths ("0.40 m") in the units being
/// rendered: each number followed by " m" (and not by another letter) becomes that many feet.
fn lengths_shown(text: &str) -> String {
    if lu() == "m" {
        return text.to_string();
    }
    let b = text.as_bytes();
    let mut out = String::new();
    let mut k = 0;
    while k < b.len() {
        let start_ok = k == 0 || !(b[k - 1].is_ascii_alphanumeric() || b[k - 1] == b'.');
        if start_ok
            && (b[k].is_ascii_digit()
                || (b[k] == b'-' && k + 1 < b.len() && b[k + 1].is_ascii_digit()))
        {
            let mut e = k + 1;
            while e < b.len() && (b[e].is_ascii_digit() || b[e] == b'.') {
                e += 1;
            }
            let unit_here = text[e..].starts_with(" m")
                && !text[e + 2..]
                    .starts_with(|c: char| c.is_alphanumeric() || c == '²' || c == '³');
            if let (true, Ok(v)) = (unit_here, text[k..e].parse::<f64>()) {
                out += &format!("{} {}", len(v, 2), lu());
                k = e + 2;
                continue;
            }
            out += &text[k..e];
            k = e;
            continue;
        }
        let ch = text[k..].chars().next().unwrap_or(' ');
        out.push(ch);
        k += ch.len_utf8();
    }
    out
}

/// The margin's meaning, its required value in the units being rendered.
fn meaning(f: &SizingFile) -> String {
    let si = format!("at least {:.2} m,", f.margin_m);
    let shown = format!("at least {} {},", len(f.margin_m, 2), lu());
    f.margin_meaning.replace(&si, &shown)
}

/// The printed summary.
pub fn text(f: &SizingFile) -> String {
    let mut s = format!(
        "{} — frost-protection sizing\n  {}\n",
        f.case_name,
        meaning(f)
    );
    let b = &f.baseline_without_varied_insulation;
    // An unheated building has no heating load: no heat-loss figures.
    let heat = |kwh: f64, change: Option<f64>| {
        let (e, u) = energy(kwh);
        match (f.unheated, change) {
            (true, _) => String::new(),
            (false, None) => format!(", heat loss {e:.0} {u}/yr"),
            (false, Some(c)) => format!(
                ", heat loss {e:.0} {u}/yr ({:+.0} against no varied insulation)",
                energy(c).0
            ),
        }
    };
    s += &format!(
        "  without the varied insulation: frost under the footing {} {u}, margin {} {u}{}\n",
        len(b.frost_depth_under_footing_m, 2),
        len(b.frost_margin_m, 2),
        heat(b.annual_heat_loss_kwh, None),
        u = lu()
    );
    if let Some(why) = &f.no_insulation_needed {
        s += &format!("\n  No insulation needed: {}.\n", lengths_shown(why));
    } else {
        let dims: Vec<String> = f.dimensions.iter().map(|d| super::key_shown(d)).collect();
        let last = dims.last().cloned().unwrap_or_default();
        s += &if dims.len() == 2 {
            format!("\n  Trade-off (least {last} for each {}):\n", dims[0])
        } else {
            format!("\n  Least {last} that meets the margin:\n")
        };
        for d in &f.tradeoff {
            let loss = if f.unheated {
                String::new()
            } else {
                let ((e, u), c) = (
                    energy(d.annual_heat_loss_kwh),
                    energy(d.heat_loss_change_kwh).0,
                );
                format!("  heat loss {e:>7.0} {u}/yr ({c:+.0})")
            };
            s += &format!(
                "    {:<28} margin {:>6} {}{loss}  cost {:>7.1} per m\n",
                values(&d.values, " × ", ""),
                len(d.frost_margin_m, 2),
                lu(),
                d.cost_per_m
            );
        }
        match &f.chosen {
            Some(d) => {
                s += &format!("\n  Chosen (least cost): {} = {}\n", dims.join(", "), values(&d.values, ", ", &format!(" {}", lu())));
                s += &format!("    frost margin {} {}{}\n", len(d.frost_margin_m, 2), lu(), heat(d.annual_heat_loss_kwh, Some(d.heat_loss_change_kwh)));
            }
            None => s += "\n  No design within the bounds meets the margin: widen the bounds or deepen the footing.\n",
        }
    }
    let c = &f.cross_check;
    let (fi_unit, fi, _) = super::shown("°C·d", c.design_air_freezing_index_c_days, 0);
    s += &format!("\n  Cross-check (design air freezing index {fi:.0} {fi_unit}):\n");
    s += &format!(
        "    modified Berggren open-ground frost depth {} {}\n",
        len(c.modified_berggren_open_ground_frost_depth_m, 2),
        lu()
    );
    for flag in &f.flags {
        s += &format!("    NOTE: {}\n", lengths_shown(flag));
    }
    s += &format!("\n  {}\n", f.corners);
    if let Some(c) = &f.corner_check {
        let u = lu();
        s += &format!(
            "\n  Corner check in 3D ({}, {} to {} {u} by {} {u}):\n",
            super::key_shown(&c.dimension),
            len(c.range_m[0], 2),
            len(c.range_m[1], 2),
            len(c.range_m[2], 2)
        );
        for d in &c.designs {
            let loss = if f.unheated {
                String::new()
            } else {
                let (e, eu) = energy(d.annual_heat_loss_kwh);
                format!("  heat loss {e:.0} {eu}/yr")
            };
            s += &format!(
                "    {:>6} {u}  least margin {:>6} {u}  corner margin {:>6} {u}  corner frost at the face {} {u}{loss}{}\n",
                len(d.value_m, 3),
                opt(d.least_margin_m),
                opt(d.corner_margin_m),
                len(d.corner_face_frost_m, 2),
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
    h += &format!("<p>{}</p>\n", escape(&meaning(f)));
    if let Some(why) = &f.no_insulation_needed {
        h += &format!(
            "<p><strong>No insulation needed:</strong> {}.</p>\n",
            escape(&lengths_shown(why))
        );
    }
    let dims: Vec<String> = f
        .dimensions
        .iter()
        .map(|d| escape(&super::key_shown(d)))
        .collect();
    let (u, eu) = (lu(), energy(0.0).1);
    let heat_heads = if f.unheated {
        String::new()
    } else {
        format!("<th>annual heat loss ({eu})</th><th>change ({eu})</th>")
    };
    h += &format!(
        "<table>\n<tr><th>{}</th><th>frost margin ({u})</th>{heat_heads}<th>cost per m</th></tr>\n",
        dims.join(&format!(" ({u})</th><th>")) + &format!(" ({u})")
    );
    for d in &f.tradeoff {
        let vals: Vec<String> = d.values.iter().map(|v| len(*v, 3)).collect();
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
                num(energy(d.annual_heat_loss_kwh).0, 0),
                num(energy(d.heat_loss_change_kwh).0, 0)
            )
        };
        h += &format!(
            "<tr><td class=n>{}{mark}</td><td class=n>{}</td>{heat_cells}<td class=n>{}</td></tr>\n",
            vals.join("</td><td class=n>"),
            len(d.frost_margin_m, 2),
            num(d.cost_per_m, 1)
        );
    }
    h += "</table>\n";
    h += &format!("<p><strong>Corners:</strong> {}</p>\n", escape(&f.corners));
    if let Some(c) = &f.corner_check {
        let heat_head = if f.unheated {
            String::new()
        } else {
            format!("<th>annual heat loss ({eu})</th>")
        };
        h += &format!("<h3>Corner check in 3D</h3>\n<table>\n<tr><th>{} ({u})</th><th>least margin ({u})</th><th>corner margin ({u})</th><th>corner frost at the face ({u})</th>{heat_head}<th>passes</th></tr>\n", escape(&super::key_shown(&c.dimension)));
        for d in &c.designs {
            let heat = if f.unheated {
                String::new()
            } else {
                format!("<td class=n>{:.0}</td>", energy(d.annual_heat_loss_kwh).0)
            };
            h += &format!(
                "<tr><td class=n>{}</td><td class=n>{}</td><td class=n>{}</td><td class=n>{}</td>{heat}<td>{}</td></tr>\n",
                len(d.value_m, 3),
                opt(d.least_margin_m),
                opt(d.corner_margin_m),
                len(d.corner_face_frost_m, 2),
                if d.feasible { "yes" } else { "no" }
            );
        }
        h += &format!("</table>\n<p>{}</p>\n", escape(&c.note));
    }
    for flag in &f.flags {
        h += &format!(
            "<p class=\"caution\">{}</p>\n",
            escape(&lengths_shown(flag))
        );
    }
    h += &format!("<p class=\"caution\">{}</p>\n", escape(&f.caution));
    h
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::files::us::Units;

    /// Lengths in a sentence built in SI, shown in feet (1 ft = 0.3048 m): numbers followed by
    /// " m" only, not "mm", "m²" or other words.
    #[test]
    fn sentence_lengths_in_feet() {
        let s = "frost depth of 0.09 m, above the footing base (0.40 m); 2 m² and 5 mm stay, -0.30 m too";
        let us = crate::report::in_units(Units::Us, || lengths_shown(s));
        assert_eq!(
            us,
            "frost depth of 0.30 ft, above the footing base (1.31 ft); 2 m² and 5 mm stay, -0.98 ft too"
        );
        assert_eq!(crate::report::in_units(Units::Si, || lengths_shown(s)), s);
    }

    /// A varied key is named as a US case file names it (its value is shown in feet beside it).
    #[test]
    fn dimension_names_in_us_units() {
        let us = |k: &str| crate::report::in_units(Units::Us, || crate::report::key_shown(k));
        assert_eq!(us("wing.width_m"), "wing.width_ft");
        assert_eq!(us("corner[0].length_m"), "corner[0].length_ft");
        assert_eq!(
            crate::report::in_units(Units::Si, || crate::report::key_shown("wing.width_m")),
            "wing.width_m"
        );
    }
}
