//! The GRIB2 importer against files written by ecCodes (PyPI `eccodes` 2.50) and the
//! values ecCodes' own `grib_get_data` (Debian ecCodes 2.28) prints for them.
//! Fixtures, their dumps and the script that made them: `tests/fixtures/grib2/`.

use chrono::DateTime;
use shelfwind::coast::LatLon;
use shelfwind::wind::{Grib2Samples, sample_grib2};
use std::path::PathBuf;

#[path = "common/grib_dump.rs"]
mod grib_dump;
use grib_dump::{DumpField, parse_dump};

fn fixture(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/grib2")
        .join(name)
}

fn sample(name: &str, points: &[LatLon]) -> Result<Grib2Samples, String> {
    let file = std::fs::File::open(fixture(name)).expect("fixture exists");
    sample_grib2(std::io::BufReader::new(file), points).map_err(|e| e.to_string())
}

/// Samples the file at every grid node of its first wind field and compares u and v at
/// every valid time with ecCodes' dump (same values within the float32 rounding).
fn check_against_dump(name: &str, expected_times: usize) {
    let dump = parse_dump(name);
    let wind: Vec<&DumpField> = dump
        .iter()
        .filter(|f| f.short_name() == "10u" || f.short_name() == "10v")
        .collect();
    let nodes: Vec<LatLon> = wind[0]
        .points
        .iter()
        .map(|p| LatLon::new(p.0, p.1))
        .collect();
    let got = sample(name, &nodes).expect("readable");
    assert_eq!(got.times.len(), expected_times, "{name}: valid times");
    let mut compared = 0;
    for field in &wind {
        let t = got
            .times
            .iter()
            .position(|t| *t == field.valid)
            .expect("valid time decoded");
        for (k, p) in field.points.iter().enumerate() {
            let series = got.points[k]
                .as_ref()
                .expect("grid node is covered")
                .to_winds();
            let w = series[t];
            let value = if field.short_name() == "10u" {
                w.u_m_s
            } else {
                w.v_m_s
            };
            let reference = p.2.expect("no missing values in wind fields");
            assert!(
                (value - reference).abs() < 1e-4,
                "{name} {} {} at {},{}: ours {value}, ecCodes {reference}",
                field.short_name(),
                field.valid,
                p.0,
                p.1
            );
            compared += 1;
        }
    }
    assert_eq!(compared, expected_times * 2 * nodes.len());
}

#[test]
fn simple_packing_north_to_south_0_360_hours_with_other_parameter() {
    check_against_dump("simple_hours.grib2", 3);
}

#[test]
fn complex_spatial_differencing_south_to_north_negative_longitudes_minutes() {
    check_against_dump("complex_sd_minutes_s2n.grib2", 3);
    let got =
        sample("complex_sd_minutes_s2n.grib2", &[LatLon::new(35.0, -120.0)]).expect("readable");
    let stamps: Vec<String> = got.times.iter().map(DateTime::to_rfc3339).collect();
    // 2026-06-15 12:00 UTC + 0, 180, 360 minutes (Code Table 4.4 unit 0 = minute).
    assert_eq!(
        stamps,
        [
            "2026-06-15T12:00:00+00:00",
            "2026-06-15T15:00:00+00:00",
            "2026-06-15T18:00:00+00:00"
        ]
    );
}

#[test]
fn ccsds_packing() {
    check_against_dump("ccsds_hours.grib2", 2);
}

#[test]
fn complex_packing() {
    check_against_dump("complex_hours.grib2", 1);
}

#[test]
fn jpeg2000_packing() {
    check_against_dump("jpeg_hours.grib2", 1);
}

#[test]
fn png_packing() {
    check_against_dump("png_hours.grib2", 1);
}

#[test]
fn one_message_carrying_u_and_v() {
    check_against_dump("uv_one_message.grib2", 1);
}

/// A 2 m temperature in IEEE packing (5.4) and a field with bit-map indicator 254 sit
/// between the wind messages: the wind is read all the same.
#[test]
fn undecodable_messages_of_other_parameters_are_skipped() {
    check_against_dump("other_param_undecodable.grib2", 2);
}

/// Between grid nodes the interpolation is bilinear in lon/lat; the fixture's wind is
/// linear in both (README formula), so a point between nodes gets the formula's value.
#[test]
fn bilinear_between_nodes_follows_the_analytic_field() {
    let got = sample("simple_hours.grib2", &[LatLon::new(36.3, -121.7)]).expect("readable");
    let w = got.points[0].as_ref().expect("covered").to_winds()[1];
    let (lat, lon_e, h) = (36.3, 360.0 - 121.7, 6.0);
    let u = 5.0 + 0.5 * (lat - 35.0) + 0.2 * (lon_e - 235.0) + 0.1 * h;
    let v = -8.0 + 0.3 * (lon_e - 235.0) - 0.1 * h;
    assert!(
        (w.u_m_s - u).abs() < 2e-4 && (w.v_m_s - v).abs() < 2e-4,
        "{w:?} vs {u}, {v}"
    );
    let outside = sample("simple_hours.grib2", &[LatLon::new(45.0, -121.0)]).expect("readable");
    assert!(outside.points[0].is_none());
}

#[test]
fn damaged_and_unsupported_files_give_clear_errors() {
    let p = [LatLon::new(35.0, -120.0)];
    let cases = [
        (
            "no_10m_wind.grib2",
            "no 10 m wind in the file: expected 10 m u and v (discipline 0, category 2, numbers 2 and 3, surface 103 at 10 m); found 0/0/0 at surface 103, 0/2/2 at surface 100, 0/2/3 at surface 100 (discipline/category/number)",
        ),
        (
            "space_view.grib2",
            "message 1: 10 m wind on a space view grid (template 3.90) is not supported: the tool reads regular latitude/longitude (template 3.0), rotated latitude/longitude (3.1), Mercator (3.10), polar stereographic (3.20), Lambert conformal (3.30) and regular Gaussian (3.40) grids",
        ),
        (
            "truncated.grib2",
            "message 1: cut short: it declares 377 bytes but the file ends 271 bytes after its start (truncated download?)",
        ),
        (
            "garbage.grib2",
            "no GRIB message found: expected a GRIB2 file",
        ),
        (
            "edition1.grib",
            "message 1: is GRIB edition 1: only GRIB edition 2 is read (convert the file to GRIB2)",
        ),
        ("empty.grib2", "the file is empty: expected GRIB2 messages"),
    ];
    for (name, message) in cases {
        assert_eq!(sample(name, &p).unwrap_err(), message, "{name}");
    }
}

/// Every prefix and a flipped byte at every position of a real file: errors, never a
/// panic (the decoder runs behind a guard, and our own scanner checks every length).
#[test]
fn any_damage_is_an_error_not_a_panic() {
    let bytes = std::fs::read(fixture("uv_one_message.grib2")).expect("fixture");
    let p = [LatLon::new(35.0, -120.0)];
    for cut in 0..bytes.len() {
        let r = sample_grib2(std::io::Cursor::new(&bytes[..cut]), &p);
        assert!(r.is_err() || cut == bytes.len(), "prefix {cut} accepted");
    }
    for k in 0..bytes.len() {
        let mut b = bytes.clone();
        b[k] ^= 0xA5;
        let _ = sample_grib2(std::io::Cursor::new(&b), &p);
    }
}
