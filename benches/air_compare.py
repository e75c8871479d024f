#!/usr/bin/env python3
"""Humid-air speed: siccant's library and worksheet sweep against the Python anchors, in one run.

Times, for the same deterministic state set (0-200 degC at 101.325 kPa; rh
5-95 % up to 90 degC, else w = 0.002-0.202 kg/kg; see benches/air.rs):

- siccant (`cargo bench --bench air -- --oneshot`, CPU time per state, best of
  a few rounds): `AirState::wet_bulb` over 100,000 states, the whole
  `air(T:, rh:)` built-in (all fields) over 10,000, and the same as a sweep in
  a worksheet: `sweep([twb], T: ..., w: ...)` over 100,000 air states
  (benches/air.rs `SWEEP_SHEET`, 50-150 degC x 0.0003-0.075 kg/kg), on one
  thread and on all;
- CoolProp 8 `HAPropsSI('Twb', ...)` called in a Python loop, on the library
  state set and on the sweep's grid (every k-th point);
- psychrolib `GetTWetBulbFromHumRatio` called in a Python loop;

and prints the CPU time per state and the ratios (the Python loops are timed
by process CPU time too). Needs `coolprop`, `psychrolib`:

    python3 -m venv /work/venv-air && /work/venv-air/bin/pip install coolprop psychrolib
    /work/venv-air/bin/python benches/air_compare.py [--python-states N]
"""
import argparse
import os
import subprocess
import sys
import time

from CoolProp.HumidAirProp import HAPropsSI
import psychrolib

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
P = 101325.0


def state_inputs(i):
    """Mirror of `state_inputs` in benches/air.rs: (t_c, rh or None, w or None)."""
    a = ((i * 7919) % 10007) / 10007.0
    b = ((i * 104729) % 10009) / 10009.0
    t_c = 200.0 * a
    if t_c <= 90.0:
        return t_c, 0.05 + 0.9 * b, None
    return t_c, None, 0.002 + 0.2 * b


def ours():
    """Run `cargo bench --bench air -- --oneshot` and return its key=value lines as a dict."""
    cmd = ["cargo", "bench", "--bench", "air", "--", "--oneshot"]
    out = subprocess.run(cmd, cwd=ROOT, capture_output=True, text=True, check=True).stdout
    values = dict(line.split("=", 1) for line in out.splitlines() if "=" in line)
    if "wet_bulb_cpu_ns_per_state" not in values:
        sys.exit("could not read the bench output:\n" + out)
    return {k: float(v) for k, v in values.items()}


def sweep_inputs(n):
    """Every k-th point of the worksheet sweep's grid (benches/air.rs SWEEP): (T_K, w)."""
    grid = [(50.25 + 0.25 * i + 273.15, 0.0003 * (j + 1)) for i in range(400) for j in range(250)]
    step = max(1, len(grid) // n)
    return grid[::step][:n]


def coolprop_sweep_us_per_state(n):
    inputs = sweep_inputs(n)
    start = time.process_time()
    for t_k, w in inputs:
        HAPropsSI("Twb", "T", t_k, "P", P, "W", w)
    return (time.process_time() - start) / len(inputs) * 1e6


def coolprop_us_per_state(n):
    inputs = [state_inputs(i) for i in range(n)]
    start = time.process_time()
    for t_c, rh, w in inputs:
        if rh is not None:
            HAPropsSI("Twb", "T", t_c + 273.15, "P", P, "R", rh)
        else:
            HAPropsSI("Twb", "T", t_c + 273.15, "P", P, "W", w)
    return (time.process_time() - start) / n * 1e6


def psychrolib_us_per_state(n):
    psychrolib.SetUnitSystem(psychrolib.SI)
    inputs = []
    for i in range(n):
        t_c, rh, w = state_inputs(i)
        if w is None:
            w = psychrolib.GetHumRatioFromRelHum(t_c, rh, P)
        inputs.append((t_c, w))
    start = time.process_time()
    for t_c, w in inputs:
        psychrolib.GetTWetBulbFromHumRatio(t_c, w, P)
    return (time.process_time() - start) / n * 1e6


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--python-states", type=int, default=5000, help="states per Python loop (default 5000)")
    args = parser.parse_args()
    n = args.python_states
    r = ours()
    wet_bulb = r["wet_bulb_cpu_ns_per_state"]
    builtin = r["air_builtin_cpu_ns_per_call"]
    sweep_one = r["sweep_cpu_ns_per_state_one_thread"]
    sweep_all = r["sweep_cpu_ns_per_state_all_threads"]
    cp = coolprop_us_per_state(n)
    cp_sweep = coolprop_sweep_us_per_state(n)
    pl = psychrolib_us_per_state(n)
    row = "{:<50}{:>12}{:>26}"
    print(row.format("wet-bulb, CPU time per state", "time", "CoolProp loop / this"))
    print(row.format("siccant AirState::wet_bulb (Rust library)", f"{wet_bulb:.0f} ns", f"{cp * 1e3 / wet_bulb:.0f}x"))
    print(row.format("siccant air() built-in, full record", f"{builtin:.0f} ns", f"{cp * 1e3 / builtin:.0f}x"))
    print(row.format("siccant worksheet sweep, 1 thread", f"{sweep_one:.0f} ns", f"{cp_sweep * 1e3 / sweep_one:.0f}x"))
    threads = int(r["sweep_threads"])
    print(row.format(f"siccant worksheet sweep, {threads} threads (CPU)", f"{sweep_all:.0f} ns", f"{cp_sweep * 1e3 / sweep_all:.0f}x"))
    print(row.format("CoolProp HAPropsSI loop (Python), library set", f"{cp:.1f} us", "1x"))
    print(row.format("CoolProp HAPropsSI loop (Python), sweep grid", f"{cp_sweep:.1f} us", "1x"))
    print(row.format("psychrolib loop (Python)", f"{pl:.1f} us", f"{cp / pl:.2f}x"))
    print(f"(siccant: {int(r['sweep_points'])}-point sweep, 100,000 library states, CPU time;"
          f" Python loops over {n} states, process CPU time)")
    print("targets (issue 3): library wet-bulb < 300 ns per state; worksheet sweep < 1 us per state")


if __name__ == "__main__":
    main()
