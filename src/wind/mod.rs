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
        self.wind_by(|k| wind.get(k).copied())
    }

    /// The wind at this step of a track on the times it was found on.
    #[must_use]
    pub fn wind_on(self, track: &WindTrack) -> Option<Wind> {
        self.wind_by(|k| track.get(k))
    }

    fn wind_by(self, at: impl Fn(usize) -> Option<Wind>) -> Option<Wind> {
        match self {
            Self::At(k) => at(k),
            Self::Between(k, frac) => Some(at(k.checked_sub(1)?)?.lerp(at(k)?, frac)),
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

/// One point's wind at each time of its series, kept in half the memory where that
/// loses nothing: in single precision when every component is a single-precision
/// number (a grid's components along east and north are decoded and sampled in single
/// precision), else as given. Either way it gives back the very numbers it was made
/// from.
#[derive(Debug, Clone, PartialEq)]
pub enum WindTrack {
    /// Every component is exactly a single-precision number: (u, v), m/s.
    Single(Vec<[f32; 2]>),
    /// As given.
    Double(Vec<Wind>),
}

impl WindTrack {
    /// The track of these winds, in single precision when that keeps every one exactly.
    #[must_use]
    pub fn new(wind: Vec<Wind>) -> Self {
        if wind.iter().all(is_single) {
            Self::Single(
                wind.iter()
                    .map(|w| [w.u_m_s as f32, w.v_m_s as f32])
                    .collect(),
            )
        } else {
            Self::Double(wind)
        }
    }

    /// An empty track with room for `times` winds, kept in single precision until a
    /// wind that is not comes.
    #[must_use]
    pub fn with_capacity(times: usize) -> Self {
        Self::Single(Vec::with_capacity(times))
    }

    /// Adds the wind at the next time. A wind that single precision would change turns
    /// a single-precision track into one kept as given.
    pub fn push(&mut self, wind: Wind) {
        match self {
            Self::Single(w) if is_single(&wind) => {
                w.push([wind.u_m_s as f32, wind.v_m_s as f32]);
            }
            Self::Single(w) => {
                let mut given = Vec::with_capacity(w.capacity());
                given.extend(w.iter().map(|&pair| from_single(pair)));
                given.push(wind);
                *self = Self::Double(given);
            }
            Self::Double(w) => w.push(wind),
        }
    }

    /// Number of times.
    #[must_use]
    pub fn len(&self) -> usize {
        match self {
            Self::Single(w) => w.len(),
            Self::Double(w) => w.len(),
        }
    }

    /// Whether it holds no time.
    #[must_use]
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// The wind at time `k`.
    #[must_use]
    pub fn get(&self, k: usize) -> Option<Wind> {
        match self {
            Self::Single(w) => w.get(k).map(|&pair| from_single(pair)),
            Self::Double(w) => w.get(k).copied(),
        }
    }

    /// Every wind, in order.
    #[must_use]
    pub fn to_winds(&self) -> Vec<Wind> {
        (0..self.len()).filter_map(|k| self.get(k)).collect()
    }

    /// Every wind, in order, taking over the winds kept as given.
    #[must_use]
    pub fn into_winds(self) -> Vec<Wind> {
        match self {
            Self::Double(w) => w,
            single @ Self::Single(_) => single.to_winds(),
        }
    }
}

/// The wind of a single-precision (u, v) pair.
fn from_single([u, v]: [f32; 2]) -> Wind {
    Wind::new(f64::from(u), f64::from(v))
}

/// Whether both components of a wind are single-precision numbers.
fn is_single(w: &Wind) -> bool {
    let single = |x: f64| f64::from(x as f32).to_bits() == x.to_bits();
    single(w.u_m_s) && single(w.v_m_s)
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
        "segment {id:?} (near {at}): no wind file covers it (checked {files} file(s){windless}): give a wind file whose grid or station covers this segment"
    )]
    Uncovered {
        /// Segment id.
        id: String,
        /// Its length-weighted midpoint.
        at: crate::coast::LatLon,
        /// How many files were tried.
        files: usize,
        /// The files without any 10 m wind, as a clause after the count ("; waves.grib2
        /// holds no 10 m wind, only wave heights"), or empty.
        windless: String,
    },
    /// No wind files at all.
    #[error("no wind file given: expected at least one --wind FILE, or a scenario with wind files")]
    NoFiles,
    /// The files cannot make the runs asked for.
    #[error("{0}")]
    Runs(String),
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A track gives back exactly the winds it was made from, in single precision only
    /// when that holds every component (0.1 m/s is not a single-precision number; a
    /// grid's sampled component 3.25 is), and steps between times read it as they read
    /// the winds themselves.
    #[test]
    fn a_track_keeps_its_winds_exactly() {
        let exact = vec![Wind::new(3.25, -1.5), Wind::new(f64::from(7.3_f32), -0.0)];
        let inexact = vec![Wind::new(3.25, -1.5), Wind::new(0.1, 2.0)];
        for (winds, single) in [(exact, true), (inexact, false)] {
            let track = WindTrack::new(winds.clone());
            assert_eq!(matches!(track, WindTrack::Single(_)), single, "{track:?}");
            assert_eq!(track.len(), 2);
            assert_eq!(track.to_winds(), winds);
            assert_eq!(track.clone().into_winds(), winds);
            for (k, b) in winds.iter().enumerate() {
                let a = track.get(k).expect("a wind");
                assert_eq!(a.u_m_s.to_bits(), b.u_m_s.to_bits());
                assert_eq!(a.v_m_s.to_bits(), b.v_m_s.to_bits());
            }
            assert_eq!(track.get(2), None);
            for step in [TimeStep::At(1), TimeStep::Between(1, 0.3)] {
                assert_eq!(step.wind_on(&track), step.wind(&winds));
            }
            // Built wind by wind (as the GRIB2 reader lays them), the same track.
            let mut pushed = WindTrack::with_capacity(2);
            for w in &winds {
                pushed.push(*w);
            }
            assert_eq!(pushed, track);
        }
    }
}
