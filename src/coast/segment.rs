//! A coast segment: a named polyline with the sea on one side, cut into pieces.

use super::{LatLon, distance_m, initial_bearing_deg, midpoint};
use crate::physics::bearing_deg;
use serde::{Deserialize, Serialize};

/// On which side of the line the sea lies, walking from its first point to its last.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum SeaSide {
    /// Sea on the left hand.
    Left,
    /// Sea on the right hand.
    Right,
}

impl SeaSide {
    /// The other side.
    #[must_use]
    pub fn flipped(self) -> Self {
        match self {
            SeaSide::Left => SeaSide::Right,
            SeaSide::Right => SeaSide::Left,
        }
    }
}

/// One straight (great-circle) piece of a segment, between two consecutive vertices.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Piece {
    /// Start vertex.
    pub start: LatLon,
    /// End vertex.
    pub end: LatLon,
    /// Great-circle midpoint, where the wind is sampled.
    pub midpoint: LatLon,
    /// Length on the sphere, metres.
    pub length_m: f64,
    /// Bearing along the piece at its midpoint, from start toward end, degrees true.
    pub alongshore_bearing_deg: f64,
    /// Bearing of the offshore normal (from land toward the sea), degrees true.
    pub offshore_bearing_deg: f64,
}

/// A named stretch of coastline.
#[derive(Debug, Clone, PartialEq)]
pub struct Segment {
    /// Identifier, unique in a coast.
    pub id: String,
    /// Vertices in order, at least two.
    pub points: Vec<LatLon>,
    /// Side of the sea.
    pub sea: SeaSide,
}

impl Segment {
    /// The pieces between consecutive vertices; pieces of zero length are skipped.
    #[must_use]
    pub fn pieces(&self) -> Vec<Piece> {
        self.points
            .windows(2)
            .filter_map(|w| {
                let (start, end) = (w[0], w[1]);
                let length_m = distance_m(start, end);
                if length_m <= 0.0 {
                    return None;
                }
                let mid = midpoint(start, end);
                // The bearing at the midpoint: back-bearing from the end, reversed, would
                // differ on long arcs; the bearing from the midpoint to the end is the
                // local tangent there.
                let along = initial_bearing_deg(mid, end);
                let offshore = match self.sea {
                    SeaSide::Right => along + 90.0,
                    SeaSide::Left => along - 90.0,
                };
                Some(Piece {
                    start,
                    end,
                    midpoint: mid,
                    length_m,
                    alongshore_bearing_deg: along,
                    offshore_bearing_deg: bearing_deg(offshore),
                })
            })
            .collect()
    }

    /// Total length, metres.
    #[must_use]
    pub fn length_m(&self) -> f64 {
        self.pieces().iter().map(|p| p.length_m).sum()
    }

    /// The length-weighted midpoint of the pieces' midpoints.
    #[must_use]
    pub fn weighted_midpoint(&self) -> LatLon {
        LatLon::weighted_mean(self.pieces().iter().map(|p| (p.midpoint, p.length_m)))
            .unwrap_or(self.points[0])
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    fn northward(sea: SeaSide) -> Segment {
        Segment {
            id: "s".into(),
            points: vec![LatLon::new(36.0, -122.0), LatLon::new(36.2, -122.0)],
            sea,
        }
    }

    #[test]
    fn offshore_normal_follows_the_sea_side() {
        let left = northward(SeaSide::Left).pieces()[0];
        assert_abs_diff_eq!(left.alongshore_bearing_deg, 0.0, epsilon = 1e-9);
        assert_abs_diff_eq!(left.offshore_bearing_deg, 270.0, epsilon = 1e-9);
        let right = northward(SeaSide::Right).pieces()[0];
        assert_abs_diff_eq!(right.offshore_bearing_deg, 90.0, epsilon = 1e-9);
        assert_abs_diff_eq!(left.length_m, 22_239.0, epsilon = 1.0);
    }

    #[test]
    fn duplicate_vertices_make_no_piece() {
        let mut s = northward(SeaSide::Left);
        s.points.insert(1, s.points[0]);
        assert_eq!(s.pieces().len(), 1);
        assert_abs_diff_eq!(s.weighted_midpoint().lat_deg, 36.1, epsilon = 1e-6);
    }
}
