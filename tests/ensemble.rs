//! Ensemble GRIB2: members told apart and read one by one, against the file ecCodes
//! wrote and the values its `grib_get_data` gives (`tests/fixtures/grib2/
//! make_ensemble_fixtures.py`, `ensemble_3_members.grib2.members.txt`).

use shelfwind::coast::LatLon;
use shelfwind::wind::{inspect_grib2, sample_grib2, sample_grib2_members};
use std::path::PathBuf;

fn fixture(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/grib2")
        .join(name)
}

fn open(name: &str) -> std::io::BufReader<std::fs::File> {
    std::io::BufReader::new(std::fs::File::open(fixture(name)).expect("fixture"))
}

/// ecCodes' value at 35 N 240 E of each message, in file order: per step (0, 6 h), per
/// member (0, 1, 2), u then v.
fn reference_values() -> Vec<f64> {
    std::fs::read_to_string(fixture("ensemble_3_members.grib2.members.txt"))
        .expect("reference")
        .lines()
        .filter(|l| !l.starts_with('#'))
        .map(|l| l.trim().parse().expect("number"))
        .collect()
}

#[test]
fn three_members_are_read_apart_with_eccodes_values() {
    let at = LatLon::new(35.0, -120.0);
    let members = sample_grib2_members(open("ensemble_3_members.grib2"), &[at]).expect("read");
    assert_eq!(members.len(), 3);
    let reference = reference_values();
    assert_eq!(reference.len(), 12);
    for (k, m) in members.iter().enumerate() {
        let id = m.member.expect("an ensemble member");
        assert_eq!(id.number as usize, k);
        assert_eq!(id.is_control(), k == 0, "member {k}: type {}", id.kind);
        assert_eq!(id.ensemble_size, Some(3));
        assert_eq!(m.samples.times.len(), 2);
        let series = m.samples.points[0].as_ref().expect("covered");
        for (step, wind) in series.iter().enumerate() {
            let u = reference[step * 6 + k * 2];
            let v = reference[step * 6 + k * 2 + 1];
            assert!(
                (wind.u_m_s - u).abs() < 1e-4 && (wind.v_m_s - v).abs() < 1e-4,
                "member {k} step {step}: ({}, {}) vs ecCodes ({u}, {v})",
                wind.u_m_s,
                wind.v_m_s
            );
        }
    }
}

/// The planner takes one forecast: a file of several members is refused by name, and
/// `inspect` counts them.
#[test]
fn several_members_are_refused_by_the_forecast_reader_and_counted_by_inspect() {
    let err = sample_grib2(
        open("ensemble_3_members.grib2"),
        &[LatLon::new(35.0, -120.0)],
    )
    .expect_err("refused")
    .to_string();
    assert_eq!(
        err,
        "the file holds 3 ensemble members (control 0, member 1, member 2): the planner takes one forecast; give one member or a deterministic forecast"
    );
    let text = inspect_grib2(open("ensemble_3_members.grib2"))
        .expect("readable")
        .to_text();
    assert!(
        text.contains("Field: ensemble members: 3 in the file (1 control, 2 perturbed or other), of 3 in the ensemble"),
        "{text}"
    );
}

/// A deterministic forecast is one set of samples with no member.
#[test]
fn a_deterministic_forecast_has_no_member() {
    let members = sample_grib2_members(open("simple_hours.grib2"), &[LatLon::new(35.0, -120.0)])
        .expect("read");
    assert_eq!(members.len(), 1);
    assert!(members[0].member.is_none());
    assert_eq!(members[0].samples.times.len(), 3);
}
