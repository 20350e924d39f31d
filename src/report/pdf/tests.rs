//! Whole-worksheet tests: the PDF read back, and the page flow checked on the laid-out pages.

use printpdf::{LineDashPattern, Op, PdfFontHandle, TextItem};

use super::sheet::Sheet;
use super::style::{
    colour, Face, CELL_HEAD, DECISION, HEADING, LEGEND, MM, SERIES_COLOURS, SERIES_DASHES,
};
use super::*;
use crate::assess::{Decision, Finding, Hazard, Verdict};
use crate::caution::{Caution, Level, Note, Part};
use crate::report::{value_text, Axis, AxisKind, Entry, Plot, Section, Series, Value};
use crate::units::UnitSystem;
use uom::si::f64::{Energy, Length, Mass, Pressure, ThermodynamicTemperature, Time, Volume};
use uom::si::{
    energy::joule, length::meter, mass::kilogram, pressure::pascal,
    thermodynamic_temperature::kelvin, time::second, volume::cubic_meter,
};

const FINGERPRINT: &str = "7c2f9e41b0d86a35e1f4c09b27d5a6e83f10b94c62ad7e05918c3b4f6e2d0a17";
const AMBIENT_PA: f64 = 101_325.0;

fn bar_g(x: f64) -> Pressure {
    Pressure::new::<pascal>(x * 1e5 + AMBIENT_PA)
}

fn celsius(c: f64) -> ThermodynamicTemperature {
    ThermodynamicTemperature::new::<kelvin>(c + 273.15)
}

fn input(label: &str, value: Value) -> Entry {
    Entry {
        label: label.to_string(),
        label_value: None,
        value,
        method: None,
    }
}

fn result(label: &str, value: Value, method: &'static str) -> Entry {
    Entry {
        label: label.to_string(),
        label_value: None,
        value,
        method: Some(method),
    }
}

/// An invented air receiver at an invented site: every block the renderer draws.
fn sample() -> Document {
    let vent_points = |f: &dyn Fn(f64) -> f64| -> Vec<(f64, f64)> {
        (0..=60)
            .map(|i| (i as f64 * 20.0, f(i as f64 / 60.0)))
            .collect()
    };
    let deferral = deferral();
    Document {
        title: "Pre-maintenance hazard worksheet".into(),
        template: "pre-maintenance".into(),
        purpose: "Records the stored energy, exclusion distance and blow-down of the \
                  receiver before it is opened, so that the crew isolates, vents and \
                  proves zero energy in a planned order and keeps the area clear."
            .into(),
        header: vec![
            ("Site".into(), "Example Works".into()),
            ("Location".into(), "Compressor house, bay 2".into()),
            ("Tag".into(), "AR-101".into()),
            ("Description".into(), "Air receiver, vertical, 2 m³".into()),
            ("Work order".into(), "WO-2026-0417".into()),
            ("Date".into(), "2026-03-14 09:30 +01:00".into()),
            ("Template".into(), "pre-maintenance".into()),
        ],
        verdict: Verdict::new(vec![
            Finding::stop(
                Hazard::BlastZone,
                Level::Danger,
                "site clearance",
                vec![Part::from(
                    "The keep-back distance is more than the site can keep clear.",
                )],
                vec![Part::from(
                    "Reduce the pressure before the work, or provide engineered barriers.",
                )],
            )
            .against(
                Value::Distance(Length::new::<meter>(30.0)),
                Some(Value::Distance(Length::new::<meter>(18.0))),
            ),
            Finding::action(
                Hazard::ColdMetal,
                Level::Warning,
                "wall model",
                vec![Part::from("The gas falls below the MDMT during blow-down.")],
                vec![Part::from("Vent slower or warm the vessel.")],
            )
            .against(
                Value::Temperature(celsius(-41.5)),
                Some(Value::Temperature(celsius(-29.0))),
            ),
            Finding::ok(
                Hazard::PressureRating,
                "MAWP",
                vec![Part::from("The pressure is within the MAWP.")],
            )
            .against(
                Value::Pressure(bar_g(10.0)),
                Some(Value::Pressure(bar_g(13.0))),
            ),
        ]),
        basis: vec![
            Note::new("gas model", "Ideal gas with constant heat capacities."),
            Note::new(
                "blow-down",
                "Isentropic nozzle flow from a well-mixed vessel; the wall exchanges heat \
                 with the gas by natural convection.",
            ),
        ],
        cautions: vec![
            Caution::new(
                Level::Danger,
                "Stored energy exceeds 271 MJ: the pneumatic-test distance rule does not \
                 settle the exclusion zone; an engineering analysis is required.",
            ),
            Caution::new(
                Level::Warning,
                "Gas temperature falls below the MDMT during blow-down: vent slower or \
                 warm the vessel.",
            ),
            Caution::new(
                Level::Caution,
                "Vent discharge is loud and cold: hearing protection and gloves.",
            ),
            Caution::new(
                Level::Notice,
                "Ideal-gas model: results above 100 bar overstate the energy.",
            ),
            deferral.clone(),
        ],
        inputs: vec![
            input("Gas", Value::Text("air".into())),
            input(
                "Vessel volume",
                Value::Volume(Volume::new::<cubic_meter>(2.0)),
            ),
            input("Pressure", Value::Pressure(bar_g(10.0))),
            input("Gas temperature", Value::Temperature(celsius(20.0))),
            input(
                "Ambient pressure",
                Value::AbsolutePressure(Pressure::new::<pascal>(AMBIENT_PA)),
            ),
            input("MDMT", Value::Temperature(celsius(-29.0))),
            input("Discharge coefficient Cd", Value::Number(0.62)),
        ],
        sections: vec![
            Section {
                heading: "Stored energy".into(),
                entries: vec![
                    result(
                        "Isentropic expansion energy",
                        Value::Energy(Energy::new::<joule>(2.724e6)),
                        "m·[u(p1,T1) − u(pa,s1)]; ASME PCC-2 stored-energy form",
                    ),
                    result(
                        "TNT equivalent",
                        Value::Mass(Mass::new::<kilogram>(0.638)),
                        "isentropic energy / TNT energy",
                    ),
                    result(
                        "Exclusion distance",
                        Value::Distance(Length::new::<meter>(30.0)),
                        "ASME PCC-2 pneumatic-test safe distance",
                    ),
                ],
            },
            Section {
                heading: "Blow-down".into(),
                entries: vec![
                    result(
                        "Time to target",
                        Value::Time(Time::new::<second>(1200.0)),
                        "V·dρ/dt = −Cd·A·G(ρ), isentropic nozzle, integrated",
                    ),
                    result(
                        "Final gas temperature",
                        Value::Temperature(celsius(-41.5)),
                        "end of the process path at the target",
                    ),
                ],
            },
        ],
        plots: vec![
            Plot {
                title: "Blow-down through the vent orifice".into(),
                x: Axis {
                    label: "Time".into(),
                    kind: AxisKind::Time,
                },
                left: Axis {
                    label: "Pressure".into(),
                    kind: AxisKind::Pressure,
                },
                right: Some(Axis {
                    label: "Gas temperature".into(),
                    kind: AxisKind::Temperature,
                }),
                series: vec![
                    Series {
                        label: "Vessel pressure".into(),
                        right_axis: false,
                        points: vent_points(&|f| AMBIENT_PA + 1e6 * (1.0 - f).powi(3)),
                    },
                    Series {
                        label: "Gas temperature".into(),
                        right_axis: true,
                        points: vent_points(&|f| 293.15 - 62.0 * f.sqrt()),
                    },
                ],
                limits: vec![(bar_g(3.0).get::<pascal>(), "Vent target 3 barg".into())],
            },
            Plot {
                title: "Fill path: gas temperature against pressure".into(),
                x: Axis {
                    label: "Pressure".into(),
                    kind: AxisKind::Pressure,
                },
                left: Axis {
                    label: "Gas temperature".into(),
                    kind: AxisKind::Temperature,
                },
                right: None,
                series: vec![Series {
                    label: "Adiabatic fill".into(),
                    right_axis: false,
                    points: (0..=40)
                        .map(|i| {
                            let f = i as f64 / 40.0;
                            (
                                bar_g(200.0 * f).get::<pascal>(),
                                288.15 + 70.0 * f.powf(0.6),
                            )
                        })
                        .collect(),
                }],
                limits: vec![(celsius(65.0).get::<kelvin>(), "Rated 65 °C".into())],
            },
        ],
        checklist: vec![
            "Isolation valves closed, locked and tagged (LOTO).".into(),
            "Exclusion zone barriered and signed at the distance above.".into(),
            "Vent routed to a safe place, silencer fitted.".into(),
            "Pressure gauge reads zero; vent left open.".into(),
            "Drain opened and proven clear.".into(),
            "Crew briefed on the cautions above.".into(),
        ],
        signoff: vec!["Prepared".into(), "Checked".into(), "Authorised".into()],
        footer: deferral.message(),
        tool_version: "0.1.0".into(),
        fingerprint: FINGERPRINT.into(),
        date: chrono::DateTime::parse_from_rfc3339("2026-03-14T09:30:00+01:00")
            .expect("a valid date"),
        units: UnitSystem::Si,
        ambient: Pressure::new::<pascal>(AMBIENT_PA),
    }
}

fn pages_text(bytes: &[u8]) -> Vec<String> {
    let pdf = lopdf::Document::load_mem(bytes).expect("a readable PDF");
    let n = pdf.get_pages().len() as u32;
    (1..=n)
        .map(|k| pdf.extract_text(&[k]).expect("text on the page"))
        .collect()
}

/// Whitespace collapsed, so that wrapped lines compare as running text.
fn flat(s: &str) -> String {
    s.split_whitespace().collect::<Vec<_>>().join(" ")
}

#[test]
fn sample_worksheet_reads_back_with_everything_a_crew_signs() {
    let doc = sample();
    let d = Display {
        system: doc.units,
        ambient: doc.ambient,
    };
    for paper in [Paper::A4, Paper::Letter] {
        let bytes = render_pdf(&doc, paper).expect("renders");
        assert!(bytes.starts_with(b"%PDF"));
        let text = flat(&pages_text(&bytes).join("\n"));
        for word in ["DANGER", "WARNING", "CAUTION", "NOTICE", "Signature"] {
            assert!(text.contains(word), "{word} missing on {paper:?}");
        }
        let pressure = value_text(&doc.inputs[2].value, &d);
        let temperature = value_text(&doc.inputs[3].value, &d);
        assert!(temperature.contains("°C"), "{temperature}");
        for s in [
            flat(&doc.footer),
            "AR-101".into(),
            "WO-2026-0417".into(),
            "2026-03-14 09:30 +01:00".into(),
            "Page 1 of".into(),
            FINGERPRINT.into(),
            pressure,
            temperature,
            value_text(&doc.inputs[1].value, &d),
            flat(&doc.checklist[1]),
            "Time (min)".into(),
            "Pressure (barg)".into(),
            "Gas temperature (°C)".into(),
        ] {
            assert!(text.contains(&s), "{s:?} missing on {paper:?}");
        }
        // γ, − and ρ in a method have no WinAnsi glyph: spelled out, never `?`.
        assert!(text.contains("V·drho/dt = -Cd·A·G(rho)"), "{text}");
    }
}

#[test]
fn the_deferral_is_in_every_footer_and_not_a_banner() {
    let doc = sample();
    let bytes = render_pdf(&doc, Paper::A4).expect("renders");
    let first = flat(&pages_text(&bytes)[0]);
    assert_eq!(first.matches(&flat(&doc.footer)).count(), 1, "{first}");
    // The other NOTICE is a banner still.
    assert!(first.contains("Ideal-gas model"), "{first}");
}

#[test]
fn a_long_worksheet_paginates_with_footer_and_page_numbers_on_every_page() {
    let mut doc = sample();
    let more = doc.sections[0].clone();
    doc.sections.extend(vec![more; 8]);
    doc.checklist = (1..=60)
        .map(|i| format!("Checklist item {i}: confirm the step and initial the box."))
        .collect();
    let bytes = render_pdf(&doc, Paper::Letter).expect("renders");
    let pages = pages_text(&bytes);
    let n = pages.len();
    assert!(n >= 4, "{n} pages");
    for (k, text) in pages.iter().enumerate() {
        let text = flat(text);
        assert!(text.contains(&format!("Page {} of {n}", k + 1)), "{text}");
        assert!(text.contains(&flat(&doc.footer)), "page {}", k + 1);
        assert!(text.contains(FINGERPRINT), "page {}", k + 1);
        assert!(text.contains("fingerprint 7c2f9e41b0d86a35…6e2d0a17"));
    }
    // The running head on later pages names the equipment and the date.
    assert!(flat(&pages[1]).contains("Tag AR-101 · 2026-03-14 09:30 +01:00"));
    assert!(flat(&pages[n - 1]).contains("Checklist item 60"));
}

#[test]
fn us_units_label_the_axes_and_a_sparse_document_still_renders() {
    let mut doc = sample();
    doc.units = UnitSystem::Us;
    let bytes = render_pdf(&doc, Paper::Letter).expect("renders");
    let text = flat(&pages_text(&bytes).join("\n"));
    assert!(text.contains("Pressure (psig)"), "{text}");
    assert!(text.contains("Gas temperature (°F)"), "{text}");

    doc.header.truncate(1);
    doc.cautions.clear();
    doc.purpose.clear();
    doc.inputs.clear();
    doc.sections.clear();
    doc.checklist.clear();
    doc.signoff.clear();
    doc.plots.truncate(1);
    doc.plots[0].series[0].points = vec![(0.0, AMBIENT_PA)];
    doc.plots[0].series[1].points.clear();
    doc.plots[0].limits.clear();
    doc.fingerprint = "abc".into();
    let bytes = render_pdf(&doc, Paper::A4).expect("renders");
    let pages = pages_text(&bytes);
    assert_eq!(pages.len(), 1);
    let text = flat(&pages[0]);
    assert!(
        text.contains("Page 1 of 1") && text.contains("fingerprint abc"),
        "{text}"
    );
}

#[test]
fn media_boxes_match_the_paper() {
    let doc = sample();
    for (paper, w, h) in [(Paper::A4, 595.0, 842.0), (Paper::Letter, 612.0, 792.0)] {
        let bytes = render_pdf(&doc, paper).expect("renders");
        let pdf = lopdf::Document::load_mem(&bytes).expect("readable");
        for id in pdf.get_pages().values() {
            let page = pdf.get_dictionary(*id).expect("a page");
            let b: Vec<f32> = page
                .get(b"MediaBox")
                .and_then(|o| o.as_array())
                .expect("a media box")
                .iter()
                .map(|o| o.as_float().expect("a number"))
                .collect();
            assert!((b[2] - b[0] - w).abs() <= 1.0, "{paper:?} {b:?}");
            assert!((b[3] - b[1] - h).abs() <= 1.0, "{paper:?} {b:?}");
        }
    }
}

#[test]
fn same_document_gives_the_same_bytes() {
    let doc = sample();
    let a = render_pdf(&doc, Paper::A4).expect("renders");
    let b = render_pdf(&doc, Paper::A4).expect("renders");
    assert!(a == b, "two renders differ");
    let pdf = lopdf::Document::load_mem(&a).expect("readable");
    let id = pdf
        .trailer
        .get(b"ID")
        .and_then(|o| o.as_array())
        .expect("an /ID");
    assert_eq!(
        id[0].as_str().expect("a string"),
        &FINGERPRINT.as_bytes()[..32]
    );
}

#[test]
fn metadata_carries_the_title_tag_and_worksheet_date() {
    let bytes = render_pdf(&sample(), Paper::A4).expect("renders");
    let pdf = lopdf::Document::load_mem(&bytes).expect("readable");
    let info = pdf
        .trailer
        .get(b"Info")
        .and_then(|o| o.as_reference())
        .and_then(|r| pdf.get_dictionary(r))
        .expect("an info dictionary");
    let date = info
        .get(b"CreationDate")
        .and_then(|o| o.as_str())
        .expect("a date");
    // 09:30 at +01:00 is 08:30 UTC.
    assert_eq!(date, b"D:20260314083000+00'00'");
    let title = info
        .get(b"Title")
        .and_then(|o| o.as_str())
        .expect("a title");
    let utf16: Vec<u16> = title
        .chunks(2)
        .skip(1)
        .map(|c| u16::from_be_bytes([c[0], c[1]]))
        .collect();
    assert_eq!(
        String::from_utf16_lossy(&utf16),
        "Pre-maintenance hazard worksheet — AR-101"
    );
}

// ---------------------------------------------------------------------------------------------
// The page flow, checked on the laid-out pages

/// One run of text as laid out: its page, position from the page's top-left, type and text.
#[derive(Debug)]
struct Run {
    page: usize,
    x: f32,
    baseline: f32,
    bold: bool,
    size: f32,
    text: String,
}

/// Every run of text on the pages, in drawing order.
fn runs(pages: &[Vec<Op>], paper: Paper) -> Vec<Run> {
    let height = paper.size_mm().1 * MM;
    let mut out = Vec::new();
    for (page, ops) in pages.iter().enumerate() {
        let (mut bold, mut size, mut at) = (false, 0.0, (0.0, 0.0));
        for op in ops {
            match op {
                Op::SetFont { font, size: s } => {
                    bold = *font == PdfFontHandle::Builtin(Face::Bold.builtin());
                    size = s.0;
                }
                Op::SetTextCursor { pos } => at = (pos.x.0, height - pos.y.0),
                Op::ShowText { items } => {
                    let text = items
                        .iter()
                        .filter_map(|i| match i {
                            TextItem::Text(t) => Some(t.as_str()),
                            _ => None,
                        })
                        .collect();
                    out.push(Run {
                        page,
                        x: at.0,
                        baseline: at.1,
                        bold,
                        size,
                        text,
                    });
                }
                _ => {}
            }
        }
    }
    out
}

/// The body's lowest line on `paper`: below it lies the footer.
fn body_bottom(doc: &Document, paper: Paper) -> f32 {
    Sheet::new(doc, paper).body_bottom
}

/// Whether a run is a section heading (the signal words share its type).
fn is_heading(r: &Run) -> bool {
    let signal = [Level::Danger, Level::Warning, Level::Caution, Level::Notice];
    r.bold && r.size == HEADING.size && !signal.iter().any(|l| l.word() == r.text)
}

/// The sample with `extra` more inputs and a checklist `items` long, to move every later
/// block through every position on its page.
fn stretched(extra: usize, items: usize) -> Document {
    let mut doc = sample();
    for i in 0..extra {
        doc.inputs
            .push(input(&format!("Extra input {i}"), Value::Number(i as f64)));
    }
    doc.checklist = (1..=items)
        .map(|i| format!("Checklist item {i}: confirm the step and initial the box."))
        .collect();
    doc
}

#[test]
fn page_one_leads_with_the_decision_then_the_findings_then_the_banners() {
    let doc = sample();
    let r = runs(&layout(&doc, Paper::A4), Paper::A4);
    let first = |pred: &dyn Fn(&Run) -> bool| {
        r.iter()
            .find(|r| pred(r))
            .map(|r| (r.page, r.baseline))
            .expect("on the sheet")
    };
    let word = first(&|r| r.text == "NO-GO" && r.bold && r.size == DECISION.size);
    let meaning = first(&|r| r.text.starts_with("Do not go ahead as planned"));
    let header = first(&|r| r.text == "Hazard" && r.bold && r.size == CELL_HEAD.size);
    let stop = first(&|r| r.text == "STOP" && r.bold);
    let banner = first(&|r| r.text == "DANGER");
    let inputs = first(&|r| r.text == "Inputs" && is_heading(r));
    assert_eq!(word.0, 0);
    for pair in [word, meaning, header, stop, banner, inputs].windows(2) {
        assert!(pair[0] < pair[1], "{pair:?}");
    }
    // An ok row says what was found, in place of an action.
    assert!(r
        .iter()
        .any(|r| r.text == "The pressure is within the MAWP."));
    for (decision, text) in [
        (Decision::GoWithActions, "GO WITH ACTIONS"),
        (Decision::Go, "GO"),
    ] {
        let mut doc = sample();
        doc.verdict.decision = decision;
        let r = runs(&layout(&doc, Paper::Letter), Paper::Letter);
        assert!(r.iter().any(|r| r.text == text && r.size == DECISION.size));
    }
}

#[test]
fn a_long_findings_table_repeats_its_header_on_every_page() {
    let mut doc = sample();
    let hazards = [Hazard::BlastZone, Hazard::ColdMetal, Hazard::VentTime];
    doc.verdict = Verdict {
        decision: Decision::NoGo,
        findings: (0..60)
            .map(|i| {
                Finding::ok(
                    hazards[i % hazards.len()],
                    "test",
                    vec![Part::from(format!("Finding {i} is within its limit."))],
                )
                .against(Value::Pressure(bar_g(i as f64)), None)
            })
            .collect(),
    };
    let r = runs(&layout(&doc, Paper::A4), Paper::A4);
    let rows: Vec<&Run> = r
        .iter()
        .filter(|r| r.text.starts_with("Finding "))
        .collect();
    assert_eq!(rows.len(), 60);
    let (first_page, last_page) = (rows[0].page, rows[59].page);
    assert!(last_page > first_page, "the table fits one page");
    for page in first_page..=last_page {
        let top_row = rows
            .iter()
            .filter(|r| r.page == page)
            .map(|r| r.baseline)
            .fold(f32::INFINITY, f32::min);
        for column in ["Hazard", "Value", "Limit", "Status", "Action"] {
            let heads: Vec<&Run> = r
                .iter()
                .filter(|r| r.page == page && r.text == column && r.size == CELL_HEAD.size)
                .collect();
            assert_eq!(heads.len(), 1, "{column} on page {}", page + 1);
            assert!(heads[0].baseline < top_row, "{column} under its rows");
        }
    }
}

#[test]
fn a_long_section_continues_under_its_heading_continued() {
    let mut doc = sample();
    let rows = doc.sections[0].entries.clone();
    for _ in 0..20 {
        doc.sections[0].entries.extend(rows.iter().cloned());
    }
    let r = runs(&layout(&doc, Paper::Letter), Paper::Letter);
    let labels: Vec<&Run> = r
        .iter()
        .filter(|r| r.text == "TNT equivalent" && !r.bold)
        .collect();
    let (first, last) = (labels[0].page, labels[labels.len() - 1].page);
    assert!(last > first, "the section fits one page");
    for page in first + 1..=last {
        let heading = r
            .iter()
            .find(|r| r.page == page && is_heading(r))
            .expect("a heading");
        assert_eq!(heading.text, "Stored energy (continued)");
        assert!(labels
            .iter()
            .filter(|l| l.page == page)
            .all(|l| l.baseline > heading.baseline));
    }
}

#[test]
fn a_heading_never_ends_a_page() {
    for paper in [Paper::A4, Paper::Letter] {
        for extra in 0..45 {
            let doc = stretched(extra, 6 + extra % 5);
            let bottom = body_bottom(&doc, paper);
            let r = runs(&layout(&doc, paper), paper);
            for h in r.iter().filter(|r| is_heading(r)) {
                let mut below: Vec<f32> = r
                    .iter()
                    .filter(|o| {
                        o.page == h.page
                            && !is_heading(o)
                            && o.baseline > h.baseline
                            && o.baseline <= bottom
                    })
                    .map(|o| o.baseline)
                    .collect();
                below.dedup_by(|a, b| (*a - *b).abs() < 0.5);
                assert!(
                    below.len() >= 2,
                    "{:?} ends page {} with {extra} extra inputs on {paper:?}",
                    h.text,
                    h.page + 1
                );
            }
        }
    }
}

#[test]
fn the_signoff_shares_its_page_with_the_checklist() {
    for paper in [Paper::A4, Paper::Letter] {
        for (extra, items) in (0..40)
            .map(|k| (k, 1 + k % 7))
            .chain((1..=70).map(|n| (3, n)))
        {
            let doc = stretched(extra, items);
            let r = runs(&layout(&doc, paper), paper);
            let page_of = |text: &str| {
                r.iter()
                    .find(|r| r.text == text)
                    .map(|r| r.page)
                    .expect("on the sheet")
            };
            let signoff = page_of("Sign-off");
            let last_item = r
                .iter()
                .filter(|r| r.text.starts_with(&format!("Checklist item {items}:")))
                .map(|r| r.page)
                .next()
                .expect("the last item");
            assert_eq!(last_item, signoff, "{items} items, {extra} extra");
            // The item before the last too: the sign-off never follows a lone item.
            if items > 1 {
                let prev = format!("Checklist item {}:", items - 1);
                assert_eq!(page_of_start(&r, &prev), signoff, "{items} items");
            }
            // A checklist that fits one page is not split from its sign-off at all.
            if items <= 8 {
                assert_eq!(
                    page_of("Checklist"),
                    signoff,
                    "{items} items, {extra} extra"
                );
            }
            assert!(signoff == r.iter().map(|r| r.page).max().unwrap_or(0));
        }
    }
}

/// The page of the first run starting with `prefix`.
fn page_of_start(r: &[Run], prefix: &str) -> usize {
    r.iter()
        .find(|r| r.text.starts_with(prefix))
        .map(|r| r.page)
        .expect("on the sheet")
}

#[test]
fn the_basis_follows_the_plots_and_comes_before_the_checklist() {
    let doc = sample();
    let r = runs(&layout(&doc, Paper::A4), Paper::A4);
    let at = |text: &str| {
        r.iter()
            .find(|r| r.text == text)
            .map(|r| (r.page, r.baseline))
            .expect("on the sheet")
    };
    let plot = at("Fill path: gas temperature against pressure");
    let basis = at("Basis and assumptions");
    let topic = at("Gas model");
    let checklist = at("Checklist");
    assert!(plot < basis && basis < topic && topic < checklist);
    let topic_run = r.iter().find(|r| r.text == "Gas model").expect("a topic");
    assert!(topic_run.bold && topic_run.x < 60.0);
}

#[test]
fn every_series_has_a_legend_entry_in_its_colour_and_dash() {
    let mut doc = sample();
    let mut fill = doc.plots.swap_remove(1);
    let base = fill.series[0].points.clone();
    for (k, label) in ["Gas, with wall heat", "Wall (liner)", "Wrap"]
        .iter()
        .enumerate()
    {
        let shift = 5.0 * (k + 1) as f64;
        fill.series.push(Series {
            label: label.to_string(),
            right_axis: false,
            points: base.iter().map(|&(x, y)| (x, y - shift)).collect(),
        });
    }
    doc.plots = vec![fill.clone()];
    let pages = layout(&doc, Paper::A4);
    let r = runs(&pages, Paper::A4);
    for s in &fill.series {
        assert!(
            r.iter().any(|r| r.text == s.label && r.size == LEGEND.size),
            "no legend for {}",
            s.label
        );
    }
    // Each series' colour and dash stroke two lines: the series and its legend sample.
    let mut strokes = vec![0; fill.series.len()];
    let (mut col, mut dash) = (None, None);
    for op in pages.iter().flatten() {
        match op {
            Op::SetOutlineColor { col: c } => col = Some(c.clone()),
            Op::SetLineDashPattern { dash: d } => dash = Some(d.clone()),
            Op::DrawLine { .. } => {
                for (k, n) in strokes.iter_mut().enumerate() {
                    if col == Some(colour(SERIES_COLOURS[k]))
                        && dash == Some(LineDashPattern::new(0.0, SERIES_DASHES[k]))
                    {
                        *n += 1;
                    }
                }
            }
            _ => {}
        }
    }
    assert_eq!(strokes, vec![2; fill.series.len()]);
    let left = r
        .iter()
        .find(|r| r.text.starts_with("Gas temperature ("))
        .expect("the left axis label");
    assert_eq!(left.text, "Gas temperature (°C)");
}
