//! What a wind, wave or other forecast file holds, whatever its format: the fields, the
//! grid, the area, the times, the issue time and producing centre where the file says,
//! and what the tool will and will not use. The command line's `inspect` and the app's
//! import summary print the same text.

use super::grib2::{FieldHeader, valid_time};
use super::grib2::{Messages, empty_file_error, message_error, no_message_error, scan_message};
use super::grib2_grid::{GribGrid, GridError, TEMPLATES_READ, grid_template_name};
use super::netcdf;
use super::{WindError, WindFileError, read_csv_series};
use crate::coast::LatLon;
use chrono::{DateTime, Utc};
use std::collections::BTreeMap;
use std::fmt::Write as _;
use std::io::Read;
use std::path::Path;

/// The first and last of a set of times, their number and the usual step between them.
#[derive(Debug, Clone, PartialEq)]
pub struct TimeSpan {
    /// First time, UTC.
    pub first: DateTime<Utc>,
    /// Last time, UTC.
    pub last: DateTime<Utc>,
    /// Number of distinct times.
    pub count: usize,
    /// The most common step between consecutive times, hours (`None` for one time).
    pub step_h: Option<f64>,
}

impl TimeSpan {
    /// The span of `times` (any order, repeats allowed); `None` when empty.
    #[must_use]
    pub fn of(times: &[DateTime<Utc>]) -> Option<Self> {
        let mut t = times.to_vec();
        t.sort_unstable();
        t.dedup();
        let mut steps: BTreeMap<i64, usize> = BTreeMap::new();
        for w in t.windows(2) {
            *steps.entry((w[1] - w[0]).num_seconds()).or_default() += 1;
        }
        let step_h = steps
            .iter()
            .max_by_key(|(s, n)| (**n, -**s))
            .map(|(s, _)| *s as f64 / 3600.0);
        Some(Self {
            first: *t.first()?,
            last: *t.last()?,
            count: t.len(),
            step_h,
        })
    }
}

/// What a file holds.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct FileSummary {
    /// The format, as found from the file's content ("GRIB2", "NetCDF-4", "CSV").
    pub format: String,
    /// The fields (or columns) found, each with how many times it occurs.
    pub fields: Vec<String>,
    /// The grids, one line each.
    pub grids: Vec<String>,
    /// The area covered: south-west and north-east corners (longitudes ±180°).
    pub area: Option<(LatLon, LatLon)>,
    /// The valid times of the fields the tool uses (else of all fields).
    pub times: Option<TimeSpan>,
    /// When the forecast was issued (the latest reference time), if the file says.
    pub issued: Option<DateTime<Utc>>,
    /// The producing centre, if the file says.
    pub centre: Option<String>,
    /// What the tool will use from the file.
    pub uses: Vec<String>,
    /// What it will not use, and why.
    pub ignores: Vec<String>,
}

impl FileSummary {
    /// The summary as plain text, one item per line.
    #[must_use]
    pub fn to_text(&self) -> String {
        let mut s = format!("Format: {}\n", self.format);
        let stamp = |t: DateTime<Utc>| t.format("%Y-%m-%d %H:%M UTC").to_string();
        if let Some(c) = &self.centre {
            let _ = writeln!(s, "Producing centre: {c}");
        }
        if let Some(t) = self.issued {
            let _ = writeln!(s, "Issued: {}", stamp(t));
        }
        for g in &self.grids {
            let _ = writeln!(s, "Grid: {g}");
        }
        if let Some((sw, ne)) = self.area {
            let _ = writeln!(
                s,
                "Area: {:.3}° to {:.3}° latitude, {:.3}° to {:.3}° longitude{}",
                sw.lat_deg,
                ne.lat_deg,
                sw.lon_deg,
                ne.lon_deg,
                if sw.lon_deg > ne.lon_deg {
                    " (eastward across 180°)"
                } else {
                    ""
                }
            );
        }
        if let Some(t) = &self.times {
            let step = t
                .step_h
                .map(|h| format!(", every {}", hours_text(h)))
                .unwrap_or_default();
            let _ = writeln!(
                s,
                "Times: {} to {} ({} time{}{step})",
                stamp(t.first),
                stamp(t.last),
                t.count,
                if t.count == 1 { "" } else { "s" }
            );
        }
        for f in &self.fields {
            let _ = writeln!(s, "Field: {f}");
        }
        for u in &self.uses {
            let _ = writeln!(s, "Uses: {u}");
        }
        for i in &self.ignores {
            let _ = writeln!(s, "Does not use: {i}");
        }
        s
    }
}

/// "6 h", "30 min", "1 day".
fn hours_text(h: f64) -> String {
    if h < 1.0 {
        format!("{:.0} min", h * 60.0)
    } else if (h - 24.0).abs() < 1e-9 {
        "1 day".into()
    } else {
        format!("{h} h")
    }
}

/// What the file at `path` holds, found from its content (never from its name alone).
pub fn inspect_file(path: &Path) -> Result<FileSummary, WindError> {
    inspect_inner(path).map_err(|source| WindError::File {
        path: path.to_path_buf(),
        source,
    })
}

fn inspect_inner(path: &Path) -> Result<FileSummary, WindFileError> {
    let mut head = [0u8; 8];
    let n = std::fs::File::open(path)?.read(&mut head)?;
    let head = &head[..n];
    // Told apart as the readers do (`load_sources`): a file named as GRIB but holding
    // something else gets the GRIB reader's message, not the CSV reader's.
    if netcdf::is_netcdf(head) {
        return netcdf::inspect_netcdf(path)
            .map(|s| netcdf_summary(&s))
            .map_err(WindFileError::Netcdf);
    }
    if super::assign::looks_like_grib(path, head) {
        return inspect_grib2(std::io::BufReader::new(std::fs::File::open(path)?));
    }
    let bytes = std::fs::read(path)?;
    if bytes.is_empty() {
        return Err(WindFileError::Grib(
            "the file is empty: expected GRIB2, NetCDF or CSV".into(),
        ));
    }
    let text = String::from_utf8(bytes).map_err(|_| WindFileError::UnknownFormat)?;
    let series = read_csv_series(&text)?;
    let mut columns = Vec::new();
    if series.has_wind() {
        columns.push("wind speed and direction".to_string());
    }
    if series.waves.is_some() {
        columns.push("wave height (and period where given)".to_string());
    }
    let place = series.position.map_or_else(
        || "no position: applies wherever no other file covers".to_string(),
        |p| format!("station at {p:.4}"),
    );
    Ok(FileSummary {
        format: "CSV point series".into(),
        fields: columns.clone(),
        grids: vec![place],
        area: series.position.map(|p| (p, p)),
        times: TimeSpan::of(&series.series.times),
        uses: columns,
        ..FileSummary::default()
    })
}

/// The common summary of a NetCDF file.
fn netcdf_summary(s: &netcdf::NetcdfSummary) -> FileSummary {
    let mut summary = FileSummary {
        format: s.format.to_string(),
        fields: s.variables.iter().map(ToString::to_string).collect(),
        centre: s.institution.clone().or_else(|| s.source.clone()),
        ..FileSummary::default()
    };
    match &s.wind {
        Ok(w) => {
            summary.grids.push(format!(
                "latitude/longitude grid, {} latitudes × {} longitudes ({} and {}){}",
                w.n_lat,
                w.n_lon,
                w.latitude_variable,
                w.longitude_variable,
                if w.global { ", global" } else { "" }
            ));
            let lon = |x: f64| (x + 180.0).rem_euclid(360.0) - 180.0;
            summary.area = Some((
                LatLon::new(
                    w.lat_range.0,
                    if w.global { -180.0 } else { lon(w.lon_range.0) },
                ),
                LatLon::new(
                    w.lat_range.1,
                    if w.global { 180.0 } else { lon(w.lon_range.1) },
                ),
            ));
            summary.times = Some(TimeSpan {
                first: w.first_time,
                last: w.last_time,
                count: w.n_times,
                step_h: w.step.map(|d| d.num_milliseconds() as f64 / 3.6e6),
            });
            summary.uses.push(format!(
                "10 m wind: u = {}, v = {} (units \"{}\", converted to m/s)",
                w.u_variable, w.v_variable, w.units
            ));
            summary
                .uses
                .extend(w.notes.iter().map(|n| format!("note: {n}")));
            let others: Vec<&str> = s
                .variables
                .iter()
                .map(|v| v.name.as_str())
                .filter(|n| {
                    ![
                        &w.u_variable,
                        &w.v_variable,
                        &w.time_variable,
                        &w.latitude_variable,
                        &w.longitude_variable,
                    ]
                    .iter()
                    .any(|x| x.as_str() == *n)
                })
                .collect();
            if !others.is_empty() {
                summary
                    .ignores
                    .push(format!("{} (not needed)", others.join(", ")));
            }
        }
        Err(why) => summary.ignores.push(format!("no usable 10 m wind: {why}")),
    }
    if !s.groups.is_empty() {
        summary.ignores.push(format!(
            "the groups {} (only the root group is searched)",
            s.groups.join(", ")
        ));
    }
    summary
}

/// A field's name for people, with its WMO numbers.
fn field_name(h: &FieldHeader) -> String {
    let name = match (h.discipline, h.category, h.number) {
        (0, 2, 2) => "u wind",
        (0, 2, 3) => "v wind",
        (0, 0, 0) => "temperature",
        (0, 3, 0) => "pressure",
        (0, 3, 1) => "mean sea-level pressure",
        (0, 1, 8) => "total precipitation",
        (10, 0, 3) => "significant height of combined waves and swell",
        (10, 0, 5) => "significant height of wind waves",
        (10, 0, 8) => "significant height of swell",
        (10, 0, 11) => "primary wave mean period",
        (10, 0, 6) => "mean period of wind waves",
        (10, 0, 4) => "direction of wind waves",
        (10, 3, 0) => "water temperature",
        _ => "",
    };
    let surface = match (h.surface_type, h.surface_m) {
        (103, m) if m.is_finite() => format!(" at {m} m above ground"),
        (100, pa) if pa.is_finite() => format!(" at {} hPa", pa / 100.0),
        (1, _) => " at the surface".into(),
        (101, _) => " at mean sea level".into(),
        (t, _) => format!(" on surface type {t}"),
    };
    let numbers = format!("{}/{}/{}", h.discipline, h.category, h.number);
    if name.is_empty() {
        format!("parameter {numbers}{surface}")
    } else {
        format!("{name}{surface} ({numbers})")
    }
}

/// A producing centre's name (WMO Common Code Table C-11), for the best-known codes.
fn centre_name(code: u16) -> String {
    let name = match code {
        7 => "US National Centers for Environmental Prediction",
        34 => "Japan Meteorological Agency",
        54 => "Canadian Meteorological Centre",
        74 => "UK Met Office",
        78 => "Deutscher Wetterdienst",
        85 => "Météo-France",
        98 => "European Centre for Medium-Range Weather Forecasts",
        255 => return "not given (code 255)".into(),
        _ => "",
    };
    if name.is_empty() {
        format!("code {code} (WMO Common Code Table C-11)")
    } else {
        format!("{name} (code {code})")
    }
}

/// What one GRIB2 file holds.
#[derive(Default)]
struct Inventory {
    fields: BTreeMap<String, usize>,
    wind_times: Vec<DateTime<Utc>>,
    all_times: Vec<DateTime<Utc>>,
    grids: Vec<(Vec<u8>, Result<GribGrid, String>)>,
    issued: Option<DateTime<Utc>>,
    centre: Option<u16>,
    /// Ensemble members seen: (type of ensemble forecast, perturbation number).
    members: std::collections::BTreeSet<(u8, u8)>,
    /// The number of forecasts in the ensemble, as the file declares it.
    ensemble_size: Option<u8>,
    /// Some wind field is on a grid the tool cannot read.
    wind_grid_unread: bool,
}

impl Inventory {
    fn add(&mut self, number: usize, msg: &[u8]) -> Result<(), WindFileError> {
        let (ref_time, headers) = scan_message(msg).map_err(|p| message_error(number, p))?;
        if msg.len() > 23 {
            self.centre
                .get_or_insert(u16::from_be_bytes([msg[16 + 5], msg[16 + 6]]));
        }
        self.issued = Some(self.issued.map_or(ref_time, |t| t.max(ref_time)));
        for h in &headers {
            *self.fields.entry(field_name(h)).or_default() += 1;
            if let Some((kind, number, size)) = h.ensemble {
                self.members.insert((kind, number));
                self.ensemble_size = Some(size);
            }
            let t = valid_time(ref_time, h).ok();
            self.all_times.extend(t);
            let s3 = h.section3(msg);
            let wind = h.is_wind_u().is_some();
            if wind {
                self.wind_times.extend(t);
            }
            let known = self
                .grids
                .iter()
                .find(|(k, _)| k == s3)
                .map(|(_, g)| g.is_ok());
            if let Some(ok) = known {
                self.wind_grid_unread |= wind && !ok;
            } else {
                let grid = GribGrid::parse(s3).map_err(|e| match e {
                    GridError::Unsupported(t) => format!(
                        "{} grid (template 3.{t}): not supported",
                        grid_template_name(t)
                    ),
                    GridError::Bad(p) => p,
                });
                self.wind_grid_unread |= wind && grid.is_err();
                self.grids.push((s3.to_vec(), grid));
            }
        }
        Ok(())
    }
}

/// "N other fields (name, name, … and K more kinds): not needed": the kinds of the
/// fields the tool does not use, without their levels.
fn others_text(others: &[(&String, &usize)]) -> String {
    const SHOWN: usize = 8;
    let count: usize = others.iter().map(|(_, n)| **n).sum();
    let mut kinds: Vec<&str> = Vec::new();
    for (name, _) in others {
        let kind = [" at ", " on surface type "]
            .iter()
            .filter_map(|sep| name.find(sep))
            .min()
            .map_or(name.as_str(), |i| &name[..i]);
        if !kinds.contains(&kind) {
            kinds.push(kind);
        }
    }
    // Named kinds first: a bare number says less.
    kinds.sort_by_key(|k| k.starts_with("parameter "));
    let more = kinds.len().saturating_sub(SHOWN);
    let listed = kinds[..kinds.len().min(SHOWN)].join(", ");
    let tail = if more > 0 {
        format!(" and {more} more kinds")
    } else {
        String::new()
    };
    format!(
        "{count} other field{} ({listed}{tail}): not needed",
        if count == 1 { "" } else { "s" }
    )
}

/// Most fields listed one per line; past [`MAX_LISTED`] kinds, the ones the tool uses
/// one per line and the rest on one line (a national model's file holds a hundred).
fn listed_fields(fields: &BTreeMap<String, usize>, others: &[(&String, &usize)]) -> Vec<String> {
    const MAX_LISTED: usize = 24;
    let line = |(name, n): (&String, &usize)| {
        format!("{name}: {n} field{}", if *n == 1 { "" } else { "s" })
    };
    if fields.len() <= MAX_LISTED {
        return fields.iter().map(line).collect();
    }
    fields
        .iter()
        .filter(|(name, _)| !others.iter().any(|(o, _)| o == name))
        .map(line)
        .chain(std::iter::once(
            others_text(others).replace(": not needed", ""),
        ))
        .collect()
}

/// What a GRIB2 stream holds.
pub fn inspect_grib2(reader: impl Read) -> Result<FileSummary, WindFileError> {
    let mut messages = Messages::new(reader);
    let mut inv = Inventory::default();
    let mut count = 0;
    while let Some(m) = messages.next_message()? {
        count += 1;
        inv.add(m.number, &m.bytes)?;
    }
    if count == 0 {
        return Err(if messages.bytes_read() == 0 {
            empty_file_error()
        } else {
            no_message_error()
        });
    }
    let has = |k: &str| inv.fields.keys().any(|f| f.starts_with(k));
    let wind = has("u wind at 10 m above ground")
        && has("v wind at 10 m above ground")
        && !inv.wind_grid_unread;
    let waves = has("significant height");
    let readable: Vec<&GribGrid> = inv
        .grids
        .iter()
        .filter_map(|(_, g)| g.as_ref().ok())
        .collect();
    let mut uses = Vec::new();
    let mut ignores = Vec::new();
    let mut fields_extra = Vec::new();
    if wind {
        let relative = readable.iter().any(|g| g.uv_relative_to_grid);
        uses.push(format!(
            "10 m wind (u and v){}",
            if relative {
                ", turned from the grid's axes to true east and north at each point"
            } else {
                ""
            }
        ));
    }
    if waves {
        uses.push("wave height and period (sea state)".into());
    }
    if let (1, Some(&(kind, number))) = (inv.members.len(), inv.members.iter().next()) {
        let what = match kind {
            0 | 1 => "the control run",
            2 => "a negatively perturbed member",
            3 => "a positively perturbed member",
            4 => "a multi-model member",
            _ => "a member",
        };
        fields_extra.push(format!(
            "one ensemble member ({what}, perturbation number {number}{}): read as a single forecast",
            inv.ensemble_size
                .map(|n| format!(", of {n} in the ensemble"))
                .unwrap_or_default()
        ));
    }
    if inv.members.len() > 1 {
        let controls = inv.members.iter().filter(|m| m.0 <= 1).count();
        fields_extra.push(format!(
            "ensemble members: {} in the file ({} control, {} perturbed or other){}",
            inv.members.len(),
            controls,
            inv.members.len() - controls,
            inv.ensemble_size
                .map(|n| format!(", of {n} in the ensemble"))
                .unwrap_or_default()
        ));
        uses.push("each ensemble member as one run (the plan gives the odds over the runs)".into());
    }
    for (_, g) in &inv.grids {
        if let Err(problem) = g {
            ignores.push(format!(
                "fields on a {problem}; the tool reads {TEMPLATES_READ} grids"
            ));
        }
    }
    let others: Vec<(&String, &usize)> = inv
        .fields
        .iter()
        .filter(|(f, _)| {
            !(f.contains("at 10 m above ground (0/2/")
                || f.starts_with("significant height")
                || f.contains("period"))
        })
        .collect();
    if !others.is_empty() {
        ignores.push(others_text(&others));
    }
    if !wind && !waves {
        ignores.push(
            "no readable 10 m wind and no wave height: nothing here the planner can use".into(),
        );
    }
    let area = readable.first().and_then(|g| g.area());
    Ok(FileSummary {
        format: format!("GRIB2 ({count} messages)"),
        fields: listed_fields(&inv.fields, &others)
            .into_iter()
            .chain(fields_extra)
            .collect(),
        grids: inv
            .grids
            .iter()
            .map(|(_, g)| match g {
                Ok(g) => g.describe(),
                Err(p) => p.clone(),
            })
            .collect(),
        area,
        times: TimeSpan::of(if wind {
            &inv.wind_times
        } else {
            &inv.all_times
        }),
        issued: inv.issued,
        centre: inv.centre.map(centre_name),
        uses,
        ignores,
    })
}

/// The distinct grids of a GRIB2 stream's 10 m wind fields, in file order: what the
/// wind reader projects points into.
pub fn grib2_wind_grids(reader: impl Read) -> Result<Vec<GribGrid>, WindFileError> {
    let mut messages = Messages::new(reader);
    let mut grids: Vec<(Vec<u8>, GribGrid)> = Vec::new();
    while let Some(m) = messages.next_message()? {
        let (_, headers) = scan_message(&m.bytes).map_err(|p| message_error(m.number, p))?;
        for h in headers.iter().filter(|h| h.is_wind_u().is_some()) {
            let s3 = h.section3(&m.bytes);
            if !grids.iter().any(|(k, _)| k == s3) {
                let grid = super::grib2::read_grid(s3, "10 m wind")
                    .map_err(|p| message_error(m.number, p))?;
                grids.push((s3.to_vec(), grid));
            }
        }
    }
    Ok(grids.into_iter().map(|(_, g)| g).collect())
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A national model's file (a hundred kinds of field): the fields used are listed
    /// one per line, the rest on one line, named kinds first.
    #[test]
    fn long_inventories_list_the_used_fields_and_sum_up_the_rest() {
        let mut fields: BTreeMap<String, usize> = BTreeMap::new();
        fields.insert("u wind at 10 m above ground (0/2/2)".into(), 1);
        fields.insert("v wind at 10 m above ground (0/2/3)".into(), 1);
        for hpa in (100..=950).step_by(50) {
            fields.insert(format!("temperature at {hpa} hPa (0/0/0)"), 1);
            fields.insert(format!("parameter 0/1/1 at {hpa} hPa"), 2);
        }
        let others: Vec<(&String, &usize)> = fields
            .iter()
            .filter(|(f, _)| !f.contains("at 10 m"))
            .collect();
        let lines = listed_fields(&fields, &others);
        assert_eq!(
            lines,
            [
                "u wind at 10 m above ground (0/2/2): 1 field",
                "v wind at 10 m above ground (0/2/3): 1 field",
                "54 other fields (temperature, parameter 0/1/1)",
            ]
        );
        // A short inventory is listed whole.
        let few: BTreeMap<String, usize> = fields.into_iter().take(3).collect();
        assert_eq!(listed_fields(&few, &[]).len(), 3);
    }
}
