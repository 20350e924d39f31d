//! The gases pvhazard knows, with the constants the models need and where each comes from.

use super::{Gas, GasHazard};

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
//   its lower limit of 59.75 K.
// - viscosity and thermal conductivity at 300 K and 1 atm: Incropera & DeWitt, Fundamentals
//   of Heat and Mass Transfer, table A.4, and the NIST Chemistry WebBook fluid data (from
//   memory, to about 3 %); used only by the heat-transfer correlations.
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
        acentric_factor: 0.0335,
        min_temperature_k: 59.75,
        eos: "Lemmon, Jacobsen, Penoncello & Friend (2000), air as a pseudo-pure fluid",
        hazard: GasHazard::Air,
        viscosity_300k_pa_s: 1.846e-05,
        conductivity_300k_w_per_m_k: 0.0263,
    },
    Gas {
        name: "nitrogen",
        formula: "N2",
        aliases: &["n2"],
        molar_mass_kg_per_mol: 0.028_013_4,
        cp_300k_j_per_kg_k: 1_039.7,
        critical_temperature_k: 126.192,
        critical_pressure_pa: 3.3958e6,
        acentric_factor: 0.0372,
        min_temperature_k: 63.151,
        eos: "Span, Lemmon, Jacobsen, Wagner & Yokozeki (2000)",
        hazard: GasHazard::Asphyxiant,
        viscosity_300k_pa_s: 1.790e-05,
        conductivity_300k_w_per_m_k: 0.0259,
    },
    Gas {
        name: "oxygen",
        formula: "O2",
        aliases: &["o2"],
        molar_mass_kg_per_mol: 0.031_998_8,
        cp_300k_j_per_kg_k: 918.3,
        critical_temperature_k: 154.5994,
        critical_pressure_pa: 5.0464e6,
        acentric_factor: 0.0222,
        min_temperature_k: 54.361,
        eos: "Schmidt & Wagner (1985)",
        hazard: GasHazard::Oxidiser,
        viscosity_300k_pa_s: 2.070e-05,
        conductivity_300k_w_per_m_k: 0.0267,
    },
    Gas {
        name: "argon",
        formula: "Ar",
        aliases: &["ar"],
        molar_mass_kg_per_mol: 0.039_948,
        cp_300k_j_per_kg_k: 520.33,
        critical_temperature_k: 150.687,
        critical_pressure_pa: 4.863e6,
        acentric_factor: -0.00219,
        min_temperature_k: 83.806,
        eos: "Tegeler, Span & Wagner (1999)",
        hazard: GasHazard::Asphyxiant,
        viscosity_300k_pa_s: 2.270e-05,
        conductivity_300k_w_per_m_k: 0.0178,
    },
    Gas {
        name: "helium",
        formula: "He",
        aliases: &["he"],
        molar_mass_kg_per_mol: 0.004_002_602,
        cp_300k_j_per_kg_k: 5_193.1,
        critical_temperature_k: 5.1953,
        critical_pressure_pa: 2.2832e5,
        acentric_factor: -0.3835,
        min_temperature_k: 2.1768,
        eos: "Ortiz-Vega, Hall, Holste & Lemmon (2013)",
        hazard: GasHazard::Asphyxiant,
        viscosity_300k_pa_s: 1.990e-05,
        conductivity_300k_w_per_m_k: 0.155,
    },
    Gas {
        name: "hydrogen",
        formula: "H2",
        aliases: &["h2"],
        molar_mass_kg_per_mol: 0.002_015_88,
        cp_300k_j_per_kg_k: 14_311.0,
        critical_temperature_k: 33.145,
        critical_pressure_pa: 1.2964e6,
        acentric_factor: -0.219,
        min_temperature_k: 13.957,
        eos: "Leachman, Jacobsen, Penoncello & Lemmon (2009), normal hydrogen",
        hazard: GasHazard::Flammable,
        viscosity_300k_pa_s: 8.960e-6,
        conductivity_300k_w_per_m_k: 0.183,
    },
    Gas {
        name: "methane",
        formula: "CH4",
        aliases: &["ch4"],
        molar_mass_kg_per_mol: 0.016_042_5,
        cp_300k_j_per_kg_k: 2_229.4,
        critical_temperature_k: 190.564,
        critical_pressure_pa: 4.5992e6,
        acentric_factor: 0.01142,
        min_temperature_k: 90.6941,
        eos: "Setzmann & Wagner (1991)",
        hazard: GasHazard::Flammable,
        viscosity_300k_pa_s: 1.120e-05,
        conductivity_300k_w_per_m_k: 0.0343,
    },
    Gas {
        name: "carbon-dioxide",
        formula: "CO2",
        aliases: &["co2"],
        molar_mass_kg_per_mol: 0.044_009_5,
        cp_300k_j_per_kg_k: 845.7,
        critical_temperature_k: 304.1282,
        critical_pressure_pa: 7.3773e6,
        acentric_factor: 0.22394,
        min_temperature_k: 216.592,
        eos: "Span & Wagner (1996)",
        hazard: GasHazard::ToxicAsphyxiant,
        viscosity_300k_pa_s: 1.500e-05,
        conductivity_300k_w_per_m_k: 0.0166,
    },
];
