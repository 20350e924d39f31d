//! Text for the built-in fonts: the WinAnsi repertoire, advance widths and wrapping.

use std::sync::OnceLock;

use printpdf::BuiltinFont;

use super::style::{Face, Style};

/// Advance widths in thousandths of an em, from the glyph tables printpdf ships for the
/// built-in faces (the same metrics a viewer uses for Helvetica).
struct Metrics {
    /// Widths by code point, up to [`DENSE`]; missing glyphs as NaN. Every character
    /// WinAnsi can show lies below it, and a table look-up keeps text measuring cheap.
    widths: Vec<f32>,
}

/// The first code point past the width table: the WinAnsi characters end at U+2122 (™).
const DENSE: usize = 0x2200;

impl Metrics {
    fn load(font: BuiltinFont) -> Metrics {
        let mut widths = vec![f32::NAN; DENSE];
        if let Some(parsed) = font.get_parsed_font() {
            let per_em = f32::from(parsed.units_per_em.max(1));
            for (&cp, &gid) in &parsed.codepoint_to_glyph {
                if let (Some(slot), Some(w)) =
                    (widths.get_mut(cp as usize), parsed.get_glyph_width(gid))
                {
                    *slot = f32::from(w) * 1000.0 / per_em;
                }
            }
        }
        // The shipped tables omit the space glyphs; Helvetica's space is 278 in both weights.
        widths[' ' as usize] = 278.0;
        widths[0xa0] = 278.0;
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
pub(super) fn text_width(s: &str, style: Style) -> f32 {
    let m = Metrics::of(style.face);
    s.chars()
        .map(|c| {
            m.widths
                .get(c as usize)
                .copied()
                .filter(|w| !w.is_nan())
                .unwrap_or(556.0)
        })
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
pub(super) fn pdf_text(s: &str) -> String {
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

/// `text` cleaned and broken into lines no wider than `width`; a number stays on the line of
/// the unit after it, and a word wider than the line is broken between characters.
pub(super) fn wrap(text: &str, style: Style, width: f32) -> Vec<String> {
    let clean = pdf_text(text);
    let mut lines = Vec::new();
    let mut line = String::new();
    for word in unbroken(&clean) {
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

/// The words of `text`, each number joined to a short word after it ("330.34 K)", "54.4 °F"),
/// so that a reading is never split from its unit across lines.
fn unbroken(text: &str) -> Vec<String> {
    let mut words: Vec<String> = Vec::new();
    for word in text.split_whitespace() {
        let unit = word.chars().count() <= 8 && !word.starts_with(|c: char| c.is_ascii_digit());
        match words.last_mut() {
            Some(last) if unit && last.ends_with(|c: char| c.is_ascii_digit()) => {
                last.push(' ');
                last.push_str(word);
            }
            _ => words.push(word.to_string()),
        }
    }
    words
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::pdf::style::{BODY, HEADING};

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
        // A reading keeps its unit: the break falls before the number, not after it.
        let reading = "134.9 °F (57.2 °C, 330.34 K)";
        let narrow = text_width("134.9 °F (57.2 °C, 330.34", BODY) + 1.0;
        assert_eq!(
            wrap(reading, BODY, narrow),
            ["134.9 °F (57.2 °C,", "330.34 K)"]
        );
    }
}
