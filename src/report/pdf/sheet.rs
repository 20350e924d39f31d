//! The sheet: pages of drawing operations laid out top-down, with the primitives every block
//! draws with, the page breaks, and each page's running head, page number and footer.

use printpdf::{
    Line, LineDashPattern, LinePoint, Op, PaintMode, PdfFontHandle, Point, Polygon, PolygonRing,
    Pt, Rect, TextItem, WindingOrder,
};

use super::style::{
    colour, Rgb3, Style, BORDER, FOOT, FOOT_FINGERPRINT, HEADING, INK, MARGIN, MM, PAGE_NO,
    RUNNING_HEAD,
};
use super::text::{pdf_text, text_width, wrap};
use super::{tag, Paper};
use crate::report::Document;

/// Layout state. Coordinates are points from the page's top-left corner, y down; they are
/// turned into PDF coordinates (y up) only when an operation is emitted.
pub(super) struct Sheet<'a> {
    pub(super) doc: &'a Document,
    pub(super) height: f32,
    pub(super) left: f32,
    pub(super) right: f32,
    /// Lowest y the body may reach; the footer lies below it.
    pub(super) body_bottom: f32,
    /// Where the body starts on the current page, to tell "at the top of a page".
    pub(super) page_top: f32,
    /// Next free y.
    pub(super) y: f32,
    /// The deferral's lines, printed in every footer.
    footer: Vec<String>,
    /// The current page's operations.
    pub(super) ops: Vec<Op>,
    /// The finished pages' operations.
    done: Vec<Vec<Op>>,
}

/// Gap between blocks.
pub(super) const BLOCK_GAP: f32 = 10.0;
/// Baseline of the top line (title or running head and the page number) below the margin.
pub(super) const FIRST_BASELINE: f32 = 13.0;
/// Where the body starts on every page after the first, below the running head.
const CONTINUED_TOP: f32 = MARGIN + 28.0;
/// Height of a section heading with the rule under it.
pub(super) const HEADING_H: f32 = HEADING.size * 1.25 + 5.0;

impl<'a> Sheet<'a> {
    pub(super) fn new(doc: &'a Document, paper: Paper) -> Sheet<'a> {
        let (w_mm, h_mm) = paper.size_mm();
        let (width, height) = (w_mm * MM, h_mm * MM);
        let footer = wrap(&doc.footer, FOOT, width - 2.0 * MARGIN);
        // Footer, bottom up: fingerprint line, version line, the deferral, a rule.
        let footer_h = 8.0 + 9.0 + footer.len() as f32 * FOOT.leading() + 6.0;
        Sheet {
            doc,
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

    pub(super) fn content_width(&self) -> f32 {
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
    pub(super) fn text(&mut self, x: f32, baseline: f32, style: Style, s: &str) {
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

    pub(super) fn text_right(&mut self, right: f32, baseline: f32, style: Style, s: &str) {
        self.text(right - text_width(s, style), baseline, style, s);
    }

    /// Wrapped lines whose first line box starts at `top`; returns their height.
    pub(super) fn lines(&mut self, x: f32, top: f32, style: Style, lines: &[String]) -> f32 {
        for (i, l) in lines.iter().enumerate() {
            let baseline = top + style.size + i as f32 * style.leading();
            self.text(x, baseline, style, l);
        }
        lines.len() as f32 * style.leading()
    }

    pub(super) fn stroke_style(&mut self, color: Rgb3, thickness: f32, dash: &[f32]) {
        self.ops.extend([
            Op::SetOutlineColor { col: colour(color) },
            Op::SetOutlineThickness { pt: Pt(thickness) },
            Op::SetLineDashPattern {
                dash: LineDashPattern::new(0.0, dash),
            },
        ]);
    }

    pub(super) fn polyline(
        &mut self,
        points: &[(f32, f32)],
        color: Rgb3,
        thickness: f32,
        dash: &[f32],
    ) {
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

    pub(super) fn hline(&mut self, x1: f32, x2: f32, y: f32, color: Rgb3, thickness: f32) {
        self.polyline(&[(x1, y), (x2, y)], color, thickness, &[]);
    }

    /// A rectangle with its top-left corner at (x, top), filled and/or outlined.
    pub(super) fn rect(
        &mut self,
        x: f32,
        top: f32,
        w: f32,
        h: f32,
        fill: Option<Rgb3>,
        edge: Option<Rgb3>,
    ) {
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

    pub(super) fn fill_polygon(&mut self, points: &[(f32, f32)], fill: Rgb3) {
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
    pub(super) fn ensure(&mut self, h: f32) {
        if !self.fits(h) && !self.at_page_top() {
            self.new_page();
        }
    }

    /// Whether a block `h` tall fits below the cursor.
    fn fits(&self, h: f32) -> bool {
        self.y + h <= self.body_bottom
    }

    /// The body height of a page after the first: the most any block can have together.
    pub(super) fn page_room(&self) -> f32 {
        self.body_bottom - CONTINUED_TOP
    }

    /// Moves down by the gap before a block, unless at the top of a page.
    pub(super) fn gap(&mut self) {
        if !self.at_page_top() {
            self.y += BLOCK_GAP;
        }
    }

    /// Space for a block `h` tall after the usual gap, on a new page if need be.
    pub(super) fn place(&mut self, h: f32) {
        self.ensure(BLOCK_GAP + h);
        self.gap();
    }

    /// Space for a table row `h` tall. When the table has to continue on a new page,
    /// `repeat` draws its heading again there first, so that the rows are never headless.
    pub(super) fn row(&mut self, h: f32, repeat: impl FnOnce(&mut Self)) {
        if !self.fits(h) && !self.at_page_top() {
            self.new_page();
            repeat(self);
        }
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
        self.page_top = CONTINUED_TOP;
        self.y = self.page_top;
    }

    /// Every page's operations, each with its page number and footer added.
    pub(super) fn finish(mut self) -> Vec<Vec<Op>> {
        self.done.push(std::mem::take(&mut self.ops));
        let pages = std::mem::take(&mut self.done);
        let total = pages.len();
        pages
            .into_iter()
            .enumerate()
            .map(|(i, ops)| {
                self.ops = ops;
                let label = format!("Page {} of {}", i + 1, total);
                self.text_right(self.right, MARGIN + FIRST_BASELINE, PAGE_NO, &label);
                self.page_footer();
                std::mem::take(&mut self.ops)
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

    // --- headings --------------------------------------------------------------------------

    /// A section heading with a rule under it, kept on one page with the first `keep_with`
    /// points of what follows, so that a heading never ends a page.
    pub(super) fn heading(&mut self, text: &str, keep_with: f32) {
        self.place(HEADING_H + keep_with);
        self.heading_line(text);
    }

    /// A heading drawn at the cursor, with no page check: for a table's heading repeated at
    /// the top of a page.
    pub(super) fn heading_line(&mut self, text: &str) {
        let line = wrap(text, HEADING, self.content_width()).swap_remove(0);
        self.text(self.left, self.y + HEADING.size, HEADING, &line);
        self.hline(
            self.left,
            self.right,
            self.y + HEADING.leading() + 1.0,
            INK,
            0.8,
        );
        self.y += HEADING_H;
    }
}
