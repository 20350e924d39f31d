//! Where a gas below its triple-point temperature stays a gas: under its sublimation
//! pressure. Only carbon dioxide needs it here: its triple point (216.59 K, 5.18 bar) lies
//! above atmospheric pressure, so an expansion to ambient can end below the triple-point
//! temperature as a gas. The other gases' triple-point pressures are far below any ambient.

/// A sublimation-pressure curve ln(p/p_t) = (T_t/T)·Σ a_i·(1 − T/T_t)^(e_i).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Sublimation {
    /// Triple-point temperature, K.
    pub t_triple: f64,
    /// Triple-point pressure, Pa.
    pub p_triple: f64,
    /// Coefficients a_i and exponents e_i.
    terms: [(f64, f64); 3],
    /// The lowest temperature at which the gas is evaluated, K.
    pub t_floor: f64,
}

/// Carbon dioxide's sublimation pressure.
///
/// source: R. Span & W. Wagner, J. Phys. Chem. Ref. Data 25 (1996) 1509, eq. 3.12:
/// a = −14.740846, 2.4327015, −5.3061778 with exponents 1, 1.9, 2.9; T_t = 216.592 K,
/// p_t = 0.51795 MPa. It gives 1 atm at 194.69 K (the normal sublimation point, 194.686 K).
/// The gas is evaluated down to 150 K (sublimation pressure 0.84 kPa), below any
/// ambient pressure the tool accepts: there the equation of state is extrapolated into a
/// dilute gas, where it stays close to ideal.
pub const CARBON_DIOXIDE: Sublimation = Sublimation {
    t_triple: 216.592,
    p_triple: 0.517_95e6,
    terms: [(-14.740_846, 1.0), (2.432_701_5, 1.9), (-5.306_177_8, 2.9)],
    t_floor: 150.0,
};

/// The sublimation curve of the gas called `name`, if it has one here.
pub fn of(name: &str) -> Option<Sublimation> {
    (name == "carbon-dioxide").then_some(CARBON_DIOXIDE)
}

impl Sublimation {
    /// Sublimation pressure at `t` (K, at or below the triple point), Pa.
    pub fn pressure(&self, t: f64) -> f64 {
        let theta = 1.0 - t / self.t_triple;
        let sum: f64 = self
            .terms
            .iter()
            .map(|&(a, e)| a * theta.max(0.0).powf(e))
            .sum();
        self.p_triple * (self.t_triple / t * sum).exp()
    }

    /// Sublimation temperature at `p` (Pa, below the triple-point pressure), K; `None`
    /// where it would lie below the floor. Bisection: the curve rises steadily with T.
    pub fn temperature(&self, p: f64) -> Option<f64> {
        if !(p > 0.0 && p <= self.p_triple && p >= self.pressure(self.t_floor)) {
            return None;
        }
        crate::solve::root(
            |t| self.pressure(t).ln() - p.ln(),
            self.t_floor,
            self.t_triple,
            1e-12,
        )
        .ok()
    }

    /// Whether gas at (p, T) below the triple point stays a gas (at or under the
    /// sublimation pressure, at or above the floor).
    pub fn gas_at(&self, p: f64, t: f64) -> bool {
        t >= self.t_floor && p <= self.pressure(t)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn carbon_dioxide_sublimes_at_one_atmosphere_at_194_7_k() {
        // source: Span & Wagner (1996), normal sublimation temperature 194.686 K (their
        // table 3; eq. 3.12 reproduces it to 0.01 K).
        let t = CARBON_DIOXIDE.temperature(101_325.0).unwrap();
        assert!((t - 194.686).abs() < 0.02, "{t}");
        // At the triple point the curve meets the triple-point pressure.
        assert!((CARBON_DIOXIDE.pressure(216.592) / 0.517_95e6 - 1.0).abs() < 1e-12);
        assert!(CARBON_DIOXIDE.gas_at(101_325.0, 204.0));
        assert!(!CARBON_DIOXIDE.gas_at(101_325.0, 190.0));
    }
}
