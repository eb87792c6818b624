//! Writing results for people and other tools: the index table (CSV, JSON) and the plan
//! (table, CSV, JSON, GeoJSON, GPX).

pub mod colour;
mod index_table;
mod plan_out;
pub mod plan_text;
mod season_out;
mod trip_sheet;
pub mod units;

pub use index_table::{IndexFormat, IndexRecord, index_records, index_records_runs, write_index};
pub use plan_out::{GPX_STRETCHES_PER_DAY, PlanFormat, gpx_of_stretches, render_plan};
pub use season_out::{SeasonFormat, flag_text, render_seasons};
pub use trip_sheet::trip_sheet_html;
