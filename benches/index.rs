//! Benchmark: the upwelling index for 1,000 segments × 1,000 steps, and reading 1,000
//! steps of GRIB2 at those segments' points. Run with `cargo bench --bench index`.
//!
//! A plain timing harness (`harness = false`): it prints the best of a few runs and the
//! process's peak memory, so the figures can be written in the README.

use chrono::{DateTime, Duration, Utc};
use shelfwind::coast::{LatLon, SeaSide, Segment, destination};
use shelfwind::physics::Wind;
use shelfwind::upwelling::{IndexSettings, index_series};
use shelfwind::wind::{SegmentWind, sample_grib2};
use std::hint::black_box;
use std::time::Instant;

#[path = "common/memory.rs"]
mod memory;
use memory::peak_memory_kb;

const SEGMENTS: usize = 1000;
const STEPS: usize = 1000;
const STEPS_I64: i64 = 1000;

fn segments() -> Vec<Segment> {
    (0..SEGMENTS)
        .map(|k| {
            let a = LatLon::new(
                31.5 + 7.0 * k as f64 / SEGMENTS as f64,
                -121.0 - (k % 7) as f64 * 0.3,
            );
            let b = destination(a, 350.0, 3000.0);
            let c = destination(b, 330.0, 4000.0);
            let d = destination(c, 10.0, 2000.0);
            Segment {
                id: format!("seg-{k:04}"),
                points: vec![a, b, c, d],
                sea: SeaSide::Left,
            }
        })
        .collect()
}

fn best_of<T>(runs: usize, mut f: impl FnMut() -> T) -> f64 {
    (0..runs)
        .map(|_| {
            let t = Instant::now();
            black_box(f());
            t.elapsed().as_secs_f64()
        })
        .fold(f64::INFINITY, f64::min)
}

/// Builds a GRIB2 stream of `STEPS` valid times from the ecCodes fixture's first u and
/// v messages, patching the forecast time (section 4, octets 19–22) of each copy.
fn grib_stream() -> Vec<u8> {
    let bytes = std::fs::read(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/fixtures/grib2/simple_hours.grib2"
    ))
    .expect("fixture");
    let (u, v) = (&bytes[0..377], &bytes[377..754]);
    let mut out = Vec::with_capacity(STEPS * 754);
    for step in 0..STEPS as u32 {
        for msg in [u, v] {
            let mut m = msg.to_vec();
            // Section 4 follows sections 0 (16 bytes), 1, 3; find it by walking lengths.
            let mut pos = 16;
            while m[pos + 4] != 4 {
                pos += u32::from_be_bytes([m[pos], m[pos + 1], m[pos + 2], m[pos + 3]]) as usize;
            }
            m[pos + 18..pos + 22].copy_from_slice(&step.to_be_bytes());
            out.extend_from_slice(&m);
        }
    }
    out
}

fn main() {
    let segs = segments();
    let start: DateTime<Utc> = DateTime::parse_from_rfc3339("2027-05-01T00:00:00Z")
        .expect("valid")
        .to_utc();
    let times: Vec<_> = (0..STEPS_I64).map(|k| start + Duration::hours(k)).collect();
    let winds: Vec<SegmentWind> = segs
        .iter()
        .enumerate()
        .map(|(s, seg)| {
            let series: Vec<Wind> = (0..STEPS)
                .map(|t| Wind::from_speed_direction(8.0 + (t % 10) as f64, ((s + t) % 360) as f64))
                .collect();
            SegmentWind {
                source: 0,
                times: times.clone(),
                pieces: vec![series.clone(); seg.pieces().len()],
                midpoint: series,
            }
        })
        .collect();
    let settings = IndexSettings::default();
    let index_s = best_of(5, || {
        segs.iter()
            .zip(&winds)
            .map(|(s, w)| index_series(s, w, &settings).expect("mid-latitude"))
            .collect::<Vec<_>>()
    });
    println!(
        "index: {SEGMENTS} segments × {STEPS} steps ({} piece-steps) in {:.3} s",
        segs.len() * 3 * STEPS,
        index_s
    );

    let stream = grib_stream();
    let points: Vec<LatLon> = segs
        .iter()
        .flat_map(|s| s.pieces().into_iter().map(|p| p.midpoint))
        .collect();
    let grib_s = best_of(3, || {
        sample_grib2(std::io::Cursor::new(&stream), &points).expect("readable")
    });
    println!(
        "grib2: {} messages ({} KB) sampled at {} points in {:.3} s",
        STEPS * 2,
        stream.len() / 1024,
        points.len(),
        grib_s
    );
    if let Some(kb) = peak_memory_kb() {
        println!(
            "peak memory of the whole benchmark process: {} MB",
            kb / 1024
        );
    }
}
