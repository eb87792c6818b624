//! Writing results for people and other tools: the index table (CSV, JSON) and the plan
//! (table, CSV, JSON, GeoJSON, GPX).

mod index_table;
mod plan_out;

pub use index_table::{IndexFormat, IndexRecord, index_records, write_index};
pub use plan_out::{GPX_STRETCHES_PER_DAY, PlanFormat, render_plan};
