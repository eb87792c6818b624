//! Boats and home ports: what the skipper sets, and where trips start.

use crate::coast::LatLon;
use serde::{Deserialize, Serialize};
use std::ops::RangeInclusive;

/// Cruising speeds accepted, knots.
pub const CRUISE_SPEED_RANGE_KT: RangeInclusive<f64> = 1.0..=60.0;
/// Fuel use accepted, litres per hour.
pub const FUEL_RANGE_L_PER_H: RangeInclusive<f64> = 0.0..=2000.0;
/// Wind limits accepted, knots.
pub const WIND_LIMIT_RANGE_KT: RangeInclusive<f64> = 1.0..=100.0;
/// Ranges accepted, nautical miles (one way).
pub const RANGE_RANGE_NM: RangeInclusive<f64> = 0.5..=500.0;
/// Wave limits accepted, metres of significant height.
pub const WAVE_LIMIT_RANGE_M: RangeInclusive<f64> = 0.1..=20.0;
/// Steepness limits accepted, height over period squared, m/s^2.
pub const STEEPNESS_LIMIT_RANGE_M_S2: RangeInclusive<f64> = 0.005..=0.2;

/// A home port.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Port {
    /// Identifier, unique among ports.
    pub id: String,
    /// Display name.
    pub name: String,
    /// Position of the harbour mouth.
    pub position: LatLon,
}

/// A boat and the limits its skipper sets.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Vessel {
    /// Identifier, unique among vessels.
    pub id: String,
    /// Display name.
    pub name: String,
    /// Cruising speed, knots.
    pub cruise_speed_kt: f64,
    /// Fuel burnt per hour at cruising speed, litres per hour.
    pub fuel_l_per_h: f64,
    /// Highest sustained wind the skipper will work in, knots.
    pub wind_limit_kt: f64,
    /// Highest significant wave height the skipper will work in, metres (optional).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub wave_limit_m: Option<f64>,
    /// Greatest distance from port for a day trip, nautical miles (one way).
    pub range_nm: f64,
    /// Steepest sea the skipper will work in, as the significant height over the period
    /// squared, m/s^2 (optional, off by default): a short period for its height is worse
    /// than the height alone says (common practice). 0.04 is 1.44 m at 6 s or 2.56 m at
    /// 8 s.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub steepness_limit_m_s2: Option<f64>,
}
