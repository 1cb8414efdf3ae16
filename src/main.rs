//! Tourwright binary: no subcommand opens the workbench; subcommands run the engine in batch.

use clap::Parser;
use tourwright::cli::{Cli, Command};

fn main() {
    let cli = Cli::parse();
    let result = match cli.command {
        None => tourwright::gui::run(None),
        Some(Command::Gui { file }) => tourwright::gui::run(file),
        Some(cmd) => tourwright::cli::run(cmd),
    };
    if let Err(msg) = result {
        eprintln!("tourwright: {msg}");
        std::process::exit(1);
    }
}
