//! Coast segments: named polylines along the shore, cut into straight pieces that each
//! know their midpoint, length, alongshore bearing and offshore-normal bearing.

mod geodesy;
mod geojson;
mod segment;

pub use geodesy::{
    EARTH_MEAN_RADIUS_M, LatLon, destination, distance_m, initial_bearing_deg, midpoint,
};
pub use geojson::{CoastError, read_coast_geojson};
pub use segment::{Piece, SeaSide, Segment};
