//! The `shelfwind` program: subcommands run the headless command line.

use clap::{CommandFactory, Parser};
use shelfwind::cli::{Cli, Command, run_demo, run_index, run_plan};
use std::process::ExitCode;

fn main() -> ExitCode {
    std::panic::set_hook(Box::new(|info| {
        eprintln!("shelfwind: internal error, please report it: {info}");
    }));
    let cli = Cli::parse();
    let result = match &cli.command {
        Some(Command::Index(args)) => run_index(args),
        Some(Command::Plan(args)) => run_plan(args),
        Some(Command::Demo(args)) => run_demo(args),
        None => {
            // The desktop app comes in a later version; until then, show the help.
            let _ = Cli::command().print_help();
            return ExitCode::SUCCESS;
        }
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("shelfwind: {e}");
            ExitCode::from(2)
        }
    }
}
