//! `shelfwind calibrate`: the response model fitted to a catch log, the skill reported,
//! and a calibrated scenario written only when the log supports it.

use super::{CalibrateOptions, Calibration, calibrate, read_catch_log};
use crate::cli::{CliError, load_coast, write_output};
use crate::coast::Land;
use crate::progress::Progress;
use crate::scenario::{CalibrationRecord, Scenario};
use crate::wind::{RunRule, load_sources};
use clap::ValueEnum;
use serde_json::{Value, json};
use std::fmt::Write as _;
use std::path::{Path, PathBuf};

/// Output format of `calibrate`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum CalibrateFormatArg {
    /// Readable in a terminal.
    Table,
    /// Every number.
    Json,
}

/// Arguments of `shelfwind calibrate`.
#[derive(Debug, clap::Args)]
pub struct CalibrateArgs {
    /// The scenario.
    pub scenario: PathBuf,
    /// The catch log (CSV).
    #[arg(long = "catch", value_name = "LOG.csv")]
    pub catch_log: PathBuf,
    /// Wind files of the log's period (joined in time); default: the scenario's.
    #[arg(long, value_name = "FILE", num_args = 1..)]
    pub wind: Vec<PathBuf>,
    /// Keep only this species.
    #[arg(long)]
    pub species: Option<String>,
    /// Keep only this vessel.
    #[arg(long)]
    pub vessel: Option<String>,
    /// A landing given by position is matched to the nearest stretch within this, nm.
    #[arg(long, default_value_t = 3.0)]
    pub max_distance_nm: f64,
    /// Skip (and count) bad rows and unknown places instead of refusing the log.
    #[arg(long)]
    pub skip_bad_rows: bool,
    /// Shuffles of the permutation test (at least 199).
    #[arg(long, default_value_t = 199)]
    pub permutations: usize,
    /// Output format.
    #[arg(long, value_enum, default_value_t = CalibrateFormatArg::Table)]
    pub format: CalibrateFormatArg,
    /// Write the calibrated scenario here (only when the log supports a change).
    #[arg(long, value_name = "SCENARIO_OUT")]
    pub out: Option<PathBuf>,
}

/// Calibrates `scenario` (its segments resolved on `land`) on the log at `log_path`
/// over the wind `sources`.
pub fn calibrate_scenario(
    scenario: &Scenario,
    land: &Land,
    sources: &[crate::wind::WindSource],
    log_path: &Path,
    options: &CalibrateOptions,
    progress: &Progress,
) -> Result<Calibration, String> {
    let name = log_path.display();
    let text = std::fs::read_to_string(log_path)
        .map_err(|e| format!("{name}: cannot read the catch log: {e}"))?;
    let log = read_catch_log(&text, options.skip_bad)
        .map_err(|e| format!("bad catch log: {e}: {name}"))?;
    let segments =
        crate::coast::resolve_segments(&scenario.segments, land).map_err(|e| e.to_string())?;
    let tz = scenario.tz().map_err(|e| e.to_string())?;
    let geometry = scenario.forecast_geometry(&segments, &[], land);
    let conditions =
        crate::plan::sample_forecast_conditions(&geometry, sources, RunRule::Members, progress)
            .map_err(|e| e.to_string())?;
    let forecast = conditions.forecast(tz, &scenario.upwelling_settings());
    if forecast.ensemble.is_some() {
        return Err(
            "the wind files hold an ensemble: calibration takes one wind record of the log's period"
                .into(),
        );
    }
    calibrate(&forecast, &log, &scenario.settings.response, options)
        .map_err(|e| format!("{name}: {e}"))
}

/// The scenario with the calibrated settings and a record of the calibration, when the
/// log supports a change.
#[must_use]
pub fn calibrated_scenario(
    scenario: &Scenario,
    c: &Calibration,
    log_name: &str,
    species: Option<&str>,
) -> Option<Scenario> {
    let response = c.calibrated()?;
    let mut out = scenario.clone();
    out.settings.response = response;
    out.settings.calibration = Some(Box::new(CalibrationRecord {
        log: log_name.to_string(),
        landings: c.landings.len(),
        species: species.map(str::to_string),
        calibrated_on: chrono::Utc::now().date_naive().to_string(),
        rho_default: c.fit.default_rho_folds.unwrap_or(c.fit.default_rho),
        rho_cross_validated: c.fit.cv_rho.unwrap_or(0.0),
        p_value: c.fit.p_value.unwrap_or(1.0),
    }));
    Some(out)
}

/// `shelfwind calibrate`.
pub fn run_calibrate(args: &CalibrateArgs) -> Result<(), CliError> {
    if args.permutations < 199 {
        return Err(CliError::App(format!(
            "--permutations {} is too few: expected 199 or more",
            args.permutations
        )));
    }
    if !(args.max_distance_nm.is_finite() && args.max_distance_nm > 0.0) {
        return Err(CliError::App(format!(
            "--max-distance-nm {} is out of range: expected a distance above 0 nm",
            args.max_distance_nm
        )));
    }
    let coast = load_coast(&args.scenario, None)?;
    let Some(scenario) = coast.scenario.clone() else {
        return Err(CliError::App(format!(
            "{}: calibrate needs a scenario (with its time zone and settings), not a bare coast",
            args.scenario.display()
        )));
    };
    let wind: Vec<PathBuf> = if args.wind.is_empty() {
        scenario
            .wind_files
            .iter()
            .map(|f| coast.dir.join(f))
            .collect()
    } else {
        args.wind.clone()
    };
    let sources = load_sources(&wind)?;
    let options = CalibrateOptions {
        species: args.species.clone(),
        vessel: args.vessel.clone(),
        max_distance_nm: args.max_distance_nm,
        skip_bad: args.skip_bad_rows,
        permutations: args.permutations,
    };
    let c = calibrate_scenario(
        &scenario,
        Land::bundled(),
        &sources,
        &args.catch_log,
        &options,
        &Progress::new(),
    )
    .map_err(CliError::App)?;
    let text = match args.format {
        CalibrateFormatArg::Table => table(&c),
        CalibrateFormatArg::Json => {
            serde_json::to_string_pretty(&json_of(&c)).unwrap_or_default() + "\n"
        }
    };
    write_output(None, text.as_bytes())?;
    if let Some(out) = &args.out {
        let log_name = args
            .catch_log
            .file_name()
            .map_or_else(String::new, |n| n.to_string_lossy().into_owned());
        match calibrated_scenario(&scenario, &c, &log_name, args.species.as_deref()) {
            Some(s) => {
                crate::scenario::save_scenario(out, &s)
                    .map_err(|e| CliError::App(e.to_string()))?;
                eprintln!("shelfwind: wrote the calibrated scenario {}", out.display());
            }
            None => eprintln!(
                "shelfwind: {} not written: the log does not support a change",
                out.display()
            ),
        }
    }
    Ok(())
}

fn opt(x: Option<f64>, decimals: usize) -> String {
    x.map_or_else(|| "–".to_string(), |v| format!("{v:.decimals$}"))
}

fn table(c: &Calibration) -> String {
    let f = &c.fit;
    let mut s = String::from(
        "Calibration of the response model on a catch log (Spearman's ρ of CPUE against expected productivity; an estimate, not a promise of fish).\n\n",
    );
    let _ = writeln!(
        s,
        "Landings used: {} (CPUE in kg per {}); skipped: {}; other species or vessels: {}.",
        c.landings.len(),
        c.effort_unit.name(),
        c.skipped.len(),
        c.filtered_out
    );
    for (line, why) in c.skipped.iter().take(10) {
        let _ = writeln!(s, "  skipped line {line}: {why}");
    }
    if c.skipped.len() > 10 {
        let _ = writeln!(s, "  … and {} more", c.skipped.len() - 10);
    }
    let _ = writeln!(s, "\nSkill (Spearman's ρ)");
    for (what, value) in c.skill_rows() {
        let _ = writeln!(s, "  {:>6}  {what}", opt(value, 3));
    }
    let _ = writeln!(
        s,
        "\nParameter                      current   fitted   range within {} of the best ρ",
        super::RANGE_RHO
    );
    let base = super::Params::of(&c.base);
    let rows = [
        (
            "lag_peak_days",
            base.lag_peak_days,
            f.best.lag_peak_days,
            f.ranges[0],
        ),
        (
            "optimum_m3s_per_100m",
            base.optimum_m3s_per_100m,
            f.best.optimum_m3s_per_100m,
            f.ranges[1],
        ),
        (
            "flush_scale_m3s_per_100m",
            base.flush_scale_m3s_per_100m,
            f.best.flush_scale_m3s_per_100m,
            f.ranges[2],
        ),
        (
            "relaxation_bonus",
            base.relaxation_bonus,
            f.best.relaxation_bonus,
            f.ranges[3],
        ),
    ];
    for (name, now, fitted, (lo, hi)) in rows {
        let _ = writeln!(s, "{name:<30} {now:>7} {fitted:>8}   {lo} to {hi}");
    }
    let _ = writeln!(s, "\n{}", c.verdict());
    s
}

fn json_of(c: &Calibration) -> Value {
    let f = &c.fit;
    let params = |p: super::Params| {
        json!({
            "lag_peak_days": p.lag_peak_days,
            "optimum_m3s_per_100m": p.optimum_m3s_per_100m,
            "flush_scale_m3s_per_100m": p.flush_scale_m3s_per_100m,
            "relaxation_bonus": p.relaxation_bonus,
        })
    };
    let names = [
        "lag_peak_days",
        "optimum_m3s_per_100m",
        "flush_scale_m3s_per_100m",
        "relaxation_bonus",
    ];
    json!({
        "landings": c.landings.len(),
        "effort_unit": c.effort_unit.name(),
        "skipped": c.skipped.iter().map(|(line, why)| json!({"line": line, "why": why})).collect::<Vec<_>>(),
        "filtered_out": c.filtered_out,
        "folds": f.folds,
        "fold_kind": c.fold_kind.plural(),
        "rho_default": f.default_rho,
        "rho_default_folds": f.default_rho_folds,
        "rho_fitted_in_sample": f.best_rho,
        "rho_cross_validated": f.cv_rho,
        "permutations": f.permutations,
        "p_value": f.p_value,
        "supported": f.supported(),
        "verdict": c.verdict(),
        "current": params(super::Params::of(&c.base)),
        "fitted": params(f.best),
        "ranges": names.iter().zip(f.ranges).map(|(n, (lo, hi))| (n.to_string(), json!([lo, hi]))).collect::<serde_json::Map<_, _>>(),
        "lag_profile": f.lag_profile.iter().map(|(lag, rho)| json!({"lag_peak_days": lag, "rho": rho})).collect::<Vec<_>>(),
    })
}
