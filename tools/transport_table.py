#!/usr/bin/env python3
"""Regenerates tests/reference/transport.csv: CoolProp's viscosity and thermal conductivity of
each gas over a (T, p) grid of gas and supercritical states, with the density at each point.

    pip install -r tools/requirements.txt
    python3 tools/transport_table.py            # writes tests/reference/transport.csv

pvhazard's transport model (src/gas/transport.rs) is a generalized correlation on temperature
and density; tests/transport.rs feeds it the temperature and density of every row and compares
with the columns here. CoolProp evaluates each gas's own reference transport correlation (the
papers are named by their CoolProp bibliography keys in tests/reference/README.md), which is
why it can check the generalized one; pvhazard never calls it.

Every row's density comes from CoolProp's (T, p) flash, polished by Newton's method on the
equation of state to machine precision (`p_Pa` is the equation's pressure there, the grid
pressure to ~1e-15 relative); its viscosity and conductivity are then evaluated at (T, rho),
which is what the Rust test feeds, and the script checks before writing that these equal the
(T, p) values (a self-check; it stops, writing nothing, if one fails).
Output is deterministic: rerunning with the same CoolProp version gives a byte-identical file.

The paragraph on this table in tests/reference/README.md is written by
tools/real_gas_tables.py from `readme_lines()` below: rerun that script too after changing
the grid here.
"""
import argparse
import csv
import importlib.metadata
import math
import os
import sys

import CoolProp.CoolProp as CP

# pvhazard's gas names -> CoolProp's fluid names, shared by the scripts.
from gases import GASES

# The version this table was made with; tools/requirements.txt pins the same.
PINNED = {"CoolProp": "8.0.0"}

BAR = 1e5
GRID_T = [150.0, 175.0, 200.0, 225.0, 250.0, 273.15, 300.0, 325.0, 350.0, 375.0, 400.0]
GRID_P = [1 * BAR, 5 * BAR, 10 * BAR, 20 * BAR, 50 * BAR, 70 * BAR, 100 * BAR, 150 * BAR,
          200 * BAR, 300 * BAR, 400 * BAR, 500 * BAR]
# Below the critical temperature, points this close to the saturation (dew) pressure, relative,
# are left out with the liquid above it: the table is of gases.
SAT_BAND = 0.02
# CoolProp's phases that are kept: a gas below the critical temperature, and any state at or
# above it (supercritical, below or above the critical pressure).
GAS_PHASES = ("gas", "supercritical_gas", "supercritical")
# The (T, rho) evaluation must reproduce the (T, p) one to this relative difference. The (T, p)
# route carries the flash's density tolerance (up to 1.2e-9 in the properties, methane near its
# critical point), the polished density none.
SELF_CHECK_TOL = 1e-8

HEADER = ["gas", "T_K", "p_Pa", "rho_kg_m3", "rho_over_rho_critical", "phase",
          "viscosity_Pa_s", "conductivity_W_mK"]


def fmt(x):
    if isinstance(x, str):
        return x
    if not math.isfinite(x):
        raise ValueError(f"non-finite value {x}")
    return repr(float(x))


def polished_density(state, t, p, rho):
    """The density at (t, p) to machine precision: Newton's method on the equation of state,
    explicit in (rho, T), from the flash's density (whose tolerance near the critical point
    moves a property that uses the pressure by ~1e-9)."""
    for _ in range(4):
        state.update(CP.DmassT_INPUTS, rho, t)
        step = (state.p() - p) / state.first_partial_deriv(CP.iP, CP.iDmass, CP.iT)
        rho -= step
        if abs(step) <= 1e-15 * rho:
            break
    return rho


def rows():
    """The table's rows and the self-check failures (empty when all pass)."""
    out, failures = [], []
    for name, cp_name in GASES:
        t_crit = CP.PropsSI("Tcrit", cp_name)
        rho_crit = CP.PropsSI("rhomass_critical", cp_name)
        t_min, p_max = CP.PropsSI("Tmin", cp_name), CP.PropsSI("pmax", cp_name)
        state = CP.AbstractState("HEOS", cp_name)
        state.specify_phase(CP.iphase_gas)
        for t in GRID_T:
            if t <= t_min:
                continue
            # Dew pressure (Q = 1): the saturated vapour, the gas side's bound.
            p_sat = CP.PropsSI("P", "T", t, "Q", 1, cp_name) if t < t_crit else math.inf
            for p in GRID_P:
                if p > p_max or p > (1.0 - SAT_BAND) * p_sat:
                    continue
                phase = CP.PhaseSI("T", t, "P", p, cp_name)
                if phase not in GAS_PHASES:
                    continue
                rho = polished_density(state, t, p, CP.PropsSI("D", "T", t, "P", p, cp_name))
                state.update(CP.DmassT_INPUTS, rho, t)
                p_eval = state.p()
                mu = CP.PropsSI("V", "T", t, "D", rho, cp_name)
                k = CP.PropsSI("L", "T", t, "D", rho, cp_name)
                for what, at_rho, at_p in (("V", mu, CP.PropsSI("V", "T", t, "P", p, cp_name)),
                                           ("L", k, CP.PropsSI("L", "T", t, "P", p, cp_name))):
                    if abs(at_rho - at_p) > SELF_CHECK_TOL * abs(at_p):
                        failures.append(f"{name} {t} K {p} Pa: {what} at (T, rho) {at_rho!r} "
                                        f"vs at (T, p) {at_p!r}")
                out.append([name, t, p_eval, rho, rho / rho_crit, phase, mu, k])
    return out, failures


def bibliography(cp_name):
    """CoolProp's bibliography keys of the gas's viscosity and conductivity correlations."""
    return (CP.get_fluid_param_string(cp_name, "BibTeX-VISCOSITY").strip(),
            CP.get_fluid_param_string(cp_name, "BibTeX-CONDUCTIVITY").strip())


def readme_lines(bibtex):
    """The paragraph on transport.csv for tests/reference/README.md; `bibtex` turns a CoolProp
    bibliography key into citation text."""
    count = len(rows()[0])
    lines = [
        f"### transport.csv ({count} rows) — viscosity and thermal conductivity",
        "Written by `tools/transport_table.py` (rerun it, then this script, after a change).",
        "CoolProp's viscosity (`viscosity_Pa_s`) and thermal conductivity (`conductivity_W_mK`)",
        "at temperatures " + ", ".join(f"{t:g}" for t in GRID_T) + " K",
        "and pressures " + ", ".join(f"{p / BAR:g}" for p in GRID_P) + " bar,",
        "gas and supercritical states only: below the critical temperature, points above "
        f"{(1 - SAT_BAND) * 100:g} %",
        "of CoolProp's dew pressure are left out (and so is anything CoolProp calls liquid),",
        "as are points above the equation's `p_max_Pa`. `rho_kg_m3` is CoolProp's (T, p)",
        "density; the properties are evaluated at (T, rho) — the input a density-based model",
        "takes — and checked equal to the (T, p) values before writing. `rho_over_rho_critical`",
        "uses CoolProp's critical density (`rho_critical_kg_m3` in fluids.csv). CoolProp's",
        "conductivity includes each correlation's critical enhancement, large near the critical",
        "point (carbon dioxide at 325 K and 100 bar). `tests/transport.rs` checks pvhazard's",
        "generalized model (src/gas/transport.rs) against it, with per-gas tolerances.",
        "",
        "Correlations (viscosity; conductivity), by CoolProp's bibliography:",
        "",
    ]
    keys = []
    for name, cp_name in GASES:
        visc, cond = bibliography(cp_name)
        lines.append(f"- `{name}`: `{visc}`; `{cond}`")
        for k in (visc, cond):
            if k not in keys:
                keys.append(k)
    lines.append("")
    # The bibliography spells one accent in TeX.
    lines += [f"- `{k}`: {bibtex(k).replace(chr(123) + chr(92) + '~n}', 'ñ')}" for k in keys]
    lines.append("")
    return lines


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--out", default=os.path.join(os.path.dirname(os.path.abspath(__file__)),
                                                  "..", "tests", "reference"))
    args = ap.parse_args()
    out = os.path.normpath(args.out)

    for k, want in PINNED.items():
        got = importlib.metadata.version(k)
        if got != want:
            print(f"warning: {k} {got} installed, the table was made with {want}",
                  file=sys.stderr)

    table, failures = rows()
    for f in failures:
        print(f"FAIL {f}", file=sys.stderr)
    if failures:
        print("self-checks failed: nothing written", file=sys.stderr)
        return 1
    print(f"ok   (T, rho) evaluation = (T, p) evaluation within {SELF_CHECK_TOL:g} on every row")

    os.makedirs(out, exist_ok=True)
    path = os.path.join(out, "transport.csv")
    with open(path, "w", newline="") as fh:
        w = csv.writer(fh, lineterminator="\n")
        w.writerow(HEADER)
        for row in table:
            w.writerow([fmt(x) for x in row])
    print(f"wrote transport.csv: {len(table)} rows")
    return 0


if __name__ == "__main__":
    sys.exit(main())
