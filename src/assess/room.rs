//! Where the vented gas goes: the room's atmosphere while a vessel is vented into it, and
//! the findings on oxygen, flammability and toxicity it decides.

use uom::si::f64::{Length, Pressure, ThermodynamicTemperature, Time};
use uom::si::time::second;
use uom::si::volume::cubic_meter;

use super::finding::{Finding, Hazard};
use crate::caution::{Caution, Level, Note, Part};
use crate::gas::GasModel;
use crate::report::VentReport;
use crate::rules::room::{
    self, Room, RoomRelease, CO2_LIMITS, LFL_SHARE_LIMIT, OXYGEN_DEFICIENT, OXYGEN_ENRICHED,
    OXYGEN_LETHAL,
};
use crate::units::{fmt_sig, Value};

/// The room's atmosphere over the vent the report describes: the wall-model run's time
/// series where it ran, else the quasi-steady vent's.
pub(super) fn release(model: &dyn GasModel, report: &VentReport, room: &Room) -> RoomRelease {
    let series: Vec<(Time, Pressure, ThermodynamicTemperature)> = match &report.transient {
        Some(t) => t
            .samples
            .iter()
            .map(|s| (s.time, s.pressure, s.gas_temperature))
            .collect(),
        None => report
            .history
            .iter()
            .map(|s| (s.time, s.pressure, s.temperature))
            .collect(),
    };
    let volume = report.inputs.volume_m3.get::<cubic_meter>();
    let mass = |p: Pressure, t: ThermodynamicTemperature| {
        model.state_pt(p, t).ok().map(|s| {
            s.density
                .get::<uom::si::mass_density::kilogram_per_cubic_meter>()
                * volume
        })
    };
    let start = series.first().and_then(|s| mass(s.1, s.2));
    // A state the model cannot place by pressure and temperature (one on the saturation
    // line) is skipped: the mass vented up to the next sample is spread over both intervals.
    let mut released: Vec<(f64, f64)> = start
        .map(|m0| {
            series
                .iter()
                .filter_map(|s| mass(s.1, s.2).map(|m| (s.0.get::<second>(), (m0 - m).max(0.0))))
                .collect()
        })
        .unwrap_or_default();
    // The quasi-steady vent's total is exact: end on it.
    if report.transient.is_none() {
        if let Some(last) = released.last_mut() {
            last.1 = report.mass_vented_kg.get::<uom::si::mass::kilogram>();
        }
    }
    room::release(model.gas(), room, &released)
}

/// The findings the room's atmosphere decides, one per hazard the gas carries; `orifice` is
/// the vent's.
pub(super) fn findings(
    model: &dyn GasModel,
    r: &RoomRelease,
    orifice: Option<Length>,
) -> Vec<Finding> {
    let basis = "room, well mixed";
    let gas = model.gas();
    let room_words = vec![
        Part::from("Vented into the "),
        Part::from(Value::Volume(r.room_volume)),
        Part::from(format!(
            " room with {} air changes an hour, ",
            fmt_sig(r.air_changes_per_h, 3)
        )),
    ];
    let action = |what: &str| {
        let mut a = vec![Part::from(format!(
            "Vent outdoors or through a line to outside. If it must go into the room: {what}"
        ))];
        match r.ventilation_needed_per_h {
            Some(n) if n > r.air_changes_per_h => a.push(Part::from(format!(
                "; ventilate at {} air changes an hour or more",
                fmt_sig(n, 2)
            ))),
            _ => {}
        }
        if let Some(d) = orifice.and_then(|o| r.largest_orifice(o)) {
            a.push(Part::from(", or vent through an orifice no larger than "));
            a.push(Part::from(Value::Diameter(d)));
        }
        match r.recovery_time {
            Some(t) if t.get::<second>() > 0.0 => {
                a.push(Part::from(
                    "; keep people out from the vent's start until ",
                ));
                a.push(Part::from(Value::Time(t)));
                a.push(Part::from(" after it"));
            }
            None => a.push(Part::from(
                "; keep people out until the room is ventilated: without fresh air it does not recover",
            )),
            _ => {}
        }
        a.push(Part::from(
            ", and check the atmosphere with a calibrated monitor before anyone enters.",
        ));
        a
    };
    let mut out = Vec::new();
    if let Some(o2) = r.min_oxygen_fraction.filter(|_| gas.name != "air") {
        let mut result = room_words.clone();
        result.push(Part::from("the oxygen falls to "));
        result.push(Part::from(Value::Fraction(o2)));
        let f = if o2 < OXYGEN_DEFICIENT {
            result.push(Part::from(
                ", below the 19.5 % of an oxygen-deficient atmosphere (OSHA 29 CFR 1910.146)",
            ));
            if let Some(t) = r.time_deficient {
                result.push(Part::from(" for "));
                result.push(Part::from(Value::Time(t)));
            }
            result.push(Part::from(if o2 < OXYGEN_LETHAL {
                ": at 10 % and below people lose consciousness without warning and die."
            } else {
                ": below 18 % judgement and coordination fail (EIGA Doc 44, from memory)."
            }));
            let level = if o2 < OXYGEN_LETHAL {
                Level::Danger
            } else {
                Level::Warning
            };
            Finding::stop(
                Hazard::OxygenDepletion,
                level,
                basis,
                result,
                action("no one in it during the vent"),
            )
        } else {
            result.push(Part::from(", above 19.5 %."));
            Finding::ok(Hazard::OxygenDepletion, basis, result)
        };
        out.push(f.against(Value::Fraction(o2), Some(Value::Fraction(OXYGEN_DEFICIENT))));
    }
    if let Some(o2) = r.max_oxygen_fraction {
        let mut result = room_words.clone();
        result.push(Part::from("the oxygen rises to "));
        result.push(Part::from(Value::Fraction(o2)));
        let f = if o2 > OXYGEN_ENRICHED {
            result.push(Part::from(", above the 23.5 % of an oxygen-enriched atmosphere (OSHA 29 CFR 1910.146): clothing and grease catch fire easily and burn fiercely."));
            Finding::stop(
                Hazard::OxygenEnrichment,
                Level::Warning,
                basis,
                result,
                action("no one in it and no ignition source during the vent"),
            )
        } else {
            result.push(Part::from(", within 23.5 %."));
            Finding::ok(Hazard::OxygenEnrichment, basis, result)
        };
        out.push(f.against(Value::Fraction(o2), Some(Value::Fraction(OXYGEN_ENRICHED))));
    }
    if let Some(share) = r.peak_flammable_fraction_of_lfl {
        let mut result = room_words.clone();
        result.push(Part::from(format!(
            "the {} reaches {} % of its lower flammable limit",
            gas.name,
            fmt_sig(share * 100.0, 3)
        )));
        let f = if share >= 1.0 {
            result.push(Part::from(": the room's air is flammable."));
            Finding::stop(
                Hazard::Flammable,
                Level::Danger,
                basis,
                result,
                action("no one in it, no ignition source, and the vent path bonded and earthed"),
            )
        } else if share > LFL_SHARE_LIMIT {
            result.push(Part::from(
                ", above the 10 % of a hazardous atmosphere (OSHA 29 CFR 1910.146).",
            ));
            Finding::stop(
                Hazard::Flammable,
                Level::Warning,
                basis,
                result,
                action("no one in it, no ignition source, and the vent path bonded and earthed"),
            )
        } else {
            result.push(Part::from(", within 10 % of it."));
            Finding::ok(Hazard::Flammable, basis, result)
        };
        // In the room's terms: the gas's fraction against a tenth of its LFL.
        let lfl = r.lower_flammable_limit.unwrap_or(1.0);
        out.push(f.against(
            Value::Fraction(r.peak_gas_fraction),
            Some(Value::Fraction(LFL_SHARE_LIMIT * lfl)),
        ));
    }
    if let Some(co2) = r.peak_co2_fraction {
        let mut result = room_words.clone();
        result.push(Part::from("the carbon dioxide reaches "));
        result.push(Part::from(Value::Fraction(co2)));
        let f = if co2 > CO2_LIMITS.0 {
            result.push(Part::from(", above its 3 % short-term exposure limit (ACGIH, from memory): headache, rapid breathing, then unconsciousness."));
            Finding::stop(
                Hazard::Toxic,
                Level::Warning,
                basis,
                result,
                action("no one in it during the vent"),
            )
        } else if co2 > CO2_LIMITS.1 {
            result.push(Part::from(
                ", above its 0.5 % 8-hour limit but within the 3 % short-term limit (ACGIH, from memory).",
            ));
            Finding::action(
                Hazard::Toxic,
                Level::Caution,
                basis,
                result,
                vec![Part::from(
                    "Keep the time in the room short and ventilate it after the vent.",
                )],
            )
        } else {
            result.push(Part::from(", within its 0.5 % 8-hour limit."));
            Finding::ok(Hazard::Toxic, basis, result)
        };
        out.push(f.against(Value::Fraction(co2), Some(Value::Fraction(CO2_LIMITS.0))));
    }
    out
}

/// The room model's basis in words.
pub(super) fn basis(model: &dyn GasModel) -> Note {
    Note::new(
        "room",
        format!(
            "The room is one well-mixed volume at ambient pressure: the {} enters at the rate the vent's time series gives (the wall-model run where it ran, else the quasi-steady vent) and warms to the room's temperature; fresh air enters at the ventilation rate and the mixture leaves as fast as both enter. Each interval of the vent is solved exactly, and after the vent the fresh air clears the room exponentially. Limits: oxygen below 19.5 % deficient and above 23.5 % enriched (US OSHA 29 CFR 1910.146); a flammable gas above 10 % of its lower flammable limit (the same rule; LFL hydrogen 4.0 %, methane 4.4 %, IEC 60079-20-1, from memory); carbon dioxide 0.5 % over 8 hours and 3 % short-term (ACGIH, from memory). A real room is not well mixed near the vent's outlet or in pockets and pits.",
            model.gas().name
        ),
    )
}

/// A banner for a gas heavier than air: it pools low, where the well-mixed room's result
/// is not conservative.
pub(super) fn pooling(model: &dyn GasModel) -> Option<Caution> {
    // Air's molar mass, kg/mol (the catalogue's dry air).
    const AIR: f64 = 0.028_96;
    let gas = model.gas();
    (gas.molar_mass_kg_per_mol > 1.1 * AIR).then(|| {
        Caution::new(
            Level::Warning,
            format!(
                "{} is heavier than air and pools near the floor, in pits and in drains, where it stays richer than the well-mixed room this result assumes. Check the atmosphere low down, and keep people out of pits and low spaces until it is clear.",
                capitalised(gas.name)
            ),
        )
    })
}

fn capitalised(name: &str) -> String {
    let mut c = name.chars();
    c.next()
        .map(|f| f.to_uppercase().chain(c).collect())
        .unwrap_or_default()
}

/// The NOTICE for a vent outdoors: nothing computed for the room, and what to check.
pub(super) fn outdoors(model: &dyn GasModel) -> Caution {
    Caution::new(
        Level::Notice,
        format!(
            "The {} is vented outdoors: no room atmosphere is computed. Check that the outlet discharges away from doors, air intakes, pits and where people work.",
            model.gas().name
        ),
    )
}
