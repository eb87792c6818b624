//! Sea temperature from GRIB2, sampled at points (probes offshore of each segment):
//! water temperature (discipline 10, category 3, number 0, kelvin) or, where a file has
//! none, the surface temperature (discipline 0, category 0, number 0 on the ground or
//! water surface, first fixed surface 1) at points its land–sea mask (discipline 2,
//! category 0, number 0, in the same file) or its bit-map says are sea. A point that
//! falls on land takes the nearest sea value among the grid points around it (within
//! [`super::SEA_PROBE_CELLS`] grid step, as the NetCDF reader does), else has none.

use super::WindFileError;
use super::grib2::{
    FieldHeader, Messages, decode_field, empty_file_error, message_error, no_message_error,
    read_grid, scan_message, valid_time,
};
use super::grib2_grid::PointRule;
use crate::coast::LatLon;
use chrono::{DateTime, Utc};
use std::collections::{BTreeMap, HashMap};
use std::io::Read;

/// Sea temperatures at points: per point, °C at each of `times` (NaN where none).
#[derive(Debug, Clone, PartialEq)]
pub struct SstSamples {
    /// Valid times, UTC, increasing.
    pub times: Vec<DateTime<Utc>>,
    /// Per point, the temperature at each time, °C (NaN: no sea value there then).
    pub points: Vec<Vec<f64>>,
}

/// A decoded field: values in data order (NaN missing), its grid section, and whether
/// its bit-map masked any point.
type Decoded = (Vec<f32>, Vec<u8>, bool);

#[derive(Clone, Copy, PartialEq, Eq)]
enum Kind {
    Water,
    Surface,
    Mask,
}

fn kind(h: &FieldHeader) -> Option<Kind> {
    match (h.discipline, h.category, h.number) {
        (10, 3, 0) => Some(Kind::Water),
        (0, 0, 0) if h.surface_type == 1 => Some(Kind::Surface),
        (2, 0, 0) => Some(Kind::Mask),
        _ => None,
    }
}

/// Reads the sea temperature of a GRIB2 stream at `points`; `Ok(None)` when it holds
/// neither water nor surface temperature.
///
/// Errors: as the wind reader's for damaged messages; a surface temperature with
/// neither a land–sea mask nor a bit-map (land cannot be told from sea); two fields of
/// one kind at one time.
pub fn sample_sst_grib2(
    reader: impl Read,
    points: &[LatLon],
) -> Result<Option<SstSamples>, WindFileError> {
    let mut messages = Messages::new(reader);
    let mut any = false;
    // Per kind, per valid time: the decoded field (values in data order, NaN missing),
    // its grid key and whether it had a bit-map.
    let mut fields: HashMap<u8, BTreeMap<DateTime<Utc>, Decoded>> = HashMap::new();
    let mut mask: Option<(Vec<f32>, Vec<u8>)> = None;
    while let Some(m) = messages.next_message()? {
        any = true;
        let fail = |p: String| message_error(m.number, p);
        let (ref_time, headers) = scan_message(&m.bytes).map_err(fail)?;
        for h in &headers {
            let Some(k) = kind(h) else { continue };
            let values = decode_field(&m.bytes, h)
                .map_err(|e| fail(format!("sea temperature cannot be decoded: {e}")))?;
            let grid = h.section3(&m.bytes).to_vec();
            if k == Kind::Mask {
                mask = Some((values, grid));
                continue;
            }
            let bitmap = values.iter().any(|v| v.is_nan());
            let t = valid_time(ref_time, h).map_err(fail)?;
            let slot = fields.entry(k as u8).or_default();
            if slot.insert(t, (values, grid, bitmap)).is_some() {
                return Err(fail(format!(
                    "a second sea temperature valid at {}: repeated steps are not supported",
                    super::grib2::utc_stamp(t)
                )));
            }
        }
    }
    if !any {
        return Err(if messages.bytes_read() == 0 {
            empty_file_error()
        } else {
            no_message_error()
        });
    }
    let (chosen, surface) = match (
        fields.remove(&(Kind::Water as u8)),
        fields.remove(&(Kind::Surface as u8)),
    ) {
        (Some(w), _) => (w, false),
        (None, Some(s)) => (s, true),
        (None, None) => return Ok(None),
    };
    let mut rules: HashMap<Vec<u8>, Vec<PointRule>> = HashMap::new();
    let mut out = SstSamples {
        times: Vec::new(),
        points: vec![Vec::new(); points.len()],
    };
    for (t, (mut values, grid, bitmap)) in chosen {
        if surface {
            match &mask {
                Some((land, g)) if *g == grid && land.len() == values.len() => {
                    for (v, l) in values.iter_mut().zip(land) {
                        if l.is_nan() || *l >= 0.5 {
                            *v = f32::NAN;
                        }
                    }
                }
                _ if bitmap => {}
                _ => {
                    return Err(WindFileError::Grib(
                        "surface temperature with neither a land-sea mask on its grid nor a bit-map: land cannot be told from sea; give a water temperature (discipline 10, category 3, number 0) or a file with a land-sea mask".into(),
                    ));
                }
            }
        }
        if !rules.contains_key(&grid) {
            let g = read_grid(&grid, "sea temperature").map_err(WindFileError::Grib)?;
            rules.insert(
                grid.clone(),
                points.iter().map(|&p| PointRule::new(&g, p)).collect(),
            );
        }
        out.times.push(t);
        for (series, rule) in out.points.iter_mut().zip(&rules[&grid]) {
            let k = rule.sample_within(&values, super::SEA_PROBE_CELLS);
            series.push(if k.is_finite() {
                f64::from(k) - 273.15
            } else {
                f64::NAN
            });
        }
    }
    Ok(Some(out))
}
