//! The closed-form cross-checks printed beside every numerical result: ISO 13370 floor U-values
//! (slab-on-ground with edge insulation, or heated basement), Stefan and modified-Berggren
//! open-ground frost depths, for the same inputs as the case.
use crate::case::{Case, ClimateSource, InsulationKind};
use crate::methods;

/// Closed-form cross-checks for the same inputs.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct CrossCheck {
    /// ISO 13370 slab-on-ground U-value with edge insulation, W/(m²·K).
    pub iso13370_u_value_w_per_m2k: f64,
    /// ISO 13370 U-value without edge insulation, W/(m²·K).
    pub iso13370_u0_w_per_m2k: f64,
    /// ISO 13370 edge-insulation Ψ used (most effective piece), W/(m·K).
    pub iso13370_edge_psi_w_per_mk: f64,
    /// ISO 13370 total equivalent thickness d_t, m.
    pub iso13370_dt_m: f64,
    /// Soil conductivity used for ISO 13370 (top stratum, unfrozen), W/(m·K).
    pub iso13370_lambda_w_per_mk: f64,
    /// Annual mean heat loss by ISO 13370 steady U, W.
    pub iso13370_mean_heat_loss_w: f64,
    /// Surface freezing index used (n-factor × air index of the design sinusoid, or of the
    /// coldest winter of a series), °C·d.
    pub freezing_index_c_days: f64,
    /// Freezing season length, d.
    pub freezing_season_days: f64,
    /// Stefan open-ground frost depth (n = 1, top stratum), m.
    pub stefan_frost_depth_m: f64,
    /// Modified Berggren open-ground frost depth (n = 1, top stratum), m.
    pub modified_berggren_frost_depth_m: f64,
    /// ISO 13370 heated-basement values, for basement cases.
    pub basement: Option<BasementCheck>,
}

/// ISO 13370 heated-basement U-values for the same inputs.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct BasementCheck {
    /// Basement floor U_bf, W/(m²·K).
    pub iso13370_basement_floor_u_value_w_per_m2k: f64,
    /// Basement wall U_bw, W/(m²·K).
    pub iso13370_wall_u_value_w_per_m2k: f64,
    /// Effective U′ = (A U_bf + z P U_bw)/(A + z P), W/(m²·K).
    pub iso13370_effective_u_value_w_per_m2k: f64,
    /// 1/U_bw of the wall as computed (height-weighted U for partly insulated walls), m²·K/W.
    pub wall_resistance_m2k_per_w: f64,
}

/// The closed-form cross-checks for `case`.
pub fn cross_check(case: &Case) -> CrossCheck {
    let soil = &case.strata[0].material;
    let lambda = soil.k_unfrozen;
    let b = &case.building;
    let (r_f, edges) = floor_resistance_and_edges(case);
    let d_t = methods::equivalent_thickness(
        case.wall.thickness_m,
        lambda,
        b.r_si_floor,
        r_f,
        case.climate.r_se,
    );
    let u0 = methods::iso13370_slab_u(lambda, b.b_prime_m, d_t);
    let psi = edges
        .iter()
        .map(|&(e, r_n, d_n)| methods::iso13370_edge_psi(lambda, d_t, r_n, d_n, e))
        .fold(0.0, f64::min);
    let u = u0 + 2.0 * psi / b.b_prime_m;
    let frost = frost_depths(case);
    let basement = case
        .basement
        .as_ref()
        .map(|bm| basement_check(case, bm.floor_depth_m, r_f));
    // For a basement the headline ISO values are the heated-basement ones: U′ (A + zP)/A per
    // floor area (the model's floor_u_value has the same definition) and U′ (A + zP) Δθ.
    let dtemp = case.indoor_mean_c() - case.climate.mean_c;
    let (u, mean_loss) = match (&basement, &case.basement) {
        (Some(bc), Some(bm)) => {
            let area = b.floor_area_m2 + bm.floor_depth_m * b.exposed_perimeter_m;
            let ue = bc.iso13370_effective_u_value_w_per_m2k;
            (ue * area / b.floor_area_m2, ue * area * dtemp)
        }
        _ => (u, u * b.floor_area_m2 * dtemp),
    };
    CrossCheck {
        basement,
        iso13370_u_value_w_per_m2k: u,
        iso13370_u0_w_per_m2k: u0,
        iso13370_edge_psi_w_per_mk: psi,
        iso13370_dt_m: d_t,
        iso13370_lambda_w_per_mk: lambda,
        iso13370_mean_heat_loss_w: mean_loss,
        freezing_index_c_days: frost.0,
        freezing_season_days: frost.1,
        stefan_frost_depth_m: frost.2,
        modified_berggren_frost_depth_m: frost.3,
    }
}

/// Floor resistance R_f (slab, finish and whole-floor insulation, m²·K/W) and the edge
/// insulation pieces as ISO 13370 sees them: (kind and extent, R_n m²·K/W, d_n m).
fn floor_resistance_and_edges(case: &Case) -> (f64, Vec<(methods::EdgeInsulation, f64, f64)>) {
    let mut r_f = case.slab.thickness_m / case.slab.material.k_unfrozen + case.slab.finish_r;
    let mut edges = Vec::new();
    for ins in &case.insulation {
        let r_n = ins.thickness_m / ins.material.k_unfrozen;
        let edge = match ins.kind {
            InsulationKind::UnderSlab { band_width_m: None } => {
                r_f += r_n;
                continue;
            }
            InsulationKind::UnderSlab {
                band_width_m: Some(d),
            } => methods::EdgeInsulation::Horizontal { width_m: d },
            InsulationKind::VerticalOutside { bottom_m, .. }
            | InsulationKind::VerticalInside { bottom_m, .. } => {
                methods::EdgeInsulation::Vertical {
                    depth_m: bottom_m.max(0.0),
                }
            }
            InsulationKind::Wing {
                x_start_m, width_m, ..
            } => methods::EdgeInsulation::Horizontal {
                width_m: width_m - x_start_m,
            },
            // Not an edge insulation of ISO 13370 (its edge-insulation formula covers horizontal
            // boards at the floor's edge and vertical ones down the wall): left out of the check.
            InsulationKind::UnderFooting { .. } => continue,
        };
        edges.push((edge, r_n, ins.thickness_m));
    }
    (r_f, edges)
}

/// Open-ground frost by the published formulas for the top stratum: (surface freezing index
/// °C·d, freezing season d, Stefan depth m, modified-Berggren depth m). The surface index is the
/// n-factor times the air index of the design winter (or of the sinusoid without one), or of the
/// coldest winter of a series (or of its chosen season).
fn frost_depths(case: &Case) -> (f64, f64, f64, f64) {
    let soil = &case.strata[0].material;
    let (fi_air, season) =
        methods::sinusoid_freezing_index(case.climate.mean_c, design_amplitude(case));
    let fi_air = match &case.climate.source {
        ClimateSource::Series(s) if case.climate.season.is_some() => {
            crate::physics::climate::season_freezing_index(s, case.climate.season.unwrap_or(0))
                .unwrap_or(0.0)
        }
        ClimateSource::Series(s) => crate::physics::climate::freezing_indices(s)
            .iter()
            .map(|w| w.value)
            .fold(0.0, f64::max),
        ClimateSource::Sinusoid => fi_air,
    };
    let fi = case.climate.n_freezing * fi_air;
    let stefan = if fi > 0.0 {
        methods::stefan_depth(soil.k_frozen, fi, soil.latent.max(1.0))
    } else {
        0.0
    };
    let berggren = methods::modified_berggren_depth(
        fi,
        season,
        case.climate.mean_c,
        0.5 * (soil.k_frozen + soil.k_unfrozen),
        0.5 * (soil.c_frozen + soil.c_unfrozen),
        soil.latent.max(1.0),
    );
    (fi, season, stefan, berggren)
}

/// ISO 13370 heated-basement values for a floor at depth `z` with floor resistance `r_f`. Where
/// insulation covers only part of the below-ground wall height, U_bw is the height-weighted mean
/// of U_bw for each part (common practice for partly insulated walls; ISO 13370 gives one R_w).
fn basement_check(case: &Case, z: f64, r_f: f64) -> BasementCheck {
    let b = &case.building;
    let lambda = case.strata[0].material.k_unfrozen;
    let r_wall = case.wall.thickness_m / case.wall.material.k_unfrozen;
    let pieces: Vec<(f64, f64, f64)> = case
        .insulation
        .iter()
        .filter_map(|ins| match ins.kind {
            InsulationKind::VerticalOutside { top_m, bottom_m }
            | InsulationKind::VerticalInside { top_m, bottom_m } => Some((
                top_m.max(0.0),
                bottom_m.min(z),
                ins.thickness_m / ins.material.k_unfrozen,
            )),
            _ => None,
        })
        .collect();
    let mut cuts = vec![0.0, z];
    for &(t0, t1, _) in &pieces {
        cuts.extend([t0.clamp(0.0, z), t1.clamp(0.0, z)]);
    }
    cuts.sort_by(f64::total_cmp);
    cuts.dedup();
    let iso = |r_w: f64| {
        methods::iso13370_basement(
            lambda,
            b.floor_area_m2,
            b.exposed_perimeter_m,
            case.wall.thickness_m,
            z,
            r_f,
            r_w,
            b.r_si_floor,
            b.r_si_wall,
            case.climate.r_se,
        )
    };
    let (f, _, _) = iso(r_wall);
    let mut w = 0.0;
    for seg in cuts.windows(2) {
        let mid = 0.5 * (seg[0] + seg[1]);
        let r_ins: f64 = pieces
            .iter()
            .filter(|p| p.0 <= mid && mid <= p.1)
            .map(|p| p.2)
            .sum();
        w += (seg[1] - seg[0]) / z * iso(r_wall + r_ins).1;
    }
    let (a, p) = (b.floor_area_m2, b.exposed_perimeter_m);
    BasementCheck {
        iso13370_basement_floor_u_value_w_per_m2k: f,
        iso13370_wall_u_value_w_per_m2k: w,
        iso13370_effective_u_value_w_per_m2k: (a * f + z * p * w) / (a + z * p),
        wall_resistance_m2k_per_w: 1.0 / w,
    }
}

/// The amplitude of the design winter's colder half, or the sinusoid's without a design winter
/// (all freezing falls in the colder half, so the freezing index and season are those of the
/// sinusoid with that amplitude), K.
fn design_amplitude(case: &Case) -> f64 {
    case.climate
        .design_winter
        .as_ref()
        .map_or(case.climate.amplitude_k, |d| d.amplitude_k)
}
