"""Side-by-side speed of siccant's least-squares fitter and scipy.optimize.curve_fit.

One run does both: the bench binary `cargo bench --bench fit` with
FIT_CPU_TIMING=1 prints siccant's fitted parameters and CPU time per fit; then
the same fits with scipy on the same committed invented data and the same start
values, timed by CPU time too (time.process_time, best of three rounds of
about 0.3 s). CPU time, not wall-clock time, because the machine is shared
with other jobs. Prints time per fit, the speed ratio and the largest relative
parameter difference. Target: ratio >= 20 with parameters within 0.5 %, for
GAB (row gab_15: the library's GAB model from scipy's start; row
gab_15_with_starts: `fit_isotherm`'s full route) and for Page by
`fit_thin_layer`, the route a worksheet takes for it (row
page_300_thin_layer). The rows page_300 (the generic fitter with
finite-difference derivatives, as for a model a user writes as a function)
and page_300_gradient (the generic fitter with derivatives given as a
closure) are printed for reference and not counted against the target.
For criterion's wall-clock figures run `cargo bench --bench fit`.

Run from the repository root with numpy and scipy installed:
    python benches/fit_compare.py
"""
import csv
import json
import os
import re
import subprocess
import sys
import time

import numpy as np
import scipy
from scipy.optimize import curve_fit

DATA = "tests/reference/scipy_fit/data"


def read(path):
    with open(path) as f:
        rows = list(csv.reader(line for line in f if not line.startswith("#")))
    return np.array([[float(c) for c in r] for r in rows[1:]])


def gab(aw, xm, c, k):
    return xm * c * k * aw / ((1 - k * aw) * (1 - k * aw + c * k * aw))


def page(t, k, n):
    return np.exp(-k * t ** n)


def run_siccant():
    env = dict(os.environ, FIT_CPU_TIMING="1")
    out = subprocess.run(["cargo", "bench", "--bench", "fit"], capture_output=True, text=True, check=True, env=env).stdout
    params = {m.group(1): json.loads(m.group(2)) for m in re.finditer(r"PARAMS (\S+) (\[.*\])", out)}
    times = {m.group(1): float(m.group(2)) for m in re.finditer(r"CPU (\S+) (\S+)", out)}
    return params, times


def time_scipy(f, x, y, p0):
    popt, _ = curve_fit(f, x, y, p0=p0)
    t0 = time.process_time()
    curve_fit(f, x, y, p0=p0)
    reps = max(10, int(0.3 / max(time.process_time() - t0, 1e-6)))
    rounds = []
    for _ in range(3):
        t0 = time.process_time()
        for _ in range(reps):
            curve_fit(f, x, y, p0=p0)
        rounds.append((time.process_time() - t0) / reps)
    return list(popt), min(rounds)


def main():
    starch = read(f"{DATA}/starch_powder_25C.csv")
    run = read(f"{DATA}/page_run_300.csv")
    scipy_fits = {
        "gab_15": time_scipy(gab, starch[:, 0], starch[:, 1], [0.07, 10.0, 0.85]),
        "page_300": time_scipy(page, run[:, 0], run[:, 1], [0.01, 1.0]),
    }
    params, times = run_siccant()
    print("CPU time per fit (process clock, best of 3 rounds)")
    print(f"scipy {scipy.__version__}, numpy {np.__version__}, Python {sys.version.split()[0]}")
    print(f"{'fit':<22}{'siccant':>12}{'scipy':>12}{'ratio':>9}{'max param diff':>17}")
    ok = True
    reference = {"page_300", "page_300_gradient"}
    for name, (popt, t_scipy) in scipy_fits.items():
        for ours in sorted(n for n in times if n.startswith(name)):
            diff = max(abs(a - b) / abs(b) for a, b in zip(params[ours], popt))
            ratio = t_scipy / times[ours]
            met = diff <= 5e-3 and ratio >= 20
            if ours in reference:
                verdict = "reference (generic fitter)"
            else:
                verdict = "met" if met else "NOT met"
                ok &= met
            print(f"{ours:<22}{times[ours] * 1e6:>10.1f}us{t_scipy * 1e6:>10.1f}us{ratio:>8.1f}x{diff:>16.1e}  {verdict}")
    print(
        "target (>= 20x faster than scipy, parameters within 0.5 %, GAB and Page by fit_thin_layer):",
        "met" if ok else "NOT met",
    )


if __name__ == "__main__":
    main()
