//! Benchmark: `shelfwind index` end to end against a peer, a short numpy + ecCodes script
//! (`benches/peer/index_eccodes.py`) doing the same on the same files, and GRIB2 decoding
//! against ecCodes. Run with `cargo bench --bench index_peer`.
//!
//! 2,000 two-point segments, 81 steps (10 days, 3-hourly) of 10 m wind on a 0.05° grid of
//! 161 × 161 points, written by our writer and repacked by ecCodes to template 5.3 (complex
//! packing with spatial differencing), 5.0 and 5.42. Both programs are timed as a user
//! runs them, process start and file writing included, best of five. The two tables must
//! agree row for row: the same segments and times, every number within one unit of its
//! last printed decimal (two independent programs may round a tie differently).
//!
//! The peer needs Python with `eccodes` and `numpy` (PyPI): `python3 -m venv
//! benches/peer/.venv && benches/peer/.venv/bin/pip install eccodes numpy`, or name a
//! Python that has them in `SHELFWIND_PEER_PYTHON`. Without one only our figures print.

use chrono::{DateTime, Utc};
use shelfwind::coast::{LatLon, destination};
use shelfwind::wind::{GridField, encode_wind_message, sample_grib2};
use std::path::{Path, PathBuf};
use std::process::Command;
use std::time::Instant;

const SEGMENTS: usize = 2000;
const STEPS: u32 = 81;
const N: usize = 161;
const STEP_DEG: f64 = 0.05;
const NORTH: f64 = 43.0;
const WEST: f64 = -127.0;

/// A coast running north from 37° N near 124.5° W, wobbling, the sea mostly on the left.
fn coast_geojson() -> String {
    let features: Vec<String> = (0..SEGMENTS)
        .map(|k| {
            let f = k as f64 / SEGMENTS as f64;
            let a = LatLon::new(37.0 + 5.5 * f, -124.5 + 0.8 * (f * 40.0).sin() * 0.5);
            let b = destination(a, 350.0 + 40.0 * (f * 17.0).cos(), 3000.0);
            let sea = if k % 9 == 4 { "right" } else { "left" };
            format!(
                r#"{{"type":"Feature","properties":{{"id":"seg-{k:04}","sea":"{sea}"}},"geometry":{{"type":"LineString","coordinates":[[{},{}],[{},{}]]}}}}"#,
                a.lon_deg, a.lat_deg, b.lon_deg, b.lat_deg
            )
        })
        .collect();
    format!(
        r#"{{"type":"FeatureCollection","features":[{}]}}"#,
        features.join(",")
    )
}

/// Smooth, changing winds of up to about 15 m/s, simple packing (template 5.0).
fn wind_grib2() -> Vec<u8> {
    let reference: DateTime<Utc> = "2027-05-01T00:00:00Z".parse().expect("time");
    let mut out = Vec::new();
    for step in 0..STEPS {
        let t = f64::from(step) / 8.0;
        for parameter in [2u8, 3] {
            let values: Vec<f64> = (0..N * N)
                .map(|p| {
                    let (j, i) = ((p / N) as f64, (p % N) as f64);
                    if parameter == 2 {
                        6.0 * (0.05 * i + 0.7 * t).sin() + 2.0 * (0.11 * j).cos()
                    } else {
                        -9.0 * (0.04 * j - 0.5 * t).cos() + 3.0 * (0.07 * i + t).sin()
                    }
                })
                .collect();
            out.extend(encode_wind_message(&GridField {
                lat_north_deg: NORTH,
                lon_west_deg: WEST,
                step_deg: STEP_DEG,
                ni: N,
                nj: N,
                parameter,
                reference,
                step_hours: step * 3,
                values: &values,
            }));
        }
    }
    out
}

fn peer_python() -> Option<PathBuf> {
    let candidates = [
        std::env::var_os("SHELFWIND_PEER_PYTHON").map(PathBuf::from),
        Some(PathBuf::from(concat!(
            env!("CARGO_MANIFEST_DIR"),
            "/benches/peer/.venv/bin/python"
        ))),
        Some(PathBuf::from("python3")),
    ];
    candidates.into_iter().flatten().find(|p| {
        Command::new(p)
            .args(["-c", "import eccodes, numpy"])
            .output()
            .is_ok_and(|o| o.status.success())
    })
}

fn peer_script() -> &'static str {
    concat!(env!("CARGO_MANIFEST_DIR"), "/benches/peer/index_eccodes.py")
}

/// The best of `runs` wall-clock times of a command, seconds.
fn best_time(runs: usize, mut make: impl FnMut() -> Command) -> f64 {
    (0..runs)
        .map(|_| {
            let start = Instant::now();
            let o = make().output().expect("runs");
            assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
            start.elapsed().as_secs_f64()
        })
        .fold(f64::INFINITY, f64::min)
}

fn ours(coast: &Path, wind: &Path, out: &Path) -> Command {
    let mut c = Command::new(env!("CARGO_BIN_EXE_shelfwind"));
    c.arg("index")
        .arg("--coast")
        .arg(coast)
        .arg("--wind")
        .arg(wind)
        .arg("--out")
        .arg(out);
    c
}

/// Rows agree: same id and time, each number within one unit of its last decimal.
/// Returns (rows, rows identical as text).
fn compare(ours: &str, peer: &str) -> (usize, usize) {
    let (mine, theirs): (Vec<&str>, Vec<&str>) = (ours.lines().collect(), peer.lines().collect());
    assert_eq!(mine.len(), theirs.len(), "row counts differ");
    assert_eq!(mine[0], theirs[0], "headers differ");
    let units = [0.0, 0.0, 1e-6, 1e-6, 1e-3, 1e-2, 1e-3];
    let mut same = 0;
    for (k, (x, y)) in mine.iter().zip(&theirs).enumerate().skip(1) {
        same += usize::from(x == y);
        let (fx, fy): (Vec<&str>, Vec<&str>) = (x.split(',').collect(), y.split(',').collect());
        assert_eq!(fx[..2], fy[..2], "row {k}: {x} | {y}");
        assert_eq!(fx[7], fy[7], "row {k}: flag");
        for c in 2..7 {
            let ok = match (fx[c].parse::<f64>(), fy[c].parse::<f64>()) {
                (Ok(p), Ok(q)) if c == 5 => {
                    let apart = (p - q).abs();
                    apart.min(360.0 - apart) <= units[c] * 1.01
                }
                (Ok(p), Ok(q)) => (p - q).abs() <= units[c] * 1.01 + 1e-12 * p.abs(),
                _ => fx[c] == fy[c],
            };
            assert!(ok, "row {k} column {c}: ours {x} | peer {y}");
        }
    }
    (mine.len() - 1, same)
}

/// Our reading of every message of a file (each field decoded in full and sampled at one
/// point), best of five, seconds.
fn our_decode(path: &Path) -> f64 {
    let bytes = std::fs::read(path).expect("file");
    (0..5)
        .map(|_| {
            let start = Instant::now();
            let f = sample_grib2(std::io::Cursor::new(&bytes), &[LatLon::new(40.0, -124.0)])
                .expect("reads");
            std::hint::black_box(f);
            start.elapsed().as_secs_f64()
        })
        .fold(f64::INFINITY, f64::min)
}

fn peer_decode(python: &Path, path: &Path) -> f64 {
    (0..5)
        .map(|_| {
            let o = Command::new(python)
                .arg(peer_script())
                .arg("decode")
                .arg(path)
                .output()
                .expect("runs");
            assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
            String::from_utf8_lossy(&o.stdout)
                .split_whitespace()
                .next()
                .and_then(|s| s.parse().ok())
                .expect("seconds")
        })
        .fold(f64::INFINITY, f64::min)
}

fn main() {
    // SHELFWIND_BENCH_DIR keeps the files there to look at; else a temporary folder.
    let temp = tempfile::tempdir().expect("temp dir");
    let kept = std::env::var_os("SHELFWIND_BENCH_DIR").map(PathBuf::from);
    let dir = kept.as_deref().unwrap_or(temp.path());
    std::fs::create_dir_all(dir).expect("bench folder");
    let coast = dir.join("coast.geojson");
    std::fs::write(&coast, coast_geojson()).expect("coast");
    let simple = dir.join("wind-5.0-ours.grib2");
    std::fs::write(&simple, wind_grib2()).expect("wind");
    let Some(python) = peer_python() else {
        let t = best_time(5, || ours(&coast, &simple, &dir.join("ours.csv")));
        println!(
            "index, {SEGMENTS} segments × {STEPS} steps (template 5.0): {t:.3} s; no peer (see the file's header)"
        );
        return;
    };
    let repack = |name: &str, packing: &str| {
        let out = dir.join(name);
        let o = Command::new(&python)
            .arg(peer_script())
            .args(["repack"])
            .arg(&simple)
            .arg(&out)
            .arg(packing)
            .output()
            .expect("repack");
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
        out
    };
    let complex = repack("wind-5.3.grib2", "grid_complex_spatial_differencing");
    let size = std::fs::metadata(&complex).expect("size").len();
    let (our_csv, peer_csv) = (dir.join("ours.csv"), dir.join("peer.csv"));
    let t_ours = best_time(5, || ours(&coast, &complex, &our_csv));
    let t_peer = best_time(5, || {
        let mut c = Command::new(&python);
        c.arg(peer_script())
            .arg("index")
            .arg(&coast)
            .arg(&complex)
            .arg(&peer_csv);
        c
    });
    let read = |p: &Path| std::fs::read_to_string(p).expect("table");
    let (rows, same) = compare(&read(&our_csv), &read(&peer_csv));
    println!(
        "index end to end, {SEGMENTS} segments × {STEPS} steps, {:.1} MB GRIB2 (template 5.3), {rows} rows: ours {t_ours:.3} s, numpy + ecCodes {t_peer:.3} s: {:.1}× faster; rows agree ({same} identical as text, the rest within one unit of the last decimal)",
        size as f64 / 1e6,
        t_peer / t_ours
    );
    for (packing, file) in [
        ("5.0", simple.clone()),
        ("5.3", complex.clone()),
        ("5.42", repack("wind-5.42.grib2", "grid_ccsds")),
    ] {
        let (a, b) = (our_decode(&file), peer_decode(&python, &file));
        println!(
            "decoding {} messages of {} points, template {packing}: ours {:.1} ms, ecCodes {:.1} ms: {:.2}× ecCodes' speed",
            2 * STEPS,
            N * N,
            a * 1e3,
            b * 1e3,
            b / a
        );
    }
}
