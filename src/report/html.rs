//! `report.html`: one self-contained file (plots embedded as data URIs, no network) with the
//! inputs as read, the results with units, the published-method cross-checks side by side, the
//! run's numerical record and the cautions. Built from the files of a run directory.
use crate::error::Result;
use crate::files::{self, Summary, CAUTION, COORDINATES};
use std::path::{Path, PathBuf};

/// The reports' style sheet.
pub(super) const STYLE: &str = "<style>body{font-family:sans-serif;max-width:1100px;margin:2em auto;color:#222;line-height:1.4}\
        table{border-collapse:collapse;margin:1em 0}td,th{border:1px solid #bbb;padding:4px 8px}th{background:#eee}\
        td.n{text-align:right;font-variant-numeric:tabular-nums}.caution{border:2px solid #b33;background:#fff4f0;padding:0.6em 1em}\
        figure{margin:1.5em 0}img{max-width:100%;border:1px solid #ccc}pre{background:#f6f6f6;padding:1em;overflow-x:auto}</style>\n";

/// Standard base64 (RFC 4648 §4, with padding) of `bytes`, by the `base64` crate.
pub fn base64(bytes: &[u8]) -> String {
    use base64::Engine;
    base64::engine::general_purpose::STANDARD.encode(bytes)
}

/// Escape text for HTML.
pub fn escape(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

fn row(out: &mut String, name: &str, unit: &str, model: String, check: String, method: &str) {
    let (model, shown_unit) = super::shown_cell(unit, &model);
    let (check, _) = super::shown_cell(unit, &check);
    let unit = shown_unit.as_str();
    let name = &super::per_length(name);
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
    ("soil_temperature", "Soil temperature on the design day (the least frost margin), over the part of the half-section where it varies; bold black line: frost line, also the boundary of the blue (frozen) shading."),
    ("soil_temperature_zoom", "The same field around the footing."),
    ("foundation_sketch", "The foundation as modelled: every part numbered, with its size and position in the key; the footing base's depth; soil-layer boundaries dashed."),
    ("frost_depth", "Frost depth in open ground and under the footing over the reported year, with the footing base."),
    ("heat_loss", "Monthly ground heat loss of the whole building and the monthly mean outdoor temperature."),
    ("probes", "Temperatures at the named probe points."),
    ("winters", "Deepest frost of every winter of the measured series."),
    ("sizing_tradeoff", "Sizing: the frost margin (one varied dimension) or the least second dimension (two) of each design, and its annual ground heat loss; red circle: the chosen design."),
];

/// `v` with `d` decimals, "–" if not finite.
/// A results-table figure kept exact until the row shows it in the units being rendered
/// ([`super::shown_cell`]): the value and its SI decimals.
fn raw(v: f64, d: usize) -> String {
    if v.is_finite() {
        format!("{v:e}#{d}")
    } else {
        "–".into()
    }
}

pub(super) fn f(v: f64, d: usize) -> String {
    if v.is_finite() {
        format!("{v:.d$}")
    } else {
        "–".into()
    }
}

/// Write `dir/report.html` from the run's files; returns its path.
pub fn write_report(dir: &Path) -> Result<PathBuf> {
    write_report_to(dir, dir)
}

/// Write `out/report.html` from the run's files in `dir`, embedding the plots in `out`.
pub fn write_report_to(dir: &Path, out: &Path) -> Result<PathBuf> {
    let s = files::read_summary(dir)?;
    super::in_units(s.units, || report(dir, out, s))
}

fn report(dir: &Path, out: &Path, s: files::Summary) -> Result<PathBuf> {
    let case_text = files::read_case_copy(dir, &s)?;
    let sizing = files::read_sizing(dir)?;
    let mut h = String::new();
    h.push_str("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n");
    h.push_str(&format!(
        "<title>frostline report: {}</title>\n",
        escape(&s.case_name)
    ));
    h.push_str(STYLE);
    h.push_str("</head>\n<body>\n");
    h.push_str(&format!("<h1>{}</h1>\n", escape(&s.case_name)));
    h.push_str(&format!(
        "<p class=\"caution\"><strong>Caution.</strong> {}</p>\n",
        escape(CAUTION)
    ));
    if let Some(p) = &s.provenance {
        h.push_str(&format!(
            "<p class=\"provenance\">{}; results written {}; case file {} (SHA-256 {}){}.</p>\n",
            escape(&p.tool),
            escape(&p.written_utc),
            escape(&p.case_file),
            escape(&p.case_sha256),
            match (&p.climate_file, &p.climate_sha256) {
                (Some(f), Some(h)) =>
                    format!("; climate file {} (SHA-256 {})", escape(f), escape(h)),
                (Some(f), None) => format!("; climate file {}", escape(f)),
                _ => String::new(),
            }
        ));
    }
    h.push_str(&format!(
        "<p>Coordinates: {}. {}</p>\n",
        escape(COORDINATES),
        escape(&s.note)
    ));
    if let Some(s3) = &s.three_d {
        h.push_str(&super::three::html(s3, out, &super::peak_label(&s))?);
    }
    h.push_str(&results(&s));
    if s.design_winter.is_some() || s.climate.season.is_some() {
        h.push_str(&format!("<p>Periods: {}.</p>\n", escape(&s.periods)));
    }
    if let Some(z) = &sizing {
        h.push_str(&super::sizing::html(z));
    }
    if s.frost_margin_m < 0.0 {
        h.push_str("<p class=\"caution\"><strong>Frost reaches below the footing base</strong> in this run.</p>\n");
    }
    let heading = if s.three_d.is_some() {
        "Figures of the 2D section"
    } else {
        "Figures"
    };
    h.push_str(&figures(out, FIGURES, ("figures", heading))?);
    if !s.unheated {
        h.push_str(&monthly(dir)?);
    }
    h.push_str(&numerics(&s));
    h.push_str(&properties(&s.materials));
    h.push_str("<h2 id=\"inputs\">Inputs as read</h2>\n");
    let show = |label: &str, v: f64, d: usize| {
        let (u, x, p) = super::shown(label, v, d);
        format!("{x:.p$} {u}")
    };
    h.push_str(&format!(
        "<p>B′ = {}, A = {}, P = {}.</p>\n<pre>{}</pre>\n",
        show("m", s.characteristic_dimension_m, 3),
        show("m²", s.floor_area_m2, 1),
        show("m", s.exposed_perimeter_m, 1),
        escape(&case_text)
    ));
    h.push_str("<h2 id=\"cautions\">Cautions</h2>\n<ul>\n");
    for c in [
        CAUTION,
        if s.three_d.is_some() {
            "The 3D model takes the plan as a rectangle with the same foundation detail all round; re-entrant corners, openings, and soil or snow that vary round the building are not modelled."
        } else {
            "A 2D section cannot resolve the colder outside corners of a building, where frost goes deeper; corners need their own check (run the case in 3D with simulation.model = \"3d\")."
        },
        "Soil, water content, snow cover, drainage, frost-susceptible fill and construction quality govern real frost behaviour; the model assumes the stated homogeneous strata and climate.",
        "The ISO 13370 U-value shown excludes the wall/floor junction; the model includes it.",
    ] {
        h.push_str(&format!("<li>{}</li>\n", escape(c)));
    }
    h.push_str("</ul>\n</body>\n</html>\n");
    files::write_atomic(out, "report.html", h.as_bytes())
}

/// The results table: model beside the published methods.
fn results(s: &Summary) -> String {
    let heading = if s.three_d.is_some() {
        "Results of the 2D section (the ISO 13370 equivalent strip)"
    } else {
        "Results"
    };
    let mut h = format!("<h2 id=\"results\">{heading}</h2>\n<table>\n<tr><th>quantity</th><th>unit</th><th>model</th><th>published method</th><th>method</th></tr>\n");
    for r in heat_rows(s)
        .into_iter()
        .chain(frost_rows(s))
        .chain(basement_rows(s))
    {
        row(&mut h, r.0, r.1, r.2, r.3, r.4);
    }
    h.push_str("</table>\n");
    h
}

/// A results row: quantity, unit, model value, published-method value, method.
type Row = (&'static str, &'static str, String, String, &'static str);

fn heat_rows(s: &Summary) -> Vec<Row> {
    if s.unheated {
        return vec![(
            "ground heat loss",
            "",
            "–".into(),
            "–".into(),
            super::text::UNHEATED,
        )];
    }
    let cc = &s.cross_check;
    let opt = |v: Option<f64>, d: usize| raw(v.unwrap_or(f64::NAN), d);
    let mut rows: Vec<Row> = vec![
        (
            "annual ground heat loss (floor and junction)",
            "kWh",
            raw(s.annual_heat_loss_kwh, 0),
            "–".into(),
            "",
        ),
        (
            "mean ground heat loss",
            "W",
            raw(s.mean_heat_loss_w, 1),
            "–".into(),
            "",
        ),
        (
            "peak ground heat loss (daily mean)",
            "W",
            raw(s.peak_heat_loss_w, 1),
            "–".into(),
            "the design winter's, or the chosen measured season's, when the case runs one",
        ),
        (
            "ground heat loss per metre of exposed perimeter",
            "W/m",
            raw(s.heat_loss_per_perimeter_w_per_m, 2),
            "–".into(),
            "",
        ),
        (
            "U-value with the junction, H_g/A",
            "W/(m²·K)",
            opt(s.ground_u_value_incl_junction_w_per_m2k, 3),
            "–".into(),
            "simulated annual mean loss / (A Δθ)",
        ),
    ];
    if s.basement.is_none() {
        rows.push(("floor U-value (no junction)", "W/(m²·K)", opt(s.floor_u_value_w_per_m2k, 3), raw(cc.iso13370_u_value_w_per_m2k, 3), "ISO 13370 slab-on-ground with edge insulation; model: floor-only steady coupling / (B′/2)"));
        rows.push(("wall/floor junction Ψ_g", "W/(m·K)", opt(s.junction_psi_w_per_mk, 3), opt(s.junction_psi_iso13370_basis_w_per_mk, 3), "L2D − wall 1D part − floor part (ISO 10211 / ISO 14683 definition); model: with the model's floor U, published-method column: with the ISO 13370 U (use each Ψ_g with its own U)"));
    }
    rows.push((
        "foundation wall above the floor: U-value (1D)",
        "W/(m²·K)",
        opt(s.wall_above_ground_u_value_w_per_m2k, 3),
        "–".into(),
        "its own line, not in the ground heat loss",
    ));
    rows.push((
        "foundation wall above the floor: annual loss",
        "kWh",
        raw(s.wall_above_ground_heat_loss_kwh, 1),
        "–".into(),
        "",
    ));
    rows
}

fn frost_rows(s: &Summary) -> Vec<Row> {
    let cc = &s.cross_check;
    let board = crate::run::frost::bears_on_board(s.footing_base_depth_m, s.bearing_depth_m);
    vec![
        (
            "frost depth, open ground",
            "m",
            raw(s.frost_depth_open_ground_m, 2),
            format!(
                "{} / {}",
                raw(cc.stefan_frost_depth_m, 2),
                raw(cc.modified_berggren_frost_depth_m, 2)
            ),
            "Stefan / modified Berggren, n = 1",
        ),
        ("frost depth at the footing's outer face", "m", raw(s.frost_depth_at_footing_face_m, 2), "–".into(), ""),
        (if board { "frost depth below the footing's board" } else { "frost depth below the footing base" }, "m", raw(s.frost_depth_under_footing_m, 2), "–".into(), "0: no frozen soil under the footing"),
        (if super::current() == crate::files::us::Units::Us { "frost depth beside the wall (within 1.64 ft)" } else { "frost depth beside the wall (within 0.5 m)" }, "m", raw(s.frost_depth_beside_wall_m, 2), "–".into(), "frozen backfill above a footing counts here, not under the footing"),
        ("footing base depth", "m", raw(s.footing_base_depth_m, 2), "–".into(), if board { "the footing bears on an insulation board" } else { "" }),
        ("bearing soil depth", "m", raw(s.bearing_depth_m, 2), "–".into(), if board { "the board's underside: the protected zone starts here" } else { "the footing base" }),
        ("frost line's closest approach to the outer base corner", "m", raw(s.frost_distance_to_base_corner_m.unwrap_or(f64::NAN), 2), "–".into(), ""),
        ("frost margin to the protected zone", "m", raw(s.frost_margin_m, 2), "–".into(), "zone below the base spreading at protected_zone_angle_deg from each base corner; negative: frost in the zone"),
        (
            "day of the least frost margin (the field shown)",
            "day of year",
            s.design_day_of_year.to_string(),
            "–".into(),
            "",
        ),
        (
            "surface freezing index (n-factor × air index)",
            "°C·d",
            "–".into(),
            raw(cc.freezing_index_c_days, 0),
            "design year, or the coldest winter of a series",
        ),
    ]
}

fn basement_rows(s: &Summary) -> Vec<Row> {
    let (Some(b), Some(bc)) = (&s.basement, &s.cross_check.basement) else {
        return Vec::new();
    };
    vec![
        (
            "basement floor U-value",
            "W/(m²·K)",
            raw(b.basement_floor_u_value_w_per_m2k, 3),
            raw(bc.iso13370_basement_floor_u_value_w_per_m2k, 3),
            "ISO 13370 heated basement floor",
        ),
        (
            "basement wall U-value (below ground)",
            "W/(m²·K)",
            raw(b.wall_u_value_w_per_m2k, 3),
            raw(bc.iso13370_wall_u_value_w_per_m2k, 3),
            "ISO 13370 basement wall (height-weighted for partial insulation)",
        ),
        (
            "effective U-value",
            "W/(m²·K)",
            raw(b.effective_u_value_w_per_m2k, 3),
            raw(bc.iso13370_effective_u_value_w_per_m2k, 3),
            "ISO 13370 U′ over A + z·P",
        ),
        (
            "wall / floor heat loss",
            "kWh",
            format!(
                "{} / {}",
                raw(b.wall_heat_loss_kwh, 0),
                raw(b.floor_heat_loss_kwh, 0)
            ),
            "–".into(),
            "",
        ),
    ]
}

/// Whether `bytes` is a whole PNG file: the signature, and the IEND chunk at the end (a
/// truncated file lacks it). PNG specification (ISO/IEC 15948), §5.2 and §11.2.5.
fn whole_png(bytes: &[u8]) -> bool {
    const SIGNATURE: [u8; 8] = [137, 80, 78, 71, 13, 10, 26, 10];
    const IEND: [u8; 12] = [0, 0, 0, 0, b'I', b'E', b'N', b'D', 0xAE, 0x42, 0x60, 0x82];
    bytes.starts_with(&SIGNATURE) && bytes.ends_with(&IEND)
}

/// The width in CSS pixels (96 per inch, CSS Values and Units Level 3 §5.2) of a PNG: its pixel
/// width (IHDR) at the density of its pHYs chunk (pixels per metre), or None without one. PNG
/// specification (ISO/IEC 15948) §11.2.2 and §11.3.5.3.
fn css_width(bytes: &[u8]) -> Option<u32> {
    let be = |i: usize| -> Option<u32> {
        Some(u32::from_be_bytes(bytes.get(i..i + 4)?.try_into().ok()?))
    };
    let width = be(16)?;
    let at = bytes.windows(4).position(|w| w == b"pHYs")?;
    let (ppu, unit) = (be(at + 4)?, *bytes.get(at + 12)?);
    (unit == 1 && ppu > 0).then(|| (width as f64 * 96.0 / (ppu as f64 * 0.0254)).round() as u32)
}

/// The embedded figures that exist in `dir`; a damaged one is an error naming it.
pub(super) fn figures(
    dir: &Path,
    list: &[(&str, &str)],
    (id, heading): (&str, &str),
) -> Result<String> {
    let mut h = format!("<h2 id=\"{id}\">{heading}</h2>\n");
    for (stem, caption) in list {
        let name = format!("{stem}.png");
        if let Ok(bytes) = std::fs::read(dir.join(&name)) {
            if !whole_png(&bytes) {
                return Err(files::bad_file(dir, &name, "a damaged or truncated PNG"));
            }
            // Shown at the figure's layout size whatever its print resolution.
            let width = css_width(&bytes).map_or(String::new(), |w| format!(" width=\"{w}\""));
            h.push_str(&format!(
                "<figure id=\"fig-{stem}\"><img{width} alt=\"{}\" src=\"data:image/png;base64,{}\"><figcaption>{}</figcaption></figure>\n",
                escape(caption),
                base64(&bytes),
                escape(caption)
            ));
        }
    }
    Ok(h)
}

/// The table of the properties the model used, material by material.
fn properties(m: &[files::summary::MaterialInfo]) -> String {
    if m.is_empty() {
        return String::new();
    }
    // In US units through the outputs' conversion of keys (files::us::convert: k in
    // Btu·in/(h·ft²·°F), C in Btu/(ft³·°F), L in Btu/ft³, NIST SP 811 B.9); the interval in °F.
    let us = super::current() == crate::files::us::Units::Us;
    let (k_u, c_u, l_u, t_u) = if us {
        (
            ("Btu·in/(h·ft²·°F)", "k_w_per_mk", 3),
            ("Btu/(ft³·°F)", "c_j_per_m3k", 2),
            ("Btu/ft³", "l_j_per_m3", 0),
            "°F",
        )
    } else {
        (
            ("W/(m·K)", "", 3),
            ("MJ/(m³·K)", "", 3),
            ("MJ/m³", "", 1),
            "°C",
        )
    };
    // SI figures as shown: MJ for the capacities, the key's US value in US units.
    let shown =
        |(_, key, _): (&str, &str, usize), v: f64, mega: bool| match crate::files::us::convert(
            key, v,
        ) {
            Some((_, x)) if us => x,
            _ if mega => v / 1e6,
            _ => v,
        };
    let temp = |c: f64| if us { c * 1.8 + 32.0 } else { c };
    let mut h = format!(
        "<h2 id=\"properties\">Properties used</h2>\n<p>As derived from the case (library soils, \
         index properties, explicit values, defaults); C is the volumetric heat capacity, L the \
         latent heat of the pore water per volume of ground.</p>\n<table>\n<tr><th>where</th>\
         <th>material</th><th>k unfrozen<br>{k}</th><th>k frozen<br>{k}</th>\
         <th>C unfrozen<br>{c}</th><th>C frozen<br>{c}</th><th>L<br>{l}</th>\
         <th>freezing interval<br>{t_u}</th></tr>\n",
        k = k_u.0,
        c = c_u.0,
        l = l_u.0
    );
    for x in m {
        let interval = match x.freezing_interval_c {
            Some([a, b]) if x.tabulated_freezing_curve => {
                format!("{:.2} to {:.2} (tabulated curve)", temp(a), temp(b))
            }
            Some([a, b]) => format!("{:.2} to {:.2}", temp(a), temp(b)),
            None => "does not freeze".into(),
        };
        h.push_str(&format!(
            "<tr><td>{}</td><td>{}</td><td class=\"n\">{}</td><td class=\"n\">{}</td>\
             <td class=\"n\">{}</td><td class=\"n\">{}</td><td class=\"n\">{}</td><td>{}</td></tr>\n",
            escape(&x.role),
            escape(&x.name),
            f(shown(k_u, x.k_unfrozen_w_per_mk, false), k_u.2),
            f(shown(k_u, x.k_frozen_w_per_mk, false), k_u.2),
            f(shown(c_u, x.c_unfrozen_j_per_m3k, true), c_u.2),
            f(shown(c_u, x.c_frozen_j_per_m3k, true), c_u.2),
            f(shown(l_u, x.latent_heat_j_per_m3, true), l_u.2),
            escape(&interval)
        ));
    }
    h.push_str("</table>\n");
    h
}

/// The monthly results as a table (from monthly.csv): the chart's numbers.
fn monthly(dir: &Path) -> Result<String> {
    let rows: Vec<files::tables::MonthlyRow> = files::tables::read_rows(dir, "monthly.csv")?;
    const NAMES: [&str; 12] = [
        "January",
        "February",
        "March",
        "April",
        "May",
        "June",
        "July",
        "August",
        "September",
        "October",
        "November",
        "December",
    ];
    // Each figure in the units being rendered (an SI unit label and the SI value).
    let cell = super::shown_number;
    let unit = |si: &str| super::shown(si, 0.0, 0).0.to_string();
    let mut h = format!("<h2 id=\"monthly\">Monthly results (2D section, whole building)</h2>\n<table>\n<tr><th>month</th><th>ground heat loss ({})</th><th>mean outdoor air ({})</th><th>deepest frost, open ground ({})</th><th>deepest frost at the footing face ({})</th></tr>\n", unit("kWh"), unit("°C"), unit("m"), unit("m"));
    for r in &rows {
        h += &format!(
            "<tr><td>{}</td><td class=n>{}</td><td class=n>{}</td><td class=n>{}</td><td class=n>{}</td></tr>\n",
            NAMES.get(r.month.wrapping_sub(1)).unwrap_or(&"?"),
            cell("kWh", r.ground_heat_loss_kwh, 1),
            cell("°C", r.mean_outdoor_temperature_c, 1),
            cell("m", r.max_frost_depth_open_ground_m, 2),
            cell("m", r.max_frost_depth_at_footing_face_m, 2)
        );
    }
    let total: f64 = rows.iter().map(|r| r.ground_heat_loss_kwh).sum();
    h += &format!(
        "<tr><th>year</th><th class=n>{}</th><th></th><th></th><th></th></tr>\n</table>\n",
        cell("kWh", total, 0)
    );
    Ok(h)
}

/// The numerical record.
fn numerics(s: &Summary) -> String {
    let g = |v: f64| {
        if v.fract() == 0.0 {
            format!("{v:.0}")
        } else if v.abs() < 1e-3 {
            format!("{v:.2e}")
        } else {
            format!("{v:.4}")
        }
    };
    let rows: [(&str, String); 12] = [
        ("solid cells", s.cells.to_string()),
        ("time steps", s.time_steps.to_string()),
        ("time step (s)", g(s.time_step_s)),
        (
            "spin-up years (at the time step)",
            s.spin_up_years.to_string(),
        ),
        (
            "extra first spin-up years (5-day steps by default)",
            s.coarse_spin_up_years.to_string(),
        ),
        ("their step (days)", s.coarse_year_step_days.to_string()),
        ("spin-up periodic", s.spin_up_converged.to_string()),
        (
            "reported-year heat loss minus the periodic year's (kWh, estimate)",
            s.periodicity_error_heat_loss_kwh.map_or("null".into(), g),
        ),
        (
            "Newton iterations per step",
            g(s.newton_iterations_per_step),
        ),
        ("Cholesky factorisations", s.factorizations.to_string()),
        (
            "energy-balance error (relative, reported year)",
            g(s.energy_balance_error),
        ),
        ("wall time (s)", g(s.wall_time_s)),
    ];
    let mut h = String::from("<h2 id=\"numerics\">Numerical record</h2>\n<table>\n");
    for (label, v) in rows {
        h.push_str(&format!(
            "<tr><td>{}</td><td class=n>{}</td></tr>\n",
            escape(label),
            escape(&v)
        ));
    }
    h.push_str("</table>\n");
    h
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A PNG is whole with its signature and IEND trailer (PNG spec §5.2, §11.2.5); cut short
    /// or not a PNG, it is not.
    #[test]
    fn whole_png_needs_signature_and_iend() {
        let mut png = Vec::new();
        {
            let mut enc = png::Encoder::new(&mut png, 2, 1);
            enc.set_color(png::ColorType::Rgb);
            enc.write_header()
                .unwrap()
                .write_image_data(&[0; 6])
                .unwrap();
        }
        assert!(whole_png(&png));
        assert!(!whole_png(&png[..png.len() - 1]));
        assert!(!whole_png(&png[1..]));
        assert!(!whole_png(b""));
    }

    /// A 300 dpi image of 3125 px shows at 1000 CSS px (96 px per inch, CSS Values 3 §5.2),
    /// one without pHYs at its own size (None: no width attribute).
    #[test]
    fn css_width_from_phys() {
        let make = |w: u32, ppm: Option<u32>| {
            let mut png = Vec::new();
            {
                let mut enc = png::Encoder::new(&mut png, w, 1);
                enc.set_color(png::ColorType::Rgb);
                enc.set_pixel_dims(ppm.map(|p| png::PixelDimensions {
                    xppu: p,
                    yppu: p,
                    unit: png::Unit::Meter,
                }));
                enc.write_header()
                    .unwrap()
                    .write_image_data(&vec![0; 3 * w as usize])
                    .unwrap();
            }
            png
        };
        // 300 dpi = 300 / 0.0254 m = 11,811 px/m.
        assert_eq!(css_width(&make(3125, Some(11_811))), Some(1000));
        assert_eq!(css_width(&make(900, Some(3780))), Some(900));
        assert_eq!(css_width(&make(900, None)), None);
    }

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
