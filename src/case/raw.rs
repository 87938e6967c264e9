//! The serde mirror of a case file's TOML (`deny_unknown_fields`, spans kept for messages). No
//! checks here beyond types: validation turns these into the model types of [`super::model`].
use crate::physics::soil::Texture;
use serde::Deserialize;
use serde_spanned::Spanned;

/// A value with its byte range in the case file.
pub type S<T> = Spanned<T>;

/// Raw TOML mirror of a case file.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawCase {
    pub name: String,
    #[serde(default)]
    pub description: Option<String>,
    pub building: RawBuilding,
    #[serde(default)]
    pub plan: Option<S<RawPlan>>,
    #[serde(default)]
    pub corner: Vec<S<RawCorner>>,
    pub slab: RawSlab,
    pub wall: RawWall,
    pub footing: RawFooting,
    #[serde(default)]
    pub basement: Option<RawBasement>,
    #[serde(default)]
    pub insulation: Vec<S<RawInsulation>>,
    #[serde(default)]
    pub fill: Option<RawFill>,
    pub soil: S<Vec<S<RawStratum>>>,
    pub climate: RawClimate,
    #[serde(default)]
    pub simulation: RawSimulation,
    #[serde(default)]
    pub probe: Vec<S<RawProbe>>,
    #[serde(default)]
    pub sizing: Option<RawSizing>,
    #[serde(default)]
    pub uncertainty: Option<S<RawUncertainty>>,
}

/// `[uncertainty]`: the sampled inputs of `frostline uncertainty`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawUncertainty {
    pub samples: Option<S<i64>>,
    pub seed: Option<S<i64>>,
    #[serde(default)]
    pub input: Vec<S<RawInput>>,
}

/// One `[[uncertainty.input]]`: a case key and its distribution, in the key's own unit.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawInput {
    pub key: S<String>,
    pub distribution: S<String>,
    pub mean: Option<S<f64>>,
    pub sd: Option<S<f64>>,
    pub min: Option<S<f64>>,
    pub max: Option<S<f64>>,
    pub mode: Option<S<f64>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawSizing {
    pub margin_m: Option<S<f64>>,
    pub vary: S<Vec<S<RawVary>>>,
    #[serde(default)]
    pub cost_per_m3: std::collections::BTreeMap<String, f64>,
    pub excavation_cost_per_m3: Option<S<f64>>,
    pub corner: Option<S<RawCornerVary>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawCornerVary {
    pub corner: Option<S<i64>>,
    pub dimension: S<String>,
    /// Bounds and step in metres; `min_m` etc. are the same keys with their unit named, so that
    /// `min_in`, `min_ft` (US units) are accepted too.
    #[serde(alias = "min_m")]
    pub min: S<f64>,
    #[serde(alias = "max_m")]
    pub max: S<f64>,
    #[serde(alias = "step_m")]
    pub step: S<f64>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawVary {
    pub insulation: Option<S<i64>>,
    pub dimension: S<String>,
    /// Bounds and step in metres; `min_m` etc. are the same keys with their unit named, so that
    /// `min_in`, `min_ft` (US units) are accepted too.
    #[serde(alias = "min_m")]
    pub min: S<f64>,
    #[serde(alias = "max_m")]
    pub max: S<f64>,
    #[serde(alias = "step_m")]
    pub step: S<f64>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawBuilding {
    pub floor_area_m2: Option<S<f64>>,
    pub exposed_perimeter_m: Option<S<f64>>,
    pub characteristic_dimension_m: Option<S<f64>>,
    pub indoor_temperature_c: Option<S<Temps>>,
    pub unheated: Option<bool>,
    pub floor_surface_resistance_m2k_per_w: Option<S<f64>>,
    pub wall_surface_resistance_m2k_per_w: Option<S<f64>>,
}

/// One temperature or twelve monthly values.
#[derive(Debug, Deserialize, Clone)]
#[serde(untagged)]
#[allow(missing_docs)]
pub enum Temps {
    One(f64),
    Monthly(Vec<f64>),
}

/// A material by name, or explicit properties.
#[derive(Debug, Deserialize, Clone)]
#[serde(untagged)]
#[allow(missing_docs)]
pub enum RawMaterial {
    Named(String),
    Explicit(RawExplicitMaterial),
}

#[derive(Debug, Deserialize, Clone)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawExplicitMaterial {
    pub conductivity_w_per_mk: f64,
    pub heat_capacity_j_per_m3k: f64,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawSlab {
    pub thickness_m: S<f64>,
    #[serde(default)]
    pub material: Option<S<RawMaterial>>,
    pub top_above_ground_m: Option<S<f64>>,
    pub finish_resistance_m2k_per_w: Option<S<f64>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawWall {
    pub thickness_m: S<f64>,
    #[serde(default)]
    pub material: Option<S<RawMaterial>>,
    pub height_above_ground_m: Option<S<f64>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawFooting {
    pub width_m: S<f64>,
    pub outer_projection_m: Option<S<f64>>,
    pub thickness_m: S<f64>,
    pub base_depth_m: S<f64>,
    #[serde(default)]
    pub material: Option<S<RawMaterial>>,
    pub protected_zone_angle_deg: Option<S<f64>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawBasement {
    pub floor_depth_m: S<f64>,
    pub backfill_width_m: Option<S<f64>>,
    pub backfill_depth_m: Option<S<f64>>,
    pub backfill: Option<S<RawStratum>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawInsulation {
    pub kind: S<String>,
    /// The board's thickness, or its thermal resistance R (then thickness = R k).
    pub thickness_m: Option<S<f64>>,
    pub thermal_resistance_m2k_per_w: Option<S<f64>>,
    pub material: Option<S<String>>,
    pub conductivity_w_per_mk: Option<S<f64>>,
    pub heat_capacity_j_per_m3k: Option<S<f64>>,
    /// under_slab: width of the band from the wall's inside face (omit: whole floor).
    pub band_width_m: Option<S<f64>>,
    /// vertical: depth of the top (negative above ground; default ground level outside,
    /// the slab's underside inside).
    pub top_depth_m: Option<S<f64>>,
    /// vertical: depth of the bottom.
    pub bottom_depth_m: Option<S<f64>>,
    /// wing: depth of the insulation's top face below ground.
    pub depth_m: Option<S<f64>>,
    /// wing: outward extent, measured from the wall's exterior face x = 0.
    pub width_m: Option<S<f64>>,
    /// wing: the board's own width, from its inner edge (the outer face of any outside vertical
    /// insulation, else the wall's exterior face); instead of width_m.
    pub board_width_m: Option<S<f64>>,
    /// under_footing: how far the board reaches past the footing's outer edge (default 0).
    pub past_outer_edge_m: Option<S<f64>>,
    /// under_footing: how far the board reaches past the footing's inner edge (default 0).
    pub past_inner_edge_m: Option<S<f64>>,
}

/// A rectangular plan, exterior faces of the foundation wall.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawPlan {
    pub length_m: S<f64>,
    pub width_m: S<f64>,
}

/// A horizontal insulation piece at each outside corner of the plan (3D model).
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawCorner {
    pub thickness_m: S<f64>,
    pub material: Option<S<String>>,
    pub conductivity_w_per_mk: Option<S<f64>>,
    pub heat_capacity_j_per_m3k: Option<S<f64>>,
    /// Depth of the top face below ground.
    pub depth_m: S<f64>,
    /// Outward extent from the wall's exterior face.
    pub width_m: S<f64>,
    /// Extent along each wall from the plan's exterior corner.
    pub length_m: S<f64>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawFill {
    pub thickness_m: S<f64>,
    #[serde(default)]
    pub material: Option<S<RawMaterial>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawStratum {
    pub library: Option<S<String>>,
    pub soil_file: Option<S<String>>,
    pub method: Option<S<String>>,
    pub name: Option<String>,
    pub bottom_depth_m: Option<S<f64>>,
    pub dry_density_kg_per_m3: Option<S<f64>>,
    pub water_content: Option<S<f64>>,
    pub quartz_fraction: Option<S<f64>>,
    pub texture: Option<Texture>,
    pub k_unfrozen_w_per_mk: Option<S<f64>>,
    pub k_frozen_w_per_mk: Option<S<f64>>,
    pub c_unfrozen_j_per_m3k: Option<S<f64>>,
    pub c_frozen_j_per_m3k: Option<S<f64>>,
    pub latent_heat_j_per_m3: Option<S<f64>>,
    pub freezing_point_c: Option<S<f64>>,
    pub freezing_interval_k: Option<S<f64>>,
    pub unfrozen_water: Option<S<RawUnfrozenWater>>,
}

/// Power-law unfrozen water content w_u = alpha θ^beta (fractions of dry mass).
#[derive(Debug, Deserialize, Clone)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawUnfrozenWater {
    pub alpha: f64,
    pub beta: f64,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawClimate {
    pub mean_c: Option<S<f64>>,
    pub amplitude_k: Option<S<f64>>,
    pub coldest_day: Option<S<f64>>,
    pub design_freezing_index_c_days: Option<S<f64>>,
    pub thawing_index_c_days: Option<S<f64>>,
    pub series: Option<S<String>>,
    pub design_from_series: Option<S<String>>,
    pub return_period_years: Option<S<f64>>,
    pub season: Option<S<i64>>,
    pub fit: Option<S<String>>,
    pub max_gap_days: Option<S<i64>>,
    pub surface_resistance_m2k_per_w: Option<S<f64>>,
    pub n_factor_freezing: Option<S<f64>>,
    pub n_factor_thawing: Option<S<f64>>,
    pub snow_depth_m: Option<S<Vec<f64>>>,
    pub snow_conductivity_w_per_mk: Option<S<f64>>,
}

#[derive(Debug, Deserialize, Default)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawSimulation {
    pub time_step_h: Option<S<f64>>,
    pub max_spin_up_years: Option<S<i64>>,
    pub min_spin_up_years: Option<S<i64>>,
    pub coarse_year_step_days: Option<S<i64>>,
    pub mesh: Option<S<String>>,
    pub domain_width_m: Option<S<f64>>,
    pub domain_depth_m: Option<S<f64>>,
    pub bottom_temperature_c: Option<S<f64>>,
    pub model: Option<S<String>>,
    pub solver_3d: Option<S<String>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawProbe {
    pub name: S<String>,
    pub x_m: S<f64>,
    pub z_m: S<f64>,
}
