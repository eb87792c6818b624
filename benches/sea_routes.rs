//! Benchmark: ways by sea from one port to 2,000 targets along about 100 nm of the
//! California coast in the bundled land, and to targets far apart.
//! Run with `cargo bench --bench sea_routes`.

use shelfwind::coast::{
    Land, LatLon, RouteSettings, destination, distance_m, initial_bearing_deg, sea_routes,
};
use std::hint::black_box;
use std::time::Instant;

/// The outer coast from the Golden Gate north past Point Arena, as the bundled land's
/// vertices give it (latitude, longitude), past Point Reyes and Drakes Bay; Tomales Bay's
/// narrow inlet is left out, as a drawn coast would cross its mouth. About 210 km (113 nm).
const COAST: [(f64, f64); 17] = [
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
    (38.27777, -122.98623),
    (38.30554, -123.04743),
    (38.44963, -123.11943),
    (38.53643, -123.28863),
    (38.67531, -123.42543),
    (38.90794, -123.70264),
    (39.11105, -123.72064),
];

/// The demo's port, 2 km off the Sonoma coast.
const PORT: (f64, f64) = (38.44, -123.14);

/// `n` targets `offshore_m` off the coast line, evenly spaced along it, each on the
/// side where the land is not.
fn targets_along(land: &Land, coast: &[LatLon], n: usize, offshore_m: f64) -> Vec<LatLon> {
    let legs: Vec<f64> = coast.windows(2).map(|w| distance_m(w[0], w[1])).collect();
    let total_m: f64 = legs.iter().sum();
    (0..n)
        .map(|i| {
            let mut s = total_m * (i as f64 + 0.5) / n as f64;
            let mut k = 0;
            while k + 1 < legs.len() && s > legs[k] {
                s -= legs[k];
                k += 1;
            }
            let along = initial_bearing_deg(coast[k], coast[k + 1]);
            let on_coast = destination(coast[k], along, s);
            let left = destination(on_coast, along - 90.0, offshore_m);
            let probe = destination(on_coast, along - 90.0, 2_000.0);
            if land.is_land(probe) {
                destination(on_coast, along + 90.0, offshore_m)
            } else {
                left
            }
        })
        .collect()
}

fn best_of(runs: usize, mut f: impl FnMut()) -> f64 {
    (0..runs)
        .map(|_| {
            let t = Instant::now();
            f();
            t.elapsed().as_secs_f64()
        })
        .fold(f64::INFINITY, f64::min)
}

fn main() {
    let land = Land::bundled();
    let settings = RouteSettings::default();
    let port = LatLon::new(PORT.0, PORT.1);
    let coast: Vec<LatLon> = COAST.iter().map(|&(a, b)| LatLon::new(a, b)).collect();
    let coast_m: f64 = coast.windows(2).map(|w| distance_m(w[0], w[1])).sum();
    let targets = targets_along(land, &coast, 2_000, 300.0);
    let routes = sea_routes(land, port, &targets, &settings);
    let reached = routes.iter().flatten().count();
    let longest_nm = routes
        .iter()
        .flatten()
        .map(|r| r.length_m / 1852.0)
        .fold(0.0, f64::max);
    let s = best_of(5, || {
        black_box(sea_routes(land, port, black_box(&targets), &settings));
    });
    println!(
        "sea_routes: 2000 targets 300 m off {:.0} nm of coast in {:.1} ms \
         ({reached} reached, longest {longest_nm:.1} nm)",
        coast_m / 1852.0,
        s * 1e3
    );

    let one = [targets[1_000]];
    let s = best_of(20, || {
        black_box(sea_routes(land, port, black_box(&one), &settings));
    });
    println!("sea_routes: one target in {:.2} ms", s * 1e3);

    // Targets far apart: two near ones, one 180 nm down the coast (Monterey Bay), one
    // across the ocean (Hawaii, beyond the longest way) and one inland.
    let far = [
        targets[0],
        targets[1_999],
        LatLon::new(36.80, -121.95),
        LatLon::new(21.3, -157.9),
        LatLon::new(39.0, -121.0),
    ];
    let routes = sea_routes(land, port, &far, &settings);
    let s = best_of(3, || {
        black_box(sea_routes(land, port, black_box(&far), &settings));
    });
    let lengths: Vec<String> = routes
        .iter()
        .map(|r| {
            r.as_ref()
                .map_or("none".into(), |r| format!("{:.1} nm", r.length_m / 1852.0))
        })
        .collect();
    println!(
        "sea_routes: 5 targets far apart in {:.1} ms ({})",
        s * 1e3,
        lengths.join(", ")
    );

    // Among islands: the Aegean holds about 900 of the land's vertices within 3° of
    // Piraeus, ten times the Californian coast's. Targets on a grid over the sea within
    // 150 nm of the port.
    let piraeus = LatLon::new(37.93, 23.60);
    let grid: Vec<LatLon> = (0..60)
        .flat_map(|i| (0..60).map(move |j| (i, j)))
        .map(|(i, j)| LatLon::new(35.5 + 0.08 * f64::from(i), 21.0 + 0.09 * f64::from(j)))
        .filter(|&p| !land.is_land(p) && distance_m(piraeus, p) < 150.0 * 1852.0)
        .take(2_000)
        .collect();
    let routes = sea_routes(land, piraeus, &grid, &settings);
    let s = best_of(3, || {
        black_box(sea_routes(land, piraeus, black_box(&grid), &settings));
    });
    println!(
        "sea_routes: {} targets among the Aegean islands in {:.1} ms ({} reached)",
        grid.len(),
        s * 1e3,
        routes.iter().flatten().count()
    );
}
