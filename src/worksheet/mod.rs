//! Worksheets: one piece of equipment, one template, the rules it names, gathered into a
//! [`Document`] to print and a record to keep beside it.

mod cylinder;
mod vessel;

use std::collections::HashMap;
use std::sync::{Arc, Mutex};

use serde::Serialize;
use sha2::{Digest, Sha256};
use uom::si::f64::{AvailableEnergy, Energy, Pressure, ThermodynamicTemperature, Time};
use uom::si::{
    available_energy::joule_per_kilogram, energy::joule, pressure::pascal, time::second,
};

use crate::assess::{
    self, Discharge, EnergyAsk, Finding, Governing, Hazard, PlannedFill, Verdict, WallVent, Work,
};
use crate::caution::{deferral, distinct, ordered, Caution, Level, Note, Part};
use crate::gas::GasModel;
use crate::report::{plots, Document, Entry, Plot, Section, Value, TOOL_VERSION};
use crate::rules::energy::{
    self, EnergyInput, DEFAULT_OVERPRESSURES_PA, DEFAULT_TNT_ENERGY_J_PER_KG,
};
use crate::rules::fill::FillInput;
use crate::rules::room::Room;
use crate::rules::transient::{CylinderMass, Depressuring, Exchange, FillRate, HeatTransfer, Wall};
use crate::rules::vent::{VentInput, DEFAULT_TARGET_MARGIN};
use crate::site::{Cylinder, Equipment, EquipmentKind, Material, Site, VentTo, Vessel};

/// The depressuring check's cap on the gauge pressure to reach, Pa (690 kPa(g)).
const DEPRESSURING_CAP_PA: f64 = 690.0e3;
/// The depressuring check's time limit, s (15 minutes).
const DEPRESSURING_LIMIT_S: f64 = 900.0;
use crate::source::FileError;
use crate::template::{Calculation, PressureBasis, Template};
use crate::InputError;

/// Who and what the worksheet is for, beyond the site and template.
#[derive(Debug, Clone)]
pub struct Meta {
    /// The work order the worksheet is attached to.
    pub work_order: Option<String>,
    /// The person who prepared it.
    pub prepared_by: Option<String>,
    /// Its date and time, in the site's time zone.
    pub date: chrono::DateTime<chrono::FixedOffset>,
}

/// A worksheet: the printable document and the record kept with it.
#[derive(Debug, Clone)]
pub struct Worksheet {
    /// What the PDF shows.
    pub document: Document,
    /// What the JSON sidecar holds.
    pub record: Record,
    /// The decision and its findings.
    pub verdict: Verdict,
    /// The highest caution level raised.
    pub highest: Level,
    /// The isentropic stored energy at the basis pressure (at service pressure for a
    /// cylinder), for ranking.
    pub stored_energy: Energy,
}

/// The JSON record beside a worksheet's PDF: enough to recompute and to match the print.
#[derive(Debug, Clone, Serialize)]
pub struct Record {
    /// pvhazard's version.
    pub tool_version: &'static str,
    /// The worksheet's date, RFC 3339.
    pub date: String,
    /// Work order, if given.
    pub work_order: Option<String>,
    /// Who prepared it.
    pub prepared_by: Option<String>,
    /// Template name.
    pub template: String,
    /// SHA-256 of `inputs` (compact JSON), hex.
    pub fingerprint: String,
    /// The canonical inputs: everything the results depend on.
    pub inputs: serde_json::Value,
    /// The decision and the findings behind it, over every calculation on the worksheet.
    pub verdict: Verdict,
    /// Each calculation's full JSON report.
    pub results: serde_json::Map<String, serde_json::Value>,
    /// Every banner on the worksheet, highest first, the deferral last.
    pub cautions: Vec<Caution>,
    /// How the results were reached.
    pub basis: Vec<Note>,
}

/// The canonical inputs of a worksheet, fingerprinted.
#[derive(Serialize)]
struct Inputs<'a> {
    site: SiteInputs<'a>,
    equipment: &'a Equipment,
    template: &'a str,
    model: crate::gas::ModelKind,
}

#[derive(Serialize)]
struct SiteInputs<'a> {
    name: &'a str,
    location: &'a str,
    ambient_pressure_pa: Pressure,
    ambient_temperature_k: ThermodynamicTemperature,
    winter_minimum_k: Option<ThermodynamicTemperature>,
    clearance_m: Option<uom::si::f64::Length>,
    units: crate::units::UnitSystem,
    governing: Option<Governing>,
}

impl Serialize for Equipment {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        #[derive(Serialize)]
        #[serde(tag = "kind", rename_all = "lowercase")]
        enum Tagged<'a> {
            Vessel(&'a Vessel),
            Cylinder(&'a Cylinder),
        }
        match self {
            Equipment::Vessel(v) => Tagged::Vessel(v),
            Equipment::Cylinder(c) => Tagged::Cylinder(c),
        }
        .serialize(s)
    }
}

/// A rule's refusal of an item's values, located at the key in the site file it came from.
///
/// Rules name their inputs as the command line does; `basis` is the site key the vessel's
/// calculations started from.
fn item_error(site: &Site, item: &Equipment, basis: &'static str, e: InputError) -> FileError {
    let key: Option<&'static str> = match (item, e.field.as_str()) {
        (Equipment::Vessel(_), "pressure") => Some(basis),
        (Equipment::Vessel(_), "temperature") => Some("temperature"),
        (Equipment::Vessel(_), "volume") => Some("volume"),
        (Equipment::Vessel(_), "mawp") => Some("mawp"),
        (Equipment::Vessel(_), "orifice") => Some("drain.orifice"),
        (Equipment::Vessel(_), "min-metal-temperature") => Some("mdmt"),
        (Equipment::Cylinder(_), "from") => Some("residual_pressure"),
        (Equipment::Cylinder(_), "to") => Some("service_pressure"),
        (Equipment::Cylinder(_), "volume") => Some("water_capacity"),
        (Equipment::Cylinder(_), "supply-temperature") => Some("supply_temperature"),
        (Equipment::Cylinder(_), "rated-temperature") => Some("rated_temperature"),
        _ => None,
    };
    let origin = item.origin();
    // A value the item left to the site (its temperature) is the site's to fix.
    let site_key = match e.field.as_str() {
        "temperature" | "initial-temperature" | "ambient-temperature" => {
            Some("ambient_temperature")
        }
        "clearance" => Some("clearance"),
        _ => None,
    };
    let (prefix, found) = match key.and_then(|k| origin.keys.get(k).map(|x| (k, x))) {
        Some((k, at)) => (format!("{}.{k}", origin.prefix), Some(at)),
        None => match site_key.and_then(|k| site.origin.keys.get(k).map(|x| (k, x))) {
            Some((k, at)) => (format!("site.{k}"), Some(at)),
            None => (format!("{} ('{}')", origin.prefix, item.tag()), None),
        },
    };
    let (line, value) = found.map_or((origin.line, e.value.clone()), |(l, v)| (*l, v.clone()));
    FileError {
        file: site.path.clone(),
        line,
        key: prefix,
        problem: format!("'{value}' for '{}': {}", item.tag(), e.problem),
    }
}

fn kind_word(item: &Equipment) -> &'static str {
    match item {
        Equipment::Vessel(_) => "vessel",
        Equipment::Cylinder(_) => "cylinder",
    }
}

/// Why `template` does not fit `item` (the wrong kind of equipment, or a value the template
/// starts from that the item lacks), or `None` when it fits.
pub fn misfit(item: &Equipment, template: &Template) -> Option<String> {
    if item.kind() != template.equipment {
        return Some(format!(
            "template '{}' is for a {}, and '{}' is a {}",
            template.name,
            match template.equipment {
                EquipmentKind::Vessel => "vessel",
                EquipmentKind::Cylinder => "cylinder",
            },
            item.tag(),
            kind_word(item)
        ));
    }
    match item {
        Equipment::Vessel(v)
            if template.pressure == PressureBasis::Test && v.test_pressure.is_none() =>
        {
            Some(format!(
                "template '{}' starts from the test pressure, and '{}' has no test_pressure",
                template.name, v.tag
            ))
        }
        _ => None,
    }
}

/// Builds the worksheet for `item` on `site` with `template`.
pub fn build(
    model: &dyn GasModel,
    site: &Site,
    item: &Equipment,
    template: &Template,
    meta: &Meta,
) -> Result<Worksheet, FileError> {
    build_in(&Memo::default(), model, site, item, template, meta)
}

/// Worksheets computed in one run, by what their calculations depend on: items that differ
/// only by tag and description (a fleet of like cylinders, a row of like receivers) share
/// one computation. It keeps at most [`MEMO_ENTRIES`] distinct items, so a run's memory
/// does not grow with the number of items. A memo may be shared between threads.
#[derive(Default)]
pub struct Memo {
    parts: Mutex<HashMap<String, Arc<Parts>>>,
}

/// How many distinct items a [`Memo`] keeps.
pub const MEMO_ENTRIES: usize = 64;

impl Memo {
    fn get(&self, key: &str) -> Option<Arc<Parts>> {
        self.lock().get(key).cloned()
    }

    fn keep(&self, key: String, parts: Arc<Parts>) {
        let mut map = self.lock();
        if map.len() >= MEMO_ENTRIES {
            map.clear();
        }
        map.insert(key, parts);
    }

    fn lock(&self) -> std::sync::MutexGuard<'_, HashMap<String, Arc<Parts>>> {
        // A thread that panicked while holding the lock left whole entries behind.
        self.parts.lock().unwrap_or_else(|e| e.into_inner())
    }
}

/// As [`build`], reusing (and adding to) the calculations kept in `memo`.
pub fn build_in(
    memo: &Memo,
    model: &dyn GasModel,
    site: &Site,
    item: &Equipment,
    template: &Template,
    meta: &Meta,
) -> Result<Worksheet, FileError> {
    if item.kind() != template.equipment {
        let (file, line) = template.origin.clone();
        let kind = |k: EquipmentKind| match k {
            EquipmentKind::Vessel => "vessel",
            EquipmentKind::Cylinder => "cylinder",
        };
        return Err(FileError {
            file,
            line,
            key: "template.equipment".to_string(),
            problem: format!(
                "the template is for a {}, and '{}' is a {}; choose a {} template",
                kind(template.equipment),
                item.tag(),
                kind_word(item),
                kind_word(item)
            ),
        });
    }
    let inputs = Inputs {
        site: SiteInputs {
            name: &site.name,
            location: &site.location,
            ambient_pressure_pa: site.ambient,
            ambient_temperature_k: site.ambient_temperature,
            winter_minimum_k: site.winter_minimum,
            clearance_m: site.clearance,
            units: site.units,
            governing: site.governing,
        },
        equipment: item,
        template: &template.text,
        model: model.kind(),
    };
    let inputs_json = serde_json::to_value(&inputs).map_err(|e| FileError {
        file: site.path.clone(),
        line: 0,
        key: item.tag().to_string(),
        problem: format!("internal error: inputs not serialisable: {e}"),
    })?;
    let fingerprint = hex(&Sha256::digest(inputs_json.to_string().as_bytes()));

    // The calculations depend on everything fingerprinted but the item's tag and
    // description; a refusal is not kept, so that its message names the item refused.
    let mut key = inputs_json.clone();
    if let Some(e) = key.get_mut("equipment").and_then(|e| e.as_object_mut()) {
        e.remove("tag");
        e.remove("description");
    }
    let key = key.to_string();
    let sheet = match memo.get(&key) {
        Some(parts) => Parts::clone(&parts),
        None => {
            let mut sheet = Parts::default();
            let basis = match template.pressure {
                PressureBasis::Operating => "operating_pressure",
                PressureBasis::Mawp => "mawp",
                PressureBasis::Test => "test_pressure",
            };
            match item {
                Equipment::Vessel(v) => vessel::vessel_parts(model, site, v, template, &mut sheet)
                    .map_err(|e| match e {
                        Failure::Input(e) => item_error(site, item, basis, e),
                        Failure::File(e) => e,
                    })?,
                Equipment::Cylinder(c) => {
                    cylinder::cylinder_parts(model, site, c, template, &mut sheet)
                        .map_err(|e| item_error(site, item, basis, e))?
                }
            }
            memo.keep(key, Arc::new(sheet.clone()));
            sheet
        }
    };
    let verdict = sheet.verdict;
    let cautions = ordered(
        verdict
            .banners()
            .into_iter()
            .chain(sheet.cautions)
            .collect(),
    );
    let basis = distinct(sheet.basis);
    let highest = cautions
        .iter()
        .map(|c| c.level)
        .max()
        .unwrap_or(Level::Notice);
    let date = meta.date.to_rfc3339();
    let mut header = vec![
        ("Site".to_string(), site.name.clone()),
        ("Location".to_string(), site.location.clone()),
        ("Tag".to_string(), item.tag().to_string()),
        ("Description".to_string(), item.description().to_string()),
        ("Gas".to_string(), item.gas().name.to_string()),
        (
            "Work order".to_string(),
            meta.work_order
                .clone()
                .unwrap_or_else(|| "(none given)".to_string()),
        ),
        (
            "Date".to_string(),
            meta.date.format("%Y-%m-%d %H:%M UTC%:z").to_string(),
        ),
        (
            "Prepared by".to_string(),
            meta.prepared_by
                .clone()
                .unwrap_or_else(|| "(to be completed)".to_string()),
        ),
        ("Template".to_string(), template.name.clone()),
        ("Gas model".to_string(), model.kind().name().to_string()),
    ];
    header.push(("Ambient".to_string(), site.ambient_basis.clone()));
    let document = Document {
        title: template.title.clone(),
        template: template.name.clone(),
        purpose: template.purpose.clone(),
        header,
        verdict: verdict.clone(),
        cautions: cautions.clone(),
        basis: basis.clone(),
        inputs: sheet.inputs,
        sections: sheet.sections,
        plots: sheet.plots,
        checklist: template.checklist.clone(),
        signoff: template.signoff.clone(),
        footer: deferral().message(),
        tool_version: TOOL_VERSION.to_string(),
        fingerprint: fingerprint.clone(),
        date: meta.date,
        units: site.units,
        ambient: site.ambient,
    };
    let record = Record {
        tool_version: TOOL_VERSION,
        date,
        work_order: meta.work_order.clone(),
        prepared_by: meta.prepared_by.clone(),
        template: template.name.clone(),
        fingerprint,
        inputs: inputs_json,
        verdict: verdict.clone(),
        results: sheet.results,
        cautions,
        basis,
    };
    Ok(Worksheet {
        document,
        record,
        verdict,
        highest,
        stored_energy: sheet.stored_energy,
    })
}

/// What the calculations contribute, gathered as they run.
#[derive(Default, Clone)]
struct Parts {
    inputs: Vec<Entry>,
    sections: Vec<Section>,
    plots: Vec<Plot>,
    verdict: Verdict,
    /// Cautions that are not a finding's banner: a model's limits, a result not resolved.
    cautions: Vec<Caution>,
    basis: Vec<Note>,
    results: serde_json::Map<String, serde_json::Value>,
    stored_energy: Energy,
}

impl Parts {
    fn section(&mut self, heading: impl Into<String>, entries: Vec<Entry>) {
        if !entries.is_empty() {
            self.sections.push(Section {
                heading: heading.into(),
                entries,
            });
        }
    }

    /// Takes an assessment's verdict, basis and the cautions that are not its banners.
    fn assessed(&mut self, verdict: &Verdict, cautions: &[Caution], basis: &[Note]) {
        let banners = verdict.banners();
        let last = deferral();
        self.cautions.extend(
            cautions
                .iter()
                .filter(|c| **c != last && !banners.contains(c))
                .cloned(),
        );
        self.verdict = std::mem::take(&mut self.verdict).merged(verdict.clone());
        self.basis.extend(basis.iter().cloned());
    }

    fn result<T: Serialize>(&mut self, key: &str, report: &T) {
        if let Ok(v) = serde_json::to_value(report) {
            self.results.insert(key.to_string(), v);
        }
    }
}

enum Failure {
    Input(InputError),
    File(FileError),
}

impl From<InputError> for Failure {
    fn from(e: InputError) -> Failure {
        Failure::Input(e)
    }
}

fn input(label: &str, value: Value) -> Entry {
    Entry {
        label: label.to_string(),
        label_value: None,
        value,
        method: None,
    }
}

fn site_inputs(site: &Site, out: &mut Parts) {
    out.inputs.push(input(
        "Ambient pressure",
        Value::AbsolutePressure(site.ambient),
    ));
    out.inputs.push(input(
        "Ambient temperature",
        Value::Temperature(site.ambient_temperature),
    ));
    out.inputs.extend(
        site.winter_minimum
            .map(|x| input("Winter minimum temperature", Value::Temperature(x))),
    );
    out.inputs.extend(
        site.clearance
            .map(|x| input("Site clearance", Value::Distance(x))),
    );
}

/// Which result governs: the bound if the site or the template asks for it.
fn governing(site: &Site, template: &Template) -> Governing {
    Governing::either(site.governing, template.governing)
}

fn hex(bytes: &[u8]) -> String {
    bytes.iter().map(|b| format!("{b:02x}")).collect()
}
