//! The routes: the pages, the forms and the JSON API, with the limits every request meets
//! (body size, time). Calculations run on the blocking pool, so that one long transient
//! does not hold up the other requests, and a defect in one answers 500 instead of taking
//! the server down.

use std::collections::HashSet;
use std::sync::{Arc, Mutex};
use std::time::Duration;

use axum::body::Bytes;
use axum::extract::rejection::{BytesRejection, FormRejection};
use axum::extract::{DefaultBodyLimit, Path, Request, State};
use axum::http::{header, StatusCode};
use axum::middleware::{self, Next};
use axum::response::{IntoResponse, Response};
use axum::routing::{get, post};
use axum::{Form, Router};
use maud::html;
use serde_json::Value as Json;

use super::{form, pages, sites, Config};
use crate::cli::api::{self, CalcError, Refusal};
use crate::report::html;

/// The largest request body taken, bytes (1 MiB).
pub(super) const MAX_BODY: usize = 1 << 20;
/// The longest a request may take, calculation included.
const REQUEST_LIMIT: Duration = Duration::from_secs(120);

/// What every handler shares: the configuration and the records this server wrote.
pub(super) struct Shared {
    pub(super) config: Config,
    /// File names in the records folder that this server wrote (or found already there
    /// with the same bytes); the only ones it serves.
    pub(super) written: Mutex<HashSet<String>>,
}

pub(super) type AppState = Arc<Shared>;

/// The application.
pub(super) fn router(config: Config) -> Router {
    let state = Arc::new(Shared {
        config,
        written: Mutex::new(HashSet::new()),
    });
    Router::new()
        .route("/", get(index))
        .route("/{calc}", get(form_page).post(form_result))
        .route("/api/{calc}", post(api_call))
        .route("/site/{n}", get(sites::site_page))
        .route("/site/{n}/worksheet", post(sites::make_worksheet))
        .route("/records/{name}", get(sites::record_file))
        .fallback(|| async { pages::not_found() })
        .layer(DefaultBodyLimit::max(MAX_BODY))
        .layer(middleware::from_fn(time_limit))
        .with_state(state)
}

/// Answers 503 for a request that takes longer than [`REQUEST_LIMIT`].
async fn time_limit(request: Request, next: Next) -> Response {
    match tokio::time::timeout(REQUEST_LIMIT, next.run(request)).await {
        Ok(response) => response,
        Err(_) => pages::failure(
            StatusCode::SERVICE_UNAVAILABLE,
            "The calculation took too long and was stopped; try again with fewer options, or use the command line.",
        ),
    }
}

/// Runs `work` on the blocking pool; a panic in it is a 500, not a dead server.
pub(super) async fn blocking<T: Send + 'static>(
    work: impl FnOnce() -> T + Send + 'static,
) -> Result<T, Response> {
    tokio::task::spawn_blocking(work).await.map_err(|_| {
        pages::failure(
            StatusCode::INTERNAL_SERVER_ERROR,
            "pvhazard failed on this input (a defect, not your input); please report it with the inputs.",
        )
    })
}

async fn index(State(s): State<AppState>) -> Response {
    pages::respond(
        StatusCode::OK,
        pages::index(&s.config.sites, s.config.records.is_some()),
    )
}

/// The calculation named in a path, if it is one.
fn calculation(name: &str) -> Option<&'static str> {
    api::CALCULATIONS.into_iter().find(|c| *c == name)
}

fn title(command: &str) -> &'static str {
    match command {
        "energy" => "Stored energy",
        "fill" => "Cylinder fill",
        _ => "Vent-down",
    }
}

async fn form_page(Path(calc): Path<String>) -> Response {
    let Some(command) = calculation(&calc) else {
        return pages::not_found();
    };
    pages::respond(
        StatusCode::OK,
        html::page(title(command), form::form(command, &[], None)),
    )
}

async fn form_result(
    Path(calc): Path<String>,
    submitted: Result<Form<Vec<(String, String)>>, FormRejection>,
) -> Response {
    let Some(command) = calculation(&calc) else {
        return pages::not_found();
    };
    let pairs = match submitted {
        Ok(Form(pairs)) => pairs,
        Err(e) => return pages::failure(e.status(), &e.body_text()),
    };
    let options = form::to_options(command, &pairs);
    let outcome = match blocking(move || api::calculate(command, &options)).await {
        Ok(outcome) => outcome,
        Err(response) => return response,
    };
    match outcome {
        Ok(done) => pages::respond(
            StatusCode::OK,
            html::page(
                title(command),
                html! {
                    (html::result(&done.report.worksheet(), &done.report.plots(), done.units))
                    details.no-print {
                        summary { "Change the inputs" }
                        (form::form(command, &pairs, None))
                    }
                },
            ),
        ),
        Err(CalcError::Refused(r)) => pages::respond(
            StatusCode::BAD_REQUEST,
            html::page(title(command), form::form(command, &pairs, Some(&r))),
        ),
        Err(CalcError::Internal(m)) => pages::failure(StatusCode::INTERNAL_SERVER_ERROR, &m),
    }
}

/// A JSON error answer: `{"error": {"option", "value", "accepted", "message"}}`.
fn json_error(status: StatusCode, r: &Refusal) -> Response {
    #[derive(serde::Serialize)]
    struct Body<'a> {
        error: &'a Refusal,
    }
    // The struct keeps the keys in the documented order.
    let body = serde_json::to_string(&Body { error: r }).unwrap_or_default() + "\n";
    (status, [(header::CONTENT_TYPE, "application/json")], body).into_response()
}

fn whole_request(accepted: &str, message: String) -> Refusal {
    Refusal {
        option: String::new(),
        value: String::new(),
        accepted: accepted.to_string(),
        message,
    }
}

async fn api_call(Path(calc): Path<String>, body: Result<Bytes, BytesRejection>) -> Response {
    const OBJECT: &str = "a JSON object of the calculation's options, e.g. {\"gas\": \"air\", \"volume\": \"2 m3\", \"pressure\": \"10 barg\"}, at most 1 MiB";
    let Some(command) = calculation(&calc) else {
        return json_error(
            StatusCode::NOT_FOUND,
            &whole_request(
                "/api/energy, /api/fill or /api/vent",
                format!("no calculation '{}'", crate::as_typed(&calc)),
            ),
        );
    };
    let body = match body {
        Ok(body) => body,
        Err(e) => return json_error(e.status(), &whole_request(OBJECT, e.body_text())),
    };
    let options = match serde_json::from_slice::<Json>(&body) {
        Ok(Json::Object(map)) => map,
        Ok(_) => {
            return json_error(
                StatusCode::BAD_REQUEST,
                &whole_request(OBJECT, "the body is JSON but not an object".into()),
            )
        }
        Err(e) => {
            return json_error(
                StatusCode::BAD_REQUEST,
                &whole_request(OBJECT, format!("the body is not JSON: {e}")),
            )
        }
    };
    let outcome = match blocking(move || api::calculate(command, &options)).await {
        Ok(outcome) => outcome,
        Err(_) => {
            return json_error(
                StatusCode::INTERNAL_SERVER_ERROR,
                &whole_request("", "pvhazard failed on this input (a defect)".into()),
            )
        }
    };
    match outcome {
        Ok(done) => (
            StatusCode::OK,
            [(header::CONTENT_TYPE, "application/json")],
            done.json,
        )
            .into_response(),
        Err(CalcError::Refused(r)) => json_error(StatusCode::BAD_REQUEST, &r),
        Err(CalcError::Internal(m)) => {
            json_error(StatusCode::INTERNAL_SERVER_ERROR, &whole_request("", m))
        }
    }
}
