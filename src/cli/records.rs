//! The site commands: dated worksheets with their records, and the site check.

use std::io::IsTerminal;

use clap::Args;

use super::{Failure, EXIT_DANGER, EXIT_OK};
use crate::assess::{Status, Verdict};
use crate::caution::{Caution, Level};
use crate::gas::ModelKind;
use crate::record;
use crate::report::{render_pdf, to_json, Paper};
use crate::site::{self, Equipment, EquipmentKind, Site};
use crate::template;
use crate::worksheet::{self, Meta};
use crate::InputError;

#[derive(Debug, Args)]
pub(super) struct WorksheetArgs {
    /// The site file (TOML).
    #[arg(value_name = "SITE.toml")]
    site: std::path::PathBuf,
    /// Tag of an item on the site; repeatable.
    #[arg(long, value_name = "TAG", conflicts_with = "all")]
    tag: Vec<String>,
    /// Every item on the site.
    #[arg(long)]
    all: bool,
    /// A built-in template's name (pre-maintenance, fill-check, pressure-test) or a template file [default: pre-maintenance for vessels, fill-check for cylinders].
    #[arg(long, value_name = "NAME|PATH")]
    template: Option<String>,
    /// The work order the worksheet is attached to.
    #[arg(long, value_name = "ID")]
    work_order: Option<String>,
    /// The name of the person preparing the worksheet.
    #[arg(long, value_name = "NAME")]
    prepared_by: Option<String>,
    /// The worksheet's date and time: 2026-03-14T09:30:00+01:00, or without an offset (2026-03-14T09:30, 2026-03-14) in the site's time zone [default: SOURCE_DATE_EPOCH if set, else now, in the site's time zone].
    #[arg(long, value_name = "DATE", value_parser = parse_date)]
    date: Option<DateArg>,
    /// Paper size.
    #[arg(long, value_enum, ignore_case = true, default_value = "a4")]
    paper: Paper,
    /// Folder for the PDFs and their JSON records (created if missing).
    #[arg(long, value_name = "DIR", default_value = ".")]
    out: std::path::PathBuf,
    /// Replace existing records of the same name.
    #[arg(long)]
    force: bool,
    /// Gas model: the reference equation of state of the gas, or the ideal gas for comparison.
    #[arg(long, value_enum, ignore_case = true, default_value = "real")]
    model: ModelKind,
}

#[derive(Debug, Args)]
pub(super) struct CheckArgs {
    /// The site file (TOML).
    #[arg(value_name = "SITE.toml")]
    site: std::path::PathBuf,
    /// Print one JSON object instead of a table.
    #[arg(long)]
    json: bool,
    /// Gas model: the reference equation of state of the gas, or the ideal gas for comparison.
    #[arg(long, value_enum, ignore_case = true, default_value = "real")]
    model: ModelKind,
}

/// Longest preparer's name accepted, in characters (it is printed, not a file name).
pub const MAX_PREPARER: usize = 120;

/// Latest worksheet date accepted, in seconds since 1970-01-01 UTC: the end of 9999, the
/// last year a record's four-digit dates can hold.
const LAST_EPOCH: i64 = 253_402_300_799;

/// A worksheet date as given: with its own offset, or a local time in the site's zone.
#[derive(Debug, Clone, Copy)]
pub enum DateArg {
    /// RFC 3339, with an offset.
    Fixed(chrono::DateTime<chrono::FixedOffset>),
    /// A date, or a date and time, to be read in the site's time zone.
    Local(chrono::NaiveDateTime),
}

pub fn parse_date(s: &str) -> Result<DateArg, String> {
    const ACCEPTED: &str = "accepted: 2026-03-14T09:30:00+01:00 or 2026-03-14T08:30:00Z, or in the site's time zone 2026-03-14T09:30 or 2026-03-14; from 1970 to 9999";
    let t = s.trim();
    let in_range = |secs: i64| (0..=LAST_EPOCH).contains(&secs);
    let outside = || format!("'{s}' is outside the years a record is dated in; {ACCEPTED}");
    if let Ok(d) = chrono::DateTime::parse_from_rfc3339(t) {
        return in_range(d.timestamp())
            .then_some(DateArg::Fixed(d))
            .ok_or_else(outside);
    }
    let local = [
        "%Y-%m-%dT%H:%M:%S",
        "%Y-%m-%dT%H:%M",
        "%Y-%m-%d %H:%M:%S",
        "%Y-%m-%d %H:%M",
    ]
    .iter()
    .find_map(|f| chrono::NaiveDateTime::parse_from_str(t, f).ok())
    .or_else(|| {
        chrono::NaiveDate::parse_from_str(t, "%Y-%m-%d")
            .ok()
            .and_then(|d| d.and_hms_opt(0, 0, 0))
    })
    .ok_or_else(|| format!("'{s}' is not a date and time; {ACCEPTED}"))?;
    // A day either side of the range leaves room for any time zone.
    let secs = local.and_utc().timestamp();
    (in_range(secs - 86_400) && in_range(secs + 86_400))
        .then_some(DateArg::Local(local))
        .ok_or_else(outside)
}

/// The worksheet date: `--date`, else SOURCE_DATE_EPOCH, else now; in the site's zone
/// unless `--date` gave its own offset.
pub fn worksheet_date(
    given: Option<DateArg>,
    zone: chrono::FixedOffset,
) -> Result<chrono::DateTime<chrono::FixedOffset>, Failure> {
    match given {
        Some(DateArg::Fixed(d)) => return Ok(d),
        Some(DateArg::Local(t)) => {
            return t.and_local_timezone(zone).single().ok_or_else(|| {
                Failure::Refused(format!(
                    "--date = '{t}': not a time in the site's zone ({zone}); accepted: the date with its offset, e.g. 2026-03-14T09:30:00+01:00"
                ))
            })
        }
        None => {}
    }
    if let Ok(epoch) = std::env::var("SOURCE_DATE_EPOCH") {
        let refused = || {
            Failure::Refused(format!(
                "SOURCE_DATE_EPOCH = '{epoch}': not a whole number of seconds since 1970-01-01 UTC in range; accepted: 0 to {LAST_EPOCH} (the end of 9999), e.g. 1773477000, or unset it and give --date"
            ))
        };
        let secs: i64 = epoch.trim().parse().map_err(|_| refused())?;
        if !(0..=LAST_EPOCH).contains(&secs) {
            return Err(refused());
        }
        let utc = chrono::DateTime::from_timestamp(secs, 0).ok_or_else(refused)?;
        return Ok(utc.with_timezone(&zone));
    }
    Ok(chrono::Utc::now().with_timezone(&zone))
}

/// The items `--tag` names (in the order given), or every item with `--all`.
pub(super) fn selected<'a>(
    site: &'a Site,
    tags: &[String],
    all: bool,
) -> Result<Vec<&'a Equipment>, InputError> {
    if all {
        return Ok(site.equipment.iter().collect());
    }
    let tags_on_site = || {
        site.equipment
            .iter()
            .map(|e| e.tag())
            .collect::<Vec<_>>()
            .join(", ")
    };
    if tags.is_empty() {
        return Err(InputError::new(
            "tag",
            "(none)",
            format!(
                "no item named; accepted: --tag TAG (repeatable) for one item or a few, or --all for every item on the site ({})",
                tags_on_site()
            ),
        ));
    }
    let mut chosen: Vec<&Equipment> = Vec::new();
    for t in tags {
        let item = site
            .equipment
            .iter()
            .find(|e| e.tag().eq_ignore_ascii_case(t))
            .ok_or_else(|| {
                InputError::new(
                    "tag",
                    t.clone(),
                    format!(
                        "no item with this tag on the site; accepted: {}",
                        tags_on_site()
                    ),
                )
            })?;
        // A tag given twice is one worksheet, not a clash with itself.
        if !chosen.iter().any(|c| std::ptr::eq(*c, item)) {
            chosen.push(item);
        }
    }
    Ok(chosen)
}

pub(super) fn worksheet_command(a: WorksheetArgs) -> Result<String, Failure> {
    if let Some(wo) = &a.work_order {
        record::check_name(wo)
            .map_err(|problem| InputError::new("work-order", crate::as_typed(wo), problem))?;
    }
    if let Some(who) = &a.prepared_by {
        record::check_text(who, MAX_PREPARER)
            .map_err(|problem| InputError::new("prepared-by", crate::as_typed(who), problem))?;
    }
    let site = site::load(&a.site)?;
    let items = selected(&site, &a.tag, a.all)?;
    let date = worksheet_date(a.date, site.time_zone)?;
    let meta = Meta {
        work_order: a.work_order.clone(),
        prepared_by: a.prepared_by.clone(),
        date,
    };
    let given_template = a.template.as_deref().map(template::resolve).transpose()?;
    let mode = if a.force {
        record::Mode::Replace
    } else {
        record::Mode::Complete
    };
    // One batch: each record is staged in the folder as soon as it is rendered (so that a
    // long batch holds no more than a few in memory), and none is linked in until every
    // item is computed; a failure removes what was staged.
    let batch = record::Batch::open(&a.out, mode).map_err(|e| {
        InputError::new(
            "out",
            a.out.display().to_string(),
            format!("{e}; accepted: a folder that exists or can be created, and can be written"),
        )
    })?;
    let (done, skipped) =
        batch_of_worksheets(&a, &site, &items, given_template.as_ref(), &meta, &batch)?;
    if done.is_empty() && !skipped.is_empty() {
        return Err(Failure::Refused(format!(
            "the template fits no item on the site; nothing is written:\n{}",
            skipped.concat().trim_end()
        )));
    }
    let written = batch.commit().map_err(record_failure)?;
    if !written.stale.is_empty() {
        eprintln!(
            "pvhazard: removed {} temporary file(s) an interrupted run had left in {}",
            written.stale.len(),
            a.out.display()
        );
    }
    let mut text = String::new();
    for d in &done {
        let names = ["json", "pdf"].map(|ext| a.out.join(format!("{}.{ext}", d.stem)));
        text.push_str(&format!(
            "{}: {}, {} ({}; highest caution: {})\n",
            d.tag,
            names[0].display(),
            names[1].display(),
            d.decision.word(),
            d.highest.word()
        ));
    }
    if !written.kept.is_empty() {
        text.push_str(&format!(
            "{} of these files were already there with the same contents (an earlier run of this command) and are kept as they are\n",
            written.kept.len()
        ));
    }
    text.push_str(&skipped.concat());
    Ok(text)
}

/// One worksheet staged in a batch: what the summary line says of it.
struct Staged {
    tag: String,
    decision: crate::assess::Decision,
    highest: Level,
    stem: String,
}

/// What an item of a batch came to: staged, or skipped with the reason.
enum Outcome {
    Staged(Staged),
    Skipped(String),
}

/// Computes, renders and stages every item's worksheet on all cores; returns the staged
/// ones and the skipped ones' lines, both in item order.
fn batch_of_worksheets(
    a: &WorksheetArgs,
    site: &Site,
    items: &[&Equipment],
    given_template: Option<&template::Template>,
    meta: &Meta,
    batch: &record::Batch,
) -> Result<(Vec<Staged>, Vec<String>), Failure> {
    let progress = a.all && std::io::stderr().is_terminal();
    let memo = worksheet::Memo::default();
    let defaults = match given_template {
        Some(_) => Vec::new(),
        None => default_templates(items, template::resolve)?,
    };
    let work = |i: usize, item: &&Equipment| -> Result<Outcome, Failure> {
        let template = match given_template {
            Some(t) => t,
            None => default_of(&defaults, item)?,
        };
        // With --all, a template that does not fit an item skips it, with the reason; the
        // batch fails only when it fits no item.
        if a.all {
            if let Some(why) = worksheet::misfit(item, template) {
                return Ok(Outcome::Skipped(format!(
                    "{}: skipped ({why})\n",
                    item.tag()
                )));
            }
        }
        let made = made(&memo, site, item, template, meta, a.paper, a.model)?;
        let stem = made.stem;
        batch
            .add(&format!("{stem}.json"), 2 * i, made.json.as_bytes())
            .and_then(|_| batch.add(&format!("{stem}.pdf"), 2 * i + 1, &made.pdf))
            .map_err(record_failure)?;
        Ok(Outcome::Staged(Staged {
            tag: item.tag().to_string(),
            decision: made.verdict.decision,
            highest: made.highest,
            stem,
        }))
    };
    let mut finished = 0;
    let outcomes = crate::parallel::collect(items, crate::parallel::threads(), work, |i| {
        finished += 1;
        if progress {
            eprint!("\r[{finished}/{}] {:<24}", items.len(), items[i].tag());
        }
    })?;
    if progress {
        // Clear the progress line: the summary follows on standard output.
        eprint!("\r{:<40}\r", "");
    }
    let mut done = Vec::new();
    let mut skipped = Vec::new();
    for outcome in outcomes {
        match outcome {
            Outcome::Staged(s) => done.push(s),
            Outcome::Skipped(line) => skipped.push(line),
        }
    }
    Ok((done, skipped))
}

/// The default template of each kind of item among `items`, resolved once for the run.
fn default_templates(
    items: &[&Equipment],
    resolve: impl Fn(&str) -> Result<template::Template, crate::source::FileError>,
) -> Result<Vec<(EquipmentKind, template::Template)>, crate::source::FileError> {
    let mut out: Vec<(EquipmentKind, template::Template)> = Vec::new();
    for item in items {
        if !out.iter().any(|(k, _)| *k == item.kind()) {
            out.push((item.kind(), resolve(template::default_for(item.kind()))?));
        }
    }
    Ok(out)
}

/// `item`'s default template among those [`default_templates`] resolved for its run.
fn default_of<'t>(
    defaults: &'t [(EquipmentKind, template::Template)],
    item: &Equipment,
) -> Result<&'t template::Template, Failure> {
    defaults
        .iter()
        .find(|(k, _)| *k == item.kind())
        .map(|(_, t)| t)
        .ok_or_else(|| Failure::Internal(format!("no default template for {}", item.tag())))
}

fn record_failure(e: record::RecordError) -> Failure {
    match e {
        record::RecordError::Exists(_) => Failure::Refused(e.to_string()),
        record::RecordError::Folder { .. } | record::RecordError::Io { .. } => {
            Failure::Internal(e.to_string())
        }
    }
}

/// One worksheet made and rendered, not yet written: what its summary line says, its file
/// stem and its two files.
pub struct Made {
    /// The decision and the findings behind it.
    pub verdict: Verdict,
    /// The highest caution level raised.
    pub highest: Level,
    /// The records' file stem ([`record::stem`]).
    pub stem: String,
    /// The PDF.
    pub pdf: Vec<u8>,
    /// The JSON record, as written.
    pub json: String,
}

/// The worksheet for `item` with `template`, rendered as `worksheet` renders it; items
/// alike but for their tag share the calculations kept in `memo`.
pub fn made(
    memo: &worksheet::Memo,
    site: &Site,
    item: &Equipment,
    template: &template::Template,
    meta: &Meta,
    paper: Paper,
    model: ModelKind,
) -> Result<Made, Failure> {
    let gas = super::gas_model(model, item.gas());
    let sheet = worksheet::build_in(memo, gas.as_ref(), site, item, template, meta)?;
    let pdf = render_pdf(&sheet.document, paper).map_err(|e| Failure::Internal(e.to_string()))?;
    let json = to_json(&sheet.record).map_err(Failure::Internal)? + "\n";
    let stem = record::stem(
        &site.name,
        item.tag(),
        &template.name,
        meta.work_order.as_deref(),
        &meta.date.format("%Y-%m-%d").to_string(),
    );
    Ok(Made {
        verdict: sheet.verdict,
        highest: sheet.highest,
        stem,
        pdf,
        json,
    })
}

/// One item of a site as `check` ranks it.
#[derive(Debug, serde::Serialize)]
pub struct Ranked {
    /// The item's tag.
    pub tag: String,
    /// Vessel or cylinder.
    pub kind: EquipmentKind,
    /// The gas's name.
    pub gas: &'static str,
    /// The template it was checked with (its kind's default).
    pub template: String,
    /// The isentropic stored energy it was ranked by.
    pub stored_energy_j: uom::si::f64::Energy,
    /// The decision and its findings.
    pub verdict: Verdict,
    /// The highest caution level raised.
    pub highest_level: Level,
    /// The banners.
    pub cautions: Vec<Caution>,
}

/// The site's items, each checked with its kind's default template, ranked by decision,
/// then by the signal word of the worst banner, then by the energy at risk.
pub fn ranked(site: &Site, model: ModelKind) -> Result<Vec<Ranked>, Failure> {
    // The check's results do not depend on the date; a fixed one keeps runs identical.
    let meta = Meta {
        work_order: None,
        prepared_by: None,
        date: chrono::DateTime::from_timestamp(0, 0)
            .unwrap_or_default()
            .with_timezone(&site.time_zone),
    };
    let equipment: Vec<&Equipment> = site.equipment.iter().collect();
    let memo = worksheet::Memo::default();
    let defaults = default_templates(&equipment, template::built_in)?;
    let work = |_: usize, item: &&Equipment| -> Result<Ranked, Failure> {
        let template = default_of(&defaults, item)?;
        let gas = super::gas_model(model, item.gas());
        let sheet = worksheet::build_in(&memo, gas.as_ref(), site, item, template, &meta)?;
        Ok(Ranked {
            tag: item.tag().to_string(),
            kind: item.kind(),
            gas: item.gas().name,
            template: template.name.clone(),
            stored_energy_j: sheet.stored_energy,
            verdict: sheet.verdict,
            highest_level: sheet.highest,
            cautions: sheet.record.cautions,
        })
    };
    let mut items = crate::parallel::collect(&equipment, crate::parallel::threads(), work, |_| {})?;
    items.sort_by(|x, y| {
        y.verdict
            .decision
            .cmp(&x.verdict.decision)
            .then(y.highest_level.cmp(&x.highest_level))
            .then(y.stored_energy_j.value.total_cmp(&x.stored_energy_j.value))
    });
    Ok(items)
}

pub(super) fn check_command(a: CheckArgs) -> Result<(String, i32), Failure> {
    #[derive(serde::Serialize)]
    struct Summary {
        command: &'static str,
        tool_version: &'static str,
        site: String,
        items: Vec<Ranked>,
        danger: bool,
    }
    let site = site::load(&a.site)?;
    let items = ranked(&site, a.model)?;
    let danger = items.iter().any(|i| i.highest_level == Level::Danger);
    let code = if danger { EXIT_DANGER } else { EXIT_OK };
    if a.json {
        let summary = Summary {
            command: "check",
            tool_version: crate::report::TOOL_VERSION,
            site: site.name.clone(),
            items,
            danger,
        };
        return Ok((to_json(&summary).map_err(Failure::Internal)? + "\n", code));
    }
    let display = crate::units::Display {
        system: site.units,
        ambient: site.ambient,
    };
    let mut text = format!(
        "{} — {} item(s), ranked by hazard\n\n",
        site.name,
        items.len()
    );
    text.push_str(&format!(
        "{:<12} {:<9} {:<15} {:<16} {:<8} {}\n",
        "tag", "kind", "gas", "decision", "highest", "stored energy (isentropic)"
    ));
    for i in &items {
        text.push_str(&format!(
            "{:<12} {:<9} {:<15} {:<16} {:<8} {}\n",
            i.tag,
            format!("{:?}", i.kind).to_lowercase(),
            i.gas,
            i.verdict.decision.word(),
            i.highest_level.word(),
            display.energy(i.stored_energy_j)
        ));
    }
    for i in items.iter().filter(|i| i.verdict.worst() > Status::Ok) {
        text.push_str(&format!("\n{} ({}):\n", i.tag, i.verdict.decision.word()));
        for f in i.verdict.findings.iter().filter(|f| f.status > Status::Ok) {
            text.push_str(&format!(
                "  {:<7} {}\n          {}\n",
                f.status.word(),
                f.headline(&display),
                f.action_text(&display)
            ));
        }
    }
    if danger {
        text.push_str("\nAt least one item raises DANGER (exit code 3).\n");
    }
    Ok((text, code))
}
