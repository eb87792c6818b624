//! Oversized and hostile inputs are refused quickly, in bounded memory, with a clear
//! message (README, "Limits"): never an abort from the allocator. (A GRIB2 grid of a
//! billion points is in `grib2_grids.rs`.)

use std::time::{Duration, Instant};

fn quickly<T>(what: &str, f: impl FnOnce() -> T) -> T {
    let start = Instant::now();
    let out = f();
    assert!(
        start.elapsed() < Duration::from_secs(20),
        "{what} took {:?}",
        start.elapsed()
    );
    out
}

/// A GeoJSON coast nested 10,000 arrays deep: refused by the JSON reader's depth
/// limit (128), not by a stack overflow.
#[test]
fn a_coast_nested_ten_thousand_deep_is_refused() {
    let deep = format!(
        r#"{{"type":"FeatureCollection","features":[{{"type":"Feature","properties":{{"id":"a"}},"geometry":{{"type":"LineString","coordinates":{}{}}}}}]}}"#,
        "[".repeat(10_000),
        "]".repeat(10_000)
    );
    let e = quickly("the deep coast", || {
        shelfwind::coast::read_coast_geojson(&deep).expect_err("refused")
    });
    assert!(e.to_string().contains("recursion limit"), "{e}");
    let e = quickly("the deep scenario", || {
        shelfwind::scenario::parse_scenario(&deep.replace("FeatureCollection", "x"))
            .expect_err("refused")
    });
    assert!(!e.to_string().is_empty());
}

/// A scenario of a million segments (about 70 MB) is refused unread, naming the limit;
/// so is a coast file that big given to the command line.
#[test]
fn a_scenario_of_a_million_segments_is_refused_unread() {
    let segment = r#"{"id":"s","points":[{"lat_deg":38.0,"lon_deg":-123.0},{"lat_deg":38.1,"lon_deg":-123.1}]},"#;
    let text = format!(
        r#"{{"format":"shelfwind-scenario","version":1,"segments":[{}]}}"#,
        segment.repeat(1_000_000).trim_end_matches(',')
    );
    let e = quickly("a million segments", || {
        shelfwind::scenario::parse_scenario(&text).expect_err("refused")
    });
    assert!(e.to_string().contains("larger than the 16 MB"), "{e}");
    let dir = tempfile::tempdir().expect("temp dir");
    let path = dir.path().join("huge.shelfwind.json");
    std::fs::write(&path, &text).expect("write");
    let e = shelfwind::scenario::load_scenario(&path).expect_err("refused");
    assert!(e.to_string().contains("larger than the 16 MB"), "{e}");
    let o = std::process::Command::new(env!("CARGO_BIN_EXE_shelfwind"))
        .args(["index", "--coast"])
        .arg(&path)
        .output()
        .expect("runs");
    assert_eq!(o.status.code(), Some(2));
    assert!(
        String::from_utf8_lossy(&o.stderr).contains("larger than the 16 MB"),
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
}

/// A wind CSV with one line of 100 MB: refused at that line.
#[test]
fn a_csv_line_of_a_hundred_megabytes_is_refused_at_its_line() {
    let mut text = String::from("time,u_ms,v_ms\n2027-05-01T00:00:00Z,1,");
    text.push_str(&"7".repeat(100 * 1024 * 1024));
    text.push('\n');
    let e = quickly("the long line", || {
        shelfwind::wind::read_csv_series(&text).expect_err("refused")
    });
    assert!(e.to_string().contains("line 2"), "{e}");
}

/// A NetCDF (64-bit data, CDF-5) header declaring a dimension of 2⁶³ − 1 values: the
/// sea-temperature reader refuses it from the header and `inspect` only lists it;
/// nothing of that size is allocated.
#[test]
fn a_netcdf_dimension_of_two_to_the_63_is_refused() {
    let mut b: Vec<u8> = b"CDF\x05".to_vec();
    let u64be = |b: &mut Vec<u8>, v: u64| b.extend_from_slice(&v.to_be_bytes());
    let u32be = |b: &mut Vec<u8>, v: u32| b.extend_from_slice(&v.to_be_bytes());
    u64be(&mut b, 0); // records
    u32be(&mut b, 0x0A); // dimension list
    u64be(&mut b, 1);
    u64be(&mut b, 3);
    b.extend_from_slice(b"lat\0");
    u64be(&mut b, u64::MAX >> 1);
    u32be(&mut b, 0); // no global attributes
    u64be(&mut b, 0);
    u32be(&mut b, 0x0B); // variable list
    u64be(&mut b, 1);
    u64be(&mut b, 3);
    b.extend_from_slice(b"sst\0");
    u64be(&mut b, 1); // one dimension: lat
    u64be(&mut b, 0);
    u32be(&mut b, 0); // no attributes
    u64be(&mut b, 0);
    u32be(&mut b, 5); // float
    u64be(&mut b, u64::MAX >> 1);
    u64be(&mut b, 200);
    let dir = tempfile::tempdir().expect("temp dir");
    let path = dir.path().join("huge.nc");
    std::fs::write(&path, &b).expect("write");
    let e = quickly("the huge dimension", || {
        shelfwind::wind::sample_netcdf_sst(&path, &[(37.0, -123.0)]).expect_err("refused")
    });
    assert!(!e.is_empty());
    // `inspect` lists it from the header alone, and says it has nothing to use.
    let summary = quickly("inspecting it", || {
        shelfwind::wind::inspect_file(&path).expect("a summary")
    });
    assert!(summary.uses.is_empty(), "{summary:?}");
    assert!(
        summary.fields[0].contains("lat=9223372036854775807"),
        "{summary:?}"
    );
}

/// A PMTiles map pack whose root directory is 70 KB of gzip that unpacks to 70 MB: the
/// reader stops at 64 MB and says so, rather than unpacking whatever a file claims.
#[cfg(feature = "map-packs")]
#[test]
fn a_map_pack_directory_that_unpacks_beyond_64_megabytes_is_refused() {
    use std::io::Write;
    let mut gz = flate2::write::GzEncoder::new(Vec::new(), flate2::Compression::best());
    gz.write_all(&vec![0u8; 70 << 20]).expect("gzip");
    let root = gz.finish().expect("gzip");
    // PMTiles v3 header (127 bytes, little-endian): root directory right after it, no
    // metadata, leaves or tiles; internal compression gzip (2), PNG tiles (2).
    let mut file = b"PMTiles\x03".to_vec();
    file.resize(127, 0);
    let mut put = |at: usize, v: u64| file[at..at + 8].copy_from_slice(&v.to_le_bytes());
    put(8, 127);
    put(16, root.len() as u64);
    for at in [24, 40, 56] {
        put(at, 127 + root.len() as u64);
    }
    file[97] = 2;
    file[98] = 1;
    file[99] = 2;
    file.extend_from_slice(&root);
    let dir = tempfile::tempdir().expect("temp dir");
    let path = dir.path().join("bomb.pmtiles");
    std::fs::write(&path, &file).expect("write");
    let e = quickly("the gzip bomb", || shelfwind::tilepack::open_pack(&path))
        .err()
        .expect("refused");
    assert!(e.to_string().contains("more than 64 MB"), "{e}");
}
