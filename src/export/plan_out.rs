//! The plan for people and for other tools: a terminal table, CSV, JSON, GeoJSON of the
//! stretches with their scores, and GPX 1.1 waypoints and routes for a chart plotter.

use super::plan_text::{excluded_text, no_stretch_text, notes, ranked_lines};
use super::units::{DistanceUnit, FuelUnit, Units, WindUnit};
use crate::plan::{CAUTIONS, DayPlan, Plan, RankedStretch, StretchInfo};
use chrono::{DateTime, Utc};
use serde_json::{Value, json};
use std::fmt::Write as _;

/// Output formats of `plan`.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PlanFormat {
    /// Readable in a terminal.
    Table,
    /// One row per day and stretch.
    Csv,
    /// The whole plan as a JSON object.
    Json,
    /// Stretches as LineStrings with their ranks and scores per day.
    GeoJson,
    /// Waypoints at the best stretches and a route from the home port per day.
    Gpx,
}

/// The units of every file the tool writes: knots, nautical miles, litres (the command
/// line's contract); the app's unit choice applies to what it shows.
const FILE_UNITS: Units = Units {
    wind: WindUnit::Knots,
    distance: DistanceUnit::NauticalMiles,
    fuel: FuelUnit::Litres,
};

/// How many stretches per day go into the GPX file as waypoints.
pub const GPX_STRETCHES_PER_DAY: usize = 3;

fn local(plan: &Plan, t: DateTime<Utc>) -> String {
    t.with_timezone(&plan.time_zone).format("%H:%M").to_string()
}

fn utc(t: DateTime<Utc>) -> String {
    t.format("%H:%MZ").to_string()
}

fn rank_label(r: &RankedStretch) -> String {
    if r.tied_with_above {
        format!("={}", r.rank)
    } else {
        r.rank.to_string()
    }
}

fn bar(score: f64) -> String {
    let filled = (score / 10.0).round().clamp(0.0, 10.0) as usize;
    format!("{}{}", "█".repeat(filled), "░".repeat(10 - filled))
}

/// Renders the plan in the chosen format.
#[must_use]
pub fn render_plan(plan: &Plan, format: PlanFormat) -> String {
    match format {
        PlanFormat::Table => table(plan),
        PlanFormat::Csv => csv(plan),
        PlanFormat::Json => {
            let mut s = serde_json::to_string_pretty(&json_plan(plan)).unwrap_or_default();
            s.push('\n');
            s
        }
        PlanFormat::GeoJson => {
            let mut s = serde_json::to_string_pretty(&geojson(plan)).unwrap_or_default();
            s.push('\n');
            s
        }
        PlanFormat::Gpx => gpx(plan),
    }
}

fn table(plan: &Plan) -> String {
    let mut o = String::new();
    let v = &plan.vessel;
    let offset = plan
        .days
        .first()
        .map(|d| {
            d.date
                .and_hms_opt(12, 0, 0)
                .unwrap_or_default()
                .and_utc()
                .with_timezone(&plan.time_zone)
                .format("UTC%:z")
                .to_string()
        })
        .unwrap_or_default();
    let _ = writeln!(o, "Shelfwind plan: {}", plan.scenario_name);
    let _ = writeln!(
        o,
        "Boat: {}: cruise {:.0} kt, wind limit {:.0} kt, range {:.0} nm, {:.0} l/h",
        v.name, v.cruise_speed_kt, v.wind_limit_kt, v.range_nm, v.fuel_l_per_h
    );
    let _ = writeln!(
        o,
        "Home port: {}. Times are local ({}, {offset}), UTC in brackets.",
        plan.port.name, plan.time_zone
    );
    let _ = writeln!(o, "\nCAUTION: {CAUTIONS}");
    for n in notes(plan) {
        let _ = writeln!(o, "Note: {n}");
    }
    for day in &plan.days {
        let _ = writeln!(o, "\n{}", day.date.format("%A %-d %B %Y"));
        if day.ranked.is_empty() {
            let _ = writeln!(o, "  {}", no_stretch_text(day));
        } else {
            let _ = writeln!(
                o,
                "  {:<4}{:<28}{:>16}  {:<29}{:>8}",
                "#", "stretch", "score", "safe window", "fishing"
            );
        }
        for r in &day.ranked {
            let s = &plan.stretches[r.stretch];
            let (from, to) = r.safe_window;
            let _ = writeln!(
                o,
                "  {:<4}{:<28}{} {:>3}  {}–{} ({}–{})  {:>5.1} h",
                rank_label(r),
                s.name,
                bar(r.score),
                r.score.round(),
                local(plan, from),
                local(plan, to),
                utc(from),
                utc(to),
                r.fishing_hours,
            );
            for reason in ranked_lines(plan, day.date, r, FILE_UNITS) {
                let _ = writeln!(o, "        - {reason}");
            }
        }
        if !day.excluded.is_empty() {
            let _ = writeln!(o, "  Not ranked:");
            // Out-of-range stretches are many and alike: one line for them all.
            let (far, other): (Vec<_>, Vec<_>) = day
                .excluded
                .iter()
                .partition(|e| e.exclusion.is_out_of_range());
            for e in other {
                let _ = writeln!(
                    o,
                    "        {}: {}",
                    plan.stretches[e.stretch].name,
                    excluded_text(plan, e, FILE_UNITS)
                );
            }
            if !far.is_empty() {
                let names: Vec<&str> = far
                    .iter()
                    .map(|e| plan.stretches[e.stretch].name.as_str())
                    .collect();
                let _ = writeln!(
                    o,
                    "        beyond this boat's {:.0} nm range from {}: {}",
                    plan.vessel.range_nm,
                    plan.port.name,
                    names.join(", ")
                );
            }
        }
    }
    o
}

fn csv(plan: &Plan) -> String {
    let mut w = csv::Writer::from_writer(Vec::new());
    let _ = w.write_record([
        "date",
        "rank",
        "tied",
        "stretch_id",
        "segment_id",
        "name",
        "score",
        "productivity_pct",
        "mean_index_m3s_per_100m",
        "pumping_m_day",
        "window_factor",
        "distance_factor",
        "safe_from_local",
        "safe_to_local",
        "safe_from_utc",
        "safe_to_utc",
        "fishing_hours",
        "distance_nm",
        "steam_minutes",
        "fuel_l",
        "max_wind_kt",
        "lat",
        "lon",
        "reasons",
        "excluded_reason",
        "reason_kind",
    ]);
    for day in &plan.days {
        for r in &day.ranked {
            let s = &plan.stretches[r.stretch];
            let (from, to) = r.safe_window;
            let (mean, pumping) = day_upwelling(s, day.date);
            let _ = w.write_record([
                day.date.to_string(),
                r.rank.to_string(),
                r.tied_with_above.to_string(),
                s.id.clone(),
                s.segment_id.clone(),
                s.name.clone(),
                format!("{:.1}", r.score),
                format!("{:.0}", 100.0 * r.productivity),
                mean.map(|m| format!("{m:.1}")).unwrap_or_default(),
                pumping.map(|p| format!("{p:.2}")).unwrap_or_default(),
                format!("{:.2}", r.window_factor),
                format!("{:.2}", r.distance_factor),
                local(plan, from),
                local(plan, to),
                from.to_rfc3339_opts(chrono::SecondsFormat::Secs, true),
                to.to_rfc3339_opts(chrono::SecondsFormat::Secs, true),
                format!("{:.1}", r.fishing_hours),
                format!("{:.1}", s.distance_nm),
                format!("{:.0}", r.steam_minutes),
                format!("{:.0}", r.fuel_l),
                format!("{:.0}", r.max_wind_kt),
                format!("{:.5}", s.centre.lat_deg),
                format!("{:.5}", s.centre.lon_deg),
                ranked_lines(plan, day.date, r, FILE_UNITS).join("; "),
                String::new(),
                String::new(),
            ]);
        }
        for e in &day.excluded {
            let s = &plan.stretches[e.stretch];
            let mut row = vec![
                day.date.to_string(),
                String::new(),
                String::new(),
                s.id.clone(),
                s.segment_id.clone(),
                s.name.clone(),
            ];
            row.extend(std::iter::repeat_n(String::new(), 11));
            row.push(format!("{:.1}", s.distance_nm));
            row.extend(std::iter::repeat_n(String::new(), 3));
            row.push(format!("{:.5}", s.centre.lat_deg));
            row.push(format!("{:.5}", s.centre.lon_deg));
            row.push(String::new());
            row.push(excluded_text(plan, e, FILE_UNITS));
            row.push(e.exclusion.kind().to_string());
            let _ = w.write_record(&row);
        }
    }
    String::from_utf8(w.into_inner().unwrap_or_default()).unwrap_or_default()
}

/// The day's mean index (m^3/s per 100 m) and mean Ekman pumping (m/day) of a stretch.
fn day_upwelling(s: &StretchInfo, date: chrono::NaiveDate) -> (Option<f64>, Option<f64>) {
    s.day(date).map_or((None, None), |d| {
        (
            d.mean_index_m3s_per_100m,
            d.mean_pumping_m_s.map(|p| p * 86_400.0),
        )
    })
}

fn round_to(x: f64, places: i32) -> f64 {
    let k = 10f64.powi(places);
    (x * k).round() / k
}

fn ranked_json(plan: &Plan, date: chrono::NaiveDate, r: &RankedStretch) -> Value {
    let s = &plan.stretches[r.stretch];
    let (mean, pumping) = day_upwelling(s, date);
    json!({
        "rank": r.rank,
        "tied_with_above": r.tied_with_above,
        "stretch_id": s.id,
        "segment_id": s.segment_id,
        "name": s.name,
        "score": (r.score * 10.0).round() / 10.0,
        "parts": {
            "productivity": (r.productivity * 1000.0).round() / 1000.0,
            "window": (r.window_factor * 1000.0).round() / 1000.0,
            "distance": (r.distance_factor * 1000.0).round() / 1000.0,
            "mean_index_m3s_per_100m": mean.map(|m| round_to(m, 1)),
            "pumping_m_day": pumping.map(|p| round_to(p, 3)),
        },
        "ekman_depth_m": s.day(date).and_then(|d| d.mean_ekman_depth_m).map(f64::round),
        "safe_from_utc": r.safe_window.0.to_rfc3339_opts(chrono::SecondsFormat::Secs, true),
        "safe_to_utc": r.safe_window.1.to_rfc3339_opts(chrono::SecondsFormat::Secs, true),
        "safe_from_local": local(plan, r.safe_window.0),
        "safe_to_local": local(plan, r.safe_window.1),
        "fishing_hours": (r.fishing_hours * 10.0).round() / 10.0,
        "distance_nm": (s.distance_nm * 10.0).round() / 10.0,
        "steam_minutes": r.steam_minutes.round(),
        "fuel_l": r.fuel_l.round(),
        "max_wind_kt": r.max_wind_kt.round(),
        "max_wave_height_m": r.reasons.waves.max_m.map(|m| round_to(m, 1)),
        "wave_source": r.reasons.waves.source.kind(),
        "centre": {"lat": s.centre.lat_deg, "lon": s.centre.lon_deg},
        "reasons": ranked_lines(plan, date, r, FILE_UNITS),
        "members": r.reasons.odds.map_or(1, |o| o.runs),
        "p_upwelling": r.reasons.odds.map(|o| round_to(o.p_upwelling(), 3)),
        "p_window": r.reasons.odds.map(|o| round_to(o.p_window(), 3)),
        "productivity_p10": r.reasons.odds.map(|o| round_to(o.productivity_p10, 3)),
        "productivity_p90": r.reasons.odds.map(|o| round_to(o.productivity_p90, 3)),
    })
}

fn day_json(plan: &Plan, day: &DayPlan) -> Value {
    json!({
        "date": day.date.to_string(),
        "ranked": day.ranked.iter().map(|r| ranked_json(plan, day.date, r)).collect::<Vec<_>>(),
        "excluded": day.excluded.iter().map(|e| json!({
            "stretch_id": plan.stretches[e.stretch].id,
            "name": plan.stretches[e.stretch].name,
            "reason_kind": e.exclusion.kind(),
            "reason": excluded_text(plan, e, FILE_UNITS),
        })).collect::<Vec<_>>(),
    })
}

fn json_plan(plan: &Plan) -> Value {
    json!({
        "scenario": plan.scenario_name,
        "time_zone": plan.time_zone.to_string(),
        "vessel": plan.vessel,
        "home_port": plan.port,
        "cautions": CAUTIONS,
        "notes": notes(plan),
        "runs": if plan.runs.is_empty() {
            Value::Null
        } else {
            plan.runs.iter().map(|m| json!({"number": m.number, "label": m.label()})).collect::<Vec<_>>().into()
        },
        "days": plan.days.iter().map(|d| day_json(plan, d)).collect::<Vec<_>>(),
    })
}

fn geojson(plan: &Plan) -> Value {
    let features: Vec<Value> = plan
        .stretches
        .iter()
        .enumerate()
        .map(|(k, s)| feature(plan, k, s))
        .collect();
    json!({"type": "FeatureCollection", "features": features})
}

fn feature(plan: &Plan, k: usize, s: &StretchInfo) -> Value {
    let days: Vec<Value> = plan
        .days
        .iter()
        .map(|d| {
            if let Some(r) = d.ranked.iter().find(|r| r.stretch == k) {
                json!({"date": d.date.to_string(), "rank": r.rank, "score": (r.score * 10.0).round() / 10.0, "reasons": ranked_lines(plan, d.date, r, FILE_UNITS)})
            } else {
                let why = d.excluded.iter().find(|e| e.stretch == k).map(|e| excluded_text(plan, e, FILE_UNITS)).unwrap_or_default();
                json!({"date": d.date.to_string(), "excluded": why})
            }
        })
        .collect();
    let first = plan
        .days
        .first()
        .and_then(|d| d.ranked.iter().find(|r| r.stretch == k));
    json!({
        "type": "Feature",
        "properties": {
            "id": s.id,
            "segment_id": s.segment_id,
            "name": s.name,
            "distance_nm": (s.distance_nm * 10.0).round() / 10.0,
            "closed": s.closure.is_some(),
            "rank": first.map(|r| r.rank),
            "score": first.map(|r| (r.score * 10.0).round() / 10.0),
            "days": days,
        },
        "geometry": {"type": "LineString", "coordinates": s.points.iter().map(|p| json!([p.lon_deg, p.lat_deg])).collect::<Vec<_>>()},
    })
}

/// XML text escaping for element content and attribute values.
fn xml(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
        .replace('\'', "&apos;")
}

/// The GPX document's start: declaration, root and metadata with the cautions.
fn gpx_start(plan: &Plan) -> String {
    let mut o = String::new();
    let _ = writeln!(o, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>");
    let _ = writeln!(
        o,
        "<gpx version=\"1.1\" creator=\"Shelfwind\" xmlns=\"http://www.topografix.com/GPX/1/1\" xmlns:xsi=\"http://www.w3.org/2001/XMLSchema-instance\" xsi:schemaLocation=\"http://www.topografix.com/GPX/1/1 http://www.topografix.com/GPX/1/1/gpx.xsd\">"
    );
    let _ = writeln!(o, "  <metadata>");
    let _ = writeln!(
        o,
        "    <name>{}</name>",
        xml(&format!("{}: {}", plan.scenario_name, plan.vessel.name))
    );
    let _ = writeln!(o, "    <desc>{}</desc>", xml(CAUTIONS));
    let _ = writeln!(o, "  </metadata>");
    o
}

/// A waypoint at the centre of each stretch, with its rank on each day.
fn gpx_waypoints(o: &mut String, plan: &Plan, chosen: &[usize]) {
    for &k in chosen {
        let s = &plan.stretches[k];
        let ranks: Vec<String> = plan
            .days
            .iter()
            .filter_map(|d| {
                d.ranked.iter().find(|r| r.stretch == k).map(|r| {
                    format!(
                        "{} #{} score {:.0}",
                        d.date.format("%a %-d %b"),
                        r.rank,
                        r.score
                    )
                })
            })
            .collect();
        let _ = writeln!(
            o,
            "  <wpt lat=\"{:.6}\" lon=\"{:.6}\">",
            s.centre.lat_deg, s.centre.lon_deg
        );
        let _ = writeln!(o, "    <name>{}</name>", xml(&s.name));
        let _ = writeln!(o, "    <desc>{}</desc>", xml(&ranks.join("; ")));
        let _ = writeln!(o, "    <sym>Fishing Area</sym>");
        let _ = writeln!(o, "  </wpt>");
    }
}

/// A route from the home port to a stretch: the way by sea's turning points (the
/// great-circle line where there is none).
fn gpx_route(o: &mut String, plan: &Plan, name: &str, desc: &str, k: usize) {
    let s = &plan.stretches[k];
    let _ = writeln!(o, "  <rte>");
    let _ = writeln!(o, "    <name>{}</name>", xml(name));
    let _ = writeln!(o, "    <desc>{}</desc>", xml(desc));
    let inner = s.route.as_ref().map_or(&[][..], |r| {
        let p = &r.points;
        if p.len() > 2 { &p[1..p.len() - 1] } else { &[] }
    });
    let turns = inner
        .iter()
        .enumerate()
        .map(|(i, p)| (*p, format!("turn {}", i + 1)));
    let stops = std::iter::once((plan.port.position, plan.port.name.clone()))
        .chain(turns)
        .chain(std::iter::once((s.centre, s.name.clone())));
    for (p, name) in stops {
        let _ = writeln!(
            o,
            "    <rtept lat=\"{:.6}\" lon=\"{:.6}\"><name>{}</name></rtept>",
            p.lat_deg,
            p.lon_deg,
            xml(&name)
        );
    }
    let _ = writeln!(o, "  </rte>");
}

/// GPX 1.1 of the plan: a waypoint at each day's best three stretches, and a route
/// from the home port to each day's best.
fn gpx(plan: &Plan) -> String {
    let mut o = gpx_start(plan);
    let mut chosen: Vec<usize> = Vec::new();
    for day in &plan.days {
        for r in day.ranked.iter().take(GPX_STRETCHES_PER_DAY) {
            if !chosen.contains(&r.stretch) {
                chosen.push(r.stretch);
            }
        }
    }
    gpx_waypoints(&mut o, plan, &chosen);
    for day in &plan.days {
        let Some(best) = day.ranked.first() else {
            continue;
        };
        let name = format!(
            "{} to {}",
            day.date.format("%a %-d %b"),
            plan.stretches[best.stretch].name
        );
        let desc = ranked_lines(plan, day.date, best, FILE_UNITS).join("; ");
        gpx_route(&mut o, plan, &name, &desc, best.stretch);
    }
    let _ = writeln!(o, "</gpx>");
    o
}

/// GPX 1.1 of chosen stretches (indices into the plan's stretches): a waypoint at each,
/// with its ranks, and a route from the home port to each.
#[must_use]
pub fn gpx_of_stretches(plan: &Plan, chosen: &[usize]) -> String {
    let mut o = gpx_start(plan);
    gpx_waypoints(&mut o, plan, chosen);
    for &k in chosen {
        let name = format!("{} to {}", plan.port.name, plan.stretches[k].name);
        let desc = format!(
            "{} from {}",
            FILE_UNITS.distance(plan.stretches[k].distance_nm),
            plan.port.name
        );
        gpx_route(&mut o, plan, &name, &desc, k);
    }
    let _ = writeln!(o, "</gpx>");
    o
}
