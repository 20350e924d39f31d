//! A plot's axes, independent of the page they are drawn on: the unit each shows, its
//! round tick values and where a value falls, shared by the PDF and the SVG plots.

use super::{Axis, AxisKind, Plot, Series};
use crate::units::Display;

/// The axes of one plot: x, the left y axis and the right one where a series is read on it.
pub(crate) struct Scales<'d> {
    /// The horizontal axis, not yet fitted to a width.
    pub(crate) x: AxisScale<'d>,
    /// The left vertical axis.
    pub(crate) left: AxisScale<'d>,
    /// The right vertical axis, its ticks on the left axis's grid.
    pub(crate) right: Option<AxisScale<'d>>,
    /// Whether a series is read on the right axis.
    pub(crate) on_right: fn(&Series) -> bool,
}

impl<'d> Scales<'d> {
    /// The axes for `plot` in `d`'s units.
    pub(crate) fn new(plot: &Plot, d: &'d Display) -> Scales<'d> {
        let has_right = plot.right.is_some() && plot.series.iter().any(|s| s.right_axis);
        let on_right: fn(&Series) -> bool = if has_right {
            |s| s.right_axis
        } else {
            |_| false
        };
        let x = AxisScale::new(
            d,
            &plot.x,
            plot.series
                .iter()
                .flat_map(|s| s.points.iter().map(|p| p.0)),
            &[],
        );
        let left = AxisScale::new(
            d,
            &plot.left,
            plot.series
                .iter()
                .filter(|s| !on_right(s))
                .flat_map(|s| s.points.iter().map(|p| p.1)),
            &plot.limits.iter().map(|l| l.0).collect::<Vec<_>>(),
        );
        let right = plot.right.as_ref().filter(|_| has_right).map(|axis| {
            let mut scale = AxisScale::new(
                d,
                axis,
                plot.series
                    .iter()
                    .filter(|s| on_right(s))
                    .flat_map(|s| s.points.iter().map(|p| p.1)),
                &[],
            );
            scale.aligned_to(left.intervals());
            scale
        });
        Scales {
            x,
            left,
            right,
            on_right,
        }
    }
}

/// One plot axis: its unit, its conversion and a range on round tick values, in display units.
pub(crate) struct AxisScale<'d> {
    display: &'d Display,
    kind: AxisKind,
    /// The largest SI value on the axis, which picks the unit.
    pub(crate) max_si: f64,
    /// "Pressure (barg)".
    pub(crate) label: String,
    /// The smallest and largest value to show, display units.
    data: (f64, f64),
    /// The rounded range and tick step, display units.
    lo: f64,
    hi: f64,
    step: f64,
}

impl<'d> AxisScale<'d> {
    /// The scale for the SI `values` (and `extra` reference values) on `axis`.
    pub(crate) fn new(
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
    pub(crate) fn aligned_to(&mut self, intervals: usize) {
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

    pub(crate) fn intervals(&self) -> usize {
        ((self.hi - self.lo) / self.step).round().max(1.0) as usize
    }

    /// The same axis with as many ticks as fit `width` without their labels touching, a
    /// label `t` being `measure(t)` wide (in the units of `width`).
    pub(crate) fn fitted(mut self, width: f32, measure: impl Fn(&str) -> f32) -> AxisScale<'d> {
        for target in (2..=8).rev() {
            self.round_to(target);
            let widest = self
                .ticks()
                .iter()
                .map(|&v| measure(&self.tick_label(v)))
                .fold(0.0, f32::max);
            let spacing = width / self.intervals() as f32;
            if spacing >= widest + 10.0 {
                break;
            }
        }
        self
    }

    pub(crate) fn ticks(&self) -> Vec<f64> {
        (0..=self.intervals().min(50))
            .map(|i| self.lo + i as f64 * self.step)
            .collect()
    }

    /// A tick value with the decimals its step needs.
    pub(crate) fn tick_label(&self, v: f64) -> String {
        let decimals = (-self.step.log10().floor()).max(0.0) as usize;
        let s = format!("{v:.decimals$}");
        if s.trim_start_matches(['-', '0', '.']).is_empty() {
            // -0.0 and its kin.
            format!("{:.decimals$}", 0.0)
        } else {
            s
        }
    }

    /// An SI value in this axis's unit.
    pub(crate) fn display(&self, si: f64) -> f64 {
        self.display.axis_value(self.kind, self.max_si, si)
    }

    /// Where a display value falls on the axis, 0 at `lo` and 1 at `hi`.
    pub(crate) fn frac(&self, v: f64) -> f64 {
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
