//! Loading wind files and giving each coast segment its wind.
//!
//! Each segment takes its wind from the first file that covers it: a grid covers a
//! segment when every piece midpoint lies inside it with values at every step; a point
//! series without a position covers every segment; a point series with a position covers
//! the segments to which it is the nearest of the positioned series given.

use super::{
    PointSeries, WindError, WindFileError, WindSeries, read_csv_series, sample_grib2,
    sample_grib2_with,
};
use crate::coast::{LatLon, Segment, distance_m};
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
}

impl WindSource {
    /// The file this wind comes from.
    #[must_use]
    pub fn path(&self) -> &Path {
        match self {
            WindSource::Series { path, .. } | WindSource::Grib2 { path } => path,
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

fn looks_like_grib(path: &Path, head: &[u8]) -> bool {
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
    let mut head = [0u8; 4];
    let mut file = std::fs::File::open(path)?;
    let n = file.read(&mut head)?;
    if looks_like_grib(path, &head[..n]) {
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

/// For a position, the index of the nearest source that is a point series with a
/// station position (`None` when there is none).
pub(super) fn nearest_station_of(sources: &[WindSource]) -> impl Fn(LatLon) -> Option<usize> + '_ {
    let stations: Vec<(usize, LatLon)> = sources
        .iter()
        .enumerate()
        .filter_map(|(k, s)| match s {
            WindSource::Series { series, .. } => series.position.map(|p| (k, p)),
            WindSource::Grib2 { .. } => None,
        })
        .collect();
    move |p: LatLon| {
        stations
            .iter()
            .min_by(|a, b| distance_m(a.1, p).total_cmp(&distance_m(b.1, p)))
            .map(|s| s.0)
    }
}

/// Gives every segment its wind, from the first source that covers it.
pub fn assign_wind(
    sources: &[WindSource],
    segments: &[Segment],
) -> Result<Vec<SegmentWind>, WindError> {
    let pieces: Vec<_> = segments.iter().map(Segment::pieces).collect();
    let midpoints: Vec<LatLon> = segments.iter().map(Segment::weighted_midpoint).collect();
    let nearest_station = nearest_station_of(sources);
    let mut out: Vec<Option<SegmentWind>> = vec![None; segments.len()];
    for (k, source) in sources.iter().enumerate() {
        let pending: Vec<usize> = (0..segments.len()).filter(|&s| out[s].is_none()).collect();
        if pending.is_empty() {
            break;
        }
        match source {
            WindSource::Series { series, .. } => {
                for s in pending {
                    if series.position.is_none() || nearest_station(midpoints[s]) == Some(k) {
                        let w = &series.series;
                        out[s] = Some(SegmentWind {
                            source: k,
                            times: w.times.clone(),
                            pieces: vec![w.wind.clone(); pieces[s].len()],
                            midpoint: w.wind.clone(),
                        });
                    }
                }
            }
            WindSource::Grib2 { path } => {
                let mut points = Vec::new();
                for &s in &pending {
                    points.extend(pieces[s].iter().map(|p| p.midpoint));
                    points.push(midpoints[s]);
                }
                let file = std::fs::File::open(path).map_err(|e| WindError::File {
                    path: path.clone(),
                    source: e.into(),
                })?;
                let samples =
                    sample_grib2(std::io::BufReader::with_capacity(1 << 16, file), &points)
                        .map_err(|source| WindError::File {
                            path: path.clone(),
                            source,
                        })?;
                let mut cursor = samples.points.into_iter();
                for s in pending {
                    let piece_winds: Vec<Option<Vec<Wind>>> =
                        cursor.by_ref().take(pieces[s].len()).collect();
                    let mid = cursor.next().flatten();
                    let Some(piece_winds) = piece_winds.into_iter().collect::<Option<Vec<_>>>()
                    else {
                        continue;
                    };
                    let midpoint = mid.unwrap_or_else(|| length_weighted(&pieces[s], &piece_winds));
                    out[s] = Some(SegmentWind {
                        source: k,
                        times: samples.times.clone(),
                        pieces: piece_winds,
                        midpoint,
                    });
                }
            }
        }
    }
    out.into_iter()
        .enumerate()
        .map(|(s, w)| {
            w.ok_or_else(|| WindError::Uncovered {
                id: segments[s].id.clone(),
                lat_deg: midpoints[s].lat_deg,
                lon_deg: midpoints[s].lon_deg,
                files: sources.len(),
            })
        })
        .collect()
}

/// Length-weighted mean of the pieces' winds at each time.
fn length_weighted(pieces: &[crate::coast::Piece], winds: &[Vec<Wind>]) -> Vec<Wind> {
    let total: f64 = pieces.iter().map(|p| p.length_m).sum();
    let steps = winds.first().map_or(0, Vec::len);
    (0..steps)
        .map(|t| {
            let (mut u, mut v) = (0.0, 0.0);
            for (p, w) in pieces.iter().zip(winds) {
                u += w[t].u_m_s * p.length_m / total;
                v += w[t].v_m_s * p.length_m / total;
            }
            Wind::new(u, v)
        })
        .collect()
}

/// Wind at a list of points, from [`sample_points`].
#[derive(Debug, Clone, PartialEq, Default)]
pub struct PointSamples {
    /// For each point, its wind, or `None` where no file covers it.
    pub series: Vec<Option<WindSeries>>,
    /// The latest reference (issue) time among the GRIB2 files used, if any.
    pub latest_reference: Option<DateTime<Utc>>,
}

/// The wind at arbitrary points (routes, probes around a stretch), each from the first
/// source that covers it, by the same rules as segments.
pub fn sample_points(sources: &[WindSource], points: &[LatLon]) -> Result<PointSamples, WindError> {
    sample_points_with(sources, points, &Progress::new())
}

/// Like [`sample_points`], reporting progress through each GRIB2 file and stopping
/// when asked to.
pub fn sample_points_with(
    sources: &[WindSource],
    points: &[LatLon],
    progress: &Progress,
) -> Result<PointSamples, WindError> {
    let nearest_station = nearest_station_of(sources);
    let mut out: Vec<Option<WindSeries>> = vec![None; points.len()];
    let mut latest_reference: Option<DateTime<Utc>> = None;
    for (k, source) in sources.iter().enumerate() {
        let pending: Vec<usize> = (0..points.len()).filter(|&i| out[i].is_none()).collect();
        if pending.is_empty() {
            break;
        }
        match source {
            WindSource::Series { series, .. } => {
                for i in pending {
                    if series.position.is_none() || nearest_station(points[i]) == Some(k) {
                        out[i] = Some(series.series.clone());
                    }
                }
            }
            WindSource::Grib2 { path } => {
                let wanted: Vec<LatLon> = pending.iter().map(|&i| points[i]).collect();
                let file = std::fs::File::open(path).map_err(|e| WindError::File {
                    path: path.clone(),
                    source: e.into(),
                })?;
                let samples = sample_grib2_with(
                    std::io::BufReader::with_capacity(1 << 16, file),
                    &wanted,
                    progress,
                )
                .map_err(|source| WindError::File {
                    path: path.clone(),
                    source,
                })?;
                if let Some(t) = samples.latest_reference {
                    latest_reference = Some(latest_reference.map_or(t, |x| x.max(t)));
                }
                for (i, wind) in pending.into_iter().zip(samples.points) {
                    out[i] = wind.map(|wind| WindSeries {
                        times: samples.times.clone(),
                        wind,
                    });
                }
            }
        }
    }
    Ok(PointSamples {
        series: out,
        latest_reference,
    })
}
