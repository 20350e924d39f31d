//! The PDF renderer: lays a [`Document`] out as a printed worksheet a crew signs and attaches
//! to the work order. Every quantity is formatted by [`value_text`] and every plot value is
//! converted by [`Display::axis_value`]; this module only measures, wraps and places text and
//! lines. It uses the PDF built-in Helvetica, so the file embeds no font and all text stays
//! real, selectable text.

use std::sync::OnceLock;

use printpdf::{
    BuiltinFont, Color, Line, LineDashPattern, LineJoinStyle, LinePoint, Mm, Op, PaintMode,
    PdfDocument, PdfFontHandle, PdfPage, PdfParseErrorSeverity, PdfSaveOptions, Point, Polygon,
    PolygonRing, Pt, Rect, Rgb, TextItem, WindingOrder,
};

use super::{value_text, Axis, AxisKind, Document, Entry, Plot, Series};
use crate::caution::{Caution, Level};
use crate::units::Display;

/// Paper sizes.
#[derive(
    Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum, serde::Serialize, serde::Deserialize,
)]
#[serde(rename_all = "lowercase")]
pub enum Paper {
    /// ISO A4, 210 × 297 mm.
    A4,
    /// US Letter, 8.5 × 11 in.
    Letter,
}

impl Paper {
    /// Width and height in millimetres.
    fn size_mm(self) -> (f32, f32) {
        match self {
            Paper::A4 => (210.0, 297.0),
            Paper::Letter => (215.9, 279.4),
        }
    }
}

/// Errors from rendering.
#[derive(Debug, thiserror::Error)]
pub enum PdfError {
    /// The document could not be turned into PDF objects.
    #[error("building the PDF failed: {0}")]
    Build(String),
    /// The PDF objects could not be written out as bytes.
    #[error("writing the PDF failed: {0}")]
    Save(String),
}

/// The worksheet as PDF bytes, on `paper`. Same Document → same bytes in separate processes:
/// the dates come from `doc.date` and the file identifier from `doc.fingerprint`, never from
/// the clock or printpdf's counter.
pub fn render_pdf(doc: &Document, paper: Paper) -> Result<Vec<u8>, PdfError> {
    let display = Display {
        system: doc.units,
        ambient: doc.ambient,
    };
    let mut sheet = Sheet::new(doc, paper);
    sheet.title_block();
    for c in &doc.cautions {
        sheet.banner(c, &display);
    }
    sheet.paragraph("Purpose", &doc.purpose);
    sheet.entries("Inputs", &doc.inputs, &display);
    for s in &doc.sections {
        sheet.entries(&s.heading, &s.entries, &display);
    }
    for p in &doc.plots {
        sheet.plot(p, &display);
    }
    sheet.checklist(&doc.checklist);
    sheet.signoff(&doc.signoff);
    save(doc, sheet.finish())
}

// ---------------------------------------------------------------------------------------------
// Saving

fn save(doc: &Document, pages: Vec<PdfPage>) -> Result<Vec<u8>, PdfError> {
    let mut pdf = PdfDocument::new(&metadata_title(doc));
    // printpdf writes these fields with a +00'00' offset, so hand it the instant in UTC.
    let when = printpdf::OffsetDateTime::from_unix_timestamp(doc.date.timestamp())
        .map_err(|e| PdfError::Build(format!("the worksheet date cannot be recorded: {e}")))?;
    let info = &mut pdf.metadata.info;
    info.creation_date = when;
    info.modification_date = when;
    info.metadata_date = when;
    info.creator = format!("pvhazard {}", doc.tool_version);
    info.producer = format!("pvhazard {}", doc.tool_version);
    info.subject = format!("template {}", doc.template);
    info.identifier = doc.fingerprint.clone();
    pdf.pages = pages;

    let mut warnings = Vec::new();
    let mut lo = pdf.to_lopdf_document(&PdfSaveOptions::default(), &mut warnings);
    if let Some(w) = warnings
        .iter()
        .find(|w| w.severity == PdfParseErrorSeverity::Error)
    {
        return Err(PdfError::Build(w.msg.clone()));
    }
    // printpdf fills the trailer /ID from a process-wide counter, so two renders in one
    // process would differ. A new file's two identifiers are equal (PDF 32000-1, 14.4); the
    // fingerprint already identifies the inputs, so it names the file.
    let id: Vec<u8> = doc.fingerprint.bytes().take(32).collect();
    if let Ok(parts) = lo.trailer.get_mut(b"ID").and_then(|o| o.as_array_mut()) {
        for part in parts {
            if let Ok(s) = part.as_str_mut() {
                s.clone_from(&id);
            }
        }
    }
    lo.compress();
    let mut bytes = Vec::new();
    lo.save_to(&mut bytes)
        .map_err(|e| PdfError::Save(e.to_string()))?;
    Ok(bytes)
}

fn metadata_title(doc: &Document) -> String {
    match tag(doc) {
        Some(t) => format!("{} — {}", doc.title, t),
        None => doc.title.clone(),
    }
}

/// The equipment tag from the title block, if the template shows one.
fn tag(doc: &Document) -> Option<&str> {
    doc.header
        .iter()
        .find(|(label, _)| label.eq_ignore_ascii_case("tag"))
        .map(|(_, value)| value.as_str())
}

// ---------------------------------------------------------------------------------------------
// Type and colour

const MM: f32 = 72.0 / 25.4;
const MARGIN: f32 = 15.0 * MM;

type Rgb3 = (f32, f32, f32);

const INK: Rgb3 = (0.0, 0.0, 0.0);
const GREY: Rgb3 = (0.38, 0.38, 0.38);
const RULE: Rgb3 = (0.78, 0.78, 0.78);
const BORDER: Rgb3 = (0.45, 0.45, 0.45);
const GRID: Rgb3 = (0.88, 0.88, 0.88);
const MESSAGE_BG: Rgb3 = (0.965, 0.965, 0.965);
const WHITE: Rgb3 = (1.0, 1.0, 1.0);

/// ANSI Z535 / ISO 3864 safety colours.
const SAFETY_RED: Rgb3 = (200.0 / 255.0, 16.0 / 255.0, 46.0 / 255.0);
const SAFETY_ORANGE: Rgb3 = (1.0, 121.0 / 255.0, 0.0);
const SAFETY_YELLOW: Rgb3 = (1.0, 205.0 / 255.0, 0.0);
const SAFETY_BLUE: Rgb3 = (0.0, 75.0 / 255.0, 135.0 / 255.0);

/// Panel colour and text colour for a signal word.
fn signal_colours(level: Level) -> (Rgb3, Rgb3) {
    match level {
        Level::Danger => (SAFETY_RED, WHITE),
        Level::Warning => (SAFETY_ORANGE, INK),
        Level::Caution => (SAFETY_YELLOW, INK),
        Level::Notice => (SAFETY_BLUE, WHITE),
    }
}

/// Series colours and dash patterns: distinct in colour and, for monochrome copies, in dash.
const SERIES_COLOURS: [Rgb3; 4] = [
    (0.0, 0.27, 0.55),
    (0.80, 0.33, 0.0),
    (0.0, 0.48, 0.30),
    (0.35, 0.35, 0.35),
];
const SERIES_DASHES: [&[f32]; 4] = [&[], &[5.0, 2.5], &[1.5, 1.5], &[6.0, 2.0, 1.5, 2.0]];

fn colour((r, g, b): Rgb3) -> Color {
    Color::Rgb(Rgb {
        r,
        g,
        b,
        icc_profile: None,
    })
}

#[derive(Clone, Copy, PartialEq, Eq)]
enum Face {
    Regular,
    Bold,
}

impl Face {
    fn builtin(self) -> BuiltinFont {
        match self {
            Face::Regular => BuiltinFont::Helvetica,
            Face::Bold => BuiltinFont::HelveticaBold,
        }
    }
}

#[derive(Clone, Copy)]
struct Style {
    face: Face,
    size: f32,
    color: Rgb3,
}

impl Style {
    const fn new(face: Face, size: f32, color: Rgb3) -> Style {
        Style { face, size, color }
    }

    /// Baseline-to-baseline distance.
    fn leading(self) -> f32 {
        self.size * 1.25
    }

    fn with_color(self, color: Rgb3) -> Style {
        Style { color, ..self }
    }
}

const TITLE: Style = Style::new(Face::Bold, 15.0, INK);
const RUNNING_HEAD: Style = Style::new(Face::Bold, 9.0, INK);
const PAGE_NO: Style = Style::new(Face::Regular, 8.0, INK);
const HEADING: Style = Style::new(Face::Bold, 10.5, INK);
const BODY: Style = Style::new(Face::Regular, 9.0, INK);
const FIELD_LABEL: Style = Style::new(Face::Regular, 6.5, GREY);
const FIELD_VALUE: Style = Style::new(Face::Regular, 9.5, INK);
const METHOD: Style = Style::new(Face::Regular, 7.0, GREY);
const SIGNAL: Style = Style::new(Face::Bold, 10.5, INK);
const MESSAGE: Style = Style::new(Face::Regular, 8.5, INK);
const PLOT_TITLE: Style = Style::new(Face::Bold, 9.5, INK);
const AXIS_LABEL: Style = Style::new(Face::Regular, 7.5, INK);
const TICK: Style = Style::new(Face::Regular, 7.0, INK);
const LEGEND: Style = Style::new(Face::Regular, 7.0, INK);
const FOOT: Style = Style::new(Face::Regular, 6.5, GREY);
const FOOT_FINGERPRINT: Style = Style::new(Face::Regular, 6.0, GREY);

/// Caps sit between the baseline and 0.72 em above it (Helvetica's cap height): half of that
/// centres a line of capitals on a point.
const CAP_CENTRE: f32 = 0.36;

// ---------------------------------------------------------------------------------------------
// Text: the WinAnsi repertoire, widths and wrapping

/// Advance widths in thousandths of an em, from the glyph tables printpdf ships for the
/// built-in faces (the same metrics a viewer uses for Helvetica).
struct Metrics {
    widths: std::collections::HashMap<char, f32>,
}

impl Metrics {
    fn load(font: BuiltinFont) -> Metrics {
        let mut widths = std::collections::HashMap::new();
        if let Some(parsed) = font.get_parsed_font() {
            let per_em = f32::from(parsed.units_per_em.max(1));
            for (&cp, &gid) in &parsed.codepoint_to_glyph {
                if let (Some(c), Some(w)) = (char::from_u32(cp), parsed.get_glyph_width(gid)) {
                    widths.insert(c, f32::from(w) * 1000.0 / per_em);
                }
            }
        }
        // The shipped tables omit the space glyphs; Helvetica's space is 278 in both weights.
        widths.insert(' ', 278.0);
        widths.insert('\u{a0}', 278.0);
        Metrics { widths }
    }

    fn of(face: Face) -> &'static Metrics {
        static REGULAR: OnceLock<Metrics> = OnceLock::new();
        static BOLD: OnceLock<Metrics> = OnceLock::new();
        match face {
            Face::Regular => REGULAR.get_or_init(|| Metrics::load(face.builtin())),
            Face::Bold => BOLD.get_or_init(|| Metrics::load(face.builtin())),
        }
    }
}

/// Width of already-cleaned text in points. A character without a width (none should be
/// left after [`pdf_text`]) counts as an average lower-case letter.
fn text_width(s: &str, style: Style) -> f32 {
    let m = Metrics::of(style.face);
    s.chars()
        .map(|c| m.widths.get(&c).copied().unwrap_or(556.0))
        .sum::<f32>()
        * style.size
        / 1000.0
}

/// Whether the built-in fonts' WinAnsi encoding has `c` (PDF 32000-1, Annex D.2).
fn win_ansi(c: char) -> bool {
    matches!(c as u32, 0x20..=0x7e | 0xa0..=0xff) || "€‚ƒ„…†‡ˆ‰Š‹ŒŽ‘’“”•–—˜™š›œžŸ".contains(c)
}

/// `s` with every character the built-in fonts cannot show spelled in ones they can: printpdf
/// would otherwise print `?` for them.
fn pdf_text(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        if win_ansi(c) {
            out.push(c);
            continue;
        }
        let spelled = match c {
            '\t' | '\n' | '\r' | '\u{2002}'..='\u{200a}' | '\u{202f}' => " ",
            '−' | '‐' | '‑' | '‒' => "-",
            '≤' => "<=",
            '≥' => ">=",
            '≈' => "~",
            '≠' => "!=",
            '→' => "->",
            '←' => "<-",
            '⇒' => "=>",
            '∞' => "inf",
            '√' => "sqrt",
            '∫' => "integral ",
            'Δ' | 'δ' | '∂' => "d",
            'α' => "alpha",
            'β' => "beta",
            'γ' => "gamma",
            'ε' => "epsilon",
            'η' => "eta",
            'θ' => "theta",
            'κ' => "kappa",
            'λ' => "lambda",
            'μ' => "µ",
            'ν' => "nu",
            'π' => "pi",
            'ρ' => "rho",
            'σ' => "sigma",
            'τ' => "tau",
            'φ' => "phi",
            'ω' => "omega",
            'Σ' => "sum ",
            '⁰' | '₀' => "0",
            '₁' => "1",
            '₂' => "2",
            '₃' => "3",
            '⁴' | '₄' => "4",
            '⁵' | '₅' => "5",
            '⁶' | '₆' => "6",
            '⁷' | '₇' => "7",
            '⁸' | '₈' => "8",
            '⁹' | '₉' => "9",
            '⁻' => "-",
            c if c.is_control() => "",
            _ => "?",
        };
        out.push_str(spelled);
    }
    out
}

/// `text` cleaned and broken into lines no wider than `width`; a word wider than the line is
/// broken between characters.
fn wrap(text: &str, style: Style, width: f32) -> Vec<String> {
    let clean = pdf_text(text);
    let mut lines = Vec::new();
    let mut line = String::new();
    for word in clean.split_whitespace() {
        let candidate = if line.is_empty() {
            word.to_string()
        } else {
            format!("{line} {word}")
        };
        if text_width(&candidate, style) <= width {
            line = candidate;
            continue;
        }
        if !line.is_empty() {
            lines.push(std::mem::take(&mut line));
        }
        for c in word.chars() {
            line.push(c);
            if text_width(&line, style) > width && line.chars().count() > 1 {
                line.pop();
                lines.push(std::mem::replace(&mut line, c.to_string()));
            }
        }
    }
    if !line.is_empty() || lines.is_empty() {
        lines.push(line);
    }
    lines
}

// ---------------------------------------------------------------------------------------------
// The sheet: pages of drawing operations, laid out top-down

/// Layout state. Coordinates are points from the page's top-left corner, y down; they are
/// turned into PDF coordinates (y up) only when an operation is emitted.
struct Sheet<'a> {
    doc: &'a Document,
    paper: Paper,
    height: f32,
    left: f32,
    right: f32,
    /// Lowest y the body may reach; the footer lies below it.
    body_bottom: f32,
    /// Where the body starts on the current page, to tell "at the top of a page".
    page_top: f32,
    /// Next free y.
    y: f32,
    footer: Vec<String>,
    ops: Vec<Op>,
    done: Vec<Vec<Op>>,
}

/// Gap between blocks.
const BLOCK_GAP: f32 = 10.0;
/// Baseline of the top line (title or running head and the page number) below the margin.
const FIRST_BASELINE: f32 = 13.0;

impl<'a> Sheet<'a> {
    fn new(doc: &'a Document, paper: Paper) -> Sheet<'a> {
        let (w_mm, h_mm) = paper.size_mm();
        let (width, height) = (w_mm * MM, h_mm * MM);
        let footer = wrap(&doc.footer, FOOT, width - 2.0 * MARGIN);
        // Footer, bottom up: fingerprint line, version line, the deferral, a rule.
        let footer_h = 8.0 + 9.0 + footer.len() as f32 * FOOT.leading() + 6.0;
        Sheet {
            doc,
            paper,
            height,
            left: MARGIN,
            right: width - MARGIN,
            body_bottom: height - MARGIN - footer_h - 8.0,
            page_top: MARGIN,
            y: MARGIN,
            footer,
            ops: Vec::new(),
            done: Vec::new(),
        }
    }

    fn content_width(&self) -> f32 {
        self.right - self.left
    }

    // --- primitives ------------------------------------------------------------------------

    fn point(&self, x: f32, y: f32) -> LinePoint {
        LinePoint {
            p: Point {
                x: Pt(x),
                y: Pt(self.height - y),
            },
            bezier: false,
        }
    }

    /// Already-cleaned text with its baseline at `baseline`.
    fn text(&mut self, x: f32, baseline: f32, style: Style, s: &str) {
        if s.is_empty() {
            return;
        }
        let pos = Point {
            x: Pt(x),
            y: Pt(self.height - baseline),
        };
        self.ops.extend([
            Op::StartTextSection,
            Op::SetFillColor {
                col: colour(style.color),
            },
            Op::SetFont {
                font: PdfFontHandle::Builtin(style.face.builtin()),
                size: Pt(style.size),
            },
            Op::SetTextCursor { pos },
            Op::ShowText {
                items: vec![TextItem::Text(s.to_string())],
            },
            Op::EndTextSection,
        ]);
    }

    fn text_right(&mut self, right: f32, baseline: f32, style: Style, s: &str) {
        self.text(right - text_width(s, style), baseline, style, s);
    }

    /// Wrapped lines whose first line box starts at `top`; returns their height.
    fn lines(&mut self, x: f32, top: f32, style: Style, lines: &[String]) -> f32 {
        for (i, l) in lines.iter().enumerate() {
            let baseline = top + style.size + i as f32 * style.leading();
            self.text(x, baseline, style, l);
        }
        lines.len() as f32 * style.leading()
    }

    fn stroke_style(&mut self, color: Rgb3, thickness: f32, dash: &[f32]) {
        self.ops.extend([
            Op::SetOutlineColor { col: colour(color) },
            Op::SetOutlineThickness { pt: Pt(thickness) },
            Op::SetLineDashPattern {
                dash: LineDashPattern::new(0.0, dash),
            },
        ]);
    }

    fn polyline(&mut self, points: &[(f32, f32)], color: Rgb3, thickness: f32, dash: &[f32]) {
        if points.len() < 2 {
            return;
        }
        self.stroke_style(color, thickness, dash);
        let points = points.iter().map(|&(x, y)| self.point(x, y)).collect();
        self.ops.push(Op::DrawLine {
            line: Line {
                points,
                is_closed: false,
            },
        });
    }

    fn hline(&mut self, x1: f32, x2: f32, y: f32, color: Rgb3, thickness: f32) {
        self.polyline(&[(x1, y), (x2, y)], color, thickness, &[]);
    }

    /// A rectangle with its top-left corner at (x, top), filled and/or outlined.
    fn rect(&mut self, x: f32, top: f32, w: f32, h: f32, fill: Option<Rgb3>, edge: Option<Rgb3>) {
        let mode = match (fill, edge) {
            (Some(_), Some(_)) => PaintMode::FillStroke,
            (Some(_), None) => PaintMode::Fill,
            (None, Some(_)) => PaintMode::Stroke,
            (None, None) => return,
        };
        if let Some(f) = fill {
            self.ops.push(Op::SetFillColor { col: colour(f) });
        }
        if let Some(e) = edge {
            self.stroke_style(e, 0.6, &[]);
        }
        self.ops.push(Op::DrawRectangle {
            rectangle: Rect {
                x: Pt(x),
                y: Pt(self.height - top - h),
                width: Pt(w),
                height: Pt(h),
                mode: Some(mode),
                winding_order: None,
            },
        });
    }

    fn fill_polygon(&mut self, points: &[(f32, f32)], fill: Rgb3) {
        self.ops.push(Op::SetFillColor { col: colour(fill) });
        let points = points.iter().map(|&(x, y)| self.point(x, y)).collect();
        self.ops.push(Op::DrawPolygon {
            polygon: Polygon {
                rings: vec![PolygonRing { points }],
                mode: PaintMode::Fill,
                winding_order: WindingOrder::NonZero,
            },
        });
    }

    // --- pagination ------------------------------------------------------------------------

    fn at_page_top(&self) -> bool {
        self.y <= self.page_top + 0.5
    }

    /// Starts a new page unless a block `h` tall fits below the cursor (or the cursor is
    /// already at the top of a page, where waiting would not help).
    fn ensure(&mut self, h: f32) {
        if self.y + h > self.body_bottom && !self.at_page_top() {
            self.new_page();
        }
    }

    /// Moves down by the gap before a block, unless at the top of a page.
    fn gap(&mut self) {
        if !self.at_page_top() {
            self.y += BLOCK_GAP;
        }
    }

    /// Space for a block `h` tall after the usual gap, on a new page if need be.
    fn place(&mut self, h: f32) {
        self.ensure(BLOCK_GAP + h);
        self.gap();
    }

    fn new_page(&mut self) {
        self.done.push(std::mem::take(&mut self.ops));
        let date = self.doc.date.format("%Y-%m-%d %H:%M %:z").to_string();
        let mut head = self.doc.title.clone();
        if let Some(t) = tag(self.doc) {
            head.push_str(&format!(" · Tag {t}"));
        }
        head.push_str(&format!(" · {date}"));
        let room = self.content_width() - text_width("Page 999 of 999", PAGE_NO) - 12.0;
        let head = wrap(&head, RUNNING_HEAD, room).swap_remove(0);
        self.text(self.left, MARGIN + FIRST_BASELINE, RUNNING_HEAD, &head);
        self.hline(self.left, self.right, MARGIN + 19.0, INK, 0.6);
        self.page_top = MARGIN + 28.0;
        self.y = self.page_top;
    }

    /// Adds every page's page number and footer and turns the pages into PDF pages.
    fn finish(mut self) -> Vec<PdfPage> {
        self.done.push(std::mem::take(&mut self.ops));
        let pages = std::mem::take(&mut self.done);
        let total = pages.len();
        let (w_mm, h_mm) = self.paper.size_mm();
        pages
            .into_iter()
            .enumerate()
            .map(|(i, ops)| {
                self.ops = ops;
                let label = format!("Page {} of {}", i + 1, total);
                self.text_right(self.right, MARGIN + FIRST_BASELINE, PAGE_NO, &label);
                self.page_footer();
                PdfPage::new(Mm(w_mm), Mm(h_mm), std::mem::take(&mut self.ops))
            })
            .collect()
    }

    fn page_footer(&mut self) {
        let doc = self.doc;
        let fp_base = self.height - MARGIN;
        let version_base = fp_base - 8.0;
        let deferral_top = version_base - 9.0 - self.footer.len() as f32 * FOOT.leading();
        self.hline(self.left, self.right, deferral_top - 4.0, BORDER, 0.5);
        let footer = std::mem::take(&mut self.footer);
        self.lines(self.left, deferral_top - 1.5, FOOT, &footer);
        self.footer = footer;
        let fp = &doc.fingerprint;
        let short = match (
            fp.get(..16),
            fp.len().checked_sub(8).and_then(|i| fp.get(i..)),
        ) {
            (Some(head), Some(tail)) if fp.len() > 24 => format!("{head}…{tail}"),
            _ => fp.clone(),
        };
        let version = pdf_text(&format!(
            "pvhazard {} · template {} · fingerprint {short}",
            doc.tool_version, doc.template
        ));
        self.text(self.left, version_base, FOOT.with_color(INK), &version);
        let full = pdf_text(&format!("Input fingerprint (SHA-256): {fp}"));
        self.text(self.left, fp_base, FOOT_FINGERPRINT, &full);
    }

    // --- blocks ----------------------------------------------------------------------------

    /// Page 1's title block: the template title and a two-column grid of the header pairs.
    fn title_block(&mut self) {
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

    /// A section heading with a rule under it, kept with the first `keep_with` points of what
    /// follows.
    fn heading(&mut self, text: &str, keep_with: f32) {
        let h = HEADING.leading() + 5.0;
        self.place(h + keep_with);
        let line = wrap(text, HEADING, self.content_width()).swap_remove(0);
        self.text(self.left, self.y + HEADING.size, HEADING, &line);
        self.hline(
            self.left,
            self.right,
            self.y + HEADING.leading() + 1.0,
            INK,
            0.8,
        );
        self.y += h;
    }

    fn paragraph(&mut self, heading: &str, text: &str) {
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
    fn entries(&mut self, heading: &str, entries: &[Entry], d: &Display) {
        let label_w = (self.content_width() * 0.38).round();
        let value_x = self.left + label_w + 8.0;
        let value_w = self.right - value_x;
        let pad = 3.0;
        let rows: Vec<_> = entries
            .iter()
            .map(|e| {
                let label = wrap(&e.label, BODY, label_w - 4.0);
                let value = wrap(&value_text(&e.value, d), BODY, value_w);
                let method = e
                    .method
                    .map(|m| wrap(m, METHOD, value_w))
                    .unwrap_or_default();
                let value_h =
                    value.len() as f32 * BODY.leading() + method.len() as f32 * METHOD.leading();
                let h = 2.0 * pad + value_h.max(label.len() as f32 * BODY.leading());
                (label, value, method, h)
            })
            .collect();
        let Some(first) = rows.first() else {
            return;
        };
        self.heading(heading, first.3);
        for (label, value, method, h) in &rows {
            self.ensure(*h);
            let top = self.y + pad;
            self.lines(self.left, top, BODY, label);
            let vh = self.lines(value_x, top, BODY, value);
            self.lines(value_x, top + vh - 0.5, METHOD, method);
            self.y += h;
            self.hline(self.left, self.right, self.y, RULE, 0.4);
        }
    }

    fn checklist(&mut self, items: &[String]) {
        let text_x = self.left + 17.0;
        let rows: Vec<_> = items
            .iter()
            .map(|item| wrap(item, BODY, self.right - text_x))
            .collect();
        let row_h = |lines: &[String]| lines.len() as f32 * BODY.leading() + 6.0;
        let Some(first) = rows.first() else {
            return;
        };
        self.heading("Checklist", row_h(first));
        for lines in &rows {
            let h = row_h(lines);
            self.ensure(h);
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
            self.y += h;
        }
    }

    fn signoff(&mut self, roles: &[String]) {
        if roles.is_empty() {
            return;
        }
        let row_h = 34.0;
        let role_w = 92.0;
        let gap = 14.0;
        let fields_w = self.content_width() - role_w - 2.0 * gap;
        let fields = [
            ("Name", 0.36 * fields_w),
            ("Signature", 0.40 * fields_w),
            ("Date", 0.24 * fields_w),
        ];
        // The whole block on one page: signatures split from their heading are easy to miss.
        self.heading("Sign-off", row_h * roles.len() as f32);
        for role in roles {
            self.ensure(row_h);
            let line_y = self.y + 22.0;
            let role = wrap(role, BODY.with_color(INK), role_w - 6.0).swap_remove(0);
            self.text(
                self.left,
                line_y - 2.0,
                Style::new(Face::Bold, 9.0, INK),
                &role,
            );
            let mut x = self.left + role_w;
            for (label, w) in fields {
                self.hline(x, x + w, line_y, INK, 0.6);
                self.text(x, line_y + 8.0, FIELD_LABEL, label);
                x += w + gap;
            }
            self.y += row_h;
        }
    }

    // --- plots -----------------------------------------------------------------------------

    /// A plot in a framed box the width of the page, 70 mm tall. Never split.
    fn plot(&mut self, plot: &Plot, d: &Display) {
        let frame_h = 70.0 * MM;
        self.place(frame_h);
        let top = self.y;
        let (left, right) = (self.left, self.right);
        self.rect(left, top, right - left, frame_h, None, Some(BORDER));
        let pad = 8.0;

        let has_right = plot.right.is_some() && plot.series.iter().any(|s| s.right_axis);
        let on_right = |s: &&Series| has_right && s.right_axis;
        let x_axis = AxisScale::new(
            d,
            &plot.x,
            plot.series
                .iter()
                .flat_map(|s| s.points.iter().map(|p| p.0)),
            &[],
        );
        let left_axis = AxisScale::new(
            d,
            &plot.left,
            plot.series
                .iter()
                .filter(|s| !on_right(s))
                .flat_map(|s| s.points.iter().map(|p| p.1)),
            &plot.limits.iter().map(|l| l.0).collect::<Vec<_>>(),
        );
        let right_axis = plot.right.as_ref().filter(|_| has_right).map(|axis| {
            let mut scale = AxisScale::new(
                d,
                axis,
                plot.series
                    .iter()
                    .filter(on_right)
                    .flat_map(|s| s.points.iter().map(|p| p.1)),
                &[],
            );
            scale.aligned_to(left_axis.intervals());
            scale
        });

        let title = wrap(&plot.title, PLOT_TITLE, right - left - 2.0 * pad).swap_remove(0);
        self.text(left + pad, top + pad + PLOT_TITLE.size, PLOT_TITLE, &title);
        let axis_label_base = top + pad + PLOT_TITLE.size + 14.0;
        self.text(
            left + pad,
            axis_label_base,
            AXIS_LABEL,
            &pdf_text(&left_axis.label),
        );
        if let Some(r) = &right_axis {
            self.text_right(
                right - pad,
                axis_label_base,
                AXIS_LABEL,
                &pdf_text(&r.label),
            );
        }

        // The legend's rows, laid out first because they set the plot's bottom edge.
        let sample_w = 20.0;
        let mut legend: Vec<Vec<(usize, String, f32)>> = vec![Vec::new()];
        let mut row_w = 0.0;
        let legend_room = right - left - 2.0 * pad;
        for (i, s) in plot.series.iter().enumerate() {
            let mut label = s.label.clone();
            if on_right(&s) {
                label.push_str(" (right axis)");
            }
            let label = wrap(&label, LEGEND, legend_room - sample_w - 4.0).swap_remove(0);
            let w = sample_w + 4.0 + text_width(&label, LEGEND) + 14.0;
            if row_w + w > legend_room && row_w > 0.0 {
                legend.push(Vec::new());
                row_w = 0.0;
            }
            if let Some(row) = legend.last_mut() {
                row.push((i, label, row_w));
            }
            row_w += w;
        }
        let legend_h = legend.len() as f32 * 10.0;

        let tick_w = |a: &AxisScale| {
            a.ticks()
                .iter()
                .map(|&v| text_width(&a.tick_label(v), TICK))
                .fold(0.0, f32::max)
        };
        let plot_left = left + pad + tick_w(&left_axis).max(12.0) + 5.0;
        let plot_right = match &right_axis {
            Some(r) => right - pad - tick_w(r).max(12.0) - 5.0,
            None => right - pad - 6.0,
        };
        let plot_top = axis_label_base + 11.0;
        let plot_bottom = top + frame_h - pad - legend_h - 24.0;
        let plot_w = plot_right - plot_left;
        let plot_h = plot_bottom - plot_top;
        let x_axis = x_axis.fitted(plot_w);
        let sx = |v: f64| plot_left + x_axis.frac(v) as f32 * plot_w;
        let sy = |a: &AxisScale, v: f64| plot_bottom - a.frac(v) as f32 * plot_h;

        // Grid and ticks.
        for v in x_axis.ticks() {
            let x = sx(v);
            self.polyline(&[(x, plot_top), (x, plot_bottom)], GRID, 0.4, &[]);
            self.polyline(&[(x, plot_bottom), (x, plot_bottom + 3.0)], INK, 0.6, &[]);
            let label = x_axis.tick_label(v);
            let w = text_width(&label, TICK);
            self.text(x - w / 2.0, plot_bottom + 4.0 + TICK.size, TICK, &label);
        }
        for v in left_axis.ticks() {
            let y = sy(&left_axis, v);
            self.polyline(&[(plot_left, y), (plot_right, y)], GRID, 0.4, &[]);
            self.polyline(&[(plot_left - 3.0, y), (plot_left, y)], INK, 0.6, &[]);
            let label = left_axis.tick_label(v);
            self.text_right(plot_left - 4.5, y + CAP_CENTRE * TICK.size, TICK, &label);
        }
        if let Some(r) = &right_axis {
            for v in r.ticks() {
                let y = sy(r, v);
                self.polyline(&[(plot_right, y), (plot_right + 3.0, y)], INK, 0.6, &[]);
                let label = r.tick_label(v);
                self.text(plot_right + 4.5, y + CAP_CENTRE * TICK.size, TICK, &label);
            }
        }
        let mut axes = vec![(plot_left, plot_top), (plot_left, plot_bottom)];
        axes.push((plot_right, plot_bottom));
        if right_axis.is_some() {
            axes.push((plot_right, plot_top));
        }
        self.polyline(&axes, INK, 0.7, &[]);
        let x_label = pdf_text(&x_axis.label);
        let w = text_width(&x_label, AXIS_LABEL);
        let x_label_base = plot_bottom + 4.0 + TICK.leading() + AXIS_LABEL.size + 2.0;
        self.text(
            plot_left + (plot_w - w) / 2.0,
            x_label_base,
            AXIS_LABEL,
            &x_label,
        );

        // Limit lines, the series over them, then the limits' labels over both.
        let mut limit_labels = Vec::new();
        for (value, label) in &plot.limits {
            let v = d.axis_value(plot.left.kind, left_axis.max_si, *value);
            if !v.is_finite() {
                continue;
            }
            let y = sy(&left_axis, v);
            self.polyline(
                &[(plot_left, y), (plot_right, y)],
                SAFETY_RED,
                0.9,
                &[4.0, 2.5],
            );
            let style = LEGEND.with_color(SAFETY_RED);
            let base = if y - plot_top < 10.0 {
                y + 2.0 + style.size
            } else {
                y - 2.5
            };
            limit_labels.push((base, wrap(label, style, plot_w - 6.0).swap_remove(0)));
        }
        self.ops.push(Op::SetLineJoinStyle {
            join: LineJoinStyle::Round,
        });
        for (i, s) in plot.series.iter().enumerate() {
            let axis = match &right_axis {
                Some(r) if on_right(&s) => r,
                _ => &left_axis,
            };
            let points: Vec<(f32, f32)> = s
                .points
                .iter()
                .map(|&(x, y)| (x_axis.display(x), axis.display(y)))
                .filter(|(x, y)| x.is_finite() && y.is_finite())
                .map(|(x, y)| (sx(x), sy(axis, y)))
                .collect();
            let k = i % SERIES_COLOURS.len();
            self.polyline(&points, SERIES_COLOURS[k], 1.3, SERIES_DASHES[k]);
        }
        self.ops.push(Op::SetLineJoinStyle {
            join: LineJoinStyle::Miter,
        });
        let style = LEGEND.with_color(SAFETY_RED);
        for (base, label) in &limit_labels {
            let w = text_width(label, style);
            let x = plot_right - 3.0 - w;
            let top = base - style.size - 0.5;
            self.rect(x - 2.0, top, w + 4.0, style.size + 2.5, Some(WHITE), None);
            self.text(x, *base, style, label);
        }

        let mut base = x_label_base + 5.0;
        for row in &legend {
            base += 10.0;
            for (i, label, offset) in row {
                let x = plot_left + offset;
                let k = i % SERIES_COLOURS.len();
                let y = base - CAP_CENTRE * LEGEND.size;
                self.polyline(
                    &[(x, y), (x + sample_w, y)],
                    SERIES_COLOURS[k],
                    1.3,
                    SERIES_DASHES[k],
                );
                self.text(x + sample_w + 4.0, base, LEGEND, label);
            }
        }
        self.stroke_style(INK, 0.6, &[]);
        self.y = top + frame_h;
    }
}

// ---------------------------------------------------------------------------------------------
// Plot scales

/// One plot axis: its unit, its conversion and a range on round tick values, in display units.
struct AxisScale<'d> {
    display: &'d Display,
    kind: AxisKind,
    /// The largest SI value on the axis, which picks the unit.
    max_si: f64,
    /// "Pressure (barg)".
    label: String,
    /// The smallest and largest value to show, display units.
    data: (f64, f64),
    /// The rounded range and tick step, display units.
    lo: f64,
    hi: f64,
    step: f64,
}

impl<'d> AxisScale<'d> {
    /// The scale for the SI `values` (and `extra` reference values) on `axis`.
    fn new(
        display: &'d Display,
        axis: &Axis,
        values: impl Iterator<Item = f64>,
        extra: &[f64],
    ) -> AxisScale<'d> {
        let si: Vec<f64> = values.filter(|v| v.is_finite()).collect();
        let max_si = si.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        let max_si = if max_si.is_finite() { max_si } else { 0.0 };
        let shown: Vec<f64> = si
            .iter()
            .chain(extra)
            .map(|&v| display.axis_value(axis.kind, max_si, v))
            .filter(|v| v.is_finite())
            .collect();
        let lo = shown.iter().copied().fold(f64::INFINITY, f64::min);
        let hi = shown.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        let unit = display.axis_unit(axis.kind, max_si);
        let mut scale = AxisScale {
            display,
            kind: axis.kind,
            max_si,
            label: format!("{} ({unit})", axis.label),
            data: (lo, hi),
            lo,
            hi,
            step: 1.0,
        };
        scale.round_to(8);
        scale
    }

    /// The data range to round: opened up when empty, and widened to zero when it starts a
    /// little above it (except for temperatures, whose zero is only a convention).
    fn data_range(&self) -> (f64, f64) {
        let (mut lo, mut hi) = self.data;
        if !(lo.is_finite() && hi.is_finite()) {
            (lo, hi) = (0.0, 1.0);
        }
        if self.kind != AxisKind::Temperature && lo > 0.0 && lo < 0.25 * hi {
            lo = 0.0;
        }
        if hi - lo <= f64::EPSILON * hi.abs().max(1.0) {
            let half = (hi.abs() * 0.1).max(1.0);
            (lo, hi) = (lo - half, hi + half);
        }
        (lo, hi)
    }

    /// Widens the data range to round ticks, about `target` intervals.
    fn round_to(&mut self, target: usize) {
        let (lo, hi) = self.data_range();
        let step = nice_step((hi - lo) / target.max(1) as f64);
        self.step = step;
        self.lo = (lo / step + 1e-9).floor() * step;
        self.hi = (hi / step - 1e-9).ceil() * step;
    }

    /// Rounds to exactly `intervals` intervals, so that the ticks fall on another axis's grid.
    fn aligned_to(&mut self, intervals: usize) {
        let (lo, hi) = self.data_range();
        let n = intervals.max(1) as f64;
        let mut step = nice_step((hi - lo) / n);
        // A floor-rounded start can leave the top uncovered; the next round step covers it.
        for _ in 0..8 {
            let start = (lo / step + 1e-9).floor() * step;
            if start + n * step >= hi - 1e-9 * step {
                break;
            }
            step = nice_step(step * 1.01);
        }
        self.step = step;
        self.lo = (lo / step + 1e-9).floor() * step;
        self.hi = self.lo + n * step;
    }

    fn intervals(&self) -> usize {
        ((self.hi - self.lo) / self.step).round().max(1.0) as usize
    }

    /// The same axis with as many ticks as fit `width` points without their labels touching.
    fn fitted(mut self, width: f32) -> AxisScale<'d> {
        for target in (2..=8).rev() {
            self.round_to(target);
            let widest = self
                .ticks()
                .iter()
                .map(|&v| text_width(&self.tick_label(v), TICK))
                .fold(0.0, f32::max);
            let spacing = width / self.intervals() as f32;
            if spacing >= widest + 10.0 {
                break;
            }
        }
        self
    }

    fn ticks(&self) -> Vec<f64> {
        (0..=self.intervals().min(50))
            .map(|i| self.lo + i as f64 * self.step)
            .collect()
    }

    /// A tick value with the decimals its step needs.
    fn tick_label(&self, v: f64) -> String {
        let decimals = (-self.step.log10().floor()).max(0.0) as usize;
        let s = format!("{v:.decimals$}");
        if s.trim_start_matches(['-', '0', '.']).is_empty() {
            // -0.0 and its kin.
            format!("{:.decimals$}", 0.0)
        } else {
            pdf_text(&s)
        }
    }

    /// An SI value in this axis's unit.
    fn display(&self, si: f64) -> f64 {
        self.display.axis_value(self.kind, self.max_si, si)
    }

    /// Where a display value falls on the axis, 0 at `lo` and 1 at `hi`.
    fn frac(&self, v: f64) -> f64 {
        (v - self.lo) / (self.hi - self.lo)
    }
}

/// The smallest step of 1, 2 or 5 times a power of ten not below `raw`.
fn nice_step(raw: f64) -> f64 {
    let magnitude = 10f64.powf(raw.log10().floor());
    [1.0, 2.0, 5.0, 10.0]
        .into_iter()
        .map(|m| m * magnitude)
        .find(|&s| s >= raw * (1.0 - 1e-9))
        .unwrap_or(10.0 * magnitude)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::caution::deferral;
    use crate::report::{Section, Value};
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
            value,
            method: None,
        }
    }

    fn result(label: &str, value: Value, method: &'static str) -> Entry {
        Entry {
            label: label.to_string(),
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
    fn the_deferral_is_a_banner_and_in_every_footer() {
        let doc = sample();
        let bytes = render_pdf(&doc, Paper::A4).expect("renders");
        let first = flat(&pages_text(&bytes)[0]);
        assert_eq!(first.matches(&flat(&doc.footer)).count(), 2, "{first}");
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

    #[test]
    fn text_is_cleaned_to_winansi_and_wrapped_to_width() {
        assert_eq!(pdf_text("γ−1 ≤ Δp → ρ"), "gamma-1 <= dp -> rho");
        assert_eq!(
            pdf_text("20 °C, 2 m³, ±1 µm, a·b — ok"),
            "20 °C, 2 m³, ±1 µm, a·b — ok"
        );
        let text = "word ".repeat(80);
        let lines = wrap(&text, BODY, 200.0);
        assert!(lines.len() > 3);
        assert!(lines.iter().all(|l| text_width(l, BODY) <= 200.0));
        let long = wrap(&"x".repeat(200), BODY, 100.0);
        assert!(long.iter().all(|l| text_width(l, BODY) <= 100.0));
        // Helvetica's published advance widths: "a" 556, "i" 222, bold "i" 278.
        assert!((text_width("a", BODY) - 5.004).abs() < 0.01);
        assert!((text_width("i", BODY) - 1.998).abs() < 0.01);
        assert!((text_width("i", HEADING) - 2.919).abs() < 0.01);
    }

    #[test]
    fn ticks_are_round_steps_covering_the_data() {
        let d = Display {
            system: UnitSystem::Si,
            ambient: Pressure::new::<pascal>(AMBIENT_PA),
        };
        let axis = Axis {
            label: "Pressure".into(),
            kind: AxisKind::Pressure,
        };
        let s = AxisScale::new(
            &d,
            &axis,
            [bar_g(0.3), bar_g(9.7)]
                .map(|p| p.get::<pascal>())
                .into_iter(),
            &[],
        );
        assert_eq!(s.label, "Pressure (barg)");
        let ticks = s.ticks();
        assert_eq!(ticks.first().copied(), Some(0.0));
        assert!(ticks.last().copied().unwrap_or(0.0) >= 9.7);
        assert!([1.0, 2.0, 5.0].contains(&s.step), "{}", s.step);
        assert_eq!(s.tick_label(-0.0), "0");
    }
}
