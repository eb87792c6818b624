//! Sea temperature measured near the coast, to check the upwelling the tool computed
//! against it (`shelfwind verify`, [`crate::upwelling::check_segment`]).
//!
//! Point series come from CSV files (a buoy's or a boat's log, [`read_sst_csv`]) and
//! NMEA 0183 logs ([`read_nmea_log`]). A series with a position is sampled by the wind's
//! nearest-station rule; one without a position applies to every segment.

mod csv;
mod nmea;

pub use csv::read_sst_csv;
pub use nmea::{NmeaReport, read_nmea_log};

use crate::coast::LatLon;
use chrono::{DateTime, Utc};

/// Sea temperatures outside this range, °C, are refused (or taken for a missing-value
/// code when the user names it): below the freezing point of sea water and above any
/// sea surface.
pub const SST_RANGE_C: (f64, f64) = (-2.5, 40.0);

/// The sea temperature at one place over time.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct SstSeries {
    /// Where it was measured, if the file says (a buoy); `None` applies everywhere.
    pub position: Option<LatLon>,
    /// Times, UTC, increasing.
    pub times: Vec<DateTime<Utc>>,
    /// Temperatures, °C, one per time.
    pub temps_c: Vec<f64>,
}

/// What is wrong in a sea-temperature file. The path is added by the caller.
#[derive(Debug, thiserror::Error)]
pub enum SstError {
    /// A problem at a line.
    #[error("line {line}: {problem}")]
    Line {
        /// 1-based line number.
        line: u64,
        /// What was wrong and what was expected.
        problem: String,
    },
    /// A problem with the file as a whole.
    #[error("{0}")]
    File(String),
}

/// The series of a sea-temperature file at `path`, read by its content: an NMEA log
/// (lines starting with `$` or `!`) or CSV. `missing` lists numbers that stand for a
/// missing value (such as 99 or 999). With the series comes a warning to show, if
/// something was skipped (an NMEA log's bad sentences, by line).
pub fn read_sst_file(
    path: &std::path::Path,
    missing: &[f64],
) -> Result<(SstSeries, Option<String>), String> {
    let name = path.display();
    let bytes = std::fs::read(path).map_err(|e| format!("{name}: cannot read the file: {e}"))?;
    let text = String::from_utf8(bytes).map_err(|_| {
        format!("{name}: not a sea-temperature file: expected CSV text or an NMEA 0183 log")
    })?;
    let first = text
        .lines()
        .map(str::trim)
        .find(|l| !l.is_empty() && !l.starts_with('#'))
        .unwrap_or("");
    if first.starts_with('$') || first.starts_with('!') {
        let (series, report) = read_nmea_log(&text).map_err(|e| format!("{name}: {e}"))?;
        let mut skipped = Vec::new();
        if !report.bad_lines.is_empty() {
            let lines: Vec<String> = report
                .bad_lines
                .iter()
                .take(20)
                .map(u64::to_string)
                .collect();
            skipped.push(format!(
                "{} bad sentence(s) skipped (checksum or damage) at line(s) {}{}",
                report.bad_lines.len(),
                lines.join(", "),
                if report.bad_lines.len() > 20 {
                    ", …"
                } else {
                    ""
                }
            ));
        }
        if report.without_fix > 0 {
            skipped.push(format!(
                "{} temperature(s) before the first valid RMC position fix skipped",
                report.without_fix
            ));
        }
        let warning = (!skipped.is_empty()).then(|| format!("{name}: {}", skipped.join("; ")));
        Ok((series, warning))
    } else {
        read_sst_csv(&text, missing)
            .map(|s| (s, None))
            .map_err(|e| format!("{name}: {e}"))
    }
}
