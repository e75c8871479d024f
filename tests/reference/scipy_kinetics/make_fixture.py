#!/usr/bin/env python3
"""Reference values for siccant's kinetics engine, computed with scipy.

Run with the venv that has numpy and scipy:
    python tests/reference/scipy_kinetics/make_fixture.py
It writes fixture.json beside this script. Everything here is an independent
implementation (scipy.special.jn_zeros, scipy.optimize.brentq, scipy.integrate.quad,
scipy.interpolate.PchipInterpolator, scipy.optimize.curve_fit); the Rust tests
read the committed JSON and never need Python.

All data sets are invented for testing.
"""
import json
import pathlib

import numpy as np
import scipy
from scipy import integrate, interpolate, optimize, special
from scipy.integrate import solve_ivp

OUT = pathlib.Path(__file__).with_name("fixture.json")
SUITE_DATA = pathlib.Path(__file__).resolve().parents[2] / "suite" / "kinetics" / "data"
FOURIER = [1e-4, 1e-3, 0.01, 0.05, 0.1, 0.2, 0.4, 0.7, 1.0, 1.5, 2.5]
BIOTS = [None, 0.5, 5.0, 50.0]
TERMS = 3000


def eigenvalues(shape, biot, terms=TERMS):
    """Eigenvalues of Crank's series (The Mathematics of Diffusion, ch. 4-6)."""
    n = np.arange(1, terms + 1)
    if biot is None:
        if shape == "slab":
            return (n - 0.5) * np.pi
        if shape == "sphere":
            return n * np.pi
        return special.jn_zeros(0, terms)
    roots = []
    if shape == "cylinder":
        j0 = special.jn_zeros(0, terms)
        j1 = np.concatenate([[0.0], special.jn_zeros(1, terms - 1)])
        f = lambda b: b * special.j1(b) - biot * special.j0(b)
        for k in range(terms):
            lo = j1[k] + (1e-14 if k == 0 else 0.0)
            roots.append(optimize.brentq(f, lo, j0[k], xtol=1e-15, rtol=1e-15))
        return np.array(roots)
    for k in n:
        if shape == "slab":
            # beta tan beta = Bi, on ((k-1) pi, (k-1/2) pi); cos-multiplied form
            f = lambda b: b * np.sin(b) - biot * np.cos(b)
            lo, hi = (k - 1) * np.pi, (k - 0.5) * np.pi
        else:
            # 1 - beta cot beta = Bi, i.e. beta cos beta + (Bi - 1) sin beta = 0 on ((k-1) pi, k pi)
            f = lambda b: b * np.cos(b) + (biot - 1.0) * np.sin(b)
            lo, hi = (k - 1) * np.pi + (1e-9 if k == 1 else 0.0), k * np.pi
        roots.append(optimize.brentq(f, lo, hi, xtol=1e-15, rtol=1e-15))
    return np.array(roots)


def coefficients(shape, biot, b):
    b2 = b * b
    s = {"slab": 2.0, "cylinder": 4.0, "sphere": 6.0}[shape]
    if biot is None:
        return s / b2
    L = biot
    if shape == "slab":
        return 2 * L * L / (b2 * (b2 + L * L + L))
    if shape == "cylinder":
        return 4 * L * L / (b2 * (b2 + L * L))
    return 6 * L * L / (b2 * (b2 + L * (L - 1)))


def crank_cases():
    cases = []
    for shape in ["slab", "cylinder", "sphere"]:
        for biot in BIOTS:
            b = eigenvalues(shape, biot)
            a = coefficients(shape, biot, b)
            mr = lambda fo: float(np.sum(a * np.exp(-b * b * fo)))
            fo_01 = optimize.brentq(lambda fo: np.log(mr(fo)) - np.log(0.01), 1e-3, 50, xtol=1e-14, rtol=1e-14)
            cases.append({
                "shape": shape,
                "biot": biot,
                "roots": [float(v) for v in b[:10]],
                "fourier": FOURIER,
                "ratio": [mr(fo) for fo in FOURIER],
                "fourier_at_ratio_0_01": fo_01,
            })
    return cases


# --- drying time --------------------------------------------------------------

def closed_constant_linear(rc, xc, xe, load, x1, x2):
    """t = Ls/A [ (X1 - Xc)/Rc + (Xc - Xe)/Rc ln((Xc - Xe)/(X2 - Xe)) ] for X1 > Xc > X2."""
    return load * ((x1 - xc) / rc + (xc - xe) / rc * np.log((xc - xe) / (x2 - xe)))


def power_rate(rc, xc, xe, n):
    return lambda x: rc if x >= xc else rc * ((x - xe) / (xc - xe)) ** n


RATE_TABLES = [
    {   # invented: a product with a short constant period and a curved falling period
        "moisture": [0.06, 0.10, 0.16, 0.25, 0.38, 0.52, 0.66, 0.80, 1.00, 1.20, 1.45],
        "rate": [0.0, 0.9e-4, 2.1e-4, 3.6e-4, 5.2e-4, 6.4e-4, 7.1e-4, 7.4e-4, 7.5e-4, 7.5e-4, 7.5e-4],
        "spans": [[1.4, 0.12], [1.0, 0.2], [0.7, 0.07], [1.45, 0.061]],
        "load": 18.0,
    },
    {   # invented: uneven moisture steps, concave falling period
        "moisture": [0.02, 0.05, 0.07, 0.12, 0.30, 0.31, 0.55, 0.90],
        "rate": [0.0, 2.0e-4, 3.1e-4, 5.0e-4, 9.0e-4, 9.1e-4, 1.1e-3, 1.1e-3],
        "spans": [[0.9, 0.03], [0.5, 0.06], [0.85, 0.2]],
        "load": 6.5,
    },
]


def drying_time_cases():
    linear = []
    for rc, xc, xe, load, x1, x2 in [(1.2e-3, 0.6, 0.05, 18.0, 1.3, 0.12), (4e-4, 0.9, 0.1, 30.0, 2.5, 0.11), (8e-4, 0.35, 0.0, 5.0, 0.9, 0.01)]:
        f = lambda x: 1.0 / (rc if x >= xc else rc * (x - xe) / (xc - xe))
        q, _ = integrate.quad(f, x2, x1, points=[xc], epsabs=0, epsrel=1e-12, limit=200)
        linear.append({"rc": rc, "xc": xc, "xe": xe, "load": load, "x1": x1, "x2": x2,
                       "closed_form_s": closed_constant_linear(rc, xc, xe, load, x1, x2), "quad_s": load * q})
    power = []
    for rc, xc, xe, n, load, x1, x2 in [(1.2e-3, 0.6, 0.05, 1.7, 18.0, 1.3, 0.12), (5e-4, 0.8, 0.04, 0.6, 12.0, 1.5, 0.05)]:
        r = power_rate(rc, xc, xe, n)
        q, _ = integrate.quad(lambda x: 1.0 / r(x), x2, x1, points=[xc], epsabs=0, epsrel=1e-12, limit=200)
        power.append({"rc": rc, "xc": xc, "xe": xe, "n": n, "load": load, "x1": x1, "x2": x2, "quad_s": load * q})
    tables = []
    for t in RATE_TABLES:
        p = interpolate.PchipInterpolator(t["moisture"], t["rate"])
        probe = np.linspace(t["moisture"][0], t["moisture"][-1], 37)
        spans = []
        for x1, x2 in t["spans"]:
            q, _ = integrate.quad(lambda x: 1.0 / float(p(x)), x2, x1, points=t["moisture"][1:-1], epsabs=0, epsrel=1e-11, limit=400)
            spans.append({"x1": x1, "x2": x2, "quad_s": t["load"] * q})
        tables.append({**{k: t[k] for k in ("moisture", "rate", "load")}, "probe_x": probe.tolist(),
                       "probe_pchip": p(probe).tolist(), "spans": spans})
    return {"constant_linear": linear, "constant_power": power, "tables": tables}


# --- thin-layer models ------------------------------------------------------------

MODELS = {
    "lewis": (lambda t, k: np.exp(-k * t), [0.3]),
    "page": (lambda t, k, n: np.exp(-k * t ** n), [0.3, 1.0]),
    "modified_page": (lambda t, k, n: np.exp(-(k * t) ** n), [0.3, 1.0]),
    "henderson_pabis": (lambda t, a, k: a * np.exp(-k * t), [1.0, 0.3]),
    "logarithmic": (lambda t, a, k, c: a * np.exp(-k * t) + c, [1.0, 0.3, 0.0]),
    "two_term": (lambda t, a, k0, b, k1: a * np.exp(-k0 * t) + b * np.exp(-k1 * t), [1.5, 0.45, -0.5, 0.8]),
    "two_term_exponential": (lambda t, a, k: a * np.exp(-k * t) + (1 - a) * np.exp(-k * a * t), [0.5, 0.5]),
    "wang_singh": (lambda t, a, b: 1 + a * t + b * t * t, [-0.1, 0.001]),
    "midilli": (lambda t, a, k, n, b: a * np.exp(-k * t ** n) + b * t, [1.0, 0.3, 1.0, 0.0]),
}


def thin_layer_cases():
    rng = np.random.RandomState(20261202)
    t_h = np.linspace(0.0, 10.0, 31)            # invented: readings every 20 min for 10 h
    mr = np.exp(-0.32 * t_h ** 1.12) + 0.004 * rng.standard_normal(t_h.size)
    mr[0] = 1.0
    fits = []
    for name, (f, p0) in MODELS.items():
        p, _ = optimize.curve_fit(f, t_h, mr, p0=p0, maxfev=200000, xtol=1e-14, ftol=1e-14, gtol=1e-14)
        res = mr - f(t_h, *p)
        sse = float(res @ res)
        n, k = t_h.size, len(p)
        sst = float(((mr - mr.mean()) ** 2).sum())
        fits.append({"model": name, "params_hour_units": [float(v) for v in p], "sse": sse,
                     "r_squared": 1 - sse / sst, "rmse": (sse / n) ** 0.5,
                     "reduced_chi_square": sse / (n - k), "aic": n * np.log(sse / n) + 2 * k})
    SUITE_DATA.mkdir(parents=True, exist_ok=True)
    with open(SUITE_DATA / "invented_thin_layer.csv", "w") as f:
        f.write("# INVENTED thin-layer readings (seeded scatter around a Page curve), written by\n")
        f.write("# tests/reference/scipy_kinetics/make_fixture.py; fits in fixture.json\n")
        f.write("t [h], MR [-]\n")
        for a, b in zip(t_h, mr):
            f.write(f"{float(a)!r}, {float(b)!r}\n")
    return {"time_s": (t_h * 3600.0).tolist(), "ratio": mr.tolist(), "fits": fits}


def diffusivity_case():
    """Invented slab data (half-thickness 3 mm) with noise; D by curve_fit on the series."""
    rng = np.random.RandomState(7)
    l = 0.003
    b = eigenvalues("slab", None, 400)
    a = coefficients("slab", None, b)
    t = np.arange(1, 25) * 1800.0
    mr_of = lambda tt, d: np.array([np.sum(a * np.exp(-b * b * d * x / l ** 2)) for x in np.atleast_1d(tt)])
    mr = mr_of(t, 3.1e-10) * (1 + 0.01 * rng.standard_normal(t.size))
    (d_fit,), cov = optimize.curve_fit(lambda tt, d: mr_of(tt, d * 1e-10), t, mr, p0=[1.0], xtol=1e-14, ftol=1e-14)
    with open(SUITE_DATA / "invented_slab_ratios.csv", "w") as f:
        f.write("# INVENTED moisture ratios of a 6 mm slab (both faces), seeded 1 % scatter, written by\n")
        f.write("# tests/reference/scipy_kinetics/make_fixture.py; D fit in fixture.json\n")
        f.write("t [s], MR [-]\n")
        for a, b in zip(t, mr):
            f.write(f"{float(a)!r}, {float(b)!r}\n")
    return {"half_thickness_m": l, "time_s": t.tolist(), "ratio": mr.tolist(), "d_m2_per_s": d_fit * 1e-10,
            "d_std_error": float(np.sqrt(cov[0, 0])) * 1e-10}


def graded_faces(length, cells, grading):
    """Outer face radii, cell sizes growing geometrically from the surface inward."""
    q = grading ** (1.0 / (cells - 1))
    sizes = q ** np.arange(cells - 1, -1, -1, dtype=float)
    faces = np.cumsum(sizes * length / sizes.sum())
    faces[-1] = length
    return faces


def method_of_lines_cases():
    """The finite-volume equations of src/engine/diffusion/finite_volume.rs
    (no shrinkage, surface at equilibrium, D(X) = D exp(a (X - Xe))) solved
    by scipy's solve_ivp (BDF, rtol 1e-10): time to MR = 0.01. An outside
    check of our time integration on a nonlinear problem."""
    cases = []
    for shape, s_exp, length in [("slab", 0, 0.005), ("sphere", 2, 0.004)]:
        x0, xe, d_ref, a, cells, grading = 3.0, 0.1, 2e-10, 0.6, 100, 30.0
        r = graded_faces(length, cells, grading)
        inner = np.concatenate([[0.0], r[:-1]])
        c = 0.5 * (inner + r)
        solid = (r ** (s_exp + 1) - inner ** (s_exp + 1)) / (s_exp + 1)
        area = r ** s_exp
        gap = np.diff(c)
        half = r[-1] - c[-1]
        d = lambda x: d_ref * np.exp(a * (x - xe))

        def rhs(_t, x):
            dx = d(x)
            flux = np.empty_like(x)
            flux[:-1] = area[:-1] * 0.5 * (dx[:-1] + dx[1:]) * (x[:-1] - x[1:]) / gap
            flux[-1] = area[-1] * 0.5 * (dx[-1] + d(xe)) * (x[-1] - xe) / half
            out = -flux / solid
            out[1:] += flux[:-1] / solid[1:]
            return out

        ratio = lambda x: (np.dot(solid, x) / solid.sum() - xe) / (x0 - xe)
        event = lambda _t, x: ratio(x) - 0.01
        event.terminal = True
        sol = solve_ivp(rhs, (0.0, 1e8), np.full(cells, x0), method="BDF", rtol=1e-10, atol=1e-12, events=event)
        cases.append({"shape": shape, "length_m": length, "x0": x0, "xe": xe, "d_ref": d_ref, "a": a, "cells": cells,
                      "grading": grading, "time_to_0_01_s": float(sol.t_events[0][0])})
    return cases


def main():
    fixture = {
        "generator": "tests/reference/scipy_kinetics/make_fixture.py",
        "versions": {"numpy": np.__version__, "scipy": scipy.__version__},
        "bessel_j0_zeros": special.jn_zeros(0, 30).tolist(),
        "bessel_j1_zeros": special.jn_zeros(1, 30).tolist(),
        "crank": crank_cases(),
        "drying_time": drying_time_cases(),
        "thin_layer": thin_layer_cases(),
        "diffusivity": diffusivity_case(),
        "method_of_lines": method_of_lines_cases(),
    }
    OUT.write_text(json.dumps(fixture, indent=1) + "\n")
    print(f"wrote {OUT}")


if __name__ == "__main__":
    main()
