//! Blow-down of a vessel through an orifice: time to a target pressure, time while choked,
//! final gas temperature, and the inverse (the orifice that vents in a given time).

use serde::Serialize;
use uom::si::f64::{
    Area, Length, Mass, MassDensity, MassRate, Pressure, ThermodynamicTemperature, Time, Volume,
};
use uom::si::{
    area::square_meter, length::meter, mass_density::kilogram_per_cubic_meter,
    mass_flux::kilogram_per_square_meter_second, pressure::pascal, time::second,
    volume::cubic_meter,
};

use super::{
    check_positive, check_temperature, gas_cautions, gas_error, user_state, MAX_VOLUME_M3,
};
use crate::caution::{Assessed, Note};
use crate::gas::{GasModel, State, Throat};
use crate::units::fmt_sig;
use crate::InputError;

/// Discharge coefficient of a sharp-edged orifice, the default (Perry's, ch. 10).
pub const SHARP_EDGED_CD: f64 = 0.61;
/// Smallest orifice accepted, m (0.01 mm: below it the flow is no longer an orifice flow).
pub const MIN_ORIFICE_M: f64 = 1.0e-5;
/// Largest orifice accepted, m.
pub const MAX_ORIFICE_M: f64 = 5.0;
/// The default target is ambient plus this fraction of it: at ambient itself the flow stops.
pub const DEFAULT_TARGET_MARGIN: f64 = 0.01;

/// How the gas left in the vessel behaves while it vents.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, serde::Deserialize, clap::ValueEnum)]
#[serde(rename_all = "lowercase")]
pub enum Process {
    /// No heat from the wall: the coldest gas.
    Isentropic,
    /// The wall keeps the gas at its starting temperature.
    Isothermal,
}

/// What the blow-down rule needs.
#[derive(Debug, Clone, PartialEq)]
pub struct VentInput {
    /// Gas volume of the vessel.
    pub volume: Volume,
    /// Absolute starting pressure.
    pub pressure: Pressure,
    /// Starting gas temperature.
    pub temperature: ThermodynamicTemperature,
    /// Absolute pressure the orifice discharges to.
    pub ambient: Pressure,
    /// Orifice diameter; `None` with `within` asks only for the orifice needed.
    pub orifice: Option<Length>,
    /// Discharge coefficient, 0 < Cd ≤ 1.
    pub cd: f64,
    /// Absolute pressure at which venting counts as done.
    pub down_to: Pressure,
    /// The process the gas in the vessel follows.
    pub process: Process,
    /// Minimum design metal temperature, if known.
    pub min_metal_temperature: Option<ThermodynamicTemperature>,
    /// Time within which the vent must reach the target, for the inverse.
    pub within: Option<Time>,
}

/// Number of segments the vent history is sampled in (plus the choke point).
const HISTORY_SEGMENTS: usize = 32;

/// Relative tolerance of the vent-time quadrature.
const VENT_RTOL: f64 = 1e-8;

/// Nozzle evaluations the vent-time quadrature may take in all. A smooth path needs a few
/// hundred (tens per segment). A two-phase nozzle from a dense supercritical state costs up
/// to about 9 ms (measured on the project's machine, `opt-level = 1`): this bounds the
/// quadrature to a few seconds on any path.
pub const VENT_EVALUATIONS: usize = 800;

/// The error estimate within which a vent time that ran out of evaluations stands as it is:
/// a hundred-thousandth of the time, far inside the method's own uncertainty.
const VENT_ACCEPT_RTOL: f64 = 1e-5;

/// The error estimate up to which a vent time that ran out of evaluations is still given,
/// with a CAUTION; above it the vent time is not resolved.
const VENT_GIVEN_RTOL: f64 = 1e-3;

/// Why a vent's quadrature runs out of evaluations.
const UNSMOOTH: &str = "the nozzle flux changes abruptly along this vent's path (the expanding gas meets the two-phase region close to its critical point, where the flow's properties change steeply and the model's phase boundary ends)";

/// One moment of the vent-down.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct VentSample {
    /// Time since the vent opened.
    #[serde(rename = "time_s")]
    pub time: Time,
    /// Absolute pressure in the vessel.
    #[serde(rename = "pressure_pa")]
    pub pressure: Pressure,
    /// Gas temperature in the vessel.
    #[serde(rename = "temperature_k")]
    pub temperature: ThermodynamicTemperature,
}

/// What the blow-down rule computes.
#[derive(Debug, Clone, PartialEq)]
pub struct VentResult {
    /// Time to reach the target through the given orifice (`None` without one).
    pub time: Option<Time>,
    /// Part of that time with the orifice choked.
    pub choked_time: Option<Time>,
    /// The gas's state at the target pressure.
    pub end: State,
    /// Mass of gas vented.
    pub mass_vented: Mass,
    /// Mass flow at the start (the largest), through the given orifice.
    pub initial_mass_flow: Option<MassRate>,
    /// Orifice diameter that reaches the target in `within`, at the same Cd.
    pub required_orifice: Option<Length>,
    /// Pressure and temperature against time through the given orifice (empty without one).
    pub history: Vec<VentSample>,
}

/// Quasi-steady blow-down: the gas in the vessel follows `process` while an isentropic
/// nozzle of effective area Cd·A discharges it, so V·dρ/dt = −Cd·A·G(ρ) and
/// t = V/(Cd·A) · ∫ dρ/G(ρ) from the final to the initial density.
///
/// The integral is done numerically for both the choked and the subsonic part, so the same
/// code serves any gas model; for the ideal gas the choked part matches the closed forms
/// (Bar-Meir, Fundamentals of Compressible Fluid Mechanics, ch. 11) to 1e-9 (see tests).
pub fn blow_down(
    model: &dyn GasModel,
    input: &VentInput,
) -> Result<Assessed<VentResult>, InputError> {
    check_positive(
        "volume",
        input.volume.get::<cubic_meter>(),
        "m3",
        MAX_VOLUME_M3,
    )?;
    if !(input.cd.is_finite() && input.cd > 0.0 && input.cd <= 1.0) {
        return Err(InputError::new(
            "cd",
            input.cd.to_string(),
            "a discharge coefficient lies in (0, 1]; accepted: e.g. 0.61 (sharp-edged orifice), 0.97 (well-rounded nozzle)",
        ));
    }
    if let Some(t) = input.min_metal_temperature {
        check_temperature("min-metal-temperature", t)?;
    }
    if let Some(d) = input.orifice {
        if !(d.get::<meter>() >= MIN_ORIFICE_M && d.get::<meter>() <= MAX_ORIFICE_M) {
            return Err(InputError::new(
                "orifice",
                format!("{} mm", d.get::<meter>() * 1e3),
                "must be above zero, from 0.01 mm to 5 m; accepted: an orifice diameter in that range",
            ));
        }
    }
    if let Some(t) = input.within {
        check_positive("within", t.get::<second>(), "s", 1.0e8)?;
    }
    if input.orifice.is_none() && input.within.is_none() {
        return Err(InputError::new(
            "orifice",
            "(none)",
            "give the orifice diameter, or --within for the orifice that vents in that time",
        ));
    }
    if input.down_to <= input.ambient {
        return Err(InputError::new(
            "down-to",
            format!("{} kPa(a)", fmt_sig(input.down_to.get::<pascal>() / 1e3, 6)),
            format!(
                "venting to atmosphere cannot reach or pass ambient ({} kPa(a)); accepted: a pressure above ambient (the default is ambient + 1 %)",
                fmt_sig(input.ambient.get::<pascal>() / 1e3, 6)
            ),
        ));
    }
    let start = user_state(
        model,
        ("pressure", "temperature"),
        input.pressure,
        input.temperature,
    )?;
    let (cautions, mut basis) = gas_cautions(model, &start);
    let path = Path {
        model,
        process: input.process,
        start,
        entropy: model.entropy(&start),
        regimes: Default::default(),
    };
    let ambient = input.ambient;
    let mass = |rho: MassDensity| rho * input.volume;

    if input.pressure <= input.down_to {
        basis.push(Note::new(
            "vent process",
            "The vessel is already at or below the target pressure: nothing to vent.",
        ));
        let value = VentResult {
            time: input.orifice.map(|_| Time::new::<second>(0.0)),
            choked_time: input.orifice.map(|_| Time::new::<second>(0.0)),
            end: start,
            mass_vented: mass(start.density) * 0.0,
            initial_mass_flow: None,
            required_orifice: None,
            history: Vec::new(),
        };
        return Ok(Assessed {
            value,
            cautions,
            basis,
        });
    }

    let end = path.at_pressure(input.down_to)?;
    let choke_density = path.choke_boundary(end.density, ambient);
    // Densities from the start to the end, evenly in ln ρ, with the choke point among them
    // so the choked time is a partial sum; each segment is integrated to 1e-8.
    let (rho0, rho_end) = (
        start.density.get::<kilogram_per_cubic_meter>(),
        end.density.get::<kilogram_per_cubic_meter>(),
    );
    let rho_choke = choke_density.get::<kilogram_per_cubic_meter>();
    let mut densities: Vec<f64> = (0..=HISTORY_SEGMENTS)
        .map(|i| rho0 * (rho_end / rho0).powf(i as f64 / HISTORY_SEGMENTS as f64))
        .collect();
    if rho_choke < rho0 && rho_choke > rho_end {
        densities.push(rho_choke);
        densities.sort_by(|a, b| b.total_cmp(a));
    }
    // Times for an effective area Cd·A of 1 m²; the real ones scale as 1/(Cd·A). The
    // segments share one budget of nozzle evaluations, each leaving the later ones their
    // first interval.
    let inverse_flux = |rho: f64| {
        path.state(MassDensity::new::<kilogram_per_cubic_meter>(rho))
            .map_or(f64::NAN, |st| {
                1.0 / model
                    .nozzle(&st, ambient)
                    .mass_flux
                    .get::<kilogram_per_square_meter_second>()
            })
    };
    // Below the choke point the flux falls as √(p − pa) towards ambient, so 1/flux rises
    // steeply near the end. Over u = √(ρ − ρa), with ρa the path's density at ambient, the
    // integrand 2u/flux is smooth and the quadrature needs far fewer nozzle evaluations.
    let rho_ambient = path
        .at_pressure(ambient)
        .ok()
        .map(|s| s.density.get::<kilogram_per_cubic_meter>())
        .filter(|r| r.is_finite() && *r > 0.0 && *r < rho_end);
    let density = MassDensity::new::<kilogram_per_cubic_meter>;
    let quadrature = |lo: f64, hi: f64, budget: usize| match rho_ambient.filter(|_| hi <= rho_choke)
    {
        Some(ra) => crate::solve::integrate(
            |u: f64| 2.0 * u * inverse_flux(ra + u * u),
            (lo - ra).sqrt(),
            (hi - ra).sqrt(),
            VENT_RTOL,
            budget,
        ),
        None => crate::solve::integrate(inverse_flux, lo, hi, VENT_RTOL, budget),
    };
    let segments = densities.len() - 1;
    let (mut spent, mut error) = (0, 0.0);
    let mut elapsed = vec![0.0];
    for (k, pair) in densities.windows(2).enumerate() {
        let reserve = (segments - k - 1) * crate::solve::KRONROD_POINTS;
        let budget = VENT_EVALUATIONS.saturating_sub(spent + reserve);
        let q = split_at_kinks(
            &quadrature,
            &|lo, hi| path.regime_change(lo, hi, ambient),
            (pair[1], pair[0]),
            (pair[1], pair[0]),
            budget,
            REGIME_SPLITS,
        );
        spent += q.evaluations;
        error += q.error * input.volume.get::<cubic_meter>();
        let last = elapsed[elapsed.len() - 1];
        elapsed.push(last + input.volume.get::<cubic_meter>() * q.value);
    }
    let total_unit = elapsed[elapsed.len() - 1];
    let choked_unit = densities
        .iter()
        .zip(&elapsed)
        .filter(|(rho, _)| **rho >= rho_choke)
        .map(|(_, t)| *t)
        .fold(0.0, f64::max);
    if !(total_unit.is_finite() && total_unit > 0.0) {
        return Err(InputError::new(
            "pressure",
            format!("{} kPa(a)", fmt_sig(input.pressure.get::<pascal>() / 1e3, 6)),
            "the vent-down could not be integrated for this state; accepted: a gas state within the model's range",
        ));
    }
    // The budget spent before the tolerance was met: the flux along the path is not smooth.
    let relative_error = error / total_unit;
    if relative_error > VENT_ACCEPT_RTOL {
        if relative_error > VENT_GIVEN_RTOL {
            return Err(InputError::new(
                "pressure",
                format!("{} kPa(a)", fmt_sig(input.pressure.get::<pascal>() / 1e3, 6)),
                format!(
                    "the vent time is not resolved: {UNSMOOTH}, and within {VENT_EVALUATIONS} nozzle evaluations its error estimate is still {} %; accepted: a state whose vent the model resolves (the wall heat-transfer run, --heat-transfer, integrates the same vent in time)",
                    fmt_sig(relative_error * 100.0, 2)
                ),
            ));
        }
        // An uncertainty this small changes no decision: a method note, not a banner.
        basis.push(Note::new(
            "vent time",
            format!(
                "The vent time is integrated to within {} % (its error estimate), not to the method's 0.001 %: {UNSMOOTH}, and the integration stops at {VENT_EVALUATIONS} nozzle evaluations.",
                fmt_sig(relative_error * 100.0, 2)
            ),
        ));
    }

    let effective_area =
        |d: Length| input.cd * std::f64::consts::PI / 4.0 * d.get::<meter>().powi(2);
    let time = input
        .orifice
        .map(|d| Time::new::<second>(total_unit / effective_area(d)));
    let choked_time = input
        .orifice
        .map(|d| Time::new::<second>(choked_unit / effective_area(d)));
    let initial_mass_flow = input.orifice.map(|d| {
        model.nozzle(&start, ambient).mass_flux * Area::new::<square_meter>(effective_area(d))
    });
    let required_orifice = input.within.map(|t| {
        let area = total_unit / t.get::<second>() / input.cd;
        Length::new::<meter>((4.0 * area / std::f64::consts::PI).sqrt())
    });
    let history = match input.orifice {
        Some(d) => densities
            .iter()
            .zip(&elapsed)
            .map(|(&rho, &t)| {
                path.state(density(rho)).map(|st| VentSample {
                    time: Time::new::<second>(t / effective_area(d)),
                    pressure: st.pressure,
                    temperature: st.temperature,
                })
            })
            .collect::<Result<Vec<_>, _>>()
            .map_err(gas_error("pressure"))?,
        None => Vec::new(),
    };
    let result = VentResult {
        time,
        choked_time,
        end,
        mass_vented: mass(start.density) - mass(end.density),
        initial_mass_flow,
        required_orifice,
        history,
    };
    basis.extend(vent_basis(input.process));
    Ok(Assessed {
        value: result,
        cautions,
        basis,
    })
}

/// The most evaluations [`Path::regime_change`] takes: both ends and seventeen halvings.
const LOCATING: usize = 19;

/// How many times one segment of the vent may be split where the flow changes regime: the
/// throat turning from gas to the dew point and to two phases, and the gas in the vessel
/// turning two-phase.
const REGIME_SPLITS: usize = 3;

/// ∫ over (lo, hi) by `quadrature` within `budget` evaluations: one interval first, which
/// settles a smooth stretch; where it does not, split where `change` finds the flow's regime
/// changing between the densities of `probe` (the interval's ends, less the sliver a split
/// leaves beside each kink), up to `splits` times, and integrate each side. The flux has a
/// kink there, which the quadrature's bisection would chase for a hundred evaluations. The
/// evaluations counted include those spent locating the change.
fn split_at_kinks(
    quadrature: &dyn Fn(f64, f64, usize) -> crate::solve::Quadrature,
    change: &dyn Fn(f64, f64) -> (Option<(f64, f64)>, usize),
    (lo, hi): (f64, f64),
    probe: (f64, f64),
    budget: usize,
    splits: usize,
) -> crate::solve::Quadrature {
    use crate::solve::KRONROD_POINTS;
    let first = quadrature(lo, hi, KRONROD_POINTS);
    if first.converged(VENT_RTOL) || budget < first.evaluations + 2 * KRONROD_POINTS {
        return first;
    }
    // Too little left to locate a change and integrate both sides: bisect as usual.
    let (at, located) = if splits > 0 && budget >= first.evaluations + LOCATING + 2 * KRONROD_POINTS
    {
        change(probe.0, probe.1)
    } else {
        (None, 0)
    };
    let spent = first.evaluations + located;
    let left = budget.saturating_sub(spent);
    let q = match at {
        // The kink lies between `below` and `mid`: the lower side is probed up to `below`,
        // so it does not find the same kink again at its end.
        Some((below, mid)) => {
            let upper = split_at_kinks(
                quadrature,
                change,
                (mid, hi),
                (mid, probe.1),
                left / 2,
                splits - 1,
            );
            let lower = split_at_kinks(
                quadrature,
                change,
                (lo, mid),
                (probe.0, below),
                left.saturating_sub(upper.evaluations),
                splits - 1,
            );
            crate::solve::Quadrature {
                value: upper.value + lower.value,
                error: upper.error + lower.error,
                evaluations: upper.evaluations + lower.evaluations,
            }
        }
        None => quadrature(lo, hi, left),
    };
    crate::solve::Quadrature {
        evaluations: q.evaluations + spent,
        ..q
    }
}

/// A vent's flow regime: whether the gas in the vessel is two-phase, and where the throat's
/// flow is.
type Regime = (bool, Throat);

/// The states the gas in the vessel passes through, by density.
struct Path<'a> {
    model: &'a dyn GasModel,
    process: Process,
    start: State,
    entropy: uom::si::f64::SpecificHeatCapacity,
    /// Each density's regime as first found (see [`Path::regime`]).
    regimes: std::cell::RefCell<Vec<(f64, Option<Regime>)>>,
}

impl Path<'_> {
    fn state(&self, rho: MassDensity) -> Result<State, crate::gas::GasError> {
        match self.process {
            Process::Isentropic => self.model.state_rho_s(rho, self.entropy),
            Process::Isothermal => self.model.state_rho_t(rho, self.start.temperature),
        }
    }

    fn at_pressure(&self, p: Pressure) -> Result<State, InputError> {
        match self.process {
            Process::Isentropic => self.model.state_p_s(p, self.entropy),
            Process::Isothermal => self.model.state_pt(p, self.start.temperature),
        }
        .map_err(gas_error("down-to"))
    }

    /// The flow's regime at density `rho`: whether the gas in the vessel is two-phase, and
    /// whether the nozzle's expansion reaches two phases by its throat. `None` where the
    /// model has no state.
    ///
    /// Each density's regime is kept as first found. Right at a boundary the answer can
    /// depend on where the nozzle's searches started; kept, a split's ends stay in the
    /// regimes the bisection found them in, and a side is not split again at its own end.
    fn regime(&self, rho: f64, ambient: Pressure) -> Option<Regime> {
        if let Some((_, r)) = self.regimes.borrow().iter().find(|(d, _)| *d == rho) {
            return *r;
        }
        let r = self
            .state(MassDensity::new::<kilogram_per_cubic_meter>(rho))
            .ok()
            .map(|st| (st.quality.is_some(), self.model.nozzle(&st, ambient).throat));
        self.regimes.borrow_mut().push((rho, r));
        r
    }

    /// Where between densities `lo` and `hi` the flow changes regime (see
    /// [`Path::regime`]): the last density found in `lo`'s regime and the first beyond it,
    /// by bisection on ln ρ to 1e-5 of the span, with the nozzle evaluations it took; `None`
    /// where both ends are in one regime (or the model has no state at one). A kink that
    /// close to an interval's end moves its integral by about the square of that, 1e-10:
    /// below the quadrature's tolerance.
    fn regime_change(&self, lo: f64, hi: f64, ambient: Pressure) -> (Option<(f64, f64)>, usize) {
        let (Some(low), Some(high)) = (self.regime(lo, ambient), self.regime(hi, ambient)) else {
            return (None, 2);
        };
        if low == high {
            return (None, 2);
        }
        // Seventeen halvings: 2⁻¹⁷ of the span is within 1e-5 of it.
        let halvings = LOCATING - 2;
        let bracket = bisect_ln((lo, hi), halvings, |rho| {
            self.regime(rho, ambient) == Some(low)
        });
        (Some(bracket), LOCATING)
    }

    /// The density below which the orifice is no longer choked, found by bisection on
    /// ln ρ between the final and the starting density (clamped to them).
    fn choke_boundary(&self, final_density: MassDensity, ambient: Pressure) -> MassDensity {
        let choked = |rho: f64| {
            self.state(MassDensity::new::<kilogram_per_cubic_meter>(rho))
                .is_ok_and(|st| self.model.nozzle(&st, ambient).choked)
        };
        let (lo, hi) = (
            final_density.get::<kilogram_per_cubic_meter>(),
            self.start.density.get::<kilogram_per_cubic_meter>(),
        );
        if choked(lo) {
            return final_density;
        }
        if !choked(hi) {
            return self.start.density;
        }
        let (_, first_choked) = bisect_ln((lo, hi), 48, |rho| !choked(rho));
        MassDensity::new::<kilogram_per_cubic_meter>(first_choked)
    }
}

/// Bisection on ln ρ between densities `lo` and `hi`, where `below` holds at `lo` and not at
/// `hi`, halving the span `halvings` times: the last density found where it holds and the
/// first where it does not (an end that was never moved is returned as given). Each density
/// tried is the exponential of its midpoint in ln ρ.
fn bisect_ln((lo, hi): (f64, f64), halvings: usize, below: impl Fn(f64) -> bool) -> (f64, f64) {
    let (mut a, mut b, mut bracket) = (lo.ln(), hi.ln(), (lo, hi));
    for _ in 0..halvings {
        let mid = 0.5 * (a + b);
        if below(mid.exp()) {
            (a, bracket.0) = (mid, mid.exp());
        } else {
            (b, bracket.1) = (mid, mid.exp());
        }
    }
    bracket
}

/// How the vent was found, for the basis. The hazards (cold metal, liquid in the vent path,
/// the jet) are the assessment's findings.
fn vent_basis(process: Process) -> Vec<Note> {
    vec![
        Note::new(
            "vent process",
            match process {
                Process::Isentropic => "Isentropic vent: no heat from the wall, so the gas is the coldest a real vent gives (the cold bound). A real vent's time usually lies between the isentropic and the isothermal times (which is shorter depends on the pressure ratio: isentropic below about 80, isothermal above); the wall heat-transfer model gives the gas and wall temperatures a real vent reaches.",
                Process::Isothermal => "Isothermal vent: the wall keeps the gas at its starting temperature; a real fast vent's gas is colder (the isentropic process gives the cold bound, the wall heat-transfer model the realistic one).",
            },
        ),
        Note::new(
            "nozzle",
            "Quasi-steady isentropic nozzle flow with the discharge coefficient given; piping between vessel and orifice, and valve characteristics, are not modelled and lengthen the vent.",
        ),
    ]
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::gas::{Gas, IdealGas};
    use approx::assert_relative_eq;
    use uom::si::thermodynamic_temperature::kelvin;

    fn air_vent(down_to_gauge_pa: f64, process: Process) -> VentInput {
        let ambient = 101_325.0;
        VentInput {
            volume: Volume::new::<cubic_meter>(1.0),
            pressure: Pressure::new::<pascal>(10e5 + ambient),
            temperature: ThermodynamicTemperature::new::<kelvin>(293.15),
            ambient: Pressure::new::<pascal>(ambient),
            orifice: Some(Length::new::<meter>(0.01)),
            cd: 1.0,
            down_to: Pressure::new::<pascal>(down_to_gauge_pa + ambient),
            process,
            min_metal_temperature: None,
            within: None,
        }
    }

    fn air() -> IdealGas {
        IdealGas::with_gamma(Gas::find("air").unwrap(), 1.4)
    }

    fn secs(t: Option<Time>) -> f64 {
        t.unwrap().get::<second>()
    }

    #[test]
    fn a_kink_where_the_regime_changes_is_split_off_not_chased() {
        // ∫₀¹ (1 + |x − 0.3|) dx = 1 + (0.3² + 0.7²)/2 = 1.29, with its kink at 0.3 where a
        // regime flag flips. Split there, each side is a polynomial: two intervals and the
        // bisection's steps. Chased by the quadrature, it takes several times as many.
        let f = |x: f64| 1.0 + (x - 0.3).abs();
        let quadrature =
            |lo: f64, hi: f64, budget: usize| crate::solve::integrate(f, lo, hi, VENT_RTOL, budget);
        let change = |lo: f64, hi: f64| {
            let (mut a, mut b, mut n) = (lo, hi, 0);
            if (lo < 0.3) == (hi < 0.3) {
                return (None, 2);
            }
            while b - a > 1e-5 * (hi - lo) {
                let m = 0.5 * (a + b);
                n += 1;
                if m < 0.3 {
                    a = m;
                } else {
                    b = m;
                }
            }
            (Some((a, b)), n + 2)
        };
        let split = split_at_kinks(
            &quadrature,
            &change,
            (0.0, 1.0),
            (0.0, 1.0),
            800,
            REGIME_SPLITS,
        );
        let chased = crate::solve::integrate(f, 0.0, 1.0, VENT_RTOL, 800);
        assert_relative_eq!(split.value, 1.29, max_relative = 1e-9);
        assert!(split.converged(VENT_RTOL));
        assert!(
            split.evaluations * 3 < chased.evaluations,
            "{} evaluations split, {} chased",
            split.evaluations,
            chased.evaluations
        );
        // Where no regime changes, the plain quadrature serves.
        let smooth = split_at_kinks(
            &quadrature,
            &change,
            (0.5, 1.0),
            (0.5, 1.0),
            800,
            REGIME_SPLITS,
        );
        assert_eq!(smooth.evaluations, crate::solve::KRONROD_POINTS);
    }

    #[test]
    fn the_air_banks_isentropic_vent_meets_each_throat_regime_in_turn() {
        // The sample site's air bank, 310 bar(g) and 20 °C, vented isentropically: the
        // throat is gas, then pinned at the dew point, then two-phase, and last the gas in
        // the vessel turns two-phase (this model's own boundaries, near 66.4, 61.8 and
        // 42.3 kg/m3; the densities below sit well clear of them).
        let model = crate::gas::RealGas::new(Gas::find("air").unwrap());
        let start = model
            .state_pt(
                Pressure::new::<pascal>(310e5 + 101_325.0),
                ThermodynamicTemperature::new::<kelvin>(293.15),
            )
            .unwrap();
        let path = Path {
            model: &model,
            process: Process::Isentropic,
            start,
            entropy: model.entropy(&start),
            regimes: Default::default(),
        };
        let ambient = Pressure::new::<pascal>(101_325.0);
        let regimes: Vec<_> = [80.0, 64.0, 50.0, 30.0]
            .iter()
            .map(|&rho| path.regime(rho, ambient).unwrap())
            .collect();
        assert_eq!(
            regimes,
            [
                (false, Throat::Gas),
                (false, Throat::DewPoint),
                (false, Throat::TwoPhase),
                (true, Throat::TwoPhase)
            ]
        );
        let (at, _) = path.regime_change(50.0, 80.0, ambient);
        assert!(at.is_some_and(|(a, b)| a > 50.0 && a < b && b < 80.0));
    }

    #[test]
    fn choked_vent_times_from_the_reference_check() {
        // source: reference notes, blow-down check [C]: air R 287.05, 1 m³, 10 bar(g),
        // 293.15 K, d 10 mm, Cd 1: to 5 bar(g) 38.8 s isothermal, 28.9 s isentropic.
        let r = blow_down(&air(), &air_vent(5e5, Process::Isothermal))
            .unwrap()
            .value;
        assert_relative_eq!(secs(r.time), 38.8, max_relative = 3e-3);
        let r = blow_down(&air(), &air_vent(5e5, Process::Isentropic))
            .unwrap()
            .value;
        assert_relative_eq!(secs(r.time), 28.9, max_relative = 3e-3);
        assert_relative_eq!(secs(r.time), secs(r.choked_time));
    }

    #[test]
    fn full_vent_to_one_percent_above_ambient() {
        // source: reference notes [C]: to 1.01·pa, 165 s isothermal, 142 s isentropic
        // ending at 149 K.
        let target = 0.01 * 101_325.0;
        let r = blow_down(&air(), &air_vent(target, Process::Isothermal))
            .unwrap()
            .value;
        assert_relative_eq!(secs(r.time), 165.0, max_relative = 0.01);
        let r = blow_down(&air(), &air_vent(target, Process::Isentropic))
            .unwrap()
            .value;
        assert_relative_eq!(secs(r.time), 142.0, max_relative = 0.01);
        assert_relative_eq!(
            r.end.temperature.get::<kelvin>(),
            149.0,
            max_relative = 0.01
        );
    }

    #[test]
    fn choked_part_matches_the_closed_forms() {
        // source: Bar-Meir, Fundamentals of Compressible Fluid Mechanics, ch. 11:
        // τ = V/(Cd·A·Ψ·√(R·T0)); isothermal t = τ·ln(p0/p); isentropic
        // t = 2τ/(γ−1)·[(p0/p)^((γ−1)/(2γ)) − 1].
        let model = air();
        let (g, r_gas) = (1.4f64, Gas::find("air").unwrap().specific_gas_constant());
        let psi = g.sqrt() * (2.0 / (g + 1.0)).powf((g + 1.0) / (2.0 * (g - 1.0)));
        let area = std::f64::consts::PI / 4.0 * 0.01f64.powi(2);
        let tau = 1.0 / (area * psi * (r_gas * 293.15).sqrt());
        let (p0, p): (f64, f64) = (11.01325e5, 4.01325e5);
        let r = blow_down(&model, &air_vent(3e5, Process::Isothermal))
            .unwrap()
            .value;
        assert_relative_eq!(secs(r.time), tau * (p0 / p).ln(), max_relative = 1e-9);
        let r = blow_down(&model, &air_vent(3e5, Process::Isentropic))
            .unwrap()
            .value;
        let closed = 2.0 * tau / (g - 1.0) * ((p0 / p).powf((g - 1.0) / (2.0 * g)) - 1.0);
        assert_relative_eq!(secs(r.time), closed, max_relative = 1e-9);
    }

    #[test]
    fn history_runs_from_start_to_target_and_ends_at_the_time() {
        let r = blow_down(&air(), &air_vent(1e4, Process::Isentropic))
            .unwrap()
            .value;
        let first = r.history.first().unwrap();
        let last = r.history.last().unwrap();
        assert_eq!(first.time.get::<second>(), 0.0);
        assert_relative_eq!(
            first.pressure.get::<pascal>(),
            11.01325e5,
            max_relative = 1e-12
        );
        assert_relative_eq!(
            last.time.get::<second>(),
            secs(r.time),
            max_relative = 1e-12
        );
        assert_relative_eq!(
            last.pressure.get::<pascal>(),
            1.11325e5,
            max_relative = 1e-9
        );
        assert!(r
            .history
            .windows(2)
            .all(|w| w[1].time > w[0].time && w[1].pressure < w[0].pressure));
    }

    #[test]
    fn inverse_orifice_reproduces_the_time() {
        let model = air();
        let mut input = air_vent(1e4, Process::Isentropic);
        let t = blow_down(&model, &input).unwrap().value.time.unwrap();
        input.orifice = None;
        input.within = Some(t);
        let d = blow_down(&model, &input)
            .unwrap()
            .value
            .required_orifice
            .unwrap();
        assert_relative_eq!(d.get::<meter>(), 0.01, max_relative = 1e-9);
    }

    #[test]
    fn cd_outside_its_range_is_refused() {
        for cd in [0.0, -0.5, 1.2, f64::NAN] {
            let mut input = air_vent(5e5, Process::Isentropic);
            input.cd = cd;
            assert_eq!(blow_down(&air(), &input).unwrap_err().field, "cd");
        }
    }
}
