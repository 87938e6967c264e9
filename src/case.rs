//! Case files: a serde mirror of the TOML (`deny_unknown_fields`, spans kept) and the validated
//! [`Case`] in SI units. Validation is the only place input errors arise; each names the file,
//! line and column, the key, the bad value and what is allowed.
//!
//! Coordinates: x horizontal, 0 at the exterior face of the foundation wall, positive outward
//! (negative under the building); z depth below finished ground level, positive down (negative
//! above ground).
use crate::error::{Error, Location, Result};
use crate::physics::library::{bundled_soil, named_material, MATERIAL_NAMES, SOILS};
use crate::physics::material::Material;
use crate::physics::soil::{SoilIndex, Texture};
use serde::Deserialize;
use serde_spanned::Spanned;
use std::ops::Range;

type S<T> = Spanned<T>;

/// Raw TOML mirror of a case file.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawCase {
    pub name: String,
    #[serde(default)]
    pub description: Option<String>,
    pub building: RawBuilding,
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
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawVary {
    pub insulation: Option<S<i64>>,
    pub dimension: S<String>,
    pub min: S<f64>,
    pub max: S<f64>,
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
    pub thickness_m: S<f64>,
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
    pub series: Option<S<String>>,
    pub design_from_series: Option<S<String>>,
    pub return_period_years: Option<S<f64>>,
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
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawProbe {
    pub name: S<String>,
    pub x_m: S<f64>,
    pub z_m: S<f64>,
}

// ------------------------------------------------------------------------------------------------

/// Mesh fineness.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Fineness {
    /// 5 cm at edges, growth 1.3, at most 2 m.
    Coarse,
    /// 2 cm at edges, growth 1.2, at most 1 m (the default).
    Normal,
    /// 1 cm at edges, growth 1.1, at most 0.5 m.
    Fine,
}

impl Fineness {
    /// (cell size at edges, growth ratio, largest cell), m.
    pub fn sizes(self) -> (f64, f64, f64) {
        match self {
            Fineness::Coarse => (0.05, 1.3, 2.0),
            Fineness::Normal => (0.02, 1.2, 1.0),
            Fineness::Fine => (0.01, 1.1, 0.5),
        }
    }
    /// Parse a name.
    pub fn parse(s: &str) -> Option<Self> {
        match s {
            "coarse" => Some(Fineness::Coarse),
            "normal" => Some(Fineness::Normal),
            "fine" => Some(Fineness::Fine),
            _ => None,
        }
    }
}

/// The building.
#[derive(Debug, Clone, PartialEq)]
pub struct Building {
    /// Floor area A, m².
    pub floor_area_m2: f64,
    /// Exposed perimeter P, m.
    pub exposed_perimeter_m: f64,
    /// Characteristic dimension B' = A/(0.5 P), m.
    pub b_prime_m: f64,
    /// Indoor air temperature per calendar month, °C.
    pub indoor_monthly_c: [f64; 12],
    /// An unheated building: the indoor air follows the outdoor air.
    pub unheated: bool,
    /// Indoor surface resistance of the floor (heat flow down), m²·K/W. Default 0.17 (ISO 6946).
    pub r_si_floor: f64,
    /// Indoor surface resistance of the wall (horizontal flow), m²·K/W. Default 0.13 (ISO 6946).
    pub r_si_wall: f64,
}

/// Slab, wall, footing: the concrete parts.
#[derive(Debug, Clone, PartialEq)]
pub struct Slab {
    /// Thickness, m.
    pub thickness_m: f64,
    /// Material.
    pub material: Material,
    /// Height of the floor surface above ground level, m (z of the floor = −this).
    pub top_above_ground_m: f64,
    /// Floor finish resistance added to the floor surface resistance, m²·K/W.
    pub finish_r: f64,
}

/// Foundation wall.
#[derive(Debug, Clone, PartialEq)]
pub struct Wall {
    /// Thickness w, m; the wall spans x ∈ [−w, 0].
    pub thickness_m: f64,
    /// Material.
    pub material: Material,
    /// Height above ground where the section is cut (adiabatic), m.
    pub height_above_ground_m: f64,
}

/// Footing under the wall.
#[derive(Debug, Clone, PartialEq)]
pub struct Footing {
    /// Width, m.
    pub width_m: f64,
    /// How far the footing reaches beyond the wall's exterior face, m (default: centred,
    /// (width − w)/2).
    pub outer_projection_m: f64,
    /// Thickness, m.
    pub thickness_m: f64,
    /// Depth of the base below ground level, m.
    pub base_depth_m: f64,
    /// Material.
    pub material: Material,
}

/// A heated basement: the floor below ground level, optionally with backfill beside the wall.
#[derive(Debug, Clone, PartialEq)]
pub struct Basement {
    /// Depth of the basement floor surface below ground level, m.
    pub floor_depth_m: f64,
    /// Backfill beside the wall: (outward width from x = 0 m, depth m, material).
    pub backfill: Option<(f64, f64, Material)>,
}

/// Where an insulation piece sits.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum InsulationKind {
    /// Under the slab, over `band_width_m` from the wall's inside face (None: whole floor).
    UnderSlab {
        /// Band width, m.
        band_width_m: Option<f64>,
    },
    /// On the wall's outside face, x ∈ [0, t], from `top_m` to `bottom_m` (z).
    VerticalOutside {
        /// z of the top, m.
        top_m: f64,
        /// z of the bottom, m.
        bottom_m: f64,
    },
    /// On the wall's inside face, x ∈ [−w − t, −w], from `top_m` to `bottom_m` (z).
    VerticalInside {
        /// z of the top, m.
        top_m: f64,
        /// z of the bottom, m.
        bottom_m: f64,
    },
    /// Horizontal wing outside the wall: top face at z = `depth_m`, from x = `x_start_m` to
    /// x = `width_m`.
    Wing {
        /// z of the top face, m.
        depth_m: f64,
        /// Inner end, m (the outer face of any outside vertical insulation, else 0).
        x_start_m: f64,
        /// Outer end x, m.
        width_m: f64,
    },
}

/// An insulation piece.
#[derive(Debug, Clone, PartialEq)]
pub struct Insulation {
    /// Placement.
    pub kind: InsulationKind,
    /// Thickness, m.
    pub thickness_m: f64,
    /// Material (in-ground design conductivity).
    pub material: Material,
}

/// A soil stratum.
#[derive(Debug, Clone, PartialEq)]
pub struct Stratum {
    /// z of the bottom, m (`f64::INFINITY` for the last).
    pub bottom_m: f64,
    /// Material with freezing properties.
    pub material: Material,
}

/// Where the outdoor temperature comes from.
#[derive(Debug, Clone, PartialEq)]
pub enum ClimateSource {
    /// The sinusoid of [`Climate`] (given, or a design year built from a series).
    Sinusoid,
    /// A measured series of daily means, run through in full after spin-up on its first season.
    Series(crate::physics::climate::DailySeries),
}

/// A design year built from a measured series: the sinusoid with the series' mean whose freezing
/// index is the design freezing index.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct DesignYear {
    /// The series file.
    pub series: String,
    /// Return period, years.
    pub return_period_years: f64,
    /// Design air freezing index, °C·d.
    pub design_freezing_index_c_days: f64,
    /// Gumbel fit method.
    pub fit_method: crate::physics::climate::FitMethod,
}

/// Outdoor climate: θ(t) = mean − amplitude · cos(2π (t − coldest_day)/365) for a design year,
/// or a measured series; n-factors turn air into ground-surface temperature
/// (θ_s = n_f θ below 0 °C, n_t θ above), and a monthly snow cover adds a resistance
/// depth/k_snow on the ground surface.
#[derive(Debug, Clone, PartialEq)]
pub struct Climate {
    /// Source of the outdoor temperature.
    pub source: ClimateSource,
    /// Design-year provenance, when the sinusoid was built from a series.
    pub design: Option<DesignYear>,
    /// n-factor for freezing (surface / air freezing index). Default 1.
    pub n_freezing: f64,
    /// n-factor for thawing. Default 1.
    pub n_thawing: f64,
    /// Snow depth per calendar month, m. Default none.
    pub snow_depth_m: [f64; 12],
    /// Snow conductivity, W/(m·K). Default 0.2 (settled snow, common practice).
    pub snow_k: f64,
    /// Annual mean air temperature, °C.
    pub mean_c: f64,
    /// Amplitude, K.
    pub amplitude_k: f64,
    /// Day of year of the minimum (1–365).
    pub coldest_day: f64,
    /// External surface resistance, m²·K/W. Default 0.04 (ISO 6946).
    pub r_se: f64,
}

impl Climate {
    /// Ground-surface temperature for air temperature `t` (°C), by the n-factors.
    pub fn surface(&self, t: f64) -> f64 {
        if t < 0.0 {
            self.n_freezing * t
        } else {
            self.n_thawing * t
        }
    }

    /// Snow resistance on the ground in month `m` (0–11), m²·K/W.
    pub fn snow_r(&self, m: usize) -> f64 {
        self.snow_depth_m[m] / self.snow_k
    }

    /// Mean air temperature over calendar time [d0, d1] (days since 1 January 00:00), °C.
    pub fn mean_over(&self, d0: f64, d1: f64) -> f64 {
        let w = 2.0 * std::f64::consts::PI / 365.0;
        // The coldest day's middle is the minimum: day-of-year D spans [D − 1, D) in calendar days.
        let c = self.coldest_day - 0.5;
        if d1 - d0 < 1e-12 {
            return self.mean_c - self.amplitude_k * (w * (d0 - c)).cos();
        }
        self.mean_c
            - self.amplitude_k * ((w * (d1 - c)).sin() - (w * (d0 - c)).sin()) / (w * (d1 - d0))
    }
}

/// Numerical settings.
#[derive(Debug, Clone, PartialEq)]
pub struct Simulation {
    /// Time step, s. Default 86 400 s (1 day).
    pub dt_s: f64,
    /// Most years of spin-up before the reported year. Default 10.
    pub max_spin_up_years: usize,
    /// Fewest years of spin-up, whatever the periodicity test says. Default 1.
    pub min_spin_up_years: usize,
    /// Step (days) of an extra first spin-up year run before the others, or 0 for none. Default 5.
    /// That year only brings the annual wave and the deep ground near the periodic state, at a
    /// fifth of the cost; it is not compared, recorded or counted in the spin-up years.
    pub coarse_year_step_days: usize,
    /// Mesh fineness. Default normal.
    pub mesh: Fineness,
    /// Ground outside the wall, m. Default max(20, 2.5 B') (ISO 10211 cut-off planes).
    pub domain_width_m: f64,
    /// Ground depth, m. Default max(20, 2.5 B').
    pub domain_depth_m: f64,
    /// Fixed temperature at the bottom (°C), or adiabatic (None, the default).
    pub bottom_temperature_c: Option<f64>,
}

/// A named point whose temperature is recorded.
#[derive(Debug, Clone, PartialEq)]
pub struct Probe {
    /// Name.
    pub name: String,
    /// x, m.
    pub x_m: f64,
    /// z, m.
    pub z_m: f64,
}

/// A dimension the sizing may vary.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Dimension {
    /// Insulation thickness.
    ThicknessM,
    /// Wing width (outer end x).
    WidthM,
    /// Wing depth (top face z).
    DepthM,
    /// Vertical insulation bottom depth.
    BottomDepthM,
    /// Under-slab band width.
    BandWidthM,
    /// Footing base depth.
    FootingBaseDepthM,
}

/// One varied dimension of a sizing.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Vary {
    /// Insulation piece index (None for the footing).
    pub insulation: Option<usize>,
    /// Which dimension.
    pub dimension: Dimension,
    /// Smallest value, m.
    pub min: f64,
    /// Largest value, m.
    pub max: f64,
    /// Step, m.
    pub step: f64,
}

impl Vary {
    /// The candidate values min, min + step, …, max.
    pub fn values(&self) -> Vec<f64> {
        let n = ((self.max - self.min) / self.step + 1e-9).floor() as usize;
        (0..=n).map(|k| self.min + k as f64 * self.step).collect()
    }
}

/// Sizing settings.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Sizing {
    /// Required frost margin (footing base depth − frost depth under the footing), m.
    pub margin_m: f64,
    /// Varied dimensions (one or two).
    pub vary: Vec<Vary>,
    /// Cost weight per m³ of each insulation material by name.
    pub cost_per_m3: std::collections::BTreeMap<String, f64>,
    /// Cost weight per m³ of excavation.
    pub excavation_cost_per_m3: f64,
}

/// A validated case in SI units.
#[derive(Debug, Clone, PartialEq)]
pub struct Case {
    /// The file the case was read from (for messages).
    pub file: String,
    /// The case file's text as read.
    pub source: String,
    /// Case name.
    pub name: String,
    /// Building.
    pub building: Building,
    /// Slab.
    pub slab: Slab,
    /// Foundation wall.
    pub wall: Wall,
    /// Footing.
    pub footing: Footing,
    /// Heated basement, if the floor is below ground.
    pub basement: Option<Basement>,
    /// Insulation pieces.
    pub insulation: Vec<Insulation>,
    /// Granular fill under the slab: (thickness m, material).
    pub fill: Option<(f64, Material)>,
    /// Soil strata, top to bottom.
    pub strata: Vec<Stratum>,
    /// Climate.
    pub climate: Climate,
    /// Numerical settings.
    pub simulation: Simulation,
    /// Probes.
    pub probes: Vec<Probe>,
    /// Insulation sizing settings, if the case has a `[sizing]` table.
    pub sizing: Option<Sizing>,
}

impl Case {
    /// z of the floor surface, m (negative above ground).
    pub fn floor_z(&self) -> f64 {
        -self.slab.top_above_ground_m
    }
    /// z of the slab's underside, m.
    pub fn slab_bottom_z(&self) -> f64 {
        self.floor_z() + self.slab.thickness_m
    }
    /// x range of the footing, m.
    pub fn footing_x(&self) -> (f64, f64) {
        let x1 = self.footing.outer_projection_m;
        (x1 - self.footing.width_m, x1)
    }
    /// z of the footing's top, m.
    pub fn footing_top_z(&self) -> f64 {
        self.footing.base_depth_m - self.footing.thickness_m
    }
    /// Mean indoor temperature, °C.
    pub fn indoor_mean_c(&self) -> f64 {
        if self.building.unheated {
            return self.climate.mean_c;
        }
        self.building.indoor_monthly_c.iter().sum::<f64>() / 12.0
    }
    /// Soil material at depth z (m).
    pub fn soil_at(&self, z: f64) -> &Material {
        &self
            .strata
            .iter()
            .find(|s| z < s.bottom_m)
            .unwrap_or(self.strata.last().expect("≥1 stratum"))
            .material
    }
}

// ------------------------------------------------------------------------------------------------

struct Ctx<'a> {
    file: &'a str,
    src: &'a str,
}

impl Ctx<'_> {
    fn err(&self, span: Range<usize>, key: &str, msg: impl Into<String>) -> Error {
        Error::Input {
            location: Location::from_offset(self.file, self.src, span.start),
            key: key.to_string(),
            message: msg.into(),
        }
    }
    fn err_file(&self, key: &str, msg: impl Into<String>) -> Error {
        Error::Input {
            location: Location::file_only(self.file),
            key: key.to_string(),
            message: msg.into(),
        }
    }
    /// A value in (lo, hi] style checks: `lo < v <= hi` with units in the message.
    fn range(&self, v: &S<f64>, key: &str, lo: f64, hi: f64, unit: &str) -> Result<f64> {
        let x = *v.get_ref();
        if !x.is_finite() || x <= lo || x > hi {
            return Err(self.err(
                v.span(),
                key,
                format!("{x} {unit} is out of range; allowed: greater than {lo} and at most {hi} {unit}"),
            ));
        }
        Ok(x)
    }
    fn range_incl(&self, v: &S<f64>, key: &str, lo: f64, hi: f64, unit: &str) -> Result<f64> {
        let x = *v.get_ref();
        if !x.is_finite() || x < lo || x > hi {
            return Err(self.err(
                v.span(),
                key,
                format!("{x} {unit} is out of range; allowed: {lo} to {hi} {unit}"),
            ));
        }
        Ok(x)
    }
    /// An optional whole number in `lo..=hi` (`default` when absent); `allowed` is the text
    /// after "allowed: " in the error.
    fn int_opt(
        &self,
        v: &Option<S<i64>>,
        key: &str,
        (lo, hi): (i64, i64),
        allowed: &str,
        default: usize,
    ) -> Result<usize> {
        match v {
            None => Ok(default),
            Some(v) if (lo..=hi).contains(v.get_ref()) => Ok(*v.get_ref() as usize),
            Some(v) => Err(self.err(
                v.span(),
                key,
                format!("{} is out of range; allowed: {allowed}", v.get_ref()),
            )),
        }
    }
    fn opt(
        &self,
        v: &Option<S<f64>>,
        key: &str,
        lo: f64,
        hi: f64,
        unit: &str,
        default: f64,
    ) -> Result<f64> {
        v.as_ref()
            .map_or(Ok(default), |v| self.range_incl(v, key, lo, hi, unit))
    }
    fn material(&self, m: &Option<S<RawMaterial>>, key: &str, default: &str) -> Result<Material> {
        let Some(m) = m else {
            return Ok(named_material(default).expect("default material exists"));
        };
        match m.get_ref() {
            RawMaterial::Named(n) => named_material(n).ok_or_else(|| {
                self.err(
                    m.span(),
                    key,
                    format!(
                        "unknown material \"{n}\"; known: {}",
                        MATERIAL_NAMES.join(", ")
                    ),
                )
            }),
            RawMaterial::Explicit(e) => {
                if !(e.conductivity_w_per_mk > 0.0 && e.conductivity_w_per_mk <= 500.0) {
                    return Err(self.err(
                        m.span(),
                        &format!("{key}.conductivity_w_per_mk"),
                        format!(
                            "{} W/(m·K) is out of range; allowed: greater than 0 and at most 500",
                            e.conductivity_w_per_mk
                        ),
                    ));
                }
                if !(e.heat_capacity_j_per_m3k > 0.0 && e.heat_capacity_j_per_m3k <= 1e7) {
                    return Err(self.err(
                        m.span(),
                        &format!("{key}.heat_capacity_j_per_m3k"),
                        format!(
                            "{} J/(m³·K) is out of range; allowed: greater than 0 and at most 1e7",
                            e.heat_capacity_j_per_m3k
                        ),
                    ));
                }
                Ok(Material::inert(
                    key,
                    e.conductivity_w_per_mk,
                    e.heat_capacity_j_per_m3k,
                ))
            }
        }
    }
}

/// Parse and validate the case text `src`, read from `file` (used in messages).
pub fn parse_case(file: &str, src: &str) -> Result<Case> {
    let ctx = Ctx { file, src };
    let raw: RawCase = toml::from_str(src).map_err(|e| {
        let msg = e.message().to_string();
        let (location, table, line_key) = match e.span() {
            Some(sp) => (
                Location::from_offset(file, src, sp.start),
                table_at(src, sp.start),
                key_on_line(src, sp.start),
            ),
            None => (Location::file_only(file), String::new(), None),
        };
        // The key: the first `quoted` name in the message, else the key on the error's line, under
        // the table the error sits in.
        let named = msg.split('`').nth(1).map(str::to_string).or(line_key);
        let key = match (named.as_deref(), table.is_empty()) {
            (Some(k), false) => format!("{table}.{k}"),
            (Some(k), true) => k.to_string(),
            (None, false) => table,
            (None, true) => "(syntax)".into(),
        };
        Error::Input {
            location,
            key,
            message: msg,
        }
    })?;
    validate(&ctx, raw)
}

/// The `key` of a `key = value` line holding byte `offset`.
fn key_on_line(src: &str, offset: usize) -> Option<String> {
    let off = offset.min(src.len());
    let start = src[..off].rfind('\n').map_or(0, |k| k + 1);
    let line = src[start..].lines().next()?;
    let (k, _) = line.split_once('=')?;
    let k = k.trim();
    (!k.is_empty() && !k.starts_with('[')).then(|| k.to_string())
}

/// Name of the TOML table whose header precedes byte `offset` (e.g. `slab`, `insulation`).
fn table_at(src: &str, offset: usize) -> String {
    let end = src[offset.min(src.len())..]
        .find('\n')
        .map_or(src.len(), |k| offset + k);
    let upto = &src[..end];
    upto.lines()
        .filter_map(|l| {
            let l = l.trim();
            l.starts_with('[')
                .then(|| l.trim_matches(|c| c == '[' || c == ']').trim().to_string())
        })
        .next_back()
        .unwrap_or_default()
}

/// The directory that relative paths in a case file are resolved against.
fn case_dir(file: &str) -> std::path::PathBuf {
    std::path::Path::new(file)
        .parent()
        .map(|p| p.to_path_buf())
        .unwrap_or_default()
}

/// Read, parse and validate a case file.
pub fn load_case(path: &std::path::Path) -> Result<Case> {
    let src = std::fs::read_to_string(path).map_err(|e| Error::Io {
        path: path.to_path_buf(),
        source: e,
    })?;
    parse_case(&path.display().to_string(), &src)
}

fn validate(c: &Ctx, raw: RawCase) -> Result<Case> {
    // Building.
    let b = &raw.building;
    let (area, perim, bp) = match (&b.floor_area_m2, &b.exposed_perimeter_m, &b.characteristic_dimension_m) {
        (Some(a), Some(p), None) => {
            let a_v = c.range(a, "building.floor_area_m2", 0.0, 1e6, "m²")?;
            let p_v = c.range(p, "building.exposed_perimeter_m", 0.0, 1e5, "m")?;
            let bp = a_v / (0.5 * p_v);
            if bp < 1.0 {
                return Err(c.err(
                    p.span(),
                    "building.exposed_perimeter_m",
                    format!("{p_v} m gives B' = A/(0.5 P) = {bp:.3} m; allowed: B' of at least 1 m"),
                ));
            }
            (a_v, p_v, bp)
        }
        (Some(a), None, Some(d)) => {
            let a_v = c.range(a, "building.floor_area_m2", 0.0, 1e6, "m²")?;
            let bp = c.range(d, "building.characteristic_dimension_m", 1.0, 1000.0, "m")?;
            (a_v, 2.0 * a_v / bp, bp)
        }
        _ => {
            return Err(c.err_file(
                "building",
                "give floor_area_m2 with either exposed_perimeter_m or characteristic_dimension_m (not both)",
            ))
        }
    };
    let unheated = b.unheated.unwrap_or(false);
    let indoor_given =
        match (&b.indoor_temperature_c, unheated) {
            (Some(t), false) => t,
            (None, true) => &serde_spanned::Spanned::new(0..0, Temps::One(0.0)),
            (Some(t), true) => {
                return Err(c.err(
                    t.span(),
                    "building.indoor_temperature_c",
                    "not used for an unheated building (the indoor air follows the outdoor air)",
                ))
            }
            (None, false) => return Err(c.err_file(
                "building.indoor_temperature_c",
                "missing; give the indoor temperature (°C), 12 monthly values, or unheated = true",
            )),
        };
    let indoor = match indoor_given.get_ref() {
        Temps::One(t) => [*t; 12],
        Temps::Monthly(v) if v.len() == 12 => {
            let mut a = [0.0; 12];
            a.copy_from_slice(v);
            a
        }
        Temps::Monthly(v) => {
            return Err(c.err(
                indoor_given.span(),
                "building.indoor_temperature_c",
                format!(
                    "{} values given; allowed: one temperature or 12 monthly values (°C)",
                    v.len()
                ),
            ))
        }
    };
    if let Some(t) = indoor.iter().find(|t| !(-30.0..=40.0).contains(*t)) {
        return Err(c.err(
            indoor_given.span(),
            "building.indoor_temperature_c",
            format!("{t} °C is out of range; allowed: −30 to 40 °C"),
        ));
    }
    let building = Building {
        floor_area_m2: area,
        exposed_perimeter_m: perim,
        b_prime_m: bp,
        indoor_monthly_c: indoor,
        unheated,
        r_si_floor: c.opt(
            &b.floor_surface_resistance_m2k_per_w,
            "building.floor_surface_resistance_m2k_per_w",
            0.0,
            1.0,
            "m²·K/W",
            0.17,
        )?,
        r_si_wall: c.opt(
            &b.wall_surface_resistance_m2k_per_w,
            "building.wall_surface_resistance_m2k_per_w",
            0.0,
            1.0,
            "m²·K/W",
            0.13,
        )?,
    };

    // Concrete parts.
    let basement_depth = match &raw.basement {
        Some(b) => {
            if let Some(t) = &raw.slab.top_above_ground_m {
                return Err(c.err(
                    t.span(),
                    "slab.top_above_ground_m",
                    "not used with [basement]; the floor level is basement.floor_depth_m",
                ));
            }
            Some(c.range(&b.floor_depth_m, "basement.floor_depth_m", 0.0, 5.0, "m")?)
        }
        None => None,
    };
    let slab = Slab {
        thickness_m: c.range(&raw.slab.thickness_m, "slab.thickness_m", 0.0, 1.0, "m")?,
        material: c.material(&raw.slab.material, "slab.material", "concrete")?,
        top_above_ground_m: match basement_depth {
            Some(d) => -d,
            None => c.opt(
                &raw.slab.top_above_ground_m,
                "slab.top_above_ground_m",
                -0.5,
                1.5,
                "m",
                0.0,
            )?,
        },
        finish_r: c.opt(
            &raw.slab.finish_resistance_m2k_per_w,
            "slab.finish_resistance_m2k_per_w",
            0.0,
            10.0,
            "m²·K/W",
            0.0,
        )?,
    };
    let wall = Wall {
        thickness_m: c.range(&raw.wall.thickness_m, "wall.thickness_m", 0.0, 2.0, "m")?,
        material: c.material(&raw.wall.material, "wall.material", "concrete")?,
        height_above_ground_m: c.opt(
            &raw.wall.height_above_ground_m,
            "wall.height_above_ground_m",
            0.0,
            3.0,
            "m",
            0.3,
        )?,
    };
    if wall.height_above_ground_m < slab.top_above_ground_m {
        return Err(c.err(
            raw.wall.height_above_ground_m.as_ref().map_or(raw.wall.thickness_m.span(), |v| v.span()),
            "wall.height_above_ground_m",
            format!(
                "{} m is below the floor surface ({} m above ground); allowed: at least slab.top_above_ground_m",
                wall.height_above_ground_m, slab.top_above_ground_m
            ),
        ));
    }
    let fw = c.range(&raw.footing.width_m, "footing.width_m", 0.0, 5.0, "m")?;
    let footing = Footing {
        width_m: fw,
        outer_projection_m: c.opt(
            &raw.footing.outer_projection_m,
            "footing.outer_projection_m",
            0.0,
            (fw - wall.thickness_m).max(0.0),
            "m (at most width_m − wall.thickness_m, so the footing carries the whole wall)",
            0.5 * (fw - wall.thickness_m).max(0.0),
        )?,
        thickness_m: c.range(
            &raw.footing.thickness_m,
            "footing.thickness_m",
            0.0,
            3.0,
            "m",
        )?,
        base_depth_m: c.range(
            &raw.footing.base_depth_m,
            "footing.base_depth_m",
            0.0,
            6.0,
            "m",
        )?,
        material: c.material(&raw.footing.material, "footing.material", "concrete")?,
    };
    if footing.width_m < wall.thickness_m {
        return Err(c.err(
            raw.footing.width_m.span(),
            "footing.width_m",
            format!(
                "{} m is narrower than the wall ({} m); allowed: at least wall.thickness_m",
                footing.width_m, wall.thickness_m
            ),
        ));
    }
    let slab_bottom = -slab.top_above_ground_m + slab.thickness_m;
    if footing.base_depth_m <= slab_bottom + 1e-9 {
        return Err(c.err(
            raw.footing.base_depth_m.span(),
            "footing.base_depth_m",
            format!(
                "{} m puts the footing base above the slab's underside (z = {slab_bottom:.3} m); allowed: deeper than the slab",
                footing.base_depth_m
            ),
        ));
    }
    if footing.base_depth_m - footing.thickness_m < -slab.top_above_ground_m {
        return Err(c.err(
            raw.footing.thickness_m.span(),
            "footing.thickness_m",
            format!("{} m puts the footing's top above the floor surface; allowed: at most base_depth_m + slab.top_above_ground_m", footing.thickness_m),
        ));
    }

    // Climate.
    let cl = &raw.climate;
    let base = case_dir(c.file);
    let gap = c.int_opt(
        &cl.max_gap_days,
        "climate.max_gap_days",
        (0, 30),
        "0 to 30 days",
        3,
    )?;
    let read = |v: &S<String>, key: &str| -> Result<crate::physics::climate::DailySeries> {
        let p = base.join(v.get_ref());
        let opts = crate::physics::climate::ReadOptions {
            max_gap_days: gap,
            ..Default::default()
        };
        crate::physics::climate::read_series(&p, &opts).map_err(|e| match e {
            Error::Io { source, .. } => c.err(
                v.span(),
                key,
                format!("cannot read {}: {source}", p.display()),
            ),
            other => other,
        })
    };
    let sinus_given = cl.mean_c.is_some() || cl.amplitude_k.is_some() || cl.coldest_day.is_some();
    let kinds = usize::from(sinus_given)
        + usize::from(cl.series.is_some())
        + usize::from(cl.design_from_series.is_some());
    if kinds != 1 {
        return Err(c.err_file(
            "climate",
            "give exactly one of: mean_c + amplitude_k + coldest_day (a sinusoid), series = \"file.csv\" (a measured series), or design_from_series = \"file.csv\" (a design year)",
        ));
    }
    let (mean_c, mut amplitude_k, coldest_day);
    let (mut source, mut design) = (ClimateSource::Sinusoid, None);
    if sinus_given {
        let need = |v: &Option<S<f64>>, k: &str| {
            v.clone().ok_or_else(|| {
                c.err_file(
                    &format!("climate.{k}"),
                    "missing; a sinusoid needs mean_c, amplitude_k and coldest_day",
                )
            })
        };
        let (m, a, d) = (
            need(&cl.mean_c, "mean_c")?,
            need(&cl.amplitude_k, "amplitude_k")?,
            need(&cl.coldest_day, "coldest_day")?,
        );
        mean_c = c.range_incl(&m, "climate.mean_c", 0.1, 30.0, "°C").map_err(|_| {
            c.err(m.span(), "climate.mean_c", format!(
                "{} °C is out of range; allowed: 0.1 to 30 °C (the model assumes ground that thaws every year: no permafrost)", m.get_ref()))
        })?;
        amplitude_k = c.range_incl(&a, "climate.amplitude_k", 0.0, 30.0, "K")?;
        coldest_day = c.range_incl(&d, "climate.coldest_day", 1.0, 365.0, "day of year")?;
    } else {
        let (v, key) = cl
            .series
            .as_ref()
            .map(|v| (v, "climate.series"))
            .or(cl
                .design_from_series
                .as_ref()
                .map(|v| (v, "climate.design_from_series")))
            .expect("one source");
        let series = read(v, key)?;
        let (m, a, d) = crate::physics::climate::annual_sinusoid(&series);
        if m <= 0.0 {
            return Err(c.err(
                v.span(),
                key,
                format!("the series' mean is {m:.2} °C; allowed: above 0 °C (no permafrost)"),
            ));
        }
        mean_c = m;
        amplitude_k = a;
        coldest_day = d.clamp(1.0, 365.0);
        if cl.series.is_some() {
            source = ClimateSource::Series(series);
        } else {
            let t = cl.return_period_years.as_ref().map_or(Ok(100.0), |v| {
                c.range(v, "climate.return_period_years", 1.0, 10_000.0, "years")
            })?;
            let method = match cl.fit.as_ref().map(|f| f.get_ref().as_str()) {
                None | Some("lmoments") => crate::physics::climate::FitMethod::LMoments,
                Some("mle") => crate::physics::climate::FitMethod::MaximumLikelihood,
                Some(other) => {
                    let f = cl.fit.as_ref().expect("given");
                    return Err(c.err(
                        f.span(),
                        "climate.fit",
                        format!("\"{other}\" is not a fit method; allowed: lmoments, mle"),
                    ));
                }
            };
            let s = crate::physics::climate::summarize(&series, t, method)?;
            amplitude_k = crate::physics::climate::amplitude_for_freezing_index(
                m,
                s.design_freezing_index_c_days,
            );
            if amplitude_k > 40.0 {
                return Err(c.err(v.span(), key, format!("the design year needs an amplitude of {amplitude_k:.1} K; allowed: at most 40 K")));
            }
            design = Some(DesignYear {
                series: v.get_ref().clone(),
                return_period_years: t,
                design_freezing_index_c_days: s.design_freezing_index_c_days,
                fit_method: method,
            });
        }
    }
    for (v, k) in [(&cl.return_period_years, "return_period_years")] {
        if let (Some(v), None) = (v, &cl.design_from_series) {
            return Err(c.err(
                v.span(),
                &format!("climate.{k}"),
                "only used with design_from_series",
            ));
        }
    }
    let snow_depth_m = match &cl.snow_depth_m {
        None => [0.0; 12],
        Some(v) => {
            let d = v.get_ref();
            if d.len() != 12 || d.iter().any(|x| !(0.0..=3.0).contains(x)) {
                return Err(c.err(
                    v.span(),
                    "climate.snow_depth_m",
                    "allowed: 12 monthly snow depths (January first), each 0 to 3 m",
                ));
            }
            let mut a = [0.0; 12];
            a.copy_from_slice(d);
            a
        }
    };
    let climate = Climate {
        mean_c,
        amplitude_k,
        coldest_day,
        source,
        design,
        r_se: c.opt(
            &cl.surface_resistance_m2k_per_w,
            "climate.surface_resistance_m2k_per_w",
            0.0,
            5.0,
            "m²·K/W",
            0.04,
        )?,
        n_freezing: c.opt(
            &cl.n_factor_freezing,
            "climate.n_factor_freezing",
            0.1,
            1.5,
            "",
            1.0,
        )?,
        n_thawing: c.opt(
            &cl.n_factor_thawing,
            "climate.n_factor_thawing",
            0.1,
            2.5,
            "",
            1.0,
        )?,
        snow_depth_m,
        snow_k: c.opt(
            &cl.snow_conductivity_w_per_mk,
            "climate.snow_conductivity_w_per_mk",
            0.02,
            1.0,
            "W/(m·K)",
            0.2,
        )?,
    };

    // Simulation.
    let s = &raw.simulation;
    let dt_h = c.opt(
        &s.time_step_h,
        "simulation.time_step_h",
        0.25,
        24.0,
        "h",
        24.0,
    )?;
    if let Some(v) = &s.time_step_h {
        if (24.0 / dt_h - (24.0 / dt_h).round()).abs() > 1e-9 {
            return Err(c.err(v.span(), "simulation.time_step_h", format!("{dt_h} h does not divide a day; allowed: 24, 12, 8, 6, 4, 3, 2, 1, 0.5 or 0.25 h")));
        }
    }
    let max_years = c.int_opt(
        &s.max_spin_up_years,
        "simulation.max_spin_up_years",
        (1, 100),
        "1 to 100 years",
        10,
    )?;
    let mesh = match &s.mesh {
        None => Fineness::Normal,
        Some(v) => Fineness::parse(v.get_ref()).ok_or_else(|| {
            c.err(
                v.span(),
                "simulation.mesh",
                format!(
                    "\"{}\" is not a mesh fineness; allowed: coarse, normal, fine",
                    v.get_ref()
                ),
            )
        })?,
    };
    let dom_default = (2.5 * bp).max(20.0);
    let simulation = Simulation {
        dt_s: dt_h * 3600.0,
        max_spin_up_years: max_years,
        min_spin_up_years: c.int_opt(
            &s.min_spin_up_years,
            "simulation.min_spin_up_years",
            (1, max_years as i64),
            &format!("1 to max_spin_up_years ({max_years})"),
            1,
        )?,
        coarse_year_step_days: c.int_opt(
            &s.coarse_year_step_days,
            "simulation.coarse_year_step_days",
            (0, 30),
            "0 (none) to 30 days",
            5,
        )?,
        mesh,
        domain_width_m: c.opt(
            &s.domain_width_m,
            "simulation.domain_width_m",
            2.0,
            500.0,
            "m",
            dom_default,
        )?,
        domain_depth_m: c.opt(
            &s.domain_depth_m,
            "simulation.domain_depth_m",
            2.0,
            500.0,
            "m",
            dom_default,
        )?,
        bottom_temperature_c: s
            .bottom_temperature_c
            .as_ref()
            .map(|v| c.range_incl(v, "simulation.bottom_temperature_c", -10.0, 40.0, "°C"))
            .transpose()?,
    };

    // Soil strata.
    if raw.soil.get_ref().is_empty() {
        return Err(c.err(
            raw.soil.span(),
            "soil",
            "no strata; allowed: one or more [[soil]] tables, top to bottom",
        ));
    }
    let mut strata = Vec::new();
    let n_strata = raw.soil.get_ref().len();
    let mut last_bottom = 0.0;
    for (k, st) in raw.soil.get_ref().iter().enumerate() {
        let key = format!("soil[{k}]");
        let m = stratum(c, st, &key)?;
        let bottom = match &st.get_ref().bottom_depth_m {
            Some(v) if k + 1 < n_strata => {
                let z = c.range(v, &format!("{key}.bottom_depth_m"), last_bottom, 500.0, "m")?;
                last_bottom = z;
                z
            }
            Some(v) => {
                return Err(c.err(v.span(), &format!("{key}.bottom_depth_m"), "the last stratum reaches the bottom of the domain; allowed: omit bottom_depth_m here"))
            }
            None if k + 1 < n_strata => {
                return Err(c.err(st.span(), &format!("{key}.bottom_depth_m"), "missing; allowed: the depth (m) of this stratum's bottom, deeper than the one above"))
            }
            None => f64::INFINITY,
        };
        strata.push(Stratum {
            bottom_m: bottom,
            material: m,
        });
    }

    // Basement and backfill.
    let basement = match (&raw.basement, basement_depth) {
        (Some(b), Some(depth)) => {
            let backfill = match &b.backfill {
                None => None,
                Some(st) => {
                    if let Some(v) = &st.get_ref().bottom_depth_m {
                        return Err(c.err(
                            v.span(),
                            "basement.backfill.bottom_depth_m",
                            "not used for backfill; give basement.backfill_depth_m",
                        ));
                    }
                    let m = stratum(c, st, "basement.backfill")?;
                    let w = b.backfill_width_m.as_ref().map_or(Ok(1.0), |v| {
                        c.range(
                            v,
                            "basement.backfill_width_m",
                            0.0,
                            simulation.domain_width_m - 1.0,
                            "m",
                        )
                    })?;
                    let d = b
                        .backfill_depth_m
                        .as_ref()
                        .map_or(Ok(footing.base_depth_m), |v| {
                            c.range(
                                v,
                                "basement.backfill_depth_m",
                                0.0,
                                simulation.domain_depth_m - 1.0,
                                "m",
                            )
                        })?;
                    Some((w, d, m))
                }
            };
            Some(Basement {
                floor_depth_m: depth,
                backfill,
            })
        }
        _ => None,
    };

    // Fill.
    let fill = match &raw.fill {
        None => None,
        Some(f) => Some((
            c.range(&f.thickness_m, "fill.thickness_m", 0.0, 3.0, "m")?,
            c.material(&f.material, "fill.material", "gravel")?,
        )),
    };

    // Insulation.
    let mut insulation = Vec::new();
    let vert_out_t: f64 = raw
        .insulation
        .iter()
        .filter(|i| i.get_ref().kind.get_ref() == "vertical_outside")
        .map(|i| *i.get_ref().thickness_m.get_ref())
        .fold(0.0, f64::max);
    for (k, ins) in raw.insulation.iter().enumerate() {
        let key = format!("insulation[{k}]");
        let r = ins.get_ref();
        let t = c.range(&r.thickness_m, &format!("{key}.thickness_m"), 0.0, 1.0, "m")?;
        let mut material = match (&r.material, &r.conductivity_w_per_mk) {
            (Some(n), None) => named_material(n.get_ref()).ok_or_else(|| {
                c.err(
                    n.span(),
                    &format!("{key}.material"),
                    format!(
                        "unknown material \"{}\"; known: {}",
                        n.get_ref(),
                        MATERIAL_NAMES.join(", ")
                    ),
                )
            })?,
            (None, Some(k_v)) => {
                let kv = c.range(
                    k_v,
                    &format!("{key}.conductivity_w_per_mk"),
                    0.0,
                    1.0,
                    "W/(m·K)",
                )?;
                Material::inert("insulation", kv, 0.05e6)
            }
            _ => return Err(c.err(
                ins.span(),
                &key,
                "give either material (a name) or conductivity_w_per_mk, not both and not neither",
            )),
        };
        if let Some(cap) = &r.heat_capacity_j_per_m3k {
            let v = c.range(
                cap,
                &format!("{key}.heat_capacity_j_per_m3k"),
                0.0,
                1e7,
                "J/(m³·K)",
            )?;
            material.c_frozen = v;
            material.c_unfrozen = v;
        }
        let need = |v: &Option<S<f64>>, name: &str| -> Result<S<f64>> {
            v.clone().ok_or_else(|| {
                c.err(
                    ins.span(),
                    &format!("{key}.{name}"),
                    format!("missing; {} insulation needs {name}", r.kind.get_ref()),
                )
            })
        };
        let forbid = |v: &Option<S<f64>>, name: &str| -> Result<()> {
            match v {
                Some(v) => Err(c.err(
                    v.span(),
                    &format!("{key}.{name}"),
                    format!("not used by {} insulation; remove it", r.kind.get_ref()),
                )),
                None => Ok(()),
            }
        };
        let kind = match r.kind.get_ref().as_str() {
            "under_slab" => {
                forbid(&r.top_depth_m, "top_depth_m")?;
                forbid(&r.bottom_depth_m, "bottom_depth_m")?;
                forbid(&r.depth_m, "depth_m")?;
                forbid(&r.width_m, "width_m")?;
                let band = r.band_width_m.as_ref().map(|v| c.range(v, &format!("{key}.band_width_m"), 0.0, 0.5 * bp, "m")).transpose()?;
                InsulationKind::UnderSlab { band_width_m: band }
            }
            kind @ ("vertical_outside" | "vertical_inside") => {
                forbid(&r.band_width_m, "band_width_m")?;
                forbid(&r.depth_m, "depth_m")?;
                forbid(&r.width_m, "width_m")?;
                let outside = kind == "vertical_outside";
                let top_default = if outside { 0.0 } else { slab_bottom };
                let top = c.opt(&r.top_depth_m, &format!("{key}.top_depth_m"), -wall.height_above_ground_m, 6.0, "m", top_default)?;
                let bot_v = need(&r.bottom_depth_m, "bottom_depth_m")?;
                let bottom = c.range(&bot_v, &format!("{key}.bottom_depth_m"), top, 6.0, "m")?;
                if outside {
                    let fx1 = footing.outer_projection_m;
                    if fx1 > 1e-9 && bottom > footing.base_depth_m - footing.thickness_m + 1e-9 {
                        return Err(c.err(bot_v.span(), &format!("{key}.bottom_depth_m"), format!(
                            "{bottom} m runs into the footing, which projects {fx1:.3} m beyond the wall's outside face from z = {:.3} m; allowed: at most the footing's top depth",
                            footing.base_depth_m - footing.thickness_m)));
                    }
                    InsulationKind::VerticalOutside { top_m: top, bottom_m: bottom }
                } else {
                    let floor_z = -slab.top_above_ground_m;
                    if top < slab_bottom - 1e-9 && bottom > floor_z + 1e-9 {
                        let sp = r.top_depth_m.as_ref().map_or(ins.span(), |v| v.span());
                        return Err(c.err(sp, &format!("{key}.top_depth_m"), format!(
                            "{top} m overlaps the slab (z = {floor_z:.3} to {slab_bottom:.3} m); allowed: at or below the slab's underside, or wholly above the floor")));
                    }
                    InsulationKind::VerticalInside { top_m: top, bottom_m: bottom }
                }
            }
            "wing" => {
                forbid(&r.band_width_m, "band_width_m")?;
                forbid(&r.top_depth_m, "top_depth_m")?;
                forbid(&r.bottom_depth_m, "bottom_depth_m")?;
                let d_v = need(&r.depth_m, "depth_m")?;
                let depth = c.range_incl(&d_v, &format!("{key}.depth_m"), 0.0, 3.0, "m")?;
                let w_v = need(&r.width_m, "width_m")?;
                let width = c.range(&w_v, &format!("{key}.width_m"), vert_out_t, simulation.domain_width_m - 1.0, "m")?;
                let fx1 = footing.outer_projection_m;
                if fx1 > 1e-9 && depth + t > footing.base_depth_m - footing.thickness_m + 1e-9 && depth < footing.base_depth_m {
                    return Err(c.err(d_v.span(), &format!("{key}.depth_m"), format!(
                        "{depth} m puts the wing beside the footing, which projects {fx1:.3} m beyond the wall; allowed: above the footing's top ({:.3} m) or below its base",
                        footing.base_depth_m - footing.thickness_m)));
                }
                InsulationKind::Wing { depth_m: depth, x_start_m: vert_out_t, width_m: width }
            }
            other => {
                return Err(c.err(r.kind.span(), &format!("{key}.kind"), format!(
                    "\"{other}\" is not an insulation kind; allowed: under_slab, vertical_outside, vertical_inside, wing")))
            }
        };
        insulation.push(Insulation {
            kind,
            thickness_m: t,
            material,
        });
    }
    // Pieces of the same kind must not overlap each other; depth pieces stay inside the domain.
    for (k, a) in insulation.iter().enumerate() {
        for b in insulation.iter().skip(k + 1) {
            let same = std::mem::discriminant(&a.kind) == std::mem::discriminant(&b.kind);
            if same && !matches!(a.kind, InsulationKind::Wing { .. }) {
                return Err(c.err(raw.insulation[k].span(), &format!("insulation[{k}].kind"), "two pieces of this kind would overlap; allowed: one piece per kind except wing"));
            }
            if let (
                InsulationKind::Wing { depth_m: da, .. },
                InsulationKind::Wing { depth_m: db, .. },
            ) = (a.kind, b.kind)
            {
                if da < db + b.thickness_m && db < da + a.thickness_m {
                    return Err(c.err(
                        raw.insulation[k].span(),
                        &format!("insulation[{k}].depth_m"),
                        "two wing pieces overlap in depth; allowed: separate depths",
                    ));
                }
            }
        }
        let deepest = match a.kind {
            InsulationKind::VerticalOutside { bottom_m, .. }
            | InsulationKind::VerticalInside { bottom_m, .. } => bottom_m,
            InsulationKind::Wing { depth_m, .. } => depth_m + a.thickness_m,
            InsulationKind::UnderSlab { .. } => slab_bottom + a.thickness_m,
        };
        if deepest > simulation.domain_depth_m - 1.0 {
            return Err(c.err(raw.insulation[k].span(), &format!("insulation[{k}]"), format!(
                "reaches z = {deepest:.2} m, outside the domain (depth {:.1} m); allowed: at least 1 m above the bottom", simulation.domain_depth_m)));
        }
    }
    if footing.base_depth_m > simulation.domain_depth_m - 1.0 {
        return Err(c.err(
            raw.footing.base_depth_m.span(),
            "footing.base_depth_m",
            "outside the domain; increase simulation.domain_depth_m",
        ));
    }

    // Probes.
    let mut probes = Vec::new();
    let x_min = -(wall.thickness_m + 0.5 * bp);
    for (k, p) in raw.probe.iter().enumerate() {
        let r = p.get_ref();
        let x = c.range_incl(
            &r.x_m,
            &format!("probe[{k}].x_m"),
            x_min,
            simulation.domain_width_m,
            "m",
        )?;
        let z = c.range_incl(
            &r.z_m,
            &format!("probe[{k}].z_m"),
            -wall.height_above_ground_m,
            simulation.domain_depth_m,
            "m",
        )?;
        let name = r.name.get_ref().trim().to_string();
        if name.is_empty() || name.contains(',') || probes.iter().any(|q: &Probe| q.name == name) {
            return Err(c.err(
                r.name.span(),
                &format!("probe[{k}].name"),
                "empty, duplicate or containing a comma; allowed: a unique name without commas",
            ));
        }
        probes.push(Probe {
            name,
            x_m: x,
            z_m: z,
        });
    }

    let sizing = match &raw.sizing {
        None => None,
        Some(s) => Some(sizing(c, s, &insulation)?),
    };
    Ok(Case {
        sizing,
        file: c.file.to_string(),
        source: c.src.to_string(),
        name: raw.name,
        building,
        slab,
        wall,
        footing,
        basement,
        insulation,
        fill,
        strata,
        climate,
        simulation,
        probes,
    })
}

fn sizing(c: &Ctx, s: &RawSizing, insulation: &[Insulation]) -> Result<Sizing> {
    let n = s.vary.get_ref().len();
    if !(1..=2).contains(&n) {
        return Err(c.err(
            s.vary.span(),
            "sizing.vary",
            format!("{n} dimensions given; allowed: one or two [[sizing.vary]] tables"),
        ));
    }
    let mut vary = Vec::new();
    for (k, v) in s.vary.get_ref().iter().enumerate() {
        let key = format!("sizing.vary[{k}]");
        let r = v.get_ref();
        let dim = match r.dimension.get_ref().as_str() {
            "thickness_m" => Dimension::ThicknessM,
            "width_m" => Dimension::WidthM,
            "depth_m" => Dimension::DepthM,
            "bottom_depth_m" => Dimension::BottomDepthM,
            "band_width_m" => Dimension::BandWidthM,
            "footing.base_depth_m" => Dimension::FootingBaseDepthM,
            other => {
                return Err(c.err(r.dimension.span(), &format!("{key}.dimension"), format!(
                    "\"{other}\" is not a sizing dimension; allowed: thickness_m, width_m, depth_m, bottom_depth_m, band_width_m, footing.base_depth_m")))
            }
        };
        let piece = match (&r.insulation, dim) {
            (None, Dimension::FootingBaseDepthM) => None,
            (Some(i), Dimension::FootingBaseDepthM) => {
                return Err(c.err(
                    i.span(),
                    &format!("{key}.insulation"),
                    "not used with footing.base_depth_m; remove it",
                ))
            }
            (None, _) => {
                return Err(c.err(
                    v.span(),
                    &format!("{key}.insulation"),
                    "missing: the index of the insulation piece (0 = the first [[insulation]])",
                ))
            }
            (Some(i), _) => {
                let idx = *i.get_ref();
                if idx < 0 || idx as usize >= insulation.len() {
                    return Err(c.err(
                        i.span(),
                        &format!("{key}.insulation"),
                        format!(
                            "{idx} is not a piece; allowed: 0 to {}",
                            insulation.len() as i64 - 1
                        ),
                    ));
                }
                let kind = insulation[idx as usize].kind;
                let fits = match dim {
                    Dimension::ThicknessM => true,
                    Dimension::WidthM | Dimension::DepthM => {
                        matches!(kind, InsulationKind::Wing { .. })
                    }
                    Dimension::BottomDepthM => matches!(
                        kind,
                        InsulationKind::VerticalOutside { .. }
                            | InsulationKind::VerticalInside { .. }
                    ),
                    Dimension::BandWidthM => matches!(
                        kind,
                        InsulationKind::UnderSlab {
                            band_width_m: Some(_)
                        }
                    ),
                    Dimension::FootingBaseDepthM => false,
                };
                if !fits {
                    return Err(c.err(
                        r.dimension.span(),
                        &format!("{key}.dimension"),
                        format!(
                            "{} does not apply to insulation[{idx}]",
                            r.dimension.get_ref()
                        ),
                    ));
                }
                Some(idx as usize)
            }
        };
        let min = c.range_incl(&r.min, &format!("{key}.min"), 0.0, 20.0, "m")?;
        let max = c.range(&r.max, &format!("{key}.max"), min, 20.0, "m")?;
        let step = c.range(&r.step, &format!("{key}.step"), 0.0, max - min, "m")?;
        if (max - min) / step > 200.0 {
            return Err(c.err(
                r.step.span(),
                &format!("{key}.step"),
                "more than 200 steps; allowed: a coarser step",
            ));
        }
        if dim == Dimension::ThicknessM && min <= 0.0 {
            return Err(c.err(r.min.span(), &format!("{key}.min"), "a thickness of 0 m; allowed: greater than 0 (the uninsulated foundation is evaluated separately)"));
        }
        vary.push(Vary {
            insulation: piece,
            dimension: dim,
            min,
            max,
            step,
        });
    }
    let mut cost: std::collections::BTreeMap<String, f64> = [
        ("xps", 250.0),
        ("eps", 150.0),
        ("eps-ii", 120.0),
        ("insulation", 250.0),
    ]
    .iter()
    .map(|(k, v)| (k.to_string(), *v))
    .collect();
    for (k, v) in &s.cost_per_m3 {
        if !(*v >= 0.0 && v.is_finite()) {
            return Err(c.err_file(
                &format!("sizing.cost_per_m3.{k}"),
                format!("{v} is not a cost; allowed: 0 or more"),
            ));
        }
        cost.insert(k.clone(), *v);
    }
    Ok(Sizing {
        margin_m: c.opt(&s.margin_m, "sizing.margin_m", -1.0, 2.0, "m", 0.0)?,
        vary,
        cost_per_m3: cost,
        excavation_cost_per_m3: c.opt(
            &s.excavation_cost_per_m3,
            "sizing.excavation_cost_per_m3",
            0.0,
            1e6,
            "per m³",
            40.0,
        )?,
    })
}

fn stratum(c: &Ctx, st: &S<RawStratum>, key: &str) -> Result<Material> {
    let r = st.get_ref();
    let lib = match (&r.library, &r.soil_file) {
        (Some(n), None) => Some(bundled_soil(n.get_ref()).ok_or_else(|| {
            let names: Vec<&str> = SOILS.iter().map(|(n, _)| *n).collect();
            c.err(
                n.span(),
                &format!("{key}.library"),
                format!(
                    "no soil \"{}\" in the library; known: {}",
                    n.get_ref(),
                    names.join(", ")
                ),
            )
        })?),
        (None, Some(p)) => {
            let path = case_dir(c.file).join(p.get_ref());
            let src = std::fs::read_to_string(&path).map_err(|e| {
                c.err(
                    p.span(),
                    &format!("{key}.soil_file"),
                    format!("cannot read {}: {e}", path.display()),
                )
            })?;
            Some(crate::physics::library::parse_soil_file(
                &path.display().to_string(),
                &src,
            )?)
        }
        (Some(n), Some(_)) => {
            return Err(c.err(
                n.span(),
                &format!("{key}.library"),
                "give library or soil_file, not both",
            ))
        }
        (None, None) => None,
    };
    let method = match r.method.as_ref().map(|m| (m, m.get_ref().as_str())) {
        None | Some((_, "johansen")) => crate::physics::library::KMethod::Johansen,
        Some((_, "kersten")) => crate::physics::library::KMethod::Kersten,
        Some((m, other)) => {
            return Err(c.err(
                m.span(),
                &format!("{key}.method"),
                format!("\"{other}\" is not a conductivity method; allowed: johansen, kersten"),
            ))
        }
    };
    let f = |v: &Option<S<f64>>, name: &str, lo: f64, hi: f64, unit: &str| -> Result<Option<f64>> {
        v.as_ref()
            .map(|v| c.range(v, &format!("{key}.{name}"), lo, hi, unit))
            .transpose()
    };
    let rd = f(
        &r.dry_density_kg_per_m3,
        "dry_density_kg_per_m3",
        100.0,
        2700.0,
        "kg/m³",
    )?;
    let w = match &r.water_content {
        Some(v) => Some(c.range_incl(
            v,
            &format!("{key}.water_content"),
            0.0,
            5.0,
            "(fraction of dry mass)",
        )?),
        None => None,
    };
    let q = match &r.quartz_fraction {
        Some(v) => {
            Some(c.range_incl(v, &format!("{key}.quartz_fraction"), 0.0, 1.0, "(fraction)")?)
        }
        None => None,
    };
    let base = lib.as_ref().map(|l| l.index());
    let index = match (base, rd, w) {
        (Some(b), _, _) => Some(SoilIndex {
            dry_density: rd.unwrap_or(b.dry_density),
            water_content: w.unwrap_or(b.water_content),
            quartz: q.unwrap_or(b.quartz),
            texture: r.texture.unwrap_or(b.texture),
        }),
        (None, Some(rd), Some(w)) => Some(SoilIndex {
            dry_density: rd,
            water_content: w,
            quartz: q.unwrap_or(0.5),
            texture: r.texture.unwrap_or(Texture::Coarse),
        }),
        _ => None,
    };
    let derived = match (&index, &lib) {
        (Some(ix), lib) => {
            // A library soil keeps its explicit properties unless its index properties were changed.
            let changed = rd.is_some() || w.is_some() || q.is_some() || r.texture.is_some();
            let file = match lib {
                Some(l) if !changed => l.clone(),
                Some(l) => crate::physics::library::SoilFile {
                    dry_density_kg_per_m3: ix.dry_density,
                    water_content: ix.water_content,
                    quartz_fraction: ix.quartz,
                    texture: ix.texture,
                    k_unfrozen_w_per_mk: None,
                    k_frozen_w_per_mk: None,
                    c_unfrozen_j_per_m3k: None,
                    c_frozen_j_per_m3k: None,
                    latent_heat_j_per_m3: None,
                    ..l.clone()
                },
                None => crate::physics::library::SoilFile {
                    name: String::new(),
                    description: String::new(),
                    source: String::new(),
                    dry_density_kg_per_m3: ix.dry_density,
                    water_content: ix.water_content,
                    quartz_fraction: ix.quartz,
                    texture: ix.texture,
                    frost_susceptibility: String::new(),
                    k_unfrozen_w_per_mk: None,
                    k_frozen_w_per_mk: None,
                    c_unfrozen_j_per_m3k: None,
                    c_frozen_j_per_m3k: None,
                    latent_heat_j_per_m3: None,
                },
            };
            Some(crate::physics::library::soil_properties(&file, method).ok_or_else(|| {
                c.err(st.span(), &format!("{key}.method"), format!(
                    "Kersten's fits hold for water contents of at least 7 % (fine) or 1 % (coarse); this soil has {:.1} %; allowed: method = \"johansen\", or explicit conductivities",
                    100.0 * ix.water_content))
            })?)
        }
        (None, _) => None,
    };
    let (ku0, kf0, cu0, cf0, l0) = match derived {
        Some((a, b, cc, d, e)) => (Some(a), Some(b), Some(cc), Some(d), Some(e)),
        None => (None, None, None, None, None),
    };
    let missing = |name: &str| {
        c.err(st.span(), &format!("{key}.{name}"), format!(
            "missing; give library = \"<soil>\", or dry_density_kg_per_m3 and water_content, or explicit {name}"))
    };
    let ku = f(
        &r.k_unfrozen_w_per_mk,
        "k_unfrozen_w_per_mk",
        0.0,
        10.0,
        "W/(m·K)",
    )?
    .or(ku0)
    .ok_or_else(|| missing("k_unfrozen_w_per_mk"))?;
    let kf = f(
        &r.k_frozen_w_per_mk,
        "k_frozen_w_per_mk",
        0.0,
        10.0,
        "W/(m·K)",
    )?
    .or(kf0)
    .unwrap_or(ku);
    let cu = f(
        &r.c_unfrozen_j_per_m3k,
        "c_unfrozen_j_per_m3k",
        1e5,
        6e6,
        "J/(m³·K)",
    )?
    .or(cu0)
    .ok_or_else(|| missing("c_unfrozen_j_per_m3k"))?;
    let cf = f(
        &r.c_frozen_j_per_m3k,
        "c_frozen_j_per_m3k",
        1e5,
        6e6,
        "J/(m³·K)",
    )?
    .or(cf0)
    .unwrap_or(cu);
    let latent = match &r.latent_heat_j_per_m3 {
        Some(v) => c.range_incl(
            v,
            &format!("{key}.latent_heat_j_per_m3"),
            0.0,
            400e6,
            "J/m³",
        )?,
        None => l0.ok_or_else(|| missing("latent_heat_j_per_m3"))?,
    };
    let name = r
        .name
        .clone()
        .or(lib.map(|l| l.name))
        .unwrap_or_else(|| format!("soil {key}"));
    let m = Material {
        name,
        k_unfrozen: ku,
        k_frozen: kf,
        c_unfrozen: cu,
        c_frozen: cf,
        latent,
        t_freeze: match &r.freezing_point_c {
            Some(v) => c.range_incl(v, &format!("{key}.freezing_point_c"), -5.0, 0.0, "°C")?,
            None => 0.0,
        },
        freezing_interval: f(
            &r.freezing_interval_k,
            "freezing_interval_k",
            0.01,
            5.0,
            "K",
        )?
        .unwrap_or(0.5),
        curve: None,
    };
    match &r.unfrozen_water {
        None => Ok(m),
        Some(u) => {
            let uw = u.get_ref();
            let w_total = index
                .map(|ix| ix.water_content)
                .filter(|w| *w > 0.0)
                .ok_or_else(|| {
                    c.err(
                        u.span(),
                        &format!("{key}.unfrozen_water"),
                        "needs the water content: give water_content (or a library soil)",
                    )
                })?;
            let valid = uw.alpha > 0.0 && uw.alpha <= 2.0 && uw.beta < 0.0 && uw.beta > -5.0;
            if !valid {
                return Err(c.err(
                    u.span(),
                    &format!("{key}.unfrozen_water"),
                    format!("alpha {} and beta {}; allowed: alpha (fraction of dry mass at 1 K below freezing) in (0, 2], beta in (−5, 0)", uw.alpha, uw.beta),
                ));
            }
            if r.freezing_interval_k.is_some() {
                return Err(c.err(
                    u.span(),
                    &format!("{key}.freezing_interval_k"),
                    "give freezing_interval_k or unfrozen_water, not both",
                ));
            }
            Ok(m.with_unfrozen_water(w_total, uw.alpha, uw.beta))
        }
    }
}
