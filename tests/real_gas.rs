//! The real-gas model against the reference tables written by `tools/real_gas_tables.py`
//! from CoolProp 8.0.0 (versions in tests/reference/README.md), and against published facts.

mod common;

use approx::assert_relative_eq;
use common::{num, rows};
use pvhazard::gas::real::{equation, Equation};

fn eq(row: &std::collections::HashMap<String, String>) -> &'static Equation {
    equation(&row["gas"]).unwrap_or_else(|| panic!("{}", row["gas"]))
}

/// |a − b| within `tol` of the scale `scale`.
fn close(what: &str, got: f64, want: f64, scale: f64, tol: f64) {
    assert!(
        (got - want).abs() <= tol * scale,
        "{what}: got {got}, want {want} (tolerance {tol} of {scale})"
    );
}

#[test]
fn helmholtz_terms_match_coolprop() {
    // source: CoolProp 8.0.0 AbstractState alpha0/alphar and their derivatives, and the second
    // virial coefficient Bvirial (tests/reference/helmholtz.csv, 34 states a gas, gas to liquid
    // and near-critical).
    for row in rows("reference/helmholtz.csv") {
        let e = eq(&row);
        let (delta, tau) = (num(&row, "delta"), num(&row, "tau"));
        let i = e.ideal(delta, tau);
        let r = e.residual(delta, tau);
        let iso = e.isotherm(e.fluid.t_reducing / tau).residual(delta);
        let what = format!("{} at delta {delta}, tau {tau}", row["gas"]);
        for (name, got) in [
            ("alphar", iso.a),
            ("dalphar_ddelta", iso.d),
            ("d2alphar_ddelta2", iso.dd),
            ("alpha0", i.a),
            ("dalpha0_dtau", i.t),
            ("d2alpha0_dtau2", i.tt),
            ("alphar", r.a),
            ("dalphar_ddelta", r.d),
            ("d2alphar_ddelta2", r.dd),
            ("dalphar_dtau", r.t),
            ("d2alphar_dtau2", r.tt),
            ("d2alphar_ddelta_dtau", r.dt),
        ] {
            let want = num(&row, name);
            close(
                &format!("{name}, {what}"),
                got,
                want,
                want.abs().max(1.0),
                1e-10,
            );
        }
        let b = e.isotherm(num(&row, "T_K")).second_virial_reduced() / e.fluid.rho_reducing;
        let want = num(&row, "B_virial_m3_mol");
        // Within 1e-11 everywhere but oxygen at 55 K (1.4e-7): there the equation, far below
        // any dilute-gas data it was fitted to, sums large terms to a small B of the wrong sign.
        close(&format!("B, {what}"), b, want, want.abs(), 1e-6);
    }
}

#[test]
fn second_virial_coefficients_match_the_residuals_slope_and_the_tables() {
    // source: B = a − b·exp(c/T) in cm³/mol, with (a, b, c) = (137.6, 87.7, 325.7) for carbon
    // dioxide, (185.4, 141.8, 88.7) nitrogen, (154.2, 119.3, 105.1) argon: LibreTexts
    // Chemistry, Reference Table A9 "Second virial coefficients" (a fit to measured values,
    // good to a few cm³/mol).
    for (gas, [a, b, c]) in [
        ("carbon-dioxide", [137.6, 87.7, 325.7]),
        ("nitrogen", [185.4, 141.8, 88.7]),
        ("argon", [154.2, 119.3, 105.1]),
    ] {
        let e = equation(gas).unwrap();
        for t in [250.0, 300.0, 400.0, 600.0] {
            let tau = e.fluid.t_reducing / t;
            let reduced = e.isotherm(t).second_virial_reduced();
            // The limit itself: ∂αʳ/∂δ = B·ρ_r + 2·C·ρ_r²·δ + O(δ²); two slopes near δ = 0
            // extrapolated to it.
            let slope = |delta: f64| e.residual(delta, tau).d;
            close(
                &format!("{gas} slope at {t} K"),
                reduced,
                2.0 * slope(1e-6) - slope(2e-6),
                reduced.abs(),
                1e-9,
            );
            let cm3_per_mol = reduced / e.fluid.rho_reducing * 1e6;
            let table = a - b * (c / t).exp();
            close(&format!("{gas} B at {t} K"), cm3_per_mol, table, 1.0, 3.0);
        }
    }
    // CRC Handbook of Chemistry and Physics, "Virial coefficients of selected gases"
    // (Kehiaian; smoothed from Dymond & Smith 1980): argon at 100, 200, 300 K.
    let argon = equation("argon").unwrap();
    for (t, table) in [(100.0, -184.0), (200.0, -48.0), (300.0, -16.0)] {
        let b = argon.isotherm(t).second_virial_reduced() / argon.fluid.rho_reducing;
        close(&format!("argon B at {t} K"), b * 1e6, table, 1.0, 2.0);
    }
}

#[test]
fn constants_match_the_equations() {
    // source: CoolProp 8.0.0 (tests/reference/fluids.csv): molar mass, the equation's own gas
    // constant, critical and triple points, and the normal boiling point by Maxwell.
    for row in rows("reference/fluids.csv") {
        let e = eq(&row);
        let f = &e.fluid;
        assert_eq!(f.molar_mass, num(&row, "molar_mass_kg_mol"));
        assert_eq!(f.gas_constant, num(&row, "eos_gas_constant_J_molK"));
        assert_relative_eq!(
            f.t_critical,
            num(&row, "T_critical_K"),
            max_relative = 1e-15
        );
        assert_relative_eq!(e.p_triple, num(&row, "p_triple_Pa"), max_relative = 1e-8);
        if !row["T_normal_boiling_K"].is_empty() {
            let sat = e.saturation_p(101_325.0).expect("boils at 1 atm");
            assert_relative_eq!(sat.t, num(&row, "T_normal_boiling_K"), max_relative = 1e-9);
        }
    }
}

/// The reference state of each gas in the tables, for caloric differences.
fn reference(e: &Equation) -> pvhazard::gas::real::Props {
    e.at_pt(101_325.0, 300.0).unwrap()
}

#[test]
fn single_phase_properties_match_coolprop() {
    // source: tests/reference/properties.csv (CoolProp 8.0.0, 3923 states, 90–400 K, 1 kPa
    // to 1000 bar or the equation's limit; gas, liquid and supercritical). Tolerances as the
    // real-gas issue sets them: 1e-6 on density from (p, T), 1e-5 on the rest, energies as
    // differences from the 300 K, 1 atm reference state on the scale cp·T.
    let mut worst: f64 = 0.0;
    for row in rows("reference/properties.csv") {
        let e = eq(&row);
        let (t, p) = (num(&row, "T_K"), num(&row, "p_Pa"));
        let what = format!("{} at {p} Pa, {t} K ({})", row["gas"], row["phase"]);
        let got = e
            .at_pt(p, t)
            .unwrap_or_else(|err| panic!("{what}: {err:?}"));
        let rho = num(&row, "rho_kg_m3");
        worst = worst.max((got.rho / rho - 1.0).abs());
        close(&format!("density, {what}"), got.rho, rho, rho, 1e-6);
        let r = reference(e);
        let cp = num(&row, "cp_J_kgK");
        let scale = cp.max(r.cp) * t.max(300.0);
        // Energies as differences from the reference state, on the scale cp·T; s on cp.
        for (name, diff, col, on) in [
            ("u", got.u - r.u, "u_minus_ref_J_kg", scale),
            ("h", got.h - r.h, "h_minus_ref_J_kg", scale),
            ("s", got.s - r.s, "s_minus_ref_J_kgK", cp),
        ] {
            close(&format!("{name}, {what}"), diff, num(&row, col), on, 1e-5);
        }
        for (name, got, col) in [
            ("cv", got.cv, "cv_J_kgK"),
            ("cp", got.cp, "cp_J_kgK"),
            ("w", got.w2.sqrt(), "w_m_s"),
            ("Z", got.z(e), "Z"),
        ] {
            let want = num(&row, col);
            close(&format!("{name}, {what}"), got, want, want, 1e-5);
        }
    }
    assert!(worst < 1e-9, "worst density error {worst}");
}

#[test]
fn saturation_matches_coolprop() {
    // source: tests/reference/saturation.csv (Maxwell construction on each equation, equal
    // to CoolProp 8.0.0's own saturation within 1e-11 for the pure gases; air is pseudo-pure).
    for row in rows("reference/saturation.csv") {
        let e = eq(&row);
        let t = num(&row, "T_K");
        let what = format!("{} at {t} K", row["gas"]);
        let Some(sat) = e.saturation_t(t) else {
            // Within a hair of the critical point the two phases are taken as one.
            assert!(t > e.t_sat_max, "{what}: no saturation state");
            continue;
        };
        assert_relative_eq!(sat.p, num(&row, "p_Pa"), max_relative = 1e-6);
        assert_relative_eq!(
            sat.liquid.rho,
            num(&row, "rho_liquid_kg_m3"),
            max_relative = 1e-6
        );
        assert_relative_eq!(
            sat.vapour.rho,
            num(&row, "rho_vapour_kg_m3"),
            max_relative = 1e-6
        );
        let r = reference(e);
        let scale = r.cp * 300.0;
        for (name, got, col) in [
            ("u liquid", sat.liquid.u - r.u, "u_liquid_minus_ref_J_kg"),
            ("u vapour", sat.vapour.u - r.u, "u_vapour_minus_ref_J_kg"),
            ("h liquid", sat.liquid.h - r.h, "h_liquid_minus_ref_J_kg"),
            ("h vapour", sat.vapour.h - r.h, "h_vapour_minus_ref_J_kg"),
        ] {
            close(&format!("{name}, {what}"), got, num(&row, col), scale, 1e-5);
        }
        for (name, got, col) in [
            ("s liquid", sat.liquid.s - r.s, "s_liquid_minus_ref_J_kgK"),
            ("s vapour", sat.vapour.s - r.s, "s_vapour_minus_ref_J_kgK"),
        ] {
            close(&format!("{name}, {what}"), got, num(&row, col), r.cp, 1e-5);
        }
        // Pressure from temperature and back.
        let back = e.saturation_p(sat.p).expect("saturation at p");
        assert_relative_eq!(back.t, t, max_relative = 1e-9);
    }
}

#[test]
fn hydrogen_full_tank_densities() {
    // source: the hydrogen fuelling protocol's 100 % state-of-charge densities, 40.2 kg/m³
    // at 70 MPa and 24.0 kg/m³ at 35 MPa, both at 15 °C (from memory; published to three
    // figures, so ±0.15 %).
    let h2 = equation("hydrogen").unwrap();
    for (p, want) in [(70e6, 40.2), (35e6, 24.0)] {
        let rho = h2.at_pt(p, 288.15).unwrap().rho;
        assert_relative_eq!(rho, want, max_relative = 1.5e-3);
    }
}

#[test]
fn critical_and_triple_points_of_nitrogen_and_argon() {
    // source: Span et al. (2000), nitrogen: Tc 126.192 K, pc 3.3958 MPa, ρc 11.1839 mol/dm³,
    // triple point 63.151 K and 12.5198 kPa; Tegeler et al. (1999), argon: Tc 150.687 K,
    // pc 4.863 MPa, ρc 13.40743 mol/dm³, triple point 83.8058 K and 68.891 kPa (from memory,
    // to the figures given).
    for (gas, tc, pc, rhoc, tt, pt) in [
        ("nitrogen", 126.192, 3.3958e6, 11_183.9, 63.151, 12_519.8),
        ("argon", 150.687, 4.863e6, 13_407.43, 83.8058, 68_891.0),
    ] {
        let e = equation(gas).unwrap();
        let f = &e.fluid;
        assert_relative_eq!(f.t_critical, tc, max_relative = 1e-6);
        assert_relative_eq!(f.rho_critical, rhoc, max_relative = 1e-5);
        let (pc_eq, _) = e
            .isotherm(f.t_critical)
            .pressure(f.rho_critical * f.molar_mass);
        assert_relative_eq!(pc_eq, pc, max_relative = 1e-4);
        assert_relative_eq!(f.t_triple, tt, max_relative = 1e-5);
        assert_relative_eq!(e.p_triple, pt, max_relative = 3e-5);
    }
}

#[test]
fn nozzle_mass_flux_matches_coolprop() {
    // source: tests/reference/nozzle.csv (CoolProp 8.0.0 isentropes; sonic throat found as
    // the maximum of ρ·√(2(h0 − h)); 201 stagnation states, choked and subcritical).
    use pvhazard::gas::{Gas, GasModel, RealGas};
    use uom::si::f64::{Pressure, ThermodynamicTemperature};
    use uom::si::{
        mass_flux::kilogram_per_square_meter_second, pressure::pascal,
        thermodynamic_temperature::kelvin,
    };
    for row in rows("reference/nozzle.csv") {
        let model = RealGas::new(Gas::find(&row["gas"]).unwrap());
        let (p0, t0) = (num(&row, "p0_Pa"), num(&row, "T0_K"));
        let st = model
            .state_pt(
                Pressure::new::<pascal>(p0),
                ThermodynamicTemperature::new::<kelvin>(t0),
            )
            .unwrap();
        let flow = model.nozzle(&st, Pressure::new::<pascal>(num(&row, "back_pressure_Pa")));
        let what = format!("{} from {p0} Pa, {t0} K", row["gas"]);
        assert_eq!(flow.choked, row["choked"] == "true", "{what}");
        assert_relative_eq!(
            flow.mass_flux.get::<kilogram_per_square_meter_second>(),
            num(&row, "mass_flux_kg_m2s"),
            max_relative = 1e-6
        );
    }
}

mod rules {
    //! The real-gas rules end to end against tables computed from the reference equations.

    use super::{num, rows};
    use approx::assert_relative_eq;
    use pvhazard::gas::{Gas, GasModel, RealGas};
    use pvhazard::rules::energy::expansion_energies;
    use pvhazard::rules::fill::{adiabatic_fill, FillInput};
    use pvhazard::rules::vent::{blow_down, Process, VentInput};
    use uom::si::f64::{Length, Pressure, ThermodynamicTemperature, Volume};
    use uom::si::{
        energy::joule, length::meter, mass::kilogram, pressure::pascal,
        thermodynamic_temperature::kelvin, time::second, volume::cubic_meter,
    };

    fn pa(x: f64) -> Pressure {
        Pressure::new::<pascal>(x)
    }

    fn k(x: f64) -> ThermodynamicTemperature {
        ThermodynamicTemperature::new::<kelvin>(x)
    }

    fn model(row: &std::collections::HashMap<String, String>) -> RealGas {
        RealGas::new(Gas::find(&row["gas"]).unwrap())
    }

    #[test]
    fn stored_energies_match_the_reference_equations() {
        // source: tests/reference/energy.csv (CoolProp 8.0.0: isothermal m·Δa, isentropic
        // m·[u1 − u(pa, s1)] with two-phase ends, availability; 252 states, 2 to 1000 bar).
        for row in rows("reference/energy.csv") {
            let m = model(&row);
            let what = format!("{} at {} Pa, {} K", row["gas"], row["p1_Pa"], row["T1_K"]);
            let st = m
                .state_pt(pa(num(&row, "p1_Pa")), k(num(&row, "T1_K")))
                .unwrap();
            let v = Volume::new::<cubic_meter>(num(&row, "volume_m3"));
            let (e, end) = expansion_energies(&m, &st, v, pa(num(&row, "pa_Pa")))
                .unwrap_or_else(|err| panic!("{what}: {err}"));
            assert_relative_eq!(
                (st.density * v).get::<kilogram>(),
                num(&row, "mass_kg"),
                max_relative = 1e-9
            );
            for (name, got, col) in [
                ("isothermal", e.isothermal, "isothermal_J"),
                ("isentropic", e.isentropic, "isentropic_J"),
                ("availability", e.availability, "availability_J"),
            ] {
                let want = num(&row, col);
                let got = got.get::<joule>();
                assert!(
                    ((got - want) / want).abs() < 1e-6,
                    "{name}, {what}: {got} against {want}"
                );
            }
            assert_relative_eq!(
                end.temperature.get::<kelvin>(),
                num(&row, "end_T_K"),
                max_relative = 1e-6
            );
            let quality = end.quality.unwrap_or(1.0);
            assert!(
                (quality - num(&row, "end_quality")).abs() < 1e-6,
                "{what}: quality {quality}"
            );
        }
    }

    #[test]
    fn fill_temperatures_match_the_reference_equations() {
        // source: tests/reference/fill.csv (CoolProp 8.0.0: ρf·uf − ρi·ui = (ρf − ρi)·h_in
        // solved for T at the end pressure; supply enthalpy at the supply pressure).
        for row in rows("reference/fill.csv") {
            let m = model(&row);
            let input = FillInput {
                volume: Volume::new::<cubic_meter>(0.05),
                from: pa(num(&row, "p_initial_Pa")),
                to: pa(num(&row, "p_final_Pa")),
                initial_temperature: k(num(&row, "T_initial_K")),
                supply_temperature: k(num(&row, "T_supply_K")),
                supply_pressure: Some(pa(num(&row, "p_supply_Pa"))),
                ambient_temperature: k(num(&row, "T_ambient_K")),
                rated_temperature: None,
            };
            let out = adiabatic_fill(&m, &input).unwrap().value;
            let what = format!("{} fill to {}", row["gas"], row["p_final_Pa"]);
            let t = out.final_temperature.get::<kelvin>();
            assert!(
                (t / num(&row, "T_final_K") - 1.0).abs() < 1e-6,
                "{what}: {t}"
            );
            assert_relative_eq!(
                out.mass_added.get::<kilogram>(),
                0.05 * num(&row, "mass_added_per_volume_kg_m3"),
                max_relative = 1e-6
            );
            assert_relative_eq!(
                out.settled_pressure.get::<pascal>(),
                num(&row, "settled_pressure_Pa"),
                max_relative = 1e-6
            );
        }
    }

    #[test]
    fn vent_times_match_the_reference_equations() {
        // source: tests/reference/vent.csv (CoolProp 8.0.0 isentropes and nozzle fluxes,
        // time = V/(Cd·A)·∫dρ/G integrated to 1e-9; isothermal and isentropic vessel gas).
        for row in rows("reference/vent.csv") {
            let m = model(&row);
            let input = VentInput {
                volume: Volume::new::<cubic_meter>(num(&row, "volume_m3")),
                pressure: pa(num(&row, "p0_Pa")),
                temperature: k(num(&row, "T0_K")),
                ambient: pa(num(&row, "ambient_pressure_Pa")),
                orifice: Some(Length::new::<meter>(num(&row, "orifice_diameter_m"))),
                cd: num(&row, "Cd"),
                down_to: pa(num(&row, "p_end_Pa")),
                process: match row["process"].as_str() {
                    "isothermal" => Process::Isothermal,
                    _ => Process::Isentropic,
                },
                min_metal_temperature: None,
                within: None,
            };
            let what = format!(
                "{} {} vent from {}",
                row["gas"], row["process"], row["p0_Pa"]
            );
            let out = blow_down(&m, &input)
                .unwrap_or_else(|e| panic!("{what}: {e}"))
                .value;
            let t = out.time.unwrap().get::<second>();
            assert!((t / num(&row, "time_s") - 1.0).abs() < 1e-6, "{what}: {t}");
            assert_relative_eq!(
                out.end.temperature.get::<kelvin>(),
                num(&row, "T_end_K"),
                max_relative = 1e-6
            );
        }
    }
}

#[test]
fn dense_states_just_above_the_critical_temperature_are_found() {
    // On the flat isotherms just above Tc, Newton's first step from the ideal-gas density
    // used to land far beyond any physical density, where the equation overflows.
    // source: CoolProp 8.0.0, PropsSI('D', 'P', p, 'T', T, 'Oxygen'), run here.
    let o2 = equation("oxygen").unwrap();
    for (p, t, rho) in [
        (196.650_85e5, 158.932_28, 842.970_668_452_918_5),
        (200e5, 156.0, 862.723_156_946_483_5),
        (150e5, 156.0, 822.153_718_778_717_6),
        (190e5, 156.0, 855.588_652_656_525_2),
    ] {
        let got = o2
            .at_pt(p, t)
            .unwrap_or_else(|e| panic!("{p} Pa, {t} K: {e:?}"));
        assert_relative_eq!(got.rho, rho, max_relative = 1e-6);
    }
}
