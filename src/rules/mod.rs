//! The rules: pure functions on uom quantities, each returning its result and the cautions
//! it raises. No rule formats text, knows a unit spelling or reads a file.
//!
//! Every rule is written against [`GasModel`], never against a particular model.

pub mod blast;
pub mod energy;
pub mod fill;
pub mod fragments;
pub mod room;
pub mod transient;
pub mod vent;

use uom::si::f64::{Pressure, ThermodynamicTemperature};
use uom::si::{pressure::pascal, thermodynamic_temperature::kelvin};

use crate::caution::{Caution, Note};
use crate::gas::{GasError, GasModel, State};
use crate::InputError;

/// Largest absolute pressure accepted, Pa (10 000 bar: above any gas vessel in service).
pub const MAX_PRESSURE_PA: f64 = 1.0e9;
/// Highest gas temperature accepted, K.
pub const MAX_TEMPERATURE_K: f64 = 2_000.0;
/// Largest vessel volume accepted, m³.
pub const MAX_VOLUME_M3: f64 = 1.0e5;

/// Refuses a value that is not finite, not above zero, or above `max`.
fn check_positive(field: &str, value: f64, unit: &str, max: f64) -> Result<(), InputError> {
    if value.is_finite() && value > 0.0 && value <= max {
        Ok(())
    } else {
        Err(InputError::new(
            field,
            si_text(value, unit),
            format!(
                "must be above zero and at most {}; accepted: a value in that range",
                si_text(max, unit)
            ),
        ))
    }
}

/// A number and its SI unit as a message shows it: pascals with the prefix that keeps the
/// number short (`10 MPa`), and very large or small numbers in exponent form (`1e8 s`), so
/// that no message prints a long run of digits.
fn si_text(value: f64, unit: &str) -> String {
    let (x, prefix) = match unit {
        "Pa" | "Pa(a)" if value.abs() >= 1e6 => (value / 1e6, "M"),
        "Pa" | "Pa(a)" if value.abs() >= 1e3 => (value / 1e3, "k"),
        _ => (value, ""),
    };
    let number = if x == 0.0 {
        "0".to_string()
    } else if (1e-3..1e6).contains(&x.abs()) {
        // Six significant digits, without trailing zeros.
        let decimals = (5 - x.abs().log10().floor() as i32).max(0) as usize;
        let text = format!("{x:.decimals$}");
        if text.contains('.') {
            text.trim_end_matches('0').trim_end_matches('.').to_string()
        } else {
            text
        }
    } else {
        format!("{x:e}")
    };
    format!("{number} {prefix}{unit}")
}

/// Refuses a temperature outside (0, MAX_TEMPERATURE_K].
fn check_temperature(field: &str, t: ThermodynamicTemperature) -> Result<(), InputError> {
    check_positive(field, t.get::<kelvin>(), "K", MAX_TEMPERATURE_K)
}

/// Turns a gas model's refusal into an input error on `field`.
fn gas_error(field: &'static str) -> impl Fn(GasError) -> InputError {
    move |e| {
        let value = match &e {
            GasError::Liquefied {
                pressure_pa,
                temperature_k,
                ..
            } => format!("{:.6} bar(a) at {:.2} K", pressure_pa / 1e5, temperature_k),
            GasError::BelowTriplePoint { temperature_k, .. } => format!("{temperature_k:.2} K"),
            GasError::Freezes { what, .. } => what.clone(),
            GasError::OutOfRange { value, .. } => value.clone(),
        };
        InputError::new(field, value, e.to_string())
    }
}

/// `s` with its first letter in capitals, to open a sentence.
fn capitalised(s: &str) -> String {
    let mut c = s.chars();
    c.next()
        .map(|first| first.to_uppercase().chain(c).collect())
        .unwrap_or_default()
}

/// The user's state, checked for range and phase. `fields` names the pressure and
/// temperature inputs, for the error.
fn user_state(
    model: &dyn GasModel,
    (pressure_field, temperature_field): (&'static str, &'static str),
    p: Pressure,
    t: ThermodynamicTemperature,
) -> Result<State, InputError> {
    if !(p.get::<pascal>().is_finite() && p.get::<pascal>() > 0.0) {
        return Err(InputError::new(
            pressure_field,
            format!("{} Pa(a)", p.get::<pascal>()),
            "the absolute pressure must be above zero (a gauge pressure below -1 atm is a vacuum beyond perfect); accepted: a pressure above vacuum",
        ));
    }
    check_positive(pressure_field, p.get::<pascal>(), "Pa(a)", MAX_PRESSURE_PA)?;
    check_temperature(temperature_field, t)?;
    model.check_gas_phase(p, t).map_err(|e| match e {
        GasError::BelowTriplePoint { .. } => gas_error(temperature_field)(e),
        _ => gas_error(pressure_field)(e),
    })?;
    model.state_pt(p, t).map_err(gas_error(pressure_field))
}

/// What every result carries about its gas: the model's limits at `state` (the
/// highest-pressure state of the calculation) as cautions, and which model as basis. The
/// released gas's own hazard is the assessment's finding.
fn gas_cautions(model: &dyn GasModel, state: &State) -> (Vec<Caution>, Vec<Note>) {
    let basis = vec![Note::new(
        "gas model",
        format!("{} ({}).", capitalised(&model.describe()), model.gas().name),
    )];
    (model.limitations(state), basis)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn limits_in_messages_are_short() {
        assert_eq!(si_text(1e7, "Pa"), "10 MPa");
        assert_eq!(si_text(1e9, "Pa(a)"), "1000 MPa(a)");
        assert_eq!(si_text(6900.0, "Pa"), "6.9 kPa");
        assert_eq!(si_text(1e8, "s"), "1e8 s");
        assert_eq!(si_text(1e-300, "Pa"), "1e-300 Pa");
        assert_eq!(si_text(2000.0, "K"), "2000 K");
        assert_eq!(si_text(0.0, "m3"), "0 m3");
        assert_eq!(si_text(-1e300, "m"), "-1e300 m");
        assert_eq!(si_text(249.468_17, "Pa"), "249.468 Pa");
        assert_eq!(si_text(0.001_234_567, "m"), "0.00123457 m");
    }
}
