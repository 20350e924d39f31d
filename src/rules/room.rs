//! Where the vented gas goes: the room it is vented into, as one well-mixed volume at
//! ambient pressure with fresh air blowing through, and what its atmosphere does.
//!
//! The released gas enters at the rate the vent's time series gives; fresh air enters at the
//! ventilation rate; the mixture leaves as fast as the two enter, so the room holds a
//! constant N = p·V/(R·T) moles. With x the released gas's mole fraction,
//! N·dx/dt = ṅ_in − (ṅ_in + ṅ_air)·x. The inflow is constant between the time series'
//! samples, so each interval is solved exactly (an exponential), and after the vent the gas
//! decays as exp(−ṅ_air·t/N): no step size enters the result.

use serde::Serialize;
use uom::si::f64::{Length, Mass, Pressure, ThermodynamicTemperature, Time, Volume};
use uom::si::{
    mass::kilogram, pressure::pascal, thermodynamic_temperature::kelvin, time::second,
    volume::cubic_meter,
};

use crate::gas::{Gas, MOLAR_GAS_CONSTANT};

/// Oxygen's mole fraction in dry air.
///
/// source: the CIPM-2007 dry-air composition (Picard et al., Metrologia 45, 2008), 0.209 39
/// with 400 µmol/mol CO2; the usual 20.95 % of safety texts is taken.
pub const AIR_OXYGEN: f64 = 0.2095;

/// Below this oxygen fraction an atmosphere is oxygen-deficient.
///
/// source: US OSHA 29 CFR 1910.146(b), "oxygen deficient atmosphere".
pub const OXYGEN_DEFICIENT: f64 = 0.195;

/// Below this oxygen fraction people's judgement and coordination suffer.
///
/// source: EIGA Doc 44, hazards of inert gases and oxygen depletion, its table of
/// physiological effects (from memory): 18 % and below, impaired attention and coordination.
pub const OXYGEN_IMPAIRING: f64 = 0.18;

/// Below this oxygen fraction people lose consciousness within minutes and can die.
///
/// source: EIGA Doc 44, the same table (from memory): 10 % and below, loss of
/// consciousness, death.
pub const OXYGEN_LETHAL: f64 = 0.10;

/// Above this oxygen fraction an atmosphere is oxygen-enriched: fire starts easily and
/// burns fiercely.
///
/// source: US OSHA 29 CFR 1910.146(b), "oxygen enriched atmosphere".
pub const OXYGEN_ENRICHED: f64 = 0.235;

/// A flammable gas above this share of its lower flammable limit makes an atmosphere
/// hazardous for people to work in.
///
/// source: US OSHA 29 CFR 1910.146(b), "hazardous atmosphere" (1): flammable gas in excess
/// of 10 percent of its LFL.
pub const LFL_SHARE_LIMIT: f64 = 0.10;

/// Carbon dioxide's short-term (15 min) and 8-hour exposure limits, mole fractions.
///
/// source: ACGIH threshold limit values for carbon dioxide (from memory): STEL 30 000 ppm,
/// TLV-TWA 5 000 ppm.
pub const CO2_LIMITS: (f64, f64) = (0.03, 0.005);

/// Lower flammable limit in air, mole fraction, for the flammable gases.
///
/// source: IEC 60079-20-1 (from memory): hydrogen 4.0 %, methane 4.4 %.
pub fn lower_flammable_limit(gas: &Gas) -> Option<f64> {
    match gas.name {
        "hydrogen" => Some(0.040),
        "methane" => Some(0.044),
        _ => None,
    }
}

/// The room's fresh air.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Ventilation {
    /// Air changes per hour: the room's volume of fresh air this many times an hour.
    AirChanges(f64),
    /// A fresh-air flow, m³/s.
    Flow(f64),
}

/// A room a vessel is vented into.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Room {
    /// Its free volume.
    pub volume: Volume,
    /// Its fresh air (`AirChanges(0.0)`: a closed room).
    pub ventilation: Ventilation,
    /// Its air's temperature; the vented gas is taken to warm to it.
    pub temperature: ThermodynamicTemperature,
    /// Its pressure, absolute: the ambient the vessel vents to.
    pub pressure: Pressure,
}

impl Room {
    /// Fresh air, m³/s.
    pub fn fresh_air(&self) -> f64 {
        match self.ventilation {
            Ventilation::AirChanges(n) => n * self.volume.get::<cubic_meter>() / 3600.0,
            Ventilation::Flow(q) => q,
        }
    }

    /// Air changes per hour.
    pub fn air_changes(&self) -> f64 {
        self.fresh_air() * 3600.0 / self.volume.get::<cubic_meter>()
    }
}

/// What a vent does to the room's atmosphere.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RoomRelease {
    /// The room's free volume, m³.
    #[serde(rename = "room_volume_m3")]
    pub room_volume: Volume,
    /// Fresh air as given: `{"air-changes": n}` per hour or `{"flow": q}` in m³/s.
    pub ventilation: Ventilation,
    /// Fresh air, air changes per hour.
    pub air_changes_per_h: f64,
    /// The gas vented into the room.
    #[serde(rename = "released_mass_kg")]
    pub released_mass: Mass,
    /// The highest mole fraction of the vented gas in the room.
    pub peak_gas_fraction: f64,
    /// The lowest oxygen fraction (absent for oxygen, which enriches).
    pub min_oxygen_fraction: Option<f64>,
    /// The highest oxygen fraction, for oxygen.
    pub max_oxygen_fraction: Option<f64>,
    /// Time with the oxygen below 19.5 %, s (null when it does not end: a closed room).
    #[serde(rename = "time_below_19_5_percent_s")]
    pub time_deficient: Option<Time>,
    /// Time with the oxygen below 18 %, s (null when it does not end).
    #[serde(rename = "time_below_18_percent_s")]
    pub time_impairing: Option<Time>,
    /// The gas's lower flammable limit in air, mole fraction, for hydrogen and methane.
    pub lower_flammable_limit: Option<f64>,
    /// The highest share of the lower flammable limit, for hydrogen and methane.
    pub peak_flammable_fraction_of_lfl: Option<f64>,
    /// The highest carbon dioxide fraction, for carbon dioxide.
    pub peak_co2_fraction: Option<f64>,
    /// Whether the atmosphere stays within every limit throughout.
    pub within_limits: bool,
    /// From the vent's start until the atmosphere is back within its limits, s: zero when
    /// it never leaves them, null when it never comes back (no ventilation).
    #[serde(rename = "recovery_time_s")]
    pub recovery_time: Option<Time>,
    /// The least ventilation, air changes per hour, that keeps the room within its limits
    /// for this vent: zero where the room stays within them closed, null when even
    /// 10 000 /h does not.
    pub ventilation_needed_per_h: Option<f64>,
    /// The largest factor on the vent's flow area (the orifice's Cd·A) that keeps the room
    /// within its limits at the given ventilation, the vent's time series scaled as a
    /// quasi-steady vent scales (times as 1/A); null where no factor between a thousandth
    /// and a thousand changes the answer (a closed room holds all the gas whatever the rate).
    pub largest_area_factor: Option<f64>,
    /// The room's atmosphere over the vent and its clearing after.
    pub samples: Vec<RoomSample>,
}

/// One moment of the room's atmosphere.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct RoomSample {
    /// Time from the vent's start.
    #[serde(rename = "time_s")]
    pub time: Time,
    /// The vented gas's mole fraction.
    pub gas_fraction: f64,
    /// The oxygen's mole fraction.
    pub oxygen_fraction: f64,
}

impl RoomRelease {
    /// The largest orifice that keeps the room within its limits, for a vent through
    /// `orifice`: scaled by the square root of the area factor, at the same Cd.
    pub fn largest_orifice(&self, orifice: Length) -> Option<Length> {
        Some(orifice * self.largest_area_factor?.sqrt())
    }
}

/// The highest ventilation the search for the ventilation needed tries, air changes per
/// hour: beyond it the answer is to vent elsewhere.
const MOST_AIR_CHANGES: f64 = 10_000.0;

/// The room's atmosphere while `gas` is vented into `room`, `released` giving the time (s)
/// and the mass vented so far (kg) at each sample of the vent, in order.
pub fn release(gas: &Gas, room: &Room, released: &[(f64, f64)]) -> RoomRelease {
    let run = Mixing::new(gas, room, released);
    let limits = Limits::of(gas);
    let history = run.history();
    let peak = history.iter().map(|p| p.1).fold(0.0, f64::max);
    let oxygen = |x: f64| AIR_OXYGEN * (1.0 - x) + limits.own_oxygen * x;
    let lfl = lower_flammable_limit(gas);
    let enriches = limits.own_oxygen > AIR_OXYGEN;
    let depletes = limits.own_oxygen < AIR_OXYGEN;
    let below = |o2: f64| -> Option<Time> {
        let t = if depletes {
            run.time_above(gas_fraction_at_oxygen(o2, limits.own_oxygen))?
        } else {
            0.0
        };
        Some(Time::new::<second>(t))
    };
    let ventilation_needed = run.ventilation_needed(&limits);
    RoomRelease {
        room_volume: room.volume,
        ventilation: room.ventilation,
        air_changes_per_h: room.air_changes(),
        released_mass: Mass::new::<kilogram>(released.last().map_or(0.0, |r| r.1)),
        peak_gas_fraction: peak,
        min_oxygen_fraction: (!enriches).then(|| oxygen(peak)),
        max_oxygen_fraction: enriches.then(|| oxygen(peak)),
        time_deficient: below(OXYGEN_DEFICIENT),
        time_impairing: below(OXYGEN_IMPAIRING),
        lower_flammable_limit: lfl,
        peak_flammable_fraction_of_lfl: lfl.map(|l| peak / l),
        peak_co2_fraction: (gas.name == "carbon-dioxide").then_some(peak),
        within_limits: peak <= limits.gas_fraction,
        recovery_time: run.recovery(limits.gas_fraction).map(Time::new::<second>),
        ventilation_needed_per_h: ventilation_needed,
        largest_area_factor: largest_area_factor(gas, room, released, &limits),
        samples: run
            .with_decay(history)
            .into_iter()
            .map(|(t, x)| RoomSample {
                time: Time::new::<second>(t),
                gas_fraction: x,
                oxygen_fraction: oxygen(x),
            })
            .collect(),
    }
}

/// The range of flow-area factors searched for the largest that keeps the room within its
/// limits.
const AREA_FACTORS: (f64, f64) = (1e-3, 1e3);

/// The largest factor on the vent's flow area within [`AREA_FACTORS`] that keeps the room
/// within `limits`: a quasi-steady vent through k times the area passes the same gas in
/// 1/k of the time.
fn largest_area_factor(
    gas: &Gas,
    room: &Room,
    released: &[(f64, f64)],
    limits: &Limits,
) -> Option<f64> {
    let within = |k: f64| {
        let scaled: Vec<(f64, f64)> = released.iter().map(|&(t, m)| (t / k, m)).collect();
        let run = Mixing::new(gas, room, &scaled);
        run.within(limits, run.ventilation)
    };
    let (lo, hi) = AREA_FACTORS;
    // A faster vent only raises the peak: the answer is a crossing, if there is one.
    if within(hi) || !within(lo) {
        return None;
    }
    let (mut a, mut b) = (lo.ln(), hi.ln());
    while b - a > 1e-4 {
        let mid = 0.5 * (a + b);
        if within(mid.exp()) {
            a = mid;
        } else {
            b = mid;
        }
    }
    Some(a.exp())
}

/// The vented gas's mole fraction at which the oxygen fraction is `o2`, the gas itself
/// carrying `own` oxygen.
fn gas_fraction_at_oxygen(o2: f64, own: f64) -> f64 {
    (AIR_OXYGEN - o2) / (AIR_OXYGEN - own)
}

/// The highest mole fraction of the vented gas the room may reach: the tightest of its
/// limits.
struct Limits {
    /// The oxygen the vented gas carries, mole fraction.
    own_oxygen: f64,
    /// The vented gas's highest acceptable mole fraction.
    gas_fraction: f64,
}

impl Limits {
    fn of(gas: &Gas) -> Limits {
        let own_oxygen = match gas.name {
            "air" => AIR_OXYGEN,
            "oxygen" => 1.0,
            _ => 0.0,
        };
        let mut gas_fraction: f64 = 1.0;
        if own_oxygen < AIR_OXYGEN {
            gas_fraction = gas_fraction.min(gas_fraction_at_oxygen(OXYGEN_DEFICIENT, own_oxygen));
        }
        if own_oxygen > AIR_OXYGEN {
            gas_fraction = gas_fraction.min(gas_fraction_at_oxygen(OXYGEN_ENRICHED, own_oxygen));
        }
        if let Some(l) = lower_flammable_limit(gas) {
            gas_fraction = gas_fraction.min(LFL_SHARE_LIMIT * l);
        }
        if gas.name == "carbon-dioxide" {
            gas_fraction = gas_fraction.min(CO2_LIMITS.0);
        }
        Limits {
            own_oxygen,
            gas_fraction,
        }
    }
}

/// The mixing problem in SI: the room's moles, the fresh air's molar flow, and the vented
/// gas's molar inflow over each interval of the vent.
struct Mixing {
    /// Moles of gas the room holds.
    moles: f64,
    /// Fresh air, mol/s.
    ventilation: f64,
    /// (start s, end s, molar inflow mol/s) for each interval of the vent.
    intervals: Vec<(f64, f64, f64)>,
}

impl Mixing {
    fn new(gas: &Gas, room: &Room, released: &[(f64, f64)]) -> Mixing {
        let t = room.temperature.get::<kelvin>();
        let molar_volume = MOLAR_GAS_CONSTANT * t / room.pressure.get::<pascal>();
        let intervals = released
            .windows(2)
            .filter(|w| w[1].0 > w[0].0)
            .map(|w| {
                let moles = (w[1].1 - w[0].1).max(0.0) / gas.molar_mass_kg_per_mol;
                (w[0].0, w[1].0, moles / (w[1].0 - w[0].0))
            })
            .collect();
        Mixing {
            moles: room.volume.get::<cubic_meter>() / molar_volume,
            ventilation: room.fresh_air() / molar_volume,
            intervals,
        }
    }

    /// The fraction after `dt` s from `x` with `inflow` mol/s entering and `air` mol/s of
    /// fresh air.
    fn step(&self, x: f64, inflow: f64, air: f64, dt: f64) -> f64 {
        let b = (inflow + air) / self.moles;
        if b <= 0.0 {
            return x;
        }
        let settles = inflow / (inflow + air);
        settles + (x - settles) * (-b * dt).exp()
    }

    /// (time s, fraction) at the end of each interval, with fresh air `air` mol/s, from an
    /// empty start.
    fn history_with(&self, air: f64) -> Vec<(f64, f64)> {
        let mut x = 0.0;
        let mut out = vec![(self.intervals.first().map_or(0.0, |i| i.0), 0.0)];
        for &(t0, t1, inflow) in &self.intervals {
            x = self.step(x, inflow, air, t1 - t0);
            out.push((t1, x));
        }
        out
    }

    fn history(&self) -> Vec<(f64, f64)> {
        self.history_with(self.ventilation)
    }

    /// `history` with the clearing after the vent: forty points over three of the fresh
    /// air's time constants, or over as long again as the vent without fresh air.
    fn with_decay(&self, mut history: Vec<(f64, f64)>) -> Vec<(f64, f64)> {
        let Some(&(end, x)) = history.last() else {
            return history;
        };
        let span = if self.ventilation > 0.0 {
            3.0 * self.moles / self.ventilation
        } else {
            (end - history[0].0).max(1.0)
        };
        let rate = self.ventilation / self.moles;
        history.extend((1..=40).map(|i| {
            let dt = span * i as f64 / 40.0;
            (end + dt, x * (-rate * dt).exp())
        }));
        history
    }

    /// Whether the fraction stays at or below the limits' with fresh air `air` mol/s. The
    /// fraction can only fall once the vent ends, and within an interval it moves
    /// monotonically towards its settling value, so the interval ends hold the peak.
    fn within(&self, limits: &Limits, air: f64) -> bool {
        self.history_with(air)
            .iter()
            .all(|p| p.1 <= limits.gas_fraction)
    }

    /// Time with the fraction above `limit`, s, over the vent and the decay after it;
    /// `None` when the decay never brings it down (no fresh air).
    fn time_above(&self, limit: f64) -> Option<f64> {
        let mut x = 0.0;
        let mut total = 0.0;
        for &(t0, t1, inflow) in &self.intervals {
            let next = self.step(x, inflow, self.ventilation, t1 - t0);
            total += self.part_above(x, inflow, t1 - t0, limit);
            x = next;
        }
        self.decay_time(x, limit).map(|t| total + t)
    }

    /// Within one interval from `x` with `inflow` over `dt`, the time spent above `limit`.
    fn part_above(&self, x: f64, inflow: f64, dt: f64, limit: f64) -> f64 {
        let end = self.step(x, inflow, self.ventilation, dt);
        match (x > limit, end > limit) {
            (false, false) => 0.0,
            (true, true) => dt,
            _ => {
                // The crossing of an exponential approach to `settles`.
                let b = (inflow + self.ventilation) / self.moles;
                let settles = inflow / (inflow + self.ventilation);
                let crossing = -((limit - settles) / (x - settles)).ln() / b;
                let crossing = crossing.clamp(0.0, dt);
                if x > limit {
                    crossing
                } else {
                    dt - crossing
                }
            }
        }
    }

    /// After the vent, the time for fresh air to bring the fraction from `x` down to
    /// `limit`, s; `None` without fresh air.
    fn decay_time(&self, x: f64, limit: f64) -> Option<f64> {
        if x <= limit {
            return Some(0.0);
        }
        (self.ventilation > 0.0).then(|| (x / limit).ln() * self.moles / self.ventilation)
    }

    /// From the vent's start until the fraction is at or below `limit` for good, s.
    fn recovery(&self, limit: f64) -> Option<f64> {
        let history = self.history();
        let Some(last_above) = history.iter().rposition(|p| p.1 > limit) else {
            return Some(0.0);
        };
        if last_above + 1 < history.len() {
            // It falls back below the limit before the vent ends: within the next interval.
            let (t0, x) = history[last_above];
            let (_, t1, inflow) = self.intervals[last_above];
            return Some(t0 + self.part_above(x, inflow, t1 - t0, limit));
        }
        let (end, x) = history[history.len() - 1];
        self.decay_time(x, limit).map(|t| end + t)
    }

    /// The least fresh air, air changes per hour, that keeps the fraction within the limit:
    /// zero where a closed room stays within it.
    fn ventilation_needed(&self, limits: &Limits) -> Option<f64> {
        let per_change = self.moles / 3600.0;
        if self.within(limits, 0.0) {
            return Some(0.0);
        }
        if !self.within(limits, MOST_AIR_CHANGES * per_change) {
            return None;
        }
        // More air only lowers the fraction: bisect on the air changes.
        let (mut lo, mut hi) = (0.0, MOST_AIR_CHANGES);
        for _ in 0..60 {
            let mid = 0.5 * (lo + hi);
            if self.within(limits, mid * per_change) {
                hi = mid;
            } else {
                lo = mid;
            }
            if hi - lo < 1e-3 * hi {
                break;
            }
        }
        Some(hi)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    fn room(volume_m3: f64, air_changes: f64) -> Room {
        Room {
            volume: Volume::new::<cubic_meter>(volume_m3),
            ventilation: Ventilation::AirChanges(air_changes),
            temperature: ThermodynamicTemperature::new::<kelvin>(293.15),
            pressure: Pressure::new::<pascal>(101_325.0),
        }
    }

    /// `kg` of gas released evenly over `seconds`, in `n` samples.
    fn even(kg: f64, seconds: f64, n: usize) -> Vec<(f64, f64)> {
        (0..=n)
            .map(|i| {
                let f = i as f64 / n as f64;
                (f * seconds, f * kg)
            })
            .collect()
    }

    /// The volume `kg` of `gas` takes in the room, m³ (ideal gas at 1 atm, 20 °C).
    fn gas_volume(gas: &Gas, kg: f64) -> f64 {
        kg / gas.molar_mass_kg_per_mol * MOLAR_GAS_CONSTANT * 293.15 / 101_325.0
    }

    #[test]
    fn a_closed_room_lies_between_displacement_and_full_mixing() {
        // Nitrogen from a 50 L cylinder at 200 bar (about 11.5 kg) into a 60 m³ closed room.
        let n2 = Gas::find("nitrogen").unwrap();
        let r = release(n2, &room(60.0, 0.0), &even(11.5, 120.0, 50));
        let vg = gas_volume(n2, 11.5) / 60.0;
        let o2 = r.min_oxygen_fraction.unwrap();
        // Displacement without mixing (conservative) and the well-mixed form.
        assert!(o2 >= AIR_OXYGEN * (1.0 - vg), "{o2}");
        assert_relative_eq!(o2, AIR_OXYGEN * (-vg).exp(), max_relative = 1e-9);
        // A closed room never recovers.
        assert_eq!(r.recovery_time, None);
        assert!(!r.within_limits);
        assert_eq!(r.time_deficient, None);
    }

    #[test]
    fn a_release_a_closed_room_holds_within_its_limits_needs_no_ventilation() {
        // 0.1 kg of nitrogen in 60 m³ lowers the oxygen by about 0.03 percentage points.
        let n2 = Gas::find("nitrogen").unwrap();
        let r = release(n2, &room(60.0, 2.0), &even(0.1, 60.0, 20));
        assert!(r.within_limits);
        assert_eq!(r.ventilation_needed_per_h, Some(0.0));
        // Air vented into a room leaves its oxygen as it was.
        let air = Gas::find("air").unwrap();
        let r = release(air, &room(60.0, 2.0), &even(50.0, 60.0, 20));
        assert_eq!(r.ventilation_needed_per_h, Some(0.0));
    }

    #[test]
    fn ventilation_raises_the_lowest_oxygen_and_the_room_recovers() {
        let n2 = Gas::find("nitrogen").unwrap();
        let released = even(11.5, 600.0, 100);
        let mut last = 0.0;
        for ach in [0.0, 1.0, 5.0, 20.0] {
            let r = release(n2, &room(60.0, ach), &released);
            let o2 = r.min_oxygen_fraction.unwrap();
            assert!(o2 > last, "{ach} /h: {o2}");
            last = o2;
            if ach > 0.0 {
                assert!(r.recovery_time.is_some());
            }
        }
        // The ventilation needed keeps it just within the limit.
        let r = release(n2, &room(60.0, 0.0), &released);
        let needed = r.ventilation_needed_per_h.unwrap();
        let at = release(n2, &room(60.0, needed), &released);
        assert!(at.within_limits);
        assert!(at.min_oxygen_fraction.unwrap() < OXYGEN_DEFICIENT + 2e-4);
        let below = release(n2, &room(60.0, needed * 0.99), &released);
        assert!(!below.within_limits);
        // With some fresh air, a small enough orifice keeps the room within its limits: at
        // the largest, the released series run that much slower just stays within them.
        let r = release(n2, &room(60.0, 2.0), &released);
        let k = r.largest_area_factor.unwrap();
        assert!(k < 1.0, "{k}");
        let slower =
            |f: f64| -> Vec<(f64, f64)> { released.iter().map(|&(t, m)| (t / f, m)).collect() };
        assert!(release(n2, &room(60.0, 2.0), &slower(k * 0.999)).within_limits);
        assert!(!release(n2, &room(60.0, 2.0), &slower(k * 1.01)).within_limits);
        // A closed room holds all the gas whatever the rate: no orifice changes it.
        assert_eq!(
            release(n2, &room(60.0, 0.0), &released).largest_area_factor,
            None
        );
    }

    #[test]
    fn the_exact_intervals_agree_with_a_fine_explicit_integration() {
        let h2 = Gas::find("hydrogen").unwrap();
        let rm = room(30.0, 2.0);
        let released = even(0.05, 300.0, 10);
        let r = release(h2, &rm, &released);
        // Euler with a 0.01 s step on the same problem.
        let m = Mixing::new(h2, &rm, &released);
        let mut x: f64 = 0.0;
        let mut peak: f64 = 0.0;
        for &(t0, t1, inflow) in &m.intervals {
            let steps = ((t1 - t0) / 0.01).round() as usize;
            for _ in 0..steps {
                x += 0.01 * (inflow - (inflow + m.ventilation) * x) / m.moles;
                peak = peak.max(x);
            }
        }
        assert_relative_eq!(r.peak_gas_fraction, peak, max_relative = 1e-4);
        let lfl = r.peak_flammable_fraction_of_lfl.unwrap();
        assert_relative_eq!(lfl, peak / 0.04, max_relative = 1e-4);
    }

    #[test]
    fn air_changes_nothing_and_oxygen_enriches() {
        let air = Gas::find("air").unwrap();
        let r = release(air, &room(20.0, 0.0), &even(20.0, 60.0, 5));
        assert_relative_eq!(
            r.min_oxygen_fraction.unwrap(),
            AIR_OXYGEN,
            max_relative = 1e-12
        );
        assert!(r.within_limits);
        assert_eq!(r.recovery_time, Some(Time::new::<second>(0.0)));
        let o2 = Gas::find("oxygen").unwrap();
        let r = release(o2, &room(20.0, 0.0), &even(2.0, 60.0, 5));
        assert!(r.max_oxygen_fraction.unwrap() > OXYGEN_ENRICHED);
        assert_eq!(r.min_oxygen_fraction, None);
        assert!(!r.within_limits);
        // Carbon dioxide is judged on its own exposure limit before the oxygen.
        let co2 = Gas::find("carbon-dioxide").unwrap();
        let r = release(co2, &room(100.0, 0.0), &even(3.0, 60.0, 5));
        assert!(r.peak_co2_fraction.unwrap() < CO2_LIMITS.0);
        assert!(r.within_limits);
    }
}
