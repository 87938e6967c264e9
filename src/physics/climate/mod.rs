//! Outdoor climate data: the calendar, measured daily series (read from our CSV layout) and their
//! statistics (freezing indices, the annual sinusoid, Gumbel design freezing indices).
pub mod calendar;
pub mod series;
pub mod stats;

pub use calendar::{civil_from_days, day_of_year, days_from_civil, iso_date, month_of, seasons};
pub use series::{read_series, read_series_from, DailySeries, ReadOptions};
pub use stats::{
    amplitude_for_freezing_index, annual_sinusoid, freezing_indices, max_rise,
    season_freezing_index, summarize, thawing_indices, ClimateSummary, FitMethod, Gumbel,
    WinterIndex,
};
