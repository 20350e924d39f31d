//! The HTML renderer: a calculation's worksheet as a web page, in the same order as the text
//! and the PDF (the decision and its findings first, the banners, results, plots, inputs, the
//! basis, the deferral last). Plots are inline SVG; the page needs no script, prints cleanly
//! and reflows to a phone's width. Nothing here computes physics.

mod style;
mod svg;

use maud::{html, Markup, PreEscaped, DOCTYPE};

use super::{text::value_text, Entry, Plot, Worksheet, TOOL_VERSION};
use crate::assess::{Decision, Status, Verdict};
use crate::caution::{deferral, Caution, Level};
use crate::units::{Display, UnitSystem};

pub use svg::plot_svg;

/// A whole page: `title` in the head and as the heading, `body` under it, a link home.
pub fn page(title: &str, body: Markup) -> Markup {
    html! {
        (DOCTYPE)
        html lang="en" {
            head {
                meta charset="utf-8";
                meta name="viewport" content="width=device-width, initial-scale=1";
                title { (title) " — pvhazard" }
                style { (PreEscaped(style::css())) }
            }
            body {
                header.site {
                    nav aria-label="Calculations" {
                        a href="/" { "pvhazard" }
                        " "
                        a href="/energy" { "Energy" }
                        " "
                        a href="/fill" { "Fill" }
                        " "
                        a href="/vent" { "Vent" }
                    }
                }
                main {
                    h1 { (title) }
                    (body)
                }
                footer.site {
                    p { "pvhazard " (TOOL_VERSION) ". Results are estimates for planning; they do not replace the vessel's rating plate, local codes or a licensed or authorised inspector." }
                }
            }
        }
    }
}

/// A calculation's result: decision and findings, banners, results, plots, inputs, basis and
/// the deferral, in `system` units first.
pub fn result(sheet: &Worksheet, plots: &[Plot], system: UnitSystem) -> Markup {
    let d = Display {
        system,
        ambient: sheet.ambient,
    };
    let last = deferral();
    html! {
        p.subtitle { (sheet.title) }
        (verdict(&sheet.verdict, &d))
        (banners(sheet.cautions.iter().filter(|c| **c != last), &d))
        (entries("Results", &sheet.results, &d))
        @if !sheet.comparison.is_empty() {
            (entries("Ideal gas, for comparison (same inputs)", &sheet.comparison, &d))
        }
        @if !plots.is_empty() {
            section.plots {
                h2 { "Plots" }
                @for p in plots { (plot_svg(p, &d)) }
            }
        }
        (entries("Inputs", &sheet.inputs, &d))
        @if !sheet.basis.is_empty() {
            section.basis {
                h2 { "Basis and assumptions" }
                dl {
                    @for n in &sheet.basis {
                        dt { (n.topic) }
                        dd { (n.render(&d)) }
                    }
                }
            }
        }
        (banners([&last].into_iter(), &d))
    }
}

/// The decision band and the findings table.
pub fn verdict(v: &Verdict, d: &Display) -> Markup {
    verdict_with_id(v, d, Some("decision"))
}

/// [`verdict`] for one item among several on a page: its decision word carries no id, as
/// an id names one element of the page.
pub fn item_verdict(v: &Verdict, d: &Display) -> Markup {
    verdict_with_id(v, d, None)
}

fn verdict_with_id(v: &Verdict, d: &Display, id: Option<&str>) -> Markup {
    let (class, meaning) = match v.decision {
        Decision::NoGo => ("no-go", "do not go ahead as planned (see STOP below)"),
        Decision::GoWithActions => (
            "go-with-actions",
            "go ahead only once the actions below are done",
        ),
        Decision::Go => ("go", "every finding is within its limit"),
    };
    html! {
        section.verdict aria-label="Decision" {
            p class={ "decision " (class) } {
                span.word id=[id] { (v.decision.word()) }
                " "
                span.meaning { (meaning) }
            }
            @if !v.findings.is_empty() {
                h2 { "Findings" }
                ul.findings {
                    @for f in &v.findings {
                        li {
                            span class={ "status " (status_class(f.status, f.level)) } { (f.status.word()) }
                            " "
                            strong { (f.headline(d)) }
                            br;
                            @if f.status == Status::Ok { (f.result_text(d)) } @else { (f.action_text(d)) }
                        }
                    }
                }
            }
        }
    }
}

/// The class of a finding's status: the signal word's colour where it asks for action.
fn status_class(status: Status, level: Level) -> &'static str {
    match status {
        Status::Ok => "ok",
        _ => level_class(level),
    }
}

fn level_class(level: Level) -> &'static str {
    match level {
        Level::Danger => "danger",
        Level::Warning => "warning",
        Level::Caution => "caution",
        Level::Notice => "notice",
    }
}

/// Signal-word banners, one per hazard.
pub fn banners<'a>(cautions: impl Iterator<Item = &'a Caution>, d: &Display) -> Markup {
    html! {
        @for c in cautions {
            div class={ "banner " (level_class(c.level)) } role="note" {
                span.signal { (c.level.word()) }
                p { (c.render(d)) }
            }
        }
    }
}

fn entries(heading: &str, entries: &[Entry], d: &Display) -> Markup {
    html! {
        @if !entries.is_empty() {
            section {
                h2 { (heading) }
                table.entries {
                    @for e in entries {
                        tr {
                            th scope="row" { (e.label_text(d)) }
                            td {
                                span.value { (value_text(&e.value, d)) }
                                @if let Some(m) = e.method { br; span.method { (m) } }
                            }
                        }
                    }
                }
            }
        }
    }
}
