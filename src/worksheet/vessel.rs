//! A vessel's worksheet parts: stored energy and distances, the vent-down and where its gas
//! goes.

use super::*;

pub(super) fn vessel_parts(
    model: &dyn GasModel,
    site: &Site,
    v: &Vessel,
    t: &Template,
    out: &mut Parts,
) -> Result<(), Failure> {
    let missing = |key: &str, why: &str| {
        Failure::File(FileError {
            file: site.path.clone(),
            line: v.origin.line,
            key: format!("{}.{key}", v.origin.prefix),
            problem: format!(
                "not given for '{}', and template '{}' needs it {why}",
                v.tag, t.name
            ),
        })
    };
    let (pressure, basis) = match t.pressure {
        PressureBasis::Operating => (v.operating_pressure, "operating pressure"),
        PressureBasis::Mawp => (v.mawp, "MAWP"),
        PressureBasis::Test => (
            v.test_pressure.ok_or_else(|| {
                missing(
                    "test_pressure",
                    "(its calculations start from the test pressure)",
                )
            })?,
            "test pressure",
        ),
    };
    out.inputs = vec![
        input("Gas volume", Value::Volume(v.volume)),
        input("MAWP", Value::Pressure(v.mawp)),
        input("Operating pressure", Value::Pressure(v.operating_pressure)),
    ];
    out.inputs.extend(
        v.relief_set_pressure
            .map(|p| input("Relief set pressure", Value::Pressure(p))),
    );
    out.inputs.extend(
        v.test_pressure
            .map(|p| input("Test pressure", Value::Pressure(p))),
    );
    out.inputs.push(input(
        "Calculations start from",
        Value::Text(basis.to_string()),
    ));
    out.inputs
        .push(input("Gas temperature", Value::Temperature(v.temperature)));
    out.inputs
        .extend(v.mdmt.map(|x| input("MDMT", Value::Temperature(x))));
    out.inputs.extend(
        v.material
            .map(|m| input("Material", Value::Text(m.name().to_string()))),
    );
    out.inputs.extend(
        v.wall_thickness
            .map(|x| input("Wall thickness", Value::Diameter(x))),
    );
    out.inputs
        .extend(v.empty_mass.map(|x| input("Empty mass", Value::Mass(x))));
    if let Some(d) = &v.drain {
        out.inputs
            .push(input("Drain path", Value::Text(d.description.clone())));
        out.inputs
            .push(input("Drain orifice", Value::Diameter(d.orifice)));
        out.inputs.push(input("Drain Cd", Value::Number(d.cd)));
    }
    site_inputs(site, out);

    let overpressures = if t.overpressures.is_empty() {
        DEFAULT_OVERPRESSURES_PA
            .map(Pressure::new::<pascal>)
            .to_vec()
    } else {
        t.overpressures.clone()
    };
    let energy_input = EnergyInput {
        volume: v.volume,
        pressure,
        temperature: v.temperature,
        ambient: site.ambient,
        tnt_energy: AvailableEnergy::new::<joule_per_kilogram>(DEFAULT_TNT_ENERGY_J_PER_KG),
        overpressures,
        energy_limit: t
            .calculations
            .contains(&Calculation::VentTarget)
            .then_some(t.energy_limit)
            .flatten(),
        // A test pressure above the MAWP is what a pressure test is; the test procedure,
        // not the MAWP, governs it.
        mawp: (t.pressure != PressureBasis::Test).then_some(v.mawp),
        clearance: site.clearance,
    };
    let ask = EnergyAsk {
        work: match t.pressure {
            PressureBasis::Test => Work::PressureTest,
            _ => Work::InService {
                overpressure: t.keep_back_overpressure,
            },
        },
        before_opening: t.calculations.contains(&Calculation::VentTarget),
        vessel_mass: v.empty_mass,
    };
    let report = assess::energy(model, &energy_input, &ask)?;
    out.assessed(&report.verdict, &report.cautions, &report.basis);
    out.stored_energy = report.energy_j.isentropic;
    out.result("energy", &report);
    for calc in &t.calculations {
        match calc {
            Calculation::StoredEnergy => {
                out.section(
                    format!("Stored energy at the {basis}"),
                    report.stored_entries(),
                );
                out.section(
                    "Stored energy on the ideal gas, for comparison",
                    report.comparison_entries(),
                );
            }
            Calculation::Distances => out.section(
                if report.fragments.is_some() {
                    "Exclusion zone, blast standoffs and fragments"
                } else {
                    "Exclusion zone and blast standoffs"
                },
                [report.distance_entries(), report.fragment_entries()].concat(),
            ),
            Calculation::LiquidTest => {
                let mut entries = report.liquid_test_entries();
                let gas = report.energy_j.isentropic.get::<joule>();
                let liquid = report.hydrotest_energy_j.get::<joule>();
                if liquid > 0.0 {
                    entries.push(Entry {
                        label: "Gas test stores more, by a factor of".to_string(),
                        label_value: None,
                        value: Value::Number(gas / liquid),
                        method: Some("isentropic gas energy / liquid energy"),
                    });
                }
                out.section("Hydrostatic test instead of pneumatic", entries);
            }
            Calculation::VentTarget => out.section("Vent-down target", report.target_entries()),
            Calculation::VentDown => {
                match &v.drain {
                    Some(drain) => vent_down(model, site, v, t, pressure, drain, out)?,
                    None => out.assessed(
                        &Verdict::new(vec![Finding::action(
                            Hazard::VentTime,
                            Level::Warning,
                            "site file",
                            vec![Part::from(
                                "No drain path is on file for this vessel: the vent-down time and the cold gas and metal it brings are not computed.",
                            )],
                            vec![Part::from("Add the drain (orifice and Cd) to the site file, or work them out before venting.")],
                        )]),
                        &[],
                        &[],
                    ),
                }
            }
            Calculation::Fill => {}
        }
    }
    Ok(())
}

fn vent_down(
    model: &dyn GasModel,
    site: &Site,
    v: &Vessel,
    t: &Template,
    pressure: Pressure,
    drain: &crate::site::Drain,
    out: &mut Parts,
) -> Result<(), Failure> {
    let input = VentInput {
        volume: v.volume,
        pressure,
        temperature: v.temperature,
        ambient: site.ambient,
        orifice: Some(drain.orifice),
        cd: drain.cd,
        down_to: site.ambient * (1.0 + DEFAULT_TARGET_MARGIN),
        process: t.vent_process,
        min_metal_temperature: v.mdmt,
        within: None,
    };
    // The same vent with heat from the wall: what the gas and the metal actually reach,
    // and the depressuring check against the MAWP.
    let material = v.material.unwrap_or(Material::CarbonSteel);
    let design_gauge = (v.mawp - site.ambient).get::<pascal>().max(0.0);
    let wall = Wall::vessel(
        material,
        v.volume,
        Pressure::new::<pascal>(design_gauge),
        v.empty_mass,
    );
    let exchange = Exchange {
        mode: HeatTransfer::Lumped,
        wall,
        inner_coefficient: None,
        ambient_temperature: site.ambient_temperature,
        aspect: crate::heat::VESSEL_ASPECT,
    };
    let check = Depressuring {
        target: site.ambient
            + Pressure::new::<pascal>((0.5 * design_gauge).min(DEPRESSURING_CAP_PA)),
        limit: Time::new::<second>(DEPRESSURING_LIMIT_S),
    };
    let wall_vent = WallVent {
        check: Some(check),
        exchange,
    };
    let room = site.room.map(|r| Room {
        volume: r.volume,
        ventilation: r.ventilation,
        temperature: site.ambient_temperature,
        pressure: site.ambient,
    });
    let discharge = match (v.drain.as_ref().and_then(|d| d.to), &room) {
        (Some(VentTo::Outdoors), _) => Discharge::Outdoors,
        (_, Some(room)) => Discharge::Room(room),
        (_, None) => Discharge::Unstated,
    };
    let report = assess::vent(
        model,
        &input,
        Some(&wall_vent),
        discharge,
        governing(site, t),
    )?;
    out.assessed(&report.verdict, &report.cautions, &report.basis);
    if let Some(warm) = &report.transient {
        out.section(
            "Vent-down with heat from the wall",
            warm.result_entries(report.depressuring.as_ref()),
        );
    }
    out.section(
        format!(
            "Vent-down through the {}, no heat from the wall (the cold bound)",
            drain.description
        ),
        report.result_entries(),
    );
    out.section(
        "Vent-down on the ideal gas, for comparison",
        report.comparison_entries(),
    );
    if report.release.is_some() {
        out.section("Where the gas goes", report.release_entries());
    }
    out.plots.extend(plots::vent(&report, &drain.description));
    out.plots.extend(report.release.as_ref().map(plots::room));
    out.result("vent", &report);
    Ok(())
}
