//! The bundled demo: an invented co-op on an invented stretch of coast, with its
//! synthetic forecast. Embedded in the program so it works from any install location.

use super::{Scenario, ScenarioError, parse_scenario};
use crate::atomic::write_atomic;
use crate::wind::{demo_forecast_grib2, demo_waves_grib2};
use std::path::{Path, PathBuf};

/// File name of the demo scenario.
pub const DEMO_SCENARIO_FILE: &str = "north-reach.shelfwind.json";
/// File name of the demo forecast (the scenario refers to it by this name).
pub const DEMO_FORECAST_FILE: &str = "north-reach-forecast.grib2";
/// File name of the demo wave forecast (the scenario refers to it by this name).
pub const DEMO_WAVES_FILE: &str = "north-reach-waves.grib2";
/// The demo scenario's text, as committed in `demo-scenarios/north-reach/`.
pub const DEMO_SCENARIO_JSON: &str =
    include_str!("../../demo-scenarios/north-reach/north-reach.shelfwind.json");

/// The demo scenario.
pub fn demo_scenario() -> Result<Scenario, ScenarioError> {
    parse_scenario(DEMO_SCENARIO_JSON)
}

/// Writes the demo scenario, its forecast and the record of its sea-temperature check
/// (a spring of wind and two buoys, [`crate::scenario::demo_record_wind_csv`]) into `dir`
/// (created if needed); returns the scenario's and the forecast's paths.
pub fn write_demo(dir: &Path) -> std::io::Result<(PathBuf, PathBuf)> {
    std::fs::create_dir_all(dir)?;
    let scenario = dir.join(DEMO_SCENARIO_FILE);
    let forecast = dir.join(DEMO_FORECAST_FILE);
    write_atomic(&forecast, &demo_forecast_grib2())?;
    write_atomic(&dir.join(DEMO_WAVES_FILE), &demo_waves_grib2())?;
    write_atomic(
        &dir.join(crate::scenario::DEMO_RECORD_WIND_FILE),
        crate::scenario::demo_record_wind_csv().as_bytes(),
    )?;
    for (name, north) in crate::scenario::DEMO_BUOY_FILES.iter().zip([true, false]) {
        write_atomic(
            &dir.join(name),
            crate::scenario::demo_buoy_csv(north).as_bytes(),
        )?;
    }
    let demo = demo_scenario().map_err(std::io::Error::other)?;
    let ids: Vec<&str> = demo.segments.iter().map(|s| s.id.as_str()).collect();
    write_atomic(
        &dir.join(crate::scenario::DEMO_CATCH_LOG_FILE),
        crate::scenario::demo_catch_log_csv(&ids).as_bytes(),
    )?;
    write_atomic(&scenario, DEMO_SCENARIO_JSON.as_bytes())?;
    Ok((scenario, forecast))
}
