//! Giving every drawn segment its sea side: the side the user set, or the side the
//! bundled land polygons show.

use super::{CoastSegment, Land, Segment, SideFinding, find_sea_side};

/// A segment whose sea side cannot be found from the land.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error(
    "segment {id:?}: cannot tell the sea side from the bundled land polygons: {why}: set \"sea\" to \"left\" or \"right\""
)]
pub struct SeaSideError {
    /// The segment.
    pub id: String,
    /// What the land showed.
    pub why: &'static str,
}

/// Resolves the sea side of every segment, in order. Segments with a side set keep it.
pub fn resolve_segments(coast: &[CoastSegment], land: &Land) -> Result<Vec<Segment>, SeaSideError> {
    coast
        .iter()
        .map(|c| {
            let sea = match c.sea {
                Some(side) => side,
                None => match find_sea_side(land, &c.points) {
                    SideFinding::Sea(side) => side,
                    SideFinding::BothSea => {
                        return Err(SeaSideError {
                            id: c.id.clone(),
                            why: "both sides look like sea (an island tip, or a line drawn offshore?)",
                        });
                    }
                    SideFinding::BothLand => {
                        return Err(SeaSideError {
                            id: c.id.clone(),
                            why: "both sides look like land (a line drawn inland, or across a cape?)",
                        });
                    }
                },
            };
            Ok(c.with_sea(sea))
        })
        .collect()
}
