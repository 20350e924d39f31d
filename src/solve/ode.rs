//! An adaptive Runge–Kutta integrator: Dormand–Prince 5(4) with error-per-step control and
//! event location.
//!
//! Written here rather than taken from a crate: the transient models need only this one
//! explicit method on a handful of states, with a terminal event (the vessel reaching its
//! target pressure) located to the tolerance. The maintained ODE crates bring a
//! linear-algebra stack that would double the project's build time for that.
//! Coefficients: Dormand & Prince (1980), J. Comp. Appl. Math. 6(1), table 2; step control
//! as in Hairer, Nørsett & Wanner, Solving ODEs I, section II.4.

/// Why an integration stopped without reaching its end.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum OdeError {
    /// The right-hand side could not be evaluated (a state outside the model's range).
    #[error("the model could not be evaluated at t = {0} s")]
    Evaluation(f64),
    /// The step size fell below what floating point can resolve.
    #[error("the step size collapsed at t = {0} s")]
    StepTooSmall(f64),
    /// More steps than allowed.
    #[error("more than {0} steps")]
    TooManySteps(usize),
}

/// Tolerances and limits.
#[derive(Debug, Clone, Copy)]
pub struct Options {
    /// Relative tolerance per step.
    pub rtol: f64,
    /// Absolute tolerance per step, per component (scaled by `scale`).
    pub atol: f64,
    /// A largest step, if the right-hand side changes character faster than the error
    /// estimate can see.
    pub max_step: f64,
    /// Most steps allowed.
    pub max_steps: usize,
}

impl Default for Options {
    fn default() -> Options {
        Options {
            rtol: 1e-9,
            atol: 1e-12,
            max_step: f64::INFINITY,
            max_steps: 200_000,
        }
    }
}

/// The accepted steps of a run, and whether it ended at an event.
#[derive(Debug, Clone)]
pub struct Trajectory {
    /// Times of the accepted steps, the first being the start.
    pub t: Vec<f64>,
    /// States at those times.
    pub y: Vec<Vec<f64>>,
    /// Whether the run stopped at the event rather than at the end time.
    pub stopped_at_event: bool,
}

const C: [f64; 7] = [0.0, 1.0 / 5.0, 3.0 / 10.0, 4.0 / 5.0, 8.0 / 9.0, 1.0, 1.0];
const A: [[f64; 6]; 7] = [
    [0.0; 6],
    [1.0 / 5.0, 0.0, 0.0, 0.0, 0.0, 0.0],
    [3.0 / 40.0, 9.0 / 40.0, 0.0, 0.0, 0.0, 0.0],
    [44.0 / 45.0, -56.0 / 15.0, 32.0 / 9.0, 0.0, 0.0, 0.0],
    [
        19372.0 / 6561.0,
        -25360.0 / 2187.0,
        64448.0 / 6561.0,
        -212.0 / 729.0,
        0.0,
        0.0,
    ],
    [
        9017.0 / 3168.0,
        -355.0 / 33.0,
        46732.0 / 5247.0,
        49.0 / 176.0,
        -5103.0 / 18656.0,
        0.0,
    ],
    [
        35.0 / 384.0,
        0.0,
        500.0 / 1113.0,
        125.0 / 192.0,
        -2187.0 / 6784.0,
        11.0 / 84.0,
    ],
];
// Fifth-order weights are the last row of A (first same as last); the error weights are
// the difference between the fifth- and fourth-order solutions.
const E: [f64; 7] = [
    71.0 / 57600.0,
    0.0,
    -71.0 / 16695.0,
    71.0 / 1920.0,
    -17253.0 / 339200.0,
    22.0 / 525.0,
    -1.0 / 40.0,
];

/// A step's result: the new state, its derivative, and the error norm.
type Stepped = (Vec<f64>, Vec<f64>, f64);

/// One Dormand–Prince step of size `h` from (t, y) with derivative `dy`.
fn step(
    f: &mut impl FnMut(f64, &[f64]) -> Option<Vec<f64>>,
    (t, y, dy): (f64, &[f64], &[f64]),
    h: f64,
    opts: &Options,
    scale: &[f64],
) -> Option<Stepped> {
    let n = y.len();
    let mut k: Vec<Vec<f64>> = vec![dy.to_vec()];
    for s in 1..7 {
        let ys: Vec<f64> = (0..n)
            .map(|i| y[i] + h * (0..s).map(|j| A[s][j] * k[j][i]).sum::<f64>())
            .collect();
        k.push(f(t + C[s] * h, &ys)?);
    }
    let y_new: Vec<f64> = (0..n)
        .map(|i| y[i] + h * (0..6).map(|j| A[6][j] * k[j][i]).sum::<f64>())
        .collect();
    let err = (0..n)
        .map(|i| {
            let e = h * (0..7).map(|j| E[j] * k[j][i]).sum::<f64>();
            let sc = opts.atol * scale[i] + opts.rtol * y[i].abs().max(y_new[i].abs());
            (e / sc).powi(2)
        })
        .sum::<f64>();
    let err = (err / n as f64).sqrt();
    if !err.is_finite() || y_new.iter().any(|v| !v.is_finite()) {
        return None;
    }
    Some((y_new, k.pop()?, err))
}

/// Integrates dy/dt = f(t, y) from `t0` to `t_end`, or until `event(t, y)` falls to zero
/// or below, located by false position on exact steps. `scale` gives each component's
/// typical size for the absolute tolerance.
pub fn integrate(
    mut f: impl FnMut(f64, &[f64]) -> Option<Vec<f64>>,
    (t0, y0): (f64, &[f64]),
    t_end: f64,
    event: impl Fn(f64, &[f64]) -> f64,
    scale: &[f64],
    opts: &Options,
) -> Result<Trajectory, OdeError> {
    let mut t = t0;
    let mut y = y0.to_vec();
    let mut dy = f(t, &y).ok_or(OdeError::Evaluation(t))?;
    let mut out = Trajectory {
        t: vec![t],
        y: vec![y.clone()],
        stopped_at_event: false,
    };
    if event(t, &y) <= 0.0 {
        out.stopped_at_event = true;
        return Ok(out);
    }
    let mut h = ((t_end - t0) * 1e-4).min(opts.max_step);
    for _ in 0..opts.max_steps {
        if t >= t_end {
            return Ok(out);
        }
        h = h.min(t_end - t).min(opts.max_step);
        if h <= 1e-14 * t.abs().max(1.0) {
            return Err(OdeError::StepTooSmall(t));
        }
        let Some((y_new, dy_new, err)) = step(&mut f, (t, &y, &dy), h, opts, scale) else {
            // A trial state outside the model's range: retry with a smaller step.
            h *= 0.25;
            continue;
        };
        if err > 1.0 {
            h *= (0.9 * err.powf(-0.2)).max(0.2);
            continue;
        }
        let t_new = t + h;
        if event(t_new, &y_new) <= 0.0 {
            // Locate the crossing by false position (Illinois) on exact steps from t, so
            // the stopping state is as accurate as any accepted step.
            let mut exact = |tau: f64| {
                step(&mut f, (t, &y, &dy), tau, opts, scale).map(|(ys, _, _)| {
                    let g = event(t + tau, &ys);
                    (g, ys)
                })
            };
            let (mut a, mut ga) = (0.0, event(t, &y));
            let (mut b, mut gb, mut yb) = (h, event(t_new, &y_new), y_new);
            // The end kept twice running has its value halved (the Illinois rule), so a
            // curved event function cannot hold one end fixed and crawl.
            let mut kept = 0;
            for _ in 0..100 {
                if gb == 0.0 || (b - a).abs() <= 1e-12 * h {
                    break;
                }
                let c =
                    (b - gb * (b - a) / (gb - ga)).clamp(a + 1e-3 * (b - a), b - 1e-3 * (b - a));
                let (gc, yc) = exact(c).ok_or(OdeError::Evaluation(t + c))?;
                if gc > 0.0 {
                    (a, ga) = (c, gc);
                    if kept == 1 {
                        gb *= 0.5;
                    }
                    kept = 1;
                } else {
                    (b, gb, yb) = (c, gc, yc);
                    if kept == -1 {
                        ga *= 0.5;
                    }
                    kept = -1;
                }
            }
            out.t.push(t + b);
            out.y.push(yb);
            out.stopped_at_event = true;
            return Ok(out);
        }
        t = t_new;
        y = y_new;
        dy = dy_new;
        out.t.push(t);
        out.y.push(y.clone());
        h *= (0.9 * err.max(1e-10).powf(-0.2)).min(5.0);
    }
    Err(OdeError::TooManySteps(opts.max_steps))
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    fn never(_: f64, _: &[f64]) -> f64 {
        1.0
    }

    #[test]
    fn exponential_decay_to_the_tolerance() {
        let run = integrate(
            |_, y| Some(vec![-y[0]]),
            (0.0, &[1.0]),
            5.0,
            never,
            &[1.0],
            &Options::default(),
        )
        .unwrap();
        assert_relative_eq!(
            run.y.last().unwrap()[0],
            (-5.0f64).exp(),
            max_relative = 1e-8
        );
        assert!(!run.stopped_at_event);
    }

    #[test]
    fn an_event_stops_the_run_where_it_crosses() {
        // y = e^-t reaches 0.5 at t = ln 2.
        let run = integrate(
            |_, y| Some(vec![-y[0]]),
            (0.0, &[1.0]),
            10.0,
            |_, y| y[0] - 0.5,
            &[1.0],
            &Options::default(),
        )
        .unwrap();
        assert!(run.stopped_at_event);
        // The event is where the integrated solution crosses (to 1e-12); that solution is
        // good to the global error of a 1e-9 per-step tolerance.
        assert_relative_eq!(run.y.last().unwrap()[0], 0.5, max_relative = 1e-12);
        assert_relative_eq!(*run.t.last().unwrap(), 2f64.ln(), max_relative = 1e-7);
    }

    #[test]
    fn a_curved_event_is_located_in_a_few_exact_steps() {
        // y = e^-t; the event y² − 1/4 bends over the step. False position with one end held
        // crawls (about forty steps to 1e-12 of the step); the Illinois rule needs a handful.
        let calls = std::cell::Cell::new(0);
        let run = integrate(
            |_, y| Some(vec![-y[0]]),
            (0.0, &[1.0]),
            10.0,
            |_, y| {
                calls.set(calls.get() + 1);
                y[0] * y[0] - 0.25
            },
            &[1.0],
            &Options::default(),
        )
        .unwrap();
        assert_relative_eq!(run.y.last().unwrap()[0], 0.5, max_relative = 1e-11);
        // One call at the start and one for each step tried to its end (the accepted ones
        // and the one that crossed); the rest located the crossing.
        let locating = calls.get() - run.t.len();
        assert!(
            locating <= 8,
            "{locating} exact steps to locate the crossing"
        );
    }

    #[test]
    fn harmonic_oscillator_keeps_its_energy() {
        let run = integrate(
            |_, y| Some(vec![y[1], -y[0]]),
            (0.0, &[1.0, 0.0]),
            20.0,
            never,
            &[1.0, 1.0],
            &Options::default(),
        )
        .unwrap();
        let y = run.y.last().unwrap();
        assert_relative_eq!(y[0], 20f64.cos(), epsilon = 1e-7);
        assert_relative_eq!(y[0] * y[0] + y[1] * y[1], 1.0, epsilon = 1e-8);
    }
}
