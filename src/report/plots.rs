//! The pictures of a report: time histories and paths as [`Plot`]s, built from the report's
//! own samples, so that the printed worksheet and the web page draw the same plots.

use uom::si::{pressure::pascal, thermodynamic_temperature::kelvin, time::second};

use super::{Axis, AxisKind, FillReport, Plot, Series, VentReport};
use crate::rules::room::{RoomRelease, RoomSample};
use crate::rules::transient;

/// The gas's (and, with wall heat, the wall's) temperature and the pressure during a
/// vent-down through `what` ("orifice", a drain's description), with the MDMT where given;
/// none where the vent has no history to draw.
pub fn vent(report: &VentReport, what: &str) -> Option<Plot> {
    let series = |label: &str, right_axis: bool, points: Vec<(f64, f64)>| Series {
        label: label.to_string(),
        right_axis,
        points,
    };
    let mut plotted = vec![series(
        "Gas, isentropic bound",
        false,
        report
            .history
            .iter()
            .map(|s| (s.time.get::<second>(), s.temperature.get::<kelvin>()))
            .collect(),
    )];
    if let Some(warm) = &report.transient {
        let curve = |f: fn(&transient::Sample) -> f64| {
            warm.samples
                .iter()
                .map(|s| (s.time.get::<second>(), f(s)))
                .collect()
        };
        plotted.push(series(
            "Gas, with wall heat",
            false,
            curve(|s| s.gas_temperature.get::<kelvin>()),
        ));
        plotted.push(series(
            "Wall",
            false,
            curve(|s| s.wall_temperature.get::<kelvin>()),
        ));
        plotted.push(series(
            "Pressure, with wall heat",
            true,
            curve(|s| s.pressure.get::<pascal>()),
        ));
    }
    (plotted[0].points.len() > 1).then(|| Plot {
        title: format!("Vent-down through the {what}"),
        x: Axis {
            label: "Time".to_string(),
            kind: AxisKind::Time,
        },
        left: Axis {
            label: "Gas and wall temperature".to_string(),
            kind: AxisKind::Temperature,
        },
        right: Some(Axis {
            label: "Pressure".to_string(),
            kind: AxisKind::Pressure,
        }),
        series: plotted,
        limits: report
            .inputs
            .min_metal_temperature_k
            .map(|m| (m.get::<kelvin>(), "MDMT".to_string()))
            .into_iter()
            .collect(),
    })
}

/// The room's atmosphere against time: the oxygen (or for a flammable gas its share of the
/// room, or carbon dioxide) with the limits it is judged on.
pub fn room(room: &RoomRelease) -> Plot {
    // (what is plotted, whether it is the oxygen, the limits drawn)
    let (label, oxygen, limits) = match (room.lower_flammable_limit, room.peak_co2_fraction) {
        (Some(lfl), _) => (
            "Flammable gas in the room",
            false,
            vec![(
                lfl * crate::rules::room::LFL_SHARE_LIMIT,
                "10 % of the LFL".to_string(),
            )],
        ),
        (_, Some(_)) => (
            "Carbon dioxide in the room",
            false,
            vec![(
                crate::rules::room::CO2_LIMITS.0,
                "3 % short-term limit".to_string(),
            )],
        ),
        _ => (
            "Oxygen in the room",
            true,
            match room.max_oxygen_fraction {
                Some(_) => vec![(crate::rules::room::OXYGEN_ENRICHED, "23.5 %".to_string())],
                None => vec![
                    (crate::rules::room::OXYGEN_DEFICIENT, "19.5 %".to_string()),
                    (crate::rules::room::OXYGEN_IMPAIRING, "18 %".to_string()),
                ],
            },
        ),
    };
    Plot {
        title: "Where the gas goes: the room's atmosphere".to_string(),
        x: Axis {
            label: "Time".to_string(),
            kind: AxisKind::Time,
        },
        left: Axis {
            label: label.to_string(),
            kind: AxisKind::Fraction,
        },
        right: None,
        series: vec![Series {
            label: label.to_string(),
            right_axis: false,
            points: room
                .samples
                .iter()
                .map(|s: &RoomSample| {
                    let y = if oxygen {
                        s.oxygen_fraction
                    } else {
                        s.gas_fraction
                    };
                    (s.time.get::<second>(), y)
                })
                .collect(),
        }],
        limits,
    }
}

/// The gas's temperature against the pressure during a fill: the adiabatic bound and, at a
/// planned rate, the gas and wall with heat to the wall; the rated temperature where given.
pub fn fill(report: &FillReport) -> Plot {
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
    Plot {
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
        limits: report
            .inputs
            .rated_temperature_k
            .map(|t| (t.get::<kelvin>(), "Rated temperature".to_string()))
            .into_iter()
            .collect(),
    }
}
