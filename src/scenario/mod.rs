//! The scenario document: a co-op's or a skipper's coast, ports, boats, wind files and
//! model settings, kept in one versioned JSON file that can be shared with the fleet.

mod compose;
mod demo;
mod demo_record;
mod document;
mod file;

pub use compose::{PlanChoice, plan_scenario, record_settings, segment_names};
pub use demo::{
    DEMO_FORECAST_FILE, DEMO_SCENARIO_FILE, DEMO_SCENARIO_JSON, DEMO_WAVES_FILE, demo_scenario,
    write_demo,
};
pub use demo_record::{
    DEMO_BUOY_FILES, DEMO_CATCH_LOG_FILE, DEMO_RECORD_WIND_FILE, demo_buoy_csv, demo_catch_log_csv,
    demo_record_wind_csv,
};
pub use document::{CalibrationRecord, ModelSettings, Port, Scenario, SstCheckSettings, Vessel};
pub use file::{
    FORMAT_NAME, FORMAT_VERSION, MAX_SCENARIO_BYTES, ScenarioError, is_scenario_text,
    load_scenario, parse_scenario, save_scenario, scenario_to_json,
};
