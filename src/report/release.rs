//! The room's atmosphere while a vessel is vented into it, as inputs and results.

use super::{entry, result, Entry};
use crate::rules::room::{RoomRelease, Ventilation};
use crate::units::Value;
use uom::si::f64::{Length, VolumeRate};
use uom::si::volume_rate::cubic_meter_per_second;

/// The room as given.
pub(super) fn inputs(r: &RoomRelease) -> Vec<Entry> {
    let mut out = vec![
        entry("Room volume", Value::Volume(r.room_volume)),
        entry(
            "Room ventilation",
            match r.ventilation {
                Ventilation::AirChanges(_) => Value::Text(format!(
                    "{} air changes per hour",
                    crate::units::fmt_sig(r.air_changes_per_h, 3)
                )),
                Ventilation::Flow(q) => {
                    Value::VolumeFlow(VolumeRate::new::<cubic_meter_per_second>(q))
                }
            },
        ),
    ];
    if let Ventilation::Flow(_) = r.ventilation {
        out.push(entry(
            "Room air changes",
            Value::Text(format!(
                "{} per hour",
                crate::units::fmt_sig(r.air_changes_per_h, 3)
            )),
        ));
    }
    out
}

/// The room's results, with methods; `orifice` is the vent's.
pub(super) fn results(r: &RoomRelease, orifice: Option<Length>) -> Vec<Entry> {
    const MIXED: &str = "room well mixed at ambient pressure, fresh air in, mixture out";
    let mut out = vec![result(
        "Gas vented into the room",
        Value::Mass(r.released_mass),
        "the vent's time series",
    )];
    out.extend(
        r.min_oxygen_fraction
            .map(|x| result("Lowest oxygen in the room", Value::Fraction(x), MIXED)),
    );
    out.extend(
        r.max_oxygen_fraction
            .map(|x| result("Highest oxygen in the room", Value::Fraction(x), MIXED)),
    );
    if r.min_oxygen_fraction.is_some_and(|x| x < 0.2095 - 1e-9) {
        let time = |t: Option<uom::si::f64::Time>| {
            t.map_or(Value::Text("until ventilated".to_string()), Value::Time)
        };
        out.push(result(
            "Time with oxygen below 19.5 %",
            time(r.time_deficient),
            MIXED,
        ));
        out.push(result(
            "Time with oxygen below 18 %",
            time(r.time_impairing),
            MIXED,
        ));
    }
    out.extend(r.peak_flammable_fraction_of_lfl.map(|x| {
        result(
            "Highest share of the lower flammable limit",
            Value::Fraction(x),
            MIXED,
        )
    }));
    out.extend(
        r.peak_co2_fraction
            .map(|x| result("Highest carbon dioxide", Value::Fraction(x), MIXED)),
    );
    out.push(result(
        "Back within limits",
        match r.recovery_time {
            Some(t) if t.get::<uom::si::time::second>() > 0.0 => Value::Time(t),
            Some(_) => Value::Text("never out of them".to_string()),
            None => Value::Text("never, without fresh air".to_string()),
        },
        "from the vent's start, ventilation clearing the room after it",
    ));
    out.push(result(
        "Ventilation that keeps the room within limits",
        match r.ventilation_needed_per_h {
            Some(0.0) => Value::Text("none: the room stays within them closed".to_string()),
            Some(n) => Value::Text(format!(
                "{} air changes per hour",
                crate::units::fmt_sig(n, 3)
            )),
            None => Value::Text("none up to 10 000 per hour: vent elsewhere".to_string()),
        },
        "the least fresh air, solved on the room model",
    ));
    if let Some(d) = orifice {
        out.push(result(
            "Largest orifice that keeps the room within limits",
            match r.largest_orifice(d) {
                Some(d) => Value::Diameter(d),
                None => Value::Text("no orifice size changes it".to_string()),
            },
            "at this ventilation and Cd; the vent's time scales as 1/(Cd·A), as for the quasi-steady vent",
        ));
    }
    out
}
