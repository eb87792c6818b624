//! Shelfwind: a planner for small-boat fishing that turns a wind forecast into the
//! coastal upwelling index along a user's coast, and ranks the stretches most likely to
//! be productive in the coming days.
//!
//! The computing core knows nothing of any user interface. Data flows one way:
//! files → model → estimate → plan → views.
//!
//! - [`physics`]: drag laws, wind stress, Coriolis, Ekman transport and pumping;
//! - [`coast`]: coast segments and their geometry, read from GeoJSON;
//! - [`wind`]: the wind model and its importers (GRIB2, CSV);
//! - [`upwelling`]: the index per segment over time;
//! - [`export`]: tables for other tools;
//! - [`cli`]: the command line;
//! - `tilepack` (feature `map-packs`, part of `gui`): offline map packs (tile folder, MBTiles, PMTiles) read
//!   tile by tile;
//! - `app` (feature `gui`): the desktop app.
//!
//! Not a navigation aid and no substitute for official marine forecasts and warnings.

#[cfg(feature = "gui")]
pub mod app;
pub mod atomic;
pub mod calibrate;
pub mod cli;
pub mod coast;
pub mod export;
pub mod localtime;
pub mod physics;
pub mod plan;
pub mod progress;
pub mod scenario;
pub mod sst;
pub mod synthetic;
#[cfg(feature = "map-packs")]
pub mod tilepack;
pub mod upwelling;
pub mod verify;
pub mod wind;
