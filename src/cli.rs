//! The command line: a thin face on the library. Every failure becomes one line on
//! stderr that names the file and the place in it, and exit status 2.

use crate::atomic::{write_atomic, write_atomic_with};
use crate::coast::{
    CoastError, Land, LandFileError, Pack, PackBox, PackError, SeaSideError, Segment, cut_pack,
    read_coast_geojson, read_land_file, resolve_segments,
};
use crate::export::units::Units;
use crate::export::{IndexFormat, PlanFormat, render_plan, trip_sheet_html, write_index};
use crate::physics::DragChoice;
use crate::plan::{ForecastError, PlanError};
use crate::scenario::{
    PlanChoice, Scenario, ScenarioError, is_scenario_text, parse_scenario, plan_scenario,
    segment_names,
};
use crate::upwelling::{IndexSettings, UpwellingError, index_series};
use crate::wind::{RunRule, WindError, assign_wind_runs, load_sources};
use clap::{Parser, Subcommand, ValueEnum};
use rayon::prelude::*;
use std::io::Write;
use std::path::{Path, PathBuf};

/// Shelfwind: wind forecast → coastal upwelling → where to fish in the coming days.
///
/// Not a navigation aid and no substitute for official marine forecasts and warnings;
/// the skipper decides.
#[derive(Debug, Parser)]
#[command(name = "shelfwind", version, about, long_about = None)]
pub struct Cli {
    /// What to do.
    #[command(subcommand)]
    pub command: Option<Command>,
}

/// The subcommands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Open the desktop app on a scenario file.
    Open {
        /// The scenario file.
        scenario: PathBuf,
    },
    /// Coastal upwelling index per coast segment and forecast time.
    Index(IndexArgs),
    /// Ranked stretches per day for a boat and its home port, with reasons.
    Plan(PlanArgs),
    /// Compare segments over seasons of historical wind (Bograd et al. 2009 metrics).
    Season(SeasonArgs),
    /// Write the invented demo scenario and its synthetic forecast into a folder.
    Demo(DemoArgs),
    /// What a wind or wave file holds (GRIB2, NetCDF or CSV) and what the tool will use.
    Inspect {
        /// The file.
        file: PathBuf,
    },
    /// Cut a coast pack (detailed land for one region) from a GeoJSON, ESRI Shapefile
    /// or GSHHG file, for `--land` of `index` and `plan`.
    CoastPack(CoastPackArgs),
    /// Check the upwelling computed from the wind against measured sea temperature.
    Verify(crate::verify::VerifyArgs),
    /// Fit the response model to a catch log, and say whether the log supports it.
    Calibrate(crate::calibrate::CalibrateArgs),
}

/// Arguments of `shelfwind coast-pack`.
#[derive(Debug, clap::Args)]
pub struct CoastPackArgs {
    /// Detailed land: GeoJSON (Multi)Polygons, an ESRI Shapefile (.shp) or GSHHG binary
    /// polygons (gshhs_f.b); the format is told from the content.
    #[arg(long, value_name = "FILE")]
    pub from: PathBuf,
    /// The box to cut, degrees: west,south,east,north (e.g. -123.1,37.65,-122.75,38.35).
    #[arg(long, value_name = "W,S,E,N", value_parser = parse_bbox, allow_hyphen_values = true)]
    pub bbox: PackBox,
    /// Where the land comes from and its licence, kept in the pack [default: the
    /// file's name and format].
    #[arg(long, value_name = "TEXT")]
    pub credit: Option<String>,
    /// The pack file to write (written whole or not at all).
    #[arg(long, value_name = "PACK")]
    pub out: PathBuf,
}

fn parse_bbox(s: &str) -> Result<PackBox, String> {
    let numbers: Vec<f64> = s
        .split(',')
        .map(|x| x.trim().parse::<f64>())
        .collect::<Result<_, _>>()
        .map_err(|_| format!("{s:?}: expected four numbers W,S,E,N in degrees"))?;
    let [w, south, e, n] = numbers[..] else {
        return Err(format!("{s:?}: expected four numbers W,S,E,N in degrees"));
    };
    PackBox::new(w, south, e, n).map_err(|err| err.to_string())
}

/// `shelfwind coast-pack`: reads the detailed land, cuts it to the box, writes the pack
/// and says what was cut.
pub fn run_coast_pack(args: &CoastPackArgs) -> Result<(), CliError> {
    let bytes = std::fs::read(&args.from).map_err(|source| CliError::LandIo {
        path: args.from.clone(),
        source,
    })?;
    let source = read_land_file(&bytes).map_err(|source| CliError::LandFile {
        path: args.from.clone(),
        source,
    })?;
    let name = args
        .from
        .file_name()
        .map_or_else(String::new, |n| n.to_string_lossy().into_owned());
    let credit = args
        .credit
        .clone()
        .unwrap_or_else(|| format!("{name} ({})", source.format.name()));
    let (pack, summary) = cut_pack(&source.rings, args.bbox, &credit);
    write_atomic(&args.out, &pack.to_bytes()).map_err(|source| CliError::Output {
        path: args.out.clone(),
        source,
    })?;
    let b = args.bbox;
    println!(
        "read {} rings from {} ({})",
        source.rings.len(),
        args.from.display(),
        source.format.name()
    );
    println!(
        "cut to W={},S={},E={},N={}: {} rings, {} points, {:.2} km² of land",
        b.west_deg,
        b.south_deg,
        b.east_deg,
        b.north_deg,
        summary.rings,
        summary.points,
        summary.land_area_km2
    );
    println!("wrote {}", args.out.display());
    Ok(())
}

/// The bundled land with a coast pack laid over it, when a pack is given (`None`
/// means the bundled land alone).
pub fn load_pack_land(pack: Option<&Path>) -> Result<Option<Land>, CliError> {
    let Some(path) = pack else {
        return Ok(None);
    };
    let bytes = std::fs::read(path).map_err(|source| CliError::LandIo {
        path: path.into(),
        source,
    })?;
    let pack = Pack::from_bytes(&bytes).map_err(|source| CliError::Pack {
        path: path.into(),
        source,
    })?;
    Ok(Some(Land::bundled().with_pack(&pack)))
}

/// `shelfwind inspect FILE`: the file's fields, grid, area, times, issue time and centre,
/// and what the tool will and will not use, on standard output.
pub fn run_inspect(file: &Path) -> Result<(), CliError> {
    let summary = crate::wind::inspect_file(file)?;
    let mut out = std::io::stdout().lock();
    let _ = writeln!(out, "{}", file.display());
    let _ = write!(out, "{}", summary.to_text());
    Ok(())
}

/// Output format of `season`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum SeasonFormatArg {
    /// Readable in a terminal.
    Table,
    /// One row per segment and season, and a climatology row per segment.
    Csv,
    /// Everything, with the climatology by day of season.
    Json,
}

/// Arguments of `shelfwind season`.
#[derive(Debug, clap::Args)]
pub struct SeasonArgs {
    /// The scenario (or a GeoJSON coast).
    pub scenario: PathBuf,
    /// Wind files of the record (many GRIB2 files, or long CSV series); read in
    /// parallel and joined in time.
    #[arg(long, value_name = "FILE", num_args = 1.., required = true)]
    pub wind: Vec<PathBuf>,
    /// First season (year it starts in).
    #[arg(long, value_name = "YEAR")]
    pub from: Option<i32>,
    /// Last season.
    #[arg(long, value_name = "YEAR")]
    pub to: Option<i32>,
    /// Share of a season's days with data needed for its metrics, percent
    /// [default: the scenario's, else 90].
    #[arg(long, value_parser = parse_percent)]
    pub min_coverage: Option<f64>,
    /// Output format.
    #[arg(long, value_enum, default_value_t = SeasonFormatArg::Table)]
    pub format: SeasonFormatArg,
    /// Output file (written whole or not at all); standard output when absent.
    #[arg(long, value_name = "FILE")]
    pub out: Option<PathBuf>,
}

fn parse_percent(s: &str) -> Result<f64, String> {
    let x: f64 = s.parse().map_err(|_| format!("{s:?} is not a number"))?;
    if (0.0..=100.0).contains(&x) {
        Ok(x)
    } else {
        Err(format!("{s} is out of range: expected 0 to 100 (percent)"))
    }
}

/// `shelfwind season`: season metrics per segment and year, and the climatology.
pub fn run_season(args: &SeasonArgs) -> Result<(), CliError> {
    use crate::export::{SeasonFormat, render_seasons};
    use crate::upwelling::{CoverageSettings, RecordError, RecordSettings, analyse_record};
    // Seasons use the sea sides only, and the scenario's sides are set or come from
    // the bundled land.
    let coast = load_coast(&args.scenario, None)?;
    let sources = load_sources(&args.wind)?;
    let settings = coast
        .scenario
        .as_ref()
        .map(|s| s.settings.clone())
        .unwrap_or_default();
    let record = RecordSettings {
        index: settings.index,
        events: settings.events,
        coverage: CoverageSettings {
            min_year: args
                .min_coverage
                .map_or(settings.seasons.min_year, |p| p / 100.0),
            ..settings.seasons
        },
        years: match (args.from, args.to) {
            (None, None) => None,
            (from, to) => Some((from.unwrap_or(i32::MIN), to.unwrap_or(i32::MAX))),
        },
    };
    let names = segment_names(coast.scenario.as_ref(), &coast.segments);
    let out = analyse_record(
        &coast.segments,
        &names,
        &sources,
        &record,
        &crate::progress::Progress::new(),
    )
    .map_err(|e| match e {
        RecordError::Wind(w) => CliError::Wind(w),
        RecordError::Upwelling(u) => CliError::Upwelling(u),
    })?;
    let format = match args.format {
        SeasonFormatArg::Table => SeasonFormat::Table,
        SeasonFormatArg::Csv => SeasonFormat::Csv,
        SeasonFormatArg::Json => SeasonFormat::Json,
    };
    write_output(args.out.as_deref(), render_seasons(&out, format).as_bytes())
}

/// Output format of `plan`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum PlanFormatArg {
    /// Readable in a terminal.
    Table,
    /// One row per day and stretch.
    Csv,
    /// The whole plan.
    Json,
    /// Stretches with their scores.
    Geojson,
    /// Waypoints and routes for a chart plotter (GPX 1.1).
    Gpx,
    /// A printable trip sheet for the first planned day, as self-contained HTML.
    Html,
}

/// Arguments of `shelfwind plan`.
#[derive(Debug, clap::Args)]
pub struct PlanArgs {
    /// The scenario file.
    pub scenario: PathBuf,
    /// Wind file, GRIB2, NetCDF or CSV; repeat for several. Default: the scenario's wind files.
    #[arg(long, value_name = "WIND")]
    pub wind: Vec<PathBuf>,
    /// First day to plan, local to the scenario (2027-05-11, or a full ISO 8601 time).
    /// Default: today if the forecast covers it, else the forecast's first day.
    #[arg(long, value_name = "ISO8601", value_parser = parse_from)]
    pub from: Option<chrono::NaiveDate>,
    /// Number of days to plan.
    #[arg(long, default_value_t = 3, value_parser = clap::value_parser!(u16).range(1..=60))]
    pub days: u16,
    /// Vessel id (default: the scenario's first).
    #[arg(long)]
    pub vessel: Option<String>,
    /// Home port id (default: the scenario's first).
    #[arg(long)]
    pub port: Option<String>,
    /// A coast pack (made by `shelfwind coast-pack`): its detailed land replaces the
    /// bundled land inside its box, for sea sides, fetch and ways by sea.
    #[arg(long, value_name = "PACK")]
    pub land: Option<PathBuf>,
    /// Take each wind file as one run of an ensemble (forecasts from different centres
    /// together), numbered from 1 in the order given. Without it, the runs are the
    /// ensemble members the files declare (or the scenario's choice).
    #[arg(long)]
    pub files_as_runs: bool,
    /// Output format.
    #[arg(long, value_enum, default_value_t = PlanFormatArg::Table)]
    pub format: PlanFormatArg,
    /// Output file (written whole or not at all); standard output when absent.
    #[arg(long, value_name = "FILE")]
    pub out: Option<PathBuf>,
}

fn parse_from(s: &str) -> Result<chrono::NaiveDate, String> {
    if let Ok(d) = chrono::NaiveDate::parse_from_str(s, "%Y-%m-%d") {
        return Ok(d);
    }
    chrono::DateTime::parse_from_rfc3339(s)
        .map(|t| t.date_naive())
        .map_err(|_| {
            format!("{s:?} is not a date: expected e.g. 2027-05-11 or 2027-05-11T06:00:00Z")
        })
}

/// `shelfwind plan`: the ranked stretches per day.
pub fn run_plan(args: &PlanArgs) -> Result<(), CliError> {
    let packed = load_pack_land(args.land.as_deref())?;
    let land = packed.as_ref().unwrap_or_else(|| Land::bundled());
    let coast = load_coast(&args.scenario, Some(land))?;
    let Some(scenario) = coast.scenario.as_ref() else {
        return Err(CliError::Scenario(ScenarioError::File {
            path: args.scenario.clone(),
            source: Box::new(ScenarioError::NotScenario),
        }));
    };
    let sources = load_sources(&wind_paths(&args.wind, &coast))?;
    let mut scenario = scenario.clone();
    scenario.wind_files_are_runs |= args.files_as_runs;
    let scenario = &scenario;
    let choice = PlanChoice {
        vessel_id: args.vessel.as_deref(),
        port_id: args.port.as_deref(),
        from: args.from,
        days: usize::from(args.days),
        now: chrono::Utc::now(),
    };
    let plan = plan_scenario(
        scenario,
        &coast.segments,
        &sources,
        &choice,
        land,
        &crate::progress::Progress::new(),
    )
    .map_err(|e| match e {
        PlanError::Forecast(ForecastError::Wind(w)) => CliError::Wind(w),
        other => CliError::Plan {
            path: args.scenario.clone(),
            message: other.to_string(),
        },
    })?;
    let format = match args.format {
        PlanFormatArg::Table => PlanFormat::Table,
        PlanFormatArg::Csv => PlanFormat::Csv,
        PlanFormatArg::Json => PlanFormat::Json,
        PlanFormatArg::Geojson => PlanFormat::GeoJson,
        PlanFormatArg::Gpx => PlanFormat::Gpx,
        PlanFormatArg::Html => {
            let sheet = trip_sheet_html(&plan, land, 0, Units::default());
            return write_output(args.out.as_deref(), sheet.as_bytes());
        }
    };
    write_output(args.out.as_deref(), render_plan(&plan, format).as_bytes())
}

/// Arguments of `shelfwind demo`.
#[derive(Debug, clap::Args)]
pub struct DemoArgs {
    /// Folder to write into (created if needed).
    #[arg(long, value_name = "DIR")]
    pub out: PathBuf,
}

/// `shelfwind demo`: writes the demo scenario and forecast.
pub fn run_demo(args: &DemoArgs) -> Result<(), CliError> {
    let (scenario, forecast) =
        crate::scenario::write_demo(&args.out).map_err(|source| CliError::Output {
            path: args.out.clone(),
            source,
        })?;
    println!("wrote {}", scenario.display());
    println!("wrote {}", forecast.display());
    println!(
        "try: shelfwind index --coast {} --wind {}",
        scenario.display(),
        forecast.display()
    );
    let at = |name: &str| args.out.join(name).display().to_string();
    println!(
        "check it against the sea (invented spring and buoys): shelfwind verify {} --wind {} --sst {} {}",
        scenario.display(),
        at(crate::scenario::DEMO_RECORD_WIND_FILE),
        at(crate::scenario::DEMO_BUOY_FILES[0]),
        at(crate::scenario::DEMO_BUOY_FILES[1])
    );
    println!(
        "calibrate on an invented catch log: shelfwind calibrate {} --catch {} --wind {}",
        scenario.display(),
        at(crate::scenario::DEMO_CATCH_LOG_FILE),
        at(crate::scenario::DEMO_RECORD_WIND_FILE)
    );
    Ok(())
}

/// Output format of `index`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum IndexFormatArg {
    /// CSV with a header line.
    Csv,
    /// JSON array of records.
    Json,
}

/// Arguments of `shelfwind index`.
#[derive(Debug, clap::Args)]
pub struct IndexArgs {
    /// Coast: a scenario file, or a GeoJSON FeatureCollection of LineStrings with
    /// properties `id` and `sea` (without `sea`, the side comes from the bundled land).
    #[arg(long, value_name = "COAST")]
    pub coast: PathBuf,
    /// Wind file, GRIB2, NetCDF or CSV; repeat for several (each segment takes the first that
    /// covers it). Default: the scenario's wind files.
    #[arg(long, value_name = "WIND")]
    pub wind: Vec<PathBuf>,
    /// Drag law: constant:0.0013, large-pond-1981, trenberth-1990 or large-yeager-2009
    /// [default: the scenario's, else constant:0.0013].
    #[arg(long)]
    pub drag: Option<DragChoice>,
    /// Air density, kg/m^3 [default: the scenario's, else 1.22].
    #[arg(long, value_parser = parse_rho_air)]
    pub rho_air: Option<f64>,
    /// Sea-water density, kg/m^3 [default: the scenario's, else 1025].
    #[arg(long, value_parser = parse_rho_water)]
    pub rho_water: Option<f64>,
    /// A coast pack (made by `shelfwind coast-pack`): its detailed land replaces the
    /// bundled land inside its box, for sea sides, fetch and ways by sea.
    #[arg(long, value_name = "PACK")]
    pub land: Option<PathBuf>,
    /// Take each wind file as one run of an ensemble (forecasts from different centres
    /// together), numbered from 1 in the order given. Without it, the runs are the
    /// ensemble members the files declare.
    #[arg(long)]
    pub files_as_runs: bool,
    /// Output format.
    #[arg(long, value_enum, default_value_t = IndexFormatArg::Csv)]
    pub format: IndexFormatArg,
    /// Output file (written whole or not at all); standard output when absent.
    #[arg(long, value_name = "FILE")]
    pub out: Option<PathBuf>,
}

fn parse_density(
    s: &str,
    range: &std::ops::RangeInclusive<f64>,
    what: &str,
) -> Result<f64, String> {
    let x: f64 = s
        .parse()
        .map_err(|_| format!("{what} {s:?} is not a number"))?;
    if x.is_finite() && range.contains(&x) {
        Ok(x)
    } else {
        Err(format!(
            "{what} {s} kg/m^3 is out of range: expected {} to {}",
            range.start(),
            range.end()
        ))
    }
}

fn parse_rho_air(s: &str) -> Result<f64, String> {
    parse_density(s, &crate::physics::RHO_AIR_RANGE_KG_M3, "air density")
}

fn parse_rho_water(s: &str) -> Result<f64, String> {
    parse_density(
        s,
        &crate::physics::RHO_WATER_RANGE_KG_M3,
        "sea-water density",
    )
}

/// An I/O error in plain words ("no such file"), without the system's error code.
fn io_reason(e: &std::io::Error) -> String {
    use std::io::ErrorKind;
    match e.kind() {
        ErrorKind::NotFound => "no such file".into(),
        ErrorKind::PermissionDenied => "permission denied".into(),
        ErrorKind::IsADirectory => "it is a folder, not a file".into(),
        _ => e.to_string(),
    }
}

/// Everything that can stop a command.
#[derive(Debug, thiserror::Error)]
pub enum CliError {
    /// The scenario or coast file could not be read.
    #[error("cannot read the scenario or coast file: {}: {}", io_reason(source), path.display())]
    CoastIo {
        /// The file.
        path: PathBuf,
        /// The I/O error.
        source: std::io::Error,
    },
    /// The coast file is bad.
    #[error("bad coast file: {source}: {}", path.display())]
    Coast {
        /// The file.
        path: PathBuf,
        /// What is wrong.
        source: CoastError,
    },
    /// A segment's sea side cannot be found.
    #[error("bad coast file: {source}: {}", path.display())]
    SeaSide {
        /// The file.
        path: PathBuf,
        /// Which segment and why.
        source: SeaSideError,
    },
    /// The scenario file is bad.
    #[error("bad scenario file: {0}")]
    Scenario(#[from] ScenarioError),
    /// The desktop app could not start.
    #[error("{0}")]
    App(String),
    /// No plan can be made from this scenario.
    #[error("cannot plan: {message}: {}", path.display())]
    Plan {
        /// The scenario file.
        path: PathBuf,
        /// Why.
        message: String,
    },
    /// Wind files.
    #[error(transparent)]
    Wind(#[from] WindError),
    /// The index cannot be computed.
    #[error(transparent)]
    Upwelling(#[from] UpwellingError),
    /// A detailed land file could not be read.
    #[error("cannot read land file: {source}: {}", path.display())]
    LandIo {
        /// The file.
        path: PathBuf,
        /// The I/O error.
        source: std::io::Error,
    },
    /// A detailed land file is bad.
    #[error("bad land file: {source}: {}", path.display())]
    LandFile {
        /// The file.
        path: PathBuf,
        /// What is wrong, and where.
        source: LandFileError,
    },
    /// A coast pack is bad.
    #[error("bad coast pack: {source}: {}", path.display())]
    Pack {
        /// The file.
        path: PathBuf,
        /// What is wrong, and where.
        source: PackError,
    },
    /// The output could not be written.
    #[error("cannot write output: {source}: {}", path.display())]
    Output {
        /// The file.
        path: PathBuf,
        /// The I/O error.
        source: std::io::Error,
    },
}

/// A coast read from a file, with its scenario when the file is one.
#[derive(Debug, Clone)]
pub struct LoadedCoast {
    /// The segments, with their sea sides resolved.
    pub segments: Vec<Segment>,
    /// The scenario, when the coast came from one.
    pub scenario: Option<Scenario>,
    /// The folder of the file, for the scenario's relative paths.
    pub dir: PathBuf,
}

/// Reads a coast: a scenario file or a GeoJSON file; sea sides not given come from
/// `land`.
pub fn load_coast(path: &Path, land: Option<&Land>) -> Result<LoadedCoast, CliError> {
    // A scenario or a coast is small: a bigger file is refused unread.
    let limit = crate::scenario::MAX_SCENARIO_BYTES;
    if let Ok(m) = std::fs::metadata(path)
        && m.len() > limit
    {
        return Err(CliError::App(format!(
            "{}: the file is {:.1} MB, larger than the {} MB a scenario or a coast may be",
            path.display(),
            m.len() as f64 / 1_048_576.0,
            limit / 1_048_576
        )));
    }
    let bytes = std::fs::read(path).map_err(|source| CliError::CoastIo {
        path: path.into(),
        source,
    })?;
    let text = String::from_utf8(bytes).map_err(|_| CliError::Coast {
        path: path.into(),
        source: CoastError::NotFeatureCollection {
            found: "a file that is not UTF-8 text".into(),
        },
    })?;
    let dir = path.parent().map(Path::to_path_buf).unwrap_or_default();
    let (drawn, scenario) = if is_scenario_text(&text) {
        let scenario = parse_scenario(&text).map_err(|source| ScenarioError::File {
            path: path.into(),
            source: Box::new(source),
        })?;
        (scenario.segments.clone(), Some(scenario))
    } else {
        let drawn = read_coast_geojson(&text).map_err(|source| CliError::Coast {
            path: path.into(),
            source,
        })?;
        (drawn, None)
    };
    // The land is needed only for a segment whose sea side is not set: building the
    // bundled land's index costs a few tenths of a second.
    let empty = Land::default();
    let land = match land {
        Some(l) => l,
        None if drawn.iter().any(|s| s.sea.is_none()) => Land::bundled(),
        None => &empty,
    };
    let segments = resolve_segments(&drawn, land).map_err(|source| CliError::SeaSide {
        path: path.into(),
        source,
    })?;
    Ok(LoadedCoast {
        segments,
        scenario,
        dir,
    })
}

/// The wind files to use: those given, else the scenario's (relative to its folder).
fn wind_paths(given: &[PathBuf], coast: &LoadedCoast) -> Vec<PathBuf> {
    if !given.is_empty() {
        return given.to_vec();
    }
    coast
        .scenario
        .as_ref()
        .map(|s| s.wind_files.iter().map(|f| coast.dir.join(f)).collect())
        .unwrap_or_default()
}

/// `shelfwind index`: the table of upwelling index values.
pub fn run_index(args: &IndexArgs) -> Result<(), CliError> {
    let packed = load_pack_land(args.land.as_deref())?;
    let coast = load_coast(&args.coast, packed.as_ref())?;
    let segments = &coast.segments;
    let sources = load_sources(&wind_paths(&args.wind, &coast))?;
    let rule = if args.files_as_runs {
        RunRule::EachFile
    } else {
        coast
            .scenario
            .as_ref()
            .map_or(RunRule::Members, crate::scenario::Scenario::run_rule)
    };
    let runs = assign_wind_runs(&sources, segments, rule)?;
    let base = coast
        .scenario
        .as_ref()
        .map(|s| s.settings.index)
        .unwrap_or_default();
    let settings = IndexSettings {
        drag: args.drag.unwrap_or(base.drag),
        rho_air_kg_m3: args.rho_air.unwrap_or(base.rho_air_kg_m3),
        rho_water_kg_m3: args.rho_water.unwrap_or(base.rho_water_kg_m3),
    };
    let per_run = runs
        .iter()
        .map(|(member, winds)| {
            // Segments are independent: built in parallel, kept in order.
            let series = segments
                .par_iter()
                .zip(winds)
                .map(|(s, w)| index_series(s, w, &settings))
                .collect::<Result<Vec<_>, _>>()?;
            Ok((member.map(|m| m.number), series))
        })
        .collect::<Result<Vec<_>, CliError>>()?;
    let near: Vec<&str> = per_run[0]
        .1
        .iter()
        .filter(|s| s.near_equator)
        .map(|s| s.segment_id.as_str())
        .collect();
    if !near.is_empty() {
        eprintln!(
            "shelfwind: warning: segment(s) {} lie within 10° of the equator, where the Ekman index grows large and is unreliable (flagged near-equator)",
            near.join(", ")
        );
    }
    let format = match args.format {
        IndexFormatArg::Csv => IndexFormat::Csv,
        IndexFormatArg::Json => IndexFormat::Json,
    };
    let out_path = args
        .out
        .clone()
        .unwrap_or_else(|| PathBuf::from("standard output"));
    let tables: Vec<(Option<u32>, &[crate::upwelling::IndexSeries])> =
        per_run.iter().map(|(m, s)| (*m, s.as_slice())).collect();
    // The formatted chunks go straight to the file, without one more copy of the table.
    let write = |out: &mut dyn Write| {
        let mut out = std::io::BufWriter::with_capacity(1 << 20, out);
        write_index(&tables, format, &mut out).and_then(|()| out.flush())
    };
    match args.out.as_deref() {
        Some(path) => write_atomic_with(path, |f| write(f)),
        None => write(&mut std::io::stdout().lock()),
    }
    .map_err(|source| CliError::Output {
        path: out_path,
        source,
    })
}

/// Writes to a file atomically, or to standard output.
pub(crate) fn write_output(out: Option<&Path>, bytes: &[u8]) -> Result<(), CliError> {
    match out {
        Some(path) => write_atomic(path, bytes).map_err(|source| CliError::Output {
            path: path.into(),
            source,
        }),
        None => {
            let mut stdout = std::io::stdout().lock();
            stdout
                .write_all(bytes)
                .and_then(|()| stdout.flush())
                .map_err(|source| CliError::Output {
                    path: PathBuf::from("standard output"),
                    source,
                })
        }
    }
}
