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
    let mut plot_series = vec![Series {
        label: "Gas, adiabatic bound".to_string(),
        right_axis: false,
        points: report
            .path
            .iter()
            .map(|s| (s.pressure.get::<pascal>(), s.temperature.get::<kelvin>()))
            .collect(),
    }];
    if let Some(t) = &report.transient {
        let curves = [
            (
                "Gas, with wall heat",
                t.samples
                    .iter()
                    .map(|s| Some(s.gas_temperature))
                    .collect::<Vec<_>>(),
            ),
            (
                "Wall (liner)",
                t.samples.iter().map(|s| Some(s.wall_temperature)).collect(),
            ),
            (
                "Wrap",
                t.samples.iter().map(|s| s.wrap_temperature).collect(),
            ),
        ];
        for (label, temperatures) in curves {
            let points: Vec<_> = t
                .samples
                .iter()
                .zip(temperatures)
                .filter_map(|(s, temp)| Some((s.pressure.get::<pascal>(), temp?.get::<kelvin>())))
                .collect();
            if !points.is_empty() {
                plot_series.push(Series {
                    label: label.to_string(),
                    right_axis: false,
                    points,
                });
            }
        }
    }
    out.plots.push(Plot {
        title: "Gas and wall temperature during the fill".to_string(),
        x: Axis {
            label: "Pressure".to_string(),
            kind: AxisKind::Pressure,
        },
        left: Axis {
            label: "Gas and wall temperature".to_string(),
            kind: AxisKind::Temperature,
        },
        right: None,
        series: plot_series,
        limits: vec![(
            c.rated_temperature.get::<kelvin>(),
            "Rated temperature".to_string(),
        )],
    });
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
