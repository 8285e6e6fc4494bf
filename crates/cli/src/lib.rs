//! `ductrace`: the command line, as a library the `ductrace` binary calls.
//!
//! The pipeline is visible here: parse the arguments (clap), turn them into a plan of work
//! (each command's `run`), run it, and map the outcome to an exit code:
//! 0 success, 1 a data or user error (one line on stderr naming the file and the problem),
//! 2 a usage error (clap's message). A closed stdout (broken pipe) is not an error.
//!
//! Architecture invariant: only this crate knows about terminals, output formats, progress
//! bars and exit codes. The library crates return values and typed errors.

#![deny(missing_docs)]

mod args;
mod cmd;
mod failure;
mod fieldpass;
mod locusfile;
mod output;
mod progress;

use std::process::ExitCode;

use clap::Parser;

use crate::args::Cli;

/// Runs the command line on the process arguments and returns the exit code.
pub fn main() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(e) => {
            // Help and version go to stdout with code 0; usage errors to stderr with 2.
            let code = if e.use_stderr() { 2 } else { 0 };
            if let Err(print_error) = e.print()
                && print_error.kind() != std::io::ErrorKind::BrokenPipe
            {
                return ExitCode::from(2);
            }
            return ExitCode::from(code);
        }
    };
    match cmd::run(cli) {
        Ok(()) => ExitCode::SUCCESS,
        Err(f) if f.is_broken_pipe() => ExitCode::SUCCESS,
        Err(f) => {
            eprintln!("ductrace: error: {f}");
            ExitCode::from(f.code())
        }
    }
}

/// Parses bytes as a calibration table, both as CSV and as JSON; for fuzzing. Returns the
/// number of points read. Never panics.
#[doc(hidden)]
pub fn fuzz_table(bytes: &[u8]) -> usize {
    let Ok(text) = std::str::from_utf8(bytes) else {
        return 0;
    };
    let csv = cmd::fit::parse_table(text, false, "fuzz.csv").map_or(0, |(p, _)| p.len());
    let json = cmd::fit::parse_table(text, true, "fuzz.json").map_or(0, |(p, _)| p.len());
    csv + json
}
