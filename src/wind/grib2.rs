//! GRIB2 (WMO FM 92 GRIB edition 2) importer for 10 m wind.
//!
//! The file is walked message by message with a small scanner of our own, so that each
//! message is read alone (memory stays bounded by one message), errors name the message
//! number, and messages the tool does not need (other parameters, other levels) are
//! skipped before any decoding: a file is never rejected because a message it does not
//! need cannot be decoded. The messages that hold 10 m u or v (discipline 0, category 2,
//! numbers 2 and 3, first fixed surface 103 at 10 m) are decoded with the `grib` crate
//! and sampled at once at the requested points (bilinear in longitude and latitude).

use super::WindFileError;
use super::grid::{RegularGrid, Weights, interpolate};
use crate::coast::LatLon;
use crate::physics::Wind;
use crate::progress::Progress;
use chrono::{DateTime, TimeZone, Utc};
use std::collections::{BTreeMap, HashMap};
use std::io::{Read, Seek, SeekFrom};

/// Wind sampled from a GRIB2 file at a list of points.
#[derive(Debug, Clone, PartialEq)]
pub struct Grib2Samples {
    /// Valid times, UTC, increasing.
    pub times: Vec<DateTime<Utc>>,
    /// For each requested point, the wind at every time, or `None` when the grid does
    /// not cover the point (outside the grid, or a missing value at some time).
    pub points: Vec<Option<Vec<Wind>>>,
    /// The latest reference (issue) time of the wind messages: when the newest forecast
    /// in the file was made. Earlier steps of the file are the recent past.
    pub latest_reference: Option<DateTime<Utc>>,
}

/// What the scanner reads from one product definition section (section 4).
#[derive(Debug, Clone, Copy, PartialEq)]
struct FieldHeader {
    discipline: u8,
    template: u16,
    category: u8,
    number: u8,
    time_unit: u8,
    forecast_time: u32,
    surface_type: u8,
    surface_m: f64,
    /// Byte range of the grid definition section (section 3) that applies to this field.
    grid: (usize, usize),
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Component {
    U,
    V,
}

impl FieldHeader {
    /// 10 m u or v, by WMO GRIB2 tables: discipline 0, category 2, number 2 (u) or 3 (v),
    /// first fixed surface 103 (height above ground) at 10 m.
    fn wind_component(&self) -> Option<Component> {
        if self.discipline != 0 || self.category != 2 || self.template > 15 {
            return None;
        }
        if self.surface_type != 103 || (self.surface_m - 10.0).abs() > 1e-6 {
            return None;
        }
        match self.number {
            2 => Some(Component::U),
            3 => Some(Component::V),
            _ => None,
        }
    }

    fn describe(&self) -> String {
        format!(
            "{}/{}/{} at surface {}",
            self.discipline, self.category, self.number, self.surface_type
        )
    }
}

fn u16_at(b: &[u8], at: usize) -> u16 {
    u16::from_be_bytes([b[at], b[at + 1]])
}

fn u32_at(b: &[u8], at: usize) -> u32 {
    u32::from_be_bytes([b[at], b[at + 1], b[at + 2], b[at + 3]])
}

/// GRIB2 signed integers are sign-and-magnitude, not two's complement.
fn signed_i8(x: u8) -> i32 {
    let m = i32::from(x & 0x7f);
    if x & 0x80 == 0 { m } else { -m }
}

fn signed_i32(x: u32) -> i64 {
    let m = i64::from(x & 0x7fff_ffff);
    if x & 0x8000_0000 == 0 { m } else { -m }
}

/// Reads the reference time (section 1) and the field headers (every section 4) of one
/// message, checking the section lengths as it goes.
fn scan_message(msg: &[u8]) -> Result<(DateTime<Utc>, Vec<FieldHeader>), String> {
    let discipline = msg[6];
    let mut pos = 16;
    let mut ref_time = None;
    let mut grid = (0, 0);
    let mut fields = Vec::new();
    loop {
        if msg.len() < pos + 4 {
            return Err("ends before its end section \"7777\"".into());
        }
        if &msg[pos..pos + 4] == b"7777" {
            break;
        }
        if msg.len() < pos + 5 {
            return Err(format!("section at byte {pos} is cut short"));
        }
        let len = u32_at(msg, pos) as usize;
        let number = msg[pos + 4];
        if len < 5 || pos + len > msg.len() {
            return Err(format!(
                "section {number} at byte {pos} declares {len} bytes, which do not fit in the message"
            ));
        }
        let s = &msg[pos..pos + len];
        match number {
            1 if len >= 19 => {
                let (year, month, day) = (u16_at(s, 12), s[14], s[15]);
                let (hour, minute, second) = (s[16], s[17], s[18]);
                let t = Utc
                    .with_ymd_and_hms(i32::from(year), u32::from(month), u32::from(day), u32::from(hour), u32::from(minute), u32::from(second))
                    .single()
                    .ok_or_else(|| format!("reference time {year:04}-{month:02}-{day:02} {hour:02}:{minute:02}:{second:02} is not a valid date"))?;
                ref_time = Some(t);
            }
            3 => grid = (pos, len),
            4 if len >= 11 => {
                let template = u16_at(s, 7);
                let layout_known = template <= 15 && len >= 28;
                fields.push(FieldHeader {
                    discipline,
                    template,
                    category: s[9],
                    number: s[10],
                    time_unit: if layout_known { s[17] } else { 255 },
                    forecast_time: if layout_known { u32_at(s, 18) } else { 0 },
                    surface_type: if layout_known { s[22] } else { 255 },
                    surface_m: if layout_known {
                        signed_i32(u32_at(s, 24)) as f64 * 10f64.powi(-signed_i8(s[23]))
                    } else {
                        f64::NAN
                    },
                    grid,
                });
            }
            _ => {}
        }
        pos += len;
    }
    let ref_time = ref_time.ok_or("has no identification section (section 1)")?;
    Ok((ref_time, fields))
}

/// Valid time = reference time + forecast time × unit (Code Table 4.4).
fn valid_time(ref_time: DateTime<Utc>, h: &FieldHeader) -> Result<DateTime<Utc>, String> {
    let unit_s: i64 = match h.time_unit {
        0 => 60,
        1 => 3600,
        2 => 86_400,
        10 => 3 * 3600,
        11 => 6 * 3600,
        12 => 12 * 3600,
        13 => 1,
        code => {
            return Err(format!(
                "forecast time unit code {code} (Code Table 4.4) is not supported: expected minutes, hours, days or seconds"
            ));
        }
    };
    chrono::Duration::try_seconds(i64::from(h.forecast_time) * unit_s)
        .and_then(|d| ref_time.checked_add_signed(d))
        .ok_or_else(|| {
            format!(
                "forecast time {} × {unit_s} s is out of range",
                h.forecast_time
            )
        })
}

fn grid_template_name(t: u16) -> &'static str {
    match t {
        1 => "rotated latitude/longitude",
        10 => "Mercator",
        20 => "polar stereographic",
        30 => "Lambert conformal",
        40 => "Gaussian latitude/longitude",
        90 => "space view",
        101 => "unstructured",
        _ => "other",
    }
}

/// Finds the next "GRIB" at or after `from`; `None` at the end of the file.
fn find_magic<R: Read + Seek>(r: &mut R, from: u64) -> std::io::Result<Option<u64>> {
    let mut buf = vec![0u8; 64 * 1024];
    let mut base = from;
    r.seek(SeekFrom::Start(base))?;
    loop {
        let mut filled = 0;
        while filled < buf.len() {
            let n = r.read(&mut buf[filled..])?;
            if n == 0 {
                break;
            }
            filled += n;
        }
        if let Some(k) = buf[..filled].windows(4).position(|w| w == b"GRIB") {
            return Ok(Some(base + k as u64));
        }
        if filled < buf.len() {
            return Ok(None);
        }
        // Keep three bytes of overlap so a magic across the chunk border is found.
        base += (filled - 3) as u64;
        r.seek(SeekFrom::Start(base))?;
    }
}

/// Number of grid values, and bilinear weights for each requested point.
type GridWeights = (usize, Vec<Option<Weights>>);

/// The positions of the values of a regular latitude/longitude grid (template 3.0), in
/// data order, from the raw grid definition section.
///
/// Read here rather than by the decoder crate because real files (and ecCodes) store
/// western longitudes with the sign bit set, which a reader of the unsigned field
/// misplaces by thousands of degrees. Flag table 3.4 gives the scan order: bit 1 (0x80)
/// points scan westward, bit 2 (0x40) rows run south to north, bit 3 (0x20) columns are
/// consecutive, bit 4 (0x10) every other row runs backward.
/// Grid point positions (latitude, longitude in degrees) in data order, with the
/// numbers of columns and rows.
type GridPoints = (Vec<(f64, f64)>, usize, usize);

fn regular_lat_lon_points(s3: &[u8]) -> Result<GridPoints, String> {
    if s3.len() < 14 {
        return Err("grid definition section is cut short".into());
    }
    let template = u16_at(s3, 12);
    if template != 0 {
        return Err(format!(
            "10 m wind on a {} grid (template 3.{template}) is not supported yet: only regular latitude/longitude grids (template 3.0) are read, since u/v on other grids are relative to the grid and need rotating",
            grid_template_name(template)
        ));
    }
    if s3.len() < 72 {
        return Err("grid definition template 3.0 is cut short".into());
    }
    let ni = u32_at(s3, 30) as usize;
    let nj = u32_at(s3, 34) as usize;
    let declared = u32_at(s3, 6) as usize;
    if ni == 0
        || nj == 0
        || ni == 0xffff_ffff
        || nj == 0xffff_ffff
        || ni.checked_mul(nj) != Some(declared)
    {
        return Err(format!(
            "grid of {ni} × {nj} points does not match its {declared} data points: quasi-regular grids are not supported"
        ));
    }
    let (basic, subdivisions) = (u32_at(s3, 38), u32_at(s3, 42));
    let unit_deg =
        if basic == 0 || basic == 0xffff_ffff || subdivisions == 0 || subdivisions == 0xffff_ffff {
            1e-6
        } else {
            f64::from(basic) / f64::from(subdivisions)
        };
    let angle = |at: usize| signed_i32(u32_at(s3, at)) as f64 * unit_deg;
    let (la1, lo1, la2, lo2) = (angle(46), angle(50), angle(55), angle(59));
    let scan = s3[71];
    let (west, north_up, columns, alternate) = (
        scan & 0x80 != 0,
        scan & 0x40 != 0,
        scan & 0x20 != 0,
        scan & 0x10 != 0,
    );
    let dlat = if nj > 1 {
        (la2 - la1) / (nj - 1) as f64
    } else {
        0.0
    };
    if nj > 1 && ((dlat > 0.0) != north_up) {
        return Err(format!(
            "first and last latitudes ({la1}, {la2}) disagree with the scanning mode {scan:#04x}"
        ));
    }
    let span = if west {
        (lo1 - lo2).rem_euclid(360.0)
    } else {
        (lo2 - lo1).rem_euclid(360.0)
    };
    let dlon = if ni > 1 {
        span / (ni - 1) as f64 * if west { -1.0 } else { 1.0 }
    } else {
        0.0
    };
    let mut out = Vec::with_capacity(declared);
    for k in 0..declared {
        let (mut row, mut col) = if columns {
            (k % nj, k / nj)
        } else {
            (k / ni, k % ni)
        };
        if alternate {
            if columns && col % 2 == 1 {
                row = nj - 1 - row;
            } else if !columns && row % 2 == 1 {
                col = ni - 1 - col;
            }
        }
        out.push((la1 + row as f64 * dlat, lo1 + col as f64 * dlon));
    }
    Ok((out, ni, nj))
}

struct Field {
    message: usize,
    values: Vec<f32>,
}

impl Component {
    /// The component's letter, as error messages spell it.
    fn name(self) -> &'static str {
        match self {
            Component::U => "u",
            Component::V => "v",
        }
    }
}

/// The 10 m wind fields found so far while walking a file, and what else it holds.
#[derive(Default)]
struct Gathered {
    /// Per valid time, the u and v fields.
    fields: BTreeMap<DateTime<Utc>, [Option<Field>; 2]>,
    /// Bilinear weights per distinct grid definition, so a grid is set up once.
    grids: HashMap<Vec<u8>, GridWeights>,
    /// Descriptions of the fields that are not 10 m wind, for the error when none is.
    other_params: Vec<String>,
    /// The newest reference time among the messages with wind.
    latest_reference: Option<DateTime<Utc>>,
}

/// An error about message `message` (1-based) of the file.
fn message_error(message: usize, problem: String) -> WindFileError {
    WindFileError::GribMessage { message, problem }
}

/// A UTC time as it appears in error messages.
fn utc_stamp(t: DateTime<Utc>) -> String {
    t.to_rfc3339_opts(chrono::SecondsFormat::Secs, true)
}

/// Reads the whole message that starts at `start`, checking its framing.
fn read_message<R: Read + Seek>(
    r: &mut R,
    start: u64,
    file_len: u64,
    message: usize,
) -> Result<Vec<u8>, WindFileError> {
    let fail = |problem: String| message_error(message, problem);
    r.seek(SeekFrom::Start(start))?;
    let mut head = [0u8; 16];
    let remaining = file_len - start;
    if remaining < 16 {
        return Err(fail(format!(
            "is cut short: only {remaining} bytes after \"GRIB\" (truncated file?)"
        )));
    }
    r.read_exact(&mut head)?;
    if head[7] != 2 {
        return Err(fail(format!(
            "is GRIB edition {}: only GRIB edition 2 is read (convert the file to GRIB2)",
            head[7]
        )));
    }
    let len = u64::from_be_bytes([
        head[8], head[9], head[10], head[11], head[12], head[13], head[14], head[15],
    ]);
    if len > remaining {
        return Err(fail(format!(
            "is cut short: it declares {len} bytes but the file ends {remaining} bytes after its start (truncated download?)"
        )));
    }
    if len < 20 {
        return Err(fail(format!(
            "declares an impossible length of {len} bytes"
        )));
    }
    let mut msg = vec![0u8; len as usize];
    r.seek(SeekFrom::Start(start))?;
    r.read_exact(&mut msg)?;
    if &msg[msg.len() - 4..] != b"7777" {
        return Err(fail("does not end with \"7777\": damaged message".into()));
    }
    Ok(msg)
}

impl Gathered {
    /// Takes the 10 m wind fields of one message, sampled at `points`.
    fn add_message(
        &mut self,
        message: usize,
        msg: &[u8],
        points: &[LatLon],
    ) -> Result<(), WindFileError> {
        let fail = |problem: String| message_error(message, problem);
        let (ref_time, headers) = scan_message(msg).map_err(fail)?;
        if headers.iter().all(|h| h.wind_component().is_none()) {
            self.other_params
                .extend(headers.iter().map(FieldHeader::describe));
            return Ok(());
        }
        self.latest_reference = Some(self.latest_reference.map_or(ref_time, |t| t.max(ref_time)));
        // The decoder crate may panic on damaged data; that is one bad message, not a
        // reason to bring the whole program down.
        let decoded = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
            decode_message(msg, &headers, points, &mut self.grids)
        }))
        .map_err(|_| fail("the GRIB2 decoder failed on this message (damaged data?)".into()))?
        .map_err(fail)?;
        for (h, component, values) in decoded {
            let t = valid_time(ref_time, &h).map_err(fail)?;
            self.store(message, t, component, values)?;
        }
        Ok(())
    }

    /// Files one field under its valid time, refusing a second one of the same kind.
    fn store(
        &mut self,
        message: usize,
        t: DateTime<Utc>,
        component: Component,
        values: Vec<f32>,
    ) -> Result<(), WindFileError> {
        let slot = &mut self.fields.entry(t).or_default()[component as usize];
        if let Some(first) = slot {
            return Err(message_error(
                message,
                format!(
                    "a second 10 m {} field valid at {} (the first is in message {}): ensemble members or repeated steps are not supported yet",
                    component.name(),
                    utc_stamp(t),
                    first.message
                ),
            ));
        }
        *slot = Some(Field { message, values });
        Ok(())
    }

    /// Pairs u with v at every valid time into wind series at each of `point_count`
    /// points.
    fn into_samples(self, point_count: usize) -> Result<Grib2Samples, WindFileError> {
        if self.fields.is_empty() {
            return Err(no_wind_error(self.other_params));
        }
        let mut times = Vec::with_capacity(self.fields.len());
        let mut per_point: Vec<Option<Vec<Wind>>> =
            vec![Some(Vec::with_capacity(self.fields.len())); point_count];
        for (t, pair) in self.fields {
            let Some((u, v)) = matched_pair(t, pair)? else {
                continue;
            };
            times.push(t);
            push_winds(&mut per_point, &u.values, &v.values);
        }
        Ok(Grib2Samples {
            times,
            points: per_point,
            latest_reference: self.latest_reference,
        })
    }
}

/// The error for a file without 10 m wind, listing what it holds instead.
fn no_wind_error(mut other_params: Vec<String>) -> WindFileError {
    other_params.sort();
    other_params.dedup();
    let found = if other_params.is_empty() {
        "nothing readable".to_string()
    } else {
        other_params.join(", ")
    };
    WindFileError::Grib(format!(
        "no 10 m wind in the file: expected 10 m u and v (discipline 0, category 2, numbers 2 and 3, surface 103 at 10 m); found {found} (discipline/category/number)"
    ))
}

/// The u and v fields valid at `t`, refusing one without the other; `None` when neither.
fn matched_pair(
    t: DateTime<Utc>,
    [u, v]: [Option<Field>; 2],
) -> Result<Option<(Field, Field)>, WindFileError> {
    let lone = |f: &Field, has: &str, lacks: &str| {
        message_error(
            f.message,
            format!(
                "10 m {has} valid at {} has no matching 10 m {lacks} in the file",
                utc_stamp(t)
            ),
        )
    };
    match (u, v) {
        (Some(u), Some(v)) => Ok(Some((u, v))),
        (Some(u), None) => Err(lone(&u, "u", "v")),
        (None, Some(v)) => Err(lone(&v, "v", "u")),
        (None, None) => Ok(None),
    }
}

/// Appends one time step to each point's series; a point missing at any time ends up
/// with no series (see [`Grib2Samples::points`]).
fn push_winds(per_point: &mut [Option<Vec<Wind>>], u_m_s: &[f32], v_m_s: &[f32]) {
    for (k, slot) in per_point.iter_mut().enumerate() {
        if let Some(series) = slot {
            let (uu, vv) = (f64::from(u_m_s[k]), f64::from(v_m_s[k]));
            if uu.is_finite() && vv.is_finite() {
                series.push(Wind::new(uu, vv));
            } else {
                *slot = None;
            }
        }
    }
}

/// Reads every 10 m u/v field of a GRIB2 stream and samples it at `points`.
pub fn sample_grib2<R: Read + Seek>(
    r: R,
    points: &[LatLon],
) -> Result<Grib2Samples, WindFileError> {
    sample_grib2_with(r, points, &Progress::new())
}

/// Like [`sample_grib2`], reporting the share of the file read to `progress` and
/// stopping with [`WindFileError::Cancelled`] when asked to.
pub fn sample_grib2_with<R: Read + Seek>(
    mut r: R,
    points: &[LatLon],
    progress: &Progress,
) -> Result<Grib2Samples, WindFileError> {
    let file_len = r.seek(SeekFrom::End(0))?;
    if file_len == 0 {
        return Err(WindFileError::Grib(
            "the file is empty: expected GRIB2 messages".into(),
        ));
    }
    let mut gathered = Gathered::default();
    let mut pos = 0u64;
    let mut message = 0usize;
    while let Some(start) = find_magic(&mut r, pos)? {
        if progress.is_cancelled() {
            return Err(WindFileError::Cancelled);
        }
        progress.set(start as f32 / file_len as f32);
        message += 1;
        let msg = read_message(&mut r, start, file_len, message)?;
        pos = start + msg.len() as u64;
        gathered.add_message(message, &msg, points)?;
    }
    if message == 0 {
        return Err(WindFileError::Grib(
            "no GRIB message found: expected a GRIB2 file".into(),
        ));
    }
    gathered.into_samples(points.len())
}

/// Decodes the wind fields of one message and samples them at the points. Returns, per
/// wind field: its header, its component and one value per point (NaN outside).
fn decode_message(
    msg: &[u8],
    headers: &[FieldHeader],
    points: &[LatLon],
    grids: &mut HashMap<Vec<u8>, GridWeights>,
) -> Result<Vec<(FieldHeader, Component, Vec<f32>)>, String> {
    let grib2 = grib::from_bytes(msg).map_err(|e| format!("cannot be read: {e}"))?;
    let mut out = Vec::new();
    for (k, (_, sub)) in grib2.iter().enumerate() {
        let Some(h) = headers.get(k) else {
            return Err("has more fields than product definition sections".into());
        };
        let Some(component) = h.wind_component() else {
            continue;
        };
        let section3 = &msg[h.grid.0..h.grid.0 + h.grid.1];
        let key = section3.to_vec();
        if !grids.contains_key(&key) {
            let (latlons, ni, nj) = regular_lat_lon_points(section3)?;
            let grid = RegularGrid::from_points(&latlons, ni, nj)?;
            grids.insert(
                key.clone(),
                (ni * nj, points.iter().map(|&p| grid.weights(p)).collect()),
            );
        }
        let (count, weights) = &grids[&key];
        let decoder = grib::Grib2SubmessageDecoder::from(sub)
            .map_err(|e| format!("10 m wind field cannot be decoded: {e}"))?;
        let values: Vec<f32> = decoder
            .dispatch()
            .map_err(|e| format!("10 m wind field cannot be decoded: {e}"))?
            .collect();
        if values.len() != *count {
            return Err(format!(
                "10 m wind field has {} values for {count} grid points",
                values.len()
            ));
        }
        let sampled = weights
            .iter()
            .map(|w| {
                w.as_ref()
                    .map_or(f32::NAN, |w| interpolate(w, &values) as f32)
            })
            .collect();
        out.push((*h, component, sampled));
    }
    Ok(out)
}
