//! The text renderer: the decision and its findings first, then the banners that apply,
//! inputs, results, the basis, and the deferral last, in the user's units.

use super::{Entry, Value, Worksheet, TOOL_VERSION};
use crate::assess::{Decision, Status, Verdict};
use crate::caution::deferral;
use crate::units::{fmt_sig, Display, UnitSystem};

const WIDTH: usize = 96;

/// A worksheet as plain text for a terminal or a log, in `system` units first.
pub fn render_text(sheet: &Worksheet, system: UnitSystem) -> String {
    let display = Display {
        system,
        ambient: sheet.ambient,
    };
    let mut out = format!("pvhazard {TOOL_VERSION} — {}\n\n", sheet.title);
    verdict(&mut out, &sheet.verdict, &display);
    let last = deferral();
    let banners: Vec<_> = sheet.cautions.iter().filter(|c| **c != last).collect();
    if !banners.is_empty() {
        out.push('\n');
    }
    for c in banners {
        let word = c.level.word();
        out.push_str(&wrap(&format!("{word:<8} "), &c.render(&display)));
    }
    section(&mut out, "Inputs", &sheet.inputs, &display);
    section(&mut out, "Results", &sheet.results, &display);
    if !sheet.comparison.is_empty() {
        section(
            &mut out,
            "Ideal gas, for comparison (same inputs)",
            &sheet.comparison,
            &display,
        );
    }
    if !sheet.basis.is_empty() {
        out.push_str("\nBasis and assumptions\n");
        for n in &sheet.basis {
            out.push_str(&wrap(&format!("  {:<20} ", n.topic), &n.render(&display)));
        }
    }
    out.push('\n');
    out.push_str(&wrap(
        &format!("{:<8} ", last.level.word()),
        &last.render(&display),
    ));
    out
}

/// The decision line and one block per finding: status, hazard, value against limit and
/// basis, then the action (or, when ok, what was found).
fn verdict(out: &mut String, v: &Verdict, d: &Display) {
    out.push_str(&format!(
        "Decision: {} — {}\n",
        v.decision.word(),
        match v.decision {
            Decision::NoGo => "do not go ahead as planned (see STOP below)",
            Decision::GoWithActions => "go ahead only once the actions below are done",
            Decision::Go => "every finding is within its limit",
        }
    ));
    if v.findings.is_empty() {
        return;
    }
    out.push_str("\nFindings\n");
    for f in &v.findings {
        out.push_str(&wrap(&format!("  {:<7} ", f.status.word()), &f.headline(d)));
        let then = if f.status == Status::Ok {
            f.result_text(d)
        } else {
            f.action_text(d)
        };
        out.push_str(&wrap("          ", &then));
    }
}

fn section(out: &mut String, heading: &str, entries: &[Entry], d: &Display) {
    out.push_str(&format!("\n{heading}\n"));
    let labels: Vec<String> = entries.iter().map(|e| e.label_text(d)).collect();
    let label_width = labels.iter().map(|l| l.chars().count()).max().unwrap_or(0);
    for (e, label) in entries.iter().zip(&labels) {
        let pad = label_width - label.chars().count();
        out.push_str(&format!(
            "  {}{}  {}\n",
            label,
            " ".repeat(pad),
            value_text(&e.value, d)
        ));
        if let Some(m) = e.method {
            out.push_str(&format!("  {}  [{}]\n", " ".repeat(label_width), m));
        }
    }
}

/// A worksheet value as text in the display's units (shared by every renderer).
pub fn value_text(v: &Value, d: &Display) -> String {
    match v {
        Value::Pressure(p) => d.pressure(*p),
        Value::AbsolutePressure(p) => d.absolute_pressure(*p),
        Value::Overpressure(p) => d.overpressure(*p),
        Value::Temperature(t) => d.temperature(*t),
        Value::Volume(x) => d.volume(*x),
        Value::Energy(e) => d.energy(*e),
        Value::SpecificEnergy(e) => d.specific_energy(*e),
        Value::Mass(m) => d.mass(*m),
        Value::Distance(l) => d.length(*l),
        Value::Diameter(l) => d.small_length(*l),
        Value::Time(t) => d.time(*t),
        Value::MassFlow(m) => d.mass_flow(*m),
        Value::VolumeFlow(q) => d.volume_flow(*q),
        Value::PressureRate(r) => d.pressure_rate(*r),
        Value::Speed(v) => d.speed(*v),
        Value::Fraction(x) => crate::units::percent(*x),
        Value::Number(x) => fmt_sig(*x, 3),
        Value::Text(s) => s.clone(),
    }
}

/// `text` wrapped to the page width, the first line after `lead`, the rest indented under it.
fn wrap(lead: &str, text: &str) -> String {
    let indent = " ".repeat(lead.chars().count());
    let mut out = String::from(lead);
    let mut col = lead.chars().count();
    for word in text.split_whitespace() {
        let len = word.chars().count();
        if col + len + 1 > WIDTH && col > indent.len() {
            out.push('\n');
            out.push_str(&indent);
            col = indent.len();
        } else if col > indent.len() {
            out.push(' ');
            col += 1;
        }
        out.push_str(word);
        col += len;
    }
    out.push('\n');
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn wrap_keeps_lines_within_the_width_with_a_hanging_indent() {
        let text = "word ".repeat(60);
        let w = wrap("WARNING  ", &text);
        assert!(w.lines().all(|l| l.chars().count() <= WIDTH));
        assert!(w.lines().skip(1).all(|l| l.starts_with("         word")));
    }
}
