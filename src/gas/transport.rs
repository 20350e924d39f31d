//! Viscosity and thermal conductivity of a gas at a temperature and density, for the wall
//! heat-transfer correlations: a dilute-gas part plus a dense-gas residual on the reduced
//! density ρ/ρc, generalized correlations on each gas's critical constants.
//!
//! - Dilute viscosity η₀: Chapman–Enskog with Lennard-Jones 12-6 parameters and Neufeld,
//!   Janzen & Aziz's (1972) collision integral (Poling, Prausnitz & O'Connell, The Properties
//!   of Gases and Liquids, 5th ed., eqs. 9-3.9 and 9-4.3). For the six normal gases the
//!   parameters come from the critical point by Chung, Ajlan, Lee & Starling (Ind. Eng. Chem.
//!   Res. 27, 1988, 671–679; PPO eq. 9-4.10, ε/k = Tc/1.2593, σ = 0.809·Vc^(1/3), with the
//!   shape factor Fc = 1 − 0.2756·ω); helium and hydrogen, whose critical constants quantum
//!   effects distort, take fitted parameters ([`DiluteViscosity`]).
//! - Dense viscosity residual: Jossi, Stiel & Thodos (AIChE J. 8, 1962, 59–63), a quartic in
//!   ρ/ρc, shifted so that it vanishes at zero density (as published its zero-density value
//!   is about 1 % of η₀; the shift is this project's choice, no source). Coefficients from
//!   memory, checked against CoolProp with the rest.
//! - Dilute conductivity: Chung et al.'s Eucken-type factor Ψ on η₀ and the ideal-gas cv
//!   (PPO eq. 10-3.14, equation number from memory); for helium and hydrogen the modified
//!   Eucken form (PPO section 10-3, from memory). cv from the gas's reference equation of
//!   state's ideal-gas part. For a monatomic gas both give λ₀ = 15/4·(R/M)·η₀.
//! - Dense conductivity residual: Stiel & Thodos (AIChE J. 10, 1964, 26–30; PPO section 10-5,
//!   equation numbers from memory), three exponential branches in ρ/ρc.
//!
//! Checked against CoolProp 8.0.0's reference correlations of each gas
//! (tests/reference/transport.csv, 150–400 K, 1–500 bar, gas and supercritical states) in
//! tests/transport.rs, which states the tolerances and the worst deviations measured. In short:
//! dilute gas within 4 %, dense gas within 13 % for both, except carbon dioxide's
//! conductivity near its critical point
//! (19 % low at 325 K and 100 bar), where CoolProp's correlation carries a critical
//! enhancement these methods lack. The natural-convection coefficient goes as k^0.648·µ^−0.352
//! (Nu = 0.104·Ra^0.352), so a 10 % error in k is about 6.5 % in the coefficient.
//! Outside 1–10 000 K and above 3·ρc (2.8·ρc for the conductivity residual) the values are
//! those at the nearest bound, so that no state a model gives yields NaN or infinity.

use super::{Gas, MOLAR_GAS_CONSTANT};

/// Where a gas's dilute-gas viscosity takes its Lennard-Jones parameters from.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum DiluteViscosity {
    /// Chung et al.'s corresponding states: ε/k = Tc/1.2593, σ = 0.809·Vc^(1/3) (Vc in
    /// cm³/mol, σ in Å) and the shape factor Fc = 1 − 0.2756·ω.
    CorrespondingStates,
    /// Lennard-Jones 12-6 parameters fitted to the gas's own data.
    LennardJones {
        /// Collision diameter σ, Å.
        sigma_angstrom: f64,
        /// Well depth ε/k, K.
        epsilon_over_k_k: f64,
    },
}

/// The temperatures the correlations are evaluated over, K; outside, the nearest bound.
const T_RANGE: (f64, f64) = (1.0, 1.0e4);
/// The highest reduced density of the viscosity residual (Jossi et al. fitted to 3).
const MAX_RHO_R_VISCOSITY: f64 = 3.0;
/// The highest reduced density of the conductivity residual (Stiel & Thodos fitted to 2.8).
const MAX_RHO_R_CONDUCTIVITY: f64 = 2.8;
/// One standard atmosphere, Pa (Jossi et al.'s ξ takes the critical pressure in atm).
const ATM: f64 = 101_325.0;

/// Viscosity (Pa·s) and thermal conductivity (W/(m·K)) of `gas` at `t` (K) and `rho`
/// (kg/m³).
pub(super) fn viscosity_conductivity(gas: &Gas, t: f64, rho: f64) -> (f64, f64) {
    // max/min rather than clamp: they also turn a NaN into the bound.
    let t = t.max(T_RANGE.0).min(T_RANGE.1);
    let rho_r = rho.max(0.0) / gas.critical_density_kg_per_m3;
    let eta0 = dilute_viscosity(gas, t);
    let eta = eta0 + viscosity_residual(gas, rho_r.min(MAX_RHO_R_VISCOSITY));
    let lambda0 =
        conductivity_factor(gas, t) * eta0 * MOLAR_GAS_CONSTANT / gas.molar_mass_kg_per_mol;
    let lambda = lambda0 + conductivity_residual(gas, rho_r.min(MAX_RHO_R_CONDUCTIVITY));
    (eta, lambda)
}

/// Neufeld, Janzen & Aziz's fit of the Lennard-Jones viscosity collision integral Ω_v(T*)
/// (PPO eq. 9-4.3), stated for 0.3 ≤ T* ≤ 100 and held at the bounds outside.
fn collision_integral(t_star: f64) -> f64 {
    let t = t_star.clamp(0.3, 100.0);
    1.16145 * t.powf(-0.14874) + 0.52487 * (-0.77320 * t).exp() + 2.16178 * (-2.43787 * t).exp()
}

/// The critical molar volume, cm³/mol.
fn critical_volume_cm3(gas: &Gas) -> f64 {
    gas.molar_mass_kg_per_mol / gas.critical_density_kg_per_m3 * 1e6
}

/// Dilute-gas viscosity, Pa·s: Chapman–Enskog, η₀ = 26.69·√(M·T)/(σ²·Ω_v) µP with M in
/// g/mol and σ in Å (PPO eq. 9-3.9). Where the parameters come from the critical point this
/// is Chung's form (eq. 9-4.10, whose 40.785 is 26.69/0.809²) with its shape factor Fc.
fn dilute_viscosity(gas: &Gas, t: f64) -> f64 {
    let m = gas.molar_mass_kg_per_mol * 1e3;
    let (sigma, epsilon_over_k, fc) = match gas.dilute_viscosity {
        DiluteViscosity::CorrespondingStates => (
            0.809 * critical_volume_cm3(gas).cbrt(),
            gas.critical_temperature_k / 1.2593,
            1.0 - 0.2756 * gas.acentric_factor,
        ),
        DiluteViscosity::LennardJones {
            sigma_angstrom,
            epsilon_over_k_k,
        } => (sigma_angstrom, epsilon_over_k_k, 1.0),
    };
    let micropoise =
        26.69 * fc * (m * t).sqrt() / (sigma * sigma * collision_integral(t / epsilon_over_k));
    micropoise * 1e-7
}

/// Jossi, Stiel & Thodos: [(η − η₀)·ξ + 10⁻⁴]^(1/4) = f(ρr), η in cP, with
/// ξ = Tc^(1/6)·M^(−1/2)·pc^(−2/3) (K, g/mol, atm). Returned in Pa·s, less its value at zero
/// density.
fn viscosity_residual(gas: &Gas, rho_r: f64) -> f64 {
    let f = |r: f64| 0.10230 + r * (0.023364 + r * (0.058533 + r * (-0.040758 + r * 0.0093324)));
    let xi = gas.critical_temperature_k.powf(1.0 / 6.0)
        / ((gas.molar_mass_kg_per_mol * 1e3).sqrt()
            * (gas.critical_pressure_pa / ATM).powf(2.0 / 3.0));
    (f(rho_r).powi(4) - f(0.0).powi(4)) / xi * 1e-3
}

/// λ₀·M/(η₀·R), the dilute conductivity over the dilute viscosity: Chung et al.'s 3.75·Ψ
/// for the normal gases; for the quantum gases, whose acentric factor and reduced
/// temperature lie outside what Ψ was fitted to, the modified Eucken form
/// λ₀·M/(η₀·cv) = 1.32 + 1.77/(cv/R) (PPO section 10-3, from memory). For a monatomic gas
/// both give the Chapman–Enskog 15/4.
fn conductivity_factor(gas: &Gas, t: f64) -> f64 {
    match gas.dilute_viscosity {
        DiluteViscosity::CorrespondingStates => 3.75 * eucken_factor(gas, t),
        DiluteViscosity::LennardJones { .. } => 1.32 * ideal_cv_over_r(gas, t) + 1.77,
    }
}

/// Chung et al.'s Ψ: λ₀·M/(η₀·cv) = 3.75·Ψ/(cv/R), from the ideal-gas cv at `t`, the
/// acentric factor and the reduced temperature.
// 0.6366 is Chung et al.'s fitted constant, not 2/π.
#[allow(clippy::approx_constant)]
fn eucken_factor(gas: &Gas, t: f64) -> f64 {
    let alpha = ideal_cv_over_r(gas, t) - 1.5;
    let w = gas.acentric_factor;
    let beta = 0.7862 - 0.7109 * w + 1.3168 * w * w;
    let tr = t / gas.critical_temperature_k;
    let z = 2.0 + 10.5 * tr * tr;
    1.0 + alpha * (0.215 + 0.28288 * alpha - 1.061 * beta + 0.26665 * z)
        / (0.6366 + beta * z + 1.061 * alpha * beta)
}

/// Ideal-gas cv/R at `t` from the ideal-gas part of the gas's reference equation of state,
/// −τ²·∂²α⁰/∂τ², evaluated within the equation's temperature range.
/// A gas without an equation takes its catalogue cp at 300 K.
fn ideal_cv_over_r(gas: &Gas, t: f64) -> f64 {
    let Some(eq) = super::real::equation(gas.name) else {
        return (gas.cp_300k_j_per_kg_k / gas.specific_gas_constant() - 1.0).max(1.5);
    };
    let f = &eq.fluid;
    let tau = f.t_reducing / t.clamp(f.t_triple, f.t_max);
    // Monatomic gases' ideal parts are exactly 3/2: keep rounding from making α negative.
    (-tau * tau * eq.ideal(1.0, tau).tt).max(1.5)
}

/// Stiel & Thodos: (λ − λ₀)·Γ·Zc⁵ = g(ρr), λ in W/(m·K), Γ = 210·(Tc·M³/pc⁴)^(1/6) (K, g/mol,
/// bar).
fn conductivity_residual(gas: &Gas, rho_r: f64) -> f64 {
    let g = if rho_r < 0.5 {
        1.22e-2 * ((0.535 * rho_r).exp() - 1.0)
    } else if rho_r < 2.0 {
        1.14e-2 * ((0.67 * rho_r).exp() - 1.069)
    } else {
        2.60e-3 * ((1.155 * rho_r).exp() + 2.016)
    };
    let m = gas.molar_mass_kg_per_mol * 1e3;
    let gamma = 210.0
        * (gas.critical_temperature_k * m.powi(3) / (gas.critical_pressure_pa / 1e5).powi(4))
            .powf(1.0 / 6.0);
    g / (gamma * critical_compressibility(gas).powi(5))
}

/// Zc = pc/(ρc·R·Tc).
fn critical_compressibility(gas: &Gas) -> f64 {
    gas.critical_pressure_pa
        / (gas.critical_density_kg_per_m3
            * gas.specific_gas_constant()
            * gas.critical_temperature_k)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::gas::GASES;

    #[test]
    fn stiel_thodos_branches_meet() {
        // The published branches join to within 0.3 % at ρr = 0.5 and 2.0 (their constants
        // are given to three figures).
        let n2 = crate::gas::Gas::find("nitrogen").unwrap();
        for r in [0.5, 2.0] {
            let below = conductivity_residual(n2, r - 1e-9);
            let at = conductivity_residual(n2, r);
            assert!((below - at).abs() / at < 3e-3, "{r}: {below} vs {at}");
        }
    }

    #[test]
    fn monatomic_gases_take_the_eucken_value() {
        // A monatomic gas has cv = 3/2·R, so Ψ = 1 and λ₀ = 15/4·(R/M)·η₀ (the Chapman–Enskog
        // result, PPO section 10-3).
        for name in ["argon", "helium"] {
            let g = crate::gas::Gas::find(name).unwrap();
            for t in [150.0, 300.0, 400.0] {
                assert!((ideal_cv_over_r(g, t) - 1.5).abs() < 1e-9, "{name} {t}");
                assert!((eucken_factor(g, t) - 1.0).abs() < 1e-9, "{name} {t}");
                assert!(
                    (conductivity_factor(g, t) - 3.75).abs() < 1e-9,
                    "{name} {t}"
                );
            }
        }
    }

    #[test]
    fn residuals_vanish_at_zero_density() {
        for g in GASES {
            assert_eq!(viscosity_residual(g, 0.0), 0.0, "{}", g.name);
            assert_eq!(conductivity_residual(g, 0.0), 0.0, "{}", g.name);
        }
    }
}
