//! The calculation commands: energy, fill and vent, their options, and the translation of
//! those options into rule inputs.

use clap::Args;
use uom::si::f64::{
    AvailableEnergy, Energy, Length, Mass, Pressure, ThermodynamicTemperature, Time, Volume,
};
use uom::si::pressure::pascal;
use uom::si::volume::cubic_meter;

use super::Failure;
use crate::assess::{self, Discharge, EnergyAsk, Governing, PlannedFill, WallVent, Work};
use crate::atmosphere;
use crate::gas::{Gas, ModelKind};
use crate::heat;
use crate::heat::{Construction, Liner, Material};
use crate::limits;
use crate::record;
use crate::report::{render_text, to_json, EnergyReport, FillReport, VentReport, Worksheet};
use crate::rules::energy::{self, EnergyInput};
use crate::rules::fill::FillInput;
use crate::rules::room::{Room, Ventilation};
use crate::rules::transient::{self, FillRate, HeatTransfer, Wall};
use crate::rules::vent::{self, Process, VentInput};
use crate::units::{self, fmt_sig, PressureReading, UnitSystem};
use crate::InputError;

/// Options every calculation takes.
#[derive(Debug, Args)]
pub(super) struct Common {
    /// Gas: air, nitrogen, oxygen, argon, helium, hydrogen, methane, carbon-dioxide (or N2, O2, Ar, He, H2, CH4, CO2).
    #[arg(long, value_name = "GAS", value_parser = parse_gas)]
    gas: &'static Gas,
    /// Local atmospheric pressure, absolute, for gauge readings and for the expansion's end [default: 101.325 kPa(a)].
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_pressure, conflicts_with = "elevation")]
    ambient_pressure: Option<PressureReading>,
    /// Site elevation (m or ft): sets the ambient pressure from the standard atmosphere instead.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_length)]
    elevation: Option<Length>,
    /// Gas model: the reference equation of state of the gas, or the ideal gas for comparison.
    #[arg(long, value_enum, ignore_case = true, default_value = "real")]
    model: ModelKind,
    /// Units for the text output (the other system is shown alongside).
    #[arg(long, value_enum, ignore_case = true, default_value = "si")]
    pub(super) units: UnitSystem,
    /// Print one JSON object (SI units, absolute pressures in Pa) instead of text.
    #[arg(long)]
    json: bool,
}

#[derive(Debug, Args)]
pub(super) struct EnergyArgs {
    #[command(flatten)]
    pub(super) common: Common,
    /// Gas volume of the vessel (e.g. 2 m3, 500 L, 20 gal).
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = parse_vessel_volume)]
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
    /// The empty vessel's mass, for how far the pieces fly if it bursts (Moore's equation).
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_mass)]
    empty_mass: Option<Mass>,
    /// What the work is: in service (people kept back to the 6.9 kPa standoff) or a pneumatic pressure test (the test rule's exclusion distance).
    #[arg(long, value_enum, ignore_case = true, default_value = "in-service")]
    work: WorkKind,
}

/// What the work on the vessel is, for the distance to keep people back.
#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub(super) enum WorkKind {
    /// Work on a vessel in service.
    InService,
    /// A pneumatic pressure test.
    PressureTest,
}

#[derive(Debug, Args)]
pub(super) struct FillArgs {
    #[command(flatten)]
    pub(super) common: Common,
    /// Cylinder internal (water) volume.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = parse_vessel_volume)]
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
    /// Supply pressure, gauge or absolute: where the incoming gas's enthalpy is taken (real gas) [default: the --to pressure].
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_pressure)]
    supply_pressure: Option<PressureReading>,
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
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = parse_fill_rate, conflicts_with = "duration")]
    rate: Option<units::RateReading>,
    /// Planned fill duration, as a steady pressure ramp over it (instead of --rate).
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = parse_planned_time)]
    duration: Option<Time>,
    #[command(flatten)]
    wall: WallArgs,
    /// Cylinder construction (steel means carbon steel; a composite is a liner, see --liner, and a carbon-fibre wrap).
    #[arg(long, value_enum, ignore_case = true, default_value = "steel")]
    construction: Construction,
    /// A composite cylinder's liner [default: aluminium, with a CAUTION].
    #[arg(long, value_enum, ignore_case = true)]
    liner: Option<Liner>,
    /// The empty cylinder's mass without its valve (its tare weight), instead of --wall-mass and --wrap-mass.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_mass, conflicts_with_all = ["wall_mass", "wrap_mass"])]
    empty_mass: Option<Mass>,
    /// Mass of a composite cylinder's wrap; --wall-mass is then its liner's [default: estimated].
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_mass)]
    wrap_mass: Option<Mass>,
    /// Inlet (fill-connection) bore, for the jet-driven heat-transfer correlation.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_length)]
    inlet_diameter: Option<Length>,
}

impl WallArgs {
    /// Whether any wall option was given.
    fn any(&self) -> bool {
        self.heat_transfer.is_some()
            || self.wall_mass.is_some()
            || self.inner_coefficient.is_some()
            || self.csv.is_some()
    }
}

/// Options of the wall heat-transfer model, shared by fill and vent.
#[derive(Debug, Args)]
pub(super) struct WallArgs {
    /// Heat exchanged between gas and wall: lumped (gas and wall nodes) or none (the adiabatic bound).
    #[arg(long, value_enum, ignore_case = true)]
    heat_transfer: Option<HeatTransfer>,
    /// Mass of the wall [default: estimated from the volume, pressure and material].
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_mass)]
    wall_mass: Option<Mass>,
    /// Inner heat-transfer coefficient to use instead of the correlations (e.g. 500 W/m2K).
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_heat_coefficient)]
    inner_coefficient: Option<f64>,
    /// Write the transient's time series (t, p, gas and wall temperature) to this CSV file (`-`: to standard output, in place of the report).
    #[arg(long, value_name = "FILE")]
    csv: Option<std::path::PathBuf>,
}

#[derive(Debug, Args)]
pub(super) struct VentArgs {
    #[command(flatten)]
    pub(super) common: Common,
    /// Gas volume of the vessel.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = parse_vessel_volume)]
    volume: Volume,
    /// Starting pressure, gauge or absolute.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_pressure)]
    pressure: PressureReading,
    /// Orifice (vent or drain) diameter; may be left out with --within.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_length, required_unless_present = "within")]
    orifice: Option<Length>,
    /// Discharge coefficient, 0.1 to 1 (0.61 sharp-edged orifice, 0.97 rounded nozzle).
    #[arg(long, value_name = "X", allow_hyphen_values = true, default_value_t = vent::SHARP_EDGED_CD, value_parser = parse_cd)]
    cd: f64,
    /// Target pressure [default: ambient + 1 %].
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_pressure)]
    down_to: Option<PressureReading>,
    /// What the gas in the vessel does while venting.
    #[arg(long, value_enum, ignore_case = true, default_value = "isentropic")]
    process: Process,
    /// Starting gas temperature.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_temperature, default_value = "20 C")]
    temperature: ThermodynamicTemperature,
    /// Minimum design metal temperature (MDMT) from the rating plate.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_temperature)]
    min_metal_temperature: Option<ThermodynamicTemperature>,
    /// Report the orifice diameter that vents to the target within this time.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = parse_planned_time)]
    within: Option<Time>,
    #[command(flatten)]
    wall: WallArgs,
    /// Wall material, for the wall heat-transfer model.
    #[arg(long, value_enum, ignore_case = true, default_value = "carbon-steel")]
    material: Material,
    /// Design pressure (MAWP) from the rating plate, for the depressuring check and the wall estimate [default: the starting pressure].
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_pressure)]
    design_pressure: Option<PressureReading>,
    /// Check the time to reach the lower of a fraction of the design gauge pressure and a cap, against a limit (in the spirit of API 521).
    #[arg(long)]
    depressuring_check: bool,
    /// The depressuring check's fraction of the design gauge pressure.
    #[arg(long, value_name = "X", allow_hyphen_values = true, default_value_t = 0.5, value_parser = parse_fraction)]
    depressuring_fraction: f64,
    /// The depressuring check's cap on the gauge pressure to reach.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, default_value = "690 kPa", value_parser = parse_cap)]
    depressuring_cap: Pressure,
    /// Free volume of the room the gas is vented into (without it and without --outdoors:
    /// where the gas goes is not stated, and no room is computed).
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_volume)]
    room_volume: Option<Volume>,
    /// The gas is vented outdoors: no room is computed, and a NOTICE says to check where the
    /// outlet discharges.
    #[arg(long, conflicts_with_all = ["room_volume", "ventilation"])]
    outdoors: bool,
    /// The room's fresh air: air changes per hour ('2 /h'; '0 /h' a closed room) or a flow ('120 m3/h', '300 cfm') [default: 0 /h].
    #[arg(long, value_name = "Q", allow_hyphen_values = true, value_parser = units::parse_ventilation, requires = "room_volume")]
    ventilation: Option<Ventilation>,
    /// The depressuring check's time limit.
    #[arg(long, value_name = "Q", allow_hyphen_values = true, default_value = "15 min", value_parser = parse_limit)]
    depressuring_limit: Time,
}

pub(super) fn parse_gas(s: &str) -> Result<&'static Gas, String> {
    Gas::find(s).ok_or_else(|| format!("unknown gas '{s}'; accepted: {}", Gas::accepted_names()))
}

pub(super) fn parse_cd(s: &str) -> Result<f64, String> {
    let cd: f64 = s.trim().parse().map_err(|_| {
        format!(
            "'{s}' is not a number; accepted: a discharge coefficient from {} to 1, e.g. 0.61",
            limits::MIN_CD
        )
    })?;
    limits::cd(cd)?;
    Ok(cd)
}

/// A vessel's or cylinder's volume.
fn parse_vessel_volume(s: &str) -> Result<Volume, String> {
    let v = units::parse_volume(s)?;
    limits::volume(v)?;
    Ok(v)
}

/// A time a fill or vent-down is planned for (`--duration`, `--within`).
fn parse_planned_time(s: &str) -> Result<Time, String> {
    let t = units::parse_time(s)?;
    limits::planned_time(t)?;
    Ok(t)
}

/// A fill rate: a ramp or a mass flow, each in its range.
fn parse_fill_rate(s: &str) -> Result<units::RateReading, String> {
    let r = units::parse_rate(s)?;
    match r {
        units::RateReading::Pressure(p) => limits::ramp(p)?,
        units::RateReading::Mass(m) => limits::mass_flow(m)?,
    }
    Ok(r)
}

fn parse_fraction(s: &str) -> Result<f64, String> {
    let x: f64 = s.trim().parse().map_err(|_| {
        format!(
            "'{s}' is not a number; accepted: a fraction of the design gauge pressure, e.g. 0.5"
        )
    })?;
    limits::depressuring_fraction(x)?;
    Ok(x)
}

fn parse_cap(s: &str) -> Result<Pressure, String> {
    let p = units::parse_overpressure(s)?;
    limits::depressuring_cap(p)?;
    Ok(p)
}

fn parse_limit(s: &str) -> Result<Time, String> {
    let t = units::parse_time(s)?;
    limits::depressuring_limit(t)?;
    Ok(t)
}

/// The absolute ambient pressure from `--ambient-pressure` or `--elevation`.
pub(super) fn ambient(common: &Common) -> Result<Pressure, InputError> {
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
pub(super) fn absolute(
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

pub(super) fn render<R: serde::Serialize>(
    report: &R,
    json: bool,
    system: UnitSystem,
) -> Result<String, Failure>
where
    for<'a> &'a R: Into<Worksheet>,
{
    // Every result is checked for finiteness whichever the output: the ranges of the inputs
    // keep them finite, so a failure here is a defect (exit 1), never a printed NaN.
    let text = to_json(report).map_err(Failure::Internal)?;
    if json {
        Ok(text + "\n")
    } else {
        Ok(render_text(&report.into(), system))
    }
}

pub(super) fn energy_command(a: EnergyArgs) -> Result<String, Failure> {
    let (json, system) = (a.common.json, a.common.units);
    render(&energy_report(a)?, json, system)
}

/// The energy command's report, before it is printed.
pub(super) fn energy_report(a: EnergyArgs) -> Result<EnergyReport, Failure> {
    let model = super::gas_model(a.common.model, a.common.gas);
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
    let ask = EnergyAsk {
        work: match a.work {
            WorkKind::InService => Work::in_service(),
            WorkKind::PressureTest => Work::PressureTest,
        },
        before_opening: matches!(a.work, WorkKind::InService),
        vessel_mass: a.empty_mass,
    };
    Ok(assess::energy(model.as_ref(), &input, &ask)?)
}

pub(super) fn fill_command(a: FillArgs) -> Result<String, Failure> {
    let (json, system, csv) = (a.common.json, a.common.units, a.wall.csv.clone());
    let report = fill_report(a)?;
    if let (Some(path), Some(t)) = (&csv, &report.transient) {
        if let Some(csv) = write_csv(path, &t.samples)? {
            return Ok(csv);
        }
    }
    render(&report, json, system)
}

/// The fill command's report, before it is printed (or its time series written).
pub(super) fn fill_report(a: FillArgs) -> Result<FillReport, Failure> {
    let wall_options = a.wall.any()
        || a.inlet_diameter.is_some()
        || a.wrap_mass.is_some()
        || a.liner.is_some()
        || a.empty_mass.is_some();
    if a.rate.is_none() && a.duration.is_none() && wall_options {
        return Err(InputError::new(
            "rate",
            "(none)",
            "the wall options (--heat-transfer, --wall-mass, --empty-mass, --liner, --wrap-mass, --inner-coefficient, --inlet-diameter, --csv) act on a fill at a planned rate; accepted: give --rate or --duration",
        )
        .into());
    }
    let model = super::gas_model(a.common.model, a.common.gas);
    let pa = ambient(&a.common)?;
    let input = FillInput {
        volume: a.volume,
        from: absolute("from", a.from, pa)?,
        to: absolute("to", a.to, pa)?,
        initial_temperature: a.initial_temperature.unwrap_or(a.ambient_temperature),
        supply_temperature: a.supply_temperature.unwrap_or(a.ambient_temperature),
        supply_pressure: a
            .supply_pressure
            .map(|p| absolute("supply-pressure", p, pa))
            .transpose()?,
        ambient_temperature: a.ambient_temperature,
        rated_temperature: a.rated_temperature,
    };
    if let Some(supply) = input.supply_pressure.filter(|s| *s < input.to) {
        return Err(InputError::new(
            "supply-pressure",
            format!("{} bar(a)", fmt_sig(supply.get::<pascal>() / 1e5, 6)),
            format!(
                "is below the pressure the fill stops at (--to, {} bar(a)): a supply cannot fill a cylinder above its own pressure; accepted: a supply pressure at or above --to",
                fmt_sig(input.to.get::<pascal>() / 1e5, 5)
            ),
        )
        .into());
    }
    let rate = match (a.rate, a.duration) {
        (Some(units::RateReading::Pressure(r)), _) => Some(FillRate::Ramp(r)),
        (Some(units::RateReading::Mass(m)), _) => Some(FillRate::MassFlow(m)),
        (None, Some(d)) => {
            Some(FillRate::Ramp(units::PressureRate {
                // The pressure gained in one second of a steady ramp over `d`.
                per_second: (input.to - input.from) / d.get::<uom::si::time::second>(),
            }))
        }
        (None, None) => None,
    };
    let planned = rate
        .map(|rate| planned_fill(&a, &input, pa, rate))
        .transpose()?;
    // An error on a temperature left to default is the ambient temperature's.
    let report = assess::fill(
        model.as_ref(),
        &input,
        pa,
        planned.as_ref(),
        Governing::Model,
    )
    .map_err(|e| {
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
    Ok(report)
}

/// The planned-rate fill from the wall options, checked.
fn planned_fill(
    a: &FillArgs,
    input: &FillInput,
    pa: Pressure,
    rate: FillRate,
) -> Result<PlannedFill, InputError> {
    if a.construction != Construction::Composite {
        if let Some(m) = a.wrap_mass {
            return Err(InputError::new(
                "wrap-mass",
                format!("{} kg", m.get::<uom::si::mass::kilogram>()),
                "only a composite cylinder has a wrap; accepted: --wrap-mass with --construction composite",
            ));
        }
        if let Some(l) = a.liner {
            return Err(InputError::new(
                "liner",
                format!("{l:?}").to_lowercase(),
                "only a composite cylinder has a liner; accepted: --liner with --construction composite",
            ));
        }
    }
    for (field, m) in [("wrap-mass", a.wrap_mass), ("empty-mass", a.empty_mass)] {
        if let Some(m) = m {
            check_range(field, m.get::<uom::si::mass::kilogram>(), "kg", 0.0, 1e7)?;
        }
    }
    let known = match a.empty_mass {
        Some(m) => transient::CylinderMass::Empty(m),
        None => transient::CylinderMass::Layers(a.wall.wall_mass, a.wrap_mass),
    };
    let wall = Wall::cylinder(
        (a.construction, a.liner),
        input.volume,
        input.to - pa,
        known,
    );
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
    // A ramp from --duration: the rate the duration gives, in the ramp's range.
    if let (FillRate::Ramp(r), Some(d)) = (rate, a.duration) {
        limits::ramp(r).map_err(|problem| {
            InputError::new(
                "duration",
                format!("{} s", fmt_sig(d.get::<uom::si::time::second>(), 6)),
                format!(
                    "gives a ramp of {} bar/min, {problem}",
                    fmt_sig(r.per_second.get::<pascal>() * 60.0 / 1e5, 4)
                ),
            )
        })?;
    }
    Ok(PlannedFill {
        rate,
        inlet: a.inlet_diameter,
        exchange,
    })
}

/// The heat-transfer settings from the wall options, checked.
pub(super) fn exchange(
    w: &WallArgs,
    wall: Wall,
    ambient_temperature: ThermodynamicTemperature,
    aspect: f64,
) -> Result<transient::Exchange, InputError> {
    let kg = wall.mass.get::<uom::si::mass::kilogram>();
    if wall.estimated && kg <= 0.0 {
        return Err(InputError::new(
            "wall-mass",
            "(not given)",
            "the wall cannot be estimated: the estimate rests on the gauge pressure, which is zero here; accepted: give --wall-mass (or --empty-mass for a cylinder)",
        ));
    }
    if wall.estimated {
        check_range("wall-mass", kg, "kg", 0.0, 1e7).map_err(|e| InputError {
            value: format!("{} (estimated, not given)", e.value),
            problem: "the wall estimated from the volume, the design pressure and the material is outside the masses the model takes; accepted: give --wall-mass, above 0 and at most 10000000 kg".into(),
            ..e
        })?;
    }
    check_range("wall-mass", kg, "kg", 0.0, 1e7)?;
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

/// Refuses `value` outside (lo, hi], in `unit`.
pub(super) fn check_range(
    field: &str,
    value: f64,
    unit: &str,
    lo: f64,
    hi: f64,
) -> Result<(), InputError> {
    if value.is_finite() && value > lo && value <= hi {
        Ok(())
    } else {
        Err(InputError::new(
            field,
            format!("{} {unit}", compact(value)),
            format!(
                "outside the range accepted; accepted: above {} and at most {} {unit}",
                compact(lo),
                compact(hi)
            ),
        ))
    }
}

/// A number in few characters: as Rust prints it, or in exponent form where that is long.
pub(super) fn compact(x: f64) -> String {
    let plain = format!("{x}");
    if plain.len() <= 12 {
        plain
    } else {
        fmt_sig(x, 4)
    }
}

/// Writes a transient's samples as CSV, never over an existing file.
/// Writes the time series to `path` as CSV, never over an existing file; for `-`, returns
/// the CSV to print on standard output in place of the report.
pub(super) fn write_csv(
    path: &std::path::Path,
    samples: &[transient::Sample],
) -> Result<Option<String>, Failure> {
    use uom::si::thermodynamic_temperature::kelvin;
    // A composite cylinder's wrap node adds a column.
    let wrap = samples.iter().any(|s| s.wrap_temperature.is_some());
    let mut text = String::from("time_s,pressure_pa,gas_temperature_k,wall_temperature_k");
    text.push_str(if wrap { ",wrap_temperature_k\n" } else { "\n" });
    for s in samples {
        text.push_str(&format!(
            "{},{},{},{}",
            s.time.get::<uom::si::time::second>(),
            s.pressure.get::<pascal>(),
            s.gas_temperature.get::<kelvin>(),
            s.wall_temperature.get::<kelvin>()
        ));
        if let Some(t) = s.wrap_temperature.filter(|_| wrap) {
            text.push_str(&format!(",{}", t.get::<kelvin>()));
        }
        text.push('\n');
    }
    if path == std::path::Path::new("-") {
        return Ok(Some(text));
    }
    let written = record::write_one(path, text.as_bytes(), record::Mode::New);
    written.map(|_| None).map_err(|e| match e {
        record::RecordError::Exists(p) => Failure::Refused(format!(
            "{} already exists; the CSV is not written over an existing file: choose another --csv path",
            p.display()
        )),
        other => Failure::Internal(other.to_string()),
    })
}

pub(super) fn vent_command(a: VentArgs) -> Result<String, Failure> {
    let (json, system, csv) = (a.common.json, a.common.units, a.wall.csv.clone());
    let report = vent_report(a)?;
    // The time series exists only where the wall model ran, which the options decide.
    if let (Some(path), Some(t)) = (&csv, &report.transient) {
        if let Some(csv) = write_csv(path, &t.samples)? {
            return Ok(csv);
        }
    }
    render(&report, json, system)
}

/// The vent command's report, before it is printed (or its time series written).
pub(super) fn vent_report(a: VentArgs) -> Result<VentReport, Failure> {
    let model = super::gas_model(a.common.model, a.common.gas);
    let pa = ambient(&a.common)?;
    // `--down-to "0 barg"` means down to ambient: the vent's usual end just above it, since
    // the flow falls to nothing at ambient itself.
    let to_ambient = a.down_to.is_some_and(|r| r.to_absolute(pa) == pa);
    let down_to = match a.down_to {
        Some(r) if !to_ambient => absolute("down-to", r, pa)?,
        _ => pa * (1.0 + vent::DEFAULT_TARGET_MARGIN),
    };
    let start = absolute("pressure", a.pressure, pa)?;
    if a.down_to.is_some() && down_to >= start {
        return Err(InputError::new(
            "down-to",
            format!("{} bar(a)", fmt_sig(down_to.get::<pascal>() / 1e5, 6)),
            format!(
                "is not below the starting pressure (--pressure, {} bar(a)), so there is nothing to vent; accepted: a target below --pressure",
                fmt_sig(start.get::<pascal>() / 1e5, 5)
            ),
        )
        .into());
    }
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
    // A wall option given alone asks for the wall model: it is switched on, and said so.
    let switched_on = a.wall.heat_transfer.is_none()
        && !a.depressuring_check
        && (a.wall.any() || a.design_pressure.is_some());
    let given = a
        .design_pressure
        .map(|r| absolute("design-pressure", r, pa))
        .transpose()?;
    let wall = if a.wall.any() || a.design_pressure.is_some() || a.depressuring_check {
        let design = given.unwrap_or(input.pressure);
        let design_gauge = (design - pa).get::<pascal>().max(0.0);
        let wall = Wall::vessel(
            a.material,
            input.volume,
            Pressure::new::<pascal>(design_gauge),
            a.wall.wall_mass,
        );
        let mut wall_args = a.wall;
        wall_args.heat_transfer = Some(wall_args.heat_transfer.unwrap_or(HeatTransfer::Lumped));
        let exchange = exchange(&wall_args, wall, input.temperature, heat::VESSEL_ASPECT)?;
        let check = if a.depressuring_check {
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
        Some(WallVent { check, exchange })
    } else {
        None
    };
    let room = a
        .room_volume
        .map(|v| {
            check_range("room-volume", v.get::<cubic_meter>(), "m3", 0.1, 1.0e6)?;
            Ok::<_, InputError>(Room {
                volume: v,
                ventilation: a.ventilation.unwrap_or(Ventilation::AirChanges(0.0)),
                temperature: input.temperature,
                pressure: pa,
            })
        })
        .transpose()?;
    let mut report = assess::vent(
        model.as_ref(),
        &input,
        wall.as_ref(),
        match (&room, a.outdoors) {
            (Some(r), _) => Discharge::Room(r),
            (None, true) => Discharge::Outdoors,
            (None, false) => Discharge::Unstated,
        },
        Governing::Model,
    )?;
    if let (Some(t), Some(d)) = (a.within, report.required_orifice_m) {
        limits::required_orifice(d).map_err(|problem| {
            InputError::new(
                "within",
                format!("{} s", fmt_sig(t.get::<uom::si::time::second>(), 6)),
                problem,
            )
        })?;
    }
    report.inputs.design_pressure_pa = given.filter(|_| wall.is_some());
    if to_ambient {
        report.basis.push(crate::caution::Note::new(
            "vent target",
            "--down-to at ambient is read as down to ambient: the vent ends at ambient + 1 %, since the flow falls to nothing at ambient itself.",
        ));
    }
    if switched_on {
        report.basis.push(crate::caution::Note::new(
            "heat transfer",
            "A wall option was given, so the vent is also run with the wall model (--heat-transfer lumped).",
        ));
    }
    Ok(report)
}
