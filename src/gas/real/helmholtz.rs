//! Reference multiparameter Helmholtz-energy equations of state: the coefficients of each gas
//! and the reduced Helmholtz energy α(δ, τ) = α⁰ + αʳ with its derivatives.
//!
//! The coefficients live in `data/equations_of_state.json`, written by
//! `tools/eos_coefficients.py` and embedded at build time; each gas's paper is cited there.
//! Derivatives are exact: closed forms for the power, exponential and Gaussian terms, and
//! second-order dual numbers for the non-analytic terms of carbon dioxide, whose closed forms
//! run to pages.

use std::sync::OnceLock;

use serde::Deserialize;

/// The embedded coefficient file.
const COEFFICIENTS: &str = include_str!("../../../data/equations_of_state.json");

/// A reduced Helmholtz energy and its derivatives in δ and τ up to the second order.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct Derivatives {
    /// The value.
    pub a: f64,
    /// ∂/∂δ.
    pub d: f64,
    /// ∂²/∂δ².
    pub dd: f64,
    /// ∂/∂τ.
    pub t: f64,
    /// ∂²/∂τ².
    pub tt: f64,
    /// ∂²/∂δ∂τ.
    pub dt: f64,
}

/// A reduced Helmholtz energy and its δ-derivatives at one temperature.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct Isothermal {
    /// The value.
    pub a: f64,
    /// ∂/∂δ.
    pub d: f64,
    /// ∂²/∂δ².
    pub dd: f64,
}

/// An equation of state along one isotherm ([`Equation::isotherm`]).
#[derive(Debug, Clone)]
pub struct Isotherm<'a> {
    eq: &'a Equation,
    /// The temperature, K.
    pub t: f64,
    tau: f64,
    /// n·τ^t of each power term.
    power: Vec<f64>,
    /// n·τ^t·exp(−β(τ − γ)²) of each Gaussian term.
    gaussian: Vec<f64>,
}

impl Isotherm<'_> {
    /// The limit of ∂αʳ/∂δ as δ → 0: the second virial coefficient B(T) times the reducing
    /// density, from the terms linear in δ alone.
    pub fn second_virial_reduced(&self) -> f64 {
        let (eq, tau) = (self.eq, self.tau);
        let power: f64 = eq
            .power
            .iter()
            .zip(&self.power)
            .filter(|(p, _)| p.di == 1)
            .map(|(_, c)| c)
            .sum();
        let gaussian: f64 = eq
            .gaussian
            .iter()
            .zip(&self.gaussian)
            .filter(|(g, _)| g[1] == 1.0)
            .map(|(&[_, _, _, eta, eps, ..], g)| g * (-eta * eps * eps).exp())
            .sum();
        // At δ = 0, (δ − 1)² = 1: θ = 1 − τ + A, Δ = θ² + B, and the term's slope is n·Δ^b·ψ.
        let non_analytic: f64 = eq
            .non_analytic
            .iter()
            .map(|&[n, _, b, _, big_a, big_b, big_c, big_d]| {
                let theta = 1.0 - tau + big_a;
                n * (theta * theta + big_b).powf(b) * (-big_c - big_d * (tau - 1.0).powi(2)).exp()
            })
            .sum();
        power + gaussian + non_analytic
    }

    /// Pressure and (∂p/∂ρ)_T at density `rho`: all a density solver needs.
    pub fn pressure(&self, rho: f64) -> (f64, f64) {
        let eq = self.eq;
        let delta = rho / (eq.fluid.molar_mass * eq.fluid.rho_reducing);
        let r = self.residual(delta);
        let rt = eq.r_specific() * self.t;
        (
            rho * rt * (1.0 + delta * r.d),
            rt * (1.0 + delta * (2.0 * r.d + delta * r.dd)),
        )
    }

    /// αʳ and its δ-derivatives at `delta` (the τ-derivatives are not needed along an
    /// isotherm, and carbon dioxide's dual numbers carry δ alone).
    pub fn residual(&self, delta: f64) -> Isothermal {
        let eq = self.eq;
        let id = 1.0 / delta;
        let mut delta_k = [1.0; MAX_D + 1];
        for k in 1..=MAX_D {
            delta_k[k] = delta_k[k - 1] * delta;
        }
        let mut exp_l = [1.0; MAX_L + 1];
        for l in 1..=MAX_L {
            if eq.uses_l[l] {
                exp_l[l] = (-delta_k[l]).exp();
            }
        }
        let mut o = Derivatives::default();
        let (mut sd, mut sdd) = (0.0, 0.0);
        for (p, c) in eq.power.iter().zip(&self.power) {
            let dl = if p.l == 0 { 0.0 } else { delta_k[p.l] };
            let v = c * delta_k[p.di] * exp_l[p.l];
            let big_d = p.d - p.lf * dl;
            o.a += v;
            sd += v * big_d;
            sdd += v * (big_d * (big_d - 1.0) - p.l2 * dl);
        }
        o.d = sd * id;
        o.dd = sdd * id * id;
        let ld = delta.ln();
        for (&[_, d, _, eta, eps, ..], g) in eq.gaussian.iter().zip(&self.gaussian) {
            let x = delta - eps;
            let v = g * (d * ld - eta * x * x).exp();
            let fd = d * id - 2.0 * eta * x;
            o.a += v;
            o.d += v * fd;
            o.dd += v * (fd * fd - d * id * id - 2.0 * eta);
        }
        if !eq.non_analytic.is_empty() {
            eq.add_non_analytic::<false>(delta, self.tau, &mut o);
        }
        Isothermal {
            a: o.a,
            d: o.d,
            dd: o.dd,
        }
    }
}

/// One gas's equation of state, as the file gives it (molar basis, SI).
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Fluid {
    /// pvhazard's name of the gas.
    pub gas: String,
    /// The paper(s) the equation is published in.
    pub reference: String,
    /// Air: a mixture treated as one fluid; its phase boundary is then only approximate.
    pub pseudo_pure: bool,
    /// Molar mass used by the equation, kg/mol.
    pub molar_mass: f64,
    /// The equation's own molar gas constant, J/(mol·K).
    pub gas_constant: f64,
    /// Reducing temperature T_r of τ = T_r/T, K.
    pub t_reducing: f64,
    /// Reducing molar density ρ_r of δ = ρ/ρ_r, mol/m³.
    pub rho_reducing: f64,
    /// Critical temperature, K.
    pub t_critical: f64,
    /// Critical pressure, Pa.
    pub p_critical: f64,
    /// Critical molar density, mol/m³.
    pub rho_critical: f64,
    /// Triple-point temperature (helium: the lambda point), K.
    pub t_triple: f64,
    /// Highest temperature the equation is stated for, K.
    pub t_max: f64,
    /// Highest pressure the equation is stated for, Pa.
    pub p_max: f64,
    ideal: Ideal,
    residual: Residual,
    /// Ancillary saturation curves: starting guesses for the phase-equilibrium solver.
    pub ancillary: Ancillaries,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct Ideal {
    lead: [f64; 2],
    log_tau: f64,
    power: Columns,
    planck_einstein: Columns,
    planck_generalized: Columns,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct Residual {
    power: Columns,
    gaussian: Columns,
    non_analytic: Columns,
}

/// Coefficient columns of one kind of term, by the names the file uses.
#[derive(Debug, Deserialize)]
#[serde(transparent)]
struct Columns(std::collections::BTreeMap<String, Vec<f64>>);

impl Columns {
    /// The rows of the named columns; panics on a malformed file, which the tests rule out.
    fn rows<const N: usize>(&self, names: [&str; N]) -> Vec<[f64; N]> {
        let cols = names.map(|n| {
            self.0
                .get(n)
                .unwrap_or_else(|| panic!("coefficient column {n} missing"))
        });
        let len = cols[0].len();
        assert!(
            cols.iter().all(|c| c.len() == len),
            "ragged coefficient columns"
        );
        (0..len).map(|i| cols.map(|c| c[i])).collect()
    }
}

/// The three ancillary curves of a gas.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Ancillaries {
    /// Saturation (vapour) pressure.
    pub p_sat: Ancillary,
    /// Saturated-liquid molar density.
    pub rho_liquid: Ancillary,
    /// Saturated-vapour molar density.
    pub rho_vapour: Ancillary,
}

/// x/x_r = exp((T_r/T)·Σ n·θ^t) or 1 + Σ n·θ^t, θ = 1 − T/T_r.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Ancillary {
    kind: AncillaryKind,
    n: Vec<f64>,
    t: Vec<f64>,
    t_r: f64,
    reducing: f64,
    tau_r: bool,
    t_min: f64,
    t_max: f64,
}

#[derive(Debug, Clone, Copy, Deserialize)]
#[serde(rename_all = "lowercase")]
enum AncillaryKind {
    Exponential,
    Linear,
}

impl Ancillary {
    /// The curve's value at `t` (clamped to the range it was fitted over).
    pub fn at(&self, t: f64) -> f64 {
        let t = t.clamp(self.t_min, self.t_max.min(self.t_r));
        let theta = 1.0 - t / self.t_r;
        // θ^e through one logarithm (cheaper than a `powf` a term); θ = 0 at the top.
        let ln_theta = theta.ln();
        let sum: f64 = self
            .n
            .iter()
            .zip(&self.t)
            .map(|(n, e)| {
                n * if theta > 0.0 {
                    (e * ln_theta).exp()
                } else {
                    theta.powf(*e)
                }
            })
            .sum();
        match self.kind {
            AncillaryKind::Exponential => {
                let f = if self.tau_r { self.t_r / t } else { 1.0 };
                self.reducing * (f * sum).exp()
            }
            AncillaryKind::Linear => self.reducing * (1.0 + sum),
        }
    }
}

/// An equation of state ready to evaluate: the file's columns turned into term rows.
#[derive(Debug)]
pub struct Equation {
    /// The constants and ancillaries from the file.
    pub fluid: Fluid,
    power: Vec<PowerTerm>,
    /// Which l the power terms use: the exp(−δ^l) an isotherm evaluates.
    uses_l: [bool; MAX_L + 1],
    gaussian: Vec<[f64; 7]>,
    non_analytic: Vec<[f64; 8]>,
    ideal_power: Vec<[f64; 2]>,
    planck: Vec<[f64; 2]>,
    planck_generalized: Vec<[f64; 4]>,
    /// Saturation pressure at the triple point, Pa (from the equation itself).
    pub p_triple: f64,
    /// The highest temperature the two-phase solver accepts, K.
    pub t_sat_max: f64,
    /// Saturation pressure there, Pa.
    pub p_sat_max: f64,
    /// Where the gas stays a gas below the triple point, if it can be there at all.
    pub sublimation: Option<super::Sublimation>,
}

/// Every equation in the file, parsed once.
pub fn equations() -> &'static [Equation] {
    static ALL: OnceLock<Vec<Equation>> = OnceLock::new();
    ALL.get_or_init(|| {
        #[derive(Deserialize)]
        struct File {
            fluids: Vec<Fluid>,
        }
        let file: File =
            serde_json::from_str(COEFFICIENTS).expect("data/equations_of_state.json is valid");
        file.fluids
            .into_iter()
            .map(|f| {
                let mut eq = Equation::new(f);
                eq.t_sat_max = eq.highest_saturation_temperature();
                let psat = |t: f64| eq.saturation_t(t).map_or(f64::NAN, |s| s.p);
                (eq.p_triple, eq.p_sat_max) = (psat(eq.fluid.t_triple), psat(eq.t_sat_max));
                eq
            })
            .collect()
    })
}

/// The equation of state of the gas called `name`, if there is one.
pub fn equation(name: &str) -> Option<&'static Equation> {
    equations().iter().find(|e| e.fluid.gas == name)
}

impl Equation {
    fn new(fluid: Fluid) -> Equation {
        let r = &fluid.residual;
        let i = &fluid.ideal;
        let non_analytic = r
            .non_analytic
            .rows(["n", "a", "b", "beta", "A", "B", "C", "D"]);
        assert!(
            non_analytic.len() <= MAX_NON_ANALYTIC,
            "{} has more than {MAX_NON_ANALYTIC} non-analytic terms",
            fluid.gas
        );
        let power: Vec<PowerTerm> = r
            .power
            .rows(["n", "d", "t", "l"])
            .into_iter()
            .map(PowerTerm::new)
            .collect();
        let mut uses_l = [false; MAX_L + 1];
        for p in &power {
            uses_l[p.l] = true;
        }
        Equation {
            power,
            uses_l,
            gaussian: r
                .gaussian
                .rows(["n", "d", "t", "eta", "epsilon", "beta", "gamma"]),
            non_analytic,
            ideal_power: i.power.rows(["n", "t"]),
            planck: i.planck_einstein.rows(["n", "t"]),
            planck_generalized: i.planck_generalized.rows(["n", "t", "c", "d"]),
            sublimation: super::sublimation::of(&fluid.gas),
            fluid,
            p_triple: f64::NAN,
            t_sat_max: f64::NAN,
            p_sat_max: f64::NAN,
        }
    }

    /// The ideal-gas part α⁰(δ, τ) and its derivatives.
    pub fn ideal(&self, delta: f64, tau: f64) -> Derivatives {
        let i = &self.fluid.ideal;
        let [a1, a2] = i.lead;
        let c = i.log_tau;
        let ln_tau = tau.ln();
        let mut out = Derivatives {
            a: delta.ln() + a1 + a2 * tau + c * ln_tau,
            d: 1.0 / delta,
            dd: -1.0 / (delta * delta),
            t: a2 + c / tau,
            tt: -c / (tau * tau),
            dt: 0.0,
        };
        for &[n, t] in &self.ideal_power {
            let v = n * (t * ln_tau).exp();
            out.a += v;
            out.t += v * t / tau;
            out.tt += v * t * (t - 1.0) / (tau * tau);
        }
        for &[n, t] in &self.planck {
            // n·ln(1 − e^(−tτ))
            let e = (t * tau).exp();
            out.a += n * (-(-t * tau).exp()).ln_1p();
            out.t += n * t / (e - 1.0);
            out.tt -= n * t * t * e / ((e - 1.0) * (e - 1.0));
        }
        for &[n, t, c, d] in &self.planck_generalized {
            // n·ln(c + d·e^(tτ))
            let e = d * (t * tau).exp();
            let s = c + e;
            out.a += n * s.ln();
            out.t += n * t * e / s;
            out.tt += n * t * t * c * e / (s * s);
        }
        out
    }

    /// The equation along the isotherm at `t` (K), for many densities in turn (the phase
    /// equilibrium and density solvers): each term's τ-factor is taken once here, so a
    /// density then costs an `exp` for each distinct l of the power terms, not one for each
    /// term.
    pub fn isotherm(&self, t: f64) -> Isotherm<'_> {
        let tau = self.fluid.t_reducing / t;
        let lt = tau.ln();
        Isotherm {
            eq: self,
            t,
            tau,
            power: self.power.iter().map(|p| p.n * (p.t * lt).exp()).collect(),
            gaussian: self
                .gaussian
                .iter()
                .map(|&[n, _, t, _, _, beta, gamma]| {
                    n * (t * lt - beta * (tau - gamma) * (tau - gamma)).exp()
                })
                .collect(),
        }
    }

    /// The residual part αʳ(δ, τ) and its derivatives.
    pub fn residual(&self, delta: f64, tau: f64) -> Derivatives {
        let (ld, lt) = (delta.ln(), tau.ln());
        let (id, it) = (1.0 / delta, 1.0 / tau);
        let mut o = Derivatives::default();
        // δ^l for every l the power terms use, by multiplication.
        let mut delta_l = [1.0; MAX_L + 1];
        for k in 1..=MAX_L {
            delta_l[k] = delta_l[k - 1] * delta;
        }
        // Sums before the common factors 1/δ, 1/τ are applied once at the end.
        let (mut sd, mut sdd, mut st, mut stt, mut sdt) = (0.0, 0.0, 0.0, 0.0, 0.0);
        for p in &self.power {
            let dl = if p.l == 0 { 0.0 } else { delta_l[p.l] };
            let v = p.n * (p.d * ld + p.t * lt - dl).exp();
            let big_d = p.d - p.lf * dl;
            o.a += v;
            sd += v * big_d;
            sdd += v * (big_d * (big_d - 1.0) - p.l2 * dl);
            st += v * p.t;
            stt += v * p.t_t1;
            sdt += v * big_d * p.t;
        }
        o.d = sd * id;
        o.dd = sdd * id * id;
        o.t = st * it;
        o.tt = stt * it * it;
        o.dt = sdt * id * it;
        for &[n, d, t, eta, eps, beta, gamma] in &self.gaussian {
            let (x, y) = (delta - eps, tau - gamma);
            let v = n * (d * ld + t * lt - eta * x * x - beta * y * y).exp();
            let fd = d * id - 2.0 * eta * x;
            o.a += v;
            o.d += v * fd;
            o.dd += v * (fd * fd - d * id * id - 2.0 * eta);
            let ft = t * it - 2.0 * beta * y;
            o.t += v * ft;
            o.tt += v * (ft * ft - t * it * it - 2.0 * beta);
            o.dt += v * fd * ft;
        }
        if !self.non_analytic.is_empty() {
            self.add_non_analytic::<true>(delta, tau, &mut o);
        }
        o
    }

    /// Adds the non-analytic terms to `o`, through dual numbers.
    #[inline(always)]
    fn add_non_analytic<const TAU: bool>(&self, delta: f64, tau: f64, o: &mut Derivatives) {
        let x = Dual::<TAU>::var(non_analytic_delta(delta), 0);
        let y = Dual::<TAU>::var(tau, 1);
        let dm1 = x - 1.0;
        let sq = dm1 * dm1;
        let tm1 = y - 1.0;
        // The terms of an equation share their powers of (δ − 1)²: each is taken once, a
        // whole or half-whole power by multiplication ((δ − 1)^(2k) = sq^⌊k⌋·|δ − 1|), any
        // other through one logarithm (powers are the costly part of these terms).
        let ln_sq = sq.v.ln();
        let mut powers = [(f64::NAN, sq); 2 * MAX_NON_ANALYTIC];
        let mut sq_pow = |k: f64| -> Dual<TAU> {
            let slot = powers
                .iter()
                .position(|(e, _)| *e == k || e.is_nan())
                .expect("two powers a term");
            if powers[slot].0.is_nan() {
                let value = if (2.0 * k).fract() == 0.0 && k >= 0.0 {
                    let whole = sq.v.powi(k.floor() as i32);
                    if k.fract() == 0.0 {
                        whole
                    } else {
                        whole * dm1.v.abs()
                    }
                } else {
                    (k * ln_sq).exp()
                };
                powers[slot] = (k, sq.pow_of(k, value));
            }
            powers[slot].1
        };
        // A term whose Δ has the same constants as the term before reuses it (and its
        // logarithm): carbon dioxide's first two terms share it.
        let mut last: Option<(&[f64; 8], Dual<TAU>, f64)> = None;
        for row @ &[n, a, b, beta, big_a, big_b, big_c, big_d] in &self.non_analytic {
            let (cap_delta, ln_cap_delta) = match last {
                Some((l, c, lc)) if l[1] == a && l[3..6] == row[3..6] => (c, lc),
                _ => {
                    let theta = (1.0 - y) + sq_pow(0.5 / beta) * big_a;
                    let c = theta * theta + sq_pow(a) * big_b;
                    (c, c.v.ln())
                }
            };
            // Δ^b·ψ as one exponential: exp(b·ln Δ − C·(δ − 1)² − D·(τ − 1)²).
            let exponent = cap_delta.ln_of(ln_cap_delta) * b + sq * (-big_c) + tm1 * tm1 * (-big_d);
            let term = exponent.exp() * x * n;
            o.a += term.v;
            o.d += term.d;
            o.dd += term.dd;
            if TAU {
                o.t += term.t;
                o.tt += term.tt;
                o.dt += term.dt;
            }
            last = Some((row, cap_delta, ln_cap_delta));
        }
    }
}

/// The largest exponent l of the power terms' exp(−δ^l) the file may use.
const MAX_L: usize = 8;

/// The largest exponent d of the power terms' δ^d the file may use.
const MAX_D: usize = 12;

/// The most non-analytic terms an equation may have.
const MAX_NON_ANALYTIC: usize = 3;

/// A power term n·δ^d·τ^t·exp(−δ^l) with the constants its derivatives need.
#[derive(Debug)]
struct PowerTerm {
    n: f64,
    d: f64,
    /// d as an index into powers of δ.
    di: usize,
    t: f64,
    /// t·(t − 1).
    t_t1: f64,
    l: usize,
    lf: f64,
    /// l².
    l2: f64,
}

impl PowerTerm {
    fn new([n, d, t, l]: [f64; 4]) -> PowerTerm {
        assert!(
            l >= 0.0 && l <= MAX_L as f64 && l.fract() == 0.0,
            "exponent l = {l} of a power term is not a whole number up to {MAX_L}"
        );
        assert!(
            d >= 0.0 && d <= MAX_D as f64 && d.fract() == 0.0,
            "exponent d = {d} of a power term is not a whole number up to {MAX_D}"
        );
        PowerTerm {
            n,
            d,
            di: d as usize,
            t,
            t_t1: t * (t - 1.0),
            l: l as usize,
            lf: l,
            l2: l * l,
        }
    }
}

/// The non-analytic terms have a removable singularity in their second δ-derivative at
/// exactly δ = 1; evaluate a hair away from it there.
fn non_analytic_delta(delta: f64) -> f64 {
    if (delta - 1.0).abs() < 1e-9 {
        1.0 + 1e-9
    } else {
        delta
    }
}

/// A second-order dual number in two variables (δ, τ): a value with its first and second
/// partial derivatives, carried exactly through arithmetic. Without `TAU` it carries δ alone
/// (its τ-parts stay zero and cost nothing).
#[derive(Debug, Clone, Copy)]
struct Dual<const TAU: bool> {
    v: f64,
    d: f64,
    t: f64,
    dd: f64,
    dt: f64,
    tt: f64,
}

/// `f` where the τ-parts are carried, zero where they are not.
#[inline(always)]
fn tau_part<const TAU: bool>(f: impl FnOnce() -> f64) -> f64 {
    if TAU {
        f()
    } else {
        0.0
    }
}

impl<const TAU: bool> Dual<TAU> {
    /// δ (`which` = 0) or τ (`which` = 1) at `v`.
    fn var(v: f64, which: usize) -> Self {
        Dual {
            v,
            d: f64::from(u8::from(which == 0)),
            t: tau_part::<TAU>(|| f64::from(u8::from(which == 1))),
            dd: 0.0,
            dt: 0.0,
            tt: 0.0,
        }
    }

    /// f(self) given f, f′ and f″ at the value.
    fn chain(self, f: f64, f1: f64, f2: f64) -> Self {
        Dual {
            v: f,
            d: f1 * self.d,
            t: tau_part::<TAU>(|| f1 * self.t),
            dd: f2 * self.d * self.d + f1 * self.dd,
            dt: tau_part::<TAU>(|| f2 * self.d * self.t + f1 * self.dt),
            tt: tau_part::<TAU>(|| f2 * self.t * self.t + f1 * self.tt),
        }
    }

    fn exp(self) -> Self {
        let e = self.v.exp();
        self.chain(e, e, e)
    }

    /// ln(`self`), given that logarithm's value `f` (a positive argument).
    fn ln_of(self, f: f64) -> Self {
        let f1 = 1.0 / self.v;
        self.chain(f, f1, -f1 * f1)
    }

    /// `self` to the power `k`, given that power's value `f` (a positive base).
    fn pow_of(self, k: f64, f: f64) -> Self {
        let f1 = k * f / self.v;
        self.chain(f, f1, (k - 1.0) * f1 / self.v)
    }
}

impl<const TAU: bool> std::ops::Add for Dual<TAU> {
    type Output = Self;
    fn add(self, o: Self) -> Self {
        Dual {
            v: self.v + o.v,
            d: self.d + o.d,
            t: tau_part::<TAU>(|| self.t + o.t),
            dd: self.dd + o.dd,
            dt: tau_part::<TAU>(|| self.dt + o.dt),
            tt: tau_part::<TAU>(|| self.tt + o.tt),
        }
    }
}

impl<const TAU: bool> std::ops::Mul for Dual<TAU> {
    type Output = Self;
    fn mul(self, o: Self) -> Self {
        Dual {
            v: self.v * o.v,
            d: self.d * o.v + self.v * o.d,
            t: tau_part::<TAU>(|| self.t * o.v + self.v * o.t),
            dd: self.dd * o.v + 2.0 * self.d * o.d + self.v * o.dd,
            dt: tau_part::<TAU>(|| self.dt * o.v + self.d * o.t + self.t * o.d + self.v * o.dt),
            tt: tau_part::<TAU>(|| self.tt * o.v + 2.0 * self.t * o.t + self.v * o.tt),
        }
    }
}

impl<const TAU: bool> std::ops::Mul<f64> for Dual<TAU> {
    type Output = Self;
    fn mul(self, k: f64) -> Self {
        Dual {
            v: self.v * k,
            d: self.d * k,
            t: tau_part::<TAU>(|| self.t * k),
            dd: self.dd * k,
            dt: tau_part::<TAU>(|| self.dt * k),
            tt: tau_part::<TAU>(|| self.tt * k),
        }
    }
}

impl<const TAU: bool> std::ops::Sub<f64> for Dual<TAU> {
    type Output = Self;
    fn sub(self, k: f64) -> Self {
        Dual {
            v: self.v - k,
            ..self
        }
    }
}

impl<const TAU: bool> std::ops::Sub<Dual<TAU>> for f64 {
    type Output = Dual<TAU>;
    fn sub(self, x: Dual<TAU>) -> Dual<TAU> {
        Dual {
            v: self - x.v,
            ..x * -1.0
        }
    }
}
