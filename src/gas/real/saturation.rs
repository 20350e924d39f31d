//! Vapour–liquid equilibrium of a pure fluid from its Helmholtz equation: equal pressure and
//! equal Gibbs energy in both phases (the Maxwell criterion).

use super::helmholtz::Equation;
use super::props::Props;

/// Liquid and vapour in equilibrium at one temperature.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Saturation {
    /// Saturation temperature, K.
    pub t: f64,
    /// Saturation pressure, Pa.
    pub p: f64,
    /// The saturated liquid.
    pub liquid: Props,
    /// The saturated vapour.
    pub vapour: Props,
}

impl Saturation {
    /// Vapour mass fraction of a mixture of the two at mass density `rho`.
    pub fn quality_at_density(&self, rho: f64) -> f64 {
        let (vl, vv) = (1.0 / self.liquid.rho, 1.0 / self.vapour.rho);
        (1.0 / rho - vl) / (vv - vl)
    }

    /// d ln p / d(1/T) along the saturation curve, from the Clausius–Clapeyron equation.
    fn ln_p_slope(&self) -> f64 {
        let dv = 1.0 / self.vapour.rho - 1.0 / self.liquid.rho;
        let dp_dt = (self.vapour.h - self.liquid.h) / (self.t * dv);
        -self.t * self.t * dp_dt / self.p
    }

    /// Whether a mass density lies strictly between the two saturated densities.
    pub fn splits(&self, rho: f64) -> bool {
        rho > self.vapour.rho && rho < self.liquid.rho
    }
}

impl Equation {
    /// Saturation at temperature `t`, or `None` outside [triple point, `t_sat_max`]: the
    /// solver is trusted up to the highest temperature at which it converges, found once per
    /// gas (within 0.1 % of the critical temperature for the pure gases; about 1 % for air,
    /// whose pseudo-pure equation has no sharp critical point). Closer to the critical
    /// point the two phases are all but the same, and states there are taken as one phase.
    pub fn saturation_t(&self, t: f64) -> Option<Saturation> {
        (t <= self.t_sat_max).then(|| self.maxwell(t)).flatten()
    }

    /// Saturation at temperature `t` as [`Equation::saturation_t`], the phases started
    /// from `near`'s densities where it lies within 2 % in temperature (from the ancillary
    /// curves otherwise, or where that start does not converge).
    pub fn saturation_t_near(&self, t: f64, near: Option<&Saturation>) -> Option<Saturation> {
        if t > self.t_sat_max {
            return None;
        }
        let reducing = self.fluid.molar_mass * self.fluid.rho_reducing;
        near.filter(|n| ((t - n.t) / n.t).abs() < 0.02)
            .and_then(|n| {
                self.maxwell_from(t, Some((n.liquid.rho / reducing, n.vapour.rho / reducing)))
            })
            .or_else(|| self.maxwell(t))
    }

    /// The highest temperature, below the critical one, at which the saturation solver
    /// converges (bisection on convergence).
    pub(super) fn highest_saturation_temperature(&self) -> f64 {
        let tc = self.fluid.t_critical;
        let (mut lo, mut hi) = (0.9 * tc, tc * (1.0 - 1e-3));
        if self.maxwell(hi).is_some() {
            return hi;
        }
        for _ in 0..30 {
            let mid = 0.5 * (lo + hi);
            if self.maxwell(mid).is_some() {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        lo
    }

    /// Newton's method on the reduced densities after Akasaka (2008, J. Thermal Sci. Tech.
    /// 3, 442–451), started from the ancillary curves.
    fn maxwell(&self, t: f64) -> Option<Saturation> {
        self.maxwell_from(t, None)
    }

    /// The Maxwell solution at `t`, started from the reduced densities `start` (a nearby
    /// temperature's solution) or else from the ancillary curves.
    fn maxwell_from(&self, t: f64, start: Option<(f64, f64)>) -> Option<Saturation> {
        let f = &self.fluid;
        if !(t >= f.t_triple && t < f.t_critical) {
            return None;
        }
        let (mut dl, mut dv) = start.unwrap_or_else(|| {
            (
                f.ancillary.rho_liquid.at(t) / f.rho_reducing,
                f.ancillary.rho_vapour.at(t) / f.rho_reducing,
            )
        });
        let isotherm = self.isotherm(t);
        let jk = |delta: f64| {
            let r = isotherm.residual(delta);
            let j = delta * (1.0 + delta * r.d);
            let k = delta * r.d + r.a + delta.ln();
            let jd = 1.0 + 2.0 * delta * r.d + delta * delta * r.dd;
            let kd = 2.0 * r.d + delta * r.dd + 1.0 / delta;
            (j, k, jd, kd)
        };
        for _ in 0..100 {
            let (jl, kl, jdl, kdl) = jk(dl);
            let (jv, kv, jdv, kdv) = jk(dv);
            let det = jdv * kdl - jdl * kdv;
            let step_l = ((kv - kl) * jdv - (jv - jl) * kdv) / det;
            let step_v = ((kv - kl) * jdl - (jv - jl) * kdl) / det;
            if !(step_l.is_finite() && step_v.is_finite()) {
                return None;
            }
            // Damp a step that would leave the physical region.
            let mut g = 1.0;
            while (dl + g * step_l <= 0.0 || dv + g * step_v <= 0.0) && g > 1e-6 {
                g *= 0.5;
            }
            dl += g * step_l;
            dv += g * step_v;
            // Newton's error after a step is of the order of the step squared: a full step
            // below 1e-9 leaves the densities good to far below the 1e-12 of every solve.
            if g == 1.0 && (step_l / dl).abs() < 1e-9 && (step_v / dv).abs() < 1e-9 {
                break;
            }
        }
        if dl.is_nan() || dv.is_nan() || dl <= dv * (1.0 + 1e-6) {
            return None;
        }
        let m = f.molar_mass * f.rho_reducing;
        let liquid = self.props(dl * m, t);
        let vapour = self.props(dv * m, t);
        // The liquid's pressure is stiff in its density: judge it on the liquid's scale ρRT.
        let rt = self.r_specific() * t;
        let consistent = (liquid.p - vapour.p).abs() <= 1e-9 * liquid.rho * rt
            && (liquid.g() - vapour.g()).abs() <= 1e-9 * rt;
        consistent.then_some(Saturation {
            t,
            p: vapour.p,
            liquid,
            vapour,
        })
    }

    /// Saturation at pressure `p`, or `None` outside [triple-point pressure, critical
    /// pressure).
    ///
    /// Newton's method in 1/T on ln p with the Clausius–Clapeyron slope, started from the
    /// ancillary vapour-pressure curve.
    pub fn saturation_p(&self, p: f64) -> Option<Saturation> {
        self.saturation_p_near(p, None)
    }

    /// Saturation at pressure `p` as [`Equation::saturation_p`], started from `near`, a
    /// saturation state at a nearby pressure, where one is known: its Clausius–Clapeyron
    /// line gives the temperature and its densities the phases, so a search along a path
    /// (the nozzle's throat pressures) solves each state in a step or two.
    pub fn saturation_p_near(&self, p: f64, near: Option<&Saturation>) -> Option<Saturation> {
        let f = &self.fluid;
        let (lo, hi) = (f.t_triple, self.t_sat_max);
        // The ends themselves, give or take rounding, belong to the range.
        if !(p >= self.p_triple * (1.0 - 1e-12) && p <= self.p_sat_max * (1.0 + 1e-12)) {
            return None;
        }
        let ln_p = p.ln();
        let reducing = f.molar_mass * f.rho_reducing;
        let from_near = near.and_then(|n| {
            let t = (1.0 / (1.0 / n.t - (ln_p - n.p.ln()) / n.ln_p_slope())).clamp(lo, hi);
            (((t - n.t) / n.t).abs() < 0.02)
                .then_some((t, (n.liquid.rho / reducing, n.vapour.rho / reducing)))
        });
        let (mut t, mut start) = match from_near {
            Some((t, densities)) => (t, Some(densities)),
            None => {
                let anc = |t: f64| f.ancillary.p_sat.at(t).ln() - ln_p;
                let guess = crate::solve::root(anc, lo, hi, 1e-9 * hi)
                    .unwrap_or(if anc(lo) > 0.0 { lo } else { hi });
                (guess, None)
            }
        };
        for _ in 0..50 {
            // A start from a neighbour that does not converge is retried from the ancillaries.
            let sat = self
                .maxwell_from(t, start)
                .or_else(|| start.and_then(|_| self.maxwell(t)))?;
            if (sat.p / p - 1.0).abs() < 1e-13 {
                return Some(sat);
            }
            // ln p against 1/T is nearly straight: step in x = 1/T.
            let x = 1.0 / t - (sat.p.ln() - ln_p) / sat.ln_p_slope();
            let next = (1.0 / x).clamp(lo, hi);
            if ((next - t) / t).abs() < 1e-14 {
                return Some(sat);
            }
            // A small step starts from this solution; a large one from the ancillaries.
            start = (((next - t) / t).abs() < 0.02)
                .then(|| (sat.liquid.rho / reducing, sat.vapour.rho / reducing));
            t = next;
        }
        None
    }
}
