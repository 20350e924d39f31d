//! The pages that are not a calculation: the start page and the error pages.

use axum::http::StatusCode;
use axum::response::{Html, IntoResponse, Response};
use maud::{html, Markup};

use crate::report::html::page;
use crate::site::Site;

/// A page with its status.
pub(super) fn respond(status: StatusCode, markup: Markup) -> Response {
    (status, Html(markup.into_string())).into_response()
}

/// The start page: the three calculations and the sites given.
pub(super) fn index(sites: &[Site], records: bool) -> Markup {
    page(
        "Compressed-gas hazards",
        html! {
            p { "Stored energy and safe distances, cylinder fill temperatures and vent-downs, with the cautions that apply. Every quantity takes a unit; every pressure says gauge or absolute." }
            h2 { "Calculations" }
            ul {
                li { a href="/energy" { "Stored energy" } " — expansion energy, TNT equivalent, exclusion distance and overpressure standoffs of a vessel." }
                li { a href="/fill" { "Cylinder fill" } " — the gas temperature of a fast fill, the settled pressure and the fill-to pressure." }
                li { a href="/vent" { "Vent-down" } " — blow-down time through an orifice, the cold gas and metal, where the gas goes." }
            }
            h2 { "Sites" }
            @if sites.is_empty() {
                p { "No site file was given (start with " code { "pvhazard serve --site SITE.toml" } ")." }
            } @else {
                ul {
                    @for (i, s) in sites.iter().enumerate() {
                        li { a href={ "/site/" (i) } { (s.name) } " — " (s.location) ", " (s.equipment.len()) " item(s)" }
                    }
                }
                @if !records {
                    p { "Worksheets are made only when the server is given a records folder (" code { "--records DIR" } ")." }
                }
            }
            p.no-print { "The JSON API takes the command line's options: " code { "POST /api/energy" } ", " code { "/api/fill" } ", " code { "/api/vent" } "." }
        },
    )
}

/// A page for a path that leads nowhere.
pub(super) fn not_found() -> Response {
    respond(
        StatusCode::NOT_FOUND,
        page(
            "Not found",
            html! { p { "There is no page here. " a href="/" { "Start again" } "." } },
        ),
    )
}

/// A page for a failure that is not the user's, or a request refused as a whole.
pub(super) fn failure(status: StatusCode, message: &str) -> Response {
    respond(
        status,
        page(
            "Not done",
            html! {
                p.refusal role="alert" { (message) }
                p { a href="/" { "Start again" } }
            },
        ),
    )
}
