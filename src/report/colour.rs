//! The safety colours (ANSI Z535 / ISO 3864) and the plot series colours, in 8-bit sRGB,
//! shared by every renderer that draws in colour, so that a signal word or a decision looks
//! the same on paper and on screen.

use crate::assess::Decision;
use crate::caution::Level;

/// An 8-bit sRGB colour.
pub(crate) type Srgb = (u8, u8, u8);

pub(crate) const BLACK: Srgb = (0, 0, 0);
pub(crate) const WHITE: Srgb = (255, 255, 255);
pub(crate) const SAFETY_RED: Srgb = (200, 16, 46);
const SAFETY_ORANGE: Srgb = (255, 121, 0);
const SAFETY_YELLOW: Srgb = (255, 205, 0);
const SAFETY_GREEN: Srgb = (0, 135, 81);
const SAFETY_BLUE: Srgb = (0, 75, 135);

/// Panel colour and text colour for a signal word.
pub(crate) fn signal(level: Level) -> (Srgb, Srgb) {
    match level {
        Level::Danger => (SAFETY_RED, WHITE),
        Level::Warning => (SAFETY_ORANGE, BLACK),
        Level::Caution => (SAFETY_YELLOW, BLACK),
        Level::Notice => (SAFETY_BLUE, WHITE),
    }
}

/// Band colour and text colour for a decision. The colour follows the decision alone, never
/// the signal words behind it, so that a decision always looks the same; the banners under
/// it carry each hazard's level.
pub(crate) fn decision(decision: Decision) -> (Srgb, Srgb) {
    match decision {
        Decision::NoGo => (SAFETY_RED, WHITE),
        Decision::GoWithActions => (SAFETY_YELLOW, BLACK),
        Decision::Go => (SAFETY_GREEN, WHITE),
    }
}

/// Series colours as fractions of full intensity: distinct in colour and, with the dashes,
/// in a monochrome copy.
pub(crate) const SERIES: [(f32, f32, f32); 4] = [
    (0.0, 0.27, 0.55),
    (0.80, 0.33, 0.0),
    (0.0, 0.48, 0.30),
    (0.35, 0.35, 0.35),
];

/// A colour given as fractions, in 8 bits.
pub(crate) fn srgb((r, g, b): (f32, f32, f32)) -> Srgb {
    let byte = |c: f32| (c.clamp(0.0, 1.0) * 255.0).round() as u8;
    (byte(r), byte(g), byte(b))
}

/// Series dash patterns (on, off, ... in points), matched to [`SERIES`] by position.
pub(crate) const SERIES_DASHES: [&[f32]; 4] =
    [&[], &[5.0, 2.5], &[1.5, 1.5], &[6.0, 2.0, 1.5, 2.0]];

/// A colour as CSS writes it, `#rrggbb`.
pub(crate) fn hex((r, g, b): Srgb) -> String {
    format!("#{r:02x}{g:02x}{b:02x}")
}

#[cfg(test)]
mod tests {
    use super::*;

    /// WCAG 2.1 relative luminance.
    fn luminance((r, g, b): Srgb) -> f64 {
        let lin = |c: u8| {
            let c = f64::from(c) / 255.0;
            if c <= 0.03928 {
                c / 12.92
            } else {
                ((c + 0.055) / 1.055).powf(2.4)
            }
        };
        0.2126 * lin(r) + 0.7152 * lin(g) + 0.0722 * lin(b)
    }

    fn contrast(a: Srgb, b: Srgb) -> f64 {
        let (la, lb) = (luminance(a), luminance(b));
        (la.max(lb) + 0.05) / (la.min(lb) + 0.05)
    }

    #[test]
    fn every_signal_and_decision_pair_meets_wcag_aa_for_normal_text() {
        // WCAG 2.1 success criterion 1.4.3: at least 4.5:1.
        let pairs = [Level::Danger, Level::Warning, Level::Caution, Level::Notice]
            .map(signal)
            .into_iter()
            .chain([Decision::NoGo, Decision::GoWithActions, Decision::Go].map(decision));
        for (panel, ink) in pairs {
            assert!(contrast(panel, ink) >= 4.5, "{panel:?} on {ink:?}");
        }
        for s in SERIES.map(srgb) {
            // Lines on white: 3:1 for graphical objects (criterion 1.4.11).
            assert!(contrast(s, WHITE) >= 3.0, "{s:?}");
        }
        assert!(contrast(SAFETY_RED, WHITE) >= 4.5);
    }
}
