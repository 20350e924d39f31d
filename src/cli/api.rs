//! The calculations for callers other than a terminal (the web page and its JSON API).
//!
//! The options arrive as a JSON object keyed by the long option names. They are turned into
//! the argument vector the command line would have been given and parsed by the command
//! line's own definitions, then run through the same code as `--json`: the same defaults,
//! the same refusals and the same output, byte for byte.

use std::ffi::OsString;

use clap::{CommandFactory, Parser};
use serde_json::Value as Json;

use super::{calc, Cli, Command, Failure};
use crate::report::{plots, EnergyReport, FillReport, Plot, VentReport, Worksheet};
use crate::units::UnitSystem;
use crate::InputError;

/// The calculations offered.
pub const CALCULATIONS: [&str; 3] = ["energy", "fill", "vent"];

/// Options of the calculations that are not offered here: they name a file on the machine
/// that runs pvhazard, or print something other than the report.
const NOT_OFFERED: [&str; 4] = ["csv", "help", "version", "json"];

/// A calculation's report.
#[derive(Debug)]
pub enum Report {
    /// Stored energy and distances.
    Energy(Box<EnergyReport>),
    /// A cylinder fill.
    Fill(Box<FillReport>),
    /// A vent-down.
    Vent(Box<VentReport>),
}

impl Report {
    /// What every renderer lays out.
    pub fn worksheet(&self) -> Worksheet {
        match self {
            Report::Energy(r) => r.as_ref().into(),
            Report::Fill(r) => r.as_ref().into(),
            Report::Vent(r) => r.as_ref().into(),
        }
    }

    /// The report's plots, the same as a worksheet draws for it.
    pub fn plots(&self) -> Vec<Plot> {
        match self {
            Report::Energy(_) => Vec::new(),
            Report::Fill(r) => vec![plots::fill(r)],
            Report::Vent(r) => plots::vent(r, "orifice")
                .into_iter()
                .chain(r.release.as_ref().map(plots::room))
                .collect(),
        }
    }
}

/// A calculation done: its report, the text `--json` prints for it, and the units its
/// options ask for.
#[derive(Debug)]
pub struct Calculated {
    /// The report.
    pub report: Report,
    /// Exactly what `pvhazard COMMAND ... --json` prints for the same options.
    pub json: String,
    /// The unit system shown first (`--units`).
    pub units: UnitSystem,
}

/// An input refused, as the JSON API answers it: the option, the value as given, what is
/// accepted and the whole message.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize)]
pub struct Refusal {
    /// The option's long name without the dashes (`pressure`).
    pub option: String,
    /// The value as given.
    pub value: String,
    /// What would have been accepted.
    pub accepted: String,
    /// What is wrong, in full.
    pub message: String,
}

impl Refusal {
    /// A refusal of `value` for `option`, what is accepted taken from the message's
    /// "accepted: ..." part.
    pub fn new(option: &str, value: &str, message: String) -> Refusal {
        Refusal {
            option: option.to_string(),
            value: crate::as_typed(value),
            accepted: accepted_part(&message),
            message,
        }
    }
}

/// Why a calculation gave no report.
#[derive(Debug)]
pub enum CalcError {
    /// The input; the caller's to correct.
    Refused(Refusal),
    /// A defect.
    Internal(String),
}

/// One option of a calculation, as its command-line definition gives it.
#[derive(Debug, Clone)]
pub struct OptionInfo {
    /// The long name without the dashes.
    pub name: String,
    /// Whether it is a flag (given as `true`).
    pub flag: bool,
    /// Whether the calculation needs it.
    pub required: bool,
    /// Its help line.
    pub help: String,
    /// The values it takes, where it takes one of a list.
    pub choices: Vec<String>,
    /// Its default, as the command line shows it.
    pub default: Option<String>,
}

/// The options a calculation takes, in the order its help lists them.
pub fn options(command: &str) -> Vec<OptionInfo> {
    let cli = Cli::command();
    let Some(c) = cli.find_subcommand(command) else {
        return Vec::new();
    };
    c.get_arguments()
        .filter_map(|a| {
            let name = a.get_long()?.to_string();
            if NOT_OFFERED.contains(&name.as_str()) {
                return None;
            }
            let default = a
                .get_default_values()
                .iter()
                .map(|v| v.to_string_lossy().into_owned())
                .next();
            Some(OptionInfo {
                flag: matches!(a.get_action(), clap::ArgAction::SetTrue),
                required: a.is_required_set(),
                help: a.get_help().map(|h| h.to_string()).unwrap_or_default(),
                choices: a
                    .get_possible_values()
                    .iter()
                    .filter(|_| !matches!(a.get_action(), clap::ArgAction::SetTrue))
                    .map(|v| v.get_name().to_string())
                    .collect(),
                default,
                name,
            })
        })
        .collect()
}

/// Runs the calculation `command` with `options`, as `pvhazard COMMAND --key=value ...
/// --json` would.
pub fn calculate(
    command: &str,
    given: &serde_json::Map<String, Json>,
) -> Result<Calculated, CalcError> {
    let known = options(command);
    if known.is_empty() {
        return Err(CalcError::Internal(format!(
            "'{command}' is not a calculation"
        )));
    }
    let mut argv: Vec<OsString> = vec!["pvhazard".into(), command.into()];
    for (key, value) in given {
        let Some(flag) = known.iter().find(|o| o.name == *key).map(|o| o.flag) else {
            return Err(refused(
                key,
                &text(value),
                &known
                    .iter()
                    .map(|o| o.name.as_str())
                    .collect::<Vec<_>>()
                    .join(", "),
                &if NOT_OFFERED.contains(&key.as_str()) {
                    format!("--{key} is not offered here (it names a file on the machine that runs pvhazard, or prints something other than the report; the answer is always the --json report)")
                } else {
                    format!("not an option of the {command} calculation")
                },
            ));
        };
        argv.extend(arguments(key, value, flag)?);
    }
    argv.push("--json".into());
    let cli = Cli::try_parse_from(&argv).map_err(|e| CalcError::Refused(from_clap(&e)))?;
    let (report, units) = match cli.command {
        Command::Energy(a) => {
            let units = a.common.units;
            (
                Report::Energy(Box::new(
                    calc::energy_report(a).map_err(|e| failed(e, &argv))?,
                )),
                units,
            )
        }
        Command::Fill(a) => {
            let units = a.common.units;
            (
                Report::Fill(Box::new(
                    calc::fill_report(a).map_err(|e| failed(e, &argv))?,
                )),
                units,
            )
        }
        Command::Vent(a) => {
            let units = a.common.units;
            (
                Report::Vent(Box::new(
                    calc::vent_report(a).map_err(|e| failed(e, &argv))?,
                )),
                units,
            )
        }
        _ => {
            return Err(CalcError::Internal(format!(
                "'{command}' is not a calculation"
            )))
        }
    };
    let json = match &report {
        Report::Energy(r) => calc::render(r.as_ref(), true, units),
        Report::Fill(r) => calc::render(r.as_ref(), true, units),
        Report::Vent(r) => calc::render(r.as_ref(), true, units),
    }
    .map_err(|e| failed(e, &argv))?;
    Ok(Calculated {
        report,
        json,
        units,
    })
}

/// The command-line arguments for one option: `--key=value` (so that a value starting with
/// a dash stays a value), once per element of an array, `--key` for a flag given as true.
fn arguments(key: &str, value: &Json, flag: bool) -> Result<Vec<OsString>, CalcError> {
    let wrong = |accepted: &str| {
        refused(
            key,
            &text(value),
            accepted,
            &format!("not a value --{key} takes; accepted: {accepted}"),
        )
    };
    match (value, flag) {
        (Json::Null, _) | (Json::Bool(false), true) => Ok(Vec::new()),
        (Json::Bool(true), true) => Ok(vec![format!("--{key}").into()]),
        (_, true) => Err(wrong("true or false")),
        (Json::String(_) | Json::Number(_), false) => {
            Ok(vec![format!("--{key}={}", text(value)).into()])
        }
        (Json::Array(items), false) => items
            .iter()
            .map(|v| match v {
                Json::String(_) | Json::Number(_) => Ok(format!("--{key}={}", text(v)).into()),
                _ => Err(wrong(
                    "a string with its unit, e.g. \"10 barg\", or an array of them",
                )),
            })
            .collect(),
        (Json::Bool(_) | Json::Object(_), false) => Err(wrong(
            "a string with its unit, e.g. \"10 barg\", or an array of them",
        )),
    }
}

/// A JSON value as the user typed it: a string without its quotes.
fn text(v: &Json) -> String {
    match v {
        Json::String(s) => crate::as_typed(s),
        other => crate::as_typed(&other.to_string()),
    }
}

fn refused(option: &str, value: &str, accepted: &str, message: &str) -> CalcError {
    CalcError::Refused(Refusal {
        option: option.to_string(),
        value: value.to_string(),
        accepted: accepted.to_string(),
        message: message.to_string(),
    })
}

/// What is accepted, from a message that ends "...; accepted: ...".
fn accepted_part(message: &str) -> String {
    message
        .rsplit_once("accepted: ")
        .map_or_else(String::new, |(_, a)| a.to_string())
}

impl From<InputError> for Refusal {
    fn from(e: InputError) -> Refusal {
        Refusal {
            option: e.field.trim_start_matches('-').to_string(),
            accepted: accepted_part(&e.problem),
            value: e.value,
            message: e.problem,
        }
    }
}

/// A run's failure: the input's, named as the command line names it, or a defect.
fn failed(f: Failure, argv: &[OsString]) -> CalcError {
    match f {
        Failure::Input(e) => CalcError::Refused(super::as_typed(e, argv).into()),
        Failure::File(e) => CalcError::Refused(Refusal {
            option: e.key.clone(),
            value: String::new(),
            accepted: accepted_part(&e.problem),
            message: e.to_string(),
        }),
        Failure::Refused(message) => CalcError::Refused(Refusal {
            option: String::new(),
            value: String::new(),
            accepted: accepted_part(&message),
            message,
        }),
        Failure::Internal(message) => CalcError::Internal(message),
    }
}

/// A parse error as a refusal, naming the option clap names.
fn from_clap(e: &clap::Error) -> Refusal {
    use clap::error::{ContextKind, ContextValue};
    let name = |v: Option<&ContextValue>| match v {
        Some(ContextValue::String(s)) => Some(s.clone()),
        Some(ContextValue::Strings(s)) => s.first().cloned(),
        _ => None,
    };
    let option = name(e.get(ContextKind::InvalidArg))
        .map(|a| {
            let word = a.split_whitespace().next().unwrap_or(&a).to_string();
            word.trim_start_matches('-')
                .split('=')
                .next()
                .unwrap_or_default()
                .to_string()
        })
        .unwrap_or_default();
    let value = name(e.get(ContextKind::InvalidValue)).unwrap_or_default();
    // The parser's own message where a value was refused; else clap's first line.
    let message = std::error::Error::source(e)
        .map(|s| s.to_string())
        .unwrap_or_else(|| {
            let rendered = e.render().to_string();
            rendered
                .lines()
                .next()
                .unwrap_or_default()
                .trim_start_matches("error: ")
                .to_string()
        });
    let accepted = match e.get(ContextKind::ValidValue) {
        Some(ContextValue::Strings(v)) => v.join(", "),
        _ => accepted_part(&message),
    };
    let value = if value.is_empty() && e.kind() == clap::error::ErrorKind::MissingRequiredArgument {
        "(none)".to_string()
    } else {
        value
    };
    Refusal {
        option,
        value,
        accepted,
        message,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn object(v: Json) -> serde_json::Map<String, Json> {
        match v {
            Json::Object(m) => m,
            _ => serde_json::Map::new(),
        }
    }

    fn refusal(command: &str, v: Json) -> Refusal {
        match calculate(command, &object(v)) {
            Err(CalcError::Refused(r)) => r,
            other => panic!("expected a refusal, got {other:?}"),
        }
    }

    #[test]
    fn a_value_starting_with_dashes_stays_a_value() {
        let r = refusal(
            "energy",
            serde_json::json!({"gas": "air", "volume": "--json", "pressure": "10 barg"}),
        );
        assert_eq!(r.option, "volume");
        assert_eq!(r.value, "--json");
    }

    #[test]
    fn the_csv_option_and_unknown_keys_are_refused_by_name() {
        let r = refusal(
            "fill",
            serde_json::json!({"gas": "air", "volume": "50 L", "from": "1 barg", "to": "200 barg", "rate": "25 bar/min", "csv": "/tmp/x.csv"}),
        );
        assert_eq!(r.option, "csv");
        let r = refusal("vent", serde_json::json!({"colour": "red"}));
        assert_eq!(r.option, "colour");
        assert!(r.accepted.contains("orifice"), "{}", r.accepted);
    }

    #[test]
    fn a_missing_option_is_named() {
        let r = refusal(
            "energy",
            serde_json::json!({"gas": "air", "volume": "2 m3"}),
        );
        assert_eq!(r.option, "pressure");
        assert_eq!(r.value, "(none)");
    }

    #[test]
    fn a_gauge_free_pressure_is_refused_with_what_is_accepted() {
        let r = refusal(
            "energy",
            serde_json::json!({"gas": "air", "volume": "2 m3", "pressure": "10 bar"}),
        );
        assert_eq!(r.option, "pressure");
        assert_eq!(r.value, "10 bar");
        assert!(r.accepted.contains("(g)"), "{}", r.accepted);
    }
}
