//! Conditions: every wind source sampled once at the points the coast needs, by one
//! coverage rule shared by `index`, `plan` and `season`.
//!
//! Points come in groups that must take their wind from one source: the piece midpoints
//! of a segment or stretch, the four pumping probes offshore of a stretch, a point on the
//! way from port. A source covers a group when
//! - it is a grid with values at every point of the group at every step;
//! - it is a point series without a position (it applies everywhere);
//! - it is a point series with a position, and it is the nearest of the positioned
//!   series given to the group's anchor.
//!
//! Groups that need spatial differences (Ekman pumping) take grids only: two stations'
//! winds differ for reasons that have nothing to do with a wind-stress curl.
//!
//! A forecast takes, for each group, the first source that covers it
//! ([`sample_conditions`]); a long record takes every source that covers it, joined in
//! time, the first source winning where two give the same time ([`LongRecord`]).

use super::{
    PointSeries, WindError, WindFileError, WindSource, WindTrack, grib2_contents,
    sample_grib2_member_with, sample_grib2_with, sample_waves_grib2_sized,
};
use crate::coast::{LatLon, distance_m};
use crate::physics::Wind;
use crate::progress::Progress;
use chrono::{DateTime, Utc};
use rayon::prelude::*;
use std::collections::HashMap;
use std::path::{Path, PathBuf};
use std::sync::Arc;
use std::time::SystemTime;

/// Points that must take their wind from one source.
#[derive(Debug, Clone, PartialEq)]
pub struct PointGroup {
    /// Points that must all be covered.
    pub points: Vec<LatLon>,
    /// A point sampled from the same source when that source covers it (a segment's
    /// length-weighted midpoint); it does not decide coverage.
    pub extra: Option<LatLon>,
    /// Where the nearest-station rule measures from.
    pub anchor: LatLon,
    /// Only gridded sources may cover the group.
    pub grids_only: bool,
}

impl PointGroup {
    /// A group of points measured from `anchor`, with an optional extra point.
    #[must_use]
    pub fn new(points: Vec<LatLon>, anchor: LatLon, extra: Option<LatLon>) -> Self {
        Self {
            points,
            extra,
            anchor,
            grids_only: false,
        }
    }

    /// A single point.
    #[must_use]
    pub fn point(p: LatLon) -> Self {
        Self::new(vec![p], p, None)
    }
}

/// The wind one group gets.
#[derive(Debug, Clone, PartialEq)]
pub struct GroupWind {
    /// Index of the first source used, in the list given.
    pub source: usize,
    /// Valid times, UTC, increasing (shared by every group read from the same file).
    pub times: Arc<[DateTime<Utc>]>,
    /// For each point of the group, the wind at each time.
    pub points: Vec<WindTrack>,
    /// The wind at the extra point at each time, where the source covers it.
    pub extra: Option<WindTrack>,
}

/// The wind of every group.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Conditions {
    /// For each group, its wind, or `None` where no source covers it.
    pub groups: Vec<Option<GroupWind>>,
    /// The latest reference (issue) time among the GRIB2 files used, if any.
    pub latest_reference: Option<DateTime<Utc>>,
    /// What each source held, in the order given; `None` for a source that was not
    /// read because the sources before it covered every group.
    pub sources: Vec<Option<SourceSpan>>,
}

/// What one source holds, as read.
#[derive(Debug, Clone, PartialEq)]
pub struct SourceSpan {
    /// A grid, or a station's point series (with its position, if the file gives one).
    pub kind: SourceKind,
    /// First and last valid time.
    pub times: Option<(DateTime<Utc>, DateTime<Utc>)>,
    /// Number of time steps.
    pub steps: usize,
    /// The latest issue time the file states (GRIB2 reference time), if any.
    pub issued: Option<DateTime<Utc>>,
}

/// The kind of a wind source.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum SourceKind {
    /// A gridded field (GRIB2).
    Grid,
    /// A point series (CSV), with the station's position where the file gives it.
    Station(Option<LatLon>),
}

impl SourceSpan {
    fn of(source: &WindSource, read: &SourceSamples) -> Self {
        Self {
            kind: match source {
                WindSource::Grib2 { .. } | WindSource::Netcdf { .. } => SourceKind::Grid,
                WindSource::Series { series, .. } => SourceKind::Station(series.position),
            },
            times: read.times.first().copied().zip(read.times.last().copied()),
            steps: read.times.len(),
            issued: read.latest_reference,
        }
    }
}

/// What identifies a source file's contents without reading it: its path, size and
/// modification time. A file whose identity is unchanged is not read again.
#[derive(Debug, Clone, PartialEq, Eq, Hash)]
pub struct SourceIdentity {
    /// The file.
    pub path: PathBuf,
    /// Its size, bytes.
    pub len: u64,
    /// Its modification time.
    pub modified: Option<SystemTime>,
}

impl SourceIdentity {
    /// The identity of a file now.
    pub fn of(path: &Path) -> Result<Self, WindError> {
        let meta = std::fs::metadata(path).map_err(|e| WindError::File {
            path: path.to_path_buf(),
            source: e.into(),
        })?;
        Ok(Self {
            path: path.to_path_buf(),
            len: meta.len(),
            modified: meta.modified().ok(),
        })
    }
}

/// One source's wind at a list of points.
struct SourceSamples {
    times: Vec<DateTime<Utc>>,
    /// Per point; for a point series every point shares the series.
    points: Vec<Option<Arc<WindTrack>>>,
    latest_reference: Option<DateTime<Utc>>,
}

/// One run of an ensemble: an ensemble member the files declare, or a whole file when
/// each file is taken as a run (a poor man's ensemble).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub struct Member {
    /// Its number in tables: the perturbation number (the control is 0), or the file's
    /// place in the list, from 1.
    pub number: u32,
    /// An unperturbed control run (WMO Code Table 4.6 types 0 and 1).
    pub control: bool,
    /// The GRIB2 fields it is made of: (Code Table 4.6 type, perturbation number).
    grib: Option<(u8, u8)>,
    /// The file it is, 0-based, when each file is a run.
    file: Option<usize>,
}

impl Member {
    /// "control", "member 3", or "file 2".
    #[must_use]
    pub fn label(&self) -> String {
        match (self.file, self.control) {
            (Some(_), _) => format!("file {}", self.number),
            (None, true) => "control".into(),
            (None, false) => format!("member {}", self.number),
        }
    }

    /// Whether source `k` gives wind to this run, and which of its fields.
    fn reads(&self, k: usize, source: &WindSource, declared: &[Vec<(u8, u8)>]) -> Option<Pick> {
        match (self.file, self.grib) {
            (Some(f), _) => (f == k).then_some(Pick::Whole),
            (None, Some(key)) => match source {
                WindSource::Grib2 { .. } if !declared[k].is_empty() => {
                    declared[k].contains(&key).then_some(Pick::Member(key))
                }
                _ => Some(Pick::Whole),
            },
            (None, None) => Some(Pick::Whole),
        }
    }
}

/// How the runs of a forecast are made from its files.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum RunRule {
    /// The ensemble members the files declare are the runs, each file's fields by their
    /// member; a deterministic file gives its wind to every run. Files without members
    /// make one run: a single forecast.
    #[default]
    Members,
    /// Each file is one run, numbered from 1 in the order given (a poor man's ensemble
    /// of deterministic forecasts from different centres).
    EachFile,
}

/// Which fields of a source a run takes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Pick {
    /// All of it (a file of several members is refused).
    Whole,
    /// One ensemble member's fields.
    Member((u8, u8)),
}

/// The runs of a forecast made from `sources` by `rule`, control first, then by number;
/// empty for a single forecast (no ensemble). GRIB2 files are scanned (headers only).
///
/// Errors: a file that cannot be scanned; with [`RunRule::EachFile`], fewer than two
/// files, or a file that itself holds several members.
pub fn forecast_runs(sources: &[WindSource], rule: RunRule) -> Result<Runs, WindError> {
    let declared = declared_members(sources)?;
    let members = match rule {
        RunRule::EachFile => {
            if sources.len() < 2 {
                return Err(WindError::Runs(
                    "taking each file as a run needs two files or more".into(),
                ));
            }
            if let Some(k) = declared.iter().position(|m| m.len() > 1) {
                return Err(WindError::File {
                    path: sources[k].path().to_path_buf(),
                    source: WindFileError::Grib(format!(
                        "the file holds {} ensemble members: when each file is a run, give one forecast per file",
                        declared[k].len()
                    )),
                });
            }
            (0..sources.len())
                .map(|k| Member {
                    number: u32::try_from(k + 1).unwrap_or(u32::MAX),
                    control: false,
                    grib: None,
                    file: Some(k),
                })
                .collect()
        }
        RunRule::Members => {
            let mut keys: Vec<(u8, u8)> = declared.iter().flatten().copied().collect();
            keys.sort_by_key(|&(kind, n)| (kind > 1, n, kind));
            keys.dedup();
            if keys.len() < 2 {
                Vec::new()
            } else {
                keys.into_iter()
                    .map(|(kind, n)| Member {
                        number: u32::from(n),
                        control: kind <= 1,
                        grib: Some((kind, n)),
                        file: None,
                    })
                    .collect()
            }
        }
    };
    Ok(Runs { members, declared })
}

/// The runs of a forecast (see [`forecast_runs`]).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Runs {
    /// The runs, control first; empty for a single forecast.
    pub members: Vec<Member>,
    /// Per source, the members its wind fields declare.
    declared: Vec<Vec<(u8, u8)>>,
}

/// Per source, the ensemble members its 10 m wind fields declare (empty for all but
/// GRIB2 files of product templates 4.1 and 4.11).
fn declared_members(sources: &[WindSource]) -> Result<Vec<Vec<(u8, u8)>>, WindError> {
    sources
        .iter()
        .map(|s| match s {
            WindSource::Grib2 { path } => {
                let bad = |source: WindFileError| WindError::File {
                    path: path.clone(),
                    source,
                };
                let file = std::fs::File::open(path).map_err(|e| bad(e.into()))?;
                let contents = grib2_contents(std::io::BufReader::with_capacity(1 << 16, file))
                    .map_err(bad)?;
                Ok(contents
                    .members
                    .iter()
                    .map(|m| (m.kind, m.number))
                    .collect())
            }
            WindSource::Series { .. } | WindSource::Netcdf { .. } => Ok(Vec::new()),
        })
        .collect()
}

fn read_source(
    source: &WindSource,
    points: &[LatLon],
    progress: &Progress,
) -> Result<SourceSamples, WindError> {
    read_pick(source, points, Pick::Whole, progress)
}

fn read_pick(
    source: &WindSource,
    points: &[LatLon],
    pick: Pick,
    progress: &Progress,
) -> Result<SourceSamples, WindError> {
    match source {
        // A wave-only series gives no wind.
        WindSource::Series { series, .. } if !series.has_wind() => Ok(SourceSamples {
            times: Vec::new(),
            points: vec![None; points.len()],
            latest_reference: None,
        }),
        WindSource::Series { series, .. } => Ok(SourceSamples {
            times: series.series.times.clone(),
            points: vec![Some(Arc::new(WindTrack::new(series.series.wind.clone()))); points.len()],
            latest_reference: None,
        }),
        WindSource::Netcdf { path } => {
            if progress.is_cancelled() {
                return Err(WindError::File {
                    path: path.clone(),
                    source: WindFileError::Cancelled,
                });
            }
            let wanted: Vec<(f64, f64)> = points.iter().map(|p| (p.lat_deg, p.lon_deg)).collect();
            let s = super::netcdf::sample_netcdf(path, &wanted).map_err(|e| WindError::File {
                path: path.clone(),
                source: WindFileError::Netcdf(e),
            })?;
            progress.set(1.0);
            Ok(SourceSamples {
                times: s.times,
                points: s
                    .points
                    .into_iter()
                    .map(|p| {
                        p.map(|uv| {
                            Arc::new(WindTrack::new(
                                uv.into_iter().map(|(u, v)| Wind::new(u, v)).collect(),
                            ))
                        })
                    })
                    .collect(),
                latest_reference: None,
            })
        }
        WindSource::Grib2 { path } => {
            let bad = |source: WindFileError| WindError::File {
                path: path.clone(),
                source,
            };
            let contents = grib2_contents(std::io::BufReader::new(
                std::fs::File::open(path).map_err(|e| bad(e.into()))?,
            ))
            .map_err(bad)?;
            // A wave-only file gives no wind (its waves are read by `sample_waves`).
            if contents.waves && !contents.wind {
                return Ok(SourceSamples {
                    times: Vec::new(),
                    points: vec![None; points.len()],
                    latest_reference: None,
                });
            }
            let file = std::fs::File::open(path).map_err(|e| bad(e.into()))?;
            let reader = std::io::BufReader::with_capacity(1 << 16, file);
            let s = match pick {
                Pick::Whole => sample_grib2_with(reader, points, progress),
                Pick::Member(key) => sample_grib2_member_with(reader, points, key, progress),
            }
            .map_err(bad)?;
            Ok(SourceSamples {
                times: s.times,
                points: s.points.into_iter().map(|p| p.map(Arc::new)).collect(),
                latest_reference: s.latest_reference,
            })
        }
    }
}

/// The waves of every point, each from the first source with waves that covers it: a
/// grid with a sea value near the point ([`sample_waves_grib2`]), a wave series without
/// a position, or the nearest of the positioned wave series. Each point's waves come as
/// a point series (no wind, waves at its times).
pub fn sample_waves(
    sources: &[WindSource],
    points: &[LatLon],
    progress: &Progress,
) -> Result<Vec<Option<PointSeries>>, WindError> {
    let wave_stations: Vec<WindSource> = sources
        .iter()
        .filter(|s| matches!(s, WindSource::Series { series, .. } if series.waves.is_some()))
        .cloned()
        .collect();
    let nearest = nearest_station_of(&wave_stations);
    let mut out: Vec<Option<PointSeries>> = vec![None; points.len()];
    for source in sources {
        let pending: Vec<usize> = (0..points.len()).filter(|&i| out[i].is_none()).collect();
        if pending.is_empty() {
            break;
        }
        match source {
            WindSource::Series { series, path } if series.waves.is_some() => {
                let k = wave_stations
                    .iter()
                    .position(|w| w.path() == path.as_path());
                for i in pending {
                    if series.position.is_none() || nearest(points[i]) == k {
                        out[i] = Some(series.clone());
                    }
                }
            }
            WindSource::Series { .. } | WindSource::Netcdf { .. } => {}
            WindSource::Grib2 { path } => {
                let bad = |source: WindFileError| WindError::File {
                    path: path.clone(),
                    source,
                };
                let file = std::fs::File::open(path).map_err(|e| bad(e.into()))?;
                let len = file.metadata().map_or(0, |m| m.len());
                let wanted: Vec<LatLon> = pending.iter().map(|&i| points[i]).collect();
                let Some(samples) = sample_waves_grib2_sized(
                    std::io::BufReader::with_capacity(1 << 16, file),
                    len,
                    &wanted,
                    progress,
                )
                .map_err(bad)?
                else {
                    continue;
                };
                for (i, waves) in pending.into_iter().zip(samples.points) {
                    out[i] = waves.map(|w| PointSeries {
                        position: Some(points[i]),
                        series: super::WindSeries {
                            times: samples.times.clone(),
                            wind: Vec::new(),
                        },
                        waves: Some(w.into_iter().map(Some).collect()),
                    });
                }
            }
        }
    }
    Ok(out)
}

/// Reads a source whole, to check it before it is added to a forecast (a file that
/// earlier files leave unread would otherwise go unchecked).
pub fn check_source(source: &WindSource, progress: &Progress) -> Result<(), WindError> {
    if let WindSource::Grib2 { path } = source {
        let bad = |source: WindFileError| WindError::File {
            path: path.clone(),
            source,
        };
        let open = || std::fs::File::open(path).map_err(|e| bad(e.into()));
        let contents = grib2_contents(std::io::BufReader::new(open()?)).map_err(bad)?;
        // Every member of an ensemble file is read (each is a run); a wave-only file
        // has no wind to read.
        if contents.wind || !contents.waves {
            super::sample_grib2_members_with(std::io::BufReader::new(open()?), &[], progress)
                .map_err(bad)?;
        }
        sample_waves_grib2_sized(std::io::BufReader::new(open()?), 0, &[], progress)
            .map_err(bad)?;
    } else {
        read_source(source, &[], progress)?;
    }
    Ok(())
}

/// For an anchor, the index of the nearest source that is a point series with a
/// station position (`None` when there is none).
fn nearest_station_of(sources: &[WindSource]) -> impl Fn(LatLon) -> Option<usize> + '_ {
    let stations: Vec<(usize, LatLon)> = sources
        .iter()
        .enumerate()
        .filter_map(|(k, s)| match s {
            WindSource::Series { series, .. } => series.position.map(|p| (k, p)),
            WindSource::Grib2 { .. } | WindSource::Netcdf { .. } => None,
        })
        .collect();
    move |p: LatLon| {
        stations
            .iter()
            .min_by(|a, b| distance_m(a.1, p).total_cmp(&distance_m(b.1, p)))
            .map(|s| s.0)
    }
}

/// The points of groups laid end to end: each group's points, then its extra point.
fn flatten(groups: &[&PointGroup]) -> Vec<LatLon> {
    groups
        .iter()
        .flat_map(|g| g.points.iter().copied().chain(g.extra))
        .collect()
}

/// A covered group's wind: at each of its points, and at its extra point.
type CoveredWind = (Vec<Arc<WindTrack>>, Option<Arc<WindTrack>>);

/// A source's samples, one per point.
type Sample = Option<Arc<WindTrack>>;

/// A sample kept as a group's track (taken over where no other group shares it).
fn track(sample: Arc<WindTrack>) -> WindTrack {
    Arc::unwrap_or_clone(sample)
}

/// The one coverage rule: the wind source `k` gives group `g`, whose points' samples
/// from that source are `samples` (its points, then its extra point), or `None`.
fn cover(
    sources: &[WindSource],
    k: usize,
    g: &PointGroup,
    samples: &mut dyn Iterator<Item = Sample>,
    nearest_station: &dyn Fn(LatLon) -> Option<usize>,
) -> Option<CoveredWind> {
    let at_points: Vec<Sample> = (&mut *samples).take(g.points.len()).collect();
    let extra = if g.extra.is_some() {
        samples.next().flatten()
    } else {
        None
    };
    let allowed = match &sources[k] {
        WindSource::Series { series, .. } => {
            !g.grids_only && (series.position.is_none() || nearest_station(g.anchor) == Some(k))
        }
        WindSource::Grib2 { .. } | WindSource::Netcdf { .. } => true,
    };
    if !allowed {
        return None;
    }
    let at_points: Option<Vec<Arc<WindTrack>>> = at_points.into_iter().collect();
    at_points.map(|p| (p, extra))
}

/// Samples the sources at the groups' points: each group takes its wind from the first
/// source that covers it. GRIB2 files are read one after the other, each only for the
/// groups still without wind; `progress` follows each file and can stop the reading.
pub fn sample_conditions(
    sources: &[WindSource],
    groups: &[PointGroup],
    progress: &Progress,
) -> Result<Conditions, WindError> {
    sample_run(sources, groups, None, progress)
}

/// Samples one run of an ensemble (see [`forecast_runs`]) by the rule of
/// [`sample_conditions`], over the files and fields that make that run; `None`: the
/// single forecast.
pub fn sample_run(
    sources: &[WindSource],
    groups: &[PointGroup],
    run: Option<(&Runs, Member)>,
    progress: &Progress,
) -> Result<Conditions, WindError> {
    let nearest_station = nearest_station_of(sources);
    let mut out = Conditions {
        groups: vec![None; groups.len()],
        latest_reference: None,
        sources: vec![None; sources.len()],
    };
    for k in 0..sources.len() {
        let pending: Vec<usize> = (0..groups.len())
            .filter(|&g| out.groups[g].is_none())
            .collect();
        if pending.is_empty() {
            break;
        }
        let pick = match run {
            Some((runs, member)) => member.reads(k, &sources[k], &runs.declared),
            None => Some(Pick::Whole),
        };
        let Some(pick) = pick else { continue };
        let pending_groups: Vec<&PointGroup> = pending.iter().map(|&g| &groups[g]).collect();
        let read = read_pick(&sources[k], &flatten(&pending_groups), pick, progress)?;
        out.sources[k] = Some(SourceSpan::of(&sources[k], &read));
        if let Some(t) = read.latest_reference {
            out.latest_reference = Some(out.latest_reference.map_or(t, |x| x.max(t)));
        }
        let times: Arc<[DateTime<Utc>]> = read.times.into();
        let mut samples = read.points.into_iter();
        for (g, group) in pending.into_iter().zip(pending_groups) {
            if let Some((points, extra)) = cover(sources, k, group, &mut samples, &nearest_station)
            {
                out.groups[g] = Some(GroupWind {
                    source: k,
                    times: times.clone(),
                    points: points.into_iter().map(track).collect(),
                    extra: extra.map(track),
                });
            }
        }
    }
    Ok(out)
}

/// A long record read once: every source is read (in parallel) at every group's points,
/// and each group takes the union in time of every source that covers it; where two
/// sources give the same time, the one given first wins. Each group's wind is joined
/// only when asked for ([`LongRecord::group`]), so a caller working group by group holds
/// the files' samples and the groups at hand, no more.
pub struct LongRecord<'a> {
    sources: &'a [WindSource],
    groups: &'a [PointGroup],
    /// Per source: its times, and its samples at the groups' points laid end to end.
    files: Vec<FileSamples>,
    /// Where each group's samples begin.
    starts: Vec<usize>,
    nearest_station: Box<dyn Fn(LatLon) -> Option<usize> + Send + Sync + 'a>,
    /// Joined time axes, by the list of sources they join.
    axes: std::sync::Mutex<HashMap<Vec<usize>, Arc<Axis>>>,
    /// The latest reference (issue) time among the GRIB2 files, if any.
    pub latest_reference: Option<DateTime<Utc>>,
    /// What each source held, in the order given.
    pub spans: Vec<Option<SourceSpan>>,
}

/// One source's times, and its samples at the groups' points laid end to end.
struct FileSamples {
    times: Arc<[DateTime<Utc>]>,
    /// Its times strictly increase (a group it alone covers takes them as they are).
    increasing: bool,
    samples: Vec<Sample>,
}

/// The union of some sources' times, each time with where it comes from: the place of
/// its source in the joined list and its step there.
struct Axis {
    times: Arc<[DateTime<Utc>]>,
    from: Vec<(usize, usize)>,
}

impl Axis {
    /// Joins time axes given in order of precedence: where two give the same time, the
    /// earlier one wins (and within one axis, its earlier step).
    fn join(axes: &[&[DateTime<Utc>]]) -> Self {
        let mut all: Vec<(DateTime<Utc>, usize, usize)> = axes
            .iter()
            .enumerate()
            .flat_map(|(s, times)| times.iter().enumerate().map(move |(i, t)| (*t, s, i)))
            .collect();
        all.par_sort_unstable();
        all.dedup_by_key(|e| e.0);
        Self {
            times: all.iter().map(|e| e.0).collect(),
            from: all.iter().map(|e| (e.1, e.2)).collect(),
        }
    }
}

impl<'a> LongRecord<'a> {
    /// Reads every source (in parallel) at every group's points.
    pub fn read(
        sources: &'a [WindSource],
        groups: &'a [PointGroup],
        progress: &Progress,
    ) -> Result<Self, WindError> {
        if sources.is_empty() {
            return Err(WindError::NoFiles);
        }
        let all: Vec<&PointGroup> = groups.iter().collect();
        let points = flatten(&all);
        let done = std::sync::atomic::AtomicUsize::new(0);
        let per_file: Vec<Result<SourceSamples, WindError>> = sources
            .par_iter()
            .map(|source| {
                if progress.is_cancelled() {
                    return Err(WindError::File {
                        path: source.path().to_path_buf(),
                        source: WindFileError::Cancelled,
                    });
                }
                let r = read_source(source, &points, &Progress::new());
                let n = done.fetch_add(1, std::sync::atomic::Ordering::Relaxed) + 1;
                progress.set(n as f32 / sources.len() as f32);
                r
            })
            .collect();
        let per_file: Vec<SourceSamples> = per_file.into_iter().collect::<Result<_, _>>()?;
        let mut starts = Vec::with_capacity(groups.len());
        let mut at = 0;
        for g in groups {
            starts.push(at);
            at += g.points.len() + usize::from(g.extra.is_some());
        }
        Ok(Self {
            sources,
            groups,
            latest_reference: per_file.iter().filter_map(|f| f.latest_reference).max(),
            spans: sources
                .iter()
                .zip(&per_file)
                .map(|(s, f)| Some(SourceSpan::of(s, f)))
                .collect(),
            files: per_file
                .into_iter()
                .map(|f| FileSamples {
                    increasing: f.times.windows(2).all(|w| w[0] < w[1]),
                    times: f.times.into(),
                    samples: f.points,
                })
                .collect(),
            starts,
            nearest_station: Box::new(nearest_station_of(sources)),
            axes: std::sync::Mutex::new(HashMap::new()),
        })
    }

    /// The wind of group `g`: the union in time of every source that covers it, or
    /// `None` where none does.
    #[must_use]
    pub fn group(&self, g: usize) -> Option<GroupWind> {
        let group = &self.groups[g];
        let len = group.points.len() + usize::from(group.extra.is_some());
        let covering: Vec<(usize, CoveredWind)> = self
            .files
            .iter()
            .enumerate()
            .filter_map(|(k, file)| {
                let mut mine = file.samples[self.starts[g]..self.starts[g] + len]
                    .iter()
                    .cloned();
                cover(self.sources, k, group, &mut mine, &*self.nearest_station).map(|c| (k, c))
            })
            .collect();
        let &(source, _) = covering.first()?;
        let file = &self.files[source];
        if covering.len() == 1 && file.increasing {
            let (_, (points, extra)) = covering.into_iter().next()?;
            return Some(GroupWind {
                source,
                times: file.times.clone(),
                points: points.into_iter().map(track).collect(),
                extra: extra.map(track),
            });
        }
        let axis = self.axis(covering.iter().map(|c| c.0).collect());
        let points = (0..group.points.len())
            .map(|p| {
                axis.from
                    .iter()
                    .map(|&(s, i)| covering[s].1.0[p].get(i))
                    .collect::<Option<Vec<Wind>>>()
                    .map(WindTrack::new)
            })
            .collect::<Option<Vec<WindTrack>>>()?;
        // The extra point keeps a value only where every time has one.
        let extra = group.extra.and_then(|_| {
            axis.from
                .iter()
                .map(|&(s, i)| covering[s].1.1.as_ref().and_then(|e| e.get(i)))
                .collect::<Option<Vec<Wind>>>()
                .map(WindTrack::new)
        });
        Some(GroupWind {
            source,
            times: axis.times.clone(),
            points,
            extra,
        })
    }

    /// The joined time axis of the sources `joined` (in order), made once.
    fn axis(&self, joined: Vec<usize>) -> Arc<Axis> {
        let mut axes = self
            .axes
            .lock()
            .unwrap_or_else(std::sync::PoisonError::into_inner);
        axes.entry(joined)
            .or_insert_with_key(|joined| {
                let times: Vec<&[DateTime<Utc>]> =
                    joined.iter().map(|&k| &self.files[k].times[..]).collect();
                Arc::new(Axis::join(&times))
            })
            .clone()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::wind::{PointSeries, WindSeries};

    /// A station record at `position` (or without one), at `hours` after 1 May 2027,
    /// the wind from the west at `u` m/s.
    fn record(position: Option<LatLon>, hours: &[i64], u: f64) -> WindSource {
        let t0 = DateTime::parse_from_rfc3339("2027-05-01T00:00:00Z")
            .expect("valid")
            .to_utc();
        WindSource::Series {
            path: PathBuf::from(format!("r{u}.csv")),
            series: PointSeries {
                waves: None,
                position,
                series: WindSeries {
                    times: hours
                        .iter()
                        .map(|h| t0 + chrono::Duration::hours(*h))
                        .collect(),
                    wind: vec![Wind::new(u, 0.0); hours.len()],
                },
            },
        }
    }

    fn station(position: Option<LatLon>, u: f64) -> WindSource {
        record(position, &[0], u)
    }

    /// Two records that overlap are joined in time: hours 0-3 in order, hour 2 from the
    /// first record given; the extra point follows, and a second group on the same two
    /// records gets the same times.
    #[test]
    fn merged_records_take_the_first_given_where_they_overlap() {
        let sources = [record(None, &[0, 1, 2], 1.0), record(None, &[3, 2], 2.0)];
        let group = PointGroup::new(
            vec![LatLon::new(36.0, -122.0), LatLon::new(36.1, -122.0)],
            LatLon::new(36.05, -122.0),
            Some(LatLon::new(36.05, -122.0)),
        );
        let groups = [group.clone(), group];
        let record = LongRecord::read(&sources, &groups, &Progress::new()).expect("records read");
        for g in 0..groups.len() {
            let g = record.group(g).expect("covered");
            let hours: Vec<i64> = g
                .times
                .iter()
                .map(|t| (*t - g.times[0]).num_hours())
                .collect();
            assert_eq!(hours, [0, 1, 2, 3]);
            let u = |w: &WindTrack| w.to_winds().iter().map(|w| w.u_m_s).collect::<Vec<_>>();
            assert_eq!(u(&g.points[0]), [1.0, 1.0, 1.0, 2.0]);
            assert_eq!(u(&g.points[1]), [1.0, 1.0, 1.0, 2.0]);
            assert_eq!(g.extra.as_ref().map(u), Some(vec![1.0, 1.0, 1.0, 2.0]));
            assert_eq!(g.source, 0);
        }
        let spans: Vec<usize> = record.spans.iter().flatten().map(|s| s.steps).collect();
        assert_eq!(spans, [3, 2]);
    }

    /// A group takes the nearest station; a pumping group takes no station at all.
    #[test]
    fn nearest_station_and_grids_only() {
        let sources = [
            station(Some(LatLon::new(36.0, -122.0)), 1.0),
            station(Some(LatLon::new(38.0, -122.0)), 2.0),
        ];
        let near_north = PointGroup::point(LatLon::new(37.9, -122.1));
        let mut probes = PointGroup::point(LatLon::new(36.1, -122.1));
        probes.grids_only = true;
        let c = sample_conditions(&sources, &[near_north, probes], &Progress::new())
            .expect("stations read");
        let g = c.groups[0].as_ref().expect("covered");
        assert_eq!(
            (g.source, g.points[0].get(0).map(|w| w.u_m_s)),
            (1, Some(2.0))
        );
        assert!(c.groups[1].is_none());
    }
}
