//! The gases pvhazard knows, with the constants the models need and where each comes from.

use super::{DiluteViscosity, Gas, GasHazard};

/// Molar gas constant, J/(mol·K) (exact since the 2019 SI redefinition; CODATA 2018).
pub const MOLAR_GAS_CONSTANT: f64 = 8.314_462_618;

// Sources of the columns, shared by every row:
// - molar mass: IUPAC/CIAAW standard atomic weights (2021), summed; air: the CIPM-2007
//   air-density formula's dry air with 400 µmol/mol CO2 (Picard et al., Metrologia 45, 2008).
// - cp at 300 K: ideal-gas heat capacity from the NIST-JANAF Thermochemical Tables (Chase,
//   1998), molar values divided by the molar mass; air: Lemmon et al. (2000) ideal-gas part.
//   Values from memory, checked in tests against CoolProp 8.0.0 cp0 (tests/data).
// - critical point, triple point: the reference equation of state of each gas (named in
//   `eos`), as carried by CoolProp 8.0.0; air: the pseudo-pure fluid's critical point and
//   its lower limit of 59.75 K. The critical density is CoolProp's, recomputed from the
//   equation (tests/reference/fluids.csv, to five figures; oxygen's 426.93 kg/m³ is not the
//   equation's reducing density of 436.14 kg/m³); used only by the transport properties.
// - dilute-gas viscosity: corresponding states from the critical point (Chung et al. 1988,
//   see `transport`), except helium and hydrogen, whose Lennard-Jones parameters are
//   Svehla's (NASA TR R-132, 1962) as tabulated in Poling, Prausnitz & O'Connell, The
//   Properties of Gases and Liquids (5th ed.), appendix B (from memory; checked against
//   CoolProp 8.0.0 in tests/transport.rs).
// - acentric factor: Poling, Prausnitz & O'Connell, The Properties of Gases and Liquids
//   (5th ed.), appendix A, as carried by CoolProp 8.0.0.

/// Every gas, in the order `pvhazard gases` lists them.
pub static GASES: &[Gas] = &[
    Gas {
        name: "air",
        formula: "air",
        aliases: &[],
        molar_mass_kg_per_mol: 0.028_965_46,
        cp_300k_j_per_kg_k: 1_004.8,
        critical_temperature_k: 132.5306,
        critical_pressure_pa: 3.786e6,
        critical_density_kg_per_m3: 342.68,
        acentric_factor: 0.0335,
        min_temperature_k: 59.75,
        eos: "Lemmon, Jacobsen, Penoncello & Friend (2000), air as a pseudo-pure fluid",
        hazard: GasHazard::Air,
        dilute_viscosity: DiluteViscosity::CorrespondingStates,
    },
    Gas {
        name: "nitrogen",
        formula: "N2",
        aliases: &["n2"],
        molar_mass_kg_per_mol: 0.028_013_4,
        cp_300k_j_per_kg_k: 1_039.7,
        critical_temperature_k: 126.192,
        critical_pressure_pa: 3.3958e6,
        critical_density_kg_per_m3: 313.30,
        acentric_factor: 0.0372,
        min_temperature_k: 63.151,
        eos: "Span, Lemmon, Jacobsen, Wagner & Yokozeki (2000)",
        hazard: GasHazard::Asphyxiant,
        dilute_viscosity: DiluteViscosity::CorrespondingStates,
    },
    Gas {
        name: "oxygen",
        formula: "O2",
        aliases: &["o2"],
        molar_mass_kg_per_mol: 0.031_998_8,
        cp_300k_j_per_kg_k: 918.3,
        critical_temperature_k: 154.5994,
        critical_pressure_pa: 5.0464e6,
        critical_density_kg_per_m3: 426.93,
        acentric_factor: 0.0222,
        min_temperature_k: 54.361,
        eos: "Schmidt & Wagner (1985)",
        hazard: GasHazard::Oxidiser,
        dilute_viscosity: DiluteViscosity::CorrespondingStates,
    },
    Gas {
        name: "argon",
        formula: "Ar",
        aliases: &["ar"],
        molar_mass_kg_per_mol: 0.039_948,
        cp_300k_j_per_kg_k: 520.33,
        critical_temperature_k: 150.687,
        critical_pressure_pa: 4.863e6,
        critical_density_kg_per_m3: 535.60,
        acentric_factor: -0.00219,
        min_temperature_k: 83.806,
        eos: "Tegeler, Span & Wagner (1999)",
        hazard: GasHazard::Asphyxiant,
        dilute_viscosity: DiluteViscosity::CorrespondingStates,
    },
    Gas {
        name: "helium",
        formula: "He",
        aliases: &["he"],
        molar_mass_kg_per_mol: 0.004_002_602,
        cp_300k_j_per_kg_k: 5_193.1,
        critical_temperature_k: 5.1953,
        critical_pressure_pa: 2.2832e5,
        critical_density_kg_per_m3: 69.585,
        acentric_factor: -0.3835,
        min_temperature_k: 2.1768,
        eos: "Ortiz-Vega, Hall, Holste & Lemmon (2013)",
        hazard: GasHazard::Asphyxiant,
        dilute_viscosity: DiluteViscosity::LennardJones {
            sigma_angstrom: 2.551,
            epsilon_over_k_k: 10.22,
        },
    },
    Gas {
        name: "hydrogen",
        formula: "H2",
        aliases: &["h2"],
        molar_mass_kg_per_mol: 0.002_015_88,
        cp_300k_j_per_kg_k: 14_311.0,
        critical_temperature_k: 33.145,
        critical_pressure_pa: 1.2964e6,
        critical_density_kg_per_m3: 31.250,
        acentric_factor: -0.219,
        min_temperature_k: 13.957,
        eos: "Leachman, Jacobsen, Penoncello & Lemmon (2009), normal hydrogen",
        hazard: GasHazard::Flammable,
        dilute_viscosity: DiluteViscosity::LennardJones {
            sigma_angstrom: 2.827,
            epsilon_over_k_k: 59.7,
        },
    },
    Gas {
        name: "methane",
        formula: "CH4",
        aliases: &["ch4"],
        molar_mass_kg_per_mol: 0.016_042_5,
        cp_300k_j_per_kg_k: 2_229.4,
        critical_temperature_k: 190.564,
        critical_pressure_pa: 4.5992e6,
        critical_density_kg_per_m3: 162.66,
        acentric_factor: 0.01142,
        min_temperature_k: 90.6941,
        eos: "Setzmann & Wagner (1991)",
        hazard: GasHazard::Flammable,
        dilute_viscosity: DiluteViscosity::CorrespondingStates,
    },
    Gas {
        name: "carbon-dioxide",
        formula: "CO2",
        aliases: &["co2"],
        molar_mass_kg_per_mol: 0.044_009_5,
        cp_300k_j_per_kg_k: 845.7,
        critical_temperature_k: 304.1282,
        critical_pressure_pa: 7.3773e6,
        critical_density_kg_per_m3: 467.60,
        acentric_factor: 0.22394,
        min_temperature_k: 216.592,
        eos: "Span & Wagner (1996)",
        hazard: GasHazard::ToxicAsphyxiant,
        dilute_viscosity: DiluteViscosity::CorrespondingStates,
    },
];
