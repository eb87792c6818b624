//! The wave reader against files written by ecCodes (PyPI `eccodes` 2.50) and the values
//! ecCodes' own `grib_get_data` (Debian ecCodes 2.28) prints for them, and wave columns
//! in CSV point series. Fixtures, their dumps and the script that made them (all
//! synthetic): `tests/fixtures/grib2/`.

use chrono::{DateTime, Utc};
use shelfwind::coast::LatLon;
use shelfwind::progress::Progress;
use shelfwind::wind::{
    Grib2Contents, Wave, WaveSamples, WindFileError, grib2_contents, read_csv_series, sample_grib2,
    sample_waves_grib2, sample_waves_grib2_sized,
};
use std::path::PathBuf;

#[path = "common/grib_dump.rs"]
mod grib_dump;
use grib_dump::{DumpField, parse_dump};

fn fixture(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/grib2")
        .join(name)
}

fn waves(name: &str, points: &[LatLon]) -> Result<Option<WaveSamples>, String> {
    let file = std::fs::File::open(fixture(name)).expect("fixture exists");
    sample_waves_grib2(std::io::BufReader::new(file), points, &Progress::new())
        .map_err(|e| e.to_string())
}

fn contents(name: &str) -> Result<Grib2Contents, String> {
    let file = std::fs::File::open(fixture(name)).expect("fixture exists");
    grib2_contents(std::io::BufReader::new(file)).map_err(|e| e.to_string())
}

/// The fields of a dump with parameter `number` (discipline 10, category 0), by time.
fn by_number(dump: &[DumpField], number: u8) -> Vec<&DumpField> {
    dump.iter()
        .filter(|f| f.meta["discipline"] == "10" && f.number() == number)
        .collect()
}

/// The nearest-sea rule written out independently over the dump: every sea node (1°
/// grid, so grid steps are degrees) within 1.5 steps, nearest first, ties averaged.
fn nearest_sea(field: &DumpField, lat: f64, lon: f64) -> Option<f64> {
    let mut sea: Vec<(f64, f64)> = field
        .points
        .iter()
        .filter_map(|p| {
            let dlon = ((p.1 - lon).rem_euclid(360.0) + 180.0).rem_euclid(360.0) - 180.0;
            let d = (p.0 - lat).hypot(dlon);
            p.2.filter(|_| d <= 1.5 + 1e-9).map(|v| (d, v))
        })
        .collect();
    sea.sort_by(|a, b| a.0.total_cmp(&b.0));
    let nearest = sea.first()?.0;
    let tied: Vec<f64> = sea
        .iter()
        .take_while(|s| s.0 - nearest < 1e-6)
        .map(|s| s.1)
        .collect();
    Some(tied.iter().sum::<f64>() / tied.len() as f64)
}

/// Checks every node of the grid against the dump: sea nodes get ecCodes' value within
/// the packing's tolerance; masked nodes get the nearest-sea value or none.
fn check_nodes(
    name: &str,
    height: impl Fn(f64, f64, usize) -> Option<f64>,
    height_tolerance: f64,
    period_number: u8,
) {
    let dump = parse_dump(name);
    let grid = &by_number(&dump, period_number)[0];
    let nodes: Vec<LatLon> = grid.points.iter().map(|p| LatLon::new(p.0, p.1)).collect();
    let got = waves(name, &nodes).expect("readable").expect("has waves");
    let periods = by_number(&dump, period_number);
    assert_eq!(
        got.times.len(),
        periods.len(),
        "{name}: one time per period field"
    );
    let mut compared = 0;
    for (t, period_field) in periods.iter().enumerate() {
        assert_eq!(got.times[t], period_field.valid);
        for (k, p) in period_field.points.iter().enumerate() {
            let want_h = height(p.0, p.1, t);
            let want_t = p.2.or_else(|| nearest_sea(period_field, p.0, p.1));
            match (&got.points[k], want_h) {
                (None, None) => {}
                (Some(series), Some(h)) => {
                    let w = series[t];
                    assert!(
                        (w.height_m - h).abs() < height_tolerance,
                        "{name} {p:?} t{t}: height ours {} ecCodes {h}",
                        w.height_m
                    );
                    let want_t = want_t.expect("a period where there is a height");
                    let got_t = w.period_s.expect("a period");
                    assert!(
                        (got_t - want_t).abs() < period_field.tolerance(),
                        "{name} {p:?}: period ours {got_t} ecCodes {want_t}"
                    );
                    compared += 1;
                }
                (ours, want) => panic!("{name} {p:?} t{t}: ours {ours:?}, expected {want:?}"),
            }
        }
    }
    assert!(compared > 80 * periods.len(), "{name}: {compared} compared");
}

/// Simple packing, north to south, 0–360: combined height (10/0/3) and primary wave
/// mean period (10/0/11), value by value; a wave direction packed in 5.4 (which the
/// decoder crate cannot decode) is skipped.
#[test]
fn simple_packing_values_match_the_reference_dump() {
    let dump = parse_dump("waves_simple_land.grib2");
    let swh = by_number(&dump, 3);
    for f in &swh {
        assert_eq!(f.meta["shortName"], "swh");
        assert_eq!(f.meta["numberOfMissing"], "16");
    }
    assert_eq!(by_number(&dump, 11)[0].meta["shortName"], "perpw");
    assert!(swh[0].tolerance() < 1e-4, "16-bit packing of a few metres");
    check_nodes(
        "waves_simple_land.grib2",
        |lat, lon, t| {
            swh[t]
                .at(lat, lon)
                .or_else(|| nearest_sea(swh[t], lat, lon))
        },
        swh[0].tolerance(),
        11,
    );
}

/// Complex packing with spatial differencing (5.3, order 2), south to north, negative
/// longitudes; no combined height, so wind-sea (10/0/5) and swell (10/0/8) combine as
/// root-sum-square; the swell shares the wind sea's bit map through bit-map indicator
/// 254 in the same message; the period is the wind waves' mean period (10/0/6).
#[test]
fn complex_packing_with_a_shared_bit_map_combines_wind_sea_and_swell() {
    let name = "waves_complex_sd_s2n.grib2";
    let text = std::fs::read_to_string(fixture(&format!("{name}.dump.txt"))).expect("dump");
    assert!(text.contains("bitmap_indicator=254"));
    assert!(text.contains("orderOfSpatialDifferencing=2"));
    let dump = parse_dump(name);
    let (wind_sea, swell) = (by_number(&dump, 5), by_number(&dump, 8));
    assert_eq!(wind_sea.len(), 2);
    check_nodes(
        name,
        |lat, lon, t| {
            let value = |f: &DumpField| f.at(lat, lon).or_else(|| nearest_sea(f, lat, lon));
            Some(value(wind_sea[t])?.hypot(value(swell[t])?))
        },
        wind_sea[0].tolerance() + swell[0].tolerance(),
        6,
    );
}

/// Wind and waves in one file: each reader takes its own fields.
#[test]
fn one_file_with_wind_and_waves_serves_both_readers() {
    let name = "wind_and_waves.grib2";
    let dump = parse_dump(name);
    let p = [LatLon::new(33.0, -122.0)];
    let w = waves(name, &p).expect("readable").expect("has waves");
    let swh = by_number(&dump, 3);
    assert_eq!(w.times, swh.iter().map(|f| f.valid).collect::<Vec<_>>());
    let series = w.points[0].as_ref().expect("sea");
    for (t, f) in swh.iter().enumerate() {
        let want = f.at(33.0, 238.0).expect("sea node");
        assert!((series[t].height_m - want).abs() < f.tolerance());
        assert_eq!(series[t].period_s, None, "the file has no period");
    }
    let file = std::fs::File::open(fixture(name)).expect("fixture");
    let wind = sample_grib2(file, &p).expect("wind read past the wave messages");
    assert_eq!(wind.times, w.times);
    let u = dump
        .iter()
        .find(|f| f.meta["shortName"] == "10u")
        .expect("10u");
    let got = wind.points[0].as_ref().expect("covered").to_winds()[0].u_m_s;
    assert!((got - u.at(33.0, 238.0).expect("value")).abs() < 1e-4);
}

/// Near the masked land block (lat ≥ 36 N, lon ≥ 242 E, invented): bilinear in open
/// water, the nearest sea value where a bilinear corner is land, nothing deep inland.
#[test]
fn points_near_the_mask_take_the_nearest_sea_value() {
    let dump = parse_dump("waves_simple_land.grib2");
    let swh = by_number(&dump, 3)[0];
    let points = [
        // open water between nodes: bilinear, which reproduces the linear field
        LatLon::new(33.5, -121.75),
        // corners (36, 242) and (36, 243) are land; nearest sea node (35, 242), 0.67 away
        LatLon::new(35.6, -117.7),
        // every corner land; nearest sea (36, 241) at 1.14, then (35, 242) at 1.30
        LatLon::new(36.3, 242.1),
        // every corner land, nearest sea 1.58 cells away: none
        LatLon::new(36.5, -117.5),
        // 3 cells inland (3 rows from the sea at 35 N, 4 columns from 241 E): none
        LatLon::new(38.0, -115.0),
        // outside the grid: none
        LatLon::new(45.0, -121.0),
    ];
    let got = waves("waves_simple_land.grib2", &points)
        .expect("readable")
        .expect("has waves");
    let height = |k: usize| got.points[k].as_ref().map(|s| s[0].height_m);
    let formula = |lat: f64, lon_e: f64| 1.2 + 0.15 * (lat - 31.0) + 0.05 * (lon_e - 235.0);
    let open = height(0).expect("sea");
    assert!((open - formula(33.5, 238.25)).abs() < 1e-4, "{open}");
    let near = height(1).expect("nearest sea");
    assert!(
        (near - swh.at(35.0, 242.0).expect("sea")).abs() < 1e-4,
        "{near}"
    );
    assert!(
        (near - formula(35.6, 242.3)).abs() > 0.05,
        "not an interpolation"
    );
    let near = height(2).expect("nearest sea");
    assert!(
        (near - swh.at(36.0, 241.0).expect("sea")).abs() < 1e-4,
        "{near}"
    );
    assert_eq!(height(3), None);
    assert_eq!(height(4), None);
    assert_eq!(height(5), None);
    // The period follows the same rule on its own field.
    let perpw = by_number(&dump, 11)[0];
    let period = got.points[1].as_ref().expect("sea")[0].period_s;
    assert!((period.expect("period") - perpw.at(35.0, 242.0).expect("sea")).abs() < 1e-3);
}

#[test]
fn contents_tell_wind_from_waves() {
    let both = Grib2Contents {
        wind: true,
        waves: true,
        members: Vec::new(),
    };
    let cases = [
        ("simple_hours.grib2", true, false),
        ("other_param_undecodable.grib2", true, false),
        ("no_10m_wind.grib2", false, false),
        ("waves_simple_land.grib2", false, true),
        ("waves_complex_sd_s2n.grib2", false, true),
        ("wind_and_waves.grib2", true, true),
    ];
    for (name, wind, waves) in cases {
        assert_eq!(
            contents(name).expect("readable"),
            Grib2Contents {
                wind,
                waves,
                members: Vec::new()
            },
            "{name}"
        );
    }
    assert_eq!(contents("wind_and_waves.grib2"), Ok(both));
    assert_eq!(
        waves("simple_hours.grib2", &[LatLon::new(35.0, -120.0)]),
        Ok(None)
    );
}

#[test]
fn damaged_files_give_clear_errors() {
    let truncated = "message 2: cut short: it declares 566 bytes but the file ends 361 bytes after its start (truncated download?)";
    let p = [LatLon::new(35.0, -120.0)];
    assert_eq!(waves("waves_truncated.grib2", &p).unwrap_err(), truncated);
    assert_eq!(contents("waves_truncated.grib2").unwrap_err(), truncated);
    let cases = [
        (
            "garbage.grib2",
            "no GRIB message found: expected a GRIB2 file",
        ),
        ("empty.grib2", "the file is empty: expected GRIB2 messages"),
        (
            "edition1.grib",
            "message 1: is GRIB edition 1: only GRIB edition 2 is read (convert the file to GRIB2)",
        ),
    ];
    for (name, message) in cases {
        assert_eq!(waves(name, &p).unwrap_err(), message, "{name}");
        assert_eq!(contents(name).unwrap_err(), message, "{name}");
    }
    let e = waves("lambert_grid_relative.grib2", &p);
    assert_eq!(
        e,
        Ok(None),
        "a wind-only Lambert file has no wave field to refuse"
    );
}

/// Every prefix and a flipped byte at every position: errors, never a panic.
#[test]
fn any_damage_is_an_error_not_a_panic() {
    let bytes = std::fs::read(fixture("waves_complex_sd_s2n.grib2")).expect("fixture");
    let p = [LatLon::new(35.0, -120.0), LatLon::new(35.6, -117.7)];
    // Whole messages end at these offsets (RAW lines of the dump): such a prefix, or
    // one with up to three bytes of the next "GRIB" (bytes between messages are
    // skipped), is a shorter valid file.
    let ends = [499, 817, 1316];
    for cut in 1..bytes.len() {
        let r = sample_waves_grib2(&bytes[..cut], &p, &Progress::new());
        let whole = ends.iter().any(|&e| (e..e + 4).contains(&cut));
        assert!(r.is_err() || whole, "prefix {cut} accepted");
    }
    for k in 0..bytes.len() {
        let mut b = bytes.clone();
        b[k] ^= 0xA5;
        let _ = sample_waves_grib2(b.as_slice(), &p, &Progress::new());
        let _ = grib2_contents(b.as_slice());
    }
}

#[test]
fn progress_reaches_the_end_and_cancel_stops() {
    let bytes = std::fs::read(fixture("waves_simple_land.grib2")).expect("fixture");
    let p = [LatLon::new(35.0, -120.0)];
    let progress = Progress::new();
    let len = bytes.len() as u64;
    let got = sample_waves_grib2_sized(bytes.as_slice(), len, &p, &progress).expect("readable");
    assert_eq!(got.expect("waves").times.len(), 2);
    assert!((progress.fraction() - 1.0).abs() < f32::EPSILON);
    let cancelled = Progress::new();
    cancelled.cancel();
    assert!(matches!(
        sample_waves_grib2(bytes.as_slice(), &p, &cancelled),
        Err(WindFileError::Cancelled)
    ));
}

fn time(s: &str) -> DateTime<Utc> {
    DateTime::parse_from_rfc3339(s).expect("time").to_utc()
}

/// Wind with wave columns; an empty wave cell is a missing wave, the wind stays.
#[test]
fn csv_wave_columns_ride_along_with_the_wind() {
    let text = "time,u_ms,v_ms,wave_height_m,wave_period_s\n\
                2027-05-01T00:00Z,1,2,1.5,8\n\
                2027-05-01T06:00Z,3,4,,\n\
                2027-05-01T03:00Z,2,3,2.1,\n";
    let s = read_csv_series(text).expect("valid");
    assert!(s.has_wind());
    assert_eq!(s.series.wind.len(), 3);
    let waves = s.waves.as_ref().expect("wave columns");
    assert_eq!(
        waves,
        &vec![
            Some(Wave {
                height_m: 1.5,
                period_s: Some(8.0)
            }),
            Some(Wave {
                height_m: 2.1,
                period_s: None
            }),
            None,
        ]
    );
    let mid = s
        .wave_at(time("2027-05-01T01:30:00Z"), 6.0)
        .expect("between two waves");
    assert!((mid.height_m - 1.8).abs() < 1e-9);
    assert_eq!(mid.period_s, None, "one side has no period");
    assert_eq!(s.wave_at(time("2027-05-01T04:00:00Z"), 6.0), None);
    let plain = read_csv_series("time,u_ms,v_ms\n2027-05-01T00:00Z,1,2\n").expect("valid");
    assert_eq!(plain.waves, None);
}

/// A buoy file with waves and no wind: a wave-only series.
#[test]
fn csv_wave_only_buoy_file() {
    let text = "# invented buoy\ntime_utc,lat,lon,wvht_m,dpd_s\n\
                2027-05-01T00:00Z,36.7,-122.4,1.2,11\n\
                2027-05-01T01:00Z,36.7,-122.4,1.4,12\n";
    let s = read_csv_series(text).expect("valid");
    assert!(!s.has_wind());
    assert!(s.series.wind.is_empty());
    assert_eq!(s.series.times.len(), 2);
    assert_eq!(s.position, Some(LatLon::new(36.7, -122.4)));
    let w = s.wave_at(time("2027-05-01T00:30:00Z"), 3.0).expect("wave");
    assert!((w.height_m - 1.3).abs() < 1e-9);
    assert!((w.period_s.expect("period") - 11.5).abs() < 1e-9);
    let hs = read_csv_series("time,hs_m,tp_s\n2027-05-01T00:00Z,0.8,7\n").expect("valid");
    assert_eq!(
        hs.waves,
        Some(vec![Some(Wave {
            height_m: 0.8,
            period_s: Some(7.0)
        })])
    );
}

#[test]
fn csv_wave_errors_name_the_line_and_the_expectation() {
    let e = |t: &str| read_csv_series(t).unwrap_err().to_string();
    assert_eq!(
        e("time,wave_height_m\n2027-05-01T00:00Z,99\n"),
        "line 2: column wave_height_m: wave height 99 m is out of range: expected 0 to 30 m (leave the cell empty for a missing value)"
    );
    assert_eq!(
        e("time,hs_m,tp_s\n2027-05-01T00:00Z,1,0\n"),
        "line 2: column tp_s: wave period 0 s is out of range: expected more than 0 to 40 s (leave the cell empty for a missing value)"
    );
    assert_eq!(
        e("time,wave_period_s\n2027-05-01T00:00Z,9\n"),
        "line 1: a wave period column needs a wave height column: expected one of wave_height_m, hs_m, wvht_m"
    );
    assert_eq!(
        e("time,wvht_m\n2027-05-01T00:00Z,abc\n"),
        "line 2: column wvht_m: expected a number, found \"abc\""
    );
    // Half the wind columns are still an error, waves or not.
    assert_eq!(
        e("time,u_ms,wave_height_m\n2027-05-01T00:00Z,1,1\n"),
        "line 1: no wind columns: expected u_ms and v_ms, or a speed (speed_ms, speed_kt or speed_kmh) with direction_from_deg"
    );
    assert_eq!(
        e("time,speed\n2027-05-01T06:00Z,5\n"),
        "line 1: no wind columns: expected u_ms and v_ms, or a speed (speed_ms, speed_kt or speed_kmh) with direction_from_deg"
    );
}
