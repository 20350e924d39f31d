//! The command line: clap definitions, translated once into typed rule inputs.
//!
//! Quantities are parsed by clap value parsers (so a bad value is reported with its option
//! name), gauge readings become absolute here, and nothing downstream sees a string.

use std::io::Write;

use clap::{Args, Parser, Subcommand};
use uom::si::f64::{
    AvailableEnergy, Energy, Length, Mass, Pressure, ThermodynamicTemperature, Time, Volume,
};
use uom::si::pressure::pascal;

use std::io::IsTerminal;

use crate::atmosphere;
use crate::caution::{ordered, Caution, Level};
use crate::gas::{Gas, GasModel, IdealGas, ModelKind, GASES};
use crate::heat;
use crate::record;
use crate::report::{render_pdf, Paper};
use crate::report::{render_text, to_json, EnergyReport, FillReport, VentReport, Worksheet};
use crate::report::{FillTransientReport, VentTransientReport};
use crate::rules::energy::{self, EnergyInput};
use crate::rules::fill::{self, FillInput};
use crate::rules::transient::{self, FillRate, HeatTransfer, Wall};
use crate::rules::vent::{self, Process, VentInput};
use crate::site::{self, Equipment, EquipmentKind, Site};
use crate::site::{Construction, Material};
use crate::source::FileError;
use crate::template;
use crate::units::{self, fmt_sig, PressureReading, UnitSystem};
use crate::worksheet::{self, Meta};
use crate::InputError;

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
#[command(name = "pvhazard", version, about, long_about = None)]
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
}

#[derive(Debug, Args)]
struct WorksheetArgs {
    /// The site file (TOML).
    #[arg(value_name = "SITE.toml")]
    site: std::path::PathBuf,
    /// Tag of an item on the site; repeatable.
    #[arg(
        long,
        value_name = "TAG",
        required_unless_present = "all",
        conflicts_with = "all"
    )]
    tag: Vec<String>,
    /// Every item on the site.
    #[arg(long)]
    all: bool,
    /// A built-in template's name (pre-maintenance, fill-check, pressure-test) or a template file [default: pre-maintenance for vessels, fill-check for cylinders].
    #[arg(long, value_name = "NAME|PATH")]
    template: Option<String>,
    /// The work order the worksheet is attached to.
    #[arg(long, value_name = "ID")]
    work_order: Option<String>,
    /// The name of the person preparing the worksheet.
    #[arg(long, value_name = "NAME")]
    prepared_by: Option<String>,
    /// The worksheet's date and time, RFC 3339 (e.g. 2026-03-14T09:30:00+01:00) [default: SOURCE_DATE_EPOCH if set, else now, in the site's time zone].
    #[arg(long, value_name = "RFC3339", value_parser = parse_date)]
    date: Option<chrono::DateTime<chrono::FixedOffset>>,
    /// Paper size.
    #[arg(long, value_enum, default_value = "a4")]
    paper: Paper,
    /// Folder for the PDFs and their JSON records (created if missing).
    #[arg(long, value_name = "DIR", default_value = ".")]
    out: std::path::PathBuf,
    /// Replace existing records of the same name.
    #[arg(long)]
    force: bool,
    /// Gas model.
    #[arg(long, value_enum, default_value = "ideal")]
    model: ModelKind,
}

#[derive(Debug, Args)]
struct CheckArgs {
    /// The site file (TOML).
    #[arg(value_name = "SITE.toml")]
    site: std::path::PathBuf,
    /// Print one JSON object instead of a table.
    #[arg(long)]
    json: bool,
    /// Gas model.
    #[arg(long, value_enum, default_value = "ideal")]
    model: ModelKind,
}

fn parse_date(s: &str) -> Result<chrono::DateTime<chrono::FixedOffset>, String> {
    chrono::DateTime::parse_from_rfc3339(s.trim()).map_err(|e| {
        format!("'{s}' is not an RFC 3339 date and time ({e}); accepted: e.g. 2026-03-14T09:30:00+01:00 or 2026-03-14T08:30:00Z")
    })
}

/// Options every calculation takes.
#[derive(Debug, Args)]
struct Common {
    /// Gas: air, nitrogen, oxygen, argon, helium, hydrogen, methane, carbon-dioxide (or N2, O2, Ar, He, H2, CH4, CO2).
    #[arg(long, value_name = "GAS", value_parser = parse_gas)]
    gas: &'static Gas,
    /// Local atmospheric pressure, absolute, for gauge readings and for the expansion's end [default: 101.325 kPa(a)].
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_pressure, conflicts_with = "elevation")]
    ambient_pressure: Option<PressureReading>,
    /// Site elevation (m or ft): sets the ambient pressure from the standard atmosphere instead.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_length)]
    elevation: Option<Length>,
    /// Gas model.
    #[arg(long, value_enum, default_value = "ideal")]
    model: ModelKind,
    /// Units for the text output (the other system is shown alongside).
    #[arg(long, value_enum, default_value = "si")]
    units: UnitSystem,
    /// Print one JSON object (SI units, absolute pressures in Pa) instead of text.
    #[arg(long)]
    json: bool,
}

#[derive(Debug, Args)]
struct EnergyArgs {
    #[command(flatten)]
    common: Common,
    /// Gas volume of the vessel (e.g. 2 m3, 500 L, 20 gal).
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_volume)]
    volume: Volume,
    /// Vessel pressure, gauge or absolute (e.g. 10 barg).
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_pressure)]
    pressure: PressureReading,
    /// Gas temperature.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_temperature, default_value = "20 C")]
    temperature: ThermodynamicTemperature,
    /// Blast energy of TNT used for the TNT equivalent.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_specific_energy, default_value = "4.184 MJ/kg")]
    tnt_energy: AvailableEnergy,
    /// A further incident overpressure for a standoff distance (6.9 kPa and 2.07 kPa are always shown); repeatable.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_overpressure)]
    overpressure: Vec<Pressure>,
    /// Report the pressure to vent to before the stored energy is at or below this.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_energy)]
    energy_limit: Option<Energy>,
    /// Maximum allowable working pressure from the rating plate.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_pressure)]
    mawp: Option<PressureReading>,
    /// The distance the site can keep clear of people around the vessel.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_length)]
    clearance: Option<Length>,
}

#[derive(Debug, Args)]
struct FillArgs {
    #[command(flatten)]
    common: Common,
    /// Cylinder internal (water) volume.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_volume)]
    volume: Volume,
    /// Pressure before the fill.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_pressure)]
    from: PressureReading,
    /// Pressure at which the fill stops.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_pressure)]
    to: PressureReading,
    /// Supply gas temperature [default: the ambient temperature].
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_temperature)]
    supply_temperature: Option<ThermodynamicTemperature>,
    /// Gas temperature before the fill [default: the ambient temperature].
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_temperature)]
    initial_temperature: Option<ThermodynamicTemperature>,
    /// Ambient temperature the filled cylinder cools to.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_temperature, default_value = "20 C")]
    ambient_temperature: ThermodynamicTemperature,
    /// The cylinder's rated maximum gas temperature (e.g. 65 C).
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_temperature)]
    rated_temperature: Option<ThermodynamicTemperature>,
    /// Planned fill rate, a pressure ramp (25 bar/min, 400 psi/min) or a mass flow (2 kg/min): adds the fill with wall heat transfer and the highest safe rate.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_rate, conflicts_with = "duration")]
    rate: Option<units::RateReading>,
    /// Planned fill duration, as a steady pressure ramp over it (instead of --rate).
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_time)]
    duration: Option<Time>,
    #[command(flatten)]
    wall: WallArgs,
    /// Cylinder construction (steel means carbon steel; a composite's liner takes the heat).
    #[arg(long, value_enum, default_value = "steel")]
    construction: Construction,
    /// Inlet (fill-connection) bore, for the jet-driven heat-transfer correlation.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_length)]
    inlet_diameter: Option<Length>,
}

/// Options of the wall heat-transfer model, shared by fill and vent.
#[derive(Debug, Args)]
struct WallArgs {
    /// Heat exchanged between gas and wall: lumped (gas and wall nodes) or none (the adiabatic bound).
    #[arg(long, value_enum)]
    heat_transfer: Option<HeatTransfer>,
    /// Mass of the wall [default: estimated from the volume, pressure and material].
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_mass)]
    wall_mass: Option<Mass>,
    /// Inner heat-transfer coefficient to use instead of the correlations (e.g. 500 W/m2K).
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_heat_coefficient)]
    inner_coefficient: Option<f64>,
    /// Write the transient's time series (t, p, gas and wall temperature) to this CSV file.
    #[arg(long, value_name = "FILE")]
    csv: Option<std::path::PathBuf>,
}

#[derive(Debug, Args)]
struct VentArgs {
    #[command(flatten)]
    common: Common,
    /// Gas volume of the vessel.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_volume)]
    volume: Volume,
    /// Starting pressure, gauge or absolute.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_pressure)]
    pressure: PressureReading,
    /// Orifice (vent or drain) diameter; may be left out with --within.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_length, required_unless_present = "within")]
    orifice: Option<Length>,
    /// Discharge coefficient, 0 < Cd <= 1 (0.61 sharp-edged orifice, 0.97 rounded nozzle).
    #[arg(long, value_name = "X", allow_hyphen_values = true, default_value_t = vent::SHARP_EDGED_CD, value_parser = parse_cd)]
    cd: f64,
    /// Target pressure [default: ambient + 1 %].
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_pressure)]
    down_to: Option<PressureReading>,
    /// What the gas in the vessel does while venting.
    #[arg(long, value_enum, default_value = "isentropic")]
    process: Process,
    /// Starting gas temperature.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_temperature, default_value = "20 C")]
    temperature: ThermodynamicTemperature,
    /// Minimum design metal temperature (MDMT) from the rating plate.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_temperature)]
    min_metal_temperature: Option<ThermodynamicTemperature>,
    /// Report the orifice diameter that vents to the target within this time.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_time)]
    within: Option<Time>,
    #[command(flatten)]
    wall: WallArgs,
    /// Wall material, for the wall heat-transfer model.
    #[arg(long, value_enum, default_value = "carbon-steel")]
    material: Material,
    /// Design pressure (MAWP) from the rating plate, for the depressuring check and the wall estimate [default: the starting pressure].
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_pressure)]
    design_pressure: Option<PressureReading>,
    /// Check the time to reach the lower of a fraction of the design gauge pressure and a cap, against a limit (in the spirit of API 521).
    #[arg(long)]
    depressuring_check: bool,
    /// The depressuring check's fraction of the design gauge pressure.
    #[arg(long, value_name = "X", default_value_t = 0.5)]
    depressuring_fraction: f64,
    /// The depressuring check's cap on the gauge pressure to reach.
    #[arg(long, value_name = "Q", default_value = "690 kPa", value_parser = units::parse_overpressure)]
    depressuring_cap: Pressure,
    /// The depressuring check's time limit.
    #[arg(long, value_name = "Q", default_value = "15 min", value_parser = units::parse_time)]
    depressuring_limit: Time,
}

#[derive(Debug, Args)]
struct GasesArgs {
    /// Print one JSON object instead of a table.
    #[arg(long)]
    json: bool,
}

fn parse_gas(s: &str) -> Result<&'static Gas, String> {
    Gas::find(s).ok_or_else(|| format!("unknown gas '{s}'; accepted: {}", Gas::accepted_names()))
}

fn parse_cd(s: &str) -> Result<f64, String> {
    let cd: f64 = s.trim().parse().map_err(|_| {
        format!("'{s}' is not a number; accepted: a discharge coefficient in (0, 1], e.g. 0.61")
    })?;
    if cd.is_finite() && cd > 0.0 && cd <= 1.0 {
        Ok(cd)
    } else {
        Err(format!("{s} is outside (0, 1]; accepted: a discharge coefficient above 0 and at most 1 (0.61 sharp-edged, 0.97 well-rounded)"))
    }
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
    let cli = match Cli::try_parse_from(args) {
        Ok(cli) => cli,
        Err(e) => {
            let code = if e.use_stderr() {
                EXIT_BAD_INPUT
            } else {
                EXIT_OK
            };
            // A failed write of help or an error message leaves nothing more to do.
            let _ = e.print();
            return code;
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
            eprintln!("pvhazard: error: --{}", e);
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

/// Runs a command: its output and exit code.
fn execute(command: Command) -> Result<(String, i32), Failure> {
    let computed = |text: String| (text, EXIT_OK);
    match command {
        Command::Energy(a) => energy_command(a).map(computed),
        Command::Fill(a) => fill_command(a).map(computed),
        Command::Vent(a) => vent_command(a).map(computed),
        Command::Gases(a) => gases_command(a).map(computed),
        Command::Worksheet(a) => worksheet_command(a).map(computed),
        Command::Check(a) => check_command(a),
    }
}

/// The gas model `kind` for `gas`, for site items.
fn site_model(kind: ModelKind, gas: &'static Gas) -> Result<Box<dyn GasModel>, InputError> {
    match kind {
        ModelKind::Ideal => Ok(Box::new(IdealGas::new(gas))),
        ModelKind::Real => Err(InputError::new(
            "model",
            "real",
            "the real-gas model is not available yet in this version; accepted: ideal",
        )),
    }
}

/// The worksheet date: `--date`, else SOURCE_DATE_EPOCH, else now; in the site's zone
/// unless `--date` gave its own offset.
fn worksheet_date(
    given: Option<chrono::DateTime<chrono::FixedOffset>>,
    zone: chrono::FixedOffset,
) -> Result<chrono::DateTime<chrono::FixedOffset>, Failure> {
    if let Some(d) = given {
        return Ok(d);
    }
    if let Ok(epoch) = std::env::var("SOURCE_DATE_EPOCH") {
        let refused = || {
            Failure::Refused(format!(
                "SOURCE_DATE_EPOCH = '{epoch}': not a number of seconds since 1970-01-01 UTC in range; accepted: e.g. 1773477000, or unset it and give --date"
            ))
        };
        let secs: i64 = epoch.trim().parse().map_err(|_| refused())?;
        let utc = chrono::DateTime::from_timestamp(secs, 0).ok_or_else(refused)?;
        return Ok(utc.with_timezone(&zone));
    }
    Ok(chrono::Utc::now().with_timezone(&zone))
}

/// The items `--tag` names (in the order given), or every item with `--all`.
fn selected<'a>(
    site: &'a Site,
    tags: &[String],
    all: bool,
) -> Result<Vec<&'a Equipment>, InputError> {
    if all {
        return Ok(site.equipment.iter().collect());
    }
    let mut chosen: Vec<&Equipment> = Vec::new();
    for t in tags {
        let item = site
            .equipment
            .iter()
            .find(|e| e.tag().eq_ignore_ascii_case(t))
            .ok_or_else(|| {
                InputError::new(
                    "tag",
                    t.clone(),
                    format!(
                        "no item with this tag on the site; accepted: {}",
                        site.equipment
                            .iter()
                            .map(|e| e.tag())
                            .collect::<Vec<_>>()
                            .join(", ")
                    ),
                )
            })?;
        // A tag given twice is one worksheet, not a clash with itself.
        if !chosen.iter().any(|c| std::ptr::eq(*c, item)) {
            chosen.push(item);
        }
    }
    Ok(chosen)
}

fn worksheet_command(a: WorksheetArgs) -> Result<String, Failure> {
    let site = site::load(&a.site)?;
    let items = selected(&site, &a.tag, a.all)?;
    let date = worksheet_date(a.date, site.time_zone)?;
    let meta = Meta {
        work_order: a.work_order.clone(),
        prepared_by: a.prepared_by.clone(),
        date,
    };
    let given_template = a.template.as_deref().map(template::resolve).transpose()?;
    // Every worksheet is computed and rendered before any is written, so a bad item leaves
    // no partial batch behind.
    let progress = a.all && std::io::stderr().is_terminal();
    let mut records = Vec::new();
    for (i, item) in items.iter().enumerate() {
        if progress {
            eprint!("\r[{}/{}] {:<24}", i + 1, items.len(), item.tag());
        }
        let template = match &given_template {
            Some(t) => t.clone(),
            None => template::resolve(template::default_for(item.kind()))?,
        };
        let model = site_model(a.model, item.gas())?;
        let sheet = worksheet::build(model.as_ref(), &site, item, &template, &meta)?;
        let pdf =
            render_pdf(&sheet.document, a.paper).map_err(|e| Failure::Internal(e.to_string()))?;
        let json = to_json(&sheet.record).map_err(Failure::Internal)? + "\n";
        let stem = record::stem(
            &site.name,
            item.tag(),
            &template.name,
            a.work_order.as_deref(),
            &date.format("%Y-%m-%d").to_string(),
        );
        records.push((item.tag().to_string(), sheet.highest, stem, pdf, json));
    }
    if progress {
        eprintln!();
    }
    std::fs::create_dir_all(&a.out).map_err(|e| {
        Failure::Internal(format!("cannot create the folder {}: {e}", a.out.display()))
    })?;
    let batches: Vec<record::Files> = records
        .iter()
        .map(|(_, _, stem, pdf, json)| record::Files {
            files: vec![
                (a.out.join(format!("{stem}.json")), json.as_bytes()),
                (a.out.join(format!("{stem}.pdf")), pdf.as_slice()),
            ],
        })
        .collect();
    if !a.force {
        if let Some(p) = batches.iter().flat_map(|b| b.existing()).next() {
            return Err(Failure::Refused(
                record::RecordError::Exists(p.to_path_buf()).to_string(),
            ));
        }
    }
    let mut text = String::new();
    for ((tag, highest, _, _, _), batch) in records.iter().zip(&batches) {
        let written = batch.write(a.force).map_err(|e| match e {
            record::RecordError::Exists(_) => Failure::Refused(e.to_string()),
            record::RecordError::Io { .. } => Failure::Internal(e.to_string()),
        })?;
        let names: Vec<String> = written.iter().map(|p| p.display().to_string()).collect();
        text.push_str(&format!(
            "{tag}: {} (highest caution: {})\n",
            names.join(", "),
            highest.word()
        ));
    }
    Ok(text)
}

fn check_command(a: CheckArgs) -> Result<(String, i32), Failure> {
    #[derive(serde::Serialize)]
    struct Item {
        tag: String,
        kind: EquipmentKind,
        gas: &'static str,
        template: String,
        stored_energy_j: uom::si::f64::Energy,
        highest_level: Level,
        cautions: Vec<Caution>,
    }
    #[derive(serde::Serialize)]
    struct Summary {
        command: &'static str,
        tool_version: &'static str,
        site: String,
        items: Vec<Item>,
        danger: bool,
    }
    let site = site::load(&a.site)?;
    // The check's results do not depend on the date; a fixed one keeps runs identical.
    let meta = Meta {
        work_order: None,
        prepared_by: None,
        date: chrono::DateTime::from_timestamp(0, 0)
            .unwrap_or_default()
            .with_timezone(&site.time_zone),
    };
    let mut items = Vec::new();
    for item in &site.equipment {
        let template = template::resolve(template::default_for(item.kind()))?;
        let model = site_model(a.model, item.gas())?;
        let sheet = worksheet::build(model.as_ref(), &site, item, &template, &meta)?;
        items.push(Item {
            tag: item.tag().to_string(),
            kind: item.kind(),
            gas: item.gas().name,
            template: template.name.clone(),
            stored_energy_j: sheet.stored_energy,
            highest_level: sheet.highest,
            cautions: sheet.record.cautions,
        });
    }
    items.sort_by(|x, y| {
        y.highest_level
            .cmp(&x.highest_level)
            .then(y.stored_energy_j.value.total_cmp(&x.stored_energy_j.value))
    });
    let danger = items.iter().any(|i| i.highest_level == Level::Danger);
    let code = if danger { EXIT_DANGER } else { EXIT_OK };
    if a.json {
        let summary = Summary {
            command: "check",
            tool_version: crate::report::TOOL_VERSION,
            site: site.name.clone(),
            items,
            danger,
        };
        return Ok((to_json(&summary).map_err(Failure::Internal)? + "\n", code));
    }
    let display = crate::units::Display {
        system: site.units,
        ambient: site.ambient,
    };
    let mut text = format!(
        "{} — {} item(s), ranked by hazard\n\n",
        site.name,
        items.len()
    );
    text.push_str(&format!(
        "{:<12} {:<9} {:<15} {:<8} {}\n",
        "tag", "kind", "gas", "highest", "stored energy (isentropic)"
    ));
    for i in &items {
        text.push_str(&format!(
            "{:<12} {:<9} {:<15} {:<8} {}\n",
            i.tag,
            format!("{:?}", i.kind).to_lowercase(),
            i.gas,
            i.highest_level.word(),
            display.energy(i.stored_energy_j)
        ));
    }
    for i in items.iter().filter(|i| i.highest_level >= Level::Warning) {
        text.push_str(&format!("\n{}:\n", i.tag));
        for c in i.cautions.iter().filter(|c| c.level >= Level::Warning) {
            text.push_str(&format!("  {:<8} {}\n", c.level.word(), c.render(&display)));
        }
    }
    if danger {
        text.push_str("\nAt least one item raises DANGER (exit code 3).\n");
    }
    Ok((text, code))
}

/// The gas model asked for.
fn model_for(common: &Common) -> Result<Box<dyn GasModel>, InputError> {
    match common.model {
        ModelKind::Ideal => Ok(Box::new(IdealGas::new(common.gas))),
        ModelKind::Real => Err(InputError::new(
            "model",
            "real",
            "the real-gas model is not available yet in this version; accepted: ideal",
        )),
    }
}

/// The absolute ambient pressure from `--ambient-pressure` or `--elevation`.
fn ambient(common: &Common) -> Result<Pressure, InputError> {
    let standard = Pressure::new::<pascal>(atmosphere::SEA_LEVEL_PRESSURE_PA);
    let p = match (common.ambient_pressure, common.elevation) {
        (Some(PressureReading::Absolute(p)), _) => p,
        (Some(PressureReading::Gauge(p)), _) => {
            return Err(InputError::new(
                "ambient-pressure",
                format!("{} kPa(g)", fmt_sig(p.get::<pascal>() / 1e3, 6)),
                "the ambient pressure is what gauge readings are measured from, so it must be absolute; accepted: e.g. '101.3 kPa(a)', '14.7 psia'",
            ))
        }
        (None, Some(z)) => atmosphere::pressure_at(z)?,
        (None, None) => standard,
    };
    let pa = p.get::<pascal>();
    if !(1.0e3..=2.0e5).contains(&pa) {
        return Err(InputError::new(
            "ambient-pressure",
            format!("{} kPa(a)", fmt_sig(pa / 1e3, 6)),
            "outside the range of atmospheres on the ground; accepted: 1 kPa(a) to 200 kPa(a)",
        ));
    }
    Ok(p)
}

/// A gauge or absolute reading made absolute, refused if at or below vacuum.
fn absolute(
    field: &str,
    reading: PressureReading,
    ambient: Pressure,
) -> Result<Pressure, InputError> {
    let p = reading.to_absolute(ambient);
    if p.get::<pascal>() <= 0.0 {
        return Err(InputError::new(
            field,
            format!(
                "{} kPa({})",
                fmt_sig(
                    (if reading.is_gauge() { p - ambient } else { p }).get::<pascal>() / 1e3,
                    6
                ),
                if reading.is_gauge() { "g" } else { "a" }
            ),
            format!(
                "this is at or below a perfect vacuum (ambient is {} kPa(a)); accepted: an absolute pressure above zero",
                fmt_sig(ambient.get::<pascal>() / 1e3, 6)
            ),
        ));
    }
    Ok(p)
}

fn render<R: serde::Serialize>(
    report: &R,
    json: bool,
    system: UnitSystem,
) -> Result<String, Failure>
where
    for<'a> &'a R: Into<Worksheet>,
{
    if json {
        to_json(report).map(|s| s + "\n").map_err(Failure::Internal)
    } else {
        Ok(render_text(&report.into(), system))
    }
}

fn energy_command(a: EnergyArgs) -> Result<String, Failure> {
    let model = model_for(&a.common)?;
    let pa = ambient(&a.common)?;
    let mut overpressures: Vec<Pressure> = energy::DEFAULT_OVERPRESSURES_PA
        .iter()
        .map(|&p| Pressure::new::<pascal>(p))
        .collect();
    overpressures.extend(a.overpressure.iter().copied());
    let input = EnergyInput {
        volume: a.volume,
        pressure: absolute("pressure", a.pressure, pa)?,
        temperature: a.temperature,
        ambient: pa,
        tnt_energy: a.tnt_energy,
        overpressures,
        energy_limit: a.energy_limit,
        mawp: a.mawp.map(|m| absolute("mawp", m, pa)).transpose()?,
        clearance: a.clearance,
    };
    let out = energy::stored_energy(model.as_ref(), &input)?;
    let report = EnergyReport::new(model.as_ref(), &input, out);
    render(&report, a.common.json, a.common.units)
}

fn fill_command(a: FillArgs) -> Result<String, Failure> {
    let model = model_for(&a.common)?;
    let pa = ambient(&a.common)?;
    let input = FillInput {
        volume: a.volume,
        from: absolute("from", a.from, pa)?,
        to: absolute("to", a.to, pa)?,
        initial_temperature: a.initial_temperature.unwrap_or(a.ambient_temperature),
        supply_temperature: a.supply_temperature.unwrap_or(a.ambient_temperature),
        ambient_temperature: a.ambient_temperature,
        rated_temperature: a.rated_temperature,
    };
    // An error on a temperature left to default is the ambient temperature's.
    let out = fill::adiabatic_fill(model.as_ref(), &input).map_err(|e| {
        let defaulted = match e.field.as_str() {
            "initial-temperature" => a.initial_temperature.is_none(),
            "supply-temperature" => a.supply_temperature.is_none(),
            "from" if a.initial_temperature.is_none() => {
                let problem = format!(
                    "{} (at the ambient temperature, which --initial-temperature defaults to)",
                    e.problem
                );
                return InputError { problem, ..e };
            }
            _ => false,
        };
        if defaulted {
            let problem = format!(
                "{} (it was used for the {} temperature, which was not given)",
                e.problem,
                e.field.trim_end_matches("-temperature")
            );
            InputError {
                problem,
                ..e.with_field("ambient-temperature")
            }
        } else {
            e
        }
    })?;
    let mut report = FillReport::new(model.as_ref(), &input, pa, out);
    let rate = match (a.rate, a.duration) {
        (Some(units::RateReading::Pressure(r)), _) => Some(FillRate::Ramp(r)),
        (Some(units::RateReading::Mass(m)), _) => Some(FillRate::MassFlow(m)),
        (None, Some(d)) => {
            check_range("duration", d.get::<uom::si::time::second>(), "s", 1e-3, 1e7)?;
            Some(FillRate::Ramp(units::PressureRate {
                // The pressure gained in one second of a steady ramp over `d`.
                per_second: (input.to - input.from) / d.get::<uom::si::time::second>(),
            }))
        }
        (None, None) => None,
    };
    if let Some(rate) = rate {
        let wall = Wall {
            mass: a.wall.wall_mass.unwrap_or_else(|| {
                Mass::new::<uom::si::mass::kilogram>(a.construction.estimated_wall_mass(
                    input.volume.get::<uom::si::volume::cubic_meter>(),
                    (input.to - pa).get::<pascal>(),
                ))
            }),
            material: a.construction.heat_material(),
            estimated: a.wall.wall_mass.is_none(),
        };
        let exchange = exchange(
            &a.wall,
            wall,
            input.ambient_temperature,
            heat::CYLINDER_ASPECT,
        )?;
        if let Some(d) = a.inlet_diameter {
            check_range(
                "inlet-diameter",
                d.get::<uom::si::length::meter>(),
                "m",
                1e-4,
                0.1,
            )?;
        }
        let rate_si = match rate {
            FillRate::Ramp(r) => r.per_second.get::<pascal>(),
            FillRate::MassFlow(m) => m.get::<uom::si::mass_rate::kilogram_per_second>(),
        };
        check_range("rate", rate_si, "SI units per second", 1e-9, 1e9)?;
        let t = transient::fill_from(model.as_ref(), &input, rate, a.inlet_diameter, &exchange)?;
        let t_report =
            FillTransientReport::new(&t.value, rate, input.rated_temperature, exchange.mode);
        if let Some(path) = &a.wall.csv {
            write_csv(path, &t_report.samples)?;
        }
        report.cautions.extend(t.cautions);
        report.cautions = ordered(std::mem::take(&mut report.cautions));
        report.transient = Some(t_report);
    }
    render(&report, a.common.json, a.common.units)
}

/// The heat-transfer settings from the wall options, checked.
fn exchange(
    w: &WallArgs,
    wall: Wall,
    ambient_temperature: ThermodynamicTemperature,
    aspect: f64,
) -> Result<transient::Exchange, InputError> {
    check_range(
        "wall-mass",
        wall.mass.get::<uom::si::mass::kilogram>(),
        "kg",
        0.0,
        1e7,
    )?;
    if let Some(h) = w.inner_coefficient {
        check_range("inner-coefficient", h, "W/m2K", 1e-6, 1e7)?;
    }
    Ok(transient::Exchange {
        mode: w.heat_transfer.unwrap_or(HeatTransfer::Lumped),
        wall,
        inner_coefficient: w.inner_coefficient,
        ambient_temperature,
        aspect,
    })
}

/// Refuses `value` outside (lo, hi].
fn check_range(field: &str, value: f64, unit: &str, lo: f64, hi: f64) -> Result<(), InputError> {
    if value.is_finite() && value > lo && value <= hi {
        Ok(())
    } else {
        Err(InputError::new(
            field,
            format!("{value} {unit}"),
            format!("outside the range accepted; accepted: above {lo} and at most {hi} {unit}"),
        ))
    }
}

/// Writes a transient's samples as CSV, never over an existing file.
fn write_csv(path: &std::path::Path, samples: &[transient::Sample]) -> Result<(), Failure> {
    use uom::si::thermodynamic_temperature::kelvin;
    let mut text = String::from("time_s,pressure_pa,gas_temperature_k,wall_temperature_k\n");
    for s in samples {
        text.push_str(&format!(
            "{},{},{},{}\n",
            s.time.get::<uom::si::time::second>(),
            s.pressure.get::<pascal>(),
            s.gas_temperature.get::<kelvin>(),
            s.wall_temperature.get::<kelvin>()
        ));
    }
    let files = record::Files {
        files: vec![(path.to_path_buf(), text.as_bytes())],
    };
    files.write(false).map(|_| ()).map_err(|e| match e {
        record::RecordError::Exists(p) => Failure::Refused(format!(
            "{} already exists; the CSV is not written over an existing file: choose another --csv path",
            p.display()
        )),
        other => Failure::Internal(other.to_string()),
    })
}

fn vent_command(a: VentArgs) -> Result<String, Failure> {
    let model = model_for(&a.common)?;
    let pa = ambient(&a.common)?;
    let down_to = match a.down_to {
        Some(r) => absolute("down-to", r, pa)?,
        None => pa * (1.0 + vent::DEFAULT_TARGET_MARGIN),
    };
    let input = VentInput {
        volume: a.volume,
        pressure: absolute("pressure", a.pressure, pa)?,
        temperature: a.temperature,
        ambient: pa,
        orifice: a.orifice,
        cd: a.cd,
        down_to,
        process: a.process,
        min_metal_temperature: a.min_metal_temperature,
        within: a.within,
    };
    let out = vent::blow_down(model.as_ref(), &input)?;
    let mut report = VentReport::new(model.as_ref(), &input, out);
    if a.wall.heat_transfer.is_some() || a.depressuring_check {
        let design = match a.design_pressure {
            Some(r) => absolute("design-pressure", r, pa)?,
            None => input.pressure,
        };
        let design_gauge = (design - pa).get::<pascal>().max(0.0);
        let wall = Wall {
            mass: a.wall.wall_mass.unwrap_or_else(|| {
                Mass::new::<uom::si::mass::kilogram>(a.material.estimated_vessel_wall_mass(
                    input.volume.get::<uom::si::volume::cubic_meter>(),
                    design_gauge,
                ))
            }),
            material: a.material,
            estimated: a.wall.wall_mass.is_none(),
        };
        let mut wall_args = a.wall;
        wall_args.heat_transfer = Some(wall_args.heat_transfer.unwrap_or(HeatTransfer::Lumped));
        let exchange = exchange(&wall_args, wall, input.temperature, heat::VESSEL_ASPECT)?;
        let check = if a.depressuring_check {
            check_range(
                "depressuring-fraction",
                a.depressuring_fraction,
                "",
                0.0,
                1.0,
            )?;
            let target = Pressure::new::<pascal>(
                (a.depressuring_fraction * design_gauge).min(a.depressuring_cap.get::<pascal>()),
            ) + pa;
            Some(transient::Depressuring {
                target,
                limit: a.depressuring_limit,
            })
        } else {
            None
        };
        let t = transient::vent_from(model.as_ref(), &input, check, &exchange)?;
        let (t_report, dep) = VentTransientReport::new(&t.value, check, exchange.mode);
        if let Some(path) = &wall_args.csv {
            write_csv(path, &t_report.samples)?;
        }
        report.cautions.extend(t.cautions);
        report.cautions = ordered(std::mem::take(&mut report.cautions));
        report.transient = Some(t_report);
        report.depressuring = dep;
    }
    render(&report, a.common.json, a.common.units)
}

fn gases_command(a: GasesArgs) -> Result<String, Failure> {
    #[derive(serde::Serialize)]
    struct Row {
        name: &'static str,
        formula: &'static str,
        molar_mass_kg_per_mol: f64,
        specific_gas_constant_j_per_kg_k: f64,
        cp_300k_j_per_kg_k: f64,
        gamma_300k: f64,
        critical_temperature_k: f64,
        critical_pressure_pa: f64,
        hazard: crate::gas::GasHazard,
        equation_of_state: &'static str,
    }
    #[derive(serde::Serialize)]
    struct Gases {
        command: &'static str,
        tool_version: &'static str,
        gases: Vec<Row>,
        sources: &'static str,
    }
    const SOURCES: &str = "molar mass: IUPAC/CIAAW standard atomic weights 2021 (air: CIPM-2007 dry air); cp at 300 K: NIST-JANAF Thermochemical Tables (Chase 1998), air: Lemmon et al. 2000; critical points: each gas's reference equation of state";
    let rows: Vec<Row> = GASES
        .iter()
        .map(|g| Row {
            name: g.name,
            formula: g.formula,
            molar_mass_kg_per_mol: g.molar_mass_kg_per_mol,
            specific_gas_constant_j_per_kg_k: g.specific_gas_constant(),
            cp_300k_j_per_kg_k: g.cp_300k_j_per_kg_k,
            gamma_300k: g.gamma_300k(),
            critical_temperature_k: g.critical_temperature_k,
            critical_pressure_pa: g.critical_pressure_pa,
            hazard: g.hazard,
            equation_of_state: g.eos,
        })
        .collect();
    if a.json {
        let all = Gases {
            command: "gases",
            tool_version: crate::report::TOOL_VERSION,
            gases: rows,
            sources: SOURCES,
        };
        return to_json(&all).map(|s| s + "\n").map_err(Failure::Internal);
    }
    let mut s = format!(
        "{:<15} {:<8} {:>10} {:>11} {:>11} {:>7} {:>9} {:>10}\n",
        "gas", "formula", "M g/mol", "R J/(kg K)", "cp J/(kg K)", "gamma", "Tc K", "pc bar(a)"
    );
    for r in &rows {
        s.push_str(&format!(
            "{:<15} {:<8} {:>10.4} {:>11.2} {:>11.1} {:>7.4} {:>9.2} {:>10.3}\n",
            r.name,
            r.formula,
            r.molar_mass_kg_per_mol * 1e3,
            r.specific_gas_constant_j_per_kg_k,
            r.cp_300k_j_per_kg_k,
            r.gamma_300k,
            r.critical_temperature_k,
            r.critical_pressure_pa / 1e5
        ));
    }
    s.push_str(&format!("\nSources: {SOURCES}.\n"));
    Ok(s)
}
