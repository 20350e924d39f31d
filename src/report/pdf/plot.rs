//! Plots: a framed line plot with one x axis, one or two y axes, limit lines and a legend
//! that shows each series' colour and dash. Values are converted for display by
//! [`Display::axis_value`]; nothing here computes them.

use printpdf::{LineJoinStyle, Op};

use super::sheet::Sheet;
use super::style::{
    AXIS_LABEL, BORDER, CAP_CENTRE, GRID, INK, LEGEND, MM, PLOT_TITLE, SAFETY_RED, SERIES_COLOURS,
    SERIES_DASHES, TICK, WHITE,
};
use super::text::{pdf_text, text_width, wrap};
use crate::report::axis::{AxisScale, Scales};
use crate::report::{Plot, Series};
use crate::units::Display;

impl Sheet<'_> {
    /// A plot in a framed box the width of the page, 70 mm tall. Never split.
    pub(super) fn plot(&mut self, plot: &Plot, d: &Display) {
        let frame_h = 70.0 * MM;
        self.place(frame_h);
        let top = self.y;
        let (left, right) = (self.left, self.right);
        self.rect(left, top, right - left, frame_h, None, Some(BORDER));
        let pad = 8.0;

        let Scales {
            x: x_axis,
            left: left_axis,
            right: right_axis,
            on_right,
        } = Scales::new(plot, d);
        let on_right = |s: &&Series| on_right(s);
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
                .map(|&v| text_width(&pdf_text(&a.tick_label(v)), TICK))
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
        let x_axis = x_axis.fitted(plot_w, |t| text_width(&pdf_text(t), TICK));
        let sx = |v: f64| plot_left + x_axis.frac(v) as f32 * plot_w;
        let sy = |a: &AxisScale, v: f64| plot_bottom - a.frac(v) as f32 * plot_h;

        // Grid and ticks.
        for v in x_axis.ticks() {
            let x = sx(v);
            self.polyline(&[(x, plot_top), (x, plot_bottom)], GRID, 0.4, &[]);
            self.polyline(&[(x, plot_bottom), (x, plot_bottom + 3.0)], INK, 0.6, &[]);
            let label = pdf_text(&x_axis.tick_label(v));
            let w = text_width(&label, TICK);
            self.text(x - w / 2.0, plot_bottom + 4.0 + TICK.size, TICK, &label);
        }
        for v in left_axis.ticks() {
            let y = sy(&left_axis, v);
            self.polyline(&[(plot_left, y), (plot_right, y)], GRID, 0.4, &[]);
            self.polyline(&[(plot_left - 3.0, y), (plot_left, y)], INK, 0.6, &[]);
            let label = pdf_text(&left_axis.tick_label(v));
            self.text_right(plot_left - 4.5, y + CAP_CENTRE * TICK.size, TICK, &label);
        }
        if let Some(r) = &right_axis {
            for v in r.ticks() {
                let y = sy(r, v);
                self.polyline(&[(plot_right, y), (plot_right + 3.0, y)], INK, 0.6, &[]);
                let label = pdf_text(&r.tick_label(v));
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
