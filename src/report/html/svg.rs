//! Plots as inline SVG, on the same axes as the PDF's (the shared [`Scales`]): round ticks in
//! the reader's units, limit lines in safety red, series told apart by colour and dash. The
//! legend is HTML under the drawing, so that it wraps on a narrow screen.

use maud::{html, Markup};

use crate::report::axis::{AxisScale, Scales};
use crate::report::colour::{hex, srgb, SAFETY_RED, SERIES, SERIES_DASHES};
use crate::report::Plot;
use crate::units::Display;

/// The drawing's size in its own units; it scales to the page's width.
const WIDTH: f32 = 640.0;
const HEIGHT: f32 = 340.0;
const PAD: f32 = 8.0;
const TICK_SIZE: f32 = 12.0;
/// A tick label's width per character: an estimate for the sans-serif faces browsers use
/// for digits, generous so that labels do not touch.
const CHAR_WIDTH: f32 = 0.62 * TICK_SIZE;
/// Dashes are drawn at this multiple of the PDF's, screen pixels being smaller than points.
const DASH_SCALE: f32 = 1.6;

fn measure(t: &str) -> f32 {
    t.chars().count() as f32 * CHAR_WIDTH
}

fn dash(k: usize) -> String {
    SERIES_DASHES[k]
        .iter()
        .map(|d| format!("{:.1}", d * DASH_SCALE))
        .collect::<Vec<_>>()
        .join(" ")
}

/// A plot as a figure: its title, the drawing and the legend.
pub fn plot_svg(plot: &Plot, d: &Display) -> Markup {
    let Scales {
        x,
        left,
        right,
        on_right,
    } = Scales::new(plot, d);
    let tick_w = |a: &AxisScale| {
        a.ticks()
            .iter()
            .map(|&v| measure(&a.tick_label(v)))
            .fold(0.0, f32::max)
    };
    let plot_left = PAD + tick_w(&left).max(12.0) + 6.0;
    let plot_right = match &right {
        Some(r) => WIDTH - PAD - tick_w(r).max(12.0) - 6.0,
        None => WIDTH - PAD - 10.0,
    };
    let plot_top = 30.0;
    let plot_bottom = HEIGHT - 44.0;
    let (plot_w, plot_h) = (plot_right - plot_left, plot_bottom - plot_top);
    let x = x.fitted(plot_w, measure);
    let sx = |v: f64| plot_left + x.frac(v) as f32 * plot_w;
    let sy = |a: &AxisScale, v: f64| plot_bottom - a.frac(v) as f32 * plot_h;
    let n = |v: f32| format!("{v:.1}");
    let red = hex(SAFETY_RED);
    let limits: Vec<(f32, &str)> = plot
        .limits
        .iter()
        .map(|(si, label)| (d.axis_value(plot.left.kind, left.max_si, *si), label))
        .filter(|(v, _)| v.is_finite())
        .map(|(v, label)| (sy(&left, v), label.as_str()))
        .collect();
    let lines: Vec<(usize, String)> = plot
        .series
        .iter()
        .enumerate()
        .map(|(i, s)| {
            let axis = match &right {
                Some(r) if on_right(s) => r,
                _ => &left,
            };
            let points = s
                .points
                .iter()
                .map(|&(px, py)| (x.display(px), axis.display(py)))
                .filter(|(px, py)| px.is_finite() && py.is_finite())
                .map(|(px, py)| format!("{},{}", n(sx(px)), n(sy(axis, py))))
                .collect::<Vec<_>>()
                .join(" ");
            (i % SERIES.len(), points)
        })
        .collect();
    html! {
        figure.plot {
            figcaption { (plot.title) }
            svg xmlns="http://www.w3.org/2000/svg" viewBox={ "0 0 " (WIDTH) " " (HEIGHT) } role="img" aria-label=(plot.title) font-family="system-ui, sans-serif" {
                title { (plot.title) }
                text x=(n(PAD)) y="16" font-size="13" fill="#111" { (left.label) }
                @if let Some(r) = &right {
                    text x=(n(WIDTH - PAD)) y="16" font-size="13" text-anchor="end" fill="#111" { (r.label) }
                }
                @for v in x.ticks() {
                    line x1=(n(sx(v))) x2=(n(sx(v))) y1=(n(plot_top)) y2=(n(plot_bottom + 4.0)) stroke="#d9d9d9" {}
                    text x=(n(sx(v))) y=(n(plot_bottom + 18.0)) font-size=(TICK_SIZE) text-anchor="middle" fill="#111" { (x.tick_label(v)) }
                }
                @for v in left.ticks() {
                    line x1=(n(plot_left - 4.0)) x2=(n(plot_right)) y1=(n(sy(&left, v))) y2=(n(sy(&left, v))) stroke="#d9d9d9" {}
                    text x=(n(plot_left - 6.0)) y=(n(sy(&left, v) + 4.0)) font-size=(TICK_SIZE) text-anchor="end" fill="#111" { (left.tick_label(v)) }
                }
                @if let Some(r) = &right {
                    @for v in r.ticks() {
                        text x=(n(plot_right + 6.0)) y=(n(sy(r, v) + 4.0)) font-size=(TICK_SIZE) fill="#111" { (r.tick_label(v)) }
                    }
                }
                polyline fill="none" stroke="#111" stroke-width="1" points={
                    (n(plot_left)) "," (n(plot_top)) " " (n(plot_left)) "," (n(plot_bottom)) " " (n(plot_right)) "," (n(plot_bottom))
                    @if right.is_some() { " " (n(plot_right)) "," (n(plot_top)) }
                } {}
                text x=(n(plot_left + plot_w / 2.0)) y=(n(HEIGHT - 6.0)) font-size="13" text-anchor="middle" fill="#111" { (x.label) }
                @for (y, _) in &limits {
                    line x1=(n(plot_left)) x2=(n(plot_right)) y1=(n(*y)) y2=(n(*y)) stroke=(red) stroke-width="1.5" stroke-dasharray="6 4" {}
                }
                @for (k, points) in &lines {
                    polyline fill="none" stroke=(hex(srgb(SERIES[*k]))) stroke-width="2" stroke-linejoin="round" stroke-dasharray=(dash(*k)) points=(points) {}
                }
                @for (y, label) in &limits {
                    @let base = if *y - plot_top < 14.0 { *y + 14.0 } else { *y - 4.0 };
                    text x=(n(plot_right - 4.0)) y=(n(base)) font-size="12" text-anchor="end" fill=(red) stroke="#fff" stroke-width="3" paint-order="stroke" { (label) }
                }
            }
            ul.legend {
                @for (i, s) in plot.series.iter().enumerate() {
                    @let k = i % SERIES.len();
                    li {
                        svg width="36" height="10" aria-hidden="true" {
                            line x1="0" x2="36" y1="5" y2="5" stroke=(hex(srgb(SERIES[k]))) stroke-width="2" stroke-dasharray=(dash(k)) {}
                        }
                        " " (s.label)
                        @if on_right(s) { " (right axis)" }
                    }
                }
            }
        }
    }
}
