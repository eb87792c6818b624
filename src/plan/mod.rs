//! From upwelling to a decision. Two stages:
//! - [`forecast`](sample_forecast_conditions): the stretches cut from the coast, the
//!   wind sampled once at every point they need, and their upwelling (computed by
//!   [`crate::upwelling`]) — independent of boat and port;
//! - [`rank_plan`]: for a boat and its home port, the distance, the safe window inside
//!   the boat's limits, the score and a ranked list per local day, with typed reasons
//!   and exclusions.

mod boat;
mod forecast;
mod rank;
mod reasons;
mod seastate;
mod settings;
mod window;

pub use boat::{
    CRUISE_SPEED_RANGE_KT, FUEL_RANGE_L_PER_H, Port, RANGE_RANGE_NM, STEEPNESS_LIMIT_RANGE_M_S2,
    Vessel, WAVE_LIMIT_RANGE_M, WIND_LIMIT_RANGE_KT,
};
pub use forecast::{
    Ensemble, Forecast, ForecastError, ForecastGeometry, Latitude, PortRoutes, SampledConditions,
    StretchForecast, StretchHour, UpwellingSettings, forecast_key, sample_forecast_conditions,
};
pub use rank::{
    DayPlan, Excluded, OLD_FORECAST_HOURS, Plan, PlanError, PlanNote, PlanRequest, RankedStretch,
    StretchInfo, quantile, rank_plan,
};
pub use reasons::{
    Exclusion, Odds, Reasons, Stopper, TripReason, UpwellingReason, WaveReason, WaveSource,
    WindReason,
};
pub use settings::TripSettings;
pub use window::{Limits, Unsafe, WorkingHour, longest_safe_run, run_span};

/// The cautions shown with every plan (DESIGN.md, Safety).
pub const CAUTIONS: &str = "Not a navigation aid and no substitute for official marine forecasts and warnings. \
The skipper decides. Respect closures, protected areas and local regulations; vessel limits are the skipper's to set.";
