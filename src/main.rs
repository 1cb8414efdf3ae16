//! Tourwright binary: no subcommand opens the workbench; subcommands run the engine in batch.

use clap::Parser;
use tourwright::cli::{Cli, CliError, Command};

fn main() {
    let cli = Cli::parse();
    let result = match cli.command {
        None => tourwright::gui::run(None).map_err(CliError::from),
        Some(Command::Gui(a)) => tourwright::gui::run(a.file).map_err(CliError::from),
        Some(cmd) => tourwright::cli::run(cmd, cli.quiet),
    };
    if let Err(e) = result {
        if !e.message.is_empty() {
            eprintln!("tourwright: {}", e.message);
        }
        std::process::exit(e.status);
    }
}
