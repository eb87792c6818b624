//! Coast segments: named polylines along the shore, cut into straight pieces that each
//! know their midpoint, length, alongshore bearing and offshore-normal bearing.

mod drawn;
mod fetch;
mod geodesy;
mod geojson;
mod land;
mod packs;
mod resolve;
mod route;
mod segment;

pub use drawn::{Closure, CoastSegment};
pub use fetch::{FETCH_CAP_M, FETCH_DIRECTIONS, fetch_from_table, fetch_m, fetch_table};
pub use geodesy::{
    EARTH_MEAN_RADIUS_M, LatLon, destination, distance_m, distance_with_cos_m, initial_bearing_deg,
    is_a_line, midpoint,
};
pub use geojson::{CoastError, read_coast_geojson, write_coast_geojson};
pub use land::{Land, LandError, SideFinding, find_sea_side};
pub use packs::{
    CutSummary, LandFileError, LandFileFormat, LandSource, Pack, PackBox, PackError, cut_pack,
    read_land_file,
};
pub use resolve::{SeaSideError, resolve_segments};
pub use route::{RouteSettings, SeaRoute, sea_routes};
pub use segment::{Piece, SeaSide, Segment};
