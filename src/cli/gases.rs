//! `pvhazard gases`: the gases known, with their constants and sources.

use clap::Args;

use super::Failure;
use crate::gas::GASES;
use crate::report::to_json;

#[derive(Debug, Args)]
pub(super) struct GasesArgs {
    /// Print one JSON object instead of a table.
    #[arg(long)]
    json: bool,
}

pub(super) fn gases_command(a: GasesArgs) -> Result<String, Failure> {
    #[derive(serde::Serialize)]
    struct Row {
        name: &'static str,
        formula: &'static str,
        molar_mass_kg_per_mol: f64,
        specific_gas_constant_j_per_kg_k: f64,
        cp_300k_j_per_kg_k: f64,
        gamma_300k: f64,
        critical_temperature_k: f64,
        critical_pressure_pa: f64,
        hazard: crate::gas::GasHazard,
        equation_of_state: &'static str,
    }
    #[derive(serde::Serialize)]
    struct Gases {
        command: &'static str,
        tool_version: &'static str,
        gases: Vec<Row>,
        sources: &'static str,
    }
    const SOURCES: &str = "molar mass: IUPAC/CIAAW standard atomic weights 2021 (air: CIPM-2007 dry air); cp at 300 K: NIST-JANAF Thermochemical Tables (Chase 1998), air: Lemmon et al. 2000; critical points: each gas's reference equation of state";
    let rows: Vec<Row> = GASES
        .iter()
        .map(|g| Row {
            name: g.name,
            formula: g.formula,
            molar_mass_kg_per_mol: g.molar_mass_kg_per_mol,
            specific_gas_constant_j_per_kg_k: g.specific_gas_constant(),
            cp_300k_j_per_kg_k: g.cp_300k_j_per_kg_k,
            gamma_300k: g.gamma_300k(),
            critical_temperature_k: g.critical_temperature_k,
            critical_pressure_pa: g.critical_pressure_pa,
            hazard: g.hazard,
            equation_of_state: g.eos,
        })
        .collect();
    if a.json {
        let all = Gases {
            command: "gases",
            tool_version: crate::report::TOOL_VERSION,
            gases: rows,
            sources: SOURCES,
        };
        return to_json(&all).map(|s| s + "\n").map_err(Failure::Internal);
    }
    let mut s = format!(
        "{:<15} {:<8} {:>10} {:>11} {:>11} {:>7} {:>9} {:>10}\n",
        "gas", "formula", "M g/mol", "R J/(kg K)", "cp J/(kg K)", "gamma", "Tc K", "pc bar(a)"
    );
    for r in &rows {
        s.push_str(&format!(
            "{:<15} {:<8} {:>10.4} {:>11.2} {:>11.1} {:>7.4} {:>9.2} {:>10.3}\n",
            r.name,
            r.formula,
            r.molar_mass_kg_per_mol * 1e3,
            r.specific_gas_constant_j_per_kg_k,
            r.cp_300k_j_per_kg_k,
            r.gamma_300k,
            r.critical_temperature_k,
            r.critical_pressure_pa / 1e5
        ));
    }
    s.push_str(&format!("\nSources: {SOURCES}.\n"));
    Ok(s)
}
