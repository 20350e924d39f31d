//! Numerical methods the rules share: bracketed root finding, adaptive quadrature, and an
//! adaptive ODE integrator ([`ode`]).

pub mod ode;

/// A search or solve that did not settle, and why. A caller reports it as "not resolved"
/// with this reason, never as a fact about the vessel.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("{reason}")]
pub struct NotResolved {
    /// Why, in one clause a reader can act on ("the state at 1510 bar(a) is outside the
    /// equation of state's range").
    pub reason: String,
}

impl NotResolved {
    /// A result not resolved for `reason`.
    pub fn new(reason: impl Into<String>) -> NotResolved {
        NotResolved {
            reason: reason.into(),
        }
    }
}

/// A root finder that could not bracket or converge.
#[derive(Debug, Clone, Copy, PartialEq, thiserror::Error)]
#[error("no root found in [{lo}, {hi}]: f has the same sign at both ends, is not finite, or the iteration did not settle")]
pub struct NoRoot {
    /// Lower end of the bracket.
    pub lo: f64,
    /// Upper end of the bracket.
    pub hi: f64,
}

/// A root of `f` in `[lo, hi]` by Brent's method (Brent 1973, Algorithms for Minimization
/// without Derivatives, ch. 4), to absolute tolerance `tol` in x.
///
/// `f(lo)` and `f(hi)` must differ in sign (a zero at either end is returned as is).
pub fn root(f: impl Fn(f64) -> f64, lo: f64, hi: f64, tol: f64) -> Result<f64, NoRoot> {
    let ends = ((lo, f(lo)), (hi, f(hi)));
    root_within(f, ends, tol, 0.0).map(|r| r.x)
}

/// Where [`root_within`] stopped: the last iterate and the far end of the bracket it
/// closed, each with its value; `f` changes sign between them unless `fx` is within the
/// value tolerance.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Settled {
    /// The last iterate.
    pub x: f64,
    /// `f` there.
    pub fx: f64,
    /// The other end of the final bracket.
    pub other: f64,
    /// `f` there.
    pub f_other: f64,
}

/// Brent's method as [`root`], from ends whose values are already known, stopping also as
/// soon as an iterate's |f| is within `ftol`: a search whose answer needs only that value
/// accuracy spends no evaluations beyond it.
pub fn root_within(
    f: impl Fn(f64) -> f64,
    ((lo, f_lo), (hi, f_hi)): ((f64, f64), (f64, f64)),
    tol: f64,
    ftol: f64,
) -> Result<Settled, NoRoot> {
    let (mut a, mut b) = (lo, hi);
    let (mut fa, mut fb) = (f_lo, f_hi);
    if !(fa.is_finite() && fb.is_finite()) || fa * fb > 0.0 {
        return Err(NoRoot { lo, hi });
    }
    let done = |x: f64, fx: f64, other: f64, f_other: f64| Settled {
        x,
        fx,
        other,
        f_other,
    };
    if fa.abs() <= ftol || fa == 0.0 {
        return Ok(done(a, fa, b, fb));
    }
    if fb.abs() <= ftol || fb == 0.0 {
        return Ok(done(b, fb, a, fa));
    }
    let (mut c, mut fc) = (a, fa);
    let mut d = b - a;
    let mut e = d;
    for _ in 0..200 {
        if fb * fc > 0.0 {
            c = a;
            fc = fa;
            d = b - a;
            e = d;
        }
        if fc.abs() < fb.abs() {
            a = b;
            b = c;
            c = a;
            fa = fb;
            fb = fc;
            fc = fa;
        }
        let tol1 = 2.0 * f64::EPSILON * b.abs() + 0.5 * tol;
        let m = 0.5 * (c - b);
        if m.abs() <= tol1 || fb.abs() <= ftol || fb == 0.0 {
            return Ok(done(b, fb, c, fc));
        }
        if e.abs() >= tol1 && fa.abs() > fb.abs() {
            let s = fb / fa;
            let (mut p, mut q);
            if a == c {
                p = 2.0 * m * s;
                q = 1.0 - s;
            } else {
                let qa = fa / fc;
                let r = fb / fc;
                p = s * (2.0 * m * qa * (qa - r) - (b - a) * (r - 1.0));
                q = (qa - 1.0) * (r - 1.0) * (s - 1.0);
            }
            if p > 0.0 {
                q = -q;
            } else {
                p = -p;
            }
            if 2.0 * p < (3.0 * m * q - (tol1 * q).abs()).min((e * q).abs()) {
                e = d;
                d = p / q;
            } else {
                d = m;
                e = d;
            }
        } else {
            d = m;
            e = d;
        }
        a = b;
        fa = fb;
        b += if d.abs() > tol1 { d } else { tol1.copysign(m) };
        fb = f(b);
        if !fb.is_finite() {
            return Err(NoRoot { lo, hi });
        }
    }
    // Not settled within the iterations: not a root, whatever `b` is.
    Err(NoRoot { lo, hi })
}

/// The maximum of `f` inside a bracket `a < c < b` with f(c) above both ends, to `tol` in
/// x: Brent's method for a minimum (Brent 1973, ch. 5) turned over, parabolic steps through
/// the best three points with golden-section steps where a parabola does not shrink the
/// bracket fast enough. Returns (x, f(x)) of the best point found.
pub fn maximum(
    f: impl Fn(f64) -> f64,
    (a, c, b): (f64, f64, f64),
    fc: f64,
    tol: f64,
) -> (f64, f64) {
    const GOLD: f64 = 0.381_966_011_250_105_1;
    let (mut a, mut b) = (a, b);
    let (mut x, mut w, mut v) = (c, c, c);
    let (mut fx, mut fw, mut fv) = (-fc, -fc, -fc);
    let (mut d, mut e) = (0.0f64, 0.0f64);
    for _ in 0..100 {
        let m = 0.5 * (a + b);
        let tol1 = tol + 1e-10 * x.abs();
        if (x - m).abs() <= 2.0 * tol1 - 0.5 * (b - a) {
            break;
        }
        let mut golden = true;
        if e.abs() > tol1 {
            let r = (x - w) * (fx - fv);
            let mut q = (x - v) * (fx - fw);
            let mut p = (x - v) * q - (x - w) * r;
            q = 2.0 * (q - r);
            if q > 0.0 {
                p = -p;
            }
            q = q.abs();
            if p.abs() < (0.5 * q * e).abs() && p > q * (a - x) && p < q * (b - x) {
                e = d;
                d = p / q;
                let u = x + d;
                if u - a < 2.0 * tol1 || b - u < 2.0 * tol1 {
                    d = tol1.copysign(m - x);
                }
                golden = false;
            }
        }
        if golden {
            e = if x >= m { a - x } else { b - x };
            d = GOLD * e;
        }
        let u = x + if d.abs() >= tol1 { d } else { tol1.copysign(d) };
        let fu = -f(u);
        if fu <= fx {
            if u >= x {
                a = x;
            } else {
                b = x;
            }
            (v, fv, w, fw, x, fx) = (w, fw, x, fx, u, fu);
        } else {
            if u < x {
                a = u;
            } else {
                b = u;
            }
            if fu <= fw || w == x {
                (v, fv, w, fw) = (w, fw, u, fu);
            } else if fu <= fv || v == x || v == w {
                (v, fv) = (u, fu);
            }
        }
    }
    (x, -fx)
}

// Gauss–Kronrod 3/7 nodes and weights on [-1, 1] (Kronrod 1965; checked here: the rule
// integrates x^10 exactly and the Gauss part is the 3-point Gauss–Legendre rule).
const XK: [f64; 3] = [
    0.960_491_268_708_020_3,
    0.774_596_669_241_483_4,
    0.434_243_749_346_802_6,
];
const WK: [f64; 4] = [
    0.104_656_226_026_467_3,
    0.268_488_089_868_333_4,
    0.401_397_414_775_962_2,
    0.450_916_538_658_474_1,
];
const WG: [f64; 2] = [5.0 / 9.0, 8.0 / 9.0];

/// One interval's Kronrod estimate and its error estimate. The error is |Kronrod − Gauss|
/// scaled as QUADPACK scales it (Piessens et al. 1983, qk15), capped at the raw difference:
/// for a smooth integrand the raw difference overstates the Kronrod rule's error by orders
/// of magnitude.
fn kronrod(f: &impl Fn(f64) -> f64, a: f64, b: f64) -> (f64, f64) {
    let half = 0.5 * (b - a);
    let centre = 0.5 * (a + b);
    let fc = f(centre);
    let mut k = fc * WK[3];
    let mut g = fc * WG[1];
    let mut values = [(0.0, 0.0); 3];
    for (j, (&x, &w)) in XK.iter().zip(&WK[..3]).enumerate() {
        let dx = half * x;
        values[j] = (f(centre - dx), f(centre + dx));
        let sum = values[j].0 + values[j].1;
        k += w * sum;
        if j == 1 {
            g += WG[0] * sum;
        }
    }
    // The integrand's spread about its mean, for the scaling.
    let mean = 0.5 * k;
    let spread = WK[3] * (fc - mean).abs()
        + values
            .iter()
            .zip(&WK[..3])
            .map(|((l, r), w)| w * ((l - mean).abs() + (r - mean).abs()))
            .sum::<f64>();
    let (spread, raw) = (spread * half.abs(), ((k - g) * half).abs());
    // Never above the raw difference: for a rough integrand QUADPACK's scaling can exceed
    // it, and the raw difference already bounds the Kronrod rule's error there.
    let error = if spread > 0.0 && raw > 0.0 {
        (spread * (200.0 * raw / spread).powf(1.5)).min(raw)
    } else {
        raw
    };
    (k * half, error)
}

/// A quadrature's result: the value, its error estimate and the integrand evaluations it
/// took.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Quadrature {
    /// The integral (NaN as soon as the integrand was not finite).
    pub value: f64,
    /// The estimated absolute error (the sum of each interval's |Kronrod − Gauss|).
    pub error: f64,
    /// How many times the integrand was evaluated.
    pub evaluations: usize,
}

impl Quadrature {
    /// Whether the error estimate is within `rel_tol` of the value.
    pub fn converged(&self, rel_tol: f64) -> bool {
        self.value.is_finite() && (self.error <= rel_tol * self.value.abs() || self.error == 0.0)
    }
}

/// Evaluations of one Gauss–Kronrod (3/7) interval.
pub const KRONROD_POINTS: usize = 7;

/// ∫ f from `a` to `b` by adaptive Gauss–Kronrod (3/7) bisection, to relative tolerance
/// `rel_tol` of the whole integral, within `max_evaluations` of the integrand (at least one
/// interval's 7). Where the budget runs out first the result carries the error estimate
/// reached: an integrand that is not smooth (a kink, noise from an inner solver) cannot make
/// it run on.
pub fn integrate(
    f: impl Fn(f64) -> f64,
    a: f64,
    b: f64,
    rel_tol: f64,
    max_evaluations: usize,
) -> Quadrature {
    let mut intervals = vec![(a, b, kronrod(&f, a, b))];
    let mut evaluations = KRONROD_POINTS;
    let sum = |iv: &[(f64, f64, (f64, f64))]| {
        (
            iv.iter().map(|x| x.2 .0).sum::<f64>(),
            iv.iter().map(|x| x.2 .1).sum::<f64>(),
        )
    };
    loop {
        let (total, error) = sum(&intervals);
        let done = Quadrature {
            value: total,
            error,
            evaluations,
        };
        if !(total.is_finite() && error.is_finite()) {
            return Quadrature {
                value: f64::NAN,
                ..done
            };
        }
        if done.converged(rel_tol) || evaluations + 2 * KRONROD_POINTS > max_evaluations {
            return done;
        }
        let worst = intervals
            .iter()
            .enumerate()
            .max_by(|x, y| x.1 .2 .1.total_cmp(&y.1 .2 .1))
            .map(|(i, _)| i)
            .unwrap_or(0);
        let (lo, hi, _) = intervals.swap_remove(worst);
        let mid = 0.5 * (lo + hi);
        intervals.push((lo, mid, kronrod(&f, lo, mid)));
        intervals.push((mid, hi, kronrod(&f, mid, hi)));
        evaluations += 2 * KRONROD_POINTS;
    }
}

/// A root of `f` in `[lo, hi]` by Newton's method kept inside a shrinking bracket
/// (bisection whenever a step would leave it), to relative tolerance `rtol` in x.
///
/// `f` returns the value and the derivative; the ends must bracket a sign change. Quadratic
/// where Newton works, never worse than bisection where it does not.
pub fn newton_bracketed(
    f: impl Fn(f64) -> (f64, f64),
    mut lo: f64,
    mut hi: f64,
    x0: f64,
    rtol: f64,
) -> Result<f64, NoRoot> {
    let no_root = NoRoot { lo, hi };
    let (flo, fhi) = (f(lo).0, f(hi).0);
    if !(flo.is_finite() && fhi.is_finite()) || flo * fhi > 0.0 {
        return Err(no_root);
    }
    if flo == 0.0 {
        return Ok(lo);
    }
    if fhi == 0.0 {
        return Ok(hi);
    }
    let rising = flo < 0.0;
    let mut x = if x0 > lo && x0 < hi {
        x0
    } else {
        0.5 * (lo + hi)
    };
    for _ in 0..200 {
        let (fx, dfx) = f(x);
        if !fx.is_finite() {
            return Err(no_root);
        }
        if fx == 0.0 {
            return Ok(x);
        }
        if (fx < 0.0) == rising {
            lo = x;
        } else {
            hi = x;
        }
        let newton = x - fx / dfx;
        if newton.is_finite() && (newton - x).abs() <= rtol * x.abs() {
            return Ok(newton);
        }
        let next = if newton > lo && newton < hi && newton.is_finite() {
            newton
        } else {
            0.5 * (lo + hi)
        };
        if hi - lo <= rtol * x.abs() {
            return Ok(next);
        }
        x = next;
    }
    Err(no_root)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn brent_finds_the_cube_root_of_two() {
        let r = root(|x| x * x * x - 2.0, 0.0, 2.0, 1e-14).unwrap();
        assert_relative_eq!(r, 2f64.cbrt(), max_relative = 1e-13);
    }

    #[test]
    fn brent_refuses_an_unbracketed_root() {
        assert!(root(|x| x * x + 1.0, -1.0, 1.0, 1e-12).is_err());
    }

    #[test]
    fn kronrod_integrates_smooth_and_endpoint_singular_functions() {
        assert_relative_eq!(
            integrate(f64::exp, 0.0, 1.0, 1e-12, 10_000).value,
            std::f64::consts::E - 1.0,
            max_relative = 1e-12
        );
        // ∫0^1 x^(-1/2) dx = 2: the kind of endpoint a vent to ambient has.
        let q = integrate(|x: f64| 1.0 / x.sqrt(), 0.0, 1.0, 1e-10, 100_000);
        assert!(q.converged(1e-10));
        assert_relative_eq!(q.value, 2.0, max_relative = 1e-8);
    }

    #[test]
    fn the_3_7_rule_is_exact_to_degree_eleven_and_a_smooth_interval_needs_few_points() {
        // Closed forms: ∫-1^1 x^10 dx = 2/11, ∫0^2 x^11 dx = 2^12/12 (by hand).
        assert_relative_eq!(
            kronrod(&|x: f64| x.powi(10), -1.0, 1.0).0,
            2.0 / 11.0,
            max_relative = 1e-14
        );
        assert_relative_eq!(
            kronrod(&|x: f64| x.powi(11), 0.0, 2.0).0,
            4096.0 / 12.0,
            max_relative = 1e-14
        );
        // A smooth integrand meets 1e-8 in one bisection at most (the scaled error estimate;
        // the raw |Kronrod − Gauss| would ask for several).
        let q = integrate(|x: f64| 1.0 / (1.0 + x), 0.0, 0.2, 1e-8, 1000);
        assert!(q.evaluations <= 3 * KRONROD_POINTS, "{}", q.evaluations);
        assert_relative_eq!(q.value, 1.2f64.ln(), max_relative = 1e-12);
    }

    #[test]
    fn an_integrand_that_is_not_smooth_stops_at_the_budget_with_its_error() {
        // Noise of 1e-6 (an inner solver's tolerance) keeps the error estimate above 1e-12
        // for ever: the budget ends it, and says so.
        let noisy = |x: f64| 1.0 + 1e-6 * (1e7 * x).sin().signum();
        let q = integrate(noisy, 0.0, 1.0, 1e-12, 600);
        assert!(q.evaluations <= 600);
        assert!(!q.converged(1e-12));
        assert!((q.value - 1.0).abs() < 1e-5 && q.error > 0.0);
    }
}
