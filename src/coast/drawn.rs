//! The coast as the user draws and keeps it: named segments with optional sea side,
//! notes and closures. [`Segment`] is the resolved form the physics uses.

use super::{LatLon, SeaSide, Segment, destination, distance_m, initial_bearing_deg};
use chrono::NaiveDate;
use serde::{Deserialize, Serialize};

/// A closure to fishing: the stretch may not be fished, with the reason shown.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct Closure {
    /// Why (shown in the plan), e.g. "marine reserve" or "seasonal closure".
    pub reason: String,
    /// First day of the closure, if it is not permanent.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub from: Option<NaiveDate>,
    /// Last day of the closure, if it is not permanent.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub to: Option<NaiveDate>,
}

impl Closure {
    /// Whether the closure applies on a given local day.
    #[must_use]
    pub fn applies_on(&self, day: NaiveDate) -> bool {
        self.from.is_none_or(|f| day >= f) && self.to.is_none_or(|t| day <= t)
    }
}

/// One coast segment as kept in a scenario or a GeoJSON file.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CoastSegment {
    /// Identifier, unique in a coast.
    pub id: String,
    /// Display name (may be empty).
    #[serde(default)]
    pub name: String,
    /// Vertices in order.
    pub points: Vec<LatLon>,
    /// Side of the sea walking from the first point to the last; `None` means "find it
    /// from the bundled land polygons".
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub sea: Option<SeaSide>,
    /// Free notes.
    #[serde(default, skip_serializing_if = "String::is_empty")]
    pub notes: String,
    /// Closed to fishing, with the reason and dates.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub closure: Option<Closure>,
}

impl CoastSegment {
    /// The name to show: the name, or the id when there is none.
    #[must_use]
    pub fn label(&self) -> &str {
        if self.name.trim().is_empty() {
            &self.id
        } else {
            &self.name
        }
    }

    /// The resolved segment with the given sea side.
    #[must_use]
    pub fn with_sea(&self, sea: SeaSide) -> Segment {
        Segment {
            id: self.id.clone(),
            points: self.points.clone(),
            sea,
        }
    }
}

impl Segment {
    /// Cuts the segment into stretches of equal length close to `length_m` (at least
    /// one), following the line. Stretch ids are `<segment id>/<n>`, n from 1.
    #[must_use]
    pub fn stretches(&self, length_m: f64) -> Vec<Segment> {
        let total = self.length_m();
        let count = if length_m > 0.0 && total > 0.0 {
            (total / length_m).round().max(1.0) as usize
        } else {
            1
        };
        if count == 1 {
            return vec![Segment {
                id: format!("{}/1", self.id),
                ..self.clone()
            }];
        }
        let each = total / count as f64;
        let mut out = Vec::with_capacity(count);
        let mut current = vec![self.points[0]];
        let mut left_in_stretch = each;
        for w in self.points.windows(2) {
            let (mut a, b) = (w[0], w[1]);
            let mut piece = distance_m(a, b);
            while piece > left_in_stretch && out.len() + 1 < count {
                let cut = destination(a, initial_bearing_deg(a, b), left_in_stretch);
                current.push(cut);
                out.push(Segment {
                    id: format!("{}/{}", self.id, out.len() + 1),
                    points: std::mem::replace(&mut current, vec![cut]),
                    sea: self.sea,
                });
                piece -= left_in_stretch;
                a = cut;
                left_in_stretch = each;
            }
            left_in_stretch -= piece;
            current.push(b);
        }
        out.push(Segment {
            id: format!("{}/{}", self.id, out.len() + 1),
            points: current,
            sea: self.sea,
        });
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    #[test]
    fn stretches_have_equal_lengths_and_follow_the_line() {
        let a = LatLon::new(38.0, -123.0);
        let b = destination(a, 0.0, 10_000.0);
        let c = destination(b, 330.0, 8_520.0);
        let seg = Segment {
            id: "s".into(),
            points: vec![a, b, c],
            sea: SeaSide::Left,
        };
        // 18.52 km = 10 nm: two stretches of 5 nm.
        let parts = seg.stretches(5.0 * 1852.0);
        assert_eq!(parts.len(), 2);
        assert_eq!(parts[0].id, "s/1");
        assert_eq!(parts[1].id, "s/2");
        for p in &parts {
            assert_abs_diff_eq!(p.length_m(), 9_260.0, epsilon = 0.5);
            assert_eq!(p.sea, SeaSide::Left);
        }
        assert_eq!(parts[0].points[0], a);
        assert_eq!(*parts[1].points.last().expect("points"), c);
        assert_eq!(parts[0].points.last(), parts[1].points.first());
        // Shorter than one stretch: one stretch, the whole segment.
        assert_eq!(seg.stretches(50_000.0).len(), 1);
        assert_eq!(seg.stretches(50_000.0)[0].points, seg.points);
    }

    #[test]
    fn closures_apply_between_their_dates() {
        let d = |s: &str| NaiveDate::parse_from_str(s, "%Y-%m-%d").expect("date");
        let c = Closure {
            reason: "spawning".into(),
            from: Some(d("2027-05-01")),
            to: Some(d("2027-05-31")),
        };
        assert!(c.applies_on(d("2027-05-01")));
        assert!(c.applies_on(d("2027-05-31")));
        assert!(!c.applies_on(d("2027-06-01")));
        assert!(
            Closure {
                reason: "reserve".into(),
                from: None,
                to: None
            }
            .applies_on(d("2030-01-01"))
        );
    }
}
