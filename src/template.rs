//! Worksheet templates: data, not code. A template names the calculations a worksheet shows,
//! their options, the checklist and the sign-off; a crew copies one, edits it, and points
//! `--template` at the copy.

use std::path::Path;

use serde::Deserialize;
use uom::si::f64::{Energy, Pressure};

use crate::assess::Governing;
use crate::rules::energy::DEFAULT_OVERPRESSURES_PA;
use crate::rules::vent::Process;
use crate::site::EquipmentKind;
use crate::source::{located, FileError, Source, Spanned};
use crate::units;

/// The templates that ship inside the binary, by name.
pub const BUILT_IN: [(&str, &str); 3] = [
    (
        "pre-maintenance",
        include_str!("../templates/pre-maintenance.toml"),
    ),
    ("fill-check", include_str!("../templates/fill-check.toml")),
    (
        "pressure-test",
        include_str!("../templates/pressure-test.toml"),
    ),
];

/// A checked template.
#[derive(Debug, Clone)]
pub struct Template {
    /// Its name.
    pub name: String,
    /// The worksheet's title.
    pub title: String,
    /// What the worksheet is for.
    pub purpose: String,
    /// The kind of equipment it is for.
    pub equipment: EquipmentKind,
    /// For vessels: the pressure the calculations start from.
    pub pressure: PressureBasis,
    /// The calculations, in the order they appear.
    pub calculations: Vec<Calculation>,
    /// Overpressures for standoff distances.
    pub overpressures: Vec<Pressure>,
    /// Energy to vent down to before work, if the template sets one.
    pub energy_limit: Option<Energy>,
    /// The vent-down's process.
    pub vent_process: Process,
    /// Which result governs the findings the wall model and a bound both assess; `None`
    /// leaves it to the site (the model by default).
    pub governing: Option<Governing>,
    /// The incident overpressure whose standoff keeps people back in in-service work.
    pub keep_back_overpressure: Pressure,
    /// Checklist items.
    pub checklist: Vec<String>,
    /// Sign-off roles.
    pub signoff: Vec<String>,
    /// The template's text, part of the fingerprinted inputs.
    pub text: String,
    /// Where it was read from, and the line of its `equipment` key, for messages.
    pub origin: (std::path::PathBuf, usize),
}

/// Which of a vessel's pressures the calculations use.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum PressureBasis {
    /// The normal operating pressure: what is there before maintenance.
    Operating,
    /// The MAWP: the most the vessel may hold.
    Mawp,
    /// The planned test pressure.
    Test,
}

/// A calculation a template can place on a worksheet.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Calculation {
    /// Stored energy and TNT equivalent.
    StoredEnergy,
    /// Exclusion distance and overpressure standoffs.
    Distances,
    /// Vent-down time through the drain path and the final gas temperature against MDMT.
    VentDown,
    /// The pressure to vent to before the energy is within the template's limit.
    VentTarget,
    /// The same vessel tested with water instead of gas.
    LiquidTest,
    /// Fill temperature, settled pressure, fill-to pressure and go/no-go.
    Fill,
}

impl Calculation {
    fn for_equipment(self) -> EquipmentKind {
        match self {
            Calculation::Fill => EquipmentKind::Cylinder,
            _ => EquipmentKind::Vessel,
        }
    }
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFile {
    template: RawTemplate,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawTemplate {
    name: Spanned<String>,
    title: String,
    purpose: String,
    equipment: Spanned<String>,
    pressure: Option<Spanned<String>>,
    calculations: Vec<Spanned<String>>,
    #[serde(default)]
    overpressures: Vec<Spanned<String>>,
    energy_limit: Option<Spanned<String>>,
    vent_process: Option<Spanned<String>>,
    governing: Option<Spanned<String>>,
    keep_back_overpressure: Option<Spanned<String>>,
    #[serde(default)]
    checklist: Vec<String>,
    signoff: Vec<String>,
}

/// The template named `name_or_path`: a built-in template where the argument is one's bare
/// name (whatever the working folder holds: an output folder is often named like its
/// template), else the file there. A file named like a built-in is reached as `./NAME`.
pub fn resolve(name_or_path: &str) -> Result<Template, FileError> {
    let path = Path::new(name_or_path);
    let bare_name = !name_or_path.contains(['/', std::path::MAIN_SEPARATOR]);
    if let Some(src) = built_in_source(name_or_path).filter(|_| bare_name) {
        return parse(&src);
    }
    if path.exists() || name_or_path.ends_with(".toml") || !bare_name {
        return parse(&Source::read(path)?);
    }
    Err(FileError {
        file: path.to_path_buf(),
        line: 0,
        key: "--template".to_string(),
        problem: format!(
            "no template file there and no built-in template of that name; accepted: a template file's path, or one of {}",
            BUILT_IN.map(|(n, _)| n).join(", ")
        ),
    })
}

/// The built-in template `name` (never a file, whatever is in the working folder).
pub fn built_in(name: &str) -> Result<Template, FileError> {
    built_in_source(name)
        .map(|src| parse(&src))
        .unwrap_or_else(|| {
            Err(FileError {
                file: name.into(),
                line: 0,
                key: "template".to_string(),
                problem: format!(
                    "no built-in template of that name; accepted: one of {}",
                    BUILT_IN.map(|(n, _)| n).join(", ")
                ),
            })
        })
}

/// The text of the built-in template `name`, as a source to parse.
fn built_in_source(name: &str) -> Option<Source> {
    BUILT_IN
        .iter()
        .find(|(n, _)| *n == name)
        .map(|(n, text)| Source {
            path: format!("<built-in template {n}>").into(),
            text: (*text).to_string(),
        })
}

/// The built-in template used for `kind` when `--template` is not given.
pub fn default_for(kind: EquipmentKind) -> &'static str {
    match kind {
        EquipmentKind::Vessel => "pre-maintenance",
        EquipmentKind::Cylinder => "fill-check",
    }
}

fn keyword<T: serde::de::DeserializeOwned>(
    src: &Source,
    key: &str,
    v: &Spanned<String>,
    accepted: &str,
) -> Result<T, FileError> {
    located(src, key, v, |s| {
        T::deserialize(serde::de::value::StrDeserializer::<serde::de::value::Error>::new(s))
            .map_err(|_| format!("unknown value; accepted: {accepted}"))
    })
}

/// Checks a template's text.
pub fn parse(src: &Source) -> Result<Template, FileError> {
    let raw: RawFile = src.parse()?;
    let t = raw.template;
    let equipment: EquipmentKind =
        keyword(src, "template.equipment", &t.equipment, "vessel, cylinder")?;
    let pressure = t
        .pressure
        .as_ref()
        .map(|p| keyword(src, "template.pressure", p, "operating, mawp, test"))
        .transpose()?
        .unwrap_or(PressureBasis::Operating);
    let mut calculations = Vec::new();
    for c in &t.calculations {
        let calc: Calculation = keyword(
            src,
            "template.calculations",
            c,
            "stored-energy, distances, vent-down, vent-target, liquid-test (vessels); fill (cylinders)",
        )?;
        if calc.for_equipment() != equipment {
            return Err(src.error(
                c.span().start,
                "template.calculations",
                format!(
                    "'{}' is not a calculation for a {:?} template",
                    c.get_ref(),
                    equipment
                )
                .to_lowercase(),
            ));
        }
        calculations.push(calc);
    }
    if calculations.is_empty() {
        return Err(src.error(
            0,
            "template.calculations",
            "lists no calculation; a worksheet needs at least one",
        ));
    }
    let overpressures = t
        .overpressures
        .iter()
        .map(|o| located(src, "template.overpressures", o, units::parse_overpressure))
        .collect::<Result<Vec<_>, _>>()?;
    let energy_limit = t
        .energy_limit
        .as_ref()
        .map(|e| located(src, "template.energy_limit", e, units::parse_energy))
        .transpose()?;
    if calculations.contains(&Calculation::VentTarget) && energy_limit.is_none() {
        return Err(src.error(
            0,
            "template.energy_limit",
            "'vent-target' needs an energy_limit, e.g. energy_limit = \"1 kJ\"",
        ));
    }
    let vent_process = t
        .vent_process
        .as_ref()
        .map(|p| keyword(src, "template.vent_process", p, "isentropic, isothermal"))
        .transpose()?
        .unwrap_or(Process::Isentropic);
    let governing = t
        .governing
        .as_ref()
        .map(|g| keyword(src, "template.governing", g, "model, bound"))
        .transpose()?;
    let keep_back_overpressure = match &t.keep_back_overpressure {
        Some(o) => located(
            src,
            "template.keep_back_overpressure",
            o,
            units::parse_overpressure,
        )?,
        None => Pressure::new::<uom::si::pressure::pascal>(DEFAULT_OVERPRESSURES_PA[0]),
    };
    if t.signoff.is_empty() {
        return Err(src.error(
            0,
            "template.signoff",
            "lists no sign-off role; a record needs at least one (e.g. \"Prepared\")",
        ));
    }
    located(src, "template.name", &t.name, crate::record::check_name)?;
    Ok(Template {
        name: t.name.into_inner(),
        title: t.title,
        purpose: t.purpose.split_whitespace().collect::<Vec<_>>().join(" "),
        equipment,
        pressure,
        calculations,
        overpressures,
        energy_limit,
        vent_process,
        governing,
        keep_back_overpressure,
        checklist: t.checklist,
        signoff: t.signoff,
        text: src.text.clone(),
        origin: (src.path.clone(), src.line_of(t.equipment.span().start)),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_built_in_template_parses() {
        for (name, _) in BUILT_IN {
            let t = resolve(name).unwrap();
            assert_eq!(t.name, name);
            assert!(!t.signoff.is_empty());
        }
    }

    #[test]
    fn an_unknown_calculation_is_located() {
        let src = Source {
            path: "t.toml".into(),
            text: "[template]\nname = \"x\"\ntitle = \"x\"\npurpose = \"x\"\nequipment = \"vessel\"\ncalculations = [\n  \"stored-energy\",\n  \"blast-radius\",\n]\nsignoff = [\"Prepared\"]\n".into(),
        };
        let e = parse(&src).unwrap_err();
        assert_eq!((e.line, e.key.as_str()), (8, "template.calculations"));
        assert!(e.problem.contains("blast-radius"));
    }
}
