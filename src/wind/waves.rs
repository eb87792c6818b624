//! Wave forecasts: significant wave height and period from GRIB2 wave fields, sampled at
//! points over time, and the sea state of a CSV point series.
//!
//! # Fields read
//! WMO FM 92 GRIB edition 2, Code Table 4.2, discipline 10 (oceanographic products),
//! category 0 (waves); the numbers were checked against ecCodes' own tables (short names
//! in brackets, `grib_ls -p shortName,name` on the fixtures in `tests/fixtures/grib2/`):
//! - 3 significant height of combined wind waves and swell, m (`swh`);
//! - 5 significant height of wind waves, m (`shww`);
//! - 8 significant height of total swell, m (`shts`);
//! - 11 primary wave mean period, s (`perpw`);
//! - 6 mean period of wind waves, s (`mpww`).
//!
//! The height the planner uses is number 3 where it has a value; else the root-sum-square
//! `sqrt(H_wind² + H_swell²)` of 5 and 8 where both have one (significant heights add as
//! energies, since H_s = 4 sqrt(m0) and the variances m0 of independent wave systems
//! add); else whichever of 5 and 8 has one. The period is number 11, else number 6.
//! The choice is made per point and time.
//!
//! Fields may be in the same file as the 10 m wind or in a file of their own, on any
//! grid and packing the wind reader takes (regular latitude/longitude, any scan order,
//! longitudes 0–360 or ±180). Fields on an "ordered sequence" surface (type 241, the
//! swell partitions some wave models write) other than the first are skipped. Other
//! messages are skipped before decoding, so a message that cannot be decoded never fails
//! the file unless it holds one of the fields above.
//!
//! # Land and the coast
//! Wave models mask land with a bit map (section 6), so grid points next to the coast
//! are often missing. Each requested point is sampled by bilinear interpolation (in
//! longitude and latitude) where every grid corner that carries weight has a value (is
//! sea); else it takes the value of the nearest grid point with a value within 1.5 grid
//! cells (distance counted in grid steps, rows and columns alike: √(Δrow² + Δcol²) ≤
//! 1.5; the mean of the values when several are equally near); else it has no wave. A
//! point outside the grid has no wave. Each field (height, period) is sampled this way
//! on its own.

use super::grib2::{
    FieldHeader, Messages, decode_field, empty_file_error, message_error, no_message_error,
    read_grid, scan_message, utc_stamp, valid_time,
};
use super::grib2_grid::PointRule;
use super::{PointSeries, WindFileError};
use crate::coast::LatLon;
use crate::progress::Progress;
use chrono::{DateTime, Utc};
use std::collections::{BTreeMap, HashMap};
use std::io::Read;

/// The sea state at one place and time.
///
/// # Units
/// Significant wave height in metres, wave period in seconds.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Wave {
    /// Significant wave height, m (≥ 0): combined wind waves and swell (see the module
    /// documentation for how it is taken from a file's fields).
    pub height_m: f64,
    /// Wave period, s (> 0): from GRIB2 the primary wave mean period, else the mean
    /// period of the wind waves; from CSV the file's period column as given (often a
    /// peak or dominant period); `None` when the source gives none.
    pub period_s: Option<f64>,
}

/// Waves sampled at points over time.
#[derive(Debug, Clone, PartialEq)]
pub struct WaveSamples {
    /// Valid times, UTC, increasing: the times at which the file holds a wave height.
    pub times: Vec<DateTime<Utc>>,
    /// For each requested point (in the order given), the wave at every time, or `None`
    /// when the point has no wave at some time (outside the grid, or land or missing
    /// around it: see the module documentation).
    pub points: Vec<Option<Vec<Wave>>>,
}

/// What kinds of fields a GRIB2 file holds (scanned from its headers, no data decoded).
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct Grib2Contents {
    /// The file holds 10 m u and 10 m v (discipline 0, category 2, numbers 2 and 3, first
    /// fixed surface 103 at 10 m): what the wind reader needs.
    pub wind: bool,
    /// The file holds a significant wave height (discipline 10, category 0, number 3, 5
    /// or 8): what [`sample_waves_grib2`] needs.
    pub waves: bool,
    /// The ensemble members whose 10 m wind the file holds (product templates 4.1 and
    /// 4.11), in the order of their Code Table 4.6 type and perturbation number; empty
    /// for a deterministic forecast.
    pub members: Vec<super::EnsembleMember>,
}

/// The wave fields this reader takes, by their WMO Code Table 4.2 number in discipline
/// 10, category 0.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum WaveKind {
    /// 3: significant height of combined wind waves and swell, m.
    Combined,
    /// 5: significant height of wind waves, m.
    WindSea,
    /// 8: significant height of total swell, m.
    Swell,
    /// 11: primary wave mean period, s.
    PrimaryPeriod,
    /// 6: mean period of wind waves, s.
    WindSeaPeriod,
}

/// How many kinds there are (the length of per-time slots).
const KINDS: usize = 5;

impl WaveKind {
    /// The kind of a field, or `None` for a field this reader does not take.
    fn of(h: &FieldHeader) -> Option<Self> {
        if h.discipline != 10 || h.category != 0 || h.template > 15 {
            return None;
        }
        // Surface 241 "ordered sequence of data": swell partitions; the first stands for
        // the swell, the others would repeat the same valid time.
        if h.surface_type == 241 && (h.surface_m - 1.0).abs() > 1e-6 {
            return None;
        }
        match h.number {
            3 => Some(Self::Combined),
            5 => Some(Self::WindSea),
            8 => Some(Self::Swell),
            11 => Some(Self::PrimaryPeriod),
            6 => Some(Self::WindSeaPeriod),
            _ => None,
        }
    }

    fn is_height(self) -> bool {
        matches!(self, Self::Combined | Self::WindSea | Self::Swell)
    }

    /// The field as error messages name it.
    fn name(self) -> &'static str {
        match self {
            Self::Combined => "significant height of combined wind waves and swell (10/0/3)",
            Self::WindSea => "significant height of wind waves (10/0/5)",
            Self::Swell => "significant height of swell (10/0/8)",
            Self::PrimaryPeriod => "primary wave mean period (10/0/11)",
            Self::WindSeaPeriod => "mean period of wind waves (10/0/6)",
        }
    }
}

/// Number of grid values, and how each requested point is sampled.
type GridRules = (usize, Vec<PointRule>);

/// One wave field sampled at the requested points.
struct Sampled {
    message: usize,
    /// One value per point, NaN where the point has none.
    values: Vec<f32>,
}

/// The wave fields found so far while walking a file.
#[derive(Default)]
struct Gathered {
    /// Per valid time, one slot per [`WaveKind`].
    fields: BTreeMap<DateTime<Utc>, [Option<Sampled>; KINDS]>,
    /// Sampling rules per distinct grid definition, so a grid is set up once.
    grids: HashMap<Vec<u8>, GridRules>,
}

impl Gathered {
    /// Takes the wave fields of one message, sampled at `points`.
    fn add_message(
        &mut self,
        message: usize,
        msg: &[u8],
        points: &[LatLon],
    ) -> Result<(), WindFileError> {
        let fail = |problem: String| message_error(message, problem);
        let (ref_time, headers) = scan_message(msg).map_err(fail)?;
        for h in &headers {
            let Some(kind) = WaveKind::of(h) else {
                continue;
            };
            let values = self.sample_field(msg, h, kind, points).map_err(fail)?;
            let t = valid_time(ref_time, h).map_err(fail)?;
            let slot = &mut self.fields.entry(t).or_default()[kind as usize];
            if let Some(first) = slot {
                return Err(fail(format!(
                    "a second {} valid at {} (the first is in message {}): ensemble members or repeated steps are not supported yet",
                    kind.name(),
                    utc_stamp(t),
                    first.message
                )));
            }
            *slot = Some(Sampled { message, values });
        }
        Ok(())
    }

    /// Decodes one wave field and samples it at the points.
    fn sample_field(
        &mut self,
        msg: &[u8],
        h: &FieldHeader,
        kind: WaveKind,
        points: &[LatLon],
    ) -> Result<Vec<f32>, String> {
        let section3 = h.section3(msg);
        if !self.grids.contains_key(section3) {
            let grid = read_grid(section3, kind.name())?;
            let rules = points.iter().map(|&p| PointRule::new(&grid, p)).collect();
            self.grids.insert(section3.to_vec(), (grid.len(), rules));
        }
        let (count, rules) = &self.grids[section3];
        let values =
            decode_field(msg, h).map_err(|e| format!("{} cannot be decoded: {e}", kind.name()))?;
        if values.len() != *count {
            return Err(format!(
                "{} has {} values for {count} grid points",
                kind.name(),
                values.len()
            ));
        }
        Ok(rules.iter().map(|r| r.sample(&values)).collect())
    }

    /// The waves at every time with a height, per point; `None` without any height.
    fn into_samples(self, point_count: usize) -> Option<WaveSamples> {
        let mut times = Vec::with_capacity(self.fields.len());
        let mut per_point: Vec<Option<Vec<Wave>>> =
            vec![Some(Vec::with_capacity(self.fields.len())); point_count];
        for (t, slots) in self.fields {
            let has_height = slots
                .iter()
                .zip(ALL_KINDS)
                .any(|(s, kind)| s.is_some() && kind.is_height());
            if !has_height {
                continue;
            }
            times.push(t);
            for (k, slot) in per_point.iter_mut().enumerate() {
                let wave = slot.as_ref().and_then(|_| combine(&slots, k));
                match (slot.as_mut(), wave) {
                    (Some(series), Some(wave)) => series.push(wave),
                    _ => *slot = None,
                }
            }
        }
        (!times.is_empty()).then_some(WaveSamples {
            times,
            points: per_point,
        })
    }
}

/// Every kind, in slot order.
const ALL_KINDS: [WaveKind; KINDS] = [
    WaveKind::Combined,
    WaveKind::WindSea,
    WaveKind::Swell,
    WaveKind::PrimaryPeriod,
    WaveKind::WindSeaPeriod,
];

/// The wave at point `k` from the fields of one time (see the module documentation for
/// the order in which fields are used).
fn combine(slots: &[Option<Sampled>; KINDS], k: usize) -> Option<Wave> {
    let value = |kind: WaveKind| {
        slots[kind as usize]
            .as_ref()
            .and_then(|s| s.values.get(k))
            .map(|&v| f64::from(v))
            .filter(|v| v.is_finite())
    };
    let height_m = value(WaveKind::Combined).or_else(|| {
        match (value(WaveKind::WindSea), value(WaveKind::Swell)) {
            (Some(wind_sea_m), Some(swell_m)) => Some(wind_sea_m.hypot(swell_m)),
            (one, other) => one.or(other),
        }
    })?;
    let period_s = value(WaveKind::PrimaryPeriod)
        .or_else(|| value(WaveKind::WindSeaPeriod))
        .filter(|t| *t > 0.0);
    Some(Wave {
        // Packing and interpolation can leave a calm sea a hair below zero.
        height_m: height_m.max(0.0),
        period_s,
    })
}

/// What kinds of fields a GRIB2 file holds, from its section headers alone (no data is
/// decoded; every message is still read, to find the next one).
///
/// Errors: an empty file, a file without a GRIB message, or a message that is cut short,
/// of GRIB edition 1 or otherwise badly framed (the error names the message).
pub fn grib2_contents(reader: impl Read) -> Result<Grib2Contents, WindFileError> {
    let mut messages = Messages::new(reader);
    let (mut u, mut v) = (false, false);
    let mut contents = Grib2Contents::default();
    let mut any = false;
    let mut members = std::collections::BTreeMap::new();
    while let Some(m) = messages.next_message()? {
        any = true;
        let (_, headers) = scan_message(&m.bytes).map_err(|p| message_error(m.number, p))?;
        for h in &headers {
            match h.is_wind_u() {
                Some(true) => u = true,
                Some(false) => v = true,
                None => {}
            }
            if let (Some(_), Some((kind, number, size))) = (h.is_wind_u(), h.ensemble) {
                members.insert((kind, number), size);
            }
            contents.waves |= WaveKind::of(h).is_some_and(WaveKind::is_height);
        }
    }
    if !any {
        return Err(if messages.bytes_read() == 0 {
            empty_file_error()
        } else {
            no_message_error()
        });
    }
    contents.wind = u && v;
    contents.members = members
        .into_iter()
        .map(|((kind, number), size)| super::EnsembleMember {
            kind,
            number,
            ensemble_size: Some(size),
        })
        .collect();
    Ok(contents)
}

/// Waves of a GRIB2 file at points; Ok(None) when the file holds no wave field.
///
/// `points` are latitude/longitude in degrees (longitudes in either convention). The
/// result has one entry per point, in the same order; see the module documentation for
/// the fields used and how points near land are sampled. A stream has no known length,
/// so `progress` only reaches 1 at the end (and is checked for cancelling before each
/// message); [`sample_waves_grib2_sized`] reports the share read.
///
/// Errors: as [`grib2_contents`], plus a wave field that cannot be decoded, is not on a
/// regular latitude/longitude grid, or repeats a valid time (ensemble members); each
/// names the message. [`WindFileError::Cancelled`] when `progress` is cancelled.
pub fn sample_waves_grib2(
    reader: impl Read,
    points: &[LatLon],
    progress: &Progress,
) -> Result<Option<WaveSamples>, WindFileError> {
    sample_stream(reader, None, points, progress)
}

/// Like [`sample_waves_grib2`] for a stream of `file_len_bytes` bytes (a file's
/// length), reporting the share of it read to `progress`.
pub fn sample_waves_grib2_sized(
    reader: impl Read,
    file_len_bytes: u64,
    points: &[LatLon],
    progress: &Progress,
) -> Result<Option<WaveSamples>, WindFileError> {
    sample_stream(reader, Some(file_len_bytes), points, progress)
}

fn sample_stream(
    reader: impl Read,
    file_len_bytes: Option<u64>,
    points: &[LatLon],
    progress: &Progress,
) -> Result<Option<WaveSamples>, WindFileError> {
    let mut messages = Messages::new(reader);
    let mut gathered = Gathered::default();
    let mut any = false;
    while let Some(m) = messages.next_message()? {
        if progress.is_cancelled() {
            return Err(WindFileError::Cancelled);
        }
        if let Some(len) = file_len_bytes.filter(|&l| l > 0) {
            progress.set(m.start as f32 / len as f32);
        }
        any = true;
        gathered.add_message(m.number, &m.bytes, points)?;
    }
    if !any {
        return Err(if messages.bytes_read() == 0 {
            empty_file_error()
        } else {
            no_message_error()
        });
    }
    progress.set(1.0);
    Ok(gathered.into_samples(points.len()))
}

impl PointSeries {
    /// Whether the series carries wind (a wave-only CSV file gives one without: its
    /// `series.wind` is empty while `series.times` holds the times of the waves).
    #[must_use]
    pub fn has_wind(&self) -> bool {
        !self.series.wind.is_empty()
    }

    /// The sea state at time `t` when the series has waves: exact at a step, else
    /// linear in time between the two nearest steps that both have a wave (height
    /// interpolated; period interpolated where both have one, else none); `None`
    /// outside the series, at a step without a wave, or across a gap longer than
    /// `max_gap_h` hours.
    #[must_use]
    pub fn wave_at(&self, t: DateTime<Utc>, max_gap_h: f64) -> Option<Wave> {
        let waves = self.waves.as_ref()?;
        let times = &self.series.times;
        let k = times.partition_point(|x| *x < t);
        if k < times.len() && times[k] == t {
            return waves.get(k).copied().flatten();
        }
        if k == 0 || k >= times.len() {
            return None;
        }
        let (a, b) = (times[k - 1], times[k]);
        let span_s = (b - a).num_seconds() as f64;
        if span_s > max_gap_h * 3600.0 {
            return None;
        }
        let (wa, wb) = (waves.get(k - 1).copied()??, waves.get(k).copied()??);
        let frac = (t - a).num_seconds() as f64 / span_s;
        let lerp = |x: f64, y: f64| x + (y - x) * frac;
        Some(Wave {
            height_m: lerp(wa.height_m, wb.height_m),
            period_s: wa.period_s.zip(wb.period_s).map(|(x, y)| lerp(x, y)),
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Wind sea 3 m and swell 4 m make 5 m: significant heights add as energies.
    #[test]
    fn heights_combine_as_root_sum_square() {
        let field = |v: f32| {
            Some(Sampled {
                message: 1,
                values: vec![v],
            })
        };
        let mut slots: [Option<Sampled>; KINDS] = Default::default();
        slots[WaveKind::WindSea as usize] = field(3.0);
        slots[WaveKind::Swell as usize] = field(4.0);
        slots[WaveKind::WindSeaPeriod as usize] = field(6.0);
        let w = combine(&slots, 0).expect("a wave");
        assert!((w.height_m - 5.0).abs() < 1e-9);
        assert_eq!(w.period_s, Some(6.0));
        slots[WaveKind::Combined as usize] = field(2.0);
        slots[WaveKind::PrimaryPeriod as usize] = field(9.0);
        let w = combine(&slots, 0).expect("a wave");
        assert_eq!((w.height_m, w.period_s), (2.0, Some(9.0)));
        slots[WaveKind::Combined as usize] = field(f32::NAN);
        slots[WaveKind::Swell as usize] = field(f32::NAN);
        assert_eq!(combine(&slots, 0).map(|w| w.height_m), Some(3.0));
    }
}
