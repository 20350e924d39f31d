#!/usr/bin/env python3
"""Site-scale timing: writes an invented site with many items and times pvhazard on it.

    python3 tools/site_scale.py [--items 1000] [--distinct] [--binary target/release/pvhazard]
                                [--keep DIR]

The site repeats seven invented items (two air receivers, a nitrogen drum, an air bank, and
composite, aluminium and steel cylinders with planned fill rates), each copy under its own
tag. Copies alike but for their tag share one computation in a run (a fleet of like
cylinders); with --distinct each copy's volume differs by a few parts in a million, so that
every item is computed on its own. The script runs `worksheet --all` into an empty folder and `check` on it, and prints
for each the wall time and the peak memory of the process (from the kernel's accounting of
the child). It times; it asserts nothing: speed lives in benchmarks and in this report, not
in tests.
"""

import argparse
import os
import re
import resource
import shutil
import subprocess
import sys
import tempfile
import time

SITE = """# Invented demo site for timing: {n} items, seven kinds repeated.
[site]
name = "Scale Test Works (demo)"
location = "Invented site for timing runs"
elevation = "120 m"
ambient_temperature = "18 C"
winter_minimum_temperature = "-15 C"
units = "si"
time_zone = "+01:00"
clearance = "40 m"
room_volume = "180 m3"
room_ventilation = "2 /h"
"""

ITEMS = [
    """[[vessel]]
tag = "AR-{i}"
description = "Vertical air receiver"
gas = "air"
volume = "2 m3"
mawp = "13 barg"
operating_pressure = "10 barg"
relief_set_pressure = "13 barg"
mdmt = "-29 C"
material = "carbon-steel"
wall_thickness = "8 mm"
empty_mass = "540 kg"
drain = {{ description = "1/2 in ball valve", orifice = "12 mm", cd = 0.61 }}
""",
    """[[vessel]]
tag = "AR-{i}"
description = "Small air receiver with an automatic drain"
gas = "air"
volume = "0.5 m3"
mawp = "11 barg"
operating_pressure = "9 barg"
relief_set_pressure = "11 barg"
mdmt = "-29 C"
material = "carbon-steel"
wall_thickness = "6 mm"
empty_mass = "190 kg"
drain = {{ description = "automatic drain valve", orifice = "4 mm", cd = 0.61 }}
""",
    """[[vessel]]
tag = "N2-{i}"
description = "Nitrogen surge drum"
gas = "nitrogen"
volume = "1.2 m3"
mawp = "30 barg"
operating_pressure = "25 barg"
relief_set_pressure = "30 barg"
mdmt = "-46 C"
material = "stainless-steel"
wall_thickness = "12 mm"
empty_mass = "680 kg"
drain = {{ description = "needle valve to the vent stack", orifice = "6 mm", cd = 0.8, to = "outdoors" }}
""",
    """[[vessel]]
tag = "BANK-{i}"
description = "Breathing-air storage bank"
gas = "air"
volume = "200 L"
mawp = "345 barg"
operating_pressure = "310 barg"
relief_set_pressure = "345 barg"
mdmt = "-29 C"
material = "carbon-steel"
drain = {{ description = "bank bleed valve", orifice = "1.5 mm", cd = 0.7 }}
""",
    """[[cylinder]]
tag = "BA-{i}"
description = "Composite breathing-air cylinder, 6.8 L"
gas = "air"
water_capacity = "6.8 L"
service_pressure = "300 barg"
rated_temperature = "65 C"
construction = "composite"
liner = "aluminium"
empty_mass = "4.1 kg"
supply_temperature = "27 C"
fill_rate = "28 bar/min"
residual_pressure = "20 barg"
""",
    """[[cylinder]]
tag = "SC-{i}"
description = "Aluminium scuba cylinder, 11.1 L"
gas = "air"
water_capacity = "11.1 L"
service_pressure = "207 barg"
rated_temperature = "65 C"
construction = "aluminium"
supply_temperature = "27 C"
fill_rate = "20 bar/min"
residual_pressure = "35 barg"
""",
    """[[cylinder]]
tag = "AR-{i}"
description = "Steel argon cylinder, 50 L"
gas = "argon"
water_capacity = "50 L"
service_pressure = "200 barg"
rated_temperature = "54 C"
construction = "steel"
supply_temperature = "21 C"
fill_rate = "10 bar/min"
residual_pressure = "2 barg"
""",
]


def distinct(item, i):
    """The item with its volume scaled by (1 + i·1e-6): alike to the eye, not to the memo."""

    def scaled(m):
        return f'{m.group(1)} = "{float(m.group(2)) * (1 + i * 1e-6):.9g} {m.group(3)}"'

    return re.sub(r'(volume|water_capacity) = "([0-9.]+) ([^"]+)"', scaled, item, count=1)


def write_site(path, n, unique):
    with open(path, "w", encoding="utf-8") as f:
        f.write(SITE.format(n=n))
        for i in range(n):
            item = ITEMS[i % len(ITEMS)].format(i=f"{i + 1:05d}")
            f.write("\n" + (distinct(item, i) if unique else item))


def timed(cmd, env):
    """Runs cmd; returns (wall seconds, peak resident memory in MiB, exit code)."""
    # A fresh child per command: ru_maxrss of RUSAGE_CHILDREN is the largest child so far,
    # so each command runs from its own small wrapper process.
    wrapper = [
        sys.executable,
        "-c",
        "import resource,subprocess,sys;"
        "r=subprocess.run(sys.argv[1:],stdout=subprocess.DEVNULL).returncode;"
        "print(resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss);sys.exit(r)",
        *cmd,
    ]
    start = time.monotonic()
    out = subprocess.run(wrapper, env=env, capture_output=True, text=True)
    wall = time.monotonic() - start
    lines = out.stdout.strip().splitlines()
    peak_kib = int(lines[-1]) if lines else 0
    if out.returncode not in (0, 3):
        sys.stderr.write(out.stderr)
    return wall, peak_kib / 1024, out.returncode


def main():
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--items", type=int, default=1000)
    p.add_argument("--distinct", action="store_true", help="make every item differ")
    p.add_argument("--binary", default="target/release/pvhazard")
    p.add_argument("--keep", help="write the site and the worksheets here and keep them")
    a = p.parse_args()
    work = a.keep or tempfile.mkdtemp(prefix="pvhazard-scale-")
    os.makedirs(work, exist_ok=True)
    site = os.path.join(work, "scale-site.toml")
    out = os.path.join(work, "worksheets")
    shutil.rmtree(out, ignore_errors=True)
    write_site(site, a.items, a.distinct)
    env = dict(os.environ, SOURCE_DATE_EPOCH="1798761600")
    binary = os.path.abspath(a.binary)
    kind = "each distinct" if a.distinct else "seven kinds repeated"
    print(f"{a.items} items ({kind}), {os.cpu_count()} cores, {binary}")
    for name, cmd in [
        ("worksheet --all", [binary, "worksheet", site, "--all", "--out", out]),
        ("check", [binary, "check", site]),
    ]:
        wall, peak, code = timed(cmd, env)
        print(f"{name:<16} {wall:8.2f} s wall  {peak:8.1f} MiB peak  exit {code}")
    if not a.keep:
        shutil.rmtree(work, ignore_errors=True)


if __name__ == "__main__":
    main()
