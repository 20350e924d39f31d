//! The site pages: a site's items ranked as `check` ranks them, a worksheet made for an
//! item and written to the records folder under the command line's names and rules, and
//! the download of the records this server wrote.

use axum::extract::rejection::FormRejection;
use axum::extract::{Path, State};
use axum::http::{header, StatusCode};
use axum::response::{IntoResponse, Response};
use axum::Form;
use maud::{html, Markup};

use super::pages;
use super::routes::{blocking, AppState};
use crate::caution::deferral;
use crate::cli::api::Refusal;
use crate::cli::records::{self, Ranked};
use crate::cli::Failure;
use crate::gas::ModelKind;
use crate::record;
use crate::report::html::{banners, page};
use crate::report::Paper;
use crate::site::{EquipmentKind, Site};
use crate::template::{self, Template};
use crate::units::Display;
use crate::worksheet::Meta;

/// The site at index `n` in the path, if there is one.
fn site_index(s: &AppState, n: &str) -> Option<usize> {
    n.parse::<usize>()
        .ok()
        .filter(|&i| i < s.config.sites.len())
}

/// The templates offered for an item of `kind`: its kind's built-in ones, then those given
/// with `--templates`, its default first.
fn templates_for(s: &AppState, kind: EquipmentKind) -> Vec<Template> {
    let default = template::default_for(kind);
    let mut out: Vec<Template> = template::BUILT_IN
        .iter()
        .filter_map(|(name, _)| template::built_in(name).ok())
        .chain(s.config.templates.iter().cloned())
        .filter(|t| t.equipment == kind)
        .collect();
    out.sort_by_key(|t| t.name != default);
    out
}

/// What a worksheet form refused, for the item it was for.
struct Refused<'a> {
    tag: String,
    refusal: Refusal,
    pairs: &'a [(String, String)],
}

pub(super) async fn site_page(State(s): State<AppState>, Path(n): Path<String>) -> Response {
    let Some(i) = site_index(&s, &n) else {
        return pages::not_found();
    };
    ranked_page(s, i, StatusCode::OK, None).await
}

async fn ranked_page(
    s: AppState,
    i: usize,
    status: StatusCode,
    refused: Option<Refused<'_>>,
) -> Response {
    let shared = s.clone();
    let ranked =
        match blocking(move || records::ranked(&shared.config.sites[i], ModelKind::Real)).await {
            Ok(Ok(r)) => r,
            Ok(Err(f)) => return failed(f),
            Err(response) => return response,
        };
    let site = &s.config.sites[i];
    pages::respond(
        status,
        page(
            &site.name,
            site_body(&s, i, site, &ranked, refused.as_ref()),
        ),
    )
}

fn failed(f: Failure) -> Response {
    let message = match f {
        Failure::Input(e) => e.to_string(),
        Failure::File(e) => e.to_string(),
        Failure::Refused(m) | Failure::Internal(m) => m,
    };
    pages::failure(StatusCode::INTERNAL_SERVER_ERROR, &message)
}

fn site_body(
    s: &AppState,
    i: usize,
    site: &Site,
    ranked: &[Ranked],
    refused: Option<&Refused<'_>>,
) -> Markup {
    let d = Display {
        system: site.units,
        ambient: site.ambient,
    };
    // The deferral once, at the end, not under every item.
    let last = deferral();
    html! {
        p.subtitle { (site.location) " — " (ranked.len()) " item(s), ranked by hazard (decision, then the highest signal word, then the stored energy)" }
        table.ranked {
            thead { tr { th { "Tag" } th { "Kind" } th { "Gas" } th { "Decision" } th { "Highest" } th { "Stored energy" } } }
            tbody {
                @for r in ranked {
                    tr {
                        td { a href={ "#item-" (record::slug(&r.tag)) } { (r.tag) } }
                        td { (kind_word(r.kind)) }
                        td { (r.gas) }
                        td { (r.verdict.decision.word()) }
                        td { (r.highest_level.word()) }
                        td { (d.energy(r.stored_energy_j)) }
                    }
                }
            }
        }
        @for r in ranked {
            section id={ "item-" (record::slug(&r.tag)) } {
                h2 { (r.tag) " — " (r.verdict.decision.word()) }
                (crate::report::html::item_verdict(&r.verdict, &d))
                (banners(r.cautions.iter().filter(|c| **c != last), &d))
                (worksheet_form(s, i, site, r, refused.filter(|f| f.tag == r.tag)))
            }
        }
        (banners([&last].into_iter(), &d))
    }
}

fn kind_word(kind: EquipmentKind) -> &'static str {
    match kind {
        EquipmentKind::Vessel => "vessel",
        EquipmentKind::Cylinder => "cylinder",
    }
}

fn worksheet_form(
    s: &AppState,
    i: usize,
    site: &Site,
    r: &Ranked,
    refused: Option<&Refused<'_>>,
) -> Markup {
    if s.config.records.is_none() {
        return html! { p.no-print { "To make worksheets here, start the server with a records folder (" code { "--records DIR" } ")." } };
    }
    let id = record::slug(&r.tag);
    let given = |name: &str| {
        refused
            .and_then(|f| f.pairs.iter().find(|(k, _)| k == name))
            .map_or(String::new(), |(_, v)| v.clone())
    };
    let error = |name: &str| {
        refused
            .filter(|f| f.refusal.option == name)
            .map(|f| f.refusal.message.clone())
    };
    // The date the worksheet takes when the field is left empty, shown as a placeholder.
    let now = chrono::Utc::now()
        .with_timezone(&site.time_zone)
        .format("%Y-%m-%dT%H:%M:%S%:z")
        .to_string();
    let field = |name: &str, label: &str, hint: &str| {
        let fid = format!("{id}-{name}");
        let err = error(name);
        html! {
            div class={ "field" @if err.is_some() { " refused" } } {
                label for=(fid) { (label) }
                div.control { input type="text" id=(fid) name=(name) value=(given(name)) placeholder=[(name == "date").then_some(now.as_str())] autocomplete="off" aria-describedby={ (fid) "-hint" }; }
                @if let Some(m) = err { p.error role="alert" { (m) } }
                p.hint id={ (fid) "-hint" } { (hint) }
            }
        }
    };
    let templates = templates_for(s, r.kind);
    // A site in US units is most likely printed on US Letter.
    let letter = match given("paper").as_str() {
        "" => site.units == crate::units::UnitSystem::Us,
        paper => paper == "letter",
    };
    html! {
        form method="post" action={ "/site/" (i) "/worksheet" } {
            fieldset {
                legend { "Worksheet for " (r.tag) }
                input type="hidden" name="tag" value=(r.tag);
                @if let Some(f) = refused.filter(|f| !["work_order", "prepared_by", "date"].contains(&f.refusal.option.as_str())) {
                    p.refusal role="alert" { (f.refusal.message) }
                }
                div.field {
                    label for={ (id) "-template" } { "Template" }
                    div.control {
                        select id={ (id) "-template" } name="template" {
                            @for t in &templates { option value=(t.name) selected[given("template") == t.name] { (t.name) " — " (t.title) } }
                        }
                    }
                }
                (field("work_order", "Work order", "The work order the worksheet is attached to (letters, digits, - and _); it names the files."))
                (field("prepared_by", "Prepared by", "The name of the person preparing the worksheet."))
                (field("date", "Date and time", "RFC 3339, e.g. 2026-03-14T09:30:00+01:00; left empty: now, in the site's time zone."))
                div.field {
                    label for={ (id) "-paper" } { "Paper" }
                    div.control {
                        select id={ (id) "-paper" } name="paper" {
                            option value="a4" { "A4" }
                            option value="letter" selected[letter] { "US Letter" }
                        }
                    }
                }
                p { button type="submit" { "Make the worksheet" } }
            }
        }
    }
}

pub(super) async fn make_worksheet(
    State(s): State<AppState>,
    Path(n): Path<String>,
    submitted: Result<Form<Vec<(String, String)>>, FormRejection>,
) -> Response {
    let Some(i) = site_index(&s, &n) else {
        return pages::not_found();
    };
    let pairs = match submitted {
        Ok(Form(pairs)) => pairs,
        Err(e) => return pages::failure(e.status(), &e.body_text()),
    };
    let Some(dir) = s.config.records.clone() else {
        return pages::failure(
            StatusCode::CONFLICT,
            "This server was started without a records folder (--records DIR), so it makes no worksheets.",
        );
    };
    let get = |name: &str| {
        pairs
            .iter()
            .find(|(k, _)| k == name)
            .map_or("", |(_, v)| v.trim())
    };
    let site = &s.config.sites[i];
    let tag = get("tag").to_string();
    let Some(item_index) = site.equipment.iter().position(|e| e.tag() == tag) else {
        return pages::failure(
            StatusCode::BAD_REQUEST,
            "No item with this tag on the site.",
        );
    };
    let item = &site.equipment[item_index];
    let checked = (|| {
        let template = templates_for(&s, item.kind())
            .into_iter()
            .find(|t| t.name == get("template"))
            .ok_or_else(|| {
                Refusal::new(
                    "template",
                    get("template"),
                    "not a template offered for this item; accepted: one of the list".into(),
                )
            })?;
        let work_order = Some(get("work_order")).filter(|w| !w.is_empty());
        if let Some(w) = work_order {
            record::check_name(w).map_err(|m| Refusal::new("work_order", w, m))?;
        }
        let prepared_by = Some(get("prepared_by")).filter(|w| !w.is_empty());
        if let Some(p) = prepared_by {
            record::check_text(p, records::MAX_PREPARER)
                .map_err(|m| Refusal::new("prepared_by", p, m))?;
        }
        let given = Some(get("date"))
            .filter(|d| !d.is_empty())
            .map(|d| records::parse_date(d).map_err(|m| Refusal::new("date", d, m)))
            .transpose()?;
        let date = records::worksheet_date(given, site.time_zone).map_err(|f| match f {
            Failure::Refused(m) => Refusal::new("date", "", m),
            other => Refusal::new("date", "", format!("{other:?}")),
        })?;
        let paper = if get("paper") == "letter" {
            Paper::Letter
        } else {
            Paper::A4
        };
        Ok::<_, Refusal>((
            template,
            Meta {
                work_order: work_order.map(str::to_string),
                prepared_by: prepared_by.map(str::to_string),
                date,
            },
            paper,
        ))
    })();
    let (template, meta, paper) = match checked {
        Ok(c) => c,
        Err(refusal) => {
            return ranked_page(
                s.clone(),
                i,
                StatusCode::BAD_REQUEST,
                Some(Refused {
                    tag,
                    refusal,
                    pairs: &pairs,
                }),
            )
            .await;
        }
    };
    let shared = s.clone();
    let made = blocking(move || {
        let site = &shared.config.sites[i];
        records::made(
            &crate::worksheet::Memo::default(),
            site,
            &site.equipment[item_index],
            &template,
            &meta,
            paper,
            ModelKind::Real,
        )
    })
    .await;
    let made = match made {
        Ok(Ok(m)) => m,
        Ok(Err(f)) => return failed(f),
        Err(response) => return response,
    };
    let names = [format!("{}.pdf", made.stem), format!("{}.json", made.stem)];
    let written = blocking({
        let dir = dir.clone();
        let (pdf, json, names) = (made.pdf, made.json, names.clone());
        move || {
            let batch = record::Batch::open(&dir, record::Mode::Complete);
            batch
                .and_then(|b| {
                    b.add(&names[1], 0, json.as_bytes())?;
                    b.add(&names[0], 1, &pdf)?;
                    b.commit()
                })
            .map_err(|e| match e {
                record::RecordError::Exists(p) => format!(
                    "{} is already in the records folder and holds a different record; records are never overwritten: give another work order or date",
                    p.file_name().map_or_else(String::new, |n| n.to_string_lossy().into_owned())
                ),
                other => other.to_string(),
            })
        }
    })
    .await;
    match written {
        Ok(Ok(_)) => {}
        Ok(Err(message)) => return pages::failure(StatusCode::CONFLICT, &message),
        Err(response) => return response,
    }
    if let Ok(mut set) = s.written.lock() {
        set.extend(names.iter().cloned());
    }
    let d = Display {
        system: site.units,
        ambient: site.ambient,
    };
    pages::respond(
        StatusCode::OK,
        page(
            &format!("Worksheet for {tag}"),
            html! {
                (crate::report::html::verdict(&made.verdict, &d))
                p { "Highest caution on the worksheet: " (made.highest.word()) "." }
                p { "Written to the records folder, never over an existing record:" }
                ul {
                    li { a href={ "/records/" (names[0]) } download { (names[0]) } " (the worksheet to print and sign)" }
                    li { a href={ "/records/" (names[1]) } download { (names[1]) } " (its JSON record)" }
                }
                (banners([&deferral()].into_iter(), &d))
                p { a href={ "/site/" (i) } { "Back to " (site.name) } }
            },
        ),
    )
}

/// A record this server wrote, by its file name; anything else is not found.
pub(super) async fn record_file(State(s): State<AppState>, Path(name): Path<String>) -> Response {
    let known = s
        .written
        .lock()
        .map(|set| set.contains(&name))
        .unwrap_or(false);
    let (Some(dir), true) = (s.config.records.clone(), known) else {
        return pages::not_found();
    };
    let content_type = if name.ends_with(".pdf") {
        "application/pdf"
    } else {
        "application/json"
    };
    let path = dir.join(&name);
    match blocking(move || std::fs::read(path)).await {
        Ok(Ok(bytes)) => (
            StatusCode::OK,
            [
                (header::CONTENT_TYPE, content_type.to_string()),
                // The names are slugs and a date: nothing to quote.
                (
                    header::CONTENT_DISPOSITION,
                    format!("attachment; filename=\"{name}\""),
                ),
            ],
            bytes,
        )
            .into_response(),
        Ok(Err(_)) => pages::not_found(),
        Err(response) => response,
    }
}
