//! What a run produces: the days and years it recorded, the field of the design day, and the
//! numerical record.
use crate::geometry::Section;
use crate::mesh::Mesh;
use crate::solver::SolverStats;
use ndarray::{Array2, Array3};

fn nan() -> f64 {
    f64::NAN
}

/// One day of the reported year.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Day {
    /// Day of year, 1–365.
    pub day_of_year: usize,
    /// Calendar date of a measured series' day, days since 1970-01-01 (None: a sinusoidal
    /// year, which has no calendar year).
    #[serde(default)]
    pub date: Option<i64>,
    /// Daily mean outdoor air temperature, °C.
    pub outdoor_c: f64,
    /// Indoor air temperature, °C.
    pub indoor_c: f64,
    /// Daily mean ground heat loss of the whole building (floor and junction), W.
    pub heat_loss_w: f64,
    /// Frost depth in open ground at the far edge, end of day, m.
    pub frost_open_m: f64,
    /// Top of the frozen layer there, m (NaN: no frost, or a file written before tops were
    /// recorded).
    #[serde(default = "nan")]
    pub frost_top_open_m: f64,
    /// Top of the frozen layer just outside the footing's outer face, m (NaN: none).
    #[serde(default = "nan")]
    pub frost_top_face_m: f64,
    /// Frost depth just outside the footing's outer face, end of day, m.
    pub frost_face_m: f64,
    /// Deepest frozen point below the footing base within the footing's width, end of day, m
    /// (0: none).
    pub frost_footing_m: f64,
    /// Frost depth within 0.5 m of the wall's exterior face, end of day, m.
    pub frost_beside_wall_m: f64,
    /// Least distance from the frost line to the footing's outer base corner, m (infinite
    /// without frost).
    pub frost_corner_distance_m: f64,
    /// Signed distance between the frozen ground and the protected zone, m (negative: frost in
    /// the zone).
    pub frost_margin_m: f64,
}

/// One simulated year.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Year {
    /// Ground heat loss of the whole building over the year (floor and wall/floor junction, and a
    /// basement's wall below ground: the heat from the indoor air minus the 1D part of the wall
    /// above ground), kWh.
    pub heat_loss_kwh: f64,
    /// Of which through the floor, kWh.
    pub floor_heat_loss_kwh: f64,
    /// Of which through the wall's inside face below ground level, kWh.
    pub wall_heat_loss_kwh: f64,
    /// Loss through the stated foundation wall above the floor (or ground level), 1D, kWh (not
    /// part of the ground heat loss).
    pub wall_above_ground_heat_loss_kwh: f64,
    /// Deepest frost within 0.5 m of the wall's exterior face, m.
    pub max_frost_beside_wall_m: f64,
    /// Deepest frost in open ground, m.
    pub max_frost_open_m: f64,
    /// Deepest frost below the footing base within its width, m.
    pub max_frost_footing_m: f64,
    /// Deepest frost just outside the footing's outer face, m.
    pub max_frost_face_m: f64,
    /// Least frost margin to the protected zone, m.
    pub min_frost_margin_m: f64,
    /// Relative energy-balance error of the year: (Σ heat in − Σ stored)/Σ |boundary heat flows|.
    pub energy_balance_error: f64,
}

/// The temperature field on one day.
#[derive(Debug, Clone)]
pub struct Field {
    /// Day of year.
    pub day_of_year: usize,
    /// Cell-centre temperature per grid cell (NaN for air), °C, indexed by `Grid::id`.
    pub t: Array2<f64>,
}

/// Everything a run produces.
#[derive(Debug, Clone)]
pub struct RunResult {
    /// The section (construction outlines).
    pub section: Section,
    /// Mesh used.
    pub mesh: Mesh,
    /// Grid fields of every day of the reported year (°C, NaN for air), in `days` order.
    pub daily_fields: Array3<f32>,
    /// The split of the section's heat loss into floor, junction and wall.
    pub split: super::split::HeatSplit,
    /// The normal (periodic) year when a design winter was run after it: its days (annual and
    /// monthly heat loss come from it) and its index in `years`.
    pub normal: Option<(Vec<Day>, usize)>,
    /// Days of the reported year, from the warmest day on.
    pub days: Vec<Day>,
    /// Probe temperatures per day of the reported year (probe-major), °C.
    pub probes: Vec<Vec<f64>>,
    /// Every simulated year, spin-up first (for a series: then every season).
    pub years: Vec<Year>,
    /// Index into `years` of the reported year (the last spin-up year, or the worst season).
    pub reported: usize,
    /// Years of spin-up before the reported year (for a series: before the first season).
    pub spin_up_years: usize,
    /// Extra first spin-up years run in steps of several days (0 or 1), not in `years` and not
    /// counted in `spin_up_years`.
    pub coarse_spin_up_years: usize,
    /// Sinusoidal climate: the reported year's heat loss minus that of the periodic year, kWh,
    /// estimated from how far the state at the year's end is from its start. Let ψ be the steady
    /// temperature with the indoor zone at 1 and the other zones at 0 (the fraction of heat
    /// released in a cell that eventually leaves through the building's faces). For conduction
    /// with fixed conductances d/dt Σ ψ_p V_p δH_p is the change in the indoor zone's heat flow
    /// caused by a state perturbation δH, so integrating over the year against the periodic
    /// solution gives exactly
    ///
    /// ```text
    /// Q_year − Q_periodic = P Σ_p ψ_p V_p (H_p,end − H_p,start)
    /// ```
    ///
    /// (approximate where frozen and unfrozen conductivities differ or snow changes the surface
    /// conductance). `None` for a measured series.
    pub periodicity_heat_loss_kwh: Option<f64>,
    /// Per-winter results of a measured series (empty for a design year).
    pub winters: Vec<WinterResult>,
    /// Whether the spin-up criterion was met.
    pub spin_up_converged: bool,
    /// Field on the day of maximum frost depth under the footing; if there is none, on the day of
    /// deepest open-ground frost while the air is below 0 °C; if no frost at all, the coldest day.
    pub field: Field,
    /// Steady-state heat loss at the annual means, W (whole building).
    pub steady_heat_loss_w: f64,
    /// Solver work.
    pub stats: SolverStats,
    /// Time steps of the whole run (the coarse spin-up year's included).
    pub time_steps: usize,
    /// Wall-clock time, s.
    pub wall_time_s: f64,
    /// Temperatures of the unknowns at the end of the spin-up, °C (the periodic state at the
    /// start of the spin-up year; a 3D run starts from it).
    pub spin_up_state: Vec<f64>,
}

/// The day-by-day records of a run, 2D or 3D: what the headline numbers and the daily and
/// monthly tables are made from.
#[derive(Debug, Clone, Copy)]
pub struct Records<'a> {
    /// Days of the reported period.
    pub days: &'a [Day],
    /// Every simulated year.
    pub years: &'a [Year],
    /// Index of the reported period in `years`.
    pub reported: usize,
    /// The normal year's days and index when a design winter was run after it.
    pub normal: Option<&'a (Vec<Day>, usize)>,
    /// Day of year of the least frost margin (the design field's day).
    pub design_day: usize,
}

impl<'a> Records<'a> {
    /// The reported year.
    pub fn final_year(&self) -> &'a Year {
        &self.years[self.reported]
    }
    /// The year heat-loss figures come from: the normal year when a design winter was run,
    /// else the reported one.
    pub fn heat_year(&self) -> &'a Year {
        self.normal.map_or(self.final_year(), |n| &self.years[n.1])
    }
    /// The days of [`Records::heat_year`].
    pub fn heat_days(&self) -> &'a [Day] {
        self.normal.map_or(self.days, |n| &n.0)
    }
}

impl RunResult {
    /// The run's day-by-day records.
    pub fn records(&self) -> Records<'_> {
        Records {
            days: &self.days,
            years: &self.years,
            reported: self.reported,
            normal: self.normal.as_ref(),
            design_day: self.field.day_of_year,
        }
    }
    /// The reported year.
    pub fn final_year(&self) -> &Year {
        self.records().final_year()
    }
    /// The year heat-loss figures come from: the normal year when a design winter was run,
    /// else the reported one.
    pub fn heat_year(&self) -> &Year {
        self.records().heat_year()
    }
    /// The days of [`RunResult::heat_year`].
    pub fn heat_days(&self) -> &[Day] {
        self.records().heat_days()
    }
    /// Spin-up years before the reported one.
    pub fn spin_up_years(&self) -> usize {
        self.spin_up_years
    }
}

/// Progress of a run, for a progress bar.
#[derive(Debug, Clone, Copy)]
pub struct Progress {
    /// Year index (0-based).
    pub year: usize,
    /// Day within the year (1–365).
    pub day: usize,
    /// Most years the run can take.
    pub max_years: usize,
}

/// Results of one winter of a measured series.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct WinterResult {
    /// The season 1 July – 30 June, named by the year it starts.
    pub winter: i64,
    /// Air freezing index of the season, °C·d.
    pub freezing_index_c_days: f64,
    /// Least frost margin to the protected zone, m.
    pub frost_margin_m: f64,
    /// Deepest frost below the footing base, m.
    pub frost_depth_under_footing_m: f64,
    /// Deepest frost in open ground, m.
    pub frost_depth_open_ground_m: f64,
    /// Deepest frost within 0.5 m of the wall, m.
    pub frost_depth_beside_wall_m: f64,
    /// Ground heat loss over the season, kWh.
    pub heat_loss_kwh: f64,
    /// Relative energy-balance error of the season.
    pub energy_balance_error: f64,
}
