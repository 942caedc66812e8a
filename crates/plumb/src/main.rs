//! `plumb`: Plumbline's command line. Parses arguments, runs one mode, prints, and picks the
//! exit code in one place; the work itself lives in the library crates.

mod agree_cmd;
mod calibrate_cmd;
mod checks_out;
mod cli;
mod columns_cmd;
mod corr_cmd;
mod fit_cmd;
mod fit_extras_json;
mod fit_json;
mod fit_text;
mod influence_cmd;
mod model_json;
mod model_text;
mod output;
mod report_cmd;
mod stream_cmd;

use std::process::ExitCode;

use clap::Parser;

fn main() -> ExitCode {
    // A damaged input that trips a reader library is reported as a message, without its panic text.
    plumb_data::quiet_reader_panics();
    let args = cli::Args::parse();
    let result = match args.command {
        Some(cli::Command::Fit(a)) => fit_cmd::run(&a),
        Some(cli::Command::Influence(a)) => influence_cmd::run(&a),
        Some(cli::Command::Report(a)) => report_cmd::run(&a),
        Some(cli::Command::Corr(a)) => corr_cmd::run(&a),
        Some(cli::Command::Columns(a)) => columns_cmd::run(&a),
        Some(cli::Command::Stream(a)) => stream_cmd::run(&a),
        Some(cli::Command::Calibrate(a)) => calibrate_cmd::run(&a),
        Some(cli::Command::Agree(a)) => agree_cmd::run(&a),
        None => workbench(args.workbench),
    };
    match result {
        Ok(text) => match output::print(&text) {
            Ok(()) => ExitCode::SUCCESS,
            Err(e) => {
                eprintln!("plumb: writing the output failed: {e}");
                ExitCode::FAILURE
            }
        },
        Err(e) => {
            eprintln!("plumb: {}", output::safe(&e.to_string()));
            ExitCode::FAILURE
        }
    }
}

/// What the bench reads beside the fit, as the command line asks (`None`: the default).
fn reading_of(a: &cli::WorkbenchArgs) -> anyhow::Result<Option<plumb_app::Reading>> {
    let unknowns = match (&a.y, a.unknowns.any()) {
        (Some(y), true) => a.unknowns.read(y, &plumb_data::LoadOptions::default())?,
        (None, true) => {
            anyhow::bail!("--unknown and --unknowns-file need the calibration's --y and --x")
        }
        (_, false) => Vec::new(),
    };
    let mode = match a.bench {
        Some(cli::BenchArg::Fit) => plumb_app::BenchMode::Fit,
        Some(cli::BenchArg::Calibration) => plumb_app::BenchMode::Calibration,
        Some(cli::BenchArg::Methods) => plumb_app::BenchMode::Agreement,
        None if !unknowns.is_empty() => plumb_app::BenchMode::Calibration,
        None => return Ok(None),
    };
    let mut reading = plumb_app::Reading {
        mode,
        ..plumb_app::Reading::default()
    };
    reading.calibration.unknowns = unknowns;
    Ok(Some(reading))
}

/// Most rows `--exclude` may name when the workbench opens.
const MAX_LAUNCH_EXCLUSIONS: usize = 10_000_000;

/// Opens the desktop workbench.
fn workbench(a: cli::WorkbenchArgs) -> anyhow::Result<String> {
    let reading = reading_of(&a)?;
    let launch = plumb_app::Launch {
        data: a.data,
        pair: a.y.zip(a.x),
        exclude: match &a.exclude {
            // The table is not read yet: a list longer than any table the workbench holds is a
            // mistake, said now rather than expanded.
            Some(r) => r.first(MAX_LAUNCH_EXCLUSIONS).ok_or_else(|| {
                anyhow::anyhow!(
                    "--exclude names more than {MAX_LAUNCH_EXCLUSIONS} rows; name the rows to leave out, not a range past the end of the file"
                )
            })?,
            None => Vec::new(),
        },
        screen: a.screen.map(|s| match s {
            cli::ScreenArg::Columns => plumb_app::Screen::Columns,
            cli::ScreenArg::Map => plumb_app::Screen::Map,
            cli::ScreenArg::Bench => plumb_app::Screen::Bench,
        }),
        screenshot: a.screenshot.clone(),
        size: a.window_size,
        overlays: plumb_app::Overlays {
            theil_sen: a.overlays.contains(&cli::OverlayArg::TheilSen),
            deming: a.overlays.contains(&cli::OverlayArg::Deming),
            loess: a.overlays.contains(&cli::OverlayArg::Loess),
            ..Default::default()
        },
        colour_by: a.colour_by.clone(),
        one_pass: a.one_pass,
        weight_rule: a.weighting,
        reading,
        theme: a.theme.map(|t| match t {
            cli::ThemeArg::Light => plumb_app::ThemePreference::Light,
            cli::ThemeArg::Dark => plumb_app::ThemePreference::Dark,
        }),
    };
    plumb_app::run(launch)?;
    Ok(a.screenshot
        .map(|p| format!("wrote {}\n", p.display()))
        .unwrap_or_default())
}
