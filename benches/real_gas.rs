//! Speed of the real-gas model: density from (p, T) (carbon dioxide beside nitrogen, its
//! reference), every property at one state, the isentropic nozzle, and complete vent-downs
//! (the blow-down rule from 300 bar, and the sample site's air bank, which ends two-phase). Compare
//! with CoolProp's PropsSI on the same machine: `python3 tools/bench_coolprop.py` runs
//! these and times PropsSI in the same run.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use pvhazard::gas::real::equation;
use pvhazard::gas::{Gas, GasModel, RealGas};
use pvhazard::rules::vent::{blow_down, Process, VentInput};
use uom::si::f64::{Length, Pressure, ThermodynamicTemperature, Volume};
use uom::si::{
    length::meter, pressure::pascal, thermodynamic_temperature::kelvin, volume::cubic_meter,
};

fn benches(c: &mut Criterion) {
    for (gas, p, t) in [
        ("nitrogen", 200e5, 300.0),
        ("hydrogen", 700e5, 288.15),
        ("air", 300e5, 293.15),
        ("carbon-dioxide", 50e5, 300.0),
    ] {
        let eq = equation(gas).unwrap();
        c.bench_function(&format!("density(p, T) {gas} {} bar {t} K", p / 1e5), |b| {
            b.iter(|| eq.at_pt(black_box(p), black_box(t)).unwrap().rho)
        });
    }
    let n2 = equation("nitrogen").unwrap();
    let rho = n2.at_pt(200e5, 300.0).unwrap().rho;
    c.bench_function("all properties at (rho, T) nitrogen 200 bar 300 K", |b| {
        b.iter(|| n2.props(black_box(rho), black_box(300.0)))
    });

    let air = RealGas::new(Gas::find("air").unwrap());
    let p = Pressure::new::<pascal>;
    let t = ThermodynamicTemperature::new::<kelvin>(293.15);
    let start = air.state_pt(p(300e5), t).unwrap();
    c.bench_function("choked nozzle flux air 300 bar 293 K", |b| {
        b.iter(|| air.nozzle(black_box(&start), p(101_325.0)))
    });
    let vent = VentInput {
        volume: Volume::new::<cubic_meter>(0.05),
        pressure: p(300e5),
        temperature: t,
        ambient: p(101_325.0),
        orifice: Some(Length::new::<meter>(0.002)),
        cd: 0.61,
        down_to: p(50e5),
        process: Process::Isothermal,
        min_metal_temperature: None,
        within: None,
    };
    c.bench_function(
        "vent-down 50 L air 300 -> 50 bar(a), isothermal, real gas",
        |b| b.iter(|| blow_down(&air, black_box(&vent)).unwrap()),
    );
    // The sample site's air bank (BANK-1): 200 L from 4500 psig through its 0.06 in bleed
    // valve to 1 % above ambient, isentropic: the gas ends two-phase, and the nozzle's
    // throat is two-phase over the last part of the vent.
    let bank = VentInput {
        volume: Volume::new::<cubic_meter>(0.2),
        pressure: p(4500.0 * 6_894.757_293_168 + 101_325.0),
        orifice: Some(Length::new::<meter>(0.06 * 0.0254)),
        cd: 0.7,
        down_to: p(1.01 * 101_325.0),
        process: Process::Isentropic,
        ..vent
    };
    c.bench_function(
        "vent-down BANK-1: 200 L air 4500 psig -> 1.01 atm, 0.06 in, isentropic, real gas",
        |b| {
            b.iter(|| {
                blow_down(&RealGas::new(Gas::find("air").unwrap()), black_box(&bank)).unwrap()
            })
        },
    );
}

criterion_group!(real_gas_benches, benches);
criterion_main!(real_gas_benches);
