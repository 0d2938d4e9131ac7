//! The `pansite` command: parse the arguments, dispatch to a command, report the outcome.
//!
//! Layers, each importing only those below it: `main` -> `commands` (one file a command,
//! over `commands::common` and `commands::settings`) -> `args` (what the user typed).

mod args;
mod commands;

use args::{Cli, Command};
use clap::Parser;
use commands::{angles, check, daylight, explore, new, plan, preview, render, sheet, watch};
use pansite::output::interrupt::{abandon_temporaries, completed_writes};
use pansite::Error;
use std::process::ExitCode;

/// The exit code after an interrupt: 128 + SIGINT, as shells report it.
const INTERRUPTED: i32 = 130;

fn main() -> ExitCode {
    // Ctrl-C (or a termination request) mid-render must leave no temporary file behind.
    let _ = ctrlc::set_handler(|| {
        let removed = abandon_temporaries();
        let written = completed_writes();
        let outcome = match (removed, written) {
            (0, 0) => "no file was written".to_owned(),
            (0, n) => format!("{n} file{} written before", plural(n)),
            (_, 0) => "the file being written was removed; no file was written".to_owned(),
            (_, n) => format!(
                "the file being written was removed; {n} file{} written before",
                plural(n)
            ),
        };
        eprintln!("pansite: interrupted; {outcome}");
        std::process::exit(INTERRUPTED);
    });
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(error) => {
            let _ = error.print();
            return ExitCode::from(error.exit_code().clamp(0, 255) as u8);
        }
    };
    let result = match cli.command {
        Command::Render(args) => render::render(&args),
        Command::Check(args) => check::check(&args),
        Command::New(args) => new::new_scene(&args),
        Command::Angles(args) => angles::angles(&args),
        Command::Sheet(args) => sheet::sheet(&args),
        Command::Plan(args) => plan::plan(&args),
        Command::Preview(args) => preview::preview_command(&args),
        Command::Watch(args) => watch::watch(&args),
        Command::Daylight(args) => daylight::daylight(&args),
        Command::Explore(args) => explore::explore(&args),
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        // A reader that stopped reading (`pansite angles SCENE | head`) wanted no more:
        // end quietly, as command-line tools do.
        Err(error) if closed_pipe(&error) => ExitCode::SUCCESS,
        Err(error) => {
            eprintln!("pansite: error: {error:#}");
            let bad_input = error
                .chain()
                .any(|e| e.downcast_ref::<Error>().is_some_and(Error::is_bad_input));
            ExitCode::from(if bad_input { 2 } else { 1 })
        }
    }
}

fn closed_pipe(error: &anyhow::Error) -> bool {
    error.chain().any(|e| {
        e.downcast_ref::<std::io::Error>()
            .is_some_and(|e| e.kind() == std::io::ErrorKind::BrokenPipe)
    })
}

fn plural(n: usize) -> &'static str {
    if n == 1 {
        ""
    } else {
        "s"
    }
}
