//! Every input the fuzzers (`fuzz/`, cargo fuzz) ever found a crash, a timeout or an
//! out-of-memory with, run through the same readers as the fuzz target that found it.
//! Each must now end in a clear error, quickly and in bounded memory.

use shelfwind::coast::LatLon;
use shelfwind::progress::Progress;
use std::io::Cursor;
use std::path::PathBuf;

fn fixture(name: &str) -> Vec<u8> {
    let p = PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/fuzz")
        .join(name);
    std::fs::read(p).expect("fixture")
}

/// Found by the `grib2` target: a complex-packed field (template 5.3) whose group
/// lengths in the data section add up to far more values than the message packs. The
/// GRIB2 decoder sized a buffer by one such length and asked for 31 GB; the lengths are
/// now checked before decoding.
#[test]
fn complex_packing_with_impossible_group_lengths_is_refused() {
    let data = fixture("grib2_complex_group_length.grib2");
    let points = [LatLon::new(37.0, -123.0), LatLon::new(38.5, -123.4)];
    let e =
        shelfwind::wind::sample_grib2(Cursor::new(&data), &points).expect_err("a damaged field");
    assert!(e.to_string().contains("damaged"), "{e}");
    let _ = shelfwind::wind::sample_grib2_members(Cursor::new(&data), &points);
    let _ = shelfwind::wind::sample_waves_grib2(data.as_slice(), &points, &Progress::new());
    let _ = shelfwind::wind::sample_sst_grib2(data.as_slice(), &points);
    let _ = shelfwind::wind::inspect_grib2(data.as_slice());
}

/// Found by the `scenario` target: a version-0 scenario whose `boats` list holds a
/// string where a boat should be; the migration indexed it as an object and panicked.
/// Entries that are not objects are now left for the reading to refuse.
#[test]
fn a_version_0_boat_that_is_not_an_object_is_named() {
    let data = fixture("scenario_v0_boat_not_an_object.json");
    let text = String::from_utf8(data).expect("text");
    let e = shelfwind::scenario::parse_scenario(&text).expect_err("refused");
    assert!(
        e.to_string().contains("after migrating from version 0"),
        "{e}"
    );
}

/// Found by the `grib2` target (a timeout): a JPEG 2000 packed field (template 5.40)
/// whose codestream declares an image of millions of pixels for a grid of a few dozen
/// points; the JPEG 2000 decoder spent seconds and gigabytes on it. The image header is
/// now checked against the packed values first.
#[test]
fn jpeg2000_packing_with_an_impossible_image_is_refused_quickly() {
    let data = fixture("grib2_jpeg2000_huge_image.grib2");
    let points = [LatLon::new(37.0, -123.0)];
    let start = std::time::Instant::now();
    let e = shelfwind::wind::sample_grib2(Cursor::new(&data), &points).expect_err("damaged");
    assert!(e.to_string().contains("damaged"), "{e}");
    let _ = shelfwind::wind::sample_waves_grib2(data.as_slice(), &points, &Progress::new());
    let _ = shelfwind::wind::sample_sst_grib2(data.as_slice(), &points);
    assert!(start.elapsed() < std::time::Duration::from_secs(5));
}

/// Found by the `grib2` target: a PNG packed field (template 5.41) whose image header
/// declares far more pixels than the grid; the decoder allocated the whole image (an
/// exabyte). The image header is now checked against the packed values first.
#[test]
fn png_packing_with_an_impossible_image_is_refused() {
    let data = fixture("grib2_png_huge_image.grib2");
    let points = [LatLon::new(37.0, -123.0)];
    let e = shelfwind::wind::sample_grib2(Cursor::new(&data), &points).expect_err("damaged");
    assert!(e.to_string().contains("PNG packing"), "{e}");
    let _ = shelfwind::wind::sample_grib2_members(Cursor::new(&data), &points);
    let _ = shelfwind::wind::sample_waves_grib2(data.as_slice(), &points, &Progress::new());
    let _ = shelfwind::wind::sample_sst_grib2(data.as_slice(), &points);
    let _ = shelfwind::wind::inspect_grib2(data.as_slice());
}

/// Found by the `tilepack` target: a PMTiles header whose metadata offset and length add
/// up past 2^64, so the sum wrapped round to within the file and the reader asked for a
/// buffer of 2^64 bytes (capacity overflow). Every part is now checked against the
/// file's length, without wrapping, before anything is allocated for it.
#[cfg(feature = "map-packs")]
#[test]
fn a_map_pack_part_past_the_end_of_the_file_is_refused() {
    let dir = tempfile::tempdir().expect("temp dir");
    let path = dir.path().join("pack.pmtiles");
    std::fs::write(&path, fixture("tilepack_metadata_past_end.pmtiles")).expect("write");
    let e = shelfwind::tilepack::open_pack(&path)
        .err()
        .expect("a damaged pack");
    assert!(e.to_string().starts_with("damaged PMTiles file"), "{e}");
}

/// Found by the `grib2` target: a Gaussian grid (template 3.40) declaring thousands of
/// parallels; finding its latitudes took over a second per message, as Newton's method
/// could run a hundred steps per root. Now at most twelve steps (one or two converge),
/// the latitudes are shared by the messages of one grid, and N above 4,000 is refused.
/// Found again (`grib2_gaussian_slow_latitudes`): a grid within the limit still took
/// about a second in the fuzzer's instrumented build; the first guesses are now
/// Tricomi's and the recurrence divides nothing, about three times faster.
#[test]
fn a_gaussian_grid_of_huge_n_ends_quickly() {
    for name in [
        "grib2_gaussian_n_huge.grib2",
        "grib2_gaussian_slow_latitudes.grib2",
    ] {
        let data = fixture(name);
        let points = [LatLon::new(37.0, -123.0)];
        let start = std::time::Instant::now();
        let _ = shelfwind::wind::inspect_grib2(data.as_slice());
        let _ = shelfwind::wind::sample_grib2(Cursor::new(&data), &points);
        let _ = shelfwind::wind::sample_grib2_members(Cursor::new(&data), &points);
        let _ = shelfwind::wind::sample_waves_grib2(data.as_slice(), &points, &Progress::new());
        let _ = shelfwind::wind::sample_sst_grib2(data.as_slice(), &points);
        // A generous bound for a debug build; the fuzzer's limit was 1 s in release.
        assert!(
            start.elapsed().as_secs() < 30,
            "{name}: {:?}",
            start.elapsed()
        );
    }
}

/// The Gaussian latitudes at the largest N read, with Newton's steps bounded, against
/// ecCodes 2.50 (PyPI `eccodes`, `codes_get_gaussian_latitudes(4000)`).
#[test]
fn gaussian_latitudes_at_the_limit_match_eccodes() {
    let n = shelfwind::wind::MAX_GAUSSIAN_N;
    assert_eq!(n, 4000);
    let lats = shelfwind::wind::gaussian_latitudes(n);
    assert_eq!(lats.len(), 8000);
    for (k, want) in [
        (0, 89.982_777_782_040_87),
        (1, 89.960_467_823_497_68),
        (1999, 45.008_436_860_764_41),
        (3999, 0.011_249_296_896_974_04),
        (7999, -89.982_777_782_040_87),
    ] {
        assert!(
            (lats[k] - want).abs() < 1e-9,
            "row {k}: {} against {want}",
            lats[k]
        );
    }
}

/// Found by the `grib2` target: a complex-packed field with spatial differencing
/// (template 5.3) of order 255. The GRIB2 decoder counted its descriptors as order + 1
/// in a byte (0) and indexed before the start of a slice: a panic, caught, whose report
/// took over a second. Code Table 5.6 has orders 1 and 2: anything else is refused first.
#[test]
fn spatial_differencing_of_order_255_is_refused() {
    let data = fixture("grib2_spatial_differencing_order_255.grib2");
    let points = [LatLon::new(37.0, -123.0)];
    let e = shelfwind::wind::sample_grib2(Cursor::new(&data), &points).expect_err("refused");
    let _ = shelfwind::wind::inspect_grib2(data.as_slice());
    let _ = shelfwind::wind::sample_waves_grib2(data.as_slice(), &points, &Progress::new());
    let _ = shelfwind::wind::sample_sst_grib2(data.as_slice(), &points);
    assert!(
        e.to_string()
            .contains("spatial differencing of order 255 (Code Table 5.6 has orders 1 and 2)"),
        "{e}"
    );
}
