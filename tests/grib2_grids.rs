//! Projected, rotated and Gaussian GRIB2 grids against the reference tools:
//! - grid point positions against ecCodes' own `grib_get_data` (Debian ecCodes 2.28),
//!   printed to 9 decimals (`<file>.positions.txt`): within 1 m on the sphere and 10 m on
//!   the ellipsoid;
//! - positions between grid points and the meridian convergence against pyproj 3.7.2
//!   (PROJ 9.5.1), `Proj.get_factors(..).meridian_convergence` (`convergence.txt`);
//! - the winds at points between grid points against an independent computation on
//!   ecCodes' decoded values (bilinear at pyproj's fractional position, turned by
//!   pyproj's convergence), and the upwelling index from the command line against the
//!   published formulas on those winds.
//!
//! Fixtures, dumps and the scripts that made them: `tests/fixtures/grib2/`.

use shelfwind::coast::LatLon;
use shelfwind::wind::{GribGrid, grib2_wind_grids, sample_grib2};
use std::collections::BTreeMap;
use std::path::PathBuf;
use std::process::Command;

#[path = "common/grib_dump.rs"]
mod grib_dump;
use grib_dump::{DumpField, parse_dump};

fn fixture(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/grib2")
        .join(name)
}

/// Metres per degree of latitude on a sphere of 6 371 229 m (used only to turn small
/// angular differences into distances).
const M_PER_DEG: f64 = 6_371_229.0 * std::f64::consts::PI / 180.0;

fn grid_of(name: &str) -> GribGrid {
    let file = std::fs::File::open(fixture(name)).expect("fixture");
    let mut grids = grib2_wind_grids(std::io::BufReader::new(file)).expect("readable grid");
    assert_eq!(grids.len(), 1, "{name}: one grid");
    grids.remove(0)
}

/// `lat lon value` per grid point in data order, from `<file>.positions.txt`.
fn positions(name: &str) -> Vec<(f64, f64)> {
    let text =
        std::fs::read_to_string(fixture(&format!("{name}.positions.txt"))).expect("positions");
    text.lines()
        .filter(|l| !l.starts_with('#') && !l.trim().is_empty())
        .map(|l| {
            let c: Vec<f64> = l
                .split_whitespace()
                .take(2)
                .map(|x| x.parse().expect("number"))
                .collect();
            (c[0], c[1])
        })
        .collect()
}

/// One block of `convergence.txt`.
#[derive(Debug, Default)]
struct Reference {
    grid_relative: bool,
    metres: bool,
    step: (f64, f64),
    /// lat, lon, convergence (degrees), i, j.
    points: Vec<[f64; 5]>,
}

fn references() -> BTreeMap<String, Reference> {
    let text = std::fs::read_to_string(fixture("convergence.txt")).expect("convergence.txt");
    let mut out = BTreeMap::new();
    let mut name = String::new();
    let mut r = Reference::default();
    for line in text.lines().filter(|l| !l.starts_with('#')) {
        let mut words = line.split_whitespace();
        let key = words.next().unwrap_or("");
        let nums: Vec<f64> = words.clone().filter_map(|w| w.parse().ok()).collect();
        match key {
            "FIXTURE" => name = words.next().expect("name").to_string(),
            "UV" => r.grid_relative = words.next() == Some("grid"),
            "UNITS" => r.metres = words.next() == Some("metre"),
            "STEP" => r.step = (nums[0], nums[1]),
            "P" => r.points.push([nums[0], nums[1], nums[2], nums[5], nums[6]]),
            "END" => {
                out.insert(std::mem::take(&mut name), std::mem::take(&mut r));
            }
            _ => {}
        }
    }
    out
}

/// Distance in metres of a grid-space error (rows, columns) on this grid.
fn error_m(r: &Reference, d_row: f64, d_col: f64) -> f64 {
    let metres = (d_row * r.step.1).hypot(d_col * r.step.0);
    // Rotated degrees: a column's length shrinks with the cosine of the rotated latitude
    // (at most 1), so this bounds the distance from above.
    if r.metres { metres } else { metres * M_PER_DEG }
}

const PROJECTED: [(&str, f64); 7] = [
    ("lambert_grid_relative.grib2", 1.0),
    ("lambert_earth_relative.grib2", 1.0),
    ("lambert_2sp_wgs84_grid_relative.grib2", 10.0),
    ("mercator.grib2", 10.0),
    ("polar_stereo_north_grid_relative.grib2", 1.0),
    ("polar_stereo_south_grid_relative.grib2", 1.0),
    ("rotated_ll_grid_relative.grib2", 1.0),
];

/// Every grid point ecCodes lists is placed back on its own row and column.
#[test]
fn grid_points_project_onto_their_rows_and_columns() {
    let refs = references();
    for (name, tolerance_m) in PROJECTED {
        let grid = grid_of(name);
        let reference_block = &refs[name];
        let pos = if name == "lambert_grid_relative.grib2" {
            // The older fixture has no 9-decimal positions: its neighbour with the same
            // grid has them.
            positions("lambert_earth_relative.grib2")
        } else {
            positions(name)
        };
        assert_eq!(pos.len(), grid.len(), "{name}");
        let mut worst: f64 = 0.0;
        for (k, &(lat, lon)) in pos.iter().enumerate() {
            let (row, col) = grid.row_col(k);
            let (fr, fc) = grid
                .fractional_row_col(LatLon::new(lat, lon))
                .expect("placed");
            worst = worst.max(error_m(reference_block, fr - row as f64, fc - col as f64));
        }
        assert!(worst < tolerance_m, "{name}: worst {worst} m");
    }
}

/// Points between grid points: our fractional row and column and our north angle against
/// pyproj's.
#[test]
fn positions_and_convergence_between_points_match_pyproj() {
    let refs = references();
    for (name, tolerance_m) in PROJECTED {
        let grid = grid_of(name);
        let reference_block = &refs[name];
        assert!(reference_block.points.len() >= 10, "{name}");
        assert_eq!(
            grid.uv_relative_to_grid, reference_block.grid_relative,
            "{name}"
        );
        for &[lat, lon, conv_deg, i, j] in &reference_block.points {
            let p = LatLon::new(lat, lon);
            let (row, col) = grid.fractional_row_col(p).expect("placed");
            let e = error_m(reference_block, row - j, col - i);
            assert!(e < tolerance_m, "{name} at {lat},{lon}: {e} m");
            // convergence.txt: the angle from true north to the grid's y axis, clockwise;
            // ours: from the grid's y axis to true north.
            let ours = -grid.north_angle_rad(p).to_degrees();
            assert!(
                (ours - conv_deg).abs() < 1e-5,
                "{name} at {lat},{lon}: ours {ours}°, pyproj {conv_deg}°"
            );
        }
    }
}

/// The wind ecCodes decoded, bilinear at pyproj's fractional position and turned to
/// east and north by pyproj's convergence: (u, v) per dump field time.
fn independent_wind(
    dump: &[DumpField],
    ni: usize,
    [_, _, conv_deg, i, j]: [f64; 5],
    grid_relative: bool,
    valid: chrono::DateTime<chrono::Utc>,
) -> (f64, f64) {
    let at = |short: &str| {
        let f = dump
            .iter()
            .find(|f| f.short_name() == short && f.valid == valid)
            .expect("field");
        let (i0, j0) = (i.floor() as usize, j.floor() as usize);
        let (tx, ty) = (i - i0 as f64, j - j0 as f64);
        let v = |jj: usize, ii: usize| f.points[jj * ni + ii].2.expect("a value");
        (1.0 - tx) * (1.0 - ty) * v(j0, i0)
            + tx * (1.0 - ty) * v(j0, i0 + 1)
            + (1.0 - tx) * ty * v(j0 + 1, i0)
            + tx * ty * v(j0 + 1, i0 + 1)
    };
    let (ug, vg) = (at("10u"), at("10v"));
    if !grid_relative {
        return (ug, vg);
    }
    // Inverse of u_grid = cos(c) u − sin(c) v, v_grid = sin(c) u + cos(c) v.
    let (s, c) = conv_deg.to_radians().sin_cos();
    (c * ug + s * vg, -s * ug + c * vg)
}

/// Earth-relative winds at points between grid points: ours against the independent
/// computation, at every valid time, and against the analytic field.
#[test]
fn winds_between_points_match_the_reference_tools() {
    let refs = references();
    for (name, _) in PROJECTED {
        let grid = grid_of(name);
        let reference_block = &refs[name];
        let dump = parse_dump(name);
        let points: Vec<LatLon> = reference_block
            .points
            .iter()
            .map(|p| LatLon::new(p[0], p[1]))
            .collect();
        let file = std::fs::File::open(fixture(name)).expect("fixture");
        let got = sample_grib2(std::io::BufReader::new(file), &points).expect("readable");
        assert_eq!(got.times.len(), 2, "{name}");
        for (k, reference) in reference_block.points.iter().enumerate() {
            let series = got.points[k].as_ref().expect("covered").to_winds();
            for (t, valid) in got.times.iter().enumerate() {
                let (u, v) = independent_wind(
                    &dump,
                    grid.ni,
                    *reference,
                    reference_block.grid_relative,
                    *valid,
                );
                let ours = series[t];
                assert!(
                    (ours.u_m_s - u).abs() < 2e-4 && (ours.v_m_s - v).abs() < 2e-4,
                    "{name} at {:?} {valid}: ours ({}, {}), reference ({u}, {v})",
                    points[k],
                    ours.u_m_s,
                    ours.v_m_s
                );
                // The analytic field (README), linear in latitude and longitude: bilinear
                // in grid space is close to it inside a 100 km cell.
                let (lat, lon_e) = (reference[0], reference[1].rem_euclid(360.0));
                let h = t as f64 * 6.0;
                let fu = 5.0 + 0.5 * (lat - 35.0) + 0.2 * (lon_e - 235.0) + 0.1 * h;
                let fv = -8.0 + 0.3 * (lon_e - 235.0) - 0.1 * h;
                assert!(
                    (ours.u_m_s - fu).abs() < 0.02 && (ours.v_m_s - fv).abs() < 0.02,
                    "{name} at {lat},{lon_e}: ours ({}, {}), formula ({fu}, {fv})",
                    ours.u_m_s,
                    ours.v_m_s
                );
            }
        }
    }
}

/// The regular Gaussian grid (N80 sub-area): every grid point's row falls on the Gaussian
/// latitude ecCodes gives, and the winds at the grid points are ecCodes' values.
#[test]
fn gaussian_grid_rows_and_values_match_eccodes() {
    let name = "gaussian.grib2";
    let grid = grid_of(name);
    assert_eq!(grid.template, 40);
    let pos = positions(name);
    let points: Vec<LatLon> = pos.iter().map(|&(la, lo)| LatLon::new(la, lo)).collect();
    for (k, p) in points.iter().enumerate() {
        let (row, col) = grid.row_col(k);
        let (fr, fc) = grid.fractional_row_col(*p).expect("placed");
        // Rows are about 1.1° apart: 1 m is 1e-5 of a row.
        assert!(
            (fr - row as f64).abs() < 1e-5,
            "row of {p:?}: {fr} vs {row}"
        );
        assert!(
            (fc - col as f64).abs() < 1e-5,
            "column of {p:?}: {fc} vs {col}"
        );
    }
    let file = std::fs::File::open(fixture(name)).expect("fixture");
    let got = sample_grib2(std::io::BufReader::new(file), &points).expect("readable");
    for field in parse_dump(name) {
        let t = got
            .times
            .iter()
            .position(|t| *t == field.valid)
            .expect("time");
        for (k, p) in field.points.iter().enumerate() {
            let w = got.points[k].as_ref().expect("covered").to_winds()[t];
            let ours = if field.short_name() == "10u" {
                w.u_m_s
            } else {
                w.v_m_s
            };
            let reference = p.2.expect("value");
            assert!(
                (ours - reference).abs() < 1e-4,
                "{k}: {ours} vs {reference}"
            );
        }
    }
}

/// A bit-mapped wind field: a point whose bilinear stencil touches no masked point is
/// interpolated as usual; one that touches masked points takes the nearest valued grid
/// point within 1.5 cells (never a made-up value); one with only masked points near it
/// has no wind.
#[test]
fn bit_mapped_wind_uses_valid_neighbours_or_reports_missing() {
    let name = "lambert_wind_bitmap.grib2";
    let refs = references();
    let reference_block = &refs[name];
    let dump = parse_dump(name);
    let grid = grid_of(name);
    let n = reference_block.points.len();
    // The last three reference points have 0, 1 and 4 masked corners.
    let probes = &reference_block.points[n - 3..];
    let points: Vec<LatLon> = probes.iter().map(|p| LatLon::new(p[0], p[1])).collect();
    let file = std::fs::File::open(fixture(name)).expect("fixture");
    let got = sample_grib2(std::io::BufReader::new(file), &points).expect("readable");
    let t0 = got.times[0];
    let u0 = &dump
        .iter()
        .find(|f| f.short_name() == "10u" && f.valid == t0)
        .expect("u");
    let clean = got.points[0].as_ref().expect("no masked corner").to_winds()[0];
    let (u, _) = independent_wind(&dump, grid.ni, probes[0], false, t0);
    assert!((clean.u_m_s - u).abs() < 2e-4);
    // One masked corner, (i, j) = (8, 6) of the cell at (7.5, 5.5): the three valued
    // corners are equally near (0.71 cells), so the value is their mean, from the values
    // ecCodes decoded.
    let one = got.points[1]
        .as_ref()
        .expect("valued neighbours")
        .to_winds()[0];
    let node = |i: usize, j: usize| u0.points[j * grid.ni + i].2;
    assert!(node(8, 6).is_none(), "the masked corner");
    let mean = [(7, 5), (8, 5), (7, 6)]
        .iter()
        .map(|&(i, j)| node(i, j).expect("valued"))
        .sum::<f64>()
        / 3.0;
    assert!((one.u_m_s - mean).abs() < 1e-4, "{} vs {mean}", one.u_m_s);
    assert!(got.points[2].is_none(), "all corners masked: no wind");
}

/// Unsupported grids keep a clear message naming the template and the ones read.
#[test]
fn space_view_is_refused_by_name() {
    let file = std::fs::File::open(fixture("space_view.grib2")).expect("fixture");
    let err = sample_grib2(std::io::BufReader::new(file), &[LatLon::new(35.0, -120.0)])
        .expect_err("refused")
        .to_string();
    assert!(
        err.starts_with("message 1: 10 m wind on a space view grid (template 3.90) is not supported: the tool reads regular latitude/longitude (template 3.0), rotated"),
        "{err}"
    );
}

/// The command line's index on a coast inside each grid: one north-running segment
/// centred on each reference point (sea to the west), against the published formulas on
/// the independent winds.
#[test]
fn index_on_each_grid_matches_the_formulas_on_the_reference_winds() {
    let refs = references();
    let dir = tempfile::tempdir().expect("temp dir");
    for (name, _) in PROJECTED {
        let reference_block = &refs[name];
        let grid = grid_of(name);
        let dump = parse_dump(name);
        let features: Vec<String> = reference_block
            .points
            .iter()
            .enumerate()
            .map(|(k, p)| {
                format!(
                    r#"{{"type":"Feature","properties":{{"id":"p{k:02}","sea":"left"}},"geometry":{{"type":"LineString","coordinates":[[{lon},{s}],[{lon},{n}]]}}}}"#,
                    lon = (p[1] + 180.0).rem_euclid(360.0) - 180.0,
                    s = p[0] - 0.02,
                    n = p[0] + 0.02
                )
            })
            .collect();
        let coast = dir.path().join("coast.geojson");
        std::fs::write(
            &coast,
            format!(
                r#"{{"type":"FeatureCollection","features":[{}]}}"#,
                features.join(",")
            ),
        )
        .expect("write coast");
        let run = Command::new(env!("CARGO_BIN_EXE_shelfwind"))
            .args(["index", "--coast"])
            .arg(&coast)
            .arg("--wind")
            .arg(fixture(name))
            .output()
            .expect("runs");
        assert!(
            run.status.success(),
            "{name}: {}",
            String::from_utf8_lossy(&run.stderr)
        );
        let text = String::from_utf8(run.stdout).expect("utf-8");
        let times = {
            let mut t: Vec<_> = dump.iter().map(|f| f.valid).collect();
            t.sort();
            t.dedup();
            t
        };
        for line in text.lines().skip(1) {
            let cells: Vec<&str> = line.split(',').collect();
            let k: usize = cells[0][1..].parse().expect("id");
            let valid = chrono::DateTime::parse_from_rfc3339(cells[1])
                .expect("time")
                .to_utc();
            assert!(times.contains(&valid));
            let lat: f64 = cells[2].parse().expect("lat");
            assert!((lat - reference_block.points[k][0]).abs() < 1e-4, "{line}");
            let (u, v) = independent_wind(
                &dump,
                grid.ni,
                reference_block.points[k],
                reference_block.grid_relative,
                valid,
            );
            // Bakun (1973): tau = rho_air C_D |U| U, M_x = tau_y / (rho_w f),
            // UI = 100 M_x sin(270°) for a coast with the sea to the west.
            let tau_y = 1.22 * 1.3e-3 * u.hypot(v) * v;
            let coriolis = 2.0 * 7.292_115e-5 * lat.to_radians().sin();
            let expected = -100.0 * tau_y / (1025.0 * coriolis);
            let got: f64 = cells[6].parse().expect("index");
            assert!(
                (got - expected).abs() < 0.05,
                "{name} {line}: expected {expected}"
            );
        }
    }
}

/// `shelfwind inspect` tells what a projected grid file holds and what will be used.
#[test]
fn inspect_describes_a_projected_grid_file() {
    let o = Command::new(env!("CARGO_BIN_EXE_shelfwind"))
        .arg("inspect")
        .arg(fixture("lambert_2sp_wgs84_grid_relative.grib2"))
        .output()
        .expect("runs");
    assert!(o.status.success());
    let text = String::from_utf8(o.stdout).expect("utf-8");
    for line in [
        "Format: GRIB2 (4 messages)",
        "Issued: 2026-06-15 12:00 UTC",
        "Grid: Lambert conformal grid (template 3.30), 11 × 11 points, ellipsoid a = 6378137.000 m, e = 0.08181919, u/v along the grid's axes",
        "Times: 2026-06-15 12:00 UTC to 2026-06-15 18:00 UTC (2 times, every 6 h)",
        "Field: u wind at 10 m above ground (0/2/2): 2 fields",
        "Uses: 10 m wind (u and v), turned from the grid's axes to true east and north at each point",
    ] {
        assert!(text.lines().any(|l| l == line), "{line:?} in\n{text}");
    }
    // The area holds every grid point ecCodes lists, and not much more (edges are
    // curved on this map, so a bound may lie a little beyond the outermost grid point).
    let area = text
        .lines()
        .find_map(|l| l.strip_prefix("Area: "))
        .expect("area");
    let bounds: Vec<f64> = area
        .split(|c: char| !(c.is_ascii_digit() || c == '.' || c == '-'))
        .filter_map(|w| w.parse().ok())
        .collect();
    let (south, north, west, east) = (bounds[0], bounds[1], bounds[2], bounds[3]);
    let pos = positions("lambert_2sp_wgs84_grid_relative.grib2");
    let lon = |p: &(f64, f64)| (p.1 + 180.0).rem_euclid(360.0) - 180.0;
    let fold = |f: fn(f64, f64) -> f64, first: f64, g: &dyn Fn(&(f64, f64)) -> f64| {
        pos.iter().map(g).fold(first, f)
    };
    let lat_of = |p: &(f64, f64)| p.0;
    let (lo_lat, hi_lat) = (
        fold(f64::min, 90.0, &lat_of),
        fold(f64::max, -90.0, &lat_of),
    );
    let (lo_lon, hi_lon) = (fold(f64::min, 180.0, &lon), fold(f64::max, -180.0, &lon));
    for (bound, node, outward) in [
        (south, lo_lat, -1.0),
        (north, hi_lat, 1.0),
        (west, lo_lon, -1.0),
        (east, hi_lon, 1.0),
    ] {
        let beyond = (bound - node) * outward;
        assert!((-1e-3..0.2).contains(&beyond), "{area}: {bound} vs {node}");
    }
    let o = Command::new(env!("CARGO_BIN_EXE_shelfwind"))
        .arg("inspect")
        .arg(fixture("space_view.grib2"))
        .output()
        .expect("runs");
    let text = String::from_utf8(o.stdout).expect("utf-8");
    assert!(!text.contains("Uses:"), "{text}");
    assert!(text.contains("Does not use: fields on a space view grid (template 3.90)"));
}

/// Damage anywhere in the grid definitions: a flipped byte at every position of the
/// first message (its sections 1–7, the grid template among them) of each projected,
/// rotated and Gaussian fixture, read by the wind reader and by `inspect`: errors or
/// answers, never a panic.
#[test]
fn damaged_grid_sections_never_panic() {
    let p = [LatLon::new(35.0, -120.0), LatLon::new(-50.0, -65.0)];
    for name in PROJECTED
        .iter()
        .map(|(n, _)| *n)
        .chain(["gaussian.grib2", "lambert_wind_bitmap.grib2"])
    {
        let bytes = std::fs::read(fixture(name)).expect("fixture");
        let first_len = u64::from_be_bytes(bytes[8..16].try_into().expect("8 bytes")) as usize;
        for k in 16..first_len.min(bytes.len()) {
            for flip in [0x01, 0x80, 0xff] {
                let mut b = bytes.clone();
                b[k] ^= flip;
                let _ = sample_grib2(std::io::Cursor::new(&b), &p);
                let _ = shelfwind::wind::inspect_grib2(std::io::Cursor::new(&b));
            }
        }
    }
}

/// A real regional forecast with winds along its grid's axes: NCEP's NAM on AWIPS grid
/// 211 (Lambert conformal; `tests/fixtures/grib2/real/README.md`). At every 7th grid
/// point the reader's east and north wind equals ecCodes' decoded grid-relative wind
/// turned by pyproj's meridian convergence (`nam_awips211_10m_wind.reference.txt`).
#[test]
fn a_real_lambert_forecast_gives_earth_relative_winds() {
    let text = std::fs::read_to_string(fixture("real/nam_awips211_10m_wind.reference.txt"))
        .expect("reference");
    let rows: Vec<Vec<f64>> = text
        .lines()
        .filter(|l| !l.starts_with('#'))
        .map(|l| l.split(' ').map(|x| x.parse().expect("number")).collect())
        .collect();
    assert_eq!(rows.len(), 93 * 65 / 7 + 1);
    let points: Vec<LatLon> = rows.iter().map(|r| LatLon::new(r[0], r[1])).collect();
    let file = std::fs::File::open(fixture("real/nam_awips211_10m_wind.grib2")).expect("fixture");
    let got = sample_grib2(std::io::BufReader::new(file), &points).expect("readable");
    assert_eq!(got.times.len(), 1);
    let mut turned = 0;
    for (row, series) in rows.iter().zip(&got.points) {
        let w = series.as_ref().expect("a grid point is covered").to_winds()[0];
        assert!(
            (w.u_m_s - row[5]).abs() < 1e-3 && (w.v_m_s - row[6]).abs() < 1e-3,
            "at {},{}: ours ({}, {}), reference ({}, {})",
            row[0],
            row[1],
            w.u_m_s,
            w.v_m_s,
            row[5],
            row[6]
        );
        turned += usize::from(row[4].abs() > 5.0);
    }
    // Far from 95° W the grid's axes are well off true north: the turning matters.
    assert!(turned > 300, "{turned}");
}

/// Real files from other centres: one ensemble member is told apart, and a Mercator grid
/// across 180° has the area ecCodes gives for its corners (`grib_get_data`: first point
/// 30.419° S 129.906° E, last 79.992° N 10.689° E).
#[test]
fn inspect_tells_real_files_apart() {
    let run = |name: &str| {
        let file = std::fs::File::open(fixture(name)).expect("fixture");
        shelfwind::wind::inspect_grib2(std::io::BufReader::new(file))
            .expect("readable")
            .to_text()
    };
    let member = run("real/ncep_ensemble_member_msl.grib2");
    assert!(
        // grib_ls (ecCodes 2.28): typeOfEnsembleForecast 3, perturbationNumber 5,
        // numberOfForecastsInEnsemble 10.
        member.contains("Field: one ensemble member (a positively perturbed member, perturbation number 5, of 10 in the ensemble): read as a single forecast"),
        "{member}"
    );
    let waves = run("real/nws_mercator_wind_waves.grib2");
    assert!(
        waves.contains(
            "Area: -30.419° to 79.992° latitude, 129.906° to 10.689° longitude (eastward across 180°)"
        ),
        "{waves}"
    );
    assert!(waves.contains("Uses: wave height and period (sea state)"));
}

/// A grid that declares a billion points (a damaged or hostile size) is refused before
/// anything is decoded, in one line; `inspect` says the same.
#[test]
fn a_billion_point_grid_is_refused_quickly() {
    let mut bytes = std::fs::read(fixture("simple_hours.grib2")).expect("fixture");
    // Section 3 of message 1: walk the sections from byte 16.
    let mut pos = 16;
    while bytes[pos + 4] != 3 {
        pos += u32::from_be_bytes(bytes[pos..pos + 4].try_into().expect("4 bytes")) as usize;
    }
    let (ni, nj) = (40_000_u32, 25_000_u32);
    bytes[pos + 6..pos + 10].copy_from_slice(&(ni * nj).to_be_bytes());
    bytes[pos + 30..pos + 34].copy_from_slice(&ni.to_be_bytes());
    bytes[pos + 34..pos + 38].copy_from_slice(&nj.to_be_bytes());
    let err = sample_grib2(std::io::Cursor::new(&bytes), &[LatLon::new(35.0, -120.0)])
        .expect_err("refused")
        .to_string();
    assert_eq!(
        err,
        "message 1: grid of 40000 × 25000 = 1000000000 points is larger than the tool reads (at most 100000000; the largest global forecasts have about 7 million)"
    );
    let text = shelfwind::wind::inspect_grib2(std::io::Cursor::new(&bytes))
        .expect("readable")
        .to_text();
    assert!(
        text.contains("Grid: grid of 40000 × 25000 = 1000000000 points is larger"),
        "{text}"
    );
}
