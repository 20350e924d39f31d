//! A cylinder's worksheet parts: the fill, at the planned rate where there is one.

use super::*;

pub(super) fn cylinder_parts(
    model: &dyn GasModel,
    site: &Site,
    c: &Cylinder,
    template: &Template,
    out: &mut Parts,
) -> Result<(), InputError> {
    out.inputs = vec![
        input("Water capacity", Value::Volume(c.water_capacity)),
        input("Service pressure", Value::Pressure(c.service_pressure)),
        input("Rated temperature", Value::Temperature(c.rated_temperature)),
        input(
            "Construction",
            Value::Text(format!("{:?}", c.construction).to_lowercase()),
        ),
        input(
            "Residual pressure before the fill",
            Value::Pressure(c.residual_pressure),
        ),
        input(
            "Supply temperature",
            Value::Temperature(c.supply_temperature),
        ),
    ];
    if let Some(rate) = c.fill_rate {
        out.inputs.push(input(
            "Planned fill rate",
            Value::PressureRate(rate.per_second),
        ));
    }
    site_inputs(site, out);
    let input = FillInput {
        volume: c.water_capacity,
        from: c.residual_pressure,
        to: c.service_pressure,
        initial_temperature: site.ambient_temperature,
        supply_temperature: c.supply_temperature,
        supply_pressure: None,
        ambient_temperature: site.ambient_temperature,
        rated_temperature: Some(c.rated_temperature),
    };
    let planned = c.fill_rate.map(|rate| PlannedFill {
        rate: FillRate::Ramp(rate),
        inlet: None,
        exchange: Exchange {
            mode: HeatTransfer::Lumped,
            wall: Wall::cylinder(
                (c.construction, c.liner),
                c.water_capacity,
                c.service_pressure - site.ambient,
                c.empty_mass
                    .map_or(CylinderMass::Layers(None, None), CylinderMass::Empty),
            ),
            inner_coefficient: None,
            ambient_temperature: site.ambient_temperature,
            aspect: crate::heat::CYLINDER_ASPECT,
        },
    });
    let report = assess::fill(
        model,
        &input,
        site.ambient,
        planned.as_ref(),
        governing(site, template),
    )?;
    out.assessed(&report.verdict, &report.cautions, &report.basis);
    // The governing result first: the planned rate with heat to the wall where it ran.
    if let Some(t) = &report.transient {
        out.section(
            "Fill at the planned rate, with heat to the wall",
            t.result_entries(),
        );
    }
    out.section(
        "Fast fill, no heat to the wall (the adiabatic bound)",
        report.result_entries(),
    );
    out.section(
        "Fast fill on the ideal gas, for comparison",
        report.comparison_entries(),
    );
    out.plots.push(plots::fill(&report));
    // Rank cylinders by the energy they hold full.
    let full = EnergyInput {
        volume: c.water_capacity,
        pressure: c.service_pressure,
        temperature: site.ambient_temperature,
        ambient: site.ambient,
        tnt_energy: AvailableEnergy::new::<joule_per_kilogram>(DEFAULT_TNT_ENERGY_J_PER_KG),
        overpressures: Vec::new(),
        energy_limit: None,
        mawp: None,
        clearance: None,
    };
    out.stored_energy = energy::stored_energy(model, &full)?.value.energy.isentropic;
    out.result("fill", &report);
    Ok(())
}
