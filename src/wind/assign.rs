//! Loading wind files and giving each coast segment its wind, by the coverage rule of
//! [`super::conditions`] (anchored at the segment's length-weighted midpoint).

use super::conditions::{
    Conditions, LongRecord, Member, PointGroup, RunRule, forecast_runs, sample_conditions,
    sample_run,
};
use super::{PointSeries, WindError, WindFileError, read_csv_series};
use crate::coast::Segment;
use crate::physics::Wind;
use crate::progress::Progress;
use chrono::{DateTime, Utc};
use std::io::Read;
use std::path::{Path, PathBuf};

/// A wind file, ready to give wind to segments.
#[derive(Debug, Clone, PartialEq)]
pub enum WindSource {
    /// A CSV point series, read whole.
    Series {
        /// The file.
        path: PathBuf,
        /// Its contents.
        series: PointSeries,
    },
    /// A GRIB2 file; it is read when segments ask for wind, sampled at their points.
    Grib2 {
        /// The file.
        path: PathBuf,
    },
    /// A NetCDF file (classic or NetCDF-4) of 10 m wind; read like a GRIB2 file.
    Netcdf {
        /// The file.
        path: PathBuf,
    },
}

impl WindSource {
    /// The file this wind comes from.
    #[must_use]
    pub fn path(&self) -> &Path {
        match self {
            WindSource::Series { path, .. }
            | WindSource::Grib2 { path }
            | WindSource::Netcdf { path } => path,
        }
    }
}

/// The wind one segment gets.
#[derive(Debug, Clone, PartialEq)]
pub struct SegmentWind {
    /// Index of the source in the list given to [`assign_wind`].
    pub source: usize,
    /// Valid times, UTC.
    pub times: Vec<DateTime<Utc>>,
    /// For each piece of the segment, the wind at its midpoint at each time.
    pub pieces: Vec<Vec<Wind>>,
    /// The wind at the segment's length-weighted midpoint at each time.
    pub midpoint: Vec<Wind>,
}

/// A GRIB2 file by its content; the extension only decides that a file named as GRIB
/// but holding something else gets the GRIB reader's message ("no GRIB message found").
pub(super) fn looks_like_grib(path: &Path, head: &[u8]) -> bool {
    let ext = path
        .extension()
        .and_then(|e| e.to_str())
        .map(str::to_ascii_lowercase)
        .unwrap_or_default();
    head.starts_with(b"GRIB") || matches!(ext.as_str(), "grib2" | "grb2" | "grib" | "grb")
}

/// Opens wind files: CSV files are read and checked now, GRIB2 files are recognised
/// and read later by [`assign_wind`].
pub fn load_sources(paths: &[PathBuf]) -> Result<Vec<WindSource>, WindError> {
    if paths.is_empty() {
        return Err(WindError::NoFiles);
    }
    paths
        .iter()
        .map(|path| {
            load_source(path).map_err(|source| WindError::File {
                path: path.clone(),
                source,
            })
        })
        .collect()
}

fn load_source(path: &Path) -> Result<WindSource, WindFileError> {
    let mut head = Vec::with_capacity(8);
    std::fs::File::open(path)?.take(8).read_to_end(&mut head)?;
    if super::netcdf::is_netcdf(&head) {
        return Ok(WindSource::Netcdf {
            path: path.to_path_buf(),
        });
    }
    if looks_like_grib(path, &head) {
        return Ok(WindSource::Grib2 {
            path: path.to_path_buf(),
        });
    }
    let bytes = std::fs::read(path)?;
    let text = String::from_utf8(bytes).map_err(|_| WindFileError::UnknownFormat)?;
    if text.trim().is_empty() {
        return Err(WindFileError::Csv {
            line: 1,
            problem: "the file is empty: expected a CSV header line".into(),
        });
    }
    Ok(WindSource::Series {
        path: path.to_path_buf(),
        series: read_csv_series(&text)?,
    })
}

/// The groups of a segment list: each segment's piece midpoints, with its
/// length-weighted midpoint as the anchor and the extra point.
fn segment_groups(segments: &[Segment]) -> Vec<PointGroup> {
    segments
        .iter()
        .map(|s| {
            let mid = s.weighted_midpoint();
            PointGroup::new(
                s.pieces().iter().map(|p| p.midpoint).collect(),
                mid,
                Some(mid),
            )
        })
        .collect()
}

/// Turns each segment's group wind into its [`SegmentWind`], or names the first
/// segment without wind.
fn segment_winds(
    sources: &[WindSource],
    segments: &[Segment],
    conditions: Conditions,
) -> Result<Vec<SegmentWind>, WindError> {
    segments
        .iter()
        .zip(conditions.groups)
        .map(|(seg, g)| segment_wind(sources, seg, g))
        .collect::<Result<_, _>>()
        .map_err(|e| name_windless(e, sources))
}

/// A segment without wind, with the GRIB2 files among `sources` that hold no 10 m
/// wind named in a clause of its message ("; waves.grib2 holds no 10 m wind, only wave
/// heights"). Called once on the error that leaves, not for every segment without wind:
/// the files' section headers are read again (no data decoded).
fn name_windless(e: WindError, sources: &[WindSource]) -> WindError {
    match e {
        WindError::Uncovered { id, at, files, .. } => WindError::Uncovered {
            id,
            at,
            files,
            windless: windless_files(sources),
        },
        other => other,
    }
}

/// The clause of [`name_windless`]; empty when every GRIB2 file has wind.
fn windless_files(sources: &[WindSource]) -> String {
    sources
        .iter()
        .filter_map(|s| {
            let WindSource::Grib2 { path } = s else {
                return None;
            };
            let file = std::fs::File::open(path).ok()?;
            let contents = super::waves::grib2_contents(std::io::BufReader::new(file)).ok()?;
            let name = path.file_name().unwrap_or(path.as_os_str()).display();
            (!contents.wind).then(|| {
                if contents.waves {
                    format!("; {name} holds no 10 m wind, only wave heights")
                } else {
                    format!("; {name} holds no 10 m wind")
                }
            })
        })
        .collect()
}

/// A segment's [`SegmentWind`] from its group's wind, or why it has none.
fn segment_wind(
    sources: &[WindSource],
    seg: &Segment,
    g: Option<super::GroupWind>,
) -> Result<SegmentWind, WindError> {
    let Some(g) = g else {
        return Err(WindError::Uncovered {
            id: seg.id.clone(),
            at: seg.weighted_midpoint(),
            files: sources.len(),
            windless: String::new(),
        });
    };
    let pieces: Vec<Vec<Wind>> = g
        .points
        .into_iter()
        .map(super::WindTrack::into_winds)
        .collect();
    let midpoint = g.extra.map_or_else(
        || length_weighted(&seg.pieces(), &pieces),
        super::WindTrack::into_winds,
    );
    Ok(SegmentWind {
        source: g.source,
        times: g.times.to_vec(),
        pieces,
        midpoint,
    })
}

/// Gives every segment its wind, from the first source that covers it (the rule of
/// [`sample_conditions`]).
pub fn assign_wind(
    sources: &[WindSource],
    segments: &[Segment],
) -> Result<Vec<SegmentWind>, WindError> {
    let conditions = sample_conditions(sources, &segment_groups(segments), &Progress::new())?;
    segment_winds(sources, segments, conditions)
}

/// One run's wind at every segment (`None`: the single forecast).
pub type RunWinds = (Option<Member>, Vec<SegmentWind>);

/// Gives every segment its wind in each run of the forecast ([`forecast_runs`]): one
/// entry without a member for a single forecast, else one per run, control first.
pub fn assign_wind_runs(
    sources: &[WindSource],
    segments: &[Segment],
    rule: RunRule,
) -> Result<Vec<RunWinds>, WindError> {
    let runs = forecast_runs(sources, rule)?;
    if runs.members.is_empty() {
        return Ok(vec![(None, assign_wind(sources, segments)?)]);
    }
    let groups = segment_groups(segments);
    runs.members
        .iter()
        .map(|&m| {
            let c = sample_run(sources, &groups, Some((&runs, m)), &Progress::new())?;
            Ok((Some(m), segment_winds(sources, segments, c)?))
        })
        .collect()
}

/// Gives every segment the union in time of every source that covers it (a long
/// record read in parallel, [`LongRecord`]). `progress` counts files read.
pub fn assign_wind_merged(
    sources: &[WindSource],
    segments: &[Segment],
    progress: &Progress,
) -> Result<Vec<SegmentWind>, WindError> {
    map_wind_merged(sources, segments, progress, |_, wind| wind)
}

/// Hands each segment's wind over a long record (the rule of [`assign_wind_merged`]) to
/// `f` as soon as it is joined, segments on every core, and gives `f`'s results in
/// segment order. Only the files' samples and the segments at hand are held at once, so
/// decades of hourly wind for many segments fit in memory; the first segment without
/// wind, in order, is the error.
pub fn map_wind_merged<T: Send>(
    sources: &[WindSource],
    segments: &[Segment],
    progress: &Progress,
    f: impl Fn(usize, SegmentWind) -> T + Sync,
) -> Result<Vec<T>, WindError> {
    use rayon::prelude::*;
    let groups = segment_groups(segments);
    let record = LongRecord::read(sources, &groups, progress)?;
    let out: Vec<Result<T, WindError>> = segments
        .par_iter()
        .enumerate()
        .map(|(i, seg)| segment_wind(sources, seg, record.group(i)).map(|w| f(i, w)))
        .collect();
    out.into_iter()
        .collect::<Result<_, _>>()
        .map_err(|e| name_windless(e, sources))
}

/// Length-weighted mean of the pieces' winds at each time.
fn length_weighted(pieces: &[crate::coast::Piece], winds: &[Vec<Wind>]) -> Vec<Wind> {
    let steps = winds.first().map_or(0, Vec::len);
    (0..steps)
        .map(|t| {
            let at: Vec<Wind> = winds.iter().map(|w| w[t]).collect();
            length_weighted_at(pieces, &at)
        })
        .collect()
}

/// Length-weighted mean of the pieces' winds at one time: the wind of a segment whose
/// midpoint no file covers while all its pieces are covered.
#[must_use]
pub fn length_weighted_at(pieces: &[crate::coast::Piece], winds: &[Wind]) -> Wind {
    let total: f64 = pieces.iter().map(|p| p.length_m).sum();
    let (mut u, mut v) = (0.0, 0.0);
    for (p, w) in pieces.iter().zip(winds) {
        u += w.u_m_s * p.length_m / total;
        v += w.v_m_s * p.length_m / total;
    }
    Wind::new(u, v)
}
