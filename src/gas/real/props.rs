//! Properties at a given density and temperature, where a Helmholtz equation is explicit.

use super::helmholtz::{Derivatives, Equation};

/// Every property at one (ρ, T), mass basis, SI. Caloric values (u, h, s, a, g) use the
/// equation's own reference state: compare differences only.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Props {
    /// Mass density, kg/m³.
    pub rho: f64,
    /// Temperature, K.
    pub t: f64,
    /// Pressure, Pa.
    pub p: f64,
    /// (∂p/∂ρ) at constant T, Pa·m³/kg.
    pub dp_drho: f64,
    /// (∂p/∂T) at constant ρ, Pa/K.
    pub dp_dt: f64,
    /// Specific internal energy, J/kg.
    pub u: f64,
    /// Specific enthalpy, J/kg.
    pub h: f64,
    /// Specific entropy, J/(kg·K).
    pub s: f64,
    /// Specific Helmholtz energy, J/kg.
    pub a: f64,
    /// Isochoric heat capacity, J/(kg·K).
    pub cv: f64,
    /// Isobaric heat capacity, J/(kg·K) (infinite on a spinodal).
    pub cp: f64,
    /// Square of the speed of sound, m²/s² (negative inside a spinodal).
    pub w2: f64,
}

impl Props {
    /// Specific Gibbs energy g = h − T·s, J/kg.
    pub fn g(&self) -> f64 {
        self.h - self.t * self.s
    }

    /// Compressibility factor Z = p/(ρ·R·T) with the equation's R.
    pub fn z(&self, eq: &Equation) -> f64 {
        self.p / (self.rho * eq.r_specific() * self.t)
    }
}

impl Equation {
    /// The equation's specific gas constant R/M, J/(kg·K).
    pub fn r_specific(&self) -> f64 {
        self.fluid.gas_constant / self.fluid.molar_mass
    }

    /// δ and τ at mass density `rho` and temperature `t`.
    pub fn reduced(&self, rho: f64, t: f64) -> (f64, f64) {
        (
            rho / (self.fluid.molar_mass * self.fluid.rho_reducing),
            self.fluid.t_reducing / t,
        )
    }

    /// Every property at (ρ, T).
    pub fn props(&self, rho: f64, t: f64) -> Props {
        let (delta, tau) = self.reduced(rho, t);
        let r = self.residual(delta, tau);
        let i = self.ideal(delta, tau);
        from_derivatives(self.r_specific(), rho, t, delta, tau, &i, &r)
    }
}

fn from_derivatives(
    rs: f64,
    rho: f64,
    t: f64,
    delta: f64,
    tau: f64,
    i: &Derivatives,
    r: &Derivatives,
) -> Props {
    let rt = rs * t;
    let p = rho * rt * (1.0 + delta * r.d);
    let dp_drho = rt * (1.0 + delta * (2.0 * r.d + delta * r.dd));
    let dp_dt = rho * rs * (1.0 + delta * r.d - delta * tau * r.dt);
    let u = rt * tau * (i.t + r.t);
    let s = rs * (tau * (i.t + r.t) - i.a - r.a);
    let cv = -rs * tau * tau * (i.tt + r.tt);
    let cp = cv + t * dp_dt * dp_dt / (rho * rho * dp_drho);
    let w2 = dp_drho + t * dp_dt * dp_dt / (rho * rho * cv);
    Props {
        rho,
        t,
        p,
        dp_drho,
        dp_dt,
        u,
        h: u + p / rho,
        s,
        a: rt * (i.a + r.a),
        cv,
        cp,
        w2,
    }
}
