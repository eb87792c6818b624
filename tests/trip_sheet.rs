//! The printable trip sheet on the demo: what a skipper must find on it (cautions, every
//! ranked stretch with its rank, why the others are left out, a map, the plots), text
//! escaped, a day with nothing to recommend, and the command line. The HTML is checked by
//! a general-purpose parser: xmllint (Debian libxml2-utils), in HTML mode and, since the
//! sheet is written as well-formed markup, in XML mode too.

use chrono::NaiveDate;
use shelfwind::coast::{Land, resolve_segments};
use shelfwind::export::plan_text::{excluded_text, notes, ranked_lines};
use shelfwind::export::trip_sheet_html;
use shelfwind::export::units::Units;
use shelfwind::plan::{CAUTIONS, Plan};
use shelfwind::progress::Progress;
use shelfwind::scenario::{DEMO_FORECAST_FILE, PlanChoice, Scenario, demo_scenario, plan_scenario};
use shelfwind::wind::{WindSource, demo_forecast_grib2};
use std::collections::HashSet;
use std::path::Path;
use std::process::Command;

fn day(s: &str) -> NaiveDate {
    NaiveDate::parse_from_str(s, "%Y-%m-%d").expect("date")
}

fn plan_for(scenario: &Scenario, vessel: &str, port: &str, from: &str) -> Plan {
    let segments = resolve_segments(&scenario.segments, Land::bundled()).expect("sides");
    let dir = tempfile::tempdir().expect("temp dir");
    let path = dir.path().join(DEMO_FORECAST_FILE);
    std::fs::write(&path, demo_forecast_grib2()).expect("write");
    let choice = PlanChoice {
        vessel_id: Some(vessel),
        port_id: Some(port),
        from: Some(day(from)),
        days: 1,
        now: chrono::Utc::now(),
    };
    plan_scenario(
        scenario,
        &segments,
        &[WindSource::Grib2 { path }],
        &choice,
        Land::bundled(),
        &Progress::new(),
    )
    .expect("plan")
}

fn demo_plan(vessel: &str, port: &str, from: &str) -> Plan {
    plan_for(&demo_scenario().expect("demo"), vessel, port, from)
}

/// Text as the sheet writes it.
fn html_text(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
        .replace('\'', "&#39;")
}

/// libxml2 before 2.14 knows HTML 4's element names only and reports every inline SVG
/// element as an invalid tag; those reports say nothing about the document's structure
/// and are set aside. Any other report fails.
const SVG_ELEMENTS: &[&str] = &[
    "svg", "defs", "clippath", "pattern", "g", "path", "polyline", "polygon", "line", "rect",
    "text", "tspan",
];

/// Parses the sheet with xmllint (Debian libxml2-utils; CI installs it): as HTML, and as
/// XML for well-formedness. Without xmllint and outside CI the check is skipped, saying so.
fn assert_parses(html: &str) {
    let dir = tempfile::tempdir().expect("temp dir");
    let path = dir.path().join("sheet.html");
    std::fs::write(&path, html).expect("write");
    let Some(as_html) = xmllint(&["--html", "--noout", "--nonet"], &path) else {
        return;
    };
    let stderr = String::from_utf8_lossy(&as_html.stderr);
    let reports: Vec<&str> = stderr
        .lines()
        .filter(|l| l.contains(" error : ") || l.contains(" warning : "))
        .filter(|l| {
            !SVG_ELEMENTS
                .iter()
                .any(|t| l.ends_with(&format!("Tag {t} invalid")))
        })
        .collect();
    assert!(
        as_html.status.success() && reports.is_empty(),
        "xmllint --html: {reports:?}\n{stderr}"
    );
    let as_xml = xmllint(&["--noout", "--nonet"], &path).expect("xmllint ran once");
    assert!(
        as_xml.status.success() && as_xml.stderr.is_empty(),
        "xmllint (XML): {}",
        String::from_utf8_lossy(&as_xml.stderr)
    );
}

fn xmllint(args: &[&str], path: &Path) -> Option<std::process::Output> {
    match Command::new("xmllint").args(args).arg(path).output() {
        Ok(o) => Some(o),
        Err(_) => {
            assert!(
                std::env::var_os("CI").is_none(),
                "xmllint is missing in CI: .ci/run installs libxml2-utils"
            );
            eprintln!("skipped the HTML check: xmllint (Debian libxml2-utils) is not installed");
            None
        }
    }
}

/// The `data-stretch` ids of the map's stretch lines, in order.
fn drawn_stretches(html: &str) -> Vec<String> {
    html.match_indices("<polyline class=\"stretch ")
        .filter_map(|(at, _)| {
            let rest = &html[at..];
            let start = rest.find("data-stretch=\"")? + "data-stretch=\"".len();
            let end = start + rest[start..].find('"')?;
            Some(rest[start..end].to_string())
        })
        .collect()
}

/// Friday 14 May, the small boat from Tern Harbour: four stretches ranked, the closed
/// ones and the far ones left out (tests/plan_demo.rs has the story).
#[test]
fn the_demo_friday_sheet_has_what_the_skipper_needs() {
    let plan = demo_plan("little-auk", "tern-harbour", "2027-05-14");
    let d = &plan.days[0];
    assert!(d.ranked.len() >= 3, "{:?}", d.ranked);
    let html = trip_sheet_html(&plan, Land::bundled(), 0, Units::default());
    assert_parses(&html);
    assert!(html.starts_with("<!DOCTYPE html>"));

    // Header.
    for s in [
        "Friday 14 May 2027",
        "North Reach Fishers&#39; Co-op (demo)",
        "Little Auk (6.5 m skiff): cruise 18 kt, wind limit 18 kt, range 20 nm",
        "Tern Harbour, 38°26.4′ N 123°08.4′ W",
        "America/Los_Angeles, UTC-07:00",
        "generated by Shelfwind",
        "@page { size: A4 portrait",
    ] {
        assert!(html.contains(s), "{s}");
    }
    // Cautions in the box near the top and again in the footer, and the notes.
    let cautions = html_text(CAUTIONS);
    let first = html.find(&cautions).expect("cautions");
    assert!(
        first < html.find("<h2>Map</h2>").expect("map"),
        "before the map"
    );
    assert_eq!(html.matches(&cautions).count(), 2);
    for n in notes(&plan) {
        assert!(html.contains(&html_text(&n)), "{n}");
    }

    // Every ranked stretch with its rank (ties as "=2"), window in local time and UTC,
    // and its reasons.
    for r in &d.ranked {
        let s = &plan.stretches[r.stretch];
        let rank = if r.tied_with_above {
            format!("={}", r.rank)
        } else {
            r.rank.to_string()
        };
        let row = format!(
            "<td class=\"rank\">{rank}</td><td class=\"stretch\"><span class=\"name\">{}</span>",
            html_text(&s.name)
        );
        assert!(html.contains(&row), "{row}");
        for reason in ranked_lines(&plan, d.date, r, Units::default()) {
            assert!(
                html.contains(&format!("<li>{}</li>", html_text(&reason))),
                "{reason}"
            );
        }
    }
    // Ties print "=N", and only ties do.
    for r in &d.ranked {
        let tie = format!("<td class=\"rank\">={}</td>", r.rank);
        let tied = d
            .ranked
            .iter()
            .any(|o| o.rank == r.rank && o.tied_with_above);
        assert_eq!(tied, html.contains(&tie), "{tie}");
    }
    assert!(html.contains("05:00–21:00<br/><span class=\"small\">(12:00Z–04:00Z)</span>"));

    // Why the others are left out: closures by name, the far ones on one line.
    let mut far = 0;
    for e in &d.excluded {
        let reason = excluded_text(&plan, e, Units::default());
        if e.exclusion.is_out_of_range() {
            far += 1;
        } else {
            assert!(html.contains(&html_text(&reason)), "{reason}");
        }
    }
    assert!(far > 5);
    assert_eq!(
        html.matches("beyond this boat&#39;s 20 nm range from Tern Harbour")
            .count(),
        1
    );
    assert!(html.contains("closed to fishing: marine reserve (no take)"));

    // The map: one line per stretch drawn, every ranked stretch among them in colour,
    // the closed reserve next to the port drawn grey and dashed.
    assert_eq!(html.matches("<svg class=\"map\"").count(), 1);
    let drawn = drawn_stretches(&html);
    let unique: HashSet<&String> = drawn.iter().collect();
    assert_eq!(unique.len(), drawn.len(), "one line per stretch: {drawn:?}");
    for r in &d.ranked {
        let id = &plan.stretches[r.stretch].id;
        assert!(
            html.contains(&format!(
                "<polyline class=\"stretch ranked\" data-stretch=\"{}\"",
                html_text(id)
            )),
            "{id}"
        );
    }
    assert!(html.contains("<polyline class=\"stretch excluded\" data-stretch=\"kelp-shelf/1\""));
    assert!(html.contains("class=\"land\""));
    assert!(html.contains(" nm</text>"), "scale bar");
    assert!(html.contains(">N</text>"), "north arrow");

    // Plots for the best three: wind with the limit, index with its zero line, an hourly
    // bar for each of the day's 24 hours.
    for r in d.ranked.iter().take(3) {
        let name = html_text(&plan.stretches[r.stretch].name);
        assert!(html.contains(&format!("aria-label=\"Wind through the day at {name}\"")));
        assert!(html.contains(&format!(
            "aria-label=\"Upwelling index through the day at {name}\""
        )));
    }
    assert_eq!(html.matches("aria-label=\"Wind through the day").count(), 3);
    assert_eq!(html.matches("class=\"limit\"").count(), 3);
    assert_eq!(html.matches("class=\"zero\"").count(), 3);
    assert_eq!(html.matches("<rect class=\"index\"").count(), 3 * 24);
    assert!(html.contains("m³/s per 100 m") && html.contains("wind, kt"));
    assert!(html.contains("local time (UTC-07:00)"));

    // Self-contained: no script, nothing fetched.
    assert!(!html.contains("<script"));
    assert_eq!(
        html.matches("http").count(),
        html.matches("http://www.w3.org/2000/svg").count()
    );
}

/// The big boat on the day of the blow, its wave limit taken off (the blow's sea keeps
/// it in otherwise: tests/plan_demo.rs), works some hours: the hours over its wind
/// limit are hatched on the wind plots.
#[test]
fn hours_over_the_limit_are_shaded() {
    let mut scenario = demo_scenario().expect("demo");
    for v in &mut scenario.vessels {
        v.wave_limit_m = None;
    }
    let plan = plan_for(&scenario, "steady-hand", "harrow-cove", "2027-05-13");
    assert!(!plan.days[0].ranked.is_empty());
    let html = trip_sheet_html(&plan, Land::bundled(), 0, Units::default());
    assert_parses(&html);
    assert!(html.contains("<rect class=\"over\""));
    assert!(html.contains("limit 32 kt"));
}

#[test]
fn names_with_markup_are_escaped() {
    let mut scenario = demo_scenario().expect("demo");
    let seg = scenario
        .segments
        .iter_mut()
        .find(|s| s.id == "gannet-reach")
        .expect("segment");
    seg.name = "<b>&\"x\"".into();
    let plan = plan_for(&scenario, "little-auk", "tern-harbour", "2027-05-14");
    assert!(
        plan.days[0]
            .ranked
            .iter()
            .any(|r| plan.stretches[r.stretch].segment_id == "gannet-reach"),
        "ranked, so the name is in the table and the plots"
    );
    let html = trip_sheet_html(&plan, Land::bundled(), 0, Units::default());
    assert!(!html.contains("<b>&\"x\""));
    assert!(html.contains("<span class=\"name\">&lt;b&gt;&amp;&quot;x&quot; 1/2</span>"));
    assert!(html.contains("aria-label=\"Wind through the day at &lt;b&gt;&amp;&quot;x&quot;"));
    assert_parses(&html);
}

/// Thursday's blow keeps the small boat in: the sheet still has the cautions, the map
/// and why every stretch is left out, and no plots.
#[test]
fn a_day_with_nothing_to_recommend_still_gives_a_valid_sheet() {
    let plan = demo_plan("little-auk", "tern-harbour", "2027-05-13");
    assert!(plan.days[0].ranked.is_empty());
    let html = trip_sheet_html(&plan, Land::bundled(), 0, Units::default());
    assert_parses(&html);
    assert!(html.contains("Thursday 13 May 2027"));
    assert!(html.contains("No stretch to recommend this day"));
    assert!(html.contains(&html_text(CAUTIONS)));
    assert!(html.contains("<svg class=\"map\""));
    assert!(!drawn_stretches(&html).is_empty());
    assert!(html.contains("over this boat&#39;s 18 kt limit all day"));
    assert!(!html.contains("Wind through the day"));

    // A day the plan does not have: a sheet that says so.
    let html = trip_sheet_html(&plan, Land::bundled(), 5, Units::default());
    assert_parses(&html);
    assert!(html.contains("Day 6 is not in this plan"));
    assert!(html.contains(&html_text(CAUTIONS)));
}

fn shelfwind(args: &[&str]) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_shelfwind"))
        .args(args)
        .output()
        .expect("runs")
}

#[test]
fn the_command_line_writes_the_sheet() {
    let dir = tempfile::tempdir().expect("temp dir");
    let d = dir.path().to_str().expect("utf-8");
    assert!(shelfwind(&["demo", "--out", d]).status.success());
    let scenario = dir.path().join("north-reach.shelfwind.json");
    let out = dir.path().join("sheet.html");
    let o = shelfwind(&[
        "plan",
        scenario.to_str().expect("utf-8"),
        "--from",
        "2027-05-14",
        "--format",
        "html",
        "--out",
        out.to_str().expect("utf-8"),
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let html = std::fs::read_to_string(&out).expect("written");
    assert_parses(&html);
    assert!(html.contains("Friday 14 May 2027"));
    assert!(html.contains("Cormorant Bluffs 1/2"));
    assert!(html.ends_with("</html>\n"));
}

/// The sheet in the units a skipper chose: 18 kt = 9.26 m/s and 33.3 km/h, 20 nm =
/// 37.04 km (1 kt = 1852 m/h exactly), 25 l/h = 6.6 US gal/h (1 US gal = 3.785411784 l).
#[test]
fn the_sheet_speaks_the_units_chosen() {
    use shelfwind::export::units::{DistanceUnit, FuelUnit, WindUnit};
    let plan = demo_plan("little-auk", "tern-harbour", "2027-05-14");
    let units = Units {
        wind: WindUnit::MetresPerSecond,
        distance: DistanceUnit::Kilometres,
        fuel: FuelUnit::UsGallons,
    };
    let html = trip_sheet_html(&plan, Land::bundled(), 0, units);
    assert_parses(&html);
    assert!(
        html.contains(
            "Little Auk (6.5 m skiff): cruise 33 km/h, wind limit 9 m/s, range 37 km, 6.6 US gal/h at cruise"
        ),
        "header"
    );
    assert!(html.contains("beyond this boat&#39;s 37 km range from Tern Harbour"));
    assert!(!html.contains(" nm from Tern Harbour"));
}

/// The sheet draws the way by sea to each of the day's best three stretches, and says so
/// in the map's key.
#[test]
fn the_sheet_draws_the_ways_by_sea() {
    let plan = demo_plan("little-auk", "tern-harbour", "2027-05-14");
    let html = trip_sheet_html(&plan, Land::bundled(), 0, Units::default());
    assert_parses(&html);
    let ways = plan.days[0]
        .ranked
        .iter()
        .take(3)
        .filter(|r| plan.stretches[r.stretch].route.is_some())
        .count();
    assert!(ways > 0);
    assert_eq!(html.matches("<polyline class=\"route\"").count(), ways);
    assert!(html.contains("the way by sea to the best three"));
}
