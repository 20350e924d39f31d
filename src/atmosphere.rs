//! Ambient pressure from elevation: the standard atmosphere's troposphere (ISO 2533:1975,
//! identical to the U.S. Standard Atmosphere 1976 below 11 km geopotential).

use uom::si::f64::{Length, Pressure};
use uom::si::{length::meter, pressure::pascal};

use crate::InputError;

/// Sea-level standard pressure, Pa.
pub const SEA_LEVEL_PRESSURE_PA: f64 = 101_325.0;
const SEA_LEVEL_TEMPERATURE_K: f64 = 288.15;
const LAPSE_RATE_K_PER_M: f64 = 0.0065;
const STANDARD_GRAVITY: f64 = 9.806_65;
// The 1976 standard's own constants: R* = 8.31432 J/(mol K), M0 = 28.9644 g/mol.
const GAS_CONSTANT_1976: f64 = 8.314_32;
const MOLAR_MASS_AIR_1976: f64 = 0.028_964_4;
// Effective Earth radius used to turn geometric into geopotential height.
const EARTH_RADIUS_M: f64 = 6_356_766.0;

/// The lowest and highest elevations accepted, m (the troposphere's formula).
pub const ELEVATION_RANGE_M: (f64, f64) = (-2_000.0, 11_000.0);

/// Standard-atmosphere pressure at a geometric elevation above sea level.
///
/// Refused outside −2 km … 11 km: the troposphere's single lapse rate holds only there.
pub fn pressure_at(elevation: Length) -> Result<Pressure, InputError> {
    let z = elevation.get::<meter>();
    if !(ELEVATION_RANGE_M.0..=ELEVATION_RANGE_M.1).contains(&z) {
        return Err(InputError::new(
            "elevation",
            format!("{z} m"),
            "outside the standard atmosphere's troposphere; accepted: -2000 m to 11000 m (-6562 ft to 36089 ft)",
        ));
    }
    let geopotential = EARTH_RADIUS_M * z / (EARTH_RADIUS_M + z);
    let exponent =
        STANDARD_GRAVITY * MOLAR_MASS_AIR_1976 / (GAS_CONSTANT_1976 * LAPSE_RATE_K_PER_M);
    let ratio = 1.0 - LAPSE_RATE_K_PER_M * geopotential / SEA_LEVEL_TEMPERATURE_K;
    Ok(Pressure::new::<pascal>(
        SEA_LEVEL_PRESSURE_PA * ratio.powf(exponent),
    ))
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn sea_level_is_one_standard_atmosphere() {
        let p = pressure_at(Length::new::<meter>(0.0)).unwrap();
        assert_relative_eq!(p.get::<pascal>(), 101_325.0);
    }

    #[test]
    fn matches_the_1976_table_at_1500_m() {
        // source: U.S. Standard Atmosphere 1976, table I (geometric 1500 m): 84 556 Pa.
        let p = pressure_at(Length::new::<meter>(1_500.0)).unwrap();
        assert_relative_eq!(p.get::<pascal>(), 84_556.0, max_relative = 2e-4);
    }

    #[test]
    fn refuses_the_stratosphere() {
        assert!(pressure_at(Length::new::<meter>(12_000.0)).is_err());
    }
}
