//! Parsing `number unit` strings into SI quantities.
//!
//! Every parser returns `Err(String)` with the problem and what is accepted; callers attach
//! the field name (see [`crate::InputError`]).

use crate::rules::room::Ventilation;
use uom::si::f64::{
    AvailableEnergy, Energy, Length, Mass, MassRate, Pressure, ThermodynamicTemperature, Time,
    Volume,
};
use uom::si::{
    available_energy::joule_per_kilogram, energy::joule, length::meter, mass::kilogram,
    mass_rate::kilogram_per_second, pressure::pascal, thermodynamic_temperature::kelvin,
    time::second, volume::cubic_meter,
};

use super::{J_PER_BTU, J_PER_CAL, J_PER_FT_LBF, KG_PER_LB, M3_PER_US_GAL, M_PER_FT, PA_PER_PSI};

/// A pressure as the user gave it: gauge (above the local atmosphere) or absolute.
///
/// Gauge readings become absolute only once the ambient pressure is known, which is why the
/// parser cannot do it: `--ambient-pressure` or `--elevation` may come later on the line.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum PressureReading {
    /// Above the local atmosphere (`barg`, `psig`, `kPa(g)`).
    Gauge(Pressure),
    /// Above vacuum (`bara`, `psia`, `kPa(a)`).
    Absolute(Pressure),
}

impl PressureReading {
    /// The absolute pressure, given the local atmospheric pressure.
    pub fn to_absolute(self, ambient: Pressure) -> Pressure {
        match self {
            PressureReading::Gauge(p) => p + ambient,
            PressureReading::Absolute(p) => p,
        }
    }

    /// Whether the reading was gauge.
    pub fn is_gauge(self) -> bool {
        matches!(self, PressureReading::Gauge(_))
    }
}

const PRESSURE_UNITS: &[(&str, f64)] = &[
    ("mbar", 100.0),
    ("bar", 1.0e5),
    ("mpa", 1.0e6),
    ("kpa", 1.0e3),
    ("hpa", 1.0e2),
    ("pa", 1.0),
    ("psi", PA_PER_PSI),
];

const PRESSURE_ACCEPTED: &str = "accepted: a number with Pa, kPa, MPa, mbar, bar or psi and g (gauge) or a (absolute), e.g. '10 barg', '10 bar(g)', '2.5 bara', '150 psig', '101.3 kPa(a)', '0.8 MPa(g)'";

/// Parses a pressure that must say gauge or absolute: `10 barg`, `10 bar(g)`, `2.5 bara`,
/// `150 psig`, `0.8 MPa(g)`, `101.3 kPa(a)`.
///
/// A bare `bar`, `psi`, `kPa` or `MPa` is refused: mixing gauge and absolute is the classic
/// error in this work (a 1 bar slip at 2 barg is a 33 % error in absolute pressure).
pub fn parse_pressure(text: &str) -> Result<PressureReading, String> {
    let (value, unit) = split(text)?;
    let norm = normalise(unit);
    for &(base, factor) in PRESSURE_UNITS {
        let Some(rest) = norm.strip_prefix(base) else {
            continue;
        };
        let p = Pressure::new::<pascal>(scaled(text, value * factor)?);
        return match rest {
            "g" | "(g)" | "gauge" | "(gauge)" => Ok(PressureReading::Gauge(p)),
            "a" | "(a)" | "abs" | "(abs)" | "absolute" | "(absolute)" => {
                Ok(PressureReading::Absolute(p))
            }
            "" => Err(format!(
                "a pressure must say gauge or absolute, and '{unit}' says neither (mixing the two is the classic error in this work); accepted: '{v} {u}g' or '{v} {u}(g)' for gauge (above atmosphere), '{v} {u}a' or '{v} {u}(a)' for absolute (above vacuum)",
                v = trim_number(text),
                u = unit.trim()
            )),
            _ => Err(format!("unknown pressure unit '{unit}'; {PRESSURE_ACCEPTED}")),
        };
    }
    Err(unknown_unit(unit, "a pressure", PRESSURE_ACCEPTED))
}

/// Parses an overpressure (a pressure difference above ambient, as of a blast wave):
/// `6.9 kPa`, `1 psi`. Gauge spellings are accepted too; absolute ones are refused, since an
/// overpressure is a difference.
pub fn parse_overpressure(text: &str) -> Result<Pressure, String> {
    let (value, unit) = split(text)?;
    let norm = normalise(unit);
    for &(base, factor) in PRESSURE_UNITS {
        let Some(rest) = norm.strip_prefix(base) else {
            continue;
        };
        return match rest {
            "" | "g" | "(g)" => Ok(Pressure::new::<pascal>(scaled(text, value * factor)?)),
            "a" | "(a)" | "abs" | "(abs)" => Err(format!(
                "an overpressure is a difference above ambient, not an absolute pressure; accepted: the same without the absolute mark, e.g. '{} {}'",
                trim_number(text),
                base_spelling(base)
            )),
            _ => Err(unknown_unit(unit, "an overpressure", "accepted: Pa, kPa, MPa, mbar, bar or psi, e.g. '6.9 kPa', '1 psi'")),
        };
    }
    Err(unknown_unit(
        unit,
        "an overpressure",
        "accepted: Pa, kPa, MPa, mbar, bar or psi, e.g. '6.9 kPa', '1 psi'",
    ))
}

/// Parses a volume: `2 m3`, `500 L`, `1.5 ft3`, `20 gal` (US gallons).
pub fn parse_volume(text: &str) -> Result<Volume, String> {
    const UNITS: &[(&[&str], f64)] = &[
        (&["m3", "cum"], 1.0),
        (&["l", "litre", "litres", "liter", "liters"], 1.0e-3),
        (&["ml"], 1.0e-6),
        (&["cm3", "cc"], 1.0e-6),
        (&["ft3", "cuft", "cf"], M_PER_FT * M_PER_FT * M_PER_FT),
        (&["in3", "cuin"], 1.6387064e-5),
        (&["gal", "usgal", "gallon", "gallons"], M3_PER_US_GAL),
    ];
    let f = lookup(
        text,
        UNITS,
        "a volume",
        "accepted: m3, L, mL, cm3, ft3, in3 or gal (US), e.g. '2 m3', '500 L', '1.5 ft3', '20 gal'",
    )?;
    Ok(Volume::new::<cubic_meter>(f))
}

/// Parses a length: `10 mm`, `0.5 in`, `30 m`, `100 ft`.
pub fn parse_length(text: &str) -> Result<Length, String> {
    const UNITS: &[(&[&str], f64)] = &[
        (&["m", "metre", "metres", "meter", "meters"], 1.0),
        (&["mm"], 1.0e-3),
        (&["cm"], 1.0e-2),
        (&["km"], 1.0e3),
        (&["in", "inch", "inches", "\""], 0.0254),
        (&["ft", "foot", "feet", "'"], M_PER_FT),
    ];
    let f = lookup(
        text,
        UNITS,
        "a length",
        "accepted: mm, cm, m, km, in or ft, e.g. '10 mm', '0.5 in', '1/2 in', '300 ft'",
    )?;
    Ok(Length::new::<meter>(f))
}

/// Parses an energy: `1 MJ`, `500 kJ`, `1e6 ft-lbf`, `2 kWh`, `1000 BTU`.
pub fn parse_energy(text: &str) -> Result<Energy, String> {
    const UNITS: &[(&[&str], f64)] = &[
        (&["j"], 1.0),
        (&["kj"], 1.0e3),
        (&["mj"], 1.0e6),
        (&["gj"], 1.0e9),
        (&["wh"], 3.6e3),
        (&["kwh"], 3.6e6),
        (
            &["ftlbf", "ft-lbf", "ft·lbf", "ft.lbf", "ftlb", "ft-lb"],
            J_PER_FT_LBF,
        ),
        (&["btu"], J_PER_BTU),
    ];
    let f = lookup(
        text,
        UNITS,
        "an energy",
        "accepted: J, kJ, MJ, GJ, Wh, kWh, ft-lbf or BTU, e.g. '1 MJ', '7.4e5 ft-lbf'",
    )?;
    Ok(Energy::new::<joule>(f))
}

/// Parses an energy per mass, as the TNT energy: `4.184 MJ/kg`, `1000 cal/g`, `1800 BTU/lb`.
pub fn parse_specific_energy(text: &str) -> Result<AvailableEnergy, String> {
    const UNITS: &[(&[&str], f64)] = &[
        (&["j/kg"], 1.0),
        (&["kj/kg", "j/g"], 1.0e3),
        (&["mj/kg", "kj/g"], 1.0e6),
        (&["cal/g", "kcal/kg"], J_PER_CAL * 1.0e3),
        (&["btu/lb"], J_PER_BTU / KG_PER_LB),
    ];
    let f = lookup(
        text,
        UNITS,
        "an energy per mass",
        "accepted: J/kg, kJ/kg, MJ/kg, cal/g or BTU/lb, e.g. '4.184 MJ/kg', '1000 cal/g'",
    )?;
    Ok(AvailableEnergy::new::<joule_per_kilogram>(f))
}

/// Parses a mass: `520 kg`, `1150 lb`, `1.2 t`.
pub fn parse_mass(text: &str) -> Result<Mass, String> {
    const UNITS: &[(&[&str], f64)] = &[
        (&["kg"], 1.0),
        (&["g"], 1.0e-3),
        (&["t", "tonne", "tonnes"], 1.0e3),
        (&["lb", "lbs", "lbm"], KG_PER_LB),
    ];
    let f = lookup(
        text,
        UNITS,
        "a mass",
        "accepted: g, kg, t or lb, e.g. '520 kg', '1150 lb'",
    )?;
    Ok(Mass::new::<kilogram>(f))
}

/// A rate of pressure change, as a fill rate: the pressure gained per second.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
#[serde(transparent)]
pub struct PressureRate {
    /// Pressure change in one second.
    pub per_second: Pressure,
}

/// Parses a rate of pressure change: `25 bar/min`, `400 psi/min`, `0.5 MPa/min`, `2 bar/s`.
/// A rate is a difference, so it needs no gauge or absolute mark.
pub fn parse_pressure_rate(text: &str) -> Result<PressureRate, String> {
    const ACCEPTED: &str =
        "accepted: Pa, kPa, MPa, bar or psi per s, min or h, e.g. '25 bar/min', '400 psi/min'";
    let (value, unit) = split(text)?;
    let norm = normalise(unit);
    let Some((pressure, time)) = norm.split_once('/') else {
        return Err(unknown_unit(unit, "a pressure rate", ACCEPTED));
    };
    let per = match time {
        "s" | "sec" => 1.0,
        "min" => 60.0,
        "h" | "hr" => 3600.0,
        _ => return Err(unknown_unit(unit, "a pressure rate", ACCEPTED)),
    };
    let factor = PRESSURE_UNITS
        .iter()
        .find(|(base, _)| *base == pressure)
        .map(|&(_, f)| f)
        .ok_or_else(|| unknown_unit(unit, "a pressure rate", ACCEPTED))?;
    Ok(PressureRate {
        per_second: Pressure::new::<pascal>(scaled(text, value * factor / per)?),
    })
}

/// A fill rate as given: a pressure ramp or a mass flow.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum RateReading {
    /// `25 bar/min`, `400 psi/min`.
    Pressure(PressureRate),
    /// `2 kg/min`, `5 g/s`, `10 lb/min`.
    Mass(MassRate),
}

/// Parses a fill rate: a pressure ramp (`25 bar/min`, `400 psi/min`) or a mass flow
/// (`2 kg/min`, `5 g/s`, `10 lb/min`).
pub fn parse_rate(text: &str) -> Result<RateReading, String> {
    if let Ok(r) = parse_pressure_rate(text) {
        return Ok(RateReading::Pressure(r));
    }
    const UNITS: &[(&[&str], f64)] = &[
        (&["kg/s"], 1.0),
        (&["kg/min"], 1.0 / 60.0),
        (&["kg/h", "kg/hr"], 1.0 / 3600.0),
        (&["g/s"], 1.0e-3),
        (&["g/min"], 1.0e-3 / 60.0),
        (&["lb/s"], KG_PER_LB),
        (&["lb/min"], KG_PER_LB / 60.0),
        (&["lb/h", "lb/hr"], KG_PER_LB / 3600.0),
    ];
    let f = lookup(text, UNITS, "a fill rate", "accepted: a pressure ramp such as '25 bar/min' or '400 psi/min', or a mass flow such as '2 kg/min' or '5 g/s'")?;
    Ok(RateReading::Mass(MassRate::new::<kilogram_per_second>(f)))
}

/// Parses a heat-transfer coefficient: `500 W/m2K`, `88 BTU/(h ft2 F)`.
pub fn parse_heat_coefficient(text: &str) -> Result<f64, String> {
    const UNITS: &[(&[&str], f64)] = &[
        (
            &[
                "w/m2k",
                "w/(m2k)",
                "w/m2/k",
                "w/(m2·k)",
                "w/m²k",
                "w/(m²·k)",
                "w/(m²k)",
            ],
            1.0,
        ),
        (&["btu/(hft2f)", "btu/hft2f", "btu/h/ft2/f"], 5.678_263_34),
    ];
    lookup(
        text,
        UNITS,
        "a heat-transfer coefficient",
        "accepted: W/m2K or BTU/(h ft2 F), e.g. '500 W/m2K'",
    )
}

/// Parses a room's ventilation: air changes per hour (`2 /h`, `2 ACH`, `0 /h` for a
/// closed room) or a fresh-air flow (`120 m3/h`, `2 m3/min`, `50 L/s`, `300 cfm`).
pub fn parse_ventilation(text: &str) -> Result<Ventilation, String> {
    const CHANGES: &[(&[&str], f64)] = &[(&["/h", "/hr", "ach", "1/h", "perhour"], 1.0)];
    const FLOWS: &[(&[&str], f64)] = &[
        (&["m3/s"], 1.0),
        (&["m3/min"], 1.0 / 60.0),
        (&["m3/h", "m3/hr"], 1.0 / 3600.0),
        (&["l/s"], 1.0e-3),
        (&["l/min"], 1.0e-3 / 60.0),
        (&["cfm", "ft3/min"], 0.028_316_846_592 / 60.0),
    ];
    const ACCEPTED: &str = "accepted: air changes per hour such as '2 /h' or '2 ACH' ('0 /h' for a closed room), or a fresh-air flow such as '120 m3/h', '50 L/s' or '300 cfm'";
    let reading = lookup(text, CHANGES, "a ventilation rate", ACCEPTED)
        .map(Ventilation::AirChanges)
        .or_else(|_| lookup(text, FLOWS, "a ventilation rate", ACCEPTED).map(Ventilation::Flow))?;
    let (Ventilation::AirChanges(x) | Ventilation::Flow(x)) = reading;
    if x < 0.0 {
        return Err(format!("'{}' is negative; {ACCEPTED}", text.trim()));
    }
    Ok(reading)
}

/// Parses a duration: `90 s`, `15 min`, `2 h`.
pub fn parse_time(text: &str) -> Result<Time, String> {
    const UNITS: &[(&[&str], f64)] = &[
        (&["s", "sec", "secs", "second", "seconds"], 1.0),
        (&["min", "mins", "minute", "minutes"], 60.0),
        (&["h", "hr", "hrs", "hour", "hours"], 3600.0),
    ];
    let f = lookup(
        text,
        UNITS,
        "a duration",
        "accepted: s, min or h, e.g. '90 s', '15 min'",
    )?;
    Ok(Time::new::<second>(f))
}

/// Parses a temperature: `20 C`, `20 °C`, `68 F`, `293.15 K`, `528 R` (Rankine).
///
/// Below absolute zero is refused here, since no later check could make sense of it.
pub fn parse_temperature(text: &str) -> Result<ThermodynamicTemperature, String> {
    let (value, unit) = split(text)?;
    let norm = normalise(unit);
    let norm = norm.trim_start_matches("deg").trim_start_matches('°');
    let kelvin_value = match norm {
        "c" | "celsius" => value + 273.15,
        "f" | "fahrenheit" => (value + 459.67) * 5.0 / 9.0,
        "k" | "kelvin" => value,
        "r" | "rankine" => value * 5.0 / 9.0,
        _ => {
            return Err(unknown_unit(
                unit,
                "a temperature",
                "accepted: C, F, K or R, e.g. '20 C', '68 F', '293.15 K'",
            ))
        }
    };
    let kelvin_value = scaled(text, kelvin_value)?;
    if kelvin_value <= 0.0 {
        return Err(format!(
            "{} is at or below absolute zero (0 K = -273.15 C = -459.67 F); accepted: a temperature above absolute zero",
            text.trim()
        ));
    }
    Ok(ThermodynamicTemperature::new::<kelvin>(kelvin_value))
}

/// Looks the unit of `text` up in `units` and returns the value in SI.
fn lookup(text: &str, units: &[(&[&str], f64)], kind: &str, accepted: &str) -> Result<f64, String> {
    let (value, unit) = split(text)?;
    let norm = normalise(unit);
    let factor = units
        .iter()
        .find(|(names, _)| names.contains(&norm.as_str()))
        .map(|&(_, factor)| factor)
        .ok_or_else(|| unknown_unit(unit, kind, accepted))?;
    scaled(text, value * factor)
}

/// A value in SI, refused if the unit's factor took it past the largest finite number.
fn scaled(text: &str, si: f64) -> Result<f64, String> {
    if si.is_finite() {
        Ok(si)
    } else {
        Err(format!(
            "'{}' is too large to be a physical value; accepted: a finite number with its unit",
            text.trim()
        ))
    }
}

/// Splits `text` into a finite number and the unit that follows it.
fn split(text: &str) -> Result<(f64, &str), String> {
    let t = text.trim();
    let end = number_prefix_len(t);
    if end == 0 {
        return Err(format!(
            "'{t}' does not start with a number; accepted: a number followed by a unit, e.g. '10 barg'"
        ));
    }
    let (number, unit) = t.split_at(end);
    let mut value: f64 = number.parse().map_err(|_| {
        format!(
            "'{number}' is not a number; accepted: a number followed by its unit, e.g. '10 barg'"
        )
    })?;
    // A fraction, as valves and fittings are named: `1/2 in`, or a mixed number `1 1/2 in`.
    let whole = number.bytes().all(|b| b.is_ascii_digit());
    let (value, unit) = if let (true, Some(rest)) = (whole, unit.strip_prefix('/')) {
        let (denominator, rest) = fraction_part(t, rest)?;
        value /= denominator;
        (value, rest)
    } else if let (true, Some((numerator, rest))) = (whole, leading_fraction(unit)) {
        let (denominator, rest) = fraction_part(t, rest)?;
        value += numerator / denominator;
        (value, rest)
    } else {
        (value, unit)
    };
    if !value.is_finite() {
        return Err(format!(
            "'{number}' is too large to be a physical value; accepted: a finite number with its unit"
        ));
    }
    if unit.trim().is_empty() {
        return Err(format!(
            "'{t}' has no unit, and every quantity needs one; accepted: a number followed by its unit, e.g. '10 barg', '2 m3', '20 C'"
        ));
    }
    Ok((value, unit.trim()))
}

/// The denominator at the start of `rest` (digits after a `/`) and what follows it; `text` is
/// the whole value, for the message.
fn fraction_part<'a>(text: &str, rest: &'a str) -> Result<(f64, &'a str), String> {
    let digits = rest.bytes().take_while(u8::is_ascii_digit).count();
    let denominator: f64 = rest[..digits].parse().unwrap_or(0.0);
    if denominator == 0.0 {
        return Err(format!(
            "'{text}' has a fraction without a whole denominator above zero; accepted: e.g. '1/2 in', '1 1/4 in', '0.5 in'"
        ));
    }
    Ok((denominator, &rest[digits..]))
}

/// `a/` at the start of `unit` after spaces (the fraction of a mixed number, `1 1/2 in`):
/// the numerator and what follows the slash.
fn leading_fraction(unit: &str) -> Option<(f64, &str)> {
    let u = unit.trim_start();
    if u.len() == unit.len() {
        return None;
    }
    let digits = u.bytes().take_while(u8::is_ascii_digit).count();
    let rest = u[digits..].strip_prefix('/')?;
    Some((u[..digits].parse().ok()?, rest))
}

/// The length of the decimal number at the start of `s` (sign, digits, point, exponent).
fn number_prefix_len(s: &str) -> usize {
    let b = s.as_bytes();
    let mut i = 0;
    if i < b.len() && (b[i] == b'+' || b[i] == b'-') {
        i += 1;
    }
    let digits_start = i;
    while i < b.len() && b[i].is_ascii_digit() {
        i += 1;
    }
    if i < b.len() && b[i] == b'.' {
        i += 1;
        while i < b.len() && b[i].is_ascii_digit() {
            i += 1;
        }
    }
    let mantissa = &s[digits_start..i];
    if mantissa.is_empty() || mantissa == "." {
        return 0;
    }
    // An exponent only counts when digits follow it: `2e` is not a number, and the `e` of
    // a unit is not an exponent.
    if i < b.len() && (b[i] == b'e' || b[i] == b'E') {
        let mut j = i + 1;
        if j < b.len() && (b[j] == b'+' || b[j] == b'-') {
            j += 1;
        }
        let exp_digits = j;
        while j < b.len() && b[j].is_ascii_digit() {
            j += 1;
        }
        if j > exp_digits {
            i = j;
        }
    }
    i
}

/// Lower case, no spaces, superscript three and the degree sign spelled plainly.
fn normalise(unit: &str) -> String {
    unit.chars()
        .filter(|c| !c.is_whitespace())
        .map(|c| match c {
            '³' => '3',
            'º' => '°',
            _ => c,
        })
        .collect::<String>()
        .to_lowercase()
}

fn trim_number(text: &str) -> &str {
    let t = text.trim();
    t[..number_prefix_len(t)].trim()
}

fn base_spelling(base: &str) -> &'static str {
    match base {
        "mbar" => "mbar",
        "bar" => "bar",
        "mpa" => "MPa",
        "kpa" => "kPa",
        "hpa" => "hPa",
        "psi" => "psi",
        _ => "Pa",
    }
}

fn unknown_unit(unit: &str, kind: &str, accepted: &str) -> String {
    format!("'{unit}' is not a unit of {kind}; {accepted}")
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    fn pa(r: PressureReading) -> (bool, f64) {
        match r {
            PressureReading::Gauge(p) => (true, p.get::<pascal>()),
            PressureReading::Absolute(p) => (false, p.get::<pascal>()),
        }
    }

    #[test]
    fn fractions_are_read_as_valves_are_named() {
        let mm = |t: &str| parse_length(t).map(|l| l.get::<uom::si::length::millimeter>());
        assert_relative_eq!(mm("1/2 in").unwrap(), 12.7, max_relative = 1e-12);
        assert_relative_eq!(mm("1/4\"").unwrap(), 6.35, max_relative = 1e-12);
        assert_relative_eq!(mm("3/8 in").unwrap(), 9.525, max_relative = 1e-12);
        assert_relative_eq!(mm("1 1/2 in").unwrap(), 38.1, max_relative = 1e-12);
        assert_relative_eq!(mm("12 mm").unwrap(), 12.0, max_relative = 1e-12);
        for bad in ["1/0 in", "1/ in", "1.5/2 in", "1 1/0 in"] {
            assert!(mm(bad).is_err(), "{bad}");
        }
    }

    #[test]
    fn pressure_spellings_say_gauge_or_absolute() {
        assert_eq!(pa(parse_pressure("10 barg").unwrap()), (true, 1.0e6));
        assert_eq!(pa(parse_pressure("10barg").unwrap()), (true, 1.0e6));
        assert_eq!(pa(parse_pressure("10 bar(g)").unwrap()), (true, 1.0e6));
        assert_eq!(pa(parse_pressure("2.5 BARA").unwrap()), (false, 2.5e5));
        assert_eq!(pa(parse_pressure("0.8 MPa(g)").unwrap()), (true, 0.8e6));
        assert_eq!(
            pa(parse_pressure("101.3 kPa(a)").unwrap()),
            (false, 101.3e3)
        );
        assert_eq!(pa(parse_pressure("500 mbara").unwrap()), (false, 5.0e4));
        // 1 psi = 6894.757293168 Pa exactly (NIST SP 811, appendix B.8).
        let (g, v) = pa(parse_pressure("150 psig").unwrap());
        assert!(g);
        assert_relative_eq!(v, 150.0 * 6894.757293168, max_relative = 1e-12);
    }

    #[test]
    fn bare_pressure_units_are_refused_with_both_spellings() {
        for bare in ["10 bar", "150 psi", "100 kPa", "1 MPa", "5 Pa"] {
            let e = parse_pressure(bare).unwrap_err();
            assert!(e.contains("gauge or absolute"), "{bare}: {e}");
        }
        let e = parse_pressure("10 bar").unwrap_err();
        assert!(e.contains("10 barg") && e.contains("10 bara"), "{e}");
    }

    #[test]
    fn numbers_must_be_finite_and_carry_units() {
        assert!(parse_volume("1e400 m3").unwrap_err().contains("too large"));
        assert!(parse_volume("nan m3").unwrap_err().contains("number"));
        assert!(parse_volume("inf m3").unwrap_err().contains("number"));
        assert!(parse_volume("2").unwrap_err().contains("no unit"));
        assert!(parse_volume("two m3").unwrap_err().contains("number"));
        assert!(parse_volume("2 barg")
            .unwrap_err()
            .contains("not a unit of a volume"));
    }

    #[test]
    fn volumes_lengths_and_times_convert_exactly() {
        assert_relative_eq!(parse_volume("500 L").unwrap().get::<cubic_meter>(), 0.5);
        assert_relative_eq!(parse_volume("2 m³").unwrap().get::<cubic_meter>(), 2.0);
        // 1 ft = 0.3048 m and 1 US gal = 231 in³ = 3.785411784 L, both exact by definition.
        assert_relative_eq!(
            parse_volume("1.5 ft3").unwrap().get::<cubic_meter>(),
            1.5 * 0.028316846592,
            max_relative = 1e-12
        );
        assert_relative_eq!(
            parse_volume("20 gal").unwrap().get::<cubic_meter>(),
            0.07570823568,
            max_relative = 1e-12
        );
        assert_relative_eq!(parse_length("0.5 in").unwrap().get::<meter>(), 0.0127);
        assert_relative_eq!(parse_length("10mm").unwrap().get::<meter>(), 0.01);
        assert_relative_eq!(parse_time("15 min").unwrap().get::<second>(), 900.0);
    }

    #[test]
    fn temperatures_in_every_scale() {
        let k = |s| parse_temperature(s).unwrap().get::<kelvin>();
        assert_relative_eq!(k("20 C"), 293.15, max_relative = 1e-12);
        assert_relative_eq!(k("20 °C"), 293.15, max_relative = 1e-12);
        assert_relative_eq!(k("68 F"), 293.15, max_relative = 1e-12);
        assert_relative_eq!(k("293.15 K"), 293.15);
        assert_relative_eq!(k("-40 F"), k("-40 C"), max_relative = 1e-12);
        assert!(parse_temperature("-300 C")
            .unwrap_err()
            .contains("absolute zero"));
        assert!(parse_temperature("0 K")
            .unwrap_err()
            .contains("absolute zero"));
    }

    #[test]
    fn energies_and_tnt_constants() {
        assert_relative_eq!(parse_energy("1.5 MJ").unwrap().get::<joule>(), 1.5e6);
        // 1000 cal/g (thermochemical calorie) is the TNT convention, 4.184 MJ/kg.
        assert_relative_eq!(
            parse_specific_energy("1000 cal/g")
                .unwrap()
                .get::<joule_per_kilogram>(),
            4.184e6,
            max_relative = 1e-12
        );
    }

    #[test]
    fn pressure_rates_and_masses() {
        let r = parse_pressure_rate("25 bar/min").unwrap();
        assert_relative_eq!(r.per_second.get::<pascal>(), 25.0e5 / 60.0);
        let r = parse_pressure_rate("400 psi/min").unwrap();
        assert_relative_eq!(
            r.per_second.get::<pascal>(),
            400.0 * 6894.757293168 / 60.0,
            max_relative = 1e-12
        );
        assert!(parse_pressure_rate("25 barg/min").is_err());
        assert_relative_eq!(
            parse_mass("1150 lb").unwrap().get::<kilogram>(),
            1150.0 * 0.45359237
        );
    }

    #[test]
    fn fill_rates_and_coefficients() {
        assert!(matches!(
            parse_rate("25 bar/min").unwrap(),
            RateReading::Pressure(_)
        ));
        match parse_rate("2 kg/min").unwrap() {
            RateReading::Mass(m) => assert_relative_eq!(m.get::<kilogram_per_second>(), 2.0 / 60.0),
            other => panic!("{other:?}"),
        }
        assert!(parse_rate("2 L/min").is_err());
        assert_relative_eq!(parse_heat_coefficient("500 W/m2K").unwrap(), 500.0);
    }

    #[test]
    fn overpressure_needs_no_gauge_mark_but_refuses_absolute() {
        assert_relative_eq!(
            parse_overpressure("6.9 kPa").unwrap().get::<pascal>(),
            6900.0
        );
        assert_relative_eq!(
            parse_overpressure("1 psi").unwrap().get::<pascal>(),
            6894.757293168,
            max_relative = 1e-12
        );
        assert!(parse_overpressure("7 kPa(a)").is_err());
    }
}
