//! Ways by sea on real coasts of the bundled land (Natural Earth 1:10m): round a
//! headland, across open water, and none from inland. The expectations were written
//! from the land data's vertices before any route was computed.

use shelfwind::coast::{Land, LatLon, RouteSettings, SeaRoute, distance_m, sea_routes};

/// Metres per degree of latitude on the sphere of `distance_m`.
const M_PER_DEG: f64 = 6_371_008.8 * std::f64::consts::PI / 180.0;

/// The land's edges near a route: within `pad_deg` of the box around its points.
fn edges_near(land: &Land, points: &[LatLon], pad_deg: f64) -> Vec<(LatLon, LatLon)> {
    let lat_min = points
        .iter()
        .map(|p| p.lat_deg)
        .fold(f64::INFINITY, f64::min)
        - pad_deg;
    let lat_max = points
        .iter()
        .map(|p| p.lat_deg)
        .fold(f64::NEG_INFINITY, f64::max)
        + pad_deg;
    let lon_min = points
        .iter()
        .map(|p| p.lon_deg)
        .fold(f64::INFINITY, f64::min)
        - pad_deg;
    let lon_max = points
        .iter()
        .map(|p| p.lon_deg)
        .fold(f64::NEG_INFINITY, f64::max)
        + pad_deg;
    let mut edges = Vec::new();
    for ring in land.rings() {
        for (k, &a) in ring.iter().enumerate() {
            let b = ring[(k + 1) % ring.len()];
            let outside = a.lat_deg.max(b.lat_deg) < lat_min
                || a.lat_deg.min(b.lat_deg) > lat_max
                || a.lon_deg.max(b.lon_deg) < lon_min
                || a.lon_deg.min(b.lon_deg) > lon_max;
            if !outside {
                edges.push((a, b));
            }
        }
    }
    edges
}

/// Distance from `p` to the nearest of `edges`, metres, each edge taken as straight in
/// latitude and longitude (as `Land::is_land` takes it) and measured in a flat frame
/// at `p`'s latitude.
fn distance_to_land_m(p: LatLon, edges: &[(LatLon, LatLon)]) -> f64 {
    let x_per_deg = M_PER_DEG * p.lat_deg.to_radians().cos();
    let xy = |q: LatLon| {
        [
            (q.lon_deg - p.lon_deg) * x_per_deg,
            (q.lat_deg - p.lat_deg) * M_PER_DEG,
        ]
    };
    edges
        .iter()
        .map(|&(a, b)| {
            let (a, b) = (xy(a), xy(b));
            let ab = [b[0] - a[0], b[1] - a[1]];
            let len2 = ab[0] * ab[0] + ab[1] * ab[1];
            let t = if len2 > 0.0 {
                (-(a[0] * ab[0] + a[1] * ab[1]) / len2).clamp(0.0, 1.0)
            } else {
                0.0
            };
            (a[0] + t * ab[0]).hypot(a[1] + t * ab[1])
        })
        .fold(f64::INFINITY, f64::min)
}

/// Checks every leg of the route but the harbour legs at its ends: points every 50 m
/// or closer along each leg (straight in latitude and longitude) are at sea and at least
/// the clearance from every land edge.
fn assert_keeps_clear(land: &Land, route: &SeaRoute, clearance_m: f64) {
    let clear = route.clear_points();
    assert!(!clear.is_empty(), "{route:?}");
    let edges = edges_near(land, &route.points, 0.1);
    let mut least_m = f64::INFINITY;
    for leg in clear.windows(2) {
        let (start, end) = (leg[0], leg[1]);
        let steps = (distance_m(start, end) / 50.0).ceil().max(1.0) as usize;
        for i in 0..=steps {
            let share = i as f64 / steps as f64;
            let p = LatLon::new(
                start.lat_deg + share * (end.lat_deg - start.lat_deg),
                start.lon_deg + share * (end.lon_deg - start.lon_deg),
            );
            assert!(!land.is_land(p), "{p:?} on land, leg {start:?} to {end:?}");
            let off_m = distance_to_land_m(p, &edges);
            assert!(
                off_m >= clearance_m,
                "{p:?} {off_m:.1} m from land, leg {start:?} to {end:?}"
            );
            least_m = least_m.min(off_m);
        }
    }
    // A way that turns round land comes close to the clearance somewhere.
    println!("least distance from land: {least_m:.1} m");
}

fn one_route(from: LatLon, to: LatLon, settings: &RouteSettings) -> Option<SeaRoute> {
    sea_routes(Land::bundled(), from, &[to], settings)
        .pop()
        .expect("one answer per target")
}

/// Point Reyes, California. In the bundled land (1:10m) the headland's south shore runs
/// from Chimney Rock (37.99017 N 122.97543 W, its southernmost vertex) west to the tip
/// (37.99523 N 123.02583 W); Drakes Bay opens to its east, the peninsula's west coast runs
/// north from the tip. A boat in Drakes Bay bound for a spot off the west coast must go
/// south round the headland.
#[test]
fn round_point_reyes_from_drakes_bay() {
    let land = Land::bundled();
    let settings = RouteSettings::default();
    let port = LatLon::new(38.03, -122.94); // in Drakes Bay, near its shore
    let target = LatLon::new(38.12, -123.02); // 4.4 km off the peninsula's west coast
    let chimney = LatLon::new(37.99017, -122.97543);
    let tip = LatLon::new(37.99523, -123.02583);
    assert!(!land.is_land(port) && !land.is_land(target));
    let route = one_route(port, target, &settings).expect("a way round Point Reyes");
    println!("{route:?}");
    let direct_m = distance_m(port, target);
    // At least the way along the headland's shore itself, 1.7 times the straight line.
    let along_shore_m =
        distance_m(port, chimney) + distance_m(chimney, tip) + distance_m(tip, target);
    assert!(
        route.length_m > along_shore_m && route.length_m > direct_m,
        "{route:?}: {direct_m:.0} m straight, {along_shore_m:.0} m along the shore"
    );
    // And not much more: the clearance round the headland's rocks adds under 3 km.
    assert!(route.length_m < along_shore_m + 3_000.0, "{route:?}");
    assert!(
        route.points.iter().any(|p| p.lat_deg < chimney.lat_deg),
        "passes south of the headland: {route:?}"
    );
    assert_eq!(route.points.first(), Some(&port));
    assert_eq!(route.points.last(), Some(&target));
    // The port lies within the clearance of the 1:10m shore: a short harbour leg joins it.
    assert!(
        route.harbour_legs_m[0] < 1_000.0 && route.harbour_legs_m[1] <= 0.0,
        "a harbour leg at the port only: {route:?}"
    );
    assert_keeps_clear(land, &route, settings.clearance_m);
    let sum_m: f64 = route
        .points
        .windows(2)
        .map(|w| distance_m(w[0], w[1]))
        .sum();
    assert!((route.length_m - sum_m).abs() < 1e-6);
}

/// The same headland with ends inside the land's coarse coast: a port on the shore of
/// Drakes Bay (in the land polygon) and a target 280 m off the peninsula's west coast
/// (within the clearance). Each is joined to the sea by a harbour leg under 3 km, and
/// the rest keeps clear.
#[test]
fn harbour_legs_join_ends_in_the_land_or_too_close_to_it() {
    let land = Land::bundled();
    let settings = RouteSettings::default();
    let port = LatLon::new(38.04, -122.96); // 900 m inland of the bay's shore line
    let target = LatLon::new(38.06, -122.987); // 280 m off the west coast line
    assert!(land.is_land(port) && !land.is_land(target));
    let route = one_route(port, target, &settings).expect("a way");
    println!("{route:?}");
    for leg_m in route.harbour_legs_m {
        assert!(leg_m > 0.0 && leg_m <= 3_000.0, "{route:?}");
    }
    assert_keeps_clear(land, &route, settings.clearance_m);
    assert!(route.points.iter().any(|p| p.lat_deg < 37.98785));
}

/// Open water off Sonoma County: from the demo's port 2 km off the coast to spots 20
/// to 40 km away, to the south-west and to the north-west, nothing in between.
#[test]
fn open_water_is_crossed_in_a_straight_line() {
    let land = Land::bundled();
    let settings = RouteSettings::default();
    let port = LatLon::new(38.44, -123.14);
    let targets = [LatLon::new(38.30, -123.30), LatLon::new(38.70, -123.60)];
    let routes = sea_routes(land, port, &targets, &settings);
    for (target, route) in targets.iter().zip(&routes) {
        let route = route.as_ref().expect("a way");
        let direct_m = distance_m(port, *target);
        assert!(direct_m > 19_000.0);
        assert!(
            route.length_m <= 1.01 * direct_m && route.length_m >= direct_m - 1e-6,
            "{route:?}: {direct_m:.0} m straight"
        );
        assert_keeps_clear(land, route, settings.clearance_m);
    }
}

/// Inland California, in the Sierra foothills: no sea within the harbour allowance,
/// neither as a target nor as a port.
#[test]
fn no_way_to_or_from_inland() {
    let land = Land::bundled();
    let settings = RouteSettings::default();
    let inland = LatLon::new(39.0, -121.0);
    let port = LatLon::new(38.44, -123.14);
    let at_sea = LatLon::new(38.30, -123.30);
    let routes = sea_routes(land, port, &[inland, at_sea], &settings);
    assert!(routes[0].is_none(), "{:?}", routes[0]);
    assert!(routes[1].is_some(), "the other target still has its way");
    assert!(one_route(inland, at_sea, &settings).is_none());
}

/// One search for many targets gives each the way a search of its own would, and a
/// target beyond the longest way (Hawaii, 3 900 km) gets none without widening the
/// search to it.
#[test]
fn many_targets_in_one_search_match_one_search_each() {
    let settings = RouteSettings::default();
    let port = LatLon::new(38.44, -123.14);
    let targets = [
        LatLon::new(38.12, -123.02),
        LatLon::new(38.30, -123.30),
        LatLon::new(37.70, -122.60),
        LatLon::new(21.3, -157.9),
        LatLon::new(39.2, -123.85),
    ];
    let together = sea_routes(Land::bundled(), port, &targets, &settings);
    assert!(together[3].is_none());
    for (target, route) in targets.iter().zip(&together) {
        let alone = one_route(port, *target, &settings);
        match (route, &alone) {
            (Some(a), Some(b)) => assert!(
                (a.length_m - b.length_m).abs() < 1.0,
                "{target:?}: {a:?} vs {b:?}"
            ),
            (None, None) => {}
            _ => panic!("{target:?}: {route:?} vs {alone:?}"),
        }
    }
    assert!(together.iter().filter(|r| r.is_some()).count() == 4);
}

/// Sixty targets 300 m off the coast line from the Golden Gate to Bodega Head (the land's
/// own vertices), every one within the clearance, from the demo's port: each has a way,
/// joined to its target by a harbour leg, and every way keeps clear.
#[test]
fn every_way_along_the_marin_and_sonoma_coast_keeps_clear() {
    use shelfwind::coast::{destination, initial_bearing_deg};
    let land = Land::bundled();
    let settings = RouteSettings::default();
    let port = LatLon::new(38.44, -123.14);
    let coast: Vec<LatLon> = [
        (37.82641, -122.52183),
        (37.87328, -122.58303),
        (37.90279, -122.68023),
        (37.94619, -122.75943),
        (38.02605, -122.87463),
        (38.05556, -122.93223),
        (37.98785, -122.99703),
        (38.0191, -123.00063),
        (38.09722, -122.96823),
        (38.22742, -122.97903),
    ]
    .iter()
    .map(|&(lat, lon)| LatLon::new(lat, lon))
    .collect();
    let mut targets = Vec::new();
    for leg in coast.windows(2) {
        let along = initial_bearing_deg(leg[0], leg[1]);
        let length_m = distance_m(leg[0], leg[1]);
        for i in 1..=7 {
            let on_coast = destination(leg[0], along, length_m * f64::from(i) / 8.0);
            let (left, right) = (along - 90.0, along + 90.0);
            let seaward = if land.is_land(destination(on_coast, left, 2_000.0)) {
                right
            } else {
                left
            };
            targets.push(destination(on_coast, seaward, 300.0));
        }
    }
    let routes = sea_routes(land, port, &targets, &settings);
    for (target, route) in targets.iter().zip(&routes) {
        let route = route
            .as_ref()
            .unwrap_or_else(|| panic!("no way to {target:?}"));
        // Targets 300 m off the 1:50m line may lie farther from the finer coast than the
        // clearance: then no harbour leg is needed.
        assert!((0.0..=3_000.0).contains(&route.harbour_legs_m[1]));
        assert!(route.length_m >= distance_m(port, *target));
        assert_keeps_clear(land, route, settings.clearance_m);
    }
}
