//! Type and colour: the page geometry, the safety colours and the text styles every block
//! draws with.

use printpdf::{BuiltinFont, Color, Rgb};

use crate::assess::Decision;
use crate::caution::Level;
use crate::report::colour;

pub(super) const MM: f32 = 72.0 / 25.4;
pub(super) const MARGIN: f32 = 15.0 * MM;

pub(super) type Rgb3 = (f32, f32, f32);

pub(super) const INK: Rgb3 = (0.0, 0.0, 0.0);
pub(super) const GREY: Rgb3 = (0.38, 0.38, 0.38);
pub(super) const RULE: Rgb3 = (0.78, 0.78, 0.78);
pub(super) const BORDER: Rgb3 = (0.45, 0.45, 0.45);
pub(super) const GRID: Rgb3 = (0.88, 0.88, 0.88);
pub(super) const MESSAGE_BG: Rgb3 = (0.965, 0.965, 0.965);
pub(super) const HEAD_BG: Rgb3 = (0.90, 0.90, 0.90);
pub(super) const WHITE: Rgb3 = (1.0, 1.0, 1.0);

/// The safety red of limit lines on plots.
pub(super) const SAFETY_RED: Rgb3 = rgb(colour::SAFETY_RED);

const fn rgb((r, g, b): colour::Srgb) -> Rgb3 {
    (r as f32 / 255.0, g as f32 / 255.0, b as f32 / 255.0)
}

/// Panel colour and text colour for a signal word.
pub(super) fn signal_colours(level: Level) -> (Rgb3, Rgb3) {
    let (panel, ink) = colour::signal(level);
    (rgb(panel), rgb(ink))
}

/// Band colour and text colour for a decision (the same on every renderer).
pub(super) fn decision_colours(decision: Decision) -> (Rgb3, Rgb3) {
    let (band, ink) = colour::decision(decision);
    (rgb(band), rgb(ink))
}

/// Series colours and dash patterns: distinct in colour and, for monochrome copies, in dash.
pub(super) const SERIES_COLOURS: [Rgb3; 4] = colour::SERIES;
pub(super) const SERIES_DASHES: [&[f32]; 4] = colour::SERIES_DASHES;

pub(super) fn colour((r, g, b): Rgb3) -> Color {
    Color::Rgb(Rgb {
        r,
        g,
        b,
        icc_profile: None,
    })
}

/// The two weights of Helvetica the worksheet uses.
#[derive(Clone, Copy, PartialEq, Eq, Debug)]
pub(super) enum Face {
    Regular,
    Bold,
}

impl Face {
    pub(super) fn builtin(self) -> BuiltinFont {
        match self {
            Face::Regular => BuiltinFont::Helvetica,
            Face::Bold => BuiltinFont::HelveticaBold,
        }
    }
}

/// A face, a size in points and a colour.
#[derive(Clone, Copy, Debug)]
pub(super) struct Style {
    pub(super) face: Face,
    pub(super) size: f32,
    pub(super) color: Rgb3,
}

impl Style {
    const fn new(face: Face, size: f32, color: Rgb3) -> Style {
        Style { face, size, color }
    }

    /// Baseline-to-baseline distance.
    pub(super) fn leading(self) -> f32 {
        self.size * 1.25
    }

    pub(super) fn with_color(self, color: Rgb3) -> Style {
        Style { color, ..self }
    }
}

pub(super) const TITLE: Style = Style::new(Face::Bold, 15.0, INK);
pub(super) const RUNNING_HEAD: Style = Style::new(Face::Bold, 9.0, INK);
pub(super) const PAGE_NO: Style = Style::new(Face::Regular, 8.0, INK);
pub(super) const HEADING: Style = Style::new(Face::Bold, 10.5, INK);
pub(super) const BODY: Style = Style::new(Face::Regular, 9.0, INK);
pub(super) const ROLE: Style = Style::new(Face::Bold, 9.0, INK);
pub(super) const FIELD_LABEL: Style = Style::new(Face::Regular, 6.5, GREY);
pub(super) const FIELD_VALUE: Style = Style::new(Face::Regular, 9.5, INK);
pub(super) const METHOD: Style = Style::new(Face::Regular, 7.0, GREY);
pub(super) const TOPIC: Style = Style::new(Face::Bold, 7.5, INK);
pub(super) const SIGNAL: Style = Style::new(Face::Bold, 10.5, INK);
pub(super) const MESSAGE: Style = Style::new(Face::Regular, 8.5, INK);
pub(super) const DECISION: Style = Style::new(Face::Bold, 22.0, INK);
pub(super) const CELL: Style = Style::new(Face::Regular, 8.0, INK);
pub(super) const CELL_BOLD: Style = Style::new(Face::Bold, 8.0, INK);
pub(super) const CELL_HEAD: Style = Style::new(Face::Bold, 7.5, INK);
pub(super) const PLOT_TITLE: Style = Style::new(Face::Bold, 9.5, INK);
pub(super) const AXIS_LABEL: Style = Style::new(Face::Regular, 7.5, INK);
pub(super) const TICK: Style = Style::new(Face::Regular, 7.0, INK);
pub(super) const LEGEND: Style = Style::new(Face::Regular, 7.0, INK);
pub(super) const FOOT: Style = Style::new(Face::Regular, 6.5, GREY);
pub(super) const FOOT_FINGERPRINT: Style = Style::new(Face::Regular, 6.0, GREY);

/// Caps sit between the baseline and 0.72 em above it (Helvetica's cap height): half of that
/// centres a line of capitals on a point.
pub(super) const CAP_CENTRE: f32 = 0.36;
