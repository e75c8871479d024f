#!/usr/bin/env python3
"""Wet-bulb speed: siccant's library against the Python anchors, in one run.

Times, for the same deterministic state set (0-200 degC at 101.325 kPa; rh
5-95 % up to 90 degC, else w = 0.002-0.202 kg/kg; see benches/air.rs):

- siccant: `AirState::wet_bulb` over 100,000 states, and the whole `air(T:, rh:)`
  built-in (all fields) over 10,000 (criterion, `cargo bench --bench air`);
- CoolProp 8 `HAPropsSI('Twb', ...)` called in a Python loop;
- psychrolib `GetTWetBulbFromHumRatio` called in a Python loop;

and prints the time per state and the ratios. Needs `coolprop`, `psychrolib`:

    python3 -m venv /work/venv-air && /work/venv-air/bin/pip install coolprop psychrolib
    /work/venv-air/bin/python benches/air_compare.py [--python-states N]
"""
import argparse
import os
import re
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


def criterion_ns(out, name, states):
    """Median time per state of criterion benchmark `name`, ns."""
    m = re.search(name + r"\s+time:\s+\[\S+ \S+ (\S+) (\S+) \S+ \S+\]", out)
    if not m:
        sys.exit("could not read the criterion output:\n" + out)
    value, unit = float(m.group(1)), m.group(2)
    scale = {"ns": 1.0, "µs": 1e3, "us": 1e3, "ms": 1e6, "s": 1e9}[unit]
    return value * scale / states


def ours_ns_per_state():
    """Run the criterion benches: (wet-bulb via AirState, full air() built-in) in ns per state."""
    cmd = ["cargo", "bench", "--bench", "air"]
    out = subprocess.run(cmd, cwd=ROOT, capture_output=True, text=True, check=True).stdout
    return criterion_ns(out, "wet_bulb_100k", 100_000), criterion_ns(out, "air_builtin_10k", 10_000)


def coolprop_us_per_state(n):
    inputs = [state_inputs(i) for i in range(n)]
    start = time.perf_counter()
    for t_c, rh, w in inputs:
        if rh is not None:
            HAPropsSI("Twb", "T", t_c + 273.15, "P", P, "R", rh)
        else:
            HAPropsSI("Twb", "T", t_c + 273.15, "P", P, "W", w)
    return (time.perf_counter() - start) / n * 1e6


def psychrolib_us_per_state(n):
    psychrolib.SetUnitSystem(psychrolib.SI)
    inputs = []
    for i in range(n):
        t_c, rh, w = state_inputs(i)
        if w is None:
            w = psychrolib.GetHumRatioFromRelHum(t_c, rh, P)
        inputs.append((t_c, w))
    start = time.perf_counter()
    for t_c, w in inputs:
        psychrolib.GetTWetBulbFromHumRatio(t_c, w, P)
    return (time.perf_counter() - start) / n * 1e6


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--python-states", type=int, default=5000, help="states per Python loop (default 5000)")
    args = parser.parse_args()
    ours, builtin = ours_ns_per_state()
    cp = coolprop_us_per_state(args.python_states)
    pl = psychrolib_us_per_state(args.python_states)
    print(f"{'wet-bulb, per state':<40}{'time':>14}{'siccant is faster by':>24}")
    print(f"{'siccant AirState::wet_bulb (Rust)':<40}{ours:>11.0f} ns{'':>24}")
    print(f"{'siccant air() built-in, full record':<40}{builtin:>11.0f} ns{cp * 1e3 / builtin:>23.0f}x (vs CoolProp)")
    print(f"{'CoolProp HAPropsSI loop (Python)':<40}{cp:>11.1f} us{cp * 1e3 / ours:>23.0f}x")
    print(f"{'psychrolib loop (Python)':<40}{pl:>11.1f} us{pl * 1e3 / ours:>23.0f}x")
    print(f"(Python loops over {args.python_states} states; siccant over 100,000 states, criterion median)")


if __name__ == "__main__":
    main()
