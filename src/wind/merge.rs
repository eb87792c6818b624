//! Long wind records: many files (one per month of a reanalysis, say, or years of a
//! station's record), read in parallel and joined in time for each segment.
//!
//! Unlike a forecast, where each segment takes the first file that covers it, a long
//! record is the union of its files: a segment takes every step of every file that
//! covers all its pieces. Where two files give the same time, the one given first wins.
//! Memory grows with points × steps: grids are sampled at the segments' points as they
//! are read, one message at a time.

use super::{SegmentWind, WindError, WindSource, sample_grib2_with};
use crate::coast::{LatLon, Segment};
use crate::physics::Wind;
use crate::progress::Progress;
use chrono::{DateTime, Utc};
use rayon::prelude::*;
use std::collections::BTreeMap;

/// One file's wind at every point (piece midpoints, then segment midpoints).
type FileSamples = (Vec<DateTime<Utc>>, Vec<Option<Vec<Wind>>>);

fn read_one(
    source: &WindSource,
    points: &[LatLon],
    nearest: &dyn Fn(LatLon) -> bool,
) -> Result<FileSamples, WindError> {
    match source {
        WindSource::Series { series, .. } => {
            let s = &series.series;
            Ok((
                s.times.clone(),
                points
                    .iter()
                    .map(|p| nearest(*p).then(|| s.wind.clone()))
                    .collect(),
            ))
        }
        WindSource::Grib2 { path } => {
            let file = std::fs::File::open(path).map_err(|e| WindError::File {
                path: path.clone(),
                source: e.into(),
            })?;
            let samples = sample_grib2_with(
                std::io::BufReader::with_capacity(1 << 16, file),
                points,
                &Progress::new(),
            )
            .map_err(|source| WindError::File {
                path: path.clone(),
                source,
            })?;
            Ok((samples.times, samples.points))
        }
    }
}

/// Gives every segment the union of its wind over all files (read in parallel), in time
/// order. A segment no file covers is an error naming it. `progress` counts files read.
pub fn assign_wind_merged(
    sources: &[WindSource],
    segments: &[Segment],
    progress: &Progress,
) -> Result<Vec<SegmentWind>, WindError> {
    if sources.is_empty() {
        return Err(WindError::NoFiles);
    }
    let pieces: Vec<_> = segments.iter().map(Segment::pieces).collect();
    let midpoints: Vec<LatLon> = segments.iter().map(Segment::weighted_midpoint).collect();
    let mut points = Vec::new();
    for (s, p) in pieces.iter().enumerate() {
        points.extend(p.iter().map(|x| x.midpoint));
        points.push(midpoints[s]);
    }
    // A station file covers the points for which it is the nearest station (files
    // without a position cover everything), as for forecasts.
    let nearest_station = super::assign::nearest_station_of(sources);
    let done = std::sync::atomic::AtomicUsize::new(0);
    let per_file: Vec<Result<FileSamples, WindError>> = sources
        .par_iter()
        .enumerate()
        .map(|(k, source)| {
            if progress.is_cancelled() {
                return Err(WindError::File {
                    path: source.path().to_path_buf(),
                    source: super::WindFileError::Cancelled,
                });
            }
            let covers = |p: LatLon| match source {
                WindSource::Series { series, .. } if series.position.is_some() => {
                    nearest_station(p) == Some(k)
                }
                _ => true,
            };
            let r = read_one(source, &points, &covers);
            let n = done.fetch_add(1, std::sync::atomic::Ordering::Relaxed) + 1;
            progress.set(n as f32 / sources.len() as f32);
            r
        })
        .collect();
    let per_file: Vec<FileSamples> = per_file.into_iter().collect::<Result<_, _>>()?;
    let mut out = Vec::with_capacity(segments.len());
    let mut cursor = 0;
    for (s, seg) in segments.iter().enumerate() {
        let n = pieces[s].len();
        let range = cursor..cursor + n;
        let mid = cursor + n;
        cursor += n + 1;
        // time → (piece winds, midpoint wind), the first file giving a time wins.
        let mut merged: BTreeMap<DateTime<Utc>, (Vec<Wind>, Wind)> = BTreeMap::new();
        let mut source = None;
        for (k, (times, winds)) in per_file.iter().enumerate() {
            let piece_series: Option<Vec<&Vec<Wind>>> =
                range.clone().map(|i| winds[i].as_ref()).collect();
            let Some(piece_series) = piece_series else {
                continue;
            };
            source.get_or_insert(k);
            for (t_idx, t) in times.iter().enumerate() {
                merged.entry(*t).or_insert_with(|| {
                    let at_pieces: Vec<Wind> = piece_series.iter().map(|w| w[t_idx]).collect();
                    let at_mid = winds[mid]
                        .as_ref()
                        .map_or_else(|| mean_wind(&pieces[s], &at_pieces), |w| w[t_idx]);
                    (at_pieces, at_mid)
                });
            }
        }
        let Some(source) = source else {
            return Err(WindError::Uncovered {
                id: seg.id.clone(),
                lat_deg: midpoints[s].lat_deg,
                lon_deg: midpoints[s].lon_deg,
                files: sources.len(),
            });
        };
        let mut piece_winds: Vec<Vec<Wind>> = vec![Vec::with_capacity(merged.len()); n];
        let mut midpoint = Vec::with_capacity(merged.len());
        let mut times_out = Vec::with_capacity(merged.len());
        for (t, (at_pieces, at_mid)) in merged {
            times_out.push(t);
            for (p, w) in piece_winds.iter_mut().zip(at_pieces) {
                p.push(w);
            }
            midpoint.push(at_mid);
        }
        out.push(SegmentWind {
            source,
            times: times_out,
            pieces: piece_winds,
            midpoint,
        });
    }
    Ok(out)
}

fn mean_wind(pieces: &[crate::coast::Piece], winds: &[Wind]) -> Wind {
    let total: f64 = pieces.iter().map(|p| p.length_m).sum();
    let (mut u, mut v) = (0.0, 0.0);
    for (p, w) in pieces.iter().zip(winds) {
        u += w.u_m_s * p.length_m / total;
        v += w.v_m_s * p.length_m / total;
    }
    Wind::new(u, v)
}
