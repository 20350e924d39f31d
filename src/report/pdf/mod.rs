//! The PDF renderer: lays a [`Document`] out as a printed worksheet a crew signs and attaches
//! to the work order. Every quantity is formatted by [`value_text`](super::value_text) and
//! every plot value is converted by [`Display::axis_value`]; this module only measures,
//! wraps and places text and lines. It uses the PDF built-in Helvetica, so the file embeds
//! no font and all text stays real, selectable text.
//!
//! Page 1 leads with the decision and its findings, then the banners; the inputs, results,
//! plots, basis, checklist and sign-off follow. The page flow keeps every heading with its
//! first rows, repeats a table's heading on each page it continues onto, and keeps the
//! sign-off on the page of the checklist's last items.

mod blocks;
mod plot;
mod sheet;
mod style;
#[cfg(test)]
mod tests;
mod text;

use printpdf::{Mm, Op, PdfDocument, PdfPage, PdfParseErrorSeverity, PdfSaveOptions};

use super::Document;
use crate::caution::deferral;
use crate::units::Display;
use sheet::Sheet;

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
    let (w_mm, h_mm) = paper.size_mm();
    let pages = layout(doc, paper)
        .into_iter()
        .map(|ops| PdfPage::new(Mm(w_mm), Mm(h_mm), ops))
        .collect();
    save(doc, pages)
}

/// The worksheet laid out: each page's drawing operations, in reading order.
fn layout(doc: &Document, paper: Paper) -> Vec<Vec<Op>> {
    let display = Display {
        system: doc.units,
        ambient: doc.ambient,
    };
    let mut sheet = Sheet::new(doc, paper);
    sheet.title_block();
    sheet.verdict(&doc.verdict, &display);
    // The deferral is in every page's footer; a banner would only repeat it.
    let last = deferral();
    let banners: Vec<_> = doc.cautions.iter().filter(|c| **c != last).collect();
    sheet.banners(&banners, &display);
    sheet.paragraph("Purpose", &doc.purpose);
    sheet.entries("Inputs", &doc.inputs, &display);
    for s in &doc.sections {
        sheet.entries(&s.heading, &s.entries, &display);
    }
    for p in &doc.plots {
        sheet.plot(p, &display);
    }
    sheet.basis(&doc.basis, &display);
    sheet.checklist_and_signoff(&doc.checklist, &doc.signoff);
    sheet.finish()
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
