//! Ways by sea from a port to coast stretches: the shortest route that keeps a set
//! clearance from the bundled land polygons.
//!
//! # Method: a visibility graph over the corners of the land
//!
//! Among polygonal obstacles, a shortest way bends only at the obstacles' convex
//! corners, so it is a shortest path in the graph whose nodes are those corners and whose
//! edges are the straight legs between corners that see each other: a visibility graph
//! (Lozano-Pérez & Wesley 1979). Keeping a clearance `c` from land rounds every convex
//! corner of the sea's shore into an arc of radius `c` about the land's corner; each arc
//! is replaced by the corners of the polygon circumscribed about it, one per 45° of turn
//! or less, so a way along them never comes closer than `c` and is longer than the
//! rounded way by at most 5.5 % of the arcs' length (tens of metres per headland).
//! Dijkstra's algorithm (Dijkstra 1959) runs once from the port over these nodes, testing
//! a leg only when it would shorten the way to its far end (lazy visibility). Each target
//! then takes, among the nodes it sees, the one that minimises the node's distance plus
//! the last leg, trying nodes in increasing order of that sum: the first one seen is the
//! best, and usually the first one tried. A node's sum is only worked out when a lower
//! bound of it (its distance, plus the difference of its and the target's straight-line
//! distances from the port's first node: the triangle inequality) does not already rule
//! it out.
//!
//! Why not a raster searched with A* (Hart, Nilsson & Raphael 1968): the bundled land has
//! 59 000 vertices for the whole world, tens of kilometres apart along smooth coasts,
//! so a region of a few hundred kilometres holds a few hundred corners. The graph's size
//! does not grow with the area searched nor with a smaller clearance, its legs are exact
//! straight lines with no grid zigzags left to smooth, and the clearance is tested on
//! the land's own edges. A raster of cells of half the clearance (~280 m) over the same
//! region would hold 10⁵–10⁷ cells and still need line-of-sight smoothing.
//!
//! # Geometry
//!
//! Each leg is the straight line between its ends in latitude and longitude, as the land
//! polygons' edges are (see [`Land::is_land`]): that keeps the clearance test exact
//! where a great circle would bow a few tens of metres off a long edge. Lengths are
//! great-circle distances between turning points ([`distance_m`]); over a 50 km leg at
//! mid-latitudes the two differ by a fraction of a metre. Distances to land are measured
//! in a flat frame local to each land edge (cut into pieces of at most 5 km), accurate to
//! about 0.1 %; legs and nodes are checked against 1 % more than the clearance and nodes
//! are placed 2 % beyond it, so that an independent check finds at least the clearance.
//!
//! # Ends
//!
//! A port's harbour mouth and a stretch's target often lie inside the coarse land
//! polygons or within the clearance. Each end that is not navigable (at sea and at least
//! the clearance from land) is joined by a straight harbour leg, exempt from the
//! clearance, to the nearest navigable point within the harbour allowance. Candidates
//! are the points just beyond the clearance from the nearby edges (off each edge's
//! point nearest to the end, and where two edges' offset lines cross, which are the
//! inner corners of narrow bays), tried nearest first; failing those, points every half
//! clearance along the offset lines.
//!
//! # Search area
//!
//! The nodes are taken from the box around the port and the targets plus a margin (half
//! the farthest target's distance, at least 20 km), never beyond what `max_length_m`
//! can reach from the port. A way found in the box is kept when no way leaving the box
//! could be shorter (the distances from its ends to the box's sides bound such a way
//! from below); otherwise the search runs again, for those targets only, in a box with
//! four times the margin. Memory grows with the corners in the box and time with their
//! square, not with the box's area; a target beyond `max_length_m` in a straight line
//! costs nothing.

use std::cmp::{Ordering, Reverse};
use std::collections::BinaryHeap;

use rayon::prelude::*;
use rstar::{AABB, RTree, RTreeObject, SelectionFunction};

use super::{EARTH_MEAN_RADIUS_M, Land, LatLon, distance_m, distance_with_cos_m};
use crate::physics::NAUTICAL_MILE_M;

/// A way by sea: its turning points from start to end, and its length.
#[derive(Debug, Clone, PartialEq)]
pub struct SeaRoute {
    /// Turning points from the start (`from`) to the end (the target), latitude and
    /// longitude in degrees; consecutive points are joined by straight legs in latitude
    /// and longitude.
    pub points: Vec<LatLon>,
    /// Length of the way, the sum of the great-circle distances between consecutive
    /// points, metres.
    pub length_m: f64,
    /// Length of the harbour leg at the start (from `from` to the first navigable point)
    /// and at the end (from the last navigable point to the target), metres. Zero where
    /// that end is itself navigable, and then the leg is not in `points`.
    pub harbour_legs_m: [f64; 2],
}

impl SeaRoute {
    /// The points from the first navigable point to the last: every leg between them
    /// keeps at least the clearance from land. The harbour legs, exempt from it, join
    /// them to the start and the end.
    #[must_use]
    pub fn clear_points(&self) -> &[LatLon] {
        let start = usize::from(self.harbour_legs_m[0] > 0.0);
        let end = self.points.len() - usize::from(self.harbour_legs_m[1] > 0.0);
        self.points.get(start..end).unwrap_or(&[])
    }
}

/// Settings of routing.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RouteSettings {
    /// Least distance from land of every leg but the harbour legs, metres. Values below
    /// 1 m are taken as 1 m: a way touching the land is not at sea.
    pub clearance_m: f64,
    /// Farthest an end may be from the navigable point it is joined to, metres.
    pub harbour_allowance_m: f64,
    /// Longest way looked for, harbour legs included, metres.
    pub max_length_m: f64,
}

impl Default for RouteSettings {
    /// A clearance of 0.3 nm (555.6 m), a harbour allowance of 3 km and ways up to
    /// 200 nm (370.4 km).
    fn default() -> Self {
        RouteSettings {
            clearance_m: 0.3 * NAUTICAL_MILE_M,
            harbour_allowance_m: 3_000.0,
            max_length_m: 200.0 * NAUTICAL_MILE_M,
        }
    }
}

/// The shortest ways by sea from `from` to each of `to` (one search for them all),
/// `None` where no way exists within `max_length_m`.
///
/// Every leg but the harbour legs keeps at least `clearance_m` from the land. `None`
/// also where an end has no navigable point within `harbour_allowance_m`, lies poleward
/// of 85° (where the local flat frames fail) or is not finite, and for every target when
/// a setting is negative or not finite.
#[must_use]
pub fn sea_routes(
    land: &Land,
    from: LatLon,
    to: &[LatLon],
    settings: &RouteSettings,
) -> Vec<Option<SeaRoute>> {
    let mut routes = vec![None; to.len()];
    let Some(limits) = Limits::new(settings) else {
        return routes;
    };
    if !usable(from) {
        return routes;
    }
    let mut pending: Vec<usize> = (0..to.len())
        .filter(|&k| usable(to[k]) && distance_m(from, to[k]) <= limits.max_length_m)
        .collect();
    let farthest_m = pending
        .iter()
        .map(|&k| distance_m(from, to[k]))
        .fold(0.0, f64::max);
    let mut margin_m = (0.5 * farthest_m)
        .max(MIN_MARGIN_M)
        .max(2.0 * (limits.harbour_m + limits.offset_m));
    while !pending.is_empty() {
        let region = Region::new(
            land,
            from,
            pending.iter().map(|&k| to[k]),
            margin_m,
            &limits,
        );
        let Some(search) = Search::run(&region, from) else {
            break;
        };
        // Each target's way is traced back independently: in parallel.
        let traced: Vec<(usize, Option<SeaRoute>, bool)> = pending
            .par_iter()
            .map(|&k| {
                let (route, settled) = match search.route_to(to[k]) {
                    Reach::Unconnected => (None, true),
                    Reach::NoWay => (
                        None,
                        region.whole || region.exit_bound_m(from, to[k]) > limits.max_length_m,
                    ),
                    Reach::Way(route) => {
                        let settled =
                            region.whole || route.length_m <= region.exit_bound_m(from, to[k]);
                        (Some(route), settled)
                    }
                };
                (k, route, settled)
            })
            .collect();
        pending = traced
            .into_iter()
            .filter_map(|(k, route, settled)| {
                routes[k] = route;
                (!settled).then_some(k)
            })
            .collect();
        margin_m *= 4.0;
    }
    routes
}

/// Ends poleward of this latitude get no way, degrees.
const MAX_LAT_DEG: f64 = 85.0;
/// How far a node's lower bound may pass the shortest length found and still be
/// measured, metres: far more than the rounding of two great-circle distances.
const BOUND_SLACK_M: f64 = 0.01;
/// Least margin of the search box around the port and the targets, metres.
const MIN_MARGIN_M: f64 = 20_000.0;
/// Legs and nodes must clear land by this factor times the clearance, which covers the
/// error of the local flat frames (about 0.1 %) several times over.
const CHECK_FACTOR: f64 = 1.01;
/// Nodes and navigable ends are placed at this factor times the clearance from land,
/// beyond what the checks ask.
const OFFSET_FACTOR: f64 = 1.02;
/// Land edges are cut into pieces no longer than this, each measured in a frame local
/// to it, metres.
const PIECE_M: f64 = 5_000.0;
/// Largest turn of a convex corner covered by one node, degrees.
const MAX_ARC_STEP_DEG: f64 = 45.0;
/// Metres per degree of latitude (and of longitude on the equator).
const M_PER_DEG: f64 = EARTH_MEAN_RADIUS_M * std::f64::consts::PI / 180.0;

/// Settings checked and turned into the distances the search uses, metres.
// Every field is a distance in metres, and says so as the style asks.
#[allow(clippy::struct_field_names)]
struct Limits {
    /// Least clearance of legs and nodes (the clearance with its margin).
    check_m: f64,
    /// Distance from land at which nodes and navigable ends are placed.
    offset_m: f64,
    harbour_m: f64,
    max_length_m: f64,
}

impl Limits {
    fn new(s: &RouteSettings) -> Option<Limits> {
        let ok = |v: f64| v.is_finite() && v >= 0.0;
        if !(ok(s.clearance_m) && ok(s.harbour_allowance_m) && ok(s.max_length_m)) {
            return None;
        }
        let clearance_m = s.clearance_m.max(1.0);
        Some(Limits {
            check_m: clearance_m * CHECK_FACTOR,
            offset_m: clearance_m * OFFSET_FACTOR,
            harbour_m: s.harbour_allowance_m,
            max_length_m: s.max_length_m,
        })
    }
}

fn usable(p: LatLon) -> bool {
    p.lat_deg.is_finite() && p.lon_deg.is_finite() && p.lat_deg.abs() <= MAX_LAT_DEG
}

/// Wraps a longitude difference or a longitude into −180..180 degrees.
fn wrap_deg(lon_deg: f64) -> f64 {
    (lon_deg + 180.0).rem_euclid(360.0) - 180.0
}

/// A plane of longitude and latitude scaled to metres at the origin's latitude:
/// x east, y north. Straight lines in latitude and longitude stay straight in it.
#[derive(Debug, Clone, Copy)]
struct Frame {
    origin: LatLon,
    /// Metres of x per degree of longitude.
    x_per_deg: f64,
}

impl Frame {
    fn new(origin: LatLon) -> Frame {
        Frame {
            origin,
            x_per_deg: M_PER_DEG * origin.lat_deg.to_radians().cos(),
        }
    }

    /// Frame coordinates, metres; longitudes unwrapped to within 180° of the origin.
    fn xy(&self, p: LatLon) -> [f64; 2] {
        [
            wrap_deg(p.lon_deg - self.origin.lon_deg) * self.x_per_deg,
            (p.lat_deg - self.origin.lat_deg) * M_PER_DEG,
        ]
    }

    fn lat_lon(&self, xy: [f64; 2]) -> LatLon {
        LatLon::new(
            self.origin.lat_deg + xy[1] / M_PER_DEG,
            wrap_deg(self.origin.lon_deg + xy[0] / self.x_per_deg),
        )
    }

    /// True east-west metres per metre of x at latitude `lat_deg`.
    fn x_scale(&self, lat_deg: f64) -> f64 {
        lat_deg.to_radians().cos() * M_PER_DEG / self.x_per_deg
    }

    /// Latitude of frame ordinate `y`, degrees.
    fn lat_deg(&self, y: f64) -> f64 {
        self.origin.lat_deg + y / M_PER_DEG
    }
}

/// A piece of a land edge in frame coordinates, with the x scale of its latitude.
struct EdgePiece {
    a: [f64; 2],
    b: [f64; 2],
    x_scale: f64,
}

impl RTreeObject for EdgePiece {
    type Envelope = AABB<[f64; 2]>;

    fn envelope(&self) -> Self::Envelope {
        AABB::from_corners(self.a, self.b)
    }
}

impl EdgePiece {
    /// True distance from the segment `p`–`q` (frame coordinates) to this piece, metres.
    fn distance_m(&self, p: [f64; 2], q: [f64; 2]) -> f64 {
        let local = |v: [f64; 2]| [(v[0] - self.a[0]) * self.x_scale, v[1] - self.a[1]];
        segments_distance(local(p), local(q), [0.0, 0.0], local(self.b))
    }
}

/// Selects the pieces whose boxes come within `reach` (frame metres) of a segment.
struct NearSegment {
    p: [f64; 2],
    q: [f64; 2],
    reach: f64,
}

impl SelectionFunction<EdgePiece> for NearSegment {
    fn should_unpack_parent(&self, envelope: &AABB<[f64; 2]>) -> bool {
        segment_meets_box(
            self.p,
            self.q,
            envelope.lower(),
            envelope.upper(),
            self.reach,
        )
    }

    fn should_unpack_leaf(&self, leaf: &EdgePiece) -> bool {
        self.should_unpack_parent(&leaf.envelope())
    }
}

/// A convex corner's node: a point at sea off the land, where a way may turn.
#[derive(Debug, Clone, Copy)]
struct Node {
    at: LatLon,
    xy: [f64; 2],
}

/// The land and the nodes of the search box, in one frame centred on the port.
struct Region<'a> {
    land: &'a Land,
    frame: Frame,
    /// The box, frame metres: `[x_min, y_min, x_max, y_max]`.
    bounds: [f64; 4],
    /// Which sides of the box are those of the farthest reach of `max_length_m`:
    /// `[west, south, east, north]`.
    at_reach: [bool; 4],
    /// Whether every side is at the farthest reach: no way can leave the box.
    whole: bool,
    pieces: RTree<EdgePiece>,
    /// Least x scale over the box and its edges: frame distances are at most true
    /// distances divided by this.
    min_scale: f64,
    nodes: Vec<Node>,
    limits: &'a Limits,
}

impl<'a> Region<'a> {
    fn new(
        land: &'a Land,
        port: LatLon,
        targets: impl Iterator<Item = LatLon>,
        margin_m: f64,
        limits: &'a Limits,
    ) -> Region<'a> {
        let frame = Frame::new(port);
        let reach = reach_bounds(&frame, limits.max_length_m);
        let mut bounds = [0.0_f64; 4];
        for t in targets {
            let [x, y] = frame.xy(t);
            bounds = [
                bounds[0].min(x),
                bounds[1].min(y),
                bounds[2].max(x),
                bounds[3].max(y),
            ];
        }
        let poleward_deg = frame
            .lat_deg(bounds[1])
            .abs()
            .max(frame.lat_deg(bounds[3]).abs());
        let x_margin =
            margin_m / frame.x_scale((poleward_deg + margin_m / M_PER_DEG).min(MAX_LAT_DEG));
        bounds = [
            bounds[0] - x_margin,
            bounds[1] - margin_m,
            bounds[2] + x_margin,
            bounds[3] + margin_m,
        ];
        let mut at_reach = [false; 4];
        for k in 0..4 {
            let beyond = if k < 2 {
                bounds[k] <= reach[k]
            } else {
                bounds[k] >= reach[k]
            };
            if beyond {
                bounds[k] = reach[k];
                at_reach[k] = true;
            }
        }
        let pad = limits.harbour_m + 2.0 * limits.offset_m + 1_000.0;
        let pieces = land_pieces(land, &frame, bounds, pad);
        let poleward_deg = frame
            .lat_deg(bounds[1] - pad)
            .abs()
            .max(frame.lat_deg(bounds[3] + pad).abs());
        let min_scale = frame.x_scale(poleward_deg.min(90.0)).clamp(1e-3, 1.0);
        let mut region = Region {
            land,
            frame,
            bounds,
            at_reach,
            whole: at_reach.iter().all(|&r| r),
            pieces: RTree::bulk_load(pieces),
            min_scale,
            nodes: Vec::new(),
            limits,
        };
        region.nodes = region.corner_nodes();
        region
    }

    /// Whether the straight leg `p`–`q` (frame coordinates) keeps at least `clearance_m`
    /// from every land edge.
    fn clear(&self, p: [f64; 2], q: [f64; 2], clearance_m: f64) -> bool {
        let near = NearSegment {
            p,
            q,
            reach: clearance_m / self.min_scale,
        };
        !self
            .pieces
            .locate_with_selection_function(near)
            .any(|piece| piece.distance_m(p, q) < clearance_m)
    }

    /// Whether a point is navigable: at sea and at least the checked clearance from land.
    fn navigable(&self, p: LatLon) -> bool {
        let xy = self.frame.xy(p);
        !self.land.is_land(p) && self.clear(xy, xy, self.limits.check_m)
    }

    /// The nodes off every convex corner of the land in the box.
    fn corner_nodes(&self) -> Vec<Node> {
        let [x0, y0, x1, y1] = self.bounds;
        let mut nodes = Vec::new();
        for ring in self.land.rings() {
            let n = ring.len();
            for k in 0..n {
                let v = self.frame.xy(ring[k]);
                if !(x0..=x1).contains(&v[0]) || !(y0..=y1).contains(&v[1]) {
                    continue;
                }
                let a = self.frame.xy(ring[(k + n - 1) % n]);
                let b = self.frame.xy(ring[(k + 1) % n]);
                let scale = self.frame.x_scale(ring[k].lat_deg);
                let to_local = |p: [f64; 2]| [(p[0] - v[0]) * scale, p[1] - v[1]];
                for local in corner_offsets(to_local(a), to_local(b), self.limits.offset_m) {
                    let xy = [v[0] + local[0] / scale, v[1] + local[1]];
                    let at = self.frame.lat_lon(xy);
                    if self.navigable(at) {
                        nodes.push(Node { at, xy });
                    }
                }
            }
        }
        nodes
    }

    /// The nearest navigable point within the harbour allowance of `p`, if any: `p`
    /// itself when it is navigable.
    fn connect(&self, p: LatLon) -> Option<LatLon> {
        if self.navigable(p) {
            return Some(p);
        }
        let limits = self.limits;
        let origin = self.frame.xy(p);
        let scale = self.frame.x_scale(p.lat_deg);
        let near = NearSegment {
            p: origin,
            q: origin,
            reach: (limits.harbour_m + limits.offset_m) / self.min_scale,
        };
        let to_local = |v: [f64; 2]| [(v[0] - origin[0]) * scale, v[1] - origin[1]];
        let edges: Vec<[[f64; 2]; 2]> = self
            .pieces
            .locate_with_selection_function(near)
            .map(|piece| [to_local(piece.a), to_local(piece.b)])
            .collect();
        if edges.is_empty() {
            return None;
        }
        let first_nearest = |candidates: Vec<[f64; 2]>| {
            self.nearest_navigable(p, candidates, |c| {
                [origin[0] + c[0] / scale, origin[1] + c[1]]
            })
        };
        first_nearest(offset_candidates(&edges, limits.offset_m)).or_else(|| {
            first_nearest(offset_line_samples(
                &edges,
                limits.offset_m,
                limits.harbour_m,
            ))
        })
    }

    /// The candidate (local metres about `p`) nearest to `p` that is navigable and
    /// within the harbour allowance.
    fn nearest_navigable(
        &self,
        p: LatLon,
        mut candidates: Vec<[f64; 2]>,
        to_frame: impl Fn([f64; 2]) -> [f64; 2],
    ) -> Option<LatLon> {
        let reach = self.limits.harbour_m;
        candidates.retain(|c| norm(*c) <= reach * 1.01);
        candidates.sort_unstable_by(|a, b| norm(*a).total_cmp(&norm(*b)));
        candidates
            .into_iter()
            .map(|c| self.frame.lat_lon(to_frame(c)))
            .find(|&c| distance_m(p, c) <= reach && self.navigable(c))
    }

    /// A lower bound of the length of any way from `a` to `b` that leaves the box,
    /// metres: from each end to the nearest side it could leave by. Infinite when every
    /// side is at the farthest reach.
    fn exit_bound_m(&self, a: LatLon, b: LatLon) -> f64 {
        self.to_side_m(a) + self.to_side_m(b)
    }

    fn to_side_m(&self, p: LatLon) -> f64 {
        let [x0, y0, x1, y1] = self.bounds;
        let lon = |x: f64| self.frame.origin.lon_deg + x / self.frame.x_per_deg;
        let lon_p = self.frame.origin.lon_deg + wrap_deg(p.lon_deg - self.frame.origin.lon_deg);
        // Distance to a meridian Δλ away: R·asin(cos φ · sin Δλ).
        let to_meridian = |lon_deg: f64| {
            let d = (lon_deg - lon_p).abs().min(180.0).to_radians();
            EARTH_MEAN_RADIUS_M * (p.lat_deg.to_radians().cos() * d.sin()).asin()
        };
        let sides = [
            to_meridian(lon(x0)),
            (p.lat_deg - self.frame.lat_deg(y0)).abs() * M_PER_DEG,
            to_meridian(lon(x1)),
            (self.frame.lat_deg(y1) - p.lat_deg).abs() * M_PER_DEG,
        ];
        sides
            .iter()
            .zip(self.at_reach)
            .filter(|&(_, at_reach)| !at_reach)
            .map(|(&d, _)| d)
            .fold(f64::INFINITY, f64::min)
    }
}

/// The box, frame metres `[x_min, y_min, x_max, y_max]`, outside which every point is
/// farther than `max_length_m` from the frame's origin (latitudes kept within 85°).
fn reach_bounds(frame: &Frame, max_length_m: f64) -> [f64; 4] {
    let origin = frame.origin;
    let dlat_deg = (max_length_m / EARTH_MEAN_RADIUS_M).to_degrees();
    let south = (origin.lat_deg - dlat_deg).max(-MAX_LAT_DEG);
    let north = (origin.lat_deg + dlat_deg).min(MAX_LAT_DEG);
    // A meridian Δλ away is R·asin(cos φ · sin Δλ) from the origin.
    let angle = (max_length_m / EARTH_MEAN_RADIUS_M).min(std::f64::consts::FRAC_PI_2);
    let ratio = angle.sin() / origin.lat_deg.to_radians().cos();
    let dlon_deg = if ratio >= 1.0 {
        179.0
    } else {
        ratio.asin().to_degrees().min(179.0)
    };
    [
        -dlon_deg * frame.x_per_deg,
        (south - origin.lat_deg) * M_PER_DEG,
        dlon_deg * frame.x_per_deg,
        (north - origin.lat_deg) * M_PER_DEG,
    ]
}

/// The land edges within `pad` metres of the box (frame metres), cut into pieces.
fn land_pieces(land: &Land, frame: &Frame, bounds: [f64; 4], pad: f64) -> Vec<EdgePiece> {
    let [x0, y0, x1, y1] = bounds;
    let south = frame.lat_deg(y0 - pad);
    let north = frame.lat_deg(y1 + pad);
    let x_pad = pad / frame.x_scale(south.abs().max(north.abs()).min(89.0));
    let (x0, y0, x1, y1) = (x0 - x_pad, y0 - pad, x1 + x_pad, y1 + pad);
    let mut pieces = Vec::new();
    for ring in land.rings() {
        let n = ring.len();
        for k in 0..n {
            let (a, b) = (frame.xy(ring[k]), frame.xy(ring[(k + 1) % n]));
            // An edge that seems to span half the world crosses the seam opposite the
            // origin, far outside any box.
            let outside = a[0].max(b[0]) < x0
                || a[0].min(b[0]) > x1
                || a[1].max(b[1]) < y0
                || a[1].min(b[1]) > y1
                || (a[0] - b[0]).abs() > 90.0 * frame.x_per_deg;
            if outside {
                continue;
            }
            let scale = frame.x_scale(frame.lat_deg(0.5 * (a[1] + b[1])));
            let length_m = norm([(b[0] - a[0]) * scale, b[1] - a[1]]);
            let count = (length_m / PIECE_M).ceil().max(1.0) as usize;
            for i in 0..count {
                let (t0, t1) = (i as f64 / count as f64, (i + 1) as f64 / count as f64);
                let pa = lerp(a, b, t0);
                let pb = lerp(a, b, t1);
                pieces.push(EdgePiece {
                    a: pa,
                    b: pb,
                    x_scale: frame.x_scale(frame.lat_deg(0.5 * (pa[1] + pb[1]))),
                });
            }
        }
    }
    pieces
}

/// Where a way stands in the search.
enum Reach {
    /// The target has no navigable point within the harbour allowance.
    Unconnected,
    /// No way within the longest length, in this box.
    NoWay,
    /// The shortest way in this box.
    Way(SeaRoute),
}

/// Distances from the port to every node of a region (Dijkstra 1959).
struct Search<'r, 'a> {
    region: &'r Region<'a>,
    from: LatLon,
    /// The port's navigable point, then the region's nodes.
    nodes: Vec<Node>,
    /// Length of the way to each node, from `from`, metres (infinite if none).
    dist_m: Vec<f64>,
    /// The node before each on its way.
    prev: Vec<usize>,
    /// The cosine of each node's latitude.
    cos_lat: Vec<f64>,
    /// The great-circle distance from the first node (the port's navigable point) to
    /// each node, metres.
    from_start_m: Vec<f64>,
}

/// An entry of Dijkstra's queue, smallest distance first.
struct Queued {
    dist_m: f64,
    node: usize,
}

impl PartialEq for Queued {
    fn eq(&self, other: &Self) -> bool {
        self.cmp(other) == Ordering::Equal
    }
}

impl Eq for Queued {}

impl PartialOrd for Queued {
    fn partial_cmp(&self, other: &Self) -> Option<Ordering> {
        Some(self.cmp(other))
    }
}

impl Ord for Queued {
    fn cmp(&self, other: &Self) -> Ordering {
        other.dist_m.total_cmp(&self.dist_m)
    }
}

impl<'r, 'a> Search<'r, 'a> {
    /// Runs the search; `None` when the port has no navigable point within the harbour
    /// allowance.
    fn run(region: &'r Region<'a>, from: LatLon) -> Option<Self> {
        let limits = region.limits;
        let start = region.connect(from)?;
        let mut nodes = Vec::with_capacity(region.nodes.len() + 1);
        nodes.push(Node {
            at: start,
            xy: region.frame.xy(start),
        });
        nodes.extend_from_slice(&region.nodes);
        let n = nodes.len();
        let mut dist_m = vec![f64::INFINITY; n];
        let mut prev: Vec<usize> = (0..n).collect();
        let mut settled = vec![false; n];
        let mut queue = BinaryHeap::new();
        dist_m[0] = distance_m(from, start);
        queue.push(Queued {
            dist_m: dist_m[0],
            node: 0,
        });
        while let Some(Queued { dist_m: d, node: u }) = queue.pop() {
            if settled[u] {
                continue;
            }
            settled[u] = true;
            for v in 0..n {
                if settled[v] {
                    continue;
                }
                let through_m = d + distance_m(nodes[u].at, nodes[v].at);
                if through_m < dist_m[v]
                    && through_m <= limits.max_length_m
                    && region.clear(nodes[u].xy, nodes[v].xy, limits.check_m)
                {
                    dist_m[v] = through_m;
                    prev[v] = u;
                    queue.push(Queued {
                        dist_m: through_m,
                        node: v,
                    });
                }
            }
        }
        let cos_lat: Vec<f64> = nodes
            .iter()
            .map(|n| n.at.lat_deg.to_radians().cos())
            .collect();
        let from_start_m = nodes
            .iter()
            .zip(&cos_lat)
            .map(|(n, &c)| distance_with_cos_m((nodes[0].at, cos_lat[0]), (n.at, c)))
            .collect();
        Some(Search {
            region,
            from,
            nodes,
            dist_m,
            prev,
            cos_lat,
            from_start_m,
        })
    }

    /// The shortest way to `target` in this region.
    fn route_to(&self, target: LatLon) -> Reach {
        let Some(end) = self.region.connect(target) else {
            return Reach::Unconnected;
        };
        let limits = self.region.limits;
        let end_leg_m = distance_m(end, target);
        let end_xy = self.region.frame.xy(end);
        let end_cos = end.lat_deg.to_radians().cos();
        let length_m = |k: usize| {
            self.dist_m[k]
                + distance_with_cos_m((self.nodes[k].at, self.cos_lat[k]), (end, end_cos))
                + end_leg_m
        };
        // No way through node k is shorter than this (the triangle inequality on the
        // sphere, from the first node): nodes whose bound is past the shortest length
        // found so far, by more than rounding, are not measured.
        let end_from_start_m =
            distance_with_cos_m((self.nodes[0].at, self.cos_lat[0]), (end, end_cos));
        let bound_m =
            |k: usize| self.dist_m[k] + (self.from_start_m[k] - end_from_start_m).abs() + end_leg_m;
        let reached = (0..self.nodes.len()).filter(|&k| self.dist_m[k].is_finite());
        // Shortest first (the first node on equal lengths).
        let order = |a: &(f64, usize), b: &(f64, usize)| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1));
        let likely = reached
            .clone()
            .min_by(|&a, &b| bound_m(a).total_cmp(&bound_m(b)));
        let mut shortest: Option<(f64, usize)> = None;
        for k in likely.into_iter().chain(reached.clone()) {
            if shortest.is_some_and(|(best_m, _)| bound_m(k) > best_m + BOUND_SLACK_M) {
                continue;
            }
            let candidate = (length_m(k), k);
            if candidate.0 <= limits.max_length_m
                && shortest.is_none_or(|s| order(&candidate, &s).is_lt())
            {
                shortest = Some(candidate);
            }
        }
        let is_clear = |k: usize| self.region.clear(self.nodes[k].xy, end_xy, limits.check_m);
        let Some(shortest) = shortest else {
            return Reach::NoWay;
        };
        // The shortest is most often clear. When it is not, the others are taken in
        // order of length; a node is measured only once no node measured so far is
        // certainly shorter than every node left (lengths and bounds are not negative,
        // so their bits sort as they do).
        let last = if is_clear(shortest.1) {
            shortest.1
        } else {
            let mut unmeasured: BinaryHeap<Reverse<(u64, usize)>> = reached
                .map(|k| Reverse((bound_m(k).to_bits(), k)))
                .collect();
            let mut measured: BinaryHeap<Reverse<(u64, usize)>> = BinaryHeap::new();
            'next: loop {
                let least_left_m = unmeasured.peek().map(|Reverse((b, _))| f64::from_bits(*b));
                while let Some(&Reverse((l, k))) = measured.peek() {
                    if least_left_m.is_some_and(|b| f64::from_bits(l) >= b - BOUND_SLACK_M) {
                        break;
                    }
                    measured.pop();
                    if k != shortest.1 && is_clear(k) {
                        break 'next k;
                    }
                }
                let Some(Reverse((_, k))) = unmeasured.pop() else {
                    return Reach::NoWay;
                };
                let l = length_m(k);
                if l <= limits.max_length_m {
                    measured.push(Reverse((l.to_bits(), k)));
                }
            }
        };
        Reach::Way(assemble(self.from, &self.way_through(last, end), target))
    }

    /// The navigable part of the way that reaches `end` from node `k`: the nodes from
    /// the port's navigable point to `k`, then `end`.
    fn way_through(&self, k: usize, end: LatLon) -> Vec<LatLon> {
        let mut way = vec![end];
        let mut k = k;
        loop {
            way.push(self.nodes[k].at);
            if k == 0 {
                break;
            }
            k = self.prev[k];
        }
        way.reverse();
        way
    }
}

/// A route from its navigable part and the ends it joins.
fn assemble(from: LatLon, way: &[LatLon], target: LatLon) -> SeaRoute {
    let (first, last) = match (way.first(), way.last()) {
        (Some(&first), Some(&last)) => (first, last),
        _ => (from, target),
    };
    let harbour_legs_m = [distance_m(from, first), distance_m(last, target)];
    let mut points = Vec::with_capacity(way.len() + 2);
    if harbour_legs_m[0] > 0.0 {
        points.push(from);
    }
    points.extend_from_slice(way);
    if harbour_legs_m[1] > 0.0 {
        points.push(target);
    }
    points.dedup();
    let length_m = points.windows(2).map(|w| distance_m(w[0], w[1])).sum();
    SeaRoute {
        points,
        length_m,
        harbour_legs_m,
    }
}

fn lerp(a: [f64; 2], b: [f64; 2], t: f64) -> [f64; 2] {
    [a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1])]
}

fn norm(v: [f64; 2]) -> f64 {
    v[0].hypot(v[1])
}

fn sub(a: [f64; 2], b: [f64; 2]) -> [f64; 2] {
    [a[0] - b[0], a[1] - b[1]]
}

fn add_scaled(a: [f64; 2], u: [f64; 2], t: f64) -> [f64; 2] {
    [a[0] + t * u[0], a[1] + t * u[1]]
}

fn cross(u: [f64; 2], v: [f64; 2]) -> f64 {
    u[0] * v[1] - u[1] * v[0]
}

fn dot(u: [f64; 2], v: [f64; 2]) -> f64 {
    u[0] * v[0] + u[1] * v[1]
}

/// The unit vector along `v`, `None` for a zero vector.
fn unit(v: [f64; 2]) -> Option<[f64; 2]> {
    let n = norm(v);
    (n > 0.0 && n.is_finite()).then(|| [v[0] / n, v[1] / n])
}

/// The point of segment `a`–`b` nearest to `p`.
fn closest_on_segment(p: [f64; 2], a: [f64; 2], b: [f64; 2]) -> [f64; 2] {
    let ab = sub(b, a);
    let len2 = dot(ab, ab);
    if len2 == 0.0 {
        return a;
    }
    lerp(a, b, (dot(sub(p, a), ab) / len2).clamp(0.0, 1.0))
}

fn point_segment_distance(p: [f64; 2], a: [f64; 2], b: [f64; 2]) -> f64 {
    norm(sub(p, closest_on_segment(p, a, b)))
}

/// Least distance between segments `p`–`q` and `a`–`b` in the plane (zero when they
/// cross or touch).
fn segments_distance(p: [f64; 2], q: [f64; 2], a: [f64; 2], b: [f64; 2]) -> f64 {
    let (pq, ab) = (sub(q, p), sub(b, a));
    let sides_ab = cross(pq, sub(a, p)) * cross(pq, sub(b, p));
    let sides_pq = cross(ab, sub(p, a)) * cross(ab, sub(q, a));
    if sides_ab < 0.0 && sides_pq < 0.0 {
        return 0.0;
    }
    // Touching and collinear cases come out as zero here.
    point_segment_distance(p, a, b)
        .min(point_segment_distance(q, a, b))
        .min(point_segment_distance(a, p, q))
        .min(point_segment_distance(b, p, q))
}

/// Whether segment `p`–`q` comes within `reach` of the box `lower`–`upper` (a slab
/// test on the box grown by `reach`; corners count as square, so it may say yes a
/// little too often, never too rarely).
fn segment_meets_box(
    p: [f64; 2],
    q: [f64; 2],
    lower: [f64; 2],
    upper: [f64; 2],
    reach: f64,
) -> bool {
    let (mut t0, mut t1) = (0.0_f64, 1.0_f64);
    for axis in 0..2 {
        let (lo, hi) = (lower[axis] - reach, upper[axis] + reach);
        let d = q[axis] - p[axis];
        if d == 0.0 {
            if p[axis] < lo || p[axis] > hi {
                return false;
            }
            continue;
        }
        let (mut ta, mut tb) = ((lo - p[axis]) / d, (hi - p[axis]) / d);
        if ta > tb {
            std::mem::swap(&mut ta, &mut tb);
        }
        t0 = t0.max(ta);
        t1 = t1.min(tb);
        if t0 > t1 {
            return false;
        }
    }
    true
}

/// The nodes off the corner at the origin between the edges from `a` and to `b` (local
/// metres about the corner): on the outer side of the turn, the corners of the polygon
/// circumscribed about the arc of radius `offset_m` from one edge's normal to the
/// other's, one per 45° of turn or less. The first and last lie on the lines `offset_m`
/// off the two edges. None when an edge has no length.
fn corner_offsets(a: [f64; 2], b: [f64; 2], offset_m: f64) -> Vec<[f64; 2]> {
    let (Some(u1), Some(u2)) = (unit(sub([0.0, 0.0], a)), unit(b)) else {
        return Vec::new();
    };
    let turn = cross(u1, u2).atan2(dot(u1, u2));
    // The outer side is to the right of a left turn, to the left of a right turn.
    let side = if turn >= 0.0 { -1.0 } else { 1.0 };
    let normal_angle = u1[1].atan2(u1[0]) + side * std::f64::consts::FRAC_PI_2;
    let count = (turn.abs() / MAX_ARC_STEP_DEG.to_radians()).ceil().max(1.0);
    let step = turn.abs() / count;
    let radius = offset_m / (0.5 * step).cos();
    (0..count as usize)
        .map(|i| {
            let angle = normal_angle - side * (i as f64 + 0.5) * step;
            [radius * angle.cos(), radius * angle.sin()]
        })
        .collect()
}

/// Points `offset_m` from the edges (local metres about the end, which is the origin)
/// where the nearest navigable point may be: off each edge's nearest point to the end,
/// square to the edge and in line with the end, and where two edges' offset lines
/// cross (the inner corners of narrow bays).
fn offset_candidates(edges: &[[[f64; 2]; 2]], offset_m: f64) -> Vec<[f64; 2]> {
    let mut out = Vec::new();
    let mut lines = Vec::new();
    for &[a, b] in edges {
        let Some(u) = unit(sub(b, a)) else { continue };
        let normal = [-u[1], u[0]];
        let foot = closest_on_segment([0.0, 0.0], a, b);
        out.push(add_scaled(foot, normal, offset_m));
        out.push(add_scaled(foot, normal, -offset_m));
        if let Some(toward) = unit(foot) {
            out.push(add_scaled(foot, toward, offset_m));
            out.push(add_scaled(foot, toward, -offset_m));
        }
        lines.push((add_scaled(a, normal, offset_m), u));
        lines.push((add_scaled(a, normal, -offset_m), u));
    }
    for (i, &(p, u)) in lines.iter().enumerate() {
        for &(q, v) in &lines[i + 1..] {
            let det = cross(u, v);
            if det.abs() > 1e-9 {
                out.push(add_scaled(p, u, cross(sub(q, p), v) / det));
            }
        }
    }
    out
}

/// Points every half offset along the edges' offset lines, within `reach_m` of the end
/// (local metres about the end): a finer search for where the offset lines and the arcs
/// about corners meet.
fn offset_line_samples(edges: &[[[f64; 2]; 2]], offset_m: f64, reach_m: f64) -> Vec<[f64; 2]> {
    let step_m = 0.5 * offset_m;
    let mut out = Vec::new();
    for &[a, b] in edges {
        let Some(u) = unit(sub(b, a)) else { continue };
        let normal = [-u[1], u[0]];
        let length_m = norm(sub(b, a));
        let count = (length_m / step_m).ceil() as usize;
        for i in 0..=count {
            let on_edge = lerp(a, b, i as f64 / count.max(1) as f64);
            if norm(on_edge) > reach_m + offset_m {
                continue;
            }
            out.push(add_scaled(on_edge, normal, offset_m));
            out.push(add_scaled(on_edge, normal, -offset_m));
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    #[test]
    fn segments_distance_in_the_plane() {
        let o = [0.0, 0.0];
        // Crossing, touching at an end, collinear and apart, parallel.
        assert_abs_diff_eq!(
            segments_distance([-1.0, -1.0], [1.0, 1.0], [-1.0, 1.0], [1.0, -1.0]),
            0.0
        );
        assert_abs_diff_eq!(
            segments_distance(o, [1.0, 0.0], [1.0, 0.0], [1.0, 5.0]),
            0.0
        );
        assert_abs_diff_eq!(
            segments_distance(o, [1.0, 0.0], [3.0, 0.0], [4.0, 0.0]),
            2.0
        );
        assert_abs_diff_eq!(
            segments_distance(o, [4.0, 0.0], [1.0, 3.0], [2.0, 3.0]),
            3.0
        );
        // Skew and apart: the nearest pair is an end, (1, 1), and the other segment's
        // inside, (0, 1); then an end, (0, 2), and the inside of a diagonal.
        assert_abs_diff_eq!(
            segments_distance(o, [0.0, 2.0], [1.0, 1.0], [5.0, -3.0]),
            1.0
        );
        assert_abs_diff_eq!(
            segments_distance(o, [0.0, 2.0], [0.0, 4.0], [4.0, 0.0]),
            2.0_f64.sqrt(),
            epsilon = 1e-12
        );
        // A point is a zero-length segment.
        assert_abs_diff_eq!(
            segments_distance([2.0, 1.0], [2.0, 1.0], o, [4.0, 0.0]),
            1.0
        );
    }

    #[test]
    fn segment_meets_box_with_reach() {
        let (lower, upper) = ([0.0, 0.0], [1.0, 1.0]);
        assert!(segment_meets_box(
            [-1.0, 0.5],
            [2.0, 0.5],
            lower,
            upper,
            0.0
        ));
        assert!(!segment_meets_box(
            [-1.0, 1.5],
            [2.0, 1.5],
            lower,
            upper,
            0.4
        ));
        assert!(segment_meets_box(
            [-1.0, 1.5],
            [2.0, 1.5],
            lower,
            upper,
            0.6
        ));
        // A diagonal passing the corner at 0.707 of the box grown by 0.6 on each side.
        assert!(!segment_meets_box(
            [3.0, 0.0],
            [0.0, 3.0],
            lower,
            upper,
            0.3
        ));
        assert!(segment_meets_box([3.0, 0.0], [0.0, 3.0], lower, upper, 0.6));
        // A point.
        assert!(segment_meets_box([1.2, 1.2], [1.2, 1.2], lower, upper, 0.3));
        assert!(!segment_meets_box(
            [1.2, 1.2],
            [1.2, 1.2],
            lower,
            upper,
            0.1
        ));
    }

    #[test]
    fn corner_nodes_lie_on_both_offset_lines_and_outside_the_turn() {
        // A right-angle corner at the origin: from the west along y = 0, then north.
        // Walking east then turning left (north), the outer side is the right (south-east).
        let nodes = corner_offsets([-10.0, 0.0], [0.0, 10.0], 1.0);
        assert_eq!(nodes.len(), 2);
        // The first node is on the line 1 south of the first edge, the last on the
        // line 1 east of the second edge; each is 1/cos(22.5°) from the corner.
        assert_abs_diff_eq!(nodes[0][1], -1.0, epsilon = 1e-12);
        assert_abs_diff_eq!(nodes[1][0], 1.0, epsilon = 1e-12);
        for p in &nodes {
            assert_abs_diff_eq!(norm(*p), 1.0 / 22.5_f64.to_radians().cos(), epsilon = 1e-12);
            assert!(p[0] > 0.0 && p[1] < 0.0, "south-east: {p:?}");
        }
        // The chord between them stays 1 from the corner.
        assert_abs_diff_eq!(
            point_segment_distance([0.0, 0.0], nodes[0], nodes[1]),
            1.0,
            epsilon = 1e-12
        );
        // A straight-through vertex gives one node square to the line; a spike (turn
        // of nearly 180°) gives four.
        let straight = corner_offsets([-10.0, 0.0], [10.0, 0.0], 1.0);
        assert_eq!(straight.len(), 1);
        assert_abs_diff_eq!(norm(straight[0]), 1.0, epsilon = 1e-12);
        assert_eq!(corner_offsets([-10.0, 0.0], [-10.0, 0.1], 1.0).len(), 4);
        assert!(corner_offsets([0.0, 0.0], [1.0, 0.0], 1.0).is_empty());
    }

    #[test]
    fn offset_candidates_include_the_inner_corner_of_a_bay() {
        // A narrow bay: two edges meeting at 30°, the end inside the bay near its head.
        let a = [[0.0, 0.0], [10.0, 0.0]];
        let dir = [30.0_f64.to_radians().cos(), 30.0_f64.to_radians().sin()];
        let b = [[0.0, 0.0], [10.0 * dir[0], 10.0 * dir[1]]];
        let shift = |e: [[f64; 2]; 2], p: [f64; 2]| [sub(e[0], p), sub(e[1], p)];
        let end = [0.5, 0.1];
        let candidates = offset_candidates(&[shift(a, end), shift(b, end)], 1.0);
        // The offset lines inside the bay cross on its bisector, at y = 1 and
        // 1/sin(15°) from the head.
        let half = 15.0_f64.to_radians();
        let expected = sub([half.cos() / half.sin(), 1.0], end);
        assert!(
            candidates.iter().any(|c| norm(sub(*c, expected)) < 1e-9),
            "{expected:?} in {candidates:?}"
        );
    }

    #[test]
    fn frame_round_trip_and_scale() {
        let frame = Frame::new(LatLon::new(60.0, 179.5));
        let p = LatLon::new(60.2, -179.8);
        let xy = frame.xy(p);
        assert!(xy[0] > 0.0, "unwrapped across the antimeridian: {xy:?}");
        let back = frame.lat_lon(xy);
        assert_abs_diff_eq!(back.lat_deg, p.lat_deg, epsilon = 1e-9);
        assert_abs_diff_eq!(back.lon_deg, p.lon_deg, epsilon = 1e-9);
        assert_abs_diff_eq!(frame.x_scale(60.0), 1.0, epsilon = 1e-12);
        // A short east-west step measured with the scale of its latitude agrees with the
        // great-circle distance.
        let (a, b) = (LatLon::new(62.0, 179.0), LatLon::new(62.0, 179.01));
        let dx = (frame.xy(b)[0] - frame.xy(a)[0]) * frame.x_scale(62.0);
        assert_abs_diff_eq!(dx, distance_m(a, b), epsilon = 1e-3);
    }

    #[test]
    fn reach_bounds_hold_everything_within_the_length() {
        let port = LatLon::new(38.44, -123.14);
        let frame = Frame::new(port);
        let max_m = 100_000.0;
        let [x0, y0, x1, y1] = reach_bounds(&frame, max_m);
        // Points exactly max_m away on many bearings are inside the box, and its sides
        // are not much farther.
        for k in 0..72 {
            let p = crate::coast::destination(port, f64::from(k) * 5.0, max_m * 0.999);
            let [x, y] = frame.xy(p);
            assert!(
                (x0..=x1).contains(&x) && (y0..=y1).contains(&y),
                "bearing {}",
                k * 5
            );
        }
        let north = frame.lat_lon([0.0, y1]);
        assert_abs_diff_eq!(distance_m(port, north), max_m, epsilon = 1.0);
    }

    /// A land file (format in `assets/README.md`) with the given rings of (lat, lon).
    fn land_file(rings: &[&[(f64, f64)]]) -> Vec<u8> {
        let rings: Vec<Vec<LatLon>> = rings
            .iter()
            .map(|r| r.iter().map(|&(lat, lon)| LatLon::new(lat, lon)).collect())
            .collect();
        crate::coast::land::write_land_body(&rings)
    }

    /// The way to each target found with the distance bound is the way found by
    /// measuring through every node (the plain definition, written out here): the
    /// shortest whose last leg is clear, the first node on equal lengths.
    #[test]
    fn bounded_search_finds_the_way_measuring_every_node_finds() {
        // A field of small square islands 0.05° apart, the port at its west edge.
        let mut rings: Vec<Vec<(f64, f64)>> = Vec::new();
        for i in 0..6 {
            for j in 0..4 {
                let (lat, lon) = (0.05 * f64::from(j), 0.05 * f64::from(i));
                rings.push(vec![
                    (lat, lon),
                    (lat, lon + 0.02),
                    (lat + 0.02, lon + 0.02),
                    (lat + 0.02, lon),
                ]);
            }
        }
        let rings: Vec<&[(f64, f64)]> = rings.iter().map(Vec::as_slice).collect();
        let land = Land::from_bytes(&land_file(&rings)).expect("valid");
        let settings = RouteSettings::default();
        let limits = Limits::new(&settings).expect("settings");
        let from = LatLon::new(0.06, -0.04);
        let targets: Vec<LatLon> = (0..40)
            .map(|k| {
                let k = f64::from(k);
                LatLon::new(-0.01 + 0.0043 * k, 0.01 + 0.0071 * k)
            })
            .collect();
        let region = Region::new(&land, from, targets.iter().copied(), 50_000.0, &limits);
        let search = Search::run(&region, from).expect("the port is at sea");
        let mut ways = 0;
        for &t in &targets {
            let found = search.route_to(t);
            let Some(end) = region.connect(t) else {
                assert!(matches!(found, Reach::Unconnected), "{t:?}");
                continue;
            };
            let end_xy = region.frame.xy(end);
            let mut best: Option<(f64, usize)> = None;
            for k in 0..search.nodes.len() {
                let length_m =
                    search.dist_m[k] + distance_m(search.nodes[k].at, end) + distance_m(end, t);
                let better = best.is_none_or(|(b, _)| length_m < b);
                if search.dist_m[k].is_finite()
                    && length_m <= limits.max_length_m
                    && better
                    && region.clear(search.nodes[k].xy, end_xy, limits.check_m)
                {
                    best = Some((length_m, k));
                }
            }
            match (found, best) {
                (Reach::Way(route), Some((length_m, k))) => {
                    let way = search.way_through(k, end);
                    assert_eq!(route, assemble(from, &way, t), "{t:?}");
                    assert!((route.length_m - length_m).abs() < 1e-6, "{t:?}");
                    ways += 1;
                }
                (Reach::NoWay, None) => {}
                (found, best) => panic!(
                    "{t:?}: {best:?} but {}",
                    match found {
                        Reach::Way(_) => "a way",
                        Reach::NoWay => "no way",
                        Reach::Unconnected => "unconnected",
                    }
                ),
            }
        }
        // Most targets lie among the islands, and the ways to them turn at corners.
        assert!(ways >= 30, "{ways} ways");
    }

    #[test]
    fn around_a_square_island_the_way_hugs_two_corners() {
        // An island 0.1° square on the equator, ~11.1 km a side; from west to east of it.
        let land = Land::from_bytes(&land_file(&[&[
            (0.0, 0.0),
            (0.0, 0.1),
            (0.1, 0.1),
            (0.1, 0.0),
        ]]))
        .expect("valid");
        let settings = RouteSettings::default();
        let from = LatLon::new(0.03, -0.05);
        let to = LatLon::new(0.03, 0.15);
        let routes = sea_routes(&land, from, &[to], &settings);
        let route = routes[0].as_ref().expect("a way round the island");
        // The way goes round the south side (nearer), turning at two nodes off the
        // south-west and south-east corners.
        assert_eq!(route.points.len(), 4, "{route:?}");
        assert!(route.harbour_legs_m.iter().all(|&m| m <= 0.0), "{route:?}");
        let c = settings.clearance_m * OFFSET_FACTOR;
        let d = |a: LatLon, b: LatLon| distance_m(a, b);
        let sw = LatLon::new(0.0, 0.0);
        let se = LatLon::new(0.0, 0.1);
        // Lower bound: the way round the south corners pushed out by the clearance.
        let lower = d(from, sw) + d(sw, se) + d(se, to);
        assert!(route.length_m > lower, "{} > {lower}", route.length_m);
        assert!(
            route.length_m < lower + 4.0 * c,
            "{} < {lower} + 4c",
            route.length_m
        );
        for p in &route.points[1..3] {
            assert!(p.lat_deg < 0.0, "south of the island: {p:?}");
        }
    }

    #[test]
    fn a_long_peninsula_widens_the_search_until_the_way_round_it_fits() {
        // A mainland north of the equator with a peninsula 0.02° wide reaching 1° (111 km)
        // south; the port and the target lie 11 km apart on either side of its root,
        // so the first search box (20 km of margin) holds no way round it.
        let land = Land::from_bytes(&land_file(&[&[
            (0.0, -1.0),
            (0.0, -0.01),
            (-1.0, -0.01),
            (-1.0, 0.01),
            (0.0, 0.01),
            (0.0, 1.0),
            (1.0, 1.0),
            (1.0, -1.0),
        ]]))
        .expect("valid");
        let settings = RouteSettings::default();
        let from = LatLon::new(-0.05, -0.05);
        let to = LatLon::new(-0.05, 0.05);
        let route = sea_routes(&land, from, &[to], &settings)[0]
            .clone()
            .expect("a way round the tip");
        let (sw, se) = (LatLon::new(-1.0, -0.01), LatLon::new(-1.0, 0.01));
        let via_tip_m = distance_m(from, sw) + distance_m(sw, se) + distance_m(se, to);
        assert!(route.length_m > via_tip_m, "{route:?}");
        assert!(route.length_m < via_tip_m + 4_000.0, "{route:?}");
        // Too far within 150 km.
        let short = RouteSettings {
            max_length_m: 150_000.0,
            ..settings
        };
        assert!(sea_routes(&land, from, &[to], &short)[0].is_none());
    }

    #[test]
    fn ends_on_land_are_joined_by_harbour_legs() {
        let land = Land::from_bytes(&land_file(&[&[
            (0.0, 0.0),
            (0.0, 1.0),
            (1.0, 1.0),
            (1.0, 0.0),
        ]]))
        .expect("valid");
        let settings = RouteSettings::default();
        // 1 km inside the west coast, and 200 m off it.
        let from = LatLon::new(0.5, 0.009);
        let to = LatLon::new(0.6, -0.0018);
        let route = sea_routes(&land, from, &[to], &settings)[0]
            .clone()
            .expect("a way");
        let off = settings.clearance_m * OFFSET_FACTOR;
        assert_abs_diff_eq!(route.harbour_legs_m[0], 1_000.0 + off, epsilon = 20.0);
        assert_abs_diff_eq!(route.harbour_legs_m[1], off - 200.0, epsilon = 20.0);
        assert_eq!(route.points.len(), 4);
        assert_eq!(route.clear_points().len(), 2);
        // Deep inland there is no navigable point within 3 km.
        assert!(sea_routes(&land, LatLon::new(0.5, 0.5), &[to], &settings)[0].is_none());
        assert!(sea_routes(&land, from, &[LatLon::new(0.5, 0.5)], &settings)[0].is_none());
    }

    #[test]
    fn bad_settings_and_positions_give_no_way() {
        let land = Land::default();
        let a = LatLon::new(10.0, 10.0);
        let b = LatLon::new(10.1, 10.0);
        let ok = sea_routes(&land, a, &[b], &RouteSettings::default());
        assert_abs_diff_eq!(
            ok[0].as_ref().expect("open sea").length_m,
            distance_m(a, b),
            epsilon = 1e-6
        );
        let bad = RouteSettings {
            clearance_m: f64::NAN,
            ..RouteSettings::default()
        };
        assert!(sea_routes(&land, a, &[b], &bad)[0].is_none());
        let short = RouteSettings {
            max_length_m: 1_000.0,
            ..RouteSettings::default()
        };
        assert!(sea_routes(&land, a, &[b], &short)[0].is_none());
        let polar = LatLon::new(88.0, 0.0);
        assert!(
            sea_routes(
                &land,
                a,
                &[polar, LatLon::new(f64::NAN, 0.0)],
                &RouteSettings::default()
            )
            .iter()
            .all(Option::is_none)
        );
    }
}
