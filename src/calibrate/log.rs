//! The catch log: a co-op's landings as CSV. `#` comment lines, then a header (any
//! case; README, "Calibrating on a catch log"):
//! - `date` (also `day`, `landing_date`): YYYY-MM-DD, the scenario's local day;
//! - where: `stretch_id`, or `segment_id`, or `lat` and `lon` (also `latitude`,
//!   `longitude`), in decimal degrees; the first of these a row fills is used;
//! - `catch_kg` (also `landed_kg`);
//! - effort: `effort_h` (also `hours_fished`) or `trips`;
//! - optional `species` and `vessel` (also `boat`), to filter on.
//!
//! Catch per unit effort (CPUE) is catch ÷ effort. A row with zero or negative effort,
//! a negative catch, a bad date or number, or no place is an error naming its line; with
//! `skip_bad` such rows are skipped and counted instead.

use crate::coast::LatLon;
use crate::wind::find_column as find;
use chrono::NaiveDate;

const DATE: &[&str] = &["date", "day", "landing_date"];
const STRETCH: &[&str] = &["stretch_id"];
const SEGMENT: &[&str] = &["segment_id"];
const LAT: &[&str] = &["lat", "latitude"];
const LON: &[&str] = &["lon", "longitude"];
const CATCH: &[&str] = &["catch_kg", "landed_kg"];
const HOURS: &[&str] = &["effort_h", "hours_fished"];
const TRIPS: &[&str] = &["trips"];
const SPECIES: &[&str] = &["species"];
const VESSEL: &[&str] = &["vessel", "boat"];

/// Where a landing was caught.
#[derive(Debug, Clone, PartialEq)]
pub enum Place {
    /// A stretch, by its id (`<segment id>/<n>`).
    Stretch(String),
    /// A segment, by its id: compared with the mean over its stretches.
    Segment(String),
    /// A position: the nearest stretch within the set distance.
    Position(LatLon),
}

/// What effort is counted in.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum EffortUnit {
    /// Hours fished.
    Hours,
    /// Trips.
    Trips,
}

impl EffortUnit {
    /// The unit's name, for CPUE ("kg per hour").
    #[must_use]
    pub fn name(self) -> &'static str {
        match self {
            Self::Hours => "hour",
            Self::Trips => "trip",
        }
    }
}

/// One landing.
#[derive(Debug, Clone, PartialEq)]
pub struct CatchRow {
    /// Its line in the file.
    pub line: u64,
    /// The local day.
    pub date: NaiveDate,
    /// Where.
    pub place: Place,
    /// Catch, kg.
    pub catch_kg: f64,
    /// Effort, in the log's unit.
    pub effort: f64,
    /// Species, if the log says.
    pub species: Option<String>,
    /// Vessel, if the log says.
    pub vessel: Option<String>,
}

impl CatchRow {
    /// Catch per unit effort, kg per hour or per trip.
    #[must_use]
    pub fn cpue(&self) -> f64 {
        self.catch_kg / self.effort
    }
}

/// A catch log as read.
#[derive(Debug, Clone, PartialEq)]
pub struct CatchLog {
    /// Its landings, in file order.
    pub rows: Vec<CatchRow>,
    /// What effort is counted in.
    pub effort_unit: EffortUnit,
    /// Rows skipped (with `skip_bad`): line and why.
    pub skipped: Vec<(u64, String)>,
}

/// What is wrong in a catch log. The path is added by the caller.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("line {line}: {problem}")]
pub struct CatchLogError {
    /// The line.
    pub line: u64,
    /// What is wrong, and what was expected.
    pub problem: String,
}

fn err(line: u64, problem: impl Into<String>) -> CatchLogError {
    CatchLogError {
        line,
        problem: problem.into(),
    }
}

/// The columns found in the header.
struct Columns {
    date: usize,
    stretch: Option<usize>,
    segment: Option<usize>,
    position: Option<(usize, usize)>,
    catch: usize,
    effort: usize,
    species: Option<usize>,
    vessel: Option<usize>,
}

fn columns(names: &[String], line: u64) -> Result<(Columns, EffortUnit), CatchLogError> {
    let need = |list: &[&str], what: &str| {
        find(names, list).ok_or_else(|| {
            err(
                line,
                format!(
                    "no {what} column: expected one of {} in the header",
                    list.join(", ")
                ),
            )
        })
    };
    let (effort, unit) = match (find(names, HOURS), find(names, TRIPS)) {
        (Some(h), _) => (h, EffortUnit::Hours),
        (None, Some(t)) => (t, EffortUnit::Trips),
        (None, None) => {
            return Err(err(
                line,
                format!(
                    "no effort column: expected one of {} (hours) or trips in the header",
                    HOURS.join(", ")
                ),
            ));
        }
    };
    let c = Columns {
        date: need(DATE, "date")?,
        stretch: find(names, STRETCH),
        segment: find(names, SEGMENT),
        position: find(names, LAT).zip(find(names, LON)),
        catch: need(CATCH, "catch")?,
        effort,
        species: find(names, SPECIES),
        vessel: find(names, VESSEL),
    };
    if c.stretch.is_none() && c.segment.is_none() && c.position.is_none() {
        return Err(err(
            line,
            "no place columns: expected stretch_id, segment_id, or lat and lon in the header",
        ));
    }
    Ok((c, unit))
}

fn number(field: &str, what: &str) -> Result<f64, String> {
    field
        .parse::<f64>()
        .ok()
        .filter(|v| v.is_finite())
        .ok_or_else(|| format!("{what} \"{field}\" is not a number"))
}

fn row(record: &::csv::StringRecord, c: &Columns, line: u64) -> Result<CatchRow, String> {
    let get = |k: usize| record.get(k).unwrap_or("").trim();
    let date = NaiveDate::parse_from_str(get(c.date), "%Y-%m-%d")
        .map_err(|_| format!("date \"{}\" is not a day: expected YYYY-MM-DD", get(c.date)))?;
    let text = |k: Option<usize>| k.map(get).filter(|t| !t.is_empty()).map(str::to_string);
    let place = if let Some(id) = text(c.stretch) {
        Place::Stretch(id)
    } else if let Some(id) = text(c.segment) {
        Place::Segment(id)
    } else if let Some((a, b)) = c
        .position
        .filter(|(a, b)| !get(*a).is_empty() || !get(*b).is_empty())
    {
        let lat = number(get(a), "lat")?;
        let lon = number(get(b), "lon")?;
        if !(-90.0..=90.0).contains(&lat) || !(-180.0..=360.0).contains(&lon) {
            return Err(format!("position {lat}, {lon} is not on the Earth"));
        }
        Place::Position(LatLon::new(
            lat,
            if lon > 180.0 { lon - 360.0 } else { lon },
        ))
    } else {
        return Err("no place: expected a stretch_id, a segment_id, or lat and lon".into());
    };
    let catch_kg = number(get(c.catch), "catch")?;
    if catch_kg < 0.0 {
        return Err(format!("catch {catch_kg} kg is negative"));
    }
    let effort = number(get(c.effort), "effort")?;
    if effort <= 0.0 {
        return Err(format!(
            "effort {effort} is not above 0: CPUE needs some effort"
        ));
    }
    Ok(CatchRow {
        line,
        date,
        place,
        catch_kg,
        effort,
        species: text(c.species),
        vessel: text(c.vessel),
    })
}

/// Reads a catch log (see the module documentation).
pub fn read_catch_log(text: &str, skip_bad: bool) -> Result<CatchLog, CatchLogError> {
    let mut reader = ::csv::ReaderBuilder::new()
        .comment(Some(b'#'))
        .trim(::csv::Trim::All)
        .flexible(false)
        .from_reader(text.as_bytes());
    let problem = |e: ::csv::Error| {
        let (line, p) = crate::wind::csv_problem(&e);
        err(line, p)
    };
    let header = reader.headers().map_err(problem)?.clone();
    let header_line = header.position().map_or(1, ::csv::Position::line);
    let names: Vec<String> = header.iter().map(str::to_ascii_lowercase).collect();
    let (c, effort_unit) = columns(&names, header_line)?;
    let mut log = CatchLog {
        rows: Vec::new(),
        effort_unit,
        skipped: Vec::new(),
    };
    for record in reader.records() {
        let record = record.map_err(problem)?;
        let line = record.position().map_or(0, ::csv::Position::line);
        match row(&record, &c, line) {
            Ok(r) => log.rows.push(r),
            Err(p) if skip_bad => log.skipped.push((line, p)),
            Err(p) => return Err(err(line, p)),
        }
    }
    if log.rows.is_empty() {
        return Err(err(header_line, "no landings after the header"));
    }
    Ok(log)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Every header variant is found, any case.
    #[test]
    fn header_variants() {
        for (header, row, unit) in [
            (
                "date,stretch_id,catch_kg,effort_h",
                "2027-05-01,a/0,10,2",
                EffortUnit::Hours,
            ),
            (
                "Day,Segment_ID,Landed_kg,Trips",
                "2027-05-01,a,10,2",
                EffortUnit::Trips,
            ),
            (
                "landing_date,latitude,longitude,catch_kg,hours_fished,species,boat",
                "2027-05-01,38.5,-123.2,10,2,rockfish,Skua",
                EffortUnit::Hours,
            ),
            (
                "DATE,LAT,LON,CATCH_KG,EFFORT_H,VESSEL",
                "2027-05-01,38.5,236.8,10,2,Skua",
                EffortUnit::Hours,
            ),
        ] {
            let log = read_catch_log(&format!("# a comment\n{header}\n{row}\n"), false)
                .unwrap_or_else(|e| panic!("{header}: {e}"));
            assert_eq!(log.effort_unit, unit, "{header}");
            let r = &log.rows[0];
            assert_eq!(r.line, 3);
            assert!((r.cpue() - 5.0).abs() < 1e-12);
            if let Place::Position(p) = &r.place {
                assert!((p.lon_deg + 123.2).abs() < 1e-9, "{p:?}");
            }
        }
    }

    /// Bad rows are named by line, or skipped and counted when asked.
    #[test]
    fn bad_rows_are_named() {
        let text = "date,stretch_id,catch_kg,effort_h\n2027-05-01,a/0,10,2\n2027-05-02,a/0,10,0\n2027-05-03,a/0,-1,2\n2027-13-01,a/0,1,2\n2027-05-04,,1,2\n";
        let e = read_catch_log(text, false).expect_err("zero effort");
        assert_eq!(e.line, 3);
        assert!(e.problem.contains("effort 0"), "{e}");
        let log = read_catch_log(text, true).expect("skipping");
        assert_eq!(log.rows.len(), 1);
        let lines: Vec<u64> = log.skipped.iter().map(|s| s.0).collect();
        assert_eq!(lines, vec![3, 4, 5, 6]);
        assert!(log.skipped[1].1.contains("negative"));
        assert!(log.skipped[2].1.contains("YYYY-MM-DD"));
        assert!(log.skipped[3].1.contains("no place"));
        let e = read_catch_log("date,catch_kg,effort_h\n2027-05-01,1,1\n", false)
            .expect_err("no place column");
        assert!(e.problem.contains("stretch_id"), "{e}");
        let e = read_catch_log("date,stretch_id,catch_kg\n", false).expect_err("no effort");
        assert!(e.problem.contains("effort_h"), "{e}");
    }
}
