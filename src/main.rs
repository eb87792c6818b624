//! The `shelfwind` program: no arguments (or `open`) start the desktop app; the other
//! subcommands run the headless command line.

use clap::Parser;
use shelfwind::cli::{
    Cli, Command, run_coast_pack, run_demo, run_index, run_inspect, run_plan, run_season,
};
use std::process::ExitCode;

/// The desktop app, or a message when this build has none.
fn run_app(scenario: Option<std::path::PathBuf>) -> Result<(), shelfwind::cli::CliError> {
    #[cfg(feature = "gui")]
    {
        shelfwind::app::run(scenario).map_err(shelfwind::cli::CliError::App)
    }
    #[cfg(not(feature = "gui"))]
    {
        let _ = scenario;
        let _ = <Cli as clap::CommandFactory>::command().print_help();
        Ok(())
    }
}

fn main() -> ExitCode {
    std::panic::set_hook(Box::new(|info| {
        eprintln!("shelfwind: internal error, please report it: {info}");
    }));
    let cli = Cli::parse();
    let result = match &cli.command {
        Some(Command::Open { scenario }) => run_app(Some(scenario.clone())),
        Some(Command::Index(args)) => run_index(args),
        Some(Command::Plan(args)) => run_plan(args),
        Some(Command::Season(args)) => run_season(args),
        Some(Command::Demo(args)) => run_demo(args),
        Some(Command::Inspect { file }) => run_inspect(file),
        Some(Command::CoastPack(args)) => run_coast_pack(args),
        Some(Command::Verify(args)) => shelfwind::verify::run_verify(args),
        Some(Command::Calibrate(args)) => shelfwind::calibrate::run_calibrate(args),
        None => run_app(None),
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("shelfwind: {e}");
            ExitCode::from(2)
        }
    }
}
