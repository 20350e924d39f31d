//! The assessment's decisions: which result governs, one banner per hazard, and banners
//! only for findings that are not ok.

use uom::si::f64::{AvailableEnergy, Length, Mass, Pressure, ThermodynamicTemperature, Volume};
use uom::si::{
    available_energy::joule_per_kilogram, length::meter, mass::kilogram, pressure::pascal,
    thermodynamic_temperature::kelvin, volume::cubic_meter,
};

use super::*;
use crate::caution::Level;
use crate::gas::{Gas, RealGas};
use crate::heat::{Construction, Liner, Material};
use crate::rules::energy::{EnergyInput, DEFAULT_TNT_ENERGY_J_PER_KG};
use crate::rules::fill::FillInput;
use crate::rules::transient::{CylinderMass, Depressuring, Exchange, FillRate, HeatTransfer, Wall};
use crate::rules::vent::{Process, VentInput};
use crate::units::PressureRate;

const AMBIENT_PA: f64 = 101_325.0;

fn pa(x: f64) -> Pressure {
    Pressure::new::<pascal>(x)
}

fn k(x: f64) -> ThermodynamicTemperature {
    ThermodynamicTemperature::new::<kelvin>(x)
}

fn air() -> RealGas {
    RealGas::new(Gas::find("air").unwrap())
}

/// The invented 2 m³ receiver at 10 barg of the README, MDMT −29 °C, 12 mm drain.
fn receiver_vent() -> VentInput {
    VentInput {
        volume: Volume::new::<cubic_meter>(2.0),
        pressure: pa(10e5 + AMBIENT_PA),
        temperature: k(293.15),
        ambient: pa(AMBIENT_PA),
        orifice: Some(Length::new::<meter>(0.012)),
        cd: 0.61,
        down_to: pa(1.01 * AMBIENT_PA),
        process: Process::Isentropic,
        min_metal_temperature: Some(k(244.15)),
        within: None,
    }
}

fn receiver_wall() -> WallVent {
    WallVent {
        check: Some(Depressuring {
            target: pa(AMBIENT_PA + 5e5),
            limit: uom::si::f64::Time::new::<uom::si::time::second>(900.0),
        }),
        exchange: Exchange {
            mode: HeatTransfer::Lumped,
            wall: Wall::vessel(
                Material::CarbonSteel,
                Volume::new::<cubic_meter>(2.0),
                pa(12e5),
                Some(Mass::new::<kilogram>(540.0)),
            ),
            inner_coefficient: None,
            ambient_temperature: k(293.15),
            aspect: crate::heat::VESSEL_ASPECT,
        },
    }
}

/// No message repeated, and every banner belongs to a finding that is not ok or is a
/// result's own limit (not a hazard's banner).
fn assert_banners_apply(verdict: &Verdict, cautions: &[crate::caution::Caution]) {
    let mut seen = std::collections::HashSet::new();
    for c in cautions {
        assert!(seen.insert(c.message()), "repeated: {}", c.message());
    }
    for f in verdict.findings.iter().filter(|f| f.status == Status::Ok) {
        let text = f.result_text(&crate::caution::si_display());
        assert!(
            !cautions.iter().any(|c| c.message().contains(&text)),
            "a banner for an ok finding: {text}"
        );
    }
    for f in verdict.findings.iter().filter(|f| f.status != Status::Ok) {
        assert!(cautions.contains(&f.banner().unwrap()), "{:?}", f.hazard);
    }
}

#[test]
fn the_wall_model_governs_cold_metal_where_it_ran() {
    // The isentropic bound puts the gas at about −126 °C, below the −29 °C MDMT; the wall
    // model keeps a 540 kg steel wall near +14 °C (README's receiver).
    let model = air();
    let input = receiver_vent();
    let r = vent(
        &model,
        &input,
        Some(&receiver_wall()),
        Discharge::Unstated,
        Governing::Model,
    )
    .unwrap();
    let cold = r.verdict.finding(Hazard::ColdMetal).unwrap();
    assert_eq!(cold.status, Status::Ok);
    assert_eq!(cold.basis, "wall model");
    assert!(r.final_temperature_k < k(244.15), "the bound is below MDMT");
    assert!(!r
        .cautions
        .iter()
        .any(|c| c.level >= Level::Warning && c.message().contains("MDMT")));
    assert_banners_apply(&r.verdict, &r.cautions);

    let bound = vent(
        &model,
        &input,
        Some(&receiver_wall()),
        Discharge::Unstated,
        Governing::Bound,
    )
    .unwrap();
    let cold = bound.verdict.finding(Hazard::ColdMetal).unwrap();
    assert_eq!(
        (cold.status, cold.basis.as_str()),
        (Status::Stop, "isentropic bound")
    );
    assert_eq!(bound.verdict.decision, Decision::NoGo);

    let alone = vent(&model, &input, None, Discharge::Unstated, Governing::Model).unwrap();
    let cold = alone.verdict.finding(Hazard::ColdMetal).unwrap();
    assert_eq!(
        cold.status,
        Status::Stop,
        "without the wall model the bound governs"
    );
    assert!(cold
        .action_text(&crate::caution::si_display())
        .contains("--heat-transfer lumped"));
    assert_banners_apply(&alone.verdict, &alone.cautions);
}

fn composite_fill(rate_bar_per_min: f64) -> (FillInput, PlannedFill) {
    let input = FillInput {
        volume: Volume::new::<cubic_meter>(6.8e-3),
        from: pa(20e5),
        to: pa(300e5),
        initial_temperature: k(293.15),
        supply_temperature: k(293.15),
        supply_pressure: None,
        ambient_temperature: k(293.15),
        rated_temperature: Some(k(338.15)),
    };
    let planned = PlannedFill {
        rate: FillRate::Ramp(PressureRate {
            per_second: pa(rate_bar_per_min * 1e5 / 60.0),
        }),
        inlet: None,
        exchange: Exchange {
            mode: HeatTransfer::Lumped,
            wall: Wall::cylinder(
                (Construction::Composite, Some(Liner::Aluminium)),
                input.volume,
                input.to - pa(AMBIENT_PA),
                CylinderMass::Layers(None, None),
            ),
            inner_coefficient: None,
            ambient_temperature: k(293.15),
            aspect: crate::heat::CYLINDER_ASPECT,
        },
    };
    (input, planned)
}

/// The composite fill at `rate_bar_per_min`, assessed with the wall model governing.
fn planned_fill(rate_bar_per_min: f64) -> (FillInput, crate::report::FillReport) {
    let (input, planned) = composite_fill(rate_bar_per_min);
    let r = fill(
        &air(),
        &input,
        pa(AMBIENT_PA),
        Some(&planned),
        Governing::Model,
    )
    .unwrap();
    (input, r)
}

#[test]
fn a_fill_within_its_rating_at_the_planned_rate_carries_no_adiabatic_warning() {
    // 6.8 L composite air cylinder, 20 → 300 bar(a): the adiabatic bound reaches about
    // 118 °C, the planned 20 bar/min fill with heat to the wall stays well within 65 °C.
    let (input, r) = planned_fill(20.0);
    assert!(
        r.final_temperature_k > k(338.15),
        "the bound exceeds the rating"
    );
    let t = r.verdict.finding(Hazard::FillTemperature).unwrap();
    assert_eq!(
        (t.status, t.basis.as_str()),
        (Status::Ok, "wall model at the planned rate")
    );
    assert!(!r.cautions.iter().any(|c| c.message().contains("adiabatic")));
    assert_banners_apply(&r.verdict, &r.cautions);

    // Without the planned rate the bound governs, and the action asks for the rate.
    let alone = fill(&air(), &input, pa(AMBIENT_PA), None, Governing::Model).unwrap();
    let t = alone.verdict.finding(Hazard::FillTemperature).unwrap();
    assert_eq!(
        (t.status, t.basis.as_str()),
        (Status::Stop, "adiabatic bound")
    );
    assert_eq!(alone.verdict.decision, Decision::NoGo);
}

#[test]
fn a_too_fast_fill_is_no_go_and_names_the_highest_safe_rate() {
    let (_, r) = planned_fill(3000.0);
    let t = r.verdict.finding(Hazard::FillTemperature).unwrap();
    assert_eq!(t.status, Status::Stop);
    assert_eq!(r.verdict.decision, Decision::NoGo);
    assert!(t
        .action_text(&crate::caution::si_display())
        .contains("Fill no faster than"));
    assert_banners_apply(&r.verdict, &r.cautions);
}

fn receiver_energy(mawp_barg: f64, clearance_m: Option<f64>) -> EnergyInput {
    EnergyInput {
        volume: Volume::new::<cubic_meter>(2.0),
        pressure: pa(10e5 + AMBIENT_PA),
        temperature: k(293.15),
        ambient: pa(AMBIENT_PA),
        tnt_energy: AvailableEnergy::new::<joule_per_kilogram>(DEFAULT_TNT_ENERGY_J_PER_KG),
        overpressures: vec![pa(6_900.0), pa(2_070.0)],
        energy_limit: None,
        mawp: Some(pa(mawp_barg * 1e5 + AMBIENT_PA)),
        clearance: clearance_m.map(Length::new::<meter>),
    }
}

#[test]
fn above_the_mawp_is_a_danger_and_no_go() {
    let ask = EnergyAsk {
        work: Work::in_service(),
        before_opening: false,
        vessel_mass: None,
    };
    let r = energy(&air(), &receiver_energy(8.0, None), &ask).unwrap();
    let f = r.verdict.finding(Hazard::PressureRating).unwrap();
    assert_eq!((f.status, f.level), (Status::Stop, Level::Danger));
    assert_eq!(r.verdict.decision, Decision::NoGo);
    assert_banners_apply(&r.verdict, &r.cautions);
    let ok = energy(&air(), &receiver_energy(12.0, None), &ask).unwrap();
    assert_eq!(
        ok.verdict.finding(Hazard::PressureRating).unwrap().status,
        Status::Ok
    );
}

#[test]
fn in_service_work_keeps_people_to_the_standoff_a_test_to_the_test_rule() {
    // 2 m³ of air at 10 barg: 2.69 MJ, so the pneumatic-test rule's 30 m floor (ASME PCC-2)
    // and a 6.9 kPa standoff near 15.7 m (the README's example). A 20 m clearance is
    // enough for work in service and too little for a test.
    let input = receiver_energy(12.0, Some(20.0));
    let in_service = energy(
        &air(),
        &input,
        &EnergyAsk {
            work: Work::in_service(),
            before_opening: false,
            vessel_mass: None,
        },
    )
    .unwrap();
    let zone = in_service.verdict.finding(Hazard::BlastZone).unwrap();
    assert_ne!(zone.status, Status::Stop);
    assert!(zone.basis.contains("Kingery–Bulmash"));
    let test = energy(
        &air(),
        &input,
        &EnergyAsk {
            work: Work::PressureTest,
            before_opening: false,
            vessel_mass: None,
        },
    )
    .unwrap();
    let zone = test.verdict.finding(Hazard::BlastZone).unwrap();
    assert_eq!((zone.status, zone.level), (Status::Stop, Level::Danger));
    assert_eq!(
        zone.value,
        Some(crate::units::Value::Distance(Length::new::<meter>(30.0)))
    );
}

#[test]
fn one_banner_per_hazard_across_a_worksheets_calculations() {
    // Nitrogen from 200 bar: the energy's isentropic end and the vent's both condense, and
    // both calculations name the asphyxiant; merged, each hazard is one finding.
    let model = RealGas::new(Gas::find("nitrogen").unwrap());
    let mut e = receiver_energy(250.0, None);
    e.pressure = pa(200e5);
    let ask = EnergyAsk {
        work: Work::in_service(),
        before_opening: true,
        vessel_mass: None,
    };
    let a = energy(&model, &e, &ask).unwrap();
    let mut v = receiver_vent();
    v.pressure = pa(200e5);
    let b = vent(&model, &v, None, Discharge::Unstated, Governing::Model).unwrap();
    let merged = a.verdict.merged(b.verdict);
    for h in [Hazard::TwoPhase, Hazard::OxygenDepletion] {
        assert_eq!(merged.findings.iter().filter(|f| f.hazard == h).count(), 1);
    }
    assert_eq!(
        merged.banners().len(),
        merged
            .findings
            .iter()
            .filter(|f| f.status != Status::Ok)
            .count()
    );
}

#[test]
fn a_wall_run_without_heat_exchange_is_the_bound_not_the_model() {
    // With no heat exchanged the wall stays at its start: it says nothing of the metal.
    let mut wall = receiver_wall();
    wall.exchange.mode = HeatTransfer::None;
    let r = vent(
        &air(),
        &receiver_vent(),
        Some(&wall),
        Discharge::Unstated,
        Governing::Model,
    )
    .unwrap();
    let cold = r.verdict.finding(Hazard::ColdMetal).unwrap();
    assert_eq!(
        (cold.status, cold.basis.as_str()),
        (Status::Stop, "isentropic bound")
    );
}

#[test]
fn a_close_call_states_its_margin_so_whole_degrees_do_not_contradict() {
    use uom::si::f64::ThermodynamicTemperature;
    use uom::si::thermodynamic_temperature::kelvin;
    let k = ThermodynamicTemperature::new::<kelvin>;
    let words = super::margin(k(358.45), k(358.15));
    let text = crate::caution::render_parts(&words, &crate::caution::si_display());
    assert_eq!(text, ", by 0.3 K (0.5 °F)");
    assert!(super::margin(k(360.0), k(358.15)).is_empty());
    assert!(super::margin(k(358.15), k(358.15)).is_empty());
}

#[test]
fn a_margin_under_a_kelvin_is_spelt_out_and_never_reads_as_zero() {
    use crate::caution::Part;
    let text = |value: f64, limit: f64| -> Vec<Part> { margin(k(value), k(limit)) };
    assert_eq!(
        text(358.45, 358.15),
        vec![Part::from(", by 0.3 K (0.5 °F)".to_owned())]
    );
    // The Kestrel demo's AR-50 exceeds its rating by 0.0016 K at the planned rate.
    assert_eq!(
        text(358.1516, 358.15),
        vec![Part::from(", by less than 0.1 K (0.2 °F)")]
    );
    assert!(text(360.0, 358.15).is_empty());
    assert!(text(358.15, 358.15).is_empty());
}
