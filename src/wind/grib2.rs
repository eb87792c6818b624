//! GRIB2 (WMO FM 92 GRIB edition 2) importer for 10 m wind, and the message scanner,
//! grid reader and field decoder that the wave importer (`waves.rs`) shares.
//!
//! The file is walked message by message with a small scanner of our own, so that each
//! message is read alone (memory stays bounded by one message), errors name the message
//! number, and messages the tool does not need (other parameters, other levels) are
//! skipped before any decoding: a file is never rejected because a message it does not
//! need cannot be decoded. The messages that hold 10 m u or v (discipline 0, category 2,
//! numbers 2 and 3, first fixed surface 103 at 10 m) are decoded field by field with the
//! `grib` crate and sampled at once at the requested points (bilinear in longitude and
//! latitude).

use super::grib2_grid::{GribGrid, GridError, PointRule, TEMPLATES_READ, grid_template_name};
use super::projection::grid_to_earth;
use super::{WindFileError, WindTrack};
use crate::coast::LatLon;
use crate::physics::Wind;
use crate::progress::Progress;
use chrono::{DateTime, TimeZone, Utc};
use std::collections::{BTreeMap, HashMap};
use std::io::{BufRead, BufReader, Read, Seek, SeekFrom};
use std::sync::Arc;

/// Wind sampled from a GRIB2 file at a list of points.
#[derive(Debug, Clone, PartialEq)]
pub struct Grib2Samples {
    /// Valid times, UTC, increasing.
    pub times: Vec<DateTime<Utc>>,
    /// For each requested point, the wind at every time, or `None` when the grid does
    /// not cover the point (outside the grid, or a missing value at some time).
    pub points: Vec<Option<WindTrack>>,
    /// The latest reference (issue) time of the wind messages: when the newest forecast
    /// in the file was made. Earlier steps of the file are the recent past.
    pub latest_reference: Option<DateTime<Utc>>,
}

/// Byte range (start, length) of a section inside its message.
pub(super) type Span = (usize, usize);

/// What the scanner reads about one field: its product definition section (section 4)
/// and where the sections that hold its grid and its data are.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct FieldHeader {
    pub(super) discipline: u8,
    pub(super) template: u16,
    pub(super) category: u8,
    pub(super) number: u8,
    pub(super) time_unit: u8,
    pub(super) forecast_time: u32,
    pub(super) surface_type: u8,
    pub(super) surface_m: f64,
    /// For an ensemble member (product templates 4.1 and 4.11): the type of ensemble
    /// forecast (Code Table 4.6: 0 and 1 control, 2 negative, 3 positive perturbation, 4
    /// multi-model), the perturbation number and the number of forecasts in the ensemble.
    pub(super) ensemble: Option<(u8, u8, u8)>,
    /// For a field over a time interval (product templates 4.8 and 4.11): the end of
    /// the overall interval (year, month, day, hour, minute, second), its valid time.
    pub(super) interval_end: Option<(u16, u8, u8, u8, u8, u8)>,
    /// The grid definition section (section 3) that applies to this field.
    pub(super) grid: Span,
    /// Its data representation section (section 5).
    data_representation: Option<Span>,
    /// Its bit-map section (section 6), as stored (indicator 254 included).
    bitmap: Option<Span>,
    /// The last bit-map section with a bit map of its own (indicator 0) before this
    /// field in the same message: what bit-map indicator 254 refers to.
    earlier_bitmap: Option<Span>,
    /// Its data section (section 7).
    data: Option<Span>,
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

    /// Whether the field is 10 m u (`Some(true)`), 10 m v (`Some(false)`) or neither.
    pub(super) fn is_wind_u(&self) -> Option<bool> {
        self.wind_component().map(|c| c == Component::U)
    }

    /// The field's grid definition section (section 3) in its message.
    pub(super) fn section3<'m>(&self, msg: &'m [u8]) -> &'m [u8] {
        &msg[self.grid.0..self.grid.0 + self.grid.1]
    }

    /// "discipline/category/number at surface type", for messages listing what a file holds.
    pub(super) fn describe(&self) -> String {
        format!(
            "{}/{}/{} at surface {}",
            self.discipline, self.category, self.number, self.surface_type
        )
    }
}

pub(super) fn u16_at(b: &[u8], at: usize) -> u16 {
    u16::from_be_bytes([b[at], b[at + 1]])
}

pub(super) fn u32_at(b: &[u8], at: usize) -> u32 {
    u32::from_be_bytes([b[at], b[at + 1], b[at + 2], b[at + 3]])
}

/// GRIB2 signed integers are sign-and-magnitude, not two's complement.
fn signed_i8(x: u8) -> i32 {
    let m = i32::from(x & 0x7f);
    if x & 0x80 == 0 { m } else { -m }
}

pub(super) fn signed_i32(x: u32) -> i64 {
    let m = i64::from(x & 0x7fff_ffff);
    if x & 0x8000_0000 == 0 { m } else { -m }
}

/// The reference time of an identification section (section 1).
fn reference_time(s: &[u8]) -> Result<DateTime<Utc>, String> {
    let (year, month, day) = (u16_at(s, 12), s[14], s[15]);
    let (hour, minute, second) = (s[16], s[17], s[18]);
    Utc.with_ymd_and_hms(
        i32::from(year),
        u32::from(month),
        u32::from(day),
        u32::from(hour),
        u32::from(minute),
        u32::from(second),
    )
    .single()
    .ok_or_else(|| {
        format!(
            "reference time {year:04}-{month:02}-{day:02} {hour:02}:{minute:02}:{second:02} is not a valid date"
        )
    })
}

/// The header of a field from its product definition section `s` (section 4).
fn field_header(discipline: u8, s: &[u8], grid: Span, earlier_bitmap: Option<Span>) -> FieldHeader {
    let template = u16_at(s, 7);
    let layout_known = template <= 15 && s.len() >= 28;
    FieldHeader {
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
        ensemble: (matches!(template, 1 | 11) && s.len() >= 37).then(|| (s[34], s[35], s[36])),
        interval_end: match template {
            8 if s.len() >= 41 => Some(34),
            11 if s.len() >= 44 => Some(37),
            _ => None,
        }
        .map(|k| {
            (
                u16_at(s, k),
                s[k + 2],
                s[k + 3],
                s[k + 4],
                s[k + 5],
                s[k + 6],
            )
        }),
        grid,
        data_representation: None,
        bitmap: None,
        earlier_bitmap,
        data: None,
    }
}

/// Reads the reference time (section 1) and the field headers (every section 4, with
/// the sections 5, 6 and 7 that follow it) of one message, checking the section lengths
/// as it goes.
pub(super) fn scan_message(msg: &[u8]) -> Result<(DateTime<Utc>, Vec<FieldHeader>), String> {
    let discipline = msg[6];
    let mut pos = 16;
    let mut ref_time = None;
    let mut grid = (0, 0);
    let mut last_bitmap = None;
    let mut fields: Vec<FieldHeader> = Vec::new();
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
        let span = Some((pos, len));
        match (number, fields.last_mut()) {
            (1, _) if len >= 19 => ref_time = Some(reference_time(s)?),
            (3, _) => grid = (pos, len),
            (4, _) if len >= 11 => fields.push(field_header(discipline, s, grid, last_bitmap)),
            (5, Some(f)) => f.data_representation = span,
            (6, Some(f)) if len >= 6 => {
                f.bitmap = span;
                if s[5] == 0 {
                    last_bitmap = span;
                }
            }
            (7, Some(f)) => f.data = span,
            _ => {}
        }
        pos += len;
    }
    let ref_time = ref_time.ok_or("has no identification section (section 1)")?;
    Ok((ref_time, fields))
}

/// Valid time = reference time + forecast time × unit (Code Table 4.4).
pub(super) fn valid_time(
    ref_time: DateTime<Utc>,
    h: &FieldHeader,
) -> Result<DateTime<Utc>, String> {
    // A field over an interval (a mean over the last hour, say) is valid at the
    // interval's end, as ecCodes' validityDate and validityTime give it.
    if let Some((year, month, day, hour, minute, second)) = h.interval_end {
        return chrono::NaiveDate::from_ymd_opt(i32::from(year), month.into(), day.into())
            .and_then(|d| d.and_hms_opt(hour.into(), minute.into(), second.into()))
            .map(|t| t.and_utc())
            .ok_or_else(|| {
                format!(
                    "end of the time interval {year:04}-{month:02}-{day:02} {hour:02}:{minute:02}:{second:02} is not a valid date"
                )
            });
    }
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

/// One GRIB message as read from a file.
pub(super) struct Message {
    /// 1-based number of the message in the file.
    pub(super) number: usize,
    /// Byte offset of its "GRIB" in the file.
    pub(super) start: u64,
    /// All its bytes, "GRIB" to "7777".
    pub(super) bytes: Vec<u8>,
}

/// Walks the GRIB2 messages of a stream one at a time, skipping bytes between messages
/// and checking each message's framing (edition, length, end section).
pub(super) struct Messages<R: Read> {
    r: BufReader<R>,
    /// Bytes of the stream consumed so far.
    offset: u64,
    /// Messages returned so far.
    count: usize,
}

impl<R: Read> Messages<R> {
    /// Starts at the beginning of the stream.
    pub(super) fn new(r: R) -> Self {
        Self {
            r: BufReader::with_capacity(64 * 1024, r),
            offset: 0,
            count: 0,
        }
    }

    /// Bytes of the stream read so far.
    pub(super) fn bytes_read(&self) -> u64 {
        self.offset
    }

    /// The next message, `None` at the end of the stream; an error for a message that
    /// is cut short, of another GRIB edition or otherwise badly framed.
    pub(super) fn next_message(&mut self) -> Result<Option<Message>, WindFileError> {
        let Some(start) = self.skip_to_magic()? else {
            return Ok(None);
        };
        self.count += 1;
        let message = self.count;
        let fail = |problem: String| message_error(message, problem);
        let mut bytes = b"GRIB".to_vec();
        let got = self.read_up_to(&mut bytes, 12)?;
        if got < 12 {
            return Err(fail(format!(
                "cut short: only {} bytes after \"GRIB\" (truncated file?)",
                4 + got
            )));
        }
        if bytes[7] != 2 {
            return Err(fail(format!(
                "is GRIB edition {}: only GRIB edition 2 is read (convert the file to GRIB2)",
                bytes[7]
            )));
        }
        let len = u64::from_be_bytes([
            bytes[8], bytes[9], bytes[10], bytes[11], bytes[12], bytes[13], bytes[14], bytes[15],
        ]);
        let want = len.saturating_sub(16);
        let got = self.read_up_to(&mut bytes, want)?;
        if got < want {
            return Err(fail(format!(
                "cut short: it declares {len} bytes but the file ends {} bytes after its start (truncated download?)",
                16 + got
            )));
        }
        if len < 20 {
            return Err(fail(format!(
                "declares an impossible length of {len} bytes"
            )));
        }
        if &bytes[bytes.len() - 4..] != b"7777" {
            return Err(fail("does not end with \"7777\": damaged message".into()));
        }
        Ok(Some(Message {
            number: message,
            start,
            bytes,
        }))
    }

    /// Appends up to `n` bytes of the stream to `out`; returns how many there were.
    fn read_up_to(&mut self, out: &mut Vec<u8>, n: u64) -> std::io::Result<u64> {
        // Reserve what the message declares, but not more than 64 MiB on its word: a
        // damaged length must not allocate before the bytes are there.
        out.reserve(usize::try_from(n).unwrap_or(usize::MAX).min(1 << 26));
        let got = (&mut self.r).take(n).read_to_end(out)? as u64;
        self.offset += got;
        Ok(got)
    }

    /// Consumes bytes up to and including the next "GRIB"; returns the offset of its
    /// "G", or `None` at the end of the stream.
    fn skip_to_magic(&mut self) -> std::io::Result<Option<u64>> {
        const MAGIC: &[u8; 4] = b"GRIB";
        let mut matched = 0usize;
        loop {
            let buf = self.r.fill_buf()?;
            if buf.is_empty() {
                return Ok(None);
            }
            let mut used = 0;
            let mut found = false;
            for &b in buf {
                used += 1;
                matched = if b == MAGIC[matched] {
                    matched + 1
                } else {
                    usize::from(b == MAGIC[0])
                };
                if matched == MAGIC.len() {
                    found = true;
                    break;
                }
            }
            self.r.consume(used);
            self.offset += used as u64;
            if found {
                return Ok(Some(self.offset - 4));
            }
        }
    }
}

/// Where one 10 m wind field was found, and the angles that turn its grid's axes to
/// east and north (`None` when the field is already along east and north).
struct FieldMeta {
    message: usize,
    north_angles: Option<Arc<Vec<f64>>>,
}

/// One valid time of one member: its column among the member's values at the points,
/// and where its u and v fields were found.
struct TimeEntry {
    column: usize,
    fields: [Option<FieldMeta>; 2],
}

/// One member's (u, v) at each point, a column per valid time in the order the times
/// came in the file (NaN where a field has no value at the point): filled batch by
/// batch as the fields are sampled, so no field is kept once sampled.
#[derive(Default)]
struct Columns {
    count: usize,
    points: Vec<Vec<[f32; 2]>>,
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

/// Which ensemble member fields belong to: (Code Table 4.6 type, perturbation number),
/// or `None` for a deterministic forecast.
type MemberKey = Option<(u8, u8)>;

/// The 10 m wind fields found so far while walking a file, and what else it holds.
#[derive(Default)]
struct Gathered {
    /// Per member and valid time, where its u and v fields were found.
    fields: BTreeMap<(MemberKey, DateTime<Utc>), TimeEntry>,
    /// Per member, the fields' values at the points so far.
    columns: HashMap<MemberKey, Columns>,
    /// The ensemble size each member's fields declare.
    ensemble_size: BTreeMap<MemberKey, u8>,
    /// How each point is sampled, per distinct grid definition, so a grid is set up once.
    grids: HashMap<Vec<u8>, GridRules>,
    /// Descriptions of the fields that are not 10 m wind, for the error when none is.
    other_params: Vec<String>,
    /// The newest reference time among the messages with wind.
    latest_reference: Option<DateTime<Utc>>,
    /// Only the fields of this ensemble member (type, perturbation number) are read.
    only: Option<(u8, u8)>,
}

/// A message's number, reference time and its wind fields decoded (or why not).
type DecodedMessage = (usize, DateTime<Utc>, Result<Vec<DecodedField>, String>);

/// A message whose wind fields are ready to decode.
struct Prepared {
    message: Message,
    ref_time: DateTime<Utc>,
    /// Its wind fields only.
    headers: Vec<FieldHeader>,
}

/// How many messages, or bytes of them and of their decoded fields, are decoded at
/// once: enough to keep every core busy and to read each point's sampling rule once for
/// many fields, little enough to keep memory bounded.
const BATCH_MESSAGES: usize = 32;
const BATCH_BYTES: usize = 64 << 20;

/// How the requested points are sampled on one grid.
struct GridRules {
    /// Number of grid values.
    count: usize,
    /// One rule per requested point.
    rules: Vec<PointRule>,
    /// Per point, the angle from the grid's y axis to true north, when the grid gives u
    /// and v along its own axes.
    north_angles: Option<Arc<Vec<f64>>>,
}

/// An error about message `message` (1-based) of the file.
pub(super) fn message_error(message: usize, problem: String) -> WindFileError {
    WindFileError::GribMessage { message, problem }
}

/// A UTC time as it appears in error messages.
pub(super) fn utc_stamp(t: DateTime<Utc>) -> String {
    t.to_rfc3339_opts(chrono::SecondsFormat::Secs, true)
}

/// Decodes the values of one field, in data order (NaN where its bit map says missing).
///
/// Sections 5, 6 and 7 of the field are handed to the `grib` crate's decoder directly,
/// which decodes only this field; bit-map indicator 254 ("the bit map defined earlier
/// in this message"), which that crate refuses, is resolved here by passing it the
/// earlier bit map. The decoder may panic on damaged data: that is one bad message, not
/// a reason to bring the whole program down, so it runs behind a guard.
pub(super) fn decode_field(msg: &[u8], h: &FieldHeader) -> Result<Vec<f32>, String> {
    let bytes = |s: Span| msg[s.0..s.0 + s.1].to_vec();
    let (Some(s5), Some(s6), Some(s7)) = (h.data_representation, h.bitmap, h.data) else {
        return Err("lacks its data representation, bit-map or data section".into());
    };
    let s6 = if msg[s6.0 + 5] == 254 {
        h.earlier_bitmap.ok_or(
            "refers to a bit map defined earlier in the message (bit-map indicator 254), but none comes before it",
        )?
    } else {
        s6
    };
    let points = u32_at(msg, h.grid.0 + 6) as usize;
    if points > super::grib2_grid::MAX_GRID_POINTS {
        return Err(format!(
            "a grid of {points} points is larger than the tool reads"
        ));
    }
    let (s5, s6, s7) = (bytes(s5), bytes(s6), bytes(s7));
    check_counts(&s5, points)?;
    check_group_lengths(&s5, &s7)?;
    check_jpeg2000(&s5, &s7)?;
    check_png(&s5, &s7)?;
    std::panic::catch_unwind(move || {
        let decoder =
            grib::Grib2SubmessageDecoder::new(points, s5, s6, s7).map_err(|e| one_line(&e))?;
        // Sized once: the decoder's iterators do not tell their length.
        let mut values: Vec<f32> = Vec::with_capacity(points);
        values.extend(decoder.dispatch().map_err(|e| one_line(&e))?);
        Ok(values)
    })
    .map_err(|_| "the GRIB2 decoder failed on this field (damaged data?)".to_string())?
}

/// A decoder error on one line (the decoder's own text may span several).
fn one_line(e: &impl std::fmt::Display) -> String {
    e.to_string()
        .split_whitespace()
        .collect::<Vec<_>>()
        .join(" ")
}

/// Checks the counts in a data representation section (section 5) against the grid
/// before decoding: a damaged count makes the decoder build billions of values (minutes
/// of work and gigabytes of memory) before anything notices.
fn check_counts(s5: &[u8], grid_points: usize) -> Result<(), String> {
    if s5.len() < 11 {
        return Err("data representation section is cut short".into());
    }
    let encoded = u32_at(s5, 5) as usize;
    if encoded > grid_points {
        return Err(format!(
            "{encoded} packed values for a grid of {grid_points} points (damaged data?)"
        ));
    }
    // Templates 5.2 and 5.3 (complex packing): the number of groups (octets 32-35) and
    // the true length of the last group (octets 43-46) cannot exceed the packed values.
    let template = u16_at(s5, 9);
    if matches!(template, 2 | 3) && s5.len() >= 47 {
        let (groups, last) = (u32_at(s5, 31) as usize, u32_at(s5, 42) as usize);
        if groups > encoded.max(1) || last > encoded.max(1) {
            return Err(format!(
                "complex packing declares {groups} groups (the last of {last} values) for {encoded} packed values (damaged data?)"
            ));
        }
    }
    // Template 5.3: spatial differencing of order 1 or 2 (Code Table 5.6, octet 48) with
    // 1 to 4 octets per extra descriptor (octet 49). The decoder sized its descriptors by
    // order + 1 in a byte, so order 255 made it index before the start of a slice.
    if template == 3 && s5.len() >= 49 {
        let (order, octets) = (s5[47], s5[48]);
        if !matches!(order, 1 | 2) {
            return Err(format!(
                "spatial differencing of order {order} (Code Table 5.6 has orders 1 and 2)"
            ));
        }
        if !(1..=4).contains(&octets) {
            return Err(format!(
                "spatial differencing descriptors of {octets} octets each (1 to 4 are possible)"
            ));
        }
    }
    Ok(())
}

/// `width` bits (at most 32) at bit `at` of `bytes`, big-endian; `None` past the end.
fn bits_at(bytes: &[u8], at: usize, width: usize) -> Option<u64> {
    let mut v = 0u64;
    for k in at..at + width {
        let byte = *bytes.get(k / 8)?;
        v = (v << 1) | u64::from((byte >> (7 - k % 8)) & 1);
    }
    Some(v)
}

/// Complex packing (templates 5.2, 5.3): every group's length, read from the data
/// section, must be within the packed values, and all of them together too. The decoder
/// sizes a buffer by each group's length: a damaged length would otherwise ask for
/// gigabytes.
fn check_group_lengths(s5: &[u8], s7: &[u8]) -> Result<(), String> {
    let template = u16_at(s5, 9);
    if !matches!(template, 2 | 3) || s5.len() < 47 {
        return Ok(());
    }
    let encoded = u64::from(u32_at(s5, 5));
    let groups = u32_at(s5, 31) as usize;
    let (value_bits, width_bits) = (usize::from(s5[19]), usize::from(s5[36]));
    let (reference, increment) = (u64::from(u32_at(s5, 37)), u64::from(s5[41]));
    let (last, length_bits) = (u64::from(u32_at(s5, 42)), usize::from(s5[46]));
    let damaged = |what: String| Err(format!("complex packing {what} (damaged data?)"));
    if value_bits > 32 || width_bits > 32 || length_bits > 32 {
        return damaged(format!(
            "uses fields of {value_bits}, {width_bits} and {length_bits} bits (32 at most)"
        ));
    }
    // Where the group lengths start: after the spatial differencing's extra values
    // (template 5.3), the group references and the group widths, each padded to a byte.
    let extra = if template == 3 && s5.len() >= 49 {
        (usize::from(s5[47]) + 1) * usize::from(s5[48])
    } else {
        0
    };
    let padded = |bits: usize| bits.div_ceil(8) * 8;
    let start = (5 + extra) * 8 + padded(groups * value_bits) + padded(groups * width_bits);
    let mut total = last;
    for k in 0..groups.saturating_sub(1) {
        let Some(scaled) = bits_at(s7, start + k * length_bits, length_bits) else {
            return damaged(format!(
                "data section is cut short in its {groups} group lengths"
            ));
        };
        let length = reference + scaled * increment;
        total += length;
        if length > encoded || total > encoded {
            return damaged(format!(
                "declares groups of {total} values or more for {encoded} packed values"
            ));
        }
    }
    Ok(())
}

/// JPEG 2000 packing (template 5.40): the codestream's image (its SIZ marker) must be
/// one component of no more pixels than the values packed, in no more tiles. The
/// decoder sizes its buffers by the image: a damaged size would otherwise take
/// gigabytes and minutes.
fn check_jpeg2000(s5: &[u8], s7: &[u8]) -> Result<(), String> {
    if s5.len() < 11 || u16_at(s5, 9) != 40 {
        return Ok(());
    }
    let encoded = u64::from(u32_at(s5, 5));
    let damaged = |what: &str| Err(format!("JPEG 2000 packing {what} (damaged data?)"));
    // The codestream: SOC (FF 4F), then SIZ (FF 51) with its sizes.
    let cs = s7.get(5..).unwrap_or_default();
    if cs.len() < 4 + 38 || cs[0..4] != [0xFF, 0x4F, 0xFF, 0x51] {
        return damaged("does not start with an image header");
    }
    let at = |k: usize| u64::from(u32_at(cs, 8 + 4 * k));
    let (x, y, x0, y0) = (at(0), at(1), at(2), at(3));
    let (tx, ty, tx0, ty0) = (at(4), at(5), at(6), at(7));
    let components = u16_at(cs, 40);
    let pixels = x.saturating_sub(x0).saturating_mul(y.saturating_sub(y0));
    let tiles = if tx == 0 || ty == 0 {
        u64::MAX
    } else {
        x.saturating_sub(tx0)
            .div_ceil(tx)
            .saturating_mul(y.saturating_sub(ty0).div_ceil(ty))
    };
    if components != 1 || pixels > encoded.max(1) || tiles > encoded.max(1) {
        return Err(format!(
            "JPEG 2000 packing holds an image of {pixels} pixels in {tiles} tiles and {components} components for {encoded} packed values (damaged data?)"
        ));
    }
    Ok(())
}

/// PNG packing (template 5.41): the image (its IHDR chunk) must have no more pixels
/// than the values packed; the decoder allocates the whole image first.
fn check_png(s5: &[u8], s7: &[u8]) -> Result<(), String> {
    if s5.len() < 11 || u16_at(s5, 9) != 41 {
        return Ok(());
    }
    let encoded = u64::from(u32_at(s5, 5));
    let png = s7.get(5..).unwrap_or_default();
    if png.len() < 24 || &png[12..16] != b"IHDR" {
        return Err("PNG packing does not start with an image header (damaged data?)".into());
    }
    let (width, height) = (u64::from(u32_at(png, 16)), u64::from(u32_at(png, 20)));
    if width.saturating_mul(height) > encoded.max(1) {
        return Err(format!(
            "PNG packing holds an image of {width} × {height} pixels for {encoded} packed values (damaged data?)"
        ));
    }
    Ok(())
}

impl Gathered {
    /// The wind fields of one message to decode, the grids they lie on set up for
    /// sampling `points`; `None` when the message holds no wind wanted here.
    fn prepare(
        &mut self,
        message: Message,
        points: &[LatLon],
    ) -> Result<Option<Prepared>, WindFileError> {
        let fail = |problem: String| message_error(message.number, problem);
        let (ref_time, mut headers) = scan_message(&message.bytes).map_err(fail)?;
        if let Some(wanted) = self.only {
            // Another member's fields are skipped before anything is decoded.
            headers.retain(|h| h.ensemble.map(|(kind, n, _)| (kind, n)) == Some(wanted));
            if headers.iter().all(|h| h.wind_component().is_none()) {
                return Ok(None);
            }
        }
        if headers.iter().all(|h| h.wind_component().is_none()) {
            self.other_params
                .extend(headers.iter().map(FieldHeader::describe));
            return Ok(None);
        }
        self.latest_reference = Some(self.latest_reference.map_or(ref_time, |t| t.max(ref_time)));
        headers.retain(|h| h.wind_component().is_some());
        for h in &headers {
            let section3 = h.section3(&message.bytes);
            if !self.grids.contains_key(section3) {
                let rules = GridRules::new(section3, points).map_err(fail)?;
                self.grids.insert(section3.to_vec(), rules);
            }
        }
        Ok(Some(Prepared {
            message,
            ref_time,
            headers,
        }))
    }

    /// The bytes a prepared message's wind fields take once decoded.
    fn decoded_bytes(&self, p: &Prepared) -> usize {
        p.headers
            .iter()
            .filter_map(|h| self.grids.get(h.section3(&p.message.bytes)))
            .map(|g| g.count * std::mem::size_of::<f32>())
            .sum()
    }

    /// Decodes the prepared messages, several at once on as many cores, files their
    /// fields in file order (the first error in file order is the one reported), then
    /// samples them at the `point_count` points into their members' columns; `share`:
    /// the share of the file read so far.
    fn add_batch(
        &mut self,
        batch: Vec<Prepared>,
        point_count: usize,
        share: f64,
    ) -> Result<(), WindFileError> {
        use rayon::prelude::*;
        let grids = &self.grids;
        let decoded: Vec<DecodedMessage> = batch
            .into_par_iter()
            .map(|p| {
                let fields = decode_message(&p.message.bytes, &p.headers, grids);
                (p.message.number, p.ref_time, fields)
            })
            .collect();
        let mut filed: Vec<(DecodedField, MemberKey, usize)> = Vec::new();
        for (message, ref_time, fields) in decoded {
            let fail = |problem: String| message_error(message, problem);
            for field in fields.map_err(fail)? {
                let t = valid_time(ref_time, &field.header).map_err(fail)?;
                let (member, column) = self.file(message, t, &field)?;
                filed.push((field, member, column));
            }
        }
        let mut of_member: BTreeMap<MemberKey, Vec<ToSample<'_>>> = BTreeMap::new();
        for (field, member, column) in &filed {
            if let Some(grid) = self.grids.get(&field.grid) {
                of_member.entry(*member).or_default().push(ToSample {
                    rules: &grid.rules,
                    values: &field.values,
                    column: *column,
                    component: field.component as usize,
                });
            }
        }
        for (member, fields) in of_member {
            if let Some(columns) = self.columns.get_mut(&member) {
                sample_into(columns, &fields, point_count, share);
            }
        }
        Ok(())
    }

    /// Files one field under its member and valid time, refusing a second one of the
    /// same kind; gives its member and its column.
    fn file(
        &mut self,
        message: usize,
        t: DateTime<Utc>,
        field: &DecodedField,
    ) -> Result<(MemberKey, usize), WindFileError> {
        let component = field.component;
        let member = field
            .header
            .ensemble
            .map(|(kind, number, _)| (kind, number));
        if let Some((_, _, size)) = field.header.ensemble {
            self.ensemble_size.insert(member, size);
        }
        let columns = self.columns.entry(member).or_default();
        let entry = self.fields.entry((member, t)).or_insert_with(|| {
            columns.count += 1;
            TimeEntry {
                column: columns.count - 1,
                fields: [None, None],
            }
        });
        let slot = &mut entry.fields[component as usize];
        if let Some(first) = slot {
            return Err(message_error(
                message,
                format!(
                    "a second 10 m {} field valid at {}{} (the first is in message {}): repeated steps are not supported",
                    component.name(),
                    utc_stamp(t),
                    member.map_or(String::new(), |(_, n)| format!(" for ensemble member {n}")),
                    first.message
                ),
            ));
        }
        *slot = Some(FieldMeta {
            message,
            north_angles: self
                .grids
                .get(&field.grid)
                .and_then(|g| g.north_angles.clone()),
        });
        Ok((member, entry.column))
    }

    /// Pairs u with v at every valid time into wind series at each point, one set per
    /// ensemble member (one set for a deterministic forecast).
    fn into_members(mut self) -> Result<Vec<MemberSamples>, WindFileError> {
        if self.fields.is_empty() {
            return Err(no_wind_error(self.other_params));
        }
        // Per member, in order: its times, and each time's column and grid angles.
        let mut members: Vec<MemberSamples> = Vec::new();
        let mut current: Option<(MemberKey, Vec<DateTime<Utc>>, Vec<Column>)> = None;
        for ((member, t), entry) in std::mem::take(&mut self.fields) {
            let Some((u, v)) = matched_pair(t, entry.fields)? else {
                continue;
            };
            if u.north_angles != v.north_angles {
                return Err(message_error(
                    v.message,
                    format!(
                        "10 m v valid at {} is on another grid than its u (message {}): u and v must share one grid",
                        utc_stamp(t),
                        u.message
                    ),
                ));
            }
            if current.as_ref().is_none_or(|c| c.0 != member) {
                members.extend(current.take().map(|c| self.lay_out(c)));
                current = Some((member, Vec::new(), Vec::new()));
            }
            if let Some((_, times, order)) = current.as_mut() {
                times.push(t);
                order.push((entry.column, u.north_angles));
            }
        }
        members.extend(current.take().map(|c| self.lay_out(c)));
        Ok(members)
    }

    /// One member's wind at each point: its columns taken in time order, winds given
    /// along a grid's axes turned to east and north. A point missing at any time has no
    /// series (see [`Grib2Samples::points`]). Points in parallel; columns already in
    /// time order along east and north are kept as they are.
    fn lay_out(
        &mut self,
        (member, times, order): (MemberKey, Vec<DateTime<Utc>>, Vec<Column>),
    ) -> MemberSamples {
        use rayon::prelude::*;
        let columns = self.columns.remove(&member).unwrap_or_default();
        let as_read = order
            .iter()
            .enumerate()
            .all(|(k, (c, a))| *c == k && a.is_none())
            && order.len() == columns.count;
        let points = columns
            .points
            .into_par_iter()
            .enumerate()
            .with_min_len(1024)
            .map(|(k, mut series)| {
                let valued = |[u, v]: [f32; 2]| u.is_finite() && v.is_finite();
                if as_read {
                    if !series.iter().all(|&w| valued(w)) {
                        return None;
                    }
                    series.shrink_to_fit();
                    return Some(WindTrack::Single(series));
                }
                let mut track = WindTrack::with_capacity(order.len());
                for (column, angles) in &order {
                    let w = series.get(*column).copied().filter(|&w| valued(w))?;
                    let (uu, vv) = (f64::from(w[0]), f64::from(w[1]));
                    let (east, north) = match angles {
                        Some(angles) => grid_to_earth(uu, vv, angles[k]),
                        None => (uu, vv),
                    };
                    track.push(Wind::new(east, north));
                }
                Some(track)
            })
            .collect();
        MemberSamples {
            member: member.map(|(kind, number)| EnsembleMember {
                kind,
                number,
                ensemble_size: self.ensemble_size.get(&Some((kind, number))).copied(),
            }),
            samples: Grib2Samples {
                times,
                points,
                latest_reference: self.latest_reference,
            },
        }
    }
}

/// A valid time's column and the angles that turn its grid's axes to east and north.
type Column = (usize, Option<Arc<Vec<f64>>>);

/// The member of an ensemble forecast a set of fields belongs to (GRIB2 product
/// templates 4.1 and 4.11).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct EnsembleMember {
    /// Type of ensemble forecast, WMO Code Table 4.6: 0 unperturbed high-resolution
    /// control, 1 unperturbed low-resolution control, 2 negatively and 3 positively
    /// perturbed, 4 multi-model.
    pub kind: u8,
    /// Perturbation number.
    pub number: u8,
    /// Number of forecasts in the ensemble, as the file declares it.
    pub ensemble_size: Option<u8>,
}

impl EnsembleMember {
    /// Whether this is a control (unperturbed) run.
    #[must_use]
    pub fn is_control(&self) -> bool {
        self.kind <= 1
    }
}

/// The wind of one member of an ensemble (or of a deterministic forecast: no member).
#[derive(Debug, Clone, PartialEq)]
pub struct MemberSamples {
    /// The member; `None` for a deterministic forecast.
    pub member: Option<EnsembleMember>,
    /// Its wind at the points.
    pub samples: Grib2Samples,
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
    [u, v]: [Option<FieldMeta>; 2],
) -> Result<Option<(FieldMeta, FieldMeta)>, WindFileError> {
    let lone = |f: &FieldMeta, has: &str, lacks: &str| {
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

/// Reads every 10 m u/v field of a GRIB2 stream and samples it at `points`.
pub fn sample_grib2<R: Read + Seek>(
    r: R,
    points: &[LatLon],
) -> Result<Grib2Samples, WindFileError> {
    sample_grib2_with(r, points, &Progress::new())
}

/// Like [`sample_grib2`], reporting the share of the file read to `progress` and
/// stopping with [`WindFileError::Cancelled`] when asked to. A file of several ensemble
/// members is refused (see [`sample_grib2_members`]); a single member is a forecast.
pub fn sample_grib2_with<R: Read + Seek>(
    r: R,
    points: &[LatLon],
    progress: &Progress,
) -> Result<Grib2Samples, WindFileError> {
    let mut members = sample_grib2_members_with(r, points, progress)?;
    if members.len() > 1 {
        let names: Vec<String> = members
            .iter()
            .map(|m| {
                m.member
                    .map_or("a deterministic forecast".to_string(), |e| {
                        format!(
                            "{} {}",
                            if e.is_control() { "control" } else { "member" },
                            e.number
                        )
                    })
            })
            .collect();
        return Err(WindFileError::Grib(format!(
            "the file holds {} ensemble members ({}): here one forecast is read, not an ensemble; give one member or a deterministic forecast",
            members.len(),
            names.join(", ")
        )));
    }
    Ok(members.remove(0).samples)
}

/// Every 10 m u/v field of a GRIB2 stream sampled at `points`, one set per ensemble
/// member (in the order of their Code Table 4.6 type and perturbation number), or one
/// set for a deterministic forecast.
pub fn sample_grib2_members<R: Read + Seek>(
    r: R,
    points: &[LatLon],
) -> Result<Vec<MemberSamples>, WindFileError> {
    sample_grib2_members_with(r, points, &Progress::new())
}

/// Like [`sample_grib2_members`], with progress and cancelling.
pub fn sample_grib2_members_with<R: Read + Seek>(
    r: R,
    points: &[LatLon],
    progress: &Progress,
) -> Result<Vec<MemberSamples>, WindFileError> {
    sample_gathered(r, points, progress, Gathered::default())
}

/// The 10 m wind of one ensemble member (Code Table 4.6 type, perturbation number) of a
/// GRIB2 stream, sampled at `points`: the other members' fields are skipped undecoded,
/// so each member of a large ensemble can be read in turn in the memory of one.
pub fn sample_grib2_member_with<R: Read + Seek>(
    r: R,
    points: &[LatLon],
    member: (u8, u8),
    progress: &Progress,
) -> Result<Grib2Samples, WindFileError> {
    let gathered = Gathered {
        only: Some(member),
        ..Gathered::default()
    };
    let mut members = sample_gathered(r, points, progress, gathered)?;
    Ok(members.remove(0).samples)
}

fn sample_gathered<R: Read + Seek>(
    mut r: R,
    points: &[LatLon],
    progress: &Progress,
    mut gathered: Gathered,
) -> Result<Vec<MemberSamples>, WindFileError> {
    let file_len = r.seek(SeekFrom::End(0))?;
    if file_len == 0 {
        return Err(empty_file_error());
    }
    r.seek(SeekFrom::Start(0))?;
    let mut messages = Messages::new(r);
    let mut batch: Vec<Prepared> = Vec::new();
    let mut batch_bytes = 0;
    loop {
        if progress.is_cancelled() {
            return Err(WindFileError::Cancelled);
        }
        // Ok(true): another message read; Ok(false): the end. A message that cannot be
        // read or prepared ends the reading after the messages before it are decoded
        // (their errors come first).
        let more: Result<bool, WindFileError> = match messages.next_message() {
            Ok(Some(m)) => {
                progress.set(m.start as f32 / file_len as f32);
                gathered.prepare(m, points).map(|p| {
                    if let Some(p) = p {
                        batch_bytes += p.message.bytes.len() + gathered.decoded_bytes(&p);
                        batch.push(p);
                    }
                    true
                })
            }
            Ok(None) => Ok(false),
            Err(e) => Err(e),
        };
        if !matches!(more, Ok(true)) || batch.len() >= BATCH_MESSAGES || batch_bytes >= BATCH_BYTES
        {
            let share = messages.bytes_read() as f64 / file_len as f64;
            gathered.add_batch(std::mem::take(&mut batch), points.len(), share)?;
            batch_bytes = 0;
        }
        if !more? {
            break;
        }
    }
    if messages.count == 0 {
        return Err(no_message_error());
    }
    gathered.into_members()
}

/// The error for a file of no bytes at all.
pub(super) fn empty_file_error() -> WindFileError {
    WindFileError::Grib("the file is empty: expected GRIB2 messages".into())
}

/// The error for a file without a single "GRIB".
pub(super) fn no_message_error() -> WindFileError {
    WindFileError::Grib("no GRIB message found: expected a GRIB2 file".into())
}

/// The grid in `s3`. Other grid templates are refused with "`what` on a … grid … is not
/// supported", naming the template and the ones read.
pub(super) fn read_grid(s3: &[u8], what: &str) -> Result<GribGrid, String> {
    GribGrid::parse(s3).map_err(|e| match e {
        GridError::Unsupported(template) => format!(
            "{what} on a {} grid (template 3.{template}) is not supported: the tool reads {TEMPLATES_READ} grids",
            grid_template_name(template)
        ),
        GridError::Bad(problem) => problem,
    })
}

impl GridRules {
    /// Sets up the sampling of `points` on the grid of `s3`.
    fn new(s3: &[u8], points: &[LatLon]) -> Result<Self, String> {
        let grid = read_grid(s3, "10 m wind")?;
        let north_angles = grid
            .uv_relative_to_grid
            .then(|| Arc::new(points.iter().map(|&p| grid.north_angle_rad(p)).collect()));
        Ok(Self {
            count: grid.len(),
            rules: points.iter().map(|&p| PointRule::new(&grid, p)).collect(),
            north_angles,
        })
    }
}

/// One decoded wind field: its values on its grid (section 3 as given).
struct DecodedField {
    header: FieldHeader,
    component: Component,
    grid: Vec<u8>,
    values: Vec<f32>,
}

/// Decodes the wind fields of one message whose grids are set up in `grids`.
fn decode_message(
    msg: &[u8],
    headers: &[FieldHeader],
    grids: &HashMap<Vec<u8>, GridRules>,
) -> Result<Vec<DecodedField>, String> {
    let mut out = Vec::new();
    for h in headers {
        let Some(component) = h.wind_component() else {
            continue;
        };
        let section3 = h.section3(msg);
        let Some(grid) = grids.get(section3) else {
            continue;
        };
        let values =
            decode_field(msg, h).map_err(|e| format!("10 m wind field cannot be decoded: {e}"))?;
        if values.len() != grid.count {
            return Err(format!(
                "10 m wind field has {} values for {} grid points",
                values.len(),
                grid.count
            ));
        }
        out.push(DecodedField {
            header: *h,
            component,
            grid: section3.to_vec(),
            values,
        });
    }
    Ok(out)
}

/// A decoded field to sample: the rules of its grid, its values there, and its column
/// and component (u 0, v 1) among its member's.
struct ToSample<'a> {
    rules: &'a [PointRule],
    values: &'a [f32],
    column: usize,
    component: usize,
}

/// Samples a batch's fields of one member at every point into its columns (NaN outside
/// the grid or where a field has no value nearby). Points are taken a few hundred at a
/// time, in parallel, and each block's rules are read from the cache for every field,
/// not brought in again from memory field after field; each point's values are grown
/// by the worker that samples it.
fn sample_into(columns: &mut Columns, fields: &[ToSample<'_>], point_count: usize, share: f64) {
    use rayon::prelude::*;
    const POINTS: usize = 256;
    if columns.points.len() < point_count {
        columns.points.resize_with(point_count, Vec::new);
    }
    let count = columns.count;
    // Room for the columns the whole file likely holds (as many per byte as read so
    // far, at most 32 times as many as now), so the points' values are not grown and
    // copied again and again; room never written takes no memory.
    let room =
        ((count as f64 / share.max(1e-9)).ceil() as usize).clamp(count, count.saturating_mul(32));
    columns
        .points
        .par_chunks_mut(POINTS)
        .enumerate()
        .for_each(|(b, block)| {
            for series in block.iter_mut() {
                if series.capacity() < count {
                    series.reserve_exact(room - series.len());
                }
                series.resize(count, [f32::NAN; 2]);
            }
            for f in fields {
                let rules = f.rules.get(b * POINTS..).unwrap_or_default();
                for (series, rule) in block.iter_mut().zip(rules) {
                    if let Some(w) = series.get_mut(f.column) {
                        w[f.component] = rule.sample(f.values);
                    }
                }
            }
        });
}
