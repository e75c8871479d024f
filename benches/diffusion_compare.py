#!/usr/bin/env python3
"""Side by side: siccant's finite-volume slab solver against scipy's
solve_ivp (BDF) on the same method-of-lines problem, in one run.

Problem (same as benches/diffusion.rs): slab 10 mm drying from both faces
(half-thickness 5 mm), 100 cells graded toward the surface (face positions are
taken from our solver's output so the grids are identical),
D(X) = 2e-10 m^2/s * exp(0.6 (X - Xe)), X0 = 3.0 db, Xe = 0.1 db, surface at
equilibrium, run until the mean moisture ratio reaches 0.01.

Usage (from the repository root, with numpy and scipy installed):
    python benches/diffusion_compare.py
It builds and runs `cargo bench --bench diffusion` with DIFFUSION_COMPARE=1
(optimised bench profile) for our figures, then times scipy (best of 5).
Targets: ours at least 40x faster, drying times within 0.5 %.
"""
import json
import os
import subprocess
import sys
import time

import numpy as np
import scipy
from scipy.integrate import solve_ivp

X0, XE, D_REF, A, TARGET = 3.0, 0.1, 2e-10, 0.6, 0.01


def ours():
    env = dict(os.environ, DIFFUSION_COMPARE="1")
    out = subprocess.run(["cargo", "bench", "--bench", "diffusion", "-q"], env=env, check=True, capture_output=True, text=True)
    line = [l for l in out.stdout.splitlines() if l.startswith("{")][-1]
    return json.loads(line)


def mol(faces):
    r = np.asarray(faces)
    inner = np.concatenate([[0.0], r[:-1]])
    c = 0.5 * (inner + r)
    s = r - inner
    gap = np.diff(c)
    half = r[-1] - c[-1]
    d_e = D_REF

    def d(x):
        return D_REF * np.exp(A * (x - XE))

    def rhs(_t, x):
        dx = d(x)
        flux = np.empty_like(x)
        flux[:-1] = 0.5 * (dx[:-1] + dx[1:]) * (x[:-1] - x[1:]) / gap
        flux[-1] = 0.5 * (dx[-1] + d_e) * (x[-1] - XE) / half
        out = -flux / s
        out[1:] += flux[:-1] / s[1:]
        return out

    def ratio(x):
        return (np.dot(s, x) / s.sum() - XE) / (X0 - XE)

    def event(_t, x):
        return ratio(x) - TARGET

    event.terminal = True
    event.direction = -1
    return rhs, event, len(r)


def scipy_run(faces, rtol, sparsity):
    rhs, event, n = mol(faces)
    kwargs = {}
    if sparsity:
        from scipy.sparse import diags
        kwargs["jac_sparsity"] = diags([1.0, 1.0, 1.0], [-1, 0, 1], shape=(n, n))
    best = float("inf")
    sol = None
    for _ in range(5):
        start = time.perf_counter()
        sol = solve_ivp(rhs, (0.0, 1e8), np.full(n, X0), method="BDF", rtol=rtol, atol=1e-9, events=event, **kwargs)
        best = min(best, time.perf_counter() - start)
    return sol.t_events[0][0], best, sol.nfev, sol.njev


def main():
    us = ours()
    print(f"numpy {np.__version__}, scipy {scipy.__version__}, python {sys.version.split()[0]}")
    print(f"siccant FV+BDF2 (rel_tol {us['rel_tol']}): t(MR=0.01) = {us['time_to_target_s'] / 3600:.5f} h, "
          f"best {us['best_s'] * 1e3:.3f} ms, mean {us['mean_s'] * 1e3:.3f} ms over {us['repeats']} runs, "
          f"{us['steps']} steps, {us['newton']} Newton iterations")
    reference = None
    for rtol, sparse in [(1e-6, False), (1e-6, True), (1e-9, True)]:
        t, best, nfev, njev = scipy_run(us["faces"], rtol, sparse)
        reference = t if rtol == 1e-9 else reference
        label = f"scipy solve_ivp BDF rtol {rtol:g}, {'banded sparsity' if sparse else 'dense FD Jacobian'}"
        diff = (us["time_to_target_s"] / t - 1) * 100
        print(f"{label}: t = {t / 3600:.5f} h, best of 5 {best * 1e3:.1f} ms ({nfev} f-evals, {njev} Jacobians); "
              f"ours is {best / us['best_s']:.0f}x faster, times differ by {diff:+.3f} %")
    print(f"ours vs scipy at rtol 1e-9: {(us['time_to_target_s'] / reference - 1) * 100:+.4f} %")


if __name__ == "__main__":
    main()
