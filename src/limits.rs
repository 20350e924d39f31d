//! The accepted ranges of the inputs that shape a run, shared by the command line and the
//! site files so that both accept the same values.
//!
//! Each range is physical (no real orifice has a discharge coefficient of 1e-300, no fill
//! takes a nanosecond) and keeps every result finite. Each check returns the problem and
//! what is accepted, in the units a crew types; the caller names the field and echoes the
//! value as typed.

use uom::si::f64::{Length, MassRate, Pressure, Time, Volume};
use uom::si::{
    length::meter, mass_rate::kilogram_per_second, pressure::pascal, time::second,
    volume::cubic_meter,
};

use crate::units::PressureRate;

/// Lowest discharge coefficient accepted: below it the opening is better described as a
/// smaller orifice.
pub const MIN_CD: f64 = 0.1;
/// Shortest planned fill or vent-down time accepted, s.
pub const MIN_TIME_S: f64 = 1.0;
/// Longest planned fill or vent-down time accepted, s (30 days).
pub const MAX_TIME_S: f64 = 30.0 * 86_400.0;
/// Slowest fill ramp accepted, Pa/s (0.01 bar/min).
pub const MIN_RAMP_PA_S: f64 = 1.0e3 / 60.0;
/// Fastest fill ramp accepted, Pa/s (10 000 bar/min).
pub const MAX_RAMP_PA_S: f64 = 1.0e9 / 60.0;
/// Smallest fill mass flow accepted, kg/s (1 g/min).
pub const MIN_MASS_FLOW_KG_S: f64 = 1.0e-3 / 60.0;
/// Largest fill mass flow accepted, kg/s (100 kg/min).
pub const MAX_MASS_FLOW_KG_S: f64 = 100.0 / 60.0;
/// Shortest depressuring time limit accepted, s.
pub const MIN_DEPRESSURING_LIMIT_S: f64 = 1.0;
/// Longest depressuring time limit accepted, s (one day).
pub const MAX_DEPRESSURING_LIMIT_S: f64 = 86_400.0;
/// Smallest fraction of the design gauge pressure a depressuring check may vent to.
pub const MIN_DEPRESSURING_FRACTION: f64 = 0.05;
/// Smallest and largest cap on a depressuring check's target, gauge Pa.
pub const DEPRESSURING_CAP_PA: (f64, f64) = (1.0e3, 1.0e8);

/// Smallest vessel or cylinder volume accepted, m³ (1 mL: a small gas cartridge holds more).
pub const MIN_VOLUME_M3: f64 = 1.0e-6;

fn within_range(x: f64, lo: f64, hi: f64) -> bool {
    x.is_finite() && x >= lo && x <= hi
}

/// A discharge coefficient.
pub fn cd(x: f64) -> Result<(), String> {
    if within_range(x, MIN_CD, 1.0) {
        Ok(())
    } else {
        Err(format!("outside {MIN_CD} to 1; accepted: a discharge coefficient from {MIN_CD} to 1 (0.61 sharp-edged orifice, 0.97 well-rounded nozzle)"))
    }
}

/// A vessel's gas volume or a cylinder's water capacity.
pub fn volume(v: Volume) -> Result<(), String> {
    if within_range(
        v.get::<cubic_meter>(),
        MIN_VOLUME_M3,
        crate::rules::MAX_VOLUME_M3,
    ) {
        Ok(())
    } else {
        Err("outside the volumes of gas vessels and cylinders; accepted: 1 mL to 100000 m3, e.g. '50 L', '2 m3'".into())
    }
}

/// A planned time: `--within`, `--duration`.
pub fn planned_time(t: Time) -> Result<(), String> {
    if within_range(t.get::<second>(), MIN_TIME_S, MAX_TIME_S) {
        Ok(())
    } else {
        Err("outside the times a fill or vent-down is planned for; accepted: 1 s to 30 days (720 h), e.g. '90 s', '15 min'".into())
    }
}

/// A fill ramp.
pub fn ramp(r: PressureRate) -> Result<(), String> {
    if within_range(r.per_second.get::<pascal>(), MIN_RAMP_PA_S, MAX_RAMP_PA_S) {
        Ok(())
    } else {
        Err("outside the fill rates of real filling; accepted: a ramp from 0.01 to 10000 bar/min (0.15 to 145000 psi/min), e.g. '25 bar/min'".into())
    }
}

/// A fill mass flow.
pub fn mass_flow(m: MassRate) -> Result<(), String> {
    if within_range(
        m.get::<kilogram_per_second>(),
        MIN_MASS_FLOW_KG_S,
        MAX_MASS_FLOW_KG_S,
    ) {
        Ok(())
    } else {
        Err("outside the fill rates of real filling; accepted: a mass flow from 1 g/min to 100 kg/min (0.0022 to 220 lb/min), e.g. '2 kg/min'".into())
    }
}

/// The depressuring check's time limit.
pub fn depressuring_limit(t: Time) -> Result<(), String> {
    if within_range(
        t.get::<second>(),
        MIN_DEPRESSURING_LIMIT_S,
        MAX_DEPRESSURING_LIMIT_S,
    ) {
        Ok(())
    } else {
        Err(
            "outside the limits a depressuring check uses; accepted: 1 s to 24 h, e.g. '15 min'"
                .into(),
        )
    }
}

/// The depressuring check's fraction of the design gauge pressure.
pub fn depressuring_fraction(x: f64) -> Result<(), String> {
    if within_range(x, MIN_DEPRESSURING_FRACTION, 1.0) {
        Ok(())
    } else {
        Err(format!("outside {MIN_DEPRESSURING_FRACTION} to 1; accepted: a fraction of the design gauge pressure from {MIN_DEPRESSURING_FRACTION} to 1, e.g. 0.5 (half)"))
    }
}

/// The depressuring check's cap on the gauge pressure to reach.
pub fn depressuring_cap(p: Pressure) -> Result<(), String> {
    let (lo, hi) = DEPRESSURING_CAP_PA;
    if within_range(p.get::<pascal>(), lo, hi) {
        Ok(())
    } else {
        Err("outside the caps a depressuring check uses; accepted: 1 kPa to 1000 bar, e.g. '690 kPa', '100 psi'".into())
    }
}

/// The orifice that a `--within` asks for, against the orifices `--orifice` accepts.
pub fn required_orifice(d: Length) -> Result<(), String> {
    use crate::rules::vent::{MAX_ORIFICE_M, MIN_ORIFICE_M};
    let m = d.get::<meter>();
    if within_range(m, MIN_ORIFICE_M, MAX_ORIFICE_M) {
        Ok(())
    } else {
        Err(format!(
            "venting in this time needs an orifice of {} mm, outside the 0.01 mm to 5 m an orifice may be; accepted: a time that an orifice in that range vents in",
            crate::units::fmt_sig(m * 1e3, 4)
        ))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ranges_hold_their_ends_and_refuse_the_rest() {
        assert!(cd(MIN_CD).is_ok() && cd(1.0).is_ok());
        for x in [0.0, 1e-320, 0.09, 1.01, f64::NAN, f64::INFINITY] {
            assert!(cd(x).is_err(), "{x}");
        }
        assert!(volume(Volume::new::<cubic_meter>(1e-300)).is_err());
        assert!(volume(Volume::new::<cubic_meter>(1e-6)).is_ok());
        assert!(planned_time(Time::new::<second>(1.0)).is_ok());
        assert!(planned_time(Time::new::<second>(1e-300)).is_err());
        assert!(planned_time(Time::new::<second>(MAX_TIME_S * 1.01)).is_err());
        let bar_min = |x: f64| PressureRate {
            per_second: Pressure::new::<pascal>(x * 1e5 / 60.0),
        };
        assert!(ramp(bar_min(0.01)).is_ok() && ramp(bar_min(10_000.0)).is_ok());
        assert!(ramp(bar_min(0.0)).is_err() && ramp(bar_min(1e9)).is_err());
        let kg_s = MassRate::new::<kilogram_per_second>;
        assert!(mass_flow(kg_s(1e9)).is_err());
        assert!(mass_flow(kg_s(2.0 / 60.0)).is_ok());
        assert!(depressuring_limit(Time::new::<second>(0.0)).is_err());
        assert!(depressuring_fraction(0.0).is_err() && depressuring_fraction(0.5).is_ok());
        assert!(required_orifice(Length::new::<meter>(1.5e149)).is_err());
    }
}
