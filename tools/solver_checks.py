"""Reference values for tests/solver_failures.rs and the unit tests of the fill, energy and
vent rules that cite "CoolProp 8.0.0" for the fill balance, carbon dioxide below its triple
point, the methane vent-down path, the two-phase nozzle and two-phase air. Run from the
repository root with the pinned CoolProp (tools/requirements.txt); it prints the values the
tests hold. The tests never run it.
"""
import math

import CoolProp
import CoolProp.CoolProp as CP

print("CoolProp", CoolProp.__version__)


def bisect(f, a, b, n=200):
    fa = f(a)
    for _ in range(n):
        m = 0.5 * (a + b)
        fm = f(m)
        if (fm < 0) == (fa < 0):
            a, fa = m, fm
        else:
            b = m
    return 0.5 * (a + b)


def golden_max(f, a, b, n=80):
    r = (5 ** 0.5 - 1) / 2
    for _ in range(n):
        c, d = b - r * (b - a), a + r * (b - a)
        if f(c) > f(d):
            b = d
        else:
            a = c
    return 0.5 * (a + b)


# Adiabatic fill on the final density: u_f = h_in + rho_i (u_i - h_in) / rho_f.
def fill(fluid, pi, ti, pf, ts, tamb):
    rho_i = CP.PropsSI("D", "P", pi, "T", ti, fluid)
    u_i = CP.PropsSI("U", "P", pi, "T", ti, fluid)
    h_in = CP.PropsSI("H", "P", pf, "T", ts, fluid)
    c = rho_i * (u_i - h_in)
    p_at = lambda r: CP.PropsSI("P", "D", r, "U", h_in + c / r, fluid)
    t_at = lambda r: CP.PropsSI("T", "D", r, "U", h_in + c / r, fluid)
    q_at = lambda r: CP.PropsSI("Q", "D", r, "U", h_in + c / r, fluid)
    rho_f = bisect(lambda r: p_at(r) - pf, rho_i, rho_i * 200)
    rho_t = CP.PropsSI("D", "P", pf, "T", tamb, fluid)
    mid = bisect(lambda r: p_at(r) - 20e5, rho_i, rho_i * 100)
    return t_at(rho_f), p_at(rho_t), t_at(mid), q_at(mid)


print("oxygen fill: T_f, fill-to", fill("Oxygen", 601325.0, 293.15, 15101325.0, 293.15, 293.15)[:2])
print("methane fill: T_f, -, T and Q at 20 bar", fill("Methane", 10e5, 220.0, 200e5, 220.0, 293.15))

# Carbon dioxide below its triple point: the equation evaluated with (D, T) inputs.
AS = CP.AbstractState("HEOS", "CO2")


def co2(rho, t):
    AS.update(CP.DmassT_INPUTS, rho, t)
    return AS


def co2_rho(p, t):
    r = p / (188.9 * t)
    for _ in range(100):
        a = co2(r, t)
        r -= (a.p() - p) / a.first_partial_deriv(CP.iP, CP.iDmass, CP.iT)
    return r


a = co2(co2_rho(5e5, 300.0), 300.0)
s1, u1, rho1 = a.smass(), a.umass(), a.rhomass()
te = bisect(lambda t: co2(co2_rho(101325.0, t), t).smass() - s1, 195.0, 260.0, 100)
print("CO2 5 bar 300 K to 1 atm: T_end, E(50 L)", te, 0.05 * rho1 * (u1 - co2(co2_rho(101325.0, te), te).umass()))

# Methane vent-down path at 205.113 K, 1 m3.
def e_ch4(p, t=205.113, pa=101325.0):
    s = CP.PropsSI("S", "P", p, "T", t, "Methane")
    return CP.PropsSI("D", "P", p, "T", t, "Methane") * (
        CP.PropsSI("U", "P", p, "T", t, "Methane") - CP.PropsSI("U", "P", pa, "S", s, "Methane"))


lp = golden_max(lambda x: e_ch4(math.exp(x)), math.log(100e5), math.log(400e5))
cross = bisect(lambda x: e_ch4(math.exp(x)) - 28e6, math.log(101325.0 * 1.0001), lp, 100)
print("methane: E(843.627 bar), peak, at, target", e_ch4(843.627e5), e_ch4(math.exp(lp)), math.exp(lp), math.exp(cross))

# Homogeneous-equilibrium choked flux from methane at 188.1266 kg/m3, 202.965 K.
h0 = CP.PropsSI("H", "D", 188.1266, "T", 202.965, "Methane")
s0 = CP.PropsSI("S", "D", 188.1266, "T", 202.965, "Methane")
p0 = CP.PropsSI("P", "D", 188.1266, "T", 202.965, "Methane")
g = lambda x: CP.PropsSI("D", "P", math.exp(x), "S", s0, "Methane") * math.sqrt(
    max(2 * (h0 - CP.PropsSI("H", "P", math.exp(x), "S", s0, "Methane")), 0.0))
grid = [math.log(101325.0) + (math.log(p0) - math.log(101325.0)) * i / 400 for i in range(401)]
best = max(grid, key=g)
step = grid[1] - grid[0]
x = golden_max(g, best - step, best + step, 60)
print("methane HEM flux max, at", g(x), math.exp(x))

# Two-phase air: pseudo-pure air placed between bubble and dew by quality.
mix = CP.AbstractState("HEOS", "Nitrogen&Argon&Oxygen")
mix.set_mole_fractions([0.7812, 0.0092, 0.2096])
for q in (0.0, 1.0):
    mix.update(CP.PQ_INPUTS, 101325.0, q)
    print("air mixture at 1 atm, Q", q, "T", mix.T())
for p1, t1 in [(300e5, 300.0), (300e5, 250.0), (200e5, 250.0), (200e5, 200.0)]:
    s = CP.PropsSI("S", "P", p1, "T", t1, "Air")
    print("air", p1 / 1e5, t1, "J/kg", CP.PropsSI("U", "P", p1, "T", t1, "Air") - CP.PropsSI("U", "P", 101325.0, "S", s, "Air"),
          "T_end", CP.PropsSI("T", "P", 101325.0, "S", s, "Air"))


def air_vent(p1, t1, v, d, n=2000, pa=101325.0):
    """Isentropic vent to 1.01 atm, Cd 1: V/A ∫ dρ/G on the isentrope (trapezoid, n points
    in ln p), the throat the flux maximum over the table's pressures."""
    s1 = CP.PropsSI("S", "P", p1, "T", t1, "Air")
    pend = 1.01 * pa
    ps = [pa] + [math.exp(math.log(pend) + math.log(p1 / pend) * i / n) for i in range(n + 1)]
    tab = [(p, CP.PropsSI("D", "P", p, "S", s1, "Air"), CP.PropsSI("H", "P", p, "S", s1, "Air")) for p in ps]
    t, prev = 0.0, None
    for k in range(1, len(tab)):
        r0, h0 = tab[k][1], tab[k][2]
        gk = max(r * math.sqrt(max(2 * (h0 - h), 0.0)) for (_, r, h) in tab[: k + 1])
        if prev is not None:
            t += 0.5 * (1 / gk + 1 / prev[1]) * (r0 - prev[0])
        prev = (r0, gk)
    return v / (math.pi / 4 * d * d) * t


print("air vent 50 L 300 bar 300 K 2 mm", air_vent(300e5, 300.0, 0.05, 2e-3))
print("air vent 50 L 200 bar 250 K 2 mm", air_vent(200e5, 250.0, 0.05, 2e-3))
print("air vent 50 L 11.01325 bar 300 K 2 mm (single phase)", air_vent(11.01325e5, 300.0, 0.05, 2e-3))
