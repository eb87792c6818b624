//! A small GRIB2 writer: 10 m wind on a regular latitude/longitude grid, simple packing.
//!
//! It writes what the demo forecast needs and no more: grid template 3.0, product
//! template 4.0, data representation template 5.0 (simple packing, WMO FM 92 GRIB
//! edition 2). Files it writes are read back by this crate's reader and, in the tests,
//! by ecCodes.

use chrono::{DateTime, Datelike, Timelike, Utc};

/// One field to write: values on a regular grid, rows north to south, each row west to
/// east (GRIB2 scanning mode 0).
#[derive(Debug, Clone, PartialEq)]
pub struct GridField<'a> {
    /// Latitude of the first (northernmost) row, degrees.
    pub lat_north_deg: f64,
    /// Longitude of the first (westernmost) column, degrees east (any convention).
    pub lon_west_deg: f64,
    /// Grid spacing, degrees, the same in latitude and longitude.
    pub step_deg: f64,
    /// Number of columns.
    pub ni: usize,
    /// Number of rows.
    pub nj: usize,
    /// Parameter number in discipline 0, category 2: 2 = u, 3 = v.
    pub parameter: u8,
    /// Reference time.
    pub reference: DateTime<Utc>,
    /// Forecast step, hours after the reference time.
    pub step_hours: u32,
    /// Values, m/s, `ni * nj` of them.
    pub values: &'a [f64],
}

/// Decimal scale of the packing: values are kept to 0.01 m/s.
const DECIMAL_SCALE: i16 = 2;

fn section(number: u8, body: &[u8]) -> Vec<u8> {
    let mut s = Vec::with_capacity(body.len() + 5);
    s.extend_from_slice(&((body.len() + 5) as u32).to_be_bytes());
    s.push(number);
    s.extend_from_slice(body);
    s
}

/// GRIB2 signed integers: sign bit and magnitude.
fn signed32(x: i64) -> [u8; 4] {
    let m = (x.unsigned_abs() as u32) & 0x7fff_ffff;
    (if x < 0 { m | 0x8000_0000 } else { m }).to_be_bytes()
}

fn signed16(x: i16) -> [u8; 2] {
    let m = x.unsigned_abs() & 0x7fff;
    (if x < 0 { m | 0x8000 } else { m }).to_be_bytes()
}

fn micro_deg(x: f64) -> i64 {
    (x * 1e6).round() as i64
}

/// Encodes one field as a complete GRIB2 message. Non-finite values are written as 0.
#[must_use]
pub fn encode_wind_message(field: &GridField<'_>) -> Vec<u8> {
    encode_message(field, Parameter::Wind10m)
}

/// What a message written by [`encode_message`] holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Parameter {
    /// 10 m wind, the component in [`GridField::parameter`] (discipline 0, category 2,
    /// on the height above ground of 10 m).
    Wind10m,
    /// Significant height of combined wind waves and swell, m (discipline 10, category
    /// 0, number 3, on the water surface: fixed surface type 1).
    WaveHeight,
}

/// Encodes one field as a GRIB2 message (regular lat/lon grid, simple packing).
#[must_use]
pub fn encode_message(field: &GridField<'_>, what: Parameter) -> Vec<u8> {
    encode(field, what, None)
}

/// Encodes one field of an ensemble member (product template 4.1): `member` is the type
/// of ensemble forecast (WMO Code Table 4.6), the perturbation number and the number of
/// forecasts in the ensemble.
#[must_use]
pub fn encode_member_message(
    field: &GridField<'_>,
    what: Parameter,
    member: (u8, u8, u8),
) -> Vec<u8> {
    encode(field, what, Some(member))
}

fn encode(field: &GridField<'_>, what: Parameter, member: Option<(u8, u8, u8)>) -> Vec<u8> {
    let (discipline, category, number) = match what {
        Parameter::Wind10m => (0u8, 2u8, field.parameter),
        Parameter::WaveHeight => (10, 0, 3),
    };
    let r = &field.reference;
    let mut s1 = Vec::new();
    s1.extend_from_slice(&255u16.to_be_bytes()); // originating centre: missing (not a real centre)
    s1.extend_from_slice(&0u16.to_be_bytes()); // sub-centre
    s1.extend_from_slice(&[2, 0, 1]); // master tables 2, no local tables, ref time = start of forecast
    s1.extend_from_slice(&(r.year() as u16).to_be_bytes());
    s1.extend_from_slice(&[
        r.month() as u8,
        r.day() as u8,
        r.hour() as u8,
        r.minute() as u8,
        r.second() as u8,
    ]);
    s1.extend_from_slice(&[2, 1]); // research product, forecast

    let n = field.ni * field.nj;
    let lon_east = field.lon_west_deg.rem_euclid(360.0);
    let lat_south = field.lat_north_deg - field.step_deg * (field.nj - 1) as f64;
    let lon_last = (lon_east + field.step_deg * (field.ni - 1) as f64).rem_euclid(360.0);
    let mut s3 = vec![0u8];
    s3.extend_from_slice(&(n as u32).to_be_bytes());
    s3.extend_from_slice(&[0, 0]);
    s3.extend_from_slice(&0u16.to_be_bytes()); // template 3.0
    s3.push(6); // Earth: sphere of radius 6 371 229 m
    s3.extend_from_slice(&[0xff; 15]); // radius and axes: not used with shape 6
    s3.extend_from_slice(&(field.ni as u32).to_be_bytes());
    s3.extend_from_slice(&(field.nj as u32).to_be_bytes());
    s3.extend_from_slice(&0u32.to_be_bytes()); // basic angle 0: units of 1e-6 degree
    s3.extend_from_slice(&u32::MAX.to_be_bytes());
    s3.extend_from_slice(&signed32(micro_deg(field.lat_north_deg)));
    s3.extend_from_slice(&signed32(micro_deg(lon_east)));
    s3.push(0x30); // increments given; u/v relative to east and north
    s3.extend_from_slice(&signed32(micro_deg(lat_south)));
    s3.extend_from_slice(&signed32(micro_deg(lon_last)));
    s3.extend_from_slice(&signed32(micro_deg(field.step_deg)));
    s3.extend_from_slice(&signed32(micro_deg(field.step_deg)));
    s3.push(0); // scanning mode 0: west to east, north to south, rows consecutive

    let mut s4 = Vec::new();
    s4.extend_from_slice(&0u16.to_be_bytes()); // no vertical coordinates
    s4.extend_from_slice(&u16::from(member.is_some()).to_be_bytes()); // template 4.0 or 4.1
    s4.extend_from_slice(&[category, number, 2, 0, 255]); // category, number, forecast
    s4.extend_from_slice(&0u16.to_be_bytes());
    s4.extend_from_slice(&[0, 1]); // cut-off minutes, unit: hour
    s4.extend_from_slice(&field.step_hours.to_be_bytes());
    match what {
        Parameter::Wind10m => {
            s4.extend_from_slice(&[103, 0]); // height above ground, scale 0
            s4.extend_from_slice(&10u32.to_be_bytes()); // 10 m
        }
        Parameter::WaveHeight => {
            s4.extend_from_slice(&[1, 255]); // ground or water surface, scale missing
            s4.extend_from_slice(&u32::MAX.to_be_bytes()); // value missing
        }
    }
    s4.extend_from_slice(&[255, 0, 0, 0, 0, 0]); // no second surface
    if let Some((kind, number, size)) = member {
        s4.extend_from_slice(&[kind, number, size]);
    }

    let scale = 10f64.powi(i32::from(DECIMAL_SCALE));
    let scaled: Vec<f64> = field
        .values
        .iter()
        .map(|v| {
            if v.is_finite() {
                (v * scale).round()
            } else {
                0.0
            }
        })
        .collect();
    let reference = scaled.iter().copied().fold(f64::INFINITY, f64::min);
    let reference = if reference.is_finite() {
        reference
    } else {
        0.0
    };
    let max_packed = scaled.iter().map(|v| v - reference).fold(0.0, f64::max) as u64;
    let bits = (64 - max_packed.leading_zeros()).max(1) as u8;
    let mut s5 = Vec::new();
    s5.extend_from_slice(&(n as u32).to_be_bytes());
    s5.extend_from_slice(&0u16.to_be_bytes()); // template 5.0
    s5.extend_from_slice(&(reference as f32).to_be_bytes());
    s5.extend_from_slice(&signed16(0)); // binary scale 0
    s5.extend_from_slice(&signed16(DECIMAL_SCALE));
    s5.extend_from_slice(&[bits, 0]); // bits per value, floating-point originals

    let mut packed = vec![0u8; (n * bits as usize).div_ceil(8)];
    for (k, v) in scaled.iter().enumerate() {
        let x = (v - reference) as u64;
        for b in 0..bits as usize {
            if x >> (bits as usize - 1 - b) & 1 == 1 {
                let at = k * bits as usize + b;
                packed[at / 8] |= 0x80 >> (at % 8);
            }
        }
    }

    let body = [
        section(1, &s1),
        section(3, &s3),
        section(4, &s4),
        section(5, &s5),
        section(6, &[255]),
        section(7, &packed),
    ]
    .concat();
    let total = 16 + body.len() + 4;
    let mut msg = Vec::with_capacity(total);
    msg.extend_from_slice(b"GRIB");
    msg.extend_from_slice(&[0, 0, discipline, 2]); // reserved, discipline, edition 2
    msg.extend_from_slice(&(total as u64).to_be_bytes());
    msg.extend_from_slice(&body);
    msg.extend_from_slice(b"7777");
    msg
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::coast::LatLon;
    use crate::wind::sample_grib2;

    #[test]
    fn written_fields_read_back_at_the_nodes_and_between() {
        let reference = DateTime::parse_from_rfc3339("2027-05-10T00:00:00Z")
            .expect("valid")
            .to_utc();
        let (ni, nj) = (5, 4);
        let field = |parameter: u8, f: &dyn Fn(f64, f64) -> f64| {
            let values: Vec<f64> = (0..nj)
                .flat_map(|j| (0..ni).map(move |i| (j, i)))
                .map(|(j, i)| f(40.0 - 0.5 * f64::from(j), -126.0 + 0.5 * f64::from(i)))
                .collect();
            encode_wind_message(&GridField {
                lat_north_deg: 40.0,
                lon_west_deg: -126.0,
                step_deg: 0.5,
                ni: ni as usize,
                nj: nj as usize,
                parameter,
                reference,
                step_hours: 3,
                values: &values,
            })
        };
        let u = field(2, &|lat, lon| 2.0 * (lat - 38.0) + lon + 130.0);
        let v = field(3, &|_, lon| -10.0 - (lon + 126.0));
        let file = [u, v].concat();
        let got = sample_grib2(std::io::Cursor::new(file), &[LatLon::new(38.75, -125.25)])
            .expect("readable");
        assert_eq!(got.times[0].to_rfc3339(), "2027-05-10T03:00:00+00:00");
        let w = got.points[0].as_ref().expect("inside").to_winds()[0];
        assert!((w.u_m_s - (1.5 + 4.75)).abs() < 0.006, "{w:?}");
        assert!((w.v_m_s + 10.75).abs() < 0.006, "{w:?}");
    }

    /// The reader lays each field in its place on the time axis, whatever order the
    /// messages come in: 40 steps (more than one batch of messages), written in time
    /// order and again backwards with v before u, read back the same, in time order.
    #[test]
    fn messages_in_any_order_read_as_in_time_order() {
        let reference = DateTime::parse_from_rfc3339("2027-05-10T00:00:00Z")
            .expect("valid")
            .to_utc();
        let message = |parameter: u8, step: u32| {
            let values: Vec<f64> = (0..12)
                .map(|k| {
                    let s = f64::from(step);
                    if parameter == 2 {
                        s + f64::from(k) * 0.1
                    } else {
                        -s
                    }
                })
                .collect();
            encode_wind_message(&GridField {
                lat_north_deg: 40.0,
                lon_west_deg: -126.0,
                step_deg: 0.5,
                ni: 4,
                nj: 3,
                parameter,
                reference,
                step_hours: step,
                values: &values,
            })
        };
        let steps: Vec<u32> = (1..=40).collect();
        let in_order: Vec<u8> = steps
            .iter()
            .flat_map(|&h| [message(2, h), message(3, h)])
            .flatten()
            .collect();
        let backwards: Vec<u8> = steps
            .iter()
            .rev()
            .flat_map(|&h| [message(3, h), message(2, h)])
            .flatten()
            .collect();
        let points = [LatLon::new(40.0, -126.0), LatLon::new(39.25, -125.25)];
        let a = sample_grib2(std::io::Cursor::new(in_order), &points).expect("readable");
        let b = sample_grib2(std::io::Cursor::new(backwards), &points).expect("readable");
        assert_eq!(a, b);
        assert_eq!(a.times.len(), 40);
        for ((k, t), h) in a.times.iter().enumerate().zip(1_i64..) {
            assert_eq!(*t, reference + chrono::Duration::hours(h));
            // The first node holds u = step, v = -step (packed to 0.01 m/s).
            let w = a.points[0].as_ref().expect("inside").to_winds()[k];
            assert!((w.u_m_s - (k + 1) as f64).abs() < 0.006, "{k}: {w:?}");
            assert!((w.v_m_s + (k + 1) as f64).abs() < 0.006, "{k}: {w:?}");
        }
    }
}
