//! `summary.json`: the headline results in SI units, the numerical record, every simulated year
//! and the published-method cross-checks.
use crate::case::{Case, ClimateSource, DesignWinter};
use crate::estimate::CrossCheck;
use crate::run::{self, RunResult, WinterResult, Year};
use serde::{Deserialize, Serialize};

/// The caution carried by every report and file.
pub const CAUTION: &str = "Results are engineering estimates from a 2D or 3D heat-conduction model with idealised soil and climate. \
They do not replace the judgement of a licensed engineer; local codes and standards govern the design of \
foundations and frost protection.";

/// Where a run's results came from.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Provenance {
    /// Tool and version.
    pub tool: String,
    /// When the results were written, UTC (ISO 8601).
    pub written_utc: String,
    /// The case file as named on the command line.
    pub case_file: String,
    /// SHA-256 of the case as read (hex).
    pub case_sha256: String,
    /// The climate series file, if the case reads one.
    pub climate_file: Option<String>,
    /// SHA-256 of the climate file (hex), if it could be read again.
    pub climate_sha256: Option<String>,
}

/// SHA-256 of `bytes` as lower-case hex.
pub fn sha256_hex(bytes: &[u8]) -> String {
    use sha2::Digest;
    sha2::Sha256::digest(bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

impl Provenance {
    /// The provenance of a run of `case`, now.
    pub fn of(case: &Case) -> Self {
        let climate_file = match (&case.climate.source, &case.climate.design_winter) {
            (crate::case::ClimateSource::Series(s), _) => Some(s.source.clone()),
            (_, Some(d)) => d.from_series.as_ref().map(|y| y.series.clone()),
            _ => None,
        };
        let climate_sha256 = climate_file
            .as_ref()
            .and_then(|f| std::fs::read(f).ok())
            .map(|b| sha256_hex(&b));
        let secs = std::time::SystemTime::now()
            .duration_since(std::time::UNIX_EPOCH)
            .map_or(0, |d| d.as_secs() as i64);
        let (y, m, d) = crate::physics::climate::calendar::civil_from_days(secs.div_euclid(86400));
        let s = secs.rem_euclid(86400);
        Provenance {
            tool: format!("frostline {}", env!("CARGO_PKG_VERSION")),
            written_utc: format!(
                "{y:04}-{m:02}-{d:02}T{:02}:{:02}:{:02}Z",
                s / 3600,
                s / 60 % 60,
                s % 60
            ),
            case_file: case.file.clone(),
            case_sha256: sha256_hex(case.source.as_bytes()),
            climate_file,
            climate_sha256,
        }
    }
}

/// The coordinate convention, stated in file headers.
pub const COORDINATES: &str =
    "x horizontal, 0 at the exterior face of the foundation wall, positive outward; z depth below finished ground level, positive down";

/// What `frost_margin_m` means.
pub const MARGIN_DEFINITION: &str = "the least distance between the frozen ground (the half-frozen line) and the protected zone below the footing: the soil below the base, widening outward and down from each base corner at protected_zone_angle_deg from the vertical (under a footing that bears on an insulation board, the same zone from the board's underside down: frost in the board counts as near the zone, not in it); negative when frost enters the zone";

/// What the heat-loss figures include.
pub const HEAT_DEFINITION: &str = "ground heat loss = the heat from the indoor air through the floor and the wall/floor junction (and a basement's wall below ground): the indoor air's heat minus the 1D loss of the wall above ground (U_w of its layers, R_si 0.13 and R_se), which is reported on its own line; floor U is the floor-only model's steady coupling over B'/2 (no junction), and the junction's Psi_g = L2D - wall 1D part - floor part (ISO 13370 H_g = A U + P Psi_g); the model's wall reaches at least 1 m above the floor so that these do not depend on where the section is cut";

/// What the reported periods are, by climate.
pub fn periods(case: &Case) -> &'static str {
    match (&case.climate.source, &case.climate.design_winter) {
        (ClimateSource::Series(_), _) if case.climate.season.is_some() => "a spin-up on the series' normal year (its fitted sinusoid) to a periodic year, then the chosen measured season once: frost figures and the peak heat loss from that season, annual and monthly heat loss from the normal year",
        (ClimateSource::Series(_), _) => "a measured series run season by season after a spin-up on its first season; frost and heat figures from the worst season (least frost margin, then deepest open-ground frost)",
        (_, Some(_)) => "a spin-up on the normal climate to a periodic year, then the design winter once: frost figures and the peak heat loss from the design winter's year, annual and monthly heat loss from the periodic normal year",
        _ => "a spin-up on the sinusoidal year to a periodic year, which is reported",
    }
}

/// The spin-up criterion in words.
pub fn spin_up_criterion(case: &Case) -> String {
    let heat = match case.climate.source {
        ClimateSource::Series(_) if case.climate.season.is_some() => "the normal year's heat loss is within 0.5 % of the periodic year's by the periodicity estimate",
        ClimateSource::Series(_) => "the season's heat loss changed less than 0.5 % from the previous season's",
        ClimateSource::Sinusoid => "the year's heat loss is within 0.5 % of the periodic year's by the periodicity estimate",
    };
    format!("{heat}, and the largest frost depths and the frost margin changed less than 1 cm from the previous year")
}

/// Grid size.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct GridSize {
    /// Cells along x.
    pub nx: usize,
    /// Cells along z.
    pub nz: usize,
}

/// The climate as run.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ClimateInfo {
    /// "sinusoid", "measured series" or "design year from a series".
    pub kind: String,
    /// Annual mean air temperature, °C.
    pub mean_c: f64,
    /// Amplitude of the annual sinusoid, K.
    pub amplitude_k: f64,
    /// Day of year of the minimum.
    pub coldest_day: f64,
    /// n-factor for freezing.
    pub n_factor_freezing: f64,
    /// n-factor for thawing.
    pub n_factor_thawing: f64,
    /// Snow depth per calendar month, m.
    pub snow_depth_m: [f64; 12],
    /// The measured season run (the year of its 1 July), when one season of a series was chosen.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub season: Option<i64>,
}

/// A heated basement's results (ISO 13370 definitions).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct BasementSummary {
    /// Depth of the basement floor surface below ground level, m.
    pub basement_floor_depth_m: f64,
    /// Heat loss through the wall's inside face below ground level, kWh.
    pub wall_heat_loss_kwh: f64,
    /// Heat loss through the floor, kWh.
    pub floor_heat_loss_kwh: f64,
    /// Below-ground wall loss / (z P Δθ), W/(m²·K).
    pub wall_u_value_w_per_m2k: f64,
    /// Floor loss / (A Δθ), W/(m²·K).
    pub basement_floor_u_value_w_per_m2k: f64,
    /// (floor + below-ground wall) / ((A + z P) Δθ), W/(m²·K).
    pub effective_u_value_w_per_m2k: f64,
    /// What the values mean.
    pub basement_note: String,
}

/// A material as the model used it: the properties derived from the case (library soil, index
/// properties, explicit values or defaults), for the report's table.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct MaterialInfo {
    /// Where it is used, e.g. `slab`, `insulation[1] (wing)`, `soil 2 (1.20 to 3.00 m)`.
    pub role: String,
    /// The material's name.
    pub name: String,
    /// Thermal conductivity unfrozen / frozen, W/(m·K).
    pub k_unfrozen_w_per_mk: f64,
    /// Frozen, W/(m·K).
    pub k_frozen_w_per_mk: f64,
    /// Volumetric heat capacity unfrozen, J/(m³·K).
    pub c_unfrozen_j_per_m3k: f64,
    /// Frozen, J/(m³·K).
    pub c_frozen_j_per_m3k: f64,
    /// Volumetric latent heat of the pore water, J/m³ (0: does not freeze).
    pub latent_heat_j_per_m3: f64,
    /// The freezing interval, °C, from its lower to its upper end (none when it does not freeze).
    pub freezing_interval_c: Option<[f64; 2]>,
    /// The unfrozen water follows a tabulated curve instead of the linear interval.
    pub tabulated_freezing_curve: bool,
}

/// Every material of `case` with its role, construction first, then the soil strata.
pub fn materials_of(case: &Case) -> Vec<MaterialInfo> {
    use crate::case::InsulationKind as K;
    let info = |role: String, m: &crate::physics::material::Material| MaterialInfo {
        role,
        name: m.name.clone(),
        k_unfrozen_w_per_mk: m.k_unfrozen,
        k_frozen_w_per_mk: m.k_frozen,
        c_unfrozen_j_per_m3k: m.c_unfrozen,
        c_frozen_j_per_m3k: m.c_frozen,
        latent_heat_j_per_m3: m.latent,
        freezing_interval_c: (m.latent > 0.0)
            .then_some([m.t_freeze - m.freezing_interval, m.t_freeze]),
        tabulated_freezing_curve: m.curve.is_some(),
    };
    let mut v = vec![
        info("slab".into(), &case.slab.material),
        info("wall".into(), &case.wall.material),
        info("footing".into(), &case.footing.material),
    ];
    for (k, ins) in case.insulation.iter().enumerate() {
        let kind = match ins.kind {
            K::UnderSlab { .. } => "under slab",
            K::VerticalOutside { .. } => "vertical, outside",
            K::VerticalInside { .. } => "vertical, inside",
            K::Wing { .. } => "wing",
            K::UnderFooting { .. } => "under footing",
        };
        v.push(info(format!("insulation[{k}] ({kind})"), &ins.material));
    }
    if let Some(f) = &case.fill {
        v.push(info("fill".into(), &f.material));
    }
    let mut top = 0.0;
    for (k, s) in case.strata.iter().enumerate() {
        let range = if s.bottom_m.is_finite() {
            format!("{top:.2} to {:.2} m", s.bottom_m)
        } else {
            format!("below {top:.2} m")
        };
        v.push(info(format!("soil {} ({range})", k + 1), &s.material));
        top = s.bottom_m;
    }
    v
}

/// Contents of `summary.json` (all SI).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Summary {
    /// Case name.
    pub case_name: String,
    /// The units of the terminal table, the report and the `_us` files (`--units`); this file
    /// is in SI whatever they are.
    #[serde(default)]
    pub units: super::us::Units,
    /// An unheated building: the floor follows the outdoor air; heat-loss figures and the
    /// heated-floor cross-checks (ISO 13370) do not apply and are not shown.
    #[serde(default)]
    pub unheated: bool,
    /// Where the results came from: tool version, time, input files and their SHA-256 digests.
    #[serde(default)]
    pub provenance: Option<Provenance>,
    /// The materials with the properties the model used (derived from the case).
    #[serde(default)]
    pub materials: Vec<MaterialInfo>,
    /// The caution.
    pub caution: String,
    /// Coordinate convention.
    pub coordinates: String,
    /// How whole-building figures are obtained.
    pub note: String,
    /// Floor area A, m².
    pub floor_area_m2: f64,
    /// Exposed perimeter P, m.
    pub exposed_perimeter_m: f64,
    /// B′ = A/(0.5 P), m.
    pub characteristic_dimension_m: f64,
    /// Mean indoor air temperature, °C.
    pub mean_indoor_temperature_c: f64,
    /// Mean outdoor air temperature, °C.
    pub mean_outdoor_temperature_c: f64,
    /// Annual ground heat loss, kWh.
    pub annual_heat_loss_kwh: f64,
    /// Mean heat loss, W.
    pub mean_heat_loss_w: f64,
    /// Largest daily-mean heat loss, W.
    pub peak_heat_loss_w: f64,
    /// Mean heat loss per metre of exposed perimeter, W/m.
    pub heat_loss_per_perimeter_w_per_m: f64,
    /// Floor U-value without the wall/floor junction (steady, ISO 13370 definition), W/(m²·K)
    /// (null for a basement: see its own values).
    pub floor_u_value_w_per_m2k: Option<f64>,
    /// The wall/floor junction's linear thermal transmittance Ψ_g with the model's floor U as the
    /// floor part, W/(m·K) (null for a basement). Use with `floor_u_value_w_per_m2k`.
    pub junction_psi_w_per_mk: Option<f64>,
    /// Ψ_g with the ISO 13370 floor U of the cross-check as the floor part, W/(m·K): use with
    /// `cross_check.iso13370_u_value_w_per_m2k` (H_g = A U + P Ψ_g either way).
    pub junction_psi_iso13370_basis_w_per_mk: Option<f64>,
    /// Annual mean ground heat loss / (A Δθ): U with the junction as simulated, W/(m²·K) (null for
    /// an unheated building).
    pub ground_u_value_incl_junction_w_per_m2k: Option<f64>,
    /// Mean 1D U-value of the stated foundation wall above the floor (or ground), W/(m²·K).
    pub wall_above_ground_u_value_w_per_m2k: Option<f64>,
    /// Height of that wall, m.
    pub wall_above_ground_height_m: f64,
    /// Its annual heat loss (not part of the ground heat loss), kWh.
    pub wall_above_ground_heat_loss_kwh: f64,
    /// The steady split into floor, junction and wall parts.
    pub heat_split: crate::run::HeatSplit,
    /// What the heat-loss figures include.
    pub heat_loss_definition: String,
    /// Steady heat loss at the annual means, W.
    pub steady_state_heat_loss_w: f64,
    /// Deepest frost in open ground, m.
    pub frost_depth_open_ground_m: f64,
    /// Deepest frost just outside the footing's outer face, m.
    pub frost_depth_at_footing_face_m: f64,
    /// Deepest frost below the footing base within its width, m (0: none).
    pub frost_depth_under_footing_m: f64,
    /// Deepest frost within 0.5 m outside the wall (backfill above a footing included), m.
    pub frost_depth_beside_wall_m: f64,
    /// Least distance from the frost line to the footing's outer base corner, m (null: no frost).
    pub frost_distance_to_base_corner_m: Option<f64>,
    /// Whether frozen ground entered the protected zone below the footing.
    pub frost_in_protected_zone: bool,
    /// Footing base depth, m.
    pub footing_base_depth_m: f64,
    /// Top of the bearing soil, m: the footing base, or the underside of the insulation board the
    /// footing bears on (`under_footing`), where the protected zone starts.
    pub bearing_depth_m: f64,
    /// Spread of the protected zone from the vertical, degrees.
    pub protected_zone_angle_deg: f64,
    /// Least signed distance between the frozen ground and the protected zone, m.
    pub frost_margin_m: f64,
    /// What the frost margin means.
    pub frost_margin_definition: String,
    /// Day of year of the least frost margin, the day of the saved field.
    pub design_day_of_year: usize,
    /// The same day as an ISO 8601 date: `YYYY-MM-DD` for a measured series, `--MM-DD` (no
    /// year) for a sinusoidal year.
    #[serde(default)]
    pub design_date: String,
    /// Frost-line temperature, °C.
    pub frost_line_temperature_c: f64,
    /// Relative energy-balance error of the reported period.
    pub energy_balance_error: f64,
    /// Spin-up years before the reported period.
    pub spin_up_years: usize,
    /// Whether the spin-up criterion was met.
    pub spin_up_converged: bool,
    /// The spin-up criterion.
    pub spin_up_criterion: String,
    /// Extra first spin-up years in steps of several days.
    pub coarse_spin_up_years: usize,
    /// Their step, days.
    pub coarse_year_step_days: usize,
    /// Solid cells.
    pub cells: usize,
    /// Grid size.
    pub grid: GridSize,
    /// Time steps of the whole run.
    pub time_steps: usize,
    /// Time step, s.
    pub time_step_s: f64,
    /// Newton iterations.
    pub newton_iterations: usize,
    /// Newton iterations per time step.
    pub newton_iterations_per_step: f64,
    /// Cholesky factorisations.
    pub factorizations: usize,
    /// Solves by conjugate gradients with a nearby factor.
    pub near_factor_solves: usize,
    /// Their iterations.
    pub cg_iterations: usize,
    /// Step halvings.
    pub step_halvings: usize,
    /// Largest accepted residual, K.
    pub max_residual_k: f64,
    /// Wall-clock time, s.
    pub wall_time_s: f64,
    /// Every simulated year.
    pub years: Vec<Year>,
    /// Published-method cross-checks.
    pub cross_check: CrossCheck,
    /// Reported-year heat loss minus the periodic year's, kWh (estimate; null for a series).
    pub periodicity_error_heat_loss_kwh: Option<f64>,
    /// Every winter of a measured series.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub winters: Option<Vec<WinterResult>>,
    /// The reported winter (the year it starts).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub reported_winter: Option<i64>,
    /// What the reported period is.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub reported_period: Option<String>,
    /// The design winter run once after the spin-up on the normal climate.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub design_winter: Option<DesignWinter>,
    /// What the reported periods are.
    pub periods: String,
    /// The climate as run.
    pub climate: ClimateInfo,
    /// Heated-basement values.
    #[serde(flatten, default, skip_serializing_if = "Option::is_none")]
    pub basement: Option<BasementSummary>,
    /// The 3D model's results (a 3D run; the figures above are then the 2D section's).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub three_d: Option<super::three::Summary3>,
}

impl Summary {
    /// The summary of a run of `case` with its cross-checks `cc`.
    pub fn new(case: &Case, r: &RunResult, cc: &CrossCheck) -> Self {
        /// The design day's ISO 8601 date: with its year for a measured series, `--MM-DD` for a
        /// sinusoidal year.
        fn design_date(r: &RunResult, doy: usize) -> String {
            let dated = r.days.iter().find(|d| d.day_of_year == doy);
            match dated.and_then(|d| d.date) {
                Some(dn) => crate::physics::climate::iso_date(dn),
                None => crate::physics::climate::calendar::month_day(doy),
            }
        }
        let h = run::headline(case, r);
        let y = r.final_year();
        let st = r.stats;
        let series = !r.winters.is_empty();
        Summary {
            units: super::us::Units::Si,
            unheated: case.building.unheated,
            provenance: Some(Provenance::of(case)),
            materials: materials_of(case),
            case_name: case.name.clone(),
            caution: CAUTION.into(),
            coordinates: COORDINATES.into(),
            note: "Whole-building figures are the 2D half-section's per-metre results times the exposed perimeter (ISO 13370 equivalent strip of width B').".into(),
            floor_area_m2: case.building.floor_area_m2,
            exposed_perimeter_m: case.building.exposed_perimeter_m,
            characteristic_dimension_m: case.building.b_prime_m,
            mean_indoor_temperature_c: case.indoor_mean_c(),
            mean_outdoor_temperature_c: case.climate.mean_c,
            annual_heat_loss_kwh: h.annual_heat_loss_kwh,
            mean_heat_loss_w: h.mean_heat_loss_w,
            peak_heat_loss_w: h.peak_heat_loss_w,
            heat_loss_per_perimeter_w_per_m: h.heat_loss_per_perimeter_w_per_m,
            floor_u_value_w_per_m2k: h.floor_u_value_w_per_m2k,
            junction_psi_w_per_mk: h.junction_psi_w_per_mk,
            junction_psi_iso13370_basis_w_per_mk: case.basement.is_none().then_some(
                r.split.l2d_w_per_mk
                    - r.split.wall_1d_w_per_mk
                    - cc.iso13370_u_value_w_per_m2k * 0.5 * case.building.b_prime_m,
            ),
            ground_u_value_incl_junction_w_per_m2k: h.ground_u_value_incl_junction_w_per_m2k,
            wall_above_ground_u_value_w_per_m2k: h.wall_above_ground_u_value_w_per_m2k,
            wall_above_ground_height_m: r.split.stated_wall_height_m,
            wall_above_ground_heat_loss_kwh: h.wall_above_ground_heat_loss_kwh,
            heat_split: r.split.clone(),
            heat_loss_definition: HEAT_DEFINITION.into(),
            steady_state_heat_loss_w: r.steady_heat_loss_w,
            frost_depth_open_ground_m: h.frost_depth_open_ground_m,
            frost_depth_at_footing_face_m: h.frost_depth_at_footing_face_m,
            frost_depth_under_footing_m: h.frost_depth_under_footing_m,
            frost_depth_beside_wall_m: h.frost_depth_beside_wall_m,
            frost_distance_to_base_corner_m: h.frost_distance_to_base_corner_m,
            frost_in_protected_zone: h.frost_in_protected_zone,
            footing_base_depth_m: case.footing.base_depth_m,
            bearing_depth_m: case.bearing_depth_m(),
            protected_zone_angle_deg: case.footing.protected_zone_angle_deg,
            frost_margin_m: h.frost_margin_m,
            frost_margin_definition: MARGIN_DEFINITION.into(),
            design_day_of_year: h.design_day_of_year,
            design_date: design_date(r, h.design_day_of_year),
            frost_line_temperature_c: run::frost_line_c(case),
            energy_balance_error: y.energy_balance_error,
            spin_up_years: r.spin_up_years(),
            spin_up_converged: r.spin_up_converged,
            spin_up_criterion: spin_up_criterion(case),
            coarse_spin_up_years: r.coarse_spin_up_years,
            coarse_year_step_days: case.simulation.coarse_year_step_days,
            cells: r.mesh.solid_cells(),
            grid: GridSize {
                nx: r.mesh.grid.nx(),
                nz: r.mesh.grid.nz(),
            },
            time_steps: r.time_steps,
            time_step_s: case.simulation.dt_s,
            newton_iterations: st.newton_iterations,
            newton_iterations_per_step: st.newton_iterations as f64 / r.time_steps.max(1) as f64,
            factorizations: st.factorizations,
            near_factor_solves: st.near_factor_solves,
            cg_iterations: st.cg_iterations,
            step_halvings: st.halvings,
            max_residual_k: st.max_residual_k,
            wall_time_s: r.wall_time_s,
            years: r.years.clone(),
            cross_check: cc.clone(),
            periodicity_error_heat_loss_kwh: r.periodicity_heat_loss_kwh,
            winters: series.then(|| r.winters.clone()),
            reported_winter: series.then(|| r.winters[r.reported - r.spin_up_years].winter),
            reported_period: series.then(|| "the worst winter of the measured series (deepest frost under the footing, then in open ground)".to_string()),
            design_winter: case.climate.design_winter.clone(),
            periods: periods(case).into(),
            climate: climate_info(case),
            basement: basement_summary(case, r),
            three_d: None,
        }
    }
}

fn climate_info(case: &Case) -> ClimateInfo {
    let cl = &case.climate;
    let kind = match (&cl.source, &cl.design_winter) {
        (ClimateSource::Series(_), _) if cl.season.is_some() => {
            "normal sinusoid of a series with one of its measured seasons"
        }
        (ClimateSource::Series(_), _) => "measured series",
        (_, Some(d)) if d.from_series.is_some() => {
            "normal sinusoid of a series with its return-period design winter"
        }
        (_, Some(_)) => "normal sinusoid with a design winter",
        _ => "sinusoid",
    };
    ClimateInfo {
        kind: kind.into(),
        mean_c: cl.mean_c,
        amplitude_k: cl.amplitude_k,
        coldest_day: cl.coldest_day,
        n_factor_freezing: cl.n_freezing,
        n_factor_thawing: cl.n_thawing,
        snow_depth_m: cl.snow_depth_m,
        season: cl.season,
    }
}

fn basement_summary(case: &Case, r: &RunResult) -> Option<BasementSummary> {
    let b = case.basement.as_ref()?;
    let v = run::basement_values(case, r)?;
    let y = r.final_year();
    Some(BasementSummary {
        basement_floor_depth_m: b.floor_depth_m,
        wall_heat_loss_kwh: y.wall_heat_loss_kwh,
        floor_heat_loss_kwh: y.floor_heat_loss_kwh,
        wall_u_value_w_per_m2k: v.wall_u_value_w_per_m2k,
        basement_floor_u_value_w_per_m2k: v.floor_u_value_w_per_m2k,
        effective_u_value_w_per_m2k: v.effective_u_value_w_per_m2k,
        basement_note: "Wall U is the wall's below-ground loss over z·P; effective U is (floor + below-ground wall) over (A + z·P) (ISO 13370 heated basement); the loss through the wall above ground is reported on its own line.".into(),
    })
}

#[cfg(test)]
mod provenance_tests {
    /// SHA-256 of "abc" and of the empty message: FIPS 180-2, Appendix B.1, and the standard's
    /// empty-string digest.
    #[test]
    fn sha256_vectors() {
        assert_eq!(
            super::sha256_hex(b"abc"),
            "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
        );
        assert_eq!(
            super::sha256_hex(b""),
            "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855"
        );
    }
}
