//! Why a stretch ranks where it does, or is left out: typed values carrying their
//! numbers. Words are made from them only where they are shown (`export::plan_text`,
//! the app), so the text can never disagree with the score.

use crate::coast::Closure;
use chrono::{DateTime, Utc};

/// Why a stretch is left out of a day's ranking.
#[derive(Debug, Clone, PartialEq)]
pub enum Exclusion {
    /// Closed to fishing that day.
    Closed(Closure),
    /// Within 5° of the equator, where Ekman theory fails and no index is computed.
    NearEquator {
        /// Latitude of the stretch centre, degrees north.
        lat_deg: f64,
    },
    /// Farther from the home port than the boat's range.
    BeyondRange {
        /// Distance, nm.
        distance_nm: f64,
        /// The boat's range, nm.
        range_nm: f64,
    },
    /// No wind for this day at the stretch, or none in its working hours.
    NoForecast,
    /// Part of the way from port has no forecast all day.
    NoRouteForecast,
    /// Over the boat's wave limit in every working hour the wind allows.
    OverWaveLimit {
        /// The highest waves on the way and at the stretch, m.
        max_wave_m: f64,
        /// When, UTC.
        at: DateTime<Utc>,
        /// The boat's limit, m.
        limit_m: f64,
        /// Where the wave heights come from.
        source: WaveSource,
    },
    /// A sea steeper than the boat's steepness limit in every working hour the wind
    /// and the wave height allow.
    TooSteep {
        /// The steepest sea, height over period squared, m/s^2.
        ratio: f64,
        /// When, UTC.
        at: DateTime<Utc>,
        /// The boat's limit, m/s^2.
        limit: f64,
    },
    /// No way by sea from the home port within the boat's range.
    NoSeaRoute,
    /// Over the boat's wind limit in every working hour.
    OverWindLimit {
        /// The strongest wind on the way and at the stretch, knots.
        max_wind_kt: f64,
        /// When it blows, UTC.
        at: DateTime<Utc>,
        /// The boat's limit, knots.
        limit_kt: f64,
    },
    /// The longest window inside the limit leaves too little time to fish.
    WindowTooShort {
        /// Start and end of that window, UTC.
        window: (DateTime<Utc>, DateTime<Utc>),
        /// The boat's wind limit, knots.
        limit_kt: f64,
        /// Steaming time each way, hours.
        steam_h: f64,
        /// The fewest fishing hours worth the trip.
        min_fishing_h: f64,
    },
}

impl Exclusion {
    /// The kind as written in JSON (`reason_kind`); the README lists them.
    #[must_use]
    pub fn kind(&self) -> &'static str {
        match self {
            Exclusion::Closed(_) => "closed",
            Exclusion::NearEquator { .. } => "near_equator",
            Exclusion::BeyondRange { .. } => "beyond_range",
            Exclusion::NoForecast | Exclusion::NoRouteForecast => "no_forecast",
            Exclusion::OverWindLimit { .. } => "over_wind_limit",
            Exclusion::OverWaveLimit { .. } | Exclusion::TooSteep { .. } => "over_wave_limit",
            Exclusion::NoSeaRoute => "no_sea_route",
            Exclusion::WindowTooShort { .. } => "window_too_short",
        }
    }

    /// Whether the boat cannot reach the stretch at all (range), as opposed to the day's
    /// weather or rules keeping it out.
    #[must_use]
    pub fn is_out_of_range(&self) -> bool {
        matches!(self, Exclusion::BeyondRange { .. })
    }

    /// Whether the wind keeps the boat from working it that day.
    #[must_use]
    pub fn is_wind(&self) -> bool {
        matches!(
            self,
            Exclusion::OverWindLimit { .. }
                | Exclusion::OverWaveLimit { .. }
                | Exclusion::TooSteep { .. }
                | Exclusion::WindowTooShort { .. }
        )
    }
}

/// What the upwelling did, as of the day's local noon.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum UpwellingReason {
    /// Inside an event so strong that the day's useful upwelling is low: production is
    /// flushed offshore.
    Flushing {
        /// Days since onset.
        age_days: f64,
        /// The event's peak index, m^3/s per 100 m.
        peak_m3s_per_100m: f64,
    },
    /// Inside an event: the bloom is building.
    Building {
        /// Days since onset.
        age_days: f64,
    },
    /// An event ended within the relaxation window of the response model.
    BloomExpected {
        /// The event's length, days.
        length_days: f64,
        /// When it ended, UTC.
        ended: DateTime<Utc>,
    },
    /// An event ended before the relaxation window, and the lagged response to it is
    /// still strong: the bloom that follows upwelling by days.
    Lagged {
        /// The event's length, days.
        length_days: f64,
        /// When it ended, UTC.
        ended: DateTime<Utc>,
    },
    /// Downwelling: warm water held against the coast.
    Downwelling {
        /// Daily mean index, m^3/s per 100 m (negative).
        mean_m3s_per_100m: f64,
    },
    /// The last event ended longer ago than the relaxation window.
    Fading {
        /// The relaxation window, days.
        window_days: f64,
    },
    /// No event so far.
    NoEvent,
}

/// Where the wave heights of a stretch and its way come from.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum WaveSource {
    /// A wave forecast (or a buoy's record) everywhere on the way.
    Forecast,
    /// Somewhere an estimate of the local wind sea from the wind and the fetch (Shore
    /// Protection Manual, CERC 1984): swell unknown.
    Estimate,
    /// Nothing tells the waves.
    None,
}

impl WaveSource {
    /// The word written in JSON (`wave_source`).
    #[must_use]
    pub fn kind(self) -> &'static str {
        match self {
            WaveSource::Forecast => "forecast",
            WaveSource::Estimate => "estimate",
            WaveSource::None => "none",
        }
    }
}

/// What stops the boat in an hour outside the window.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Stopper {
    /// No wind forecast then for part of the way.
    NoForecast,
    /// Wind, knots, over the limit.
    Wind {
        /// The wind, knots.
        kt: f64,
        /// The limit, knots.
        limit_kt: f64,
    },
    /// A sea steeper than the limit (height over period squared, m/s^2).
    Steep {
        /// The steepness, m/s^2.
        ratio: f64,
        /// The limit, m/s^2.
        limit: f64,
    },
    /// Waves, m, over the limit.
    Waves {
        /// The waves, m.
        m: f64,
        /// The limit, m.
        limit_m: f64,
    },
}

/// What the wind and the sea allow.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum WindReason {
    /// Under the limit in every working hour.
    UnderAllDay {
        /// The boat's limit, knots.
        limit_kt: f64,
        /// The strongest wind, knots.
        max_wind_kt: f64,
    },
    /// Over a limit (or no forecast) after the window: back in by its end.
    OverAfter {
        /// The first hour over a limit after the window.
        at: DateTime<Utc>,
        /// What stops the boat then.
        stopper: Stopper,
        /// End of the window, UTC.
        until: DateTime<Utc>,
    },
    /// Over a limit (or no forecast) before the window: go after it opens.
    OverUntil {
        /// The last hour over a limit before the window.
        at: DateTime<Utc>,
        /// What stops the boat then.
        stopper: Stopper,
        /// Start of the window, UTC.
        from: DateTime<Utc>,
    },
}

/// The sea state of a ranked stretch's day.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct WaveReason {
    /// Highest waves on the way and at the stretch in working hours, m (`None` where
    /// nothing tells them).
    pub max_m: Option<f64>,
    /// Where the heights come from.
    pub source: WaveSource,
    /// The boat's wave limit, m, if set.
    pub limit_m: Option<f64>,
}

/// What the trip costs.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TripReason {
    /// Distance from the port by sea, nm.
    pub distance_nm: f64,
    /// Steaming time each way, minutes.
    pub steam_minutes: f64,
    /// Fuel for the round trip, litres.
    pub fuel_l: f64,
    /// The distance is the great-circle line (no way by sea was found to measure).
    pub straight_line: bool,
}

/// The reasons that come with a rank.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Reasons {
    /// What the upwelling did.
    pub upwelling: UpwellingReason,
    /// The day's expected productivity, 0–1.
    pub productivity: f64,
    /// What the wind allows.
    pub wind: WindReason,
    /// The sea state.
    pub waves: WaveReason,
    /// What the trip costs.
    pub trip: TripReason,
    /// Latitude of a stretch between 5° and 10° from the equator, where the index is
    /// large and unreliable.
    pub near_equator_lat_deg: Option<f64>,
    /// How many runs of an ensemble agree (`None`: a single forecast).
    pub odds: Option<Odds>,
}

/// What the runs of an ensemble say about one stretch on one day (README, "Ensembles").
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Odds {
    /// Runs in the ensemble.
    pub runs: usize,
    /// Runs whose daily mean index at the stretch is at or above the event threshold.
    pub upwelling: usize,
    /// Runs in which the stretch has a safe window long enough to fish the minimum
    /// time.
    pub window: usize,
    /// 10th and 90th percentiles of the expected productivity over the runs that have
    /// the day (0–1).
    pub productivity_p10: f64,
    /// See `productivity_p10`.
    pub productivity_p90: f64,
}

impl Odds {
    /// The probability of upwelling: the share of runs with upwelling, 0–1.
    #[must_use]
    pub fn p_upwelling(&self) -> f64 {
        self.upwelling as f64 / self.runs.max(1) as f64
    }

    /// The probability that the boat's window exists, 0–1.
    #[must_use]
    pub fn p_window(&self) -> f64 {
        self.window as f64 / self.runs.max(1) as f64
    }
}
