//! The calculation forms: one field per command-line option, a number and a unit choice for
//! each quantity, gauge or absolute chosen explicitly for each pressure; and the submitted
//! form turned back into the options the command line would have been given.

use maud::{html, Markup};
use serde_json::{Map, Value as Json};

use crate::cli::api::{self, OptionInfo, Refusal};

/// Pressures: gauge or absolute is a choice of its own beside the unit.
const PRESSURE: &[&str] = &["bar", "psi", "kPa", "MPa"];

/// The units offered for `option`, the usual one first; `None` for a plain number or text.
fn units(option: &str) -> Option<&'static [&'static str]> {
    Some(match option {
        "pressure" | "from" | "to" | "supply-pressure" | "mawp" | "down-to" | "design-pressure"
        | "ambient-pressure" => PRESSURE,
        "overpressure" | "depressuring-cap" => &["kPa", "psi", "bar"],
        "volume" | "room-volume" => &["L", "m3", "ft3", "gal"],
        "temperature"
        | "supply-temperature"
        | "initial-temperature"
        | "ambient-temperature"
        | "rated-temperature"
        | "min-metal-temperature" => &["C", "F", "K"],
        "elevation" | "clearance" => &["m", "ft"],
        "orifice" | "inlet-diameter" => &["mm", "in"],
        "empty-mass" | "wall-mass" | "wrap-mass" => &["kg", "lb"],
        "energy-limit" => &["kJ", "MJ", "J", "ft-lbf"],
        "tnt-energy" => &["MJ/kg", "kJ/kg", "BTU/lb"],
        "duration" | "within" | "depressuring-limit" => &["min", "s", "h"],
        "rate" => &["bar/min", "psi/min", "kg/min", "g/s"],
        "inner-coefficient" => &["W/m2K"],
        "ventilation" => &["/h", "m3/h", "L/s", "cfm"],
        _ => return None,
    })
}

fn is_pressure(option: &str) -> bool {
    units(option) == Some(PRESSURE)
}

/// A submitted field's value, or "".
fn submitted<'a>(pairs: &'a [(String, String)], name: &str) -> &'a str {
    pairs
        .iter()
        .find(|(k, _)| k == name)
        .map_or("", |(_, v)| v.as_str())
}

/// The options a submitted form gives: a quantity as its number and unit (and `(g)` or
/// `(a)` for a pressure) joined as the command line spells it, a ticked box as true; an
/// empty field is left out, so that the command line's default applies.
pub(super) fn to_options(command: &str, pairs: &[(String, String)]) -> Map<String, Json> {
    let mut out = Map::new();
    for o in api::options(command) {
        let value = submitted(pairs, &o.name).trim();
        if o.flag {
            if !value.is_empty() {
                out.insert(o.name, Json::Bool(true));
            }
            continue;
        }
        if value.is_empty() {
            continue;
        }
        let text = match units(&o.name) {
            Some(_) => {
                let unit = submitted(pairs, &format!("{}.unit", o.name));
                let basis = match submitted(pairs, &format!("{}.basis", o.name)) {
                    "g" => "(g)",
                    "a" => "(a)",
                    _ => "",
                };
                format!("{value} {unit}{basis}")
            }
            None => value.to_string(),
        };
        out.insert(o.name, Json::String(text));
    }
    out
}

/// The form for `command`, filled with `pairs` as submitted, a refusal's message beside the
/// field it concerns.
pub(super) fn form(command: &str, pairs: &[(String, String)], refusal: Option<&Refusal>) -> Markup {
    let options = api::options(command);
    let (needed, more): (Vec<&OptionInfo>, Vec<&OptionInfo>) =
        options.iter().partition(|o| o.required || o.name == "gas");
    let unplaced = refusal.filter(|r| !options.iter().any(|o| o.name == r.option));
    let refused_more = refusal.is_some_and(|r| more.iter().any(|o| o.name == r.option));
    html! {
        form method="post" action={ "/" (command) } novalidate {
            @if let Some(r) = unplaced {
                p.refusal role="alert" { (r.message) }
            }
            @for o in &needed { (field(o, pairs, refusal)) }
            details open[refused_more || more.iter().any(|o| !submitted(pairs, &o.name).is_empty())] {
                summary { "More options (left empty: the defaults shown)" }
                @for o in &more { (field(o, pairs, refusal)) }
            }
            p { button type="submit" { "Calculate" } }
        }
    }
}

/// A field's label: its option name in words.
fn label(o: &OptionInfo) -> String {
    let words = o.name.replace('-', " ");
    let mut chars = words.chars();
    match chars.next() {
        Some(c) => c.to_uppercase().chain(chars).collect(),
        None => words,
    }
}

fn field(o: &OptionInfo, pairs: &[(String, String)], refusal: Option<&Refusal>) -> Markup {
    let error = refusal.filter(|r| r.option == o.name);
    let id = format!("f-{}", o.name);
    let hint_id = format!("{id}-hint");
    let error_id = format!("{id}-error");
    let described = if error.is_some() {
        format!("{error_id} {hint_id}")
    } else {
        hint_id.clone()
    };
    let value = submitted(pairs, &o.name);
    let default = o
        .default
        .as_ref()
        .map(|d| format!(" [default: {d}]"))
        .unwrap_or_default();
    html! {
        div class={ "field" @if error.is_some() { " refused" } } {
            label for=(id) { (label(o)) @if o.required { " (required)" } }
            div.control {
                @if o.flag {
                    input type="checkbox" id=(id) name=(o.name) value="on" checked[!value.is_empty()] aria-describedby=(described);
                } @else if o.name == "gas" {
                    select id=(id) name=(o.name) aria-describedby=(described) {
                        option value="" selected[value.is_empty()] { "(choose the gas)" }
                        @for g in crate::gas::GASES {
                            option value=(g.name) selected[value == g.name] { (g.name) }
                        }
                    }
                } @else if !o.choices.is_empty() {
                    select id=(id) name=(o.name) aria-describedby=(described) {
                        option value="" { "(default" @if let Some(d) = &o.default { ": " (d) } ")" }
                        @for c in &o.choices {
                            option value=(c) selected[value == c.as_str()] { (c) }
                        }
                    }
                } @else if let Some(list) = units(&o.name) {
                    input.number type="text" inputmode="decimal" id=(id) name=(o.name) value=(value) aria-describedby=(described) autocomplete="off";
                    @let unit = submitted(pairs, &format!("{}.unit", o.name));
                    select name={ (o.name) ".unit" } aria-label={ (label(o)) ", unit" } {
                        @for u in list {
                            option value=(u) selected[unit == *u] { (u) }
                        }
                    }
                    @if is_pressure(&o.name) {
                        @let basis = submitted(pairs, &format!("{}.basis", o.name));
                        select name={ (o.name) ".basis" } aria-label={ (label(o)) ", gauge or absolute" } {
                            option value="" selected[basis.is_empty()] { "gauge or absolute?" }
                            option value="g" selected[basis == "g"] { "gauge (g)" }
                            option value="a" selected[basis == "a"] { "absolute (a)" }
                        }
                    }
                } @else {
                    input type="text" id=(id) name=(o.name) value=(value) aria-describedby=(described) autocomplete="off";
                }
            }
            @if let Some(r) = error {
                p.error id=(error_id) role="alert" { (r.message) }
            }
            p.hint id=(hint_id) { (o.help) (default) }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn pairs(list: &[(&str, &str)]) -> Vec<(String, String)> {
        list.iter()
            .map(|(k, v)| (k.to_string(), v.to_string()))
            .collect()
    }

    #[test]
    fn a_pressure_is_joined_with_its_unit_and_basis_and_empty_fields_are_left_out() {
        let options = to_options(
            "energy",
            &pairs(&[
                ("gas", "air"),
                ("volume", "2"),
                ("volume.unit", "m3"),
                ("pressure", " 10 "),
                ("pressure.unit", "bar"),
                ("pressure.basis", "g"),
                ("temperature", ""),
                ("temperature.unit", "C"),
                ("json", "on"),
            ]),
        );
        assert_eq!(
            Json::Object(options),
            serde_json::json!({"gas": "air", "volume": "2 m3", "pressure": "10 bar(g)"})
        );
    }

    #[test]
    fn a_pressure_without_a_basis_goes_to_the_parser_as_typed_and_is_refused_there() {
        let options = to_options(
            "vent",
            &pairs(&[
                ("pressure", "10"),
                ("pressure.unit", "bar"),
                ("depressuring-check", "on"),
            ]),
        );
        assert_eq!(
            options.get("pressure"),
            Some(&Json::String("10 bar".into()))
        );
        assert_eq!(options.get("depressuring-check"), Some(&Json::Bool(true)));
    }

    #[test]
    fn every_quantity_option_of_every_calculation_has_units_to_choose_from() {
        for c in api::CALCULATIONS {
            for o in api::options(c) {
                let plain = o.flag
                    || !o.choices.is_empty()
                    || ["gas", "cd", "depressuring-fraction"].contains(&o.name.as_str());
                assert!(plain || units(&o.name).is_some(), "{c} --{}", o.name);
            }
        }
    }
}
