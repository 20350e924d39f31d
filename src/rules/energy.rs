//! Stored expansion energy of a gas vessel and the distances that follow from it.

use serde::Serialize;
use uom::si::f64::{
    AvailableEnergy, Energy, Length, Mass, Pressure, ThermodynamicTemperature, Volume,
};
use uom::si::{
    available_energy::joule_per_kilogram, energy::joule, length::meter, pressure::pascal,
    thermodynamic_temperature::kelvin, volume::cubic_meter,
};

use super::blast::{self, DistanceBasis};
use super::{check_positive, gas_cautions, gas_error, user_state, MAX_PRESSURE_PA, MAX_VOLUME_M3};
use crate::caution;
use crate::caution::{Assessed, Caution, Level, Note};
use crate::gas::{GasError, GasModel, State};
use crate::solve::NotResolved;
use crate::units::{fmt_sig, Value};
use crate::InputError;

/// Bulk modulus of water at about 20 °C, Pa (Kell 1975; 2.2 GPa is the handbook value).
pub const WATER_BULK_MODULUS_PA: f64 = 2.2e9;
/// The TNT energy used unless the user sets another: the thermochemical 1000 cal/g.
pub const DEFAULT_TNT_ENERGY_J_PER_KG: f64 = 4.184e6;
/// Overpressure thresholds reported by default, Pa: 1 psi and 0.3 psi.
pub const DEFAULT_OVERPRESSURES_PA: [f64; 2] = [6_900.0, 2_070.0];

/// What the stored-energy rule needs.
#[derive(Debug, Clone, PartialEq)]
pub struct EnergyInput {
    /// Gas volume of the vessel.
    pub volume: Volume,
    /// Absolute pressure of the gas.
    pub pressure: Pressure,
    /// Gas temperature (also the ambient temperature of the dead state for availability).
    pub temperature: ThermodynamicTemperature,
    /// Absolute ambient pressure the gas would expand to.
    pub ambient: Pressure,
    /// Blast energy per mass of TNT used to convert energy to a TNT mass.
    pub tnt_energy: AvailableEnergy,
    /// Incident overpressures at which to report standoff distances.
    pub overpressures: Vec<Pressure>,
    /// Energy to which the vessel should be vented before work, if any.
    pub energy_limit: Option<Energy>,
    /// Maximum allowable working pressure, absolute, if known.
    pub mawp: Option<Pressure>,
    /// Distance the site can keep clear of people, if known.
    pub clearance: Option<Length>,
}

/// The four expansion energies.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Energies {
    /// Isothermal expansion work, m·[a(p1,T1) − a(pa,T1)] (p1·V·ln(p1/pa) for an ideal gas).
    pub isothermal: Energy,
    /// Isentropic expansion work, m·[u(p1,T1) − u(pa,s1)]: the basis for TNT and distances.
    pub isentropic: Energy,
    /// Brode's energy, m·[u(ρ1,T1) − u(ρ1,p=pa)] ((p1 − pa)·V/(γ−1) for an ideal gas).
    pub brode: Energy,
    /// Exergy relative to the dead state (pa, T1): the most work the gas could do.
    pub availability: Energy,
}

/// A distance at which the blast overpressure falls to a threshold.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Standoff {
    /// The incident overpressure threshold.
    pub overpressure: Pressure,
    /// The distance, or `None` when the threshold lies outside the Kingery–Bulmash fits.
    pub distance: Option<Length>,
}

/// What the stored-energy rule computes.
#[derive(Debug, Clone, PartialEq)]
pub struct EnergyResult {
    /// Mass of gas in the vessel.
    pub gas_mass: Mass,
    /// The expansion energies.
    pub energy: Energies,
    /// The gas's state at the end of the isentropic expansion to ambient.
    pub isentropic_end: State,
    /// TNT mass equivalent of the isentropic energy.
    pub tnt_equivalent: Mass,
    /// The pneumatic-test exclusion distance.
    pub exclusion_distance: Length,
    /// Which clause of the safe-distance rule set it.
    pub exclusion_basis: DistanceBasis,
    /// Overpressure standoffs, in the order asked.
    pub standoffs: Vec<Standoff>,
    /// Energy stored by the same vessel filled with water at the same gauge pressure.
    pub hydrotest_energy: Energy,
    /// Pressure at or below which every state on the way down (at the vessel's
    /// temperature) stores no more isentropic energy than the limit; `None` without a limit,
    /// when no state on the way is above it, or when not resolved.
    pub vent_down_target: Option<Pressure>,
    /// The most isentropic energy any state on the way down stores (at least the vessel's
    /// own), when a limit is given and the search resolved.
    pub vent_down_peak: Option<Energy>,
    /// Why the vent-down target is not resolved, where it is not.
    pub vent_down_unresolved: Option<NotResolved>,
}

/// Stored energy, TNT equivalent, exclusion distance and standoffs of gas at `input`'s
/// state, with the cautions they raise.
///
/// The incident overpressures accepted for a standoff, Pa: round numbers inside what the
/// Kingery–Bulmash fits cover (about 249 Pa to 17.3 MPa), since the standoffs come from them.
pub const OVERPRESSURE_RANGE_PA: (f64, f64) = (250.0, 17.0e6);

/// Pressure at or below ambient stores no expansion energy: the result is zero with a
/// NOTICE (not an error), so a script checking a vented vessel gets a number.
pub fn stored_energy(
    model: &dyn GasModel,
    input: &EnergyInput,
) -> Result<Assessed<EnergyResult>, InputError> {
    check_positive(
        "volume",
        input.volume.get::<cubic_meter>(),
        "m3",
        MAX_VOLUME_M3,
    )?;
    let tnt = input.tnt_energy.get::<joule_per_kilogram>();
    if !(1.0e6..=1.0e7).contains(&tnt) {
        return Err(InputError::new(
            "tnt-energy",
            format!("{tnt} J/kg"),
            "must be above zero and within the published range of TNT blast energies; accepted: 1 MJ/kg to 10 MJ/kg (4.184 MJ/kg is the 1000 cal/g convention)",
        ));
    }
    for p in &input.overpressures {
        let pa = p.get::<pascal>();
        let (lo, hi) = OVERPRESSURE_RANGE_PA;
        if !(pa >= lo && pa <= hi) {
            return Err(InputError::new(
                "overpressure",
                super::si_text(pa, "Pa"),
                format!(
                    "lies outside the overpressures the Kingery–Bulmash blast fits cover; accepted: {} to {}",
                    super::si_text(lo, "Pa"),
                    super::si_text(hi, "Pa")
                ),
            ));
        }
    }
    if let Some(e) = input.energy_limit {
        if !(e.get::<joule>() >= 1.0 && e.get::<joule>() <= 1.0e15) {
            return Err(InputError::new(
                "energy-limit",
                format!("{} J", e.get::<joule>()),
                "must be above zero; accepted: 1 J to 1e15 J",
            ));
        }
    }
    if let Some(m) = input.mawp {
        check_positive("mawp", m.get::<pascal>(), "Pa(a)", MAX_PRESSURE_PA)?;
        if m <= input.ambient {
            return Err(InputError::new(
                "mawp",
                super::si_text(m.get::<pascal>(), "Pa(a)"),
                format!(
                    "is not above the ambient pressure ({}), so it rates no vessel for pressure; accepted: the MAWP on the rating plate, a gauge pressure above zero, e.g. '13 barg'",
                    super::si_text(input.ambient.get::<pascal>(), "Pa(a)")
                ),
            ));
        }
    }
    if let Some(c) = input.clearance {
        check_positive("clearance", c.get::<meter>(), "m", 1.0e5)?;
    }
    let state = user_state(
        model,
        ("pressure", "temperature"),
        input.pressure,
        input.temperature,
    )?;
    let (mut cautions, mut basis) = gas_cautions(model, &state);
    let gas_mass = state.density * input.volume;
    let pa = input.ambient;

    if input.pressure <= pa {
        let zero = Energy::new::<joule>(0.0);
        return Ok(Assessed {
            value: EnergyResult {
                gas_mass,
                energy: Energies {
                    isothermal: zero,
                    isentropic: zero,
                    brode: zero,
                    availability: zero,
                },
                isentropic_end: state,
                tnt_equivalent: Mass::new::<uom::si::mass::kilogram>(0.0),
                exclusion_distance: Length::new::<meter>(0.0),
                exclusion_basis: DistanceBasis::NoStoredEnergy,
                standoffs: Vec::new(),
                hydrotest_energy: zero,
                vent_down_target: None,
                vent_down_peak: None,
                vent_down_unresolved: None,
            },
            cautions,
            basis,
        });
    }

    let (energy, end) = expansion_energies(model, &state, input.volume, pa)?;
    let tnt_equivalent = energy.isentropic / input.tnt_energy;
    let safe = blast::pneumatic_test_distance(energy.isentropic, tnt_equivalent);
    let standoffs: Vec<Standoff> = input
        .overpressures
        .iter()
        .map(|&op| Standoff {
            overpressure: op,
            distance: blast::standoff(tnt_equivalent, op),
        })
        .collect();
    let gauge = input.pressure - pa;
    let hydrotest_energy =
        gauge * gauge * input.volume / (2.0 * Pressure::new::<pascal>(WATER_BULK_MODULUS_PA));
    let searched = input.energy_limit.map(|limit| {
        vent_down(
            model,
            input.volume,
            input.temperature,
            pa,
            input.pressure,
            limit,
        )
    });
    let (vent_down_target, vent_down_peak, vent_down_unresolved) = match searched {
        None => (None, None, None),
        Some(Ok(v)) => (v.target, Some(v.peak.0), None),
        Some(Err(e)) => (None, None, Some(e)),
    };

    let result = EnergyResult {
        gas_mass,
        energy,
        isentropic_end: end,
        tnt_equivalent,
        exclusion_distance: safe.distance,
        exclusion_basis: safe.basis,
        standoffs,
        hydrotest_energy,
        vent_down_target,
        vent_down_peak,
        vent_down_unresolved,
    };
    let (more, more_basis) = energy_cautions(input, &result);
    cautions.extend(more);
    basis.extend(more_basis);
    Ok(Assessed {
        value: result,
        cautions,
        basis,
    })
}

/// The expansion energies of `volume` of gas at `state` released to `ambient`, and the
/// state at the end of the isentropic expansion.
pub fn expansion_energies(
    model: &dyn GasModel,
    state: &State,
    volume: Volume,
    ambient: Pressure,
) -> Result<(Energies, State), InputError> {
    let mass = state.density * volume;
    let u1 = model.internal_energy(state);
    let s1 = model.entropy(state);
    let isentropic_end = model
        .state_p_s(ambient, s1)
        .map_err(gas_error("pressure"))?;
    let dead = model
        .state_pt(ambient, state.temperature)
        .map_err(gas_error("ambient-pressure"))?;
    // Brode's energy is the heat given up cooling the gas at its density to ambient
    // pressure. Where that would freeze it (carbon dioxide), the closed form with the
    // ideal gas's γ stands in: the convention Brode's energy comes from.
    let brode = match model.state_rho_p(state.density, ambient) {
        Ok(end) => mass * (u1 - model.internal_energy(&end)),
        Err(GasError::Freezes { .. }) => {
            let gamma = crate::gas::IdealGas::new(model.gas()).gamma();
            (state.pressure - ambient) * volume / (gamma - 1.0)
        }
        Err(e) => return Err(gas_error("pressure")(e)),
    };
    let t1 = state.temperature.get::<kelvin>();
    let entropy_drop = AvailableEnergy::new::<joule_per_kilogram>(
        t1 * (s1 - model.entropy(&dead))
            .get::<uom::si::specific_heat_capacity::joule_per_kilogram_kelvin>(),
    );
    let volume_work = ambient * (1.0 / state.density - 1.0 / dead.density);
    let energies = Energies {
        isothermal: mass * (model.helmholtz_energy(state) - model.helmholtz_energy(&dead)),
        isentropic: mass * (u1 - model.internal_energy(&isentropic_end)),
        brode,
        availability: mass * (u1 - model.internal_energy(&dead) + volume_work - entropy_drop),
    };
    Ok((energies, isentropic_end))
}

/// Points on the vent-down path (evenly in ln p from ambient to the vessel pressure) at
/// which the energy is evaluated before any refinement.
const PATH_POINTS: usize = 48;

/// The isentropic expansion energy of `volume` of gas at `p` and `temperature`, J.
fn isentropic_energy_at(
    model: &dyn GasModel,
    volume: Volume,
    temperature: ThermodynamicTemperature,
    ambient: Pressure,
    p: Pressure,
) -> Result<f64, GasError> {
    let st = model.state_pt(p, temperature)?;
    let end = model.state_p_s(ambient, model.entropy(&st))?;
    Ok(
        (st.density * volume * (model.internal_energy(&st) - model.internal_energy(&end)))
            .get::<joule>(),
    )
}

/// Where a vent-down must go before every state on the way down stores no more than the
/// limit.
#[derive(Debug, Clone, PartialEq)]
pub struct VentDown {
    /// The pressure at or below which every state on the way down (at the vessel's
    /// temperature) stores no more than the limit; `None` when none is above it.
    pub target: Option<Pressure>,
    /// The most energy any state on the way down stores, and its pressure.
    pub peak: (Energy, Pressure),
}

/// The pressure below which every state of the vessel, vented at its temperature, stores no
/// more isentropic energy than `limit`: the lowest pressure at which the energy reaches the
/// limit.
///
/// The energy does not always rise with pressure: a dense fluid (methane near 205 K above
/// about 130 bar) stores less per volume as it is compressed further, so a vessel within the
/// limit can pass through states above it while it vents. The whole path from ambient to
/// the vessel pressure is therefore sampled evenly in ln p, each local maximum refined by
/// golden-section search, and the first crossing of the limit from ambient found by
/// Brent's method. A state on the path the model cannot give is not resolved.
pub fn vent_down(
    model: &dyn GasModel,
    volume: Volume,
    temperature: ThermodynamicTemperature,
    ambient: Pressure,
    pressure: Pressure,
    limit: Energy,
) -> Result<VentDown, NotResolved> {
    let energy = |ln_p: f64| {
        let p = Pressure::new::<pascal>(ln_p.exp());
        isentropic_energy_at(model, volume, temperature, ambient, p).map_err(|e| {
            NotResolved::new(format!(
                "the state at {} bar(a) on the way down is not available ({e})",
                fmt_sig(p.get::<pascal>() / 1e5, 5)
            ))
        })
    };
    let (lo, hi) = (ambient.get::<pascal>().ln(), pressure.get::<pascal>().ln());
    let step = (hi - lo) / PATH_POINTS as f64;
    let mut path = vec![(lo, 0.0)];
    for i in 1..=PATH_POINTS {
        let x = if i == PATH_POINTS {
            hi
        } else {
            lo + step * i as f64
        };
        path.push((x, energy(x)?));
    }
    // Each interior maximum of the samples, refined: a peak above the limit between two
    // samples below it is a crossing all the same.
    let mut peaks = Vec::new();
    for w in path.windows(3) {
        if w[1].1 > w[0].1 && w[1].1 >= w[2].1 {
            peaks.push(golden_max(&energy, w[0].0, w[2].0)?);
        }
    }
    let last = path[path.len() - 1];
    let peak = peaks
        .iter()
        .copied()
        .chain(std::iter::once(last))
        .fold(last, |a, b| if b.1 > a.1 { b } else { a });
    let limit_j = limit.get::<joule>();
    // The first sample (or refined peak) above the limit, in order from ambient.
    let mut points: Vec<(f64, f64)> = path.iter().copied().chain(peaks).collect();
    points.sort_by(|a, b| a.0.total_cmp(&b.0));
    let target = match points.iter().position(|&(_, e)| e > limit_j) {
        None => None,
        Some(i) => {
            let excess = |x: f64| energy(x).map_or(f64::NAN, |e| e - limit_j);
            let ln_p =
                crate::solve::root(excess, points[i - 1].0, points[i].0, 1e-12).map_err(|_| {
                    NotResolved::new(format!(
                        "the search for the limit did not converge between {} and {} bar(a)",
                        fmt_sig(points[i - 1].0.exp() / 1e5, 5),
                        fmt_sig(points[i].0.exp() / 1e5, 5)
                    ))
                })?;
            Some(Pressure::new::<pascal>(ln_p.exp()))
        }
    };
    Ok(VentDown {
        target,
        peak: (
            Energy::new::<joule>(peak.1),
            Pressure::new::<pascal>(peak.0.exp()),
        ),
    })
}

/// The largest value of `f` in [a, b] by golden-section search (to 1e-9 in ln p), with
/// where it is.
fn golden_max(
    f: &impl Fn(f64) -> Result<f64, NotResolved>,
    mut a: f64,
    mut b: f64,
) -> Result<(f64, f64), NotResolved> {
    let r = 0.5 * (5f64.sqrt() - 1.0);
    let (mut c, mut d) = (b - r * (b - a), a + r * (b - a));
    let (mut fc, mut fd) = (f(c)?, f(d)?);
    while b - a > 1e-9 {
        if fc > fd {
            (b, d, fd) = (d, c, fc);
            c = b - r * (b - a);
            fc = f(c)?;
        } else {
            (a, c, fc) = (c, d, fd);
            d = a + r * (b - a);
            fd = f(d)?;
        }
    }
    Ok(if fc > fd { (c, fc) } else { (d, fd) })
}

/// The cautions the result carries (a standoff the fits cannot give) and its basis. The
/// hazards themselves (rating, zone, energy before opening, liquid in the expansion) are
/// the assessment's findings.
fn energy_cautions(input: &EnergyInput, r: &EnergyResult) -> (Vec<Caution>, Vec<Note>) {
    let mut out = Vec::new();
    for s in &r.standoffs {
        if s.distance.is_none() {
            out.push(caution!(
                Level::Caution,
                "No standoff for ",
                Value::Overpressure(s.overpressure),
                ": not resolved, the threshold lies outside the Kingery–Bulmash fits (scaled distance 0.2–198.5 m/kg^(1/3)).",
            ));
        }
    }
    let tnt = input.tnt_energy.get::<joule_per_kilogram>();
    let basis = vec![
        Note::new(
            "TNT energy",
            format!(
                "TNT equivalent uses {} MJ/kg{}. A smaller TNT energy gives a larger TNT mass and larger distances, so the 1000 cal/g convention (4.184 MJ/kg) is the conservative default; other published values run 4.27–4.7 MJ/kg.",
                fmt_sig(tnt / 1e6, 4),
                if (tnt - DEFAULT_TNT_ENERGY_J_PER_KG).abs() < 1.0 {
                    " (the default, 1000 cal/g)"
                } else {
                    " (set by --tnt-energy)"
                }
            ),
        ),
        Note::new(
            "distances",
            "Distances are based on the isentropic (adiabatic) expansion energy, as the pneumatic-test standard's stored-energy appendix uses. Brode's and the isothermal energies are larger upper bounds, shown for comparison. Overpressure standoffs: Kingery–Bulmash hemispherical surface burst (Swisdak's fits). The pneumatic-test exclusion distance is ASME PCC-2's safe-distance rule.",
        ),
    ];
    (out, basis)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::gas::{Gas, IdealGas};
    use approx::assert_relative_eq;

    #[test]
    fn the_accepted_overpressures_lie_inside_the_blast_fits() {
        let (z_lo, z_hi) = blast::KB_RANGE;
        let (lo, hi) = OVERPRESSURE_RANGE_PA;
        assert!(blast::kingery_bulmash_overpressure(z_hi).unwrap() <= lo);
        assert!(blast::kingery_bulmash_overpressure(z_lo).unwrap() >= hi);
        for p in [lo, hi] {
            assert!(blast::scaled_distance_for(p).is_some(), "{p} Pa");
        }
    }

    fn air_input(gauge_pa: f64, ambient_pa: f64) -> EnergyInput {
        EnergyInput {
            volume: Volume::new::<cubic_meter>(1.0),
            pressure: Pressure::new::<pascal>(gauge_pa + ambient_pa),
            temperature: ThermodynamicTemperature::new::<kelvin>(293.15),
            ambient: Pressure::new::<pascal>(ambient_pa),
            tnt_energy: AvailableEnergy::new::<joule_per_kilogram>(DEFAULT_TNT_ENERGY_J_PER_KG),
            overpressures: DEFAULT_OVERPRESSURES_PA
                .iter()
                .map(|&p| Pressure::new::<pascal>(p))
                .collect(),
            energy_limit: None,
            mawp: None,
            clearance: None,
        }
    }

    /// An ideal gas with γ = 1.4 exactly, as the worked examples assume.
    fn gamma_14() -> IdealGas {
        IdealGas::with_gamma(Gas::find("air").unwrap(), 1.4)
    }

    #[test]
    fn air_receiver_at_one_megapascal_gauge() {
        // source: reference notes, stored-energy check [C]: air, γ 1.4, 1 m³, 1.0 MPa(g),
        // pa = 101 kPa → isentropic 1.362 MJ, Brode 2.500 MJ, isothermal 2.630 MJ,
        // availability 1.630 MJ (the closed forms, evaluated by hand).
        let r = stored_energy(&gamma_14(), &air_input(1.0e6, 101e3))
            .unwrap()
            .value;
        let mj = |e: Energy| e.get::<joule>() / 1e6;
        assert_relative_eq!(mj(r.energy.isentropic), 1.362, max_relative = 1e-3);
        assert_relative_eq!(mj(r.energy.brode), 2.500, max_relative = 1e-3);
        assert_relative_eq!(mj(r.energy.isothermal), 2.630, max_relative = 1e-3);
        assert_relative_eq!(mj(r.energy.availability), 1.630, max_relative = 1e-3);
        assert_relative_eq!(r.exclusion_distance.get::<meter>(), 30.0);
    }

    #[test]
    fn isentropic_energy_matches_the_pressure_test_standards_air_form() {
        // source: ASME PCC-2 Art. 501 mandatory appendix: for air/N2 (k = 1.4)
        // E = 2.5·p·V·[1 − (pa/p)^0.286] (SI, p absolute). Its exponent 0.286 is 2/7
        // rounded, worth 6e-4 here; hence the tolerance.
        let r = stored_energy(&gamma_14(), &air_input(2.0e6, 101_325.0))
            .unwrap()
            .value;
        let p: f64 = 2.0e6 + 101_325.0;
        let pcc2 = 2.5 * p * 1.0 * (1.0 - (101_325.0 / p).powf(0.286));
        assert_relative_eq!(
            r.energy.isentropic.get::<joule>(),
            pcc2,
            max_relative = 1e-3
        );
    }

    #[test]
    fn closed_forms_hold_for_the_ideal_gas() {
        // The general m·Δu / m·Δa forms reduce to the textbook closed forms (Crowl,
        // Understanding Explosions, CCPS 2003, app. B) for an ideal gas of constant γ.
        let model = IdealGas::new(Gas::find("nitrogen").unwrap());
        let g = model.gamma();
        let input = EnergyInput {
            temperature: ThermodynamicTemperature::new::<kelvin>(250.0),
            ..air_input(5.0e6, 95e3)
        };
        let r = stored_energy(&model, &input).unwrap().value;
        let (p1, pa, v): (f64, f64, f64) = (5.095e6, 95e3, 1.0);
        let e = |x: Energy| x.get::<joule>();
        assert_relative_eq!(
            e(r.energy.isothermal),
            p1 * v * (p1 / pa).ln(),
            max_relative = 1e-10
        );
        assert_relative_eq!(
            e(r.energy.isentropic),
            p1 * v / (g - 1.0) * (1.0 - (pa / p1).powf((g - 1.0) / g)),
            max_relative = 1e-10
        );
        assert_relative_eq!(
            e(r.energy.brode),
            (p1 - pa) * v / (g - 1.0),
            max_relative = 1e-10
        );
        assert_relative_eq!(
            e(r.energy.availability),
            p1 * v * ((p1 / pa).ln() - (1.0 - pa / p1)),
            max_relative = 1e-10
        );
    }

    #[test]
    fn hydrotest_energy_of_a_cubic_metre_at_ten_megapascal() {
        // source: reference notes, hydrostatic vs pneumatic: 1 m³ at 10 MPa(g), water
        // K = 2.2 GPa → p²V/(2K) = 22.7 kJ, against 18.5 MJ isentropic for air.
        let r = stored_energy(&gamma_14(), &air_input(10.0e6, 101_325.0))
            .unwrap()
            .value;
        assert_relative_eq!(
            r.hydrotest_energy.get::<joule>(),
            22_727.0,
            max_relative = 1e-3
        );
        assert_relative_eq!(
            r.energy.isentropic.get::<joule>() / 1e6,
            18.5,
            max_relative = 0.01
        );
    }

    #[test]
    fn vent_down_target_gives_the_energy_limit() {
        let mut input = air_input(1.0e6, 101_325.0);
        input.energy_limit = Some(Energy::new::<joule>(100e3));
        let model = gamma_14();
        let r = stored_energy(&model, &input).unwrap().value;
        let p = r.vent_down_target.unwrap();
        let st = model.state_pt(p, input.temperature).unwrap();
        let (e, _) = expansion_energies(&model, &st, input.volume, input.ambient).unwrap();
        assert_relative_eq!(e.isentropic.get::<joule>(), 100e3, max_relative = 1e-8);
    }

    #[test]
    fn at_ambient_the_energy_and_the_distance_are_zero() {
        // The hazard finding on it (no expansion energy) is the assessment's: src/assess.
        let r = stored_energy(&gamma_14(), &air_input(0.0, 101_325.0)).unwrap();
        assert_eq!(r.value.energy.isentropic.get::<joule>(), 0.0);
        assert_eq!(r.value.exclusion_distance.get::<meter>(), 0.0);
        assert_eq!(r.value.exclusion_basis, DistanceBasis::NoStoredEnergy);
    }

    #[test]
    fn a_dense_fluid_within_the_limit_still_vents_through_states_above_it() {
        // Methane, 1 m³ at 843.627 bar(a) and 205.113 K: 27.51 MJ, within 28 MJ, but the
        // energy peaks at 29.894 MJ near 133.8 bar(a) on the way down and first reaches
        // 28 MJ at 78.2944 bar(a). source: CoolProp 8.0.0, PropsSI at (p, T) and (pa, s),
        // the crossing by bisection and the peak by golden section (1 atm ambient).
        use crate::gas::RealGas;
        let model = RealGas::new(Gas::find("methane").unwrap());
        let input = EnergyInput {
            volume: Volume::new::<cubic_meter>(1.0),
            pressure: Pressure::new::<pascal>(843.627e5),
            temperature: ThermodynamicTemperature::new::<kelvin>(205.113),
            energy_limit: Some(Energy::new::<joule>(28e6)),
            ..air_input(0.0, 101_325.0)
        };
        let r = stored_energy(&model, &input).unwrap().value;
        assert_relative_eq!(
            r.energy.isentropic.get::<joule>(),
            27.509951e6,
            max_relative = 1e-6
        );
        assert_relative_eq!(
            r.vent_down_target.unwrap().get::<pascal>(),
            78.29441e5,
            max_relative = 1e-6
        );
        assert_relative_eq!(
            r.vent_down_peak.unwrap().get::<joule>(),
            29.893796e6,
            max_relative = 1e-6
        );
        // No limit reached anywhere on the way: no target, and the peak is the vessel's.
        let input = EnergyInput {
            energy_limit: Some(Energy::new::<joule>(30e6)),
            ..input
        };
        let r = stored_energy(&model, &input).unwrap().value;
        assert!(r.vent_down_target.is_none() && r.vent_down_unresolved.is_none());
    }
}
