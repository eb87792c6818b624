//! Benchmark: loading the bundled land polygons and land-or-sea queries.
//! Run with `cargo bench --bench land`.

use shelfwind::coast::{Land, LatLon, find_sea_side};
use std::hint::black_box;
use std::time::Instant;

fn main() {
    let bytes =
        std::fs::read(concat!(env!("CARGO_MANIFEST_DIR"), "/assets/land-10m.bin")).expect("asset");
    let load_s = (0..5)
        .map(|_| {
            let t = Instant::now();
            black_box(Land::from_bytes(&bytes).expect("valid"));
            t.elapsed().as_secs_f64()
        })
        .fold(f64::INFINITY, f64::min);
    println!(
        "land: parse and index {} KB in {:.1} ms",
        bytes.len() / 1024,
        load_s * 1e3
    );
    let land = Land::from_bytes(&bytes).expect("valid");
    let n = 100_000;
    let t = Instant::now();
    let mut on_land = 0;
    for k in 0..n {
        let p = LatLon::new(
            -60.0 + 120.0 * f64::from(k) / f64::from(n),
            -180.0 + 360.0 * f64::from(k * 7919 % n) / f64::from(n),
        );
        on_land += usize::from(land.is_land(p));
    }
    let per_query_us = t.elapsed().as_secs_f64() / f64::from(n) * 1e6;
    println!("land: {n} point queries, {per_query_us:.2} µs each ({on_land} on land)");
    let line = [
        LatLon::new(39.618, -123.7818),
        LatLon::new(39.7759, -123.8322),
    ];
    let t = Instant::now();
    for _ in 0..1000 {
        black_box(find_sea_side(&land, &line));
    }
    println!(
        "land: sea side of a drawn segment in {:.0} µs",
        t.elapsed().as_secs_f64() * 1e3
    );
}
