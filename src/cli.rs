//! The command line: clap definitions, translated once into typed rule inputs.
//!
//! Quantities are parsed by clap value parsers (so a bad value is reported with its option
//! name), gauge readings become absolute here, and nothing downstream sees a string.

use std::io::Write;

use clap::{Args, Parser, Subcommand};
use uom::si::f64::{
    AvailableEnergy, Energy, Length, Pressure, ThermodynamicTemperature, Time, Volume,
};
use uom::si::pressure::pascal;

use crate::atmosphere;
use crate::gas::{Gas, GasModel, IdealGas, ModelKind, GASES};
use crate::report::{render_text, to_json, EnergyReport, FillReport, VentReport, Worksheet};
use crate::rules::energy::{self, EnergyInput};
use crate::rules::fill::{self, FillInput};
use crate::rules::vent::{self, Process, VentInput};
use crate::units::{self, fmt_sig, PressureReading, UnitSystem};
use crate::InputError;

/// Exit code: computed (whatever the cautions).
pub const EXIT_OK: i32 = 0;
/// Exit code: the program failed for a reason other than the input (a defect).
pub const EXIT_INTERNAL: i32 = 1;
/// Exit code: bad input; the message names the field, the value and what is accepted.
pub const EXIT_BAD_INPUT: i32 = 2;

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
    /// A defect or an I/O failure; exit 1.
    Internal(String),
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
        Ok(text) => match out.write_all(text.as_bytes()).and_then(|_| out.flush()) {
            Ok(()) => EXIT_OK,
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
        Err(Failure::Internal(msg)) => {
            eprintln!("pvhazard: {msg}");
            EXIT_INTERNAL
        }
    }
}

fn execute(command: Command) -> Result<String, Failure> {
    match command {
        Command::Energy(a) => energy_command(a),
        Command::Fill(a) => fill_command(a),
        Command::Vent(a) => vent_command(a),
        Command::Gases(a) => gases_command(a),
    }
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
    let report = FillReport::new(model.as_ref(), &input, pa, out);
    render(&report, a.common.json, a.common.units)
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
    let report = VentReport::new(model.as_ref(), &input, out);
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
