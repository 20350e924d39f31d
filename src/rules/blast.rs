//! Blast from a TNT equivalent: Kingery–Bulmash overpressure, the pneumatic-test safe
//! distance, and Kinney–Graham as an independent cross-check.

use uom::si::f64::{Energy, Length, Mass, Pressure};
use uom::si::{energy::joule, length::meter, mass::kilogram, pressure::pascal};

/// Swisdak's fits to Kingery–Bulmash, hemispherical surface burst, incident overpressure:
/// ln p[kPa] = Σ c_i (ln Z)^i on Z[m/kg^(1/3)] in `[lo, hi]`.
///
/// source: M. M. Swisdak, "Simplified Kingery Airblast Calculations", 26th DoD Explosives
/// Safety Seminar (1994), table of incident pressure fits, metric units.
///
/// The published seams (Z = 2.9 and 23.8) leave steps in the curve: at 2.9 it drops from
/// 124.48 to 124.43 kPa, so an overpressure between them had no distance; at 23.8 it rises
/// by 0.7 %. Here each seam is moved to where the two neighbouring fits cross (Z = 2.8811
/// and 25.250, found by bisection on the published coefficients), so the curve is
/// continuous and falls steadily with Z, every fit is used as published, and the curve
/// differs from the published segments only between the old and the new seam, by at most
/// the size of the step there (0.045 % and 0.71 % in overpressure).
const KB_SEGMENTS: [(f64, f64, [f64; 5]); 3] = [
    (0.2, KB_SEAMS[0], [7.2106, -2.1069, -0.3229, 0.1117, 0.0685]),
    (
        KB_SEAMS[0],
        KB_SEAMS[1],
        [7.5938, -3.0523, 0.40977, 0.0261, -0.01267],
    ),
    (KB_SEAMS[1], 198.5, [6.0536, -1.4066, 0.0, 0.0, 0.0]),
];

/// Where the neighbouring Kingery–Bulmash fits cross, m/kg^(1/3): the seams used.
pub const KB_SEAMS: [f64; 2] = [2.881_128_278_417_54, 25.249_524_841_294_8];

/// The scaled distances the Kingery–Bulmash fits cover, m/kg^(1/3).
pub const KB_RANGE: (f64, f64) = (0.2, 198.5);

/// ln p[kPa] of the fit `c` at ln Z.
fn kb_ln_kpa(ln_z: f64, c: &[f64; 5]) -> f64 {
    let l = ln_z;
    c[0] + l * (c[1] + l * (c[2] + l * (c[3] + l * c[4])))
}

/// ln p[kPa] at ln Z over the whole range, or `None` outside it.
fn kb_ln(ln_z: f64) -> Option<f64> {
    KB_SEGMENTS
        .iter()
        .find(|(lo, hi, _)| ln_z >= lo.ln() && ln_z <= hi.ln())
        .map(|(_, _, c)| kb_ln_kpa(ln_z, c))
}

/// Incident overpressure (Pa) of a hemispherical surface burst at scaled distance `z`
/// (m/kg^(1/3)), Kingery–Bulmash by Swisdak's fits; `None` outside the fits' range.
pub fn kingery_bulmash_overpressure(z: f64) -> Option<f64> {
    if !(z >= KB_RANGE.0 && z <= KB_RANGE.1) {
        return None;
    }
    kb_ln(z.ln()).map(|ln_kpa| ln_kpa.exp() * 1e3)
}

/// The scaled distance at which the Kingery–Bulmash overpressure falls to `overpressure`
/// (Pa), or `None` when the threshold lies outside the fits: one root over the whole range,
/// the joined curve falling steadily with Z.
pub fn scaled_distance_for(overpressure: f64) -> Option<f64> {
    if !(overpressure.is_finite() && overpressure > 0.0) {
        return None;
    }
    let target = (overpressure / 1e3).ln();
    let f = |ln_z: f64| kb_ln(ln_z).map_or(f64::NAN, |v| v - target);
    crate::solve::root(f, KB_RANGE.0.ln(), KB_RANGE.1.ln(), 1e-13)
        .ok()
        .map(f64::exp)
}

/// Incident overpressure ratio ps/pa in free air at scaled distance `z` (m/kg^(1/3)).
///
/// source: G. F. Kinney & K. J. Graham, Explosive Shocks in Air (2nd ed., 1985), eq. 6-2.
/// For a surface burst, use twice the charge mass (full ground reflection).
pub fn kinney_graham_ratio(z: f64) -> f64 {
    808.0 * (1.0 + (z / 4.5).powi(2))
        / ((1.0 + (z / 0.048).powi(2)) * (1.0 + (z / 0.32).powi(2)) * (1.0 + (z / 1.35).powi(2)))
            .sqrt()
}

/// Distance from a TNT mass for a given overpressure, or `None` outside the fits' range.
pub fn standoff(tnt: Mass, overpressure: Pressure) -> Option<Length> {
    let z = scaled_distance_for(overpressure.get::<pascal>())?;
    Some(Length::new::<meter>(z * tnt.get::<kilogram>().cbrt()))
}

/// The pneumatic-test safe-distance rule's result and which clause set it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SafeDistance {
    /// The exclusion distance.
    pub distance: Length,
    /// Which clause governs.
    pub basis: DistanceBasis,
}

/// Which clause of the safe-distance rule set the distance.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum DistanceBasis {
    /// Scaled distance 20 m/kg^(1/3) times the cube root of the TNT mass.
    Scaled,
    /// The 30 m floor for stored energy up to 135.5 MJ.
    #[serde(rename = "floor-30m")]
    Floor30m,
    /// The 60 m floor for stored energy from 135.5 MJ to 271 MJ.
    #[serde(rename = "floor-60m")]
    Floor60m,
    /// Above 271 MJ: the rule does not settle it; engineering analysis is required.
    BeyondRule,
    /// At or below ambient pressure there is no stored energy and no distance.
    NoStoredEnergy,
}

/// Stored energy above which the rule requires engineering analysis, J.
pub const RULE_LIMIT_J: f64 = 271.0e6;
/// Stored energy up to which the 30 m floor applies, J.
pub const FLOOR_30M_LIMIT_J: f64 = 135.5e6;
/// The rule's minimum scaled distance, m/kg^(1/3) (50 ft/lb^(1/3)).
pub const SCALED_SAFE_DISTANCE: f64 = 20.0;

/// Exclusion distance for a pneumatic test: the greater of 20 m/kg^(1/3)·W^(1/3) and a
/// floor of 30 m (E ≤ 135.5 MJ) or 60 m (E ≤ 271 MJ).
///
/// source: ASME PCC-2, Article 501 (pressure testing), mandatory appendix on stored-energy
/// safe distance; reference-notes transcription. Above 271 MJ the distance returned is the
/// larger of the scaled distance and 60 m, marked [`DistanceBasis::BeyondRule`].
pub fn pneumatic_test_distance(energy: Energy, tnt: Mass) -> SafeDistance {
    let e = energy.get::<joule>();
    let scaled = SCALED_SAFE_DISTANCE * tnt.get::<kilogram>().cbrt();
    let (floor, floor_basis) = if e <= FLOOR_30M_LIMIT_J {
        (30.0, DistanceBasis::Floor30m)
    } else {
        (60.0, DistanceBasis::Floor60m)
    };
    let (distance, basis) = if scaled > floor {
        (scaled, DistanceBasis::Scaled)
    } else {
        (floor, floor_basis)
    };
    SafeDistance {
        distance: Length::new::<meter>(distance),
        basis: if e > RULE_LIMIT_J {
            DistanceBasis::BeyondRule
        } else {
            basis
        },
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn kingery_bulmash_at_40_ft_per_lb_cube_root() {
        // source: Swisdak (1994): Z = 40 ft/lb^(1/3) = 15.87 m/kg^(1/3) gives 1.18 psi
        // (8.16 kPa) incident overpressure for a hemispherical surface burst.
        let p = kingery_bulmash_overpressure(15.87).unwrap();
        assert_relative_eq!(p, 8_160.0, max_relative = 0.005);
    }

    #[test]
    fn standoff_inverts_the_fit() {
        for p in [2_070.0, 4_900.0, 6_900.0, 34_500.0, 200_000.0] {
            let z = scaled_distance_for(p).unwrap();
            assert_relative_eq!(
                kingery_bulmash_overpressure(z).unwrap(),
                p,
                max_relative = 1e-11
            );
        }
    }

    #[test]
    fn the_fits_join_without_a_step_at_every_seam() {
        // source: Swisdak (1994) coefficients; the seams are where the neighbouring fits
        // cross. At each seam both fits give the same overpressure, the curve falls through
        // it, and a threshold inside the step the published seams left (124.427–124.482
        // kPa at Z = 2.9, 4.8947–4.9289 kPa at Z = 23.8, the fits evaluated there) has
        // exactly one distance.
        for (i, &seam) in KB_SEAMS.iter().enumerate() {
            let (a, b) = (&KB_SEGMENTS[i].2, &KB_SEGMENTS[i + 1].2);
            assert!((kb_ln_kpa(seam.ln(), a) - kb_ln_kpa(seam.ln(), b)).abs() < 1e-12);
            let p = |z: f64| kingery_bulmash_overpressure(z).unwrap();
            assert!(p(seam * (1.0 - 1e-9)) > p(seam) && p(seam) > p(seam * (1.0 + 1e-9)));
        }
        for (published_seam, lo_kpa, hi_kpa) in [(2.9, 124.427, 124.482), (23.8, 4.8947, 4.9289)] {
            for k in 0..=10 {
                let p = 1e3 * (lo_kpa + (hi_kpa - lo_kpa) * k as f64 / 10.0);
                let z = scaled_distance_for(p).unwrap_or_else(|| panic!("no distance for {p} Pa"));
                assert!((z / published_seam - 1.0).abs() < 0.07, "{z}");
                assert_relative_eq!(
                    kingery_bulmash_overpressure(z).unwrap(),
                    p,
                    max_relative = 1e-11
                );
            }
        }
    }

    #[test]
    fn the_joined_curve_falls_steadily_over_the_whole_range() {
        let mut z = KB_RANGE.0;
        let mut last = f64::INFINITY;
        while z <= KB_RANGE.1 {
            let p = kingery_bulmash_overpressure(z).unwrap();
            assert!(p < last, "Z {z}");
            last = p;
            z *= 1.0005;
        }
        assert!(kingery_bulmash_overpressure(0.19).is_none());
        assert!(kingery_bulmash_overpressure(199.0).is_none());
    }

    #[test]
    fn kinney_graham_agrees_with_kingery_bulmash_within_a_quarter() {
        // Two independent published curves; surface burst by doubling the charge
        // (Kinney & Graham 1985, ch. 6). Agreement of ±25 % in overpressure over
        // 3–40 m/kg^(1/3) is what the two are known to share (from memory).
        for z in [3.0, 5.0, 10.0, 15.87, 25.0, 40.0] {
            let kb = kingery_bulmash_overpressure(z).unwrap();
            let kg = kinney_graham_ratio(z / 2f64.cbrt()) * 101_325.0;
            assert!(
                (kb / kg - 1.0).abs() < 0.25,
                "Z {z}: KB {kb} Pa, KG {kg} Pa"
            );
        }
    }

    #[test]
    fn safe_distance_floors_and_scaling() {
        // source: ASME PCC-2 Art. 501 safe-distance rule (reference notes): floors 30 m and
        // 60 m; 20 m/kg^(1/3) scaled distance.
        let e = |mj: f64| Energy::new::<joule>(mj * 1e6);
        let w = |kg: f64| Mass::new::<kilogram>(kg);
        let d = pneumatic_test_distance(e(1.362), w(0.3256));
        assert_eq!(d.basis, DistanceBasis::Floor30m);
        assert_relative_eq!(d.distance.get::<meter>(), 30.0);
        let d = pneumatic_test_distance(e(140.0), w(20.0));
        assert_eq!(d.basis, DistanceBasis::Floor60m);
        let d = pneumatic_test_distance(e(100.0), w(27.0));
        assert_eq!(d.basis, DistanceBasis::Scaled);
        assert_relative_eq!(d.distance.get::<meter>(), 60.0, max_relative = 1e-12);
        let d = pneumatic_test_distance(e(400.0), w(95.6));
        assert_eq!(d.basis, DistanceBasis::BeyondRule);
        assert_relative_eq!(d.distance.get::<meter>(), 20.0 * 95.6f64.cbrt());
    }
}
