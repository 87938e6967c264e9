//! The saved results of a run, read back for plotting through the run directory's typed files
//! (`section.json`, `fields.i16`, `daily.csv`, `monthly.csv`, `probes.csv`).
use crate::error::Result;
use crate::files::us::{convert, figure, Units};
use crate::files::{self, section::PartOutline, tables};
use crate::run::Day;
use ndarray::{Array3, ArrayView2, Axis};
use std::path::Path;

/// Everything a plot needs.
#[derive(Debug, Clone)]
pub struct PlotData {
    /// Case name.
    pub case_name: String,
    /// Units of the charts' axes and data (converted by [`PlotData::charts_in`]).
    pub units: Units,
    /// Units of the field plots' and the sketch's axes and labels (their data stay in m, °C).
    pub field_units: Units,
    /// Grid x edges, m.
    pub xe: Vec<f64>,
    /// Grid z edges, m.
    pub ze: Vec<f64>,
    /// Construction outlines.
    pub parts: Vec<PartOutline>,
    /// Footing base depth, m.
    pub footing_base_depth_m: f64,
    /// Bearing level: the footing base, or the underside of the board it bears on, m.
    pub bearing_depth_m: f64,
    /// Footing x range, m.
    pub footing_x: (f64, f64),
    /// Frost-line temperature, °C.
    pub frost_line_c: f64,
    /// Days of the reported year.
    pub days: Vec<Day>,
    /// Monthly rows.
    pub monthly: Vec<tables::MonthlyRow>,
    /// Probe column headers.
    pub probe_names: Vec<String>,
    /// Probe series (probe-major), °C.
    pub probes: Vec<Vec<f64>>,
    /// Fields of every day (days × nz × nx), °C (NaN for air).
    pub fields: Array3<f64>,
    /// Index (into `days`) of the default field day.
    pub field_day_index: usize,
    /// The section file (freezing intervals and cell materials for the frost scalar).
    pub section: files::SectionFile,
}

impl PlotData {
    /// Read a finished run's directory; the files must agree with each other.
    pub fn load(dir: &Path) -> Result<Self> {
        let sec = files::read_section(dir)?;
        let daily: Vec<tables::DailyRow> = tables::read_rows(dir, "daily.csv")?;
        let days: Vec<Day> = daily.iter().map(Day::from).collect();
        if days.len() != sec.days || days.is_empty() {
            return Err(files::bad_file(
                dir,
                "daily.csv",
                format!("{} days; section.json says {}", days.len(), sec.days),
            ));
        }
        // Days of the year follow each other (1 after 365 or 366).
        for (k, w) in daily.windows(2).enumerate() {
            let (a, b) = (w[0].day_of_year, w[1].day_of_year);
            if !(1..=366).contains(&a) || !(b == a + 1 || (b == 1 && a >= 365)) {
                return Err(files::bad_file(
                    dir,
                    "daily.csv",
                    format!(
                        "data row {}: day_of_year {b} after {a}; allowed: the next day of the \
                         year (1 … 366)",
                        k + 2
                    ),
                ));
            }
        }
        let monthly: Vec<tables::MonthlyRow> = tables::read_rows(dir, "monthly.csv")?;
        if let Some(k) = (0..monthly.len()).find(|&k| monthly[k].month != k + 1) {
            return Err(files::bad_file(
                dir,
                "monthly.csv",
                format!(
                    "data row {}: month {}; allowed: the months 1 … 12 in order",
                    k + 1,
                    monthly[k].month
                ),
            ));
        }
        if monthly.len() != 12 {
            return Err(files::bad_file(
                dir,
                "monthly.csv",
                format!("{} months; allowed: 12", monthly.len()),
            ));
        }
        let probes = tables::read_probes(dir)?;
        if probes.series.iter().any(|s| s.len() != days.len()) {
            return Err(files::bad_file(
                dir,
                "probes.csv",
                format!("rows differ from the {} days of daily.csv", days.len()),
            ));
        }
        let fields = files::read_fields(dir, &sec)?;
        let field_day_index = days
            .iter()
            .position(|d| d.day_of_year == sec.field_day_of_year)
            .unwrap_or(0);
        Ok(PlotData {
            units: Units::Si,
            field_units: Units::Si,
            section: sec.clone(),
            case_name: sec.case_name,
            xe: sec.xe,
            ze: sec.ze,
            parts: sec.parts,
            footing_base_depth_m: sec.footing_base_depth_m,
            bearing_depth_m: sec.bearing_depth_m.max(sec.footing_base_depth_m),
            footing_x: sec.footing_x_m,
            frost_line_c: sec.frost_line_c,
            days,
            monthly,
            probe_names: probes.names,
            probes: probes.series,
            fields,
            field_day_index,
        })
    }

    /// Convert what the charts draw (the days' frost depths, temperatures and heat loss, the
    /// months, the probes and the footing base) to `units` ([`crate::files::us`]); the fields and
    /// the grid stay in SI for the field plots and the sketch, which are drawn before.
    pub fn charts_in(&mut self, units: Units) {
        if units == Units::Si || self.units == units {
            return;
        }
        let cv = |key: &str, v: &mut f64| {
            if let Some((_, u)) = convert(key, *v) {
                *v = u;
            }
        };
        for x in &mut self.days {
            for (k, v) in [
                ("frost_open_m", &mut x.frost_open_m),
                ("frost_top_open_m", &mut x.frost_top_open_m),
                ("frost_top_face_m", &mut x.frost_top_face_m),
                ("frost_face_m", &mut x.frost_face_m),
                ("frost_footing_m", &mut x.frost_footing_m),
                ("frost_beside_wall_m", &mut x.frost_beside_wall_m),
                ("frost_corner_distance_m", &mut x.frost_corner_distance_m),
                ("frost_margin_m", &mut x.frost_margin_m),
                ("outdoor_c", &mut x.outdoor_c),
                ("indoor_c", &mut x.indoor_c),
                ("heat_loss_w", &mut x.heat_loss_w),
            ] {
                cv(k, v);
            }
        }
        for m in &mut self.monthly {
            cv("ground_heat_loss_kwh", &mut m.ground_heat_loss_kwh);
            cv(
                "mean_outdoor_temperature_c",
                &mut m.mean_outdoor_temperature_c,
            );
            cv(
                "max_frost_depth_open_ground_m",
                &mut m.max_frost_depth_open_ground_m,
            );
            cv(
                "max_frost_depth_at_footing_face_m",
                &mut m.max_frost_depth_at_footing_face_m,
            );
        }
        for p in &mut self.probes {
            for v in p.iter_mut() {
                cv("temperature_c", v);
            }
        }
        cv("footing_base_depth_m", &mut self.footing_base_depth_m);
        cv("bearing_depth_m", &mut self.bearing_depth_m);
        self.units = units;
    }

    /// The unit label the charts show for SI label `si` ("m" → "ft" in US units).
    pub fn unit<'a>(&self, si: &'a str) -> &'a str {
        figure(self.units, si, 0.0, 0).0
    }

    /// The field of day index `k` (nz × nx), °C.
    pub fn field(&self, k: usize) -> ArrayView2<'_, f64> {
        self.fields.index_axis(Axis(0), k)
    }

    /// The frost scalar of day index `k` (row-major cells, NaN for air): the frost line is its
    /// `frost_line_c` isoline, as in the run.
    pub fn frost_field(&self, k: usize) -> Vec<f64> {
        self.field(k)
            .iter()
            .enumerate()
            .map(|(id, &t)| {
                if t.is_finite() {
                    self.section.frost_scalar(id, t)
                } else {
                    f64::NAN
                }
            })
            .collect()
    }

    /// Index of day of year `doy` in the saved days.
    pub fn day_index(&self, doy: usize) -> Option<usize> {
        self.days.iter().position(|d| d.day_of_year == doy)
    }
}
