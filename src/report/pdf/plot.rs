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
use crate::report::{Axis, AxisKind, Plot, Series};
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
    use crate::units::UnitSystem;
    use uom::si::f64::Pressure;
    use uom::si::pressure::pascal;

    const AMBIENT_PA: f64 = 101_325.0;

    fn bar_g(x: f64) -> Pressure {
        Pressure::new::<pascal>(x * 1e5 + AMBIENT_PA)
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
