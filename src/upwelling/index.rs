//! The coastal upwelling index of a segment over time: per piece at its midpoint, then
//! the length-weighted mean over the segment (Bakun 1973 index, stress by the chosen
//! drag law).

use crate::coast::{LatLon, Segment};
use crate::physics::{
    DragChoice, EquatorError, LatitudeCheck, OffshoreNormal, RHO_AIR_KG_M3, RHO_WATER_KG_M3, Wind,
    check_latitude, coriolis_parameter, ekman_transport, wind_stress,
};
use crate::wind::SegmentWind;
use chrono::{DateTime, Utc};
use serde::{Deserialize, Serialize};

/// The model settings of the index.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct IndexSettings {
    /// Drag law for the wind stress.
    pub drag: DragChoice,
    /// Air density, kg/m^3.
    pub rho_air_kg_m3: f64,
    /// Sea-water density, kg/m^3.
    pub rho_water_kg_m3: f64,
}

impl Default for IndexSettings {
    /// Constant C_D 1.3e-3, air 1.22 kg/m^3, sea water 1025 kg/m^3.
    fn default() -> Self {
        Self {
            drag: DragChoice::default(),
            rho_air_kg_m3: RHO_AIR_KG_M3,
            rho_water_kg_m3: RHO_WATER_KG_M3,
        }
    }
}

/// Why no index could be computed for a segment.
#[derive(Debug, thiserror::Error, PartialEq)]
#[error("segment {id:?}: {source}")]
pub struct UpwellingError {
    /// The segment.
    pub id: String,
    /// The latitude problem.
    pub source: EquatorError,
}

/// The index of one segment over time.
#[derive(Debug, Clone, PartialEq)]
pub struct IndexSeries {
    /// Segment id.
    pub segment_id: String,
    /// The segment's length-weighted midpoint.
    pub midpoint: LatLon,
    /// Valid times, UTC.
    pub times: Vec<DateTime<Utc>>,
    /// Wind at the midpoint at each time.
    pub wind: Vec<Wind>,
    /// Coastal upwelling index at each time, m^3/s per 100 m of coastline; positive is
    /// upwelling.
    pub index_m3s_per_100m: Vec<f64>,
    /// Some piece lies between 5° and 10° from the equator: the index is unreliable.
    pub near_equator: bool,
}

/// Computes the index series of a segment from its wind.
pub fn index_series(
    segment: &Segment,
    wind: &SegmentWind,
    settings: &IndexSettings,
) -> Result<IndexSeries, UpwellingError> {
    let pieces = segment.pieces();
    let total_m: f64 = pieces.iter().map(|p| p.length_m).sum();
    let mut near_equator = false;
    let mut geometry = Vec::with_capacity(pieces.len());
    for p in &pieces {
        let check = check_latitude(p.midpoint.lat_deg).map_err(|source| UpwellingError {
            id: segment.id.clone(),
            source,
        })?;
        near_equator |= check == LatitudeCheck::NearEquator;
        geometry.push((
            coriolis_parameter(p.midpoint.lat_deg),
            OffshoreNormal::new(p.offshore_bearing_deg),
            p.length_m / total_m,
        ));
    }
    let index = (0..wind.times.len())
        .map(|t| {
            geometry
                .iter()
                .zip(&wind.pieces)
                .map(|(&(f, normal, weight), w)| {
                    let tau = wind_stress(w[t], &settings.drag, settings.rho_air_kg_m3);
                    let m = ekman_transport(tau, f, settings.rho_water_kg_m3);
                    weight * normal.upwelling_index_m3s_per_100m(m)
                })
                .sum()
        })
        .collect();
    Ok(IndexSeries {
        segment_id: segment.id.clone(),
        midpoint: segment.weighted_midpoint(),
        times: wind.times.clone(),
        wind: wind.midpoint.clone(),
        index_m3s_per_100m: index,
        near_equator,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::coast::SeaSide;
    use approx::assert_abs_diff_eq;

    fn wind_for(segment: &Segment, w: Wind) -> SegmentWind {
        let t = DateTime::parse_from_rfc3339("2027-05-01T00:00:00Z")
            .expect("valid")
            .to_utc();
        SegmentWind {
            source: 0,
            times: vec![t],
            pieces: vec![vec![w]; segment.pieces().len()],
            midpoint: vec![w],
        }
    }

    /// A north–south coast at 36°N with the sea to the west and 10 m/s from the north:
    /// +180.5 m^3/s per 100 m (REFERENCES.md worked check, Bakun 1973 index).
    #[test]
    fn straight_coast_matches_the_worked_check() {
        let seg = Segment {
            id: "a".into(),
            points: vec![LatLon::new(35.95, -122.0), LatLon::new(36.05, -122.0)],
            sea: SeaSide::Left,
        };
        let s = index_series(
            &seg,
            &wind_for(&seg, Wind::from_speed_direction(10.0, 0.0)),
            &IndexSettings::default(),
        )
        .expect("mid-latitude");
        assert_abs_diff_eq!(s.index_m3s_per_100m[0], 180.5, epsilon = 0.2);
        assert!(!s.near_equator);
    }

    /// Two pieces of lengths 2:1, one facing west and one facing south-west: the index
    /// is the length-weighted mean of 180.5 and 127.6 (at 36°N, wind from the north).
    #[test]
    fn length_weighted_mean_over_pieces() {
        let a = LatLon::new(36.0, -122.0);
        let b = crate::coast::destination(a, 0.0, 2000.0);
        let c = crate::coast::destination(b, 315.0, 1000.0);
        let seg = Segment {
            id: "bend".into(),
            points: vec![a, b, c],
            sea: SeaSide::Left,
        };
        let s = index_series(
            &seg,
            &wind_for(&seg, Wind::from_speed_direction(10.0, 0.0)),
            &IndexSettings::default(),
        )
        .expect("mid-latitude");
        // Piece 2 runs toward 315°, so its offshore normal is 225°: the wind from 0° is
        // 45° off the coast there, as wind from 315° is on a coast facing 270°.
        assert_abs_diff_eq!(
            s.index_m3s_per_100m[0],
            (2.0 * 180.5 + 127.6) / 3.0,
            epsilon = 0.3
        );
    }

    #[test]
    fn equatorial_segment_is_refused_with_its_name() {
        let seg = Segment {
            id: "equator".into(),
            points: vec![LatLon::new(1.0, 9.0), LatLon::new(1.1, 9.0)],
            sea: SeaSide::Left,
        };
        let e = index_series(
            &seg,
            &wind_for(&seg, Wind::new(0.0, -5.0)),
            &IndexSettings::default(),
        )
        .unwrap_err();
        assert!(
            e.to_string()
                .starts_with("segment \"equator\": latitude 1.05° is within 5° of the equator"),
            "{e}"
        );
    }
}
