//! `plumb`: Plumbline's command line. Parses arguments, runs one mode, prints, and picks the
//! exit code in one place; the work itself lives in the library crates.

mod cli;
mod columns_cmd;
mod corr_cmd;
mod fit_cmd;
mod fit_extras_json;
mod fit_json;
mod fit_text;
mod influence_cmd;
mod report_cmd;

use std::process::ExitCode;

use clap::Parser;

fn main() -> ExitCode {
    let args = cli::Args::parse();
    let result = match args.command {
        Some(cli::Command::Fit(a)) => fit_cmd::run(&a),
        Some(cli::Command::Influence(a)) => influence_cmd::run(&a),
        Some(cli::Command::Report(a)) => report_cmd::run(&a),
        Some(cli::Command::Corr(a)) => corr_cmd::run(&a),
        Some(cli::Command::Columns(a)) => columns_cmd::run(&a),
        None => Err(anyhow::anyhow!(
            "the desktop workbench is not part of this build yet; use a subcommand such as `plumb fit` (see `plumb --help`)"
        )),
    };
    match result {
        Ok(text) => {
            print!("{text}");
            ExitCode::SUCCESS
        }
        Err(e) => {
            eprintln!("plumb: {e}");
            ExitCode::FAILURE
        }
    }
}
