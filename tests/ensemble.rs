//! Ensemble GRIB2: members told apart and read one by one, against the file ecCodes
//! wrote and the values its `grib_get_data` gives (`tests/fixtures/grib2/
//! make_ensemble_fixtures.py`, `ensemble_3_members.grib2.members.txt`).

use shelfwind::coast::LatLon;
use shelfwind::wind::{
    inspect_grib2, sample_grib2, sample_grib2_member_with, sample_grib2_members,
};
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
        let series = m.samples.points[0].as_ref().expect("covered").to_winds();
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

/// The one-forecast reader (a long record's) refuses a file of several members by name;
/// `inspect` counts them and says each is a run.
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
        "the file holds 3 ensemble members (control 0, member 1, member 2): here one forecast is read, not an ensemble; give one member or a deterministic forecast"
    );
    let text = inspect_grib2(open("ensemble_3_members.grib2"))
        .expect("readable")
        .to_text();
    assert!(
        text.contains("Field: ensemble members: 3 in the file (1 control, 2 perturbed or other), of 3 in the ensemble"),
        "{text}"
    );
    assert!(text.contains("each ensemble member as one run"), "{text}");
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

// ---------------------------------------------------------------------------------
// Ten runs through the planner (`make_ensemble_runs.py`; `ensemble_10_runs.grib2.ls.txt`
// is ecCodes' grib_ls of it). The wind is the same everywhere: calm, except from 2 June
// 00 UTC to 3 June 00 UTC, when it blows from the north at 12 m/s in runs 0-6 and at
// 2 m/s in runs 7-9.
//
// Worked by hand before the run, for a north-south stretch at 37.0-37.1 N with the sea
// to the west (default settings: drag 0.0013, air 1.22 kg/m^3, sea 1025 kg/m^3, event
// threshold 50 m^3/s per 100 m; working hours 05-21 local, minimum 2 h fishing):
// - 12 m/s: stress 1.22 x 0.0013 x 144 = 0.2284 Pa; f(37.05 N) = 2 x 7.2921e-5 x
//   sin 37.05° = 8.787e-5 /s; Ekman transport 0.2284 / (1025 x 8.787e-5) = 2.536 m^2/s,
//   offshore: index 253.6 m^3/s per 100 m, over the threshold;
// - 2 m/s: 0.00634 Pa, index 7.0, under it;
// - 2 June (UTC days, time zone UTC): every hour is at the run's full wind (the steps
//   of 2 June 00 UTC to 3 June 00 UTC all blow), so the daily mean index is 253.6 in
//   runs 0-6 and 7.0 in runs 7-9: upwelling in 7 of 10 runs. 12 m/s is 23.3 kt, over a
//   20 kt limit all day: a window in runs 7-9 only, 3 of 10; with a 30 kt limit, 10;
// - 1 June: calm but for the ramp to the first strong step (22 and 23 UTC, 4 and 8 m/s:
//   index 28 and 113), a mean of 5.9: upwelling in 0 of 10; calm in working hours: a
//   window in all 10;
// - 3 June: the ramp down (00-02 UTC: 254, 113, 28), a mean of 16.5: 0 of 10; window in
//   all 10 (working hours start at 05).
// ---------------------------------------------------------------------------------

#[path = "common/ten_runs.rs"]
mod ten_runs;

use shelfwind::coast::{Land, resolve_segments};
use shelfwind::plan::{Plan, PlanNote};
use shelfwind::progress::Progress;
use shelfwind::scenario::{PlanChoice, Scenario, plan_scenario};
use shelfwind::wind::{RunRule, forecast_runs, load_sources};
use ten_runs::{ten_run_scenario, three_centres};

fn plan_for(sc: &Scenario, vessel: &str) -> Plan {
    let segments = resolve_segments(&sc.segments, Land::bundled()).expect("sides");
    let sources = load_sources(&sc.wind_files).expect("wind");
    let choice = PlanChoice {
        vessel_id: Some(vessel),
        port_id: None,
        from: Some("2027-06-01".parse().expect("date")),
        days: 3,
        now: chrono::Utc::now(),
    };
    plan_scenario(
        sc,
        &segments,
        &sources,
        &choice,
        Land::bundled(),
        &Progress::new(),
    )
    .expect("plan")
}

/// Per day, (runs with upwelling, runs with a window, runs) of every stretch; every
/// stretch of the reach must agree (the wind is the same everywhere).
fn odds_by_day(plan: &Plan) -> Vec<(usize, usize, usize)> {
    plan.days
        .iter()
        .map(|d| {
            assert_eq!(d.odds.len(), plan.stretches.len());
            let all: Vec<(usize, usize, usize)> = d
                .odds
                .iter()
                .map(|o| {
                    let o = o.expect("every run has the day");
                    (o.upwelling, o.window, o.runs)
                })
                .collect();
            assert!(all.windows(2).all(|w| w[0] == w[1]), "{all:?}");
            all[0]
        })
        .collect()
}

#[test]
fn ten_runs_in_one_file_are_told_apart_control_first() {
    let sources = load_sources(&[fixture("ensemble_10_runs.grib2")]).expect("load");
    let runs = forecast_runs(&sources, RunRule::Members).expect("scan");
    let labels: Vec<String> = runs
        .members
        .iter()
        .map(shelfwind::wind::Member::label)
        .collect();
    assert_eq!(labels[0], "control");
    assert_eq!(labels[9], "member 9");
    let numbers: Vec<u32> = runs.members.iter().map(|m| m.number).collect();
    assert_eq!(numbers, (0..10).collect::<Vec<u32>>());
}

/// Members 5-9 are template 4.11 (a 3-hour mean): each field is valid at the end of its
/// interval, as ecCodes' validityTime says ("9-12" → 1200).
#[test]
fn interval_fields_are_valid_at_the_end_of_their_interval_as_eccodes_says() {
    let ls = std::fs::read_to_string(fixture("ensemble_10_runs.grib2.ls.txt")).expect("ls");
    // template, type, perturbation, size, shortName, stepRange, validityDate, validityTime
    let expected: Vec<String> = ls
        .lines()
        .map(|l| l.split(' ').collect::<Vec<_>>())
        .filter(|f| f.len() == 9 && f[0] == "11" && f[2] == "7" && f[4] == "10u")
        .map(|f| format!("{}-{}-{}T{:0>4}", &f[6][..4], &f[6][4..6], &f[6][6..], f[7]))
        .collect();
    assert_eq!(expected.len(), 25);
    let times = sample_grib2_member_with(
        open("ensemble_10_runs.grib2"),
        &[LatLon::new(37.0, -123.0)],
        (3, 7),
        &Progress::new(),
    )
    .expect("member 7")
    .times;
    let ours: Vec<String> = times
        .iter()
        .map(|t| t.format("%Y-%m-%dT%H%M").to_string())
        .collect();
    assert_eq!(ours, expected);
}

#[test]
fn the_plan_counts_runs_with_upwelling_and_with_a_window() {
    let sc = ten_run_scenario(vec![fixture("ensemble_10_runs.grib2")]);
    let skiff = plan_for(&sc, "skiff");
    assert_eq!(skiff.runs.len(), 10);
    assert!(skiff.notes.contains(&PlanNote::Ensemble { runs: 10 }));
    assert_eq!(
        odds_by_day(&skiff),
        vec![(0, 10, 10), (7, 3, 10), (0, 10, 10)],
        "by hand: see the comment above"
    );
    let cutter = plan_for(&sc, "cutter");
    assert_eq!(
        odds_by_day(&cutter),
        vec![(0, 10, 10), (7, 10, 10), (0, 10, 10)]
    );
    // The reason says it in words; the productivity range holds the mean.
    let day2 = &skiff.days[1];
    let top = day2.ranked.first().expect("three runs leave a window");
    let lines = shelfwind::export::plan_text::ranked_lines(
        &skiff,
        day2.date,
        top,
        shelfwind::export::units::Units::default(),
    );
    assert!(
        lines[0].starts_with("Upwelling in 7 of 10 runs; window in 3 of 10; productivity"),
        "{lines:?}"
    );
    let o = top.reasons.odds.expect("odds");
    assert!(o.productivity_p10 <= top.productivity && top.productivity <= o.productivity_p90);
    // The mean score counts the seven runs without a window as 0: it is under the
    // score of any run that has one.
    let json: serde_json::Value = serde_json::from_slice(
        shelfwind::export::render_plan(&skiff, shelfwind::export::PlanFormat::Json).as_bytes(),
    )
    .expect("valid JSON");
    let entry = &json["days"][1]["ranked"][0];
    // The trip sheet prints the odds and says the plan is an ensemble.
    let sheet = shelfwind::export::trip_sheet_html(
        &skiff,
        Land::bundled(),
        1,
        shelfwind::export::units::Units::default(),
    );
    assert!(sheet.contains("Upwelling in 7 of 10 runs; window in 3 of 10"));
    assert!(sheet.contains("Ensemble of 10 runs"));
    assert_eq!(entry["members"], 10);
    assert_eq!(entry["p_upwelling"], 0.7);
    assert_eq!(entry["p_window"], 0.3);
    assert!(entry["productivity_p10"].is_number() && entry["productivity_p90"].is_number());
}

/// One file per member makes the same runs and the same odds as one file of all.
#[test]
fn one_file_per_member_gives_the_same_odds() {
    let split: Vec<PathBuf> = (0..10)
        .map(|m| fixture(&format!("ensemble_10_runs_split/run_{m:02}.grib2")))
        .collect();
    let plan = plan_for(&ten_run_scenario(split), "skiff");
    assert_eq!(plan.runs.len(), 10);
    assert_eq!(
        odds_by_day(&plan),
        vec![(0, 10, 10), (7, 3, 10), (0, 10, 10)]
    );
}

/// A poor man's ensemble: three deterministic forecasts (here station series without a
/// position, which cover every point), each file a run when asked; two of them blow
/// 12 m/s from the north all of 2 June, the third 2 m/s. Without asking, the first file
/// covers everything and the plan is a single forecast, said so, with no odds.
#[test]
fn each_file_a_run_when_asked_and_a_single_forecast_otherwise() {
    let dir = tempfile::tempdir().expect("temp dir");
    let files = three_centres(dir.path());
    let mut sc = ten_run_scenario(files);
    let single = plan_for(&sc, "skiff");
    assert!(single.runs.is_empty());
    assert!(single.notes.contains(&PlanNote::SingleForecast));
    assert!(single.days.iter().all(|d| d.odds.is_empty()));
    let json: serde_json::Value = serde_json::from_slice(
        shelfwind::export::render_plan(&single, shelfwind::export::PlanFormat::Json).as_bytes(),
    )
    .expect("valid JSON");
    let entry = &json["days"][0]["ranked"][0];
    assert_eq!(entry["members"], 1);
    assert!(entry["p_upwelling"].is_null() && entry["p_window"].is_null());
    sc.wind_files_are_runs = true;
    let poor = plan_for(&sc, "skiff");
    let labels: Vec<String> = poor
        .runs
        .iter()
        .map(shelfwind::wind::Member::label)
        .collect();
    assert_eq!(labels, ["file 1", "file 2", "file 3"]);
    assert_eq!(odds_by_day(&poor), vec![(0, 3, 3), (2, 1, 3), (0, 3, 3)]);
}
