//! The commands: each turns its arguments into a plan, runs it, and writes its output.

mod completions;
mod state;

use crate::args::{Cli, Command};
use crate::failure::Failure;

/// Runs the parsed command line.
pub fn run(cli: Cli) -> Result<(), Failure> {
    match cli.command {
        Command::State(a) => state::run(&a),
        Command::Completions(a) => completions::run(&a),
    }
}
