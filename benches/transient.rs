//! Speed of the transient models: full 300-bar cylinder fills (steel, composite), a composite
//! cylinder's whole fill check (the planned run, its conservative edge and the searches for
//! the highest safe rate and the fill-to pressure), and a full receiver vent-down with its
//! two conservative-edge runs, with wall heat transfer, on the real-gas and the ideal-gas
//! model. Run with `cargo bench --bench transient`.

use criterion::{criterion_group, criterion_main, Criterion};
use pvhazard::gas::{Gas, GasModel, IdealGas, RealGas};
use pvhazard::heat;
use pvhazard::heat::{Construction, Liner, Material};
use pvhazard::rules::transient::{
    self, CylinderMass, Exchange, FillCase, FillRate, HeatTransfer, Wall,
};
use pvhazard::units::PressureRate;
use uom::si::f64::{Mass, Pressure, ThermodynamicTemperature, Volume};
use uom::si::{
    mass::kilogram, pressure::pascal, thermodynamic_temperature::kelvin, volume::cubic_meter,
};

fn exchange(wall_kg: f64, aspect: f64) -> Exchange {
    Exchange {
        mode: HeatTransfer::Lumped,
        wall: Wall {
            mass: Mass::new::<kilogram>(wall_kg),
            material: Material::CarbonSteel,
            estimated: false,
            wrap: None,
        },
        inner_coefficient: None,
        ambient_temperature: ThermodynamicTemperature::new::<kelvin>(293.15),
        aspect,
    }
}

fn runs(c: &mut Criterion, air: &dyn GasModel) {
    let name = air.kind().name();
    let t = ThermodynamicTemperature::new::<kelvin>(293.15);
    let p = Pressure::new::<pascal>;

    let initial = air.state_pt(p(20e5), t).unwrap();
    let supply = air.state_pt(p(300e5), t).unwrap();
    let rate = FillRate::Ramp(PressureRate {
        per_second: p(25e5 / 60.0),
    });
    let cylinder = exchange(60.0, heat::CYLINDER_ASPECT);
    let case = FillCase {
        volume: Volume::new::<cubic_meter>(0.05),
        initial: &initial,
        supply: &supply,
        to: p(300e5),
        rate,
        inlet_diameter: None,
    };
    c.bench_function(
        &format!("fill 50 L air 20 -> 300 bar(a), 25 bar/min, lumped wall, {name} gas"),
        |b| b.iter(|| transient::fill_once(air, &case, &cylinder).unwrap()),
    );

    // A composite cylinder: an aluminium liner and a sliced carbon-fibre wrap.
    let composite = Exchange {
        wall: Wall::cylinder(
            (Construction::Composite, Some(Liner::Aluminium)),
            Volume::new::<cubic_meter>(0.0068),
            p(300e5),
            CylinderMass::Layers(None, None),
        ),
        ..exchange(1.0, heat::CYLINDER_ASPECT)
    };
    let small = FillCase {
        volume: Volume::new::<cubic_meter>(0.0068),
        rate: FillRate::Ramp(PressureRate {
            per_second: p(100e5 / 60.0),
        }),
        ..case
    };
    c.bench_function(
        &format!("fill 6.8 L composite air 20 -> 300 bar(a), 100 bar/min, {name} gas"),
        |b| b.iter(|| transient::fill_once(air, &small, &composite).unwrap()),
    );

    // The search for the highest safe rate (and the fill-to pressure), on the conservative
    // edge: every run the fill check makes, beside the single run above.
    c.bench_function(
        &format!("fill check 6.8 L composite air 20 -> 300 bar(a), 100 bar/min, rated 65 C: planned run, edge, highest safe rate, fill-to, {name} gas"),
        |b| {
            b.iter(|| {
                transient::fill(
                    air,
                    &small,
                    Some(ThermodynamicTemperature::new::<kelvin>(338.15)),
                    &composite,
                )
                .unwrap()
            })
        },
    );

    let start = air.state_pt(p(11.01325e5), t).unwrap();
    let receiver = exchange(540.0, heat::VESSEL_ASPECT);
    let area = 0.61 * std::f64::consts::PI / 4.0 * 0.012f64.powi(2);
    c.bench_function(
        &format!("vent 2 m3 air 10 barg through 12 mm, lumped wall, {name} gas"),
        |b| {
            b.iter(|| {
                transient::vent(
                    air,
                    Volume::new::<cubic_meter>(2.0),
                    &start,
                    area,
                    p(101_325.0),
                    p(1.01 * 101_325.0),
                    None,
                    &receiver,
                )
                .unwrap()
            })
        },
    );
}

fn benches(c: &mut Criterion) {
    let air = Gas::find("air").unwrap();
    runs(c, &RealGas::new(air));
    runs(c, &IdealGas::new(air));
}

criterion_group!(transient_benches, benches);
criterion_main!(transient_benches);
