#!/usr/bin/env python3
"""The what-if benchmark in one run: siccant's 100,000-point sweep and
10,000-sample Monte Carlo of a small tray-dryer worksheet (benches/whatif.rs,
run with --oneshot), and the same sweep written as a Python loop over CoolProp
and scipy, the anchor a user would otherwise pick.

The Python loop mirrors the worksheet step by step: the humid-air state
(HAPropsSI: humidity ratio and density; siccant's study points build no
record field of it, only the state the transfer built-ins read), the
parallel-flow tray coefficient h = 0.0204 G^0.8, the wet-surface balance
h (T - Ts) = k_Y (w_s(Ts) - w) lambda(Ts) with k_Y from Chilton-Colburn at the
film temperature (Pr from CoolProp, Sc with the Fuller diffusivity), solved
with scipy.optimize.brentq and iterated on the film temperature until Ts moves
less than 1 mK, then t = (Ls/A)(X1 - X2)/Rc.

The Python loop is slow, so by default it runs on a subset of the grid (every
k-th point, --python-points, default 300) and its time is scaled to 100,000
points; the report says so. Pass --python-points 100000 for the full loop.

Usage: /work/venv-whatif/bin/python benches/whatif_compare.py [--python-points N] [--skip-rust]
Needs: pip install coolprop scipy (versions are printed).
"""

import argparse
import math
import os
import subprocess
import sys
import time

P = 101325.0
# Full humid-air states per sweep point (the worksheet's air() state plus one
# AirState::from_w with transport properties per film-temperature pass of the
# wet-surface solve) and the evaluations of saturated air at trial surface
# temperatures (not counted as states): printed by benches/whatif.rs --oneshot,
# which documents how they were counted (callgrind, 2,500-point sweep).
V_AIR = 3.0  # m/s
LOAD, X1, X2 = 20.0, 1.6, 0.5  # kg/m^2, db, db
T_GRID = [40.2 + 0.2 * i for i in range(400)]  # degC, as steps(40.2 degC, 120 degC, 0.2 K)
RH_GRID = [0.01 + 0.001 * j for j in range(250)]  # as steps(1 %, 25.9 %, 0.1 %)


def fuller_diffusivity(t_k, p_pa):
    """Water vapour in air, Fuller-Schettler-Giddings (1966), m^2/s."""
    m_air, m_water = 28.9647, 18.01528
    v_air, v_water = 19.7, 13.1
    p_atm = p_pa / 101325.0
    num = 1.0e-3 * t_k ** 1.75 * math.sqrt(1.0 / m_air + 1.0 / m_water)
    return num / (p_atm * (v_air ** (1 / 3) + v_water ** (1 / 3)) ** 2) * 1.0e-4


def tray_point(t_c, rh, ha, props, brentq):
    """Constant-rate time (s) of one point, mirroring benches/whatif.rs."""
    t = t_c + 273.15
    w = ha("W", "T", t, "P", P, "R", rh)
    rho = 1.0 / ha("Vha", "T", t, "P", P, "W", w)
    g = rho * V_AIR * 3600.0  # kg/(m^2 h)
    h = 0.0204 * g ** 0.8  # W/(m^2 K)
    ts = ha("B", "T", t, "P", P, "W", w)
    for _ in range(20):
        tf = 0.5 * (t + ts)
        cs = ha("cp", "T", tf, "P", P, "W", w)  # per kg dry air
        cp = ha("cp_ha", "T", tf, "P", P, "W", w)
        mu = ha("mu", "T", tf, "P", P, "W", w)
        k = ha("k", "T", tf, "P", P, "W", w)
        rho_f = 1.0 / ha("Vha", "T", tf, "P", P, "W", w)
        pr = cp * mu / k
        sc = mu / (rho_f * fuller_diffusivity(tf, P))
        ky = h / cs * (pr / sc) ** (2.0 / 3.0)

        def balance(x):
            ws = ha("W", "T", x, "P", P, "R", 1.0)
            lam = props("H", "T", x, "Q", 1, "Water") - props("H", "T", x, "Q", 0, "Water")
            return h * (t - x) - ky * (ws - w) * lam

        new = brentq(balance, ts - 5.0, min(t, 370.0), xtol=1e-6)
        done = abs(new - ts) < 1e-3
        ts = new
        if done:
            break
    ws = ha("W", "T", ts, "P", P, "R", 1.0)
    rc = ky * (ws - w)  # kg/(m^2 s)
    return LOAD * (X1 - X2) / rc


def python_loop(n_points):
    import CoolProp
    import scipy
    from CoolProp.CoolProp import HAPropsSI, PropsSI
    from scipy.optimize import brentq

    grid = [(t, rh) for t in T_GRID for rh in RH_GRID]
    stride = max(1, len(grid) // n_points)
    subset = grid[::stride][:n_points]
    start, cpu_start = time.perf_counter(), time.process_time()
    results = [tray_point(t, rh, HAPropsSI, PropsSI, brentq) for t, rh in subset]
    seconds, cpu = time.perf_counter() - start, time.process_time() - cpu_start
    return CoolProp.__version__, scipy.__version__, len(subset), seconds, cpu, subset, results


def siccant_oneshot():
    root = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
    cmd = ["cargo", "bench", "--bench", "whatif", "--", "--oneshot"]
    out = subprocess.run(cmd, cwd=root, check=True, capture_output=True, text=True).stdout
    return {k: float(v) for k, v in (l.split("=", 1) for l in out.splitlines() if "=" in l)}


def siccant_points(subset):
    """siccant's t_constant at a few points, to show both loops compute the same thing."""
    root = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
    out = []
    for t, rh in subset:
        sheet = os.path.join(root, "target", "whatif_check.sicc")
        with open(sheet, "w") as f:
            f.write(f"input T_air = {t:.4f} degC\ninput rh_air = {rh * 100:.4f} %\n")
            f.write("hot = air(T: T_air, rh: rh_air)\nh = h_tray_parallel(air: hot, velocity: 3 m/s)\n")
            f.write("surface = wet_surface(hot, h: h)\n")
            f.write("t_constant = constant_rate_time(load: 20 kg/m^2, X1: 1.6 db, X2: 0.5 db, Rc: surface.Rc)\n")
        res = subprocess.run(
            [os.path.join(root, "target", "release", "siccant"), "run", sheet, "--format", "json"],
            capture_output=True, text=True,
        )
        import json

        values = {v["name"]: v for v in json.loads(res.stdout)["values"]}
        out.append(values["t_constant"]["si"])
    return out


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--python-points", type=int, default=300)
    ap.add_argument("--skip-rust", action="store_true")
    args = ap.parse_args()

    if not args.skip_rust:
        r = siccant_oneshot()
        n = r["sweep_points"]
        print(f"siccant: {n:.0f}-point sweep: {r['sweep_seconds_all_threads']:.3f} s wall on {r['threads']:.0f} threads "
              f"({r['sweep_cpu_seconds_all_threads']:.2f} s CPU); {r['sweep_seconds_one_thread']:.3f} s wall on one thread "
              f"({r['sweep_cpu_seconds_one_thread']:.2f} s CPU)")
        per_core = n / r["sweep_cpu_seconds_one_thread"]
        states = r["full_states_per_point"]
        print(f"siccant: {per_core:,.0f} sweep points per CPU-second; per point the worksheet builds 1 air(T, rh) state "
              f"and the wet-surface solve {states - 1:.2f} more on average (one per film-temperature pass, with their "
              f"transport properties): {per_core * states:,.0f} humid-air states/s/core "
              f"({per_core:,.0f} counting only the worksheet's own air(...) state)")
        sat = r["saturated_surface_evaluations_per_point"]
        print(f"siccant: (information, not counted as states) {sat:.2f} evaluations of saturated air at trial surface "
              f"temperatures per point: {per_core * sat:,.0f} per CPU-second")
        print(f"siccant: {r['monte_carlo_samples']:.0f}-sample Monte Carlo: {r['monte_carlo_seconds']:.3f} s wall "
              f"({r['monte_carlo_cpu_seconds']:.2f} s CPU)")

    cp_v, sp_v, m, secs, cpu, subset, results = python_loop(args.python_points)
    per_point = cpu / m
    print(f"python: CoolProp {cp_v}, scipy {sp_v}, Python {sys.version.split()[0]}: {m} points in {secs:.2f} s wall "
          f"({cpu:.2f} s CPU), {per_point * 1e3:.3f} ms CPU/point, {1 / per_point:,.0f} points per CPU-second")
    full = per_point * 100000
    print(f"python: 100,000 points scaled from {m}: {full:.1f} s CPU")
    if not args.skip_rust:
        print(f"ratio (Python loop / siccant sweep, CPU time, one core each): {full / r['sweep_cpu_seconds_one_thread']:.0f}x")
        print(f"ratio (Python loop CPU time / siccant sweep wall time on {r['threads']:.0f} threads): "
              f"{full / r['sweep_seconds_all_threads']:.0f}x")
        check = subset[:: max(1, len(subset) // 5)][:5]
        ours = siccant_points(check)
        theirs = [results[subset.index(p)] for p in check]
        worst = max(abs(a / b - 1) for a, b in zip(ours, theirs))
        print(f"agreement on {len(check)} points: max relative difference in t_constant {worst:.2e}")


if __name__ == "__main__":
    main()
