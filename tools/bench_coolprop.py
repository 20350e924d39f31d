#!/usr/bin/env python3
"""Times pvhazard's real-gas model beside CoolProp's PropsSI on the same machine, in one run.

    pip install -r tools/requirements.txt
    python3 tools/bench_coolprop.py        # runs `cargo bench --bench real_gas`, then PropsSI

Prints, for density from (p, T) at the benchmark states, nanoseconds per call of pvhazard
(criterion's median estimate) and of CoolProp's PropsSI called from Python (timeit, best of
five repeats), and their ratio. The real-gas issue's target is a ratio of at least 20.
"""
import json
import os
import subprocess
import sys
import timeit

import CoolProp
import CoolProp.CoolProp as CP

ROOT = os.path.normpath(os.path.join(os.path.dirname(__file__), ".."))
# (benchmark name in benches/real_gas.rs, CoolProp fluid, p in Pa, T in K)
STATES = [
    ("density(p, T) nitrogen 200 bar 300 K", "Nitrogen", 200e5, 300.0),
    ("density(p, T) hydrogen 700 bar 288.15 K", "Hydrogen", 700e5, 288.15),
    ("density(p, T) air 300 bar 293.15 K", "Air", 300e5, 293.15),
    ("density(p, T) carbon-dioxide 50 bar 300 K", "CarbonDioxide", 50e5, 300.0),
]


def criterion_dir(name):
    """Criterion's folder for a benchmark: unsafe characters made '_', cut to 64."""
    return "".join("_" if c in '?"/\\*<>:|^' else c for c in name)[:64]


def criterion_ns(name):
    """Criterion's median estimate for a benchmark, ns."""
    path = os.path.join(ROOT, "target", "criterion", criterion_dir(name), "new",
                        "estimates.json")
    with open(path, encoding="utf-8") as f:
        return json.load(f)["median"]["point_estimate"]


def props_si_ns(fluid, p, t, n=20000):
    best = min(timeit.repeat(lambda: CP.PropsSI("D", "P", p, "T", t, fluid), number=n, repeat=5))
    return best / n * 1e9


def main():
    subprocess.run(["cargo", "bench", "--bench", "real_gas"], cwd=ROOT, check=True,
                   stdout=sys.stderr)
    print(f"CoolProp {CoolProp.__version__}, Python {sys.version.split()[0]}")
    print(f"{'state':<44} {'pvhazard ns':>12} {'PropsSI ns':>12} {'ratio':>8}")
    for name, fluid, p, t in STATES:
        ours = criterion_ns(name)
        theirs = props_si_ns(fluid, p, t)
        print(f"{name:<44} {ours:>12.0f} {theirs:>12.0f} {theirs / ours:>8.1f}")
    for name in ["all properties at (rho, T) nitrogen 200 bar 300 K",
                 "choked nozzle flux air 300 bar 293 K",
                 "vent-down 50 L air 300 -> 50 bar(a), isothermal, real gas"]:
        print(f"{name:<44} {criterion_ns(name):>12.0f}")


if __name__ == "__main__":
    main()
