//! The season comparison for a co-op's members: one row per segment and season with the
//! metrics, then the climatology of each segment (mean across complete seasons).

use crate::upwelling::{SeasonFlag, SegmentSeasons};
use serde_json::json;
use std::fmt::Write as _;

/// Output formats of `season`.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SeasonFormat {
    /// Readable in a terminal.
    Table,
    /// One row per segment and season, then one climatology row per segment.
    Csv,
    /// Everything, including the day-by-day climatology.
    Json,
}

fn opt(v: Option<f64>, decimals: usize) -> String {
    v.map(|x| format!("{x:.decimals$}")).unwrap_or_default()
}

const MONTHS: [&str; 12] = [
    "jan", "feb", "mar", "apr", "may", "jun", "jul", "aug", "sep", "oct", "nov", "dec",
];

/// Month names in season order.
fn month_names(southern: bool) -> Vec<&'static str> {
    (0..12)
        .map(|m| MONTHS[(m + if southern { 6 } else { 0 }) % 12])
        .collect()
}

/// Renders the comparison.
#[must_use]
pub fn render_seasons(segments: &[SegmentSeasons], format: SeasonFormat) -> String {
    match format {
        SeasonFormat::Table => table(segments),
        SeasonFormat::Csv => csv(segments),
        SeasonFormat::Json => {
            let mut s = serde_json::to_string_pretty(&json!(
                segments
                    .iter()
                    .map(|s| json!({
                        "segment_id": s.segment_id,
                        "name": s.name,
                        "season_starts": if s.southern { "1 July" } else { "1 January" },
                        "years": s.years,
                        "climatology": s.climatology,
                    }))
                    .collect::<Vec<_>>()
            ))
            .unwrap_or_default();
            s.push('\n');
            s
        }
    }
}

/// Why a season has no metrics, in words (empty when it has them).
#[must_use]
pub fn flag_text(flag: Option<&SeasonFlag>) -> String {
    match flag {
        None => String::new(),
        Some(SeasonFlag::Incomplete { coverage, needed }) => format!(
            "incomplete: {:.0} % of days have data, {:.0} % needed",
            100.0 * coverage,
            100.0 * needed
        ),
    }
}

fn table(segments: &[SegmentSeasons]) -> String {
    let mut o = String::new();
    let _ = writeln!(
        o,
        "Season metrics of the coastal upwelling index (Bograd et al. 2009): cumulative index from the season start; days are UTC."
    );
    let _ = writeln!(
        o,
        "Units: index m³/s per 100 m of coast; totals m³/s per 100 m × days. Seasons with too little data are flagged and get no metrics."
    );
    for s in segments {
        let _ = writeln!(
            o,
            "\n{} ({}), seasons from {}",
            s.name,
            s.segment_id,
            if s.southern { "1 July" } else { "1 January" }
        );
        let _ = writeln!(
            o,
            "  {:<6}{:>9}{:>12}{:>13}{:>12}{:>11}{:>8}{:>10}  note",
            "season", "coverage", "mean index", "transition", "end", "length d", "events", "total",
        );
        for y in &s.years {
            let _ = writeln!(
                o,
                "  {:<6}{:>8.0}%{:>12}{:>13}{:>12}{:>11}{:>8}{:>10}  {}",
                y.year,
                100.0 * y.coverage,
                opt(y.mean_index, 0),
                y.spring_transition
                    .map(|d| d.format("%-d %b").to_string())
                    .unwrap_or_default(),
                y.season_end
                    .map(|d| d.format("%-d %b").to_string())
                    .unwrap_or_default(),
                y.length_days.map(|l| l.to_string()).unwrap_or_default(),
                y.event_count,
                opt(y.total_upwelling, 0),
                flag_text(y.flag.as_ref())
            );
        }
        let c = &s.climatology;
        let _ = writeln!(
            o,
            "  climatology over {} complete season(s): transition on day {} on average, length {} days, total {}, {} events a season",
            c.years_used,
            opt(c.mean_transition_day, 0),
            opt(c.mean_length_days, 0),
            opt(c.mean_total, 0),
            opt(c.mean_event_count, 1)
        );
        let months: Vec<String> = month_names(s.southern)
            .iter()
            .zip(c.monthly_mean.iter().zip(&c.monthly_sd))
            .map(|(m, (mean, sd))| format!("{m} {}±{}", opt(*mean, 0), opt(*sd, 0)))
            .collect();
        let _ = writeln!(o, "  monthly mean index ± sd: {}", months.join(", "));
    }
    o
}

fn csv(segments: &[SegmentSeasons]) -> String {
    let mut w = csv::Writer::from_writer(Vec::new());
    let mut header = vec![
        "row",
        "segment_id",
        "name",
        "season",
        "season_start",
        "coverage_pct",
        "complete",
        "mean_index_m3s_per_100m",
        "spring_transition",
        "season_end",
        "length_days",
        "total_upwelling_m3s_per_100m_days",
        "filled_days",
        "event_count",
        "mean_event_days",
        "years_used",
    ]
    .into_iter()
    .map(String::from)
    .collect::<Vec<_>>();
    header.extend((1..=12).map(|m| format!("month{m:02}_mean")));
    header.push("flag".into());
    let _ = w.write_record(&header);
    for s in segments {
        for y in &s.years {
            let mut row = vec![
                "season".to_string(),
                s.segment_id.clone(),
                s.name.clone(),
                y.year.to_string(),
                y.season_start.to_string(),
                format!("{:.1}", 100.0 * y.coverage),
                y.complete.to_string(),
                opt(y.mean_index, 2),
                y.spring_transition
                    .map(|d| d.to_string())
                    .unwrap_or_default(),
                y.season_end.map(|d| d.to_string()).unwrap_or_default(),
                y.length_days.map(|l| l.to_string()).unwrap_or_default(),
                opt(y.total_upwelling, 1),
                y.filled_days.to_string(),
                y.event_count.to_string(),
                opt(y.mean_event_days, 2),
                String::new(),
            ];
            row.extend(y.monthly_mean.iter().map(|m| opt(*m, 2)));
            row.push(flag_text(y.flag.as_ref()));
            let _ = w.write_record(&row);
        }
        let c = &s.climatology;
        let mut row = vec![
            "climatology".to_string(),
            s.segment_id.clone(),
            s.name.clone(),
            String::new(),
            String::new(),
            String::new(),
            String::new(),
            String::new(),
            opt(c.mean_transition_day, 1),
            String::new(),
            opt(c.mean_length_days, 1),
            opt(c.mean_total, 1),
            String::new(),
            opt(c.mean_event_count, 2),
            String::new(),
            c.years_used.to_string(),
        ];
        row.extend(c.monthly_mean.iter().map(|m| opt(*m, 2)));
        row.push(if s.southern {
            "seasons from 1 July; spring_transition column is the mean day of season".into()
        } else {
            "spring_transition column is the mean day of season".into()
        });
        let _ = w.write_record(&row);
    }
    String::from_utf8(w.into_inner().unwrap_or_default()).unwrap_or_default()
}
