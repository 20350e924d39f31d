//! The worksheet's blocks: the title block, the verdict with its findings, the banners, and
//! the tables of inputs, results, basis and checklist with the sign-off. Each block only
//! places text the [`Document`](crate::report::Document) already holds.

use super::sheet::{Sheet, BLOCK_GAP, FIRST_BASELINE, HEADING_H};
use super::style::{
    decision_colours, signal_colours, Rgb3, Style, BODY, BORDER, CAP_CENTRE, CELL, CELL_BOLD,
    CELL_HEAD, DECISION, FIELD_LABEL, FIELD_VALUE, GREY, HEAD_BG, INK, MARGIN, MESSAGE, MESSAGE_BG,
    METHOD, PAGE_NO, ROLE, RULE, SIGNAL, TITLE, TOPIC,
};
use super::text::{pdf_text, text_width, wrap};
use crate::assess::{Decision, Finding, Status, Verdict};
use crate::caution::{Caution, Level, Note};
use crate::report::{value_text, Entry};
use crate::units::{Display, Value};

/// Padding above and below the text of a table row.
const ROW_PAD: f32 = 3.0;

/// The findings table's column headings.
const FINDING_HEADS: [&str; 5] = ["Hazard", "Value", "Limit", "Status", "Action"];

/// How the findings table shares the width left once the hazard and status columns are as
/// wide as their words: value, limit, action.
const FINDING_SHARES: [f32; 3] = [0.26, 0.26, 0.48];

/// Gap between a cell's text and the next column.
const CELL_GAP: f32 = 6.0;

/// The height of the first `n` rows of a table, the least a heading keeps with it.
fn lead(heights: impl IntoIterator<Item = f32>, n: usize) -> f32 {
    heights.into_iter().take(n).sum()
}

/// One findings-table row: each cell's lines and style, and the row's height.
struct FindingRow {
    cells: Vec<(Vec<String>, Style)>,
    h: f32,
}

/// The findings table laid out: its column widths and its rows.
struct FindingTable {
    widths: [f32; 5],
    rows: Vec<FindingRow>,
}

impl Sheet<'_> {
    /// Page 1's title block: the template title and a two-column grid of the header pairs.
    pub(super) fn title_block(&mut self) {
        let doc = self.doc;
        let room = self.content_width() - text_width("Page 999 of 999", PAGE_NO) - 12.0;
        let title = wrap(&doc.title, TITLE, room);
        self.lines(
            self.left,
            MARGIN + FIRST_BASELINE - TITLE.size,
            TITLE,
            &title,
        );
        self.y = MARGIN + FIRST_BASELINE + (title.len() as f32 - 1.0) * TITLE.leading() + 8.0;

        let cell_w = self.content_width() / 2.0;
        let pad = 3.5;
        for row in doc.header.chunks(2) {
            let cells: Vec<(String, Vec<String>)> = row
                .iter()
                .map(|(label, value)| {
                    let lines = wrap(value, FIELD_VALUE, cell_w - 2.0 * pad);
                    (pdf_text(label), lines)
                })
                .collect();
            let value_lines = cells.iter().map(|(_, v)| v.len()).max().unwrap_or(1);
            let h = pad + FIELD_LABEL.leading() + value_lines as f32 * FIELD_VALUE.leading() + pad;
            let top = self.y;
            for (i, (label, value)) in cells.iter().enumerate() {
                let x = self.left + i as f32 * cell_w;
                self.rect(x, top, cell_w, h, None, Some(BORDER));
                self.text(x + pad, top + pad + FIELD_LABEL.size, FIELD_LABEL, label);
                self.lines(
                    x + pad,
                    top + pad + FIELD_LABEL.leading(),
                    FIELD_VALUE,
                    value,
                );
            }
            if cells.len() == 1 {
                // An odd pair count leaves the grid's last cell empty but drawn.
                self.rect(self.left + cell_w, top, cell_w, h, None, Some(BORDER));
            }
            self.y += h;
        }
        self.page_top = self.y + 6.0;
        self.y = self.page_top;
    }

    // --- the verdict -----------------------------------------------------------------------

    /// The decision in large type on a band of its colour, the line that says what it means,
    /// and the findings table under it. The box is kept with the table's first rows.
    pub(super) fn verdict(&mut self, verdict: &Verdict, d: &Display) {
        let band_h = 36.0;
        let line_h = BODY.leading() + 2.0 * 4.0;
        let table = self.finding_table(&verdict.findings, d);
        let rows = &table.rows;
        let table_h = if rows.is_empty() {
            0.0
        } else {
            4.0 + finding_header_h() + lead(rows.iter().map(|r| r.h), 2)
        };
        self.place(band_h + line_h + table_h);

        let (fill, ink) = decision_colours(verdict.decision);
        let top = self.y;
        let w = self.content_width();
        self.rect(
            self.left,
            top,
            w,
            band_h + line_h,
            Some(MESSAGE_BG),
            Some(BORDER),
        );
        self.rect(self.left, top, w, band_h, Some(fill), Some(BORDER));
        let style = DECISION.with_color(ink);
        let word = verdict.decision.word();
        self.text(
            self.left + 10.0,
            top + band_h / 2.0 + CAP_CENTRE * style.size,
            style,
            word,
        );
        let meaning = match verdict.decision {
            Decision::NoGo => "Do not go ahead as planned: see the findings marked STOP.",
            Decision::GoWithActions => "Go ahead only once the actions below are done.",
            Decision::Go => "Every finding is within its limit.",
        };
        let meaning = wrap(meaning, BODY, w - 20.0).swap_remove(0);
        self.text(
            self.left + 10.0,
            top + band_h + 4.0 + BODY.size,
            BODY,
            &meaning,
        );
        self.y = top + band_h + line_h;

        if rows.is_empty() {
            return;
        }
        self.y += 4.0;
        let widths = table.widths;
        self.finding_header(&widths);
        for r in rows {
            self.row(r.h, |s| s.finding_header(&widths));
            let top = self.y + ROW_PAD;
            let mut x = self.left;
            for ((lines, style), cw) in r.cells.iter().zip(widths) {
                self.lines(x + CELL_GAP / 2.0, top, *style, lines);
                x += cw;
            }
            self.y += r.h;
            self.hline(self.left, self.right, self.y, RULE, 0.4);
        }
    }

    /// The findings table: the hazard and status columns as wide as their widest word, so
    /// that a hazard's name reads on one line, and each finding's cells wrapped to their
    /// columns.
    fn finding_table(&self, findings: &[Finding], d: &Display) -> FindingTable {
        let head = |i: usize| (FINDING_HEADS[i], CELL_HEAD);
        let titles = findings.iter().map(|f| (f.hazard.title(), CELL));
        let hazard_w = widest(titles.chain([head(0)])) + CELL_GAP;
        let statuses = findings.iter().map(|f| (f.status.word(), CELL_BOLD));
        let status_w = widest(statuses.chain([head(3)])) + CELL_GAP;
        let rest = (self.content_width() - hazard_w - status_w).max(0.0);
        let [value, limit, action] = FINDING_SHARES.map(|share| share * rest);
        let widths = [hazard_w, value, limit, status_w, action];
        let quantity = |v: &Option<Value>| {
            v.as_ref()
                .map_or_else(|| "—".to_string(), |v| value_text(v, d))
        };
        let rows = findings
            .iter()
            .map(|f| {
                let status = if f.status == Status::Stop {
                    CELL_BOLD
                } else {
                    CELL
                };
                // An ok row has no action; what was found says why it is ok.
                let action = f.action_text(d);
                let (action, action_style) = if action.trim().is_empty() {
                    (f.result_text(d), CELL.with_color(GREY))
                } else {
                    (action, CELL)
                };
                let texts = [
                    (f.hazard.title().to_string(), CELL),
                    (quantity(&f.value), CELL),
                    (quantity(&f.limit), CELL),
                    (f.status.word().to_string(), status),
                    (action, action_style),
                ];
                let cells: Vec<(Vec<String>, Style)> = texts
                    .into_iter()
                    .zip(widths)
                    .map(|((text, style), cw)| (wrap(&text, style, cw - CELL_GAP), style))
                    .collect();
                let lines = cells.iter().map(|(l, s)| l.len() as f32 * s.leading());
                let h = 2.0 * ROW_PAD + lines.fold(0.0, f32::max);
                FindingRow { cells, h }
            })
            .collect();
        FindingTable { widths, rows }
    }

    /// The findings table's column headings on a grey band: at its start and again at the
    /// top of every page it continues onto.
    fn finding_header(&mut self, widths: &[f32; 5]) {
        let h = finding_header_h();
        let top = self.y;
        self.rect(self.left, top, self.content_width(), h, Some(HEAD_BG), None);
        let mut x = self.left;
        for (label, cw) in FINDING_HEADS.into_iter().zip(widths) {
            self.text(
                x + CELL_GAP / 2.0,
                top + ROW_PAD + CELL_HEAD.size,
                CELL_HEAD,
                label,
            );
            x += cw;
        }
        self.y += h;
        self.hline(self.left, self.right, self.y, BORDER, 0.6);
    }

    // --- banners ---------------------------------------------------------------------------

    /// The banners, highest first, after a gap.
    pub(super) fn banners(&mut self, cautions: &[&Caution], d: &Display) {
        if cautions.is_empty() {
            return;
        }
        self.gap();
        for c in cautions {
            self.banner(c, d);
        }
    }

    /// A caution: the signal-word panel on the left, the message beside it. Never split.
    fn banner(&mut self, c: &Caution, display: &Display) {
        let (fill, ink) = signal_colours(c.level);
        let panel_w = 92.0;
        let pad = 6.0;
        let msg_x = self.left + panel_w;
        let lines = wrap(&c.render(display), MESSAGE, self.right - msg_x - 2.0 * pad);
        let h = (lines.len() as f32 * MESSAGE.leading() + 2.0 * pad).max(26.0);
        self.ensure(h);
        let top = self.y;
        self.rect(
            msg_x,
            top,
            self.right - msg_x,
            h,
            Some(MESSAGE_BG),
            Some(BORDER),
        );
        self.rect(self.left, top, panel_w, h, Some(fill), Some(BORDER));

        let word = c.level.word();
        let style = SIGNAL.with_color(ink);
        // The safety alert symbol precedes the words that warn of personal injury.
        let symbol_w = if c.level == Level::Notice { 0.0 } else { 15.0 };
        let x = self.left + (panel_w - symbol_w - text_width(word, style)) / 2.0;
        let mid = top + h / 2.0;
        if symbol_w > 0.0 {
            self.alert_symbol(x, mid, ink, fill);
        }
        self.text(x + symbol_w, mid + CAP_CENTRE * style.size, style, word);

        let text_h = lines.len() as f32 * MESSAGE.leading();
        let text_top = top + (h - text_h) / 2.0 - 0.1 * MESSAGE.size;
        self.lines(msg_x + pad, text_top, MESSAGE, &lines);
        self.y = top + h + 4.0;
    }

    /// A triangle with an exclamation mark, 11.5 pt wide, its left corner at `x`, centred on
    /// `mid`; drawn, not typed, so that text read back from the page stays clean.
    fn alert_symbol(&mut self, x: f32, mid: f32, ink: Rgb3, panel: Rgb3) {
        let (w, h) = (11.5, 10.0);
        let (top, bottom) = (mid - h / 2.0 - 0.5, mid + h / 2.0 - 0.5);
        self.fill_polygon(&[(x, bottom), (x + w, bottom), (x + w / 2.0, top)], ink);
        let cx = x + w / 2.0;
        self.fill_polygon(
            &[
                (cx - 0.75, top + 3.2),
                (cx + 0.75, top + 3.2),
                (cx + 0.5, bottom - 3.0),
                (cx - 0.5, bottom - 3.0),
            ],
            panel,
        );
        self.rect(cx - 0.7, bottom - 2.3, 1.4, 1.4, Some(panel), None);
    }

    // --- sections --------------------------------------------------------------------------

    /// A heading and a paragraph of running text, the heading kept with two lines.
    pub(super) fn paragraph(&mut self, heading: &str, text: &str) {
        if text.trim().is_empty() {
            return;
        }
        let lines = wrap(text, BODY, self.content_width());
        self.heading(heading, BODY.leading() * lines.len().min(2) as f32);
        for l in &lines {
            self.ensure(BODY.leading());
            self.text(self.left, self.y + BODY.size, BODY, l);
            self.y += BODY.leading();
        }
    }

    /// A label | value table; each result's method in a small grey line under its value.
    pub(super) fn entries(&mut self, heading: &str, entries: &[Entry], d: &Display) {
        let label_w = (self.content_width() * 0.38).round();
        let value_x = self.left + label_w + 8.0;
        let value_w = self.right - value_x;
        let rows: Vec<_> = entries
            .iter()
            .map(|e| {
                let label = wrap(&e.label_text(d), BODY, label_w - 4.0);
                let value = wrap(&value_text(&e.value, d), BODY, value_w);
                let method = e
                    .method
                    .map(|m| wrap(m, METHOD, value_w))
                    .unwrap_or_default();
                let value_h =
                    value.len() as f32 * BODY.leading() + method.len() as f32 * METHOD.leading();
                let h = 2.0 * ROW_PAD + value_h.max(label.len() as f32 * BODY.leading());
                (label, value, method, h)
            })
            .collect();
        self.table_heading(heading, rows.iter().map(|r| r.3));
        let continued = format!("{heading} (continued)");
        for (label, value, method, h) in &rows {
            self.row(*h, |s| s.heading_line(&continued));
            let top = self.y + ROW_PAD;
            self.lines(self.left, top, BODY, label);
            let vh = self.lines(value_x, top, BODY, value);
            self.lines(value_x, top + vh - 0.5, METHOD, method);
            self.y += h;
            self.hline(self.left, self.right, self.y, RULE, 0.4);
        }
    }

    /// The basis and assumptions: each note's topic in small bold beside the note.
    pub(super) fn basis(&mut self, notes: &[Note], d: &Display) {
        const HEADING: &str = "Basis and assumptions";
        let topic_w = (self.content_width() * 0.24).round();
        let text_x = self.left + topic_w + 8.0;
        let text_w = self.right - text_x;
        let rows: Vec<_> = notes
            .iter()
            .map(|n| {
                let topic = wrap(&upper_first(n.topic), TOPIC, topic_w - 4.0);
                let text = wrap(&n.render(d), BODY, text_w);
                let lines_h =
                    (topic.len() as f32 * TOPIC.leading()).max(text.len() as f32 * BODY.leading());
                (topic, text, 2.0 * ROW_PAD + lines_h)
            })
            .collect();
        self.table_heading(HEADING, rows.iter().map(|r| r.2));
        let continued = format!("{HEADING} (continued)");
        for (topic, text, h) in &rows {
            self.row(*h, |s| s.heading_line(&continued));
            let top = self.y + ROW_PAD;
            // The topic's smaller caps share the note's first baseline.
            self.lines(self.left, top + BODY.size - TOPIC.size, TOPIC, topic);
            self.lines(text_x, top, BODY, text);
            self.y += h;
            self.hline(self.left, self.right, self.y, RULE, 0.4);
        }
    }

    /// A table's heading, kept with its first two rows; nothing for a table without rows.
    fn table_heading(&mut self, heading: &str, heights: impl Iterator<Item = f32> + Clone) {
        if heights.clone().next().is_none() {
            return;
        }
        self.heading(heading, lead(heights, 2));
    }

    // --- checklist and sign-off ------------------------------------------------------------

    /// The checklist with a tick box per item, then the sign-off. Both go on one page when
    /// they fit one (on a new page if they do not fit what is left of this one); a longer
    /// checklist runs on, but its last two items always share the sign-off's page, so that
    /// signatures never stand alone or apart from what they sign for.
    pub(super) fn checklist_and_signoff(&mut self, items: &[String], roles: &[String]) {
        let text_x = self.left + 17.0;
        let rows: Vec<_> = items
            .iter()
            .map(|item| wrap(item, BODY, self.right - text_x))
            .collect();
        let heights: Vec<f32> = rows.iter().map(|l| checklist_row_h(l)).collect();
        let signoff_h = if roles.is_empty() {
            0.0
        } else {
            BLOCK_GAP + HEADING_H + SIGNOFF_ROW_H * roles.len() as f32
        };
        if rows.is_empty() {
            self.signoff(roles);
            return;
        }
        let total = HEADING_H + heights.iter().sum::<f32>() + signoff_h;
        if total <= self.page_room() {
            self.ensure(BLOCK_GAP + total);
        }
        // Rows from `tail` on are placed together with the sign-off.
        let tail = rows.len().saturating_sub(2);
        let with_signoff = |i: usize| heights[i..].iter().sum::<f32>() + signoff_h;
        let keep = if tail < 2 {
            with_signoff(0)
        } else {
            lead(heights.iter().copied(), 2)
        };
        self.heading("Checklist", keep);
        for (i, lines) in rows.iter().enumerate() {
            let need = if i >= tail {
                with_signoff(i)
            } else {
                heights[i]
            };
            self.row(need, |s| s.heading_line("Checklist (continued)"));
            let top = self.y + 3.0;
            let box_size = 8.5;
            self.rect(
                self.left + 1.0,
                top + 1.2,
                box_size,
                box_size,
                None,
                Some(INK),
            );
            self.lines(text_x, top, BODY, lines);
            self.y += heights[i];
        }
        self.signoff(roles);
    }

    /// Name, signature and date lines for each role, all on one page under their heading.
    fn signoff(&mut self, roles: &[String]) {
        if roles.is_empty() {
            return;
        }
        let role_w = 92.0;
        let gap = 14.0;
        let fields_w = self.content_width() - role_w - 2.0 * gap;
        let fields = [
            ("Name", 0.36 * fields_w),
            ("Signature", 0.40 * fields_w),
            ("Date", 0.24 * fields_w),
        ];
        self.heading("Sign-off", SIGNOFF_ROW_H * roles.len() as f32);
        for role in roles {
            self.ensure(SIGNOFF_ROW_H);
            let line_y = self.y + 22.0;
            let role = wrap(role, ROLE, role_w - 6.0).swap_remove(0);
            self.text(self.left, line_y - 2.0, ROLE, &role);
            let mut x = self.left + role_w;
            for (label, w) in fields {
                self.hline(x, x + w, line_y, INK, 0.6);
                self.text(x, line_y + 8.0, FIELD_LABEL, label);
                x += w + gap;
            }
            self.y += SIGNOFF_ROW_H;
        }
    }
}

/// The width of the widest of `words`, each in its style.
fn widest<'t>(words: impl Iterator<Item = (&'t str, Style)>) -> f32 {
    words
        .map(|(t, style)| text_width(&pdf_text(t), style))
        .fold(0.0, f32::max)
}

/// Height of the findings table's row of column headings.
fn finding_header_h() -> f32 {
    CELL_HEAD.leading() + 2.0 * ROW_PAD
}

/// Height of one sign-off role's row of lines.
const SIGNOFF_ROW_H: f32 = 34.0;

fn checklist_row_h(lines: &[String]) -> f32 {
    lines.len() as f32 * BODY.leading() + 6.0
}

/// A note's topic as a row label: "gas model" → "Gas model".
fn upper_first(s: &str) -> String {
    let mut c = s.chars();
    c.next()
        .map(|f| f.to_uppercase().chain(c).collect())
        .unwrap_or_default()
}
