#!/usr/bin/env python3
"""Regenerates the real-gas reference tables in tests/reference/ from general-purpose libraries.

    pip install -r tools/requirements.txt
    python3 tools/real_gas_tables.py            # writes tests/reference/*.csv and its README.md

(except transport.csv, which tools/transport_table.py writes; its paragraph in the README is
written here.)

The tables are what the project's tests check pvhazard's real-gas model and rules against;
pvhazard itself never calls these libraries (they check us, so they cannot also compute for us).

CoolProp (HEOS backend) supplies the reference multiparameter Helmholtz-energy equation of
state of each gas. Every row is evaluated at (density, temperature), where the equation is
explicit, so each row is the equation itself, with no solver tolerance in it; densities at
(p, T) are found by Newton's method on that explicit form and polished to machine precision.
helmholtz.csv holds the equation's reduced Helmholtz terms and their derivatives, so each term
of an implementation can be checked on its own.

What is not a table lookup in a library is computed here from the equation of state by the
methods the project's rules use (stored energy, fast fill, blow-down, choked nozzle flux), so
the derived tables check pvhazard's real-gas rules end to end. Phase equilibrium is solved by
the Maxwell criterion on the equation itself (equal pressure and Gibbs energy), also for air,
which CoolProp treats as a pseudo-pure fluid whose own saturation lines come from ancillary
bubble and dew curves; for the pure fluids the Maxwell solution is checked against CoolProp's.

Before writing anything the script runs the same derived-table code on an ideal gas and checks
it against closed forms and against the ideal-gas functions of the fluids library, and checks
the real-gas code against CoolProp's own flashes and saturation, an independent integration of
a vent-down, and finite differences of the Helmholtz terms; it stops with a non-zero exit,
writing nothing, if any self-check fails. Output is deterministic: rerunning with the same
library versions gives byte-identical files.
"""
import argparse
import csv
import importlib.metadata
import json
import math
import os
import platform
import re
import sys
from collections import namedtuple

import CoolProp
import CoolProp.CoolProp as CP
import fluids.compressible
import fluids.constants
import fluids.safety_valve
import numpy
from scipy import integrate, optimize

# The versions these tables were made with; tools/requirements.txt pins the same.
PINNED = {"CoolProp": "8.0.0", "fluids": "1.3.1", "scipy": "1.17.1", "numpy": "2.4.6"}

# pvhazard's gas names -> CoolProp's fluid names, shared by the scripts.
from gases import GASES  # noqa: E402
# transport.csv is written by its own script; its README paragraph is written here.
import transport_table  # noqa: E402

P_ATM = 101325.0
BAR = 1e5
# Energy properties are tabulated as differences from this state of each gas (gas phase for all
# eight), because absolute u, h, s depend on each library's reference state.
T_REF, P_REF = 300.0, P_ATM

# Property grid: service temperatures 200-400 K at pressures to 1000 bar (or the equation's
# limit), plus colder temperatures that vent-downs reach, and a few fill temperatures.
GRID_T = [90.0, 100.0, 110.0, 125.0, 150.0, 175.0, 200.0, 225.0, 233.15, 250.0, 273.15, 288.15,
          293.15, 300.0, 313.15, 325.0, 338.15, 350.0, 358.15, 375.0, 400.0]
GRID_P = [1e3, 1e4, 0.5 * BAR, 1 * BAR, P_ATM, 2 * BAR, 5 * BAR, 10 * BAR, 20 * BAR, 35 * BAR,
          50 * BAR, 70 * BAR, 100 * BAR, 150 * BAR, 200 * BAR, 250 * BAR, 300 * BAR, 350 * BAR,
          400 * BAR, 500 * BAR, 600 * BAR, 700 * BAR, 800 * BAR, 900 * BAR, 1000 * BAR]
P_GRID_MAX = 1000 * BAR
# Grid points this close to the saturation pressure (relative) are left out: which root a
# solver should take there is a matter of tolerance, not of physics.
SAT_BAND = 0.02

State = namedtuple("State", "rho T p u h s cv cp w dpdrho")


class OutOfRange(Exception):
    """A state the equation of state does not cover (below the triple point, say)."""


# --------------------------------------------------------------------------------------------
# Fluids: one interface, a CoolProp equation of state or an ideal gas behind it.


class RealFluid:
    """A CoolProp HEOS equation of state, evaluated only where it is explicit: at (rho, T)."""

    def __init__(self, name, cp_name):
        self.name, self.cp_name = name, cp_name
        self.raw = CP.AbstractState("HEOS", cp_name)
        # An imposed phase makes CoolProp evaluate the equation as it is at (rho, T), with no
        # phase split of its own; the Maxwell construction below does the splitting.
        self.raw.specify_phase(CP.iphase_gas)
        self.flash = CP.AbstractState("HEOS", cp_name)
        f = self.flash
        self.M = f.molar_mass()
        self.R_molar = f.gas_constant()
        self.R = self.R_molar / self.M
        self.Tc, self.pc, self.rhoc = f.T_critical(), f.p_critical(), f.rhomass_critical()
        self.Ttriple = f.Ttriple()
        self.Tmin, self.Tmax, self.pmax = f.Tmin(), f.Tmax(), f.pmax()
        self.pseudo_pure = CP.get_fluid_param_string(cp_name, "pure") == "false"
        # delta = rho / rho_r and tau = T_r / T use the equation's reducing point, which for air
        # (the maxcondentherm) is not its critical point.
        self.T_red, self.rhomolar_red = f.T_reducing(), f.rhomolar_reducing()
        self.eos = json.loads(CP.get_fluid_param_string(cp_name, "JSON"))[0]["EOS"][0]

    def at(self, rho, T):
        r = self.raw
        r.update(CP.DmassT_INPUTS, rho, T)
        return State(rho, T, r.p(), r.umass(), r.hmass(), r.smass(), r.cvmass(), r.cpmass(),
                     r.speed_sound(), r.first_partial_deriv(CP.iP, CP.iDmass, CP.iT))

    def helmholtz(self, rhomolar, T):
        """The reduced Helmholtz energy's ideal and residual parts and their derivatives at
        (rho, T): (delta, tau, alpha0, alpha0_tau, alpha0_tautau, alphar, alphar_delta,
        alphar_deltadelta, alphar_tau, alphar_tautau, alphar_deltatau, and the second virial
        coefficient B at T, m³/mol)."""
        r = self.raw
        r.update(CP.DmolarT_INPUTS, rhomolar, T)
        return (rhomolar / self.rhomolar_red, self.T_red / T, r.alpha0(), r.dalpha0_dTau(),
                r.d2alpha0_dTau2(), r.alphar(), r.dalphar_dDelta(), r.d2alphar_dDelta2(),
                r.dalphar_dTau(), r.d2alphar_dTau2(), r.d2alphar_dDelta_dTau(), r.Bvirial())

    def alpha0_offset(self):
        """(a1, a2) of CoolProp's reference-state terms, which add a1 + a2*tau to alpha0 on top
        of the published ideal part: (0, 0) where the fluid file has none."""
        terms = [t for t in self.eos["alpha0"] if t["type"] == "IdealGasHelmholtzEnthalpyEntropyOffset"]
        return sum((t["a1"] for t in terms), 0.0), sum((t["a2"] for t in terms), 0.0)

    def check_T(self, T):
        if not (self.Tmin <= T <= self.Tmax):
            raise OutOfRange(f"{self.name}: T = {T} K outside {self.Tmin}..{self.Tmax} K")

    def lowest_T(self, p):
        """The lowest fluid temperature at p: the equation's minimum or the melting line."""
        try:
            return max(self.Tmin, self.flash.melting_line(CP.iT, CP.iP, p))
        except ValueError:
            return self.Tmin  # below the melting curve's lowest pressure (the triple point)

    def check_p(self, p, T):
        """The equation's pressure limit, and the melting line: no solid states."""
        if p > self.pmax:
            raise OutOfRange(f"{self.name}: p = {p} Pa above {self.pmax} Pa")
        if T < self.lowest_T(p):
            raise OutOfRange(f"{self.name}: T = {T} K below the melting line at {p} Pa")

    def density_guess(self, p, T, phase):
        f = self.flash
        f.specify_phase(phase)
        try:
            f.update(CP.PT_INPUTS, p, T)
            return f.rhomass()
        finally:
            f.unspecify_phase()

    def saturation_guess(self, T):
        f = self.flash
        f.update(CP.QT_INPUTS, 0.0, T)
        rho_l = f.rhomass()
        f.update(CP.QT_INPUTS, 1.0, T)
        return rho_l, f.rhomass()

    def coolprop_saturation(self, T):
        """CoolProp's own saturation (for pure fluids, its Maxwell solution): p, rho_l, rho_v."""
        f = self.flash
        f.update(CP.QT_INPUTS, 0.0, T)
        p, rho_l = f.p(), f.rhomass()
        f.update(CP.QT_INPUTS, 1.0, T)
        return p, rho_l, f.rhomass()


class IdealGas:
    """A calorically perfect ideal gas with the same interface, for the self-checks."""

    def __init__(self, name, R, gamma):
        self.name, self.R, self.gamma = name, R, gamma
        self.cv = R / (gamma - 1.0)
        self.Tc = self.pc = 0.0  # never subcritical: no phase split
        self.Tmin, self.Tmax, self.pmax = 1e-6, 1e6, 1e12

    def at(self, rho, T):
        p = rho * self.R * T
        u = self.cv * T
        s = self.cv * math.log(T) - self.R * math.log(rho)
        return State(rho, T, p, u, u + p / rho, s, self.cv, self.cv + self.R,
                     math.sqrt(self.gamma * self.R * T), self.R * T)

    def check_T(self, T):
        pass

    def check_p(self, p, T):
        pass

    def lowest_T(self, p):
        return self.Tmin

    def density_guess(self, p, T, phase):
        return p / (self.R * T)


# --------------------------------------------------------------------------------------------
# Equation-of-state solvers (Newton on the explicit form, finished to machine precision).


def newton(fun, x0, what, rel=1e-13, max_iter=60):
    """Newton's method for a scalar: fun(x) -> (residual, derivative)."""
    x = x0
    for _ in range(max_iter):
        r, d = fun(x)
        step = r / d
        x -= step
        if abs(step) <= rel * abs(x):
            r, d = fun(x)  # one more step: the last one is then below rounding
            return x - r / d
    raise RuntimeError(f"no convergence: {what}")


def maxwell(fl, T):
    """Saturation at T by the Maxwell criterion on the equation itself: (p, rho_l, rho_v)."""
    fl.check_T(T)
    if T >= fl.Tc:
        raise ValueError(f"{fl.name}: no saturation at {T} K (critical {fl.Tc} K)")
    rho_l, rho_v = fl.saturation_guess(T)
    extra = 2  # steps after convergence, to take the solution to rounding level
    for _ in range(100):
        a, b = fl.at(rho_l, T), fl.at(rho_v, T)
        g_l, g_v = a.h - T * a.s, b.h - T * b.s
        f1, f2 = a.p - b.p, g_l - g_v
        # dg/drho at constant T is (dp/drho)/rho
        j11, j12, j21, j22 = a.dpdrho, -b.dpdrho, a.dpdrho / rho_l, -b.dpdrho / rho_v
        det = j11 * j22 - j12 * j21
        d_l = (f1 * j22 - f2 * j12) / det
        d_v = (j11 * f2 - j21 * f1) / det
        rho_l, rho_v = rho_l - d_l, rho_v - d_v
        if abs(d_l) <= 1e-12 * rho_l and abs(d_v) <= 1e-12 * rho_v:
            extra -= 1
            if extra < 0:
                break
    else:
        raise RuntimeError(f"{fl.name}: Maxwell solution did not converge at {T} K")
    a, b = fl.at(rho_l, T), fl.at(rho_v, T)
    if not (rho_l > fl.rhoc > rho_v):
        raise RuntimeError(f"{fl.name}: trivial Maxwell solution at {T} K")
    return 0.5 * (a.p + b.p), rho_l, rho_v


def saturation_near(fl, T):
    """maxwell(fl, T), or within 1 % of the critical temperature, where Newton's method on the
    Maxwell conditions may not converge, CoolProp's saturation (used only to pick a root side),
    or None where neither is to be had."""
    try:
        return maxwell(fl, T)
    except (RuntimeError, ValueError, ZeroDivisionError):
        if T < 0.99 * fl.Tc:
            raise
    try:
        return fl.coolprop_saturation(T)
    except ValueError:
        return None  # (air: its ancillary bubble and dew curves end before the critical point)


def saturation_temperature(fl, p):
    """Maxwell saturation temperature at p (below the critical pressure)."""
    T_lo, T_hi = fl.Ttriple, fl.Tc * 0.99
    if not (maxwell(fl, T_lo)[0] <= p <= maxwell(fl, T_hi)[0]):
        raise OutOfRange(f"{fl.name}: no liquid-vapour saturation at {p} Pa")
    return optimize.brentq(lambda T: maxwell(fl, T)[0] - p, T_lo, T_hi, xtol=1e-14, rtol=1e-15)


def density(fl, p, T, root=None):
    """Density at (p, T). Below the critical temperature the Maxwell pressure picks the root
    (or `root` = 'gas' / 'liquid' forces one); returns (rho, phase name)."""
    fl.check_T(T)
    fl.check_p(p, T)
    sat = saturation_near(fl, T) if T < fl.Tc else None
    if T < fl.Tc and sat is None and root is None:
        raise RuntimeError(f"{fl.name}: which root at {p} Pa, {T} K, this close to critical?")
    if T < fl.Tc:
        psat, rho_l, rho_v = sat or (None, 0.0, math.inf)  # no check where no saturation is known
        root = root or ("gas" if p < psat else "liquid")
        phase = root
        guess = fl.density_guess(p, T, CP.iphase_gas if root == "gas" else CP.iphase_liquid)
    else:
        phase = ("supercritical" if p >= fl.pc else "supercritical_gas")
        guess = fl.density_guess(p, T, CP.iphase_supercritical if p >= fl.pc
                                 else CP.iphase_supercritical_gas)
    rho = newton(lambda r: (lambda s: (s.p - p, s.dpdrho))(fl.at(r, T)), guess,
                 f"{fl.name} density at {p} Pa, {T} K")
    st = fl.at(rho, T)
    if st.dpdrho <= 0:
        raise RuntimeError(f"{fl.name}: mechanically unstable root at {p} Pa, {T} K")
    if T < fl.Tc:
        if (root == "gas" and rho > rho_v * (1 + 1e-9)) or (root == "liquid" and rho < rho_l * (1 - 1e-9)):
            raise RuntimeError(f"{fl.name}: {root} root landed inside the dome at {p} Pa, {T} K")
        if p >= fl.pc:
            phase = "supercritical_liquid"
    return rho, phase


def check_single_phase(fl, rho, T):
    """Raises if (rho, T) lies inside the liquid-vapour dome of the Maxwell construction."""
    sat = saturation_near(fl, T) if T < fl.Tc else None
    if sat is not None:
        _, rho_l, rho_v = sat
        if rho_v * (1 + 1e-12) < rho < rho_l * (1 - 1e-12):
            raise OutOfRange(f"{fl.name}: rho = {rho}, T = {T} K is two-phase")


def temperature_on_isentrope(fl, rho, s0, T_guess):
    """T with s(rho, T) = s0, single phase (raises OutOfRange inside the dome)."""
    try:
        # Newton's method in ln T, where ds/d(ln T) at constant rho is cv: exact in one step
        # for an ideal gas of constant cv, and nearly so for a real one.
        T = math.exp(newton(lambda x: (lambda st: (st.s - s0, st.cv))(fl.at(rho, math.exp(x))),
                            math.log(T_guess), f"{fl.name} isentrope at rho = {rho}"))
    except (RuntimeError, ValueError) as e:
        # Newton's method on the single-phase equation fails where the isentrope has entered
        # the two-phase region (or left the equation's range).
        raise OutOfRange(f"{fl.name}: no single-phase state at rho = {rho}, s = {s0}: {e}")
    fl.check_T(T)
    check_single_phase(fl, rho, T)
    return T


End = namedtuple("End", "T rho u h quality")


def isentropic_end(fl, p, s, T_start):
    """The equilibrium state at pressure p with entropy s, reached by isentropic expansion from a
    state at T_start. May be two-phase (quality = vapour mass fraction; 1 for a single-phase gas,
    empty (None) above the critical pressure or temperature)."""
    if fl.Tc > 0 and p < fl.pc and p < maxwell(fl, fl.Ttriple)[0]:
        # Below the triple-point pressure (carbon dioxide at 1 atm): a gas down to the triple
        # point, a solid below it, which the equation does not cover.
        T_lo, root = fl.Ttriple, "gas"
        if density_state(fl, p, T_lo, root).s > s:
            raise OutOfRange(f"{fl.name}: isentrope to {p} Pa ends below the triple point")
    elif fl.Tc > 0 and p < fl.pc:
        T_sat = saturation_temperature(fl, p)
        psat, rho_l, rho_v = maxwell(fl, T_sat)
        liq, vap = fl.at(rho_l, T_sat), fl.at(rho_v, T_sat)
        if s <= vap.s:
            if s < liq.s:
                raise OutOfRange(f"{fl.name}: isentrope ends in the compressed liquid")
            x = (s - liq.s) / (vap.s - liq.s)
            v = (1 - x) / rho_l + x / rho_v
            return End(T_sat, 1 / v, liq.u + x * (vap.u - liq.u), liq.h + x * (vap.h - liq.h), x)
        T_lo = T_sat * (1 + 1e-12)
        root = "gas"
    else:
        T_lo = fl.lowest_T(p) if fl.Tc > 0 else T_start * 1e-6
        root = None
        if density_state(fl, p, T_lo, root).s > s:
            raise OutOfRange(f"{fl.name}: isentrope to {p} Pa ends below {T_lo} K")
    T = optimize.brentq(lambda T: density_state(fl, p, T, root).s - s, T_lo, T_start,
                        xtol=1e-13, rtol=1e-15)
    st = density_state(fl, p, T, root)
    quality = 1.0 if p < fl.pc else None
    return End(T, st.rho, st.u, st.h, quality)


def density_state(fl, p, T, root=None):
    return fl.at(density(fl, p, T, root)[0], T)


# --------------------------------------------------------------------------------------------
# The rules' real-gas forms.


def stored_energy(fl, V, p1, T1, pa):
    """Isothermal (Helmholtz), isentropic (internal energy to the isentropic end state at pa) and
    availability (non-flow exergy, dead state pa, T1) of the gas in V at (p1, T1)."""
    s1 = density_state(fl, p1, T1)
    s0 = density_state(fl, pa, T1)
    m = s1.rho * V
    isothermal = m * ((s1.u - T1 * s1.s) - (s0.u - T1 * s0.s))
    end = isentropic_end(fl, pa, s1.s, T1)
    isentropic = m * (s1.u - end.u)
    availability = m * ((s1.u - s0.u) + pa * (1 / s1.rho - 1 / s0.rho) - T1 * (s1.s - s0.s))
    return dict(mass=m, rho1=s1.rho, isothermal=isothermal, isentropic=isentropic,
                availability=availability, end=end)


def fast_fill(fl, p_i, T_i, p_f, p_s, T_s, T_amb):
    """Adiabatic fill of a rigid tank: rho_f*u_f - rho_i*u_i = (rho_f - rho_i)*h_in, with h_in
    the supply enthalpy at (p_s, T_s). Returns T_f, rho_i, rho_f and the pressure once the
    gas (constant mass) has cooled to T_amb."""
    si = density_state(fl, p_i, T_i)
    h_in = density_state(fl, p_s, T_s).h

    def residual(T):
        sf = density_state(fl, p_f, T)
        return sf.rho * (sf.u - h_in) - si.rho * (si.u - h_in)

    T_lo = 0.9 * min(T_i, T_s)  # a fill heats the gas: the root lies above this
    T_hi = min(3 * max(T_i, T_s), fl.Tmax)
    T_f = optimize.brentq(residual, T_lo, T_hi, xtol=1e-13, rtol=1e-15)
    rho_f = density(fl, p_f, T_f)[0]
    check_single_phase(fl, rho_f, T_amb)
    return dict(T_f=T_f, rho_i=si.rho, rho_f=rho_f, settled=fl.at(rho_f, T_amb).p)


def _isentrope(fl, st):
    """The isentrope through stagnation state st, as a function of density."""
    return lambda rho: fl.at(rho, temperature_on_isentrope(fl, rho, st.s, st.T * (rho / st.rho) ** 0.3))


def sonic_state(fl, st):
    """The state on the isentrope through st where the velocity sqrt(2*(h0 - h)) equals the
    speed of sound: the throat of a choked nozzle, where rho*sqrt(2*(h0 - h)) is largest."""
    throat = _isentrope(fl, st)

    def sonic(rho):
        t = throat(rho)
        return 2 * (st.h - t.h) - t.w ** 2

    # Step down from the stagnation density, so that no state beyond the throat is visited
    # (beyond it an isentrope may enter the two-phase region that the throat never reaches).
    rho_hi = st.rho * (1 - 1e-9)
    rho_lo = rho_hi * 0.9
    while sonic(rho_lo) <= 0:
        rho_hi, rho_lo = rho_lo, rho_lo * 0.9
    return throat(optimize.brentq(sonic, rho_lo, rho_hi, xtol=1e-300, rtol=1e-15))


def nozzle_flux(fl, st, pa):
    """Isentropic nozzle from stagnation state st to back pressure pa: the mass flux
    rho*sqrt(2*(h0 - h)) at the throat, which is sonic when the sonic pressure is at or above pa
    and at pa otherwise. Returns (flux kg/(m2 s), throat State, choked)."""
    t = sonic_state(fl, st)
    if t.p >= pa:
        return t.rho * t.w, t, True
    throat = _isentrope(fl, st)
    rho_t = optimize.brentq(lambda r: throat(r).p - pa, t.rho, st.rho, xtol=1e-300, rtol=1e-15)
    t = throat(rho_t)
    return t.rho * math.sqrt(max(2 * (st.h - t.h), 0.0)), t, False


def vent(fl, process, V, p0, T0, d, Cd, pa, p_end):
    """Blow-down of a rigid vessel through an orifice to p_end: the gas left in the vessel is
    isothermal (at T0) or isentropic (adiabatic vessel), and the orifice is an isentropic
    nozzle. t = V/(Cd*A) * integral of drho/G(rho) from rho_end to rho0."""
    A = math.pi * d * d / 4
    rho0 = density(fl, p0, T0)[0]
    s0 = fl.at(rho0, T0).s
    if process == "isothermal":
        def vessel(rho):
            return fl.at(rho, T0)
    else:
        vessel = _isentrope(fl, fl.at(rho0, T0))

    if process == "isothermal":
        rho_end = density(fl, p_end, T0)[0]
    else:
        end = isentropic_end(fl, p_end, s0, T0)
        if end.quality is not None and end.quality < 1:
            raise OutOfRange(f"{fl.name}: the vessel's gas would condense before {p_end} Pa")
        rho_end = end.rho

    def inv_flux(rho):
        return 1.0 / nozzle_flux(fl, vessel(rho), pa)[0]

    def unchoking(rho):
        return sonic_state(fl, vessel(rho)).p - pa

    # The flow unchokes where the sonic throat pressure reaches pa: split the integral there.
    pieces = [rho_end, rho0]
    if unchoking(rho0) > 0 > unchoking(rho_end):
        rho_u = optimize.brentq(unchoking, rho_end, rho0, xtol=1e-300, rtol=1e-15)
        pieces = [rho_end, rho_u, rho0]
    total = 0.0
    for a, b in zip(pieces, pieces[1:]):
        val, err = integrate.quad(inv_flux, a, b, epsabs=0.0, epsrel=1e-12, limit=200)
        if err > 1e-9 * abs(val):
            raise RuntimeError(f"{fl.name}: vent quadrature error {err} on {val}")
        total += val
    end = vessel(rho_end)
    return dict(time=V / (Cd * A) * total, T_end=end.T, rho0=rho0, rho_end=rho_end,
                initial_flow=Cd * A * nozzle_flux(fl, vessel(rho0), pa)[0])


# --------------------------------------------------------------------------------------------
# Self-checks: an ideal gas through the same code against closed forms and the fluids library;
# the real gas against CoolProp's own flashes and saturation, an independent vent integration,
# and finite differences of the Helmholtz terms.


def self_checks(fluids_, helmholtz_rows):
    results = []

    def check(name, got, want, tol):
        """Relative tolerance; for want == 0, absolute."""
        ok = abs(got - want) <= tol * (abs(want) if want else 1.0)
        results.append((name, got, want, tol, ok))

    R_u = fluids.constants.R  # the molar gas constant the fluids library's functions use
    air = IdealGas("ideal air", 287.05, 1.4)
    g = air.gamma
    # Stored energy: air, gamma 1.4, 1 m3 at 1.0 MPa(g), 293.15 K, released to 101 kPa.
    pa, p1, V, T = 101e3, 1.0e6 + 101e3, 1.0, 293.15
    e = stored_energy(air, V, p1, T, pa)
    moles = p1 * V / (R_u * T)
    check("ideal isentropic energy = closed form p1 V/(g-1) (1 - (pa/p1)^((g-1)/g))", e["isentropic"],
          p1 * V / (g - 1) * (1 - (pa / p1) ** ((g - 1) / g)), 1e-12)
    check("ideal isentropic energy = n (-fluids isentropic_work_compression(p1 -> pa)) / g",
          e["isentropic"], -moles * fluids.compressible.isentropic_work_compression(
              T, g, P1=p1, P2=pa, eta=1.0) / g, 1e-12)
    check("ideal isothermal energy = p1 V ln(p1/pa)", e["isothermal"], p1 * V * math.log(p1 / pa), 1e-12)
    check("ideal isothermal energy = n fluids isothermal_work_compression(pa -> p1)", e["isothermal"],
          moles * fluids.compressible.isothermal_work_compression(pa, p1, T), 1e-12)
    check("ideal availability = closed form p1 V (ln(p1/pa) - (1 - pa/p1))", e["availability"],
          p1 * V * (math.log(p1 / pa) - (1 - pa / p1)), 1e-12)
    # Fast fill of an ideal gas of constant cp, cv: T_f = p_f / (p_i/T_i + (p_f - p_i)/(g T_s)).
    for p_i in (50 * BAR, 100 * BAR):
        f = fast_fill(air, p_i, T, 300 * BAR, 300 * BAR, T, T)
        closed = 300 * BAR / (p_i / T + (300 * BAR - p_i) / (g * T))
        check(f"ideal fill {p_i / BAR:.0f}->300 bar = closed form", f["T_f"], closed, 1e-12)
    # Nozzle: the choked flux of an ideal gas is p0*Psi/sqrt(R*T0), Psi = 0.6847 for 1.4.
    st = air.at(10 * BAR / (air.R * T), T)
    flux, throat, choked = nozzle_flux(air, st, P_ATM)
    psi = math.sqrt(g) * (2 / (g + 1)) ** ((g + 1) / (2 * (g - 1)))
    check("ideal choked flux = p0*Psi/sqrt(R T0)", flux, 10 * BAR * psi / math.sqrt(air.R * T), 1e-12)
    check("ideal critical pressure = fluids P_critical_flow", throat.p,
          fluids.compressible.P_critical_flow(10 * BAR, g), 1e-12)
    # API 520 Part 1's choked-gas sizing formula (as fluids writes it, constant 0.03948 to four
    # figures): the area that passes 1 kg/s at Kd = 1 is 1/flux.
    check("ideal choked flux: fluids API520_A_g area for 1 kg/s = 1/flux",
          fluids.safety_valve.API520_A_g(1.0, T, 1.0, 1000 * R_u / air.R, g, 10 * BAR, P_ATM, Kd=1.0),
          1.0 / flux, 1e-4)
    st = air.at(1.5 * BAR / (air.R * T), T)
    flux, throat, choked = nozzle_flux(air, st, P_ATM)
    check("ideal subsonic flux = closed form", flux, ideal_flux(air, 1.5 * BAR, T, P_ATM), 1e-12)
    # Blow-down: 1 m3 at 10 bar(g), 293.15 K, through a 10 mm orifice, Cd 1.
    p0 = 10 * BAR + P_ATM
    A = math.pi * 0.01 ** 2 / 4
    tau = 1.0 / (A * psi * math.sqrt(air.R * T))
    p = 5 * BAR + P_ATM
    v = vent(air, "isothermal", 1.0, p0, T, 0.01, 1.0, P_ATM, p)
    check("ideal isothermal vent = tau ln(p0/p)", v["time"], tau * math.log(p0 / p), 1e-9)
    v = vent(air, "isentropic", 1.0, p0, T, 0.01, 1.0, P_ATM, p)
    check("ideal isentropic vent = closed form", v["time"],
          2 * tau / (g - 1) * ((p0 / p) ** ((g - 1) / (2 * g)) - 1), 1e-9)
    check("ideal isentropic vent end temperature = fluids isentropic_T_rise_compression", v["T_end"],
          fluids.compressible.isentropic_T_rise_compression(T, p0, p, g), 1e-12)
    # Down to 1.01 pa the flow unchokes: the same integral of the closed-form fluxes, by
    # quadrature over the vessel pressure instead of the density.
    for process in ("isothermal", "isentropic"):
        v = vent(air, process, 1.0, p0, T, 0.01, 1.0, P_ATM, 1.01 * P_ATM)
        check(f"ideal {process} vent to 1.01 pa = quadrature of the closed-form flux", v["time"],
              ideal_vent_time(air, process, 1.0, p0, T, A, P_ATM, 1.01 * P_ATM), 1e-9)
    # Real gas, by other means: CoolProp's own flashes, the flux maximised by a bounded search
    # instead of the sonic condition, Gauss-Legendre quadrature over pressure.
    by_name = {fl.name: fl for fl in fluids_}
    air_r = by_name["air"]
    for process in ("isothermal", "isentropic"):
        mine = vent(air_r, process, 1.0, p0, T, 0.01, 1.0, P_ATM, p)["time"]
        check(f"real air vent 10 -> 5 bar(g), {process}: independent integration", mine,
              independent_vent_time("Air", process, 1.0, p0, T, 0.01, P_ATM, p), 1e-7)
    e = stored_energy(by_name["nitrogen"], 1.0, 200 * BAR, T, P_ATM)
    s1 = CP.PropsSI("S", "P", 200 * BAR, "T", T, "Nitrogen")
    u_end = CP.PropsSI("U", "P", P_ATM, "S", s1, "Nitrogen")
    check("real nitrogen 200 bar isentropic energy: CoolProp's (p, s) flash for the two-phase end",
          e["isentropic"], e["mass"] * (CP.PropsSI("U", "P", 200 * BAR, "T", T, "Nitrogen") - u_end), 1e-8)
    for gas, case in (("air", (P_ATM, T, 300 * BAR, 300 * BAR, T, T)),
                      ("hydrogen", (20 * BAR, 288.15, 700 * BAR, 700 * BAR, 233.15, 288.15))):
        fl = by_name[gas]
        check(f"real {gas} fill {case[0] / BAR:g} -> {case[2] / BAR:g} bar, supply {case[4]} K: "
              "CoolProp's (rho, u) flash", fast_fill(fl, *case)["T_f"],
              independent_fill_temperature(fl.cp_name, *case[:5]), 1e-9)
    # The Maxwell solution agrees with CoolProp's own saturation for the pure fluids.
    for fl in fluids_:
        if fl.pseudo_pure:
            continue
        worst = 0.0
        for frac in (0.1, 0.5, 0.9):
            T_s = fl.Ttriple + frac * (fl.Tc - fl.Ttriple)
            mine, theirs = maxwell(fl, T_s), fl.coolprop_saturation(T_s)
            worst = max(worst, max(abs(a - b) / b for a, b in zip(mine, theirs)))
        check(f"{fl.name}: Maxwell saturation p, rho_l, rho_v vs CoolProp's: worst relative difference",
              worst, 0.0, 1e-8)
    for fl in fluids_:
        rows = [dict(zip(HELMHOLTZ_HEADER, r)) for r in helmholtz_rows if r[0] == fl.name]
        check(f"{fl.name}: alpha0 = the fluid file's ideal-part terms, offset as a1 + a2 tau: worst "
              "absolute difference",
              max(abs(alpha0_from_fluid_file(fl.eos["alpha0"], r["delta"], r["tau"]) - r["alpha0"])
                  for r in rows), 0.0, 1e-12)
        check(f"{fl.name}: Z - 1 = delta dalphar_ddelta vs CoolProp's pressure: worst absolute "
              "difference",
              max(abs(z_from_pressure(fl, r["rhomolar_mol_m3"], r["T_K"]) - 1
                      - r["delta"] * r["dalphar_ddelta"]) for r in rows), 0.0, 1e-12)
        check(f"{fl.name}: Helmholtz derivatives vs central differences of the column each derives "
              "from: worst scaled difference",
              max(helmholtz_difference_error(fl, r["rhomolar_mol_m3"], r["T_K"]) for r in rows),
              0.0, 1e-6)
    return results


def ideal_flux(fl, p, T, pa):
    """Isentropic nozzle mass flux of a calorically perfect ideal gas from (p, T) to pa, choked
    or not (the textbook closed forms)."""
    g = fl.gamma
    r = max(pa / p, (2 / (g + 1)) ** (g / (g - 1)))
    return p * math.sqrt(2 * g / ((g - 1) * fl.R * T) * (r ** (2 / g) - r ** ((g + 1) / g)))


def ideal_vent_time(fl, process, V, p0, T0, A, pa, p_end):
    """Blow-down time of an ideal gas (Cd = 1): V/A times the integral over vessel pressure of
    (drho/dp)/G, with G the closed-form flux, split where the flow unchokes."""
    g = fl.gamma

    def integrand(p):
        if process == "isothermal":
            T, drho_dp = T0, 1 / (fl.R * T0)
        else:
            T = T0 * (p / p0) ** ((g - 1) / g)
            drho_dp = 1 / (g * fl.R * T)
        return drho_dp / ideal_flux(fl, p, T, pa)

    p_unchoke = pa / (2 / (g + 1)) ** (g / (g - 1))
    cuts = [p_end] + ([p_unchoke] if p_end < p_unchoke < p0 else []) + [p0]
    return V / A * sum(integrate.quad(integrand, a, b, epsabs=0.0, epsrel=1e-13, limit=200)[0]
                       for a, b in zip(cuts, cuts[1:]))


def independent_fill_temperature(cp_name, p_i, T_i, p_f, p_s, T_s):
    """Adiabatic-fill end temperature by PropsSI alone: the final density rho_f for which the
    (rho, u) flash with u_f = (rho_i u_i + (rho_f - rho_i) h_in)/rho_f gives p_f."""
    P = CP.PropsSI
    rho_i, u_i = P("D", "P", p_i, "T", T_i, cp_name), P("U", "P", p_i, "T", T_i, cp_name)
    h_in = P("H", "P", p_s, "T", T_s, cp_name)

    def u_f(rho):
        return (rho_i * u_i + (rho - rho_i) * h_in) / rho

    lo, hi = (P("D", "P", p_f, "T", t, cp_name) for t in (2 * max(T_i, T_s), 0.9 * min(T_i, T_s)))
    rho_f = optimize.brentq(lambda r: P("P", "D", r, "U", u_f(r), cp_name) - p_f, lo, hi,
                            xtol=1e-300, rtol=1e-15)
    return P("T", "D", rho_f, "U", u_f(rho_f), cp_name)


def alpha0_from_fluid_file(terms, delta, tau):
    """The ideal part as the sum of the terms in CoolProp's fluid file (only the kinds these
    eight gases use), the reference-state offset entering as a1 + a2*tau."""
    total = 0.0
    for t in terms:
        kind = t["type"]
        if kind == "IdealGasHelmholtzLead":
            total += math.log(delta) + t["a1"] + t["a2"] * tau
        elif kind == "IdealGasHelmholtzEnthalpyEntropyOffset":
            total += t["a1"] + t["a2"] * tau
        elif kind == "IdealGasHelmholtzLogTau":
            total += t["a"] * math.log(tau)
        elif kind == "IdealGasHelmholtzPower":
            total += sum(n * tau ** e for n, e in zip(t["n"], t["t"]))
        elif kind == "IdealGasHelmholtzPlanckEinstein":
            total += sum(n * math.log(1 - math.exp(-e * tau)) for n, e in zip(t["n"], t["t"]))
        elif kind == "IdealGasHelmholtzPlanckEinsteinFunctionT":
            total += sum(n * math.log(1 - math.exp(-v * tau / t["Tcrit"])) for n, v in zip(t["n"], t["v"]))
        elif kind == "IdealGasHelmholtzPlanckEinsteinGeneralized":
            total += sum(n * math.log(c + d * math.exp(e * tau))
                         for n, e, c, d in zip(t["n"], t["t"], t["c"], t["d"]))
        else:
            raise KeyError(f"ideal-part term {kind} not handled")
    return total


def z_from_pressure(fl, rhomolar, T):
    """Z = p/(rho R T) from CoolProp's pressure, with the equation's own gas constant."""
    fl.raw.update(CP.DmolarT_INPUTS, rhomolar, T)
    return fl.raw.p() / (rhomolar * fl.R_molar * T)


def helmholtz_difference_error(fl, rhomolar, T, h=1e-6):
    """The worst disagreement between each derivative column and the central difference (step
    h relative) of the column it derives from, scaled by |derivative| + |function|/|variable|."""
    delta, tau = rhomolar / fl.rhomolar_red, fl.T_red / T

    def at(d, t):
        return fl.helmholtz(d * fl.rhomolar_red, fl.T_red / t)

    base = at(delta, tau)
    hd, ht = h * delta, h * tau
    dp, dm, tp, tm = at(delta + hd, tau), at(delta - hd, tau), at(delta, tau + ht), at(delta, tau - ht)
    # (derivative column, differentiated column, d or t): indices into helmholtz()'s tuple.
    pairs = [(3, 2, "t"), (4, 3, "t"), (6, 5, "d"), (7, 6, "d"), (8, 5, "t"), (9, 8, "t"),
             (10, 6, "t"), (10, 8, "d")]
    worst = 0.0
    for der, fun, var in pairs:
        plus, minus, step, x = (dp, dm, hd, delta) if var == "d" else (tp, tm, ht, tau)
        fd = (plus[fun] - minus[fun]) / (2 * step)
        worst = max(worst, abs(fd - base[der]) / (abs(base[der]) + abs(base[fun]) / x))
    return worst


def independent_vent_time(cp_name, process, V, p0, T0, d, pa, p_end, n=40):
    """Vent time (Cd = 1) by PropsSI alone, for a vent that stays choked: t = V/A * integral
    over vessel pressure of (drho/dp)/G, G the largest rho*sqrt(2*(h0 - h)) on the isentrope."""
    P = CP.PropsSI
    s_ves = P("S", "P", p0, "T", T0, cp_name)

    def flux(pv):
        s = s_ves if process == "isentropic" else P("S", "P", pv, "T", T0, cp_name)
        h0 = P("H", "P", pv, "S", s, cp_name)

        def neg(pt):
            return -P("D", "P", pt, "S", s, cp_name) * math.sqrt(max(2 * (h0 - P("H", "P", pt, "S", s, cp_name)), 0.0))

        return -optimize.minimize_scalar(neg, bounds=(max(pa, 0.3 * pv), pv), method="bounded",
                                         options={"xatol": 1e-7 * pv}).fun

    def drho_dp(pv):
        if process == "isentropic":
            return 1.0 / P("A", "P", pv, "S", s_ves, cp_name) ** 2
        return P("d(D)/d(P)|T", "P", pv, "T", T0, cp_name)

    xs, ws = numpy.polynomial.legendre.leggauss(n)
    mid, half = (p0 + p_end) / 2, (p0 - p_end) / 2
    return V / (math.pi * d * d / 4) * sum(w * half * drho_dp(mid + half * x) / flux(mid + half * x)
                                           for x, w in zip(xs, ws))


# --------------------------------------------------------------------------------------------
# Tables.


def fmt(x):
    if x is None:
        return ""
    if isinstance(x, str):
        return x
    if isinstance(x, bool):
        return "true" if x else "false"
    if isinstance(x, int):
        return str(x)
    if not math.isfinite(x):
        raise ValueError(f"non-finite value {x}")
    return repr(float(x))


def write_csv(path, header, rows):
    with open(path, "w", newline="") as fh:
        w = csv.writer(fh, lineterminator="\n")
        w.writerow(header)
        for row in rows:
            w.writerow([fmt(x) for x in row])
    return len(rows)


def bibtex(key):
    """Citation text for a CoolProp bibliography key, from the bibliography CoolProp ships."""
    path = os.path.join(os.path.dirname(CoolProp.__file__), "CoolPropBibTeXLibrary.bib")
    with open(path, encoding="utf-8", errors="replace") as fh:
        text = fh.read()
    m = re.search(r"@\w+\{" + re.escape(key) + r",(.*?)\n\}", text, re.S)
    if not m:
        return key
    fields = {k.lower(): v.strip().strip("{}").strip() for k, v in
              re.findall(r"^\s*(\w+)\s*=\s*\{(.*)\},?\s*$", m.group(1), re.M)}
    parts = [fields.get("author", ""), f"({fields.get('year', '')})", fields.get("title", "").strip("{}")]
    where = fields.get("journal")
    if where:
        where += f" {fields.get('volume', '')}, {fields.get('pages', '')}".rstrip(", ")
        parts.append(where)
    elif fields.get("note"):
        parts.append(fields["note"])
    if fields.get("doi"):
        parts.append("doi:" + fields["doi"])
    return ". ".join(p.rstrip(".") for p in parts if p)


def eos_keys(cp_name):
    return [k.strip() for k in CP.get_fluid_param_string(cp_name, "BibTeX-EOS").split(",")]


def table_fluids(fluids_):
    header = ["gas", "coolprop_name", "eos_bibtex_keys", "pseudo_pure", "molar_mass_kg_mol",
              "eos_gas_constant_J_molK", "specific_gas_constant_J_kgK", "T_critical_K",
              "p_critical_Pa", "rho_critical_kg_m3", "T_triple_K", "p_triple_Pa",
              "T_min_K", "T_max_K", "p_max_Pa", "T_normal_boiling_K",
              "T_ref_K", "p_ref_Pa", "rho_ref_kg_m3", "cp0_300K_J_kgK", "gamma0_300K",
              "T_reducing_K", "rhomolar_reducing_mol_m3", "alpha0_offset_a1", "alpha0_offset_a2"]
    rows = []
    for fl in fluids_:
        # Triple-point pressure and normal boiling point by the Maxwell solution on the EOS.
        p_triple = maxwell(fl, fl.Ttriple)[0]
        T_nb = saturation_temperature(fl, P_ATM) if p_triple < P_ATM else None
        rho_ref = density(fl, P_REF, T_REF)[0]
        f = fl.flash
        f.update(CP.DmassT_INPUTS, rho_ref, T_REF)
        cp0 = f.cp0mass()
        rows.append([fl.name, fl.cp_name, " ".join(eos_keys(fl.cp_name)), fl.pseudo_pure, fl.M,
                     fl.R_molar, fl.R, fl.Tc, fl.pc, fl.rhoc, fl.Ttriple, p_triple,
                     fl.Tmin, fl.Tmax, fl.pmax, T_nb, T_REF, P_REF, rho_ref, cp0, cp0 / (cp0 - fl.R),
                     fl.T_red, fl.rhomolar_red, *fl.alpha0_offset()])
    return header, rows


def reference_state(fl):
    return density_state(fl, P_REF, T_REF)


def table_properties(fluids_):
    header = ["gas", "T_K", "p_Pa", "rho_kg_m3", "phase", "Z", "u_minus_ref_J_kg",
              "h_minus_ref_J_kg", "s_minus_ref_J_kgK", "cv_J_kgK", "cp_J_kgK", "w_m_s"]
    rows = []
    for fl in fluids_:
        ref = reference_state(fl)
        for T in GRID_T:
            if T < fl.Tmin + 0.5 or T > fl.Tmax:
                continue
            psat = maxwell(fl, T)[0] if T < fl.Tc else None
            for p in GRID_P:
                if p > min(fl.pmax, P_GRID_MAX) * (1 + 1e-12):
                    continue
                if psat is not None and abs(p - psat) < SAT_BAND * psat:
                    continue
                try:
                    rho, phase = density(fl, p, T)
                except OutOfRange:
                    continue  # a solid: below the melting line
                st = fl.at(rho, T)
                rows.append([fl.name, T, st.p, rho, phase, st.p / (rho * fl.R * T),
                             st.u - ref.u, st.h - ref.h, st.s - ref.s, st.cv, st.cp, st.w])
    return header, rows


def table_saturation(fluids_):
    header = ["gas", "T_K", "p_Pa", "rho_liquid_kg_m3", "rho_vapour_kg_m3",
              "u_liquid_minus_ref_J_kg", "u_vapour_minus_ref_J_kg",
              "h_liquid_minus_ref_J_kg", "h_vapour_minus_ref_J_kg",
              "s_liquid_minus_ref_J_kgK", "s_vapour_minus_ref_J_kgK"]
    rows = []
    for fl in fluids_:
        ref = reference_state(fl)
        temps = [fl.Ttriple] + [fl.Ttriple + f * (fl.Tc - fl.Ttriple) for f in
                                (0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9, 0.95)]
        if maxwell(fl, fl.Ttriple)[0] < P_ATM:
            temps.append(saturation_temperature(fl, P_ATM))
        for T in sorted(temps):
            p, rho_l, rho_v = maxwell(fl, T)
            a, b = fl.at(rho_l, T), fl.at(rho_v, T)
            rows.append([fl.name, T, p, rho_l, rho_v, a.u - ref.u, b.u - ref.u, a.h - ref.h,
                         b.h - ref.h, a.s - ref.s, b.s - ref.s])
    return header, rows


def table_energy(fluids_):
    header = ["gas", "volume_m3", "p1_Pa", "T1_K", "pa_Pa", "rho1_kg_m3", "mass_kg",
              "isothermal_J", "isentropic_J", "availability_J", "end_T_K", "end_quality"]
    rows = []
    pressures = [2 * BAR, 5 * BAR, 10 * BAR + P_ATM, 20 * BAR, 50 * BAR, 100 * BAR, 200 * BAR,
                 300 * BAR, 350 * BAR, 500 * BAR, 700 * BAR, 1000 * BAR]
    for fl in fluids_:
        for T1 in (273.15, 293.15, 313.15):
            psat = maxwell(fl, T1)[0] if T1 < fl.Tc else math.inf
            for p1 in pressures:
                if p1 > min(fl.pmax, P_GRID_MAX) or p1 > psat * (1 - SAT_BAND):
                    continue
                try:
                    e = stored_energy(fl, 1.0, p1, T1, P_ATM)
                except OutOfRange:
                    continue  # e.g. carbon dioxide expanding past its triple point: dry ice
                end = e["end"]
                rows.append([fl.name, 1.0, p1, T1, P_ATM, e["rho1"], e["mass"], e["isothermal"],
                             e["isentropic"], e["availability"], end.T, end.quality])
    return header, rows


# (gas, p_initial, T_initial, p_final, p_supply, T_supply, T_ambient)
FILL_CASES = [
    ("air", P_ATM, 293.15, 300 * BAR, 300 * BAR, 293.15, 293.15),
    ("air", 50 * BAR, 293.15, 300 * BAR, 300 * BAR, 293.15, 293.15),
    ("air", 100 * BAR, 293.15, 300 * BAR, 300 * BAR, 293.15, 293.15),
    ("air", 20 * BAR, 293.15, 300 * BAR, 300 * BAR, 293.15, 293.15),
    ("air", P_ATM, 293.15, 200 * BAR, 200 * BAR, 293.15, 293.15),
    ("air", 10 * BAR, 303.15, 200 * BAR, 250 * BAR, 313.15, 303.15),
    ("nitrogen", P_ATM, 293.15, 200 * BAR, 200 * BAR, 293.15, 293.15),
    ("nitrogen", 50 * BAR, 293.15, 200 * BAR, 200 * BAR, 293.15, 293.15),
    ("nitrogen", 20 * BAR, 293.15, 300 * BAR, 300 * BAR, 293.15, 293.15),
    ("oxygen", P_ATM, 293.15, 200 * BAR, 200 * BAR, 293.15, 293.15),
    ("oxygen", 20 * BAR, 293.15, 150 * BAR, 150 * BAR, 293.15, 293.15),
    ("argon", P_ATM, 293.15, 200 * BAR, 200 * BAR, 293.15, 293.15),
    ("argon", 20 * BAR, 293.15, 300 * BAR, 300 * BAR, 293.15, 293.15),
    ("helium", P_ATM, 293.15, 200 * BAR, 200 * BAR, 293.15, 293.15),
    ("helium", 20 * BAR, 293.15, 300 * BAR, 300 * BAR, 293.15, 293.15),
    ("hydrogen", 20 * BAR, 288.15, 700 * BAR, 700 * BAR, 233.15, 288.15),
    ("hydrogen", 20 * BAR, 288.15, 350 * BAR, 350 * BAR, 233.15, 288.15),
    ("hydrogen", 20 * BAR, 293.15, 700 * BAR, 700 * BAR, 293.15, 293.15),
    ("hydrogen", 50 * BAR, 293.15, 350 * BAR, 350 * BAR, 293.15, 293.15),
    ("hydrogen", P_ATM, 293.15, 200 * BAR, 200 * BAR, 293.15, 293.15),
    ("methane", P_ATM, 293.15, 200 * BAR, 200 * BAR, 293.15, 293.15),
    ("methane", 20 * BAR, 293.15, 250 * BAR, 250 * BAR, 293.15, 293.15),
    ("carbon-dioxide", P_ATM, 293.15, 50 * BAR, 50 * BAR, 293.15, 293.15),
    ("carbon-dioxide", 5 * BAR, 303.15, 40 * BAR, 45 * BAR, 303.15, 303.15),
]


def table_fill(by_name):
    header = ["gas", "p_initial_Pa", "T_initial_K", "p_final_Pa", "p_supply_Pa", "T_supply_K",
              "T_ambient_K", "T_final_K", "rho_initial_kg_m3", "rho_final_kg_m3",
              "mass_added_per_volume_kg_m3", "settled_pressure_Pa"]
    rows = []
    for gas, p_i, T_i, p_f, p_s, T_s, T_amb in FILL_CASES:
        r = fast_fill(by_name[gas], p_i, T_i, p_f, p_s, T_s, T_amb)
        rows.append([gas, p_i, T_i, p_f, p_s, T_s, T_amb, r["T_f"], r["rho_i"], r["rho_f"],
                     r["rho_f"] - r["rho_i"], r["settled"]])
    return header, rows


def table_nozzle(fluids_):
    header = ["gas", "p0_Pa", "T0_K", "rho0_kg_m3", "back_pressure_Pa", "choked", "throat_p_Pa",
              "throat_T_K", "throat_rho_kg_m3", "throat_velocity_m_s", "mass_flux_kg_m2s"]
    rows = []
    for fl in fluids_:
        for T0 in (250.0, 293.15, 350.0):
            psat = maxwell(fl, T0)[0] if T0 < fl.Tc else math.inf
            for p0 in (1.2 * BAR, 1.5 * BAR, 2 * BAR, 10 * BAR, 50 * BAR, 100 * BAR, 200 * BAR,
                       350 * BAR, 700 * BAR):
                if p0 > min(fl.pmax, P_GRID_MAX) or p0 > psat * (1 - SAT_BAND):
                    continue
                st = density_state(fl, p0, T0)
                try:
                    flux, t, choked = nozzle_flux(fl, st, P_ATM)
                except OutOfRange:
                    continue  # the throat would be two-phase: not a single-phase nozzle
                rows.append([fl.name, p0, T0, st.rho, P_ATM, choked, t.p, t.T, t.rho,
                             flux / t.rho, flux])
    return header, rows


# (gas, process, V m3, p0, T0, orifice d m, Cd, p_end); ambient 101325 Pa.
VENT_CASES = [
    ("air", "isothermal", 1.0, 10 * BAR + P_ATM, 293.15, 0.010, 1.0, 5 * BAR + P_ATM),
    ("air", "isentropic", 1.0, 10 * BAR + P_ATM, 293.15, 0.010, 1.0, 5 * BAR + P_ATM),
    ("air", "isothermal", 1.0, 10 * BAR + P_ATM, 293.15, 0.010, 1.0, 1.01 * P_ATM),
    ("air", "isentropic", 1.0, 10 * BAR + P_ATM, 293.15, 0.010, 1.0, 1.01 * P_ATM),
    ("air", "isentropic", 0.05, 300 * BAR, 293.15, 0.002, 0.61, 50 * BAR),
    ("nitrogen", "isothermal", 0.05, 200 * BAR, 293.15, 0.002, 0.61, 1.5 * BAR),
    ("nitrogen", "isentropic", 0.05, 200 * BAR, 293.15, 0.002, 0.61, 30 * BAR),
    ("oxygen", "isothermal", 0.05, 200 * BAR, 293.15, 0.002, 0.97, 5 * BAR),
    ("argon", "isentropic", 0.05, 200 * BAR, 293.15, 0.002, 0.97, 50 * BAR),
    ("helium", "isentropic", 0.05, 200 * BAR, 293.15, 0.002, 0.97, 2 * BAR),
    ("hydrogen", "isothermal", 0.1, 700 * BAR, 288.15, 0.001, 1.0, 2 * BAR),
    ("hydrogen", "isentropic", 0.1, 700 * BAR, 288.15, 0.001, 1.0, 20 * BAR),
    ("methane", "isentropic", 0.08, 250 * BAR, 293.15, 0.003, 0.61, 100 * BAR),
    ("methane", "isothermal", 0.08, 250 * BAR, 293.15, 0.003, 0.61, 2 * BAR),
    ("carbon-dioxide", "isothermal", 0.05, 20 * BAR, 293.15, 0.002, 0.61, 2 * BAR),
]


def table_vent(by_name):
    header = ["gas", "process", "volume_m3", "p0_Pa", "T0_K", "orifice_diameter_m", "Cd",
              "ambient_pressure_Pa", "p_end_Pa", "time_s", "T_end_K", "rho0_kg_m3",
              "rho_end_kg_m3", "initial_mass_flow_kg_s"]
    rows = []
    for gas, process, V, p0, T0, d, Cd, p_end in VENT_CASES:
        r = vent(by_name[gas], process, V, p0, T0, d, Cd, P_ATM, p_end)
        rows.append([gas, process, V, p0, T0, d, Cd, P_ATM, p_end, r["time"], r["T_end"],
                     r["rho0"], r["rho_end"], r["initial_flow"]])
    return header, rows


HELMHOLTZ_HEADER = ["gas", "T_K", "rhomolar_mol_m3", "delta", "tau", "alpha0", "dalpha0_dtau",
                    "d2alpha0_dtau2", "alphar", "dalphar_ddelta", "d2alphar_ddelta2", "dalphar_dtau",
                    "d2alphar_dtau2", "d2alphar_ddelta_dtau", "B_virial_m3_mol"]
# Near the critical point, given as (delta, tau) about the reducing point: all at tau < 1, so
# above the reducing temperature (single phase), none exactly at delta = 1, where the
# derivatives of carbon dioxide's non-analytic terms, as published, are limits of 0/0 forms.
NEAR_CRITICAL = [(1.001, 0.999), (0.95, 0.995), (1.05, 0.995), (0.8, 0.99), (1.2, 0.99)]


def below_melting(fl, T, p):
    """p, or 90 % of the melting pressure at T where p would be a solid."""
    try:
        return min(p, 0.9 * fl.flash.melting_line(CP.iP, CP.iT, T))
    except ValueError:
        return p  # outside the melting curve's range: no solid at T within the equation's limits


def helmholtz_states(fl):
    """About 35 (rhomolar, T) states per gas across the equation's range: dilute, vapour,
    saturated, compressed liquid, near-critical, supercritical, room temperature and the
    equation's highest temperature, to 1000 bar or the equation's pressure limit."""
    p_top = min(fl.pmax, P_GRID_MAX)
    Tc, Tt = fl.Tc, fl.Ttriple
    T_cold = 1.02 * Tt
    T_hot = fl.Tmax

    def psat(T):
        return maxwell(fl, T)[0]

    by_pT = [
        (T_cold, 0.1 * psat(T_cold)), (300.0, 1e3), (T_hot, 1e3),  # dilute
        (T_cold, 0.5 * psat(T_cold)), (0.8 * Tc, 0.5 * psat(0.8 * Tc)),  # vapour
        (0.95 * Tc, 0.8 * psat(0.95 * Tc)),
        (T_cold, max(2 * psat(T_cold), 1e6)), (T_cold, p_top),  # compressed liquid
        (0.8 * Tc, 2 * psat(0.8 * Tc)), (0.95 * Tc, 1.2 * psat(0.95 * Tc)), (0.9 * Tc, p_top),
        (1.05 * Tc, 0.5 * fl.pc), (1.05 * Tc, 1.5 * fl.pc), (1.05 * Tc, p_top),  # supercritical
        (1.5 * Tc, fl.pc), (min(2 * Tc, T_hot), p_top),
        (233.15, 2e7), (300.0, 1e5), (300.0, 1e6), (300.0, 1e7), (300.0, 3e7), (300.0, p_top),
        (min(500.0, T_hot), 5e7), (T_hot, 1e7), (T_hot, p_top),  # hot
    ]
    states = []
    for T, p in by_pT:
        p = below_melting(fl, T, p)
        rho = density(fl, p, T)[0]
        states.append((rho / fl.M, T))
    for frac in (0.5, 0.9):  # both saturated phases
        T = Tt + frac * (Tc - Tt)
        _, rho_l, rho_v = maxwell(fl, T)
        states += [(rho_v / fl.M, T), (rho_l / fl.M, T)]
    states += [(d * fl.rhomolar_red, fl.T_red / t) for d, t in NEAR_CRITICAL]
    unique = []
    for st in states:
        if st not in unique:
            unique.append(st)
    return unique


def table_helmholtz(fluids_):
    """The reduced Helmholtz terms of each equation at states across its range, evaluated at
    (rho, T) with CoolProp's phase imposed, so the equation is evaluated as it stands."""
    rows = []
    for fl in fluids_:
        for rhomolar, T in helmholtz_states(fl):
            rows.append([fl.name, T, rhomolar, *fl.helmholtz(rhomolar, T)])
    return HELMHOLTZ_HEADER, rows


# --------------------------------------------------------------------------------------------


def versions():
    return {name: importlib.metadata.version(name) for name in PINNED}


def saturation_gap(fl):
    """For a pseudo-pure fluid: the worst relative difference between the Maxwell saturation
    pressure and CoolProp's own bubble (Q = 0) and dew (Q = 1) pressures, at 10, 50 and 90 %
    of the way from the triple point to the critical temperature."""
    gaps = {0.0: 0.0, 1.0: 0.0}
    for frac in (0.1, 0.5, 0.9):
        T = fl.Ttriple + frac * (fl.Tc - fl.Ttriple)
        p_maxwell = maxwell(fl, T)[0]
        for q in gaps:
            fl.flash.update(CP.QT_INPUTS, q, T)
            gaps[q] = max(gaps[q], abs(fl.flash.p() - p_maxwell) / p_maxwell)
    return gaps[0.0], gaps[1.0]


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--out", default=os.path.join(os.path.dirname(os.path.abspath(__file__)),
                                                  "..", "tests", "reference"))
    args = ap.parse_args()
    out = os.path.normpath(args.out)

    got = versions()
    mismatched = {k: (v, PINNED[k]) for k, v in got.items() if v != PINNED[k]}
    for k, (v, want) in mismatched.items():
        print(f"warning: {k} {v} installed, tables were made with {want}; "
              f"the tables' README records what you have", file=sys.stderr)

    fluids_ = [RealFluid(n, c) for n, c in GASES]
    by_name = {fl.name: fl for fl in fluids_}
    tables = {}
    for fname, maker in (("fluids.csv", lambda: table_fluids(fluids_)),
                         ("properties.csv", lambda: table_properties(fluids_)),
                         ("saturation.csv", lambda: table_saturation(fluids_)),
                         ("energy.csv", lambda: table_energy(fluids_)),
                         ("fill.csv", lambda: table_fill(by_name)),
                         ("nozzle.csv", lambda: table_nozzle(fluids_)),
                         ("vent.csv", lambda: table_vent(by_name)),
                         ("helmholtz.csv", lambda: table_helmholtz(fluids_))):
        tables[fname] = maker()

    checks = self_checks(fluids_, tables["helmholtz.csv"][1])
    for name, g, w, tol, ok in checks:
        print(f"{'ok  ' if ok else 'FAIL'} {name}: {g:.10g} vs {w:.10g} (tol {tol:g}{'' if w else ', absolute'})")
    if not all(c[-1] for c in checks):
        print("self-checks failed: nothing written", file=sys.stderr)
        return 1

    os.makedirs(out, exist_ok=True)
    counts = {}
    for fname, (header, rows) in tables.items():
        counts[fname] = write_csv(os.path.join(out, fname), header, rows)
        print(f"wrote {fname}: {counts[fname]} rows")
    gaps = {fl.name: saturation_gap(fl) for fl in fluids_ if fl.pseudo_pure}
    with open(os.path.join(out, "README.md"), "w") as fh:
        fh.write(readme(got, counts, checks, fluids_, gaps))
    print(f"wrote README.md in {out}")
    return 0


def readme(got, counts, checks, fluids_, gaps):
    lines = [
        "# Reference tables",
        "",
        "Generated by `tools/real_gas_tables.py` — do not edit by hand; rerun the script",
        "(`pip install -r tools/requirements.txt`, then `python3 tools/real_gas_tables.py`).",
        "pvhazard never reads these at run time: only its tests do. The ideal-gas tables in",
        "`tests/data/` (including the standard atmosphere) come from `tools/reference_tables.py`.",
        "",
        "## Made with",
        "",
    ]
    lines += [f"- {k} {v}" for k, v in got.items()]
    lines += [f"- CoolProp git revision {CoolProp.__gitrevision__}",
              f"- Python {platform.python_version()}", ""]
    lines += [
        "## Conventions (all files)",
        "",
        "- Plain CSV: one header row, comma-separated, no comments, no quoting needed. SI units, named",
        "  in each column header (`_Pa`, `_K`, `_kg_m3`, `_J_kg`, `_J_kgK`, `_m_s`, …). Pressures are",
        "  absolute. Numbers are written with Python's `repr` (shortest text that round-trips the",
        "  double exactly). Empty cell = not applicable. Booleans are `true`/`false`.",
        "- `gas` uses pvhazard's names: " + ", ".join(f"`{fl.name}`" for fl in fluids_) + ".",
        f"- Energy properties (u, h, s) are **differences from each gas's reference state**, T = {T_REF} K,",
        f"  p = {P_REF} Pa (gas; `rho_ref_kg_m3` in fluids.csv), because absolute values depend on each",
        "  library's reference state. Compare `u(state) - u(ref)` from pvhazard's model with the column.",
        "  Near the reference state these differences approach zero, so compare them with a tolerance",
        "  scaled by a typical magnitude (e.g. cp·T), not purely relative.",
        "- Every property row is the equation of state evaluated at (rho, T), where it is explicit;",
        "  `p_Pa` is that evaluated pressure. It equals the nominal grid pressure to ~1e-15 relative",
        "  for gases; for liquids at low pressure, where one unit in the last place of rho moves p a",
        "  lot, to ~1e-11. Feed `p_Pa` as written to the density solver under test.",
        "- Saturation everywhere is the Maxwell construction on the equation itself (equal p and",
        "  Gibbs energy in both phases). For the pure fluids this equals CoolProp's own saturation",
        "  (checked, below). For `air` (a pseudo-pure fluid) CoolProp's own bubble and dew lines come",
        "  from ancillary curves of the mixture and differ from this"
        + "".join(f" ({name}: bubble pressure by up to {b:.1%}, dew pressure by up to {d:.1%}, at 10, 50"
                  " and 90 % of the way from the triple point to the critical temperature)"
                  for name, (b, d) in gaps.items()) + ";",
        "  the tables follow the Maxwell construction, which is what an implementation of the",
        "  equation alone can reproduce.",
        "- Each equation uses its own molar gas constant (`eos_gas_constant_J_molK` in fluids.csv);",
        "  Z in properties.csv uses it. A model that uses CODATA R everywhere differs by up to ~6e-6",
        "  in density at the same (p, T).",
        "",
        "## Files",
        "",
        f"### fluids.csv ({counts['fluids.csv']} rows) — one row a gas",
        "Critical point, triple point, limits (`T_min_K`, `T_max_K`, `p_max_Pa`: the range CoolProp",
        "states for the equation), molar mass, the equation's gas constant, the Maxwell triple-point",
        "pressure (`p_triple_Pa`) and normal boiling point (`T_normal_boiling_K`, at 101325 Pa; empty",
        "for carbon dioxide, whose triple-point pressure is above 1 atm), the reference state, and the",
        "ideal-gas cp and gamma at 300 K from the equation's ideal part (`cp0_300K_J_kgK`, `gamma0_300K`).",
        "`eos_bibtex_keys` names the equation's papers (cited below). The critical point is",
        "CoolProp's, which it recomputes from the equation (e.g. nitrogen 126.19199999958556 K for the",
        "paper's 126.192 K): check published values against the papers, not this file.",
        "`T_reducing_K` and `rhomolar_reducing_mol_m3` are the equation's reducing point (tau =",
        "T_r/T, delta = rho/rho_r): the critical point for the pure fluids, the maxcondentherm for",
        "air. `alpha0_offset_a1`, `alpha0_offset_a2`: CoolProp's reference-state term, which adds",
        "a1 + a2·tau to alpha0 on top of the ideal part's other terms (0 where it has none; see",
        "helmholtz.csv).",
        "",
        f"### properties.csv ({counts['properties.csv']} rows) — single-phase states on a (T, p) grid",
        "Temperatures " + ", ".join(f"{t:g}" for t in GRID_T) + " K (those within each equation's range);",
        "pressures 1 kPa to 1000 bar or the equation's `p_max_Pa` (oxygen: 800 bar). Points within",
        f"{SAT_BAND * 100:g} % of the saturation pressure are left out, and so are solids (below",
        "CoolProp's melting line for the gas). `phase`: `gas` / `liquid` (below",
        "Tc, below / above the Maxwell saturation pressure), `supercritical` (T ≥ Tc, p ≥ pc),",
        "`supercritical_gas` (T ≥ Tc, p < pc), `supercritical_liquid` (T < Tc, p ≥ pc). Columns: Z =",
        "p/(rho·R·T), u, h, s minus the reference state, cv, cp, speed of sound w.",
        "",
        f"### saturation.csv ({counts['saturation.csv']} rows) — Maxwell saturation",
        "At the triple point, at 10 %, 20 %, …, 90 % and 95 % of the way from the triple point to",
        "the critical temperature, and at the normal boiling point where there is one: p, both",
        "densities, u, h, s of both phases minus the reference state.",
        "",
        f"### energy.csv ({counts['energy.csv']} rows) — stored energy of 1 m³ of gas released to 101325 Pa",
        "Real-gas forms: `isothermal_J` = m·[a(p1,T1) − a(pa,T1)], a = u − T·s (reference-state free",
        "since both are at T1); `isentropic_J` = m·[u(p1,T1) − u(pa, s1)], where the end state at",
        "(pa, s1) may be two-phase (`end_quality` = vapour mass fraction, 1 for a single-phase gas);",
        "`availability_J` = m·[(u1−u0) + pa·(1/rho1 − 1/rho0) − T1·(s1−s0)], dead state (pa, T1) —",
        "the non-flow exergy, whose ideal-gas limit is p1·V·[ln(p1/pa) − (1 − pa/p1)]. T1 = 273.15,",
        "293.15, 313.15 K; p1 from 2 bar to 1000 bar (10 bar(g) = 1101325 Pa among them), capped at",
        "the equation's limit and, for carbon dioxide, kept below its saturation pressure at T1.",
        "Cases whose isentrope leaves the equation's range are left out: carbon dioxide from 5 bar",
        "and up would end below its triple point (it forms dry ice), which pvhazard should refuse.",
        "",
        f"### fill.csv ({counts['fill.csv']} rows) — adiabatic fast fill of a rigid tank",
        "Solves rho_f·u_f − rho_i·u_i = (rho_f − rho_i)·h_in for T_final at p_final, h_in the",
        "enthalpy at the supply pressure and temperature. `settled_pressure_Pa`: the pressure at the",
        "final density once the gas has cooled to T_ambient. `mass_added_per_volume_kg_m3` =",
        "rho_f − rho_i (multiply by the water capacity).",
        "",
        f"### nozzle.csv ({counts['nozzle.csv']} rows) — isentropic nozzle mass flux from a stagnation state",
        "From (p0, T0) along the isentrope to the back pressure (101325 Pa): when the sonic state",
        "(velocity = speed of sound, the maximum of rho·sqrt(2·(h0 − h))) is at or above the back",
        "pressure the flow is `choked` and the throat is sonic; otherwise the throat is at the back",
        "pressure. Multiply `mass_flux_kg_m2s` by Cd·A for the mass flow. Cases whose throat would be",
        "two-phase are left out.",
        "",
        f"### vent.csv ({counts['vent.csv']} rows) — blow-down time of a rigid vessel through an orifice",
        "The gas left in the vessel is `isothermal` (stays at T0) or `isentropic` (adiabatic vessel:",
        "its entropy stays s0); the orifice is the nozzle above with area π·d²/4 and coefficient Cd,",
        "discharging to `ambient_pressure_Pa`, choked or not. time = V/(Cd·A)·∫ drho/G(rho) from",
        "rho_end to rho0 (adaptive quadrature, relative error below 1e-9). `T_end_K`: vessel gas",
        "temperature at p_end. `initial_mass_flow_kg_s`: Cd·A·G at the start.",
        "",
        f"### helmholtz.csv ({counts['helmholtz.csv']} rows) — the reduced Helmholtz energy term by term",
        "alpha = a/(R·T) = alpha0(delta, tau) + alphar(delta, tau) of each equation, and the partial",
        "derivatives named in the header (`dalphar_ddelta` = ∂alphar/∂delta at constant tau, and so",
        "on; not multiplied by delta or tau), from CoolProp's `AbstractState` at (rhomolar, T) with",
        "the phase imposed, so the equation is evaluated as it stands with no phase split. delta =",
        "rhomolar/rho_r, tau = T_r/T, with the reducing point of fluids.csv. The states, for each",
        "gas: dilute gas (0.1 of the saturation pressure just above the triple point, 1 kPa at",
        "300 K and at `T_max_K`); vapour (half the saturation pressure at 1.02·T_triple and 0.8·Tc,",
        "0.8 of it at 0.95·Tc); compressed liquid (1.02·T_triple at twice the saturation pressure",
        "or 1 MPa and at the top pressure, 0.8·Tc at twice and 0.95·Tc at 1.2 times the saturation",
        "pressure, 0.9·Tc at the top pressure); both saturated phases at 50 % and 90 % of the way",
        "from the triple point to Tc; near-critical (delta, tau) = "
        + ", ".join(f"({d:g}, {t:g})" for d, t in NEAR_CRITICAL) + ";",
        "supercritical (1.05·Tc at 0.5, 1.5 times pc and at the top pressure, 1.5·Tc at pc, 2·Tc at",
        "the top pressure); service states (233.15 K at 200 bar; 300 K at 1 kPa to the top",
        "pressure); hot states (500 K at 500 bar, `T_max_K` at 100 bar and at the top pressure).",
        "`B_virial_m3_mol`: the second virial coefficient at T_K (CoolProp's `Bvirial`), the limit",
        "of dalphar_ddelta/rho_r as delta goes to 0.",
        "The top pressure is 1000 bar or `p_max_Pa` if lower (oxygen: 800 bar); a pressure that",
        "would be a solid (above CoolProp's melting line) is cut to 90 % of the melting pressure.",
        "Each equation uses its own gas constant: Z = p/(rho·R·T) = 1 + delta·dalphar_ddelta with",
        "`eos_gas_constant_J_molK` (checked below).",
        "`alpha0` is CoolProp's ideal part, ln(delta) included, which for air, oxygen, argon,",
        "helium, methane and carbon dioxide carries a reference-state term a1 + a2·tau",
        "(`alpha0_offset_a1`, `alpha0_offset_a2` in fluids.csv): subtract a1 + a2·tau from",
        "`alpha0` and a2 from `dalpha0_dtau` to compare with an ideal part that has no such term",
        "(`d2alpha0_dtau2` is unaffected, and so is every property but absolute u, h, s).",
        "",
        *transport_table.readme_lines(bibtex),
        "## Self-checks run before writing (ideal gas through the same code, the fluids library, CoolProp)",
        "",
        "| check | got | expected | tolerance |",
        "| --- | --- | --- | --- |",
    ]
    lines += [f"| {n} | {g:.10g} | {w:.10g} | {t:g}{'' if w else ' (absolute)'} |" for n, g, w, t, _ in checks]
    lines += ["",
              "Sources: the closed forms are those of a calorically perfect ideal gas (the ideal",
              "gas has R = 287.05 J/(kg·K), gamma = 1.4); `isentropic_work_compression`,",
              "`isothermal_work_compression`, `isentropic_T_rise_compression` and `P_critical_flow`",
              "are the fluids library's (fluids.compressible), and `API520_A_g` its API 520 Part 1",
              "gas-sizing formula, whose constant 0.03948 is given to four figures. The finite",
              "differences are central, step 1e-6 relative, scaled by |derivative| + |function| /",
              "|variable|, over every row of helmholtz.csv.",
              "", "## Equations of state (from CoolProp's bibliography)", ""]
    for fl in fluids_:
        for key in eos_keys(fl.cp_name):
            lines.append(f"- `{fl.name}` — `{key}`: {bibtex(key)}")
    lines += ["",
              "Helium-4: CoolProp's bibliography marks the equation unpublished. Oxygen: CoolProp cites the Schmidt & Wagner (1985) form with Stewart,",
              "Jacobsen & Wagner (1991), whose title states the range triple point to 300 K at pressures",
              "to 80 MPa; CoolProp states 54.361–2000 K, and the grid above goes to 400 K: those oxygen",
              "rows above 300 K are the equation extrapolated as CoolProp evaluates it. The hottest",
              "states of helmholtz.csv are at CoolProp's `T_max_K`, beyond the temperatures in the",
              "titles above for nitrogen (1000 K), argon (700 K), carbon dioxide (1100 K) and oxygen:",
              "there too the equation is extrapolated, which is enough to check its terms.", ""]
    return "\n".join(lines)


if __name__ == "__main__":
    sys.exit(main())
