//! The validated case in SI units: what the rest of the program reads. Built only by validation
//! ([`super::parse_case`]); every value here is within its documented range.
//!
//! Coordinates: x horizontal, 0 at the exterior face of the foundation wall, positive outward
//! (negative under the building); z depth below finished ground level, positive down (negative
//! above ground).
use crate::physics::climate::{DailySeries, FitMethod};
use crate::physics::material::Material;

/// Mesh fineness.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
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
    /// (cell size at edges, growth ratio, largest cell) of the 3D model, m: one step coarser
    /// than the 2D section's (normal: the section's coarse sizes), which keeps a 3D run of a house
    /// to about 10⁵ unknowns.
    pub fn sizes_3d(self) -> (f64, f64, f64) {
        match self {
            Fineness::Coarse => (0.10, 1.4, 3.0),
            Fineness::Normal => Fineness::Coarse.sizes(),
            Fineness::Fine => Fineness::Normal.sizes(),
        }
    }
    /// The name in case files and on the command line.
    pub fn name(self) -> &'static str {
        match self {
            Fineness::Coarse => "coarse",
            Fineness::Normal => "normal",
            Fineness::Fine => "fine",
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

/// A rectangular plan (the 3D model's building).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Plan {
    /// Length along x of the 3D model, between the foundation wall's exterior faces, m.
    pub length_m: f64,
    /// Width along y, between the exterior faces, m.
    pub width_m: f64,
}

/// A horizontal insulation piece at each outside corner of the plan (3D model only): in plan
/// coordinates (u, v) measured outward from the two exterior wall faces meeting at the corner,
/// it fills x_start ≤ max(u, v) ≤ width and min(u, v) ≥ −length, from z = depth down by its
/// thickness. It is painted over the wing insulation it meets.
#[derive(Debug, Clone, PartialEq)]
pub struct CornerPiece {
    /// The piece as a wing of the section (its depth, inner and outer end, thickness, material).
    pub piece: Insulation,
    /// Extent along each wall from the plan's exterior corner, m.
    pub length_m: f64,
}

/// Which model a run uses.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub enum ModelKind {
    /// The 2D section (ISO 13370 equivalent floor), the default.
    #[serde(rename = "2d")]
    TwoD,
    /// The 3D quarter of a rectangular plan.
    #[serde(rename = "3d")]
    ThreeD,
}

/// The linear solver of the 3D model's Newton corrections (the 2D section always uses a direct
/// sparse Cholesky factor).
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Solver3d {
    /// Conjugate gradients preconditioned by a modified incomplete Cholesky factor, the
    /// default: the fastest on the bundled meshes (up to about a million unknowns), its
    /// iterations growing slowly with the grid.
    #[default]
    IncompleteCholesky,
    /// Flexible conjugate gradients preconditioned by an aggregation multigrid cycle on two
    /// threads: iterations independent of the grid, so the time grows nearly in proportion to
    /// the cells, but slower than the default on the bundled meshes.
    Multigrid,
}

impl Solver3d {
    /// Every solver with its case-file name (the serialised name too), the default first.
    pub const ALL: [(&'static str, Solver3d); 2] = [
        ("incomplete_cholesky", Solver3d::IncompleteCholesky),
        ("multigrid", Solver3d::Multigrid),
    ];

    /// The case-file name.
    pub fn name(self) -> &'static str {
        Self::ALL
            .iter()
            .find(|(_, s)| *s == self)
            .map_or("", |(n, _)| n)
    }
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
    /// Spread of the protected zone below the base from the vertical, degrees. Default 45
    /// (common practice for the load spread under a footing).
    pub protected_zone_angle_deg: f64,
}

/// A heated basement: the floor below ground level, optionally with backfill beside the wall.
#[derive(Debug, Clone, PartialEq)]
pub struct Basement {
    /// Depth of the basement floor surface below ground level, m.
    pub floor_depth_m: f64,
    /// Backfill beside the wall, if any.
    pub backfill: Option<Backfill>,
}

/// Backfill beside a basement wall: the block x ∈ [0, width], z ∈ [0, depth].
#[derive(Debug, Clone, PartialEq)]
pub struct Backfill {
    /// Outward width from the wall's exterior face x = 0, m.
    pub width_m: f64,
    /// Depth below ground level, m.
    pub depth_m: f64,
    /// Material (a soil, possibly freezing).
    pub material: Material,
}

/// Granular fill under the slab.
#[derive(Debug, Clone, PartialEq)]
pub struct Fill {
    /// Thickness below the slab (and below whole-floor insulation), m.
    pub thickness_m: f64,
    /// Material.
    pub material: Material,
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
    /// Horizontal board under the footing: top face at the footing's base, from x = `x0_m` to
    /// x = `x1_m` (at least the footing's width; the footing bears on it).
    UnderFooting {
        /// Inner end x, m.
        x0_m: f64,
        /// Outer end x, m.
        x1_m: f64,
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
    Series(DailySeries),
}

/// Where a design freezing index comes from when it is a statistic of a measured series.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct DesignYear {
    /// The series file.
    pub series: String,
    /// Return period, years.
    pub return_period_years: f64,
    /// Design air freezing index, °C·d.
    pub design_freezing_index_c_days: f64,
    /// Gumbel fit method.
    pub fit_method: FitMethod,
}

/// Outdoor climate: θ(t) = mean − amplitude · cos(2π (t − coldest_day)/365) for a design year,
/// or a measured series; n-factors turn air into ground-surface temperature
/// (θ_s = n_f θ below 0 °C, n_t θ above), and a monthly snow cover adds a resistance
/// depth/k_snow on the ground surface.
#[derive(Debug, Clone, PartialEq)]
pub struct Climate {
    /// Source of the outdoor temperature.
    pub source: ClimateSource,
    /// The design winter run once after the spin-up on the normal climate, if any.
    pub design_winter: Option<DesignWinter>,
    /// One season of a measured series (named by the year of its 1 July), run once after a
    /// spin-up on the series' normal year (its fitted sinusoid), instead of every season.
    pub season: Option<i64>,
    /// n-factor for freezing (surface / air freezing index). Default 1.
    pub n_freezing: f64,
    /// n-factor for thawing. Default 1.
    pub n_thawing: f64,
    /// Snow depth per calendar month, m. Default none.
    pub snow_depth_m: [f64; 12],
    /// Snow conductivity, W/(m·K). Default 0.2 (Sturm et al. 1997's regression at about
    /// 365 kg/m³: dense snow, conservative for frost).
    pub snow_k: f64,
    /// Annual mean air temperature of the normal climate, °C.
    pub mean_c: f64,
    /// Amplitude of the normal climate, K.
    pub amplitude_k: f64,
    /// Day of year of the minimum (1–365).
    pub coldest_day: f64,
    /// External surface resistance, m²·K/W. Default 0.04 (ISO 6946).
    pub r_se: f64,
}

/// A design winter: one year from the warmest day of the normal climate whose colder half (the
/// half where the normal sinusoid lies below its mean) has the amplitude that gives the design
/// air freezing index, θ = mean − A_w cos(2π (t − t_c)/365), the warmer halves keeping the
/// normal amplitude. The freezing index of such a year depends only on A_w:
/// F = (P/π)(A_w sin θ₀ − θ_m θ₀), θ₀ = arccos(θ_m/A_w) (the sinusoid's, because all freezing
/// falls in the colder half).
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct DesignWinter {
    /// Design air freezing index, °C·d.
    pub freezing_index_c_days: f64,
    /// Amplitude of the design winter's colder half, K.
    pub amplitude_k: f64,
    /// The series and statistics it comes from, when it is a series' return-period index.
    pub from_series: Option<DesignYear>,
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
    /// How far the wall reaches above the floor (or above ground level, if higher) at least, m.
    /// Default 1.0; 0 in the floor-only model of the heat-loss split.
    pub wall_extension_m: f64,
    /// The model. Default 2D.
    pub model: ModelKind,
    /// The 3D model's linear solver. Default incomplete Cholesky.
    pub solver_3d: Solver3d,
    /// Explicit mesh sizes (edge size, growth, largest size; m) for both the 2D and the 3D model,
    /// overriding `mesh`: for studies and tests that compare the two models on one set of sizes.
    /// Not a case-file key; None from validation.
    pub mesh_sizes: Option<(f64, f64, f64)>,
}

impl Simulation {
    /// Mesh sizes of the 2D section (edge size, growth, largest size), m.
    pub fn sizes_2d(&self) -> (f64, f64, f64) {
        self.mesh_sizes.unwrap_or(self.mesh.sizes())
    }
    /// Mesh sizes of the 3D model, m.
    pub fn sizes_3d(&self) -> (f64, f64, f64) {
        self.mesh_sizes.unwrap_or(self.mesh.sizes_3d())
    }
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
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
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
    /// How far a board under the footing reaches past its outer edge.
    PastOuterEdgeM,
    /// Footing base depth.
    FootingBaseDepthM,
}

/// One varied dimension of a sizing.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
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

/// A dimension of a `[[corner]]` board that the 3D corner check varies.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum CornerDimension {
    /// Outer end, m from the wall face.
    WidthM,
    /// Extent along each wall from the corner.
    LengthM,
    /// Thickness.
    ThicknessM,
}

impl CornerDimension {
    /// The TOML key under `[[corner]]`.
    pub fn key(self) -> &'static str {
        match self {
            CornerDimension::WidthM => "width_m",
            CornerDimension::LengthM => "length_m",
            CornerDimension::ThicknessM => "thickness_m",
        }
    }
}

/// `[sizing.corner]`: the 3D corner check's varied dimension of one corner board.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct CornerVary {
    /// Index of the `[[corner]]` board.
    pub corner: usize,
    /// Which dimension.
    pub dimension: CornerDimension,
    /// Smallest value, m.
    pub min: f64,
    /// Largest value, m.
    pub max: f64,
    /// Step, m.
    pub step: f64,
}

impl CornerVary {
    /// The candidate values min, min + step, …, max (rounded to 1 µm).
    pub fn values(&self) -> Vec<f64> {
        let n = ((self.max - self.min) / self.step + 1e-9).floor() as usize;
        (0..=n)
            .map(|k| ((self.min + k as f64 * self.step) * 1e6).round() / 1e6)
            .collect()
    }
}

/// Sizing settings.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Sizing {
    /// Required frost margin (footing base depth − frost depth under the footing), m.
    pub margin_m: f64,
    /// Varied dimensions (one or two).
    pub vary: Vec<Vary>,
    /// Cost weight per m³ of each insulation material by name.
    pub cost_per_m3: std::collections::BTreeMap<String, f64>,
    /// Cost weight per m³ of excavation.
    pub excavation_cost_per_m3: f64,
    /// The 3D corner check after the 2D sizing, if asked for.
    pub corner: Option<CornerVary>,
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
    /// The rectangular plan, if given (required by the 3D model).
    pub plan: Option<Plan>,
    /// Corner insulation pieces (3D model).
    pub corners: Vec<CornerPiece>,
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
    /// Granular fill under the slab.
    pub fill: Option<Fill>,
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
    /// Sampled inputs of `frostline uncertainty`, if the case has an `[uncertainty]` table.
    pub uncertainty: Option<Uncertainty>,
}

/// `[uncertainty]`: how many samples, the seed, and the distribution of each sampled input.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Uncertainty {
    /// Number of samples of the Latin hypercube.
    pub samples: usize,
    /// Seed of the sampling (the same seed, count and inputs give the same samples).
    pub seed: u64,
    /// The sampled inputs.
    pub inputs: Vec<UncertainInput>,
}

/// One sampled input: a key of the case and its distribution, in the key's own unit.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct UncertainInput {
    /// The key's path in the case file, e.g. `soil[0].water_content`, `climate.mean_c`.
    pub key: String,
    /// Its distribution.
    pub distribution: Distribution,
}

/// A truncation bound read back from JSON, where an absent (infinite) bound is written `null`.
fn bound<'de, D: serde::Deserializer<'de>>(d: D, absent: f64) -> Result<f64, D::Error> {
    use serde::Deserialize;
    Ok(Option::<f64>::deserialize(d)?.unwrap_or(absent))
}

fn lower_bound<'de, D: serde::Deserializer<'de>>(d: D) -> Result<f64, D::Error> {
    bound(d, f64::NEG_INFINITY)
}

fn upper_bound<'de, D: serde::Deserializer<'de>>(d: D) -> Result<f64, D::Error> {
    bound(d, f64::INFINITY)
}

/// A distribution of an input, optionally truncated to [min, max].
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Distribution {
    /// Normal (mean, standard deviation), truncated to [min, max] (±∞ when not given).
    Normal {
        /// Mean.
        mean: f64,
        /// Standard deviation (0: the mean itself).
        sd: f64,
        /// Lower truncation (−∞ when not given: `null` in JSON).
        #[serde(deserialize_with = "lower_bound")]
        min: f64,
        /// Upper truncation (+∞ when not given: `null` in JSON).
        #[serde(deserialize_with = "upper_bound")]
        max: f64,
    },
    /// Lognormal with the given mean and standard deviation of the value itself, truncated.
    Lognormal {
        /// Mean of the value.
        mean: f64,
        /// Standard deviation of the value.
        sd: f64,
        /// Lower truncation (−∞ when not given: `null` in JSON).
        #[serde(deserialize_with = "lower_bound")]
        min: f64,
        /// Upper truncation (+∞ when not given: `null` in JSON).
        #[serde(deserialize_with = "upper_bound")]
        max: f64,
    },
    /// Uniform on [min, max].
    Uniform {
        /// Lower end.
        min: f64,
        /// Upper end.
        max: f64,
    },
    /// Triangular on [min, max] with its mode.
    Triangular {
        /// Lower end.
        min: f64,
        /// Most likely value.
        mode: f64,
        /// Upper end.
        max: f64,
    },
    /// One complete season of the case's measured series (`climate.season`), each season
    /// equally likely: the winter drawn from the record.
    Seasons {
        /// The seasons, each named by the year of its 1 July, from the mildest to the most
        /// severe (by air freezing index, ties by year).
        years: Vec<i64>,
        /// Each season's air freezing index, °C·d (ascending; what the sensitivity ranking orders
        /// the seasons by).
        freezing_index_c_days: Vec<f64>,
    },
}

impl Distribution {
    /// The value the sensitivity ranking uses for sampled value `x`: `x` itself, or for a season
    /// its air freezing index (a season's year says nothing about its severity).
    pub fn rank_value(&self, x: f64) -> f64 {
        match self {
            Distribution::Seasons {
                years,
                freezing_index_c_days,
            } => years
                .iter()
                .position(|&y| y as f64 == x)
                .map_or(f64::NAN, |k| freezing_index_c_days[k]),
            _ => x,
        }
    }

    /// Whether sampled values are whole numbers (written to the case as integers).
    pub fn is_integer(&self) -> bool {
        matches!(self, Distribution::Seasons { .. })
    }
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
    /// Depth of the bearing soil's top, m: the footing base, or the underside of the board the
    /// footing bears on (the top of the protected zone).
    pub fn bearing_depth_m(&self) -> f64 {
        self.footing.base_depth_m + self.board_under_footing_m()
    }
    /// Thickness of the insulation board the footing bears on (`under_footing`), m; 0 without.
    pub fn board_under_footing_m(&self) -> f64 {
        self.insulation
            .iter()
            .filter(|i| matches!(i.kind, InsulationKind::UnderFooting { .. }))
            .map(|i| i.thickness_m)
            .fold(0.0, f64::max)
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
