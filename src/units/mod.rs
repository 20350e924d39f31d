//! Quantities at the boundary: parsing what a user types and formatting what pvhazard prints.
//!
//! Inside pvhazard every quantity is a uom SI quantity and every pressure is absolute. This
//! module is the only place that knows about unit spellings. Conversion factors are the exact
//! defined values (NIST SP 811, appendix B) rather than uom's rounded constants, so that
//! `150 psig` round-trips to the same pascals everywhere.

mod format;
mod parse;

pub use format::{fmt_sig, percent, AxisKind, Display, UnitSystem, Value};
pub use parse::{
    parse_energy, parse_heat_coefficient, parse_length, parse_mass, parse_overpressure,
    parse_pressure, parse_pressure_rate, parse_rate, parse_specific_energy, parse_temperature,
    parse_time, parse_ventilation, parse_volume, PressureRate, PressureReading, RateReading,
};

/// Pascals in one pound-force per square inch (exact, NIST SP 811).
pub const PA_PER_PSI: f64 = 6_894.757_293_168_361;
/// Metres in one foot (exact).
pub const M_PER_FT: f64 = 0.3048;
/// Cubic metres in one US gallon (231 in³, exact).
pub const M3_PER_US_GAL: f64 = 3.785_411_784e-3;
/// Kilograms in one pound (exact).
pub const KG_PER_LB: f64 = 0.453_592_37;
/// Joules in one foot pound-force (exact: 0.3048 m × 4.448 221 615 260 5 N).
pub const J_PER_FT_LBF: f64 = 1.355_817_948_331_400_4;
/// Joules in one international-table British thermal unit (exact).
pub const J_PER_BTU: f64 = 1_055.055_852_62;
/// Joules in one thermochemical calorie (exact), the calorie of the TNT convention.
pub const J_PER_CAL: f64 = 4.184;
