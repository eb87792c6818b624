//! Settings of trip planning and scoring; every one editable in a scenario.

use serde::{Deserialize, Serialize};

/// How trips are planned and stretches scored.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct TripSettings {
    /// Earliest departure, local hour (0–23).
    pub day_start_hour: u32,
    /// Latest return, local hour (1–24).
    pub day_end_hour: u32,
    /// Fishing hours on the ground that make a full day; fewer lower the score.
    pub target_fishing_hours: f64,
    /// Fewest fishing hours worth the trip.
    pub min_fishing_hours: f64,
    /// Share of the score lost by a stretch at the boat's full range (0–1); nearer
    /// stretches lose proportionally less.
    pub distance_weight: f64,
    /// Scores closer than this (points of 100) are shown as a tie.
    pub tie_margin_points: f64,
    /// Spacing of the points along the way from port where the wind is checked, nm.
    pub route_step_nm: f64,
    /// Least distance from land the way by sea keeps (except in the harbour), nm.
    pub sea_clearance_nm: f64,
}

impl Default for TripSettings {
    fn default() -> Self {
        Self {
            day_start_hour: 5,
            day_end_hour: 21,
            target_fishing_hours: 6.0,
            min_fishing_hours: 2.0,
            distance_weight: 0.5,
            tie_margin_points: 3.0,
            route_step_nm: 3.0,
            sea_clearance_nm: 0.3,
        }
    }
}

impl TripSettings {
    /// Checks the ranges, naming the setting.
    pub fn validate(&self) -> Result<(), String> {
        let bad = |name: &str, v: String, expected: &str| {
            Err(format!(
                "settings.trip: {name} {v} is out of range: expected {expected}"
            ))
        };
        if self.day_start_hour > 23 {
            return bad("day_start_hour", self.day_start_hour.to_string(), "0 to 23");
        }
        if self.day_end_hour > 24 || self.day_end_hour <= self.day_start_hour {
            return bad(
                "day_end_hour",
                self.day_end_hour.to_string(),
                "after day_start_hour, at most 24",
            );
        }
        for (name, v, lo, hi) in [
            ("target_fishing_hours", self.target_fishing_hours, 0.5, 24.0),
            ("min_fishing_hours", self.min_fishing_hours, 0.0, 24.0),
            ("distance_weight", self.distance_weight, 0.0, 1.0),
            ("tie_margin_points", self.tie_margin_points, 0.0, 50.0),
            ("route_step_nm", self.route_step_nm, 0.5, 50.0),
            ("sea_clearance_nm", self.sea_clearance_nm, 0.05, 3.0),
        ] {
            if !(v.is_finite() && (lo..=hi).contains(&v)) {
                return bad(name, v.to_string(), &format!("{lo} to {hi}"));
            }
        }
        Ok(())
    }
}
