//! The real gas's isentropic nozzle: the sonic throat of a one-phase isentrope by the
//! secant method, and homogeneous equilibrium flow where the isentrope meets two phases
//! (its throat inside the dome, or pinned at the dew point).

use uom::si::f64::{MassFlux, Pressure};
use uom::si::{mass_flux::kilogram_per_square_meter_second, pressure::pascal};

use super::{Equilibrium, RealGas, Saturation};
use crate::gas::{NozzleFlow, State, Throat};

impl RealGas {
    /// The flux through a nozzle from `stagnation` to `back`, for [`crate::gas::GasModel::nozzle`].
    pub(super) fn nozzle_flow(&self, stagnation: &State, back: Pressure) -> NozzleFlow {
        // Steady isentropic flow: h0 = h + c²/2 along the stagnation isentrope. The flux
        // ρ·c peaks where c equals the speed of sound (the choked throat); below that back
        // pressure the flow no longer depends on it.
        let zero = NozzleFlow {
            mass_flux: mass_flux(0.0),
            choked: false,
            throat: Throat::Gas,
        };
        let e0 = self.equilibrium(stagnation);
        let pb = back.get::<pascal>();
        if pb.is_nan() || e0.p.is_nan() || pb >= e0.p {
            return zero;
        }
        let Some(p0) = e0.single else {
            return self.equilibrium_nozzle(&e0, pb);
        };
        // A throat pinned at the dew point last time is tried there first: the searches
        // below would only find that the isentrope turns two-phase before its sonic point.
        if self.hem_pinned.get() {
            if let Some(flow) = self.pinned_nozzle(&e0, pb) {
                return flow;
            }
        }
        let kappa = (p0.rho * p0.w2 / p0.p).clamp(1.0 + 1e-6, 20.0);
        let flux = |e: &Equilibrium| throat_flux(&e0, e);
        // The sonic throat: F(ρ) = 2(h0 − h) − w² = 0 by the secant method.
        // Each state starts from the last one's temperature, scaled along the isentrope by
        // its Grüneisen exponent (∂ln T/∂ln ρ)_s = (∂p/∂T)_ρ/(ρ·cv).
        let gruneisen = p0.dp_dt / (p0.rho * p0.cv);
        let last = std::cell::Cell::new((e0.rho, e0.t));
        let sonic = |rho: f64| -> Option<(f64, Equilibrium)> {
            let (r, t) = last.get();
            let e = self
                .on_isentrope(rho, e0.s, t * (rho / r).powf(gruneisen))
                .ok()?;
            last.set((e.rho, e.t));
            let w2 = e.single?.w2;
            Some((2.0 * (e0.h - e.h) - w2, e))
        };
        let start = p0.rho
            * self
                .throat_ratio
                .get()
                .unwrap_or_else(|| (2.0 / (kappa + 1.0)).powf(1.0 / (kappa - 1.0)));
        // The first step is Newton's with the last throat's slope where there is one; a
        // step that small from a start that close leaves the throat's density within about
        // 1e-5 of its own size, and the flux, flat at its maximum, within about 1e-10.
        let secant = || -> Option<Equilibrium> {
            let a = start;
            let (fa, _) = sonic(a)?;
            let b = match self.throat_slope.get() {
                Some(k) if (fa / k * p0.rho / a).abs() < 0.05 => a - fa / k * p0.rho,
                _ => a * 1.001,
            };
            let (mut a, mut fa) = (a, fa);
            let (mut b, (mut fb, mut eb)) = (b, sonic(b)?);
            let mut newton = self.throat_slope.get().is_some();
            for _ in 0..30 {
                let settled = if newton { 1e-5 } else { 1e-7 };
                let step = ((b - a) / b).abs();
                if fb == 0.0 || step < settled {
                    // A difference over a step near the solve's own noise says nothing new.
                    let k = (fb - fa) / (b - a) * p0.rho;
                    if step > 1e-8 && k.is_finite() && k != 0.0 {
                        self.throat_slope.set(Some(k));
                    }
                    return Some(eb);
                }
                newton = false;
                let c = b - fb * (b - a) / (fb - fa);
                if !(c > 0.0 && c < p0.rho) {
                    return None;
                }
                (a, fa) = (b, fb);
                (b, (fb, eb)) = (c, sonic(c)?);
            }
            None
        };
        // Where the secant method strays, step down from the stagnation density (F < 0)
        // to the first density with F > 0 and solve between by Brent's method. If the
        // isentrope reaches the two-phase region first, there is no single-phase throat.
        let bracketed = || -> Option<Equilibrium> {
            let mut hi = p0.rho;
            for _ in 0..200 {
                let lo = hi * 0.97;
                let (f, _) = sonic(lo)?;
                if f > 0.0 {
                    let g = |rho: f64| sonic(rho).map_or(f64::NAN, |(f, _)| f);
                    let rho = crate::solve::root(g, lo, hi, 1e-13 * p0.rho).ok()?;
                    return sonic(rho).map(|(_, e)| e);
                }
                hi = lo;
            }
            None
        };
        let throat = secant().or_else(bracketed);
        if let Some(t) = &throat {
            self.throat_ratio.set(Some(t.rho / p0.rho));
        }
        match throat {
            Some(t) if t.p > pb => NozzleFlow {
                mass_flux: mass_flux(flux(&t)),
                choked: true,
                throat: Throat::Gas,
            },
            // Subcritical: the throat is at the back pressure. Newton on ρ along the
            // isentrope (dp/dρ at constant s is w²), from the ideal-gas isentrope's density;
            // the general (p, s) state where that does not settle in one phase.
            Some(_) => {
                let newton = || -> Option<Equilibrium> {
                    let mut rho = p0.rho * (pb / p0.p).powf(1.0 / kappa);
                    for _ in 0..20 {
                        let (_, e) = sonic(rho)?;
                        let w2 = e.single?.w2;
                        let step = (e.p - pb) / w2;
                        if (step / rho).abs() < 1e-13 {
                            return Some(e);
                        }
                        rho -= step;
                        if !(rho > 0.0 && rho < p0.rho) {
                            return None;
                        }
                    }
                    None
                };
                let end = newton().or_else(|| self.eq.at_p(pb, e0.s, |e| e.s, |p| p.cp / p.t).ok());
                match end {
                    Some(e) => NozzleFlow {
                        mass_flux: mass_flux(flux(&e)),
                        choked: false,
                        throat: match e.quality {
                            Some(_) => Throat::TwoPhase,
                            None => Throat::Gas,
                        },
                    },
                    None => zero,
                }
            }
            None => self.equilibrium_nozzle(&e0, pb),
        }
    }

    /// Homogeneous equilibrium flow, for an isentrope that meets the two-phase region: the
    /// flux ρ·√(2(h0 − h)) is maximised along the equilibrium isentrope over the throat
    /// pressure; the flow is choked when the maximum lies above the back pressure.
    ///
    /// The flux is sampled on a grid in ln p first and the best sample's neighbourhood
    /// refined by Brent's method for a maximum, so a pressure with no state (the narrow band
    /// just below the critical pressure, where the model has no two-phase state) is skipped
    /// rather than steering a search that assumes one maximum. The last throat found, where
    /// it still brackets the maximum, stands in for the grid.
    fn equilibrium_nozzle(&self, e0: &Equilibrium, pb: f64) -> NozzleFlow {
        if e0.quality.is_some() {
            if let Some(flow) = self.two_phase_nozzle(e0, pb) {
                return flow;
            }
        }
        // Each throat pressure's saturation state starts from the last one found.
        let near = std::cell::Cell::new(None);
        let state = |ln_p: f64| {
            let p = ln_p.exp();
            let last: Option<Saturation> = near.get();
            let sat = self.eq.saturation_p_near(p, last.as_ref());
            if sat.is_some() {
                near.set(sat);
            }
            self.eq
                .at_p_saturated(p, sat, e0.s, |e| e.s, |p| p.cp / p.t)
                .ok()
        };
        // The best state seen, by its ln p and quality: the throat's phase, without solving
        // for its state again.
        let best_seen = std::cell::Cell::new((f64::NEG_INFINITY, f64::NAN, None));
        let flux = |ln_p: f64| {
            let e = state(ln_p);
            let g = e.map_or(0.0, |e| throat_flux(e0, &e));
            if g >= best_seen.get().0 {
                best_seen.set((g, ln_p, e.and_then(|e| e.quality)));
            }
            g
        };
        let (lo, hi) = (pb.ln(), e0.p.ln());
        let peak = throat_peak(&flux, (lo, hi), self.hem_throat.get(), HEM_TOL);
        self.hem_throat.set(peak.map(|(x, _)| x - hi));
        let (ln_p, best) = peak.unwrap_or((lo, 0.0));
        let back = state(lo);
        let at_back = back.map_or(0.0, |e| throat_flux(e0, &e));
        let flow = throat_or_back(at_back, best, ln_p - pb.ln() < 1e-6);
        // The phase of the flow's state where it was found.
        let quality = match best_seen.get() {
            _ if !flow.choked => back.and_then(|e| e.quality),
            (_, x, q) if x == ln_p => q,
            _ => state(ln_p).and_then(|e| e.quality),
        };
        let throat = match quality {
            Some(x) if x < 1.0 - DEW_POINT_QUALITY => Throat::TwoPhase,
            _ => Throat::DewPoint,
        };
        self.hem_pinned
            .set(throat == Throat::DewPoint && flow.choked);
        NozzleFlow { throat, ..flow }
    }

    /// The nozzle's flow where its throat is pinned at the dew point, found without a
    /// search: from a one-phase stagnation state, the gas still short of sonic speed at the
    /// isentrope's dew point (2(h₀ − h) < w² there) reaches two phases before any sonic
    /// point, and the flux rises all the way to the dew point; where it falls just inside
    /// the two-phase region, that corner is the throat. `None` where either fails (the
    /// throat lies elsewhere), or the dew point is not between the stagnation and the back
    /// pressure.
    fn pinned_nozzle(&self, e0: &Equilibrium, pb: f64) -> Option<NozzleFlow> {
        let sat = self.dew_point(e0.s)?;
        let vapour = &sat.vapour;
        let p_in = vapour.p * (1.0 - PINNED_STEP);
        if !(vapour.p < e0.p && p_in > pb && 2.0 * (e0.h - vapour.h) < vapour.w2) {
            return None;
        }
        let best = throat_flux(e0, &Equilibrium::mixture(&sat, 1.0));
        let sat = self.eq.saturation_p(p_in)?;
        let inside = self
            .eq
            .at_p_saturated(p_in, Some(sat), e0.s, |e| e.s, |p| p.cp / p.t)
            .ok()?;
        (inside.quality.is_some() && throat_flux(e0, &inside) < best).then_some(NozzleFlow {
            mass_flux: mass_flux(best),
            choked: true,
            throat: Throat::DewPoint,
        })
    }

    /// The dew point on the isentrope `s`: the saturated vapour of that entropy, by
    /// Brent's method on ln p along the saturation curve. `None` where the isentrope
    /// passes the two-phase region by. The last one found is kept: a vent along one
    /// isentrope asks for it at each throat.
    fn dew_point(&self, s: f64) -> Option<Saturation> {
        if let Some((key, dew)) = self.dew.get() {
            if key == s {
                return dew;
            }
        }
        let near = std::cell::Cell::new(None::<Saturation>);
        let sat = |ln_p: f64| {
            let found = self.eq.saturation_p_near(ln_p.exp(), near.get().as_ref());
            if found.is_some() {
                near.set(found);
            }
            found
        };
        let (lo, hi) = (self.eq.p_triple.ln(), self.eq.p_sat_max.ln());
        let dew = crate::solve::root(
            |ln_p| sat(ln_p).map_or(f64::NAN, |x| x.vapour.s - s),
            lo,
            hi,
            1e-13 * hi.abs(),
        )
        .ok()
        .and_then(sat);
        self.dew.set(Some((s, dew)));
        dew
    }

    /// [`RealGas::equilibrium_nozzle`] from a two-phase stagnation state, whose isentrope
    /// stays two-phase down to the back pressure: the throat searched along temperature,
    /// each state one saturation solve (started from the last) and the quality that keeps
    /// the entropy, rather than a saturation search at each throat pressure. `None` where
    /// the isentrope leaves the two-phase region on the way (then the search along pressure
    /// serves).
    fn two_phase_nozzle(&self, e0: &Equilibrium, pb: f64) -> Option<NozzleFlow> {
        let back = self.eq.saturation_p(pb)?;
        let near = std::cell::Cell::new(back);
        let left = std::cell::Cell::new(false);
        let state = |t: f64| -> Option<Equilibrium> {
            let sat = self.eq.saturation_t_near(t, Some(&near.get()))?;
            near.set(sat);
            let x = (e0.s - sat.liquid.s) / (sat.vapour.s - sat.liquid.s);
            (0.0..=1.0)
                .contains(&x)
                .then(|| Equilibrium::mixture(&sat, x))
        };
        let flux = |t: f64| match state(t) {
            Some(e) => throat_flux(e0, &e),
            None => {
                left.set(true);
                0.0
            }
        };
        let (lo, hi) = (back.t, e0.t);
        let at_back = flux(lo);
        let peak = throat_peak(&flux, (lo, hi), self.hem_throat_t.get(), HEM_TOL * hi);
        if left.get() {
            return None;
        }
        self.hem_throat_t.set(peak.map(|(t, _)| t - hi));
        let (t, best) = peak.unwrap_or((lo, 0.0));
        Some(NozzleFlow {
            throat: Throat::TwoPhase,
            ..throat_or_back(at_back, best, t - lo < HEM_TOL * lo)
        })
    }
}

/// Samples of the homogeneous-equilibrium flux over ln p, from the back pressure to the
/// stagnation pressure, where no earlier throat brackets the maximum.
const HEM_GRID: usize = 12;
/// The bracket tried around the last throat is this many times narrower than a grid step.
const HEM_LOCAL: f64 = 8.0;
/// The relative step in pressure below the dew point at which a pinned throat's flux is
/// checked to fall.
const PINNED_STEP: f64 = 1e-6;
/// How far below 1 the quality of a homogeneous-equilibrium throat must be for it to lie
/// inside the two-phase region rather than at its dew point: the throat search's tolerance
/// ([`HEM_TOL`] in ln p) moves a throat pinned at the dew point about this far in.
const DEW_POINT_QUALITY: f64 = 1e-5;
/// The throat's tolerance in ln p (relative, along temperature): the flux is flat at its
/// maximum, so its error is of the order of the square of this.
const HEM_TOL: f64 = 1e-6;

/// The maximum of a throat's `flux` over its path variable in (lo, hi): bracketed around
/// `hint` (the last throat's offset from `hi`; a vent asks for neighbouring states in turn)
/// where the flux there stands above both ends of a narrow bracket, else from a grid's best
/// sample and its neighbours, then refined by Brent's method for a maximum. `None` where no
/// interior maximum shows (the flux peaks at an end).
fn throat_peak(
    flux: &impl Fn(f64) -> f64,
    (lo, hi): (f64, f64),
    hint: Option<f64>,
    tol: f64,
) -> Option<(f64, f64)> {
    let width = (hi - lo) / HEM_GRID as f64;
    let local = hint.and_then(|r| {
        let c = hi + r;
        let half = width / HEM_LOCAL;
        let (a, b) = ((c - half).max(lo), (c + half).min(hi));
        if !(a < c && c < b) {
            return None;
        }
        let fc = flux(c);
        (fc > flux(a) && fc > flux(b)).then_some((a, c, b, fc))
    });
    let bracket = local.or_else(|| {
        let samples: Vec<f64> = (0..=HEM_GRID)
            .map(|i| flux(lo + width * i as f64))
            .collect();
        let (best_i, _) = samples
            .iter()
            .enumerate()
            .fold(
                (0, f64::NEG_INFINITY),
                |a, (i, &f)| if f > a.1 { (i, f) } else { a },
            );
        // At the first sample, the maximum may still lie inside the first interval.
        let (c, fc) = match best_i {
            0 => (lo + 0.5 * width, flux(lo + 0.5 * width)),
            i => (lo + width * i as f64, samples[i]),
        };
        let (a, b) = (
            lo + width * best_i.saturating_sub(1) as f64,
            lo + width * (best_i + 1).min(HEM_GRID) as f64,
        );
        let (fa, fb) = (
            samples[best_i.saturating_sub(1)],
            samples[(best_i + 1).min(HEM_GRID)],
        );
        (a < c && c < b && fc > fa && fc > fb).then_some((a, c, b, fc))
    })?;
    let (a, c, b, fc) = bracket;
    Some(crate::solve::maximum(flux, (a, c, b), fc, tol))
}

/// Mass flux ρ·c at a throat state `e` on the isentrope from the stagnation state `e0`,
/// with the velocity c = √(2·(h0 − h)) from the energy balance.
fn throat_flux(e0: &Equilibrium, e: &Equilibrium) -> f64 {
    e.rho * (2.0 * (e0.h - e.h)).max(0.0).sqrt()
}

/// The flow through the nozzle: choked at the throat's peak flux `best`, unless the flux
/// at the back pressure is as large or the peak lies at the back pressure (`at_back_end`).
fn throat_or_back(at_back: f64, best: f64, at_back_end: bool) -> NozzleFlow {
    if at_back >= best || at_back_end {
        NozzleFlow {
            mass_flux: mass_flux(at_back),
            choked: false,
            throat: Throat::TwoPhase,
        }
    } else {
        NozzleFlow {
            mass_flux: mass_flux(best),
            choked: true,
            throat: Throat::TwoPhase,
        }
    }
}

fn mass_flux(g: f64) -> MassFlux {
    MassFlux::new::<kilogram_per_square_meter_second>(g)
}

#[cfg(test)]
mod tests {
    use uom::si::f64::{MassDensity, Pressure, ThermodynamicTemperature};
    use uom::si::{
        mass_density::kilogram_per_cubic_meter, pressure::pascal, thermodynamic_temperature::kelvin,
    };

    use super::*;
    use crate::gas::{Gas, GasModel};

    #[test]
    fn a_throat_pinned_at_the_dew_point_is_found_without_a_search() {
        // Air from 310 bar(g) and 20 °C, expanded isentropically to 64 kg/m3 (the sample
        // air bank's vent): the nozzle's isentrope meets two phases before its sonic point
        // and the flux peaks at the dew point. The search over the throat pressure finds
        // that corner to its tolerance (1e-6 in ln p); the dew point itself gives the same
        // flux within 1e-6, and from then on without a search.
        let air = RealGas::new(Gas::find("air").unwrap());
        let start = air
            .state_pt(
                Pressure::new::<pascal>(310e5 + 101_325.0),
                ThermodynamicTemperature::new::<kelvin>(293.15),
            )
            .unwrap();
        let st = air
            .state_rho_s(
                MassDensity::new::<kilogram_per_cubic_meter>(64.0),
                air.entropy(&start),
            )
            .unwrap();
        let back = Pressure::new::<pascal>(101_325.0);
        let searched = air.nozzle(&st, back);
        assert_eq!(searched.throat, Throat::DewPoint);
        assert!(air.hem_pinned.get());
        let pinned = air.nozzle(&st, back);
        assert_eq!(pinned.throat, Throat::DewPoint);
        let (a, b) = (searched.mass_flux.value, pinned.mass_flux.value);
        assert!((a / b - 1.0).abs() < 1e-6, "{a} {b}");
        // The pinned flux is the corner's: no pressure nearby on the isentrope does better.
        assert!(b >= a * (1.0 - 1e-12));
        // The dew point is the saturated vapour of the isentrope's entropy.
        let s = air.entropy(&st).value;
        let dew = air.dew_point(s).unwrap();
        assert!((dew.vapour.s / s - 1.0).abs() < 1e-9);
        // And short of sonic speed there, which is why the throat is pinned.
        let h0 = air.enthalpy(&st).value;
        assert!(2.0 * (h0 - dew.vapour.h) < dew.vapour.w2);
    }

    #[test]
    fn the_real_nozzle_tends_to_the_ideal_one_at_low_pressure() {
        // At 2 bar(a) and 300 K nitrogen is within 0.1 % of ideal: the choked flux of the
        // real-gas nozzle and the ideal-gas closed form agree to the difference of their
        // gases (γ at 300 K, the equation's own R): 2e-3.
        let gas = Gas::find("nitrogen").unwrap();
        let real = RealGas::new(gas);
        let ideal = crate::gas::IdealGas::new(gas);
        let p0 = Pressure::new::<pascal>(2e5);
        let t0 = ThermodynamicTemperature::new::<kelvin>(300.0);
        let back = Pressure::new::<pascal>(0.5e5);
        let r = real.nozzle(&real.state_pt(p0, t0).unwrap(), back);
        let i = ideal.nozzle(&ideal.state_pt(p0, t0).unwrap(), back);
        assert!(r.choked && i.choked);
        let (r, i) = (r.mass_flux.value, i.mass_flux.value);
        assert!((r / i - 1.0).abs() < 2e-3, "{r} {i}");
    }
}
