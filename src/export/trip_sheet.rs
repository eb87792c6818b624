//! The printable trip sheet: one planned day as a single self-contained HTML page to take
//! to the boat. Inline CSS with a print stylesheet for A4 portrait, inline SVG for the map
//! and the plots, no scripts and nothing fetched, and readable when printed in black and
//! white: lines carry dark edges and dashes, over-limit hours are hatched, the upwelling
//! bars sit above or below a zero line.
//!
//! In order: the day, the boat, port and time zone; the cautions and the plan's notes; a
//! map of the home port and the day's stretches (`map`); the ranked list with the parts
//! of each score and its reasons; the stretches left out and why; the wind and the
//! upwelling index hour by hour at the day's best three stretches (`plots`); the cautions
//! again.

mod map;
mod plots;

use super::colour::{hex, productivity_colour};
use super::plan_text::{excluded_text, notes, ranked_lines};
use super::units::Units;
use crate::coast::{Land, LatLon};
use crate::localtime::{local_midnight, local_noon};
use crate::plan::{CAUTIONS, DayPlan, Plan, RankedStretch};
use chrono::{DateTime, Duration, NaiveDate, Utc};
use chrono_tz::Tz;
use std::fmt::Write as _;

/// A self-contained, printable HTML trip sheet for one planned day.
///
/// `day` indexes [`Plan::days`]; a day the plan does not have gives a sheet that says
/// so. `land` is drawn on the map (the bundled land polygons in the app and the command
/// line). Times are local to the plan's time zone with UTC beside them; wind in knots,
/// distances in nautical miles, fuel in litres.
#[must_use]
pub fn trip_sheet_html(plan: &Plan, land: &Land, day: usize, units: Units) -> String {
    let mut o = String::with_capacity(96 * 1024);
    let day_plan = plan.days.get(day);
    let title = match day_plan {
        Some(d) => format!(
            "Trip sheet, {}: {}",
            d.date.format("%a %-d %b %Y"),
            plan.scenario_name
        ),
        None => format!("Trip sheet: {}", plan.scenario_name),
    };
    head(&mut o, &title);
    header(&mut o, plan, day_plan.map(|d| d.date), units);
    cautions(&mut o, plan);
    match day_plan {
        Some(d) => {
            map::map_section(&mut o, plan, land, d);
            ranked_section(&mut o, plan, d, units);
            excluded_section(&mut o, plan, d, units);
            plots::plots_section(&mut o, plan, d);
        }
        None => {
            let _ = writeln!(
                o,
                "<p class=\"none\">Day {} is not in this plan: it has {} planned day(s).</p>",
                day + 1,
                plan.days.len()
            );
        }
    }
    footer(&mut o);
    o
}

/// Escapes text for HTML element content and double- or single-quoted attributes.
fn esc(s: &str) -> String {
    let mut o = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => o.push_str("&amp;"),
            '<' => o.push_str("&lt;"),
            '>' => o.push_str("&gt;"),
            '"' => o.push_str("&quot;"),
            '\'' => o.push_str("&#39;"),
            c => o.push(c),
        }
    }
    o
}

/// A number with at most one decimal, without a trailing ".0".
fn num(x: f64) -> String {
    let s = format!("{x:.1}");
    match s.strip_suffix(".0") {
        Some(whole) => whole.to_string(),
        None => s,
    }
}

/// "3 h 30 min", "45 min".
fn duration_text(minutes: f64) -> String {
    let m = minutes.round() as i64;
    match (m / 60, m % 60) {
        (0, m) => format!("{m} min"),
        (h, 0) => format!("{h} h"),
        (h, m) => format!("{h} h {m:02} min"),
    }
}

/// Degrees and decimal minutes, as on a chart: `38°26.4′ N`.
fn degrees_minutes(value_deg: f64, positive: char, negative: char) -> String {
    let hemisphere = if value_deg < 0.0 { negative } else { positive };
    let a = value_deg.abs();
    let mut deg = a.floor();
    let mut min = ((a - deg) * 600.0).round() / 10.0;
    if min >= 60.0 {
        deg += 1.0;
        min = 0.0;
    }
    format!("{deg:.0}°{min:04.1}′ {hemisphere}")
}

fn position_text(p: LatLon) -> String {
    format!(
        "{} {}",
        degrees_minutes(p.lat_deg, 'N', 'S'),
        degrees_minutes(p.lon_deg, 'E', 'W')
    )
}

fn local(tz: Tz, t: DateTime<Utc>) -> String {
    t.with_timezone(&tz).format("%H:%M").to_string()
}

fn utc(t: DateTime<Utc>) -> String {
    t.format("%H:%MZ").to_string()
}

/// Start and end of a local day, UTC (23 or 25 hours apart on clock-change days).
fn day_bounds(tz: Tz, date: NaiveDate) -> (DateTime<Utc>, DateTime<Utc>) {
    let start = local_midnight(tz, date);
    let end = date
        .succ_opt()
        .map_or(start + Duration::hours(24), |next| local_midnight(tz, next));
    (start, end)
}

/// "UTC-07:00" on a given day.
fn utc_offset(tz: Tz, date: NaiveDate) -> String {
    local_noon(tz, date)
        .with_timezone(&tz)
        .format("UTC%:z")
        .to_string()
}

fn rank_label(r: &RankedStretch) -> String {
    if r.tied_with_above {
        format!("={}", r.rank)
    } else {
        r.rank.to_string()
    }
}

/// Colour of a ranked stretch: its score as a share of 100 on the productivity scale.
fn score_colour(r: &RankedStretch) -> String {
    hex(productivity_colour(r.score / 100.0))
}

const STYLE: &str = r#"
@page { size: A4 portrait; margin: 11mm 12mm 12mm 12mm; }
html { background: #fff; color: #000; }
body { font-family: "DejaVu Sans", "Liberation Sans", Arial, Helvetica, sans-serif;
  font-size: 10pt; line-height: 1.3; max-width: 186mm; margin: 0 auto; padding: 6mm 4mm; }
h1 { font-size: 17pt; margin: 0; }
h2 { font-size: 12pt; margin: 5mm 0 1.5mm; border-bottom: 1.5pt solid #000; break-after: avoid; }
h3 { font-size: 10.5pt; margin: 3mm 0 1mm; break-after: avoid; }
.maker { float: right; font-size: 8.5pt; color: #333; text-align: right; }
.scenario { font-size: 11pt; margin: 0.5mm 0 2mm; }
table.facts { border-collapse: collapse; font-size: 9.5pt; }
table.facts th { text-align: left; padding: 0.3mm 3mm 0.3mm 0; vertical-align: top; }
table.facts td { padding: 0.3mm 0; }
.cautions { border: 2.5pt solid #000; padding: 2mm 3.5mm; margin: 3.5mm 0 1mm; break-inside: avoid; }
.cautions .title { font-weight: bold; font-size: 11pt; letter-spacing: 0.05em; margin: 0 0 0.8mm; }
.cautions .text { font-weight: bold; margin: 0; }
.cautions ul { margin: 1.5mm 0 0; padding-left: 5mm; font-size: 9pt; }
svg.map { display: block; width: 100%; height: auto; }
.legend { font-size: 8.5pt; margin: 1mm 0 0; }
.legend svg { display: inline; vertical-align: middle; width: 9mm; height: 3.2mm; }
table.ranked { border-collapse: collapse; width: 100%; font-size: 8.5pt; }
table.ranked th { background: #e8e8e8; border: 0.6pt solid #777; padding: 0.6mm 0.7mm;
  text-align: center; vertical-align: bottom; font-weight: bold; font-size: 8pt; }
table.ranked td { border-left: 0.6pt solid #bbb; border-right: 0.6pt solid #bbb;
  padding: 0.8mm 0.8mm; vertical-align: top; }
table.ranked tbody { break-inside: avoid; border-top: 1.2pt solid #000; }
table.ranked thead { display: table-header-group; }
td.n { text-align: right; white-space: nowrap; font-variant-numeric: tabular-nums; }
td.rank { text-align: center; font-weight: bold; font-size: 11pt; white-space: nowrap; }
td.score { text-align: right; font-weight: bold; font-size: 11pt; white-space: nowrap; }
td.when { white-space: nowrap; }
.swatch { display: inline-block; width: 3.2mm; height: 3.2mm; border: 0.8pt solid #000;
  vertical-align: -0.4mm; margin-right: 1mm; }
.name { font-weight: bold; }
td.stretch { min-width: 34mm; }
.small { font-size: 7.5pt; color: #333; }
tr.reasons td { border-top: 0.4pt dotted #999; padding-bottom: 1.2mm; }
tr.reasons ul { margin: 0; padding-left: 4.5mm; }
ul.excluded { margin: 0; padding-left: 5mm; font-size: 9pt; }
ul.excluded li { margin-bottom: 0.6mm; }
.plotblock { break-inside: avoid; }
.plots { display: flex; gap: 3mm; }
.plots svg { display: block; width: 50%; height: auto; }
.caption { font-size: 8.5pt; margin: 1mm 0 0; }
.none { font-weight: bold; }
.foot { margin-top: 5mm; border-top: 1.2pt solid #000; padding-top: 1.2mm; font-size: 8pt; }
@media print {
  body { max-width: none; padding: 0; }
  * { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
  .map, .plotblock, .cautions { break-inside: avoid; }
}
"#;

fn head(o: &mut String, title: &str) {
    let _ = writeln!(o, "<!DOCTYPE html>");
    let _ = writeln!(o, "<html lang=\"en\">");
    let _ = writeln!(o, "<head>");
    let _ = writeln!(o, "<meta charset=\"utf-8\"/>");
    let _ = writeln!(o, "<title>{}</title>", esc(title));
    let _ = writeln!(o, "<style>{STYLE}</style>");
    let _ = writeln!(o, "</head>");
    let _ = writeln!(o, "<body>");
}

fn header(o: &mut String, plan: &Plan, date: Option<NaiveDate>, units: Units) {
    let v = &plan.vessel;
    let _ = writeln!(
        o,
        "<div class=\"maker\">Trip sheet<br/>generated by Shelfwind {}</div>",
        env!("CARGO_PKG_VERSION")
    );
    let day_text = date.map_or_else(
        || "No planned day".to_string(),
        |d| d.format("%A %-d %B %Y").to_string(),
    );
    let _ = writeln!(o, "<h1>{}</h1>", esc(&day_text));
    let _ = writeln!(o, "<p class=\"scenario\">{}</p>", esc(&plan.scenario_name));
    let _ = writeln!(o, "<table class=\"facts\">");
    let _ = writeln!(
        o,
        "<tr><th>Boat</th><td>{}: cruise {}, wind limit {}, range {}, {} at cruise{}</td></tr>",
        esc(&v.name),
        units.speed(v.cruise_speed_kt),
        units.wind(v.wind_limit_kt),
        units.distance(v.range_nm),
        units.fuel_rate(v.fuel_l_per_h),
        v.wave_limit_m
            .map(|m| format!(", wave limit {m:.1} m"))
            .unwrap_or_default()
    );
    let _ = writeln!(
        o,
        "<tr><th>Home port</th><td>{}, {}</td></tr>",
        esc(&plan.port.name),
        position_text(plan.port.position)
    );
    let offset = date.map_or_else(String::new, |d| {
        format!(", {} on this day", utc_offset(plan.time_zone, d))
    });
    let _ = writeln!(
        o,
        "<tr><th>Times</th><td>local, {}{}; UTC in brackets, marked Z</td></tr>",
        esc(plan.time_zone.name()),
        offset
    );
    let _ = writeln!(o, "</table>");
}

fn cautions(o: &mut String, plan: &Plan) {
    let _ = writeln!(o, "<div class=\"cautions\">");
    let _ = writeln!(o, "<p class=\"title\">CAUTION</p>");
    let _ = writeln!(o, "<p class=\"text\">{}</p>", esc(CAUTIONS));
    if !plan.notes.is_empty() {
        let _ = writeln!(o, "<ul>");
        for n in notes(plan) {
            let _ = writeln!(o, "<li>{}</li>", esc(&n));
        }
        let _ = writeln!(o, "</ul>");
    }
    let _ = writeln!(o, "</div>");
}

fn footer(o: &mut String) {
    let _ = writeln!(
        o,
        "<div class=\"foot\"><b>Caution:</b> {} <span class=\"small\">Shelfwind {}</span></div>",
        esc(CAUTIONS),
        env!("CARGO_PKG_VERSION")
    );
    let _ = writeln!(o, "</body>");
    let _ = writeln!(o, "</html>");
}

// ---------------------------------------------------------------------------------------
// SVG pieces shared by the map and the plots.

/// Text with a white halo, readable over land, sea and lines.
fn halo_text(o: &mut String, x: f64, y: f64, anchor: &str, size: f64, bold: bool, text: &str) {
    let _ = writeln!(
        o,
        "<text x=\"{x:.1}\" y=\"{y:.1}\" text-anchor=\"{anchor}\" font-size=\"{size}\"{} fill=\"#000\" stroke=\"#fff\" stroke-width=\"3.5\" stroke-linejoin=\"round\" paint-order=\"stroke\">{}</text>",
        if bold { " font-weight=\"bold\"" } else { "" },
        esc(text)
    );
}

/// The `points` attribute of a polyline, one decimal.
fn points_attr(xy: &[(f64, f64)]) -> String {
    let mut s = String::with_capacity(xy.len() * 12);
    for (k, (x, y)) in xy.iter().enumerate() {
        let _ = write!(s, "{}{x:.1},{y:.1}", if k == 0 { "" } else { " " });
    }
    s
}

/// A round number (1, 2 or 5 times a power of ten) near `target`: the scale bar's length,
/// the plots' tick step.
fn nice_step(target: f64) -> f64 {
    if !(target.is_finite() && target > 0.0) {
        return 1.0;
    }
    let p = 10_f64.powf(target.log10().floor());
    let m = target / p;
    let n = if m < 1.5 {
        1.0
    } else if m < 3.5 {
        2.0
    } else if m < 7.5 {
        5.0
    } else {
        10.0
    };
    n * p
}

// ---------------------------------------------------------------------------------------
// The ranked list and the stretches left out.

fn ranked_section(o: &mut String, plan: &Plan, day: &DayPlan, units: Units) {
    let tz = plan.time_zone;
    let _ = writeln!(o, "<h2>Where to go: ranked stretches</h2>");
    if day.ranked.is_empty() {
        let _ = writeln!(
            o,
            "<p class=\"none\">{} Below: why each was left out.</p>",
            esc(&super::plan_text::no_stretch_text(day))
        );
        return;
    }
    let _ = writeln!(o, "<table class=\"ranked\">");
    let _ = writeln!(o, "<thead>");
    let _ = writeln!(
        o,
        "<tr><th rowspan=\"2\">Rank</th><th rowspan=\"2\">Stretch</th><th rowspan=\"2\">Score<br/>0–100</th><th colspan=\"3\">Parts of the score</th><th rowspan=\"2\">Safe window<br/>local (UTC)</th><th rowspan=\"2\">Fishing<br/>hours</th><th colspan=\"3\">From {}</th></tr>",
        esc(&plan.port.name)
    );
    let _ = writeln!(
        o,
        "<tr><th>productivity</th><th>window</th><th>distance</th><th>distance</th><th>steaming each way</th><th>fuel, round trip</th></tr>"
    );
    let _ = writeln!(o, "</thead>");
    for r in &day.ranked {
        let s = &plan.stretches[r.stretch];
        let (from, to) = r.safe_window;
        let _ = writeln!(o, "<tbody>");
        let _ = writeln!(
            o,
            "<tr class=\"stretch\"><td class=\"rank\">{}</td><td class=\"stretch\"><span class=\"name\">{}</span><br/><span class=\"small\">{}</span></td><td class=\"score\"><span class=\"swatch\" style=\"background:{}\"></span>{:.0}</td><td class=\"n\">{:.0} %</td><td class=\"n\">{:.2}</td><td class=\"n\">{:.2}</td><td class=\"when\">{}–{}<br/><span class=\"small\">({}–{})</span></td><td class=\"n\">{:.1} h</td><td class=\"n\">{}</td><td class=\"n\">{}</td><td class=\"n\">{}</td></tr>",
            esc(&rank_label(r)),
            esc(&s.name),
            position_text(s.centre),
            score_colour(r),
            r.score,
            100.0 * r.productivity,
            r.window_factor,
            r.distance_factor,
            local(tz, from),
            local(tz, to),
            utc(from),
            utc(to),
            r.fishing_hours,
            units.distance(s.distance_nm),
            duration_text(r.steam_minutes),
            units.fuel(r.fuel_l)
        );
        let _ = write!(o, "<tr class=\"reasons\"><td></td><td colspan=\"10\"><ul>");
        for reason in ranked_lines(plan, day.date, r, units) {
            let _ = write!(o, "<li>{}</li>", esc(&reason));
        }
        let _ = writeln!(o, "</ul></td></tr>");
        let _ = writeln!(o, "</tbody>");
    }
    let _ = writeln!(o, "</table>");
    let _ = writeln!(
        o,
        "<p class=\"caption\">Score = 100 × productivity × window × distance. Productivity: the expected productivity from the upwelling and its lag. Window: the fishing hours inside the safe window as a share of a full fishing day. Distance: 1 at the port, less with distance. Ties (=N) share rank N with the first stretch of their group: their scores are within a few points of that stretch's (the tie margin in the settings, 3 points unless changed).</p>"
    );
}

fn excluded_section(o: &mut String, plan: &Plan, day: &DayPlan, units: Units) {
    if day.excluded.is_empty() {
        return;
    }
    let _ = writeln!(o, "<h2>Not ranked this day</h2>");
    let _ = writeln!(o, "<ul class=\"excluded\">");
    // Stretches beyond the range are many and alike: one line for them all; others
    // that share a reason share a line.
    let (far, other): (Vec<_>, Vec<_>) = day
        .excluded
        .iter()
        .partition(|e| e.exclusion.is_out_of_range());
    let mut groups: Vec<(String, Vec<&str>)> = Vec::new();
    for e in other {
        let name = plan.stretches[e.stretch].name.as_str();
        let reason = excluded_text(plan, e, units);
        match groups.iter_mut().find(|g| g.0 == reason) {
            Some(g) => g.1.push(name),
            None => groups.push((reason, vec![name])),
        }
    }
    for (reason, names) in groups {
        let names: Vec<String> = names.iter().map(|n| esc(n)).collect();
        let _ = writeln!(o, "<li><b>{}</b>: {}</li>", names.join(", "), esc(&reason));
    }
    if !far.is_empty() {
        let names: Vec<String> = far
            .iter()
            .map(|e| esc(&plan.stretches[e.stretch].name))
            .collect();
        let _ = writeln!(
            o,
            "<li><b>{}</b>: {}</li>",
            esc(&format!(
                "beyond this boat's {} range from {}",
                units.distance(plan.vessel.range_nm),
                plan.port.name
            )),
            names.join(", ")
        );
    }
    let _ = writeln!(o, "</ul>");
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn escapes_markup_and_quotes() {
        assert_eq!(
            esc("<b>&\"x\" 'y'"),
            "&lt;b&gt;&amp;&quot;x&quot; &#39;y&#39;"
        );
    }

    #[test]
    fn positions_in_degrees_and_minutes() {
        assert_eq!(
            position_text(LatLon::new(38.44, -123.14)),
            "38°26.4′ N 123°08.4′ W"
        );
        assert_eq!(degrees_minutes(-0.999_99, 'N', 'S'), "1°00.0′ S");
    }

    #[test]
    fn a_clock_change_day_has_its_real_length() {
        let tz: Tz = "Europe/Lisbon".parse().expect("zone");
        let (a, b) = day_bounds(tz, NaiveDate::from_ymd_opt(2027, 3, 28).expect("date"));
        assert_eq!((b - a).num_hours(), 23);
    }
}
