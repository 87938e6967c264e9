//! The text the command line prints: the result table of a run (from its summary, so terminal,
//! JSON and report agree), the `check` overview, the climate statistics and a soil's properties.
use crate::case::{Case, ClimateSource};
use crate::error::Result;
use crate::files::three::Summary3;
use crate::files::{Summary, CAUTION};
use crate::physics::climate::ClimateSummary;
use crate::physics::library::{soil_properties, KMethod, SoilFile};

/// An SI figure with its unit, in the units being rendered ("5.23 m", "17.2 ft").
fn value(v: f64, si: &str, prec: usize) -> String {
    let (u, x, d) = super::shown(si, v, prec);
    format!("{x:.d$} {u}")
}

/// Width of a row's label and unit: 35 characters, 45 for the longer US unit names.
fn label_width() -> usize {
    match super::current() {
        crate::files::us::Units::Si => 35,
        crate::files::us::Units::Us => 45,
    }
}

/// A block's heading, its column titles over the rows' values.
fn head(title: &str, columns: &str) -> String {
    let w = label_width() + 9;
    format!("\n  {title:<w$}{columns}\n")
}

/// One row of a result table: label and unit in [`label_width`] characters, then each value in
/// 10, with `prec` decimals ("–" for a value that is not finite), in the units being rendered.
fn row(label: &str, unit: &str, prec: usize, vals: &[f64]) -> String {
    let si = unit;
    let unit = super::shown(si, 0.0, prec).0;
    let label = &super::per_length(label);
    let w = label_width().saturating_sub(unit.chars().count());
    let mut s = format!("    {label:<w$}{unit}");
    for v in vals {
        let (_, v, prec) = super::shown(si, *v, prec);
        if v.is_finite() {
            s += &format!("  {v:>10.prec$}");
        } else {
            s += &format!("  {:>10}", "–");
        }
    }
    s + "\n"
}

/// The short result table printed after a run.
pub fn result_table(s: &Summary) -> String {
    super::in_units(s.units, || table(s))
}

fn table(s: &Summary) -> String {
    let mut t = format!("{}\n", s.case_name);
    if let Some(three) = &s.three_d {
        t += &three_rows(three, &super::peak_label(s));
        t += "\n  2D section (ISO 13370 equivalent strip) of the same case:\n";
    }
    t += &format!(
        "  B' = {}, A = {}, P = {} (whole-building = {} section × P)\n",
        value(s.characteristic_dimension_m, "m", 2),
        value(s.floor_area_m2, "m²", 1),
        value(s.exposed_perimeter_m, "m", 1),
        super::per_length("per-metre")
    );
    t += &heat_rows(s);
    t += &frost_rows(s);
    t += &basement_rows(s);
    if s.design_winter.is_some() || s.climate.season.is_some() {
        t += &format!("\n  Periods: {}.\n", s.periods);
    }
    t += &numerics_line(s);
    t += &format!("\n  Caution: {CAUTION}\n");
    t
}

/// The 3D block: whole-building heat loss and the frost along the perimeter, with the 2D strip
/// beside.
fn three_rows(s: &Summary3, peak: &str) -> String {
    let (h, two, c) = (&s.headline, &s.section_2d, &s.coupling);
    let nan = f64::NAN;
    let mut t = format!(
        "  3D model: quarter of a {} × {} plan (exterior faces), corners included{}\n",
        super::shown_length(s.plan_length_m),
        super::shown_length(s.plan_width_m),
        if s.corner_pieces > 0 {
            format!(", {} corner insulation piece(s)", s.corner_pieces)
        } else {
            String::new()
        }
    );
    t += &head(
        "Heat loss to the ground (floor + junction)",
        "3D model   2D strip",
    );
    t += &row(
        "annual",
        "kWh",
        0,
        &[h.annual_heat_loss_kwh, two.annual_heat_loss_kwh],
    );
    t += &row("mean", "W", 1, &[h.mean_heat_loss_w, two.mean_heat_loss_w]);
    t += &row(peak, "W", 1, &[h.peak_heat_loss_w, two.peak_heat_loss_w]);
    t += &row(
        "floor U-value (no junction)",
        "W/(m²K)",
        3,
        &[
            h.floor_u_value_w_per_m2k.unwrap_or(nan),
            two.floor_u_value_w_per_m2k.unwrap_or(nan),
        ],
    );
    t += &row(
        "junction Ψ_g (3D: + corners)",
        "W/(mK)",
        3,
        &[
            h.junction_psi_w_per_mk.unwrap_or(nan),
            two.junction_psi_w_per_mk.unwrap_or(nan),
        ],
    );
    t += &row("steady H_g = A U + P Ψ_g", "W/K", 1, &[c.h_g_w_per_k]);
    t += &format!(
        "\n  {:<w$}mid long   mid short      corner  2D section\n",
        "Frost (depths below ground level)",
        w = label_width() + 4
    );
    let (ml, ms, co) = (&s.mid_long_wall, &s.mid_short_wall, &s.corner);
    t += &row(
        "at the footing's outer face",
        "m",
        2,
        &[
            ml.face_m,
            ms.face_m,
            co.face_m,
            two.frost_depth_at_footing_face_m,
        ],
    );
    t += &row(
        "below the footing base",
        "m",
        2,
        &[
            ml.under_footing_m,
            ms.under_footing_m,
            co.under_footing_m,
            two.frost_depth_under_footing_m,
        ],
    );
    t += &row(
        &format!("beside the wall (within {})", super::beside_wall_reach()),
        "m",
        2,
        &[
            ml.beside_wall_m,
            ms.beside_wall_m,
            co.beside_wall_m,
            two.frost_depth_beside_wall_m,
        ],
    );
    t += &row(
        "margin to the protected zone",
        "m",
        2,
        &[ml.margin_m, ms.margin_m, co.margin_m, two.frost_margin_m],
    );
    t += &row("open ground", "m", 2, &[h.frost_depth_open_ground_m]);
    if let Some(w) = &s.worst_point {
        t += &format!(
            "    least margin {} at X = {}, Y = {}, z = {}, day {}{}\n",
            super::shown_length(w.margin_m),
            super::shown_length(w.x_m),
            super::shown_length(w.y_m),
            super::shown_length(w.z_m),
            w.day_of_year,
            if w.margin_m < 0.0 {
                ": FROST IN THE PROTECTED ZONE"
            } else {
                ""
            }
        );
    }
    t += &format!(
        "\n  3D numerics: {} × {} × {} grid, {} unknowns, {} steps, spin-up {} year(s) from the 2D periodic state ({}), {:.2} Newton iterations/step, {:.1} CG iterations/solve (max {}; linear solver {}), energy balance {:.1e}, {:.1} s\n",
        s.grid[0], s.grid[1], s.grid[2], s.unknowns, s.time_steps, s.spin_up_years,
        if s.spin_up_converged { "periodic" } else { "NOT periodic: raise simulation.max_spin_up_years" },
        s.newton_iterations_per_step, s.cg_iterations_per_solve, s.max_cg_iterations, s.solver_3d.name(),
        s.energy_balance_error, s.wall_time_s
    );
    t
}

/// The note shown instead of the heat-loss block for an unheated building.
pub const UNHEATED: &str = "Unheated building: the indoor air follows the outdoor air, so there is no ground heat loss to report; the heated-floor methods (ISO 13370 U-value and Ψ_g) do not apply and are not shown.";

fn heat_rows(s: &Summary) -> String {
    if s.unheated {
        return format!("\n  {UNHEATED}\n");
    }
    let c = &s.cross_check;
    let nan = f64::NAN;
    let mut t = head(
        "Heat loss to the ground (floor + junction)",
        "model      ISO 13370",
    );
    t += &row("annual", "kWh", 0, &[s.annual_heat_loss_kwh]);
    t += &row("mean", "W", 1, &[s.mean_heat_loss_w]);
    t += &row(&super::peak_label(s), "W", 1, &[s.peak_heat_loss_w]);
    t += &row(
        "per metre of exposed perimeter",
        "W/m",
        2,
        &[s.heat_loss_per_perimeter_w_per_m],
    );
    t += &row(
        "U with the junction, H_g/A",
        "W/(m²K)",
        3,
        &[s.ground_u_value_incl_junction_w_per_m2k.unwrap_or(nan)],
    );
    if s.basement.is_none() {
        t += &row(
            "floor U-value (no junction)",
            "W/(m²K)",
            3,
            &[
                s.floor_u_value_w_per_m2k.unwrap_or(nan),
                c.iso13370_u_value_w_per_m2k,
            ],
        );
        t += &row(
            "wall/floor junction Ψ_g",
            "W/(mK)",
            3,
            &[
                s.junction_psi_w_per_mk.unwrap_or(nan),
                s.junction_psi_iso13370_basis_w_per_mk.unwrap_or(nan),
            ],
        );
        t += "    (Ψ_g goes with the U above it: model U with model Ψ_g, ISO 13370 U with the ISO-basis Ψ_g)\n";
    }
    t += &format!(
        "\n  Foundation wall above {} ({}, 1D, not in the ground loss)\n",
        if s.basement.is_some() {
            "ground"
        } else {
            "the floor"
        },
        value(s.wall_above_ground_height_m, "m", 2)
    );
    t += &row(
        "U-value",
        "W/(m²K)",
        3,
        &[s.wall_above_ground_u_value_w_per_m2k.unwrap_or(nan)],
    );
    t += &row("annual", "kWh", 0, &[s.wall_above_ground_heat_loss_kwh]);
    t
}

fn frost_rows(s: &Summary) -> String {
    let c = &s.cross_check;
    let mut t = head(
        "Frost (depths below ground level)",
        "model      Stefan  mod. Berggren",
    );
    t += &row(
        "open ground",
        "m",
        2,
        &[
            s.frost_depth_open_ground_m,
            c.stefan_frost_depth_m,
            c.modified_berggren_frost_depth_m,
        ],
    );
    t += &row(
        "at the footing's outer face",
        "m",
        2,
        &[s.frost_depth_at_footing_face_m],
    );
    let board = crate::run::frost::bears_on_board(s.footing_base_depth_m, s.bearing_depth_m);
    t += &row(
        if board {
            "below the footing's board"
        } else {
            "below the footing base"
        },
        "m",
        2,
        &[s.frost_depth_under_footing_m],
    );
    t += &row(
        &format!("beside the wall (within {})", super::beside_wall_reach()),
        "m",
        2,
        &[s.frost_depth_beside_wall_m],
    );
    t += &row("footing base", "m", 2, &[s.footing_base_depth_m]);
    if board {
        t += &row(
            "bearing soil (under the board)",
            "m",
            2,
            &[s.bearing_depth_m],
        );
    }
    t += &row(
        "closest to the outer base corner",
        "m",
        2,
        &[s.frost_distance_to_base_corner_m.unwrap_or(f64::NAN)],
    );
    let label = format!(
        "margin to the {:.0}° protected zone",
        s.protected_zone_angle_deg
    );
    let margin = row(&label, "m", 2, &[s.frost_margin_m]);
    t += &if s.frost_in_protected_zone {
        margin.replace('\n', "  FROST IN THE PROTECTED ZONE\n")
    } else {
        margin
    };
    t += &row(
        "day of the least margin",
        "",
        0,
        &[s.design_day_of_year as f64],
    );
    t += &row(
        "freezing index (n × air)",
        "°C·d",
        0,
        &[c.freezing_index_c_days],
    );
    t
}

fn basement_rows(s: &Summary) -> String {
    let (Some(b), Some(bc)) = (&s.basement, &s.cross_check.basement) else {
        return String::new();
    };
    let mut t = head(
        "Heated basement (ISO 13370 definitions)",
        "model      ISO 13370",
    );
    t += &row(
        "basement floor U-value",
        "W/(m²K)",
        3,
        &[
            b.basement_floor_u_value_w_per_m2k,
            bc.iso13370_basement_floor_u_value_w_per_m2k,
        ],
    );
    t += &row(
        "basement wall U-value (below ground)",
        "W/(m²K)",
        3,
        &[b.wall_u_value_w_per_m2k, bc.iso13370_wall_u_value_w_per_m2k],
    );
    t += &row(
        "effective U′ over A + z·P",
        "W/(m²K)",
        3,
        &[
            b.effective_u_value_w_per_m2k,
            bc.iso13370_effective_u_value_w_per_m2k,
        ],
    );
    t += &row(
        "wall / floor heat loss",
        "kWh",
        0,
        &[b.wall_heat_loss_kwh, b.floor_heat_loss_kwh],
    );
    t
}

/// The numerical record in two lines.
fn numerics_line(s: &Summary) -> String {
    let coarse = if s.coarse_spin_up_years > 0 {
        format!(
            " after {} at {}-day steps",
            s.coarse_spin_up_years, s.coarse_year_step_days
        )
    } else {
        String::new()
    };
    let mut t = format!("\n  Numerics: {} cells, {} steps, spin-up {} year(s){coarse} ({}), {:.2} Newton iterations/step, energy balance {:.1e}, {:.2} s\n",
        s.cells, s.time_steps, s.spin_up_years,
        if s.spin_up_converged { "periodic" } else { "NOT periodic: raise simulation.max_spin_up_years" },
        s.newton_iterations_per_step, s.energy_balance_error, s.wall_time_s);
    if let Some(e) = s.periodicity_error_heat_loss_kwh {
        let (u, x, _) = super::shown("kWh", e, 2);
        t += &format!(
            "  Periodicity: reported-year heat loss minus the periodic year's ≈ {x:+.2} {u} ({:+.3} %), estimated\n",
            100.0 * e / s.annual_heat_loss_kwh.abs().max(1e-9)
        );
    }
    t
}

/// The text `check` prints: geometry, mesh, and the closed-form estimates.
pub fn check_text(case: &Case) -> Result<String> {
    crate::run::check_size_2d(case)?;
    let section = crate::geometry::Section::from_case(case);
    let mesh = section.mesh(case);
    let c = crate::estimate::cross_check(case);
    let b = &case.building;
    let mut s = format!("{}: case is valid\n", case.name);
    s += &format!(
        "  B' = {:.3} m (A {:.1} m², P {:.1} m)\n",
        b.b_prime_m, b.floor_area_m2, b.exposed_perimeter_m
    );
    s += &format!(
        "  section: x {:.2} … {:.2} m, z {:.2} … {:.2} m\n",
        section.x_min, section.x_max, section.z_top, section.z_bottom
    );
    s += &format!(
        "  mesh ({}): {} × {} grid, {} solid cells\n",
        case.simulation.mesh.name(),
        mesh.grid.nx(),
        mesh.grid.nz(),
        mesh.solid_cells()
    );
    // An oversized 3D grid is named and refused without building its mesh.
    if let Some(Err(e)) = case.plan.map(|_| crate::run::three::check_size(case)) {
        s += &format!("  3D refused: {e}\n");
    } else if let Some(p) = case.plan {
        let q = crate::geometry3d::Quarter::of(case);
        let m3 = q.mesh(case);
        let g = &m3.grid;
        s += &format!(
            "  3D ({}): quarter of the {:.2} × {:.2} m plan, {} × {} × {} grid, {} solid cells, {} corner board(s){}\n",
            if case.simulation.model == crate::case::ModelKind::ThreeD { "the case's model" } else { "with --model 3d" },
            p.length_m,
            p.width_m,
            g.nx(),
            g.ny(),
            g.nz(),
            m3.solid_cells(),
            case.corners.len(),
            if case.sizing.as_ref().is_some_and(|s| s.corner.is_some()) { "; the sizing checks the corners in 3D" } else { "" }
        );
    }
    let sim = &case.simulation;
    let coarse = match sim.coarse_year_step_days {
        0 => String::new(),
        d => format!("one year at {d}-day steps, then "),
    };
    s += &format!(
        "  time: spin-up {coarse}{} to {} years in {} h steps\n",
        sim.min_spin_up_years,
        sim.max_spin_up_years,
        sim.dt_s / 3600.0
    );
    let m = &case.strata[0].material;
    s += &format!("  soil (top stratum): k {:.3}/{:.3} W/(m·K) unfrozen/frozen, C {:.2}/{:.2} MJ/(m³·K), L {:.1} MJ/m³\n",
        m.k_unfrozen, m.k_frozen, m.c_unfrozen / 1e6, m.c_frozen / 1e6, m.latent / 1e6);
    let kind = match (&case.climate.source, &case.climate.design_winter) {
        (ClimateSource::Series(sr), _) => match case.climate.season {
            Some(y) => format!("normal year of {} and its measured season {y}–{:02} ({:.0} °C·d)", sr.source, (y + 1) % 100, crate::physics::climate::season_freezing_index(sr, y).unwrap_or(f64::NAN)),
            None => format!("measured series {} ({} days)", sr.source, sr.values.len()),
        },
        (_, Some(d)) => match &d.from_series {
            Some(y) => format!("normal year of {} and its {:.0}-year design winter ({:.0} °C·d, colder half's amplitude {:.2} K)", y.series, y.return_period_years, d.freezing_index_c_days, d.amplitude_k),
            None => format!("normal year and a design winter ({:.0} °C·d, colder half's amplitude {:.2} K)", d.freezing_index_c_days, d.amplitude_k),
        },
        _ => "sinusoid".into(),
    };
    s += &format!(
        "  climate: {kind}; mean {:.2} °C, amplitude {:.2} K, coldest day {:.0}\n",
        case.climate.mean_c, case.climate.amplitude_k, case.climate.coldest_day
    );
    s += &format!(
        "  surface freezing index {:.0} °C·d over {:.0} d\n",
        c.freezing_index_c_days, c.freezing_season_days
    );
    if let Some(sz) = &case.sizing {
        s += &format!(
            "  sizing: margin {:.2} m, {} varied dimension(s)\n",
            sz.margin_m,
            sz.vary.len()
        );
    }
    s += &format!(
        "  ISO 13370: d_t {:.3} m, U0 {:.3}, Ψ_edge {:.3} W/(m·K), U {:.3} W/(m²·K)\n",
        c.iso13370_dt_m,
        c.iso13370_u0_w_per_m2k,
        c.iso13370_edge_psi_w_per_mk,
        c.iso13370_u_value_w_per_m2k
    );
    s += &format!("  open-ground frost depth: Stefan {:.2} m, modified Berggren {:.2} m; footing base {:.2} m\n",
        c.stefan_frost_depth_m, c.modified_berggren_frost_depth_m, case.footing.base_depth_m);
    Ok(s)
}

/// The table `climate` prints.
pub fn climate_text(s: &ClimateSummary) -> String {
    let mut t = format!(
        "{}: {} to {} ({:.1} years, {} days filled)\n",
        s.source, s.first_date, s.last_date, s.years, s.filled_days
    );
    t += &format!(
        "  mean annual temperature          {:>8.2} °C\n",
        s.mean_annual_temperature_c
    );
    t += &format!(
        "  annual sinusoid amplitude        {:>8.2} K, coldest on day {:.0}\n",
        s.annual_amplitude_k, s.coldest_day_of_year
    );
    t += "  freezing index by winter (°C·d):\n";
    for w in &s.freezing_index_by_winter_c_days {
        t += &format!(
            "    {}/{:02} {:>8.0}\n",
            w.winter,
            (w.winter + 1) % 100,
            w.value
        );
    }
    t += &format!(
        "  design freezing index, {:.0}-year   {:>8.0} °C·d (Gumbel, {}: location {:.1}, scale {:.1}; KS D {:.3}, p {:.2})\n",
        s.return_period_years, s.design_freezing_index_c_days, s.fit_method.label(), s.gumbel_location_c_days, s.gumbel_scale_c_days, s.ks_statistic, s.ks_p_value
    );
    t += &format!(
        "  mean of the 3 coldest winters    {:>8.0} °C·d\n",
        s.mean_of_three_coldest_c_days
    );
    t += &format!(
        "  coldest winter                   {:>8.0} °C·d\n",
        s.max_freezing_index_c_days
    );
    t
}

/// The text `soil` prints for soil `s` (library name `name`) with conductivity `method`;
/// `None` when Kersten's fits do not hold for its water content.
pub fn soil_text(name: &str, s: &SoilFile, method: KMethod) -> Option<String> {
    let p = soil_properties(s, method)?;
    let explicit = s.k_unfrozen_w_per_mk.is_some();
    let mut t = format!(
        "{} ({name}): {}\n  source: {}\n",
        s.name, s.description, s.source
    );
    t += &format!("  dry density {:.0} kg/m³, water content {:.1} % of dry mass, quartz {:.0} %, texture {}, saturation {:.0} %\n",
        s.dry_density_kg_per_m3, 100.0 * s.water_content, 100.0 * s.quartz_fraction, s.texture.label(), 100.0 * s.index().saturation());
    t += &format!("  frost susceptibility: {}\n", s.frost_susceptibility);
    let how = if explicit {
        "explicit in the soil file"
    } else if matches!(method, KMethod::Kersten) {
        "Kersten 1949"
    } else {
        "Johansen 1975"
    };
    t += &format!(
        "  conductivity ({how}):  unfrozen {:.3} W/(m·K), frozen {:.3} W/(m·K)\n",
        p.k_unfrozen, p.k_frozen
    );
    t += &format!(
        "  volumetric heat capacity: unfrozen {:.3} MJ/(m³·K), frozen {:.3} MJ/(m³·K)\n",
        p.c_unfrozen / 1e6,
        p.c_frozen / 1e6
    );
    t += &format!(
        "  volumetric latent heat: {:.1} MJ/m³ (ρd · w · 333.7 kJ/kg)\n",
        p.latent / 1e6
    );
    t += &format!(
        "  diffusivity (unfrozen): {:.3e} m²/s\n",
        p.k_unfrozen / p.c_unfrozen
    );
    Some(t)
}

/// The soil library listing.
pub fn soil_list() -> String {
    use crate::physics::library::{bundled_soil, SOILS};
    let mut t = String::from("Soil library (typical values per class; replace with site data):\n");
    for (n, _) in SOILS {
        if let Some(s) = bundled_soil(n) {
            t += &format!(
                "  {n:<16} {:<58} frost: {}\n",
                s.description, s.frost_susceptibility
            );
        }
    }
    t
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rows_align_label_unit_and_values() {
        let r = row("floor U-value", "W/(m²K)", 3, &[0.3484, 0.19561]);
        assert_eq!(
            r,
            "    floor U-value               W/(m²K)       0.348       0.196\n"
        );
        // Label and unit fill 35 characters whatever the unit's length.
        assert_eq!(row("a", "m", 1, &[]).chars().count(), 4 + 35 + 1);
    }

    #[test]
    fn soil_text_names_the_method() {
        let s = crate::physics::library::bundled_soil("silt").unwrap();
        let t = soil_text("silt", &s, KMethod::Johansen).unwrap();
        assert!(t.contains("Johansen 1975") && t.contains("MJ/m³"), "{t}");
        assert!(soil_list().contains("silty-sand"));
    }
}
