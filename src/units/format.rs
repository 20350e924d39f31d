//! Formatting quantities for people: the user's unit system first, the other alongside.

use uom::si::f64::{
    AvailableEnergy, Energy, Length, Mass, MassRate, Pressure, ThermodynamicTemperature, Time,
    Velocity, Volume, VolumeRate,
};
use uom::si::{
    available_energy::joule_per_kilogram, energy::joule, length::meter, mass::kilogram,
    mass_rate::kilogram_per_second, pressure::pascal, thermodynamic_temperature::kelvin,
    time::second, velocity::meter_per_second, volume::cubic_meter,
    volume_rate::cubic_meter_per_second,
};

use super::{J_PER_FT_LBF, KG_PER_LB, M3_PER_US_GAL, M_PER_FT, PA_PER_PSI};

/// What an axis measures; the renderer picks the unit from the document's unit system.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum AxisKind {
    /// Time, SI seconds.
    Time,
    /// Pressure, SI pascals absolute (shown gauge).
    Pressure,
    /// Temperature, SI kelvin.
    Temperature,
    /// A mole or volume fraction, shown in percent.
    Fraction,
}

/// A fraction as a percentage to three significant figures: `17.3 %`.
pub fn percent(x: f64) -> String {
    format!("{} %", fmt_sig(x * 100.0, 3))
}

/// A value to show a person (on a worksheet or in a caution), typed so that each renderer chooses its own units.
#[derive(Debug, Clone, PartialEq)]
pub enum Value {
    /// A vessel pressure (absolute inside; shown gauge and absolute).
    Pressure(Pressure),
    /// An absolute pressure shown only as absolute (ambient).
    AbsolutePressure(Pressure),
    /// A pressure difference (blast overpressure).
    Overpressure(Pressure),
    /// A temperature.
    Temperature(ThermodynamicTemperature),
    /// A volume.
    Volume(Volume),
    /// An energy.
    Energy(Energy),
    /// An energy per mass.
    SpecificEnergy(AvailableEnergy),
    /// A mass.
    Mass(Mass),
    /// A distance.
    Distance(Length),
    /// A small length (orifice).
    Diameter(Length),
    /// A duration.
    Time(Time),
    /// A mass flow.
    MassFlow(MassRate),
    /// A volume flow (a room's fresh air).
    VolumeFlow(VolumeRate),
    /// A rate of pressure change, as the pressure gained in one second.
    PressureRate(Pressure),
    /// A speed (a fragment's).
    Speed(Velocity),
    /// A mole or volume fraction (0–1), shown as a percentage.
    Fraction(f64),
    /// A plain number with its meaning.
    Number(f64),
    /// Text.
    Text(String),
}

impl Value {
    /// The value in SI with its unit's name (pressures absolute, in Pa), or `None` for a
    /// number or text.
    pub fn si(&self) -> Option<(f64, &'static str)> {
        Some(match self {
            Value::Pressure(p) | Value::AbsolutePressure(p) => (p.get::<pascal>(), "Pa(a)"),
            Value::Overpressure(p) => (p.get::<pascal>(), "Pa"),
            Value::Temperature(t) => (t.get::<kelvin>(), "K"),
            Value::Volume(v) => (v.get::<cubic_meter>(), "m3"),
            Value::Energy(e) => (e.get::<joule>(), "J"),
            Value::SpecificEnergy(e) => (e.get::<joule_per_kilogram>(), "J/kg"),
            Value::Mass(m) => (m.get::<kilogram>(), "kg"),
            Value::Distance(l) | Value::Diameter(l) => (l.get::<meter>(), "m"),
            Value::Time(t) => (t.get::<second>(), "s"),
            Value::MassFlow(m) => (m.get::<kilogram_per_second>(), "kg/s"),
            Value::VolumeFlow(q) => (q.get::<cubic_meter_per_second>(), "m3/s"),
            Value::PressureRate(p) => (p.get::<pascal>(), "Pa/s"),
            Value::Speed(v) => (v.get::<meter_per_second>(), "m/s"),
            Value::Fraction(x) => (*x, "1"),
            Value::Number(_) | Value::Text(_) => return None,
        })
    }
}

/// The unit system a person reads results in.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, clap::ValueEnum, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum UnitSystem {
    /// bar, m, m³, kg, °C, MJ.
    #[default]
    Si,
    /// psi, ft, ft³, lb, °F, ft·lbf.
    Us,
}

/// Formats `x` with `sig` significant figures, without exponent for everyday magnitudes.
pub fn fmt_sig(x: f64, sig: usize) -> String {
    if !x.is_finite() {
        return "(not a finite number)".to_string();
    }
    if x == 0.0 {
        return "0".to_string();
    }
    let magnitude = x.abs().log10().floor() as i32;
    if !(-4..=9).contains(&magnitude) {
        return format!("{:.*e}", sig.saturating_sub(1), x);
    }
    let decimals = (sig as i32 - 1 - magnitude).max(0) as usize;
    format!("{:.*}", decimals, x)
}

/// Formats quantities in a unit system, with the other system in brackets where it helps.
#[derive(Debug, Clone, Copy)]
pub struct Display {
    /// The system shown first.
    pub system: UnitSystem,
    /// The local atmospheric pressure, for gauge readings.
    pub ambient: Pressure,
}

impl Display {
    fn pair(&self, si: String, us: String) -> String {
        match self.system {
            UnitSystem::Si => format!("{si} ({us})"),
            UnitSystem::Us => format!("{us} ({si})"),
        }
    }

    /// A pressure as gauge and absolute: `10.00 barg = 11.01 bara (145.0 psig)`.
    pub fn pressure(&self, p: Pressure) -> String {
        let pa = p.get::<pascal>();
        let g = pa - self.ambient.get::<pascal>();
        let si = format!(
            "{} barg, {} bara",
            fmt_sig(g / 1e5, 4),
            fmt_sig(pa / 1e5, 4)
        );
        let us = format!(
            "{} psig, {} psia",
            fmt_sig(g / PA_PER_PSI, 4),
            fmt_sig(pa / PA_PER_PSI, 4)
        );
        self.pair(si, us)
    }

    /// An absolute pressure only (ambient itself, for instance).
    pub fn absolute_pressure(&self, p: Pressure) -> String {
        let pa = p.get::<pascal>();
        self.pair(
            format!("{} kPa(a)", fmt_sig(pa / 1e3, 5)),
            format!("{} psia", fmt_sig(pa / PA_PER_PSI, 4)),
        )
    }

    /// A pressure difference, such as a blast overpressure.
    pub fn overpressure(&self, p: Pressure) -> String {
        let pa = p.get::<pascal>();
        self.pair(
            format!("{} kPa", fmt_sig(pa / 1e3, 3)),
            format!("{} psi", fmt_sig(pa / PA_PER_PSI, 3)),
        )
    }

    /// A temperature in °C or °F with kelvin.
    pub fn temperature(&self, t: ThermodynamicTemperature) -> String {
        let k = t.get::<kelvin>();
        let c = k - 273.15;
        let f = c * 9.0 / 5.0 + 32.0;
        match self.system {
            UnitSystem::Si => format!("{:.1} °C ({:.2} K, {:.1} °F)", c, k, f),
            UnitSystem::Us => format!("{:.1} °F ({:.1} °C, {:.2} K)", f, c, k),
        }
    }

    /// A volume in m³ and L, or ft³ and US gal.
    pub fn volume(&self, v: Volume) -> String {
        let m3 = v.get::<cubic_meter>();
        self.pair(
            format!("{} m³ = {} L", fmt_sig(m3, 4), fmt_sig(m3 * 1e3, 4)),
            format!(
                "{} ft³ = {} US gal",
                fmt_sig(m3 / (M_PER_FT * M_PER_FT * M_PER_FT), 4),
                fmt_sig(m3 / M3_PER_US_GAL, 4)
            ),
        )
    }

    /// An energy in MJ (kJ or J when small) or ft·lbf.
    pub fn energy(&self, e: Energy) -> String {
        let j = e.get::<joule>();
        self.pair(si_energy(j), ft_lbf(j))
    }

    /// An energy per mass in MJ/kg.
    pub fn specific_energy(&self, e: AvailableEnergy) -> String {
        let j = e.get::<joule_per_kilogram>();
        self.pair(
            format!("{} MJ/kg", fmt_sig(j / 1e6, 4)),
            format!("{} BTU/lb", fmt_sig(j * KG_PER_LB / super::J_PER_BTU, 4)),
        )
    }

    /// A mass in kg or lb.
    pub fn mass(&self, m: Mass) -> String {
        let kg = m.get::<kilogram>();
        self.pair(
            format!("{} kg", fmt_sig(kg, 4)),
            format!("{} lb", fmt_sig(kg / KG_PER_LB, 4)),
        )
    }

    /// A distance in m or ft.
    pub fn length(&self, l: Length) -> String {
        let m = l.get::<meter>();
        self.pair(
            format!("{} m", fmt_sig(m, 3)),
            format!("{} ft", fmt_sig(m / M_PER_FT, 3)),
        )
    }

    /// A small length, such as an orifice, in mm or in.
    pub fn small_length(&self, l: Length) -> String {
        let m = l.get::<meter>();
        self.pair(
            format!("{} mm", fmt_sig(m * 1e3, 3)),
            format!("{} in", fmt_sig(m / 0.0254, 3)),
        )
    }

    /// A pressure ramp in bar/min or psi/min, from the pressure gained per second.
    pub fn pressure_rate(&self, per_second: Pressure) -> String {
        let pa_s = per_second.get::<pascal>();
        self.pair(
            format!("{} bar/min", fmt_sig(pa_s * 60.0 / 1e5, 3)),
            format!("{} psi/min", fmt_sig(pa_s * 60.0 / PA_PER_PSI, 3)),
        )
    }

    /// A speed in m/s or ft/s.
    pub fn speed(&self, v: Velocity) -> String {
        let m_s = v.get::<meter_per_second>();
        self.pair(
            format!("{} m/s", fmt_sig(m_s, 3)),
            format!("{} ft/s", fmt_sig(m_s / M_PER_FT, 3)),
        )
    }

    /// A volume flow in m³/h or cubic feet a minute (cfm), as ventilation is rated.
    pub fn volume_flow(&self, q: VolumeRate) -> String {
        let m3_s = q.get::<cubic_meter_per_second>();
        self.pair(
            format!("{} m³/h", fmt_sig(m3_s * 3600.0, 3)),
            format!(
                "{} cfm",
                fmt_sig(m3_s * 60.0 / (M_PER_FT * M_PER_FT * M_PER_FT), 3)
            ),
        )
    }

    /// A mass flow in kg/s or lb/s.
    pub fn mass_flow(&self, m: MassRate) -> String {
        let kg = m.get::<kilogram_per_second>();
        self.pair(
            format!("{} kg/s", fmt_sig(kg, 3)),
            format!("{} lb/s", fmt_sig(kg / KG_PER_LB, 3)),
        )
    }

    /// A value in the display's first unit only, for use inside a sentence: `311.2 bar(a)`,
    /// `-126 °C`, `30.0 m`. Pressures are absolute, so the text does not depend on ambient.
    pub fn short(&self, v: &Value) -> String {
        let us = self.system == UnitSystem::Us;
        match v {
            Value::Pressure(p) | Value::AbsolutePressure(p) => {
                let pa = p.get::<pascal>();
                if us {
                    format!("{} psia", fmt_sig(pa / PA_PER_PSI, 4))
                } else {
                    format!("{} bar(a)", fmt_sig(pa / 1e5, 4))
                }
            }
            Value::Overpressure(p) => {
                let pa = p.get::<pascal>();
                if us {
                    format!("{} psi", fmt_sig(pa / PA_PER_PSI, 3))
                } else {
                    format!("{} kPa", fmt_sig(pa / 1e3, 3))
                }
            }
            Value::Temperature(t) => {
                let c = t.get::<kelvin>() - 273.15;
                if us {
                    format!("{:.0} °F", c * 9.0 / 5.0 + 32.0)
                } else {
                    format!("{c:.0} °C")
                }
            }
            Value::Distance(l) => {
                let m = l.get::<meter>();
                if us {
                    format!("{} ft", fmt_sig(m / M_PER_FT, 3))
                } else {
                    format!("{} m", fmt_sig(m, 3))
                }
            }
            Value::Energy(e) => {
                let j = e.get::<joule>();
                if us {
                    ft_lbf(j)
                } else {
                    si_energy(j)
                }
            }
            Value::Mass(m) => {
                let kg = m.get::<kilogram>();
                if us {
                    format!("{} lb", fmt_sig(kg / KG_PER_LB, 4))
                } else {
                    format!("{} kg", fmt_sig(kg, 4))
                }
            }
            other => {
                // Every other kind reads well enough in its full form.
                let full = Display {
                    system: self.system,
                    ambient: self.ambient,
                };
                match other {
                    Value::Volume(x) => full.volume(*x),
                    Value::SpecificEnergy(x) => full.specific_energy(*x),
                    Value::Diameter(x) => full.small_length(*x),
                    Value::Time(x) => full.time(*x),
                    Value::MassFlow(x) => full.mass_flow(*x),
                    Value::VolumeFlow(x) => full.volume_flow(*x),
                    Value::PressureRate(x) => full.pressure_rate(*x),
                    Value::Speed(x) => full.speed(*x),
                    Value::Fraction(x) => percent(*x),
                    Value::Number(x) => fmt_sig(*x, 3),
                    Value::Text(s) => s.clone(),
                    _ => String::new(),
                }
            }
        }
    }

    /// A plot axis's unit for `kind`, given the largest SI value on it.
    pub fn axis_unit(&self, kind: AxisKind, max_si: f64) -> &'static str {
        match (kind, self.system) {
            (AxisKind::Time, _) if max_si >= 600.0 => "min",
            (AxisKind::Time, _) => "s",
            (AxisKind::Pressure, UnitSystem::Si) => "barg",
            (AxisKind::Pressure, UnitSystem::Us) => "psig",
            (AxisKind::Temperature, UnitSystem::Si) => "°C",
            (AxisKind::Temperature, UnitSystem::Us) => "°F",
            (AxisKind::Fraction, _) => "%",
        }
    }

    /// An SI plot value in the unit [`Display::axis_unit`] chose for it.
    pub fn axis_value(&self, kind: AxisKind, max_si: f64, si: f64) -> f64 {
        match (kind, self.system) {
            (AxisKind::Time, _) if max_si >= 600.0 => si / 60.0,
            (AxisKind::Time, _) => si,
            (AxisKind::Pressure, UnitSystem::Si) => (si - self.ambient.get::<pascal>()) / 1e5,
            (AxisKind::Pressure, UnitSystem::Us) => {
                (si - self.ambient.get::<pascal>()) / PA_PER_PSI
            }
            (AxisKind::Temperature, UnitSystem::Si) => si - 273.15,
            (AxisKind::Temperature, UnitSystem::Us) => (si - 273.15) * 9.0 / 5.0 + 32.0,
            (AxisKind::Fraction, _) => si * 100.0,
        }
    }

    /// A duration in s, with minutes where long.
    pub fn time(&self, t: Time) -> String {
        let s = t.get::<second>();
        if s >= 120.0 {
            format!("{} s ({} min)", fmt_sig(s, 4), fmt_sig(s / 60.0, 3))
        } else {
            format!("{} s", fmt_sig(s, 3))
        }
    }
}

/// An energy in ft·lbf. Stored energies run to millions of ft·lbf, so the whole number is
/// grouped by thousands from 10,000 (`6,581,814 ft·lbf`) to be read at a glance.
fn ft_lbf(j: f64) -> String {
    let text = fmt_sig(j / J_PER_FT_LBF, 4);
    let digits = text.trim_start_matches('-');
    if digits.len() < 5 || !digits.bytes().all(|b| b.is_ascii_digit()) {
        return format!("{text} ft·lbf");
    }
    let mut grouped = String::new();
    for (i, c) in digits.chars().enumerate() {
        if i > 0 && (digits.len() - i).is_multiple_of(3) {
            grouped.push(',');
        }
        grouped.push(c);
    }
    let sign = if text.starts_with('-') { "-" } else { "" };
    format!("{sign}{grouped} ft·lbf")
}

/// An energy in J with the prefix its size reads best in: MJ from 0.1 MJ, kJ from 1 kJ.
fn si_energy(j: f64) -> String {
    match j.abs() {
        x if x >= 1e5 => format!("{} MJ", fmt_sig(j / 1e6, 4)),
        x if x >= 1e3 => format!("{} kJ", fmt_sig(j / 1e3, 4)),
        _ => format!("{} J", fmt_sig(j, 4)),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn significant_figures() {
        assert_eq!(fmt_sig(1.36228e6 / 1e6, 4), "1.362");
        assert_eq!(fmt_sig(30.0, 3), "30.0");
        assert_eq!(fmt_sig(0.0123456, 3), "0.0123");
        assert_eq!(fmt_sig(1234.6, 3), "1235");
        assert_eq!(fmt_sig(0.0, 3), "0");
    }

    #[test]
    fn an_energy_in_a_sentence_takes_the_prefix_its_size_reads_best_in() {
        let d = Display {
            system: UnitSystem::Si,
            ambient: Pressure::new::<pascal>(101_325.0),
        };
        let short = |j: f64| d.short(&Value::Energy(Energy::new::<joule>(j)));
        assert_eq!(short(4.615e6), "4.615 MJ");
        assert_eq!(short(1e5), "0.1000 MJ");
        // An energy limit of 1 kJ read "0.001000 MJ".
        assert_eq!(short(1e3), "1.000 kJ");
        assert_eq!(short(0.0), "0 J");
        let us = Display {
            system: UnitSystem::Us,
            ..d
        };
        let ft_lbf = |x: f64| us.short(&Value::Energy(Energy::new::<joule>(x * J_PER_FT_LBF)));
        assert_eq!(ft_lbf(6_581_814.0), "6,581,814 ft·lbf");
        assert_eq!(ft_lbf(223_782.0), "223,782 ft·lbf");
        assert_eq!(ft_lbf(12_345.0), "12,345 ft·lbf");
        assert_eq!(ft_lbf(9_999.0), "9999 ft·lbf");
        assert_eq!(ft_lbf(737.6), "737.6 ft·lbf");
        assert_eq!(ft_lbf(-6_581_814.0), "-6,581,814 ft·lbf");
    }

    #[test]
    fn pressures_show_gauge_and_absolute() {
        let d = Display {
            system: UnitSystem::Si,
            ambient: Pressure::new::<pascal>(101_325.0),
        };
        let s = d.pressure(Pressure::new::<pascal>(1.101325e6));
        assert!(s.starts_with("10.00 barg, 11.01 bara"), "{s}");
        assert!(s.contains("psig"), "{s}");
    }

    #[test]
    fn a_ventilation_flow_reads_in_the_readers_units_first() {
        // 200 cfm = 200 × 0.3048³ m³/min = 0.094 39 m³/s = 339.8 m³/h (NIST SP 811 factors).
        let q = VolumeRate::new::<cubic_meter_per_second>(200.0 * 0.3048f64.powi(3) / 60.0);
        let ambient = Pressure::new::<pascal>(101_325.0);
        let us = Display {
            system: UnitSystem::Us,
            ambient,
        };
        let si = Display {
            system: UnitSystem::Si,
            ambient,
        };
        assert_eq!(us.volume_flow(q), "200 cfm (340 m³/h)");
        assert_eq!(si.volume_flow(q), "340 m³/h (200 cfm)");
    }
}
