//! Arguments as given: the clap definitions of every command.
//!
//! Each command's `run` turns these into a validated plan of work; nothing here reads files.

use std::path::PathBuf;

use clap::{Args, Parser, Subcommand};

use crate::output::Format;

/// The caution every help page and report carries.
pub const CAUTION: &str = "Caution: results feed fracture predictions, which can hurt people when \
wrong. Validate every calibration against tests; local codes and licensed engineering practice \
govern any use in design.";

/// ductrace: stress-state histories and fracture-locus calibration from finite-element results
/// in VTK formats.
#[derive(Debug, Parser)]
#[command(
    name = "ductrace",
    version,
    about = "Stress-state histories and ductile-fracture calibration from VTK results",
    long_about = "ductrace reads finite-element results of fracture specimens (.vtu, .pvtu, .pvd, \
legacy .vtk, or a folder of them), computes stress-state measures (triaxiality, Lode angle \
parameter, ...), extracts critical-point histories up to the test's fracture instant, averages \
them against equivalent plastic strain, and fits and checks fracture loci.",
    after_help = CAUTION,
    propagate_version = true
)]
pub struct Cli {
    /// Print nothing on stderr but errors.
    #[arg(short, long, global = true)]
    pub quiet: bool,

    /// The command to run.
    #[command(subcommand)]
    pub command: Command,
}

/// The commands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Stress-state measures of one stress tensor.
    #[command(after_help = STATE_HELP)]
    State(StateArgs),

    /// Print a shell completion script.
    #[command(after_help = "Example:\n  ductrace completions bash > ~/.local/share/bash-completion/completions/ductrace")]
    Completions(CompletionsArgs),
}

const STATE_HELP: &str = "Examples:
  ductrace state 300,0,0,0,0,0                 uniaxial tension (VTK order XX,YY,ZZ,XY,YZ,XZ)
  ductrace state 1,2,3,4,5,6 --order xx,yy,zz,yz,xz,xy --format json
  ductrace state 100,20,0,20,50,0,0,0,0        nine components, row-major

Measures: sigma_h = tr(s)/3 (tension positive); sigma_vm = sqrt(3 J2); triaxiality = sigma_h/sigma_vm
(Bao & Wierzbicki 2004); xi = (27/2) J3/sigma_vm^3; lode_angle_param = 1 - (2/pi) arccos(xi)
(Bai & Wierzbicki 2008); lode_param = (2 s2 - s1 - s3)/(s1 - s3) (Lode 1926); principal s1 >= s2 >= s3.
Shape measures are undefined (null in JSON) for zero or purely hydrostatic stress.
No unit conversion: stresses come out in the input's unit.";

/// Arguments of `ductrace state`.
#[derive(Debug, Args)]
pub struct StateArgs {
    /// Components, comma-separated: 6 in VTK order (XX,YY,ZZ,XY,YZ,XZ) unless --order says
    /// otherwise, or 9 row-major.
    #[arg(value_name = "C1,C2,...", allow_hyphen_values = true)]
    pub components: String,

    /// Order of 6 components, e.g. xx,yy,zz,yz,xz,xy (or `vtk`, `voigt`).
    #[arg(long, value_name = "ORDER", default_value = "vtk")]
    pub order: String,

    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Text)]
    pub format: Format,

    /// Write the output to FILE (atomically) instead of stdout.
    #[arg(short = 'o', long = "output", value_name = "FILE")]
    pub output: Option<PathBuf>,
}

/// Arguments of `ductrace completions`.
#[derive(Debug, Args)]
pub struct CompletionsArgs {
    /// The shell.
    #[arg(value_enum)]
    pub shell: clap_complete::Shell,
}
