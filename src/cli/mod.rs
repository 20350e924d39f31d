//! The command line: clap definitions, translated once into typed rule inputs.
//!
//! Quantities are parsed by clap value parsers (so a bad value is reported with its option
//! name), gauge readings become absolute here, and nothing downstream sees a string.

pub mod api;
mod calc;
mod gases;
pub mod records;
mod serve;

use std::io::Write;

use clap::{Parser, Subcommand};

use crate::gas::{Gas, GasModel, IdealGas, ModelKind, RealGas};
use crate::source::FileError;
use crate::InputError;
use calc::{EnergyArgs, FillArgs, VentArgs};
use gases::GasesArgs;
use records::{CheckArgs, WorksheetArgs};
use serve::ServeArgs;

/// Exit code: computed (whatever the cautions).
pub const EXIT_OK: i32 = 0;
/// Exit code: the program failed for a reason other than the input (a defect).
pub const EXIT_INTERNAL: i32 = 1;
/// Exit code: bad input; the message names the field, the value and what is accepted.
pub const EXIT_BAD_INPUT: i32 = 2;
/// Exit code of `check`: the site was checked and some item raises DANGER.
pub const EXIT_DANGER: i32 = 3;

/// Stored energy, safe distances, blow-down times and fill temperatures of compressed-gas
/// vessels, with cautions. Every quantity takes a unit; every pressure says gauge or
/// absolute (`10 barg`, `2.5 bara`, `150 psig`, `101.3 kPa(a)`).
#[derive(Debug, Parser)]
#[command(
    name = "pvhazard",
    version,
    about,
    long_about = None,
    after_help = "Exit codes: 0 computed (whatever the findings); 1 internal failure; 2 bad input (the message names the option or key, the value as typed and what is accepted); 3 `check` found an item that raises DANGER."
)]
pub struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Debug, Subcommand)]
enum Command {
    /// Stored expansion energy, TNT equivalent, exclusion distance and overpressure standoffs.
    Energy(EnergyArgs),
    /// Adiabatic fast-fill temperature, settled pressure and fill-to pressure of a cylinder.
    Fill(FillArgs),
    /// Blow-down time through an orifice, final gas temperature, or the orifice for a time.
    Vent(VentArgs),
    /// The gases known, with their constants and sources.
    Gases(GasesArgs),
    /// Dated PDF worksheets, each with a JSON record beside it, for equipment on a site file.
    Worksheet(WorksheetArgs),
    /// Checks a site file and ranks its equipment by hazard; exits 3 if any item raises DANGER.
    Check(CheckArgs),
    /// A local web page for the calculations and the site files, with a JSON API; listens on
    /// this machine only unless --listen says otherwise.
    Serve(ServeArgs),
    /// Shell completions for pvhazard, printed on standard output (e.g. `pvhazard completions
    /// bash > ~/.local/share/bash-completion/completions/pvhazard`).
    Completions(CompletionsArgs),
}

#[derive(Debug, clap::Args)]
struct CompletionsArgs {
    /// The shell: bash, elvish, fish, powershell or zsh.
    #[arg(value_enum, ignore_case = true)]
    shell: clap_complete::Shell,
}

/// Why a run stopped without a result.
#[derive(Debug)]
pub enum Failure {
    /// The user's input; exit 2.
    Input(InputError),
    /// A user's file (site or template); exit 2.
    File(FileError),
    /// Refused for a reason the message gives (a record that would be overwritten, a bad
    /// environment variable); exit 2.
    Refused(String),
    /// A defect or an I/O failure; exit 1.
    Internal(String),
}

impl From<FileError> for Failure {
    fn from(e: FileError) -> Failure {
        Failure::File(e)
    }
}

impl From<InputError> for Failure {
    fn from(e: InputError) -> Failure {
        Failure::Input(e)
    }
}

/// Runs the command line `args` and writes its output to `out`; returns the exit code.
pub fn run(args: impl IntoIterator<Item = std::ffi::OsString>, out: &mut dyn Write) -> i32 {
    let args: Vec<std::ffi::OsString> = args.into_iter().collect();
    let cli = match Cli::try_parse_from(&args) {
        Ok(cli) => cli,
        Err(e) if !e.use_stderr() => {
            // Help and version. A failed write leaves nothing more to do.
            let _ = e.print();
            return EXIT_OK;
        }
        Err(e) => {
            eprintln!("{}", parse_error(&e));
            return EXIT_BAD_INPUT;
        }
    };
    match execute(cli.command) {
        Ok((text, code)) => match out.write_all(text.as_bytes()).and_then(|_| out.flush()) {
            Ok(()) => code,
            // A closed pipe (`pvhazard ... | head`) is the reader's choice, not an error.
            Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => EXIT_OK,
            Err(e) => {
                eprintln!("pvhazard: error: cannot write the output: {e}");
                EXIT_INTERNAL
            }
        },
        Err(Failure::Input(e)) => {
            eprintln!("pvhazard: error: --{}", as_typed(e, &args));
            EXIT_BAD_INPUT
        }
        Err(Failure::File(e)) => {
            eprintln!("pvhazard: error: {e}");
            EXIT_BAD_INPUT
        }
        Err(Failure::Refused(msg)) => {
            eprintln!("pvhazard: error: {msg}");
            EXIT_BAD_INPUT
        }
        Err(Failure::Internal(msg)) => {
            eprintln!("pvhazard: {msg}");
            EXIT_INTERNAL
        }
    }
}

/// A command-line parse error in the tool's own style: a refused value as `pvhazard:
/// error: --option = 'value': why; accepted: ...`, anything else as clap words it, with the
/// same prefix and the usage hint.
fn parse_error(e: &clap::Error) -> String {
    use clap::error::{ContextKind, ContextValue, ErrorKind};
    if let (
        ErrorKind::ValueValidation,
        Some(ContextValue::String(arg)),
        Some(ContextValue::String(value)),
    ) = (
        e.kind(),
        e.get(ContextKind::InvalidArg),
        e.get(ContextKind::InvalidValue),
    ) {
        // `--from <Q>` names the option; the parser's own message says what is accepted.
        let option = arg.split_whitespace().next().unwrap_or(arg);
        let why = std::error::Error::source(e).map_or_else(String::new, |s| s.to_string());
        return format!("pvhazard: error: {option} = '{value}': {why}");
    }
    let text = e.render().to_string();
    format!("pvhazard: {}", text.trim_end())
}

/// The error with its value as the user typed it, where the field is an option given once on
/// the command line: a rule sees SI numbers, and "1e300 m3" reads better than 301 digits.
fn as_typed(mut e: InputError, args: &[std::ffi::OsString]) -> InputError {
    let flag = format!("--{}", e.field);
    let given: Vec<String> = args
        .iter()
        .enumerate()
        .filter_map(|(i, a)| {
            let a = a.to_string_lossy();
            if a == flag {
                args.get(i + 1).map(|v| v.to_string_lossy().into_owned())
            } else {
                a.strip_prefix(&flag)
                    .and_then(|rest| rest.strip_prefix('='))
                    .map(str::to_string)
            }
        })
        .collect();
    if let [typed] = given.as_slice() {
        e.value = crate::as_typed(typed);
    }
    e
}

/// The gas model `kind` for `gas`.
fn gas_model(kind: ModelKind, gas: &'static Gas) -> Box<dyn GasModel> {
    match kind {
        ModelKind::Ideal => Box::new(IdealGas::new(gas)),
        ModelKind::Real => Box::new(RealGas::new(gas)),
    }
}

/// Runs a command: its output and exit code.
fn execute(command: Command) -> Result<(String, i32), Failure> {
    let computed = |text: String| (text, EXIT_OK);
    match command {
        Command::Energy(a) => calc::energy_command(a).map(computed),
        Command::Fill(a) => calc::fill_command(a).map(computed),
        Command::Vent(a) => calc::vent_command(a).map(computed),
        Command::Gases(a) => gases::gases_command(a).map(computed),
        Command::Worksheet(a) => records::worksheet_command(a).map(computed),
        Command::Check(a) => records::check_command(a),
        Command::Serve(a) => serve::serve_command(a).map(computed),
        Command::Completions(a) => {
            let mut script = Vec::new();
            let mut cli = <Cli as clap::CommandFactory>::command();
            clap_complete::generate(a.shell, &mut cli, "pvhazard", &mut script);
            String::from_utf8(script)
                .map(computed)
                .map_err(|e| Failure::Internal(e.to_string()))
        }
    }
}
