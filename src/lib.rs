//! The `quenchless` binary's command line: argument parsing (clap), the headless
//! commands, and the launch of the desktop app.

#![deny(missing_docs)]

pub mod cli;
pub mod commands;
pub mod flags;
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
            if let Some(msg) = refused_value(&e) {
                eprintln!("error: {msg}");
                return ExitCode::from(2);
            }
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

/// A value refused by a flag's value parser, in the one message style of every refused
/// value: the flag, the text typed and what is allowed ("--rate -5: allowed ...").
fn refused_value(e: &clap::Error) -> Option<String> {
    use clap::error::{ContextKind, ContextValue, ErrorKind};
    use std::error::Error as _;
    if e.kind() != ErrorKind::ValueValidation {
        return None;
    }
    let (Some(ContextValue::String(arg)), Some(ContextValue::String(value)), Some(why)) =
        (e.get(ContextKind::InvalidArg), e.get(ContextKind::InvalidValue), e.source())
    else {
        return None;
    };
    // clap names the argument with its value name ("--rate <R>"); the flag is enough.
    let flag = arg.split_whitespace().next().unwrap_or(arg);
    Some(format!("{flag} {value}: {why}"))
}
