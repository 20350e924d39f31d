//! Where the pieces go if a vessel bursts: the initial fragment velocity by Moore's
//! equation and how far a fragment can fly, without drag (an upper bound) and with it.

use serde::Serialize;
use uom::si::f64::{Energy, Length, Mass, Velocity, Volume};
use uom::si::{
    energy::joule, length::meter, mass::kilogram, velocity::meter_per_second, volume::cubic_meter,
};

use crate::heat;

/// Standard gravity, m/s².
const G: f64 = 9.806_65;

/// Density of the air the fragment flies through, kg/m³ (sea level, 15 °C, ISO 2533).
const AIR_DENSITY: f64 = 1.225;

/// Drag coefficient on the end cap's face area.
///
/// A flat plate face-on has about 1.2, a chunky fragment about 0.47 (Baker et al. 1983,
/// from memory); a tumbling cap lies between. The lower value is taken so that the range
/// errs long (a conservative choice, no source).
pub const CAP_DRAG_COEFFICIENT: f64 = 0.47;

/// Moore's factor: v = 1.092·√(E·G/M) with E in J and M in kg gives m/s.
///
/// source: Moore (1967), as given by Baker et al., Explosion Hazards and Evaluation (1983)
/// and the CCPS guideline on pressure-vessel burst (2010) (from memory).
const MOORE: f64 = 1.092;

/// The vessel's shape, for Moore's gas-mass factor.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Shape {
    /// G = 1/(1 + 3C/(5M)).
    Sphere,
    /// G = 1/(1 + C/(2M)).
    Cylinder,
}

/// A burst's fragments.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Fragments {
    /// Initial velocity by Moore's equation.
    #[serde(rename = "velocity_m_per_s")]
    pub velocity: Velocity,
    /// The drag-free range at the best launch angle, v²/g: an upper bound.
    #[serde(rename = "max_range_m")]
    pub max_range: Length,
    /// The range of an end cap with air drag, over launch angles.
    #[serde(rename = "drag_range_m")]
    pub drag_range: Length,
    /// The end cap's estimated mass.
    #[serde(rename = "fragment_mass_kg")]
    pub fragment_mass: Mass,
    /// The method, in words.
    pub method: &'static str,
}

/// Moore's gas-mass factor G for `shape`, vessel mass `m` and gas mass `c`.
pub fn gas_factor(shape: Shape, m: f64, c: f64) -> f64 {
    match shape {
        Shape::Sphere => 1.0 / (1.0 + 3.0 * c / (5.0 * m)),
        Shape::Cylinder => 1.0 / (1.0 + c / (2.0 * m)),
    }
}

/// The fragments of a cylindrical vessel of `volume` and empty mass `vessel` holding
/// `gas` kg, bursting with `energy` (the expansion energy the distances use). The end cap
/// is the fragment flown with drag: its share of the mass is its share of the wall's area
/// (a uniform wall, the geometry of [`heat::geometry`]).
pub fn fragments(energy: Energy, vessel: Mass, gas: Mass, volume: Volume) -> Fragments {
    let (e, m, c) = (
        energy.get::<joule>().max(0.0),
        vessel.get::<kilogram>(),
        gas.get::<kilogram>(),
    );
    let v = MOORE * (e * gas_factor(Shape::Cylinder, m, c) / m).sqrt();
    let (d, area) = heat::geometry(volume.get::<cubic_meter>(), heat::VESSEL_ASPECT);
    let cap_area = std::f64::consts::PI * d * d / 4.0;
    let cap_mass = m * cap_area / area;
    Fragments {
        velocity: Velocity::new::<meter_per_second>(v),
        max_range: Length::new::<meter>(v * v / G),
        drag_range: Length::new::<meter>(range_with_drag(
            v,
            cap_mass,
            CAP_DRAG_COEFFICIENT * cap_area,
        )),
        fragment_mass: Mass::new::<kilogram>(cap_mass),
        method: "Moore (1967): v = 1.092·√(E·G/M), G = 1/(1 + C/(2M)) for a cylinder; range v²/g without drag, and an end cap flown with drag (Cd 0.47 on its face) over launch angles, lift ignored",
    }
}

/// The longest flight over launch angles of a fragment of `mass` kg launched at `v` m/s
/// from the ground, with drag area Cd·A `drag_area` m², m.
pub fn range_with_drag(v: f64, mass: f64, drag_area: f64) -> f64 {
    if !(v > 0.0 && mass > 0.0) {
        return 0.0;
    }
    let k = 0.5 * AIR_DENSITY * drag_area / mass;
    // The range rises with the angle to one best angle and falls after it, so a golden-
    // section search finds the best to 0.01° in about twenty flights.
    let inverse_phi = (5f64.sqrt() - 1.0) / 2.0;
    let (mut lo, mut hi) = (1f64.to_radians(), 89f64.to_radians());
    let mut a = hi - inverse_phi * (hi - lo);
    let mut b = lo + inverse_phi * (hi - lo);
    let (mut fa, mut fb) = (flight(v, a, k), flight(v, b, k));
    while hi - lo > 0.01f64.to_radians() {
        if fa >= fb {
            (hi, b, fb) = (b, a, fa);
            a = hi - inverse_phi * (hi - lo);
            fa = flight(v, a, k);
        } else {
            (lo, a, fa) = (a, b, fb);
            b = lo + inverse_phi * (hi - lo);
            fb = flight(v, b, k);
        }
    }
    fa.max(fb).max(0.0)
}

/// The horizontal distance of one flight at `angle` (radians) with drag constant `k`
/// (1/m), by fourth-order Runge–Kutta to the return to the ground.
fn flight(v: f64, angle: f64, k: f64) -> f64 {
    // The drag-free flight time bounds the real one: 400 steps over it.
    let dt = 2.0 * v * angle.sin().max(1e-3) / G / 400.0;
    let accel = |s: [f64; 4]| {
        let speed = (s[2] * s[2] + s[3] * s[3]).sqrt();
        [s[2], s[3], -k * speed * s[2], -G - k * speed * s[3]]
    };
    let mut s = [0.0, 0.0, v * angle.cos(), v * angle.sin()];
    for _ in 0..100_000 {
        let add = |a: [f64; 4], b: [f64; 4], h: f64| {
            [
                a[0] + h * b[0],
                a[1] + h * b[1],
                a[2] + h * b[2],
                a[3] + h * b[3],
            ]
        };
        let k1 = accel(s);
        let k2 = accel(add(s, k1, dt / 2.0));
        let k3 = accel(add(s, k2, dt / 2.0));
        let k4 = accel(add(s, k3, dt));
        let next: [f64; 4] =
            std::array::from_fn(|i| s[i] + dt / 6.0 * (k1[i] + 2.0 * k2[i] + 2.0 * k3[i] + k4[i]));
        if next[1] < 0.0 {
            // Back on the ground within this step: interpolate the landing.
            let f = s[1] / (s[1] - next[1]);
            return s[0] + f * (next[0] - s[0]);
        }
        s = next;
    }
    s[0]
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn moores_gas_factor_tends_to_one_for_a_light_gas() {
        assert_relative_eq!(
            gas_factor(Shape::Cylinder, 100.0, 1e-9),
            1.0,
            max_relative = 1e-9
        );
        assert_relative_eq!(
            gas_factor(Shape::Sphere, 100.0, 1e-9),
            1.0,
            max_relative = 1e-9
        );
        // Equal gas and vessel masses: 2/3 for a cylinder, 5/8 for a sphere.
        assert_relative_eq!(gas_factor(Shape::Cylinder, 1.0, 1.0), 2.0 / 3.0);
        assert_relative_eq!(gas_factor(Shape::Sphere, 1.0, 1.0), 5.0 / 8.0);
    }

    #[test]
    fn the_search_finds_the_best_angle_a_fine_scan_finds() {
        // Light and heavy fragments, slow and fast: the best angle moves well below 45°.
        for (v, mass, area) in [(60.0, 1.0, 0.05), (150.0, 5.0, 0.2), (20.0, 50.0, 0.01)] {
            let k = 0.5 * AIR_DENSITY * area / mass;
            let scan = (100..=8900)
                .map(|i| flight(v, (i as f64 / 100.0).to_radians(), k))
                .fold(0.0, f64::max);
            assert_relative_eq!(range_with_drag(v, mass, area), scan, max_relative = 1e-6);
        }
    }

    #[test]
    fn without_drag_the_range_is_v_squared_over_g_and_drag_shortens_it() {
        let v = 60.0;
        assert_relative_eq!(
            range_with_drag(v, 10.0, 0.0),
            v * v / G,
            max_relative = 1e-6
        );
        let light = range_with_drag(v, 1.0, 0.05);
        let heavy = range_with_drag(v, 100.0, 0.05);
        assert!(light < heavy && heavy < v * v / G, "{light} {heavy}");
    }

    #[test]
    fn a_heavier_vessel_throws_slower_and_more_energy_faster() {
        let at = |kj: f64, kg: f64| {
            fragments(
                Energy::new::<joule>(kj * 1e3),
                Mass::new::<kilogram>(kg),
                Mass::new::<kilogram>(5.0),
                Volume::new::<cubic_meter>(0.5),
            )
            .velocity
            .get::<meter_per_second>()
        };
        assert!(at(1000.0, 400.0) < at(1000.0, 200.0));
        assert!(at(2000.0, 200.0) > at(1000.0, 200.0));
        // The formula itself: 1 MJ, 200 kg, 5 kg of gas.
        let expected = 1.092 * (1e6_f64 / (1.0 + 5.0 / 400.0) / 200.0).sqrt();
        assert_relative_eq!(at(1000.0, 200.0), expected, max_relative = 1e-12);
    }
}
