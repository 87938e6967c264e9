//! The 3D section of `report.html`: the whole building's heat loss beside the 2D equivalent
//! strip, frost and margin at mid-wall and at the corner, the worst point, the 3D numerics and
//! the 3D figures.
use super::html::{escape, figures};
use crate::files::three::Summary3;
use std::path::Path;

/// The 3D figures: (file stem, caption).
pub const FIGURES_3D: &[(&str, &str)] = &[
    ("plan_frost", "Deepest frost over the year round the whole building (the computed quarter mirrored), with the wall, footing and insulation outlines; dashed red: frost as deep as the footing base (or, for a footing bearing on a board, the board's underside)."),
    ("perimeter_frost", "Frost depth at the footing's outer face and frost margin along the perimeter, from the middle of the long wall through the corner to the middle of the short wall, with the 2D section's values."),
    ("section_mid_wall", "Soil temperature on the design day in the vertical section at the middle of the long wall; bold: frost line."),
    ("section_corner_diagonal", "The same day along the corner's diagonal (x along each axis from the exterior corner); bold: frost line."),
];

/// The 3D section's HTML.
pub fn html(s: &Summary3, dir: &Path, peak: &str) -> crate::error::Result<String> {
    let (h, two, c) = (&s.headline, &s.section_2d, &s.coupling);
    let mut t = format!(
        "<h2 id=\"three-d\">3D model</h2>\n<p>{}</p>\n<p>Quarter of a {} × {} plan (between the wall's exterior faces), corners included; {} corner insulation piece(s).</p>\n",
        escape(&s.note),
        super::shown_length(s.plan_length_m),
        super::shown_length(s.plan_width_m),
        s.corner_pieces
    );
    t += "<table>\n<tr><th>heat loss to the ground (floor + junction)</th><th>unit</th><th>3D model</th><th>2D equivalent strip</th></tr>\n";
    // Figures in the units being rendered (SI, or US with `--units us`).
    let n = |u: &str, v: f64, d: usize| super::shown_number(u, v, d);
    let nan = f64::NAN;
    let rows: [(&str, &str, f64, f64, usize); 5] = [
        (
            "annual",
            "kWh",
            h.annual_heat_loss_kwh,
            two.annual_heat_loss_kwh,
            0,
        ),
        ("mean", "W", h.mean_heat_loss_w, two.mean_heat_loss_w, 1),
        (peak, "W", h.peak_heat_loss_w, two.peak_heat_loss_w, 1),
        (
            "floor U-value (no junction)",
            "W/(m²K)",
            h.floor_u_value_w_per_m2k.unwrap_or(nan),
            two.floor_u_value_w_per_m2k.unwrap_or(nan),
            3,
        ),
        (
            "junction Ψ_g (3D: with the corners)",
            "W/(mK)",
            h.junction_psi_w_per_mk.unwrap_or(nan),
            two.junction_psi_w_per_mk.unwrap_or(nan),
            3,
        ),
    ];
    for (q, u, a, b, d) in rows {
        t += &format!(
            "<tr><td>{}</td><td>{}</td><td class=n>{}</td><td class=n>{}</td></tr>\n",
            escape(q),
            escape(super::shown(u, 0.0, 0).0),
            n(u, a, d),
            n(u, b, d)
        );
    }
    let wk = super::shown("W/K", 0.0, 0).0;
    t += &format!(
        "</table>\n<p>Annual ratio 3D / 2D strip: {:.3}. Steady couplings: L3D {} {wk}, wall above ground {} {wk}, H_g {} {wk}.</p>\n",
        s.annual_heat_loss_ratio_3d_to_2d,
        n("W/K", c.l3d_w_per_k, 2),
        n("W/K", c.wall_1d_w_per_k, 2),
        n("W/K", c.h_g_w_per_k, 2)
    );
    t += "<table>\n<tr><th>frost (depth below ground)</th><th>unit</th><th>mid long wall</th><th>mid short wall</th><th>corner</th><th>2D section</th></tr>\n";
    let (ml, ms, co) = (&s.mid_long_wall, &s.mid_short_wall, &s.corner);
    let within = format!("beside the wall (within {})", super::beside_wall_reach());
    let frost: [(&str, [f64; 4]); 4] = [
        (
            "at the footing's outer face",
            [
                ml.face_m,
                ms.face_m,
                co.face_m,
                two.frost_depth_at_footing_face_m,
            ],
        ),
        (
            "below the footing base",
            [
                ml.under_footing_m,
                ms.under_footing_m,
                co.under_footing_m,
                two.frost_depth_under_footing_m,
            ],
        ),
        (
            &within,
            [
                ml.beside_wall_m,
                ms.beside_wall_m,
                co.beside_wall_m,
                two.frost_depth_beside_wall_m,
            ],
        ),
        (
            "margin to the protected zone",
            [ml.margin_m, ms.margin_m, co.margin_m, two.frost_margin_m],
        ),
    ];
    for (q, v) in frost {
        t += &format!(
            "<tr><td>{}</td><td>{}</td>{}</tr>\n",
            escape(q),
            super::shown("m", 0.0, 0).0,
            v.iter()
                .map(|x| format!("<td class=n>{}</td>", n("m", *x, 2)))
                .collect::<String>()
        );
    }
    t += "</table>\n";
    if let Some(w) = &s.worst_point {
        let cls = if w.margin_m < 0.0 {
            " class=\"caution\""
        } else {
            ""
        };
        t += &format!(
            "<p{cls}>Least margin {} at X = {}, Y = {}, z = {} (from the plan's centre), day {}{}.</p>\n",
            super::shown_length(w.margin_m), super::shown_length(w.x_m), super::shown_length(w.y_m), super::shown_length(w.z_m), w.day_of_year,
            if w.margin_m < 0.0 { ": <strong>frost in the protected zone</strong>" } else { "" }
        );
    }
    t += &format!(
        "<p>Protected zone in 3D: {}</p>\n",
        escape(&s.frost_margin_definition)
    );
    t += &format!(
        "<p>3D numerics: {} × {} × {} grid, {} unknowns, {} steps, spin-up {} year(s) from the 2D periodic state ({}), {:.2} Newton iterations per step, {:.1} CG iterations per solve (largest {}; linear solver {}), {} step halvings, energy balance {:.1e}, {:.1} s.</p>\n",
        s.grid[0], s.grid[1], s.grid[2], s.unknowns, s.time_steps, s.spin_up_years,
        if s.spin_up_converged { "periodic" } else { "NOT periodic" },
        s.newton_iterations_per_step, s.cg_iterations_per_solve, s.max_cg_iterations, s.solver_3d.name(),
        s.step_halvings, s.energy_balance_error, s.wall_time_s
    );
    t += &figures(dir, FIGURES_3D, ("figures-3d", "3D figures"))?;
    Ok(t)
}
