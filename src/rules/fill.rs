//! Fast fill of a rigid cylinder: the adiabatic (no heat to the wall) final temperature,
//! the settled pressure after cooling, and the fill-to pressure that settles at the target.

use uom::si::f64::{Mass, Pressure, ThermodynamicTemperature, Volume};
use uom::si::{
    available_energy::joule_per_kilogram, mass::kilogram, pressure::pascal,
    thermodynamic_temperature::kelvin, volume::cubic_meter,
};

use super::{
    check_positive, check_temperature, gas_cautions, gas_error, user_state, MAX_PRESSURE_PA,
    MAX_VOLUME_M3,
};
use crate::caution::{self, Assessed, Note};
use crate::gas::{GasModel, State};
use crate::note;
use crate::units::{fmt_sig, Value};
use crate::InputError;

/// What the fill rule needs.
#[derive(Debug, Clone, PartialEq)]
pub struct FillInput {
    /// Internal (water) volume of the cylinder.
    pub volume: Volume,
    /// Absolute pressure before the fill.
    pub from: Pressure,
    /// Absolute pressure at which the fill stops.
    pub to: Pressure,
    /// Temperature of the gas before the fill.
    pub initial_temperature: ThermodynamicTemperature,
    /// Temperature of the gas arriving from the supply.
    pub supply_temperature: ThermodynamicTemperature,
    /// Absolute pressure of the supply (the source of its enthalpy); `None`: the fill's
    /// end pressure.
    pub supply_pressure: Option<Pressure>,
    /// Temperature the filled cylinder cools to.
    pub ambient_temperature: ThermodynamicTemperature,
    /// The cylinder's rated maximum gas temperature, if given.
    pub rated_temperature: Option<ThermodynamicTemperature>,
}

/// The highest fill-to pressure, as a multiple of the service pressure, that a hot fill may
/// stop at: a cylinder filled above it would be overfilled once cool if its gas stayed
/// cooler than assumed (common practice, no source: cylinder standards allow a hot fill only
/// a modest margin over the service pressure).
pub const FILL_TO_LIMIT_RATIO: f64 = 1.10;

/// Points on the fill's temperature–pressure path (besides the start).
const PATH_POINTS: usize = 40;

/// A point on the adiabatic fill's path: the gas temperature once the cylinder is at
/// `pressure`.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct FillSample {
    /// Absolute pressure in the cylinder.
    #[serde(rename = "pressure_pa")]
    pub pressure: Pressure,
    /// Gas temperature.
    #[serde(rename = "temperature_k")]
    pub temperature: ThermodynamicTemperature,
}

/// What the fill rule computes.
#[derive(Debug, Clone, PartialEq)]
pub struct FillResult {
    /// Gas temperature at the end of an adiabatic fill.
    pub final_temperature: ThermodynamicTemperature,
    /// Gas mass before the fill.
    pub initial_mass: Mass,
    /// Mass added by the fill.
    pub mass_added: Mass,
    /// Pressure once the gas has cooled to ambient at constant mass.
    pub settled_pressure: Pressure,
    /// Pressure at which to stop a fill (at the same conditions) so it settles at `to`;
    /// `None` when the gas already in the cylinder settles at or above `to`.
    pub fill_to_pressure: Option<Pressure>,
    /// Gas temperature against pressure from the start to the end of the fill.
    pub path: Vec<FillSample>,
}

/// The adiabatic fill from `from` to `to`, with its cautions.
///
/// First law for the rigid cylinder: m_f·u_f − m_i·u_i = (m_f − m_i)·h_in, with h_in the
/// supply gas's enthalpy. For an ideal gas this is T_f = p_f / (p_i/T_i + (p_f − p_i)/(γ·T0)).
/// No heat reaches the wall, so the temperature is an upper bound.
pub fn adiabatic_fill(
    model: &dyn GasModel,
    input: &FillInput,
) -> Result<Assessed<FillResult>, InputError> {
    check_positive(
        "volume",
        input.volume.get::<cubic_meter>(),
        "m3",
        MAX_VOLUME_M3,
    )?;
    check_temperature("supply-temperature", input.supply_temperature)?;
    check_temperature("ambient-temperature", input.ambient_temperature)?;
    if let Some(t) = input.rated_temperature {
        check_temperature("rated-temperature", t)?;
    }
    let initial = user_state(
        model,
        ("from", "initial-temperature"),
        input.from,
        input.initial_temperature,
    )?;
    if input.to <= input.from {
        return Err(InputError::new(
            "to",
            format!("{} bar(a)", fmt_sig(input.to.get::<pascal>() / 1e5, 6)),
            format!(
                "the fill must end above where it starts (--from is {} bar(a)); accepted: a pressure above --from",
                fmt_sig(input.from.get::<pascal>() / 1e5, 6)
            ),
        ));
    }
    // The settled target must be a gas too, and the model's limits apply at the top of
    // the fill.
    let target = user_state(
        model,
        ("to", "ambient-temperature"),
        input.to,
        input.ambient_temperature,
    )?;
    let (cautions, mut basis) = gas_cautions(model, &target);
    // The supply gas's enthalpy at its own pressure (by default the fill's end pressure);
    // for an ideal gas h does not depend on it, for a real gas it does (Joule–Thomson).
    let supply_pressure = input.supply_pressure.unwrap_or(input.to);
    if let Some(p) = input.supply_pressure {
        check_positive(
            "supply-pressure",
            p.get::<pascal>(),
            "Pa(a)",
            MAX_PRESSURE_PA,
        )?;
    }
    model
        .check_gas_phase(supply_pressure, input.supply_temperature)
        .map_err(gas_error("supply-temperature"))?;
    let supply = model
        .state_pt(supply_pressure, input.supply_temperature)
        .map_err(gas_error("supply-temperature"))?;

    let end = fill_end_state(model, &initial, &supply, input.volume, input.to)?;
    let path = (1..=PATH_POINTS)
        .map(|i| {
            let p = input.from + (input.to - input.from) * (i as f64 / PATH_POINTS as f64);
            fill_end_state(model, &initial, &supply, input.volume, p).map(|st| FillSample {
                pressure: st.pressure,
                temperature: st.temperature,
            })
        })
        .collect::<Result<Vec<_>, _>>()?;
    let path = std::iter::once(FillSample {
        pressure: initial.pressure,
        temperature: initial.temperature,
    })
    .chain(path)
    .collect();
    let settled = model
        .state_rho_t(end.density, input.ambient_temperature)
        .map_err(gas_error("ambient-temperature"))?;
    let fill_to = fill_to_pressure(model, &initial, &supply, input.volume, target.density);
    let initial_mass = initial.density * input.volume;
    let result = FillResult {
        final_temperature: end.temperature,
        initial_mass,
        mass_added: end.density * input.volume - initial_mass,
        settled_pressure: settled.pressure,
        fill_to_pressure: fill_to,
        path,
    };
    basis.push(fill_basis(input, &result));
    Ok(Assessed {
        value: result,
        cautions,
        basis,
    })
}

/// The state at the end of an adiabatic fill to pressure `p_end`: the temperature that
/// closes the energy balance, found by Brent's method.
fn fill_end_state(
    model: &dyn GasModel,
    initial: &State,
    supply: &State,
    volume: Volume,
    p_end: Pressure,
) -> Result<State, InputError> {
    let h_in = model.enthalpy(supply).get::<joule_per_kilogram>();
    let m_i = (initial.density * volume).get::<kilogram>();
    let u_i = model.internal_energy(initial).get::<joule_per_kilogram>();
    let balance = |t: f64| -> f64 {
        model
            .state_pt(p_end, ThermodynamicTemperature::new::<kelvin>(t))
            .map_or(f64::NAN, |st| {
                let m_f = (st.density * volume).get::<kilogram>();
                let u_f = model.internal_energy(&st).get::<joule_per_kilogram>();
                // Scaled by the final mass so the tolerance is in J/kg.
                (m_f * (u_f - h_in) - m_i * (u_i - h_in)) / m_f
            })
    };
    // A real supply throttled into a nearly empty cylinder can arrive colder than it left
    // (Joule–Thomson: carbon dioxide from 50 bar), so the bracket starts well below both
    // temperatures and comes up out of any liquid or frozen states.
    let t_cold = initial.temperature.min(supply.temperature).get::<kelvin>();
    let mut t_lo = t_cold * 0.5;
    while !balance(t_lo).is_finite() && t_lo < t_cold {
        t_lo *= 1.05;
    }
    // Even a fill from vacuum ends below about γ·T0 (1.67·T0 for a monatomic ideal gas);
    // the top of the bracket comes down if the model's range ends lower (methane: 625 K).
    let mut t_hi = initial.temperature.max(supply.temperature).get::<kelvin>() * 2.5;
    while !balance(t_hi).is_finite() && t_hi > 1.2 * t_lo {
        t_hi *= 0.95;
    }
    let t = crate::solve::root(balance, t_lo, t_hi, 1e-9).map_err(|_| {
        InputError::new(
            "to",
            format!("{} bar(a)", fmt_sig(p_end.get::<pascal>() / 1e5, 6)),
            "no temperature closes the fill's energy balance at this pressure",
        )
    })?;
    model
        .state_pt(p_end, ThermodynamicTemperature::new::<kelvin>(t))
        .map_err(gas_error("to"))
}

/// The stop pressure of a hot fill whose gas, once cooled to ambient, has `settled_density`,
/// or `None` when the gas already there has that density or more (a cold cylinder that
/// settles above the target when it warms).
fn fill_to_pressure(
    model: &dyn GasModel,
    initial: &State,
    supply: &State,
    volume: Volume,
    settled_density: uom::si::f64::MassDensity,
) -> Option<Pressure> {
    use uom::si::mass_density::kilogram_per_cubic_meter;
    if initial.density >= settled_density {
        return None;
    }
    let want = settled_density.get::<kilogram_per_cubic_meter>();
    let gap = |ln_p: f64| -> f64 {
        fill_end_state(
            model,
            initial,
            supply,
            volume,
            Pressure::new::<pascal>(ln_p.exp()),
        )
        .map_or(f64::NAN, |st| {
            st.density.get::<kilogram_per_cubic_meter>() / want - 1.0
        })
    };
    let lo = initial.pressure.get::<pascal>().ln() + 1e-9;
    let hi = (10.0 * supply.pressure.get::<pascal>()).ln();
    crate::solve::root(gap, lo, hi, 1e-12)
        .ok()
        .map(|ln_p| Pressure::new::<pascal>(ln_p.exp()))
}

/// How the adiabatic fill was found, and what its temperature bounds, for the basis.
fn fill_basis(input: &FillInput, r: &FillResult) -> Note {
    // The wall starts at the initial gas temperature: where the gas ends hotter than that,
    // heat to the wall could only cool it, so the adiabatic result bounds it from above.
    let then = if r.final_temperature > input.ambient_temperature {
        " cools to "
    } else {
        " warms to "
    };
    let bound = if r.final_temperature >= input.initial_temperature {
        caution::Part::from(
            " is the upper bound of the gas temperature for any fill rate; a real fill is cooler",
        )
    } else {
        caution::Part::from(", colder than the cylinder started: heat from the wall would warm the gas, so this is not a bound")
    };
    note!(
        "adiabatic fill",
        "No heat passes between the gas and the cylinder wall, so ",
        Value::Temperature(r.final_temperature),
        bound,
        ". The settled pressure assumes the gas then",
        then,
        Value::Temperature(input.ambient_temperature),
        " at constant mass.",
    )
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::gas::{Gas, IdealGas};
    use approx::assert_relative_eq;

    fn air_fill(from_bar: f64, to_bar: f64) -> FillInput {
        let t = ThermodynamicTemperature::new::<kelvin>(293.15);
        FillInput {
            volume: Volume::new::<cubic_meter>(0.05),
            from: Pressure::new::<pascal>(from_bar * 1e5),
            to: Pressure::new::<pascal>(to_bar * 1e5),
            initial_temperature: t,
            supply_temperature: t,
            supply_pressure: None,
            ambient_temperature: t,
            rated_temperature: None,
        }
    }

    #[test]
    fn air_fill_temperatures_from_the_closed_form() {
        // source: reference notes, fast-fill check [C]: air, T0 = Ti = 293.15 K:
        // 50 → 300 bar(a) gives 384.8 K; 100 → 300 bar(a) gives 362.1 K (γ = 1.4).
        let model = IdealGas::with_gamma(Gas::find("air").unwrap(), 1.4);
        let r = adiabatic_fill(&model, &air_fill(50.0, 300.0))
            .unwrap()
            .value;
        assert_relative_eq!(
            r.final_temperature.get::<kelvin>(),
            384.8,
            max_relative = 2e-4
        );
        let r = adiabatic_fill(&model, &air_fill(100.0, 300.0))
            .unwrap()
            .value;
        assert_relative_eq!(
            r.final_temperature.get::<kelvin>(),
            362.1,
            max_relative = 2e-4
        );
    }

    #[test]
    fn general_balance_matches_the_ideal_closed_form() {
        let model = IdealGas::new(Gas::find("hydrogen").unwrap());
        let g = model.gamma();
        let mut input = air_fill(20.0, 350.0);
        input.supply_temperature = ThermodynamicTemperature::new::<kelvin>(250.0);
        let r = adiabatic_fill(&model, &input).unwrap().value;
        let (pi, pf, ti, t0) = (20e5, 350e5, 293.15, 250.0);
        let closed = pf / (pi / ti + (pf - pi) / (g * t0));
        assert_relative_eq!(
            r.final_temperature.get::<kelvin>(),
            closed,
            max_relative = 1e-9
        );
        // Fill-to pressure, closed form: p_f = p_i + γ·T0·(p_target/T_amb − p_i/T_i).
        let fill_to = pi + g * t0 * (pf / 293.15 - pi / ti);
        assert_relative_eq!(
            r.fill_to_pressure.unwrap().get::<pascal>(),
            fill_to,
            max_relative = 1e-8
        );
    }

    #[test]
    fn from_vacuum_the_gas_reaches_gamma_times_supply_temperature() {
        // source: any thermodynamics text (e.g. Çengel & Boles, charging of a rigid
        // evacuated tank): T = γ·T0.
        let model = IdealGas::new(Gas::find("argon").unwrap());
        let r = adiabatic_fill(&model, &air_fill(1e-6, 200.0))
            .unwrap()
            .value;
        assert_relative_eq!(
            r.final_temperature.get::<kelvin>(),
            model.gamma() * 293.15,
            max_relative = 1e-6
        );
    }

    #[test]
    fn over_the_rating_is_a_warning_and_from_above_to_is_refused() {
        let model = IdealGas::new(Gas::find("air").unwrap());
        let mut input = air_fill(20.0, 300.0);
        input.rated_temperature = Some(ThermodynamicTemperature::new::<kelvin>(338.15));
        let r = adiabatic_fill(&model, &input).unwrap();
        assert!(r.value.final_temperature > input.rated_temperature.unwrap());
        let e = adiabatic_fill(&model, &air_fill(300.0, 200.0)).unwrap_err();
        assert_eq!(e.field, "to");
    }
}
