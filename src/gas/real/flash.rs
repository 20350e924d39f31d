//! Equilibrium states from pairs of variables: the stable phase or the two-phase mixture.
//!
//! A Helmholtz equation is explicit in (ρ, T); every other pair is solved for. At a fixed
//! density the equilibrium u, s and p all rise with temperature, in one phase and across the
//! two-phase region alike, so each (ρ, ·) pair has one root in T, which Newton's method finds
//! inside a bracket. Pairs at a fixed pressure go through the saturation state first.

use super::helmholtz::{Equation, Isotherm};
use super::props::Props;
use super::saturation::Saturation;

/// An equilibrium state: one phase, or liquid and vapour together.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Equilibrium {
    /// Mass density (of the mixture, when two-phase), kg/m³.
    pub rho: f64,
    /// Temperature, K.
    pub t: f64,
    /// Pressure, Pa.
    pub p: f64,
    /// Specific internal energy, J/kg.
    pub u: f64,
    /// Specific enthalpy, J/kg.
    pub h: f64,
    /// Specific entropy, J/(kg·K).
    pub s: f64,
    /// Vapour mass fraction when two-phase; `None` in one phase.
    pub quality: Option<f64>,
    /// The single-phase properties, when in one phase.
    pub single: Option<Props>,
}

impl Equilibrium {
    fn single(p: Props) -> Equilibrium {
        Equilibrium {
            rho: p.rho,
            t: p.t,
            p: p.p,
            u: p.u,
            h: p.h,
            s: p.s,
            quality: None,
            single: Some(p),
        }
    }

    /// The mixture of `sat`'s liquid and vapour with vapour mass fraction `x`.
    pub(super) fn mixture(sat: &Saturation, x: f64) -> Equilibrium {
        let (l, v) = (&sat.liquid, &sat.vapour);
        let mix = |a: f64, b: f64| a + x * (b - a);
        Equilibrium {
            rho: 1.0 / mix(1.0 / l.rho, 1.0 / v.rho),
            t: sat.t,
            p: sat.p,
            u: mix(l.u, v.u),
            h: mix(l.h, v.h),
            s: mix(l.s, v.s),
            quality: Some(x),
            single: None,
        }
    }
}

/// Why a state could not be found.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum FlashError {
    /// The state would lie below the triple-point temperature.
    BelowTriplePoint,
    /// Outside the temperature or pressure range of the equation.
    OutOfRange,
    /// The solver did not converge (a bug or a state at the edge of the equation).
    NoConvergence,
}

/// Relative tolerance of every solve: well below the 1e-6 the reference tables demand.
const RTOL: f64 = 1e-12;

/// A density step at most this fraction of the one before (itself under 1 %) counts as
/// quadratic convergence, whose rate then predicts the next error; at a critical point,
/// where Newton slows to a steady factor of about 2/3, it never holds.
const QUADRATIC: f64 = 0.1;

/// A Newton step in temperature this small (relative) ends the plain Newton iteration; the
/// temperature returned is then that close to the root, below the quadrature's 1e-10.
const NEWTON_SETTLED: f64 = 1e-11;

impl Equation {
    /// The highest pressure accepted: the equation's stated limit, give or take rounding.
    fn p_limit(&self) -> f64 {
        self.fluid.p_max * (1.0 + 1e-9)
    }

    /// Lowest and highest temperatures accepted: the triple point, or below it the
    /// sublimation curve's floor for a gas that can stay a gas there ([`Equation::solid`]
    /// says where it cannot).
    fn t_range(&self) -> (f64, f64) {
        let lo = self
            .sublimation
            .map_or(self.fluid.t_triple, |s| s.t_floor.min(self.fluid.t_triple));
        (lo, self.fluid.t_max)
    }

    /// Whether a state at (p, T) found on the gas branch would be solid: below the triple
    /// point, above the sublimation pressure (or with no sublimation curve at all).
    fn solid(&self, p: f64, t: f64) -> bool {
        t < self.fluid.t_triple && !self.sublimation.is_some_and(|s| s.gas_at(p, t))
    }

    /// The gas at density `rho` and temperature `t` below the triple point: one phase where
    /// it is a dilute gas under the sublimation pressure (on the branch where p rises with ρ,
    /// below the critical density), solid otherwise.
    fn below_triple(&self, rho: f64, t: f64) -> Result<Props, FlashError> {
        let p = self.props(rho, t);
        let dilute = p.dp_drho > 0.0 && rho < self.fluid.rho_critical * self.fluid.molar_mass;
        if dilute && !self.solid(p.p, t) {
            Ok(p)
        } else {
            Err(FlashError::BelowTriplePoint)
        }
    }

    /// Which phase is stable at (p, T), with the saturation state when T is subcritical.
    fn saturation_below_critical(&self, t: f64) -> Option<Saturation> {
        (t < self.fluid.t_critical)
            .then(|| self.saturation_t(t))
            .flatten()
    }

    /// The stable state at pressure `p` and temperature `t` (gas, liquid or supercritical;
    /// at exactly the saturation pressure, the vapour).
    pub fn at_pt(&self, p: f64, t: f64) -> Result<Props, FlashError> {
        let (t_lo, t_hi) = self.t_range();
        if t < t_lo || self.solid(p, t) {
            return Err(FlashError::BelowTriplePoint);
        }
        if !(t <= t_hi && p > 0.0 && p <= self.p_limit()) {
            return Err(FlashError::OutOfRange);
        }
        let guess = p / (self.r_specific() * t);
        let isotherm = self.isotherm(t);
        if t < self.fluid.t_triple {
            // Under the sublimation pressure: a dilute gas, the root nearest the ideal gas.
            let rho = self.density_between(&isotherm, p, 1e-12 * guess, f64::INFINITY, guess)?;
            return self.below_triple(rho, t);
        }
        if let Some(rho) = self.clearly_gas(&isotherm, p, guess) {
            return Ok(self.props(rho, t));
        }
        let rho = match self.saturation_below_critical(t) {
            Some(sat) if p <= sat.p => {
                self.density_between(&isotherm, p, 1e-12 * guess, sat.vapour.rho, guess)
            }
            Some(sat) => {
                let hi = self.density_above(&isotherm, p, sat.liquid.rho)?;
                self.density_between(&isotherm, p, sat.liquid.rho, hi, sat.liquid.rho)
            }
            // One root above the critical temperature: no upper bracket needed.
            None => self.density_between(&isotherm, p, 1e-12 * guess, f64::INFINITY, guess),
        }?;
        Ok(self.props(rho, t))
    }

    /// The gas root at (p, T) without solving for saturation, where the ancillary curves
    /// leave no doubt: below the critical temperature, at a pressure under 90 % of the
    /// ancillary vapour pressure (good to a fraction of a percent), the root lies below the
    /// saturated vapour's density on a branch where p rises with ρ. `None` means: take the
    /// general path.
    fn clearly_gas(&self, isotherm: &Isotherm, p: f64, guess: f64) -> Option<f64> {
        let t = isotherm.t;
        if t >= self.t_sat_max {
            return None;
        }
        let anc = &self.fluid.ancillary;
        let p_sat = anc.p_sat.at(t);
        if p >= 0.9 * p_sat {
            return None;
        }
        let top = anc.rho_vapour.at(t) * self.fluid.molar_mass;
        let start = self
            .virial_start(isotherm, p, p_sat, top)
            .unwrap_or(guess)
            .min(top);
        // A root found strictly below the top is the gas root; one pressed against the top
        // means the ancillary was not clear after all.
        self.density_between(isotherm, p, 1e-12 * guess, top, start)
            .ok()
            .filter(|rho| *rho < top * (1.0 - 1e-9))
    }

    /// A start for the gas root at (p, T) below the critical temperature, with the ancillary
    /// vapour pressure `p_sat` and saturated vapour density `vapour`: Z taken as
    /// 1 + bρ + cρ², with b the second virial coefficient and c such that Z meets the
    /// ancillary vapour's at `vapour`. Far closer than the ideal gas where Z is well below 1
    /// (carbon dioxide at 50 bar and 300 K: within 0.2 %, against 31 %), so Newton needs
    /// fewer steps. `None` where the model has no root below `vapour`.
    fn virial_start(&self, isotherm: &Isotherm, p: f64, p_sat: f64, vapour: f64) -> Option<f64> {
        let rt = self.r_specific() * isotherm.t;
        let b =
            isotherm.second_virial_reduced() / (self.fluid.rho_reducing * self.fluid.molar_mass);
        let z_vapour = p_sat / (vapour * rt);
        let c = (z_vapour - 1.0 - b * vapour) / (vapour * vapour);
        // ρ·Z(ρ) rises from 0 to ρ_v·Z_v > p/RT; Newton from the ideal gas on the cubic.
        let target = p / rt;
        let mut rho = target;
        for _ in 0..20 {
            let f = rho * (1.0 + rho * (b + rho * c)) - target;
            let df = 1.0 + rho * (2.0 * b + 3.0 * rho * c);
            if df.is_nan() || df <= 0.0 {
                return None;
            }
            let step = f / df;
            rho -= step;
            if step.abs() <= 1e-6 * rho {
                return (rho > 0.0 && rho < vapour).then_some(rho);
            }
        }
        None
    }

    /// How far outside the ancillary curves' saturated densities, as a fraction, a density
    /// is taken as one phase without solving for saturation: 0.2 for a pure gas, whose
    /// ancillaries hold within a few percent; 0.6 for a pseudo-pure mixture (air), whose
    /// vapour curve is its dew line, well below the single Maxwell line's vapour (see the
    /// tests).
    pub(super) fn one_phase_margin(&self) -> f64 {
        if self.fluid.pseudo_pure {
            0.6
        } else {
            0.2
        }
    }

    /// Whether density `rho` at temperature `t` lies so far outside the ancillary curves'
    /// saturated densities ([`Equation::one_phase_margin`]) that no saturation solve is
    /// needed to rule out two phases.
    fn clearly_one_phase(&self, rho: f64, t: f64) -> bool {
        let anc = &self.fluid.ancillary;
        let (m, margin) = (self.fluid.molar_mass, self.one_phase_margin());
        t >= self.t_sat_max
            || rho < anc.rho_vapour.at(t) * m * (1.0 - margin)
            || rho > anc.rho_liquid.at(t) * m * (1.0 + margin)
    }

    /// A density at which the pressure exceeds `p`, searching upward from `from`.
    fn density_above(&self, isotherm: &Isotherm, p: f64, from: f64) -> Result<f64, FlashError> {
        let mut rho = from;
        for _ in 0..200 {
            let (pr, dp) = isotherm.pressure(rho);
            if pr > p && dp > 0.0 {
                return Ok(rho);
            }
            rho *= 1.25;
        }
        Err(FlashError::NoConvergence)
    }

    /// The density in [lo, hi] at which the pressure is `p`, on a branch where p rises with
    /// ρ: Newton's method kept inside the bracket (an infinite `hi` doubles instead). An end whose pressure is already past `p`
    /// by rounding (a saturated phase at its own saturation pressure) is the answer.
    fn density_between(
        &self,
        isotherm: &Isotherm,
        p: f64,
        mut lo: f64,
        mut hi: f64,
        guess: f64,
    ) -> Result<f64, FlashError> {
        let mut rho = guess.clamp(lo, hi);
        // The last plain Newton step, relative: with this one it shows the convergence rate.
        let mut last_step = f64::NAN;
        for _ in 0..100 {
            let (pr, dp) = isotherm.pressure(rho);
            if !pr.is_finite() {
                // Far past any physical density the equation overflows: the root is below.
                if rho <= lo {
                    return Err(FlashError::NoConvergence);
                }
                hi = rho;
                rho = 0.5 * (lo + hi);
                continue;
            }
            if pr < p {
                lo = rho;
            } else {
                hi = rho;
            }
            let newton = rho - (pr - p) / dp;
            let step = (newton - rho) / rho;
            if dp > 0.0 && step.abs() <= RTOL {
                return Ok(newton);
            }
            // Converging quadratically (each step about c times the last one squared), the
            // new iterate's error is about c·step²: under the tolerance, it is the answer,
            // with no further evaluation to confirm it.
            let rate = step.abs() / (last_step * last_step);
            if dp > 0.0
                && newton > lo
                && newton < hi
                && last_step.abs() < 1e-2
                && step.abs() < QUADRATIC * last_step.abs()
                && rate * step * step <= RTOL
            {
                return Ok(newton);
            }
            // With no upper bracket yet, Newton may at most double the density: a step from
            // a gas-like start on a flat near-critical isotherm can land far beyond it.
            let next = if dp > 0.0 && newton > lo && newton < hi {
                if hi.is_finite() {
                    newton
                } else {
                    newton.min(2.0 * rho)
                }
            } else if hi.is_finite() {
                0.5 * (lo + hi)
            } else {
                2.0 * rho
            };
            if hi - lo <= RTOL * rho {
                return Ok(next);
            }
            last_step = if next == newton { step } else { f64::NAN };
            rho = next;
        }
        Err(FlashError::NoConvergence)
    }

    /// The equilibrium state at density `rho` and temperature `t`.
    pub fn at_rho_t(&self, rho: f64, t: f64) -> Result<Equilibrium, FlashError> {
        let (t_lo, t_hi) = self.t_range();
        if t < t_lo * (1.0 - 1e-12) {
            return Err(FlashError::BelowTriplePoint);
        }
        if !(t <= t_hi && rho > 0.0) {
            return Err(FlashError::OutOfRange);
        }
        if t < self.fluid.t_triple {
            return self.below_triple(rho, t).map(Equilibrium::single);
        }
        match self.saturation_below_critical(t) {
            Some(sat) if sat.splits(rho) => {
                Ok(Equilibrium::mixture(&sat, sat.quality_at_density(rho)))
            }
            _ => Ok(Equilibrium::single(self.props(rho, t))),
        }
    }

    /// [`Equation::at_rho_t`] with the saturation solve started from `near`, the last one
    /// found, which this updates: a search along temperature asks for neighbouring states.
    fn at_rho_t_near(
        &self,
        rho: f64,
        t: f64,
        near: &std::cell::Cell<Option<Saturation>>,
    ) -> Result<Equilibrium, FlashError> {
        let (_, t_hi) = self.t_range();
        if !(t >= self.fluid.t_triple && t <= t_hi && rho > 0.0) {
            return self.at_rho_t(rho, t);
        }
        let last = near.get();
        let sat = (t < self.fluid.t_critical)
            .then(|| self.saturation_t_near(t, last.as_ref()))
            .flatten();
        if sat.is_some() {
            near.set(sat);
        }
        match sat {
            Some(sat) if sat.splits(rho) => {
                Ok(Equilibrium::mixture(&sat, sat.quality_at_density(rho)))
            }
            _ => Ok(Equilibrium::single(self.props(rho, t))),
        }
    }

    /// The equilibrium state at density `rho` where `value` (one of u, s, p, rising with T)
    /// equals `target`; `slope` is its T-derivative in one phase, `guess` a temperature to
    /// start from.
    pub fn at_rho(
        &self,
        rho: f64,
        target: f64,
        guess: f64,
        value: impl Fn(&Equilibrium) -> f64,
        slope: impl Fn(&Props) -> f64,
    ) -> Result<Equilibrium, FlashError> {
        let (t_lo, t_hi) = self.t_range();
        if !(rho > 0.0 && rho.is_finite() && target.is_finite()) {
            return Err(FlashError::OutOfRange);
        }
        // One phase first: Newton on the single-phase surface, which is all there is above
        // the critical temperature and outside the two-phase dome. From a good guess plain
        // Newton converges in a few steps; the bracketed form backs it up.
        let f = |t: f64| {
            let p = self.props(rho, t);
            (value(&Equilibrium::single(p)) - target, slope(&p), p)
        };
        let single = newton_from(guess, t_lo, t_hi, &f).or_else(|| {
            let t = crate::solve::newton_bracketed(
                |t| {
                    let (v, d, _) = f(t);
                    (v, d)
                },
                t_lo,
                t_hi,
                guess,
                RTOL,
            )
            .ok()?;
            Some(self.props(rho, t))
        });
        if let Some(p) = single {
            // Below the triple point only a dilute gas is a state; above it, one phase
            // outside the dome.
            let stands = if p.t < self.fluid.t_triple {
                self.below_triple(rho, p.t).is_ok()
            } else {
                self.clearly_one_phase(rho, p.t)
                    || !self
                        .saturation_below_critical(p.t)
                        .is_some_and(|sat| sat.splits(rho))
            };
            if stands {
                return Ok(Equilibrium::single(p));
            }
        }
        // Two phases exist only from the triple point up.
        let t_lo = self.fluid.t_triple;
        // Inside the dome (or beyond the ends): the equilibrium value along T, each
        // saturation solve started from the last.
        let near = std::cell::Cell::new(None);
        let f = |t: f64| {
            self.at_rho_t_near(rho, t, &near)
                .map_or(f64::NAN, |e| value(&e) - target)
        };
        let tol = RTOL * self.fluid.t_critical;
        // Near the guess first (a path asks for neighbouring states in turn): each value
        // costs a saturation solve.
        let (a, b) = ((guess * 0.99).max(t_lo), (guess * 1.01).min(t_hi));
        let (fa, fb) = (f(a), f(b));
        if fa <= 0.0 && fb >= 0.0 {
            let t = crate::solve::root_within(f, ((a, fa), (b, fb)), tol, 0.0)
                .map_err(|_| FlashError::NoConvergence)?
                .x;
            return self.at_rho_t_near(rho, t, &near);
        }
        if f(t_lo) > 0.0 {
            return Err(FlashError::BelowTriplePoint);
        }
        if f(t_hi) < 0.0 {
            return Err(FlashError::OutOfRange);
        }
        let t = crate::solve::root(f, t_lo, t_hi, tol).map_err(|_| FlashError::NoConvergence)?;
        self.at_rho_t_near(rho, t, &near)
    }

    /// The equilibrium state at pressure `p` where `value` (s or h, rising with T at fixed
    /// p) equals `target`; `slope` is its T-derivative at fixed p in one phase.
    pub fn at_p(
        &self,
        p: f64,
        target: f64,
        value: impl Fn(&Equilibrium) -> f64,
        slope: impl Fn(&Props) -> f64,
    ) -> Result<Equilibrium, FlashError> {
        self.at_p_saturated(p, self.saturation_p(p), target, value, slope)
    }

    /// [`Equation::at_p`] with the saturation state at `p` already found (`None` where
    /// there is none: above the critical pressure or below the triple point's).
    pub fn at_p_saturated(
        &self,
        p: f64,
        saturation: Option<Saturation>,
        target: f64,
        value: impl Fn(&Equilibrium) -> f64,
        slope: impl Fn(&Props) -> f64,
    ) -> Result<Equilibrium, FlashError> {
        let (floor, t_hi) = self.t_range();
        // Liquid and the gas above the triple-point pressure start at the triple point.
        let t_lo = self.fluid.t_triple;
        if !(p > 0.0 && p <= self.p_limit()) {
            return Err(FlashError::OutOfRange);
        }
        let mut vapour_bound = None;
        let (lo, hi) = match saturation {
            Some(sat) => {
                let (l, v) = (
                    value(&Equilibrium::single(sat.liquid)),
                    value(&Equilibrium::single(sat.vapour)),
                );
                if target >= l && target <= v {
                    let x = if v > l { (target - l) / (v - l) } else { 1.0 };
                    return Ok(Equilibrium::mixture(&sat, x));
                }
                if target > v {
                    // Above Tsat(p) the gas root lies below the saturated vapour's density
                    // there, on a branch where p rises with ρ: no phase test needed.
                    vapour_bound = Some(sat.vapour.rho);
                    (sat.t, t_hi)
                } else {
                    (t_lo, sat.t)
                }
            }
            // Under the triple-point pressure the gas reaches down to its sublimation
            // temperature (or the triple point, without a sublimation curve).
            // (nudged up so that the end itself is gas, not solid by rounding).
            None if p < self.p_triple => (
                self.sublimation
                    .and_then(|s| s.temperature(p))
                    .map_or(t_lo, |t| (t * (1.0 + 1e-10)).clamp(floor, t_lo)),
                t_hi,
            ),
            None => (t_lo, t_hi),
        };
        let state = |t: f64| -> Result<Props, FlashError> {
            match vapour_bound {
                Some(top) => {
                    let guess = (p / (self.r_specific() * t)).min(top);
                    let rho =
                        self.density_between(&self.isotherm(t), p, 1e-12 * guess, top, guess)?;
                    Ok(self.props(rho, t))
                }
                None => self.at_pt(p, t),
            }
        };
        let f = |t: f64| -> (f64, f64) {
            match state(t) {
                Ok(pr) => (value(&Equilibrium::single(pr)) - target, slope(&pr)),
                Err(_) => (f64::NAN, f64::NAN),
            }
        };
        // Where no root is bracketed, the ends say why: the target lies below the lowest
        // temperature (the gas would freeze) or above the highest.
        let t = crate::solve::newton_bracketed(f, lo, hi, 0.5 * (lo + hi), RTOL).map_err(|_| {
            if f(lo).0 > 0.0 {
                FlashError::BelowTriplePoint
            } else if f(hi).0 < 0.0 {
                FlashError::OutOfRange
            } else {
                FlashError::NoConvergence
            }
        })?;
        // A bracket that closed on a jump rather than a root (the value leaps across it:
        // the two-phase band near the critical point the saturation solver does not reach,
        // which the model takes as one phase) is no state.
        let (miss, slope_t) = f(t);
        let settled = miss.abs() <= 1e-7 * (slope_t * t).abs();
        if !settled {
            return Err(FlashError::NoConvergence);
        }
        Ok(Equilibrium::single(state(t)?))
    }
}

/// Plain Newton's method from `guess` on a function returning its value, slope and the
/// properties where it was evaluated; `None` if it leaves [lo, hi] or does not settle.
/// Converged when the next step would be below the tolerance, so the properties returned
/// are those at the last temperature evaluated.
fn newton_from(
    guess: f64,
    lo: f64,
    hi: f64,
    f: &impl Fn(f64) -> (f64, f64, Props),
) -> Option<Props> {
    let mut t = guess.clamp(lo, hi);
    for _ in 0..12 {
        let (v, d, p) = f(t);
        let step = v / d;
        if !(step.is_finite() && d > 0.0) {
            return None;
        }
        // The properties returned are those at `t`, within one (tiny) step of the root.
        if step.abs() <= NEWTON_SETTLED * t {
            return Some(p);
        }
        t -= step;
        if !(t >= lo && t <= hi) {
            return None;
        }
    }
    None
}

#[cfg(test)]
mod tests {
    use super::super::equation;

    #[test]
    fn the_virial_start_lands_close_to_a_dense_gas_root() {
        // Carbon dioxide at 50 bar and 300 K: Z ≈ 0.69, so the ideal gas starts 31 % low.
        let e = equation("carbon-dioxide").unwrap();
        let (p, t) = (50e5, 300.0);
        let root = e.at_pt(p, t).unwrap().rho;
        let vapour = e.fluid.ancillary.rho_vapour.at(t) * e.fluid.molar_mass;
        let p_sat = e.fluid.ancillary.p_sat.at(t);
        let start = e.virial_start(&e.isotherm(t), p, p_sat, vapour).unwrap();
        let ideal = p / (e.r_specific() * t);
        assert!(
            (start / root - 1.0).abs() < 2e-3,
            "start {start}, root {root}"
        );
        assert!(ideal / root < 0.7);
        // Every gas, at half its vapour pressure, is started within 1 %.
        for e in super::super::equations() {
            let t = 0.5 * (e.fluid.t_triple + e.fluid.t_critical);
            let p_sat = e.fluid.ancillary.p_sat.at(t);
            let p = 0.5 * p_sat;
            let vapour = e.fluid.ancillary.rho_vapour.at(t) * e.fluid.molar_mass;
            let root = e.at_pt(p, t).unwrap().rho;
            let start = e.virial_start(&e.isotherm(t), p, p_sat, vapour).unwrap();
            assert!(
                (start / root - 1.0).abs() < 1e-2,
                "{}: start {start}, root {root}",
                e.fluid.gas
            );
        }
    }

    #[test]
    fn the_virial_start_changes_the_steps_not_the_root() {
        // Across each gas's clearly-gas region below its critical temperature, the root found
        // from the virial start is the one found from the ideal gas.
        for e in super::super::equations() {
            let (lo, hi) = (e.fluid.t_triple, e.t_sat_max);
            for i in 0..=40 {
                let t = lo + (hi - lo) * f64::from(i) / 40.0;
                let p_sat = e.fluid.ancillary.p_sat.at(t);
                for j in 1..=20 {
                    let p = p_sat * 0.89 * (f64::from(j) / 20.0).powi(3);
                    let isotherm = e.isotherm(t);
                    let Some(rho) = e.clearly_gas(&isotherm, p, p / (e.r_specific() * t)) else {
                        continue;
                    };
                    let ideal = p / (e.r_specific() * t);
                    let top = e.fluid.ancillary.rho_vapour.at(t) * e.fluid.molar_mass;
                    let from_ideal = e.density_between(&isotherm, p, 1e-12 * ideal, top, ideal);
                    let from_ideal = from_ideal.unwrap();
                    assert!(
                        (rho / from_ideal - 1.0).abs() < 1e-11,
                        "{} at {p} Pa, {t} K: {rho} vs {from_ideal}",
                        e.fluid.gas
                    );
                }
            }
        }
    }
}
