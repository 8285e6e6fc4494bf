//! The commands: each turns its arguments into a plan, runs it, and writes its output.

mod completions;
mod damage;
mod demo;
mod export;
pub(crate) mod fit;
mod history;
mod probe;
mod report;
mod state;
mod table;
mod visual;

use ductrace_track::FieldOptions;
use ductrace_vtk::Location;

use crate::args::{FieldArgs, LocationArg};

use crate::args::{Cli, Command};
use crate::failure::Failure;

/// Runs the parsed command line.
pub fn run(cli: Cli) -> Result<(), Failure> {
    match cli.command {
        Command::State(a) => state::run(&a),
        Command::Completions(a) => completions::run(&a),
        Command::Probe(a) => probe::run(&a),
        Command::History(a) => history::run(&a, cli.quiet),
        Command::Table(a) => table::run(&a, cli.quiet),
        Command::Demo(a) => demo::run(&a, cli.quiet),
        Command::Fit(a) => fit::run(&a, cli.quiet),
        Command::Damage(a) => damage::run(&a, cli.quiet),
        Command::Export(a) => export::run(&a, cli.quiet),
        Command::Plot(a) => report::run_plot(&a, cli.quiet),
        Command::Report(a) => report::run(&a, cli.quiet),
    }
}

/// The reader's and tracker's options from the command line.
pub fn field_options(a: &FieldArgs) -> Result<FieldOptions, Failure> {
    let stress_order = match &a.stress_order {
        Some(o) => Some(
            o.parse()
                .map_err(|e| Failure::usage(format!("--stress-order: {e}")))?,
        ),
        None => None,
    };
    Ok(FieldOptions {
        stress: a.stress.clone(),
        stress_order,
        eqps: a.eqps.clone(),
        plastic_strain: a.plastic_strain.clone(),
        displacement: a.displacement.clone(),
        location: a.location.map(|l| match l {
            LocationArg::Point => Location::Point,
            LocationArg::Cell => Location::Cell,
        }),
        engineering_shear: a.engineering_shear,
        deformed_points: a.deformed_points,
        allow_nonfinite: a.allow_nonfinite,
    })
}
