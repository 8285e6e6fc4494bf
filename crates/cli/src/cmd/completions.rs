//! `ductrace completions SHELL`: a completion script from the clap definitions.

use clap::CommandFactory;

use crate::args::{Cli, CompletionsArgs};
use crate::failure::Failure;
use crate::output;

/// Prints the completion script for the shell.
pub fn run(args: &CompletionsArgs) -> Result<(), Failure> {
    let mut cmd = Cli::command();
    let mut buf = Vec::new();
    clap_complete::generate(args.shell, &mut cmd, "ductrace", &mut buf);
    output::emit(&buf, None, &[])
}
