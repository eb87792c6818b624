//! From wind at the coast to the coastal upwelling index, its events and seasons, and
//! the lagged biological response.

mod check;
mod daily;
mod events;
mod index;
mod response;
mod season;
mod seasons;

pub use check::{
    BestLag, CheckSettings, EventCheck, LagCorrelation, SegmentCheck, anomalies, check_segment,
    daily_means, fisher_interval, pearson,
};
pub use daily::{
    EventPhase, HourlySeries, LocalDay, UpwellingDay, daily_upwelling, daily_upwelling_on,
    day_input, local_days,
};
pub use events::{EventSettings, UpwellingEvent, cumulative, detect_events};
pub use index::{IndexSeries, IndexSettings, UpwellingError, index_series};
pub use response::{DayInput, DayResponse, ResponseSettings};
pub use season::{SeasonMetrics, season_metrics};
pub use seasons::{
    Climatology, CoverageSettings, RecordError, RecordSettings, SeasonFlag, SeasonYear,
    SegmentSeasons, analyse_record, analyse_seasons, analyse_segments,
};
