//! The wind model and its importers.
//!
//! Wind comes from files of two kinds: gridded fields over time (GRIB2) and point series
//! over time (CSV: a station, a buoy, a point forecast). Either way the rest of the tool
//! sees [`WindSeries`]: the 10 m wind at one place over time. Gridded files are sampled
//! at the points that need wind while they are read, so memory grows with points × steps,
//! never with the size of the grid.

mod assign;
mod conditions;
mod csv;
mod demo;
mod grib2;
mod grib2_grid;
mod grib2_writer;
mod inspect;
mod netcdf;
mod projection;
mod sst_grib;
mod waves;

pub use assign::{
    SegmentWind, WindSource, assign_wind, assign_wind_merged, assign_wind_runs, length_weighted_at,
    load_sources, map_wind_merged,
};
pub use conditions::{
    Conditions, GroupWind, LongRecord, Member, PointGroup, RunRule, Runs, SourceIdentity,
    SourceKind, SourceSpan, check_source, forecast_runs, sample_conditions, sample_run,
    sample_waves,
};
pub use csv::read_csv_series;
pub(crate) use csv::{csv_problem, find as find_column, parse_time};
pub use demo::{
    DEMO_HOURS, DEMO_LAT_NORTH_DEG, DEMO_LON_WEST_DEG, DEMO_NI, DEMO_NJ, DEMO_PAST_HOURS,
    DEMO_STEP_DEG, demo_forecast_grib2, demo_reference_time, demo_wave_height_m, demo_waves_grib2,
    demo_wind, demo_wind_field,
};
pub use grib2::{
    EnsembleMember, Grib2Samples, MemberSamples, sample_grib2, sample_grib2_member_with,
    sample_grib2_members, sample_grib2_members_with, sample_grib2_with,
};
pub use grib2_grid::{GribGrid, MAX_GAUSSIAN_N, NEAREST_CELLS, SEA_PROBE_CELLS, Weights};
pub use grib2_writer::{
    GridField, Parameter, encode_member_message, encode_message, encode_wind_message,
};
pub use inspect::{FileSummary, TimeSpan, grib2_wind_grids, inspect_file, inspect_grib2};
pub use netcdf::{is_netcdf, sample_netcdf_sst};
pub use projection::{Earth, Projection, RotatedPole, gaussian_latitudes, grid_to_earth};
pub use sst_grib::{SstSamples, sample_sst_grib2};
pub use waves::{
    Grib2Contents, Wave, WaveSamples, grib2_contents, sample_waves_grib2, sample_waves_grib2_sized,
};

use crate::coast::LatLon;
use crate::physics::Wind;
use chrono::{DateTime, Utc};
use std::path::PathBuf;

/// The 10 m wind at one place over time.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct WindSeries {
    /// Valid times, UTC, strictly increasing.
    pub times: Vec<DateTime<Utc>>,
    /// The wind at each time.
    pub wind: Vec<Wind>,
}

impl WindSeries {
    /// The wind at time `t`, linear in time between the two nearest steps (components
    /// interpolated); `None` outside the series or across a gap longer than
    /// `max_gap_h` hours.
    #[must_use]
    pub fn at(&self, t: DateTime<Utc>, max_gap_h: f64) -> Option<Wind> {
        wind_at_time(&self.times, &self.wind, t, max_gap_h)
    }
}

/// The wind at time `t` from times (strictly increasing) and winds, linear in time
/// between the two nearest steps (components interpolated); `None` outside the series or
/// across a gap longer than `max_gap_h` hours.
#[must_use]
pub fn wind_at_time(
    times: &[DateTime<Utc>],
    wind: &[Wind],
    t: DateTime<Utc>,
    max_gap_h: f64,
) -> Option<Wind> {
    time_step(times, t, max_gap_h)?.wind(wind)
}

/// Where a time falls on a series' times: on one of them, or between two (the index of
/// the later and the fraction of the way from the earlier). Found once for many series
/// on the same times, it spares a search per series.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum TimeStep {
    /// On the time at this index.
    At(usize),
    /// Between the times at `k - 1` and `k`, at this fraction of the way.
    Between(usize, f64),
}

impl TimeStep {
    /// The wind at this step of a series on the times it was found on.
    #[must_use]
    pub fn wind(self, wind: &[Wind]) -> Option<Wind> {
        match self {
            Self::At(k) => wind.get(k).copied(),
            Self::Between(k, frac) => Some(wind.get(k - 1)?.lerp(*wind.get(k)?, frac)),
        }
    }
}

/// Where `t` falls on `times` (strictly increasing); `None` outside them or across a
/// gap longer than `max_gap_h` hours.
#[must_use]
pub fn time_step(times: &[DateTime<Utc>], t: DateTime<Utc>, max_gap_h: f64) -> Option<TimeStep> {
    let k = times.partition_point(|x| *x < t);
    if k < times.len() && times[k] == t {
        return Some(TimeStep::At(k));
    }
    if k == 0 || k >= times.len() {
        return None;
    }
    let (a, b) = (times[k - 1], times[k]);
    let span_s = (b - a).num_seconds() as f64;
    if span_s > max_gap_h * 3600.0 {
        return None;
    }
    let frac = (t - a).num_seconds() as f64 / span_s;
    Some(TimeStep::Between(k, frac))
}

/// A point series read from a CSV file.
#[derive(Debug, Clone, PartialEq)]
pub struct PointSeries {
    /// Station position, if the file gives one; without it the series applies everywhere.
    pub position: Option<LatLon>,
    /// The wind over time. In a wave-only file (wave columns, no wind columns) `times`
    /// holds the rows' times and `wind` is empty (see [`PointSeries::has_wind`]).
    pub series: WindSeries,
    /// The sea state at each of `series.times` when the file has wave columns (`None`
    /// without them); an entry is `None` where the row's wave height cell is empty.
    pub waves: Option<Vec<Option<Wave>>>,
}

/// What is wrong inside one wind file. The path is added once, by [`WindError::File`].
#[derive(Debug, thiserror::Error)]
pub enum WindFileError {
    /// The file could not be read at all.
    #[error("cannot read the file: {0}")]
    Io(#[from] std::io::Error),
    /// Neither GRIB2, NetCDF nor CSV.
    #[error(
        "not a wind file this tool reads: expected GRIB2 (starting with \"GRIB\"), NetCDF (classic or NetCDF-4) or CSV text with a header line"
    )]
    UnknownFormat,
    /// A problem at a line of a CSV file.
    #[error("line {line}: {problem}")]
    Csv {
        /// 1-based line number.
        line: u64,
        /// What was wrong and what was expected.
        problem: String,
    },
    /// A problem in a GRIB2 message.
    #[error("message {message}: {problem}")]
    GribMessage {
        /// 1-based message number in the file.
        message: usize,
        /// What was wrong and what was expected.
        problem: String,
    },
    /// A problem with a GRIB2 file as a whole.
    #[error("{0}")]
    Grib(String),
    /// A problem in a NetCDF file.
    #[error("{0}")]
    Netcdf(String),
    /// The user stopped the reading.
    #[error("stopped before the end of the file")]
    Cancelled,
}

/// Why wind could not be had for the coast.
#[derive(Debug, thiserror::Error)]
pub enum WindError {
    /// A wind file is bad.
    #[error("bad wind file: {source}: {}", path.display())]
    File {
        /// The file.
        path: PathBuf,
        /// What is wrong in it.
        source: WindFileError,
    },
    /// No wind file covers a segment.
    #[error(
        "segment {id:?} (near {lat_deg:.3}°N, {lon_deg:.3}°E): no wind file covers it (checked {files} file(s)): give a wind file whose grid or station covers this segment"
    )]
    Uncovered {
        /// Segment id.
        id: String,
        /// Its midpoint latitude.
        lat_deg: f64,
        /// Its midpoint longitude.
        lon_deg: f64,
        /// How many files were tried.
        files: usize,
    },
    /// No wind files at all.
    #[error("no wind file given: expected at least one --wind FILE, or a scenario with wind files")]
    NoFiles,
    /// The files cannot make the runs asked for.
    #[error("{0}")]
    Runs(String),
}
