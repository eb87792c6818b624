//! `shelfwind verify`: the upwelling the tool computed for each segment against the sea
//! temperature measured near it ([`crate::upwelling::check_segment`]).

use crate::cli::{CliError, load_coast, write_output};
use crate::coast::{LatLon, Segment, distance_m};
use crate::progress::Progress;
use crate::scenario::ModelSettings;
use crate::sst::{SstSeries, read_sst_file};
use crate::upwelling::{
    CheckSettings, SegmentCheck, check_segment, daily_means, detect_events, index_series,
};
use crate::wind::{WindSource, assign_wind_merged, load_sources};
use chrono::NaiveDate;
use clap::ValueEnum;
use serde_json::{Value, json};
use std::collections::BTreeMap;
use std::fmt::Write as _;
use std::path::PathBuf;

/// Output format of `verify`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum VerifyFormatArg {
    /// Readable in a terminal.
    Table,
    /// One row per segment.
    Csv,
    /// Every number, with the correlation at each lag and each event.
    Json,
}

/// Arguments of `shelfwind verify`.
#[derive(Debug, clap::Args)]
pub struct VerifyArgs {
    /// The scenario (or a GeoJSON coast).
    pub scenario: PathBuf,
    /// Sea-temperature files: CSV series or NMEA 0183 logs; repeat for several.
    #[arg(long, value_name = "FILE", num_args = 1.., required = true)]
    pub sst: Vec<PathBuf>,
    /// Wind files of the same period (joined in time); default: the scenario's.
    #[arg(long, value_name = "FILE", num_args = 1..)]
    pub wind: Vec<PathBuf>,
    /// Numbers that mark a missing temperature in the files, comma-separated (e.g.
    /// 99,999).
    #[arg(long, value_name = "LIST", value_delimiter = ',')]
    pub sst_missing: Vec<f64>,
    /// Cooling that confirms an event, °C [default: the scenario's, else 0.5].
    #[arg(long)]
    pub cooling_c: Option<f64>,
    /// How far offshore a gridded temperature is read, km [default: the scenario's,
    /// else 10].
    #[arg(long)]
    pub probe_km: Option<f64>,
    /// Output format.
    #[arg(long, value_enum, default_value_t = VerifyFormatArg::Table)]
    pub format: VerifyFormatArg,
    /// Output file (written whole or not at all); standard output when absent.
    #[arg(long, value_name = "FILE")]
    pub out: Option<PathBuf>,
}

/// One segment's check, with its id and the daily series behind it.
#[derive(Debug, Clone)]
pub struct Verified {
    /// Segment id.
    pub segment_id: String,
    /// Daily mean index over UTC days, m³/s per 100 m of coast.
    pub index_daily: BTreeMap<NaiveDate, f64>,
    /// Daily mean sea temperature the segment took, °C (empty: none covers it).
    pub temp_daily: BTreeMap<NaiveDate, f64>,
    /// The check.
    pub check: SegmentCheck,
}

/// Every segment's check, in the segments' order, and what the readers warned of.
#[derive(Debug, Clone, Default)]
pub struct Verification {
    /// One per segment.
    pub segments: Vec<Verified>,
    /// Warnings from the sea-temperature readers (bad lines skipped), each naming its
    /// file.
    pub warnings: Vec<String>,
    /// The settings the check ran with.
    pub settings: CheckSettings,
}

/// What the check reads besides the coast and the wind.
#[derive(Debug, Clone)]
pub struct VerifyInput {
    /// Sea-temperature files, in order of preference.
    pub sst_files: Vec<PathBuf>,
    /// Numbers that mark a missing temperature in point series.
    pub missing: Vec<f64>,
    /// How far offshore a gridded temperature is read, km.
    pub probe_km: f64,
    /// Cooling that confirms an event, °C.
    pub cooling_c: f64,
}

/// Checks every segment's upwelling, computed from `wind` with the model `settings`,
/// against the sea temperature the input's files give it. Errors name the file.
pub fn verify_coast(
    segments: &[Segment],
    wind: &[WindSource],
    input: &VerifyInput,
    settings: &ModelSettings,
    progress: &Progress,
) -> Result<Verification, String> {
    for (name, value, lo, hi, unit) in [
        (
            "the cooling that confirms an event",
            input.cooling_c,
            0.1,
            10.0,
            "°C",
        ),
        (
            "the probe's distance offshore",
            input.probe_km,
            1.0,
            50.0,
            "km",
        ),
    ] {
        if !(value.is_finite() && (lo..=hi).contains(&value)) {
            return Err(format!(
                "{name} ({value} {unit}) is out of range: expected {lo} to {hi} {unit}"
            ));
        }
    }
    let probes: Vec<LatLon> = segments
        .iter()
        .map(|s| probe(s, input.probe_km * 1000.0))
        .collect();
    let mut warnings = Vec::new();
    let sst: Vec<Source> = input
        .sst_files
        .iter()
        .map(|p| read_source(p, &input.missing, &probes, &mut warnings))
        .collect::<Result<_, _>>()?;
    let winds = assign_wind_merged(wind, segments, progress).map_err(|e| e.to_string())?;
    let check = CheckSettings {
        cooling_c: input.cooling_c,
        ..CheckSettings::default()
    };
    let mut out = Vec::with_capacity(segments.len());
    for (k, (seg, wind)) in segments.iter().zip(&winds).enumerate() {
        let series = index_series(seg, wind, &settings.index).map_err(|e| e.to_string())?;
        let events = detect_events(&series.times, &series.index_m3s_per_100m, &settings.events);
        let temp_daily = series_for(&sst, k, seg.weighted_midpoint())
            .map(|s| daily_means(&s.times, &s.temps_c))
            .unwrap_or_default();
        out.push(Verified {
            segment_id: seg.id.clone(),
            index_daily: daily_means(&series.times, &series.index_m3s_per_100m),
            check: check_segment(
                (&series.times, &series.index_m3s_per_100m),
                &events,
                &temp_daily,
                &check,
            ),
            temp_daily,
        });
    }
    Ok(Verification {
        segments: out,
        warnings,
        settings: check,
    })
}

/// A sea-temperature file as read: a point series, or a grid sampled at each
/// segment's probe (`None` where the probe has no sea value at any time).
enum Source {
    Point(SstSeries),
    Grid(Vec<Option<SstSeries>>),
}

/// The probe of a segment: `offshore_m` off its midpoint along the length-weighted
/// mean of its pieces' offshore bearings.
#[must_use]
pub fn probe(seg: &Segment, offshore_m: f64) -> LatLon {
    let (mut x, mut y) = (0.0, 0.0);
    for p in seg.pieces() {
        x += p.length_m * p.offshore_bearing_deg.to_radians().sin();
        y += p.length_m * p.offshore_bearing_deg.to_radians().cos();
    }
    crate::coast::destination(
        seg.weighted_midpoint(),
        x.atan2(y).to_degrees().rem_euclid(360.0),
        offshore_m,
    )
}

/// The series segment `k` takes: in the order given, the first source that covers it —
/// a grid with a sea value at its probe, a point series without a position, or the
/// nearest of the positioned point series (the wind's rule).
fn series_for(all: &[Source], k: usize, at: LatLon) -> Option<&SstSeries> {
    let nearest = all
        .iter()
        .enumerate()
        .filter_map(|(i, s)| match s {
            Source::Point(p) => p.position.map(|p| (i, distance_m(p, at))),
            Source::Grid(_) => None,
        })
        .min_by(|a, b| a.1.total_cmp(&b.1))
        .map(|(i, _)| i);
    all.iter().enumerate().find_map(|(i, s)| match s {
        Source::Point(p) if p.position.is_none() || Some(i) == nearest => Some(p),
        Source::Grid(per) => per.get(k).and_then(Option::as_ref),
        Source::Point(_) => None,
    })
}

/// Reads a sea-temperature file: GRIB2 (by its first bytes) sampled at the probes, or
/// a point series.
fn read_source(
    path: &std::path::Path,
    missing: &[f64],
    probes: &[LatLon],
    warnings: &mut Vec<String>,
) -> Result<Source, String> {
    let name = path.display();
    let mut head = [0u8; 8];
    let read = std::fs::File::open(path)
        .and_then(|mut f| std::io::Read::read(&mut f, &mut head))
        .unwrap_or(0);
    let head = &head[..read];
    if crate::wind::is_netcdf(head) {
        let at: Vec<(f64, f64)> = probes.iter().map(|p| (p.lat_deg, p.lon_deg)).collect();
        let samples =
            crate::wind::sample_netcdf_sst(path, &at).map_err(|e| format!("{name}: {e}"))?;
        return Ok(Source::Grid(
            samples
                .points
                .into_iter()
                .map(|temps| series_of(&samples.times, temps))
                .collect(),
        ));
    }
    if !head.starts_with(b"GRIB") {
        let (series, warning) = read_sst_file(path, missing)?;
        warnings.extend(warning);
        return Ok(Source::Point(series));
    }
    let file =
        std::fs::File::open(path).map_err(|e| format!("{name}: cannot read the file: {e}"))?;
    let samples = crate::wind::sample_sst_grib2(std::io::BufReader::new(file), probes)
        .map_err(|e| format!("{name}: {e}"))?
        .ok_or_else(|| {
            format!(
                "{name}: no sea temperature in the file: expected water temperature (discipline 10, category 3, number 0) or surface temperature (0, 0, 0) with a land-sea mask"
            )
        })?;
    Ok(Source::Grid(
        samples
            .points
            .into_iter()
            .map(|temps| series_of(&samples.times, temps))
            .collect(),
    ))
}

/// A probe's series from a grid's times and its values there (NaN: no sea value),
/// `None` when it has no value at all.
fn series_of(times: &[chrono::DateTime<chrono::Utc>], temps: Vec<f64>) -> Option<SstSeries> {
    let (times, temps_c): (Vec<_>, Vec<_>) = times
        .iter()
        .zip(temps)
        .filter(|(_, t)| t.is_finite())
        .map(|(a, b)| (*a, b))
        .unzip();
    (!times.is_empty()).then_some(SstSeries {
        position: None,
        times,
        temps_c,
    })
}

/// `shelfwind verify`.
pub fn run_verify(args: &VerifyArgs) -> Result<(), CliError> {
    let coast = load_coast(&args.scenario, None)?;
    let wind_paths: Vec<PathBuf> = if args.wind.is_empty() {
        coast
            .scenario
            .as_ref()
            .map(|s| s.wind_files.iter().map(|f| coast.dir.join(f)).collect())
            .unwrap_or_default()
    } else {
        args.wind.clone()
    };
    let sources = load_sources(&wind_paths)?;
    let settings = coast
        .scenario
        .as_ref()
        .map(|s| s.settings.clone())
        .unwrap_or_default();
    let input = VerifyInput {
        sst_files: args.sst.clone(),
        missing: args.sst_missing.clone(),
        probe_km: args
            .probe_km
            .unwrap_or(settings.sst_check.probe_offshore_km),
        cooling_c: args.cooling_c.unwrap_or(settings.sst_check.cooling_c),
    };
    for (name, value, lo, hi, unit) in [
        ("--cooling-c", input.cooling_c, 0.1, 10.0, "°C"),
        ("--probe-km", input.probe_km, 1.0, 50.0, "km"),
    ] {
        if !(value.is_finite() && (lo..=hi).contains(&value)) {
            return Err(CliError::App(format!(
                "{name} {value} is out of range: expected {lo} to {hi} {unit}"
            )));
        }
    }
    let checked = verify_coast(
        &coast.segments,
        &sources,
        &input,
        &settings,
        &Progress::new(),
    )
    .map_err(CliError::App)?;
    for w in &checked.warnings {
        eprintln!("shelfwind: warning: {w}");
    }
    let mut out = checked.segments;
    out.sort_by(|a, b| a.segment_id.cmp(&b.segment_id));
    let check = checked.settings;
    let text = match args.format {
        VerifyFormatArg::Table => table(&out, &check),
        VerifyFormatArg::Csv => csv(&out),
        VerifyFormatArg::Json => {
            serde_json::to_string_pretty(&json_of(&out, &check)).unwrap_or_default() + "\n"
        }
    };
    write_output(args.out.as_deref(), text.as_bytes())
}

fn r3(x: f64) -> f64 {
    (x * 1000.0).round() / 1000.0
}

fn opt(x: Option<f64>) -> String {
    x.map(|v| format!("{}", r3(v))).unwrap_or_default()
}

/// CSV: `segment_id,days,best_lag_days,r_at_best_lag,r_lag0,events,events_confirmed`.
#[must_use]
pub fn csv(out: &[Verified]) -> String {
    let mut s = String::from(
        "segment_id,days,best_lag_days,r_at_best_lag,r_lag0,events,events_confirmed\n",
    );
    for v in out {
        let c = &v.check;
        let (told, confirmed) = c.hits();
        let _ = writeln!(
            s,
            "{},{},{},{},{},{told},{confirmed}",
            v.segment_id,
            c.days,
            c.best.map(|b| b.lag_days.to_string()).unwrap_or_default(),
            opt(c.best.map(|b| b.r)),
            opt(c.by_lag.first().and_then(|l| l.r)),
        );
    }
    s
}

/// The check of one segment in a sentence.
#[must_use]
pub fn summary(c: &SegmentCheck, settings: &CheckSettings) -> String {
    let (told, confirmed) = c.hits();
    let events = if told == 0 {
        "No upwelling event had sea-temperature data around it".to_string()
    } else {
        format!(
            "{confirmed} of {told} upwelling events were followed by cooling of {} °C or more within {} days of their end",
            settings.cooling_c, settings.days_after_event
        )
    };
    let lag = match c.best {
        Some(b) if b.interval.1 < 0.0 => format!(
            "the sea responded best {} day{} after the wind (r = {:.2}, 95 % interval {:.2} to {:.2}, {} days)",
            b.lag_days,
            if b.lag_days == 1 { "" } else { "s" },
            b.r,
            b.interval.0,
            b.interval.1,
            b.pairs
        ),
        Some(b) => format!(
            "no lag shows a clear cooling (most negative r = {:.2} at {} days, 95 % interval {:.2} to {:.2})",
            b.r, b.lag_days, b.interval.0, b.interval.1
        ),
        None => "too few days with both wind and sea temperature to correlate them (fewer than 10)"
            .to_string(),
    };
    format!("{events}; {lag}.")
}

fn table(out: &[Verified], settings: &CheckSettings) -> String {
    let mut s = String::from(
        "Did the sea agree? Upwelling index against the measured sea temperature (an estimate of how often the tool was right on this coast).\n\n",
    );
    for v in out {
        let _ = writeln!(s, "{}: {}", v.segment_id, summary(&v.check, settings));
    }
    s
}

fn json_of(out: &[Verified], settings: &CheckSettings) -> Value {
    json!({
        "cooling_c": settings.cooling_c,
        "segments": out.iter().map(|v| {
            let c = &v.check;
            let (told, confirmed) = c.hits();
            json!({
                "segment_id": v.segment_id,
                "days": c.days,
                "best_lag_days": c.best.map(|b| b.lag_days),
                "r_at_best_lag": c.best.map(|b| r3(b.r)),
                "r_at_best_lag_95": c.best.map(|b| [r3(b.interval.0), r3(b.interval.1)]),
                "r_lag0": c.by_lag.first().and_then(|l| l.r).map(r3),
                "r_by_lag": c.by_lag.iter().map(|l| l.r.map(r3)).collect::<Vec<_>>(),
                "pairs_by_lag": c.by_lag.iter().map(|l| l.pairs).collect::<Vec<_>>(),
                "events": told,
                "events_confirmed": confirmed,
                "event_list": c.events.iter().map(|e| json!({
                    "onset": e.onset.to_string(),
                    "end": e.end.to_string(),
                    "before_c": e.before_c.map(r3),
                    "cooling_c": e.cooling_c.map(r3),
                    "seen_on": e.seen_on.map(|d| d.to_string()),
                    "confirmed": e.confirmed,
                })).collect::<Vec<_>>(),
                "summary": summary(c, settings),
            })
        }).collect::<Vec<_>>(),
    })
}
