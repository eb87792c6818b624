//! NetCDF importer for 10 m wind (NetCDF-3 classic, 64-bit offset and CDF-5, and
//! NetCDF-4 on HDF5), read with the pure-Rust `netcdf-reader` crate.
//!
//! What a file must hold, in CF-convention terms:
//!
//! - **Wind**: an eastward and a northward component, found by `standard_name`
//!   (`eastward_wind`, `northward_wind`) or by a common name (`u10`/`v10`, `uwnd`/`vwnd`,
//!   `u10m`/`v10m`, `10u`/`10v`, `uas`/`vas`, in any case). Variables that are known to
//!   be at another height (a height coordinate other than 10 m) or on a pressure level
//!   are passed over; among the rest a variable known to be at 10 m wins, then one
//!   matched both by name and by `standard_name`, then the first in the file. Both
//!   components must have the same dimensions.
//! - **Values**: `_Unsigned`, `_FillValue` (or the NetCDF default fill value of the
//!   type when that attribute is absent), `missing_value` and `valid_min`/`valid_max`/
//!   `valid_range` mark missing values; `scale_factor`/`add_offset` unpack the rest.
//!   Units `m s-1` (and spellings such as `m/s`, `m s**-1`), knots and km/h are accepted
//!   and converted to m/s; a variable without units is taken to be in m/s (the summary
//!   says so); other units are refused.
//! - **Time**: a dimension whose coordinate variable has units `<unit> since <date>`
//!   (seconds, minutes, hours or days) on the `standard`/`gregorian`,
//!   `proleptic_gregorian` or `julian` calendar (or none given). Model calendars
//!   (`noleap`, `360_day`, ...) have no real dates and are refused. Times must increase;
//!   they are rounded to the millisecond.
//! - **Grid**: 1-D latitude and longitude coordinate variables (by `standard_name`, by
//!   units `degrees_north`/`degrees_east`, or by the names `lat`/`latitude`/`y`,
//!   `lon`/`longitude`/`x`), each strictly monotonic in either direction (even spacing
//!   is not needed). Longitudes may run 0..360 or -180..180 (or cross the antimeridian);
//!   points are matched modulo 360 and a grid that goes all the way round wraps from its
//!   last column to its first. Other dimensions must have size 1 (`height`, `level`,
//!   ...), so both (time, [1...], lat, lon) and (time, lon, lat) work.
//!
//! Sampling is bilinear in latitude and longitude (in degrees). A grid node counts as
//! missing when its u or its v is missing; a point whose stencil has missing nodes takes
//! the weighted mean of the valid nodes among those with a non-zero weight (their
//! bilinear weights renormalised to sum to one), and is missing only when all of them
//! are missing. A point is reported as `None` when it lies outside the grid or is missing
//! at any time step.
//!
//! Memory: the file is memory-mapped (classic) or read chunk by chunk (NetCDF-4); each
//! time step reads one hyperslab of each component, only the block of rows and columns
//! that the requested points need, so memory grows with that block, not with the file.

use chrono::{DateTime, NaiveDate, NaiveDateTime, NaiveTime, TimeDelta, Utc};
use netcdf_reader::masked::MaskParams;
use netcdf_reader::unpack::{SignParams, UnpackParams};
use netcdf_reader::{
    NcAttrValue, NcDimension, NcFile, NcFormat, NcOpenOptions, NcSliceInfo, NcSliceInfoElem,
    NcType, NcVariable,
};
use std::fmt;
use std::io::Read;
use std::path::Path;

/// 10 m wind sampled from a NetCDF file at a list of points.
#[derive(Debug, Clone, PartialEq)]
pub struct NetcdfWind {
    /// Valid times, UTC, strictly increasing.
    pub times: Vec<DateTime<Utc>>,
    /// For each requested point, `(u, v)` in m/s at every time, or `None` when the point
    /// is outside the grid or its wind is missing at some time.
    pub points: Vec<Option<Vec<(f64, f64)>>>,
    /// What the file holds and which variables were used.
    pub summary: NetcdfSummary,
}

/// What a NetCDF file holds: for an `inspect` command and for error messages.
#[derive(Debug, Clone, PartialEq)]
pub struct NetcdfSummary {
    /// The format: "NetCDF-3 classic", "NetCDF-3 64-bit offset", "NetCDF-3 64-bit data
    /// (CDF-5)", "NetCDF-4 (HDF5)" or "NetCDF-4 classic model (HDF5)".
    pub format: &'static str,
    /// The global attribute `title`, if any.
    pub title: Option<String>,
    /// The global attribute `institution`, if any.
    pub institution: Option<String>,
    /// The global attribute `source`, if any.
    pub source: Option<String>,
    /// The variables of the root group, in file order.
    pub variables: Vec<NetcdfVariable>,
    /// Names of the NetCDF-4 sub-groups of the root group (not searched for wind).
    pub groups: Vec<String>,
    /// The 10 m wind found in the file, or why none could be used.
    pub wind: Result<NetcdfWindGrid, String>,
}

/// One variable of a NetCDF file, as listed by [`inspect_netcdf`].
#[derive(Debug, Clone, PartialEq)]
pub struct NetcdfVariable {
    /// Variable name.
    pub name: String,
    /// Storage type in CDL spelling (`float`, `short`, ...).
    pub data_type: String,
    /// Dimensions: name and size.
    pub dimensions: Vec<(String, u64)>,
    /// The `standard_name` attribute, if any.
    pub standard_name: Option<String>,
    /// The `units` attribute, if any.
    pub units: Option<String>,
    /// The `long_name` attribute, if any.
    pub long_name: Option<String>,
}

/// The wind variables found in a file and the grid and times they are on.
#[derive(Debug, Clone, PartialEq)]
pub struct NetcdfWindGrid {
    /// Name of the eastward (u) component.
    pub u_variable: String,
    /// Name of the northward (v) component.
    pub v_variable: String,
    /// The units of the wind variables as written in the file (converted to m/s).
    pub units: String,
    /// Name of the time coordinate variable.
    pub time_variable: String,
    /// Name of the latitude coordinate variable.
    pub latitude_variable: String,
    /// Name of the longitude coordinate variable.
    pub longitude_variable: String,
    /// Number of latitudes (rows).
    pub n_lat: usize,
    /// Number of longitudes (columns).
    pub n_lon: usize,
    /// Southernmost and northernmost latitude, degrees.
    pub lat_range: (f64, f64),
    /// Westernmost and easternmost longitude, degrees, in the file's convention (the
    /// first may be larger than the last when the grid crosses 180°).
    pub lon_range: (f64, f64),
    /// The grid goes all the way round the globe: its last column neighbours the first.
    pub global: bool,
    /// Number of time steps.
    pub n_times: usize,
    /// First valid time.
    pub first_time: DateTime<Utc>,
    /// Last valid time.
    pub last_time: DateTime<Utc>,
    /// The time step when all steps are equal; `None` for a single time or uneven steps.
    pub step: Option<TimeDelta>,
    /// Remarks, such as units assumed to be m/s.
    pub notes: Vec<String>,
}

/// Whether `head`, the first bytes of a file, are those of a NetCDF file: "CDF" followed
/// by version byte 1, 2 or 5 (NetCDF-3), or the HDF5 signature (NetCDF-4), also where
/// HDF5 puts it after a user block (byte 512, 1024, 2048, ... as far as `head` goes).
/// Any HDF5 file passes: whether it holds NetCDF variables shows when it is read.
#[must_use]
pub fn is_netcdf(head: &[u8]) -> bool {
    if let [b'C', b'D', b'F', version, ..] = head {
        return matches!(version, 1 | 2 | 5);
    }
    let mut offset = 0usize;
    loop {
        match head.get(offset..offset + HDF5_SIGNATURE.len()) {
            Some(bytes) if bytes == HDF5_SIGNATURE => return true,
            Some(_) => {}
            None => return false,
        }
        offset = if offset == 0 { 512 } else { offset * 2 };
    }
}

/// Reads the 10 m wind of a NetCDF file at `points` (latitude, longitude in degrees;
/// longitudes in any convention).
///
/// Fails with a message naming what was expected and what the file has when it holds no
/// usable 10 m wind, or when its time or grid cannot be read.
pub fn sample_netcdf(path: &Path, points: &[(f64, f64)]) -> Result<NetcdfWind, String> {
    let file = open(path)?;
    let layout = find_wind(&file)?;
    let summary = summarize(&file, Ok(layout.grid.clone()))?;
    let stencils: Vec<Option<Stencil>> = points
        .iter()
        .map(|&(lat, lon)| layout.stencil(lat, lon))
        .collect();
    let mut values: Vec<Option<Vec<(f64, f64)>>> = stencils
        .iter()
        .map(|s| s.as_ref().map(|_| Vec::with_capacity(layout.times.len())))
        .collect();
    if let Some(block) = Block::around(&stencils) {
        for t in 0..layout.times.len() {
            let u = layout.read_block(&file, &layout.u, t, &block)?;
            let v = layout.read_block(&file, &layout.v, t, &block)?;
            for (stencil, series) in stencils.iter().zip(values.iter_mut()) {
                let (Some(stencil), Some(list)) = (stencil, series.as_mut()) else {
                    continue;
                };
                match interpolate(stencil, &block, &u, &v) {
                    Some(uv) => list.push(uv),
                    None => *series = None,
                }
            }
        }
    }
    Ok(NetcdfWind {
        times: layout.times,
        points: values,
        summary,
    })
}

/// Describes a NetCDF file: format, global attributes, every variable (dimensions,
/// `standard_name`, units) and the 10 m wind it holds, or why it holds none.
///
/// Fails only when the file cannot be read as NetCDF at all.
pub fn inspect_netcdf(path: &Path) -> Result<NetcdfSummary, String> {
    let file = open(path)?;
    let wind = find_wind(&file).map(|layout| layout.grid);
    summarize(&file, wind)
}

impl fmt::Display for NetcdfSummary {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        writeln!(f, "format: {}", self.format)?;
        for (key, value) in [
            ("title", &self.title),
            ("institution", &self.institution),
            ("source", &self.source),
        ] {
            if let Some(value) = value {
                writeln!(f, "{key}: {value}")?;
            }
        }
        writeln!(f, "variables:")?;
        for var in &self.variables {
            writeln!(f, "  {var}")?;
        }
        if !self.groups.is_empty() {
            writeln!(f, "groups (not searched): {}", self.groups.join(", "))?;
        }
        match &self.wind {
            Ok(grid) => write!(f, "{grid}"),
            Err(why) => writeln!(f, "wind: none usable: {why}"),
        }
    }
}

impl fmt::Display for NetcdfVariable {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let dims: Vec<String> = self
            .dimensions
            .iter()
            .map(|(name, size)| format!("{name}={size}"))
            .collect();
        write!(f, "{} {}({})", self.data_type, self.name, dims.join(", "))?;
        if let Some(s) = &self.standard_name {
            write!(f, " standard_name={s}")?;
        }
        if let Some(u) = &self.units {
            write!(f, " units=\"{u}\"")?;
        }
        if let Some(l) = &self.long_name {
            write!(f, " long_name=\"{l}\"")?;
        }
        Ok(())
    }
}

impl fmt::Display for NetcdfWindGrid {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        writeln!(
            f,
            "wind: u = {}, v = {} (units \"{}\")",
            self.u_variable, self.v_variable, self.units
        )?;
        writeln!(
            f,
            "  grid: {} latitudes from {} to {} ({}), {} longitudes from {} to {} ({}){}",
            self.n_lat,
            self.lat_range.0,
            self.lat_range.1,
            self.latitude_variable,
            self.n_lon,
            self.lon_range.0,
            self.lon_range.1,
            self.longitude_variable,
            if self.global { ", global" } else { "" }
        )?;
        let step = match self.step {
            Some(step) => format!("every {}", format_step(step)),
            None if self.n_times > 1 => "uneven steps".to_string(),
            None => "single time".to_string(),
        };
        writeln!(
            f,
            "  time: {} steps from {} to {}, {step} ({})",
            self.n_times,
            self.first_time.format("%Y-%m-%d %H:%M:%S UTC"),
            self.last_time.format("%Y-%m-%d %H:%M:%S UTC"),
            self.time_variable
        )?;
        for note in &self.notes {
            writeln!(f, "  note: {note}")?;
        }
        Ok(())
    }
}

fn format_step(step: TimeDelta) -> String {
    let s = step.num_seconds();
    if step.subsec_nanos() != 0 {
        format!("{} s", step.num_milliseconds() as f64 / 1000.0)
    } else if s % 86_400 == 0 {
        format!("{} d", s / 86_400)
    } else if s % 3600 == 0 {
        format!("{} h", s / 3600)
    } else if s % 60 == 0 {
        format!("{} min", s / 60)
    } else {
        format!("{s} s")
    }
}

// ------------------------------------------------------------------ opening

const HDF5_SIGNATURE: &[u8] = b"\x89HDF\r\n\x1a\n";

/// Largest hyperslab (decoded bytes) one read may allocate in a NetCDF-4 file, so that
/// a file declaring an enormous sparse grid fails cleanly instead of exhausting memory.
const MAX_READ_BYTES: usize = 512 * 1024 * 1024;

/// Largest coordinate axis (latitudes, longitudes or times) the importer reads.
const MAX_AXIS_LEN: u64 = 10_000_000;

fn open(path: &Path) -> Result<NcFile, String> {
    let mut head = Vec::with_capacity(8);
    std::fs::File::open(path)
        .and_then(|f| f.take(8).read_to_end(&mut head))
        .map_err(|e| format!("cannot read the file: {e}"))?;
    // A NetCDF-4 file may have its HDF5 signature after a user block: the reader
    // looks for it there, so only refuse here what is clearly something else.
    if !is_netcdf(&head) && head.len() >= 4 && head.starts_with(b"CDF") {
        return Err(format!(
            "unsupported NetCDF-3 version byte {}: expected 1 (classic), 2 (64-bit offset) or 5 (CDF-5)",
            head[3]
        ));
    }
    let options = NcOpenOptions {
        max_read_bytes: MAX_READ_BYTES,
        ..NcOpenOptions::default()
    };
    NcFile::open_with_options(path, options).map_err(|e| match e {
        netcdf_reader::Error::InvalidMagic => {
            "not a NetCDF file: expected it to start with \"CDF\" (NetCDF-3) or the HDF5 signature (NetCDF-4)"
                .to_string()
        }
        e => format!("cannot read it as NetCDF: {e}"),
    })
}

fn format_name(format: NcFormat) -> &'static str {
    match format {
        NcFormat::Classic => "NetCDF-3 classic",
        NcFormat::Offset64 => "NetCDF-3 64-bit offset",
        NcFormat::Cdf5 => "NetCDF-3 64-bit data (CDF-5)",
        NcFormat::Nc4 => "NetCDF-4 (HDF5)",
        NcFormat::Nc4Classic => "NetCDF-4 classic model (HDF5)",
    }
}

fn summarize(file: &NcFile, wind: Result<NetcdfWindGrid, String>) -> Result<NetcdfSummary, String> {
    let globals = file
        .global_attributes()
        .map_err(|e| format!("cannot read the global attributes: {e}"))?;
    let global = |name: &str| {
        globals
            .iter()
            .find(|a| a.name == name)
            .and_then(|a| attr_text(&a.value))
    };
    let variables = file
        .variables()
        .map_err(|e| format!("cannot read the variables: {e}"))?;
    let groups = file
        .root_group()
        .map(|g| g.groups.iter().map(|g| g.name.clone()).collect())
        .unwrap_or_default();
    Ok(NetcdfSummary {
        format: format_name(file.format()),
        title: global("title"),
        institution: global("institution"),
        source: global("source"),
        variables: variables.iter().map(describe).collect(),
        groups,
        wind,
    })
}

fn describe(var: &NcVariable) -> NetcdfVariable {
    NetcdfVariable {
        name: var.name.clone(),
        data_type: type_name(&var.dtype),
        dimensions: var
            .dimensions
            .iter()
            .map(|d| (d.name.clone(), d.size))
            .collect(),
        standard_name: text_attr(var, "standard_name"),
        units: text_attr(var, "units"),
        long_name: text_attr(var, "long_name"),
    }
}

fn type_name(dtype: &NcType) -> String {
    match dtype {
        NcType::Byte => "byte".into(),
        NcType::Char => "char".into(),
        NcType::Short => "short".into(),
        NcType::Int => "int".into(),
        NcType::Float => "float".into(),
        NcType::Double => "double".into(),
        NcType::UByte => "ubyte".into(),
        NcType::UShort => "ushort".into(),
        NcType::UInt => "uint".into(),
        NcType::Int64 => "int64".into(),
        NcType::UInt64 => "uint64".into(),
        NcType::String => "string".into(),
        other => format!("{other:?}").to_lowercase(),
    }
}

/// A text attribute, trimmed of the NUL padding some writers leave.
fn attr_text(value: &NcAttrValue) -> Option<String> {
    let text = value.as_string()?;
    let text = text.trim_matches(|c: char| c == '\0' || c.is_whitespace());
    (!text.is_empty()).then(|| text.to_string())
}

fn text_attr(var: &NcVariable, name: &str) -> Option<String> {
    var.attribute(name).and_then(|a| attr_text(&a.value))
}

fn lower_attr(var: &NcVariable, name: &str) -> Option<String> {
    text_attr(var, name).map(|s| s.to_ascii_lowercase())
}

/// "sst (time, lat, lon; sea_surface_temperature; degC)" for error messages.
fn short_description(var: &NcVariable) -> String {
    let dims: Vec<&str> = var.dimensions.iter().map(|d| d.name.as_str()).collect();
    let mut s = format!("{} ({}", var.name, dims.join(", "));
    if let Some(sn) = text_attr(var, "standard_name") {
        s.push_str("; ");
        s.push_str(&sn);
    }
    if let Some(u) = text_attr(var, "units") {
        s.push_str("; ");
        s.push_str(&u);
    }
    s.push(')');
    s
}

fn list_variables(vars: &[NcVariable]) -> String {
    // Data variables first: coordinate variables only when there is nothing else.
    let data: Vec<&NcVariable> = vars
        .iter()
        .filter(|v| !v.is_coordinate_variable())
        .collect();
    let shown: Vec<&NcVariable> = if data.is_empty() {
        vars.iter().collect()
    } else {
        data
    };
    if shown.is_empty() {
        return "no variables".into();
    }
    shown
        .iter()
        .map(|v| short_description(v))
        .collect::<Vec<_>>()
        .join(", ")
}

// ------------------------------------------------------------------ finding the wind

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Component {
    U,
    V,
}

const U_NAMES: [&str; 5] = ["u10", "uwnd", "u10m", "10u", "uas"];
const V_NAMES: [&str; 5] = ["v10", "vwnd", "v10m", "10v", "vas"];

/// How a variable was recognised as a wind component.
#[derive(Debug, Clone, Copy)]
struct Match {
    component: Component,
    by_name: bool,
    by_standard_name: bool,
}

fn wind_match(var: &NcVariable) -> Option<Match> {
    let name = var.name.to_ascii_lowercase();
    let standard = lower_attr(var, "standard_name");
    let by_name = |names: &[&str]| names.contains(&name.as_str());
    let by_std = |s: &str| standard.as_deref() == Some(s);
    let (component, by_name, by_standard_name) = if by_name(&U_NAMES) || by_std("eastward_wind") {
        (Component::U, by_name(&U_NAMES), by_std("eastward_wind"))
    } else if by_name(&V_NAMES) || by_std("northward_wind") {
        (Component::V, by_name(&V_NAMES), by_std("northward_wind"))
    } else {
        return None;
    };
    Some(Match {
        component,
        by_name,
        by_standard_name,
    })
}

/// What a dimension of a wind variable is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Role {
    Time,
    Lat,
    Lon,
    /// A dimension of size 1 (height, level, ...): always index 0.
    Single,
}

/// What a coordinate variable is, from its attributes and name.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Kind {
    Time,
    Lat,
    Lon,
    /// A height above the surface, with the factor from its units to metres.
    Height(f64),
    Pressure,
    Other,
}

fn is_degree_unit(units: &str) -> bool {
    matches!(units, "degrees" | "degree" | "deg")
}

fn classify(var: &NcVariable) -> Kind {
    let name = var.name.to_ascii_lowercase();
    let standard = lower_attr(var, "standard_name").unwrap_or_default();
    let units = lower_attr(var, "units").unwrap_or_default();
    let axis = lower_attr(var, "axis").unwrap_or_default();
    if units.contains(" since ") {
        return Kind::Time;
    }
    let lat_units = matches!(
        units.as_str(),
        "degrees_north" | "degree_north" | "degrees_n" | "degree_n" | "degreesn" | "degreen"
    );
    let lon_units = matches!(
        units.as_str(),
        "degrees_east" | "degree_east" | "degrees_e" | "degree_e" | "degreeseast" | "degreee"
    );
    let plain = units.is_empty() || is_degree_unit(&units);
    if standard == "latitude"
        || lat_units
        || (plain && matches!(name.as_str(), "lat" | "latitude" | "lats" | "nav_lat"))
        || (is_degree_unit(&units) && (name == "y" || axis == "y"))
    {
        return Kind::Lat;
    }
    if standard == "longitude"
        || lon_units
        || (plain
            && matches!(
                name.as_str(),
                "lon" | "long" | "longitude" | "lons" | "nav_lon"
            ))
        || (is_degree_unit(&units) && (name == "x" || axis == "x"))
    {
        return Kind::Lon;
    }
    if matches!(
        units.as_str(),
        "pa" | "hpa" | "kpa" | "mb" | "mbar" | "millibar" | "millibars" | "bar" | "pascal"
    ) {
        return Kind::Pressure;
    }
    let long_name = lower_attr(var, "long_name").unwrap_or_default();
    let heightish =
        standard == "height" || name.starts_with("height") || long_name.contains("height");
    if heightish {
        match units.as_str() {
            "m" | "meter" | "meters" | "metre" | "metres" => return Kind::Height(1.0),
            "km" => return Kind::Height(1000.0),
            _ => {}
        }
    }
    Kind::Other
}

/// The 1-D coordinate variable along `dim`: the one named after it, else any 1-D
/// variable along it that is a time, latitude or longitude.
fn coordinate_for<'f>(vars: &'f [NcVariable], dim: &NcDimension) -> Option<&'f NcVariable> {
    let along = |v: &&NcVariable| matches!(v.dimensions.as_slice(), [d] if d.name == dim.name);
    vars.iter()
        .filter(along)
        .find(|v| v.name == dim.name)
        .or_else(|| {
            vars.iter()
                .filter(along)
                .find(|v| matches!(classify(v), Kind::Time | Kind::Lat | Kind::Lon))
        })
}

/// A wind variable whose dimensions fit: which dimension is what, and its height.
#[derive(Debug, Clone)]
struct Fit<'f> {
    var: &'f NcVariable,
    matched: Match,
    roles: Vec<Role>,
    time: &'f NcVariable,
    lat: &'f NcVariable,
    lon: &'f NcVariable,
    height_m: Option<f64>,
}

impl Fit<'_> {
    fn score(&self) -> u8 {
        2 * u8::from(self.height_m.is_some())
            + u8::from(self.matched.by_name)
            + u8::from(self.matched.by_standard_name)
    }
}

fn read_first_value(file: &NcFile, var: &NcVariable) -> Option<f64> {
    if var.num_elements().ok()? != 1 {
        return None;
    }
    let data = file.read_variable_unpacked_masked(&var.name).ok()?;
    data.iter().copied().next().filter(|x| x.is_finite())
}

/// A vertical coordinate of a wind variable: Ok(Some(metres)) for a height, Ok(None)
/// when it says nothing, Err when it puts the wind on a pressure level.
fn vertical(file: &NcFile, coord: &NcVariable) -> Result<Option<f64>, String> {
    match classify(coord) {
        Kind::Height(factor) => Ok(read_first_value(file, coord).map(|h| h * factor)),
        Kind::Pressure => {
            let level = read_first_value(file, coord).map_or_else(String::new, |p| format!(" {p}"));
            let units = text_attr(coord, "units").unwrap_or_default();
            Err(format!(
                "is on the pressure level {}{level} {units}, not at 10 m",
                coord.name
            ))
        }
        _ => Ok(None),
    }
}

fn fit<'f>(file: &NcFile, vars: &'f [NcVariable], var: &'f NcVariable) -> Result<Fit<'f>, String> {
    let matched = wind_match(var).ok_or_else(|| format!("{} is not a wind variable", var.name))?;
    fit_as(file, vars, var, matched, Some(10.0))
}

/// Fits a variable's dimensions to time, latitude and longitude (and dimensions of size
/// 1); `height_m`: the height it must be at, where it says.
fn fit_as<'f>(
    file: &NcFile,
    vars: &'f [NcVariable],
    var: &'f NcVariable,
    matched: Match,
    wanted_height_m: Option<f64>,
) -> Result<Fit<'f>, String> {
    let mut roles = Vec::with_capacity(var.dimensions.len());
    let (mut time, mut lat, mut lon) = (None, None, None);
    let mut height_m = None;
    for dim in &var.dimensions {
        let coord = coordinate_for(vars, dim);
        let kind = coord.map_or(Kind::Other, classify);
        let (role, slot) = match kind {
            Kind::Time => (Role::Time, &mut time),
            Kind::Lat => (Role::Lat, &mut lat),
            Kind::Lon => (Role::Lon, &mut lon),
            _ if dim.size == 1 => {
                if let Some(coord) = coord
                    && let Some(h) = vertical(file, coord)?
                {
                    height_m = Some(h);
                }
                roles.push(Role::Single);
                continue;
            }
            _ => {
                let values = coord
                    .and_then(|c| {
                        if c.num_elements().ok()? > 8 {
                            return None;
                        }
                        let data = file.read_variable_unpacked_masked(&c.name).ok()?;
                        let list: Vec<String> = data.iter().map(|x| format!("{x}")).collect();
                        let units = text_attr(c, "units").unwrap_or_default();
                        Some(format!(": {} {units}", list.join(", ")))
                    })
                    .unwrap_or_default();
                return Err(format!(
                    "{} has the dimension {} of size {}{values}: expected only time, latitude, longitude and dimensions of size 1",
                    var.name, dim.name, dim.size
                ));
            }
        };
        if slot.is_some() {
            return Err(format!(
                "{} has two dimensions that look like the same axis ({}): expected one time, one latitude and one longitude",
                var.name, dim.name
            ));
        }
        *slot = coord;
        roles.push(role);
    }
    // Scalar coordinates named by the `coordinates` attribute (e.g. height = 10 m).
    if let Some(list) = text_attr(var, "coordinates") {
        for name in list.split_whitespace() {
            if let Some(c) = vars
                .iter()
                .find(|v| v.name == name && v.dimensions.is_empty())
                && let Some(h) = vertical(file, c)?
            {
                height_m = Some(h);
            }
        }
    }
    let dims: Vec<&str> = var.dimensions.iter().map(|d| d.name.as_str()).collect();
    let dims = dims.join(", ");
    let Some(time) = time else {
        return Err(format!(
            "{} ({dims}) has no time dimension: expected one whose coordinate variable has units \"<unit> since <date>\"",
            var.name
        ));
    };
    let (Some(lat), Some(lon)) = (lat, lon) else {
        let curvilinear = vars
            .iter()
            .any(|v| v.dimensions.len() == 2 && matches!(classify(v), Kind::Lat | Kind::Lon));
        return Err(format!(
            "{} ({dims}) has no 1-D latitude and longitude coordinates: expected coordinate variables with units degrees_north/degrees_east or standard_name latitude/longitude{}",
            var.name,
            if curvilinear {
                " (this file has 2-D latitude/longitude: curvilinear grids are not supported)"
            } else {
                ""
            }
        ));
    };
    if let (Some(h), Some(wanted)) = (height_m, wanted_height_m)
        && (h - wanted).abs() > 0.5
    {
        return Err(format!("{} is at {h} m, not at {wanted} m", var.name));
    }
    Ok(Fit {
        var,
        matched,
        roles,
        time,
        lat,
        lon,
        height_m,
    })
}

// ------------------------------------------------------------------ sea temperature

const SST_STANDARD_NAMES: [&str; 3] = [
    "sea_surface_temperature",
    "sea_surface_foundation_temperature",
    "sea_surface_subskin_temperature",
];
const SST_NAMES: [&str; 2] = ["sst", "analysed_sst"];

/// Sea temperature of a NetCDF-CF file at points: the first variable with a sea-surface
/// temperature `standard_name` (or named `sst` or `analysed_sst`, any case) on time,
/// latitude and longitude; kelvin or °C by its `units`; packing and fill values applied.
/// Each point is bilinear in the grid cell around it over the corners that have a value
/// (land is a fill value: the weights of the sea corners are renormalised); NaN where no
/// corner has one.
pub fn sample_netcdf_sst(path: &Path, points: &[(f64, f64)]) -> Result<super::SstSamples, String> {
    let file = open(path)?;
    let vars = file
        .variables()
        .map_err(|e| format!("cannot read the variables: {e}"))?;
    let is_sst = |v: &&NcVariable| {
        let std = lower_attr(v, "standard_name");
        std.as_deref()
            .is_some_and(|s| SST_STANDARD_NAMES.contains(&s))
            || SST_NAMES.contains(&v.name.to_ascii_lowercase().as_str())
    };
    let matched = Match {
        component: Component::U,
        by_name: true,
        by_standard_name: true,
    };
    let mut rejected = Vec::new();
    let mut found = None;
    for var in vars.iter().filter(is_sst) {
        match fit_as(&file, vars, var, matched, None) {
            Ok(f) => {
                found = Some(f);
                break;
            }
            Err(e) => rejected.push(e),
        }
    }
    let Some(f) = found else {
        let why = if rejected.is_empty() {
            String::new()
        } else {
            format!(" ({})", rejected.join("; "))
        };
        return Err(format!(
            "no sea surface temperature in the file{why}: expected a variable with standard_name {} or named sst or analysed_sst; the file has: {}",
            SST_STANDARD_NAMES.join(", "),
            list_variables(vars)
        ));
    };
    let units = text_attr(f.var, "units").unwrap_or_default();
    let offset = match units.trim().to_ascii_lowercase().replace(' ', "_").as_str() {
        "k" | "kelvin" | "kelvins" | "degree_kelvin" | "degrees_kelvin" => 273.15,
        "degc" | "degreec" | "degreesc" | "degree_c" | "degrees_c" | "deg_c" | "c" | "celsius"
        | "degree_celsius" | "degrees_celsius" | "°c" => 0.0,
        _ => {
            return Err(format!(
                "{} has units \"{units}\": expected kelvin (K) or degrees Celsius (degC)",
                f.var.name
            ));
        }
    };
    // The temperature is read as both members of the pair (the second is not decoded).
    let decode = || Decoder::new(f.var, 1.0);
    let layout = layout_of(&file, (&f, &f), (decode(), decode()), units, Vec::new())?;
    let corners: Vec<Option<Corners>> = points
        .iter()
        .map(|&(lat, lon)| layout.corners(lat, lon))
        .collect();
    let stencils: Vec<Option<Stencil>> = points
        .iter()
        .map(|&(lat, lon)| layout.stencil(lat, lon))
        .collect();
    let mut out = vec![Vec::with_capacity(layout.times.len()); points.len()];
    let block = Block::around(&stencils);
    for t in 0..layout.times.len() {
        let values = match &block {
            Some(b) => Some((b, layout.read_block(&file, &layout.u, t, b)?)),
            None => None,
        };
        for (corners, series) in corners.iter().zip(out.iter_mut()) {
            let value = match (corners, &values) {
                (Some(c), Some((b, v))) => sea_value(c, b, v) - offset,
                _ => f64::NAN,
            };
            series.push(value);
        }
    }
    Ok(super::SstSamples {
        times: layout.times,
        points: out,
    })
}

fn no_wind_message(vars: &[NcVariable], rejected: &[String]) -> String {
    let mut msg = String::from(
        "no 10 m wind found: expected an eastward and a northward component (standard_name eastward_wind/northward_wind, or named u10/v10, uwnd/vwnd, U10M/V10M in any case)",
    );
    if !rejected.is_empty() {
        msg.push_str("; not usable: ");
        msg.push_str(&rejected.join("; "));
    }
    msg.push_str("; the file has: ");
    msg.push_str(&list_variables(vars));
    msg
}

/// Where the wind is and how to read it.
struct Layout<'f> {
    u: Source<'f>,
    v: Source<'f>,
    roles: Vec<Role>,
    lat: Axis,
    lon: LonAxis,
    times: Vec<DateTime<Utc>>,
    grid: NetcdfWindGrid,
}

/// One wind component: its variable and how to decode its stored values.
struct Source<'f> {
    var: &'f NcVariable,
    decode: Decoder,
}

fn find_wind(file: &NcFile) -> Result<Layout<'_>, String> {
    let vars = file
        .variables()
        .map_err(|e| format!("cannot read the variables: {e}"))?;
    let mut fits = Vec::new();
    let mut rejected = Vec::new();
    for var in vars.iter().filter(|v| wind_match(v).is_some()) {
        match fit(file, vars, var) {
            Ok(f) => fits.push(f),
            Err(e) => rejected.push(e),
        }
    }
    // The best (u, v) pair with the same dimensions; ties go to file order.
    let mut best: Option<(&Fit, &Fit, u8)> = None;
    for u in fits.iter().filter(|f| f.matched.component == Component::U) {
        for v in fits.iter().filter(|f| f.matched.component == Component::V) {
            if u.var.dimensions != v.var.dimensions {
                continue;
            }
            let score = u.score() + v.score();
            if best.is_none_or(|(_, _, s)| score > s) {
                best = Some((u, v, score));
            }
        }
    }
    let Some((u, v, _)) = best else {
        let has = |c: Component| fits.iter().any(|f| f.matched.component == c);
        if has(Component::U) && has(Component::V) {
            rejected.push(
                "the eastward and northward components have different dimensions".to_string(),
            );
        } else if has(Component::U) || has(Component::V) {
            let found: Vec<&str> = fits.iter().map(|f| f.var.name.as_str()).collect();
            rejected.push(format!(
                "only one component found ({}): both eastward and northward wind are needed",
                found.join(", ")
            ));
        }
        return Err(no_wind_message(vars, &rejected));
    };
    let mut notes = Vec::new();
    let u_units = text_attr(u.var, "units");
    let v_units = text_attr(v.var, "units");
    let u_decode = Decoder::new(u.var, speed_factor(u.var, u_units.as_deref(), &mut notes)?);
    let v_decode = Decoder::new(v.var, speed_factor(v.var, v_units.as_deref(), &mut notes)?);
    if u.height_m.is_none() && !u.matched.by_name {
        notes.push(format!(
            "{} has no height coordinate: taken as the 10 m wind",
            u.var.name
        ));
    }
    let decode = (u_decode, v_decode);
    layout_of(
        file,
        (u, v),
        decode,
        u_units.unwrap_or_else(|| "(none)".into()),
        notes,
    )
}

/// The layout of a pair of fitted variables (the wind's u and v, or a sea temperature
/// twice): their time, latitude and longitude axes read and checked, and their
/// description.
fn layout_of<'f>(
    file: &NcFile,
    (u, v): (&Fit<'f>, &Fit<'f>),
    (u_decode, v_decode): (Decoder, Decoder),
    units: String,
    notes: Vec<String>,
) -> Result<Layout<'f>, String> {
    let times = read_times(file, u.time)?;
    let lat = Axis::new(&read_axis(file, u.lat, "latitude")?, &u.lat.name)?;
    let lon = LonAxis::new(&read_axis(file, u.lon, "longitude")?, &u.lon.name)?;
    if lat.values.iter().any(|x| x.abs() > 90.0 + 1e-6) {
        return Err(format!(
            "the latitudes ({}) go beyond ±90°: expected degrees north",
            u.lat.name
        ));
    }
    let (Some(&first_time), Some(&last_time)) = (times.first(), times.last()) else {
        return Err(format!("the time axis {} has no steps", u.time.name));
    };
    let steps: Vec<TimeDelta> = times.windows(2).map(|w| w[1] - w[0]).collect();
    let step = steps
        .first()
        .copied()
        .filter(|s| steps.iter().all(|x| x == s));
    let grid = NetcdfWindGrid {
        u_variable: u.var.name.clone(),
        v_variable: v.var.name.clone(),
        units,
        time_variable: u.time.name.clone(),
        latitude_variable: u.lat.name.clone(),
        longitude_variable: u.lon.name.clone(),
        n_lat: lat.values.len(),
        n_lon: lon.axis.values.len(),
        lat_range: (lat.first(), lat.last()),
        lon_range: lon.range,
        global: lon.wraps || lon.covers_all,
        n_times: times.len(),
        first_time,
        last_time,
        step,
        notes,
    };
    Ok(Layout {
        u: Source {
            var: u.var,
            decode: u_decode,
        },
        v: Source {
            var: v.var,
            decode: v_decode,
        },
        roles: u.roles.clone(),
        lat,
        lon,
        times,
        grid,
    })
}

// ------------------------------------------------------------------ units and decoding

/// The factor from a wind variable's units to m/s.
fn speed_factor(
    var: &NcVariable,
    units: Option<&str>,
    notes: &mut Vec<String>,
) -> Result<f64, String> {
    let Some(units) = units else {
        notes.push(format!("{} has no units: taken as m/s", var.name));
        return Ok(1.0);
    };
    let compact = compact_units(units);
    let factor = match compact.as_str() {
        "m/s" | "ms-1" | "m1s-1" => 1.0,
        "kt" => 1852.0 / 3600.0,
        "km/h" | "kmh-1" | "kph" => 1.0 / 3.6,
        "mph" | "mi/h" | "mih-1" => 0.447_04,
        "cm/s" | "cms-1" => 0.01,
        _ => {
            return Err(format!(
                "{} has units \"{units}\": expected m s-1 (or m/s, m s**-1), knots or km/h",
                var.name
            ));
        }
    };
    Ok(factor)
}

/// Units in a compact canonical spelling: each word by its symbol ("metres" → "m",
/// "second" → "s", "per" → "/", "knots" → "kt"), then spaces and the product and power
/// signs dropped: "m s**-1", "m.s^-1" and "metre second-1" all become "ms-1".
fn compact_units(units: &str) -> String {
    let lower = units.to_lowercase();
    let mut out = String::new();
    let mut word = String::new();
    let flush = |word: &mut String, out: &mut String| {
        out.push_str(match word.as_str() {
            "m" | "meter" | "meters" | "metre" | "metres" => "m",
            "s" | "sec" | "secs" | "second" | "seconds" => "s",
            "h" | "hr" | "hrs" | "hour" | "hours" => "h",
            "km" | "kilometer" | "kilometers" | "kilometre" | "kilometres" => "km",
            "cm" | "centimeter" | "centimeters" | "centimetre" | "centimetres" => "cm",
            "mi" | "mile" | "miles" => "mi",
            "kt" | "kts" | "kn" | "knot" | "knots" => "kt",
            "per" => "/",
            other => other,
        });
        word.clear();
    };
    for c in lower.chars() {
        if c.is_alphabetic() {
            word.push(c);
            continue;
        }
        flush(&mut word, &mut out);
        if !matches!(c, ' ' | '.' | '*' | '^' | '·' | '_') {
            out.push(c);
        }
    }
    flush(&mut word, &mut out);
    out
}

/// Turns stored values into m/s (NaN = missing), CF order: `_Unsigned`, then masking
/// (fill, missing, valid range), then unpacking, then units.
#[derive(Debug, Clone)]
struct Decoder {
    sign: Option<SignParams>,
    mask: Option<MaskParams>,
    /// The type's default fill value, used when the variable has no `_FillValue`.
    default_fill: Option<f64>,
    unpack: Option<UnpackParams>,
    factor: f64,
}

impl Decoder {
    fn new(var: &NcVariable, factor: f64) -> Self {
        let mask = MaskParams::from_variable(var);
        let has_fill = mask.as_ref().is_some_and(|m| m.fill_value.is_some());
        let default_fill = if has_fill {
            None
        } else {
            match var.dtype {
                // netCDF-C's NC_FILL_SHORT, NC_FILL_INT, NC_FILL_FLOAT, NC_FILL_DOUBLE,
                // NC_FILL_USHORT and NC_FILL_UINT.
                NcType::Short => Some(-32_767.0),
                NcType::Int => Some(-2_147_483_647.0),
                NcType::Float => Some(f64::from(9.969_21e36_f32)),
                NcType::Double => Some(9.969_209_968_386_869e36),
                NcType::UShort => Some(65_535.0),
                NcType::UInt => Some(4_294_967_295.0),
                // Bytes have no default fill in practice (netCDF4-python agrees).
                _ => None,
            }
        };
        Self {
            sign: SignParams::from_variable(var),
            mask,
            default_fill,
            unpack: UnpackParams::from_variable(var),
            factor,
        }
    }

    fn decode(&self, stored: f64) -> f64 {
        let x = self.sign.map_or(stored, |s| s.reinterpret(stored));
        if x.is_nan() || self.default_fill == Some(x) {
            return f64::NAN;
        }
        if let Some(m) = &self.mask
            && (m.fill_value == Some(x)
                || m.missing_values.contains(&x)
                || m.valid_min.is_some_and(|lo| x < lo)
                || m.valid_max.is_some_and(|hi| x > hi))
        {
            return f64::NAN;
        }
        let x = self.unpack.map_or(x, |p| x * p.scale_factor + p.add_offset);
        let x = x * self.factor;
        if x.is_finite() { x } else { f64::NAN }
    }
}

// ------------------------------------------------------------------ time

/// Reads a CF time coordinate into UTC instants.
fn read_times(file: &NcFile, var: &NcVariable) -> Result<Vec<DateTime<Utc>>, String> {
    let units = text_attr(var, "units").unwrap_or_default();
    let calendar = lower_attr(var, "calendar").unwrap_or_else(|| "standard".into());
    let (unit_s, reference) = parse_time_units(&units, &calendar)
        .map_err(|e| format!("the time variable {} has units \"{units}\": {e}", var.name))?;
    let values = read_axis(file, var, "time")?;
    let mut times = Vec::with_capacity(values.len());
    for (k, &x) in values.iter().enumerate() {
        let ms = x * unit_s * 1000.0;
        let t = (ms.abs() < 1e16)
            .then(|| TimeDelta::try_milliseconds(ms.round() as i64))
            .flatten()
            .and_then(|d| reference.checked_add_signed(d))
            .ok_or_else(|| format!("time {k} of {} ({x} {units}) is out of range", var.name))?;
        if let Some(&prev) = times.last()
            && t <= prev
        {
            return Err(format!(
                "the times of {} do not increase: step {k} ({}) is not after step {} ({})",
                var.name,
                t.format("%Y-%m-%d %H:%M:%S"),
                k - 1,
                prev.format("%Y-%m-%d %H:%M:%S")
            ));
        }
        times.push(t);
    }
    Ok(times)
}

/// Parses CF time units "<unit> since <date>[ <time>][ <zone>]" on a calendar with real
/// dates: seconds per unit and the reference instant.
fn parse_time_units(units: &str, calendar: &str) -> Result<(f64, DateTime<Utc>), String> {
    let julian = match calendar.trim() {
        "standard" | "gregorian" | "" => JulianRule::BeforeReform,
        "proleptic_gregorian" => JulianRule::Never,
        "julian" => JulianRule::Always,
        other => {
            return Err(format!(
                "calendar \"{other}\" has no real dates: expected standard, gregorian, proleptic_gregorian or julian"
            ));
        }
    };
    // One space between words, so that "hours  since" and tabs read as well.
    let lower = units
        .split_whitespace()
        .collect::<Vec<_>>()
        .join(" ")
        .to_ascii_lowercase();
    let Some((unit, rest)) = lower.split_once(" since ") else {
        return Err(
            "expected \"<unit> since <date>\", e.g. \"hours since 2026-06-15 00:00:00\"".into(),
        );
    };
    let unit_s = match unit.trim() {
        "seconds" | "second" | "secs" | "sec" | "s" => 1.0,
        "minutes" | "minute" | "mins" | "min" => 60.0,
        "hours" | "hour" | "hrs" | "hr" | "h" => 3600.0,
        "days" | "day" | "d" => 86_400.0,
        "weeks" | "week" => 604_800.0,
        "months" | "month" | "years" | "year" => {
            return Err(
                "months and years are not fixed lengths: expected seconds, minutes, hours or days"
                    .into(),
            );
        }
        other => {
            return Err(format!(
                "unknown time unit \"{other}\": expected seconds, minutes, hours or days"
            ));
        }
    };
    let reference = parse_reference(rest, julian)?;
    Ok((unit_s, reference))
}

/// Which dates of the reference are on the Julian calendar.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum JulianRule {
    /// `standard`/`gregorian`: dates before 1582-10-15 are Julian.
    BeforeReform,
    /// `proleptic_gregorian`.
    Never,
    /// `julian`.
    Always,
}

fn parse_reference(text: &str, julian: JulianRule) -> Result<DateTime<Utc>, String> {
    let bad = || {
        format!(
            "cannot read the reference date \"{}\": expected YYYY-MM-DD[ hh:mm:ss][ zone]",
            text.trim()
        )
    };
    let text = text.trim();
    // The date ends at the first space or 'T'.
    let date_end = text.find([' ', 't']).unwrap_or(text.len());
    let (date, rest) = text.split_at(date_end);
    let rest = rest.strip_prefix(['t', ' ']).unwrap_or(rest).trim();
    let mut parts = date.split('-');
    let (Some(y), Some(m), Some(d), None) =
        (parts.next(), parts.next(), parts.next(), parts.next())
    else {
        return Err(bad());
    };
    let (Ok(y), Ok(m), Ok(d)) = (y.parse::<i32>(), m.parse::<u32>(), d.parse::<u32>()) else {
        return Err(bad());
    };
    // Time of day and zone: "12:00:00", "12:00:00Z", "00:00:0.0", "12:00 +01:00", "UTC".
    let mut rest = rest.to_string();
    let mut offset_s: i64 = 0;
    let mut time_part = String::new();
    if let Some(first) = rest.split_whitespace().next()
        && first.contains(':')
        && first.starts_with(|c: char| c.is_ascii_digit())
    {
        time_part = first.to_string();
        rest = rest[first.len()..].trim().to_string();
    }
    // A zone glued to the time: "12:00:00Z", "12:00:00+01:00", "12:00:00-0600".
    if let Some(z) = time_part.strip_suffix('z') {
        time_part = z.to_string();
    } else if let Some(pos) = time_part.find(['+', '-']) {
        rest = format!("{} {rest}", &time_part[pos..]);
        time_part.truncate(pos);
    }
    for token in rest.split_whitespace() {
        match token {
            "utc" | "gmt" | "z" => {}
            zone => offset_s = parse_zone(zone).ok_or_else(bad)?,
        }
    }
    let time = if time_part.is_empty() {
        NaiveTime::MIN
    } else {
        parse_clock(&time_part).ok_or_else(bad)?
    };
    let date = calendar_date(y, m, d, julian).ok_or_else(bad)?;
    let local = NaiveDateTime::new(date, time);
    local
        .checked_sub_signed(TimeDelta::seconds(offset_s))
        .map(|t| t.and_utc())
        .ok_or_else(bad)
}

/// "+01:00", "-6", "+0530", "-06:00" to seconds east of UTC.
fn parse_zone(zone: &str) -> Option<i64> {
    let (sign, digits) = match zone.as_bytes().first()? {
        b'+' => (1, &zone[1..]),
        b'-' => (-1, &zone[1..]),
        _ => (1, zone),
    };
    let (h, m) = match digits.split_once(':') {
        Some((h, m)) => (h.parse::<i64>().ok()?, m.parse::<i64>().ok()?),
        None if digits.len() == 4 => (
            digits.get(..2)?.parse().ok()?,
            digits.get(2..)?.parse().ok()?,
        ),
        None => (digits.parse().ok()?, 0),
    };
    (h <= 14 && m < 60).then_some(sign * (h * 3600 + m * 60))
}

/// "hh:mm[:ss[.fff]]".
fn parse_clock(text: &str) -> Option<NaiveTime> {
    let mut parts = text.split(':');
    let h: u32 = parts.next()?.parse().ok()?;
    let m: u32 = parts.next()?.parse().ok()?;
    let s: f64 = match parts.next() {
        Some(s) => s.parse().ok()?,
        None => 0.0,
    };
    if parts.next().is_some() || !(0.0..61.0).contains(&s) {
        return None;
    }
    let whole = s.floor();
    let nanos = ((s - whole) * 1e9).round().min(999_999_999.0) as u32;
    NaiveTime::from_hms_nano_opt(h, m, whole as u32, nanos)
}

/// The proleptic Gregorian date of a calendar date, reading it as Julian where the
/// calendar says so.
fn calendar_date(y: i32, m: u32, d: u32, julian: JulianRule) -> Option<NaiveDate> {
    let is_julian = match julian {
        JulianRule::Never => false,
        JulianRule::Always => true,
        JulianRule::BeforeReform => (y, m, d) < (1582, 10, 15),
    };
    if !is_julian {
        return NaiveDate::from_ymd_opt(y, m, d);
    }
    if julian == JulianRule::BeforeReform && (y, m, d) >= (1582, 10, 5) {
        return None; // the ten days dropped by the reform
    }
    let leap = y % 4 == 0;
    let days_in_month = match m {
        1 | 3 | 5 | 7 | 8 | 10 | 12 => 31,
        4 | 6 | 9 | 11 => 30,
        2 if leap => 29,
        2 => 28,
        _ => return None,
    };
    if d == 0 || d > days_in_month || y < -4000 {
        return None;
    }
    // Julian day number of a Julian calendar date.
    let a = (14 - i64::from(m)) / 12;
    let yy = i64::from(y) + 4800 - a;
    let mm = i64::from(m) + 12 * a - 3;
    let jdn = i64::from(d) + (153 * mm + 2) / 5 + 365 * yy + yy.div_euclid(4) - 32083;
    // Gregorian 0001-01-01 is Julian day number 1 721 426 and day 1 from CE.
    NaiveDate::from_num_days_from_ce_opt(i32::try_from(jdn - 1_721_425).ok()?)
}

// ------------------------------------------------------------------ grid axes

/// Reads a 1-D coordinate variable; every value must be finite.
fn read_axis(file: &NcFile, var: &NcVariable, what: &str) -> Result<Vec<f64>, String> {
    let n = var.num_elements().unwrap_or(u64::MAX);
    if n > MAX_AXIS_LEN {
        return Err(format!(
            "the {what} axis {} has {n} values: at most {MAX_AXIS_LEN} are supported",
            var.name
        ));
    }
    let data = file
        .read_variable_unpacked_masked(&var.name)
        .map_err(|e| format!("cannot read the {what} variable {}: {e}", var.name))?;
    let values: Vec<f64> = data.iter().copied().collect();
    if let Some(k) = values.iter().position(|x| !x.is_finite()) {
        return Err(format!(
            "the {what} variable {} has a missing or non-finite value at index {k}",
            var.name
        ));
    }
    Ok(values)
}

/// A strictly monotonic axis, kept ascending.
#[derive(Debug, Clone, PartialEq)]
struct Axis {
    /// Ascending values.
    values: Vec<f64>,
    /// The file stores them descending: ascending index `i` is file index `n - 1 - i`.
    reversed: bool,
}

/// Slack for a point on the edge of a grid, in degrees.
const EDGE_EPS: f64 = 1e-7;

impl Axis {
    fn new(values: &[f64], name: &str) -> Result<Self, String> {
        if values.is_empty() {
            return Err(format!("the coordinate variable {name} is empty"));
        }
        let ascending = values.windows(2).all(|w| w[1] > w[0]);
        let descending = values.windows(2).all(|w| w[1] < w[0]);
        if !ascending && !descending {
            return Err(format!(
                "the coordinate variable {name} is not strictly increasing or decreasing"
            ));
        }
        let mut values = values.to_vec();
        let reversed = descending && values.len() > 1;
        if reversed {
            values.reverse();
        }
        Ok(Self { values, reversed })
    }

    fn first(&self) -> f64 {
        self.values.first().copied().unwrap_or(f64::NAN)
    }

    fn last(&self) -> f64 {
        self.values.last().copied().unwrap_or(f64::NAN)
    }

    fn file_index(&self, i: usize) -> usize {
        if self.reversed {
            self.values.len() - 1 - i
        } else {
            i
        }
    }

    /// Two (file index, weight) pairs for linear interpolation at `x`, or `None` when
    /// `x` is outside the axis.
    fn bracket(&self, x: f64) -> Option<[(usize, f64); 2]> {
        let (first, last) = (self.first(), self.last());
        if !x.is_finite() || x < first - EDGE_EPS || x > last + EDGE_EPS {
            return None;
        }
        let len = self.values.len();
        // The number of values at or below x: x lies between values[above - 1] and
        // values[above].
        let above = self.values.partition_point(|&value| value <= x);
        let (lo, hi, frac) = if above == 0 {
            (0, 0, 0.0)
        } else if above >= len {
            (len - 1, len - 1, 0.0)
        } else {
            let (west, east) = (self.values[above - 1], self.values[above]);
            (above - 1, above, (x - west) / (east - west))
        };
        Some([
            (self.file_index(lo), 1.0 - frac),
            (self.file_index(hi), frac),
        ])
    }
}

/// A longitude axis: unwrapped across the antimeridian, matched modulo 360.
#[derive(Debug, Clone, PartialEq)]
struct LonAxis {
    axis: Axis,
    /// The last column neighbours the first (a global grid with no repeated column).
    wraps: bool,
    /// The axis spans 360° or more (a global grid that repeats its first column).
    covers_all: bool,
    /// First and last longitude as stored in the file (west to east).
    range: (f64, f64),
}

impl LonAxis {
    fn new(stored: &[f64], name: &str) -> Result<Self, String> {
        // Unwrap: each step taken modulo 360 into (-180, 180], so that 170, 180, -170
        // becomes 170, 180, 190 and -170, 180, 170 becomes -170, -180, -190.
        let mut values: Vec<f64> = Vec::with_capacity(stored.len());
        for &x in stored {
            let next = match values.last() {
                Some(&prev) => {
                    let step = 180.0 - (180.0 - (x - prev)).rem_euclid(360.0);
                    prev + step
                }
                None => x,
            };
            values.push(next);
        }
        let axis = Axis::new(&values, name)?;
        let span = axis.last() - axis.first();
        let covers_all = span >= 360.0 - EDGE_EPS;
        let max_step = axis
            .values
            .windows(2)
            .map(|w| w[1] - w[0])
            .fold(0.0, f64::max);
        let gap = axis.first() + 360.0 - axis.last();
        let wraps = !covers_all && axis.values.len() > 1 && gap <= max_step * 1.001 + 1e-9;
        let (west, east) = if axis.reversed {
            (stored.last(), stored.first())
        } else {
            (stored.first(), stored.last())
        };
        Ok(Self {
            axis,
            wraps,
            covers_all,
            range: (
                west.copied().unwrap_or(f64::NAN),
                east.copied().unwrap_or(f64::NAN),
            ),
        })
    }

    fn bracket(&self, lon: f64) -> Option<[(usize, f64); 2]> {
        if !lon.is_finite() {
            return None;
        }
        let (first, last) = (self.axis.first(), self.axis.last());
        let mut x = first + (lon - first).rem_euclid(360.0);
        // Just west of the first column: the point may be the first column itself.
        if x > last + EDGE_EPS && first + 360.0 - x <= EDGE_EPS {
            x = first;
        }
        if x <= last + EDGE_EPS {
            return self.axis.bracket(x.min(last));
        }
        if !self.wraps {
            return None;
        }
        let n = self.axis.values.len();
        let f = (x - last) / (first + 360.0 - last);
        Some([
            (self.axis.file_index(n - 1), 1.0 - f),
            (self.axis.file_index(0), f),
        ])
    }
}

// ------------------------------------------------------------------ sampling

/// Up to four grid nodes (file lat index, file lon index) and their bilinear weights.
type Stencil = Vec<(usize, usize, f64)>;

/// A cell's weighted corners: row, column, bilinear weight, distance in grid steps.
type Corners = Vec<(usize, usize, f64, f64)>;

impl Layout<'_> {
    fn stencil(&self, lat: f64, lon: f64) -> Option<Stencil> {
        Some(
            self.corners(lat, lon)?
                .into_iter()
                .map(|(j, i, w, _)| (j, i, w))
                .collect(),
        )
    }

    /// The weighted corners of the cell holding a point, each with its bilinear weight
    /// and its distance from the point in grid steps.
    fn corners(&self, lat: f64, lon: f64) -> Option<Corners> {
        let rows = self.lat.bracket(lat)?;
        let cols = self.lon.bracket(lon)?;
        let mut nodes = Vec::with_capacity(4);
        for &(j, wj) in &rows {
            for &(i, wi) in &cols {
                let w = wj * wi;
                if w > 0.0 {
                    // A bracket's weight is one less the distance to its node.
                    nodes.push((j, i, w, (1.0 - wj).hypot(1.0 - wi)));
                }
            }
        }
        Some(nodes)
    }

    /// One time step of one component over `block`, decoded (NaN = missing), in
    /// row-major (lat, lon) order of the block.
    fn read_block(
        &self,
        file: &NcFile,
        source: &Source<'_>,
        t: usize,
        block: &Block,
    ) -> Result<Vec<f64>, String> {
        let selections = self
            .roles
            .iter()
            .map(|role| match role {
                Role::Time => NcSliceInfoElem::Index(t as u64),
                Role::Single => NcSliceInfoElem::Index(0),
                Role::Lat => NcSliceInfoElem::Slice {
                    start: block.lat.0 as u64,
                    end: block.lat.1 as u64 + 1,
                    step: 1,
                },
                Role::Lon => NcSliceInfoElem::Slice {
                    start: block.lon.0 as u64,
                    end: block.lon.1 as u64 + 1,
                    step: 1,
                },
            })
            .collect();
        let data = file
            .read_variable_slice_as_f64(&source.var.name, &NcSliceInfo { selections })
            .map_err(|e| format!("cannot read {} at time step {t}: {e}", source.var.name))?;
        let (rows, cols) = (block.rows(), block.cols());
        if data.len() != rows * cols {
            return Err(format!(
                "reading {} at time step {t} gave {} values where {rows} × {cols} were expected",
                source.var.name,
                data.len()
            ));
        }
        let lat_first = self.roles.iter().position(|r| *r == Role::Lat)
            < self.roles.iter().position(|r| *r == Role::Lon);
        let decoded: Vec<f64> = data.iter().map(|&x| source.decode.decode(x)).collect();
        if lat_first {
            return Ok(decoded);
        }
        // Stored (lon, lat): transpose into (lat, lon).
        let mut out = vec![f64::NAN; rows * cols];
        for (k, x) in decoded.into_iter().enumerate() {
            let (i, j) = (k / rows, k % rows);
            out[j * cols + i] = x;
        }
        Ok(out)
    }
}

/// The rectangle of file indices (inclusive) that the stencils touch.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
struct Block {
    lat: (usize, usize),
    lon: (usize, usize),
}

impl Block {
    fn around(stencils: &[Option<Stencil>]) -> Option<Self> {
        let mut nodes = stencils.iter().flatten().flatten();
        let &(j0, i0, _) = nodes.next()?;
        let mut block = Self {
            lat: (j0, j0),
            lon: (i0, i0),
        };
        for &(j, i, _) in nodes {
            block.lat = (block.lat.0.min(j), block.lat.1.max(j));
            block.lon = (block.lon.0.min(i), block.lon.1.max(i));
        }
        Some(block)
    }

    fn rows(&self) -> usize {
        self.lat.1 - self.lat.0 + 1
    }

    fn cols(&self) -> usize {
        self.lon.1 - self.lon.0 + 1
    }

    fn index(&self, j: usize, i: usize) -> usize {
        (j - self.lat.0) * self.cols() + (i - self.lon.0)
    }
}

/// Bilinear (u, v) at one point from decoded blocks; nodes with a missing u or v are
/// left out and the remaining weights renormalised.
/// A sea temperature at a probe: bilinear where every weighted corner of its cell has a
/// value, else the nearest corner with one within [`super::SEA_PROBE_CELLS`] grid step
/// (the mean of those equally near), as the GRIB2 reader does; NaN when none.
fn sea_value(corners: &Corners, block: &Block, values: &[f64]) -> f64 {
    let value = |j: usize, i: usize| values.get(block.index(j, i)).copied().unwrap_or(f64::NAN);
    if corners.iter().all(|&(j, i, _, _)| value(j, i).is_finite()) {
        return corners.iter().map(|&(j, i, w, _)| w * value(j, i)).sum();
    }
    let mut sea: Vec<(f64, f64)> = corners
        .iter()
        .map(|&(j, i, _, d)| (d, value(j, i)))
        .filter(|&(d, v)| v.is_finite() && d <= super::SEA_PROBE_CELLS + 1e-9)
        .collect();
    sea.sort_by(|a, b| a.0.total_cmp(&b.0));
    let Some(&(nearest, _)) = sea.first() else {
        return f64::NAN;
    };
    let tied: Vec<f64> = sea
        .iter()
        .take_while(|(d, _)| d - nearest < 1e-6)
        .map(|&(_, v)| v)
        .collect();
    tied.iter().sum::<f64>() / tied.len() as f64
}

fn interpolate(stencil: &Stencil, block: &Block, u: &[f64], v: &[f64]) -> Option<(f64, f64)> {
    let (mut sum_u, mut sum_v, mut sum_w) = (0.0, 0.0, 0.0);
    for &(row, col, weight) in stencil {
        let k = block.index(row, col);
        let (Some(&node_u), Some(&node_v)) = (u.get(k), v.get(k)) else {
            continue;
        };
        if node_u.is_finite() && node_v.is_finite() {
            sum_u += weight * node_u;
            sum_v += weight * node_v;
            sum_w += weight;
        }
    }
    (sum_w > 0.0).then(|| (sum_u / sum_w, sum_v / sum_w))
}

#[cfg(test)]
mod tests {
    use super::*;
    use chrono::TimeZone;
    use std::path::PathBuf;

    fn fixture(name: &str) -> PathBuf {
        Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("tests/fixtures/netcdf")
            .join(name)
    }

    fn utc(y: i32, mo: u32, d: u32, h: u32, mi: u32, s: u32) -> DateTime<Utc> {
        Utc.with_ymd_and_hms(y, mo, d, h, mi, s).unwrap()
    }

    /// Hours after 2026-06-15 12:00 UTC.
    fn hours_since_base(t: DateTime<Utc>) -> f64 {
        (t - utc(2026, 6, 15, 12, 0, 0)).num_seconds() as f64 / 3600.0
    }

    /// The analytic wind of the regional fixtures (lon in degrees east, any convention).
    fn formula(lat: f64, lon: f64, h: f64) -> (f64, f64) {
        let lon_e = lon.rem_euclid(360.0);
        (
            5.0 + 0.5 * (lat - 35.0) + 0.2 * (lon_e - 235.0) + 0.1 * h,
            -8.0 + 0.3 * (lon_e - 235.0) - 0.1 * h,
        )
    }

    /// The analytic wind of wind_global_10deg.nc, m/s.
    fn global_formula(lat: f64, lon: f64, h: f64) -> (f64, f64) {
        let r = lon.to_radians();
        (
            4.0 + 3.0 * r.cos() + 0.05 * lat + 0.1 * h,
            -2.0 + 3.0 * r.sin() - 0.05 * lat - 0.1 * h,
        )
    }

    /// Rows of a `<file>.ref.txt`: the whitespace-separated fields of each data line.
    fn reference_rows(name: &str) -> Vec<Vec<String>> {
        let text = std::fs::read_to_string(fixture(&format!("{name}.ref.txt"))).unwrap();
        text.lines()
            .filter(|l| !l.starts_with('#') && !l.trim().is_empty())
            .map(|l| l.split_whitespace().map(str::to_string).collect())
            .collect()
    }

    fn num(s: &str) -> f64 {
        s.parse().unwrap()
    }

    /// Checks a file against its xarray reference (rows whose xarray value is finite).
    /// Returns how many rows were compared.
    fn check_against_reference(name: &str, tolerance: f64) -> usize {
        let rows = reference_rows(name);
        let mut points: Vec<(f64, f64)> = Vec::new();
        for row in &rows {
            let p = (num(&row[1]), num(&row[2]));
            if !points.contains(&p) {
                points.push(p);
            }
        }
        let wind = sample_netcdf(&fixture(name), &points).unwrap();
        let mut compared = 0;
        for row in &rows {
            let time = DateTime::parse_from_rfc3339(&row[0])
                .unwrap()
                .with_timezone(&Utc);
            let step = wind.times.iter().position(|&x| x == time).unwrap();
            let point = points
                .iter()
                .position(|&p| p == (num(&row[1]), num(&row[2])))
                .unwrap();
            let (want_u, want_v) = (num(&row[3]), num(&row[4]));
            if !want_u.is_finite() {
                continue; // xarray gives NaN next to a missing node; we renormalise
            }
            let (gu, gv) = wind.points[point].as_ref().unwrap()[step];
            assert!(
                (gu - want_u).abs() <= tolerance && (gv - want_v).abs() <= tolerance,
                "{name} {row:?}: got ({gu}, {gv})"
            );
            compared += 1;
        }
        compared
    }

    // -------------------------------------------------------------- detection

    #[test]
    fn detects_netcdf_by_content() {
        assert!(is_netcdf(b"CDF\x01\0\0\0\0"));
        assert!(is_netcdf(b"CDF\x02"));
        assert!(is_netcdf(b"CDF\x05rest"));
        assert!(is_netcdf(b"\x89HDF\r\n\x1a\n...."));
        let mut user_block = vec![0u8; 1024];
        user_block.extend_from_slice(HDF5_SIGNATURE);
        assert!(is_netcdf(&user_block));
        assert!(!is_netcdf(b"CDF\x03"));
        assert!(!is_netcdf(b"CD"));
        assert!(!is_netcdf(b""));
        assert!(!is_netcdf(b"GRIB\0\0\0\x02"));
        assert!(!is_netcdf(b"\x89HDF\r\n"));
        for name in [
            "wind_classic.nc",
            "wind_nc4_packed.nc",
            "wind_uwnd_noleap.nc",
            "stars_reduced.nc",
        ] {
            let bytes = std::fs::read(fixture(name)).unwrap();
            assert!(is_netcdf(&bytes[..8]), "{name}");
        }
    }

    // -------------------------------------------------------------- time units

    #[test]
    fn parses_cf_time_units() {
        let cases = [
            (
                "hours since 2026-06-15 12:00:00",
                "standard",
                3600.0,
                utc(2026, 6, 15, 12, 0, 0),
            ),
            (
                "seconds since 2026-06-15",
                "proleptic_gregorian",
                1.0,
                utc(2026, 6, 15, 0, 0, 0),
            ),
            (
                "Hour since 2001-12-31T23:00:00Z",
                "proleptic_gregorian",
                3600.0,
                utc(2001, 12, 31, 23, 0, 0),
            ),
            (
                "seconds since 1970-01-01 00:00:00 +00:00",
                "",
                1.0,
                utc(1970, 1, 1, 0, 0, 0),
            ),
            (
                "hours since 1900-01-01 00:00:00.0",
                "gregorian",
                3600.0,
                utc(1900, 1, 1, 0, 0, 0),
            ),
            (
                "minutes since 2026-6-5 6:30",
                "standard",
                60.0,
                utc(2026, 6, 5, 6, 30, 0),
            ),
            (
                "days since 2026-06-15 12:00:00 UTC",
                "standard",
                86_400.0,
                utc(2026, 6, 15, 12, 0, 0),
            ),
            (
                "hours since 2026-06-15 12:00:00+01:00",
                "standard",
                3600.0,
                utc(2026, 6, 15, 11, 0, 0),
            ),
            (
                "hours since 2026-06-15 12:00 -6",
                "standard",
                3600.0,
                utc(2026, 6, 15, 18, 0, 0),
            ),
            (
                "hours since 2026-06-15T12:00:00-0530",
                "standard",
                3600.0,
                utc(2026, 6, 15, 17, 30, 0),
            ),
            (
                "hours since 2026-06-15 12:00:30.5",
                "standard",
                3600.0,
                utc(2026, 6, 15, 12, 0, 30) + TimeDelta::milliseconds(500),
            ),
        ];
        for (units, calendar, unit_s, reference) in cases {
            let got = parse_time_units(units, calendar).unwrap();
            assert_eq!(got, (unit_s, reference), "{units}");
        }
    }

    #[test]
    fn reads_julian_reference_dates_of_the_standard_calendar() {
        // NCEP/NCAR reanalysis files: "hours since 1-1-1 00:00:0.0"; 17067072 h is
        // 1948-01-01 (cftime agrees).
        let (unit_s, reference) =
            parse_time_units("hours since 1-1-1 00:00:0.0", "standard").unwrap();
        let t = reference + TimeDelta::seconds((17_067_072.0 * unit_s) as i64);
        assert_eq!(t, utc(1948, 1, 1, 0, 0, 0));
        // The same instant on the julian calendar (cftime prints it 1947-12-19 there).
        let (_, julian) = parse_time_units("hours since 1-1-1 00:00:0.0", "julian").unwrap();
        assert_eq!(julian, reference);
        let (_, julian) = parse_time_units("days since 2000-01-01", "julian").unwrap();
        assert_eq!(julian, utc(2000, 1, 14, 0, 0, 0));
        let (_, r) = parse_time_units("days since 1582-10-04", "standard").unwrap();
        assert_eq!(r + TimeDelta::days(10), utc(1582, 10, 24, 0, 0, 0));
        assert!(parse_time_units("days since 1582-10-10", "standard").is_err());
        assert!(parse_time_units("days since 1500-02-29", "standard").is_ok());
        assert!(parse_time_units("days since 1500-02-29", "proleptic_gregorian").is_err());
    }

    #[test]
    fn refuses_model_calendars_and_odd_units() {
        for calendar in ["noleap", "365_day", "360_day", "all_leap", "none"] {
            let e = parse_time_units("days since 2026-01-01", calendar).unwrap_err();
            assert!(
                e.contains(calendar) && e.contains("proleptic_gregorian"),
                "{e}"
            );
        }
        for units in [
            "months since 2026-01-01",
            "fortnights since 2026-01-01",
            "hours",
            "hours since yesterday",
            "hours since 2026-13-01",
            "hours since 2026-01-01 25:00",
            "hours since 2026-01-01 12:00 +99:00",
            "",
        ] {
            assert!(parse_time_units(units, "standard").is_err(), "{units}");
        }
    }

    // -------------------------------------------------------------- units

    #[test]
    fn converts_speed_units() {
        let var = NcVariable {
            name: "u".into(),
            dimensions: vec![],
            dtype: NcType::Float,
            attributes: vec![],
            data_offset: 0,
            _data_size: 0,
            is_record_var: false,
            record_size: 0,
        };
        let mut notes = Vec::new();
        let mut factor = |u: Option<&str>| speed_factor(&var, u, &mut notes);
        for ms in [
            "m s-1",
            "m/s",
            "m s**-1",
            "M S-1",
            "m.s-1",
            "m s^-1",
            "meters/second",
            "metre second-1",
            "m sec-1",
        ] {
            assert_eq!(factor(Some(ms)), Ok(1.0), "{ms}");
        }
        assert_eq!(factor(Some("meters per second")), Ok(1.0));
        for kt in ["knots", "kt", "kts", "knot", "Knots"] {
            assert_eq!(factor(Some(kt)), Ok(1852.0 / 3600.0), "{kt}");
        }
        assert_eq!(factor(Some("km/h")), Ok(1.0 / 3.6));
        assert_eq!(factor(Some("km h-1")), Ok(1.0 / 3.6));
        assert_eq!(factor(None), Ok(1.0));
        for bad in ["K", "m", "Pa", "degrees", "m2 s-2"] {
            let e = factor(Some(bad)).unwrap_err();
            assert!(e.contains("expected m s-1"), "{e}");
        }
        assert_eq!(notes, ["u has no units: taken as m/s"]);
    }

    // -------------------------------------------------------------- axes

    #[test]
    fn brackets_ascending_and_descending_axes() {
        let up = Axis::new(&[31.0, 32.0, 34.0], "lat").unwrap();
        assert_eq!(up.bracket(33.0), Some([(1, 0.5), (2, 0.5)]));
        assert_eq!(up.bracket(31.0), Some([(0, 1.0), (1, 0.0)]));
        assert_eq!(up.bracket(34.0), Some([(2, 1.0), (2, 0.0)]));
        assert_eq!(up.bracket(30.9), None);
        assert_eq!(up.bracket(f64::NAN), None);
        let down = Axis::new(&[34.0, 32.0, 31.0], "lat").unwrap();
        assert_eq!(down.bracket(33.0), Some([(1, 0.5), (0, 0.5)]));
        assert_eq!(down.bracket(31.5), Some([(2, 0.5), (1, 0.5)]));
        assert!(Axis::new(&[1.0, 2.0, 2.0], "lat").is_err());
        assert!(Axis::new(&[1.0, 3.0, 2.0], "lat").is_err());
        assert!(Axis::new(&[], "lat").is_err());
        let single = Axis::new(&[5.0], "lat").unwrap();
        assert_eq!(single.bracket(5.0), Some([(0, 1.0), (0, 0.0)]));
        assert_eq!(single.bracket(5.5), None);
    }

    #[test]
    fn matches_longitudes_modulo_360_and_wraps_global_grids() {
        // Regional, 0..360 convention: a point given as -120 is 240 E.
        let east = LonAxis::new(&[235.0, 236.0, 237.0], "lon").unwrap();
        assert!(!east.wraps && !east.covers_all);
        assert_eq!(east.bracket(-124.5), Some([(0, 0.5), (1, 0.5)]));
        assert_eq!(east.bracket(235.5), Some([(0, 0.5), (1, 0.5)]));
        assert_eq!(east.bracket(-125.0), Some([(0, 1.0), (1, 0.0)]));
        assert_eq!(east.bracket(237.0), Some([(2, 1.0), (2, 0.0)]));
        assert_eq!(east.bracket(238.0), None);
        // Regional, -180..180 convention, points given 0..360.
        let west = LonAxis::new(&[-125.0, -124.0], "lon").unwrap();
        assert_eq!(west.bracket(235.25), Some([(0, 0.75), (1, 0.25)]));
        // Global without a repeated column: 355 E lies between 350 E and 0 E.
        let lons: Vec<f64> = (0..36).map(|k| f64::from(k) * 10.0).collect();
        let global = LonAxis::new(&lons, "lon").unwrap();
        assert!(global.wraps);
        assert_eq!(global.bracket(355.0), Some([(35, 0.5), (0, 0.5)]));
        assert_eq!(global.bracket(-5.0), Some([(35, 0.5), (0, 0.5)]));
        assert_eq!(global.bracket(-180.0), Some([(18, 1.0), (19, 0.0)]));
        // Global -180..180 with a repeated column.
        let lons: Vec<f64> = (0..=36).map(|k| -180.0 + f64::from(k) * 10.0).collect();
        let repeated = LonAxis::new(&lons, "lon").unwrap();
        assert!(repeated.covers_all && !repeated.wraps);
        assert_eq!(repeated.bracket(175.0), Some([(35, 0.5), (36, 0.5)]));
        // Crossing the antimeridian, descending, stored in -180..180.
        let cross = LonAxis::new(&[-170.0, 180.0, 170.0], "lon").unwrap();
        assert_eq!(cross.range, (170.0, -170.0));
        assert_eq!(cross.bracket(175.0), Some([(2, 0.5), (1, 0.5)]));
        assert_eq!(cross.bracket(-175.0), Some([(1, 0.5), (0, 0.5)]));
        assert_eq!(cross.bracket(0.0), None);
    }

    // -------------------------------------------------------------- synthetic fixtures

    #[test]
    fn samples_the_classic_file() {
        let points = [
            (35.0, -120.0), // node, ±180 convention
            (35.0, 240.0),  // same node, 0..360
            (35.5, 240.25), // inside a cell
            (31.0, 235.0),  // south-west corner
            (39.0, -115.0), // north-east corner
            (30.9, 240.0),  // south of the grid
            (35.0, 245.5),  // east of the grid
        ];
        let wind = sample_netcdf(&fixture("wind_classic.nc"), &points).unwrap();
        assert_eq!(
            wind.times,
            [
                utc(2026, 6, 15, 12, 0, 0),
                utc(2026, 6, 15, 18, 0, 0),
                utc(2026, 6, 16, 0, 0, 0)
            ]
        );
        for (p, &(lat, lon)) in points.iter().enumerate().take(5) {
            let series = wind.points[p].as_ref().unwrap();
            for (k, &(u, v)) in series.iter().enumerate() {
                let (fu, fv) = formula(lat, lon, hours_since_base(wind.times[k]));
                assert!(
                    (u - fu).abs() < 1e-5 && (v - fv).abs() < 1e-5,
                    "{lat} {lon}: {u} {v}"
                );
            }
        }
        assert_eq!(wind.points[5], None);
        assert_eq!(wind.points[6], None);
        let s = &wind.summary;
        assert_eq!(s.format, "NetCDF-3 classic");
        assert_eq!(
            s.title.as_deref(),
            Some("Synthetic 10 m wind, classic format")
        );
        assert_eq!(s.institution.as_deref(), Some("Shelfwind test fixtures"));
        assert!(s.source.as_deref().unwrap().starts_with("synthetic"));
        let grid = s.wind.as_ref().unwrap();
        assert_eq!(
            (grid.u_variable.as_str(), grid.v_variable.as_str()),
            ("u10", "v10")
        );
        assert_eq!((grid.n_lat, grid.n_lon, grid.n_times), (9, 11, 3));
        assert_eq!(grid.lat_range, (31.0, 39.0));
        assert_eq!(grid.lon_range, (235.0, 245.0));
        assert!(!grid.global);
        assert_eq!(grid.step, Some(TimeDelta::hours(6)));
        assert_eq!(grid.first_time, utc(2026, 6, 15, 12, 0, 0));
        assert_eq!(grid.last_time, utc(2026, 6, 16, 0, 0, 0));
        assert!(grid.notes.is_empty(), "{:?}", grid.notes);
        assert_eq!(check_against_reference("wind_classic.nc", 1e-5), 15);
    }

    #[test]
    fn samples_the_packed_netcdf4_file_with_fill_values() {
        let points = [
            (35.0, -120.0),  // node
            (35.5, 239.75),  // inside a cell, 0..360 convention
            (37.5, -115.5),  // cell with its two northern nodes filled
            (38.5, -115.5),  // cell with all four nodes filled
            (38.0, -116.0),  // a filled node itself
            (33.5, -120.5),  // cell whose node (33, -120) is filled at the second time
            (37.75, -116.0), // on the edge between a valid and a filled node
        ];
        let wind = sample_netcdf(&fixture("wind_nc4_packed.nc"), &points).unwrap();
        assert_eq!(
            wind.times,
            [
                utc(2026, 6, 15, 12, 0, 0),
                utc(2026, 6, 15, 18, 0, 0),
                utc(2026, 6, 16, 0, 0, 0)
            ]
        );
        let at = |p: usize, k: usize| wind.points[p].as_ref().unwrap()[k];
        let h = |k: usize| hours_since_base(wind.times[k]);
        let close = |got: (f64, f64), want: (f64, f64)| {
            (got.0 - want.0).abs() < 2e-3 && (got.1 - want.1).abs() < 2e-3
        };
        for k in 0..3 {
            assert!(close(at(0, k), formula(35.0, -120.0, h(k))));
            assert!(close(at(1, k), formula(35.5, -120.25, h(k))));
            // Northern nodes missing: the mean of the two southern ones (37 N).
            assert!(
                close(at(2, k), formula(37.0, -115.5, h(k))),
                "{:?}",
                at(2, k)
            );
            // Between 37.5 N (valid) and 38 N (filled): the valid node alone.
            assert!(
                close(at(6, k), formula(37.0, -116.0, h(k))),
                "{:?}",
                at(6, k)
            );
        }
        assert_eq!(wind.points[3], None);
        assert_eq!(wind.points[4], None);
        // (33, -120) filled at the second time: the other three nodes, weights 1/3 each.
        let nodes = [(33.0, -121.0), (34.0, -121.0), (34.0, -120.0)];
        let mean = |k: usize| {
            let f: Vec<(f64, f64)> = nodes.iter().map(|&(a, b)| formula(a, b, h(k))).collect();
            (
                f.iter().map(|x| x.0).sum::<f64>() / 3.0,
                f.iter().map(|x| x.1).sum::<f64>() / 3.0,
            )
        };
        assert!(close(at(5, 0), formula(33.5, -120.5, h(0))));
        assert!(close(at(5, 1), mean(1)), "{:?} vs {:?}", at(5, 1), mean(1));
        assert!(close(at(5, 2), formula(33.5, -120.5, h(2))));
        let s = &wind.summary;
        assert_eq!(s.format, "NetCDF-4 (HDF5)");
        let grid = s.wind.as_ref().unwrap();
        assert_eq!(grid.u_variable, "eastward_wind_10m");
        assert_eq!(grid.v_variable, "northward_wind_10m");
        assert_eq!((grid.n_lat, grid.n_lon), (9, 11));
        assert_eq!(grid.lon_range, (-125.0, -115.0));
        assert_eq!(grid.step, Some(TimeDelta::hours(6)));
        assert_eq!(check_against_reference("wind_nc4_packed.nc", 1.5e-3), 11);
    }

    #[test]
    fn samples_the_global_file_in_knots_across_the_date_line() {
        let points = [
            (0.0, 355.0),  // between 350 E and 0 E
            (0.0, -5.0),   // the same point
            (10.0, 180.0), // node
            (-75.0, 5.0),  // next to the missing node (80 S, 0 E)
            (-80.0, 0.0),  // the missing node itself
            (85.0, 10.0),  // north of the grid
        ];
        let wind = sample_netcdf(&fixture("wind_global_10deg.nc"), &points).unwrap();
        let grid = wind.summary.wind.as_ref().unwrap();
        // U10M by name wins over u100 (eastward_wind at 100 m).
        assert_eq!(
            (grid.u_variable.as_str(), grid.v_variable.as_str()),
            ("U10M", "V10M")
        );
        assert!(grid.global);
        assert_eq!(grid.units, "knots");
        assert_eq!(grid.step, Some(TimeDelta::hours(6)));
        let h = |k: usize| hours_since_base(wind.times[k]);
        let close = |got: (f64, f64), want: (f64, f64)| {
            (got.0 - want.0).abs() < 1e-5 && (got.1 - want.1).abs() < 1e-5
        };
        let mean =
            |a: (f64, f64), b: (f64, f64)| (f64::midpoint(a.0, b.0), f64::midpoint(a.1, b.1));
        for k in 0..2 {
            let want = mean(
                global_formula(0.0, 350.0, h(k)),
                global_formula(0.0, 0.0, h(k)),
            );
            assert!(close(wind.points[0].as_ref().unwrap()[k], want));
            assert_eq!(wind.points[0], wind.points[1]);
            assert!(close(
                wind.points[2].as_ref().unwrap()[k],
                global_formula(10.0, 180.0, h(k))
            ));
            // Nodes (80 S, 10 E), (70 S, 0 E), (70 S, 10 E): weights 1/4 each, renormalised.
            let nodes = [(-80.0, 10.0), (-70.0, 0.0), (-70.0, 10.0)];
            let f: Vec<(f64, f64)> = nodes
                .iter()
                .map(|&(a, b)| global_formula(a, b, h(k)))
                .collect();
            let want = (
                f.iter().map(|x| x.0).sum::<f64>() / 3.0,
                f.iter().map(|x| x.1).sum::<f64>() / 3.0,
            );
            assert!(close(wind.points[3].as_ref().unwrap()[k], want));
        }
        assert_eq!(wind.points[4], None);
        assert_eq!(wind.points[5], None);
        assert_eq!(check_against_reference("wind_global_10deg.nc", 1e-5), 8);
    }

    #[test]
    fn refuses_a_model_calendar() {
        let e = sample_netcdf(&fixture("wind_uwnd_noleap.nc"), &[(35.0, -123.0)]).unwrap_err();
        assert!(e.contains("calendar \"noleap\" has no real dates"), "{e}");
        let s = inspect_netcdf(&fixture("wind_uwnd_noleap.nc")).unwrap();
        assert_eq!(s.format, "NetCDF-3 64-bit offset");
        assert!(s.wind.unwrap_err().contains("noleap"));
    }

    #[test]
    fn says_what_a_file_without_wind_has() {
        let e = sample_netcdf(&fixture("no_wind.nc"), &[(35.0, -122.0)]).unwrap_err();
        assert!(e.contains("no 10 m wind found: expected"), "{e}");
        assert!(e.contains("eastward_wind/northward_wind"), "{e}");
        assert!(
            e.contains("the file has: sst (time, lat, lon; sea_surface_temperature; degC)"),
            "{e}"
        );
        let s = inspect_netcdf(&fixture("no_wind.nc")).unwrap();
        let names: Vec<&str> = s.variables.iter().map(|v| v.name.as_str()).collect();
        assert_eq!(names, ["time", "lat", "lon", "sst"]);
        let text = s.to_string();
        assert!(text.contains("float sst(time=1, lat=3, lon=3) standard_name=sea_surface_temperature units=\"degC\""), "{text}");
        assert!(
            text.contains("wind: none usable: no 10 m wind found"),
            "{text}"
        );
    }

    #[test]
    fn inspects_files_with_wind() {
        let text = inspect_netcdf(&fixture("wind_nc4_packed.nc"))
            .unwrap()
            .to_string();
        for want in [
            "format: NetCDF-4 (HDF5)",
            "title: Synthetic 10 m wind, NetCDF-4 packed",
            "short eastward_wind_10m(time=3, height=1, lon=11, lat=9) standard_name=eastward_wind units=\"m/s\"",
            "wind: u = eastward_wind_10m, v = northward_wind_10m (units \"m/s\")",
            "grid: 9 latitudes from 31 to 39 (lat), 11 longitudes from -125 to -115 (lon)",
            "time: 3 steps from 2026-06-15 12:00:00 UTC to 2026-06-16 00:00:00 UTC, every 6 h (time)",
        ] {
            assert!(text.contains(want), "{want}\n{text}");
        }
    }

    // -------------------------------------------------------------- real files

    /// Decoded values at grid nodes, checked against netCDF4's (the `.ref.txt`).
    fn check_nodes(name: &str, variables: &[&str], tolerance: f64) {
        let file = open(&fixture(name)).unwrap();
        let rows = reference_rows(name);
        assert!(!rows.is_empty());
        for row in rows {
            for (c, vname) in variables.iter().enumerate() {
                let var = file.variable(vname).unwrap();
                let selections = (0..var.ndim())
                    .map(|d| NcSliceInfoElem::Index(row[d].parse().unwrap()))
                    .collect();
                let raw = file
                    .read_variable_slice_as_f64(vname, &NcSliceInfo { selections })
                    .unwrap();
                let got = Decoder::new(var, 1.0).decode(raw.iter().copied().next().unwrap());
                let want = num(&row[var.ndim() + 2 + c]);
                if want.is_nan() {
                    assert!(got.is_nan(), "{name} {vname} {row:?}: got {got}");
                } else {
                    assert!(
                        (got - want).abs() <= tolerance,
                        "{name} {vname} {row:?}: got {got}"
                    );
                }
            }
        }
    }

    #[test]
    fn refuses_real_pressure_level_wind_and_decodes_it() {
        // ERA5 wind on 825 and 850 hPa (from the stars R package), int16 packed.
        let e = sample_netcdf(&fixture("stars_sub.nc"), &[(51.0, 6.0)]).unwrap_err();
        assert!(
            e.contains("u has the dimension level of size 2: 825, 850 millibars"),
            "{e}"
        );
        assert!(
            e.contains(
                "the file has: u (time, level, latitude, longitude; eastward_wind; m s**-1)"
            ),
            "{e}"
        );
        let s = inspect_netcdf(&fixture("stars_sub.nc")).unwrap();
        assert_eq!(s.format, "NetCDF-3 64-bit offset");
        check_nodes("stars_sub.nc", &["u", "v"], 1e-5);
        // Its time axis: hours since 1900 on the gregorian calendar.
        let var = open(&fixture("stars_sub.nc")).unwrap();
        let times = read_times(&var, var.variable("time").unwrap()).unwrap();
        assert_eq!(times.len(), 10);
        assert_eq!(times[0], utc(2017, 8, 20, 1, 0, 0)); // 1031161 h (cftime agrees)
    }

    #[test]
    fn reads_real_packed_sea_surface_temperature() {
        // NOAA OI SST regridded to 2 degrees (from the stars R package), int16 packed,
        // _FillValue -999 over land.
        let s = inspect_netcdf(&fixture("stars_reduced.nc")).unwrap();
        assert_eq!(s.format, "NetCDF-3 classic");
        assert_eq!(
            s.title.as_deref(),
            Some("Daily-OI-V2, final, Data (Ship, Buoy, AVHRR, GSFC-ice)")
        );
        let names: Vec<&str> = s.variables.iter().map(|v| v.name.as_str()).collect();
        assert_eq!(
            names,
            ["lon", "lat", "zlev", "time", "sst", "anom", "err", "ice"]
        );
        let sst = &s.variables[4];
        assert_eq!(sst.data_type, "short");
        assert_eq!(sst.units.as_deref(), Some("degree_C"));
        assert_eq!(sst.dimensions[2], ("lat".to_string(), 90));
        let e = s.wind.unwrap_err();
        assert!(
            e.contains("the file has: sst (time, zlev, lat, lon; degree_C), anom"),
            "{e}"
        );
        check_nodes("stars_reduced.nc", &["sst"], 1e-4);
    }

    // -------------------------------------------------------------- robustness

    fn scratch(name: &str, bytes: &[u8]) -> PathBuf {
        let dir = std::env::temp_dir().join(format!("shelfwind-netcdf-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let path = dir.join(name);
        std::fs::write(&path, bytes).unwrap();
        path
    }

    #[test]
    fn refuses_other_files_cleanly() {
        let e = sample_netcdf(&scratch("text.nc", b"time,u,v\n"), &[]).unwrap_err();
        assert!(e.contains("not a NetCDF file"), "{e}");
        let e = inspect_netcdf(&scratch("cdf3.nc", b"CDF\x03\0\0\0\0")).unwrap_err();
        assert!(e.contains("unsupported NetCDF-3 version byte 3"), "{e}");
        assert!(inspect_netcdf(&scratch("empty.nc", b"")).is_err());
        let e = inspect_netcdf(Path::new("/nonexistent/wind.nc")).unwrap_err();
        assert!(e.contains("cannot read the file"), "{e}");
    }

    #[test]
    fn survives_truncated_and_corrupted_files() {
        let points = [(35.0, -120.0), (0.0, 355.0)];
        for name in [
            "wind_classic.nc",
            "wind_nc4_packed.nc",
            "wind_global_10deg.nc",
            "stars_sub.nc",
        ] {
            let bytes = std::fs::read(fixture(name)).unwrap();
            for len in (0..bytes.len()).step_by(61) {
                let path = scratch(&format!("cut-{name}"), &bytes[..len]);
                let _ = inspect_netcdf(&path);
                let _ = sample_netcdf(&path, &points);
            }
            // Deterministic byte flips (a small linear congruential generator).
            let mut seed: u64 = 0x5eed;
            for _ in 0..200 {
                let mut copy = bytes.clone();
                for _ in 0..4 {
                    seed = seed.wrapping_mul(6_364_136_223_846_793_005).wrapping_add(1);
                    let k = (seed >> 33) as usize % copy.len();
                    copy[k] ^= (seed >> 16) as u8 | 1;
                }
                let path = scratch(&format!("flip-{name}"), &copy);
                let _ = inspect_netcdf(&path);
                let _ = sample_netcdf(&path, &points);
            }
        }
    }

    #[test]
    fn no_points_reads_no_data() {
        let wind = sample_netcdf(&fixture("wind_nc4_packed.nc"), &[]).unwrap();
        assert_eq!(wind.times.len(), 3);
        assert!(wind.points.is_empty());
        let wind = sample_netcdf(&fixture("wind_classic.nc"), &[(0.0, 0.0)]).unwrap();
        assert_eq!(wind.points, [None]);
    }
}
