//! The `quenchless` binary's command line: argument parsing (clap), the headless
//! commands, and the launch of the desktop app.

#![deny(missing_docs)]

pub mod cli;
pub mod commands;
pub mod plot;
pub mod report;

use std::ffi::OsString;
use std::process::ExitCode;

/// A failure of a headless command: a one-line message, exit status 2.
#[derive(Debug)]
pub struct CommandError(pub String);

impl<E: std::fmt::Display> From<E> for CommandError {
    fn from(e: E) -> Self {
        Self(e.to_string())
    }
}

/// Runs the binary with the given arguments (the first is the program name).
pub fn run(args: impl IntoIterator<Item = OsString>) -> ExitCode {
    use clap::Parser;
    let cli = match cli::Cli::try_parse_from(args) {
        Ok(c) => c,
        Err(e) => {
            let code = if e.use_stderr() { 2 } else { 0 };
            let _ = e.print();
            return ExitCode::from(code);
        }
    };
    match commands::dispatch(cli) {
        Ok(()) => ExitCode::SUCCESS,
        Err(CommandError(msg)) => {
            eprintln!("error: {msg}");
            ExitCode::from(2)
        }
    }
}
