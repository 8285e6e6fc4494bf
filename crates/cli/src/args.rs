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

    /// Catalogue of a result: increments, mesh, fields, detected roles.
    #[command(after_help = PROBE_HELP)]
    Probe(ProbeArgs),

    /// Stress-state history at one point or cell, and its averages up to the stop.
    #[command(after_help = HISTORY_HELP)]
    History(HistoryArgs),

    /// The campaign table: one calibration point per specimen of a study.
    #[command(after_help = TABLE_HELP)]
    Table(TableArgs),

    /// Run the bundled, invented demonstration campaign end to end.
    #[command(after_help = DEMO_HELP)]
    Demo(DemoArgs),

    /// Fit a fracture locus to the calibration points of a table or a study.
    #[command(after_help = FIT_HELP)]
    Fit(FitArgs),

    /// Damage accumulation with a fitted locus: per specimen of a study, or over a whole result.
    #[command(after_help = DAMAGE_HELP)]
    Damage(DamageArgs),

    /// Write the derived fields (and damage) of every increment as a VTU series.
    #[command(after_help = EXPORT_HELP)]
    Export(ExportArgs),

    /// Charts of a campaign (paths, state plane; locus and damage with a fit) as SVG/PNG.
    #[command(after_help = PLOT_HELP)]
    Plot(PlotArgs),

    /// One self-contained HTML report of a campaign: table, fit, damage check, charts.
    #[command(after_help = REPORT_HELP)]
    Report(ReportArgs),

    /// Print a shell completion script.
    #[command(
        after_help = "Example:\n  ductrace completions bash > ~/.local/share/bash-completion/completions/ductrace"
    )]
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

const PROBE_HELP: &str =
    "RESULT is a .vtu, .pvtu, .pvd or legacy .vtk file, or a folder (its single .pvd, \
or numbered files such as run_0001.vtu, run_0002.vtu sorted by number).

Examples:
  ductrace probe results/notched_r4.pvd
  ductrace probe results/ --format json";

const HISTORY_HELP: &str = "Selectors (--at):
  cell:ID, point:ID    0-based ids as stored (pieces of a .pvtu are numbered one after the other)
  near:X,Y,Z           the point (point data) or the cell whose centroid (cell data) is nearest,
                       in the reference configuration (the first increment's points)
  max:FIELD            where FIELD (a scalar array, or eqps, triaxiality, sigma_vm) is largest at
                       the stop; ties go to the lowest id; runners-up are reported
For blunt notches the usual critical point is the notch centre (near: its coordinates). For sharp
notches and grooved plates the plastic-strain maximum sits at the notch surface instead, so
max:eqps may not land on the centre: look at the runners-up and compare with near:.

Stops (--until): increment:N, time:T, eqps:E, gauge:U (default: the last increment). A stop between
two increments interpolates linearly; the last segment of the averages uses that fraction.
Gauges (--gauge): X1,Y1,Z1:X2,Y2,Z2 (change of distance between two material points) or X,Y,Z/AXIS
(that displacement component of one point); points are the nearest mesh points.

Averages: triaxiality_avg = (1/eps_f) integral of eta d(eqps), lode_angle_param_avg likewise, by the
trapezoid rule over increments (Bao & Wierzbicki 2004); increments without plastic increment add
nothing.

Examples:
  ductrace history bar.pvd --at near:0,0,0 --gauge 0,-12.5,0:0,12.5,0 --until gauge:0.83
  ductrace history bar.pvd --at max:eqps --until increment:40 --format csv -o history.csv
  ductrace history plate/ --at cell:1234 --band 8 --format json";

const TABLE_HELP: &str =
    "STUDY is a TOML file naming the material and, per specimen, the result, the \
critical-point selector, the gauge and the fracture instant from the test (see docs/STUDY.md).

Columns: specimen, location, id, eqps_f, triaxiality_avg, lode_angle_param_avg, triaxiality_f,
lode_angle_param_f, stop_increment, increments_integrated, bridgman (initial notch-centre
triaxiality by Bridgman's formula, where the notch is given), eps_f_area (fracture strain from the
measured sizes: 2 ln(d0/df) for round bars, (2/sqrt 3) ln(t0/tf) for plates), then kind, gauge_f.
A specimen that fails is reported on stderr (and in the output) while the others are still
written; the exit code is then 1.

Examples:
  ductrace table study.toml
  ductrace table study.toml --format csv -o table.csv";

const DEMO_HELP: &str =
    "The demonstration campaign is INVENTED: a fictional steel, invented specimens \
and invented test results, simulated with the open-source solver CalculiX. It shows the workflow;
its numbers describe no real material.

Example:
  ductrace demo ./ductrace-demo";

const FIT_HELP: &str = "Models (--model):
  jc   Johnson-Cook stress-state part: eps_f = D1 + D2 exp(D3 eta) (Johnson & Cook 1985)
  mmc  modified Mohr-Coulomb with hardening A, n (Bai & Wierzbicki 2010); parameters A, n, c1, c2,
       c_theta_s, c_theta_t, c_theta_c (A and n fixed from the study's hardening, c_theta_t = 1)
  hc   Hosford-Coulomb a, b, c, n (Mohr & Marcadet 2015); n fixed at 0.1 unless --fix n=...
Objectives (--objective):
  average  eps_f(eta_avg, theta_avg) against each specimen's eps_f (a table or a study)
  damage   linear damage along each specimen's history reaches 1 at its fracture instant (a study;
           the better objective for non-proportional paths)
Levenberg-Marquardt on ln(eps_f model / eps_f test), bounds by reparametrisation, several starts;
standard errors from the Jacobian. The JSON output is the fit file other commands read (--locus).

Examples:
  ductrace fit table.csv --model jc
  ductrace fit study.toml --model hc --objective damage --format json -o fit.json
  ductrace fit study.toml --model mmc --fix c_theta_c=1.0";

const DAMAGE_HELP: &str =
    "On a STUDY: per specimen, damage D along the critical point's history, the
increment and gauge elongation where D reaches 1, against the measured fracture elongation.
On a RESULT: D at every point or cell and increment (streamed), the first to reach 1 and when,
the largest D and the runners-up.
Rules: linear D = integral of d(eqps)/eps_f(eta, theta) (trapezoid; Johnson & Cook 1985), or with
--exponent M the power law dD = M D^((M-1)/M) d(eqps)/eps_f (Xue 2007). Increments without plastic
increment add nothing.

Examples:
  ductrace damage study.toml --locus fit.json
  ductrace damage results/plate.pvd --locus fit.json --format json";

const EXPORT_HELP: &str = "Writes DIR/derived_NNNN.vtu (one per increment; appended raw binary, UInt64
header, Float64) and DIR/derived.pvd, readable by VTK-based viewers and by ductrace itself. Arrays
at the stress's location: stress (VTK order), sigma_h, sigma_vm, triaxiality, lode_angle_param, eqps, and damage (linear
rule) with --locus; displacement as point data when present. Undefined values (triaxiality and
Lode angle parameter where sigma_vm = 0) are written as NaN.

Example:
  ductrace export results/plate.pvd -o derived/ --locus fit.json";

const PLOT_HELP: &str =
    "Writes into DIR: state-plane.svg (every path in the (triaxiality, Lode angle
parameter) plane with the plane-stress curve and the standard states), path-NAME.svg per specimen
(triaxiality and Lode angle parameter against equivalent plastic strain, averages and stop
marked), and with --locus: locus.svg (fracture strain against triaxiality at theta = -1, 0, +1,
or the Johnson-Cook curve, with the calibration points and their bands) and damage.svg (damage
against gauge elongation, measured fracture marked). --png adds PNG files (embedded font).

Example:
  ductrace plot study.toml --locus fit.json -o plots/ --png";

const REPORT_HELP: &str =
    "One HTML file with inline CSS and SVG (no external assets; opens offline):
the cautions, the job, the calibration table, the fit with its standard errors, the damage check
against the measured fracture elongations, and the charts.

Example:
  ductrace report study.toml --locus fit.json -o report.html";

/// The options that name arrays and conventions, shared by every command that reads results.
#[derive(Debug, Args, Clone, Default)]
pub struct FieldArgs {
    /// Stress array (6 or 9 components); detected by name when omitted.
    #[arg(long, value_name = "NAME")]
    pub stress: Option<String>,

    /// Order of a 6-component stress, e.g. xx,yy,zz,yz,xz,xy; default: from the component
    /// names, else VTK's XX,YY,ZZ,XY,YZ,XZ.
    #[arg(long, value_name = "ORDER")]
    pub stress_order: Option<String>,

    /// Equivalent plastic strain array (scalar).
    #[arg(long, value_name = "NAME")]
    pub eqps: Option<String>,

    /// Plastic strain tensor to accumulate the equivalent plastic strain from.
    #[arg(long, value_name = "NAME")]
    pub plastic_strain: Option<String>,

    /// Displacement array (point data, 3 components).
    #[arg(long, value_name = "NAME")]
    pub displacement: Option<String>,

    /// Use point or cell data when the stress exists at both.
    #[arg(long, value_enum, value_name = "WHERE")]
    pub location: Option<LocationArg>,

    /// The plastic strain tensor stores engineering shears (gamma = 2 epsilon).
    #[arg(long)]
    pub engineering_shear: bool,

    /// The files carry deformed coordinates: subtract the displacement for the reference.
    #[arg(long)]
    pub deformed_points: bool,

    /// Skip non-finite stress and eqps values in full-field scans instead of refusing them.
    #[arg(long)]
    pub allow_nonfinite: bool,
}

/// Point or cell data.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum LocationArg {
    /// Point (node) data.
    Point,
    /// Cell (element) data.
    Cell,
}

/// Arguments of `ductrace probe`.
#[derive(Debug, Args)]
pub struct ProbeArgs {
    /// Result file or folder.
    #[arg(value_name = "RESULT")]
    pub result: PathBuf,

    /// Output format (text or json).
    #[arg(long, value_enum, default_value_t = Format::Text)]
    pub format: Format,

    /// Write the output to FILE (atomically) instead of stdout.
    #[arg(short = 'o', long = "output", value_name = "FILE")]
    pub output: Option<PathBuf>,

    /// Array names and conventions.
    #[command(flatten)]
    pub fields: FieldArgs,
}

/// Arguments of `ductrace history`.
#[derive(Debug, Args)]
pub struct HistoryArgs {
    /// Result file or folder.
    #[arg(value_name = "RESULT")]
    pub result: PathBuf,

    /// Which point or cell: cell:ID, point:ID, near:X,Y,Z or max:FIELD.
    #[arg(long, value_name = "SELECTOR")]
    pub at: String,

    /// Where the history ends: increment:N, time:T, eqps:E or gauge:U.
    #[arg(long, value_name = "STOP")]
    pub until: Option<String>,

    /// Gauge: X1,Y1,Z1:X2,Y2,Z2 or X,Y,Z/AXIS.
    #[arg(long, value_name = "GAUGE", allow_hyphen_values = true)]
    pub gauge: Option<String>,

    /// Also summarise the K nearest points/cells around the chosen one (min and max).
    #[arg(long, value_name = "K")]
    pub band: Option<usize>,

    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Text)]
    pub format: Format,

    /// Write the output to FILE (atomically) instead of stdout.
    #[arg(short = 'o', long = "output", value_name = "FILE")]
    pub output: Option<PathBuf>,

    /// Array names and conventions.
    #[command(flatten)]
    pub fields: FieldArgs,
}

/// Arguments of `ductrace table`.
#[derive(Debug, Args)]
pub struct TableArgs {
    /// The study file (TOML).
    #[arg(value_name = "STUDY")]
    pub study: PathBuf,

    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Text)]
    pub format: Format,

    /// Write the output to FILE (atomically) instead of stdout.
    #[arg(short = 'o', long = "output", value_name = "FILE")]
    pub output: Option<PathBuf>,
}

/// Arguments of `ductrace demo`.
#[derive(Debug, Args)]
pub struct DemoArgs {
    /// Folder for the outputs (created; must be empty unless --force).
    #[arg(value_name = "OUT_DIR", default_value = "ductrace-demo")]
    pub out_dir: PathBuf,

    /// Write into an existing non-empty folder.
    #[arg(long)]
    pub force: bool,

    /// The study to run instead of the bundled one.
    #[arg(long, value_name = "STUDY")]
    pub study: Option<PathBuf>,
}

/// The objective of a fit.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum ObjectiveArg {
    /// Fit eps_f(eta_avg, theta_avg) to each specimen's eps_f.
    Average,
    /// Fit so that damage reaches 1 at each specimen's fracture instant.
    Damage,
}

/// Arguments of `ductrace fit`.
#[derive(Debug, Args)]
pub struct FitArgs {
    /// The table (CSV or JSON as `ductrace table` writes) or the study (TOML).
    #[arg(value_name = "TABLE|STUDY")]
    pub input: PathBuf,

    /// The locus model: jc, mmc or hc.
    #[arg(long, value_name = "MODEL")]
    pub model: String,

    /// The objective.
    #[arg(long, value_enum, default_value_t = ObjectiveArg::Average)]
    pub objective: ObjectiveArg,

    /// Fix parameters: NAME=VALUE[,NAME=VALUE...] (repeatable).
    #[arg(long, value_name = "NAME=VALUE")]
    pub fix: Vec<String>,

    /// Free parameters, optionally with a start value: NAME or NAME=START (repeatable).
    #[arg(long, value_name = "NAME[=START]")]
    pub free: Vec<String>,

    /// Output format (text or json).
    #[arg(long, value_enum, default_value_t = Format::Text)]
    pub format: Format,

    /// Write the output to FILE (atomically) instead of stdout.
    #[arg(short = 'o', long = "output", value_name = "FILE")]
    pub output: Option<PathBuf>,
}

/// Arguments of `ductrace damage`.
#[derive(Debug, Args)]
pub struct DamageArgs {
    /// The study (TOML) or one result (file or folder).
    #[arg(value_name = "STUDY|RESULT")]
    pub input: PathBuf,

    /// The fit file written by `ductrace fit --format json`.
    #[arg(long, value_name = "FIT.json")]
    pub locus: PathBuf,

    /// Power-law damage exponent M (Xue 2007); linear rule when omitted.
    #[arg(long, value_name = "M")]
    pub exponent: Option<f64>,

    /// Output format (text or json).
    #[arg(long, value_enum, default_value_t = Format::Text)]
    pub format: Format,

    /// Write the output to FILE (atomically) instead of stdout.
    #[arg(short = 'o', long = "output", value_name = "FILE")]
    pub output: Option<PathBuf>,

    /// Array names and conventions (result mode).
    #[command(flatten)]
    pub fields: FieldArgs,
}

/// Arguments of `ductrace export`.
#[derive(Debug, Args)]
pub struct ExportArgs {
    /// Result file or folder.
    #[arg(value_name = "RESULT")]
    pub result: PathBuf,

    /// Output folder (created).
    #[arg(short = 'o', long = "output", value_name = "DIR")]
    pub output: PathBuf,

    /// A fit file: adds the damage field.
    #[arg(long, value_name = "FIT.json")]
    pub locus: Option<PathBuf>,

    /// Array names and conventions.
    #[command(flatten)]
    pub fields: FieldArgs,
}

/// Arguments of `ductrace plot`.
#[derive(Debug, Args)]
pub struct PlotArgs {
    /// The study (TOML).
    #[arg(value_name = "STUDY")]
    pub study: PathBuf,

    /// A fit file: adds the locus and damage charts.
    #[arg(long, value_name = "FIT.json")]
    pub locus: Option<PathBuf>,

    /// Output folder (created).
    #[arg(short = 'o', long = "output", value_name = "DIR")]
    pub output: PathBuf,

    /// Also write PNG files.
    #[arg(long)]
    pub png: bool,
}

/// Arguments of `ductrace report`.
#[derive(Debug, Args)]
pub struct ReportArgs {
    /// The study (TOML).
    #[arg(value_name = "STUDY")]
    pub study: PathBuf,

    /// The fit file written by `ductrace fit --format json`.
    #[arg(long, value_name = "FIT.json")]
    pub locus: PathBuf,

    /// The HTML file to write.
    #[arg(short = 'o', long = "output", value_name = "FILE")]
    pub output: PathBuf,
}

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
