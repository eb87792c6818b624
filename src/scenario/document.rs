//! What a scenario holds, and the checks that keep its values valid.

use crate::coast::{CoastSegment, LatLon};
use crate::physics::{RHO_AIR_RANGE_KG_M3, RHO_WATER_RANGE_KG_M3};
pub use crate::plan::{Port, TripSettings, Vessel};
use crate::upwelling::{CoverageSettings, EventSettings, IndexSettings, ResponseSettings};
use serde::{Deserialize, Serialize};
use std::collections::HashSet;
use std::path::PathBuf;

/// Model settings kept with the scenario.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ModelSettings {
    /// Drag law and densities of the index.
    #[serde(flatten)]
    pub index: IndexSettings,
    /// Length of the stretches segments are cut into, nautical miles.
    pub stretch_length_nm: f64,
    /// Upwelling event thresholds.
    #[serde(default)]
    pub events: EventSettings,
    /// The biological response model.
    #[serde(default)]
    pub response: ResponseSettings,
    /// Trip planning and scoring.
    #[serde(default)]
    pub trip: TripSettings,
    /// Data needed per day, month and season for season metrics.
    #[serde(default)]
    pub seasons: CoverageSettings,
    /// The check against measured sea temperature (`shelfwind verify`).
    #[serde(default)]
    pub sst_check: SstCheckSettings,
    /// Where the response settings came from, when a catch log calibrated them.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub calibration: Option<Box<CalibrationRecord>>,
}

/// A record of the calibration that set the response settings (`shelfwind calibrate`).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CalibrationRecord {
    /// The catch log's file name.
    pub log: String,
    /// Landings used.
    pub landings: usize,
    /// Species kept, if the log was filtered.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub species: Option<String>,
    /// When it was calibrated (UTC day, YYYY-MM-DD).
    pub calibrated_on: String,
    /// Spearman's ρ of the default settings on the left-out folds.
    pub rho_default: f64,
    /// Cross-validated ρ of the calibrated settings.
    pub rho_cross_validated: f64,
    /// Permutation p-value of that ρ.
    pub p_value: f64,
}

/// Settings of the check against measured sea temperature.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct SstCheckSettings {
    /// How far offshore of a segment's midpoint a gridded temperature is read, km.
    pub probe_offshore_km: f64,
    /// Cooling that confirms an upwelling event, °C.
    pub cooling_c: f64,
}

impl Default for SstCheckSettings {
    fn default() -> Self {
        Self {
            probe_offshore_km: 10.0,
            cooling_c: 0.5,
        }
    }
}

impl Default for ModelSettings {
    fn default() -> Self {
        Self {
            index: IndexSettings::default(),
            stretch_length_nm: 5.0,
            events: EventSettings::default(),
            response: ResponseSettings::default(),
            trip: TripSettings::default(),
            seasons: CoverageSettings::default(),
            sst_check: SstCheckSettings::default(),
            calibration: None,
        }
    }
}

/// The whole document.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Scenario {
    /// Name, e.g. the co-op's.
    pub name: String,
    /// IANA time zone of the fleet (e.g. `Europe/Lisbon`), for local days and times.
    pub time_zone: String,
    /// The coast.
    pub segments: Vec<CoastSegment>,
    /// Home ports.
    #[serde(default)]
    pub ports: Vec<Port>,
    /// Boats.
    #[serde(default)]
    pub vessels: Vec<Vessel>,
    /// Wind files, relative to the scenario file's folder (or absolute).
    #[serde(default)]
    pub wind_files: Vec<PathBuf>,
    /// Each wind file is one run of an ensemble (forecasts from different centres taken
    /// together); otherwise the runs are the ensemble members the files declare.
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub wind_files_are_runs: bool,
    /// A coast pack (`shelfwind coast-pack`) laid over the bundled land for this
    /// scenario's waters; relative paths are read from the scenario's folder.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub coast_pack: Option<PathBuf>,
    /// Model settings.
    #[serde(default)]
    pub settings: ModelSettings,
    /// Free notes.
    #[serde(default, skip_serializing_if = "String::is_empty")]
    pub notes: String,
}

fn check_range(
    what: &str,
    name: &str,
    value: f64,
    lo: f64,
    hi: f64,
    unit: &str,
) -> Result<(), String> {
    if value.is_finite() && value >= lo && value <= hi {
        Ok(())
    } else {
        Err(format!(
            "{what}: {name} {value} is out of range: expected {lo} to {hi} {unit}"
        ))
    }
}

fn check_position(what: &str, p: LatLon) -> Result<(), String> {
    check_range(what, "latitude", p.lat_deg, -90.0, 90.0, "degrees")?;
    check_range(what, "longitude", p.lon_deg, -180.0, 180.0, "degrees")
}

fn unique<'a>(kind: &str, ids: impl Iterator<Item = &'a str>) -> Result<(), String> {
    let mut seen = HashSet::new();
    for id in ids {
        if id.trim().is_empty() {
            return Err(format!("a {kind} has an empty id"));
        }
        if !seen.insert(id) {
            return Err(format!(
                "{kind} id {id:?} is used twice: ids must be unique"
            ));
        }
    }
    Ok(())
}

impl Scenario {
    /// How the runs of the forecast are made from the wind files.
    #[must_use]
    pub fn run_rule(&self) -> crate::wind::RunRule {
        if self.wind_files_are_runs {
            crate::wind::RunRule::EachFile
        } else {
            crate::wind::RunRule::Members
        }
    }

    /// Checks every value a user could have typed wrong, naming the item.
    pub fn validate(&self) -> Result<(), String> {
        self.check_time_zone()?;
        unique("segment", self.segments.iter().map(|s| s.id.as_str()))?;
        unique("port", self.ports.iter().map(|p| p.id.as_str()))?;
        unique("vessel", self.vessels.iter().map(|v| v.id.as_str()))?;
        for (k, s) in self.segments.iter().enumerate() {
            check_segment(&format!("segment {} ({:?})", k + 1, s.id), s)?;
        }
        for (k, p) in self.ports.iter().enumerate() {
            check_position(&format!("port {} ({:?})", k + 1, p.id), p.position)?;
        }
        for (k, v) in self.vessels.iter().enumerate() {
            check_vessel(&format!("vessel {} ({:?})", k + 1, v.id), v)?;
        }
        check_settings(&self.settings)
    }

    /// Checks that the time zone is a known IANA name.
    fn check_time_zone(&self) -> Result<(), String> {
        self.time_zone.parse::<chrono_tz::Tz>().map_err(|_| {
            format!(
                "time_zone {:?} is not an IANA time zone name such as \"Europe/Lisbon\"",
                self.time_zone
            )
        })?;
        Ok(())
    }
}

/// Checks that a segment is a line between valid positions.
fn check_segment(what: &str, s: &CoastSegment) -> Result<(), String> {
    if !crate::coast::is_a_line(&s.points) {
        return Err(format!("{what}: needs at least two different points"));
    }
    for p in &s.points {
        check_position(what, *p)?;
    }
    Ok(())
}

/// Checks a boat's speed, fuel use and limits.
fn check_vessel(what: &str, v: &Vessel) -> Result<(), String> {
    use crate::plan::{
        CRUISE_SPEED_RANGE_KT, FUEL_RANGE_L_PER_H, RANGE_RANGE_NM, WAVE_LIMIT_RANGE_M,
        WIND_LIMIT_RANGE_KT,
    };
    let check = |name: &str, value: f64, range: &std::ops::RangeInclusive<f64>, unit: &str| {
        check_range(what, name, value, *range.start(), *range.end(), unit)
    };
    check(
        "cruise_speed_kt",
        v.cruise_speed_kt,
        &CRUISE_SPEED_RANGE_KT,
        "kt",
    )?;
    check("fuel_l_per_h", v.fuel_l_per_h, &FUEL_RANGE_L_PER_H, "l/h")?;
    check("wind_limit_kt", v.wind_limit_kt, &WIND_LIMIT_RANGE_KT, "kt")?;
    check("range_nm", v.range_nm, &RANGE_RANGE_NM, "nm")?;
    if let Some(w) = v.wave_limit_m {
        check("wave_limit_m", w, &WAVE_LIMIT_RANGE_M, "m")?;
    }
    if let Some(x) = v.steepness_limit_m_s2 {
        check(
            "steepness_limit_m_s2",
            x,
            &crate::plan::STEEPNESS_LIMIT_RANGE_M_S2,
            "m/s^2",
        )?;
    }
    Ok(())
}

/// Checks the model settings, section by section.
fn check_settings(s: &ModelSettings) -> Result<(), String> {
    let (air, water) = (RHO_AIR_RANGE_KG_M3, RHO_WATER_RANGE_KG_M3);
    check_range(
        "settings",
        "rho_air_kg_m3",
        s.index.rho_air_kg_m3,
        *air.start(),
        *air.end(),
        "kg/m^3",
    )?;
    check_range(
        "settings",
        "rho_water_kg_m3",
        s.index.rho_water_kg_m3,
        *water.start(),
        *water.end(),
        "kg/m^3",
    )?;
    check_range(
        "settings",
        "stretch_length_nm",
        s.stretch_length_nm,
        0.5,
        100.0,
        "nm",
    )?;
    check_response(&s.response)?;
    check_events(&s.events)?;
    let what = "settings.sst_check";
    check_range(
        what,
        "probe_offshore_km",
        s.sst_check.probe_offshore_km,
        1.0,
        50.0,
        "km",
    )?;
    check_range(what, "cooling_c", s.sst_check.cooling_c, 0.1, 10.0, "°C")?;
    s.trip.validate()
}

/// Checks the settings of the biological response model.
fn check_response(r: &ResponseSettings) -> Result<(), String> {
    let what = "settings.response";
    check_range(what, "lag_peak_days", r.lag_peak_days, 0.5, 30.0, "days")?;
    check_range(what, "lag_shape", r.lag_shape, 1.1, 20.0, "")?;
    check_range(
        what,
        "optimum_m3s_per_100m",
        r.optimum_m3s_per_100m,
        1.0,
        2000.0,
        "m^3/s per 100 m",
    )?;
    check_range(
        what,
        "flush_scale_m3s_per_100m",
        r.flush_scale_m3s_per_100m,
        1.0,
        10_000.0,
        "m^3/s per 100 m",
    )?;
    check_range(
        what,
        "long_event_days",
        r.long_event_days,
        0.5,
        60.0,
        "days",
    )?;
    check_range(what, "relaxation_bonus", r.relaxation_bonus, 0.0, 1.0, "")?;
    check_range(
        what,
        "relaxation_window_days",
        r.relaxation_window_days,
        0.5,
        30.0,
        "days",
    )?;
    check_range(
        what,
        "sustained_event_days",
        r.sustained_event_days,
        0.0,
        60.0,
        "days",
    )?;
    check_range(
        what,
        "pumping_width_km",
        r.pumping_width_km,
        0.0,
        100.0,
        "km",
    )?;
    if !(1..=120).contains(&r.lag_tail_days) {
        return Err(format!(
            "{what}: lag_tail_days {} is out of range: expected 1 to 120 days",
            r.lag_tail_days
        ));
    }
    Ok(())
}

/// Checks the upwelling event thresholds.
fn check_events(e: &EventSettings) -> Result<(), String> {
    let what = "settings.events";
    check_range(
        what,
        "threshold_m3s_per_100m",
        e.threshold_m3s_per_100m,
        -1000.0,
        5000.0,
        "m^3/s per 100 m",
    )?;
    check_range(what, "min_duration_h", e.min_duration_h, 0.0, 720.0, "h")?;
    check_range(what, "max_gap_h", e.max_gap_h, 0.0, 240.0, "h")
}
