//! From upwelling to a decision: for a boat and its home port, the distance and steaming
//! time to each stretch, the hours inside the boat's limits, the expected productivity,
//! and a ranked list per local day in which every rank carries its reasons.

mod build;
mod reasons;
mod settings;

pub(crate) use build::local_midnight;
pub use build::{
    DayPlan, Excluded, Plan, PlanError, PlanRequest, RankedStretch, StretchDay, StretchHour,
    StretchInfo, build_plan,
};
pub use settings::TripSettings;

/// The cautions shown with every plan (DESIGN.md, Safety).
pub const CAUTIONS: &str = "Not a navigation aid and no substitute for official marine forecasts and warnings. \
The skipper decides. Respect closures, protected areas and local regulations; vessel limits are the skipper's to set.";
