//! The bundled land with a pack laid over it, built once as rings so that every user
//! of [`Land`] (land or sea, drawing, the sea side, fetch, ways by sea) sees the same
//! coast.

use i_overlay::core::fill_rule::FillRule;
use i_overlay::core::overlay_rule::OverlayRule;
use i_overlay::float::single::SingleFloatOverlay;

use super::Pack;
use crate::coast::{Land, LatLon};

impl Land {
    /// This land outside the pack's box and the pack's land inside it.
    ///
    /// Rings whose extent misses the box are kept as they are. The others lose what
    /// lies in the box (a difference with the box, even-odd) and are joined with the
    /// pack's rings (a union, even-odd), so where land runs across the edge of the box
    /// no edge is left along it: ways by sea keep their clearance from real coast only.
    /// Where the two coasts disagree at the edge of the box (the pack has water where
    /// this land has land), the edge of the box is coast.
    #[must_use]
    pub fn with_pack(&self, pack: &Pack) -> Land {
        let bbox = pack.bbox;
        let (touching, mut rings): (Vec<&Vec<LatLon>>, Vec<&Vec<LatLon>>) =
            self.rings().iter().partition(|r| bbox.meets_extent_of(r));
        let to_plane = |r: &Vec<LatLon>| -> Vec<[f64; 2]> {
            r.iter().map(|p| [p.lon_deg, p.lat_deg]).collect()
        };
        let outside: Vec<Vec<[f64; 2]>> = if touching.is_empty() {
            Vec::new()
        } else {
            let subject: Vec<Vec<[f64; 2]>> = touching.into_iter().map(to_plane).collect();
            subject
                .overlay(
                    &bbox.contour(0.0),
                    OverlayRule::Difference,
                    FillRule::EvenOdd,
                )
                .into_iter()
                .flatten()
                .collect()
        };
        let inside: Vec<Vec<[f64; 2]>> = pack.rings().iter().map(to_plane).collect();
        let joined: Vec<Vec<[f64; 2]>> = match (outside.is_empty(), inside.is_empty()) {
            (true, _) => inside,
            (_, true) => outside,
            _ => outside
                .overlay(&inside, OverlayRule::Union, FillRule::EvenOdd)
                .into_iter()
                .flatten()
                .collect(),
        };
        let mut all: Vec<Vec<LatLon>> = rings.drain(..).cloned().collect();
        all.extend(
            joined
                .into_iter()
                .map(|c| {
                    c.into_iter()
                        .map(|[x, y]| LatLon::new(y, x))
                        .collect::<Vec<_>>()
                })
                .filter(|r| r.len() >= 3),
        );
        Land::from_rings(all)
    }
}
